//! `data/ghs.yaml`: which GHS hazard classes a constituent of each of offgas's own hazard
//! classes usually brings, and the rule by which a waste tag lists them.
//!
//! The table is loaded on its own, against a loaded catalog, rather than inside
//! `Catalog::load`: only the waste tag needs it. The bundled table is loaded and checked
//! when the program is built (`build.rs`), like the rest of the bundled data, and read back
//! from the binary image by `embedded::ghs`.

use super::{Catalog, CatalogError, Src};
use serde::{Deserialize, Serialize};

/// Which part of GHS a hazard class belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Deserialize, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum GhsPart {
    Physical,
    Health,
    Environmental,
}

/// A GHS hazard class by the name GHS gives it.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct GhsHazardClass {
    pub id: String,
    pub name: String,
    pub part: GhsPart,
    /// The GHS chapter that defines it, e.g. "3.1".
    pub chapter: String,
    pub source: String,
}

impl GhsHazardClass {
    /// The short citation a tag prints.
    pub fn citation(&self) -> String {
        format!("UN GHS rev. 10 (2023), chapter {}", self.chapter)
    }
}

/// What one of offgas's classes usually brings.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct ClassHazards {
    pub class: String,
    pub ghs: Vec<String>,
    /// Listed whatever the share: the acutely toxic classes.
    #[serde(default)]
    pub any_amount: bool,
    pub source: String,
    #[serde(default)]
    pub note: Option<String>,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct CutOff {
    /// % by mass of the contents.
    pub value: f64,
    pub source: String,
}

/// The pH at or beyond which the contents count as corrosive whatever went in.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct ExtremePh {
    pub at_or_below: f64,
    pub at_or_above: f64,
    pub hazard: String,
    pub source: String,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Listing {
    pub cut_off: CutOff,
    pub extreme_ph: ExtremePh,
    /// The rule in words, printed on every tag.
    pub statement: String,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct GhsFile {
    #[allow(dead_code)]
    description: String,
    #[allow(dead_code)]
    units: serde_yaml::Value,
    listing: Listing,
    hazard_classes: Vec<GhsHazardClass>,
    classes: Vec<ClassHazards>,
}

impl GhsFile {
    fn lists_hazard(&self, id: &str) -> bool {
        self.hazard_classes.iter().any(|h| h.id == id)
    }
}

/// The loaded table, every reference resolved.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct GhsTable {
    pub listing: Listing,
    pub hazard_classes: Vec<GhsHazardClass>,
    pub classes: Vec<ClassHazards>,
}

impl GhsTable {
    /// Parses the table and checks it against the catalog's hazard classes.
    pub fn parse(file: &str, text: &str, cat: &Catalog) -> Result<GhsTable, CatalogError> {
        let parsed: GhsFile = super::parse((file, text))?;
        let src = Src::new((file, text));
        check_listing(&parsed, src)?;
        check_hazard_classes_once(&parsed.hazard_classes, src)?;
        check_classes(&parsed, cat, src)?;
        Ok(GhsTable {
            listing: parsed.listing,
            hazard_classes: parsed.hazard_classes,
            classes: parsed.classes,
        })
    }

    /// What a class of data/classes.yaml brings; `None` when the table does not cover it.
    pub fn of_class(&self, class: &str) -> Option<&ClassHazards> {
        self.classes.iter().find(|c| c.class == class)
    }

    pub fn hazard(&self, id: &str) -> Option<&GhsHazardClass> {
        self.hazard_classes.iter().find(|h| h.id == id)
    }

    /// Classes of the catalog the table does not cover.
    pub fn unmapped<'c>(&self, cat: &'c Catalog) -> Vec<&'c str> {
        cat.classes
            .iter()
            .map(|c| c.id.as_str())
            .filter(|id| self.of_class(id).is_none())
            .collect()
    }
}

/// The listing rule: a cut-off that is a share of the contents, an extreme-pH band that is
/// a band, and a hazard for it that the table lists. (A block as a whole is found by its
/// key with an empty value.)
fn check_listing(parsed: &GhsFile, src: Src<'_>) -> Result<(), CatalogError> {
    let cut = parsed.listing.cut_off.value;
    if !(cut > 0.0 && cut <= 100.0) {
        return Err(src.err_in(
            "listing",
            "cut_off",
            "",
            0,
            format!(
                "listing.cut_off {cut} must be a share of the contents above 0 and at most 100 %"
            ),
        ));
    }
    let ph = &parsed.listing.extreme_ph;
    if ph.at_or_below.partial_cmp(&ph.at_or_above) != Some(std::cmp::Ordering::Less) {
        return Err(src.err_in(
            "listing",
            "extreme_ph",
            "",
            0,
            "listing.extreme_ph: at_or_below must lie below at_or_above".into(),
        ));
    }
    if !parsed.lists_hazard(&ph.hazard) {
        return Err(src.err_in(
            "listing",
            "hazard",
            &ph.hazard,
            0,
            format!(
                "listing.extreme_ph names `{}`, which is not in hazard_classes",
                ph.hazard
            ),
        ));
    }
    Ok(())
}

fn check_hazard_classes_once(
    hazard_classes: &[GhsHazardClass],
    src: Src<'_>,
) -> Result<(), CatalogError> {
    for (i, h) in hazard_classes.iter().enumerate() {
        if hazard_classes[..i].iter().any(|x| x.id == h.id) {
            return Err(src.err_in(
                "hazard_classes",
                "id",
                &h.id,
                1,
                format!("hazard class `{}` appears twice", h.id),
            ));
        }
    }
    Ok(())
}

/// Each of offgas's classes is one of data/classes.yaml, listed once, naming only hazard
/// classes of the table, with a source.
fn check_classes(parsed: &GhsFile, cat: &Catalog, src: Src<'_>) -> Result<(), CatalogError> {
    for (i, c) in parsed.classes.iter().enumerate() {
        let bad = |nth: usize, m: String| src.err_in("classes", "class", &c.class, nth, m);
        if cat.class(&c.class).is_none() {
            return Err(bad(
                0,
                format!("`{}` is not a class of data/classes.yaml", c.class),
            ));
        }
        if parsed.classes[..i].iter().any(|x| x.class == c.class) {
            return Err(bad(1, format!("class `{}` appears twice", c.class)));
        }
        if let Some(g) = c.ghs.iter().find(|g| !parsed.lists_hazard(g)) {
            return Err(bad(
                0,
                format!(
                    "class `{}` names `{g}`, which is not in hazard_classes",
                    c.class
                ),
            ));
        }
        if c.source.trim().is_empty() {
            return Err(bad(0, format!("class `{}` needs a source", c.class)));
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::GhsTable;

    fn bundled() -> (crate::catalog::Catalog, GhsTable) {
        let cat = crate::embedded::catalog().expect("the bundled catalog loads");
        let table = crate::embedded::ghs(&cat).expect("data/ghs.yaml loads");
        (cat, table)
    }

    #[test]
    fn every_class_is_mapped() {
        let (cat, table) = bundled();
        assert_eq!(table.unmapped(&cat), Vec::<&str>::new());
    }

    #[test]
    fn the_statement_gives_the_cut_off_in_force() {
        let (_, table) = bundled();
        let cut = format!("{} %", table.listing.cut_off.value);
        assert!(
            table.listing.statement.contains(&cut),
            "the statement must say {cut}"
        );
        let ph = &table.listing.extreme_ph;
        for v in [ph.at_or_below, ph.at_or_above] {
            assert!(table.listing.statement.contains(&format!("{v}")));
        }
    }

    #[test]
    fn the_acutely_toxic_classes_are_listed_in_any_amount() {
        let (_, table) = bundled();
        for class in ["cyanide", "azide", "arsenic"] {
            let c = table.of_class(class).unwrap();
            assert!(c.any_amount, "{class}");
            assert!(c.ghs.iter().any(|g| g == "acute_toxicity"), "{class}");
        }
    }

    #[test]
    fn a_table_naming_an_unknown_class_is_refused() {
        let cat = crate::embedded::catalog().unwrap();
        let text = crate::embedded::GHS.replace("class: inert", "class: inertt");
        let e = GhsTable::parse("data/ghs.yaml", &text, &cat).unwrap_err();
        assert!(e.to_string().contains("inertt"), "{e}");
    }
}
