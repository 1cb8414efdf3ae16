//! The command line: the same engine for scripts and batch work. Every command prints tables or
//! writes files; bad input ends with a one-line reason on stderr and a non-zero exit status.

use std::fmt::Write as _;
use std::path::{Path, PathBuf};

use clap::{Parser, Subcommand, ValueEnum};
use serde_json::json;

use crate::astro::bodies::Planet;
use crate::astro::time::Epoch;
use crate::mission::design::{MissionDesign, Objective};
use crate::mission::evaluate::{Evaluation, StopKind, evaluate};
use crate::mission::{export, files};
use crate::search::direct::{self, DirectOptions, Measure};
use crate::search::explore::{self, ExploreSpec};
use crate::search::job::Progress;
use crate::search::optimize::{self, OptimizeOptions, Problem};
use crate::search::window::{self, Quantity, SecondAxis, WindowSpec};

/// Tourwright: design gravity-assist tours with patched conics.
#[derive(Parser, Debug)]
#[command(name = "tourwright", version, about, after_help = crate::CAUTION)]
pub struct Cli {
    /// What to do; with none, the workbench opens.
    #[command(subcommand)]
    pub command: Option<Command>,
}

/// Measures for `compare`.
#[derive(Clone, Copy, Debug, ValueEnum)]
pub enum MeasureArg {
    /// Launch v∞ plus spacecraft Δv.
    Dv,
    /// Delivered mass with the design's launch vehicle.
    Mass,
    /// Launch C3.
    C3,
}

/// Multi-revolution branches.
#[derive(Clone, Copy, Debug, ValueEnum)]
pub enum BranchArg {
    /// Izzo's left branch (smaller x).
    Left,
    /// Izzo's right branch (larger x).
    Right,
}

/// Objectives for `optimize` and `explore`.
#[derive(Clone, Copy, Debug, ValueEnum)]
pub enum ObjectiveArg {
    /// Launch v∞ plus every spacecraft Δv.
    Dv,
    /// Spacecraft Δv only (C3 held under the limit).
    ScDv,
    /// Delivered mass with the launch vehicle.
    Mass,
    /// Total time of flight.
    Tof,
}

impl From<ObjectiveArg> for Objective {
    fn from(o: ObjectiveArg) -> Self {
        match o {
            ObjectiveArg::Dv => Objective::TotalDvWithLaunchVinf,
            ObjectiveArg::ScDv => Objective::SpacecraftDv,
            ObjectiveArg::Mass => Objective::DeliveredMass,
            ObjectiveArg::Tof => Objective::TimeOfFlight,
        }
    }
}

/// Subcommands.
#[derive(Subcommand, Debug)]
pub enum Command {
    /// Open the workbench (optionally on a design file).
    Gui {
        /// Design file to open.
        file: Option<PathBuf>,
    },
    /// Evaluate a design: event table and ledger.
    Eval {
        /// Design file.
        file: PathBuf,
        /// Machine-readable JSON instead of text.
        #[arg(long)]
        json: bool,
    },
    /// Compare the tour with the best direct transfer in the launch period.
    Compare {
        /// Design file.
        file: PathBuf,
        /// Ranking measure (default: mass when the design has a launch vehicle, else Δv).
        #[arg(long, value_enum)]
        measure: Option<MeasureArg>,
        /// Half-width of the launch period around the tour's launch, days.
        #[arg(long, default_value_t = 365.25)]
        window_days: f64,
        /// Machine-readable JSON instead of text.
        #[arg(long)]
        json: bool,
    },
    /// Export tables or the trajectory.
    Export {
        /// Design file.
        file: PathBuf,
        /// Event table as CSV.
        #[arg(long)]
        csv: Option<PathBuf>,
        /// Ledger as CSV.
        #[arg(long)]
        ledger: Option<PathBuf>,
        /// Trajectory samples as CSV.
        #[arg(long)]
        samples: Option<PathBuf>,
        /// Trajectory as a CCSDS OEM (KVN).
        #[arg(long)]
        oem: Option<PathBuf>,
    },
    /// Window map (porkchop grid) between two bodies or for one leg of a design.
    Window {
        /// Departure body (or take it from --design and --leg).
        #[arg(long)]
        from: Option<String>,
        /// Arrival body.
        #[arg(long)]
        to: Option<String>,
        /// Design whose leg to map (its dates centre the map unless given).
        #[arg(long)]
        design: Option<PathBuf>,
        /// Leg number (1-based) of --design.
        #[arg(long, default_value_t = 1)]
        leg: usize,
        /// Departure dates START..END.
        #[arg(long)]
        depart: Option<String>,
        /// Arrival dates START..END.
        #[arg(long)]
        arrive: Option<String>,
        /// Time of flight range MIN..MAX in days (instead of --arrive).
        #[arg(long)]
        tof: Option<String>,
        /// Cells per axis.
        #[arg(long, default_value_t = 200)]
        steps: usize,
        /// Complete revolutions of the arcs.
        #[arg(long, default_value_t = 0)]
        revs: u32,
        /// Multi-revolution branch (left: smaller x, right: larger x).
        #[arg(long, value_enum, default_value = "left")]
        branch: BranchArg,
        /// Write the grid as CSV.
        #[arg(long)]
        csv: Option<PathBuf>,
    },
    /// Adjust a shaped swing-by so that its ballistic leg meets the next body again.
    Retarget {
        /// Design file.
        file: PathBuf,
        /// Stop number (1-based) of the shaped swing-by.
        #[arg(long)]
        stop: usize,
        /// Also move the next stop's epoch (and later ones by the same shift).
        #[arg(long)]
        move_epoch: bool,
        /// Where to write the adjusted design.
        #[arg(long)]
        out: PathBuf,
    },
    /// Optimise a design's dates within its search bounds.
    Optimize {
        /// Design file.
        file: PathBuf,
        /// Seed (the same seed and budget give the same answer).
        #[arg(long, default_value_t = 1)]
        seed: u64,
        /// Wall-clock limit, seconds (optional; results then depend on machine speed).
        #[arg(long)]
        time: Option<f64>,
        /// Evaluation budget.
        #[arg(long, default_value_t = 400_000)]
        evals: u64,
        /// Objective (default: the design's).
        #[arg(long, value_enum)]
        objective: Option<ObjectiveArg>,
        /// Where to write the improved design.
        #[arg(long)]
        out: PathBuf,
        /// Also write the TOF trade-off front as CSV.
        #[arg(long)]
        front: Option<PathBuf>,
    },
    /// Explore planet sequences and rank them.
    Explore {
        /// Launch body.
        #[arg(long)]
        from: String,
        /// Target body.
        #[arg(long)]
        to: String,
        /// Launch period START..END.
        #[arg(long)]
        launch: String,
        /// Bodies allowed for swing-bys, comma-separated letters or names (V,E,M,J).
        #[arg(long, default_value = "V,E,M,J")]
        via: String,
        /// Largest number of swing-bys.
        #[arg(long, default_value_t = 2)]
        max_swingbys: usize,
        /// Largest total TOF, years.
        #[arg(long, default_value_t = 8.0)]
        max_tof_years: f64,
        /// Objective.
        #[arg(long, value_enum, default_value = "dv")]
        objective: ObjectiveArg,
        /// Largest launch C3, km²/s².
        #[arg(long)]
        max_c3: Option<f64>,
        /// Evaluations per sequence.
        #[arg(long, default_value_t = 60_000)]
        evals: u64,
        /// Seed.
        #[arg(long, default_value_t = 1)]
        seed: u64,
        /// Folder for the ranked designs (one file per sequence).
        #[arg(long)]
        out: Option<PathBuf>,
    },
}

/// A failure of a command: one line for stderr.
pub type CliResult = Result<(), String>;

fn load(path: &Path) -> Result<MissionDesign, String> {
    files::load(path).map_err(|e| e.to_string())
}

fn write(path: &Path, text: &str) -> CliResult {
    std::fs::write(path, text).map_err(|e| format!("{}: {e}", path.display()))
}

fn range(text: &str, what: &str) -> Result<(String, String), String> {
    text.split_once("..")
        .map(|(a, b)| (a.trim().to_string(), b.trim().to_string()))
        .ok_or_else(|| format!("--{what} wants START..END, got '{text}'"))
}

fn epochs(text: &str, what: &str) -> Result<(Epoch, Epoch), String> {
    let (a, b) = range(text, what)?;
    let a = Epoch::parse(&a).map_err(|e| format!("--{what}: {e}"))?;
    let b = Epoch::parse(&b).map_err(|e| format!("--{what}: {e}"))?;
    if b.tdb_s <= a.tdb_s {
        return Err(format!("--{what}: the end must be after the start"));
    }
    Ok((a, b))
}

fn fmt_opt(x: f64, prec: usize) -> String {
    if x.is_finite() && x.abs() < 1e15 {
        format!("{x:.prec$}")
    } else {
        "—".into()
    }
}

/// The event table and ledger as text.
pub fn eval_text(d: &MissionDesign, e: &Evaluation) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "{} ({})  —  {}",
        d.name,
        d.sequence_label(),
        crate::CAUTION
    );
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "{:<3} {:<9} {:<9} {:<11} {:>8} {:>8} {:>11} {:>7} {:>8} {:>9} {:>9}",
        "#",
        "stop",
        "body",
        "date (UTC)",
        "v∞ in",
        "v∞ out",
        "altitude",
        "turn",
        "Δv",
        "ΔE",
        "mass"
    );
    let _ = writeln!(
        s,
        "{:<3} {:<9} {:<9} {:<11} {:>8} {:>8} {:>11} {:>7} {:>8} {:>9} {:>9}",
        "", "", "", "", "km/s", "km/s", "km", "deg", "km/s", "km²/s²", "kg"
    );
    for (k, st) in e.stops.iter().enumerate() {
        let sw = st.swingby.unwrap_or_default();
        let is_sw = st.kind == StopKind::SwingBy;
        let _ = writeln!(
            s,
            "{:<3} {:<9} {:<9} {:<11} {:>8} {:>8} {:>11} {:>7} {:>8.3} {:>9} {:>9.1}",
            k + 1,
            st.kind.label(),
            d.stops[k].body,
            st.epoch.to_date_utc(),
            if k > 0 {
                fmt_opt(st.vinf_in.norm(), 3)
            } else {
                "—".into()
            },
            if k + 1 < e.stops.len() {
                fmt_opt(st.vinf_out.norm(), 3)
            } else {
                "—".into()
            },
            if is_sw {
                fmt_opt(sw.altitude_km, 0)
            } else {
                "—".into()
            },
            if is_sw {
                fmt_opt(sw.turn_rad.to_degrees(), 1)
            } else {
                "—".into()
            },
            st.dv_km_s,
            if is_sw {
                fmt_opt(st.gain(), 2)
            } else {
                "—".into()
            },
            st.mass_after_kg
        );
    }
    let _ = writeln!(s);
    let l = &e.launch;
    let _ = writeln!(
        s,
        "Launch: C3 {:.3} km²/s²  v∞ {:.3} km/s  DLA {:.1}°  RLA {:.1}°{}",
        l.c3,
        l.vinf,
        l.dla_deg,
        l.rla_deg,
        l.injected_mass_kg
            .map(|m| format!("  injected {m:.0} kg"))
            .unwrap_or_default()
    );
    let _ = writeln!(
        s,
        "Arrival: v∞ {:.3} km/s  Δv {:.3} km/s  total TOF {:.1} days ({:.2} years)",
        e.arrival.vinf,
        e.arrival.dv_km_s,
        e.total_tof_days(),
        e.total_tof_days() / 365.25
    );
    let g = &e.ledger;
    let _ = writeln!(
        s,
        "Ledger: total Δv {:.3} km/s  wet {:.0} kg  propellant needed {:.0} kg (margin {:.0} kg)  final {:.0} kg{}",
        g.total_dv_km_s,
        g.wet_mass_kg,
        g.propellant_needed_kg,
        g.propellant_margin_kg,
        g.final_mass_kg,
        g.delivered_mass_kg
            .map(|m| format!("  delivered with launch vehicle {m:.0} kg"))
            .unwrap_or_default()
    );
    if e.warnings.is_empty() {
        let _ = writeln!(s, "No warnings.");
    } else {
        for w in &e.warnings {
            let _ = writeln!(s, "warning: {w}");
        }
    }
    s
}

/// The evaluation as JSON.
pub fn eval_json(d: &MissionDesign, e: &Evaluation) -> serde_json::Value {
    let stops: Vec<_> = e
        .stops
        .iter()
        .enumerate()
        .map(|(k, st)| {
            let sw = st.swingby.map(|sw| {
                json!({
                    "shaped": sw.shaped,
                    "periapsis_radius_km": finite(sw.rp_km),
                    "altitude_km": finite(sw.altitude_km),
                    "min_altitude_km": sw.min_altitude_km,
                    "turn_deg": sw.turn_rad.to_degrees(),
                    "turn_available_deg": sw.turn_available_rad.to_degrees(),
                    "powered_dv_km_s": sw.powered_dv_km_s,
                    "b_t_km": sw.bplane.b_t, "b_r_km": sw.bplane.b_r,
                    "aim_deg": sw.bplane.aim.to_degrees(),
                    "planet_dv_km_s": sw.planet_dv_km_s,
                    "miss_km": sw.miss_km,
                    "closest_approach_km": sw.closest_approach.map(|c| c.0),
                    "closest_approach_utc": sw.closest_approach.map(|c| c.1.to_iso_utc()),
                })
            });
            json!({
                "kind": st.kind.label(),
                "body": d.stops[k].body,
                "epoch_utc": st.epoch.to_iso_utc(),
                "mjd2000": st.epoch.mjd2000(),
                "vinf_in_km_s": st.vinf_in.norm(),
                "vinf_out_km_s": st.vinf_out.norm(),
                "speed_before_km_s": st.speed_before,
                "speed_after_km_s": st.speed_after,
                "energy_before_km2_s2": st.energy_before,
                "energy_after_km2_s2": st.energy_after,
                "energy_gain_km2_s2": st.gain(),
                "dv_km_s": st.dv_km_s,
                "mass_after_kg": st.mass_after_kg,
                "swingby": sw,
            })
        })
        .collect();
    json!({
        "name": d.name,
        "sequence": d.sequence_label(),
        "complete": e.complete,
        "stops": stops,
        "launch": {
            "c3_km2_s2": e.launch.c3, "vinf_km_s": e.launch.vinf,
            "dla_deg": e.launch.dla_deg, "rla_deg": e.launch.rla_deg,
            "injected_mass_kg": e.launch.injected_mass_kg,
        },
        "arrival": { "vinf_km_s": e.arrival.vinf, "dv_km_s": e.arrival.dv_km_s },
        "total_tof_days": e.total_tof_days(),
        "ledger": {
            "total_dv_km_s": e.ledger.total_dv_km_s,
            "wet_mass_kg": e.ledger.wet_mass_kg,
            "propellant_needed_kg": e.ledger.propellant_needed_kg,
            "propellant_margin_kg": e.ledger.propellant_margin_kg,
            "final_mass_kg": e.ledger.final_mass_kg,
            "lv_margin_kg": e.ledger.lv_margin_kg,
            "delivered_mass_kg": e.ledger.delivered_mass_kg,
        },
        "warnings": e.warnings.iter().map(|w| w.to_string()).collect::<Vec<_>>(),
        "caution": crate::CAUTION,
    })
}

fn finite(x: f64) -> Option<f64> {
    (x.is_finite() && x.abs() < 1e15).then_some(x)
}

/// The direct-vs-assist comparison as text.
pub fn compare_text(c: &direct::DirectComparison) -> String {
    let mut s = String::new();
    let (t, d) = (&c.tour_eval, &c.direct_eval);
    let _ = writeln!(s, "Direct vs assist (ranked by {})", c.measure.label());
    let _ = writeln!(
        s,
        "{:<28} {:>14} {:>14} {:>12}",
        "", "tour", "direct", "difference"
    );
    let row = |s: &mut String, name: &str, a: f64, b: f64, p: usize| {
        let _ = writeln!(s, "{name:<28} {a:>14.p$} {b:>14.p$} {:>+12.p$}", a - b);
    };
    let _ = writeln!(
        s,
        "{:<28} {:>14} {:>14}",
        "launch (UTC)",
        t.stops[0].epoch.to_date_utc(),
        d.stops[0].epoch.to_date_utc()
    );
    row(
        &mut s,
        "time of flight (days)",
        t.total_tof_days(),
        d.total_tof_days(),
        1,
    );
    row(&mut s, "launch C3 (km²/s²)", t.launch.c3, d.launch.c3, 2);
    row(
        &mut s,
        "arrival v∞ (km/s)",
        t.arrival.vinf,
        d.arrival.vinf,
        3,
    );
    row(
        &mut s,
        "spacecraft Δv (km/s)",
        t.ledger.total_dv_km_s,
        d.ledger.total_dv_km_s,
        3,
    );
    row(
        &mut s,
        "launch v∞ + Δv (km/s)",
        t.launch.vinf + t.ledger.total_dv_km_s,
        d.launch.vinf + d.ledger.total_dv_km_s,
        3,
    );
    if let (Some(a), Some(b)) = (t.ledger.delivered_mass_kg, d.ledger.delivered_mass_kg) {
        row(&mut s, "delivered mass (kg)", a, b, 0);
    }
    let h = &c.hohmann;
    let _ = writeln!(
        s,
        "Hohmann (circular, coplanar): v∞ {:.3} km/s out, {:.3} km/s in, {:.1} days",
        h.vinf_depart, h.vinf_arrive, h.tof_days
    );
    let _ = writeln!(s, "{}", c.summary());
    s
}

/// Run a parsed command line (not `gui`, which the binary handles).
pub fn run(cmd: Command) -> CliResult {
    match cmd {
        Command::Gui { .. } => Err("the workbench is started by the binary".into()),
        Command::Eval { file, json } => {
            let d = load(&file)?;
            let e = evaluate(&d);
            if json {
                println!(
                    "{}",
                    serde_json::to_string_pretty(&eval_json(&d, &e)).map_err(|e| e.to_string())?
                );
            } else {
                print!("{}", eval_text(&d, &e));
            }
            Ok(())
        }
        Command::Compare {
            file,
            measure,
            window_days,
            json,
        } => {
            let d = load(&file)?;
            let mut o = DirectOptions::for_design(&d);
            o.window_days = window_days;
            if let Some(m) = measure {
                o.measure = match m {
                    MeasureArg::Dv => Measure::TotalDv,
                    MeasureArg::Mass => Measure::DeliveredMass,
                    MeasureArg::C3 => Measure::C3,
                };
            }
            if o.measure == Measure::DeliveredMass && d.launch_vehicle.is_none() {
                return Err("--measure mass needs a launch vehicle in the design".into());
            }
            let c =
                direct::compare(&d, &o).ok_or("no direct transfer found in the launch period")?;
            if json {
                let v = json!({
                    "measure": c.measure.label(),
                    "tour": eval_json(&d, &c.tour_eval),
                    "direct": eval_json(&c.direct, &c.direct_eval),
                    "hohmann": {"vinf_depart_km_s": c.hohmann.vinf_depart, "vinf_arrive_km_s": c.hohmann.vinf_arrive, "tof_days": c.hohmann.tof_days},
                    "summary": c.summary(),
                });
                println!(
                    "{}",
                    serde_json::to_string_pretty(&v).map_err(|e| e.to_string())?
                );
            } else {
                print!("{}", compare_text(&c));
            }
            Ok(())
        }
        Command::Export {
            file,
            csv,
            ledger,
            samples,
            oem,
        } => {
            let d = load(&file)?;
            let e = evaluate(&d);
            if csv.is_none() && ledger.is_none() && samples.is_none() && oem.is_none() {
                return Err(
                    "export needs at least one of --csv, --ledger, --samples, --oem".into(),
                );
            }
            if let Some(p) = csv {
                write(&p, &export::events_csv(&d, &e))?;
            }
            if let Some(p) = ledger {
                write(&p, &export::ledger_csv(&d, &e))?;
            }
            if let Some(p) = samples {
                write(&p, &export::samples_csv(&e))?;
            }
            if let Some(p) = oem {
                if !e.complete {
                    return Err("the design has legs with no solution; nothing to export".into());
                }
                write(&p, &export::oem(&d, &e, export::now()))?;
            }
            Ok(())
        }
        Command::Window {
            from,
            to,
            design,
            leg,
            depart,
            arrive,
            tof,
            steps,
            revs,
            branch,
            csv,
        } => {
            let base = match &design {
                Some(p) => load(p)?,
                None => MissionDesign::new_blank(),
            };
            let (from, to, centre) = match (&design, from, to) {
                (_, Some(f), Some(t)) => (f, t, None),
                (Some(_), _, _) => {
                    let k = leg
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
            for b in [&from, &to] {
                if base.resolve(b).is_none() {
                    return Err(format!("unknown body '{b}'"));
                }
            }
            let dep = match (depart, centre) {
                (Some(t), _) => epochs(&t, "depart")?,
                (None, Some((a, _))) => (a.plus_days(-60.0), a.plus_days(60.0)),
                (None, None) => return Err("--depart START..END is needed".into()),
            };
            let second = match (arrive, tof, centre) {
                (Some(t), _, _) => {
                    let (a, b) = epochs(&t, "arrive")?;
                    SecondAxis::Arrival(a, b)
                }
                (None, Some(t), _) => {
                    let (a, b) = range(&t, "tof")?;
                    let a: f64 = a.parse().map_err(|_| "--tof wants numbers of days")?;
                    let b: f64 = b.parse().map_err(|_| "--tof wants numbers of days")?;
                    if !(a > 0.0 && b > a) {
                        return Err("--tof wants 0 < MIN < MAX".into());
                    }
                    SecondAxis::Tof(a, b)
                }
                (None, None, Some((_, b))) => {
                    SecondAxis::Arrival(b.plus_days(-90.0), b.plus_days(90.0))
                }
                _ => return Err("--arrive START..END or --tof MIN..MAX is needed".into()),
            };
            if !(2..=4000).contains(&steps) {
                return Err("--steps must be between 2 and 4000".into());
            }
            let spec = WindowSpec {
                from,
                to,
                depart: dep,
                second,
                nx: steps,
                ny: steps,
                leg: crate::mission::design::LegOptions {
                    revolutions: revs,
                    branch: match branch {
                        BranchArg::Left => crate::astro::lambert::Branch::Left,
                        BranchArg::Right => crate::astro::lambert::Branch::Right,
                    },
                    ..Default::default()
                },
                goal: base.arrival,
            };
            let t = std::time::Instant::now();
            let map = window::compute(&base, &spec, &Progress::new()).ok_or("cancelled")?;
            let el = t.elapsed().as_secs_f64();
            for q in [Quantity::C3, Quantity::TotalDv] {
                if let Some((i, j, v)) = map.minimum(q) {
                    let (a, b) = map.epochs(i, j);
                    println!(
                        "minimum {}: {v:.3} departing {} arriving {} ({:.0} days)",
                        q.label(),
                        a.to_date_utc(),
                        b.to_date_utc(),
                        b.days() - a.days()
                    );
                }
            }
            println!("{} × {} cells in {el:.3} s", spec.nx, spec.ny);
            if let Some(p) = csv {
                write(&p, &map.to_csv())?;
            }
            Ok(())
        }
        Command::Retarget {
            file,
            stop,
            move_epoch,
            out,
        } => {
            let d = load(&file)?;
            let k = stop.checked_sub(1).ok_or("--stop counts from 1")?;
            let r =
                crate::mission::retarget::retarget(&d, k, move_epoch).map_err(|e| e.to_string())?;
            files::save(&r.design, &out).map_err(|e| e.to_string())?;
            println!("miss distance now {:.1} km", r.miss_km);
            print!("{}", eval_text(&r.design, &evaluate(&r.design)));
            Ok(())
        }
        Command::Optimize {
            file,
            seed,
            time,
            evals,
            objective,
            out,
            front,
        } => {
            let mut d = load(&file)?;
            if let Some(o) = objective {
                d.search.objective = o.into();
            }
            let p = Problem::from_design(&d);
            let before = p.score(&p.vector_of(&d), &mut optimize::Workspace::new(&p));
            let opts = OptimizeOptions {
                seed,
                max_evals: evals,
                time_limit_s: time,
                ..Default::default()
            };
            let t = std::time::Instant::now();
            let r = optimize::optimize(&p, &opts, &Progress::new(), front.is_some());
            let mut nd = d.clone();
            for (k, s) in nd.stops.iter_mut().enumerate() {
                s.epoch = r.design.stops[k].epoch;
            }
            println!(
                "objective {:?}: {:.4} -> {:.4} after {} evaluations in {:.2} s",
                d.search.objective,
                before,
                r.value,
                r.evaluations,
                t.elapsed().as_secs_f64()
            );
            files::save(&nd, &out).map_err(|e| e.to_string())?;
            print!("{}", eval_text(&nd, &evaluate(&nd)));
            if let Some(fp) = front {
                let mut s = String::from("total_tof_days,objective\n");
                for (a, b) in &r.front {
                    let _ = writeln!(s, "{a:.3},{b:.6}");
                }
                write(&fp, &s)?;
            }
            Ok(())
        }
        Command::Explore {
            from,
            to,
            launch,
            via,
            max_swingbys,
            max_tof_years,
            objective,
            max_c3,
            evals,
            seed,
            out,
        } => {
            let pl = |s: &str| Planet::from_name(s).ok_or_else(|| format!("unknown planet '{s}'"));
            let mut via_p = Vec::new();
            for v in via.split(',').filter(|v| !v.trim().is_empty()) {
                via_p.push(pl(v)?);
            }
            if max_swingbys > 4 {
                return Err("--max-swingbys is limited to 4".into());
            }
            let spec = ExploreSpec {
                from: pl(&from)?,
                to: pl(&to)?,
                launch: epochs(&launch, "launch")?,
                via: via_p,
                max_swingbys,
                max_tof_years,
                objective: objective.into(),
                evals_per_sequence: evals,
                seed,
            };
            let mut template = MissionDesign::new_blank();
            template.launch.max_c3_km2_s2 = max_c3;
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
            if let Some(dir) = out {
                std::fs::create_dir_all(&dir).map_err(|e| format!("{}: {e}", dir.display()))?;
                for (i, c) in ex.ranked.iter().enumerate() {
                    let p = dir.join(format!("{:02}-{}.tour.ron", i + 1, c.label));
                    files::save(&c.design, &p).map_err(|e| e.to_string())?;
                }
            }
            Ok(())
        }
    }
}
