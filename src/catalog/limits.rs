//! Airborne exposure levels from `data/limits.yaml`, and how a missing level is filled.

use serde::{Deserialize, Serialize};

#[derive(Debug, Clone, Deserialize, Serialize)]
pub struct LimitsFile {
    #[allow(dead_code)]
    #[serde(default)]
    pub description: Option<String>,
    pub fallback: Fallback,
    pub gases: Vec<GasLimits>,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
pub struct Fallback {
    pub stop_without_idlh: Derivation,
    pub review_without_short_term: Derivation,
}

/// A level derived from another one by a factor, with the practice that justifies it.
#[derive(Debug, Clone, Deserialize, Serialize)]
pub struct Derivation {
    pub from: String,
    pub factor: f64,
    pub basis: String,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
pub struct Level {
    pub value: f64,
    #[serde(default)]
    pub basis: Option<String>,
    pub source: String,
}

/// How a gas does harm, which decides how it is judged.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum GasKind {
    /// Judged against its exposure levels wherever a person can meet it.
    Toxic,
    /// Harmful only by displacing air at percent levels: judged by the pressure it builds
    /// in a sealed vessel and by what reaches the room.
    Asphyxiant,
    /// Judged against its lower flammable limit.
    Flammable,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
pub struct GasLimits {
    pub gas: String,
    pub name: String,
    #[serde(default)]
    pub cas: Option<String>,
    pub kinds: Vec<GasKind>,
    pub kinds_source: String,
    #[serde(default)]
    pub idlh: Option<Level>,
    #[serde(default)]
    pub short_term: Option<Level>,
    #[serde(default)]
    pub twa: Option<Level>,
    #[serde(default)]
    pub flammability: Option<Flammability>,
}

/// For a flammable gas: its lower flammable limit in air.
#[derive(Debug, Clone, Deserialize, Serialize)]
pub struct Flammability {
    pub lfl: Level,
}

/// The two levels a verdict is judged against, each with a short basis and its source.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct JudgedLevels {
    /// Reaching it means review (short-term level).
    pub review_ppm: f64,
    pub review_basis: String,
    pub review_source: String,
    /// Reaching it means stop (IDLH).
    pub stop_ppm: f64,
    pub stop_basis: String,
    pub stop_source: String,
}

impl GasLimits {
    /// True when the gas is judged only by pressure and the room, not by headspace ppm.
    pub fn asphyxiant_only(&self) -> bool {
        !self.kinds.contains(&GasKind::Toxic) && self.kinds.contains(&GasKind::Asphyxiant)
    }

    fn level(&self, name: &str) -> Option<&Level> {
        match name {
            "idlh" => self.idlh.as_ref(),
            "short_term" => self.short_term.as_ref(),
            "twa" => self.twa.as_ref(),
            _ => None,
        }
    }

    /// Review and stop levels, filling gaps by the file's fallback; None if the gas has no level.
    pub fn judged(&self, fallback: &Fallback) -> Option<JudgedLevels> {
        let basis = |l: &Level, what: &str| l.basis.clone().unwrap_or_else(|| what.to_string());
        let (review_ppm, review_basis, review_source) = match &self.short_term {
            Some(l) => (l.value, basis(l, "short-term level"), l.source.clone()),
            None => {
                let d = &fallback.review_without_short_term;
                let from = self.level(&d.from)?;
                (
                    from.value * d.factor,
                    format!("{} × {}", d.factor, basis(from, &d.from)),
                    format!("{}; factor: {}", from.source, d.basis),
                )
            }
        };
        let (stop_ppm, stop_basis, stop_source) = match &self.idlh {
            Some(l) => (l.value, basis(l, "IDLH"), l.source.clone()),
            None => {
                let d = &fallback.stop_without_idlh;
                let (v, b, src) = match self.level(&d.from) {
                    Some(l) => (l.value, basis(l, &d.from), l.source.clone()),
                    None => (review_ppm, review_basis.clone(), review_source.clone()),
                };
                (
                    v * d.factor,
                    format!("{} × {b}", d.factor),
                    format!("{src}; factor: {}", d.basis),
                )
            }
        };
        Some(JudgedLevels {
            review_ppm,
            review_basis,
            review_source,
            stop_ppm: stop_ppm.max(review_ppm),
            stop_basis,
            stop_source,
        })
    }
}
