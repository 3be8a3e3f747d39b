//! `audit`: a storeroom's containers, which of them can meet if they leak, and what then.
//!
//! # Locations
//!
//! A container's location is a path of one to six levels, outermost first, separated by
//! `/`: `Quarry Lane Annex / Store B / Cabinet 2 / Tray 1`, `Cabinet 2 / Tray 1`, or just
//! `Cab 1`. Unless the inventory states its own `levels`, they are read from the end:
//!
//! * the **last level is the spill zone** (a tray, a bin, secondary containment):
//!   containers in the same spill zone can meet directly;
//! * the **level above it is the cabinet**: containers in the same cabinet but different
//!   spill zones meet at a second level (unless the audit is run without it). A container
//!   whose spill zone encloses another's cabinet (a bottle standing loose in `Cab 1`, a
//!   tray at `Cab 1 / Tray 2`) meets that cabinet's containers at the second level too;
//! * with **one level**, that level is both the spill zone and the cabinet;
//! * the **levels above the cabinet** name the room (and the building): in
//!   `Annex / Store C / Cabinet 4 / Tray 1` the room is `Annex / Store C`. A declared room
//!   applies to a container whose location begins with the room's path, down to the
//!   container's cabinet level (so `Annex / Store C / Cabinet 5`, a cabinet with no trays,
//!   whose cabinet level is `Store C`, is in that room too); the longest such room wins.
//!   A one- or two-level location has nothing above its cabinet and names no room: it
//!   takes a room declared with the path `/` (the whole store), or else the default room
//!   of the thresholds file. So does any container no declared room matches.
//!
//! Locations are compared level by level as written (surrounding spaces trimmed), so the
//! same place must be written the same way on every row. An inventory that states
//! `levels: { spill_zone: N, cabinet: M }` reads the first N levels as the spill zone and
//! the first M as the cabinet instead; its locations need at least N levels, and any below
//! the spill zone are labels only.
//!
//! Each pair that can meet is screened cheaply and, where it could matter, checked in full.

pub mod audit;
pub mod csv_import;
pub mod generate;
pub mod report;
pub mod suggest;

use crate::basics::quantity::{parse_amount, parse_volume, Amount};
use crate::catalog::{Catalog, PhysicalState, SubstanceId};
use crate::pour::batch::{Batch, InputError};
use serde::Deserialize;

/// What a container holds.
#[derive(Debug, Clone, PartialEq)]
pub enum Contents {
    /// A liquid: a solution or a neat liquid, as a batch.
    Liquid(Batch),
    /// A dry solid (or a gas in a cylinder): it meets others only by the rules, or by
    /// dissolving into a liquid partner.
    Dry { substance: SubstanceId, moles: f64 },
}

#[derive(Debug, Clone, PartialEq)]
pub struct StoredContainer {
    pub id: String,
    /// Location path, outermost first (one to six levels; the last is the spill zone
    /// unless the inventory states its `levels`).
    pub path: Vec<String>,
    pub size_l: f64,
    pub contents: Contents,
    pub line: Option<usize>,
}

impl StoredContainer {
    pub fn location(&self) -> String {
        self.path.join(" / ")
    }
    /// The zone key at `depth` path components.
    pub fn zone(&self, depth: usize) -> String {
        self.path[..depth.min(self.path.len())].join("/")
    }
}

/// Most levels a location may have (e.g. building / wing / room / cabinet / shelf / tray).
pub const MAX_LOCATION_LEVELS: usize = 6;

/// Reads a location: levels separated by `/`, outermost first, empty levels dropped. The
/// error says what is wrong, for the caller to put after the container's name.
pub fn parse_location(text: &str) -> Result<Vec<String>, String> {
    let path = split_path(text);
    if path.is_empty() {
        return Err("the location is empty".into());
    }
    if path.len() > MAX_LOCATION_LEVELS {
        return Err(format!(
            "location `{}` has {} levels; a location has 1 to {MAX_LOCATION_LEVELS}",
            path.join(" / "),
            path.len()
        ));
    }
    Ok(path)
}

/// The spill-zone and cabinet depths of an inventory that reads its locations from the end:
/// the deepest location's levels, and one less (one for one-level locations). With these,
/// every location's spill zone is all of it and its cabinet the level above.
pub fn depths_from_the_end<'a>(paths: impl Iterator<Item = &'a [String]>) -> (usize, usize) {
    let deepest = paths.map(<[String]>::len).max().unwrap_or(1).max(1);
    (deepest, deepest.saturating_sub(1).max(1))
}

/// `n` and the noun, singular or plural as `n` asks ("1 row", "2 rows").
pub fn counted(n: usize, singular: &str, plural: &str) -> String {
    format!("{n} {}", if n == 1 { singular } else { plural })
}

/// A declared location with the number of containers it holds at most.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LocationSpec {
    pub path: String,
    pub capacity: usize,
}

/// A room's air, for the release figures.
#[derive(Debug, Clone, PartialEq)]
pub struct RoomSpec {
    pub path: Vec<String>,
    pub volume_m3: f64,
    pub air_changes_per_hour: f64,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Inventory {
    pub file: String,
    pub name: String,
    /// Path depth of a spill zone and of a cabinet. A location shorter than `meet_depth`
    /// is a spill zone whole; the cabinet is `meet_depth - cabinet_depth` levels above the
    /// spill zone, and never less than the first level (see the module's documentation and
    /// [`Inventory::spill_zone_path`]). An inventory that reads its locations from the end
    /// has `cabinet_depth = meet_depth - 1` (both 1 when every location has one level).
    pub meet_depth: usize,
    pub cabinet_depth: usize,
    pub rooms: Vec<RoomSpec>,
    pub locations: Vec<LocationSpec>,
    pub containers: Vec<StoredContainer>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawInventory {
    name: Option<String>,
    #[serde(default)]
    levels: Option<RawLevels>,
    #[serde(default)]
    rooms: Vec<RawRoom>,
    #[serde(default)]
    locations: Vec<LocationSpec>,
    containers: Vec<RawContainer>,
    #[serde(default)]
    #[allow(dead_code)]
    note: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLevels {
    /// Leading path components that make a spill zone. Without `levels`, a location is
    /// read from the end (the last level is the spill zone).
    spill_zone: usize,
    /// Leading path components that make a cabinet.
    cabinet: usize,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRoom {
    path: String,
    volume: String,
    air_changes: f64,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawContainer {
    id: String,
    location: String,
    size: String,
    #[serde(default)]
    substance: Option<String>,
    #[serde(default)]
    amount: Option<String>,
    #[serde(default)]
    volume: Option<String>,
    #[serde(default)]
    contents: Vec<serde_yaml::Value>,
    #[serde(default)]
    #[allow(dead_code)]
    closure: Option<String>,
}

pub fn split_path(p: &str) -> Vec<String> {
    p.split('/')
        .map(|s| s.trim().to_string())
        .filter(|s| !s.is_empty())
        .collect()
}

/// Builds one container's contents from a neat substance and its amount: a liquid by
/// volume becomes a liquid batch, a solid (or anything weighed) a dry container.
pub fn neat_contents(
    cat: &Catalog,
    file: &str,
    id: &str,
    substance: &str,
    amount: &str,
    line: Option<usize>,
) -> Result<Contents, InputError> {
    let err = |m: String, fix: Option<String>| InputError {
        file: file.to_string(),
        line,
        message: format!("container `{id}`: {m}"),
        fix,
    };
    let sid = cat.find_substance(substance).ok_or_else(|| {
        err(
            format!("unknown substance `{substance}`"),
            Some(format!(
                "did you mean: {}?",
                cat.closest_names(substance, 3).join(", ")
            )),
        )
    })?;
    let s = cat.substance(sid);
    let a = parse_amount(amount).map_err(|e| err(format!("amount: {e}"), None))?;
    let liquid = matches!(s.state, PhysicalState::Liquid | PhysicalState::Solution);
    match a {
        Amount::Millilitres(ml) if liquid => {
            let b = Batch::from_parts(
                cat,
                file,
                id,
                ml / 1e3,
                &[(substance.to_string(), amount.to_string(), line)],
            )?;
            Ok(Contents::Liquid(b))
        }
        Amount::Grams(g) if liquid => {
            let d = s.density_g_per_ml.ok_or_else(|| {
                err(
                    format!(
                        "`{}` is a liquid without a density; give its volume",
                        s.name
                    ),
                    None,
                )
            })?;
            let ml = g / d;
            let b = Batch::from_parts(
                cat,
                file,
                id,
                ml / 1e3,
                &[(substance.to_string(), format!("{ml} mL"), line)],
            )?;
            Ok(Contents::Liquid(b))
        }
        Amount::Grams(g) => {
            let mm = s
                .molar_mass
                .ok_or_else(|| err(format!("`{}` has no molar mass", s.name), None))?;
            Ok(Contents::Dry {
                substance: sid,
                moles: g / mm,
            })
        }
        Amount::Moles(n) => Ok(Contents::Dry {
            substance: sid,
            moles: n,
        }),
        _ => Err(err(
            format!(
                "a neat `{}` needs an amount in g, kg, mol or (for liquids) mL or L",
                s.name
            ),
            Some("give a solution as `volume:` and `contents:` instead".into()),
        )),
    }
}

/// An inventory error at `line` of `file`.
fn input_error(
    file: &str,
    line: Option<usize>,
    message: String,
    fix: Option<String>,
) -> InputError {
    InputError {
        file: file.to_string(),
        line,
        message,
        fix,
    }
}

/// The line of each container's `id`, in order, for messages: YAML errors past parsing
/// carry no line of their own.
fn container_lines(text: &str) -> Vec<usize> {
    text.lines()
        .enumerate()
        .filter(|(_, l)| {
            let t = l.trim_start();
            t.starts_with("- id:") || (t.starts_with("- {") && t.contains("id:"))
        })
        .map(|(i, _)| i + 1)
        .collect()
}

/// Stated `levels` as (spill zone, cabinet) depths, if they make sense.
fn fixed_levels(
    file: &str,
    levels: Option<RawLevels>,
) -> Result<Option<(usize, usize)>, InputError> {
    let fixed = levels.map(|l| (l.spill_zone, l.cabinet));
    if let Some((meet, cabinet)) = fixed {
        if cabinet == 0 || meet < cabinet || meet > MAX_LOCATION_LEVELS {
            return Err(input_error(
                file,
                None,
                format!("`levels`: the cabinet must be at least one path component, the spill zone at least as deep, and neither deeper than {MAX_LOCATION_LEVELS}"),
                Some("leave `levels` out to read every location from the end: the last level is the spill zone, the one above it the cabinet".into()),
            ));
        }
    }
    Ok(fixed)
}

fn parse_room(file: &str, r: RawRoom) -> Result<RoomSpec, InputError> {
    let err = |message: String| input_error(file, None, message, None);
    let v = crate::basics::quantity::parse_room_volume_m3(&r.volume)
        .map_err(|e| err(format!("room `{}`: {e}", r.path)))?;
    if !(v > 0.0 && r.air_changes > 0.0) {
        return Err(err(format!(
            "room `{}`: volume and air changes must be above zero",
            r.path
        )));
    }
    let room_path = split_path(&r.path);
    if room_path.len() > MAX_LOCATION_LEVELS {
        return Err(err(format!(
            "room `{}` has {} levels; a location has at most {MAX_LOCATION_LEVELS}",
            r.path,
            room_path.len()
        )));
    }
    Ok(RoomSpec {
        path: room_path,
        volume_m3: v,
        air_changes_per_hour: r.air_changes,
    })
}

/// Where a container is read, for its messages.
struct Source<'a> {
    cat: &'a Catalog,
    file: &'a str,
    line: Option<usize>,
    fixed_levels: Option<(usize, usize)>,
}

impl Source<'_> {
    fn container_error(&self, id: &str, m: String, fix: Option<String>) -> InputError {
        input_error(self.file, self.line, format!("container `{id}`: {m}"), fix)
    }

    /// One container, its location checked against stated `levels` and its contents
    /// against its size.
    fn container(&self, c: RawContainer) -> Result<StoredContainer, InputError> {
        let cerr = |m: String, fix: Option<String>| self.container_error(&c.id, m, fix);
        let path = parse_location(&c.location).map_err(|m| {
            cerr(
                m,
                Some("write the levels from the outermost, the spill zone last, e.g. `Store B / Cabinet 2 / Tray 1`".into()),
            )
        })?;
        if let Some((meet, _)) = self.fixed_levels {
            if path.len() < meet {
                return Err(cerr(
                    format!(
                        "location `{}` has {}; this inventory's `levels` put the spill zone at level {meet}",
                        c.location,
                        counted(path.len(), "level", "levels")
                    ),
                    Some("write the whole path, or leave `levels` out to read every location from the end".into()),
                ));
            }
        }
        let size_l = parse_volume(&c.size)
            .map_err(|e| cerr(format!("size: {e}"), None))?
            .0;
        let contents = self.contents(&c)?;
        let held = match &contents {
            Contents::Liquid(b) => b.volume_l,
            Contents::Dry { .. } => 0.0,
        };
        if held > size_l * (1.0 + 1e-9) {
            return Err(cerr(
                format!("holds {held} L, more than its size of {size_l} L"),
                None,
            ));
        }
        Ok(StoredContainer {
            id: c.id,
            path,
            size_l,
            contents,
            line: self.line,
        })
    }

    /// A neat reagent (`substance` and `amount`) or a solution (`volume` and `contents`).
    fn contents(&self, c: &RawContainer) -> Result<Contents, InputError> {
        let (cat, file) = (self.cat, self.file);
        match (&c.substance, &c.amount, &c.volume) {
            (Some(s), Some(a), None) if c.contents.is_empty() => {
                neat_contents(cat, file, &c.id, s, a, self.line)
            }
            (None, None, Some(v)) if !c.contents.is_empty() => {
                // The batch reader reads a solution as its own file would give it.
                let mut m = serde_yaml::Mapping::new();
                m.insert("name".into(), c.id.clone().into());
                m.insert("volume".into(), v.clone().into());
                m.insert("contents".into(), serde_yaml::Value::Sequence(c.contents.clone()));
                let text = serde_yaml::to_string(&m).unwrap_or_default();
                let b = Batch::parse(cat, &format!("{file} (container {})", c.id), &text)
                    .map_err(|e| self.container_error(&c.id, e.message, e.fix))?;
                Ok(Contents::Liquid(b))
            }
            _ => Err(self.container_error(
                &c.id,
                "give either `substance` and `amount` (a neat reagent) or `volume` and `contents` (a solution)".into(),
                None,
            )),
        }
    }
}

impl Inventory {
    pub fn parse(cat: &Catalog, file: &str, text: &str) -> Result<Inventory, InputError> {
        crate::basics::input_shape::check_yaml_shape(
            file,
            text,
            crate::basics::input_shape::MAX_INVENTORY_BYTES,
        )?;
        let raw: RawInventory = serde_yaml::from_str(text).map_err(|e| {
            input_error(
                file,
                e.location().map(|l| l.line()),
                format!("not a readable inventory: {e}"),
                Some("an inventory knows: name, levels, rooms, locations, containers (each with id, location, size, and substance + amount or volume + contents)".into()),
            )
        })?;
        let fixed_levels = fixed_levels(file, raw.levels)?;
        let id_lines = container_lines(text);
        let rooms = raw
            .rooms
            .into_iter()
            .map(|r| parse_room(file, r))
            .collect::<Result<Vec<_>, _>>()?;
        let mut containers = Vec::with_capacity(raw.containers.len());
        let mut seen = std::collections::HashSet::new();
        for (i, c) in raw.containers.into_iter().enumerate() {
            let source = Source {
                cat,
                file,
                line: id_lines.get(i).copied(),
                fixed_levels,
            };
            if !seen.insert(c.id.clone()) {
                return Err(source.container_error(
                    &c.id,
                    "the id appears twice".into(),
                    Some("give every container its own id".into()),
                ));
            }
            containers.push(source.container(c)?);
        }
        for l in &raw.locations {
            parse_location(&l.path)
                .map_err(|m| input_error(file, None, format!("`locations`: {m}"), None))?;
        }
        let (meet_depth, cabinet_depth) = fixed_levels
            .unwrap_or_else(|| depths_from_the_end(containers.iter().map(|c| c.path.as_slice())));
        Ok(Inventory {
            file: file.to_string(),
            name: raw.name.unwrap_or_else(|| file.to_string()),
            meet_depth,
            cabinet_depth,
            rooms,
            locations: raw.locations,
            containers,
        })
    }

    /// The leading levels of `path` that make its spill zone: all of it, or the first
    /// `meet_depth` where the inventory states its `levels`.
    pub fn spill_zone_path<'p>(&self, path: &'p [String]) -> &'p [String] {
        &path[..self.meet_depth.min(path.len())]
    }

    /// The leading levels of `path` that make its cabinet: the spill zone without its last
    /// `meet_depth - cabinet_depth` levels (the level above the spill zone), but at least
    /// the first level, so that a one-level location is its own cabinet.
    pub fn cabinet_path<'p>(&self, path: &'p [String]) -> &'p [String] {
        let zone = self.spill_zone_path(path).len();
        let above = self.meet_depth.saturating_sub(self.cabinet_depth);
        &path[..zone.saturating_sub(above).max(1).min(path.len())]
    }

    /// The levels above the cabinet (the building, the room, ...); empty for a location of
    /// one or two levels.
    pub fn room_path<'p>(&self, path: &'p [String]) -> &'p [String] {
        let cabinet = self.cabinet_path(path).len();
        &path[..cabinet.saturating_sub(1)]
    }

    /// The spill zone a container stands in, as a key (levels joined by `/`).
    pub fn spill_zone(&self, c: &StoredContainer) -> String {
        self.spill_zone_path(&c.path).join("/")
    }

    /// The cabinet a container stands in, as a key (levels joined by `/`).
    pub fn cabinet(&self, c: &StoredContainer) -> String {
        self.cabinet_path(&c.path).join("/")
    }

    /// The room a container stands in, if the inventory describes it: the declared room
    /// with the longest path that leads the container's location, down to its cabinet
    /// level (where a location leaves out its tray, that level is the room it stands in).
    /// A room declared with the path `/` matches every container, one- and two-level
    /// locations included, where no longer room does.
    pub fn room_of(&self, c: &StoredContainer) -> Option<&RoomSpec> {
        let cabinet = self.cabinet_path(&c.path);
        self.rooms
            .iter()
            .filter(|r| cabinet.starts_with(&r.path))
            .max_by_key(|r| r.path.len())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn inventory(text: &str) -> Result<Inventory, InputError> {
        let cat = crate::embedded::catalog().expect("catalog");
        Inventory::parse(&cat, "store.yaml", text)
    }

    fn salt(id: &str, location: &str) -> String {
        format!("  - {{ id: {id}, location: \"{location}\", size: 1 L, substance: sodium chloride, amount: 5 g }}\n")
    }

    #[test]
    fn locations_are_read_from_the_end_without_levels() {
        let text = format!(
            "containers:\n{}{}{}",
            salt("A", "Cab 1"),
            salt("B", "Cab 1 / Tray 2"),
            salt("C", "Annex / Store C / Cabinet 4 / Tray 1"),
        );
        let inv = inventory(&text).unwrap();
        assert_eq!((inv.meet_depth, inv.cabinet_depth), (4, 3));
        let c = |id: &str| inv.containers.iter().find(|c| c.id == id).unwrap();
        assert_eq!(inv.spill_zone(c("A")), "Cab 1");
        assert_eq!(inv.cabinet(c("A")), "Cab 1");
        assert_eq!(inv.spill_zone(c("B")), "Cab 1/Tray 2");
        assert_eq!(inv.cabinet(c("B")), "Cab 1");
        assert_eq!(inv.cabinet(c("C")), "Annex/Store C/Cabinet 4");
        assert_eq!(inv.room_path(&c("C").path), ["Annex", "Store C"]);
        assert!(inv.room_path(&c("A").path).is_empty());
        assert!(inv.room_path(&c("B").path).is_empty());
    }

    #[test]
    fn stated_levels_read_from_the_front() {
        let text = format!(
            "levels: {{ spill_zone: 4, cabinet: 3 }}\ncontainers:\n{}",
            salt("A", "Annex / Store C / Cabinet 4 / Tray 1 / Slot 3")
        );
        let inv = inventory(&text).unwrap();
        let a = &inv.containers[0];
        assert_eq!(inv.spill_zone(a), "Annex/Store C/Cabinet 4/Tray 1");
        assert_eq!(inv.cabinet(a), "Annex/Store C/Cabinet 4");
        // Stated levels need that many.
        let text = format!(
            "levels: {{ spill_zone: 4, cabinet: 3 }}\ncontainers:\n{}",
            salt("A", "Cab 1 / Tray 2")
        );
        let e = inventory(&text).unwrap_err();
        assert!(e.message.contains("has 2 levels"), "{e}");
        assert_eq!(e.line, Some(3));
        let e = inventory("levels: { spill_zone: 7, cabinet: 3 }\ncontainers: []\n").unwrap_err();
        assert!(e.message.contains("neither deeper than 6"), "{e}");
    }

    #[test]
    fn seven_levels_and_empty_locations_are_refused_with_their_line() {
        let text = format!(
            "containers:\n{}{}",
            salt("A", "Cab 1"),
            salt("B", "S / A / R / C / Sh / B / X")
        );
        let e = inventory(&text).unwrap_err();
        assert_eq!(e.line, Some(3));
        assert!(
            e.message.contains("container `B`") && e.message.contains("has 7 levels"),
            "{e}"
        );
        let e = inventory(&format!("containers:\n{}", salt("A", " / "))).unwrap_err();
        assert!(e.message.contains("the location is empty"), "{e}");
        let e = inventory(&format!(
            "locations:\n  - {{ path: A/B/C/D/E/F/G, capacity: 2 }}\ncontainers:\n{}",
            salt("A", "Cab 1")
        ))
        .unwrap_err();
        assert!(e.message.contains("`locations`"), "{e}");
    }

    #[test]
    fn rooms_are_matched_by_the_levels_above_the_cabinet() {
        let text = format!(
            "rooms:\n  - {{ path: Annex / Store C, volume: 40 m3, air_changes: 6 }}\n  - {{ path: /, volume: 90 m3, air_changes: 4 }}\ncontainers:\n{}{}{}{}",
            salt("A", "Annex / Store C / Cabinet 4 / Tray 1"),
            salt("B", "Annex / Store C / Cabinet 4"),
            salt("C", "Cabinet 4 / Tray 1"),
            salt("D", "Cab 9"),
        );
        let inv = inventory(&text).unwrap();
        let room = |id: &str| {
            let c = inv.containers.iter().find(|c| c.id == id).unwrap();
            inv.room_of(c).map(|r| r.volume_m3)
        };
        assert_eq!(room("A"), Some(40.0));
        // Three levels: Store C is the cabinet level, and the room it stands in.
        assert_eq!(room("B"), Some(40.0));
        // One and two levels name no room: the whole-store room.
        assert_eq!(room("C"), Some(90.0));
        assert_eq!(room("D"), Some(90.0));
        // Without a `/` room they have none (the thresholds file's default applies).
        let text = text.replace("  - { path: /, volume: 90 m3, air_changes: 4 }\n", "");
        let inv = inventory(&text).unwrap();
        let c = inv.containers.iter().find(|c| c.id == "C").unwrap();
        assert!(inv.room_of(c).is_none());
    }

    #[test]
    fn counted_is_singular_for_one() {
        assert_eq!(counted(1, "row", "rows"), "1 row");
        assert_eq!(counted(0, "row", "rows"), "0 rows");
        assert_eq!(counted(2, "cabinet", "cabinets"), "2 cabinets");
    }
}
