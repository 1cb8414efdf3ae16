//! Scoring: how an [`Objective`] is read off an evaluation, and the [`Assessment`] of a design —
//! its objective exactly as `eval` computes it and every limit it breaks. The optimiser, the
//! explorer, the direct-transfer comparison, the CLI and the workbench all judge designs through
//! this one place, so "meets every limit" means the same everywhere. Every value is "smaller is
//! better" (delivered mass is negated).

use crate::evaluate::{Evaluation, Warning};

pub use crate::design::Objective;

impl Objective {
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
}

/// Which limits an assessment holds a design to.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct LimitSet {
    /// Hold the spacecraft's masses as limits (propellant, launch-vehicle capacity, C3 inside
    /// the vehicle's table). Off only where the masses are not the designer's (a survey from a
    /// blank template).
    pub masses: bool,
}

impl Default for LimitSet {
    fn default() -> Self {
        LimitSet { masses: true }
    }
}

impl LimitSet {
    /// Every limit of the design.
    pub const ALL: LimitSet = LimitSet { masses: true };
    /// Every limit except the spacecraft's masses.
    pub const TRAJECTORY: LimitSet = LimitSet { masses: false };

    /// True when `w` is a limit of this set that the design breaks, or a failure to evaluate.
    pub fn counts(&self, w: &Warning) -> bool {
        w.is_failure() || (w.is_limit() && (self.masses || !w.is_mass_limit()))
    }
}

/// A design judged: its objective and every limit it breaks.
#[derive(Clone, Debug, PartialEq)]
pub struct Assessment {
    /// The objective it is judged by.
    pub objective: Objective,
    /// The objective's score (smaller is better; infinite when the tour cannot be evaluated).
    pub score: f64,
    /// Every broken limit (and every reason the tour cannot be evaluated), in the evaluation's
    /// order.
    pub breaches: Vec<Warning>,
}

impl Assessment {
    /// Judge an evaluation by `objective` and the limits of `limits`.
    pub fn of(objective: Objective, e: &Evaluation, limits: LimitSet) -> Assessment {
        let mut breaches: Vec<Warning> = e
            .warnings
            .iter()
            .filter(|w| limits.counts(w))
            .cloned()
            .collect();
        if !e.complete && breaches.is_empty() {
            breaches.push(Warning::NotFinite {
                what: "the tour (it is incomplete)",
            });
        }
        Assessment {
            objective,
            score: objective.value(e),
            breaches,
        }
    }

    /// True when the design meets every limit and has a value.
    pub fn feasible(&self) -> bool {
        self.breaches.is_empty() && self.score.is_finite()
    }

    /// The objective as a designer reads it (delivered mass positive).
    pub fn display_value(&self) -> f64 {
        self.objective.display_value(self.score)
    }

    /// "launch v∞ + spacecraft Δv 7.8852 km/s".
    pub fn value_text(&self) -> String {
        format!(
            "{} {}",
            self.objective.label(),
            self.objective.text(self.score)
        )
    }

    /// "meets every limit" or "breaks 2 limits".
    pub fn limits_text(&self) -> String {
        match self.breaches.len() {
            0 => "meets every limit".into(),
            1 => "breaks 1 limit".into(),
            n => format!("breaks {n} limits"),
        }
    }

    /// Each broken limit in words, with by how much.
    pub fn breach_lines(&self) -> Vec<String> {
        self.breaches.iter().map(breach_text).collect()
    }
}

/// One broken limit in words: the warning and, where it has a measure, by how much.
pub fn breach_text(w: &Warning) -> String {
    match w.excess() {
        Some((x, unit)) => {
            let p = if x.abs() >= 100.0 {
                0
            } else if x.abs() >= 1.0 {
                2
            } else {
                4
            };
            format!("{w} (by {x:.p$} {unit})")
        }
        None => w.to_string(),
    }
}
