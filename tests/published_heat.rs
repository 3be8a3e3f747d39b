//! Checks data/heat.yaml and data/boiling-points.yaml against their own rules and against
//! published values.
//!
//! The files are read as plain YAML (`serde_yaml::Value`), independently of the engine's own
//! types, so these tests keep working while the engine changes. Every published value is
//! asserted with a tolerance, and the source of the expected value is named beside it.

use serde_yaml::Value;
use std::collections::BTreeSet;

const HEAT_YAML: &str = include_str!("../data/heat.yaml");
const BOILING_YAML: &str = include_str!("../data/boiling-points.yaml");
const SUBSTANCES_YAML: &str = include_str!("../data/substances.yaml");
const SPECIES_YAML: &str = include_str!("../data/species.yaml");

fn parse(text: &str, file: &str) -> Value {
    serde_yaml::from_str(text).unwrap_or_else(|e| panic!("{file} must parse as YAML: {e}"))
}

fn heat() -> Value {
    parse(HEAT_YAML, "data/heat.yaml")
}

fn boiling() -> Value {
    parse(BOILING_YAML, "data/boiling-points.yaml")
}

fn list(doc: &Value, key: &str, file: &str) -> Vec<Value> {
    doc[key]
        .as_sequence()
        .unwrap_or_else(|| panic!("{file}: top-level `{key}` must be a list"))
        .clone()
}

fn num(v: &Value, what: &str) -> f64 {
    v.as_f64()
        .or_else(|| v.as_i64().map(|i| i as f64))
        .unwrap_or_else(|| panic!("{what}: expected a number, found {v:?}"))
}

fn text<'a>(v: &'a Value, what: &str) -> &'a str {
    let s = v
        .as_str()
        .unwrap_or_else(|| panic!("{what}: expected a string, found {v:?}"));
    assert!(!s.trim().is_empty(), "{what}: must not be empty");
    s
}

fn assert_close(what: &str, got: f64, want: f64, tol: f64) {
    assert!(
        (got - want).abs() <= tol,
        "{what}: data file has {got}, published {want} ± {tol}"
    );
}

fn substance_names() -> BTreeSet<String> {
    let doc = parse(SUBSTANCES_YAML, "data/substances.yaml");
    list(&doc, "substances", "data/substances.yaml")
        .iter()
        .map(|s| text(&s["name"], "substances.yaml name").to_string())
        .collect()
}

fn dissolution() -> Vec<Value> {
    list(&heat(), "dissolution", "data/heat.yaml")
}

fn boiling_points() -> Vec<Value> {
    list(&boiling(), "boiling_points", "data/boiling-points.yaml")
}

fn find<'a>(entries: &'a [Value], substance: &str, file: &str) -> &'a Value {
    entries
        .iter()
        .find(|e| e["substance"].as_str() == Some(substance))
        .unwrap_or_else(|| panic!("{file}: no entry for `{substance}`"))
}

/// kJ/mol from infinite dilution of `substance` in data/heat.yaml.
fn dh(substance: &str) -> f64 {
    num(
        &find(&dissolution(), substance, "data/heat.yaml")["dh_to_infinite_dilution_kj_per_mol"],
        &format!("{substance} dh_to_infinite_dilution_kj_per_mol"),
    )
}

fn boiling_point(substance: &str) -> f64 {
    num(
        &find(&boiling_points(), substance, "data/boiling-points.yaml")["celsius"],
        &format!("{substance} celsius"),
    )
}

// ---------------------------------------------------------------- structure

#[test]
fn both_files_parse_and_open_with_description_and_units() {
    for (doc, file) in [
        (heat(), "data/heat.yaml"),
        (boiling(), "data/boiling-points.yaml"),
    ] {
        text(&doc["description"], &format!("{file} description"));
        let units = doc["units"]
            .as_mapping()
            .unwrap_or_else(|| panic!("{file}: `units` must be a mapping"));
        assert!(
            !units.is_empty(),
            "{file}: `units` must name the units of its numbers"
        );
    }
    let units = &heat()["units"];
    for key in ["neutralization", "heat_capacity", "dissolution"] {
        text(&units[key], &format!("data/heat.yaml units.{key}"));
    }
    text(
        &boiling()["units"]["celsius"],
        "data/boiling-points.yaml units.celsius",
    );
}

#[test]
fn every_substance_named_exists_once_in_substances_yaml() {
    let names = substance_names();
    for (entries, file) in [
        (dissolution(), "data/heat.yaml dissolution"),
        (boiling_points(), "data/boiling-points.yaml"),
    ] {
        assert!(!entries.is_empty(), "{file}: list is empty");
        let mut seen = BTreeSet::new();
        for e in &entries {
            let name = text(&e["substance"], &format!("{file} substance"));
            assert!(
                names.contains(name),
                "{file}: `{name}` is not a `name` in data/substances.yaml"
            );
            assert!(
                seen.insert(name.to_string()),
                "{file}: `{name}` listed twice"
            );
        }
    }
}

#[test]
fn every_value_has_a_source() {
    let doc = heat();
    text(&doc["neutralization"]["source"], "neutralization source");
    text(&doc["heat_capacity"]["source"], "heat_capacity source");
    for e in dissolution() {
        let name = text(&e["substance"], "dissolution substance");
        text(&e["source"], &format!("dissolution `{name}` source"));
        text(
            &e["derivation"],
            &format!("dissolution `{name}` derivation"),
        );
        text(
            &e["infinite_dilution_state"],
            &format!("dissolution `{name}` infinite_dilution_state"),
        );
        num(
            &e["dh_to_infinite_dilution_kj_per_mol"],
            &format!("dissolution `{name}` dh"),
        );
        let u = num(
            &e["uncertainty_kj_per_mol"],
            &format!("dissolution `{name}` uncertainty"),
        );
        assert!(
            u > 0.0,
            "dissolution `{name}`: uncertainty must be positive"
        );
    }
    for e in boiling_points() {
        let name = text(&e["substance"], "boiling_points substance");
        text(&e["source"], &format!("boiling point of `{name}` source"));
    }
}

#[test]
fn weak_steps_refer_to_real_species_steps() {
    let species = parse(SPECIES_YAML, "data/species.yaml");
    let families = list(&species, "families", "data/species.yaml");
    for e in dissolution() {
        let name = text(&e["substance"], "dissolution substance");
        let steps = e["weak_steps_included"]
            .as_sequence()
            .unwrap_or_else(|| panic!("dissolution `{name}`: weak_steps_included must be a list"));
        for s in steps {
            let id = text(&s["family"], &format!("`{name}` weak step family"));
            let i = num(&s["step"], &format!("`{name}` weak step index")) as usize;
            let fam = families
                .iter()
                .find(|f| f["id"].as_str() == Some(id))
                .unwrap_or_else(|| panic!("`{name}`: family `{id}` not in data/species.yaml"));
            let n = fam["steps"].as_sequence().map_or(0, |v| v.len());
            assert!(i < n, "`{name}`: family `{id}` has {n} steps, no step {i}");
        }
    }
}

#[test]
fn boiling_points_are_within_the_files_scope() {
    for e in boiling_points() {
        let name = text(&e["substance"], "boiling_points substance");
        let t = num(&e["celsius"], &format!("boiling point of `{name}`"));
        assert!(
            (-100.0..120.0).contains(&t),
            "boiling point of `{name}` is {t} °C; the file lists only substances boiling below 120 °C"
        );
    }
}

// ---------------------------------------------------------------- published values

#[test]
fn neutralization_enthalpy_matches_published_value() {
    let v = num(&heat()["neutralization"]["value"], "neutralization value");
    // CODATA Key Values (Cox, Wagman, Medvedev 1989): ΔfH H2O(l) -285.830, OH-(aq) -230.015
    // -> -55.815 kJ/mol; Olofsson & Hepler, J. Solution Chem. 4, 127 (1975): 55.8 for ionization.
    assert_close("H+ + OH- -> H2O enthalpy, kJ/mol", v, -55.8, 0.5);
}

#[test]
fn water_heat_capacity_matches_published_value() {
    let v = num(&heat()["heat_capacity"]["value"], "heat_capacity value");
    // Incropera & DeWitt, Table A.6: 4.181 J/(g K) at 295 K, 4.179 at 300 K; IAPWS-95 4.1813 at 25 °C.
    assert_close("cp of liquid water at 25 °C, J/(g K)", v, 4.18, 0.01);
}

#[test]
fn sulfuric_acid_dilution_matches_nbs_tables() {
    // NBS tables (Wagman et al. 1982): ΔfH H2SO4(l) -813.989, SO4-2(aq) -909.27 -> -95.28 kJ/mol.
    assert_close(
        "H2SO4(l) -> infinite dilution, kJ/mol",
        dh("sulfuric acid"),
        -95.3,
        1.5,
    );
}

#[test]
fn alkali_hydroxide_solution_enthalpies_match_crc() {
    // CRC Handbook, Enthalpy of solution of electrolytes (Parker, NSRDS-NBS 2, 1965): NaOH(c) -44.51.
    assert_close(
        "NaOH(s) -> infinite dilution, kJ/mol",
        dh("sodium hydroxide"),
        -44.51,
        0.5,
    );
    // Same table: KOH(c) -57.61.
    assert_close(
        "KOH(s) -> infinite dilution, kJ/mol",
        dh("potassium hydroxide"),
        -57.61,
        0.5,
    );
}

#[test]
fn strong_acid_solution_enthalpies_match_crc() {
    // CRC Handbook, Enthalpy of solution of electrolytes (Parker 1965): HCl(g) -74.84, HNO3(l) -33.28.
    assert_close(
        "HCl(g) -> infinite dilution, kJ/mol",
        dh("hydrogen chloride"),
        -74.84,
        0.5,
    );
    assert_close(
        "HNO3(l) -> infinite dilution, kJ/mol",
        dh("nitric acid"),
        -33.28,
        0.5,
    );
    // CRC Handbook, Enthalpy of dilution of acids (Parker 1965): -ΔdilH of HCl is 15.40 at
    // 15 mol/kg and 19.87 at 20 mol/kg; 37 % HCl is 16.1 mol/kg.
    assert_close(
        "37 % HCl -> infinite dilution, kJ/mol",
        dh("hydrochloric acid, concentrated"),
        -16.4,
        0.6,
    );
}

#[test]
fn concentrated_reagents_release_less_than_the_neat_substance() {
    // A commercial solution has already released part of the heat of dissolving its solute.
    for (solution, neat) in [
        ("sulfuric acid, concentrated", "sulfuric acid"),
        ("sodium hydroxide solution 50%", "sodium hydroxide"),
        ("potassium hydroxide solution 45%", "potassium hydroxide"),
        ("nitric acid, concentrated", "nitric acid"),
        ("hydrochloric acid, concentrated", "hydrogen chloride"),
    ] {
        let (s, n) = (dh(solution), dh(neat));
        assert!(
            s < 0.0,
            "`{solution}`: dilution of a concentrated strong acid or base releases heat, got {s}"
        );
        assert!(
            s > n,
            "`{solution}` ({s}) must release less than `{neat}` ({n}) per mole"
        );
    }
}

#[test]
fn boiling_points_match_published_values() {
    // Lange's Handbook, Table 11.8 and National Academies (2016) Appendix D: acetone 56.2; CRC 56.05.
    assert_close("acetone bp, °C", boiling_point("acetone"), 56.1, 0.5);
    // CRC / NIST WebBook: dichloromethane 39.6; Lange's Table 11.8: 39.8.
    assert_close(
        "dichloromethane bp, °C",
        boiling_point("dichloromethane"),
        39.6,
        0.5,
    );
    // Lange's Handbook, Table 11.8: diethyl ether 34.6; National Academies (2016): 34.5.
    assert_close(
        "diethyl ether bp, °C",
        boiling_point("diethyl ether"),
        34.6,
        0.5,
    );
    // Lange's Handbook, Table 11.8: methanol 64.7.
    assert_close("methanol bp, °C", boiling_point("methanol"), 64.7, 0.5);
    // IAPWS / ITS-90: water 99.97 at 101.325 kPa.
    assert_close("water bp, °C", boiling_point("water"), 100.0, 0.5);
    // NIOSH Emergency Response Safety and Health Database: hydrogen cyanide 78 °F (25.6 °C).
    assert_close(
        "hydrogen cyanide bp, °C",
        boiling_point("hydrogen cyanide"),
        25.6,
        0.5,
    );
}

#[test]
fn ammonia_solutions_start_to_boil_in_order() {
    // Aqua ammonia supplier data: 27.44 % NH3 boils at 88 °F, 29.40 % at 81 °F, 25.48 % at 95 °F.
    let conc = boiling_point("ammonia solution, concentrated");
    let dil = boiling_point("ammonia solution 25%");
    assert_close("28 % ammonia starts to boil, °C", conc, 30.0, 1.5);
    assert!(
        conc < dil,
        "the stronger ammonia solution must start to boil first ({conc} vs {dil})"
    );
    assert!(dil < boiling_point("water"));
}
