//! The storeroom audit's report model: what `audit` finds and `suggest` proposes, as the
//! layouts and the JSON see it. Its field names are part of the JSON contract.

use crate::report::Severity;
use serde::Serialize;
use std::sync::Arc;

/// Where two containers meet.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Hash)]
#[serde(rename_all = "lowercase")]
pub enum Level {
    /// The same spill zone (tray or secondary containment).
    Tray,
    /// The same cabinet, different spill zones.
    Cabinet,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ContainerRef {
    pub id: String,
    pub location: String,
    pub contents: String,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AuditFinding {
    pub severity: Severity,
    pub level: Level,
    /// Shared between the findings of a container (large audits hold many).
    pub a: Arc<ContainerRef>,
    pub b: Arc<ContainerRef>,
    pub worst_ratio: f64,
    pub gas: Option<String>,
    /// Shared between every pair with the same contents.
    pub headline: Arc<str>,
    pub codes: Arc<[String]>,
    pub computed: bool,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MatrixCell {
    pub i: usize,
    pub j: usize,
    pub severity: Severity,
    pub level: Level,
    pub worst_ratio: f64,
    /// The gas that decided the verdict, when a gas did.
    pub gas: Option<String>,
    /// The finding's codes (the rules or checks that decided it).
    pub codes: Vec<String>,
}

/// The pairs of one cabinet (or place where containers meet) that holds a finding. Every
/// container that meets another there is in `ids`, ordered by spill zone then id, so the
/// containers of a spill zone stand together; `cells` holds the pairs that are not clear.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CabinetMatrix {
    pub cabinet: String,
    pub ids: Vec<String>,
    /// The spill zone of each container in `ids` (same order), levels joined by " / ".
    pub zones: Vec<String>,
    /// Pairs of positions in `ids` that cannot meet (different spill zones when containers
    /// of a cabinet are paired only within their spill zone); left out when there are none.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub apart: Vec<[usize; 2]>,
    pub cells: Vec<MatrixCell>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AuditCounts {
    pub containers: usize,
    pub spill_zones: usize,
    pub cabinets: usize,
    pub pairs_that_can_meet: usize,
    pub pairs_cleared_by_screening: usize,
    pub pairs_checked: usize,
    /// Distinct pairs of contents actually computed (identical bottles share a result).
    pub distinct_checks: usize,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AuditReport {
    pub tool: &'static str,
    pub version: &'static str,
    pub name: String,
    pub file: String,
    pub severity: Severity,
    pub counts: AuditCounts,
    pub findings: Vec<AuditFinding>,
    pub cabinets: Vec<CabinetMatrix>,
    /// Cabinets where no pair is past its review level (sorted), levels joined by " / ".
    pub clear_cabinets: Vec<String>,
    pub suggestion: Option<Suggestion>,
    pub skipped_rows: Vec<serde_json::Value>,
    pub assumptions: Vec<String>,
    pub cautions: Vec<String>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Move {
    pub id: String,
    pub from: String,
    pub to: String,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Suggestion {
    pub moves: Vec<Move>,
    pub stop_pairs_before: usize,
    pub stop_pairs_after: usize,
    pub review_pairs_before: usize,
    pub review_pairs_after: usize,
    /// True when every stop pair is gone.
    pub complete: bool,
    /// Containers whose stop pairs could not be removed, with why.
    pub unresolved: Vec<String>,
    pub note: String,
    /// Each cabinet a move leaves or enters (sorted), as it stands before and after the moves.
    pub cabinets: Vec<CabinetChange>,
}

/// The containers of one spill zone.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ZoneContents {
    /// The spill zone, levels joined by " / ".
    pub zone: String,
    /// Places it holds: the inventory's capacity, or its containers plus the spare places
    /// assumed.
    pub capacity: usize,
    /// Its containers' ids, sorted.
    pub ids: Vec<String>,
}

/// A cabinet touched by the moves: its spill zones before and after, and its pairs.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CabinetChange {
    /// The cabinet, levels joined by " / ".
    pub cabinet: String,
    /// Every spill zone of the cabinet, in the same order before and after.
    pub before: Vec<ZoneContents>,
    pub after: Vec<ZoneContents>,
    pub stop_pairs_before: usize,
    pub stop_pairs_after: usize,
    pub review_pairs_before: usize,
    pub review_pairs_after: usize,
}
