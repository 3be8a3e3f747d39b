//! `check`: can this stream go into that container? The whole computation for one pour.

use crate::catalog::Catalog;
use crate::chem::{solve, Closure, SolveError, SolverSettings};
use crate::judge::assess::{
    container_findings, fmt_times, score, state_findings, state_report, where_in_pour, PourStates,
};
use crate::judge::rules::evaluate::{Present, RuleContext};
use crate::judge::rules::{Computed, Origin, RuleSet};
use crate::judge::thresholds::Thresholds;
use crate::pour::batch::{Batch, InputError};
use crate::pour::boiling::{vapour_pressure, VapourPressure};
use crate::pour::pairs::pair_table;
use crate::pour::pairs::Side;
use crate::pour::path::{scan, PathScan};
use crate::pour::release::ReleaseReport;
use crate::pour::{BatchHeat, HeatReport, Pour};
use crate::report::StateReport;
use crate::report::{
    BatchReport, CheckReport, ComponentReport, Finding, OrderReport, Severity, WorstStateReport,
};

#[derive(Debug, Clone, Default)]
pub struct CheckOptions {
    /// Overrides the temperature of both batches (K).
    pub temperature_k: Option<f64>,
    /// Room volume, m3 (default from the thresholds file).
    pub room_volume_m3: Option<f64>,
    /// Room air changes per hour (default from the thresholds file).
    pub air_changes_per_hour: Option<f64>,
    /// A spill of this area instead of the container's open surface, m2.
    pub spill_area_m2: Option<f64>,
    /// How finely the pour is followed (coarse for audits of many pairs).
    pub detail: crate::pour::path::Detail,
    /// What brings the two liquids together (a pour, a rinse, a leak), for the words.
    pub action: crate::judge::assess::Action,
}

#[derive(Debug, thiserror::Error)]
pub enum CheckError {
    #[error("{0}")]
    Input(#[from] InputError),
    #[error("could not be assessed: {what}: {error}. Treat the mixture as unsafe until it is checked another way.")]
    Solve { what: String, error: SolveError },
}

fn settings(th: &Thresholds) -> SolverSettings {
    SolverSettings {
        activity_limit: th.activity_model.max_ionic_strength,
        ..SolverSettings::default()
    }
}

/// Checks pouring `stream` into `container`, both ways round, and builds the report.
pub fn check(
    cat: &Catalog,
    th: &Thresholds,
    rules: &RuleSet,
    container: &Batch,
    stream: &Batch,
    opts: &CheckOptions,
) -> Result<CheckReport, CheckError> {
    let capacity = container.capacity_l.ok_or_else(|| InputError {
        file: container.file.clone(),
        line: None,
        message: "the container has no `capacity`".into(),
        fix: Some("add the vessel's full volume, e.g. `capacity: 20 L`".into()),
    })?;
    let total = container.volume_l + stream.volume_l;
    if total > capacity * (1.0 + 1e-9) {
        return Err(InputError {
            file: stream.file.clone(),
            line: None,
            message: format!(
                "adding {} L to the {} L already in `{}` makes {} L, more than its capacity of {} L",
                stream.volume_l, container.volume_l, container.name, total, capacity
            ),
            fix: Some("pour less, or use a larger or emptier container".into()),
        }
        .into());
    }
    let mut a = container.to_mixture(cat, capacity);
    let mut b = stream.to_mixture(cat, capacity);
    b.closure = container.closure;
    if let Some(t) = opts.temperature_k {
        a.temperature_k = t;
        b.temperature_k = t;
    }
    let s = settings(th);
    let scorer = |eq: &crate::chem::Equilibrium| score(cat, th, eq);
    let solve_err = |what: &str| {
        let what = what.to_string();
        move |(f, error): (f64, SolveError)| CheckError::Solve {
            what: format!("{what}, {}", where_in_pour(f)),
            error,
        }
    };
    // Each batch alone: the pair table's donors and acceptors, and the heat balance's start.
    let mut b_in_vessel = b.clone();
    b_in_vessel.headspace_l = (capacity - b.liquid_l).max(0.0);
    let alone = |m: &crate::chem::Mixture, what: &str| {
        solve(cat, m, &s).map_err(|error| CheckError::Solve {
            what: format!("{what} on its own"),
            error,
        })
    };
    let eq_a = alone(&a, "the container")?;
    let eq_b = alone(&b_in_vessel, "the stream")?;
    let heat_a = BatchHeat::of(cat, container);
    let heat_b = BatchHeat::of(cat, stream);
    let as_written = Pour {
        cat,
        settings: s,
        vessel: &a,
        stream: &b,
        capacity_l: capacity,
        vessel_heat: &heat_a,
        stream_heat: &heat_b,
        vessel_alone: &eq_a,
        stream_alone: &eq_b,
    };
    // The other way: the stream stands in the vessel and the container's contents go in.
    let other_way = Pour {
        cat,
        settings: s,
        vessel: &b_in_vessel,
        stream: &a,
        capacity_l: capacity,
        vessel_heat: &heat_b,
        stream_heat: &heat_a,
        vessel_alone: &eq_b,
        stream_alone: &eq_a,
    };
    let forward = scan(
        &|f, near| as_written.state(f, near),
        a.liquid_l <= 0.0,
        &scorer,
        opts.detail,
    )
    .map_err(solve_err("pouring the stream into the container"))?;
    let backward = scan(
        &|f, near| other_way.state(f, near),
        b.liquid_l <= 0.0,
        &scorer,
        opts.detail,
    )
    .map_err(solve_err("pouring the container into the stream"))?;
    let mut end_heat = forward.end.extra;
    let mut worst_heat = forward.worst.extra;
    let mut other_heat = backward.worst.extra;
    let boil_end = boiling(cat, th, &as_written, 1.0, &forward.end.state, &end_heat)?;
    let boil_worst = boiling(
        cat,
        th,
        &as_written,
        forward.worst.fraction_added,
        &forward.worst.state,
        &worst_heat,
    )?;
    let boil_other = boiling(
        cat,
        th,
        &other_way,
        backward.worst.fraction_added,
        &backward.worst.state,
        &other_heat,
    )?;
    let boil_alone = boiling(
        cat,
        th,
        &as_written,
        0.0,
        &eq_a,
        &HeatReport::at_rest(eq_a.temperature_k - cat.physical.kelvin_offset),
    )?;
    end_heat.boils = boil_end.boils();
    worst_heat.boils = boil_worst.boils();
    other_heat.boils = boil_other.boils();

    let pairs = pair_table(
        cat,
        &eq_a,
        &eq_b,
        forward.end.state.temperature_k,
        &th.proton_transfer,
    );

    let end = state_report(cat, th, &forward.end.state, &end_heat);
    let worst = state_report(cat, th, &forward.worst.state, &worst_heat);
    let container_alone = state_report(
        cat,
        th,
        &eq_a,
        &HeatReport::at_rest(eq_a.temperature_k - cat.physical.kelvin_offset),
    );
    let sealed = container.closure == Closure::Sealed;
    let mut findings = state_findings(
        th,
        &PourStates {
            end: &end,
            worst: &worst,
            worst_fraction: forward.worst.fraction_added,
            alone: Some(&container_alone),
            sealed,
            rated_pressure_kpa: container.rated_pressure_kpa,
            action: opts.action,
        },
    );
    findings.extend(container_findings(
        th,
        &container_alone,
        sealed,
        opts.action,
    ));
    findings.extend(order_findings(th, &forward, &backward, opts.action));
    let ctx = rule_context(container, stream, &forward, &backward);
    let components: Vec<(crate::catalog::SubstanceId, f64)> =
        ctx.present.iter().map(|p| (p.substance, p.moles)).collect();
    let released = crate::pour::release::releases(
        cat,
        &components,
        forward.ph_range,
        forward.end.state.temperature_k,
        forward.end.state.headspace_l,
        container.closure,
    );
    findings.extend(release_findings(th, &released));
    findings.extend(heat_findings(th, &end.heat, &worst.heat));
    findings.extend(boiling_findings(
        th,
        [
            (&boil_end, 1.0),
            (&boil_worst, forward.worst.fraction_added),
        ],
        &boil_alone,
        opts.action,
    ));
    let room_settings = room_settings(th, container, capacity, opts);
    let room_gases = crate::pour::room::room_report(cat, &forward.end.state, &room_settings);
    let room_alone = crate::pour::room::room_report(cat, &eq_a, &room_settings);
    let exposed = opts.spill_area_m2.is_some() || container.closure != Closure::Sealed;
    findings.extend(room_findings(
        cat,
        th,
        &room_gases,
        &room_alone,
        &room_settings,
        container.closure,
        exposed,
    ));
    findings.extend(rule_findings(cat, rules, &ctx, &end, &worst, &released));
    let uncomputed_gases = uncomputed_gases(cat, rules, &ctx, &end, &worst, &released);
    findings.extend(unruled_findings(cat, rules, container, stream));
    let inert = inert_names(cat, container, stream);
    if !inert.is_empty() {
        findings.push(Finding {
            scope: crate::report::Scope::Pour,
            severity: Severity::Info,
            code: "inert-components".into(),
            message: format!(
                "Treated as taking no part in proton transfer: {}.",
                inert.join(", ")
            ),
            caution: "They can still burn, form a separate layer or react by other routes (see the other findings and their safety data sheets).".into(),
            origin: "chemistry".into(),
        });
    }
    // The reason that decides comes first: the most severe, and of equal severity what the
    // pour does before a component's own hazard and the container's own state.
    // A rule about this meeting names the reason in words a practitioner knows, so at
    // equal severity it comes before the computed figures.
    findings.sort_by_key(|f| {
        (
            std::cmp::Reverse(f.severity),
            f.scope,
            f.origin == "chemistry",
        )
    });
    let severity = Severity::verdict(&findings);

    let order = |p: &PathScan<HeatReport>, heat: &HeatReport, description: &str| {
        let gas_peaks: Vec<crate::report::GasPeak> = p
            .gas_peaks
            .iter()
            .filter(|(_, _, pa)| {
                crate::judge::assess::ppm(cat, *pa) >= crate::judge::assess::REPORT_FLOOR_PPM
            })
            .map(|(g, f, pa)| crate::judge::assess::gas_peak(cat, th, g, *f, *pa))
            .collect();
        OrderReport {
            description: description.into(),
            worst_state: WorstStateReport {
                fraction_added: p.worst.fraction_added,
                state: state_report(cat, th, &p.worst.state, heat),
            },
            worst_limit_ratio: p.worst.score,
            path: path_report(cat, &p.points, &gas_peaks),
            gas_peaks,
        }
    };
    let mut assumptions = assumptions(cat, container, stream, opts, th);
    assumptions.extend(crate::judge::assess::activity_assumption(
        &end.activity,
        "when the pour is complete",
    ));
    Ok(CheckReport {
        tool: "offgas",
        version: env!("CARGO_PKG_VERSION"),
        severity,
        container: batch_report(cat, container, true),
        stream: batch_report(cat, stream, false),
        end_state: end,
        container_alone,
        worst_state: WorstStateReport {
            fraction_added: forward.worst.fraction_added,
            state: worst,
        },
        poured_as_written: order(
            &forward,
            &worst_heat,
            "the stream poured into the container",
        ),
        poured_other_way: Some(order(
            &backward,
            &other_heat,
            "the container's contents poured into the stream",
        )),
        pairs,
        stoichiometric_gases: released,
        room: crate::report::RoomSection {
            settings: room_settings,
            open_surface_counts: exposed,
            gases: room_gases,
        },
        findings,
        uncomputed_gases,
        inert_components: inert,
        assumptions,
        cautions: th.cautions.clone(),
    })
}

/// The states along one order, with the gases whose peaks are reported.
fn path_report(
    cat: &Catalog,
    points: &[crate::pour::path::PathPoint],
    peaks: &[crate::report::GasPeak],
) -> Vec<crate::report::PathPointReport> {
    points
        .iter()
        .map(|pt| crate::report::PathPointReport {
            fraction_added: pt.fraction_added,
            ph: pt.ph,
            temperature_c: pt.temperature_k - cat.physical.kelvin_offset,
            gases: peaks
                .iter()
                .map(|peak| crate::report::PathGas {
                    formula: peak.formula.clone(),
                    headspace_ppm: pt
                        .gases
                        .iter()
                        .find(|(g, _)| g.as_ref() == peak.formula)
                        .map_or(0.0, |(_, pa)| crate::judge::assess::ppm(cat, *pa)),
                })
                .collect(),
        })
        .collect()
}

fn order_findings(
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

fn rule_context(
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
fn computed_note(
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
fn uncomputed_gases(
    cat: &Catalog,
    rules: &RuleSet,
    ctx: &RuleContext,
    end: &StateReport,
    worst: &StateReport,
    released: &[ReleaseReport],
) -> Vec<String> {
    let computed = |g: &str| {
        end.gases.iter().chain(&worst.gases).any(|x| x.formula == g)
            || released.iter().any(|r| r.formula == g)
    };
    let mut out: Vec<String> = Vec::new();
    for hit in rules.evaluate(cat, ctx) {
        for g in &hit.rule.rule.forms {
            if cat.gas_limits(g).is_some() && !computed(g) && !out.contains(g) {
                out.push(g.clone());
            }
        }
    }
    out
}

fn origin_text(o: &Origin, id: &str) -> String {
    match o {
        Origin::BuiltIn { file } => format!("built-in rule {id} ({file})"),
        Origin::Site { file } => format!("site rule {id} ({file})"),
    }
}

/// Findings from the rules the mixture meets; a site rule that raises another lifts that
/// finding's severity and never lowers it.
fn rule_findings(
    cat: &Catalog,
    rules: &RuleSet,
    ctx: &RuleContext,
    end: &StateReport,
    worst: &StateReport,
    released: &[ReleaseReport],
) -> Vec<Finding> {
    let hits = rules.evaluate(cat, ctx);
    let mut out: Vec<Finding> = Vec::new();
    for hit in &hits {
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
    for hit in &hits {
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

fn room_settings(
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
enum Boil {
    No,
    /// Within the margin of thresholds.yaml: the vapour pressure that much warmer.
    Near(VapourPressure),
    Boils(VapourPressure),
}

impl Boil {
    fn boils(&self) -> bool {
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
fn boiling(
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
fn boiling_findings(
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
fn heat_findings(th: &Thresholds, end: &HeatReport, worst: &HeatReport) -> Vec<Finding> {
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
fn room_findings(
    cat: &Catalog,
    th: &Thresholds,
    gases: &[crate::pour::room::RoomGasReport],
    alone: &[crate::pour::room::RoomGasReport],
    room: &crate::pour::room::RoomSettings,
    closure: Closure,
    exposed: bool,
) -> Vec<Finding> {
    let factor = th.pour_change.clearly_worse_factor;
    let mut out = Vec::new();
    for g in gases {
        let before = alone.iter().find(|a| a.formula == g.formula);
        let pour_adds = |now: f64, then: fn(&crate::pour::room::RoomGasReport) -> f64| {
            before.is_none_or(|b| now > factor * then(b))
        };
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
        if severity != Severity::Clear
            && pour_adds(g.worst_case_room_ppm, |b| b.worst_case_room_ppm)
        {
            let (ratio, level) = if stop_ratio >= 1.0 {
                (stop_ratio, "stop level")
            } else {
                (review_ratio, "short-term level")
            };
            out.push(Finding::chemistry(
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
            ));
        }
        let css_stop = g.steady_state_idlh_ratio.unwrap_or(0.0);
        let css_review = g.steady_state_limit_ratio.unwrap_or(0.0);
        let severity = if css_stop >= 1.0 {
            Severity::Stop
        } else if css_review >= 1.0 {
            Severity::Review
        } else {
            continue;
        };
        if !pour_adds(g.steady_state_ppm, |b| b.steady_state_ppm) {
            continue;
        }
        let when = |m: Option<f64>| match m {
            Some(m) => format!("after {m:.0} min"),
            None => "never".into(),
        };
        out.push(Finding::chemistry(
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
        ));
    }
    out
}

/// Flammable gas from stoichiometric releases, against its lower flammable limit.
fn release_findings(th: &Thresholds, released: &[ReleaseReport]) -> Vec<Finding> {
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
fn unruled_findings(
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

fn inert_names(cat: &Catalog, container: &Batch, stream: &Batch) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for c in container.components.iter().chain(stream.components.iter()) {
        let s = cat.substance(c.substance);
        if s.is_inert() && !out.contains(&s.name) {
            out.push(s.name.clone());
        }
    }
    out
}

fn batch_report(cat: &Catalog, b: &Batch, is_container: bool) -> BatchReport {
    BatchReport {
        file: b.file.clone(),
        name: b.name.clone(),
        volume_l: b.volume_l,
        capacity_l: if is_container { b.capacity_l } else { None },
        closure: is_container.then_some(b.closure),
        temperature_c: b.temperature_k - cat.physical.kelvin_offset,
        components: b
            .components
            .iter()
            .map(|c| {
                let s = cat.substance(c.substance);
                ComponentReport {
                    written: c.written.clone(),
                    substance: s.name.clone(),
                    amount: format_amount(c.amount),
                    moles: c.moles,
                    inert: s.is_inert(),
                    classes: s.classes.clone(),
                }
            })
            .collect(),
    }
}

fn format_amount(a: crate::basics::quantity::Amount) -> String {
    use crate::basics::quantity::Amount::*;
    match a {
        MolPerLitre(v) => format!("{v} mol/L"),
        GramPerLitre(v) => format!("{v} g/L"),
        PercentWeightPerWeight(v) => format!("{v} % w/w"),
        PercentWeightPerVolume(v) => format!("{v} % w/v"),
        MillilitrePerLitre(v) => format!("{v} mL/L"),
        Moles(v) => format!("{v} mol"),
        Grams(v) => format!("{v} g"),
        Millilitres(v) => format!("{v} mL"),
    }
}

/// A batch whose untabled solutes pass this mass share has its mass called an estimate.
const UNTABLED_NOTE_SHARE: f64 = 0.05;

/// Below this much water per litre a liquid is mostly something else (kg/L).
const MOSTLY_WATER_KG_PER_L: f64 = 0.5;

fn assumptions(
    cat: &Catalog,
    container: &Batch,
    stream: &Batch,
    opts: &CheckOptions,
    th: &Thresholds,
) -> Vec<String> {
    let mut out = vec![
        "Equilibrium of a well-mixed liquid with its headspace; the headspace starts as air at 1 atm and each volatile form shares its moles with it by Henry's law on the molal scale (ammonia with its own activity in concentrated solution).".to_string(),
        format!(
            "Activity coefficients by the Davies equation while the ionic strength stays below {dilute} mol/kg; above it by Pitzer's ion-interaction equations (pairs of cation and anion, no mixing terms) for the ions their parameters name and the extended Debye–Hückel form for the others, passing over from Davies between {dilute} and {} mol/kg. Water's activity from the same equations enters Kw, the steps that take up water (CO2 to bicarbonate) and the vapour pressure. Dissolved gases are salted out by the Weisenberger–Schumpe method; a gas with no parameters of its own takes an upper estimate. Beyond the range a mixture's parameters were fitted to, the coefficients are held at their value at the highest fitted ionic strength.",
            2.0 * cat.pitzer.dilute_below,
            dilute = cat.pitzer.dilute_below,
        ),
        "Constants adjusted to the mixture temperature by the van 't Hoff equation with each step's ionization enthalpy; Kw from its temperature equation.".to_string(),
        "Heat: proton transfers by Hess's law from each step's ionization enthalpy (25 °C values, no heat-capacity change), plus each concentrated reagent's heat of dilution from the water it had to the water of the mixture (integral heats of dilution); the mixture's mass from the density tables, warming as water does (4.18 J/(g K)) from the volume-weighted mean of the two temperatures, re-solved at the temperature it reaches.".to_string(),
        format!(
            "Boiling: the liquid boils where its vapour pressure (water by its activity from the ions, Raoult's law in dilute mixtures; dissolved gases from the speciation; solvents by Henry's law or as a layer of their own) reaches the {} kPa over it; close to boiling within {} K of that.",
            crate::basics::text::fixed(cat.physical.p_std / 1e3, 1),
            th.heat.boiling_margin_k
        ),
        "Pressure in a sealed vessel: the gases the liquid gives off, plus the warming of the air sealed in at the start and the change of water's vapour pressure; vented and open vessels hold no pressure and the report gives the litres vented.".to_string(),
        "Metal cyanide, ammine, EDTA, citrate and hydroxo complexes are computed at equilibrium; so are the metal hydroxides (and silver and mercury oxides), which take their metal out of the liquid where it is saturated with them. Chloro complexes and other solids (sulfides, carbonates, copper(I) cyanide) are not computed, which errs towards more free metal and free cyanide. Hexacyanoferrates and cyanoaurate are counted as they are: they release HCN only slowly, with acid, heat or light.".to_string(),
        "The other order of pouring is computed in the same vessel with the same closure.".to_string(),
    ];
    if let Some(t) = opts.temperature_k {
        out.push(format!(
            "Temperature set on the command line: {:.1} °C for both batches.",
            t - 273.15
        ));
    }
    for b in [container, stream] {
        for c in &b.components {
            out.extend(crate::pour::batch::beyond_solubility(cat, c, b.volume_l));
        }
        if !b.temperature_given && opts.temperature_k.is_none() {
            out.push(format!("`{}` has no temperature: 25 °C assumed.", b.name));
        }
        let comp = b.composition(cat);
        let uses_ww = b.components.iter().any(|c| {
            matches!(
                c.amount,
                crate::basics::quantity::Amount::PercentWeightPerWeight(_)
            )
        });
        if uses_ww && !b.density_given {
            out.push(format!(
                "`{}` gives % w/w amounts: its density, {} g/mL, comes from the density tables of its solutes.",
                b.name,
                crate::basics::text::fixed(comp.density_g_per_ml, 3)
            ));
        }
        if comp.untabled_share > UNTABLED_NOTE_SHARE && !b.density_given {
            out.push(format!(
                "`{}`: {} % of its mass is in solutes with no density table, taken to occupy the volume of their neat liquid or of water; its mass and water are estimates.",
                b.name,
                crate::basics::text::fixed(comp.untabled_share * 100.0, 0)
            ));
        }
        if comp.water_g < MOSTLY_WATER_KG_PER_L * 1e3 * b.volume_l && b.volume_l > 0.0 {
            out.push(format!(
                "`{}` holds {} kg of water per litre: the liquid is mostly something else, and the aqueous model (Henry's law, pKa, activity) is stretched; treat its figures as rough.",
                b.name,
                crate::basics::text::fixed(comp.water_g / 1e3 / b.volume_l, 2)
            ));
        }
    }
    out.push(format!(
        "Room: a well-mixed room ({} m3, {} air changes per hour unless --room and --air-changes say otherwise; {}); evaporation from the open surface by the EPA RMP equation D-1 with the gas's partial pressure over the liquid; the room's steady state takes that rate as constant (no depletion), which overstates what a dilute solution gives off; the worst case releases the headspace at once and adds what evaporates over {} min ({}) as the liquid runs out of gas, all of it spread through the room with no credit for ventilation.",
        th.room.volume_m3,
        th.room.air_changes_per_hour,
        th.room.basis,
        th.room.exposure_window_min,
        th.room.window_basis
    ));
    match container.closure {
        Closure::Sealed => {}
        Closure::Vented => out.push("Vented container: gas above atmospheric pressure leaves through the vent, so no overpressure builds; the headspace figures are those just above the liquid.".into()),
        Closure::Open => out.push("Open container: the liquid is taken to keep its gas, and the headspace figure is the concentration in air in equilibrium with the liquid surface, the most a person at the opening could meet.".into()),
    }
    out
}
