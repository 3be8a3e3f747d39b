//! Species formed from two families at once (`data/combined.yaml`), such as dissolved
//! chlorine from hypochlorous acid and chloride.

use serde::{Deserialize, Serialize};

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CombinedFile {
    #[allow(dead_code)]
    pub description: String,
    #[allow(dead_code)]
    pub units: serde_yaml::Value,
    pub combined: Vec<Combined>,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Parent {
    pub family: String,
    pub species: String,
}

/// first + second + protons H+ = combined + H2O.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Combined {
    pub id: String,
    pub formula: String,
    pub name: String,
    pub charge: i32,
    pub molar_mass: f64,
    pub first: Parent,
    pub second: Parent,
    pub protons: i32,
    pub log_k_formation: f64,
    /// kJ/mol
    pub dh_formation: f64,
    pub source: String,
    #[serde(default)]
    pub volatile: Option<super::species::CombinedVolatile>,
}
