//! Metal complexes against an outside reference: PHREEQC with minteq.v4.dat, cases in
//! tests/reference/complex_golden.json (made by tests/reference/make_complex_golden.py, which CI
//! re-runs with `--check`). Each case is solved here as offgas solves any mixture; the pH must
//! agree within 0.1, the HCN or NH3 partial pressure over the liquid and the free cyanide or
//! ammonia within 25 %. Why they differ at all is in tests/reference/README.md.

mod common;
use common::*;
use offgas::chem::{solve, Closure, SolverSettings};
use serde_json::Value;

const PH_TOL: f64 = 0.1;
const REL_TOL: f64 = 0.25;

fn golden() -> Value {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/complex_golden.json"
    ))
    .expect("tests/reference/complex_golden.json is present");
    serde_json::from_str(&text).expect("complex_golden.json parses")
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs().max(1e-300)
}

#[test]
fn complexes_agree_with_the_outside_reference() {
    let doc = golden();
    let cases = doc["cases"].as_array().expect("cases");
    assert!(cases.len() >= 12, "at least 12 golden cases");
    let cat = catalog();
    let mut report = Vec::new();
    let mut failures = Vec::new();
    for case in cases {
        let id = case["id"].as_str().unwrap();
        let parts: Vec<(String, f64)> = case["parts_mol_per_l"]
            .as_object()
            .unwrap()
            .iter()
            .map(|(k, v)| (k.clone(), v.as_f64().unwrap()))
            .collect();
        let borrowed: Vec<(&str, f64)> = parts.iter().map(|(k, v)| (k.as_str(), *v)).collect();
        let m = mix(&borrowed, 1.0, 0.0, 25.0, Closure::Open);
        let eq = solve(cat, &m, &SolverSettings::default()).expect("solves");
        assert!(!eq.complexes.is_empty(), "{id}: no complex formed");
        let r = &case["result"];
        let ph_ref = r["ph"].as_f64().unwrap();
        report.push(format!("{id}: pH {:.3} vs {ph_ref:.3}", eq.ph));
        if (eq.ph - ph_ref).abs() > PH_TOL {
            failures.push(format!("{id}: pH {:.3} vs {ph_ref:.3}", eq.ph));
        }
        for (family, species, key) in [
            ("cyanide", 1, "free_cyanide_mol_per_kg"),
            ("ammonia", 1, "free_ammonia_mol_per_kg"),
        ] {
            let Some(fs) = eq.family(cat.family_by_id(family).unwrap()) else {
                continue;
            };
            let ours = fs.concentrations[species];
            let theirs = r[key].as_f64().unwrap();
            report.push(format!("{id}: {key} {ours:.3e} vs {theirs:.3e}"));
            if rel(ours, theirs) > REL_TOL {
                failures.push(format!("{id}: {key} {ours:.3e} vs {theirs:.3e}"));
            }
        }
        for (gas, atm) in r["gases_atm"].as_object().unwrap() {
            let theirs = atm.as_f64().unwrap();
            let ours = eq
                .gases
                .iter()
                .find(|g| g.gas.as_str() == gas)
                .map(|g| g.partial_pressure_pa / cat.physical.p_std)
                .expect("the gas is reported");
            report.push(format!("{id}: {gas} {ours:.3e} vs {theirs:.3e} atm"));
            if rel(ours, theirs) > REL_TOL {
                failures.push(format!("{id}: {gas} {ours:.3e} vs {theirs:.3e} atm"));
            }
        }
    }
    println!("{}", report.join("\n"));
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}
