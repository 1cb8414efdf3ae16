//! `tourwright state BODY --at EPOCH[..EPOCH --step DAYS] [--ephemeris ...] [--csv OUT | --json]`:
//! heliocentric ecliptic J2000 position and velocity of a planet from any ephemeris source, for
//! scripts and for checking sources against each other.

use std::path::PathBuf;

use tourwright_astro::bodies::Planet;
use tourwright_astro::time::{Epoch, TimeScale};
use tourwright_mission::report::csv_text;
use tourwright_mission::{MissionDesign, tour::Catalog};

use super::{CliResult, EphemerisArg, claim_stdout, out, out_json, write};

/// Most rows one call prints.
const MAX_ROWS: usize = 1_000_000;

/// The arguments of `state`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Planet (name or letter).
    pub body: String,
    /// Epoch, or START..END with --step.
    #[arg(long)]
    pub at: String,
    /// Step between rows for a range, days.
    #[arg(long)]
    pub step: Option<f64>,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Write CSV here (- for standard output) instead of a table.
    #[arg(long, conflicts_with = "json")]
    pub csv: Option<PathBuf>,
    /// Machine-readable JSON instead of a table.
    #[arg(long)]
    pub json: bool,
}

/// One state, as `--json` writes it.
#[derive(serde::Serialize)]
struct StateRow {
    epoch_tdb: String,
    x_km: f64,
    y_km: f64,
    z_km: f64,
    vx_km_s: f64,
    vy_km_s: f64,
    vz_km_s: f64,
}

/// `state --json`.
#[derive(serde::Serialize)]
struct StateReport {
    body: String,
    ephemeris: String,
    frame: &'static str,
    states: Vec<StateRow>,
}

/// Run `state`.
pub fn run(a: Args) -> CliResult {
    claim_stdout(&[a.csv.as_deref()])?;
    let p = Planet::from_name(&a.body).ok_or_else(|| {
        format!(
            "unknown body '{}' (choose {})",
            a.body,
            Planet::ALL.map(|p| p.name()).join(", ")
        )
    })?;
    let mut d = MissionDesign::new_blank();
    d.ephemeris = a.eph.ephemeris.clone().unwrap_or_default();
    let cat = Catalog::of(&d).map_err(|i| format!("--ephemeris: {}", i.reason))?;
    let model = cat.model().clone();
    let eph = model.planet(p).map_err(|e| e.to_string())?;
    let epochs: Vec<Epoch> = match a.at.split_once("..") {
        None => {
            if a.step.is_some() {
                return Err("--step needs a range: --at START..END".into());
            }
            vec![Epoch::parse(a.at.trim()).map_err(|e| format!("--at: {e}"))?]
        }
        Some(_) => {
            let (x, y) = super::epochs(&a.at, "at")?;
            let step = a.step.ok_or("--at START..END needs --step DAYS")?;
            if !(step.is_finite() && step > 0.0) {
                return Err("--step: days must be a positive number".into());
            }
            let span = (y.tdb().0 - x.tdb().0) / 86_400.0;
            let n = (span / step).floor() as usize + 1;
            if n > MAX_ROWS {
                return Err(format!("--step: {n} rows is more than {MAX_ROWS}").into());
            }
            (0..n).map(|i| x.plus_days(step * i as f64)).collect()
        }
    };
    let mut rows = Vec::with_capacity(epochs.len());
    for e in &epochs {
        use tourwright_astro::ephemeris::Ephemeris as _;
        let s = eph.state(e.tdb()).map_err(|err| err.to_string())?;
        rows.push(StateRow {
            epoch_tdb: Epoch::from_tdb(e.tdb(), TimeScale::Tdb).to_string(),
            x_km: s.r.x,
            y_km: s.r.y,
            z_km: s.r.z,
            vx_km_s: s.v.x,
            vy_km_s: s.v.y,
            vz_km_s: s.v.z,
        });
    }
    if a.json {
        return out_json(&StateReport {
            body: p.name().into(),
            ephemeris: model.name(),
            frame: "heliocentric ecliptic J2000; km, km/s; epochs TDB",
            states: rows,
        });
    }
    if let Some(path) = &a.csv {
        let text = csv_text(
            &[
                "epoch_tdb",
                "body",
                "x_km",
                "y_km",
                "z_km",
                "vx_km_s",
                "vy_km_s",
                "vz_km_s",
            ],
            rows.iter().map(|r| {
                vec![
                    r.epoch_tdb.clone(),
                    p.name().to_string(),
                    format!("{:.6}", r.x_km),
                    format!("{:.6}", r.y_km),
                    format!("{:.6}", r.z_km),
                    format!("{:.9}", r.vx_km_s),
                    format!("{:.9}", r.vy_km_s),
                    format!("{:.9}", r.vz_km_s),
                ]
            }),
        );
        write(path, &text)?;
        out(&format!(
            "{} states of {} ({}) written to {}",
            rows.len(),
            p.name(),
            model.name(),
            path.display()
        ));
        return Ok(());
    }
    out(&format!(
        "{} · heliocentric ecliptic J2000 · km, km/s, epochs TDB · {}",
        p.name(),
        model.name()
    ));
    out(&format!(
        "{:<32} {:>18} {:>18} {:>18} {:>14} {:>14} {:>14}",
        "epoch (TDB)", "x (km)", "y (km)", "z (km)", "vx (km/s)", "vy (km/s)", "vz (km/s)"
    ));
    for r in &rows {
        out(&format!(
            "{:<32} {:>18.3} {:>18.3} {:>18.3} {:>14.9} {:>14.9} {:>14.9}",
            r.epoch_tdb, r.x_km, r.y_km, r.z_km, r.vx_km_s, r.vy_km_s, r.vz_km_s
        ));
    }
    Ok(())
}
