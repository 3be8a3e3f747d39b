//! What a carboy's record says it holds: the contents report of `offgas log show` and the
//! waste tag of `offgas log close`: the models and how they are derived (their layouts are
//! in `output::tag`; JSON is the models serialised).
//!
//! Everything here is derived from the record's history, never stored apart from it: the
//! contents by substance name with their share of the mass, water as the balance, the pH
//! of the contents as solved at rest, and the GHS hazard classes the constituents usually
//! bring (data/ghs.yaml). offgas's own hazard classes decide which GHS classes are listed
//! but never appear on a tag: a waste contractor reads substance names and GHS words.

use crate::basics::text::fixed;
use crate::catalog::ghs::{GhsPart, GhsTable};
use crate::catalog::{Catalog, SubstanceId};
use crate::chem::SolveError;
use crate::judge::thresholds::Thresholds;
use crate::pour::batch::Batch;
use crate::record::{EntryKind, Record};
use crate::report::StateReport;
use serde::Serialize;

/// One constituent of the contents, by substance name.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Constituent {
    /// The substance's name; for a commercial solution, the name of what it is a solution
    /// of (its water is part of the balance).
    pub substance: String,
    /// Other names it went in under (commercial solutions), if any.
    pub added_as: Vec<String>,
    pub cas: Option<String>,
    pub mol: f64,
    pub mol_per_l: f64,
    pub mass_g: f64,
    /// Share of the contents' mass, water included.
    pub mass_percent: f64,
    /// True when its share is below the listing cut-off and its classes are not listed
    /// in any amount, so that it brings no hazard words.
    pub below_cut_off: bool,
}

/// The water that makes up the rest of the mass.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WaterBalance {
    pub mass_g: f64,
    pub mass_percent: f64,
}

/// The contents by name, mass and share.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Contents {
    pub volume_l: f64,
    pub mass_g: f64,
    pub density_g_per_ml: f64,
    pub constituents: Vec<Constituent>,
    pub water: WaterBalance,
    /// How the masses were found and what they leave out.
    pub notes: Vec<String>,
}

/// A GHS hazard class the tag lists, with what brings it and where the words come from.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct HazardWord {
    /// The GHS hazard class, by the name GHS gives it.
    pub hazard: String,
    pub part: GhsPart,
    /// The constituents that bring it (by name), or the pH that does.
    pub from: Vec<String>,
    /// Where GHS defines the class, as the tag cites it.
    pub citation: String,
    /// Where GHS defines the class, and how that was checked (data/ghs.yaml).
    pub source: String,
    /// Why these constituents are taken to bring it.
    pub basis: String,
}

/// The tag a waste contractor reads when the carboy is collected.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WasteTag {
    pub tool: &'static str,
    pub version: &'static str,
    pub record: String,
    pub container: String,
    pub capacity_l: f64,
    /// When the first entry was written: accumulation started.
    pub accumulation_start: String,
    pub closed: String,
    pub closed_by: String,
    /// pH of the contents solved at rest; `None` for an empty carboy.
    pub ph: Option<f64>,
    pub temperature_c: f64,
    pub contents: Contents,
    pub hazards: Vec<HazardWord>,
    /// Constituents none of whose kinds data/ghs.yaml covers: their safety data sheets decide.
    pub unmapped: Vec<String>,
    /// The listing rule, in words.
    pub rule: String,
    pub cut_off_percent: f64,
}

/// One line of a record's history.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct HistoryLine {
    pub seq: usize,
    pub kind: EntryKind,
    pub when: String,
    pub by: Option<String>,
    pub file: Option<String>,
    pub verdict: Option<String>,
    pub accepted: Option<String>,
}

/// `log show`: the history, what the carboy holds now, and its headspace.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CarboyReport {
    pub tool: &'static str,
    pub version: &'static str,
    pub record: String,
    pub container: String,
    pub closed: bool,
    pub capacity_l: f64,
    pub volume_l: f64,
    pub fill_percent: f64,
    pub history: Vec<HistoryLine>,
    /// Substance by substance (`substance`, `mol`, `mol_per_l`, masses and shares).
    pub contents: Vec<Constituent>,
    pub water: WaterBalance,
    pub contents_notes: Vec<String>,
    /// The contents solved at rest: pH, gases in the headspace; `None` while empty.
    pub headspace: Option<StateReport>,
    /// The waste tag, once the record is closed.
    pub tag: Option<WasteTag>,
}

/// Why a tag or a contents report could not be made.
#[derive(Debug, thiserror::Error)]
pub enum TagError {
    #[error("{0}")]
    Input(#[from] crate::pour::batch::InputError),
    #[error("the contents could not be assessed: {0}")]
    Solve(#[from] SolveError),
    #[error("{0} is not closed: the waste tag is made when the carboy is closed")]
    NotClosed(String),
}

fn is_water(cat: &Catalog, sid: SubstanceId) -> bool {
    let s = cat.substance(sid);
    s.is_inert() && s.formula.as_deref() == Some("H2O")
}

/// A constituent grouped by what it is once dissolved, with the classes of every name it
/// went in under.
struct Group {
    id: SubstanceId,
    added_as: Vec<String>,
    mol: f64,
    classes: Vec<String>,
}

fn groups(cat: &Catalog, vessel: &Batch) -> Vec<Group> {
    let mut out: Vec<Group> = Vec::new();
    for c in &vessel.components {
        if c.moles <= 0.0 || is_water(cat, c.substance) {
            continue;
        }
        let s = cat.substance(c.substance);
        let id = s.solution.as_ref().map_or(c.substance, |sol| sol.solute);
        let i = match out.iter().position(|g| g.id == id) {
            Some(i) => i,
            None => {
                out.push(Group {
                    id,
                    added_as: Vec::new(),
                    mol: 0.0,
                    classes: cat.substance(id).classes.clone(),
                });
                out.len() - 1
            }
        };
        let g = &mut out[i];
        g.mol += c.moles;
        if id != c.substance && !g.added_as.contains(&s.name) {
            g.added_as.push(s.name.clone());
        }
        for k in &s.classes {
            if !g.classes.contains(k) {
                g.classes.push(k.clone());
            }
        }
    }
    out
}

/// The contents by substance name, each with its mass and share, water as the balance.
/// Returns the classes of each constituent alongside (for the hazard words only).
fn contents_with_classes(cat: &Catalog, vessel: &Batch) -> (Contents, Vec<Vec<String>>) {
    let comp = vessel.composition(cat);
    let groups = groups(cat, vessel);
    let volume = vessel.volume_l;
    let mut notes = Vec::new();
    let masses: Vec<f64> = groups
        .iter()
        .map(|g| g.mol * cat.substance(g.id).molar_mass.unwrap_or(0.0))
        .collect();
    let solutes: f64 = masses.iter().sum();
    let mut total = comp.mass_g;
    if solutes > total {
        // The density tables cannot hold this much solute in the volume: count the solutes
        // as the whole mass rather than give water a negative share.
        notes.push("the listed constituents weigh more than the density tables give for the volume; their masses are taken as the whole and no water is counted".into());
        total = solutes;
    }
    let share = |g: f64| if total > 0.0 { 100.0 * g / total } else { 0.0 };
    let constituents: Vec<Constituent> = groups
        .iter()
        .zip(&masses)
        .map(|(g, &mass_g)| {
            let s = cat.substance(g.id);
            Constituent {
                substance: s.name.clone(),
                added_as: g.added_as.clone(),
                cas: s.cas.clone(),
                mol: g.mol,
                mol_per_l: if volume > 0.0 { g.mol / volume } else { 0.0 },
                mass_g,
                mass_percent: share(mass_g),
                below_cut_off: false,
            }
        })
        .collect();
    notes.push(format!(
        "masses from the moles the record derives and each substance's molar mass (a hydrate with its crystal water, a commercial solution as what it is a solution of); the whole weighs {} kg at {} g/mL, from the density tables, and water is the balance",
        fixed(total / 1e3, 3),
        fixed(comp.density_g_per_ml, 3)
    ));
    if comp.untabled_share > 0.01 {
        notes.push(format!(
            "{} % of the mass is in solutes with no density table; the total mass and the water are estimates there",
            fixed(100.0 * comp.untabled_share, 1)
        ));
    }
    let water_g = (total - solutes).max(0.0);
    let contents = Contents {
        volume_l: volume,
        mass_g: total,
        density_g_per_ml: if volume > 0.0 {
            total / (volume * 1e3)
        } else {
            comp.density_g_per_ml
        },
        constituents,
        water: WaterBalance {
            mass_g: water_g,
            mass_percent: share(water_g),
        },
        notes,
    };
    (contents, groups.into_iter().map(|g| g.classes).collect())
}

/// The contents by substance name, with masses and shares; water is the balance.
pub fn contents(cat: &Catalog, vessel: &Batch) -> Contents {
    contents_with_classes(cat, vessel).0
}

/// The contents solved at rest in their container: pH and the gases in the headspace.
/// `None` when there is no liquid yet.
pub fn state_at_rest(
    cat: &Catalog,
    th: &Thresholds,
    vessel: &Batch,
) -> Result<Option<StateReport>, SolveError> {
    if vessel.volume_l <= 0.0 {
        return Ok(None);
    }
    let capacity = vessel.capacity_l.unwrap_or(vessel.volume_l);
    let mixture = vessel.to_mixture(cat, capacity);
    let settings = crate::chem::SolverSettings {
        activity_limit: th.activity_model.max_ionic_strength,
        ..Default::default()
    };
    let eq = crate::chem::solve(cat, &mixture, &settings)?;
    let heat = crate::pour::HeatReport::at_rest(eq.temperature_k - cat.physical.kelvin_offset);
    Ok(Some(crate::judge::assess::state_report(
        cat, th, &eq, &heat,
    )))
}

/// The GHS hazard classes the listed constituents and the pH bring.
fn hazard_words(
    ghs: &GhsTable,
    contents: &mut Contents,
    classes: &[Vec<String>],
    ph: Option<f64>,
) -> (Vec<HazardWord>, Vec<String>) {
    let cut = ghs.listing.cut_off.value;
    let mut words: Vec<(String, HazardWord)> = Vec::new();
    let mut unmapped = Vec::new();
    let mut add = |id: &str, from: &str, basis: &str| {
        let Some(h) = ghs.hazard(id) else { return };
        match words.iter_mut().find(|(k, _)| k == id) {
            Some((_, w)) => {
                if !w.from.iter().any(|f| f == from) {
                    w.from.push(from.to_string());
                }
                if !w.basis.split("; ").any(|b| b == basis) {
                    w.basis = format!("{}; {basis}", w.basis);
                }
            }
            None => words.push((
                id.to_string(),
                HazardWord {
                    hazard: h.name.clone(),
                    part: h.part,
                    from: vec![from.to_string()],
                    citation: h.citation(),
                    source: h.source.clone(),
                    basis: basis.to_string(),
                },
            )),
        }
    };
    for (c, kinds) in contents.constituents.iter_mut().zip(classes) {
        let mapped: Vec<_> = kinds.iter().filter_map(|k| ghs.of_class(k)).collect();
        if kinds.iter().any(|k| ghs.of_class(k).is_none()) {
            unmapped.push(c.substance.clone());
        }
        let listed_in_any_amount = mapped.iter().any(|m| m.any_amount);
        if c.mass_percent < cut && !listed_in_any_amount {
            c.below_cut_off = true;
            continue;
        }
        for m in mapped {
            if c.mass_percent < cut && !m.any_amount {
                continue;
            }
            for g in &m.ghs {
                add(g, &c.substance, &m.source);
            }
        }
    }
    if let Some(ph) = ph {
        let x = &ghs.listing.extreme_ph;
        if ph <= x.at_or_below || ph >= x.at_or_above {
            add(
                &x.hazard,
                &format!("pH {}", fixed(ph, 1)),
                &format!(
                    "a pH of {} or less, or {} or more, indicates it ({})",
                    x.at_or_below,
                    x.at_or_above,
                    ghs.hazard(&x.hazard)
                        .map(|h| h.citation())
                        .unwrap_or_default()
                ),
            );
        }
    }
    let mut words: Vec<HazardWord> = words.into_iter().map(|(_, w)| w).collect();
    // Physical hazards first, then health, then the environment, as GHS orders its parts.
    words.sort_by_key(|w| w.part);
    (words, unmapped)
}

fn history(record: &Record) -> Vec<HistoryLine> {
    record
        .entries
        .iter()
        .map(|e| HistoryLine {
            seq: e.seq,
            kind: e.kind,
            when: e.when.clone(),
            by: e.by.clone(),
            file: e.file.clone(),
            verdict: e.verdict.clone(),
            accepted: e.accepted.clone(),
        })
        .collect()
}

impl WasteTag {
    /// The tag of a closed record (`record_name` is how the record is named on the tag).
    pub fn from_record(
        cat: &Catalog,
        th: &Thresholds,
        ghs: &GhsTable,
        record: &Record,
        record_name: &str,
    ) -> Result<WasteTag, TagError> {
        let close = record
            .entries
            .iter()
            .find(|e| e.kind == EntryKind::Close)
            .ok_or_else(|| TagError::NotClosed(record_name.to_string()))?;
        let vessel = record.current(cat, record_name)?;
        let state = state_at_rest(cat, th, &vessel)?;
        let (mut contents, classes) = contents_with_classes(cat, &vessel);
        let ph = state.as_ref().map(|s| s.ph);
        let (hazards, unmapped) = hazard_words(ghs, &mut contents, &classes, ph);
        Ok(WasteTag {
            tool: "offgas",
            version: env!("CARGO_PKG_VERSION"),
            record: record_name.to_string(),
            container: vessel.name.clone(),
            capacity_l: vessel.capacity_l.unwrap_or(vessel.volume_l),
            accumulation_start: record.entries[0].when.clone(),
            closed: close.when.clone(),
            closed_by: close.by.clone().unwrap_or_default(),
            ph,
            temperature_c: vessel.temperature_k - cat.physical.kelvin_offset,
            contents,
            hazards,
            unmapped,
            rule: ghs
                .listing
                .statement
                .split_whitespace()
                .collect::<Vec<_>>()
                .join(" "),
            cut_off_percent: ghs.listing.cut_off.value,
        })
    }
}

impl CarboyReport {
    /// What the record says the carboy holds now, with its history; the tag when closed.
    pub fn from_record(
        cat: &Catalog,
        th: &Thresholds,
        ghs: &GhsTable,
        record: &Record,
        record_name: &str,
    ) -> Result<CarboyReport, TagError> {
        let vessel = record.current(cat, record_name)?;
        let headspace = state_at_rest(cat, th, &vessel)?;
        let contents = contents(cat, &vessel);
        let capacity = vessel.capacity_l.unwrap_or(vessel.volume_l);
        let tag = if record.is_closed() {
            Some(WasteTag::from_record(cat, th, ghs, record, record_name)?)
        } else {
            None
        };
        Ok(CarboyReport {
            tool: "offgas",
            version: env!("CARGO_PKG_VERSION"),
            record: record_name.to_string(),
            container: vessel.name.clone(),
            closed: record.is_closed(),
            capacity_l: capacity,
            volume_l: vessel.volume_l,
            fill_percent: if capacity > 0.0 {
                100.0 * vessel.volume_l / capacity
            } else {
                0.0
            },
            history: history(record),
            contents: contents.constituents,
            water: contents.water,
            contents_notes: contents.notes,
            headspace,
            tag,
        })
    }
}
