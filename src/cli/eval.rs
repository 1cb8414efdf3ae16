//! `tourwright eval FILE [--json]`: the event table, launch and arrival, the ledger, warnings.

use std::path::PathBuf;

use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::report;

use super::{CliResult, EphemerisArg, load_with, out, out_json, prepare};

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

/// Run `eval`.
pub fn run(a: Args) -> CliResult {
    let d = load_with(&a.file, &a.eph)?;
    let tour = prepare(&a.file, &d)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    if a.json {
        out_json(&report::eval_report(&tour, &e))
    } else {
        out(&report::to_text(&tour, &e));
        Ok(())
    }
}
