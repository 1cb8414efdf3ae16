//! `tourwright window`: a window map (porkchop grid) between two bodies or for one leg of a
//! design, with its minima and an optional CSV of every cell.

use std::path::PathBuf;

use tourwright_astro::lambert::Branch;
use tourwright_mission::MissionDesign;
use tourwright_mission::design::LegOptions;
use tourwright_search::Progress;
use tourwright_search::window::{self, Quantity, SecondAxis, WindowSpec};

use super::progress::{interrupted, watch};
use super::{
    BranchArg, CliError, CliResult, EXIT_INTERRUPTED, EphemerisArg, Writes, check_output,
    claim_stdout, epochs, load_with, out, out_json, range, write,
};

/// The arguments of `window`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Departure body (or take it from --design and --leg).
    #[arg(long, requires = "to")]
    pub from: Option<String>,
    /// Arrival body.
    #[arg(long, requires = "from")]
    pub to: Option<String>,
    /// Design whose leg to map (its dates centre the map unless given); - for standard input.
    #[arg(long)]
    pub design: Option<PathBuf>,
    /// Leg number (1-based) of --design.
    #[arg(long, default_value_t = 1, requires = "design")]
    pub leg: usize,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Departure dates START..END.
    #[arg(long)]
    pub depart: Option<String>,
    /// Arrival dates START..END.
    #[arg(long, conflicts_with = "tof")]
    pub arrive: Option<String>,
    /// Time of flight range MIN..MAX in days (instead of --arrive).
    #[arg(long)]
    pub tof: Option<String>,
    /// Cells per axis.
    #[arg(long, default_value_t = 200)]
    pub steps: usize,
    /// Complete revolutions of the arcs.
    #[arg(long, default_value_t = 0)]
    pub revs: u32,
    /// Multi-revolution branch (left: smaller x, right: larger x).
    #[arg(long, value_enum, default_value = "left")]
    pub branch: BranchArg,
    /// Write the grid as CSV (- for standard output).
    #[arg(long)]
    pub csv: Option<PathBuf>,
    /// Machine-readable JSON (the minima) instead of text.
    #[arg(long)]
    pub json: bool,
}

/// One minimum of `window --json`.
#[derive(serde::Serialize)]
struct MinimumReport {
    quantity: &'static str,
    value: f64,
    depart_utc: String,
    arrive_utc: String,
    tof_days: f64,
}

/// `window --json`.
#[derive(serde::Serialize)]
struct WindowReport {
    from: String,
    to: String,
    cells: [usize; 2],
    minima: Vec<MinimumReport>,
}

/// Run `window`.
pub fn run(a: Args) -> CliResult {
    claim_stdout(&[a.csv.as_deref()])?;
    if let (Some(c), Some(d)) = (&a.csv, &a.design) {
        check_output(c, &[d.as_path()], Writes::Data, "--csv")?;
    } else if let Some(c) = &a.csv {
        check_output(c, &[], Writes::Data, "--csv")?;
    }
    let mut base = match &a.design {
        Some(p) => load_with(p, &a.eph)?,
        None => MissionDesign::new_blank(),
    };
    if let Some(e) = &a.eph.ephemeris {
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
    let p = Progress::new();
    let w = watch(&p, "window map");
    let map = window::compute(&base, &spec, &p);
    drop(w);
    if interrupted() {
        out("interrupted: the window map was stopped");
        return Err(CliError::status(EXIT_INTERRUPTED));
    }
    let map = map.map_err(|e| e.to_string())?;
    let el = t.elapsed().as_secs_f64();
    let mut minima = Vec::new();
    for q in [Quantity::C3, Quantity::TotalDv] {
        if let Some((i, j, v)) = map.minimum(q) {
            let (x, y) = map.epochs(i, j);
            minima.push(MinimumReport {
                quantity: q.label(),
                value: v,
                depart_utc: x.to_date_utc(),
                arrive_utc: y.to_date_utc(),
                tof_days: y.days() - x.days(),
            });
        }
    }
    if let Some(p) = &a.csv {
        write(p, &map.to_csv())?;
    }
    if a.json {
        return out_json(&WindowReport {
            from: spec.from.clone(),
            to: spec.to.clone(),
            cells: [spec.nx, spec.ny],
            minima,
        });
    }
    for m in &minima {
        out(&format!(
            "minimum {}: {:.3} departing {} arriving {} ({:.0} days)",
            m.quantity, m.value, m.depart_utc, m.arrive_utc, m.tof_days
        ));
    }
    out(&format!("{} × {} cells in {el:.3} s", spec.nx, spec.ny));
    Ok(())
}
