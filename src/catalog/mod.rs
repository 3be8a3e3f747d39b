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
mod load;
mod load_complexes;
mod load_tables;
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

use substances::SubstanceEntry;

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

/// Most ligands one complex may hold.
pub const MAX_LIGANDS: usize = 6;

/// A formula's written charge must be its charge, in the one ASCII form (`CO3^2-`).
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
