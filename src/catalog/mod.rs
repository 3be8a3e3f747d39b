//! The chemistry tables: families, strong ions, substances, hazard classes, exposure levels.
//!
//! The catalog is built from the text of the data files (the caller reads or embeds them);
//! it checks that every cross-reference resolves and every step is self-consistent, so the
//! engine can index without checking again. It never reads files itself.

pub mod combined;
pub mod complexes;
pub mod density;
pub mod dilution;
pub mod gas_name;
pub mod ghs;
pub mod heat;
pub mod limits;
pub mod physical;
pub mod pitzer;
pub mod salting;
pub mod species;
pub mod substances;
pub mod volatility;

use serde::{Deserialize, Serialize};
use std::collections::{BTreeMap, HashMap};

pub use gas_name::GasName;
pub use limits::{GasKind, GasLimits, JudgedLevels, LimitsFile};
pub use species::{Family, StrongIon};
pub use substances::{HazardClass, PhysicalState};

use substances::{ClassesFile, SubstanceEntry, SubstancesFile};

#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
pub struct FamilyId(pub usize);
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
pub struct IonId(pub usize);
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
pub struct SubstanceId(pub usize);

/// The text of every data file, named by the file it came from (for error messages).
pub struct DataSources<'a> {
    pub species: (&'a str, &'a str),
    pub substances: (&'a str, &'a str),
    pub classes: (&'a str, &'a str),
    pub limits: (&'a str, &'a str),
    pub physical: (&'a str, &'a str),
    pub combined: (&'a str, &'a str),
    pub complexes: (&'a str, &'a str),
    pub releases: (&'a str, &'a str),
    pub heat: (&'a str, &'a str),
    pub density: (&'a str, &'a str),
    pub dilution: (&'a str, &'a str),
    pub volatility: (&'a str, &'a str),
    pub pitzer: (&'a str, &'a str),
    pub salting: (&'a str, &'a str),
}

/// A commercial solution: one millilitre holds `solute_mol_per_ml` of the solute.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct SolutionForm {
    pub solute: SubstanceId,
    pub mass_percent: f64,
    pub solute_mol_per_ml: f64,
}

/// A substance with every reference resolved.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Substance {
    pub name: String,
    pub synonyms: Vec<String>,
    pub cas: Option<String>,
    pub formula: Option<String>,
    /// g/mol of what one "mole" of this entry is (for solutions: of the solute).
    pub molar_mass: Option<f64>,
    pub state: PhysicalState,
    pub families: Vec<(FamilyId, f64)>,
    pub ions: Vec<(IonId, f64)>,
    /// g per litre of saturated solution.
    pub solubility_g_per_l: Option<f64>,
    /// g/mL of the neat liquid or the commercial solution.
    pub density_g_per_ml: Option<f64>,
    pub solution: Option<SolutionForm>,
    pub classes: Vec<String>,
    pub entry: SubstanceEntry,
}

impl Substance {
    /// True when the substance takes no part in proton transfer (solvents, neutral organics).
    pub fn is_inert(&self) -> bool {
        self.families.is_empty() && self.ions.is_empty()
    }
}

/// A problem in a data file, with the line where it can be found when it can.
#[derive(Debug, thiserror::Error)]
pub enum CatalogError {
    #[error("{}: {message}", at(file, *line))]
    Parse {
        file: String,
        line: Option<usize>,
        message: String,
    },
    #[error("{}: {message}", at(file, *line))]
    Invalid {
        file: String,
        line: Option<usize>,
        message: String,
    },
}

/// `file:line`, or the file alone when the line is not known.
fn at(file: &str, line: Option<usize>) -> String {
    match line {
        Some(l) => format!("{file}:{l}"),
        None => file.to_string(),
    }
}

/// The line (1-based) of the `nth` (from 0) list item or key written `key: value` in a
/// data file, with the value compared without quotes; searched from the top-level
/// `section:` on, when given. Error messages name an entry; this finds it in the text.
pub(crate) fn line_of(
    text: &str,
    section: Option<&str>,
    key: &str,
    value: &str,
    nth: usize,
) -> Option<usize> {
    let start = match section {
        Some(sec) => {
            let head = format!("{sec}:");
            text.lines().position(|l| l.starts_with(&head))?
        }
        None => 0,
    };
    let needle = format!("{key}:");
    text.lines()
        .enumerate()
        .skip(start)
        .filter(|(_, l)| {
            let t = l.trim_start();
            let t = t.strip_prefix("- ").unwrap_or(t).trim_start();
            let Some(rest) = t.strip_prefix(&needle) else {
                return false;
            };
            let rest = rest.split(" #").next().unwrap_or("").trim();
            let unquoted = rest
                .strip_prefix('"')
                .and_then(|r| r.strip_suffix('"'))
                .or_else(|| rest.strip_prefix('\'').and_then(|r| r.strip_suffix('\'')))
                .unwrap_or(rest);
            unquoted == value
        })
        .nth(nth)
        .map(|(i, _)| i + 1)
}

/// One data file: its name for messages and its text for finding lines.
#[derive(Clone, Copy)]
struct Src<'a> {
    file: &'a str,
    text: &'a str,
}

impl<'a> Src<'a> {
    fn new((file, text): (&'a str, &'a str)) -> Self {
        Src { file, text }
    }
    /// An error about the file as a whole.
    fn err(&self, message: String) -> CatalogError {
        self.err_line(None, message)
    }
    fn err_line(&self, line: Option<usize>, message: String) -> CatalogError {
        CatalogError::Invalid {
            file: self.file.to_string(),
            line,
            message,
        }
    }
    /// An error about the entry written `key: value` (its `nth` occurrence, from 0).
    fn err_at(&self, key: &str, value: &str, nth: usize, message: String) -> CatalogError {
        self.err_line(line_of(self.text, None, key, value, nth), message)
    }
    /// The same, searching from the top-level `section:` on.
    fn err_in(
        &self,
        section: &str,
        key: &str,
        value: &str,
        nth: usize,
        message: String,
    ) -> CatalogError {
        self.err_line(line_of(self.text, Some(section), key, value, nth), message)
    }
}

#[derive(Debug, Clone, serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct ReleasesFile {
    #[allow(dead_code)]
    description: String,
    #[allow(dead_code)]
    units: serde_yaml::Value,
    releases: Vec<Release>,
}

/// What a substance must meet to release its gas.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Trigger {
    Water,
    Acid,
    Base,
}

/// A stoichiometric gas release: `per_mole` mol of `gas` per mol of the substance.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Release {
    pub substance: String,
    pub gas: String,
    pub per_mole: f64,
    pub with: Vec<Trigger>,
    pub reaction: String,
    pub source: String,
}

/// A combined species with its parents as (family, species index).
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct CombinedSpecies {
    pub first: (FamilyId, usize),
    pub second: (FamilyId, usize),
    pub data: combined::Combined,
}

/// The chemistry tables, every cross-reference resolved.
///
/// The program does not build it from YAML at start-up: `build.rs` loads the data files
/// through [`Catalog::load`] and stores the result as a binary image (postcard), which
/// `embedded::catalog` reads back. Every field is therefore serialized; the indexes are
/// written in key order so that the image of the same data is always the same bytes.
#[derive(Serialize, Deserialize)]
pub struct Catalog {
    pub families: Vec<Family>,
    pub strong_ions: Vec<StrongIon>,
    pub substances: Vec<Substance>,
    pub classes: Vec<HazardClass>,
    pub limits: LimitsFile,
    pub physical: physical::Physical,
    /// Species formed from two families, with their parents resolved.
    pub combined: Vec<CombinedSpecies>,
    /// Metal complexes computed in the speciation, grouped by metal.
    pub complexes: Vec<complexes::Complex>,
    /// Each metal that forms complexes, with the indexes of its complexes.
    pub complexes_of_metal: Vec<(complexes::Part, Vec<usize>)>,
    /// Complexes counted as they are (strong ions), with the reason.
    pub inert_complexes: Vec<complexes::InertComplex>,
    /// Hydroxides and oxides that precipitate, at most one per metal.
    pub solids: Vec<complexes::Solid>,
    /// The citations the complexes, inert complexes and solids name by key.
    pub complex_sources: BTreeMap<String, String>,
    /// Stoichiometric gas releases (hydrogen from metals and hydrides).
    pub releases: Vec<(SubstanceId, Release)>,
    /// Density of pure water, g/mL, at the density tables' temperature.
    pub water_density: f64,
    /// Density tables, and for each substance the table of what it dissolves as, with the
    /// g/mol of the anhydrous solute the table counts.
    pub density_tables: Vec<density::DensityTable>,
    density_of: Vec<Option<(usize, f64)>>,
    /// Dilution curves, and for each substance the curve of its solute.
    pub dilution_curves: Vec<dilution::DilutionCurve>,
    dilution_of: Vec<Option<usize>>,
    /// Volatility of solvents, and for each substance its solvent entry.
    pub volatilities: Vec<volatility::Volatility>,
    volatility_of: Vec<Option<usize>>,
    /// Ion-interaction parameters for concentrated solutions.
    pub pitzer: pitzer::PitzerTable,
    /// Salting-out parameters for dissolved neutral gases.
    pub salting: salting::SaltingTable,
    /// J/(g K) of the mixed liquid (water's).
    pub heat_capacity: f64,
    /// kJ/mol for H+ + OH- → H2O, as the heat data file states it (a check on water's dh).
    pub neutralization_kj: f64,
    pub water: FamilyId,
    #[serde(serialize_with = "in_key_order")]
    family_index: HashMap<String, FamilyId>,
    #[serde(serialize_with = "in_key_order")]
    ion_index: HashMap<String, IonId>,
    #[serde(serialize_with = "in_key_order")]
    substance_index: HashMap<String, SubstanceId>,
    #[serde(serialize_with = "in_key_order")]
    gas_index: HashMap<String, usize>,
    /// Which catalog this is within the process, for caches of values derived from it.
    #[serde(skip)]
    stamp: Stamp,
    /// Each gas's review and stop levels, worked out on first use (they are asked for
    /// at every state of every pour).
    #[serde(skip)]
    judged: std::sync::OnceLock<Vec<Option<limits::JudgedLevels>>>,
}

/// A number no other catalog in the process carries: a new one for every catalog built or
/// read, so that a cache keyed by it never serves one catalog's constants for another.
/// (A catalog's tables are not changed after it is built.)
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Stamp(u64);

impl Default for Stamp {
    fn default() -> Self {
        static NEXT: std::sync::atomic::AtomicU64 = std::sync::atomic::AtomicU64::new(1);
        Stamp(NEXT.fetch_add(1, std::sync::atomic::Ordering::Relaxed))
    }
}

/// Writes a map in the order of its keys (a `HashMap` iterates in a different order in
/// every process, which would make the image of the same data differ from build to build).
fn in_key_order<S: serde::Serializer, V: Serialize>(
    map: &HashMap<String, V>,
    s: S,
) -> Result<S::Ok, S::Error> {
    map.iter().collect::<BTreeMap<_, _>>().serialize(s)
}

/// Adds `n` of `id` to a list of (id, count).
fn add_count<T: PartialEq + Copy>(list: &mut Vec<(T, f64)>, id: T, n: f64) {
    match list.iter_mut().find(|(x, _)| *x == id) {
        Some((_, have)) => *have += n,
        None => list.push((id, n)),
    }
}

/// g/mol of water, for crystal water and mole fractions.
pub const WATER_MOLAR_MASS: f64 = 18.015;

/// Lower-cases and collapses whitespace so that "Sodium  Cyanide" finds "sodium cyanide".
pub fn normalize_name(s: &str) -> String {
    s.split_whitespace()
        .collect::<Vec<_>>()
        .join(" ")
        .to_lowercase()
}

fn parse<T: serde::de::DeserializeOwned>((file, text): (&str, &str)) -> Result<T, CatalogError> {
    serde_yaml::from_str(text).map_err(|e| CatalogError::Parse {
        file: file.to_string(),
        line: e.location().map(|l| l.line()),
        message: e.to_string(),
    })
}

impl Catalog {
    pub fn load(src: DataSources<'_>) -> Result<Catalog, CatalogError> {
        let species: species::SpeciesFile = parse(src.species)?;
        let substances: SubstancesFile = parse(src.substances)?;
        let classes: ClassesFile = parse(src.classes)?;
        let limits: LimitsFile = parse(src.limits)?;
        let physical: physical::PhysicalFile = parse(src.physical)?;
        let combined: combined::CombinedFile = parse(src.combined)?;
        let complexes_file: complexes::ComplexesFile = parse(src.complexes)?;
        let releases: ReleasesFile = parse(src.releases)?;
        let heat_file: heat::HeatFile = parse(src.heat)?;
        let density_file: density::DensityFile = parse(src.density)?;
        let dilution_file: dilution::DilutionFile = parse(src.dilution)?;
        let volatility_file: volatility::VolatilityFile = parse(src.volatility)?;
        let pitzer_file: pitzer::PitzerFile = parse(src.pitzer)?;
        let salting_file: salting::SaltingFile = parse(src.salting)?;
        let species_src = Src::new(src.species);
        let substances_src = Src::new(src.substances);

        let mut family_index = HashMap::new();
        for (i, f) in species.families.iter().enumerate() {
            validate_family(f).map_err(|m| {
                species_src.err_in(
                    "families",
                    "id",
                    &f.id,
                    0,
                    format!("family `{}`: {m}", f.id),
                )
            })?;
            if family_index.insert(f.id.clone(), FamilyId(i)).is_some() {
                return Err(species_src.err_in(
                    "families",
                    "id",
                    &f.id,
                    1,
                    format!("family `{}` appears twice", f.id),
                ));
            }
        }
        let water = *family_index.get("water").ok_or_else(|| {
            species_src.err("the `water` family (pKw and its equation) is missing".into())
        })?;
        if species.families[water.0].kw_equation.is_none() {
            return Err(species_src.err_in(
                "families",
                "id",
                "water",
                0,
                "family `water` needs a kw_equation block".into(),
            ));
        }
        let mut ion_index = HashMap::new();
        for (i, ion) in species.strong_ions.iter().enumerate() {
            let at_ion = |nth: usize, m: String| {
                species_src.err_in("strong_ions", "formula", &ion.formula, nth, m)
            };
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
        let class_ids: std::collections::HashSet<&str> =
            classes.classes.iter().map(|c| c.id.as_str()).collect();

        let mut resolved = Vec::with_capacity(substances.substances.len());
        let mut substance_index = HashMap::new();
        for (i, e) in substances.substances.iter().enumerate() {
            let ctx = |m: String| {
                substances_src.err_at("name", &e.name, 0, format!("substance `{}`: {m}", e.name))
            };
            let gives = e.gives.clone().unwrap_or_default();
            let mut fams = Vec::new();
            for (id, n) in &gives.families {
                let fid = family_index
                    .get(id)
                    .ok_or_else(|| ctx(format!("unknown family `{id}`")))?;
                if !(n.is_finite() && *n > 0.0) {
                    return Err(ctx(format!("family `{id}` count must be positive")));
                }
                fams.push((*fid, *n));
            }
            let mut ions = Vec::new();
            for (id, n) in &gives.ions {
                let iid = ion_index
                    .get(id)
                    .ok_or_else(|| ctx(format!("unknown strong ion `{id}`")))?;
                if !(n.is_finite() && *n > 0.0) {
                    return Err(ctx(format!("ion `{id}` count must be positive")));
                }
                ions.push((*iid, *n));
            }
            for c in &e.classes {
                if !class_ids.contains(c.as_str()) {
                    return Err(ctx(format!("unknown hazard class `{c}`")));
                }
            }
            if e.state == PhysicalState::Solution {
                if e.solution_of.is_none() || e.mass_percent.is_none() || e.density.is_none() {
                    return Err(ctx(
                        "a solution needs solution_of, mass_percent and density".into(),
                    ));
                }
            } else if e.molar_mass.is_none() {
                return Err(ctx("molar_mass is missing".into()));
            }
            resolved.push(Substance {
                name: e.name.clone(),
                synonyms: e.synonyms.clone(),
                cas: e.cas.clone(),
                formula: e.formula.clone(),
                molar_mass: e.molar_mass,
                state: e.state,
                families: fams,
                ions,
                solubility_g_per_l: e.solubility.as_ref().map(|s| s.value),
                density_g_per_ml: e.density.as_ref().map(|s| s.value),
                solution: None,
                classes: e.classes.clone(),
                entry: e.clone(),
            });
            let key = normalize_name(&e.name);
            if substance_index.insert(key, SubstanceId(i)).is_some() {
                return Err(substances_src.err_at(
                    "name",
                    &e.name,
                    1,
                    format!("substance `{}`: the name appears twice", e.name),
                ));
            }
        }
        // Synonyms, formulas and CAS numbers come second so that a name always wins.
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
        // Solutions borrow the solute's chemistry.
        for i in 0..resolved.len() {
            let Some(solute_name) = resolved[i].entry.solution_of.clone() else {
                continue;
            };
            let e = &resolved[i].entry;
            let ctx = |m: String| {
                substances_src.err_at("name", &e.name, 0, format!("substance `{}`: {m}", e.name))
            };
            let sid = *substance_index
                .get(&normalize_name(&solute_name))
                .ok_or_else(|| ctx(format!("solute `{solute_name}` is not in the file")))?;
            let solute = resolved[sid.0].clone();
            if solute.solution.is_some() || solute.state == PhysicalState::Solution {
                return Err(ctx(format!("solute `{solute_name}` is itself a solution")));
            }
            let mass_percent = e.mass_percent.as_ref().map(|m| m.value).unwrap_or(0.0);
            let density = e.density.as_ref().map(|d| d.value).unwrap_or(0.0);
            let molar_mass = solute.molar_mass.unwrap_or(f64::NAN);
            if !(mass_percent > 0.0 && mass_percent <= 100.0 && density > 0.0) {
                return Err(ctx("mass_percent and density must be positive".into()));
            }
            let mut families = solute.families.clone();
            let mut ions = solute.ions.clone();
            for co in &e.also_contains {
                let cid = *substance_index
                    .get(&normalize_name(&co.substance))
                    .ok_or_else(|| {
                        ctx(format!("`also_contains` names unknown `{}`", co.substance))
                    })?;
                if !(co.per_mole > 0.0 && co.per_mole.is_finite()) || co.source.trim().is_empty() {
                    return Err(ctx(
                        "`also_contains` needs a positive per_mole and a source".into(),
                    ));
                }
                let co_s = &resolved[cid.0];
                for &(f, n) in &co_s.families {
                    add_count(&mut families, f, n * co.per_mole);
                }
                for &(ion, n) in &co_s.ions {
                    add_count(&mut ions, ion, n * co.per_mole);
                }
            }
            let s = &mut resolved[i];
            s.families = families;
            s.ions = ions;
            s.molar_mass = Some(molar_mass);
            if s.formula.is_none() {
                s.formula = solute.formula.clone();
            }
            s.solution = Some(SolutionForm {
                solute: sid,
                mass_percent,
                solute_mol_per_ml: density * mass_percent / 100.0 / molar_mass,
            });
        }

        let mut linked = Vec::new();
        let combined_src = Src::new(src.combined);
        for c in combined.combined {
            let bad = |m: String| combined_src.err_at("id", &c.id, 0, m);
            let parent = |p: &combined::Parent| -> Result<(FamilyId, usize), CatalogError> {
                let fid = *family_index
                    .get(&p.family)
                    .ok_or_else(|| bad(format!("`{}`: unknown family `{}`", c.id, p.family)))?;
                let idx = species.families[fid.0]
                    .species
                    .iter()
                    .position(|s| s.formula == p.species)
                    .ok_or_else(|| {
                        bad(format!(
                            "`{}`: family `{}` has no species `{}`",
                            c.id, p.family, p.species
                        ))
                    })?;
                Ok((fid, idx))
            };
            let first = parent(&c.first)?;
            let second = parent(&c.second)?;
            let z = species.families[first.0 .0].species[first.1].charge
                + species.families[second.0 .0].species[second.1].charge
                + c.protons;
            if z != c.charge {
                return Err(bad(format!(
                    "`{}`: charges do not balance ({} on the left, {} stated)",
                    c.id, z, c.charge
                )));
            }
            if first.0 == second.0
                || linked.iter().any(|l: &CombinedSpecies| {
                    [l.first.0, l.second.0].contains(&first.0)
                        || [l.first.0, l.second.0].contains(&second.0)
                })
            {
                return Err(bad(format!(
                    "`{}`: each family may take part in one combined species, with another family",
                    c.id
                )));
            }
            linked.push(CombinedSpecies {
                first,
                second,
                data: c,
            });
        }

        let (complexes, complexes_of_metal, inert_complexes, solids, complex_sources) =
            load_complexes(
                complexes_file,
                Src::new(src.complexes),
                &species,
                &ion_index,
            )?;

        let mut resolved_releases = Vec::new();
        let releases_src = Src::new(src.releases);
        for r in releases.releases {
            let bad = |m: String| releases_src.err_at("substance", &r.substance, 0, m);
            let sid = *substance_index
                .get(&normalize_name(&r.substance))
                .ok_or_else(|| bad(format!("unknown substance `{}`", r.substance)))?;
            if !(r.per_mole > 0.0 && r.per_mole.is_finite()) || r.with.is_empty() {
                return Err(bad(format!(
                    "`{}`: per_mole must be positive and `with` not empty",
                    r.substance
                )));
            }
            resolved_releases.push((sid, r));
        }

        // A table's entry names its substance under `key`.
        let lookup = |src: Src<'_>, key: &str, name: &str| {
            substance_index
                .get(&normalize_name(name))
                .copied()
                .ok_or_else(|| src.err_at(key, name, 0, format!("unknown substance `{name}`")))
        };
        let n = resolved.len();
        // What a substance dissolves as: itself, or a commercial solution's solute.
        let dissolves_as =
            |i: usize| -> usize { resolved[i].solution.as_ref().map_or(i, |sol| sol.solute.0) };

        let density_src = Src::new(src.density);
        if density_file.water.source.trim().is_empty() {
            return Err(density_src.err_line(
                line_of(density_src.text, None, "water", "", 0),
                "the water density has no source".into(),
            ));
        }
        let water_density = density_file.water.density;
        let mut density_tables = Vec::new();
        let mut table_of_substance: HashMap<usize, usize> = HashMap::new();
        for e in &density_file.solutes {
            let at = |nth: usize, m: String| {
                density_src.err_in("solutes", "substance", &e.substance, nth, m)
            };
            let sid = lookup(density_src, "substance", &e.substance)?;
            let t = density::DensityTable::new(e, water_density).map_err(|m| at(0, m))?;
            if table_of_substance
                .insert(sid.0, density_tables.len())
                .is_some()
            {
                return Err(at(1, format!("`{}` appears twice", e.substance)));
            }
            density_tables.push(t);
        }
        // A hydrate shares its anhydrous salt's table and the other way round: same ions
        // and families in water, mass percent counted as the anhydrous salt.
        let signature = |s: &Substance| -> Option<String> {
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
        };
        let anhydrous_mass = |s: &Substance| -> Option<f64> {
            let m = s.molar_mass?;
            let water = s.formula.as_deref().map_or(0.0, density::crystal_water);
            Some(m - water * WATER_MOLAR_MASS)
        };
        // Tables by what their substance gives; a signature two tables share is ambiguous.
        let mut table_of_signature: HashMap<String, Option<usize>> = HashMap::new();
        for (&sub, &t) in &table_of_substance {
            if let Some(sig) = signature(&resolved[sub]) {
                table_of_signature
                    .entry(sig)
                    .and_modify(|v| *v = None)
                    .or_insert(Some(t));
            }
        }
        let mut density_of = vec![None; n];
        for (i, slot) in density_of.iter_mut().enumerate() {
            let base = dissolves_as(i);
            let table = table_of_substance.get(&base).copied().or_else(|| {
                signature(&resolved[base])
                    .and_then(|sig| table_of_signature.get(&sig).copied().flatten())
            });
            if let (Some(t), Some(m)) = (table, anhydrous_mass(&resolved[base])) {
                *slot = Some((t, m));
            }
        }

        let mut dilution_curves = Vec::new();
        let mut curve_of_substance: HashMap<usize, usize> = HashMap::new();
        let dilution_src = Src::new(src.dilution);
        for e in &dilution_file.curves {
            let at = |nth: usize, m: String| dilution_src.err_at("solute", &e.solute, nth, m);
            let sid = lookup(dilution_src, "solute", &e.solute)?;
            let mut steps = Vec::new();
            for sr in &e.weak_steps_included {
                let fam = family_index
                    .get(&sr.family)
                    .map(|f| &species.families[f.0])
                    .filter(|f| sr.step < f.steps.len())
                    .ok_or_else(|| {
                        at(
                            0,
                            format!(
                                "`{}`: no step {} in family `{}`",
                                e.solute, sr.step, sr.family
                            ),
                        )
                    })?;
                steps.push(dilution::IncludedStep {
                    ka: 10f64.powf(-fam.steps[sr.step].pka),
                    dh: fam.steps[sr.step].dh,
                    protons_before: sr.step as f64,
                });
            }
            let c = dilution::DilutionCurve::new(e, steps).map_err(|m| at(0, m))?;
            if curve_of_substance
                .insert(sid.0, dilution_curves.len())
                .is_some()
            {
                return Err(at(1, format!("`{}` appears twice", e.solute)));
            }
            dilution_curves.push(c);
        }
        let dilution_of = (0..n)
            .map(|i| curve_of_substance.get(&dissolves_as(i)).copied())
            .collect();

        let mut volatilities = Vec::new();
        let mut volatility_of_substance: HashMap<usize, usize> = HashMap::new();
        let volatility_src = Src::new(src.volatility);
        for e in &volatility_file.solvents {
            let at =
                |nth: usize, m: String| volatility_src.err_at("substance", &e.substance, nth, m);
            let sid = lookup(volatility_src, "substance", &e.substance)?;
            let v = volatility::Volatility::from_entry(e).map_err(|m| at(0, m))?;
            if volatility_of_substance
                .insert(sid.0, volatilities.len())
                .is_some()
            {
                return Err(at(1, format!("`{}` appears twice", e.substance)));
            }
            volatilities.push(v);
        }
        let volatility_of = (0..n)
            .map(|i| volatility_of_substance.get(&dissolves_as(i)).copied())
            .collect();

        let mut gas_index = HashMap::new();
        let limits_src = Src::new(src.limits);
        for (i, g) in limits.gases.iter().enumerate() {
            let at = |nth: usize, m: String| limits_src.err_in("gases", "gas", &g.gas, nth, m);
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

        let pitzer_src = Src::new(src.pitzer);
        let charge_of = |formula: &str| -> Option<i32> {
            // The proton is the solver's own unknown, not a species of a family.
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
        };
        let charge_of = |formula: &str| charge_of(formula).or((formula == "OH-").then_some(-1));
        let dh = &pitzer_file.debye_huckel;
        if !(dh.a_phi > 0.0 && dh.b > 0.0) || dh.source.trim().is_empty() {
            return Err(pitzer_src.err_line(
                line_of(pitzer_src.text, None, "debye_huckel", "", 0),
                "debye_huckel needs a positive a_phi and b, and a source".into(),
            ));
        }
        let mut pitzer_pairs: Vec<pitzer::PitzerPair> = Vec::new();
        for (i, e) in pitzer_file.pairs.iter().enumerate() {
            let nth = pitzer_file.pairs[..i]
                .iter()
                .filter(|p| p.cation == e.cation)
                .count();
            let at = |m: String| pitzer_src.err_in("pairs", "cation", &e.cation, nth, m);
            let (Some(zc), Some(za)) = (charge_of(&e.cation), charge_of(&e.anion)) else {
                return Err(at(format!(
                    "`{}`–`{}`: both ions must be species or strong ions of data/species.yaml, written as there",
                    e.cation, e.anion
                )));
            };
            let pair = pitzer::PitzerPair::from_entry(e, zc, za).map_err(at)?;
            if pitzer_pairs
                .iter()
                .any(|p| p.cation == pair.cation && p.anion == pair.anion)
            {
                return Err(at(format!("`{}`–`{}` appears twice", e.cation, e.anion)));
            }
            pitzer_pairs.push(pair);
        }
        let model = &pitzer_file.model;
        if model.dilute_below_ionic_strength.is_nan()
            || model.dilute_below_ionic_strength < 0.0
            || model.dilute_basis.trim().is_empty()
        {
            return Err(pitzer_src.err_line(
                line_of(pitzer_src.text, None, "model", "", 0),
                "model needs dilute_below_ionic_strength of 0 or more (mol/kg) and a dilute_basis"
                    .into(),
            ));
        }
        let x = &pitzer_file.extended_debye_huckel;
        if !(x.ion_size_angstrom > 0.0
            && x.b_per_angstrom > 0.0
            && x.b_dot.is_finite()
            && x.max_ionic_strength > 0.0)
            || x.source.trim().is_empty()
        {
            return Err(pitzer_src.err_line(
                line_of(pitzer_src.text, None, "extended_debye_huckel", "", 0),
                "extended_debye_huckel needs a positive ion_size_angstrom, b_per_angstrom and max_ionic_strength, a b_dot, and a source".into(),
            ));
        }
        let pitzer = pitzer::PitzerTable {
            a_phi_25: dh.a_phi,
            b: dh.b,
            pairs: pitzer_pairs,
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
        .index();

        Ok(Catalog {
            pitzer,
            salting: load_salting(&salting_file, Src::new(src.salting), &charge_of)?,
            families: species.families,
            strong_ions: species.strong_ions,
            substances: resolved,
            classes: classes.classes,
            limits,
            physical: physical.into(),
            combined: linked,
            complexes,
            complexes_of_metal,
            inert_complexes,
            solids,
            complex_sources,
            releases: resolved_releases,
            water_density,
            density_tables,
            density_of,
            dilution_curves,
            dilution_of,
            volatilities,
            volatility_of,
            heat_capacity: heat_file.heat_capacity.value,
            neutralization_kj: heat_file.neutralization.value,
            water,
            family_index,
            ion_index,
            substance_index,
            gas_index,
            stamp: Stamp::default(),
            judged: Default::default(),
        })
    }

    /// This catalog's stamp (see [`Stamp`]).
    pub fn stamp(&self) -> Stamp {
        self.stamp
    }

    /// kJ per mol of solute on dilution to infinity, for concentrated reagents.
    /// The density table of what a substance dissolves as, with the g/mol its mass
    /// percent counts (the anhydrous solute).
    pub fn density_table(&self, id: SubstanceId) -> Option<(&density::DensityTable, f64)> {
        self.density_of[id.0].map(|(t, m)| (&self.density_tables[t], m))
    }

    /// The dilution curve of a substance's solute.
    pub fn dilution_curve(&self, id: SubstanceId) -> Option<&dilution::DilutionCurve> {
        self.dilution_of[id.0].map(|c| &self.dilution_curves[c])
    }

    pub fn water_heat_capacity(&self) -> f64 {
        self.heat_capacity
    }

    /// The volatility of a solvent (or of a commercial solution's solvent-like solute).
    pub fn volatility(&self, id: SubstanceId) -> Option<&volatility::Volatility> {
        self.volatility_of[id.0].map(|v| &self.volatilities[v])
    }

    pub fn family(&self, id: FamilyId) -> &Family {
        &self.families[id.0]
    }
    pub fn family_by_id(&self, id: &str) -> Option<FamilyId> {
        self.family_index.get(id).copied()
    }
    pub fn ion(&self, id: IonId) -> &StrongIon {
        &self.strong_ions[id.0]
    }
    /// The formula of a family species or strong ion (a complex's metal or ligand).
    pub fn part_formula(&self, part: complexes::Part) -> &str {
        match part {
            complexes::Part::Family(f, j) => &self.family(f).species[j].formula,
            complexes::Part::Ion(id) => &self.ion(id).formula,
        }
    }
    pub fn ion_by_formula(&self, f: &str) -> Option<IonId> {
        self.ion_index.get(f).copied()
    }
    pub fn substance(&self, id: SubstanceId) -> &Substance {
        &self.substances[id.0]
    }
    pub fn class(&self, id: &str) -> Option<&HazardClass> {
        self.classes.iter().find(|c| c.id == id)
    }
    pub fn gas_limits(&self, gas: &str) -> Option<&GasLimits> {
        self.gas_index.get(gas).map(|&i| &self.limits.gases[i])
    }
    pub fn judged_levels(&self, gas: &str) -> Option<&JudgedLevels> {
        let judged = self.judged.get_or_init(|| {
            let fallback = &self.limits.fallback;
            self.limits
                .gases
                .iter()
                .map(|g| g.judged(fallback))
                .collect()
        });
        judged[*self.gas_index.get(gas)?].as_ref()
    }

    /// How a gas does harm; a gas the limits file does not know counts as toxic.
    pub fn gas_kinds(&self, gas: &str) -> Vec<GasKind> {
        self.gas_limits(gas)
            .map(|g| g.kinds.clone())
            .unwrap_or_else(|| vec![GasKind::Toxic])
    }

    /// True when the gas is judged by pressure and the room only (carbon dioxide).
    pub fn asphyxiant_only(&self, gas: &str) -> bool {
        self.gas_limits(gas).is_some_and(|g| g.asphyxiant_only())
    }

    /// Lower flammable limit of a gas, ppm by volume.
    pub fn lfl_ppm(&self, gas: &str) -> Option<f64> {
        self.gas_limits(gas)?
            .flammability
            .as_ref()
            .map(|f| f.lfl.value)
    }

    /// Finds a substance by name, synonym, formula or CAS number.
    pub fn find_substance(&self, query: &str) -> Option<SubstanceId> {
        self.substance_index.get(&normalize_name(query)).copied()
    }

    /// The known names closest to an unknown one, best first.
    pub fn closest_names(&self, query: &str, n: usize) -> Vec<String> {
        // Bounded: a name far longer than any known one matches nothing better for its tail.
        let q: String = normalize_name(query)
            .chars()
            .take(crate::basics::input_shape::MAX_NAME_CHARS)
            .collect();
        let mut scored: Vec<(f64, &str)> = self
            .substance_index
            .keys()
            .map(|k| {
                let mut score = strsim::jaro_winkler(&q, k);
                if k.contains(&q) || q.contains(k.as_str()) {
                    score += 0.2;
                }
                (score, k.as_str())
            })
            .collect();
        scored.sort_by(|a, b| b.0.total_cmp(&a.0).then(a.1.cmp(b.1)));
        let mut out: Vec<String> = Vec::new();
        for (_, k) in scored {
            let name = &self.substances[self.substance_index[k].0].name;
            if !out.contains(name) {
                out.push(name.clone());
            }
            if out.len() == n {
                break;
            }
        }
        out
    }

    /// Families whose id, name, species formula or gas matches the query.
    pub fn find_families(&self, query: &str) -> Vec<FamilyId> {
        let q = normalize_name(query);
        (0..self.families.len())
            .map(FamilyId)
            .filter(|&id| {
                let f = self.family(id);
                normalize_name(&f.id) == q
                    || normalize_name(&f.name).split(" / ").any(|n| n == q)
                    || f.species.iter().any(|s| normalize_name(&s.formula) == q)
                    || f.volatile
                        .as_ref()
                        .is_some_and(|v| normalize_name(&v.gas) == q)
            })
            .collect()
    }
}

/// A formula's written charge must be its charge, in the one ASCII form (`CO3^2-`).
type LoadedComplexes = (
    Vec<complexes::Complex>,
    Vec<(complexes::Part, Vec<usize>)>,
    Vec<complexes::InertComplex>,
    Vec<complexes::Solid>,
    BTreeMap<String, String>,
);

/// Resolves every complex's metal and ligand to a family species or a strong ion, and checks
/// that its charge balances, its formula carries that charge and its sources are listed.
fn load_complexes(
    file: complexes::ComplexesFile,
    src: Src<'_>,
    species: &species::SpeciesFile,
    ion_index: &HashMap<String, IonId>,
) -> Result<LoadedComplexes, CatalogError> {
    use complexes::Part;
    let find = |formula: &str| -> Option<(Part, i32)> {
        if let Some(&id) = ion_index.get(formula) {
            return Some((Part::Ion(id), species.strong_ions[id.0].charge));
        }
        species.families.iter().enumerate().find_map(|(f, fam)| {
            fam.species
                .iter()
                .position(|s| s.formula == formula)
                .map(|j| (Part::Family(FamilyId(f), j), fam.species[j].charge))
        })
    };
    let at = |section: &str, formula: &str, m: String| {
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
        src.err_line(line, format!("complex `{formula}`: {m}"))
    };
    // Entries keep the key; the citation is written once, in `complex_sources`.
    let known_source = |key: &str| file.sources.contains_key(key).then(|| key.to_string());
    let mut out: Vec<complexes::Complex> = Vec::with_capacity(file.complexes.len());
    for e in &file.complexes {
        let bad = |m: String| at("complexes", &e.formula, m);
        let (metal, z_metal) = find(&e.metal).filter(|(_, z)| *z > 0).ok_or_else(|| {
            bad(format!(
                "metal `{}` is not a cation of data/species.yaml",
                e.metal
            ))
        })?;
        let (ligand, z_ligand) = if e.ligand == "H2O" {
            if e.protons != -i32::from(e.n) {
                return Err(bad(
                    "a hydroxo complex (ligand H2O) releases one H+ per water: protons must be -n"
                        .into(),
                ));
            }
            (None, 0)
        } else {
            let (part, z) = find(&e.ligand)
                .filter(|(p, _)| matches!(p, Part::Family(..)))
                .ok_or_else(|| {
                    bad(format!(
                        "ligand `{}` is not a species of a family in data/species.yaml",
                        e.ligand
                    ))
                })?;
            (Some(part), z)
        };
        if let (Part::Family(fm, _), Some(Part::Family(fl, _))) = (metal, ligand) {
            if fm == fl {
                return Err(bad("metal and ligand belong to the same family".into()));
            }
        }
        if e.n == 0 || usize::from(e.n) > MAX_LIGANDS {
            return Err(bad(format!("n must be 1 to {MAX_LIGANDS}")));
        }
        let z = z_metal + i32::from(e.n) * z_ligand + e.protons;
        if z != e.charge {
            return Err(bad(format!(
                "charges do not balance ({z} on the left, {} stated)",
                e.charge
            )));
        }
        check_formula_charge(&e.formula, e.charge).map_err(&bad)?;
        if !e.log_beta.is_finite() || e.dh.is_some_and(|d| !d.is_finite()) {
            return Err(bad("log_beta and dh must be numbers".into()));
        }
        let source = known_source(&e.source).ok_or_else(|| {
            bad(format!(
                "source `{}` is not listed under `sources`",
                e.source
            ))
        })?;
        let dh_source = match (&e.dh, &e.dh_source) {
            (None, _) => None,
            (Some(_), None) => Some(source.clone()),
            (Some(_), Some(k)) => Some(
                known_source(k)
                    .ok_or_else(|| bad(format!("dh_source `{k}` is not listed under `sources`")))?,
            ),
        };
        if out.iter().any(|c| c.formula == e.formula) {
            return Err(bad("listed twice".into()));
        }
        out.push(complexes::Complex {
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
        });
    }
    let mut by_metal: Vec<(Part, Vec<usize>)> = Vec::new();
    for (i, c) in out.iter().enumerate() {
        match by_metal.iter_mut().find(|(m, _)| *m == c.metal) {
            Some((_, v)) => v.push(i),
            None => by_metal.push((c.metal, vec![i])),
        }
    }
    let mut inert = Vec::with_capacity(file.inert.len());
    for e in &file.inert {
        let bad = |m: String| at("inert", &e.formula, m);
        let ion = *ion_index.get(&e.formula).ok_or_else(|| {
            bad("an inert complex is counted as a strong ion: list it under strong_ions in data/species.yaml".into())
        })?;
        if out.iter().any(|c| c.formula == e.formula) {
            return Err(bad(
                "also listed as a complex computed at equilibrium".into()
            ));
        }
        let source = match &e.source {
            Some(k) => Some(
                known_source(k)
                    .ok_or_else(|| bad(format!("source `{k}` is not listed under `sources`")))?,
            ),
            None if e.log_beta.is_some() => {
                return Err(bad("a constant needs a source".into()));
            }
            None => None,
        };
        inert.push(complexes::InertComplex {
            ion,
            metal: e.metal.clone(),
            ligand: e.ligand.clone(),
            n: e.n,
            log_beta: e.log_beta,
            source,
            inert_source: known_source(&e.inert_source).ok_or_else(|| {
                bad(format!(
                    "inert_source `{}` is not listed under `sources`",
                    e.inert_source
                ))
            })?,
            note: e.note.clone(),
        });
    }
    let mut solids: Vec<complexes::Solid> = Vec::with_capacity(file.solids.len());
    for e in &file.solids {
        let bad = |m: String| at("solids", &e.formula, m);
        let (metal, _) = find(&e.metal).filter(|(_, z)| *z > 0).ok_or_else(|| {
            bad(format!(
                "metal `{}` is not a cation of data/species.yaml",
                e.metal
            ))
        })?;
        if !by_metal.iter().any(|(m, _)| *m == metal) {
            return Err(bad(format!(
                "metal `{}` forms no complex: a solid is computed only for a metal of `complexes`",
                e.metal
            )));
        }
        if solids.iter().any(|s| s.metal == metal) {
            return Err(bad(format!("a second solid for `{}`", e.metal)));
        }
        if !e.log_k.is_finite() || e.dh.is_some_and(|d| !d.is_finite()) {
            return Err(bad("log_k and dh must be numbers".into()));
        }
        solids.push(complexes::Solid {
            formula: e.formula.clone(),
            metal,
            log_k: e.log_k,
            dh: e.dh,
            source: known_source(&e.source).ok_or_else(|| {
                bad(format!(
                    "source `{}` is not listed under `sources`",
                    e.source
                ))
            })?,
            note: e.note.clone(),
        });
    }
    Ok((out, by_metal, inert, solids, file.sources.clone()))
}

/// Most ligands one complex may hold.
pub const MAX_LIGANDS: usize = 6;

fn check_formula_charge(formula: &str, charge: i32) -> Result<(), String> {
    let (body, written) = crate::basics::notation::split_charge(formula);
    if written != charge || crate::basics::notation::with_charge(body, charge) != formula {
        return Err(format!(
            "`{formula}` should be written `{}` (charge {charge}: the sign last, its size after `^` when more than one)",
            crate::basics::notation::with_charge(
                body.rfind(['+', '-']).map_or(body, |i| &body[..i]),
                charge
            )
        ));
    }
    Ok(())
}

fn validate_family(f: &Family) -> Result<(), String> {
    if f.species.len() < 2 {
        return Err("needs at least two species".into());
    }
    if f.steps.len() + 1 != f.species.len() {
        return Err(format!(
            "{} species need {} steps, found {}",
            f.species.len(),
            f.species.len() - 1,
            f.steps.len()
        ));
    }
    if f.species.iter().any(|s| s.charge.abs() > 7) {
        return Err("charges beyond ±7 are not supported".into());
    }
    for s in &f.species {
        check_formula_charge(&s.formula, s.charge)?;
    }
    for w in f.species.windows(2) {
        if w[1].charge != w[0].charge - 1 {
            return Err(format!(
                "charge must fall by one from `{}` to `{}`",
                w[0].formula, w[1].formula
            ));
        }
    }
    for (i, s) in f.steps.iter().enumerate() {
        if !s.pka.is_finite() || !s.dh.is_finite() {
            return Err(format!("step {} has a non-finite constant", i + 1));
        }
        if s.pka_source.trim().is_empty() || s.dh_source.trim().is_empty() {
            return Err(format!("step {} has no source", i + 1));
        }
    }
    if let Some(v) = &f.volatile {
        let sp = f
            .species
            .iter()
            .find(|s| s.formula == v.species)
            .ok_or_else(|| format!("volatile species `{}` is not in the family", v.species))?;
        if sp.charge != 0 {
            return Err(format!("volatile species `{}` is charged", v.species));
        }
        if !(v.hcp > 0.0 && v.hcp.is_finite() && v.hcp_b.is_finite()) {
            return Err("Henry's law constant must be positive and finite".into());
        }
        if v.source.trim().is_empty() {
            return Err("Henry's law constant has no source".into());
        }
    }
    Ok(())
}

/// Checks and resolves the salting-out parameters: every ion must be one the species data
/// carry (so a misspelt one cannot be silently unused), every gas a neutral species.
fn load_salting(
    file: &salting::SaltingFile,
    src: Src,
    charge_of: &dyn Fn(&str) -> Option<i32>,
) -> Result<salting::SaltingTable, CatalogError> {
    let mut ions: Vec<(String, f64)> = Vec::new();
    for e in &file.ions {
        let at = |m: String| src.err_in("ions", "ion", &e.ion, 0, m);
        match charge_of(&e.ion) {
            Some(z) if z != 0 => {}
            _ => {
                return Err(at(format!(
                    "`{}` is not an ion of data/species.yaml; write it as there (e.g. \"SO4^2-\")",
                    e.ion
                )))
            }
        }
        if !e.h.is_finite() || e.source.trim().is_empty() {
            return Err(at(format!("`{}` needs a number h and a source", e.ion)));
        }
        if ions.iter().any(|(f, _)| f == &e.ion) {
            return Err(at(format!("`{}` appears twice", e.ion)));
        }
        ions.push((e.ion.clone(), e.h));
    }
    let check_gas = |h_g0: f64, h_t: f64, source: &str| {
        h_g0.is_finite() && h_t.is_finite() && !source.trim().is_empty()
    };
    let mut gases: Vec<(String, salting::GasSalting)> = Vec::new();
    for e in &file.gases {
        let at = |m: String| src.err_in("gases", "species", &e.species, 0, m);
        if charge_of(&e.species) != Some(0) {
            return Err(at(format!(
                "`{}` is not a neutral species of data/species.yaml",
                e.species
            )));
        }
        if !check_gas(e.h_g0, e.h_t, &e.source) || e.max_molarity.is_some_and(|m| m <= 0.0) {
            return Err(at(format!(
                "`{}` needs numbers h_g0 (and h_t), a positive max_molarity if given, and a source",
                e.species
            )));
        }
        gases.push((
            e.species.clone(),
            salting::GasSalting {
                h_g0: e.h_g0,
                h_t: e.h_t,
                max_molarity: e.max_molarity,
            },
        ));
    }
    let u = &file.unlisted_gas;
    if !check_gas(u.h_g0, 0.0, &u.source) {
        return Err(src.err_line(
            line_of(src.text, None, "unlisted_gas", "", 0),
            "unlisted_gas needs a number h_g0 and a source".into(),
        ));
    }
    Ok(salting::SaltingTable {
        ions,
        gases,
        unlisted: salting::GasSalting {
            h_g0: u.h_g0,
            h_t: 0.0,
            max_molarity: None,
        },
    })
}
