//! Activity coefficients of ions and the activity of water in concentrated electrolyte
//! solutions, by Pitzer's ion-interaction equations with binary (cation–anion) terms.
//!
//! The equations are Pitzer's (1991, ch. 3): a Debye–Hückel term with b = 1.2, and for each
//! cation–anion pair B = β0 + β1 g(α1√I) + β2 g(α2√I) and C = Cφ / (2√|z₊z₋|). Mixing terms
//! (θ, ψ) are not carried, which is the usual first approximation for a mixture. An ion the
//! parameters do not name at all takes the extended Debye–Hückel (b-dot) form instead.

use crate::catalog::pitzer::{ExtendedDebyeHuckel, PitzerPair, PitzerTable};
use smallvec::SmallVec;

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

/// How the model treats one ion.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum IonTreatment {
    /// The parameters name the ion: Pitzer's equations.
    IonInteraction,
    /// The parameters do not name it: the extended Debye–Hückel form.
    ExtendedDebyeHuckel,
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
    let (e1, e2) = ((-x1).exp(), if p.beta2 != 0.0 { (-x2).exp() } else { 0.0 });
    let (b1, b2) = (p.beta1 * pair_g(x1, e1), p.beta2 * pair_g(x2, e2));
    PairTerms {
        b: p.beta0 + b1 + b2,
        b_prime: (p.beta1 * pair_g_prime(x1, e1) + p.beta2 * pair_g_prime(x2, e2)) / i,
        b_phi: p.beta0 + p.beta1 * e1 + p.beta2 * e2,
        c: p.c_phi / (2.0 * ((p.z_cation * p.z_anion).abs() as f64).sqrt()),
    }
}

/// g(x) with e^−x already known (zero for an unused term).
fn pair_g(x: f64, e: f64) -> f64 {
    if x < 1e-3 {
        g(x)
    } else {
        2.0 * (1.0 - (1.0 + x) * e) / (x * x)
    }
}

fn pair_g_prime(x: f64, e: f64) -> f64 {
    if x < 1e-3 {
        g_prime(x)
    } else {
        -2.0 * (1.0 - (1.0 + x + 0.5 * x * x) * e) / (x * x)
    }
}

/// Inline room for the ions of one mixture.
const INLINE_IONS: usize = 32;

/// The interactions among a fixed list of ions, worked out once so that the coefficients
/// can be evaluated many times at changing molalities.
#[derive(Debug, Clone)]
pub struct Interactions<'t> {
    charges: SmallVec<[i32; INLINE_IONS]>,
    treatment: SmallVec<[IonTreatment; INLINE_IONS]>,
    /// (cation index, anion index, parameters) of every pair with parameters.
    pairs: SmallVec<[(u16, u16, &'t PitzerPair); INLINE_IONS]>,
    a_phi: f64,
    b: f64,
    fallback: ExtendedDebyeHuckel,
    /// Debye–Hückel A (log10 basis) at the temperature, for the extended form.
    debye_huckel_a: f64,
}

/// The osmotic and overall results of one evaluation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Summary {
    /// mol/kg, of the molalities the coefficients were evaluated at.
    pub ionic_strength: f64,
    pub osmotic_coefficient: f64,
    pub water_activity: f64,
}

impl<'t> Interactions<'t> {
    /// Prepares the ions given by formula and charge, with `a_phi` the osmotic Debye–Hückel
    /// slope at the solution's temperature.
    pub fn new<'f>(
        table: &'t PitzerTable,
        ions: impl IntoIterator<Item = (&'f str, i32)>,
        a_phi: f64,
    ) -> Self {
        Self::with_ids(
            table,
            ions.into_iter().map(|(f, z)| (table.ion_id(f), z)),
            a_phi,
        )
    }

    /// The same, with each ion given by its id in the table (None where no pair names it).
    pub fn with_ids(
        table: &'t PitzerTable,
        ions: impl IntoIterator<Item = (Option<u16>, i32)>,
        a_phi: f64,
    ) -> Self {
        let ions: SmallVec<[(Option<u16>, i32); INLINE_IONS]> = ions.into_iter().collect();
        let mut out = Interactions {
            charges: ions.iter().map(|i| i.1).collect(),
            treatment: ions
                .iter()
                .map(|(id, z)| {
                    if *z != 0 && id.is_some() {
                        IonTreatment::IonInteraction
                    } else {
                        IonTreatment::ExtendedDebyeHuckel
                    }
                })
                .collect(),
            pairs: SmallVec::new(),
            a_phi,
            b: table.b,
            fallback: table.fallback,
            // A_φ is a third of the Debye–Hückel A on the natural-log basis.
            debye_huckel_a: 3.0 * a_phi / std::f64::consts::LN_10,
        };
        for (c, (cid, _)) in ions.iter().enumerate().filter(|(_, i)| i.1 > 0) {
            for (a, (aid, _)) in ions.iter().enumerate().filter(|(_, i)| i.1 < 0) {
                if let (Some(ci), Some(ai)) = (cid, aid) {
                    if let Some(p) = table.pair_by_ids(*ci, *ai) {
                        out.pairs.push((c as u16, a as u16, p));
                    }
                }
            }
        }
        out
    }

    pub fn treatment(&self, k: usize) -> IonTreatment {
        self.treatment[k]
    }

    pub fn charge(&self, k: usize) -> i32 {
        self.charges[k]
    }

    /// ln γ of an ion of charge `z` by the extended Debye–Hückel form at `ionic_strength`.
    pub fn extended_ln_gamma(&self, z: i32, ionic_strength: f64) -> f64 {
        let (per_z2, shared) = self.extended_terms(ionic_strength);
        (z * z) as f64 * per_z2 + shared
    }

    /// The extended form as ln γ = z² · (first) + (second) at `ionic_strength`.
    fn extended_terms(&self, ionic_strength: f64) -> (f64, f64) {
        let fb = &self.fallback;
        let sqrt_i = ionic_strength.max(0.0).sqrt();
        let ln_10 = std::f64::consts::LN_10;
        (
            -ln_10 * self.debye_huckel_a * sqrt_i
                / (1.0 + fb.b_per_angstrom * fb.ion_size_angstrom * sqrt_i),
            ln_10 * fb.b_dot * ionic_strength,
        )
    }

    /// Cation–anion pairs with no parameters of their own (or an ion the parameters do not
    /// name): they interact only through the Debye–Hückel terms.
    pub fn unpaired(&self) -> Vec<(usize, usize)> {
        let n = self.charges.len();
        let mut out = Vec::new();
        for c in (0..n).filter(|&c| self.charges[c] > 0) {
            for a in (0..n).filter(|&a| self.charges[a] < 0) {
                if self.pair(c, a).is_none() {
                    out.push((c, a));
                }
            }
        }
        out
    }

    /// The parameters of the pair of ions c and a, when they have their own.
    pub fn pair(&self, c: usize, a: usize) -> Option<&'t PitzerPair> {
        self.pairs
            .iter()
            .find(|&&(pc, pa, _)| (pc as usize, pa as usize) == (c, a))
            .map(|&(_, _, p)| p)
    }

    /// The pairs with parameters, as (cation index, anion index, parameters).
    pub fn pairs(&self) -> impl Iterator<Item = (usize, usize, &'t PitzerPair)> + '_ {
        self.pairs
            .iter()
            .map(|&(c, a, p)| (c as usize, a as usize, p))
    }

    /// ln γ of each ion at `molalities` (mol/kg, in the order the ions were given) into
    /// `ln_gamma`; neutral entries get 0. The osmotic coefficient and water activity count
    /// every ion and neutral entry.
    pub fn evaluate(&self, molalities: &[f64], ln_gamma: &mut [f64]) -> Summary {
        let n = self.charges.len();
        debug_assert!(molalities.len() == n && ln_gamma.len() == n);
        let mut ionic_strength = 0.0;
        let mut total = 0.0;
        let mut z_sum = 0.0;
        for (m, z) in molalities.iter().zip(&self.charges) {
            let m = m.max(0.0);
            let z = *z as f64;
            ionic_strength += m * z * z;
            z_sum += m * z.abs();
            total += m;
        }
        ionic_strength *= 0.5;
        ln_gamma.iter_mut().for_each(|g| *g = 0.0);
        if ionic_strength <= 0.0 {
            return Summary {
                ionic_strength: 0.0,
                osmotic_coefficient: 1.0,
                water_activity: (-total * WATER_KG_PER_MOL).exp(),
            };
        }
        let sqrt_i = ionic_strength.sqrt();
        let b = self.b;
        let a_phi = self.a_phi;
        let mut f = -a_phi * (sqrt_i / (1.0 + b * sqrt_i) + 2.0 / b * (1.0 + b * sqrt_i).ln());
        let mut sum_mmc = 0.0;
        let mut osmotic_sum = 0.0;
        // The pair sums first add (2B + Z·C) m_partner to each ion of a pair; the terms that
        // every ion shares (F and Σ m m C) are added after.
        for &(c, a, p) in &self.pairs {
            let (c, a) = (c as usize, a as usize);
            let (mc, ma) = (molalities[c].max(0.0), molalities[a].max(0.0));
            if mc == 0.0 || ma == 0.0 {
                continue;
            }
            let t = pair_terms(p, sqrt_i);
            let mm = mc * ma;
            f += mm * t.b_prime;
            sum_mmc += mm * t.c;
            osmotic_sum += mm * (t.b_phi + z_sum * t.c);
            let v = 2.0 * t.b + z_sum * t.c;
            ln_gamma[c] += ma * v;
            ln_gamma[a] += mc * v;
        }
        let (extended_per_z2, extended_shared) = self.extended_terms(ionic_strength);
        for ((g, &z), treatment) in ln_gamma.iter_mut().zip(&self.charges).zip(&self.treatment) {
            if z == 0 {
                continue;
            }
            let z2 = (z * z) as f64;
            *g = match treatment {
                IonTreatment::IonInteraction => *g + z2 * f + z.abs() as f64 * sum_mmc,
                IonTreatment::ExtendedDebyeHuckel => z2 * extended_per_z2 + extended_shared,
            };
        }
        // Ions the parameters do not name count as ideal in the osmotic coefficient, and
        // the Debye–Hückel term is shared out by the other ions' part of the ionic strength.
        let named_ionic: f64 = molalities
            .iter()
            .zip(&self.charges)
            .zip(&self.treatment)
            .filter(|(_, t)| **t == IonTreatment::IonInteraction)
            .map(|((m, z), _)| 0.5 * m.max(0.0) * (z * z) as f64)
            .sum();
        let debye_huckel_osmotic =
            -a_phi * ionic_strength * sqrt_i / (1.0 + b * sqrt_i) * (named_ionic / ionic_strength);
        let osmotic_coefficient = if total > 0.0 {
            (total + 2.0 * (debye_huckel_osmotic + osmotic_sum)) / total
        } else {
            1.0
        };

        Summary {
            ionic_strength,
            osmotic_coefficient,
            water_activity: (-osmotic_coefficient * total * WATER_KG_PER_MOL).exp(),
        }
    }
}

/// Activity coefficients of `ions` and the activity of water, with `a_phi` the Debye–Hückel
/// slope at the solution's temperature. Neutral entries are carried with ln γ = 0.
pub fn ion_activities(table: &PitzerTable, a_phi: f64, ions: &[Ion]) -> IonActivities {
    let model = Interactions::new(table, ions.iter().map(|i| (i.formula, i.charge)), a_phi);
    let molalities: Vec<f64> = ions.iter().map(|i| i.molality).collect();
    let mut ln_gamma = vec![0.0; ions.len()];
    let s = model.evaluate(&molalities, &mut ln_gamma);
    let present = |k: usize| ions[k].molality > 0.0;
    IonActivities {
        ionic_strength: s.ionic_strength,
        ln_gamma,
        osmotic_coefficient: s.osmotic_coefficient,
        water_activity: s.water_activity,
        without_parameters: model
            .unpaired()
            .into_iter()
            .filter(|&(c, a)| present(c) && present(a))
            .collect(),
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
