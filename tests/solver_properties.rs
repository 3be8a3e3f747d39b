//! Properties the solver must keep for any mixture: charge and mass balance, monotone pH
//! under added strong acid, order independence, splitting a pour, finite outputs.

mod common;
use common::*;
use offgas::chem::{solve, Closure, Equilibrium, Mixture, SolverSettings};
use proptest::prelude::*;

/// Families and ions the generator draws from: every volatile family offgas reports a gas for,
/// polyprotic ones, amines, metal ions, and the strong ions that set the balance.
const FAMILIES: [&str; 19] = [
    "cyanide",
    "sulfide",
    "ammonia",
    "carbonate",
    "sulfite",
    "fluoride",
    "azide",
    "acetate",
    "phosphate",
    "citrate",
    "edta",
    "triethylamine",
    "chloride",
    "sulfate",
    "iron3",
    "borate",
    "copper2",
    "zinc",
    "nickel",
];
const IONS: [&str; 6] = ["Na+", "K+", "Ca^2+", "Br-", "Cu+", "Ag+"];

fn settings() -> SolverSettings {
    SolverSettings::default()
}

prop_compose! {
    fn arb_mixture()(
        fams in proptest::collection::vec((0..FAMILIES.len(), -5.0f64..0.0), 0..8),
        ions in proptest::collection::vec((0..IONS.len(), -5.0f64..-0.3), 0..4),
        liquid in 0.1f64..20.0,
        head in 0.0f64..20.0,
        t_c in 0.0f64..100.0,
        closure in prop_oneof![Just(Closure::Sealed), Just(Closure::Vented), Just(Closure::Open)],
    ) -> Mixture {
        let parts: Vec<(&str, f64)> = fams.iter().map(|&(i, lc)| (FAMILIES[i], 10f64.powf(lc)))
            .chain(ions.iter().map(|&(i, lc)| (IONS[i], 10f64.powf(lc))))
            .collect();
        mix(&parts, liquid, head, t_c, closure)
    }
}

/// Moles of a family outside its own dissolved species: its own gas, every combined species
/// (dissolved chlorine and its gas) that it is a parent of, and what metal complexes hold.
fn moles_elsewhere(eq: &Equilibrium, fam: offgas::catalog::FamilyId, liquid_l: f64) -> f64 {
    let own_gas: f64 = eq
        .gases
        .iter()
        .filter(|g| g.family == fam && !g.from_combined)
        .map(|g| g.moles_in_gas)
        .sum();
    let combined: f64 = eq
        .combined
        .iter()
        .filter(|c| c.parents.0 == fam || c.parents.1 == fam)
        .map(|c| c.concentration * liquid_l + c.moles_in_gas)
        .sum();
    let bound = eq.family_bound_mol_per_l(catalog(), fam) * liquid_l;
    own_gas + combined + bound
}

/// A poured into B and B into A end alike: pH within `ph_tol`, temperature within 1e-9 K,
/// each gas within `gas_rel` relative.
fn order_does_not_matter(
    a: &Mixture,
    b: &Mixture,
    ph_tol: f64,
    gas_rel: f64,
) -> Result<(), TestCaseError> {
    let cap = a.liquid_l + b.liquid_l + 5.0;
    let ab = a.pour(b, 1.0, cap);
    let mut ba = b.pour(a, 1.0, cap);
    ba.closure = ab.closure;
    let e1 = solve(catalog(), &ab, &settings()).unwrap();
    let e2 = solve(catalog(), &ba, &settings()).unwrap();
    prop_assert!((e1.ph - e2.ph).abs() < ph_tol, "{} vs {}", e1.ph, e2.ph);
    prop_assert!((e1.temperature_k - e2.temperature_k).abs() < 1e-9);
    for (g1, g2) in e1.gases.iter().zip(e2.gases.iter()) {
        prop_assert!(
            (g1.partial_pressure_pa - g2.partial_pressure_pa).abs()
                <= gas_rel * g1.partial_pressure_pa.max(1e-30)
        );
    }
    Ok(())
}

fn check_balances(m: &Mixture, eq: &Equilibrium) {
    let cat = catalog();
    assert!(eq.ph.is_finite() && eq.ionic_strength.is_finite());
    assert!(
        eq.relative_charge_residual < 1e-8,
        "charge residual {}",
        eq.relative_charge_residual
    );
    for fs in &eq.families {
        let total = m.families.iter().find(|(f, _)| *f == fs.family).unwrap().1;
        let dissolved: f64 = fs.concentrations.iter().sum::<f64>() * m.liquid_l;
        let gas = moles_elsewhere(eq, fs.family, m.liquid_l);
        assert!(fs.concentrations.iter().all(|c| c.is_finite() && *c >= 0.0));
        assert!(
            (dissolved + gas - total).abs() <= 1e-9 * total + 1e-300,
            "mass balance of {}: {} + {} vs {}",
            cat.family(fs.family).id,
            dissolved,
            gas,
            total
        );
    }
    for g in &eq.gases {
        assert!(g.partial_pressure_pa.is_finite() && g.partial_pressure_pa >= 0.0);
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    #[test]
    fn charge_and_mass_balance_hold(m in arb_mixture()) {
        let eq = solve(catalog(), &m, &settings()).expect("solves");
        check_balances(&m, &eq);
    }

    #[test]
    fn adding_strong_acid_never_raises_ph(m in arb_mixture(), extra in -4.0f64..0.5) {
        let cat = catalog();
        let before = solve(cat, &m, &settings()).unwrap();
        let mut more = m.clone();
        more.add_family(cat.family_by_id("chloride").unwrap(), 10f64.powf(extra) * m.liquid_l);
        let after = solve(cat, &more, &settings()).unwrap();
        // Where a solid of a highly charged metal holds a(M)/a(H+)^z fixed, acid that
        // dissolves some of it raises the ionic strength and can lower gamma(M) faster
        // than it adds M, so a(H+) may fall a little: 1 M iron(III) over Fe(OH)3 with
        // phosphate rises 0.005 pH on 1 mM HCl. That is the activity model, not the solve
        // (a single ion's activity need not follow the acid added); in 40 000 drawn cases
        // 10 of 14 381 with a solid rose, at most by 0.0044. Anywhere else the pH must not
        // rise at all.
        let buffered = !before.solids.is_empty() || !after.solids.is_empty();
        let slack = if buffered { 0.01 } else { 1e-9 };
        prop_assert!(after.ph <= before.ph + slack, "pH {} → {}", before.ph, after.ph);
    }

    #[test]
    fn a_plus_b_equals_b_plus_a(a in arb_mixture(), b in arb_mixture()) {
        order_does_not_matter(&a, &b, 1e-8, 1e-7)?;
    }

    #[test]
    fn splitting_a_pour_in_two_gives_the_same_end(a in arb_mixture(), b in arb_mixture(), split in 0.05f64..0.95) {
        let cap = a.liquid_l + b.liquid_l + 5.0;
        let whole = a.pour(&b, 1.0, cap);
        let halves = a.pour(&b, split, cap).pour(&b, 1.0 - split, cap);
        let e1 = solve(catalog(), &whole, &settings()).unwrap();
        let e2 = solve(catalog(), &halves, &settings()).unwrap();
        prop_assert!((e1.ph - e2.ph).abs() < 1e-7, "{} vs {}", e1.ph, e2.ph);
        prop_assert!((e1.liquid_l - e2.liquid_l).abs() < 1e-9);
        prop_assert!((e1.temperature_k - e2.temperature_k).abs() < 1e-7);
    }
}

prop_compose! {
    /// Concentrated mixtures: families and strong ions up to 6 mol per kg of water, in a
    /// liquid that is 60-100 % water by mass.
    fn arb_concentrated()(
        fams in proptest::collection::vec((0..FAMILIES.len(), -3.0f64..0.778), 1..6),
        ions in proptest::collection::vec((0..IONS.len(), -3.0f64..0.778), 0..3),
        water_per_l in 0.6f64..1.0,
        head in 0.0f64..2.0,
        t_c in 0.0f64..100.0,
        closure in prop_oneof![Just(Closure::Sealed), Just(Closure::Vented), Just(Closure::Open)],
    ) -> Mixture {
        let parts: Vec<(&str, f64)> = fams.iter().map(|&(i, lm)| (FAMILIES[i], 10f64.powf(lm) * water_per_l))
            .chain(ions.iter().map(|&(i, lm)| (IONS[i], 10f64.powf(lm) * water_per_l)))
            .collect();
        let mut m = mix(&parts, 1.0, head, t_c, closure);
        m.water_kg = Some(water_per_l);
        m
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    #[test]
    fn concentrated_mixtures_solve_with_balances_that_hold(m in arb_concentrated()) {
        let eq = solve(catalog(), &m, &settings()).expect("solves");
        check_balances(&m, &eq);
        prop_assert!(eq.water_activity.is_finite() && eq.water_activity > 0.0 && eq.water_activity <= 1.0 + 1e-12);
        prop_assert!(eq.molal_ionic_strength.is_finite());
    }

    /// In a concentrated mixture a single ion's activity need not rise with its amount: added
    /// HCl can raise the pH a little where the salt it forms lifts OH-'s coefficient (strong
    /// caustic) or sulfate takes up its protons (measured mean activity coefficients do this).
    /// What thermodynamic stability requires is that the chemical potential of what is added
    /// rises: the HCl pressure over the liquid, a(H+) a(Cl-) / K, never falls.
    #[test]
    fn adding_hcl_to_a_concentrated_mixture_never_lowers_its_hcl_pressure(m in arb_concentrated(), extra in -3.0f64..0.5) {
        let cat = catalog();
        let hcl = |eq: &Equilibrium| eq.gases.iter().find(|g| g.gas == "HCl").map_or(0.0, |g| g.partial_pressure_pa);
        let chloride = cat.family_by_id("chloride").unwrap();
        let mut base = m.clone();
        base.add_family(chloride, 1e-3 * m.liquid_l);
        let before = solve(cat, &base, &settings()).unwrap();
        let mut more = base.clone();
        more.add_family(chloride, 10f64.powf(extra) * m.liquid_l);
        let after = solve(cat, &more, &settings()).unwrap();
        prop_assert!(hcl(&after) >= hcl(&before) * (1.0 - 1e-9), "p(HCl) {} → {} (pH {} → {})", hcl(&before), hcl(&after), before.ph, after.ph);
    }

    #[test]
    fn concentrated_a_plus_b_equals_b_plus_a(a in arb_concentrated(), b in arb_concentrated()) {
        order_does_not_matter(&a, &b, 1e-7, 1e-6)?;
    }
}
