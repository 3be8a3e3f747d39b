//! Line charts as inline SVG: linear or logarithmic axes, series told apart by line style,
//! marker shape and a label at the line's end as well as by colour, horizontal levels
//! (review and stop lines) and marked points.
//!
//! Built with the `svg` crate, which escapes every attribute and text; the layout (axes,
//! ticks, labels) is ours. Every drawn point carries `data-x` and `data-y` with the values
//! it was given, unrounded.

use super::shapes::{line, round, text, INK};
use svg::node::element::Element;
use svg::node::element::{Circle, Group, Path, Polygon, Rectangle, Title};
use svg::node::Node;

/// One axis: its range, whether it is logarithmic, and how its tick labels read.
#[derive(Debug, Clone)]
pub struct Axis {
    pub label: String,
    pub lo: f64,
    pub hi: f64,
    pub log: bool,
    /// Tick labels show the value times this (100 for a share shown in %).
    pub display_factor: f64,
    /// Appended to each tick label ("%").
    pub unit_suffix: &'static str,
}

impl Axis {
    pub fn linear(label: &str, lo: f64, hi: f64) -> Axis {
        Axis {
            label: label.into(),
            lo,
            hi: if hi > lo { hi } else { lo + 1.0 },
            log: false,
            display_factor: 1.0,
            unit_suffix: "",
        }
    }
    pub fn log(label: &str, lo: f64, hi: f64) -> Axis {
        let lo = lo.max(f64::MIN_POSITIVE);
        Axis {
            label: label.into(),
            lo,
            hi: if hi > lo * 1.0001 { hi } else { lo * 10.0 },
            log: true,
            display_factor: 1.0,
            unit_suffix: "",
        }
    }
    /// A share from 0 to 1, labelled in per cent.
    pub fn share(label: &str) -> Axis {
        Axis {
            display_factor: 100.0,
            unit_suffix: " %",
            ..Axis::linear(label, 0.0, 1.0)
        }
    }
    /// Where `v` falls, 0 at `lo` and 1 at `hi`, held to the axis.
    fn position(&self, v: f64) -> f64 {
        let t = if self.log {
            let v = v.max(self.lo);
            (v.ln() - self.lo.ln()) / (self.hi.ln() - self.lo.ln())
        } else {
            (v - self.lo) / (self.hi - self.lo)
        };
        if t.is_finite() {
            t.clamp(0.0, 1.0)
        } else {
            0.0
        }
    }
    /// Tick values: each power of ten on a log axis (every other one past eight), steps of
    /// 1, 2 or 5 times a power of ten on a linear one.
    fn ticks(&self) -> Vec<f64> {
        if self.log {
            let (a, b) = (
                self.lo.log10().ceil() as i32,
                self.hi.log10().floor() as i32,
            );
            let stride = if b - a > 8 { 2 } else { 1 };
            (a..=b).step_by(stride).map(|k| 10f64.powi(k)).collect()
        } else {
            let raw = (self.hi - self.lo) / 6.0;
            let mag = 10f64.powf(raw.log10().floor());
            let step = [1.0, 2.0, 5.0, 10.0]
                .iter()
                .map(|m| m * mag)
                .find(|s| *s >= raw)
                .unwrap_or(10.0 * mag);
            let first = (self.lo / step).ceil() as i64;
            let last = (self.hi / step + 1e-9).floor() as i64;
            (first..=last).map(|k| k as f64 * step).collect()
        }
    }
    fn tick_label(&self, v: f64) -> String {
        format!(
            "{}{}",
            short_number(v * self.display_factor),
            self.unit_suffix
        )
    }
}

/// A number in few characters: 0.001, 0.5, 12, 3000, 1e+06.
pub fn short_number(v: f64) -> String {
    let a = v.abs();
    if v == 0.0 {
        "0".into()
    } else if !(1e-3..1e5).contains(&a) {
        format!("{v:.0e}")
    } else if a >= 100.0 || v.fract() == 0.0 {
        format!("{v:.0}")
    } else {
        let s = if a >= 10.0 {
            format!("{v:.1}")
        } else {
            format!("{v:.3}")
        };
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Dash {
    Solid,
    Dashed,
    Dotted,
}

impl Dash {
    fn pattern(self) -> Option<&'static str> {
        match self {
            Dash::Solid => None,
            Dash::Dashed => Some("7 4"),
            Dash::Dotted => Some("2 3"),
        }
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Marker {
    Circle,
    Square,
    Triangle,
}

/// One line: its points, how it is drawn, and its label.
#[derive(Debug, Clone)]
pub struct Series {
    /// Written into `data-series`, for tests and readers of the source.
    pub id: String,
    pub label: String,
    pub points: Vec<(f64, f64)>,
    pub dash: Dash,
    pub marker: Marker,
    pub colour: &'static str,
}

/// A horizontal line at a level (a review or stop level), labelled at its right end.
#[derive(Debug, Clone)]
pub struct Level {
    pub y: f64,
    pub label: String,
}

/// A point singled out (the worst point of a pour), ringed and labelled.
#[derive(Debug, Clone)]
pub struct Callout {
    /// Written into `class` as `callout {kind}`.
    pub kind: String,
    pub x: f64,
    pub y: f64,
    pub label: String,
}

/// A line chart.
#[derive(Debug, Clone)]
pub struct Chart {
    pub title: String,
    pub width: f64,
    pub height: f64,
    pub x: Axis,
    pub y: Axis,
    pub series: Vec<Series>,
    pub levels: Vec<Level>,
    pub callouts: Vec<Callout>,
}

const LEFT: f64 = 62.0;
const RIGHT: f64 = 118.0;
const TOP: f64 = 46.0;
const BOTTOM: f64 = 44.0;
const GRID: &str = "#d8d8d8";

/// Two colours that stay apart in grey as well (dark blue, light orange).
pub const COLOURS: [&str; 2] = ["#1d4f91", "#c8650a"];

impl Chart {
    fn plot_width(&self) -> f64 {
        self.width - LEFT - RIGHT
    }
    fn plot_height(&self) -> f64 {
        self.height - TOP - BOTTOM
    }
    fn px(&self, x: f64) -> f64 {
        LEFT + self.x.position(x) * self.plot_width()
    }
    fn py(&self, y: f64) -> f64 {
        TOP + (1.0 - self.y.position(y)) * self.plot_height()
    }

    /// The chart as an `<svg>` element, to be placed inline in a page.
    pub fn svg(&self) -> String {
        // Inline in HTML5 an <svg> needs no namespace attribute, and the page names nothing
        // outside itself; the crate's document element always writes one, so the root is
        // built as a plain element.
        let mut doc = Element::new("svg");
        for (k, v) in [
            ("viewBox", format!("0 0 {} {}", self.width, self.height)),
            ("width", self.width.to_string()),
            ("height", self.height.to_string()),
            ("role", "img".into()),
            ("class", "chart".into()),
            ("font-family", "sans-serif".into()),
            ("font-size", "12".into()),
        ] {
            doc.assign(k, v);
        }
        doc.append(Title::new(self.title.clone()));
        doc.append(text(LEFT, 16.0, &self.title, "start").set("font-weight", "bold"));
        doc.append(self.axes());
        for level in &self.levels {
            doc.append(self.level(level));
        }
        for (i, s) in self.series.iter().enumerate() {
            doc.append(self.series_group(s, i));
        }
        for c in &self.callouts {
            doc.append(self.callout(c));
        }
        doc.to_string()
    }

    fn axes(&self) -> Group {
        let (x0, x1) = (LEFT, LEFT + self.plot_width());
        let (y0, y1) = (TOP + self.plot_height(), TOP);
        let mut g = Group::new().set("class", "axes");
        for t in self.y.ticks() {
            let y = self.py(t);
            g = g.add(line(x0, y, x1, y, GRID, 1.0)).add(text(
                x0 - 6.0,
                y + 4.0,
                &self.y.tick_label(t),
                "end",
            ));
        }
        for t in self.x.ticks() {
            let x = self.px(t);
            g = g.add(line(x, y0, x, y1, GRID, 1.0)).add(text(
                x,
                y0 + 16.0,
                &self.x.tick_label(t),
                "middle",
            ));
        }
        g = g.add(
            Rectangle::new()
                .set("x", x0)
                .set("y", y1)
                .set("width", self.plot_width())
                .set("height", self.plot_height())
                .set("fill", "none")
                .set("stroke", INK),
        );
        g.add(text(
            (x0 + x1) / 2.0,
            self.height - 8.0,
            &self.x.label,
            "middle",
        ))
        .add(text(14.0, (y0 + y1) / 2.0, &self.y.label, "middle").set(
            "transform",
            format!("rotate(-90 14 {:.1})", (y0 + y1) / 2.0),
        ))
    }

    fn level(&self, l: &Level) -> Group {
        let y = self.py(l.y);
        let x1 = LEFT + self.plot_width();
        Group::new()
            .set("class", "level")
            .set("data-y", l.y)
            .add(line(LEFT, y, x1, y, INK, 1.2).set("stroke-dasharray", "3 3"))
            .add(text(x1 + 4.0, y + 4.0, &l.label, "start"))
    }

    fn series_group(&self, s: &Series, index: usize) -> Group {
        let mut d = String::new();
        for (i, &(x, y)) in s.points.iter().enumerate() {
            let cmd = if i == 0 { 'M' } else { 'L' };
            d.push_str(&format!("{cmd}{:.2},{:.2} ", self.px(x), self.py(y)));
        }
        let mut path = Path::new()
            .set("d", d.trim_end())
            .set("fill", "none")
            .set("stroke", s.colour)
            .set("stroke-width", 2);
        if let Some(p) = s.dash.pattern() {
            path = path.set("stroke-dasharray", p);
        }
        let mut g = Group::new()
            .set("class", "series")
            .set("data-series", s.id.clone())
            .add(path);
        for &(x, y) in &s.points {
            let mut m = marker(s.marker, self.px(x), self.py(y), s.colour, 2.6);
            m.assign("data-x", x);
            m.assign("data-y", y);
            g = g.add(m);
        }
        // The label at the line's end (where there are lines to tell apart), and a key in
        // the header: line style, marker, words.
        if let Some(&(x, y)) = s.points.last().filter(|_| self.series.len() > 1) {
            let ly = self.py(y) + 4.0 + 13.0 * index as f64;
            g = g.add(text(self.px(x) + 6.0, ly, &s.label, "start").set("fill", s.colour));
        }
        let kx = LEFT + 230.0 * index as f64;
        let mut key = line(kx, 32.0, kx + 26.0, 32.0, s.colour, 2.0);
        if let Some(p) = s.dash.pattern() {
            key = key.set("stroke-dasharray", p);
        }
        g.add(key)
            .add(marker(s.marker, kx + 13.0, 32.0, s.colour, 3.0))
            .add(text(kx + 32.0, 36.0, &s.label, "start"))
    }

    fn callout(&self, c: &Callout) -> Group {
        let (x, y) = (self.px(c.x), self.py(c.y));
        // Label to the side with more room, above the point where it can be.
        let right_half = x > LEFT + self.plot_width() * 0.6;
        let (tx, anchor) = if right_half {
            (x - 10.0, "end")
        } else {
            (x + 10.0, "start")
        };
        let ty = if y - 12.0 > TOP + 10.0 {
            y - 12.0
        } else {
            y + 22.0
        };
        Group::new()
            .set("class", format!("callout {}", c.kind))
            .set("data-x", c.x)
            .set("data-y", c.y)
            .add(
                Circle::new()
                    .set("cx", x)
                    .set("cy", y)
                    .set("r", 7)
                    .set("fill", "none")
                    .set("stroke", INK)
                    .set("stroke-width", 2),
            )
            .add(text(tx, ty, &c.label, anchor).set("font-weight", "bold"))
    }
}

fn marker(kind: Marker, x: f64, y: f64, colour: &str, r: f64) -> svg::node::element::Element {
    let (x, y) = (round(x), round(y));
    match kind {
        Marker::Circle => Circle::new()
            .set("cx", x)
            .set("cy", y)
            .set("r", r)
            .set("fill", colour)
            .into(),
        Marker::Square => Rectangle::new()
            .set("x", round(x - r))
            .set("y", round(y - r))
            .set("width", 2.0 * r)
            .set("height", 2.0 * r)
            .set("fill", "white")
            .set("stroke", colour)
            .set("stroke-width", 1.5)
            .into(),
        Marker::Triangle => Polygon::new()
            .set(
                "points",
                format!(
                    "{:.2},{:.2} {:.2},{:.2} {:.2},{:.2}",
                    x,
                    y - r * 1.2,
                    x - r,
                    y + r * 0.8,
                    x + r,
                    y + r * 0.8
                ),
            )
            .set("fill", colour)
            .into(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn log_ticks_are_powers_of_ten_in_range() {
        let a = Axis::log("ppm", 0.05, 2000.0);
        assert_eq!(a.ticks(), vec![0.1, 1.0, 10.0, 100.0, 1000.0]);
    }

    #[test]
    fn linear_ticks_step_by_round_numbers() {
        let a = Axis::linear("pH", 2.0, 12.3);
        assert_eq!(a.ticks(), vec![2.0, 4.0, 6.0, 8.0, 10.0, 12.0]);
        assert_eq!(Axis::share("added").tick_label(0.4), "40 %");
    }

    #[test]
    fn points_carry_their_values() {
        let c = Chart {
            title: "t <&>".into(),
            width: 500.0,
            height: 300.0,
            x: Axis::share("x"),
            y: Axis::log("y", 0.1, 100.0),
            series: vec![Series {
                id: "a".into(),
                label: "A".into(),
                points: vec![(0.0, 1.0), (0.5, 50.0), (1.0, 0.0)],
                dash: Dash::Dashed,
                marker: Marker::Square,
                colour: COLOURS[0],
            }],
            levels: vec![Level {
                y: 10.0,
                label: "review".into(),
            }],
            callouts: vec![],
        };
        let s = c.svg();
        assert!(s.contains(r#"data-x="0.5" data-y="50""#), "{s}");
        assert!(s.contains("t &lt;&amp;&gt;"));
        assert!(s.contains("stroke-dasharray=\"7 4\""));
    }
}
