//! Which rules a mixture meets.

use super::{class_mask, Conditions, LoadedRule, Meeting, RuleSet};
use crate::catalog::{Catalog, SubstanceId};
use crate::pour::pairs::Side;

/// One component of the mixture as the rules see it.
#[derive(Debug, Clone)]
pub struct Present {
    pub side: Side,
    pub substance: SubstanceId,
    /// Moles of the substance (of the solute, for a commercial solution).
    pub moles: f64,
}

/// The mixture as rules judge it: what is in it, and the computed state along the pour.
///
/// Where the stream enters, the two batches meet in every ratio, from the container's own
/// liquid to the stream as poured: concentration conditions are judged there, not on the
/// finished (diluted) mixture. The pH and temperature span both orders of pouring, which
/// between them cover every ratio.
#[derive(Debug, Clone)]
pub struct RuleContext {
    pub present: Vec<Present>,
    /// Liquid volume of the container's batch, L.
    pub container_l: f64,
    /// Liquid volume of the stream, L.
    pub stream_l: f64,
    pub ph_min: f64,
    pub ph_max: f64,
    pub temperature_max_c: f64,
}

impl RuleContext {
    /// Concentration (mol/L) of the members on each side in its own liquid.
    fn side_concentrations(&self, members: &[usize]) -> (f64, f64) {
        let mut a = 0.0;
        let mut b = 0.0;
        for &i in members {
            match self.present[i].side {
                Side::Container => a += self.present[i].moles,
                Side::Stream => b += self.present[i].moles,
            }
        }
        let per = |n: f64, v: f64| if v > 0.0 { n / v } else { 0.0 };
        (per(a, self.container_l), per(b, self.stream_l))
    }

    /// True when some ratio of the two batches gives every group at least `min` mol/L:
    /// a group's concentration is linear in the stream's share s of the meeting liquid,
    /// c(s) = (1 − s)·c_container + s·c_stream, so each group allows an interval of s.
    fn meets_concentrations(&self, groups: &[Vec<usize>], min: f64) -> bool {
        let (mut lo, mut hi) = (0.0f64, 1.0f64);
        for g in groups {
            let (a, b) = self.side_concentrations(g);
            let slope = b - a;
            if slope.abs() < f64::MIN_POSITIVE {
                if a < min {
                    return false;
                }
                continue;
            }
            let s_at_min = (min - a) / slope;
            if slope > 0.0 {
                lo = lo.max(s_at_min);
            } else {
                hi = hi.min(s_at_min);
            }
        }
        lo <= hi
    }
}

/// A rule that holds, with the components that met in each group.
#[derive(Debug, Clone)]
pub struct RuleHit<'r> {
    pub rule: &'r LoadedRule,
    /// For each group, the names of the components that satisfy it.
    pub groups: Vec<Vec<String>>,
    /// The substances that satisfy any group.
    pub substances: Vec<SubstanceId>,
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

/// Each component's hazard classes as a mask, to pass over rules none of them can meet.
fn present_masks(cat: &Catalog, ctx: &RuleContext) -> smallvec::SmallVec<[u128; 8]> {
    ctx.present
        .iter()
        .map(|p| {
            class_mask(
                cat,
                cat.substance(p.substance)
                    .classes
                    .iter()
                    .map(String::as_str),
            )
        })
        .collect()
}

/// For each group of the rule, the components (indices into `present`) that carry it.
fn candidates(cat: &Catalog, ctx: &RuleContext, meet: &[Vec<String>]) -> Vec<Vec<usize>> {
    meet.iter()
        .map(|group| {
            ctx.present
                .iter()
                .enumerate()
                .filter(|(_, p)| carries(cat, p.substance, group))
                .map(|(i, _)| i)
                .collect()
        })
        .collect()
}

/// Whether the pH and temperature reached along the pour meet the rule's conditions.
fn state_meets(ctx: &RuleContext, w: &Conditions) -> bool {
    let ph_ok = match (w.ph_above, w.ph_below) {
        (Some(lo), Some(hi)) => ctx.ph_max > lo && ctx.ph_min < hi,
        (Some(lo), None) => ctx.ph_max > lo,
        (None, Some(hi)) => ctx.ph_min < hi,
        (None, None) => true,
    };
    let t_ok = w
        .temperature_above_c
        .is_none_or(|t| ctx.temperature_max_c > t);
    ph_ok && t_ok
}

/// The rule's hit when the mixture meets it: the classes are there (each group from its own
/// component, from both sides when it says `across`), concentrated enough, and the state
/// along the pour meets its conditions.
fn hit<'r>(
    cat: &Catalog,
    ctx: &RuleContext,
    lr: &'r LoadedRule,
    present_masks: &[u128],
) -> Option<RuleHit<'r>> {
    let someone_carries = |group: u128| present_masks.iter().any(|m| m & group != 0);
    if !lr.meet_masks.iter().all(|&g| someone_carries(g)) {
        return None;
    }
    let r = &lr.rule;
    let candidates = candidates(cat, ctx, &r.meet);
    if candidates.iter().any(|c| c.is_empty()) {
        return None;
    }
    if let Some(min) = r.when.min_mol_per_l {
        if !ctx.meets_concentrations(&candidates, min) {
            return None;
        }
    }
    let across = r.meeting == Meeting::Across;
    if !assign(&candidates, &ctx.present, 0, &mut Vec::new(), across) {
        return None;
    }
    if !state_meets(ctx, &r.when) {
        return None;
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
    let substances = candidates
        .iter()
        .flatten()
        .map(|&i| ctx.present[i].substance)
        .collect();
    Some(RuleHit {
        rule: lr,
        groups,
        substances,
    })
}

/// A component's own hazard is not repeated where a rule about its meeting names it, nor
/// where an earlier presence rule already named every component it would.
fn drop_repeated_presence(hits: &mut Vec<RuleHit<'_>>) {
    let named_by_meeting: Vec<SubstanceId> = hits
        .iter()
        .filter(|h| !h.rule.rule.presence)
        .flat_map(|h| h.substances.iter().copied())
        .collect();
    let mut named_by_presence: Vec<SubstanceId> = Vec::new();
    hits.retain(|h| {
        if !h.rule.rule.presence {
            return true;
        }
        let fresh = h
            .substances
            .iter()
            .any(|s| !named_by_meeting.contains(s) && !named_by_presence.contains(s));
        named_by_presence.extend(h.substances.iter().copied());
        fresh
    });
}

impl RuleSet {
    /// Every rule the mixture meets, in the order the rules are listed.
    pub fn evaluate<'r>(&'r self, cat: &Catalog, ctx: &RuleContext) -> Vec<RuleHit<'r>> {
        let masks = present_masks(cat, ctx);
        let mut hits: Vec<RuleHit<'r>> = self
            .rules
            .iter()
            .filter_map(|lr| hit(cat, ctx, lr, &masks))
            .collect();
        drop_repeated_presence(&mut hits);
        hits
    }
}
