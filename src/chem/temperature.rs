//! Constants at temperatures other than 25 °C.

use crate::catalog::physical::Physical;
use crate::catalog::species::{Family, Volatile};

/// log10 K at `t_k` of a reaction with log10 K `log_k_ref` at the reference temperature and
/// standard enthalpy `dh_kj` (kJ/mol), by the van 't Hoff equation.
pub fn log_k_at(phys: &Physical, log_k_ref: f64, dh_kj: f64, t_k: f64) -> f64 {
    log_k_ref - dh_kj * 1e3 / (phys.r * std::f64::consts::LN_10) * (1.0 / t_k - 1.0 / phys.t_ref)
}

/// log10 Ka of step `step` at `t_k`, by the van 't Hoff equation with the step's ΔH°.
pub fn log_ka(phys: &Physical, family: &Family, step: usize, t_k: f64) -> f64 {
    let s = &family.steps[step];
    log_k_at(phys, -s.pka, s.dh, t_k)
}

/// log10 Kw at `t_k` from the water family's pKw equation (falls back to van 't Hoff).
pub fn log_kw(phys: &Physical, water: &Family, t_k: f64) -> f64 {
    match &water.kw_equation {
        Some(eq) => -(eq.a / t_k + eq.b + eq.c * t_k),
        None => log_ka(phys, water, 0, t_k),
    }
}

/// Hcp at `t_k`, mol/(m3 Pa): Hcp(T) = Hcp(298.15 K) · exp(B (1/T − 1/298.15)).
pub fn henry_hcp(phys: &Physical, v: &Volatile, t_k: f64) -> f64 {
    v.hcp * (v.hcp_b * (1.0 / t_k - 1.0 / phys.t_ref)).exp()
}
