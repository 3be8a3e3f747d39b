//! The bundled data, compiled into the program so that it runs from anywhere.
//!
//! `build.rs` loads `data/*.yaml` and `rules/*.yaml` with the program's own loaders and
//! checks, and writes what they return as binary images (postcard) into `OUT_DIR`; the
//! functions here read those images back, which takes a fraction of a millisecond where
//! parsing the YAML took most of a check's time. The YAML text is kept here too, for the
//! tests that load it the way the build script does (`tests/embedded_image.rs` checks that
//! the images are exactly what the text loads to).

use crate::catalog::ghs::GhsTable;
use crate::catalog::{Catalog, CatalogError, DataSources};
use crate::judge::rules::{LoadedRule, Origin, Rule, RuleError, RuleSet};
use crate::judge::thresholds::Thresholds;

pub const SPECIES: &str = include_str!("../data/species.yaml");
pub const SUBSTANCES: &str = include_str!("../data/substances.yaml");
pub const CLASSES: &str = include_str!("../data/classes.yaml");
pub const LIMITS: &str = include_str!("../data/limits.yaml");
pub const PHYSICAL: &str = include_str!("../data/physical.yaml");
pub const COMBINED: &str = include_str!("../data/combined.yaml");
pub const COMPLEXES: &str = include_str!("../data/complexes.yaml");
pub const RELEASES: &str = include_str!("../data/gas-release.yaml");
pub const HEAT: &str = include_str!("../data/heat.yaml");
pub const DENSITY: &str = include_str!("../data/density.yaml");
pub const DILUTION: &str = include_str!("../data/dilution-heat.yaml");
pub const VOLATILITY: &str = include_str!("../data/volatility.yaml");
pub const PITZER: &str = include_str!("../data/pitzer.yaml");
pub const SALTING: &str = include_str!("../data/salting-out.yaml");
pub const GHS: &str = include_str!("../data/ghs.yaml");
pub const THRESHOLDS: &str = include_str!("../rules/thresholds.yaml");

// `RULE_FILES`: the built-in hazard rule files (name, text), from the list in build.rs.
include!(concat!(env!("OUT_DIR"), "/rule_files.rs"));

/// The loaded catalog, as `Catalog::load` returned it for the files above.
pub const CATALOG_IMAGE: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/catalog.bin"));
/// The GHS table, as `GhsTable::parse` returned it against that catalog.
pub const GHS_IMAGE: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/ghs.bin"));
/// The thresholds, as `Thresholds::parse` returned them.
pub const THRESHOLDS_IMAGE: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/thresholds.bin"));
/// The built-in rules in force, in order, each as (file, line of its id, rule).
pub const RULES_IMAGE: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/rules.bin"));

/// The shape of [`RULES_IMAGE`].
pub type RuleImage = Vec<(String, Option<usize>, Rule)>;

/// The text of the bundled catalog files, as `Catalog::load` takes it.
pub fn sources() -> DataSources<'static> {
    DataSources {
        species: ("data/species.yaml", SPECIES),
        substances: ("data/substances.yaml", SUBSTANCES),
        classes: ("data/classes.yaml", CLASSES),
        limits: ("data/limits.yaml", LIMITS),
        physical: ("data/physical.yaml", PHYSICAL),
        combined: ("data/combined.yaml", COMBINED),
        complexes: ("data/complexes.yaml", COMPLEXES),
        releases: ("data/gas-release.yaml", RELEASES),
        heat: ("data/heat.yaml", HEAT),
        density: ("data/density.yaml", DENSITY),
        dilution: ("data/dilution-heat.yaml", DILUTION),
        volatility: ("data/volatility.yaml", VOLATILITY),
        pitzer: ("data/pitzer.yaml", PITZER),
        salting: ("data/salting-out.yaml", SALTING),
    }
}

/// An image that does not read back is a build defect (the build wrote it from these types).
fn image_error(what: &str, e: postcard::Error) -> String {
    format!("the compiled {what} image does not read back ({e}): rebuild offgas")
}

/// The bundled catalog. The build checked the data files, so a failure here is a build
/// defect, reported as such.
pub fn catalog() -> Result<Catalog, CatalogError> {
    postcard::from_bytes(CATALOG_IMAGE).map_err(|e| CatalogError::Parse {
        file: "data/*.yaml".into(),
        line: None,
        message: image_error("catalog", e),
    })
}

/// The GHS hazard classes behind a waste tag's hazard words. The build checked them against
/// the bundled catalog, which is the one `cat` is.
pub fn ghs(_cat: &Catalog) -> Result<GhsTable, CatalogError> {
    postcard::from_bytes(GHS_IMAGE).map_err(|e| CatalogError::Parse {
        file: "data/ghs.yaml".into(),
        line: None,
        message: image_error("GHS table", e),
    })
}

pub fn thresholds() -> Result<Thresholds, String> {
    postcard::from_bytes(THRESHOLDS_IMAGE)
        .map_err(|e| format!("rules/thresholds.yaml: {}", image_error("thresholds", e)))
}

/// The built-in rules. The build checked them against the bundled catalog's hazard
/// classes, which is the one `cat` is.
pub fn rules(cat: &Catalog) -> Result<RuleSet, Vec<RuleError>> {
    let image: RuleImage = postcard::from_bytes(RULES_IMAGE).map_err(|e| {
        vec![RuleError {
            file: "rules/*.yaml".into(),
            line: None,
            message: image_error("rules", e),
        }]
    })?;
    Ok(RuleSet {
        rules: image
            .into_iter()
            .map(|(file, line, rule)| LoadedRule::new(cat, rule, Origin::BuiltIn { file }, line))
            .collect(),
    })
}
