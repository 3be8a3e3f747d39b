//! The synthetic storeroom generator: deterministic, well-formed, a realistic mix, and
//! written in the inventory format that `Inventory::parse` reads back.

mod common;

use offgas::store::generate::{reagent_names, synthetic_store, to_yaml, StoreShape, BUILDING};
use offgas::store::{Contents, Inventory, StoredContainer};
use std::collections::{BTreeMap, BTreeSet, HashSet};

fn shape(containers: usize, seed: u64) -> StoreShape {
    StoreShape {
        containers,
        seed,
        ..StoreShape::default()
    }
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-9 * a.abs().max(b.abs())
}

/// The catalog classes of everything a container holds.
fn classes(c: &StoredContainer) -> BTreeSet<String> {
    let cat = common::catalog();
    let ids: Vec<_> = match &c.contents {
        Contents::Dry { substance, .. } => vec![*substance],
        Contents::Liquid(b) => b.components.iter().map(|k| k.substance).collect(),
    };
    ids.into_iter()
        .flat_map(|id| cat.substance(id).classes.iter().cloned())
        .collect()
}

#[test]
fn default_shape_is_a_small_storeroom() {
    let s = StoreShape::default();
    assert_eq!(
        (s.containers, s.cabinets, s.trays_per_cabinet, s.rooms),
        (1000, 20, 4, 2)
    );
    let inv = synthetic_store(common::catalog(), &s);
    assert_eq!(inv.containers.len(), 1000);
}

#[test]
fn every_reagent_in_the_table_resolves() {
    let cat = common::catalog();
    let names = reagent_names();
    assert!(names.len() >= 40, "{} reagents", names.len());
    // Working solutions have descriptive names; every neat reagent is a catalog entry.
    let resolved = names
        .iter()
        .filter(|n| cat.find_substance(n).is_some())
        .count();
    assert!(resolved >= 40, "{resolved} of {} resolve", names.len());
    // A store large enough to draw every row builds without a panic.
    let inv = synthetic_store(cat, &shape(5000, 11));
    let drawn: HashSet<String> = inv
        .containers
        .iter()
        .map(|c| match &c.contents {
            Contents::Dry { substance, .. } => cat.substance(*substance).name.clone(),
            Contents::Liquid(b) => b
                .components
                .iter()
                .map(|k| cat.substance(k.substance).name.clone())
                .collect::<Vec<_>>()
                .join(" + "),
        })
        .collect();
    assert!(drawn.len() >= 40, "only {} distinct contents", drawn.len());
}

#[test]
fn same_seed_same_store_other_seed_other_store() {
    let cat = common::catalog();
    let a = to_yaml(cat, &synthetic_store(cat, &shape(800, 42)));
    let b = to_yaml(cat, &synthetic_store(cat, &shape(800, 42)));
    let c = to_yaml(cat, &synthetic_store(cat, &shape(800, 43)));
    assert_eq!(a, b);
    assert_ne!(a, c);
    assert_eq!(
        synthetic_store(cat, &shape(300, 5)),
        synthetic_store(cat, &shape(300, 5))
    );
}

#[test]
fn counts_paths_and_levels() {
    let cat = common::catalog();
    let s = StoreShape {
        containers: 2000,
        cabinets: 30,
        trays_per_cabinet: 3,
        rooms: 4,
        seed: 9,
    };
    let inv = synthetic_store(cat, &s);
    assert_eq!(inv.containers.len(), 2000);
    assert_eq!((inv.meet_depth, inv.cabinet_depth), (4, 3));
    assert_eq!(inv.rooms.len(), 4);
    assert_eq!(inv.locations.len(), 30 * 3);

    let ids: HashSet<&str> = inv.containers.iter().map(|c| c.id.as_str()).collect();
    assert_eq!(ids.len(), 2000, "ids are unique");
    assert_eq!(inv.containers[0].id, "SYN-000001");
    assert_eq!(inv.containers[1999].id, "SYN-002000");

    let mut cabinets = BTreeSet::new();
    for c in &inv.containers {
        assert_eq!(c.path.len(), 4, "{}: {:?}", c.id, c.path);
        assert_eq!(c.path[0], BUILDING);
        assert!(c.path[1].starts_with("Room "));
        assert!(c.path[2].starts_with("Cabinet "));
        assert!(c.path[3].starts_with("Tray "));
        assert!(
            inv.room_of(c).is_some(),
            "{} stands in a described room",
            c.id
        );
        cabinets.insert(c.zone(3));
    }
    assert_eq!(cabinets.len(), 30, "every cabinet is used");
    for r in &inv.rooms {
        assert!((30.0..=120.0).contains(&r.volume_m3), "{:?}", r);
        assert!((4.0..=10.0).contains(&r.air_changes_per_hour), "{:?}", r);
    }
}

#[test]
fn trays_are_uneven_but_bounded_and_within_capacity() {
    let cat = common::catalog();
    let s = StoreShape {
        containers: 10_000,
        cabinets: 200,
        trays_per_cabinet: 4,
        rooms: 3,
        seed: 2024,
    };
    let inv = synthetic_store(cat, &s);
    let mut count: BTreeMap<String, usize> = BTreeMap::new();
    for c in &inv.containers {
        *count.entry(c.location()).or_default() += 1;
    }
    let declared: BTreeMap<&str, usize> = inv
        .locations
        .iter()
        .map(|l| (l.path.as_str(), l.capacity))
        .collect();
    assert_eq!(declared.len(), 800, "every tray declared once");
    for (path, n) in &count {
        let cap = declared
            .get(path.as_str())
            .unwrap_or_else(|| panic!("{path} not declared"));
        assert!(n <= cap, "{path}: {n} containers, capacity {cap}");
    }
    for (path, cap) in &declared {
        let n = count.get(*path).copied().unwrap_or(0);
        assert!(
            (n + 2..=n + 5).contains(cap),
            "{path}: {n} held, capacity {cap}"
        );
    }
    let mean = 10_000.0 / 800.0;
    let max = *count.values().max().unwrap() as f64;
    let min = count.values().min().copied().unwrap_or(0) as f64;
    assert!(max <= 1.5 * mean + 2.0, "a tray holds {max}, mean {mean}");
    assert!(min >= 0.5 * mean - 2.0, "a tray holds {min}, mean {mean}");
    assert!(max - min >= 4.0, "trays are not all alike ({min}..{max})");
}

#[test]
fn the_mix_has_acids_bases_solvents_oxidisers_and_a_few_toxic_salts() {
    let cat = common::catalog();
    let inv = synthetic_store(cat, &shape(3000, 77));
    let n = inv.containers.len() as f64;
    let share = |pred: &dyn Fn(&BTreeSet<String>) -> bool| {
        inv.containers.iter().filter(|c| pred(&classes(c))).count() as f64 / n
    };
    let acids = share(&|k| k.contains("strong_acid") || k.contains("weak_acid"));
    let bases = share(&|k| k.contains("strong_base"));
    let solvents = share(&|k| k.contains("flammable_liquid") || k.contains("halogenated_solvent"));
    let oxidisers = share(&|k| k.contains("oxidizer"));
    let salts = share(&|k| k.contains("neutral_salt"));
    let toxic = share(&|k| {
        ["cyanide", "sulfide", "azide", "nitrite", "sulfite"]
            .iter()
            .any(|x| k.contains(*x))
    });
    let cyanide = share(&|k| k.contains("cyanide"));
    for (what, s) in [
        ("acids", acids),
        ("bases", bases),
        ("solvents", solvents),
        ("oxidisers", oxidisers),
        ("salts", salts),
    ] {
        assert!(s > 0.05, "{what}: {s}");
    }
    assert!(toxic > 0.01 && toxic < 0.15, "toxic salts: {toxic}");
    assert!(cyanide > 0.002, "cyanide: {cyanide}");

    // Both kinds of container, and a few dilute working solutions.
    let dry = inv
        .containers
        .iter()
        .filter(|c| matches!(c.contents, Contents::Dry { .. }))
        .count();
    let mixtures = inv
        .containers
        .iter()
        .filter(|c| matches!(&c.contents, Contents::Liquid(b) if b.components.len() > 1))
        .count();
    assert!(dry > 300 && dry < 2700, "{dry} dry containers");
    assert!(mixtures > 5, "{mixtures} mixed working solutions");
}

#[test]
fn sizes_and_amounts_are_realistic() {
    let cat = common::catalog();
    let inv = synthetic_store(cat, &shape(3000, 3));
    for c in &inv.containers {
        match &c.contents {
            Contents::Liquid(b) => {
                assert!((0.1..=4.0).contains(&c.size_l), "{}: {} L", c.id, c.size_l);
                assert!(b.volume_l > 0.0 && b.volume_l <= c.size_l, "{}", c.id);
                assert!(b.components.iter().all(|k| k.moles > 0.0), "{}", c.id);
            }
            Contents::Dry { substance, moles } => {
                let g = moles * cat.substance(*substance).molar_mass.unwrap();
                assert!((0.5..=2500.0 + 1e-6).contains(&g), "{}: {g} g", c.id);
                assert!((0.05..=2.5).contains(&c.size_l), "{}: {} L", c.id, c.size_l);
                // No jar holds more than about a kilogram per litre of its size.
                assert!(
                    g <= c.size_l * 1000.0 + 1e-6,
                    "{}: {g} g in {} L",
                    c.id,
                    c.size_l
                );
            }
        }
    }
}

#[test]
fn yaml_round_trips_through_inventory_parse() {
    let cat = common::catalog();
    let inv = synthetic_store(cat, &shape(1500, 8));
    let yaml = to_yaml(cat, &inv);
    let back = Inventory::parse(cat, &inv.file, &yaml).expect("the generated YAML parses");

    assert_eq!(back.name, inv.name);
    assert_eq!(
        (back.meet_depth, back.cabinet_depth),
        (inv.meet_depth, inv.cabinet_depth)
    );
    assert_eq!(back.rooms, inv.rooms);
    assert_eq!(back.locations, inv.locations);
    assert_eq!(back.containers.len(), inv.containers.len());
    for (a, b) in inv.containers.iter().zip(&back.containers) {
        assert_eq!(a.id, b.id);
        assert_eq!(a.path, b.path, "{}", a.id);
        assert!(close(a.size_l, b.size_l), "{}", a.id);
        assert!(
            b.line.is_some(),
            "{}: parsed containers know their line",
            a.id
        );
        match (&a.contents, &b.contents) {
            (
                Contents::Dry {
                    substance: sa,
                    moles: na,
                },
                Contents::Dry {
                    substance: sb,
                    moles: nb,
                },
            ) => {
                assert_eq!(sa, sb, "{}", a.id);
                assert!(close(*na, *nb), "{}: {na} vs {nb} mol", a.id);
            }
            (Contents::Liquid(x), Contents::Liquid(y)) => {
                assert!(close(x.volume_l, y.volume_l), "{}", a.id);
                assert_eq!(x.components.len(), y.components.len(), "{}", a.id);
                for (p, q) in x.components.iter().zip(&y.components) {
                    assert_eq!(p.substance, q.substance, "{}", a.id);
                    assert_eq!(p.amount, q.amount, "{}", a.id);
                    assert!(
                        close(p.moles, q.moles),
                        "{}: {} vs {}",
                        a.id,
                        p.moles,
                        q.moles
                    );
                }
                assert_eq!(x.temperature_k, y.temperature_k);
                assert_eq!(x.closure, y.closure);
            }
            _ => panic!("{}: the kind of contents changed", a.id),
        }
    }
    // Writing what was read gives the same text again.
    assert_eq!(to_yaml(cat, &back), yaml);
}

#[test]
fn odd_shapes_still_make_a_valid_store() {
    let cat = common::catalog();
    for s in [
        StoreShape {
            containers: 0,
            ..StoreShape::default()
        },
        StoreShape {
            containers: 7,
            cabinets: 0,
            trays_per_cabinet: 0,
            rooms: 0,
            seed: 0,
        },
        StoreShape {
            containers: 50,
            cabinets: 2,
            trays_per_cabinet: 1,
            rooms: 5,
            seed: u64::MAX,
        },
    ] {
        let inv = synthetic_store(cat, &s);
        assert_eq!(inv.containers.len(), s.containers);
        assert!(!inv.rooms.is_empty() && inv.rooms.len() <= s.cabinets.max(1));
        let back = Inventory::parse(cat, &inv.file, &to_yaml(cat, &inv))
            .unwrap_or_else(|e| panic!("{s:?}: {e}"));
        assert_eq!(back.containers.len(), s.containers);
    }
}

#[test]
fn a_hundred_thousand_containers() {
    let cat = common::catalog();
    let s = StoreShape {
        containers: 100_000,
        cabinets: 2000,
        trays_per_cabinet: 4,
        rooms: 20,
        seed: 100,
    };
    let inv = synthetic_store(cat, &s);
    assert_eq!(inv.containers.len(), 100_000);
    assert_eq!(inv.containers[99_999].id, "SYN-100000");
    assert_eq!(inv.locations.len(), 8000);
    let yaml = to_yaml(cat, &inv);
    assert_eq!(yaml.matches("\n  - id: ").count(), 100_000);
}
