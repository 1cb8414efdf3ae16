//! The domain: a mission design (the file model), what it implies (`evaluate`), launch and
//! arrival figures, the direct-transfer baseline, files and exports.

pub mod arrival;
pub mod design;
pub mod direct;
pub mod evaluate;
pub mod export;
pub mod files;
pub mod launch;
pub mod retarget;

pub use design::MissionDesign;
pub use evaluate::{Evaluation, evaluate, evaluate_into};
