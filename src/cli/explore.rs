//! `tourwright explore`: enumerate planet sequences, prune, optimise and rank them.

use std::path::PathBuf;

use tourwright_astro::bodies::Planet;
use tourwright_mission::design::EphemerisChoice;
use tourwright_mission::{MissionDesign, files};
use tourwright_search::Progress;
use tourwright_search::explore::{self, ExploreSpec};

use super::{CliResult, ObjectiveArg, epochs};

/// The arguments of `explore`.
pub struct Args {
    /// Launch body.
    pub from: String,
    /// Ephemeris model.
    pub ephemeris: Option<EphemerisChoice>,
    /// Target body.
    pub to: String,
    /// Launch period.
    pub launch: String,
    /// Swing-by bodies.
    pub via: String,
    /// Largest number of swing-bys.
    pub max_swingbys: usize,
    /// Largest TOF, years.
    pub max_tof_years: f64,
    /// Objective.
    pub objective: ObjectiveArg,
    /// Largest C3.
    pub max_c3: Option<f64>,
    /// Evaluations per sequence.
    pub evals: u64,
    /// Seed.
    pub seed: u64,
    /// Folder for ranked designs.
    pub out: Option<PathBuf>,
}

/// Run `explore`.
pub fn run(a: Args) -> CliResult {
    let pl = |s: &str| Planet::from_name(s).ok_or_else(|| format!("unknown planet '{s}'"));
    let mut via = Vec::new();
    for v in a.via.split(',').filter(|v| !v.trim().is_empty()) {
        via.push(pl(v)?);
    }
    if a.max_swingbys > 4 {
        return Err("--max-swingbys is limited to 4".into());
    }
    if !(a.max_tof_years.is_finite() && a.max_tof_years > 0.0 && a.max_tof_years <= 60.0) {
        return Err("--max-tof-years must be between 0 and 60".into());
    }
    if a.max_c3.is_some_and(|c| !(c.is_finite() && c >= 0.0)) {
        return Err("--max-c3 must be zero or positive".into());
    }
    let spec = ExploreSpec {
        from: pl(&a.from)?,
        to: pl(&a.to)?,
        launch: epochs(&a.launch, "launch")?,
        via,
        max_swingbys: a.max_swingbys,
        max_tof_years: a.max_tof_years,
        objective: a.objective.into(),
        evals_per_sequence: a.evals,
        seed: a.seed,
    };
    let mut template = MissionDesign::new_blank();
    if let Some(e) = a.ephemeris {
        template.ephemeris = e;
    }
    template.launch.max_c3_km2_s2 = a.max_c3;
    let ex = explore::explore(&spec, &template, &Progress::new());
    println!(
        "{} sequences enumerated, {} pruned, {} optimised",
        ex.enumerated,
        ex.pruned.len(),
        ex.ranked.len()
    );
    println!(
        "{:<4} {:<14} {:<11} {:>9} {:>9} {:>9} {:>10} limits",
        "rank", "sequence", "launch", "TOF (d)", "C3", "Δv", "objective"
    );
    for (i, c) in ex.ranked.iter().enumerate() {
        println!(
            "{:<4} {:<14} {:<11} {:>9.0} {:>9.2} {:>9.3} {:>10.4} {}",
            i + 1,
            c.label,
            c.launch.to_date_utc(),
            c.tof_days,
            c.c3,
            c.dv_km_s,
            c.value,
            if c.feasible { "met" } else { "broken" }
        );
    }
    if let Some(dir) = a.out {
        std::fs::create_dir_all(&dir).map_err(|e| format!("{}: {e}", dir.display()))?;
        for (i, c) in ex.ranked.iter().enumerate() {
            let p = dir.join(format!("{:02}-{}.tour.ron", i + 1, c.label));
            files::save(&c.design, &p).map_err(|e| e.to_string())?;
        }
    }
    Ok(())
}
