//! The explanation layer and the pour: log K the right way up, extents, volatile products,
//! the worst state along the pour, and the order of pouring.

mod common;
use common::*;
use offgas::check::{check, CheckOptions};
use offgas::chem::{solve, Closure, SolverSettings};
use offgas::pour::batch::Batch;
use offgas::pour::pairs::{pair_table, Extent};
use offgas::report::{Scope, Severity};

fn thresholds() -> offgas::judge::thresholds::Thresholds {
    offgas::embedded::thresholds().unwrap()
}

fn rules() -> offgas::judge::rules::RuleSet {
    offgas::embedded::rules(catalog()).unwrap()
}

#[test]
fn log_k_is_ka_of_the_reacting_acid_over_ka_of_the_produced_acid() {
    // Formic acid (pKa 3.75) + HS- (produced acid H2S, pKa 7.05):
    // K = Ka(HCOOH)/Ka(H2S) = 10^-3.75 / 10^-7.05 → log K = 7.05 − 3.75 = +3.3, forward.
    let s = SolverSettings::default();
    let acid = solve(
        catalog(),
        &mix(&[("formate", 0.1)], 1.0, 0.0, 25.0, Closure::Open),
        &s,
    )
    .unwrap();
    let sulfide = solve(
        catalog(),
        &mix(
            &[("sulfide", 0.01), ("Na+", 0.01)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &s,
    )
    .unwrap();
    let th = thresholds();
    let pairs = pair_table(catalog(), &acid, &sulfide, 298.15, &th.proton_transfer);
    let p = pairs
        .iter()
        .find(|p| p.donor == "HCOOH" && p.acceptor == "HS-")
        .expect("formic acid with hydrogen sulfide ion");
    let expected = pka("sulfide", 0) - pka("formate", 0);
    assert!(
        (p.log_k - expected).abs() < 1e-9,
        "log K {} expected {expected}",
        p.log_k
    );
    assert!(p.log_k > 3.0, "upside down: {}", p.log_k);
    assert_eq!(p.produced_acid, "H2S");
    assert_eq!(p.produced_base, "HCOO-");
    assert_eq!(p.extent, Extent::Complete);
    assert_eq!(p.volatile_products, vec!["H2S".to_string()]);
}

#[test]
fn a_weak_donor_with_a_weak_acceptor_is_negligible() {
    // NH4+ (pKa 9.25) giving its proton to acetate (produced acid pKa 4.76): log K = −4.5.
    let s = SolverSettings::default();
    let th = thresholds();
    let ammonium = solve(
        catalog(),
        &mix(
            &[("ammonia", 0.1), ("chloride", 0.1)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &s,
    )
    .unwrap();
    let acetate = solve(
        catalog(),
        &mix(
            &[("acetate", 0.1), ("Na+", 0.1)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &s,
    )
    .unwrap();
    let pairs = pair_table(catalog(), &ammonium, &acetate, 298.15, &th.proton_transfer);
    let p = pairs
        .iter()
        .find(|p| p.donor == "NH4+" && p.acceptor == "CH3COO-")
        .unwrap();
    assert!((p.log_k - (pka("acetate", 0) - pka("ammonia", 0))).abs() < 1e-9);
    assert_eq!(p.extent, Extent::Negligible);
    // Both products are volatile: the produced acid CH3COOH and the donor's base NH3.
    assert_eq!(
        p.volatile_products,
        vec!["CH3COOH".to_string(), "NH3".to_string()]
    );
}

#[test]
fn pairs_go_both_ways_between_the_batches() {
    let s = SolverSettings::default();
    let th = thresholds();
    let a = solve(
        catalog(),
        &mix(
            &[("phosphate", 0.1), ("Na+", 0.15)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &s,
    )
    .unwrap();
    let b = solve(
        catalog(),
        &mix(
            &[("carbonate", 0.1), ("Na+", 0.15)],
            1.0,
            0.0,
            25.0,
            Closure::Open,
        ),
        &s,
    )
    .unwrap();
    let pairs = pair_table(catalog(), &a, &b, 298.15, &th.proton_transfer);
    use offgas::pour::pairs::Side;
    assert!(pairs
        .iter()
        .any(|p| p.donor_side == Side::Container && p.acceptor_side == Side::Stream));
    assert!(pairs
        .iter()
        .any(|p| p.donor_side == Side::Stream && p.acceptor_side == Side::Container));
    assert!(
        pairs.windows(2).all(|w| w[0].log_k >= w[1].log_k),
        "sorted strongest first"
    );
}

fn batch(name: &str, text: &str) -> Batch {
    Batch::parse(catalog(), name, text).unwrap()
}

#[test]
fn alkaline_sulfide_into_acid_is_worst_early_and_the_other_order_is_advised() {
    // 5 L of 0.1 M H2SO4 receiving 8 L of 0.05 M Na2S + 0.2 M NaOH: the end is alkaline
    // (base 8×(0.1+0.2) = 2.4 mol OH-equivalents against 1.0 mol H+), so little H2S at the
    // end; but until about 1/2.4 of the stream is in, the vessel is acidic and sulfide
    // leaves as H2S. Pouring the acid into the sulfide stays alkaline all the way.
    let carboy = batch(
        "etch",
        "name: etch\ncapacity: 20 L\nvolume: 5 L\ncontents:\n  - sulfuric acid: 0.1 mol/L\n",
    );
    let strip = batch("strip", "name: strip\nvolume: 8 L\ncontents:\n  - sodium sulfide: 0.05 mol/L\n  - sodium hydroxide: 0.2 mol/L\n");
    let r = check(
        catalog(),
        &thresholds(),
        &rules(),
        &carboy,
        &strip,
        &CheckOptions::default(),
    )
    .unwrap();
    let f = r.worst_state.fraction_added;
    assert!(f > 0.05 && f < 0.45, "worst at {f}");
    let h2s = |s: &offgas::report::StateReport| {
        s.gases
            .iter()
            .find(|g| g.formula == "H2S")
            .map(|g| g.headspace_ppm)
            .unwrap_or(0.0)
    };
    assert!(h2s(&r.worst_state.state) > 1000.0 * h2s(&r.end_state).max(1e-3));
    assert!(r.end_state.ph > 12.0);
    assert_eq!(r.severity, Severity::Stop);
    let other = r.poured_other_way.as_ref().unwrap();
    assert!(
        other.worst_limit_ratio < 1.0,
        "other order stays below review: {}",
        other.worst_limit_ratio
    );
    assert!(r.findings.iter().any(|f| f.code == "safer-order"));
    assert!(r.findings.iter().any(|f| f.code == "worst-while-pouring"));
}

#[test]
fn both_orders_end_in_the_same_state() {
    let carboy = batch(
        "c",
        "name: c\ncapacity: 10 L\nvolume: 4 L\ncontents:\n  - ammonium chloride: 0.05 mol/L\n",
    );
    let stream = batch(
        "s",
        "name: s\nvolume: 2 L\ncontents:\n  - sodium hydroxide: 0.05 mol/L\n",
    );
    let r = check(
        catalog(),
        &thresholds(),
        &rules(),
        &carboy,
        &stream,
        &CheckOptions::default(),
    )
    .unwrap();
    // The other order's scan ends at the same composition in the same vessel.
    let other = &r.poured_other_way.as_ref().unwrap().worst_state;
    if other.fraction_added == 1.0 {
        assert!((other.state.ph - r.end_state.ph).abs() < 1e-9);
    }
    assert!(r.end_state.volume_l == 6.0 && r.end_state.headspace_l == 4.0);
}

#[test]
fn worst_state_is_never_better_than_the_end() {
    let carboy = batch("c", "name: c\ncapacity: 20 L\nvolume: 10 L\ncontents:\n  - sodium cyanide: 1 g/L\n  - sodium hydroxide: 0.01 mol/L\n");
    let stream = batch(
        "s",
        "name: s\nvolume: 2 L\ncontents:\n  - acetic acid: 0.5 mol/L\n",
    );
    let r = check(
        catalog(),
        &thresholds(),
        &rules(),
        &carboy,
        &stream,
        &CheckOptions::default(),
    )
    .unwrap();
    let ratio = |s: &offgas::report::StateReport| {
        s.gases
            .iter()
            .filter_map(|g| g.limit_ratio)
            .fold(0.0, f64::max)
    };
    assert!(ratio(&r.worst_state.state) >= ratio(&r.end_state) - 1e-12);
}

#[test]
fn a_hazard_class_no_rule_covers_is_never_clear() {
    // With no rules in force, hypochlorite's hazards are assessed by nothing: review.
    // With the built-in rules, bleach into plain salt water meets no rule and is clear.
    let carboy = batch(
        "c",
        "name: c\ncapacity: 20 L\nvolume: 5 L\ncontents:\n  - sodium chloride: 0.01 mol/L\n",
    );
    let stream = batch(
        "s",
        "name: s\nvolume: 1 L\ncontents:\n  - sodium hypochlorite: 0.01 mol/L\n",
    );
    let none = offgas::judge::rules::RuleSet::default();
    let r = check(
        catalog(),
        &thresholds(),
        &none,
        &carboy,
        &stream,
        &CheckOptions::default(),
    )
    .unwrap();
    assert!(r.severity >= Severity::Review);
    assert!(r
        .findings
        .iter()
        .any(|f| f.code == "hazard-not-assessed" && f.message.contains("hypochlorite")));
    let r = check(
        catalog(),
        &thresholds(),
        &rules(),
        &carboy,
        &stream,
        &CheckOptions::default(),
    )
    .unwrap();
    // With the built-in rules, hypochlorite's own hazard is a rule of its own: still review.
    assert_eq!(r.severity, Severity::Review, "{:?}", r.findings);
    assert!(r
        .findings
        .iter()
        .any(|f| f.code == "hypochlorite-present" && f.scope == Scope::Component));
    assert!(!r.findings.iter().any(|f| f.code == "hazard-not-assessed"));
}

#[test]
fn a_plain_salt_rinse_is_clear() {
    let carboy = batch(
        "c",
        "name: c\ncapacity: 20 L\nvolume: 5 L\ncontents:\n  - sodium chloride: 0.1 mol/L\n",
    );
    let stream = batch(
        "s",
        "name: s\nvolume: 1 L\ncontents:\n  - potassium chloride: 0.1 mol/L\n",
    );
    let r = check(
        catalog(),
        &thresholds(),
        &rules(),
        &carboy,
        &stream,
        &CheckOptions::default(),
    )
    .unwrap();
    assert_eq!(r.severity, Severity::Clear);
}

#[test]
fn every_volatile_gas_has_exposure_levels_or_is_reviewed() {
    // A gas with no levels must give review once measurable; the limits file lists all.
    let cat = catalog();
    for f in &cat.families {
        if let Some(v) = &f.volatile {
            assert!(
                cat.gas_limits(&v.gas).is_some(),
                "no limits entry for {}",
                v.gas
            );
        }
    }
}

#[test]
fn every_demo_file_parses() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("data/demo");
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        let name = p.file_name().unwrap().to_string_lossy().to_string();
        if name.starts_with("carboy") || name.starts_with("stream") {
            let text = std::fs::read_to_string(&p).unwrap();
            Batch::parse(catalog(), &name, &text).unwrap_or_else(|e| panic!("{e}"));
        }
    }
}

#[test]
fn concentrated_reagent_by_volume_gives_the_handbook_molarity() {
    // 100 mL of 37 % hydrochloric acid (density 1.18 g/mL, CRC Handbook density table)
    // holds 100 × 1.18 × 0.37 / 36.46 = 1.20 mol HCl.
    let b = batch(
        "s",
        "name: s\nvolume: 1 L\ncontents:\n  - hydrochloric acid, concentrated: 100 mL\n",
    );
    let mol = b.components[0].moles;
    assert!((mol - 1.20).abs() < 0.02, "{mol}");
}
