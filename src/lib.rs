//! Tourwright: a patched-conic engine and workbench for designing gravity-assist tours.
//!
//! Layers, with dependencies pointing one way: [`astro`] (physics) <- [`mission`] (designs and
//! their evaluation) <- [`search`] (window maps, optimiser, sequence explorer) <- `gui` and `cli`.
//!
//! Preliminary design only: patched conics with mean-element ephemerides. Confirm every figure in
//! high-fidelity, independently verified tools before any commitment.

pub mod astro;
pub mod cli;
pub mod gui;
pub mod mission;
pub mod search;

/// The engine's version (from Cargo.toml).
pub const VERSION: &str = env!("CARGO_PKG_VERSION");

/// The caution shown in the README, the CLI and the program's help.
pub const CAUTION: &str = "Preliminary design only: patched conics with analytic mean-element \
ephemerides. Confirm every figure in high-fidelity, independently verified tools before any \
commitment; flight operations follow the responsible agency's rules and licensed practice.";
