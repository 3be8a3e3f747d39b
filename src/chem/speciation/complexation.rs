//! Metal complexes in the speciation: at each a(H+) the free ligand concentrations that close
//! every ligand's mass balance, and from them each complex and each metal's free share.
//!
//! A metal m of total T_m is free or bound: T_m = M·(P_m + Σ_c q_c), with P_m the metal's
//! total over its free aquo ion (its own hydrolysis) and q_c = K'_c · x^h_c · L^n_c for each
//! complex c. A ligand k of total T_k is free (over its protonated forms and the headspace,
//! P_k per unit free ligand) or bound: T_k = L_k P_k + Σ_c n_c T_m q_c / S_m. One ligand's
//! balance rises monotonically with ln L (its slope is L P plus a variance of bound counts):
//! a bracketed Newton search closes it. Several ligands sharing metals are solved together:
//! their balances are the gradient of one convex function of the ln L, which a Newton
//! search with a backtracking line search minimises from any start.

use std::cell::Cell;

use smallvec::SmallVec;

use super::{liquid_species_fraction, Term, INLINE_TERMS};
use crate::catalog::complexes::Part;
use crate::catalog::{Catalog, IonId, MAX_LIGANDS};
use crate::chem::temperature::log_k_at;

/// Solves H d = −g over the active ligands (H symmetric positive definite there) by
/// Gaussian elimination; inactive ligands get no step.
fn newton_direction(hess: &[f64], grad: &[f64], active: &[bool]) -> SmallVec<[f64; 4]> {
    let idx: SmallVec<[usize; 4]> = (0..grad.len()).filter(|&k| active[k]).collect();
    let m = idx.len();
    let mut a: SmallVec<[f64; 25]> = SmallVec::from_elem(0.0, m * (m + 1));
    for (r, &k) in idx.iter().enumerate() {
        for (c, &j) in idx.iter().enumerate() {
            a[r * (m + 1) + c] = hess[k * grad.len() + j];
        }
        a[r * (m + 1) + m] = -grad[k];
    }
    for col in 0..m {
        let pivot = (col..m)
            .max_by(|&x, &y| {
                a[x * (m + 1) + col]
                    .abs()
                    .total_cmp(&a[y * (m + 1) + col].abs())
            })
            .unwrap_or(col);
        if pivot != col {
            for c in 0..=m {
                a.swap(pivot * (m + 1) + c, col * (m + 1) + c);
            }
        }
        let d = a[col * (m + 1) + col];
        if d.abs() < f64::MIN_POSITIVE {
            continue;
        }
        for r in 0..m {
            if r != col {
                let factor = a[r * (m + 1) + col] / d;
                for c in col..=m {
                    a[r * (m + 1) + c] -= factor * a[col * (m + 1) + c];
                }
            }
        }
    }
    let mut out: SmallVec<[f64; 4]> = SmallVec::from_elem(0.0, grad.len());
    for (r, &k) in idx.iter().enumerate() {
        let d = a[r * (m + 1) + r];
        out[k] = if d.abs() < f64::MIN_POSITIVE {
            0.0
        } else {
            a[r * (m + 1) + m] / d
        };
    }
    out
}

/// Convergence of each ln L.
const LN_TOLERANCE: f64 = 1e-12;
/// A joint Newton step below this in every ln L is taken as the last (the next would be of
/// its square's order).
const NEWTON_DONE: f64 = 1e-7;
/// Span of ln L below its ceiling (the whole total free) that the search brackets.
const LN_SPAN: f64 = 200.0;
/// Most Newton steps of the joint search, and of one ligand's search.
const MAX_ROUNDS: usize = 200;
const MAX_STEPS_1D: usize = 200;

/// Where a metal's free ion is.
#[derive(Clone, Copy)]
enum MetalAt {
    /// A family's species: index into the solver's terms and the species.
    Term(usize, usize),
    /// A strong ion: its mol/L and its slot among the mixture's ions.
    Ion { total: f64, slot: usize },
}

#[derive(Clone, Copy)]
struct Metal {
    at: MetalAt,
    charge: i32,
    /// This metal's complexes: a range of `forms`.
    forms: (usize, usize),
    /// The hydroxide that caps it, if the data give one.
    solid: Option<SolidCap>,
}

/// A solid of one metal: solid + z H+ = metal + z H2O.
#[derive(Clone, Copy)]
struct SolidCap {
    catalog_index: usize,
    /// Thermodynamic constant at the temperature.
    k: f64,
    /// Over the metal's activity coefficient (and water's activity to the z): the free
    /// metal's saturated concentration is k_eff x^z.
    k_eff: f64,
}

/// A metal at one a(H+): its total, and its total over its free ion.
#[derive(Clone, Copy)]
struct MetalNow {
    total: f64,
    p: f64,
    /// The free ion's saturated concentration (infinite where no solid caps it).
    cap: f64,
}

impl MetalNow {
    /// The free metal ion, mol/L, where its complexes and hydrolysis sum to `s` per free ion.
    fn free(&self, s: f64) -> f64 {
        (self.total / s).min(self.cap)
    }
}

struct Ligand {
    term: usize,
    species: usize,
    charge: i32,
    /// ln L at the last solve: where the next one starts.
    guess: Cell<f64>,
}

#[derive(Clone, Copy)]
struct Form {
    catalog_index: usize,
    metal: usize,
    /// Index into `ligands`; None for a hydroxo complex.
    ligand: Option<usize>,
    n: i32,
    protons: i32,
    charge: i32,
    /// Thermodynamic constant at the temperature.
    k: f64,
    /// With the activity coefficients (and water's activity) folded in.
    k_eff: f64,
}

/// The complexes a mixture can form, prepared for one temperature.
pub(super) struct Complexation {
    metals: SmallVec<[Metal; 4]>,
    ligands: SmallVec<[Ligand; 4]>,
    forms: SmallVec<[Form; 24]>,
}

/// The complexes at one a(H+).
pub(super) struct Bound {
    /// mol/L each term gives to complexes (metal families and ligand families).
    pub taken: SmallVec<[f64; INLINE_TERMS]>,
    /// The complexes' charge, less the bound share of strong-ion metals, mol/L.
    pub charge: f64,
    /// The same for Σ z² c.
    pub ionic: f64,
    /// What complexes hold of each strong-ion metal: (its slot among the mixture's ions, mol/L).
    pub ions_bound: SmallVec<[(usize, f64); 4]>,
    /// mol/L of each complex, in the order of `forms`.
    pub concentrations: SmallVec<[f64; 24]>,
    /// Each solid that formed (catalog index), and the mol of metal per litre of liquid it
    /// took out of the liquid.
    pub solids: SmallVec<[(usize, f64); 2]>,
}

impl Complexation {
    /// The complexes of `cat` that the mixture's metals and ligands can form, or None.
    pub(super) fn new(
        cat: &Catalog,
        terms: &[Term],
        ions: &[(IonId, f64)],
        liquid_l: f64,
        t_k: f64,
        near: Option<&super::Equilibrium>,
    ) -> Option<Self> {
        if cat.complexes.is_empty() {
            return None;
        }
        let mut out = Complexation {
            metals: SmallVec::new(),
            ligands: SmallVec::new(),
            forms: SmallVec::new(),
        };
        for (metal, list) in &cat.complexes_of_metal {
            let Some(at) = metal_at(*metal, terms, ions, liquid_l) else {
                continue;
            };
            let start = out.forms.len();
            for &ci in list {
                let ligand = match cat.complexes[ci].ligand {
                    None => None,
                    Some(p) => match term_of(terms, p) {
                        Some(species) => Some(out.ligand_index(terms, species, near)),
                        None => continue,
                    },
                };
                let form = Form::of(cat, ci, out.metals.len(), ligand, t_k);
                out.forms.push(form);
            }
            if out.forms.len() > start {
                out.metals.push(Metal {
                    at,
                    charge: part_charge(cat, *metal),
                    forms: (start, out.forms.len()),
                    solid: SolidCap::of(cat, *metal, t_k),
                });
            }
        }
        (!out.forms.is_empty()).then_some(out)
    }

    /// The index among `ligands` of the species `(term, species)`, added if it is new.
    fn ligand_index(
        &mut self,
        terms: &[Term],
        (term, species): (usize, usize),
        near: Option<&super::Equilibrium>,
    ) -> usize {
        let known = self
            .ligands
            .iter()
            .position(|l| l.term == term && l.species == species);
        if let Some(k) = known {
            return k;
        }
        let t = &terms[term];
        // A neighbouring state's free ligand is where the search starts; the result does not
        // depend on it.
        let guess = near
            .and_then(|e| e.family(t.family))
            .and_then(|fs| fs.concentrations.get(species).copied())
            .filter(|c| *c > 0.0)
            .map_or(f64::NAN, f64::ln);
        self.ligands.push(Ligand {
            term,
            species,
            charge: t.z0 - species as i32,
            guess: Cell::new(guess),
        });
        self.ligands.len() - 1
    }

    /// Folds Davies' coefficients (γ(z) = γ(1)^(z²)) into each constant.
    pub(super) fn set_davies(&mut self, gamma1: f64) {
        let ln1 = gamma1.ln();
        let metals = &self.metals;
        let ligands = &self.ligands;
        for f in &mut self.forms {
            let zm = metals[f.metal].charge;
            let zl = f.ligand.map_or(0, |k| ligands[k].charge);
            let z2 = |z: i32| f64::from(z * z);
            let ln_ratio = ln1 * (z2(zm) + f64::from(f.n) * z2(zl) - z2(f.charge));
            f.k_eff = f.k * ln_ratio.exp();
        }
        for m in &mut self.metals {
            if let Some(sd) = m.solid.as_mut() {
                sd.k_eff = sd.k * (-ln1 * f64::from(m.charge * m.charge)).exp();
            }
        }
    }

    /// Folds the concentrated model's coefficients into each constant: `ln_gamma_metal(slot)`
    /// for strong-ion metals, the terms' own ln γ for family species, `ln_gamma_of(z)` for the
    /// complex, and water's activity for hydroxo complexes.
    pub(super) fn set_concentrated(
        &mut self,
        terms: &[Term],
        ln_gamma_ion: impl Fn(usize) -> f64,
        ln_gamma_complex: impl Fn(usize) -> f64,
        ln_water: f64,
    ) {
        for (fi, f) in self.forms.iter_mut().enumerate() {
            let metal = &self.metals[f.metal];
            let ln_metal = match metal.at {
                MetalAt::Term(t, j) => terms[t].ln_gamma[j],
                MetalAt::Ion { slot, .. } => ln_gamma_ion(slot),
            };
            let ln_ligand = match f.ligand {
                Some(k) => {
                    let l = &self.ligands[k];
                    f64::from(f.n) * terms[l.term].ln_gamma[l.species]
                }
                None => f64::from(f.n) * ln_water,
            };
            f.k_eff = f.k * (ln_metal + ln_ligand - ln_gamma_complex(fi)).exp();
        }
        for m in &mut self.metals {
            let ln_metal = match m.at {
                MetalAt::Term(t, j) => terms[t].ln_gamma[j],
                MetalAt::Ion { slot, .. } => ln_gamma_ion(slot),
            };
            if let Some(sd) = m.solid.as_mut() {
                sd.k_eff = sd.k * (-ln_metal - f64::from(m.charge) * ln_water).exp();
            }
        }
    }

    /// The complexes at x, for family totals `totals` (mol/L, after any combined species took
    /// their share).
    pub(super) fn solve_at(&self, terms: &[Term], totals: &[f64], x: f64) -> Bound {
        let metal_totals = self.metals_at(terms, totals, x);
        let ligand_totals: SmallVec<[(f64, f64); 4]> = self
            .ligands
            .iter()
            .map(|l| {
                let share = liquid_species_fraction(&terms[l.term], x, l.species);
                (totals[l.term].max(0.0), 1.0 / share)
            })
            .collect();
        // Each complex's weight per free metal, without its ligand's power: K' x^h.
        let base: SmallVec<[f64; 24]> = self
            .forms
            .iter()
            .map(|f| f.k_eff * x.powi(f.protons))
            .collect();
        let ln_l = self.free_ligands(&ligand_totals, &base, &metal_totals);
        let q: SmallVec<[f64; 24]> = self
            .forms
            .iter()
            .zip(&base)
            .map(|(f, b)| match f.ligand {
                Some(k) => b * ln_l[k].exp().powi(f.n),
                None => *b,
            })
            .collect();
        let mut bound = Bound {
            taken: SmallVec::from_elem(0.0, terms.len()),
            charge: 0.0,
            ionic: 0.0,
            concentrations: SmallVec::from_elem(0.0, self.forms.len()),
            ions_bound: SmallVec::new(),
            solids: SmallVec::new(),
        };
        for (m, now) in self.metals.iter().zip(&metal_totals) {
            self.bind_metal(m, now, &q, &mut bound);
        }
        bound
    }

    /// Per metal at x: its total, its total over its free ion (1 for a strong ion), and the
    /// free ion's saturated concentration.
    fn metals_at(&self, terms: &[Term], totals: &[f64], x: f64) -> SmallVec<[MetalNow; 4]> {
        self.metals
            .iter()
            .map(|m| {
                let (total, p) = match m.at {
                    MetalAt::Term(t, j) => {
                        let share = liquid_species_fraction(&terms[t], x, j);
                        (totals[t].max(0.0), 1.0 / share)
                    }
                    MetalAt::Ion { total, .. } => (total, 1.0),
                };
                let cap = m.solid.map_or(f64::INFINITY, |sd| {
                    (sd.k_eff * x.powi(m.charge)).max(f64::MIN_POSITIVE)
                });
                MetalNow { total, p, cap }
            })
            .collect()
    }

    /// Each ligand's ln L that closes the balances, searched from the last solve's (or from
    /// the whole total free); it is kept as the next solve's start.
    fn free_ligands(
        &self,
        ligand_totals: &[(f64, f64)],
        base: &[f64],
        metal_totals: &[MetalNow],
    ) -> SmallVec<[f64; 4]> {
        let mut ln_l: SmallVec<[f64; 4]> = self
            .ligands
            .iter()
            .zip(ligand_totals)
            .map(|(l, &(total, p))| {
                let ceiling = (total / p).ln();
                let g = l.guess.get();
                if g.is_finite() {
                    g.min(ceiling)
                } else {
                    ceiling
                }
            })
            .collect();
        if self.ligands.len() == 1 {
            let (total, p) = ligand_totals[0];
            ln_l[0] = if total > 0.0 {
                self.solve_ligand(0, &ln_l, total, p, base, metal_totals)
            } else {
                f64::NEG_INFINITY
            };
        } else if !self.ligands.is_empty() {
            self.solve_ligands_jointly(&mut ln_l, ligand_totals, base, metal_totals);
        }
        for (l, &v) in self.ligands.iter().zip(&ln_l) {
            l.guess.set(v);
        }
        ln_l
    }

    /// Adds what metal `m` holds at x to `bound`: its complexes (from their weights per free
    /// metal `q`), the ligands they take, and the solid where the liquid cannot hold it all.
    fn bind_metal(&self, m: &Metal, now: &MetalNow, q: &[f64], bound: &mut Bound) {
        let (a, b) = m.forms;
        let s = now.p + q[a..b].iter().sum::<f64>();
        let free_metal = now.free(s);
        // What the liquid cannot hold leaves it as the solid.
        let precipitated = (now.total - free_metal * s).max(0.0);
        if let (Some(sd), true) = (m.solid, precipitated > 0.0) {
            bound.solids.push((sd.catalog_index, precipitated));
        }
        let mut held = precipitated;
        for (fi, f) in self.forms[a..b].iter().enumerate() {
            let c = free_metal * q[a + fi];
            bound.concentrations[a + fi] = c;
            held += c;
            let z = f64::from(f.charge);
            bound.charge += z * c;
            bound.ionic += z * z * c;
            if let Some(k) = f.ligand {
                bound.taken[self.ligands[k].term] += f64::from(f.n) * c;
            }
        }
        match m.at {
            MetalAt::Term(t, _) => bound.taken[t] += held,
            MetalAt::Ion { slot, .. } => {
                let z = f64::from(m.charge);
                bound.charge -= z * held;
                bound.ionic -= z * z * held;
                bound.ions_bound.push((slot, held));
            }
        }
    }

    /// ln L of ligand `k` that closes its balance with the other ligands held.
    fn solve_ligand(
        &self,
        k: usize,
        ln_l: &[f64],
        total: f64,
        p: f64,
        base: &[f64],
        metal_totals: &[MetalNow],
    ) -> f64 {
        let ceiling = (total / p).ln();
        let (mut lo, mut hi) = (ceiling - LN_SPAN, ceiling);
        let mut u = ln_l[k].clamp(lo, hi);
        let mut trial: SmallVec<[f64; 4]> = ln_l.iter().copied().collect();
        for _ in 0..MAX_STEPS_1D {
            trial[k] = u;
            let (f, slope) = self.ligand_balance(k, &trial, total, p, base, metal_totals);
            if f > 0.0 {
                hi = u;
            } else {
                lo = u;
            }
            let newton = u - f / slope;
            let next = if newton.is_finite() && newton > lo && newton < hi {
                newton
            } else {
                0.5 * (lo + hi)
            };
            if (next - u).abs() < LN_TOLERANCE || hi - lo < LN_TOLERANCE {
                return next;
            }
            u = next;
        }
        u
    }

    /// Every ligand's ln L at once, where several share the mixture's metals: the balances
    /// are the gradient of a convex function of ln L (Φ = Σ_k (L_k P_k − T_k ln L_k) +
    /// Σ_m T_m ln S_m), so Newton steps with a backtracking search on Φ converge from any
    /// start.
    fn solve_ligands_jointly(
        &self,
        ln_l: &mut [f64],
        ligand_totals: &[(f64, f64)],
        base: &[f64],
        metal_totals: &[MetalNow],
    ) {
        let search = JointSearch::new(self, ligand_totals, base, metal_totals);
        let n = self.ligands.len();
        for (u, &active) in ln_l.iter_mut().zip(&search.active) {
            if !active {
                *u = f64::NEG_INFINITY;
            }
        }
        let mut at = search.potential_at(ln_l, &PotentialAt::zero(n));
        for _ in 0..MAX_ROUNDS {
            let mut step = newton_direction(&at.hess, &at.grad, &search.active);
            // Newton converges quadratically here: a step this short is the last one, and
            // the potential need not be evaluated after it.
            if step.iter().all(|d| d.abs() < NEWTON_DONE) {
                for k in 0..n {
                    if search.active[k] {
                        ln_l[k] += step[k];
                    }
                }
                return;
            }
            // Long steps are cut to a factor e^20 in any concentration: beyond the exponent's
            // range the potential would overflow before the search could shorten them.
            let longest = step.iter().fold(0.0f64, |a, d| a.max(d.abs()));
            if longest > 20.0 {
                step.iter_mut().for_each(|d| *d *= 20.0 / longest);
            }
            let (trial, accepted) = search.line_search(ln_l, &step, longest, &mut at);
            let moved = (0..n)
                .filter(|&k| search.active[k])
                .fold(0.0f64, |a, k| a.max((trial[k] - ln_l[k]).abs()));
            ln_l.copy_from_slice(&trial);
            if !accepted || moved < LN_TOLERANCE {
                return;
            }
        }
    }

    /// Φ at `ln_l`, with its gradient (each ligand's balance) and Hessian written into
    /// `grad` and `hess` (row-major).
    fn potential(
        &self,
        ln_l: &[f64],
        ligand_totals: &[(f64, f64)],
        base: &[f64],
        metal_totals: &[MetalNow],
        grad: &mut [f64],
        hess: &mut [f64],
    ) -> f64 {
        let n = self.ligands.len();
        hess.iter_mut().for_each(|h| *h = 0.0);
        let mut phi = 0.0;
        for k in 0..n {
            let (total, p) = ligand_totals[k];
            if total > 0.0 {
                let free = ln_l[k].exp() * p;
                phi += free - total * ln_l[k];
                grad[k] = free - total;
                hess[k * n + k] = free;
            } else {
                grad[k] = 0.0;
            }
        }
        // Each ligand's free concentration to the powers 0..=MAX_LIGANDS, by products.
        let powers: SmallVec<[[f64; MAX_LIGANDS + 1]; 4]> = ln_l
            .iter()
            .map(|u| {
                let l = u.exp();
                let mut p = [1.0; MAX_LIGANDS + 1];
                for i in 1..=MAX_LIGANDS {
                    p[i] = p[i - 1] * l;
                }
                p
            })
            .collect();
        let mut s1: SmallVec<[f64; 4]> = SmallVec::from_elem(0.0, n);
        for (mi, m) in self.metals.iter().enumerate() {
            let (a, b) = m.forms;
            let now = metal_totals[mi];
            let (total, mut s) = (now.total, now.p);
            s1.iter_mut().for_each(|v| *v = 0.0);
            let mut s2: SmallVec<[f64; 4]> = SmallVec::from_elem(0.0, n);
            for (f, b_) in self.forms[a..b].iter().zip(&base[a..b]) {
                let q = match f.ligand {
                    Some(j) => b_ * powers[j][f.n as usize],
                    None => *b_,
                };
                s += q;
                if let Some(j) = f.ligand {
                    let nn = f64::from(f.n);
                    s1[j] += nn * q;
                    s2[j] += nn * nn * q;
                }
            }
            if total <= 0.0 {
                continue;
            }
            if total / s <= now.cap {
                phi += total * s.ln();
                for k in 0..n {
                    grad[k] += total * s1[k] / s;
                    hess[k * n + k] += total * s2[k] / s;
                    for j in 0..n {
                        hess[k * n + j] -= total * s1[k] * s1[j] / (s * s);
                    }
                }
            } else {
                // Saturated: the free metal is held at the cap and the rest is solid. This
                // piece meets the other with the same value and gradient, so Φ stays convex.
                let cap = now.cap;
                phi += cap * s + total * ((total / cap).ln() - 1.0);
                for k in 0..n {
                    grad[k] += cap * s1[k];
                    hess[k * n + k] += cap * s2[k];
                }
            }
        }
        phi
    }

    /// Ligand k's balance (bound + free − total, mol/L) at `ln_l`, and its slope in ln L_k.
    fn ligand_balance(
        &self,
        k: usize,
        ln_l: &[f64],
        total: f64,
        p: f64,
        base: &[f64],
        metal_totals: &[MetalNow],
    ) -> (f64, f64) {
        let free_k = ln_l[k].exp();
        let free = free_k * p;
        let (mut f, mut slope) = (free - total, free);
        for (mi, m) in self.metals.iter().enumerate() {
            let (a, b) = m.forms;
            let now = metal_totals[mi];
            let (mut s, mut s1, mut s2) = (now.p, 0.0, 0.0);
            let mut touches = false;
            for (f_, b_) in self.forms[a..b].iter().zip(&base[a..b]) {
                let q = match f_.ligand {
                    Some(j) if j == k => b_ * free_k.powi(f_.n),
                    Some(j) => b_ * (f64::from(f_.n) * ln_l[j]).exp(),
                    None => *b_,
                };
                s += q;
                if f_.ligand == Some(k) {
                    let n = f64::from(f_.n);
                    s1 += n * q;
                    s2 += n * n * q;
                    touches = true;
                }
            }
            if touches {
                let t = now.total;
                if t / s <= now.cap {
                    f += t * s1 / s;
                    slope += t * (s2 / s - (s1 / s) * (s1 / s));
                } else {
                    f += now.cap * s1;
                    slope += now.cap * s2;
                }
            }
        }
        (f, slope)
    }

    /// True when a metal of the mixture can precipitate: the charge balance then has a kink
    /// where the coefficients move the solid's boundary, and the solve holds them per search.
    pub(super) fn has_solids(&self) -> bool {
        self.metals.iter().any(|m| m.solid.is_some())
    }

    /// Each complex's charge, in the order of `Bound::concentrations`.
    pub(super) fn charges(&self) -> impl Iterator<Item = i32> + '_ {
        self.forms.iter().map(|f| f.charge)
    }

    /// Each complex's catalog index, in the order of `Bound::concentrations`.
    pub(super) fn catalog_indexes(&self) -> impl Iterator<Item = usize> + '_ {
        self.forms.iter().map(|f| f.catalog_index)
    }
}

/// The term and species of a family's species among the solver's terms (None for a strong
/// ion, or a family the mixture does not hold).
fn term_of(terms: &[Term], p: Part) -> Option<(usize, usize)> {
    match p {
        Part::Family(f, j) => terms
            .iter()
            .position(|t| t.family == f && j <= t.n)
            .map(|i| (i, j)),
        Part::Ion(_) => None,
    }
}

/// Where the mixture holds `metal`, if it holds any.
fn metal_at(metal: Part, terms: &[Term], ions: &[(IonId, f64)], liquid_l: f64) -> Option<MetalAt> {
    match metal {
        Part::Family(..) => term_of(terms, metal).map(|(i, j)| MetalAt::Term(i, j)),
        Part::Ion(id) => ions
            .iter()
            .position(|&(i, n)| i == id && n > 0.0)
            .map(|slot| MetalAt::Ion {
                total: ions[slot].1 / liquid_l,
                slot,
            }),
    }
}

/// The charge of a metal's free ion.
fn part_charge(cat: &Catalog, metal: Part) -> i32 {
    match metal {
        Part::Family(f, j) => cat.family(f).species[j].charge,
        Part::Ion(id) => cat.ion(id).charge,
    }
}

/// A thermodynamic constant at `t_k` from its log K at the reference temperature and its
/// reaction enthalpy.
fn constant_at(cat: &Catalog, log_k_ref: f64, dh: Option<f64>, t_k: f64) -> f64 {
    let log_k = log_k_at(&cat.physical, log_k_ref, dh.unwrap_or(0.0), t_k);
    (log_k * std::f64::consts::LN_10).exp()
}

impl Form {
    /// Complex `ci` of the catalog, formed by metal `metal` with ligand `ligand`, at `t_k`.
    fn of(cat: &Catalog, ci: usize, metal: usize, ligand: Option<usize>, t_k: f64) -> Self {
        let c = &cat.complexes[ci];
        let k = constant_at(cat, c.log_beta, c.dh, t_k);
        Form {
            catalog_index: ci,
            metal,
            ligand,
            n: i32::from(c.n),
            protons: c.protons,
            charge: c.charge,
            k,
            k_eff: k,
        }
    }
}

impl SolidCap {
    /// The solid that caps `metal`, if the data give one, at `t_k`.
    fn of(cat: &Catalog, metal: Part, t_k: f64) -> Option<Self> {
        let si = cat.solids.iter().position(|sd| sd.metal == metal)?;
        let sd = &cat.solids[si];
        let k = constant_at(cat, sd.log_k, sd.dh, t_k);
        Some(SolidCap {
            catalog_index: si,
            k,
            k_eff: k,
        })
    }
}

/// Φ at a point of the joint search, with its gradient (each ligand's balance) and Hessian
/// (row-major).
struct PotentialAt {
    phi: f64,
    grad: SmallVec<[f64; 4]>,
    hess: SmallVec<[f64; 16]>,
}

impl PotentialAt {
    fn zero(n: usize) -> Self {
        PotentialAt {
            phi: 0.0,
            grad: SmallVec::from_elem(0.0, n),
            hess: SmallVec::from_elem(0.0, n * n),
        }
    }
}

/// The joint search over every ligand's ln L at one a(H+).
struct JointSearch<'a> {
    cx: &'a Complexation,
    ligand_totals: &'a [(f64, f64)],
    base: &'a [f64],
    metal_totals: &'a [MetalNow],
    /// True for a ligand the mixture holds any of; the others take no part.
    active: SmallVec<[bool; 4]>,
    /// ln L with the whole of each ligand free: the top of its search span.
    ceiling: SmallVec<[f64; 4]>,
}

impl<'a> JointSearch<'a> {
    fn new(
        cx: &'a Complexation,
        ligand_totals: &'a [(f64, f64)],
        base: &'a [f64],
        metal_totals: &'a [MetalNow],
    ) -> Self {
        let active = ligand_totals.iter().map(|&(t, _)| t > 0.0).collect();
        let ceiling = ligand_totals
            .iter()
            .map(|&(t, p)| {
                if t > 0.0 {
                    (t / p).ln()
                } else {
                    f64::NEG_INFINITY
                }
            })
            .collect();
        JointSearch {
            cx,
            ligand_totals,
            base,
            metal_totals,
            active,
            ceiling,
        }
    }

    /// Φ and its derivatives at `ln_l`, written over a copy of `like`.
    fn potential_at(&self, ln_l: &[f64], like: &PotentialAt) -> PotentialAt {
        let (mut grad, mut hess) = (like.grad.clone(), like.hess.clone());
        let phi = self.cx.potential(
            ln_l,
            self.ligand_totals,
            self.base,
            self.metal_totals,
            &mut grad,
            &mut hess,
        );
        PotentialAt { phi, grad, hess }
    }

    /// Backtracks along `step` from `ln_l` (each ln L kept within its span) until Φ falls
    /// enough; returns the point reached and whether it was accepted, with `at` moved there
    /// when it was.
    fn line_search(
        &self,
        ln_l: &[f64],
        step: &[f64],
        longest: f64,
        at: &mut PotentialAt,
    ) -> (SmallVec<[f64; 4]>, bool) {
        let slope: f64 = step.iter().zip(&at.grad).map(|(d, g)| d * g).sum();
        let mut t = 1.0;
        let mut trial: SmallVec<[f64; 4]> = SmallVec::from_slice(ln_l);
        for _ in 0..60 {
            for k in 0..ln_l.len() {
                if self.active[k] {
                    trial[k] = (ln_l[k] + t * step[k])
                        .clamp(self.ceiling[k] - LN_SPAN, self.ceiling[k] + 1.0);
                }
            }
            let next = self.potential_at(&trial, at);
            if next.phi <= at.phi + 1e-4 * t * slope || t * longest < LN_TOLERANCE {
                *at = next;
                return (trial, true);
            }
            t *= 0.5;
        }
        (trial, false)
    }
}
