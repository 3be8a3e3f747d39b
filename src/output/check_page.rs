//! The page of a pour check: the verdict and its reasons, the plots along the pour, then the
//! tables, assumptions and cautions, in the shared page shell. Layout only: every number
//! comes from a report.

use crate::basics::text::fixed;
use crate::output::page::{esc, page, prose, severity_class, verdict_badge};
use crate::output::render::{closing_lists, ListStyle};
use crate::report::{CheckReport, Severity, StateReport};
use std::fmt::Write;

fn findings_html(r: &CheckReport, out: &mut String) {
    if r.findings.is_empty() {
        out.push_str(
            "<p>No gas reaches a level of concern, and nothing was left unassessed.</p>\n",
        );
        return;
    }
    out.push_str("<ul class=\"findings\">\n");
    for f in &r.findings {
        let tag = match f.severity {
            Severity::Info => "note",
            s => s.word(),
        };
        let from = if f.origin == "chemistry" {
            String::new()
        } else {
            format!("<br><span class=\"small\">From {}.</span>", esc(&f.origin))
        };
        let _ = writeln!(
            out,
            "<li class=\"{}\"><strong>{}</strong> {} <span class=\"small\">{}</span>{from}</li>",
            severity_class(f.severity),
            tag.to_uppercase(),
            prose(&f.message),
            prose(&f.caution)
        );
    }
    out.push_str("</ul>\n");
}

/// A table from the cells the terminal and markdown reports use; `numeric` columns are
/// right-aligned.
fn cells_table(out: &mut String, heads: &[&str], rows: &[Vec<String>], numeric: &[usize]) {
    let class = |i: usize| {
        if numeric.contains(&i) {
            " class=\"num\""
        } else {
            ""
        }
    };
    out.push_str("<table>\n<thead><tr>");
    for (i, h) in heads.iter().enumerate() {
        let _ = write!(
            out,
            "<th{}>{}</th>",
            class(i),
            esc(&crate::basics::text::sentence_start(h))
        );
    }
    out.push_str("</tr></thead>\n<tbody>\n");
    for row in rows {
        out.push_str("<tr>");
        for (i, c) in row.iter().enumerate() {
            let _ = write!(out, "<td{}>{}</td>", class(i), esc(c));
        }
        out.push_str("</tr>\n");
    }
    out.push_str("</tbody>\n</table>\n");
}

fn gases_html(r: &CheckReport, out: &mut String) {
    out.push_str("<h2>Gas in the headspace</h2>\n<p class=\"small\">ppm by volume at 1 atm.</p>\n");
    for note in crate::output::render::gas_table_notes(r) {
        let _ = writeln!(out, "<p>{}</p>", esc(&note));
    }
    let cells = crate::output::render::gas_cells(r);
    if cells.is_empty() {
        return;
    }
    cells_table(
        out,
        &crate::output::render::GAS_HEADS,
        &cells,
        &[1, 2, 3, 4, 5, 6],
    );
}

fn states_html(r: &CheckReport, out: &mut String) {
    out.push_str("<h2>States of the liquid</h2>\n<table>\n<thead><tr><th>State</th><th class=\"num\">Stream added</th><th class=\"num\">pH</th><th class=\"num\">°C</th><th class=\"num\">I (mol/L)</th><th class=\"num\">Liquid L</th><th class=\"num\">Headspace L</th><th class=\"num\">Gas kPa</th></tr></thead>\n<tbody>\n");
    let mut row = |label: &str, fraction: f64, s: &StateReport| {
        let _ = writeln!(
            out,
            "<tr><td>{label}</td><td class=\"num\">{} %</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>",
            fixed(fraction * 100.0, 1),
            fixed(s.ph, 2),
            fixed(s.temperature_c, 1),
            fixed(s.ionic_strength, 3),
            if s.activity_model_exceeded { " (beyond the activity model)" } else { "" },
            fixed(s.volume_l, 2),
            fixed(s.headspace_l, 2),
            fixed(s.overpressure_kpa, 3)
        );
    };
    row("Container before", 0.0, &r.container_alone);
    row("End", 1.0, &r.end_state);
    row(
        "Worst while pouring",
        r.worst_state.fraction_added,
        &r.worst_state.state,
    );
    if let Some(o) = &r.poured_other_way {
        row(
            "Other order, worst",
            o.worst_state.fraction_added,
            &o.worst_state.state,
        );
    }
    out.push_str("</tbody>\n</table>\n");
    let bound = crate::output::render::bound_lines(r);
    if !bound.is_empty() {
        out.push_str("<ul>\n");
        for line in bound {
            let _ = writeln!(out, "<li>{}</li>", esc(&line));
        }
        out.push_str("</ul>\n");
    }
}

fn heat_room_html(r: &CheckReport, out: &mut String) {
    let h = &r.end_state.heat;
    let e = &r.end_state;
    out.push_str("<h2>Heat, pressure and the room</h2>\n<ul>\n");
    let _ = writeln!(
        out,
        "<li>The pour {}: {} °C → {} °C{}.</li>",
        esc(&h.released_words(1)),
        fixed(h.start_temperature_c, 1),
        fixed(h.would_reach_c, 1),
        if h.boils { ", and it boils" } else { "" }
    );
    if e.vented_gas_l > 0.0 || e.overpressure_kpa == 0.0 {
        let _ = writeln!(
            out,
            "<li>No pressure builds (vented or open): {} L of gas leaves at 1 atm, {} % of it toxic.</li>",
            fixed(e.vented_gas_l, 2),
            fixed(e.vented_toxic_percent, 0)
        );
    } else {
        let _ = writeln!(
            out,
            "<li>Sealed: {} kPa above atmospheric at the end ({} kPa of it from the gases the liquid gives off).</li>",
            fixed(e.overpressure_kpa, 1),
            fixed(e.gas_pressure_kpa, 1)
        );
    }
    for g in &r.stoichiometric_gases {
        let _ = writeln!(
            out,
            "<li>{}: {} mol ({} L at 1 atm), {} % of the headspace{}.</li>",
            esc(&g.formula),
            fixed(g.moles, 3),
            fixed(g.litres_at_1_atm, 2),
            fixed(g.headspace_percent, 1),
            g.lfl_percent
                .map(|l| format!(", lower flammable limit {l} %"))
                .unwrap_or_default()
        );
    }
    out.push_str("</ul>\n");
    let room = &r.room;
    let _ = writeln!(
        out,
        "<p>Room: {} m³, {} air changes per hour; open surface: {}{}.</p>",
        room.settings.volume_m3,
        room.settings.air_changes_per_hour,
        esc(&room.settings.surface_basis),
        if room.open_surface_counts {
            ""
        } else {
            "; the container is sealed, so the figures below apply if it is opened"
        }
    );
    if room.gases.is_empty() {
        out.push_str("<p>Nothing volatile to release.</p>\n");
        return;
    }
    let _ = writeln!(
        out,
        "<p>Worst case: {}.</p>",
        esc(&room.settings.worst_case)
    );
    cells_table(
        out,
        &crate::output::render::ROOM_HEADS,
        &crate::output::render::room_cells(r),
        &[1, 2, 3, 4, 5, 6],
    );
}

fn pairs_html(r: &CheckReport, all_pairs: bool, out: &mut String) {
    let pairs = crate::output::render::shown_pairs(r, all_pairs);
    let _ = writeln!(
        out,
        "<h2>Why: proton transfers between the two batches</h2>\n<p class=\"small\">{} of {} shown{}.</p>",
        pairs.len(),
        r.pairs.len(),
        if all_pairs {
            ""
        } else {
            "; --all-pairs shows every one"
        }
    );
    if pairs.is_empty() {
        return;
    }
    cells_table(
        out,
        &crate::output::render::PAIR_HEADS,
        &crate::output::render::pair_cells(&pairs),
        &[5],
    );
}

/// The course of the pour: each reported gas, then pH and temperature, both orders on the
/// same axes.
fn plots_html(r: &CheckReport, out: &mut String) {
    let gases = crate::output::plot::pour::gas_charts(r);
    if r.poured_as_written.path.is_empty() {
        return;
    }
    out.push_str("<h2>Along the pour</h2>\n<p class=\"small\">Solid line and round points: the stream poured into the container, as written. Dashed line and square points: the container's contents poured into the stream. The share poured in runs from the first drop to all of it; both orders end in the same mixture.</p>\n");
    for c in gases
        .iter()
        .chain(crate::output::plot::pour::state_charts(r).iter())
    {
        out.push_str("<figure class=\"plot\">");
        out.push_str(&c.svg());
        out.push_str("</figure>\n");
    }
}

/// The body of a check's page, without the page shell (the demo puts several on a page).
pub fn check_section(r: &CheckReport, all_pairs: bool) -> String {
    let mut out = String::new();
    let _ = writeln!(
        out,
        "<h1>Pour check: {} into {}</h1>",
        esc(&r.stream.name),
        esc(&r.container.name)
    );
    let _ = writeln!(
        out,
        "<p class=\"small\">Stream <code>{}</code> poured into the container <code>{}</code>. Checked by {} {}.</p>",
        esc(&r.stream.file),
        esc(&r.container.file),
        esc(r.tool),
        esc(r.version)
    );
    out.push_str(&verdict_badge(r.severity));
    findings_html(r, &mut out);
    plots_html(r, &mut out);
    gases_html(r, &mut out);
    states_html(r, &mut out);
    heat_room_html(r, &mut out);
    pairs_html(r, all_pairs, &mut out);
    out.push_str(&closing_lists(&r.assumptions, &r.cautions, ListStyle::Html));
    out
}

const CHECK_STYLE: &str = r#"
figure.plot { margin: 8pt 0; } figure.plot svg { max-width: 100%; height: auto; }
ul.findings { padding-left: 0; list-style: none; }
ul.findings li { border-left: 5pt solid #999; padding: 3pt 6pt; margin: 3pt 0; }
ul.findings li.stop { border-left-color: #b22; } ul.findings li.review { border-left-color: #c90; } ul.findings li.clear { border-left-color: #7a7; background: #f4f4f4; }
"#;

/// A pour check as one self-contained printable page: verdict and findings first, then the
/// gases, the states, heat, pressure and the room, the proton transfers, the assumptions
/// and the cautions.
pub fn check_html(r: &CheckReport, all_pairs: bool) -> String {
    page(
        &format!("Pour check: {} into {}", r.stream.name, r.container.name),
        CHECK_STYLE,
        &check_section(r, all_pairs),
    )
}
