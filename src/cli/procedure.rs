//! `offgas procedure`: every step checked, fixes computed, and the approval sheet.

use super::{exit_status, load_catalog, load_thresholds, rules, Format, OutputArgs};
use anyhow::{anyhow, Context, Result};
use std::path::Path;

/// `offgas procedure`: every step checked against what the vessel holds, fixes computed for
/// the first step that is not clear, and the approval sheet.
pub(crate) fn run(
    file: &Path,
    format: Format,
    out: &OutputArgs,
    site_rules: Option<&Path>,
    thresholds: Option<&Path>,
) -> Result<u8> {
    use offgas::procedure::{fix::fixes, run::Engine, Procedure};
    out.check_free()?;
    let cat = load_catalog()?;
    let th = load_thresholds(thresholds)?;
    let rules = rules::load(cat, site_rules)?;
    let text = std::fs::read_to_string(file)
        .with_context(|| format!("cannot read {}: check the path", file.display()))?;
    let procedure =
        Procedure::parse(cat, &file.display().to_string(), &text).map_err(|e| anyhow!("{e}"))?;
    let engine = Engine {
        cat,
        th: &th,
        rules: &rules,
    };
    let mut report = engine.run(&procedure).map_err(|e| anyhow!("{e}"))?;
    report.fixes = fixes(&engine, &procedure, &report);
    let sheet = match format {
        Format::Table => offgas::output::sheet::procedure_table(&report),
        Format::Markdown => offgas::output::sheet::procedure_markdown(&report),
        Format::Html => offgas::output::sheet::procedure_html(&report),
        Format::Json => serde_json::to_string_pretty(&report)? + "\n",
    };
    out.deliver(&sheet, "the approval sheet")?;
    Ok(exit_status(report.severity))
}
