//! What a person in the room would breathe: the worst case that can happen (the headspace
//! released at once, then evaporation from the open surface or a spill over the exposure
//! window, the liquid running out of gas as it goes, all of it spread through the room),
//! and evaporation from an open surface into a ventilated, well-mixed room.
//!
//! Well-mixed room model (AIHA, Mathematical Models for Estimating Occupational Exposure
//! to Chemicals, 2nd ed., 2009, ch. 6): C(t) = (G/Q)(1 − exp(−Q t / V)), steady state
//! C = G/Q, with G the emission rate, Q the ventilation rate and V the room volume.

use crate::catalog::Catalog;
use crate::chem::Equilibrium;
use serde::Serialize;

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RoomSettings {
    pub volume_m3: f64,
    pub air_changes_per_hour: f64,
    /// Air speed over the liquid surface, m/s.
    pub air_speed_m_per_s: f64,
    /// Area of liquid exposed to the room, m2.
    pub surface_area_m2: f64,
    /// Where the area came from, in words.
    pub surface_basis: String,
    /// Minutes of evaporation the worst case counts.
    pub exposure_window_min: f64,
    /// Which worst case applies, in words (opened after standing sealed, vented, open, spill).
    pub worst_case: String,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RoomGasReport {
    pub formula: String,
    /// Moles in volatile form, in the liquid and the headspace together.
    pub releasable_mol: f64,
    /// Moles in the headspace, released at once when the vessel is opened or vents.
    pub headspace_mol: f64,
    /// Moles that evaporate from the surface over the exposure window, the liquid running
    /// out of gas as it goes.
    pub evaporated_mol: f64,
    /// The headspace and the evaporated gas spread through the room (no credit for
    /// ventilation during the window), ppm.
    pub worst_case_room_ppm: f64,
    pub worst_case_idlh_ratio: Option<f64>,
    pub worst_case_limit_ratio: Option<f64>,
    /// Evaporation from the open surface, mg/min.
    pub emission_mg_per_min: f64,
    /// Steady-state room concentration from that emission, ppm.
    pub steady_state_ppm: f64,
    pub steady_state_limit_ratio: Option<f64>,
    pub steady_state_idlh_ratio: Option<f64>,
    /// Minutes until the room reaches the short-term level and the IDLH (None: never).
    pub minutes_to_short_term: Option<f64>,
    pub minutes_to_idlh: Option<f64>,
    /// Minutes the releasable amount lasts at this emission rate (None: no emission).
    pub source_lasts_min: Option<f64>,
}

/// Ventilation rate, m3/s.
pub fn ventilation_m3_per_s(r: &RoomSettings) -> f64 {
    r.volume_m3 * r.air_changes_per_hour / 3600.0
}

/// Steady-state concentration (kg/m3) for an emission `g` (kg/s).
pub fn steady_state(g_kg_per_s: f64, r: &RoomSettings) -> f64 {
    g_kg_per_s / ventilation_m3_per_s(r)
}

/// Concentration (kg/m3) after `t_s` seconds of constant emission into clean air.
pub fn concentration_after(g_kg_per_s: f64, r: &RoomSettings, t_s: f64) -> f64 {
    let q = ventilation_m3_per_s(r);
    g_kg_per_s / q * (1.0 - (-q * t_s / r.volume_m3).exp())
}

/// Seconds to reach `c` (kg/m3) from clean air, or None when the steady state stays below.
pub fn time_to_reach(g_kg_per_s: f64, r: &RoomSettings, c: f64) -> Option<f64> {
    let q = ventilation_m3_per_s(r);
    let css = g_kg_per_s / q;
    (c < css).then(|| -(r.volume_m3 / q) * (1.0 - c / css).ln())
}

/// A liquid surface estimated from a vessel's capacity: a cylinder 1.5 times as tall as
/// it is wide, open at the top.
pub fn surface_from_capacity(capacity_l: f64) -> f64 {
    let v = capacity_l / 1e3;
    let d = (4.0 * v / (1.5 * std::f64::consts::PI)).cbrt();
    std::f64::consts::PI * d * d / 4.0
}

/// Converts kg/m3 of a gas of molar mass `mw` (g/mol) to ppm by volume at `t_k`, 1 atm.
fn to_ppm(cat: &Catalog, kg_per_m3: f64, mw: f64, t_k: f64) -> f64 {
    kg_per_m3 * 1e3 / mw * cat.physical.r * t_k / cat.physical.p_std * 1e6
}

/// Moles that leave `in_liquid_mol` of a volatile form over `window_s`, when it starts to
/// evaporate at `emission_kg_per_s` and the rate falls in proportion to what is left
/// (first-order depletion: N(t) = N0 exp(−k t), k = G0 / (N0 M)).
pub fn evaporated_mol(in_liquid_mol: f64, emission_kg_per_s: f64, mw: f64, window_s: f64) -> f64 {
    if in_liquid_mol <= 0.0 || emission_kg_per_s <= 0.0 {
        return 0.0;
    }
    let k = emission_kg_per_s / (in_liquid_mol * mw / 1e3);
    in_liquid_mol * -(-k * window_s).exp_m1()
}

/// Room figures for every gas of a state.
pub fn room_report(cat: &Catalog, eq: &Equilibrium, r: &RoomSettings) -> Vec<RoomGasReport> {
    let t_k = eq.temperature_k;
    let mut out = Vec::new();
    for g in &eq.gases {
        let (releasable, mw) = if g.from_combined {
            let c = eq.combined.iter().find(|c| c.formula == g.gas);
            match c {
                Some(c) => (
                    c.concentration * eq.liquid_l + c.moles_in_gas,
                    cat.combined[c.catalog_index].data.molar_mass,
                ),
                None => continue,
            }
        } else {
            let fam = cat.family(g.family);
            let Some(idx) = fam.volatile_index() else {
                continue;
            };
            let dissolved = eq
                .family(g.family)
                .map(|f| f.concentrations[idx] * eq.liquid_l)
                .unwrap_or(0.0);
            (dissolved + g.moles_in_gas, fam.species[idx].molar_mass)
        };
        if releasable <= 0.0 {
            continue;
        }
        let levels = cat.judged_levels(&g.gas);
        let emission = cat.physical.evaporation_kg_per_s(
            mw,
            g.partial_pressure_pa,
            r.surface_area_m2,
            t_k,
            r.air_speed_m_per_s,
        );
        let in_liquid = (releasable - g.moles_in_gas).max(0.0);
        let evaporated = evaporated_mol(in_liquid, emission, mw, r.exposure_window_min * 60.0);
        let released = g.moles_in_gas + evaporated;
        let worst_ppm = released * cat.physical.r * t_k / cat.physical.p_std / r.volume_m3 * 1e6;
        if worst_ppm < 1e-6 && releasable * cat.physical.r * t_k / cat.physical.p_std < 1e-12 {
            // Below anything a report shows; the headspace tables apply the same floor.
            continue;
        }
        let css_ppm = to_ppm(cat, steady_state(emission, r), mw, t_k);
        let ppm_to_kg =
            |ppm: f64| ppm / 1e6 * cat.physical.p_std / (cat.physical.r * t_k) * mw / 1e3;
        let lasts_min = (emission > 0.0).then(|| releasable * mw / 1e3 / emission / 60.0);
        // A level the room reaches only after the source has run out is never reached.
        let minutes = |ppm: Option<f64>| {
            ppm.and_then(|p| time_to_reach(emission, r, ppm_to_kg(p)))
                .map(|s| s / 60.0)
                .filter(|m| lasts_min.is_some_and(|l| *m <= l))
        };
        out.push(RoomGasReport {
            formula: g.gas.to_string(),
            releasable_mol: releasable,
            headspace_mol: g.moles_in_gas,
            evaporated_mol: evaporated,
            worst_case_room_ppm: worst_ppm,
            worst_case_idlh_ratio: levels.as_ref().map(|l| worst_ppm / l.stop_ppm),
            worst_case_limit_ratio: levels.as_ref().map(|l| worst_ppm / l.review_ppm),
            emission_mg_per_min: emission * 1e6 * 60.0,
            steady_state_ppm: css_ppm,
            steady_state_limit_ratio: levels.as_ref().map(|l| css_ppm / l.review_ppm),
            steady_state_idlh_ratio: levels.as_ref().map(|l| css_ppm / l.stop_ppm),
            minutes_to_short_term: minutes(levels.as_ref().map(|l| l.review_ppm)),
            minutes_to_idlh: minutes(levels.as_ref().map(|l| l.stop_ppm)),
            source_lasts_min: lasts_min,
        });
    }
    out
}
