//! Multiple-gravity-assist benchmark table: runs the optimiser on the benchmark designs in
//! benches/mga/ over several seeds and budgets, and prints best, median and time per problem.
//! `cargo bench --bench mga`.

use std::path::Path;
use std::time::Instant;

use tourwright_mission::files;
use tourwright_search::job::Progress;
use tourwright_search::optimize::{OptimizeOptions, Problem, optimize};

/// (file, published best-known value, note)
const PROBLEMS: [(&str, f64, &str); 1] = [(
    "cassini1.tour.ron",
    4.9307,
    "published with the benchmark's own ephemeris (from memory)",
)];

fn main() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("benches/mga");
    println!(
        "| problem | budget (evaluations) | seeds | best (km/s) | median (km/s) | mean time (s) | published best |"
    );
    println!("|---|---|---|---|---|---|---|");
    for (file, published, note) in PROBLEMS {
        let d = files::load(&dir.join(file)).expect("benchmark design loads");
        let p = Problem::from_design(&d).expect("benchmark design has valid bounds");
        for budget in [50_000u64, 150_000, 500_000] {
            let mut vals = Vec::new();
            let t = Instant::now();
            let seeds = 10;
            for seed in 1..=seeds {
                let r = optimize(
                    &p,
                    &OptimizeOptions {
                        seed,
                        max_evals: budget,
                        ..Default::default()
                    },
                    &Progress::new(),
                    false,
                );
                vals.push(r.value);
            }
            let secs = t.elapsed().as_secs_f64() / seeds as f64;
            vals.sort_by(f64::total_cmp);
            println!(
                "| {} | {budget} | {seeds} | {:.4} | {:.4} | {secs:.2} | {published} ({note}) |",
                d.name,
                vals[0],
                vals[vals.len() / 2]
            );
        }
    }
}
