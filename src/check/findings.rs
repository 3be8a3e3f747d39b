//! The findings of one check that are not read from a single state: the order of pouring,
//! the hazard rules, heat, boiling, the room and the stoichiometric releases.

use super::{CheckError, CheckOptions};
use crate::catalog::Catalog;
use crate::chem::Closure;
use crate::judge::assess::{fmt_times, where_in_pour};
use crate::judge::rules::evaluate::{Present, RuleContext, RuleHit};
use crate::judge::rules::{Computed, Origin, RuleSet};
use crate::judge::thresholds::Thresholds;
use crate::pour::batch::Batch;
use crate::pour::boiling::{vapour_pressure, VapourPressure};
use crate::pour::pairs::Side;
use crate::pour::path::PathScan;
use crate::pour::release::ReleaseReport;
use crate::pour::room::{RoomGasReport, RoomSettings};
use crate::pour::{HeatReport, Pour};
use crate::report::StateReport;
use crate::report::{Finding, Severity};

pub(super) fn order_findings(
    th: &Thresholds,
    forward: &PathScan<HeatReport>,
    backward: &PathScan<HeatReport>,
    action: crate::judge::assess::Action,
) -> Vec<Finding> {
    let mut out = Vec::new();
    let factor = th.mixing_path.safer_order_factor;
    let (fw, bw) = (forward.worst.score, backward.worst.score);
    if fw >= 1.0 && bw * factor <= fw {
        out.push(Finding {
            scope: crate::report::Scope::Pour,
            severity: Severity::Info,
            code: "safer-order".into(),
            message: format!(
                "The order matters: pouring the container's contents into the stream instead keeps the worst headspace at {} the short-term level, against {} as written.",
                fmt_times(bw), fmt_times(fw)
            ),
            caution: "If you change the order, check the new order as its own pour; add slowly, with stirring, in a fume hood.".into(),
            origin: "chemistry".into(),
        });
    } else if bw >= 1.0 && fw * factor <= bw {
        out.push(Finding {
            scope: crate::report::Scope::Pour,
            severity: Severity::Info,
            code: "keep-this-order".into(),
            message: format!(
                "The order matters: pouring the container's contents into the stream would reach {} the short-term level, against {} as written. Pour as written.",
                fmt_times(bw), fmt_times(fw)
            ),
            caution: "Label the container so that nobody reverses the order.".into(),
            origin: "chemistry".into(),
        });
    }
    let end = forward.end.score;
    if fw >= 1.0 && forward.worst.fraction_added < 1.0 && fw >= factor * end {
        out.push(Finding {
            scope: crate::report::Scope::Pour,
            severity: Severity::Info,
            code: "worst-while-pouring".into(),
            message: format!(
                "The worst moment is {}, not the end: {} the short-term level there against {} at the end.",
                action.place(forward.worst.fraction_added),
                fmt_times(fw),
                fmt_times(end)
            ),
            caution: "Gas released during the pour escapes at the opening; the end state alone understates the exposure.".into(),
            origin: "chemistry".into(),
        });
    }
    out
}

pub(super) fn rule_context(
    container: &Batch,
    stream: &Batch,
    forward: &PathScan<HeatReport>,
    backward: &PathScan<HeatReport>,
) -> RuleContext {
    let present = container
        .components
        .iter()
        .map(|c| (Side::Container, c))
        .chain(stream.components.iter().map(|c| (Side::Stream, c)))
        .map(|(side, c)| Present {
            side,
            substance: c.substance,
            moles: c.moles,
        })
        .collect();
    RuleContext {
        present,
        container_l: container.volume_l,
        stream_l: stream.volume_l,
        ph_min: forward.ph_range.0.min(backward.ph_range.0),
        ph_max: forward.ph_range.1.max(backward.ph_range.1),
        temperature_max_c: forward.temperature_max_k.max(backward.temperature_max_k) - 273.15,
    }
}

/// What the engine computed for a rule's product, in words, or that it could not.
pub(super) fn computed_note(
    kind: Option<Computed>,
    forms: &[String],
    end: &StateReport,
    worst: &StateReport,
    released: &[ReleaseReport],
) -> String {
    let gas_figure = |formula: &str| {
        let at = |s: &StateReport| s.gases.iter().find(|g| g.formula == formula).cloned();
        at(worst)
            .into_iter()
            .chain(at(end))
            .max_by(|a, b| a.headspace_ppm.total_cmp(&b.headspace_ppm))
    };
    match kind {
        Some(Computed::Chlorine) => match gas_figure("Cl2") {
            Some(g) => format!(
                " Computed: Cl2 reaches {} in the headspace at worst (see the gas findings).",
                crate::judge::assess::gas_level(&g)
            ),
            None => {
                " Chlorine could not be computed for this mixture; the severity rests on this rule."
                    .into()
            }
        },
        Some(Computed::Hydrogen) => match released.iter().find(|r| r.formula == "H2") {
            Some(r) => format!(
                " Computed: {:.3} mol of H2 ({:.2} L at 1 atm), {:.1} % of the headspace.",
                r.moles, r.litres_at_1_atm, r.headspace_percent
            ),
            None => " Hydrogen could not be computed for this mixture (no release data for these components, or the conditions do not trigger it); the severity rests on this rule.".into(),
        },
        None => format!(
            " Not computed{}: the severity rests on this rule.",
            if forms.is_empty() {
                String::new()
            } else {
                format!(" ({})", forms.join(", "))
            }
        ),
    }
}

/// Gases the rules in force say can form here that no state computed (nitrogen oxides
/// from nitrite, chlorine dioxide, phosphine, ...): the gas table must not read as if
/// nothing came off.
pub(super) fn uncomputed_gases(
    cat: &Catalog,
    hits: &[RuleHit],
    end: &StateReport,
    worst: &StateReport,
    released: &[ReleaseReport],
) -> Vec<String> {
    let computed = |g: &str| {
        end.gases.iter().chain(&worst.gases).any(|x| x.formula == g)
            || released.iter().any(|r| r.formula == g)
    };
    let mut out: Vec<String> = Vec::new();
    for hit in hits {
        for g in &hit.rule.rule.forms {
            if cat.gas_limits(g).is_some() && !computed(g) && !out.contains(g) {
                out.push(g.clone());
            }
        }
    }
    out
}

pub(super) fn origin_text(o: &Origin, id: &str) -> String {
    match o {
        Origin::BuiltIn { file } => format!("built-in rule {id} ({file})"),
        Origin::Site { file } => format!("site rule {id} ({file})"),
    }
}

/// Findings from the rules the mixture meets; a site rule that raises another lifts that
/// finding's severity and never lowers it.
pub(super) fn rule_findings(
    hits: &[RuleHit],
    end: &StateReport,
    worst: &StateReport,
    released: &[ReleaseReport],
) -> Vec<Finding> {
    let mut out: Vec<Finding> = Vec::new();
    for hit in hits {
        let r = &hit.rule.rule;
        let met: Vec<String> = hit.groups.iter().map(|g| g.join(" or ")).collect();
        out.push(Finding {
            scope: if r.presence {
                crate::report::Scope::Component
            } else {
                crate::report::Scope::Pour
            },
            severity: r.severity.into(),
            code: r.id.clone(),
            message: format!(
                "{} Met here: {}.{} Basis: {}.",
                r.message,
                met.join(" with "),
                computed_note(r.computed, &r.forms, end, worst, released),
                r.basis
            ),
            caution: r.caution.clone(),
            origin: origin_text(&hit.rule.origin, &r.id),
        });
    }
    for hit in hits {
        let r = &hit.rule.rule;
        let Some(target) = &r.raises else { continue };
        if let Some(f) = out.iter_mut().find(|f| &f.code == target) {
            let raised: Severity = r.severity.into();
            if raised > f.severity {
                f.severity = raised;
                f.origin = format!(
                    "{}; raised by {}",
                    f.origin,
                    origin_text(&hit.rule.origin, &r.id)
                );
            }
        }
    }
    out
}

pub(super) fn room_settings(
    th: &Thresholds,
    container: &Batch,
    capacity_l: f64,
    opts: &CheckOptions,
) -> crate::pour::room::RoomSettings {
    let (area, basis) = match (opts.spill_area_m2, container.surface_area_m2) {
        (Some(a), _) => (a, format!("a spill of {a} m2 (--spill-area)")),
        (None, Some(a)) => (
            a,
            format!("the container's open surface of {a} m2 (its file)"),
        ),
        (None, None) => {
            let a = crate::pour::room::surface_from_capacity(capacity_l);
            (
                a,
                format!(
                    "{a:.3} m2, the surface of a {capacity_l} L cylinder 1.5 times as tall as wide (the container file gives no surface_area)"
                ),
            )
        }
    };
    let window = th.room.exposure_window_min;
    let worst_case = match (opts.spill_area_m2, container.closure) {
        (Some(a), _) => format!(
            "a spill of {a} m2: the headspace at once, then the spill evaporating for {window} min"
        ),
        (None, Closure::Sealed) => format!(
            "the container opened after standing sealed: its headspace at once, then the open surface evaporating for {window} min"
        ),
        (None, Closure::Vented) => format!(
            "the headspace vented at once, then the surface evaporating for {window} min"
        ),
        (None, Closure::Open) => format!("the open surface evaporating for {window} min"),
    };
    crate::pour::room::RoomSettings {
        volume_m3: opts.room_volume_m3.unwrap_or(th.room.volume_m3),
        air_changes_per_hour: opts
            .air_changes_per_hour
            .unwrap_or(th.room.air_changes_per_hour),
        air_speed_m_per_s: th.room.air_speed_m_per_s,
        surface_area_m2: area,
        surface_basis: basis,
        exposure_window_min: window,
        worst_case,
    }
}

/// Whether a state boils, is close to it, or neither, from its own vapour pressure.
#[derive(Debug, Clone)]
pub(super) enum Boil {
    No,
    /// Within the margin of thresholds.yaml: the vapour pressure that much warmer.
    Near(VapourPressure),
    Boils(VapourPressure),
}

impl Boil {
    pub(super) fn boils(&self) -> bool {
        matches!(self, Boil::Boils(_))
    }
    fn rank(&self) -> u8 {
        match self {
            Boil::No => 0,
            Boil::Near(_) => 1,
            Boil::Boils(_) => 2,
        }
    }
}

/// The boiling status of the state at fraction `f` of `pour`, solved as `eq` at the
/// temperature `heat` brought it to.
pub(super) fn boiling(
    cat: &Catalog,
    th: &Thresholds,
    pour: &Pour,
    f: f64,
    eq: &crate::chem::Equilibrium,
    heat: &HeatReport,
) -> Result<Boil, CheckError> {
    let makeup = pour.makeup(f);
    let k = cat.physical.kelvin_offset;
    // An asphyxiant that passes the atmosphere's pressure (CO2 from a neutralised carbonate)
    // bubbles out of the liquid rather than boiling it; it is judged by the pressure it
    // builds and by what reaches the room.
    let mut eq = eq.clone();
    eq.gases.retain(|g| !cat.asphyxiant_only(&g.gas));
    let eq = &eq;
    // Past the top of the aqueous model, water and solvents are taken at the temperature
    // the heat would bring them to, with the gases as solved at the top.
    let t = (heat.would_reach_c + k).max(eq.temperature_k);
    let now = vapour_pressure(cat, eq, &makeup, t);
    if now.boils() {
        return Ok(Boil::Boils(now));
    }
    let warmer = t + th.heat.boiling_margin_k;
    let eq_warm = pour
        .solve_at(f, warmer, Some(eq))
        .map_err(|error| CheckError::Solve {
            what: format!("the boiling point {}", where_in_pour(f)),
            error,
        })?;
    let mut eq_warm = eq_warm;
    eq_warm.gases.retain(|g| !cat.asphyxiant_only(&g.gas));
    let then = vapour_pressure(cat, &eq_warm, &makeup, warmer);
    Ok(if then.boils() {
        Boil::Near(then)
    } else {
        Boil::No
    })
}

/// Findings on boiling, judged by what the pour changes: a container whose liquid already
/// boils or is close to it gets its own finding.
pub(super) fn boiling_findings(
    th: &Thresholds,
    states: [(&Boil, f64); 2],
    alone: &Boil,
    action: crate::judge::assess::Action,
) -> Vec<Finding> {
    let mut out = Vec::new();
    let (worst, f) = states
        .into_iter()
        .max_by_key(|(b, f)| (b.rank(), (*f * 1e6) as i64))
        .expect("two states");
    let margin = th.heat.boiling_margin_k;
    let describe = |b: &Boil| {
        match b {
        Boil::Boils(v) => format!(
            "the liquid reaches {} °C, where its vapour pressure is {} kPa ({}) against {} kPa over it: it boils",
            crate::basics::text::fixed(v.temperature_c, 1),
            crate::basics::text::fixed(v.total_kpa, 0),
            v.describe(),
            crate::basics::text::fixed(v.pressure_over_kpa, 1)
        ),
        Boil::Near(v) => format!(
            "{margin} K warmer than it gets, at {} °C, the liquid's vapour pressure would reach {} kPa ({}), the {} kPa over it: it is close to boiling",
            crate::basics::text::fixed(v.temperature_c, 1),
            crate::basics::text::fixed(v.total_kpa, 0),
            v.describe(),
            crate::basics::text::fixed(v.pressure_over_kpa, 1)
        ),
        Boil::No => String::new(),
    }
    };
    if worst.rank() > alone.rank() {
        let (severity, code) = if worst.boils() {
            (Severity::Stop, "mixture-boils")
        } else {
            (Severity::Review, "mixture-near-boiling")
        };
        out.push(Finding::chemistry(
            severity,
            code,
            format!(
                "{}, {} ({}).",
                crate::basics::text::sentence_start(&action.place(f)),
                describe(worst),
                th.heat.boiling_basis
            ),
            "Cool the receiving container, add slowly in small portions, and keep volatile solvents and dissolved gases out of pours that warm.",
        ));
    }
    if alone.rank() > 0 {
        out.push(Finding {
            scope: crate::report::Scope::Container,
            ..Finding::chemistry(
                Severity::Review,
                if alone.boils() {
                    "container-boils"
                } else {
                    "container-near-boiling"
                },
                format!("{}, {}.", action.before(), describe(alone)),
                "Keep it cool and closed, open it only in a fume hood, and do not warm it.",
            )
        });
    }
    out
}

/// Findings on heat: the rise and the final temperature.
pub(super) fn heat_findings(th: &Thresholds, end: &HeatReport, worst: &HeatReport) -> Vec<Finding> {
    let h = &th.heat;
    let hot = if worst.would_reach_c > end.would_reach_c {
        worst
    } else {
        end
    };
    let level = |v: f64, review: f64, stop: f64| {
        if v >= stop {
            Severity::Stop
        } else if v >= review {
            Severity::Review
        } else {
            Severity::Clear
        }
    };
    let sev = level(hot.temperature_rise_k, h.review_rise_k, h.stop_rise_k).max(level(
        hot.would_reach_c,
        h.review_final_c,
        h.stop_final_c,
    ));
    if sev <= Severity::Clear {
        return Vec::new();
    }
    let fixed = crate::basics::text::fixed;
    vec![Finding::chemistry(
        sev,
        "mixture-heats-up",
        format!(
            "The pour {}: the mixture goes from {} °C to {} °C (review at a rise of {} K or {} °C, stop at {} K or {} °C; {}).",
            hot.released_words(0),
            fixed(hot.start_temperature_c, 1),
            fixed(hot.would_reach_c, 1),
            h.review_rise_k,
            h.review_final_c,
            h.stop_rise_k,
            h.stop_final_c,
            h.basis
        ),
        "Add slowly with stirring and cooling, in small portions, and let the container cool before it is capped.",
    )]
}

/// Findings on what a person in the room would breathe. A figure the container already
/// reaches on its own counts against the pour only when the pour makes it clearly worse.
pub(super) fn room_findings(
    cat: &Catalog,
    th: &Thresholds,
    gases: &[RoomGasReport],
    alone: &[RoomGasReport],
    room: &RoomSettings,
    closure: Closure,
    exposed: bool,
) -> Vec<Finding> {
    let factor = th.pour_change.clearly_worse_factor;
    let mut out = Vec::new();
    for g in gases {
        let before = alone.iter().find(|a| a.formula == g.formula);
        // Only what the pour clearly adds to what the container alone already gives off.
        let pour_adds = |now: f64, then: fn(&RoomGasReport) -> f64| {
            before.is_none_or(|b| now > factor * then(b))
        };
        if pour_adds(g.worst_case_room_ppm, |b| b.worst_case_room_ppm) {
            out.extend(room_worst_case_finding(cat, g, room, closure));
        }
        if pour_adds(g.steady_state_ppm, |b| b.steady_state_ppm) {
            out.extend(room_evaporation_finding(g, room, exposed));
        }
    }
    out
}

/// The whole of a gas in the room at once (headspace and evaporated liquid).
fn room_worst_case_finding(
    cat: &Catalog,
    g: &RoomGasReport,
    room: &RoomSettings,
    closure: Closure,
) -> Option<Finding> {
    let asphyxiant = cat.asphyxiant_only(&g.formula);
    let stop_ratio = g.worst_case_idlh_ratio.unwrap_or(0.0);
    let review_ratio = g.worst_case_limit_ratio.unwrap_or(0.0);
    // An asphyxiant in a vented or open vessel is judged here; a toxic gas is judged
    // by its headspace, and the room's worst case asks for a spill plan.
    let severity = if asphyxiant {
        let s = if stop_ratio >= 1.0 {
            Severity::Stop
        } else if review_ratio >= 1.0 {
            Severity::Review
        } else {
            Severity::Clear
        };
        if closure == Closure::Sealed && s > Severity::Clear {
            Severity::Info
        } else {
            s
        }
    } else if stop_ratio >= 1.0 {
        Severity::Review
    } else {
        Severity::Clear
    };
    if severity == Severity::Clear {
        return None;
    }
    let (ratio, level) = if stop_ratio >= 1.0 {
        (stop_ratio, "stop level")
    } else {
        (review_ratio, "short-term level")
    };
    Some(Finding::chemistry(
        severity,
        "room-worst-case",
        format!(
            "Worst case for the room ({}): {} mol of {} ({} mol from the headspace, {} mol evaporated) would bring a {} m3 room to {}, {} its {level}.",
            room.worst_case,
            crate::basics::text::fixed(g.headspace_mol + g.evaporated_mol, 3),
            g.formula,
            crate::basics::text::fixed(g.headspace_mol, 3),
            crate::basics::text::fixed(g.evaporated_mol, 3),
            room.volume_m3,
            crate::judge::assess::fmt_ppm(g.worst_case_room_ppm),
            crate::judge::assess::fmt_times(ratio),
        ),
        if asphyxiant {
            "Pour slowly in a ventilated place and leave the vessel vented until the gas stops."
        } else {
            "Plan for a spill: keep the container in secondary containment in a ventilated place, and know the way out."
        },
    ))
}

/// The room's steady state while the liquid evaporates into it.
fn room_evaporation_finding(
    g: &RoomGasReport,
    room: &RoomSettings,
    exposed: bool,
) -> Option<Finding> {
    let css_stop = g.steady_state_idlh_ratio.unwrap_or(0.0);
    let css_review = g.steady_state_limit_ratio.unwrap_or(0.0);
    let severity = if css_stop >= 1.0 {
        Severity::Stop
    } else if css_review >= 1.0 {
        Severity::Review
    } else {
        return None;
    };
    let when = |m: Option<f64>| match m {
        Some(m) => format!("after {m:.0} min"),
        None => "never".into(),
    };
    Some(Finding::chemistry(
        if exposed { severity } else { Severity::Info },
        "room-evaporation",
        format!(
            "{} {} evaporates from {} at about {} mg/min; with {} air changes per hour in {} m3 the room settles at {} ({} its short-term level; short-term level reached {}, stop level {}).",
            if exposed { "Open to the room," } else { "If the container is opened," },
            g.formula,
            room.surface_basis,
            crate::basics::text::fixed(g.emission_mg_per_min, 1),
            room.air_changes_per_hour,
            room.volume_m3,
            crate::judge::assess::fmt_ppm(g.steady_state_ppm),
            crate::judge::assess::fmt_times(css_review),
            when(g.minutes_to_short_term),
            when(g.minutes_to_idlh)
        ),
        "Keep the container closed and in a fume hood or ventilated cabinet; the figures are a well-mixed room estimate, not a ventilation survey.",
    ))
}

/// Flammable gas from stoichiometric releases, against its lower flammable limit.
pub(super) fn release_findings(th: &Thresholds, released: &[ReleaseReport]) -> Vec<Finding> {
    let f = &th.flammable_gas;
    released
        .iter()
        .filter_map(|r| {
            let lfl = r.lfl_percent?;
            let share = r.headspace_percent / lfl;
            let severity = if share >= f.stop_fraction_of_lfl {
                Severity::Stop
            } else if share >= f.review_fraction_of_lfl {
                Severity::Review
            } else {
                return None;
            };
            Some(Finding {
                scope: crate::report::Scope::Pour,
                severity,
                code: "flammable-gas-in-headspace".into(),
                message: format!(
                    "{} from {}: {:.3} mol ({:.2} L at 1 atm) would make {:.1} % of the headspace, {:.1} × its lower flammable limit of {} %{} (review at {} and stop at {} of the limit; {}).",
                    r.formula,
                    r.reactions.join("; "),
                    r.moles,
                    r.litres_at_1_atm,
                    r.headspace_percent,
                    share,
                    lfl,
                    if r.overpressure_kpa > 0.0 { format!(", and add {:.1} kPa to a sealed vessel", r.overpressure_kpa) } else { String::new() },
                    f.review_fraction_of_lfl,
                    f.stop_fraction_of_lfl,
                    f.basis
                ),
                caution: "Keep ignition sources away, do not cap the container, and ventilate.".into(),
                origin: "chemistry".into(),
            })
        })
        .collect()
}

/// Classes whose hazards are not proton transfers and that no rule in force covers:
/// nothing has assessed them, so they can never pass as clear.
pub(super) fn unruled_findings(
    cat: &Catalog,
    rules: &RuleSet,
    container: &Batch,
    stream: &Batch,
) -> Vec<Finding> {
    let covered = |class: &str| {
        rules
            .rules
            .iter()
            .any(|r| r.rule.meet.iter().flatten().any(|c| c == class))
    };
    let mut hits: Vec<String> = Vec::new();
    for c in container.components.iter().chain(stream.components.iter()) {
        let s = cat.substance(c.substance);
        let classes: Vec<&str> = s
            .classes
            .iter()
            .filter(|id| cat.class(id).is_some_and(|k| k.beyond_proton_model) && !covered(id))
            .map(|s| s.as_str())
            .collect();
        if !classes.is_empty() {
            let line = format!("{} ({})", s.name, classes.join(", "));
            if !hits.contains(&line) {
                hits.push(line);
            }
        }
    }
    if hits.is_empty() {
        return Vec::new();
    }
    vec![Finding {
        scope: crate::report::Scope::Pour,
        severity: Severity::Review,
        code: "hazard-not-assessed".into(),
        message: format!(
            "These components carry hazards that are not proton transfers and that no rule in force covers: {}.",
            hits.join("; ")
        ),
        caution: "Until a rule covers them, have a competent person review the mixture against the safety data sheets.".into(),
        origin: "chemistry".into(),
    }]
}
