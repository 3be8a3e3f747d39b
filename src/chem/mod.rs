//! The chemistry: temperature-adjusted constants, activity coefficients, and the
//! equilibrium of a mixed liquid with its headspace. No I/O, no knowledge of files.

pub mod activity;
pub mod mixture;
pub mod pitzer;
pub mod speciation;
pub mod temperature;

pub use mixture::{Closure, Mixture};
pub use speciation::{
    solve, solve_from, ActivityDetail, ActivityModelUsed, Equilibrium, FamilyState, GasState,
    RangeSetBy, SolveError, SolverSettings,
};
