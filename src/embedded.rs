//! The bundled data files, compiled into the program so that it runs from anywhere.

use crate::catalog::{Catalog, DataSources};
use crate::thresholds::Thresholds;

pub const SPECIES: &str = include_str!("../data/species.yaml");
pub const SUBSTANCES: &str = include_str!("../data/substances.yaml");
pub const CLASSES: &str = include_str!("../data/classes.yaml");
pub const LIMITS: &str = include_str!("../data/limits.yaml");
pub const PHYSICAL: &str = include_str!("../data/physical.yaml");
pub const COMBINED: &str = include_str!("../data/combined.yaml");
pub const RELEASES: &str = include_str!("../data/gas-release.yaml");
pub const HEAT: &str = include_str!("../data/heat.yaml");
pub const DENSITY: &str = include_str!("../data/density.yaml");
pub const DILUTION: &str = include_str!("../data/dilution-heat.yaml");
pub const VOLATILITY: &str = include_str!("../data/volatility.yaml");
pub const GHS: &str = include_str!("../data/ghs.yaml");
pub const THRESHOLDS: &str = include_str!("../rules/thresholds.yaml");

/// The built-in hazard rule files, by the name they carry in reports.
pub const RULE_FILES: &[(&str, &str)] = &[
    (
        "rules/oxidisers.yaml",
        include_str!("../rules/oxidisers.yaml"),
    ),
    (
        "rules/gas-formers.yaml",
        include_str!("../rules/gas-formers.yaml"),
    ),
    (
        "rules/organics.yaml",
        include_str!("../rules/organics.yaml"),
    ),
    (
        "rules/presence.yaml",
        include_str!("../rules/presence.yaml"),
    ),
];

/// The bundled catalog. The bundled files are checked by the test suite, so a failure
/// here is a build defect, reported as such.
pub fn catalog() -> Result<Catalog, crate::catalog::CatalogError> {
    Catalog::load(DataSources {
        species: ("data/species.yaml", SPECIES),
        substances: ("data/substances.yaml", SUBSTANCES),
        classes: ("data/classes.yaml", CLASSES),
        limits: ("data/limits.yaml", LIMITS),
        physical: ("data/physical.yaml", PHYSICAL),
        combined: ("data/combined.yaml", COMBINED),
        releases: ("data/gas-release.yaml", RELEASES),
        heat: ("data/heat.yaml", HEAT),
        density: ("data/density.yaml", DENSITY),
        dilution: ("data/dilution-heat.yaml", DILUTION),
        volatility: ("data/volatility.yaml", VOLATILITY),
    })
}

/// The GHS hazard classes behind a waste tag's hazard words, checked against the catalog.
pub fn ghs(cat: &Catalog) -> Result<crate::catalog::ghs::GhsTable, crate::catalog::CatalogError> {
    crate::catalog::ghs::GhsTable::parse("data/ghs.yaml", GHS, cat)
}

pub fn thresholds() -> Result<Thresholds, String> {
    Thresholds::parse("rules/thresholds.yaml", THRESHOLDS)
}

/// The built-in rules, checked against the catalog's hazard classes.
pub fn rules(cat: &Catalog) -> Result<crate::rules::RuleSet, Vec<crate::rules::RuleError>> {
    let mut set = crate::rules::RuleSet::default();
    for (file, text) in RULE_FILES {
        let origin = crate::rules::Origin::BuiltIn {
            file: file.to_string(),
        };
        set.extend(crate::rules::RuleSet::parse_file(cat, file, text, origin)?)?;
    }
    Ok(set)
}
