//! Loads the metal complexes: those computed at equilibrium, those counted as strong ions
//! (inert), and the solids that precipitate.

use super::complexes::{
    Complex, ComplexEntry, ComplexesFile, InertComplex, InertEntry, Part, Solid, SolidEntry,
};
use super::{check_formula_charge, species, CatalogError, FamilyId, IonId, Src, MAX_LIGANDS};
use std::collections::{BTreeMap, HashMap};

pub(super) type LoadedComplexes = (
    Vec<Complex>,
    Vec<(Part, Vec<usize>)>,
    Vec<InertComplex>,
    Vec<Solid>,
    BTreeMap<String, String>,
);

/// What the complexes' entries name: the species data's ions and the file's citations.
struct Names<'a> {
    species: &'a species::SpeciesFile,
    ion_index: &'a HashMap<String, IonId>,
    sources: &'a BTreeMap<String, String>,
}

impl Names<'_> {
    /// A strong ion or a family species, with its charge.
    fn part(&self, formula: &str) -> Option<(Part, i32)> {
        if let Some(&id) = self.ion_index.get(formula) {
            return Some((Part::Ion(id), self.species.strong_ions[id.0].charge));
        }
        self.species
            .families
            .iter()
            .enumerate()
            .find_map(|(f, fam)| {
                fam.species
                    .iter()
                    .position(|s| s.formula == formula)
                    .map(|j| (Part::Family(FamilyId(f), j), fam.species[j].charge))
            })
    }

    /// A metal, which must be a cation; with its charge.
    fn metal(&self, formula: &str) -> Result<(Part, i32), String> {
        self.part(formula)
            .filter(|(_, z)| *z > 0)
            .ok_or_else(|| format!("metal `{formula}` is not a cation of data/species.yaml"))
    }

    /// The key of a citation, which must be listed under `sources` (entries keep the key;
    /// the citation is written once).
    fn source(&self, field: &str, key: &str) -> Result<String, String> {
        if self.sources.contains_key(key) {
            Ok(key.to_string())
        } else {
            Err(format!("{field} `{key}` is not listed under `sources`"))
        }
    }
}

/// An error about the entry of `section` with this formula.
fn entry_error(src: Src<'_>, section: &str, formula: &str, message: String) -> CatalogError {
    let needle = format!("formula: \"{formula}\"");
    let start = src
        .text
        .lines()
        .position(|l| l.starts_with(&format!("{section}:")));
    let line = start.and_then(|s| {
        src.text
            .lines()
            .enumerate()
            .skip(s)
            .find(|(_, l)| l.contains(&needle))
            .map(|(i, _)| i + 1)
    });
    src.err_line(line, format!("complex `{formula}`: {message}"))
}

/// Resolves every complex's metal and ligand to a family species or a strong ion, and checks
/// that its charge balances, its formula carries that charge and its sources are listed.
pub(super) fn load_complexes(
    file: ComplexesFile,
    src: Src<'_>,
    species: &species::SpeciesFile,
    ion_index: &HashMap<String, IonId>,
) -> Result<LoadedComplexes, CatalogError> {
    let names = Names {
        species,
        ion_index,
        sources: &file.sources,
    };
    let mut computed: Vec<Complex> = Vec::with_capacity(file.complexes.len());
    for e in &file.complexes {
        let complex = load_complex(e, &names, &computed)
            .map_err(|m| entry_error(src, "complexes", &e.formula, m))?;
        computed.push(complex);
    }
    let by_metal = group_by_metal(&computed);
    let mut inert = Vec::with_capacity(file.inert.len());
    for e in &file.inert {
        let complex = load_inert(e, &names, &computed)
            .map_err(|m| entry_error(src, "inert", &e.formula, m))?;
        inert.push(complex);
    }
    let mut solids: Vec<Solid> = Vec::with_capacity(file.solids.len());
    for e in &file.solids {
        let solid = load_solid(e, &names, &by_metal, &solids)
            .map_err(|m| entry_error(src, "solids", &e.formula, m))?;
        solids.push(solid);
    }
    Ok((computed, by_metal, inert, solids, file.sources.clone()))
}

/// One complex computed at equilibrium; `earlier` are the ones listed before it.
fn load_complex(
    e: &ComplexEntry,
    names: &Names<'_>,
    earlier: &[Complex],
) -> Result<Complex, String> {
    let (metal, z_metal) = names.metal(&e.metal)?;
    let (ligand, z_ligand) = if e.ligand == "H2O" {
        if e.protons != -i32::from(e.n) {
            return Err(
                "a hydroxo complex (ligand H2O) releases one H+ per water: protons must be -n"
                    .into(),
            );
        }
        (None, 0)
    } else {
        let (part, z) = names
            .part(&e.ligand)
            .filter(|(p, _)| matches!(p, Part::Family(..)))
            .ok_or_else(|| {
                format!(
                    "ligand `{}` is not a species of a family in data/species.yaml",
                    e.ligand
                )
            })?;
        (Some(part), z)
    };
    if let (Part::Family(fm, _), Some(Part::Family(fl, _))) = (metal, ligand) {
        if fm == fl {
            return Err("metal and ligand belong to the same family".into());
        }
    }
    if e.n == 0 || usize::from(e.n) > MAX_LIGANDS {
        return Err(format!("n must be 1 to {MAX_LIGANDS}"));
    }
    let z = z_metal + i32::from(e.n) * z_ligand + e.protons;
    if z != e.charge {
        return Err(format!(
            "charges do not balance ({z} on the left, {} stated)",
            e.charge
        ));
    }
    check_formula_charge(&e.formula, e.charge)?;
    if !e.log_beta.is_finite() || e.dh.is_some_and(|d| !d.is_finite()) {
        return Err("log_beta and dh must be numbers".into());
    }
    let source = names.source("source", &e.source)?;
    // The enthalpy shares the constant's citation unless it names its own.
    let dh_source = match (&e.dh, &e.dh_source) {
        (None, _) => None,
        (Some(_), None) => Some(source.clone()),
        (Some(_), Some(k)) => Some(names.source("dh_source", k)?),
    };
    if earlier.iter().any(|c| c.formula == e.formula) {
        return Err("listed twice".into());
    }
    Ok(Complex {
        formula: e.formula.clone(),
        metal,
        ligand,
        n: e.n,
        protons: e.protons,
        charge: e.charge,
        log_beta: e.log_beta,
        dh: e.dh,
        source,
        dh_source,
        note: e.note.clone(),
    })
}

/// Each metal that forms complexes, with the indexes of its complexes, in order of first
/// appearance.
fn group_by_metal(complexes: &[Complex]) -> Vec<(Part, Vec<usize>)> {
    let mut by_metal: Vec<(Part, Vec<usize>)> = Vec::new();
    for (i, c) in complexes.iter().enumerate() {
        match by_metal.iter_mut().find(|(m, _)| *m == c.metal) {
            Some((_, v)) => v.push(i),
            None => by_metal.push((c.metal, vec![i])),
        }
    }
    by_metal
}

/// One inert complex, which is counted as a strong ion and so must be listed as one.
fn load_inert(
    e: &InertEntry,
    names: &Names<'_>,
    computed: &[Complex],
) -> Result<InertComplex, String> {
    let ion = *names.ion_index.get(&e.formula).ok_or_else(|| {
        "an inert complex is counted as a strong ion: list it under strong_ions in data/species.yaml".to_string()
    })?;
    if computed.iter().any(|c| c.formula == e.formula) {
        return Err("also listed as a complex computed at equilibrium".into());
    }
    let source = match &e.source {
        Some(k) => Some(names.source("source", k)?),
        None if e.log_beta.is_some() => {
            return Err("a constant needs a source".into());
        }
        None => None,
    };
    Ok(InertComplex {
        ion,
        metal: e.metal.clone(),
        ligand: e.ligand.clone(),
        n: e.n,
        log_beta: e.log_beta,
        source,
        inert_source: names.source("inert_source", &e.inert_source)?,
        note: e.note.clone(),
    })
}

/// One solid; a metal has at most one, and only a metal that forms complexes.
fn load_solid(
    e: &SolidEntry,
    names: &Names<'_>,
    by_metal: &[(Part, Vec<usize>)],
    earlier: &[Solid],
) -> Result<Solid, String> {
    let (metal, _) = names.metal(&e.metal)?;
    if !by_metal.iter().any(|(m, _)| *m == metal) {
        return Err(format!(
            "metal `{}` forms no complex: a solid is computed only for a metal of `complexes`",
            e.metal
        ));
    }
    if earlier.iter().any(|s| s.metal == metal) {
        return Err(format!("a second solid for `{}`", e.metal));
    }
    if !e.log_k.is_finite() || e.dh.is_some_and(|d| !d.is_finite()) {
        return Err("log_k and dh must be numbers".into());
    }
    Ok(Solid {
        formula: e.formula.clone(),
        metal,
        log_k: e.log_k,
        dh: e.dh,
        source: names.source("source", &e.source)?,
        note: e.note.clone(),
    })
}
