//! Scenario tests with the expected value derived by hand in each comment, from the
//! constants the data files cite (so a wrong constant fails the constants tests, and a
//! wrong computation fails these).

mod common;
use common::*;
use offgas::chem::{solve, Closure, SolverSettings};

fn settings() -> SolverSettings {
    SolverSettings::default()
}

fn gas_pa(eq: &offgas::chem::Equilibrium, gas: &str) -> f64 {
    eq.gases
        .iter()
        .find(|g| g.gas == gas)
        .map(|g| g.partial_pressure_pa)
        .unwrap_or(0.0)
}

#[test]
fn pure_water_is_neutral_at_half_pkw() {
    // [H+] = [OH-] and γ(H+) = γ(OH-), so a(H+) = √Kw: pH = pKw/2 = 13.995/2 (Harned & Robinson).
    let eq = solve(
        catalog(),
        &mix(&[], 1.0, 0.0, 25.0, Closure::Sealed),
        &settings(),
    )
    .unwrap();
    assert!((eq.ph - pkw25() / 2.0).abs() < 1e-6, "pH {}", eq.ph);
}

#[test]
fn dilute_hydrochloric_acid() {
    // 0.01 M HCl is fully dissociated: [H+] = 0.01, I = 0.01.
    // pH = −log(0.01 γ), log γ by Davies at I = 0.01 → pH ≈ 2.045.
    let eq = solve(
        catalog(),
        &mix(&[("chloride", 0.01)], 1.0, 0.0, 25.0, Closure::Sealed),
        &settings(),
    )
    .unwrap();
    let expected = 2.0 - davies_log_gamma1(0.01, 25.0);
    assert!(
        (eq.ph - expected).abs() < 2e-3,
        "pH {} expected {expected}",
        eq.ph
    );
    assert!((eq.ionic_strength - 0.01).abs() < 1e-4);
}

#[test]
fn sodium_acetate_solution_is_weakly_basic() {
    // 0.1 M NaOAc: proton condition [HOAc] = [OH-].
    // [HOAc] = a_H [OAc-] γ1 / Ka, [OH-] = Kw / (a_H γ1), [OAc-] ≈ C.
    // → a_H² = Kw Ka / (C γ1²) → pH = ½(pKw + pKa + log C) + log γ1, γ1 at I = 0.1.
    let c = 0.1;
    let eq = solve(
        catalog(),
        &mix(&[("acetate", c), ("Na+", c)], 1.0, 0.0, 25.0, Closure::Open),
        &settings(),
    )
    .unwrap();
    let expected = 0.5 * (pkw25() + pka("acetate", 0) + c.log10()) + davies_log_gamma1(0.1, 25.0);
    assert!(
        (eq.ph - expected).abs() < 5e-3,
        "pH {} expected {expected}",
        eq.ph
    );
}

#[test]
fn equimolar_acetate_buffer_sits_at_pka_plus_activity_term() {
    // 0.05 M HOAc + 0.05 M NaOAc: a_H = Ka [HOAc] / ([OAc-] γ1) with [HOAc] = [OAc-],
    // so pH = pKa + log γ1 at I = 0.05.
    let eq = solve(
        catalog(),
        &mix(
            &[("acetate", 0.10), ("Na+", 0.05)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &settings(),
    )
    .unwrap();
    let expected = pka("acetate", 0) + davies_log_gamma1(0.05, 25.0);
    assert!(
        (eq.ph - expected).abs() < 5e-3,
        "pH {} expected {expected}",
        eq.ph
    );
}

#[test]
fn buffer_holds_its_ph_against_a_little_strong_acid() {
    // Henderson–Hasselbalch: adding 0.005 M HCl to the buffer above moves
    // log([OAc-]/[HOAc]) from 0 to log(0.045/0.055) = −0.087.
    let before = solve(
        catalog(),
        &mix(
            &[("acetate", 0.10), ("Na+", 0.05)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &settings(),
    )
    .unwrap();
    let after = solve(
        catalog(),
        &mix(
            &[("acetate", 0.10), ("Na+", 0.05), ("chloride", 0.005)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &settings(),
    )
    .unwrap();
    let shift = after.ph - before.ph;
    assert!(
        (shift - (0.045f64 / 0.055).log10()).abs() < 0.01,
        "shift {shift}"
    );
    assert!(shift.abs() < 0.1);
}

#[test]
fn acidified_sulfide_fills_the_headspace_by_henrys_law() {
    // 1 L of 0.01 M NaHS with 0.02 M HCl (excess acid: pH ≈ 2, α(H2S) ≈ 1) in a sealed vessel
    // with 1 L of headspace. Mass balance N = C V_l + p V_g / RT with p = C / Hcp:
    // C = N / (V_l + V_g / (Hcp R T)), p = C / Hcp (SI units, C in mol/m3).
    let (h, _) = hcp("sulfide");
    let n = 0.01;
    let (vl, vg) = (1e-3, 1e-3);
    let c = n / (vl + vg / (h * R * 298.15));
    let expected = c / h;
    let eq = solve(
        catalog(),
        &mix(
            &[("sulfide", 0.01), ("Na+", 0.01), ("chloride", 0.02)],
            1.0,
            1.0,
            25.0,
            Closure::Sealed,
        ),
        &settings(),
    )
    .unwrap();
    let p = gas_pa(&eq, "H2S");
    assert!(eq.ph < 2.3, "pH {}", eq.ph);
    assert!(
        (p / expected - 1.0).abs() < 2e-3,
        "p {p} expected {expected}"
    );
    // Mass balance: what is dissolved plus what is in the gas is what was put in.
    let fam = eq
        .families
        .iter()
        .find(|f| f.family == catalog().family_by_id("sulfide").unwrap())
        .unwrap();
    let dissolved: f64 = fam.concentrations.iter().sum::<f64>() * 1.0;
    let in_gas = eq
        .gases
        .iter()
        .find(|g| g.gas == "H2S")
        .unwrap()
        .moles_in_gas;
    assert!((dissolved + in_gas - 0.01).abs() < 1e-10);
}

#[test]
fn cyanide_in_alkali_stays_in_solution() {
    // 0.04 M NaCN with 0.05 M NaOH: pH ≈ 12.6, α(HCN) = 1/(1 + 10^(pH − pKa)) ≈ 10^-3.4,
    // so p(HCN) = α C / Hcp is about 10^-3.4 × 40 / 0.089 Pa ≈ 0.18 Pa (≈ 1.8 ppm), open vessel.
    let eq = solve(
        catalog(),
        &mix(
            &[("cyanide", 0.04), ("Na+", 0.09)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &settings(),
    )
    .unwrap();
    let (h, _) = hcp("cyanide");
    // Check the relation itself at the computed pH, with activity of CN- by Davies.
    let g1 = 10f64.powf(davies_log_gamma1(eq.ionic_strength, 25.0));
    let a_h = 10f64.powf(-eq.ph);
    let ratio = a_h * g1 / 10f64.powf(-pka("cyanide", 0)); // [HCN]/[CN-]
    let hcn = 0.04 * ratio / (1.0 + ratio);
    let expected = hcn * 1e3 / h;
    let p = gas_pa(&eq, "HCN");
    assert!(
        (p / expected - 1.0).abs() < 1e-3,
        "p {p} expected {expected}"
    );
    assert!(eq.ph > 12.4 && eq.ph < 12.8, "pH {}", eq.ph);
    assert!(p < 0.5);
}

#[test]
fn ammonia_solution_ph_and_vapour() {
    // 0.1 M NH3 in water: [OH-] ≈ √(Kb C), Kb = Kw/Ka(NH4+) → pH ≈ 11.1 (ideal 11.12; activity
    // corrections are tiny at I ≈ 0.0013). p(NH3) = [NH3] / Hcp with [NH3] = C − [NH4+].
    let eq = solve(
        catalog(),
        &mix(&[("ammonia", 0.1)], 1.0, 0.0, 25.0, Closure::Open),
        &settings(),
    )
    .unwrap();
    let kb = 10f64.powf(-(pkw25() - pka("ammonia", 0)));
    let oh = (kb * 0.1f64).sqrt();
    let expected_ph = pkw25() + oh.log10();
    assert!(
        (eq.ph - expected_ph).abs() < 0.01,
        "pH {} expected {expected_ph}",
        eq.ph
    );
    let (h, _) = hcp("ammonia");
    let expected_p = (0.1 - oh) * 1e3 / h;
    assert!((gas_pa(&eq, "NH3") / expected_p - 1.0).abs() < 0.01);
}

#[test]
fn strong_acid_meets_strong_base_at_neutral() {
    // 0.05 M NaCl after equal HCl and NaOH: [H+] = [OH-] → a_H = √Kw whatever γ is.
    let eq = solve(
        catalog(),
        &mix(
            &[("chloride", 0.05), ("Na+", 0.05)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &settings(),
    )
    .unwrap();
    assert!((eq.ph - pkw25() / 2.0).abs() < 1e-3, "pH {}", eq.ph);
}

#[test]
fn bicarbonate_and_acid_pressurise_a_sealed_bottle() {
    // 0.5 L of 0.1 M NaHCO3 + 0.1 M HCl in a 1 L bottle (0.5 L headspace). At the end pH ≈ 4,
    // so CO2(aq) carries almost all carbonate: C = N / (V_l + V_g/(Hcp R T)), p = C / Hcp.
    let (h, _) = hcp("carbonate");
    let n = 0.05;
    let (vl, vg) = (0.5e-3, 0.5e-3);
    let c = n / (vl + vg / (h * R * 298.15));
    let expected = c / h;
    let eq = solve(
        catalog(),
        &mix(
            &[("carbonate", 0.1), ("Na+", 0.1), ("chloride", 0.1)],
            0.5,
            0.5,
            25.0,
            Closure::Sealed,
        ),
        &settings(),
    )
    .unwrap();
    let p = gas_pa(&eq, "CO2");
    assert!(
        (p / expected - 1.0).abs() < 0.01,
        "p {p} expected {expected}"
    );
    assert!(
        p > 100e3,
        "a litre bottle holds over one atmosphere of CO2 above air: {p} Pa"
    );
}

#[test]
fn warmer_acidified_cyanide_gives_more_hcn_as_vant_hoff_says() {
    // Excess acid: all cyanide is HCN, open vessel so p = C / Hcp(T) and
    // p(40 °C)/p(10 °C) = Hcp(10)/Hcp(40) = exp(B (1/283.15 − 1/313.15)).
    let (_, b) = hcp("cyanide");
    let m = |t| {
        mix(
            &[("cyanide", 0.01), ("Na+", 0.01), ("chloride", 0.05)],
            1.0,
            0.0,
            t,
            Closure::Open,
        )
    };
    let p10 = gas_pa(&solve(catalog(), &m(10.0), &settings()).unwrap(), "HCN");
    let p40 = gas_pa(&solve(catalog(), &m(40.0), &settings()).unwrap(), "HCN");
    let expected = (b * (1.0 / 283.15 - 1.0 / 313.15)).exp();
    assert!(
        (p40 / p10 / expected - 1.0).abs() < 1e-3,
        "ratio {} expected {expected}",
        p40 / p10
    );
}

#[test]
fn acetic_acid_solution() {
    // 0.1 M acetic acid: a(H+) = a(OAc-) (γ equal for both ions), so
    // a_H² = Ka [HOAc] = Ka (C − [H+]) → a_H = √(Ka (C − a_H/γ)), ≈ 2.88.
    // A few fixed-point rounds with γ from I = [H+] settle it.
    let eq = solve(
        catalog(),
        &mix(&[("acetate", 0.1)], 1.0, 0.0, 25.0, Closure::Open),
        &settings(),
    )
    .unwrap();
    let ka = 10f64.powf(-pka("acetate", 0));
    let mut a = (ka * 0.1f64).sqrt();
    for _ in 0..20 {
        let g = 10f64.powf(davies_log_gamma1(a, 25.0));
        a = (ka * (0.1 - a / g)).sqrt();
    }
    let expected = -a.log10();
    assert!(
        (eq.ph - expected).abs() < 2e-3,
        "pH {} expected {expected}",
        eq.ph
    );
}

#[test]
fn ionic_strength_past_the_activity_models_range_is_flagged() {
    // 2 M sodium acetate: acetate has no ion-interaction parameters, so the mixture rests on
    // the extended Debye–Hückel form, taken to hold to 1 mol/kg: past it.
    let eq = solve(
        catalog(),
        &mix(
            &[("acetate", 2.0), ("Na+", 2.0)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &settings(),
    )
    .unwrap();
    assert!(eq.activity_limited, "{eq:?}");
    assert!((eq.activity_range - 1.0).abs() < 1e-12);
    // 1 M NaCl with a little HCl lies within the 6 mol/kg the NaCl and HCl parameters were
    // fitted to: the model for concentrated solutions holds there.
    let eq = solve(
        catalog(),
        &mix(
            &[("chloride", 1.1), ("Na+", 1.0)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &settings(),
    )
    .unwrap();
    assert_eq!(
        eq.activity_model,
        offgas::chem::ActivityModelUsed::IonInteraction
    );
    assert!(!eq.activity_limited, "{eq:?}");
    assert!(eq.activity_range >= 6.0);
    // Dilute: Davies.
    let eq = solve(
        catalog(),
        &mix(
            &[("chloride", 0.05), ("Na+", 0.05)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &settings(),
    )
    .unwrap();
    assert_eq!(eq.activity_model, offgas::chem::ActivityModelUsed::Davies);
    assert!(!eq.activity_limited);
}

#[test]
fn solver_effort_is_small() {
    // Not a timing test: the number of charge-balance evaluations for a busy mixture stays
    // modest, which is what keeps a solve in microseconds.
    let m = mix(
        &[
            ("cyanide", 0.01),
            ("sulfide", 0.005),
            ("ammonia", 0.05),
            ("carbonate", 0.02),
            ("sulfite", 0.01),
            ("fluoride", 0.01),
            ("acetate", 0.05),
            ("phosphate", 0.02),
            ("citrate", 0.01),
            ("chloride", 0.2),
            ("sulfate", 0.05),
            ("borate", 0.01),
            ("Na+", 0.3),
        ],
        10.0,
        10.0,
        22.0,
        Closure::Sealed,
    );
    let eq = solve(catalog(), &m, &settings()).unwrap();
    assert!(eq.iterations < 60, "iterations {}", eq.iterations);
    eprintln!("iterations {}", eq.iterations);
}
