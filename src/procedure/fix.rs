//! Computed fixes for the first step that is not clear: how many rinses bring the residue
//! low enough, or what the vessel's pH must be brought to first. Each fix is found by
//! running the procedure with it, never guessed, and reported with the verdicts it gives.

use super::run::{Engine, FixReport, ProcedureReport};
use super::{Leave, Procedure, Step, StepKind};
use crate::pour::batch::Batch;
use crate::report::Severity;

/// Most rinses a fix may propose.
const MAX_RINSES: u32 = 20;

fn water_batch(e: &Engine, volume_l: f64, name: &str) -> Option<Batch> {
    // Plain water: a batch with no components.
    let text = format!("name: \"{name}\"\nvolume: {volume_l} L\ncontents: []\n");
    Batch::parse(e.cat, name, &text).ok()
}

fn adjusting_batch(e: &Engine, substance: &str, mol: f64, name: &str) -> Option<Batch> {
    // As a 1 mol/L solution, so that a technician can measure it out.
    let text = format!("name: \"{name}\"\nvolume: {mol} L\ncontents:\n  - {substance}: 1 mol/L\n");
    Batch::parse(e.cat, name, &text).ok()
}

/// The procedure with `extra` inserted before step `at` (1-based), renumbered.
fn with_step(p: &Procedure, at: usize, extra: Step) -> Procedure {
    let mut q = p.clone();
    q.steps.insert(at - 1, extra);
    for (i, s) in q.steps.iter_mut().enumerate() {
        s.number = i + 1;
    }
    q
}

/// Verdicts of (the step that was first not clear, the whole procedure) with `q`.
fn verdicts(e: &Engine, q: &Procedure, step_number_in_q: usize) -> Option<(Severity, Severity)> {
    let r = e.run(q).ok()?;
    let step = r.steps.iter().find(|s| s.number == step_number_in_q)?;
    Some((step.severity, r.severity))
}

/// Hold-up and rinse volume the procedure itself uses, or sensible shares of the vessel.
fn rinse_plan(p: &Procedure, before: usize) -> (f64, f64) {
    let capacity = p.vessel.capacity_l.unwrap_or(p.vessel.volume_l);
    let mut hold_up = None;
    let mut volume = None;
    for s in p.steps.iter().take(before - 1) {
        match &s.kind {
            StepKind::Drain(Leave::Litres(l)) => hold_up = Some(*l),
            StepKind::Rinse { with, leave, .. } => {
                volume = Some(with.volume_l);
                if let Leave::Litres(l) = leave {
                    hold_up = Some(*l);
                }
            }
            _ => {}
        }
    }
    (
        hold_up.unwrap_or(0.02 * capacity),
        volume.unwrap_or(0.25 * capacity),
    )
}

/// Fixes for the first step that is not clear, each verified by a re-run.
pub fn fixes(e: &Engine, p: &Procedure, report: &ProcedureReport) -> Vec<FixReport> {
    let Some(problem) = &report.first_problem else {
        return Vec::new();
    };
    let trouble = Trouble {
        at: problem.step,
        step_severity: problem.severity,
        procedure_severity: report.severity,
    };
    let mut out = Vec::new();
    out.extend(rinse_fix(e, p, &trouble));
    for (substance, word) in [
        ("sodium hydroxide", "raise"),
        ("hydrochloric acid", "lower"),
    ] {
        out.extend(ph_fix(e, p, trouble.at, substance, word));
    }
    out.extend(pretreatment_note(report, &trouble));
    out
}

/// The first step that is not clear, and the verdicts the procedure gets as written.
struct Trouble {
    at: usize,
    step_severity: Severity,
    procedure_severity: Severity,
}

/// The procedure with "drain to the hold-up, rinse `times` ×" inserted before step `at`;
/// `plan` is the (hold-up, rinse volume) in litres.
fn with_rinses(p: &Procedure, at: usize, water: &Batch, times: u32, plan: (f64, f64)) -> Procedure {
    let (hold_up, volume) = plan;
    let rinse = Step {
        number: 0,
        description: format!("drain to {hold_up} L and rinse {times} × with {volume} L of water"),
        kind: StepKind::Rinse {
            with: water.clone(),
            times,
            leave: Leave::Litres(hold_up),
        },
        line: None,
    };
    let drain = Step {
        number: 0,
        description: format!("drain to {hold_up} L"),
        kind: StepKind::Drain(Leave::Litres(hold_up)),
        line: None,
    };
    with_step(&with_step(p, at, rinse), at, drain)
}

/// Drain to the hold-up and rinse k times: the fewest k that clears the step, or word that
/// even the most rinses do not.
fn rinse_fix(e: &Engine, p: &Procedure, trouble: &Trouble) -> Option<FixReport> {
    let at = trouble.at;
    let (hold_up, volume) = rinse_plan(p, at);
    let water = water_batch(e, volume, "fix: rinse water")?;
    for k in 1..=MAX_RINSES {
        let q = with_rinses(p, at, &water, k, (hold_up, volume));
        match verdicts(e, &q, at + 2) {
            Some((Severity::Clear, whole)) => {
                return Some(FixReport {
                    step: at,
                    kind: "rinse",
                    description: format!(
                        "Before step {at}, drain to {hold_up} L and rinse {k} × with {volume} L of water, draining to {hold_up} L each time: step {at} is then clear."
                    ),
                    step_severity_with_fix: Severity::Clear,
                    procedure_severity_with_fix: whole,
                })
            }
            Some(_) if k == MAX_RINSES => {
                return Some(FixReport {
                    step: at,
                    kind: "rinse",
                    description: format!(
                        "Even {MAX_RINSES} rinses of {volume} L do not make step {at} clear: the hazard is in what the step adds, not in the residue."
                    ),
                    step_severity_with_fix: trouble.step_severity,
                    procedure_severity_with_fix: trouble.procedure_severity,
                })
            }
            Some(_) => {}
            None => return None,
        }
    }
    None
}

/// Verdicts of (step `at`, the whole procedure) and the pH reached, when `mol` of 1 M
/// `substance` is added before step `at`.
fn with_adjustment(
    e: &Engine,
    p: &Procedure,
    at: usize,
    substance: &str,
    mol: f64,
) -> Option<(Severity, Severity, f64)> {
    let extra_batch = adjusting_batch(e, substance, mol, "fix: pH adjustment")?;
    let extra = Step {
        number: 0,
        description: format!("add {mol:.3} L of 1 M {substance}"),
        kind: StepKind::Add(extra_batch),
        line: None,
    };
    let q = with_step(p, at, extra);
    let r = e.run(&q).ok()?;
    let adjust_ph = r.steps.get(at - 1)?.end_state.as_ref()?.ph;
    let step = r.steps.get(at)?;
    Some((step.severity, r.severity, adjust_ph))
}

/// Add base (or acid) before the step: the least amount that clears it, by bisection.
fn ph_fix(e: &Engine, p: &Procedure, at: usize, substance: &str, word: &str) -> Option<FixReport> {
    let capacity = p.vessel.capacity_l.unwrap_or(0.0);
    let clears = |mol: f64| {
        matches!(
            with_adjustment(e, p, at, substance, mol),
            Some((Severity::Clear, _, _))
        )
    };
    // Up to a tenth of the vessel's capacity of 1 M reagent.
    let (mut lo, mut hi) = (0.0f64, 0.1 * capacity);
    if !clears(hi) {
        return None;
    }
    for _ in 0..30 {
        let mid = 0.5 * (lo + hi);
        if clears(mid) {
            hi = mid;
        } else {
            lo = mid;
        }
        if hi - lo < 1e-3 * hi {
            break;
        }
    }
    let (step_sev, whole, ph) = with_adjustment(e, p, at, substance, hi)?;
    Some(FixReport {
        step: at,
        kind: "adjust_ph",
        description: format!(
            "Before step {at}, {word} the vessel's pH to {ph:.1} by adding {hi:.3} L of 1 M {substance}: step {at} is then {step_sev}."
        ),
        step_severity_with_fix: step_sev,
        procedure_severity_with_fix: whole,
    })
}

/// Where metals hold a ligand in the step, the usual plating-shop pretreatments (oxidising
/// the cyanide, or a complexing agent) would change what the step releases; offgas does
/// not compute them, and says so rather than leave the reader to assume they were tried.
fn pretreatment_note(report: &ProcedureReport, trouble: &Trouble) -> Option<FixReport> {
    let at = trouble.at;
    let holds_ligand = report
        .steps
        .get(at - 1)
        .and_then(|s| s.end_state.as_ref())
        .is_some_and(|st| !st.bound_ligands.is_empty());
    holds_ligand.then(|| FixReport {
        step: at,
        kind: "pretreatment_not_computed",
        description: format!(
            "Metal complexes hold part of a ligand in step {at}. An oxidising pretreatment (such as alkaline chlorination of cyanide) or a complexing one is not computed: the fixes offered are rinses and pH adjustments, each re-run."
        ),
        step_severity_with_fix: trouble.step_severity,
        procedure_severity_with_fix: trouble.procedure_severity,
    })
}
