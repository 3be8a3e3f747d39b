//! Compiles the bundled data into the program.
//!
//! Reads `data/*.yaml` and `rules/*.yaml`, loads and checks them with the program's own
//! code (the library's modules are compiled in below with `#[path]`, not copied): the whole
//! `Catalog::load`, the GHS table against the catalog, the thresholds' checks, and every
//! built-in rule file (`RuleSet::parse_file` and `extend`, as the program did at start-up
//! before there was an image). It then writes a binary image (postcard) of each loaded
//! table into `OUT_DIR`, which `src/embedded.rs` includes with `include_bytes!` and reads
//! back at start-up instead of parsing YAML.
//!
//! A problem in the data fails the build with the file and, where it can be found, the
//! line, as `offgas` itself would report it.

use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::{env, fs};

/// The crate's bottom layer, as much of it as the data loaders use, at the same paths.
#[path = "src/basics"]
mod basics {
    #[allow(dead_code)]
    #[path = "input_error.rs"]
    pub mod input_error;

    #[allow(dead_code)]
    #[path = "input_shape.rs"]
    pub mod input_shape;

    #[allow(dead_code)]
    #[path = "notation.rs"]
    pub mod notation;
}

#[allow(dead_code)]
#[path = "src/catalog/mod.rs"]
mod catalog;

/// The judgement's levels and rules, at the same paths as in the crate.
#[path = "src/judge"]
mod judge {
    // `offgas_whole_crate` (set below for the crate, not for this script) leaves out the
    // parts of `thresholds` and `rules` that need the rest of the crate.
    #[allow(dead_code, unexpected_cfgs)]
    #[path = "thresholds.rs"]
    pub mod thresholds;

    #[allow(dead_code, unexpected_cfgs)]
    #[path = "rules/mod.rs"]
    pub mod rules;
}

/// The library's modules compiled into this script (every file of `src/catalog/` too).
const MODULES: &[&str] = &[
    "src/basics/input_error.rs",
    "src/basics/input_shape.rs",
    "src/basics/notation.rs",
    "src/judge/thresholds.rs",
    "src/judge/rules/mod.rs",
];

/// The data files `Catalog::load` reads (the fields of `DataSources`).
const CATALOG_FILES: &[&str] = &[
    "data/species.yaml",
    "data/substances.yaml",
    "data/classes.yaml",
    "data/limits.yaml",
    "data/physical.yaml",
    "data/combined.yaml",
    "data/complexes.yaml",
    "data/gas-release.yaml",
    "data/heat.yaml",
    "data/density.yaml",
    "data/dilution-heat.yaml",
    "data/volatility.yaml",
    "data/pitzer.yaml",
    "data/salting-out.yaml",
];
const GHS_FILE: &str = "data/ghs.yaml";
const THRESHOLDS_FILE: &str = "rules/thresholds.yaml";

/// The built-in hazard rule files, in the order their rules are in force (and listed).
/// A new rule file is added here; a file in `rules/` that is not listed fails the build.
const RULE_FILES: &[&str] = &[
    "rules/oxidisers.yaml",
    "rules/gas-formers.yaml",
    "rules/organics.yaml",
    "rules/presence.yaml",
];

/// What `embedded::rules` reads back: each built-in rule with its file and line.
type RuleImage = Vec<(String, Option<usize>, judge::rules::Rule)>;

fn main() {
    let root = PathBuf::from(env::var_os("CARGO_MANIFEST_DIR").expect("cargo sets it"));
    let out = PathBuf::from(env::var_os("OUT_DIR").expect("cargo sets it"));

    if let Err(problems) = build(&root, &out) {
        for p in &problems {
            // The first line as the build's error, any further lines (a fix) after it.
            for (i, line) in p.lines().enumerate() {
                if i == 0 {
                    println!("cargo::error={line}");
                } else {
                    println!("cargo::error=  {line}");
                }
            }
        }
        eprintln!(
            "the bundled data has {} problem{} (above); nothing was built",
            problems.len(),
            if problems.len() == 1 { "" } else { "s" }
        );
        std::process::exit(1);
    }
    // Printed only on success: a failed build script runs again anyway, and its output
    // then shows nothing but the problems.
    println!("cargo::rustc-check-cfg=cfg(offgas_whole_crate)");
    println!("cargo::rustc-cfg=offgas_whole_crate");
    println!("cargo::rerun-if-changed=build.rs");
    for m in MODULES {
        println!("cargo::rerun-if-changed={m}");
    }
    for f in files_in(&root.join("src/catalog"), "rs") {
        println!("cargo::rerun-if-changed=src/catalog/{f}");
    }
    // The folders too, so that a module or rule file added or removed is noticed (not
    // data/: it also holds the demo batches, and a change there must not rebuild the crate).
    for dir in ["src/catalog", "rules"] {
        println!("cargo::rerun-if-changed={dir}");
    }
    for f in CATALOG_FILES
        .iter()
        .chain([&GHS_FILE, &THRESHOLDS_FILE])
        .chain(RULE_FILES)
    {
        println!("cargo::rerun-if-changed={f}");
    }
}

/// The names of the files in `dir` with extension `ext`, sorted.
fn files_in(dir: &Path, ext: &str) -> Vec<String> {
    let mut names: Vec<String> = fs::read_dir(dir)
        .map(|rd| {
            rd.filter_map(Result::ok)
                .map(|e| e.file_name().to_string_lossy().into_owned())
                .filter(|n| n.ends_with(&format!(".{ext}")))
                .collect()
        })
        .unwrap_or_default();
    names.sort();
    names
}

/// Loads and checks every bundled file and writes the images; every problem found.
fn build(root: &Path, out: &Path) -> Result<(), Vec<String>> {
    let mut problems = Vec::new();

    // Every YAML file in data/ and rules/ must be one this script reads, so that nothing
    // ships unchecked and a new rule file is not silently left out.
    for (dir, known) in [
        ("data", [CATALOG_FILES, &[GHS_FILE]].concat()),
        ("rules", [RULE_FILES, &[THRESHOLDS_FILE]].concat()),
    ] {
        for f in files_in(&root.join(dir), "yaml") {
            let rel = format!("{dir}/{f}");
            if !known.contains(&rel.as_str()) {
                problems.push(format!(
                    "{rel}: build.rs does not know this file; list it in build.rs \
                     (RULE_FILES for a rule file) or move it out of {dir}/"
                ));
            }
        }
    }

    let mut texts = BTreeMap::new();
    let mut unreadable = false;
    for f in CATALOG_FILES
        .iter()
        .chain([&GHS_FILE, &THRESHOLDS_FILE])
        .chain(RULE_FILES)
    {
        match fs::read_to_string(root.join(f)) {
            Ok(t) => {
                texts.insert(*f, t);
            }
            Err(e) => {
                problems.push(format!("{f}: cannot be read: {e}"));
                unreadable = true;
            }
        }
    }
    if unreadable {
        return Err(problems);
    }
    let src = |f: &'static str| (f, texts[f].as_str());

    let cat = catalog::Catalog::load(catalog::DataSources {
        species: src("data/species.yaml"),
        substances: src("data/substances.yaml"),
        classes: src("data/classes.yaml"),
        limits: src("data/limits.yaml"),
        physical: src("data/physical.yaml"),
        combined: src("data/combined.yaml"),
        complexes: src("data/complexes.yaml"),
        releases: src("data/gas-release.yaml"),
        heat: src("data/heat.yaml"),
        density: src("data/density.yaml"),
        dilution: src("data/dilution-heat.yaml"),
        volatility: src("data/volatility.yaml"),
        pitzer: src("data/pitzer.yaml"),
        salting: src("data/salting-out.yaml"),
    });
    // Everything else is checked against the catalog, so its first problem ends the checks.
    let cat = match cat {
        Ok(cat) => cat,
        Err(e) => {
            problems.push(e.to_string());
            return Err(problems);
        }
    };

    let ghs = catalog::ghs::GhsTable::parse(GHS_FILE, &texts[GHS_FILE], &cat)
        .map_err(|e| problems.push(e.to_string()))
        .ok();
    let thresholds = judge::thresholds::Thresholds::parse(THRESHOLDS_FILE, &texts[THRESHOLDS_FILE])
        .map_err(|e| problems.push(e))
        .ok();

    let mut set = judge::rules::RuleSet::default();
    for f in RULE_FILES {
        let origin = judge::rules::Origin::BuiltIn {
            file: f.to_string(),
        };
        let loaded = judge::rules::RuleSet::parse_file(&cat, f, &texts[f], origin)
            .and_then(|loaded| set.extend(loaded));
        if let Err(errors) = loaded {
            problems.extend(errors.iter().map(|e| e.to_string()));
        }
    }
    let rule_image: RuleImage = set
        .rules
        .iter()
        .map(|r| {
            let (judge::rules::Origin::BuiltIn { file } | judge::rules::Origin::Site { file }) =
                &r.origin;
            (file.clone(), r.line, r.rule.clone())
        })
        .collect();

    let (Some(ghs), Some(thresholds), true) = (ghs, thresholds, problems.is_empty()) else {
        return Err(problems);
    };

    for (name, bytes) in [
        ("catalog.bin", image(&cat)),
        ("ghs.bin", image(&ghs)),
        ("thresholds.bin", image(&thresholds)),
        ("rules.bin", image(&rule_image)),
    ] {
        let bytes = bytes.map_err(|e| vec![format!("the {name} image cannot be written: {e}")])?;
        write_if_changed(&out.join(name), &bytes).map_err(|e| {
            vec![format!(
                "{}: cannot be written: {e}",
                out.join(name).display()
            )]
        })?;
    }

    // The rule files' text, for the tests that load them from YAML (`embedded::RULE_FILES`),
    // from the one list above.
    let mut listing = String::from(
        "/// The built-in hazard rule files, by the name they carry in reports, in the order\n\
         /// their rules are in force (generated by build.rs from its `RULE_FILES`).\n\
         pub const RULE_FILES: &[(&str, &str)] = &[\n",
    );
    for f in RULE_FILES {
        let path = root.join(f);
        let _ = writeln!(
            listing,
            "    ({f:?}, include_str!({:?})),",
            path.to_string_lossy()
        );
    }
    listing.push_str("];\n");
    write_if_changed(&out.join("rule_files.rs"), listing.as_bytes())
        .map_err(|e| vec![format!("rule_files.rs: cannot be written: {e}")])?;
    Ok(())
}

fn image<T: serde::Serialize>(value: &T) -> Result<Vec<u8>, postcard::Error> {
    postcard::to_stdvec(value)
}

/// Writes a file unless it already holds exactly these bytes (a file rewritten with the
/// same bytes would still count as changed for what includes it).
fn write_if_changed(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    if fs::read(path).is_ok_and(|old| old == bytes) {
        return Ok(());
    }
    fs::write(path, bytes)
}
