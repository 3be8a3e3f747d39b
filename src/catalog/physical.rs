//! Physical constants and water properties from `data/physical.yaml`.

use serde::Deserialize;

#[derive(Debug, Clone, Deserialize)]
pub struct PhysicalFile {
    pub constants: Constants,
    pub davies: DaviesData,
}

#[derive(Debug, Clone, Copy, Deserialize)]
pub struct Value {
    pub value: f64,
}

#[derive(Debug, Clone, Deserialize)]
pub struct Constants {
    pub gas_constant: Value,
    pub standard_pressure: Value,
    pub reference_temperature: Value,
    pub kelvin_offset: Value,
}

#[derive(Debug, Clone, Deserialize)]
pub struct DaviesData {
    pub b: Value,
    pub a_prefactor: Value,
    pub permittivity: Permittivity,
    pub density: Density,
}

#[derive(Debug, Clone, Copy, Deserialize)]
pub struct Permittivity {
    pub e0: f64,
    pub e1: f64,
    pub e2: f64,
    pub e3: f64,
}

#[derive(Debug, Clone, Copy, Deserialize)]
pub struct Density {
    pub d0: f64,
    pub d1: f64,
    pub d2: f64,
}

/// The constants the engine uses, flattened for speed.
#[derive(Debug, Clone, Copy)]
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
        }
    }
}

impl Physical {
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
