//! Guards the data audit (tests/reference/audit.json, written by
//! tests/reference/audit_data.py; see tests/reference/AUDIT.md).
//!
//! The audit compares data/*.yaml with outside references: pKa values with PHREEQC's
//! databases (phreeqc.dat, llnl.dat, minteq.v4.dat, sit.dat), molar masses with the
//! `molmass` package, CAS numbers with the `chemicals` package, and checks that every
//! constant names its source. Python is not needed here: this test reads the committed
//! result and fails if
//!   * the audit recorded a failure (a pKa off by more than 0.15 without a note naming the
//!     database, a molar-mass or CAS failure, a missing source), or
//!   * the audit no longer describes the data as it is now (a substance added or removed, a
//!     pKa or a step changed, a note that explained a difference removed), i.e. someone
//!     edited data/ without re-running `tests/reference/audit_data.py`.

use serde_json::Value as Json;
use serde_yaml::Value as Yaml;
use std::collections::{BTreeMap, BTreeSet};

const AUDIT_JSON: &str = include_str!("reference/audit.json");
const SPECIES_YAML: &str = include_str!("../data/species.yaml");
const SUBSTANCES_YAML: &str = include_str!("../data/substances.yaml");

const RERUN: &str = "re-run `tests/reference/audit_data.py` (see tests/reference/AUDIT.md) \
                     and commit tests/reference/audit.json";

fn audit() -> Json {
    serde_json::from_str(AUDIT_JSON).expect("tests/reference/audit.json must parse as JSON")
}

fn arr<'a>(v: &'a Json, what: &str) -> &'a Vec<Json> {
    v.as_array()
        .unwrap_or_else(|| panic!("audit.json: `{what}` must be a list"))
}

fn yaml_num(v: &Yaml) -> Option<f64> {
    v.as_f64().or_else(|| v.as_i64().map(|i| i as f64))
}

/// (family id, step index) -> (acid formula, base formula, pka, note) from data/species.yaml.
const DATABASE_NOTES: &str = include_str!("reference/DATABASE-NOTES.md");

fn species_steps() -> BTreeMap<(String, usize), (String, String, f64, String)> {
    let doc: Yaml = serde_yaml::from_str(SPECIES_YAML).expect("data/species.yaml must parse");
    let mut out = BTreeMap::new();
    for fam in doc["families"].as_sequence().expect("families list") {
        let id = fam["id"].as_str().expect("family id").to_string();
        let species = fam["species"].as_sequence().expect("species list");
        for (i, st) in fam["steps"]
            .as_sequence()
            .expect("steps list")
            .iter()
            .enumerate()
        {
            let formula = |k: usize| species[k]["formula"].as_str().unwrap_or("").to_string();
            let pka = yaml_num(&st["pka"]).unwrap_or_else(|| panic!("{id} step {i}: pka"));
            // A step's comparison with the outside databases is noted in
            // tests/reference/DATABASE-NOTES.md (outside what a user reads) or in the data.
            let mut note = st["note"].as_str().unwrap_or("").to_string();
            let key = format!("* `{id}` step {i} (");
            for line in DATABASE_NOTES.lines().filter(|l| l.starts_with(&key)) {
                note.push(' ');
                note.push_str(line);
            }
            out.insert((id.clone(), i), (formula(i), formula(i + 1), pka, note));
        }
    }
    out
}

#[test]
fn audit_records_no_failure() {
    let a = audit();
    let mut problems = Vec::new();
    for r in arr(&a["pka"]["compared"], "pka.compared") {
        let status = r["status"].as_str().unwrap_or("?");
        if !matches!(status, "ok" | "explained") {
            problems.push(format!(
                "pKa {} step {} vs {}: offgas {} database {} ({status})",
                r["family"], r["step"], r["database"], r["offgas_pka"], r["db_pka"]
            ));
        }
    }
    assert_eq!(
        a["pka"]["counts"]["fail"].as_i64(),
        Some(0),
        "audit.json counts pKa failures"
    );
    for r in arr(&a["molar_mass"]["failures"], "molar_mass.failures") {
        problems.push(format!("molar mass: {r}"));
    }
    for r in arr(&a["cas"]["failures"], "cas.failures") {
        problems.push(format!("CAS: {r}"));
    }
    for r in arr(&a["sources"]["missing"], "sources.missing") {
        problems.push(format!("source missing: {r}"));
    }
    assert!(
        problems.is_empty(),
        "the data audit records failures (fix the data or explain them; see \
         tests/reference/AUDIT.md):\n{}",
        problems.join("\n")
    );
}

#[test]
fn audit_covers_the_current_substances() {
    let doc: Yaml = serde_yaml::from_str(SUBSTANCES_YAML).expect("data/substances.yaml must parse");
    let names: BTreeSet<String> = doc["substances"]
        .as_sequence()
        .expect("substances list")
        .iter()
        .map(|s| s["name"].as_str().expect("substance name").to_string())
        .collect();
    let count = doc["substances"].as_sequence().unwrap().len();
    let a = audit();
    let audited: BTreeSet<String> = arr(&a["substances"], "substances")
        .iter()
        .map(|v| v.as_str().expect("substance name").to_string())
        .collect();
    assert_eq!(
        a["molar_mass"]["counts"]["substances"].as_u64(),
        Some(count as u64),
        "audit.json counted a different number of substances than data/substances.yaml \
         has ({count}); {RERUN}"
    );
    assert_eq!(
        a["cas"]["counts"]["substances"].as_u64(),
        Some(count as u64),
        "audit.json checked CAS numbers of a different number of substances; {RERUN}"
    );
    let added: Vec<_> = names.difference(&audited).collect();
    let removed: Vec<_> = audited.difference(&names).collect();
    assert!(
        added.is_empty() && removed.is_empty(),
        "substances not in the audit: {added:?}; audited but no longer in the data: \
         {removed:?}; {RERUN}"
    );
}

#[test]
fn audit_pkas_are_the_current_data() {
    let steps = species_steps();
    let a = audit();
    let mut stale = Vec::new();
    let mut seen = BTreeSet::new();
    for r in arr(&a["pka"]["compared"], "pka.compared") {
        let fam = r["family"].as_str().expect("family").to_string();
        let i = r["step"].as_u64().expect("step") as usize;
        let db = r["database"].as_str().unwrap_or("?");
        seen.insert((fam.clone(), i));
        let Some((acid, base, pka, note)) = steps.get(&(fam.clone(), i)) else {
            stale.push(format!("{fam} step {i}: no longer in data/species.yaml"));
            continue;
        };
        let offgas = r["offgas_pka"].as_f64().expect("offgas_pka");
        if offgas != *pka {
            stale.push(format!(
                "{fam} step {i}: audit compared pKa {offgas}, data/species.yaml now has {pka}"
            ));
        }
        if r["acid"].as_str() != Some(acid.as_str()) || r["base"].as_str() != Some(base.as_str()) {
            stale.push(format!(
                "{fam} step {i}: audit has {} -> {}, data has {acid} -> {base}",
                r["acid"], r["base"]
            ));
        }
        if r["status"].as_str() == Some("explained") && !note.contains(db) {
            stale.push(format!(
                "{fam} step {i}: the audit counted the difference from {db} as explained, \
                 but the step's note no longer names {db}"
            ));
        }
    }
    for r in arr(&a["pka"]["not_in_databases"], "pka.not_in_databases") {
        let fam = r["family"].as_str().expect("family").to_string();
        let i = r["step"].as_u64().expect("step") as usize;
        seen.insert((fam, i));
    }
    for key in steps.keys() {
        if !seen.contains(key) {
            stale.push(format!("{} step {}: not in the audit", key.0, key.1));
        }
    }
    for key in &seen {
        if !steps.contains_key(key) {
            stale.push(format!(
                "{} step {}: in the audit but not in data/species.yaml",
                key.0, key.1
            ));
        }
    }
    assert!(
        stale.is_empty(),
        "tests/reference/audit.json does not describe data/species.yaml as it is now; \
         {RERUN}:\n{}",
        stale.join("\n")
    );
}

#[test]
fn audit_names_its_references() {
    let a = audit();
    let tools = &a["tools"];
    for key in ["phreeqc", "molmass", "chemicals"] {
        assert!(
            tools[key].as_str().is_some_and(|s| !s.is_empty()),
            "audit.json must record the version of `{key}` it used"
        );
    }
    for db in ["phreeqc.dat", "llnl.dat", "minteq.v4.dat"] {
        assert!(
            tools["databases_sha256"][db].as_str().is_some(),
            "audit.json must record which {db} it read"
        );
        assert!(
            arr(&a["pka"]["compared"], "pka.compared")
                .iter()
                .any(|r| r["database"].as_str() == Some(db)),
            "the pKa audit compared nothing with {db}"
        );
    }
    // every allow-listed CAS difference carries its reason
    for r in arr(&a["cas"]["allowed"], "cas.allowed") {
        assert!(
            r["reason"].as_str().is_some_and(|s| s.len() > 20),
            "allow-listed CAS difference without a reason: {r}"
        );
    }
}
