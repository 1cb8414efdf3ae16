//! `tourwright retarget FILE --stop K [--move-epoch] --out NEW`: make a shaped swing-by's
//! ballistic leg meet the next body again.

use std::path::PathBuf;

use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::report::{self, EvalReport};
use tourwright_mission::retarget;

use super::{
    CliResult, EphemerisArg, Writes, check_output, claim_stdout, load_with, out, out_json, prepare,
    save_design,
};

/// The arguments of `retarget`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Design file (- for standard input).
    pub file: PathBuf,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Stop number (1-based) of the shaped swing-by.
    #[arg(long)]
    pub stop: usize,
    /// Also move the next stop's epoch (and later ones by the same shift).
    #[arg(long)]
    pub move_epoch: bool,
    /// Where to write the adjusted design (- for standard output; not the input file, unless
    /// --in-place).
    #[arg(long)]
    pub out: PathBuf,
    /// Allow --out to name the input file and replace it.
    #[arg(long)]
    pub in_place: bool,
    /// Machine-readable JSON instead of text.
    #[arg(long)]
    pub json: bool,
}

/// `retarget --json`.
#[derive(serde::Serialize)]
struct RetargetReport {
    miss_km: f64,
    design: EvalReport,
}

/// Run `retarget`.
pub fn run(a: Args) -> CliResult {
    claim_stdout(&[Some(&a.out)])?;
    check_output(
        &a.out,
        &[&a.file],
        Writes::Design {
            in_place: a.in_place,
        },
        "--out",
    )?;
    let d = load_with(&a.file, &a.eph)?;
    let k = a.stop.checked_sub(1).ok_or("--stop counts from 1")?;
    let r = retarget::retarget(&d, k, a.move_epoch).map_err(|e| {
        let hint = if a.move_epoch {
            ""
        } else {
            "; --move-epoch lets the next stop's date move too"
        };
        format!("--stop {}: {e}{hint}", a.stop)
    })?;
    save_design(&r.design, &a.out)?;
    let tour = prepare(&a.out, &r.design)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    if a.json {
        return out_json(&RetargetReport {
            miss_km: r.miss_km,
            design: report::eval_report(&tour, &e),
        });
    }
    out(&format!("miss distance now {:.1} km", r.miss_km));
    out(&report::to_text(&tour, &e));
    Ok(())
}
