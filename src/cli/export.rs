//! `tourwright export FILE --csv/--ledger/--samples/--oem`: tables and the trajectory as files.

use std::path::{Path, PathBuf};

use tourwright_astro::time::Epoch;
use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::export;

use super::{CliResult, load, prepare, write};

/// Run `export`.
pub fn run(
    file: &Path,
    csv: Option<PathBuf>,
    ledger: Option<PathBuf>,
    samples: Option<PathBuf>,
    oem: Option<PathBuf>,
) -> CliResult {
    if csv.is_none() && ledger.is_none() && samples.is_none() && oem.is_none() {
        return Err("export needs at least one of --csv, --ledger, --samples, --oem".into());
    }
    let d = load(file)?;
    let tour = prepare(file, &d)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    if let Some(p) = csv {
        write(&p, &export::events_csv(&tour, &e))?;
    }
    if let Some(p) = ledger {
        write(&p, &export::ledger_csv(&tour, &e))?;
    }
    if let Some(p) = samples {
        write(&p, &export::samples_csv(&e))?;
    }
    if let Some(p) = oem {
        if !e.complete {
            return Err("the design has legs with no solution; nothing to export".into());
        }
        write(&p, &export::oem(&tour, &e, Epoch::now()))?;
    }
    Ok(())
}
