//! Loads the tables that refer to substances or ions by name: density, dilution heat,
//! volatility, the gases' levels and the ion-interaction parameters.

use super::{
    density, dilution, line_of, normalize_name, pitzer, species, volatility, CatalogError,
    FamilyId, LimitsFile, Src, Substance, SubstanceId, WATER_MOLAR_MASS,
};
use std::collections::HashMap;

/// The resolved substances and their index, for the tables that name substances.
pub(super) struct SubstanceNames<'a> {
    pub index: &'a HashMap<String, SubstanceId>,
    pub substances: &'a [Substance],
}

impl SubstanceNames<'_> {
    /// The substance a table's entry names under `key`.
    fn lookup(&self, src: Src<'_>, key: &str, name: &str) -> Result<SubstanceId, CatalogError> {
        self.index
            .get(&normalize_name(name))
            .copied()
            .ok_or_else(|| src.err_at(key, name, 0, format!("unknown substance `{name}`")))
    }

    /// What a substance dissolves as: itself, or a commercial solution's solute.
    fn dissolves_as(&self, i: usize) -> usize {
        self.substances[i]
            .solution
            .as_ref()
            .map_or(i, |sol| sol.solute.0)
    }

    /// For each substance, the entry of a table (by substance) for what it dissolves as.
    fn entry_of_each(&self, entry_of_substance: &HashMap<usize, usize>) -> Vec<Option<usize>> {
        (0..self.substances.len())
            .map(|i| entry_of_substance.get(&self.dissolves_as(i)).copied())
            .collect()
    }
}

/// The density data: water's, the tables, and for each substance its table with the
/// g/mol of the anhydrous solute the table counts.
pub(super) struct DensityData {
    pub water_density: f64,
    pub tables: Vec<density::DensityTable>,
    pub of_substance: Vec<Option<(usize, f64)>>,
}

pub(super) fn load_density(
    file: &density::DensityFile,
    names: &SubstanceNames<'_>,
    src: Src<'_>,
) -> Result<DensityData, CatalogError> {
    if file.water.source.trim().is_empty() {
        return Err(src.err_line(
            line_of(src.text, None, "water", "", 0),
            "the water density has no source".into(),
        ));
    }
    let water_density = file.water.density;
    let mut tables = Vec::new();
    let mut table_of_substance: HashMap<usize, usize> = HashMap::new();
    for e in &file.solutes {
        let at = |nth: usize, m: String| src.err_in("solutes", "substance", &e.substance, nth, m);
        let sid = names.lookup(src, "substance", &e.substance)?;
        let t = density::DensityTable::new(e, water_density).map_err(|m| at(0, m))?;
        if table_of_substance.insert(sid.0, tables.len()).is_some() {
            return Err(at(1, format!("`{}` appears twice", e.substance)));
        }
        tables.push(t);
    }
    Ok(DensityData {
        water_density,
        tables,
        of_substance: density_table_of_each(names, &table_of_substance),
    })
}

/// Each substance's density table: that of what it dissolves as, or else the one table of
/// a substance that gives the same (so a hydrate shares its anhydrous salt's table and the
/// other way round: same ions and families in water, mass percent counted as the
/// anhydrous salt).
fn density_table_of_each(
    names: &SubstanceNames<'_>,
    table_of_substance: &HashMap<usize, usize>,
) -> Vec<Option<(usize, f64)>> {
    // A signature two tables share is ambiguous.
    let mut table_of_signature: HashMap<String, Option<usize>> = HashMap::new();
    for (&sub, &t) in table_of_substance {
        if let Some(sig) = what_it_gives(&names.substances[sub]) {
            table_of_signature
                .entry(sig)
                .and_modify(|v| *v = None)
                .or_insert(Some(t));
        }
    }
    (0..names.substances.len())
        .map(|i| {
            let base = names.dissolves_as(i);
            let table = table_of_substance.get(&base).copied().or_else(|| {
                what_it_gives(&names.substances[base])
                    .and_then(|sig| table_of_signature.get(&sig).copied().flatten())
            });
            match (table, anhydrous_molar_mass(&names.substances[base])) {
                (Some(t), Some(m)) => Some((t, m)),
                _ => None,
            }
        })
        .collect()
}

/// The families and ions a substance gives in water, as one comparable string; None for
/// an inert substance.
fn what_it_gives(s: &Substance) -> Option<String> {
    if s.is_inert() {
        return None;
    }
    let mut parts: Vec<String> = s
        .families
        .iter()
        .map(|(f, k)| format!("f{}x{k}", f.0))
        .chain(s.ions.iter().map(|(i, k)| format!("i{}x{k}", i.0)))
        .collect();
    parts.sort();
    Some(parts.join(","))
}

/// g/mol of a substance without its crystal water.
fn anhydrous_molar_mass(s: &Substance) -> Option<f64> {
    let m = s.molar_mass?;
    let water = s.formula.as_deref().map_or(0.0, density::crystal_water);
    Some(m - water * WATER_MOLAR_MASS)
}

/// The dilution curves, and for each substance the curve of what it dissolves as.
pub(super) fn load_dilution(
    file: &dilution::DilutionFile,
    names: &SubstanceNames<'_>,
    species: &species::SpeciesFile,
    family_index: &HashMap<String, FamilyId>,
    src: Src<'_>,
) -> Result<(Vec<dilution::DilutionCurve>, Vec<Option<usize>>), CatalogError> {
    let mut curves = Vec::new();
    let mut curve_of_substance: HashMap<usize, usize> = HashMap::new();
    for e in &file.curves {
        let at = |nth: usize, m: String| src.err_at("solute", &e.solute, nth, m);
        let sid = names.lookup(src, "solute", &e.solute)?;
        let steps = included_steps(e, species, family_index).map_err(|m| at(0, m))?;
        let c = dilution::DilutionCurve::new(e, steps).map_err(|m| at(0, m))?;
        if curve_of_substance.insert(sid.0, curves.len()).is_some() {
            return Err(at(1, format!("`{}` appears twice", e.solute)));
        }
        curves.push(c);
    }
    Ok((curves, names.entry_of_each(&curve_of_substance)))
}

/// The weak-acid steps a dilution curve's measured heat already includes.
fn included_steps(
    e: &dilution::CurveEntry,
    species: &species::SpeciesFile,
    family_index: &HashMap<String, FamilyId>,
) -> Result<Vec<dilution::IncludedStep>, String> {
    let mut steps = Vec::new();
    for sr in &e.weak_steps_included {
        let fam = family_index
            .get(&sr.family)
            .map(|f| &species.families[f.0])
            .filter(|f| sr.step < f.steps.len())
            .ok_or_else(|| {
                format!(
                    "`{}`: no step {} in family `{}`",
                    e.solute, sr.step, sr.family
                )
            })?;
        steps.push(dilution::IncludedStep {
            ka: 10f64.powf(-fam.steps[sr.step].pka),
            dh: fam.steps[sr.step].dh,
            protons_before: sr.step as f64,
        });
    }
    Ok(steps)
}

/// The solvents' volatility, and for each substance the entry of what it dissolves as.
pub(super) fn load_volatility(
    file: &volatility::VolatilityFile,
    names: &SubstanceNames<'_>,
    src: Src<'_>,
) -> Result<(Vec<volatility::Volatility>, Vec<Option<usize>>), CatalogError> {
    let mut volatilities = Vec::new();
    let mut volatility_of_substance: HashMap<usize, usize> = HashMap::new();
    for e in &file.solvents {
        let at = |nth: usize, m: String| src.err_at("substance", &e.substance, nth, m);
        let sid = names.lookup(src, "substance", &e.substance)?;
        let v = volatility::Volatility::from_entry(e).map_err(|m| at(0, m))?;
        if volatility_of_substance
            .insert(sid.0, volatilities.len())
            .is_some()
        {
            return Err(at(1, format!("`{}` appears twice", e.substance)));
        }
        volatilities.push(v);
    }
    Ok((volatilities, names.entry_of_each(&volatility_of_substance)))
}

/// Checks that each gas has its kinds and is listed once, and indexes the gases by name.
pub(super) fn index_gases(
    limits: &LimitsFile,
    src: Src<'_>,
) -> Result<HashMap<String, usize>, CatalogError> {
    let mut gas_index = HashMap::new();
    for (i, g) in limits.gases.iter().enumerate() {
        let at = |nth: usize, m: String| src.err_in("gases", "gas", &g.gas, nth, m);
        if g.kinds.is_empty() || g.kinds_source.trim().is_empty() {
            return Err(at(
                0,
                format!(
                    "gas `{}`: `kinds` needs at least one kind and a kinds_source",
                    g.gas
                ),
            ));
        }
        if gas_index.insert(g.gas.clone(), i).is_some() {
            return Err(at(1, format!("gas `{}` appears twice", g.gas)));
        }
    }
    Ok(gas_index)
}

/// The ion-interaction parameters: the Debye-Hückel constants, the pairs, when the model
/// applies and the fallback beyond the pairs.
pub(super) fn load_pitzer(
    file: &pitzer::PitzerFile,
    src: Src<'_>,
    charge_of: &dyn Fn(&str) -> Option<i32>,
) -> Result<pitzer::PitzerTable, CatalogError> {
    let dh = &file.debye_huckel;
    if !(dh.a_phi > 0.0 && dh.b > 0.0) || dh.source.trim().is_empty() {
        return Err(src.err_line(
            line_of(src.text, None, "debye_huckel", "", 0),
            "debye_huckel needs a positive a_phi and b, and a source".into(),
        ));
    }
    let pairs = load_pitzer_pairs(file, src, charge_of)?;
    let model = &file.model;
    if model.dilute_below_ionic_strength.is_nan()
        || model.dilute_below_ionic_strength < 0.0
        || model.dilute_basis.trim().is_empty()
    {
        return Err(src.err_line(
            line_of(src.text, None, "model", "", 0),
            "model needs dilute_below_ionic_strength of 0 or more (mol/kg) and a dilute_basis"
                .into(),
        ));
    }
    let x = &file.extended_debye_huckel;
    if !(x.ion_size_angstrom > 0.0
        && x.b_per_angstrom > 0.0
        && x.b_dot.is_finite()
        && x.max_ionic_strength > 0.0)
        || x.source.trim().is_empty()
    {
        return Err(src.err_line(
            line_of(src.text, None, "extended_debye_huckel", "", 0),
            "extended_debye_huckel needs a positive ion_size_angstrom, b_per_angstrom and max_ionic_strength, a b_dot, and a source".into(),
        ));
    }
    Ok(pitzer::PitzerTable {
        a_phi_25: dh.a_phi,
        b: dh.b,
        pairs,
        fallback: pitzer::ExtendedDebyeHuckel {
            ion_size_angstrom: x.ion_size_angstrom,
            b_per_angstrom: x.b_per_angstrom,
            b_dot: x.b_dot,
            max_ionic_strength: x.max_ionic_strength,
        },
        dilute_below: model.dilute_below_ionic_strength,
        ions: Vec::new(),
        pair_of_ids: Vec::new(),
    }
    .index())
}

/// Each cation–anion pair, with both ions known to the species data and listed once.
fn load_pitzer_pairs(
    file: &pitzer::PitzerFile,
    src: Src<'_>,
    charge_of: &dyn Fn(&str) -> Option<i32>,
) -> Result<Vec<pitzer::PitzerPair>, CatalogError> {
    let mut pairs: Vec<pitzer::PitzerPair> = Vec::new();
    for (i, e) in file.pairs.iter().enumerate() {
        // A cation heads several pairs: find this one among them.
        let nth = file.pairs[..i]
            .iter()
            .filter(|p| p.cation == e.cation)
            .count();
        let at = |m: String| src.err_in("pairs", "cation", &e.cation, nth, m);
        let (Some(zc), Some(za)) = (charge_of(&e.cation), charge_of(&e.anion)) else {
            return Err(at(format!(
                "`{}`–`{}`: both ions must be species or strong ions of data/species.yaml, written as there",
                e.cation, e.anion
            )));
        };
        let pair = pitzer::PitzerPair::from_entry(e, zc, za).map_err(at)?;
        if pairs
            .iter()
            .any(|p| p.cation == pair.cation && p.anion == pair.anion)
        {
            return Err(at(format!("`{}`–`{}` appears twice", e.cation, e.anion)));
        }
        pairs.push(pair);
    }
    Ok(pairs)
}
