//! The command line as a user meets it: exit statuses, the JSON contract the README documents,
//! and a clear message for every kind of bad input.

use assert_cmd::Command;
use predicates::prelude::*;
use std::path::PathBuf;

fn offgas() -> Command {
    let mut c = Command::cargo_bin("offgas").unwrap();
    c.env("NO_COLOR", "1");
    c
}

fn demo(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("data/demo")
        .join(name)
}

struct Files {
    dir: tempfile::TempDir,
}

impl Files {
    fn new() -> Self {
        Files {
            dir: tempfile::tempdir().unwrap(),
        }
    }
    fn write(&self, name: &str, text: &str) -> PathBuf {
        let p = self.dir.path().join(name);
        std::fs::write(&p, text).unwrap();
        p
    }
}

const CARBOY: &str =
    "name: test carboy\ncapacity: 20 L\nvolume: 10 L\ncontents:\n  - sodium chloride: 0.05 mol/L\n";

fn check(container: &PathBuf, stream: &PathBuf) -> Command {
    let mut c = offgas();
    c.arg("check").arg(container).arg("--add").arg(stream);
    c
}

#[test]
fn clear_review_and_stop_have_their_exit_statuses() {
    check(
        &demo("carboy-basic-rinse.yaml"),
        &demo("stream-citrate-rinse.yaml"),
    )
    .assert()
    .code(0)
    .stdout(predicate::str::contains("Verdict: CLEAR"));
    check(
        &demo("carboy-ammonium-buffer.yaml"),
        &demo("stream-caustic-wash.yaml"),
    )
    .assert()
    .code(3)
    .stdout(predicate::str::contains("Verdict: REVIEW"));
    check(
        &demo("carboy-cyanide-plating.yaml"),
        &demo("stream-acid-descale.yaml"),
    )
    .assert()
    .code(4)
    .stdout(predicate::str::contains("Verdict: STOP"))
    .stdout(predicate::str::contains("HCN"));
}

#[test]
fn usage_errors_exit_2() {
    offgas().arg("check").assert().code(2);
    offgas().arg("frobnicate").assert().code(2);
    check(
        &demo("carboy-basic-rinse.yaml"),
        &demo("stream-citrate-rinse.yaml"),
    )
    .args(["--format", "pdf"])
    .assert()
    .code(2);
}

#[test]
fn json_document_follows_the_contract() {
    let out = check(
        &demo("carboy-cyanide-plating.yaml"),
        &demo("stream-acid-descale.yaml"),
    )
    .args(["--format", "json"])
    .output()
    .unwrap();
    assert_eq!(out.status.code(), Some(4));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("one JSON document");
    assert_eq!(v["severity"], "stop");
    for state in ["end_state", "worst_state"] {
        let s = &v[state];
        for key in [
            "ph",
            "temperature_c",
            "ionic_strength",
            "volume_l",
            "headspace_l",
            "total_pressure_kpa",
        ] {
            assert!(s[key].is_number(), "{state}.{key} missing: {s}");
        }
        let gases = s["gases"].as_array().expect("gases list");
        let hcn = gases
            .iter()
            .find(|g| g["formula"] == "HCN")
            .expect("HCN listed");
        for key in [
            "partial_pressure_kpa",
            "headspace_ppm",
            "limit_ppm",
            "limit_ratio",
        ] {
            assert!(hcn[key].is_number(), "gas.{key}: {hcn}");
        }
        assert!(hcn["limit_basis"].is_string());
    }
    assert!(v["worst_state"]["fraction_added"].is_number());
    let pairs = v["pairs"].as_array().unwrap();
    assert!(!pairs.is_empty());
    for key in ["donor", "acceptor", "produced_acid", "log_k", "extent"] {
        assert!(!pairs[0][key].is_null(), "pair.{key}");
    }
    assert!(pairs
        .iter()
        .any(|p| p["acceptor"] == "CN-" && p["produced_acid"] == "HCN"));
    let findings = v["findings"].as_array().unwrap();
    assert!(findings.iter().any(|f| f["severity"] == "stop"
        && f["code"].is_string()
        && f["message"].as_str().unwrap().contains("HCN")
        && f["caution"].is_string()));
}

#[test]
fn markdown_format_prints_a_verdict() {
    check(
        &demo("carboy-basic-rinse.yaml"),
        &demo("stream-citrate-rinse.yaml"),
    )
    .args(["--format", "markdown"])
    .assert()
    .code(0)
    .stdout(predicate::str::contains("**Verdict: CLEAR**"));
}

#[test]
fn temperature_option_is_used_and_range_checked() {
    let out = check(
        &demo("carboy-basic-rinse.yaml"),
        &demo("stream-citrate-rinse.yaml"),
    )
    .args(["--format", "json", "--temperature", "35 °C"])
    .output()
    .unwrap();
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    // Both batches start at 35 °C; the pour's own heat may warm the end a little.
    assert!(
        (v["end_state"]["heat"]["start_temperature_c"]
            .as_f64()
            .unwrap()
            - 35.0)
            .abs()
            < 1e-6
    );
    let end_t = v["end_state"]["temperature_c"].as_f64().unwrap();
    assert!((35.0..36.0).contains(&end_t), "{end_t}");
    check(
        &demo("carboy-basic-rinse.yaml"),
        &demo("stream-citrate-rinse.yaml"),
    )
    .args(["--temperature", "150 °C"])
    .assert()
    .code(1)
    .stderr(predicate::str::contains("outside 0–100 °C"));
}

/// Runs a check of `stream_text` into the plain test carboy and expects exit 1 with `needle`.
fn bad_stream(stream_text: &str, needles: &[&str]) {
    let f = Files::new();
    let c = f.write("carboy.yaml", CARBOY);
    let s = f.write("stream.yaml", stream_text);
    let mut a = check(&c, &s)
        .assert()
        .code(1)
        .stderr(predicate::str::contains("stream.yaml"));
    for n in needles {
        a = a.stderr(predicate::str::contains(*n));
    }
}

#[test]
fn malformed_yaml_names_file_and_line() {
    bad_stream(
        "name: x\nvolume: 1 L\ncontents:\n  - sodium hydroxide: [0.1\n",
        &["stream.yaml:", "not a readable batch file"],
    );
}

#[test]
fn unknown_key_is_refused_with_the_known_keys() {
    bad_stream(
        "name: x\nvolume: 1 L\ncolour: blue\n",
        &["unknown field", "the keys a batch file knows"],
    );
}

#[test]
fn unknown_substance_offers_close_names_and_is_never_clear() {
    bad_stream(
        "name: x\nvolume: 1 L\ncontents:\n  - sodium cyanid: 1 g/L\n",
        &[
            "stream.yaml:4",
            "unknown substance `sodium cyanid`",
            "sodium cyanide",
        ],
    );
}

#[test]
fn unknown_unit_is_named() {
    bad_stream(
        "name: x\nvolume: 1 L\ncontents:\n  - sodium hydroxide: 3 furlongs\n",
        &["stream.yaml:4", "furlongs", "mol/L"],
    );
}

#[test]
fn zero_or_negative_volume_is_refused() {
    bad_stream("name: x\nvolume: 0 L\n", &["stream.yaml:2", "above zero"]);
    bad_stream("name: x\nvolume: -2 L\n", &["stream.yaml:2", "negative"]);
}

#[test]
fn volume_above_capacity_is_refused() {
    let f = Files::new();
    let c = f.write("carboy.yaml", "name: c\ncapacity: 5 L\nvolume: 6 L\n");
    let s = f.write("stream.yaml", "name: s\nvolume: 1 L\ncontents: []\n");
    check(&c, &s)
        .assert()
        .code(1)
        .stderr(predicate::str::contains("carboy.yaml:3"))
        .stderr(predicate::str::contains("more than the `capacity`"));
    // and a pour that would overflow
    let c = f.write(
        "carboy2.yaml",
        "name: c\ncapacity: 5 L\nvolume: 4.5 L\ncontents: []\n",
    );
    check(&c, &s)
        .assert()
        .code(1)
        .stderr(predicate::str::contains("more than its capacity"));
}

#[test]
fn percent_above_hundred_is_refused() {
    bad_stream(
        "name: x\nvolume: 1 L\ncontents:\n  - sodium hydroxide: 120 % w/w\n",
        &["stream.yaml:4", "above 100 %"],
    );
}

#[test]
fn concentration_beyond_solubility_is_refused() {
    bad_stream(
        "name: x\nvolume: 1 L\ncontents:\n  - sodium bicarbonate: 200 g/L\n",
        &["stream.yaml:4", "solubility"],
    );
}

#[test]
fn temperature_outside_range_is_refused() {
    bad_stream(
        "name: x\nvolume: 1 L\ntemperature: 120 °C\n",
        &["stream.yaml:3", "outside 0–100 °C"],
    );
    bad_stream(
        "name: x\nvolume: 1 L\ntemperature: 20\n",
        &["stream.yaml:3", "no unit"],
    );
}

#[test]
fn missing_file_is_an_error_not_a_panic() {
    let f = Files::new();
    let c = f.write("carboy.yaml", CARBOY);
    offgas()
        .arg("check")
        .arg(&c)
        .arg("--add")
        .arg(f.dir.path().join("nope.yaml"))
        .assert()
        .code(1)
        .stderr(predicate::str::contains("nope.yaml"));
}

#[test]
fn lookup_finds_by_name_formula_and_cas_and_shows_sources() {
    offgas()
        .args(["lookup", "sodium cyanide"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("143-33-9"))
        .stdout(predicate::str::contains("pKa 9.21"))
        .stdout(predicate::str::contains("IDLH"));
    offgas()
        .args(["lookup", "NaCN"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("sodium cyanide"));
    offgas()
        .args(["lookup", "143-33-9"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("sodium cyanide"));
    offgas()
        .args(["lookup", "H2S"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("family sulfide"));
    // A metal salt lists the complexes its metal forms, each with its source, and an inert
    // complex says why it is counted as it is.
    offgas()
        .args(["lookup", "copper(i) cyanide"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("Cu(CN)₃²⁻  log beta 27.2145"))
        .stdout(predicate::str::contains(
            "NIST Standard Reference Database 46",
        ));
    offgas()
        .args(["lookup", "copper(ii) sulfate anhydrous"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("solid Cu(OH)₂: log K 8.674"));
    offgas()
        .args(["lookup", "potassium ferricyanide"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("inert complex Fe(CN)₆³⁻"));
    offgas()
        .args(["lookup", "unobtainium chloride"])
        .assert()
        .code(1)
        .stderr(predicate::str::contains("closest names"));
}

#[test]
fn demo_runs_and_every_verdict_is_as_the_scenario_expects() {
    let out = offgas().arg("demo").output().unwrap();
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    for v in ["Verdict: CLEAR", "Verdict: REVIEW", "Verdict: STOP"] {
        assert!(text.contains(v), "demo lacks {v}");
    }
    assert!(text.contains("safer-order") || text.contains("The order matters"));
}

#[test]
fn rules_list_shows_the_rules_in_force_with_their_files() {
    offgas()
        .args(["rules", "list"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("hypochlorite-with-acid"))
        .stdout(predicate::str::contains("rules/oxidisers.yaml"));
    let out = offgas()
        .args(["rules", "list", "--format", "json"])
        .output()
        .unwrap();
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert!(v.as_array().unwrap().len() >= 35);
}

const SITE_RULE: &str = "description: Quarry Lane site rules (fictional)\nrules:\n  - id: no-cyanide-in-shared-carboys\n    meet: [[cyanide]]\n    severity: stop\n    message: Site policy forbids cyanide in shared carboys.\n    caution: Use the cyanide-only carboy in bay 3.\n    basis: site EHS policy\n";

#[test]
fn rules_check_accepts_a_good_folder_and_names_the_problems_in_a_bad_one() {
    let f = Files::new();
    f.write("site.yaml", SITE_RULE);
    offgas()
        .args(["rules", "check"])
        .arg(f.dir.path())
        .assert()
        .code(0)
        .stdout(predicate::str::contains("1 site rules are valid"));
    let bad = Files::new();
    bad.write(
        "bad.yaml",
        "description: x\nrules:\n  - id: r1\n    meet: [[cyanid]]\n    when: { ph_below: 3, ph_above: 8 }\n    severity: stop\n    message: m\n    caution: c\n    basis: b\n",
    );
    offgas()
        .args(["rules", "check"])
        .arg(bad.dir.path())
        .assert()
        .code(1)
        .stderr(predicate::str::contains("bad.yaml:3"))
        .stderr(predicate::str::contains("unknown hazard class `cyanid`"))
        .stderr(predicate::str::contains("can never hold"));
}

#[test]
fn a_site_rule_raises_the_verdict_and_says_it_is_a_site_rule() {
    let f = Files::new();
    let rules = Files::new();
    rules.write("site.yaml", SITE_RULE);
    let c = f.write(
        "carboy.yaml",
        "name: c\ncapacity: 20 L\nvolume: 5 L\ncontents:\n  - sodium cyanide: 0.01 g/L\n  - sodium hydroxide: 0.1 mol/L\n",
    );
    let s = f.write(
        "stream.yaml",
        "name: s\nvolume: 1 L\ncontents:\n  - sodium chloride: 0.01 mol/L\n",
    );
    // Without the site rule: alkaline, little HCN.
    check(&c, &s).assert().code(0);
    // With it, by option and by environment variable.
    check(&c, &s)
        .arg("--rules")
        .arg(rules.dir.path())
        .assert()
        .code(4)
        .stdout(predicate::str::contains(
            "site rule no-cyanide-in-shared-carboys",
        ));
    check(&c, &s)
        .env("OFFGAS_RULES", rules.dir.path())
        .assert()
        .code(4);
}

#[test]
fn a_site_rule_that_would_lower_a_severity_stops_the_run() {
    let f = Files::new();
    let rules = Files::new();
    rules.write(
        "soft.yaml",
        "description: x\nrules:\n  - id: softer\n    raises: hypochlorite-with-acid\n    meet: [[hypochlorite], [strong_acid]]\n    severity: review\n    message: m\n    caution: c\n    basis: b\n",
    );
    let c = f.write("carboy.yaml", CARBOY);
    let s = f.write("stream.yaml", "name: s\nvolume: 1 L\ncontents: []\n");
    check(&c, &s)
        .arg("--rules")
        .arg(rules.dir.path())
        .assert()
        .code(1)
        .stderr(predicate::str::contains("may only raise"));
}

#[test]
fn procedure_prints_the_sheet_and_exits_with_the_worst_step() {
    offgas()
        .args(["procedure"])
        .arg(demo("procedure-descale-tank.yaml"))
        .assert()
        .code(4)
        .stdout(predicate::str::contains(
            "First step that is not clear: step 3",
        ))
        .stdout(predicate::str::contains("Computed fixes"))
        .stdout(predicate::str::contains("Prepared by"));
    offgas()
        .args(["procedure", "--format", "markdown"])
        .arg(demo("procedure-descale-tank.yaml"))
        .assert()
        .code(4)
        .stdout(predicate::str::contains("| step | what is done |"));
}

#[test]
fn procedure_html_goes_to_a_file_that_is_never_overwritten_without_force() {
    let f = Files::new();
    let out = f.dir.path().join("sheet.html");
    offgas()
        .args(["procedure", "--format", "html", "--output"])
        .arg(&out)
        .arg(demo("procedure-descale-tank.yaml"))
        .assert()
        .code(4);
    let html = std::fs::read_to_string(&out).unwrap();
    assert!(html.starts_with("<!DOCTYPE html>"));
    std::fs::write(&out, "my notes").unwrap();
    offgas()
        .args(["procedure", "--format", "html", "--output"])
        .arg(&out)
        .arg(demo("procedure-descale-tank.yaml"))
        .assert()
        .code(1)
        .stderr(predicate::str::contains("--force"));
    assert_eq!(
        std::fs::read_to_string(&out).unwrap(),
        "my notes",
        "the user's file is untouched"
    );
    offgas()
        .args(["procedure", "--format", "html", "--force", "--output"])
        .arg(&out)
        .arg(demo("procedure-descale-tank.yaml"))
        .assert()
        .code(4);
    assert!(std::fs::read_to_string(&out)
        .unwrap()
        .starts_with("<!DOCTYPE html>"));
}

#[test]
fn a_bad_procedure_file_names_the_step_and_line() {
    let f = Files::new();
    let p = f.write(
        "proc.yaml",
        "name: p\nvessel:\n  name: v\n  capacity: 10 L\n  volume: 2 L\n  contents: []\nsteps:\n  - description: heat it\n    boil: { time: 5 min }\n",
    );
    offgas()
        .arg("procedure")
        .arg(&p)
        .assert()
        .code(1)
        .stderr(predicate::str::contains("proc.yaml:8"))
        .stderr(predicate::str::contains("unknown step kind `boil`"));
}

#[test]
fn audit_exits_with_the_worst_finding_and_writes_html_on_request() {
    offgas()
        .args(["audit"])
        .arg(demo("storeroom.yaml"))
        .assert()
        .code(4)
        .stdout(predicate::str::contains("SB-01"))
        .stdout(predicate::str::contains("Cabinet"));
    let f = Files::new();
    let out = f.dir.path().join("audit.html");
    offgas()
        .args(["audit", "--suggest", "--format", "html", "--output"])
        .arg(&out)
        .arg(demo("storeroom.yaml"))
        .assert()
        .code(4);
    let html = std::fs::read_to_string(&out).unwrap();
    assert!(html.contains("<svg") && html.contains("Suggested moves"));
    offgas()
        .args(["audit", "--format", "json", "--output"])
        .arg(&out)
        .arg(demo("storeroom.yaml"))
        .assert()
        .code(1)
        .stderr(predicate::str::contains("--force"));
}

#[test]
fn a_csv_with_bad_rows_stops_before_computing_unless_told_to_skip() {
    let fixtures = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/csv");
    offgas()
        .arg("audit")
        .arg(fixtures.join("storeroom-bad.csv"))
        .assert()
        .code(1)
        .stderr(predicate::str::contains("nothing was audited"))
        .stderr(predicate::str::contains("row 3"));
    let out = offgas()
        .args(["audit", "--skip-bad-rows", "--format", "json"])
        .arg(fixtures.join("storeroom-bad.csv"))
        .output()
        .unwrap();
    assert!(matches!(out.status.code(), Some(0 | 3 | 4)), "{out:?}");
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let rows: Vec<u64> = v["skipped_rows"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["row"].as_u64().unwrap())
        .collect();
    assert!(rows.contains(&3) && rows.contains(&4), "{rows:?}");
}

#[test]
fn an_amount_no_liquid_can_hold_is_refused() {
    // 1e308 g/L is finite as a number but no solution holds it (HEPES has no solubility in
    // the data, so the physical bound speaks); 1000 g/L of sodium chloride is nearly three
    // times its solubility (about 320 g/L).
    bad_stream(
        "name: x\nvolume: 1 L\ncontents:\n  - hepes: 1e308 g/L\n",
        &["stream.yaml:4", "cannot be in a liquid", "fix:"],
    );
    bad_stream(
        "name: x\nvolume: 1 L\ncontents:\n  - sodium chloride: 1e308 g/L\n",
        &["stream.yaml:4", "1.00e308 g/L", "fix:"],
    );
    bad_stream(
        "name: x\nvolume: 1 L\ncontents:\n  - sodium chloride: 1000 g/L\n",
        &["stream.yaml:4", "above its solubility", "fix:"],
    );
}

#[test]
fn a_stream_without_contents_is_refused_not_checked_as_water() {
    bad_stream(
        "name: x\nvolume: 1 L\n",
        &["`contents` is missing", "contents: []"],
    );
    // Plain water is said so, and is accepted.
    let f = Files::new();
    let c = f.write("carboy.yaml", CARBOY);
    let s = f.write("stream.yaml", "name: x\nvolume: 1 L\ncontents: []\n");
    check(&c, &s).assert().code(0);
}

#[test]
fn deep_nesting_is_refused_at_once_with_the_line() {
    let deep = format!(
        "name: x\nvolume: 1 L\ncontents: {}{}\n",
        "[".repeat(100_000),
        "]".repeat(100_000)
    );
    let started = std::time::Instant::now();
    bad_stream(&deep, &["stream.yaml:3", "nests", "levels deep"]);
    // Not a timing test: a refusal that took the old 37 s would be the parser, not us.
    assert!(started.elapsed() < std::time::Duration::from_secs(20));
}

#[test]
fn an_oversized_file_or_name_is_refused_briefly() {
    bad_stream(
        &format!(
            "name: x\nvolume: 1 L\ncontents: []\nnote: \"{}\"\n",
            "x".repeat(2 << 20)
        ),
        &["bytes, more than"],
    );
    let long = "a".repeat(900_000);
    let f = Files::new();
    let c = f.write("carboy.yaml", CARBOY);
    let s = f.write(
        "stream.yaml",
        &format!("name: x\nvolume: 1 L\ncontents:\n  - {{substance: \"{long}\", amount: 1 g/L}}\n"),
    );
    let out = check(&c, &s).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("stream.yaml:4") && err.contains("characters long"),
        "{err}"
    );
    assert!(err.len() < 1000, "the message must not echo the whole name");
}

#[test]
fn a_percentage_of_a_commercial_solution_is_refused() {
    bad_stream(
        "name: x\nvolume: 1 L\ncontents:\n  - sulfuric acid, concentrated: 96 % w/w\n",
        &[
            "stream.yaml:4",
            "count that concentration twice",
            "sulfuric acid: 96 % w/w",
        ],
    );
}

#[test]
fn shares_past_the_whole_batch_or_without_a_density_are_refused() {
    bad_stream(
        "name: x\nvolume: 1 L\ncontents:\n  - sodium hydroxide: 60 % w/w\n  - sodium chloride: 50 % w/w\n",
        &["add up to 110 %"],
    );
    // Sodium oxalate has no density table: at 20 % w/w the density matters.
    bad_stream(
        "name: x\nvolume: 1 L\ncontents:\n  - sodium formate: 20 % w/w\n",
        &["stream.yaml:4", "no density table", "density:"],
    );
}

#[test]
fn concentrated_acid_by_share_has_its_moles() {
    // 96 % H2SO4 at 1.8355 g/mL (CRC): 0.96 × 1835.5 / 98.079 = 17.97 mol/L, not the
    // 9.79 mol/L that 1.00 g/mL would give.
    let f = Files::new();
    let c = f.write(
        "carboy.yaml",
        "name: c\ncapacity: 20 L\nvolume: 10 L\nclosure: open\ncontents: []\n",
    );
    let s = f.write(
        "stream.yaml",
        "name: x\nvolume: 0.5 L\ncontents:\n  - sulfuric acid: 96 % w/w\n",
    );
    let out = check(&c, &s).arg("--format").arg("json").output().unwrap();
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let moles = v["stream"]["components"][0]["moles"].as_f64().unwrap();
    assert!((moles / 0.5 - 17.97).abs() < 0.1, "{} mol/L", moles / 0.5);
    // 0.5 L of it into 10 L of water releases about 570 kJ of dilution heat.
    let q = v["end_state"]["heat"]["dilution_heat_kj"].as_f64().unwrap();
    assert!((500.0..650.0).contains(&q), "{q} kJ");
}
