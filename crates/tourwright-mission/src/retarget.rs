//! Retargeting a shaped swing-by: adjust its periapsis altitude and aim (and, if allowed, the next
//! stop's epoch) so that the ballistic leg meets the next body again. The miss is computed with
//! the same shaped-departure and ballistic-leg functions the evaluation uses.

use nalgebra::{Matrix3, Vector3};

use tourwright_astro::bodies::BodyData;
use tourwright_astro::constants::DAY_S;
use tourwright_astro::flyby;
use tourwright_astro::lambert;
use tourwright_astro::time::Epoch;
use tourwright_astro::time::Tdb;
use tourwright_astro::{State, Vec3};

use crate::design::{MissionDesign, SwingbyMode};
use crate::evaluate::legs::{ballistic_arrival, shaped_vinf_out};
use crate::evaluate::{EvalOptions, Evaluation, evaluate};
use crate::tour::{Body, PreparedTour};

/// Why a retarget failed.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum RetargetError {
    /// The stop is not a shaped swing-by followed by another stop.
    #[error("stop {} is not a shaped swing-by with a following stop", .0 + 1)]
    NotShaped(usize),
    /// The next leg has a deep-space manoeuvre, which already meets the next body.
    #[error("leg {} has a deep-space manoeuvre, which meets the next body; remove it to retarget the swing-by instead", .0 + 1)]
    HasDsm(usize),
    /// The design cannot be evaluated.
    #[error("{0}")]
    Design(String),
    /// The incoming leg could not be evaluated.
    #[error("the incoming leg has no solution")]
    NoIncoming,
    /// The iteration ended without meeting the body.
    #[error("could not meet the next body (closest miss {0:.0} km)")]
    NoConvergence(f64),
    /// The swing-by meets the next body only below its minimum altitude.
    #[error(
        "meets the next body only with the periapsis at {altitude_km:.0} km, below the minimum {min_km:.0} km"
    )]
    BelowMinimum {
        /// The altitude that would meet it, km.
        altitude_km: f64,
        /// The minimum in force, km.
        min_km: f64,
    },
    /// The swing-by that meets the body is not a valid design (the field and why), e.g. a
    /// periapsis inside the planet or a date that overtakes the next stop.
    #[error("the swing-by that meets the next body is not a valid design: {0}")]
    Invalid(String),
}

/// Outcome of a successful retarget.
#[derive(Clone, Debug, PartialEq)]
pub struct Retargeted {
    /// The adjusted design.
    pub design: MissionDesign,
    /// Miss distance left, km.
    pub miss_km: f64,
}

/// Adjust the shaped swing-by at stop `k`. With `move_epoch`, the next stop's epoch (and every
/// later one, by the same shift) may change too. Levenberg-Marquardt on the miss vector.
pub fn retarget(
    d: &MissionDesign,
    k: usize,
    move_epoch: bool,
) -> Result<Retargeted, RetargetError> {
    let n = d.stops.len();
    let SwingbyMode::Shaped {
        altitude_km,
        aim_deg,
    } = d.stops.get(k).map(|s| s.swingby.mode).unwrap_or_default()
    else {
        return Err(RetargetError::NotShaped(k));
    };
    if k == 0 || k + 1 >= n {
        return Err(RetargetError::NotShaped(k));
    }
    if d.leg(k).dsm.is_some() {
        return Err(RetargetError::HasDsm(k));
    }
    let tour = PreparedTour::prepare(d).map_err(|e| RetargetError::Design(e.to_string()))?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::SEARCH, &mut e);
    if e.legs.len() < k || !e.legs[..k].iter().all(|l| l.solved) {
        return Err(RetargetError::NoIncoming);
    }
    let data = tour.stops[k].body.data;
    let next = &tour.stops[k + 1].body;
    let tof0 = tour.stops[k + 1].t.0 - tour.stops[k].t.0;
    let (x, cur, _) = meet_next_body(
        &ShapedLeg {
            body: &data,
            vinf_in: e.stops[k].vinf_in,
            planet: e.stops[k].body_state,
            t: tour.stops[k].t,
            next,
            mu_sun: tour.mu_sun,
            direction: tour.legs[k].direction,
        },
        [altitude_km, aim_deg, tof0],
        move_epoch,
        100,
        1.0,
        false,
    )
    .ok_or(RetargetError::NoConvergence(f64::INFINITY))?;
    if cur.norm() <= tour.stops[k].max_miss_km
        && crate::rules::below_minimum(x[0], tour.stops[k].min_altitude_km)
    {
        return Err(RetargetError::BelowMinimum {
            altitude_km: x[0],
            min_km: tour.stops[k].min_altitude_km,
        });
    }
    if cur.norm() > tour.stops[k].max_miss_km {
        return Err(RetargetError::NoConvergence(cur.norm()));
    }
    let mut out = d.clone();
    out.stops[k].swingby.mode = SwingbyMode::Shaped {
        altitude_km: x[0],
        aim_deg: (x[1] + 180.0).rem_euclid(360.0) - 180.0,
    };
    if move_epoch {
        let shift = x[2] - tof0;
        for s in out.stops.iter_mut().skip(k + 1) {
            s.epoch = shift_epoch(s.epoch, shift);
        }
    }
    crate::files::validate(&out).map_err(|i| RetargetError::Invalid(i.to_string()))?;
    Ok(Retargeted {
        design: out,
        miss_km: cur.norm(),
    })
}

fn shift_epoch(e: Epoch, seconds: f64) -> Epoch {
    e.plus_seconds(seconds)
}

/// A first miss above which [`meet_next_body`] tries its guesses, km (ours).
const GUESS_KM: f64 = 1.0e4;

/// A shaped swing-by and the ballistic leg after it, as [`meet_next_body`] needs them.
#[derive(Clone, Copy, Debug)]
pub struct ShapedLeg<'a> {
    /// The swing-by body's constants.
    pub body: &'a BodyData,
    /// v∞ arriving at the swing-by, km/s.
    pub vinf_in: Vec3,
    /// The swing-by body's heliocentric state at the swing-by.
    pub planet: State,
    /// Epoch of the swing-by.
    pub t: Tdb,
    /// The body the ballistic leg must meet.
    pub next: &'a Body,
    /// μ of the Sun in the model, km³/s².
    pub mu_sun: f64,
    /// Sense of motion of the leg (for the first guess).
    pub direction: tourwright_astro::lambert::Direction,
}

/// The periapsis altitude (km), B-plane aim (degrees) and time of flight (s) that make the
/// ballistic leg after a shaped swing-by meet the next body, from `x0`: Levenberg-Marquardt on
/// the miss vector, at most `max_iter` iterations (each 7 propagations at most), after trying
/// the swing-by that best matches a single-revolution Lambert arc as the first guess. With
/// `move_epoch` false the time of flight stays. It stops once the miss is below `tol_km`, and
/// with `quick` also once an iteration gains less than a tenth (a search's repeated solves).
/// Returns the point, the miss vector left (km) and the iterations spent, or `None` when the
/// leg cannot be propagated from `x0`.
pub fn meet_next_body(
    leg: &ShapedLeg<'_>,
    x0: [f64; 3],
    move_epoch: bool,
    max_iter: usize,
    tol_km: f64,
    quick: bool,
) -> Option<([f64; 3], Vec3, usize)> {
    let data = leg.body;
    let next = leg.next;
    let vin = leg.vinf_in;
    let planet = leg.planet;
    let t_k = leg.t;
    let tof0 = x0[2];
    let mu_sun = leg.mu_sun;

    // Miss vector for (altitude km, aim deg, tof s).
    let miss = |x: &[f64; 3]| -> Option<Vec3> {
        if data.radius_km + x[0] <= 0.0 || x[2] <= 0.0 {
            return None;
        }
        let vout = shaped_vinf_out(data, &vin, x[0], x[1]);
        let end = ballistic_arrival(&planet, &vout, x[2], mu_sun).ok()?;
        let target = next.state(t_k.plus_days(x[2] / DAY_S)).ok()?;
        let m = end.r - target.r;
        m.iter().all(|c| c.is_finite()).then_some(m)
    };

    // Starting point: `x0`, or when it misses by more than GUESS_KM the ballistic swing-by that
    // best matches the Lambert arc's required v∞, if that misses less.
    let mut x = x0;
    let best = miss(&x).map_or(f64::INFINITY, |m| m.norm());
    if let Ok(target) = next
        .state(t_k.plus_days(tof0 / DAY_S))
        .ok()
        .filter(|_| best > GUESS_KM)
        .ok_or(())
    {
        if let Ok(s) = lambert::solve_single(&planet.r, &target.r, tof0, mu_sun, leg.direction) {
            let vreq = s.v1 - planet.v;
            let turn = (vin.dot(&vreq) / (vin.norm() * vreq.norm()))
                .clamp(-1.0, 1.0)
                .acos();
            if let Some(rp) = flyby::periapsis_for_turn(turn, vin.norm(), data.mu) {
                let bp = flyby::b_plane(&vin, &vreq, rp, data.mu);
                let guess = [
                    (rp - data.radius_km).max(-0.5 * data.radius_km),
                    bp.aim.to_degrees(),
                    tof0,
                ];
                if miss(&guess).map_or(f64::INFINITY, |m| m.norm()) < best {
                    x = guess;
                }
            }
        }
    }
    let nv = if move_epoch { 3 } else { 2 };
    let scale = [data.radius_km.max(1.0), 1.0, DAY_S];
    let mut lambda = 1e-3;
    let mut cur = miss(&x)?;
    let mut iters = 0;
    for _ in 0..max_iter {
        if cur.norm() < tol_km {
            break;
        }
        iters += 1;
        // Jacobian by central differences in scaled variables.
        let mut j = Matrix3::<f64>::zeros();
        let mut ok = true;
        for c in 0..nv {
            let h = 1e-6 * scale[c].max(x[c].abs() * 1e-3);
            let (mut xp, mut xm) = (x, x);
            xp[c] += h;
            xm[c] -= h;
            let (Some(fp), Some(fm)) = (miss(&xp), miss(&xm)) else {
                ok = false;
                break;
            };
            j.set_column(c, &((fp - fm) / (2.0 * h) * scale[c]));
        }
        if !ok {
            break;
        }
        let f = Vector3::from(cur);
        let jt = j.transpose();
        let mut improved = false;
        let mut slow = false;
        for _ in 0..12 {
            let mut a = jt * j;
            for c in 0..3 {
                if c < nv {
                    a[(c, c)] = a[(c, c)] * (1.0 + lambda) + 1e-12;
                } else {
                    a[(c, c)] = 1.0;
                }
            }
            let Some(step) = a.lu().solve(&(-(jt * f))) else {
                break;
            };
            let mut xn = x;
            for c in 0..nv {
                xn[c] += step[c] * scale[c];
            }
            if let Some(m) = miss(&xn) {
                if m.norm() < cur.norm() {
                    // Progress of less than a tenth per iteration: a resonant return's solutions
                    // form a family (any crank angle), the miss falls no further than second
                    // order allows, and another iteration buys little.
                    slow = quick && m.norm() > 0.9 * cur.norm();
                    x = xn;
                    cur = m;
                    lambda = (lambda * 0.3).max(1e-9);
                    improved = true;
                    break;
                }
            }
            lambda *= 10.0;
        }
        if !improved || slow {
            break;
        }
    }
    Some((x, cur, iters))
}
