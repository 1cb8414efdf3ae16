//! The n-body fidelity check: how far the patched-conic tour drifts once the planets pull on it
//! along the way.
//!
//! Each leg is propagated from its departure state (after launch, swing-by or deep-space
//! manoeuvre, as the evaluation gives it) under the Sun and every planet of the design's
//! ephemeris source as point masses (`tourwright_astro::nbody`), to the next stop's epoch. The
//! leg's own departure and arrival bodies are left out of the sum: their gravity is what the
//! patched-conic hyperbolas at each end already model (adding it to a heliocentric arc that
//! starts at the planet's centre would count it twice). So the check measures what patched
//! conics leave out: every other body's pull along the way. Per
//! encounter it reports the miss at that epoch (and its B-plane components, B·T and B·R, in the
//! frame of the patched-conic incoming v∞), the change in v∞, and the departure Δv correction
//! that removes the miss (Newton shooting on the departure velocity with the same propagator).

use tourwright_astro::bodies::Planet;
use tourwright_astro::nbody::{self, NBodyError, NBodyOptions, Perturber, PerturberSource};
use tourwright_astro::time::Tdb;
use tourwright_astro::{State, Vec3};

use crate::evaluate::Evaluation;
use crate::tour::{BodyEphemeris, PreparedTour};

/// Settings of the check.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct FidelityOptions {
    /// Integrator tolerances and output.
    pub integration: NBodyOptions,
    /// Scale every perturbing body's μ by this (1 for the real solar system; 0 reduces the check
    /// to two-body motion, which tests use as an identity).
    pub mass_scale: f64,
    /// Shooting: most Newton iterations, and the miss (km) that counts as removed.
    pub max_iterations: usize,
    /// Miss that counts as removed, km (at least 1e-7 of the body's distance from the Sun).
    pub miss_tolerance_km: f64,
}

impl Default for FidelityOptions {
    fn default() -> Self {
        FidelityOptions {
            integration: NBodyOptions {
                samples: 160,
                ..Default::default()
            },
            mass_scale: 1.0,
            max_iterations: 20,
            miss_tolerance_km: 1.0,
        }
    }
}

/// The check of one encounter (the end of one leg).
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct EncounterCheck {
    /// Leg index (0 = first leg); the encounter is at stop `leg + 1`.
    pub leg: usize,
    /// The body met.
    pub body: String,
    /// Distance between the spacecraft and the body's centre at the stop's epoch, km.
    pub miss_km: f64,
    /// The same under patched conics (0 for targeted legs; a shaped leg's own miss), km.
    pub conic_miss_km: f64,
    /// The miss in the B-plane of the patched-conic incoming v∞: along T (in the ecliptic), km.
    pub b_t_km: f64,
    /// Along R (completing S, T), km.
    pub b_r_km: f64,
    /// Along the incoming asymptote S: ahead (+) or behind (−) the body, km.
    pub along_s_km: f64,
    /// n-body |v∞| minus patched-conic |v∞| at the encounter, km/s.
    pub dvinf_km_s: f64,
    /// The departure Δv correction that removes the miss, km/s (absent when shooting did not
    /// converge).
    pub correction_dv_km_s: Option<f64>,
    /// Newton iterations the shooting took.
    pub iterations: usize,
}

/// The result of the check.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct Fidelity {
    /// One row per encounter.
    pub encounters: Vec<EncounterCheck>,
    /// The n-body arcs, per leg: (instant, heliocentric position).
    pub arcs: Vec<Vec<(Tdb, Vec3)>>,
    /// The perturbing bodies used (names).
    pub bodies: Vec<String>,
    /// Right-hand-side evaluations in all.
    pub evaluations: u64,
}

/// Why the check could not run.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum FidelityError {
    /// The evaluation did not solve this leg.
    #[error("leg {0} is not solved; fix the design first")]
    Unsolved(usize),
    /// The propagation failed on a leg.
    #[error("leg {leg}: {source}")]
    Propagation {
        /// Leg number (1-based).
        leg: usize,
        /// Why.
        source: NBodyError,
    },
}

/// The perturbing bodies of a tour: every planet of its ephemeris source, and user bodies of
/// the tour with a mass.
fn perturbers<'a>(tour: &'a PreparedTour, scale: f64) -> (Vec<Perturber<'a>>, Vec<String>) {
    let mut out = Vec::new();
    let mut names = Vec::new();
    for p in Planet::ALL {
        let Ok(eph) = tour.model.planet(p) else {
            continue;
        };
        let data = tour.model.planet_data(p);
        out.push(Perturber {
            mu: data.mu * scale,
            soi_km: data.soi_km,
            source: PerturberSource::Planet(eph),
        });
        names.push(p.name().to_string());
    }
    let mut seen: Vec<&str> = Vec::new();
    for s in &tour.stops {
        if let BodyEphemeris::User(o) = &s.body.ephemeris {
            if s.body.data.mu > 0.0 && !seen.contains(&&*s.body.name) {
                seen.push(&s.body.name);
                out.push(Perturber {
                    mu: s.body.data.mu * scale,
                    soi_km: s.body.data.soi_km,
                    source: PerturberSource::Other(o),
                });
                names.push(s.body.name.to_string());
            }
        }
    }
    (out, names)
}

/// A flown leg: end state, track, right-hand-side evaluations.
type Flown = (State, Vec<(Tdb, Vec3)>, u32);

/// Propagate leg `k` from `start` (at the leg's departure) with the leg's manoeuvre, if any.
fn fly_leg(
    tour: &PreparedTour,
    e: &Evaluation,
    k: usize,
    start: &State,
    bodies: &[Perturber<'_>],
    opts: &NBodyOptions,
    cancel: &dyn Fn() -> bool,
) -> Result<Flown, NBodyError> {
    let t0 = tour.stops[k].t;
    let t1 = tour.stops[k + 1].t;
    match e.legs[k].dsm {
        Some(m) if m.t.0 > t0.0 && m.t.0 < t1.0 => {
            let share = ((m.t.0 - t0.0) / (t1.0 - t0.0)).clamp(0.0, 1.0);
            let n1 = ((opts.samples as f64 * share).round() as usize).max(2);
            let n2 = opts.samples.saturating_sub(n1).max(2);
            let a = nbody::propagate(
                start,
                t0,
                m.t,
                tour.mu_sun,
                bodies,
                &NBodyOptions {
                    samples: n1,
                    ..*opts
                },
                cancel,
            )?;
            let after = State {
                r: a.end.r,
                v: a.end.v + m.dv,
            };
            let b = nbody::propagate(
                &after,
                m.t,
                t1,
                tour.mu_sun,
                bodies,
                &NBodyOptions {
                    samples: n2,
                    ..*opts
                },
                cancel,
            )?;
            let mut track = a.track;
            track.extend(b.track.into_iter().skip(1));
            Ok((b.end, track, a.evaluations + b.evaluations))
        }
        _ => {
            let p = nbody::propagate(start, t0, t1, tour.mu_sun, bodies, opts, cancel)?;
            Ok((p.end, p.track, p.evaluations))
        }
    }
}

/// The least-squares step for 3×3 `a x = b` through the singular value decomposition, directions
/// with singular values below 1e-6 of the largest left out: a resonant leg (whole revolutions
/// back to the same body) has a direction of departure Δv that barely moves the arrival point,
/// and a plain Newton step along it would be enormous.
fn solve3(a: &[[f64; 3]; 3], b: &[f64; 3]) -> Option<[f64; 3]> {
    let m = nalgebra::Matrix3::from_fn(|i, j| a[i][j]);
    let svd = m.svd(true, true);
    let smax = svd.singular_values.max();
    if !(smax > 0.0 && smax.is_finite()) {
        return None;
    }
    let x = svd
        .solve(&nalgebra::Vector3::new(b[0], b[1], b[2]), 1e-6 * smax)
        .ok()?;
    x.iter().all(|v| v.is_finite()).then(|| [x[0], x[1], x[2]])
}

/// Run the check on an evaluated tour. `progress(f)` is told the fraction done; `cancel()`
/// stops the work (the result is then an error).
pub fn check(
    tour: &PreparedTour,
    e: &Evaluation,
    opts: &FidelityOptions,
    progress: &dyn Fn(f64),
    cancel: &dyn Fn() -> bool,
) -> Result<Fidelity, FidelityError> {
    let (all, names) = perturbers(tour, opts.mass_scale);
    let n_legs = tour.stops.len() - 1;
    let mut out = Fidelity {
        bodies: names,
        ..Default::default()
    };
    let sparse = NBodyOptions {
        samples: 2,
        ..opts.integration
    };
    for k in 0..n_legs {
        let leg = &e.legs[k];
        let ends = [&*tour.stops[k].body.name, &*tour.stops[k + 1].body.name];
        let bodies: Vec<Perturber<'_>> = all
            .iter()
            .zip(&out.bodies)
            .filter(|(_, n)| !ends.contains(&n.as_str()))
            .map(|(b, _)| *b)
            .collect();
        if !leg.solved {
            return Err(FidelityError::Unsolved(k + 1));
        }
        let fail = |source| FidelityError::Propagation { leg: k + 1, source };
        let start = State {
            r: e.stops[k].body_state.r,
            v: e.stops[k].v_helio_out,
        };
        let (end, track, evals) =
            fly_leg(tour, e, k, &start, &bodies, &opts.integration, cancel).map_err(fail)?;
        out.evaluations += evals as u64;
        let target = &e.stops[k + 1];
        let body_at = target.body_state;
        let miss = end.r - body_at.r;
        let conic_vinf = target.vinf_in;
        let s_hat = conic_vinf.try_normalize(1e-12).unwrap_or(Vec3::x());
        let t_hat = s_hat
            .cross(&Vec3::z())
            .try_normalize(1e-12)
            .unwrap_or(Vec3::y());
        let r_hat = s_hat.cross(&t_hat);
        let vinf_nb = end.v - body_at.v;
        let conic_miss = (leg.arrive_state.r - body_at.r).norm();
        // Shooting: Newton on the departure velocity, Jacobian by forward differences.
        let mut dv0 = Vec3::zeros();
        let mut cur_miss = miss;
        let mut iterations = 0;
        // Removed means within the tolerance, or 1e-7 of the body's distance from the Sun (the
        // integration's own repeatability over a multi-year leg is a few kilometres at Jupiter).
        let tol = opts.miss_tolerance_km.max(1e-7 * body_at.r.norm());
        let mut converged = cur_miss.norm() <= tol;
        let h = 1e-6; // km/s
        while !converged && iterations < opts.max_iterations {
            if cancel() {
                return Err(fail(NBodyError::Cancelled));
            }
            iterations += 1;
            // The miss at the body's epoch for a departure correction `dv`.
            let mut miss_for = |dv: Vec3| -> Result<Vec3, FidelityError> {
                let s = State {
                    r: start.r,
                    v: start.v + dv,
                };
                let (end, _, ev) =
                    fly_leg(tour, e, k, &s, &bodies, &sparse, cancel).map_err(fail)?;
                out.evaluations += ev as u64;
                Ok(end.r - body_at.r)
            };
            let mut jac = [[0.0; 3]; 3];
            for j in 0..3 {
                let mut dv = dv0;
                dv[j] += h;
                let m_j = miss_for(dv)?;
                for i in 0..3 {
                    jac[i][j] = (m_j[i] - cur_miss[i]) / h;
                }
            }
            let Some(step) = solve3(&jac, &[-cur_miss.x, -cur_miss.y, -cur_miss.z]) else {
                break;
            };
            // Damped Newton: halve the step until the miss shrinks (close passes of other bodies
            // make the map from Δv to miss bend).
            // A trust region of 20 m/s per step: corrections are small, and the linear model of a
            // resonant return holds only nearby.
            let mut full = Vec3::new(step[0], step[1], step[2]);
            if full.norm() > 0.02 {
                full *= 0.02 / full.norm();
            }
            let mut lambda = 1.0;
            loop {
                let trial = dv0 + lambda * full;
                let m = miss_for(trial)?;
                if m.norm() < cur_miss.norm() || lambda < 1.0 / 32.0 {
                    dv0 = trial;
                    cur_miss = m;
                    break;
                }
                lambda *= 0.5;
            }
            converged = cur_miss.norm() <= tol;
        }
        out.encounters.push(EncounterCheck {
            leg: k,
            body: tour.stops[k + 1].body.name.to_string(),
            miss_km: miss.norm(),
            conic_miss_km: conic_miss,
            b_t_km: miss.dot(&t_hat),
            b_r_km: miss.dot(&r_hat),
            along_s_km: miss.dot(&s_hat),
            dvinf_km_s: vinf_nb.norm() - conic_vinf.norm(),
            correction_dv_km_s: converged.then(|| dv0.norm()),
            iterations,
        });
        out.arcs.push(track);
        progress((k + 1) as f64 / n_legs as f64);
    }
    Ok(out)
}
