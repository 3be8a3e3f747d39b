//! Batch files: a container or a stream, as a user writes it in YAML.
//!
//! Parsing turns the user's words into resolved substances and moles, and every mistake
//! into an `InputError` that names the file, the line where it can be found, and the fix.

use crate::basics::quantity::{
    parse_amount, parse_area_m2, parse_pressure_kpa, parse_temperature, parse_volume, Amount,
    QuantityError,
};
use crate::catalog::{Catalog, PhysicalState, SubstanceId};
use crate::chem::{Closure, Mixture};
use serde::Deserialize;

/// Litres of water an empty container is taken to hold.
pub const EMPTY_FILM_L: f64 = 1e-3;

/// A mistake in something the user wrote (it lives in `input_error`, which stands on its own).
pub use crate::basics::input_error::InputError;

/// One component as resolved against the catalog.
#[derive(Debug, Clone, PartialEq)]
pub struct Component {
    pub written: String,
    pub substance: SubstanceId,
    pub amount: Amount,
    /// Moles of the substance (for a commercial solution, of its solute).
    pub moles: f64,
    pub line: Option<usize>,
}

/// A container (with capacity and closure) or a stream.
#[derive(Debug, Clone, PartialEq)]
pub struct Batch {
    pub file: String,
    pub name: String,
    pub capacity_l: Option<f64>,
    pub volume_l: f64,
    pub temperature_k: f64,
    pub temperature_given: bool,
    pub closure: Closure,
    pub density_g_per_ml: f64,
    pub density_given: bool,
    /// Gauge pressure the container is rated for, kPa (containers only).
    pub rated_pressure_kpa: Option<f64>,
    /// Area of liquid open to the room when the container is open, m2.
    pub surface_area_m2: Option<f64>,
    pub components: Vec<Component>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawBatch {
    name: Option<String>,
    capacity: Option<serde_yaml::Value>,
    volume: Option<serde_yaml::Value>,
    temperature: Option<serde_yaml::Value>,
    closure: Option<String>,
    density: Option<serde_yaml::Value>,
    rated_pressure: Option<serde_yaml::Value>,
    surface_area: Option<serde_yaml::Value>,
    contents: Option<Vec<serde_yaml::Value>>,
    #[serde(default)]
    #[allow(dead_code)]
    note: Option<String>,
}

/// First line (1-based) at or after `from` whose text contains `needle`.
fn line_of(text: &str, needle: &str, from: usize) -> Option<usize> {
    text.lines()
        .enumerate()
        .skip(from.saturating_sub(1))
        .find(|(_, l)| l.contains(needle))
        .map(|(i, _)| i + 1)
}

fn scalar_text(v: &serde_yaml::Value) -> Option<String> {
    match v {
        serde_yaml::Value::String(s) => Some(s.clone()),
        serde_yaml::Value::Number(n) => Some(n.to_string()),
        _ => None,
    }
}

struct Ctx<'a> {
    file: &'a str,
    text: &'a str,
}

impl Ctx<'_> {
    fn err(
        &self,
        line: Option<usize>,
        message: impl Into<String>,
        fix: Option<String>,
    ) -> InputError {
        InputError {
            file: self.file.to_string(),
            line,
            message: message.into(),
            fix,
        }
    }
    fn key_line(&self, key: &str) -> Option<usize> {
        self.text
            .lines()
            .position(|l| l.trim_start().starts_with(&format!("{key}:")))
            .map(|i| i + 1)
    }
    fn quantity<T>(
        &self,
        key: &str,
        v: &serde_yaml::Value,
        parse: fn(&str) -> Result<T, QuantityError>,
    ) -> Result<T, InputError> {
        let line = self.key_line(key);
        let text = scalar_text(v)
            .ok_or_else(|| self.err(line, format!("`{key}` must be a value with a unit"), None))?;
        parse(&text).map_err(|e| self.err(line, format!("`{key}`: {e}"), None))
    }
}

impl Batch {
    /// Parses a batch file. `file` names it in messages.
    pub fn parse(cat: &Catalog, file: &str, text: &str) -> Result<Batch, InputError> {
        let ctx = Ctx { file, text };
        crate::basics::input_shape::check_yaml_shape(
            file,
            text,
            crate::basics::input_shape::MAX_FILE_BYTES,
        )?;
        let raw = read_raw(&ctx)?;
        let written_volume = read_volume(&ctx, &raw)?;
        // An empty container (volume 0) may leave its contents out; anything else must say
        // what it holds.
        let empty_container = written_volume == 0.0 && raw.capacity.is_some();
        let no_contents: &[serde_yaml::Value] = &[];
        let contents = raw.contents.as_deref().unwrap_or(no_contents);
        let volume = liquid_volume(
            &ctx,
            written_volume,
            raw.capacity.is_some() && contents.is_empty(),
        )?;
        let capacity_l = match &raw.capacity {
            Some(v) => Some(read_capacity(&ctx, v, volume)?),
            None => None,
        };
        let (temperature_k, temperature_given) = match &raw.temperature {
            Some(v) => (ctx.quantity("temperature", v, parse_temperature)?.0, true),
            None => (298.15, false),
        };
        check_temperature(&ctx, temperature_k)?;
        let closure = read_closure(&ctx, raw.closure.as_deref())?;
        let (density, density_given) = match &raw.density {
            Some(v) => (read_density(&ctx, v)?, true),
            None => (1.0, false),
        };
        let rated_pressure_kpa = raw
            .rated_pressure
            .as_ref()
            .map(|v| ctx.quantity("rated_pressure", v, parse_pressure_kpa))
            .transpose()?;
        let surface_area_m2 = raw
            .surface_area
            .as_ref()
            .map(|v| ctx.quantity("surface_area", v, parse_area_m2))
            .transpose()?;
        if raw.contents.is_none() && !empty_container {
            return Err(ctx.err(
                None,
                "`contents` is missing: offgas cannot tell what the batch holds",
                Some("list what it holds, e.g. `contents:` then `  - sodium chloride: 9 g/L`; for plain water write `contents: []`".into()),
            ));
        }
        let mut batch = Batch {
            file: file.to_string(),
            name: raw.name.clone().unwrap_or_else(|| file.to_string()),
            capacity_l,
            volume_l: volume,
            temperature_k,
            temperature_given,
            closure,
            density_g_per_ml: density,
            density_given,
            rated_pressure_kpa,
            surface_area_m2,
            components: Vec::new(),
        };
        let contents_line = ctx.key_line("contents").unwrap_or(1);
        let liquid_ml = batch.read_contents(cat, &ctx, contents, contents_line)?;
        batch.check_contents(cat, &ctx, contents_line, liquid_ml)?;
        Ok(batch)
    }

    /// Resolves each contents entry into a component; returns the mL of the liquids listed.
    fn read_contents(
        &mut self,
        cat: &Catalog,
        ctx: &Ctx<'_>,
        contents: &[serde_yaml::Value],
        contents_line: usize,
    ) -> Result<f64, InputError> {
        // Entries are found in the text in order, each after the one before.
        let mut search_from = contents_line;
        let mut liquid_ml = 0.0;
        for item in contents {
            let (component, ml) = self.read_component(cat, ctx, item, search_from)?;
            if let Some(l) = component.line {
                search_from = l + 1;
            }
            liquid_ml += ml;
            self.components.push(component);
        }
        Ok(liquid_ml)
    }

    /// One contents entry, with the mL of liquid it adds; `search_from` is the line its
    /// text is looked for from.
    fn read_component(
        &self,
        cat: &Catalog,
        ctx: &Ctx<'_>,
        item: &serde_yaml::Value,
        search_from: usize,
    ) -> Result<(Component, f64), InputError> {
        let (written, amount_text) = component_parts(item).ok_or_else(|| {
            ctx.err(
                line_of(ctx.text, "-", search_from),
                "a contents entry must read `- substance: amount`",
                Some("e.g. `- sodium hydroxide: 0.1 mol/L` or `- {substance: sodium hydroxide, amount: 0.1 mol/L}`".into()),
            )
        })?;
        let line = line_of(ctx.text, &written, search_from);
        crate::basics::input_shape::check_name_length(&written).map_err(|m| {
            ctx.err(
                line,
                m,
                Some("name the substance by its common name, formula or CAS number".into()),
            )
        })?;
        let sid = cat.find_substance(&written).ok_or_else(|| {
            let close = cat.closest_names(&written, 3);
            ctx.err(
                line,
                format!("unknown substance `{written}`"),
                Some(format!(
                    "did you mean: {}? (`offgas lookup NAME` searches names, synonyms, formulas and CAS numbers)",
                    close.join(", ")
                )),
            )
        })?;
        let amount = parse_amount(&amount_text)
            .map_err(|e| ctx.err(line, format!("`{written}`: {e}"), None))?;
        check_share_form(cat, sid, amount)
            .map_err(|(m, fix)| ctx.err(line, format!("`{written}`: {m}"), Some(fix)))?;
        let (moles, ml) = moles_of(cat, sid, amount, self.volume_l, self.density_g_per_ml)
            .map_err(|m| ctx.err(line, format!("`{written}`: {m}"), None))?;
        let component = Component {
            written,
            substance: sid,
            amount,
            moles,
            line,
        };
        Ok((component, ml))
    }

    /// Checks the contents as a whole: the shares, each component's amount, the total
    /// mass and the liquids' volume. Shares given without a density settle it first.
    fn check_contents(
        &mut self,
        cat: &Catalog,
        ctx: &Ctx<'_>,
        contents_line: usize,
        liquid_ml: f64,
    ) -> Result<(), InputError> {
        let volume = self.volume_l;
        let shares: f64 = self
            .components
            .iter()
            .filter_map(|c| match c.amount {
                Amount::PercentWeightPerWeight(w) => Some(w),
                _ => None,
            })
            .sum();
        if shares > 100.0 + 1e-9 {
            return Err(ctx.err(
                Some(contents_line),
                format!("the % w/w amounts add up to {shares} %, more than the whole batch"),
                Some("check the percentages".into()),
            ));
        }
        if shares > 0.0 && !self.density_given {
            self.settle_shares(cat, volume).map_err(|(c, m, fix)| {
                ctx.err(c.line, format!("`{}`: {m}", c.written), Some(fix))
            })?;
        }
        for c in &self.components {
            check_reachable(cat, c.substance, c.moles, volume)
                .map_err(|(m, fix)| ctx.err(c.line, format!("`{}`: {m}", c.written), Some(fix)))?;
        }
        check_total_mass(cat, &self.components, volume).map_err(|m| {
            ctx.err(
                Some(contents_line),
                m,
                Some("check the amounts and their units".into()),
            )
        })?;
        if liquid_ml > volume * 1e3 * 1.001 {
            return Err(ctx.err(
                Some(contents_line),
                format!(
                    "the liquids listed add up to {:.3} L, more than the batch volume of {volume} L",
                    liquid_ml / 1e3
                ),
                Some("raise `volume` or lower the amounts".into()),
            ));
        }
        Ok(())
    }

    /// A stream-like batch from parts already read elsewhere (an inventory row, a CSV line):
    /// each item is (substance as written, amount as written, line).
    pub fn from_parts(
        cat: &Catalog,
        file: &str,
        name: &str,
        volume_l: f64,
        items: &[(String, String, Option<usize>)],
    ) -> Result<Batch, InputError> {
        let err = |line: Option<usize>, message: String, fix: Option<String>| InputError {
            file: file.to_string(),
            line,
            message,
            fix,
        };
        if !(volume_l > 0.0 && volume_l.is_finite()) {
            return Err(err(
                items.first().and_then(|i| i.2),
                format!("`{name}`: the volume must be above zero"),
                None,
            ));
        }
        let mut components = Vec::with_capacity(items.len());
        for (written, amount_text, line) in items {
            crate::basics::input_shape::check_name_length(written)
                .map_err(|m| err(*line, format!("`{name}`: {m}"), None))?;
            let sid = cat.find_substance(written).ok_or_else(|| {
                err(
                    *line,
                    format!("`{name}`: unknown substance `{written}`"),
                    Some(format!(
                        "did you mean: {}?",
                        cat.closest_names(written, 3).join(", ")
                    )),
                )
            })?;
            let amount = parse_amount(amount_text)
                .map_err(|e| err(*line, format!("`{name}`, `{written}`: {e}"), None))?;
            let (moles, _) = moles_of(cat, sid, amount, volume_l, 1.0)
                .map_err(|m| err(*line, format!("`{name}`, `{written}`: {m}"), None))?;
            check_reachable(cat, sid, moles, volume_l)
                .map_err(|(m, fix)| err(*line, format!("`{name}`, `{written}`: {m}"), Some(fix)))?;
            components.push(Component {
                written: written.clone(),
                substance: sid,
                amount,
                moles,
                line: *line,
            });
        }
        check_total_mass(cat, &components, volume_l).map_err(|m| {
            err(
                items.first().and_then(|i| i.2),
                format!("`{name}`: {m}"),
                None,
            )
        })?;
        Ok(Batch {
            file: file.to_string(),
            name: name.to_string(),
            capacity_l: None,
            volume_l,
            temperature_k: 298.15,
            temperature_given: false,
            closure: Closure::Sealed,
            density_g_per_ml: 1.0,
            density_given: false,
            rated_pressure_kpa: None,
            surface_area_m2: None,
            components,
        })
    }

    /// What the batch weighs and how much water it holds.
    pub fn composition(&self, cat: &Catalog) -> crate::pour::composition::Composition {
        let parts: Vec<(SubstanceId, f64)> = self
            .components
            .iter()
            .map(|c| (c.substance, c.moles))
            .collect();
        crate::pour::composition::composition(
            cat,
            &parts,
            self.volume_l,
            self.density_given.then_some(self.density_g_per_ml),
        )
    }

    /// Moles of `% w/w` amounts at the batch's own density, from the density tables: the
    /// density depends on the moles and the moles on the density, so the two are settled
    /// together.
    fn settle_shares(
        &mut self,
        cat: &Catalog,
        volume_l: f64,
    ) -> Result<(), (Component, String, String)> {
        for c in &self.components {
            if let Amount::PercentWeightPerWeight(w) = c.amount {
                if w > UNTABLED_SHARE_PERCENT && cat.density_table(c.substance).is_none() {
                    return Err((
                        c.clone(),
                        format!(
                            "offgas has no density table for solutions of `{}`, and at {w} % w/w the density matters",
                            cat.substance(c.substance).name
                        ),
                        "give the batch's density (e.g. `density: 1.12 g/mL`), or the amount in g/L or mol/L".into(),
                    ));
                }
            }
        }
        let mut rho = 1.0;
        for _ in 0..100 {
            for c in &mut self.components {
                if let Amount::PercentWeightPerWeight(_) = c.amount {
                    c.moles = moles_of(cat, c.substance, c.amount, volume_l, rho)
                        .map(|m| m.0)
                        .unwrap_or(c.moles);
                }
            }
            let next = self.composition(cat).density_g_per_ml;
            let done = (next - rho).abs() < 1e-9;
            rho = next;
            if done {
                break;
            }
        }
        self.density_g_per_ml = rho;
        Ok(())
    }

    /// The batch as amounts for the solver, in a vessel of `capacity_l`.
    pub fn to_mixture(&self, cat: &Catalog, capacity_l: f64) -> Mixture {
        let mut m = Mixture::empty(self.temperature_k, self.closure);
        for c in &self.components {
            let s = cat.substance(c.substance);
            for &(f, n) in &s.families {
                m.add_family(f, n * c.moles);
            }
            for &(i, n) in &s.ions {
                m.add_ion(i, n * c.moles);
            }
        }
        m.liquid_l = self.volume_l;
        m.water_kg = Some(self.composition(cat).water_g / 1e3);
        m.headspace_l = (capacity_l - self.volume_l).max(0.0);
        m
    }
}

/// The file as YAML of the batch's keys; a mistake gets the fix its kind needs.
fn read_raw(ctx: &Ctx<'_>) -> Result<RawBatch, InputError> {
    serde_yaml::from_str(ctx.text).map_err(|e| {
        let line = e.location().map(|l| l.line());
        let msg = e.to_string();
        let fix = if msg.contains("unknown field") {
            Some("the keys a batch file knows are: name, capacity, volume, temperature, closure, density, rated_pressure, surface_area, contents, note".into())
        } else {
            Some("check the indentation and the `key: value` form; see data/demo/ for examples".into())
        };
        ctx.err(line, format!("not a readable batch file: {msg}"), fix)
    })
}

/// The volume as written, L (it must be written).
fn read_volume(ctx: &Ctx<'_>, raw: &RawBatch) -> Result<f64, InputError> {
    let v = raw.volume.as_ref().ok_or_else(|| {
        ctx.err(
            None,
            "`volume` is missing",
            Some("add the liquid volume, e.g. `volume: 12 L`".into()),
        )
    })?;
    Ok(ctx.quantity("volume", v, parse_volume)?.0)
}

/// The liquid's volume, L, which must be above zero. An empty container (it has a
/// capacity and no contents) holds a film of water, so that the first pour into it has
/// something to meet.
fn liquid_volume(
    ctx: &Ctx<'_>,
    written: f64,
    container_without_contents: bool,
) -> Result<f64, InputError> {
    let volume = if written == 0.0 && container_without_contents {
        EMPTY_FILM_L
    } else {
        written
    };
    if volume <= 0.0 {
        return Err(ctx.err(
            ctx.key_line("volume"),
            "`volume` must be above zero",
            Some("give the liquid volume in the batch, e.g. `volume: 12 L`".into()),
        ));
    }
    Ok(volume)
}

/// The container's capacity, L: above zero and at least the liquid's volume.
fn read_capacity(ctx: &Ctx<'_>, v: &serde_yaml::Value, volume: f64) -> Result<f64, InputError> {
    let c = ctx.quantity("capacity", v, parse_volume)?.0;
    if c <= 0.0 {
        return Err(ctx.err(
            ctx.key_line("capacity"),
            "`capacity` must be above zero",
            None,
        ));
    }
    if volume > c * (1.0 + 1e-9) {
        return Err(ctx.err(
            ctx.key_line("volume"),
            format!("`volume` ({volume} L) is more than the `capacity` ({c} L)"),
            Some("the liquid cannot exceed the vessel; check both numbers".into()),
        ));
    }
    Ok(c)
}

/// The closure; a container is sealed unless it says otherwise.
fn read_closure(ctx: &Ctx<'_>, written: Option<&str>) -> Result<Closure, InputError> {
    let Some(s) = written else {
        return Ok(Closure::Sealed);
    };
    match s.trim().to_lowercase().as_str() {
        "sealed" => Ok(Closure::Sealed),
        "vented" => Ok(Closure::Vented),
        "open" => Ok(Closure::Open),
        other => Err(ctx.err(
            ctx.key_line("closure"),
            format!("`closure: {other}` is not one offgas knows"),
            Some("use sealed, vented or open".into()),
        )),
    }
}

/// The density written, g/mL.
fn read_density(ctx: &Ctx<'_>, v: &serde_yaml::Value) -> Result<f64, InputError> {
    let t = scalar_text(v).unwrap_or_default();
    parse_density(&t).ok_or_else(|| {
        ctx.err(
            ctx.key_line("density"),
            format!("`density: {t}` is not a density"),
            Some("write it like `density: 1.05 g/mL`".into()),
        )
    })
}

fn check_temperature(ctx: &Ctx<'_>, t_k: f64) -> Result<(), InputError> {
    if !(273.15..=373.15).contains(&t_k) {
        return Err(ctx.err(
            ctx.key_line("temperature"),
            format!(
                "temperature {:.1} °C is outside 0–100 °C, the range of the aqueous model",
                t_k - 273.15
            ),
            Some("offgas models liquid water only; check the unit (°C or K)".into()),
        ));
    }
    Ok(())
}

fn parse_density(t: &str) -> Option<f64> {
    let t = t.trim();
    let num_end = t
        .find(|c: char| !(c.is_ascii_digit() || c == '.'))
        .unwrap_or(t.len());
    let v: f64 = t[..num_end].parse().ok()?;
    let unit: String = t[num_end..]
        .chars()
        .filter(|c| !c.is_whitespace())
        .collect();
    let d = match unit.to_lowercase().as_str() {
        "g/ml" | "g/cm3" | "kg/l" | "" => v,
        "kg/m3" | "g/l" => v / 1e3,
        _ => return None,
    };
    (d > 0.3 && d < 3.0).then_some(d)
}

fn component_parts(item: &serde_yaml::Value) -> Option<(String, String)> {
    let map = item.as_mapping()?;
    if map.len() == 1 {
        let (k, v) = map.iter().next()?;
        let k = k.as_str()?.trim().to_string();
        if k != "substance" {
            return Some((k, scalar_text(v)?));
        }
    }
    let s = map.get("substance")?.as_str()?.trim().to_string();
    let a = scalar_text(map.get("amount")?)?;
    if map.len() != 2 {
        return None;
    }
    Some((s, a))
}

/// Moles of the substance (or its solute) and the millilitres of liquid it brings.
fn moles_of(
    cat: &Catalog,
    sid: SubstanceId,
    amount: Amount,
    volume_l: f64,
    batch_density: f64,
) -> Result<(f64, f64), String> {
    let s = cat.substance(sid);
    let molar_mass = s.molar_mass.unwrap_or(f64::NAN);
    let needs_density = || {
        format!(
            "a volume of `{}` needs its density, which the data do not have; give the amount as a mass or in mol",
            s.name
        )
    };
    // Grams of the entry as written (for a solution, grams of the solution).
    let grams_to_mol = |g: f64| match &s.solution {
        Some(sol) => g * sol.mass_percent / 100.0 / molar_mass,
        None => g / molar_mass,
    };
    let ml_to_mol = |ml: f64| -> Result<f64, String> {
        match (&s.solution, s.density_g_per_ml) {
            (Some(sol), _) => Ok(ml * sol.solute_mol_per_ml),
            (None, Some(d)) if matches!(s.state, PhysicalState::Liquid) => Ok(ml * d / molar_mass),
            _ => Err(needs_density()),
        }
    };
    let is_liquid = matches!(s.state, PhysicalState::Liquid | PhysicalState::Solution);
    let out = match amount {
        Amount::MolPerLitre(c) => (c * volume_l, 0.0),
        Amount::GramPerLitre(g) => (grams_to_mol(g * volume_l), 0.0),
        Amount::PercentWeightPerWeight(w) => (
            grams_to_mol(w / 100.0 * batch_density * 1e3 * volume_l),
            0.0,
        ),
        Amount::PercentWeightPerVolume(w) => (grams_to_mol(w * 10.0 * volume_l), 0.0),
        Amount::MillilitrePerLitre(ml) => {
            let total_ml = ml * volume_l;
            (ml_to_mol(total_ml)?, total_ml)
        }
        Amount::Moles(n) => (n, 0.0),
        Amount::Grams(g) => (grams_to_mol(g), 0.0),
        Amount::Millilitres(ml) => (ml_to_mol(ml)?, if is_liquid { ml } else { 0.0 }),
    };
    if !out.0.is_finite() {
        return Err(format!("`{}` has no molar mass in the data", s.name));
    }
    Ok(out)
}

/// Above this % w/w a solute with no density table needs the batch's stated density.
const UNTABLED_SHARE_PERCENT: f64 = 5.0;

/// A percentage of a commercial solution would count its concentration twice
/// ("sulfuric acid, concentrated: 96 % w/w").
fn check_share_form(
    cat: &Catalog,
    sid: SubstanceId,
    amount: Amount,
) -> Result<(), (String, String)> {
    let s = cat.substance(sid);
    let Some(sol) = &s.solution else {
        return Ok(());
    };
    if !matches!(
        amount,
        Amount::PercentWeightPerWeight(_) | Amount::PercentWeightPerVolume(_)
    ) {
        return Ok(());
    }
    let solute = &cat.substance(sol.solute).name;
    Err((
        format!(
            "`{}` is already a {} % solution of {solute}: a percentage of it would count that concentration twice",
            s.name, sol.mass_percent
        ),
        format!(
            "for the acid or base at a strength, write the solute (`{solute}: {} % w/w`); for some of the commercial solution in a batch, give its volume (`{}: 50 mL/L`)",
            sol.mass_percent, s.name
        ),
    ))
}

/// Refuses amounts that cannot dissolve or exceed the neat substance.
fn check_reachable(
    cat: &Catalog,
    sid: SubstanceId,
    moles: f64,
    volume_l: f64,
) -> Result<(), (String, String)> {
    let s = cat.substance(sid);
    let Some(mm) = s.molar_mass else {
        return Ok(());
    };
    let g_per_l = moles * mm / volume_l;
    // A liquid past its solubility forms a layer of its own; a soluble solid past it stays
    // solid. A slightly soluble one (a carbonate, a sulfide, a hydroxide) dissolves as acid
    // or base meets it, so it is counted as dissolved and the report says so.
    if let (Some(sol), PhysicalState::Solid) = (s.solubility_g_per_l, s.state) {
        if g_per_l > sol * 1.0001 && sol >= cat.physical.slightly_soluble_below_g_per_l {
            return Err((
                format!(
                    "{} g/L is above its solubility of about {sol} g/L; offgas models dissolved substances only",
                    fmt_big(g_per_l)
                ),
                "lower the amount, or raise the batch volume so that it can dissolve".into(),
            ));
        }
    }
    let neat = match (&s.solution, s.state, s.density_g_per_ml) {
        (Some(sol), _, _) => Some(sol.solute_mol_per_ml * 1e3 * mm),
        (None, PhysicalState::Liquid, Some(d)) => Some(d * 1e3),
        _ => None,
    };
    if let Some(max) = neat {
        if g_per_l > max * 1.0001 {
            return Err((
                format!(
                    "{} g/L is more than the neat substance holds ({max:.0} g/L)",
                    fmt_big(g_per_l)
                ),
                "check the amount and its unit".into(),
            ));
        }
    }
    let densest = cat.physical.max_dissolved_g_per_l;
    if g_per_l.is_nan() || g_per_l > densest {
        return Err((
            format!(
                "{} g/L cannot be in a liquid: no aqueous solution holds more than about {densest:.0} g of dissolved matter per litre",
                fmt_big(g_per_l)
            ),
            "check the amount and its unit".into(),
        ));
    }
    Ok(())
}

/// A slightly soluble solid given above its solubility in water, in words, if it is.
pub fn beyond_solubility(cat: &Catalog, c: &Component, volume_l: f64) -> Option<String> {
    let s = cat.substance(c.substance);
    let sol = s.solubility_g_per_l?;
    let g_per_l = c.moles * s.molar_mass? / volume_l;
    (s.state == PhysicalState::Solid && g_per_l > sol * 1.0001).then(|| {
        format!(
            "`{}`: {} g/L is above its solubility in water (about {sol} g/L); it is counted as dissolved, as acid or base would dissolve it, so the figures err towards more gas where nothing dissolves it.",
            c.written,
            crate::basics::text::fixed(g_per_l, 1)
        )
    })
}

/// The total dissolved mass of a batch: no liquid holds more than the densest solution.
fn check_total_mass(cat: &Catalog, components: &[Component], volume_l: f64) -> Result<(), String> {
    let total: f64 = components
        .iter()
        .map(|c| c.moles * cat.substance(c.substance).molar_mass.unwrap_or(0.0))
        .sum::<f64>()
        / volume_l;
    let densest = cat.physical.max_dissolved_g_per_l;
    if total > densest {
        return Err(format!(
            "the components add up to {} g per litre of batch; no aqueous solution holds more than about {densest:.0} g/L",
            fmt_big(total)
        ));
    }
    Ok(())
}

/// A large number short enough to read in a message.
fn fmt_big(v: f64) -> String {
    if v.abs() >= 1e6 {
        format!("{v:.2e}")
    } else {
        format!("{v:.0}")
    }
}

/// The vessel with a stream poured in: components summed by substance, volumes added,
/// the temperature the volume-weighted mean (the carboy returns to room temperature).
pub fn pour_into(vessel: &Batch, stream: &Batch) -> Batch {
    let mut out = vessel.clone();
    for c in &stream.components {
        match out
            .components
            .iter_mut()
            .find(|x| x.substance == c.substance)
        {
            Some(x) => x.moles += c.moles,
            None => out.components.push(Component {
                line: None,
                ..c.clone()
            }),
        }
    }
    let v = vessel.volume_l + stream.volume_l;
    out.temperature_k =
        (vessel.temperature_k * vessel.volume_l + stream.temperature_k * stream.volume_l) / v;
    out.volume_l = v;
    out
}
