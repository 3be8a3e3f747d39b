//! CSV import of an inventory, since storerooms are kept in spreadsheets.
//!
//! A column mapping says which header holds each field. A row with no liquid volume is one
//! container of a neat reagent (a substance and its amount). Several rows with the same id
//! and a liquid volume are one solution: each row names a substance and its concentration
//! (or its total amount in the solution). In the later rows of a solution, an empty
//! location, size or volume cell means "as above".
//!
//! A location is a path of one to six levels (see the `store` module): one column holding
//! `Store B / Cabinet 2 / Tray 1`, or several columns joined in the order the mapping names
//! them (`location=Building+Room+Cabinet+Shelf`), empty cells skipped, so that a row can
//! stop at the level it knows (`Cab 1` with no shelf).
//!
//! Every row that cannot be read is reported with its row number as a spreadsheet shows it
//! (the header is row 1). The caller decides whether bad rows stop the import, with all of
//! them listed at once, or are skipped and listed; a solution with one bad row is skipped
//! whole, since what is left of it would not be what the container holds.

use super::{
    counted, depths_from_the_end, neat_contents, parse_location, Contents, Inventory,
    StoredContainer,
};
use crate::basics::quantity::{parse_amount, parse_volume, Amount};
use crate::catalog::{Catalog, PhysicalState};
use crate::pour::batch::{Batch, InputError};
use serde::{Deserialize, Serialize};
use std::collections::{BTreeMap, HashMap};

/// The header (first row) name of each field's column. Headers are matched without regard
/// to case or surrounding spaces.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ColumnMapping {
    pub id: String,
    /// Name, synonym, formula or CAS number.
    pub substance: String,
    /// "500 g", "20 g/L", or a bare number with its unit in the `unit` column.
    pub amount: String,
    pub unit: Option<String>,
    /// Container size with its unit ("2.5 L").
    pub size: String,
    /// The column(s) of the location path, outermost first. One column holds the whole
    /// path ("Store B / Cabinet 2 / Tray 1"); several are joined in this order, empty
    /// cells skipped. Each cell may hold several levels of its own, separated by `/`.
    pub location: Vec<String>,
    /// Liquid volume of a solution; a row without one is a neat reagent.
    pub volume: Option<String>,
}

impl Default for ColumnMapping {
    /// Headers `id, substance, amount, unit, size, location, volume`. Under this mapping
    /// the `unit` and `volume` columns may be left out of the file; a mapping that names
    /// an optional column requires it.
    fn default() -> Self {
        ColumnMapping {
            id: "id".into(),
            substance: "substance".into(),
            amount: "amount".into(),
            unit: Some("unit".into()),
            size: "size".into(),
            location: vec!["location".into()],
            volume: Some("volume".into()),
        }
    }
}

const KEYS: [&str; 7] = [
    "id",
    "substance",
    "amount",
    "unit",
    "size",
    "location",
    "volume",
];
const REQUIRED: [&str; 5] = ["id", "substance", "amount", "size", "location"];

/// The one field that may be built from several columns.
const MULTI: &str = "location";

/// A field's header name(s) as a mapping gives them.
enum Headers {
    /// One name; for `location`, `+` joins several (`Building+Room+Cabinet`).
    Joined(String),
    /// A list of names, taken as written (a mapping file's `[Building, Room, Cabinet]`).
    List(Vec<String>),
}

impl ColumnMapping {
    /// Builds a mapping from (field, header) pairs, naming every mistake at once.
    fn from_pairs(pairs: Vec<(String, Headers)>) -> Result<ColumnMapping, String> {
        let mut given: BTreeMap<&str, Vec<String>> = BTreeMap::new();
        let mut problems = Vec::new();
        for (key, headers) in &pairs {
            let key = key.trim();
            match field_headers(key, headers) {
                Err(problem) => problems.push(problem),
                Ok((k, names)) => {
                    if given.insert(k, names).is_some() {
                        problems.push(format!("`{key}` is given twice"));
                    }
                }
            }
        }
        let missing: Vec<&str> = REQUIRED
            .iter()
            .copied()
            .filter(|k| !given.contains_key(k))
            .collect();
        if !missing.is_empty() {
            problems.push(format!(
                "missing the column for: {} (required: {}; optional: unit, volume)",
                missing.join(", "),
                REQUIRED.join(", ")
            ));
        }
        if !problems.is_empty() {
            return Err(format!("column mapping: {}", problems.join("; ")));
        }
        let mut one = |k: &str| given.remove(k).and_then(|v| v.into_iter().next());
        let id = one("id").unwrap_or_default();
        let substance = one("substance").unwrap_or_default();
        let amount = one("amount").unwrap_or_default();
        let unit = one("unit");
        let size = one("size").unwrap_or_default();
        let volume = one("volume");
        Ok(ColumnMapping {
            id,
            substance,
            amount,
            unit,
            size,
            location: given.remove(MULTI).unwrap_or_default(),
            volume,
        })
    }

    /// The location's column names as a mapping writes them (`Building+Room+Cabinet`).
    pub fn location_spec(&self) -> String {
        self.location.join("+")
    }

    /// The location's columns for a message: "the `Location` column" or "the `Building`,
    /// `Room` and `Cabinet` columns".
    fn location_columns(&self) -> String {
        let names: Vec<String> = self.location.iter().map(|n| format!("`{n}`")).collect();
        match names.as_slice() {
            [one] => format!("the {one} column"),
            [rest @ .., last] => format!("the {} and {last} columns", rest.join(", ")),
            [] => "the location column".into(),
        }
    }
}

/// The field `key` names and its header names, trimmed, or what is wrong with them.
fn field_headers(key: &str, headers: &Headers) -> Result<(&'static str, Vec<String>), String> {
    let Some(k) = KEYS.iter().find(|k| **k == key) else {
        return Err(format!(
            "`{key}` is not a field (the fields are: {})",
            KEYS.join(", ")
        ));
    };
    let names: Vec<String> = match headers {
        Headers::Joined(h) if *k == MULTI => h.split('+').map(|p| p.trim().to_string()).collect(),
        Headers::Joined(h) => vec![h.trim().to_string()],
        Headers::List(l) => l.iter().map(|p| p.trim().to_string()).collect(),
    };
    if names.len() > 1 && *k != MULTI {
        return Err(format!(
            "`{key}` names {} columns; only `{MULTI}` can be built from several",
            names.len()
        ));
    }
    if names.iter().all(|n| n.is_empty()) {
        return Err(format!("`{key}` has no header name"));
    }
    if names.iter().any(|n| n.is_empty()) {
        return Err(format!(
            "`{key}` has an empty header name among its columns (`{}`)",
            names.join("+")
        ));
    }
    if let Some(dup) = names
        .iter()
        .enumerate()
        .find(|(i, n)| names[..*i].iter().any(|m| m.eq_ignore_ascii_case(n)))
        .map(|(_, n)| n)
    {
        return Err(format!("`{key}` names the column `{dup}` twice"));
    }
    if names.len() > super::MAX_LOCATION_LEVELS {
        return Err(format!(
            "`{key}` joins {} columns; a location has at most {} levels",
            names.len(),
            super::MAX_LOCATION_LEVELS
        ));
    }
    Ok((k, names))
}

/// Reads a command-line mapping such as
/// `id=Bottle ID,substance=Chemical,amount=Qty,unit=Unit,size=Container,location=Location`.
/// The location may join several columns with `+`, outermost first:
/// `location=Building+Room+Cabinet+Shelf`.
pub fn parse_mapping(spec: &str) -> Result<ColumnMapping, String> {
    let mut pairs = Vec::new();
    for part in spec.split(',').filter(|p| !p.trim().is_empty()) {
        let (k, v) = part.split_once('=').ok_or_else(|| {
            format!(
                "column mapping: `{}` is not `field=Header` (e.g. `id=Bottle ID,substance=Chemical,...`)",
                part.trim()
            )
        })?;
        pairs.push((k.to_string(), Headers::Joined(v.to_string())));
    }
    ColumnMapping::from_pairs(pairs)
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct MappingFile {
    columns: BTreeMap<String, FileHeaders>,
    #[serde(default)]
    #[allow(dead_code)]
    note: Option<String>,
}

#[derive(Deserialize)]
#[serde(untagged)]
enum FileHeaders {
    One(String),
    List(Vec<String>),
}

/// Reads a mapping file: `columns: { id: "Bottle ID", substance: Chemical, ... }`. The
/// location may join several columns, as `location: Building+Room+Cabinet+Shelf` (as on
/// the command line) or as a list, `location: [Building, Room, Cabinet, Shelf]`, whose
/// names are taken as written (a `+` in a list item is part of the header).
pub fn mapping_from_yaml(text: &str) -> Result<ColumnMapping, String> {
    let f: MappingFile = serde_yaml::from_str(text).map_err(|e| {
        format!(
            "not a readable column mapping: {e} (write it as `columns: {{ id: \"Bottle ID\", substance: Chemical, ..., location: Building+Room+Cabinet }}`)"
        )
    })?;
    ColumnMapping::from_pairs(
        f.columns
            .into_iter()
            .map(|(k, v)| {
                let h = match v {
                    FileHeaders::One(s) => Headers::Joined(s),
                    FileHeaders::List(l) => Headers::List(l),
                };
                (k, h)
            })
            .collect(),
    )
}

/// The message that refuses an import, with every bad row: "1 row of store.csv cannot be
/// read; nothing was audited:" and the rows, one a line.
pub fn refusal_message(file: &str, errors: &[InputError]) -> String {
    let list: Vec<String> = errors.iter().map(|e| format!("  {e}")).collect();
    let rows: std::collections::BTreeSet<Option<usize>> = errors.iter().map(|e| e.line).collect();
    format!(
        "{} of {file} cannot be read; nothing was audited:\n{}\n  (--skip-bad-rows audits the rest and lists {})",
        counted(rows.len(), "row", "rows"),
        list.join("\n"),
        if rows.len() == 1 { "it" } else { "them" }
    )
}

/// A row left out of the import, for the report.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SkippedRow {
    /// Row number as a spreadsheet shows it (the header is row 1).
    pub row: usize,
    pub id: Option<String>,
    pub message: String,
}

/// A row's problem, before it becomes an error or a skipped row.
struct Bad {
    row: usize,
    id: Option<String>,
    message: String,
    fix: Option<String>,
}

/// One data row, cells trimmed ("" where the column is absent or the row is short).
struct Row {
    row: usize,
    id: String,
    substance: String,
    amount: String,
    unit: String,
    size: String,
    location: String,
    volume: String,
}

/// Reads an inventory from CSV text. `file` names it in messages and becomes the
/// inventory's name. With `skip_bad_rows`, rows that cannot be read are left out and
/// returned; without it, any bad row makes the import fail with every bad row listed.
pub fn import(
    cat: &Catalog,
    file: &str,
    text: &str,
    mapping: &ColumnMapping,
    skip_bad_rows: bool,
) -> Result<(Inventory, Vec<SkippedRow>), Vec<InputError>> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let (mut reader, headers) = open_csv(file, text)?;
    let cols =
        find_columns(&headers, mapping).map_err(|(m, fix)| header_error(file, m, Some(fix)))?;
    let (groups, mut bad) = read_rows(&mut reader, &cols, mapping);
    let (containers, skipped_with) = build_containers(cat, file, mapping, &groups, &mut bad);
    bad.sort_by_key(|b| b.row);
    if !bad.is_empty() && !skip_bad_rows {
        return Err(refusal(file, bad));
    }
    let skipped = skipped_rows(bad, skipped_with);
    let (meet_depth, cabinet_depth) =
        depths_from_the_end(containers.iter().map(|c| c.path.as_slice()));
    let inventory = Inventory {
        file: file.to_string(),
        name: file.to_string(),
        meet_depth,
        cabinet_depth,
        rooms: Vec::new(),
        locations: Vec::new(),
        containers,
    };
    Ok((inventory, skipped))
}

/// A problem with the file as a whole, reported on its header row.
fn header_error(file: &str, message: String, fix: Option<String>) -> Vec<InputError> {
    vec![InputError {
        file: file.to_string(),
        line: Some(1),
        message,
        fix,
    }]
}

/// A CSV reader over text held in memory.
type TextReader<'t> = csv::Reader<&'t [u8]>;

/// A reader past the header row, and the header's names, trimmed.
fn open_csv<'t>(
    file: &str,
    text: &'t str,
) -> Result<(TextReader<'t>, Vec<String>), Vec<InputError>> {
    let mut reader = csv::ReaderBuilder::new()
        .delimiter(delimiter(text))
        .flexible(true)
        .from_reader(text.as_bytes());
    let headers: Vec<String> = match reader.headers() {
        Ok(h) => h.iter().map(|s| s.trim().to_string()).collect(),
        Err(e) => {
            return Err(header_error(
                file,
                format!("the header row cannot be read: {e}"),
                None,
            ))
        }
    };
    if headers.iter().all(|h| h.is_empty()) {
        return Err(header_error(
            file,
            "the file has no header row".into(),
            Some(
                "the first row names the columns, e.g. `id,substance,amount,size,location`".into(),
            ),
        ));
    }
    Ok((reader, headers))
}

/// The data rows grouped by container id, in the order the ids first appear, and the rows
/// that cannot be read or name no container. Blank rows are passed over.
fn read_rows(
    reader: &mut TextReader,
    cols: &Columns,
    mapping: &ColumnMapping,
) -> (Vec<(String, Vec<Row>)>, Vec<Bad>) {
    let mut bad: Vec<Bad> = Vec::new();
    let mut groups: Vec<(String, Vec<Row>)> = Vec::new();
    let mut group_of: HashMap<String, usize> = HashMap::new();
    let mut last_row = 1;
    for record in reader.records() {
        let record = match record {
            Ok(r) => r,
            Err(e) => {
                let row = e
                    .position()
                    .map(|p| p.line() as usize)
                    .unwrap_or(last_row + 1);
                bad.push(Bad {
                    row,
                    id: None,
                    message: format!("the row cannot be read: {e}"),
                    fix: None,
                });
                last_row = row;
                continue;
            }
        };
        let row = record
            .position()
            .map(|p| p.line() as usize)
            .unwrap_or(last_row + 1);
        last_row = row;
        if record.iter().all(|c| c.trim().is_empty()) {
            continue;
        }
        let r = row_cells(&record, row, cols);
        if r.id.is_empty() {
            bad.push(Bad {
                row,
                id: None,
                message: "the row has no container id".into(),
                fix: Some(format!(
                    "give every container an id in the `{}` column",
                    mapping.id
                )),
            });
            continue;
        }
        match group_of.get(&r.id) {
            Some(&g) => groups[g].1.push(r),
            None => {
                group_of.insert(r.id.clone(), groups.len());
                groups.push((r.id.clone(), vec![r]));
            }
        }
    }
    (groups, bad)
}

/// One record's cells by field, trimmed.
fn row_cells(record: &csv::StringRecord, row: usize, cols: &Columns) -> Row {
    let cell = |i: Option<usize>| {
        i.and_then(|i| record.get(i))
            .unwrap_or("")
            .trim()
            .to_string()
    };
    // The location's columns joined outermost first, empty cells skipped.
    let location = cols
        .location
        .iter()
        .map(|&i| cell(Some(i)))
        .filter(|c| !c.is_empty())
        .collect::<Vec<_>>()
        .join(" / ");
    Row {
        row,
        id: cell(Some(cols.id)),
        substance: cell(Some(cols.substance)),
        amount: cell(Some(cols.amount)),
        unit: cell(cols.unit),
        size: cell(Some(cols.size)),
        location,
        volume: cell(cols.volume),
    }
}

/// The containers that can be built, in the order of their ids; the problems of the
/// others go to `bad`, and their good rows are returned as (row, id, first bad row),
/// since they are skipped with them.
fn build_containers(
    cat: &Catalog,
    file: &str,
    mapping: &ColumnMapping,
    groups: &[(String, Vec<Row>)],
    bad: &mut Vec<Bad>,
) -> (Vec<StoredContainer>, Vec<(usize, String, usize)>) {
    let mut containers = Vec::with_capacity(groups.len());
    let mut skipped_with: Vec<(usize, String, usize)> = Vec::new();
    for (id, rows) in groups {
        match container(cat, file, mapping, id, rows) {
            Ok(c) => containers.push(c),
            Err(errs) => {
                let first_bad = errs.iter().map(|b| b.row).min().unwrap_or(rows[0].row);
                for r in rows {
                    if !errs.iter().any(|b| b.row == r.row) {
                        skipped_with.push((r.row, id.clone(), first_bad));
                    }
                }
                bad.extend(errs);
            }
        }
    }
    (containers, skipped_with)
}

/// Every bad row as an error, for an import that stops.
fn refusal(file: &str, bad: Vec<Bad>) -> Vec<InputError> {
    bad.into_iter()
        .map(|b| InputError {
            file: file.to_string(),
            line: Some(b.row),
            message: format!("row {}: {}", b.row, b.message),
            fix: b.fix,
        })
        .collect()
}

/// The bad rows and the rows skipped with them, in row order, for an import that goes on.
fn skipped_rows(bad: Vec<Bad>, skipped_with: Vec<(usize, String, usize)>) -> Vec<SkippedRow> {
    let mut skipped: Vec<SkippedRow> = bad
        .into_iter()
        .map(|b| SkippedRow {
            row: b.row,
            id: b.id,
            message: match b.fix {
                Some(fix) => format!("{}; fix: {fix}", b.message),
                None => b.message,
            },
        })
        .collect();
    skipped.extend(skipped_with.into_iter().map(|(row, id, first_bad)| SkippedRow {
        row,
        message: format!("skipped with the rest of container `{id}`, whose row {first_bad} cannot be read"),
        id: Some(id),
    }));
    skipped.sort_by_key(|s| s.row);
    skipped
}

/// The separator of the header line: a comma, or the semicolon or tab some spreadsheets
/// write instead.
fn delimiter(text: &str) -> u8 {
    let first = text.lines().next().unwrap_or("");
    [b',', b';', b'\t']
        .into_iter()
        .max_by_key(|d| (first.bytes().filter(|b| b == d).count(), *d == b','))
        .unwrap_or(b',')
}

struct Columns {
    id: usize,
    substance: usize,
    amount: usize,
    unit: Option<usize>,
    size: usize,
    location: Vec<usize>,
    volume: Option<usize>,
}

/// Finds each mapped column in the header; names all missing ones at once.
fn find_columns(headers: &[String], m: &ColumnMapping) -> Result<Columns, (String, String)> {
    let lenient = *m == ColumnMapping::default();
    let mut missing = Vec::new();
    let mut twice = Vec::new();
    let mut find = |name: &str, required: bool| -> Option<usize> {
        let hits: Vec<usize> = (0..headers.len())
            .filter(|&i| headers[i].eq_ignore_ascii_case(name.trim()))
            .collect();
        if hits.len() > 1 {
            twice.push(format!("`{name}`"));
        }
        if hits.is_empty() && required {
            missing.push(format!("`{name}`"));
        }
        hits.first().copied()
    };
    let id = find(&m.id, true);
    let substance = find(&m.substance, true);
    let amount = find(&m.amount, true);
    let unit = m.unit.as_deref().and_then(|u| find(u, !lenient));
    let size = find(&m.size, true);
    let location: Vec<Option<usize>> = m.location.iter().map(|l| find(l, true)).collect();
    let volume = m.volume.as_deref().and_then(|v| find(v, !lenient));
    let present = headers
        .iter()
        .filter(|h| !h.is_empty())
        .map(|h| format!("`{h}`"))
        .collect::<Vec<_>>()
        .join(", ");
    if !missing.is_empty() {
        return Err((
            format!("the header has no column {}; its columns are: {present}", missing.join(", ")),
            "rename the columns in the spreadsheet, or give a column mapping such as `id=Bottle ID,substance=Chemical,amount=Qty,unit=Unit,size=Container,location=Location`".into(),
        ));
    }
    if !twice.is_empty() {
        return Err((
            format!(
                "the header has more than one column named {}",
                twice.join(", ")
            ),
            "give each column its own header name".into(),
        ));
    }
    let location: Option<Vec<usize>> = location.into_iter().collect();
    match (id, substance, amount, size, location) {
        (Some(id), Some(substance), Some(amount), Some(size), Some(location))
            if !location.is_empty() =>
        {
            Ok(Columns {
                id,
                substance,
                amount,
                unit,
                size,
                location,
                volume,
            })
        }
        _ => Err((
            "the column mapping names no location column".into(),
            "map the location, e.g. `location=Location` or `location=Building+Room+Cabinet`".into(),
        )),
    }
}

/// How to write a location, for a row whose location is missing or too deep.
fn location_fix(m: &ColumnMapping) -> String {
    if m.location.len() > 1 {
        format!(
            "fill {} from the outermost, leaving empty the levels a place does not have; a location has 1 to {} levels, the spill zone last",
            m.location_columns(),
            super::MAX_LOCATION_LEVELS
        )
    } else {
        format!(
            "write 1 to {} levels from the outermost, separated by `/`, the spill zone last, e.g. `Store B / Cabinet 2 / Tray 1`",
            super::MAX_LOCATION_LEVELS
        )
    }
}

/// A hint for numbers written with a decimal comma.
fn comma_fix(text: &str) -> Option<String> {
    text.contains(',')
        .then(|| "write decimals with a point (2.5, not 2,5)".to_string())
}

/// A row's amount with its unit: the amount cell, or a bare number there with the unit
/// cell after it.
fn amount_text(r: &Row, m: &ColumnMapping) -> Result<String, (String, Option<String>)> {
    if r.amount.is_empty() {
        return Err((format!("no amount in the `{}` column", m.amount), None));
    }
    if r.amount.parse::<f64>().is_ok() {
        if r.unit.is_empty() {
            let fix = match &m.unit {
                Some(u) => format!(
                    "add the unit, e.g. `{} g`, or put it in the `{u}` column",
                    r.amount
                ),
                None => format!("add the unit, e.g. `{} g`", r.amount),
            };
            return Err((format!("the amount `{}` has no unit", r.amount), Some(fix)));
        }
        return Ok(format!("{} {}", r.amount, r.unit));
    }
    let squeeze = |s: &str| s.chars().filter(|c| !c.is_whitespace()).collect::<String>();
    let amount = squeeze(&r.amount);
    if !r.unit.is_empty() && !amount.ends_with(&squeeze(&r.unit)) {
        return Err((
            format!(
                "the amount `{}` has a unit of its own, and the unit column says `{}`",
                r.amount, r.unit
            ),
            Some("give the unit in one place only".into()),
        ));
    }
    Ok(r.amount.clone())
}

/// A container's problems as they are found, each naming the container.
struct Problems<'a> {
    id: &'a str,
    bad: Vec<Bad>,
}

impl Problems<'_> {
    fn add(&mut self, row: usize, message: String, fix: Option<String>) {
        self.bad.push(Bad {
            row,
            id: Some(self.id.to_string()),
            message: format!("container `{}`: {message}", self.id),
            fix,
        });
    }
}

/// A container's location, size and liquid volume, each with the row it was first given
/// on.
#[derive(Default)]
struct SharedCells {
    location: Option<(usize, Vec<String>)>,
    size: Option<(usize, f64)>,
    volume: Option<(usize, f64)>,
}

/// One container from its rows (one for a neat reagent, one or more for a solution).
fn container(
    cat: &Catalog,
    file: &str,
    m: &ColumnMapping,
    id: &str,
    rows: &[Row],
) -> Result<StoredContainer, Vec<Bad>> {
    let mut problems = Problems {
        id,
        bad: Vec::new(),
    };
    let cells = shared_cells(m, rows, &mut problems);
    let first = rows[0].row;
    if cells.location.is_none() && rows.iter().all(|r| r.location.is_empty()) {
        problems.add(
            first,
            format!("no location in {}", m.location_columns()),
            Some(location_fix(m)),
        );
    }
    if cells.size.is_none() && rows.iter().all(|r| r.size.is_empty()) {
        problems.add(
            first,
            format!("no container size in the `{}` column", m.size),
            Some("give it with its unit, e.g. `2.5 L`".into()),
        );
    }
    let contents = match cells.volume {
        None => neat_rows(cat, file, m, id, rows, &mut problems),
        Some((_, volume_l)) => solution(cat, file, m, id, rows, volume_l, &mut problems),
    };
    if let (Some(Contents::Liquid(b)), Some((row, size_l))) = (&contents, cells.size) {
        if b.volume_l > size_l * (1.0 + 1e-9) {
            problems.add(
                row,
                format!("holds {} L, more than its size of {size_l} L", b.volume_l),
                Some(
                    "check the amount (or volume) and the container size, with their units".into(),
                ),
            );
        }
    }
    match (
        problems.bad.is_empty(),
        cells.location,
        cells.size,
        contents,
    ) {
        (true, Some((_, path)), Some((_, size_l)), Some(contents)) => Ok(StoredContainer {
            id: id.to_string(),
            path,
            size_l,
            contents,
            line: Some(first),
        }),
        _ => Err(problems.bad),
    }
}

/// Location, size and volume: the first filled cell; any other filled cell must agree.
fn shared_cells(m: &ColumnMapping, rows: &[Row], problems: &mut Problems) -> SharedCells {
    let mut cells = SharedCells::default();
    for r in rows {
        if !r.location.is_empty() {
            match (parse_location(&r.location), &cells.location) {
                (Err(msg), _) => problems.add(r.row, msg, Some(location_fix(m))),
                (Ok(path), None) => cells.location = Some((r.row, path)),
                (Ok(path), Some((first, p))) if *p != path => problems.add(
                    r.row,
                    format!("location `{}` differs from `{}` on row {first}", r.location, p.join(" / ")),
                    Some("a container stands in one place: give each container its own id, or correct the location".into()),
                ),
                (Ok(_), Some(_)) => {}
            }
        }
        for (cell, what, slot) in [
            (&r.size, "size", &mut cells.size),
            (&r.volume, "volume", &mut cells.volume),
        ] {
            if cell.is_empty() {
                continue;
            }
            match parse_volume(cell) {
                Err(e) => problems.add(r.row, format!("{what}: {e}"), comma_fix(cell)),
                Ok(l) => match slot {
                    None => *slot = Some((r.row, l.0)),
                    Some((first, v)) if (*v - l.0).abs() > 1e-9 * v.abs().max(1.0) => problems.add(
                        r.row,
                        format!("{what} `{cell}` differs from the {what} on row {first} ({v} L)"),
                        Some(format!("a container has one {what}: correct it, or leave the cell empty on the later rows")),
                    ),
                    Some(_) => {}
                },
            }
        }
    }
    cells
}

/// The contents of a container without a liquid volume: a neat reagent, on one row.
fn neat_rows(
    cat: &Catalog,
    file: &str,
    m: &ColumnMapping,
    id: &str,
    rows: &[Row],
    problems: &mut Problems,
) -> Option<Contents> {
    let first = rows[0].row;
    for r in &rows[1..] {
        problems.add(
            r.row,
            format!("the id is also on row {first}, and neither row gives a liquid volume"),
            Some("give every container its own id; only a solution (rows with a volume) spans several rows".into()),
        );
    }
    neat(cat, file, m, id, &rows[0])
        .map_err(|(msg, fix)| problems.add(first, msg, fix))
        .ok()
}

/// The contents of a solution, one substance a row.
fn solution(
    cat: &Catalog,
    file: &str,
    m: &ColumnMapping,
    id: &str,
    rows: &[Row],
    volume_l: f64,
    problems: &mut Problems,
) -> Option<Contents> {
    // Each row is checked on its own, so that every bad row is named.
    let mut items = Vec::new();
    for r in rows {
        let item = if r.substance.is_empty() {
            Err((
                format!("no substance in the `{}` column", m.substance),
                None,
            ))
        } else {
            amount_text(r, m).map(|a| (r.substance.clone(), a, Some(r.row)))
        };
        match item.and_then(|it| {
            Batch::from_parts(cat, file, id, volume_l, std::slice::from_ref(&it))
                .map(|_| it)
                .map_err(|e| (e.message, e.fix.or_else(|| comma_fix(&r.amount))))
        }) {
            Ok(it) => items.push(it),
            Err((msg, fix)) => problems.add(r.row, without_name(&msg, id), fix),
        }
    }
    (items.len() == rows.len())
        .then(|| Batch::from_parts(cat, file, id, volume_l, &items).map(Contents::Liquid))
        .and_then(|b| {
            b.map_err(|e| problems.add(rows[0].row, without_name(&e.message, id), e.fix))
                .ok()
        })
}

/// A neat reagent from its row: a mass or moles, or a volume of a liquid.
fn neat(
    cat: &Catalog,
    file: &str,
    m: &ColumnMapping,
    id: &str,
    r: &Row,
) -> Result<Contents, (String, Option<String>)> {
    if r.substance.is_empty() {
        return Err((
            format!("no substance in the `{}` column", m.substance),
            None,
        ));
    }
    let amount = amount_text(r, m)?;
    let parsed = parse_amount(&amount).map_err(|e| (format!("amount: {e}"), comma_fix(&amount)))?;
    match parsed {
        Amount::Grams(_) | Amount::Moles(_) => {}
        Amount::Millilitres(_) => {
            if let Some(sid) = cat.find_substance(&r.substance) {
                let s = cat.substance(sid);
                if !matches!(s.state, PhysicalState::Liquid | PhysicalState::Solution) {
                    return Err((
                        format!(
                            "`{}` is not a liquid, so `{amount}` cannot be its amount",
                            s.name
                        ),
                        Some("give a neat solid or gas as a mass (g, kg) or in mol".into()),
                    ));
                }
            }
        }
        _ => {
            let fix = match &m.volume {
                Some(v) => format!("give the solution's liquid volume in the `{v}` column"),
                None => {
                    "map a volume column (`volume=...`) to give the solution's liquid volume".into()
                }
            };
            return Err((
                format!("`{amount}` is a concentration, but the row gives no liquid volume"),
                Some(fix),
            ));
        }
    }
    neat_contents(cat, file, id, &r.substance, &amount, Some(r.row)).map_err(|e| {
        let prefix = format!("container `{id}`: ");
        (
            e.message
                .strip_prefix(&prefix)
                .unwrap_or(&e.message)
                .to_string(),
            e.fix,
        )
    })
}

/// A batch message without the container name it starts with (ours names the container).
fn without_name(message: &str, id: &str) -> String {
    [format!("`{id}`, "), format!("`{id}`: ")]
        .iter()
        .find_map(|p| message.strip_prefix(p.as_str()))
        .unwrap_or(message)
        .to_string()
}
