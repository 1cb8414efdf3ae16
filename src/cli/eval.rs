//! `tourwright eval FILE [--json]`: the event table, launch and arrival, the ledger, warnings.

use std::path::Path;

use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::report;

use tourwright_mission::design::EphemerisChoice;

use super::{CliResult, load_with, prepare};

/// Run `eval`.
pub fn run(file: &Path, ephemeris: Option<EphemerisChoice>, json: bool) -> CliResult {
    let d = load_with(file, ephemeris)?;
    let tour = prepare(file, &d)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    if json {
        let v = report::to_json(&tour, &e);
        super::out(&serde_json::to_string_pretty(&v).map_err(|e| e.to_string())?);
    } else {
        super::out(&report::to_text(&tour, &e));
    }
    Ok(())
}
