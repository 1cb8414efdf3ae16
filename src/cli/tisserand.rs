//! `tourwright tisserand --bodies V,E,J --vinf 3,5,7,9 [--design FILE] [--csv OUT]`: the
//! Tisserand graph's v∞ contours (and a design's arcs on it), as the workbench draws them.

use std::path::Path;

use tourwright_astro::bodies::Planet;
use tourwright_astro::tisserand;
use tourwright_mission::design::EphemerisChoice;
use tourwright_mission::evaluate::{EvalOptions, evaluate, legs};
use tourwright_mission::{MissionDesign, PreparedTour};

use super::{CliResult, load_with, out, write};

/// Points per contour (pump angle 0-180°), the same as the workbench.
pub const POINTS: usize = 181;

/// Run `tisserand`.
pub fn run(
    bodies: &str,
    vinf: &str,
    design: Option<&Path>,
    ephemeris: Option<EphemerisChoice>,
    csv: Option<&Path>,
) -> CliResult {
    let mut planets = Vec::new();
    for b in bodies.split(',').filter(|b| !b.trim().is_empty()) {
        planets.push(
            Planet::from_name(b.trim())
                .ok_or_else(|| format!("--bodies: unknown planet '{}'", b.trim()))?,
        );
    }
    if planets.is_empty() {
        return Err("--bodies: name at least one planet, e.g. V,E,J".into());
    }
    let mut levels = Vec::new();
    for v in vinf.split(',').filter(|v| !v.trim().is_empty()) {
        let x: f64 = v
            .trim()
            .parse()
            .map_err(|_| format!("--vinf: '{}' is not a number", v.trim()))?;
        if !(x.is_finite() && x > 0.0 && x < 100.0) {
            return Err(format!("--vinf: {x} km/s must lie in (0, 100)").into());
        }
        levels.push(x);
    }
    if levels.is_empty() {
        return Err("--vinf: give at least one level in km/s, e.g. 3,5,7".into());
    }
    let d = match design {
        Some(p) => load_with(p, ephemeris)?,
        None => {
            let mut d = MissionDesign::new_blank();
            d.ephemeris = ephemeris.unwrap_or_default();
            d
        }
    };
    let model = tourwright_mission::tour::Catalog::of(&d)
        .map_err(|i| format!("{}: {}", i.field, i.reason))?
        .model()
        .clone();
    let contours = tisserand::contours_for(&model, &planets, &levels, POINTS);
    let mut text = tisserand::contours_csv(&contours);
    let mut arcs = Vec::new();
    if let Some(p) = design {
        let tour = PreparedTour::prepare(&d).map_err(|e| format!("{}: {e}", p.display()))?;
        let mut e = tourwright_mission::evaluate::Evaluation::default();
        evaluate(&tour, &EvalOptions::default(), &mut e);
        arcs = legs::arc_orbits(&tour, &e);
        for a in &arcs {
            text.push_str(&format!(
                "design leg {}{},,,{:.9},{:.9},\n",
                a.leg + 1,
                if a.piece == 1 { " after DSM" } else { "" },
                a.rp_au,
                a.ra_au
            ));
        }
    }
    match csv {
        Some(path) => {
            write(path, &text)?;
            out(&format!(
                "{} contours ({} points) and {} design arcs written to {}",
                contours.len(),
                contours.iter().map(|c| c.points.len()).sum::<usize>(),
                arcs.len(),
                path.display()
            ));
        }
        None => out(&text),
    }
    Ok(())
}
