//! `tourwright compare FILE`: the tour against the best direct transfer in the launch period.

use std::fmt::Write as _;
use std::path::PathBuf;

use tourwright_mission::report::{self, EvalReport};
use tourwright_search::Progress;
use tourwright_search::direct::{self, DirectComparison, DirectOptions};

use super::progress::{interrupted, watch};
use super::{
    CliError, CliResult, EXIT_INTERRUPTED, EphemerisArg, ObjectiveArg, load_with, out, out_json,
};

/// The arguments of `compare`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Design file (- for standard input).
    pub file: PathBuf,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Ranking measure (default: mass when the design has a launch vehicle, else dv).
    #[arg(long, value_enum)]
    pub measure: Option<ObjectiveArg>,
    /// Half-width of the launch period around the tour's launch, days.
    #[arg(long, default_value_t = 365.25)]
    pub window_days: f64,
    /// Machine-readable JSON instead of text.
    #[arg(long)]
    pub json: bool,
}

/// The Hohmann figures of `compare --json`.
#[derive(serde::Serialize)]
struct HohmannReport {
    vinf_depart_km_s: f64,
    vinf_arrive_km_s: f64,
    tof_days: f64,
}

/// `compare --json`.
#[derive(serde::Serialize)]
struct CompareReport {
    measure: &'static str,
    tour: EvalReport,
    direct: EvalReport,
    hohmann: HohmannReport,
    summary: String,
    direct_breaks_launch_limits: Option<String>,
}

/// Run `compare`.
pub fn run(a: Args) -> CliResult {
    let d = load_with(&a.file, &a.eph)?;
    let mut o = DirectOptions::for_design(&d);
    if !(a.window_days.is_finite() && a.window_days > 0.0 && a.window_days <= 3650.0) {
        return Err("--window-days must be between 0 and 3650".into());
    }
    o.window_days = a.window_days;
    if let Some(m) = a.measure {
        o.measure = m.into();
    }
    if o.measure.needs_vehicle() && d.launch_vehicle.is_none() {
        return Err("--measure mass needs a launch vehicle in the design".into());
    }
    let p = Progress::new();
    let w = watch(&p, "direct transfers");
    let c = direct::compare(&d, &o, &p);
    drop(w);
    if interrupted() {
        out("interrupted: the direct-transfer search was stopped");
        return Err(CliError::status(EXIT_INTERRUPTED));
    }
    let c = c.ok_or("no direct transfer found in the launch period")?;
    if a.json {
        out_json(&CompareReport {
            measure: c.measure.label(),
            tour: report::eval_report(&c.tour, &c.tour_eval),
            direct: report::eval_report(&c.direct_tour, &c.direct_eval),
            hohmann: HohmannReport {
                vinf_depart_km_s: c.hohmann.vinf_depart,
                vinf_arrive_km_s: c.hohmann.vinf_arrive,
                tof_days: c.hohmann.tof_days,
            },
            summary: c.summary(),
            direct_breaks_launch_limits: c.limits_note(),
        })
    } else {
        out(&compare_text(&c));
        Ok(())
    }
}

/// The direct-vs-assist comparison as text.
pub fn compare_text(c: &DirectComparison) -> String {
    let mut s = String::new();
    let (t, d) = (&c.tour_eval, &c.direct_eval);
    let _ = writeln!(s, "Direct vs assist (ranked by {})", c.measure.label());
    let _ = writeln!(
        s,
        "{:<28} {:>14} {:>14} {:>12}",
        "", "tour", "direct", "difference"
    );
    let row = |s: &mut String, name: &str, a: f64, b: f64, p: usize| {
        let _ = writeln!(s, "{name:<28} {a:>14.p$} {b:>14.p$} {:>+12.p$}", a - b);
    };
    let date = |e: &tourwright_mission::Evaluation| {
        e.stops
            .first()
            .map(|s| s.epoch.to_date_utc())
            .unwrap_or_default()
    };
    let _ = writeln!(s, "{:<28} {:>14} {:>14}", "launch (UTC)", date(t), date(d));
    row(
        &mut s,
        "time of flight (days)",
        t.total_tof_days(),
        d.total_tof_days(),
        1,
    );
    row(&mut s, "launch C3 (km²/s²)", t.launch.c3, d.launch.c3, 2);
    row(
        &mut s,
        "arrival v∞ (km/s)",
        t.arrival.vinf,
        d.arrival.vinf,
        3,
    );
    row(
        &mut s,
        "spacecraft Δv (km/s)",
        t.ledger.total_dv_km_s,
        d.ledger.total_dv_km_s,
        3,
    );
    row(
        &mut s,
        "launch v∞ + Δv (km/s)",
        t.launch.vinf + t.ledger.total_dv_km_s,
        d.launch.vinf + d.ledger.total_dv_km_s,
        3,
    );
    if let (Some(a), Some(b)) = (t.ledger.delivered_mass_kg, d.ledger.delivered_mass_kg) {
        row(&mut s, "delivered mass (kg)", a, b, 0);
    }
    let h = &c.hohmann;
    let _ = writeln!(
        s,
        "Hohmann (circular, coplanar): v∞ {:.3} km/s out, {:.3} km/s in, {:.1} days",
        h.vinf_depart, h.vinf_arrive, h.tof_days
    );
    if let Some(note) = c.limits_note() {
        let _ = writeln!(s, "{note}");
    }
    let _ = writeln!(s, "{}", c.summary());
    let _ = writeln!(s, "{}", tourwright_mission::CAUTION);
    s
}
