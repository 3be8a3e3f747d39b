//! offgas against PHREEQC: the golden cases in tests/reference/golden.json were computed by
//! PHREEQC (see tests/reference/make_golden.py and README.md there). This test runs the
//! same mixtures through offgas and holds it to the tolerances of the reference check:
//! pH within 0.05 up to I = 0.1 mol/L and within 0.15 up to 0.5 mol/L; each gas's partial
//! pressure within 15 % or 0.05 in log10. Where offgas's constants differ from the
//! database's, the case names the differences and the comparison is with the PHREEQC run
//! that has offgas's constants loaded.

mod common;
use common::catalog;
use offgas::chem::{solve, Closure, Mixture, SolverSettings};
use serde_json::Value;
use std::collections::BTreeSet;

fn golden() -> Value {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/golden.json");
    let text = std::fs::read_to_string(path)
        .unwrap_or_else(|e| panic!("{path} is missing ({e}); run tests/reference/make_golden.py"));
    serde_json::from_str(&text).expect("golden.json is JSON")
}

/// The dilute cases. Those with an `activity_model` of "pitzer" or "sit" (concentrated
/// solutions, entered per kg of water) are checked by tests/reference_concentrated.rs.
fn dilute_cases(g: &Value) -> Vec<&Value> {
    g["cases"]
        .as_array()
        .expect("cases")
        .iter()
        .filter(|c| !matches!(c["activity_model"].as_str(), Some("pitzer" | "sit")))
        .collect()
}

fn mixture(case: &Value) -> Mixture {
    let cat = catalog();
    let liquid = case["liquid_l"].as_f64().unwrap();
    let t_c = case["temperature_c"].as_f64().unwrap();
    let mut m = Mixture::empty(t_c + 273.15, Closure::Sealed);
    for (f, c) in case["families"].as_object().unwrap() {
        let id = cat
            .family_by_id(f)
            .unwrap_or_else(|| panic!("unknown family {f}"));
        m.add_family(id, c.as_f64().unwrap() * liquid);
    }
    for (i, c) in case["ions"].as_object().unwrap() {
        let id = cat
            .ion_by_formula(i)
            .unwrap_or_else(|| panic!("unknown ion {i}"));
        m.add_ion(id, c.as_f64().unwrap() * liquid);
    }
    m.liquid_l = liquid;
    m.headspace_l = case["headspace_l"].as_f64().unwrap();
    m
}

/// Partial pressures below this (atm) are below anything offgas reports on.
const GAS_FLOOR_ATM: f64 = 1e-9;

#[test]
fn offgas_matches_phreeqc_on_every_golden_case() {
    let g = golden();
    let cases = dilute_cases(&g);
    assert!(cases.len() >= 25, "only {} golden cases", cases.len());
    let cat = catalog();
    let mut failures = Vec::new();
    let mut gases_seen = BTreeSet::new();
    for case in cases {
        let id = case["id"].as_str().unwrap();
        let which = case["reference"].as_str().unwrap();
        let reference = &case[format!("{which}_result")];
        assert!(reference.is_object(), "{id}: no {which}_result");
        let eq = solve(cat, &mixture(case), &SolverSettings::default())
            .unwrap_or_else(|e| panic!("{id}: offgas failed: {e}"));
        let ref_i = reference["ionic_strength"].as_f64().unwrap();
        let ref_ph = reference["ph"].as_f64().unwrap();
        let tol = if ref_i <= 0.1 { 0.05 } else { 0.15 };
        let line = format!(
            "{id} [{which}] pH offgas {:.3} reference {:.3} (I {:.3})",
            eq.ph, ref_ph, ref_i
        );
        eprintln!("{line}");
        if (eq.ph - ref_ph).abs() > tol {
            failures.push(format!("{line}: beyond {tol}"));
        }
        for (gas, p_ref) in reference["gases_atm"].as_object().unwrap() {
            let p_ref = p_ref.as_f64().unwrap();
            if p_ref < GAS_FLOOR_ATM {
                continue;
            }
            gases_seen.insert(gas.clone());
            let p = eq
                .gases
                .iter()
                .find(|x| &x.gas == gas)
                .map(|x| x.partial_pressure_pa / cat.physical.p_std)
                .unwrap_or(0.0);
            let rel = (p / p_ref - 1.0).abs();
            let dlog = (p.max(1e-300).log10() - p_ref.log10()).abs();
            eprintln!(
                "    {gas}: offgas {p:.4e} atm, reference {p_ref:.4e} atm ({:+.1} %)",
                (p / p_ref - 1.0) * 100.0
            );
            if rel > 0.15 && dlog > 0.05 {
                failures.push(format!(
                    "{id} [{which}] {gas}: offgas {p:.4e} vs {p_ref:.4e} atm"
                ));
            }
        }
    }
    for needed in ["H2S", "NH3", "CO2", "SO2", "HF", "HCN"] {
        assert!(
            gases_seen.contains(needed),
            "no golden case exercises {needed}"
        );
    }
    assert!(
        failures.is_empty(),
        "outside tolerance:\n{}",
        failures.join("\n")
    );
}

#[test]
fn cases_whose_constants_differ_say_so_and_use_offgas_constants() {
    let g = golden();
    for case in dilute_cases(&g) {
        let id = case["id"].as_str().unwrap();
        let agree = case["constants_agree"].as_bool().unwrap();
        let diffs = case["differences"].as_array().unwrap();
        let reference = case["reference"].as_str().unwrap();
        if agree {
            assert_eq!(reference, "database", "{id}");
        } else {
            assert_eq!(reference, "offgas_constants", "{id}");
            assert!(
                !diffs.is_empty(),
                "{id}: constants differ but no difference is named"
            );
        }
    }
}

#[test]
fn the_golden_file_records_its_reference() {
    let g = golden();
    let text = g.to_string();
    assert!(text.contains("phreeqc"), "the golden file names PHREEQC");
    for case in g["cases"].as_array().unwrap() {
        assert!(
            case["database"].is_string(),
            "{}: no database named",
            case["id"]
        );
    }
}
