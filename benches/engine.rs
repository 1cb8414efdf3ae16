//! Criterion benchmarks of the hot paths: Lambert, ephemeris, Kepler propagation, tour
//! evaluation, window maps, the direct-transfer search and the optimiser.

use std::hint::black_box;
use std::path::Path;

use criterion::{Criterion, criterion_group, criterion_main};
use tourwright_astro::bodies::Planet;
use tourwright_astro::constants::{AU_KM, MU_SUN};
use tourwright_astro::ephemeris::Ephemeris;
use tourwright_astro::kepler;
use tourwright_astro::lambert::{self, Direction};
use tourwright_astro::time::{Epoch, Tdb};
use tourwright_astro::{State, Vec3};
use tourwright_mission::PreparedTour;
use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::{MissionDesign, files};
use tourwright_search::job::Progress;
use tourwright_search::optimize::Rng;
use tourwright_search::optimize::{self, OptimizeOptions, Problem};
use tourwright_search::window::{self, SecondAxis, WindowSpec};

fn geometries(n: usize) -> Vec<(Vec3, Vec3, f64)> {
    let mut r = Rng::new(42);
    (0..n)
        .map(|_| {
            let a = r.uniform() * std::f64::consts::TAU;
            let b = a + r.uniform() * std::f64::consts::TAU;
            let r1 = (0.4 + 5.0 * r.uniform()) * AU_KM;
            let r2 = (0.4 + 5.0 * r.uniform()) * AU_KM;
            (
                Vec3::new(r1 * a.cos(), r1 * a.sin(), 0.01 * r1 * (r.uniform() - 0.5)),
                Vec3::new(r2 * b.cos(), r2 * b.sin(), 0.01 * r2 * (r.uniform() - 0.5)),
                (30.0 + 1500.0 * r.uniform()) * 86_400.0,
            )
        })
        .collect()
}

fn sample(name: &str) -> MissionDesign {
    files::load(
        &Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("sample-missions")
            .join(name),
    )
    .unwrap()
}

fn six_stop_design() -> MissionDesign {
    // E-V-E-E-J-S style tour (six stops) built from the Jupiter sample's bodies; epochs are
    // spread so that every leg has a solution.
    let mut d = sample("lantern-jupiter-evej.tour.ron");
    let t0 = d.stops[0].epoch;
    let names = ["Earth", "Venus", "Venus", "Earth", "Jupiter", "Saturn"];
    let days = [0.0, 160.0, 560.0, 620.0, 1700.0, 3800.0];
    d.stops = names
        .iter()
        .zip(days)
        .map(|(n, t)| tourwright_mission::design::Stop {
            body: n.to_string(),
            epoch: t0.plus_days(t),
            swingby: Default::default(),
        })
        .collect();
    d.legs = vec![Default::default(); 5];
    d.legs[1].revolutions = 0;
    d
}

fn benches(c: &mut Criterion) {
    let geo = geometries(1024);
    c.bench_function("lambert_single_rev", |b| {
        let mut i = 0;
        b.iter(|| {
            let (r1, r2, t) = &geo[i & 1023];
            i += 1;
            black_box(lambert::solve_single(r1, r2, *t, MU_SUN, Direction::Prograde).ok())
        })
    });
    c.bench_function("lambert_up_to_3_revs", |b| {
        let mut i = 0;
        b.iter(|| {
            let (r1, r2, t) = &geo[i & 1023];
            i += 1;
            black_box(lambert::solve(r1, r2, *t * 3.0, MU_SUN, Direction::Prograde, 3).ok())
        })
    });
    c.bench_function("ephemeris_state", |b| {
        let mut t = 0.0;
        b.iter(|| {
            t += 17.3;
            black_box(Planet::Mars.state(Tdb::from_days(t % 9000.0)).ok())
        })
    });
    c.bench_function("kepler_propagate", |b| {
        let s = State {
            r: Vec3::new(AU_KM, 0.0, 0.0),
            v: Vec3::new(0.0, 33.0, 1.0),
        };
        let mut dt = 1.0e6;
        b.iter(|| {
            dt = (dt * 1.37) % 3.0e8 + 1.0e5;
            black_box(kepler::propagate(&s, dt, MU_SUN).ok())
        })
    });
    let d6 = PreparedTour::prepare(&six_stop_design()).unwrap();
    // The evaluation buffer keeps the bodies' states and arcs of its last run and reuses them
    // when nothing moved: alternating with a copy one second later everywhere measures the
    // full cost; the last bench measures a repeat (every state and arc reused).
    let mut d6_later = d6.clone();
    d6_later.stops.iter_mut().for_each(|s| s.t.0 += 1.0);
    let pair = [&d6, &d6_later];
    let mut e = Evaluation::default();
    let mut turn = 0usize;
    c.bench_function("evaluate_six_stops_with_samples", |b| {
        b.iter(|| {
            turn += 1;
            evaluate(black_box(pair[turn % 2]), &EvalOptions::default(), &mut e);
            black_box(e.complete)
        })
    });
    c.bench_function("evaluate_six_stops_no_samples", |b| {
        b.iter(|| {
            turn += 1;
            evaluate(black_box(pair[turn % 2]), &EvalOptions::SEARCH, &mut e);
            black_box(e.complete)
        })
    });
    c.bench_function("evaluate_six_stops_no_samples_repeat", |b| {
        b.iter(|| {
            evaluate(black_box(&d6), &EvalOptions::SEARCH, &mut e);
            black_box(e.complete)
        })
    });
    let mut g = c.benchmark_group("slow");
    g.sample_size(10);
    let base = MissionDesign::new_blank();
    let spec = WindowSpec {
        from: "Earth".into(),
        to: "Mars".into(),
        depart: (
            Epoch::parse("2033-01-01").unwrap(),
            Epoch::parse("2033-12-31").unwrap(),
        ),
        second: SecondAxis::Tof(80.0, 500.0),
        nx: 500,
        ny: 500,
        leg: Default::default(),
        goal: Default::default(),
    };
    g.bench_function("window_map_500x500", |b| {
        b.iter(|| black_box(window::compute(&base, &spec, &Progress::new())))
    });
    let tern = sample("tern-saturn-ejs.tour.ron");
    g.bench_function("direct_vs_assist_grid240", |b| {
        let o = tourwright_search::direct::DirectOptions::for_design(&tern);
        b.iter(|| {
            black_box(tourwright_search::direct::compare(
                &tern,
                &o,
                &Progress::new(),
            ))
        })
    });
    let p = Problem::from_design(&sample("lantern-jupiter-evej.tour.ron")).unwrap();
    g.bench_function("optimize_evej_100k_evals", |b| {
        b.iter(|| {
            black_box(optimize::optimize(
                &p,
                &OptimizeOptions {
                    max_evals: 100_000,
                    ..Default::default()
                },
                &Progress::new(),
                false,
            ))
        })
    });
    g.finish();
}

/// The continuous n-body trajectory of Lantern and Tern, on mean elements and (when
/// TOURWRIGHT_DE421 names it) on the DE421 kernel with the Moon. The goal: 30 s each.
fn continuous(c: &mut Criterion) {
    use tourwright_mission::continuous::{ContinuousOptions, solve};
    use tourwright_mission::design::{EphemerisChoice, KernelRef};
    let mut g = c.benchmark_group("continuous");
    g.sample_size(10);
    let kernel = std::env::var_os("TOURWRIGHT_DE421");
    for name in ["lantern-jupiter-evej", "tern-saturn-ejs"] {
        let mut models = vec![("mean", None)];
        if let Some(k) = &kernel {
            models.push(("de421", Some(k.to_string_lossy().to_string())));
        }
        for (label, k) in models {
            let mut d = sample(&format!("{name}.tour.ron"));
            if let Some(path) = k {
                d.ephemeris = EphemerisChoice::Kernel(KernelRef { path, base: None });
            }
            let tour = PreparedTour::prepare(&d).unwrap();
            let mut e = Evaluation::default();
            evaluate(&tour, &EvalOptions::default(), &mut e);
            g.bench_function(format!("{name}_{label}"), |b| {
                b.iter(|| {
                    let r = solve(&tour, &e, &ContinuousOptions::default(), &|_| {}, &|| false);
                    assert!(r.as_ref().is_ok_and(|c| c.converged));
                    black_box(r)
                })
            });
        }
    }
    g.finish();
}

criterion_group!(engine, benches, continuous);
criterion_main!(engine);
