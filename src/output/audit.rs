//! The audit report for a terminal (findings and per-cabinet matrices) and as one
//! self-contained HTML page with an inline SVG matrix per cabinet. Layout only.

use crate::output::audit_drawing as drawing;
use crate::output::page::{esc, prose};
use crate::report::Severity;
use crate::store::counted;
use crate::store::report::{AuditCounts, AuditReport, CabinetMatrix, Level};
use std::fmt::Write;

/// Most containers a terminal matrix shows before it lists findings only.
const TERMINAL_MATRIX_MAX: usize = 40;

fn mark(s: Severity, level: Level) -> char {
    match (s, level) {
        (Severity::Stop, Level::Tray) => 'S',
        (Severity::Stop, Level::Cabinet) => 's',
        (Severity::Review, Level::Tray) => 'R',
        (Severity::Review, Level::Cabinet) => 'r',
        _ => '.',
    }
}

fn matrix_text(m: &CabinetMatrix) -> String {
    let n = m.ids.len();
    let mut grid = vec![vec!['.'; n]; n];
    for p in &m.apart {
        grid[p[0]][p[1]] = '-';
        grid[p[1]][p[0]] = '-';
    }
    for c in &m.cells {
        let ch = mark(c.severity, c.level);
        grid[c.i][c.j] = ch;
        grid[c.j][c.i] = ch;
    }
    let width = m.ids.iter().map(|s| s.len()).max().unwrap_or(0);
    let mut out = String::new();
    for (k, id) in m.ids.iter().enumerate() {
        let row: String = grid[k].iter().map(|c| format!(" {c}")).collect();
        let _ = writeln!(out, "  {:>2} {:<width$} {row}", k + 1, id);
    }
    let cols: String = (1..=n).map(|k| format!("{:>2}", k % 100)).collect();
    let _ = writeln!(out, "     {:<width$}{cols}", "");
    out
}

/// The counts sentence, singular or plural as each count asks: "3 containers in 2 spill
/// zones and 1 cabinet; 3 pairs can meet, ...".
fn counts_sentence(c: &AuditCounts) -> String {
    format!(
        "{} in {} and {}; {} can meet, {} cleared by screening, {} checked",
        counted(c.containers, "container", "containers"),
        counted(c.spill_zones, "spill zone", "spill zones"),
        counted(c.cabinets, "cabinet", "cabinets"),
        counted(c.pairs_that_can_meet, "pair", "pairs"),
        c.pairs_cleared_by_screening,
        c.pairs_checked
    )
}

/// Where a pair meets, as the report words it.
fn level_words(level: Level) -> &'static str {
    match level {
        Level::Tray => "spill zone",
        Level::Cabinet => "cabinet",
    }
}

/// The report for a terminal.
pub fn audit_table(r: &AuditReport) -> String {
    let mut out = String::new();
    let c = &r.counts;
    let _ = writeln!(out, "offgas audit: {} ({})", r.name, r.file);
    let _ = writeln!(
        out,
        "{} ({}).",
        counts_sentence(c),
        counted(c.distinct_checks, "distinct check", "distinct checks")
    );
    let _ = writeln!(out, "\nVerdict: {}", r.severity.word().to_uppercase());
    if !r.skipped_rows.is_empty() {
        let n = r.skipped_rows.len();
        let _ = writeln!(
            out,
            "{} skipped (--skip-bad-rows); see the JSON report for {}.",
            if n == 1 {
                "1 inventory row was".to_string()
            } else {
                format!("{n} inventory rows were")
            },
            if n == 1 { "it" } else { "each" }
        );
    }
    findings_text(&mut out, r);
    cabinets_text(&mut out, r);
    if let Some(s) = &r.suggestion {
        moves_text(&mut out, s);
    }
    out.push_str(&crate::output::render::closing_lists(
        &r.assumptions,
        &r.cautions,
        crate::output::render::ListStyle::Terminal,
    ));
    out
}

/// How many pairs are to stop and how many to review.
fn stop_and_review_counts(r: &AuditReport) -> (usize, usize) {
    let count = |s: Severity| r.findings.iter().filter(|f| f.severity == s).count();
    (count(Severity::Stop), count(Severity::Review))
}

/// The findings, worst first (the first 50; the rest are counted).
fn findings_text(out: &mut String, r: &AuditReport) {
    let (stops, reviews) = stop_and_review_counts(r);
    let _ = writeln!(
        out,
        "{} to stop, {reviews} to review{}",
        counted(stops, "pair", "pairs"),
        if stops + reviews > 1 {
            ", worst first:"
        } else if stops + reviews == 1 {
            ":"
        } else {
            "."
        }
    );
    for f in r.findings.iter().take(50) {
        let _ = writeln!(
            out,
            "  [{}] {} ({}) with {} ({}), same {}{}: {}",
            f.severity,
            f.a.id,
            f.a.contents,
            f.b.id,
            f.b.contents,
            level_words(f.level),
            f.gas.as_ref().map(|g| format!(", {g}")).unwrap_or_default(),
            f.headline
        );
        let _ = writeln!(out, "         at {} and {}", f.a.location, f.b.location);
    }
    if r.findings.len() > 50 {
        let _ = writeln!(
            out,
            "  ... and {} more (see --format json or html)",
            r.findings.len() - 50
        );
    }
}

/// Each cabinet's matrix, where it is small enough for a terminal.
fn cabinets_text(out: &mut String, r: &AuditReport) {
    for m in &r.cabinets {
        let _ = writeln!(
            out,
            "\nCabinet {} (S/R: stop/review in the same spill zone; s/r: in the same cabinet)",
            m.cabinet
        );
        if m.ids.len() <= TERMINAL_MATRIX_MAX {
            if !m.apart.is_empty() {
                let _ = writeln!(out, "  (-: not paired, different spill zones)");
            }
            out.push_str(&matrix_text(m));
        } else {
            let _ = writeln!(
                out,
                "  {} containers take part; the matrix is in the HTML report.",
                m.ids.len()
            );
        }
    }
}

/// The suggested moves and what they leave unresolved.
fn moves_text(out: &mut String, s: &crate::store::report::Suggestion) {
    let _ = writeln!(
        out,
        "\nSuggested moves: {} (stop pairs {} → {}, review pairs {} → {})",
        s.note.trim_end_matches('.'),
        s.stop_pairs_before,
        s.stop_pairs_after,
        s.review_pairs_before,
        s.review_pairs_after
    );
    for m in &s.moves {
        let _ = writeln!(out, "  move {} from {} to {}", m.id, m.from, m.to);
    }
    for u in &s.unresolved {
        let _ = writeln!(out, "  not resolved: {u}");
    }
}

/// What the audit page adds to the shared page style: the ranked rows and the drawings.
const AUDIT_STYLE: &str = r#"
th, td { padding: 2pt 4pt; font-size: 8.5pt; }
.stop td:first-child { background: hsl(0, 75%, 62%); } .review td:first-child { background: hsl(42, 90%, 72%); }
.drawing { overflow-x: auto; max-width: 100%; page-break-inside: avoid; margin: 6pt 0 12pt; }
.drawing svg { display: block; }
@media print { .drawing { overflow: visible; } .drawing svg { max-width: 100%; height: auto; } }
"#;

/// Names of places in a sentence, the first `most` of them.
fn some_names(names: &[String], most: usize) -> String {
    let shown: Vec<String> = names.iter().take(most).map(|n| esc(n)).collect();
    let mut out = match shown.len() {
        0 => String::new(),
        1 => shown[0].clone(),
        k => format!("{} and {}", shown[..k - 1].join(", "), shown[k - 1]),
    };
    if names.len() > most {
        out = format!("{}, and {} more", shown.join(", "), names.len() - most);
    }
    out
}

/// The report as one self-contained HTML page.
pub fn audit_html(r: &AuditReport) -> String {
    let mut out = String::new();
    let c = &r.counts;
    let _ = writeln!(out, "<h1>Storeroom audit: {}</h1>", esc(&r.name));
    let _ = writeln!(
        out,
        "<p>Source: <code>{}</code>. {}. Verdict: <strong>{}</strong>.</p>",
        esc(&r.file),
        esc(&counts_sentence(c)),
        r.severity.word().to_uppercase()
    );
    findings_html(&mut out, r);
    cabinets_html(&mut out, r);
    if let Some(s) = &r.suggestion {
        moves_html(&mut out, s);
    }
    out.push_str(&crate::output::render::closing_lists(
        &r.assumptions,
        &r.cautions,
        crate::output::render::ListStyle::Html,
    ));
    crate::output::page::page(&format!("Storeroom audit: {}", r.name), AUDIT_STYLE, &out)
}

/// Every finding, worst first, as a table.
fn findings_html(out: &mut String, r: &AuditReport) {
    let _ = writeln!(out, "<h2>Findings</h2>\n<table>\n<thead><tr><th>Verdict</th><th>Container</th><th>Meets</th><th>Where</th><th>Gas</th><th>× review level</th><th>Why</th></tr></thead>\n<tbody>");
    for f in &r.findings {
        let _ = writeln!(
            out,
            "<tr class=\"{}\"><td>{}</td><td>{}<br>{}<br><small>{}</small></td><td>{}<br>{}<br><small>{}</small></td><td>same {}</td><td>{}</td><td>{:.1}</td><td>{}</td></tr>",
            f.severity.word(),
            f.severity.word().to_uppercase(),
            esc(&f.a.id), esc(&f.a.contents), esc(&f.a.location),
            esc(&f.b.id), esc(&f.b.contents), esc(&f.b.location),
            level_words(f.level),
            esc(f.gas.as_deref().unwrap_or("-")),
            f.worst_ratio,
            prose(&f.headline)
        );
    }
    let _ = writeln!(out, "</tbody>\n</table>");
}

/// The bars per cabinet, the legend, each cabinet's matrix, and the clear cabinets named.
fn cabinets_html(out: &mut String, r: &AuditReport) {
    if !r.cabinets.is_empty() || !r.clear_cabinets.is_empty() {
        let _ = writeln!(out, "<h2>Cabinets</h2>");
    }
    if !r.cabinets.is_empty() {
        let _ = writeln!(
            out,
            "<div class=\"drawing\">{}</div>",
            drawing::pairs_chart(r)
        );
        let _ = writeln!(
            out,
            "<p>Each matrix holds every container of the cabinet, grouped by spill zone (each zone's own block is outlined); the cell where a row and a column cross is that pair. Point at a cell for the two containers, the verdict and what decided it.</p>\n<div class=\"drawing\">{}</div>",
            drawing::legend_svg(r.cabinets.iter().any(|m| !m.apart.is_empty()))
        );
        for m in &r.cabinets {
            let _ = writeln!(out, "<h3>{}</h3>", esc(&m.cabinet));
            let drawn = drawing::drawn_matrix(m);
            if drawn.ids.len() < m.ids.len() {
                let _ = writeln!(
                    out,
                    "<p>This cabinet holds {} containers, too many to draw every pair; the {} in a pair past a review level are drawn.</p>",
                    m.ids.len(),
                    drawn.ids.len()
                );
            }
            let _ = writeln!(
                out,
                "<div class=\"drawing\">{}</div>",
                drawing::matrix_svg(&drawn)
            );
        }
    }
    if !r.clear_cabinets.is_empty() {
        let _ = writeln!(
            out,
            "<p class=\"clear-cabinets\">No pair reaches a review level in {}{}.</p>",
            if r.clear_cabinets.len() == 1 {
                "cabinet "
            } else {
                "the cabinets "
            },
            some_names(&r.clear_cabinets, 40)
        );
    }
}

/// The suggested moves in words, then each cabinet they touch drawn before and after.
fn moves_html(out: &mut String, s: &crate::store::report::Suggestion) {
    let _ = writeln!(
        out,
        "<h2>Suggested moves</h2><p>{} Stop pairs {} → {}, review pairs {} → {}.</p><ul>",
        prose(&s.note),
        s.stop_pairs_before,
        s.stop_pairs_after,
        s.review_pairs_before,
        s.review_pairs_after
    );
    for m in &s.moves {
        let _ = writeln!(
            out,
            "<li>Move {} from {} to {}</li>",
            esc(&m.id),
            esc(&m.from),
            esc(&m.to)
        );
    }
    for u in &s.unresolved {
        let _ = writeln!(out, "<li>Not resolved: {}</li>", esc(u));
    }
    let _ = writeln!(out, "</ul>");
    for change in &s.cabinets {
        let _ = writeln!(
            out,
            "<h3>{}</h3>\n<div class=\"drawing\">{}</div>",
            esc(&change.cabinet),
            drawing::moves_svg(change, &s.moves)
        );
    }
}

/// Markdown cells hold no line breaks or pipes.
fn cell(s: &str) -> String {
    s.replace('|', "\\|").replace('\n', " ")
}

/// The audit as markdown, for tickets: findings and moves; the matrices need a page
/// (`--format html`). Layout only, from the report's public fields.
// This belongs beside `audit_table` in `crate::output::audit`; it lives here until that
// module's owner takes it over.
pub fn audit_markdown(r: &AuditReport) -> String {
    let mut out = String::new();
    let c = &r.counts;
    let _ = writeln!(out, "# Storeroom audit: {}\n", r.name);
    let _ = writeln!(
        out,
        "Source: `{}`. {} containers in {} spill zones and {} cabinets; {} pairs can meet, {} cleared by screening, {} checked.\n",
        r.file, c.containers, c.spill_zones, c.cabinets, c.pairs_that_can_meet, c.pairs_cleared_by_screening, c.pairs_checked
    );
    let _ = writeln!(out, "**Verdict: {}**\n", r.severity.word().to_uppercase());
    let (stops, reviews) = stop_and_review_counts(r);
    let _ = writeln!(
        out,
        "## Findings\n\n{stops} pairs to stop, {reviews} to review, worst first.\n"
    );
    if !r.findings.is_empty() {
        findings_markdown(&mut out, r);
    }
    if !r.skipped_rows.is_empty() {
        let _ = writeln!(
            out,
            "\n{} inventory rows were skipped (--skip-bad-rows); the JSON report lists each.",
            r.skipped_rows.len()
        );
    }
    if !r.cabinets.is_empty() {
        let _ = writeln!(
            out,
            "\nThe pair matrices of {} cabinets are drawn in the HTML report (`--format html`).",
            r.cabinets.len()
        );
    }
    if let Some(s) = &r.suggestion {
        moves_markdown(&mut out, s);
    }
    out.push_str(&crate::output::render::closing_lists(
        &r.assumptions,
        &r.cautions,
        crate::output::render::ListStyle::Markdown,
    ));
    out
}

/// The findings as a markdown table.
fn findings_markdown(out: &mut String, r: &AuditReport) {
    let _ = writeln!(
        out,
        "| verdict | container | meets | where | gas | × review level | why |"
    );
    let _ = writeln!(out, "|---|---|---|---|---|---:|---|");
    for f in &r.findings {
        let _ = writeln!(
            out,
            "| {} | {} ({}), {} | {} ({}), {} | same {} | {} | {:.1} | {} |",
            f.severity.word().to_uppercase(),
            cell(&f.a.id),
            cell(&f.a.contents),
            cell(&f.a.location),
            cell(&f.b.id),
            cell(&f.b.contents),
            cell(&f.b.location),
            match f.level {
                Level::Tray => "spill zone",
                Level::Cabinet => "cabinet",
            },
            cell(f.gas.as_deref().unwrap_or("-")),
            f.worst_ratio,
            cell(&f.headline)
        );
    }
}

/// The suggested moves as a list.
fn moves_markdown(out: &mut String, s: &crate::store::report::Suggestion) {
    let _ = writeln!(
        out,
        "\n## Suggested moves\n\n{} Stop pairs {} → {}, review pairs {} → {}.\n",
        s.note,
        s.stop_pairs_before,
        s.stop_pairs_after,
        s.review_pairs_before,
        s.review_pairs_after
    );
    for m in &s.moves {
        let _ = writeln!(out, "- Move {} from {} to {}", m.id, m.from, m.to);
    }
    for u in &s.unresolved {
        let _ = writeln!(out, "- Not resolved: {u}");
    }
}
