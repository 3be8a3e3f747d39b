//! `offgas log`: a carboy's record. Checked additions, refusals, tamper and truncation
//! detection, crashes at every point of a write, a killed writer, concurrent writers.

use assert_cmd::Command;
use predicates::prelude::*;
use std::path::{Path, PathBuf};

fn offgas() -> Command {
    let mut c = Command::cargo_bin("offgas").unwrap();
    c.env("NO_COLOR", "1");
    c
}

struct Dir(tempfile::TempDir);

impl Dir {
    fn new() -> Dir {
        Dir(tempfile::tempdir().unwrap())
    }
    fn write(&self, name: &str, text: &str) -> PathBuf {
        let p = self.0.path().join(name);
        std::fs::write(&p, text).unwrap();
        p
    }
    fn path(&self, name: &str) -> PathBuf {
        self.0.path().join(name)
    }
}

const CARBOY: &str = "name: test carboy\ncapacity: 10 L\nvolume: 0 L\nclosure: sealed\n";
const RINSE: &str = "name: salt rinse\nvolume: 1 L\ncontents:\n  - sodium chloride: 0.05 mol/L\n";
const CYANIDE: &str = "name: cyanide rinse\nvolume: 1 L\ncontents:\n  - sodium cyanide: 1 g/L\n  - sodium hydroxide: 0.05 mol/L\n";
const ACID: &str = "name: acid\nvolume: 1 L\ncontents:\n  - hydrogen chloride: 0.5 mol/L\n";
const AMMONIA_CAUSTIC: &str =
    "name: caustic\nvolume: 1 L\ncontents:\n  - sodium hydroxide: 0.05 mol/L\n";
const AMMONIUM: &str =
    "name: ammonium\nvolume: 2 L\ncontents:\n  - ammonium chloride: 0.01 mol/L\n";

fn new_record(d: &Dir) -> PathBuf {
    let c = d.write("carboy.yaml", CARBOY);
    let r = d.path("carboy.log");
    offgas()
        .args(["log", "new"])
        .arg(&r)
        .arg("--from")
        .arg(&c)
        .assert()
        .code(0);
    r
}

fn add(r: &Path, stream: &Path, by: &str) -> assert_cmd::assert::Assert {
    offgas()
        .args(["log", "add"])
        .arg(r)
        .arg("--stream")
        .arg(stream)
        .args(["--by", by])
        .assert()
}

fn entries(r: &Path) -> usize {
    let text = std::fs::read_to_string(r).unwrap();
    offgas::record::Record::parse("r", &text)
        .expect("the record verifies")
        .entries
        .len()
}

#[test]
fn additions_are_checked_and_only_clear_or_accepted_ones_are_recorded() {
    let d = Dir::new();
    let r = new_record(&d);
    let rinse = d.write("rinse.yaml", RINSE);
    add(&r, &rinse, "A. Tech")
        .code(0)
        .stderr(predicate::str::contains("recorded"));
    assert_eq!(entries(&r), 2);
    // A stop is never recorded, and says what to do instead.
    let cyanide = d.write("cyanide.yaml", CYANIDE);
    let acid = d.write("acid.yaml", ACID);
    add(&r, &cyanide, "A. Tech").code(0);
    let before = std::fs::read(&r).unwrap();
    add(&r, &acid, "B. Tech")
        .code(4)
        .stderr(predicate::str::contains("NOT RECORDED"))
        .stderr(predicate::str::contains("offgas check"));
    assert_eq!(
        std::fs::read(&r).unwrap(),
        before,
        "a stop leaves the record untouched"
    );
    // A review needs --accept with a reason.
    let d2 = Dir::new();
    let r2 = new_record(&d2);
    let ammonium = d2.write("ammonium.yaml", AMMONIUM);
    let caustic = d2.write("caustic.yaml", AMMONIA_CAUSTIC);
    add(&r2, &ammonium, "C. Tech").code(0);
    add(&r2, &caustic, "C. Tech")
        .code(3)
        .stderr(predicate::str::contains("--accept"));
    assert_eq!(entries(&r2), 2, "review without --accept is not recorded");
    offgas()
        .args(["log", "add"])
        .arg(&r2)
        .arg("--stream")
        .arg(&caustic)
        .args(["--by", "C. Tech", "--accept", "EHS approved, fume hood"])
        .assert()
        .code(3);
    assert_eq!(entries(&r2), 3);
    offgas()
        .args(["log", "show"])
        .arg(&r2)
        .assert()
        .code(0)
        .stdout(predicate::str::contains("accepted: EHS approved"));
    offgas()
        .args(["log", "show"])
        .arg(&r)
        .assert()
        .code(0)
        .stdout(predicate::str::contains("A. Tech"))
        .stdout(predicate::str::contains("sodium cyanide"))
        .stdout(predicate::str::contains("filled to"));
}

fn lock_file(r: &Path) -> PathBuf {
    PathBuf::from(format!("{}.lock", r.display()))
}

fn assert_no_lock_file(r: &Path, when: &str) {
    assert!(
        !lock_file(r).exists(),
        "{when}: the lock file {} was left behind",
        lock_file(r).display()
    );
}

#[test]
fn closing_prints_the_tag_and_refuses_further_additions() {
    let d = Dir::new();
    let r = new_record(&d);
    let rinse = d.write("rinse.yaml", RINSE);
    add(&r, &rinse, "A. Tech").code(0);
    offgas()
        .args(["log", "close"])
        .arg(&r)
        .args(["--by", "D. Waste"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("WASTE TAG"))
        .stdout(predicate::str::contains("sodium chloride"))
        .stdout(predicate::str::contains("water (the balance)"))
        .stdout(predicate::str::contains("accumulation start"))
        .stdout(predicate::str::contains("D. Waste"))
        .stdout(predicate::str::contains("safety data sheets decide"));
    add(&r, &rinse, "A. Tech")
        .code(1)
        .stderr(predicate::str::contains("closed"));
    offgas()
        .args(["log", "close"])
        .arg(&r)
        .args(["--by", "D. Waste"])
        .assert()
        .code(1)
        .stderr(predicate::str::contains("already closed"))
        .stderr(predicate::str::contains("log show"));
    // The tag can be printed again from the closed record.
    offgas()
        .args(["log", "show"])
        .arg(&r)
        .assert()
        .code(0)
        .stdout(predicate::str::contains("CLOSED for pickup"))
        .stdout(predicate::str::contains("WASTE TAG"));
    assert_no_lock_file(&r, "after closing and the refusals");
}

/// Cyanide rinse (1 g/L NaCN, 0.05 mol/L NaOH) 3 L, then a 2 L salt rinse with a trace of
/// sodium bicarbonate.
///
/// By hand: NaCN 3 g (0.0612 mol × 49.007 g/mol); NaOH 0.15 mol × 39.997 = 6.00 g;
/// NaCl 0.1 mol × 58.44 = 5.84 g; NaHCO3 0.002 mol/L × 2 L × 84.007 = 0.336 g. The 5 L
/// weigh a little over 5 kg, so NaCN is 0.06 % (below 0.1 %, listed anyway: cyanide is
/// listed in any amount), NaOH 0.12 %, NaCl 0.12 % and NaHCO3 0.007 % (below the cut-off,
/// and bringing nothing of its own). Water is the rest, about 99.7 %.
#[test]
fn the_waste_tag_names_every_constituent_with_shares_that_add_up_the_ph_dates_and_hazards() {
    let d = Dir::new();
    let r = new_record(&d);
    let cyanide = d.write(
        "cyanide.yaml",
        "name: cyanide rinse\nvolume: 3 L\ncontents:\n  - sodium cyanide: 1 g/L\n  - sodium hydroxide: 0.05 mol/L\n",
    );
    let salt = d.write(
        "salt.yaml",
        "name: salt rinse\nvolume: 2 L\ncontents:\n  - sodium chloride: 0.05 mol/L\n  - sodium bicarbonate: 0.002 mol/L\n",
    );
    add(&r, &cyanide, "A. Tech").code(0);
    add(&r, &salt, "A. Tech").code(0);
    let out = offgas()
        .args(["log", "close"])
        .arg(&r)
        .args(["--by", "D. Waste", "--format", "json"])
        .output()
        .unwrap();
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    let tag: serde_json::Value = serde_json::from_str(&text).expect("one JSON document");

    // Names, never class ids.
    let names: Vec<&str> = tag["contents"]["constituents"]
        .as_array()
        .unwrap()
        .iter()
        .map(|c| c["substance"].as_str().unwrap())
        .collect();
    for n in [
        "sodium cyanide",
        "sodium hydroxide",
        "sodium chloride",
        "sodium bicarbonate",
    ] {
        assert!(names.contains(&n), "{n} missing from {names:?}");
    }
    let cat = offgas::embedded::catalog().unwrap();
    for class in &cat.classes {
        let quoted = format!("\"{}\"", class.id);
        assert!(
            !class.id.contains('_') || !text.contains(&class.id),
            "class id {} on the tag",
            class.id
        );
        assert!(!text.contains(&quoted), "class id {quoted} on the tag");
    }

    // Shares add up to 100 % with water as the balance; masses as worked out above.
    let share = |n: &str| {
        tag["contents"]["constituents"]
            .as_array()
            .unwrap()
            .iter()
            .find(|c| c["substance"] == n)
            .unwrap()["mass_percent"]
            .as_f64()
            .unwrap()
    };
    let mass = |n: &str| {
        tag["contents"]["constituents"]
            .as_array()
            .unwrap()
            .iter()
            .find(|c| c["substance"] == n)
            .unwrap()["mass_g"]
            .as_f64()
            .unwrap()
    };
    let water = tag["contents"]["water"]["mass_percent"].as_f64().unwrap();
    let total: f64 = names.iter().map(|n| share(n)).sum::<f64>() + water;
    assert!((total - 100.0).abs() < 1e-9, "shares add up to {total} %");
    assert!((mass("sodium cyanide") - 3.0).abs() < 0.01);
    assert!((mass("sodium hydroxide") - 6.0).abs() < 0.01);
    assert!((mass("sodium chloride") - 5.844).abs() < 0.01);
    assert!((water - 99.7).abs() < 0.1, "water {water} %");
    let total_kg = tag["contents"]["mass_g"].as_f64().unwrap() / 1e3;
    assert!((5.0..5.1).contains(&total_kg), "{total_kg} kg");

    // pH of the solved contents: 0.15 mol NaOH in 5 L, 0.03 mol/L, pH about 12.4.
    let ph = tag["ph"].as_f64().unwrap();
    assert!((12.2..12.6).contains(&ph), "pH {ph}");

    // Both dates, the container and who closed it.
    let record = offgas::record::Record::parse("r", &std::fs::read_to_string(&r).unwrap()).unwrap();
    assert_eq!(tag["accumulation_start"], record.entries[0].when.as_str());
    assert_eq!(tag["closed"], record.entries.last().unwrap().when.as_str());
    assert_eq!(tag["closed_by"], "D. Waste");
    assert_eq!(tag["container"], "test carboy");
    assert_eq!(tag["capacity_l"], 10.0);

    // Hazard words with their sources: cyanide is listed in any amount; sodium hydroxide
    // above the cut-off brings skin corrosion; bicarbonate, below it, brings nothing.
    let hazards = tag["hazards"].as_array().unwrap();
    let hazard = |name: &str| hazards.iter().find(|h| h["hazard"] == name);
    let acute = hazard("Acute toxicity").expect("acute toxicity from cyanide");
    assert!(acute["from"]
        .as_array()
        .unwrap()
        .iter()
        .any(|f| f == "sodium cyanide"));
    let skin = hazard("Skin corrosion/irritation").expect("skin corrosion from the caustic");
    assert!(skin["from"]
        .as_array()
        .unwrap()
        .iter()
        .any(|f| f == "sodium hydroxide"));
    assert!(hazard("Hazardous to the aquatic environment").is_some());
    for h in hazards {
        assert!(h["source"].as_str().unwrap().contains("GHS"), "{h}");
        assert!(h["citation"].as_str().unwrap().contains("chapter"), "{h}");
        assert!(!h["basis"].as_str().unwrap().is_empty(), "{h}");
        assert!(
            h["from"]
                .as_array()
                .unwrap()
                .iter()
                .all(|f| f != "sodium bicarbonate"),
            "{h}"
        );
    }
    let bicarbonate = tag["contents"]["constituents"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["substance"] == "sodium bicarbonate")
        .unwrap();
    assert_eq!(bicarbonate["below_cut_off"], true);
    assert!(tag["rule"]
        .as_str()
        .unwrap()
        .contains("your EHS office and the safety data sheets decide"));
    assert_no_lock_file(&r, "after the tag");
}

#[test]
fn the_tag_and_the_record_go_to_files_in_every_format_never_over_an_existing_one() {
    let d = Dir::new();
    let r = new_record(&d);
    let rinse = d.write("rinse.yaml", RINSE);
    add(&r, &rinse, "A. Tech").code(0);
    let taken = d.write("taken.html", "keep me");
    offgas()
        .args(["log", "close"])
        .arg(&r)
        .args(["--by", "D. Waste", "--format", "html", "--output"])
        .arg(&taken)
        .assert()
        .code(1)
        .stderr(predicate::str::contains("--force"));
    assert_eq!(std::fs::read_to_string(&taken).unwrap(), "keep me");
    assert_eq!(entries(&r), 2, "a refused --output leaves the record open");
    let tag = d.path("tag.html");
    offgas()
        .args(["log", "close"])
        .arg(&r)
        .args(["--by", "D. Waste", "--format", "html", "--output"])
        .arg(&tag)
        .assert()
        .code(0);
    let page = std::fs::read_to_string(&tag).unwrap();
    assert!(page.starts_with("<!DOCTYPE html>"));
    assert!(page.contains("WASTE TAG") && page.contains("sodium chloride"));
    for format in ["table", "markdown", "json", "html"] {
        let file = d.path(&format!("show.{format}"));
        offgas()
            .args(["log", "show"])
            .arg(&r)
            .args(["--format", format, "--output"])
            .arg(&file)
            .assert()
            .code(0);
        let text = std::fs::read_to_string(&file).unwrap();
        assert!(text.contains("sodium chloride"), "{format}");
        offgas()
            .args(["log", "show"])
            .arg(&r)
            .args(["--format", format, "--output"])
            .arg(&file)
            .assert()
            .code(1)
            .stderr(predicate::str::contains("--force"));
        offgas()
            .args(["log", "show"])
            .arg(&r)
            .args(["--format", format, "--force", "--output"])
            .arg(&file)
            .assert()
            .code(0);
    }
    assert_no_lock_file(&r, "after writing the tag");
}

#[test]
fn no_lock_file_is_left_after_a_write_or_a_refusal() {
    let d = Dir::new();
    let r = new_record(&d);
    assert_no_lock_file(&r, "after log new");
    let rinse = d.write("rinse.yaml", RINSE);
    add(&r, &rinse, "A").code(0);
    assert_no_lock_file(&r, "after a recorded addition");
    let cyanide = d.write("cyanide.yaml", CYANIDE);
    let acid = d.write("acid.yaml", ACID);
    add(&r, &cyanide, "A").code(0);
    add(&r, &acid, "A").code(4);
    assert_no_lock_file(&r, "after a stop that was not recorded");
    let bad = d.write(
        "bad.yaml",
        "name: bad\nvolume: 1 L\ncontents:\n  - unobtainium: 1 g/L\n",
    );
    add(&r, &bad, "A").code(1);
    assert_no_lock_file(&r, "after a stream that cannot be read");
    let c = d.write("carboy2.yaml", CARBOY);
    offgas()
        .args(["log", "new"])
        .arg(&r)
        .arg("--from")
        .arg(&c)
        .assert()
        .code(1);
    assert_no_lock_file(&r, "after refusing to replace a record");
    let d2 = Dir::new();
    let r2 = new_record(&d2);
    let ammonium = d2.write("ammonium.yaml", AMMONIUM);
    let caustic = d2.write("caustic.yaml", AMMONIA_CAUSTIC);
    add(&r2, &ammonium, "C").code(0);
    add(&r2, &caustic, "C").code(3);
    assert_no_lock_file(&r2, "after a review without --accept");
}

#[test]
fn log_add_uses_the_site_rules_and_thresholds_it_is_given() {
    let d = Dir::new();
    let r = new_record(&d);
    let rinse = d.write("rinse.yaml", RINSE);
    let rules = d.0.path().join("site-rules");
    std::fs::create_dir(&rules).unwrap();
    std::fs::write(
        rules.join("salt.yaml"),
        "description: site rules\nrules:\n  - id: no-salt-here\n    meet: [[inert]]\n    presence: true\n    severity: review\n    message: Site policy keeps salt out of this carboy.\n    caution: Use the salt carboy.\n    basis: site EHS policy\n",
    )
    .unwrap();
    offgas()
        .args(["log", "add"])
        .arg(&r)
        .arg("--stream")
        .arg(&rinse)
        .args(["--by", "A"])
        .arg("--rules")
        .arg(&rules)
        .assert()
        .code(3)
        .stdout(predicate::str::contains("Site policy keeps salt out"))
        .stderr(predicate::str::contains("NOT RECORDED"));
    assert_eq!(entries(&r), 1);
    let missing = d.path("no-such-thresholds.yaml");
    offgas()
        .args(["log", "add"])
        .arg(&r)
        .arg("--stream")
        .arg(&rinse)
        .args(["--by", "A"])
        .arg("--thresholds")
        .arg(&missing)
        .assert()
        .code(1)
        .stderr(predicate::str::contains("thresholds"));
    assert_eq!(entries(&r), 1);
}

#[test]
fn a_full_carboy_refuses_an_addition_that_would_overflow_it() {
    let d = Dir::new();
    let r = new_record(&d);
    let big = d.write(
        "big.yaml",
        "name: big\nvolume: 9.5 L\ncontents:\n  - sodium chloride: 0.01 mol/L\n",
    );
    add(&r, &big, "A").code(0);
    let before = std::fs::read(&r).unwrap();
    let rinse = d.write("rinse.yaml", RINSE);
    add(&r, &rinse, "A")
        .code(1)
        .stderr(predicate::str::contains("more than its capacity"));
    assert_eq!(std::fs::read(&r).unwrap(), before);
}

#[test]
fn an_edited_or_truncated_record_is_refused_with_the_line_where_it_breaks() {
    let d = Dir::new();
    let r = new_record(&d);
    let rinse = d.write("rinse.yaml", RINSE);
    add(&r, &rinse, "A. Tech").code(0);
    add(&r, &rinse, "B. Tech").code(0);
    let good = std::fs::read_to_string(&r).unwrap();
    let lines: Vec<&str> = good.lines().collect();
    let cases: Vec<(String, &str)> = vec![
        (good.replacen("B. Tech", "B. Tecj", 1), ":3:"),
        (good.replacen("0.05 mol/L", "0.01 mol/L", 1), ":2:"),
        (good[..good.len() - 20].to_string(), "cut short"),
        (format!("{}\n{}\n", lines[0], lines[3]), "seal"),
        (
            format!("{}\n{}\n{}\n", lines[0], lines[1], lines[2]),
            "seal line is missing",
        ),
        (
            format!("{}\n{}\n{}\n{}\n", lines[0], lines[2], lines[1], lines[3]),
            ":2:",
        ),
    ];
    for (text, needle) in cases {
        std::fs::write(&r, &text).unwrap();
        offgas()
            .args(["log", "verify"])
            .arg(&r)
            .assert()
            .code(1)
            .stderr(predicate::str::contains(needle));
        add(&r, &rinse, "C. Tech")
            .code(1)
            .stderr(predicate::str::contains("never edit a record by hand"));
        assert_eq!(
            std::fs::read_to_string(&r).unwrap(),
            text,
            "a refused record is left as it was"
        );
    }
    std::fs::write(&r, &good).unwrap();
    offgas()
        .args(["log", "verify"])
        .arg(&r)
        .assert()
        .code(0)
        .stdout(predicate::str::contains("3 entries"));
}

#[test]
fn log_new_never_replaces_an_existing_record() {
    let d = Dir::new();
    let r = new_record(&d);
    let before = std::fs::read(&r).unwrap();
    let c = d.write("carboy2.yaml", CARBOY);
    offgas()
        .args(["log", "new"])
        .arg(&r)
        .arg("--from")
        .arg(&c)
        .assert()
        .code(1)
        .stderr(predicate::str::contains("already exists"));
    assert_eq!(std::fs::read(&r).unwrap(), before);
}

#[test]
fn a_crash_at_any_point_of_a_write_leaves_the_old_record_or_the_new() {
    for (point, expect_new) in [
        ("after-temp-create", false),
        ("mid-write", false),
        ("before-rename", false),
        ("after-rename", true),
    ] {
        let d = Dir::new();
        let r = new_record(&d);
        let rinse = d.write("rinse.yaml", RINSE);
        add(&r, &rinse, "A").code(0);
        let old = entries(&r);
        let out = offgas()
            .env("OFFGAS_FAULT", point)
            .args(["log", "add"])
            .arg(&r)
            .arg("--stream")
            .arg(&rinse)
            .args(["--by", "B"])
            .output()
            .unwrap();
        assert!(
            !out.status.success(),
            "{point}: the process was meant to die"
        );
        let now = entries(&r);
        assert_eq!(now, if expect_new { old + 1 } else { old }, "{point}");
        // The next writer cleans up and carries on.
        add(&r, &rinse, "C").code(0);
        assert_eq!(entries(&r), now + 1, "{point}");
        let leftovers: Vec<_> = std::fs::read_dir(d.0.path())
            .unwrap()
            .flatten()
            .filter(|e| e.file_name().to_string_lossy().contains(".tmp-"))
            .collect();
        assert!(leftovers.is_empty(), "{point}: temporary files left behind");
    }
}

#[test]
fn a_writer_killed_at_random_moments_never_damages_the_record() {
    let d = Dir::new();
    let r = new_record(&d);
    let rinse = d.write(
        "rinse.yaml",
        "name: tiny rinse\nvolume: 0.05 L\ncontents:\n  - sodium chloride: 0.05 mol/L\n",
    );
    let exe = assert_cmd::cargo::cargo_bin("offgas");
    let mut seed: u64 = 0x2545_f491_4f6c_dd1d;
    let mut count = entries(&r);
    for _ in 0..25 {
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        let delay = std::time::Duration::from_micros(seed % 40_000);
        let mut child = std::process::Command::new(&exe)
            .args(["log", "add"])
            .arg(&r)
            .arg("--stream")
            .arg(&rinse)
            .args(["--by", "K"])
            .stdout(std::process::Stdio::null())
            .stderr(std::process::Stdio::null())
            .spawn()
            .unwrap();
        std::thread::sleep(delay);
        let _ = child.kill();
        let _ = child.wait();
        let now = entries(&r);
        assert!(now == count || now == count + 1, "{count} → {now}");
        count = now;
    }
}

#[test]
fn concurrent_writers_each_land_exactly_once() {
    let d = Dir::new();
    let r = new_record(&d);
    let rinse = d.write(
        "rinse.yaml",
        "name: tiny rinse\nvolume: 0.1 L\ncontents:\n  - sodium chloride: 0.05 mol/L\n",
    );
    let exe = assert_cmd::cargo::cargo_bin("offgas");
    let children: Vec<_> = (0..6)
        .map(|i| {
            std::process::Command::new(&exe)
                .env("OFFGAS_LOCK_WAIT_MS", "60000")
                .args(["log", "add"])
                .arg(&r)
                .arg("--stream")
                .arg(&rinse)
                .args(["--by", &format!("worker-{i}")])
                .stdout(std::process::Stdio::null())
                .stderr(std::process::Stdio::null())
                .spawn()
                .unwrap()
        })
        .collect();
    for mut c in children {
        assert!(c.wait().unwrap().success());
    }
    let text = std::fs::read_to_string(&r).unwrap();
    let record = offgas::record::Record::parse("r", &text).unwrap();
    assert_eq!(record.entries.len(), 7);
    assert_no_lock_file(&r, "after six writers queued on it");
    for i in 0..6 {
        let name = format!("worker-{i}");
        assert_eq!(
            record
                .entries
                .iter()
                .filter(|e| e.by.as_deref() == Some(name.as_str()))
                .count(),
            1,
            "{name}"
        );
    }
}

#[test]
fn a_writer_that_cannot_get_the_lock_gives_up_clearly() {
    let d = Dir::new();
    let r = new_record(&d);
    let rinse = d.write("rinse.yaml", RINSE);
    let lock_path = PathBuf::from(format!("{}.lock", r.display()));
    // Another writer holds the lock (the lock file exists only while someone writes).
    let holder = std::fs::OpenOptions::new()
        .create(true)
        .truncate(false)
        .write(true)
        .open(&lock_path)
        .unwrap();
    holder.lock().unwrap();
    offgas()
        .env("OFFGAS_LOCK_WAIT_MS", "300")
        .args(["log", "add"])
        .arg(&r)
        .arg("--stream")
        .arg(&rinse)
        .args(["--by", "A"])
        .assert()
        .code(1)
        .stderr(predicate::str::contains("being written by someone else"));
    holder.unlock().unwrap();
    add(&r, &rinse, "A").code(0);
    assert_no_lock_file(&r, "after the writer that took over");
}
