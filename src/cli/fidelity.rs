//! `tourwright fidelity FILE [--ephemeris ...] [--json]`: the n-body check of a design — per
//! encounter the miss at the stop's epoch, its B-plane components, the change in v∞ and the
//! departure correction that removes the miss.

use std::path::PathBuf;

use tourwright_astro::time::Epoch;
use tourwright_mission::continuous::{self, ContinuousOptions};
use tourwright_mission::evaluate::{EvalOptions, evaluate};
use tourwright_mission::fidelity::{self, EncounterCheck, FidelityOptions};
use tourwright_search::Progress;

use super::progress::{interrupted, watch};
use super::{
    CliError, CliResult, EXIT_INTERRUPTED, EphemerisArg, Writes, check_output, claim_stdout,
    load_with, out, out_json, prepare, write,
};

/// The arguments of `fidelity`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Design file (- for standard input).
    pub file: PathBuf,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Machine-readable JSON instead of text.
    #[arg(long)]
    pub json: bool,
    /// Solve for one continuous n-body trajectory through every swing-by (multiple shooting)
    /// instead of the leg-by-leg check.
    #[arg(long)]
    pub continuous: bool,
    /// With --continuous: how far an encounter's epoch may move from the design's, days (a
    /// swing-by of a giant planet moves by weeks: patched conics place it at the planet's centre).
    #[arg(
        long,
        value_name = "DAYS",
        default_value_t = 30.0,
        requires = "continuous"
    )]
    pub epoch_tolerance: f64,
    /// With --continuous: altitude of the launch parking orbit, km.
    #[arg(
        long,
        value_name = "KM",
        default_value_t = 200.0,
        requires = "continuous"
    )]
    pub launch_altitude: f64,
    /// With --continuous: every body's mass times this (0 gives the patched-conic legs back).
    #[arg(
        long,
        value_name = "FACTOR",
        default_value_t = 1.0,
        requires = "continuous"
    )]
    pub mass_scale: f64,
    /// With --continuous: write the converged trajectory as a CCSDS OEM (- for standard output).
    #[arg(long, value_name = "OUT", requires = "continuous")]
    pub oem: Option<PathBuf>,
}

/// `fidelity --json`.
#[derive(serde::Serialize)]
struct FidelityReport<'a> {
    design: &'a str,
    ephemeris: &'a str,
    bodies: &'a [String],
    integrator: &'static str,
    encounters: &'a [EncounterCheck],
    caution: &'static str,
}

const INTEGRATOR: &str = "Dormand-Prince 8(5,3), rtol 1e-12, atol 1e-8 (km, km/s)";

/// Run `fidelity`.
pub fn run(a: Args) -> CliResult {
    if a.continuous {
        return run_continuous(a);
    }
    let d = load_with(&a.file, &a.eph)?;
    let tour = prepare(&a.file, &d)?;
    let mut e = tourwright_mission::evaluate::Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    let p = Progress::new();
    p.set_total(1000);
    let w = watch(&p, "n-body check");
    let done = |f: f64| {
        let now = (f * 1000.0) as u64;
        let was = (p.fraction() * 1000.0).round() as u64;
        p.add(now.saturating_sub(was));
    };
    let r = fidelity::check(&tour, &e, &FidelityOptions::default(), &done, &|| {
        p.is_cancelled()
    });
    drop(w);
    if interrupted() {
        out("interrupted: the n-body check was stopped");
        return Err(CliError::status(EXIT_INTERRUPTED));
    }
    let f = r.map_err(|err| format!("{}: {err}", a.file.display()))?;
    if a.json {
        return out_json(&FidelityReport {
            design: &d.name,
            ephemeris: &tour.ephemeris_name,
            bodies: &f.bodies,
            integrator: INTEGRATOR,
            encounters: &f.encounters,
            caution: tourwright_mission::CAUTION,
        });
    }
    out(&format!(
        "{} · n-body check · ephemeris: {}\nPerturbing bodies: {} (each leg leaves out its own two ends, whose pull the swing-by hyperbolas model; each body is silent inside its sphere of influence). Integrator: {INTEGRATOR}.\n",
        d.name,
        tour.ephemeris_name,
        f.bodies.join(", ")
    ));
    out(&format!(
        "{:<4} {:<10} {:>14} {:>14} {:>12} {:>12} {:>12} {:>11} {:>16}",
        "leg",
        "to",
        "miss (km)",
        "conic (km)",
        "B·T (km)",
        "B·R (km)",
        "along (km)",
        "Δv∞ (m/s)",
        "correction (m/s)"
    ));
    for c in &f.encounters {
        out(&format!(
            "{:<4} {:<10} {:>14.0} {:>14.0} {:>12.0} {:>12.0} {:>12.0} {:>11.2} {:>16}",
            c.leg + 1,
            c.body,
            c.miss_km,
            c.conic_miss_km,
            c.b_t_km,
            c.b_r_km,
            c.along_s_km,
            c.dvinf_km_s * 1e3,
            c.correction_dv_km_s
                .map(|v| format!("{:.2}", v * 1e3))
                .unwrap_or_else(|| format!("no ({} it.)", c.iterations)),
        ));
    }
    out(tourwright_mission::CAUTION);
    Ok(())
}

/// `fidelity --continuous --json`.
#[derive(serde::Serialize)]
struct ContinuousReport<'a> {
    design: &'a str,
    converged: bool,
    failure: Option<&'a str>,
    model: &'a continuous::ModelInfo,
    encounters: &'a [continuous::Encounter],
    impulses: &'a [continuous::Impulse],
    match_points: &'a [continuous::MatchPoint],
    launch_c3_km2_s2: f64,
    designed_launch_c3_km2_s2: f64,
    arrival_vinf_km_s: f64,
    total_dv_km_s: f64,
    designed_total_dv_km_s: f64,
    max_position_gap_km: f64,
    max_velocity_gap_km_s: f64,
    iterations: usize,
    continuation: &'a [f64],
    rhs_evaluations: u64,
    caution: &'static str,
}

fn run_continuous(a: Args) -> CliResult {
    claim_stdout(&[a.oem.as_deref()])?;
    if let Some(p) = &a.oem {
        check_output(p, &[&a.file], Writes::Data, "--oem")?;
    }
    if !(a.epoch_tolerance.is_finite() && a.epoch_tolerance >= 0.0) {
        return Err("--epoch-tolerance must be a number of days, 0 or more".into());
    }
    if !(a.launch_altitude.is_finite() && a.launch_altitude > 0.0) {
        return Err("--launch-altitude must be a positive number of km".into());
    }
    if !(a.mass_scale.is_finite() && a.mass_scale >= 0.0) {
        return Err("--mass-scale must be 0 or more".into());
    }
    let d = load_with(&a.file, &a.eph)?;
    let tour = prepare(&a.file, &d)?;
    let mut e = tourwright_mission::evaluate::Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    let p = Progress::new();
    p.set_total(1000);
    let w = watch(&p, "continuous n-body trajectory");
    let done = |f: f64| {
        let now = (f.clamp(0.0, 1.0) * 1000.0) as u64;
        let was = (p.fraction() * 1000.0).round() as u64;
        p.add(now.saturating_sub(was));
    };
    let opts = ContinuousOptions {
        epoch_tolerance_days: a.epoch_tolerance,
        launch_altitude_km: a.launch_altitude,
        mass_scale: a.mass_scale,
        ..Default::default()
    };
    let started = std::time::Instant::now();
    let r = continuous::solve(&tour, &e, &opts, &done, &|| p.is_cancelled());
    drop(w);
    if interrupted() {
        out("interrupted: the continuous solve was stopped");
        return Err(CliError::status(EXIT_INTERRUPTED));
    }
    let c = r.map_err(|err| format!("{}: {err}", a.file.display()))?;
    let seconds = started.elapsed().as_secs_f64();
    if let Some(path) = &a.oem {
        write(
            path,
            &tourwright_mission::export::continuous_oem(&tour, &c, Epoch::now()),
        )?;
    }
    if a.json {
        out_json(&ContinuousReport {
            design: &d.name,
            converged: c.converged,
            failure: c.failure.as_deref(),
            model: &c.model,
            encounters: &c.encounters,
            impulses: &c.impulses,
            match_points: &c.matches,
            launch_c3_km2_s2: c.launch_c3,
            designed_launch_c3_km2_s2: c.designed_launch_c3,
            arrival_vinf_km_s: c.arrival_vinf_km_s,
            total_dv_km_s: c.total_dv_km_s,
            designed_total_dv_km_s: c.designed_total_dv_km_s,
            max_position_gap_km: c.max_position_gap_km,
            max_velocity_gap_km_s: c.max_velocity_gap_km_s,
            iterations: c.iterations,
            continuation: &c.continuation,
            rhs_evaluations: c.evaluations,
            caution: tourwright_mission::CAUTION,
        })?;
    } else {
        out(&continuous::summary_text(&d.name, &c, seconds));
    }
    if c.converged {
        Ok(())
    } else {
        Err(CliError::status(super::EXIT_NO_FEASIBLE))
    }
}
