//! `tourwright state BODY --at EPOCH[..EPOCH --step DAYS] [--ephemeris ...] [--csv OUT]`:
//! heliocentric ecliptic J2000 position and velocity of a planet from any ephemeris source, for
//! scripts and for checking sources against each other.

use std::path::Path;

use tourwright_astro::bodies::Planet;
use tourwright_astro::time::{Epoch, TimeScale};
use tourwright_mission::design::EphemerisChoice;
use tourwright_mission::{MissionDesign, tour::Catalog};

use super::{CliResult, out, write};

/// Most rows one call prints.
const MAX_ROWS: usize = 1_000_000;

/// Run `state`.
pub fn run(
    body: &str,
    at: &str,
    step_days: Option<f64>,
    ephemeris: Option<EphemerisChoice>,
    csv: Option<&Path>,
) -> CliResult {
    let p = Planet::from_name(body).ok_or_else(|| {
        format!(
            "unknown body '{body}' (choose {})",
            Planet::ALL.map(|p| p.name()).join(", ")
        )
    })?;
    let mut d = MissionDesign::new_blank();
    d.ephemeris = ephemeris.unwrap_or_default();
    let cat = Catalog::of(&d).map_err(|i| format!("--ephemeris: {}", i.reason))?;
    let model = cat.model().clone();
    let eph = model.planet(p).map_err(|e| e.to_string())?;
    let epochs: Vec<Epoch> = match at.split_once("..") {
        None => {
            if step_days.is_some() {
                return Err("--step needs a range: --at START..END".into());
            }
            vec![Epoch::parse(at.trim()).map_err(|e| format!("--at: {e}"))?]
        }
        Some(_) => {
            let (a, b) = super::epochs(at, "at")?;
            let step = step_days.ok_or("--at START..END needs --step DAYS")?;
            if !(step.is_finite() && step > 0.0) {
                return Err("--step: days must be a positive number".into());
            }
            let span = (b.tdb().0 - a.tdb().0) / 86_400.0;
            let n = (span / step).floor() as usize + 1;
            if n > MAX_ROWS {
                return Err(format!("--step: {n} rows is more than {MAX_ROWS}").into());
            }
            (0..n).map(|i| a.plus_days(step * i as f64)).collect()
        }
    };
    let header = "epoch,body,x_km,y_km,z_km,vx_km_s,vy_km_s,vz_km_s";
    let mut text = String::with_capacity(epochs.len() * 160 + 64);
    text.push_str(header);
    text.push('\n');
    for e in &epochs {
        use tourwright_astro::ephemeris::Ephemeris as _;
        let s = eph.state(e.tdb()).map_err(|err| err.to_string())?;
        let label = Epoch::from_tdb(e.tdb(), TimeScale::Tdb);
        text.push_str(&format!(
            "{label},{},{:.6},{:.6},{:.6},{:.9},{:.9},{:.9}\n",
            p.name(),
            s.r.x,
            s.r.y,
            s.r.z,
            s.v.x,
            s.v.y,
            s.v.z
        ));
    }
    match csv {
        Some(path) => {
            write(path, &text)?;
            out(&format!(
                "{} states of {} ({}) written to {}",
                epochs.len(),
                p.name(),
                model.name(),
                path.display()
            ));
        }
        None => {
            out(&format!(
                "# {} heliocentric ecliptic J2000, km and km/s, epochs TDB; {}",
                p.name(),
                model.name()
            ));
            out(&text);
        }
    }
    Ok(())
}
