//! The date optimiser, by concern: [`rng`] (random numbers), [`problem`] (a design as variables,
//! objective and constraints), [`evolve`] (differential evolution and basin hopping), and
//! [`writeback`] (from a design to a search outcome: the start as a candidate, the result
//! written back and judged exactly as `eval` judges it).

pub mod evolve;
pub mod problem;
pub mod rng;
pub mod writeback;

pub use evolve::{
    DEFAULT_EVALS, HopSettings, OptimizeOptions, OptimizeResult, optimize, optimize_from,
};
pub use problem::{
    Constraint, DsmStartVars, DsmVars, Held, Problem, ProblemError, SEARCH_MISS_KM, ShapedVars,
    Workspace, launch_angles, rev_choice,
};
pub use rng::Rng;
pub use writeback::{SearchOutcome, search_design, search_design_held};
