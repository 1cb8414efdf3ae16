//! `tourwright dsm FILE --leg K [--at F | --date D | --remove] --out NEW`: add, move or remove a
//! leg's deep-space manoeuvre, with the same edits the workbench uses.

use std::path::PathBuf;

use tourwright_astro::time::Epoch;
use tourwright_mission::Edit;
use tourwright_mission::design::DsmTime;
use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate, evaluate_design};
use tourwright_mission::report;

use super::{
    CliResult, EphemerisArg, Writes, check_output, claim_stdout, load_with, out, out_json, prepare,
    save_design,
};

/// The arguments of `dsm`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Design file (- for standard input).
    pub file: PathBuf,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Leg number (1-based: leg 1 runs from stop 1 to stop 2).
    #[arg(long)]
    pub leg: usize,
    /// Place the manoeuvre at this fraction of the leg's time of flight (0 < F < 1).
    #[arg(long, conflicts_with_all = ["date", "remove"])]
    pub at: Option<f64>,
    /// Place the manoeuvre on this date (inside the leg), e.g. 2031-05-01 or
    /// 2031-05-01T12:00:00 TDB.
    #[arg(long, conflicts_with = "remove")]
    pub date: Option<String>,
    /// Remove the leg's manoeuvre.
    #[arg(long)]
    pub remove: bool,
    /// Where to write the changed design (- for standard output; not the input file, unless
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

/// Run `dsm`.
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
    let mut d = load_with(&a.file, &a.eph)?;
    let leg = a.leg;
    let k = leg.checked_sub(1).ok_or("--leg counts from 1")?;
    if k + 1 >= d.stops.len() {
        return Err(format!("--leg {leg}: the design has {} legs", d.stops.len() - 1).into());
    }
    let fail = |e: tourwright_mission::EditError| format!("--leg {leg}: {e}");
    if a.remove {
        if d.leg(k).dsm.is_none() {
            return Err(format!("--leg {leg}: the leg has no manoeuvre to remove").into());
        }
        Edit::SetDsm { leg: k, dsm: None }
            .apply(&mut d)
            .map_err(fail)?;
    } else {
        if d.leg(k).dsm.is_none() {
            let (_, e) = evaluate_design(&d);
            Edit::add_dsm(&d, &e, k)
                .and_then(|edit| edit.apply(&mut d))
                .map_err(fail)?;
        }
        let mut m = d.leg(k).dsm.ok_or("the manoeuvre was not added")?;
        if let Some(f) = a.at {
            if !(f > 0.0 && f < 1.0) {
                return Err(
                    format!("--at {f}: the fraction must lie strictly between 0 and 1").into(),
                );
            }
            m.at = DsmTime::Fraction(f);
        }
        if let Some(text) = &a.date {
            let e = Epoch::parse(text).map_err(|e| format!("--date {text}: {e}"))?;
            let (x, y) = (d.stops[k].epoch.tdb().0, d.stops[k + 1].epoch.tdb().0);
            if !(e.tdb().0 > x && e.tdb().0 < y) {
                return Err(format!(
                    "--date {text}: not inside leg {leg} ({} .. {})",
                    d.stops[k].epoch.to_date_utc(),
                    d.stops[k + 1].epoch.to_date_utc()
                )
                .into());
            }
            m.at = DsmTime::Date(e);
        }
        Edit::SetDsm {
            leg: k,
            dsm: Some(m),
        }
        .apply(&mut d)
        .map_err(fail)?;
    }
    save_design(&d, &a.out)?;
    let tour = prepare(&a.out, &d)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    if a.json {
        return out_json(&report::eval_report(&tour, &e));
    }
    out(&report::to_text(&tour, &e));
    Ok(())
}
