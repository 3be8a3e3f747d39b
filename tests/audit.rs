//! `offgas audit` on a small storeroom whose findings are worked out by hand, the
//! suggestion search, and the HTML report.

mod common;
use common::catalog;
use offgas::report::Severity;
use offgas::store::audit::{AuditSettings, Auditor, PairJudge};
use offgas::store::report::{AuditReport, Level};
use offgas::store::Inventory;

fn store(text: &str) -> Inventory {
    Inventory::parse(catalog(), "store.yaml", text).unwrap_or_else(|e| panic!("{e}"))
}

fn demo_store() -> Inventory {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/data/demo/storeroom.yaml"
    ))
    .unwrap();
    store(&text)
}

struct Env {
    th: offgas::judge::thresholds::Thresholds,
    rules: offgas::judge::rules::RuleSet,
}

fn env() -> Env {
    Env {
        th: offgas::embedded::thresholds().unwrap(),
        rules: offgas::embedded::rules(catalog()).unwrap(),
    }
}

fn auditor(e: &Env) -> Auditor<'_> {
    Auditor {
        cat: catalog(),
        th: &e.th,
        rules: &e.rules,
        settings: AuditSettings {
            spill_area_m2: 0.25,
            cabinet_level: true,
        },
    }
}

fn run(inv: &Inventory) -> AuditReport {
    let e = env();
    auditor(&e).audit(inv, &|_, _| {})
}

#[test]
fn the_small_storeroom_has_the_findings_worked_out_by_hand() {
    // Worked out by hand (data/demo/storeroom.yaml):
    // - tray 1 of cabinet 1: 100 g NaCN with 1 L of 37 % HCl: 2.0 mol cyanide into 12 mol
    //   of strong acid, all HCN (pKa 9.2) → stop;
    // - tray 1 of cabinet 2: 1 L of 2 M NaOH with 500 g NH4Cl (9.3 mol): 2 mol NH3 freed in
    //   about 1 L, p = 2000 mol/m3 / 0.59 mol/(m3 Pa) ≈ 3.4 kPa ≈ 33,000 ppm → stop;
    // - ethanol with acetone, NaCl with Na2SO4: nothing forms → clear;
    // - across trays: cyanide with the solvents, acid with the solvents, caustic with the
    //   dry salts: nothing worse than each on its own → clear.
    let r = run(&demo_store());
    assert_eq!(r.severity, Severity::Stop);
    let pairs: Vec<(String, String, Severity, Level)> = r
        .findings
        .iter()
        .map(|f| (f.a.id.clone(), f.b.id.clone(), f.severity, f.level))
        .collect();
    assert_eq!(
        pairs,
        vec![
            ("SB-01".into(), "SB-02".into(), Severity::Stop, Level::Tray),
            ("SB-05".into(), "SB-06".into(), Severity::Stop, Level::Tray),
        ],
        "{:#?}",
        r.findings
    );
    assert_eq!(r.findings[0].gas.as_deref(), Some("HCN"));
    assert_eq!(r.findings[1].gas.as_deref(), Some("NH3"));
    // Cabinet 1 and 2 each: 2 tray pairs... all pairs in a cabinet of four are 6: 12 in all.
    assert_eq!(r.counts.pairs_that_can_meet, 12);
    assert!(
        r.counts.pairs_cleared_by_screening >= 1,
        "solvent with solvent needs no solve"
    );
    assert_eq!(
        r.counts.pairs_checked + r.counts.pairs_cleared_by_screening,
        12
    );
}

#[test]
fn without_the_cabinet_level_only_tray_mates_are_paired() {
    let e = env();
    let mut a = auditor(&e);
    a.settings.cabinet_level = false;
    let r = a.audit(&demo_store(), &|_, _| {});
    assert_eq!(r.counts.pairs_that_can_meet, 4);
}

#[test]
fn the_suggestion_removes_every_stop_pair_when_there_is_room() {
    let e = env();
    let a = auditor(&e);
    let inv = demo_store();
    let judge = PairJudge::new(&a, &inv);
    let s = offgas::store::suggest::suggest(&inv, &judge, true, 2);
    assert!(s.complete, "{s:?}");
    assert_eq!(s.stop_pairs_before, 2);
    assert_eq!(s.stop_pairs_after, 0);
    assert!(
        s.moves.len() <= 2,
        "fewest moves: one per stop pair here, {:?}",
        s.moves
    );
    // Apply the moves and audit again: no stop pair is left.
    let mut moved = inv.clone();
    for m in &s.moves {
        let c = moved.containers.iter_mut().find(|c| c.id == m.id).unwrap();
        c.path = offgas::store::split_path(&m.to.replace(" / ", "/"));
    }
    assert!(run(&moved)
        .findings
        .iter()
        .all(|f| f.severity < Severity::Stop));
}

#[test]
fn the_suggestion_says_so_when_there_is_no_room() {
    // One cabinet, one full tray: cyanide and acid cannot be separated.
    let inv = store(
        "name: tight\nlocations:\n  - { path: B / R / C1 / T1, capacity: 2 }\ncontainers:\n  - { id: A, location: B / R / C1 / T1, size: 0.5 L, substance: sodium cyanide, amount: 50 g }\n  - { id: B, location: B / R / C1 / T1, size: 1 L, substance: \"hydrochloric acid, concentrated\", amount: 0.5 L }\n",
    );
    let e = env();
    let a = auditor(&e);
    let judge = PairJudge::new(&a, &inv);
    let s = offgas::store::suggest::suggest(&inv, &judge, true, 0);
    assert!(!s.complete);
    assert_eq!(s.stop_pairs_after, 1);
    assert!(s.note.contains("no free place"), "{}", s.note);
    assert!(!s.unresolved.is_empty());
}

#[test]
fn the_html_report_is_well_formed_and_self_contained() {
    let r = run(&demo_store());
    let html = offgas::output::audit::audit_html(&r);
    assert!(html.starts_with("<!DOCTYPE html>") && html.trim_end().ends_with("</html>"));
    for external in [
        "http://", "https://", "<link", "<script", "src=", "@import", "url(",
    ] {
        assert!(!html.contains(external), "external asset: {external}");
    }
    assert_eq!(html.matches("class=\"matrix\"").count(), r.cabinets.len());
    assert_eq!(html.matches("<svg").count(), html.matches("</svg>").count());
    for tag in ["table", "tbody", "ul", "div"] {
        assert_eq!(
            html.matches(&format!("<{tag}")).count(),
            html.matches(&format!("</{tag}>")).count(),
            "{tag}"
        );
    }
    assert!(html.contains("SB-01") && html.contains("Cautions"));
}

#[test]
fn bad_inventories_are_refused_with_the_line() {
    let err = |t: &str| {
        Inventory::parse(catalog(), "inv.yaml", t)
            .expect_err("refused")
            .to_string()
    };
    // A location has one to six levels.
    let e = err("containers:\n  - { id: X, location: B / W / R / C / S / T / X, size: 1 L, substance: acetone, amount: 0.5 L }\n");
    assert!(
        e.contains("inv.yaml:2") && e.contains("has 7 levels"),
        "{e}"
    );
    let e = err("containers:\n  - { id: X, location: B / R / C / T, size: 1 L, substance: unobtainium, amount: 5 g }\n");
    assert!(e.contains("unknown substance"), "{e}");
    let e = err("containers:\n  - { id: X, location: B / R / C / T, size: 0.1 L, substance: acetone, amount: 0.5 L }\n");
    assert!(e.contains("more than its size"), "{e}");
    let e = err("containers:\n  - { id: X, location: B / R / C / T, size: 1 L, substance: acetone, amount: 0.5 L }\n  - { id: X, location: B / R / C / T, size: 1 L, substance: acetone, amount: 0.5 L }\n");
    assert!(
        e.contains("inv.yaml:3") && e.contains("appears twice"),
        "{e}"
    );
}

/// The verdict for two containers alone on one tray: (substance, amount, size) each.
fn pair_verdict(a: (&str, &str, &str), b: (&str, &str, &str)) -> (Severity, String) {
    let text = format!(
        "name: pair\nlevels:\n  spill_zone: 2\n  cabinet: 1\nlocations:\n  - path: \"Cabinet / Tray\"\n    capacity: 4\ncontainers:\n  - id: A\n    location: \"Cabinet / Tray\"\n    size: \"{}\"\n    substance: \"{}\"\n    amount: \"{}\"\n  - id: B\n    location: \"Cabinet / Tray\"\n    size: \"{}\"\n    substance: \"{}\"\n    amount: \"{}\"\n",
        a.2, a.0, a.1, b.2, b.0, b.1
    );
    let r = run(&store(&text));
    let headline = r
        .findings
        .first()
        .map_or(String::new(), |f| f.headline.to_string());
    (r.severity, headline)
}

#[test]
fn a_neighbour_that_barely_moves_a_liquid_s_own_fumes_is_not_the_pair_s_hazard() {
    // Strong ammonia and glacial acetic acid give off their gas past its stop level on
    // their own; a salt beside them moves it a few-fold at most (salting-out), which changes
    // nothing a technician would do: these pairs stand together in every storeroom.
    for (a, b) in [
        (
            ("ammonia solution 25%", "80 mL", "0.5 L"),
            ("sodium sulfate", "943 g", "1 L"),
        ),
        (
            ("ammonia solution 25%", "1000 mL", "1 L"),
            ("sodium chloride", "250 g", "1 L"),
        ),
        (
            ("acetic acid", "1000 mL", "1 L"),
            ("potassium chloride", "1000 g", "1 L"),
        ),
        // Past what glacial acetic acid's little water can dissolve: not a 37 mol/kg brine.
        (
            ("acetic acid", "1790 mL", "2.5 L"),
            ("potassium chloride", "2500 g", "2.5 L"),
        ),
    ] {
        let (severity, headline) = pair_verdict(a, b);
        assert_eq!(severity, Severity::Clear, "{a:?} with {b:?}: {headline}");
    }
}

#[test]
fn what_the_meeting_makes_is_still_the_pair_s_hazard() {
    // A dry salt's own figure is for it dissolved in water, so its gas keeps the ordinary
    // test: sulfuric acid on metabisulfite is an SO2 cloud. Formic acid with concentrated
    // sulfuric acid gives carbon monoxide, which only a rule can say.
    // A salt held to its solubility still meets what frees its gas, and an oxidiser meets a
    // solvent whether it dissolves or not. (pair, a word the headline must hold)
    for (a, b, word) in [
        (
            ("sulfuric acid", "295 mL", "0.5 L"),
            ("sodium metabisulfite", "2151 g", "2.5 L"),
            "SO2",
        ),
        (
            ("sulfuric acid, concentrated", "1000 mL", "1 L"),
            ("formic acid 85%", "185 mL", "0.5 L"),
            "carbon monoxide",
        ),
        (
            ("sulfuric acid, concentrated", "500 mL", "0.5 L"),
            ("sodium cyanide", "100 g", "1 L"),
            "HCN",
        ),
        (
            ("sulfuric acid", "500 mL", "1 L"),
            ("sodium chloride", "200 g", "1 L"),
            "HCl",
        ),
        (
            ("ethanol", "500 mL", "1 L"),
            ("potassium permanganate", "100 g", "1 L"),
            "oxidiser",
        ),
    ] {
        let (severity, headline) = pair_verdict(a, b);
        assert_eq!(severity, Severity::Stop, "{a:?} with {b:?}: {headline}");
        assert!(headline.contains(word), "{a:?} with {b:?}: {headline}");
    }
}
