//! CSV import of storeroom inventories (src/store/csv_import.rs): the fixtures in
//! tests/fixtures/csv/, custom column mappings, rows that cannot be read, locations of one
//! to six levels (one column or several joined), and the demo inventory
//! data/demo/storeroom-c.csv audited end to end.

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

fn errors(text: &str, mapping: &ColumnMapping) -> Vec<offgas::pour::batch::InputError> {
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
    // Row 5 (`Main / Room 101 / Cabinet A`, three levels) reads: Cabinet A is its spill zone.
    assert_eq!(rows, [Some(3), Some(4), Some(6), Some(8)], "{e:#?}");
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
    assert!(text(6).message.contains("no container id"), "{}", text(6));
    assert!(
        text(8).message.contains("W-001") && text(8).message.contains("unobtainium"),
        "{}",
        text(8)
    );
    // Display names the file and the row.
    assert!(
        text(4)
            .to_string()
            .starts_with("store.csv:4: row 4: container `S-003`"),
        "{}",
        text(4)
    );
    // The refusal counts rows, singular or plural.
    let m = refusal_message("store.csv", &e);
    assert!(m.starts_with("4 rows of store.csv cannot be read"), "{m}");
    assert!(m.contains("lists them"), "{m}");
    let m = refusal_message("store.csv", &e[..1]);
    assert!(m.starts_with("1 row of store.csv cannot be read"), "{m}");
    assert!(m.contains("lists it"), "{m}");
}

#[test]
fn bad_rows_are_skipped_only_when_asked() {
    let (inv, skipped) =
        import(&cat(), "store.csv", BAD, &ColumnMapping::default(), true).expect("skipping");
    let ids: Vec<&str> = inv.containers.iter().map(|c| c.id.as_str()).collect();
    assert_eq!(ids, ["S-001", "S-004", "L-001"]);
    let listed: Vec<(usize, Option<&str>)> =
        skipped.iter().map(|s| (s.row, s.id.as_deref())).collect();
    assert_eq!(
        listed,
        [
            (3, Some("S-002")),
            (4, Some("S-003")),
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
        skipped[3].message.contains("row 8"),
        "{}",
        skipped[3].message
    );
    let json = serde_json::to_value(&skipped[2]).unwrap();
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
    assert_eq!(d.location, ["location"]);
    assert_eq!(
        [d.id, d.substance, d.amount, d.size],
        ["id", "substance", "amount", "size"]
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

// ---------------------------------------------------------------------------------------
// Locations of one to six levels.

/// Neat sodium chloride at each location, one per row, ids A, B, C, ...
fn salt_rows(locations: &[&str]) -> String {
    let mut t = String::from("id,substance,amount,size,location\n");
    for (k, l) in locations.iter().enumerate() {
        let id = (b'A' + k as u8) as char;
        t.push_str(&format!("{id},sodium chloride,5 g,1 L,\"{l}\"\n"));
    }
    t
}

/// (spill zone, cabinet, room part) of a container, each joined with " / ".
fn levels_of(inv: &Inventory, id: &str) -> (String, String, String) {
    let c = get(inv, id);
    (
        inv.spill_zone_path(&c.path).join(" / "),
        inv.cabinet_path(&c.path).join(" / "),
        inv.room_path(&c.path).join(" / "),
    )
}

fn strings(t: (&str, &str, &str)) -> (String, String, String) {
    (t.0.into(), t.1.into(), t.2.into())
}

#[test]
fn a_one_level_location_is_its_own_spill_zone_and_cabinet() {
    let inv = read(
        &salt_rows(&["Cab 1", " Cab 1 ", "Cab 2"]),
        &ColumnMapping::default(),
    );
    assert_eq!(get(&inv, "A").path, ["Cab 1"]);
    assert_eq!(get(&inv, "B").path, ["Cab 1"], "spaces are trimmed");
    assert_eq!((inv.meet_depth, inv.cabinet_depth), (1, 1));
    assert_eq!(levels_of(&inv, "A"), strings(("Cab 1", "Cab 1", "")));
    assert_eq!(
        inv.spill_zone(get(&inv, "A")),
        inv.spill_zone(get(&inv, "B"))
    );
    assert_ne!(inv.cabinet(get(&inv, "A")), inv.cabinet(get(&inv, "C")));
}

#[test]
fn a_two_level_location_is_cabinet_then_spill_zone() {
    let inv = read(
        &salt_rows(&["Cab 1 / Tray 2", "Cab 1/Tray 3"]),
        &ColumnMapping::default(),
    );
    assert_eq!(get(&inv, "B").path, ["Cab 1", "Tray 3"]);
    assert_eq!((inv.meet_depth, inv.cabinet_depth), (2, 1));
    assert_eq!(
        levels_of(&inv, "A"),
        strings(("Cab 1 / Tray 2", "Cab 1", ""))
    );
    assert_eq!(inv.cabinet(get(&inv, "A")), inv.cabinet(get(&inv, "B")));
    assert_ne!(
        inv.spill_zone(get(&inv, "A")),
        inv.spill_zone(get(&inv, "B"))
    );
}

#[test]
fn a_four_level_location_reads_as_before() {
    let inv = read(
        &salt_rows(&["Annex / Store C / Cabinet 4 / Tray 1"]),
        &ColumnMapping::default(),
    );
    assert_eq!((inv.meet_depth, inv.cabinet_depth), (4, 3));
    assert_eq!(
        levels_of(&inv, "A"),
        strings((
            "Annex / Store C / Cabinet 4 / Tray 1",
            "Annex / Store C / Cabinet 4",
            "Annex / Store C"
        ))
    );
}

#[test]
fn a_six_level_location_reads_and_a_seven_level_one_is_refused_with_its_row() {
    let six = "Site / Annex / Store C / Cabinet 4 / Shelf 2 / Bin 1";
    let inv = read(&salt_rows(&[six]), &ColumnMapping::default());
    assert_eq!(get(&inv, "A").path.len(), 6);
    assert_eq!((inv.meet_depth, inv.cabinet_depth), (6, 5));
    assert_eq!(
        levels_of(&inv, "A"),
        strings((
            six,
            "Site / Annex / Store C / Cabinet 4 / Shelf 2",
            "Site / Annex / Store C / Cabinet 4"
        ))
    );

    let seven = "Site / Annex / Store C / Cabinet 4 / Shelf 2 / Bin 1 / Box 3";
    let e = errors(
        &salt_rows(&["Cab 1", seven, "Cab 2"]),
        &ColumnMapping::default(),
    );
    assert_eq!(e.len(), 1, "{e:#?}");
    assert_eq!(e[0].line, Some(3));
    assert!(
        e[0].message.starts_with("row 3: container `B`: location `")
            && e[0].message.contains("has 7 levels")
            && e[0].message.contains("1 to 6"),
        "{}",
        e[0]
    );
    assert!(
        e[0].fix
            .as_deref()
            .unwrap_or("")
            .contains("spill zone last"),
        "{}",
        e[0]
    );
    // Skipped on request, with its row; the others are audited.
    let (inv, skipped) = import(
        &cat(),
        "store.csv",
        &salt_rows(&["Cab 1", seven, "Cab 2"]),
        &ColumnMapping::default(),
        true,
    )
    .unwrap();
    assert_eq!(inv.containers.len(), 2);
    assert_eq!((skipped[0].row, skipped[0].id.as_deref()), (3, Some("B")));
}

#[test]
fn an_empty_location_is_refused() {
    let e = errors(&salt_rows(&[" / / "]), &ColumnMapping::default());
    assert!(e[0].message.contains("the location is empty"), "{e:#?}");
}

const THREE_COLUMNS: &str = "Bottle,Chemical,Qty,Container,Room,Cabinet,Shelf\n\
    A,sodium chloride,5 g,1 L,Store C,Cabinet 4,Tray 1\n\
    B,sodium chloride,5 g,1 L,Store C,Cabinet 4,\n\
    C,sodium chloride,5 g,1 L,Store C,,Tray 9\n\
    D,sodium chloride,5 g,1 L,,,Floor\n\
    E,sodium chloride,5 g,1 L, , ,\n\
    F,sodium chloride,5 g,1 L,Store C / Bay 2,Cabinet 7 / Shelf 1 / Rack 3,Bin 1 / Box 2\n";

fn three_column_mapping() -> ColumnMapping {
    parse_mapping(
        "id=Bottle,substance=Chemical,amount=Qty,size=Container,location=Room+Cabinet+Shelf",
    )
    .expect("mapping parses")
}

#[test]
fn a_location_from_three_columns_joins_them_outermost_first() {
    let m = three_column_mapping();
    assert_eq!(m.location, ["Room", "Cabinet", "Shelf"]);
    assert_eq!(m.location_spec(), "Room+Cabinet+Shelf");
    let (inv, skipped) = import(&cat(), "store.csv", THREE_COLUMNS, &m, true).unwrap();
    assert_eq!(get(&inv, "A").path, ["Store C", "Cabinet 4", "Tray 1"]);
    assert_eq!(
        levels_of(&inv, "A"),
        strings((
            "Store C / Cabinet 4 / Tray 1",
            "Store C / Cabinet 4",
            "Store C"
        ))
    );
    // Row E has no location at all; row F holds seven levels across its cells.
    let listed: Vec<usize> = skipped.iter().map(|s| s.row).collect();
    assert_eq!(listed, [6, 7], "{skipped:#?}");
    assert!(
        skipped[0]
            .message
            .contains("no location in the `Room`, `Cabinet` and `Shelf` columns"),
        "{}",
        skipped[0].message
    );
    assert!(
        skipped[1].message.contains("has 7 levels"),
        "{}",
        skipped[1].message
    );
}

#[test]
fn empty_cells_of_a_location_are_skipped() {
    let (inv, _) = import(
        &cat(),
        "store.csv",
        THREE_COLUMNS,
        &three_column_mapping(),
        true,
    )
    .unwrap();
    // No shelf: the cabinet is the spill zone, the room above it the cabinet level.
    assert_eq!(get(&inv, "B").path, ["Store C", "Cabinet 4"]);
    // No cabinet: the tray follows the room directly.
    assert_eq!(get(&inv, "C").path, ["Store C", "Tray 9"]);
    // Only the last cell: a one-level location.
    assert_eq!(get(&inv, "D").path, ["Floor"]);
    assert_eq!(levels_of(&inv, "D"), strings(("Floor", "Floor", "")));
    assert_eq!((inv.meet_depth, inv.cabinet_depth), (3, 2));
    assert_eq!(
        levels_of(&inv, "B"),
        strings(("Store C / Cabinet 4", "Store C", ""))
    );
}

#[test]
fn later_rows_of_a_solution_may_leave_a_several_column_location_empty() {
    let text = "id,substance,amount,size,volume,Room,Cabinet\n\
                W,sodium hydroxide,20 g/L,10 L,8 L,Wash bay,Drum rack\n\
                W,sodium chloride,5 g/L,,,,\n\
                X,sodium hydroxide,20 g/L,10 L,8 L,Wash bay,Drum rack\n\
                X,sodium chloride,5 g/L,,,Wash bay,\n";
    let m = parse_mapping(
        "id=id,substance=substance,amount=amount,size=size,volume=volume,location=Room+Cabinet",
    )
    .unwrap();
    let e = errors(text, &m);
    // W reads; X's second row names another place.
    assert_eq!(e.len(), 1, "{e:#?}");
    assert_eq!(e[0].line, Some(5));
    assert!(
        e[0].message
            .contains("`Wash bay` differs from `Wash bay / Drum rack` on row 4"),
        "{}",
        e[0]
    );
}

#[test]
fn a_several_column_location_by_spec_and_by_mapping_file() {
    let spec = parse_mapping(
        "id=Bottle, substance=Chemical, amount=Qty, size=Container, location = Room + Cabinet + Shelf",
    )
    .unwrap();
    let joined = mapping_from_yaml(
        "columns:\n  id: Bottle\n  substance: Chemical\n  amount: Qty\n  size: Container\n  location: Room + Cabinet + Shelf\n",
    )
    .unwrap();
    let listed = mapping_from_yaml(
        "columns: { id: Bottle, substance: Chemical, amount: Qty, size: Container, location: [Room, Cabinet, Shelf] }\n",
    )
    .unwrap();
    assert_eq!(spec, three_column_mapping());
    assert_eq!(joined, spec);
    assert_eq!(listed, spec);
    // A list keeps a `+` inside a header name.
    let plus = mapping_from_yaml(
        "columns: { id: A, substance: B, amount: C, size: D, location: [\"Room+Bay\", Shelf] }\n",
    )
    .unwrap();
    assert_eq!(plus.location, ["Room+Bay", "Shelf"]);
    // A header that is missing is named among the location's columns.
    let m = parse_mapping(
        "id=Bottle,substance=Chemical,amount=Qty,size=Container,location=Room+Rack+Shelf",
    )
    .unwrap();
    let e = errors(THREE_COLUMNS, &m);
    assert!(e[0].message.contains("no column `Rack`"), "{}", e[0]);
}

#[test]
fn several_column_mistakes_are_named() {
    let base = "id=A,substance=B,amount=C,size=D";
    let e = parse_mapping(&format!("{base},location=Room++Shelf")).unwrap_err();
    assert!(e.contains("empty header name"), "{e}");
    let e = parse_mapping(&format!("{base},location=Room+room")).unwrap_err();
    assert!(e.contains("names the column `room` twice"), "{e}");
    let e = parse_mapping(&format!("{base},location=L1+L2+L3+L4+L5+L6+L7")).unwrap_err();
    assert!(
        e.contains("joins 7 columns") && e.contains("at most 6"),
        "{e}"
    );
    let e = mapping_from_yaml(
        "columns: { id: [A, B], substance: B, amount: C, size: D, location: E }\n",
    )
    .unwrap_err();
    assert!(
        e.contains("only `location` can be built from several"),
        "{e}"
    );
    // Anywhere but the location, a `+` is part of the header name.
    let m = parse_mapping("id=A+B,substance=B,amount=C,size=D,location=E").unwrap();
    assert_eq!(m.id, "A+B");
}

#[test]
fn locations_of_different_depths_pair_where_they_can_meet() {
    use offgas::store::audit::{AuditSettings, Auditor};
    // A: loose in Cab 1 (one level: its own cabinet); B, C on tray 1 and D on tray 2 of
    // Cab 1; E loose in Cab 2. Within Cab 1: B-C share a spill zone, the other four pairs
    // meet at the cabinet level; E meets no one. Sodium chloride throughout: all clear.
    let inv = read(
        &salt_rows(&[
            "Cab 1",
            "Cab 1 / Tray 1",
            "Cab 1 / Tray 1",
            "Cab 1 / Tray 2",
            "Cab 2",
        ]),
        &ColumnMapping::default(),
    );
    let cat = cat();
    let th = offgas::embedded::thresholds().unwrap();
    let rules = offgas::embedded::rules(&cat).unwrap();
    let count = |cabinet_level: bool| {
        let a = Auditor {
            cat: &cat,
            th: &th,
            rules: &rules,
            settings: AuditSettings {
                spill_area_m2: 0.25,
                cabinet_level,
            },
        };
        a.audit(&inv, &|_, _| {}).counts
    };
    let c = count(true);
    assert_eq!((c.containers, c.spill_zones, c.cabinets), (5, 4, 2));
    assert_eq!(c.pairs_that_can_meet, 6);
    assert_eq!(count(false).pairs_that_can_meet, 1);
}

// ---------------------------------------------------------------------------------------
// The demo inventory: data/demo/storeroom-c.csv, Store C and the wash bay of the fictional
// Quarry Lane Annex, its location in four columns (Building, Room, Cabinet, Shelf) with
// rows of four, three and two levels.

const DEMO_COLUMNS: &str = "id=Bottle,substance=Chemical,amount=Qty,unit=Unit,size=Container,\
                            volume=Liquid volume,location=Building+Room+Cabinet+Shelf";

fn demo_path(name: &str) -> std::path::PathBuf {
    std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("data/demo")
        .join(name)
}

#[test]
fn the_demo_csv_reads_with_its_mixed_depths() {
    let text = std::fs::read_to_string(demo_path("storeroom-c.csv")).unwrap();
    let by_spec = parse_mapping(DEMO_COLUMNS).unwrap();
    let by_file =
        mapping_from_yaml(&std::fs::read_to_string(demo_path("storeroom-c.mapping.yaml")).unwrap())
            .unwrap();
    assert_eq!(by_spec, by_file);
    let inv = read(&text, &by_spec);
    assert_eq!(inv.containers.len(), 9);
    let depth = |id: &str| get(&inv, id).path.len();
    assert_eq!(
        ["QC-01", "QC-05", "QC-06", "QC-08"].map(depth),
        [4, 3, 3, 2]
    );
    assert!(inv
        .containers
        .iter()
        .all(|c| c.path[0] == "Quarry Lane Annex"));
    assert!(matches!(get(&inv, "QC-08").contents, Contents::Liquid(_)));
}

#[test]
fn the_demo_csv_audits_to_stop_on_the_cyanide_beside_the_acid() {
    let bin = env!("CARGO_BIN_EXE_offgas");
    let csv = demo_path("storeroom-c.csv");
    let by_columns = std::process::Command::new(bin)
        .arg("audit")
        .arg(&csv)
        .args(["--columns", DEMO_COLUMNS])
        .output()
        .unwrap();
    assert_eq!(by_columns.status.code(), Some(4), "{by_columns:?}");
    let by_mapping = std::process::Command::new(bin)
        .arg("audit")
        .arg(&csv)
        .arg("--mapping")
        .arg(demo_path("storeroom-c.mapping.yaml"))
        .output()
        .unwrap();
    assert_eq!(by_mapping.status.code(), Some(4), "{by_mapping:?}");
    assert_eq!(by_columns.stdout, by_mapping.stdout);
    let out = String::from_utf8(by_columns.stdout).unwrap();
    assert!(
        out.contains("9 containers in 5 spill zones and 3 cabinets; 14 pairs can meet"),
        "{out}"
    );
    assert!(out.contains("Verdict: STOP"), "{out}");
    assert!(out.contains("1 pair to stop, 0 to review:"), "{out}");
    assert!(
        out.contains("[stop] QC-01") && out.contains("with QC-02"),
        "{out}"
    );
    assert!(out.contains("same spill zone, HCN"), "{out}");

    // The JSON report: the one finding, and every other pair harmless.
    let json = std::process::Command::new(bin)
        .arg("audit")
        .arg(&csv)
        .args(["--columns", DEMO_COLUMNS, "--format", "json"])
        .output()
        .unwrap();
    assert_eq!(json.status.code(), Some(4));
    let v: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
    let findings = v["findings"].as_array().unwrap();
    assert_eq!(findings.len(), 1, "{findings:#?}");
    assert_eq!(findings[0]["level"], "tray");
    assert_eq!(findings[0]["gas"], "HCN");
    assert_eq!(v["counts"]["pairs_that_can_meet"], 14);

    // Only the spill zones: four pairs, the same stop.
    let trays = std::process::Command::new(bin)
        .arg("audit")
        .arg(&csv)
        .args(["--columns", DEMO_COLUMNS, "--no-cabinet-level"])
        .output()
        .unwrap();
    assert_eq!(trays.status.code(), Some(4));
    assert!(String::from_utf8_lossy(&trays.stdout).contains("4 pairs can meet"));
}
