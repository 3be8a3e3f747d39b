//! Densities of aqueous solutions by solute (`data/density.yaml`), and the density of a
//! batch that holds several solutes, by adding their apparent specific volumes.
//!
//! The apparent specific volume of a solute at mass fraction w, from its binary table,
//! is v = (1/ρ(w) − (1 − w)/ρ_water) / w (mL/g); a litre of a batch then holds water of
//! mass ρ_water (1000 − Σ c_i v_i) beside the solutes' c_i g. This is the mixing rule of
//! M. Laliberté and W. E. Cooper, J. Chem. Eng. Data 49, 1141 (2004).

use serde::{Deserialize, Serialize};

#[derive(Debug, Clone, Deserialize)]
pub struct DensityFile {
    #[allow(dead_code)]
    pub description: String,
    #[allow(dead_code)]
    pub units: serde_yaml::Value,
    pub water: WaterDensity,
    pub solutes: Vec<DensityEntry>,
}

#[derive(Debug, Clone, Deserialize)]
pub struct WaterDensity {
    pub density: f64,
    #[allow(dead_code)]
    pub temperature_c: f64,
    pub source: String,
}

#[derive(Debug, Clone, Deserialize)]
pub struct DensityEntry {
    pub substance: String,
    #[allow(dead_code)]
    pub temperature_c: f64,
    pub source: String,
    /// (mass percent of the anhydrous solute, g/mL)
    pub points: Vec<(f64, f64)>,
    #[serde(default)]
    #[allow(dead_code)]
    pub note: Option<String>,
}

/// One solute's density curve, with water as its first point.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct DensityTable {
    /// (mass fraction 0–1, g/mL), from 0 upward.
    points: Vec<(f64, f64)>,
    water: f64,
}

impl DensityTable {
    pub fn new(entry: &DensityEntry, water: f64) -> Result<DensityTable, String> {
        let mut points = vec![(0.0, water)];
        for &(w, d) in &entry.points {
            let last = points.last().map_or(0.0, |p| p.0);
            if !(w > 0.0 && w <= 100.0 && w / 100.0 > last && d > 0.3 && d < 3.0) {
                return Err(format!(
                    "`{}`: points must rise in mass percent within 0–100 with densities in g/mL",
                    entry.substance
                ));
            }
            points.push((w / 100.0, d));
        }
        if entry.source.trim().is_empty() {
            return Err(format!("`{}` has no source", entry.substance));
        }
        Ok(DensityTable { points, water })
    }

    /// Highest mass fraction the table reaches.
    pub fn max_fraction(&self) -> f64 {
        self.points.last().map_or(0.0, |p| p.0)
    }

    /// Density of the binary solution at mass fraction `w` (held at the ends).
    pub fn density(&self, w: f64) -> f64 {
        let p = &self.points;
        let w = w.clamp(0.0, self.max_fraction());
        let i = p.partition_point(|q| q.0 < w).clamp(1, p.len() - 1);
        let (a, b) = (p[i - 1], p[i]);
        if b.0 > a.0 {
            a.1 + (b.1 - a.1) * (w - a.0) / (b.0 - a.0)
        } else {
            b.1
        }
    }

    /// Apparent specific volume of the solute at mass fraction `w`, mL/g.
    pub fn apparent_volume(&self, w: f64) -> f64 {
        // Near zero the first tabulated point stands for the dilute limit.
        let w = w.clamp(self.points.get(1).map_or(1.0, |p| p.0), self.max_fraction());
        (1.0 / self.density(w) - (1.0 - w) / self.water) / w
    }
}

/// Mol of crystal water in a hydrate's formula ("MgCl2.6H2O" → 6, "MnSO4.H2O" → 1).
pub fn crystal_water(formula: &str) -> f64 {
    let Some(pos) = formula.find(['.', '·']) else {
        return 0.0;
    };
    let tail = &formula[pos..];
    let tail = tail.trim_start_matches(['.', '·']);
    let Some(h) = tail.find("H2O") else {
        return 0.0;
    };
    let n = &tail[..h];
    if n.is_empty() {
        1.0
    } else {
        n.parse().unwrap_or(0.0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn crystal_water_from_formulas() {
        assert_eq!(crystal_water("MgCl2.6H2O"), 6.0);
        assert_eq!(crystal_water("MnSO4.H2O"), 1.0);
        assert_eq!(crystal_water("NaCl"), 0.0);
        assert_eq!(crystal_water("Na2S2O3·5H2O"), 5.0);
    }

    #[test]
    fn apparent_volume_reproduces_the_binary_density() {
        let e = DensityEntry {
            substance: "x".into(),
            temperature_c: 20.0,
            source: "s".into(),
            points: vec![(10.0, 1.07), (20.0, 1.15)],
            note: None,
        };
        let t = DensityTable::new(&e, 0.9982).unwrap();
        // One litre at w = 0.2: 1150 g, 230 g solute, water 920 g taking 921.66 mL.
        let v = t.apparent_volume(0.2);
        let water_ml = 1000.0 - 230.0 * v;
        assert!((water_ml * 0.9982 - 920.0).abs() < 1e-6);
    }
}
