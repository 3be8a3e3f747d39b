//! The pair audit (being written).
