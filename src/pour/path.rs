//! The path of mixing: every state the vessel passes through while a stream is poured in.
//!
//! The scan is fine near both ends (the first drops and the last ones are where a small
//! amount meets a large excess) and refined around the worst point found by Brent's method
//! (parabolic steps through the three best points, golden-section steps where a parabola
//! would not help). Each state starts its solve from its neighbour's pH and ionic strength.

use crate::catalog::GasName;
use crate::chem::{Equilibrium, SolveError};

/// Fractions of the stream added at which the vessel is solved before refinement.
pub const SCAN: [f64; 21] = [
    0.0, 1e-4, 1e-3, 3e-3, 0.01, 0.03, 0.06, 0.1, 0.15, 0.22, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9,
    0.97, 0.99, 0.999, 1.0,
];

/// Most refinement steps around the worst scanned point, and when they stop: the
/// interval has shrunk below this share of the pour.
const REFINE_STEPS: usize = 10;
const REFINE_TOLERANCE: f64 = 1e-4;

/// A coarser scan for screening many pairs (the storeroom audit): the same ends, fewer
/// points between, fewer refinement steps.
pub const SCAN_COARSE: [f64; 12] = [
    0.0, 1e-3, 0.01, 0.04, 0.1, 0.25, 0.45, 0.65, 0.85, 0.96, 0.995, 1.0,
];
const REFINE_STEPS_COARSE: usize = 5;
const REFINE_TOLERANCE_COARSE: f64 = 1e-3;

/// Fractions of a dense scan, the reference the scan above is tested against.
pub fn dense_fractions() -> Vec<f64> {
    let mut f: Vec<f64> = (0..=400).map(|i| i as f64 / 400.0).collect();
    f.extend([1e-5, 1e-4, 3e-4, 1e-3, 3e-3, 0.995, 0.999, 0.9995]);
    f.sort_by(f64::total_cmp);
    f.dedup();
    f
}

/// How finely a pour is followed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Detail {
    #[default]
    Full,
    /// For screening many pairs (the storeroom audit).
    Coarse,
    /// Hundreds of points and no refinement: the reference the others are tested against.
    Dense,
}

/// One state along the pour with whatever else its caller worked out for it (`X`: the
/// heat balance, for a pour).
#[derive(Debug, Clone)]
pub struct PathState<X> {
    pub fraction_added: f64,
    pub score: f64,
    pub state: Equilibrium,
    pub extra: X,
}

#[derive(Debug, Clone)]
pub struct PathScan<X> {
    pub worst: PathState<X>,
    pub end: PathState<X>,
    /// (fraction added, score) of every state solved, in order of fraction.
    pub profile: Vec<(f64, f64)>,
    /// Lowest and highest pH met along the pour.
    pub ph_range: (f64, f64),
    /// Highest temperature along the pour, K.
    pub temperature_max_k: f64,
    /// Each gas at its own highest partial pressure among the states solved:
    /// (gas, fraction added there, Pa).
    pub gas_peaks: Vec<(GasName, f64, f64)>,
    /// Every state solved, in order of fraction: what the plots of a pour draw (empty for
    /// the coarse screen).
    pub points: Vec<PathPoint>,
}

/// One solved state along the pour, as the plots need it.
#[derive(Debug, Clone)]
pub struct PathPoint {
    pub fraction_added: f64,
    pub ph: f64,
    pub temperature_k: f64,
    /// Each gas and its partial pressure, Pa.
    pub gases: Vec<(GasName, f64)>,
}

/// The state at a fraction, solved from a neighbouring state where there is one.
pub type StateAt<'a, X> =
    dyn Fn(f64, Option<&Equilibrium>) -> Result<(Equilibrium, X), SolveError> + 'a;

/// A state at a fraction, scored; an error carries the fraction it happened at.
type ScoredAt<'a, X> =
    dyn Fn(f64, Option<&Equilibrium>) -> Result<PathState<X>, (f64, SolveError)> + 'a;

/// Follows a pour through `state_at(fraction added, a neighbouring state)` and finds the
/// worst state by `score`. `starts_empty` says the vessel holds nothing before the first
/// drop.
pub fn scan<X: Clone>(
    state_at: &StateAt<'_, X>,
    starts_empty: bool,
    score: &dyn Fn(&Equilibrium) -> f64,
    detail: Detail,
) -> Result<PathScan<X>, (f64, SolveError)> {
    let dense;
    let (points, refine_steps, tolerance): (&[f64], usize, f64) = match detail {
        Detail::Full => (&SCAN, REFINE_STEPS, REFINE_TOLERANCE),
        Detail::Coarse => (&SCAN_COARSE, REFINE_STEPS_COARSE, REFINE_TOLERANCE_COARSE),
        Detail::Dense => {
            dense = dense_fractions();
            (&dense, 0, 1.0)
        }
    };
    let at = |f: f64, near: Option<&Equilibrium>| -> Result<PathState<X>, (f64, SolveError)> {
        let (state, extra) = state_at(f, near).map_err(|e| (f, e))?;
        Ok(PathState {
            fraction_added: f,
            score: score(&state),
            state,
            extra,
        })
    };
    // A vessel that starts empty has no state at "nothing added yet".
    let start = if starts_empty { 1 } else { 0 };
    let mut states: Vec<PathState<X>> = Vec::with_capacity(points.len() + refine_steps);
    for &f in &points[start..] {
        let next = at(f, states.last().map(|s| &s.state))?;
        states.push(next);
    }
    let (wi, _) = states
        .iter()
        .enumerate()
        .max_by(|a, b| a.1.score.total_cmp(&b.1.score))
        .expect("the scan has points");
    if refine_steps > 0 && wi > 0 && wi + 1 < states.len() && states[wi].score > 0.0 {
        refine(&mut states, wi, refine_steps, tolerance, &at)?;
    }
    Ok(summarize(&states, detail))
}

/// What a pour's scan reports, from every state it solved.
fn summarize<X: Clone>(states: &[PathState<X>], detail: Detail) -> PathScan<X> {
    let worst = states
        .iter()
        .max_by(|a, b| a.score.total_cmp(&b.score))
        .cloned()
        .expect("the scan has points");
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
    // The storeroom screen draws no pour, and builds no points for it.
    let drawn = if detail == Detail::Coarse {
        &states[..0]
    } else {
        states
    };
    PathScan {
        worst,
        end,
        profile,
        ph_range,
        temperature_max_k,
        gas_peaks: gas_peaks(states),
        points: plot_points(drawn),
    }
}

/// Each gas at its own highest partial pressure: (gas, fraction added there, Pa); the
/// first state wins a tie.
fn gas_peaks<X>(states: &[PathState<X>]) -> Vec<(GasName, f64, f64)> {
    let mut peaks: Vec<(GasName, f64, f64)> = Vec::new();
    for s in states {
        for g in &s.state.gases {
            match peaks.iter_mut().find(|p| p.0 == g.gas) {
                Some(p) if g.partial_pressure_pa > p.2 => {
                    p.1 = s.fraction_added;
                    p.2 = g.partial_pressure_pa;
                }
                Some(_) => {}
                None => peaks.push((g.gas.clone(), s.fraction_added, g.partial_pressure_pa)),
            }
        }
    }
    peaks
}

/// The states as the plots draw them, in order of fraction.
fn plot_points<X>(states: &[PathState<X>]) -> Vec<PathPoint> {
    let mut points: Vec<PathPoint> = states
        .iter()
        .map(|s| PathPoint {
            fraction_added: s.fraction_added,
            ph: s.state.ph,
            temperature_k: s.state.temperature_k,
            gases: s
                .state
                .gases
                .iter()
                .map(|g| (g.gas.clone(), g.partial_pressure_pa))
                .collect(),
        })
        .collect();
    points.sort_by(|a, b| a.fraction_added.total_cmp(&b.fraction_added));
    points
}

/// Brent's search for the highest score between the scanned neighbours of point `wi`:
/// a parabola through the three best points where it falls inside the interval and
/// shrinks it enough, a golden-section step otherwise. Every state solved is kept.
fn refine<X: Clone>(
    states: &mut Vec<PathState<X>>,
    wi: usize,
    steps: usize,
    tolerance: f64,
    at: &ScoredAt<'_, X>,
) -> Result<(), (f64, SolveError)> {
    const GOLDEN: f64 = 0.381_966_011_250_105_1;
    let (mut a, mut b) = (states[wi - 1].fraction_added, states[wi + 1].fraction_added);
    // Brent keeps the best point x, the second best w and the previous w, v (each with its
    // score); scores are maximised.
    let best = states[wi].clone();
    let (mut x, mut fx) = (best.fraction_added, best.score);
    let (mut w, mut fw) = (x, fx);
    let (mut v, mut fv) = (x, fx);
    let mut near = best.state;
    let (mut d, mut e) = (0.0f64, 0.0f64);
    for _ in 0..steps {
        let m = 0.5 * (a + b);
        let tol = tolerance * (b - a).abs().max(1e-12) + 1e-12;
        if (b - a) < tolerance {
            break;
        }
        let mut golden = true;
        if e.abs() > tol {
            // A parabola through (x, fx), (w, fw), (v, fv).
            let r = (x - w) * (fx - fv);
            let q0 = (x - v) * (fx - fw);
            let mut p = (x - v) * q0 - (x - w) * r;
            let mut q = 2.0 * (q0 - r);
            if q > 0.0 {
                p = -p;
            }
            q = q.abs();
            if p.abs() < (0.5 * q * e).abs() && p > q * (a - x) && p < q * (b - x) {
                e = d;
                d = p / q;
                golden = false;
            }
        }
        if golden {
            e = if x >= m { a - x } else { b - x };
            d = GOLDEN * e;
        }
        let u = if d.abs() >= tol {
            x + d
        } else {
            x + tol.copysign(d)
        };
        let u = u.clamp(a, b);
        let su = at(u, Some(&near))?;
        let fu = su.score;
        states.push(su.clone());
        if fu >= fx {
            if u >= x {
                a = x;
            } else {
                b = x;
            }
            (v, fv) = (w, fw);
            (w, fw) = (x, fx);
            (x, fx) = (u, fu);
            near = su.state;
        } else {
            if u < x {
                a = u;
            } else {
                b = u;
            }
            if fu >= fw || w == x {
                (v, fv) = (w, fw);
                (w, fw) = (u, fu);
            } else if fu >= fv || v == x || v == w {
                (v, fv) = (u, fu);
            }
        }
    }
    Ok(())
}
