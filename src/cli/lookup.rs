//! `offgas lookup`: what the data say about a substance or family, with sources.

use anyhow::{anyhow, Result};
use offgas::basics::notation::pretty;
use offgas::catalog::complexes::Part;
use offgas::catalog::{Catalog, FamilyId, SubstanceId};
use serde_json::json;
use std::fmt::Write;

/// Prints the matching substance and families; exit 0, or an error with close names.
pub fn run(query: &str, as_json: bool) -> Result<u8> {
    let cat = super::load_catalog()?;
    let substance = cat.find_substance(query);
    let mut families: Vec<FamilyId> = cat.find_families(query);
    if let Some(sid) = substance {
        for &(f, _) in &cat.substance(sid).families {
            if !families.contains(&f) {
                families.push(f);
            }
        }
    }
    if substance.is_none() && families.is_empty() {
        return Err(anyhow!(
            "nothing called `{query}` in the data; closest names: {}",
            cat.closest_names(query, 5).join(", ")
        ));
    }
    let text = if as_json {
        serde_json::to_string_pretty(&json!({
            "substance": substance.map(|s| substance_json(cat, s)),
            "families": families.iter().map(|&f| family_json(cat, f)).collect::<Vec<_>>(),
        }))? + "\n"
    } else {
        let mut out = String::new();
        if let Some(s) = substance {
            substance_text(cat, s, &mut out);
        }
        for f in families {
            family_text(cat, f, &mut out);
        }
        out
    };
    super::print(&text)?;
    Ok(0)
}

fn substance_text(cat: &Catalog, id: SubstanceId, out: &mut String) {
    let s = cat.substance(id);
    let e = &s.entry;
    let _ = writeln!(out, "{}", s.name);
    let _ = writeln!(out, "  CAS: {}", s.cas.as_deref().unwrap_or("not given"));
    let _ = writeln!(
        out,
        "  formula: {}",
        s.formula.as_deref().map_or("not given".into(), pretty)
    );
    if let Some(m) = s.molar_mass {
        let _ = writeln!(out, "  molar mass: {m:.3} g/mol");
    }
    let _ = writeln!(out, "  state: {}", format!("{:?}", s.state).to_lowercase());
    if !s.synonyms.is_empty() {
        let _ = writeln!(out, "  also called: {}", s.synonyms.join(", "));
    }
    if let Some(sol) = &s.solution {
        let _ = writeln!(
            out,
            "  commercial solution of {}: {} % w/w, {:.3} mol of solute per litre",
            cat.substance(sol.solute).name,
            sol.mass_percent,
            sol.solute_mol_per_ml * 1e3
        );
    }
    if s.is_inert() {
        let _ = writeln!(
            out,
            "  in water: takes no part in proton transfer (treated as inert)"
        );
    } else {
        let mut parts: Vec<String> = s
            .families
            .iter()
            .map(|&(f, n)| format!("{n} × {} family", cat.family(f).id))
            .collect();
        parts.extend(
            s.ions
                .iter()
                .map(|&(i, n)| format!("{n} × {}", pretty(&cat.ion(i).formula))),
        );
        let _ = writeln!(out, "  one mole in water gives: {}", parts.join(", "));
    }
    for (label, v) in [
        ("solubility", &e.solubility),
        ("density", &e.density),
        ("mass percent", &e.mass_percent),
    ] {
        if let Some(v) = v {
            let _ = writeln!(out, "  {label}: {} (source: {})", v.value, v.source);
        }
    }
    for c in &s.classes {
        let d = cat.class(c).map(|k| k.description.as_str()).unwrap_or("");
        let _ = writeln!(out, "  hazard class {c}: {d}");
    }
    if let Some(src) = &e.source {
        let _ = writeln!(out, "  source: {src}");
    }
    if let Some(n) = &e.note {
        let _ = writeln!(out, "  note: {n}");
    }
    out.push('\n');
    complexes_text(cat, id, out);
}

/// The metals a substance gives, each a family's first species or a strong ion.
fn metals_of(cat: &Catalog, id: SubstanceId) -> Vec<Part> {
    let s = cat.substance(id);
    let given: Vec<Part> = s
        .ions
        .iter()
        .map(|&(i, _)| Part::Ion(i))
        .chain(s.families.iter().map(|&(f, _)| Part::Family(f, 0)))
        .collect();
    given
        .into_iter()
        .filter(|p| cat.complexes_of_metal.iter().any(|(m, _)| m == p))
        .collect()
}

/// The complexes of each metal the substance gives (with their sources), the hydroxide
/// checked for saturation, and the inert complexes it holds.
fn complexes_text(cat: &Catalog, id: SubstanceId, out: &mut String) {
    let cite = |key: &str| {
        cat.complex_sources
            .get(key)
            .cloned()
            .unwrap_or_else(|| key.to_string())
    };
    for metal in metals_of(cat, id) {
        let Some((_, list)) = cat.complexes_of_metal.iter().find(|(m, _)| *m == metal) else {
            continue;
        };
        let _ = writeln!(
            out,
            "complexes of {} (computed at equilibrium; overall log beta at I = 0, 25 °C)",
            pretty(cat.part_formula(metal))
        );
        let mut keys: Vec<&str> = Vec::new();
        for &ci in list {
            let c = &cat.complexes[ci];
            let dh = c.dh.map_or(String::new(), |d| format!(", ΔH° {d} kJ/mol"));
            let _ = writeln!(
                out,
                "  {}  log beta {}{dh}  [{}]",
                pretty(&c.formula),
                c.log_beta,
                c.source
            );
            if !keys.contains(&c.source.as_str()) {
                keys.push(&c.source);
            }
        }
        if let Some(sd) = cat.solids.iter().find(|sd| sd.metal == metal) {
            let z = match metal {
                Part::Family(f, j) => cat.family(f).species[j].charge,
                Part::Ion(i) => cat.ion(i).charge,
            };
            let _ = writeln!(
                out,
                "  solid {}: log K {} for solid + {z} H⁺ = {} + {z} H₂O (per metal atom); forms where the liquid is saturated with it, and the metal beyond saturation leaves the liquid  [{}]",
                pretty(&sd.formula),
                sd.log_k,
                pretty(cat.part_formula(metal)),
                sd.source
            );
            if !keys.contains(&sd.source.as_str()) {
                keys.push(&sd.source);
            }
        }
        for k in keys {
            let _ = writeln!(out, "  [{k}] {}", cite(k));
        }
        out.push('\n');
    }
    for &(ion, _) in &cat.substance(id).ions {
        if let Some(inert) = cat.inert_complexes.iter().find(|c| c.ion == ion) {
            let _ = writeln!(
                out,
                "inert complex {}: counted as it is, never formed or broken in the computation ({})\n",
                pretty(&cat.ion(ion).formula),
                cite(&inert.inert_source)
            );
        }
    }
}

fn family_text(cat: &Catalog, id: FamilyId, out: &mut String) {
    let f = cat.family(id);
    let _ = writeln!(out, "family {}: {}", f.id, f.name);
    for (i, step) in f.steps.iter().enumerate() {
        let _ = writeln!(
            out,
            "  {} = H⁺ + {}   pKa {} ({})   ΔH° {} kJ/mol ({})",
            pretty(&f.species[i].formula),
            pretty(&f.species[i + 1].formula),
            step.pka,
            step.pka_source,
            step.dh,
            step.dh_source
        );
        if let Some(n) = &step.note {
            let _ = writeln!(out, "    note: {n}");
        }
    }
    if let Some(v) = &f.volatile {
        let _ = writeln!(
            out,
            "  volatile as {}: Hcp {} mol/(m3 Pa) at 25 °C, d ln Hcp/d(1/T) {} K ({})",
            v.gas, v.hcp, v.hcp_b, v.source
        );
        match cat.gas_limits(&v.gas) {
            Some(l) => {
                for (label, lv) in [
                    ("IDLH", &l.idlh),
                    ("short-term", &l.short_term),
                    ("TWA", &l.twa),
                ] {
                    match lv {
                        Some(lv) => {
                            let _ = writeln!(
                                out,
                                "  {label} for {}: {} ppm ({}{})",
                                v.gas,
                                lv.value,
                                lv.basis
                                    .as_deref()
                                    .map(|b| format!("{b}; "))
                                    .unwrap_or_default(),
                                lv.source
                            );
                        }
                        None => {
                            let _ = writeln!(
                                out,
                                "  {label} for {}: none in data/limits.yaml (see its note there)",
                                v.gas
                            );
                        }
                    }
                }
            }
            None => {
                let _ = writeln!(
                    out,
                    "  no exposure levels for {} in data/limits.yaml",
                    v.gas
                );
            }
        }
    }
    if let Some(n) = &f.note {
        let _ = writeln!(out, "  note: {n}");
    }
    out.push('\n');
}

fn substance_json(cat: &Catalog, id: SubstanceId) -> serde_json::Value {
    let s = cat.substance(id);
    json!({
        "name": s.name,
        "cas": s.cas,
        "formula": s.formula,
        "molar_mass": s.molar_mass,
        "state": s.state,
        "synonyms": s.synonyms,
        "families": s.families.iter().map(|&(f, n)| json!({"family": cat.family(f).id, "per_mole": n})).collect::<Vec<_>>(),
        "ions": s.ions.iter().map(|&(i, n)| json!({"ion": cat.ion(i).formula, "per_mole": n})).collect::<Vec<_>>(),
        "classes": s.classes,
        "source": s.entry.source,
        "complexes": metals_of(cat, id).into_iter().flat_map(|m| {
            cat.complexes.iter().filter(move |c| c.metal == m).map(|c| json!({
                "formula": c.formula,
                "log_beta": c.log_beta,
                "dh_kj_per_mol": c.dh,
                "source": cat.complex_sources.get(&c.source),
            }))
        }).collect::<Vec<_>>(),
    })
}

fn family_json(cat: &Catalog, id: FamilyId) -> serde_json::Value {
    let f = cat.family(id);
    json!({
        "id": f.id,
        "name": f.name,
        "species": f.species.iter().map(|s| json!({"formula": s.formula, "charge": s.charge})).collect::<Vec<_>>(),
        "steps": f.steps.iter().map(|s| json!({"pka": s.pka, "pka_source": s.pka_source, "dh_kj_per_mol": s.dh, "dh_source": s.dh_source})).collect::<Vec<_>>(),
        "volatile": f.volatile.as_ref().map(|v| json!({"gas": v.gas, "hcp_mol_per_m3_pa": v.hcp, "hcp_b_k": v.hcp_b, "source": v.source})),
    })
}
