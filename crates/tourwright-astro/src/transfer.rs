//! Idealised transfers between circular coplanar orbits about the Sun (reference figures).

use crate::constants::{DAY_S, MU_SUN};

/// Idealised Hohmann transfer between circular coplanar orbits at the two bodies' mean distances.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct Hohmann {
    /// v∞ at departure, km/s.
    pub vinf_depart: f64,
    /// v∞ at arrival, km/s.
    pub vinf_arrive: f64,
    /// Time of flight, days.
    pub tof_days: f64,
}

/// Hohmann figures between circular orbits of radii r1 and r2 (km) about the Sun.
pub fn hohmann(r1: f64, r2: f64) -> Hohmann {
    let a = 0.5 * (r1 + r2);
    let v1 = (MU_SUN / r1).sqrt() * ((2.0 * r2 / (r1 + r2)).sqrt() - 1.0);
    let v2 = (MU_SUN / r2).sqrt() * (1.0 - (2.0 * r1 / (r1 + r2)).sqrt());
    Hohmann {
        vinf_depart: v1.abs(),
        vinf_arrive: v2.abs(),
        tof_days: std::f64::consts::PI * (a * a * a / MU_SUN).sqrt() / DAY_S,
    }
}
