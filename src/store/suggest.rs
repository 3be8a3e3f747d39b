//! `--suggest`: a better arrangement. Containers whose pairs would stop are moved apart
//! (colouring the conflict graph greedily, worst-connected container first), then single
//! moves that lower the number of review pairs are taken while they help (local search).
//! Fewest moves: a container is only moved to resolve a conflict it is part of.

use super::audit::{Level, PairJudge};
use super::{split_path, Inventory};
use crate::report::Severity;
use serde::Serialize;
use std::collections::HashMap;

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
}

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
        let (mut stops, mut reviews) = (0, 0);
        let mut by_cabinet: HashMap<&str, Vec<(usize, usize)>> = HashMap::new();
        for (t, tray) in self.trays.iter().enumerate() {
            for &i in &self.members[t] {
                by_cabinet.entry(&tray.cabinet).or_default().push((i, t));
            }
        }
        for list in by_cabinet.values() {
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
        }
        (stops, reviews)
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
    let tray_of = |path: &[String]| path[..inv.meet_depth.min(path.len())].join("/");
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
            cabinet: path[..inv.cabinet_depth.min(path.len())].join("/"),
            room: path[..2.min(path.len())].join("/"),
            capacity: capacity.unwrap_or(usize::MAX),
        });
        index.insert(key, trays.len() - 1);
        trays.len() - 1
    };
    for l in &inv.locations {
        let p = split_path(&l.path);
        if p.len() >= inv.meet_depth {
            add_tray(p, Some(l.capacity), &mut trays, &mut index);
        }
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
    let mut unresolved = Vec::new();

    // Stops first: the container in most stop pairs moves first.
    let mut rounds = 0;
    loop {
        rounds += 1;
        let mut worst: Vec<(usize, usize)> = (0..inv.containers.len())
            .filter(|i| {
                !unresolved
                    .iter()
                    .any(|u: &String| u.starts_with(&format!("{} ", inv.containers[*i].id)))
            })
            .map(|i| (layout.conflicts_in(i, layout.at[i]).0, i))
            .filter(|(s, _)| *s > 0)
            .collect();
        if worst.is_empty() || rounds > 4 * inv.containers.len() + 10 {
            break;
        }
        worst.sort_by(|a, b| b.0.cmp(&a.0).then(a.1.cmp(&b.1)));
        let i = worst[0].1;
        match layout.best_tray(i) {
            Some((t, (0, _))) => {
                layout.move_to(i, t);
            }
            _ => unresolved.push(format!(
                "{} (no tray with a free place where it meets nothing it must not)",
                inv.containers[i].id
            )),
        }
    }
    // Then reviews, one improving move at a time.
    for _ in 0..inv.containers.len() {
        let mut best: Option<(usize, usize, usize)> = None;
        for i in 0..inv.containers.len() {
            let (s_here, r_here) = layout.conflicts_in(i, layout.at[i]);
            if r_here == 0 || s_here > 0 {
                continue;
            }
            if let Some((t, (0, r))) = layout.best_tray(i) {
                let gain = r_here - r.min(r_here);
                if r < r_here && best.is_none_or(|b| gain > b.2) {
                    best = Some((i, t, gain));
                }
            }
        }
        match best {
            Some((i, t, _)) => {
                layout.move_to(i, t);
            }
            None => break,
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
    let note = if complete {
        format!("Every stop pair is removed with {} moves.", moves.len())
    } else {
        format!(
            "{stops_after} stop pairs remain: there is no free place that keeps them apart. Add trays or cabinets, or remove containers."
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
    }
}
