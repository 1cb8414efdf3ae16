//! Lambert speed against a plain Izzo (2015) baseline, on the same 10⁵ random interplanetary
//! geometries in one run, with the accuracy of both checked; then 10⁶ geometries through the
//! engine's solver counting failures. `cargo bench --bench lambert`.

#[path = "lambert_baseline.rs"]
mod lambert_baseline;

use std::hint::black_box;
use std::time::Instant;

use tourwright_astro::constants::{AU_KM, MU_SUN};
use tourwright_astro::lambert::{self, Direction};
use tourwright_astro::{State, Vec3, kepler};
use tourwright_search::optimize::Rng;

/// Random interplanetary geometries: radii 0.4-6 AU, any transfer angle, slightly out of plane,
/// TOF 30-1530 days (the range of the engine bench, common practice for tours).
fn geometries(n: usize, seed: u64) -> Vec<(Vec3, Vec3, f64)> {
    let mut r = Rng::new(seed);
    (0..n)
        .map(|_| {
            let a = r.uniform() * std::f64::consts::TAU;
            let b = a + r.uniform() * std::f64::consts::TAU;
            let r1 = (0.4 + 5.6 * r.uniform()) * AU_KM;
            let r2 = (0.4 + 5.6 * r.uniform()) * AU_KM;
            (
                Vec3::new(r1 * a.cos(), r1 * a.sin(), 0.02 * r1 * (r.uniform() - 0.5)),
                Vec3::new(r2 * b.cos(), r2 * b.sin(), 0.02 * r2 * (r.uniform() - 0.5)),
                (30.0 + 1500.0 * r.uniform()) * 86_400.0,
            )
        })
        .collect()
}

fn best_of<F: FnMut() -> f64>(reps: usize, mut f: F) -> f64 {
    (0..reps).map(|_| f()).fold(f64::INFINITY, f64::min)
}

fn main() {
    let geo = geometries(100_000, 42);
    let ours = || {
        let t = Instant::now();
        let mut sum = 0.0;
        for (r1, r2, tof) in &geo {
            if let Ok(s) = lambert::solve_single(r1, r2, *tof, MU_SUN, Direction::Prograde) {
                sum += s.v1.x;
            }
        }
        black_box(sum);
        t.elapsed().as_secs_f64()
    };
    let base = || {
        let t = Instant::now();
        let mut sum = 0.0;
        for (r1, r2, tof) in &geo {
            if let Some((v1, _)) =
                lambert_baseline::lambert([r1.x, r1.y, r1.z], [r2.x, r2.y, r2.z], *tof, MU_SUN)
            {
                sum += v1[0];
            }
        }
        black_box(sum);
        t.elapsed().as_secs_f64()
    };
    // Interleave the two, five times each, and keep each one's best.
    let (mut t_ours, mut t_base) = (f64::INFINITY, f64::INFINITY);
    for _ in 0..5 {
        t_ours = t_ours.min(best_of(1, ours));
        t_base = t_base.min(best_of(1, base));
    }
    let n = geo.len() as f64;
    // Accuracy: both land on r2 (two-body propagation of v1 over the TOF), and they agree.
    let (mut worst_ours, mut worst_base, mut worst_diff, mut failures) =
        (0.0f64, 0.0f64, 0.0f64, 0);
    for (r1, r2, tof) in geo.iter().step_by(10) {
        let a = lambert::solve_single(r1, r2, *tof, MU_SUN, Direction::Prograde);
        let b = lambert_baseline::lambert([r1.x, r1.y, r1.z], [r2.x, r2.y, r2.z], *tof, MU_SUN);
        let (Ok(a), Some(b)) = (a, b) else {
            failures += 1;
            continue;
        };
        let land = |v: Vec3| {
            kepler::propagate(&State { r: *r1, v }, *tof, MU_SUN)
                .map(|s| (s.r - r2).norm() / r2.norm())
                .unwrap_or(f64::INFINITY)
        };
        worst_ours = worst_ours.max(land(a.v1));
        worst_base = worst_base.max(land(Vec3::new(b.0[0], b.0[1], b.0[2])));
        worst_diff =
            worst_diff.max((a.v1 - Vec3::new(b.0[0], b.0[1], b.0[2])).norm() / a.v1.norm());
    }
    println!("Lambert, single revolution, 10^5 random interplanetary geometries (best of 5):");
    println!("  engine   {:7.1} ns per solve", t_ours / n * 1e9);
    println!(
        "  baseline {:7.1} ns per solve (plain Izzo 2015)",
        t_base / n * 1e9
    );
    println!("  ratio    {:.3} (engine / baseline)", t_ours / t_base);
    println!(
        "  accuracy: worst landing error on r2 {worst_ours:.1e} (engine) vs {worst_base:.1e} (baseline); \
         solutions agree to {worst_diff:.1e}; {failures} failures in 10^4 checked"
    );
    // Robustness: 10^6 geometries, every solve must succeed.
    let t = Instant::now();
    let mut fails = 0u64;
    let mut total = 0u64;
    for chunk in 0..10 {
        for (r1, r2, tof) in geometries(100_000, 1000 + chunk) {
            total += 1;
            if lambert::solve_single(&r1, &r2, tof, MU_SUN, Direction::Prograde).is_err() {
                fails += 1;
            }
        }
    }
    println!(
        "  robustness: {fails} failures in {total} random geometries ({:.1} s)",
        t.elapsed().as_secs_f64()
    );
}
