//! Running a procedure: the vessel's contents carried through every step, each addition
//! checked in full against what is in the vessel at that moment.

use super::{Leave, Procedure, Step, StepKind};
use crate::catalog::Catalog;
use crate::check::{check, CheckError, CheckOptions};
use crate::chem::solve;
use crate::judge::assess::{state_findings, state_report, Action, PourStates};
use crate::judge::rules::RuleSet;
use crate::judge::thresholds::Thresholds;
use crate::pour::batch::{Batch, InputError};
use crate::pour::HeatReport;
use crate::report::{CheckReport, Finding, Severity, StateReport, WorstStateReport};
use serde::Serialize;

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StepReport {
    pub number: usize,
    pub description: String,
    pub kind: &'static str,
    /// What the step adds or does, in words.
    pub action: String,
    pub severity: Severity,
    pub end_state: Option<StateReport>,
    pub worst_state: Option<WorstStateReport>,
    pub volume_after_l: f64,
    pub temperature_after_c: f64,
    /// What the vessel holds after the step: substance and moles.
    pub contents_after: Vec<ContentLine>,
    pub findings: Vec<Finding>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ContentLine {
    pub substance: String,
    pub mol: f64,
}

fn contents(cat: &Catalog, b: &Batch) -> Vec<ContentLine> {
    b.components
        .iter()
        .map(|c| ContentLine {
            substance: cat.substance(c.substance).name.clone(),
            mol: c.moles,
        })
        .collect()
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ProblemReport {
    pub step: usize,
    pub severity: Severity,
    pub reasons: Vec<String>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FixReport {
    pub step: usize,
    /// `rinse`, `adjust_ph`, or `pretreatment_not_computed` (a note, not a fix: what offgas
    /// cannot compute for the step).
    pub kind: &'static str,
    pub description: String,
    /// The procedure re-run with the fix: the step's verdict, and the whole procedure's.
    pub step_severity_with_fix: Severity,
    pub procedure_severity_with_fix: Severity,
}

impl FixReport {
    /// The whole procedure's verdict with the fix, for a fix that was run (None for a note).
    pub fn outcome(&self) -> Option<Severity> {
        (self.kind != "pretreatment_not_computed").then_some(self.procedure_severity_with_fix)
    }
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ProcedureReport {
    pub tool: &'static str,
    pub version: &'static str,
    pub name: String,
    pub file: String,
    pub vessel: String,
    pub capacity_l: f64,
    pub severity: Severity,
    pub steps: Vec<StepReport>,
    pub first_problem: Option<ProblemReport>,
    pub fixes: Vec<FixReport>,
    pub assumptions: Vec<String>,
    pub cautions: Vec<String>,
    pub sign_off: Vec<String>,
}

/// A step that cannot be run as written (overflow, draining more than is there, solver trouble).
#[derive(Debug, Clone, PartialEq)]
pub struct ProcedureError(pub InputError);

impl std::fmt::Display for ProcedureError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        self.0.fmt(f)
    }
}

impl std::error::Error for ProcedureError {}

/// The engine's context for a run.
pub struct Engine<'a> {
    pub cat: &'a Catalog,
    pub th: &'a Thresholds,
    pub rules: &'a RuleSet,
}

fn step_error(p: &Procedure, step: &Step, message: String, fix: Option<String>) -> ProcedureError {
    ProcedureError(InputError {
        file: p.file.clone(),
        line: step.line,
        message: format!("step {} ({}): {message}", step.number, step.description),
        fix,
    })
}

/// The vessel's contents after `added` has been poured in and the mixture has reached
/// `temperature_k` (the heat of the pour included).
fn merged(vessel: &Batch, added: &Batch, temperature_k: f64) -> Batch {
    let mut out = crate::pour::batch::pour_into(vessel, added);
    out.temperature_k = temperature_k;
    out.temperature_given = true;
    out
}

/// The vessel after a drain: everything scaled by the share left behind.
pub fn drained(vessel: &Batch, leave_l: f64) -> Batch {
    let share = leave_l / vessel.volume_l;
    let mut out = vessel.clone();
    for c in &mut out.components {
        c.moles *= share;
    }
    out.volume_l = leave_l;
    out
}

/// Litres a drain leaves, or why it cannot.
fn leave_litres(vessel: &Batch, leave: Leave) -> Result<f64, String> {
    let v = vessel.volume_l;
    let l = match leave {
        Leave::Litres(l) => {
            if l > v * (1.0 + 1e-9) {
                return Err(format!(
                    "it leaves {l} L but the vessel holds only {v:.3} L"
                ));
            }
            l
        }
        Leave::Fraction(f) => f * v,
        Leave::Remove(r) => {
            if r > v * (1.0 + 1e-9) {
                return Err(format!(
                    "it removes {r} L but the vessel holds only {v:.3} L"
                ));
            }
            v - r
        }
    };
    if l <= 0.0 {
        return Err("a drain always leaves a film or heel behind".into());
    }
    Ok(l)
}

fn check_error(p: &Procedure, step: &Step, e: CheckError) -> ProcedureError {
    match e {
        CheckError::Input(i) => step_error(p, step, i.message, i.fix),
        CheckError::Solve { .. } => step_error(p, step, e.to_string(), None),
    }
}

/// Reasons a check is not clear, in one line each.
fn reasons(findings: &[Finding]) -> Vec<String> {
    findings
        .iter()
        .filter(|f| f.severity >= Severity::Review)
        .map(|f| format!("[{}] {}", f.severity, f.message))
        .collect()
}

impl Engine<'_> {
    fn check(
        &self,
        vessel: &Batch,
        stream: &Batch,
        action: Action,
    ) -> Result<CheckReport, CheckError> {
        check(
            self.cat,
            self.th,
            self.rules,
            vessel,
            stream,
            &CheckOptions {
                action,
                ..CheckOptions::default()
            },
        )
    }

    fn add_step(
        &self,
        p: &Procedure,
        step: &Step,
        vessel: &Batch,
        stream: &Batch,
        action: Action,
    ) -> Result<(StepReport, Batch), ProcedureError> {
        let r = self
            .check(vessel, stream, action)
            .map_err(|e| check_error(p, step, e))?;
        let after = merged(
            vessel,
            stream,
            r.end_state.temperature_c + self.cat.physical.kelvin_offset,
        );
        let report = StepReport {
            number: step.number,
            description: step.description.clone(),
            kind: "add",
            action: describe_batch(self.cat, stream),
            severity: r.severity,
            volume_after_l: after.volume_l,
            temperature_after_c: r.end_state.temperature_c,
            contents_after: contents(self.cat, &after),
            end_state: Some(r.end_state.clone()),
            worst_state: Some(r.worst_state.clone()),
            findings: r.findings.clone(),
        };
        Ok((report, after))
    }

    fn hold_step(
        &self,
        p: &Procedure,
        step: &Step,
        vessel: &Batch,
        minutes: Option<f64>,
        t_k: Option<f64>,
    ) -> Result<(StepReport, Batch), ProcedureError> {
        let mut after = vessel.clone();
        if let Some(t) = t_k {
            after.temperature_k = t;
        }
        let capacity = after.capacity_l.unwrap_or(after.volume_l);
        let m = after.to_mixture(self.cat, capacity);
        let settings = crate::chem::SolverSettings {
            activity_limit: self.th.activity_model.max_ionic_strength,
            ..Default::default()
        };
        let eq = solve(self.cat, &m, &settings)
            .map_err(|e| step_error(p, step, format!("could not be assessed: {e}"), None))?;
        let t_c = eq.temperature_k - self.cat.physical.kelvin_offset;
        let heat = HeatReport {
            start_temperature_c: vessel.temperature_k - self.cat.physical.kelvin_offset,
            ..HeatReport::at_rest(t_c)
        };
        let state = state_report(self.cat, self.th, &eq, &heat);
        let sealed = after.closure == crate::chem::Closure::Sealed;
        let findings = state_findings(
            self.th,
            &PourStates {
                end: &state,
                worst: &state,
                worst_fraction: 1.0,
                alone: None,
                sealed,
                rated_pressure_kpa: after.rated_pressure_kpa,
                action: Action::Hold,
            },
        );
        let severity = Severity::verdict(&findings);
        let action = match (minutes, t_k) {
            (Some(m), Some(_)) => format!("hold {m:.0} min at {t_c:.1} °C"),
            (Some(m), None) => format!("hold {m:.0} min"),
            (None, _) => format!("hold at {t_c:.1} °C"),
        };
        let report = StepReport {
            number: step.number,
            description: step.description.clone(),
            kind: "hold",
            action,
            severity,
            volume_after_l: after.volume_l,
            temperature_after_c: t_c,
            contents_after: contents(self.cat, &after),
            end_state: Some(state),
            worst_state: None,
            findings,
        };
        Ok((report, after))
    }

    /// Runs every step; the vessel's contents are carried from one to the next.
    pub fn run(&self, p: &Procedure) -> Result<ProcedureReport, ProcedureError> {
        let mut vessel = p.vessel.clone();
        let mut steps = Vec::new();
        for step in &p.steps {
            let (report, after) = self.step(p, step, &vessel)?;
            steps.push(report);
            vessel = after;
        }
        Ok(self.procedure_report(p, steps))
    }

    /// One step's report, and the vessel as the step leaves it.
    fn step(
        &self,
        p: &Procedure,
        step: &Step,
        vessel: &Batch,
    ) -> Result<(StepReport, Batch), ProcedureError> {
        match &step.kind {
            StepKind::Add(stream) => self.add_step(p, step, vessel, stream, Action::Pour),
            StepKind::Drain(leave) => self.drain_step(p, step, vessel, *leave),
            StepKind::Rinse { with, times, leave } => {
                self.rinse_step(p, step, vessel, with, *times, *leave)
            }
            StepKind::Hold {
                minutes,
                temperature_k,
            } => self.hold_step(p, step, vessel, *minutes, *temperature_k),
        }
    }

    fn drain_step(
        &self,
        p: &Procedure,
        step: &Step,
        vessel: &Batch,
        leave: Leave,
    ) -> Result<(StepReport, Batch), ProcedureError> {
        let l = leave_litres(vessel, leave).map_err(|m| {
            step_error(
                p,
                step,
                m,
                Some("drain no more than the vessel holds, and leave a hold-up volume".into()),
            )
        })?;
        let before = vessel.volume_l;
        let after = drained(vessel, l);
        let report = StepReport {
            number: step.number,
            description: step.description.clone(),
            kind: "drain",
            action: format!(
                "drain {}, leaving {}",
                crate::basics::text::litres(before - l),
                crate::basics::text::litres(l)
            ),
            severity: Severity::Clear,
            end_state: None,
            worst_state: None,
            volume_after_l: after.volume_l,
            temperature_after_c: after.temperature_k - self.cat.physical.kelvin_offset,
            contents_after: contents(self.cat, &after),
            findings: Vec::new(),
        };
        Ok((report, after))
    }

    /// Each rinse is an addition checked like any other, then a drain to the hold-up.
    fn rinse_step(
        &self,
        p: &Procedure,
        step: &Step,
        vessel: &Batch,
        with: &Batch,
        times: u32,
        leave: Leave,
    ) -> Result<(StepReport, Batch), ProcedureError> {
        let mut vessel = vessel.clone();
        let mut worst: Option<StepReport> = None;
        let mut last_end = None;
        for _ in 0..times {
            let (report, after) = self.add_step(p, step, &vessel, with, Action::Rinse)?;
            let l = leave_litres(&after, leave).map_err(|m| step_error(p, step, m, None))?;
            vessel = drained(&after, l.min(after.volume_l));
            last_end = report.end_state.clone();
            if worst.as_ref().is_none_or(|w| report.severity > w.severity) {
                worst = Some(report);
            }
        }
        let mut report = worst.expect("at least one rinse");
        // The worst rinse decides the verdict; the vessel ends as the last one leaves it.
        report.end_state = last_end;
        report.kind = "rinse";
        report.action = format!(
            "rinse {} × with {}, draining to {} each time",
            times,
            describe_batch(self.cat, with),
            crate::basics::text::litres(vessel.volume_l)
        );
        report.volume_after_l = vessel.volume_l;
        report.contents_after = contents(self.cat, &vessel);
        report.temperature_after_c = vessel.temperature_k - self.cat.physical.kelvin_offset;
        Ok((report, vessel))
    }

    /// The sheet: the steps, the worst verdict, the first step that is not clear, and the
    /// lines to sign. Fixes are found afterwards, by re-running.
    fn procedure_report(&self, p: &Procedure, steps: Vec<StepReport>) -> ProcedureReport {
        let severity = steps
            .iter()
            .map(|s| s.severity)
            .max()
            .unwrap_or(Severity::Clear);
        let first_problem = steps
            .iter()
            .find(|s| s.severity >= Severity::Review)
            .map(|s| ProblemReport {
                step: s.number,
                severity: s.severity,
                reasons: reasons(&s.findings),
            });
        ProcedureReport {
            tool: "offgas",
            version: env!("CARGO_PKG_VERSION"),
            name: p.name.clone(),
            file: p.file.clone(),
            vessel: p.vessel.name.clone(),
            capacity_l: p.vessel.capacity_l.unwrap_or(0.0),
            severity,
            steps,
            first_problem,
            fixes: Vec::new(),
            assumptions: procedure_assumptions(),
            cautions: self.th.cautions.clone(),
            sign_off: vec![
                "Prepared by".into(),
                "Reviewed by".into(),
                "Approved by".into(),
                "Date".into(),
            ],
        }
    }
}

fn procedure_assumptions() -> Vec<String> {
    vec![
        "Each addition is checked as `offgas check` checks a pour: the whole path of mixing, both orders, heat, pressure, rules and the room, against what the vessel holds at that moment.".into(),
        "A drain leaves the stated hold-up with the same composition as the whole; gas that leaves an open vessel between steps is not subtracted (the conservative choice for the next step).".into(),
        "A rinse adds its liquid, is checked like any addition, and is drained to its hold-up, as many times as stated.".into(),
        "A hold sets the vessel's temperature and re-solves it there; the time of a hold is recorded but reactions' speed is not modelled.".into(),
    ]
}

/// A batch in a few words: "4 L of sulfamic acid 50 g/L, hydrochloric acid, concentrated 20 mL/L".
pub fn describe_batch(cat: &Catalog, b: &Batch) -> String {
    let parts: Vec<String> = b
        .components
        .iter()
        .map(|c| cat.substance(c.substance).name.clone())
        .collect();
    if parts.is_empty() {
        crate::basics::text::litres(b.volume_l)
    } else {
        format!("{} L of {}", trim(b.volume_l), parts.join(", "))
    }
}

fn trim(v: f64) -> String {
    let s = format!("{v:.3}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}
