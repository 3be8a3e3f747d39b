//! Salting-out of dissolved neutral gases by the ions around them (`data/salting-out.yaml`):
//! the ion- and gas-specific parameters of Weisenberger and Schumpe's method,
//! log10(c₀/c) = Σᵢ (hᵢ + h_G) cᵢ over the ions' molar concentrations cᵢ, with
//! h_G = h_G0 + h_T (T − 298.15 K).

use serde::{Deserialize, Serialize};

#[derive(Debug, Clone, Deserialize)]
pub struct SaltingFile {
    #[allow(dead_code)]
    pub description: String,
    #[allow(dead_code)]
    pub units: serde_yaml::Value,
    pub ions: Vec<IonEntry>,
    pub unlisted_gas: UnlistedGasEntry,
    pub gases: Vec<GasEntry>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct UnlistedGasEntry {
    pub h_g0: f64,
    pub source: String,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct IonEntry {
    pub ion: String,
    pub h: f64,
    pub source: String,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GasEntry {
    pub species: String,
    pub h_g0: f64,
    #[serde(default)]
    pub h_t: f64,
    #[serde(default)]
    pub max_molarity: Option<f64>,
    pub source: String,
}

/// One gas's parameters.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize, Deserialize)]
pub struct GasSalting {
    pub h_g0: f64,
    pub h_t: f64,
    /// The salt concentration (mol/L) the data behind the parameters reach, where known.
    pub max_molarity: Option<f64>,
}

impl GasSalting {
    /// h_G at `t_k`, L/mol.
    pub fn h_g(&self, t_k: f64, t_ref: f64) -> f64 {
        self.h_g0 + self.h_t * (t_k - t_ref)
    }
}

/// The parameters the solver uses, by ion formula and by neutral species formula.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct SaltingTable {
    pub ions: Vec<(String, f64)>,
    pub gases: Vec<(String, GasSalting)>,
    /// For a neutral gas with no parameters of its own: an upper estimate.
    pub unlisted: GasSalting,
}

impl SaltingTable {
    pub fn ion_h(&self, formula: &str) -> Option<f64> {
        self.ions.iter().find(|(f, _)| f == formula).map(|e| e.1)
    }
    /// The gas's own parameters, if the data list it.
    pub fn gas(&self, species: &str) -> Option<&GasSalting> {
        self.gases.iter().find(|(f, _)| f == species).map(|e| &e.1)
    }
    /// The gas's parameters, or the upper estimate for an unlisted gas.
    pub fn gas_or_unlisted(&self, species: &str) -> &GasSalting {
        self.gas(species).unwrap_or(&self.unlisted)
    }
}
