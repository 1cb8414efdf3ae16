//! `tourwright eval FILE [--json]`: the event table, launch and arrival, the ledger, warnings.

use std::path::Path;

use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::report;

use super::{CliResult, load, prepare};

/// Run `eval`.
pub fn run(file: &Path, json: bool) -> CliResult {
    let d = load(file)?;
    let tour = prepare(file, &d)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    if json {
        let v = report::to_json(&tour, &e);
        println!(
            "{}",
            serde_json::to_string_pretty(&v).map_err(|e| e.to_string())?
        );
    } else {
        print!("{}", report::to_text(&tour, &e));
    }
    Ok(())
}
