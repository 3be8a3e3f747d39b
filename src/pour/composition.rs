//! What a batch weighs and how much water it holds, from its components and the density
//! tables of `data/density.yaml`.
//!
//! Each solute takes its apparent specific volume from its own binary table, evaluated at
//! the batch's total solute share (the mixing rule of Laliberté and Cooper, J. Chem. Eng.
//! Data 49, 1141 (2004)); the water fills the rest of the litre. A solute with no table is
//! taken to occupy the volume of its neat liquid, or, for a solid, the volume of the same
//! mass of water; the composition says how much of the batch that covers.

use crate::catalog::{Catalog, PhysicalState, SubstanceId, WATER_MOLAR_MASS};

/// A batch's mass balance.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Composition {
    /// g/mL of the batch.
    pub density_g_per_ml: f64,
    /// g of the whole batch.
    pub mass_g: f64,
    /// g of water in it (crystal water of hydrates and the water of commercial solutions
    /// included).
    pub water_g: f64,
    /// Share of the batch's mass in solutes with no density table (0–1).
    pub untabled_share: f64,
}

impl Composition {
    /// Mol of water.
    pub fn water_mol(&self) -> f64 {
        self.water_g / WATER_MOLAR_MASS
    }
}

/// Grams of the anhydrous solute a component brings, and its apparent specific volume
/// (mL/g) at total solute share `w`, with whether a table gave it.
fn solute_part(cat: &Catalog, sid: SubstanceId, moles: f64, w: f64) -> (f64, f64, bool) {
    if is_water(cat, sid) {
        // Water listed as a component is the solvent, not a solute.
        return (0.0, 0.0, true);
    }
    if let Some((table, m)) = cat.density_table(sid) {
        return (moles * m, table.apparent_volume(w), true);
    }
    let s = cat.substance(sid);
    let solute = s
        .solution
        .as_ref()
        .map_or(s, |sol| cat.substance(sol.solute));
    let crystal = solute
        .formula
        .as_deref()
        .map_or(0.0, crate::catalog::density::crystal_water);
    let m = solute.molar_mass.unwrap_or(0.0) - crystal * WATER_MOLAR_MASS;
    let v = match (solute.state, solute.density_g_per_ml) {
        (PhysicalState::Liquid, Some(d)) if d > 0.0 => 1.0 / d,
        _ => 1.0 / cat.water_density,
    };
    (moles * m.max(0.0), v, false)
}

/// True for water itself.
fn is_water(cat: &Catalog, sid: SubstanceId) -> bool {
    let s = cat.substance(sid);
    s.is_inert() && s.formula.as_deref() == Some("H2O")
}

/// The composition of `volume_l` holding `components` (substance, mol); `density` when
/// the batch states it.
pub fn composition(
    cat: &Catalog,
    components: &[(SubstanceId, f64)],
    volume_l: f64,
    density: Option<f64>,
) -> Composition {
    let ml = volume_l * 1e3;
    let mut rho = density.unwrap_or(1.0);
    let mut solutes_g = 0.0;
    let mut untabled_g = 0.0;
    for _ in 0..50 {
        let mut solute_volume_ml = 0.0;
        solutes_g = 0.0;
        untabled_g = 0.0;
        // The apparent volumes are read at the batch's total solute share.
        let w_total = components
            .iter()
            .map(|&(sid, n)| solute_part(cat, sid, n, 0.0).0)
            .sum::<f64>()
            / (rho * ml).max(f64::MIN_POSITIVE);
        for &(sid, n) in components {
            let (g, v, tabled) = solute_part(cat, sid, n, w_total.min(1.0));
            solutes_g += g;
            solute_volume_ml += g * v;
            if !tabled {
                untabled_g += g;
            }
        }
        if density.is_some() {
            break;
        }
        let water_g = cat.water_density * (ml - solute_volume_ml).max(0.0);
        let next = (water_g + solutes_g) / ml.max(f64::MIN_POSITIVE);
        let done = (next - rho).abs() < 1e-10;
        rho = next;
        if done {
            break;
        }
    }
    let mass_g = rho * ml;
    Composition {
        density_g_per_ml: rho,
        mass_g,
        water_g: (mass_g - solutes_g).max(0.0),
        untabled_share: if mass_g > 0.0 {
            untabled_g / mass_g
        } else {
            0.0
        },
    }
}
