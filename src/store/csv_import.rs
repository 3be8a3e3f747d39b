//! CSV import of an inventory (placeholder until the importer lands; refuses every file).

use super::Inventory;
use crate::batch::InputError;
use crate::catalog::Catalog;

#[derive(Debug, Clone, Default)]
pub struct ColumnMapping {
    _placeholder: (),
}

#[derive(Debug, Clone, serde::Serialize)]
pub struct SkippedRow {
    pub row: usize,
    pub id: Option<String>,
    pub message: String,
}

pub fn parse_mapping(_spec: &str) -> Result<ColumnMapping, String> {
    Err("CSV import is not available yet".into())
}

pub fn mapping_from_yaml(_text: &str) -> Result<ColumnMapping, String> {
    Err("CSV import is not available yet".into())
}

pub fn import(
    _cat: &Catalog,
    file: &str,
    _text: &str,
    _m: &ColumnMapping,
    _skip: bool,
) -> Result<(Inventory, Vec<SkippedRow>), Vec<InputError>> {
    Err(vec![InputError {
        file: file.into(),
        line: None,
        message: "CSV import is not available yet".into(),
        fix: None,
    }])
}
