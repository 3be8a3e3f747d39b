//! `offgas log`: a carboy's running record, kept so that nothing recorded is ever lost.
//!
//! Every write goes to a temporary file in the same folder, is flushed to disk, and is
//! renamed over the record, so the record on disk is always the old one or the new one.
//! Writers take an exclusive lock on a `.lock` file beside the record; a second writer
//! waits (OFFGAS_LOCK_WAIT_MS, default 10 s) and then gives up with a clear message. The
//! lock file is removed when its writer is done (see `RecordLock`).

use super::{load_catalog, load_thresholds, print, rules, Format, OutputArgs};
use anyhow::{anyhow, Context, Result};
use offgas::check::{check, CheckOptions};
use offgas::pour::batch::Batch;
use offgas::record::tag::{CarboyReport, WasteTag};
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

/// An exclusive lock on the record, held until dropped. Dropping it removes the lock file.
///
/// Removing a lock file is only safe in one order. If a writer unlocked first and removed
/// the file after, a second writer could lock the old file in between, and a third could
/// then create a new file at the path and lock that too: two writers at once. So the file
/// is removed while the lock is still held (in `drop`, before the file is closed), and every
/// writer, once it holds a lock, checks that the file it locked is still the one at the
/// path. A writer that was waiting on a file its holder has since removed finds the path
/// gone or holding another file, lets go, and queues on the file now at the path. At any
/// moment at most one writer holds a lock on the file the path names, and no writer works
/// under a lock on a file the path does not name.
struct RecordLock {
    file: File,
    path: PathBuf,
}

impl Drop for RecordLock {
    fn drop(&mut self) {
        // Where the platform cannot tell one file from another at the same path (see
        // `still_at_path`), the file stays: a queued writer could not notice its removal.
        if cfg!(unix) {
            let _ = std::fs::remove_file(&self.path);
        }
        // `self.file` closes after this body, releasing the lock after the unlink.
        let _ = &self.file;
    }
}

/// True when `file` is still the file at `path` (not removed, not replaced).
#[cfg(unix)]
fn still_at_path(file: &File, path: &Path) -> bool {
    use std::os::unix::fs::MetadataExt;
    match (file.metadata(), std::fs::metadata(path)) {
        (Ok(a), Ok(b)) => a.dev() == b.dev() && a.ino() == b.ino(),
        _ => false,
    }
}

#[cfg(not(unix))]
fn still_at_path(_file: &File, path: &Path) -> bool {
    path.exists()
}

fn lock(path: &Path) -> Result<RecordLock> {
    let lock_path = PathBuf::from(format!("{}.lock", path.display()));
    let wait_ms: u64 = std::env::var("OFFGAS_LOCK_WAIT_MS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(10_000);
    let start = Instant::now();
    let file = 'queue: loop {
        let file = OpenOptions::new()
            .create(true)
            .truncate(false)
            .write(true)
            .open(&lock_path)
            .with_context(|| format!("cannot open the lock file {}", lock_path.display()))?;
        loop {
            match file.try_lock() {
                Ok(()) if still_at_path(&file, &lock_path) => break 'queue file,
                // The writer before us removed this file as it finished: queue again on
                // the file now at the path.
                Ok(()) => continue 'queue,
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
    };
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
    Ok(RecordLock {
        file,
        path: lock_path,
    })
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
        Batch::parse(cat, &from.display().to_string(), &text).map_err(|e| anyhow!("{e}"))?;
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
    site_rules: Option<&Path>,
    thresholds: Option<&Path>,
) -> Result<u8> {
    if by.trim().is_empty() {
        return Err(anyhow!("--by needs the name of the person pouring"));
    }
    let cat = load_catalog()?;
    let th = load_thresholds(thresholds)?;
    let rules = rules::load(cat, site_rules)?;
    let stream_text = std::fs::read_to_string(stream_path)
        .with_context(|| format!("cannot read {}: check the path", stream_path.display()))?;
    let stream = Batch::parse(cat, &stream_path.display().to_string(), &stream_text)
        .map_err(|e| anyhow!("{e}"))?;
    let _lock = lock(path)?;
    let mut record = read_record(path)?;
    if record.is_closed() {
        return Err(anyhow!("{} is closed: the carboy is full and waits for pickup; start a new record for a new carboy", path.display()));
    }
    let vessel = record
        .current(cat, &path.display().to_string())
        .map_err(|e| anyhow!("{e}"))?;
    let report = check(cat, &th, &rules, &vessel, &stream, &CheckOptions::default())
        .map_err(|e| anyhow!("{e}"))?;
    print(&super::render(&report, format, false)?)?;
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
    Ok(super::exit_status(report.severity))
}

fn load_ghs(cat: &offgas::catalog::Catalog) -> Result<offgas::catalog::ghs::GhsTable> {
    offgas::embedded::ghs(cat)
        .map_err(|e| anyhow!("the bundled labelling table is broken (a build defect): {e}"))
}

/// `log show`: history, current composition, fill level and headspace; the tag once closed.
pub fn show(path: &Path, format: Format, out: &OutputArgs) -> Result<u8> {
    out.check_free()?;
    let cat = load_catalog()?;
    let th = load_thresholds(None)?;
    let ghs = load_ghs(cat)?;
    let record = read_record(path)?;
    let report = CarboyReport::from_record(cat, &th, &ghs, &record, &path.display().to_string())
        .map_err(|e| anyhow!("{e}"))?;
    let text = match format {
        Format::Table => offgas::output::tag::carboy_table(&report),
        Format::Markdown => offgas::output::tag::carboy_markdown(&report),
        Format::Json => serde_json::to_string_pretty(&report)? + "\n",
        Format::Html => offgas::output::tag::carboy_html(&report),
    };
    out.deliver(&text, "the record")?;
    Ok(0)
}

/// `log close`: marks the carboy full and prints its waste tag.
pub fn close(path: &Path, by: &str, format: Format, out: &OutputArgs) -> Result<u8> {
    if by.trim().is_empty() {
        return Err(anyhow!(
            "--by needs the name of the person closing the carboy"
        ));
    }
    out.check_free()?;
    let cat = load_catalog()?;
    let th = load_thresholds(None)?;
    let ghs = load_ghs(cat)?;
    let _lock = lock(path)?;
    let mut record = read_record(path)?;
    if record.is_closed() {
        return Err(anyhow!(
            "{} is already closed; `offgas log show {}` prints its waste tag again",
            path.display(),
            path.display()
        ));
    }
    record.push(
        EntryKind::Close,
        &now(),
        Some(by.to_string()),
        None,
        None,
        None,
        None,
    );
    // The tag is made before the record is written: a carboy whose contents cannot be
    // assessed stays open rather than close without a tag.
    let tag = WasteTag::from_record(cat, &th, &ghs, &record, &path.display().to_string())
        .map_err(|e| anyhow!("{e}; the record was not closed"))?;
    let text = match format {
        Format::Table => offgas::output::tag::tag_table(&tag),
        Format::Markdown => offgas::output::tag::tag_markdown(&tag),
        Format::Json => serde_json::to_string_pretty(&tag)? + "\n",
        Format::Html => offgas::output::tag::tag_html(&tag),
    };
    write_atomic(path, &record.to_text())?;
    out.deliver(&text, "the waste tag").map_err(|e| {
        anyhow!(
            "{e:#}; the record is closed, and `offgas log show {}` prints the tag again",
            path.display()
        )
    })?;
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
