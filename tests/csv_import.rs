//! CSV import of storeroom inventories (src/store/csv_import.rs): the fixtures in
//! tests/fixtures/csv/, custom column mappings, and rows that cannot be read.

use offgas::catalog::Catalog;
use offgas::store::csv_import::*;
use offgas::store::{Contents, Inventory, StoredContainer};

const GOOD: &str = include_str!("fixtures/csv/storeroom.csv");
const CUSTOM: &str = include_str!("fixtures/csv/storeroom-custom.csv");
const CUSTOM_MAPPING: &str = include_str!("fixtures/csv/storeroom-custom.mapping.yaml");
const BAD: &str = include_str!("fixtures/csv/storeroom-bad.csv");
const CUSTOM_SPEC: &str = "id=Bottle ID, substance=Chemical, amount=Qty, unit=Unit, \
                           size=Container, location=Location, volume=Liquid volume";

fn cat() -> Catalog {
    offgas::embedded::catalog().expect("embedded catalog loads")
}

fn read(text: &str, mapping: &ColumnMapping) -> Inventory {
    let (inv, skipped) = import(&cat(), "store.csv", text, mapping, false)
        .unwrap_or_else(|e| panic!("import failed: {e:#?}"));
    assert!(
        skipped.is_empty(),
        "nothing skipped without skip_bad_rows: {skipped:?}"
    );
    inv
}

fn errors(text: &str, mapping: &ColumnMapping) -> Vec<offgas::batch::InputError> {
    match import(&cat(), "store.csv", text, mapping, false) {
        Ok((inv, _)) => panic!("expected errors, got {} containers", inv.containers.len()),
        Err(e) => e,
    }
}

fn get<'a>(inv: &'a Inventory, id: &str) -> &'a StoredContainer {
    inv.containers
        .iter()
        .find(|c| c.id == id)
        .unwrap_or_else(|| panic!("no container `{id}`"))
}

fn dry_moles(c: &StoredContainer, cat: &Catalog, name: &str) -> f64 {
    match &c.contents {
        Contents::Dry { substance, moles } => {
            assert_eq!(cat.substance(*substance).name, name, "{}", c.id);
            *moles
        }
        other => panic!("{}: expected a dry container, got {other:?}", c.id),
    }
}

fn liquid_volume(c: &StoredContainer) -> f64 {
    match &c.contents {
        Contents::Liquid(b) => b.volume_l,
        other => panic!("{}: expected a liquid, got {other:?}", c.id),
    }
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-9 * b.abs().max(1.0)
}

#[test]
fn good_file_reads_neat_solids_neat_liquids_and_a_solution() {
    let cat = cat();
    let inv = read(GOOD, &ColumnMapping::default());
    assert_eq!(inv.name, "store.csv");
    assert_eq!(inv.file, "store.csv");
    assert_eq!((inv.meet_depth, inv.cabinet_depth), (4, 3));
    assert!(inv.rooms.is_empty() && inv.locations.is_empty());
    let ids: Vec<&str> = inv.containers.iter().map(|c| c.id.as_str()).collect();
    assert_eq!(ids, ["S-001", "S-002", "L-001", "L-002", "L-003", "W-001"]);

    // Neat solids: amount + unit column, and a unit in the amount cell; found by name and formula.
    let s1 = get(&inv, "S-001");
    assert!(close(
        dry_moles(s1, &cat, "sodium chloride"),
        500.0 / 58.443
    ));
    assert_eq!(s1.path, ["Main", "Room 101", "Cabinet A", "Tray 1"]);
    assert_eq!(s1.size_l, 1.0);
    assert_eq!(s1.line, Some(2));
    let s2 = get(&inv, "S-002");
    assert!(close(dry_moles(s2, &cat, "sodium cyanide"), 250.0 / 49.007));
    assert_eq!(s2.size_l, 0.5);

    // Neat liquids: by name, by CAS number, and a quoted name holding a comma.
    assert!(close(liquid_volume(get(&inv, "L-001")), 2.5));
    let l2 = get(&inv, "L-002");
    assert!(close(liquid_volume(l2), 1.0));
    let Contents::Liquid(b) = &l2.contents else {
        unreachable!()
    };
    assert_eq!(cat.substance(b.components[0].substance).name, "methanol");
    let l3 = get(&inv, "L-003");
    assert!(close(liquid_volume(l3), 2.5));
    assert_eq!(l3.line, Some(6));

    // The solution: two rows, one container; the second row's empty cells mean "as above".
    let w = get(&inv, "W-001");
    assert_eq!(w.line, Some(7));
    assert_eq!(w.size_l, 10.0);
    assert_eq!(w.path, ["Main", "Room 102", "Cabinet C", "Tray 1"]);
    let Contents::Liquid(b) = &w.contents else {
        panic!("W-001 is a solution")
    };
    assert!(close(b.volume_l, 8.0));
    let parts: Vec<(&str, f64, Option<usize>)> = b
        .components
        .iter()
        .map(|c| (cat.substance(c.substance).name.as_str(), c.moles, c.line))
        .collect();
    assert_eq!(parts.len(), 2);
    assert_eq!((parts[0].0, parts[0].2), ("sodium hydroxide", Some(7)));
    assert!(close(parts[0].1, 20.0 * 8.0 / 39.997));
    assert_eq!((parts[1].0, parts[1].2), ("sodium chloride", Some(8)));
    assert!(close(parts[1].1, 5.0 * 8.0 / 58.443));
}

#[test]
fn custom_headers_by_spec_and_by_yaml_give_the_same_inventory() {
    let by_spec = parse_mapping(CUSTOM_SPEC).expect("spec parses");
    let by_yaml = mapping_from_yaml(CUSTOM_MAPPING).expect("yaml parses");
    assert_eq!(by_spec, by_yaml);
    assert_eq!(by_spec.id, "Bottle ID");
    assert_eq!(by_spec.unit.as_deref(), Some("Unit"));
    assert_eq!(by_spec.volume.as_deref(), Some("Liquid volume"));

    let cat = cat();
    let a = read(CUSTOM, &by_spec);
    let b = read(CUSTOM, &by_yaml);
    assert_eq!(a, b);
    let ids: Vec<&str> = a.containers.iter().map(|c| c.id.as_str()).collect();
    assert_eq!(ids, ["B-17", "B-18", "B-19"]);
    assert!(close(
        dry_moles(get(&a, "B-17"), &cat, "sodium chloride"),
        500.0 / 58.443
    ));
    assert!(close(liquid_volume(get(&a, "B-18")), 0.5));
    let b19 = get(&a, "B-19");
    assert_eq!(b19.path, ["North Wing", "Lab 2", "Base Cabinet", "Tray 1"]);
    let Contents::Liquid(batch) = &b19.contents else {
        panic!("B-19 is a solution")
    };
    assert_eq!(batch.components.len(), 2);
    assert!(close(batch.components[0].moles, 0.1 * 4.0));

    // The default mapping does not fit these headers.
    let e = errors(CUSTOM, &ColumnMapping::default());
    assert_eq!(e.len(), 1);
    assert!(
        e[0].message.contains("`id`") && e[0].message.contains("`Bottle ID`"),
        "{}",
        e[0]
    );
}

#[test]
fn bad_rows_are_refused_with_their_row_numbers() {
    let e = errors(BAD, &ColumnMapping::default());
    let rows: Vec<Option<usize>> = e.iter().map(|e| e.line).collect();
    // Row 7 is a good row of the solution W-001, whose row 8 is bad: not an error itself.
    assert_eq!(
        rows,
        [Some(3), Some(4), Some(5), Some(6), Some(8)],
        "{e:#?}"
    );
    for err in &e {
        assert_eq!(err.file, "store.csv");
        let row = err.line.unwrap();
        assert!(err.message.starts_with(&format!("row {row}: ")), "{err}");
    }
    let text = |row: usize| e.iter().find(|e| e.line == Some(row)).unwrap();
    assert!(
        text(3)
            .message
            .contains("unknown substance `sodium chlorid`"),
        "{}",
        text(3)
    );
    assert!(
        text(3)
            .fix
            .as_deref()
            .unwrap_or("")
            .contains("sodium chloride"),
        "{}",
        text(3)
    );
    assert!(text(4).message.contains("furlongs"), "{}", text(4));
    assert!(text(5).message.contains("3 parts"), "{}", text(5));
    assert!(text(6).message.contains("no container id"), "{}", text(6));
    assert!(
        text(8).message.contains("W-001") && text(8).message.contains("unobtainium"),
        "{}",
        text(8)
    );
    // Display names the file and the row.
    assert!(
        text(5)
            .to_string()
            .starts_with("store.csv:5: row 5: container `S-004`"),
        "{}",
        text(5)
    );
}

#[test]
fn bad_rows_are_skipped_only_when_asked() {
    let (inv, skipped) =
        import(&cat(), "store.csv", BAD, &ColumnMapping::default(), true).expect("skipping");
    let ids: Vec<&str> = inv.containers.iter().map(|c| c.id.as_str()).collect();
    assert_eq!(ids, ["S-001", "L-001"]);
    let listed: Vec<(usize, Option<&str>)> =
        skipped.iter().map(|s| (s.row, s.id.as_deref())).collect();
    assert_eq!(
        listed,
        [
            (3, Some("S-002")),
            (4, Some("S-003")),
            (5, Some("S-004")),
            (6, None),
            (7, Some("W-001")),
            (8, Some("W-001")),
        ]
    );
    assert!(
        skipped[0].message.contains("fix: did you mean"),
        "{}",
        skipped[0].message
    );
    assert!(
        skipped[4].message.contains("row 8"),
        "{}",
        skipped[4].message
    );
    let json = serde_json::to_value(&skipped[3]).unwrap();
    assert_eq!(json["row"], 6);
    assert!(json["id"].is_null());
    assert!(json["message"]
        .as_str()
        .unwrap()
        .contains("no container id"));
}

#[test]
fn missing_header_columns_are_named_with_the_headers_that_exist() {
    let text = "id,chemical,amount,size,place\nA,sodium chloride,5 g,1 L,a/b/c/d\n";
    for skip in [false, true] {
        let e = import(&cat(), "store.csv", text, &ColumnMapping::default(), skip).unwrap_err();
        assert_eq!(e.len(), 1);
        let m = &e[0].message;
        assert!(m.contains("`substance`") && m.contains("`location`"), "{m}");
        assert!(!m.contains("`unit`") && !m.contains("`volume`"), "{m}");
        assert!(m.contains("`chemical`") && m.contains("`place`"), "{m}");
        assert!(e[0].fix.is_some());
    }
    // A mapping that names an optional column requires it.
    let m =
        parse_mapping("id=id,substance=chemical,amount=amount,unit=Unit,size=size,location=place")
            .unwrap();
    let e = errors(text, &m);
    assert!(e[0].message.contains("`Unit`"), "{}", e[0]);
    // Without it the file reads, headers matched regardless of case.
    let m =
        parse_mapping("id=ID,substance=Chemical,amount=Amount,size=Size,location=Place").unwrap();
    assert_eq!(read(text, &m).containers.len(), 1);
    // An empty file has no header.
    assert!(errors("", &ColumnMapping::default())[0]
        .message
        .contains("no header"));
}

#[test]
fn mapping_mistakes_are_named() {
    let e = parse_mapping("id=Bottle ID,substance=Chemical").unwrap_err();
    assert!(e.contains("amount, size, location"), "{e}");
    let e = parse_mapping("id=A,substance=B,amount=C,size=D,location=E,colour=F").unwrap_err();
    assert!(e.contains("`colour` is not a field"), "{e}");
    let e = parse_mapping("id=A,id=B,substance=B,amount=C,size=D,location=E").unwrap_err();
    assert!(e.contains("`id` is given twice"), "{e}");
    let e = parse_mapping("id=A,substance,amount=C").unwrap_err();
    assert!(e.contains("`substance` is not `field=Header`"), "{e}");
    let e = mapping_from_yaml("columns: { id: A, substance: B }").unwrap_err();
    assert!(e.contains("amount, size, location"), "{e}");
    assert!(mapping_from_yaml("colums: { id: A }").is_err());
    let d = ColumnMapping::default();
    assert_eq!(
        [d.id, d.substance, d.amount, d.size, d.location],
        ["id", "substance", "amount", "size", "location"]
    );
    assert_eq!(
        (d.unit.as_deref(), d.volume.as_deref()),
        (Some("unit"), Some("volume"))
    );
}

#[test]
fn container_level_mistakes() {
    let head = "id,substance,amount,size,location,volume\n";
    let cases: [(&str, &str); 7] = [
        (
            "A,sodium chloride,5 g,1 L,M/R/C/T1,\nA,sodium chloride,5 g,1 L,M/R/C/T2,\n",
            "differs from `M / R / C / T1` on row 2",
        ),
        (
            "A,sodium chloride,5 g,1 L,M/R/C/T,\nA,sodium chloride,5 g,1 L,M/R/C/T,\n",
            "also on row 2",
        ),
        (
            "A,acetic acid,3 L,2.5 L,M/R/C/T,\n",
            "more than its size of 2.5 L",
        ),
        (
            "A,sodium chloride,20 g/L,1 L,M/R/C/T,\n",
            "is a concentration",
        ),
        ("A,sodium chloride,100 mL,1 L,M/R/C/T,\n", "not a liquid"),
        ("A,sodium chloride,5 g,\"2,5 L\",M/R/C/T,\n", "size"),
        (
            "A,sodium chloride,5 g/L,1 L,M/R/C/T,2 L\nA,sodium hydroxide,5 g/L,1 L,M/R/C/T,\n",
            "more than its size of 1 L",
        ),
    ];
    for (rows, needle) in cases {
        let e = errors(&format!("{head}{rows}"), &ColumnMapping::default());
        assert!(
            e.iter().any(|e| e.message.contains(needle)),
            "`{needle}` not in {e:#?}"
        );
    }
    // A solution row the batch model refuses, named once by its container.
    let e = errors(
        &format!("{head}A,sodium fluoride,100 g/L,1 L,M/R/C/T,1 L\n"),
        &ColumnMapping::default(),
    );
    assert!(
        e[0].message
            .starts_with("row 2: container `A`: `sodium fluoride`: ")
            && e[0].message.contains("solubility"),
        "{e:#?}"
    );
    // The decimal-comma hint.
    let e = errors(
        &format!("{head}A,sodium chloride,5 g,\"2,5 L\",M/R/C/T,\n"),
        &ColumnMapping::default(),
    );
    assert!(
        e[0].fix
            .as_deref()
            .unwrap_or("")
            .contains("decimals with a point"),
        "{e:#?}"
    );
}

#[test]
fn spreadsheet_exports_read_as_they_are() {
    // A byte-order mark, semicolons, blank and empty rows: row numbers stay those a
    // spreadsheet shows.
    let text = "\u{feff}ID;Substance;Amount;Size;Location\n\
                A;sodium chloride;5 g;1 L;M/R/C/T\n\
                \n\
                ;;;;\n\
                B;sodium chlorid;5 g;1 L;M/R/C/T\n";
    let e = errors(text, &ColumnMapping::default());
    assert_eq!(e.len(), 1, "{e:#?}");
    assert_eq!(e[0].line, Some(5));
    let (inv, skipped) =
        import(&cat(), "store.csv", text, &ColumnMapping::default(), true).unwrap();
    assert_eq!(inv.containers.len(), 1);
    assert_eq!(inv.containers[0].line, Some(2));
    assert_eq!(skipped.len(), 1);
    assert_eq!(skipped[0].row, 5);
}
