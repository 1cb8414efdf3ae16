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
    fn reversed_bounds_do_not_panic() {
        let mut f = |x: &[f64]| x[0];
        let (x, _, _) = compass_search(&mut f, &[0.5], &[1.0], &[0.0], &[0.1], 1e-3, 100);
        assert_eq!(x[0], 1.0);
        assert_eq!(clamp_safe(f64::NAN, 0.0, 1.0), 0.0);
    }
}
