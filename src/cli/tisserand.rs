//! `tourwright tisserand --bodies V,E,J --vinf 3,5,7,9 [--design FILE] [--csv OUT | --json]`: the
//! Tisserand graph's v∞ contours (and a design's arcs on it), as the workbench draws them.

use std::path::PathBuf;

use tourwright_astro::bodies::Planet;
use tourwright_astro::tisserand::{self, Contour};
use tourwright_mission::evaluate::legs::{self, ArcOrbit};
use tourwright_mission::evaluate::{EvalOptions, evaluate};
use tourwright_mission::{MissionDesign, PreparedTour, export};

use super::{CliResult, EphemerisArg, claim_stdout, is_dash, load_with, out, out_json, write};

/// Points per contour (pump angle 0-180°), the same as the workbench.
pub const POINTS: usize = 181;

/// The arguments of `tisserand`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Planets, comma-separated letters or names (V,E,J).
    #[arg(long)]
    pub bodies: String,
    /// v∞ levels, km/s, comma-separated (3,5,7,9).
    #[arg(long)]
    pub vinf: String,
    /// A design whose arcs are added as rows ("design leg K"); - for standard input.
    #[arg(long)]
    pub design: Option<PathBuf>,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Write CSV here (- for standard output); without it the CSV is printed.
    #[arg(long, conflicts_with = "json")]
    pub csv: Option<PathBuf>,
    /// Machine-readable JSON instead of CSV.
    #[arg(long)]
    pub json: bool,
}

/// `tisserand --json`.
#[derive(serde::Serialize)]
struct TisserandReport<'a> {
    ephemeris: String,
    contours: &'a [Contour],
    design_arcs: &'a [ArcOrbit],
}

/// Run `tisserand`.
pub fn run(a: Args) -> CliResult {
    claim_stdout(&[a.csv.as_deref()])?;
    let mut planets = Vec::new();
    for b in a.bodies.split(',').filter(|b| !b.trim().is_empty()) {
        planets.push(
            Planet::from_name(b.trim())
                .ok_or_else(|| format!("--bodies: unknown planet '{}'", b.trim()))?,
        );
    }
    if planets.is_empty() {
        return Err("--bodies: name at least one planet, e.g. V,E,J".into());
    }
    let mut levels = Vec::new();
    for v in a.vinf.split(',').filter(|v| !v.trim().is_empty()) {
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
    let d = match &a.design {
        Some(p) => load_with(p, &a.eph)?,
        None => {
            let mut d = MissionDesign::new_blank();
            d.ephemeris = a.eph.ephemeris.clone().unwrap_or_default();
            d
        }
    };
    let model = tourwright_mission::tour::Catalog::of(&d)
        .map_err(|i| format!("{}: {}", i.field, i.reason))?
        .model()
        .clone();
    let contours = tisserand::contours_for(&model, &planets, &levels, POINTS);
    let mut arcs = Vec::new();
    if let Some(p) = &a.design {
        let tour = PreparedTour::prepare(&d).map_err(|e| format!("{}: {e}", p.display()))?;
        let mut e = tourwright_mission::evaluate::Evaluation::default();
        evaluate(&tour, &EvalOptions::default(), &mut e);
        arcs = legs::arc_orbits(&tour, &e);
    }
    if a.json {
        return out_json(&TisserandReport {
            ephemeris: model.name(),
            contours: &contours,
            design_arcs: &arcs,
        });
    }
    let extra: Vec<(String, f64, f64)> = arcs
        .iter()
        .map(|a| {
            (
                format!(
                    "design leg {}{}",
                    a.leg + 1,
                    if a.piece == 1 { " after DSM" } else { "" }
                ),
                a.rp_au,
                a.ra_au,
            )
        })
        .collect();
    let text = export::tisserand_csv(&contours, &extra);
    match &a.csv {
        Some(path) if !is_dash(path) => {
            write(path, &text)?;
            out(&format!(
                "{} contours ({} points) and {} design arcs written to {}",
                contours.len(),
                contours.iter().map(|c| c.points.len()).sum::<usize>(),
                arcs.len(),
                path.display()
            ));
        }
        _ => write(std::path::Path::new("-"), &text)?,
    }
    Ok(())
}
