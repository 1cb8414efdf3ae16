//! Launch-period benchmark: a 21-day period of the Lantern sample (E-V-E-J, a shaped Venus
//! swing-by and a manoeuvre on the Earth-Jupiter leg) at the default per-day budget. The issue's
//! goal: within 20 s on two cores. `cargo bench -p tourwright-search --bench period`.

use std::hint::black_box;
use std::path::Path;

use criterion::{Criterion, criterion_group, criterion_main};
use tourwright_mission::files;
use tourwright_search::Progress;
use tourwright_search::period::{self, PeriodOptions};

fn lantern_21_days(c: &mut Criterion) {
    let d = files::load(
        &Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("../../sample-missions")
            .join("lantern-jupiter-evej.tour.ron"),
    )
    .unwrap();
    let mut g = c.benchmark_group("launch_period");
    g.sample_size(10);
    for evals in [40_000, period::DEFAULT_EVALS_PER_DAY] {
        let o = PeriodOptions {
            days: 21,
            evals_per_day: evals,
            ..PeriodOptions::for_design(&d)
        };
        g.bench_function(format!("lantern_21_days_{evals}_evals_per_day"), |b| {
            b.iter(|| {
                let r = period::run(&d, &o, &Progress::new()).unwrap();
                assert!(r.every_day_meets_limits());
                black_box(r)
            })
        });
    }
    g.finish();
}

criterion_group!(benches, lantern_21_days);
criterion_main!(benches);
