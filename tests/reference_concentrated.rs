//! offgas against PHREEQC in concentrated solutions (ionic strength 1–6 mol/kg): the cases of
//! tests/reference/golden.json that carry an `activity_model` ("pitzer" or "sit"), computed by
//! tests/reference/make_golden.py with PHREEQC's pitzer.dat and sit.dat databases.
//!
//! Each case was entered in mol per kg of water and is rebuilt here as a Mixture with its
//! moles, liquid volume, headspace, temperature and kg of water. It is compared twice:
//!
//! * with `offgas_parameters_result`, PHREEQC's Pitzer equations run with offgas's own
//!   constants, ion-interaction parameters and salting-out: the same model computed by another
//!   program, so held close: pH within 0.03, each partial pressure within 5 %, each species
//!   fraction within 0.02 (what remains between the two when both are right is PHREEQC's own
//!   Debye–Hückel slope and water properties, below 0.01 in pH and 1 % here).
//! * with `database_result`, the database as shipped: within the case's `tolerance`, which is
//!   pH 0.1, 15 % in each partial pressure and 0.05 in a species fraction where the two models
//!   share their parameters and is otherwise widened by the gap between PHREEQC's two runs;
//!   the case's `differences` say why.
//!
//! Every comparison is printed (run with `--nocapture` to see them); all failures are
//! collected and reported together, by case.

mod common;
use common::catalog;
use offgas::chem::{solve, Closure, Equilibrium, Mixture, SolverSettings};
use serde_json::Value;
use std::collections::BTreeSet;

/// Against the database where the two models share their parameters (the least any case's
/// `tolerance` may be).
const BASE_PH: f64 = 0.1;
const BASE_GAS_RELATIVE: f64 = 0.15;
const BASE_FRACTION: f64 = 0.05;
/// Against PHREEQC run with offgas's own model.
const SAME_MODEL_PH: f64 = 0.03;
const SAME_MODEL_GAS_RELATIVE: f64 = 0.05;
const SAME_MODEL_FRACTION: f64 = 0.02;
/// Partial pressures below this (atm) are not compared.
const GAS_FLOOR_ATM: f64 = 1e-9;

fn golden() -> Value {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/golden.json");
    let text = std::fs::read_to_string(path)
        .unwrap_or_else(|e| panic!("{path} is missing ({e}); run tests/reference/make_golden.py"));
    serde_json::from_str(&text).expect("golden.json is JSON")
}

fn concentrated(g: &Value) -> Vec<&Value> {
    g["cases"]
        .as_array()
        .expect("cases")
        .iter()
        .filter(|c| matches!(c["activity_model"].as_str(), Some("pitzer" | "sit")))
        .collect()
}

fn num(v: &Value, what: &str) -> f64 {
    v.as_f64()
        .unwrap_or_else(|| panic!("{what} is not a number: {v}"))
}

fn mixture(case: &Value) -> Mixture {
    let cat = catalog();
    let t_c = num(&case["temperature_c"], "temperature_c");
    let mut m = Mixture::empty(t_c + 273.15, Closure::Sealed);
    for (f, n) in case["moles"]["families"]
        .as_object()
        .expect("moles.families")
    {
        let id = cat
            .family_by_id(f)
            .unwrap_or_else(|| panic!("unknown family {f}"));
        m.add_family(id, num(n, f));
    }
    for (i, n) in case["moles"]["ions"].as_object().expect("moles.ions") {
        let id = cat
            .ion_by_formula(i)
            .unwrap_or_else(|| panic!("unknown ion {i}"));
        m.add_ion(id, num(n, i));
    }
    m.liquid_l = num(&case["liquid_l"], "liquid_l");
    m.headspace_l = num(&case["headspace_l"], "headspace_l");
    m.water_kg = Some(num(&case["water_kg"], "water_kg"));
    m
}

fn gas_atm(eq: &Equilibrium, gas: &str) -> f64 {
    eq.gases
        .iter()
        .find(|g| g.gas.as_str() == gas)
        .map(|g| g.partial_pressure_pa / catalog().physical.p_std)
        .unwrap_or(0.0)
}

/// The tolerances of one comparison: single values, or per gas / per family from the case.
enum Tolerance<'a> {
    SameModel,
    Case(&'a Value),
}

impl Tolerance<'_> {
    fn ph(&self) -> f64 {
        match self {
            Tolerance::SameModel => SAME_MODEL_PH,
            Tolerance::Case(t) => num(&t["ph"], "tolerance.ph"),
        }
    }
    fn gas(&self, gas: &str) -> f64 {
        match self {
            Tolerance::SameModel => SAME_MODEL_GAS_RELATIVE,
            Tolerance::Case(t) => t["gas_relative"][gas].as_f64().unwrap_or(BASE_GAS_RELATIVE),
        }
    }
    fn fraction(&self, family: &str) -> f64 {
        match self {
            Tolerance::SameModel => SAME_MODEL_FRACTION,
            Tolerance::Case(t) => t["fraction"][family].as_f64().unwrap_or(BASE_FRACTION),
        }
    }
}

/// Which PHREEQC result a comparison is with.
#[derive(Clone, Copy)]
enum Against {
    /// PHREEQC with offgas's own model (`offgas_parameters_result`).
    SameModel,
    /// The database as shipped (`database_result`).
    Database,
}

/// Compares offgas's equilibrium with one PHREEQC result of a case; prints every line and
/// adds every miss to `failures`.
fn compare(case: &Value, eq: &Equilibrium, against: Against, failures: &mut Vec<String>) {
    let id = case["id"].as_str().expect("id");
    let (label, reference, which, tol) = match against {
        Against::SameModel => (
            "offgas parameters",
            &case["offgas_parameters_result"],
            "offgas_parameters",
            Tolerance::SameModel,
        ),
        Against::Database => (
            case["database"].as_str().expect("database"),
            &case["database_result"],
            "database",
            Tolerance::Case(&case["tolerance"]),
        ),
    };
    let fractions = &case["species_fractions"];
    let cat = catalog();
    let ph_ref = num(&reference["ph"], "ph");
    let line = format!(
        "{id} [{label}] pH offgas {:.3} reference {ph_ref:.3} ({:+.3}, tolerance {:.2}); \
         I offgas {:.2} mol/L of liquid, reference {:.2} mol/kg of water",
        eq.ph,
        eq.ph - ph_ref,
        tol.ph(),
        eq.ionic_strength,
        num(&reference["ionic_strength"], "ionic_strength"),
    );
    eprintln!("{line}");
    if !eq.ph.is_finite() || (eq.ph - ph_ref).abs() > tol.ph() {
        failures.push(line);
    }
    for (gas, p_ref) in reference["gases_atm"].as_object().expect("gases_atm") {
        let p_ref = num(p_ref, gas);
        if p_ref < GAS_FLOOR_ATM {
            continue;
        }
        let p = gas_atm(eq, gas);
        // symmetric: the larger over the smaller, less one
        let off = if p > 0.0 {
            (p / p_ref).max(p_ref / p) - 1.0
        } else {
            f64::INFINITY
        };
        let t = tol.gas(gas);
        let line = format!(
            "{id} [{label}]     {gas}: offgas {p:.4e} atm, reference {p_ref:.4e} atm \
             ({:+.1} %, tolerance {:.0} %)",
            (p / p_ref - 1.0) * 100.0,
            t * 100.0
        );
        eprintln!("{line}");
        if off.is_nan() || off > t {
            failures.push(line);
        }
    }
    for (family, f) in fractions.as_object().expect("species_fractions") {
        let fid = cat
            .family_by_id(family)
            .unwrap_or_else(|| panic!("unknown family {family}"));
        let Some(state) = eq.family(fid) else {
            failures.push(format!("{id} [{label}] offgas reports no {family}"));
            continue;
        };
        let names = f["species"].as_array().expect("species");
        let refs = f[which].as_array().expect("fractions");
        let t = tol.fraction(family);
        for (k, (name, r)) in names.iter().zip(refs).enumerate() {
            let r = num(r, "fraction");
            let ours = state.fractions.get(k).copied().unwrap_or(f64::NAN);
            if r < 0.01 && ours < 0.01 {
                continue;
            }
            let line = format!(
                "{id} [{label}]     {family} {}: fraction offgas {ours:.3}, reference {r:.3} \
                 (tolerance {t:.2})",
                name.as_str().unwrap_or("?")
            );
            eprintln!("{line}");
            let off = (ours - r).abs();
            if off.is_nan() || off > t {
                failures.push(line);
            }
        }
    }
}

#[test]
fn offgas_matches_phreeqc_in_concentrated_solutions() {
    let g = golden();
    let cases = concentrated(&g);
    assert!(
        cases.len() >= 12,
        "only {} concentrated golden cases",
        cases.len()
    );
    let mut failures = Vec::new();
    for case in &cases {
        let id = case["id"].as_str().expect("id");
        let db = case["database"].as_str().expect("database");
        eprintln!(
            "== {id} ({db}, {} °C): {}",
            num(&case["temperature_c"], "temperature_c"),
            case["description"].as_str().unwrap_or("")
        );
        for d in case["differences"].as_array().expect("differences") {
            eprintln!("   difference: {}", d.as_str().unwrap_or(""));
        }
        eprintln!(
            "   tolerance against {db}: {}",
            case["tolerance"]["reason"].as_str().unwrap_or("")
        );
        let eq = match solve(catalog(), &mixture(case), &SolverSettings::default()) {
            Ok(eq) => eq,
            Err(e) => {
                let line = format!("{id}: offgas failed to solve: {e}");
                eprintln!("{line}");
                failures.push(line);
                continue;
            }
        };
        compare(case, &eq, Against::SameModel, &mut failures);
        compare(case, &eq, Against::Database, &mut failures);
    }
    let cases_failing: BTreeSet<&str> = failures
        .iter()
        .filter_map(|f| f.split([' ', ':']).next())
        .collect();
    assert!(
        failures.is_empty(),
        "{} comparison(s) outside tolerance in {} case(s) ({}):\n{}",
        failures.len(),
        cases_failing.len(),
        cases_failing.into_iter().collect::<Vec<_>>().join(", "),
        failures.join("\n")
    );
}

#[test]
fn concentrated_cases_cover_the_waste_streams_and_explain_their_tolerances() {
    let g = golden();
    let cases = concentrated(&g);
    let mut models = BTreeSet::new();
    let mut gases = BTreeSet::new();
    let mut families = BTreeSet::new();
    for case in &cases {
        let id = case["id"].as_str().expect("id");
        models.insert(case["activity_model"].as_str().expect("activity_model"));
        let i = num(&case["database_result"]["ionic_strength"], "ionic_strength");
        assert!(
            (0.95..=6.5).contains(&i),
            "{id}: ionic strength {i} is outside 1-6 mol/kg"
        );
        assert!(num(&case["water_kg"], "water_kg") > 0.0, "{id}: water_kg");
        for (gas, p) in case["database_result"]["gases_atm"].as_object().unwrap() {
            if num(p, gas) >= GAS_FLOOR_ATM {
                gases.insert(gas.clone());
            }
        }
        for f in case["moles"]["families"].as_object().unwrap().keys() {
            families.insert(f.clone());
        }
        let tol = &case["tolerance"];
        let widened = tol["widened"].as_bool().expect("tolerance.widened");
        let shared = case["parameters_shared"]
            .as_bool()
            .expect("parameters_shared");
        let diffs = case["differences"].as_array().expect("differences");
        assert_eq!(widened, !shared, "{id}: widened exactly when not shared");
        assert!(
            num(&tol["ph"], "tolerance.ph") >= BASE_PH,
            "{id}: pH tolerance below the base"
        );
        for (gas, t) in tol["gas_relative"].as_object().unwrap() {
            assert!(num(t, gas) >= BASE_GAS_RELATIVE, "{id}: {gas} tolerance");
        }
        for (f, t) in tol["fraction"].as_object().unwrap() {
            assert!(num(t, f) >= BASE_FRACTION, "{id}: {f} fraction tolerance");
        }
        if shared {
            assert!(diffs.is_empty(), "{id}: shared but differences listed");
            assert_eq!(num(&tol["ph"], "tolerance.ph"), BASE_PH, "{id}");
        } else {
            assert!(
                !diffs.is_empty(),
                "{id}: widened tolerance without a difference named"
            );
            assert!(
                tol["reason"].as_str().is_some_and(|r| !r.is_empty()),
                "{id}: widened tolerance without a reason"
            );
        }
    }
    assert!(cases.len() >= 12, "only {} cases", cases.len());
    for m in ["pitzer", "sit"] {
        assert!(models.contains(m), "no {m} case");
    }
    for gas in ["CO2", "H2S", "NH3", "HCl"] {
        assert!(gases.contains(gas), "no concentrated case exercises {gas}");
    }
    for f in ["carbonate", "chloride", "sulfate", "ammonia", "sulfide"] {
        assert!(families.contains(f), "no concentrated case holds {f}");
    }
}
