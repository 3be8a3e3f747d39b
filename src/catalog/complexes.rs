//! Metal complexes (`data/complexes.yaml`): a metal ion and a ligand species, each named by
//! its formula in `data/species.yaml`, and the overall constant of what they form.

use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

use super::{FamilyId, IonId};

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ComplexesFile {
    #[allow(dead_code)]
    pub description: String,
    #[allow(dead_code)]
    pub units: serde_yaml::Value,
    pub sources: BTreeMap<String, String>,
    pub complexes: Vec<ComplexEntry>,
    pub inert: Vec<InertEntry>,
    pub solids: Vec<SolidEntry>,
}

/// solid + z H+ = metal + z H2O, z the metal's charge, per metal atom.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SolidEntry {
    pub formula: String,
    pub metal: String,
    pub log_k: f64,
    #[serde(default)]
    pub dh: Option<f64>,
    pub source: String,
    #[serde(default)]
    pub note: Option<String>,
}

/// A hydroxide or oxide that leaves the liquid where it is saturated.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Solid {
    pub formula: String,
    pub metal: Part,
    pub log_k: f64,
    pub dh: Option<f64>,
    pub source: String,
    pub note: Option<String>,
}

/// metal + n ligand + protons H+ = complex (for hydroxo complexes: ligand H2O, protons −n).
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ComplexEntry {
    pub formula: String,
    pub metal: String,
    pub ligand: String,
    pub n: u8,
    #[serde(default)]
    pub protons: i32,
    pub charge: i32,
    pub log_beta: f64,
    /// kJ/mol; none: the constant does not follow the temperature.
    #[serde(default)]
    pub dh: Option<f64>,
    pub source: String,
    #[serde(default)]
    pub dh_source: Option<String>,
    #[serde(default)]
    pub note: Option<String>,
}

/// A complex that gives up its ligand too slowly to count at equilibrium: a strong ion.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct InertEntry {
    pub formula: String,
    pub metal: String,
    pub ligand: String,
    pub n: u8,
    #[serde(default)]
    pub log_beta: Option<f64>,
    #[serde(default)]
    pub source: Option<String>,
    pub inert_source: String,
    #[serde(default)]
    pub note: Option<String>,
}

/// Where a metal or ligand species lives in the catalog.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum Part {
    /// A family's species, by index (most protonated first).
    Family(FamilyId, usize),
    /// A strong ion.
    Ion(IonId),
}

/// A complex with its metal and ligand resolved and its source text written out.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Complex {
    pub formula: String,
    pub metal: Part,
    /// None for hydroxo complexes, whose ligand is water.
    pub ligand: Option<Part>,
    pub n: u8,
    pub protons: i32,
    pub charge: i32,
    pub log_beta: f64,
    pub dh: Option<f64>,
    /// Keys of `Catalog::complex_sources`.
    pub source: String,
    pub dh_source: Option<String>,
    pub note: Option<String>,
}

/// A kinetically inert complex: the strong ion it is counted as, and why.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct InertComplex {
    pub ion: IonId,
    pub metal: String,
    pub ligand: String,
    pub n: u8,
    pub log_beta: Option<f64>,
    pub source: Option<String>,
    pub inert_source: String,
    pub note: Option<String>,
}
