//! The offgas command line: parse, call the library, print; one file per command, and here
//! the arguments, the dispatch and what the commands share (loading the bundled data,
//! reading batch files, choosing a layout, writing to a file or the terminal).
//!
//! Exit status: 0 clear, 3 review, 4 stop, 1 error in the input or the run, 2 usage error.

use anyhow::{anyhow, Context, Result};
use clap::{Parser, Subcommand, ValueEnum};
use offgas::catalog::Catalog;
use offgas::judge::thresholds::Thresholds;
use offgas::output::render::{check_markdown, check_table, View};
use offgas::pour::batch::Batch;
use offgas::report::Severity;
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

mod audit;
mod check;
mod demo;
mod log;
mod lookup;
mod procedure;
mod rules;

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
    Check(check::CheckArgs),
    /// Check a cleaning or decontamination procedure step by step and print its approval sheet.
    Procedure {
        /// The procedure file (YAML): the vessel and its steps.
        file: PathBuf,
        /// How to lay out the approval sheet.
        #[arg(long, value_enum, default_value_t = Format::Table)]
        format: Format,
        #[command(flatten)]
        out: OutputArgs,
        /// A folder of the site's own rule files, layered over the built-in rules.
        #[arg(long = "rules", value_name = "DIR", env = "OFFGAS_RULES")]
        site_rules: Option<PathBuf>,
        /// A thresholds file to use instead of the bundled rules/thresholds.yaml.
        #[arg(long, value_name = "FILE")]
        thresholds: Option<PathBuf>,
    },
    /// Audit a storeroom: every pair of containers that can meet if they leak, ranked.
    Audit(audit::AuditArgs),
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
        /// A name, synonym, formula or CAS number, e.g. "sodium cyanide", NaCN or 143-33-9.
        query: String,
        /// How to print what the data say.
        #[arg(long, value_enum, default_value_t = ListFormat::Text)]
        format: ListFormat,
    },
    /// Run the bundled demonstration: a fictional building's waste checks.
    Demo {
        /// How to lay out the demonstration's reports.
        #[arg(long, value_enum, default_value_t = DemoFormat::Table)]
        format: DemoFormat,
    },
}

#[derive(Subcommand)]
enum LogAction {
    /// Start a record from a container definition (empty, or with known contents).
    New {
        /// The record to create (a new file; an existing one is never replaced).
        file: PathBuf,
        /// The container file (YAML) the record starts from: name, capacity, volume, closure, contents.
        #[arg(long, value_name = "CONTAINER")]
        from: PathBuf,
    },
    /// Check a stream against what the record holds; record it if clear (or review with --accept).
    Add {
        /// The carboy's record.
        file: PathBuf,
        /// The stream file (YAML) to pour into the carboy.
        #[arg(long, value_name = "STREAM")]
        stream: PathBuf,
        /// Who is pouring.
        #[arg(long, value_name = "NAME")]
        by: String,
        /// Record a review anyway, with the reason a competent person gave.
        #[arg(long, value_name = "REASON")]
        accept: Option<String>,
        /// How to lay out the check's report.
        #[arg(long, value_enum, default_value_t = Format::Table)]
        format: Format,
        /// A folder of the site's own rule files, layered over the built-in rules.
        #[arg(long = "rules", value_name = "DIR", env = "OFFGAS_RULES")]
        site_rules: Option<PathBuf>,
        /// A thresholds file to use instead of the bundled rules/thresholds.yaml.
        #[arg(long, value_name = "FILE")]
        thresholds: Option<PathBuf>,
    },
    /// The history, what the carboy holds now, its fill level and headspace (and its waste tag once closed).
    Show {
        /// The carboy's record.
        file: PathBuf,
        /// How to lay out the record.
        #[arg(long, value_enum, default_value_t = Format::Table)]
        format: Format,
        #[command(flatten)]
        out: OutputArgs,
    },
    /// Mark the carboy full and print its waste tag.
    Close {
        /// The carboy's record.
        file: PathBuf,
        /// Who closes the carboy (printed on the tag).
        #[arg(long, value_name = "NAME")]
        by: String,
        /// How to lay out the waste tag.
        #[arg(long, value_enum, default_value_t = Format::Table)]
        format: Format,
        #[command(flatten)]
        out: OutputArgs,
    },
    /// Check every entry's checksum and the seal; names the line where a record breaks.
    Verify {
        /// The carboy's record.
        file: PathBuf,
    },
}

#[derive(Subcommand)]
enum RulesAction {
    /// List the rules in force (built-in, then site rules) with their source files.
    List {
        /// A folder of site rule files to layer over the built-ins.
        #[arg(long = "rules", value_name = "DIR", env = "OFFGAS_RULES")]
        site_rules: Option<PathBuf>,
        /// How to print the list.
        #[arg(long, value_enum, default_value_t = ListFormat::Text)]
        format: ListFormat,
    },
    /// Validate a folder of rule files: every problem of every file, each with its file and line.
    Check {
        /// The folder of site rule files (*.yaml) to validate as they would be layered.
        dir: PathBuf,
    },
}

/// How a report is laid out.
#[derive(Clone, Copy, ValueEnum)]
pub(crate) enum Format {
    /// A report for the terminal, laid out in tables.
    #[value(alias = "text")]
    Table,
    /// Markdown, for tickets and procedure files.
    Markdown,
    /// One JSON document.
    Json,
    /// One self-contained printable HTML page (A4 or Letter; no scripts or outside links).
    Html,
}

/// How the demonstration's reports are laid out (it prints several reports in a row, which
/// one HTML page does not hold).
#[derive(Clone, Copy, ValueEnum)]
enum DemoFormat {
    /// Reports for the terminal.
    Table,
    /// Markdown, for tickets and procedure files.
    Markdown,
    /// One JSON document holding every report.
    Json,
}

impl From<DemoFormat> for Format {
    fn from(f: DemoFormat) -> Format {
        match f {
            DemoFormat::Table => Format::Table,
            DemoFormat::Markdown => Format::Markdown,
            DemoFormat::Json => Format::Json,
        }
    }
}

/// How a list is printed.
#[derive(Clone, Copy, ValueEnum)]
enum ListFormat {
    /// Plain text for the terminal.
    Text,
    /// One JSON document.
    Json,
}

/// Where a report goes: the terminal, or a file that is never replaced without --force.
#[derive(clap::Args)]
pub(crate) struct OutputArgs {
    /// Write the report to this file instead of the terminal (an existing file is kept unless --force is given).
    #[arg(long, value_name = "FILE")]
    pub output: Option<PathBuf>,
    /// Let --output replace a file that already exists.
    #[arg(long)]
    pub force: bool,
}

impl OutputArgs {
    /// Refuses at once, before any work, to replace an existing file without --force.
    pub fn check_free(&self) -> Result<()> {
        match &self.output {
            Some(out) if out.exists() && !self.force => Err(anyhow!(
                "{} already exists; offgas does not overwrite it unless you add --force",
                out.display()
            )),
            _ => Ok(()),
        }
    }

    /// True when the report goes to the terminal (colour is then allowed).
    pub fn to_terminal(&self) -> bool {
        self.output.is_none()
    }

    /// Prints `text`, or writes it to --output; `what` names it in the message.
    pub fn deliver(&self, text: &str, what: &str) -> Result<()> {
        let Some(out) = &self.output else {
            return print(text);
        };
        let mut options = std::fs::OpenOptions::new();
        options.write(true);
        if self.force {
            options.create(true).truncate(true);
        } else {
            // Created only if absent, so a file that appeared since `check_free` is kept too.
            options.create_new(true);
        }
        let mut file = options.open(out).map_err(|e| {
            if e.kind() == std::io::ErrorKind::AlreadyExists {
                anyhow!(
                    "{} already exists; offgas does not overwrite it unless you add --force",
                    out.display()
                )
            } else {
                anyhow!("cannot write {}: {e}", out.display())
            }
        })?;
        file.write_all(text.as_bytes())
            .and_then(|()| file.flush())
            .with_context(|| format!("cannot write {}", out.display()))?;
        eprintln!("offgas: wrote {what} to {}", out.display());
        Ok(())
    }
}

/// Parses the command line, runs the command and turns its outcome into the exit status.
pub fn run() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Check(args) => check::run(&args),
        Command::Procedure {
            file,
            format,
            out,
            site_rules,
            thresholds,
        } => procedure::run(
            &file,
            format,
            &out,
            site_rules.as_deref(),
            thresholds.as_deref(),
        ),
        Command::Audit(args) => audit::run(args),
        Command::Log { action } => match action {
            LogAction::New { file, from } => log::new(&file, &from),
            LogAction::Add {
                file,
                stream,
                by,
                accept,
                format,
                site_rules,
                thresholds,
            } => log::add(
                &file,
                &stream,
                &by,
                accept.as_deref(),
                format,
                site_rules.as_deref(),
                thresholds.as_deref(),
            ),
            LogAction::Show { file, format, out } => log::show(&file, format, &out),
            LogAction::Close {
                file,
                by,
                format,
                out,
            } => log::close(&file, &by, format, &out),
            LogAction::Verify { file } => log::verify(&file),
        },
        Command::Rules { action } => match action {
            RulesAction::List { site_rules, format } => {
                rules::list(site_rules.as_deref(), matches!(format, ListFormat::Json))
            }
            RulesAction::Check { dir } => rules::check_dir(&dir),
        },
        Command::Lookup { query, format } => {
            lookup::run(&query, matches!(format, ListFormat::Json))
        }
        Command::Demo { format } => demo::run(format.into()),
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

/// The bundled catalog, kept for the life of the process: it is dropped only at exit,
/// where freeing its thousands of small allocations one by one would cost a short command
/// about a fifth of its time.
pub(crate) fn load_catalog() -> Result<&'static Catalog> {
    offgas::embedded::catalog()
        .map(|c| &*Box::leak(Box::new(c)))
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

/// The terminal view; colour only on a terminal, never in a file or with NO_COLOR.
pub(crate) fn view(all_pairs: bool, to_terminal: bool) -> View {
    let color =
        to_terminal && std::env::var_os("NO_COLOR").is_none() && std::io::stdout().is_terminal();
    let charset = offgas::output::plot::spark::Charset::from_locale(|k| std::env::var(k).ok());
    View {
        color,
        all_pairs,
        charset,
    }
}

/// Prints text to stdout; a closed pipe surfaces as an io error that main treats as done.
pub(crate) fn print(text: &str) -> Result<()> {
    let mut out = std::io::stdout().lock();
    out.write_all(text.as_bytes())?;
    out.flush()?;
    Ok(())
}

/// A check's report in `format`, for the terminal.
pub(crate) fn render(
    report: &offgas::report::CheckReport,
    format: Format,
    all_pairs: bool,
) -> Result<String> {
    render_to(report, format, all_pairs, true)
}

/// A check's report in `format`; `to_terminal` false when it goes to a file.
pub(crate) fn render_to(
    report: &offgas::report::CheckReport,
    format: Format,
    all_pairs: bool,
    to_terminal: bool,
) -> Result<String> {
    Ok(match format {
        Format::Table => check_table(report, view(all_pairs, to_terminal)),
        Format::Markdown => check_markdown(report, view(all_pairs, to_terminal)),
        Format::Json => serde_json::to_string_pretty(report)? + "\n",
        Format::Html => offgas::output::check_page::check_html(report, all_pairs),
    })
}

pub(crate) fn exit_status(s: Severity) -> u8 {
    s.exit_code() as u8
}

#[cfg(test)]
mod tests {
    use super::Cli;
    use clap::CommandFactory;

    /// Every argument and option of every command says what it is for.
    #[test]
    fn every_argument_has_help() {
        fn walk(cmd: &clap::Command, path: &str, missing: &mut Vec<String>) {
            for arg in cmd.get_arguments() {
                let id = arg.get_id().as_str();
                if id == "help" || id == "version" {
                    continue;
                }
                if arg.get_help().is_none() && arg.get_long_help().is_none() {
                    missing.push(format!("{path} {id}"));
                }
            }
            for sub in cmd.get_subcommands() {
                if sub.get_about().is_none() {
                    missing.push(format!("{path} {} (no description)", sub.get_name()));
                }
                walk(sub, &format!("{path} {}", sub.get_name()), missing);
            }
        }
        let mut missing = Vec::new();
        let cmd = Cli::command();
        cmd.clone().debug_assert();
        walk(&cmd, "offgas", &mut missing);
        assert!(missing.is_empty(), "without help: {missing:?}");
    }
}
