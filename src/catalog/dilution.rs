//! Integral enthalpies of dilution by solute (`data/dilution-heat.yaml`): for any water
//! content, the heat to dilute a mole of solute to infinite dilution.

use serde::{Deserialize, Serialize};

#[derive(Debug, Clone, Deserialize)]
pub struct DilutionFile {
    #[allow(dead_code)]
    pub description: String,
    #[allow(dead_code)]
    pub units: serde_yaml::Value,
    pub curves: Vec<CurveEntry>,
}

#[derive(Debug, Clone, Deserialize)]
pub struct CurveEntry {
    pub solute: String,
    #[allow(dead_code)]
    pub neat_state: String,
    #[allow(dead_code)]
    pub infinite_dilution_state: String,
    #[serde(default)]
    pub weak_steps_included: Vec<super::heat::StepRef>,
    pub source: String,
    /// (mol H2O per mol solute, kJ/mol to infinite dilution)
    pub points: Vec<(f64, f64)>,
    #[serde(default)]
    #[allow(dead_code)]
    pub note: Option<String>,
}

/// A weak proton step that the curve's infinite-dilution state includes: the speciation
/// counts its heat itself, so the curve must not count it again.
#[derive(Debug, Clone, Copy, Serialize, Deserialize)]
pub struct IncludedStep {
    /// Ka of the step at 25 °C.
    pub ka: f64,
    /// Its ionization enthalpy, kJ/mol.
    pub dh: f64,
    /// Protons per mole of solute already given off by stronger steps before this one.
    pub protons_before: f64,
}

/// One solute's dilution curve, with the weak steps the speciation already counts taken out.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct DilutionCurve {
    points: Vec<(f64, f64)>,
    steps: Vec<IncludedStep>,
}

/// Mol of water in a kg.
const WATER_MOL_PER_KG: f64 = 1000.0 / 18.015;

impl DilutionCurve {
    pub fn new(entry: &CurveEntry, steps: Vec<IncludedStep>) -> Result<DilutionCurve, String> {
        if entry.points.is_empty() || entry.source.trim().is_empty() {
            return Err(format!(
                "`{}`: a curve needs points and a source",
                entry.solute
            ));
        }
        for w in entry.points.windows(2) {
            if w[1].0 <= w[0].0 {
                return Err(format!("`{}`: water per solute must rise", entry.solute));
            }
        }
        if entry
            .points
            .iter()
            .any(|p| !(p.0 >= 0.0 && p.0.is_finite() && p.1.is_finite()))
        {
            return Err(format!("`{}`: points must be finite", entry.solute));
        }
        Ok(DilutionCurve {
            points: entry.points.clone(),
            steps,
        })
    }

    /// kJ per mol of solute from `n_water` mol of water per mol to infinite dilution, as
    /// tabulated (including the weak steps).
    pub fn tabulated(&self, n_water: f64) -> f64 {
        let p = &self.points;
        let n = n_water.max(p[0].0);
        let last = p[p.len() - 1];
        if n >= last.0 {
            // Past the table the heat fades as the square root of the molality
            // (the Debye–Hückel limiting law).
            return if last.0 > 0.0 {
                last.1 * (last.0 / n).sqrt()
            } else {
                last.1
            };
        }
        let i = p.partition_point(|q| q.0 <= n).clamp(1, p.len() - 1);
        let (a, b) = (p[i - 1], p[i]);
        a.1 + (b.1 - a.1) * (n - a.0) / (b.0 - a.0)
    }

    /// kJ per mol to infinite dilution without the weak steps the speciation counts: a
    /// step's heat is taken out in proportion to the share of it not yet done in the
    /// solute's own solution at that strength (ideal, from its Ka).
    pub fn value(&self, n_water: f64) -> f64 {
        let mut v = self.tabulated(n_water);
        for s in &self.steps {
            let m = if n_water > 0.0 {
                WATER_MOL_PER_KG / n_water
            } else {
                f64::INFINITY
            };
            let done = share_done(s, m);
            v -= s.dh * (1.0 - done);
        }
        v
    }
}

/// Share of a weak step done in a solution of the solute alone at molality `m`:
/// m d² + (h0 + Ka) d − Ka = 0 with h0 the protons the stronger steps gave.
fn share_done(s: &IncludedStep, m: f64) -> f64 {
    if !m.is_finite() {
        return 0.0;
    }
    if m <= 0.0 {
        return 1.0;
    }
    let h0 = s.protons_before * m;
    let b = h0 + s.ka;
    (2.0 * s.ka / (b + (b * b + 4.0 * m * s.ka).sqrt())).clamp(0.0, 1.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn curve(steps: Vec<IncludedStep>) -> DilutionCurve {
        DilutionCurve::new(
            &CurveEntry {
                solute: "x".into(),
                neat_state: "liquid".into(),
                infinite_dilution_state: "".into(),
                weak_steps_included: vec![],
                source: "s".into(),
                points: vec![(0.0, -90.0), (1.0, -60.0), (100.0, -4.0)],
                note: None,
            },
            steps,
        )
        .unwrap()
    }

    #[test]
    fn interpolates_and_fades_past_the_table() {
        let c = curve(vec![]);
        assert!((c.tabulated(0.5) + 75.0).abs() < 1e-12);
        assert!((c.tabulated(400.0) + 2.0).abs() < 1e-12);
    }

    #[test]
    fn a_weak_step_is_taken_out_where_it_is_not_yet_done() {
        let step = IncludedStep {
            ka: 10f64.powf(-1.99),
            dh: -22.4,
            protons_before: 1.0,
        };
        let c = curve(vec![step]);
        // Neat: nothing of the step is done, its whole heat comes out.
        assert!((c.value(0.0) - (-90.0 + 22.4)).abs() < 1e-9);
        // Very dilute: the step is done, so nothing comes out.
        assert!((c.value(1e9) - c.tabulated(1e9)).abs() < 0.01);
    }
}
