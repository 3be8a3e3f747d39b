//! Ion-interaction (Pitzer) parameters of cation–anion pairs (`data/pitzer.yaml`).

use serde::{Deserialize, Serialize};

#[derive(Debug, Clone, Deserialize)]
pub struct PitzerFile {
    #[allow(dead_code)]
    pub description: String,
    #[allow(dead_code)]
    pub units: serde_yaml::Value,
    pub debye_huckel: DebyeHuckelEntry,
    pub model: ModelEntry,
    pub extended_debye_huckel: ExtendedDebyeHuckelEntry,
    pub pairs: Vec<PairEntry>,
}

/// When the solver uses the model.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ModelEntry {
    pub dilute_below_ionic_strength: f64,
    pub dilute_basis: String,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ExtendedDebyeHuckelEntry {
    pub ion_size_angstrom: f64,
    pub b_per_angstrom: f64,
    pub b_dot: f64,
    pub max_ionic_strength: f64,
    pub source: String,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DebyeHuckelEntry {
    pub a_phi: f64,
    pub b: f64,
    pub source: String,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PairEntry {
    pub cation: String,
    pub anion: String,
    pub beta0: f64,
    pub beta1: f64,
    #[serde(default)]
    pub beta2: f64,
    #[serde(default)]
    pub alpha1: Option<f64>,
    #[serde(default)]
    pub alpha2: Option<f64>,
    pub c_phi: f64,
    pub max_molality: f64,
    pub source: String,
}

/// One cation–anion pair's parameters at 25 °C, with the ions' charges.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PitzerPair {
    pub cation: String,
    pub anion: String,
    pub z_cation: i32,
    pub z_anion: i32,
    pub beta0: f64,
    pub beta1: f64,
    pub beta2: f64,
    pub alpha1: f64,
    pub alpha2: f64,
    pub c_phi: f64,
    /// The highest molality of the pure salt the parameters were fitted to.
    pub max_molality: f64,
    pub source: String,
}

/// The extended Debye–Hückel (b-dot) form for ions the pair parameters do not name:
/// log10 γ = −A z² √I / (1 + B å √I) + ḃ I.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize, Deserialize)]
pub struct ExtendedDebyeHuckel {
    pub ion_size_angstrom: f64,
    pub b_per_angstrom: f64,
    pub b_dot: f64,
    /// Ionic strength (mol/kg) up to which the form is taken to hold.
    pub max_ionic_strength: f64,
}

/// The parameters the activity model for concentrated solutions uses.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct PitzerTable {
    /// The Debye–Hückel slope for the osmotic coefficient at 25 °C.
    pub a_phi_25: f64,
    pub b: f64,
    pub pairs: Vec<PitzerPair>,
    pub fallback: ExtendedDebyeHuckel,
    /// Below this ionic strength (mol/kg) the solver keeps the cheaper Davies equation.
    pub dilute_below: f64,
    /// Every ion some pair names, by formula; an ion's id is its place here.
    pub ions: Vec<String>,
    /// The pair of ion ids (i, j) at i × ions.len() + j: its index into `pairs`.
    pub pair_of_ids: Vec<Option<u16>>,
}

impl PitzerTable {
    pub fn pair(&self, cation: &str, anion: &str) -> Option<&PitzerPair> {
        self.pairs
            .iter()
            .find(|p| p.cation == cation && p.anion == anion)
    }

    /// True when some pair's parameters name the ion.
    pub fn names(&self, formula: &str) -> bool {
        self.ion_id(formula).is_some()
    }

    /// The ion's id, if some pair names it.
    pub fn ion_id(&self, formula: &str) -> Option<u16> {
        self.ions
            .iter()
            .position(|f| f == formula)
            .map(|i| i as u16)
    }

    /// The parameters of the pair of ions with ids `cation` and `anion`.
    pub fn pair_by_ids(&self, cation: u16, anion: u16) -> Option<&PitzerPair> {
        let n = self.ions.len();
        self.pair_of_ids[cation as usize * n + anion as usize].map(|k| &self.pairs[k as usize])
    }

    /// Fills in the ion ids and the table of pairs by id from `pairs`.
    pub fn index(mut self) -> Self {
        let mut ions: Vec<String> = Vec::new();
        for p in &self.pairs {
            for f in [&p.cation, &p.anion] {
                if !ions.contains(f) {
                    ions.push(f.clone());
                }
            }
        }
        let n = ions.len();
        let mut pair_of_ids = vec![None; n * n];
        let id = |f: &str| ions.iter().position(|x| x == f).unwrap();
        for (k, p) in self.pairs.iter().enumerate() {
            pair_of_ids[id(&p.cation) * n + id(&p.anion)] = Some(k as u16);
        }
        self.ions = ions;
        self.pair_of_ids = pair_of_ids;
        self
    }
}

impl PitzerPair {
    /// The ionic strength of the pure salt at the highest molality of the fit.
    pub fn max_ionic_strength(&self) -> f64 {
        let (zc, za) = (self.z_cation as f64, -self.z_anion as f64);
        // The neutral salt holds za cations and zc anions per their common factor; the
        // factor cancels in I per mole of cation.
        let (nu_c, nu_a) = (za, zc);
        let per_mol_cation = 0.5 * (nu_c * zc * zc + nu_a * za * za) / nu_c;
        let salt_molality_to_cation = nu_c / gcd(self.z_cation, -self.z_anion) as f64;
        self.max_molality * salt_molality_to_cation * per_mol_cation
    }

    /// Checks an entry and fills in the usual exponents: α1 = 2 when either ion is
    /// univalent; α1 = 1.4 and α2 = 12 for 2:2 salts.
    pub fn from_entry(e: &PairEntry, z_cation: i32, z_anion: i32) -> Result<PitzerPair, String> {
        if z_cation <= 0 || z_anion >= 0 {
            return Err(format!(
                "`{}`–`{}`: the cation must carry positive charge and the anion negative",
                e.cation, e.anion
            ));
        }
        let values = [e.beta0, e.beta1, e.beta2, e.c_phi];
        if values.iter().any(|v| !v.is_finite()) {
            return Err(format!(
                "`{}`–`{}`: every parameter must be a number",
                e.cation, e.anion
            ));
        }
        if !(e.max_molality > 0.0 && e.max_molality <= 30.0) {
            return Err(format!(
                "`{}`–`{}`: max_molality must be between 0 and 30 mol/kg",
                e.cation, e.anion
            ));
        }
        if e.source.trim().is_empty() {
            return Err(format!(
                "`{}`–`{}`: the entry has no source",
                e.cation, e.anion
            ));
        }
        let two_two = z_cation >= 2 && z_anion <= -2;
        let alpha1 = e.alpha1.unwrap_or(if two_two { 1.4 } else { 2.0 });
        let alpha2 = e.alpha2.unwrap_or(12.0);
        if !(alpha1 > 0.0 && alpha2 > 0.0) {
            return Err(format!(
                "`{}`–`{}`: alpha1 and alpha2 must be positive",
                e.cation, e.anion
            ));
        }
        Ok(PitzerPair {
            cation: e.cation.clone(),
            anion: e.anion.clone(),
            z_cation,
            z_anion,
            beta0: e.beta0,
            beta1: e.beta1,
            beta2: e.beta2,
            alpha1,
            alpha2,
            c_phi: e.c_phi,
            max_molality: e.max_molality,
            source: e.source.clone(),
        })
    }
}

fn gcd(a: i32, b: i32) -> i32 {
    if b == 0 {
        a.abs()
    } else {
        gcd(b, a % b)
    }
}
