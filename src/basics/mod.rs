//! The bottom layer: what every other layer may use and which uses nothing of the crate.
//! Input errors with their file and line, the shape checks of input files, quantities with
//! units, number formatting, and the notation of formulas.

pub mod input_error;
pub mod input_shape;
pub mod notation;
pub mod quantity;
pub mod text;
