//! Activity coefficients of ions and the activity of water in concentrated electrolyte
//! solutions, by Pitzer's ion-interaction equations with binary (cation–anion) terms.
//!
//! The equations are Pitzer's (1991, ch. 3): a Debye–Hückel term with b = 1.2, and for each
//! cation–anion pair B = β0 + β1 g(α1√I) + β2 g(α2√I) and C = Cφ / (2√|z₊z₋|). Mixing terms
//! (θ, ψ) are not carried yet, which is the usual first approximation for a mixture.

use crate::catalog::pitzer::{PitzerPair, PitzerTable};

/// kg of water per mole of water.
pub const WATER_KG_PER_MOL: f64 = 0.018_015_28;

/// One dissolved ion: its formula as the data write it, its charge, and mol per kg of water.
#[derive(Debug, Clone, Copy)]
pub struct Ion<'a> {
    pub formula: &'a str,
    pub charge: i32,
    pub molality: f64,
}

/// What the model gives for one solution.
#[derive(Debug, Clone, PartialEq)]
pub struct IonActivities {
    /// mol/kg.
    pub ionic_strength: f64,
    /// ln γ of each ion (molal scale), in the order the ions were given.
    pub ln_gamma: Vec<f64>,
    pub osmotic_coefficient: f64,
    pub water_activity: f64,
    /// Cation–anion pairs (indices into the ions given) that are present together but have no
    /// parameters: they interact only through the Debye–Hückel term.
    pub without_parameters: Vec<(usize, usize)>,
}

/// The Debye–Hückel slope for the osmotic coefficient at a temperature, from its value at
/// 25 °C scaled with the Debye–Hückel A (log10 basis) at the two temperatures.
pub fn a_phi(table: &PitzerTable, debye_huckel_a_at_t: f64, debye_huckel_a_at_25: f64) -> f64 {
    table.a_phi_25 * debye_huckel_a_at_t / debye_huckel_a_at_25
}

/// g(x) = 2[1 − (1 + x)e^−x]/x², and its series where the closed form loses digits.
fn g(x: f64) -> f64 {
    if x < 1e-3 {
        1.0 - 2.0 * x / 3.0 + x * x / 4.0
    } else {
        2.0 * (1.0 - (1.0 + x) * (-x).exp()) / (x * x)
    }
}

/// g'(x) = −2[1 − (1 + x + x²/2)e^−x]/x², likewise.
fn g_prime(x: f64) -> f64 {
    if x < 1e-3 {
        -x / 3.0 + x * x / 4.0
    } else {
        -2.0 * (1.0 - (1.0 + x + 0.5 * x * x) * (-x).exp()) / (x * x)
    }
}

/// One pair's B, its derivative in I, its osmotic Bφ, and C, at √I.
struct PairTerms {
    b: f64,
    b_prime: f64,
    b_phi: f64,
    c: f64,
}

fn pair_terms(p: &PitzerPair, sqrt_i: f64) -> PairTerms {
    let (x1, x2) = (p.alpha1 * sqrt_i, p.alpha2 * sqrt_i);
    let i = sqrt_i * sqrt_i;
    PairTerms {
        b: p.beta0 + p.beta1 * g(x1) + p.beta2 * g(x2),
        b_prime: (p.beta1 * g_prime(x1) + p.beta2 * g_prime(x2)) / i,
        b_phi: p.beta0 + p.beta1 * (-x1).exp() + p.beta2 * (-x2).exp(),
        c: p.c_phi / (2.0 * ((p.z_cation * p.z_anion).abs() as f64).sqrt()),
    }
}

/// Activity coefficients of `ions` and the activity of water, with `a_phi` the Debye–Hückel
/// slope at the solution's temperature. Neutral entries are carried with ln γ = 0.
pub fn ion_activities(table: &PitzerTable, a_phi: f64, ions: &[Ion]) -> IonActivities {
    let n = ions.len();
    let present = |k: usize| ions[k].molality > 0.0 && ions[k].charge != 0;
    let ionic_strength = 0.5
        * ions
            .iter()
            .map(|i| i.molality * (i.charge * i.charge) as f64)
            .sum::<f64>();
    let total: f64 = ions.iter().map(|i| i.molality.max(0.0)).sum();
    let z_sum: f64 = ions
        .iter()
        .map(|i| i.molality * i.charge.abs() as f64)
        .sum();
    if ionic_strength <= 0.0 {
        return IonActivities {
            ionic_strength: 0.0,
            ln_gamma: vec![0.0; n],
            osmotic_coefficient: 1.0,
            water_activity: (-total * WATER_KG_PER_MOL).exp(),
            without_parameters: Vec::new(),
        };
    }
    let sqrt_i = ionic_strength.sqrt();
    let b = table.b;
    let f_gamma = -a_phi * (sqrt_i / (1.0 + b * sqrt_i) + 2.0 / b * (1.0 + b * sqrt_i).ln());

    // (2B + Z·C) of each cation–anion pair, by position; zero where a pair has no data.
    let mut pair_sum = vec![0.0; n * n];
    let mut f = f_gamma;
    let mut sum_mmc = 0.0;
    let mut osmotic_sum = 0.0;
    let mut without_parameters = Vec::new();
    for c in (0..n).filter(|&k| present(k) && ions[k].charge > 0) {
        for a in (0..n).filter(|&k| present(k) && ions[k].charge < 0) {
            let Some(p) = table.pair(ions[c].formula, ions[a].formula) else {
                without_parameters.push((c, a));
                continue;
            };
            let t = pair_terms(p, sqrt_i);
            let mm = ions[c].molality * ions[a].molality;
            f += mm * t.b_prime;
            sum_mmc += mm * t.c;
            osmotic_sum += mm * (t.b_phi + z_sum * t.c);
            let v = 2.0 * t.b + z_sum * t.c;
            pair_sum[c * n + a] = v;
            pair_sum[a * n + c] = v;
        }
    }
    let ln_gamma = (0..n)
        .map(|k| {
            if !present(k) {
                return 0.0;
            }
            let z = ions[k].charge;
            let partners: f64 = (0..n)
                .filter(|&j| present(j) && (ions[j].charge > 0) != (z > 0))
                .map(|j| ions[j].molality * pair_sum[k * n + j])
                .sum();
            (z * z) as f64 * f + partners + z.abs() as f64 * sum_mmc
        })
        .collect();
    let debye_huckel_osmotic = -a_phi * ionic_strength * sqrt_i / (1.0 + b * sqrt_i);
    let osmotic_coefficient = 1.0 + 2.0 / total * (debye_huckel_osmotic + osmotic_sum);
    IonActivities {
        ionic_strength,
        ln_gamma,
        osmotic_coefficient,
        water_activity: (-osmotic_coefficient * total * WATER_KG_PER_MOL).exp(),
        without_parameters,
    }
}

/// The mean activity coefficient of a salt of `nu_cation` cations and `nu_anion` anions,
/// from its ions' ln γ.
pub fn mean_activity_coefficient(
    ln_gamma_cation: f64,
    ln_gamma_anion: f64,
    nu_cation: f64,
    nu_anion: f64,
) -> f64 {
    ((nu_cation * ln_gamma_cation + nu_anion * ln_gamma_anion) / (nu_cation + nu_anion)).exp()
}
