//! The Tisserand graph: which heliocentric orbits one swing-by of a planet can reach from another.
//!
//! A swing-by keeps the Tisserand parameter of the spacecraft's orbit with respect to the planet,
//! T = a_p/a + 2 √((a/a_p)(1 − e²)) cos i, and for a planet on a circular orbit in the reference
//! plane |v∞| = v_p √(3 − T) (common practice; the relation follows from the Jacobi integral of
//! the circular restricted three-body problem). So each planet and v∞ level is a contour on the
//! (periapsis radius, apoapsis radius) plane: the orbits whose heliocentric velocity at the
//! planet's distance is the planet's velocity plus a v∞ vector of that length, swept over the
//! pump angle α between v∞ and the planet's velocity.

use crate::constants::AU_KM;
use crate::kepler::Elements;
use crate::{State, Vec3};

/// The Tisserand parameter of an orbit (a, e, i) with respect to a planet on a circular orbit of
/// radius `a_p` (same length unit as `a`).
pub fn parameter(a_p: f64, a: f64, e: f64, i_rad: f64) -> f64 {
    a_p / a + 2.0 * ((a / a_p) * (1.0 - e * e)).max(0.0).sqrt() * i_rad.cos()
}

/// The v∞ (km/s) a Tisserand parameter `t` means at a planet of circular speed `v_p` (km/s);
/// `None` when T > 3 (the orbit cannot reach the planet's distance with any v∞).
pub fn vinf_of(t: f64, v_p: f64) -> Option<f64> {
    (t <= 3.0).then(|| v_p * (3.0 - t).sqrt())
}

/// One point of a contour.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct ContourPoint {
    /// Pump angle between v∞ and the planet's velocity, degrees (0: v∞ along the velocity).
    pub pump_deg: f64,
    /// Periapsis radius, AU.
    pub rp_au: f64,
    /// Apoapsis radius, AU.
    pub ra_au: f64,
    /// Orbital period, days.
    pub period_days: f64,
}

/// A v∞ contour of one planet.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct Contour {
    /// The planet's name.
    pub body: String,
    /// The planet's orbit radius, AU.
    pub a_p_au: f64,
    /// v∞, km/s.
    pub vinf_km_s: f64,
    /// Points in order of pump angle; only bound orbits (hyperbolic ones are left out).
    pub points: Vec<ContourPoint>,
}

/// The (r_p, r_a) of the orbit through radius `r` with heliocentric velocity components
/// `v_t` (along the circular direction) and `v_r` (radial), or `None` when unbound.
fn apsides(r: f64, v_t: f64, v_r: f64, mu_sun: f64) -> Option<(f64, f64, f64)> {
    let s = State {
        r: Vec3::new(r, 0.0, 0.0),
        v: Vec3::new(v_r, v_t, 0.0),
    };
    let el = Elements::from_state(&s, mu_sun).ok()?;
    if !(el.e < 1.0 && el.p > 0.0) {
        return None;
    }
    let a = el.p / (1.0 - el.e * el.e);
    let period = 2.0 * std::f64::consts::PI * (a.powi(3) / mu_sun).sqrt();
    Some((el.p / (1.0 + el.e), el.p / (1.0 - el.e), period))
}

/// The contour of a planet on a circular orbit of radius `a_p_km` at `vinf` (km/s), in `n`
/// pump-angle steps from 0° to 180°.
pub fn contour(body: &str, a_p_km: f64, vinf: f64, mu_sun: f64, n: usize) -> Contour {
    let v_p = (mu_sun / a_p_km).sqrt();
    let n = n.max(2);
    let mut points = Vec::with_capacity(n);
    for j in 0..n {
        let alpha = std::f64::consts::PI * j as f64 / (n - 1) as f64;
        let (s, c) = alpha.sin_cos();
        if let Some((rp, ra, per)) = apsides(a_p_km, v_p + vinf * c, vinf * s, mu_sun) {
            points.push(ContourPoint {
                pump_deg: alpha.to_degrees(),
                rp_au: rp / AU_KM,
                ra_au: ra / AU_KM,
                period_days: per / 86_400.0,
            });
        }
    }
    Contour {
        body: body.to_string(),
        a_p_au: a_p_km / AU_KM,
        vinf_km_s: vinf,
        points,
    }
}

/// Where two contours of different planets cross: one orbit that meets both planets, each with
/// its v∞, i.e. a transfer between them.
#[derive(Clone, Debug, PartialEq)]
pub struct Crossing {
    /// First contour (index into the list given).
    pub a: usize,
    /// Second contour.
    pub b: usize,
    /// Periapsis radius of the shared orbit, AU.
    pub rp_au: f64,
    /// Apoapsis radius, AU.
    pub ra_au: f64,
}

/// Every crossing between contours of different planets (segment intersections in log-radius
/// coordinates, as the graph draws them).
pub fn crossings(contours: &[Contour]) -> Vec<Crossing> {
    let mut out = Vec::new();
    let lg = |p: &ContourPoint| (p.rp_au.log10(), p.ra_au.log10());
    for (i, ci) in contours.iter().enumerate() {
        for (j, cj) in contours.iter().enumerate().skip(i + 1) {
            if ci.body == cj.body {
                continue;
            }
            for si in ci.points.windows(2) {
                let (p1, p2) = (lg(&si[0]), lg(&si[1]));
                for sj in cj.points.windows(2) {
                    let (q1, q2) = (lg(&sj[0]), lg(&sj[1]));
                    let d = (p2.0 - p1.0) * (q2.1 - q1.1) - (p2.1 - p1.1) * (q2.0 - q1.0);
                    if d.abs() < 1e-15 {
                        continue;
                    }
                    let t = ((q1.0 - p1.0) * (q2.1 - q1.1) - (q1.1 - p1.1) * (q2.0 - q1.0)) / d;
                    let u = ((q1.0 - p1.0) * (p2.1 - p1.1) - (q1.1 - p1.1) * (p2.0 - p1.0)) / d;
                    if (0.0..=1.0).contains(&t) && (0.0..=1.0).contains(&u) {
                        let x = p1.0 + t * (p2.0 - p1.0);
                        let y = p1.1 + t * (p2.1 - p1.1);
                        out.push(Crossing {
                            a: i,
                            b: j,
                            rp_au: 10f64.powf(x),
                            ra_au: 10f64.powf(y),
                        });
                    }
                }
            }
        }
    }
    out
}

/// The (r_p, r_a) in AU of the heliocentric orbit through a state, when bound.
pub fn orbit_point(s: &State, mu_sun: f64) -> Option<(f64, f64)> {
    let el = Elements::from_state(s, mu_sun).ok()?;
    (el.e < 1.0 && el.p > 0.0).then(|| (el.p / (1.0 + el.e) / AU_KM, el.p / (1.0 - el.e) / AU_KM))
}

/// The contours of `bodies` at every v∞ of `vinfs`, with each planet's mean orbit radius and the
/// Sun's μ of the ephemeris model (planets the model lacks are left out).
pub fn contours_for(
    model: &crate::ephemeris::EphemerisModel,
    bodies: &[crate::bodies::Planet],
    vinfs: &[f64],
    n: usize,
) -> Vec<Contour> {
    let mut out = Vec::new();
    for p in bodies {
        let Ok(eph) = model.planet(*p) else { continue };
        for v in vinfs {
            if v.is_finite() && *v > 0.0 {
                out.push(contour(p.name(), eph.a_km(), *v, model.mu_sun(), n));
            }
        }
    }
    out
}
