//! The activity coefficients of a concentrated mixture while it is solved: every ion's own
//! coefficient from the ion-interaction equations (or the extended Debye–Hückel form for an
//! ion the parameters do not name), the neutral gases' salting-out, and water's activity,
//! all following the composition at the current iterate.

use smallvec::SmallVec;

use super::{liquid_total, weights, Link, Term, INLINE_TERMS, MAX_STEPS};
use crate::catalog::pitzer::PitzerTable;
use crate::catalog::salting::GasSalting;
use crate::catalog::{Catalog, FamilyId, IonId};
use crate::chem::pitzer::{Interactions, IonTreatment, Summary};

/// Inline room for the ions of one mixture.
const INLINE_SLOTS: usize = 32;

/// A species that is not an ion of the interaction model (a neutral one).
const NO_SLOT: u16 = u16::MAX;

/// Share of its sign's charge an ion must hold to set the mixture's validated range.
const MAJOR_SHARE: f64 = 0.1;

/// The neutral form of a family whose coefficient is followed: its salting-out and its
/// self-interaction.
#[derive(Clone, Copy)]
struct NeutralForm {
    species: usize,
    /// True when the salting-out parameters are the gas's own, not the upper estimate.
    own_salting: bool,
    /// h_G at the temperature, L/mol, where the data give one.
    h_gas: Option<f64>,
    lambda: Option<f64>,
}

/// What the model needs of a family's species, looked up once per catalog: each species' ion
/// id among the pair parameters, its salting-out parameter, and the neutral volatile form's
/// gas parameters.
#[derive(Clone, Copy)]
pub(super) struct SpeciesData {
    pitzer_id: [Option<u16>; MAX_STEPS + 1],
    salting_h: [f64; MAX_STEPS + 1],
    /// (species index, true when the gas has parameters of its own, its parameters).
    neutral: Option<(usize, bool, GasSalting)>,
}

impl SpeciesData {
    pub(super) fn of(cat: &Catalog, fam: &crate::catalog::species::Family, steps: usize) -> Self {
        let mut out = SpeciesData {
            pitzer_id: [None; MAX_STEPS + 1],
            salting_h: [0.0; MAX_STEPS + 1],
            neutral: None,
        };
        for (j, sp) in fam.species.iter().enumerate().take(steps + 1) {
            out.pitzer_id[j] = cat.pitzer.ion_id(&sp.formula);
            out.salting_h[j] = cat.salting.ion_h(&sp.formula).unwrap_or(0.0);
        }
        if let (Some(v), Some(k)) = (fam.volatile.as_ref(), fam.volatile_index()) {
            if fam.species[k].charge == 0 {
                let own = cat.salting.gas(&v.species).is_some();
                out.neutral = Some((k, own, *cat.salting.gas_or_unlisted(&v.species)));
            }
        }
        out
    }
}

pub(super) struct Concentrated<'c> {
    table: &'c PitzerTable,
    cat: &'c Catalog,
    formulas: SmallVec<[&'c str; INLINE_SLOTS]>,
    interactions: Interactions<'c>,
    /// mol/kg of water per mol/L of liquid.
    molal: f64,
    molal_scale: f64,
    /// Ionic strength (mol/kg) above which the coefficients are held.
    hold: f64,
    /// mol/kg of every ion: the strong ions first (fixed), then H+ and OH-, then the
    /// families' charged species.
    molalities: SmallVec<[f64; INLINE_SLOTS]>,
    held: SmallVec<[f64; INLINE_SLOTS]>,
    ln_gamma: SmallVec<[f64; INLINE_SLOTS]>,
    /// Each ion's salting-out parameter h_i, L/mol (0 where the data have none).
    salting_h: SmallVec<[f64; INLINE_SLOTS]>,
    h_slot: usize,
    oh_slot: usize,
    term_slots: SmallVec<[[u16; MAX_STEPS + 1]; INLINE_TERMS]>,
    /// Each metal complex's slot (NO_SLOT for a neutral one): complexes are ions of the
    /// mixture too, with the extended Debye–Hückel form (no pair parameters name them).
    complex_slots: SmallVec<[u16; 24]>,
    /// mol/kg of each strong ion as the mixture holds it, before complexes take their share.
    ion_totals: SmallVec<[f64; INLINE_SLOTS]>,
    neutrals: SmallVec<[Option<NeutralForm>; INLINE_TERMS]>,
    pub(super) summary: Summary,
    /// ln of water's activity as applied to the constants (moved by the same steps as the
    /// coefficients).
    ln_water: f64,
    /// The Davies equation's ln γ for unit charge is a function of I: its A (log10) and b.
    davies_a: f64,
    davies_b: f64,
    /// The ionic strength (mol/kg) where the model starts to take over from Davies; it has
    /// taken over wholly at twice this.
    dilute_below: f64,
}

/// The activity coefficients that the charge balance and the mass action use, as set by
/// one update.
pub(super) struct Coefficients {
    pub inv_gamma_h: f64,
    pub inv_gamma_oh: f64,
    pub water_activity: f64,
    /// The largest change of any ln γ in this update.
    pub change: f64,
}

impl<'c> Concentrated<'c> {
    #[allow(clippy::too_many_arguments)]
    pub(super) fn new(
        cat: &'c Catalog,
        ions: &[(IonId, f64)],
        liquid_l: f64,
        terms: &[Term],
        molal: f64,
        molal_scale: f64,
        a_phi: f64,
        debye_huckel_a: f64,
        t_k: f64,
        complex_charges: &[i32],
    ) -> Self {
        let table = &cat.pitzer;
        let mut slots = Slots::default();
        for &(id, n) in ions {
            let ion = cat.ion(id);
            slots.push_named(cat, ion.formula.as_str(), ion.charge, n / liquid_l * molal);
        }
        let h_slot = slots.formulas.len();
        slots.push_named(cat, "H+", 1, 0.0);
        slots.push_named(cat, "OH-", -1, 0.0);
        let (term_slots, neutrals) = slots.push_terms(cat, terms, t_k);
        let complex_slots = slots.push_complexes(complex_charges);
        let ion_totals = slots.molalities[..ions.len()].iter().copied().collect();
        let n = slots.formulas.len();
        let interactions = Interactions::with_ids(table, slots.ids, a_phi);
        Concentrated {
            table,
            cat,
            formulas: slots.formulas,
            interactions,
            molal,
            molal_scale,
            // Set from the composition by `hold_at_range`; unheld until then.
            hold: f64::INFINITY,
            molalities: slots.molalities,
            held: SmallVec::from_elem(0.0, n),
            ln_gamma: SmallVec::from_elem(0.0, n),
            salting_h: slots.salting_h,
            h_slot,
            oh_slot: h_slot + 1,
            term_slots,
            complex_slots,
            ion_totals,
            neutrals,
            summary: Summary {
                ionic_strength: 0.0,
                osmotic_coefficient: 1.0,
                water_activity: 1.0,
            },
            ln_water: 0.0,
            davies_a: debye_huckel_a,
            davies_b: cat.physical.davies_b,
            dilute_below: table.dilute_below,
        }
    }

    /// Moves every coefficient a share `step` of the way to its value for the composition at
    /// x (with H+ and OH- from the previous coefficients), and sets each term's cumulative
    /// constants and gas factor from them. The change reported is the whole way's.
    pub(super) fn update(
        &mut self,
        terms: &mut [Term],
        links: &mut [Link],
        x: f64,
        h_mol_per_l: f64,
        oh_mol_per_l: f64,
        step: f64,
    ) -> Coefficients {
        let molal = self.molal;
        let neutral_molality = self.read_composition(terms, x, h_mol_per_l, oh_mol_per_l);
        self.hold_molalities();
        let weight = self.set_ion_coefficients();
        let salting = self.salting_sums();
        let to_water = self.summary.water_activity.ln();
        let mut change: f64 = (to_water - self.ln_water).abs();
        self.ln_water += step * (to_water - self.ln_water);
        for (k, t) in terms.iter_mut().enumerate() {
            let neutral = self.neutrals[k].map(|nf| {
                (
                    nf.species,
                    self.neutral_ln_gamma(nf, weight, salting, neutral_molality[k]),
                )
            });
            change = self.update_term(t, &self.term_slots[k], neutral, step, change);
        }
        for l in links.iter_mut() {
            let ln_first = terms[l.first.0].ln_gamma[l.first.1];
            let ln_second = terms[l.second.0].ln_gamma[l.second.1];
            l.k_eff = l.k_form * (ln_first + ln_second - self.fallback_ln_gamma(l.charge)).exp();
        }
        // x is the activity of H+ on the molal scale: mol/L is mol/kg over `molal` (which
        // the dilute solve, where the two scales are near enough alike, leaves out).
        let to_molar = molal.powf(-weight);
        Coefficients {
            inv_gamma_h: (-self.ln_gamma[self.h_slot]).exp() * to_molar,
            inv_gamma_oh: (-self.ln_gamma[self.oh_slot]).exp() * to_molar,
            water_activity: self.summary.water_activity,
            change,
        }
    }

    /// Sets the molalities the coefficients are read at: beyond the highest ionic strength
    /// any parameters were fitted to, the coefficients are held at their value there (every
    /// molality scaled down alike).
    fn hold_molalities(&mut self) {
        let i: f64 = 0.5
            * self
                .molalities
                .iter()
                .enumerate()
                .map(|(k, m)| m * self.charge_squared(k))
                .sum::<f64>();
        let scale = if i > self.hold { self.hold / i } else { 1.0 };
        for (h, m) in self.held.iter_mut().zip(&self.molalities) {
            *h = m * scale;
        }
    }

    /// Sets every ion's ln γ and the summary (water's activity with them) at the held
    /// molalities; returns the model's share in them.
    fn set_ion_coefficients(&mut self) -> f64 {
        let mut ln_gamma = std::mem::take(&mut self.ln_gamma);
        // Water's activity is held with the rest: followed past the fitted range it would
        // fall towards zero in a wet salt, and Kw with it.
        let mut summary = self.interactions.evaluate(&self.held, &mut ln_gamma);
        // Between the dilute range and twice it, the coefficients pass over from Davies'
        // to the model's by the share `weight`, so that a pour crossing the range sees no
        // step in them.
        let weight = self.weight(summary.ionic_strength);
        if weight < 1.0 {
            let i_molar = summary.ionic_strength / self.molal;
            let sqrt_i = i_molar.sqrt();
            let davies_unit = -std::f64::consts::LN_10
                * self.davies_a
                * (sqrt_i / (1.0 + sqrt_i) - self.davies_b * i_molar);
            for (k, g) in ln_gamma.iter_mut().enumerate() {
                let z2 = self.charge_squared(k);
                *g = weight * *g + (1.0 - weight) * z2 * davies_unit;
            }
            summary.water_activity = summary.water_activity.powf(weight);
        }
        self.ln_gamma = ln_gamma;
        self.summary = summary;
        weight
    }

    /// Salting-out's Σ hᵢ cᵢ and Σ cᵢ over the ions, in mol/L (held like the rest).
    fn salting_sums(&self) -> (f64, f64) {
        let (mut sum_hc, mut sum_c) = (0.0, 0.0);
        for (h, m) in self.salting_h.iter().zip(&self.held) {
            let c = m / self.molal;
            sum_hc += h * c;
            sum_c += c;
        }
        (sum_hc, sum_c)
    }

    /// ln γ of a followed neutral form: its salting-out (weighted like the ions' model) and
    /// its self-interaction at `molality`.
    fn neutral_ln_gamma(
        &self,
        nf: NeutralForm,
        weight: f64,
        (sum_hc, sum_c): (f64, f64),
        molality: f64,
    ) -> f64 {
        let mut ln_neutral = 0.0;
        if let Some(h_gas) = nf.h_gas {
            ln_neutral += weight * std::f64::consts::LN_10 * (sum_hc + h_gas * sum_c);
        }
        if let Some(lambda) = nf.lambda {
            ln_neutral += 2.0 * lambda * molality;
        }
        ln_neutral
    }

    /// Moves a term's ln γ a share `step` of the way to the ions' (and its neutral form's,
    /// given as (species, ln γ)), and sets its constants and gas factor from them; returns
    /// `change` raised to the largest change of any of them the whole way would make.
    fn update_term(
        &self,
        t: &mut Term,
        slots: &[u16; MAX_STEPS + 1],
        neutral: Option<(usize, f64)>,
        step: f64,
        mut change: f64,
    ) -> f64 {
        let mut next = [0.0; MAX_STEPS + 1];
        for j in 0..=t.n {
            if slots[j] != NO_SLOT {
                next[j] = self.ln_gamma[slots[j] as usize];
            }
        }
        if let Some((species, ln_neutral)) = neutral {
            next[species] = ln_neutral;
        }
        for (to, from) in next.iter_mut().zip(&t.ln_gamma).take(t.n + 1) {
            change = change.max((*to - from).abs());
            *to = from + step * (*to - from);
        }
        t.ln_gamma = next;
        t.beta[0] = 1.0;
        for j in 0..t.n {
            let ln_ratio = next[j] - next[j + 1] + t.water_taken[j] * self.ln_water;
            t.beta[j + 1] = t.beta[j] * t.ka[j] * ln_ratio.exp();
        }
        if let Some((species, _)) = neutral {
            t.henry = self.molal_scale * next[species].exp();
            t.gas_factor = t.base_gas_factor * t.henry;
        }
        change
    }

    /// Sets the complexes' molalities (from mol/L) and takes what they hold of each strong-ion
    /// metal (slot, mol/L) off that ion's own molality.
    pub(super) fn set_complexes(&mut self, complexes: &[f64], ions_bound: &[(usize, f64)]) {
        for (k, t) in self.ion_totals.iter().enumerate() {
            self.molalities[k] = *t;
        }
        for &(slot, bound) in ions_bound {
            self.molalities[slot] = (self.ion_totals[slot] - bound * self.molal).max(0.0);
        }
        for (&slot, &c) in self.complex_slots.iter().zip(complexes) {
            if slot != NO_SLOT {
                self.molalities[slot as usize] = c * self.molal;
            }
        }
    }

    /// ln γ of complex `k` (in the order the complexes were given; 0 for a neutral one).
    pub(super) fn complex_ln_gamma(&self, k: usize) -> f64 {
        match self.complex_slots.get(k) {
            Some(&slot) if slot != NO_SLOT => self.ln_gamma[slot as usize],
            _ => 0.0,
        }
    }

    /// ln γ of the strong ion in `slot` (its place among the mixture's ions).
    pub(super) fn ion_ln_gamma(&self, slot: usize) -> f64 {
        self.ln_gamma[slot]
    }

    /// ln of water's activity as the constants take it.
    pub(super) fn ln_water(&self) -> f64 {
        self.ln_water
    }

    /// The model's share in the coefficients at ionic strength `i` (mol/kg).
    fn weight(&self, i: f64) -> f64 {
        if self.dilute_below <= 0.0 {
            return 1.0;
        }
        ((i - self.dilute_below) / self.dilute_below).clamp(0.0, 1.0)
    }

    fn charge_squared(&self, k: usize) -> f64 {
        let z = self.interactions.charge(k);
        (z * z) as f64
    }

    /// ln γ of an ion of charge z by the extended Debye–Hückel form, at the held ionic
    /// strength.
    pub(super) fn fallback_ln_gamma(&self, z: i32) -> f64 {
        if z == 0 {
            return 0.0;
        }
        self.interactions
            .extended_ln_gamma(z, self.summary.ionic_strength)
    }

    /// The ionic strength (mol/kg) up to which the coefficients of this mixture are
    /// validated: the least over the pairs of major ions (each holding at least a tenth of
    /// its sign's charge) of the range the pair's parameters were fitted to, or the extended
    /// form's range where a major ion has no parameters with the other.
    pub(super) fn validated_range(&self) -> (f64, RangeSetBy) {
        let n = self.molalities.len();
        let charge = |k: usize| self.interactions.charge(k);
        let is_major = self.major_ions();
        let major = |k: usize| is_major[k];
        let mut range = f64::INFINITY;
        let mut set_by = RangeSetBy::Extended(String::new());
        for c in (0..n).filter(|&k| charge(k) > 0 && major(k)) {
            for a in (0..n).filter(|&k| charge(k) < 0 && major(k)) {
                let fitted = self.interactions.pair(c, a).map(|p| p.max_ionic_strength());
                let this = fitted.unwrap_or(self.table.fallback.max_ionic_strength);
                if this < range {
                    range = this;
                    let pair = (self.formulas[c].to_string(), self.formulas[a].to_string());
                    set_by = match fitted {
                        Some(_) => RangeSetBy::Pair(pair.0, pair.1),
                        None => RangeSetBy::Unpaired(pair.0, pair.1),
                    };
                }
            }
        }
        if range.is_finite() {
            (range, set_by)
        } else {
            (self.table.fallback.max_ionic_strength, set_by)
        }
    }

    /// How each ion present and each neutral gas was treated; `range_set_by` is what
    /// `validated_range` gave.
    pub(super) fn detail(&self, terms: &[Term], range_set_by: RangeSetBy) -> ActivityDetail {
        let i = self.ionic_strength().max(f64::MIN_POSITIVE);
        let mut detail = ActivityDetail {
            ion_interaction: Vec::new(),
            extended_debye_huckel: Vec::new(),
            salting_own: Vec::new(),
            salting_estimated: Vec::new(),
            range_set_by,
        };
        for (k, f) in self.formulas.iter().enumerate() {
            let z2 = self.charge_squared(k);
            // Ions that carry at least a thousandth of the ionic strength.
            if z2 == 0.0 || 0.5 * self.molalities[k] * z2 < 1e-3 * i {
                continue;
            }
            let list = match self.interactions.treatment(k) {
                IonTreatment::IonInteraction => &mut detail.ion_interaction,
                IonTreatment::ExtendedDebyeHuckel => &mut detail.extended_debye_huckel,
            };
            if !list.iter().any(|x| x == f) {
                list.push(f.to_string());
            }
        }
        for (t, nf) in terms.iter().zip(&self.neutrals) {
            let Some(nf) = nf else { continue };
            let formula = self.cat.family(t.family).species[nf.species]
                .formula
                .clone();
            if nf.own_salting {
                detail.salting_own.push(formula);
            } else {
                detail.salting_estimated.push(formula);
            }
        }
        detail
    }

    /// Sets every ion's molality from the composition at x; returns each term's neutral
    /// form's molality.
    fn read_composition(
        &mut self,
        terms: &[Term],
        x: f64,
        h_mol_per_l: f64,
        oh_mol_per_l: f64,
    ) -> SmallVec<[f64; INLINE_TERMS]> {
        let molal = self.molal;
        self.molalities[self.h_slot] = h_mol_per_l * molal;
        self.molalities[self.oh_slot] = oh_mol_per_l * molal;
        let mut w = [0.0; MAX_STEPS + 1];
        let mut neutral_molality = SmallVec::new();
        for (t, slots) in terms.iter().zip(&self.term_slots) {
            let d = weights(t, x, &mut w);
            let c_aq = liquid_total(t, w[t.volatile] / d);
            for j in 0..=t.n {
                if slots[j] != NO_SLOT {
                    self.molalities[slots[j] as usize] = w[j] / d * c_aq * molal;
                }
            }
            neutral_molality.push(w[t.volatile] / d * c_aq * molal);
        }
        neutral_molality
    }

    /// Holds the coefficients, from here on, at their value at the ionic strength up to which
    /// the model is validated for the composition at x (read once, from the dilute root, so
    /// that the hold cannot move while the coefficients settle), and no lower than where the
    /// model has wholly taken over from Davies.
    pub(super) fn hold_at_range(
        &mut self,
        terms: &[Term],
        x: f64,
        h_mol_per_l: f64,
        oh_mol_per_l: f64,
    ) {
        self.read_composition(terms, x, h_mol_per_l, oh_mol_per_l);
        self.hold = self.hold_range().max(2.0 * self.dilute_below);
    }

    /// The highest ionic strength (mol/kg) that any pair of the major ions' parameters was
    /// fitted to (the extended form's range where none has parameters): past it no part of
    /// the mixture is within a fit, and the coefficients are held.
    fn hold_range(&self) -> f64 {
        let n = self.molalities.len();
        let major = self.major_ions();
        let mut hold = self.table.fallback.max_ionic_strength;
        for (c, a, p) in self.interactions.pairs() {
            if c < n && a < n && major[c] && major[a] {
                hold = hold.max(p.max_ionic_strength());
            }
        }
        hold
    }

    /// Which ions hold at least a tenth of their sign's charge.
    fn major_ions(&self) -> SmallVec<[bool; INLINE_SLOTS]> {
        let n = self.molalities.len();
        let charge = |k: usize| self.interactions.charge(k);
        let equivalents = |k: usize| self.molalities[k].max(0.0) * charge(k).abs() as f64;
        let (mut pos, mut neg) = (0.0, 0.0);
        for k in 0..n {
            if charge(k) > 0 {
                pos += equivalents(k);
            } else if charge(k) < 0 {
                neg += equivalents(k);
            }
        }
        (0..n)
            .map(|k| {
                let total = if charge(k) > 0 { pos } else { neg };
                charge(k) != 0 && total > 0.0 && equivalents(k) >= MAJOR_SHARE * total
            })
            .collect()
    }

    /// The ionic strength of the real amounts (not held), mol/kg.
    pub(super) fn ionic_strength(&self) -> f64 {
        0.5 * self
            .molalities
            .iter()
            .enumerate()
            .map(|(k, m)| m * self.charge_squared(k))
            .sum::<f64>()
    }

    /// How the model treated each ion present: the treatment of slot k.
    #[allow(dead_code)]
    pub(super) fn treatment(&self, k: usize) -> IonTreatment {
        self.interactions.treatment(k)
    }
}

/// The ions of a mixture as the model numbers them, built up slot by slot: the strong ions,
/// H+ and OH-, the families' charged species, then the charged complexes.
#[derive(Default)]
struct Slots<'c> {
    formulas: SmallVec<[&'c str; INLINE_SLOTS]>,
    /// Each ion's id among the pair parameters, and its charge.
    ids: SmallVec<[(Option<u16>, i32); INLINE_SLOTS]>,
    salting_h: SmallVec<[f64; INLINE_SLOTS]>,
    molalities: SmallVec<[f64; INLINE_SLOTS]>,
}

impl<'c> Slots<'c> {
    fn push(&mut self, formula: &'c str, id: (Option<u16>, i32), salting_h: f64, molality: f64) {
        self.formulas.push(formula);
        self.ids.push(id);
        self.salting_h.push(salting_h);
        self.molalities.push(molality);
    }

    /// An ion whose parameters are looked up by its formula.
    fn push_named(&mut self, cat: &Catalog, formula: &'c str, charge: i32, molality: f64) {
        let id = (cat.pitzer.ion_id(formula), charge);
        let salting_h = cat.salting.ion_h(formula).unwrap_or(0.0);
        self.push(formula, id, salting_h, molality);
    }

    /// A slot for each charged species of each term, and each term's neutral form whose
    /// coefficient is followed.
    #[allow(clippy::type_complexity)]
    fn push_terms(
        &mut self,
        cat: &'c Catalog,
        terms: &[Term],
        t_k: f64,
    ) -> (
        SmallVec<[[u16; MAX_STEPS + 1]; INLINE_TERMS]>,
        SmallVec<[Option<NeutralForm>; INLINE_TERMS]>,
    ) {
        let t_ref = cat.physical.t_ref;
        let mut term_slots = SmallVec::new();
        let mut neutrals = SmallVec::new();
        for t in terms {
            let fam = cat.family(t.family);
            let data = &t.activity_data;
            let mut slots = [NO_SLOT; MAX_STEPS + 1];
            for (j, sp) in fam.species.iter().enumerate().take(t.n + 1) {
                if sp.charge != 0 {
                    slots[j] = self.formulas.len() as u16;
                    let id = (data.pitzer_id[j], sp.charge);
                    self.push(sp.formula.as_str(), id, data.salting_h[j], 0.0);
                }
            }
            term_slots.push(slots);
            neutrals.push(data.neutral.map(|(species, own_salting, gas)| NeutralForm {
                species,
                own_salting,
                h_gas: Some(gas.h_g(t_k, t_ref)),
                lambda: t.lambda,
            }));
        }
        (term_slots, neutrals)
    }

    /// A slot for each charged complex (NO_SLOT for a neutral one); no pair parameters name
    /// them.
    fn push_complexes(&mut self, complex_charges: &[i32]) -> SmallVec<[u16; 24]> {
        let mut complex_slots = SmallVec::new();
        for &z in complex_charges {
            if z == 0 {
                complex_slots.push(NO_SLOT);
            } else {
                complex_slots.push(self.formulas.len() as u16);
                self.push("", (None, z), 0.0, 0.0);
            }
        }
        complex_slots
    }
}

/// What sets the ionic strength up to which a concentrated mixture's coefficients hold.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum RangeSetBy {
    /// The fitted range of a pair of major ions' parameters (cation, anion).
    Pair(String, String),
    /// A pair of major ions with no parameters of its own (cation, anion): the extended
    /// Debye–Hückel form's range.
    Unpaired(String, String),
    /// No major pair: the extended form's range.
    Extended(String),
}

/// How the model for concentrated mixtures treated a solution.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ActivityDetail {
    /// Ions (holding at least a thousandth of the ionic strength) given Pitzer's equations.
    pub ion_interaction: Vec<String>,
    /// Ions the parameters do not name, given the extended Debye–Hückel form.
    pub extended_debye_huckel: Vec<String>,
    /// Neutral gases salted out by their own parameters.
    pub salting_own: Vec<String>,
    /// Neutral gases with no parameters of their own, salted out by the upper estimate.
    pub salting_estimated: Vec<String>,
    pub range_set_by: RangeSetBy,
}

/// An upper bound on a mixture's ionic strength in mol/L: every strong ion, and every
/// family at its most highly charged species, each counted twice for its counter-ions.
pub(super) fn ionic_strength_bound(
    cat: &Catalog,
    ions: &[(IonId, f64)],
    families: &[(FamilyId, f64)],
    liquid_l: f64,
) -> f64 {
    let mut sum = 0.0;
    for &(id, n) in ions {
        let z = cat.ion(id).charge as f64;
        sum += z * z * n;
    }
    for &(fid, n) in families {
        if fid == cat.water {
            continue;
        }
        let z_max = cat
            .family(fid)
            .species
            .iter()
            .map(|s| s.charge.abs())
            .max()
            .unwrap_or(0) as f64;
        sum += z_max * z_max * n;
    }
    sum / liquid_l
}
