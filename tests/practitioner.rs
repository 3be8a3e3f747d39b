//! The practitioner battery: everyday waste pours with the verdict a practitioner expects
//! (tests/practitioner/cases.yaml, written before offgas was run on them), each checked in
//! full. A stop on a routine pour or a clear on a hazard fails the suite, and so does any
//! verdict the case does not accept, or a leading reason that is not the one the case names.

mod common;
use common::catalog;
use offgas::check::{check, CheckOptions};
use offgas::pour::batch::Batch;
use offgas::report::{CheckReport, Severity};
use serde::Deserialize;

const CASES: &str = include_str!("practitioner/cases.yaml");

#[derive(Deserialize)]
struct Battery {
    #[allow(dead_code)]
    description: String,
    cases: Vec<Case>,
}

#[derive(Deserialize, Clone, Copy, PartialEq, Eq, Debug)]
#[serde(rename_all = "lowercase")]
enum Kind {
    Routine,
    Hazard,
}

#[derive(Deserialize)]
struct Case {
    id: String,
    kind: Kind,
    title: String,
    container: serde_yaml::Value,
    stream: serde_yaml::Value,
    expect: String,
    #[serde(default)]
    also_acceptable: Vec<String>,
    #[serde(default)]
    decided_by: Vec<String>,
    basis: String,
}

fn severity(word: &str) -> Severity {
    match word {
        "clear" => Severity::Clear,
        "review" => Severity::Review,
        "stop" => Severity::Stop,
        other => panic!("unknown verdict `{other}` in the battery"),
    }
}

fn batch(case: &str, what: &str, v: &serde_yaml::Value) -> Batch {
    let text = serde_yaml::to_string(v).unwrap();
    Batch::parse(catalog(), &format!("{case} ({what})"), &text)
        .unwrap_or_else(|e| panic!("case {case}: the {what} does not parse: {e}"))
}

fn run(case: &Case) -> CheckReport {
    let th = offgas::embedded::thresholds().unwrap();
    let rules = offgas::embedded::rules(catalog()).unwrap();
    check(
        catalog(),
        &th,
        &rules,
        &batch(&case.id, "container", &case.container),
        &batch(&case.id, "stream", &case.stream),
        &CheckOptions::default(),
    )
    .unwrap_or_else(|e| panic!("case {}: the check failed: {e}", case.id))
}

/// The finding that decides the verdict: the first one at the verdict's severity.
fn headline(r: &CheckReport) -> String {
    r.findings
        .iter()
        .find(|f| f.severity == r.severity)
        .map(|f| format!("{} {}", f.code, f.message))
        .unwrap_or_default()
}

#[test]
fn the_battery_is_large_and_balanced() {
    let b: Battery = serde_yaml::from_str(CASES).unwrap();
    let routine = b.cases.iter().filter(|c| c.kind == Kind::Routine).count();
    let hazards = b.cases.len() - routine;
    assert!(b.cases.len() >= 60, "{} cases", b.cases.len());
    assert!(routine >= 25, "{routine} routine cases");
    assert!(hazards >= 20, "{hazards} hazards");
    let mut ids: Vec<&str> = b.cases.iter().map(|c| c.id.as_str()).collect();
    ids.sort();
    ids.dedup();
    assert_eq!(ids.len(), b.cases.len(), "ids must be unique");
    for c in &b.cases {
        assert!(!c.basis.trim().is_empty(), "{}: no basis", c.id);
        assert!(!c.title.trim().is_empty(), "{}: no title", c.id);
        severity(&c.expect);
        c.also_acceptable.iter().for_each(|a| {
            severity(a);
        });
    }
}

#[test]
fn every_pour_comes_out_as_a_practitioner_expects() {
    let b: Battery = serde_yaml::from_str(CASES).unwrap();
    let mut failures = Vec::new();
    let mut lines = Vec::new();
    let (mut routine_clear, mut routine, mut hazards_caught, mut hazards) = (0, 0, 0, 0);
    for case in &b.cases {
        let r = run(case);
        let got = r.severity;
        let expected = severity(&case.expect);
        let accepted = got == expected || case.also_acceptable.iter().any(|a| severity(a) == got);
        let head = headline(&r);
        let reason_ok = got == Severity::Clear
            || case.decided_by.is_empty()
            || case
                .decided_by
                .iter()
                .any(|w| head.to_lowercase().contains(&w.to_lowercase()));
        match case.kind {
            Kind::Routine => {
                routine += 1;
                if got == Severity::Clear {
                    routine_clear += 1;
                }
                if got == Severity::Stop {
                    failures.push(format!("FALSE STOP on routine pour {}: {head}", case.id));
                }
            }
            Kind::Hazard => {
                hazards += 1;
                if got >= Severity::Review {
                    hazards_caught += 1;
                }
                if got == Severity::Clear {
                    failures.push(format!("MISSED HAZARD {}: cleared", case.id));
                }
            }
        }
        if !accepted {
            failures.push(format!(
                "{}: expected {} (or {:?}), got {}: {head}",
                case.id, case.expect, case.also_acceptable, got
            ));
        } else if !reason_ok {
            failures.push(format!(
                "{}: {} as expected, but the leading reason does not name any of {:?}: {head}",
                case.id, got, case.decided_by
            ));
        }
        let short: String = head.chars().take(110).collect();
        lines.push(format!(
            "{:<7} {:<6} {:<6} {} {}",
            format!("{:?}", case.kind).to_lowercase(),
            case.expect,
            got.word(),
            case.id,
            short
        ));
    }
    println!("{}", lines.join("\n"));
    println!(
        "routine pours clear: {routine_clear} of {routine}; hazards at review or stop: {hazards_caught} of {hazards}"
    );
    assert!(
        failures.is_empty(),
        "{} of {} cases did not come out as expected:\n{}",
        failures.len(),
        b.cases.len(),
        failures.join("\n")
    );
}
