//! `--suggest`: a better arrangement. Containers whose pairs would stop are moved apart
//! (colouring the conflict graph greedily, worst-connected container first), then single
//! moves that lower the number of review pairs are taken while they help (local search).
//! Fewest moves: a container is only moved to resolve a conflict it is part of.

use super::audit::PairJudge;
use super::report::{CabinetChange, Level, Move, Suggestion, ZoneContents};
use super::{split_path, Inventory};
use crate::report::Severity;
use rayon::prelude::*;
use std::collections::HashMap;
use std::time::{Duration, Instant};

/// Passes over the containers in stop pairs before the search gives up.
const MAX_PASSES: usize = 6;
/// The longest the search runs; what it found by then is reported, with a note.
const BUDGET: Duration = Duration::from_secs(30);

struct Tray {
    path: String,
    cabinet: String,
    room: String,
    capacity: usize,
}

struct Layout<'a> {
    trays: Vec<Tray>,
    /// Trays of each tray's cabinet (indices), so a cabinet's members are found at once.
    cabinet_trays: Vec<Vec<usize>>,
    at: Vec<usize>,
    members: Vec<Vec<usize>>,
    cabinet_level: bool,
    judge: &'a PairJudge<'a>,
}

impl Layout<'_> {
    fn severity(&self, i: usize, j: usize) -> Severity {
        if self.judge.screen(i, j) {
            self.judge.judge(i, j).severity
        } else {
            Severity::Clear
        }
    }

    /// (stops, reviews) container `i` would have in tray `t`.
    fn conflicts_in(&self, i: usize, t: usize) -> (usize, usize) {
        let (mut stops, mut reviews) = (0, 0);
        for &u in &self.cabinet_trays[t] {
            if u != t && !self.cabinet_level {
                continue;
            }
            for &j in &self.members[u] {
                if j == i {
                    continue;
                }
                match self.severity(i, j) {
                    Severity::Stop => stops += 1,
                    Severity::Review => reviews += 1,
                    _ => {}
                }
            }
        }
        (stops, reviews)
    }

    /// (stops, reviews) of each cabinet that holds a container.
    fn count_by_cabinet(&self) -> HashMap<String, (usize, usize)> {
        let mut out = HashMap::new();
        let mut by_cabinet: HashMap<&str, Vec<(usize, usize)>> = HashMap::new();
        for (t, tray) in self.trays.iter().enumerate() {
            for &i in &self.members[t] {
                by_cabinet.entry(&tray.cabinet).or_default().push((i, t));
            }
        }
        for (cabinet, list) in &by_cabinet {
            let (mut stops, mut reviews) = (0, 0);
            for (x, &(i, ti)) in list.iter().enumerate() {
                for &(j, tj) in &list[x + 1..] {
                    let level = if ti == tj {
                        Level::Tray
                    } else {
                        Level::Cabinet
                    };
                    if level == Level::Cabinet && !self.cabinet_level {
                        continue;
                    }
                    match self.severity(i, j) {
                        Severity::Stop => stops += 1,
                        Severity::Review => reviews += 1,
                        _ => {}
                    }
                }
            }
            out.insert(cabinet.to_string(), (stops, reviews));
        }
        out
    }

    /// The spill zones of a cabinet and their containers, as `members` places them.
    fn zones_of(
        &self,
        cabinet: &str,
        members: &[Vec<usize>],
        inv: &Inventory,
    ) -> Vec<ZoneContents> {
        let mut zones: Vec<ZoneContents> = (0..self.trays.len())
            .filter(|&t| self.trays[t].cabinet == cabinet)
            .map(|t| {
                let mut ids: Vec<String> = members[t]
                    .iter()
                    .map(|&i| inv.containers[i].id.clone())
                    .collect();
                ids.sort();
                ZoneContents {
                    zone: self.trays[t].path.replace('/', " / "),
                    capacity: self.trays[t].capacity,
                    ids,
                }
            })
            .collect();
        zones.sort_by(|a, b| a.zone.cmp(&b.zone));
        zones
    }

    fn move_to(&mut self, i: usize, t: usize) {
        let from = self.at[i];
        self.members[from].retain(|&x| x != i);
        self.members[t].push(i);
        self.at[i] = t;
    }

    /// The best tray with room for `i`: fewest stops, then reviews, then nearest.
    fn best_tray(&self, i: usize) -> Option<(usize, (usize, usize))> {
        let here = &self.trays[self.at[i]];
        (0..self.trays.len())
            .into_par_iter()
            .filter(|&t| t != self.at[i] && self.members[t].len() < self.trays[t].capacity)
            .map(|t| {
                let c = self.conflicts_in(i, t);
                let distance = if self.trays[t].cabinet == here.cabinet {
                    0
                } else if self.trays[t].room == here.room {
                    1
                } else {
                    2
                };
                (t, c, distance)
            })
            .min_by_key(|&(t, c, d)| (c.0, c.1, d, t))
            .map(|(t, c, _)| (t, c))
    }
}

/// The search's clock: once the budget is spent, no further move is taken.
struct Clock {
    started: Instant,
    out_of_time: bool,
}

impl Clock {
    fn start() -> Clock {
        Clock {
            started: Instant::now(),
            out_of_time: false,
        }
    }

    fn expired(&mut self) -> bool {
        if self.started.elapsed() > BUDGET {
            self.out_of_time = true;
        }
        self.out_of_time
    }
}

/// The trays a search may use, keyed by spill zone, each found or added once.
#[derive(Default)]
struct TrayList {
    trays: Vec<Tray>,
    index: HashMap<String, usize>,
}

impl TrayList {
    /// The tray of `path`'s spill zone; a declared capacity replaces whatever it had.
    fn tray_for(&mut self, inv: &Inventory, path: &[String], capacity: Option<usize>) -> usize {
        let key = inv.spill_zone_path(path).join("/");
        if let Some(&t) = self.index.get(&key) {
            if let Some(c) = capacity {
                self.trays[t].capacity = c;
            }
            return t;
        }
        self.trays.push(Tray {
            path: key.clone(),
            cabinet: inv.cabinet_path(path).join("/"),
            room: inv.room_path(path).join("/"),
            capacity: capacity.unwrap_or(usize::MAX),
        });
        self.index.insert(key, self.trays.len() - 1);
        self.trays.len() - 1
    }
}

/// Declared locations first, so that their capacities hold, then each container's tray;
/// returns the trays and the tray each container stands in.
fn trays_of(inv: &Inventory) -> (Vec<Tray>, Vec<usize>) {
    let mut list = TrayList::default();
    for l in &inv.locations {
        list.tray_for(inv, &split_path(&l.path), Some(l.capacity));
    }
    let at = inv
        .containers
        .iter()
        .map(|c| list.tray_for(inv, &c.path, None))
        .collect();
    (list.trays, at)
}

/// Counts and placement of a layout at one moment, to compare before with after.
struct Snapshot {
    stops: usize,
    reviews: usize,
    by_cabinet: HashMap<String, (usize, usize)>,
    members: Vec<Vec<usize>>,
}

impl<'a> Layout<'a> {
    /// Trays without a declared capacity get room for what they hold plus `spare`.
    fn new(
        mut trays: Vec<Tray>,
        at: Vec<usize>,
        spare: usize,
        cabinet_level: bool,
        judge: &'a PairJudge<'a>,
    ) -> Layout<'a> {
        let mut members = vec![Vec::new(); trays.len()];
        for (i, &t) in at.iter().enumerate() {
            members[t].push(i);
        }
        for (t, tray) in trays.iter_mut().enumerate() {
            if tray.capacity == usize::MAX {
                tray.capacity = members[t].len() + spare;
            }
        }
        let cabinet_trays: Vec<Vec<usize>> = trays
            .iter()
            .map(|t| {
                (0..trays.len())
                    .filter(|&u| trays[u].cabinet == t.cabinet)
                    .collect()
            })
            .collect();
        Layout {
            trays,
            cabinet_trays,
            at,
            members,
            cabinet_level,
            judge,
        }
    }

    fn snapshot(&self) -> Snapshot {
        let by_cabinet = self.count_by_cabinet();
        let (stops, reviews) = by_cabinet
            .values()
            .fold((0, 0), |(s, r), &(a, b)| (s + a, r + b));
        Snapshot {
            stops,
            reviews,
            by_cabinet,
            members: self.members.clone(),
        }
    }
}

/// Stops first: in passes, the containers in most stop pairs move first; a pass that
/// moves nothing ends the search. Returns, per container, whether it found no tray to go
/// to.
fn separate_stops(layout: &mut Layout, clock: &mut Clock) -> Vec<bool> {
    let mut stuck: Vec<bool> = vec![false; layout.at.len()];
    for _pass in 0..MAX_PASSES {
        let mut order: Vec<(usize, usize)> = (0..layout.at.len())
            .filter(|&i| !stuck[i])
            .map(|i| (layout.conflicts_in(i, layout.at[i]).0, i))
            .filter(|(s, _)| *s > 0)
            .collect();
        if order.is_empty() {
            break;
        }
        order.sort_by(|a, b| b.0.cmp(&a.0).then(a.1.cmp(&b.1)));
        let mut moved_any = false;
        for (_, i) in order {
            if clock.expired() {
                break;
            }
            // Earlier moves this pass may already have freed it.
            if layout.conflicts_in(i, layout.at[i]).0 == 0 {
                continue;
            }
            match layout.best_tray(i) {
                Some((t, (0, _))) => {
                    layout.move_to(i, t);
                    moved_any = true;
                }
                _ => stuck[i] = true,
            }
        }
        if clock.out_of_time || !moved_any {
            break;
        }
    }
    stuck
}

/// Then reviews: one pass, most-conflicted first, each container taking a move only if
/// it lowers its review pairs without adding a stop.
fn lower_reviews(layout: &mut Layout, clock: &mut Clock) {
    let mut order: Vec<(usize, usize)> = (0..layout.at.len())
        .map(|i| (layout.conflicts_in(i, layout.at[i]), i))
        .filter(|((s, r), _)| *s == 0 && *r > 0)
        .map(|((_, r), i)| (r, i))
        .collect();
    order.sort_by(|a, b| b.0.cmp(&a.0).then(a.1.cmp(&b.1)));
    for (_, i) in order {
        if clock.expired() {
            break;
        }
        let (_, r_here) = layout.conflicts_in(i, layout.at[i]);
        if let Some((t, (0, r))) = layout.best_tray(i) {
            if r < r_here {
                layout.move_to(i, t);
            }
        }
    }
}

/// The containers the search could not free of a stop pair, each with why.
fn unresolved_of(inv: &Inventory, layout: &Layout, stuck: &[bool]) -> Vec<String> {
    let mut unresolved = Vec::new();
    for (i, &is_stuck) in stuck.iter().enumerate() {
        if is_stuck && layout.conflicts_in(i, layout.at[i]).0 > 0 {
            unresolved.push(format!(
                "{} (no tray with a free place where it meets nothing it must not)",
                inv.containers[i].id
            ));
        }
    }
    unresolved
}

/// Each container that ends in another tray than `at`, its first one.
fn moves_from(inv: &Inventory, layout: &Layout, at: &[usize]) -> Vec<Move> {
    (0..inv.containers.len())
        .filter(|&i| layout.at[i] != at[i])
        .map(|i| Move {
            id: inv.containers[i].id.clone(),
            from: layout.trays[at[i]].path.replace('/', " / "),
            to: layout.trays[layout.at[i]].path.replace('/', " / "),
        })
        .collect()
}

/// Every cabinet a move takes a container from or to, sorted, with its trays and pair
/// counts before and after.
fn cabinet_changes(
    inv: &Inventory,
    layout: &Layout,
    at: &[usize],
    before: &Snapshot,
    after: &Snapshot,
) -> Vec<CabinetChange> {
    let mut touched: Vec<&str> = (0..inv.containers.len())
        .filter(|&i| layout.at[i] != at[i])
        .flat_map(|i| [at[i], layout.at[i]])
        .map(|t| layout.trays[t].cabinet.as_str())
        .collect();
    touched.sort();
    touched.dedup();
    touched
        .iter()
        .map(|&cabinet| {
            let counts_before = before.by_cabinet.get(cabinet).copied().unwrap_or((0, 0));
            let counts_after = after.by_cabinet.get(cabinet).copied().unwrap_or((0, 0));
            CabinetChange {
                cabinet: cabinet.replace('/', " / "),
                before: layout.zones_of(cabinet, &before.members, inv),
                after: layout.zones_of(cabinet, &after.members, inv),
                stop_pairs_before: counts_before.0,
                stop_pairs_after: counts_after.0,
                review_pairs_before: counts_before.1,
                review_pairs_after: counts_after.1,
            }
        })
        .collect()
}

/// What the search achieved, or why it stopped short.
fn search_note(out_of_time: bool, stops_after: usize, moves: usize) -> String {
    if out_of_time {
        format!(
            "The search stopped after {} s with {} left ({} found by then); a store this crowded with pairs that must not meet needs more room or fewer containers per cabinet before moves can help.",
            BUDGET.as_secs(),
            super::counted(stops_after, "stop pair", "stop pairs"),
            super::counted(moves, "move", "moves")
        )
    } else if stops_after == 0 {
        format!(
            "Every stop pair is removed with {}.",
            super::counted(moves, "move", "moves")
        )
    } else {
        format!(
            "{} left: there is no free place that keeps them apart. Add trays or cabinets, or remove containers.",
            super::counted(stops_after, "stop pair is", "stop pairs are")
        )
    }
}

/// Proposes moves; `spare` free places are assumed in trays the inventory gives no capacity.
pub fn suggest(
    inv: &Inventory,
    judge: &PairJudge,
    cabinet_level: bool,
    spare: usize,
) -> Suggestion {
    let (trays, at) = trays_of(inv);
    let mut layout = Layout::new(trays, at.clone(), spare, cabinet_level, judge);
    let before = layout.snapshot();
    // A time budget keeps a hopeless store from hanging the search.
    let mut clock = Clock::start();
    let stuck = separate_stops(&mut layout, &mut clock);
    let unresolved = unresolved_of(inv, &layout, &stuck);
    if !clock.out_of_time {
        lower_reviews(&mut layout, &mut clock);
    }
    let after = layout.snapshot();
    let moves = moves_from(inv, &layout, &at);
    let cabinets = cabinet_changes(inv, &layout, &at, &before, &after);
    let note = search_note(clock.out_of_time, after.stops, moves.len());
    Suggestion {
        moves,
        stop_pairs_before: before.stops,
        stop_pairs_after: after.stops,
        review_pairs_before: before.reviews,
        review_pairs_after: after.reviews,
        complete: after.stops == 0,
        unresolved,
        note,
        cabinets,
    }
}
