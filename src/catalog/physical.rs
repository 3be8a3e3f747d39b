//! Physical constants and water properties from `data/physical.yaml`.

use serde::{Deserialize, Serialize};

#[derive(Debug, Clone, Deserialize)]
pub struct PhysicalFile {
    pub constants: Constants,
    pub davies: DaviesData,
    pub water_vapour: Antoine,
    pub evaporation: Evaporation,
    pub bounds: Bounds,
}

/// Physical bounds on what a user can write.
#[derive(Debug, Clone, Copy, Deserialize, Serialize)]
pub struct Bounds {
    /// g/mL: no aqueous solution is denser, so none holds more than this per mL.
    pub densest_aqueous_solution: Value,
    /// g/L: a solid less soluble than this dissolves mainly by reacting with acid or base.
    pub slightly_soluble_below: Value,
}

/// The evaporation-rate correlation, in the units of its source (see physical.yaml).
#[derive(Debug, Clone, Copy, Deserialize, Serialize)]
pub struct Evaporation {
    pub coefficient: f64,
    pub wind_exponent: f64,
    pub mw_exponent: f64,
}

/// log10(p / mmHg) = a − b / (c + t/°C).
#[derive(Debug, Clone, Copy, Deserialize, Serialize)]
pub struct Antoine {
    pub a: f64,
    pub b: f64,
    pub c: f64,
}

#[derive(Debug, Clone, Copy, Deserialize, Serialize)]
pub struct Value {
    pub value: f64,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
pub struct Constants {
    pub gas_constant: Value,
    pub standard_pressure: Value,
    pub reference_temperature: Value,
    pub kelvin_offset: Value,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
pub struct DaviesData {
    pub b: Value,
    pub a_prefactor: Value,
    pub permittivity: Permittivity,
    pub density: Density,
}

#[derive(Debug, Clone, Copy, Deserialize, Serialize)]
pub struct Permittivity {
    pub e0: f64,
    pub e1: f64,
    pub e2: f64,
    pub e3: f64,
}

#[derive(Debug, Clone, Copy, Deserialize, Serialize)]
pub struct Density {
    pub d0: f64,
    pub d1: f64,
    pub d2: f64,
}

/// The constants the engine uses, flattened for speed.
#[derive(Debug, Clone, Copy, Serialize, Deserialize)]
pub struct Physical {
    /// J/(mol K) = Pa m3/(mol K)
    pub r: f64,
    /// Pa
    pub p_std: f64,
    /// K
    pub t_ref: f64,
    pub kelvin_offset: f64,
    pub davies_b: f64,
    a_prefactor: f64,
    eps: Permittivity,
    rho: Density,
    vapour: Antoine,
    pub evaporation: Evaporation,
    /// g per litre: the most dissolved matter any aqueous solution holds.
    pub max_dissolved_g_per_l: f64,
    /// g per litre: below this a solid's solubility is not a bound on what a batch holds.
    pub slightly_soluble_below_g_per_l: f64,
}

impl From<PhysicalFile> for Physical {
    fn from(f: PhysicalFile) -> Self {
        Physical {
            r: f.constants.gas_constant.value,
            p_std: f.constants.standard_pressure.value,
            t_ref: f.constants.reference_temperature.value,
            kelvin_offset: f.constants.kelvin_offset.value,
            davies_b: f.davies.b.value,
            a_prefactor: f.davies.a_prefactor.value,
            eps: f.davies.permittivity,
            rho: f.davies.density,
            vapour: f.water_vapour,
            evaporation: f.evaporation,
            max_dissolved_g_per_l: f.bounds.densest_aqueous_solution.value * 1e3,
            slightly_soluble_below_g_per_l: f.bounds.slightly_soluble_below.value,
        }
    }
}

impl Physical {
    /// Evaporation rate, kg/s, of a species of molar mass `mw` (g/mol) with partial
    /// pressure `p_pa` over `area_m2` of liquid at `t_k`, in air moving at `u` m/s.
    pub fn evaporation_kg_per_s(&self, mw: f64, p_pa: f64, area_m2: f64, t_k: f64, u: f64) -> f64 {
        // Unit conversions of the customary form: lb → kg, min → s, m2 → ft2, Pa → mmHg.
        const KG_PER_LB: f64 = 0.45359237;
        const FT2_PER_M2: f64 = 1.0 / 0.09290304;
        let mmhg = p_pa * 760.0 / self.p_std;
        let e = self.evaporation;
        let lb_per_min = e.coefficient
            * u.powf(e.wind_exponent)
            * mw.powf(e.mw_exponent)
            * (area_m2 * FT2_PER_M2)
            * mmhg
            / (82.05 * t_k);
        lb_per_min * KG_PER_LB / 60.0
    }

    /// Vapour pressure of water at `t_k`, Pa.
    pub fn water_vapour_pa(&self, t_k: f64) -> f64 {
        let t = t_k - self.kelvin_offset;
        let v = self.vapour;
        // 760 mmHg make one standard atmosphere, by definition.
        10f64.powf(v.a - v.b / (v.c + t)) * self.p_std / 760.0
    }

    /// Debye–Hückel A at temperature `t_k` (about 0.51 at 25 °C).
    pub fn debye_huckel_a(&self, t_k: f64) -> f64 {
        let t = t_k - self.kelvin_offset;
        let e = self.eps;
        let eps = e.e0 + e.e1 * t + e.e2 * t * t + e.e3 * t * t * t;
        let d = self.rho;
        let rho = d.d0 + d.d1 * t + d.d2 * t * t;
        self.a_prefactor * rho.sqrt() / (eps * t_k).powf(1.5)
    }
}
