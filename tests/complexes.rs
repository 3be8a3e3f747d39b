//! Metal complexes: the computation against closed forms for one metal with one ligand, key
//! constants against published tables, and what the complexes change for the gas.

mod common;
use common::*;
use offgas::catalog::complexes::Part;
use offgas::catalog::Catalog;
use offgas::chem::{solve, Closure, SolverSettings};

fn beta(formula: &str) -> f64 {
    catalog()
        .complexes
        .iter()
        .find(|c| c.formula == formula)
        .unwrap_or_else(|| panic!("complex {formula} is listed"))
        .log_beta
}

/// A catalog whose only complex is `entry` (one line of data/complexes.yaml).
fn catalog_with_only(entry: &str) -> Catalog {
    let text = offgas::embedded::COMPLEXES;
    let head = text.split("\ncomplexes:\n").next().unwrap();
    let tail = text.split("\ninert:\n").nth(1).unwrap();
    let inert = tail.split("\nsolids:\n").next().unwrap();
    let only = format!("{head}\ncomplexes:\n{entry}\n\ninert:\n{inert}\nsolids: []\n");
    let mut src = offgas::embedded::sources();
    src.complexes = ("data/complexes.yaml", &only);
    Catalog::load(src).expect("the one-complex catalog loads")
}

/// Ag+ + NH3 = Ag(NH3)+ alone: at the solver's pH the complex is the smaller root of
/// y = K α (a − y)(b − y), with α the free ammonia's share in NH3 (NH4+ ⇌ NH3 + H+ with Davies
/// coefficients). The complex and Ag+ carry the same charge, so K needs no activity factor.
#[test]
fn one_metal_one_ligand_matches_the_closed_form() {
    for (t_c, dh) in [(25.0, None), (40.0, Some(-20.0))] {
        let dh_text = dh.map_or(String::new(), |d: f64| format!(", dh: {d}"));
        let cat = catalog_with_only(&format!(
            "  - {{ formula: \"Ag(NH3)+\", metal: \"Ag+\", ligand: \"NH3\", n: 1, charge: 1, log_beta: 3.31{dh_text}, source: martell-smith }}"
        ));
        let (a, b) = (2e-3, 5e-3);
        let mut m = offgas::chem::Mixture::empty(t_c + 273.15, Closure::Open);
        m.add_ion(cat.ion_by_formula("Ag+").unwrap(), a);
        m.add_ion(cat.ion_by_formula("ClO4-").unwrap(), a);
        m.add_family(cat.family_by_id("ammonia").unwrap(), b);
        m.liquid_l = 1.0;
        let eq = solve(&cat, &m, &SolverSettings::default()).unwrap();
        let t_k = t_c + 273.15;
        let k =
            10f64.powf(3.31) * (-dh.unwrap_or(0.0) * 1e3 / R * (1.0 / t_k - 1.0 / 298.15)).exp();
        let fam = cat.family(cat.family_by_id("ammonia").unwrap());
        let step = &fam.steps[0];
        let ka = 10f64.powf(-step.pka) * (-step.dh * 1e3 / R * (1.0 / t_k - 1.0 / 298.15)).exp();
        let gamma1 = 10f64.powf(davies_log_gamma1(eq.ionic_strength, t_c));
        let x = 10f64.powf(-eq.ph);
        let ratio = ka * gamma1 / x; // [NH3]/[NH4+]
        let alpha = ratio / (1.0 + ratio);
        let ka_ = k * alpha;
        let s = ka_ * (a + b) + 1.0;
        let y = (s - (s * s - 4.0 * ka_ * ka_ * a * b).sqrt()) / (2.0 * ka_);
        let ours = eq.complexes[0].concentration;
        assert!(
            ((ours - y) / y).abs() < 1e-6,
            "{t_c} °C: Ag(NH3)+ {ours:e} vs closed form {y:e}"
        );
        // And the ligand's free share is the rest of its total.
        let free: f64 = eq.families[0].concentrations.iter().sum();
        assert!(((free + ours - b) / b).abs() < 1e-9);
    }
}

/// Overall constants against Martell & Smith's Critical Stability Constants (I = 0, 25 °C),
/// as tabulated in Harvey's Analytical Chemistry 2.1 appendix (page read): stepwise log K
/// summed here.
#[test]
fn key_constants_match_critical_stability_constants() {
    let sum = |ks: &[f64]| ks.iter().sum::<f64>();
    let published = [
        ("Ag(CN)2-", 20.48),
        ("Zn(CN)4^2-", sum(&[11.07, 4.98, 3.57])),
        ("Cd(CN)4^2-", sum(&[6.01, 5.11, 4.53, 2.27])),
        ("Hg(CN)2", sum(&[17.00, 15.75])),
        ("Hg(CN)4^2-", sum(&[17.00, 15.75, 3.56, 2.66])),
        ("Ni(CN)4^2-", 30.22),
        ("Ag(NH3)2+", sum(&[3.31, 3.91])),
        ("Cu(NH3)4^2+", sum(&[4.04, 3.43, 2.80, 1.48])),
        ("Ni(NH3)6^2+", sum(&[2.72, 2.17, 1.66, 1.12, 0.67, -0.03])),
        ("Zn(NH3)4^2+", sum(&[2.21, 2.29, 2.36, 2.03])),
        ("Cd(NH3)4^2+", sum(&[2.55, 2.01, 1.34, 0.84])),
    ];
    for (formula, value) in published {
        assert!(
            (beta(formula) - value).abs() < 0.03,
            "{formula}: {} vs published {value}",
            beta(formula)
        );
    }
    // The same table gives Cu-EDTA as 18.80 at I = 0.1 (20 °C); the I = 0 value here, carried
    // to I = 0.1 with Davies (Cu2+, Y4- and CuY2-: z² sum 4 + 16 − 4), lands on it.
    let shift = 16.0 * davies_log_gamma1(0.1, 20.0);
    assert!((beta("CuY^2-") + shift - 18.80).abs() < 0.15);
    // Hexacyanoferrates: inert, counted as they are, with the published constants for reference.
    for (formula, value) in [("Fe(CN)6^4-", 35.4), ("Fe(CN)6^3-", 43.6)] {
        let cat = catalog();
        let ion = cat.ion_by_formula(formula).unwrap();
        let inert = cat.inert_complexes.iter().find(|c| c.ion == ion).unwrap();
        assert_eq!(inert.log_beta, Some(value));
    }
}

/// A copper cyanide rinse holds most of its cyanide on copper: far less HCN than the same
/// cyanide as sodium cyanide, and the complexes account for the rest of the total.
#[test]
fn copper_holds_cyanide_and_lowers_hcn() {
    let cat = catalog();
    let rinse = mix(
        &[("Cu+", 0.01), ("cyanide", 0.03), ("Na+", 0.02)],
        1.0,
        0.2,
        25.0,
        Closure::Sealed,
    );
    let free = mix(
        &[("cyanide", 0.03), ("Na+", 0.03)],
        1.0,
        0.2,
        25.0,
        Closure::Sealed,
    );
    let e1 = solve(cat, &rinse, &SolverSettings::default()).unwrap();
    let e2 = solve(cat, &free, &SolverSettings::default()).unwrap();
    let hcn = |e: &offgas::chem::Equilibrium| e.gases[0].partial_pressure_pa;
    assert!(hcn(&e1) < 0.2 * hcn(&e2), "{} vs {}", hcn(&e1), hcn(&e2));
    let cyanide = cat.family_by_id("cyanide").unwrap();
    let bound = e1.family_bound_mol_per_l(cat, cyanide);
    assert!(bound > 0.9 * 0.03, "bound {bound}");
    let copper = e1.bound_mol_per_l(cat, Part::Ion(cat.ion_by_formula("Cu+").unwrap()));
    assert!((copper - 0.01).abs() < 1e-6, "copper bound {copper}");
}

/// Iron(II) and cyanide do not become ferrocyanide in the computation (the inert complexes
/// are counted only as the strong ions a substance gives), so free cyanide stays free.
#[test]
fn inert_complexes_are_not_formed() {
    let cat = catalog();
    let m = mix(
        &[("iron2", 0.001), ("cyanide", 0.006), ("Na+", 0.004)],
        1.0,
        0.0,
        25.0,
        Closure::Open,
    );
    let eq = solve(cat, &m, &SolverSettings::default()).unwrap();
    assert!(eq.complexes.iter().all(|c| !c.formula.contains("CN")));
}

#[test]
fn a_complex_with_an_unknown_metal_is_named_at_its_line() {
    let text = offgas::embedded::COMPLEXES.replacen(
        "metal: \"Cu+\", ligand: \"CN-\", n: 2",
        "metal: \"Xq+\", ligand: \"CN-\", n: 2",
        1,
    );
    let line = text
        .lines()
        .position(|l| l.contains("Xq+"))
        .expect("edited")
        + 1;
    let mut src = offgas::embedded::sources();
    src.complexes = ("data/complexes.yaml", &text);
    let shown = Catalog::load(src).err().expect("refused").to_string();
    assert!(
        shown.starts_with(&format!("data/complexes.yaml:{line}: ")),
        "{shown}"
    );
    assert!(shown.contains("Xq+"), "{shown}");
}

/// The report says what holds the cyanide, in the JSON and in the terminal text, and names a
/// hydroxide that precipitates.
#[test]
fn the_report_says_what_holds_the_ligand_and_what_would_precipitate() {
    let acid = "name: acid\ncapacity: 20 L\nvolume: 5 L\nclosure: sealed\ncontents:\n  - sulfuric acid: 0.1 mol/L\n";
    let rinse = "name: rinse\nvolume: 2 L\ncontents:\n  - copper(I) cyanide: 1.8 g/L\n  - sodium cyanide: 2 g/L\n";
    let r = check_texts(acid, rinse, &Default::default());
    let b = &r.end_state.bound_ligands;
    assert_eq!(b.len(), 1, "{b:?}");
    assert_eq!(b[0].family, "cyanide");
    assert_eq!(b[0].species, "CN-");
    // 0.0201 mol/L of Cu+ keeps two cyanides each of 0.0609 mol/L: at most two thirds are
    // held (a little Cu+ is free at pH 1.3, and the total counts the HCN in the headspace).
    assert!(
        (60.0..66.1).contains(&b[0].bound_percent),
        "{}",
        b[0].bound_percent
    );
    assert_eq!(b[0].held_by[0].complex, "Cu(CN)2-");
    assert_eq!(b[0].held_by[0].metal, "Cu+");
    let json = serde_json::to_value(&r).unwrap();
    assert!(json["end_state"]["bound_ligands"][0]["held_by"][0]["percent"].is_number());
    let text = offgas::output::render::check_table(
        &r,
        offgas::output::render::View {
            color: false,
            all_pairs: false,
            charset: offgas::output::plot::spark::Charset::Unicode,
        },
    );
    let line = format!("cyanide {:.0} % held by metals", b[0].bound_percent);
    assert!(text.contains(&line), "{text}");
    // A proton takes a cyanide from the complexes in the pair table.
    assert!(r
        .pairs
        .iter()
        .any(|p| p.acceptor == "Cu(CN)3^2-" && p.produced_acid == "HCN + Cu(CN)2-"));

    let copper = "name: copper\ncapacity: 5 L\nvolume: 2 L\nclosure: sealed\ncontents:\n  - copper(ii) sulfate pentahydrate: 5 g/L\n";
    let caustic = "name: caustic\nvolume: 0.5 L\ncontents:\n  - sodium hydroxide: 0.2 mol/L\n";
    let r = check_texts(copper, caustic, &Default::default());
    let s = &r.end_state.precipitated;
    assert_eq!(s.len(), 1, "{s:?}");
    assert_eq!(s[0].solid, "Cu(OH)2");
    // 0.016 mol/L of copper in 2.5 L, nearly all of it precipitated.
    assert!((s[0].mol_per_l - 0.016).abs() < 0.001, "{}", s[0].mol_per_l);
}
