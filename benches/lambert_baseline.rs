//! A plain Izzo (2015) single-revolution Lambert solver, written straight from the paper
//! (D. Izzo, "Revisiting Lambert's problem", Celestial Mechanics and Dynamical Astronomy 121
//! (2015) 1-15, algorithm 1 and eqs. 9-30), with no caching or shortcuts: it computes the largest
//! revolution count (with the Halley iterations for the minimum time) as the algorithm states,
//! normalises every vector it uses, evaluates the time of flight and its three derivatives
//! separately. It is the baseline the engine's solver is timed against; only the benchmark uses
//! it. The Householder tolerance and the iteration cap are the engine's, so that the two compare
//! at equal accuracy.

use std::f64::consts::PI;

/// (v1, v2) of the zero-revolution prograde arc, or `None`.
pub fn lambert(r1: [f64; 3], r2: [f64; 3], tof: f64, mu: f64) -> Option<([f64; 3], [f64; 3])> {
    let sub = |a: [f64; 3], b: [f64; 3]| [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
    let norm = |a: [f64; 3]| (a[0] * a[0] + a[1] * a[1] + a[2] * a[2]).sqrt();
    let scale = |a: [f64; 3], k: f64| [a[0] * k, a[1] * k, a[2] * k];
    let cross = |a: [f64; 3], b: [f64; 3]| {
        [
            a[1] * b[2] - a[2] * b[1],
            a[2] * b[0] - a[0] * b[2],
            a[0] * b[1] - a[1] * b[0],
        ]
    };
    let c = sub(r2, r1);
    let cn = norm(c);
    let r1n = norm(r1);
    let r2n = norm(r2);
    let s = (cn + r1n + r2n) / 2.0;
    let ir1 = scale(r1, 1.0 / r1n);
    let ir2 = scale(r2, 1.0 / r2n);
    let h = cross(ir1, ir2);
    let ih = scale(h, 1.0 / norm(h));
    let mut lambda = (1.0 - cn / s).sqrt();
    let (mut it1, mut it2) = if ih[2] < 0.0 {
        lambda = -lambda;
        (cross(ir1, ih), cross(ir2, ih))
    } else {
        (cross(ih, ir1), cross(ih, ir2))
    };
    it1 = scale(it1, 1.0 / norm(it1));
    it2 = scale(it2, 1.0 / norm(it2));
    let t = (2.0 * mu / (s * s * s)).sqrt() * tof;
    // The largest number of revolutions (Izzo 2015, §3): the Halley step for T_min is part of the
    // algorithm even when only the zero-revolution arc is wanted.
    let mut n_max = (t / PI).floor() as u32;
    let t00 = lambda.acos() + lambda * (1.0 - lambda * lambda).sqrt();
    let t0 = t00 + n_max as f64 * PI;
    if n_max > 0 && t < t0 {
        let tmin = t_min(lambda, n_max);
        if tmin > t {
            n_max -= 1;
        }
    }
    let _ = n_max;
    // Initial guess (eq. 30).
    let t1 = 2.0 / 3.0 * (1.0 - lambda * lambda * lambda);
    let x0 = if t >= t00 {
        -(t - t00) / (t - t00 + 4.0)
    } else if t <= t1 {
        t1 * (t1 - t) / (2.0 / 5.0 * (1.0 - lambda.powi(5)) * t) + 1.0
    } else {
        (t / t00).powf((2.0f64).ln() / (t1 / t00).ln()) - 1.0
    };
    // Householder iterations.
    let mut x = x0;
    let mut converged = false;
    for _ in 0..25 {
        let tof_x = x2tof(x, 0, lambda);
        let (dt, ddt, dddt) = dtdx(x, tof_x, lambda);
        let delta = tof_x - t;
        let dt2 = dt * dt;
        let xnew = x - delta * (dt2 - delta * ddt / 2.0)
            / (dt * (dt2 - delta * ddt) + dddt * delta * delta / 6.0);
        let err = (x - xnew).abs();
        x = xnew;
        if err < 1e-11 {
            converged = true;
            break;
        }
    }
    if !converged || !x.is_finite() {
        return None;
    }
    // Velocities (Algorithm 1).
    let gamma = (mu * s / 2.0).sqrt();
    let rho = (r1n - r2n) / cn;
    let sigma = (1.0 - rho * rho).sqrt();
    let y = (1.0 - lambda * lambda + lambda * lambda * x * x).sqrt();
    let vr1 = gamma * ((lambda * y - x) - rho * (lambda * y + x)) / r1n;
    let vr2 = -gamma * ((lambda * y - x) + rho * (lambda * y + x)) / r2n;
    let vt = gamma * sigma * (y + lambda * x);
    let vt1 = vt / r1n;
    let vt2 = vt / r2n;
    let v1 = [
        vr1 * ir1[0] + vt1 * it1[0],
        vr1 * ir1[1] + vt1 * it1[1],
        vr1 * ir1[2] + vt1 * it1[2],
    ];
    let v2 = [
        vr2 * ir2[0] + vt2 * it2[0],
        vr2 * ir2[1] + vt2 * it2[1],
        vr2 * ir2[2] + vt2 * it2[2],
    ];
    Some((v1, v2))
}

fn t_min(lambda: f64, n: u32) -> f64 {
    let mut xi = 0.1;
    let mut ti = x2tof(xi, n, lambda);
    for _ in 0..12 {
        let (dt, ddt, dddt) = dtdx(xi, ti, lambda);
        if dt == 0.0 {
            break;
        }
        let xnew = xi - dt * ddt / (ddt * ddt - dt * dddt / 2.0);
        let err = (xi - xnew).abs();
        ti = x2tof(xnew, n, lambda);
        xi = xnew;
        if err < 1e-13 {
            break;
        }
    }
    ti
}

fn x2tof2(x: f64, n: u32, lambda: f64) -> f64 {
    let a = 1.0 / (1.0 - x * x);
    if a > 0.0 {
        let alfa = 2.0 * x.acos();
        let mut beta = 2.0 * (lambda * lambda / a).sqrt().asin();
        if lambda < 0.0 {
            beta = -beta;
        }
        a * a.sqrt() * ((alfa - alfa.sin()) - (beta - beta.sin()) + 2.0 * PI * n as f64) / 2.0
    } else {
        let alfa = 2.0 * x.acosh();
        let mut beta = 2.0 * (-lambda * lambda / a).sqrt().asinh();
        if lambda < 0.0 {
            beta = -beta;
        }
        -a * (-a).sqrt() * ((beta - beta.sinh()) - (alfa - alfa.sinh())) / 2.0
    }
}

fn x2tof(x: f64, n: u32, lambda: f64) -> f64 {
    let battin = 0.01;
    let lagrange = 0.2;
    let dist = (x - 1.0).abs();
    if dist < lagrange && dist > battin {
        return x2tof2(x, n, lambda);
    }
    let k = lambda * lambda;
    let e = x * x - 1.0;
    let rho = e.abs();
    let z = (1.0 + k * e).sqrt();
    if dist < battin {
        let eta = z - lambda * x;
        let s1 = 0.5 * (1.0 - lambda - x * eta);
        let mut sj = 1.0;
        let mut cj = 1.0;
        let mut j = 0.0;
        loop {
            let cj1 = cj * (3.0 + j) * (1.0 + j) / (2.5 + j) * s1 / (j + 1.0);
            sj += cj1;
            cj = cj1;
            j += 1.0;
            if cj1.abs() <= 1e-11 {
                break;
            }
        }
        let q = 4.0 / 3.0 * sj;
        (eta * eta * eta * q + 4.0 * lambda * eta) / 2.0 + n as f64 * PI / rho.powf(1.5)
    } else {
        let y = rho.sqrt();
        let g = x * z - lambda * e;
        let d = if e < 0.0 {
            n as f64 * PI + g.acos()
        } else {
            let f = y * (z - lambda * x);
            (f + g).ln()
        };
        (x - lambda * z - d / y) / e
    }
}

fn dtdx(x: f64, t: f64, lambda: f64) -> (f64, f64, f64) {
    let l2 = lambda * lambda;
    let l3 = l2 * lambda;
    let umx2 = 1.0 - x * x;
    let y = (1.0 - l2 * umx2).sqrt();
    let y2 = y * y;
    let y3 = y2 * y;
    let dt = 1.0 / umx2 * (3.0 * t * x - 2.0 + 2.0 * l3 * x / y);
    let ddt = 1.0 / umx2 * (3.0 * t + 5.0 * x * dt + 2.0 * (1.0 - l2) * l3 / y3);
    let dddt = 1.0 / umx2 * (7.0 * x * ddt + 8.0 * dt - 6.0 * (1.0 - l2) * l2 * l3 * x / y3 / y2);
    (dt, ddt, dddt)
}
