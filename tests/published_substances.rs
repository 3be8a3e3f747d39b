//! Checks of data/substances.yaml and data/classes.yaml against their format, against
//! each other, and against published values for the concentrated reagents.
//!
//! Reads the YAML with `serde_yaml::Value` only, so it does not depend on the crate's own
//! data types. data/species.yaml is checked too when it is present, but the family ids and
//! strong ions are taken from the fixed lists below, so this file passes on its own.

use serde_yaml::Value;
use std::collections::{HashMap, HashSet};
use std::path::Path;

const SUBSTANCES: &str = include_str!("../data/substances.yaml");
const CLASSES: &str = include_str!("../data/classes.yaml");

/// The fixed acid-base family ids (the engine's species.yaml must define each of them).
const FAMILY_IDS: &[&str] = &[
    "water",
    "chloride",
    "nitrate",
    "sulfate",
    "cyanide",
    "sulfide",
    "ammonia",
    "carbonate",
    "sulfite",
    "fluoride",
    "nitrite",
    "azide",
    "hypochlorite",
    "chlorite",
    "selenide",
    "selenite",
    "acetate",
    "formate",
    "propionate",
    "butyrate",
    "trifluoroacetate",
    "trichloroacetate",
    "dichloroacetate",
    "chloroacetate",
    "glycolate",
    "lactate",
    "benzoate",
    "salicylate",
    "citrate",
    "oxalate",
    "malonate",
    "succinate",
    "tartrate",
    "maleate",
    "phthalate",
    "phenol",
    "phosphate",
    "phosphite",
    "hypophosphite",
    "borate",
    "silicate",
    "chromate",
    "arsenate",
    "arsenite",
    "peroxide",
    "cyanate",
    "sulfamate",
    "thiosulfate",
    "methylamine",
    "dimethylamine",
    "trimethylamine",
    "ethylamine",
    "diethylamine",
    "triethylamine",
    "butylamine",
    "pyridine",
    "ethanolamine",
    "diethanolamine",
    "triethanolamine",
    "morpholine",
    "piperidine",
    "aniline",
    "imidazole",
    "ethylenediamine",
    "hydrazine",
    "hydroxylamine",
    "tris",
    "hepes",
    "mops",
    "mes",
    "glycine",
    "edta",
    "aluminium",
    "iron3",
    "iron2",
    "chromium3",
    "copper2",
    "zinc",
    "nickel",
    "lead",
    "cadmium",
    "mercury2",
];

/// The fixed strong ions (formula, charge).
const STRONG_IONS: &[(&str, i32)] = &[
    ("Na+", 1),
    ("K+", 1),
    ("Li+", 1),
    ("Ca^2+", 2),
    ("Mg^2+", 2),
    ("Ba^2+", 2),
    ("Sr^2+", 2),
    ("Ag+", 1),
    ("Cu+", 1),
    ("Co^2+", 2),
    ("Mn^2+", 2),
    ("Cs+", 1),
    ("Br-", -1),
    ("I-", -1),
    ("ClO4-", -1),
    ("ClO3-", -1),
    ("BrO3-", -1),
    ("IO3-", -1),
    ("SCN-", -1),
    ("MnO4-", -1),
    ("S2O8^2-", -2),
    ("CH3SO3-", -1),
    ("BF4-", -1),
    ("PF6-", -1),
    ("SiF6^2-", -2),
    ("Fe(CN)6^3-", -3),
    ("Fe(CN)6^4-", -4),
    ("Au(CN)2-", -1),
    ("MoO4^2-", -2),
    ("WO4^2-", -2),
];

/// Standard atomic weights (IUPAC, abridged to what the substance formulas use), g/mol.
const ATOMIC_WEIGHTS: &[(&str, f64)] = &[
    ("H", 1.008),
    ("Li", 6.94),
    ("B", 10.81),
    ("C", 12.011),
    ("N", 14.007),
    ("O", 15.999),
    ("F", 18.998),
    ("Na", 22.990),
    ("Mg", 24.305),
    ("Al", 26.982),
    ("Si", 28.085),
    ("P", 30.974),
    ("S", 32.06),
    ("Cl", 35.45),
    ("K", 39.098),
    ("Ca", 40.078),
    ("Ti", 47.867),
    ("Cr", 51.996),
    ("Mn", 54.938),
    ("Fe", 55.845),
    ("Co", 58.933),
    ("Ni", 58.693),
    ("Cu", 63.546),
    ("Zn", 65.38),
    ("As", 74.922),
    ("Se", 78.971),
    ("Br", 79.904),
    ("Sr", 87.62),
    ("Mo", 95.95),
    ("Ag", 107.868),
    ("Cd", 112.414),
    ("I", 126.904),
    ("Cs", 132.905),
    ("Ba", 137.327),
    ("W", 183.84),
    ("Au", 196.967),
    ("Hg", 200.592),
    ("Pb", 207.2),
];

fn load(text: &str, what: &str) -> Value {
    serde_yaml::from_str(text).unwrap_or_else(|e| panic!("{what} does not parse: {e}"))
}

fn substances() -> Vec<Value> {
    let doc = load(SUBSTANCES, "substances.yaml");
    doc.get("substances")
        .and_then(Value::as_sequence)
        .expect("substances.yaml has a `substances` list")
        .clone()
}

fn str_field<'a>(v: &'a Value, key: &str) -> Option<&'a str> {
    v.get(key).and_then(Value::as_str)
}

fn name(v: &Value) -> &str {
    str_field(v, "name").expect("every substance has a name")
}

fn num(v: &Value, key: &str) -> Option<f64> {
    v.get(key).and_then(Value::as_f64)
}

/// `{value: x, source: "..."}` -> x, requiring a non-empty source.
fn sourced(v: &Value, key: &str) -> Option<f64> {
    let block = v.get(key)?;
    let source = str_field(block, "source").unwrap_or("");
    assert!(
        !source.trim().is_empty(),
        "{}: {key} has no source",
        name(v)
    );
    num(block, "value")
}

fn is_solution(v: &Value) -> bool {
    str_field(v, "state") == Some("solution")
}

fn by_name(all: &[Value]) -> HashMap<String, &Value> {
    all.iter().map(|s| (name(s).to_lowercase(), s)).collect()
}

/// CAS check digit: weighted sum of the other digits, weights 1, 2, 3 ... from the right.
fn cas_valid(cas: &str) -> bool {
    let parts: Vec<&str> = cas.split('-').collect();
    if parts.len() != 3
        || !(2..=7).contains(&parts[0].len())
        || parts[1].len() != 2
        || parts[2].len() != 1
        || !parts.iter().all(|p| p.chars().all(|c| c.is_ascii_digit()))
    {
        return false;
    }
    let body: Vec<u32> = parts[0]
        .chars()
        .chain(parts[1].chars())
        .map(|c| c.to_digit(10).unwrap())
        .collect();
    let sum: u32 = body
        .iter()
        .rev()
        .enumerate()
        .map(|(i, d)| (i as u32 + 1) * d)
        .sum();
    sum % 10 == parts[2].parse::<u32>().unwrap()
}

/// Molar mass of a plain formula such as `CuSO4.5H2O` or `(NH4)2Fe(SO4)2.6H2O`.
fn formula_mass(formula: &str) -> Result<f64, String> {
    let weights: HashMap<&str, f64> = ATOMIC_WEIGHTS.iter().copied().collect();
    let mut total = 0.0;
    for part in formula.split('.') {
        let digits: String = part.chars().take_while(|c| c.is_ascii_digit()).collect();
        let mult = if digits.is_empty() {
            1.0
        } else {
            digits.parse::<f64>().unwrap()
        };
        let chars: Vec<char> = part[digits.len()..].chars().collect();
        let mut pos = 0;
        let m = group_mass(&chars, &mut pos, &weights)?;
        if pos != chars.len() {
            return Err(format!("unbalanced parenthesis in {formula}"));
        }
        total += mult * m;
    }
    Ok(total)
}

fn read_count(chars: &[char], pos: &mut usize) -> f64 {
    let start = *pos;
    while *pos < chars.len() && chars[*pos].is_ascii_digit() {
        *pos += 1;
    }
    if *pos == start {
        1.0
    } else {
        chars[start..*pos]
            .iter()
            .collect::<String>()
            .parse()
            .unwrap()
    }
}

fn group_mass(chars: &[char], pos: &mut usize, w: &HashMap<&str, f64>) -> Result<f64, String> {
    let mut mass = 0.0;
    while *pos < chars.len() {
        let c = chars[*pos];
        if c == '(' {
            *pos += 1;
            let inner = group_mass(chars, pos, w)?;
            if *pos >= chars.len() || chars[*pos] != ')' {
                return Err("missing )".into());
            }
            *pos += 1;
            mass += inner * read_count(chars, pos);
        } else if c == ')' {
            return Ok(mass);
        } else if c.is_ascii_uppercase() {
            let mut sym = c.to_string();
            *pos += 1;
            if *pos < chars.len() && chars[*pos].is_ascii_lowercase() {
                sym.push(chars[*pos]);
                *pos += 1;
            }
            let aw = *w
                .get(sym.as_str())
                .ok_or_else(|| format!("unknown element {sym}"))?;
            mass += aw * read_count(chars, pos);
        } else {
            return Err(format!("unexpected character {c:?}"));
        }
    }
    Ok(mass)
}

/// mol/L of a commercial solution: mass_percent * density * 10 / M(solute).
fn molarity(all: &[Value], solution_name: &str) -> f64 {
    let index = by_name(all);
    let sol = index
        .get(solution_name)
        .unwrap_or_else(|| panic!("no substance named {solution_name:?}"));
    assert!(is_solution(sol), "{solution_name} is not a solution entry");
    let solute_name = str_field(sol, "solution_of").expect("solution_of");
    let solute = index
        .get(&solute_name.to_lowercase())
        .unwrap_or_else(|| panic!("solute {solute_name:?} missing"));
    let m = num(solute, "molar_mass").expect("solute molar_mass");
    let pct = sourced(sol, "mass_percent").expect("mass_percent value");
    let rho = sourced(sol, "density").expect("density value");
    pct * rho * 10.0 / m
}

#[test]
fn files_parse_and_have_headers() {
    for (text, what) in [(SUBSTANCES, "substances.yaml"), (CLASSES, "classes.yaml")] {
        let doc = load(text, what);
        assert!(
            str_field(&doc, "description").is_some(),
            "{what}: no description"
        );
        assert!(
            doc.get("units").map(Value::is_mapping).unwrap_or(false),
            "{what}: no units block"
        );
    }
    let doc = load(SUBSTANCES, "substances.yaml");
    let units = doc.get("units").unwrap();
    for key in ["molar_mass", "density", "solubility", "mass_percent"] {
        assert!(
            str_field(units, key).is_some(),
            "substances.yaml units lacks {key}"
        );
    }
}

#[test]
fn at_least_200_substances() {
    let n = substances().len();
    assert!(n >= 200, "only {n} substances");
}

#[test]
fn names_are_unique_and_synonyms_do_not_collide() {
    let all = substances();
    let mut names = HashSet::new();
    for s in &all {
        let n = name(s);
        assert_eq!(n, n.to_lowercase(), "name {n:?} is not lower case");
        assert!(!n.trim().is_empty());
        assert!(names.insert(n.to_lowercase()), "duplicate name {n:?}");
    }
    let mut synonym_owner: HashMap<String, String> = HashMap::new();
    for s in &all {
        let n = name(s).to_lowercase();
        let syns = s
            .get("synonyms")
            .and_then(Value::as_sequence)
            .cloned()
            .unwrap_or_default();
        for syn in syns {
            let syn = syn.as_str().expect("synonyms are strings").to_lowercase();
            if syn != n {
                assert!(
                    !names.contains(&syn),
                    "synonym {syn:?} of {n:?} is another substance's name"
                );
            }
            if let Some(owner) = synonym_owner.insert(syn.clone(), n.clone()) {
                assert_eq!(owner, n, "synonym {syn:?} on both {owner:?} and {n:?}");
            }
        }
    }
}

#[test]
fn cas_check_digits_are_valid() {
    // Known good and bad numbers first, so the checker itself is tested.
    assert!(cas_valid("7732-18-5")); // water
    assert!(cas_valid("143-33-9")); // sodium cyanide
    assert!(!cas_valid("143-33-8"));
    assert!(!cas_valid("7732185"));
    for s in substances() {
        let cas = str_field(&s, "cas").unwrap_or_else(|| panic!("{} has no CAS", name(&s)));
        assert!(
            cas_valid(cas),
            "{}: CAS {cas} fails its check digit",
            name(&s)
        );
    }
}

#[test]
fn classes_are_defined_and_used_ids_exist() {
    let doc = load(CLASSES, "classes.yaml");
    let list = doc
        .get("classes")
        .and_then(Value::as_sequence)
        .expect("classes list");
    let mut ids = HashSet::new();
    for c in list {
        let id = str_field(c, "id").expect("class id");
        assert!(
            !id.is_empty() && id.chars().all(|ch| ch.is_ascii_lowercase() || ch == '_'),
            "class id {id:?} is not lower case with underscores"
        );
        assert!(ids.insert(id.to_string()), "duplicate class {id}");
        assert!(
            str_field(c, "description")
                .map(|d| !d.trim().is_empty())
                .unwrap_or(false),
            "{id}: no description"
        );
        assert!(
            c.get("beyond_proton_model")
                .and_then(Value::as_bool)
                .is_some(),
            "{id}: beyond_proton_model must be true or false"
        );
    }
    assert!((30..=50).contains(&ids.len()), "{} classes", ids.len());
    for s in substances() {
        let classes = s
            .get("classes")
            .and_then(Value::as_sequence)
            .unwrap_or_else(|| panic!("{} has no classes", name(&s)));
        assert!(!classes.is_empty(), "{} has an empty class list", name(&s));
        for c in classes {
            let c = c.as_str().expect("class ids are strings");
            assert!(ids.contains(c), "{}: unknown class {c}", name(&s));
        }
    }
}

#[test]
fn gives_use_fixed_family_ids_and_strong_ions() {
    let families: HashSet<&str> = FAMILY_IDS.iter().copied().collect();
    let ions: HashSet<&str> = STRONG_IONS.iter().map(|(f, _)| *f).collect();
    for s in substances() {
        if is_solution(&s) {
            continue;
        }
        let gives = s
            .get("gives")
            .unwrap_or_else(|| panic!("{} has no gives", name(&s)));
        let gives = gives
            .as_mapping()
            .unwrap_or_else(|| panic!("{}: gives is not a mapping", name(&s)));
        for (key, _) in gives {
            let key = key.as_str().unwrap();
            assert!(
                key == "families" || key == "ions",
                "{}: unexpected key {key} in gives",
                name(&s)
            );
        }
        let check = |key: &str, allowed: &HashSet<&str>| {
            if let Some(m) = gives.get(key) {
                for (id, count) in m.as_mapping().expect("mapping") {
                    let id = id.as_str().unwrap();
                    assert!(
                        allowed.contains(id),
                        "{}: {key} entry {id:?} is not in the fixed list",
                        name(&s)
                    );
                    assert!(id != "water", "{}: water is implied, not given", name(&s));
                    let n = count.as_f64().unwrap_or(0.0);
                    assert!(n > 0.0, "{}: count of {id} must be positive", name(&s));
                }
            }
        };
        check("families", &families);
        check("ions", &ions);
    }
}

#[test]
fn pure_entries_have_consistent_formula_and_molar_mass() {
    for s in substances() {
        if is_solution(&s) {
            continue;
        }
        let n = name(&s);
        let formula = str_field(&s, "formula").unwrap_or_else(|| panic!("{n} has no formula"));
        let m = num(&s, "molar_mass").unwrap_or_else(|| panic!("{n} has no molar_mass"));
        let state = str_field(&s, "state").unwrap_or("");
        assert!(
            ["solid", "liquid", "gas"].contains(&state),
            "{n}: state {state:?}"
        );
        if state == "liquid" {
            let d = sourced(&s, "density").unwrap_or_else(|| panic!("{n}: liquid without density"));
            assert!((0.5..=14.0).contains(&d), "{n}: density {d}");
        }
        if s.get("solubility").is_some() {
            let v = sourced(&s, "solubility").unwrap();
            assert!(v > 0.0, "{n}: solubility {v}");
        }
        assert!(
            str_field(&s, "source")
                .map(|x| !x.trim().is_empty())
                .unwrap_or(false),
            "{n}: no source"
        );
        let computed = formula_mass(formula).unwrap_or_else(|e| panic!("{n}: {e}"));
        let rel = (computed - m).abs() / m;
        assert!(
            rel < 1e-3,
            "{n}: molar_mass {m} but {formula} weighs {computed:.3}"
        );
    }
}

#[test]
fn formula_mass_checker_works() {
    // Sanity of the parser itself: copper sulfate pentahydrate 249.68, ferrous ammonium
    // sulfate hexahydrate 392.14 g/mol (sums of standard atomic weights).
    assert!((formula_mass("CuSO4.5H2O").unwrap() - 249.68).abs() < 0.02);
    assert!((formula_mass("(NH4)2Fe(SO4)2.6H2O").unwrap() - 392.14).abs() < 0.02);
    assert!(formula_mass("Xx2O").is_err());
}

#[test]
fn solution_entries_refer_to_pure_solutes() {
    let all = substances();
    let index = by_name(&all);
    let mut count = 0;
    for s in &all {
        if !is_solution(s) {
            continue;
        }
        count += 1;
        let n = name(s);
        for key in ["formula", "molar_mass", "gives"] {
            assert!(
                s.get(key).is_none(),
                "{n}: a solution entry has no {key} of its own"
            );
        }
        let solute = str_field(s, "solution_of").unwrap_or_else(|| panic!("{n}: no solution_of"));
        let target = index
            .get(&solute.to_lowercase())
            .unwrap_or_else(|| panic!("{n}: solute {solute:?} is not a substance"));
        assert!(
            !is_solution(target),
            "{n}: solute {solute:?} is itself a solution"
        );
        let pct = sourced(s, "mass_percent").unwrap_or_else(|| panic!("{n}: no mass_percent"));
        assert!(pct > 0.0 && pct <= 100.0, "{n}: mass_percent {pct}");
        let rho = sourced(s, "density").unwrap_or_else(|| panic!("{n}: no density"));
        assert!((0.6..=2.5).contains(&rho), "{n}: density {rho}");
    }
    assert!(count >= 15, "only {count} commercial solutions");
}

#[test]
fn concentrated_hydrochloric_acid_is_12_molar() {
    // CRC Handbook of Chemistry and Physics, "Concentrative properties of aqueous
    // solutions": 37 % HCl at 20 °C is about 12.0 mol/L.
    let c = molarity(&substances(), "hydrochloric acid, concentrated");
    assert!((c - 12.0).abs() <= 0.2, "conc. HCl {c:.2} mol/L");
}

#[test]
fn concentrated_sulfuric_acid_is_18_molar() {
    // CRC Handbook of Chemistry and Physics, "Concentrative properties of aqueous
    // solutions": 96 % H2SO4 at 20 °C is about 18.0 mol/L.
    let c = molarity(&substances(), "sulfuric acid, concentrated");
    assert!((c - 18.0).abs() <= 0.4, "conc. H2SO4 {c:.2} mol/L");
}

#[test]
fn concentrated_ammonia_is_about_14_8_molar() {
    // CRC Handbook of Chemistry and Physics, "Concentrative properties of aqueous
    // solutions": 28 % NH3 (density 0.898 at 20 °C) is about 14.8 mol/L.
    let c = molarity(&substances(), "ammonia solution, concentrated");
    assert!((c - 14.8).abs() <= 0.5, "conc. ammonia {c:.2} mol/L");
}

#[test]
fn fifty_percent_sodium_hydroxide_is_19_1_molar() {
    // CRC Handbook of Chemistry and Physics, "Concentrative properties of aqueous
    // solutions": 50 % NaOH (density 1.5253 at 20 °C) is about 19.1 mol/L.
    let c = molarity(&substances(), "sodium hydroxide solution 50%");
    assert!((c - 19.1).abs() <= 0.3, "50 % NaOH {c:.2} mol/L");
}

#[test]
fn key_substances_are_present() {
    let all = substances();
    let index = by_name(&all);
    for n in [
        "sodium cyanide",
        "potassium cyanide",
        "sodium sulfide",
        "sodium hydrosulfide",
        "sodium metabisulfite",
        "sodium fluoride",
        "ammonium bifluoride",
        "hydrofluoric acid 48%",
        "sodium azide",
        "sodium nitrite",
        "ammonium chloride",
        "sodium bicarbonate",
        "sodium hypochlorite solution 6%",
        "calcium hypochlorite",
        "sodium chlorite",
        "tris",
        "hepes",
        "edta",
        "glycine",
        "sodium hydroxide",
        "acetic acid",
        "water",
        "sodium",
        "lithium aluminium hydride",
        "aluminium phosphide",
        "calcium carbide",
        "arsenic trioxide",
        "sodium selenite",
        "hydrazine sulfate",
        "hydroxylamine hydrochloride",
    ] {
        assert!(index.contains_key(n), "missing {n}");
    }
    // Metabisulfite gives two sulfite per mole (S2O5^2- + H2O -> 2 HSO3-).
    let mbs = index["sodium metabisulfite"];
    let n = mbs["gives"]["families"]["sulfite"].as_f64().unwrap();
    assert_eq!(n, 2.0);
    // Sodium hydroxide gives only Na+ (the hydroxide is implied by electroneutrality).
    let naoh = &index["sodium hydroxide"]["gives"];
    assert!(naoh.get("families").is_none());
    assert_eq!(naoh["ions"]["Na+"].as_f64(), Some(1.0));
}

#[test]
fn gives_are_consistent_with_species_yaml_when_present() {
    // data/species.yaml is written separately; when it exists every family and strong ion
    // used here must be defined there.
    let path = Path::new(file!())
        .parent()
        .unwrap()
        .join("../data/species.yaml");
    let Ok(text) = std::fs::read_to_string(&path) else {
        eprintln!("{} not present; cross-check skipped", path.display());
        return;
    };
    let doc = load(&text, "species.yaml");
    let Some(fams) = doc.get("families").and_then(Value::as_sequence) else {
        eprintln!("species.yaml has no families list yet; cross-check skipped");
        return;
    };
    let defined: HashSet<String> = fams
        .iter()
        .filter_map(|f| str_field(f, "id"))
        .map(String::from)
        .collect();
    let ions: HashSet<String> = doc
        .get("strong_ions")
        .and_then(Value::as_sequence)
        .map(|l| {
            l.iter()
                .filter_map(|i| str_field(i, "formula"))
                .map(String::from)
                .collect()
        })
        .unwrap_or_default();
    for s in substances() {
        let Some(gives) = s.get("gives") else {
            continue;
        };
        if let Some(m) = gives.get("families").and_then(Value::as_mapping) {
            for (id, _) in m {
                let id = id.as_str().unwrap();
                assert!(
                    defined.contains(id),
                    "{}: family {id} not in species.yaml",
                    name(&s)
                );
            }
        }
        if let Some(m) = gives.get("ions").and_then(Value::as_mapping) {
            for (id, _) in m {
                let id = id.as_str().unwrap();
                assert!(
                    ions.contains(id),
                    "{}: strong ion {id} not in species.yaml",
                    name(&s)
                );
            }
        }
    }
}
