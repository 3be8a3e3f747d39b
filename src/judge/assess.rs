//! The one place where a computed state becomes numbers against limits, and findings.

use crate::catalog::{Catalog, FamilyId, GasKind};
use crate::chem::{Closure, Equilibrium};
use crate::judge::thresholds::Thresholds;
use crate::report::{Finding, GasReport, Scope, Severity, StateReport};

/// Gases below this many ppm are left out of reports (they are still in the solve).
pub const REPORT_FLOOR_PPM: f64 = 1e-6;

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
    let worst = eq
        .gases
        .iter()
        .map(|g| gas_ratio(cat, th, &g.gas, ppm(cat, g.partial_pressure_pa)))
        .fold(0.0, f64::max);
    worst.max(overpressure_kpa(eq) / th.sealed_overpressure.review_kpa)
}

/// One gas's headspace level against the level its review starts at (0 for a gas judged
/// only as an asphyxiant: by the pressure it builds and by the room, not by ppm).
pub fn gas_ratio(cat: &Catalog, th: &Thresholds, gas: &str, headspace_ppm: f64) -> f64 {
    if cat.asphyxiant_only(gas) {
        return 0.0;
    }
    match cat.judged_levels(gas) {
        Some(l) => headspace_ppm / (l.review_ppm * th.gas.review_fraction_of_short_term),
        None if th.gas.unknown_level_floor_ppm > 0.0 => {
            headspace_ppm / th.gas.unknown_level_floor_ppm
        }
        None => 0.0,
    }
}

/// A gas's stop level on the scale of `gas_ratio` (where its review level is 1), when the
/// data give it levels.
pub fn stop_ratio(cat: &Catalog, th: &Thresholds, gas: &str) -> Option<f64> {
    if cat.asphyxiant_only(gas) {
        return None;
    }
    cat.judged_levels(gas).map(|l| {
        (l.stop_ppm * th.gas.stop_fraction_of_idlh)
            / (l.review_ppm * th.gas.review_fraction_of_short_term)
    })
}

/// Each gas of a state with its `gas_ratio`.
pub fn gas_ratios(cat: &Catalog, th: &Thresholds, eq: &Equilibrium) -> Vec<(String, f64)> {
    eq.gases
        .iter()
        .map(|g| {
            let r = gas_ratio(cat, th, &g.gas, ppm(cat, g.partial_pressure_pa));
            (g.gas.to_string(), r)
        })
        .collect()
}

/// A gas at its own worst point along a pour, against its levels.
pub fn gas_peak(
    cat: &Catalog,
    th: &Thresholds,
    formula: &str,
    fraction_added: f64,
    partial_pressure_pa: f64,
) -> crate::report::GasPeak {
    let c = ppm(cat, partial_pressure_pa);
    let levels = cat.judged_levels(formula);
    crate::report::GasPeak {
        formula: formula.to_string(),
        fraction_added,
        headspace_ppm: c,
        limit_ratio: levels
            .as_ref()
            .map(|l| c / (l.review_ppm * th.gas.review_fraction_of_short_term)),
        idlh_ratio: levels
            .as_ref()
            .map(|l| c / (l.stop_ppm * th.gas.stop_fraction_of_idlh)),
    }
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
        .filter(|g| cat.gas_kinds(&g.gas).contains(&GasKind::Toxic))
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

/// A solved state as the report gives it: pH, temperature, pressure, activity, the ligands
/// complexes hold, the solids that left the liquid, and the gases against their levels.
pub fn state_report(
    cat: &Catalog,
    th: &Thresholds,
    eq: &Equilibrium,
    heat: &crate::pour::HeatReport,
) -> StateReport {
    let gases = gas_reports(cat, th, eq);
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
        activity: crate::report::ActivityReport {
            model: eq.activity_model,
            ionic_strength_mol_kg: eq.molal_ionic_strength,
            water_activity: eq.water_activity,
            holds_to_mol_kg: eq.activity_range,
            detail: eq.activity_detail.as_deref().cloned(),
        },
        bound_ligands: bound_ligands(cat, eq),
        precipitated: precipitated(cat, eq),
        gases,
    }
}

/// Each gas in the headspace above the reporting floor, with its levels and ratios, the
/// furthest past its review level first.
fn gas_reports(cat: &Catalog, th: &Thresholds, eq: &Equilibrium) -> Vec<GasReport> {
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
                formula: g.gas.to_string(),
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
                kinds: cat.gas_kinds(&g.gas),
                lfl_ppm: cat.lfl_ppm(&g.gas),
                lfl_ratio: cat.lfl_ppm(&g.gas).map(|l| c / l),
            })
        })
        .collect();
    gases.sort_by(|a, b| {
        let ra = a.limit_ratio.unwrap_or(f64::INFINITY);
        let rb = b.limit_ratio.unwrap_or(f64::INFINITY);
        rb.total_cmp(&ra)
            .then(b.headspace_ppm.total_cmp(&a.headspace_ppm))
    });
    gases
}

/// The solids that left the liquid, as the report names them.
fn precipitated(cat: &Catalog, eq: &Equilibrium) -> Vec<crate::report::Precipitated> {
    eq.solids
        .iter()
        .map(|sd| crate::report::Precipitated {
            solid: sd.formula.clone(),
            metal: cat
                .part_formula(cat.solids[sd.catalog_index].metal)
                .to_string(),
            mol_per_l: sd.mol_per_l,
        })
        .collect()
}

/// Least share of a ligand a complex must hold to be named.
const NAMED_SHARE_PERCENT: f64 = 1.0;

/// For each ligand family that complexes hold any of: its total, bound share, free species
/// and the complexes that hold it.
fn bound_ligands(cat: &Catalog, eq: &Equilibrium) -> Vec<crate::report::BoundLigand> {
    use crate::catalog::complexes::Part;
    let mut out: Vec<crate::report::BoundLigand> = Vec::new();
    let mut seen: Vec<FamilyId> = Vec::new();
    for cs in &eq.complexes {
        let Some(Part::Family(fid, species)) = cat.complexes[cs.catalog_index].ligand else {
            continue;
        };
        if seen.contains(&fid) {
            continue;
        }
        seen.push(fid);
        let Some(fs) = eq.family(fid) else { continue };
        let total = fs.total_mol / eq.liquid_l;
        if total.is_nan() || total <= 0.0 {
            continue;
        }
        let share = |n: f64, c: f64| 100.0 * n * c / total;
        let mut held_by: Vec<crate::report::HeldBy> = eq
            .complexes
            .iter()
            .filter_map(|c| {
                let data = &cat.complexes[c.catalog_index];
                match data.ligand {
                    Some(Part::Family(f, _)) if f == fid => Some(crate::report::HeldBy {
                        complex: data.formula.clone(),
                        metal: cat.part_formula(data.metal).to_string(),
                        percent: share(f64::from(data.n), c.concentration),
                    }),
                    _ => None,
                }
            })
            .collect();
        held_by.sort_by(|a, b| b.percent.total_cmp(&a.percent));
        let bound_percent = held_by.iter().map(|h| h.percent).sum::<f64>();
        held_by.retain(|h| h.percent >= NAMED_SHARE_PERCENT);
        out.push(crate::report::BoundLigand {
            family: cat.family(fid).id.clone(),
            species: cat.family(fid).species[species].formula.clone(),
            total_mol_per_l: total,
            bound_percent,
            free_mol_per_l: fs.concentrations[species],
            held_by,
        });
    }
    out
}

/// Severity of a toxic gas at its headspace level (asphyxiants are judged elsewhere).
fn gas_severity(th: &Thresholds, g: &GasReport) -> Severity {
    if !g.kinds.contains(&GasKind::Toxic) {
        return Severity::Clear;
    }
    match (g.idlh_ratio, g.limit_ratio) {
        (Some(s), _) if s >= 1.0 => Severity::Stop,
        (_, Some(r)) if r >= 1.0 => Severity::Review,
        (None, None) if g.headspace_ppm >= th.gas.unknown_level_floor_ppm => Severity::Review,
        _ => Severity::Clear,
    }
}

/// Severity of a flammable gas against its lower flammable limit.
fn flammable_severity(th: &Thresholds, g: &GasReport) -> Severity {
    let f = &th.flammable_gas;
    match g.lfl_ratio {
        Some(r) if r >= f.stop_fraction_of_lfl => Severity::Stop,
        Some(r) if r >= f.review_fraction_of_lfl => Severity::Review,
        _ => Severity::Clear,
    }
}

/// Atmospheric pressure, kPa: what stands over an open or vented liquid.
const ATMOSPHERE_KPA: f64 = 101.325;

pub fn fmt_ppm(v: f64) -> String {
    if v >= 100.0 {
        format!("{v:.0} ppm")
    } else if v >= 1.0 {
        format!("{v:.1} ppm")
    } else {
        format!("{v:.2} ppm")
    }
}

/// "HCN reaches 227 ppm in the headspace {place}", or, where its partial pressure passes
/// the pressure over the liquid, what that means: the headspace would be the gas itself.
/// How far past the atmosphere's pressure an open liquid's gas is said in words only.
const FAR_PAST_ATMOSPHERE: f64 = 10.0;

pub fn gas_reaches(g: &GasReport, sealed: bool, place: &str) -> String {
    let place = if place.is_empty() {
        String::new()
    } else {
        format!(" {place}")
    };
    if g.partial_pressure_kpa < ATMOSPHERE_KPA {
        return format!(
            "{} reaches {} in the headspace{place}",
            g.formula,
            fmt_ppm(g.headspace_ppm)
        );
    }
    let kpa = crate::basics::text::fixed(g.partial_pressure_kpa, 0);
    if !sealed && g.partial_pressure_kpa >= FAR_PAST_ATMOSPHERE * ATMOSPHERE_KPA {
        // An equilibrium figure this far past the atmosphere's pressure cannot build up over
        // a liquid open to the air; printed, it reads as nonsense.
        return format!(
            "{}'s partial pressure would be more than {FAR_PAST_ATMOSPHERE} times the pressure over the liquid{place}: the headspace would be essentially pure {}, which boils off",
            g.formula, g.formula
        );
    }
    if sealed {
        format!(
            "{} reaches {kpa} kPa in the sealed headspace{place}, more than atmospheric pressure: the headspace would be essentially pure {} under pressure",
            g.formula, g.formula
        )
    } else {
        format!(
            "{}'s partial pressure reaches {kpa} kPa{place}, more than the pressure over the liquid: the headspace would be essentially pure {}, which boils off",
            g.formula, g.formula
        )
    }
}

/// A gas's level in words, for a short mention ("12 ppm", "139 kPa, above 1 atm").
pub fn gas_level(g: &GasReport) -> String {
    if g.partial_pressure_kpa >= ATMOSPHERE_KPA {
        format!(
            "{} kPa, above atmospheric pressure",
            crate::basics::text::fixed(g.partial_pressure_kpa, 0)
        )
    } else {
        fmt_ppm(g.headspace_ppm)
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

/// What brings the two liquids together, so that findings say where in it a state lies.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Action {
    /// A stream poured into a container.
    #[default]
    Pour,
    /// Rinse water run into a vessel (a procedure's rinse).
    Rinse,
    /// A vessel held as it is, perhaps warmed (a procedure's hold).
    Hold,
    /// Two stored containers leaking into one spill (the storeroom audit).
    Leak,
}

impl Action {
    /// How a finding about the first liquid on its own opens.
    pub fn before(self) -> &'static str {
        match self {
            Action::Pour => "Before anything is added",
            Action::Rinse => "Before the rinse water goes in",
            Action::Hold => "Before the hold",
            Action::Leak => "On its own",
        }
    }

    /// Where in the action a state at `fraction` of the second liquid lies, in words.
    pub fn place(self, fraction: f64) -> String {
        let pct = fraction * 100.0;
        match self {
            Action::Pour if fraction >= 1.0 => "when the pour is complete".into(),
            Action::Pour if fraction <= 0.0 => "before anything is added".into(),
            Action::Pour => format!("while pouring, at {pct:.1} % of the stream added"),
            Action::Rinse if fraction >= 1.0 => "once the rinse water is in".into(),
            Action::Rinse if fraction <= 0.0 => "before the rinse water goes in".into(),
            Action::Rinse => format!("as the rinse water goes in, at {pct:.1} % of it"),
            Action::Hold => "during the hold".into(),
            Action::Leak if fraction >= 1.0 => "when both have leaked into the spill".into(),
            Action::Leak if fraction <= 0.0 => "in the first container's own spill".into(),
            Action::Leak => format!(
                "where the two leaks meet, with {pct:.1} % of the second container's contents in the spill"
            ),
        }
    }
}

/// Where along a pour a state lies, in words.
pub fn where_in_pour(fraction: f64) -> String {
    Action::Pour.place(fraction)
}

/// The states of one pour that findings are judged on.
pub struct PourStates<'a> {
    pub end: &'a StateReport,
    pub worst: &'a StateReport,
    pub worst_fraction: f64,
    /// The container before anything is added; the pour is judged by what it changes.
    /// None judges the states as they stand (a procedure's hold step).
    pub alone: Option<&'a StateReport>,
    pub sealed: bool,
    pub rated_pressure_kpa: Option<f64>,
    /// What brings the liquids together, for the words of each finding.
    pub action: Action,
}

impl PourStates<'_> {
    fn gas_in<'s>(s: &'s StateReport, formula: &str) -> Option<&'s GasReport> {
        s.gases.iter().find(|g| g.formula == formula)
    }

    /// The gases named in the end or the worst state.
    fn gas_names(&self) -> Vec<&str> {
        let mut names: Vec<&str> = self.end.gases.iter().map(|g| g.formula.as_str()).collect();
        for g in &self.worst.gases {
            if !names.contains(&g.formula.as_str()) {
                names.push(&g.formula);
            }
        }
        names
    }

    /// The state a gas is judged in (the worst of the pour unless the end is as bad), with
    /// where it lies.
    fn judged_state(
        &self,
        name: &str,
        severity: impl Fn(&GasReport) -> Severity,
    ) -> Option<(Severity, &GasReport, String)> {
        let at_end = Self::gas_in(self.end, name);
        let at_worst = Self::gas_in(self.worst, name);
        let sev_end = at_end.map(&severity).unwrap_or(Severity::Clear);
        let sev_worst = at_worst.map(&severity).unwrap_or(Severity::Clear);
        let worst_is_higher = match (at_worst, at_end) {
            (Some(w), Some(e)) => w.headspace_ppm > e.headspace_ppm,
            (Some(_), None) => true,
            _ => false,
        };
        if sev_worst > sev_end
            || (sev_worst == sev_end && worst_is_higher && self.worst_fraction < 1.0)
        {
            Some((sev_worst, at_worst?, self.action.place(self.worst_fraction)))
        } else {
            Some((sev_end, at_end?, self.action.place(1.0)))
        }
    }

    /// True when the container alone already shows this gas at `sev` or worse, and the
    /// pour does not make it clearly worse.
    fn container_explains(
        &self,
        th: &Thresholds,
        name: &str,
        sev: Severity,
        ratio: impl Fn(&GasReport) -> f64,
        severity: impl Fn(&GasReport) -> Severity,
        pour_ratio: f64,
    ) -> bool {
        let Some(alone) = self.alone.and_then(|a| Self::gas_in(a, name)) else {
            return false;
        };
        let sev_alone = severity(alone);
        sev_alone > sev
            || (sev_alone == sev
                && pour_ratio <= th.pour_change.clearly_worse_factor * ratio(alone))
    }
}

/// The larger of a gas's ratios to its review and stop levels, scaled so that 1 is the
/// level its severity was judged at.
fn toxic_ratio(g: &GasReport) -> f64 {
    g.limit_ratio
        .unwrap_or(0.0)
        .max(g.idlh_ratio.unwrap_or(0.0))
}

/// Findings on gas and pressure from the end state and the worst state along the pour,
/// judged by what the pour changes in the container.
pub fn state_findings(th: &Thresholds, p: &PourStates) -> Vec<Finding> {
    let mut out = Vec::new();
    for name in p.gas_names() {
        let toxic = p.judged_state(name, |g| gas_severity(th, g));
        let mut toxic_sev = Severity::Clear;
        if let Some((sev, g, place)) = toxic {
            if sev > Severity::Clear
                && !p.container_explains(
                    th,
                    name,
                    sev,
                    toxic_ratio,
                    |g| gas_severity(th, g),
                    toxic_ratio(g),
                )
            {
                toxic_sev = sev;
                out.push(toxic_finding(p, sev, g, &place));
            }
        }
        if let Some((sev, g, place)) = p.judged_state(name, |g| flammable_severity(th, g)) {
            let ratio = |g: &GasReport| g.lfl_ratio.unwrap_or(0.0);
            if sev > toxic_sev
                && !p.container_explains(
                    th,
                    name,
                    sev,
                    ratio,
                    |g| flammable_severity(th, g),
                    ratio(g),
                )
            {
                out.push(Finding::chemistry(
                    sev,
                    "flammable-headspace",
                    format!(
                        "{}, {} of its lower flammable limit of {} % (review at {} and stop at {} of the limit; {}).",
                        gas_reaches(g, p.sealed, &place),
                        crate::basics::text::fixed(ratio(g) * 100.0, 0) + " %",
                        crate::basics::text::fixed(g.lfl_ppm.unwrap_or(0.0) / 1e4, 1),
                        th.flammable_gas.review_fraction_of_lfl,
                        th.flammable_gas.stop_fraction_of_lfl,
                        th.flammable_gas.basis
                    ),
                    "Keep ignition sources away, do not cap the container, and ventilate.",
                ));
            }
        }
    }
    if p.sealed {
        out.extend(overpressure_finding(th, p));
    }
    out.extend(activity_model_note(th, p));
    out
}

fn toxic_finding(p: &PourStates, sev: Severity, g: &GasReport, place: &str) -> Finding {
    let end_note = match (
        PourStates::gas_in(p.end, &g.formula),
        place.starts_with("while"),
    ) {
        (Some(e), true) => format!("; {} at the end", gas_level(e)),
        _ => String::new(),
    };
    let reaches = gas_reaches(g, p.sealed, place);
    // Over an open liquid nothing passes the pure gas: past the atmosphere's pressure the
    // multiple is the pure gas's.
    let pure = !p.sealed && g.partial_pressure_kpa >= ATMOSPHERE_KPA && g.headspace_ppm > 0.0;
    let times = |ratio: Option<f64>| {
        let r = ratio.unwrap_or(0.0);
        if pure {
            fmt_times(r * 1e6 / g.headspace_ppm)
        } else {
            fmt_times(r)
        }
    };
    let (code, message, caution) = match (sev, &g.idlh_ppm, &g.limit_ppm) {
        (Severity::Stop, Some(idlh), _) => (
            "gas-at-danger-level",
            format!(
                "{reaches}, {} its stop level of {} ({}){end_note}.",
                times(g.idlh_ratio),
                fmt_ppm(*idlh),
                g.idlh_basis.clone().unwrap_or_default()
            ),
            format!("Do not make this mixture. Opening the vessel could expose someone to {} at a level immediately dangerous to life or health.", g.formula),
        ),
        (_, _, Some(limit)) => (
            "gas-over-short-term-level",
            format!(
                "{reaches}, {} its short-term level of {} ({}){end_note}.",
                times(g.limit_ratio),
                fmt_ppm(*limit),
                g.limit_basis.clone().unwrap_or_default()
            ),
            "A competent person should review this before it is done: work in a fume hood, and keep the vessel closed except when adding.".to_string(),
        ),
        _ => (
            "gas-without-exposure-level",
            format!(
                "{reaches}, and offgas has no exposure level for it.",
            ),
            "Without a level the gas cannot be judged safe; check its safety data sheet.".into(),
        ),
    };
    Finding::chemistry(sev, code, message, &caution)
}

fn overpressure_finding(th: &Thresholds, p: &PourStates) -> Option<Finding> {
    let op = &th.sealed_overpressure;
    let (pressure, place) = if p.worst.overpressure_kpa > p.end.overpressure_kpa {
        (p.worst.overpressure_kpa, p.action.place(p.worst_fraction))
    } else {
        (p.end.overpressure_kpa, p.action.place(1.0))
    };
    let (stop, rating) = match p.rated_pressure_kpa {
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
    let level = |v: f64| {
        if v >= stop {
            Severity::Stop
        } else if v >= review {
            Severity::Review
        } else {
            Severity::Clear
        }
    };
    let sev = level(pressure);
    if sev <= Severity::Clear {
        return None;
    }
    if let Some(a) = p.alone {
        let sev_alone = level(a.overpressure_kpa);
        if sev_alone > sev
            || (sev_alone == sev
                && pressure <= th.pour_change.clearly_worse_factor * a.overpressure_kpa)
        {
            return None;
        }
    }
    Some(Finding::chemistry(
        sev,
        "sealed-overpressure",
        format!(
            "The sealed vessel reaches {} kPa above atmospheric {place}, from the gases the liquid gives off, the warming of the air and water vapour (review at {review} kPa; stop at {rating}).",
            crate::basics::text::fixed(pressure, 1)
        ),
        "Do not cap a vessel that makes gas; use a vented cap or leave the mixture in a fume hood until it stops.",
    ))
}

/// What the activity model did for one state, in words, where it went past Davies.
pub fn activity_assumption(a: &crate::report::ActivityReport, when: &str) -> Option<String> {
    let d = a.detail.as_ref()?;
    let parts: Vec<String> = [
        ("ion-interaction equations for ", &d.ion_interaction, ""),
        (
            "the extended Debye–Hückel form for ",
            &d.extended_debye_huckel,
            " (no ion-interaction parameters)",
        ),
        (
            "salting-out by their own parameters for ",
            &d.salting_own,
            "",
        ),
        (
            "salting-out by the upper estimate for ",
            &d.salting_estimated,
            " (no published parameters)",
        ),
    ]
    .into_iter()
    .filter(|(_, list, _)| !list.is_empty())
    .map(|(what, list, why)| format!("{what}{}{why}", list.join(", ")))
    .collect();
    Some(format!(
        "Activity {when} ({} mol/kg, water activity {}): {}; the model holds here to {} mol/kg.",
        crate::basics::text::fixed(a.ionic_strength_mol_kg, 2),
        crate::basics::text::fixed(a.water_activity, 3),
        parts.join("; "),
        crate::basics::text::fixed(a.holds_to_mol_kg, 1)
    ))
}

/// Why the activity model's range ends where it does for a state, in words.
fn range_reason(s: &StateReport) -> String {
    use crate::chem::{ActivityModelUsed, RangeSetBy};
    let d = s.activity.detail.as_ref();
    match (s.activity.model, d.map(|d| &d.range_set_by)) {
        (ActivityModelUsed::Davies, _) | (_, None) => {
            "the Davies equation's usual limit".to_string()
        }
        (_, Some(RangeSetBy::Pair(c, a))) => format!(
            "the highest concentration the ion-interaction parameters of {} with {} were fitted to",
            c,
            a
        ),
        (_, Some(RangeSetBy::Unpaired(c, a))) => format!(
            "{} with {} has no ion-interaction parameters and rests on the extended Debye–Hückel form, which holds to about this",
            c,
            a
        ),
        (_, Some(RangeSetBy::Extended(_))) => {
            "its ions rest on the extended Debye–Hückel form, which holds to about this".to_string()
        }
    }
}

/// Past the activity model's range the figures are rough. That decides something only
/// where a figure off by the model's uncertainty factor would cross a level; otherwise it
/// is a note.
fn activity_model_note(th: &Thresholds, p: &PourStates) -> Option<Finding> {
    let am = &th.activity_model;
    let states: Vec<&StateReport> = [p.end, p.worst]
        .into_iter()
        .filter(|s| s.activity_model_exceeded)
        .collect();
    // The state furthest past its range speaks for the note.
    let beyond = |s: &StateReport| s.activity.ionic_strength_mol_kg - s.activity.holds_to_mol_kg;
    let worst = *states
        .iter()
        .max_by(|a, b| beyond(a).total_cmp(&beyond(b)))?;
    let (i, limit) = (
        worst.activity.ionic_strength_mol_kg,
        worst.activity.holds_to_mol_kg,
    );
    let factor = am.uncertainty_factor(i, limit);
    // A level within reach: below it as computed, at or above it with the factor.
    let within_reach = |r: Option<f64>| r.is_some_and(|r| r < 1.0 && r * factor >= 1.0);
    let mut could_cross: Vec<String> = Vec::new();
    for s in &states {
        for g in s.gases.iter().filter(|g| g.kinds.contains(&GasKind::Toxic)) {
            // What the container already gives off is not the pour's to answer for.
            let alone_ratio = p
                .alone
                .and_then(|a| PourStates::gas_in(a, &g.formula))
                .map(toxic_ratio)
                .unwrap_or(0.0);
            if alone_ratio > 0.0
                && toxic_ratio(g) <= th.pour_change.clearly_worse_factor * alone_ratio
            {
                continue;
            }
            let crosses = within_reach(g.limit_ratio) || within_reach(g.idlh_ratio);
            if crosses && !could_cross.contains(&g.formula) {
                could_cross.push(g.formula.clone());
            }
        }
        if p.sealed && within_reach(Some(s.gas_pressure_kpa / th.sealed_overpressure.review_kpa)) {
            let what = "the sealed vessel's pressure".to_string();
            if !could_cross.contains(&what) {
                could_cross.push(what);
            }
        }
    }
    // Past a hundredfold the estimate says only that the figures cannot be relied on.
    let off_by = if factor > 100.0 {
        "more than 100 ×".to_string()
    } else {
        format!("up to about {}", fmt_times(factor))
    };
    let range = format!(
        "The ionic strength reaches {} mol/kg, past the {} mol/kg up to which the activity model holds for this mixture ({}); computed partial pressures may be off by {off_by} there ({}).",
        crate::basics::text::fixed(i, 2),
        crate::basics::text::fixed(limit, 1),
        range_reason(worst),
        am.uncertainty_basis
    );
    Some(if could_cross.is_empty() {
        Finding::chemistry(
            Severity::Info,
            "outside-activity-model",
            format!("{range} No level is within that factor, so the verdict stands."),
            "Treat the figures for this concentrated mixture as indicative.",
        )
    } else {
        Finding::chemistry(
            Severity::Review,
            "outside-activity-model",
            format!(
                "{range} Within that factor, {} could reach a level of concern.",
                could_cross.join(" and ")
            ),
            "Concentrated mixtures can release more gas than this estimate: have a competent person review it, and treat the figures as indicative only.",
        )
    })
}

/// What the container is like before anything is added: a gas it already gives off, or a
/// pressure it already holds, at a level of concern. It needs care whatever is poured.
pub fn container_findings(
    th: &Thresholds,
    alone: &StateReport,
    sealed: bool,
    action: Action,
) -> Vec<Finding> {
    let mut out = Vec::new();
    for g in &alone.gases {
        let sev = gas_severity(th, g);
        if sev < Severity::Review {
            continue;
        }
        let against = match (sev, g.idlh_ppm, g.limit_ppm) {
            (Severity::Stop, Some(l), _) => format!(
                "{} its stop level of {}",
                fmt_times(g.idlh_ratio.unwrap_or(0.0)),
                fmt_ppm(l)
            ),
            (_, _, Some(l)) => format!(
                "{} its short-term level of {}",
                fmt_times(g.limit_ratio.unwrap_or(0.0)),
                fmt_ppm(l)
            ),
            _ => "and offgas has no exposure level for it".into(),
        };
        out.push(Finding {
            scope: Scope::Container,
            ..Finding::chemistry(
                Severity::Review,
                "container-already-gives-off",
                format!(
                    "{}, the container already gives off gas: {}, {against}.",
                    action.before(),
                    gas_reaches(g, sealed, "")
                ),
                "Open it only in a working fume hood, whatever is poured in, and label it for the gas it gives off.",
            )
        });
    }
    if sealed && alone.overpressure_kpa >= th.sealed_overpressure.review_kpa {
        out.push(Finding {
            scope: Scope::Container,
            ..Finding::chemistry(
                Severity::Review,
                "container-already-under-pressure",
                format!(
                    "{}, the sealed container already holds {} kPa above atmospheric.",
                    action.before(),
                    crate::basics::text::fixed(alone.overpressure_kpa, 1)
                ),
                "Vent it slowly in a fume hood, pointing the cap away, before anything else is done.",
            )
        });
    }
    out
}
