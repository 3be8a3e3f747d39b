//! Chemists' notation in everything a user reads: no formula anywhere in the output of
//! `check`, `lookup`, `procedure` or `audit`, in any format, written with its charge as a
//! trailing signed number (`CO3-2`, `Fe+3`), the form of another program's databases.

mod common;
use assert_cmd::Command;
use std::path::PathBuf;

fn offgas() -> Command {
    let mut c = Command::cargo_bin("offgas").unwrap();
    c.env("NO_COLOR", "1");
    c
}

fn demo(name: &str) -> String {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("data/demo")
        .join(name)
        .display()
        .to_string()
}

/// Every species and strong ion of more than one charge, in the charge-last signed-number
/// form (`CO3-2`) that must never be shown.
fn forbidden() -> Vec<String> {
    let cat = common::catalog();
    let mut out = Vec::new();
    let formulas = cat
        .families
        .iter()
        .flat_map(|f| f.species.iter().map(|s| s.formula.clone()))
        .chain(cat.strong_ions.iter().map(|i| i.formula.clone()));
    for f in formulas {
        let (body, z) = offgas::basics::notation::split_charge(&f);
        if z.abs() > 1 {
            out.push(format!(
                "{body}{}{}",
                if z > 0 { '+' } else { '-' },
                z.abs()
            ));
        }
    }
    out.sort();
    out.dedup();
    out
}

fn assert_clean(what: &str, text: &str, forbidden: &[String]) {
    for f in forbidden {
        // A match must stand alone: not the start of a longer word or number.
        for (i, _) in text.match_indices(f.as_str()) {
            let before = text[..i].chars().last();
            let after = text[i + f.len()..].chars().next();
            let alone = before.is_none_or(|c| !c.is_ascii_alphanumeric())
                && after.is_none_or(|c| !c.is_ascii_alphanumeric());
            assert!(!alone, "{what}: `{f}` in the output:\n{text}");
        }
    }
}

#[test]
fn no_charge_last_signed_numbers_in_any_output() {
    let bad = forbidden();
    assert!(
        bad.iter().any(|f| f == "CO3-2"),
        "the forbidden list is built: {bad:?}"
    );
    let check = [
        "check",
        &demo("carboy-cyanide-plating.yaml"),
        "--add",
        &demo("stream-acid-descale.yaml"),
        "--all-pairs",
    ]
    .map(String::from);
    let procedure = ["procedure", &demo("procedure-descale-tank.yaml")].map(String::from);
    let audit = ["audit", &demo("storeroom.yaml")].map(String::from);
    for base in [check.to_vec(), procedure.to_vec(), audit.to_vec()] {
        for format in ["table", "markdown", "json", "html"] {
            let out = offgas()
                .args(&base)
                .args(["--format", format])
                .output()
                .unwrap();
            assert!(
                matches!(out.status.code(), Some(0 | 3 | 4)),
                "{base:?} {format}: {}",
                String::from_utf8_lossy(&out.stderr)
            );
            assert_clean(
                &format!("{} --format {format}", base[0]),
                &String::from_utf8_lossy(&out.stdout),
                &bad,
            );
        }
    }
    for query in [
        "sodium carbonate",
        "carbonate",
        "iron(iii) chloride",
        "edta",
        "potassium ferrocyanide trihydrate",
    ] {
        for format in ["text", "json"] {
            let out = offgas()
                .args(["lookup", query, "--format", format])
                .output()
                .unwrap();
            assert_eq!(out.status.code(), Some(0), "lookup {query}");
            assert_clean(
                &format!("lookup {query} --format {format}"),
                &String::from_utf8_lossy(&out.stdout),
                &bad,
            );
        }
    }
}

#[test]
fn terminals_show_typeset_charges() {
    let out = offgas().args(["lookup", "carbonate"]).output().unwrap();
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("CO₃²⁻"), "{text}");
    let json = offgas()
        .args(["lookup", "carbonate", "--format", "json"])
        .output()
        .unwrap();
    // JSON and the data keep one plain-ASCII form.
    assert!(String::from_utf8_lossy(&json.stdout).contains("CO3^2-"));
}
