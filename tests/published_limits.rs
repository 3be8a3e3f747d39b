//! Checks data/limits.yaml on its own terms, with serde_yaml::Value only (no offgas API):
//! it parses, it covers every volatile gas the species table may name, every level carries
//! a positive value, a basis and a source, the levels are ordered, the fallback policy is
//! present, and key values agree with the NIOSH publications they were read from.

use serde_yaml::Value;

const LIMITS: &str = include_str!("../data/limits.yaml");

/// The fixed list of volatile gas formulas (one per family with a volatile neutral form).
const VOLATILE_GASES: &[&str] = &[
    "HCl",
    "HNO3",
    "HCN",
    "H2S",
    "NH3",
    "CO2",
    "SO2",
    "HF",
    "HNO2",
    "HN3",
    "H2Se",
    "CH3COOH",
    "HCOOH",
    "C2H5COOH",
    "CH3NH2",
    "(CH3)2NH",
    "(CH3)3N",
    "C2H5NH2",
    "(C2H5)2NH",
    "(C2H5)3N",
    "C4H9NH2",
    "C5H5N",
    "C6H5NH2",
    "C4H9NO",
    "C5H11N",
    "C2H7NO",
    "N2H4",
    "C6H5OH",
];

/// Gases that later rules produce; they must be present too.
const RULE_GASES: &[&str] = &["Cl2", "ClCN", "NO2", "NO", "ClO2", "PH3", "H2"];

/// Gases for which the ordering IDLH >= short-term >= TWA is known not to hold, with the
/// reason. Empty: every gas in the file is ordered. Add a gas here only with a reason that a
/// reviewer can check against the published values.
const ORDER_EXCEPTIONS: &[(&str, &str)] = &[];

/// Relative tolerance for published values: they are copied exactly, so only float noise.
const TOL: f64 = 1e-9;

fn doc() -> Value {
    serde_yaml::from_str(LIMITS).expect("data/limits.yaml must parse as YAML")
}

fn gases(d: &Value) -> &Vec<Value> {
    d.get("gases")
        .and_then(Value::as_sequence)
        .expect("limits.yaml needs a `gases:` list")
}

fn find<'a>(d: &'a Value, gas: &str) -> &'a Value {
    gases(d)
        .iter()
        .find(|g| g.get("gas").and_then(Value::as_str) == Some(gas))
        .unwrap_or_else(|| panic!("gas {gas} missing from limits.yaml"))
}

/// The numeric value of a level (`idlh`, `short_term`, `twa`), or None when null/absent.
fn level(g: &Value, key: &str) -> Option<f64> {
    match g.get(key) {
        None | Some(Value::Null) => None,
        Some(l) => Some(
            l.get("value")
                .and_then(Value::as_f64)
                .unwrap_or_else(|| panic!("{key} of {:?} has no numeric value", g.get("gas"))),
        ),
    }
}

fn text<'a>(g: &'a Value, key: &str, field: &str) -> &'a str {
    g.get(key)
        .and_then(|l| l.get(field))
        .and_then(Value::as_str)
        .unwrap_or_else(|| panic!("{key}.{field} of {:?} missing", g.get("gas")))
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= TOL * b.abs().max(1.0)
}

fn assert_value(gas: &str, key: &str, expected: f64) {
    let d = doc();
    let g = find(&d, gas);
    let got = level(g, key).unwrap_or_else(|| panic!("{gas}.{key} is null"));
    assert!(
        close(got, expected),
        "{gas}.{key}: file has {got} ppm, published value is {expected} ppm"
    );
}

/// CAS registry numbers carry a check digit: sum of the other digits, weighted 1, 2, 3, ...
/// from the right, modulo 10.
fn cas_ok(cas: &str) -> bool {
    let parts: Vec<&str> = cas.split('-').collect();
    if parts.len() != 3 || parts[1].len() != 2 || parts[2].len() != 1 {
        return false;
    }
    if !parts
        .iter()
        .all(|p| !p.is_empty() && p.chars().all(|c| c.is_ascii_digit()))
    {
        return false;
    }
    let body: Vec<u32> = format!("{}{}", parts[0], parts[1])
        .chars()
        .map(|c| c.to_digit(10).unwrap())
        .collect();
    let sum: u32 = body
        .iter()
        .rev()
        .enumerate()
        .map(|(i, d)| (i as u32 + 1) * d)
        .sum();
    sum % 10 == parts[2].parse::<u32>().unwrap()
}

#[test]
fn parses_with_description_units_and_gases() {
    let d = doc();
    assert!(d.get("description").and_then(Value::as_str).is_some());
    let unit = d
        .get("units")
        .and_then(|u| u.get("level"))
        .and_then(Value::as_str)
        .expect("units.level");
    assert!(unit.contains("ppm"), "levels must be stated in ppm");
    assert!(!gases(&d).is_empty());
}

#[test]
fn every_volatile_gas_and_rule_gas_is_present_once() {
    let d = doc();
    for gas in VOLATILE_GASES.iter().chain(RULE_GASES) {
        let n = gases(&d)
            .iter()
            .filter(|g| g.get("gas").and_then(Value::as_str) == Some(gas))
            .count();
        assert_eq!(n, 1, "gas {gas} must appear exactly once (found {n})");
    }
}

#[test]
fn every_entry_has_name_and_valid_cas() {
    let d = doc();
    for g in gases(&d) {
        let gas = g.get("gas").and_then(Value::as_str).expect("gas formula");
        let name = g.get("name").and_then(Value::as_str).unwrap_or("");
        assert!(!name.trim().is_empty(), "{gas}: name missing");
        let cas = g.get("cas").and_then(Value::as_str).unwrap_or("");
        assert!(
            cas_ok(cas),
            "{gas}: CAS number `{cas}` is malformed or fails its check digit"
        );
    }
}

#[test]
fn every_level_has_positive_value_basis_and_source() {
    let d = doc();
    for g in gases(&d) {
        let gas = g.get("gas").and_then(Value::as_str).unwrap();
        for key in ["idlh", "short_term", "twa"] {
            assert!(
                g.get(key).is_some(),
                "{gas}: `{key}` must be written, as a level or as null"
            );
            if let Some(v) = level(g, key) {
                assert!(
                    v.is_finite() && v > 0.0,
                    "{gas}.{key}: value {v} must be positive"
                );
                assert!(
                    !text(g, key, "basis").trim().is_empty(),
                    "{gas}.{key}: empty basis"
                );
                let src = text(g, key, "source");
                assert!(!src.trim().is_empty(), "{gas}.{key}: empty source");
                assert!(
                    src.contains("(read") || src.contains("read ") || src.contains("memory"),
                    "{gas}.{key}: source must say whether it was read on a page or is memory: {src}"
                );
            }
        }
    }
}

#[test]
fn missing_levels_are_explained_in_a_note() {
    let d = doc();
    for g in gases(&d) {
        let gas = g.get("gas").and_then(Value::as_str).unwrap();
        let any_null = ["idlh", "short_term", "twa"]
            .iter()
            .any(|k| level(g, k).is_none());
        if any_null {
            let note = g.get("note").and_then(Value::as_str).unwrap_or("");
            assert!(
                !note.trim().is_empty(),
                "{gas}: a null level needs a `note` saying why"
            );
        }
    }
}

#[test]
fn levels_are_ordered_idlh_short_term_twa() {
    let d = doc();
    for g in gases(&d) {
        let gas = g.get("gas").and_then(Value::as_str).unwrap();
        if ORDER_EXCEPTIONS.iter().any(|(e, _)| *e == gas) {
            continue;
        }
        let (i, s, t) = (level(g, "idlh"), level(g, "short_term"), level(g, "twa"));
        if let (Some(i), Some(s)) = (i, s) {
            assert!(i >= s, "{gas}: IDLH {i} below short-term level {s}");
        }
        if let (Some(s), Some(t)) = (s, t) {
            assert!(s >= t, "{gas}: short-term level {s} below TWA {t}");
        }
        if let (Some(i), Some(t)) = (i, t) {
            assert!(i >= t, "{gas}: IDLH {i} below TWA {t}");
        }
    }
}

#[test]
fn fallback_policy_is_encoded_as_data() {
    let d = doc();
    let f = d.get("fallback").expect("top-level `fallback:` block");
    let stop = f
        .get("stop_without_idlh")
        .expect("fallback.stop_without_idlh");
    assert_eq!(stop.get("from").and_then(Value::as_str), Some("short_term"));
    assert_eq!(stop.get("factor").and_then(Value::as_f64), Some(10.0));
    let sb = stop.get("basis").and_then(Value::as_str).unwrap_or("");
    assert!(
        sb.contains("derived") && sb.contains("common practice"),
        "stop basis: {sb}"
    );

    let review = f
        .get("review_without_short_term")
        .expect("fallback.review_without_short_term");
    assert_eq!(review.get("from").and_then(Value::as_str), Some("twa"));
    assert_eq!(review.get("factor").and_then(Value::as_f64), Some(3.0));
    let rb = review.get("basis").and_then(Value::as_str).unwrap_or("");
    assert!(
        rb.contains("derived") && rb.contains("ACGIH excursion"),
        "review basis: {rb}"
    );

    assert_eq!(f.get("no_levels").and_then(Value::as_str), Some("review"));
}

#[test]
fn gases_without_any_level_are_the_expected_ones() {
    // Nitrous acid has no published level; hydrogen has none for toxicity. Any other gas
    // losing all its levels would silently turn into "cannot be judged": catch that here.
    let d = doc();
    let mut empty: Vec<&str> = gases(&d)
        .iter()
        .filter(|g| {
            ["idlh", "short_term", "twa"]
                .iter()
                .all(|k| level(g, k).is_none())
        })
        .map(|g| g.get("gas").and_then(Value::as_str).unwrap())
        .collect();
    empty.sort();
    assert_eq!(empty, vec!["H2", "HNO2"]);
}

#[test]
fn hydrogen_lower_flammable_limit_is_4_percent() {
    let d = doc();
    let lfl = find(&d, "H2")
        .get("flammability")
        .and_then(|f| f.get("lfl"))
        .and_then(|l| l.get("value"))
        .and_then(Value::as_f64)
        .expect("H2 flammability.lfl.value");
    assert!(
        close(lfl, 40000.0),
        "hydrogen LFL should be 4 % = 40000 ppm, file has {lfl}"
    );
}

// ---- Key values against NIOSH. Tolerance: TOL (relative 1e-9); these are exact copies. ----

#[test]
fn idlh_hcn_50() {
    // NIOSH Documentation for IDLH Concentrations (1994), hydrogen cyanide: 50 ppm.
    assert_value("HCN", "idlh", 50.0);
}

#[test]
fn idlh_h2s_100() {
    // NIOSH IDLH (1994 revision) 100 ppm, as tabulated in PMC5777517 Table 3 citing NIOSH.
    assert_value("H2S", "idlh", 100.0);
}

#[test]
fn idlh_nh3_300() {
    // NIOSH IDLH (1994 revision) 300 ppm, cited by NC Department of Labor (original was 500).
    assert_value("NH3", "idlh", 300.0);
}

#[test]
fn idlh_so2_100() {
    // NIOSH Documentation for IDLH Concentrations (1994), sulfur dioxide: 100 ppm.
    assert_value("SO2", "idlh", 100.0);
}

#[test]
fn idlh_co2_40000() {
    // NIOSH Documentation for IDLH Concentrations (1994), carbon dioxide: revised 40,000 ppm.
    assert_value("CO2", "idlh", 40000.0);
}

#[test]
fn idlh_hf_30() {
    // NIOSH IDLH for hydrogen fluoride 30 ppm (OSHA Chemical Sampling Information quoting NIOSH).
    assert_value("HF", "idlh", 30.0);
}

#[test]
fn idlh_hcl_45() {
    // NIOSH IDLH value profile for hydrogen chloride (2025): 45 ppm, replacing the 1994
    // value of 50 ppm. The newer, lower value is the one in the file.
    assert_value("HCl", "idlh", 45.0);
}

#[test]
fn idlh_cl2_10() {
    // NIOSH Documentation for IDLH Concentrations (1994), chlorine: revised 10 ppm.
    assert_value("Cl2", "idlh", 10.0);
}

#[test]
fn ceiling_h2s_10_ten_minute() {
    // NIOSH REL for hydrogen sulfide: 10 ppm ceiling, 10-minute (NIOSH IDLH documentation page).
    assert_value("H2S", "short_term", 10.0);
    let d = doc();
    let b = text(find(&d, "H2S"), "short_term", "basis");
    assert!(
        b.contains("NIOSH") && b.contains("ceiling") && b.contains("10-minute"),
        "{b}"
    );
}

#[test]
fn stel_hcn_4_7() {
    // NIOSH REL for hydrogen cyanide: 4.7 ppm STEL [skin].
    assert_value("HCN", "short_term", 4.7);
    let d = doc();
    let b = text(find(&d, "HCN"), "short_term", "basis");
    assert!(b.contains("NIOSH") && b.contains("STEL"), "{b}");
}

#[test]
fn stel_nh3_35() {
    // NIOSH REL for ammonia: 25 ppm TWA, 35 ppm STEL.
    assert_value("NH3", "short_term", 35.0);
    assert_value("NH3", "twa", 25.0);
}

#[test]
fn stel_so2_5() {
    // NIOSH REL for sulfur dioxide: 2 ppm TWA, 5 ppm STEL.
    assert_value("SO2", "short_term", 5.0);
    assert_value("SO2", "twa", 2.0);
}

#[test]
fn ceiling_cl2_0_5() {
    // NIOSH REL for chlorine: 0.5 ppm ceiling, 15-minute.
    assert_value("Cl2", "short_term", 0.5);
    let d = doc();
    let b = text(find(&d, "Cl2"), "short_term", "basis");
    assert!(b.contains("NIOSH") && b.contains("ceiling"), "{b}");
}

#[test]
fn cas_check_digit_rejects_a_typo() {
    // The CAS check above must be able to fail: a transposed digit is caught.
    assert!(cas_ok("74-90-8"));
    assert!(!cas_ok("74-09-8"));
    assert!(!cas_ok("7664417"));
}
