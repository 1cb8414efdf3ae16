//! `tourwright export FILE --csv/--ledger/--samples/--oem/--period`: tables, the trajectory and
//! the launch period as files (`-` for standard output). An export never replaces its input or
//! any file holding a design.

use std::path::PathBuf;

use tourwright_astro::time::Epoch;
use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::export;

use super::{
    CliError, CliResult, EXIT_INTERRUPTED, EphemerisArg, Writes, check_output, claim_stdout,
    load_with, prepare, write,
};

/// The arguments of `export`.
#[derive(clap::Args, Debug)]
#[command(group(clap::ArgGroup::new("what").required(true).multiple(true)
    .args(["csv", "ledger", "samples", "oem", "period"])))]
pub struct Args {
    /// Design file (- for standard input).
    pub file: PathBuf,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Event table as CSV (- for standard output).
    #[arg(long)]
    pub csv: Option<PathBuf>,
    /// Ledger as CSV.
    #[arg(long)]
    pub ledger: Option<PathBuf>,
    /// Trajectory samples as CSV.
    #[arg(long)]
    pub samples: Option<PathBuf>,
    /// Trajectory as a CCSDS OEM (KVN).
    #[arg(long)]
    pub oem: Option<PathBuf>,
    /// The launch period's table as CSV: the design's `launch_period` (21 days, one day apart,
    /// when it asks for none), one row per day.
    #[arg(long)]
    pub period: Option<PathBuf>,
}

/// Run `export`.
pub fn run(a: Args) -> CliResult {
    let outputs = [
        (a.csv.as_deref(), "--csv"),
        (a.ledger.as_deref(), "--ledger"),
        (a.samples.as_deref(), "--samples"),
        (a.oem.as_deref(), "--oem"),
        (a.period.as_deref(), "--period"),
    ];
    claim_stdout(&outputs.map(|o| o.0))?;
    for (p, flag) in outputs {
        if let Some(p) = p {
            check_output(p, &[&a.file], Writes::Data, flag)?;
        }
    }
    let d = load_with(&a.file, &a.eph)?;
    let tour = prepare(&a.file, &d)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    if a.oem.is_some() && !e.complete {
        return Err("the design has legs with no solution; no trajectory to export".into());
    }
    if let (Some(_), Some(u)) = (&a.oem, e.first_unreached()) {
        return Err(format!(
            "stop {} is not reached (the shaped swing-by before it misses it); the trajectory \
             after the miss is never flown — retarget that swing-by, then export",
            u + 1
        )
        .into());
    }
    if let Some(p) = &a.csv {
        write(p, &export::events_csv(&tour, &e))?;
    }
    if let Some(p) = &a.ledger {
        write(p, &export::ledger_csv(&tour, &e))?;
    }
    if let Some(p) = &a.samples {
        write(p, &export::samples_csv(&e))?;
    }
    if let Some(p) = &a.oem {
        write(p, &export::oem(&tour, &e, Epoch::now()))?;
    }
    if let Some(p) = &a.period {
        let o = super::period::options(&d, None, None, false, None, 1)?;
        let r = super::period::compute(&d, &o, &a.file)?;
        if super::progress::interrupted() || r.cancelled {
            return Err(CliError {
                message: "interrupted: the launch period was not written".into(),
                status: EXIT_INTERRUPTED,
            });
        }
        write(p, &r.to_csv())?;
    }
    Ok(())
}
