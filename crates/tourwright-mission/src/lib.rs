//! The domain: a mission design (the file model), its edits, the prepared tour, what it implies
//! (`evaluate`), launch and arrival figures, reports, files and exports. Knows nothing of search or of any user interface.
//!
//! Preliminary design only: patched conics and impulsive manoeuvres. Confirm every figure in
//! high-fidelity, independently verified tools before any commitment.

pub mod arrival;
pub mod continuous;
pub mod design;
pub mod edit;
pub mod evaluate;
pub mod export;
pub mod fidelity;
pub mod files;
pub mod invalid;
pub mod launch;
pub mod report;
pub mod retarget;
pub mod rules;
pub mod score;
pub mod tour;

pub use design::MissionDesign;
pub use edit::{Edit, EditError, Schedule, TourShape};
pub use evaluate::{EvalOptions, Evaluation, evaluate, evaluate_design};
pub use score::{Assessment, LimitSet, Objective};
pub use tour::{Body, Catalog, PreparedTour};

/// The program's version (one version for the whole workspace).
pub const VERSION: &str = env!("CARGO_PKG_VERSION");

/// The caution shown in the README, the CLI and the program's help.
pub const CAUTION: &str = "Preliminary design only: patched conics and impulsive manoeuvres, \
converged into one continuous n-body trajectory through every swing-by on request (point masses \
only: no solar pressure, no oblateness, no finite burns; a tour that does not converge is \
reported as such). Confirm every figure in high-fidelity, independently verified tools before \
any commitment; flight operations follow the responsible agency's rules and licensed practice.";
