//! The computed products of two rules: chlorine over acidified bleach (checked against a
//! hand derivation from the constants data/combined.yaml cites) and hydrogen from a hydride
//! (stoichiometry and the ideal gas law).

mod common;
use common::*;
use offgas::check::{check, CheckOptions};
use offgas::chem::{solve, Closure, SolverSettings};
use offgas::pour::batch::Batch;
use offgas::report::Severity;

fn combined_constants() -> (f64, f64, f64) {
    let c = &catalog().combined[0].data;
    assert_eq!(c.formula, "Cl2");
    let v = c.volatile.as_ref().unwrap();
    (10f64.powf(-c.log_k_formation), v.hcp, v.hcp_b)
}

#[test]
fn chlorine_over_acidified_bleach_matches_the_hand_derivation() {
    // 1 mM NaOCl in 0.1 M HCl, open vessel (no depletion), 25 °C.
    // HOCl is the only hypochlorite form at pH 1 (pKa 7.5). With f the share of it turned
    // into Cl2:  K_h = [HOCl] a(H+) γ1 [Cl-] / [Cl2]  →  f/(1−f) = a(H+) γ1 [Cl-] / K_h,
    // where [Cl-] = 0.1 − 0.001 f and [H+] = 0.1 − 0.001 − 0.001 f (NaOCl takes one proton
    // to HOCl, chlorine formation one more). γ1 by Davies at I ≈ 0.1.
    // p(Cl2) = [Cl2] / Hcp, [Cl2] = 0.001 f mol/L.
    let (k_h, hcp, _) = combined_constants();
    let mut f = 0.5;
    let mut ionic = 0.1;
    for _ in 0..50 {
        let g1 = 10f64.powf(davies_log_gamma1(ionic, 25.0));
        let h = 0.1 - 0.001 - 0.001 * f;
        let cl = 0.1 - 0.001 * f;
        let r = g1 * h * g1 * cl / k_h;
        f = r / (1.0 + r);
        ionic = 0.5 * (h + cl + 0.001);
    }
    let expected_pa = 0.001 * f * 1e3 / hcp;
    let m = mix(
        &[("hypochlorite", 0.001), ("Na+", 0.001), ("chloride", 0.1)],
        1.0,
        0.0,
        25.0,
        Closure::Open,
    );
    let eq = solve(catalog(), &m, &SolverSettings::default()).unwrap();
    let p = eq
        .gases
        .iter()
        .find(|g| g.gas == "Cl2")
        .expect("Cl2 computed")
        .partial_pressure_pa;
    assert!(
        (p / expected_pa - 1.0).abs() < 0.01,
        "p(Cl2) {p} Pa, hand {expected_pa} Pa (f = {f})"
    );
    assert!(f > 0.9, "in 0.1 M HCl most HOCl is chlorine: f = {f}");
}

#[test]
fn alkaline_bleach_holds_no_chlorine() {
    // 0.5 M NaOCl + 0.5 M NaCl + 0.02 M NaOH: at pH 12, a(H+) = 1e-12, so
    // [Cl2]/[HOCl] ≈ 1e-12 × 0.5 / K_h ≈ 1e-9, and HOCl itself is a 3e-5 share of
    // hypochlorite: chlorine is far below anything that matters.
    let m = mix(
        &[("hypochlorite", 0.5), ("Na+", 1.02), ("chloride", 0.5)],
        1.0,
        1.0,
        25.0,
        Closure::Sealed,
    );
    let eq = solve(catalog(), &m, &SolverSettings::default()).unwrap();
    let p = eq
        .gases
        .iter()
        .find(|g| g.gas == "Cl2")
        .map(|g| g.partial_pressure_pa)
        .unwrap_or(0.0);
    assert!(eq.ph > 11.0, "pH {}", eq.ph);
    assert!(p / 101325.0 * 1e6 < 1e-3, "Cl2 {} ppm", p / 101325.0 * 1e6);
}

#[test]
fn chlorine_shares_its_moles_with_a_sealed_headspace() {
    // Sealed: the Cl2 that leaves takes moles from both parents; mass balance closes.
    let m = mix(
        &[("hypochlorite", 0.01), ("Na+", 0.01), ("chloride", 0.2)],
        1.0,
        1.0,
        25.0,
        Closure::Sealed,
    );
    let eq = solve(catalog(), &m, &SolverSettings::default()).unwrap();
    let hyp = catalog().family_by_id("hypochlorite").unwrap();
    let fam = eq.families.iter().find(|f| f.family == hyp).unwrap();
    let c = &eq.combined[0];
    let total = fam.concentrations.iter().sum::<f64>() + c.concentration + c.moles_in_gas;
    assert!((total - 0.01).abs() < 1e-12, "{total}");
    assert!(c.moles_in_gas > 0.0);
}

fn batch(text: &str) -> Batch {
    Batch::parse(catalog(), "t.yaml", text).unwrap()
}

#[test]
fn bleach_into_hydrochloric_acid_is_a_stop_with_a_chlorine_figure() {
    let carboy = batch("name: acid\ncapacity: 20 L\nvolume: 5 L\ncontents:\n  - hydrochloric acid, concentrated: 100 mL\n");
    let bleach = batch("name: bleach\nvolume: 1 L\ncontents:\n  - bleach: 50 mL\n");
    let th = offgas::embedded::thresholds().unwrap();
    let rules = offgas::embedded::rules(catalog()).unwrap();
    let r = check(
        catalog(),
        &th,
        &rules,
        &carboy,
        &bleach,
        &CheckOptions::default(),
    )
    .unwrap();
    assert_eq!(r.severity, Severity::Stop);
    let rule = r
        .findings
        .iter()
        .find(|f| f.code == "hypochlorite-with-acid")
        .expect("rule fires");
    assert!(
        rule.message.contains("Computed: Cl2 reaches"),
        "{}",
        rule.message
    );
    assert!(rule.origin.contains("built-in rule") && rule.origin.contains("rules/oxidisers.yaml"));
    assert!(r
        .end_state
        .gases
        .iter()
        .any(|g| g.formula == "Cl2" && g.idlh_ratio.unwrap() > 1.0));
}

#[test]
fn hydride_into_water_gives_the_stoichiometric_hydrogen() {
    // 3.78 g NaBH4 = 0.1 mol → 0.4 mol H2 (NaBH4 + 2 H2O → NaBO2 + 4 H2);
    // at 25 °C and 1 atm that is 0.4 × 8.314 × 298.15 / 101325 m3 = 9.79 L.
    let carboy = batch(
        "name: c\ncapacity: 20 L\nvolume: 10 L\ncontents:\n  - sodium chloride: 0.01 mol/L\n",
    );
    let stream = batch("name: s\nvolume: 1 L\ncontents:\n  - sodium borohydride: 3.783 g\n");
    let th = offgas::embedded::thresholds().unwrap();
    let rules = offgas::embedded::rules(catalog()).unwrap();
    let r = check(
        catalog(),
        &th,
        &rules,
        &carboy,
        &stream,
        &CheckOptions::default(),
    )
    .unwrap();
    let h2 = r
        .stoichiometric_gases
        .iter()
        .find(|g| g.formula == "H2")
        .expect("hydrogen counted");
    assert!((h2.moles - 0.4).abs() < 1e-3, "{}", h2.moles);
    assert!(
        (h2.litres_at_1_atm - 9.79).abs() < 0.02,
        "{}",
        h2.litres_at_1_atm
    );
    assert_eq!(r.severity, Severity::Stop);
    assert!(r
        .findings
        .iter()
        .any(|f| f.code == "flammable-gas-in-headspace"));
}

#[test]
fn zinc_in_neutral_water_releases_nothing_but_in_acid_it_does() {
    let th = offgas::embedded::thresholds().unwrap();
    let rules = offgas::embedded::rules(catalog()).unwrap();
    let stream = batch("name: s\nvolume: 0.1 L\ncontents:\n  - zinc powder: 1 g\n");
    let water =
        batch("name: c\ncapacity: 20 L\nvolume: 5 L\ncontents:\n  - sodium chloride: 0.01 mol/L\n");
    let r = check(
        catalog(),
        &th,
        &rules,
        &water,
        &stream,
        &CheckOptions::default(),
    )
    .unwrap();
    assert!(r.stoichiometric_gases.is_empty());
    let acid =
        batch("name: c\ncapacity: 20 L\nvolume: 5 L\ncontents:\n  - sulfuric acid: 0.5 mol/L\n");
    let r = check(
        catalog(),
        &th,
        &rules,
        &acid,
        &stream,
        &CheckOptions::default(),
    )
    .unwrap();
    let h2 = r
        .stoichiometric_gases
        .iter()
        .find(|g| g.formula == "H2")
        .expect("zinc in acid gives H2");
    // 1 g Zn / 65.38 g/mol = 0.0153 mol → 0.0153 mol H2.
    assert!((h2.moles - 1.0 / 65.38).abs() < 2e-4);
    assert!(r.findings.iter().any(|f| f.code == "metal-with-acid"));
}
