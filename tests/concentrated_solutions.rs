//! The model for concentrated solutions through the solver, against published measurements
//! (tests/fixtures/concentrated/, each table with its source): the pressure over strong
//! hydrochloric acid at 20 and 30 °C, ammonia over aqueous ammonia, the salting-out of CO2 by
//! brine, the mean activity coefficient of HCl to 15 mol/kg; and the hand-over from the
//! dilute model, which must not show as a step.

mod common;
use common::catalog;
use offgas::chem::{solve, ActivityModelUsed, Closure, Equilibrium, Mixture, SolverSettings};
use serde_yaml::Value;

fn fixture(name: &str) -> Value {
    let path = format!(
        "{}/tests/fixtures/concentrated/{name}",
        env!("CARGO_MANIFEST_DIR")
    );
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{path}: {e}"));
    serde_yaml::from_str(&text).unwrap_or_else(|e| panic!("{path}: {e}"))
}

fn num(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v:?}"))
}

/// A mixture of `parts` (mol per kg of water) in `water_kg` of water making `liquid_l`.
fn molal_mix(parts: &[(&str, f64)], water_kg: f64, liquid_l: f64, t_c: f64) -> Mixture {
    let cat = catalog();
    let mut m = Mixture::empty(t_c + 273.15, Closure::Open);
    for &(name, molality) in parts {
        let n = molality * water_kg;
        if let Some(f) = cat.family_by_id(name) {
            m.add_family(f, n);
        } else {
            m.add_ion(cat.ion_by_formula(name).expect(name), n);
        }
    }
    m.liquid_l = liquid_l;
    m.water_kg = Some(water_kg);
    m
}

fn solved(m: &Mixture) -> Equilibrium {
    solve(catalog(), m, &SolverSettings::default()).expect("solves")
}

fn gas_pa(eq: &Equilibrium, gas: &str) -> f64 {
    eq.gases
        .iter()
        .find(|g| g.gas == gas)
        .map_or(0.0, |g| g.partial_pressure_pa)
}

/// Hydrochloric acid of `w` mass % HCl at `t_c`, open: its molality and its solved state.
/// Liquid volume from the density, about 1 + 0.005 w g/mL for w % HCl (memory: within 0.3 %
/// of the CRC Handbook's table from 10 to 36 %); it matters little here.
fn hydrochloric_acid(w: f64, t_c: f64) -> (f64, Equilibrium) {
    let molality = 1000.0 * w / (36.461 * (100.0 - w));
    let mass_kg = 1.0 / (1.0 - w / 100.0);
    let eq = solved(&molal_mix(
        &[("chloride", molality)],
        1.0,
        mass_kg / (1.0 + 0.005 * w),
        t_c,
    ));
    (molality, eq)
}

#[test]
fn the_pressure_over_strong_hydrochloric_acid_matches_the_international_critical_tables() {
    // Total vapour pressure (HCl + water) at 20 °C over 10-36 % acid. The model's: the HCl
    // partial pressure from the ions' activities, plus water's vapour pressure times its
    // activity.
    let f = fixture("hcl_over_hydrochloric_acid.yaml");
    let phys = &catalog().physical;
    let mut worst: f64 = 0.0;
    let mut lines = Vec::new();
    for p in f["total_vapour_pressure_20c"]["points"]
        .as_sequence()
        .unwrap()
    {
        let w = num(&p["hcl_mass_percent"]);
        if w > 36.0 {
            continue;
        }
        // The H+/Cl- parameters are fitted to 15 mol/kg (35.4 %); 36 % lies past it, where the
        // coefficients are held and the state says it is outside the model.
        let (molality, eq) = hydrochloric_acid(w, 20.0);
        assert_eq!(eq.activity_model, ActivityModelUsed::IonInteraction);
        let water_kpa = eq.water_activity * phys.water_vapour_pa(293.15) / 1e3;
        let hcl_kpa = gas_pa(&eq, "HCl") / 1e3;
        let model = water_kpa + hcl_kpa;
        let published = num(&p["pressure"]);
        let dev = model / published - 1.0;
        if molality <= 15.0 {
            worst = worst.max(dev.abs());
            assert!(!eq.activity_limited, "{w} %: within the fit");
        } else {
            assert!(eq.activity_limited, "{w} %: past the fit, and said so");
        }
        lines.push(format!(
            "{w} % ({molality:.2} mol/kg): model {model:.3} kPa (HCl {hcl_kpa:.3}, water {water_kpa:.3}, a_w {:.3}) against {published} kPa: {:+.1} %",
            eq.water_activity,
            100.0 * dev
        ));
    }
    eprintln!("{}", lines.join("\n"));
    assert!(lines.len() >= 5, "{lines:?}");
    assert!(worst < 0.25, "worst deviation {:.1} %", 100.0 * worst);
}

/// mol/kg of dissolved CO2 per atm of CO2 over an acidified NaCl brine at `t_c`.
fn co2_solubility(nacl: f64, t_c: f64) -> f64 {
    // NaCl's apparent molar volume, about 17 cm3/mol (memory), sets the litres; a little
    // HCl keeps the carbonate as CO2.
    let eq = solved(&{
        let mut m = molal_mix(
            &[
                ("Na+", nacl),
                ("chloride", nacl + 1e-3),
                ("carbonate", 1e-3),
            ],
            1.0,
            1.0 / 0.9997 + 0.017 * nacl,
            t_c,
        );
        m.closure = Closure::Sealed;
        m.headspace_l = 0.01;
        m
    });
    let cat = catalog();
    let carbonate = eq.family(cat.family_by_id("carbonate").unwrap()).unwrap();
    let co2_molal = carbonate.concentrations[0] * eq.liquid_l / 1.0;
    let atm = gas_pa(&eq, "CO2") / cat.physical.p_std;
    co2_molal / atm
}

#[test]
fn brine_salts_out_co2_as_measured() {
    // Harned & Davis (1943), 0-10 °C, 0-3 mol/kg NaCl: the solubility in brine over that in
    // water, against the model's ratio (which tests the salting-out alone, not the Henry's
    // law constant): within 10 %.
    let f = fixture("co2_in_nacl_brine.yaml");
    let points = f["harned_davis_1943"]["points"].as_sequence().unwrap();
    let water = |t: f64| {
        points
            .iter()
            .filter(|p| num(&p["t_c"]) == t && num(&p["nacl_molality"]) == 0.0)
            .map(|p| num(&p["s_times_100"]))
            .next()
            .unwrap()
    };
    let (mut worst, mut worst_3m): (f64, f64) = (0.0, 0.0);
    for p in points.iter().filter(|p| num(&p["nacl_molality"]) > 0.0) {
        let (t, m) = (num(&p["t_c"]), num(&p["nacl_molality"]));
        let published = num(&p["s_times_100"]) / water(t);
        let model = co2_solubility(m, t) / co2_solubility(0.0, t);
        let dev = model / published - 1.0;
        eprintln!(
            "{t} °C, {m} mol/kg NaCl: S/S0 model {model:.3}, Harned & Davis {published:.3} ({:+.1} %)",
            100.0 * dev
        );
        if m <= 2.0 {
            worst = worst.max(dev.abs());
        } else {
            worst_3m = worst_3m.max(dev.abs());
        }
    }
    assert!(worst < 0.10, "to 2 mol/kg, worst {:.1} %", 100.0 * worst);
    // At 3 mol/kg and 0-5 °C the method overstates the salting-out by 10-11 % (its gas
    // parameter's temperature term is fitted over 273-313 K): held to 12 %.
    assert!(
        worst_3m < 0.12,
        "at 3 mol/kg, worst {:.1} %",
        100.0 * worst_3m
    );
}

#[test]
fn brine_salts_out_co2_as_measured_at_25_c() {
    // Yasunishi, Tsuji & Sada (1979), 25 °C: Ostwald coefficients (proportional to the molar
    // concentration of CO2 at 1 atm) in NaCl, MgSO4 and their mixtures to 2.3 mol/L, over
    // that in water, against the model's ratio: within 10 %.
    let f = fixture("co2_in_nacl_brine.yaml");
    let table = &f["yasunishi_tsuji_sada_1979"];
    let points = table["points"].as_sequence().unwrap();
    let l0 = points
        .iter()
        .find(|p| num(&p["salt_molarity"]) == 0.0)
        .map(|p| num(&p["ostwald"]))
        .unwrap();
    let molar_per_atm = |c: f64, x: f64| {
        let cat = catalog();
        // Water per litre: NaCl's apparent molar volume about 17 cm3/mol, MgSO4's near zero
        // (memory); it sets only the molalities, not the salting-out.
        let water_kg = 0.997 * (1.0 - 0.017 * c * x);
        let mut m = molal_mix(&[], water_kg, 1.0, 25.0);
        m.closure = Closure::Sealed;
        m.headspace_l = 0.01;
        for (name, n) in [
            ("Na+", c * x),
            ("Mg^2+", c * (1.0 - x)),
            ("chloride", c * x + 1e-3),
            ("sulfate", c * (1.0 - x)),
            ("carbonate", 1e-3),
        ] {
            match cat.family_by_id(name) {
                Some(fid) => m.add_family(fid, n),
                None => m.add_ion(cat.ion_by_formula(name).unwrap(), n),
            }
        }
        let eq = solved(&m);
        let carbonate = eq.family(cat.family_by_id("carbonate").unwrap()).unwrap();
        carbonate.concentrations[0] / (gas_pa(&eq, "CO2") / cat.physical.p_std)
    };
    let (mut worst, mut worst_mgso4): (f64, f64) = (0.0, 0.0);
    for p in points.iter().filter(|p| num(&p["salt_molarity"]) > 0.0) {
        let (c, x) = (num(&p["salt_molarity"]), num(&p["nacl_fraction"]));
        let published = num(&p["ostwald"]) / l0;
        let model = molar_per_atm(c, x) / molar_per_atm(0.0, 1.0);
        let dev = model / published - 1.0;
        eprintln!(
            "25 °C, {c} mol/L salt, NaCl share {x}: L/L0 model {model:.3}, published {published:.3} ({:+.1} %)",
            100.0 * dev
        );
        if x > 0.0 {
            worst = worst.max(dev.abs());
        } else {
            worst_mgso4 = worst_mgso4.max(dev.abs());
        }
    }
    assert!(worst < 0.10, "with NaCl, worst {:.1} %", 100.0 * worst);
    // Pure MgSO4: the method's parameters give a Setschenow constant of 0.247 L/mol against
    // the 0.266 these data imply, 11 % at 2.3 mol/L: held to 12 %.
    assert!(
        worst_mgso4 < 0.12,
        "MgSO4, worst {:.1} %",
        100.0 * worst_mgso4
    );
}

#[test]
fn hcl_mean_activity_coefficients_hold_to_fifteen_mol_per_kg() {
    // Through the solver: γ± of HCl from the pressure of HCl, p = γ±² m² / K, over strong
    // acid alone, against the tables (within 5 %; the fit is within 3.3 %).
    let f = fixture("mean_activity_coefficients.yaml");
    let hcl = f["electrolytes"]
        .as_sequence()
        .unwrap()
        .iter()
        .find(|e| e["electrolyte"] == "HCl")
        .unwrap();
    let cat = catalog();
    let fam = cat.family(cat.family_by_id("chloride").unwrap());
    let (pka, vol) = (fam.steps[0].pka, fam.volatile.as_ref().unwrap());
    // Ka Hcp: mol² kg⁻² per (mol m⁻³ Pa⁻¹) → per Pa, the constant of HCl(g) ⇌ H+ + Cl-.
    let k_per_pa = 10f64.powf(-pka) * vol.hcp / 1e3;
    let mut worst: f64 = 0.0;
    for p in hcl["points"].as_sequence().unwrap() {
        let (m, published) = (num(&p["molality"]), num(&p["gamma"]));
        if m < 0.2 {
            continue; // dilute: the Davies equation, tested elsewhere
        }
        let eq = solved(&molal_mix(&[("chloride", m)], 1.0, 1.0, 25.0));
        let gamma = (gas_pa(&eq, "HCl") * k_per_pa).sqrt() / m;
        let dev = gamma / published - 1.0;
        worst = worst.max(dev.abs());
        eprintln!(
            "{m} mol/kg: γ± {gamma:.3} against {published} ({:+.1} %)",
            100.0 * dev
        );
    }
    assert!(worst < 0.05, "worst {:.1} %", 100.0 * worst);
}

#[test]
fn the_dilute_model_hands_over_without_a_step() {
    // NaCl with a little HCl from 0.05 to 0.4 mol/kg in fine steps: the pH moves smoothly
    // through the hand-over from Davies (below 0.1 mol/kg) to the ion-interaction equations
    // (wholly from 0.2): no step between neighbours beyond what the concentration gives.
    let mut last: Option<f64> = None;
    let mut models = Vec::new();
    for k in 0..=350 {
        let nacl = 0.05 + 0.001 * k as f64;
        let eq = solved(&molal_mix(
            &[("Na+", nacl), ("chloride", nacl + 0.01)],
            1.0,
            1.0,
            25.0,
        ));
        models.push(eq.activity_model);
        if let Some(prev) = last {
            assert!(
                (eq.ph - prev).abs() < 2e-3,
                "step of {:.4} pH at {nacl:.3} mol/kg",
                eq.ph - prev
            );
        }
        last = Some(eq.ph);
    }
    assert_eq!(models[0], ActivityModelUsed::Davies);
    assert_eq!(*models.last().unwrap(), ActivityModelUsed::IonInteraction);
}

#[test]
fn hcl_over_hydrochloric_acid_at_30_c_matches_the_handbook() {
    // The one partial pressure of HCl above 20 °C we could read: 22 % acid at 30 °C. The
    // ion-interaction parameters are for 25 °C; the temperature enters through the Henry's
    // law constant and the equilibrium constants. Limit 25 %.
    let f = fixture("hcl_over_hydrochloric_acid.yaml");
    for p in f["partial_pressure_hcl"]["points"].as_sequence().unwrap() {
        let w = num(&p["hcl_mass_percent"]);
        let t_c = num(&p["temperature"]);
        let (_, eq) = hydrochloric_acid(w, t_c);
        let model = gas_pa(&eq, "HCl") / 133.322;
        let published = num(&p["pressure_mmhg"]);
        let dev = model / published - 1.0;
        eprintln!(
            "{w} % at {t_c} °C: HCl {model:.3} mm Hg against {published}: {:+.1} %",
            100.0 * dev
        );
        assert!(dev.abs() < 0.25, "{w} % at {t_c} °C: {:+.1} %", 100.0 * dev);
    }
}

/// Aqueous ammonia of `w` mass % NH3 at `t_c`, in an open vessel: (p(NH3), p(H2O)) in Pa.
fn over_aqueous_ammonia(w: f64, t_c: f64) -> (f64, f64) {
    let molality = 1000.0 * w / (17.031 * (100.0 - w));
    let mass_kg = 1.0 / (1.0 - w / 100.0);
    // Density about 1 - 0.0042 w g/mL (memory: within 1 % of the handbook tables to 30 %);
    // it matters little here.
    let eq = solved(&molal_mix(
        &[("ammonia", molality)],
        1.0,
        mass_kg / (1.0 - 0.0042 * w),
        t_c,
    ));
    let water = eq.water_activity * catalog().physical.water_vapour_pa(t_c + 273.15);
    (gas_pa(&eq, "NH3"), water)
}

#[test]
fn ammonia_over_aqueous_ammonia_matches_the_published_correlation() {
    // 5-28 % NH3 at 20-40 °C against Clegg & Brimblecombe's fit to the measured partial
    // pressures. Limit 20 %.
    let f = fixture("nh3_over_aqueous_ammonia.yaml");
    let c = &f["clegg_brimblecombe_1989"];
    let correlation = |m: f64, t_k: f64| {
        let k = &c["ln_kh"];
        let kh = (num(&k["a"]) + num(&k["b"]) / t_k + num(&k["c"]) * t_k).exp();
        let l = &c["lambda"];
        let lambda = num(&l["l0"]) + num(&l["l1"]) / t_k + num(&l["l2"]) / (t_k * t_k);
        m * (2.0 * m * lambda).exp() / kh * 101_325.0
    };
    let mut worst: f64 = 0.0;
    for w in [5.0, 10.0, 15.0, 20.0, 25.0, 28.0] {
        for t_c in [20.0, 25.0, 30.0, 40.0] {
            let m = 1000.0 * w / (17.031 * (100.0 - w));
            let (model, _) = over_aqueous_ammonia(w, t_c);
            let published = correlation(m, t_c + 273.15);
            let dev = model / published - 1.0;
            eprintln!(
                "{w} % at {t_c} °C: NH3 {:.2} kPa against {:.2} kPa: {:+.1} %",
                model / 1e3,
                published / 1e3,
                100.0 * dev
            );
            worst = worst.max(dev.abs());
        }
    }
    eprintln!("worst {:.1} %", 100.0 * worst);
    assert!(worst < 0.20, "worst deviation {:.1} %", 100.0 * worst);
}

#[test]
fn aqueous_ammonia_boils_where_the_handbook_says() {
    // At the published boiling point (5-28 % NH3, 31-81 °C) the model's total pressure,
    // p(NH3) + p(H2O), must be within 20 % of one atmosphere. Water's activity is taken as 1
    // here (NH3 is not an ion), which overstates its pressure by a few per cent at 5 %.
    let f = fixture("nh3_over_aqueous_ammonia.yaml");
    let mut worst: f64 = 0.0;
    let mut checked = 0;
    for p in f["boiling_point_1atm"]["points"].as_sequence().unwrap() {
        let w = num(&p["nh3_mass_percent"]);
        if !(5.0..=28.0).contains(&w) {
            continue;
        }
        let t_c = (num(&p["boiling_point_f"]) - 32.0) / 1.8;
        let (nh3, water) = over_aqueous_ammonia(w, t_c);
        let dev = (nh3 + water) / 101_325.0 - 1.0;
        eprintln!(
            "{w} % boiling at {t_c:.1} °C: NH3 {:.1} + water {:.1} kPa: {:+.1} % of one atmosphere",
            nh3 / 1e3,
            water / 1e3,
            100.0 * dev
        );
        worst = worst.max(dev.abs());
        checked += 1;
    }
    eprintln!("worst {:.1} %", 100.0 * worst);
    assert!(checked >= 10, "{checked} points in 5-28 %");
    assert!(worst < 0.20, "worst deviation {:.1} %", 100.0 * worst);
}
