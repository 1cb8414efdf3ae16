//! `tourwright compare FILE`: the tour against the best direct transfer in the launch period.

use std::fmt::Write as _;
use std::path::Path;

use serde_json::json;
use tourwright_mission::report;
use tourwright_search::Progress;
use tourwright_search::direct::{self, DirectComparison, DirectOptions};

use tourwright_mission::design::EphemerisChoice;

use super::{CliResult, ObjectiveArg, load_with};

/// Run `compare`.
pub fn run(
    file: &Path,
    ephemeris: Option<EphemerisChoice>,
    measure: Option<ObjectiveArg>,
    window_days: f64,
    json: bool,
) -> CliResult {
    let d = load_with(file, ephemeris)?;
    let mut o = DirectOptions::for_design(&d);
    if !(window_days.is_finite() && window_days > 0.0 && window_days <= 3650.0) {
        return Err("--window-days must be between 0 and 3650".into());
    }
    o.window_days = window_days;
    if let Some(m) = measure {
        o.measure = m.into();
    }
    if o.measure.needs_vehicle() && d.launch_vehicle.is_none() {
        return Err("--measure mass needs a launch vehicle in the design".into());
    }
    let c = direct::compare(&d, &o, &Progress::new())
        .ok_or("no direct transfer found in the launch period")?;
    if json {
        let v = json!({
            "measure": c.measure.label(),
            "tour": report::to_json(&c.tour, &c.tour_eval),
            "direct": report::to_json(&c.direct_tour, &c.direct_eval),
            "hohmann": {
                "vinf_depart_km_s": c.hohmann.vinf_depart,
                "vinf_arrive_km_s": c.hohmann.vinf_arrive,
                "tof_days": c.hohmann.tof_days,
            },
            "summary": c.summary(),
            "direct_breaks_launch_limits": c.limits_note(),
        });
        super::out(&serde_json::to_string_pretty(&v).map_err(|e| e.to_string())?);
    } else {
        super::out(&compare_text(&c));
    }
    Ok(())
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
