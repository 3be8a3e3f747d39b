//! `offgas check`: one pour, both orders, and the verdict as exit status.

use super::{
    exit_status, load_catalog, load_thresholds, read_batch, render_to, rules, Format, OutputArgs,
};
use anyhow::{anyhow, Result};
use offgas::check::{check, CheckError, CheckOptions};
use std::path::PathBuf;

/// The arguments of `offgas check`.
#[derive(clap::Args)]
pub(crate) struct CheckArgs {
    /// The container file (YAML): capacity, volume, closure, contents.
    container: PathBuf,
    /// The stream file (YAML) to pour in.
    #[arg(long = "add", value_name = "STREAM")]
    stream: PathBuf,
    /// How to lay out the report.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    format: Format,
    #[command(flatten)]
    out: OutputArgs,
    /// Temperature of both batches, e.g. "30 °C" (overrides the files).
    #[arg(long, value_name = "T")]
    temperature: Option<String>,
    /// A thresholds file to use instead of the bundled rules/thresholds.yaml.
    #[arg(long, value_name = "FILE")]
    thresholds: Option<PathBuf>,
    /// Show every proton-transfer pair, not only those that matter.
    #[arg(long)]
    all_pairs: bool,
    /// A folder of the site's own rule files, layered over the built-in rules.
    #[arg(long = "rules", value_name = "DIR", env = "OFFGAS_RULES")]
    site_rules: Option<PathBuf>,
    /// Volume of the room the container stands in, e.g. "40 m3" (default in rules/thresholds.yaml).
    #[arg(long, value_name = "VOLUME")]
    room: Option<String>,
    /// Air changes per hour in that room (default in rules/thresholds.yaml).
    #[arg(long, value_name = "N")]
    air_changes: Option<f64>,
    /// Judge a spill of this area (e.g. "1 m2") instead of the container's open surface.
    #[arg(long, value_name = "AREA")]
    spill_area: Option<String>,
}

/// `offgas check`: one pour, both orders, and the verdict as exit status.
pub(crate) fn run(args: &CheckArgs) -> Result<u8> {
    args.out.check_free()?;
    let cat = load_catalog()?;
    let th = load_thresholds(args.thresholds.as_deref())?;
    let rules = rules::load(cat, args.site_rules.as_deref())?;
    let temperature_k = match &args.temperature {
        None => None,
        Some(t) => {
            let k = offgas::basics::quantity::parse_temperature(t)
                .map_err(|e| anyhow!("--temperature: {e}"))?;
            if !(273.15..=373.15).contains(&k.0) {
                return Err(anyhow!(
                    "--temperature {t} is outside 0–100 °C, the range of the aqueous model"
                ));
            }
            Some(k.0)
        }
    };
    let room_volume_m3 = match &args.room {
        None => None,
        Some(v) => {
            let m3 = offgas::basics::quantity::parse_room_volume_m3(v)
                .map_err(|e| anyhow!("--room: {e}"))?;
            if m3 <= 0.0 {
                return Err(anyhow!("--room {v}: the room needs a volume above zero"));
            }
            Some(m3)
        }
    };
    if let Some(n) = args.air_changes {
        if !(n > 0.0 && n.is_finite()) {
            return Err(anyhow!(
                "--air-changes {n}: give the air changes per hour as a number above zero"
            ));
        }
    }
    let spill_area_m2 = match &args.spill_area {
        None => None,
        Some(a) => {
            let m2 = offgas::basics::quantity::parse_area_m2(a)
                .map_err(|e| anyhow!("--spill-area: {e}"))?;
            if m2 <= 0.0 {
                return Err(anyhow!("--spill-area {a}: the area must be above zero"));
            }
            Some(m2)
        }
    };
    let options = CheckOptions {
        temperature_k,
        room_volume_m3,
        air_changes_per_hour: args.air_changes,
        spill_area_m2,
        detail: offgas::pour::path::Detail::Full,
        action: offgas::judge::assess::Action::Pour,
    };
    let a = read_batch(cat, &args.container)?;
    let b = read_batch(cat, &args.stream)?;
    let report = match check(cat, &th, &rules, &a, &b, &options) {
        Ok(r) => r,
        Err(CheckError::Input(e)) => return Err(anyhow!("{e}")),
        Err(e @ CheckError::Solve { .. }) => return Err(anyhow!("{e}")),
    };
    let text = render_to(&report, args.format, args.all_pairs, args.out.to_terminal())?;
    args.out.deliver(&text, "the check report")?;
    Ok(exit_status(report.severity))
}
