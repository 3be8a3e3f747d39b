//! `offgas rules`: the rules in force, and validation of a site's rule folder.

use anyhow::{anyhow, Result};
use offgas::catalog::Catalog;
use offgas::judge::rules::{Origin, RuleError, RuleSet};
use std::path::Path;

fn errors_text(errors: &[RuleError]) -> String {
    errors
        .iter()
        .map(|e| format!("  {e}"))
        .collect::<Vec<_>>()
        .join("\n")
}

fn counted(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// Reads every `*.yaml` file of a site rule folder, in name order.
fn site_files(dir: &Path) -> Result<Vec<(String, String)>> {
    let entries = std::fs::read_dir(dir)
        .map_err(|e| anyhow!("cannot read the rule folder {}: {e}", dir.display()))?;
    let mut files: Vec<_> = entries
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "yaml" || x == "yml"))
        .collect();
    files.sort();
    if files.is_empty() {
        return Err(anyhow!(
            "the rule folder {} has no .yaml files; a site rule folder holds rule files like rules/oxidisers.yaml",
            dir.display()
        ));
    }
    files
        .into_iter()
        .map(|p| {
            let text = std::fs::read_to_string(&p)
                .map_err(|e| anyhow!("cannot read {}: {e}", p.display()))?;
            Ok((p.display().to_string(), text))
        })
        .collect()
}

/// Layers the site's rule files, if any, over the built-in rules. Every problem of every
/// file is collected, sorted by file and line, so that a rule author fixes them in one go.
fn layered(cat: &Catalog, site: Option<&Path>) -> std::result::Result<RuleSet, Vec<RuleError>> {
    let mut set = offgas::embedded::rules(cat)?;
    if let Some(dir) = site {
        let files = site_files(dir).map_err(|e| {
            vec![RuleError {
                file: dir.display().to_string(),
                line: None,
                message: e.to_string(),
            }]
        })?;
        let mut errors = Vec::new();
        for (file, text) in files {
            let origin = Origin::Site { file: file.clone() };
            let (rules, problems) = RuleSet::parse_file_all(cat, &file, &text, origin);
            errors.extend(problems);
            // The sound rules of a file with problems are layered too, so that their ids
            // and `raises` are checked in the same run.
            if let Err(e) = set.extend(rules) {
                errors.extend(e);
            }
        }
        if !errors.is_empty() {
            errors.sort_by(|a, b| a.file.cmp(&b.file).then(a.line.cmp(&b.line)));
            return Err(errors);
        }
    }
    Ok(set)
}

/// The rules in force for a check; any problem in a site rule file stops the run.
pub fn load(cat: &Catalog, site: Option<&Path>) -> Result<RuleSet> {
    layered(cat, site).map_err(|e| anyhow!("the rules cannot be used:\n{}", errors_text(&e)))
}

/// `offgas rules list`: every rule in force with its source file.
pub fn list(site: Option<&Path>, as_json: bool) -> Result<u8> {
    let cat = super::load_catalog()?;
    let set = load(cat, site)?;
    let text = if as_json {
        let rules: Vec<serde_json::Value> = set
            .rules
            .iter()
            .map(|r| serde_json::json!({"origin": r.origin, "rule": r.rule}))
            .collect();
        serde_json::to_string_pretty(&rules)? + "\n"
    } else {
        let mut out = format!("{} rules in force\n", set.rules.len());
        for r in &set.rules {
            let w = &r.rule.when;
            let mut when = Vec::new();
            if let Some(v) = w.ph_below {
                when.push(format!("pH below {v}"));
            }
            if let Some(v) = w.ph_above {
                when.push(format!("pH above {v}"));
            }
            if let Some(v) = w.temperature_above_c {
                when.push(format!("warmer than {v} °C"));
            }
            if let Some(v) = w.min_mol_per_l {
                when.push(format!("each at least {v} mol/L"));
            }
            let joiner = match r.rule.meeting {
                offgas::judge::rules::Meeting::Anywhere => "  +  ",
                offgas::judge::rules::Meeting::Across => "  across  ",
            };
            let meet = r
                .rule
                .meet
                .iter()
                .map(|g| g.join(" | "))
                .collect::<Vec<_>>()
                .join(joiner);
            out.push_str(&format!(
                "\n{}  [{}]  {}\n    meet: {meet}\n",
                r.rule.id,
                format!("{:?}", r.rule.severity).to_lowercase(),
                r.origin
            ));
            if !when.is_empty() {
                out.push_str(&format!("    when: {}\n", when.join(", ")));
            }
            if !r.rule.forms.is_empty() {
                out.push_str(&format!("    forms: {}\n", r.rule.forms.join(", ")));
            }
            if let Some(t) = &r.rule.raises {
                out.push_str(&format!("    raises: {t}\n"));
            }
        }
        out
    };
    super::print(&text)?;
    Ok(0)
}

/// `offgas rules check DIR`: validates a site folder as it would be layered; exit 0 or 1.
pub fn check_dir(dir: &Path) -> Result<u8> {
    let cat = super::load_catalog()?;
    match layered(cat, Some(dir)) {
        Ok(set) => {
            let site = set
                .rules
                .iter()
                .filter(|r| matches!(r.origin, Origin::Site { .. }))
                .count();
            super::print(&format!(
                "{}: {site} site rules are valid and layer cleanly over {} built-in rules\n",
                dir.display(),
                set.rules.len() - site
            ))?;
            Ok(0)
        }
        Err(errors) => {
            let files = {
                let mut f: Vec<&str> = errors.iter().map(|e| e.file.as_str()).collect();
                f.dedup();
                f.len()
            };
            Err(anyhow!(
                "{} in {} in {}; nothing there can be used until every one is fixed:\n{}",
                counted(errors.len(), "problem", "problems"),
                counted(files, "file", "files"),
                dir.display(),
                errors_text(&errors)
            ))
        }
    }
}
