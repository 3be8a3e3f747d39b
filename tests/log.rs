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
        .stdout(predicate::str::contains("Hazard classes"));
    add(&r, &rinse, "A. Tech")
        .code(1)
        .stderr(predicate::str::contains("closed"));
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
    let holder = std::fs::OpenOptions::new()
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
}
