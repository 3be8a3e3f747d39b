//! Volatility of solvents and other liquids that take no part in proton transfer
//! (`data/volatility.yaml`): Henry's law constant, vapour pressure, solubility in water.

use serde::{Deserialize, Serialize};

#[derive(Debug, Clone, Deserialize)]
pub struct VolatilityFile {
    #[allow(dead_code)]
    pub description: String,
    #[allow(dead_code)]
    pub units: serde_yaml::Value,
    pub solvents: Vec<SolventEntry>,
}

#[derive(Debug, Clone, Deserialize)]
pub struct SolventEntry {
    pub substance: String,
    pub hcp: f64,
    pub hcp_b: f64,
    pub hcp_source: String,
    pub antoine: AntoineEntry,
    pub miscible: bool,
    #[serde(default)]
    pub solubility: Option<super::substances::Sourced>,
    #[serde(default)]
    #[allow(dead_code)]
    pub note: Option<String>,
}

/// log10(p / mmHg) = a − b / (c + t/°C)
#[derive(Debug, Clone, Deserialize, Serialize)]
pub struct AntoineEntry {
    pub a: f64,
    pub b: f64,
    pub c: f64,
    #[allow(dead_code)]
    pub t_min_c: f64,
    #[allow(dead_code)]
    pub t_max_c: f64,
    pub source: String,
}

/// A solvent's volatility, ready to evaluate.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Volatility {
    pub hcp: f64,
    pub hcp_b: f64,
    pub antoine: AntoineEntry,
    /// g/L of water-saturated solution; None when it mixes in all proportions.
    pub solubility_g_per_l: Option<f64>,
}

impl Volatility {
    pub fn from_entry(e: &SolventEntry) -> Result<Volatility, String> {
        if !(e.hcp > 0.0 && e.hcp.is_finite() && e.hcp_b.is_finite()) {
            return Err(format!(
                "`{}`: hcp must be positive and finite",
                e.substance
            ));
        }
        if e.hcp_source.trim().is_empty() || e.antoine.source.trim().is_empty() {
            return Err(format!("`{}`: hcp has no source", e.substance));
        }
        let solubility = match (&e.solubility, e.miscible) {
            (None, true) => None,
            (Some(s), false) if s.value > 0.0 && !s.source.trim().is_empty() => Some(s.value),
            _ => {
                return Err(format!(
                    "`{}`: a solvent is either miscible or has a solubility with a source",
                    e.substance
                ))
            }
        };
        Ok(Volatility {
            hcp: e.hcp,
            hcp_b: e.hcp_b,
            antoine: e.antoine.clone(),
            solubility_g_per_l: solubility,
        })
    }

    /// Vapour pressure of the pure liquid at `t_k`, Pa.
    pub fn vapour_pressure_pa(&self, t_k: f64, kelvin_offset: f64, p_std: f64) -> f64 {
        let t = t_k - kelvin_offset;
        let a = &self.antoine;
        10f64.powf(a.a - a.b / (a.c + t)) * p_std / 760.0
    }

    /// Henry's law solubility constant at `t_k`, mol/(m3 Pa).
    pub fn hcp_at(&self, t_k: f64, t_ref: f64) -> f64 {
        self.hcp * (self.hcp_b * (1.0 / t_k - 1.0 / t_ref)).exp()
    }
}
