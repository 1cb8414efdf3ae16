//! `tourwright window`: a window map (porkchop grid) between two bodies or for one leg of a
//! design, with its minima and an optional CSV of every cell.

use std::path::PathBuf;

use tourwright_astro::lambert::Branch;
use tourwright_mission::MissionDesign;
use tourwright_mission::design::EphemerisChoice;
use tourwright_mission::design::LegOptions;
use tourwright_search::Progress;
use tourwright_search::window::{self, Quantity, SecondAxis, WindowSpec};

use super::{BranchArg, CliResult, epochs, load_with, range, write};

/// The arguments of `window`.
pub struct Args {
    /// Departure body.
    pub from: Option<String>,
    /// Ephemeris model.
    pub ephemeris: Option<EphemerisChoice>,
    /// Arrival body.
    pub to: Option<String>,
    /// Design whose leg to map.
    pub design: Option<PathBuf>,
    /// Leg number (1-based).
    pub leg: usize,
    /// Departure dates START..END.
    pub depart: Option<String>,
    /// Arrival dates START..END.
    pub arrive: Option<String>,
    /// TOF range MIN..MAX days.
    pub tof: Option<String>,
    /// Cells per axis.
    pub steps: usize,
    /// Revolutions.
    pub revs: u32,
    /// Branch.
    pub branch: BranchArg,
    /// CSV output.
    pub csv: Option<PathBuf>,
}

/// Run `window`.
pub fn run(a: Args) -> CliResult {
    let mut base = match &a.design {
        Some(p) => load_with(p, a.ephemeris.clone())?,
        None => MissionDesign::new_blank(),
    };
    if let Some(e) = &a.ephemeris {
        base.ephemeris = e.clone();
    }
    let (from, to, centre) = match (&a.design, a.from, a.to) {
        (_, Some(f), Some(t)) => (f, t, None),
        (Some(_), _, _) => {
            let k = a
                .leg
                .checked_sub(1)
                .filter(|k| k + 1 < base.stops.len())
                .ok_or("--leg is not a leg of the design")?;
            (
                base.stops[k].body.clone(),
                base.stops[k + 1].body.clone(),
                Some((base.stops[k].epoch, base.stops[k + 1].epoch)),
            )
        }
        _ => return Err("give --from and --to, or --design and --leg".into()),
    };
    let dep = match (a.depart, centre) {
        (Some(t), _) => epochs(&t, "depart")?,
        (None, Some((d, _))) => (d.plus_days(-60.0), d.plus_days(60.0)),
        (None, None) => return Err("--depart START..END is needed".into()),
    };
    let second = match (a.arrive, a.tof, centre) {
        (Some(t), _, _) => {
            let (x, y) = epochs(&t, "arrive")?;
            SecondAxis::Arrival(x, y)
        }
        (None, Some(t), _) => {
            let (x, y) = range(&t, "tof")?;
            let x: f64 = x.parse().map_err(|_| "--tof wants numbers of days")?;
            let y: f64 = y.parse().map_err(|_| "--tof wants numbers of days")?;
            if !(x > 0.0 && y > x && y.is_finite()) {
                return Err("--tof wants 0 < MIN < MAX".into());
            }
            SecondAxis::Tof(x, y)
        }
        (None, None, Some((_, b))) => SecondAxis::Arrival(b.plus_days(-90.0), b.plus_days(90.0)),
        _ => return Err("--arrive START..END or --tof MIN..MAX is needed".into()),
    };
    if !(2..=4000).contains(&a.steps) {
        return Err("--steps must be between 2 and 4000".into());
    }
    let spec = WindowSpec {
        from,
        to,
        depart: dep,
        second,
        nx: a.steps,
        ny: a.steps,
        leg: LegOptions {
            revolutions: a.revs,
            branch: match a.branch {
                BranchArg::Left => Branch::Left,
                BranchArg::Right => Branch::Right,
            },
            ..Default::default()
        },
        goal: base.arrival,
    };
    let t = std::time::Instant::now();
    let map = window::compute(&base, &spec, &Progress::new()).map_err(|e| e.to_string())?;
    let el = t.elapsed().as_secs_f64();
    for q in [Quantity::C3, Quantity::TotalDv] {
        if let Some((i, j, v)) = map.minimum(q) {
            let (x, y) = map.epochs(i, j);
            super::out(&format!(
                "minimum {}: {v:.3} departing {} arriving {} ({:.0} days)",
                q.label(),
                x.to_date_utc(),
                y.to_date_utc(),
                y.days() - x.days()
            ));
        }
    }
    super::out(&format!("{} × {} cells in {el:.3} s", spec.nx, spec.ny));
    if let Some(p) = a.csv {
        write(&p, &map.to_csv())?;
    }
    Ok(())
}
