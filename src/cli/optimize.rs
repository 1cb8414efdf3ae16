//! `tourwright optimize FILE --out NEW`: the date optimiser within the design's search bounds.
//! The design itself is the first candidate; the result is judged exactly as `eval` judges a
//! design. When no design meeting every limit is found, the first line says so and lists each
//! broken limit, the closest design is still written, and the exit status is 3. Ctrl-C stops the
//! search and writes the best design found so far (exit status 130).

use std::fmt::Write as _;
use std::path::PathBuf;

use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::report::{self, EvalReport};
use tourwright_mission::{Assessment, LimitSet};
use tourwright_search::Progress;
use tourwright_search::optimize::{self, OptimizeOptions};

use super::progress::{interrupted, watch};
use super::{
    CliError, CliResult, EXIT_INTERRUPTED, EXIT_NO_FEASIBLE, EphemerisArg, ObjectiveArg, Writes,
    check_output, claim_stdout, load_with, out, out_json, prepare, save_design, write,
};

/// The arguments of `optimize`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Design file (- for standard input).
    pub file: PathBuf,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Seed (the same seed and budget give the same answer).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Wall-clock limit, seconds (optional; results then depend on machine speed).
    #[arg(long)]
    pub time: Option<f64>,
    /// Evaluation budget, a hard cap (default 1 000 000; with --time and no --evals, the time
    /// alone). A larger budget never gives a worse answer for the same seed.
    #[arg(long)]
    pub evals: Option<u64>,
    /// Objective (default: the design's).
    #[arg(long, value_enum)]
    pub objective: Option<ObjectiveArg>,
    /// Where to write the result (- for standard output; not the input file, unless
    /// --in-place).
    #[arg(long)]
    pub out: PathBuf,
    /// Allow --out to name the input file and replace it.
    #[arg(long)]
    pub in_place: bool,
    /// Also write the TOF trade-off front as CSV (- for standard output).
    #[arg(long)]
    pub front: Option<PathBuf>,
    /// Machine-readable JSON instead of text.
    #[arg(long)]
    pub json: bool,
}

/// A design judged, for `optimize --json`.
#[derive(serde::Serialize)]
struct Judged {
    objective: &'static str,
    unit: &'static str,
    value: Option<f64>,
    meets_every_limit: bool,
    broken_limits: Vec<String>,
}

impl From<&Assessment> for Judged {
    fn from(a: &Assessment) -> Self {
        Judged {
            objective: a.objective.label(),
            unit: a.objective.unit(),
            value: a.score.is_finite().then(|| a.display_value()),
            meets_every_limit: a.feasible(),
            broken_limits: a.breach_lines(),
        }
    }
}

/// `optimize --json`.
#[derive(serde::Serialize)]
struct OptimizeReport {
    found_design_meeting_every_limit: bool,
    kept_start: bool,
    interrupted: bool,
    evaluations: u64,
    start: Judged,
    result: Judged,
    lines: Vec<String>,
    design: EvalReport,
}

/// Run `optimize`.
pub fn run(a: Args) -> CliResult {
    claim_stdout(&[Some(&a.out), a.front.as_deref()])?;
    check_output(
        &a.out,
        &[&a.file],
        Writes::Design {
            in_place: a.in_place,
        },
        "--out",
    )?;
    if let Some(f) = &a.front {
        check_output(f, &[&a.file, &a.out], Writes::Data, "--front")?;
    }
    let mut d = load_with(&a.file, &a.eph)?;
    if let Some(o) = a.objective {
        d.search.objective = o.into();
    }
    if d.search.objective.needs_vehicle() && d.launch_vehicle.is_none() {
        return Err("--objective mass needs a launch vehicle in the design".into());
    }
    if let Some(t) = a.time {
        if !(t.is_finite() && t > 0.0) {
            return Err("--time wants a positive number of seconds".into());
        }
    }
    let opts = OptimizeOptions {
        seed: a.seed,
        max_evals: a.evals.unwrap_or(if a.time.is_some() {
            u64::MAX
        } else {
            optimize::DEFAULT_EVALS
        }),
        time_limit_s: a.time,
        ..Default::default()
    };
    let t = std::time::Instant::now();
    let p = Progress::new();
    let w = watch(&p, "optimiser");
    let o = optimize::search_design(&d, &opts, LimitSet::ALL, &p, a.front.is_some())
        .map_err(|e| format!("{}: {e}", a.file.display()))?;
    drop(w);
    let stopped = interrupted();
    save_design(&o.design, &a.out)?;
    if let Some(fp) = &a.front {
        let obj = o.result.objective;
        let header = format!("{} ({})", obj.label(), obj.unit());
        let text = report::csv_text(
            &["total_tof_days", header.as_str()],
            o.front
                .iter()
                .map(|(tof, v)| vec![format!("{tof:.3}"), format!("{:.6}", obj.display_value(*v))]),
        );
        write(fp, &text)?;
    }
    let tour = prepare(&a.out, &o.design)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    let mut lines = o.lines();
    if stopped {
        lines.push(format!(
            "interrupted: the best design found so far was written to {}",
            a.out.display()
        ));
    }
    if a.json {
        out_json(&OptimizeReport {
            found_design_meeting_every_limit: o.feasible(),
            kept_start: o.kept_start,
            interrupted: stopped,
            evaluations: o.evaluations,
            start: (&o.start).into(),
            result: (&o.result).into(),
            lines,
            design: report::eval_report(&tour, &e),
        })?;
    } else {
        let mut s = String::new();
        for l in &lines {
            let _ = writeln!(s, "{l}");
        }
        let _ = writeln!(
            s,
            "{} evaluations in {:.2} s",
            o.evaluations,
            t.elapsed().as_secs_f64()
        );
        out(&s);
        out(&report::to_text(&tour, &e));
    }
    if stopped {
        Err(CliError::status(EXIT_INTERRUPTED))
    } else if o.feasible() {
        Ok(())
    } else {
        Err(CliError::status(EXIT_NO_FEASIBLE))
    }
}
