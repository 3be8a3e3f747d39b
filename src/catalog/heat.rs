//! Heat data: heats of dilution of concentrated reagents, the heat capacity of water
//! (`data/heat.yaml`), and boiling points (`data/boiling-points.yaml`).

use serde::Deserialize;

#[derive(Debug, Clone, Deserialize)]
pub struct HeatFile {
    pub neutralization: SourcedValue,
    pub heat_capacity: SourcedValue,
    pub dissolution: Vec<Dissolution>,
}

#[derive(Debug, Clone, Deserialize)]
pub struct SourcedValue {
    pub value: f64,
    pub source: String,
}

#[derive(Debug, Clone, Deserialize)]
pub struct Dissolution {
    pub substance: String,
    /// kJ per mol of solute from the entry's form to infinite dilution (negative releases heat).
    pub dh_to_infinite_dilution_kj_per_mol: f64,
    pub source: String,
    /// Proton steps the handbook value runs through that the speciation already counts.
    #[serde(default)]
    pub weak_steps_included: Vec<StepRef>,
}

#[derive(Debug, Clone, Deserialize)]
pub struct StepRef {
    pub family: String,
    pub step: usize,
}

#[derive(Debug, Clone, Deserialize)]
pub struct BoilingFile {
    pub boiling_points: Vec<BoilingPoint>,
}

#[derive(Debug, Clone, Deserialize)]
pub struct BoilingPoint {
    pub substance: String,
    pub celsius: f64,
    pub source: String,
}
