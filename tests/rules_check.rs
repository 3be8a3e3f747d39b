//! `offgas rules check DIR` reports every problem of every file at once, each with its file
//! and line, and exits 1; a folder with no problem exits 0.

use assert_cmd::Command;

fn offgas() -> Command {
    let mut c = Command::cargo_bin("offgas").unwrap();
    c.env("NO_COLOR", "1");
    c.env_remove("OFFGAS_RULES");
    c
}

/// Line 3: r1's id; 4: an unknown class; 5: a band that can never hold. Line 10: r2's id;
/// 12: an unknown key; 13: an unknown severity. r3 (line 17) lacks `basis`, and its
/// condition on line 20 is misspelt.
const FIRST: &str = "\
description: first site file
rules:
  - id: r1
    meet: [[cyanid]]
    when: { ph_below: 3, ph_above: 8 }
    severity: stop
    message: m
    caution: c
    basis: b
  - id: r2
    meet: [[cyanide]]
    colour: red
    severity: severe
    message: m
    caution: c
    basis: b
  - id: r3
    meet: [[hypochlorite]]
    when:
      ph_belo: 4
    severity: stop
    message: m
    caution: c
";

/// Line 3: an id the built-in rules already use. Line 9: a rule that would lower a
/// built-in one. Line 16: a rule raising one that does not exist. Line 25: `presence` is
/// not yes or no. Line 30: a key the file format does not have.
const SECOND: &str = "\
description: second site file
rules:
  - id: hypochlorite-with-acid
    meet: [[hypochlorite]]
    severity: stop
    message: m
    caution: c
    basis: b
  - id: softer
    raises: hypochlorite-with-acid
    meet: [[hypochlorite], [strong_acid]]
    severity: review
    message: m
    caution: c
    basis: b
  - id: r9
    raises: no-such-rule
    meet: [[hypochlorite]]
    severity: stop
    message: m
    caution: c
    basis: b
  - id: r10
    meet: [[hypochlorite]]
    presence: maybe
    severity: review
    message: m
    caution: c
    basis: b
extra: 1
";

#[test]
fn every_problem_of_every_file_is_reported_at_once() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("a-first.yaml"), FIRST).unwrap();
    std::fs::write(dir.path().join("b-second.yaml"), SECOND).unwrap();
    let out = offgas()
        .args(["rules", "check"])
        .arg(dir.path())
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8(out.stderr).unwrap();
    let expected: &[(&str, usize, &str)] = &[
        ("a-first.yaml", 3, "unknown hazard class `cyanid`"),
        ("a-first.yaml", 3, "empty band"),
        ("a-first.yaml", 12, "unknown field `colour`"),
        ("a-first.yaml", 13, "unknown variant `severe`"),
        ("a-first.yaml", 17, "missing field `basis`"),
        (
            "a-first.yaml",
            20,
            "unknown field `ph_belo` (did you mean `ph_below`?)",
        ),
        ("b-second.yaml", 3, "the id is already in use"),
        ("b-second.yaml", 9, "may only raise"),
        (
            "b-second.yaml",
            16,
            "raises `no-such-rule`, which is not a rule in force",
        ),
        ("b-second.yaml", 25, "`presence`"),
        ("b-second.yaml", 30, "unknown field `extra`"),
    ];
    for (file, line, words) in expected {
        let at = format!("{file}:{line}: ");
        assert!(
            err.lines().any(|l| l.contains(&at) && l.contains(words)),
            "no `{words}` at {at} in:\n{err}"
        );
    }
    assert!(
        err.contains("11 problems in 2 files"),
        "the count heads the list:\n{err}"
    );
    // Sorted by file and line, so the author can work down each file.
    let positions: Vec<(String, usize)> = err
        .lines()
        .filter_map(|l| {
            let l = l.trim_start();
            let (path, rest) = l.split_once(".yaml:")?;
            let line: usize = rest.split(':').next()?.parse().ok()?;
            Some((path.to_string(), line))
        })
        .collect();
    let mut sorted = positions.clone();
    sorted.sort();
    assert_eq!(positions, sorted);
}

#[test]
fn a_sound_folder_is_accepted_and_a_syntax_error_names_its_line() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("ok.yaml"),
        "description: site\nrules:\n  - id: no-cyanide-here\n    meet: [[cyanide]]\n    presence: true\n    severity: review\n    message: m\n    caution: c\n    basis: site policy\n",
    )
    .unwrap();
    offgas()
        .args(["rules", "check"])
        .arg(dir.path())
        .assert()
        .code(0);
    std::fs::write(
        dir.path().join("broken.yaml"),
        "description: x\nrules:\n  - id: [unclosed\n",
    )
    .unwrap();
    let out = offgas()
        .args(["rules", "check"])
        .arg(dir.path())
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(
        err.contains("broken.yaml:") && err.contains("not a readable rule file"),
        "{err}"
    );
}
