//! CSV import of an inventory (being written).
