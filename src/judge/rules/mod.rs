//! Hazard rules that are not proton transfers, kept as data in `rules/*.yaml`.
//!
//! A rule names the hazard classes that must meet (anywhere in the mixture, or one on each
//! side of the pour), optional conditions on the computed state, and what it means. The
//! built-in rules ship with the program; a site's own rule directory is layered on top and
//! may add rules or raise a built-in rule's severity, never lower one.

// `build.rs` compiles this file on its own (with `catalog`, `input_shape` and `notation`)
// to check the built-in rule files when the program is built. What needs the rest of the
// crate (the evaluation against a mixture, the report's severities) is left out there:
// `offgas_whole_crate` is set by `build.rs` for the crate itself, never for the script.
#[cfg(offgas_whole_crate)]
pub mod evaluate;

use crate::catalog::Catalog;
use serde::Deserialize;
use std::fmt;

/// Where the groups of a rule must be found.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, Default, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Meeting {
    /// Anywhere in the mixture, each group from a different component.
    #[default]
    Anywhere,
    /// At least one group from each side of the pour.
    Across,
}

/// A figure the engine computes for a rule's product, beyond the rule's own severity.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Computed {
    /// Cl2 from hypochlorite and chloride in acid (the hydrolysis equilibrium).
    Chlorine,
    /// H2 from active metals and hydrides (stoichiometric).
    Hydrogen,
}

#[derive(Debug, Clone, Default, PartialEq, Deserialize, serde::Serialize)]
#[serde(deny_unknown_fields)]
pub struct Conditions {
    /// Holds when the pH falls below this anywhere along the pour.
    #[serde(default)]
    pub ph_below: Option<f64>,
    /// Holds when the pH rises above this anywhere along the pour.
    #[serde(default)]
    pub ph_above: Option<f64>,
    /// Holds when the mixture is warmer than this (°C).
    #[serde(default)]
    pub temperature_above_c: Option<f64>,
    /// Each group must reach this concentration in the mixed liquid (mol/L).
    #[serde(default)]
    pub min_mol_per_l: Option<f64>,
}

#[derive(Debug, Clone, PartialEq, Deserialize, serde::Serialize)]
#[serde(deny_unknown_fields)]
pub struct Rule {
    pub id: String,
    /// Groups of hazard classes; each group is met by any one of its classes.
    pub meet: Vec<Vec<String>>,
    #[serde(default)]
    pub meeting: Meeting,
    #[serde(default)]
    pub when: Conditions,
    pub severity: RuleSeverity,
    /// What forms (gas formulas in ASCII, or plain words for other products).
    #[serde(default)]
    pub forms: Vec<String>,
    #[serde(default)]
    pub computed: Option<Computed>,
    pub message: String,
    pub caution: String,
    pub basis: String,
    /// A site rule may raise a built-in rule by id instead of adding a new one.
    #[serde(default)]
    pub raises: Option<String>,
    /// A rule about one component's own hazard, whatever it meets: it holds whenever the
    /// component is in the pour, and is not repeated when another rule already names that
    /// component.
    #[serde(default)]
    pub presence: bool,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Deserialize, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum RuleSeverity {
    Review,
    Stop,
}

impl RuleSeverity {
    /// The severity's word, as reports write it.
    pub fn word(self) -> &'static str {
        match self {
            RuleSeverity::Review => "review",
            RuleSeverity::Stop => "stop",
        }
    }
}

impl fmt::Display for RuleSeverity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.word())
    }
}

#[cfg(offgas_whole_crate)]
impl From<RuleSeverity> for crate::report::Severity {
    fn from(s: RuleSeverity) -> Self {
        match s {
            RuleSeverity::Review => crate::report::Severity::Review,
            RuleSeverity::Stop => crate::report::Severity::Stop,
        }
    }
}

/// Where a rule came from.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
#[serde(tag = "kind", rename_all = "lowercase")]
pub enum Origin {
    BuiltIn { file: String },
    Site { file: String },
}

impl fmt::Display for Origin {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Origin::BuiltIn { file } => write!(f, "built-in ({file})"),
            Origin::Site { file } => write!(f, "site rule ({file})"),
        }
    }
}

#[derive(Debug, Clone, PartialEq)]
pub struct LoadedRule {
    pub rule: Rule,
    pub origin: Origin,
    /// The line of the rule's `id` in its file, where it is known.
    pub line: Option<usize>,
    /// Each `meet` group's classes as a [`class_mask`], so that a rule no component can
    /// meet is passed over without comparing names.
    pub meet_masks: Vec<u128>,
}

impl LoadedRule {
    pub fn new(cat: &Catalog, rule: Rule, origin: Origin, line: Option<usize>) -> Self {
        let meet_masks = rule
            .meet
            .iter()
            .map(|g| class_mask(cat, g.iter().map(String::as_str)))
            .collect();
        LoadedRule {
            rule,
            origin,
            line,
            meet_masks,
        }
    }
}

/// A set of hazard classes as bits, by the class's place in the catalog. Classes past the
/// 127th share the last bit, so two masks with no bit in common never share a class (the
/// masks only rule out; names decide).
pub fn class_mask<'a>(cat: &Catalog, classes: impl Iterator<Item = &'a str>) -> u128 {
    classes
        .filter_map(|c| cat.classes.iter().position(|k| k.id == c))
        .fold(0, |mask, i| mask | 1u128 << i.min(127))
}

/// The rules in force: built-ins first, then site rules.
#[derive(Debug, Clone, Default)]
pub struct RuleSet {
    pub rules: Vec<LoadedRule>,
}

/// A problem in a rule file, with the file, the line where it can be found, and the fix.
#[derive(Debug, Clone, PartialEq)]
pub struct RuleError {
    pub file: String,
    pub line: Option<usize>,
    pub message: String,
}

impl fmt::Display for RuleError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.line {
            Some(l) => write!(f, "{}:{}: {}", self.file, l, self.message),
            None => write!(f, "{}: {}", self.file, self.message),
        }
    }
}

fn line_of_id(text: &str, id: &str) -> Option<usize> {
    text.lines()
        .position(|l| l.contains("id:") && l.contains(id))
        .map(|i| i + 1)
}

/// The keys a rule may have, in the order the format describes them.
const RULE_KEYS: &[&str] = &[
    "id", "meet", "meeting", "when", "severity", "forms", "computed", "message", "caution",
    "basis", "raises", "presence",
];
const REQUIRED_KEYS: &[&str] = &["id", "meet", "severity", "message", "caution", "basis"];
const CONDITION_KEYS: &[&str] = &[
    "ph_below",
    "ph_above",
    "temperature_above_c",
    "min_mol_per_l",
];

/// The lines (1-based, first and last) of each item of the top-level `rules:` list, when
/// it is written in block style (`- id: ...` items); `None` otherwise. Used to name the
/// line of each problem; the items themselves come from the YAML parser.
fn rule_spans(text: &str) -> Option<Vec<(usize, usize)>> {
    let lines: Vec<&str> = text.lines().collect();
    let start = lines.iter().position(|l| l.starts_with("rules:"))?;
    let rest = lines[start]["rules:".len()..].trim_start();
    if !(rest.is_empty() || rest.starts_with('#')) {
        return None;
    }
    let mut spans: Vec<(usize, usize)> = Vec::new();
    let mut indent: Option<usize> = None;
    for (i, l) in lines.iter().enumerate().skip(start + 1) {
        let t = l.trim_start();
        if t.is_empty() || t.starts_with('#') {
            continue;
        }
        let here = l.len() - t.len();
        let item = t == "-" || t.starts_with("- ");
        match indent {
            None if item => {
                indent = Some(here);
                spans.push((i + 1, i + 1));
            }
            None => return None,
            Some(d) if here == d && item => spans.push((i + 1, i + 1)),
            Some(d) if here <= d => break,
            Some(_) => {
                if let Some(last) = spans.last_mut() {
                    last.1 = i + 1;
                }
            }
        }
    }
    Some(spans)
}

/// The line within `span` where `key` is written as a key of the item itself.
fn key_line(text: &str, span: Option<(usize, usize)>, key: &str) -> Option<usize> {
    let (first, last) = span?;
    let needle = format!("{key}:");
    text.lines()
        .enumerate()
        .skip(first - 1)
        .take(last + 1 - first)
        .find(|(_, l)| {
            let t = l.trim_start();
            t.strip_prefix("- ")
                .unwrap_or(t)
                .trim_start()
                .starts_with(&needle)
        })
        .map(|(i, _)| i + 1)
}

/// The line within `span` where `key` appears anywhere (nested or flow-style keys).
fn nested_key_line(text: &str, span: Option<(usize, usize)>, key: &str) -> Option<usize> {
    let (first, last) = span?;
    let needle = format!("{key}:");
    text.lines()
        .enumerate()
        .skip(first - 1)
        .take(last + 1 - first)
        .find(|(_, l)| l.contains(&needle))
        .map(|(i, _)| i + 1)
}

/// "unknown field `colour`, expected one of ...", with the closest known key.
fn unknown_key(key: &str, known: &[&str]) -> String {
    let closest = known
        .iter()
        .map(|k| (strsim::jaro_winkler(key, k), *k))
        .max_by(|a, b| a.0.total_cmp(&b.0))
        .filter(|(score, _)| *score > 0.8)
        .map(|(_, k)| format!(" (did you mean `{k}`?)"))
        .unwrap_or_default();
    format!(
        "unknown field `{key}`{closest}, expected one of {}",
        known
            .iter()
            .map(|k| format!("`{k}`"))
            .collect::<Vec<_>>()
            .join(", ")
    )
}

fn type_problem<T: serde::de::DeserializeOwned>(v: &serde_yaml::Value) -> Option<String> {
    serde_yaml::from_value::<T>(v.clone())
        .err()
        .map(|e| e.to_string())
}

/// Every problem with the keys and values of one rule item, each with its line; the rule
/// when there are none.
fn read_rule(
    text: &str,
    item: &serde_yaml::Value,
    number: usize,
    span: Option<(usize, usize)>,
) -> Result<Rule, Vec<(Option<usize>, String)>> {
    use serde_yaml::Value;
    let first_line = span.map(|s| s.0);
    let Value::Mapping(map) = item else {
        return Err(vec![(
            first_line,
            format!("rule {number} is not a set of keys (`id: ...`, `meet: ...`, ...)"),
        )]);
    };
    let id = map.get("id").and_then(Value::as_str).map(str::to_string);
    let name = id
        .as_ref()
        .map(|i| format!("rule `{i}`"))
        .unwrap_or_else(|| format!("rule {number}"));
    let mut problems = Vec::new();
    for (k, v) in map {
        let Some(key) = k.as_str() else {
            problems.push((first_line, format!("{name}: a key must be a word")));
            continue;
        };
        let line = key_line(text, span, key).or(first_line);
        let problem = match key {
            "id" | "message" | "caution" | "basis" | "raises" => type_problem::<String>(v),
            "meet" => type_problem::<Vec<Vec<String>>>(v),
            "meeting" => type_problem::<Meeting>(v),
            "severity" => type_problem::<RuleSeverity>(v),
            "forms" => type_problem::<Vec<String>>(v),
            "computed" => type_problem::<Computed>(v),
            "presence" => type_problem::<bool>(v),
            "when" => match v {
                Value::Mapping(when) => {
                    for (ck, cv) in when {
                        let ckey = ck.as_str().unwrap_or("?");
                        let cline = nested_key_line(text, span, ckey).or(line);
                        if !CONDITION_KEYS.contains(&ckey) {
                            problems.push((
                                cline,
                                format!("{name}: `when`: {}", unknown_key(ckey, CONDITION_KEYS)),
                            ));
                        } else if let Some(p) = type_problem::<f64>(cv) {
                            problems.push((cline, format!("{name}: `when.{ckey}`: {p}")));
                        }
                    }
                    None
                }
                Value::Null => None,
                _ => Some("`when` holds conditions, e.g. `{ ph_below: 7 }`".into()),
            },
            other => Some(unknown_key(other, RULE_KEYS)),
        };
        if let Some(p) = problem {
            let p = if RULE_KEYS.contains(&key) {
                format!("`{key}`: {p}")
            } else {
                p
            };
            problems.push((line, format!("{name}: {p}")));
        }
    }
    for key in REQUIRED_KEYS {
        if !map.contains_key(*key) {
            problems.push((first_line, format!("{name}: missing field `{key}`")));
        }
    }
    if !problems.is_empty() {
        return Err(problems);
    }
    serde_yaml::from_value::<Rule>(item.clone())
        .map_err(|e| vec![(first_line, format!("{name}: {e}"))])
}

impl RuleSet {
    /// Parses one rule file into `origin`-tagged rules; every problem is collected.
    pub fn parse_file(
        cat: &Catalog,
        file: &str,
        text: &str,
        origin: Origin,
    ) -> Result<Vec<LoadedRule>, Vec<RuleError>> {
        let (rules, errors) = Self::parse_file_all(cat, file, text, origin);
        if errors.is_empty() {
            Ok(rules)
        } else {
            Err(errors)
        }
    }

    /// Every problem of one rule file, each with its line, and the rules that are sound.
    /// Only a file that is not readable YAML at all stops at its first problem.
    pub fn parse_file_all(
        cat: &Catalog,
        file: &str,
        text: &str,
        origin: Origin,
    ) -> (Vec<LoadedRule>, Vec<RuleError>) {
        let top = match rule_document(file, text) {
            Ok(top) => top,
            Err(e) => return (Vec::new(), vec![e]),
        };
        let (items, mut errors) = top_level(file, text, &top);
        let (rules, rule_errors) = read_rules(cat, file, text, items, &origin);
        errors.extend(rule_errors);
        (rules, errors)
    }

    /// Adds rules, checking ids are unique and that raises name an existing rule and
    /// do not lower it.
    pub fn extend(&mut self, more: Vec<LoadedRule>) -> Result<(), Vec<RuleError>> {
        let mut errors = Vec::new();
        for r in &more {
            let file = match &r.origin {
                Origin::BuiltIn { file } | Origin::Site { file } => file.clone(),
            };
            let err = |m: String| RuleError {
                file: file.clone(),
                line: r.line,
                message: format!("rule `{}`: {m}", r.rule.id),
            };
            if self.rules.iter().any(|x| x.rule.id == r.rule.id)
                || more.iter().filter(|x| x.rule.id == r.rule.id).count() > 1
            {
                errors.push(err(
                    "the id is already in use; give the rule an id of its own".into(),
                ));
            }
            if let Some(target) = &r.rule.raises {
                match self.rules.iter().find(|x| &x.rule.id == target) {
                    None => errors.push(err(format!("raises `{target}`, which is not a rule in force"))),
                    Some(t) if t.rule.severity > r.rule.severity => errors.push(err(format!(
                        "would lower `{target}` from {} to {}; a site rule may only raise a severity",
                        t.rule.severity, r.rule.severity
                    ))),
                    _ => {}
                }
            }
        }
        if !errors.is_empty() {
            return Err(errors);
        }
        self.rules.extend(more);
        Ok(())
    }
}

/// Everything wrong with one rule, in words a rule author can act on.
fn validate(cat: &Catalog, r: &Rule) -> Vec<String> {
    let mut out = Vec::new();
    if r.id.trim().is_empty() || r.id.contains(char::is_whitespace) {
        out.push("the id must be one word, e.g. `hypochlorite-with-acid`".into());
    }
    if r.meet.is_empty() || r.meet.iter().any(|g| g.is_empty()) {
        out.push("`meet` needs at least one non-empty group of classes".into());
    }
    if r.presence && (r.meet.len() != 1 || r.meeting == Meeting::Across) {
        out.push("a `presence` rule names one group of classes and no `meeting: across`".into());
    }
    if r.meeting == Meeting::Across && r.meet.len() < 2 {
        out.push("`meeting: across` needs at least two groups".into());
    }
    for class in r.meet.iter().flatten() {
        if cat.class(class).is_none() {
            let mut known: Vec<(f64, &str)> = cat
                .classes
                .iter()
                .map(|c| (strsim::jaro_winkler(class, &c.id), c.id.as_str()))
                .collect();
            known.sort_by(|a, b| b.0.total_cmp(&a.0));
            let close: Vec<&str> = known.iter().take(3).map(|k| k.1).collect();
            out.push(format!(
                "unknown hazard class `{class}` (closest: {}; the classes are in data/classes.yaml)",
                close.join(", ")
            ));
        }
    }
    let w = &r.when;
    for (name, v) in [("ph_below", w.ph_below), ("ph_above", w.ph_above)] {
        if let Some(v) = v {
            if !(0.0..=14.0).contains(&v) {
                out.push(format!(
                    "`{name}: {v}` can never hold: pH here lies between 0 and 14"
                ));
            }
        }
    }
    if let (Some(lo), Some(hi)) = (w.ph_above, w.ph_below) {
        // pH above `lo` somewhere and below `hi` somewhere: only contradictory for a point,
        // but a rule author who writes a band means a band.
        if hi <= lo {
            out.push(format!(
                "`ph_above: {lo}` with `ph_below: {hi}` is an empty band and can never hold"
            ));
        }
    }
    if let Some(t) = w.temperature_above_c {
        if t >= 100.0 {
            out.push(format!(
                "`temperature_above_c: {t}` can never hold: offgas models 0–100 °C"
            ));
        }
    }
    if let Some(c) = w.min_mol_per_l {
        if !(c >= 0.0 && c.is_finite()) {
            out.push(format!("`min_mol_per_l: {c}` must be zero or more"));
        }
    }
    if r.message.trim().is_empty() || r.caution.trim().is_empty() || r.basis.trim().is_empty() {
        out.push("message, caution and basis must all be written".into());
    }
    out
}

fn rule_error(file: &str, line: Option<usize>, message: String) -> RuleError {
    RuleError {
        file: file.to_string(),
        line,
        message,
    }
}

/// The top-level mapping of a rule file, or the one problem that keeps it from being read.
fn rule_document(file: &str, text: &str) -> Result<serde_yaml::Mapping, RuleError> {
    use serde_yaml::Value;
    if let Err(e) = crate::basics::input_shape::check_yaml_shape(
        file,
        text,
        crate::basics::input_shape::MAX_FILE_BYTES,
    ) {
        return Err(rule_error(file, e.line, e.message));
    }
    let doc: Value = serde_yaml::from_str(text).map_err(|e| {
        rule_error(
            file,
            e.location().map(|l| l.line()),
            format!("not a readable rule file: {e}"),
        )
    })?;
    match doc {
        Value::Mapping(top) => Ok(top),
        _ => Err(rule_error(
            file,
            Some(1),
            "not a readable rule file: it must hold `description:` and `rules:`".into(),
        )),
    }
}

/// The file's rule entries, and the problems of its top-level keys (unknown keys, a missing
/// or malformed `description` or `rules`).
fn top_level<'a>(
    file: &str,
    text: &str,
    top: &'a serde_yaml::Mapping,
) -> (&'a [serde_yaml::Value], Vec<RuleError>) {
    use serde_yaml::Value;
    let error = |line: Option<usize>, message: String| rule_error(file, line, message);
    let top_line = |key: &str| {
        text.lines()
            .position(|l| l.starts_with(&format!("{key}:")))
            .map(|i| i + 1)
    };
    let mut errors = Vec::new();
    for k in top.keys() {
        let key = k.as_str().unwrap_or("?");
        if key != "description" && key != "rules" {
            errors.push(error(
                top_line(key),
                unknown_key(key, &["description", "rules"]),
            ));
        }
    }
    match top.get("description") {
        Some(Value::String(_)) => {}
        Some(_) => errors.push(error(
            top_line("description"),
            "`description` must be text saying what these rules are about".into(),
        )),
        None => errors.push(error(
            Some(1),
            "missing field `description`: say what these rules are about".into(),
        )),
    }
    let items: &[Value] = match top.get("rules") {
        Some(Value::Sequence(items)) => items,
        Some(_) => {
            errors.push(error(
                top_line("rules"),
                "`rules` must be a list of rules (`- id: ...`)".into(),
            ));
            &[]
        }
        None => {
            errors.push(error(Some(1), "missing field `rules`".into()));
            &[]
        }
    };
    (items, errors)
}

/// Each rule entry read and validated: the sound rules, and every problem with its line.
fn read_rules(
    cat: &Catalog,
    file: &str,
    text: &str,
    items: &[serde_yaml::Value],
    origin: &Origin,
) -> (Vec<LoadedRule>, Vec<RuleError>) {
    let error = |line: Option<usize>, message: String| rule_error(file, line, message);
    let spans = rule_spans(text).filter(|s| s.len() == items.len());
    let mut rules = Vec::new();
    let mut errors = Vec::new();
    for (i, item) in items.iter().enumerate() {
        let span = spans.as_ref().map(|s| s[i]);
        match read_rule(text, item, i + 1, span) {
            Err(problems) => {
                errors.extend(problems.into_iter().map(|(line, m)| error(line, m)));
            }
            Ok(rule) => {
                let line = key_line(text, span, "id").or_else(|| line_of_id(text, &rule.id));
                let problems = validate(cat, &rule);
                if problems.is_empty() {
                    rules.push(LoadedRule::new(cat, rule, origin.clone(), line));
                } else {
                    errors.extend(
                        problems
                            .into_iter()
                            .map(|p| error(line, format!("rule `{}`: {p}", rule.id))),
                    );
                }
            }
        }
    }
    (rules, errors)
}
