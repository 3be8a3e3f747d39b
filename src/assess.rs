//! The one place where a computed state becomes numbers against limits, and findings.

use crate::catalog::Catalog;
use crate::chem::{Closure, Equilibrium};
use crate::report::{Finding, GasReport, Severity, StateReport};
use crate::thresholds::Thresholds;

/// Gases below this many ppm are left out of reports (they are still in the solve).
const REPORT_FLOOR_PPM: f64 = 1e-6;

pub fn ppm(cat: &Catalog, partial_pressure_pa: f64) -> f64 {
    partial_pressure_pa / cat.physical.p_std * 1e6
}

/// Overpressure of the vessel above atmospheric: only a sealed vessel holds it.
pub fn overpressure_kpa(eq: &Equilibrium) -> f64 {
    match eq.closure {
        Closure::Sealed => eq.total_gas_pressure_pa() / 1e3,
        Closure::Vented | Closure::Open => 0.0,
    }
}

/// How bad a state is: the highest ratio of a gas to its review level, or of a sealed
/// vessel's overpressure to its review level. 1 or more means at least review.
pub fn score(cat: &Catalog, th: &Thresholds, eq: &Equilibrium) -> f64 {
    let mut worst: f64 = 0.0;
    for g in &eq.gases {
        let c = ppm(cat, g.partial_pressure_pa);
        let ratio = match cat.judged_levels(&g.gas) {
            Some(l) => c / (l.review_ppm * th.gas.review_fraction_of_short_term),
            None if th.gas.unknown_level_floor_ppm > 0.0 => c / th.gas.unknown_level_floor_ppm,
            None => 0.0,
        };
        worst = worst.max(ratio);
    }
    worst.max(overpressure_kpa(eq) / th.sealed_overpressure.review_kpa)
}

pub fn state_report(cat: &Catalog, th: &Thresholds, eq: &Equilibrium) -> StateReport {
    let mut gases: Vec<GasReport> = eq
        .gases
        .iter()
        .filter_map(|g| {
            let c = ppm(cat, g.partial_pressure_pa);
            if c < REPORT_FLOOR_PPM {
                return None;
            }
            let levels = cat.judged_levels(&g.gas);
            let review = levels
                .as_ref()
                .map(|l| l.review_ppm * th.gas.review_fraction_of_short_term);
            let stop = levels
                .as_ref()
                .map(|l| l.stop_ppm * th.gas.stop_fraction_of_idlh);
            Some(GasReport {
                formula: g.gas.clone(),
                partial_pressure_kpa: g.partial_pressure_pa / 1e3,
                headspace_ppm: c,
                limit_ppm: review,
                limit_basis: levels.as_ref().map(|l| l.review_basis.clone()),
                limit_ratio: review.map(|r| c / r),
                limit_source: levels.as_ref().map(|l| l.review_source.clone()),
                idlh_ppm: stop,
                idlh_basis: levels.as_ref().map(|l| l.stop_basis.clone()),
                idlh_ratio: stop.map(|s| c / s),
                idlh_source: levels.as_ref().map(|l| l.stop_source.clone()),
            })
        })
        .collect();
    gases.sort_by(|a, b| {
        let ra = a.limit_ratio.unwrap_or(f64::INFINITY);
        let rb = b.limit_ratio.unwrap_or(f64::INFINITY);
        rb.total_cmp(&ra)
            .then(b.headspace_ppm.total_cmp(&a.headspace_ppm))
    });
    let over = overpressure_kpa(eq);
    let atm = cat.physical.p_std / 1e3;
    StateReport {
        ph: eq.ph,
        temperature_c: eq.temperature_k - cat.physical.kelvin_offset,
        ionic_strength: eq.ionic_strength,
        volume_l: eq.liquid_l,
        headspace_l: eq.headspace_l,
        total_pressure_kpa: atm + over,
        overpressure_kpa: eq.total_gas_pressure_pa() / 1e3,
        activity_model_exceeded: eq.activity_limited,
        gases,
    }
}

fn gas_severity(th: &Thresholds, g: &GasReport) -> Severity {
    match (g.idlh_ratio, g.limit_ratio) {
        (Some(s), _) if s >= 1.0 => Severity::Stop,
        (_, Some(r)) if r >= 1.0 => Severity::Review,
        (None, None) if g.headspace_ppm >= th.gas.unknown_level_floor_ppm => Severity::Review,
        _ => Severity::Clear,
    }
}

pub fn fmt_ppm(v: f64) -> String {
    if v >= 100.0 {
        format!("{v:.0} ppm")
    } else if v >= 1.0 {
        format!("{v:.1} ppm")
    } else {
        format!("{v:.2} ppm")
    }
}

/// A ratio to a level, with as many digits as are meaningful.
pub fn fmt_times(r: f64) -> String {
    if r >= 100.0 {
        format!("{r:.0} ×")
    } else if r >= 10.0 {
        format!("{r:.1} ×")
    } else {
        format!("{r:.2} ×")
    }
}

/// Where along the pour a state lies, in words.
pub fn where_in_pour(fraction: f64) -> String {
    if fraction >= 1.0 {
        "when the pour is complete".into()
    } else if fraction <= 0.0 {
        "before anything is added".into()
    } else {
        format!(
            "while pouring, at {:.1} % of the stream added",
            fraction * 100.0
        )
    }
}

/// Findings on gas and pressure from the end state and the worst state along the pour.
pub fn state_findings(
    th: &Thresholds,
    end: &StateReport,
    worst: &StateReport,
    worst_fraction: f64,
    sealed: bool,
) -> Vec<Finding> {
    let mut out = Vec::new();
    let mut names: Vec<&str> = end.gases.iter().map(|g| g.formula.as_str()).collect();
    for g in &worst.gases {
        if !names.contains(&g.formula.as_str()) {
            names.push(&g.formula);
        }
    }
    for name in names {
        let at_end = end.gases.iter().find(|g| g.formula == name);
        let at_worst = worst.gases.iter().find(|g| g.formula == name);
        let sev_end = at_end
            .map(|g| gas_severity(th, g))
            .unwrap_or(Severity::Clear);
        let sev_worst = at_worst
            .map(|g| gas_severity(th, g))
            .unwrap_or(Severity::Clear);
        let worst_is_higher = match (at_worst, at_end) {
            (Some(w), Some(e)) => w.headspace_ppm > e.headspace_ppm,
            (Some(_), None) => true,
            _ => false,
        };
        let (sev, g, place) = if sev_worst > sev_end
            || (sev_worst == sev_end && worst_is_higher && worst_fraction < 1.0)
        {
            (sev_worst, at_worst.unwrap(), where_in_pour(worst_fraction))
        } else {
            match at_end {
                Some(g) => (sev_end, g, where_in_pour(1.0)),
                None => continue,
            }
        };
        if sev <= Severity::Clear {
            continue;
        }
        let end_note = match (at_end, place.starts_with("while")) {
            (Some(e), true) => format!("; {} at the end", fmt_ppm(e.headspace_ppm)),
            _ => String::new(),
        };
        let (code, message, caution) = match (sev, &g.idlh_ppm, &g.limit_ppm) {
            (Severity::Stop, Some(idlh), _) => (
                "gas-at-danger-level",
                format!(
                    "{} reaches {} in the headspace {place}, {} its stop level of {} ({}){end_note}.",
                    g.formula,
                    fmt_ppm(g.headspace_ppm),
                    fmt_times(g.idlh_ratio.unwrap_or(0.0)),
                    fmt_ppm(*idlh),
                    g.idlh_basis.clone().unwrap_or_default()
                ),
                format!("Do not make this mixture. Opening the vessel could expose someone to {} at a level immediately dangerous to life or health.", g.formula),
            ),
            (_, _, Some(limit)) => (
                "gas-over-short-term-level",
                format!(
                    "{} reaches {} in the headspace {place}, {} its short-term level of {} ({}){end_note}.",
                    g.formula,
                    fmt_ppm(g.headspace_ppm),
                    fmt_times(g.limit_ratio.unwrap_or(0.0)),
                    fmt_ppm(*limit),
                    g.limit_basis.clone().unwrap_or_default()
                ),
                "A competent person should review this before it is done: work in a fume hood, and keep the vessel closed except when adding.".to_string(),
            ),
            _ => (
                "gas-without-exposure-level",
                format!(
                    "{} reaches {} in the headspace {place}, and offgas has no exposure level for it.",
                    g.formula,
                    fmt_ppm(g.headspace_ppm)
                ),
                "Without a level the gas cannot be judged safe; check its safety data sheet.".into(),
            ),
        };
        out.push(Finding {
            severity: sev,
            code: code.into(),
            message,
            caution,
            origin: "chemistry".into(),
        });
    }
    if sealed {
        let op = &th.sealed_overpressure;
        let (p, place) = if worst.overpressure_kpa > end.overpressure_kpa {
            (worst.overpressure_kpa, where_in_pour(worst_fraction))
        } else {
            (end.overpressure_kpa, where_in_pour(1.0))
        };
        let sev = if p >= op.stop_kpa {
            Severity::Stop
        } else if p >= op.review_kpa {
            Severity::Review
        } else {
            Severity::Clear
        };
        if sev > Severity::Clear {
            out.push(Finding {
                severity: sev,
                code: "sealed-overpressure".into(),
                message: format!(
                    "The sealed vessel's gases add {p:.1} kPa above atmospheric {place} (review at {} kPa, stop at {} kPa; {}).",
                    op.review_kpa, op.stop_kpa, op.basis
                ),
                caution: "Do not cap a vessel that makes gas; use a vented cap or leave the mixture in a fume hood until it stops.".into(),
                origin: "chemistry".into(),
            });
        }
    }
    if end.activity_model_exceeded || worst.activity_model_exceeded {
        let i = end.ionic_strength.max(worst.ionic_strength);
        out.push(Finding {
            severity: Severity::Review,
            code: "outside-activity-model".into(),
            message: format!(
                "The ionic strength reaches {i:.2} mol/L, past the {} mol/L where the activity model holds ({}); the figures are rough.",
                th.activity_model.max_ionic_strength, th.activity_model.basis
            ),
            caution: "Concentrated mixtures can release more gas than this estimate; treat the figures as indicative only.".into(),
            origin: "chemistry".into(),
        });
    }
    out
}
