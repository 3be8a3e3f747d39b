//! The course of a procedure, step by step: the vessel's pH after each step and the worst
//! gas of each step as a multiple of its review level. Drawn from the procedure report.

use super::chart::{short_number, Axis, Callout, Chart, Dash, Level, Marker, Series, COLOURS};
use super::spark::{self, Charset};
use crate::procedure::run::{ProcedureReport, StepReport};
use crate::report::StateReport;

/// Ratios under this are drawn on the floor of the log axis: a thousandth of a review level
/// is nothing a reader acts on, and the axis would otherwise stretch over many decades.
pub const RATIO_FLOOR: f64 = 1e-3;

/// The vessel's pH after a step, where the step leaves a liquid that was solved.
pub fn end_ph(s: &StepReport) -> Option<f64> {
    s.end_state.as_ref().map(|e| e.ph)
}

/// The state a step is judged by: its worst point while adding, else its end.
fn judged_state(s: &StepReport) -> Option<&StateReport> {
    s.worst_state
        .as_ref()
        .map(|w| &w.state)
        .or(s.end_state.as_ref())
}

/// The gas of a step that comes closest to (or furthest past) its review level, and that
/// ratio. None where the step was not solved or no gas with a review level comes off.
pub fn worst_gas(s: &StepReport) -> Option<(String, f64)> {
    judged_state(s)?
        .gases
        .iter()
        .filter_map(|g| g.limit_ratio.map(|r| (g.formula.clone(), r)))
        .filter(|(_, r)| r.is_finite())
        .max_by(|a, b| a.1.total_cmp(&b.1))
}

fn step_axis(r: &ProcedureReport) -> Axis {
    Axis::linear("step", 0.5, r.steps.len().max(1) as f64 + 0.5)
}

fn one_series(id: &str, label: &str, points: Vec<(f64, f64)>) -> Series {
    Series {
        id: id.into(),
        label: label.into(),
        points,
        dash: Dash::Solid,
        marker: Marker::Circle,
        colour: COLOURS[0],
    }
}

/// pH after each step; steps that leave nothing solved (a drain) have no point.
pub fn ph_chart(r: &ProcedureReport) -> Chart {
    let points: Vec<(f64, f64)> = r
        .steps
        .iter()
        .filter_map(|s| end_ph(s).map(|ph| (s.number as f64, ph)))
        .collect();
    let lo = points.iter().map(|p| p.1).fold(f64::INFINITY, f64::min);
    let hi = points.iter().map(|p| p.1).fold(f64::NEG_INFINITY, f64::max);
    let (lo, hi) = if lo.is_finite() {
        ((lo - 0.5).floor().max(0.0), (hi + 0.5).ceil().min(15.0))
    } else {
        (0.0, 14.0)
    };
    Chart {
        title: "Vessel pH after each step".into(),
        width: 340.0,
        height: 230.0,
        x: step_axis(r),
        y: Axis::linear("pH", lo, hi),
        series: vec![one_series("ph", "pH", points)],
        levels: vec![],
        callouts: vec![],
    }
}

/// The worst gas of each step against its review level, on a log scale, with the review
/// level drawn and the worst step ringed. None where no step gives off a gas that has one.
pub fn gas_chart(r: &ProcedureReport) -> Option<Chart> {
    let worst: Vec<(usize, String, f64)> = r
        .steps
        .iter()
        .filter_map(|s| worst_gas(s).map(|(g, ratio)| (s.number, g, ratio)))
        .collect();
    let peak = worst.iter().max_by(|a, b| a.2.total_cmp(&b.2))?.clone();
    // A decade and more above the worst step leaves room for its label over the point.
    let hi = peak.2.max(1.0) * 30.0;
    let points = worst.iter().map(|w| (w.0 as f64, w.2)).collect();
    Some(Chart {
        title: "Worst gas of each step".into(),
        width: 340.0,
        height: 230.0,
        x: step_axis(r),
        y: Axis::log(
            "× its review level (log)",
            RATIO_FLOOR,
            hi.max(RATIO_FLOOR * 10.0),
        ),
        series: vec![one_series("worst-gas", "worst gas", points)],
        levels: vec![Level {
            y: 1.0,
            label: "review".into(),
        }],
        callouts: vec![Callout {
            kind: "worst".into(),
            x: peak.0 as f64,
            y: peak.2,
            label: format!(
                "{} {}× at step {}",
                crate::basics::notation::pretty(&peak.1),
                short_number(peak.2),
                peak.0
            ),
        }],
    })
}

/// The same two courses as text, one column per step, for markdown: a line of pH and a line
/// of the worst gas ratio (log scale, worst step in brackets), with the step numbers under.
pub fn step_lines(r: &ProcedureReport) -> Vec<String> {
    let cell = |c: String| format!("{c:^3}");
    let column = |v: Option<f64>, lo: f64, hi: f64, mark: bool| match v {
        Some(v) => {
            let ch = spark::line(&[v], lo, hi, None, Charset::Unicode);
            cell(if mark { format!("[{ch}]") } else { ch })
        }
        None => cell("·".into()),
    };
    let phs: Vec<Option<f64>> = r.steps.iter().map(end_ph).collect();
    let ratios: Vec<Option<(String, f64)>> = r.steps.iter().map(worst_gas).collect();
    let peak = ratios
        .iter()
        .enumerate()
        .filter_map(|(i, w)| w.as_ref().map(|w| (i, w)))
        .max_by(|a, b| a.1 .1.total_cmp(&b.1 .1));
    let known = phs.iter().flatten();
    let (ph_lo, ph_hi) = (
        known.clone().fold(f64::INFINITY, |a, b| a.min(*b)),
        known.fold(f64::NEG_INFINITY, |a, b| a.max(*b)),
    );
    let mut lines = vec![format!(
        "{:<18}{}",
        "step",
        r.steps
            .iter()
            .map(|s| cell(s.number.to_string()))
            .collect::<String>()
    )];
    if ph_lo.is_finite() {
        lines.push(format!(
            "{:<18}{}  pH {:.1} to {:.1}",
            "pH after the step",
            phs.iter()
                .map(|v| column(*v, ph_lo, ph_hi, false))
                .collect::<String>(),
            ph_lo,
            ph_hi
        ));
    }
    if let Some((at, (gas, ratio))) = peak {
        // Four decades under the worst step, on a log scale, as the terminal course reads.
        let top = ratio.max(1.0).log10();
        lines.push(format!(
            "{:<18}{}  worst {} {}× its review level at step {}",
            "worst gas",
            ratios
                .iter()
                .enumerate()
                .map(|(i, w)| column(
                    w.as_ref().map(|w| w.1.max(RATIO_FLOOR).log10()),
                    top - 4.0,
                    top,
                    i == at
                ))
                .collect::<String>(),
            crate::basics::notation::pretty(gas),
            short_number(*ratio),
            r.steps[at].number
        ));
    }
    lines.iter().map(|l| l.trim_end().to_string()).collect()
}
