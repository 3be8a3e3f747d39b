//! The check page's plots: a well-formed HTML5 page with nothing outside it, whose drawn
//! points are the JSON report's path and whose ringed worst points are the report's.

use assert_cmd::Command;
use scraper::{Html, Selector};
use std::path::PathBuf;

fn demo(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("data/demo")
        .join(name)
}

fn run(format: &str) -> String {
    let out = Command::cargo_bin("offgas")
        .unwrap()
        .env("NO_COLOR", "1")
        .arg("check")
        .arg(demo("carboy-acid-etch.yaml"))
        .arg("--add")
        .arg(demo("stream-copper-cyanide-rinse.yaml"))
        .args(["--format", format])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(4), "the demo pour is a stop");
    String::from_utf8(out.stdout).unwrap()
}

fn sel(s: &str) -> Selector {
    Selector::parse(s).unwrap()
}

#[test]
fn the_page_is_well_formed_and_self_contained() {
    let page = run("html");
    let doc = Html::parse_document(&page);
    assert!(
        doc.errors.is_empty(),
        "HTML5 parse errors: {:?}",
        doc.errors
    );
    for (tag, attr) in [
        ("img", "src"),
        ("script", "src"),
        ("link", "href"),
        ("a", "href"),
    ] {
        for e in doc.select(&sel(tag)) {
            let v = e.value().attr(attr).unwrap_or("");
            assert!(
                v.is_empty() || v.starts_with('#'),
                "<{tag} {attr}={v}> points outside the page"
            );
        }
    }
    assert!(!page.contains("url(") && !page.contains("@import"));
    assert!(
        doc.select(&sel("svg.chart")).count() >= 3,
        "a gas chart, pH and temperature"
    );
}

#[test]
fn the_plotted_points_are_the_reports_path() {
    let page = Html::parse_document(&run("html"));
    let json: serde_json::Value = serde_json::from_str(&run("json")).unwrap();
    let chart = page
        .select(&sel("svg.chart"))
        .find(|c| c.text().any(|t| t.contains("HCN in the headspace")))
        .expect("an HCN chart");
    for (id, key) in [
        ("as-written", "poured_as_written"),
        ("other-way", "poured_other_way"),
    ] {
        let path = json[key]["path"].as_array().expect("path in the JSON");
        let drawn: Vec<(f64, f64)> = chart
            .select(&sel(&format!("g.series[data-series=\"{id}\"] [data-x]")))
            .map(|e| {
                let v = |a| e.value().attr(a).unwrap().parse::<f64>().unwrap();
                (v("data-x"), v("data-y"))
            })
            .collect();
        assert_eq!(drawn.len(), path.len(), "{id}: one drawn point per state");
        for ((x, y), p) in drawn.iter().zip(path) {
            let hcn = p["gases"]
                .as_array()
                .unwrap()
                .iter()
                .find(|g| g["formula"] == "HCN")
                .unwrap()["headspace_ppm"]
                .as_f64()
                .unwrap();
            assert!((x - p["fraction_added"].as_f64().unwrap()).abs() < 1e-12);
            assert!(
                (y - hcn).abs() <= 1e-9 * hcn.abs().max(1e-30),
                "{id}: {y} vs {hcn}"
            );
        }
        let worst = chart
            .select(&sel(&format!("g.callout.{id}")))
            .next()
            .expect("the worst point is ringed");
        let wx: f64 = worst.value().attr("data-x").unwrap().parse().unwrap();
        assert_eq!(
            wx,
            json[key]["worst_state"]["fraction_added"].as_f64().unwrap()
        );
    }
    // The headline worst point is the as-written order's.
    let top = json["worst_state"]["fraction_added"].as_f64().unwrap();
    let ringed: f64 = chart
        .select(&sel("g.callout.as-written"))
        .next()
        .unwrap()
        .value()
        .attr("data-x")
        .unwrap()
        .parse()
        .unwrap();
    assert_eq!(ringed, top);
}

#[test]
fn the_terminal_shows_the_course_and_falls_back_to_ascii() {
    let text = |lang: &str| {
        let out = Command::cargo_bin("offgas")
            .unwrap()
            .env("NO_COLOR", "1")
            .env_remove("LC_ALL")
            .env_remove("LC_CTYPE")
            .env("LANG", lang)
            .arg("check")
            .arg(demo("carboy-acid-etch.yaml"))
            .arg("--add")
            .arg(demo("stream-copper-cyanide-rinse.yaml"))
            .output()
            .unwrap();
        String::from_utf8(out.stdout).unwrap()
    };
    let course = |t: &str| {
        t.lines()
            .find(|l| l.trim_start().starts_with("HCN") && l.contains("peak"))
            .map(str::to_string)
            .expect("an HCN course line")
    };
    let unicode = course(&text("en_GB.UTF-8"));
    assert!(
        unicode.contains("[█]") && unicode.contains("peak 533 ppm at 100 %"),
        "{unicode}"
    );
    let ascii = course(&text("C"));
    assert!(ascii.is_ascii() && ascii.contains("[#]"), "{ascii}");
}
