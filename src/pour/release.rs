//! Gas released by stoichiometry (hydrogen from metals and hydrides): how much, and what
//! share of the headspace it takes.

use crate::catalog::{Catalog, SubstanceId, Trigger};
use crate::chem::Closure;
use serde::Serialize;

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ReleaseReport {
    pub formula: String,
    pub moles: f64,
    /// Volume of the gas at the mixture temperature and 1 atm.
    pub litres_at_1_atm: f64,
    /// Share of the headspace it would take, by volume.
    pub headspace_percent: f64,
    /// Pressure it adds to a sealed vessel (0 for vented and open ones).
    pub overpressure_kpa: f64,
    /// Lower flammable limit, % by volume in air, if the gas is flammable.
    pub lfl_percent: Option<f64>,
    pub reactions: Vec<String>,
}

/// Every stoichiometric gas the components release under the conditions along the pour.
#[allow(clippy::too_many_arguments)]
pub fn releases(
    cat: &Catalog,
    components: &[(SubstanceId, f64)],
    ph_range: (f64, f64),
    temperature_k: f64,
    headspace_l: f64,
    closure: Closure,
) -> Vec<ReleaseReport> {
    let phys = &cat.physical;
    let mut out: Vec<ReleaseReport> = Vec::new();
    for &(sid, moles) in components {
        for (rid, r) in &cat.releases {
            if *rid != sid {
                continue;
            }
            let triggered = r.with.iter().any(|t| match t {
                Trigger::Water => true,
                Trigger::Acid => ph_range.0 < 6.0,
                Trigger::Base => ph_range.1 > 12.0,
            });
            if !triggered {
                continue;
            }
            let n = moles * r.per_mole;
            match out.iter_mut().find(|o| o.formula == r.gas) {
                Some(o) => {
                    o.moles += n;
                    o.reactions.push(r.reaction.clone());
                }
                None => out.push(ReleaseReport {
                    formula: r.gas.clone(),
                    moles: n,
                    litres_at_1_atm: 0.0,
                    headspace_percent: 0.0,
                    overpressure_kpa: 0.0,
                    lfl_percent: cat
                        .gas_limits(&r.gas)
                        .and_then(|l| l.flammability.as_ref())
                        .map(|f| f.lfl.value / 1e4),
                    reactions: vec![r.reaction.clone()],
                }),
            }
        }
    }
    for o in &mut out {
        // V = nRT/P, in litres.
        o.litres_at_1_atm = o.moles * phys.r * temperature_k / phys.p_std * 1e3;
        match closure {
            Closure::Sealed if headspace_l > 0.0 => {
                let p = o.moles * phys.r * temperature_k / (headspace_l / 1e3);
                o.overpressure_kpa = p / 1e3;
                o.headspace_percent = 100.0 * p / (phys.p_std + p);
            }
            _ => {
                // It pushes air out through the vent or opening until it fills the space.
                let v = o.litres_at_1_atm;
                o.headspace_percent = if headspace_l + v > 0.0 {
                    100.0 * v / (headspace_l + v)
                } else {
                    0.0
                };
            }
        }
    }
    out
}
