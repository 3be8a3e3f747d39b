//! Every printable page offgas writes (the pour check, the procedure sheet, the storeroom
//! audit, a carboy's record and its waste tag): well-formed HTML5 with nothing outside the
//! page, the procedure plot drawn from the report's numbers, and each page rendered to PNG
//! by headless Chromium and looked at for size and ink.

use assert_cmd::Command;
use scraper::{Html, Selector};
use std::path::{Path, PathBuf};

fn demo(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("data/demo")
        .join(name)
}

fn offgas() -> Command {
    let mut c = Command::cargo_bin("offgas").unwrap();
    c.env("NO_COLOR", "1");
    c
}

/// Standard output of a run that is expected to end with one of `codes`.
fn stdout_of(c: &mut Command, codes: &[i32]) -> String {
    let out = c.output().unwrap();
    assert!(
        out.status.code().is_some_and(|s| codes.contains(&s)),
        "exit {:?}: {}",
        out.status.code(),
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).unwrap()
}

fn check_page() -> String {
    stdout_of(
        offgas()
            .arg("check")
            .arg(demo("carboy-acid-etch.yaml"))
            .arg("--add")
            .arg(demo("stream-copper-cyanide-rinse.yaml"))
            .args(["--format", "html"]),
        &[4],
    )
}

fn procedure(format: &str) -> String {
    stdout_of(
        offgas()
            .arg("procedure")
            .arg(demo("procedure-descale-tank.yaml"))
            .args(["--format", format]),
        &[4],
    )
}

fn audit_page() -> String {
    stdout_of(
        offgas()
            .arg("audit")
            .arg(demo("storeroom.yaml"))
            .args(["--suggest", "--format", "html"]),
        &[0, 3, 4],
    )
}

/// A carboy's record page and, once closed, its waste tag.
fn log_pages(dir: &Path) -> (String, String) {
    let carboy = dir.join("carboy.yaml");
    std::fs::write(
        &carboy,
        "name: rinse carboy R-2\ncapacity: 10 L\nvolume: 0 L\nclosure: sealed\n",
    )
    .unwrap();
    let rinse = dir.join("rinse.yaml");
    std::fs::write(
        &rinse,
        "name: salt rinse\nvolume: 2 L\ncontents:\n  - sodium chloride: 0.05 mol/L\n",
    )
    .unwrap();
    let record = dir.join("carboy.log");
    stdout_of(
        offgas()
            .args(["log", "new"])
            .arg(&record)
            .arg("--from")
            .arg(&carboy),
        &[0],
    );
    stdout_of(
        offgas()
            .args(["log", "add"])
            .arg(&record)
            .arg("--stream")
            .arg(&rinse)
            .args(["--by", "R. Tech"]),
        &[0],
    );
    let record_page = stdout_of(
        offgas()
            .args(["log", "show"])
            .arg(&record)
            .args(["--format", "html"]),
        &[0],
    );
    let tag_page = stdout_of(
        offgas()
            .args(["log", "close"])
            .arg(&record)
            .args(["--by", "W. Lead", "--format", "html"]),
        &[0],
    );
    (record_page, tag_page)
}

fn all_pages() -> Vec<(&'static str, String)> {
    let dir = tempfile::tempdir().unwrap();
    let (record, tag) = log_pages(dir.path());
    vec![
        ("check", check_page()),
        ("procedure", procedure("html")),
        ("audit", audit_page()),
        ("carboy record", record),
        ("waste tag", tag),
    ]
}

fn sel(s: &str) -> Selector {
    Selector::parse(s).unwrap()
}

#[test]
fn every_page_is_well_formed_html5_with_nothing_outside_it() {
    for (name, page) in all_pages() {
        let doc = Html::parse_document(&page);
        assert!(
            doc.errors.is_empty(),
            "{name}: HTML5 parse errors: {:?}",
            doc.errors
        );
        assert!(
            doc.select(&sel("html > head > title")).count() == 1,
            "{name}: one title"
        );
        for e in doc.select(&sel("*")) {
            for (attr, value) in e.value().attrs() {
                let points_out = matches!(
                    attr,
                    "src" | "href" | "xlink:href" | "action" | "data" | "poster" | "srcset"
                ) && !value.is_empty()
                    && !value.starts_with('#');
                assert!(
                    !points_out,
                    "{name}: <{} {attr}=\"{value}\"> points outside the page",
                    e.value().name()
                );
            }
        }
        for tag in ["script", "iframe", "object", "embed", "link"] {
            assert_eq!(
                doc.select(&sel(tag)).count(),
                0,
                "{name}: a <{tag}> element"
            );
        }
        for needle in ["url(", "@import", "@font-face"] {
            assert!(!page.contains(needle), "{name}: {needle} in the page");
        }
    }
}

#[test]
fn the_procedure_plot_draws_the_reports_steps() {
    let page = Html::parse_document(&procedure("html"));
    let json: serde_json::Value = serde_json::from_str(&procedure("json")).unwrap();
    let steps = json["steps"].as_array().unwrap();
    let charts: Vec<_> = page.select(&sel("figure.steps svg.chart")).collect();
    assert_eq!(charts.len(), 2, "pH and the worst gas");
    let drawn = |chart: &scraper::ElementRef| -> Vec<(f64, f64)> {
        chart
            .select(&sel("g.series [data-x]"))
            .map(|e| {
                let v = |a| e.value().attr(a).unwrap().parse::<f64>().unwrap();
                (v("data-x"), v("data-y"))
            })
            .collect()
    };
    // pH: one point per step that leaves a solved liquid, at that step's end pH.
    let expected_ph: Vec<(f64, f64)> = steps
        .iter()
        .filter(|s| !s["end_state"].is_null())
        .map(|s| {
            (
                s["number"].as_f64().unwrap(),
                s["end_state"]["ph"].as_f64().unwrap(),
            )
        })
        .collect();
    assert!(expected_ph.len() >= 3);
    assert_eq!(drawn(&charts[0]), expected_ph);
    // Worst gas: the highest ratio to its review level at the step's worst point.
    let expected_ratio: Vec<(f64, f64, String)> = steps
        .iter()
        .filter_map(|s| {
            let state = if s["worst_state"].is_null() {
                &s["end_state"]
            } else {
                &s["worst_state"]
            };
            let best = state["gases"]
                .as_array()?
                .iter()
                .filter_map(|g| Some((g["limit_ratio"].as_f64()?, g["formula"].as_str()?)))
                .max_by(|a, b| a.0.total_cmp(&b.0))?;
            Some((s["number"].as_f64().unwrap(), best.0, best.1.to_string()))
        })
        .collect();
    let ratios = drawn(&charts[1]);
    assert_eq!(ratios.len(), expected_ratio.len());
    for (d, e) in ratios.iter().zip(&expected_ratio) {
        assert_eq!(d.0, e.0);
        assert!((d.1 - e.1).abs() <= 1e-9 * e.1, "{d:?} against {e:?}");
    }
    let worst = expected_ratio
        .iter()
        .max_by(|a, b| a.1.total_cmp(&b.1))
        .unwrap();
    let callout = charts[1]
        .select(&sel("g.callout.worst"))
        .next()
        .expect("the worst step ringed");
    assert_eq!(
        callout
            .value()
            .attr("data-x")
            .unwrap()
            .parse::<f64>()
            .unwrap(),
        worst.0
    );
    assert_eq!(worst.2, "HCN", "the demo's worst step releases HCN");
    assert!(callout.text().any(|t| t.contains("at step 3")));
    assert_eq!(
        json["first_problem"]["step"].as_f64(),
        Some(worst.0),
        "the worst step of the demo is its first stop"
    );
}

#[test]
fn the_markdown_sheet_shows_the_steps_as_text_courses() {
    let md = procedure("markdown");
    let block = md
        .split("```text\n")
        .nth(1)
        .and_then(|b| b.split("```").next())
        .expect("a text block of courses");
    let lines: Vec<&str> = block.lines().collect();
    assert!(lines[0].starts_with("step") && lines[0].contains(" 6"));
    assert!(lines[1].starts_with("pH after the step"));
    assert!(
        lines[2].contains("[█]") && lines[2].contains("worst HCN") && lines[2].contains("step 3"),
        "{block}"
    );
    // Drains leave no liquid to judge: a dot, not a bar.
    assert_eq!(lines[1].matches('·').count(), 2, "{block}");
}

/// Where Chromium is: `OFFGAS_CHROMIUM`, else `chromium` or `chromium-browser` on the PATH.
fn chromium() -> Option<PathBuf> {
    if let Some(p) = std::env::var_os("OFFGAS_CHROMIUM") {
        return Some(PathBuf::from(p));
    }
    let path = std::env::var_os("PATH")?;
    std::env::split_paths(&path)
        .flat_map(|d| [d.join("chromium"), d.join("chromium-browser")])
        .find(|p| p.is_file())
}

const SHOT_WIDTH: u32 = 800;
const SHOT_HEIGHT: u32 = 1100;

/// The page rendered by headless Chromium, decoded: width, height and RGBA pixels.
fn screenshot(browser: &Path, html: &Path, png: &Path, profile: &Path) -> (u32, u32, Vec<u8>) {
    let out = std::process::Command::new(browser)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--hide-scrollbars",
            "--no-first-run",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .arg(format!("--window-size={SHOT_WIDTH},{SHOT_HEIGHT}"))
        .arg(format!("--screenshot={}", png.display()))
        .arg(format!("file://{}", html.display()))
        .output()
        .expect("Chromium runs");
    assert!(
        png.is_file(),
        "Chromium wrote no screenshot of {}: {}",
        html.display(),
        String::from_utf8_lossy(&out.stderr)
    );
    let decoder = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(png).unwrap()));
    let mut reader = decoder.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size().unwrap()];
    let info = reader.next_frame(&mut buf).unwrap();
    let rgba: Vec<u8> = match info.color_type {
        png::ColorType::Rgba => buf[..info.buffer_size()].to_vec(),
        png::ColorType::Rgb => buf[..info.buffer_size()]
            .chunks(3)
            .flat_map(|p| [p[0], p[1], p[2], 255])
            .collect(),
        other => panic!("unexpected PNG colour type {other:?}"),
    };
    (info.width, info.height, rgba)
}

#[test]
fn every_page_renders_in_headless_chromium_at_the_expected_size_and_is_not_blank() {
    let Some(browser) = chromium() else {
        // .ci/run installs Chromium and sets OFFGAS_REQUIRE_CHROMIUM; there a missing
        // browser is a failure. Elsewhere the test says plainly that it did not run.
        assert!(
            std::env::var_os("OFFGAS_REQUIRE_CHROMIUM").is_none(),
            "OFFGAS_REQUIRE_CHROMIUM is set but no chromium is on the PATH"
        );
        eprintln!(
            "SKIPPED: no chromium on the PATH (install the Debian package `chromium`, or set \
             OFFGAS_CHROMIUM); the pages were not rendered"
        );
        return;
    };
    let profile = tempfile::tempdir().unwrap();
    let dir = match std::env::var_os("OFFGAS_KEEP_SCREENSHOTS") {
        Some(keep) => {
            // Kept for a reader to look at; the browser profile goes in the temporary dir.
            std::fs::create_dir_all(&keep).unwrap();
            PathBuf::from(keep)
        }
        None => profile.path().to_path_buf(),
    };
    for (name, page) in all_pages() {
        let stem = name.replace(' ', "-");
        let html = dir.join(format!("{stem}.html"));
        std::fs::write(&html, &page).unwrap();
        let png = dir.join(format!("{stem}.png"));
        let (w, h, rgba) = screenshot(&browser, &html, &png, &profile.path().join("profile"));
        assert_eq!((w, h), (SHOT_WIDTH, SHOT_HEIGHT), "{name}: screenshot size");
        let pixels: Vec<&[u8]> = rgba.chunks(4).collect();
        let ink = pixels
            .iter()
            .filter(|p| p[0] < 100 && p[1] < 100 && p[2] < 100)
            .count();
        let tinted = pixels
            .iter()
            .filter(|p| p[0].max(p[1]).max(p[2]) - p[0].min(p[1]).min(p[2]) > 40)
            .count();
        let share = |n: usize| n as f64 / pixels.len() as f64;
        assert!(
            share(ink) > 0.005,
            "{name}: almost no dark text ({:.4} of the pixels); is the page blank?",
            share(ink)
        );
        // The record and the tag are black on white; the others colour their verdicts.
        assert!(
            matches!(name, "carboy record" | "waste tag") || share(tinted) > 0.002,
            "{name}: no colour (verdict box, table rows or plots) in the screenshot"
        );
        if matches!(name, "check" | "procedure") {
            // The plots' first line colour, #1d4f91, is drawn: the SVG rendered.
            let series = pixels
                .iter()
                .filter(|p| {
                    p[0].abs_diff(0x1d) < 24 && p[1].abs_diff(0x4f) < 24 && p[2].abs_diff(0x91) < 24
                })
                .count();
            assert!(
                series > 200,
                "{name}: the plot's lines are not on screen ({series} px)"
            );
        }
    }
}
