//! The engine of one pour, below the judgement: the batches as written (`batch`,
//! `composition`), the mixture at each share added, warmed by its own heat of reaction and
//! dilution and solved at the temperature it reaches (here, with `heat` and `boiling`), the
//! scan along both orders (`path`), the proton transfers between the two (`pairs`), and
//! what the room and an open surface receive (`room`, `release`). It computes; it never
//! judges and never formats.

pub mod batch;
pub mod boiling;
pub mod composition;
pub mod heat;
pub mod pairs;
pub mod path;
pub mod release;
pub mod room;

use crate::catalog::{Catalog, SubstanceId};
use crate::chem::{solve_from, Equilibrium, Mixture, SolveError, SolverSettings};
use crate::pour::batch::Batch;
use crate::pour::boiling::LiquidMakeup;
use crate::pour::heat::{reaction_heat_kj, temperature_rise};
use serde::Serialize;

/// Highest temperature the aqueous model is solved at; above it the mixture boils.
const BOILING_K: f64 = 373.15;

/// A batch as the heat balance sees it.
#[derive(Debug, Clone)]
pub struct BatchHeat {
    /// Mass of the batch, g.
    pub mass_g: f64,
    /// Mol of water in it.
    pub water_mol: f64,
    /// Components with a dilution curve: (substance, mol of solute).
    pub diluting: Vec<(SubstanceId, f64)>,
    /// Solvents and other volatile liquids, for the boiling point: (substance, mol).
    pub solvents: Vec<(SubstanceId, f64)>,
}

/// Heat and temperature of one state along the pour.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct HeatReport {
    /// Volume-weighted mean temperature of what has met, before any heat.
    pub start_temperature_c: f64,
    /// Heat of the proton transfers (Hess's law), kJ; positive warms the mixture.
    pub reaction_heat_kj: f64,
    /// Heat of diluting concentrated reagents, kJ.
    pub dilution_heat_kj: f64,
    pub temperature_rise_k: f64,
    /// Temperature the mixture reaches (held at 100 °C, the top of the aqueous model).
    pub final_temperature_c: f64,
    /// Temperature the heat alone would bring it to (beyond 100 °C when it boils).
    pub would_reach_c: f64,
    /// Its vapour pressure reaches the pressure over it (set by the boiling assessment).
    pub boils: bool,
}

impl BatchHeat {
    pub fn of(cat: &Catalog, b: &Batch) -> BatchHeat {
        let comp = b.composition(cat);
        let diluting = b
            .components
            .iter()
            .filter(|c| c.moles > 0.0 && cat.dilution_curve(c.substance).is_some())
            .map(|c| (c.substance, c.moles))
            .collect();
        let solvents = b
            .components
            .iter()
            .filter(|c| c.moles > 0.0 && cat.volatility(c.substance).is_some())
            .map(|c| (c.substance, c.moles))
            .collect();
        BatchHeat {
            mass_g: comp.mass_g,
            water_mol: comp.water_mol(),
            diluting,
            solvents,
        }
    }
}

impl HeatReport {
    /// "releases 581 kJ (8 kJ from proton transfers, 573 kJ from diluting concentrated
    /// reagents)", with `decimals` decimals.
    pub fn released_words(&self, decimals: usize) -> String {
        let fixed = crate::basics::text::fixed;
        format!(
            "releases {} kJ ({} kJ from proton transfers, {} kJ from diluting concentrated reagents)",
            fixed(self.reaction_heat_kj + self.dilution_heat_kj, decimals),
            fixed(self.reaction_heat_kj, decimals),
            fixed(self.dilution_heat_kj, decimals)
        )
    }

    /// A state that no heat has reached: at rest at `t_c`.
    pub fn at_rest(t_c: f64) -> HeatReport {
        HeatReport {
            start_temperature_c: t_c,
            reaction_heat_kj: 0.0,
            dilution_heat_kj: 0.0,
            temperature_rise_k: 0.0,
            final_temperature_c: t_c,
            would_reach_c: t_c,
            boils: false,
        }
    }
}

/// A pour of `stream` into a vessel holding `vessel`.
pub struct Pour<'a> {
    pub cat: &'a Catalog,
    pub settings: SolverSettings,
    pub vessel: &'a Mixture,
    pub stream: &'a Mixture,
    pub capacity_l: f64,
    pub vessel_heat: &'a BatchHeat,
    pub stream_heat: &'a BatchHeat,
    /// Each batch at equilibrium on its own (the starting point of the heat balance).
    pub vessel_alone: &'a Equilibrium,
    pub stream_alone: &'a Equilibrium,
}

impl Pour<'_> {
    fn mixture(&self, f: f64) -> Mixture {
        self.vessel.pour(self.stream, f, self.capacity_l)
    }

    /// Heat of dilution (kJ) when the stream's fraction `f` joins the vessel: each solute
    /// with a dilution curve goes from the water it had in its own batch to the water of
    /// the mixture, and releases the difference of its integral heats of dilution.
    fn dilution_kj(&self, f: f64) -> f64 {
        let water = self.vessel_heat.water_mol + f * self.stream_heat.water_mol;
        let mut q = 0.0;
        for (heat, scale) in [(self.vessel_heat, 1.0), (self.stream_heat, f)] {
            if scale == 0.0 {
                continue;
            }
            for &(sid, moles) in &heat.diluting {
                let Some(curve) = self.cat.dilution_curve(sid) else {
                    continue;
                };
                let before = heat.water_mol / moles;
                let after = water / (moles * scale);
                q += moles * scale * (curve.value(after) - curve.value(before));
            }
        }
        q
    }

    /// The heat balance of the state at fraction `f`, given its equilibrium at the start
    /// temperature.
    pub fn heat(&self, f: f64, at_start: &Equilibrium) -> HeatReport {
        let start_k = self.mixture(f).temperature_k;
        let reaction =
            reaction_heat_kj(self.cat, self.vessel_alone, f, self.stream_alone, at_start);
        let dilution = self.dilution_kj(f);
        let mass = self.vessel_heat.mass_g + f * self.stream_heat.mass_g;
        let rise = temperature_rise(reaction + dilution, mass, self.cat.water_heat_capacity());
        let end_k = start_k + rise;
        HeatReport {
            start_temperature_c: start_k - self.cat.physical.kelvin_offset,
            reaction_heat_kj: reaction,
            dilution_heat_kj: dilution,
            temperature_rise_k: rise,
            final_temperature_c: end_k.min(BOILING_K) - self.cat.physical.kelvin_offset,
            would_reach_c: end_k - self.cat.physical.kelvin_offset,
            boils: end_k > BOILING_K,
        }
    }

    /// What the liquid holds at fraction `f` besides the solved species.
    pub fn makeup(&self, f: f64) -> LiquidMakeup {
        let m = self.mixture(f);
        let mut solvents = self.vessel_heat.solvents.clone();
        for &(sid, n) in &self.stream_heat.solvents {
            match solvents.iter_mut().find(|(s, _)| *s == sid) {
                Some((_, have)) => *have += n * f,
                None => solvents.push((sid, n * f)),
            }
        }
        LiquidMakeup {
            water_mol: self.vessel_heat.water_mol + f * self.stream_heat.water_mol,
            strong_ion_mol: m.ions.iter().map(|(_, n)| n).sum(),
            solvents,
        }
    }

    /// The mixture at fraction `f` solved at `t_k` (within the aqueous model's range),
    /// starting from the neighbouring state `near`.
    pub fn solve_at(
        &self,
        f: f64,
        t_k: f64,
        near: Option<&Equilibrium>,
    ) -> Result<Equilibrium, SolveError> {
        let mut m = self.mixture(f);
        m.temperature_k = t_k.clamp(273.15, BOILING_K);
        solve_from(self.cat, &m, &self.settings, near)
    }

    /// The state at fraction `f`, solved at the temperature its own heat brings it to,
    /// starting from the neighbouring state `near`.
    pub fn state(
        &self,
        f: f64,
        near: Option<&Equilibrium>,
    ) -> Result<(Equilibrium, HeatReport), SolveError> {
        let mut m = self.mixture(f);
        let first = solve_from(self.cat, &m, &self.settings, near)?;
        let heat = self.heat(f, &first);
        if (heat.temperature_rise_k).abs() < 1e-3 {
            return Ok((first, heat));
        }
        m.temperature_k =
            (heat.final_temperature_c + self.cat.physical.kelvin_offset).clamp(273.15, BOILING_K);
        Ok((
            solve_from(self.cat, &m, &self.settings, Some(&first))?,
            heat,
        ))
    }
}
