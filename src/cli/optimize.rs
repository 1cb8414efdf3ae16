//! `tourwright optimize FILE --out NEW`: the date optimiser within the design's search bounds.
//! The design itself is the first candidate; the result is judged exactly as `eval` judges a
//! design. When no design meeting every limit is found, the first line says so and lists each
//! broken limit, the closest design is still written, and the exit status is 3.

use std::fmt::Write as _;
use std::path::{Path, PathBuf};

use tourwright_mission::design::EphemerisChoice;
use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::{LimitSet, files, report};
use tourwright_search::Progress;
use tourwright_search::optimize::{self, OptimizeOptions};

use super::{CliError, CliResult, EXIT_NO_FEASIBLE, ObjectiveArg, load_with, prepare, write};

/// Run `optimize`.
pub fn run(
    file: &Path,
    ephemeris: Option<EphemerisChoice>,
    seed: u64,
    time: Option<f64>,
    evals: Option<u64>,
    objective: Option<ObjectiveArg>,
    out: &Path,
    in_place: bool,
    front: Option<PathBuf>,
) -> CliResult {
    super::refuse_overwrite(file, out, in_place, "--out")?;
    if let Some(f) = &front {
        super::refuse_overwrite(file, f, false, "--front")?;
    }
    let mut d = load_with(file, ephemeris)?;
    if let Some(o) = objective {
        d.search.objective = o.into();
    }
    if d.search.objective.needs_vehicle() && d.launch_vehicle.is_none() {
        return Err("--objective mass needs a launch vehicle in the design".into());
    }
    if let Some(t) = time {
        if !(t.is_finite() && t > 0.0) {
            return Err("--time wants a positive number of seconds".into());
        }
    }
    let opts = OptimizeOptions {
        seed,
        max_evals: evals.unwrap_or(if time.is_some() {
            u64::MAX
        } else {
            optimize::DEFAULT_EVALS
        }),
        time_limit_s: time,
        ..Default::default()
    };
    let t = std::time::Instant::now();
    let o = optimize::search_design(&d, &opts, LimitSet::ALL, &Progress::new(), front.is_some())
        .map_err(|e| format!("{}: {e}", file.display()))?;
    let mut lines = o.lines();
    lines.push(format!(
        "{} evaluations in {:.2} s",
        o.evaluations,
        t.elapsed().as_secs_f64()
    ));
    for l in &lines {
        super::out(l);
    }
    files::save(&o.design, out).map_err(|e| e.to_string())?;
    let tour = prepare(out, &o.design)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    super::out(&report::to_text(&tour, &e));
    if let Some(fp) = front {
        let mut s = format!(
            "total_tof_days,{} ({})\n",
            o.result.objective.label(),
            o.result.objective.unit()
        );
        for (a, b) in &o.front {
            let _ = writeln!(s, "{a:.3},{:.6}", o.result.objective.display_value(*b));
        }
        write(&fp, &s)?;
    }
    if o.feasible() {
        Ok(())
    } else {
        Err(CliError {
            message: String::new(),
            status: EXIT_NO_FEASIBLE,
        })
    }
}
