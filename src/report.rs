//! The report model: one structure per check, rendered as a table, markdown or JSON.
//!
//! Field names here are the JSON contract the README documents; renderers never compute
//! chemistry, they only lay this out.

use crate::pour::pairs::Pair;
use serde::Serialize;
use std::fmt;

/// The verdict of a check, and the severity of each finding.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Severity {
    /// A note that does not change the verdict.
    Info,
    Clear,
    Review,
    Stop,
}

impl Severity {
    /// The verdict word for the whole check (an `Info` finding never decides it).
    pub fn verdict(findings: &[Finding]) -> Severity {
        findings
            .iter()
            .map(|f| f.severity)
            .max()
            .unwrap_or(Severity::Clear)
            .max(Severity::Clear)
    }
    /// Process exit status: 0 clear, 3 review, 4 stop.
    pub fn exit_code(self) -> i32 {
        match self {
            Severity::Info | Severity::Clear => 0,
            Severity::Review => 3,
            Severity::Stop => 4,
        }
    }
    pub fn word(self) -> &'static str {
        match self {
            Severity::Info => "info",
            Severity::Clear => "clear",
            Severity::Review => "review",
            Severity::Stop => "stop",
        }
    }
}

impl fmt::Display for Severity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.word())
    }
}

/// What a finding is about.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Default)]
#[serde(rename_all = "lowercase")]
pub enum Scope {
    /// What the pour does: the verdict on making this mixture.
    #[default]
    Pour,
    /// A component's own hazard, present whatever it meets.
    Component,
    /// What the container is already like before anything is added.
    Container,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Finding {
    pub severity: Severity,
    pub code: String,
    pub message: String,
    pub caution: String,
    /// What raised it: "chemistry", or the rule and the file it came from.
    pub origin: String,
    /// What it is about: the pour, a component's own hazard, or the container as it is.
    pub scope: Scope,
}

impl Finding {
    /// A finding of the chemistry about the pour.
    pub fn chemistry(severity: Severity, code: &str, message: String, caution: &str) -> Finding {
        Finding {
            severity,
            code: code.into(),
            message,
            caution: caution.into(),
            origin: "chemistry".into(),
            scope: Scope::Pour,
        }
    }
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GasReport {
    pub formula: String,
    pub partial_pressure_kpa: f64,
    pub headspace_ppm: f64,
    /// The review level (ceiling or STEL, or its stated substitute).
    pub limit_ppm: Option<f64>,
    pub limit_basis: Option<String>,
    pub limit_ratio: Option<f64>,
    pub limit_source: Option<String>,
    /// The stop level (IDLH, or its stated substitute).
    pub idlh_ppm: Option<f64>,
    pub idlh_basis: Option<String>,
    pub idlh_ratio: Option<f64>,
    pub idlh_source: Option<String>,
    /// How the gas does harm: toxic, asphyxiant, flammable.
    pub kinds: Vec<crate::catalog::GasKind>,
    /// Lower flammable limit, ppm, and the headspace's ratio to it (flammable gases).
    pub lfl_ppm: Option<f64>,
    pub lfl_ratio: Option<f64>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StateReport {
    pub ph: f64,
    pub temperature_c: f64,
    pub ionic_strength: f64,
    pub volume_l: f64,
    pub headspace_l: f64,
    /// Absolute pressure in the headspace.
    pub total_pressure_kpa: f64,
    /// Pressure above atmospheric in a sealed vessel: the gases the liquid gives off, the
    /// warming of the air, and water vapour (0 for vented and open vessels).
    pub overpressure_kpa: f64,
    /// Sum of the partial pressures of the gases the liquid gives off.
    pub gas_pressure_kpa: f64,
    /// Vented and open vessels: litres of gas at 1 atm that leave.
    pub vented_gas_l: f64,
    /// Share of the vented gas that is toxic, %.
    pub vented_toxic_percent: f64,
    /// Heat of the pour up to this state and the temperature it reaches.
    pub heat: crate::pour::HeatReport,
    pub activity_model_exceeded: bool,
    /// How the activity coefficients were found for this state.
    pub activity: ActivityReport,
    pub gases: Vec<GasReport>,
    /// How much of each ligand (cyanide, ammonia, EDTA, citrate) metal complexes hold.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub bound_ligands: Vec<BoundLigand>,
    /// Hydroxides and oxides that precipitated: the metal beyond their saturation left the
    /// liquid.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub precipitated: Vec<Precipitated>,
}

/// A solid that formed.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Precipitated {
    pub solid: String,
    /// The metal ion, as written in the data.
    pub metal: String,
    /// mol of metal per litre of liquid that left as the solid.
    pub mol_per_l: f64,
}

/// A ligand in one state: its total, what holds it, and what is left free.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BoundLigand {
    /// The family's id (e.g. `cyanide`).
    pub family: String,
    /// The free ligand species (e.g. `CN-`).
    pub species: String,
    /// mol per litre of liquid, liquid and headspace together.
    pub total_mol_per_l: f64,
    pub bound_percent: f64,
    /// mol/L of the free ligand species in the liquid.
    pub free_mol_per_l: f64,
    /// The complexes that hold it, the largest first (those holding at least 1 %).
    pub held_by: Vec<HeldBy>,
}

/// One complex's share of a ligand.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct HeldBy {
    pub complex: String,
    /// The metal ion, as written in the data (e.g. `Cu+`).
    pub metal: String,
    pub percent: f64,
}

/// The activity model behind one state.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ActivityReport {
    pub model: crate::chem::ActivityModelUsed,
    /// mol/kg of water.
    pub ionic_strength_mol_kg: f64,
    pub water_activity: f64,
    /// The ionic strength (mol/kg) up to which the model holds for this mixture.
    pub holds_to_mol_kg: f64,
    /// Which ions and gases the model for concentrated mixtures treated how.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub detail: Option<crate::chem::ActivityDetail>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WorstStateReport {
    pub fraction_added: f64,
    #[serde(flatten)]
    pub state: StateReport,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ComponentReport {
    pub written: String,
    pub substance: String,
    pub amount: String,
    pub moles: f64,
    pub inert: bool,
    pub classes: Vec<String>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BatchReport {
    pub file: String,
    pub name: String,
    pub volume_l: f64,
    pub capacity_l: Option<f64>,
    pub closure: Option<crate::chem::Closure>,
    pub temperature_c: f64,
    pub components: Vec<ComponentReport>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct OrderReport {
    pub description: String,
    pub worst_state: WorstStateReport,
    /// Highest ratio of any gas to its review level along this order.
    pub worst_limit_ratio: f64,
    /// Each gas at its own worst point along this order (among the states solved).
    pub gas_peaks: Vec<GasPeak>,
    /// Every state solved along this order, by share poured: the data the plots draw.
    pub path: Vec<PathPointReport>,
}

/// One state along a pour.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PathPointReport {
    /// Share of what is being poured that is in, 0-1.
    pub fraction_added: f64,
    pub ph: f64,
    pub temperature_c: f64,
    /// The gases whose peak along the pour is reported (`gas_peaks`), in that order.
    pub gases: Vec<PathGas>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PathGas {
    pub formula: String,
    pub headspace_ppm: f64,
}

/// One gas at its own worst point along a pour.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GasPeak {
    pub formula: String,
    pub fraction_added: f64,
    pub headspace_ppm: f64,
    pub limit_ratio: Option<f64>,
    pub idlh_ratio: Option<f64>,
}

/// What a person in the room would breathe.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RoomSection {
    pub settings: crate::pour::room::RoomSettings,
    /// True when the liquid is open to the room (open or vented container, or a spill).
    pub open_surface_counts: bool,
    pub gases: Vec<crate::pour::room::RoomGasReport>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CheckReport {
    pub tool: &'static str,
    pub version: &'static str,
    pub severity: Severity,
    pub container: BatchReport,
    pub stream: BatchReport,
    pub end_state: StateReport,
    /// The container before anything is added, at its own temperature.
    pub container_alone: StateReport,
    pub worst_state: WorstStateReport,
    pub poured_as_written: OrderReport,
    pub poured_other_way: Option<OrderReport>,
    pub pairs: Vec<Pair>,
    /// Gas released by stoichiometry (hydrogen from metals and hydrides).
    pub stoichiometric_gases: Vec<crate::pour::release::ReleaseReport>,
    pub room: RoomSection,
    pub findings: Vec<Finding>,
    /// Gases the findings name that offgas does not compute (ASCII formulas).
    pub uncomputed_gases: Vec<String>,
    pub inert_components: Vec<String>,
    pub assumptions: Vec<String>,
    pub cautions: Vec<String>,
}
