//! Arrival manoeuvres: capture into an orbit or rendezvous.

use crate::design::ArrivalGoal;

/// Δv (km/s) to achieve the arrival goal from v∞ (km/s) at a body of parameter `mu`.
/// Capture: a single impulse at periapsis r_p from the hyperbola into an orbit of eccentricity e:
/// Δv = √(v∞² + 2μ/r_p) − √(μ (1 + e) / r_p).
pub fn arrival_dv(goal: &ArrivalGoal, vinf: f64, mu: f64) -> f64 {
    match *goal {
        ArrivalGoal::FlybyOnly => 0.0,
        ArrivalGoal::Rendezvous => vinf,
        ArrivalGoal::Capture {
            periapsis_radius_km: rp,
            eccentricity: e,
        } => {
            if mu <= 0.0 || rp <= 0.0 {
                return vinf;
            }
            ((vinf * vinf + 2.0 * mu / rp).sqrt() - (mu * (1.0 + e) / rp).sqrt()).max(0.0)
        }
    }
}
