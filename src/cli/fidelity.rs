//! `tourwright fidelity FILE [--ephemeris ...] [--json]`: the n-body check of a design — per
//! encounter the miss at the stop's epoch, its B-plane components, the change in v∞ and the
//! departure correction that removes the miss.

use std::path::PathBuf;

use tourwright_mission::evaluate::{EvalOptions, evaluate};
use tourwright_mission::fidelity::{self, EncounterCheck, FidelityOptions};
use tourwright_search::Progress;

use super::progress::{interrupted, watch};
use super::{
    CliError, CliResult, EXIT_INTERRUPTED, EphemerisArg, load_with, out, out_json, prepare,
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
