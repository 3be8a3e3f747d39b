//! The equilibrium of a mixed liquid and its headspace.
//!
//! One unknown: x = a(H+). Every family's species follow from x through its conditional
//! constants; volatile neutral species share their family's moles with the headspace by
//! Henry's law; the charge balance F(x) = 0 closes the system. F rises monotonically with
//! ln x, so a Newton step guarded by a bisection bracket always converges. Activity
//! coefficients (Davies) depend on the ionic strength, which an outer fixed-point loop
//! settles.

use super::activity::{Gammas, MAX_CHARGE};
use super::mixture::{Closure, Mixture};
use super::temperature::{henry_hcp, log_ka, log_kw};
use crate::catalog::{Catalog, FamilyId};

/// Most steps any family may have (EDTA has six).
const MAX_STEPS: usize = 8;

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
    pub concentrations: Vec<f64>,
    /// Fraction of the liquid total in each species.
    pub fractions: Vec<f64>,
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

/// A volatile species in the headspace.
#[derive(Debug, Clone, PartialEq)]
pub struct GasState {
    /// The family the gas belongs to; for a combined species, its first parent.
    pub family: FamilyId,
    /// True when the gas is a combined species (e.g. Cl2), drawing on two families.
    pub from_combined: bool,
    pub gas: String,
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
    pub gases: Vec<GasState>,
    /// Charge balance residual over the sum of absolute charge concentrations.
    pub relative_charge_residual: f64,
    /// True when the ionic strength passed the activity limit.
    pub activity_limited: bool,
    pub iterations: usize,
}

impl Equilibrium {
    pub fn family(&self, id: FamilyId) -> Option<&FamilyState> {
        self.families.iter().find(|f| f.family == id)
    }
    pub fn total_gas_pressure_pa(&self) -> f64 {
        self.gases.iter().map(|g| g.partial_pressure_pa).sum()
    }
}

/// A family prepared for fast evaluation at one temperature and ionic strength.
#[derive(Clone, Copy)]
struct Term {
    /// mol per litre of liquid if nothing went to the gas.
    c_total: f64,
    n: usize,
    z0: i32,
    /// Ka of each step at the temperature (thermodynamic).
    ka: [f64; MAX_STEPS],
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

struct Point {
    f: f64,
    dfdlnx: f64,
}

struct Prepared {
    /// mol/kg of water per mol/L of liquid.
    molal: f64,
    terms: Vec<Term>,
    links: Vec<Link>,
    strong_charge: f64,
    strong_ionic: f64,
    kw: f64,
    gamma1: f64,
}

impl Prepared {
    fn set_activity(&mut self, g: &Gammas) {
        self.gamma1 = g.gamma(1);
        // γ(z) = γ(1)^(z²): one table per ionic strength instead of a power per step.
        let mut table = [1.0; 2 * MAX_CHARGE as usize + 1];
        for (k, v) in table.iter_mut().enumerate() {
            let z = k as i32 - MAX_CHARGE;
            *v = self.gamma1.powi(z * z);
        }
        let gamma = |z: i32| table[(z.clamp(-MAX_CHARGE, MAX_CHARGE) + MAX_CHARGE) as usize];
        for l in &mut self.links {
            let z1 = self.terms[l.first.0].z0 - l.first.1 as i32;
            let z2 = self.terms[l.second.0].z0 - l.second.1 as i32;
            // x is already the activity of H+, so only the other reactants and the
            // product carry activity coefficients here.
            l.k_eff = l.k_form * gamma(z1) * gamma(z2) / gamma(l.charge);
        }
        for t in &mut self.terms {
            t.beta[0] = 1.0;
            for j in 1..=t.n {
                let z_acid = t.z0 - (j as i32 - 1);
                let k = t.ka[j - 1] * gamma(z_acid) / gamma(z_acid - 1);
                t.beta[j] = t.beta[j - 1] * k;
            }
        }
    }

    /// Charge balance and its slope in ln x.
    fn eval(&self, x: f64) -> Point {
        if !self.links.is_empty() {
            // The coupling makes the analytic slope long; a central difference is exact
            // enough for a Newton step that the bracket guards anyway.
            let d: f64 = 1e-6;
            let f = self.charge_linked(x);
            let slope =
                (self.charge_linked(x * d.exp()) - self.charge_linked(x * (-d).exp())) / (2.0 * d);
            return Point { f, dfdlnx: slope };
        }
        let h = x / self.gamma1;
        let oh = self.kw / (x * self.gamma1);
        let mut f = h - oh + self.strong_charge;
        let mut d = h + oh;
        for t in &self.terms {
            let (q, dq) = term_charge(t, x);
            f += q;
            d += dq;
        }
        Point { f, dfdlnx: d }
    }
}

impl Prepared {
    /// Sets each self-interacting neutral form's activity coefficient from its molality at
    /// x; true when none changed.
    fn update_neutral_activity(&mut self, x: f64, molal_scale: f64) -> bool {
        let mut settled = true;
        let molal = self.molal;
        for t in self.terms.iter_mut() {
            let Some(lambda) = t.lambda else {
                continue;
            };
            let mut w = [0.0; MAX_STEPS + 1];
            let d = weights(t, x, &mut w);
            let neutral = liquid_total(t, &w, d) * w[t.volatile] / d;
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

    /// Each term's total after the links have taken their share, at x.
    fn totals(&self, x: f64) -> Vec<f64> {
        let mut totals: Vec<f64> = self.terms.iter().map(|t| t.c_total).collect();
        for l in &self.links {
            let y = self.link_amount(l, x);
            totals[l.first.0] -= y;
            totals[l.second.0] -= y;
        }
        totals
    }

    fn charge_linked(&self, x: f64) -> f64 {
        let h = x / self.gamma1;
        let oh = self.kw / (x * self.gamma1);
        let mut f = h - oh + self.strong_charge;
        let totals = self.totals(x);
        for (t, &total) in self.terms.iter().zip(&totals) {
            let mut t = *t;
            t.c_total = total.max(0.0);
            f += term_charge(&t, x).0;
        }
        for l in &self.links {
            if l.charge != 0 {
                f += l.charge as f64 * self.link_amount(l, x) / (1.0 + l.gas_factor);
            }
        }
        f
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

/// A family's charge concentration in the liquid and its slope in ln x.
#[inline]
fn term_charge(t: &Term, x: f64) -> (f64, f64) {
    let mut w = [0.0; MAX_STEPS + 1];
    let d = weights(t, x, &mut w);
    // m_j = n − j protons above the bare base; z_j = (z0 − n) + m_j.
    let mut m1 = 0.0;
    let mut m2 = 0.0;
    for (j, wj) in w.iter().enumerate().take(t.n + 1) {
        let m = (t.n - j) as f64;
        m1 += m * wj;
        m2 += m * m * wj;
    }
    m1 /= d;
    m2 /= d;
    let zbar = (t.z0 - t.n as i32) as f64 + m1;
    let dzbar = m2 - m1 * m1;
    if t.gas_factor == 0.0 {
        return (t.c_total * zbar, t.c_total * dzbar);
    }
    let av = w[t.volatile] / d;
    let dav = av * ((t.n - t.volatile) as f64 - m1);
    let denom = 1.0 + t.gas_factor * av;
    let c_aq = t.c_total / denom;
    let q = c_aq * zbar;
    let dq = c_aq * dzbar - t.c_total * zbar * t.gas_factor * dav / (denom * denom);
    (q, dq)
}

/// A family's constants at one temperature.
#[derive(Clone, Copy)]
struct FamilyConstants {
    ka: [f64; MAX_STEPS],
    /// Henry's law constant of its volatile form (0 when it has none).
    hcp: f64,
}

thread_local! {
    /// The constants of every family at the temperature last solved at: states along a
    /// pour mostly share a temperature, so each family's van 't Hoff and Henry factors are
    /// worked out once per temperature rather than once per solve.
    static CONSTANTS: std::cell::RefCell<(u64, usize, Vec<Option<FamilyConstants>>)> =
        const { std::cell::RefCell::new((u64::MAX, usize::MAX, Vec::new())) };
}

/// The constants of family `fid` at `t_k`, from the per-thread cache when it holds them.
fn constants_at(cat: &Catalog, fid: FamilyId, t_k: f64) -> FamilyConstants {
    let compute = || {
        let fam = cat.family(fid);
        let phys = &cat.physical;
        let mut ka = [0.0; MAX_STEPS];
        for (j, v) in ka.iter_mut().enumerate().take(fam.steps.len()) {
            *v = (log_ka(phys, fam, j, t_k) * std::f64::consts::LN_10).exp();
        }
        let hcp = fam
            .volatile
            .as_ref()
            .map_or(0.0, |v| henry_hcp(phys, v, t_k));
        FamilyConstants { ka, hcp }
    };
    // The cache is keyed by the temperature and by which catalog filled it (its address and
    // size), so that two catalogs never share constants.
    let owner = cat as *const Catalog as usize ^ cat.families.len();
    CONSTANTS.with(|c| {
        let Ok(mut c) = c.try_borrow_mut() else {
            return compute();
        };
        if c.0 != t_k.to_bits() || c.1 != owner {
            c.0 = t_k.to_bits();
            c.1 = owner;
            c.2.clear();
            c.2.resize(cat.families.len(), None);
        }
        *c.2[fid.0].get_or_insert_with(compute)
    })
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
    let phys = &cat.physical;
    let t_k = m.temperature_k;
    let vl = m.liquid_l;
    let vg = if m.closure == Closure::Open {
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
    let molal = 1.0 / water_kg_per_l;
    let molal_scale = DILUTE_WATER_KG_PER_L / water_kg_per_l;
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
    let mut terms = Vec::with_capacity(m.families.len());
    let mut term_of: Vec<FamilyId> = Vec::with_capacity(m.families.len());
    for &(fid, n) in &m.families {
        if !(n.is_finite() && n >= 0.0) {
            return Err(SolveError::BadTotals);
        }
        if fid == cat.water || n == 0.0 {
            continue;
        }
        let fam = cat.family(fid);
        let steps = fam.steps.len();
        if steps > MAX_STEPS {
            return Err(SolveError::TooManySteps(fam.id.clone()));
        }
        let k = constants_at(cat, fid, t_k);
        let ka = k.ka;
        let (gas_factor, volatile) = match (&fam.volatile, fam.volatile_index()) {
            (Some(_), Some(idx)) if vg > 0.0 => ((vg / vl) / (k.hcp * phys.r * t_k), idx),
            (Some(_), Some(idx)) => (0.0, idx),
            _ => (0.0, 0),
        };
        let lambda = fam
            .volatile
            .as_ref()
            .and_then(|v| v.self_interaction.as_ref())
            .map(|si| si.lambda(t_k));
        term_of.push(fid);
        terms.push(Term {
            c_total: n / vl,
            n: steps,
            z0: fam.species[0].charge,
            ka,
            beta: [0.0; MAX_STEPS + 1],
            gas_factor: gas_factor * molal_scale,
            base_gas_factor: gas_factor,
            volatile,
            henry: molal_scale,
            lambda,
        });
    }
    let kw = (log_kw(phys, cat.family(cat.water), t_k) * std::f64::consts::LN_10).exp();
    let mut links = Vec::new();
    for (ci, c) in cat.combined.iter().enumerate() {
        let find = |f: FamilyId| term_of.iter().position(|&t| t == f);
        let (Some(a), Some(b)) = (find(c.first.0), find(c.second.0)) else {
            continue;
        };
        let d = &c.data;
        let log_k = d.log_k_formation
            - d.dh_formation * 1e3 / (phys.r * std::f64::consts::LN_10)
                * (1.0 / t_k - 1.0 / phys.t_ref);
        let gas_factor = match &d.volatile {
            Some(v) if vg > 0.0 => {
                let hcp = v.hcp * (v.hcp_b * (1.0 / t_k - 1.0 / phys.t_ref)).exp();
                (vg / vl) / (hcp * phys.r * t_k)
            }
            _ => 0.0,
        };
        links.push(Link {
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
    let mut p = Prepared {
        molal,
        terms,
        links,
        strong_charge,
        strong_ionic,
        kw,
        gamma1: 1.0,
    };

    // Ionic strength: from the neighbouring state, or the strong ions plus each family
    // half-charged.
    let (mut ionic, mut ln_x) = match near {
        Some(e) if e.ionic_strength.is_finite() && e.ph.is_finite() => {
            (e.ionic_strength, -e.ph * std::f64::consts::LN_10)
        }
        _ => (
            0.5 * strong_ionic + 0.5 * p.terms.iter().map(|t| t.c_total).sum::<f64>(),
            (1e-7f64).ln(),
        ),
    };
    let mut iterations = 0;
    let mut limited = false;
    let mut converged = false;
    let debye_huckel_a = phys.debye_huckel_a(t_k);
    for pass in 0..100 {
        limited = ionic > s.activity_limit;
        let g = Gammas::davies_with_a(phys, debye_huckel_a, ionic.min(s.activity_limit));
        p.set_activity(&g);
        // The charge balance is negative at the lowest a(H+) and positive at the highest
        // whatever the activity coefficients: one check per solve is enough.
        if pass == 0 && (p.eval(LN_X_LO.exp()).f > 0.0 || p.eval(LN_X_HI.exp()).f < 0.0) {
            return Err(SolveError::NoBracket);
        }
        let (root, its) = find_root(&p, ln_x, s)?;
        iterations += its;
        ln_x = root;
        let new_ionic = ionic_strength(&p, root.exp());
        let close = (new_ionic - ionic).abs() <= 1e-10 * new_ionic.max(1e-12);
        // Above the limit the coefficients no longer change with I, so one more pass is exact.
        let frozen = ionic > s.activity_limit && new_ionic > s.activity_limit;
        ionic = new_ionic;
        let neutrals_settled = p.update_neutral_activity(root.exp(), molal_scale);
        if (close || frozen) && neutrals_settled {
            converged = true;
            if frozen {
                limited = true;
            }
            break;
        }
    }
    if !converged {
        return Err(SolveError::NoConvergence(iterations));
    }
    Ok(assemble(
        cat,
        m,
        &p,
        ln_x.exp(),
        ionic,
        vg,
        limited,
        iterations,
    ))
}

/// The bracket of ln a(H+) the solver searches: pH 22 to pH −4.
const LN_X_LO: f64 = -50.65687204586901; // ln 1e-22
const LN_X_HI: f64 = 9.210340371976184; // ln 1e4

/// Safeguarded Newton in ln x within a bracket where the charge balance changes sign (the
/// caller has checked the sign change once per solve).
fn find_root(p: &Prepared, start: f64, s: &SolverSettings) -> Result<(f64, usize), SolveError> {
    let (mut lo, mut hi) = (LN_X_LO, LN_X_HI);
    let mut x = start.clamp(lo, hi);
    for it in 1..=s.max_iterations {
        let pt = p.eval(x.exp());
        if !pt.f.is_finite() {
            return Err(SolveError::NoConvergence(it));
        }
        if pt.f > 0.0 {
            hi = x;
        } else {
            lo = x;
        }
        let newton = if pt.dfdlnx > 0.0 {
            x - pt.f / pt.dfdlnx
        } else {
            f64::NAN
        };
        // A Newton step below the tolerance has found the root, wherever the bracket's
        // ends lie (the step may land on one of them).
        if newton.is_finite() && (newton - x).abs() < s.tolerance {
            return Ok((newton, it));
        }
        let next = if newton.is_finite() && newton > lo && newton < hi {
            newton
        } else {
            0.5 * (lo + hi)
        };
        if (next - x).abs() < s.tolerance || hi - lo < s.tolerance {
            return Ok((next, it));
        }
        x = next;
    }
    Err(SolveError::NoConvergence(s.max_iterations))
}

fn ionic_strength(p: &Prepared, x: f64) -> f64 {
    let h = x / p.gamma1;
    let oh = p.kw / (x * p.gamma1);
    let mut sum = p.strong_ionic + h + oh;
    let mut w = [0.0; MAX_STEPS + 1];
    // Only a linked family's total changes with x; the common case needs no copy.
    let totals = if p.links.is_empty() {
        None
    } else {
        Some(p.totals(x))
    };
    for l in &p.links {
        let z = l.charge as f64;
        sum += z * z * p.link_amount(l, x) / (1.0 + l.gas_factor);
    }
    for (k, t) in p.terms.iter().enumerate() {
        let adjusted;
        let t = match &totals {
            Some(tt) => {
                let mut c = *t;
                c.c_total = tt[k].max(0.0);
                adjusted = c;
                &adjusted
            }
            None => t,
        };
        let d = weights(t, x, &mut w);
        let c_aq = liquid_total(t, &w, d);
        for (j, wj) in w.iter().enumerate().take(t.n + 1) {
            let z = (t.z0 - j as i32) as f64;
            sum += z * z * c_aq * wj / d;
        }
    }
    0.5 * sum
}

fn liquid_total(t: &Term, w: &[f64; MAX_STEPS + 1], d: f64) -> f64 {
    if t.gas_factor == 0.0 {
        t.c_total
    } else {
        t.c_total / (1.0 + t.gas_factor * w[t.volatile] / d)
    }
}

#[allow(clippy::too_many_arguments)]
fn assemble(
    cat: &Catalog,
    m: &Mixture,
    p: &Prepared,
    x: f64,
    ionic: f64,
    vg: f64,
    limited: bool,
    iterations: usize,
) -> Equilibrium {
    let phys = &cat.physical;
    let t_k = m.temperature_k;
    let h = x / p.gamma1;
    let oh = p.kw / (x * p.gamma1);
    let mut families = Vec::with_capacity(m.families.len());
    let mut gases = Vec::new();
    let mut charge = h - oh + p.strong_charge;
    let mut scale = h + oh + p.strong_ionic;
    // Only a linked family's total changes with x; the common case needs no copy.
    let totals = if p.links.is_empty() {
        None
    } else {
        Some(p.totals(x))
    };
    let mut terms = p.terms.iter().enumerate();
    for &(fid, n) in &m.families {
        if fid == cat.water || n == 0.0 {
            continue;
        }
        let (k, t) = terms.next().expect("one term per non-empty family");
        let mut t = *t;
        if let Some(tt) = &totals {
            t.c_total = tt[k].max(0.0);
        }
        let t = &t;
        let fam = cat.family(fid);
        let mut w = [0.0; MAX_STEPS + 1];
        let d = weights(t, x, &mut w);
        let c_aq = liquid_total(t, &w, d);
        let fractions: Vec<f64> = w[..=t.n].iter().map(|wj| wj / d).collect();
        let concentrations: Vec<f64> = fractions.iter().map(|a| a * c_aq).collect();
        for (j, c) in concentrations.iter().enumerate() {
            let z = fam.species[j].charge as f64;
            charge += z * c;
            scale += z.abs() * c;
        }
        if let (Some(v), Some(idx)) = (&fam.volatile, fam.volatile_index()) {
            let hcp = henry_hcp(phys, v, t_k);
            // c in mol/L → mol/m3; p = c / Hcp on the molal scale, with the neutral form's
            // activity coefficient.
            let pa = concentrations[idx] * 1e3 * t.henry / hcp;
            let moles_in_gas = pa * (vg / 1e3) / (phys.r * t_k);
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
    let mut combined = Vec::with_capacity(p.links.len());
    for l in &p.links {
        let c = &cat.combined[l.catalog_index];
        let y = p.link_amount(l, x);
        let c_aq = y / (1.0 + l.gas_factor);
        let z = l.charge as f64;
        charge += z * c_aq;
        scale += z.abs() * c_aq;
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
    Equilibrium {
        ph: -x.log10(),
        ionic_strength: ionic,
        temperature_k: t_k,
        liquid_l: m.liquid_l,
        headspace_l: m.headspace_l,
        closure: m.closure,
        h_mol_per_l: h,
        oh_mol_per_l: oh,
        families,
        combined,
        gases,
        relative_charge_residual: if scale > 0.0 {
            charge.abs() / scale
        } else {
            0.0
        },
        activity_limited: limited,
        iterations,
    }
}
