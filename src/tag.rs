//! What a carboy's record says it holds: the contents report of `offgas log show` and the
//! waste tag of `offgas log close`, with their layouts (terminal, markdown, one printable
//! HTML page; JSON is the models serialised).
//!
//! Everything here is derived from the record's history, never stored apart from it: the
//! contents by substance name with their share of the mass, water as the balance, the pH
//! of the contents as solved at rest, and the GHS hazard classes the constituents usually
//! bring (data/ghs.yaml). offgas's own hazard classes decide which GHS classes are listed
//! but never appear on a tag: a waste contractor reads substance names and GHS words.

use crate::batch::Batch;
use crate::catalog::ghs::{GhsPart, GhsTable};
use crate::catalog::{Catalog, SubstanceId};
use crate::chem::SolveError;
use crate::html::{esc, page};
use crate::record::{EntryKind, Record};
use crate::report::StateReport;
use crate::text::fixed;
use crate::thresholds::Thresholds;
use comfy_table::{presets, Cell, CellAlignment, ContentArrangement, Table};
use serde::Serialize;
use std::fmt::Write;

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
    Input(#[from] crate::batch::InputError),
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
    Ok(Some(crate::assess::state_report(cat, th, &eq, &heat)))
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

/// "2026-05-04T09:30:00Z" as "2026-05-04 09:30 UTC"; anything else as written.
pub fn when_words(rfc3339: &str) -> String {
    match rfc3339.split_once('T') {
        Some((date, time)) if time.ends_with('Z') && time.len() >= 6 => {
            format!("{date} {} UTC", &time[..5])
        }
        _ => rfc3339.to_string(),
    }
}

fn amount_words(mass_g: f64) -> String {
    if mass_g >= 1000.0 {
        format!("{} kg", fixed(mass_g / 1e3, 3))
    } else if mass_g >= 1.0 {
        format!("{} g", fixed(mass_g, 1))
    } else {
        format!("{} mg", fixed(mass_g * 1e3, 1))
    }
}

fn percent_words(p: f64) -> String {
    if p >= 0.1 || p == 0.0 {
        format!("{} %", fixed(p, 2))
    } else if p >= 0.001 {
        format!("{} %", fixed(p, 4))
    } else {
        "below 0.001 %".into()
    }
}

fn mol_words(mol: f64) -> String {
    if mol >= 0.01 {
        fixed(mol, 3)
    } else {
        format!("{mol:.2e}")
    }
}

fn name_words(c: &Constituent) -> String {
    let mut s = c.substance.clone();
    if let Some(cas) = &c.cas {
        s.push_str(&format!(" (CAS {cas})"));
    }
    if !c.added_as.is_empty() {
        s.push_str(&format!(", added as {}", c.added_as.join(", ")));
    }
    s
}

fn ph_words(ph: Option<f64>) -> String {
    ph.map(|p| fixed(p, 1))
        .unwrap_or_else(|| "no liquid".into())
}

fn part_word(p: GhsPart) -> &'static str {
    match p {
        GhsPart::Physical => "physical",
        GhsPart::Health => "health",
        GhsPart::Environmental => "environment",
    }
}

fn terminal_table() -> Table {
    let mut t = Table::new();
    t.load_preset(presets::UTF8_FULL_CONDENSED)
        .set_content_arrangement(ContentArrangement::Dynamic)
        .set_width(110);
    t
}

fn contents_table(contents: &[Constituent], water: &WaterBalance) -> Table {
    let mut t = terminal_table();
    t.set_header(vec!["constituent", "% by mass", "amount", "mol"]);
    for c in contents {
        t.add_row(vec![
            Cell::new(name_words(c)),
            Cell::new(percent_words(c.mass_percent)).set_alignment(CellAlignment::Right),
            Cell::new(amount_words(c.mass_g)).set_alignment(CellAlignment::Right),
            Cell::new(mol_words(c.mol)).set_alignment(CellAlignment::Right),
        ]);
    }
    t.add_row(vec![
        Cell::new("water (the balance)"),
        Cell::new(percent_words(water.mass_percent)).set_alignment(CellAlignment::Right),
        Cell::new(amount_words(water.mass_g)).set_alignment(CellAlignment::Right),
        Cell::new("-").set_alignment(CellAlignment::Right),
    ]);
    t
}

/// The tag for a terminal.
pub fn tag_table(t: &WasteTag) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "WASTE TAG");
    let _ = writeln!(
        out,
        "  container           {}, {} L",
        t.container,
        fixed(t.capacity_l, 1)
    );
    let _ = writeln!(
        out,
        "  contents            {} L, {} kg, pH {}",
        fixed(t.contents.volume_l, 2),
        fixed(t.contents.mass_g / 1e3, 3),
        ph_words(t.ph)
    );
    let _ = writeln!(
        out,
        "  accumulation start  {}",
        when_words(&t.accumulation_start)
    );
    let _ = writeln!(
        out,
        "  closed              {} by {}",
        when_words(&t.closed),
        t.closed_by
    );
    let _ = writeln!(out, "  record              {}", t.record);
    let _ = writeln!(out, "\nContents");
    let _ = writeln!(
        out,
        "{}",
        contents_table(&t.contents.constituents, &t.contents.water)
    );
    let _ = writeln!(out, "\nHazards (GHS hazard classes)");
    if t.hazards.is_empty() {
        let _ = writeln!(out, "  none listed by the rule below");
    }
    for h in &t.hazards {
        let _ = writeln!(
            out,
            "  - {} ({}): from {}\n      source: {}; basis: {}",
            h.hazard,
            part_word(h.part),
            h.from.join(", "),
            h.citation,
            h.basis
        );
    }
    tag_footer_terminal(t, &mut out);
    out
}

fn below_cut_off(t: &WasteTag) -> Vec<&str> {
    t.contents
        .constituents
        .iter()
        .filter(|c| c.below_cut_off)
        .map(|c| c.substance.as_str())
        .collect()
}

fn tag_footer_terminal(t: &WasteTag, out: &mut String) {
    let below = below_cut_off(t);
    if !below.is_empty() {
        let _ = writeln!(
            out,
            "  Below {} % and not counted for hazard words: {}.",
            t.cut_off_percent,
            below.join(", ")
        );
    }
    if !t.unmapped.is_empty() {
        let _ = writeln!(
            out,
            "  No hazard words known for: {}; see their safety data sheets.",
            t.unmapped.join(", ")
        );
    }
    let _ = writeln!(out, "\n{}", t.rule);
    for n in &t.contents.notes {
        let _ = writeln!(out, "Note: {n}.");
    }
}

/// The tag as markdown.
pub fn tag_markdown(t: &WasteTag) -> String {
    let mut out = String::new();
    tag_markdown_into(t, "#", &mut out);
    out
}

fn contents_markdown(contents: &[Constituent], water: &WaterBalance, out: &mut String) {
    let _ = writeln!(out, "| constituent | % by mass | amount | mol |");
    let _ = writeln!(out, "|---|---:|---:|---:|");
    for c in contents {
        let _ = writeln!(
            out,
            "| {} | {} | {} | {} |",
            name_words(c),
            percent_words(c.mass_percent),
            amount_words(c.mass_g),
            mol_words(c.mol)
        );
    }
    let _ = writeln!(
        out,
        "| water (the balance) | {} | {} | - |",
        percent_words(water.mass_percent),
        amount_words(water.mass_g)
    );
}

fn tag_markdown_into(t: &WasteTag, h: &str, out: &mut String) {
    let _ = writeln!(out, "{h} Waste tag\n");
    let _ = writeln!(
        out,
        "- **Container:** {}, {} L",
        t.container,
        fixed(t.capacity_l, 1)
    );
    let _ = writeln!(
        out,
        "- **Contents:** {} L, {} kg, pH {}",
        fixed(t.contents.volume_l, 2),
        fixed(t.contents.mass_g / 1e3, 3),
        ph_words(t.ph)
    );
    let _ = writeln!(
        out,
        "- **Accumulation start:** {}",
        when_words(&t.accumulation_start)
    );
    let _ = writeln!(
        out,
        "- **Closed:** {} by {}",
        when_words(&t.closed),
        t.closed_by
    );
    let _ = writeln!(out, "- **Record:** `{}`\n", t.record);
    let _ = writeln!(out, "{h}# Contents\n");
    contents_markdown(&t.contents.constituents, &t.contents.water, out);
    let _ = writeln!(out, "\n{h}# Hazards (GHS hazard classes)\n");
    if t.hazards.is_empty() {
        let _ = writeln!(out, "None listed by the rule below.");
    }
    for w in &t.hazards {
        let _ = writeln!(
            out,
            "- **{}** ({}): from {}. _Source: {}; basis: {}._",
            w.hazard,
            part_word(w.part),
            w.from.join(", "),
            w.citation,
            w.basis
        );
    }
    let below = below_cut_off(t);
    if !below.is_empty() {
        let _ = writeln!(
            out,
            "\nBelow {} % and not counted for hazard words: {}.",
            t.cut_off_percent,
            below.join(", ")
        );
    }
    if !t.unmapped.is_empty() {
        let _ = writeln!(
            out,
            "\nNo hazard words known for: {}; see their safety data sheets.",
            t.unmapped.join(", ")
        );
    }
    let _ = writeln!(out, "\n{}\n", t.rule);
    for n in &t.contents.notes {
        let _ = writeln!(out, "- _Note: {n}._");
    }
}

const TAG_STYLE: &str = r#"
.tag { border: 3px solid #111; padding: 6mm; page-break-inside: avoid; }
.tag h1 { font-size: 20pt; letter-spacing: 0.08em; margin-bottom: 3mm; }
.fields { display: grid; grid-template-columns: 40mm 1fr; gap: 1.5mm 4mm; margin: 0 0 4mm; }
.fields dt { font-weight: bold; } .fields dd { margin: 0; }
ul.hazards { list-style: none; padding: 0; }
ul.hazards li { border-left: 5pt solid #b22; padding: 2pt 6pt; margin: 3pt 0; }
ul.hazards li strong { font-size: 11.5pt; }
.rule { border-top: 1px solid #888; margin-top: 4mm; padding-top: 2mm; }
@media print {
  .tag { padding: 4mm; border-width: 2px; }
  .tag h1 { font-size: 16pt; margin-bottom: 2mm; }
  .tag h2 { margin-top: 8pt; }
  .tag .small { font-size: 7.5pt; }
  ul.hazards li { margin: 1.5pt 0; padding: 1pt 5pt; }
  ul.hazards li strong { font-size: 10.5pt; }
}
"#;

fn tag_section(t: &WasteTag, out: &mut String) {
    let _ = writeln!(out, "<section class=\"tag\">\n<h1>WASTE TAG</h1>");
    let _ = writeln!(out, "<dl class=\"fields\">");
    let field = |out: &mut String, k: &str, v: &str| {
        let _ = writeln!(out, "<dt>{k}</dt><dd>{v}</dd>");
    };
    field(
        out,
        "Container",
        &format!("{} ({} L)", esc(&t.container), fixed(t.capacity_l, 1)),
    );
    field(
        out,
        "Contents",
        &format!(
            "{} L, {} kg",
            fixed(t.contents.volume_l, 2),
            fixed(t.contents.mass_g / 1e3, 3)
        ),
    );
    field(out, "pH", &ph_words(t.ph));
    field(
        out,
        "Accumulation start",
        &esc(&when_words(&t.accumulation_start)),
    );
    field(out, "Closed", &esc(&when_words(&t.closed)));
    field(out, "Closed by", &esc(&t.closed_by));
    field(out, "Record", &format!("<code>{}</code>", esc(&t.record)));
    let _ = writeln!(out, "</dl>");
    let _ = writeln!(out, "<h2>Hazards (GHS hazard classes)</h2>");
    if t.hazards.is_empty() {
        let _ = writeln!(out, "<p>None listed by the rule below.</p>");
    } else {
        let _ = writeln!(out, "<ul class=\"hazards\">");
        for w in &t.hazards {
            let _ = writeln!(
                out,
                "<li><strong>{}</strong> ({}): from {}<br><span class=\"small\">Source: {}; basis: {}.</span></li>",
                esc(&w.hazard),
                part_word(w.part),
                esc(&w.from.join(", ")),
                esc(&w.citation),
                esc(&w.basis)
            );
        }
        let _ = writeln!(out, "</ul>");
    }
    let _ = writeln!(out, "<h2>Contents</h2>");
    contents_html(&t.contents.constituents, &t.contents.water, out);
    let below = below_cut_off(t);
    if !below.is_empty() {
        let _ = writeln!(
            out,
            "<p class=\"small\">Below {} % and not counted for hazard words: {}.</p>",
            t.cut_off_percent,
            esc(&below.join(", "))
        );
    }
    if !t.unmapped.is_empty() {
        let _ = writeln!(
            out,
            "<p class=\"small\">No hazard words known for: {}; see their safety data sheets.</p>",
            esc(&t.unmapped.join(", "))
        );
    }
    let _ = writeln!(out, "<p class=\"rule\">{}</p>", esc(&t.rule));
    for n in &t.contents.notes {
        let _ = writeln!(out, "<p class=\"small\">Note: {}.</p>", esc(n));
    }
    let _ = writeln!(
        out,
        "<p class=\"small\">Made by {} {} from the record's history.</p>\n</section>",
        esc(t.tool),
        esc(t.version)
    );
}

fn contents_html(contents: &[Constituent], water: &WaterBalance, out: &mut String) {
    let _ = writeln!(out, "<table>\n<thead><tr><th>Constituent</th><th class=\"num\">% by mass</th><th class=\"num\">Amount</th><th class=\"num\">mol</th></tr></thead>\n<tbody>");
    for c in contents {
        let _ = writeln!(
            out,
            "<tr><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>",
            esc(&name_words(c)),
            percent_words(c.mass_percent),
            amount_words(c.mass_g),
            mol_words(c.mol)
        );
    }
    let _ = writeln!(
        out,
        "<tr><td>water (the balance)</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">-</td></tr>\n</tbody>\n</table>",
        percent_words(water.mass_percent),
        amount_words(water.mass_g)
    );
}

/// The tag as one self-contained printable page.
pub fn tag_html(t: &WasteTag) -> String {
    let mut body = String::new();
    tag_section(t, &mut body);
    page(&format!("Waste tag: {}", t.container), TAG_STYLE, &body)
}

fn history_words(h: &HistoryLine) -> String {
    match h.kind {
        EntryKind::Start => format!("started from {}", h.file.as_deref().unwrap_or("?")),
        EntryKind::Add => format!(
            "added {} ({}){}",
            h.file.as_deref().unwrap_or("?"),
            h.verdict.as_deref().unwrap_or("?"),
            h.accepted
                .as_ref()
                .map(|a| format!(", accepted: {a}"))
                .unwrap_or_default()
        ),
        EntryKind::Close => "closed for pickup".into(),
    }
}

fn headspace_lines(r: &CarboyReport) -> Vec<String> {
    let Some(s) = &r.headspace else {
        return vec!["empty: nothing to assess".into()];
    };
    let mut lines = vec![format!(
        "pH {}, {} °C",
        fixed(s.ph, 2),
        fixed(s.temperature_c, 1)
    )];
    let shown: Vec<_> = s.gases.iter().filter(|g| g.headspace_ppm >= 0.01).collect();
    if shown.is_empty() {
        lines.push("no volatile form above 0.01 ppm".into());
    }
    for g in shown {
        lines.push(format!(
            "{} {} ppm (review at {}, stop at {})",
            g.formula,
            fixed(g.headspace_ppm, 2),
            g.limit_ppm
                .map(|v| format!("{v} ppm"))
                .unwrap_or_else(|| "none".into()),
            g.idlh_ppm
                .map(|v| format!("{v} ppm"))
                .unwrap_or_else(|| "none".into())
        ));
    }
    lines
}

fn fill_words(r: &CarboyReport) -> String {
    format!(
        "filled to {} of {} L ({} %)",
        fixed(r.volume_l, 2),
        fixed(r.capacity_l, 1),
        fixed(r.fill_percent, 0)
    )
}

/// `log show` for a terminal.
pub fn carboy_table(r: &CarboyReport) -> String {
    let mut out = String::new();
    let _ = writeln!(
        out,
        "{} ({}){}\n{}\n\nHistory",
        r.container,
        r.record,
        if r.closed { ", CLOSED for pickup" } else { "" },
        fill_words(r)
    );
    for h in &r.history {
        let _ = writeln!(
            out,
            "  {:>3}  {}  {:<16} {}",
            h.seq,
            when_words(&h.when),
            h.by.as_deref().unwrap_or("-"),
            history_words(h)
        );
    }
    let _ = writeln!(out, "\nWhat it holds now (derived from the history)");
    if r.volume_l <= 0.0 {
        let _ = writeln!(out, "  nothing yet");
    } else {
        let _ = writeln!(out, "{}", contents_table(&r.contents, &r.water));
    }
    let _ = writeln!(out, "\nHeadspace now");
    for l in headspace_lines(r) {
        let _ = writeln!(out, "  {l}");
    }
    if let Some(t) = &r.tag {
        let _ = writeln!(out, "\n{}", tag_table(t));
    }
    out
}

/// `log show` as markdown.
pub fn carboy_markdown(r: &CarboyReport) -> String {
    let mut out = String::new();
    let _ = writeln!(
        out,
        "# Carboy record: {}{}\n",
        r.container,
        if r.closed { " (closed for pickup)" } else { "" }
    );
    let _ = writeln!(out, "Record `{}`, {}.\n", r.record, fill_words(r));
    let _ = writeln!(out, "## History\n");
    let _ = writeln!(out, "| # | when | by | what |");
    let _ = writeln!(out, "|---:|---|---|---|");
    for h in &r.history {
        let _ = writeln!(
            out,
            "| {} | {} | {} | {} |",
            h.seq,
            when_words(&h.when),
            h.by.as_deref().unwrap_or("-"),
            history_words(h)
        );
    }
    let _ = writeln!(out, "\n## What it holds now\n");
    contents_markdown(&r.contents, &r.water, &mut out);
    let _ = writeln!(out, "\n## Headspace now\n");
    for l in headspace_lines(r) {
        let _ = writeln!(out, "- {l}");
    }
    if let Some(t) = &r.tag {
        out.push('\n');
        tag_markdown_into(t, "##", &mut out);
    }
    out
}

/// `log show` as one self-contained printable page.
pub fn carboy_html(r: &CarboyReport) -> String {
    let mut body = String::new();
    let _ = writeln!(
        body,
        "<h1>Carboy record: {}{}</h1>",
        esc(&r.container),
        if r.closed { " (closed for pickup)" } else { "" }
    );
    let _ = writeln!(
        body,
        "<p>Record <code>{}</code>, {}.</p>",
        esc(&r.record),
        fill_words(r)
    );
    let _ = writeln!(body, "<h2>History</h2>\n<table>\n<thead><tr><th class=\"num\">#</th><th>When</th><th>By</th><th>What</th></tr></thead>\n<tbody>");
    for h in &r.history {
        let _ = writeln!(
            body,
            "<tr><td class=\"num\">{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            h.seq,
            esc(&when_words(&h.when)),
            esc(h.by.as_deref().unwrap_or("-")),
            esc(&history_words(h))
        );
    }
    let _ = writeln!(body, "</tbody>\n</table>\n<h2>What it holds now</h2>");
    contents_html(&r.contents, &r.water, &mut body);
    let _ = writeln!(body, "<h2>Headspace now</h2>\n<ul>");
    for l in headspace_lines(r) {
        let _ = writeln!(body, "<li>{}</li>", esc(&l));
    }
    let _ = writeln!(body, "</ul>");
    for n in &r.contents_notes {
        let _ = writeln!(body, "<p class=\"small\">Note: {}.</p>", esc(n));
    }
    if let Some(t) = &r.tag {
        tag_section(t, &mut body);
    }
    page(&format!("Carboy record: {}", r.container), TAG_STYLE, &body)
}
