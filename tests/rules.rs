//! Hazard rules: every built-in rule fires when its classes meet under its conditions and
//! stays silent when one is missing or a condition fails; site rules add and raise but
//! never lower; bad rule files get clear errors.

mod common;
use common::catalog;
use offgas::catalog::SubstanceId;
use offgas::judge::rules::evaluate::{Present, RuleContext};
use offgas::judge::rules::{Meeting, Origin, Rule, RuleSet};
use offgas::pour::pairs::Side;

fn builtin() -> RuleSet {
    offgas::embedded::rules(catalog()).expect("built-in rules load")
}

/// A substance carrying one of `group`'s classes, other than those already chosen.
fn member(group: &[String], taken: &[SubstanceId]) -> Option<SubstanceId> {
    let cat = catalog();
    (0..cat.substances.len()).map(SubstanceId).find(|id| {
        !taken.contains(id) && cat.substance(*id).classes.iter().any(|c| group.contains(c))
    })
}

/// A substance carrying none of the rule's classes (the inert partner of a negative test).
fn outsider(rule: &Rule) -> SubstanceId {
    let cat = catalog();
    let all: Vec<&String> = rule.meet.iter().flatten().collect();
    (0..cat.substances.len())
        .map(SubstanceId)
        .find(|id| {
            let s = cat.substance(*id);
            s.name == "sodium chloride" && !s.classes.iter().any(|c| all.contains(&c))
        })
        .expect("sodium chloride carries none of the classes")
}

/// A state along the pour that meets the rule's conditions.
fn satisfying(rule: &Rule, present: Vec<Present>) -> RuleContext {
    let w = &rule.when;
    let ph_min = w
        .ph_below
        .map(|v| v - 0.5)
        .unwrap_or(7.0)
        .min(w.ph_above.map(|v| v + 0.2).unwrap_or(14.0));
    let ph_max = w.ph_above.map(|v| v + 0.5).unwrap_or(7.0).max(ph_min);
    RuleContext {
        present,
        container_l: 1.0,
        stream_l: 1.0,
        ph_min,
        ph_max,
        temperature_max_c: w.temperature_above_c.map(|t| t + 5.0).unwrap_or(25.0),
    }
}

fn fired(set: &RuleSet, ctx: &RuleContext, id: &str) -> bool {
    set.evaluate(catalog(), ctx)
        .iter()
        .any(|h| h.rule.rule.id == id)
}

fn members_of(rule: &Rule) -> Vec<Present> {
    let mut taken = Vec::new();
    let mut present = Vec::new();
    for (i, group) in rule.meet.iter().enumerate() {
        let id = member(group, &taken)
            .unwrap_or_else(|| panic!("rule {}: no substance carries {:?}", rule.id, group));
        taken.push(id);
        let side = if rule.meeting == Meeting::Across && i == 0 {
            Side::Container
        } else {
            Side::Stream
        };
        present.push(Present {
            side,
            substance: id,
            // Enough to meet a concentration condition in a litre.
            moles: rule.when.min_mol_per_l.map_or(1.0, |c| (2.0 * c).max(1.0)),
        });
    }
    present
}

#[test]
fn at_least_35_built_in_rules_cover_the_required_hazards() {
    let set = builtin();
    assert!(set.rules.len() >= 35, "{} rules", set.rules.len());
    let has = |a: &str, b: &str| {
        set.rules.iter().any(|r| {
            r.rule.meet.iter().any(|g| g.iter().any(|c| c == a))
                && (b.is_empty() || r.rule.meet.iter().any(|g| g.iter().any(|c| c == b)))
        })
    };
    for (a, b) in [
        ("hypochlorite", "strong_acid"),
        ("hypochlorite", "ammonium"),
        ("hypochlorite", "amine"),
        ("hypochlorite", "cyanide"),
        ("chlorite", "strong_acid"),
        ("halogen_oxyanion", "strong_acid"),
        ("nitrite", "strong_acid"),
        ("thiosulfate", ""),
        ("azide", "heavy_metal"),
        ("oxidizing_acid", "organic"),
        ("peroxide", "heavy_metal"),
        ("peroxide", "reducer"),
        ("peroxide", "ketone"),
        ("aldehyde", "strong_acid"),
        ("active_metal", ""),
        ("hydride", ""),
        ("phosphide", ""),
        ("cyanide", "oxidizer"),
        ("sulfide", "oxidizer"),
        ("water_reactive", ""),
        ("oxidizer", "reducer"),
    ] {
        assert!(has(a, b), "no rule for {a} with {b}");
    }
}

#[test]
fn every_flagged_class_is_covered_by_a_built_in_rule() {
    // A class beyond the proton model has a presence rule (reviewed whenever it is in the
    // pour), unless its hazard needs a partner: then a rule about that meeting names it.
    let set = builtin();
    for class in catalog().classes.iter().filter(|c| c.beyond_proton_model) {
        let names = |r: &&offgas::judge::rules::LoadedRule| {
            r.rule.meet.iter().flatten().any(|c| c == &class.id)
        };
        if class.needs_partner {
            assert!(
                set.rules.iter().filter(names).any(|r| !r.rule.presence),
                "class {} needs a partner but no rule about a meeting names it",
                class.id
            );
        } else {
            assert!(
                set.rules
                    .iter()
                    .filter(names)
                    .any(|r| r.rule.presence && r.rule.meet.len() == 1),
                "class {} is flagged beyond the proton model but has no presence rule",
                class.id
            );
        }
    }
}

/// The rule on its own: a presence rule stays quiet where another rule names the same
/// component, so it is tested without the others.
fn alone(lr: &offgas::judge::rules::LoadedRule) -> RuleSet {
    RuleSet {
        rules: vec![lr.clone()],
    }
}

#[test]
fn every_built_in_rule_fires_when_its_classes_meet() {
    for lr in &builtin().rules {
        let set = alone(lr);
        let ctx = satisfying(&lr.rule, members_of(&lr.rule));
        assert!(
            fired(&set, &ctx, &lr.rule.id),
            "rule {} did not fire on {:?}",
            lr.rule.id,
            ctx
        );
    }
}

#[test]
fn every_built_in_rule_is_silent_when_a_class_is_missing() {
    let set = builtin();
    for lr in &set.rules {
        let mut present = members_of(&lr.rule);
        // Replace the last group's member with a plain salt.
        let last = present.len() - 1;
        present[last].substance = outsider(&lr.rule);
        let ctx = satisfying(&lr.rule, present);
        assert!(
            !fired(&set, &ctx, &lr.rule.id),
            "rule {} fired without its last group",
            lr.rule.id
        );
    }
}

#[test]
fn every_conditional_rule_is_silent_when_its_condition_fails() {
    let set = builtin();
    let mut conditional = 0;
    for lr in &set.rules {
        let w = &lr.rule.when;
        let mut ctx = satisfying(&lr.rule, members_of(&lr.rule));
        if let Some(hi) = w.ph_below {
            conditional += 1;
            ctx.ph_min = hi + 0.5;
            ctx.ph_max = ctx.ph_max.max(ctx.ph_min);
            assert!(
                !fired(&set, &ctx, &lr.rule.id),
                "rule {} fired above pH {hi}",
                lr.rule.id
            );
        }
        if let Some(lo) = w.ph_above {
            conditional += 1;
            let mut ctx = satisfying(&lr.rule, members_of(&lr.rule));
            ctx.ph_max = lo - 0.5;
            ctx.ph_min = ctx.ph_min.min(ctx.ph_max);
            assert!(
                !fired(&set, &ctx, &lr.rule.id),
                "rule {} fired below pH {lo}",
                lr.rule.id
            );
        }
        if let Some(c) = w.min_mol_per_l {
            conditional += 1;
            let mut ctx = satisfying(&lr.rule, members_of(&lr.rule));
            ctx.container_l = 2.0 / c.max(1e-12);
            ctx.stream_l = ctx.container_l;
            assert!(
                !fired(&set, &ctx, &lr.rule.id),
                "rule {} fired below {c} mol/L",
                lr.rule.id
            );
        }
    }
    assert!(
        conditional >= 5,
        "only {conditional} conditional rules tested"
    );
}

#[test]
fn across_means_one_group_on_each_side() {
    let cat = catalog();
    let text = "description: t\nrules:\n  - id: acid-across\n    meet: [[hypochlorite], [strong_acid]]\n    meeting: across\n    severity: stop\n    message: m\n    caution: c\n    basis: b\n";
    let rules = RuleSet::parse_file(
        cat,
        "t.yaml",
        text,
        Origin::Site {
            file: "t.yaml".into(),
        },
    )
    .unwrap();
    let mut set = RuleSet::default();
    set.extend(rules).unwrap();
    let bleach = cat.find_substance("sodium hypochlorite").unwrap();
    let acid = cat.find_substance("hydrogen chloride").unwrap();
    let ctx = |a: Side, b: Side| RuleContext {
        present: vec![
            Present {
                side: a,
                substance: bleach,
                moles: 1.0,
            },
            Present {
                side: b,
                substance: acid,
                moles: 1.0,
            },
        ],
        container_l: 1.0,
        stream_l: 1.0,
        ph_min: 2.0,
        ph_max: 9.0,
        temperature_max_c: 25.0,
    };
    assert!(fired(
        &set,
        &ctx(Side::Container, Side::Stream),
        "acid-across"
    ));
    assert!(fired(
        &set,
        &ctx(Side::Stream, Side::Container),
        "acid-across"
    ));
    assert!(!fired(
        &set,
        &ctx(Side::Container, Side::Container),
        "acid-across"
    ));
}

fn parse(
    text: &str,
) -> Result<Vec<offgas::judge::rules::LoadedRule>, Vec<offgas::judge::rules::RuleError>> {
    RuleSet::parse_file(
        catalog(),
        "site/bad.yaml",
        text,
        Origin::Site {
            file: "site/bad.yaml".into(),
        },
    )
}

fn first_error(text: &str) -> String {
    parse(text)
        .expect_err("should be refused")
        .iter()
        .map(|e| e.to_string())
        .collect::<Vec<_>>()
        .join("\n")
}

const HEAD: &str = "description: site rules\nrules:\n";

#[test]
fn bad_rule_files_get_clear_errors() {
    let e = first_error(&format!("{HEAD}  - id: x\n    meet: [[hypochlorit]]\n    severity: stop\n    message: m\n    caution: c\n    basis: b\n"));
    assert!(
        e.contains("site/bad.yaml:3")
            && e.contains("unknown hazard class `hypochlorit`")
            && e.contains("hypochlorite"),
        "{e}"
    );
    let e = first_error(&format!("{HEAD}  - id: x\n    meet: [[cyanide]]\n    colour: red\n    severity: stop\n    message: m\n    caution: c\n    basis: b\n"));
    assert!(
        e.contains("unknown field `colour`") && e.contains("site/bad.yaml:"),
        "{e}"
    );
    let e = first_error(&format!("{HEAD}  - id: x\n    meet: [[cyanide]]\n    when: {{ ph_below: 15 }}\n    severity: stop\n    message: m\n    caution: c\n    basis: b\n"));
    assert!(e.contains("can never hold"), "{e}");
    let e = first_error(&format!("{HEAD}  - id: x\n    meet: [[cyanide]]\n    when: {{ ph_above: 9, ph_below: 4 }}\n    severity: stop\n    message: m\n    caution: c\n    basis: b\n"));
    assert!(e.contains("empty band"), "{e}");
    let e = first_error(&format!("{HEAD}  - id: x\n    meet: [[cyanide]]\n    when: {{ temperature_above_c: 120 }}\n    severity: stop\n    message: m\n    caution: c\n    basis: b\n"));
    assert!(e.contains("can never hold"), "{e}");
    let e = first_error(&format!("{HEAD}  - id: x\n    meet: [[cyanide]]\n    severity: severe\n    message: m\n    caution: c\n    basis: b\n"));
    assert!(e.contains("severe"), "{e}");
    let e = first_error("description: x\nrules:\n  - id: [unclosed\n");
    assert!(
        e.contains("site/bad.yaml:") && e.contains("not a readable rule file"),
        "{e}"
    );
}

#[test]
fn site_rules_add_and_raise_but_never_lower() {
    let cat = catalog();
    let mut set = builtin();
    let add = parse(&format!("{HEAD}  - id: no-cyanide-in-shared-carboys\n    meet: [[cyanide]]\n    severity: stop\n    message: Site policy forbids cyanide in shared carboys.\n    caution: Use the cyanide-only carboy.\n    basis: site EHS policy\n  - id: stricter-bleach-organics\n    raises: hypochlorite-with-organics\n    meet: [[hypochlorite], [organic, flammable_liquid]]\n    severity: stop\n    message: Site policy.\n    caution: Separate.\n    basis: site EHS policy\n")).unwrap();
    set.extend(add).unwrap();
    let lower = parse(&format!("{HEAD}  - id: softer-bleach-acid\n    raises: hypochlorite-with-acid\n    meet: [[hypochlorite], [strong_acid]]\n    severity: review\n    message: m\n    caution: c\n    basis: b\n")).unwrap();
    let e = set.clone().extend(lower).expect_err("lowering is refused");
    assert!(e[0].message.contains("may only raise"), "{}", e[0]);
    let dup = parse(&format!("{HEAD}  - id: hypochlorite-with-acid\n    meet: [[hypochlorite]]\n    severity: stop\n    message: m\n    caution: c\n    basis: b\n")).unwrap();
    assert!(set.clone().extend(dup).is_err());
    let unknown = parse(&format!("{HEAD}  - id: y\n    raises: no-such-rule\n    meet: [[hypochlorite]]\n    severity: stop\n    message: m\n    caution: c\n    basis: b\n")).unwrap();
    assert!(set.clone().extend(unknown).is_err());
    let sid = cat.find_substance("sodium cyanide").unwrap();
    let ctx = RuleContext {
        present: vec![Present {
            side: Side::Container,
            substance: sid,
            moles: 0.01,
        }],
        container_l: 10.0,
        stream_l: 10.0,
        ph_min: 11.0,
        ph_max: 12.0,
        temperature_max_c: 20.0,
    };
    let hits = set.evaluate(cat, &ctx);
    let hit = hits
        .iter()
        .find(|h| h.rule.rule.id == "no-cyanide-in-shared-carboys")
        .expect("site rule fires");
    assert!(matches!(hit.rule.origin, Origin::Site { .. }));
}

#[test]
fn a_raising_site_rule_lifts_the_finding_in_a_check_and_says_so() {
    use offgas::check::{check, CheckOptions};
    use offgas::pour::batch::Batch;
    use offgas::report::Severity;
    let cat = catalog();
    let mut set = builtin();
    set.extend(parse(&format!("{HEAD}  - id: stricter-bleach-organics\n    raises: hypochlorite-with-organics\n    meet: [[hypochlorite], [organic, flammable_liquid]]\n    severity: stop\n    message: Site policy.\n    caution: Separate.\n    basis: site EHS policy\n")).unwrap()).unwrap();
    let carboy = Batch::parse(cat, "c.yaml", "name: c\ncapacity: 20 L\nvolume: 5 L\ncontents:\n  - ethanol: 1 % w/w\n  - sodium hydroxide: 0.01 mol/L\n").unwrap();
    let stream = Batch::parse(
        cat,
        "s.yaml",
        "name: s\nvolume: 1 L\ncontents:\n  - bleach: 20 mL\n",
    )
    .unwrap();
    let th = offgas::embedded::thresholds().unwrap();
    let plain = check(
        cat,
        &th,
        &builtin(),
        &carboy,
        &stream,
        &CheckOptions::default(),
    )
    .unwrap();
    let f = plain
        .findings
        .iter()
        .find(|f| f.code == "hypochlorite-with-organics")
        .unwrap();
    assert_eq!(f.severity, Severity::Review);
    assert_eq!(plain.severity, Severity::Review);
    let site = check(cat, &th, &set, &carboy, &stream, &CheckOptions::default()).unwrap();
    let f = site
        .findings
        .iter()
        .find(|f| f.code == "hypochlorite-with-organics")
        .unwrap();
    assert_eq!(f.severity, Severity::Stop);
    assert!(
        f.origin
            .contains("raised by site rule stricter-bleach-organics"),
        "{}",
        f.origin
    );
    assert_eq!(site.severity, Severity::Stop);
    // Findings the chemistry computed are all still there, none lowered.
    for pf in &plain.findings {
        let sf = site
            .findings
            .iter()
            .find(|s| s.code == pf.code)
            .expect("kept");
        assert!(sf.severity >= pf.severity);
    }
}
