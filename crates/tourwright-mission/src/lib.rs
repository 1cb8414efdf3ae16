//! The domain: a mission design (the file model), what it implies (`evaluate`), launch and
//! arrival figures, files and exports. Knows nothing of search or of any user interface.
//!
//! Preliminary design only: patched conics with mean-element ephemerides. Confirm every figure in
//! high-fidelity, independently verified tools before any commitment.

pub mod arrival;
pub mod design;
pub mod evaluate;
pub mod export;
pub mod files;
pub mod launch;
pub mod retarget;

pub use design::MissionDesign;
pub use evaluate::{Evaluation, evaluate, evaluate_into};

/// The program's version (one version for the whole workspace).
pub const VERSION: &str = env!("CARGO_PKG_VERSION");

/// The caution shown in the README, the CLI and the program's help.
pub const CAUTION: &str = "Preliminary design only: patched conics with analytic mean-element \
ephemerides. Confirm every figure in high-fidelity, independently verified tools before any \
commitment; flight operations follow the responsible agency's rules and licensed practice.";
