//! Heat of mixing: proton transfers by Hess's law, and the dilution of concentrated
//! reagents; the temperature it leads to.
//!
//! Each bound proton carries the enthalpy of its step (binding releases the ionization
//! enthalpy); each hydroxide ion carries the ionization enthalpy of water. The reaction
//! heat of a pour is the change of that sum between the two batches apart and the mixture.

use crate::catalog::Catalog;
use crate::chem::Equilibrium;

/// Enthalpy of the proton placement in a state, kJ, relative to every family fully
/// deprotonated with its protons free and no hydroxide.
pub fn proton_enthalpy_kj(cat: &Catalog, eq: &Equilibrium) -> f64 {
    let water_dh = cat.family(cat.water).steps[0].dh;
    let mut h = eq.oh_mol_per_l * eq.liquid_l * water_dh;
    let species_h = |fam: &crate::catalog::Family, j: usize| -> f64 {
        // Species j holds the protons of steps j..n; binding each released its dh.
        -fam.steps[j..].iter().map(|s| s.dh).sum::<f64>()
    };
    for fs in &eq.families {
        let fam = cat.family(fs.family);
        for (j, c) in fs.concentrations.iter().enumerate() {
            h += c * eq.liquid_l * species_h(fam, j);
        }
        if let Some(idx) = fam.volatile_index() {
            let in_gas: f64 = eq
                .gases
                .iter()
                .filter(|g| g.family == fs.family && !g.from_combined)
                .map(|g| g.moles_in_gas)
                .sum();
            h += in_gas * species_h(fam, idx);
        }
    }
    for c in &eq.combined {
        let link = &cat.combined[c.catalog_index];
        let f1 = cat.family(link.first.0);
        let f2 = cat.family(link.second.0);
        let per_mol =
            species_h(f1, link.first.1) + species_h(f2, link.second.1) + link.data.dh_formation;
        h += (c.concentration * eq.liquid_l + c.moles_in_gas) * per_mol;
    }
    h
}

/// Heat released (kJ, positive when the mixture warms) when `a` and `b` become `mix`.
pub fn reaction_heat_kj(
    cat: &Catalog,
    a: &Equilibrium,
    b_scaled: f64,
    b: &Equilibrium,
    mix: &Equilibrium,
) -> f64 {
    let before = proton_enthalpy_kj(cat, a) + b_scaled * proton_enthalpy_kj(cat, b);
    before - proton_enthalpy_kj(cat, mix)
}

/// Temperature rise (K) from `heat_kj` warming `mass_g` of liquid of heat capacity `cp`.
pub fn temperature_rise(heat_kj: f64, mass_g: f64, cp_j_per_g_k: f64) -> f64 {
    if mass_g > 0.0 {
        heat_kj * 1e3 / (mass_g * cp_j_per_g_k)
    } else {
        0.0
    }
}
