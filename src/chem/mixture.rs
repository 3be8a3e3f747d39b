//! What is in a vessel: totals by family and strong ion, volumes, temperature.

use crate::catalog::{FamilyId, IonId};
use serde::Serialize;

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, serde::Deserialize, Default)]
#[serde(rename_all = "lowercase")]
pub enum Closure {
    /// Capped: gas builds up in the headspace.
    #[default]
    Sealed,
    /// A vent cap: the headspace stays at 1 atm, gas leaves.
    Vented,
    /// No cap: the liquid meets room air.
    Open,
}

/// The amounts in a vessel. Totals are moles in liquid and headspace together.
#[derive(Debug, Clone, PartialEq)]
pub struct Mixture {
    pub families: Vec<(FamilyId, f64)>,
    pub ions: Vec<(IonId, f64)>,
    pub liquid_l: f64,
    /// kg of water in the liquid (None: not known, taken as a dilute solution).
    pub water_kg: Option<f64>,
    pub headspace_l: f64,
    pub temperature_k: f64,
    pub closure: Closure,
}

impl Mixture {
    pub fn empty(temperature_k: f64, closure: Closure) -> Self {
        Mixture {
            families: Vec::new(),
            ions: Vec::new(),
            liquid_l: 0.0,
            water_kg: None,
            headspace_l: 0.0,
            temperature_k,
            closure,
        }
    }

    pub fn add_family(&mut self, id: FamilyId, mol: f64) {
        match self.families.iter_mut().find(|(f, _)| *f == id) {
            Some((_, n)) => *n += mol,
            None => {
                self.families.push((id, mol));
                self.families.sort_by_key(|(f, _)| *f);
            }
        }
    }

    pub fn add_ion(&mut self, id: IonId, mol: f64) {
        match self.ions.iter_mut().find(|(f, _)| *f == id) {
            Some((_, n)) => *n += mol,
            None => {
                self.ions.push((id, mol));
                self.ions.sort_by_key(|(f, _)| *f);
            }
        }
    }

    /// `self` with `fraction` of `other` poured in, in a vessel of `capacity_l`.
    ///
    /// The temperature is the volume-weighted mean (heat of reaction is not counted here).
    pub fn pour(&self, other: &Mixture, fraction: f64, capacity_l: f64) -> Mixture {
        let mut m = self.clone();
        for &(f, n) in &other.families {
            m.add_family(f, n * fraction);
        }
        for &(i, n) in &other.ions {
            m.add_ion(i, n * fraction);
        }
        let added = other.liquid_l * fraction;
        let liquid = self.liquid_l + added;
        if liquid > 0.0 {
            m.temperature_k =
                (self.temperature_k * self.liquid_l + other.temperature_k * added) / liquid;
        }
        m.liquid_l = liquid;
        m.water_kg = match (self.water_kg, other.water_kg) {
            (Some(a), Some(b)) => Some(a + b * fraction),
            _ => None,
        };
        m.headspace_l = (capacity_l - liquid).max(0.0);
        m
    }
}
