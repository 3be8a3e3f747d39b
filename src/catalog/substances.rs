//! Substances as they stand in `data/substances.yaml`, and hazard classes.

use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SubstancesFile {
    #[allow(dead_code)]
    pub description: String,
    #[allow(dead_code)]
    pub units: serde_yaml::Value,
    pub substances: Vec<SubstanceEntry>,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum PhysicalState {
    Solid,
    Liquid,
    Gas,
    Solution,
}

#[derive(Debug, Clone, Default, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Gives {
    #[serde(default)]
    pub families: BTreeMap<String, f64>,
    #[serde(default)]
    pub ions: BTreeMap<String, f64>,
}

/// A number with the compilation it came from.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Sourced {
    pub value: f64,
    pub source: String,
    #[serde(default)]
    pub note: Option<String>,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct SubstanceEntry {
    pub name: String,
    #[serde(default)]
    pub synonyms: Vec<String>,
    #[serde(default)]
    pub cas: Option<String>,
    #[serde(default)]
    pub formula: Option<String>,
    #[serde(default)]
    pub molar_mass: Option<f64>,
    pub state: PhysicalState,
    #[serde(default)]
    pub gives: Option<Gives>,
    #[serde(default)]
    pub solubility: Option<Sourced>,
    #[serde(default)]
    pub density: Option<Sourced>,
    #[serde(default)]
    pub solution_of: Option<String>,
    #[serde(default)]
    pub mass_percent: Option<Sourced>,
    #[serde(default)]
    pub classes: Vec<String>,
    /// Other substances a commercial solution always carries with its solute (the sodium
    /// chloride made with bleach), per mole of solute.
    #[serde(default)]
    pub also_contains: Vec<CoSolute>,
    #[serde(default)]
    pub source: Option<String>,
    #[serde(default)]
    pub note: Option<String>,
}

/// A substance that comes with a commercial solution's solute.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct CoSolute {
    pub substance: String,
    /// Mol of it per mol of the solution's solute.
    pub per_mole: f64,
    pub source: String,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ClassesFile {
    #[serde(default)]
    #[allow(dead_code)]
    pub description: Option<String>,
    #[serde(default)]
    #[allow(dead_code)]
    pub units: Option<serde_yaml::Value>,
    pub classes: Vec<HazardClass>,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct HazardClass {
    pub id: String,
    pub description: String,
    pub beyond_proton_model: bool,
    /// Its hazard appears only when it meets what a rule names (acid, an oxidiser), so its
    /// presence alone is not flagged.
    #[serde(default)]
    pub needs_partner: bool,
}
