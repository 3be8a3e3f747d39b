//! Heat data (`data/heat.yaml`): the heat of neutralization and the heat capacity of
//! water; and the reference to a proton step that dilution curves share.

use serde::Deserialize;

#[derive(Debug, Clone, Deserialize)]
pub struct HeatFile {
    pub neutralization: SourcedValue,
    pub heat_capacity: SourcedValue,
}

#[derive(Debug, Clone, Deserialize)]
pub struct SourcedValue {
    pub value: f64,
    pub source: String,
}

#[derive(Debug, Clone, Deserialize)]
pub struct StepRef {
    pub family: String,
    pub step: usize,
}
