//! `tourwright optimize FILE --out NEW`: the date optimiser within the design's search bounds.

use std::fmt::Write as _;
use std::path::{Path, PathBuf};

use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::{files, report};
use tourwright_search::Progress;
use tourwright_search::optimize::{self, OptimizeOptions, Problem, Workspace};

use tourwright_mission::design::EphemerisChoice;

use super::{CliResult, ObjectiveArg, load_with, prepare, write};

/// Run `optimize`.
pub fn run(
    file: &Path,
    ephemeris: Option<EphemerisChoice>,
    seed: u64,
    time: Option<f64>,
    evals: Option<u64>,
    objective: Option<ObjectiveArg>,
    out: &Path,
    front: Option<PathBuf>,
) -> CliResult {
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
    let p = Problem::from_design(&d).map_err(|e| format!("{}: {e}", file.display()))?;
    let before = p.score(&p.vector_of(&p.tour), &mut Workspace::new(&p));
    let opts = OptimizeOptions {
        seed,
        max_evals: evals.unwrap_or(if time.is_some() { u64::MAX } else { 400_000 }),
        time_limit_s: time,
        ..Default::default()
    };
    let t = std::time::Instant::now();
    let r = optimize::optimize(&p, &opts, &Progress::new(), front.is_some());
    tourwright_mission::Edit::ApplySchedule(r.schedule.clone())
        .apply(&mut d)
        .map_err(|e| e.to_string())?;
    super::out(&format!(
        "objective {}: {:.4} -> {:.4} after {} evaluations in {:.2} s",
        d.search.objective.label(),
        before,
        r.value,
        r.evaluations,
        t.elapsed().as_secs_f64()
    ));
    files::save(&d, out).map_err(|e| e.to_string())?;
    let tour = prepare(out, &d)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    super::out(&report::to_text(&tour, &e));
    if let Some(fp) = front {
        let mut s = String::from("total_tof_days,objective\n");
        for (a, b) in &r.front {
            let _ = writeln!(s, "{a:.3},{b:.6}");
        }
        write(&fp, &s)?;
    }
    Ok(())
}
