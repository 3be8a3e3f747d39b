//! The bundled data's binary image against the data files themselves.
//!
//! `build.rs` loads `data/*.yaml` and `rules/*.yaml` and stores the result as images that
//! the program reads at start-up. These tests load the same YAML text the way the program
//! did before there was an image (`Catalog::load`, `GhsTable::parse`, `Thresholds::parse`,
//! `RuleSet::parse_file` and `extend`) and require the images to hold exactly that, byte
//! for byte, and to read back to it: a stale image, or a field the image loses, fails here.

use offgas::catalog::ghs::GhsTable;
use offgas::catalog::Catalog;
use offgas::embedded;
use offgas::judge::rules::{Origin, RuleSet};
use offgas::judge::thresholds::Thresholds;

fn bytes<T: serde::Serialize>(v: &T) -> Vec<u8> {
    postcard::to_stdvec(v).expect("serializes")
}

fn catalog_from_yaml() -> Catalog {
    Catalog::load(embedded::sources()).expect("the bundled data files load")
}

fn rules_from_yaml(cat: &Catalog) -> RuleSet {
    let mut set = RuleSet::default();
    for (file, text) in embedded::RULE_FILES {
        let origin = Origin::BuiltIn {
            file: file.to_string(),
        };
        let loaded = RuleSet::parse_file(cat, file, text, origin).expect("built-in rules parse");
        set.extend(loaded).expect("built-in rules fit together");
    }
    set
}

#[test]
fn the_catalog_image_is_what_the_data_files_load_to() {
    let from_yaml = catalog_from_yaml();
    assert!(
        bytes(&from_yaml) == embedded::CATALOG_IMAGE,
        "the catalog image is not what data/*.yaml loads to: rebuild (cargo build)"
    );
    let from_image = embedded::catalog().expect("the image reads back");
    assert!(bytes(&from_image) == embedded::CATALOG_IMAGE);
    // The same tables, looked at through the catalog's own accessors.
    assert_eq!(from_image.substances.len(), from_yaml.substances.len());
    assert_eq!(from_image.families.len(), from_yaml.families.len());
    assert_eq!(from_image.limits.gases.len(), from_yaml.limits.gases.len());
    for s in &from_yaml.substances {
        let id = from_image
            .find_substance(&s.name)
            .expect("every name is found");
        assert_eq!(from_image.substance(id).name, s.name);
        for k in s.synonyms.iter().chain(s.cas.iter()) {
            assert_eq!(
                from_image.find_substance(k),
                from_yaml.find_substance(k),
                "{k}"
            );
        }
        assert_eq!(
            from_image.density_table(id).map(|t| t.1),
            from_yaml.density_table(id).map(|t| t.1),
        );
        assert_eq!(
            from_image.dilution_curve(id).map(|c| c.value(10.0)),
            from_yaml.dilution_curve(id).map(|c| c.value(10.0)),
        );
        assert_eq!(
            from_image.volatility(id).map(|v| v.hcp),
            from_yaml.volatility(id).map(|v| v.hcp),
        );
    }
    for g in &from_yaml.limits.gases {
        assert_eq!(
            from_image.judged_levels(&g.gas),
            from_yaml.judged_levels(&g.gas)
        );
    }
    for f in &from_yaml.families {
        assert_eq!(
            from_image.family_by_id(&f.id),
            from_yaml.family_by_id(&f.id)
        );
    }
    for ion in &from_yaml.strong_ions {
        assert_eq!(
            from_image.ion_by_formula(&ion.formula),
            from_yaml.ion_by_formula(&ion.formula)
        );
    }
    assert_eq!(
        from_image.closest_names("sodium cyanid", 5),
        from_yaml.closest_names("sodium cyanid", 5)
    );
}

#[test]
fn the_same_data_gives_the_same_image() {
    // The image must not depend on a process's hash order, or the test above means nothing.
    assert_eq!(bytes(&catalog_from_yaml()), bytes(&catalog_from_yaml()));
}

#[test]
fn the_ghs_image_is_what_the_table_loads_to() {
    let cat = catalog_from_yaml();
    let from_yaml = GhsTable::parse("data/ghs.yaml", embedded::GHS, &cat).expect("loads");
    assert!(
        bytes(&from_yaml) == embedded::GHS_IMAGE,
        "the GHS image is not what data/ghs.yaml loads to: rebuild (cargo build)"
    );
    let from_image = embedded::ghs(&cat).expect("the image reads back");
    assert!(bytes(&from_image) == embedded::GHS_IMAGE);
}

#[test]
fn the_thresholds_image_is_what_the_file_loads_to() {
    let from_yaml =
        Thresholds::parse("rules/thresholds.yaml", embedded::THRESHOLDS).expect("loads");
    assert!(
        bytes(&from_yaml) == embedded::THRESHOLDS_IMAGE,
        "the thresholds image is not what rules/thresholds.yaml loads to: rebuild (cargo build)"
    );
    let from_image = embedded::thresholds().expect("the image reads back");
    assert!(bytes(&from_image) == embedded::THRESHOLDS_IMAGE);
    assert_eq!(from_image.cautions, from_yaml.cautions);
}

#[test]
fn the_rules_image_is_what_the_rule_files_load_to() {
    let cat = catalog_from_yaml();
    let from_yaml = rules_from_yaml(&cat);
    let from_image = embedded::rules(&cat).expect("the image reads back");
    assert_eq!(from_image.rules, from_yaml.rules);
    let image: embedded::RuleImage = from_yaml
        .rules
        .iter()
        .map(|r| {
            let (Origin::BuiltIn { file } | Origin::Site { file }) = &r.origin;
            (file.clone(), r.line, r.rule.clone())
        })
        .collect();
    assert!(
        bytes(&image) == embedded::RULES_IMAGE,
        "the rules image is not what rules/*.yaml loads to: rebuild (cargo build)"
    );
    // Every rule file in the folder is a built-in one (or the thresholds).
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("rules");
    for entry in std::fs::read_dir(dir).unwrap() {
        let name = format!("rules/{}", entry.unwrap().file_name().to_string_lossy());
        if name.ends_with(".yaml") && name != "rules/thresholds.yaml" {
            assert!(
                embedded::RULE_FILES.iter().any(|(f, _)| *f == name),
                "{name} is not a built-in rule file"
            );
        }
    }
}

#[test]
fn a_catalog_error_names_the_line_of_its_entry() {
    // A substance added at the end of the list with a family the species file lacks.
    let indent = embedded::SUBSTANCES
        .lines()
        .find_map(|l| l.find("- name:").map(|i| &l[..i]))
        .expect("a substance");
    let line = embedded::SUBSTANCES.lines().count() + 1;
    let text = format!(
        "{}{indent}- name: \"offgas test substance\"\n{indent}  state: solid\n{indent}  molar_mass: 10\n{indent}  gives: {{ families: {{ no_such_family: 1 }} }}\n",
        embedded::SUBSTANCES
    );
    let mut src = embedded::sources();
    src.substances = ("data/substances.yaml", &text);
    let shown = Catalog::load(src)
        .err()
        .expect("an unknown family is refused")
        .to_string();
    assert!(
        shown.starts_with(&format!("data/substances.yaml:{line}: ")),
        "{shown}"
    );
    assert!(shown.contains("no_such_family"), "{shown}");

    // A gas listed twice is named at its second entry.
    let first = embedded::LIMITS
        .lines()
        .position(|l| l.trim_start().starts_with("- gas:"))
        .expect("a gas");
    let entry: Vec<&str> = embedded::LIMITS.lines().skip(first).collect();
    let end = entry[1..]
        .iter()
        .position(|l| l.trim_start().starts_with("- gas:"))
        .map_or(entry.len(), |i| i + 1);
    let text = format!("{}{}\n", embedded::LIMITS, entry[..end].join("\n"));
    let mut src = embedded::sources();
    src.limits = ("data/limits.yaml", &text);
    let shown = Catalog::load(src)
        .err()
        .expect("a gas listed twice is refused")
        .to_string();
    let line = embedded::LIMITS.lines().count() + 1;
    assert!(
        shown.starts_with(&format!("data/limits.yaml:{line}: ")),
        "{shown}"
    );
    assert!(shown.contains("appears twice"), "{shown}");

    // An ion pair whose ion the species data do not know is named at its line.
    let text = format!(
        "{}\n  - cation: \"Na+\"\n    anion: \"Xx-\"\n    beta0: 0.1\n    beta1: 0.2\n    c_phi: 0\n    max_molality: 1\n    source: \"test\"\n",
        embedded::PITZER.trim_end()
    );
    let line = embedded::PITZER.trim_end().lines().count() + 1;
    let mut src = embedded::sources();
    src.pitzer = ("data/pitzer.yaml", &text);
    let shown = Catalog::load(src)
        .err()
        .expect("an unknown ion is refused")
        .to_string();
    assert!(
        shown.starts_with(&format!("data/pitzer.yaml:{line}: ")),
        "{shown}"
    );
    assert!(shown.contains("Xx-"), "{shown}");
}
