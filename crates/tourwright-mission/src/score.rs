//! The one scoring type: what a search minimises and what the direct-transfer comparison ranks
//! by. Every value is "smaller is better" (delivered mass is negated).

use serde::{Deserialize, Serialize};

use crate::evaluate::Evaluation;

/// A figure of merit of an evaluated tour.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default, Hash)]
pub enum Objective {
    /// Launch v∞ plus every spacecraft Δv (the usual multiple-gravity-assist measure), km/s.
    #[default]
    TotalDvWithLaunchVinf,
    /// Spacecraft Δv only, with C3 held under the design's limit, km/s.
    SpacecraftDv,
    /// Mass delivered with the launch vehicle (maximised), kg.
    DeliveredMass,
    /// Launch C3 (minimised), km²/s².
    LaunchC3,
    /// Total time of flight (minimised), days.
    TimeOfFlight,
}

impl Objective {
    /// Every objective, for menus.
    pub const ALL: [Objective; 5] = [
        Objective::TotalDvWithLaunchVinf,
        Objective::SpacecraftDv,
        Objective::DeliveredMass,
        Objective::LaunchC3,
        Objective::TimeOfFlight,
    ];

    /// Words for tables and menus.
    pub fn label(self) -> &'static str {
        match self {
            Objective::TotalDvWithLaunchVinf => "launch v∞ + spacecraft Δv",
            Objective::SpacecraftDv => "spacecraft Δv",
            Objective::DeliveredMass => "delivered mass",
            Objective::LaunchC3 => "launch C3",
            Objective::TimeOfFlight => "time of flight",
        }
    }

    /// Unit of [`Objective::display_value`].
    pub fn unit(self) -> &'static str {
        match self {
            Objective::TotalDvWithLaunchVinf | Objective::SpacecraftDv => "km/s",
            Objective::DeliveredMass => "kg",
            Objective::LaunchC3 => "km²/s²",
            Objective::TimeOfFlight => "days",
        }
    }

    /// True when a launch vehicle table is needed.
    pub fn needs_vehicle(self) -> bool {
        self == Objective::DeliveredMass
    }

    /// Score of an evaluation (smaller is better; delivered mass negated). Incomplete
    /// evaluations score `f64::INFINITY`.
    pub fn value(self, e: &Evaluation) -> f64 {
        if !e.complete {
            return f64::INFINITY;
        }
        let v = match self {
            Objective::TotalDvWithLaunchVinf => e.launch.vinf + e.ledger.total_dv_km_s,
            Objective::SpacecraftDv => e.ledger.total_dv_km_s,
            Objective::DeliveredMass => -e.ledger.delivered_mass_kg.unwrap_or(0.0),
            Objective::LaunchC3 => e.launch.c3,
            Objective::TimeOfFlight => e.total_tof_days(),
        };
        if v.is_finite() { v } else { f64::INFINITY }
    }

    /// The score as a designer reads it (delivered mass positive again).
    pub fn display_value(self, score: f64) -> f64 {
        if self == Objective::DeliveredMass {
            -score
        } else {
            score
        }
    }
}
