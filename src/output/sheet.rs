//! The approval sheet of a procedure: a terminal table, markdown, or one self-contained
//! HTML page that prints on A4 and Letter. Layout only; the numbers come from the report.

use crate::output::page::{esc, prose, severity_class};
use crate::procedure::run::{ProcedureReport, StepReport};
use crate::report::{Severity, StateReport};
use comfy_table::{presets, ContentArrangement, Table};
use std::fmt::Write;

fn gases_text(s: Option<&StateReport>) -> String {
    let Some(s) = s else { return "-".into() };
    let parts: Vec<String> = s
        .gases
        .iter()
        .filter(|g| g.headspace_ppm >= 0.01)
        .take(3)
        .map(|g| match g.limit_ppm {
            Some(l) => format!(
                "{} {} ppm (limit {})",
                g.formula,
                short(g.headspace_ppm),
                short(l)
            ),
            None => format!("{} {} ppm (no limit)", g.formula, short(g.headspace_ppm)),
        })
        .collect();
    if parts.is_empty() {
        "none".into()
    } else {
        parts.join("; ")
    }
}

fn short(v: f64) -> String {
    if v >= 100.0 {
        format!("{v:.0}")
    } else if v >= 1.0 {
        format!("{v:.1}")
    } else {
        format!("{v:.2}")
    }
}

fn state_text(s: &StepReport) -> (String, String) {
    let end = s
        .end_state
        .as_ref()
        .map(|e| format!("pH {:.1}, {:.0} °C", e.ph, e.temperature_c))
        .unwrap_or_else(|| "-".into());
    let worst = s
        .worst_state
        .as_ref()
        .map(|w| {
            format!(
                "pH {:.1} at {:.0} % added",
                w.state.ph,
                w.fraction_added * 100.0
            )
        })
        .unwrap_or_else(|| "-".into());
    (end, worst)
}

fn worst_gases(s: &StepReport) -> String {
    gases_text(
        s.worst_state
            .as_ref()
            .map(|w| &w.state)
            .or(s.end_state.as_ref()),
    )
}

/// The sheet for a terminal.
pub fn procedure_table(r: &ProcedureReport) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "offgas procedure: {} ({})", r.name, r.file);
    let _ = writeln!(out, "Vessel: {} ({} L)", r.vessel, r.capacity_l);
    let _ = writeln!(out, "\nVerdict: {}", r.severity.word().to_uppercase());
    if let Some(p) = &r.first_problem {
        let _ = writeln!(
            out,
            "First step that is not clear: step {} ({})",
            p.step, p.severity
        );
        for reason in &p.reasons {
            let _ = writeln!(out, "  - {reason}");
        }
    }
    if !r.fixes.is_empty() {
        let _ = writeln!(
            out,
            "\nComputed fixes (each checked by running the procedure with it)"
        );
        for f in &r.fixes {
            let _ = match f.outcome() {
                Some(whole) => writeln!(
                    out,
                    "  - {} (the whole procedure is then {whole})",
                    f.description
                ),
                None => writeln!(out, "  - {}", f.description),
            };
        }
    }
    let mut t = Table::new();
    t.load_preset(presets::UTF8_FULL_CONDENSED)
        .set_content_arrangement(ContentArrangement::Dynamic)
        .set_width(120)
        .set_header(vec![
            "step",
            "what is done",
            "end",
            "worst while adding",
            "gases (worst)",
            "°C after",
            "verdict",
        ]);
    for s in &r.steps {
        let (end, worst) = state_text(s);
        t.add_row(vec![
            format!("{}. {}", s.number, s.description),
            s.action.clone(),
            end,
            worst,
            worst_gases(s),
            format!("{:.1}", s.temperature_after_c),
            s.severity.word().to_uppercase(),
        ]);
    }
    let _ = writeln!(out, "\n{t}");
    let _ = writeln!(out, "\nFindings");
    for s in &r.steps {
        for f in s.findings.iter().filter(|f| f.severity >= Severity::Review) {
            let _ = writeln!(out, "  step {} [{}] {}", s.number, f.severity, f.message);
        }
    }
    out.push_str(&crate::output::render::closing_lists(
        &r.assumptions,
        &r.cautions,
        crate::output::render::ListStyle::Terminal,
    ));
    let _ = writeln!(out);
    for s in &r.sign_off {
        let _ = writeln!(out, "{s}: ______________________________");
    }
    out
}

/// The sheet as markdown.
pub fn procedure_markdown(r: &ProcedureReport) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "# Procedure check: {}\n", r.name);
    let _ = writeln!(
        out,
        "Vessel: {} ({} L). Source file: `{}`.\n",
        r.vessel, r.capacity_l, r.file
    );
    let _ = writeln!(out, "**Verdict: {}**\n", r.severity.word().to_uppercase());
    if let Some(p) = &r.first_problem {
        let _ = writeln!(
            out,
            "First step that is not clear: **step {}** ({}).\n",
            p.step, p.severity
        );
        for reason in &p.reasons {
            let _ = writeln!(out, "- {reason}");
        }
        out.push('\n');
    }
    if !r.fixes.is_empty() {
        let _ = writeln!(out, "## Computed fixes\n");
        for f in &r.fixes {
            let _ = match f.outcome() {
                Some(whole) => writeln!(
                    out,
                    "- {} The whole procedure is then **{whole}**.",
                    f.description
                ),
                None => writeln!(out, "- {}", f.description),
            };
        }
        out.push('\n');
    }
    let _ = writeln!(out, "## Steps\n");
    let course = crate::output::plot::steps::step_lines(r);
    if course.len() > 1 {
        let _ = writeln!(
            out,
            "Step by step (one column per step; the worst gas on a log scale over four decades, its worst step in brackets; · where a step leaves nothing to judge):\n\n```text\n{}\n```\n",
            course.join("\n")
        );
    }
    let _ = writeln!(
        out,
        "| step | what is done | end | worst while adding | gases (worst) | °C after | verdict |"
    );
    let _ = writeln!(out, "|---|---|---|---|---|---:|---|");
    for s in &r.steps {
        let (end, worst) = state_text(s);
        let _ = writeln!(
            out,
            "| {}. {} | {} | {} | {} | {} | {:.1} | {} |",
            s.number,
            s.description,
            s.action,
            end,
            worst,
            worst_gases(s),
            s.temperature_after_c,
            s.severity.word().to_uppercase()
        );
    }
    let _ = writeln!(out, "\n## Findings\n");
    for s in &r.steps {
        for f in s.findings.iter().filter(|f| f.severity >= Severity::Review) {
            let _ = writeln!(
                out,
                "- Step {} — **{}**: {} {}",
                s.number, f.severity, f.message, f.caution
            );
        }
    }
    out.push_str(&crate::output::render::closing_lists(
        &r.assumptions,
        &r.cautions,
        crate::output::render::ListStyle::Markdown,
    ));
    let _ = writeln!(out, "\n## Sign-off\n");
    for s in &r.sign_off {
        let _ = writeln!(out, "{s}: ______________________________  \n");
    }
    out
}

/// What the approval sheet adds to the shared page style: the sign-off lines.
const SHEET_STYLE: &str = r#"
.sign { margin-top: 16pt; page-break-inside: avoid; }
.sign div { display: flex; gap: 8pt; margin: 14pt 0; }
.sign span.line { flex: 1; border-bottom: 1px solid #111; }
figure.steps { display: flex; flex-wrap: wrap; gap: 6pt; margin: 4pt 0 8pt; page-break-inside: avoid; }
figure.steps svg { flex: 1 1 0; min-width: 0; max-width: 50%; height: auto; }
figure.steps figcaption { flex-basis: 100%; font-size: 8.5pt; color: #333; }
"#;

/// The vessel's pH and the worst gas of each step as two small charts side by side.
fn step_figure(r: &ProcedureReport) -> String {
    use crate::output::plot::steps;
    let charts: Vec<String> = std::iter::once(steps::ph_chart(r))
        .chain(steps::gas_chart(r))
        .map(|c| c.svg())
        .collect();
    format!(
        "<figure class=\"steps\">{}<figcaption>The pH of the vessel after each step, and the gas of each step that comes closest to its review level (at its worst point while adding), as a multiple of that level on a log scale; ratios under {} are drawn on the floor. Drains leave no point.</figcaption></figure>\n",
        charts.concat(),
        crate::output::plot::chart::short_number(steps::RATIO_FLOOR)
    )
}

/// The sheet as one self-contained HTML page (no external assets).
pub fn procedure_html(r: &ProcedureReport) -> String {
    let mut out = String::new();
    sheet_head_html(&mut out, r);
    steps_html(&mut out, r);
    findings_html(&mut out, r);
    out.push_str(&crate::output::render::closing_lists(
        &r.assumptions,
        &r.cautions,
        crate::output::render::ListStyle::Html,
    ));
    let _ = writeln!(out, "<div class=\"sign\">");
    for s in &r.sign_off {
        let _ = writeln!(
            out,
            "<div><span>{}:</span><span class=\"line\"></span></div>",
            esc(s)
        );
    }
    let _ = writeln!(out, "</div>");
    crate::output::page::page(&format!("Procedure check: {}", r.name), SHEET_STYLE, &out)
}

/// The title, the verdict, the first step that is not clear and the computed fixes.
fn sheet_head_html(out: &mut String, r: &ProcedureReport) {
    let _ = writeln!(out, "<h1>Procedure check: {}</h1>", esc(&r.name));
    let _ = writeln!(
        out,
        "<p>Vessel: {} ({} L). Source file: <code>{}</code>. Checked by offgas {}.</p>",
        esc(&r.vessel),
        r.capacity_l,
        esc(&r.file),
        esc(r.version)
    );
    let _ = writeln!(
        out,
        "<p><span class=\"verdict {}\">Verdict: {}</span></p>",
        severity_class(r.severity),
        r.severity.word().to_uppercase()
    );
    if let Some(p) = &r.first_problem {
        let _ = writeln!(
            out,
            "<p>First step that is not clear: <strong>step {}</strong> ({}).</p><ul>",
            p.step, p.severity
        );
        for reason in &p.reasons {
            let _ = writeln!(out, "<li>{}</li>", esc(reason));
        }
        let _ = writeln!(out, "</ul>");
    }
    if !r.fixes.is_empty() {
        let _ = writeln!(out, "<h2>Computed fixes</h2><ul>");
        for f in &r.fixes {
            let _ = match f.outcome() {
                Some(whole) => writeln!(
                    out,
                    "<li>{} The whole procedure is then <strong>{whole}</strong>.</li>",
                    esc(&f.description)
                ),
                None => writeln!(out, "<li>{}</li>", esc(&f.description)),
            };
        }
        let _ = writeln!(out, "</ul>");
    }
}

/// The plots of the steps and the table of them.
fn steps_html(out: &mut String, r: &ProcedureReport) {
    let _ = writeln!(out, "<h2>Steps</h2>");
    out.push_str(&step_figure(r));
    let _ = writeln!(out, "<table>\n<thead><tr><th>Step</th><th>What is done</th><th>End</th><th>Worst while adding</th><th>Gases (worst)</th><th>°C after</th><th>Verdict</th></tr></thead>\n<tbody>");
    for s in &r.steps {
        let (end, worst) = state_text(s);
        let _ = writeln!(
            out,
            "<tr class=\"{}\"><td>{}. {}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{:.1}</td><td>{}</td></tr>",
            severity_class(s.severity),
            s.number,
            prose(&s.description),
            prose(&s.action),
            esc(&end),
            esc(&worst),
            esc(&worst_gases(s)),
            s.temperature_after_c,
            s.severity.word().to_uppercase()
        );
    }
    let _ = writeln!(out, "</tbody>\n</table>");
}

/// Every finding of review or stop, step by step.
fn findings_html(out: &mut String, r: &ProcedureReport) {
    let _ = writeln!(out, "<h2>Findings</h2><ul>");
    for s in &r.steps {
        for f in s.findings.iter().filter(|f| f.severity >= Severity::Review) {
            let _ = writeln!(
                out,
                "<li>Step {} — <strong>{}</strong>: {} <span class=\"small\">{}</span></li>",
                s.number,
                f.severity,
                prose(&f.message),
                prose(&f.caution)
            );
        }
    }
    let _ = writeln!(out, "</ul>");
}
