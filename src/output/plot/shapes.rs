//! The small SVG pieces every drawing uses: ink, lines and text at coordinates rounded to
//! a hundredth of a pixel (enough for any screen or printer, and it keeps pages small).

use svg::node::element::{Line, Text};

/// The colour of text, axes and outlines.
pub const INK: &str = "#222";

pub fn line(x1: f64, y1: f64, x2: f64, y2: f64, stroke: &str, width: f64) -> Line {
    Line::new()
        .set("x1", round(x1))
        .set("y1", round(y1))
        .set("x2", round(x2))
        .set("y2", round(y2))
        .set("stroke", stroke)
        .set("stroke-width", width)
}

pub fn text(x: f64, y: f64, s: &str, anchor: &str) -> Text {
    Text::new(s)
        .set("x", round(x))
        .set("y", round(y))
        .set("text-anchor", anchor)
        .set("fill", INK)
}

pub fn round(v: f64) -> f64 {
    (v * 100.0).round() / 100.0
}
