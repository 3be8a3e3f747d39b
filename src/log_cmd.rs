//! `offgas log`: a carboy's running record, kept so that nothing recorded is ever lost.
//!
//! Every write goes to a temporary file in the same folder, is flushed to disk, and is
//! renamed over the record, so the record on disk is always the old one or the new one.
//! Writers take an exclusive lock on a `.lock` file beside the record; a second writer
//! waits (OFFGAS_LOCK_WAIT_MS, default 10 s) and then gives up with a clear message.

use crate::{load_catalog, load_thresholds, print, render, rules_cmd, Format};
use anyhow::{anyhow, Context, Result};
use offgas::batch::Batch;
use offgas::check::{check, CheckOptions};
use offgas::record::{EntryKind, Record};
use offgas::report::Severity;
use std::fs::{File, OpenOptions};
use std::io::Write;
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant, SystemTime};

/// A test hook: `OFFGAS_FAULT=<point>` aborts the process at that point of a write, as a
/// crash or a kill would, so tests can show the record survives.
fn fault(point: &str) {
    if std::env::var("OFFGAS_FAULT").is_ok_and(|v| v == point) {
        std::process::abort();
    }
}

fn now() -> String {
    humantime::format_rfc3339_seconds(SystemTime::now()).to_string()
}

fn temp_prefix(path: &Path) -> String {
    format!(
        ".{}.tmp-",
        path.file_name()
            .map(|n| n.to_string_lossy())
            .unwrap_or_default()
    )
}

fn folder(path: &Path) -> PathBuf {
    match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    }
}

/// Writes `text` to `path` so that a crash at any moment leaves the old file or the new.
fn write_atomic(path: &Path, text: &str) -> Result<()> {
    let dir = folder(path);
    let tmp = dir.join(format!("{}{}", temp_prefix(path), std::process::id()));
    let mut f = OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(&tmp)
        .with_context(|| format!("cannot create a temporary file in {}", dir.display()))?;
    fault("after-temp-create");
    let bytes = text.as_bytes();
    let half = bytes.len() / 2;
    f.write_all(&bytes[..half])?;
    fault("mid-write");
    f.write_all(&bytes[half..])?;
    f.sync_all()?;
    fault("before-rename");
    std::fs::rename(&tmp, path).with_context(|| format!("cannot replace {}", path.display()))?;
    fault("after-rename");
    // The rename itself must reach the disk too.
    if let Ok(d) = File::open(&dir) {
        let _ = d.sync_all();
    }
    Ok(())
}

/// An exclusive lock on the record, held until dropped.
struct RecordLock {
    _file: File,
}

fn lock(path: &Path) -> Result<RecordLock> {
    let lock_path = PathBuf::from(format!("{}.lock", path.display()));
    let file = OpenOptions::new()
        .create(true)
        .truncate(false)
        .write(true)
        .open(&lock_path)
        .with_context(|| format!("cannot open the lock file {}", lock_path.display()))?;
    let wait_ms: u64 = std::env::var("OFFGAS_LOCK_WAIT_MS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(10_000);
    let start = Instant::now();
    loop {
        match file.try_lock() {
            Ok(()) => break,
            Err(std::fs::TryLockError::WouldBlock) => {
                if start.elapsed() > Duration::from_millis(wait_ms) {
                    return Err(anyhow!(
                        "{} is being written by someone else and stayed locked for {} s; nothing was recorded. Try again in a moment.",
                        path.display(),
                        wait_ms / 1000
                    ));
                }
                std::thread::sleep(Duration::from_millis(25));
            }
            Err(std::fs::TryLockError::Error(e)) => {
                return Err(anyhow!("cannot lock {}: {e}", lock_path.display()))
            }
        }
    }
    // Under the lock no other writer is running: temporary files left by a crash can go.
    let dir = folder(path);
    let prefix = temp_prefix(path);
    if let Ok(entries) = std::fs::read_dir(&dir) {
        for e in entries.flatten() {
            if e.file_name().to_string_lossy().starts_with(&prefix) {
                let _ = std::fs::remove_file(e.path());
            }
        }
    }
    Ok(RecordLock { _file: file })
}

fn read_record(path: &Path) -> Result<Record> {
    let text = std::fs::read_to_string(path)
        .with_context(|| format!("cannot read the record {}", path.display()))?;
    Record::parse(&path.display().to_string(), &text).map_err(|e| anyhow!("{e}"))
}

/// `log new`: a record from a container definition; never over an existing file.
pub fn new(path: &Path, from: &Path) -> Result<u8> {
    let cat = load_catalog()?;
    let text = std::fs::read_to_string(from)
        .with_context(|| format!("cannot read {}: check the path", from.display()))?;
    let batch =
        Batch::parse(&cat, &from.display().to_string(), &text).map_err(|e| anyhow!("{e}"))?;
    if batch.capacity_l.is_none() {
        return Err(anyhow!(
            "{}: a carboy record needs a container with a `capacity`",
            from.display()
        ));
    }
    let _lock = lock(path)?;
    if path.exists() {
        return Err(anyhow!(
            "{} already exists; offgas never replaces a record. Choose another file name.",
            path.display()
        ));
    }
    let record = Record::start(&now(), &from.display().to_string(), &text);
    write_atomic(path, &record.to_text())?;
    print(&format!(
        "started the record {} for `{}`\n",
        path.display(),
        batch.name
    ))?;
    Ok(0)
}

/// `log add`: the full check against what the record holds; appended only when clear,
/// or review with a stated reason.
pub fn add(
    path: &Path,
    stream_path: &Path,
    by: &str,
    accept: Option<&str>,
    format: Format,
) -> Result<u8> {
    if by.trim().is_empty() {
        return Err(anyhow!("--by needs the name of the person pouring"));
    }
    let cat = load_catalog()?;
    let th = load_thresholds(None)?;
    let rules = rules_cmd::load(&cat, None)?;
    let stream_text = std::fs::read_to_string(stream_path)
        .with_context(|| format!("cannot read {}: check the path", stream_path.display()))?;
    let stream = Batch::parse(&cat, &stream_path.display().to_string(), &stream_text)
        .map_err(|e| anyhow!("{e}"))?;
    let _lock = lock(path)?;
    let mut record = read_record(path)?;
    if record.is_closed() {
        return Err(anyhow!("{} is closed: the carboy is full and waits for pickup; start a new record for a new carboy", path.display()));
    }
    let vessel = record
        .current(&cat, &path.display().to_string())
        .map_err(|e| anyhow!("{e}"))?;
    let report = check(
        &cat,
        &th,
        &rules,
        &vessel,
        &stream,
        &CheckOptions::default(),
    )
    .map_err(|e| anyhow!("{e}"))?;
    print(&render(&report, format, false)?)?;
    let decision = match (report.severity, accept) {
        (Severity::Stop, _) => Err(format!(
            "NOT RECORDED: the check says stop. Do not pour this into {}; find a container it can go into (`offgas check`) or ask your EHS office.",
            vessel.name
        )),
        (Severity::Review, None) => Err(
            "NOT RECORDED: the check says review. Have a competent person look; if they accept it, run again with --accept \"their reason\".".to_string(),
        ),
        (Severity::Review, Some(reason)) if reason.trim().is_empty() => Err("NOT RECORDED: --accept needs a reason".to_string()),
        (Severity::Review, Some(reason)) => Ok(Some(reason.to_string())),
        _ => Ok(None),
    };
    match decision {
        Ok(accepted) => {
            record.push(
                EntryKind::Add,
                &now(),
                Some(by.to_string()),
                Some(stream_path.display().to_string()),
                Some(stream_text),
                Some(report.severity.word().to_string()),
                accepted,
            );
            write_atomic(path, &record.to_text())?;
            eprintln!(
                "offgas: recorded in {} as entry {}",
                path.display(),
                record.entries.len() - 1
            );
        }
        Err(message) => eprintln!("offgas: {message}"),
    }
    Ok(crate::exit_status(report.severity))
}

/// `log show`: history, current composition, fill level and headspace estimate.
pub fn show(path: &Path, as_json: bool) -> Result<u8> {
    let cat = load_catalog()?;
    let th = load_thresholds(None)?;
    let record = read_record(path)?;
    let vessel = record
        .current(&cat, &path.display().to_string())
        .map_err(|e| anyhow!("{e}"))?;
    let capacity = vessel.capacity_l.unwrap_or(vessel.volume_l);
    let mixture = vessel.to_mixture(&cat, capacity);
    let settings = offgas::chem::SolverSettings {
        activity_limit: th.activity_model.max_ionic_strength,
        ..Default::default()
    };
    let state = offgas::chem::solve(&cat, &mixture, &settings)
        .map(|eq| {
            let t = eq.temperature_k - cat.physical.kelvin_offset;
            let heat = offgas::pour::HeatReport::at_rest(t);
            offgas::assess::state_report(&cat, &th, &eq, &heat)
        })
        .map_err(|e| anyhow!("the current contents could not be assessed: {e}"))?;
    let contents: Vec<serde_json::Value> = vessel
        .components
        .iter()
        .map(|c| {
            let s = cat.substance(c.substance);
            serde_json::json!({"substance": s.name, "mol": c.moles, "mol_per_l": c.moles / vessel.volume_l})
        })
        .collect();
    if as_json {
        let doc = serde_json::json!({
            "record": path.display().to_string(),
            "container": vessel.name,
            "closed": record.is_closed(),
            "capacity_l": capacity,
            "volume_l": vessel.volume_l,
            "fill_percent": 100.0 * vessel.volume_l / capacity,
            "history": record.entries.iter().map(|e| serde_json::json!({
                "seq": e.seq, "kind": e.kind, "when": e.when, "by": e.by, "file": e.file,
                "verdict": e.verdict, "accepted": e.accepted})).collect::<Vec<_>>(),
            "contents": contents,
            "headspace": state,
        });
        print(&(serde_json::to_string_pretty(&doc)? + "\n"))?;
        return Ok(0);
    }
    let mut out = format!(
        "{} ({}){}\nfilled to {:.2} of {} L ({:.0} %)\n\nHistory\n",
        vessel.name,
        path.display(),
        if record.is_closed() {
            ", CLOSED for pickup"
        } else {
            ""
        },
        vessel.volume_l,
        capacity,
        100.0 * vessel.volume_l / capacity
    );
    for e in &record.entries {
        let what = match e.kind {
            EntryKind::Start => format!("started from {}", e.file.as_deref().unwrap_or("?")),
            EntryKind::Add => format!(
                "added {} ({}){}",
                e.file.as_deref().unwrap_or("?"),
                e.verdict.as_deref().unwrap_or("?"),
                e.accepted
                    .as_ref()
                    .map(|a| format!(", accepted: {a}"))
                    .unwrap_or_default()
            ),
            EntryKind::Close => "closed for pickup".into(),
        };
        out.push_str(&format!(
            "  {:>3}  {}  {:<16} {}\n",
            e.seq,
            e.when,
            e.by.as_deref().unwrap_or("-"),
            what
        ));
    }
    out.push_str("\nWhat it holds now (derived from the history)\n");
    for c in &vessel.components {
        let s = cat.substance(c.substance);
        out.push_str(&format!(
            "  {:<40} {:>10.4} mol  {:>10.4} mol/L\n",
            s.name,
            c.moles,
            c.moles / vessel.volume_l
        ));
    }
    out.push_str(&format!(
        "\nHeadspace now: pH {:.2}, {:.1} °C\n",
        state.ph, state.temperature_c
    ));
    if state.gases.iter().all(|g| g.headspace_ppm < 0.01) {
        out.push_str("  no volatile form above 0.01 ppm\n");
    }
    for g in state.gases.iter().filter(|g| g.headspace_ppm >= 0.01) {
        out.push_str(&format!(
            "  {:<6} {:>10.2} ppm  (review at {}, stop at {})\n",
            g.formula,
            g.headspace_ppm,
            g.limit_ppm
                .map(|v| format!("{v} ppm"))
                .unwrap_or_else(|| "none".into()),
            g.idlh_ppm
                .map(|v| format!("{v} ppm"))
                .unwrap_or_else(|| "none".into())
        ));
    }
    print(&out)?;
    Ok(0)
}

/// `log close`: marks the carboy full and prints the contents for the waste tag.
pub fn close(path: &Path, by: &str) -> Result<u8> {
    let cat = load_catalog()?;
    let _lock = lock(path)?;
    let mut record = read_record(path)?;
    if record.is_closed() {
        return Err(anyhow!("{} is already closed", path.display()));
    }
    let vessel = record
        .current(&cat, &path.display().to_string())
        .map_err(|e| anyhow!("{e}"))?;
    record.push(
        EntryKind::Close,
        &now(),
        Some(by.to_string()),
        None,
        None,
        None,
        None,
    );
    write_atomic(path, &record.to_text())?;
    // The tag: masses by substance and their share of the whole (taken at 1 kg per litre).
    let total_g = vessel.volume_l * 1e3;
    let mut out = format!(
        "WASTE TAG: {}\nclosed {} by {}; {:.2} L\n\nContents (by mass, taking the liquid at 1 kg/L; the rest is water)\n",
        vessel.name,
        record.entries.last().map(|e| e.when.clone()).unwrap_or_default(),
        by,
        vessel.volume_l
    );
    let mut classes: Vec<String> = Vec::new();
    for c in &vessel.components {
        let s = cat.substance(c.substance);
        let g = c.moles * s.molar_mass.unwrap_or(0.0);
        out.push_str(&format!(
            "  {:<40} {:>10.1} g  {:>6.2} %\n",
            s.name,
            g,
            100.0 * g / total_g
        ));
        for k in &s.classes {
            if !classes.contains(k) {
                classes.push(k.clone());
            }
        }
    }
    out.push_str(&format!("\nHazard classes: {}\n", classes.join(", ")));
    out.push_str("Check the tag against your site's waste labelling rules before pickup.\n");
    print(&out)?;
    Ok(0)
}

/// `log verify`: every entry checked in turn; names the first line where the record breaks.
pub fn verify(path: &Path) -> Result<u8> {
    let text = std::fs::read_to_string(path)
        .with_context(|| format!("cannot read the record {}", path.display()))?;
    match Record::parse(&path.display().to_string(), &text) {
        Ok(r) => {
            print(&format!(
                "{}: {} entries, every checksum and the seal intact{}\n",
                path.display(),
                r.entries.len(),
                if r.is_closed() { "; closed" } else { "" }
            ))?;
            Ok(0)
        }
        Err(e) => Err(anyhow!("{e}")),
    }
}
