//! A carboy's running record: the container definition and an append-only history of what
//! went in, each entry chained to the one before by a SHA-256 checksum, closed by a seal
//! line that counts the entries. The composition is always derived from the history.
//!
//! The record is JSON lines (one entry per line). This module reads, verifies and extends
//! the text; reading and writing files (atomically, under a lock) is the caller's job.

pub mod tag;

use crate::catalog::Catalog;
use crate::pour::batch::{Batch, InputError};
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum EntryKind {
    /// The container definition the record starts from.
    Start,
    /// A stream poured in.
    Add,
    /// Full: ready for pickup. Nothing more goes in.
    Close,
}

/// One line of history. `hash` covers every other field and the previous entry's hash.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Entry {
    pub seq: usize,
    pub kind: EntryKind,
    pub when: String,
    pub by: Option<String>,
    /// The file the batch came from, and its text, so the record stands on its own.
    pub file: Option<String>,
    pub text: Option<String>,
    /// The verdict of the check when it was added ("clear" or "review").
    pub verdict: Option<String>,
    /// Why a review was accepted.
    pub accepted: Option<String>,
    pub prev: String,
    pub hash: String,
}

/// The last line: how many entries there are and the last hash, so that a record cut
/// short at a line boundary is caught too.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct Seal {
    seal: usize,
    last: String,
    hash: String,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Record {
    pub entries: Vec<Entry>,
}

/// Why a record cannot be trusted: where it breaks and what to do.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{file}:{line}: {message}\n  fix: {fix}")]
pub struct RecordError {
    pub file: String,
    pub line: usize,
    pub message: String,
    pub fix: String,
}

fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

/// The checksum of an entry: SHA-256 over its fields (without `hash`), in a fixed order.
fn entry_hash(e: &Entry) -> String {
    let mut unhashed = e.clone();
    unhashed.hash = String::new();
    let json = serde_json::to_string(&unhashed).expect("entries serialise");
    hex(&Sha256::digest(json.as_bytes()))
}

fn seal_hash(count: usize, last: &str) -> String {
    hex(&Sha256::digest(format!("seal:{count}:{last}").as_bytes()))
}

const DO_NOT_EDIT: &str = "restore the record from a backup, or start a new one with `offgas log new`; never edit a record by hand";

impl Record {
    /// Reads and verifies a record. Any edit, reordering or truncation is refused with the
    /// line where the record breaks.
    pub fn parse(file: &str, text: &str) -> Result<Record, RecordError> {
        let err = |line: usize, message: String| RecordError {
            file: file.to_string(),
            line,
            message,
            fix: DO_NOT_EDIT.to_string(),
        };
        if !text.ends_with('\n') {
            let line = text.lines().count().max(1);
            return Err(err(
                line,
                "the last line is incomplete: the record was cut short".into(),
            ));
        }
        let lines: Vec<&str> = text.lines().collect();
        let Some((last_line, body)) = lines.split_last() else {
            return Err(err(1, "the record is empty".into()));
        };
        let mut entries: Vec<Entry> = Vec::with_capacity(body.len());
        for (i, l) in body.iter().enumerate() {
            let n = i + 1;
            let e: Entry =
                serde_json::from_str(l).map_err(|e| err(n, format!("not a record entry: {e}")))?;
            if e.seq != i {
                return Err(err(
                    n,
                    format!(
                        "entry number {} where {} was expected: entries were removed or reordered",
                        e.seq, i
                    ),
                ));
            }
            let prev = entries.last().map(|p| p.hash.clone()).unwrap_or_default();
            if e.prev != prev {
                return Err(err(n, "this entry does not follow the one before it: entries were removed, reordered or edited".into()));
            }
            if entry_hash(&e) != e.hash {
                return Err(err(
                    n,
                    "the checksum does not match the entry: it was changed after it was written"
                        .into(),
                ));
            }
            let expected_kind_ok = match (i, e.kind) {
                (0, EntryKind::Start) => true,
                (0, _) | (_, EntryKind::Start) => false,
                _ => !entries.iter().any(|x| x.kind == EntryKind::Close),
            };
            if !expected_kind_ok {
                return Err(err(
                    n,
                    "entries out of place: a record starts once and nothing follows its close"
                        .into(),
                ));
            }
            entries.push(e);
        }
        let n = lines.len();
        let seal: Seal = serde_json::from_str(last_line).map_err(|_| {
            err(
                n,
                "the seal line is missing: the record was cut short or added to by hand".into(),
            )
        })?;
        let last = entries.last().map(|e| e.hash.clone()).unwrap_or_default();
        if entries.is_empty()
            || seal.seal != entries.len()
            || seal.last != last
            || seal.hash != seal_hash(seal.seal, &seal.last)
        {
            return Err(err(n, format!("the seal says {} entries and does not match the {} entries above it: the record was cut short or edited", seal.seal, entries.len())));
        }
        Ok(Record { entries })
    }

    /// A new record from a container definition.
    pub fn start(when: &str, file: &str, container_text: &str) -> Record {
        let mut r = Record {
            entries: Vec::new(),
        };
        r.push(
            EntryKind::Start,
            when,
            None,
            Some(file.to_string()),
            Some(container_text.to_string()),
            None,
            None,
        );
        r
    }

    /// Appends an entry, chained to the last.
    #[allow(clippy::too_many_arguments)]
    pub fn push(
        &mut self,
        kind: EntryKind,
        when: &str,
        by: Option<String>,
        file: Option<String>,
        text: Option<String>,
        verdict: Option<String>,
        accepted: Option<String>,
    ) {
        let mut e = Entry {
            seq: self.entries.len(),
            kind,
            when: when.to_string(),
            by,
            file,
            text,
            verdict,
            accepted,
            prev: self
                .entries
                .last()
                .map(|p| p.hash.clone())
                .unwrap_or_default(),
            hash: String::new(),
        };
        e.hash = entry_hash(&e);
        self.entries.push(e);
    }

    /// The record as text: one entry per line, then the seal.
    pub fn to_text(&self) -> String {
        let mut out = String::new();
        for e in &self.entries {
            out.push_str(&serde_json::to_string(e).expect("entries serialise"));
            out.push('\n');
        }
        let last = self
            .entries
            .last()
            .map(|e| e.hash.clone())
            .unwrap_or_default();
        let seal = Seal {
            seal: self.entries.len(),
            hash: seal_hash(self.entries.len(), &last),
            last,
        };
        out.push_str(&serde_json::to_string(&seal).expect("seal serialises"));
        out.push('\n');
        out
    }

    pub fn is_closed(&self) -> bool {
        self.entries.iter().any(|e| e.kind == EntryKind::Close)
    }

    /// The container as it is now: its definition with every addition poured in.
    pub fn current(&self, cat: &Catalog, file: &str) -> Result<Batch, InputError> {
        let start = &self.entries[0];
        let mut vessel = Batch::parse(
            cat,
            &format!("{file} (entry 0)"),
            start.text.as_deref().unwrap_or(""),
        )?;
        for e in self.entries.iter().filter(|e| e.kind == EntryKind::Add) {
            let stream = Batch::parse(
                cat,
                &format!("{file} (entry {})", e.seq),
                e.text.as_deref().unwrap_or(""),
            )?;
            vessel = crate::pour::batch::pour_into(&vessel, &stream);
        }
        Ok(vessel)
    }
}
