//! The proton-transfer pair table: why a gas forms.
//!
//! For every donor HA in one batch and acceptor B in the other, HA + B ⇌ A + HB with
//! log10 K = pKa(HB) − pKa(HA): Ka of the reacting acid over Ka of the acid produced.
//! The table explains; the numbers come from the speciation of the whole mixture.

use crate::catalog::{Catalog, FamilyId};
use crate::chem::temperature::{log_k_at, log_ka, log_kw};
use crate::chem::Equilibrium;
use serde::Serialize;

/// Which batch a species came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Side {
    Container,
    Stream,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Extent {
    Complete,
    Equilibrium,
    Negligible,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Pair {
    pub donor: String,
    pub donor_side: Side,
    pub acceptor: String,
    pub acceptor_side: Side,
    pub produced_acid: String,
    pub produced_base: String,
    pub log_k: f64,
    pub extent: Extent,
    /// Gases among the products (the produced acid or the donor's conjugate base).
    pub volatile_products: Vec<String>,
}

/// A species able to give or take a proton, with the pKa of the step it takes part in.
struct Actor {
    formula: String,
    /// pKa of the acid form of the step (for a donor: its own; for an acceptor: its conjugate acid's).
    pka: f64,
    /// The other member of the step (donor → its base; acceptor → its acid).
    partner: String,
    /// Gas the partner forms, if volatile.
    partner_gas: Option<String>,
}

/// Concentration a species must reach (and share of its family) to count as present.
const PRESENT_MOL_PER_L: f64 = 1e-7;
const PRESENT_FRACTION: f64 = 1e-3;
/// Free H3O+ or OH- above this counts as a donor or acceptor of its own.
const WATER_ION_MOL_PER_L: f64 = 1e-3;

fn gas_of(cat: &Catalog, fid: FamilyId, species: usize) -> Option<String> {
    let fam = cat.family(fid);
    (fam.volatile_index() == Some(species)).then(|| fam.volatile.as_ref().unwrap().gas.to_string())
}

fn actors(cat: &Catalog, eq: &Equilibrium, t_k: f64) -> (Vec<Actor>, Vec<Actor>) {
    let phys = &cat.physical;
    let mut donors = Vec::new();
    let mut acceptors = Vec::new();
    for fs in &eq.families {
        let fam = cat.family(fs.family);
        let total: f64 = fs.concentrations.iter().sum();
        for (j, &c) in fs.concentrations.iter().enumerate() {
            if c < PRESENT_MOL_PER_L || c < PRESENT_FRACTION * total {
                continue;
            }
            if j < fam.steps.len() {
                donors.push(Actor {
                    formula: fam.species[j].formula.clone(),
                    pka: -log_ka(phys, fam, j, t_k),
                    partner: fam.species[j + 1].formula.clone(),
                    partner_gas: gas_of(cat, fs.family, j + 1),
                });
            }
            if j > 0 {
                acceptors.push(Actor {
                    formula: fam.species[j].formula.clone(),
                    pka: -log_ka(phys, fam, j - 1, t_k),
                    partner: fam.species[j - 1].formula.clone(),
                    partner_gas: gas_of(cat, fs.family, j - 1),
                });
            }
        }
    }
    // H3O+ and OH- on the usual scale where pKa(H3O+) = 0 and pKa(H2O) = pKw.
    acceptors.extend(complex_acceptors(cat, eq, t_k));
    if eq.h_mol_per_l >= WATER_ION_MOL_PER_L {
        donors.push(Actor {
            formula: "H3O+".into(),
            pka: 0.0,
            partner: "H2O".into(),
            partner_gas: None,
        });
    }
    if eq.oh_mol_per_l >= WATER_ION_MOL_PER_L {
        acceptors.push(Actor {
            formula: "OH-".into(),
            pka: -log_kw(phys, cat.family(cat.water), t_k),
            partner: "H2O".into(),
            partner_gas: None,
        });
    }
    (donors, acceptors)
}

/// Metal complexes as acceptors: a proton takes one ligand from ML_n, leaving ML_(n-1) and the
/// ligand's acid, with log K = pKa(HL) − log(β_n/β_(n−1)). The metal's hold on the ligand is
/// what the acid has to beat, so a held cyanide is a weaker base than a free one.
fn complex_acceptors(cat: &Catalog, eq: &Equilibrium, t_k: f64) -> Vec<Actor> {
    use crate::catalog::complexes::{Complex, Part};
    let phys = &cat.physical;
    let log_beta = |c: &Complex| log_k_at(phys, c.log_beta, c.dh.unwrap_or(0.0), t_k);
    let mut out = Vec::new();
    for cs in &eq.complexes {
        if cs.concentration < PRESENT_MOL_PER_L {
            continue;
        }
        let c = &cat.complexes[cs.catalog_index];
        let Some(Part::Family(fid, s)) = c.ligand else {
            continue;
        };
        if c.protons != 0 || s == 0 {
            continue;
        }
        let (lower_formula, lower_log_beta) = if c.n == 1 {
            (cat.part_formula(c.metal).to_string(), 0.0)
        } else {
            let Some(lower) = cat.complexes.iter().find(|o| {
                o.metal == c.metal && o.ligand == c.ligand && o.protons == 0 && o.n + 1 == c.n
            }) else {
                continue;
            };
            (lower.formula.clone(), log_beta(lower))
        };
        let fam = cat.family(fid);
        out.push(Actor {
            formula: c.formula.clone(),
            pka: -log_ka(phys, fam, s - 1, t_k) - (log_beta(c) - lower_log_beta),
            partner: format!("{} + {lower_formula}", fam.species[s - 1].formula),
            partner_gas: gas_of(cat, fid, s - 1),
        });
    }
    out
}

/// Where a transfer counts as complete or as negligible, by its log K (the site sets these
/// with its thresholds).
#[derive(Debug, Clone, Copy)]
pub struct ExtentBounds {
    pub complete_above_log_k: f64,
    pub negligible_below_log_k: f64,
}

/// Every donor of one batch with every acceptor of the other, strongest transfer first.
pub fn pair_table(
    cat: &Catalog,
    container: &Equilibrium,
    stream: &Equilibrium,
    t_k: f64,
    bounds: impl Into<ExtentBounds>,
) -> Vec<Pair> {
    let rules: ExtentBounds = bounds.into();
    let (cd, ca) = actors(cat, container, t_k);
    let (sd, sa) = actors(cat, stream, t_k);
    let mut pairs = Vec::new();
    let sides = [
        (&cd, Side::Container, &sa, Side::Stream),
        (&sd, Side::Stream, &ca, Side::Container),
    ];
    for (donors, dside, acceptors, aside) in sides {
        for d in donors.iter() {
            for a in acceptors.iter() {
                let log_k = a.pka - d.pka;
                let extent = if log_k > rules.complete_above_log_k {
                    Extent::Complete
                } else if log_k < rules.negligible_below_log_k {
                    Extent::Negligible
                } else {
                    Extent::Equilibrium
                };
                let volatile_products = a
                    .partner_gas
                    .iter()
                    .chain(d.partner_gas.iter())
                    .cloned()
                    .collect();
                pairs.push(Pair {
                    donor: d.formula.clone(),
                    donor_side: dside,
                    acceptor: a.formula.clone(),
                    acceptor_side: aside,
                    produced_acid: a.partner.clone(),
                    produced_base: d.partner.clone(),
                    log_k,
                    extent,
                    volatile_products,
                });
            }
        }
    }
    pairs.sort_by(|a, b| b.log_k.total_cmp(&a.log_k).then(a.donor.cmp(&b.donor)));
    pairs
}

/// The pairs worth showing by default: transfers that happen and form a gas, then the rest
/// that happen, strongest first.
pub fn pairs_that_matter(pairs: &[Pair], limit: usize) -> Vec<&Pair> {
    let mut out: Vec<&Pair> = pairs
        .iter()
        .filter(|p| p.extent != Extent::Negligible && !p.volatile_products.is_empty())
        .collect();
    for p in pairs.iter().filter(|p| p.extent == Extent::Complete) {
        if out.len() >= limit {
            break;
        }
        if !out.contains(&p) {
            out.push(p);
        }
    }
    out.truncate(limit);
    out
}
