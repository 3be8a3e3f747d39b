//! What the report says beside the verdict: the states along each order, the batches as
//! read, and the assumptions the computation made.

use super::CheckOptions;
use crate::catalog::Catalog;
use crate::chem::Closure;
use crate::judge::thresholds::Thresholds;
use crate::pour::batch::Batch;
use crate::report::{BatchReport, ComponentReport};

/// The states along one order, with the gases whose peaks are reported.
pub(super) fn path_report(
    cat: &Catalog,
    points: &[crate::pour::path::PathPoint],
    peaks: &[crate::report::GasPeak],
) -> Vec<crate::report::PathPointReport> {
    points
        .iter()
        .map(|pt| crate::report::PathPointReport {
            fraction_added: pt.fraction_added,
            ph: pt.ph,
            temperature_c: pt.temperature_k - cat.physical.kelvin_offset,
            gases: peaks
                .iter()
                .map(|peak| crate::report::PathGas {
                    formula: peak.formula.clone(),
                    headspace_ppm: pt
                        .gases
                        .iter()
                        .find(|(g, _)| g.as_ref() == peak.formula)
                        .map_or(0.0, |(_, pa)| crate::judge::assess::ppm(cat, *pa)),
                })
                .collect(),
        })
        .collect()
}

pub(super) fn inert_names(cat: &Catalog, container: &Batch, stream: &Batch) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for c in container.components.iter().chain(stream.components.iter()) {
        let s = cat.substance(c.substance);
        if s.is_inert() && !out.contains(&s.name) {
            out.push(s.name.clone());
        }
    }
    out
}

pub(super) fn batch_report(cat: &Catalog, b: &Batch, is_container: bool) -> BatchReport {
    BatchReport {
        file: b.file.clone(),
        name: b.name.clone(),
        volume_l: b.volume_l,
        capacity_l: if is_container { b.capacity_l } else { None },
        closure: is_container.then_some(b.closure),
        temperature_c: b.temperature_k - cat.physical.kelvin_offset,
        components: b
            .components
            .iter()
            .map(|c| {
                let s = cat.substance(c.substance);
                ComponentReport {
                    written: c.written.clone(),
                    substance: s.name.clone(),
                    amount: format_amount(c.amount),
                    moles: c.moles,
                    inert: s.is_inert(),
                    classes: s.classes.clone(),
                }
            })
            .collect(),
    }
}

pub(super) fn format_amount(a: crate::basics::quantity::Amount) -> String {
    use crate::basics::quantity::Amount::*;
    match a {
        MolPerLitre(v) => format!("{v} mol/L"),
        GramPerLitre(v) => format!("{v} g/L"),
        PercentWeightPerWeight(v) => format!("{v} % w/w"),
        PercentWeightPerVolume(v) => format!("{v} % w/v"),
        MillilitrePerLitre(v) => format!("{v} mL/L"),
        Moles(v) => format!("{v} mol"),
        Grams(v) => format!("{v} g"),
        Millilitres(v) => format!("{v} mL"),
    }
}

/// A batch whose untabled solutes pass this mass share has its mass called an estimate.
pub(super) const UNTABLED_NOTE_SHARE: f64 = 0.05;

/// Below this much water per litre a liquid is mostly something else (kg/L).
pub(super) const MOSTLY_WATER_KG_PER_L: f64 = 0.5;

pub(super) fn assumptions(
    cat: &Catalog,
    container: &Batch,
    stream: &Batch,
    opts: &CheckOptions,
    th: &Thresholds,
) -> Vec<String> {
    let mut out = vec![
        "Equilibrium of a well-mixed liquid with its headspace; the headspace starts as air at 1 atm and each volatile form shares its moles with it by Henry's law on the molal scale (ammonia with its own activity in concentrated solution).".to_string(),
        format!(
            "Activity coefficients by the Davies equation while the ionic strength stays below {dilute} mol/kg; above it by Pitzer's ion-interaction equations (pairs of cation and anion, no mixing terms) for the ions their parameters name and the extended Debye–Hückel form for the others, passing over from Davies between {dilute} and {} mol/kg. Water's activity from the same equations enters Kw, the steps that take up water (CO2 to bicarbonate) and the vapour pressure. Dissolved gases are salted out by the Weisenberger–Schumpe method; a gas with no parameters of its own takes an upper estimate. Beyond the range a mixture's parameters were fitted to, the coefficients are held at their value at the highest fitted ionic strength.",
            2.0 * cat.pitzer.dilute_below,
            dilute = cat.pitzer.dilute_below,
        ),
        "Constants adjusted to the mixture temperature by the van 't Hoff equation with each step's ionization enthalpy; Kw from its temperature equation.".to_string(),
        "Heat: proton transfers by Hess's law from each step's ionization enthalpy (25 °C values, no heat-capacity change), plus each concentrated reagent's heat of dilution from the water it had to the water of the mixture (integral heats of dilution); the mixture's mass from the density tables, warming as water does (4.18 J/(g K)) from the volume-weighted mean of the two temperatures, re-solved at the temperature it reaches.".to_string(),
        format!(
            "Boiling: the liquid boils where its vapour pressure (water by its activity from the ions, Raoult's law in dilute mixtures; dissolved gases from the speciation; solvents by Henry's law or as a layer of their own) reaches the {} kPa over it; close to boiling within {} K of that.",
            crate::basics::text::fixed(cat.physical.p_std / 1e3, 1),
            th.heat.boiling_margin_k
        ),
        "Pressure in a sealed vessel: the gases the liquid gives off, plus the warming of the air sealed in at the start and the change of water's vapour pressure; vented and open vessels hold no pressure and the report gives the litres vented.".to_string(),
        "Metal cyanide, ammine, EDTA, citrate and hydroxo complexes are computed at equilibrium; so are the metal hydroxides (and silver and mercury oxides), which take their metal out of the liquid where it is saturated with them. Chloro complexes and other solids (sulfides, carbonates, copper(I) cyanide) are not computed, which errs towards more free metal and free cyanide. Hexacyanoferrates and cyanoaurate are counted as they are: they release HCN only slowly, with acid, heat or light.".to_string(),
        "The other order of pouring is computed in the same vessel with the same closure.".to_string(),
    ];
    if let Some(t) = opts.temperature_k {
        out.push(format!(
            "Temperature set on the command line: {:.1} °C for both batches.",
            t - 273.15
        ));
    }
    for b in [container, stream] {
        for c in &b.components {
            out.extend(crate::pour::batch::beyond_solubility(cat, c, b.volume_l));
        }
        if !b.temperature_given && opts.temperature_k.is_none() {
            out.push(format!("`{}` has no temperature: 25 °C assumed.", b.name));
        }
        let comp = b.composition(cat);
        let uses_ww = b.components.iter().any(|c| {
            matches!(
                c.amount,
                crate::basics::quantity::Amount::PercentWeightPerWeight(_)
            )
        });
        if uses_ww && !b.density_given {
            out.push(format!(
                "`{}` gives % w/w amounts: its density, {} g/mL, comes from the density tables of its solutes.",
                b.name,
                crate::basics::text::fixed(comp.density_g_per_ml, 3)
            ));
        }
        if comp.untabled_share > UNTABLED_NOTE_SHARE && !b.density_given {
            out.push(format!(
                "`{}`: {} % of its mass is in solutes with no density table, taken to occupy the volume of their neat liquid or of water; its mass and water are estimates.",
                b.name,
                crate::basics::text::fixed(comp.untabled_share * 100.0, 0)
            ));
        }
        if comp.water_g < MOSTLY_WATER_KG_PER_L * 1e3 * b.volume_l && b.volume_l > 0.0 {
            out.push(format!(
                "`{}` holds {} kg of water per litre: the liquid is mostly something else, and the aqueous model (Henry's law, pKa, activity) is stretched; treat its figures as rough.",
                b.name,
                crate::basics::text::fixed(comp.water_g / 1e3 / b.volume_l, 2)
            ));
        }
    }
    out.push(format!(
        "Room: a well-mixed room ({} m3, {} air changes per hour unless --room and --air-changes say otherwise; {}); evaporation from the open surface by the EPA RMP equation D-1 with the gas's partial pressure over the liquid; the room's steady state takes that rate as constant (no depletion), which overstates what a dilute solution gives off; the worst case releases the headspace at once and adds what evaporates over {} min ({}) as the liquid runs out of gas, all of it spread through the room with no credit for ventilation.",
        th.room.volume_m3,
        th.room.air_changes_per_hour,
        th.room.basis,
        th.room.exposure_window_min,
        th.room.window_basis
    ));
    match container.closure {
        Closure::Sealed => {}
        Closure::Vented => out.push("Vented container: gas above atmospheric pressure leaves through the vent, so no overpressure builds; the headspace figures are those just above the liquid.".into()),
        Closure::Open => out.push("Open container: the liquid is taken to keep its gas, and the headspace figure is the concentration in air in equilibrium with the liquid surface, the most a person at the opening could meet.".into()),
    }
    out
}
