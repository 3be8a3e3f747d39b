//! The layouts of a carboy's contents report and its waste tag: terminal, markdown and one
//! printable HTML page. Layout only; every number comes from the models in `record::tag`.

use crate::basics::text::fixed;
use crate::catalog::ghs::GhsPart;
use crate::output::page::{esc, page};
use crate::record::tag::{CarboyReport, Constituent, HistoryLine, WasteTag, WaterBalance};
use crate::record::EntryKind;
use comfy_table::{presets, Cell, CellAlignment, ContentArrangement, Table};
use std::fmt::Write;

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
