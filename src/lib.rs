//! Tourwright: the workbench (`gui`) and the command line (`cli`) over the engine crates
//! `tourwright-astro` (physics), `tourwright-mission` (designs and their evaluation) and
//! `tourwright-search` (window maps, optimiser, explorer, direct-transfer search).
//!
//! Preliminary design only: patched conics and impulsive manoeuvres. Confirm every figure in
//! high-fidelity, independently verified tools before any commitment.

pub mod cli;
pub mod gui;

pub use tourwright_astro as astro;
pub use tourwright_mission as mission;
pub use tourwright_search as search;

pub use tourwright_mission::{CAUTION, VERSION};
