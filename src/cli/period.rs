//! `tourwright period FILE`: the design judged on a launch period. Each day's tour is
//! re-optimised with that day's launch held (and the arrival too with `--fixed-arrival`); the
//! table gives each day's figures as `eval` computes them for that day's design, the summary the
//! worst days and the margins that cover every day. Exit status 3 when some day breaks a limit
//! (everything is still printed and written), 130 after Ctrl-C (the days finished so far are
//! printed and written, marked).

use std::fmt::Write as _;
use std::path::{Path, PathBuf};

use tourwright_mission::MissionDesign;
use tourwright_mission::design::PeriodField;
use tourwright_search::Progress;
use tourwright_search::period::{self, PeriodOptions, PeriodResult};

use super::progress::{interrupted, watch};
use super::{
    CliError, CliResult, EXIT_INTERRUPTED, EXIT_NO_FEASIBLE, EphemerisArg, Writes, check_output,
    claim_stdout, load_with, out, out_json, save_design, write,
};

/// The arguments of `period`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Design file (- for standard input). Its launch date is the centre of the period.
    pub file: PathBuf,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Launch opportunities, centred on the design's launch (default: the design's
    /// launch_period, else 21).
    #[arg(long)]
    pub days: Option<u32>,
    /// Days between opportunities (default: the design's launch_period, else 1).
    #[arg(long, allow_negative_numbers = true)]
    pub step: Option<f64>,
    /// Hold the arrival at the design's arrival date on every day (default: the design's
    /// launch_period, else free).
    #[arg(long)]
    pub fixed_arrival: bool,
    /// Evaluation budget of each day's search, a hard cap (default 150 000).
    #[arg(long)]
    pub evals_per_day: Option<u64>,
    /// Seed (the same seed and budget give the same period).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Write the table as CSV (- for standard output).
    #[arg(long)]
    pub csv: Option<PathBuf>,
    /// Write one day's design: its offset from the design's launch in steps (0 is the design's
    /// own launch, -3 three steps earlier); needs --out.
    #[arg(long, requires = "out", allow_negative_numbers = true)]
    pub day: Option<i64>,
    /// Where --day's design goes (- for standard output; never the input file).
    #[arg(long, requires = "day")]
    pub out: Option<PathBuf>,
    /// Write every day's design into this folder as day-10.tour.ron ... day+10.tour.ron.
    #[arg(long)]
    pub out_dir: Option<PathBuf>,
    /// Machine-readable JSON instead of text.
    #[arg(long)]
    pub json: bool,
}

/// The period's options from the design and the command line, checked with the design file's
/// rule (the messages name the flags).
pub(super) fn options(
    d: &MissionDesign,
    days: Option<u32>,
    step: Option<f64>,
    fixed_arrival: bool,
    evals_per_day: Option<u64>,
    seed: u64,
) -> Result<PeriodOptions, CliError> {
    let mut o = PeriodOptions::for_design(d);
    if let Some(n) = days {
        o.days = n;
    }
    if let Some(s) = step {
        o.step_days = s;
    }
    o.fixed_arrival |= fixed_arrival;
    if let Some(n) = evals_per_day {
        if n == 0 {
            return Err("--evals-per-day wants at least 1".into());
        }
        o.evals_per_day = n;
    }
    o.seed = seed;
    o.request().check().map_err(|(f, reason)| {
        let flag = match f {
            PeriodField::Days => "--days",
            PeriodField::Step => "--step",
        };
        CliError::from(format!("{flag}: {reason}"))
    })?;
    Ok(o)
}

/// Run the period with a progress bar; Ctrl-C keeps the days finished.
pub(super) fn compute(
    d: &MissionDesign,
    o: &PeriodOptions,
    file: &Path,
) -> Result<PeriodResult, CliError> {
    let p = Progress::new();
    let w = watch(&p, "launch period");
    let r = period::run(d, o, &p).map_err(|e| format!("{}: {e}", file.display()));
    drop(w);
    Ok(r?)
}

/// The file name of a day's design in `--out-dir`.
fn day_file(offset: i64) -> String {
    if offset == 0 {
        "day0.tour.ron".into()
    } else {
        format!("day{offset:+}.tour.ron")
    }
}

/// Run `period`.
pub fn run(a: Args) -> CliResult {
    claim_stdout(&[a.csv.as_deref(), a.out.as_deref()])?;
    if let Some(c) = &a.csv {
        check_output(c, &[&a.file], Writes::Data, "--csv")?;
    }
    if let Some(o) = &a.out {
        check_output(o, &[&a.file], Writes::Design { in_place: false }, "--out")?;
        if let Some(c) = &a.csv {
            if !super::is_dash(c) && (c == o || super::same_file(c, o)) {
                return Err("--csv and --out name the same file".into());
            }
        }
    }
    let d = load_with(&a.file, &a.eph)?;
    let o = options(&d, a.days, a.step, a.fixed_arrival, a.evals_per_day, a.seed)?;
    if let Some(k) = a.day {
        if !o.offsets().contains(&k) {
            let offs = o.offsets();
            return Err(format!(
                "--day {k} is not a day of the period (from {:+} to {:+})",
                offs.first().copied().unwrap_or(0),
                offs.last().copied().unwrap_or(0)
            )
            .into());
        }
    }
    if let Some(dir) = &a.out_dir {
        if dir.exists() && !dir.is_dir() {
            return Err(format!("--out-dir {} is not a folder", dir.display()).into());
        }
        for off in o.offsets() {
            check_output(
                &dir.join(day_file(off)),
                &[&a.file],
                Writes::Design { in_place: false },
                "--out-dir",
            )?;
        }
    }
    let t = std::time::Instant::now();
    let r = compute(&d, &o, &a.file)?;
    let stopped = interrupted() || r.cancelled;
    if let Some(c) = &a.csv {
        write(c, &r.to_csv())?;
    }
    if let (Some(k), Some(path)) = (a.day, &a.out) {
        match r.day(k) {
            Some(day) => {
                save_design(&day.design, path)?;
                if path != std::path::Path::new("-") {
                    // Confirmation on standard error: standard output may carry JSON or CSV.
                    eprintln!(
                        "wrote day {k:+} ({}) to {}",
                        day.launch.to_date_utc(),
                        path.display()
                    );
                }
            }
            None => out(&format!(
                "day {k:+} did not run (the period was interrupted); nothing written to {}",
                path.display()
            )),
        }
    }
    if let Some(dir) = &a.out_dir {
        std::fs::create_dir_all(dir).map_err(|e| format!("{}: {e}", dir.display()))?;
        for day in &r.days {
            save_design(&day.design, &dir.join(day_file(day.offset)))?;
        }
        eprintln!("wrote {} day designs to {}", r.days.len(), dir.display());
    }
    if a.json {
        out_json(&r.report())?;
    } else {
        let mut s = r.table().select(&TEXT_COLUMNS).to_text();
        s.push('\n');
        for day in r.days.iter().filter(|d| !d.meets_every_limit()) {
            let _ = writeln!(
                s,
                "day {:+} ({}) breaks: {}",
                day.offset,
                day.launch.to_date_utc(),
                day.broken_limits().join("; ")
            );
        }
        for day in r.days.iter().filter(|d| !d.jumps.is_empty()) {
            let _ = writeln!(
                s,
                "day {:+} ({}) changed family: {}",
                day.offset,
                day.launch.to_date_utc(),
                day.jumps
                    .iter()
                    .map(|j| j.to_string())
                    .collect::<Vec<_>>()
                    .join("; ")
            );
        }
        for l in r.summary_lines() {
            let _ = writeln!(s, "{l}");
        }
        let _ = writeln!(
            s,
            "{} evaluations ({} per day at most) in {:.2} s",
            r.evaluations,
            o.evals_per_day,
            t.elapsed().as_secs_f64()
        );
        let _ = write!(s, "{}", tourwright_mission::CAUTION);
        out(&s);
    }
    if stopped {
        if !a.json {
            out("interrupted: the days finished so far are shown (and written)");
        }
        Err(CliError::status(EXIT_INTERRUPTED))
    } else if r.every_day_meets_limits() {
        Ok(())
    } else {
        Err(CliError::status(EXIT_NO_FEASIBLE))
    }
}

/// The columns of the text table (the CSV and JSON carry every column): day, launch, C3, v∞,
/// DLA, RLA, encounters, TOF, Δv, arrival v∞, propellant, delivered mass, limits, family and note
/// (broken limits are listed under the table).
pub(super) const TEXT_COLUMNS: [usize; 15] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 11, 12, 14, 16, 17];
