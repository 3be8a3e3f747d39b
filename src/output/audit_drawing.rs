//! The audit page's drawings, as inline SVG built with the `svg` crate: the pair matrix of
//! a cabinet, its key, the bar chart of stop and review pairs per cabinet, and each cabinet
//! a suggested move touches drawn before and after the moves. Layout only, from the
//! report's fields.
//!
//! Every matrix cell carries `data-i`, `data-j`, `data-severity` and `data-level`, every
//! key swatch `data-class`, every container chip `data-id` and `data-state`, so a test can
//! check the picture against the report.

use crate::output::plot::bars::{hatch_lines, BarClass, BarRow, Bars, Fill};
use crate::output::plot::shapes::{line, round, text, INK};
use crate::report::Severity;
use crate::store::report::{AuditReport, CabinetMatrix, Level, MatrixCell};
use crate::store::report::{CabinetChange, Move, ZoneContents};
use svg::node::element::{Element, Group, Line, Polygon, Rectangle, Title};
use svg::node::Node;

/// Width of the key and the bar chart, px: within the page's text column.
const WIDTH: f64 = 660.0;
/// Side of a matrix cell, px.
pub const CELL: f64 = 28.0;
const FONT: f64 = 12.0;
/// Width of a character of the 12 px sans-serif labels, generously.
const CHAR: f64 = 7.2;

/// Fill colour of a stop or review cell: graded by how far past its level the pair goes.
pub fn cell_colour(s: Severity, ratio: f64) -> String {
    let (light, _) = lightness(s, ratio);
    match s {
        Severity::Stop => format!("hsl(0, 75%, {light:.0}%)"),
        Severity::Review => format!("hsl(42, 90%, {light:.0}%)"),
        _ => "#ffffff".into(),
    }
}

/// Lightness of a cell's fill, and whether its letter is written white.
fn lightness(s: Severity, ratio: f64) -> (f64, bool) {
    // 0 at the review level, 1 at a hundredfold.
    let t = if ratio > 1.0 {
        (ratio.log10() / 2.0).clamp(0.0, 1.0)
    } else {
        0.0
    };
    match s {
        Severity::Stop => {
            let l = 62.0 - 24.0 * t;
            (l, l < 52.0)
        }
        Severity::Review => (78.0 - 14.0 * t, false),
        _ => (100.0, false),
    }
}

/// A ratio in words: 1.4×, 53×, 1,362×.
pub fn times(r: f64) -> String {
    if !r.is_finite() {
        return "far past".into();
    }
    if r < 10.0 {
        return format!("{r:.1}×");
    }
    let digits = format!("{r:.0}");
    let mut out = String::new();
    for (k, ch) in digits.chars().enumerate() {
        if k > 0 && (digits.len() - k) % 3 == 0 {
            out.push(',');
        }
        out.push(ch);
    }
    out + "×"
}

/// What a cell stands for: its key in the legend, and how it is drawn.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Kind {
    Finding(Severity, Level, f64),
    Clear,
    /// A container against itself.
    Itself,
    /// Two containers that are not paired (different spill zones, cabinet pairs off).
    Apart,
}

impl Kind {
    fn severity_word(self) -> &'static str {
        match self {
            Kind::Finding(s, _, _) => s.word(),
            Kind::Clear => "clear",
            Kind::Itself => "itself",
            Kind::Apart => "not-paired",
        }
    }
    fn fill(self) -> String {
        match self {
            Kind::Finding(s, _, r) => cell_colour(s, r),
            Kind::Clear => "#ffffff".into(),
            Kind::Itself => "#9e9e9e".into(),
            Kind::Apart => "#ececec".into(),
        }
    }
}

/// A cell (or a key swatch) at (x, y): the rectangle that carries the data and the
/// caption, and what is drawn over it (hatch, letter), or None. Both take their stroke
/// from the group they are put in ([`cells_group`], [`overlay_group`]).
fn cell_shapes(x: f64, y: f64, side: f64, kind: Kind) -> (Rectangle, Option<Group>) {
    let rect = Rectangle::new()
        .set("x", round(x))
        .set("y", round(y))
        .set("width", side)
        .set("height", side)
        .set("fill", kind.fill())
        .set("data-severity", kind.severity_word());
    let mut over = Group::new();
    match kind {
        Kind::Finding(s, level, ratio) => {
            let (_, white) = lightness(s, ratio);
            if white {
                // Dark lines would sink into a dark fill.
                over = over.set("stroke", "#ffffff");
            }
            if level == Level::Cabinet {
                for (x1, y1, x2, y2) in hatch_lines(x, y, side, side, 7.0) {
                    over = over.add(
                        Line::new()
                            .set("x1", round(x1))
                            .set("y1", round(y1))
                            .set("x2", round(x2))
                            .set("y2", round(y2)),
                    );
                }
            }
            let letter = if s == Severity::Stop { "S" } else { "R" };
            // A letter on a small plate, so the hatch never crosses it.
            if level == Level::Cabinet {
                over = over.add(
                    Rectangle::new()
                        .set("x", round(x + side / 2.0 - 6.5))
                        .set("y", round(y + side / 2.0 - 7.5))
                        .set("width", 13)
                        .set("height", 15)
                        .set("stroke", "none")
                        .set("fill", kind.fill()),
                );
            }
            over = over.add(
                text(x + side / 2.0, y + side / 2.0 + 4.5, letter, "middle")
                    .set("stroke", "none")
                    .set("font-weight", "bold")
                    .set("fill", if white { "#ffffff" } else { INK }),
            );
        }
        Kind::Apart => {
            over = over.add(line(
                x + side * 0.3,
                y + side / 2.0,
                x + side * 0.7,
                y + side / 2.0,
                "#777",
                1.2,
            ));
        }
        Kind::Clear | Kind::Itself => return (rect, None),
    }
    (rect, Some(over))
}

/// The group cells are drawn in: their outline.
fn cells_group() -> Group {
    Group::new()
        .set("stroke", "#8a8a8a")
        .set("stroke-width", 0.6)
}

/// The group drawn over the cells: hatch lines, which take no pointer events, so a cell's
/// caption shows wherever it is pointed at.
fn overlay_group() -> Group {
    Group::new()
        .set("pointer-events", "none")
        .set("stroke", INK)
        .set("stroke-width", 0.9)
}

/// A spill zone's name within its cabinet: "Tray 1"; a container standing in the cabinet
/// itself, "no tray".
pub fn short_zone(cabinet: &str, zone: &str) -> String {
    if zone == cabinet {
        return "no tray".into();
    }
    if let Some(rest) = zone
        .strip_prefix(cabinet)
        .and_then(|r| r.strip_prefix(" / "))
    {
        return rest.to_string();
    }
    let n = zone.chars().count();
    if n > 28 {
        format!("…{}", zone.chars().skip(n - 27).collect::<String>())
    } else {
        zone.to_string()
    }
}

/// The caption of the cell of containers i and j.
fn caption(
    m: &CabinetMatrix,
    i: usize,
    j: usize,
    cell: Option<&MatrixCell>,
    apart: bool,
) -> String {
    let (a, b) = (&m.ids[i], &m.ids[j]);
    if i == j {
        return format!("{a}: the container itself");
    }
    if apart {
        return format!(
            "{a} × {b}: not paired (different spill zones; pairs across spill zones were not checked)"
        );
    }
    let same = |level: Level| match level {
        Level::Tray => "same spill zone",
        Level::Cabinet => "same cabinet",
    };
    match cell {
        Some(c) => {
            let why = match &c.gas {
                Some(g) => format!("{g} at {} its review level", times(c.worst_ratio)),
                None if !c.codes.is_empty() => format!("by rule {}", c.codes.join(", ")),
                None => format!("at {} its review level", times(c.worst_ratio)),
            };
            format!(
                "{a} × {b}: {} ({}): {why}",
                c.severity.word(),
                same(c.level)
            )
        }
        None => {
            let level = if m.zones.get(i) == m.zones.get(j) {
                Level::Tray
            } else {
                Level::Cabinet
            };
            format!("{a} × {b}: clear ({})", same(level))
        }
    }
}

/// Past this many containers a matrix names them on the far sides too.
const REPEAT_LABELS: usize = 16;

/// Most containers a matrix draws whole: a larger cabinet's matrix holds only the
/// containers in a pair past a review level, so that a page for a large store stays small
/// enough for a browser.
pub const MATRIX_MAX: usize = 80;

/// The matrix as drawn: whole, or past [`MATRIX_MAX`] containers only those in a pair that
/// is not clear (in the same order).
pub fn drawn_matrix(m: &CabinetMatrix) -> std::borrow::Cow<'_, CabinetMatrix> {
    use std::borrow::Cow;
    if m.ids.len() <= MATRIX_MAX {
        return Cow::Borrowed(m);
    }
    let keep: std::collections::BTreeSet<usize> = m.cells.iter().flat_map(|c| [c.i, c.j]).collect();
    let at: std::collections::HashMap<usize, usize> = keep
        .iter()
        .enumerate()
        .map(|(new, &old)| (old, new))
        .collect();
    Cow::Owned(CabinetMatrix {
        cabinet: m.cabinet.clone(),
        ids: keep.iter().map(|&k| m.ids[k].clone()).collect(),
        zones: keep.iter().map(|&k| m.zones[k].clone()).collect(),
        apart: m
            .apart
            .iter()
            .filter_map(|p| Some([*at.get(&p[0])?, *at.get(&p[1])?]))
            .collect(),
        cells: m
            .cells
            .iter()
            .map(|c| MatrixCell {
                i: at[&c.i],
                j: at[&c.j],
                ..c.clone()
            })
            .collect(),
    })
}

/// The pair matrix of one cabinet: every container on both axes, grouped by spill zone
/// (each zone's block outlined on the diagonal and named on the left).
pub fn matrix_svg(m: &CabinetMatrix) -> String {
    let n = m.ids.len();
    let id_w = CHAR * m.ids.iter().map(|s| s.chars().count()).max().unwrap_or(4) as f64 + 10.0;
    let short: Vec<String> = m.zones.iter().map(|z| short_zone(&m.cabinet, z)).collect();
    let zone_w = CHAR * short.iter().map(|s| s.chars().count()).max().unwrap_or(4) as f64 + 16.0;
    let (gx, gy) = (zone_w + id_w, id_w + 8.0);
    // A large matrix names its containers on all four sides, so that a row or column
    // stays named wherever the page is scrolled to.
    let repeat = n > REPEAT_LABELS;
    let far = if repeat { id_w } else { 0.0 };
    let (width, height) = (
        gx + CELL * n as f64 + 8.0 + far,
        gy + CELL * n as f64 + 8.0 + far,
    );
    let mut doc = root(width, height, "matrix");
    doc.assign("aria-label", format!("pair matrix of {}", m.cabinet));
    doc.append(Title::new(format!("Pairs of {}", m.cabinet)));
    let blocks = zone_blocks(&m.zones);
    label_ids(&mut doc, m, gx, gy, repeat);
    for &(start, end) in &blocks {
        let (y0, y1) = (gy + CELL * start as f64, gy + CELL * end as f64);
        doc.append(line(
            zone_w - 6.0,
            y0 + 2.0,
            zone_w - 6.0,
            y1 - 2.0,
            "#555",
            1.5,
        ));
        doc.append(
            text(zone_w - 11.0, (y0 + y1) / 2.0 + 4.0, &short[start], "end")
                .set("class", "zone")
                .set("font-style", "italic"),
        );
    }
    let (cells, overlays) = cell_grid(m, gx, gy);
    doc.append(cells);
    doc.append(overlays);
    // Each spill zone's own block outlined: the pairs inside it share the zone.
    for &(start, end) in &blocks {
        let (p, s) = (CELL * start as f64, CELL * (end - start) as f64);
        doc.append(
            Rectangle::new()
                .set("x", round(gx + p))
                .set("y", round(gy + p))
                .set("width", s)
                .set("height", s)
                .set("fill", "none")
                .set("stroke", INK)
                .set("stroke-width", 2.2)
                .set("class", "zone-block")
                .set("pointer-events", "none"),
        );
    }
    doc.to_string()
}

/// The spill zones of a matrix as runs of equal zones, (first, past the last) position.
fn zone_blocks(zones: &[String]) -> Vec<(usize, usize)> {
    let mut blocks: Vec<(usize, usize)> = Vec::new();
    for k in 0..zones.len() {
        match blocks.last_mut() {
            Some((_, end)) if zones[*end - 1] == zones[k] => *end = k + 1,
            _ => blocks.push((k, k + 1)),
        }
    }
    blocks
}

/// Each container's id beside its row and over its column (and, on a large matrix, again
/// on the far sides).
fn label_ids(doc: &mut Element, m: &CabinetMatrix, gx: f64, gy: f64, repeat: bool) {
    let n = m.ids.len();
    for (k, id) in m.ids.iter().enumerate() {
        let y = gy + CELL * k as f64 + CELL / 2.0 + 4.0;
        doc.append(text(gx - 5.0, y, id, "end").set("class", "row-id"));
        let x = gx + CELL * k as f64 + CELL / 2.0 + 4.0;
        doc.append(
            text(x, gy - 5.0, id, "start")
                .set("class", "column-id")
                .set(
                    "transform",
                    format!("rotate(-90 {} {})", round(x), round(gy - 5.0)),
                ),
        );
        if repeat {
            let edge = gx + CELL * n as f64 + 5.0;
            doc.append(text(edge, y, id, "start").set("class", "row-id-again"));
            let bottom = gy + CELL * n as f64 + 5.0;
            doc.append(
                text(x, bottom, id, "end")
                    .set("class", "column-id-again")
                    .set(
                        "transform",
                        format!("rotate(-90 {} {})", round(x), round(bottom)),
                    ),
            );
        }
    }
}

/// Every cell of the matrix, with its caption and data, and the marks drawn over the cells.
fn cell_grid(m: &CabinetMatrix, gx: f64, gy: f64) -> (Group, Group) {
    let n = m.ids.len();
    let mut finding: std::collections::HashMap<(usize, usize), &MatrixCell> = Default::default();
    for c in &m.cells {
        finding.insert((c.i.min(c.j), c.i.max(c.j)), c);
    }
    let apart: std::collections::HashSet<(usize, usize)> = m
        .apart
        .iter()
        .map(|p| (p[0].min(p[1]), p[0].max(p[1])))
        .collect();
    let mut cells = cells_group();
    let mut overlays = overlay_group();
    for i in 0..n {
        for j in 0..n {
            let key = (i.min(j), i.max(j));
            let cell = finding.get(&key).copied();
            let is_apart = apart.contains(&key);
            let kind = if i == j {
                Kind::Itself
            } else if let Some(c) = cell {
                Kind::Finding(c.severity, c.level, c.worst_ratio)
            } else if is_apart {
                Kind::Apart
            } else {
                Kind::Clear
            };
            let (x, y) = (gx + CELL * j as f64, gy + CELL * i as f64);
            let (mut rect, over) = cell_shapes(x, y, CELL, kind);
            rect.assign("class", "cell");
            rect.assign("data-i", i);
            rect.assign("data-j", j);
            if let Some(c) = cell {
                rect.assign("data-level", format!("{:?}", c.level).to_lowercase());
                rect.assign("data-ratio", c.worst_ratio);
                if let Some(g) = &c.gas {
                    rect.assign("data-gas", g.clone());
                }
            }
            rect.append(Title::new(caption(m, i, j, cell, is_apart)));
            cells = cells.add(rect);
            if let Some(o) = over {
                overlays = overlays.add(o);
            }
        }
    }
    (cells, overlays)
}

/// The key to the matrices: a swatch for every kind of cell, drawn as the cells are, and
/// the shades of stop and review.
pub fn legend_svg(any_apart: bool) -> String {
    let mut items: Vec<(&str, Kind, &str)> = vec![
        (
            "stop-zone",
            Kind::Finding(Severity::Stop, Level::Tray, 10.0),
            "stop: the two share a spill zone",
        ),
        (
            "stop-cabinet",
            Kind::Finding(Severity::Stop, Level::Cabinet, 10.0),
            "stop: same cabinet, different spill zones (hatched)",
        ),
        (
            "review-zone",
            Kind::Finding(Severity::Review, Level::Tray, 10.0),
            "review: the two share a spill zone",
        ),
        (
            "review-cabinet",
            Kind::Finding(Severity::Review, Level::Cabinet, 10.0),
            "review: same cabinet, different spill zones (hatched)",
        ),
        (
            "clear",
            Kind::Clear,
            "clear: nothing reaches a review level",
        ),
        ("itself", Kind::Itself, "a container against itself"),
    ];
    if any_apart {
        items.push((
            "not-paired",
            Kind::Apart,
            "not paired: different spill zones, not checked",
        ));
    }
    let side = 24.0;
    let row = side + 8.0;
    let rows = items.len();
    let ramp_y = 8.0 + rows as f64 * row + 6.0;
    let (width, height) = (WIDTH, ramp_y + 2.0 * row + 8.0);
    let mut doc = root(width, height, "legend");
    doc.assign("aria-label", "key to the pair matrices");
    doc.append(Title::new("Key to the pair matrices"));
    for (k, (id, kind, words)) in items.iter().enumerate() {
        let (x, y) = (8.0, 8.0 + row * k as f64);
        let (rect, over) = cell_shapes(x, y, side, *kind);
        let mut g = Group::new()
            .set("class", "swatch")
            .set("data-class", *id)
            .add(cells_group().add(rect));
        if let Some(o) = over {
            g = g.add(overlay_group().add(o));
        }
        doc.append(g);
        doc.append(text(x + side + 8.0, y + side / 2.0 + 4.0, words, "start"));
    }
    // Darker is further past the level: three shades of each.
    for (r, s) in [Severity::Stop, Severity::Review].into_iter().enumerate() {
        let y = ramp_y + row * r as f64;
        let mut x = 8.0;
        for (ratio, label) in [(1.0, "1×"), (10.0, "10×"), (100.0, "100×+")] {
            let (rect, over) = cell_shapes(x, y, side, Kind::Finding(s, Level::Tray, ratio));
            let mut g = Group::new()
                .set("class", "shade")
                .set("data-class", s.word())
                .set("data-ratio", ratio)
                .add(cells_group().add(rect));
            if let Some(o) = over {
                g = g.add(overlay_group().add(o));
            }
            doc.append(g);
            doc.append(text(x + side + 4.0, y + side / 2.0 + 4.0, label, "start"));
            x += side + 50.0;
        }
        doc.append(text(
            x + 6.0,
            y + side / 2.0 + 4.0,
            &format!("{}: darker is further past the review level", s.word()),
            "start",
        ));
    }
    doc.to_string()
}

/// Stop and review pairs per cabinet with a finding, as horizontal bars.
pub fn pairs_chart(r: &AuditReport) -> String {
    let count = |m: &CabinetMatrix, s: Severity| m.cells.iter().filter(|c| c.severity == s).count();
    Bars {
        title: "Pairs to stop and to review, per cabinet".into(),
        width: WIDTH,
        classes: vec![
            BarClass {
                id: "stop".into(),
                label: "stop".into(),
                colour: cell_colour(Severity::Stop, 10.0),
                fill: Fill::Solid,
            },
            BarClass {
                id: "review".into(),
                label: "review".into(),
                colour: cell_colour(Severity::Review, 10.0),
                fill: Fill::Hatch,
            },
        ],
        rows: r
            .cabinets
            .iter()
            .map(|m| BarRow {
                label: m.cabinet.clone(),
                values: vec![
                    count(m, Severity::Stop) as f64,
                    count(m, Severity::Review) as f64,
                ],
            })
            .collect(),
    }
    .svg()
}

const CHIP_H: f64 = 24.0;
const CHIP_GAP: f64 = 6.0;
const PANEL_W: f64 = 310.0;
const MIDDLE: f64 = 44.0;
/// Most free places drawn in a spill zone; more are counted in its header.
const FREE_SHOWN: usize = 6;

/// How a container stands in a before-or-after drawing.
#[derive(Debug, Clone, Copy, PartialEq)]
enum ChipState {
    Stays,
    Leaves,
    Arrives,
    Free,
}

fn chip_width(c: &CabinetChange) -> f64 {
    let longest = c
        .before
        .iter()
        .chain(&c.after)
        .flat_map(|z| z.ids.iter())
        .map(|id| id.chars().count())
        .max()
        .unwrap_or(4);
    // Room for the id in bold and the arrow of a container that leaves.
    (CHAR * 1.1 * (longest + 2) as f64 + 14.0).max(56.0)
}

fn chips_per_row(chip_w: f64) -> usize {
    (((PANEL_W - 16.0 + CHIP_GAP) / (chip_w + CHIP_GAP)).floor() as usize).max(1)
}

fn zone_height(z: &ZoneContents, per_row: usize) -> f64 {
    let free = z.capacity.saturating_sub(z.ids.len()).min(FREE_SHOWN);
    let chips = (z.ids.len() + free).max(1);
    24.0 + chips.div_ceil(per_row) as f64 * (CHIP_H + CHIP_GAP) + 4.0
}

/// One side of the drawing: the spill zones of the cabinet as boxes holding chips.
fn panel(
    c: &CabinetChange,
    zones: &[ZoneContents],
    after: bool,
    moves: &[Move],
    x0: f64,
    chip_w: f64,
) -> Group {
    let per_row = chips_per_row(chip_w);
    let (stops, reviews) = if after {
        (c.stop_pairs_after, c.review_pairs_after)
    } else {
        (c.stop_pairs_before, c.review_pairs_before)
    };
    let stage = if after { "after" } else { "before" };
    let mut g = Group::new()
        .set("class", "stage")
        .set("data-stage", stage)
        .set("data-stop", stops)
        .set("data-review", reviews)
        .add(
            text(x0, 18.0, if after { "After" } else { "Before" }, "start")
                .set("font-weight", "bold")
                .set("font-size", 14),
        )
        .add(
            text(
                x0 + PANEL_W - 8.0,
                18.0,
                &format!("{stops} stop, {reviews} review pairs"),
                "end",
            )
            .set("class", "pair-counts"),
        );
    let mut y = 30.0;
    for z in zones {
        let h = zone_height(z, per_row);
        let free = z.capacity.saturating_sub(z.ids.len());
        g = g
            .add(
                Rectangle::new()
                    .set("x", round(x0))
                    .set("y", round(y))
                    .set("width", PANEL_W - 8.0)
                    .set("height", round(h))
                    .set("fill", "#f6f6f6")
                    .set("stroke", "#666")
                    .set("rx", 4),
            )
            .add(text(
                x0 + 8.0,
                y + 16.0,
                &format!(
                    "{} ({} of {} places used)",
                    short_zone(&c.cabinet, &z.zone),
                    z.ids.len(),
                    z.capacity
                ),
                "start",
            ));
        let chips = zone_chips(z, after, moves, free);
        for (k, (id, state, title)) in chips.iter().enumerate() {
            let cx = x0 + 8.0 + (k % per_row) as f64 * (chip_w + CHIP_GAP);
            let cy = y + 24.0 + (k / per_row) as f64 * (CHIP_H + CHIP_GAP);
            g = g.add(chip(cx, cy, chip_w, id, *state, title, &z.zone));
        }
        y += h + 8.0;
    }
    g
}

/// The chips of one spill zone: each container (staying, leaving or arriving, with what it
/// says on hover) and up to `FREE_SHOWN` free places.
fn zone_chips(
    z: &ZoneContents,
    after: bool,
    moves: &[Move],
    free: usize,
) -> Vec<(String, ChipState, String)> {
    let mut chips: Vec<(String, ChipState, String)> = z
        .ids
        .iter()
        .map(|id| {
            let arriving = moves.iter().find(|m| &m.id == id && m.to == z.zone);
            match arriving {
                Some(m) if after => (
                    id.clone(),
                    ChipState::Arrives,
                    format!("{id} arrives from {}", m.from),
                ),
                _ => (id.clone(), ChipState::Stays, format!("{id} stays")),
            }
        })
        .collect();
    if !after {
        for ch in &mut chips {
            if let Some(m) = moves.iter().find(|m| m.id == ch.0 && m.from == z.zone) {
                ch.1 = ChipState::Leaves;
                ch.2 = format!("{} leaves for {}", ch.0, m.to);
            }
        }
    }
    for _ in 0..free.min(FREE_SHOWN) {
        chips.push((String::new(), ChipState::Free, "a free place".into()));
    }
    chips
}

/// The key to the chips, in a row at `y`: leaving, arriving, staying, a free place.
fn chip_key(doc: &mut Element, key_y: f64) {
    let mut x = 8.0;
    for (state, words) in [
        (ChipState::Leaves, "leaves its spill zone"),
        (ChipState::Arrives, "arrives"),
        (ChipState::Stays, "stays"),
        (ChipState::Free, "a free place"),
    ] {
        let sample = match state {
            ChipState::Free => "",
            _ => "ID",
        };
        let mut k = chip(x, key_y, 44.0, sample, state, words, "");
        k.assign("class", "chip-key");
        doc.append(k);
        doc.append(text(x + 50.0, key_y + CHIP_H / 2.0 + 4.0, words, "start"));
        x += 62.0 + CHAR * words.chars().count() as f64;
    }
}

fn chip(x: f64, y: f64, w: f64, id: &str, state: ChipState, title: &str, zone: &str) -> Group {
    let (fill, stroke, width, dash, ink) = match state {
        ChipState::Stays => ("#ffffff", "#555", 1.0, None, INK),
        ChipState::Leaves => ("#ffffff", INK, 2.0, Some("5 3"), INK),
        ChipState::Arrives => ("#1d4f91", "#0b2a55", 2.0, None, "#ffffff"),
        ChipState::Free => ("none", "#aaa", 1.0, Some("3 3"), INK),
    };
    let mut rect = Rectangle::new()
        .set("x", round(x))
        .set("y", round(y))
        .set("width", round(w))
        .set("height", CHIP_H)
        .set("rx", 5)
        .set("fill", fill)
        .set("stroke", stroke)
        .set("stroke-width", width);
    if let Some(d) = dash {
        rect = rect.set("stroke-dasharray", d);
    }
    let state_word = match state {
        ChipState::Stays => "stays",
        ChipState::Leaves => "leaves",
        ChipState::Arrives => "arrives",
        ChipState::Free => "free",
    };
    let mut g = Group::new()
        .set("class", "chip")
        .set("data-state", state_word)
        .set("data-zone", zone)
        .add(Title::new(title))
        .add(rect);
    if !id.is_empty() {
        g = g.set("data-id", id);
        let label = match state {
            ChipState::Leaves => format!("{id} →"),
            _ => id.to_string(),
        };
        g = g.add(
            text(x + w / 2.0, y + CHIP_H / 2.0 + 4.0, &label, "middle")
                .set("fill", ink)
                .set(
                    "font-weight",
                    if state == ChipState::Stays {
                        "normal"
                    } else {
                        "bold"
                    },
                ),
        );
    }
    g
}

/// The two ends of a move without the levels they share: ("Cabinet 1 / Tray 1",
/// "Cabinet 2 / Tray 1") in the same room.
fn move_ends(m: &Move) -> (String, String) {
    let from: Vec<&str> = m.from.split(" / ").collect();
    let to: Vec<&str> = m.to.split(" / ").collect();
    let shared = from.iter().zip(&to).take_while(|(a, b)| a == b).count();
    // Keep at least the last level of each.
    let k = shared.min(from.len() - 1).min(to.len() - 1);
    (from[k..].join(" / "), to[k..].join(" / "))
}

/// Words cut at the front to fit a width, with an ellipsis.
fn fit(words: &str, width: f64) -> String {
    let most = (width / (CHAR * 0.95)) as usize;
    let n = words.chars().count();
    if n <= most {
        words.to_string()
    } else {
        format!("…{}", words.chars().skip(n + 1 - most).collect::<String>())
    }
}

/// A cabinet that a move touches, before and after the moves, side by side.
pub fn moves_svg(c: &CabinetChange, moves: &[Move]) -> String {
    let mut doc_words: Vec<(f64, f64, String, &str)> = Vec::new();
    let chip_w = chip_width(c);
    let per_row = chips_per_row(chip_w);
    let zones_h = |zs: &[ZoneContents]| {
        zs.iter()
            .map(|z| zone_height(z, per_row) + 8.0)
            .sum::<f64>()
    };
    let body = zones_h(&c.before).max(zones_h(&c.after));
    // Where each container goes and comes from, in words (a printed page has no captions).
    let holds = |zs: &[ZoneContents], zone: &str| zs.iter().any(|z| z.zone == zone);
    let goes: Vec<String> = moves
        .iter()
        .filter(|m| holds(&c.before, &m.from))
        .map(|m| format!("{} goes to {}", m.id, move_ends(m).1))
        .collect();
    let comes: Vec<String> = moves
        .iter()
        .filter(|m| holds(&c.after, &m.to))
        .map(|m| format!("{} comes from {}", m.id, move_ends(m).0))
        .collect();
    let words_y = 30.0 + body + 6.0;
    for (k, w) in goes.iter().enumerate() {
        doc_words.push((8.0, words_y + 16.0 * k as f64, w.clone(), "goes"));
    }
    for (k, w) in comes.iter().enumerate() {
        doc_words.push((
            8.0 + PANEL_W + MIDDLE,
            words_y + 16.0 * k as f64,
            w.clone(),
            "comes",
        ));
    }
    let key_y = words_y + 16.0 * goes.len().max(comes.len()) as f64 + 14.0;
    let width = 8.0 + 2.0 * PANEL_W + MIDDLE;
    let height = key_y + CHIP_H + 10.0;
    let mut doc = root(width, height, "moves");
    doc.assign(
        "aria-label",
        format!("{} before and after the moves", c.cabinet),
    );
    doc.assign("data-cabinet", c.cabinet.clone());
    doc.append(Title::new(format!(
        "{}: before and after the moves",
        c.cabinet
    )));
    doc.append(panel(c, &c.before, false, moves, 8.0, chip_w));
    let right = 8.0 + PANEL_W + MIDDLE;
    doc.append(panel(c, &c.after, true, moves, right, chip_w));
    for (x, y, w, class) in doc_words {
        doc.append(text(x, y + 12.0, &fit(&w, PANEL_W - 8.0), "start").set("class", class));
    }
    // An arrow from before to after.
    let (ax, ay) = (8.0 + PANEL_W + 2.0, 30.0 + body / 2.0);
    doc.append(line(ax, ay, ax + MIDDLE - 18.0, ay, INK, 2.0));
    doc.append(
        Polygon::new()
            .set(
                "points",
                format!(
                    "{},{} {},{} {},{}",
                    round(ax + MIDDLE - 8.0),
                    round(ay),
                    round(ax + MIDDLE - 20.0),
                    round(ay - 6.0),
                    round(ax + MIDDLE - 20.0),
                    round(ay + 6.0)
                ),
            )
            .set("fill", INK),
    );
    chip_key(&mut doc, key_y);
    doc.to_string()
}

/// An `<svg>` root with no namespace attribute (inline in HTML5 it needs none).
fn root(width: f64, height: f64, class: &str) -> Element {
    let mut doc = Element::new("svg");
    for (k, v) in [
        ("viewBox", format!("0 0 {} {}", round(width), round(height))),
        ("width", round(width).to_string()),
        ("height", round(height).to_string()),
        ("role", "img".into()),
        ("class", class.into()),
        ("font-family", "sans-serif".into()),
        ("font-size", FONT.to_string()),
    ] {
        doc.assign(k, v);
    }
    doc
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ratios_read_in_words() {
        assert_eq!(times(1.44), "1.4×");
        assert_eq!(times(53.2), "53×");
        assert_eq!(times(456173.9), "456,174×");
    }

    #[test]
    fn a_large_cabinet_draws_only_its_containers_in_pairs() {
        let n = MATRIX_MAX + 20;
        let m = CabinetMatrix {
            cabinet: "C".into(),
            ids: (0..n).map(|k| format!("X{k:03}")).collect(),
            zones: (0..n).map(|k| format!("C / T{}", k / 10)).collect(),
            apart: vec![],
            cells: vec![MatrixCell {
                i: 90,
                j: 7,
                severity: Severity::Stop,
                level: Level::Cabinet,
                worst_ratio: 12.0,
                gas: Some("HCN".into()),
                codes: vec![],
            }],
        };
        let d = drawn_matrix(&m);
        assert_eq!(d.ids, ["X007", "X090"]);
        assert_eq!(d.zones, ["C / T0", "C / T9"]);
        assert_eq!((d.cells[0].i, d.cells[0].j), (1, 0));
        let small = CabinetMatrix {
            ids: m.ids[..MATRIX_MAX].to_vec(),
            zones: m.zones[..MATRIX_MAX].to_vec(),
            cells: vec![],
            ..m.clone()
        };
        assert_eq!(drawn_matrix(&small).ids.len(), MATRIX_MAX);
    }

    #[test]
    fn a_move_is_named_by_the_levels_it_changes() {
        let m = Move {
            id: "X".into(),
            from: "B / R / Cabinet 1 / Tray 1".into(),
            to: "B / R / Cabinet 2 / Tray 1".into(),
        };
        assert_eq!(
            move_ends(&m),
            ("Cabinet 1 / Tray 1".into(), "Cabinet 2 / Tray 1".into())
        );
        let m = Move {
            to: "B / R / Cabinet 1 / Tray 2".into(),
            ..m
        };
        assert_eq!(move_ends(&m), ("Tray 1".into(), "Tray 2".into()));
    }

    #[test]
    fn zones_are_named_within_their_cabinet() {
        assert_eq!(short_zone("A / C1", "A / C1 / Tray 2"), "Tray 2");
        assert_eq!(short_zone("A / C1", "A / C1"), "no tray");
        assert_eq!(short_zone("A / C1", "B / C9"), "B / C9");
    }
}
