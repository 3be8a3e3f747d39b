//! Does the mixture boil? From the mixture itself: a liquid boils when its total vapour
//! pressure at the temperature reached meets the pressure over it.
//!
//! * Water by Raoult's law: its mole fraction among everything dissolved times the vapour
//!   pressure of pure water (Antoine, `data/physical.yaml`).
//! * Each dissolved gas (HCl, NH3, HCN, CO2, ...) by its partial pressure from the
//!   speciation (Henry's law) — never by the boiling point of the pure gas.
//! * Each solvent by Henry's law while dissolved (capped by its pure liquid's vapour
//!   pressure, and at least Raoult's share of it); beyond its solubility it forms a layer of
//!   its own with the full vapour pressure of the pure liquid (`data/volatility.yaml`).

use crate::catalog::{Catalog, SubstanceId};
use crate::chem::Equilibrium;
use serde::Serialize;

/// What the liquid holds besides the solved species, for its vapour pressure.
#[derive(Debug, Clone, Default)]
pub struct LiquidMakeup {
    /// Mol of water.
    pub water_mol: f64,
    /// Mol of strong ions (Na+, Cl-, ...), which the speciation does not list.
    pub strong_ion_mol: f64,
    /// Solvents and other volatile liquids: (substance, mol).
    pub solvents: Vec<(SubstanceId, f64)>,
}

/// One contribution to the vapour pressure.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct VapourShare {
    pub what: String,
    pub kpa: f64,
    /// A solvent past its solubility, boiling as a layer of its own.
    pub layer: bool,
}

/// The vapour pressure of a liquid at a temperature.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct VapourPressure {
    pub temperature_c: f64,
    pub total_kpa: f64,
    /// Pressure over the liquid, kPa: the atmosphere (a sealed vessel boils the moment it
    /// is opened).
    pub pressure_over_kpa: f64,
    pub shares: Vec<VapourShare>,
}

impl VapourPressure {
    pub fn boils(&self) -> bool {
        self.total_kpa >= self.pressure_over_kpa
    }

    /// The largest shares, in words ("water 12.3 kPa, NH3 80.1 kPa").
    pub fn describe(&self) -> String {
        let mut s: Vec<&VapourShare> = self.shares.iter().filter(|s| s.kpa >= 0.05).collect();
        s.sort_by(|a, b| b.kpa.total_cmp(&a.kpa));
        s.iter()
            .take(4)
            .map(|s| {
                format!(
                    "{} {} kPa{}",
                    s.what,
                    crate::basics::text::fixed(s.kpa, 1),
                    if s.layer {
                        " as a layer of its own"
                    } else {
                        ""
                    }
                )
            })
            .collect::<Vec<_>>()
            .join(", ")
    }
}

/// The vapour pressure of the liquid of `eq` (its gases as solved at `eq`'s temperature),
/// with water and solvents taken at `t_k`.
pub fn vapour_pressure(
    cat: &Catalog,
    eq: &Equilibrium,
    makeup: &LiquidMakeup,
    t_k: f64,
) -> VapourPressure {
    let phys = &cat.physical;
    let v = eq.liquid_l;
    let mut shares = Vec::new();
    let mut dissolved = makeup.strong_ion_mol;
    for f in &eq.families {
        dissolved += f.concentrations.iter().sum::<f64>() * v;
    }
    dissolved += eq.combined.iter().map(|c| c.concentration).sum::<f64>() * v;
    let mut solvent_mol = 0.0;
    for &(sid, n) in &makeup.solvents {
        let Some(vol) = cat.volatility(sid) else {
            continue;
        };
        let s = cat.substance(sid);
        let name = s
            .solution
            .as_ref()
            .map_or(s.name.clone(), |sol| cat.substance(sol.solute).name.clone());
        let mw = cat
            .substance(s.solution.as_ref().map_or(sid, |sol| sol.solute))
            .molar_mass
            .unwrap_or(0.0);
        let p_sat = vol.vapour_pressure_pa(t_k, phys.kelvin_offset, phys.p_std);
        let in_water_mol = match vol.solubility_g_per_l {
            Some(sol) if mw > 0.0 && n * mw / v > sol => sol / mw * v,
            _ => n,
        };
        let layer = in_water_mol < n;
        let pa = if layer {
            p_sat
        } else {
            let c = n / v;
            let henry = c * 1e3 / vol.hcp_at(t_k, phys.t_ref);
            // Raoult's share holds where the solvent is most of the liquid.
            let x = n / (n + makeup.water_mol + dissolved).max(f64::MIN_POSITIVE);
            henry.max(x * p_sat).min(p_sat)
        };
        solvent_mol += in_water_mol;
        shares.push(VapourShare {
            what: name,
            kpa: pa / 1e3,
            layer,
        });
    }
    let water_x = if makeup.water_mol <= 0.0 {
        0.0
    } else if eq.activity_model == crate::chem::ActivityModelUsed::IonInteraction {
        // The concentrated model gives water's activity from the ions; solvents dilute it.
        eq.water_activity * makeup.water_mol / (makeup.water_mol + solvent_mol)
    } else {
        makeup.water_mol / (makeup.water_mol + dissolved + solvent_mol)
    };
    shares.insert(
        0,
        VapourShare {
            what: "water".into(),
            kpa: water_x * phys.water_vapour_pa(t_k) / 1e3,
            layer: false,
        },
    );
    for g in &eq.gases {
        shares.push(VapourShare {
            what: g.gas.to_string(),
            kpa: g.partial_pressure_pa / 1e3,
            layer: false,
        });
    }
    VapourPressure {
        temperature_c: t_k - phys.kelvin_offset,
        total_kpa: shares.iter().map(|s| s.kpa).sum(),
        pressure_over_kpa: phys.p_std / 1e3,
        shares,
    }
}
