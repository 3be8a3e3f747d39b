//! Solves a list of mixtures given as JSON and prints the results as JSON, with the time
//! per solve. Used by tests/reference/speed_benchmark.py to run offgas and PHREEQC on the
//! same mixtures in one run.
//!
//! Input: {"cases": [{"id", "temperature_c", "liquid_l", "headspace_l",
//!                    "families": {id: mol per litre of liquid}, "ions": {formula: mol/L}}]}
//! Usage: cargo run --release --example solve_batch -- INPUT.json [--repeat N]

use offgas::chem::{solve, Closure, Mixture, SolverSettings};
use serde::Deserialize;
use std::collections::BTreeMap;
use std::time::Instant;

#[derive(Deserialize)]
struct Input {
    cases: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    id: String,
    temperature_c: f64,
    liquid_l: f64,
    headspace_l: f64,
    #[serde(default)]
    families: BTreeMap<String, f64>,
    #[serde(default)]
    ions: BTreeMap<String, f64>,
}

fn main() -> anyhow::Result<()> {
    let args: Vec<String> = std::env::args().collect();
    let path = args
        .get(1)
        .ok_or_else(|| anyhow::anyhow!("usage: solve_batch INPUT.json [--repeat N]"))?;
    let repeat: usize = match args.iter().position(|a| a == "--repeat") {
        Some(i) => args.get(i + 1).map(|s| s.parse()).transpose()?.unwrap_or(1),
        None => 1,
    };
    let cat = offgas::embedded::catalog()?;
    let input: Input = serde_json::from_str(&std::fs::read_to_string(path)?)?;
    let mut mixtures = Vec::new();
    for c in &input.cases {
        let mut m = Mixture::empty(c.temperature_c + 273.15, Closure::Sealed);
        for (f, conc) in &c.families {
            let id = cat
                .family_by_id(f)
                .ok_or_else(|| anyhow::anyhow!("case {}: unknown family {f}", c.id))?;
            m.add_family(id, conc * c.liquid_l);
        }
        for (i, conc) in &c.ions {
            let id = cat
                .ion_by_formula(i)
                .ok_or_else(|| anyhow::anyhow!("case {}: unknown strong ion {i}", c.id))?;
            m.add_ion(id, conc * c.liquid_l);
        }
        m.liquid_l = c.liquid_l;
        m.headspace_l = c.headspace_l;
        mixtures.push(m);
    }
    let settings = SolverSettings::default();
    let mut rounds = Vec::with_capacity(repeat);
    let mut last = Vec::new();
    for _ in 0..repeat.max(1) {
        let start = Instant::now();
        let out: Vec<_> = mixtures.iter().map(|m| solve(&cat, m, &settings)).collect();
        rounds.push(start.elapsed().as_nanos() as f64 / mixtures.len().max(1) as f64);
        last = out;
    }
    rounds.sort_by(f64::total_cmp);
    let results: Vec<serde_json::Value> = input
        .cases
        .iter()
        .zip(last)
        .map(|(c, r)| match r {
            Ok(eq) => serde_json::json!({
                "id": c.id,
                "ph": eq.ph,
                "ionic_strength": eq.ionic_strength,
                "gases_atm": eq.gases.iter()
                    .map(|g| (g.gas.clone(), g.partial_pressure_pa / cat.physical.p_std))
                    .collect::<BTreeMap<_, _>>(),
                "complexes": eq.complexes.iter()
                    .filter(|c| c.concentration > 0.0)
                    .map(|c| (c.formula.clone(), c.concentration))
                    .collect::<BTreeMap<_, _>>(),
                "species": eq.families.iter()
                    .flat_map(|f| {
                        let fam = cat.family(f.family);
                        fam.species.iter().zip(&f.concentrations)
                            .map(|(s, c)| (s.formula.clone(), *c)).collect::<Vec<_>>()
                    })
                    .collect::<BTreeMap<_, _>>(),
            }),
            Err(e) => serde_json::json!({"id": c.id, "error": e.to_string()}),
        })
        .collect();
    let doc = serde_json::json!({
        "solves": mixtures.len(),
        "repeat": rounds.len(),
        "median_ns_per_solve": rounds[rounds.len() / 2],
        "results": results,
    });
    println!("{}", serde_json::to_string_pretty(&doc)?);
    Ok(())
}
