//! Davies activity coefficients.

use crate::catalog::physical::Physical;

/// Activity coefficients for every charge from −MAX to +MAX at one ionic strength.
#[derive(Debug, Clone, Copy)]
pub struct Gammas {
    log_gamma_unit: f64,
}

pub const MAX_CHARGE: i32 = 8;

impl Gammas {
    /// Davies: log10 γ = −A z² (√I/(1+√I) − b I). `i` is already limited by the caller.
    pub fn davies(phys: &Physical, t_k: f64, i: f64) -> Self {
        Self::davies_with_a(phys, phys.debye_huckel_a(t_k), i)
    }
    /// Davies with the Debye–Hückel A already worked out for the temperature.
    pub fn davies_with_a(phys: &Physical, a: f64, i: f64) -> Self {
        let s = i.max(0.0).sqrt();
        Gammas {
            log_gamma_unit: -a * (s / (1.0 + s) - phys.davies_b * i),
        }
    }
    pub fn ideal() -> Self {
        Gammas {
            log_gamma_unit: 0.0,
        }
    }
    /// γ for an ion of charge z.
    pub fn gamma(&self, z: i32) -> f64 {
        (self.log_gamma_unit * std::f64::consts::LN_10 * (z * z) as f64).exp()
    }
}
