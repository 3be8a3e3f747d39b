//! Synthetic storerooms for benchmarks and tests.
//!
//! `synthetic_store` builds a fictional building ("Synthetic building") of rooms, cabinets
//! and trays, and fills the trays with containers of common laboratory and plating-shop
//! reagents drawn from a weighted table: acids, bases, salts, solvents, oxidisers, a few
//! dilute working solutions and a small share of the salts that give a toxic gas with acid
//! (cyanide, sulfide, azide, nitrite, bisulfite). Everything is decided by a small seeded
//! generator written out below, so one seed gives the same storeroom on every platform.
//!
//! `to_yaml` writes any inventory in the YAML form `Inventory::parse` reads.
//!
//! Nothing here describes a real site: names, counts, amounts and rooms are invented.

use super::{neat_contents, Contents, Inventory, LocationSpec, RoomSpec, StoredContainer};
use crate::basics::quantity::Amount;
use crate::catalog::{Catalog, PhysicalState};
use crate::pour::batch::{Batch, Component};
use std::fmt::Write as _;

/// The building every synthetic location path starts with.
pub const BUILDING: &str = "Synthetic building";

/// The size of a synthetic storeroom.
///
/// Cabinets are numbered through the building and shared out over the rooms in order;
/// each cabinet has `trays_per_cabinet` trays (the spill zones). Zero cabinets or trays
/// count as one, and there are never more rooms than cabinets.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct StoreShape {
    pub containers: usize,
    pub cabinets: usize,
    pub trays_per_cabinet: usize,
    pub rooms: usize,
    pub seed: u64,
}

impl Default for StoreShape {
    fn default() -> Self {
        StoreShape {
            containers: 1000,
            cabinets: 20,
            trays_per_cabinet: 4,
            rooms: 2,
            seed: 1,
        }
    }
}

/// SplitMix64: a small, fast generator with a fixed output for a given seed on every
/// platform (integer arithmetic only).
struct Rng(u64);

impl Rng {
    fn new(seed: u64) -> Rng {
        // Offset the seed so that seed 0 does not start from state 0.
        Rng(seed ^ 0x5EED_0FF6_A5C0_FFEE)
    }
    fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    /// Uniform in [0, 1).
    fn unit(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
    }
    /// Uniform integer in 0..n (n > 0); the bias of the multiply-shift is below 2^-40 here.
    fn below(&mut self, n: usize) -> usize {
        ((u128::from(self.next_u64()) * n as u128) >> 64) as usize
    }
    fn pick<T: Copy>(&mut self, items: &[T]) -> T {
        items[self.below(items.len())]
    }
}

/// How a reagent is bought and kept.
#[derive(Clone, Copy)]
enum Form {
    /// A neat liquid or commercial solution, by bottle size in litres.
    Liquid(&'static [f64]),
    /// A neat solid, by pack: (grams when full, jar size in litres).
    Solid(&'static [(f64, f64)]),
    /// A dilute working solution made up in house: (substance, amount per litre).
    Dilute(&'static [(&'static str, &'static str)], &'static [f64]),
}

#[derive(Clone, Copy)]
struct Reagent {
    name: &'static str,
    weight: f64,
    form: Form,
}

const fn liquid(name: &'static str, weight: f64, sizes: &'static [f64]) -> Reagent {
    Reagent {
        name,
        weight,
        form: Form::Liquid(sizes),
    }
}
const fn solid(name: &'static str, weight: f64, packs: &'static [(f64, f64)]) -> Reagent {
    Reagent {
        name,
        weight,
        form: Form::Solid(packs),
    }
}
const fn dilute(
    name: &'static str,
    weight: f64,
    parts: &'static [(&'static str, &'static str)],
    sizes: &'static [f64],
) -> Reagent {
    Reagent {
        name,
        weight,
        form: Form::Dilute(parts, sizes),
    }
}

// Bottle sizes (L) and packs (g, jar L).
const SMALL_L: &[f64] = &[0.1, 0.25, 0.5];
const LAB_L: &[f64] = &[0.5, 1.0, 2.5];
const SOLVENT_L: &[f64] = &[0.5, 1.0, 2.5, 4.0];
const BULK_L: &[f64] = &[1.0, 2.5, 4.0];
const TOXIC_G: &[(f64, f64)] = &[(25.0, 0.05), (100.0, 0.125), (250.0, 0.25)];
const HAZ_G: &[(f64, f64)] = &[(100.0, 0.125), (250.0, 0.25), (500.0, 0.5), (1000.0, 1.0)];
const OXID_G: &[(f64, f64)] = &[(100.0, 0.125), (250.0, 0.25), (500.0, 0.5)];
const SALT_G: &[(f64, f64)] = &[(250.0, 0.25), (500.0, 0.5), (1000.0, 1.0), (2500.0, 2.5)];

/// The reagent mix, weighted by how often such a bottle turns up on a shelf (our own
/// rough guess for a teaching/research laboratory with a small plating line; no survey
/// behind it). Names are exact entries of data/substances.yaml.
const REAGENTS: &[Reagent] = &[
    // Acids.
    liquid("hydrochloric acid, concentrated", 5.0, LAB_L),
    liquid("sulfuric acid, concentrated", 5.0, LAB_L),
    liquid("nitric acid, concentrated", 4.0, LAB_L),
    liquid("acetic acid", 4.0, LAB_L),
    liquid("phosphoric acid 85%", 2.0, &[0.5, 1.0]),
    liquid("formic acid 85%", 1.0, &[0.5, 1.0]),
    solid("citric acid monohydrate", 1.5, SALT_G),
    // Bases.
    solid("sodium hydroxide", 4.0, SALT_G),
    solid("potassium hydroxide", 1.5, HAZ_G),
    liquid("sodium hydroxide solution 50%", 2.0, BULK_L),
    liquid("ammonia solution 25%", 3.0, LAB_L),
    liquid("ammonia solution, concentrated", 1.0, LAB_L),
    solid("sodium carbonate", 2.0, SALT_G),
    // Salts.
    solid("sodium chloride", 4.0, SALT_G),
    solid("potassium chloride", 2.0, SALT_G),
    solid("sodium sulfate", 2.0, SALT_G),
    solid("potassium nitrate", 1.5, HAZ_G),
    solid("magnesium sulfate heptahydrate", 1.5, SALT_G),
    solid("calcium chloride dihydrate", 1.5, SALT_G),
    solid("disodium hydrogen phosphate", 1.5, HAZ_G),
    solid("sodium acetate", 1.0, HAZ_G),
    solid("sodium thiosulfate pentahydrate", 1.0, HAZ_G),
    solid("copper(ii) sulfate pentahydrate", 1.5, HAZ_G),
    solid("nickel(ii) sulfate hexahydrate", 1.0, HAZ_G),
    solid("zinc chloride", 0.8, OXID_G),
    solid("ammonium chloride", 1.0, HAZ_G),
    solid("sodium bicarbonate", 2.0, SALT_G),
    // Solvents.
    liquid("acetone", 5.0, SOLVENT_L),
    liquid("ethanol", 5.0, SOLVENT_L),
    liquid("methanol", 4.0, SOLVENT_L),
    liquid("isopropanol", 3.0, SOLVENT_L),
    liquid("dichloromethane", 2.0, LAB_L),
    liquid("hexane", 2.0, SOLVENT_L),
    liquid("ethyl acetate", 2.0, SOLVENT_L),
    liquid("toluene", 1.5, LAB_L),
    liquid("acetonitrile", 1.5, LAB_L),
    // Oxidisers.
    liquid("hydrogen peroxide 30%", 2.0, &[0.5, 1.0]),
    liquid("sodium hypochlorite solution 6%", 2.0, BULK_L),
    liquid("sodium hypochlorite solution 12%", 1.0, BULK_L),
    solid("potassium permanganate", 1.0, OXID_G),
    solid("calcium hypochlorite", 0.3, OXID_G),
    // Salts that give a toxic gas with acid: a small share.
    solid("sodium cyanide", 0.6, HAZ_G),
    solid("potassium cyanide", 0.3, TOXIC_G),
    solid("sodium sulfide", 0.5, OXID_G),
    solid("sodium azide", 0.3, TOXIC_G),
    solid("sodium nitrite", 0.8, HAZ_G),
    solid("sodium bisulfite", 0.8, HAZ_G),
    solid("sodium metabisulfite", 0.5, SALT_G),
    // Dilute working solutions made up in house.
    dilute(
        "hydrochloric acid 1 mol/L",
        1.5,
        &[("hydrogen chloride", "1 mol/L")],
        LAB_L,
    ),
    dilute(
        "sulfuric acid 0.5 mol/L",
        1.0,
        &[("sulfuric acid", "0.5 mol/L")],
        LAB_L,
    ),
    dilute(
        "sodium hydroxide 1 mol/L",
        1.5,
        &[("sodium hydroxide", "1 mol/L")],
        LAB_L,
    ),
    dilute(
        "acetic acid 10 % v/v",
        0.5,
        &[("acetic acid", "100 mL/L")],
        LAB_L,
    ),
    dilute(
        "cyanide rinse",
        0.4,
        &[("sodium cyanide", "5 g/L"), ("sodium hydroxide", "2 g/L")],
        BULK_L,
    ),
    dilute(
        "acid copper bath",
        0.4,
        &[
            ("copper(ii) sulfate pentahydrate", "200 g/L"),
            ("sulfuric acid", "60 g/L"),
        ],
        BULK_L,
    ),
    dilute(
        "nickel bath",
        0.3,
        &[
            ("nickel(ii) sulfate hexahydrate", "250 g/L"),
            ("nickel(ii) chloride hexahydrate", "45 g/L"),
            ("boric acid", "40 g/L"),
        ],
        BULK_L,
    ),
    dilute(
        "sulfide test solution",
        0.2,
        &[("sodium sulfide", "10 g/L")],
        SMALL_L,
    ),
];

/// The names of the reagents and working solutions the generator draws from.
pub fn reagent_names() -> Vec<&'static str> {
    REAGENTS.iter().map(|r| r.name).collect()
}

/// Fraction of a bottle left: unopened (full) four times in ten, else 10–100 %.
fn fill(rng: &mut Rng) -> f64 {
    if rng.unit() < 0.4 {
        1.0
    } else {
        0.1 + 0.9 * rng.unit()
    }
}

/// Millilitres in a bottle of `size_l`: whole bottle, or a part rounded down to 5 mL.
fn liquid_ml(rng: &mut Rng, size_l: f64) -> f64 {
    let full = (size_l * 1000.0).round();
    let f = fill(rng);
    if f >= 1.0 {
        full
    } else {
        ((full * f / 5.0).floor() * 5.0).clamp(5.0, full)
    }
}

/// Grams in a pack of `nominal_g`: whole pack, or a part rounded down to the gram.
fn solid_g(rng: &mut Rng, nominal_g: f64) -> f64 {
    let f = fill(rng);
    if f >= 1.0 {
        nominal_g
    } else {
        (nominal_g * f).floor().clamp(1.0, nominal_g)
    }
}

/// One container's size and contents. The table is fixed and checked by the tests, so a
/// name that does not resolve is a bug in this file, not in the caller's input.
fn draw_contents(
    cat: &Catalog,
    file: &str,
    id: &str,
    r: &Reagent,
    rng: &mut Rng,
) -> (f64, Contents) {
    let fail = |e: crate::pour::batch::InputError| -> ! {
        panic!(
            "synthetic store: reagent `{}` does not resolve: {e}",
            r.name
        )
    };
    match r.form {
        Form::Liquid(sizes) => {
            let size_l = rng.pick(sizes);
            let ml = liquid_ml(rng, size_l);
            let c = neat_contents(cat, file, id, r.name, &format!("{ml} mL"), None)
                .unwrap_or_else(|e| fail(e));
            (size_l, c)
        }
        Form::Solid(packs) => {
            let (nominal_g, size_l) = rng.pick(packs);
            let g = solid_g(rng, nominal_g);
            let c = neat_contents(cat, file, id, r.name, &format!("{g} g"), None)
                .unwrap_or_else(|e| fail(e));
            (size_l, c)
        }
        Form::Dilute(parts, sizes) => {
            let size_l = rng.pick(sizes);
            let ml = liquid_ml(rng, size_l);
            let items: Vec<(String, String, Option<usize>)> = parts
                .iter()
                .map(|(s, a)| (s.to_string(), a.to_string(), None))
                .collect();
            // Named and filed as `Inventory::parse` names a solution read from a file.
            let b = Batch::from_parts(
                cat,
                &format!("{file} (container {id})"),
                id,
                ml / 1e3,
                &items,
            )
            .unwrap_or_else(|e| fail(e));
            (size_l, Contents::Liquid(b))
        }
    }
}

/// Shares `n` containers over trays in proportion to `weights` (largest remainder),
/// so that every tray gets its quota rounded up or down and no tray runs away.
fn apportion(n: usize, weights: &[f64]) -> Vec<usize> {
    let total: f64 = weights.iter().sum();
    let quotas: Vec<f64> = weights.iter().map(|w| n as f64 * w / total).collect();
    let mut counts: Vec<usize> = quotas.iter().map(|q| q.floor() as usize).collect();
    let assigned: usize = counts.iter().sum();
    let mut order: Vec<usize> = (0..weights.len()).collect();
    order.sort_by(|&a, &b| {
        let fa = quotas[a] - quotas[a].floor();
        let fb = quotas[b] - quotas[b].floor();
        fb.total_cmp(&fa).then(a.cmp(&b))
    });
    for &i in order.iter().cycle().take(n.saturating_sub(assigned)) {
        counts[i] += 1;
    }
    counts
}

/// Builds a synthetic storeroom of the given shape. The same catalog, shape and seed
/// always give the same inventory.
pub fn synthetic_store(cat: &Catalog, shape: &StoreShape) -> Inventory {
    // Every draw below comes from one generator, in a fixed order: reordering the steps
    // would give another storeroom for the same seed.
    let mut rng = Rng::new(shape.seed);
    let file = format!("synthetic storeroom (seed {})", shape.seed);
    let cabinets = shape.cabinets.max(1);
    let trays = shape.trays_per_cabinet.max(1);
    let rooms = synthetic_rooms(&mut rng, shape.rooms.clamp(1, cabinets));
    let tray_paths = tray_paths(&rooms, cabinets, trays);

    // Uneven but bounded: tray weights 0.5–1.5, so no tray holds more than about three
    // times another, or much more than one and a half times the mean.
    let weights: Vec<f64> = (0..tray_paths.len()).map(|_| 0.5 + rng.unit()).collect();
    let counts = apportion(shape.containers, &weights);
    let locations: Vec<LocationSpec> = tray_paths
        .iter()
        .zip(&counts)
        .map(|(p, &n)| LocationSpec {
            path: p.join(" / "),
            capacity: n + 2 + rng.below(4),
        })
        .collect();
    let slots = shuffled_slots(&mut rng, &counts);
    let containers = draw_containers(cat, &file, &slots, &tray_paths, &mut rng);

    Inventory {
        name: format!(
            "{BUILDING}: {} containers in {cabinets} cabinets (seed {})",
            shape.containers, shape.seed
        ),
        file,
        meet_depth: 4,
        cabinet_depth: 3,
        rooms,
        locations,
        containers,
    }
}

fn synthetic_rooms(rng: &mut Rng, n_rooms: usize) -> Vec<RoomSpec> {
    (0..n_rooms)
        .map(|r| RoomSpec {
            path: vec![BUILDING.to_string(), format!("Room {}", r + 1)],
            // 30–120 m3 and 4–10 air changes an hour, in half steps.
            volume_m3: 30.0 + 0.5 * rng.below(181) as f64,
            air_changes_per_hour: 4.0 + 0.5 * rng.below(13) as f64,
        })
        .collect()
}

/// Trays in building order; cabinet c stands in room c * rooms / cabinets.
fn tray_paths(rooms: &[RoomSpec], cabinets: usize, trays: usize) -> Vec<Vec<String>> {
    let mut tray_paths: Vec<Vec<String>> = Vec::with_capacity(cabinets * trays);
    for c in 0..cabinets {
        let room = &rooms[c * rooms.len() / cabinets];
        for t in 0..trays {
            let mut p = room.path.clone();
            p.push(format!("Cabinet {}", c + 1));
            p.push(format!("Tray {}", t + 1));
            tray_paths.push(p);
        }
    }
    tray_paths
}

/// Every container gets a slot (the index of its tray); the slots are shuffled so that
/// ids, like the order things were bought in, do not follow the shelves.
fn shuffled_slots(rng: &mut Rng, counts: &[usize]) -> Vec<usize> {
    let mut slots: Vec<usize> = counts
        .iter()
        .enumerate()
        .flat_map(|(i, &n)| std::iter::repeat_n(i, n))
        .collect();
    for i in (1..slots.len()).rev() {
        let j = rng.below(i + 1);
        slots.swap(i, j);
    }
    slots
}

/// One container per slot, its reagent drawn from the weighted table.
fn draw_containers(
    cat: &Catalog,
    file: &str,
    slots: &[usize],
    tray_paths: &[Vec<String>],
    rng: &mut Rng,
) -> Vec<StoredContainer> {
    let cumulative: Vec<f64> = REAGENTS
        .iter()
        .scan(0.0, |acc, r| {
            *acc += r.weight;
            Some(*acc)
        })
        .collect();
    let total_weight = *cumulative.last().expect("the reagent table is not empty");
    slots
        .iter()
        .enumerate()
        .map(|(i, &slot)| {
            let id = format!("SYN-{:06}", i + 1);
            let x = rng.unit() * total_weight;
            let k = cumulative
                .partition_point(|&c| c <= x)
                .min(REAGENTS.len() - 1);
            let (size_l, contents) = draw_contents(cat, file, &id, &REAGENTS[k], rng);
            StoredContainer {
                id,
                path: tray_paths[slot].clone(),
                size_l,
                contents,
                line: None,
            }
        })
        .collect()
}

/// A YAML double-quoted string.
fn quoted(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 2);
    out.push('"');
    for ch in s.chars() {
        match ch {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\t' => out.push_str("\\t"),
            c if (c as u32) < 0x20 || c as u32 == 0x7f => {
                let _ = write!(out, "\\u{:04x}", c as u32);
            }
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

/// `x` to 12 significant digits, no exponent, trailing zeros dropped. Used where a value
/// is converted (moles back to grams), so that 500 g reads as `500` and not as
/// `499.99999999999994`; the relative error is below 1e-11.
fn sig12(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    let mut magnitude = 0i32; // floor(log10(|x|)), found without libm for portability
    let a = x.abs();
    let mut p = 1.0f64;
    if a >= 1.0 {
        while p * 10.0 <= a && magnitude < 300 {
            p *= 10.0;
            magnitude += 1;
        }
    } else {
        while p > a && magnitude > -300 {
            p /= 10.0;
            magnitude -= 1;
        }
    }
    let decimals = (11 - magnitude).max(0) as usize;
    let s = format!("{x:.decimals$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// An amount as the batch and inventory files write it (exact: the number is the one
/// stored, in the unit it was read in).
fn amount_text(a: Amount) -> String {
    match a {
        Amount::MolPerLitre(v) => format!("{v} mol/L"),
        Amount::GramPerLitre(v) => format!("{v} g/L"),
        Amount::PercentWeightPerWeight(v) => format!("{v} %w/w"),
        Amount::PercentWeightPerVolume(v) => format!("{v} %w/v"),
        Amount::MillilitrePerLitre(v) => format!("{v} mL/L"),
        Amount::Moles(v) => format!("{v} mol"),
        Amount::Grams(v) => format!("{v} g"),
        Amount::Millilitres(v) => format!("{v} mL"),
    }
}

/// Writes an inventory in the YAML form `Inventory::parse` reads. Neat liquids and dry
/// containers are written as `substance` + `amount`; other liquids as `volume` +
/// `contents`. Substances are written by their catalog name. What the inventory model
/// does not hold (a container's own closure, batch temperatures) is not written.
pub fn to_yaml(cat: &Catalog, inv: &Inventory) -> String {
    let mut y = String::with_capacity(256 + 200 * inv.containers.len() + 80 * inv.locations.len());
    let _ = writeln!(y, "name: {}", quoted(&inv.name));
    if inv
        .containers
        .first()
        .is_some_and(|c| c.path.first().map(String::as_str) == Some(BUILDING))
    {
        y.push_str("note: \"Synthetic storeroom for tests and benchmarks; an invented building, not a real site.\"\n");
    }
    let _ = writeln!(
        y,
        "levels:\n  spill_zone: {}\n  cabinet: {}",
        inv.meet_depth, inv.cabinet_depth
    );
    write_rooms(&mut y, &inv.rooms);
    write_locations(&mut y, &inv.locations);
    y.push_str("containers:\n");
    for c in &inv.containers {
        write_container(&mut y, cat, c);
    }
    y
}

fn write_rooms(y: &mut String, rooms: &[RoomSpec]) {
    if rooms.is_empty() {
        return;
    }
    y.push_str("rooms:\n");
    for r in rooms {
        let _ = writeln!(
            y,
            "  - path: {}\n    volume: \"{} m3\"\n    air_changes: {:?}",
            quoted(&r.path.join(" / ")),
            r.volume_m3,
            r.air_changes_per_hour
        );
    }
}

fn write_locations(y: &mut String, locations: &[LocationSpec]) {
    if locations.is_empty() {
        return;
    }
    y.push_str("locations:\n");
    for l in locations {
        let _ = writeln!(
            y,
            "  - path: {}\n    capacity: {}",
            quoted(&l.path),
            l.capacity
        );
    }
}

fn write_container(y: &mut String, cat: &Catalog, c: &StoredContainer) {
    let _ = writeln!(
        y,
        "  - id: {}\n    location: {}\n    size: \"{} L\"",
        quoted(&c.id),
        quoted(&c.location()),
        c.size_l
    );
    match &c.contents {
        Contents::Dry { substance, moles } => {
            let s = cat.substance(*substance);
            let amount = match s.molar_mass {
                Some(mm) => format!("{} g", sig12(moles * mm)),
                None => format!("{moles} mol"),
            };
            let _ = writeln!(
                y,
                "    substance: {}\n    amount: {}",
                quoted(&s.name),
                quoted(&amount)
            );
        }
        Contents::Liquid(b) => match neat_liquid(cat, b) {
            Some(only) => {
                let _ = writeln!(
                    y,
                    "    substance: {}\n    amount: {}",
                    quoted(&cat.substance(only.substance).name),
                    quoted(&amount_text(only.amount))
                );
            }
            None => {
                let _ = writeln!(y, "    volume: \"{} L\"\n    contents:", b.volume_l);
                for comp in &b.components {
                    let _ = writeln!(
                        y,
                        "      - substance: {}\n        amount: {}",
                        quoted(&cat.substance(comp.substance).name),
                        quoted(&amount_text(comp.amount))
                    );
                }
            }
        },
    }
}

/// The one component of a batch that is a neat liquid filling it whole, which is
/// written back as `substance` + `amount`, as it was read.
fn neat_liquid<'b>(cat: &Catalog, b: &'b Batch) -> Option<&'b Component> {
    match b.components.as_slice() {
        [only] => match only.amount {
            Amount::Millilitres(ml) => (matches!(
                cat.substance(only.substance).state,
                PhysicalState::Liquid | PhysicalState::Solution
            ) && ml / 1e3 == b.volume_l)
                .then_some(only),
            _ => None,
        },
        _ => None,
    }
}
