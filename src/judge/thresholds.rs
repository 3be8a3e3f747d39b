//! Verdict thresholds and report wording from `rules/thresholds.yaml`.

use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Thresholds {
    #[allow(dead_code)]
    pub description: String,
    /// What the numbers are counted in, in words (documentation for the reader; the
    /// bundled thresholds are stored in the program's binary data image, which needs a
    /// fixed type here).
    #[allow(dead_code)]
    pub units: BTreeMap<String, String>,
    pub gas: GasThresholds,
    pub sealed_overpressure: Overpressure,
    pub activity_model: ActivityModel,
    pub proton_transfer: ProtonTransfer,
    pub mixing_path: MixingPath,
    pub pour_change: PourChange,
    pub flammable_gas: FlammableGas,
    pub heat: HeatThresholds,
    pub room: RoomDefaults,
    pub storeroom: Storeroom,
    pub cautions: Vec<String>,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct GasThresholds {
    /// Review when headspace ppm reaches this fraction of the short-term level.
    pub review_fraction_of_short_term: f64,
    /// Stop when headspace ppm reaches this fraction of the IDLH.
    pub stop_fraction_of_idlh: f64,
    /// A gas with no exposure level at all is reviewed above this concentration.
    pub unknown_level_floor_ppm: f64,
    pub basis: String,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Overpressure {
    pub review_kpa: f64,
    pub stop_kpa: f64,
    pub basis: String,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct ActivityModel {
    pub max_ionic_strength: f64,
    pub basis: String,
    /// Past the ionic strength up to which the activity model holds for a mixture, a computed
    /// partial pressure may be off by up to 10^(uncertainty_per_mol_l × (I − that)).
    pub uncertainty_per_mol_l: f64,
    pub uncertainty_basis: String,
}

impl ActivityModel {
    /// The factor a computed partial pressure may be off by at ionic strength `i`, for a
    /// model that holds up to `holds_to` (both mol/kg).
    pub fn uncertainty_factor(&self, i: f64, holds_to: f64) -> f64 {
        10f64.powf(self.uncertainty_per_mol_l * (i - holds_to).max(0.0))
    }
}

/// How a pour is told apart from what the container already does.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct PourChange {
    /// A gas already at a level in the container counts against the pour only when the
    /// pour makes it this many times worse.
    pub clearly_worse_factor: f64,
    pub basis: String,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct ProtonTransfer {
    pub complete_above_log_k: f64,
    pub negligible_below_log_k: f64,
    pub basis: String,
}

// The build script compiles this file without the engine; `offgas_whole_crate` is set for
// the crate only.
#[cfg(offgas_whole_crate)]
impl From<&ProtonTransfer> for crate::pour::pairs::ExtentBounds {
    fn from(p: &ProtonTransfer) -> Self {
        crate::pour::pairs::ExtentBounds {
            complete_above_log_k: p.complete_above_log_k,
            negligible_below_log_k: p.negligible_below_log_k,
        }
    }
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct HeatThresholds {
    pub review_rise_k: f64,
    pub stop_rise_k: f64,
    pub review_final_c: f64,
    pub stop_final_c: f64,
    pub boiling_margin_k: f64,
    pub basis: String,
    pub boiling_basis: String,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Storeroom {
    /// Area a leak on a tray spreads over, m2.
    pub spill_area_m2: f64,
    /// Free places assumed in a tray whose capacity the inventory does not give.
    pub spare_places_per_tray: usize,
    pub basis: String,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RoomDefaults {
    pub volume_m3: f64,
    pub air_changes_per_hour: f64,
    pub air_speed_m_per_s: f64,
    pub basis: String,
    /// Minutes of evaporation counted in the room's worst case (the short-term level's
    /// averaging time).
    pub exposure_window_min: f64,
    pub window_basis: String,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct FlammableGas {
    /// Review when the headspace reaches this fraction of the lower flammable limit.
    pub review_fraction_of_lfl: f64,
    pub stop_fraction_of_lfl: f64,
    pub basis: String,
}

#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct MixingPath {
    /// The other order is advised when its worst state is this many times lower.
    pub safer_order_factor: f64,
}

impl Thresholds {
    pub fn parse(file: &str, text: &str) -> Result<Thresholds, String> {
        crate::basics::input_shape::check_yaml_shape(
            file,
            text,
            crate::basics::input_shape::MAX_FILE_BYTES,
        )
        .map_err(|e| e.to_string())?;
        let t: Thresholds = serde_yaml::from_str(text).map_err(|e| {
            let at = e
                .location()
                .map(|l| format!(":{}", l.line()))
                .unwrap_or_default();
            format!("{file}{at}: not a readable thresholds file: {e}")
        })?;
        let g = &t.gas;
        let ok = g.review_fraction_of_short_term > 0.0
            && g.stop_fraction_of_idlh > 0.0
            && g.unknown_level_floor_ppm >= 0.0
            && t.sealed_overpressure.review_kpa > 0.0
            && t.sealed_overpressure.stop_kpa >= t.sealed_overpressure.review_kpa
            && t.activity_model.max_ionic_strength > 0.0
            && t.proton_transfer.complete_above_log_k > t.proton_transfer.negligible_below_log_k
            && t.mixing_path.safer_order_factor >= 1.0
            && t.pour_change.clearly_worse_factor >= 1.0
            && t.activity_model.uncertainty_per_mol_l >= 0.0
            && t.room.exposure_window_min > 0.0
            && t.flammable_gas.review_fraction_of_lfl > 0.0
            && t.flammable_gas.stop_fraction_of_lfl >= t.flammable_gas.review_fraction_of_lfl
            && t.heat.stop_rise_k >= t.heat.review_rise_k
            && t.heat.review_rise_k > 0.0
            && t.heat.stop_final_c >= t.heat.review_final_c
            && t.heat.boiling_margin_k >= 0.0
            && t.room.volume_m3 > 0.0
            && t.room.air_changes_per_hour > 0.0
            && t.room.air_speed_m_per_s > 0.0
            && t.storeroom.spill_area_m2 > 0.0;
        if !ok {
            return Err(format!(
                "{file}: thresholds must be positive, stop levels at or above review levels, and the safer-order factor at least 1"
            ));
        }
        Ok(t)
    }
}
