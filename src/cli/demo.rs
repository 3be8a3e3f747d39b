//! `offgas demo`: the bundled scenario, a fictional building's waste checks.

use super::Format;
use anyhow::{anyhow, Result};
use offgas::check::{check, CheckOptions};
use offgas::pour::batch::Batch;
use serde::Deserialize;

const SCENARIO: &str = include_str!("../../data/demo/scenario.yaml");
const PROCEDURE: (&str, &str) = (
    "data/demo/procedure-descale-tank.yaml",
    include_str!("../../data/demo/procedure-descale-tank.yaml"),
);

/// The demo's batch files, embedded so that `offgas demo` runs from anywhere.
const FILES: &[(&str, &str)] = &[
    (
        "carboy-basic-rinse.yaml",
        include_str!("../../data/demo/carboy-basic-rinse.yaml"),
    ),
    (
        "carboy-cyanide-plating.yaml",
        include_str!("../../data/demo/carboy-cyanide-plating.yaml"),
    ),
    (
        "carboy-acid-etch.yaml",
        include_str!("../../data/demo/carboy-acid-etch.yaml"),
    ),
    (
        "carboy-ammonium-buffer.yaml",
        include_str!("../../data/demo/carboy-ammonium-buffer.yaml"),
    ),
    (
        "stream-citrate-rinse.yaml",
        include_str!("../../data/demo/stream-citrate-rinse.yaml"),
    ),
    (
        "stream-acid-descale.yaml",
        include_str!("../../data/demo/stream-acid-descale.yaml"),
    ),
    (
        "stream-sulfide-strip.yaml",
        include_str!("../../data/demo/stream-sulfide-strip.yaml"),
    ),
    (
        "stream-caustic-wash.yaml",
        include_str!("../../data/demo/stream-caustic-wash.yaml"),
    ),
    (
        "stream-copper-cyanide-rinse.yaml",
        include_str!("../../data/demo/stream-copper-cyanide-rinse.yaml"),
    ),
    (
        "stream-ferrocyanide-rinse.yaml",
        include_str!("../../data/demo/stream-ferrocyanide-rinse.yaml"),
    ),
];

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct Scenario {
    title: String,
    story: String,
    checks: Vec<DemoCheck>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct DemoCheck {
    title: String,
    container: String,
    add: String,
    expect: String,
    why: String,
}

fn file(name: &str) -> Result<&'static str> {
    FILES
        .iter()
        .find(|(n, _)| *n == name)
        .map(|(_, t)| *t)
        .ok_or_else(|| anyhow!("demo file {name} is not bundled (a build defect)"))
}

/// How many of the scenario's checks are expected to stop.
fn expected_stops(scenario: &Scenario) -> usize {
    scenario
        .checks
        .iter()
        .filter(|c| c.expect == "stop")
        .count()
}

/// What the demo needs from the bundled data.
struct Bundled {
    cat: &'static offgas::catalog::Catalog,
    th: offgas::judge::thresholds::Thresholds,
    rules: offgas::judge::rules::RuleSet,
}

/// Runs every check of the scenario and prints each report. Exits 0 when every verdict is
/// the one the scenario expects (the demo is a demonstration, not a check of real waste),
/// and 1 when one is not, since that means the bundled data or engine changed.
pub fn run(format: Format) -> Result<u8> {
    let cat = super::load_catalog()?;
    let data = Bundled {
        cat,
        th: super::load_thresholds(None)?,
        rules: super::rules::load(cat, None)?,
    };
    let scenario: Scenario = serde_yaml::from_str(SCENARIO)?;
    let mut surprises = Vec::new();
    let mut out = String::new();
    if !matches!(format, Format::Json) {
        out.push_str(&format!(
            "{}\n\n{}\n",
            scenario.title,
            scenario.story.trim()
        ));
    }
    let json_reports = run_checks(&data, &scenario, format, &mut out, &mut surprises)?;
    let (sheet, fixed) = run_procedure(&data)?;
    if sheet.severity != offgas::report::Severity::Stop || !fixed {
        surprises
            .push("the demo procedure should stop, with a computed fix that makes it clear".into());
    }
    match format {
        Format::Json => {
            out = serde_json::to_string_pretty(&serde_json::json!({
                "checks": json_reports,
                "procedure": sheet,
            }))? + "\n";
        }
        _ => {
            out.push_str(&format!(
                "\n{}\nDemo procedure: {} (`offgas procedure {}`; add --format html for the printable sheet)\n\n",
                "=".repeat(78),
                sheet.name,
                PROCEDURE.0
            ));
            out.push_str(&match format {
                Format::Markdown => offgas::output::sheet::procedure_markdown(&sheet),
                _ => offgas::output::sheet::procedure_table(&sheet),
            });
            out.push_str(&summary(&scenario, &surprises, &sheet, fixed));
        }
    }
    super::print(&out)?;
    if !surprises.is_empty() {
        return Err(anyhow!(
            "the demo did not come out as expected: {}",
            surprises.join("; ")
        ));
    }
    Ok(0)
}

/// Each check of the scenario: its report laid out into `out` (or kept for one JSON
/// document, returned), and a line in `surprises` where the verdict is not the expected one.
fn run_checks(
    data: &Bundled,
    scenario: &Scenario,
    format: Format,
    out: &mut String,
    surprises: &mut Vec<String>,
) -> Result<Vec<serde_json::Value>> {
    let cat = data.cat;
    let mut json_reports = Vec::new();
    for (i, c) in scenario.checks.iter().enumerate() {
        let path = |n: &str| format!("data/demo/{n}");
        let a = Batch::parse(cat, &path(&c.container), file(&c.container)?)
            .map_err(|e| anyhow!("{e}"))?;
        let b = Batch::parse(cat, &path(&c.add), file(&c.add)?).map_err(|e| anyhow!("{e}"))?;
        let report = check(cat, &data.th, &data.rules, &a, &b, &CheckOptions::default())
            .map_err(|e| anyhow!("{e}"))?;
        if report.severity.word() != c.expect {
            surprises.push(format!(
                "{}: expected {}, got {}",
                c.title, c.expect, report.severity
            ));
        }
        match format {
            Format::Json => json_reports.push(serde_json::json!({
                "title": c.title, "expect": c.expect, "report": report
            })),
            _ => {
                out.push_str(&format!(
                    "\n{}\nDemo check {} of {}: {}\n(expected: {}; {})\n\n",
                    "=".repeat(78),
                    i + 1,
                    scenario.checks.len(),
                    c.title,
                    c.expect,
                    c.why.trim()
                ));
                out.push_str(&super::render(&report, format, false)?);
            }
        }
    }
    Ok(json_reports)
}

/// The procedure: an unsafe step, and whether a computed fix makes the whole of it clear.
fn run_procedure(data: &Bundled) -> Result<(offgas::procedure::run::ProcedureReport, bool)> {
    let procedure = offgas::procedure::Procedure::parse(data.cat, PROCEDURE.0, PROCEDURE.1)
        .map_err(|e| anyhow!("{e}"))?;
    let engine = offgas::procedure::run::Engine {
        cat: data.cat,
        th: &data.th,
        rules: &data.rules,
    };
    let mut sheet = engine.run(&procedure).map_err(|e| anyhow!("{e}"))?;
    sheet.fixes = offgas::procedure::fix::fixes(&engine, &procedure, &sheet);
    let fixed = sheet
        .fixes
        .iter()
        .any(|f| f.procedure_severity_with_fix == offgas::report::Severity::Clear);
    Ok((sheet, fixed))
}

/// The closing line: how many checks came out as the scenario expects.
fn summary(
    scenario: &Scenario,
    surprises: &[String],
    sheet: &offgas::procedure::run::ProcedureReport,
    fixed: bool,
) -> String {
    let stops = expected_stops(scenario);
    format!(
        "\n{}\n{} of {} demo checks came out as the scenario expects{}, and the procedure {}.{}\n",
        "=".repeat(78),
        scenario.checks.len()
            - surprises
                .iter()
                .filter(|s| !s.starts_with("the demo procedure"))
                .count(),
        scenario.checks.len(),
        if stops > 0 {
            format!(
                " ({stops} of them stop: here stop is the expected answer, the scenario's dangerous pours)"
            )
        } else {
            String::new()
        },
        if fixed && sheet.severity == offgas::report::Severity::Stop {
            "stops at the step the scenario expects, with a computed fix that clears it"
        } else {
            "did not come out as expected"
        },
        if surprises.is_empty() {
            " The demo exits 0."
        } else {
            ""
        }
    )
}
