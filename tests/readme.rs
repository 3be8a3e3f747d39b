//! The README's worked examples come from real runs: each block that starts with
//! `$ offgas ...` is run, and every number it quotes must appear in what offgas prints.

use assert_cmd::Command;

const README: &str = include_str!("../README.md");

/// (command line, quoted output) of every example block.
fn examples() -> Vec<(String, String)> {
    let mut out = Vec::new();
    let mut in_block = false;
    let mut command: Option<String> = None;
    let mut quoted = String::new();
    for line in README.lines() {
        if line.starts_with("```") {
            if in_block {
                if let Some(c) = command.take() {
                    out.push((c, std::mem::take(&mut quoted)));
                }
            }
            in_block = !in_block;
            continue;
        }
        if !in_block {
            continue;
        }
        if let Some(c) = line.strip_prefix("$ offgas ") {
            command = Some(c.to_string());
        } else if command.is_some() {
            quoted.push_str(line);
            quoted.push('\n');
        }
    }
    out
}

/// The numbers in a text, as written ("228", "28.7", "6.51").
fn numbers(text: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    for c in text.chars().chain(std::iter::once(' ')) {
        if c.is_ascii_digit() || (c == '.' && !cur.is_empty()) {
            cur.push(c);
        } else {
            let n = cur.trim_end_matches('.').to_string();
            if !n.is_empty() {
                out.push(n);
            }
            cur.clear();
        }
    }
    out
}

#[test]
fn every_worked_example_quotes_what_offgas_prints() {
    let examples = examples();
    assert!(!examples.is_empty(), "the README has worked examples");
    for (command, quoted) in examples {
        let out = Command::cargo_bin("offgas")
            .unwrap()
            .env("NO_COLOR", "1")
            .current_dir(env!("CARGO_MANIFEST_DIR"))
            .args(command.split_whitespace())
            .output()
            .unwrap();
        let printed = String::from_utf8_lossy(&out.stdout);
        // Lines are wrapped in the README; compare the words, not the line breaks.
        let flat = printed.split_whitespace().collect::<Vec<_>>().join(" ");
        for n in numbers(&quoted) {
            assert!(
                numbers(&flat).contains(&n),
                "`offgas {command}`: the README quotes {n}, which offgas does not print:\n{printed}"
            );
        }
        for line in quoted.lines().filter(|l| l.starts_with("Verdict:")) {
            assert!(printed.contains(line.trim()), "`offgas {command}`: {line}");
        }
    }
}

/// Every picture the README shows is a committed PNG that decodes, kept small enough for the
/// repository (under 64 KB) and no wider than a page.
#[test]
fn every_picture_in_the_readme_is_a_small_committed_png() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let readme = std::fs::read_to_string(root.join("README.md")).unwrap();
    let pictures: Vec<&str> = readme
        .split("](")
        .skip(1)
        .filter_map(|rest| rest.split(')').next())
        .filter(|target| target.ends_with(".png"))
        .collect();
    assert!(!pictures.is_empty(), "the README shows a picture");
    for p in pictures {
        let path = root.join(p);
        let bytes = std::fs::read(&path).unwrap_or_else(|e| panic!("{p}: {e}"));
        assert!(bytes.len() < 64 * 1024, "{p} is {} bytes", bytes.len());
        let info = png::Decoder::new(std::io::Cursor::new(bytes))
            .read_info()
            .unwrap_or_else(|e| panic!("{p} is not a PNG: {e}"))
            .info()
            .clone();
        assert!(
            (400..=1000).contains(&info.width) && info.height >= 300,
            "{p}: {}×{}",
            info.width,
            info.height
        );
    }
}
