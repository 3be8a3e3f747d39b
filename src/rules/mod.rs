//! Hazard rules that are not proton transfers, kept as data in `rules/*.yaml`.
//!
//! A rule names the hazard classes that must meet (anywhere in the mixture, or one on each
//! side of the pour), optional conditions on the computed state, and what it means. The
//! built-in rules ship with the program; a site's own rule directory is layered on top and
//! may add rules or raise a built-in rule's severity, never lower one.

pub mod evaluate;

use crate::catalog::Catalog;
use crate::report::Severity;
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

impl From<RuleSeverity> for Severity {
    fn from(s: RuleSeverity) -> Self {
        match s {
            RuleSeverity::Review => Severity::Review,
            RuleSeverity::Stop => Severity::Stop,
        }
    }
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
struct RuleFile {
    #[allow(dead_code)]
    description: String,
    rules: Vec<Rule>,
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

impl RuleSet {
    /// Parses one rule file into `origin`-tagged rules; every problem is collected.
    pub fn parse_file(
        cat: &Catalog,
        file: &str,
        text: &str,
        origin: Origin,
    ) -> Result<Vec<LoadedRule>, Vec<RuleError>> {
        if let Err(e) =
            crate::input_shape::check_yaml_shape(file, text, crate::input_shape::MAX_FILE_BYTES)
        {
            return Err(vec![RuleError {
                file: file.to_string(),
                line: e.line,
                message: e.message,
            }]);
        }
        let parsed: RuleFile = serde_yaml::from_str(text).map_err(|e| {
            vec![RuleError {
                file: file.to_string(),
                line: e.location().map(|l| l.line()),
                message: format!("not a readable rule file: {e}"),
            }]
        })?;
        let mut errors = Vec::new();
        for r in &parsed.rules {
            for problem in validate(cat, r) {
                errors.push(RuleError {
                    file: file.to_string(),
                    line: line_of_id(text, &r.id),
                    message: format!("rule `{}`: {problem}", r.id),
                });
            }
        }
        if !errors.is_empty() {
            return Err(errors);
        }
        Ok(parsed
            .rules
            .into_iter()
            .map(|rule| LoadedRule {
                rule,
                origin: origin.clone(),
            })
            .collect())
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
                line: None,
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
                        "would lower `{target}` from {:?} to {:?}; a site rule may only raise a severity",
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
