//! Acid–base families as they stand in `data/species.yaml`.

use serde::{Deserialize, Serialize};

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SpeciesFile {
    #[allow(dead_code)]
    pub description: String,
    #[allow(dead_code)]
    pub units: serde_yaml::Value,
    pub families: Vec<Family>,
    pub strong_ions: Vec<StrongIon>,
}

/// One acid–base family: its species from most to least protonated, and the steps between.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Family {
    pub id: String,
    pub name: String,
    pub species: Vec<Species>,
    pub steps: Vec<Step>,
    #[serde(default)]
    pub volatile: Option<Volatile>,
    #[serde(default)]
    pub kw_equation: Option<KwEquation>,
    #[serde(default)]
    pub note: Option<String>,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Species {
    pub formula: String,
    pub charge: i32,
    pub molar_mass: f64,
    #[serde(default)]
    pub name: Option<String>,
}

/// One deprotonation: species i → species i+1 + H+.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Step {
    pub pka: f64,
    pub pka_source: String,
    /// Standard ionization enthalpy, kJ/mol.
    pub dh: f64,
    pub dh_source: String,
    #[serde(default)]
    pub note: Option<String>,
}

/// The neutral species that can leave the liquid, with its Henry's law solubility.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Volatile {
    pub species: String,
    pub gas: super::GasName,
    /// Hcp at 298.15 K, mol/(m3 Pa).
    pub hcp: f64,
    /// d ln Hcp / d(1/T), K.
    pub hcp_b: f64,
    pub source: String,
    /// The neutral form's activity coefficient in its own concentrated solution,
    /// ln γ = 2 λ m with λ = a + b/T + c/T² (Pitzer's self-interaction of a neutral solute).
    #[serde(default)]
    pub self_interaction: Option<SelfInteraction>,
    #[serde(default)]
    pub note: Option<String>,
}

/// λ(T) = a + b/T + c/T², kg/mol.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct SelfInteraction {
    pub a: f64,
    pub b: f64,
    pub c: f64,
    pub source: String,
}

impl SelfInteraction {
    pub fn lambda(&self, t_k: f64) -> f64 {
        self.a + self.b / t_k + self.c / (t_k * t_k)
    }
}

/// pKw(T) = a/T + b + c·T.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct KwEquation {
    pub a: f64,
    pub b: f64,
    pub c: f64,
    #[serde(default)]
    pub form: Option<String>,
    pub source: String,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct StrongIon {
    pub formula: String,
    pub charge: i32,
    pub molar_mass: f64,
    #[serde(default)]
    pub name: Option<String>,
}

impl Family {
    /// Index of the volatile species within `species`, if the family has one.
    pub fn volatile_index(&self) -> Option<usize> {
        let v = self.volatile.as_ref()?;
        self.species.iter().position(|s| s.formula == v.species)
    }
}

/// The gas a combined species forms, with its Henry's law solubility.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct CombinedVolatile {
    pub gas: super::GasName,
    pub hcp: f64,
    pub hcp_b: f64,
    pub source: String,
}
