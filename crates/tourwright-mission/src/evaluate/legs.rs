//! Legs: the bodies' states at the stops, Lambert arcs between stops, the ballistic leg after a
//! shaped swing-by, drawing samples and the closest approach to the next body.

use tourwright_astro::bodies::BodyData;
use tourwright_astro::constants::DAY_S;
use tourwright_astro::flyby;
use tourwright_astro::kepler::{self, KeplerError};
use tourwright_astro::lambert;
use tourwright_astro::time::Tdb;
use tourwright_astro::{State, Vec3};

use super::{DsmResult, EvalOptions, Evaluation, LegResult, Sample, StopResult, Warning};
use crate::design::SwingbyMode;
use crate::rules;
use crate::tour::{Body, PreparedTour, TourDsm};

/// Fill one `StopResult` per stop with its epoch and the body's state. False (with warnings)
/// when a state is unavailable or the stops are out of time order.
pub fn body_states(tour: &PreparedTour, out: &mut Evaluation) -> bool {
    let mut ok = true;
    for (k, stop) in tour.stops.iter().enumerate() {
        let mut sr = StopResult {
            kind: stop.kind,
            epoch: stop.t,
            ..Default::default()
        };
        if k > 0 && !(stop.t.0 > tour.stops[k - 1].t.0) {
            out.warnings.push(Warning::OutOfOrder { stop: k });
            ok = false;
        }
        let memo = &mut out.body_memo.0;
        if memo.len() <= k {
            memo.resize(k + 1, None);
        }
        let known = match memo[k] {
            Some((eph, t, s))
                if same_source(&eph, &stop.body.ephemeris) && t.to_bits() == stop.t.0.to_bits() =>
            {
                Some(s)
            }
            _ => None,
        };
        match known.map_or_else(|| stop.body.state(stop.t), Ok) {
            Ok(s) => {
                memo[k] = Some((stop.body.ephemeris, stop.t.0, s));
                sr.body_state = s;
            }
            Err(e) => {
                memo[k] = None;
                out.warnings.push(Warning::Ephemeris { stop: k, reason: e });
                ok = false;
            }
        }
        out.stops.push(sr);
    }
    ok
}

/// True when two ephemerides are one source: equal elements, or the very same opened kernel (a
/// kernel compares equal to another by path, and a file changed on disk is opened anew).
fn same_source(a: &crate::tour::BodyEphemeris, b: &crate::tour::BodyEphemeris) -> bool {
    use crate::tour::BodyEphemeris::Planet;
    use tourwright_astro::ephemeris::PlanetEphemeris::Kernel;
    match (a, b) {
        (Planet(Kernel(ka, pa)), Planet(Kernel(kb, pb))) => std::ptr::eq(*ka, *kb) && pa == pb,
        _ => a == b,
    }
}

/// Outgoing v∞ of a shaped (unpowered) swing-by at periapsis altitude `altitude_km` and B-plane
/// aim `aim_deg`. A massless body or a zero v∞ turns nothing.
pub fn shaped_vinf_out(body: &BodyData, vinf_in: &Vec3, altitude_km: f64, aim_deg: f64) -> Vec3 {
    let rp = body.radius_km + altitude_km;
    if body.mu > 0.0 && vinf_in.norm() > 0.0 && rp > 0.0 {
        flyby::outgoing_vinf(vinf_in, rp, aim_deg.to_radians(), body.mu)
    } else {
        *vinf_in
    }
}

/// The ballistic leg after a shaped swing-by: the planet's state plus v∞ out, flown for `tof_s`.
pub fn ballistic_arrival(
    planet: &State,
    vinf_out: &Vec3,
    tof_s: f64,
    mu_sun: f64,
) -> Result<State, KeplerError> {
    kepler::propagate(
        &State {
            r: planet.r,
            v: planet.v + vinf_out,
        },
        tof_s,
        mu_sun,
    )
}

/// Solve leg `k` and fill both stops' heliocentric velocities and v∞. False (with a warning) when
/// the leg has no solution; evaluation stops there.
pub fn leg(tour: &PreparedTour, k: usize, opts: &EvalOptions, out: &mut Evaluation) -> bool {
    if let Some(m) = tour.legs[k].dsm {
        return dsm_leg(tour, k, &m, opts, out);
    }
    let (a, b) = (&tour.stops[k], &tour.stops[k + 1]);
    let tof = b.t.0 - a.t.0;
    let from = out.stops[k].body_state;
    let to = out.stops[k + 1].body_state;
    let mut leg = LegResult {
        tof_days: tof / DAY_S,
        ..Default::default()
    };
    let shaped = match a.mode {
        SwingbyMode::Shaped {
            altitude_km,
            aim_deg,
        } if k > 0 => Some((altitude_km, aim_deg)),
        _ => None,
    };
    if let Some((alt, aim)) = shaped {
        let vout = shaped_vinf_out(&a.body.data, &out.stops[k].vinf_in, alt, aim);
        match ballistic_arrival(&from, &vout, tof, tour.mu_sun) {
            Ok(end) => {
                leg.v_depart = from.v + vout;
                leg.v_arrive = end.v;
                leg.arrive_state = end;
                leg.solved = true;
                leg.ballistic = true;
            }
            Err(e) => out
                .warnings
                .push(Warning::NoBallisticArc { leg: k, reason: e }),
        }
    } else {
        let l = &tour.legs[k];
        let key = [
            from.r.x,
            from.r.y,
            from.r.z,
            0.0,
            0.0,
            0.0,
            0.0,
            to.r.x,
            to.r.y,
            to.r.z,
            tof,
            tour.mu_sun,
        ]
        .map(f64::to_bits);
        let shape = (false, l.direction, l.revs, l.branch);
        let solved = memoised(out, k, key, shape, || {
            lambert::solve_revs(
                &from.r,
                &to.r,
                tof,
                tour.mu_sun,
                l.direction,
                l.revs,
                l.branch,
            )
            .map(|s| (from, s))
            .map_err(|e| Warning::NoArc { leg: k, reason: e })
        });
        match solved.map(|(_, s)| s) {
            Ok(s) => {
                leg.v_depart = s.v1;
                leg.v_arrive = s.v2;
                leg.arrive_state = State { r: to.r, v: s.v2 };
                leg.solved = true;
            }
            Err(w) => out.warnings.push(w),
        }
    }
    if !leg.solved {
        out.legs.push(leg);
        return false;
    }
    leg.samples = push_samples(
        out,
        a.t,
        State {
            r: from.r,
            v: leg.v_depart,
        },
        tof,
        opts.samples_per_leg,
        tour.mu_sun,
    );
    out.stops[k].v_helio_out = leg.v_depart;
    out.stops[k].vinf_out = leg.v_depart - from.v;
    out.stops[k + 1].v_helio_in = leg.v_arrive;
    out.stops[k + 1].vinf_in = leg.v_arrive - to.v;
    let arrive = leg.arrive_state;
    let depart = State {
        r: from.r,
        v: leg.v_depart,
    };
    out.legs.push(leg);
    if shaped.is_some() {
        let miss = (arrive.r - to.r).norm();
        let closest = if opts.closest_approach {
            closest_approach(&depart, a.t, tof, &b.body, tour.mu_sun)
        } else {
            None
        };
        if let Some(sw) = out.stops[k].swingby.as_mut() {
            sw.miss_km = rules::shown(miss);
            sw.closest_approach = closest;
        }
        if rules::misses(miss, a.max_miss_km) {
            out.warnings.push(Warning::MissesNextBody {
                stop: k,
                miss_km: miss,
                tolerance_km: a.max_miss_km,
            });
        }
    }
    true
}

/// The v∞ a manoeuvre leg starts with: the launch v∞ on the first leg, else the outgoing v∞ of
/// the shaped swing-by it starts from (a targeted start, which `prepare` refuses, keeps v∞ in).
pub fn dsm_start_vinf(tour: &PreparedTour, k: usize, m: &TourDsm, out: &Evaluation) -> Vec3 {
    if k == 0 {
        return m.launch_vinf.unwrap_or_default();
    }
    let a = &tour.stops[k];
    match a.mode {
        SwingbyMode::Shaped {
            altitude_km,
            aim_deg,
        } => shaped_vinf_out(&a.body.data, &out.stops[k].vinf_in, altitude_km, aim_deg),
        SwingbyMode::Targeted => out.stops[k].vinf_in,
    }
}

/// A leg with a deep-space manoeuvre: coast from the start state for a fraction η of the time of
/// flight, one impulse, then a Lambert arc to the next stop at its epoch.
fn dsm_leg(
    tour: &PreparedTour,
    k: usize,
    m: &TourDsm,
    opts: &EvalOptions,
    out: &mut Evaluation,
) -> bool {
    let (a, b) = (&tour.stops[k], &tour.stops[k + 1]);
    let tof = b.t.0 - a.t.0;
    let from = out.stops[k].body_state;
    let to = out.stops[k + 1].body_state;
    let mut leg = LegResult {
        tof_days: tof / DAY_S,
        ..Default::default()
    };
    let vout = dsm_start_vinf(tour, k, m, out);
    let raw = m.at.fraction(a.t, b.t);
    if !(raw > 0.0 && raw < 1.0) {
        out.warnings.push(Warning::DsmOutsideLeg {
            leg: k,
            fraction: if raw.is_finite() { raw } else { 0.0 },
        });
    }
    // A manoeuvre on an encounter is still evaluated (just after it, or just before the next).
    let eta = if raw.is_finite() {
        raw.clamp(1e-9, 1.0 - 1e-9)
    } else {
        0.5
    };
    let start = State {
        r: from.r,
        v: from.v + vout,
    };
    let t1 = eta * tof;
    let l = &tour.legs[k];
    let key = [
        start.r.x,
        start.r.y,
        start.r.z,
        start.v.x,
        start.v.y,
        start.v.z,
        t1,
        to.r.x,
        to.r.y,
        to.r.z,
        tof,
        tour.mu_sun,
    ]
    .map(f64::to_bits);
    let shape = (true, l.direction, l.revs, l.branch);
    let solved = memoised(out, k, key, shape, || {
        let coast = kepler::propagate(&start, t1, tour.mu_sun)
            .map_err(|e| Warning::NoBallisticArc { leg: k, reason: e })?;
        let arc = lambert::solve_revs(
            &coast.r,
            &to.r,
            tof - t1,
            tour.mu_sun,
            l.direction,
            l.revs,
            l.branch,
        )
        .map_err(|e| Warning::NoArc { leg: k, reason: e })?;
        Ok((coast, arc))
    });
    let (coast, arc) = match solved {
        Ok(s) => s,
        Err(w) => {
            out.warnings.push(w);
            out.legs.push(leg);
            return false;
        }
    };
    let dv = arc.v1 - coast.v;
    let r = coast.r.norm();
    let t_dsm = Tdb(a.t.0 + t1);
    leg.v_depart = start.v;
    leg.v_arrive = arc.v2;
    leg.arrive_state = State { r: to.r, v: arc.v2 };
    leg.solved = true;
    let m_pts = opts.samples_per_leg;
    let (n1, n2) = if m_pts >= 2 {
        let n1 = ((m_pts as f64 * eta).round() as usize).clamp(2, m_pts.max(4) - 2);
        (n1, (m_pts - n1.min(m_pts)).max(2))
    } else {
        (0, 0)
    };
    let first = push_samples(out, a.t, start, t1, n1, tour.mu_sun);
    let second = push_samples(
        out,
        t_dsm,
        State {
            r: coast.r,
            v: arc.v1,
        },
        tof - t1,
        n2,
        tour.mu_sun,
    );
    leg.samples = first.start..second.end;
    leg.dsm = Some(DsmResult {
        t: t_dsm,
        fraction: eta,
        r: coast.r,
        v_before: coast.v,
        v_after: arc.v1,
        dv,
        dv_km_s: dv.norm(),
        energy_before: 0.5 * coast.v.norm_squared() - tour.mu_sun / r,
        energy_after: 0.5 * arc.v1.norm_squared() - tour.mu_sun / r,
        mass_after_kg: 0.0,
        split: second.start,
    });
    out.stops[k].v_helio_out = start.v;
    out.stops[k].vinf_out = vout;
    out.stops[k + 1].v_helio_in = arc.v2;
    out.stops[k + 1].vinf_in = arc.v2 - to.v;
    out.legs.push(leg);
    true
}

/// Leg `k`'s coast and arc: the last evaluation's when `key` (every input, as bits) and `shape`
/// are the same, else `solve`'s (kept for the next evaluation when it succeeds).
fn memoised(
    out: &mut Evaluation,
    k: usize,
    key: [u64; 12],
    shape: (bool, lambert::Direction, u32, lambert::Branch),
    solve: impl FnOnce() -> Result<(State, lambert::LambertSolution), Warning>,
) -> Result<(State, lambert::LambertSolution), Warning> {
    let memo = &mut out.arc_memo.0;
    if memo.len() <= k {
        memo.resize(k + 1, None);
    }
    if let Some(m) = memo[k].filter(|m| m.key == key && m.shape == shape) {
        return Ok((m.coast, m.arc));
    }
    let solved = solve();
    out.arc_memo.0[k] = solved
        .as_ref()
        .ok()
        .map(|&(coast, arc)| super::ArcMemoEntry {
            key,
            shape,
            coast,
            arc,
        });
    solved
}

/// Drawing samples of one arc, equally spaced in time; returns their range in `out.samples`.
fn push_samples(
    out: &mut Evaluation,
    t0: Tdb,
    s0: State,
    tof: f64,
    m: usize,
    mu_sun: f64,
) -> std::ops::Range<usize> {
    let start = out.samples.len();
    if m >= 2 {
        let dt = tof / (m - 1) as f64;
        let mut cur = s0;
        for j in 0..m {
            if j > 0 {
                // A failed step keeps the previous point: the drawing stays finite.
                cur = kepler::propagate(&cur, dt, mu_sun).unwrap_or(cur);
            }
            out.samples.push(Sample {
                t: Tdb(t0.0 + dt * j as f64),
                state: cur,
            });
        }
    }
    start..out.samples.len()
}

/// Closest approach of an arc to a body: a coarse scan of 64 steps, then golden-section
/// refinement around the best one.
pub fn closest_approach(
    depart: &State,
    t0: Tdb,
    tof: f64,
    body: &Body,
    mu_sun: f64,
) -> Option<(f64, Tdb)> {
    let dist = |dt: f64| -> Option<f64> {
        let sc = kepler::propagate(depart, dt, mu_sun).ok()?;
        let b = body.state(Tdb(t0.0 + dt)).ok()?;
        Some((sc.r - b.r).norm())
    };
    let m = 64;
    let mut best = (f64::INFINITY, 0.0);
    for j in 0..=m {
        let dt = tof * j as f64 / m as f64;
        if let Some(d) = dist(dt) {
            if d < best.0 {
                best = (d, dt);
            }
        }
    }
    if !best.0.is_finite() {
        return None;
    }
    let h = tof / m as f64;
    let (mut a, mut b) = ((best.1 - h).max(0.0), (best.1 + h).min(tof));
    let g = 0.618_033_988_749_895;
    for _ in 0..40 {
        let c = b - g * (b - a);
        let d = a + g * (b - a);
        if dist(c)? < dist(d)? {
            b = d;
        } else {
            a = c;
        }
    }
    let t = 0.5 * (a + b);
    let d = rules::shown(dist(t)?)?;
    Some((d, Tdb(t0.0 + t)))
}

/// The track a manoeuvre on leg `k` can be moved along: the coast the leg starts with, continued
/// over the whole leg, as `n` points (epoch, heliocentric position) equally spaced in time. Empty
/// when the leg has no manoeuvre or the evaluation did not reach it.
pub fn coast_track(tour: &PreparedTour, e: &Evaluation, k: usize, n: usize) -> Vec<(Tdb, Vec3)> {
    let solved = e.legs.get(k).is_some_and(|l| l.solved && l.dsm.is_some());
    if !solved || n < 2 || k + 1 >= tour.stops.len() {
        return Vec::new();
    }
    let t0 = tour.stops[k].t;
    let tof = tour.stops[k + 1].t.0 - t0.0;
    let start = State {
        r: e.stops[k].body_state.r,
        v: e.stops[k].v_helio_out,
    };
    let dt = tof / (n - 1) as f64;
    let mut cur = start;
    let mut out = Vec::with_capacity(n);
    for j in 0..n {
        if j > 0 {
            match kepler::propagate(&cur, dt, tour.mu_sun) {
                Ok(s) => cur = s,
                Err(_) => break,
            }
        }
        out.push((Tdb(t0.0 + dt * j as f64), cur.r));
    }
    out
}

/// A heliocentric arc of an evaluated tour as a point of the Tisserand graph.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct ArcOrbit {
    /// Leg index.
    pub leg: usize,
    /// 0 for the arc a leg starts with, 1 for the arc after its manoeuvre.
    pub piece: usize,
    /// Periapsis radius, AU.
    pub rp_au: f64,
    /// Apoapsis radius, AU.
    pub ra_au: f64,
}

/// Every heliocentric arc of the tour as (r_p, r_a), in flight order: the steps between
/// consecutive points are the swing-bys (and manoeuvres). Unbound arcs are left out.
pub fn arc_orbits(tour: &PreparedTour, e: &Evaluation) -> Vec<ArcOrbit> {
    let mut out = Vec::new();
    for (k, leg) in e.legs.iter().enumerate() {
        if !leg.solved || k + 1 >= e.stops.len() {
            continue;
        }
        let start = State {
            r: e.stops[k].body_state.r,
            v: e.stops[k].v_helio_out,
        };
        if let Some((rp, ra)) = tourwright_astro::tisserand::orbit_point(&start, tour.mu_sun) {
            out.push(ArcOrbit {
                leg: k,
                piece: 0,
                rp_au: rp,
                ra_au: ra,
            });
        }
        if let Some(m) = leg.dsm {
            let after = State {
                r: m.r,
                v: m.v_after,
            };
            if let Some((rp, ra)) = tourwright_astro::tisserand::orbit_point(&after, tour.mu_sun) {
                out.push(ArcOrbit {
                    leg: k,
                    piece: 1,
                    rp_au: rp,
                    ra_au: ra,
                });
            }
        }
    }
    out
}
