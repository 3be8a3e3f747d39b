//! One pour followed step by step: the mixture at each fraction added, warmed by its own
//! heat of reaction and dilution, solved at the temperature it reaches.

use crate::batch::Batch;
use crate::catalog::{Catalog, SubstanceId};
use crate::chem::{solve, Equilibrium, Mixture, SolveError, SolverSettings};
use crate::heat::{reaction_heat_kj, temperature_rise};
use serde::Serialize;

/// Highest temperature the aqueous model is solved at; above it the mixture boils.
const BOILING_K: f64 = 373.15;

/// A reagent below this mass share of its batch is already dilute: the rest of its heat of
/// dilution is small (a few kJ/mol at most) and is not counted.
const CONCENTRATED_SHARE: f64 = 0.1;

/// A batch as the heat balance sees it.
#[derive(Debug, Clone)]
pub struct BatchHeat {
    /// Mass of the batch, g.
    pub mass_g: f64,
    /// Components with a heat of dilution: (substance, mol of solute, mass as written, g).
    pub diluting: Vec<(SubstanceId, f64, f64)>,
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
    /// Temperature the mixture reaches (held at 100 °C when it would boil).
    pub final_temperature_c: f64,
    pub boils: bool,
}

/// Grams of a component as written (a commercial solution counts with its water).
fn component_mass_g(cat: &Catalog, sid: SubstanceId, moles: f64) -> f64 {
    let s = cat.substance(sid);
    match (&s.solution, s.density_g_per_ml) {
        (Some(sol), Some(d)) => moles / sol.solute_mol_per_ml * d,
        _ => moles * s.molar_mass.unwrap_or(0.0),
    }
}

impl BatchHeat {
    pub fn of(cat: &Catalog, b: &Batch) -> BatchHeat {
        let written: f64 = b
            .components
            .iter()
            .map(|c| component_mass_g(cat, c.substance, c.moles))
            .sum();
        // Without a stated density, a batch weighs at least its water and at least what
        // its components weigh (a neat concentrated reagent is heavier than water).
        let mass_g = if b.density_given {
            b.volume_l * b.density_g_per_ml * 1e3
        } else {
            (b.volume_l * 1e3).max(written)
        };
        let diluting = b
            .components
            .iter()
            .filter(|c| cat.dissolution_heat(c.substance).is_some())
            .map(|c| {
                (
                    c.substance,
                    c.moles,
                    component_mass_g(cat, c.substance, c.moles),
                )
            })
            .collect();
        BatchHeat { mass_g, diluting }
    }
}

impl HeatReport {
    /// A state that no heat has reached: at rest at `t_c`.
    pub fn at_rest(t_c: f64) -> HeatReport {
        HeatReport {
            start_temperature_c: t_c,
            reaction_heat_kj: 0.0,
            dilution_heat_kj: 0.0,
            temperature_rise_k: 0.0,
            final_temperature_c: t_c,
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

    /// Heat of dilution (kJ) when the stream's fraction `f` joins the vessel: each
    /// concentrated component (at least a tenth of its batch by mass) releases its heat to
    /// infinite dilution in proportion to how far its mass share falls (a linear stand-in
    /// for the integral heat curve).
    fn dilution_kj(&self, f: f64) -> f64 {
        let total = self.vessel_heat.mass_g + f * self.stream_heat.mass_g;
        if total <= 0.0 {
            return 0.0;
        }
        let mut q = 0.0;
        for (heat, scale) in [(self.vessel_heat, 1.0), (self.stream_heat, f)] {
            if heat.mass_g <= 0.0 || scale == 0.0 {
                continue;
            }
            for &(sid, moles, mass) in &heat.diluting {
                let dh = self.cat.dissolution_heat(sid).unwrap_or(0.0);
                let before = (mass / heat.mass_g).min(1.0);
                if before < CONCENTRATED_SHARE {
                    continue;
                }
                let after = (mass * scale / total).min(1.0);
                q += -dh * moles * scale * (before - after).max(0.0);
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
            boils: end_k > BOILING_K,
        }
    }

    /// The state at fraction `f`, solved at the temperature its own heat brings it to.
    pub fn state(&self, f: f64) -> Result<(Equilibrium, HeatReport), SolveError> {
        let mut m = self.mixture(f);
        let first = solve(self.cat, &m, &self.settings)?;
        let heat = self.heat(f, &first);
        if (heat.temperature_rise_k).abs() < 1e-3 {
            return Ok((first, heat));
        }
        m.temperature_k =
            (heat.final_temperature_c + self.cat.physical.kelvin_offset).clamp(273.15, BOILING_K);
        Ok((solve(self.cat, &m, &self.settings)?, heat))
    }
}
