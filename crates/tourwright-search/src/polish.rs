//! Local polish of a point inside a box: compass (pattern) search, derivative-free, never leaving
//! the box. Used by the direct-transfer search and at the end of every optimiser run.

/// Clamp that never panics: a box side with `lo > hi` (or a NaN bound) collapses onto `lo`.
#[inline]
pub fn clamp_safe(x: f64, lo: f64, hi: f64) -> f64 {
    if !(lo <= hi) {
        return lo;
    }
    if x < lo {
        lo
    } else if x > hi {
        hi
    } else if x.is_nan() {
        lo
    } else {
        x
    }
}

/// Compass search on a box. `f` returns the score (smaller is better). Starts with steps `step0`,
/// halves them after a sweep without improvement, stops when every step is below
/// `min_step_frac` of its start or after `max_evals`. Returns the best point, its value and the
/// evaluations spent.
pub fn compass_search<F: FnMut(&[f64]) -> f64>(
    f: &mut F,
    x0: &[f64],
    lo: &[f64],
    hi: &[f64],
    step0: &[f64],
    min_step_frac: f64,
    max_evals: usize,
) -> (Vec<f64>, f64, usize) {
    let n = x0.len();
    let mut x: Vec<f64> = (0..n).map(|i| clamp_safe(x0[i], lo[i], hi[i])).collect();
    let mut fx = f(&x);
    let mut step = step0.to_vec();
    let mut evals = 1;
    let mut trial = x.clone();
    while evals < max_evals {
        let mut improved = false;
        for i in 0..n {
            for sgn in [1.0, -1.0] {
                trial.copy_from_slice(&x);
                trial[i] = clamp_safe(x[i] + sgn * step[i], lo[i], hi[i]);
                if trial[i] == x[i] {
                    continue;
                }
                let ft = f(&trial);
                evals += 1;
                if ft < fx {
                    fx = ft;
                    x.copy_from_slice(&trial);
                    improved = true;
                    break;
                }
            }
        }
        if !improved {
            let mut all_small = true;
            for i in 0..n {
                step[i] *= 0.5;
                if step[i] > step0[i] * min_step_frac {
                    all_small = false;
                }
            }
            if all_small {
                break;
            }
        }
    }
    (x, fx, evals)
}

/// Settings of the quasi-Newton local solver.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LocalOptions {
    /// Most objective evaluations (gradients included).
    pub max_evals: usize,
    /// Finite-difference step as a fraction of each variable's range.
    pub fd_step: f64,
    /// Stop when an iteration improves the value by less than this (relative).
    pub f_tol: f64,
}

impl Default for LocalOptions {
    fn default() -> Self {
        LocalOptions {
            max_evals: 800,
            fd_step: 1e-7,
            f_tol: 1e-12,
        }
    }
}

/// Box-constrained quasi-Newton descent (projected BFGS with central-difference gradients and an
/// Armijo backtracking line search along the projected path), in variables scaled to [0, 1].
/// Variables with `lo == hi` stay fixed; so do those listed in `fixed` (integer choices).
/// Returns the best point, its value and the evaluations spent. Never leaves the box; a
/// non-finite value is treated as "worse than anything".
pub fn bfgs_box<F: FnMut(&[f64]) -> f64>(
    f: &mut F,
    x0: &[f64],
    lo: &[f64],
    hi: &[f64],
    fixed: &[bool],
    opts: &LocalOptions,
) -> (Vec<f64>, f64, usize) {
    let n = x0.len();
    let span: Vec<f64> = (0..n)
        .map(|i| if hi[i] > lo[i] { hi[i] - lo[i] } else { 0.0 })
        .collect();
    let free: Vec<bool> = (0..n)
        .map(|i| span[i] > 0.0 && !fixed.get(i).copied().unwrap_or(false))
        .collect();
    let mut sc = Scaled {
        f,
        x0,
        lo,
        hi,
        span: &span,
        free: &free,
        x: vec![0.0; n],
        evals: 0,
        h: opts.fd_step,
    };
    let mut u: Vec<f64> = (0..n)
        .map(|i| {
            if span[i] > 0.0 {
                clamp_safe((x0[i] - lo[i]) / span[i], 0.0, 1.0)
            } else {
                0.0
            }
        })
        .collect();
    let mut fu = sc.value(&u);
    let mut g = vec![0.0; n];
    sc.grad(&u, &mut g);
    let mut hinv = identity(n);
    let mut d = vec![0.0; n];
    let mut un = vec![0.0; n];
    let mut gn = vec![0.0; n];
    while sc.evals + 2 * n + 2 < opts.max_evals {
        // Variables held at a bound by the gradient do not move this iteration.
        let active: Vec<bool> = (0..n)
            .map(|i| !free[i] || (u[i] <= 0.0 && g[i] > 0.0) || (u[i] >= 1.0 && g[i] < 0.0))
            .collect();
        for i in 0..n {
            d[i] = if active[i] {
                0.0
            } else {
                -(0..n)
                    .filter(|&j| !active[j])
                    .map(|j| hinv[i][j] * g[j])
                    .sum::<f64>()
            };
        }
        let mut slope: f64 = (0..n).map(|i| d[i] * g[i]).sum();
        if !(slope < 0.0) {
            hinv = identity(n);
            for i in 0..n {
                d[i] = if active[i] { 0.0 } else { -g[i] };
            }
            slope = (0..n).map(|i| d[i] * g[i]).sum();
            if !(slope < 0.0) {
                break;
            }
        }
        // Keep the first trial step inside a tenth of the box in every variable.
        let dmax = d.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        let mut alpha = if dmax > 0.1 { 0.1 / dmax } else { 1.0 };
        let mut accepted = None;
        for _ in 0..30 {
            for i in 0..n {
                un[i] = (u[i] + alpha * d[i]).clamp(0.0, 1.0);
            }
            let fn_ = sc.value(&un);
            let dec: f64 = (0..n).map(|i| g[i] * (un[i] - u[i])).sum();
            if fn_ <= fu + 1e-4 * dec.min(0.0) && fn_ < fu {
                accepted = Some(fn_);
                break;
            }
            alpha *= 0.5;
            if sc.evals >= opts.max_evals {
                break;
            }
        }
        let Some(fnew) = accepted else {
            break;
        };
        sc.grad(&un, &mut gn);
        let s: Vec<f64> = (0..n).map(|i| un[i] - u[i]).collect();
        let y: Vec<f64> = (0..n).map(|i| gn[i] - g[i]).collect();
        let sy: f64 = (0..n).map(|i| s[i] * y[i]).sum();
        if sy > 1e-16 {
            bfgs_update(&mut hinv, &s, &y, sy);
        }
        let improvement = fu - fnew;
        u.copy_from_slice(&un);
        g.copy_from_slice(&gn);
        fu = fnew;
        let step = s.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        if improvement <= opts.f_tol * (1.0 + fu.abs()) || step < 1e-13 {
            break;
        }
    }
    let mut x = vec![0.0; n];
    sc.to_x(&u, &mut x);
    (x, fu, sc.evals)
}

/// The objective seen in variables scaled to [0, 1].
struct Scaled<'a, F> {
    f: &'a mut F,
    x0: &'a [f64],
    lo: &'a [f64],
    hi: &'a [f64],
    span: &'a [f64],
    free: &'a [bool],
    x: Vec<f64>,
    evals: usize,
    h: f64,
}

impl<F: FnMut(&[f64]) -> f64> Scaled<'_, F> {
    fn to_x(&self, u: &[f64], x: &mut [f64]) {
        for i in 0..u.len() {
            x[i] = if self.free[i] {
                clamp_safe(self.lo[i] + u[i] * self.span[i], self.lo[i], self.hi[i])
            } else {
                self.x0[i]
            };
        }
    }

    fn value(&mut self, u: &[f64]) -> f64 {
        let mut x = std::mem::take(&mut self.x);
        self.to_x(u, &mut x);
        self.evals += 1;
        let v = (self.f)(&x);
        self.x = x;
        if v.is_finite() { v } else { f64::MAX }
    }

    /// Central differences, one-sided at a bound.
    fn grad(&mut self, u: &[f64], g: &mut [f64]) {
        let mut up = u.to_vec();
        for i in 0..u.len() {
            g[i] = 0.0;
            if !self.free[i] {
                continue;
            }
            let a = (u[i] - self.h).max(0.0);
            let b = (u[i] + self.h).min(1.0);
            up[i] = a;
            let fa = self.value(&up);
            up[i] = b;
            let fb = self.value(&up);
            up[i] = u[i];
            if b > a && fa < f64::MAX && fb < f64::MAX {
                g[i] = (fb - fa) / (b - a);
            }
        }
    }
}

/// What [`auglag_box`] found.
#[derive(Clone, Debug, PartialEq)]
pub struct ConstrainedResult {
    /// The point.
    pub x: Vec<f64>,
    /// Its objective (without penalty).
    pub f: f64,
    /// Its constraint values (`≤ 0` holds).
    pub g: Vec<f64>,
    /// Evaluations spent.
    pub evals: usize,
}

/// Local minimisation on a box with `m` inequality constraints `g(x) ≤ 0` by the augmented
/// Lagrangian method (Hestenes 1969, Powell 1969, Rockafellar 1973; Nocedal & Wright, *Numerical
/// Optimization*, 2nd ed. 2006, §17.4): each inner problem
/// L(x) = f(x) + Σ [max(0, λ_j + μ g_j)² − λ_j²] / (2μ), smooth and bounded only by the box, is
/// solved by [`bfgs_box`]; then λ_j ← max(0, λ_j + μ g_j), and μ grows tenfold when the
/// violation did not fall to a quarter. The multipliers carry the constraints, so μ stays
/// moderate and the inner problems stay well conditioned, unlike a pure penalty. `fg(x, g)`
/// returns f and fills `g` (one evaluation gives both).
pub fn auglag_box<F: FnMut(&[f64], &mut [f64]) -> f64>(
    fg: &mut F,
    m: usize,
    x0: &[f64],
    lo: &[f64],
    hi: &[f64],
    fixed: &[bool],
    opts: &LocalOptions,
) -> ConstrainedResult {
    let mut lambda = vec![0.0; m];
    let mut mu = 10.0f64;
    let mut x: Vec<f64> = (0..x0.len())
        .map(|i| clamp_safe(x0[i], lo[i], hi[i]))
        .collect();
    let mut g = vec![0.0; m];
    let mut evals = 0usize;
    let mut f = {
        evals += 1;
        clean(fg(&x, &mut g), &mut g)
    };
    let viol = |g: &[f64]| g.iter().map(|v| v.max(0.0)).sum::<f64>();
    let mut prev_viol = viol(&g);
    for outer in 0..12 {
        let left = opts.max_evals.saturating_sub(evals);
        if left < 4 * x.len() + 8 {
            break;
        }
        let budget = if outer == 0 { left / 2 } else { left / 3 }.max(4 * x.len() + 8);
        let mut gw = vec![0.0; m];
        let lam = lambda.clone();
        let mut lagr = |xx: &[f64]| -> f64 {
            let fv = clean(fg(xx, &mut gw), &mut gw);
            let mut l = fv;
            for j in 0..m {
                let t = (lam[j] + mu * gw[j]).max(0.0);
                l += (t * t - lam[j] * lam[j]) / (2.0 * mu);
            }
            l
        };
        let (xn, _, n) = bfgs_box(
            &mut lagr,
            &x,
            lo,
            hi,
            fixed,
            &LocalOptions {
                max_evals: budget,
                ..*opts
            },
        );
        evals += n + 1;
        let step = xn
            .iter()
            .zip(&x)
            .enumerate()
            .map(|(i, (a, b))| (a - b).abs() / (hi[i] - lo[i]).max(1e-300))
            .fold(0.0f64, f64::max);
        x = xn;
        f = clean(fg(&x, &mut g), &mut g);
        let v = viol(&g);
        for j in 0..m {
            lambda[j] = (lambda[j] + mu * g[j]).max(0.0);
        }
        if v > 0.25 * prev_viol {
            mu = (mu * 10.0).min(1e12);
        }
        prev_viol = v;
        if v <= 1e-12 && step < 1e-10 && outer > 0 {
            break;
        }
    }
    ConstrainedResult { x, f, g, evals }
}

/// Replace non-finite results by large finite ones (worse than anything, but comparable).
fn clean(f: f64, g: &mut [f64]) -> f64 {
    for gj in g.iter_mut() {
        if !gj.is_finite() {
            *gj = 1e6;
        }
    }
    if f.is_finite() { f } else { 1e12 }
}

fn identity(n: usize) -> Vec<Vec<f64>> {
    (0..n)
        .map(|i| (0..n).map(|j| if i == j { 1.0 } else { 0.0 }).collect())
        .collect()
}

/// H ← (I − ρ s yᵀ) H (I − ρ y sᵀ) + ρ s sᵀ, ρ = 1/(sᵀy).
fn bfgs_update(h: &mut [Vec<f64>], s: &[f64], y: &[f64], sy: f64) {
    let n = s.len();
    let rho = 1.0 / sy;
    let hy: Vec<f64> = (0..n)
        .map(|i| (0..n).map(|j| h[i][j] * y[j]).sum())
        .collect();
    let yhy: f64 = (0..n).map(|i| y[i] * hy[i]).sum();
    for i in 0..n {
        for j in 0..n {
            h[i][j] += -rho * (hy[i] * s[j] + s[i] * hy[j]) + (rho * rho * yhy + rho) * s[i] * s[j];
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_the_minimum_of_a_bowl_inside_the_box() {
        let mut f = |x: &[f64]| (x[0] - 0.3).powi(2) + 10.0 * (x[1] + 0.2).powi(2);
        let (x, v, _) = compass_search(
            &mut f,
            &[0.9, 0.9],
            &[-1.0, -1.0],
            &[1.0, 1.0],
            &[0.1, 0.1],
            1e-9,
            10_000,
        );
        assert!((x[0] - 0.3).abs() < 1e-6 && (x[1] + 0.2).abs() < 1e-6 && v < 1e-10);
    }

    #[test]
    fn quasi_newton_finds_the_rosenbrock_minimum_and_respects_bounds() {
        // Rosenbrock's valley (Rosenbrock 1960, minimum 0 at (1, 1)): a standard test of
        // quasi-Newton descent.
        let mut f = |x: &[f64]| 100.0 * (x[1] - x[0] * x[0]).powi(2) + (1.0 - x[0]).powi(2);
        let opts = LocalOptions {
            max_evals: 20_000,
            ..Default::default()
        };
        let (x, v, _) = bfgs_box(&mut f, &[-1.2, 1.0], &[-2.0, -2.0], &[2.0, 2.0], &[], &opts);
        assert!(
            (x[0] - 1.0).abs() < 1e-4 && (x[1] - 1.0).abs() < 1e-4,
            "{x:?} {v}"
        );
        // With x ≤ 0.5 the constrained minimum lies on the bound.
        let (x, _, _) = bfgs_box(&mut f, &[-1.2, 1.0], &[-2.0, -2.0], &[0.5, 2.0], &[], &opts);
        assert!(
            (x[0] - 0.5).abs() < 1e-9 && (x[1] - 0.25).abs() < 1e-3,
            "{x:?}"
        );
        // A fixed variable does not move.
        let (x, _, _) = bfgs_box(
            &mut f,
            &[-1.2, 1.0],
            &[-2.0, -2.0],
            &[2.0, 2.0],
            &[true, false],
            &opts,
        );
        assert_eq!(x[0], -1.2);
    }

    #[test]
    fn augmented_lagrangian_follows_an_active_nonlinear_constraint() {
        // Hock & Schittkowski problem 6 (Test Examples for Nonlinear Programming Codes, 1981;
        // minimum 0 at (1, 1)) with the equality written as two inequalities, on a box:
        // min (1 − x)² s.t. 10 (y − x²) = 0.
        let mut fg = |x: &[f64], g: &mut [f64]| {
            let c = 10.0 * (x[1] - x[0] * x[0]);
            g[0] = c;
            g[1] = -c;
            (1.0 - x[0]).powi(2)
        };
        let opts = LocalOptions {
            max_evals: 5_000,
            ..Default::default()
        };
        let r = auglag_box(
            &mut fg,
            2,
            &[-1.2, 1.0],
            &[-3.0, -3.0],
            &[3.0, 3.0],
            &[],
            &opts,
        );
        assert!(
            (r.x[0] - 1.0).abs() < 1e-4 && (r.x[1] - 1.0).abs() < 1e-4,
            "{r:?}"
        );
        assert!(r.g.iter().all(|v| *v < 1e-6));
        // The constrained minimum of x² + y² with x + y ≥ 1 is (½, ½) (common practice).
        let mut fg2 = |x: &[f64], g: &mut [f64]| {
            g[0] = 1.0 - x[0] - x[1];
            x[0] * x[0] + x[1] * x[1]
        };
        let r = auglag_box(
            &mut fg2,
            1,
            &[2.0, -1.5],
            &[-3.0, -3.0],
            &[3.0, 3.0],
            &[],
            &opts,
        );
        assert!(
            (r.x[0] - 0.5).abs() < 1e-6 && (r.x[1] - 0.5).abs() < 1e-6,
            "{r:?}"
        );
    }

    #[test]
    fn reversed_bounds_do_not_panic() {
        let mut f = |x: &[f64]| x[0];
        let (x, _, _) = compass_search(&mut f, &[0.5], &[1.0], &[0.0], &[0.1], 1e-3, 100);
        assert_eq!(x[0], 1.0);
        assert_eq!(clamp_safe(f64::NAN, 0.0, 1.0), 0.0);
    }
}

/// The shape of a sum-of-norms objective F(x) = Σ_i ‖r_i(x)‖: the residual vector is the blocks
/// r_1, r_2, ... laid end to end; `blocks[i]` is the length of block i.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct NormBlocks {
    /// Length of each block.
    pub blocks: Vec<usize>,
}

impl NormBlocks {
    /// Total residual length.
    pub fn len(&self) -> usize {
        self.blocks.iter().sum()
    }

    /// True when there are no residuals.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// F = Σ ‖r_i‖ of a residual vector.
    pub fn value(&self, r: &[f64]) -> f64 {
        let mut at = 0;
        let mut f = 0.0;
        for &b in &self.blocks {
            f += r[at..at + b].iter().map(|v| v * v).sum::<f64>().sqrt();
            at += b;
        }
        f
    }
}

/// Local minimisation of a sum of Euclidean norms F(x) = Σ_i ‖r_i(x)‖ on a box, by iteratively
/// reweighted least squares with Levenberg-Marquardt steps (weights 1 / max(‖r_i‖, δ), the
/// classic treatment of sums of norms: Weiszfeld's iteration generalised, e.g. Bissantz & al.,
/// "Convergence analysis of generalized iteratively reweighted least squares algorithms on convex
/// function spaces", SIAM J. Optim. 19(4), 2009). A block that can vanish (a manoeuvre that is not
/// needed) is a kink for quasi-Newton methods; here it is a zero residual, which Gauss-Newton
/// reaches in a few steps. The Jacobian is taken by forward differences in variables scaled to
/// [0, 1]; variables with `fixed` set (integer choices) and empty sides of the box stay put.
/// `res(x, r)` fills `r` and returns false when `x` cannot be evaluated. Returns the best point,
/// its F and the evaluations spent.
pub fn lm_sum_of_norms<R: FnMut(&[f64], &mut [f64]) -> bool>(
    res: &mut R,
    shape: &NormBlocks,
    x0: &[f64],
    lo: &[f64],
    hi: &[f64],
    fixed: &[bool],
    opts: &LocalOptions,
) -> (Vec<f64>, f64, usize) {
    use nalgebra::{DMatrix, DVector};
    let n = x0.len();
    let m = shape.len();
    let span: Vec<f64> = (0..n).map(|i| (hi[i] - lo[i]).max(0.0)).collect();
    let free: Vec<usize> = (0..n)
        .filter(|&i| span[i] > 0.0 && !fixed.get(i).copied().unwrap_or(false))
        .collect();
    let nf = free.len();
    let mut evals = 0usize;
    let mut eval = |x: &[f64], r: &mut [f64], evals: &mut usize| -> f64 {
        *evals += 1;
        if res(x, r) && r.iter().all(|v| v.is_finite()) {
            shape.value(r)
        } else {
            f64::INFINITY
        }
    };
    let mut x: Vec<f64> = (0..n).map(|i| clamp_safe(x0[i], lo[i], hi[i])).collect();
    let mut r = vec![0.0; m];
    let mut f = eval(&x, &mut r, &mut evals);
    if !f.is_finite() || nf == 0 || m == 0 {
        return (x, f, evals);
    }
    let h = opts.fd_step.max(1e-10);
    let mut jac = DMatrix::<f64>::zeros(m, nf);
    let mut rp = vec![0.0; m];
    let mut xt = x.clone();
    let mut rt = vec![0.0; m];
    let mut lambda = 1e-3;
    let mut delta = 1e-3 * (f / shape.blocks.len().max(1) as f64).max(1e-6);
    let mut w = vec![0.0; m];
    while evals + nf + 2 <= opts.max_evals {
        // Jacobian in scaled variables (forward differences, backwards at the upper bound).
        let mut ok = true;
        for (c, &i) in free.iter().enumerate() {
            let step = h * span[i];
            let back = x[i] + step > hi[i];
            let xi = x[i];
            x[i] = if back { xi - step } else { xi + step };
            let fp = eval(&x, &mut rp, &mut evals);
            x[i] = xi;
            if !fp.is_finite() {
                ok = false;
                break;
            }
            let s = if back { -h } else { h };
            for j in 0..m {
                jac[(j, c)] = (rp[j] - r[j]) / s;
            }
        }
        if !ok {
            break;
        }
        // Weights per block.
        let mut at = 0;
        for &b in &shape.blocks {
            let norm = r[at..at + b].iter().map(|v| v * v).sum::<f64>().sqrt();
            let wi = 1.0 / norm.max(delta);
            w[at..at + b].iter_mut().for_each(|v| *v = wi);
            at += b;
        }
        // Normal equations of the weighted problem.
        let mut a = DMatrix::<f64>::zeros(nf, nf);
        let mut g = DVector::<f64>::zeros(nf);
        for j in 0..m {
            let wj = w[j];
            for p in 0..nf {
                let jp = jac[(j, p)];
                if jp == 0.0 {
                    continue;
                }
                g[p] += wj * jp * r[j];
                for q in p..nf {
                    a[(p, q)] += wj * jp * jac[(j, q)];
                }
            }
        }
        for p in 0..nf {
            for q in 0..p {
                a[(p, q)] = a[(q, p)];
            }
        }
        // Variables on a bound that the gradient pushes outwards are held there.
        let u_of = |i: usize, xv: f64| (xv - lo[i]) / span[i];
        let held: Vec<bool> = free
            .iter()
            .enumerate()
            .map(|(c, &i)| {
                let u = u_of(i, x[i]);
                (u <= 0.0 && g[c] > 0.0) || (u >= 1.0 && g[c] < 0.0)
            })
            .collect();
        let mut improved = false;
        for _ in 0..12 {
            let mut ad = a.clone();
            for p in 0..nf {
                if held[p] {
                    for q in 0..nf {
                        ad[(p, q)] = 0.0;
                        ad[(q, p)] = 0.0;
                    }
                    ad[(p, p)] = 1.0;
                } else {
                    ad[(p, p)] += lambda * a[(p, p)].max(1e-12);
                }
            }
            let mut rhs = -g.clone();
            for p in 0..nf {
                if held[p] {
                    rhs[p] = 0.0;
                }
            }
            let Some(chol) = ad.cholesky() else {
                lambda *= 10.0;
                continue;
            };
            let d = chol.solve(&rhs);
            xt.copy_from_slice(&x);
            for (c, &i) in free.iter().enumerate() {
                xt[i] = clamp_safe(x[i] + d[c] * span[i], lo[i], hi[i]);
            }
            if evals >= opts.max_evals {
                break;
            }
            let ft = eval(&xt, &mut rt, &mut evals);
            if ft < f {
                let gain = f - ft;
                x.copy_from_slice(&xt);
                r.copy_from_slice(&rt);
                f = ft;
                lambda = (lambda * 0.3).max(1e-9);
                improved = true;
                if gain <= opts.f_tol * (1.0 + f.abs()) {
                    delta *= 0.1;
                }
                break;
            }
            lambda *= 10.0;
            if lambda > 1e10 {
                break;
            }
        }
        if !improved {
            // No step helps at this smoothing: sharpen it once, else stop.
            if delta > 1e-9 {
                delta *= 0.01;
                lambda = 1e-3;
                continue;
            }
            break;
        }
    }
    (x, f, evals)
}
