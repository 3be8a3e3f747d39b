//! `procedure`: a cleaning or decontamination procedure checked step by step.
//!
//! A procedure file names a vessel (what it holds at the start, including a heel) and
//! ordered steps: add a batch, drain to a hold-up, rinse (add, then drain), hold at a
//! temperature. The vessel's contents are carried through every step, and every addition
//! gets the full check against what is in the vessel at that moment.

pub mod fix;
mod parse;
pub mod run;

use crate::pour::batch::Batch;

/// How much a drain leaves behind.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Leave {
    Litres(f64),
    /// A share of what is there, 0–1.
    Fraction(f64),
    /// Take this many litres out.
    Remove(f64),
}

#[derive(Debug, Clone, PartialEq)]
pub enum StepKind {
    Add(Batch),
    Drain(Leave),
    Rinse {
        with: Batch,
        times: u32,
        leave: Leave,
    },
    Hold {
        minutes: Option<f64>,
        temperature_k: Option<f64>,
    },
}

#[derive(Debug, Clone, PartialEq)]
pub struct Step {
    pub number: usize,
    pub description: String,
    pub kind: StepKind,
    pub line: Option<usize>,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Procedure {
    pub file: String,
    pub name: String,
    pub vessel: Batch,
    pub steps: Vec<Step>,
}
