//! Which rules a mixture meets.

use super::{LoadedRule, Meeting, RuleSet};
use crate::catalog::{Catalog, SubstanceId};
use crate::pairs::Side;

/// One component of the mixture as the rules see it.
#[derive(Debug, Clone)]
pub struct Present {
    pub side: Side,
    pub substance: SubstanceId,
    /// Moles of the substance (of the solute, for a commercial solution).
    pub moles: f64,
}

/// The mixture as rules judge it: what is in it, and the computed state along the pour.
#[derive(Debug, Clone)]
pub struct RuleContext {
    pub present: Vec<Present>,
    /// Liquid volume of the finished mixture, L.
    pub liquid_l: f64,
    pub ph_min: f64,
    pub ph_max: f64,
    pub temperature_max_c: f64,
}

/// A rule that holds, with the components that met in each group.
#[derive(Debug, Clone)]
pub struct RuleHit<'r> {
    pub rule: &'r LoadedRule,
    /// For each group, the names of the components that satisfy it.
    pub groups: Vec<Vec<String>>,
}

fn carries(cat: &Catalog, sid: SubstanceId, group: &[String]) -> bool {
    cat.substance(sid).classes.iter().any(|c| group.contains(c))
}

/// Tries to give each group its own component (indices into `present`), respecting sides.
fn assign(
    candidates: &[Vec<usize>],
    present: &[Present],
    group: usize,
    used: &mut Vec<usize>,
    across: bool,
) -> bool {
    if group == candidates.len() {
        if !across {
            return true;
        }
        let sides: Vec<Side> = used.iter().map(|&i| present[i].side).collect();
        return sides.contains(&Side::Container) && sides.contains(&Side::Stream);
    }
    for &i in &candidates[group] {
        let same_substance = used
            .iter()
            .any(|&u| present[u].substance == present[i].substance);
        if used.contains(&i) || same_substance {
            continue;
        }
        used.push(i);
        if assign(candidates, present, group + 1, used, across) {
            return true;
        }
        used.pop();
    }
    false
}

impl RuleSet {
    /// Every rule the mixture meets, in the order the rules are listed.
    pub fn evaluate<'r>(&'r self, cat: &Catalog, ctx: &RuleContext) -> Vec<RuleHit<'r>> {
        let mut hits = Vec::new();
        for lr in &self.rules {
            let r = &lr.rule;
            let w = &r.when;
            let min_c = w.min_mol_per_l.unwrap_or(0.0);
            let candidates: Vec<Vec<usize>> = r
                .meet
                .iter()
                .map(|group| {
                    let members: Vec<usize> = ctx
                        .present
                        .iter()
                        .enumerate()
                        .filter(|(_, p)| carries(cat, p.substance, group))
                        .map(|(i, _)| i)
                        .collect();
                    let total: f64 = members.iter().map(|&i| ctx.present[i].moles).sum();
                    if ctx.liquid_l > 0.0 && total / ctx.liquid_l < min_c {
                        Vec::new()
                    } else {
                        members
                    }
                })
                .collect();
            if candidates.iter().any(|c| c.is_empty()) {
                continue;
            }
            let mut used = Vec::new();
            if !assign(
                &candidates,
                &ctx.present,
                0,
                &mut used,
                r.meeting == Meeting::Across,
            ) {
                continue;
            }
            let ph_ok = match (w.ph_above, w.ph_below) {
                (Some(lo), Some(hi)) => ctx.ph_max > lo && ctx.ph_min < hi,
                (Some(lo), None) => ctx.ph_max > lo,
                (None, Some(hi)) => ctx.ph_min < hi,
                (None, None) => true,
            };
            let t_ok = w
                .temperature_above_c
                .is_none_or(|t| ctx.temperature_max_c > t);
            if !(ph_ok && t_ok) {
                continue;
            }
            let groups = candidates
                .iter()
                .map(|c| {
                    let mut names: Vec<String> = c
                        .iter()
                        .map(|&i| cat.substance(ctx.present[i].substance).name.clone())
                        .collect();
                    names.dedup();
                    names
                })
                .collect();
            hits.push(RuleHit { rule: lr, groups });
        }
        hits
    }
}
