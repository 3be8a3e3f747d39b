//! `offgas audit`: read an inventory (YAML or CSV), audit every pair that can meet,
//! optionally suggest moves, print or write the report.

use super::{load_catalog, load_thresholds, rules, Format, OutputArgs};
use anyhow::{anyhow, Context, Result};
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use offgas::store::audit::{AuditSettings, Auditor, PairJudge};
use offgas::store::csv_import::{import, mapping_from_yaml, parse_mapping, ColumnMapping};
use offgas::store::Inventory;
use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::time::Instant;

/// The arguments of `offgas audit`.
#[derive(clap::Args)]
pub struct AuditArgs {
    /// The inventory: YAML, or CSV (by the .csv extension) with a column mapping.
    pub inventory: PathBuf,
    /// CSV column mapping, e.g. "id=Bottle,substance=Chemical,amount=Qty,unit=Unit,size=Size,location=Location".
    #[arg(long, value_name = "SPEC")]
    pub columns: Option<String>,
    /// CSV column mapping from a small YAML file (`columns: {id: ..., ...}`).
    #[arg(long, value_name = "FILE")]
    pub mapping: Option<PathBuf>,
    /// Audit the rows that can be read and list the others, instead of stopping.
    #[arg(long)]
    pub skip_bad_rows: bool,
    /// Propose moves that remove every stop pair and as many review pairs as possible.
    #[arg(long)]
    pub suggest: bool,
    /// How to lay out the report (the cabinet matrices are drawn in table and html).
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    #[command(flatten)]
    pub out: OutputArgs,
    /// Pair only containers that share a spill zone, not a whole cabinet.
    #[arg(long)]
    pub no_cabinet_level: bool,
    /// Area a leak spreads over, e.g. "0.25 m2" (default in rules/thresholds.yaml).
    #[arg(long, value_name = "AREA")]
    pub spill_area: Option<String>,
    /// A folder of the site's own rule files, layered over the built-in rules.
    #[arg(long = "rules", value_name = "DIR", env = "OFFGAS_RULES")]
    pub site_rules: Option<PathBuf>,
    /// A thresholds file to use instead of the bundled rules/thresholds.yaml.
    #[arg(long, value_name = "FILE")]
    pub thresholds: Option<PathBuf>,
}

fn is_csv(p: &Path) -> bool {
    p.extension().is_some_and(|e| e.eq_ignore_ascii_case("csv"))
}

/// Reads the inventory: CSV by extension (with the column mapping), YAML otherwise.
fn read_inventory(
    cat: &offgas::catalog::Catalog,
    a: &AuditArgs,
) -> Result<(Inventory, Vec<serde_json::Value>)> {
    let name = a.inventory.display().to_string();
    let text = std::fs::read_to_string(&a.inventory)
        .with_context(|| format!("cannot read {name}: check the path"))?;
    if !is_csv(&a.inventory) {
        if a.columns.is_some() || a.mapping.is_some() {
            return Err(anyhow!(
                "--columns and --mapping are for CSV inventories; {name} is read as YAML"
            ));
        }
        let inv = Inventory::parse(cat, &name, &text).map_err(|e| anyhow!("{e}"))?;
        return Ok((inv, Vec::new()));
    }
    let mapping = match (&a.columns, &a.mapping) {
        (Some(_), Some(_)) => {
            return Err(anyhow!(
                "give the column mapping once: --columns or --mapping"
            ))
        }
        (Some(spec), None) => parse_mapping(spec).map_err(|e| anyhow!("--columns: {e}"))?,
        (None, Some(file)) => {
            let t = std::fs::read_to_string(file)
                .with_context(|| format!("cannot read the mapping file {}", file.display()))?;
            mapping_from_yaml(&t).map_err(|e| anyhow!("{}: {e}", file.display()))?
        }
        (None, None) => ColumnMapping::default(),
    };
    match import(cat, &name, &text, &mapping, a.skip_bad_rows) {
        Ok((inv, skipped)) => {
            for s in &skipped {
                eprintln!("offgas: skipped row {}: {}", s.row, s.message);
            }
            let skipped = skipped
                .iter()
                .map(|s| serde_json::to_value(s).unwrap_or_default())
                .collect();
            Ok((inv, skipped))
        }
        Err(errors) => Err(anyhow!(
            "{}",
            offgas::store::csv_import::refusal_message(&name, &errors)
        )),
    }
}

/// A progress bar on a terminal for audits that take more than a second; silent otherwise.
fn progress_bar() -> (ProgressBar, Instant) {
    let bar = ProgressBar::with_draw_target(None, ProgressDrawTarget::hidden());
    bar.set_style(
        ProgressStyle::with_template("checking pairs {bar:40} {pos}/{len} ({eta})")
            .unwrap_or_else(|_| ProgressStyle::default_bar()),
    );
    (bar, Instant::now())
}

pub fn run(a: AuditArgs) -> Result<u8> {
    let cat = load_catalog()?;
    let th = load_thresholds(a.thresholds.as_deref())?;
    a.out.check_free()?;
    let rules = rules::load(cat, a.site_rules.as_deref())?;
    let spill_area_m2 = match &a.spill_area {
        Some(s) => {
            let v = offgas::basics::quantity::parse_area_m2(s)
                .map_err(|e| anyhow!("--spill-area: {e}"))?;
            if v <= 0.0 {
                return Err(anyhow!("--spill-area must be above zero"));
            }
            v
        }
        None => th.storeroom.spill_area_m2,
    };
    let (inv, skipped) = read_inventory(cat, &a)?;
    let auditor = Auditor {
        cat,
        th: &th,
        rules: &rules,
        settings: AuditSettings {
            spill_area_m2,
            cabinet_level: !a.no_cabinet_level,
        },
    };
    let (bar, start) = progress_bar();
    let show = std::io::stderr().is_terminal();
    let progress = |done: usize, total: usize| {
        if show && start.elapsed().as_secs_f64() > 1.0 && bar.is_hidden() {
            bar.set_draw_target(ProgressDrawTarget::stderr());
        }
        bar.set_length(total as u64);
        bar.set_position(done as u64);
    };
    let mut report = auditor.audit(&inv, &progress);
    bar.finish_and_clear();
    report.skipped_rows = skipped;
    if a.suggest {
        let judge = PairJudge::new(&auditor, &inv);
        report.suggestion = Some(offgas::store::suggest::suggest(
            &inv,
            &judge,
            !a.no_cabinet_level,
            th.storeroom.spare_places_per_tray,
        ));
    }
    let text = match a.format {
        Format::Table => offgas::output::audit::audit_table(&report),
        Format::Markdown => offgas::output::audit::audit_markdown(&report),
        Format::Html => offgas::output::audit::audit_html(&report),
        Format::Json => serde_json::to_string_pretty(&report)? + "\n",
    };
    a.out.deliver(&text, "the audit report")?;
    Ok(super::exit_status(report.severity))
}
