//! Swing-by geometry in patched conics: the planet-centred hyperbola, the B-plane, the outgoing
//! v∞ from (periapsis, aim), the powered swing-by that joins two v∞ magnitudes, and the
//! heliocentric energy bookkeeping.

use std::f64::consts::PI;

use crate::Vec3;

/// Eccentricity of the swing-by hyperbola: e = 1 + r_p v∞² / μ.
#[inline]
pub fn eccentricity(rp: f64, vinf: f64, mu: f64) -> f64 {
    1.0 + rp * vinf * vinf / mu
}

/// Turn angle δ = 2 asin(1/e) of an unpowered swing-by, rad.
#[inline]
pub fn turn_angle(rp: f64, vinf: f64, mu: f64) -> f64 {
    2.0 * (1.0 / eccentricity(rp, vinf, mu)).asin()
}

/// Periapsis radius that gives turn angle `delta` for an unpowered swing-by:
/// r_p = μ/v∞² (1/sin(δ/2) − 1). `None` for δ outside (0, π).
pub fn periapsis_for_turn(delta: f64, vinf: f64, mu: f64) -> Option<f64> {
    if !(delta > 0.0 && delta < PI) {
        return None;
    }
    Some(mu / (vinf * vinf) * (1.0 / (delta / 2.0).sin() - 1.0))
}

/// Impact parameter |B| = (μ / v∞²) √(e² − 1), km.
#[inline]
pub fn b_magnitude(rp: f64, vinf: f64, mu: f64) -> f64 {
    let e = eccentricity(rp, vinf, mu);
    mu / (vinf * vinf) * (e * e - 1.0).sqrt()
}

/// Speed at periapsis of the hyperbola, √(v∞² + 2μ/r_p).
#[inline]
pub fn periapsis_speed(rp: f64, vinf: f64, mu: f64) -> f64 {
    (vinf * vinf + 2.0 * mu / rp).sqrt()
}

/// The B-plane frame (S, T, R) for an incoming v∞ and a reference pole.
/// S is along v∞ in; T = S × pole, normalised; R = S × T. The pole is the ecliptic north (+z) by
/// default; when S is along the pole, +x is used instead.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BPlaneFrame {
    /// Unit vector along the incoming asymptote.
    pub s: Vec3,
    /// Unit T axis (in the reference plane).
    pub t: Vec3,
    /// Unit R axis (completes the triad, "down" from the reference plane).
    pub r: Vec3,
}

impl BPlaneFrame {
    /// The frame for incoming v∞ `vinf_in`, with +z as the reference pole.
    pub fn new(vinf_in: &Vec3) -> Self {
        let s = vinf_in.normalize();
        let mut t = s.cross(&Vec3::new(0.0, 0.0, 1.0));
        if t.norm() < 1e-9 {
            t = s.cross(&Vec3::new(1.0, 0.0, 0.0));
        }
        let t = t.normalize();
        let r = s.cross(&t);
        BPlaneFrame { s, t, r }
    }
}

/// B-plane coordinates of a swing-by.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct BPlane {
    /// B·T, km.
    pub b_t: f64,
    /// B·R, km.
    pub b_r: f64,
    /// |B|, km.
    pub b: f64,
    /// Aim angle θ = atan2(B·R, B·T), rad: the direction of B in the B-plane measured from T
    /// towards R.
    pub aim: f64,
}

/// Outgoing v∞ of an unpowered swing-by from the incoming v∞, the periapsis radius and the aim
/// angle θ in the B-plane. The spacecraft passes the planet on the side of B, so its velocity is
/// turned by δ towards −B: v∞out = |v∞| (cos δ Ŝ − sin δ B̂).
pub fn outgoing_vinf(vinf_in: &Vec3, rp: f64, aim: f64, mu: f64) -> Vec3 {
    let v = vinf_in.norm();
    let f = BPlaneFrame::new(vinf_in);
    let (sa, ca) = aim.sin_cos();
    let bhat = ca * f.t + sa * f.r;
    let delta = turn_angle(rp, v, mu);
    v * (delta.cos() * f.s - delta.sin() * bhat)
}

/// B-plane of the hyperbola that turns `vinf_in` towards `vinf_out` with periapsis `rp`
/// (the incoming leg's hyperbola when the swing-by is powered).
pub fn b_plane(vinf_in: &Vec3, vinf_out: &Vec3, rp: f64, mu: f64) -> BPlane {
    let f = BPlaneFrame::new(vinf_in);
    let vout = vinf_out.normalize();
    // Direction of B: the component of −v̂out perpendicular to S.
    let perp = -(vout - f.s * f.s.dot(&vout));
    let b = b_magnitude(rp, vinf_in.norm(), mu);
    if perp.norm() < 1e-12 {
        return BPlane {
            b_t: b,
            b_r: 0.0,
            b,
            aim: 0.0,
        };
    }
    let bhat = perp.normalize();
    let b_t = b * bhat.dot(&f.t);
    let b_r = b * bhat.dot(&f.r);
    BPlane {
        b_t,
        b_r,
        b,
        aim: b_r.atan2(b_t),
    }
}

/// Result of joining two v∞ vectors at one periapsis (the powered swing-by model: an impulse at
/// periapsis, tangential, joins the incoming and the outgoing hyperbolas).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PoweredSwingBy {
    /// Periapsis radius, km.
    pub rp: f64,
    /// Impulse at periapsis, km/s (0 for a ballistic swing-by).
    pub dv: f64,
    /// Turn angle required between v∞ in and v∞ out, rad.
    pub turn: f64,
    /// Eccentricity of the incoming hyperbola.
    pub e_in: f64,
    /// Eccentricity of the outgoing hyperbola.
    pub e_out: f64,
}

/// Solve the powered swing-by: find r_p with asin(1/e_in) + asin(1/e_out) = δ, e_i = 1 + r_p v_i²/μ,
/// then Δv = |√(v_out² + 2μ/r_p) − √(v_in² + 2μ/r_p)|. The half-turn sum decreases monotonically
/// in r_p from π to 0, so a safeguarded Newton iteration on ln r_p always converges.
/// Returns `None` when the v∞ are zero or the turn is not in (0, π).
pub fn powered_swingby(vinf_in: &Vec3, vinf_out: &Vec3, mu: f64) -> Option<PoweredSwingBy> {
    let vi = vinf_in.norm();
    let vo = vinf_out.norm();
    if !(vi > 0.0 && vo > 0.0) {
        return None;
    }
    let cosd = (vinf_in.dot(vinf_out) / (vi * vo)).clamp(-1.0, 1.0);
    let delta = cosd.acos();
    if delta <= 1e-12 {
        // No turn needed: an infinitely distant periapsis; Δv is the v∞ difference.
        return Some(PoweredSwingBy {
            rp: f64::INFINITY,
            dv: (vo - vi).abs(),
            turn: 0.0,
            e_in: f64::INFINITY,
            e_out: f64::INFINITY,
        });
    }
    if delta >= PI - 1e-12 {
        return None;
    }
    let a_i = mu / (vi * vi);
    let a_o = mu / (vo * vo);
    // f(u) with r_p = e^u; half-turns asin(1/(1 + r/a)).
    let f = |rp: f64| -> (f64, f64) {
        let ei = 1.0 + rp / a_i;
        let eo = 1.0 + rp / a_o;
        let val = (1.0 / ei).asin() + (1.0 / eo).asin() - delta;
        // d/dr asin(1/e) = −(1/e²)/√(1 − 1/e²) · de/dr
        let d =
            -1.0 / (ei * (ei * ei - 1.0).sqrt()) / a_i - 1.0 / (eo * (eo * eo - 1.0).sqrt()) / a_o;
        (val, d * rp) // derivative w.r.t. u = ln r
    };
    // Starting guess: the ballistic answer for the mean v∞.
    let vm = 0.5 * (vi + vo);
    let mut u = periapsis_for_turn(delta, vm, mu)?.max(1e-300).ln();
    crate::work::charge(200);
    let (mut lo, mut hi) = (f64::NEG_INFINITY, f64::INFINITY);
    for _ in 0..200 {
        let (val, d) = f(u.exp());
        if val == 0.0 {
            break;
        }
        if val > 0.0 {
            lo = u;
        } else {
            hi = u;
        }
        let mut nu = u - val / d;
        if !(nu >= lo && nu <= hi && nu.is_finite()) {
            nu = if lo.is_finite() && hi.is_finite() {
                0.5 * (lo + hi)
            } else if lo.is_finite() {
                lo + 2.0
            } else {
                hi - 2.0
            };
        }
        if (nu - u).abs() < 1e-14 {
            u = nu;
            break;
        }
        u = nu;
    }
    let rp = u.exp();
    let dv = (periapsis_speed(rp, vo, mu) - periapsis_speed(rp, vi, mu)).abs();
    Some(PoweredSwingBy {
        rp,
        dv,
        turn: delta,
        e_in: 1.0 + rp / a_i,
        e_out: 1.0 + rp / a_o,
    })
}

/// Heliocentric energy bookkeeping of a swing-by.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EnergyChange {
    /// Heliocentric speed before, km/s.
    pub speed_in: f64,
    /// Heliocentric speed after, km/s.
    pub speed_out: f64,
    /// Specific energy change ΔE = (|v_out|² − |v_in|²)/2, km²/s² (the potential term cancels
    /// because patched conics treat the swing-by as instantaneous at the planet's position).
    pub d_energy: f64,
}

/// Energy change from heliocentric velocities before and after.
pub fn energy_change(v_helio_in: &Vec3, v_helio_out: &Vec3) -> EnergyChange {
    let a = v_helio_in.norm();
    let b = v_helio_out.norm();
    EnergyChange {
        speed_in: a,
        speed_out: b,
        d_energy: 0.5 * (b * b - a * a),
    }
}

/// True anomaly of the asymptotes of a hyperbola, ν∞ = acos(−1/e), rad (`None` unless e > 1).
pub fn asymptote_true_anomaly(e: f64) -> Option<f64> {
    (e > 1.0 && e.is_finite()).then(|| (-1.0 / e).acos())
}

/// Direction of motion along the incoming asymptote in the hyperbola's own frame (periapsis on
/// +x, motion counter-clockwise), as an angle from +x, rad. Rotating a drawing by minus this
/// angle makes the spacecraft arrive along +x.
pub fn incoming_direction_angle(e: f64) -> Option<f64> {
    let nu = asymptote_true_anomaly(e)?;
    // v ∝ (−sin ν, e + cos ν) at ν = −ν∞, where cos ν∞ = −1/e.
    Some((e - 1.0 / e).atan2(nu.sin()))
}

/// Points (x, y) of the hyperbola r = p/(1 + e cos ν) in its own plane (periapsis on +x,
/// incoming branch at negative y), for true anomalies from `from` to `to` given as fractions of
/// the asymptote angle ν∞ (−1 and 1 are the asymptotes themselves). Writes into `out`, returns
/// how many points (0 when e ≤ 1 or `out` has fewer than two places).
pub fn hyperbola_arc(rp: f64, e: f64, from: f64, to: f64, out: &mut [(f64, f64)]) -> usize {
    let n = out.len();
    let Some(nu_inf) = asymptote_true_anomaly(e).filter(|_| n >= 2 && rp > 0.0) else {
        return 0;
    };
    let from = from.clamp(-0.999, 0.999);
    let to = to.clamp(-0.999, 0.999);
    let p = rp * (1.0 + e);
    for (k, o) in out.iter_mut().enumerate() {
        let nu = nu_inf * (from + (to - from) * k as f64 / (n - 1) as f64);
        let r = p / (1.0 + e * nu.cos());
        *o = (r * nu.cos(), r * nu.sin());
    }
    n
}

/// Sample points of the planet-centred hyperbola in its own plane, symmetric about periapsis
/// over true anomaly within `frac` of the asymptote angle (see [`hyperbola_arc`]).
pub fn hyperbola_points(rp: f64, e: f64, frac: f64, out: &mut [(f64, f64)]) -> usize {
    hyperbola_arc(rp, e, -frac, frac, out)
}
