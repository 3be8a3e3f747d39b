//! Horizontal bar charts as inline SVG: one group of bars per row, one bar per class, each
//! class told apart by its fill pattern (solid, hatched, dotted) as well as its colour, so
//! the chart reads in grey. The count is written at the end of every bar.
//!
//! Patterns are drawn as plain lines and dots inside each bar rather than as SVG pattern
//! fills, which a page would have to reference by `url(#...)`. Every bar carries
//! `data-row`, `data-class` and `data-count` with the value it was given.

use super::shapes::{round, text, INK};
use svg::node::element::{Circle, Element, Group, Line, Rectangle, Title};
use svg::node::Node;

/// How a bar (or a swatch) is filled besides its colour.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Fill {
    Solid,
    /// Diagonal lines rising to the right.
    Hatch,
    /// A grid of small dots.
    Dots,
}

/// One kind of bar: what it counts and how it is drawn.
#[derive(Debug, Clone)]
pub struct BarClass {
    /// Written into `data-class`.
    pub id: String,
    pub label: String,
    pub colour: String,
    pub fill: Fill,
}

/// One group of bars: a label and one value per class.
#[derive(Debug, Clone)]
pub struct BarRow {
    pub label: String,
    pub values: Vec<f64>,
}

/// A horizontal bar chart.
#[derive(Debug, Clone)]
pub struct Bars {
    pub title: String,
    pub width: f64,
    pub classes: Vec<BarClass>,
    pub rows: Vec<BarRow>,
}

const BAR: f64 = 20.0;
const GAP: f64 = 4.0;
const ROW_LABEL: f64 = 20.0;
const ROW_GAP: f64 = 12.0;
const CLASS_LABEL: f64 = 74.0;
const LEFT: f64 = 8.0;
const RIGHT: f64 = 48.0;
const TOP: f64 = 54.0;

impl Bars {
    fn row_height(&self) -> f64 {
        ROW_LABEL + self.classes.len() as f64 * (BAR + GAP) + ROW_GAP
    }

    pub fn height(&self) -> f64 {
        TOP + self.rows.len() as f64 * self.row_height() + 4.0
    }

    /// The chart as an `<svg>` element, to be placed inline in a page.
    pub fn svg(&self) -> String {
        // As in `chart`: a plain root element, with no namespace attribute.
        let height = self.height();
        let mut doc = Element::new("svg");
        for (k, v) in [
            ("viewBox", format!("0 0 {} {}", self.width, height)),
            ("width", self.width.to_string()),
            ("height", height.to_string()),
            ("role", "img".into()),
            ("class", "bars".into()),
            ("font-family", "sans-serif".into()),
            ("font-size", "12".into()),
        ] {
            doc.assign(k, v);
        }
        doc.append(Title::new(self.title.clone()));
        doc.append(text(LEFT, 16.0, &self.title, "start").set("font-weight", "bold"));
        // The key: a swatch and the words for each class.
        let mut kx = LEFT;
        for c in &self.classes {
            doc.append(swatch(kx, 26.0, 22.0, 14.0, &c.colour, c.fill).set("class", "key"));
            doc.append(text(kx + 28.0, 37.0, &c.label, "start"));
            kx += 40.0 + 7.0 * c.label.chars().count() as f64;
        }
        let max = self
            .rows
            .iter()
            .flat_map(|r| r.values.iter().copied())
            .fold(0.0, f64::max)
            .max(1.0);
        let x0 = LEFT + CLASS_LABEL;
        let span = self.width - x0 - RIGHT;
        for (k, row) in self.rows.iter().enumerate() {
            let y = TOP + k as f64 * self.row_height();
            let mut g = Group::new()
                .set("class", "bar-row")
                .set("data-row", row.label.clone())
                .add(text(LEFT, y + 14.0, &row.label, "start").set("font-weight", "bold"));
            for (c, class) in self.classes.iter().enumerate() {
                let v = row.values.get(c).copied().unwrap_or(0.0);
                let by = y + ROW_LABEL + c as f64 * (BAR + GAP);
                let w = (v / max * span).max(0.0);
                g = g.add(text(x0 - 6.0, by + 14.0, &class.label, "end"));
                let mut bar = swatch(x0, by, w, BAR, &class.colour, class.fill);
                bar.assign("class", "bar");
                bar.assign("data-row", row.label.clone());
                bar.assign("data-class", class.id.clone());
                bar.assign("data-count", v);
                bar.append(Title::new(format!(
                    "{}: {} {}",
                    row.label,
                    count_label(v),
                    class.label
                )));
                g = g.add(bar).add(
                    // A zero-length bar still shows its baseline.
                    Line::new()
                        .set("x1", round(x0))
                        .set("y1", round(by))
                        .set("x2", round(x0))
                        .set("y2", round(by + BAR))
                        .set("stroke", INK),
                );
                // The count just past the bar's end, clear of its pattern.
                g = g.add(
                    text(x0 + w + 5.0, by + 14.5, &count_label(v), "start")
                        .set("font-weight", "bold")
                        .set("class", "count"),
                );
            }
            doc.append(g);
        }
        doc.to_string()
    }
}

fn count_label(v: f64) -> String {
    if v.fract() == 0.0 {
        format!("{v:.0}")
    } else {
        crate::output::plot::chart::short_number(v)
    }
}

/// A rectangle in `colour` with its pattern drawn over it, as a group; its outline is the
/// group's first child, so data attributes on the group describe the whole.
pub fn swatch(x: f64, y: f64, w: f64, h: f64, colour: &str, fill: Fill) -> Group {
    let mut g = Group::new().add(
        Rectangle::new()
            .set("x", round(x))
            .set("y", round(y))
            .set("width", round(w))
            .set("height", round(h))
            .set("fill", colour)
            .set("stroke", INK)
            .set("stroke-width", 0.8),
    );
    match fill {
        Fill::Solid => {}
        Fill::Hatch => {
            for (x1, y1, x2, y2) in hatch_lines(x, y, w, h, 6.0) {
                g = g.add(
                    Line::new()
                        .set("x1", round(x1))
                        .set("y1", round(y1))
                        .set("x2", round(x2))
                        .set("y2", round(y2))
                        .set("stroke", INK)
                        .set("stroke-width", 1.1),
                );
            }
        }
        Fill::Dots => {
            let step = 6.0;
            let mut yy = y + step / 2.0;
            while yy < y + h {
                let mut xx = x + step / 2.0;
                while xx < x + w {
                    g = g.add(
                        Circle::new()
                            .set("cx", round(xx))
                            .set("cy", round(yy))
                            .set("r", 1.2)
                            .set("fill", INK),
                    );
                    xx += step;
                }
                yy += step;
            }
        }
    }
    g
}

/// Diagonal lines (rising to the right, `spacing` apart) clipped to a rectangle, as
/// (x1, y1, x2, y2) each.
pub fn hatch_lines(x: f64, y: f64, w: f64, h: f64, spacing: f64) -> Vec<(f64, f64, f64, f64)> {
    let mut out = Vec::new();
    if w <= 0.0 || h <= 0.0 || spacing <= 0.0 {
        return out;
    }
    // Lines x' + y' = c, with c from the top-left corner to the bottom-right one.
    let mut c = x + y + spacing;
    while c < x + w + y + h {
        let xa = (c - (y + h)).max(x);
        let xb = (c - y).min(x + w);
        if xb > xa {
            out.push((xa, c - xa, xb, c - xb));
        }
        c += spacing;
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hatch_lines_stay_inside_the_rectangle() {
        let lines = hatch_lines(10.0, 20.0, 30.0, 12.0, 5.0);
        assert!(!lines.is_empty());
        for (x1, y1, x2, y2) in lines {
            for (x, y) in [(x1, y1), (x2, y2)] {
                assert!((10.0 - 1e-9..=40.0 + 1e-9).contains(&x), "{x}");
                assert!((20.0 - 1e-9..=32.0 + 1e-9).contains(&y), "{y}");
            }
            assert!((x2 - x1 - (y1 - y2)).abs() < 1e-9, "45 degrees");
        }
    }

    #[test]
    fn bars_carry_their_counts_and_are_escaped() {
        let b = Bars {
            title: "pairs <&>".into(),
            width: 500.0,
            classes: vec![
                BarClass {
                    id: "stop".into(),
                    label: "stop".into(),
                    colour: "#b00".into(),
                    fill: Fill::Solid,
                },
                BarClass {
                    id: "review".into(),
                    label: "review".into(),
                    colour: "#fc6".into(),
                    fill: Fill::Hatch,
                },
            ],
            rows: vec![BarRow {
                label: "Cabinet <1>".into(),
                values: vec![3.0, 0.0],
            }],
        };
        let s = b.svg();
        assert!(s.contains("pairs &lt;&amp;&gt;"), "{s}");
        assert!(s.contains(r#"data-class="stop" data-count="3""#), "{s}");
        assert!(s.contains(r#"data-class="review" data-count="0""#), "{s}");
        assert!(!s.contains("url("));
    }
}
