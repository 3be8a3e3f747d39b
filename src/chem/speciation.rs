//! The equilibrium of a mixed liquid and its headspace.
//!
//! One unknown: x = a(H+). Every family's species follow from x through its conditional
//! constants; volatile neutral species share their family's moles with the headspace by
//! Henry's law; the charge balance F(x) = 0 closes the system. F rises monotonically with
//! ln x, so a Newton step guarded by a bisection bracket converges. Activity coefficients
//! (Davies) depend on the ionic strength, which each evaluation of F also yields: the
//! coefficients follow the iterate, and the solve ends when the Newton step is below the
//! tolerance with the ionic strength (and any neutral form's activity) unchanged by it.

use arrayvec::ArrayVec;
use smallvec::SmallVec;

mod complexation;
mod concentrated;

use complexation::{Bound, Complexation};
use concentrated::{ionic_strength_bound, Concentrated};
pub use concentrated::{ActivityDetail, RangeSetBy};

use super::activity::{Gammas, MAX_CHARGE};
use super::mixture::{Closure, Mixture};
use super::temperature::{henry_hcp, log_k_at, log_ka, log_kw};
use crate::catalog::{Catalog, FamilyId, GasName};

/// Most steps any family may have (EDTA has six).
pub const MAX_STEPS: usize = 8;

/// One value per species of a family (a concentration or a fraction), most protonated
/// first: held inline, so a solve does not allocate per family.
pub type SpeciesValues = ArrayVec<f64, { MAX_STEPS + 1 }>;

/// kg of water in a litre of dilute solution (water's density at 25 °C), the scale on
/// which Henry's law constants are given.
const DILUTE_WATER_KG_PER_L: f64 = 0.997;

/// Least water per litre the molal scale follows, kg/L.
const MIN_WATER_KG_PER_L: f64 = 0.5;

#[derive(Debug, Clone, Copy)]
pub struct SolverSettings {
    /// Ionic strength above which Davies is outside its validity; coefficients are held
    /// at their value there rather than following Davies' rise at high I.
    pub activity_limit: f64,
    /// Convergence of ln a(H+).
    pub tolerance: f64,
    pub max_iterations: usize,
}

impl Default for SolverSettings {
    fn default() -> Self {
        SolverSettings {
            activity_limit: 0.5,
            tolerance: 1e-11,
            max_iterations: 200,
        }
    }
}

#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SolveError {
    #[error("the mixture has no liquid")]
    NoLiquid,
    #[error("a total is negative or not a number")]
    BadTotals,
    #[error("temperature {0:.1} K is outside 273–373 K")]
    Temperature(f64),
    #[error("family `{0}` has more steps than the solver supports")]
    TooManySteps(String),
    #[error("the charge balance could not be bracketed")]
    NoBracket,
    #[error("the solver did not converge after {0} iterations")]
    NoConvergence(usize),
}

/// The state of one family at equilibrium.
#[derive(Debug, Clone, PartialEq)]
pub struct FamilyState {
    pub family: FamilyId,
    /// Moles in liquid and gas together.
    pub total_mol: f64,
    /// mol/L of each species in the liquid, most protonated first.
    pub concentrations: SpeciesValues,
    /// Fraction of the liquid total in each species.
    pub fractions: SpeciesValues,
}

/// A species formed from two families.
#[derive(Debug, Clone, PartialEq)]
pub struct CombinedState {
    /// Index into the catalog's combined species.
    pub catalog_index: usize,
    pub formula: String,
    pub parents: (FamilyId, FamilyId),
    /// mol/L in the liquid.
    pub concentration: f64,
    pub moles_in_gas: f64,
}

/// A metal complex in the liquid.
#[derive(Debug, Clone, PartialEq)]
pub struct ComplexState {
    /// Index into the catalog's complexes.
    pub catalog_index: usize,
    pub formula: String,
    /// mol/L in the liquid.
    pub concentration: f64,
}

/// A hydroxide or oxide that formed: the metal beyond its saturation left the liquid.
#[derive(Debug, Clone, PartialEq)]
pub struct SolidState {
    /// Index into the catalog's solids.
    pub catalog_index: usize,
    pub formula: String,
    /// mol of metal per litre of liquid that left as the solid.
    pub mol_per_l: f64,
}

/// A volatile species in the headspace.
#[derive(Debug, Clone, PartialEq)]
pub struct GasState {
    /// The family the gas belongs to; for a combined species, its first parent.
    pub family: FamilyId,
    /// True when the gas is a combined species (e.g. Cl2), drawing on two families.
    pub from_combined: bool,
    pub gas: GasName,
    pub partial_pressure_pa: f64,
    pub moles_in_gas: f64,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Equilibrium {
    pub ph: f64,
    pub ionic_strength: f64,
    pub temperature_k: f64,
    pub liquid_l: f64,
    pub headspace_l: f64,
    pub closure: Closure,
    pub h_mol_per_l: f64,
    pub oh_mol_per_l: f64,
    pub families: Vec<FamilyState>,
    /// Species formed from two families (dissolved chlorine), present when both are.
    pub combined: Vec<CombinedState>,
    /// Metal complexes (cyanide, ammine, chelate, hydroxo), present when a metal and what it
    /// binds are.
    pub complexes: Vec<ComplexState>,
    /// Solids that formed, taking their metal out of the liquid.
    pub solids: Vec<SolidState>,
    pub gases: Vec<GasState>,
    /// Charge balance residual over the sum of absolute charge concentrations.
    pub relative_charge_residual: f64,
    /// True when the ionic strength passed the range where the activity model holds for
    /// this mixture (`activity_range`).
    pub activity_limited: bool,
    /// Which equations gave the activity coefficients.
    pub activity_model: ActivityModelUsed,
    /// Ionic strength in mol/kg of water.
    pub molal_ionic_strength: f64,
    /// The ionic strength (mol/kg) up to which the model's coefficients are validated for
    /// this mixture.
    pub activity_range: f64,
    /// Water's activity (1 for the dilute model, which does not follow it).
    pub water_activity: f64,
    /// How the model for concentrated mixtures treated each ion and gas (None for Davies).
    pub activity_detail: Option<Box<ActivityDetail>>,
    pub iterations: usize,
}

/// The activity model a solve used.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ActivityModelUsed {
    /// The Davies equation, for dilute mixtures.
    Davies,
    /// Pitzer's ion-interaction equations, with the extended Debye–Hückel form for ions
    /// they do not name and salting-out for neutral gases.
    IonInteraction,
}

impl Equilibrium {
    pub fn family(&self, id: FamilyId) -> Option<&FamilyState> {
        self.families.iter().find(|f| f.family == id)
    }
    /// mol/L of a metal or ligand (a family species or a strong ion) held in complexes or
    /// taken out of the liquid as a solid.
    pub fn bound_mol_per_l(&self, cat: &Catalog, part: crate::catalog::complexes::Part) -> f64 {
        use crate::catalog::complexes::Part;
        let same = |p: Part| match (p, part) {
            (Part::Family(a, _), Part::Family(b, _)) => a == b,
            (Part::Ion(a), Part::Ion(b)) => a == b,
            _ => false,
        };
        let in_complexes: f64 = self
            .complexes
            .iter()
            .map(|cs| {
                let c = &cat.complexes[cs.catalog_index];
                let as_metal = if same(c.metal) { 1.0 } else { 0.0 };
                let as_ligand = match c.ligand {
                    Some(l) if same(l) => f64::from(c.n),
                    _ => 0.0,
                };
                (as_metal + as_ligand) * cs.concentration
            })
            .sum();
        let in_solids: f64 = self
            .solids
            .iter()
            .filter(|sd| same(cat.solids[sd.catalog_index].metal))
            .map(|sd| sd.mol_per_l)
            .sum();
        in_complexes + in_solids
    }
    /// mol/L of a family held in complexes (as metal or as ligand).
    pub fn family_bound_mol_per_l(&self, cat: &Catalog, id: FamilyId) -> f64 {
        self.bound_mol_per_l(cat, crate::catalog::complexes::Part::Family(id, 0))
    }
    pub fn total_gas_pressure_pa(&self) -> f64 {
        self.gases.iter().map(|g| g.partial_pressure_pa).sum()
    }
}

/// A family prepared for fast evaluation at one temperature and ionic strength.
#[derive(Clone, Copy)]
struct Term {
    family: FamilyId,
    /// mol per litre of liquid if nothing went to the gas.
    c_total: f64,
    n: usize,
    z0: i32,
    /// Charge of the bare base (the least protonated species).
    z_base: f64,
    /// Ka of each step at the temperature (thermodynamic).
    ka: [f64; MAX_STEPS],
    /// Each step's conditional constant is Ka · γ(z)/γ(z−1) = Ka · γ(1)^(2z−1) for the
    /// acid's charge z (Davies): the exponent 2z−1 of each step, as an index into the
    /// table of powers that `set_activity` builds.
    gamma_power: [usize; MAX_STEPS],
    /// Henry's law constant of the volatile form at the temperature, mol/(m3 Pa).
    hcp: f64,
    /// Cumulative conditional constants: beta[j] = Π_{i<=j} K'_i; beta[0] = 1.
    beta: [f64; MAX_STEPS + 1],
    /// Moles in gas per mole in liquid, per unit volatile fraction:
    /// henry · V_g / (Hcp R T V_l).
    gas_factor: f64,
    /// V_g / (Hcp R T V_l) before the neutral form's activity and the molal scale.
    base_gas_factor: f64,
    volatile: usize,
    /// Partial pressure per mol/L of the neutral form, over 1/Hcp: the molal scale times the
    /// neutral form's activity coefficient.
    henry: f64,
    /// The neutral form's self-interaction λ at the temperature, when the data give one.
    lambda: Option<f64>,
    /// ln γ of each species, under the model for concentrated mixtures.
    ln_gamma: [f64; MAX_STEPS + 1],
    /// Molecules of water each step takes up (CO2 + H2O → HCO3- + H+ takes one), so that
    /// its constant carries water's activity where that is followed.
    water_taken: [f64; MAX_STEPS],
    /// What the model for concentrated mixtures needs of each species, looked up once.
    activity_data: concentrated::SpeciesData,
}

/// A combined species prepared for evaluation: parents are indices into `terms`.
#[derive(Clone, Copy)]
struct Link {
    catalog_index: usize,
    first: (usize, usize),
    second: (usize, usize),
    protons: i32,
    charge: i32,
    /// Thermodynamic formation constant at the temperature.
    k_form: f64,
    /// With the activity coefficients of the reactants and product folded in.
    k_eff: f64,
    gas_factor: f64,
}

/// The charge balance at one x, its slope in ln x, and the ionic strength there.
struct Point {
    f: f64,
    dfdlnx: f64,
    ionic: f64,
}

/// Largest |2z−1| for the charges the solver takes.
const MAX_POWER: usize = 2 * MAX_CHARGE as usize + 1;

/// The index in `set_activity`'s table of γ(1)^(2z−1) for each step of a family whose
/// most protonated species has charge `z0`.
fn gamma_powers(z0: i32, steps: usize) -> [usize; MAX_STEPS] {
    let mut out = [MAX_POWER; MAX_STEPS];
    for (j, o) in out.iter_mut().enumerate().take(steps) {
        let z_acid = (z0 - j as i32).clamp(-MAX_CHARGE, MAX_CHARGE);
        *o = (MAX_POWER as i32 + 2 * z_acid - 1) as usize;
    }
    out
}

/// Families a mixture usually holds at most; more spill to the heap.
const INLINE_TERMS: usize = 16;

struct Prepared<'c> {
    /// mol/kg of water per mol/L of liquid.
    molal: f64,
    terms: SmallVec<[Term; INLINE_TERMS]>,
    links: SmallVec<[Link; 2]>,
    /// The metal complexes the mixture can form.
    complexation: Option<Box<Complexation>>,
    /// Davies' coefficients are held through each search (set between searches by
    /// `find_root_held`), as where a solid can form.
    hold_davies: bool,
    strong_charge: f64,
    strong_ionic: f64,
    kw: f64,
    /// Kw with water's activity: [H+][OH-] γ(H+) γ(OH-) = Kw a(H2O).
    kw_eff: f64,
    inv_gamma_h: f64,
    inv_gamma_oh: f64,
    gamma1: f64,
    /// The least and greatest index into the table of powers of γ(1) that any step uses.
    powers_used: (usize, usize),
    /// The model for concentrated mixtures, when the mixture needs it.
    concentrated: Option<Concentrated<'c>>,
    /// Ionic strength above which Davies' coefficients are held.
    davies_limit: f64,
}

impl Prepared<'_> {
    /// Moves the coefficients of the concentrated model a share `step` of the way to their
    /// values for the composition at x; returns the largest change of any ln γ the whole way
    /// would make.
    fn set_concentrated_activity(&mut self, x: f64, step: f64) -> f64 {
        let h = x * self.inv_gamma_h;
        let oh = self.kw_eff * self.inv_gamma_oh / x;
        if self.concentrated.is_none() {
            return 0.0;
        }
        // The interaction model reads the families' free totals and the complexes as ions of
        // their own: what metal complexes hold is not there as the free ions.
        let mut saved: Option<SmallVec<[f64; INLINE_TERMS]>> = None;
        if self.complexation.is_some() {
            let (free, bound) = self.linked_totals(x);
            saved = Some(self.terms.iter().map(|t| t.c_total).collect());
            for (t, f) in self.terms.iter_mut().zip(&free) {
                t.c_total = f.max(0.0);
            }
            if let (Some(b), Some(conc)) = (bound, self.concentrated.as_mut()) {
                conc.set_complexes(&b.concentrations, &b.ions_bound);
            }
        }
        let Some(conc) = self.concentrated.as_mut() else {
            return 0.0;
        };
        let c = conc.update(&mut self.terms, &mut self.links, x, h, oh, step);
        if let Some(saved) = saved {
            for (t, c) in self.terms.iter_mut().zip(saved) {
                t.c_total = c;
            }
        }
        if let Some(cx) = self.complexation.as_mut() {
            cx.set_concentrated(
                &self.terms,
                |slot| conc.ion_ln_gamma(slot),
                |k| conc.complex_ln_gamma(k),
                conc.ln_water(),
            );
        }
        let (ln_h, ln_oh) = (self.inv_gamma_h.ln(), self.inv_gamma_oh.ln());
        let ln_kw = (self.kw_eff / self.kw).ln();
        let (to_h, to_oh, to_kw) = (
            c.inv_gamma_h.ln(),
            c.inv_gamma_oh.ln(),
            c.water_activity.ln(),
        );
        let change = c
            .change
            .max((to_h - ln_h).abs())
            .max((to_oh - ln_oh).abs())
            .max((to_kw - ln_kw).abs());
        self.inv_gamma_h = (ln_h + step * (to_h - ln_h)).exp();
        self.inv_gamma_oh = (ln_oh + step * (to_oh - ln_oh)).exp();
        self.kw_eff = self.kw * (ln_kw + step * (to_kw - ln_kw)).exp();
        change
    }

    fn set_activity(&mut self, g: &Gammas) {
        self.gamma1 = g.gamma(1);
        self.inv_gamma_h = 1.0 / self.gamma1;
        self.inv_gamma_oh = 1.0 / self.gamma1;
        self.kw_eff = self.kw;
        // γ(z) = γ(1)^(z²) and γ(z)/γ(z−1) = γ(1)^(2z−1): every coefficient the
        // constants need is a power of γ(1), built here by products, not one power each.
        let mut powers = [1.0; 2 * MAX_POWER + 1];
        let inverse = 1.0 / self.gamma1;
        for k in MAX_POWER + 1..=self.powers_used.1 {
            powers[k] = powers[k - 1] * self.gamma1;
        }
        for k in (self.powers_used.0..MAX_POWER).rev() {
            powers[k] = powers[k + 1] * inverse;
        }
        if !self.links.is_empty() {
            let gamma = |z: i32| {
                let z = z.clamp(-MAX_CHARGE, MAX_CHARGE);
                self.gamma1.powi(z * z)
            };
            for l in &mut self.links {
                let z1 = self.terms[l.first.0].z0 - l.first.1 as i32;
                let z2 = self.terms[l.second.0].z0 - l.second.1 as i32;
                // x is already the activity of H+, so only the other reactants and the
                // product carry activity coefficients here.
                l.k_eff = l.k_form * gamma(z1) * gamma(z2) / gamma(l.charge);
            }
        }
        for t in &mut self.terms {
            t.beta[0] = 1.0;
            for j in 0..t.n {
                t.beta[j + 1] = t.beta[j] * t.ka[j] * powers[t.gamma_power[j]];
            }
        }
        if let Some(cx) = self.complexation.as_mut() {
            cx.set_davies(self.gamma1);
        }
    }

    /// Charge balance, its slope in ln x, and the ionic strength, at x.
    fn eval(&self, x: f64) -> Point {
        if !self.links.is_empty() || self.complexation.is_some() {
            // The coupling makes the analytic slope long; a forward difference is exact
            // enough for a Newton step that the bracket guards anyway (the root is where the
            // balance itself vanishes, whatever the slope's last digits).
            let d: f64 = 1e-6;
            let (f, ionic) = self.balance_linked(x);
            let slope = (self.balance_linked(x * d.exp()).0 - f) / d;
            return Point {
                f,
                dfdlnx: slope,
                ionic,
            };
        }
        let h = x * self.inv_gamma_h;
        let oh = self.kw_eff * self.inv_gamma_oh / x;
        let mut f = h - oh + self.strong_charge;
        let mut d = h + oh;
        let mut ionic = self.strong_ionic + h + oh;
        for t in &self.terms {
            let c = term_charge(t, x);
            f += c.charge;
            d += c.slope;
            ionic += c.ionic;
        }
        Point {
            f,
            dfdlnx: d,
            ionic: 0.5 * ionic,
        }
    }

    /// Sets each self-interacting neutral form's activity coefficient from its molality at
    /// x; true when none changed.
    fn update_neutral_activity(&mut self, x: f64, molal_scale: f64) -> bool {
        let mut settled = true;
        let molal = self.molal;
        for t in self.terms.iter_mut() {
            let Some(lambda) = t.lambda else {
                continue;
            };
            let mo = moments(t, x);
            let neutral = liquid_total(t, mo.volatile_share) * mo.volatile_share;
            let gamma = (2.0 * lambda * neutral * molal).exp();
            let henry = molal_scale * gamma;
            if (henry - t.henry).abs() > 1e-12 * henry {
                settled = false;
            }
            t.henry = henry;
            t.gas_factor = t.base_gas_factor * henry;
        }
        settled
    }

    /// Moles per litre of liquid (liquid and gas together) of each link's species at x.
    fn link_amount(&self, l: &Link, x: f64) -> f64 {
        let (ta, tb) = (&self.terms[l.first.0], &self.terms[l.second.0]);
        let fa = liquid_species_fraction(ta, x, l.first.1);
        let fb = liquid_species_fraction(tb, x, l.second.1);
        let kappa = l.k_eff * x.powi(l.protons) * fa * fb * (1.0 + l.gas_factor);
        // y = kappa (A − y)(B − y): the smaller root, written to avoid cancellation.
        let (a, b) = (ta.c_total, tb.c_total);
        let s = kappa * (a + b) + 1.0;
        let disc = (s * s - 4.0 * kappa * kappa * a * b).max(0.0);
        2.0 * kappa * a * b / (s + disc.sqrt())
    }

    /// Each term's free total after the links and then the metal complexes have taken their
    /// share of it, at x, with the complexes.
    fn linked_totals(&self, x: f64) -> (SmallVec<[f64; INLINE_TERMS]>, Option<Bound>) {
        let mut totals: SmallVec<[f64; INLINE_TERMS]> =
            self.terms.iter().map(|t| t.c_total).collect();
        for l in &self.links {
            let y = self.link_amount(l, x);
            totals[l.first.0] -= y;
            totals[l.second.0] -= y;
        }
        let bound = self.complexation.as_ref().map(|cx| {
            let b = cx.solve_at(&self.terms, &totals, x);
            for (t, taken) in totals.iter_mut().zip(&b.taken) {
                *t -= taken;
            }
            b
        });
        (totals, bound)
    }

    /// Each term as it stands after the links and the complexes have taken their share of its
    /// total, at x, with the complexes.
    fn linked_terms(&self, x: f64) -> (SmallVec<[Term; INLINE_TERMS]>, Option<Bound>) {
        let (totals, bound) = self.linked_totals(x);
        let terms = self
            .terms
            .iter()
            .zip(&totals)
            .map(|(t, &total)| Term {
                c_total: total.max(0.0),
                ..*t
            })
            .collect();
        (terms, bound)
    }

    /// The charge balance and the ionic strength at x, with the links taking their share.
    fn balance_linked(&self, x: f64) -> (f64, f64) {
        let h = x * self.inv_gamma_h;
        let oh = self.kw_eff * self.inv_gamma_oh / x;
        let mut f = h - oh + self.strong_charge;
        let mut ionic = self.strong_ionic + h + oh;
        let (totals, bound) = self.linked_totals(x);
        for (t, &total) in self.terms.iter().zip(&totals) {
            let c = term_charge_of(t, total.max(0.0), x);
            f += c.charge;
            ionic += c.ionic;
        }
        if let Some(b) = bound {
            f += b.charge;
            ionic += b.ionic;
        }
        for l in &self.links {
            if l.charge != 0 {
                let z = l.charge as f64;
                let c = self.link_amount(l, x) / (1.0 + l.gas_factor);
                f += z * c;
                ionic += z * z * c;
            }
        }
        (f, 0.5 * ionic)
    }
}

/// Share of a term's total that sits in the liquid as species `sp`, at x.
fn liquid_species_fraction(t: &Term, x: f64, sp: usize) -> f64 {
    let mut w = [0.0; MAX_STEPS + 1];
    let d = weights(t, x, &mut w);
    let alpha = w[sp] / d;
    if t.gas_factor == 0.0 {
        alpha
    } else {
        alpha / (1.0 + t.gas_factor * w[t.volatile] / d)
    }
}

/// Unnormalised species weights w_j = beta_j x^(n−j), and their sum.
#[inline]
fn weights(t: &Term, x: f64, w: &mut [f64; MAX_STEPS + 1]) -> f64 {
    let mut sum = 0.0;
    let mut xp = 1.0;
    for j in (0..=t.n).rev() {
        w[j] = t.beta[j] * xp;
        sum += w[j];
        xp *= x;
    }
    sum
}

/// A family's speciation at x summarised by the number of protons above the bare base:
/// its mean and mean square over the species, and the volatile species' share.
struct Moments {
    m1: f64,
    m2: f64,
    volatile_share: f64,
}

#[inline]
fn moments(t: &Term, x: f64) -> Moments {
    // The species with k protons above the bare base weighs beta[n−k] x^k.
    let (mut sum, mut s1, mut s2, mut wv) = (0.0, 0.0, 0.0, 0.0);
    let mut xp = 1.0;
    let volatile_k = t.n - t.volatile;
    for (k, &b) in t.beta[..=t.n].iter().rev().enumerate() {
        let w = b * xp;
        let kf = k as f64;
        sum += w;
        s1 += kf * w;
        s2 += kf * kf * w;
        if k == volatile_k {
            wv = w;
        }
        xp *= x;
    }
    let inv = 1.0 / sum;
    Moments {
        m1: s1 * inv,
        m2: s2 * inv,
        volatile_share: wv * inv,
    }
}

/// A family's charge concentration in the liquid, its slope in ln x, and its Σ z² c.
struct Contribution {
    charge: f64,
    slope: f64,
    ionic: f64,
}

#[inline]
fn term_charge(t: &Term, x: f64) -> Contribution {
    term_charge_of(t, t.c_total, x)
}

/// As `term_charge`, for a total of `c_total` mol/L rather than the term's own.
#[inline]
fn term_charge_of(t: &Term, c_total: f64, x: f64) -> Contribution {
    let mo = moments(t, x);
    let zbar = t.z_base + mo.m1;
    let dzbar = mo.m2 - mo.m1 * mo.m1;
    // Σ z_j² α_j with z = z_base + k.
    let z2bar = t.z_base * t.z_base + 2.0 * t.z_base * mo.m1 + mo.m2;
    if t.gas_factor == 0.0 {
        return Contribution {
            charge: c_total * zbar,
            slope: c_total * dzbar,
            ionic: c_total * z2bar,
        };
    }
    let av = mo.volatile_share;
    let dav = av * ((t.n - t.volatile) as f64 - mo.m1);
    let denom = 1.0 + t.gas_factor * av;
    let c_aq = c_total / denom;
    Contribution {
        charge: c_aq * zbar,
        slope: c_aq * dzbar - c_total * zbar * t.gas_factor * dav / (denom * denom),
        ionic: c_aq * z2bar,
    }
}

/// The constants of one catalog at one temperature.
struct TemperatureConstants {
    stamp: Option<crate::catalog::Stamp>,
    t_bits: u64,
    kw: f64,
    debye_huckel_a: f64,
    /// The osmotic Debye–Hückel slope of the concentrated model.
    a_phi: f64,
    /// Each family's term at the temperature, before the mixture's amounts and volumes.
    families: Vec<Option<Term>>,
    /// What of each family does not depend on the temperature, kept while the catalog is
    /// the same (a pour and its heat move the temperature from solve to solve).
    fixed: Vec<Option<FamilyFixed>>,
}

/// What a family's term takes from the catalog that no temperature changes.
#[derive(Clone, Copy)]
struct FamilyFixed {
    water_taken: [f64; MAX_STEPS],
    activity_data: concentrated::SpeciesData,
}

thread_local! {
    /// The constants at the temperature last solved at: states along a pour mostly share a
    /// temperature, so each family's van 't Hoff and Henry factors are worked out once per
    /// temperature rather than once per solve.
    static CONSTANTS: std::cell::RefCell<TemperatureConstants> =
        const { std::cell::RefCell::new(TemperatureConstants::empty()) };
}

impl TemperatureConstants {
    /// Points the cache at `cat` and `t_k`, emptying it when either changed.
    fn select(&mut self, cat: &Catalog, t_k: f64) {
        if self.stamp == Some(cat.stamp()) && self.t_bits == t_k.to_bits() {
            return;
        }
        if self.stamp != Some(cat.stamp()) {
            self.fixed.clear();
            self.fixed.resize(cat.families.len(), None);
        }
        let phys = &cat.physical;
        self.stamp = Some(cat.stamp());
        self.t_bits = t_k.to_bits();
        self.kw = (log_kw(phys, cat.family(cat.water), t_k) * std::f64::consts::LN_10).exp();
        self.debye_huckel_a = phys.debye_huckel_a(t_k);
        self.a_phi = super::pitzer::a_phi(
            &cat.pitzer,
            self.debye_huckel_a,
            phys.debye_huckel_a(phys.t_ref),
        );
        self.families.clear();
        self.families.resize(cat.families.len(), None);
    }

    fn family(&mut self, cat: &Catalog, fid: FamilyId, t_k: f64) -> &Term {
        let fixed = *self.fixed[fid.0].get_or_insert_with(|| {
            let fam = cat.family(fid);
            let steps = fam.steps.len().min(MAX_STEPS);
            FamilyFixed {
                water_taken: water_taken(fam, steps),
                activity_data: concentrated::SpeciesData::of(cat, fam, steps),
            }
        });
        self.families[fid.0].get_or_insert_with(|| term_at(cat, fid, t_k, fixed))
    }
}

/// A family's term at one temperature, with no amount in it yet.
fn term_at(cat: &Catalog, fid: FamilyId, t_k: f64, fixed: FamilyFixed) -> Term {
    let fam = cat.family(fid);
    let phys = &cat.physical;
    let steps = fam.steps.len().min(MAX_STEPS);
    let mut ka = [0.0; MAX_STEPS];
    for (j, v) in ka.iter_mut().enumerate().take(steps) {
        *v = (log_ka(phys, fam, j, t_k) * std::f64::consts::LN_10).exp();
    }
    let hcp = fam
        .volatile
        .as_ref()
        .map_or(0.0, |v| henry_hcp(phys, v, t_k));
    let z0 = fam.species[0].charge;
    Term {
        family: fid,
        c_total: 0.0,
        n: steps,
        z0,
        z_base: (z0 - steps as i32) as f64,
        ka,
        gamma_power: gamma_powers(z0, steps),
        hcp,
        beta: [0.0; MAX_STEPS + 1],
        gas_factor: 0.0,
        base_gas_factor: 0.0,
        volatile: fam.volatile_index().unwrap_or(0),
        henry: 1.0,
        ln_gamma: [0.0; MAX_STEPS + 1],
        water_taken: fixed.water_taken,
        activity_data: fixed.activity_data,
        lambda: fam
            .volatile
            .as_ref()
            .and_then(|v| v.self_interaction.as_ref())
            .map(|si| si.lambda(t_k)),
    }
}

/// Molecules of water each step of a family takes up, read from the formulas: an acid that
/// gains w O and 2w − 1 H on losing its proton has taken up w waters.
fn water_taken(fam: &crate::catalog::species::Family, steps: usize) -> [f64; MAX_STEPS] {
    use crate::basics::notation::atom_count;
    let mut out = [0.0; MAX_STEPS];
    for (j, w) in out.iter_mut().enumerate().take(steps) {
        let (acid, base) = (&fam.species[j].formula, &fam.species[j + 1].formula);
        let count = |f: &str, e: &str| atom_count(f, e).map(i64::from);
        if let (Some(oa), Some(ob), Some(ha), Some(hb)) = (
            count(acid, "O"),
            count(base, "O"),
            count(acid, "H"),
            count(base, "H"),
        ) {
            let taken = ob - oa;
            if taken > 0 && hb + 1 - ha == 2 * taken {
                *w = taken as f64;
            }
        }
    }
    out
}

/// Solves the equilibrium of `m` and its headspace.
pub fn solve(cat: &Catalog, m: &Mixture, s: &SolverSettings) -> Result<Equilibrium, SolveError> {
    solve_from(cat, m, s, None)
}

/// Solves the equilibrium of `m`, starting from the pH and ionic strength of `near` (a
/// neighbouring state: the previous point along a pour, or the same mixture at another
/// temperature). The result does not depend on the start, only the work does.
pub fn solve_from(
    cat: &Catalog,
    m: &Mixture,
    s: &SolverSettings,
    near: Option<&Equilibrium>,
) -> Result<Equilibrium, SolveError> {
    if !(m.liquid_l > 0.0 && m.liquid_l.is_finite()) {
        return Err(SolveError::NoLiquid);
    }
    if !(273.0..=373.5).contains(&m.temperature_k) {
        return Err(SolveError::Temperature(m.temperature_k));
    }
    for &(fid, _) in &m.families {
        let fam = cat.family(fid);
        if fam.steps.len() > MAX_STEPS {
            return Err(SolveError::TooManySteps(fam.id.clone()));
        }
    }
    CONSTANTS.with(|c| match c.try_borrow_mut() {
        Ok(mut c) => solve_with(cat, m, s, near, &mut c),
        // Only a solve inside a solve would find the cache taken; it gets its own.
        Err(_) => solve_with(cat, m, s, near, &mut TemperatureConstants::empty()),
    })
}

impl TemperatureConstants {
    const fn empty() -> Self {
        TemperatureConstants {
            stamp: None,
            t_bits: u64::MAX,
            kw: 0.0,
            debye_huckel_a: 0.0,
            a_phi: 0.0,
            families: Vec::new(),
            fixed: Vec::new(),
        }
    }
}

fn solve_with(
    cat: &Catalog,
    m: &Mixture,
    s: &SolverSettings,
    near: Option<&Equilibrium>,
    constants: &mut TemperatureConstants,
) -> Result<Equilibrium, SolveError> {
    constants.select(cat, m.temperature_k);
    let vessel = Vessel::of(m);
    let (strong_charge, strong_ionic) = strong_ion_sums(cat, m)?;
    let mut p = Prepared::bare(&vessel, strong_charge, strong_ionic, constants.kw, s);
    p.add_families(cat, m, constants, &vessel)?;
    p.add_links(cat, m.temperature_k, &vessel);
    p.complexation = Complexation::new(
        cat,
        &p.terms,
        &m.ions,
        vessel.liquid_l,
        m.temperature_k,
        near,
    )
    .map(Box::new);

    // Only a mixture whose ionic strength could pass the dilute range may need the model for
    // concentrated mixtures; whether it does is read off the dilute solve.
    let could_be_concentrated = ionic_strength_bound(cat, &m.ions, &m.families, vessel.liquid_l)
        * vessel.molal
        > cat.pitzer.dilute_below;
    let (ionic, ln_x) = starting_point(near, strong_ionic, &p.terms);
    let activity = Activity {
        phys: &cat.physical,
        debye_huckel_a: constants.debye_huckel_a,
        molal_scale: vessel.molal_scale,
    };
    let mut root = if p.complexation.as_ref().is_some_and(|cx| cx.has_solids()) {
        find_root_held(&mut p, ln_x, ionic, s, &activity)?
    } else {
        find_root(&mut p, ln_x, ionic, s, &activity)?
    };
    // Above the dilute range the ion-interaction model takes over, from the dilute root;
    // below it Davies, which is cheaper and gives the same coefficients there.
    if could_be_concentrated && root.ionic * vessel.molal > cat.pitzer.dilute_below {
        p.concentrated = Some(concentrated_model(cat, m, &p, constants, &vessel));
        hold_concentrated_at(&mut p, &root);
        let dilute_iterations = root.iterations;
        root = find_root_concentrated(&mut p, root.x.ln(), s, &activity)?;
        root.iterations += dilute_iterations;
    }
    let mut eq = assemble(cat, m, &p, &root, vessel.gas_l);
    eq.molal_ionic_strength = eq.ionic_strength * vessel.molal;
    if let Some(conc) = &p.concentrated {
        describe_concentrated(&mut eq, conc, &p.terms);
    }
    Ok(eq)
}

/// The volumes a solve works with, and the molal scale of its liquid.
struct Vessel {
    liquid_l: f64,
    /// The headspace that shares the gases with the liquid, L.
    gas_l: f64,
    /// mol/kg of water per mol/L of liquid.
    molal: f64,
    /// The molal scale over dilute solution's, on which Henry's law constants are given.
    molal_scale: f64,
}

impl Vessel {
    fn of(m: &Mixture) -> Self {
        let vl = m.liquid_l;
        let gas_l = if m.closure == Closure::Open {
            // An open vessel's air is the room: the liquid keeps its gas, which is the
            // conservative figure for what reaches a face at the opening.
            0.0
        } else {
            m.headspace_l.max(0.0)
        };
        // Henry's law holds on the molal scale: per mol/L of liquid, a mol/kg of water is
        // 1/water_kg_per_l; the constants are for dilute solution, where that is 1/0.997.
        // Below half a kilogram of water per litre the liquid is mostly something else and
        // outside the aqueous model: the scale is held there rather than followed to infinity.
        let water_kg_per_l = match m.water_kg {
            Some(w) => (w / vl).max(MIN_WATER_KG_PER_L),
            None => DILUTE_WATER_KG_PER_L,
        };
        Vessel {
            liquid_l: vl,
            gas_l,
            molal: 1.0 / water_kg_per_l,
            molal_scale: DILUTE_WATER_KG_PER_L / water_kg_per_l,
        }
    }

    /// Moles in the headspace per mole in the liquid, per unit of the volatile form and
    /// before its activity, for a Henry's law constant `hcp` (mol/(m3 Pa)).
    fn gas_factor(&self, hcp: f64, phys: &crate::catalog::physical::Physical, t_k: f64) -> f64 {
        (self.gas_l / self.liquid_l) / (hcp * phys.r * t_k)
    }
}

/// The strong ions' charge and Σ z² c, mol/L.
fn strong_ion_sums(cat: &Catalog, m: &Mixture) -> Result<(f64, f64), SolveError> {
    let vl = m.liquid_l;
    let mut strong_charge = 0.0;
    let mut strong_ionic = 0.0;
    for &(ion, n) in &m.ions {
        if !(n.is_finite() && n >= 0.0) {
            return Err(SolveError::BadTotals);
        }
        let z = cat.ion(ion).charge as f64;
        strong_charge += z * n / vl;
        strong_ionic += z * z * n / vl;
    }
    Ok((strong_charge, strong_ionic))
}

/// Where the search starts: the ionic strength and ln a(H+) of the neighbouring state, or
/// the strong ions plus each family half-charged at pH 7.
fn starting_point(near: Option<&Equilibrium>, strong_ionic: f64, terms: &[Term]) -> (f64, f64) {
    match near {
        Some(e) if e.ionic_strength.is_finite() && e.ph.is_finite() => {
            (e.ionic_strength, -e.ph * std::f64::consts::LN_10)
        }
        _ => (
            0.5 * strong_ionic + 0.5 * terms.iter().map(|t| t.c_total).sum::<f64>(),
            (1e-7f64).ln(),
        ),
    }
}

impl<'c> Prepared<'c> {
    /// A mixture of the strong ions alone, with ideal coefficients.
    fn bare(
        vessel: &Vessel,
        strong_charge: f64,
        strong_ionic: f64,
        kw: f64,
        s: &SolverSettings,
    ) -> Self {
        Prepared {
            molal: vessel.molal,
            terms: SmallVec::new(),
            links: SmallVec::new(),
            complexation: None,
            hold_davies: false,
            strong_charge,
            strong_ionic,
            kw,
            kw_eff: kw,
            inv_gamma_h: 1.0,
            inv_gamma_oh: 1.0,
            gamma1: 1.0,
            powers_used: (MAX_POWER, MAX_POWER),
            concentrated: None,
            davies_limit: s.activity_limit,
        }
    }

    /// A term for each family the mixture holds (water and empty families aside).
    fn add_families(
        &mut self,
        cat: &Catalog,
        m: &Mixture,
        constants: &mut TemperatureConstants,
        vessel: &Vessel,
    ) -> Result<(), SolveError> {
        let t_k = m.temperature_k;
        for &(fid, n) in &m.families {
            if !(n.is_finite() && n >= 0.0) {
                return Err(SolveError::BadTotals);
            }
            if fid == cat.water || n == 0.0 {
                continue;
            }
            let mut term = *constants.family(cat, fid, t_k);
            for &g in &term.gamma_power[..term.n] {
                self.powers_used = (self.powers_used.0.min(g), self.powers_used.1.max(g));
            }
            let gas_factor = if term.hcp > 0.0 && vessel.gas_l > 0.0 {
                vessel.gas_factor(term.hcp, &cat.physical, t_k)
            } else {
                0.0
            };
            term.c_total = n / vessel.liquid_l;
            term.gas_factor = gas_factor * vessel.molal_scale;
            term.base_gas_factor = gas_factor;
            term.henry = vessel.molal_scale;
            self.terms.push(term);
        }
        Ok(())
    }

    /// A link for each combined species whose two parent families the mixture holds.
    fn add_links(&mut self, cat: &Catalog, t_k: f64, vessel: &Vessel) {
        let phys = &cat.physical;
        for (ci, c) in cat.combined.iter().enumerate() {
            let find = |f: FamilyId| self.terms.iter().position(|t| t.family == f);
            let (Some(a), Some(b)) = (find(c.first.0), find(c.second.0)) else {
                continue;
            };
            let d = &c.data;
            let log_k = log_k_at(phys, d.log_k_formation, d.dh_formation, t_k);
            let gas_factor = match &d.volatile {
                Some(v) if vessel.gas_l > 0.0 => {
                    let hcp = v.hcp * (v.hcp_b * (1.0 / t_k - 1.0 / phys.t_ref)).exp();
                    vessel.gas_factor(hcp, phys, t_k)
                }
                _ => 0.0,
            };
            self.links.push(Link {
                catalog_index: ci,
                first: (a, c.first.1),
                second: (b, c.second.1),
                protons: d.protons,
                charge: d.charge,
                k_form: (log_k * std::f64::consts::LN_10).exp(),
                k_eff: 0.0,
                gas_factor,
            });
        }
    }
}

/// The model for concentrated mixtures, set up for the mixture's ions, terms and complexes.
fn concentrated_model<'c>(
    cat: &'c Catalog,
    m: &Mixture,
    p: &Prepared,
    constants: &TemperatureConstants,
    vessel: &Vessel,
) -> Concentrated<'c> {
    let complex_charges = p
        .complexation
        .as_ref()
        .map(|cx| cx.charges().collect::<SmallVec<[i32; 24]>>())
        .unwrap_or_default();
    Concentrated::new(
        cat,
        &m.ions,
        vessel.liquid_l,
        &p.terms,
        vessel.molal,
        vessel.molal_scale,
        constants.a_phi,
        constants.debye_huckel_a,
        m.temperature_k,
        &complex_charges,
    )
}

/// Sets where the concentrated model's coefficients are held, from the composition at the
/// dilute root, with the complexes (and the free totals they leave) as the coefficients will
/// read them.
fn hold_concentrated_at(p: &mut Prepared, root: &Root) {
    let h = root.x * p.inv_gamma_h;
    let oh = p.kw_eff * p.inv_gamma_oh / root.x;
    let free_terms = p.complexation.is_some().then(|| {
        let (terms, bound) = p.linked_terms(root.x);
        if let (Some(b), Some(conc)) = (bound, p.concentrated.as_mut()) {
            conc.set_complexes(&b.concentrations, &b.ions_bound);
        }
        terms
    });
    if let Some(conc) = p.concentrated.as_mut() {
        conc.hold_at_range(free_terms.as_deref().unwrap_or(&p.terms), root.x, h, oh);
    }
}

/// Writes what the model for concentrated mixtures made of the solution into `eq`.
fn describe_concentrated(eq: &mut Equilibrium, conc: &Concentrated, terms: &[Term]) {
    eq.activity_model = ActivityModelUsed::IonInteraction;
    eq.molal_ionic_strength = conc.ionic_strength();
    let (range, set_by) = conc.validated_range();
    eq.activity_range = range;
    eq.activity_detail = Some(Box::new(conc.detail(terms, set_by)));
    eq.activity_limited = eq.molal_ionic_strength > eq.activity_range;
    eq.water_activity = conc.summary.water_activity;
}

/// The largest change of any ln γ at which the concentrated model's coefficients count as
/// settled.
const COEFFICIENTS_SETTLED: f64 = 1e-10;

/// The bracket of ln a(H+) the solver searches: pH 30 to pH −10 (in strong caustic and
/// fuming acids the concentrated model's coefficients can put the activity of OH- or H+ far
/// above its molality).
const LN_X_LO: f64 = -69.07755278982137; // ln 1e-30
const LN_X_HI: f64 = 23.025850929940457; // ln 1e10

/// What the activity coefficients are worked out from.
struct Activity<'a> {
    phys: &'a crate::catalog::physical::Physical,
    debye_huckel_a: f64,
    molal_scale: f64,
}

/// The solver's answer before it is written out per species.
struct Root {
    x: f64,
    ionic: f64,
    limited: bool,
    iterations: usize,
}

/// Most rounds of coefficients a concentrated mixture's solve may take.
const MAX_COEFFICIENT_ROUNDS: usize = 200;

/// The least share of the way a round moves the coefficients.
const MIN_COEFFICIENT_STEP: f64 = 1.0 / 64.0;

/// The root of a concentrated mixture: a bracketed Newton search with the coefficients held,
/// then the coefficients set from the composition there, in rounds until they settle. The
/// coefficients of a concentrated mixture move the charge balance by more than a search that
/// follows them at every step can bracket; held, each search is an ordinary one and starts
/// from the last root.
fn find_root_concentrated(
    p: &mut Prepared,
    start: f64,
    s: &SolverSettings,
    a: &Activity,
) -> Result<Root, SolveError> {
    // The first composition is read with ideal coefficients.
    p.set_activity(&Gammas::ideal());
    p.set_concentrated_activity(start.exp(), 1.0);
    let mut ln_x = start;
    let mut iterations = 0;
    // Each round moves the coefficients the whole way while that converges; where a round
    // undoes the last (the coefficients and the speciation push each other back and forth,
    // as in fuming acids), the step is halved.
    let mut step = 1.0;
    let mut last_change = f64::INFINITY;
    for _ in 0..MAX_COEFFICIENT_ROUNDS {
        let r = find_root(p, ln_x, 0.0, s, a)?;
        iterations += r.iterations;
        ln_x = r.x.ln();
        let full_step = step == 1.0;
        let change = p.set_concentrated_activity(r.x, step);
        // Taken the whole way, the rounds converge geometrically: the next change is about
        // this one times the ratio of this one to the last. Where that is already below the
        // settled level, another round would not move the root.
        let next_change = if full_step && last_change.is_finite() && change < 0.5 * last_change {
            change * (change / last_change)
        } else {
            change
        };
        if change >= 0.95 * last_change {
            step = (step * 0.5).max(MIN_COEFFICIENT_STEP);
        } else if change > 0.5 * last_change {
            // Converging, but slowly: a longer step may still be stable.
            step = (step * 1.5).min(1.0);
        }
        last_change = change;
        if next_change <= COEFFICIENTS_SETTLED {
            // One more search with the coefficients that hold at the root.
            let last = find_root(p, ln_x, 0.0, s, a)?;
            return Ok(Root {
                iterations: iterations + last.iterations,
                ..last
            });
        }
    }
    Err(SolveError::NoConvergence(iterations))
}

/// The root of a dilute mixture in which a solid can form: Davies' coefficients held through
/// each bracketed search and set from its root between searches. Where a solid starts to
/// form the balance has a kink that the coefficients move; followed at every step, the search
/// and the coefficients can push the root back and forth across it. Held, each search is of
/// a fixed continuous function; the ionic strength is then iterated to its fixed point, the
/// step halved where it swings back.
fn find_root_held(
    p: &mut Prepared,
    start: f64,
    start_ionic: f64,
    s: &SolverSettings,
    a: &Activity,
) -> Result<Root, SolveError> {
    let limit = s.activity_limit;
    let (mut ionic, mut ln_x) = (start_ionic, start);
    let (mut step, mut last_change, mut iterations): (f64, f64, usize) = (1.0, 0.0, 0);
    p.hold_davies = true;
    let mut result = Err(SolveError::NoConvergence(0));
    for _ in 0..MAX_COEFFICIENT_ROUNDS {
        p.set_activity(&Gammas::davies_with_a(
            a.phys,
            a.debye_huckel_a,
            ionic.min(limit),
        ));
        let r = match find_root(p, ln_x, ionic, s, a) {
            Ok(r) => r,
            Err(e) => {
                result = Err(e);
                break;
            }
        };
        iterations += r.iterations;
        ln_x = r.x.ln();
        let neutrals_settled = p.update_neutral_activity(r.x, a.molal_scale);
        let change = r.ionic - ionic;
        // Davies' coefficients move with the square root of the ionic strength, so that is
        // what has to settle; a relative test on I itself meets the root's own rounding in
        // nearly pure water.
        let settled = (r.ionic.sqrt() - ionic.max(0.0).sqrt()).abs() <= 1e-10
            || (ionic > limit && r.ionic > limit);
        if settled && neutrals_settled {
            result = Ok(Root {
                iterations,
                limited: ionic > limit,
                ..r
            });
            break;
        }
        if change * last_change < 0.0 {
            step = (step * 0.5).max(MIN_COEFFICIENT_STEP);
        }
        last_change = change;
        ionic += step * change;
        result = Err(SolveError::NoConvergence(iterations));
    }
    p.hold_davies = false;
    result
}

/// Safeguarded Newton in ln x within a bracket where the charge balance changes sign, with
/// the activity coefficients following the iterate.
///
/// The charge balance is negative at the bracket's low end and positive at its high end
/// whatever the coefficients, so the full bracket is never checked up front: a root that
/// would lie outside it shows as an iterate that ends on one of its ends. A bracket
/// narrowed under earlier coefficients may no longer hold under new ones; when it closes
/// without a root in it, the search starts again from the full bracket.
fn find_root(
    p: &mut Prepared,
    start: f64,
    start_ionic: f64,
    s: &SolverSettings,
    a: &Activity,
) -> Result<Root, SolveError> {
    // The concentrated model's coefficients are held for this search and set between
    // searches (`find_root_concentrated`).
    let held = p.concentrated.is_some() || p.hold_davies;
    let mut davies = DaviesFollower {
        ionic: start_ionic,
        limit: s.activity_limit,
        held,
    };
    if !held {
        p.set_activity(&davies.coefficients(a));
    }
    let mut bracket = Bracket::full();
    let mut x = start.clamp(bracket.lo, bracket.hi);
    for it in 1..=s.max_iterations {
        let ax = x.exp();
        let pt = p.eval(ax);
        if !(pt.f.is_finite() && pt.ionic.is_finite()) {
            return Err(SolveError::NoConvergence(it));
        }
        bracket.narrow(x, pt.f);
        let newton = if pt.dfdlnx > 0.0 {
            x - pt.f / pt.dfdlnx
        } else {
            f64::NAN
        };
        let settled = davies.follow(p, &pt, ax, a);
        bracket.stale |= !settled;
        let root_at = |ln_x: f64| Root {
            x: ln_x.exp(),
            ionic: pt.ionic,
            limited: davies.limited(),
            iterations: it,
        };
        // A Newton step below the tolerance, with coefficients that the step no longer
        // changes, is the root (the step may land on one of the bracket's ends).
        if newton.is_finite() && (newton - x).abs() < s.tolerance {
            if settled {
                return Ok(root_at(newton));
            }
            x = newton;
            continue;
        }
        if bracket.width() < s.tolerance {
            if bracket.against_full_ends() {
                // The charge balance keeps its sign over the whole range.
                return Err(SolveError::NoBracket);
            }
            if !bracket.stale && settled {
                // Closed on a root that rounding keeps the Newton step from confirming.
                return Ok(root_at(bracket.middle()));
            }
            bracket = Bracket::full();
        }
        x = bracket.guarded(newton);
    }
    Err(SolveError::NoConvergence(s.max_iterations))
}

/// The interval of ln x known to hold the root.
struct Bracket {
    lo: f64,
    hi: f64,
    /// True when the coefficients changed since the bracket was last the full one.
    stale: bool,
}

impl Bracket {
    fn full() -> Self {
        Bracket {
            lo: LN_X_LO,
            hi: LN_X_HI,
            stale: false,
        }
    }

    /// Keeps the side of `ln_x` on which the charge balance `f` changes sign.
    fn narrow(&mut self, ln_x: f64, f: f64) {
        if f > 0.0 {
            self.hi = ln_x;
        } else {
            self.lo = ln_x;
        }
    }

    fn width(&self) -> f64 {
        self.hi - self.lo
    }

    fn middle(&self) -> f64 {
        0.5 * (self.lo + self.hi)
    }

    /// True when the bracket has closed on an end of the full range, where no root is.
    fn against_full_ends(&self) -> bool {
        self.lo <= LN_X_LO || self.hi >= LN_X_HI
    }

    /// The Newton step where it stays inside the bracket, else bisection.
    fn guarded(&self, newton: f64) -> f64 {
        if newton.is_finite() && newton > self.lo && newton < self.hi {
            newton
        } else {
            self.middle()
        }
    }
}

/// Davies' coefficients following a search's iterates through their ionic strength.
struct DaviesFollower {
    /// The ionic strength the coefficients were last set at.
    ionic: f64,
    /// Above it Davies is outside its validity and the coefficients no longer change with I.
    limit: f64,
    /// True when the coefficients are held through the search, set between searches.
    held: bool,
}

impl DaviesFollower {
    fn coefficients(&self, a: &Activity) -> Gammas {
        Gammas::davies_with_a(a.phys, a.debye_huckel_a, self.ionic.min(self.limit))
    }

    fn limited(&self) -> bool {
        self.ionic > self.limit
    }

    /// Moves the coefficients to the ionic strength and neutral forms at the iterate `ax`;
    /// true when they were already there.
    fn follow(&mut self, p: &mut Prepared, pt: &Point, ax: f64, a: &Activity) -> bool {
        if self.held {
            return true;
        }
        let ionic_settled = (pt.ionic - self.ionic).abs() <= 1e-10 * pt.ionic.max(1e-12)
            || (self.ionic > self.limit && pt.ionic > self.limit);
        let neutrals_settled = p.update_neutral_activity(ax, a.molal_scale);
        if !ionic_settled {
            self.ionic = pt.ionic;
            p.set_activity(&self.coefficients(a));
        }
        ionic_settled && neutrals_settled
    }
}

fn liquid_total(t: &Term, volatile_share: f64) -> f64 {
    if t.gas_factor == 0.0 {
        t.c_total
    } else {
        t.c_total / (1.0 + t.gas_factor * volatile_share)
    }
}

fn assemble(cat: &Catalog, m: &Mixture, p: &Prepared, root: &Root, vg: f64) -> Equilibrium {
    let x = root.x;
    let h = x * p.inv_gamma_h;
    let oh = p.kw_eff * p.inv_gamma_oh / x;
    let volatile_terms = p.terms.iter().filter(|t| t.hcp > 0.0).count();
    let mut gases = Vec::with_capacity(volatile_terms + p.links.len());
    let mut tally = ChargeTally {
        charge: h - oh + p.strong_charge,
        scale: h + oh + p.strong_ionic,
    };
    // Only a linked or complexed family's total changes with x; the common case needs no copy.
    let linked = (!p.links.is_empty() || p.complexation.is_some()).then(|| p.linked_terms(x));
    let terms = linked.as_ref().map_or(&p.terms, |l| &l.0);
    let families = family_states(cat, m, terms, x, vg, &mut tally, &mut gases);
    let combined = combined_states(cat, m, p, x, &mut tally, &mut gases);
    let (complexes, solids) = match (&p.complexation, &linked) {
        (Some(cx), Some((_, Some(b)))) => complex_states(cat, cx, b, &mut tally),
        _ => (Vec::new(), Vec::new()),
    };
    Equilibrium {
        ph: -x.log10(),
        ionic_strength: root.ionic,
        temperature_k: m.temperature_k,
        liquid_l: m.liquid_l,
        headspace_l: m.headspace_l,
        closure: m.closure,
        h_mol_per_l: h,
        oh_mol_per_l: oh,
        families,
        combined,
        complexes,
        solids,
        gases,
        relative_charge_residual: tally.relative_residual(),
        activity_limited: root.limited,
        activity_model: ActivityModelUsed::Davies,
        molal_ionic_strength: root.ionic,
        activity_range: p.davies_limit,
        water_activity: 1.0,
        activity_detail: None,
        iterations: root.iterations,
    }
}

/// The liquid's charge and the sum of its absolute charge concentrations, added up species
/// by species as the state is written out.
struct ChargeTally {
    charge: f64,
    scale: f64,
}

impl ChargeTally {
    fn add(&mut self, z: f64, c: f64) {
        self.charge += z * c;
        self.scale += z.abs() * c;
    }

    /// The charge balance's residual over the scale of the charges in it.
    fn relative_residual(&self) -> f64 {
        if self.scale > 0.0 {
            self.charge.abs() / self.scale
        } else {
            0.0
        }
    }
}

/// Each family's species at x (`terms` with the links and complexes' shares taken), and the
/// gas of each volatile family.
fn family_states(
    cat: &Catalog,
    m: &Mixture,
    terms: &[Term],
    x: f64,
    vg: f64,
    tally: &mut ChargeTally,
    gases: &mut Vec<GasState>,
) -> Vec<FamilyState> {
    let phys = &cat.physical;
    let mut families = Vec::with_capacity(terms.len());
    let totals_mol = m
        .families
        .iter()
        .filter(|&&(fid, n)| fid != cat.water && n != 0.0);
    for (t, &(fid, n)) in terms.iter().zip(totals_mol) {
        let mut w = [0.0; MAX_STEPS + 1];
        let d = weights(t, x, &mut w);
        let c_aq = liquid_total(t, w[t.volatile] / d);
        let fractions: SpeciesValues = w[..=t.n].iter().map(|wj| wj / d).collect();
        let concentrations: SpeciesValues = fractions.iter().map(|a| a * c_aq).collect();
        for (j, c) in concentrations.iter().enumerate() {
            tally.add((t.z0 - j as i32) as f64, *c);
        }
        if let Some(v) = &cat.family(fid).volatile {
            // c in mol/L → mol/m3; p = c / Hcp on the molal scale, with the neutral form's
            // activity coefficient.
            let pa = concentrations[t.volatile] * 1e3 * t.henry / t.hcp;
            let moles_in_gas = pa * (vg / 1e3) / (phys.r * m.temperature_k);
            gases.push(GasState {
                family: fid,
                from_combined: false,
                gas: v.gas.clone(),
                partial_pressure_pa: pa,
                moles_in_gas,
            });
        }
        families.push(FamilyState {
            family: fid,
            total_mol: n,
            concentrations,
            fractions,
        });
    }
    families
}

/// Each combined species at x, and the gas of each volatile one.
fn combined_states(
    cat: &Catalog,
    m: &Mixture,
    p: &Prepared,
    x: f64,
    tally: &mut ChargeTally,
    gases: &mut Vec<GasState>,
) -> Vec<CombinedState> {
    let phys = &cat.physical;
    let t_k = m.temperature_k;
    let mut combined = Vec::with_capacity(p.links.len());
    for l in &p.links {
        let c = &cat.combined[l.catalog_index];
        let y = p.link_amount(l, x);
        let c_aq = y / (1.0 + l.gas_factor);
        tally.add(l.charge as f64, c_aq);
        let moles_in_gas = (y - c_aq) * m.liquid_l;
        if let Some(v) = &c.data.volatile {
            let hcp = v.hcp * (v.hcp_b * (1.0 / t_k - 1.0 / phys.t_ref)).exp();
            gases.push(GasState {
                family: c.first.0,
                from_combined: true,
                gas: v.gas.clone(),
                partial_pressure_pa: c_aq * 1e3 / hcp,
                moles_in_gas,
            });
        }
        combined.push(CombinedState {
            catalog_index: l.catalog_index,
            formula: c.data.formula.clone(),
            parents: (c.first.0, c.second.0),
            concentration: c_aq,
            moles_in_gas,
        });
    }
    combined
}

/// The metal complexes and the solids that formed, from what the complexation bound.
fn complex_states(
    cat: &Catalog,
    cx: &Complexation,
    b: &Bound,
    tally: &mut ChargeTally,
) -> (Vec<ComplexState>, Vec<SolidState>) {
    let solids = b
        .solids
        .iter()
        .map(|&(si, amount)| SolidState {
            catalog_index: si,
            formula: cat.solids[si].formula.clone(),
            mol_per_l: amount,
        })
        .collect();
    let mut complexes = Vec::with_capacity(b.concentrations.len());
    // The complexes' charge, with a strong-ion metal's bound share taken off its own.
    tally.charge += b.charge;
    for (ci, &c) in cx.catalog_indexes().zip(&b.concentrations) {
        tally.scale += f64::from(cat.complexes[ci].charge.abs()) * c;
        complexes.push(ComplexState {
            catalog_index: ci,
            formula: cat.complexes[ci].formula.clone(),
            concentration: c,
        });
    }
    (complexes, solids)
}
