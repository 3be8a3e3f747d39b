//! The judgement: what the computed states mean against the site's levels. `assess` turns a
//! solved state into gas lines and findings, `thresholds` holds the review and stop levels
//! (bundled or the site's), and `rules` the hazard rules that chemistry alone does not
//! catch. It reads the engine's results; it never solves and never formats.

pub mod assess;
pub mod rules;
pub mod thresholds;
