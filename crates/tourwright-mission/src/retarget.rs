//! Retargeting a shaped swing-by: adjust its periapsis altitude and aim (and, if allowed, the next
//! stop's epoch) so that the ballistic leg meets the next body again.

use nalgebra::{DMatrix, DVector};

use tourwright_astro::constants::{DAY_S, MU_SUN};
use tourwright_astro::flyby;
use tourwright_astro::kepler;
use tourwright_astro::lambert;
use tourwright_astro::{State, Vec3};

use crate::design::{MissionDesign, SwingbyMode};
use crate::evaluate::evaluate;

/// Why a retarget failed.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum RetargetError {
    /// The stop is not a shaped swing-by followed by another stop.
    #[error("stop {0} is not a shaped swing-by with a following stop")]
    NotShaped(usize),
    /// The incoming leg could not be evaluated.
    #[error("the incoming leg has no solution")]
    NoIncoming,
    /// The iteration ended without meeting the body.
    #[error("could not meet the next body (closest miss {0:.0} km)")]
    NoConvergence(f64),
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
/// later one, by the same shift) may change too.
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
    let e = evaluate(d);
    if e.legs.len() < k || !e.legs[..k].iter().all(|l| l.solved) {
        return Err(RetargetError::NoIncoming);
    }
    let body = d
        .resolve(&d.stops[k].body)
        .ok_or(RetargetError::NoIncoming)?;
    let next = d
        .resolve(&d.stops[k + 1].body)
        .ok_or(RetargetError::NoIncoming)?;
    let data = d.body_data(&body);
    let vin = e.stops[k].vinf_in;
    let planet = e.stops[k].body_state;
    let t_k = d.stops[k].epoch;
    let tof0 = d.stops[k + 1].epoch.tdb_s - t_k.tdb_s;

    // Miss vector for (altitude km, aim rad, tof s).
    let miss = |x: &[f64]| -> Option<Vec3> {
        let rp = data.radius_km + x[0];
        if rp <= 0.0 || x[2] <= 0.0 {
            return None;
        }
        let vout = flyby::outgoing_vinf(&vin, rp, x[1], data.mu);
        let end = kepler::propagate(
            &State {
                r: planet.r,
                v: planet.v + vout,
            },
            x[2],
            MU_SUN,
        )
        .ok()?;
        let target = next.state(t_k.plus_days(x[2] / DAY_S)).ok()?;
        Some(end.r - target.r)
    };

    // Starting point: the ballistic swing-by that best matches the Lambert arc's required v∞.
    let mut x = vec![altitude_km, aim_deg.to_radians(), tof0];
    if let Ok(target) = next.state(d.stops[k + 1].epoch) {
        if let Ok(s) = lambert::solve_single(&planet.r, &target.r, tof0, MU_SUN, d.leg(k).direction)
        {
            let vreq = s.v1 - planet.v;
            let turn = (vin.dot(&vreq) / (vin.norm() * vreq.norm()))
                .clamp(-1.0, 1.0)
                .acos();
            if let Some(rp) = flyby::periapsis_for_turn(turn, vin.norm(), data.mu) {
                let bp = flyby::b_plane(&vin, &vreq, rp, data.mu);
                let guess = vec![
                    (rp - data.radius_km).max(-0.5 * data.radius_km),
                    bp.aim,
                    tof0,
                ];
                let cur = miss(&x).map(|m| m.norm()).unwrap_or(f64::INFINITY);
                if miss(&guess).map(|m| m.norm()).unwrap_or(f64::INFINITY) < cur {
                    x = guess;
                }
            }
        }
    }
    let nv = if move_epoch { 3 } else { 2 };
    let scale = [data.radius_km.max(1.0), 1.0, DAY_S];
    let mut lambda = 1e-3;
    let mut cur = miss(&x).ok_or(RetargetError::NoConvergence(f64::INFINITY))?;
    for _ in 0..100 {
        if cur.norm() < 1.0 {
            break;
        }
        // Jacobian by central differences in scaled variables.
        let mut j = DMatrix::<f64>::zeros(3, nv);
        for c in 0..nv {
            let h = 1e-6 * scale[c].max(x[c].abs() * 1e-3);
            let mut xp = x.clone();
            let mut xm = x.clone();
            xp[c] += h;
            xm[c] -= h;
            let (Some(fp), Some(fm)) = (miss(&xp), miss(&xm)) else {
                break;
            };
            let col = (fp - fm) / (2.0 * h) * scale[c];
            for r in 0..3 {
                j[(r, c)] = col[r];
            }
        }
        let f = DVector::from_column_slice(cur.as_slice());
        let jt = j.transpose();
        let mut improved = false;
        for _ in 0..12 {
            let mut a = &jt * &j;
            for c in 0..nv {
                a[(c, c)] *= 1.0 + lambda;
                a[(c, c)] += 1e-12;
            }
            let Some(step) = a.lu().solve(&(-&jt * &f)) else {
                break;
            };
            let mut xn = x.clone();
            for c in 0..nv {
                xn[c] += step[c] * scale[c];
            }
            if let Some(m) = miss(&xn) {
                if m.norm() < cur.norm() {
                    x = xn;
                    cur = m;
                    lambda = (lambda * 0.3).max(1e-9);
                    improved = true;
                    break;
                }
            }
            lambda *= 10.0;
        }
        if !improved {
            break;
        }
    }
    let soi = d.body_data(&next).soi_km.max(1.0e4);
    if cur.norm() > soi.min(1.0e5) {
        return Err(RetargetError::NoConvergence(cur.norm()));
    }
    let mut out = d.clone();
    out.stops[k].swingby.mode = SwingbyMode::Shaped {
        altitude_km: x[0],
        aim_deg: x[1].to_degrees(),
    };
    if move_epoch {
        let shift = x[2] - tof0;
        for s in out.stops.iter_mut().skip(k + 1) {
            s.epoch.tdb_s += shift;
        }
    }
    Ok(Retargeted {
        design: out,
        miss_km: cur.norm(),
    })
}
