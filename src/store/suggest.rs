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

    fn count(&self) -> (usize, usize) {
        self.count_by_cabinet()
            .values()
            .fold((0, 0), |(s, r), &(a, b)| (s + a, r + b))
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

/// Proposes moves; `spare` free places are assumed in trays the inventory gives no capacity.
pub fn suggest(
    inv: &Inventory,
    judge: &PairJudge,
    cabinet_level: bool,
    spare: usize,
) -> Suggestion {
    let mut index: HashMap<String, usize> = HashMap::new();
    let mut trays: Vec<Tray> = Vec::new();
    let tray_of = |path: &[String]| inv.spill_zone_path(path).join("/");
    let add_tray = |path: Vec<String>,
                    capacity: Option<usize>,
                    trays: &mut Vec<Tray>,
                    index: &mut HashMap<String, usize>| {
        let key = tray_of(&path);
        if let Some(&t) = index.get(&key) {
            if let Some(c) = capacity {
                trays[t].capacity = c;
            }
            return t;
        }
        trays.push(Tray {
            path: key.clone(),
            cabinet: inv.cabinet_path(&path).join("/"),
            room: inv.room_path(&path).join("/"),
            capacity: capacity.unwrap_or(usize::MAX),
        });
        index.insert(key, trays.len() - 1);
        trays.len() - 1
    };
    for l in &inv.locations {
        let p = split_path(&l.path);
        add_tray(p, Some(l.capacity), &mut trays, &mut index);
    }
    let at: Vec<usize> = inv
        .containers
        .iter()
        .map(|c| add_tray(c.path.clone(), None, &mut trays, &mut index))
        .collect();
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
    let mut layout = Layout {
        trays,
        cabinet_trays,
        at: at.clone(),
        members,
        cabinet_level,
        judge,
    };
    let (stops_before, reviews_before) = layout.count();
    let by_cabinet_before = layout.count_by_cabinet();
    let members_before = layout.members.clone();
    let mut unresolved = Vec::new();

    // Stops first: in passes, the containers in most stop pairs move first; a pass that
    // moves nothing ends the search. A time budget keeps a hopeless store from hanging it.
    let started = Instant::now();
    let mut out_of_time = false;
    let mut stuck: Vec<bool> = vec![false; inv.containers.len()];
    for _pass in 0..MAX_PASSES {
        let mut order: Vec<(usize, usize)> = (0..inv.containers.len())
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
            if started.elapsed() > BUDGET {
                out_of_time = true;
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
        if out_of_time || !moved_any {
            break;
        }
    }
    for (i, &is_stuck) in stuck.iter().enumerate() {
        if is_stuck && layout.conflicts_in(i, layout.at[i]).0 > 0 {
            unresolved.push(format!(
                "{} (no tray with a free place where it meets nothing it must not)",
                inv.containers[i].id
            ));
        }
    }
    // Then reviews: one pass, most-conflicted first, each container taking a move only if
    // it lowers its review pairs without adding a stop.
    if !out_of_time {
        let mut order: Vec<(usize, usize)> = (0..inv.containers.len())
            .map(|i| (layout.conflicts_in(i, layout.at[i]), i))
            .filter(|((s, r), _)| *s == 0 && *r > 0)
            .map(|((_, r), i)| (r, i))
            .collect();
        order.sort_by(|a, b| b.0.cmp(&a.0).then(a.1.cmp(&b.1)));
        for (_, i) in order {
            if started.elapsed() > BUDGET {
                out_of_time = true;
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
    let (stops_after, reviews_after) = layout.count();
    let moves: Vec<Move> = (0..inv.containers.len())
        .filter(|&i| layout.at[i] != at[i])
        .map(|i| Move {
            id: inv.containers[i].id.clone(),
            from: layout.trays[at[i]].path.replace('/', " / "),
            to: layout.trays[layout.at[i]].path.replace('/', " / "),
        })
        .collect();
    let complete = stops_after == 0;
    let by_cabinet_after = layout.count_by_cabinet();
    let mut touched: Vec<&str> = (0..inv.containers.len())
        .filter(|&i| layout.at[i] != at[i])
        .flat_map(|i| [at[i], layout.at[i]])
        .map(|t| layout.trays[t].cabinet.as_str())
        .collect();
    touched.sort();
    touched.dedup();
    let cabinets: Vec<CabinetChange> = touched
        .iter()
        .map(|&cabinet| {
            let before = by_cabinet_before.get(cabinet).copied().unwrap_or((0, 0));
            let after = by_cabinet_after.get(cabinet).copied().unwrap_or((0, 0));
            CabinetChange {
                cabinet: cabinet.replace('/', " / "),
                before: layout.zones_of(cabinet, &members_before, inv),
                after: layout.zones_of(cabinet, &layout.members, inv),
                stop_pairs_before: before.0,
                stop_pairs_after: after.0,
                review_pairs_before: before.1,
                review_pairs_after: after.1,
            }
        })
        .collect();
    let note = if out_of_time {
        format!(
            "The search stopped after {} s with {} left ({} found by then); a store this crowded with pairs that must not meet needs more room or fewer containers per cabinet before moves can help.",
            BUDGET.as_secs(),
            super::counted(stops_after, "stop pair", "stop pairs"),
            super::counted(
                layout.at.iter().zip(&at).filter(|(a, b)| a != b).count(),
                "move",
                "moves"
            )
        )
    } else if complete {
        format!(
            "Every stop pair is removed with {}.",
            super::counted(moves.len(), "move", "moves")
        )
    } else {
        format!(
            "{} left: there is no free place that keeps them apart. Add trays or cabinets, or remove containers.",
            super::counted(stops_after, "stop pair is", "stop pairs are")
        )
    };
    Suggestion {
        moves,
        stop_pairs_before: stops_before,
        stop_pairs_after: stops_after,
        review_pairs_before: reviews_before,
        review_pairs_after: reviews_after,
        complete,
        unresolved,
        note,
        cabinets,
    }
}
