//! `tourwright fidelity FILE [--ephemeris ...] [--json]`: the n-body check of a design — per
//! encounter the miss at the stop's epoch, its B-plane components, the change in v∞ and the
//! departure correction that removes the miss.

use std::path::Path;

use tourwright_mission::design::EphemerisChoice;
use tourwright_mission::evaluate::{EvalOptions, evaluate};
use tourwright_mission::fidelity::{self, FidelityOptions};

use super::{CliResult, load_with, out, prepare};

/// Run `fidelity`.
pub fn run(file: &Path, ephemeris: Option<EphemerisChoice>, json: bool) -> CliResult {
    let d = load_with(file, ephemeris)?;
    let tour = prepare(file, &d)?;
    let mut e = tourwright_mission::evaluate::Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    let f = fidelity::check(&tour, &e, &FidelityOptions::default(), &|_| {}, &|| false)
        .map_err(|err| format!("{}: {err}", file.display()))?;
    if json {
        let v = serde_json::json!({
            "design": d.name,
            "ephemeris": tour.ephemeris_name,
            "bodies": f.bodies,
            "integrator": "Dormand-Prince 8(5,3), rtol 1e-12, atol 1e-8 (km, km/s)",
            "encounters": f.encounters,
            "caution": tourwright_mission::CAUTION,
        });
        out(&serde_json::to_string_pretty(&v).map_err(|e| e.to_string())?);
        return Ok(());
    }
    out(&format!(
        "{} · n-body check · ephemeris: {}\nPerturbing bodies: {} (each leg leaves out its own two ends, whose pull the swing-by hyperbolas model; each body is silent inside its sphere of influence). Integrator: Dormand-Prince 8(5,3), rtol 1e-12, atol 1e-8.\n",
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
