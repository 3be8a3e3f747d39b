//! Synthetic storerooms for benchmarks and tests (being written).
