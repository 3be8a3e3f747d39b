//! Pictures of a computation: SVG line charts for the HTML pages and one-line text courses
//! for the terminal and markdown.
//!
//! Plots draw numbers the report already holds; they never compute chemistry. Every point
//! an SVG chart draws carries its own values in `data-x` and `data-y`, so a test (or a
//! reader with the page source) can check the picture against the JSON.

pub mod bars;
pub mod chart;
pub mod pour;
pub mod shapes;
pub mod spark;
pub mod steps;
