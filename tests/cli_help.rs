//! The command line's help and formats: every argument and option of every command says
//! what it is for, and every report command gives the same formats, each well formed.

use assert_cmd::Command;
use predicates::prelude::*;
use std::path::{Path, PathBuf};

fn offgas() -> Command {
    let mut c = Command::cargo_bin("offgas").unwrap();
    c.env("NO_COLOR", "1");
    c.env_remove("OFFGAS_RULES");
    c
}

fn help_of(path: &[&str]) -> String {
    let out = offgas().args(path).arg("-h").output().unwrap();
    assert!(out.status.success(), "offgas {} -h failed", path.join(" "));
    String::from_utf8(out.stdout).unwrap()
}

/// The entries of one section of `-h` output ("Arguments:", "Options:", "Commands:"), each
/// as (what, its help text). An entry starts at most six spaces in; its help follows after
/// two spaces, or on the next, further indented line.
fn section(help: &str, title: &str) -> Vec<(String, String)> {
    let lines: Vec<&str> = help.lines().collect();
    let Some(start) = lines.iter().position(|l| *l == title) else {
        return Vec::new();
    };
    let indent_of = |l: &str| l.len() - l.trim_start().len();
    let mut entries = Vec::new();
    let mut i = start + 1;
    while i < lines.len() {
        let line = lines[i];
        i += 1;
        if line.trim().is_empty() {
            continue;
        }
        let indent = indent_of(line);
        if indent == 0 {
            break;
        }
        if indent > 6 {
            continue;
        }
        let text = line.trim_start();
        let (what, mut help) = match text.find("  ") {
            Some(k) => (text[..k].to_string(), text[k..].trim().to_string()),
            None => (text.to_string(), String::new()),
        };
        if help.is_empty() {
            if let Some(next) = lines.get(i) {
                if !next.trim().is_empty() && indent_of(next) > indent + 2 {
                    help = next.trim().to_string();
                }
            }
        }
        entries.push((what, help));
    }
    entries
}

/// Walks every command and subcommand through its `-h` output.
fn walk(path: Vec<&str>, missing: &mut Vec<String>, seen: &mut usize) {
    let help = help_of(&path);
    *seen += 1;
    let about = help.lines().next().unwrap_or("");
    if about.is_empty() || about.starts_with("Usage:") {
        missing.push(format!("offgas {}: no description", path.join(" ")));
    }
    for title in ["Arguments:", "Options:"] {
        for (what, text) in section(&help, title) {
            if text.is_empty() {
                missing.push(format!("offgas {} {what}", path.join(" ")));
            }
        }
    }
    let commands: Vec<String> = section(&help, "Commands:")
        .into_iter()
        .map(|(name, _)| name)
        .filter(|n| n != "help")
        .collect();
    for c in &commands {
        let mut next = path.clone();
        next.push(c.as_str());
        walk(next, missing, seen);
    }
}

#[test]
fn every_argument_and_option_of_every_command_has_help() {
    let mut missing = Vec::new();
    let mut seen = 0;
    walk(Vec::new(), &mut missing, &mut seen);
    assert!(
        seen >= 14,
        "only {seen} commands were walked: the help layout changed"
    );
    assert!(
        missing.is_empty(),
        "without help text:\n  {}",
        missing.join("\n  ")
    );
}

#[test]
fn the_help_parser_sees_a_missing_help_text() {
    let help = "About\n\nUsage: x\n\nArguments:\n  <FILE>  The file\n\nOptions:\n      --force\n      --by <NAME>  Who\n  -h, --help     Print help\n";
    let options = section(help, "Options:");
    assert_eq!(options.len(), 3, "{options:?}");
    assert_eq!(options[0], ("--force".to_string(), String::new()));
    assert_eq!(options[1].1, "Who");
    assert_eq!(section(help, "Arguments:")[0].1, "The file");
}

#[test]
fn format_says_what_each_value_gives() {
    let out = offgas().args(["check", "--help"]).output().unwrap();
    let text = String::from_utf8(out.stdout).unwrap();
    for (value, words) in [
        ("table:", "terminal"),
        ("markdown:", "tickets and procedure files"),
        ("json:", "One JSON document"),
        ("html:", "self-contained printable HTML page"),
    ] {
        let line = text
            .lines()
            .find(|l| l.trim_start().trim_start_matches("- ").starts_with(value))
            .unwrap_or_else(|| panic!("no `{value}` line in check --help"));
        assert!(line.contains(words), "{line}");
    }
}

// ---------------------------------------------------------------------------------------
// Every report command in every format.

fn demo(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("data/demo")
        .join(name)
}

const BOX_DRAWING: std::ops::RangeInclusive<char> = '\u{2500}'..='\u{257F}';

/// Start and end tags balance (void elements and `/>` aside): a cheap well-formedness check.
fn tags_balance(html: &str) -> Result<(), String> {
    const VOID: &[&str] = &["meta", "br", "hr", "img", "input", "link", "col", "wbr"];
    let mut stack: Vec<String> = Vec::new();
    let mut rest = html;
    while let Some(open) = rest.find('<') {
        rest = &rest[open + 1..];
        let close = rest.find('>').ok_or("a tag is not closed")?;
        let tag = &rest[..close];
        rest = &rest[close + 1..];
        if tag.starts_with('!') {
            continue;
        }
        let name: String = tag
            .trim_start_matches('/')
            .chars()
            .take_while(|c| c.is_ascii_alphanumeric())
            .collect::<String>()
            .to_ascii_lowercase();
        if tag.starts_with('/') {
            match stack.pop() {
                Some(top) if top == name => {}
                other => return Err(format!("</{name}> closes <{other:?}>")),
            }
        } else if !tag.ends_with('/') && !VOID.contains(&name.as_str()) {
            stack.push(name);
        }
    }
    if stack.is_empty() {
        Ok(())
    } else {
        Err(format!("left open: {stack:?}"))
    }
}

fn assert_well_formed(what: &str, format: &str, text: &str) {
    assert!(!text.trim().is_empty(), "{what} --format {format}: empty");
    match format {
        "json" => {
            serde_json::from_str::<serde_json::Value>(text)
                .unwrap_or_else(|e| panic!("{what} --format json: not one JSON document: {e}"));
        }
        "html" => {
            assert!(
                text.starts_with("<!DOCTYPE html>"),
                "{what} --format html: no doctype"
            );
            let lower = text.to_ascii_lowercase();
            for outside in ["http", "<script", "<link", "@import", "url("] {
                assert!(
                    !lower.contains(outside),
                    "{what} --format html refers to `{outside}`"
                );
            }
            assert!(
                lower.contains("<meta charset=\"utf-8\">"),
                "{what}: charset"
            );
            assert!(lower.contains("@page"), "{what}: no print layout");
            tags_balance(text).unwrap_or_else(|e| panic!("{what} --format html: {e}"));
        }
        "markdown" => {
            let boxes: Vec<char> = text.chars().filter(|c| BOX_DRAWING.contains(c)).collect();
            assert!(
                boxes.is_empty(),
                "{what} --format markdown has box-drawing characters"
            );
        }
        _ => {}
    }
}

struct Record {
    dir: tempfile::TempDir,
}

impl Record {
    /// A carboy record with one addition, closed when `closed`.
    fn new(closed: bool) -> (Record, PathBuf) {
        let dir = tempfile::tempdir().unwrap();
        let carboy = dir.path().join("carboy.yaml");
        std::fs::write(
            &carboy,
            "name: Carboy QL-11, rinse water\ncapacity: 10 L\nvolume: 0 L\nclosure: sealed\n",
        )
        .unwrap();
        let rinse = dir.path().join("rinse.yaml");
        std::fs::write(
            &rinse,
            "name: rinse\nvolume: 2 L\ncontents:\n  - sodium chloride: 0.05 mol/L\n  - sodium hydroxide: 0.01 mol/L\n",
        )
        .unwrap();
        let record = dir.path().join("carboy.log");
        offgas()
            .args(["log", "new"])
            .arg(&record)
            .arg("--from")
            .arg(&carboy)
            .assert()
            .code(0);
        offgas()
            .args(["log", "add"])
            .arg(&record)
            .arg("--stream")
            .arg(&rinse)
            .args(["--by", "T. Tech"])
            .assert()
            .code(0);
        if closed {
            offgas()
                .args(["log", "close"])
                .arg(&record)
                .args(["--by", "W. Waste"])
                .assert()
                .code(0);
        }
        (Record { dir }, record)
    }
}

/// The report commands, each as arguments and the exit status it gives.
fn report_commands(record: &Path) -> Vec<(Vec<String>, i32)> {
    let s = |p: PathBuf| p.display().to_string();
    vec![
        (
            vec![
                "check".into(),
                s(demo("carboy-cyanide-plating.yaml")),
                "--add".into(),
                s(demo("stream-acid-descale.yaml")),
            ],
            4,
        ),
        (
            vec!["procedure".into(), s(demo("procedure-descale-tank.yaml"))],
            4,
        ),
        (vec!["audit".into(), s(demo("storeroom.yaml"))], 4),
        (
            vec!["log".into(), "show".into(), s(record.to_path_buf())],
            0,
        ),
    ]
}

#[test]
fn every_report_command_gives_every_format_well_formed() {
    let (_keep, record) = Record::new(true);
    for (args, code) in report_commands(&record) {
        for format in ["table", "markdown", "json", "html"] {
            let out = offgas()
                .args(&args)
                .args(["--format", format])
                .output()
                .unwrap();
            let what = args[..args.len().min(2)].join(" ");
            assert_eq!(
                out.status.code(),
                Some(code),
                "{what} --format {format}: {}",
                String::from_utf8_lossy(&out.stderr)
            );
            assert_well_formed(&what, format, &String::from_utf8(out.stdout).unwrap());
        }
    }
}

#[test]
fn the_waste_tag_comes_in_every_format_well_formed() {
    for format in ["table", "markdown", "json", "html"] {
        let (_keep, record) = Record::new(false);
        let out = offgas()
            .args(["log", "close"])
            .arg(&record)
            .args(["--by", "W. Waste", "--format", format])
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(0), "{format}");
        let text = String::from_utf8(out.stdout).unwrap();
        assert_well_formed("log close", format, &text);
        assert!(text.contains("sodium chloride"), "{format}");
    }
}

#[test]
fn the_demo_gives_table_markdown_and_json_and_refuses_html() {
    for format in ["table", "json"] {
        let out = offgas()
            .args(["demo", "--format", format])
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(0), "demo --format {format}");
        assert_well_formed("demo", format, &String::from_utf8(out.stdout).unwrap());
    }
    let out = offgas()
        .args(["demo", "--format", "markdown"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
    let text = String::from_utf8(out.stdout).unwrap();
    // Every part of the demo is markdown, its procedure sheet too.
    assert_well_formed("demo", "markdown", &text);
    // Several reports in a row make no single page; the demo's procedure has its own
    // (`offgas procedure ... --format html`).
    offgas().args(["demo", "--format", "html"]).assert().code(2);
}

#[test]
fn the_demo_markdown_has_no_terminal_tables() {
    let out = offgas()
        .args(["demo", "--format", "markdown"])
        .output()
        .unwrap();
    assert_well_formed("demo", "markdown", &String::from_utf8(out.stdout).unwrap());
}

#[test]
fn output_never_replaces_a_file_without_force() {
    let (keep, record) = Record::new(true);
    let mut commands = report_commands(&record);
    let (_open, open_record) = Record::new(false);
    commands.push((
        vec![
            "log".into(),
            "close".into(),
            open_record.display().to_string(),
            "--by".into(),
            "W. Waste".into(),
        ],
        0,
    ));
    for (args, code) in commands {
        let what = args[..2].join(" ");
        let taken = keep.dir.path().join("taken.txt");
        std::fs::write(&taken, "keep me").unwrap();
        offgas()
            .args(&args)
            .arg("--output")
            .arg(&taken)
            .assert()
            .code(1)
            .stderr(predicate::str::contains("already exists"))
            .stderr(predicate::str::contains("--force"));
        assert_eq!(
            std::fs::read_to_string(&taken).unwrap(),
            "keep me",
            "{what}: the file was replaced"
        );
        let fresh = keep.dir.path().join(format!("{}.md", args[0]));
        let _ = std::fs::remove_file(&fresh);
        offgas()
            .args(&args)
            .args(["--format", "markdown", "--output"])
            .arg(&fresh)
            .assert()
            .code(code)
            .stdout(predicate::str::is_empty());
        assert!(
            std::fs::read_to_string(&fresh).unwrap().contains("# "),
            "{what}: nothing written"
        );
        if args[1] != "close" {
            offgas()
                .args(&args)
                .args(["--format", "markdown", "--force", "--output"])
                .arg(&taken)
                .assert()
                .code(code);
            assert_ne!(
                std::fs::read_to_string(&taken).unwrap(),
                "keep me",
                "{what}"
            );
        }
    }
}
