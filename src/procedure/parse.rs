//! Reading a procedure file. The first problem stops the reading, and names the file, the
//! line (the vessel's, or the step's) and, where there is one, the fix.

use super::{Leave, Procedure, Step, StepKind};
use crate::basics::input_shape::{check_yaml_shape, MAX_FILE_BYTES};
use crate::basics::quantity::{parse_temperature, parse_volume};
use crate::catalog::Catalog;
use crate::pour::batch::{Batch, InputError};
use serde_yaml::{Mapping, Value};

const STEP_KINDS: &str = "add, drain, rinse, hold";
const TOP_KEYS: [&str; 4] = ["name", "vessel", "steps", "note"];
const RINSE_KEYS: [&str; 5] = ["volume", "with", "times", "leave", "temperature"];
const NO_DRAIN_AMOUNT: &str =
    "a drain says what it leaves (`leave: 2 L` or `leave: 5 %`) or removes (`remove: 40 L`)";

impl Procedure {
    pub fn parse(cat: &Catalog, file: &str, text: &str) -> Result<Procedure, InputError> {
        check_yaml_shape(file, text, MAX_FILE_BYTES)?;
        let doc = read_document(file, text)?;
        let map = doc.as_mapping().ok_or_else(|| {
            file_error(
                file,
                None,
                "a procedure file is a mapping with name, vessel and steps".into(),
                None,
            )
        })?;
        check_top_keys(file, map)?;
        let name = map
            .get("name")
            .and_then(|v| v.as_str())
            .unwrap_or(file)
            .to_string();
        let vessel = read_vessel(cat, file, text, map)?;
        let steps = read_steps(cat, file, text, map)?;
        Ok(Procedure {
            file: file.to_string(),
            name,
            vessel,
            steps,
        })
    }
}

fn file_error(file: &str, line: Option<usize>, message: String, fix: Option<String>) -> InputError {
    InputError {
        file: file.to_string(),
        line,
        message,
        fix,
    }
}

fn read_document(file: &str, text: &str) -> Result<Value, InputError> {
    serde_yaml::from_str(text).map_err(|e| {
        file_error(
            file,
            e.location().map(|l| l.line()),
            format!("not a readable procedure file: {e}"),
            Some(
                "check the indentation and the `key: value` form; see data/demo/ for an example"
                    .into(),
            ),
        )
    })
}

fn check_top_keys(file: &str, map: &Mapping) -> Result<(), InputError> {
    // A key that is not text reads as "", which is not known either.
    let unknown = map
        .keys()
        .map(|k| k.as_str().unwrap_or(""))
        .find(|k| !TOP_KEYS.contains(k));
    match unknown {
        Some(k) => Err(file_error(
            file,
            None,
            format!("unknown key `{k}`"),
            Some("a procedure file knows: name, vessel, steps, note".into()),
        )),
        None => Ok(()),
    }
}

/// The vessel as a batch; it must have a capacity, since drains and rinses are sized by it.
fn read_vessel(cat: &Catalog, file: &str, text: &str, map: &Mapping) -> Result<Batch, InputError> {
    let value = map.get("vessel").ok_or_else(|| {
        file_error(
            file,
            None,
            "`vessel` is missing".into(),
            Some("describe the vessel: name, capacity, closure, volume, contents".into()),
        )
    })?;
    let line = text
        .lines()
        .position(|l| l.starts_with("vessel:"))
        .map(|i| i + 1);
    let vessel =
        Batch::parse(cat, &format!("{file} (vessel)"), &yaml_text(value)).map_err(|e| {
            InputError {
                file: file.to_string(),
                line,
                message: format!("vessel: {}", e.message),
                fix: e.fix,
            }
        })?;
    if vessel.capacity_l.is_none() {
        return Err(file_error(
            file,
            line,
            "the vessel has no `capacity`".into(),
            Some("add its full volume, e.g. `capacity: 200 L`".into()),
        ));
    }
    Ok(vessel)
}

fn read_steps(
    cat: &Catalog,
    file: &str,
    text: &str,
    map: &Mapping,
) -> Result<Vec<Step>, InputError> {
    let items = map
        .get("steps")
        .and_then(|v| v.as_sequence())
        .ok_or_else(|| {
            file_error(
                file,
                None,
                "`steps` is missing or not a list".into(),
                Some("list the steps under `steps:`, each starting with `- description:`".into()),
            )
        })?;
    let lines = step_lines(text);
    let steps = items
        .iter()
        .enumerate()
        .map(|(i, item)| {
            let site = StepSite {
                cat,
                file,
                number: i + 1,
                line: lines.get(i).copied(),
            };
            read_step(&site, item)
        })
        .collect::<Result<Vec<_>, _>>()?;
    if steps.is_empty() {
        return Err(file_error(
            file,
            None,
            "the procedure has no steps".into(),
            None,
        ));
    }
    Ok(steps)
}

/// Lines (1-based) where each item of the top-level `steps:` list starts.
fn step_lines(text: &str) -> Vec<usize> {
    let mut out = Vec::new();
    let mut in_steps = false;
    let mut indent = None;
    for (i, line) in text.lines().enumerate() {
        let trimmed = line.trim_start();
        if !in_steps {
            if line.starts_with("steps:") {
                in_steps = true;
            }
            continue;
        }
        if !line.starts_with(' ')
            && !line.starts_with('-')
            && !trimmed.is_empty()
            && !trimmed.starts_with('#')
        {
            break;
        }
        if trimmed.starts_with("- ") || trimmed == "-" {
            let here = line.len() - trimmed.len();
            match indent {
                None => {
                    indent = Some(here);
                    out.push(i + 1);
                }
                Some(ind) if ind == here => out.push(i + 1),
                _ => {}
            }
        }
    }
    out
}

/// One step's place in the file, which every message about the step names.
struct StepSite<'a> {
    cat: &'a Catalog,
    file: &'a str,
    number: usize,
    line: Option<usize>,
}

impl StepSite<'_> {
    fn error(&self, message: String, fix: Option<String>) -> InputError {
        file_error(
            self.file,
            self.line,
            format!("step {}: {message}", self.number),
            fix,
        )
    }

    /// A batch the step adds; `what` says which part of the step it is.
    fn batch(&self, what: &str, v: &Value) -> Result<Batch, InputError> {
        let name = format!("{} (step {})", self.file, self.number);
        Batch::parse(self.cat, &name, &yaml_text(v)).map_err(|e| InputError {
            file: self.file.to_string(),
            line: self.line,
            message: format!("step {} ({what}): {}", self.number, e.message),
            fix: e.fix,
        })
    }
}

fn read_step(site: &StepSite, item: &Value) -> Result<Step, InputError> {
    let m = item
        .as_mapping()
        .ok_or_else(|| site.error("a step is a mapping".into(), None))?;
    let description = m
        .get("description")
        .and_then(|v| v.as_str())
        .unwrap_or("")
        .to_string();
    let kind_name = step_kind_name(site, m)?;
    let body = &m[kind_name];
    let kind = match kind_name {
        "add" => StepKind::Add(site.batch("add", body)?),
        "drain" => StepKind::Drain(parse_leave(body).map_err(|m| site.error(m, None))?),
        "rinse" => read_rinse(site, body)?,
        "hold" => read_hold(site, body)?,
        other => {
            return Err(site.error(
                format!("unknown step kind `{other}`"),
                Some(format!("a step is one of: {STEP_KINDS}")),
            ))
        }
    };
    Ok(Step {
        number: site.number,
        description,
        kind,
        line: site.line,
    })
}

/// The one key of a step besides its description, which says what kind of step it is.
fn step_kind_name<'m>(site: &StepSite, m: &'m Mapping) -> Result<&'m str, InputError> {
    let kinds: Vec<&str> = m
        .keys()
        .filter_map(|k| k.as_str())
        .filter(|k| *k != "description")
        .collect();
    if kinds.len() != 1 {
        return Err(site.error(
            format!(
                "a step has exactly one kind besides its description, found: {}",
                kinds.join(", ")
            ),
            Some(format!("use one of: {STEP_KINDS}")),
        ));
    }
    Ok(kinds[0])
}

fn read_rinse(site: &StepSite, body: &Value) -> Result<StepKind, InputError> {
    let rinse = body.as_mapping().ok_or_else(|| {
        site.error(
            "`rinse` needs `volume` (and may give `with`, `times`, `leave`)".into(),
            None,
        )
    })?;
    let unknown = rinse
        .keys()
        .filter_map(|k| k.as_str())
        .find(|k| !RINSE_KEYS.contains(k));
    if let Some(k) = unknown {
        return Err(site.error(
            format!("unknown key `{k}` in rinse"),
            Some("a rinse knows: volume, with, times, leave, temperature".into()),
        ));
    }
    let volume = rinse
        .get("volume")
        .and_then(scalar_text)
        .ok_or_else(|| site.error("`rinse` needs a `volume`, e.g. `volume: 40 L`".into(), None))?;
    let with = site.batch("rinse", &rinse_batch(site.number, rinse, volume))?;
    let times = rinse_times(site, rinse)?;
    let leave = match rinse.get("leave") {
        Some(l) => parse_leave(&Value::Mapping(
            [("leave".into(), l.clone())].into_iter().collect(),
        ))
        .map_err(|m| site.error(m, None))?,
        None => Leave::Fraction(0.0),
    };
    Ok(StepKind::Rinse { with, times, leave })
}

/// The rinse liquid written as a batch, so that it is read (and checked) like any other.
fn rinse_batch(number: usize, rinse: &Mapping, volume: String) -> Value {
    let mut with = Mapping::new();
    with.insert("name".into(), format!("rinse of step {number}").into());
    with.insert("volume".into(), volume.into());
    if let Some(t) = rinse.get("temperature") {
        with.insert("temperature".into(), t.clone());
    }
    let contents = match rinse.get("with") {
        Some(c) => c.clone(),
        // Plain water: no components.
        None => Value::Sequence(Vec::new()),
    };
    with.insert("contents".into(), contents);
    Value::Mapping(with)
}

fn rinse_times(site: &StepSite, rinse: &Mapping) -> Result<u32, InputError> {
    match rinse.get("times") {
        None => Ok(1),
        Some(t) => t
            .as_u64()
            .filter(|t| (1..=50).contains(t))
            .map(|t| t as u32)
            .ok_or_else(|| site.error("`times` must be a whole number from 1 to 50".into(), None)),
    }
}

fn read_hold(site: &StepSite, body: &Value) -> Result<StepKind, InputError> {
    let hold = body
        .as_mapping()
        .ok_or_else(|| site.error("`hold` needs `time` and/or `temperature`".into(), None))?;
    let mut minutes = None;
    let mut temperature_k = None;
    for (k, v) in hold {
        let k = k.as_str().unwrap_or("");
        // Not text: written in the message as YAML's debug form, so the author sees it.
        let t = v
            .as_str()
            .map(String::from)
            .unwrap_or_else(|| format!("{v:?}"));
        match k {
            "time" => minutes = Some(parse_minutes(&t).map_err(|m| site.error(m, None))?),
            "temperature" => temperature_k = Some(hold_temperature(site, &t)?),
            _ => {
                return Err(site.error(
                    format!("unknown key `{k}` in hold"),
                    Some("a hold knows: time, temperature".into()),
                ))
            }
        }
    }
    Ok(StepKind::Hold {
        minutes,
        temperature_k,
    })
}

/// A hold's temperature in kelvin, within the range the engine models.
fn hold_temperature(site: &StepSite, t: &str) -> Result<f64, InputError> {
    let tk = parse_temperature(t)
        .map_err(|e| site.error(format!("temperature: {e}"), None))?
        .0;
    if !(273.15..=373.15).contains(&tk) {
        return Err(site.error(format!("hold temperature {t} is outside 0–100 °C"), None));
    }
    Ok(tk)
}

fn yaml_text(v: &Value) -> String {
    serde_yaml::to_string(v).unwrap_or_default()
}

/// A scalar as text, numbers included (`40` as well as `40 L`).
fn scalar_text(v: &Value) -> Option<String> {
    v.as_str()
        .map(String::from)
        .or_else(|| v.as_f64().map(|x| x.to_string()))
}

fn parse_leave(v: &Value) -> Result<Leave, String> {
    let m = v.as_mapping().ok_or(NO_DRAIN_AMOUNT)?;
    if let Some(l) = m.get("leave") {
        let t = scalar_text(l).ok_or("`leave` must be a volume or a percentage")?;
        return parse_leave_amount(&t);
    }
    if let Some(r) = m.get("remove") {
        let t = scalar_text(r).ok_or("`remove` must be a volume")?;
        return Ok(Leave::Remove(
            parse_volume(&t).map_err(|e| format!("remove: {e}"))?.0,
        ));
    }
    Err(NO_DRAIN_AMOUNT.into())
}

/// `leave: 5 %` (a share of what is there) or `leave: 2 L`.
fn parse_leave_amount(t: &str) -> Result<Leave, String> {
    if let Some(p) = t.trim().strip_suffix('%') {
        let p: f64 = p
            .trim()
            .parse()
            .map_err(|_| format!("`leave: {t}` is not a percentage"))?;
        if !(0.0..=100.0).contains(&p) {
            return Err(format!("`leave: {t}` must be between 0 and 100 %"));
        }
        return Ok(Leave::Fraction(p / 100.0));
    }
    Ok(Leave::Litres(
        parse_volume(t).map_err(|e| format!("leave: {e}"))?.0,
    ))
}

fn parse_minutes(t: &str) -> Result<f64, String> {
    let t = t.trim();
    let end = t
        .find(|c: char| !(c.is_ascii_digit() || c == '.'))
        .unwrap_or(t.len());
    let v: f64 = t[..end]
        .parse()
        .map_err(|_| format!("`time: {t}` has no number; write it like `30 min`"))?;
    let unit = t[end..].trim();
    let m = match unit {
        "s" | "sec" => v / 60.0,
        "min" | "minutes" | "minute" => v,
        "h" | "hour" | "hours" => v * 60.0,
        _ => return Err(format!("`time: {t}`: use s, min or h")),
    };
    Ok(m)
}
