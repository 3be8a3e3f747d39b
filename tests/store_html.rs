//! The audit page's drawings, checked against the report they draw: a well-formed HTML5
//! page with nothing outside it; every container of a cabinet with a finding in its
//! matrix, every cell large enough and captioned, coloured as the findings say; a key with
//! a swatch for every kind of cell; bars that count the findings; and every suggested move
//! drawn leaving and arriving.

mod common;
use common::catalog;
use offgas::report::Severity;
use offgas::store::audit::{AuditSettings, Auditor, PairJudge};
use offgas::store::report::AuditReport;
use offgas::store::Inventory;
use scraper::{ElementRef, Html, Selector};
use std::collections::{BTreeSet, HashMap};

/// A shelf with stop pairs across spill zones of one cabinet, a review pair decided by a
/// rule in one spill zone, and two cabinets where nothing meets badly.
const MIXED_SHELF: &str = r#"name: "Mixed shelf (invented)"
locations:
  - { path: Lab 2 / Cabinet A / Tray 1, capacity: 4 }
  - { path: Lab 2 / Cabinet A / Tray 2, capacity: 4 }
  - { path: Lab 2 / Cabinet A / Tray 3, capacity: 4 }
  - { path: Lab 2 / Cabinet B / Tray 1, capacity: 4 }
  - { path: Lab 2 / Cabinet C / Tray 1, capacity: 4 }
containers:
  - { id: A-01, location: Lab 2 / Cabinet A / Tray 1, size: 0.5 L, substance: sodium cyanide, amount: 50 g }
  - { id: A-02, location: Lab 2 / Cabinet A / Tray 2, size: 1 L, substance: "hydrochloric acid, concentrated", amount: 1 L }
  - { id: A-03, location: Lab 2 / Cabinet A / Tray 3, size: 1 L, substance: dichloromethane, amount: 1 L }
  - { id: A-04, location: Lab 2 / Cabinet A / Tray 3, size: 1 L, substance: sodium sulfite, amount: 20 g }
  - { id: A-05, location: Lab 2 / Cabinet A / Tray 3, size: 1 L, substance: sodium hydroxide, amount: 100 g }
  - { id: A-06, location: Lab 2 / Cabinet A / Tray 1, size: 1 L, substance: ammonium chloride, amount: 20 g }
  - { id: B-01, location: Lab 2 / Cabinet B / Tray 1, size: 1 L, substance: acetone, amount: 1 L }
  - { id: B-02, location: Lab 2 / Cabinet B / Tray 1, size: 1 L, substance: ethanol, amount: 1 L }
  - { id: C-01, location: Lab 2 / Cabinet C / Tray 1, size: 1 L, substance: sodium chloride, amount: 100 g }
"#;

fn demo_store() -> Inventory {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/data/demo/storeroom.yaml"
    ))
    .unwrap();
    Inventory::parse(catalog(), "storeroom.yaml", &text).unwrap()
}

fn mixed_shelf() -> Inventory {
    Inventory::parse(catalog(), "shelf.yaml", MIXED_SHELF).unwrap()
}

/// The audit of `inv`, with the suggested moves when `suggest` is set.
fn audit(inv: &Inventory, suggest: bool) -> AuditReport {
    audit_with(inv, suggest, true)
}

fn audit_with(inv: &Inventory, suggest: bool, cabinet_level: bool) -> AuditReport {
    let th = offgas::embedded::thresholds().unwrap();
    let rules = offgas::embedded::rules(catalog()).unwrap();
    let auditor = Auditor {
        cat: catalog(),
        th: &th,
        rules: &rules,
        settings: AuditSettings {
            spill_area_m2: 0.25,
            cabinet_level,
        },
    };
    let mut r = auditor.audit(inv, &|_, _| {});
    if suggest {
        let judge = PairJudge::new(&auditor, inv);
        r.suggestion = Some(offgas::store::suggest::suggest(
            inv,
            &judge,
            cabinet_level,
            th.storeroom.spare_places_per_tray,
        ));
    }
    r
}

fn sel(s: &str) -> Selector {
    Selector::parse(s).unwrap()
}

fn attr<'a>(e: &ElementRef<'a>, name: &str) -> &'a str {
    e.value()
        .attr(name)
        .unwrap_or_else(|| panic!("<{}> has no {name}", e.value().name()))
}

fn num(e: &ElementRef, name: &str) -> f64 {
    attr(e, name)
        .parse()
        .unwrap_or_else(|_| panic!("{name} is not a number"))
}

type Case = (&'static str, Inventory, AuditReport, String);

/// The cases, each audited once: (name, inventory, report, page), with and without moves.
fn cases() -> &'static [Case] {
    static CASES: std::sync::OnceLock<Vec<Case>> = std::sync::OnceLock::new();
    CASES.get_or_init(|| {
        let mut out = Vec::new();
        for (name, inv) in [("demo", demo_store()), ("mixed shelf", mixed_shelf())] {
            for suggest in [false, true] {
                let r = audit(&inv, suggest);
                let page = offgas::output::audit::audit_html(&r);
                out.push((name, inv.clone(), r, page));
            }
        }
        out
    })
}

/// The inventory's containers in a cabinet, by id.
fn containers_in(inv: &Inventory, cabinet: &str) -> BTreeSet<String> {
    inv.containers
        .iter()
        .filter(|c| inv.cabinet_path(&c.path).join(" / ") == cabinet)
        .map(|c| c.id.clone())
        .collect()
}

/// The matrix drawing of a cabinet.
fn matrix<'a>(doc: &'a Html, cabinet: &str) -> ElementRef<'a> {
    let label = format!("pair matrix of {cabinet}");
    doc.select(&sel("svg.matrix"))
        .find(|s| s.value().attr("aria-label") == Some(label.as_str()))
        .unwrap_or_else(|| panic!("no matrix for {cabinet}"))
}

#[test]
fn the_page_is_well_formed_html5_and_names_nothing_outside_itself() {
    for (name, _, _, page) in cases() {
        let doc = Html::parse_document(page);
        assert!(doc.errors.is_empty(), "{name}: {:?}", doc.errors);
        for e in doc.select(&sel("*")) {
            for (k, v) in e.value().attrs() {
                assert!(
                    !matches!(k, "src" | "href" | "xlink:href" | "srcset" | "action"),
                    "{name}: <{} {k}={v}> points outside the page",
                    e.value().name()
                );
                assert!(!v.contains("url("), "{name}: {k}={v}");
            }
        }
        for outside in ["url(", "@import", "http:", "https:", "<script", "<link"] {
            assert!(!page.contains(outside), "{name}: {outside}");
        }
    }
}

#[test]
fn every_container_of_a_cabinet_with_a_finding_is_in_its_matrix_by_spill_zone() {
    for (name, inv, r, page) in cases() {
        let doc = Html::parse_document(page);
        assert!(!r.cabinets.is_empty(), "{name}: the case has findings");
        assert_eq!(
            doc.select(&sel("svg.matrix")).count(),
            r.cabinets.len(),
            "{name}"
        );
        for m in &r.cabinets {
            let svg = matrix(&doc, &m.cabinet);
            let rows: Vec<String> = svg
                .select(&sel("text.row-id"))
                .map(|t| t.text().collect::<String>().trim().to_string())
                .collect();
            let columns: Vec<String> = svg
                .select(&sel("text.column-id"))
                .map(|t| t.text().collect::<String>().trim().to_string())
                .collect();
            assert_eq!(rows, m.ids, "{name}: rows of {}", m.cabinet);
            assert_eq!(columns, m.ids, "{name}: columns of {}", m.cabinet);
            let drawn: BTreeSet<String> = rows.into_iter().collect();
            assert_eq!(
                drawn,
                containers_in(inv, &m.cabinet),
                "{name}: {}",
                m.cabinet
            );
            // Spill zones stand together: each zone is one run of rows.
            let mut seen = BTreeSet::new();
            for (k, z) in m.zones.iter().enumerate() {
                if k == 0 || m.zones[k - 1] != *z {
                    assert!(seen.insert(z.clone()), "{name}: {z} split in two");
                }
            }
            assert_eq!(
                svg.select(&sel("rect.zone-block")).count(),
                seen.len(),
                "{name}: one outlined block per spill zone"
            );
        }
    }
}

#[test]
fn cells_are_large_and_captioned_and_coloured_as_the_findings_say() {
    for (name, _, r, page) in cases() {
        let doc = Html::parse_document(page);
        // Each finding by its two containers, either way round.
        let mut found: HashMap<(String, String), (Severity, String)> = HashMap::new();
        for f in &r.findings {
            let level = format!("{:?}", f.level).to_lowercase();
            found.insert(
                (f.a.id.clone(), f.b.id.clone()),
                (f.severity, level.clone()),
            );
            found.insert((f.b.id.clone(), f.a.id.clone()), (f.severity, level));
        }
        let mut coloured = 0;
        for m in &r.cabinets {
            let svg = matrix(&doc, &m.cabinet);
            let n = m.ids.len();
            let cells: Vec<ElementRef> = svg.select(&sel("rect.cell")).collect();
            assert_eq!(cells.len(), n * n, "{name}: {}", m.cabinet);
            for c in cells {
                assert!(num(&c, "width") >= 24.0 && num(&c, "height") >= 24.0);
                let (i, j) = (num(&c, "data-i") as usize, num(&c, "data-j") as usize);
                let (a, b) = (&m.ids[i], &m.ids[j]);
                let title: String = c
                    .select(&sel("title"))
                    .next()
                    .map(|t| t.text().collect())
                    .unwrap_or_default();
                let severity = attr(&c, "data-severity");
                if i == j {
                    assert_eq!(severity, "itself");
                    continue;
                }
                assert!(
                    title.starts_with(&format!("{a} × {b}: ")),
                    "{name}: caption of {a} × {b}: {title:?}"
                );
                match found.get(&(a.clone(), b.clone())) {
                    Some((s, level)) => {
                        coloured += 1;
                        assert_eq!(severity, s.word(), "{name}: {a} × {b}");
                        assert_eq!(attr(&c, "data-level"), level, "{name}: {a} × {b}");
                        let f = r
                            .findings
                            .iter()
                            .find(|f| (&f.a.id, &f.b.id) == (a, b) || (&f.a.id, &f.b.id) == (b, a))
                            .unwrap();
                        match &f.gas {
                            Some(g) => {
                                assert!(title.contains(&format!("{g} at ")), "{name}: {title}")
                            }
                            None => assert!(
                                title.contains(&format!("by rule {}", f.codes[0])),
                                "{name}: {title}"
                            ),
                        }
                        assert!(title.contains(&format!(": {} (same ", s.word())));
                    }
                    None => {
                        assert_eq!(severity, "clear", "{name}: {a} × {b}");
                        assert!(title.contains(": clear"), "{name}: {title}");
                    }
                }
            }
        }
        // Every finding is drawn, in both halves of its matrix.
        assert_eq!(coloured, 2 * r.findings.len(), "{name}");
    }
}

#[test]
fn the_key_has_a_swatch_for_every_kind_of_cell() {
    for (name, _, _, page) in cases() {
        let doc = Html::parse_document(page);
        let key = doc
            .select(&sel("svg.legend"))
            .next()
            .unwrap_or_else(|| panic!("{name}: no key"));
        for class in [
            "stop-zone",
            "stop-cabinet",
            "review-zone",
            "review-cabinet",
            "clear",
            "itself",
        ] {
            let swatch = key
                .select(&sel(&format!("g.swatch[data-class=\"{class}\"]")))
                .next()
                .unwrap_or_else(|| panic!("{name}: no swatch for {class}"));
            let rect = swatch.select(&sel("rect")).next().expect("a drawn swatch");
            assert!(num(&rect, "width") >= 12.0, "{name}: {class}");
            // Hatched exactly where the pair is across spill zones.
            let hatched = swatch.select(&sel("line")).count() > 0;
            assert_eq!(hatched, class.ends_with("-cabinet"), "{name}: {class}");
        }
        for class in ["stop", "review"] {
            let shades: Vec<String> = key
                .select(&sel(&format!("g.shade[data-class=\"{class}\"] rect")))
                .map(|r| attr(&r, "fill").to_string())
                .collect();
            let distinct: BTreeSet<&String> = shades.iter().collect();
            assert!(
                shades.len() >= 3 && distinct.len() == shades.len(),
                "{name}: shades of {class}: {shades:?}"
            );
        }
        assert!(key.text().any(|t| t.contains("darker")), "{name}");
    }
}

#[test]
fn the_bars_count_the_stop_and_review_pairs_of_each_cabinet() {
    for (name, inv, r, page) in cases() {
        let doc = Html::parse_document(page);
        let chart = doc
            .select(&sel("svg.bars"))
            .next()
            .unwrap_or_else(|| panic!("{name}: no bar chart"));
        let bars: Vec<ElementRef> = chart.select(&sel("g.bar")).collect();
        assert_eq!(bars.len(), 2 * r.cabinets.len(), "{name}");
        for m in &r.cabinets {
            let members = containers_in(inv, &m.cabinet);
            for s in [Severity::Stop, Severity::Review] {
                let want = r
                    .findings
                    .iter()
                    .filter(|f| f.severity == s && members.contains(&f.a.id))
                    .count();
                let bar = bars
                    .iter()
                    .find(|b| attr(b, "data-row") == m.cabinet && attr(b, "data-class") == s.word())
                    .unwrap_or_else(|| panic!("{name}: no {s} bar for {}", m.cabinet));
                assert_eq!(num(bar, "data-count") as usize, want, "{name}: {s}");
            }
        }
        // The two classes differ in pattern, not only in colour.
        let lines = |class: &str| {
            chart
                .select(&sel(&format!("g.bar[data-class=\"{class}\"] line")))
                .count()
        };
        let review_drawn = bars
            .iter()
            .any(|b| attr(b, "data-class") == "review" && num(b, "data-count") > 0.0);
        assert!(lines("stop") == 0 && (!review_drawn || lines("review") > 0));
        assert!(
            chart.select(&sel("g.key line")).count() > 0,
            "{name}: the hatched key"
        );
    }
}

#[test]
fn each_moved_container_is_drawn_leaving_and_arriving() {
    for (name, _, r, page) in cases() {
        let doc = Html::parse_document(page);
        let drawings: Vec<ElementRef> = doc.select(&sel("svg.moves")).collect();
        let Some(s) = &r.suggestion else {
            assert!(drawings.is_empty(), "{name}: no moves without --suggest");
            continue;
        };
        assert!(!s.moves.is_empty(), "{name}: the case has moves");
        assert_eq!(drawings.len(), s.cabinets.len(), "{name}");
        let drawing_of = |zone: &str| {
            drawings
                .iter()
                .find(|d| {
                    let c = attr(d, "data-cabinet");
                    zone == c || zone.starts_with(&format!("{c} / "))
                })
                .unwrap_or_else(|| panic!("{name}: no drawing holds {zone}"))
        };
        for m in &s.moves {
            for (zone, stage, state) in [(&m.from, "before", "leaves"), (&m.to, "after", "arrives")]
            {
                let chip = drawing_of(zone)
                    .select(&sel(&format!(
                        "g.stage[data-stage=\"{stage}\"] g.chip[data-id=\"{}\"]",
                        m.id
                    )))
                    .next()
                    .unwrap_or_else(|| panic!("{name}: {} not drawn {stage}", m.id));
                assert_eq!(attr(&chip, "data-state"), state, "{name}: {}", m.id);
                // And in words, for a printed page.
                let (class, verb) = if stage == "before" {
                    ("goes", "goes to")
                } else {
                    ("comes", "comes from")
                };
                let said = drawing_of(zone)
                    .select(&sel(&format!("text.{class}")))
                    .map(|t| t.text().collect::<String>())
                    .any(|t| t.trim().starts_with(&format!("{} {verb} ", m.id)));
                assert!(said, "{name}: {} {verb} ...", m.id);
                assert_eq!(attr(&chip, "data-zone"), zone.to_string());
            }
        }
        // The pair counts drawn are the suggestion's, cabinet by cabinet and in all.
        let (mut fewer_stops, mut fewer_reviews) = (0i64, 0i64);
        for (d, c) in drawings.iter().zip(&s.cabinets) {
            assert_eq!(attr(d, "data-cabinet"), c.cabinet);
            for (stage, stops, reviews) in [
                ("before", c.stop_pairs_before, c.review_pairs_before),
                ("after", c.stop_pairs_after, c.review_pairs_after),
            ] {
                let g = d
                    .select(&sel(&format!("g.stage[data-stage=\"{stage}\"]")))
                    .next()
                    .unwrap();
                assert_eq!(num(&g, "data-stop") as usize, stops);
                assert_eq!(num(&g, "data-review") as usize, reviews);
                let words: String = g
                    .select(&sel("text.pair-counts"))
                    .flat_map(|t| t.text())
                    .collect();
                assert_eq!(
                    words.trim(),
                    format!("{stops} stop, {reviews} review pairs")
                );
            }
            fewer_stops += c.stop_pairs_before as i64 - c.stop_pairs_after as i64;
            fewer_reviews += c.review_pairs_before as i64 - c.review_pairs_after as i64;
        }
        assert_eq!(
            fewer_stops,
            s.stop_pairs_before as i64 - s.stop_pairs_after as i64,
            "{name}"
        );
        assert_eq!(
            fewer_reviews,
            s.review_pairs_before as i64 - s.review_pairs_after as i64,
            "{name}"
        );
    }
}

#[test]
fn cabinets_with_no_finding_are_named_as_clear() {
    let r = audit(&mixed_shelf(), false);
    assert_eq!(r.clear_cabinets, ["Lab 2 / Cabinet B", "Lab 2 / Cabinet C"]);
    let doc = Html::parse_document(&offgas::output::audit::audit_html(&r));
    let sentence: String = doc
        .select(&sel("p.clear-cabinets"))
        .flat_map(|p| p.text())
        .collect();
    assert!(
        sentence.contains("Lab 2 / Cabinet B") && sentence.contains("Lab 2 / Cabinet C"),
        "{sentence}"
    );
    assert!(doc.select(&sel("svg.matrix")).count() == 1);
    // The demo has a finding in each of its cabinets.
    let demo = audit(&demo_store(), false);
    assert!(demo.clear_cabinets.is_empty());
    assert!(!offgas::output::audit::audit_html(&demo).contains("class=\"clear-cabinets\""));
}

#[test]
fn pairs_across_spill_zones_are_drawn_as_not_paired_when_only_spill_zones_are_paired() {
    let inv = mixed_shelf();
    let r = audit_with(&inv, false, false);
    let page = offgas::output::audit::audit_html(&r);
    let doc = Html::parse_document(&page);
    assert!(doc.errors.is_empty(), "{:?}", doc.errors);
    let m = &r.cabinets[0];
    assert_eq!(
        m.ids.iter().cloned().collect::<BTreeSet<_>>(),
        containers_in(&inv, &m.cabinet),
        "every container, paired or not"
    );
    let svg = matrix(&doc, &m.cabinet);
    let mut apart = 0;
    for c in svg.select(&sel("rect.cell")) {
        let (i, j) = (num(&c, "data-i") as usize, num(&c, "data-j") as usize);
        let title: String = c.select(&sel("title")).flat_map(|t| t.text()).collect();
        if i != j && m.zones[i] != m.zones[j] {
            apart += 1;
            assert_eq!(attr(&c, "data-severity"), "not-paired", "{title}");
            assert!(title.contains("not paired"), "{title}");
        } else if i != j {
            assert_ne!(attr(&c, "data-severity"), "not-paired", "{title}");
        }
    }
    assert_eq!(apart, 2 * m.apart.len());
    assert!(apart > 0);
    assert!(doc
        .select(&sel("svg.legend g.swatch[data-class=\"not-paired\"]"))
        .next()
        .is_some());
    // With every pair of a cabinet paired, no key for it.
    let all = audit(&inv, false);
    assert!(all.cabinets.iter().all(|m| m.apart.is_empty()));
    assert!(!offgas::output::audit::audit_html(&all).contains("data-class=\"not-paired\""));
}
