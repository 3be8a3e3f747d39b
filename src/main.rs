//! The offgas command line: parse, call the library, print. One function per command.
//!
//! Exit status: 0 clear, 3 review, 4 stop, 1 error in the input or the run, 2 usage error.

use anyhow::{anyhow, Context, Result};
use clap::{Parser, Subcommand, ValueEnum};
use offgas::batch::Batch;
use offgas::catalog::Catalog;
use offgas::check::{check, CheckError, CheckOptions};
use offgas::render::{check_markdown, check_table, View};
use offgas::report::Severity;
use offgas::thresholds::Thresholds;
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

mod audit_cmd;
mod demo;
mod log_cmd;
mod lookup;
mod rules_cmd;

/// What gas comes out if these meet? Speciation and headspace gas for chemical waste.
#[derive(Parser)]
#[command(name = "offgas", version, about, long_about = None)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Check pouring a stream into a container: gas in the headspace, along the pour and at the end.
    Check(CheckArgs),
    /// Check a cleaning or decontamination procedure step by step and print its approval sheet.
    Procedure {
        /// The procedure file (YAML): the vessel and its steps.
        file: PathBuf,
        #[arg(long, value_enum, default_value_t = SheetFormat::Table)]
        format: SheetFormat,
        /// Write the sheet to this file instead of the terminal (never overwrites without --force).
        #[arg(long, value_name = "FILE")]
        output: Option<PathBuf>,
        /// Allow --output to replace an existing file.
        #[arg(long)]
        force: bool,
        /// A folder of the site's own rule files, layered over the built-in rules.
        #[arg(long = "rules", value_name = "DIR", env = "OFFGAS_RULES")]
        site_rules: Option<PathBuf>,
        /// A thresholds file to use instead of the bundled rules/thresholds.yaml.
        #[arg(long, value_name = "FILE")]
        thresholds: Option<PathBuf>,
    },
    /// Audit a storeroom: every pair of containers that can meet if they leak, ranked.
    Audit(audit_cmd::AuditArgs),
    /// A carboy's running record: start it, add to it (checked), show it, close it.
    Log {
        #[command(subcommand)]
        action: LogAction,
    },
    /// The hazard rules: list those in force, or validate a folder of site rules.
    Rules {
        #[command(subcommand)]
        action: RulesAction,
    },
    /// Find a substance or acid–base family by name, synonym, formula or CAS number.
    Lookup {
        query: String,
        #[arg(long, value_enum, default_value_t = LookupFormat::Text)]
        format: LookupFormat,
    },
    /// Run the bundled demonstration: a fictional building's waste checks.
    Demo {
        #[arg(long, value_enum, default_value_t = Format::Table)]
        format: Format,
    },
}

#[derive(Subcommand)]
enum LogAction {
    /// Start a record from a container definition (empty, or with known contents).
    New {
        file: PathBuf,
        #[arg(long, value_name = "CONTAINER")]
        from: PathBuf,
    },
    /// Check a stream against what the record holds; record it if clear (or review with --accept).
    Add {
        file: PathBuf,
        #[arg(long, value_name = "STREAM")]
        stream: PathBuf,
        /// Who is pouring.
        #[arg(long, value_name = "NAME")]
        by: String,
        /// Record a review anyway, with the reason a competent person gave.
        #[arg(long, value_name = "REASON")]
        accept: Option<String>,
        #[arg(long, value_enum, default_value_t = Format::Table)]
        format: Format,
    },
    /// The history, what the carboy holds now, its fill level and headspace.
    Show {
        file: PathBuf,
        #[arg(long, value_enum, default_value_t = LookupFormat::Text)]
        format: LookupFormat,
    },
    /// Mark the carboy full and print its contents for the waste tag.
    Close {
        file: PathBuf,
        #[arg(long, value_name = "NAME")]
        by: String,
    },
    /// Check every entry's checksum and the seal; names the line where a record breaks.
    Verify { file: PathBuf },
}

#[derive(Subcommand)]
enum RulesAction {
    /// List the rules in force (built-in, then site rules) with their source files.
    List {
        /// A folder of site rule files to layer over the built-ins.
        #[arg(long = "rules", value_name = "DIR", env = "OFFGAS_RULES")]
        site_rules: Option<PathBuf>,
        #[arg(long, value_enum, default_value_t = LookupFormat::Text)]
        format: LookupFormat,
    },
    /// Validate a folder of rule files: unknown classes and keys, conditions that can never hold.
    Check { dir: PathBuf },
}

#[derive(Clone, Copy, ValueEnum)]
enum Format {
    Table,
    Json,
    Markdown,
}

#[derive(Clone, Copy, ValueEnum)]
enum SheetFormat {
    Table,
    Markdown,
    Html,
    Json,
}

#[derive(Clone, Copy, ValueEnum)]
enum LookupFormat {
    Text,
    Json,
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Check(args) => run_check(&args),
        Command::Procedure {
            file,
            format,
            output,
            force,
            site_rules,
            thresholds,
        } => run_procedure(
            &file,
            format,
            output.as_deref(),
            force,
            site_rules.as_deref(),
            thresholds.as_deref(),
        ),
        Command::Audit(args) => audit_cmd::run(args),
        Command::Log { action } => match action {
            LogAction::New { file, from } => log_cmd::new(&file, &from),
            LogAction::Add {
                file,
                stream,
                by,
                accept,
                format,
            } => log_cmd::add(&file, &stream, &by, accept.as_deref(), format),
            LogAction::Show { file, format } => {
                log_cmd::show(&file, matches!(format, LookupFormat::Json))
            }
            LogAction::Close { file, by } => log_cmd::close(&file, &by),
            LogAction::Verify { file } => log_cmd::verify(&file),
        },
        Command::Rules { action } => match action {
            RulesAction::List { site_rules, format } => {
                rules_cmd::list(site_rules.as_deref(), matches!(format, LookupFormat::Json))
            }
            RulesAction::Check { dir } => rules_cmd::check_dir(&dir),
        },
        Command::Lookup { query, format } => {
            lookup::run(&query, matches!(format, LookupFormat::Json))
        }
        Command::Demo { format } => demo::run(format),
    };
    match result {
        Ok(code) => ExitCode::from(code),
        Err(e) => {
            if is_broken_pipe(&e) {
                return ExitCode::SUCCESS;
            }
            eprintln!("offgas: {e:#}");
            ExitCode::from(1)
        }
    }
}

fn is_broken_pipe(e: &anyhow::Error) -> bool {
    e.chain().any(|c| {
        c.downcast_ref::<std::io::Error>()
            .is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe)
    })
}

pub(crate) fn load_catalog() -> Result<Catalog> {
    offgas::embedded::catalog()
        .map_err(|e| anyhow!("the bundled data is broken (a build defect): {e}"))
}

pub(crate) fn load_thresholds(path: Option<&Path>) -> Result<Thresholds> {
    match path {
        None => offgas::embedded::thresholds().map_err(|e| anyhow!(e)),
        Some(p) => {
            let text = std::fs::read_to_string(p)
                .with_context(|| format!("cannot read thresholds file {}", p.display()))?;
            Thresholds::parse(&p.display().to_string(), &text).map_err(|e| anyhow!(e))
        }
    }
}

pub(crate) fn read_batch(cat: &Catalog, path: &Path) -> Result<Batch> {
    let text = std::fs::read_to_string(path)
        .with_context(|| format!("cannot read {}: check the path", path.display()))?;
    Batch::parse(cat, &path.display().to_string(), &text).map_err(|e| anyhow!("{e}"))
}

pub(crate) fn view(all_pairs: bool) -> View {
    let color = std::env::var_os("NO_COLOR").is_none() && std::io::stdout().is_terminal();
    View { color, all_pairs }
}

/// Prints text to stdout; a closed pipe surfaces as an io error that main treats as done.
pub(crate) fn print(text: &str) -> Result<()> {
    let mut out = std::io::stdout().lock();
    out.write_all(text.as_bytes())?;
    out.flush()?;
    Ok(())
}

pub(crate) fn render(
    report: &offgas::report::CheckReport,
    format: Format,
    all_pairs: bool,
) -> Result<String> {
    Ok(match format {
        Format::Table => check_table(report, view(all_pairs)),
        Format::Markdown => check_markdown(report, view(all_pairs)),
        Format::Json => serde_json::to_string_pretty(report)? + "\n",
    })
}

/// The arguments of `offgas check`.
#[derive(clap::Args)]
struct CheckArgs {
    /// The container file (YAML): capacity, volume, closure, contents.
    container: PathBuf,
    /// The stream file (YAML) to pour in.
    #[arg(long = "add", value_name = "STREAM")]
    stream: PathBuf,
    #[arg(long, value_enum, default_value_t = Format::Table)]
    format: Format,
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
fn run_check(args: &CheckArgs) -> Result<u8> {
    let cat = load_catalog()?;
    let th = load_thresholds(args.thresholds.as_deref())?;
    let rules = rules_cmd::load(&cat, args.site_rules.as_deref())?;
    let temperature_k = match &args.temperature {
        None => None,
        Some(t) => {
            let k = offgas::quantity::parse_temperature(t)
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
            let m3 =
                offgas::quantity::parse_room_volume_m3(v).map_err(|e| anyhow!("--room: {e}"))?;
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
            let m2 =
                offgas::quantity::parse_area_m2(a).map_err(|e| anyhow!("--spill-area: {e}"))?;
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
        detail: offgas::path::Detail::Full,
    };
    let a = read_batch(&cat, &args.container)?;
    let b = read_batch(&cat, &args.stream)?;
    let report = match check(&cat, &th, &rules, &a, &b, &options) {
        Ok(r) => r,
        Err(CheckError::Input(e)) => return Err(anyhow!("{e}")),
        Err(e @ CheckError::Solve { .. }) => return Err(anyhow!("{e}")),
    };
    print(&render(&report, args.format, args.all_pairs)?)?;
    Ok(exit_status(report.severity))
}

/// `offgas procedure`: every step checked against what the vessel holds, fixes computed for
/// the first step that is not clear, and the approval sheet.
fn run_procedure(
    file: &Path,
    format: SheetFormat,
    output: Option<&Path>,
    force: bool,
    site_rules: Option<&Path>,
    thresholds: Option<&Path>,
) -> Result<u8> {
    use offgas::procedure::{fix::fixes, run::Engine, Procedure};
    let cat = load_catalog()?;
    let th = load_thresholds(thresholds)?;
    let rules = rules_cmd::load(&cat, site_rules)?;
    if let Some(out) = output {
        if out.exists() && !force {
            return Err(anyhow!(
                "{} already exists; offgas does not overwrite it unless you add --force",
                out.display()
            ));
        }
    }
    let text = std::fs::read_to_string(file)
        .with_context(|| format!("cannot read {}: check the path", file.display()))?;
    let procedure =
        Procedure::parse(&cat, &file.display().to_string(), &text).map_err(|e| anyhow!("{e}"))?;
    let engine = Engine {
        cat: &cat,
        th: &th,
        rules: &rules,
    };
    let mut report = engine.run(&procedure).map_err(|e| anyhow!("{e}"))?;
    report.fixes = fixes(&engine, &procedure, &report);
    let sheet = match format {
        SheetFormat::Table => offgas::sheet::procedure_table(&report),
        SheetFormat::Markdown => offgas::sheet::procedure_markdown(&report),
        SheetFormat::Html => offgas::sheet::procedure_html(&report),
        SheetFormat::Json => serde_json::to_string_pretty(&report)? + "\n",
    };
    match output {
        Some(out) => {
            std::fs::write(out, sheet)
                .with_context(|| format!("cannot write {}", out.display()))?;
            eprintln!("offgas: wrote the approval sheet to {}", out.display());
        }
        None => print(&sheet)?,
    }
    Ok(exit_status(report.severity))
}

pub(crate) fn exit_status(s: Severity) -> u8 {
    s.exit_code() as u8
}
