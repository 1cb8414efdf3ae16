//! `tourwright dsm FILE --leg K [--at F | --date D | --remove] --out NEW`: add, move or remove a
//! leg's deep-space manoeuvre, with the same edits the workbench uses.

use std::path::Path;

use tourwright_astro::time::Epoch;
use tourwright_mission::design::DsmTime;
use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate, evaluate_design};
use tourwright_mission::{Edit, files, report};

use super::{CliResult, load, prepare};

/// Run `dsm`.
pub fn run(
    file: &Path,
    leg: usize,
    at: Option<f64>,
    date: Option<&str>,
    remove: bool,
    out: &Path,
) -> CliResult {
    let mut d = load(file)?;
    let k = leg.checked_sub(1).ok_or("--leg counts from 1")?;
    if k + 1 >= d.stops.len() {
        return Err(format!("--leg {leg}: the design has {} legs", d.stops.len() - 1).into());
    }
    let fail = |e: tourwright_mission::EditError| format!("--leg {leg}: {e}");
    if remove {
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
        if let Some(f) = at {
            if !(f > 0.0 && f < 1.0) {
                return Err(
                    format!("--at {f}: the fraction must lie strictly between 0 and 1").into(),
                );
            }
            m.at = DsmTime::Fraction(f);
        }
        if let Some(text) = date {
            let e = Epoch::parse(text).map_err(|e| format!("--date {text}: {e}"))?;
            let (a, b) = (d.stops[k].epoch.tdb().0, d.stops[k + 1].epoch.tdb().0);
            if !(e.tdb().0 > a && e.tdb().0 < b) {
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
    files::save(&d, out).map_err(|e| e.to_string())?;
    let tour = prepare(out, &d)?;
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    super::out(&report::to_text(&tour, &e));
    Ok(())
}
