//! `offgas procedure`: carried-over residue, drain and rinse arithmetic, the computed
//! rinse count checked by re-running, and bad procedure files.

mod common;
use common::catalog;
use offgas::procedure::{fix::fixes, run::Engine, Procedure};
use offgas::report::Severity;

struct Ctx {
    th: offgas::judge::thresholds::Thresholds,
    rules: offgas::judge::rules::RuleSet,
}

fn ctx() -> Ctx {
    Ctx {
        th: offgas::embedded::thresholds().unwrap(),
        rules: offgas::embedded::rules(catalog()).unwrap(),
    }
}

fn parse(text: &str) -> Procedure {
    Procedure::parse(catalog(), "p.yaml", text).unwrap_or_else(|e| panic!("{e}"))
}

const HEEL: &str = "name: residue test\nvessel:\n  name: tank\n  capacity: 100 L\n  volume: 50 L\n  closure: open\n  contents:\n    - sodium cyanide: 10 g/L\n    - sodium hydroxide: 0.1 mol/L\n";
const ACID_STEP: &str = "  - description: add the descaler\n    add:\n      name: descaler\n      volume: 40 L\n      contents:\n        - sulfamic acid: 60 g/L\n";

#[test]
fn residue_carried_over_makes_a_later_step_unsafe() {
    // Each step on its own is clear: draining is, and the descaler into plain water is.
    // Carried over, the cyanide heel meets the acid.
    let c = ctx();
    let e = Engine {
        cat: catalog(),
        th: &c.th,
        rules: &c.rules,
    };
    let text =
        format!("{HEEL}steps:\n  - description: drain\n    drain: {{ leave: 3 L }}\n{ACID_STEP}");
    let r = e.run(&parse(&text)).unwrap();
    assert_eq!(r.steps[0].severity, Severity::Clear);
    assert_eq!(r.steps[1].severity, Severity::Stop);
    assert_eq!(r.first_problem.as_ref().unwrap().step, 2);
    let alone = "name: alone\nvessel:\n  name: tank\n  capacity: 100 L\n  volume: 3 L\n  closure: open\n  contents: []\nsteps:\n".to_string() + ACID_STEP;
    let r = e.run(&parse(&alone)).unwrap();
    assert_eq!(
        r.steps[0].severity,
        Severity::Clear,
        "{:?}",
        r.steps[0].findings
    );
}

#[test]
fn drains_and_rinses_scale_the_residue_as_the_hold_up_says() {
    // 50 L holding 10 g/L NaCN = 500 g = 10.20 mol. Leave 3 L: 3/50 of it. Rinse with
    // 27 L and drain to 3 L: 3/30 of that. Drain "remove 1 L": 2/3 of it. Leave 50 %: half.
    let c = ctx();
    let e = Engine {
        cat: catalog(),
        th: &c.th,
        rules: &c.rules,
    };
    let text = format!(
        "{HEEL}steps:\n  - description: a\n    drain: {{ leave: 3 L }}\n  - description: b\n    rinse: {{ volume: 27 L, leave: 3 L }}\n  - description: c\n    drain: {{ remove: 1 L }}\n  - description: d\n    drain: {{ leave: 50 % }}\n"
    );
    let r = e.run(&parse(&text)).unwrap();
    let nacn = |i: usize| {
        r.steps[i]
            .contents_after
            .iter()
            .find(|l| l.substance == "sodium cyanide")
            .unwrap()
            .mol
    };
    let start = 500.0 / 49.007;
    let expected = [start * 3.0 / 50.0, start * 3.0 / 50.0 * 3.0 / 30.0];
    assert!((nacn(0) - expected[0]).abs() < 1e-9 * start);
    assert!((nacn(1) - expected[1]).abs() < 1e-9 * start);
    assert!((nacn(2) - expected[1] * 2.0 / 3.0).abs() < 1e-9 * start);
    assert!((nacn(3) - expected[1] * 2.0 / 3.0 * 0.5).abs() < 1e-9 * start);
    let vols: Vec<f64> = r.steps.iter().map(|s| s.volume_after_l).collect();
    assert_eq!(vols, vec![3.0, 3.0, 2.0, 1.0]);
}

#[test]
fn the_computed_rinse_count_is_the_fewest_that_clears_the_step() {
    let c = ctx();
    let e = Engine {
        cat: catalog(),
        th: &c.th,
        rules: &c.rules,
    };
    let text = format!("{HEEL}steps:\n  - description: drain\n    drain: {{ leave: 3 L }}\n  - description: rinse\n    rinse: {{ volume: 30 L, leave: 3 L }}\n{ACID_STEP}");
    let p = parse(&text);
    let r = e.run(&p).unwrap();
    assert_eq!(r.first_problem.as_ref().unwrap().step, 3);
    let fx = fixes(&e, &p, &r);
    let rinse = fx.iter().find(|f| f.kind == "rinse").expect("a rinse fix");
    assert_eq!(rinse.step_severity_with_fix, Severity::Clear);
    // Read k back from the words and re-run the procedure written with k and k − 1 rinses.
    let k: u32 = rinse
        .description
        .split(" rinse ")
        .nth(1)
        .unwrap()
        .split(' ')
        .next()
        .unwrap()
        .parse()
        .unwrap();
    let with = |n: u32| {
        let extra = if n == 0 {
            String::new()
        } else {
            format!("  - description: extra rinses\n    rinse: {{ volume: 30 L, times: {n}, leave: 3 L }}\n")
        };
        let t = format!("{HEEL}steps:\n  - description: drain\n    drain: {{ leave: 3 L }}\n  - description: rinse\n    rinse: {{ volume: 30 L, leave: 3 L }}\n  - description: drain again\n    drain: {{ leave: 3 L }}\n{extra}{ACID_STEP}");
        let r = e.run(&parse(&t)).unwrap();
        r.steps.last().unwrap().severity
    };
    assert_eq!(with(k), Severity::Clear, "k = {k}");
    assert!(
        with(k - 1) > Severity::Clear,
        "k − 1 = {} should not be enough",
        k - 1
    );
}

fn parse_err(text: &str) -> String {
    Procedure::parse(catalog(), "bad.yaml", text)
        .expect_err("refused")
        .to_string()
}

fn run_err(text: &str) -> String {
    let c = ctx();
    let e = Engine {
        cat: catalog(),
        th: &c.th,
        rules: &c.rules,
    };
    e.run(&parse(text)).expect_err("refused").to_string()
}

#[test]
fn bad_procedure_files_get_clear_errors() {
    let e = parse_err(&format!(
        "{HEEL}steps:\n  - description: boil it\n    boil: {{ time: 5 min }}\n"
    ));
    assert!(
        e.contains("bad.yaml:")
            && e.contains("unknown step kind `boil`")
            && e.contains("add, drain, rinse, hold"),
        "{e}"
    );
    let e = parse_err(&format!("{HEEL}steps:\n  - description: x\n    drain: {{ leave: 3 L }}\n    add: {{ volume: 1 L }}\n"));
    assert!(e.contains("exactly one kind"), "{e}");
    let e = parse_err("name: x\nsteps: []\n");
    assert!(e.contains("`vessel` is missing"), "{e}");
    let e = parse_err(&format!("{HEEL}colour: red\nsteps: []\n"));
    assert!(e.contains("unknown key `colour`"), "{e}");
    let e = parse_err(&format!("{HEEL}steps:\n  - description: add\n    add:\n      volume: 1 L\n      contents:\n        - unobtainium: 1 g/L\n"));
    assert!(
        e.contains("step 1") && e.contains("unknown substance"),
        "{e}"
    );
}

#[test]
fn draining_more_than_is_there_or_adding_past_capacity_is_refused() {
    let e = run_err(&format!(
        "{HEEL}steps:\n  - description: drain\n    drain: {{ remove: 80 L }}\n"
    ));
    assert!(
        e.contains("p.yaml:")
            && e.contains("step 1")
            && e.contains("removes 80 L but the vessel holds only 50"),
        "{e}"
    );
    let e = run_err(&format!(
        "{HEEL}steps:\n  - description: drain\n    drain: {{ leave: 60 L }}\n"
    ));
    assert!(e.contains("leaves 60 L"), "{e}");
    let e = run_err(&format!(
        "{HEEL}steps:\n  - description: fill\n    add:\n      volume: 60 L\n      contents: []\n"
    ));
    assert!(
        e.contains("step 1") && e.contains("more than its capacity"),
        "{e}"
    );
}

#[test]
fn the_demo_procedure_has_an_unsafe_step_that_its_computed_fix_clears() {
    let c = ctx();
    let e = Engine {
        cat: catalog(),
        th: &c.th,
        rules: &c.rules,
    };
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/data/demo/procedure-descale-tank.yaml"
    ))
    .unwrap();
    let p = parse(&text);
    let r = e.run(&p).unwrap();
    assert_eq!(r.severity, Severity::Stop);
    let fx = fixes(&e, &p, &r);
    assert!(
        fx.iter()
            .any(|f| f.step_severity_with_fix == Severity::Clear
                && f.procedure_severity_with_fix == Severity::Clear),
        "{fx:?}"
    );
}

#[test]
fn the_html_sheet_is_self_contained_and_has_sign_off_lines() {
    let c = ctx();
    let e = Engine {
        cat: catalog(),
        th: &c.th,
        rules: &c.rules,
    };
    let text = format!(
        "{HEEL}steps:\n  - description: drain <fast>\n    drain: {{ leave: 3 L }}\n{ACID_STEP}"
    );
    let r = e.run(&parse(&text)).unwrap();
    let html = offgas::output::sheet::procedure_html(&r);
    assert!(html.starts_with("<!DOCTYPE html>") && html.trim_end().ends_with("</html>"));
    for external in ["http://", "https://", "<link", "<script", "src=", "@import"] {
        assert!(!html.contains(external), "external asset: {external}");
    }
    assert!(html.contains("@page"), "print rules for paper");
    assert!(html.contains("drain &lt;fast&gt;"), "text is escaped");
    for who in ["Prepared by", "Reviewed by", "Date"] {
        assert!(html.contains(who));
    }
    // Balanced table tags.
    assert_eq!(html.matches("<tr").count(), html.matches("</tr>").count());
    assert_eq!(
        html.matches("<table>").count(),
        html.matches("</table>").count()
    );
}

#[test]
fn a_note_on_the_activity_model_is_never_the_target_of_a_fix() {
    // Sodium acetate brine poured onto the same: 3 mol/L, past the 1 mol/kg where the
    // extended Debye–Hückel form (acetate has no ion-interaction parameters) holds, nothing
    // near a level. The step is clear with a note, so there is no first problem and no
    // computed fix (no caustic to "cure" an ionic strength).
    let c = ctx();
    let e = Engine {
        cat: catalog(),
        th: &c.th,
        rules: &c.rules,
    };
    let text = "name: brine\nvessel:\n  name: tank\n  capacity: 100 L\n  volume: 40 L\n  closure: open\n  contents:\n    - sodium acetate: 3 mol/L\nsteps:\n  - description: add more brine\n    add:\n      name: brine\n      volume: 20 L\n      contents:\n        - sodium acetate: 3 mol/L\n";
    let p = parse(text);
    let r = e.run(&p).unwrap();
    assert_eq!(
        r.steps[0].severity,
        Severity::Clear,
        "{:?}",
        r.steps[0].findings
    );
    assert!(r.steps[0]
        .findings
        .iter()
        .any(|f| f.code == "outside-activity-model" && f.severity == Severity::Info));
    assert!(r.first_problem.is_none());
    assert!(fixes(&e, &p, &r).is_empty());
}
