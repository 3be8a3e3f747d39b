//! Rearrangement suggestions (being written).
