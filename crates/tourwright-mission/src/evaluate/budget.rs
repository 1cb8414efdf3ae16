//! Launch and arrival figures, heliocentric energies along the tour, and the Δv and mass ledger.

use super::{Evaluation, FlownPart, Ledger, Warning};
use crate::arrival::arrival_dv;
use crate::launch;
use crate::tour::PreparedTour;

/// C3, launch asymptote, launch limits and the launch vehicle's injected mass.
pub fn launch(tour: &PreparedTour, out: &mut Evaluation) {
    let v = out.stops[0].vinf_out;
    out.launch.c3 = launch::c3(&v);
    out.launch.vinf = v.norm();
    let (dla, rla) = launch::dla_rla_deg(&v);
    out.launch.dla_deg = dla;
    out.launch.rla_deg = rla;
    if let Some(max) = tour.launch.max_c3_km2_s2 {
        if out.launch.c3 > max {
            out.warnings.push(Warning::C3OverLimit {
                c3: out.launch.c3,
                max,
            });
        }
    }
    let lo = tour.launch.min_dla_deg.unwrap_or(-90.0);
    let hi = tour.launch.max_dla_deg.unwrap_or(90.0);
    if dla < lo || dla > hi {
        out.warnings.push(Warning::DlaOutOfRange {
            dla,
            min: lo,
            max: hi,
        });
    }
    if let Some(lv) = &tour.vehicle {
        if let Some((m, inside)) = launch::injected_mass(lv, out.launch.c3) {
            out.launch.injected_mass_kg = Some(m);
            if !inside {
                let p = &lv.performance;
                out.warnings.push(Warning::OutsideLvTable {
                    c3: out.launch.c3,
                    min: p.first().map_or(0.0, |x| x.c3_km2_s2),
                    max: p.last().map_or(0.0, |x| x.c3_km2_s2),
                });
            }
        }
    }
}

/// The total time of flight against the design's limit.
pub fn tof_limit(tour: &PreparedTour, out: &mut Evaluation) {
    if let Some(max) = tour.max_total_tof_days {
        let tof = out.total_tof_days();
        if tof > max + crate::rules::TOF_TOLERANCE_DAYS {
            out.warnings.push(Warning::TofOverLimit {
                tof_days: tof,
                max_days: max,
            });
        }
    }
}

/// Arrival v∞ and the goal's Δv.
pub fn arrival(tour: &PreparedTour, out: &mut Evaluation) {
    let last = tour.stops.len() - 1;
    out.arrival.vinf = out.stops[last].vinf_in.norm();
    out.arrival.dv_km_s = arrival_dv(
        &tour.arrival,
        out.arrival.vinf,
        tour.stops[last].body.data.mu,
    );
    out.stops[last].dv_km_s = out.arrival.dv_km_s;
}

/// Heliocentric speed and specific energy before and after each stop (at the body's position:
/// patched conics treat every stop as instantaneous there).
pub fn energies(mu_sun: f64, out: &mut Evaluation) {
    let n = out.stops.len();
    for (k, s) in out.stops.iter_mut().enumerate() {
        let r = s.body_state.r.norm();
        let vin = if k == 0 { s.v_helio_out } else { s.v_helio_in };
        let vout = if k == n - 1 {
            s.v_helio_in
        } else {
            s.v_helio_out
        };
        s.speed_before = vin.norm();
        s.speed_after = vout.norm();
        s.energy_before = 0.5 * vin.norm_squared() - mu_sun / r;
        s.energy_after = 0.5 * vout.norm_squared() - mu_sun / r;
    }
}

/// The Δv total, masses after each manoeuvre (rocket equation), propellant and vehicle margins.
/// When a shaped swing-by misses its next body, the flown part's budget too; the propellant is
/// then judged on the flown part (the rest is never flown).
pub fn ledger(tour: &PreparedTour, out: &mut Evaluation) {
    let sc = &tour.spacecraft;
    let wet = sc.dry_mass_kg + sc.propellant_kg;
    let unreached = out.first_unreached();
    let mut m = wet;
    let mut ratio_total = 1.0;
    let mut total_dv = 0.0;
    let mut flown = None;
    // In time order: each stop's manoeuvre, then the manoeuvre on the leg that leaves it.
    for (k, s) in out.stops.iter_mut().enumerate() {
        if unreached == Some(k) {
            flown = Some(FlownPart {
                first_unreached: k,
                dv_km_s: total_dv,
                propellant_needed_kg: wet - m,
                propellant_margin_kg: sc.propellant_kg - (wet - m),
                mass_kg: m,
            });
        }
        let r = launch::mass_ratio(s.dv_km_s, sc.isp_s);
        m *= r;
        ratio_total *= r;
        total_dv += s.dv_km_s;
        s.mass_after_kg = m;
        if let Some(d) = out.legs.get_mut(k).and_then(|l| l.dsm.as_mut()) {
            let r = launch::mass_ratio(d.dv_km_s, sc.isp_s);
            m *= r;
            ratio_total *= r;
            total_dv += d.dv_km_s;
            d.mass_after_kg = m;
        }
    }
    let needed = wet - m;
    out.ledger = Ledger {
        total_dv_km_s: total_dv,
        wet_mass_kg: wet,
        propellant_needed_kg: needed,
        propellant_margin_kg: sc.propellant_kg - needed,
        final_mass_kg: m,
        lv_margin_kg: out.launch.injected_mass_kg.map(|c| c - wet),
        delivered_mass_kg: out.launch.injected_mass_kg.map(|c| c * ratio_total),
        flown,
    };
    let judged = flown.map_or(needed, |f| f.propellant_needed_kg);
    if judged > sc.propellant_kg + 1e-9 {
        out.warnings.push(Warning::PropellantShort {
            needed_kg: judged,
            loaded_kg: sc.propellant_kg,
        });
    }
    if let Some(c) = out.launch.injected_mass_kg {
        if c < wet {
            out.warnings.push(Warning::LvCapacityShort {
                capacity_kg: c,
                wet_kg: wet,
            });
        }
    }
}

/// The last line of defence: any figure that is not finite is zeroed (or dropped when optional),
/// the evaluation is marked incomplete and a warning names the figure. Valid designs never reach
/// this; hostile ones must not carry NaN into a table, a file or a search.
pub fn drop_non_finite(out: &mut Evaluation) {
    let mut bad: Option<&'static str> = None;
    let mut fix = |x: &mut f64, what: &'static str| {
        if !x.is_finite() {
            *x = 0.0;
            bad.get_or_insert(what);
        }
    };
    let fix_opt = |x: &mut Option<f64>, what: &'static str, bad: &mut Option<&'static str>| {
        if x.is_some_and(|v| !v.is_finite()) {
            *x = None;
            bad.get_or_insert(what);
        }
    };
    for s in out.stops.iter_mut() {
        for v in [
            &mut s.v_helio_in,
            &mut s.v_helio_out,
            &mut s.vinf_in,
            &mut s.vinf_out,
            &mut s.body_state.r,
            &mut s.body_state.v,
        ] {
            for c in v.iter_mut() {
                fix(c, "a velocity or position");
            }
        }
        fix(&mut s.energy_before, "a heliocentric energy");
        fix(&mut s.energy_after, "a heliocentric energy");
        fix(&mut s.speed_before, "a heliocentric speed");
        fix(&mut s.speed_after, "a heliocentric speed");
        fix(&mut s.dv_km_s, "a manoeuvre Δv");
        fix(&mut s.mass_after_kg, "a spacecraft mass");
        if let Some(sw) = s.swingby.as_mut() {
            fix(&mut sw.turn_rad, "a turn angle");
            fix(&mut sw.powered_dv_km_s, "a powered swing-by Δv");
            fix(&mut sw.planet_dv_km_s, "a swing-by velocity change");
            fix(&mut sw.min_altitude_km, "a minimum altitude");
        }
    }
    for l in out.legs.iter_mut() {
        fix(&mut l.tof_days, "a time of flight");
        if let Some(d) = l.dsm.as_mut() {
            for c in
                d.r.iter_mut()
                    .chain(d.v_before.iter_mut())
                    .chain(d.v_after.iter_mut())
                    .chain(d.dv.iter_mut())
            {
                fix(c, "a deep-space manoeuvre");
            }
            fix(&mut d.dv_km_s, "a deep-space manoeuvre Δv");
            fix(&mut d.fraction, "a deep-space manoeuvre's place");
            fix(&mut d.energy_before, "a heliocentric energy");
            fix(&mut d.energy_after, "a heliocentric energy");
            fix(&mut d.mass_after_kg, "a spacecraft mass");
        }
    }
    for smp in out.samples.iter_mut() {
        for c in smp.state.r.iter_mut().chain(smp.state.v.iter_mut()) {
            fix(c, "a trajectory sample");
        }
    }
    let l = &mut out.launch;
    fix(&mut l.c3, "the launch C3");
    fix(&mut l.vinf, "the launch v∞");
    fix(&mut l.dla_deg, "the launch declination");
    fix(&mut l.rla_deg, "the launch right ascension");
    fix(&mut out.arrival.vinf, "the arrival v∞");
    fix(&mut out.arrival.dv_km_s, "the arrival Δv");
    let g = &mut out.ledger;
    fix(&mut g.total_dv_km_s, "the total Δv");
    fix(&mut g.wet_mass_kg, "the wet mass");
    fix(&mut g.propellant_needed_kg, "the propellant needed");
    fix(&mut g.propellant_margin_kg, "the propellant margin");
    fix(&mut g.final_mass_kg, "the final mass");
    fix_opt(&mut l.injected_mass_kg, "the injected mass", &mut bad);
    fix_opt(&mut g.lv_margin_kg, "the launch-vehicle margin", &mut bad);
    fix_opt(&mut g.delivered_mass_kg, "the delivered mass", &mut bad);
    if let Some(what) = bad {
        out.complete = false;
        out.warnings.push(Warning::NotFinite { what });
    }
}
