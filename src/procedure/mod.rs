//! `procedure`: a cleaning or decontamination procedure checked step by step.
//!
//! A procedure file names a vessel (what it holds at the start, including a heel) and
//! ordered steps: add a batch, drain to a hold-up, rinse (add, then drain), hold at a
//! temperature. The vessel's contents are carried through every step, and every addition
//! gets the full check against what is in the vessel at that moment.

pub mod fix;
pub mod run;

use crate::basics::quantity::{parse_temperature, parse_volume};
use crate::catalog::Catalog;
use crate::pour::batch::{Batch, InputError};

/// How much a drain leaves behind.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Leave {
    Litres(f64),
    /// A share of what is there, 0–1.
    Fraction(f64),
    /// Take this many litres out.
    Remove(f64),
}

#[derive(Debug, Clone, PartialEq)]
pub enum StepKind {
    Add(Batch),
    Drain(Leave),
    Rinse {
        with: Batch,
        times: u32,
        leave: Leave,
    },
    Hold {
        minutes: Option<f64>,
        temperature_k: Option<f64>,
    },
}

#[derive(Debug, Clone, PartialEq)]
pub struct Step {
    pub number: usize,
    pub description: String,
    pub kind: StepKind,
    pub line: Option<usize>,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Procedure {
    pub file: String,
    pub name: String,
    pub vessel: Batch,
    pub steps: Vec<Step>,
}

const STEP_KINDS: &str = "add, drain, rinse, hold";

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
        if let Some(rest) = trimmed
            .strip_prefix("- ")
            .or(trimmed.strip_prefix('-').filter(|r| r.is_empty()))
        {
            let _ = rest;
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

fn yaml_text(v: &serde_yaml::Value) -> String {
    serde_yaml::to_string(v).unwrap_or_default()
}

impl Procedure {
    pub fn parse(cat: &Catalog, file: &str, text: &str) -> Result<Procedure, InputError> {
        let err = |line: Option<usize>, message: String, fix: Option<String>| InputError {
            file: file.to_string(),
            line,
            message,
            fix,
        };
        crate::basics::input_shape::check_yaml_shape(
            file,
            text,
            crate::basics::input_shape::MAX_FILE_BYTES,
        )?;
        let doc: serde_yaml::Value = serde_yaml::from_str(text).map_err(|e| {
            err(
                e.location().map(|l| l.line()),
                format!("not a readable procedure file: {e}"),
                Some("check the indentation and the `key: value` form; see data/demo/ for an example".into()),
            )
        })?;
        let map = doc.as_mapping().ok_or_else(|| {
            err(
                None,
                "a procedure file is a mapping with name, vessel and steps".into(),
                None,
            )
        })?;
        for key in map.keys() {
            let k = key.as_str().unwrap_or("");
            if !["name", "vessel", "steps", "note"].contains(&k) {
                return Err(err(
                    None,
                    format!("unknown key `{k}`"),
                    Some("a procedure file knows: name, vessel, steps, note".into()),
                ));
            }
        }
        let name = map
            .get("name")
            .and_then(|v| v.as_str())
            .unwrap_or(file)
            .to_string();
        let vessel_v = map.get("vessel").ok_or_else(|| {
            err(
                None,
                "`vessel` is missing".into(),
                Some("describe the vessel: name, capacity, closure, volume, contents".into()),
            )
        })?;
        let vessel_line = text
            .lines()
            .position(|l| l.starts_with("vessel:"))
            .map(|i| i + 1);
        let vessel =
            Batch::parse(cat, &format!("{file} (vessel)"), &yaml_text(vessel_v)).map_err(|e| {
                InputError {
                    file: file.to_string(),
                    line: vessel_line,
                    message: format!("vessel: {}", e.message),
                    fix: e.fix,
                }
            })?;
        if vessel.capacity_l.is_none() {
            return Err(err(
                vessel_line,
                "the vessel has no `capacity`".into(),
                Some("add its full volume, e.g. `capacity: 200 L`".into()),
            ));
        }
        let steps_v = map
            .get("steps")
            .and_then(|v| v.as_sequence())
            .ok_or_else(|| {
                err(
                    None,
                    "`steps` is missing or not a list".into(),
                    Some(
                        "list the steps under `steps:`, each starting with `- description:`".into(),
                    ),
                )
            })?;
        let lines = step_lines(text);
        let mut steps = Vec::new();
        for (i, sv) in steps_v.iter().enumerate() {
            let number = i + 1;
            let line = lines.get(i).copied();
            let serr = |message: String, fix: Option<String>| {
                err(line, format!("step {number}: {message}"), fix)
            };
            let m = sv
                .as_mapping()
                .ok_or_else(|| serr("a step is a mapping".into(), None))?;
            let description = m
                .get("description")
                .and_then(|v| v.as_str())
                .unwrap_or("")
                .to_string();
            let kinds: Vec<&str> = m
                .keys()
                .filter_map(|k| k.as_str())
                .filter(|k| *k != "description")
                .collect();
            if kinds.len() != 1 {
                return Err(serr(
                    format!(
                        "a step has exactly one kind besides its description, found: {}",
                        kinds.join(", ")
                    ),
                    Some(format!("use one of: {STEP_KINDS}")),
                ));
            }
            let kind_name = kinds[0];
            let body = &m[kind_name];
            let batch = |what: &str, v: &serde_yaml::Value| {
                Batch::parse(cat, &format!("{file} (step {number})"), &yaml_text(v)).map_err(|e| {
                    InputError {
                        file: file.to_string(),
                        line,
                        message: format!("step {number} ({what}): {}", e.message),
                        fix: e.fix,
                    }
                })
            };
            let kind = match kind_name {
                "add" => StepKind::Add(batch("add", body)?),
                "drain" => StepKind::Drain(parse_leave(body).map_err(|m| serr(m, None))?),
                "rinse" => {
                    let rm = body.as_mapping().ok_or_else(|| {
                        serr(
                            "`rinse` needs `volume` (and may give `with`, `times`, `leave`)".into(),
                            None,
                        )
                    })?;
                    for k in rm.keys().filter_map(|k| k.as_str()) {
                        if !["volume", "with", "times", "leave", "temperature"].contains(&k) {
                            return Err(serr(
                                format!("unknown key `{k}` in rinse"),
                                Some(
                                    "a rinse knows: volume, with, times, leave, temperature".into(),
                                ),
                            ));
                        }
                    }
                    let volume = rm
                        .get("volume")
                        .and_then(|v| {
                            v.as_str()
                                .map(String::from)
                                .or_else(|| v.as_f64().map(|x| x.to_string()))
                        })
                        .ok_or_else(|| {
                            serr("`rinse` needs a `volume`, e.g. `volume: 40 L`".into(), None)
                        })?;
                    let mut with = serde_yaml::Mapping::new();
                    with.insert("name".into(), format!("rinse of step {number}").into());
                    with.insert("volume".into(), volume.into());
                    if let Some(t) = rm.get("temperature") {
                        with.insert("temperature".into(), t.clone());
                    }
                    let contents = match rm.get("with") {
                        Some(c) => c.clone(),
                        // Plain water: no components.
                        None => serde_yaml::Value::Sequence(Vec::new()),
                    };
                    with.insert("contents".into(), contents);
                    let with = batch("rinse", &serde_yaml::Value::Mapping(with))?;
                    let times = match rm.get("times") {
                        None => 1,
                        Some(t) => t.as_u64().filter(|t| (1..=50).contains(t)).ok_or_else(|| {
                            serr("`times` must be a whole number from 1 to 50".into(), None)
                        })? as u32,
                    };
                    let leave = match rm.get("leave") {
                        Some(l) => parse_leave(&serde_yaml::Value::Mapping(
                            [("leave".into(), l.clone())].into_iter().collect(),
                        ))
                        .map_err(|m| serr(m, None))?,
                        None => Leave::Fraction(0.0),
                    };
                    StepKind::Rinse { with, times, leave }
                }
                "hold" => {
                    let hm = body.as_mapping().ok_or_else(|| {
                        serr("`hold` needs `time` and/or `temperature`".into(), None)
                    })?;
                    let mut minutes = None;
                    let mut temperature_k = None;
                    for (k, v) in hm {
                        let k = k.as_str().unwrap_or("");
                        let t = v
                            .as_str()
                            .map(String::from)
                            .unwrap_or_else(|| format!("{v:?}"));
                        match k {
                            "time" => minutes = Some(parse_minutes(&t).map_err(|m| serr(m, None))?),
                            "temperature" => {
                                let tk = parse_temperature(&t)
                                    .map_err(|e| serr(format!("temperature: {e}"), None))?
                                    .0;
                                if !(273.15..=373.15).contains(&tk) {
                                    return Err(serr(
                                        format!("hold temperature {t} is outside 0–100 °C"),
                                        None,
                                    ));
                                }
                                temperature_k = Some(tk);
                            }
                            _ => {
                                return Err(serr(
                                    format!("unknown key `{k}` in hold"),
                                    Some("a hold knows: time, temperature".into()),
                                ))
                            }
                        }
                    }
                    StepKind::Hold {
                        minutes,
                        temperature_k,
                    }
                }
                other => {
                    return Err(serr(
                        format!("unknown step kind `{other}`"),
                        Some(format!("a step is one of: {STEP_KINDS}")),
                    ))
                }
            };
            steps.push(Step {
                number,
                description,
                kind,
                line,
            });
        }
        if steps.is_empty() {
            return Err(err(None, "the procedure has no steps".into(), None));
        }
        Ok(Procedure {
            file: file.to_string(),
            name,
            vessel,
            steps,
        })
    }
}

fn parse_leave(v: &serde_yaml::Value) -> Result<Leave, String> {
    let m = v.as_mapping().ok_or(
        "a drain says what it leaves (`leave: 2 L` or `leave: 5 %`) or removes (`remove: 40 L`)",
    )?;
    let text = |v: &serde_yaml::Value| {
        v.as_str()
            .map(String::from)
            .or_else(|| v.as_f64().map(|x| x.to_string()))
    };
    if let Some(l) = m.get("leave") {
        let t = text(l).ok_or("`leave` must be a volume or a percentage")?;
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
        return Ok(Leave::Litres(
            parse_volume(&t).map_err(|e| format!("leave: {e}"))?.0,
        ));
    }
    if let Some(r) = m.get("remove") {
        let t = text(r).ok_or("`remove` must be a volume")?;
        return Ok(Leave::Remove(
            parse_volume(&t).map_err(|e| format!("remove: {e}"))?.0,
        ));
    }
    Err(
        "a drain says what it leaves (`leave: 2 L` or `leave: 5 %`) or removes (`remove: 40 L`)"
            .into(),
    )
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
