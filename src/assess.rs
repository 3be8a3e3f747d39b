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

/// Pressure in the headspace: what the liquid gives off, the warming of the air that was
/// there, and the change of water's vapour pressure with temperature.
pub struct HeadspacePressure {
    /// kPa above atmospheric in a sealed vessel (0 for vented and open ones).
    pub overpressure_kpa: f64,
    /// Litres of gas at 1 atm that leave a vented or open vessel (0 for a sealed one).
    pub vented_l: f64,
    /// Share of the vented gas that is toxic, %.
    pub vented_toxic_percent: f64,
}

/// Gases with a short-term level above this (ppm) are counted as asphyxiants rather than
/// toxic in the vented share (CO2's is 30,000 ppm; the toxic gases' are below 100).
const TOXIC_SHORT_TERM_BELOW_PPM: f64 = 5000.0;

pub fn headspace_pressure(
    cat: &Catalog,
    eq: &Equilibrium,
    start_temperature_k: f64,
) -> HeadspacePressure {
    let phys = &cat.physical;
    let p_atm = phys.p_std;
    let t_f = eq.temperature_k;
    let t_s = start_temperature_k.min(t_f.max(start_temperature_k));
    let pw_s = phys.water_vapour_pa(t_s);
    let pw_f = phys.water_vapour_pa(t_f);
    let thermal = (p_atm - pw_s) * (t_f / t_s - 1.0) + (pw_f - pw_s);
    let gases = eq.total_gas_pressure_pa();
    let toxic: f64 = eq
        .gases
        .iter()
        .filter(|g| {
            cat.judged_levels(&g.gas)
                .is_none_or(|l| l.review_ppm < TOXIC_SHORT_TERM_BELOW_PPM)
        })
        .map(|g| g.partial_pressure_pa)
        .sum();
    let excess = (gases + thermal).max(0.0);
    match eq.closure {
        Closure::Sealed => HeadspacePressure {
            overpressure_kpa: excess / 1e3,
            vented_l: 0.0,
            vented_toxic_percent: 0.0,
        },
        Closure::Vented | Closure::Open => HeadspacePressure {
            overpressure_kpa: 0.0,
            vented_l: excess * eq.headspace_l / p_atm,
            vented_toxic_percent: if excess > 0.0 {
                100.0 * toxic / excess
            } else {
                0.0
            },
        },
    }
}

pub fn state_report(
    cat: &Catalog,
    th: &Thresholds,
    eq: &Equilibrium,
    heat: &crate::pour::HeatReport,
) -> StateReport {
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
    let pressure = headspace_pressure(
        cat,
        eq,
        heat.start_temperature_c + cat.physical.kelvin_offset,
    );
    let atm = cat.physical.p_std / 1e3;
    StateReport {
        ph: eq.ph,
        temperature_c: eq.temperature_k - cat.physical.kelvin_offset,
        ionic_strength: eq.ionic_strength,
        volume_l: eq.liquid_l,
        headspace_l: eq.headspace_l,
        total_pressure_kpa: atm + pressure.overpressure_kpa,
        overpressure_kpa: pressure.overpressure_kpa,
        gas_pressure_kpa: eq.total_gas_pressure_pa() / 1e3,
        vented_gas_l: pressure.vented_l,
        vented_toxic_percent: pressure.vented_toxic_percent,
        heat: *heat,
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
    if v > 1e6 {
        // A partial pressure above one atmosphere: the gas would boil off, not sit in air.
        format!("{v:.0} ppm (a partial pressure above 1 atm: it boils off)")
    } else if v >= 100.0 {
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
    rated_pressure_kpa: Option<f64>,
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
        let (stop, rating) = match rated_pressure_kpa {
            Some(r) => (r, format!("the container's rating of {r} kPa")),
            None => (
                op.stop_kpa,
                format!(
                    "{} kPa for a container with no stated rating; {}",
                    op.stop_kpa, op.basis
                ),
            ),
        };
        let review = op.review_kpa.min(stop);
        let sev = if p >= stop {
            Severity::Stop
        } else if p >= review {
            Severity::Review
        } else {
            Severity::Clear
        };
        if sev > Severity::Clear {
            out.push(Finding {
                severity: sev,
                code: "sealed-overpressure".into(),
                message: format!(
                    "The sealed vessel reaches {p:.1} kPa above atmospheric {place}, from the gases the liquid gives off, the warming of the air and water vapour (review at {review} kPa; stop at {rating})."
                ),
                caution: "Do not cap a vessel that makes gas; use a vented cap or leave the mixture in a fume hood until it stops.".into(),
                origin: "chemistry".into(),
            });
        }
    }
    // The figures past the activity model's range matter where they decide something: the
    // end state, and the worst state when its gas reaches a level of concern. (A strong
    // heel at the first drop is outside the model, but nothing is judged on it.)
    let worst_matters = worst
        .gases
        .iter()
        .any(|g| gas_severity(th, g) >= Severity::Review);
    if end.activity_model_exceeded || (worst.activity_model_exceeded && worst_matters) {
        let i = if end.activity_model_exceeded {
            end.ionic_strength
        } else {
            worst.ionic_strength
        };
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
