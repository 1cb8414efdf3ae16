//! Swing-by figures: what is known from the incoming side (before the next leg is flown), then the
//! turn, the powered-swing-by impulse, the B-plane and the altitude check once both v∞ are known.

use tourwright_astro::Vec3;
use tourwright_astro::flyby;

use super::{Evaluation, SwingbyResult, Warning};
use crate::design::SwingbyMode;
use crate::rules;
use crate::tour::PreparedTour;

/// First half: the minimum altitude in force, the turn available there and, for a shaped
/// swing-by, the periapsis the designer set (the next leg reads it).
pub fn prepare(tour: &PreparedTour, k: usize, out: &mut Evaluation) {
    let stop = &tour.stops[k];
    let data = &stop.body.data;
    let vin = out.stops[k].vinf_in.norm();
    let mut sw = SwingbyResult {
        min_altitude_km: stop.min_altitude_km,
        ..Default::default()
    };
    let rp_min = data.radius_km + stop.min_altitude_km;
    if data.mu > 0.0 && vin > 0.0 && rp_min > 0.0 {
        sw.turn_available_rad = rules::shown(flyby::turn_angle(rp_min, vin, data.mu));
    }
    if let SwingbyMode::Shaped { altitude_km, .. } = stop.mode {
        sw.shaped = true;
        sw.altitude_km = rules::shown(altitude_km);
        sw.rp_km = rules::shown(data.radius_km + altitude_km);
    }
    out.stops[k].swingby = Some(sw);
}

/// Second half, with both v∞ known.
pub fn finish(tour: &PreparedTour, k: usize, out: &mut Evaluation) {
    let data = &tour.stops[k].body.data;
    let vin = out.stops[k].vinf_in;
    let vout = out.stops[k].vinf_out;
    let Some(mut sw) = out.stops[k].swingby else {
        return;
    };
    sw.planet_dv_km_s = (vout - vin).norm();
    sw.turn_rad = angle(&vin, &vout);
    if data.mu <= 0.0 {
        // A massless target: the whole velocity change is a manoeuvre.
        sw.powered_dv_km_s = sw.planet_dv_km_s;
        sw.rp_km = None;
        sw.altitude_km = None;
    } else if sw.shaped {
        if let Some(rp) = sw.rp_km.filter(|r| *r > 0.0) {
            let e = flyby::eccentricity(rp, vin.norm(), data.mu);
            sw.e_in = rules::shown(e);
            sw.e_out = sw.e_in;
            if vin.norm() > 0.0 {
                sw.bplane = Some(flyby::b_plane(&vin, &vout, rp, data.mu))
                    .filter(|b| b.b.is_finite() && b.aim.is_finite());
            }
        }
        sw.powered_dv_km_s = 0.0;
    } else {
        match flyby::powered_swingby(&vin, &vout, data.mu) {
            Some(p) if p.rp.is_finite() => {
                sw.rp_km = rules::shown(p.rp);
                sw.altitude_km = rules::shown(p.rp - data.radius_km);
                sw.powered_dv_km_s = p.dv;
                sw.e_in = rules::shown(p.e_in);
                sw.e_out = rules::shown(p.e_out);
                sw.bplane = Some(flyby::b_plane(&vin, &vout, p.rp, data.mu))
                    .filter(|b| b.b.is_finite() && b.aim.is_finite());
            }
            Some(p) => {
                // No turn needed: the periapsis is at infinity; only the magnitude change costs.
                sw.rp_km = None;
                sw.altitude_km = None;
                sw.powered_dv_km_s = p.dv;
            }
            None => {
                out.warnings.push(Warning::TurnImpossible { stop: k });
                sw.powered_dv_km_s = sw.planet_dv_km_s;
            }
        }
    }
    if let Some(alt) = sw.altitude_km {
        if rules::below_minimum(alt, sw.min_altitude_km) {
            out.warnings.push(Warning::AltitudeBelowMinimum {
                stop: k,
                altitude_km: alt,
                min_km: sw.min_altitude_km,
            });
        }
    }
    let stop = &tour.stops[k];
    let v = vin.norm();
    if v < stop.min_vinf_km_s - rules::SPEED_TOLERANCE_KM_S {
        out.warnings.push(Warning::VinfBelowMinimum {
            stop: k,
            vinf: v,
            min: stop.min_vinf_km_s,
        });
    }
    if sw.powered_dv_km_s > stop.max_powered_dv_km_s + rules::SPEED_TOLERANCE_KM_S {
        out.warnings.push(Warning::PoweredDvOverLimit {
            stop: k,
            dv: sw.powered_dv_km_s,
            max: stop.max_powered_dv_km_s,
        });
    }
    out.stops[k].dv_km_s = sw.powered_dv_km_s;
    out.stops[k].swingby = Some(sw);
}

fn angle(a: &Vec3, b: &Vec3) -> f64 {
    let d = a.norm() * b.norm();
    if d == 0.0 {
        0.0
    } else {
        (a.dot(b) / d).clamp(-1.0, 1.0).acos()
    }
}
