//! `tourwright retarget FILE --stop K [--move-epoch] --out NEW`: make a shaped swing-by's
//! ballistic leg meet the next body again.

use std::path::Path;

use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::{files, report, retarget};

use tourwright_mission::design::EphemerisChoice;

use super::{CliResult, load_with, prepare};

/// Run `retarget`.
pub fn run(
    file: &Path,
    ephemeris: Option<EphemerisChoice>,
    stop: usize,
    move_epoch: bool,
    out: &Path,
) -> CliResult {
    let d = load_with(file, ephemeris)?;
    let k = stop.checked_sub(1).ok_or("--stop counts from 1")?;
    let r = retarget::retarget(&d, k, move_epoch).map_err(|e| e.to_string())?;
    files::save(&r.design, out).map_err(|e| e.to_string())?;
    super::out(&format!("miss distance now {:.1} km", r.miss_km));
    let tour = prepare(out, &r.design)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    super::out(&report::to_text(&tour, &e));
    Ok(())
}
