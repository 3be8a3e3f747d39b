//! The path of mixing: every state the vessel passes through while a stream is poured in.
//!
//! The scan is fine near both ends (the first drops and the last ones are where a small
//! amount meets a large excess) and refined around the worst point found.

use crate::chem::{Equilibrium, SolveError};

/// Fractions of the stream added at which the vessel is solved before refinement.
pub const SCAN: [f64; 33] = [
    0.0, 1e-4, 3e-4, 1e-3, 3e-3, 0.01, 0.02, 0.035, 0.05, 0.075, 0.1, 0.15, 0.2, 0.25, 0.3, 0.35,
    0.4, 0.45, 0.5, 0.55, 0.6, 0.65, 0.7, 0.75, 0.8, 0.85, 0.9, 0.95, 0.98, 0.99, 0.995, 0.999,
    1.0,
];

/// Golden-section steps around the worst scanned point.
const REFINE_STEPS: usize = 16;

/// A coarser scan for screening many pairs (the storeroom audit): the same ends, fewer
/// points between, fewer refinement steps.
pub const SCAN_COARSE: [f64; 14] = [
    0.0, 1e-3, 0.01, 0.03, 0.07, 0.15, 0.25, 0.4, 0.55, 0.7, 0.85, 0.95, 0.99, 1.0,
];
const REFINE_STEPS_COARSE: usize = 8;

/// How finely a pour is followed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Detail {
    #[default]
    Full,
    Coarse,
}

#[derive(Debug, Clone)]
pub struct PathState {
    pub fraction_added: f64,
    pub score: f64,
    pub state: Equilibrium,
}

#[derive(Debug, Clone)]
pub struct PathScan {
    pub worst: PathState,
    pub end: PathState,
    /// (fraction added, score) of every state solved, in order of fraction.
    pub profile: Vec<(f64, f64)>,
    /// Lowest and highest pH met along the pour.
    pub ph_range: (f64, f64),
    /// Highest temperature along the pour, K.
    pub temperature_max_k: f64,
    /// Each gas at its own highest partial pressure among the states solved:
    /// (gas, fraction added there, Pa).
    pub gas_peaks: Vec<(String, f64, f64)>,
}

/// Follows a pour through `state_at(fraction added)` and finds the worst state by `score`.
/// `starts_empty` says the vessel holds nothing before the first drop.
pub fn scan(
    state_at: &dyn Fn(f64) -> Result<Equilibrium, SolveError>,
    starts_empty: bool,
    score: &dyn Fn(&Equilibrium) -> f64,
    detail: Detail,
) -> Result<PathScan, (f64, SolveError)> {
    let (points, refine_steps): (&[f64], usize) = match detail {
        Detail::Full => (&SCAN, REFINE_STEPS),
        Detail::Coarse => (&SCAN_COARSE, REFINE_STEPS_COARSE),
    };
    let at = |f: f64| -> Result<PathState, (f64, SolveError)> {
        let state = state_at(f).map_err(|e| (f, e))?;
        Ok(PathState {
            fraction_added: f,
            score: score(&state),
            state,
        })
    };
    // A vessel that starts empty has no state at "nothing added yet".
    let start = if starts_empty { 1 } else { 0 };
    let mut states = Vec::with_capacity(points.len() + refine_steps);
    for &f in &points[start..] {
        states.push(at(f)?);
    }
    let (wi, _) = states
        .iter()
        .enumerate()
        .max_by(|a, b| a.1.score.total_cmp(&b.1.score))
        .expect("the scan has points");
    let mut worst = states[wi].clone();
    let lo_i = wi.saturating_sub(1);
    let hi_i = (wi + 1).min(states.len() - 1);
    let (mut lo, mut hi) = (states[lo_i].fraction_added, states[hi_i].fraction_added);
    if hi > lo && worst.score > 0.0 {
        let g = 0.5 * (5f64.sqrt() - 1.0);
        let mut c = at(hi - g * (hi - lo))?;
        let mut d = at(lo + g * (hi - lo))?;
        states.push(c.clone());
        states.push(d.clone());
        for _ in 0..refine_steps {
            if c.score >= d.score {
                hi = d.fraction_added;
                d = c;
                c = at(hi - g * (hi - lo))?;
                states.push(c.clone());
            } else {
                lo = c.fraction_added;
                c = d;
                d = at(lo + g * (hi - lo))?;
                states.push(d.clone());
            }
        }
        for s in &states {
            if s.score > worst.score {
                worst = s.clone();
            }
        }
    }
    let end = states
        .iter()
        .find(|s| s.fraction_added == 1.0)
        .cloned()
        .expect("the scan ends at 1");
    let mut profile: Vec<(f64, f64)> = states.iter().map(|s| (s.fraction_added, s.score)).collect();
    profile.sort_by(|a, b| a.0.total_cmp(&b.0));
    let ph_range = states
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), s| {
            (lo.min(s.state.ph), hi.max(s.state.ph))
        });
    let temperature_max_k = states
        .iter()
        .map(|s| s.state.temperature_k)
        .fold(f64::NEG_INFINITY, f64::max);
    let mut gas_peaks: Vec<(String, f64, f64)> = Vec::new();
    for s in &states {
        for g in &s.state.gases {
            match gas_peaks.iter_mut().find(|p| p.0 == g.gas) {
                Some(p) if g.partial_pressure_pa > p.2 => {
                    p.1 = s.fraction_added;
                    p.2 = g.partial_pressure_pa;
                }
                Some(_) => {}
                None => gas_peaks.push((g.gas.clone(), s.fraction_added, g.partial_pressure_pa)),
            }
        }
    }
    Ok(PathScan {
        worst,
        end,
        profile,
        ph_range,
        temperature_max_k,
        gas_peaks,
    })
}
