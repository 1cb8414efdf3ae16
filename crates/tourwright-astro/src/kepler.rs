//! Two-body motion: classical elements and state vectors, Kepler's equation for every conic, and
//! universal-variable propagation.
//!
//! Elements use the semi-latus rectum `p` rather than the semi-major axis so that parabolas
//! (e = 1, a infinite) need no special case and nothing divides by zero.

use std::f64::consts::{PI, TAU};

use serde::{Deserialize, Serialize};

use crate::{State, Vec3};

/// Classical orbital elements. Angles in radians, `p` in km.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Elements {
    /// Semi-latus rectum p = a(1 − e²) (km); p = 2 r_p for a parabola.
    pub p: f64,
    /// Eccentricity.
    pub e: f64,
    /// Inclination, rad.
    pub i: f64,
    /// Right ascension (longitude) of the ascending node, rad.
    pub raan: f64,
    /// Argument of periapsis, rad.
    pub argp: f64,
    /// True anomaly, rad.
    pub nu: f64,
}

/// Errors of two-body computations.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum KeplerError {
    /// The state has zero position or zero angular momentum (rectilinear motion).
    #[error("degenerate state: {0}")]
    Degenerate(&'static str),
    /// A true anomaly beyond the asymptote of a hyperbola.
    #[error("true anomaly beyond the hyperbola's asymptote")]
    BeyondAsymptote,
    /// Iteration did not converge.
    #[error("Kepler iteration did not converge")]
    NoConvergence,
}

impl Elements {
    /// Semi-major axis (km): negative for a hyperbola, infinite for a parabola.
    pub fn a(&self) -> f64 {
        self.p / (1.0 - self.e * self.e)
    }

    /// Periapsis radius, km.
    pub fn periapsis(&self) -> f64 {
        self.p / (1.0 + self.e)
    }

    /// State vector for these elements.
    pub fn to_state(&self, mu: f64) -> Result<State, KeplerError> {
        let (snu, cnu) = self.nu.sin_cos();
        let den = 1.0 + self.e * cnu;
        if den <= 1e-12 {
            return Err(KeplerError::BeyondAsymptote);
        }
        let r = self.p / den;
        let sq = (mu / self.p).sqrt();
        // Perifocal position and velocity.
        let rp = Vec3::new(r * cnu, r * snu, 0.0);
        let vp = Vec3::new(-sq * snu, sq * (self.e + cnu), 0.0);
        let rot = perifocal_to_inertial(self.raan, self.i, self.argp);
        Ok(State {
            r: rot * rp,
            v: rot * vp,
        })
    }

    /// Elements of a state vector.
    pub fn from_state(s: &State, mu: f64) -> Result<Elements, KeplerError> {
        let r = s.r.norm();
        if r == 0.0 {
            return Err(KeplerError::Degenerate("zero position"));
        }
        let h = s.r.cross(&s.v);
        let hn = h.norm();
        if hn <= 1e-12 * r * s.v.norm().max(1e-300) {
            return Err(KeplerError::Degenerate(
                "zero angular momentum (rectilinear motion)",
            ));
        }
        let p = hn * hn / mu;
        let evec = s.v.cross(&h) / mu - s.r / r;
        let e = evec.norm();
        let i = (h.z / hn).clamp(-1.0, 1.0).acos();
        let n = Vec3::new(-h.y, h.x, 0.0);
        let nn = n.norm();
        let small = 1e-11;
        let raan = if nn > small * hn {
            n.y.atan2(n.x).rem_euclid(TAU)
        } else {
            0.0
        };
        // Reference direction in the orbit plane: the node line, or x when equatorial.
        let node_dir = if nn > small * hn {
            n / nn
        } else {
            Vec3::new(1.0, 0.0, 0.0)
        };
        let hhat = h / hn;
        let angle_from = |from: &Vec3, to: &Vec3| -> f64 {
            let c = from.dot(to);
            let s = hhat.dot(&from.cross(to));
            s.atan2(c).rem_euclid(TAU)
        };
        let (argp, nu) = if e > small {
            let ehat = evec / e;
            (angle_from(&node_dir, &ehat), angle_from(&ehat, &(s.r / r)))
        } else {
            (0.0, angle_from(&node_dir, &(s.r / r)))
        };
        Ok(Elements {
            p,
            e,
            i,
            raan,
            argp,
            nu,
        })
    }
}

/// Rotation matrix from the perifocal frame to the inertial frame (3-1-3: Ω, i, ω).
pub fn perifocal_to_inertial(raan: f64, i: f64, argp: f64) -> nalgebra::Matrix3<f64> {
    let (so, co) = raan.sin_cos();
    let (si, ci) = i.sin_cos();
    let (sw, cw) = argp.sin_cos();
    nalgebra::Matrix3::new(
        co * cw - so * sw * ci,
        -co * sw - so * cw * ci,
        so * si,
        so * cw + co * sw * ci,
        -so * sw + co * cw * ci,
        -co * si,
        sw * si,
        cw * si,
        ci,
    )
}

/// Solve Kepler's equation M = E − e sin E for the eccentric anomaly (0 ≤ e < 1).
/// Newton iteration with a safeguard bracket; converges for every e < 1.
pub fn eccentric_anomaly(m: f64, e: f64) -> f64 {
    // Reduce to [-π, π) (the common case is already there: skip the division).
    let m = if (-PI..PI).contains(&m) {
        m
    } else {
        (m + PI).rem_euclid(TAU) - PI
    };
    if m == 0.0 {
        return 0.0;
    }
    // Second-order starter (Danby 1987, from memory): E0 = M + e sin M (1 + e cos M).
    crate::work::charge(60);
    let (sm, cm) = m.sin_cos();
    let mut x = m + e * sm * (1.0 + e * cm);
    let (mut lo, mut hi) = if m > 0.0 { (0.0, PI) } else { (-PI, 0.0) };
    for _ in 0..60 {
        let (s, c) = x.sin_cos();
        let f = x - e * s - m;
        if f == 0.0 {
            return x;
        }
        if f > 0.0 {
            hi = x;
        } else {
            lo = x;
        }
        let fp = 1.0 - e * c;
        let mut nx = x - f / fp;
        if !(nx >= lo && nx <= hi) {
            nx = 0.5 * (lo + hi);
        }
        // After a Newton step of size Δ the error is about Δ² e sin E / (2 fp): below rounding
        // once |Δ| < 1e-9 (for e < 0.99), so no further iteration is needed.
        if (nx - x).abs() < 1e-9 {
            return nx;
        }
        x = nx;
    }
    x
}

/// Solve the hyperbolic Kepler equation M = e sinh H − H for H (e > 1).
pub fn hyperbolic_anomaly(m: f64, e: f64) -> f64 {
    if m == 0.0 {
        return 0.0;
    }
    crate::work::charge(1200); // at most ~1 100 bracket doublings, then 100 steps
    let sgn = m.signum();
    let ma = m.abs();
    // Bracket: H in (0, asinh(M/e)+something]; f(H) = e sinh H − H − M is increasing for H>0.
    let mut lo = 0.0;
    let mut hi = ((ma / e) + 1.0).asinh().max(1.0);
    // sinh overflows after about ten doublings, which ends the loop; the cap is a second guard.
    let mut doublings = 0;
    while e * hi.sinh() - hi - ma < 0.0 && doublings < 1100 {
        hi *= 2.0;
        doublings += 1;
    }
    let mut x = (2.0 * ma / e + 1.8).ln().min(hi).max(1e-3 * hi);
    for _ in 0..100 {
        let f = e * x.sinh() - x - ma;
        if f == 0.0 {
            return sgn * x;
        }
        if f > 0.0 {
            hi = x;
        } else {
            lo = x;
        }
        let fp = e * x.cosh() - 1.0;
        let mut nx = x - f / fp;
        if !(nx >= lo && nx <= hi && nx.is_finite()) {
            nx = 0.5 * (lo + hi);
        }
        if (nx - x).abs() < 1e-15 * (1.0 + x.abs()) {
            return sgn * nx;
        }
        x = nx;
    }
    sgn * x
}

/// Barker's equation for the parabola, `D + D³/3 = q` with D = tan(ν/2), solved in closed form
/// (Cardano: D = Y − 1/Y, Y³ = (3q + √(9q² + 4))/2). Returns ν.
pub fn parabolic_true_anomaly(q: f64) -> f64 {
    let y = ((3.0 * q + (9.0 * q * q + 4.0).sqrt()) / 2.0).cbrt();
    let d = y - 1.0 / y;
    2.0 * d.atan()
}

/// True anomaly at `dt` seconds after periapsis for a conic of periapsis radius `rp` and
/// eccentricity `e` about a body of parameter `mu`. Works for ellipses, parabolas and hyperbolas.
pub fn true_anomaly_from_time(rp: f64, e: f64, mu: f64, dt: f64) -> f64 {
    if (e - 1.0).abs() < 1e-9 {
        let mp = dt * (mu / (2.0 * rp * rp * rp)).sqrt();
        parabolic_true_anomaly(mp)
    } else if e < 1.0 {
        let a = rp / (1.0 - e);
        let n = (mu / (a * a * a)).sqrt();
        let ea = eccentric_anomaly(n * dt, e);
        let rev = ((n * dt + PI) / TAU).floor();
        2.0 * (((1.0 + e) / (1.0 - e)).sqrt() * (ea / 2.0).tan()).atan() + rev * TAU
    } else {
        let a = rp / (e - 1.0);
        let n = (mu / (a * a * a)).sqrt();
        let h = hyperbolic_anomaly(n * dt, e);
        2.0 * (((e + 1.0) / (e - 1.0)).sqrt() * (h / 2.0).tanh()).atan()
    }
}

/// Time since periapsis (s) at true anomaly `nu` for any conic (single revolution for ellipses).
pub fn time_from_true_anomaly(rp: f64, e: f64, mu: f64, nu: f64) -> f64 {
    if (e - 1.0).abs() < 1e-9 {
        let d = (nu / 2.0).tan();
        (d + d * d * d / 3.0) * (2.0 * rp * rp * rp / mu).sqrt()
    } else if e < 1.0 {
        let a = rp / (1.0 - e);
        let n = (mu / (a * a * a)).sqrt();
        let ea = 2.0 * (((1.0 - e) / (1.0 + e)).sqrt() * (nu / 2.0).tan()).atan();
        (ea - e * ea.sin()) / n
    } else {
        let a = rp / (e - 1.0);
        let n = (mu / (a * a * a)).sqrt();
        let h = 2.0 * (((e - 1.0) / (e + 1.0)).sqrt() * (nu / 2.0).tan()).atanh();
        (e * h.sinh() - h) / n
    }
}

/// Stumpff functions C(z) and S(z), with series near zero.
#[inline]
pub fn stumpff(z: f64) -> (f64, f64) {
    if z > 1e-3 {
        let sz = z.sqrt();
        ((1.0 - sz.cos()) / z, (sz - sz.sin()) / (sz * z))
    } else if z < -1e-3 {
        let sz = (-z).sqrt();
        ((sz.cosh() - 1.0) / -z, (sz.sinh() - sz) / (sz * -z))
    } else {
        // Taylor series to z^4: error ~ z^5/14! for |z| < 1e-3.
        let c = 0.5 - z / 24.0 + z * z / 720.0 - z * z * z / 40_320.0 + z * z * z * z / 3_628_800.0;
        let s = 1.0 / 6.0 - z / 120.0 + z * z / 5_040.0 - z * z * z / 362_880.0
            + z * z * z * z / 39_916_800.0;
        (c, s)
    }
}

/// Propagate a state by `dt` seconds (any sign) on a two-body conic with the universal-variable
/// formulation (Bate, Mueller & White 1971 ch. 4; Vallado algorithm 8). The universal Kepler
/// equation is monotonic in χ, so Newton steps are safeguarded by a bracket and always converge.
pub fn propagate(s: &State, dt: f64, mu: f64) -> Result<State, KeplerError> {
    propagate_split(s, dt, mu, 0)
}

/// Halvings of a long hyperbolic step allowed before giving up (2^12 pieces).
const MAX_SPLIT_DEPTH: u32 = 12;

fn propagate_split(s: &State, dt: f64, mu: f64, depth: u32) -> Result<State, KeplerError> {
    crate::work::charge(300);
    if !(dt.is_finite() && mu > 0.0 && mu.is_finite()) {
        return Err(KeplerError::Degenerate("time step or μ not finite"));
    }
    let r0 = s.r.norm();
    if !(r0.is_finite() && s.v.norm().is_finite()) {
        return Err(KeplerError::Degenerate("state not finite"));
    }
    if r0 == 0.0 {
        return Err(KeplerError::Degenerate("zero position"));
    }
    if dt == 0.0 {
        return Ok(*s);
    }
    let v0 = s.v.norm();
    let sqmu = mu.sqrt();
    let rv = s.r.dot(&s.v) / sqmu;
    let alpha = 2.0 / r0 - v0 * v0 / mu; // 1/a
    // F(χ) = rv χ² C + (1 − α r0) χ³ S + r0 χ − √μ dt, dF/dχ = r(χ) > 0.
    let target = sqmu * dt;
    let eval = |x: f64| -> (f64, f64) {
        let x2 = x * x;
        let (c, sv) = stumpff(alpha * x2);
        let f = rv * x2 * c + (1.0 - alpha * r0) * x2 * x * sv + r0 * x - target;
        let fp = rv * x * (1.0 - alpha * x2 * sv) + (1.0 - alpha * r0) * x2 * c + r0;
        (f, fp)
    };
    // Initial guesses (Vallado, algorithm 8): elliptic χ ≈ √μ dt α; hyperbolic from the log form.
    let mut x = if alpha > 1e-12 {
        sqmu * dt * alpha
    } else if alpha < -1e-12 {
        let a = 1.0 / alpha;
        let sgn = dt.signum();
        let arg = (-2.0 * mu * alpha * dt)
            / (s.r.dot(&s.v) + sgn * (-mu * a).sqrt() * (1.0 - r0 * alpha));
        if arg > 0.0 && arg.is_finite() {
            sgn * (-a).sqrt() * arg.ln()
        } else {
            sgn * (target.abs() / r0).min((6.0 * target.abs()).cbrt())
        }
    } else {
        dt.signum() * (target.abs() / r0).min((6.0 * target.abs()).cbrt().max(1e-6))
    };
    if !x.is_finite() || x == 0.0 {
        x = target / r0;
    }
    // Bracket the root (F is increasing in χ) and iterate Newton safeguarded by bisection
    // (the "rtsafe" scheme): bisect whenever Newton leaves the bracket or fails to halve the step.
    let (mut lo, mut hi) = if dt > 0.0 {
        (0.0, f64::NAN)
    } else {
        (f64::NAN, 0.0)
    };
    if (dt > 0.0 && x <= 0.0) || (dt < 0.0 && x >= 0.0) {
        x = target / r0;
    }
    let mut converged = false;
    let mut dx_old = f64::INFINITY;
    for _ in 0..300 {
        let (f, fp) = eval(x);
        if !f.is_finite() {
            // Overflow of cosh/sinh for a wild guess: the root lies nearer the known side.
            if dt > 0.0 {
                hi = if hi.is_nan() { x } else { hi.min(x) };
            } else {
                lo = if lo.is_nan() { x } else { lo.max(x) };
            }
            x = if lo.is_nan() || hi.is_nan() {
                x * 0.5
            } else {
                0.5 * (lo + hi)
            };
            continue;
        }
        if f == 0.0 {
            converged = true;
            break;
        }
        if f > 0.0 {
            hi = if hi.is_nan() { x } else { hi.min(x) };
        } else {
            lo = if lo.is_nan() { x } else { lo.max(x) };
        }
        let mut nx = x - f / fp;
        let bracketed = !lo.is_nan() && !hi.is_nan();
        let in_bracket = (lo.is_nan() || nx >= lo) && (hi.is_nan() || nx <= hi);
        let slow = bracketed && (2.0 * f).abs() > (dx_old * fp).abs();
        if !in_bracket || !nx.is_finite() || slow {
            nx = if lo.is_nan() {
                hi - 2.0 * (hi.abs() + 1.0)
            } else if hi.is_nan() {
                lo + 2.0 * (lo.abs() + 1.0)
            } else {
                0.5 * (lo + hi)
            };
        }
        dx_old = nx - x;
        let tight = (nx - x).abs() <= 1e-13 * (1.0 + x.abs())
            || (bracketed && (hi - lo) <= 4.0 * f64::EPSILON * hi.abs().max(lo.abs()));
        x = nx;
        if tight {
            converged = true;
            break;
        }
    }
    if !converged && eval(x).0.abs() <= 1e-11 * target.abs().max(r0 * x.abs()) {
        converged = true;
    }
    if !converged {
        return Err(KeplerError::NoConvergence);
    }
    let x2 = x * x;
    if alpha * x2 < -36.0 {
        // Beyond a hyperbolic-anomaly change of 6 the f and g functions lose digits to
        // cancellation (they grow like e^ΔH); two half steps keep the result to ~1e-13.
        if depth >= MAX_SPLIT_DEPTH {
            return Err(KeplerError::NoConvergence);
        }
        let mid = propagate_split(s, 0.5 * dt, mu, depth + 1)?;
        return propagate_split(&mid, 0.5 * dt, mu, depth + 1);
    }
    let (c, sv) = stumpff(alpha * x2);
    let f = 1.0 - x2 / r0 * c;
    let g = dt - x2 * x / sqmu * sv;
    let r = f * s.r + g * s.v;
    let rn = r.norm();
    let fdot = sqmu / (rn * r0) * (alpha * x2 * x * sv - x);
    let gdot = 1.0 - x2 / rn * c;
    let out = State {
        r,
        v: fdot * s.r + gdot * s.v,
    };
    if !(out.r.norm().is_finite() && out.v.norm().is_finite()) {
        return Err(KeplerError::NoConvergence);
    }
    Ok(out)
}

/// Specific orbital energy v²/2 − μ/r, km²/s².
#[inline]
pub fn specific_energy(s: &State, mu: f64) -> f64 {
    0.5 * s.v.norm_squared() - mu / s.r.norm()
}

/// Local escape speed √(2μ/r), km/s.
#[inline]
pub fn escape_speed(mu: f64, r: f64) -> f64 {
    (2.0 * mu / r).sqrt()
}
