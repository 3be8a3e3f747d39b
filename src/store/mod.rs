//! `audit`: a storeroom's containers, which of them can meet if they leak, and what then.
//!
//! An inventory lists containers with a location path (building / room / cabinet / tray)
//! and contents. Containers that share a spill zone (the tray, or secondary containment)
//! can meet; so can containers in the same cabinet, at a second level. Each pair that can
//! meet is screened cheaply and, where it could matter, checked in full.

pub mod audit;
pub mod csv_import;
pub mod generate;
pub mod suggest;
pub mod view;

use crate::batch::{Batch, InputError};
use crate::catalog::{Catalog, PhysicalState, SubstanceId};
use crate::quantity::{parse_amount, parse_volume, Amount};
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
    /// Location path, outermost first: building, room, cabinet, tray.
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
    /// Path depth of a spill zone (tray) and of a cabinet.
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
    /// Path components that make a spill zone (default 4: building/room/cabinet/tray).
    spill_zone: usize,
    /// Path components that make a cabinet (default 3).
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

impl Inventory {
    pub fn parse(cat: &Catalog, file: &str, text: &str) -> Result<Inventory, InputError> {
        let err = |line: Option<usize>, message: String, fix: Option<String>| InputError {
            file: file.to_string(),
            line,
            message,
            fix,
        };
        crate::input_shape::check_yaml_shape(file, text, crate::input_shape::MAX_INVENTORY_BYTES)?;
        let raw: RawInventory = serde_yaml::from_str(text).map_err(|e| {
            err(
                e.location().map(|l| l.line()),
                format!("not a readable inventory: {e}"),
                Some("an inventory knows: name, levels, rooms, locations, containers (each with id, location, size, and substance + amount or volume + contents)".into()),
            )
        })?;
        let (meet_depth, cabinet_depth) = match raw.levels {
            Some(l) => (l.spill_zone, l.cabinet),
            None => (4, 3),
        };
        if cabinet_depth == 0 || meet_depth < cabinet_depth {
            return Err(err(None, "`levels`: the cabinet must be at least one path component, and the spill zone at least as deep".into(), None));
        }
        let id_lines: Vec<usize> = text
            .lines()
            .enumerate()
            .filter(|(_, l)| {
                let t = l.trim_start();
                t.starts_with("- id:") || (t.starts_with("- {") && t.contains("id:"))
            })
            .map(|(i, _)| i + 1)
            .collect();
        let mut rooms = Vec::new();
        for r in raw.rooms {
            let v = crate::quantity::parse_room_volume_m3(&r.volume)
                .map_err(|e| err(None, format!("room `{}`: {e}", r.path), None))?;
            if !(v > 0.0 && r.air_changes > 0.0) {
                return Err(err(
                    None,
                    format!(
                        "room `{}`: volume and air changes must be above zero",
                        r.path
                    ),
                    None,
                ));
            }
            rooms.push(RoomSpec {
                path: split_path(&r.path),
                volume_m3: v,
                air_changes_per_hour: r.air_changes,
            });
        }
        let mut containers = Vec::with_capacity(raw.containers.len());
        let mut seen = std::collections::HashSet::new();
        for (i, c) in raw.containers.into_iter().enumerate() {
            let line = id_lines.get(i).copied();
            let cerr = |m: String, fix: Option<String>| {
                err(line, format!("container `{}`: {m}", c.id), fix)
            };
            if !seen.insert(c.id.clone()) {
                return Err(cerr(
                    "the id appears twice".into(),
                    Some("give every container its own id".into()),
                ));
            }
            let path = split_path(&c.location);
            if path.len() < meet_depth {
                return Err(cerr(
                    format!("location `{}` has {} parts; this inventory's spill zone needs {meet_depth} (building / room / cabinet / tray)", c.location, path.len()),
                    None,
                ));
            }
            let size_l = parse_volume(&c.size)
                .map_err(|e| cerr(format!("size: {e}"), None))?
                .0;
            let contents = match (&c.substance, &c.amount, &c.volume) {
                (Some(s), Some(a), None) if c.contents.is_empty() => neat_contents(cat, file, &c.id, s, a, line)?,
                (None, None, Some(v)) if !c.contents.is_empty() => {
                    let mut m = serde_yaml::Mapping::new();
                    m.insert("name".into(), c.id.clone().into());
                    m.insert("volume".into(), v.clone().into());
                    m.insert("contents".into(), serde_yaml::Value::Sequence(c.contents.clone()));
                    let text = serde_yaml::to_string(&m).unwrap_or_default();
                    let b = Batch::parse(cat, &format!("{file} (container {})", c.id), &text)
                        .map_err(|e| cerr(e.message, e.fix))?;
                    Contents::Liquid(b)
                }
                _ => {
                    return Err(cerr(
                        "give either `substance` and `amount` (a neat reagent) or `volume` and `contents` (a solution)".into(),
                        None,
                    ))
                }
            };
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
            containers.push(StoredContainer {
                id: c.id,
                path,
                size_l,
                contents,
                line,
            });
        }
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

    /// The room a container stands in, if the inventory describes it.
    pub fn room_of(&self, c: &StoredContainer) -> Option<&RoomSpec> {
        self.rooms
            .iter()
            .filter(|r| c.path.starts_with(&r.path))
            .max_by_key(|r| r.path.len())
    }
}
