//! The pair audit: which containers can meet, screened cheaply, checked in full where it
//! could matter, ranked.

use super::report::{
    AuditCounts, AuditFinding, AuditReport, CabinetMatrix, ContainerRef, Level, MatrixCell,
};
use super::{Contents, Inventory, StoredContainer};
use crate::basics::quantity::Amount;
use crate::catalog::{Catalog, SubstanceId};
use crate::check::{check, CheckOptions};
use crate::chem::{solve, Closure, Mixture, SolverSettings};
use crate::judge::rules::evaluate::{Present, RuleContext};
use crate::judge::rules::RuleSet;
use crate::judge::thresholds::Thresholds;
use crate::pour::batch::{Batch, Component};
use crate::pour::pairs::Side;
use crate::report::{CheckReport, Severity};
use rayon::prelude::*;
use serde::Serialize;
use std::collections::HashMap;
use std::sync::Arc;

#[derive(Debug, Clone)]
pub struct AuditSettings {
    /// Area a leak spreads over on a tray, m2.
    pub spill_area_m2: f64,
    /// Whether containers in the same cabinet but different spill zones are paired too.
    pub cabinet_level: bool,
}

/// What happens when two kinds of contents leak together.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PairOutcome {
    pub severity: Severity,
    /// Highest ratio of a gas to its review level along either order of mixing.
    pub worst_ratio: f64,
    pub gas: Option<String>,
    pub headline: String,
    pub codes: Vec<String>,
    /// False when only the rules could judge it (two dry containers).
    pub computed: bool,
}

/// What the screening knows of one kind of contents without pairing it.
#[derive(Debug, Clone)]
struct Profile {
    ph: Option<f64>,
    /// Holds a family whose volatile form appears as the pH falls (HCN, H2S, CO2 ...).
    acid_volatile: bool,
    /// Holds a family whose volatile form appears as the pH rises (NH3, amines).
    base_volatile: bool,
    /// Concentrated enough for heat of neutralization or dilution to matter.
    strong: bool,
    present: Vec<(SubstanceId, f64)>,
    /// Litres the contents fill (a dry solid: the litre it is taken to dissolve in).
    volume_l: f64,
    dry: bool,
    /// How bad each gas the contents give off on their own is, as an open puddle (ratio to
    /// its review level).
    alone_gases: Vec<(String, f64)>,
}

/// Amounts that differ by less than this factor share a result (the larger one is used).
const KIND_STEPS_PER_DECADE: f64 = 3.0;

fn bin(x: f64) -> i64 {
    if x > 0.0 {
        (x.log10() * KIND_STEPS_PER_DECADE).ceil() as i64
    } else {
        i64::MIN
    }
}

/// A kind of contents: the same substances in amounts within a bin. Containers of one kind
/// share every result, computed for the fullest of them (the conservative choice).
fn kind_key(c: &StoredContainer) -> String {
    match &c.contents {
        Contents::Dry { substance, moles } => format!("dry:{}:{}", substance.0, bin(*moles)),
        Contents::Liquid(b) => {
            let mut parts: Vec<String> = b
                .components
                .iter()
                .map(|x| format!("{}:{}", x.substance.0, bin(x.moles / b.volume_l)))
                .collect();
            parts.sort();
            format!("liq:{}:{}", bin(b.volume_l), parts.join(","))
        }
    }
}

/// How much a container holds, to pick the fullest of a kind.
fn fullness(c: &StoredContainer) -> f64 {
    match &c.contents {
        Contents::Dry { moles, .. } => *moles,
        Contents::Liquid(b) => {
            b.volume_l * (1.0 + b.components.iter().map(|x| x.moles).sum::<f64>())
        }
    }
}

fn describe(cat: &Catalog, c: &StoredContainer) -> String {
    match &c.contents {
        Contents::Dry { substance, moles } => {
            let s = cat.substance(*substance);
            format!("{:.0} g {}", moles * s.molar_mass.unwrap_or(0.0), s.name)
        }
        Contents::Liquid(b) => crate::procedure::run::describe_batch(cat, b),
    }
}

fn settings(th: &Thresholds) -> SolverSettings {
    SolverSettings {
        activity_limit: th.activity_model.max_ionic_strength,
        ..Default::default()
    }
}

fn profile(cat: &Catalog, th: &Thresholds, c: &StoredContainer) -> Profile {
    let (mixture, present, dry) = match &c.contents {
        Contents::Liquid(b) => (
            b.to_mixture(cat, b.volume_l),
            b.components
                .iter()
                .map(|x| (x.substance, x.moles))
                .collect::<Vec<_>>(),
            false,
        ),
        Contents::Dry { substance, moles } => {
            // As if it dissolved in a litre of water.
            let mut m = Mixture::empty(298.15, Closure::Open);
            let s = cat.substance(*substance);
            for &(f, n) in &s.families {
                m.add_family(f, n * moles);
            }
            for &(i, n) in &s.ions {
                m.add_ion(i, n * moles);
            }
            m.liquid_l = 1.0;
            m.water_kg = Some(
                crate::pour::composition::composition(cat, &[(*substance, *moles)], 1.0, None)
                    .water_g
                    / 1e3,
            );
            (m, vec![(*substance, *moles)], true)
        }
    };
    let mut m = mixture;
    m.closure = Closure::Open;
    m.headspace_l = 0.0;
    let eq = solve(cat, &m, &settings(th)).ok();
    let alone_gases = eq
        .as_ref()
        .map(|e| crate::judge::assess::gas_ratios(cat, th, e))
        .unwrap_or_default();
    let mut acid_volatile = false;
    let mut base_volatile = false;
    for &(f, _) in &m.families {
        let fam = cat.family(f);
        if let Some(v) = fam.volatile_index() {
            if v == fam.species.len() - 1 {
                base_volatile = true;
            } else {
                acid_volatile = true;
            }
        }
    }
    // Hypochlorite with chloride gives chlorine as the pH falls.
    for c in &cat.combined {
        if m.families
            .iter()
            .any(|(f, _)| *f == c.first.0 || *f == c.second.0)
        {
            acid_volatile = true;
        }
    }
    let strong = eq.as_ref().is_none_or(|e| e.ionic_strength > 0.5)
        || present
            .iter()
            .any(|(s, _)| cat.dilution_curve(*s).is_some());
    Profile {
        volume_l: m.liquid_l,
        ph: eq.map(|e| e.ph),
        acid_volatile,
        base_volatile,
        strong,
        present,
        dry,
        alone_gases,
    }
}

/// True when a pair could form gas, heat, or meet a rule: it needs the full check.
fn needs_check(cat: &Catalog, rules: &RuleSet, a: &Profile, b: &Profile) -> bool {
    let (Some(pa), Some(pb)) = (a.ph, b.ph) else {
        return true; // could not be screened: check it
    };
    if (a.acid_volatile && pb < pa - 0.5)
        || (b.acid_volatile && pa < pb - 0.5)
        || (a.base_volatile && pb > pa + 0.5)
        || (b.base_volatile && pa > pb + 0.5)
    {
        return true;
    }
    if (pa - pb).abs() > 4.0 && (a.strong || b.strong) {
        return true;
    }
    let ctx = rule_context(a, b, pa.min(pb), pa.max(pb));
    // A component's own hazard is the container's, not the pair's.
    rules
        .evaluate(cat, &ctx)
        .iter()
        .any(|h| !h.rule.rule.presence)
}

fn rule_context(a: &Profile, b: &Profile, ph_min: f64, ph_max: f64) -> RuleContext {
    let present = a
        .present
        .iter()
        .map(|&(s, m)| Present {
            side: Side::Container,
            substance: s,
            moles: m,
        })
        .chain(b.present.iter().map(|&(s, m)| Present {
            side: Side::Stream,
            substance: s,
            moles: m,
        }))
        .collect();
    RuleContext {
        present,
        container_l: a.volume_l,
        stream_l: b.volume_l,
        ph_min,
        ph_max,
        temperature_max_c: 25.0,
    }
}

/// A dry container poured into a liquid partner: a small stream that dissolves whole.
/// Classes of a salt that does nothing in a spill but dissolve (sodium chloride, potassium
/// chloride, sodium sulfate): only such a salt is held to its solubility below.
const INERT_SALT_CLASSES: [&str; 2] = ["neutral_salt", "inert"];

/// Moles of a dry solid that dissolve in a liquid partner. An inert salt dissolves up to its
/// solubility in the water the partner and its own crystal water bring (as `check` refuses a
/// batch past it), so that a salt beside glacial acetic acid or a solvent is not counted as a
/// brine no water could hold, past every activity model. Every other solid is counted whole:
/// an oxidiser meets a solvent whether it dissolves or not, a base heats whatever it meets,
/// and acid takes up a cyanide or a sulfide whatever water there is; so is an inert salt
/// whose gas the partner frees (a chloride on neat sulfuric acid gives hydrogen chloride).
fn dissolves(
    cat: &Catalog,
    substance: SubstanceId,
    moles: f64,
    partner: &Batch,
    partner_ph: Option<f64>,
) -> f64 {
    let s = cat.substance(substance);
    let inert = !s.classes.is_empty()
        && s.classes
            .iter()
            .all(|c| INERT_SALT_CLASSES.contains(&c.as_str()));
    let (Some(solubility), Some(molar_mass), true) = (s.solubility_g_per_l, s.molar_mass, inert)
    else {
        return moles;
    };
    if partner_ph.is_none_or(|ph| frees_a_gas(cat, s, ph)) {
        return moles;
    }
    let partner_water_kg = partner
        .to_mixture(cat, partner.volume_l)
        .water_kg
        .unwrap_or(partner.volume_l * cat.water_density);
    let crystal_water_kg = s
        .formula
        .as_deref()
        .map_or(0.0, crate::catalog::density::crystal_water)
        * moles
        * crate::catalog::WATER_MOLAR_MASS
        / 1e3;
    // Solubility is per litre of solution; per litre of water is near enough for a cap.
    let limit = solubility * (partner_water_kg + crystal_water_kg) / cat.water_density / molar_mass;
    moles.min(limit.max(0.0))
}

/// True when a liquid at `ph` holds a real share of one of the substance's families in its
/// volatile form: within two pH units of the step that makes it, on its side; or, for a
/// strong acid's anion, when the liquid is itself a strong acid (neat and concentrated acids
/// drive hydrogen chloride out of a chloride, which no aqueous pH describes).
fn frees_a_gas(cat: &Catalog, s: &crate::catalog::Substance, ph: f64) -> bool {
    const WITHIN: f64 = 2.0;
    const STRONG_ACID_PH: f64 = 1.0;
    s.families.iter().any(|&(f, _)| {
        let fam = cat.family(f);
        let Some(v) = fam.volatile_index() else {
            return false;
        };
        let acid_side = fam
            .steps
            .get(v)
            .is_some_and(|st| ph < (st.pka + WITHIN).max(STRONG_ACID_PH));
        let base_side = v > 0 && fam.steps.get(v - 1).is_some_and(|st| ph > st.pka - WITHIN);
        acid_side || base_side
    })
}

fn dry_as_stream(
    cat: &Catalog,
    id: &str,
    substance: SubstanceId,
    moles: f64,
    liquid_l: f64,
) -> Batch {
    Batch {
        file: id.to_string(),
        name: id.to_string(),
        capacity_l: None,
        volume_l: (liquid_l * 0.01).max(1e-3),
        temperature_k: 298.15,
        temperature_given: false,
        closure: Closure::Open,
        density_g_per_ml: 1.0,
        density_given: false,
        rated_pressure_kpa: None,
        surface_area_m2: None,
        components: vec![Component {
            written: cat.substance(substance).name.clone(),
            substance,
            amount: Amount::Moles(moles),
            moles,
            line: None,
        }],
    }
}

/// True when `message` names one of the gases as a word of its own.
fn names_any(message: &str, gases: &[(String, f64)]) -> bool {
    message
        .split(|c: char| !c.is_ascii_alphanumeric())
        .any(|word| gases.iter().any(|(g, r)| *r >= 1.0 && word == g))
}

fn is_boiling_finding(code: &str) -> bool {
    code == "mixture-boils" || code == "mixture-near-boiling"
}

/// Findings about the gas over the puddle or in the room.
fn is_gas_finding(code: &str) -> bool {
    code.starts_with("gas-") || code.starts_with("room-") || code == "flammable-headspace"
}

/// A mixture's gas counts against the pair only when it is clearly worse than what either
/// container gives off of that same gas on its own (a fuming acid fumes whatever it meets;
/// the HCN it frees from a cyanide is the pair's, however much HCl it gives off alone).
const PAIR_ADDS_FACTOR: f64 = 2.0;

/// Where a liquid on its own already gives off a gas past its stop level, it is a danger
/// when spilt whatever stands beside it; a neighbour counts against the pair only where it
/// raises that gas tenfold. Salts and bases beside strong ammonia, or a salt beside glacial
/// acetic acid, move it by a few-fold, which is within the model's reach in such
/// concentrated mixtures and changes nothing a technician would do; an acid on a cyanide
/// salt moves it a thousandfold. A dry solid's own figure is for it dissolved in a litre of
/// water, not as it stands on the shelf, so it keeps the ordinary factor (metabisulfite
/// dissolved gives off SO2, but the acid that meets it is what makes the cloud).
const PAIR_ADDS_FACTOR_PAST_STOP: f64 = 10.0;

/// The ratio (on the scale of `gas_ratio`) above which a gas counts against a pair, for
/// one container that gives off `alone` of it on its own.
fn pair_adds_above(cat: &Catalog, th: &Thresholds, gas: &str, alone: f64, dry: bool) -> f64 {
    let factor = match crate::judge::assess::stop_ratio(cat, th, gas) {
        Some(stop) if alone >= stop && !dry => PAIR_ADDS_FACTOR_PAST_STOP,
        _ => PAIR_ADDS_FACTOR,
    };
    factor * alone.max(0.0)
}

/// The gases of a pair's check, each at its worst over the orders scanned, as (gas, ratio
/// to its review level), with the ratio it must pass to count against the pair (`above`,
/// from what the two containers give off of it on their own).
fn pair_gases(
    cat: &Catalog,
    th: &Thresholds,
    r: &CheckReport,
    both_orders: bool,
    above: &[(String, f64)],
) -> Vec<(String, f64, f64)> {
    let mut peaks: Vec<&crate::report::GasPeak> = r.poured_as_written.gas_peaks.iter().collect();
    if both_orders {
        if let Some(o) = &r.poured_other_way {
            peaks.extend(o.gas_peaks.iter());
        }
    }
    let mut out: Vec<(String, f64, f64)> = Vec::new();
    for p in peaks {
        let ratio = crate::judge::assess::gas_ratio(cat, th, &p.formula, p.headspace_ppm);
        let bar = above
            .iter()
            .filter(|(g, _)| *g == p.formula)
            .map(|(_, a)| *a)
            .fold(0.0, f64::max);
        match out.iter_mut().find(|(g, _, _)| *g == p.formula) {
            Some(e) => e.1 = e.1.max(ratio),
            None => out.push((p.formula.clone(), ratio, bar)),
        }
    }
    out
}

/// `above` holds, per gas, the ratio it must pass to count against the pair
/// (`pair_adds_above`). `both_orders` is false when one partner is a dry solid: it dissolves
/// into the liquid, and pouring the liquid onto it first is not a state the model can
/// describe.
fn outcome_of(
    cat: &Catalog,
    th: &Thresholds,
    r: &CheckReport,
    above: &[(String, f64)],
    both_orders: bool,
) -> PairOutcome {
    let other = if both_orders {
        r.poured_other_way
            .as_ref()
            .map(|o| o.worst_limit_ratio)
            .unwrap_or(0.0)
    } else {
        0.0
    };
    let worst_ratio = other.max(r.poured_as_written.worst_limit_ratio);
    let gas = r
        .worst_state
        .state
        .gases
        .first()
        .filter(|g| g.limit_ratio.unwrap_or(1.0) >= 1.0)
        .map(|g| g.formula.clone());
    // The gases the meeting makes clearly worse than either container does on its own.
    let added: Vec<(String, f64)> = pair_gases(cat, th, r, both_orders, above)
        .into_iter()
        .filter(|(_, ratio, bar)| *ratio > *bar)
        .map(|(g, ratio, _)| (g, ratio))
        .collect();
    let added_ratio = added.iter().map(|a| a.1).fold(0.0, f64::max);
    let pair_adds_gas = added_ratio >= 1.0;
    let gas = gas
        .filter(|g| added.iter().any(|(a, r)| a == g && *r >= 1.0))
        .or_else(|| {
            added
                .iter()
                .filter(|a| a.1 >= 1.0)
                .max_by(|a, b| a.1.total_cmp(&b.1))
                .map(|a| a.0.clone())
        });
    // Boiling that the pair neither heats into nor adds a gas to is a volatile container's
    // own (strong ammonia beside a salt boils a little sooner, as it would anyway).
    let pair_heats = r
        .findings
        .iter()
        .any(|f| f.code == "mixture-heats-up" && f.severity >= Severity::Review);
    let top: Vec<&crate::report::Finding> = r
        .findings
        .iter()
        .filter(|f| f.severity >= Severity::Review)
        // A component's own hazard and a container's own state are not the pair's.
        .filter(|f| f.scope == crate::report::Scope::Pour)
        // A gas finding is the pair's only when it is about a gas the meeting adds.
        .filter(|f| !is_gas_finding(&f.code) || names_any(&f.message, &added))
        .filter(|f| pair_adds_gas || pair_heats || !is_boiling_finding(&f.code))
        // Rough activity figures matter only where the meeting brings a gas near a level.
        .filter(|f| f.code != "outside-activity-model" || added_ratio >= 0.1)
        .collect();
    let severity = top
        .iter()
        .map(|f| f.severity)
        .max()
        .unwrap_or(Severity::Clear);
    let gas = if pair_adds_gas { gas } else { None };
    PairOutcome {
        severity,
        worst_ratio,
        gas,
        headline: top.first().map(|f| f.message.clone()).unwrap_or_default(),
        codes: top.iter().map(|f| f.code.clone()).collect(),
        computed: true,
    }
}

/// The full check of two containers leaking together, in every ratio.
#[allow(clippy::too_many_arguments)]
fn evaluate(
    cat: &Catalog,
    th: &Thresholds,
    rules: &RuleSet,
    a: &StoredContainer,
    b: &StoredContainer,
    pa: &Profile,
    pb: &Profile,
    opts: &CheckOptions,
) -> PairOutcome {
    let (vessel, stream) = match (&a.contents, &b.contents) {
        (Contents::Liquid(x), Contents::Liquid(y)) => (x.clone(), y.clone()),
        (Contents::Liquid(x), Contents::Dry { substance, moles }) => (
            x.clone(),
            dry_as_stream(
                cat,
                &b.id,
                *substance,
                dissolves(cat, *substance, *moles, x, pa.ph),
                x.volume_l,
            ),
        ),
        (Contents::Dry { substance, moles }, Contents::Liquid(y)) => (
            y.clone(),
            dry_as_stream(
                cat,
                &a.id,
                *substance,
                dissolves(cat, *substance, *moles, y, pb.ph),
                y.volume_l,
            ),
        ),
        (Contents::Dry { .. }, Contents::Dry { .. }) => return dry_pair(cat, rules, pa, pb),
    };
    let mut vessel = vessel;
    vessel.capacity_l = Some(vessel.volume_l + stream.volume_l);
    vessel.closure = Closure::Open;
    match check(cat, th, rules, &vessel, &stream, opts) {
        Ok(r) => {
            let bars = |p: &Profile| {
                p.alone_gases
                    .iter()
                    .map(|(g, a)| (g.clone(), pair_adds_above(cat, th, g, *a, p.dry)))
                    .collect::<Vec<_>>()
            };
            let above = [bars(pa), bars(pb)].concat();
            outcome_of(cat, th, &r, &above, !(pa.dry || pb.dry))
        }
        Err(e) => not_assessed(&e),
    }
}

/// Two dry containers: only the rules can say what they do together, with any pH
/// condition taken as possible.
fn dry_pair(cat: &Catalog, rules: &RuleSet, pa: &Profile, pb: &Profile) -> PairOutcome {
    let hits = rules.evaluate(cat, &rule_context(pa, pb, 0.0, 14.0));
    let severity = hits
        .iter()
        .map(|h| Severity::from(h.rule.rule.severity))
        .max()
        .unwrap_or(Severity::Clear);
    PairOutcome {
        severity,
        worst_ratio: 0.0,
        gas: hits
            .iter()
            .flat_map(|h| h.rule.rule.forms.first())
            .next()
            .cloned(),
        headline: hits
            .first()
            .map(|h| h.rule.rule.message.clone())
            .unwrap_or_default(),
        codes: hits.iter().map(|h| h.rule.rule.id.clone()).collect(),
        computed: false,
    }
}

/// A pair whose check failed is a review, so that nobody reads it as clear.
fn not_assessed(e: &crate::check::CheckError) -> PairOutcome {
    PairOutcome {
        severity: Severity::Review,
        worst_ratio: 0.0,
        gas: None,
        headline: not_assessed_headline(e),
        codes: vec!["not-assessed".into()],
        computed: false,
    }
}

/// A pair's headline when its check failed: what stopped it, and the caution, once each
/// (the error's own text carries both for a single check).
fn not_assessed_headline(e: &crate::check::CheckError) -> String {
    let why = match e {
        crate::check::CheckError::Solve { what, error } => format!("{what}: {error}"),
        crate::check::CheckError::Input(e) => e.to_string(),
    };
    format!("could not be assessed: {why}; treat as unsafe until checked another way")
}

/// A pair of containers that can meet: (i, j, level, index of the place in
/// [`Meetings::places`] whose matrix shows it), with i < j.
type Meeting = (usize, usize, Level, usize);

/// Every pair of containers that can meet, the cabinets (sorted) and the other places the
/// pairs are shown under.
struct Meetings {
    pairs: Vec<Meeting>,
    /// Cabinet keys first (sorted; `cabinets` of them), then the places where a container
    /// stands loose around another's tray, in the order met.
    places: Vec<String>,
    cabinets: usize,
}

/// Every pair of containers that can meet, with the level at which they meet.
///
/// Containers meet in their spill zone when the zones are the same; at the second level
/// (`Level::Cabinet`) when their cabinets are the same, or when one's spill zone encloses
/// the other's (locations of different depths: a bottle standing loose in `Cabinet 4`
/// and one on `Cabinet 4 / Tray 1`). The second kind is shown under the enclosing place.
fn meeting_pairs(inv: &Inventory, cabinet_level: bool) -> Meetings {
    let zone: Vec<&[String]> = inv
        .containers
        .iter()
        .map(|c| inv.spill_zone_path(&c.path))
        .collect();
    let cab: Vec<&[String]> = inv
        .containers
        .iter()
        .map(|c| inv.cabinet_path(&c.path))
        .collect();
    let mut cabinets: HashMap<String, Vec<usize>> = HashMap::new();
    for (i, c) in cab.iter().enumerate() {
        cabinets.entry(c.join("/")).or_default().push(i);
    }
    let mut places: Vec<String> = cabinets.keys().cloned().collect();
    places.sort();
    let n_cabinets = places.len();
    let mut out = Vec::new();
    for (k, name) in places.iter().enumerate() {
        let members = &cabinets[name];
        for (x, &i) in members.iter().enumerate() {
            for &j in &members[x + 1..] {
                if zone[i] == zone[j] {
                    out.push((i, j, Level::Tray, k));
                } else if cabinet_level {
                    out.push((i, j, Level::Cabinet, k));
                }
            }
        }
    }
    if !cabinet_level {
        return Meetings {
            pairs: out,
            places,
            cabinets: n_cabinets,
        };
    }
    // A spill zone that encloses another's: only where locations differ in depth.
    let depths: std::collections::HashSet<usize> = zone.iter().map(|z| z.len()).collect();
    if depths.len() > 1 {
        let mut by_zone: HashMap<&[String], Vec<usize>> = HashMap::new();
        for (i, z) in zone.iter().enumerate() {
            by_zone.entry(*z).or_default().push(i);
        }
        let mut place_of: HashMap<String, usize> = HashMap::new();
        let mut nested = Vec::new();
        for (j, z) in zone.iter().enumerate() {
            for l in 1..z.len() {
                let Some(loose) = by_zone.get(&z[..l]) else {
                    continue;
                };
                for &i in loose {
                    if cab[i] == cab[j] {
                        continue; // already paired as the same cabinet
                    }
                    let name = z[..l].join("/");
                    let next = places.len() + place_of.len();
                    let k = match cabinets.get(&name) {
                        Some(_) => places.binary_search(&name).unwrap_or(next),
                        None => *place_of.entry(name).or_insert(next),
                    };
                    nested.push((i.min(j), i.max(j), Level::Cabinet, k));
                }
            }
        }
        let mut extra: Vec<(String, usize)> = place_of.into_iter().collect();
        extra.sort_by_key(|(_, k)| *k);
        places.extend(extra.into_iter().map(|(name, _)| name));
        nested.sort();
        out.extend(nested);
    }
    Meetings {
        pairs: out,
        places,
        cabinets: n_cabinets,
    }
}

/// The engine's inputs for an audit.
pub struct Auditor<'a> {
    pub cat: &'a Catalog,
    pub th: &'a Thresholds,
    pub rules: &'a RuleSet,
    pub settings: AuditSettings,
}

/// Two kinds of contents (in order) and the room they meet in.
pub type PairKey = (usize, usize, Option<usize>);

/// A pair of a cabinet that is not clear.
struct CabinetHit {
    i: usize,
    j: usize,
    level: Level,
    severity: Severity,
    worst_ratio: f64,
    gas: Option<String>,
    codes: Vec<String>,
}

/// Pair results by kind, shared with the suggestion search.
pub struct PairJudge<'a> {
    auditor: &'a Auditor<'a>,
    inv: &'a Inventory,
    kinds: Vec<usize>,
    profiles: Vec<Profile>,
    reps: Vec<usize>,
    cache: std::sync::Mutex<HashMap<PairKey, PairOutcome>>,
    screened: std::sync::Mutex<HashMap<(usize, usize), bool>>,
    room_index: Vec<Option<usize>>,
}

impl<'a> PairJudge<'a> {
    pub fn new(auditor: &'a Auditor<'a>, inv: &'a Inventory) -> PairJudge<'a> {
        let mut index: HashMap<String, usize> = HashMap::new();
        let mut reps: Vec<usize> = Vec::new();
        let kinds: Vec<usize> = inv
            .containers
            .iter()
            .enumerate()
            .map(|(i, c)| {
                let n = index.len();
                let k = *index.entry(kind_key(c)).or_insert(n);
                if k == reps.len() {
                    reps.push(i);
                } else if fullness(c) > fullness(&inv.containers[reps[k]]) {
                    reps[k] = i;
                }
                k
            })
            .collect();
        let profiles: Vec<Profile> = reps
            .par_iter()
            .map(|&i| profile(auditor.cat, auditor.th, &inv.containers[i]))
            .collect();
        let room_index = inv
            .containers
            .iter()
            .map(|c| {
                inv.room_of(c)
                    .and_then(|r| inv.rooms.iter().position(|x| x == r))
            })
            .collect();
        PairJudge {
            auditor,
            inv,
            kinds,
            profiles,
            reps,
            cache: Default::default(),
            screened: Default::default(),
            room_index,
        }
    }

    pub fn key(&self, i: usize, j: usize) -> PairKey {
        let (a, b) = (self.kinds[i], self.kinds[j]);
        (a.min(b), a.max(b), self.room_index[i])
    }

    /// False when the screening clears the pair without a check.
    pub fn screen(&self, i: usize, j: usize) -> bool {
        let (a, b) = (self.kinds[i], self.kinds[j]);
        let key = (a.min(b), a.max(b));
        if let Some(&v) = self.screened.lock().expect("screen cache").get(&key) {
            return v;
        }
        let (pa, pb) = (&self.profiles[a], &self.profiles[b]);
        // Two dry containers: the rules decide, cheaply, in `judge`.
        let v = (pa.dry && pb.dry) || needs_check(self.auditor.cat, self.auditor.rules, pa, pb);
        self.screened.lock().expect("screen cache").insert(key, v);
        v
    }

    fn options(&self, room: Option<usize>) -> CheckOptions {
        let r = room.map(|r| &self.inv.rooms[r]);
        CheckOptions {
            temperature_k: None,
            room_volume_m3: r.map(|r| r.volume_m3),
            air_changes_per_hour: r.map(|r| r.air_changes_per_hour),
            spill_area_m2: Some(self.auditor.settings.spill_area_m2),
            detail: crate::pour::path::Detail::Coarse,
            action: crate::judge::assess::Action::Leak,
        }
    }

    /// The outcome of containers i and j leaking together (computed once per kind pair).
    pub fn judge(&self, i: usize, j: usize) -> PairOutcome {
        let key = self.key(i, j);
        if let Some(o) = self.cache.lock().expect("cache").get(&key) {
            return o.clone();
        }
        let (ka, kb, room) = key;
        let a = &self.inv.containers[self.reps[ka]];
        let b = &self.inv.containers[self.reps[kb]];
        let o = evaluate(
            self.auditor.cat,
            self.auditor.th,
            self.auditor.rules,
            a,
            b,
            &self.profiles[ka],
            &self.profiles[kb],
            &self.options(room),
        );
        self.cache.lock().expect("cache").insert(key, o.clone());
        o
    }

    /// Judges many pairs in parallel, each distinct kind pair once; `progress` is told
    /// how many of the distinct checks are done.
    pub fn judge_all(&self, pairs: &[(usize, usize)], progress: &(dyn Fn(usize, usize) + Sync)) {
        let mut distinct: Vec<(usize, usize)> = Vec::new();
        let mut seen = std::collections::HashSet::new();
        for &(i, j) in pairs {
            if seen.insert(self.key(i, j)) {
                distinct.push((i, j));
            }
        }
        let done = std::sync::atomic::AtomicUsize::new(0);
        let total = distinct.len();
        distinct.par_iter().for_each(|&(i, j)| {
            self.judge(i, j);
            let n = done.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1;
            progress(n, total);
        });
    }

    pub fn distinct_checks(&self) -> usize {
        self.cache.lock().expect("cache").len()
    }
}

impl Auditor<'_> {
    /// Audits every pair that can meet; findings ranked by severity, level and ratio.
    pub fn audit(&self, inv: &Inventory, progress: &(dyn Fn(usize, usize) + Sync)) -> AuditReport {
        let judge = PairJudge::new(self, inv);
        let meetings = meeting_pairs(inv, self.settings.cabinet_level);
        let pairs = &meetings.pairs;
        let to_check: Vec<(usize, usize)> = pairs
            .iter()
            .filter(|(i, j, _, _)| judge.screen(*i, *j))
            .map(|(i, j, _, _)| (*i, *j))
            .collect();
        judge.judge_all(&to_check, progress);
        let (findings, by_cabinet) = self.findings(inv, &judge, pairs, &to_check);
        let cabinets = cabinet_matrices(inv, &meetings, by_cabinet);
        let clear_cabinets = clear_cabinets(&meetings, &cabinets);
        let zones: std::collections::HashSet<&[String]> = inv
            .containers
            .iter()
            .map(|c| inv.spill_zone_path(&c.path))
            .collect();
        AuditReport {
            tool: "offgas",
            version: env!("CARGO_PKG_VERSION"),
            name: inv.name.clone(),
            file: inv.file.clone(),
            severity: findings
                .iter()
                .map(|f| f.severity)
                .max()
                .unwrap_or(Severity::Clear),
            counts: AuditCounts {
                containers: inv.containers.len(),
                spill_zones: zones.len(),
                cabinets: meetings.cabinets,
                pairs_that_can_meet: pairs.len(),
                pairs_cleared_by_screening: pairs.len() - to_check.len(),
                pairs_checked: to_check.len(),
                distinct_checks: judge.distinct_checks(),
            },
            findings,
            cabinets,
            clear_cabinets,
            suggestion: None,
            skipped_rows: Vec::new(),
            assumptions: audit_assumptions(self, inv),
            cautions: self.th.cautions.clone(),
        }
    }

    /// The checked pairs that are not clear, ranked, and the same pairs by the place whose
    /// matrix shows them (in the order the pairs were met).
    fn findings(
        &self,
        inv: &Inventory,
        judge: &PairJudge,
        pairs: &[Meeting],
        to_check: &[(usize, usize)],
    ) -> (Vec<AuditFinding>, HashMap<usize, Vec<CabinetHit>>) {
        let cat = self.cat;
        // One reference per container and one headline per kind pair, shared by every
        // finding that names them rather than copied into each.
        let mut refs: HashMap<usize, Arc<ContainerRef>> = HashMap::new();
        let mut cref = |i: usize| {
            refs.entry(i)
                .or_insert_with(|| {
                    let c = &inv.containers[i];
                    Arc::new(ContainerRef {
                        id: c.id.clone(),
                        location: c.location(),
                        contents: describe(cat, c),
                    })
                })
                .clone()
        };
        let mut shared: HashMap<PairKey, (Arc<str>, Arc<[String]>)> = HashMap::new();
        let mut findings = Vec::new();
        let mut by_cabinet: HashMap<usize, Vec<CabinetHit>> = HashMap::new();
        let checked: std::collections::HashSet<(usize, usize)> = to_check.iter().copied().collect();
        for &(i, j, level, cabinet) in pairs {
            if !checked.contains(&(i, j)) {
                continue;
            }
            let o = judge.judge(i, j);
            if o.severity < Severity::Review {
                continue;
            }
            let (headline, codes) = shared
                .entry(judge.key(i, j))
                .or_insert_with(|| (Arc::from(o.headline.as_str()), Arc::from(o.codes.clone())))
                .clone();
            by_cabinet.entry(cabinet).or_default().push(CabinetHit {
                i,
                j,
                level,
                severity: o.severity,
                worst_ratio: o.worst_ratio,
                gas: o.gas.clone(),
                codes: o.codes.clone(),
            });
            findings.push(AuditFinding {
                severity: o.severity,
                level,
                a: cref(i),
                b: cref(j),
                worst_ratio: o.worst_ratio,
                gas: o.gas,
                headline,
                codes,
                computed: o.computed,
            });
        }
        rank(&mut findings);
        (findings, by_cabinet)
    }
}

/// Worst first: by severity, then the nearer level, then the higher ratio; ids break ties.
fn rank(findings: &mut [AuditFinding]) {
    findings.sort_by(|x, y| {
        y.severity
            .cmp(&x.severity)
            .then(x.level.cmp(&y.level))
            .then(y.worst_ratio.total_cmp(&x.worst_ratio))
            .then(x.a.id.cmp(&y.a.id))
            .then(x.b.id.cmp(&y.b.id))
    });
}

/// Pairs of containers by index, the lower first.
type PairSet = std::collections::HashSet<(usize, usize)>;

/// Every container of a cabinet, and every container that meets another in a place,
/// whether its pairs are clear or not (by place; unsorted, with repeats); and every pair
/// that meets (i < j).
fn place_members(inv: &Inventory, meetings: &Meetings) -> (HashMap<usize, Vec<usize>>, PairSet) {
    let mut members: HashMap<usize, Vec<usize>> = HashMap::new();
    let mut meets: PairSet = Default::default();
    for &(i, j, _, k) in &meetings.pairs {
        let m = members.entry(k).or_default();
        m.push(i);
        m.push(j);
        meets.insert((i.min(j), i.max(j)));
    }
    for (i, c) in inv.containers.iter().enumerate() {
        let cabinet = inv.cabinet_path(&c.path).join("/");
        if let Ok(k) = meetings.places[..meetings.cabinets].binary_search(&cabinet) {
            members.entry(k).or_default().push(i);
        }
    }
    (members, meets)
}

/// A container's spill zone as the matrices show it.
fn zone_label(inv: &Inventory, i: usize) -> String {
    inv.spill_zone_path(&inv.containers[i].path).join(" / ")
}

/// One matrix per place with a pair that is not clear, sorted by place.
fn cabinet_matrices(
    inv: &Inventory,
    meetings: &Meetings,
    by_cabinet: HashMap<usize, Vec<CabinetHit>>,
) -> Vec<CabinetMatrix> {
    let (mut members, meets) = place_members(inv, meetings);
    let mut cabinets: Vec<CabinetMatrix> = by_cabinet
        .into_iter()
        .map(|(place, hits)| {
            let members = members.remove(&place).unwrap_or_default();
            matrix(inv, &meetings.places[place], members, &meets, hits)
        })
        .collect();
    cabinets.sort_by(|a, b| a.cabinet.cmp(&b.cabinet));
    cabinets
}

/// The matrix of one place: its containers by spill zone and id, the pairs among them
/// that cannot meet, and the pairs that are not clear.
fn matrix(
    inv: &Inventory,
    place: &str,
    mut members: Vec<usize>,
    meets: &PairSet,
    hits: Vec<CabinetHit>,
) -> CabinetMatrix {
    members.sort_by(|&a, &b| {
        zone_label(inv, a)
            .cmp(&zone_label(inv, b))
            .then(inv.containers[a].id.cmp(&inv.containers[b].id))
    });
    members.dedup();
    let pos = |k: usize| members.iter().position(|&m| m == k).expect("member");
    let mut apart = Vec::new();
    for (x, &a) in members.iter().enumerate() {
        for (y, &b) in members.iter().enumerate().skip(x + 1) {
            if !meets.contains(&(a.min(b), a.max(b))) {
                apart.push([x, y]);
            }
        }
    }
    CabinetMatrix {
        cabinet: place.replace('/', " / "),
        ids: members
            .iter()
            .map(|&m| inv.containers[m].id.clone())
            .collect(),
        zones: members.iter().map(|&m| zone_label(inv, m)).collect(),
        apart,
        cells: hits
            .into_iter()
            .map(|h| MatrixCell {
                i: pos(h.i),
                j: pos(h.j),
                severity: h.severity,
                level: h.level,
                worst_ratio: h.worst_ratio,
                gas: h.gas,
                codes: h.codes,
            })
            .collect(),
    }
}

/// The cabinets with no matrix: every pair in them is clear.
fn clear_cabinets(meetings: &Meetings, matrices: &[CabinetMatrix]) -> Vec<String> {
    let shown: std::collections::HashSet<&str> =
        matrices.iter().map(|m| m.cabinet.as_str()).collect();
    meetings.places[..meetings.cabinets]
        .iter()
        .map(|p| p.replace('/', " / "))
        .filter(|p| !shown.contains(p.as_str()))
        .collect()
}

fn audit_assumptions(a: &Auditor, inv: &Inventory) -> Vec<String> {
    let from_the_end = inv.meet_depth.saturating_sub(inv.cabinet_depth) <= 1
        && inv
            .containers
            .iter()
            .all(|c| c.path.len() <= inv.meet_depth);
    let levels = if from_the_end {
        "A location's last level is its spill zone (tray or secondary containment) and the level above it its cabinet; a one-level location is both.".to_string()
    } else {
        format!(
            "A location's first {} levels are its spill zone (tray or secondary containment) and its first {} its cabinet (the inventory's `levels`).",
            inv.meet_depth, inv.cabinet_depth
        )
    };
    let second = if a.settings.cabinet_level {
        "so can containers in the same cabinet in different spill zones, and a container standing loose in a place that holds another's spill zone (the second level)"
    } else {
        "containers in the same cabinet in different spill zones are not paired (--no-cabinet-level)"
    };
    let mut out = vec![format!(
        "{levels} Containers in the same spill zone can meet; {second}."
    )];
    out.extend([
        "A leak-together case pours each container's whole contents into the other's, in every ratio between, in an open puddle; both orders are scanned as in `offgas check`, at 14 points each with 8 refinement steps around the worst.".to_string(),
        format!("The puddle spreads over {} m2 for the release into the room; the room is the inventory's, or the thresholds file's default.", a.settings.spill_area_m2),
    ]);
    if !inv.rooms.is_empty() {
        let roomless = inv
            .containers
            .iter()
            .filter(|c| inv.room_of(c).is_none())
            .count();
        if roomless > 0 {
            out.push(format!(
                "{} in no declared room (a room is matched by the leading levels of a location, down to its cabinet level; a one- or two-level location names none, and takes a room declared as `/`): the thresholds file's default room is used.",
                if roomless == 1 {
                    "1 container stands".to_string()
                } else {
                    format!("{roomless} containers stand")
                }
            ));
        }
    }
    out.extend([
        "A dry solid dissolves whole into a liquid partner, except a salt that only dissolves (sodium chloride, sodium sulfate, ...), which dissolves up to its solubility in the water there is unless the partner frees its gas; two dry containers are judged by the rules alone, with any pH condition taken as possible.".to_string(),
        "Screening: a pair is checked in full only if a gas could form (a family whose volatile form appears on the partner's side of the pH), the pH gap of concentrated contents could release heat, a rule applies, or a container could not be screened; the rest are cleared without solving.".into(),
        "Containers with the same substances in amounts within a factor of about 2.2 share one result, computed for the fullest of them.".into(),
        "A gas counts against a pair only where the meeting gives off more than twice as much of it as either container does on its own, or ten times as much where a liquid on its own already gives it off past its stop level (strong ammonia, glacial acetic acid and fuming acids are a danger when spilt whatever stands beside them); boiling counts only where the meeting heats the liquid or adds a gas.".into(),
    ]);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn inventory(locations: &[(&str, &str)]) -> Inventory {
        let cat = crate::embedded::catalog().expect("catalog");
        let mut text = String::from("containers:\n");
        for (id, l) in locations {
            text.push_str(&format!("  - {{ id: {id}, location: \"{l}\", size: 1 L, substance: sodium chloride, amount: 5 g }}\n"));
        }
        Inventory::parse(&cat, "store.yaml", &text).expect("inventory")
    }

    #[test]
    fn an_unassessed_pair_says_so_once() {
        let e = crate::check::CheckError::Solve {
            what: "the end state".into(),
            error: crate::chem::SolveError::NoBracket,
        };
        let headline = not_assessed_headline(&e);
        assert_eq!(
            headline.matches("could not be assessed").count(),
            1,
            "{headline}"
        );
        assert_eq!(
            headline.to_lowercase().matches("treat").count(),
            1,
            "{headline}"
        );
        assert!(headline.contains("the charge balance could not be bracketed"));
    }

    #[test]
    fn pairs_meet_by_spill_zone_cabinet_and_enclosing_place() {
        let inv = inventory(&[
            ("A", "Annex / Store C / Cabinet 4 / Tray 1"),
            ("B", "Annex / Store C / Cabinet 4 / Tray 1"),
            ("C", "Annex / Store C / Cabinet 4 / Tray 2"),
            ("D", "Annex / Store C / Cabinet 4"),
            ("E", "Annex / Store C / Cabinet 5"),
            ("F", "Annex / Store C / Cabinet 5 / Tray 1"),
            ("G", "Annex / Wash bay"),
            ("H", "Annex / Wash bay / Rack 1 / Tray 1"),
        ]);
        let m = meeting_pairs(&inv, true);
        let id = |i: usize| inv.containers[i].id.as_str();
        let mut got: Vec<(String, Level, String)> = m
            .pairs
            .iter()
            .map(|&(i, j, level, k)| (format!("{}{}", id(i), id(j)), level, m.places[k].clone()))
            .collect();
        got.sort();
        let want = [
            ("AB", Level::Tray, "Annex/Store C/Cabinet 4"),
            ("AC", Level::Cabinet, "Annex/Store C/Cabinet 4"),
            ("AD", Level::Cabinet, "Annex/Store C/Cabinet 4"),
            ("BC", Level::Cabinet, "Annex/Store C/Cabinet 4"),
            ("BD", Level::Cabinet, "Annex/Store C/Cabinet 4"),
            ("CD", Level::Cabinet, "Annex/Store C/Cabinet 4"),
            // D and E stand loose in two cabinets: each cabinet is a spill zone, and the
            // level above (the room) their cabinet.
            ("DE", Level::Cabinet, "Annex/Store C"),
            ("EF", Level::Cabinet, "Annex/Store C/Cabinet 5"),
            ("GH", Level::Cabinet, "Annex/Wash bay"),
        ]
        .map(|(p, l, k)| (p.to_string(), l, k.to_string()));
        assert_eq!(got, want);
        assert_eq!(m.cabinets, 5);
        let only_zones = meeting_pairs(&inv, false);
        assert_eq!(only_zones.pairs.len(), 1);
    }

    #[test]
    fn uniform_depths_pair_within_cabinets_only() {
        let inv = inventory(&[
            ("A", "Cab 1 / Tray 1"),
            ("B", "Cab 1 / Tray 2"),
            ("C", "Cab 2 / Tray 1"),
            ("D", "Cab 2 / Tray 1"),
        ]);
        let m = meeting_pairs(&inv, true);
        let pairs: Vec<(usize, usize, Level)> = m.pairs.iter().map(|p| (p.0, p.1, p.2)).collect();
        assert_eq!(pairs, [(0, 1, Level::Cabinet), (2, 3, Level::Tray)]);
        assert_eq!(m.places, ["Cab 1", "Cab 2"]);
    }
}
