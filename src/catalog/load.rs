//! Builds the catalog from the data files' text.
//!
//! The tables are checked in a fixed order (each after the tables it refers to), so that
//! bad data always reports the same first problem.

use super::load_complexes::load_complexes;
use super::load_tables::{
    index_gases, load_density, load_dilution, load_pitzer, load_volatility, SubstanceNames,
};
use super::substances::{ClassesFile, SubstanceEntry, SubstancesFile};
use super::{
    add_count, check_formula_charge, combined, complexes, density, dilution, heat, load_salting,
    normalize_name, parse, physical, pitzer, salting, species, validate_family, volatility,
    Catalog, CatalogError, CombinedSpecies, DataSources, FamilyId, IonId, LimitsFile,
    PhysicalState, Release, ReleasesFile, SolutionForm, Src, Stamp, Substance, SubstanceId,
};
use std::collections::{HashMap, HashSet};

/// Every data file, parsed but not yet checked.
struct ParsedFiles {
    species: species::SpeciesFile,
    substances: SubstancesFile,
    classes: ClassesFile,
    limits: LimitsFile,
    physical: physical::PhysicalFile,
    combined: combined::CombinedFile,
    complexes: complexes::ComplexesFile,
    releases: ReleasesFile,
    heat: heat::HeatFile,
    density: density::DensityFile,
    dilution: dilution::DilutionFile,
    volatility: volatility::VolatilityFile,
    pitzer: pitzer::PitzerFile,
    salting: salting::SaltingFile,
}

impl ParsedFiles {
    /// Every file is parsed before any is checked, so a syntax error is reported first.
    fn parse(src: &DataSources<'_>) -> Result<ParsedFiles, CatalogError> {
        Ok(ParsedFiles {
            species: parse(src.species)?,
            substances: parse(src.substances)?,
            classes: parse(src.classes)?,
            limits: parse(src.limits)?,
            physical: parse(src.physical)?,
            combined: parse(src.combined)?,
            complexes: parse(src.complexes)?,
            releases: parse(src.releases)?,
            heat: parse(src.heat)?,
            density: parse(src.density)?,
            dilution: parse(src.dilution)?,
            volatility: parse(src.volatility)?,
            pitzer: parse(src.pitzer)?,
            salting: parse(src.salting)?,
        })
    }
}

impl Catalog {
    pub fn load(src: DataSources<'_>) -> Result<Catalog, CatalogError> {
        let files = ParsedFiles::parse(&src)?;
        let species = files.species;
        let (family_index, water) = index_families(&species, Src::new(src.species))?;
        let ion_index = index_strong_ions(&species, Src::new(src.species))?;
        let (substances, substance_index) = resolve_substances(
            &files.substances,
            &files.classes,
            &family_index,
            &ion_index,
            Src::new(src.substances),
        )?;
        let combined = link_combined(
            files.combined,
            &species,
            &family_index,
            Src::new(src.combined),
        )?;
        let (complexes, complexes_of_metal, inert_complexes, solids, complex_sources) =
            load_complexes(
                files.complexes,
                Src::new(src.complexes),
                &species,
                &ion_index,
            )?;
        let releases = resolve_releases(files.releases, &substance_index, Src::new(src.releases))?;
        let names = SubstanceNames {
            index: &substance_index,
            substances: &substances,
        };
        let density = load_density(&files.density, &names, Src::new(src.density))?;
        let (dilution_curves, dilution_of) = load_dilution(
            &files.dilution,
            &names,
            &species,
            &family_index,
            Src::new(src.dilution),
        )?;
        let (volatilities, volatility_of) =
            load_volatility(&files.volatility, &names, Src::new(src.volatility))?;
        let gas_index = index_gases(&files.limits, Src::new(src.limits))?;
        let ion_charge = |formula: &str| charge_of(&species, &ion_index, formula);
        let pitzer = load_pitzer(&files.pitzer, Src::new(src.pitzer), &ion_charge)?;
        let salting = load_salting(&files.salting, Src::new(src.salting), &ion_charge)?;

        Ok(Catalog {
            pitzer,
            salting,
            families: species.families,
            strong_ions: species.strong_ions,
            substances,
            classes: files.classes.classes,
            limits: files.limits,
            physical: files.physical.into(),
            combined,
            complexes,
            complexes_of_metal,
            inert_complexes,
            solids,
            complex_sources,
            releases,
            water_density: density.water_density,
            density_tables: density.tables,
            density_of: density.of_substance,
            dilution_curves,
            dilution_of,
            volatilities,
            volatility_of,
            heat_capacity: files.heat.heat_capacity.value,
            neutralization_kj: files.heat.neutralization.value,
            water,
            family_index,
            ion_index,
            substance_index,
            gas_index,
            stamp: Stamp::default(),
            judged: Default::default(),
        })
    }
}

/// Checks every family and indexes them by id; returns the index and the water family,
/// which must be there with its pKw equation.
fn index_families(
    species: &species::SpeciesFile,
    src: Src<'_>,
) -> Result<(HashMap<String, FamilyId>, FamilyId), CatalogError> {
    let mut family_index = HashMap::new();
    for (i, f) in species.families.iter().enumerate() {
        validate_family(f).map_err(|m| {
            src.err_in(
                "families",
                "id",
                &f.id,
                0,
                format!("family `{}`: {m}", f.id),
            )
        })?;
        if family_index.insert(f.id.clone(), FamilyId(i)).is_some() {
            return Err(src.err_in(
                "families",
                "id",
                &f.id,
                1,
                format!("family `{}` appears twice", f.id),
            ));
        }
    }
    let water = *family_index
        .get("water")
        .ok_or_else(|| src.err("the `water` family (pKw and its equation) is missing".into()))?;
    if species.families[water.0].kw_equation.is_none() {
        return Err(src.err_in(
            "families",
            "id",
            "water",
            0,
            "family `water` needs a kw_equation block".into(),
        ));
    }
    Ok((family_index, water))
}

/// Checks every strong ion (charged, written with its charge) and indexes them by formula.
fn index_strong_ions(
    species: &species::SpeciesFile,
    src: Src<'_>,
) -> Result<HashMap<String, IonId>, CatalogError> {
    let mut ion_index = HashMap::new();
    for (i, ion) in species.strong_ions.iter().enumerate() {
        let at_ion =
            |nth: usize, m: String| src.err_in("strong_ions", "formula", &ion.formula, nth, m);
        check_formula_charge(&ion.formula, ion.charge)
            .map_err(|m| at_ion(0, format!("strong ion: {m}")))?;
        if ion.charge == 0 {
            return Err(at_ion(
                0,
                format!("strong ion `{}` has charge 0", ion.formula),
            ));
        }
        if ion_index.insert(ion.formula.clone(), IonId(i)).is_some() {
            return Err(at_ion(
                1,
                format!("strong ion `{}` appears twice", ion.formula),
            ));
        }
    }
    Ok(ion_index)
}

/// An error about the substance entry named `name`.
fn substance_error(src: Src<'_>, name: &str, message: String) -> CatalogError {
    src.err_at("name", name, 0, format!("substance `{name}`: {message}"))
}

/// Resolves every substance and indexes it by name, then by its other names; a solution
/// is then given its solute's chemistry.
fn resolve_substances(
    file: &SubstancesFile,
    classes: &ClassesFile,
    family_index: &HashMap<String, FamilyId>,
    ion_index: &HashMap<String, IonId>,
    src: Src<'_>,
) -> Result<(Vec<Substance>, HashMap<String, SubstanceId>), CatalogError> {
    let class_ids: HashSet<&str> = classes.classes.iter().map(|c| c.id.as_str()).collect();
    let mut resolved = Vec::with_capacity(file.substances.len());
    let mut substance_index = HashMap::new();
    for (i, e) in file.substances.iter().enumerate() {
        let substance = resolve_substance(e, family_index, ion_index, &class_ids)
            .map_err(|m| substance_error(src, &e.name, m))?;
        resolved.push(substance);
        if substance_index
            .insert(normalize_name(&e.name), SubstanceId(i))
            .is_some()
        {
            return Err(src.err_at(
                "name",
                &e.name,
                1,
                format!("substance `{}`: the name appears twice", e.name),
            ));
        }
    }
    index_other_names(&resolved, &mut substance_index);
    for i in 0..resolved.len() {
        link_solution(&mut resolved, i, &substance_index)
            .map_err(|m| substance_error(src, &resolved[i].entry.name, m))?;
    }
    Ok((resolved, substance_index))
}

/// One substance with its families, ions and classes resolved (a solution's chemistry is
/// filled in later, once every name is known).
fn resolve_substance(
    e: &SubstanceEntry,
    family_index: &HashMap<String, FamilyId>,
    ion_index: &HashMap<String, IonId>,
    class_ids: &HashSet<&str>,
) -> Result<Substance, String> {
    let gives = e.gives.clone().unwrap_or_default();
    let mut families = Vec::new();
    for (id, n) in &gives.families {
        let fid = family_index
            .get(id)
            .ok_or_else(|| format!("unknown family `{id}`"))?;
        if !(n.is_finite() && *n > 0.0) {
            return Err(format!("family `{id}` count must be positive"));
        }
        families.push((*fid, *n));
    }
    let mut ions = Vec::new();
    for (id, n) in &gives.ions {
        let iid = ion_index
            .get(id)
            .ok_or_else(|| format!("unknown strong ion `{id}`"))?;
        if !(n.is_finite() && *n > 0.0) {
            return Err(format!("ion `{id}` count must be positive"));
        }
        ions.push((*iid, *n));
    }
    if let Some(c) = e.classes.iter().find(|c| !class_ids.contains(c.as_str())) {
        return Err(format!("unknown hazard class `{c}`"));
    }
    if e.state == PhysicalState::Solution {
        if e.solution_of.is_none() || e.mass_percent.is_none() || e.density.is_none() {
            return Err("a solution needs solution_of, mass_percent and density".into());
        }
    } else if e.molar_mass.is_none() {
        return Err("molar_mass is missing".into());
    }
    Ok(Substance {
        name: e.name.clone(),
        synonyms: e.synonyms.clone(),
        cas: e.cas.clone(),
        formula: e.formula.clone(),
        molar_mass: e.molar_mass,
        state: e.state,
        families,
        ions,
        solubility_g_per_l: e.solubility.as_ref().map(|s| s.value),
        density_g_per_ml: e.density.as_ref().map(|s| s.value),
        solution: None,
        classes: e.classes.clone(),
        entry: e.clone(),
    })
}

/// Adds synonyms, formulas and CAS numbers to the index. They come after every name so
/// that a name always wins.
fn index_other_names(resolved: &[Substance], substance_index: &mut HashMap<String, SubstanceId>) {
    for (i, s) in resolved.iter().enumerate() {
        let keys = s
            .synonyms
            .iter()
            .chain(s.formula.iter())
            .chain(s.cas.iter());
        for k in keys {
            substance_index
                .entry(normalize_name(k))
                .or_insert(SubstanceId(i));
        }
    }
}

/// Gives a commercial solution its solute's chemistry (and that of what it also contains).
/// Solutions are linked in file order, and a solute may not itself be a solution.
fn link_solution(
    resolved: &mut [Substance],
    i: usize,
    substance_index: &HashMap<String, SubstanceId>,
) -> Result<(), String> {
    let e = &resolved[i].entry;
    let Some(solute_name) = &e.solution_of else {
        return Ok(());
    };
    let sid = *substance_index
        .get(&normalize_name(solute_name))
        .ok_or_else(|| format!("solute `{solute_name}` is not in the file"))?;
    let solute = &resolved[sid.0];
    if solute.solution.is_some() || solute.state == PhysicalState::Solution {
        return Err(format!("solute `{solute_name}` is itself a solution"));
    }
    let mass_percent = e.mass_percent.as_ref().map(|m| m.value).unwrap_or(0.0);
    let density = e.density.as_ref().map(|d| d.value).unwrap_or(0.0);
    let molar_mass = solute.molar_mass.unwrap_or(f64::NAN);
    if !(mass_percent > 0.0 && mass_percent <= 100.0 && density > 0.0) {
        return Err("mass_percent and density must be positive".into());
    }
    let (families, ions) = with_also_contained(e, solute, resolved, substance_index)?;
    let solute_formula = solute.formula.clone();
    let s = &mut resolved[i];
    s.families = families;
    s.ions = ions;
    s.molar_mass = Some(molar_mass);
    if s.formula.is_none() {
        s.formula = solute_formula;
    }
    s.solution = Some(SolutionForm {
        solute: sid,
        mass_percent,
        solute_mol_per_ml: density * mass_percent / 100.0 / molar_mass,
    });
    Ok(())
}

type FamiliesAndIons = (Vec<(FamilyId, f64)>, Vec<(IonId, f64)>);

/// The families and ions of a solution: its solute's, plus those of each substance it
/// also contains, per mole of solute.
fn with_also_contained(
    e: &SubstanceEntry,
    solute: &Substance,
    resolved: &[Substance],
    substance_index: &HashMap<String, SubstanceId>,
) -> Result<FamiliesAndIons, String> {
    let mut families = solute.families.clone();
    let mut ions = solute.ions.clone();
    for co in &e.also_contains {
        let cid = *substance_index
            .get(&normalize_name(&co.substance))
            .ok_or_else(|| format!("`also_contains` names unknown `{}`", co.substance))?;
        if !(co.per_mole > 0.0 && co.per_mole.is_finite()) || co.source.trim().is_empty() {
            return Err("`also_contains` needs a positive per_mole and a source".into());
        }
        let co_s = &resolved[cid.0];
        for &(f, n) in &co_s.families {
            add_count(&mut families, f, n * co.per_mole);
        }
        for &(ion, n) in &co_s.ions {
            add_count(&mut ions, ion, n * co.per_mole);
        }
    }
    Ok((families, ions))
}

/// Resolves each combined species' parents and checks that its charge balances and that
/// no family takes part in two.
fn link_combined(
    file: combined::CombinedFile,
    species: &species::SpeciesFile,
    family_index: &HashMap<String, FamilyId>,
    src: Src<'_>,
) -> Result<Vec<CombinedSpecies>, CatalogError> {
    let mut linked: Vec<CombinedSpecies> = Vec::new();
    for c in file.combined {
        let bad = |m: String| src.err_at("id", &c.id, 0, format!("`{}`: {m}", c.id));
        let first = combined_parent(&c.first, species, family_index).map_err(bad)?;
        let second = combined_parent(&c.second, species, family_index).map_err(bad)?;
        let z = species.families[first.0 .0].species[first.1].charge
            + species.families[second.0 .0].species[second.1].charge
            + c.protons;
        if z != c.charge {
            return Err(bad(format!(
                "charges do not balance ({} on the left, {} stated)",
                z, c.charge
            )));
        }
        let taken = |f: FamilyId| linked.iter().any(|l| [l.first.0, l.second.0].contains(&f));
        if first.0 == second.0 || taken(first.0) || taken(second.0) {
            return Err(bad(
                "each family may take part in one combined species, with another family".into(),
            ));
        }
        linked.push(CombinedSpecies {
            first,
            second,
            data: c,
        });
    }
    Ok(linked)
}

/// A combined species' parent as (family, index of its species).
fn combined_parent(
    p: &combined::Parent,
    species: &species::SpeciesFile,
    family_index: &HashMap<String, FamilyId>,
) -> Result<(FamilyId, usize), String> {
    let fid = *family_index
        .get(&p.family)
        .ok_or_else(|| format!("unknown family `{}`", p.family))?;
    let idx = species.families[fid.0]
        .species
        .iter()
        .position(|s| s.formula == p.species)
        .ok_or_else(|| format!("family `{}` has no species `{}`", p.family, p.species))?;
    Ok((fid, idx))
}

/// Resolves each gas release's substance and checks its amount and triggers.
fn resolve_releases(
    file: ReleasesFile,
    substance_index: &HashMap<String, SubstanceId>,
    src: Src<'_>,
) -> Result<Vec<(SubstanceId, Release)>, CatalogError> {
    let mut resolved = Vec::new();
    for r in file.releases {
        let bad = |m: String| src.err_at("substance", &r.substance, 0, m);
        let sid = *substance_index
            .get(&normalize_name(&r.substance))
            .ok_or_else(|| bad(format!("unknown substance `{}`", r.substance)))?;
        if !(r.per_mole > 0.0 && r.per_mole.is_finite()) || r.with.is_empty() {
            return Err(bad(format!(
                "`{}`: per_mole must be positive and `with` not empty",
                r.substance
            )));
        }
        resolved.push((sid, r));
    }
    Ok(resolved)
}

/// The charge of an ion as the species data write it, or None when they do not carry it.
fn charge_of(
    species: &species::SpeciesFile,
    ion_index: &HashMap<String, IonId>,
    formula: &str,
) -> Option<i32> {
    // The proton is the solver's own unknown, not a species of a family; so is hydroxide,
    // when no family lists it.
    if formula == "H+" {
        return Some(1);
    }
    if let Some(&id) = ion_index.get(formula) {
        return Some(species.strong_ions[id.0].charge);
    }
    species
        .families
        .iter()
        .flat_map(|f| f.species.iter())
        .find(|s| s.formula == formula)
        .map(|s| s.charge)
        .or((formula == "OH-").then_some(-1))
}
