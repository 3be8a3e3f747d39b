//! The pair audit: which containers can meet, screened cheaply, checked in full where it
//! could matter, ranked.

use super::{Contents, Inventory, StoredContainer};
use crate::batch::{Batch, Component};
use crate::catalog::{Catalog, SubstanceId};
use crate::check::{check, CheckOptions};
use crate::chem::{solve, Closure, Mixture, SolverSettings};
use crate::pairs::Side;
use crate::quantity::Amount;
use crate::report::{CheckReport, Severity};
use crate::rules::evaluate::{Present, RuleContext};
use crate::rules::RuleSet;
use crate::thresholds::Thresholds;
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

/// Where two containers meet.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Hash)]
#[serde(rename_all = "lowercase")]
pub enum Level {
    /// The same spill zone (tray or secondary containment).
    Tray,
    /// The same cabinet, different spill zones.
    Cabinet,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ContainerRef {
    pub id: String,
    pub location: String,
    pub contents: String,
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

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AuditFinding {
    pub severity: Severity,
    pub level: Level,
    /// Shared between the findings of a container (large audits hold many).
    pub a: Arc<ContainerRef>,
    pub b: Arc<ContainerRef>,
    pub worst_ratio: f64,
    pub gas: Option<String>,
    /// Shared between every pair with the same contents.
    pub headline: Arc<str>,
    pub codes: Arc<[String]>,
    pub computed: bool,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MatrixCell {
    pub i: usize,
    pub j: usize,
    pub severity: Severity,
    pub level: Level,
    pub worst_ratio: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CabinetMatrix {
    pub cabinet: String,
    pub ids: Vec<String>,
    pub cells: Vec<MatrixCell>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AuditCounts {
    pub containers: usize,
    pub spill_zones: usize,
    pub cabinets: usize,
    pub pairs_that_can_meet: usize,
    pub pairs_cleared_by_screening: usize,
    pub pairs_checked: usize,
    /// Distinct pairs of contents actually computed (identical bottles share a result).
    pub distinct_checks: usize,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AuditReport {
    pub tool: &'static str,
    pub version: &'static str,
    pub name: String,
    pub file: String,
    pub severity: Severity,
    pub counts: AuditCounts,
    pub findings: Vec<AuditFinding>,
    pub cabinets: Vec<CabinetMatrix>,
    pub suggestion: Option<super::suggest::Suggestion>,
    pub skipped_rows: Vec<serde_json::Value>,
    pub assumptions: Vec<String>,
    pub cautions: Vec<String>,
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
    /// How bad the contents are on their own, as an open puddle (ratio to review levels).
    alone_score: f64,
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
                crate::composition::composition(cat, &[(*substance, *moles)], 1.0, None).water_g
                    / 1e3,
            );
            (m, vec![(*substance, *moles)], true)
        }
    };
    let mut m = mixture;
    m.closure = Closure::Open;
    m.headspace_l = 0.0;
    let eq = solve(cat, &m, &settings(th)).ok();
    let alone_score = eq
        .as_ref()
        .map(|e| crate::assess::score(cat, th, e))
        .unwrap_or(0.0);
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
        alone_score,
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

/// Findings about the gas over the puddle or in the room.
fn is_gas_finding(code: &str) -> bool {
    code.starts_with("gas-") || code.starts_with("room-")
}

/// A mixture's gas counts against the pair only when it is clearly worse than what either
/// container gives off on its own (a fuming acid fumes whatever it meets).
const PAIR_ADDS_FACTOR: f64 = 2.0;

/// `both_orders` is false when one partner is a dry solid: it dissolves into the liquid,
/// and pouring the liquid onto it first is not a state the model can describe.
fn outcome_of(r: &CheckReport, alone: f64, both_orders: bool) -> PairOutcome {
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
    let pair_adds_gas = worst_ratio > PAIR_ADDS_FACTOR * alone.max(0.0) && worst_ratio >= 1.0;
    let top: Vec<&crate::report::Finding> = r
        .findings
        .iter()
        .filter(|f| f.severity >= Severity::Review)
        // A component's own hazard and a container's own state are not the pair's.
        .filter(|f| f.scope == crate::report::Scope::Pour)
        .filter(|f| pair_adds_gas || !is_gas_finding(&f.code))
        // Rough activity figures matter only where the meeting brings a gas near a level.
        .filter(|f| {
            f.code != "outside-activity-model"
                || (worst_ratio >= 0.1 && worst_ratio > PAIR_ADDS_FACTOR * alone.max(0.0))
        })
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
    let fail = |e: String| PairOutcome {
        severity: Severity::Review,
        worst_ratio: 0.0,
        gas: None,
        headline: format!("could not be assessed: {e}; treat as unsafe until checked another way"),
        codes: vec!["not-assessed".into()],
        computed: false,
    };
    let (vessel, stream) = match (&a.contents, &b.contents) {
        (Contents::Liquid(x), Contents::Liquid(y)) => (x.clone(), y.clone()),
        (Contents::Liquid(x), Contents::Dry { substance, moles }) => (
            x.clone(),
            dry_as_stream(cat, &b.id, *substance, *moles, x.volume_l),
        ),
        (Contents::Dry { substance, moles }, Contents::Liquid(y)) => (
            y.clone(),
            dry_as_stream(cat, &a.id, *substance, *moles, y.volume_l),
        ),
        (Contents::Dry { .. }, Contents::Dry { .. }) => {
            // Two dry containers: only the rules can say what they do together.
            let hits = rules.evaluate(cat, &rule_context(pa, pb, 0.0, 14.0));
            let severity = hits
                .iter()
                .map(|h| Severity::from(h.rule.rule.severity))
                .max()
                .unwrap_or(Severity::Clear);
            return PairOutcome {
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
            };
        }
    };
    let mut vessel = vessel;
    vessel.capacity_l = Some(vessel.volume_l + stream.volume_l);
    vessel.closure = Closure::Open;
    match check(cat, th, rules, &vessel, &stream, opts) {
        Ok(r) => outcome_of(&r, pa.alone_score.max(pb.alone_score), !(pa.dry || pb.dry)),
        Err(e) => fail(e.to_string()),
    }
}

/// Every pair of containers that shares a cabinet, with the level at which they meet.
fn meeting_pairs(inv: &Inventory, cabinet_level: bool) -> Vec<(usize, usize, Level)> {
    let mut cabinets: HashMap<String, Vec<usize>> = HashMap::new();
    for (i, c) in inv.containers.iter().enumerate() {
        cabinets
            .entry(c.zone(inv.cabinet_depth))
            .or_default()
            .push(i);
    }
    let mut keys: Vec<&String> = cabinets.keys().collect();
    keys.sort();
    let mut out = Vec::new();
    for k in keys {
        let members = &cabinets[k];
        for (x, &i) in members.iter().enumerate() {
            for &j in &members[x + 1..] {
                let same_zone = inv.containers[i].zone(inv.meet_depth)
                    == inv.containers[j].zone(inv.meet_depth);
                if same_zone {
                    out.push((i, j, Level::Tray));
                } else if cabinet_level {
                    out.push((i, j, Level::Cabinet));
                }
            }
        }
    }
    out
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

/// A pair of a cabinet that is not clear: (i, j, level, severity, worst ratio).
type CabinetHit = (usize, usize, Level, Severity, f64);

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
            detail: crate::path::Detail::Coarse,
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
        let pairs = meeting_pairs(inv, self.settings.cabinet_level);
        let to_check: Vec<(usize, usize)> = pairs
            .iter()
            .filter(|(i, j, _)| judge.screen(*i, *j))
            .map(|(i, j, _)| (*i, *j))
            .collect();
        judge.judge_all(&to_check, progress);
        let cat = self.cat;
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
        let mut by_cabinet: HashMap<String, Vec<CabinetHit>> = HashMap::new();
        let checked: std::collections::HashSet<(usize, usize)> = to_check.iter().copied().collect();
        for &(i, j, level) in &pairs {
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
            by_cabinet
                .entry(inv.containers[i].zone(inv.cabinet_depth))
                .or_default()
                .push((i, j, level, o.severity, o.worst_ratio));
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
        findings.sort_by(|x, y| {
            y.severity
                .cmp(&x.severity)
                .then(x.level.cmp(&y.level))
                .then(y.worst_ratio.total_cmp(&x.worst_ratio))
                .then(x.a.id.cmp(&y.a.id))
                .then(x.b.id.cmp(&y.b.id))
        });
        let mut cabinets: Vec<CabinetMatrix> = by_cabinet
            .into_iter()
            .map(|(cabinet, hits)| {
                let mut members: Vec<usize> = hits.iter().flat_map(|h| [h.0, h.1]).collect();
                members.sort();
                members.dedup();
                let pos = |k: usize| members.iter().position(|&m| m == k).expect("member");
                CabinetMatrix {
                    cabinet: cabinet.replace('/', " / "),
                    ids: members
                        .iter()
                        .map(|&m| inv.containers[m].id.clone())
                        .collect(),
                    cells: hits
                        .iter()
                        .map(|(i, j, level, severity, ratio)| MatrixCell {
                            i: pos(*i),
                            j: pos(*j),
                            severity: *severity,
                            level: *level,
                            worst_ratio: *ratio,
                        })
                        .collect(),
                }
            })
            .collect();
        cabinets.sort_by(|a, b| a.cabinet.cmp(&b.cabinet));
        let zones: std::collections::HashSet<String> = inv
            .containers
            .iter()
            .map(|c| c.zone(inv.meet_depth))
            .collect();
        let cabs: std::collections::HashSet<String> = inv
            .containers
            .iter()
            .map(|c| c.zone(inv.cabinet_depth))
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
                cabinets: cabs.len(),
                pairs_that_can_meet: pairs.len(),
                pairs_cleared_by_screening: pairs.len() - to_check.len(),
                pairs_checked: to_check.len(),
                distinct_checks: judge.distinct_checks(),
            },
            findings,
            cabinets,
            suggestion: None,
            skipped_rows: Vec::new(),
            assumptions: audit_assumptions(self),
            cautions: self.th.cautions.clone(),
        }
    }
}

fn audit_assumptions(a: &Auditor) -> Vec<String> {
    vec![
        format!(
            "Containers in the same spill zone (tray or secondary containment) can meet; {}.",
            if a.settings.cabinet_level {
                "so can containers in the same cabinet on different trays (the second level)"
            } else {
                "containers in the same cabinet on different trays are not paired (--no-cabinet-level)"
            }
        ),
        "A leak-together case pours each container's whole contents into the other's, in every ratio between, in an open puddle; both orders are scanned as in `offgas check`, at 14 points each with 8 refinement steps around the worst.".into(),
        format!("The puddle spreads over {} m2 for the release into the room; the room is the inventory's, or the thresholds file's default.", a.settings.spill_area_m2),
        "A dry solid dissolves whole into a liquid partner; two dry containers are judged by the rules alone, with any pH condition taken as possible.".into(),
        "Screening: a pair is checked in full only if a gas could form (a family whose volatile form appears on the partner's side of the pH), the pH gap of concentrated contents could release heat, a rule applies, or a container could not be screened; the rest are cleared without solving.".into(),
        "Containers with the same substances in amounts within a factor of about 2.2 share one result, computed for the fullest of them.".into(),
    ]
}
