//! `check`: can this stream go into that container? The whole computation for one pour.

mod explain;
mod findings;

use crate::catalog::Catalog;
use crate::chem::{solve, Closure, Equilibrium, Mixture, SolveError, SolverSettings};
use crate::judge::assess::{
    container_findings, score, state_findings, state_report, where_in_pour, PourStates,
};
use crate::judge::rules::RuleSet;
use crate::judge::thresholds::Thresholds;
use crate::pour::batch::{Batch, InputError};
use crate::pour::pairs::pair_table;
use crate::pour::path::{scan, PathScan};
use crate::pour::release::ReleaseReport;
use crate::pour::{BatchHeat, HeatReport, Pour};
use crate::report::StateReport;
use crate::report::{CheckReport, Finding, OrderReport, Severity, WorstStateReport};
use explain::{assumptions, batch_report, inert_names, path_report};
use findings::{
    boiling, boiling_findings, heat_findings, order_findings, release_findings, room_findings,
    room_settings, rule_context, rule_findings, uncomputed_gases, unruled_findings, Boil,
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

/// Checks pouring `stream` into `container`, both ways round, and builds the report: the
/// steps of the bird's-eye view, each a function below.
pub fn check(
    cat: &Catalog,
    th: &Thresholds,
    rules: &RuleSet,
    container: &Batch,
    stream: &Batch,
    opts: &CheckOptions,
) -> Result<CheckReport, CheckError> {
    let capacity_l = room_in_the_container(container, stream)?;
    let input = Inputs {
        cat,
        th,
        rules,
        container,
        stream,
        opts,
        capacity_l,
    };
    let mixtures = Mixtures::build(&input)?;
    let scans = scan_both_orders(&input, &mixtures)?;
    let judged = judge(&input, &mixtures, &scans);
    Ok(assemble(&input, &mixtures, scans, judged))
}

/// What one check works from: the data, the two batches as written, and the options.
struct Inputs<'a> {
    cat: &'a Catalog,
    th: &'a Thresholds,
    rules: &'a RuleSet,
    container: &'a Batch,
    stream: &'a Batch,
    opts: &'a CheckOptions,
    capacity_l: f64,
}

/// The container's capacity, once the two batches are known to fit in it.
fn room_in_the_container(container: &Batch, stream: &Batch) -> Result<f64, CheckError> {
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
    Ok(capacity)
}

/// The two liquids as the solver sees them, each solved on its own (the pair table's donors
/// and acceptors, and the heat balance's start), with their heat.
struct Mixtures {
    settings: SolverSettings,
    container: Mixture,
    stream: Mixture,
    /// The stream standing in the vessel, for the other order of pouring.
    stream_in_vessel: Mixture,
    container_alone: Equilibrium,
    stream_alone: Equilibrium,
    container_heat: BatchHeat,
    stream_heat: BatchHeat,
}

impl Mixtures {
    fn build(i: &Inputs) -> Result<Mixtures, CheckError> {
        let mut container = i.container.to_mixture(i.cat, i.capacity_l);
        let mut stream = i.stream.to_mixture(i.cat, i.capacity_l);
        stream.closure = i.container.closure;
        if let Some(t) = i.opts.temperature_k {
            container.temperature_k = t;
            stream.temperature_k = t;
        }
        let settings = settings(i.th);
        let mut stream_in_vessel = stream.clone();
        stream_in_vessel.headspace_l = (i.capacity_l - stream.liquid_l).max(0.0);
        let alone = |m: &Mixture, what: &str| {
            solve(i.cat, m, &settings).map_err(|error| CheckError::Solve {
                what: format!("{what} on its own"),
                error,
            })
        };
        Ok(Mixtures {
            settings,
            container_alone: alone(&container, "the container")?,
            stream_alone: alone(&stream_in_vessel, "the stream")?,
            container_heat: BatchHeat::of(i.cat, i.container),
            stream_heat: BatchHeat::of(i.cat, i.stream),
            container,
            stream,
            stream_in_vessel,
        })
    }

    /// The stream poured into the container, as written.
    fn as_written<'a>(&'a self, i: &Inputs<'a>) -> Pour<'a> {
        Pour {
            cat: i.cat,
            settings: self.settings,
            vessel: &self.container,
            stream: &self.stream,
            capacity_l: i.capacity_l,
            vessel_heat: &self.container_heat,
            stream_heat: &self.stream_heat,
            vessel_alone: &self.container_alone,
            stream_alone: &self.stream_alone,
        }
    }

    /// The other way: the stream stands in the vessel and the container's contents go in.
    fn other_way<'a>(&'a self, i: &Inputs<'a>) -> Pour<'a> {
        Pour {
            cat: i.cat,
            settings: self.settings,
            vessel: &self.stream_in_vessel,
            stream: &self.container,
            capacity_l: i.capacity_l,
            vessel_heat: &self.stream_heat,
            stream_heat: &self.container_heat,
            vessel_alone: &self.stream_alone,
            stream_alone: &self.container_alone,
        }
    }

    /// The container at rest, before anything is poured.
    fn container_at_rest(&self, cat: &Catalog) -> HeatReport {
        HeatReport::at_rest(self.container_alone.temperature_k - cat.physical.kelvin_offset)
    }
}

/// Both orders of pouring followed from the first drop to the last, and whether the liquid
/// boils at the states that matter.
struct Scans {
    forward: PathScan<HeatReport>,
    backward: PathScan<HeatReport>,
    end_heat: HeatReport,
    worst_heat: HeatReport,
    other_heat: HeatReport,
    boil_end: Boil,
    boil_worst: Boil,
    boil_alone: Boil,
}

fn scan_both_orders(i: &Inputs, m: &Mixtures) -> Result<Scans, CheckError> {
    let (cat, th) = (i.cat, i.th);
    let scorer = |eq: &Equilibrium| score(cat, th, eq);
    let solve_err = |what: &str| {
        let what = what.to_string();
        move |(f, error): (f64, SolveError)| CheckError::Solve {
            what: format!("{what}, {}", where_in_pour(f)),
            error,
        }
    };
    let as_written = m.as_written(i);
    let other_way = m.other_way(i);
    let forward = scan(
        &|f, near| as_written.state(f, near),
        m.container.liquid_l <= 0.0,
        &scorer,
        i.opts.detail,
    )
    .map_err(solve_err("pouring the stream into the container"))?;
    let backward = scan(
        &|f, near| other_way.state(f, near),
        m.stream.liquid_l <= 0.0,
        &scorer,
        i.opts.detail,
    )
    .map_err(solve_err("pouring the container into the stream"))?;
    let (fw, bw) = (&forward, &backward);
    let boil_end = boiling(cat, th, &as_written, 1.0, &fw.end.state, &fw.end.extra)?;
    let boil_worst = boiling(
        cat,
        th,
        &as_written,
        fw.worst.fraction_added,
        &fw.worst.state,
        &fw.worst.extra,
    )?;
    let boil_other = boiling(
        cat,
        th,
        &other_way,
        bw.worst.fraction_added,
        &bw.worst.state,
        &bw.worst.extra,
    )?;
    let at_rest = m.container_at_rest(cat);
    let boil_alone = boiling(cat, th, &as_written, 0.0, &m.container_alone, &at_rest)?;
    let (mut end_heat, mut worst_heat, mut other_heat) =
        (fw.end.extra, fw.worst.extra, bw.worst.extra);
    end_heat.boils = boil_end.boils();
    worst_heat.boils = boil_worst.boils();
    other_heat.boils = boil_other.boils();
    Ok(Scans {
        forward,
        backward,
        end_heat,
        worst_heat,
        other_heat,
        boil_end,
        boil_worst,
        boil_alone,
    })
}

/// The states the verdict is read from, every finding (the reason that decides first), and
/// what the room receives.
struct Judged {
    end: StateReport,
    worst: StateReport,
    container_alone: StateReport,
    findings: Vec<Finding>,
    released: Vec<ReleaseReport>,
    room: crate::report::RoomSection,
    uncomputed_gases: Vec<String>,
    inert: Vec<String>,
}

fn judge(i: &Inputs, m: &Mixtures, s: &Scans) -> Judged {
    let (cat, th, opts) = (i.cat, i.th, i.opts);
    let (fw, bw) = (&s.forward, &s.backward);
    let end = state_report(cat, th, &fw.end.state, &s.end_heat);
    let worst = state_report(cat, th, &fw.worst.state, &s.worst_heat);
    let container_alone = state_report(cat, th, &m.container_alone, &m.container_at_rest(cat));
    let sealed = i.container.closure == Closure::Sealed;
    let mut findings = state_findings(
        th,
        &PourStates {
            end: &end,
            worst: &worst,
            worst_fraction: fw.worst.fraction_added,
            alone: Some(&container_alone),
            sealed,
            rated_pressure_kpa: i.container.rated_pressure_kpa,
            action: opts.action,
        },
    );
    findings.extend(container_findings(
        th,
        &container_alone,
        sealed,
        opts.action,
    ));
    findings.extend(order_findings(th, fw, bw, opts.action));
    let ctx = rule_context(i.container, i.stream, fw, bw);
    let components: Vec<(crate::catalog::SubstanceId, f64)> =
        ctx.present.iter().map(|p| (p.substance, p.moles)).collect();
    let released = crate::pour::release::releases(
        cat,
        &components,
        fw.ph_range,
        fw.end.state.temperature_k,
        fw.end.state.headspace_l,
        i.container.closure,
    );
    findings.extend(release_findings(th, &released));
    findings.extend(heat_findings(th, &end.heat, &worst.heat));
    findings.extend(boiling_findings(
        th,
        [(&s.boil_end, 1.0), (&s.boil_worst, fw.worst.fraction_added)],
        &s.boil_alone,
        opts.action,
    ));
    let room = room_section(i, m, s, &mut findings);
    // The rules met are evaluated once: their findings and the gases they name that no
    // state computed both come from the same hits.
    let hits = i.rules.evaluate(cat, &ctx);
    findings.extend(rule_findings(&hits, &end, &worst, &released));
    let uncomputed_gases = uncomputed_gases(cat, &hits, &end, &worst, &released);
    findings.extend(unruled_findings(cat, i.rules, i.container, i.stream));
    let inert = inert_names(cat, i.container, i.stream);
    findings.extend(inert_finding(&inert));
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
    Judged {
        end,
        worst,
        container_alone,
        findings,
        released,
        room,
        uncomputed_gases,
        inert,
    }
}

/// What reaches the room from the end state and from the container alone, with its findings.
fn room_section(
    i: &Inputs,
    m: &Mixtures,
    s: &Scans,
    findings: &mut Vec<Finding>,
) -> crate::report::RoomSection {
    let settings = room_settings(i.th, i.container, i.capacity_l, i.opts);
    let gases = crate::pour::room::room_report(i.cat, &s.forward.end.state, &settings);
    let alone = crate::pour::room::room_report(i.cat, &m.container_alone, &settings);
    let exposed = i.opts.spill_area_m2.is_some() || i.container.closure != Closure::Sealed;
    findings.extend(room_findings(
        i.cat,
        i.th,
        &gases,
        &alone,
        &settings,
        i.container.closure,
        exposed,
    ));
    crate::report::RoomSection {
        settings,
        open_surface_counts: exposed,
        gases,
    }
}

/// A note naming the components treated as taking no part in proton transfer.
fn inert_finding(inert: &[String]) -> Option<Finding> {
    (!inert.is_empty()).then(|| Finding {
        scope: crate::report::Scope::Pour,
        severity: Severity::Info,
        code: "inert-components".into(),
        message: format!(
            "Treated as taking no part in proton transfer: {}.",
            inert.join(", ")
        ),
        caution: "They can still burn, form a separate layer or react by other routes (see the other findings and their safety data sheets).".into(),
        origin: "chemistry".into(),
    })
}

/// One order of pouring as the report gives it: its worst state, the peak of each gas worth
/// reporting, and every state along it.
fn order_report(
    i: &Inputs,
    p: &PathScan<HeatReport>,
    heat: &HeatReport,
    description: &str,
) -> OrderReport {
    let (cat, th) = (i.cat, i.th);
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
}

/// The report: the verdict and its findings, both orders, the proton transfers that explain
/// them, the room, and the assumptions and cautions.
fn assemble(i: &Inputs, m: &Mixtures, s: Scans, j: Judged) -> CheckReport {
    let (cat, th) = (i.cat, i.th);
    let pairs = pair_table(
        cat,
        &m.container_alone,
        &m.stream_alone,
        s.forward.end.state.temperature_k,
        &th.proton_transfer,
    );
    let mut assumptions = assumptions(cat, i.container, i.stream, i.opts, th);
    assumptions.extend(crate::judge::assess::activity_assumption(
        &j.end.activity,
        "when the pour is complete",
    ));
    CheckReport {
        tool: "offgas",
        version: env!("CARGO_PKG_VERSION"),
        severity: Severity::verdict(&j.findings),
        container: batch_report(cat, i.container, true),
        stream: batch_report(cat, i.stream, false),
        end_state: j.end,
        container_alone: j.container_alone,
        worst_state: WorstStateReport {
            fraction_added: s.forward.worst.fraction_added,
            state: j.worst,
        },
        poured_as_written: order_report(
            i,
            &s.forward,
            &s.worst_heat,
            "the stream poured into the container",
        ),
        poured_other_way: Some(order_report(
            i,
            &s.backward,
            &s.other_heat,
            "the container's contents poured into the stream",
        )),
        pairs,
        stoichiometric_gases: j.released,
        room: j.room,
        findings: j.findings,
        uncomputed_gases: j.uncomputed_gases,
        inert_components: j.inert,
        assumptions,
        cautions: th.cautions.clone(),
    }
}
