//! Lambert's problem by Izzo's method (D. Izzo, "Revisiting Lambert's problem", Celestial
//! Mechanics and Dynamical Astronomy 121 (2015) 1-15): Householder iterations on the variable x
//! with Lancaster-Blanchard time-of-flight, Battin's series near the parabola, all revolutions
//! and both multi-revolution branches. Allocation-free: solutions come back in a fixed array.

use std::f64::consts::PI;

use crate::Vec3;

/// The largest number of complete revolutions the solver will consider.
pub const MAX_REVS: usize = 8;
/// Capacity of the solution set: one zero-revolution arc plus two branches per revolution.
pub const MAX_SOLUTIONS: usize = 1 + 2 * MAX_REVS;

/// Direction of motion around the central body relative to the frame's +z axis.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize, Default)]
pub enum Direction {
    /// Counter-clockwise seen from +z (the sense of the planets in the ecliptic frame).
    #[default]
    Prograde,
    /// Clockwise seen from +z.
    Retrograde,
}

/// Which of the two multi-revolution solutions.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize, Default)]
pub enum Branch {
    /// The solution with the smaller x (Izzo's "left" branch; higher-energy, shorter-period).
    #[default]
    Left,
    /// The solution with the larger x (Izzo's "right" branch).
    Right,
}

/// One solution of Lambert's problem.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LambertSolution {
    /// Velocity at r1, km/s.
    pub v1: Vec3,
    /// Velocity at r2, km/s.
    pub v2: Vec3,
    /// Complete revolutions.
    pub revs: u32,
    /// Multi-revolution branch (Left for the zero-revolution arc).
    pub branch: Branch,
    /// Izzo's x variable of the solution (x < 1 ellipse, x = 1 parabola, x > 1 hyperbola).
    pub x: f64,
    /// Householder iterations used.
    pub iterations: u32,
}

/// Every solution the inputs admit, stored without allocation.
#[derive(Clone, Copy, Debug)]
pub struct LambertSolutions {
    n: usize,
    sols: [LambertSolution; MAX_SOLUTIONS],
}

impl LambertSolutions {
    /// The solutions found, zero-revolution first, then for each revolution Left then Right.
    pub fn as_slice(&self) -> &[LambertSolution] {
        &self.sols[..self.n]
    }
    /// Number of solutions.
    pub fn len(&self) -> usize {
        self.n
    }
    /// True when there is none.
    pub fn is_empty(&self) -> bool {
        self.n == 0
    }
    /// The solution with `revs` revolutions on `branch`, if the inputs admit it.
    pub fn get(&self, revs: u32, branch: Branch) -> Option<&LambertSolution> {
        self.as_slice()
            .iter()
            .find(|s| s.revs == revs && (revs == 0 || s.branch == branch))
    }
}

/// Why Lambert's problem has no answer for these inputs.
#[derive(Clone, Copy, Debug, PartialEq, thiserror::Error)]
pub enum LambertError {
    /// Time of flight zero, negative or not finite.
    #[error("time of flight must be positive (got {0} s)")]
    NonPositiveTof(f64),
    /// A position vector of zero length or not finite.
    #[error("position vector of zero length or not finite")]
    ZeroRadius,
    /// The gravitational parameter is not positive.
    #[error("gravitational parameter must be positive")]
    BadMu,
    /// The two positions coincide, so the transfer plane and chord are undefined.
    #[error("the two positions coincide")]
    CoincidentPositions,
    /// More revolutions were requested than the time of flight allows.
    #[error("{requested} revolutions requested but the time of flight allows at most {possible}")]
    TooManyRevolutions {
        /// Revolutions asked for.
        requested: u32,
        /// Revolutions possible for this geometry and TOF.
        possible: u32,
    },
    /// The iteration did not converge (not seen in testing; reported rather than returning NaN).
    #[error("Lambert iteration did not converge")]
    NoConvergence,
}

struct Geometry {
    lambda: f64,
    t: f64,
}

impl Geometry {
    #[inline]
    fn x2tof2(&self, x: f64, n: u32) -> f64 {
        let a = 1.0 / (1.0 - x * x);
        let l = self.lambda;
        if a > 0.0 {
            let alfa = 2.0 * x.acos();
            let mut beta = 2.0 * (l * l / a).sqrt().asin();
            if l < 0.0 {
                beta = -beta;
            }
            a * a.sqrt() * ((alfa - alfa.sin()) - (beta - beta.sin()) + 2.0 * PI * n as f64) / 2.0
        } else {
            let alfa = 2.0 * x.acosh();
            let mut beta = 2.0 * (-l * l / a).sqrt().asinh();
            if l < 0.0 {
                beta = -beta;
            }
            -a * (-a).sqrt() * ((beta - beta.sinh()) - (alfa - alfa.sinh())) / 2.0
        }
    }

    #[inline]
    fn x2tof(&self, x: f64, n: u32) -> f64 {
        const BATTIN: f64 = 0.01;
        const LAGRANGE: f64 = 0.2;
        let dist = (x - 1.0).abs();
        if dist < LAGRANGE && dist > BATTIN {
            return self.x2tof2(x, n);
        }
        let l = self.lambda;
        let k = l * l;
        let e = x * x - 1.0;
        let rho = e.abs();
        let z = (1.0 + k * e).sqrt();
        if dist < BATTIN {
            let eta = z - l * x;
            let s1 = 0.5 * (1.0 - l - x * eta);
            let q = 4.0 / 3.0 * hypergeometric_f(s1, 1e-11);
            (eta * eta * eta * q + 4.0 * l * eta) / 2.0 + n as f64 * PI / rho.powf(1.5)
        } else {
            let y = rho.sqrt();
            let g = x * z - l * e;
            let d = if e < 0.0 {
                n as f64 * PI + g.clamp(-1.0, 1.0).acos()
            } else {
                let f = y * (z - l * x);
                (f + g).ln()
            };
            (x - l * z - d / y) / e
        }
    }

    #[inline]
    fn dtdx(&self, x: f64, t: f64) -> (f64, f64, f64) {
        let l2 = self.lambda * self.lambda;
        let l3 = l2 * self.lambda;
        let umx2 = 1.0 - x * x;
        let y = (1.0 - l2 * umx2).sqrt();
        let y2 = y * y;
        let y3 = y2 * y;
        let dt = 1.0 / umx2 * (3.0 * t * x - 2.0 + 2.0 * l3 * x / y);
        let ddt = 1.0 / umx2 * (3.0 * t + 5.0 * x * dt + 2.0 * (1.0 - l2) * l3 / y3);
        let dddt =
            1.0 / umx2 * (7.0 * x * ddt + 8.0 * dt - 6.0 * (1.0 - l2) * l2 * l3 * x / y3 / y2);
        (dt, ddt, dddt)
    }

    fn householder(&self, mut x0: f64, n: u32, eps: f64, max_iter: u32) -> (f64, u32) {
        crate::work::charge(max_iter as u64);
        let mut it = 0;
        while it < max_iter {
            let tof = self.x2tof(x0, n);
            let (dt, ddt, dddt) = self.dtdx(x0, tof);
            let delta = tof - self.t;
            let dt2 = dt * dt;
            let xnew = x0
                - delta * (dt2 - delta * ddt / 2.0)
                    / (dt * (dt2 - delta * ddt) + dddt * delta * delta / 6.0);
            it += 1;
            let err = (x0 - xnew).abs();
            x0 = xnew;
            if err < eps || !x0.is_finite() {
                break;
            }
        }
        (x0, it)
    }

    /// Izzo's initial guess for the zero-revolution arc (2015, eq. 30); `t00` is T at x = 0.
    #[inline]
    fn initial_guess_zero_rev(&self, t00: f64) -> f64 {
        let (l, t) = (self.lambda, self.t);
        let t1 = 2.0 / 3.0 * (1.0 - l * l * l);
        if t >= t00 {
            -(t - t00) / (t - t00 + 4.0)
        } else if t <= t1 {
            t1 * (t1 - t) / (2.0 / 5.0 * (1.0 - l.powi(5)) * t) + 1.0
        } else {
            (t / t00).powf(std::f64::consts::LN_2 / (t1 / t00).ln()) - 1.0
        }
    }

    /// T(x) and its first three derivatives for zero revolutions, sharing y = √(1 − λ²(1 − x²))
    /// between the Lancaster-Blanchard form and the derivatives (Izzo 2015, eqs. 18-22).
    #[inline]
    fn tof_and_derivatives_zero_rev(&self, x: f64) -> (f64, f64, f64, f64) {
        const BATTIN: f64 = 0.01;
        const LAGRANGE: f64 = 0.2;
        let l = self.lambda;
        let l2 = l * l;
        let umx2 = 1.0 - x * x;
        let y = (1.0 - l2 * umx2).sqrt();
        let dist = (x - 1.0).abs();
        let tof = if dist < LAGRANGE && dist > BATTIN {
            self.x2tof2(x, 0)
        } else if dist < BATTIN {
            let eta = y - l * x;
            let s1 = 0.5 * (1.0 - l - x * eta);
            let q = 4.0 / 3.0 * hypergeometric_f(s1, 1e-11);
            (eta * eta * eta * q + 4.0 * l * eta) / 2.0
        } else {
            let e = -umx2;
            let sq = e.abs().sqrt();
            let gg = x * y - l * e;
            let d = if e < 0.0 {
                gg.clamp(-1.0, 1.0).acos()
            } else {
                (sq * (y - l * x) + gg).ln()
            };
            (x - l * y - d / sq) / e
        };
        let l3 = l2 * l;
        let iy = 1.0 / y;
        let iy3 = iy * iy * iy;
        let inv = 1.0 / umx2;
        let dt = inv * (3.0 * tof * x - 2.0 + 2.0 * l3 * x * iy);
        let ddt = inv * (3.0 * tof + 5.0 * x * dt + 2.0 * (1.0 - l2) * l3 * iy3);
        let dddt =
            inv * (7.0 * x * ddt + 8.0 * dt - 6.0 * (1.0 - l2) * l2 * l3 * x * iy3 * iy * iy);
        (tof, dt, ddt, dddt)
    }

    /// Householder iterations for zero revolutions with the fused T(x) and derivatives. The
    /// method converges with order four (Householder 1970): once a step is below `eps^(1/3)` the
    /// next correction would be far below `eps`, so the iteration stops there instead of paying
    /// one more evaluation to confirm it.
    #[inline]
    fn householder_zero_rev(&self, mut x: f64, eps: f64, max_iter: u32) -> (f64, u32) {
        let early = eps.sqrt().sqrt() * 0.05;
        for it in 1..=max_iter {
            let (tof, dt, ddt, dddt) = self.tof_and_derivatives_zero_rev(x);
            let delta = tof - self.t;
            let dt2 = dt * dt;
            let xnew = x - delta * (dt2 - delta * ddt / 2.0)
                / (dt * (dt2 - delta * ddt) + dddt * delta * delta / 6.0);
            let err = (x - xnew).abs();
            x = xnew;
            if err < early {
                return (x, it);
            }
            if !x.is_finite() {
                break;
            }
        }
        (f64::NAN, max_iter)
    }

    /// Minimum non-dimensional TOF of the n-revolution family (Halley iterations).
    fn t_min(&self, n: u32) -> f64 {
        if self.lambda == 1.0 {
            return self.x2tof(0.0, n);
        }
        let mut xi = 0.1;
        let mut ti = self.x2tof(xi, n);
        for _ in 0..12 {
            let (dt, ddt, dddt) = self.dtdx(xi, ti);
            if dt == 0.0 {
                break;
            }
            let xnew = xi - dt * ddt / (ddt * ddt - dt * dddt / 2.0);
            let err = (xi - xnew).abs();
            ti = self.x2tof(xnew, n);
            xi = xnew;
            if err < 1e-13 {
                break;
            }
        }
        ti
    }
}

#[inline]
fn hypergeometric_f(z: f64, tol: f64) -> f64 {
    let (mut sj, mut cj) = (1.0, 1.0);
    let mut j = 0.0;
    loop {
        let cj1 = cj * (3.0 + j) * (1.0 + j) / (2.5 + j) * z / (j + 1.0);
        sj += cj1;
        cj = cj1;
        j += 1.0;
        if cj1.abs() <= tol || j > 1000.0 {
            return sj;
        }
    }
}

/// The geometry of one Lambert problem in Izzo's non-dimensional form, with the unit vectors the
/// velocities are built from.
struct Frame {
    g: Geometry,
    r1n: f64,
    r2n: f64,
    ir1: Vec3,
    ir2: Vec3,
    it1: Vec3,
    it2: Vec3,
    gamma: f64,
    rho: f64,
    sigma: f64,
}

impl Frame {
    fn new(r1: &Vec3, r2: &Vec3, tof: f64, mu: f64, dir: Direction) -> Result<Frame, LambertError> {
        if !(tof > 0.0) || !tof.is_finite() {
            return Err(LambertError::NonPositiveTof(tof));
        }
        if !(mu > 0.0) || !mu.is_finite() {
            return Err(LambertError::BadMu);
        }
        let r1n = r1.norm();
        let r2n = r2.norm();
        if !(r1n > 0.0 && r2n > 0.0 && r1n.is_finite() && r2n.is_finite()) {
            return Err(LambertError::ZeroRadius);
        }
        let c = r2 - r1;
        let cn = c.norm();
        if cn <= 1e-14 * (r1n + r2n) {
            return Err(LambertError::CoincidentPositions);
        }
        let s = (r1n + r2n + cn) / 2.0;
        let ir1 = r1 * (1.0 / r1n);
        let ir2 = r2 * (1.0 / r2n);
        let h = ir1.cross(&ir2);
        let hn = h.norm();
        let ih = if hn > 1e-12 {
            h * (1.0 / hn)
        } else {
            // Collinear (0°, 180° or 360°): any plane containing r1 works; take the one whose
            // normal is nearest +z, or one containing x when r1 lies along z.
            let fallback = ir1.cross(&Vec3::new(1.0, 0.0, 0.0));
            let fallback = if fallback.norm() > 1e-8 {
                fallback.normalize()
            } else {
                ir1.cross(&Vec3::new(0.0, 1.0, 0.0)).normalize()
            };
            fix_normal(&ir1, &fallback)
        };
        // λ² = 1 − c/s cancels badly near 180° (c → r1 + r2); the same quantity written as
        // r1 r2 |î1 + î2|² / (4 s²) (from 1 + cos θ = |î1 + î2|²/2) keeps full precision there.
        let mut lambda = (r1n * r2n * (ir1 + ir2).norm_squared()).sqrt() / (2.0 * s);
        // ih is a unit vector and normal to both î1 and î2, so ih × î is a unit vector too.
        let (mut it1, mut it2);
        if ih.z < 0.0 {
            lambda = -lambda;
            it1 = ir1.cross(&ih);
            it2 = ir2.cross(&ih);
        } else {
            it1 = ih.cross(&ir1);
            it2 = ih.cross(&ir2);
        }
        if hn <= 1e-12 {
            it1 /= it1.norm();
            it2 /= it2.norm();
        }
        if dir == Direction::Retrograde {
            lambda = -lambda;
            it1 = -it1;
            it2 = -it2;
        }
        // T = √(2μ/s³) tof and γ = √(μ s/2) share one square root.
        let q = (mu / (2.0 * s)).sqrt();
        let t = 2.0 * q / s * tof;
        let rho = (r1n - r2n) / cn;
        Ok(Frame {
            g: Geometry { lambda, t },
            r1n,
            r2n,
            ir1,
            ir2,
            it1,
            it2,
            gamma: q * s,
            rho,
            sigma: (1.0 - rho * rho).max(0.0).sqrt(),
        })
    }

    /// Velocities at both ends for the solution x.
    #[inline]
    fn velocities(&self, x: f64) -> Option<(Vec3, Vec3)> {
        let l = self.g.lambda;
        let y = (1.0 - l * l * (1.0 - x * x)).sqrt();
        if !(x.is_finite() && y.is_finite()) {
            return None;
        }
        let (gamma, rho) = (self.gamma, self.rho);
        let vr1 = gamma * ((l * y - x) - rho * (l * y + x)) / self.r1n;
        let vr2 = -gamma * ((l * y - x) + rho * (l * y + x)) / self.r2n;
        let vt = gamma * self.sigma * (y + l * x);
        Some((
            vr1 * self.ir1 + vt / self.r1n * self.it1,
            vr2 * self.ir2 + vt / self.r2n * self.it2,
        ))
    }
}

/// Solve Lambert's problem for `r1` -> `r2` in `tof` seconds about a body of parameter `mu`,
/// returning every solution with up to `max_revs` complete revolutions (capped at [`MAX_REVS`]).
///
/// Near-180° transfers are solved in the plane given by r1 × r2; at exactly 180° (or 0°/360°) the
/// plane is undefined and the solver takes the one containing r1 and the frame's +z-normal
/// direction (the ecliptic, for heliocentric work), which is what a designer expects.
pub fn solve(
    r1: &Vec3,
    r2: &Vec3,
    tof: f64,
    mu: f64,
    dir: Direction,
    max_revs: u32,
) -> Result<LambertSolutions, LambertError> {
    let f = Frame::new(r1, r2, tof, mu, dir)?;
    let g = &f.g;
    let (lambda, t) = (g.lambda, g.t);
    // Revolutions possible.
    let mut n_max = (t / PI).floor() as u32;
    let t00 = lambda.acos() + lambda * (1.0 - lambda * lambda).sqrt();
    let t0 = t00 + n_max as f64 * PI;
    if n_max > 0 && t < t0 && g.t_min(n_max) > t {
        n_max -= 1;
    }
    let n_max = n_max.min(max_revs).min(MAX_REVS as u32);

    let dummy = LambertSolution {
        v1: Vec3::zeros(),
        v2: Vec3::zeros(),
        revs: 0,
        branch: Branch::Left,
        x: 0.0,
        iterations: 0,
    };
    let mut out = LambertSolutions {
        n: 0,
        sols: [dummy; MAX_SOLUTIONS],
    };

    let mut push = |x: f64, revs: u32, branch: Branch, iters: u32| -> bool {
        // Reject non-converged iterates (they show up as a TOF mismatch), never return NaN.
        let tof_x = g.x2tof(x, revs);
        if !tof_x.is_finite() || (tof_x - t).abs() > 1e-7 * t.max(1.0) {
            return false;
        }
        let Some((v1, v2)) = f.velocities(x) else {
            return false;
        };
        out.sols[out.n] = LambertSolution {
            v1,
            v2,
            revs,
            branch,
            x,
            iterations: iters,
        };
        out.n += 1;
        true
    };

    let x0 = g.initial_guess_zero_rev(t00);
    let (x, it) = g.householder(x0, 0, 1e-11, 25);
    let ok0 = push(x, 0, Branch::Left, it);
    for i in 1..=n_max {
        let ip = i as f64 * PI;
        let tmp = ((ip + PI) / (8.0 * t)).powf(2.0 / 3.0);
        let (xl, itl) = g.householder((tmp - 1.0) / (tmp + 1.0), i, 1e-11, 25);
        push(xl, i, Branch::Left, itl);
        let tmp = ((8.0 * t) / ip).powf(2.0 / 3.0);
        let (xr, itr) = g.householder((tmp - 1.0) / (tmp + 1.0), i, 1e-11, 25);
        push(xr, i, Branch::Right, itr);
    }
    if !ok0 && out.n == 0 {
        return Err(LambertError::NoConvergence);
    }
    Ok(out)
}

fn fix_normal(ir1: &Vec3, guess: &Vec3) -> Vec3 {
    // Project +z onto the plane normal to r1; fall back to a guess when r1 is along z.
    let z = Vec3::new(0.0, 0.0, 1.0);
    let cand = z - ir1 * ir1.dot(&z);
    if cand.norm() > 1e-8 {
        cand.normalize()
    } else {
        *guess
    }
}

/// The zero-revolution solution alone (the common case on hot paths).
#[inline]
pub fn solve_single(
    r1: &Vec3,
    r2: &Vec3,
    tof: f64,
    mu: f64,
    dir: Direction,
) -> Result<LambertSolution, LambertError> {
    // The single-revolution path skips what only multi-revolution arcs need: the largest
    // revolution count and its minimum-time (Halley) iterations, and the solution set.
    let f = Frame::new(r1, r2, tof, mu, dir)?;
    let g = &f.g;
    let l = g.lambda;
    let t00 = l.acos() + l * (1.0 - l * l).sqrt();
    let (x, iterations) = g.householder_zero_rev(g.initial_guess_zero_rev(t00), 1e-11, 25);
    let (v1, v2) = f.velocities(x).ok_or(LambertError::NoConvergence)?;
    Ok(LambertSolution {
        v1,
        v2,
        revs: 0,
        branch: Branch::Left,
        x,
        iterations,
    })
}

/// The solution with exactly `revs` revolutions on `branch`, or a typed error saying how many
/// revolutions the time of flight allows.
pub fn solve_revs(
    r1: &Vec3,
    r2: &Vec3,
    tof: f64,
    mu: f64,
    dir: Direction,
    revs: u32,
    branch: Branch,
) -> Result<LambertSolution, LambertError> {
    if revs as usize > MAX_REVS {
        return Err(LambertError::TooManyRevolutions {
            requested: revs,
            possible: MAX_REVS as u32,
        });
    }
    let sols = solve(r1, r2, tof, mu, dir, revs)?;
    match sols.get(revs, branch) {
        Some(s) => Ok(*s),
        None => {
            let possible = sols.as_slice().iter().map(|s| s.revs).max().unwrap_or(0);
            Err(LambertError::TooManyRevolutions {
                requested: revs,
                possible,
            })
        }
    }
}
