//! Laying out a report as a terminal table or markdown. No chemistry here.

use crate::basics::notation::pretty;
use crate::catalog::GasKind;
use crate::pour::pairs::{pairs_that_matter, Extent, Pair};
use crate::report::{CheckReport, Finding, GasReport, Severity, StateReport};
use comfy_table::{presets, Cell, CellAlignment, ContentArrangement, Table};
use owo_colors::OwoColorize;
use std::fmt::Write;

/// How many pairs the default view shows.
pub const DEFAULT_PAIRS: usize = 12;

#[derive(Debug, Clone, Copy)]
pub struct View {
    pub color: bool,
    pub all_pairs: bool,
    /// Characters the courses under the verdict may use.
    pub charset: crate::output::plot::spark::Charset,
}

/// Columns of a gas's course under the verdict.
const COURSE_WIDTH: usize = 24;

/// One line per gas that reaches a tenth of its review level along the pour as written:
/// its course on a log scale over four decades below its peak, the peak's column between
/// brackets.
pub fn course_lines(r: &CheckReport, charset: crate::output::plot::spark::Charset) -> Vec<String> {
    use crate::output::plot::spark;
    let o = &r.poured_as_written;
    o.gas_peaks
        .iter()
        .filter(|p| p.limit_ratio.is_some_and(|x| x >= 0.1) && p.headspace_ppm > 0.0)
        .filter_map(|peak| {
            let points: Vec<(f64, f64)> = o
                .path
                .iter()
                .filter_map(|pt| {
                    let g = pt.gases.iter().find(|g| g.formula == peak.formula)?;
                    Some((pt.fraction_added, g.headspace_ppm.max(1e-30).log10()))
                })
                .collect();
            if points.len() < 2 {
                return None;
            }
            let hi = peak.headspace_ppm.log10();
            let values = spark::resample(&points, COURSE_WIDTH);
            let mark = (peak.fraction_added * (COURSE_WIDTH - 1) as f64).round() as usize;
            Some(format!(
                "  {:<5} {}  peak {} ppm at {:.0} % poured",
                match charset {
                    spark::Charset::Unicode => crate::basics::notation::pretty(&peak.formula),
                    spark::Charset::Ascii => peak.formula.clone(),
                },
                spark::line(&values, hi - 4.0, hi, Some(mark), charset),
                crate::output::plot::chart::short_number(peak.headspace_ppm),
                peak.fraction_added * 100.0
            ))
        })
        .collect()
}

fn verdict_word(s: Severity, color: bool) -> String {
    let w = s.word().to_uppercase();
    if !color {
        return w;
    }
    match s {
        Severity::Stop => w.red().bold().to_string(),
        Severity::Review => w.yellow().bold().to_string(),
        Severity::Clear => w.green().bold().to_string(),
        Severity::Info => w,
    }
}

fn fmt_ppm(v: f64) -> String {
    if v >= 1e5 {
        format!("{v:.2e}")
    } else if v >= 100.0 {
        format!("{v:.0}")
    } else if v >= 1.0 {
        format!("{v:.1}")
    } else if v >= 0.01 {
        format!("{v:.3}")
    } else {
        format!("{v:.1e}")
    }
}

/// A headspace level for a table cell: ppm, or "over 1 atm" where the partial pressure
/// passes the atmosphere's (the figure in ppm would mean nothing).
fn ppm_cell(g: &GasReport) -> String {
    if g.partial_pressure_kpa >= 101.325 {
        format!(
            "over 1 atm ({} kPa)",
            crate::basics::text::fixed(g.partial_pressure_kpa, 0)
        )
    } else {
        fmt_ppm(g.headspace_ppm)
    }
}

/// The ratio that judges a gas in the headspace, at its own worst point along the pour
/// as written; an asphyxiant is judged by pressure and the room instead.
fn judged_ratio(r: &CheckReport, g: &GasReport) -> String {
    if !g.kinds.contains(&GasKind::Toxic) {
        return "by pressure and room".into();
    }
    let peak = r
        .poured_as_written
        .gas_peaks
        .iter()
        .find(|p| p.formula == g.formula)
        .and_then(|p| p.limit_ratio);
    fmt_ratio(peak.or(g.limit_ratio))
}

fn fmt_opt(v: Option<f64>) -> String {
    v.map(fmt_ppm).unwrap_or_else(|| "none".into())
}

fn fmt_ratio(v: Option<f64>) -> String {
    match v {
        Some(r) if r >= 10.0 => format!("{r:.0}×"),
        Some(r) if r >= 0.01 => format!("{r:.2}×"),
        Some(r) => format!("{r:.0e}×"),
        None => "-".into(),
    }
}

fn table() -> Table {
    let mut t = Table::new();
    t.load_preset(presets::UTF8_FULL_CONDENSED)
        .set_content_arrangement(ContentArrangement::Dynamic)
        .set_width(110);
    t
}

fn finding_line(f: &Finding, color: bool) -> String {
    let tag = match f.severity {
        Severity::Info => "note".to_string(),
        s => s.word().to_string(),
    };
    let tag = if color {
        match f.severity {
            Severity::Stop => tag.red().bold().to_string(),
            Severity::Review => tag.yellow().bold().to_string(),
            _ => tag.dimmed().to_string(),
        }
    } else {
        tag
    };
    let from = if f.origin == "chemistry" {
        String::new()
    } else {
        format!("\n         from: {}", f.origin)
    };
    format!("  [{tag}] {}\n         {}{from}", f.message, f.caution)
}

/// One gas across the states a report shows: at the end, worst as written, worst the other way.
struct GasRow<'a> {
    formula: String,
    end: Option<&'a GasReport>,
    worst: Option<&'a GasReport>,
    other: Option<&'a GasReport>,
}

impl GasRow<'_> {
    fn any(&self) -> &GasReport {
        self.worst
            .or(self.end)
            .or(self.other)
            .expect("a row exists because one state lists the gas")
    }
}

fn gas_rows(report: &CheckReport) -> Vec<GasRow<'_>> {
    let mut names: Vec<&str> = Vec::new();
    for s in [&report.end_state, &report.worst_state.state] {
        for g in &s.gases {
            if !names.contains(&g.formula.as_str()) {
                names.push(&g.formula);
            }
        }
    }
    let find = |s: &'_ StateReport, n: &str| -> Option<usize> {
        s.gases.iter().position(|g| g.formula == n)
    };
    names
        .into_iter()
        .map(|n| GasRow {
            formula: n.to_string(),
            end: find(&report.end_state, n).map(|i| &report.end_state.gases[i]),
            worst: find(&report.worst_state.state, n).map(|i| &report.worst_state.state.gases[i]),
            other: report
                .poured_other_way
                .as_ref()
                .and_then(|o| find(&o.worst_state.state, n).map(|i| &o.worst_state.state.gases[i])),
        })
        .collect()
}

/// Column heads of the gas table, the same in every format.
pub const GAS_HEADS: [&str; 7] = [
    "gas",
    "at the end",
    "worst while pouring",
    "other order, worst",
    "review at",
    "stop at",
    "its own worst / review",
];

/// The gas table's cells (formulas typeset), the same in every format.
pub fn gas_cells(r: &CheckReport) -> Vec<Vec<String>> {
    gas_rows(r)
        .into_iter()
        .map(|row| {
            let any = row.any();
            vec![
                pretty(&row.formula),
                row.end.map(ppm_cell).unwrap_or("-".into()),
                row.worst.map(ppm_cell).unwrap_or("-".into()),
                row.other.map(ppm_cell).unwrap_or("-".into()),
                fmt_opt(any.limit_ppm),
                fmt_opt(any.idlh_ppm),
                judged_ratio(r, any),
            ]
        })
        .collect()
}

/// What stands above the gas table: gases the findings name but nothing computed, and the
/// line for an empty table.
pub fn gas_table_notes(r: &CheckReport) -> Vec<String> {
    let mut out = Vec::new();
    if !r.uncomputed_gases.is_empty() {
        out.push(format!(
            "Named by the findings but not computed: {} (their amounts are not in this table).",
            r.uncomputed_gases
                .iter()
                .map(|g| pretty(g))
                .collect::<Vec<_>>()
                .join(", ")
        ));
    }
    if gas_rows(r).is_empty() {
        out.push("No computed gas reaches 1e-6 ppm.".into());
    }
    out
}

/// Column heads of the pair table, the same in every format.
pub const PAIR_HEADS: [&str; 8] = [
    "donor",
    "from",
    "acceptor",
    "from",
    "gives",
    "log K",
    "extent",
    "gas formed",
];

/// The pairs a report shows (all of them, or those that matter most).
pub fn shown_pairs(r: &CheckReport, all: bool) -> Vec<&Pair> {
    if all {
        r.pairs.iter().collect()
    } else {
        pairs_that_matter(&r.pairs, DEFAULT_PAIRS)
    }
}

/// The pair table's cells (formulas typeset), the same in every format.
pub fn pair_cells(pairs: &[&Pair]) -> Vec<Vec<String>> {
    pairs
        .iter()
        .map(|p| {
            vec![
                pretty(&p.donor),
                format!("{:?}", p.donor_side).to_lowercase(),
                pretty(&p.acceptor),
                format!("{:?}", p.acceptor_side).to_lowercase(),
                format!(
                    "{} + {}",
                    pretty(&p.produced_base),
                    crate::basics::notation::pretty_words(&p.produced_acid)
                ),
                format!("{:.1}", p.log_k),
                extent_word(p.extent).to_string(),
                p.volatile_products
                    .iter()
                    .map(|g| pretty(g))
                    .collect::<Vec<_>>()
                    .join(", "),
            ]
        })
        .collect()
}

/// Column heads of the room table, the same in every format.
pub const ROOM_HEADS: [&str; 7] = [
    "gas",
    "worst case, ppm",
    "vs stop level",
    "evaporation mg/min",
    "steady state, ppm",
    "short-term level after",
    "stop level after",
];

/// The room table's cells, the same in every format.
pub fn room_cells(r: &CheckReport) -> Vec<Vec<String>> {
    let minutes = |m: Option<f64>| {
        m.map(|m| format!("{m:.0} min"))
            .unwrap_or_else(|| "never".into())
    };
    r.room
        .gases
        .iter()
        .map(|g| {
            vec![
                pretty(&g.formula),
                fmt_ppm(g.worst_case_room_ppm),
                fmt_ratio(g.worst_case_idlh_ratio),
                format!("{:.3}", g.emission_mg_per_min),
                fmt_ppm(g.steady_state_ppm),
                minutes(g.minutes_to_short_term),
                minutes(g.minutes_to_idlh),
            ]
        })
        .collect()
}

/// The terminal view: verdict and reasons first, then gases, states, pairs, cautions.
pub fn check_table(r: &CheckReport, v: View) -> String {
    let mut out = String::new();
    verdict_text(&mut out, r, v);
    course_text(&mut out, r, v);
    gas_text(&mut out, r);
    states_text(&mut out, r);
    for line in bound_lines(r) {
        let _ = writeln!(out, "  {line}");
    }
    out.push_str(&heat_and_room_text(r, ListStyle::Terminal));

    pairs_text(&mut out, r, v);
    out.push_str(&closing_lists(
        &r.assumptions,
        &r.cautions,
        ListStyle::Terminal,
    ));
    out
}

/// The header, the verdict and every finding, the reason that decides first.
fn verdict_text(out: &mut String, r: &CheckReport, v: View) {
    let _ = writeln!(
        out,
        "offgas check: {} ({}) into {} ({})",
        r.stream.name, r.stream.file, r.container.name, r.container.file
    );
    let _ = writeln!(out, "\nVerdict: {}", verdict_word(r.severity, v.color));
    let shown: Vec<&Finding> = r.findings.iter().collect();
    if shown.is_empty() {
        let _ = writeln!(
            out,
            "  No gas reaches a level of concern, and nothing was left unassessed."
        );
    }
    for f in shown {
        let _ = writeln!(out, "{}", finding_line(f, v.color));
    }
}

/// Each gas's course along the pour as written, one line each.
fn course_text(out: &mut String, r: &CheckReport, v: View) {
    let courses = course_lines(r, v.charset);
    if !courses.is_empty() {
        let _ = writeln!(
            out,
            "\nAlong the pour as written (first drop to last, log scale, peak in brackets)"
        );
        for c in courses {
            let _ = writeln!(out, "{c}");
        }
    }
}

/// The headspace gases with their levels.
fn gas_text(out: &mut String, r: &CheckReport) {
    let _ = writeln!(out, "\nGas in the headspace (ppm by volume at 1 atm)");
    for note in gas_table_notes(r) {
        let _ = writeln!(out, "  {note}");
    }
    let cells = gas_cells(r);
    if !cells.is_empty() {
        let mut t = table();
        t.set_header(GAS_HEADS.to_vec());
        for row in cells {
            t.add_row(row.into_iter().enumerate().map(|(i, c)| {
                let cell = Cell::new(c);
                if i == 0 {
                    cell
                } else {
                    cell.set_alignment(CellAlignment::Right)
                }
            }));
        }
        let _ = writeln!(out, "{t}");
    }
}

/// The liquid before, at the end, at the worst point of each order.
fn states_text(out: &mut String, r: &CheckReport) {
    let _ = writeln!(out, "\nStates of the liquid");
    let mut t = table();
    t.set_header(vec![
        "state",
        "stream added",
        "pH",
        "°C",
        "I mol/L",
        "liquid L",
        "headspace L",
        "gas kPa",
    ]);
    let mut state_row = |label: &str, frac: String, s: &StateReport| {
        t.add_row(vec![
            label.to_string(),
            frac,
            format!("{:.2}", s.ph),
            format!("{:.1}", s.temperature_c),
            format!(
                "{:.3}{}",
                s.ionic_strength,
                if s.activity_model_exceeded {
                    " (!)"
                } else {
                    ""
                }
            ),
            format!("{:.2}", s.volume_l),
            format!("{:.2}", s.headspace_l),
            format!("{:.3}", s.overpressure_kpa),
        ]);
    };
    state_row("container before", "0.0 %".into(), &r.container_alone);
    state_row("end", "100.0 %".into(), &r.end_state);
    state_row(
        "worst while pouring",
        format!("{:.1} %", r.worst_state.fraction_added * 100.0),
        &r.worst_state.state,
    );
    if let Some(o) = &r.poured_other_way {
        state_row(
            "other order, worst",
            format!("{:.1} %", o.worst_state.fraction_added * 100.0),
            &o.worst_state.state,
        );
    }
    let _ = writeln!(out, "{t}");
}

/// The proton transfers that explain the result.
fn pairs_text(out: &mut String, r: &CheckReport, v: View) {
    let pairs = shown_pairs(r, v.all_pairs);
    let _ = writeln!(
        out,
        "\nWhy: proton transfers between the two batches ({} of {} shown{})",
        pairs.len(),
        r.pairs.len(),
        if v.all_pairs {
            ""
        } else {
            "; --all-pairs shows every one"
        }
    );
    if !pairs.is_empty() {
        out.push_str(&grid(ListStyle::Terminal, &PAIR_HEADS, &pair_cells(&pairs)));
    }
}

/// What metal complexes hold of each ligand, and the solids that precipitated, at the end and
/// (where it differs) at the worst point of the pour: "End: cyanide 97 % held by metals
/// (Cu(CN)3^2- 96 %), free CN- 0.30 mM".
pub fn bound_lines(r: &CheckReport) -> Vec<String> {
    let mut out = Vec::new();
    let mut add = |label: &str, s: &StateReport| {
        for b in &s.bound_ligands {
            let held: Vec<String> = b
                .held_by
                .iter()
                .map(|h| format!("{} {:.0} %", pretty(&h.complex), h.percent))
                .collect();
            out.push(format!(
                "{label}: {} {:.0} % held by metals{}, free {} {}",
                b.family,
                b.bound_percent,
                if held.is_empty() {
                    String::new()
                } else {
                    format!(" ({})", held.join(", "))
                },
                pretty(&b.species),
                crate::basics::text::molar(b.free_mol_per_l)
            ));
        }
        for p in &s.precipitated {
            out.push(format!(
                "{label}: {} precipitates: {} of {} leaves the liquid as the solid",
                pretty(&p.solid),
                crate::basics::text::molar(p.mol_per_l),
                pretty(&p.metal)
            ));
        }
    };
    add("End", &r.end_state);
    if r.worst_state.fraction_added < 1.0 {
        add(
            &format!(
                "Worst point ({:.0} % added)",
                r.worst_state.fraction_added * 100.0
            ),
            &r.worst_state.state,
        );
    }
    out
}

/// Heat, pressure, hydrogen and the room, as plain lines and one table.
fn heat_and_room_text(r: &CheckReport, style: ListStyle) -> String {
    let mut out = String::new();
    // A line of text: indented under a heading in the terminal, a paragraph in markdown.
    let indent = if matches!(style, ListStyle::Terminal) {
        "  "
    } else {
        "- "
    };
    let h = &r.end_state.heat;
    if matches!(style, ListStyle::Terminal) {
        let _ = writeln!(out, "\nHeat and pressure");
    }
    let fixed = crate::basics::text::fixed;
    let _ = writeln!(
        out,
        "{indent}The pour {}: {} °C → {} °C{}.",
        h.released_words(1),
        fixed(h.start_temperature_c, 1),
        fixed(h.would_reach_c, 1),
        if h.boils { ", and it boils" } else { "" }
    );
    let e = &r.end_state;
    if e.vented_gas_l > 0.0 || e.overpressure_kpa == 0.0 {
        let _ = writeln!(
            out,
            "{indent}No pressure builds (vented or open): {} L of gas leaves at 1 atm, {} % of it toxic.",
            fixed(e.vented_gas_l, 2),
            fixed(e.vented_toxic_percent, 0)
        );
    } else {
        let _ = writeln!(
            out,
            "{indent}Sealed: {} kPa above atmospheric at the end ({} kPa of it from the gases the liquid gives off).",
            fixed(e.overpressure_kpa, 1),
            fixed(e.gas_pressure_kpa, 1)
        );
    }
    for g in &r.stoichiometric_gases {
        let _ = writeln!(
            out,
            "{indent}{}: {:.3} mol ({:.2} L at 1 atm), {:.1} % of the headspace{}.",
            g.formula,
            g.moles,
            g.litres_at_1_atm,
            g.headspace_percent,
            g.lfl_percent
                .map(|l| format!(", lower flammable limit {l} %"))
                .unwrap_or_default()
        );
    }
    let room = &r.room;
    let _ = writeln!(
        out,
        "\n{}Room ({} m3, {} air changes per hour; open surface: {}{})",
        if matches!(style, ListStyle::Markdown) {
            "### "
        } else {
            ""
        },
        room.settings.volume_m3,
        room.settings.air_changes_per_hour,
        room.settings.surface_basis,
        if room.open_surface_counts {
            ""
        } else {
            "; the container is sealed, so these apply if it is opened"
        }
    );
    if room.gases.is_empty() {
        let _ = writeln!(out, "{indent}Nothing volatile to release.");
        return out;
    }
    let _ = writeln!(out, "{indent}Worst case: {}.", room.settings.worst_case);
    out.push_str(&grid(style, &ROOM_HEADS, &room_cells(r)));
    out
}

/// A table: box-drawn for the terminal, pipes for markdown.
fn grid(style: ListStyle, headers: &[&str], rows: &[Vec<String>]) -> String {
    match style {
        ListStyle::Markdown => {
            let mut out = format!(
                "\n| {} |\n|{}\n",
                headers.join(" | "),
                "---|".repeat(headers.len())
            );
            for r in rows {
                let _ = writeln!(out, "| {} |", r.join(" | "));
            }
            out
        }
        _ => {
            let mut t = table();
            t.set_header(headers.to_vec());
            for r in rows {
                t.add_row(r.clone());
            }
            format!("{t}\n")
        }
    }
}

fn extent_word(e: Extent) -> &'static str {
    match e {
        Extent::Complete => "complete",
        Extent::Equilibrium => "equilibrium",
        Extent::Negligible => "negligible",
    }
}

/// Markdown for pasting into a ticket or a procedure file.
pub fn check_markdown(r: &CheckReport, v: View) -> String {
    let mut out = String::new();
    let _ = writeln!(
        out,
        "# offgas check: {} into {}\n",
        r.stream.name, r.container.name
    );
    let _ = writeln!(out, "**Verdict: {}**\n", r.severity.word().to_uppercase());
    for f in &r.findings {
        let tag = if f.severity == Severity::Info {
            "note"
        } else {
            f.severity.word()
        };
        let from = if f.origin == "chemistry" {
            String::new()
        } else {
            format!(" _From {}._", f.origin)
        };
        let _ = writeln!(out, "- **{tag}** {} {}{from}", f.message, f.caution);
    }
    let _ = writeln!(out, "\n## Gas in the headspace\n");
    for note in gas_table_notes(r) {
        let _ = writeln!(out, "{note}\n");
    }
    let cells = gas_cells(r);
    if !cells.is_empty() {
        out.push_str(&grid(ListStyle::Markdown, &GAS_HEADS, &cells));
    }
    let _ = writeln!(out, "\n## States\n");
    let _ = writeln!(
        out,
        "| state | stream added | pH | °C | I (mol/L) | gas kPa |"
    );
    let _ = writeln!(out, "|---|---:|---:|---:|---:|---:|");
    let mut row = |label: &str, f: f64, s: &StateReport| {
        let _ = writeln!(
            out,
            "| {label} | {:.1} % | {:.2} | {:.1} | {:.3} | {:.3} |",
            f * 100.0,
            s.ph,
            s.temperature_c,
            s.ionic_strength,
            s.overpressure_kpa
        );
    };
    row("container before", 0.0, &r.container_alone);
    row("end", 1.0, &r.end_state);
    row(
        "worst while pouring",
        r.worst_state.fraction_added,
        &r.worst_state.state,
    );
    if let Some(o) = &r.poured_other_way {
        row(
            "other order, worst",
            o.worst_state.fraction_added,
            &o.worst_state.state,
        );
    }
    let bound = bound_lines(r);
    if !bound.is_empty() {
        out.push('\n');
        for line in bound {
            let _ = writeln!(out, "- {line}");
        }
    }
    let _ = writeln!(
        out,
        "\n## Heat, pressure and the room\n{}",
        heat_and_room_text(r, ListStyle::Markdown)
    );
    let pairs = shown_pairs(r, v.all_pairs);
    let _ = writeln!(out, "\n## Why: proton transfers\n");
    out.push_str(&grid(ListStyle::Markdown, &PAIR_HEADS, &pair_cells(&pairs)));
    out.push_str(&closing_lists(
        &r.assumptions,
        &r.cautions,
        ListStyle::Markdown,
    ));
    out
}

/// How a list of lines is laid out.
#[derive(Debug, Clone, Copy)]
pub enum ListStyle {
    Terminal,
    Markdown,
    Html,
}

/// The assumptions and cautions that end every report, in one layout for every format.
pub fn closing_lists(assumptions: &[String], cautions: &[String], style: ListStyle) -> String {
    let mut out = String::new();
    for (title, items) in [("Assumptions", assumptions), ("Cautions", cautions)] {
        match style {
            ListStyle::Terminal => {
                let _ = writeln!(out, "\n{title}");
                for i in items {
                    let _ = writeln!(out, "  - {i}");
                }
            }
            ListStyle::Markdown => {
                let _ = writeln!(out, "\n## {title}\n");
                for i in items {
                    let _ = writeln!(out, "- {i}");
                }
            }
            ListStyle::Html => {
                let _ = writeln!(out, "<h2>{title}</h2><ul>");
                for i in items {
                    let _ = writeln!(out, "<li>{}</li>", crate::output::page::prose(i));
                }
                let _ = writeln!(out, "</ul>");
            }
        }
    }
    out
}
