//! `tourwright eval FILE [--json]`: the event table, launch and arrival, the ledger, warnings;
//! and, when the design asks for a launch period (`launch_period` in its file), the period's
//! table and summary (the search crate runs it; the mission crate knows nothing of search).

use std::path::PathBuf;

use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::report::{self, EvalReport};
use tourwright_search::period::PeriodReport;

use super::progress::interrupted;
use super::{
    CliError, CliResult, EXIT_INTERRUPTED, EphemerisArg, load_with, out, out_json, prepare,
};

/// The arguments of `eval`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Design file (- for standard input).
    pub file: PathBuf,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Machine-readable JSON instead of text.
    #[arg(long)]
    pub json: bool,
}

/// `eval --json` of a design that asks for a launch period: the evaluation's fields, then the
/// period's.
#[derive(serde::Serialize)]
struct EvalWithPeriod {
    #[serde(flatten)]
    eval: EvalReport,
    launch_period: PeriodReport,
}

/// Run `eval`.
pub fn run(a: Args) -> CliResult {
    let d = load_with(&a.file, &a.eph)?;
    let tour = prepare(&a.file, &d)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    // A period that cannot run (a day outside the ephemeris range) still leaves the evaluation
    // printed; its reason ends the command.
    let (period, period_error) = match d.launch_period {
        Some(_) => match super::period::options(&d, None, None, false, None, 1)
            .and_then(|o| super::period::compute(&d, &o, &a.file))
        {
            Ok(p) => (Some(p), None),
            Err(e) => (None, Some(e)),
        },
        None => (None, None),
    };
    if a.json {
        match &period {
            Some(p) => out_json(&EvalWithPeriod {
                eval: report::eval_report(&tour, &e),
                launch_period: p.report(),
            })?,
            None => out_json(&report::eval_report(&tour, &e))?,
        }
    } else {
        out(&report::to_text(&tour, &e));
        if let Some(p) = &period {
            let mut s = String::from("\nLaunch period\n");
            s.push_str(&p.table().select(&super::period::TEXT_COLUMNS).to_text());
            for day in p.days.iter().filter(|d| !d.meets_every_limit()) {
                s.push_str(&format!(
                    "day {:+} ({}) breaks: {}\n",
                    day.offset,
                    day.launch.to_date_utc(),
                    day.broken_limits().join("; ")
                ));
            }
            for l in p.summary_lines() {
                s.push_str(&l);
                s.push('\n');
            }
            out(&s);
        }
    }
    if let Some(e) = period_error {
        return Err(e);
    }
    if period.is_some() && interrupted() {
        return Err(CliError::status(EXIT_INTERRUPTED));
    }
    Ok(())
}
