//! Exports: CSV tables (events, ledger, trajectory samples) and the trajectory as a CCSDS Orbit
//! Ephemeris Message (CCSDS 502.0-B-2, KVN text), centred on the Sun in the EME2000 frame (the
//! mean equator and equinox of J2000, a frame named by the standard), one segment per leg.

use std::fmt::Write as _;

use tourwright_astro::ephemeris::{ecliptic_to_equatorial, equatorial_to_ecliptic};
use tourwright_astro::time::Epoch;
use tourwright_astro::{State, Vec3};

use crate::design::MissionDesign;
use crate::evaluate::{Evaluation, StopKind};

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// The event table: one row per stop.
pub fn events_csv(d: &MissionDesign, e: &Evaluation) -> String {
    let mut out = String::from(
        "stop,kind,body,epoch_utc,mjd2000,vinf_in_km_s,vinf_out_km_s,periapsis_altitude_km,turn_deg,\
         powered_dv_km_s,b_t_km,b_r_km,aim_deg,speed_before_km_s,speed_after_km_s,energy_before_km2_s2,\
         energy_after_km2_s2,energy_gain_km2_s2,dv_km_s,mass_after_kg\n",
    );
    for (k, s) in e.stops.iter().enumerate() {
        let sw = s.swingby.unwrap_or_default();
        let is_sw = s.kind == StopKind::SwingBy;
        let opt = |x: f64| {
            if is_sw && x.is_finite() && x < 1e15 {
                format!("{x:.6}")
            } else {
                String::new()
            }
        };
        let _ = writeln!(
            out,
            "{},{},{},{},{:.6},{:.6},{:.6},{},{},{},{},{},{},{:.6},{:.6},{:.6},{:.6},{:.6},{:.6},{:.3}",
            k + 1,
            s.kind.label(),
            csv_field(&d.stops[k].body),
            s.epoch.to_iso_utc(),
            s.epoch.mjd2000(),
            s.vinf_in.norm(),
            s.vinf_out.norm(),
            opt(sw.altitude_km),
            opt(sw.turn_rad.to_degrees()),
            opt(sw.powered_dv_km_s),
            opt(sw.bplane.b_t),
            opt(sw.bplane.b_r),
            opt(sw.bplane.aim.to_degrees()),
            s.speed_before,
            s.speed_after,
            s.energy_before,
            s.energy_after,
            s.gain(),
            s.dv_km_s,
            s.mass_after_kg
        );
    }
    out
}

/// The ledger: each manoeuvre, then the totals.
pub fn ledger_csv(d: &MissionDesign, e: &Evaluation) -> String {
    let mut out = String::from("item,body,epoch_utc,dv_km_s,mass_after_kg\n");
    let _ = writeln!(
        out,
        "wet mass at launch,{},{},0,{:.3}",
        csv_field(&d.stops[0].body),
        e.stops[0].epoch.to_iso_utc(),
        e.ledger.wet_mass_kg
    );
    for (k, s) in e.stops.iter().enumerate().skip(1) {
        if s.dv_km_s > 0.0 {
            let what = if s.kind == StopKind::Arrival {
                "arrival manoeuvre"
            } else {
                "powered swing-by"
            };
            let _ = writeln!(
                out,
                "{what},{},{},{:.6},{:.3}",
                csv_field(&d.stops[k].body),
                s.epoch.to_iso_utc(),
                s.dv_km_s,
                s.mass_after_kg
            );
        }
    }
    let l = &e.ledger;
    let _ = writeln!(
        out,
        "total dv,,,{:.6},{:.3}",
        l.total_dv_km_s, l.final_mass_kg
    );
    let _ = writeln!(
        out,
        "propellant needed (kg),,,,{:.3}",
        l.propellant_needed_kg
    );
    let _ = writeln!(
        out,
        "propellant margin (kg),,,,{:.3}",
        l.propellant_margin_kg
    );
    if let Some(m) = l.lv_margin_kg {
        let _ = writeln!(out, "launch vehicle margin (kg),,,,{m:.3}");
    }
    if let Some(m) = l.delivered_mass_kg {
        let _ = writeln!(out, "delivered mass with the launch vehicle (kg),,,,{m:.3}");
    }
    out
}

/// Trajectory samples, heliocentric ecliptic J2000.
pub fn samples_csv(e: &Evaluation) -> String {
    let mut out =
        String::from("leg,epoch_utc,tdb_days_since_j2000,x_km,y_km,z_km,vx_km_s,vy_km_s,vz_km_s\n");
    for (k, leg) in e.legs.iter().enumerate() {
        for s in &e.samples[leg.samples.clone()] {
            let (r, v) = (s.state.r, s.state.v);
            let _ = writeln!(
                out,
                "{},{},{:.9},{:.3},{:.3},{:.3},{:.9},{:.9},{:.9}",
                k + 1,
                s.t.to_iso_utc(),
                s.t.days(),
                r.x,
                r.y,
                r.z,
                v.x,
                v.y,
                v.z
            );
        }
    }
    out
}

fn oem_time(t: Epoch) -> String {
    let (y, mo, d, h, mi, s) = t.to_tdb_calendar();
    format!("{y:04}-{mo:02}-{d:02}T{h:02}:{mi:02}:{s:06.3}")
}

/// The trajectory as a CCSDS OEM (KVN), version 2.0, time system TDB, one segment per leg.
/// `creation` is the CREATION_DATE written in the header (UTC).
pub fn oem(d: &MissionDesign, e: &Evaluation, creation: Epoch) -> String {
    let mut out = String::new();
    let object = if d.spacecraft.name.is_empty() {
        d.name.as_str()
    } else {
        d.spacecraft.name.as_str()
    };
    let _ = writeln!(out, "CCSDS_OEM_VERS = 2.0");
    let _ = writeln!(
        out,
        "COMMENT Tourwright {} patched-conic trajectory of design \"{}\"",
        crate::VERSION,
        d.name
    );
    let _ = writeln!(
        out,
        "COMMENT Preliminary design only: confirm in high-fidelity tools."
    );
    let (y, mo, dd, h, mi, s) = creation.to_utc();
    let _ = writeln!(
        out,
        "CREATION_DATE = {y:04}-{mo:02}-{dd:02}T{h:02}:{mi:02}:{:02}",
        s.floor() as u32
    );
    let _ = writeln!(out, "ORIGINATOR = TOURWRIGHT");
    for (k, leg) in e.legs.iter().enumerate() {
        let pts = &e.samples[leg.samples.clone()];
        if pts.is_empty() {
            continue;
        }
        let _ = writeln!(out);
        let _ = writeln!(out, "META_START");
        let _ = writeln!(out, "OBJECT_NAME = {}", object.replace(['\n', '='], " "));
        let _ = writeln!(out, "OBJECT_ID = {}", d.sequence_label());
        let _ = writeln!(out, "CENTER_NAME = SUN");
        let _ = writeln!(out, "REF_FRAME = EME2000");
        let _ = writeln!(out, "TIME_SYSTEM = TDB");
        let _ = writeln!(out, "START_TIME = {}", oem_time(pts[0].t));
        let _ = writeln!(out, "STOP_TIME = {}", oem_time(pts[pts.len() - 1].t));
        let _ = writeln!(out, "INTERPOLATION = HERMITE");
        let _ = writeln!(out, "INTERPOLATION_DEGREE = 5");
        let _ = writeln!(out, "META_STOP");
        let _ = writeln!(
            out,
            "COMMENT Leg {} of {}: {} to {}",
            k + 1,
            e.legs.len(),
            d.stops[k].body,
            d.stops[k + 1].body
        );
        for p in pts {
            let r = ecliptic_to_equatorial(&p.state.r);
            let v = ecliptic_to_equatorial(&p.state.v);
            let _ = writeln!(
                out,
                "{} {:.6} {:.6} {:.6} {:.9} {:.9} {:.9}",
                oem_time(p.t),
                r.x,
                r.y,
                r.z,
                v.x,
                v.y,
                v.z
            );
        }
    }
    out
}

/// Keyword = value pairs in file order.
pub type KeyValues = Vec<(String, String)>;

/// One segment of an OEM read back.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct OemSegment {
    /// Metadata keywords and values in order.
    pub meta: Vec<(String, String)>,
    /// States (epoch, ecliptic J2000 state).
    pub states: Vec<(Epoch, State)>,
}

/// A minimal OEM (KVN) reader for the files written above: header keywords, segments, states.
/// States are returned rotated back to ecliptic J2000.
pub fn read_oem(text: &str) -> Result<(KeyValues, Vec<OemSegment>), String> {
    let mut header = Vec::new();
    let mut segs: Vec<OemSegment> = Vec::new();
    let mut in_meta = false;
    for (i, raw) in text.lines().enumerate() {
        let line = raw.trim();
        if line.is_empty() || line.starts_with("COMMENT") {
            continue;
        }
        let err = |m: &str| format!("line {}: {m}", i + 1);
        if line == "META_START" {
            in_meta = true;
            segs.push(OemSegment::default());
            continue;
        }
        if line == "META_STOP" {
            in_meta = false;
            continue;
        }
        if let Some((k, v)) = line.split_once('=') {
            let kv = (k.trim().to_string(), v.trim().to_string());
            if in_meta {
                segs.last_mut()
                    .ok_or_else(|| err("metadata outside a segment"))?
                    .meta
                    .push(kv);
            } else if segs.is_empty() {
                header.push(kv);
            } else {
                return Err(err("keyword in a data section"));
            }
            continue;
        }
        let seg = segs
            .last_mut()
            .ok_or_else(|| err("data before any segment"))?;
        let f: Vec<&str> = line.split_whitespace().collect();
        if f.len() != 7 {
            return Err(err("a state line needs an epoch and six numbers"));
        }
        let t = Epoch::parse(&format!("{} TDB", f[0])).map_err(|e| err(&e.to_string()))?;
        let mut n = [0.0; 6];
        for (j, x) in f[1..].iter().enumerate() {
            n[j] = x.parse().map_err(|_| err("not a number"))?;
        }
        let r = equatorial_to_ecliptic(&Vec3::new(n[0], n[1], n[2]));
        let v = equatorial_to_ecliptic(&Vec3::new(n[3], n[4], n[5]));
        seg.states.push((t, State { r, v }));
    }
    Ok((header, segs))
}

/// The current time as an epoch (for file headers).
pub fn now() -> Epoch {
    let s = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_secs_f64())
        .unwrap_or(0.0);
    // Unix time counts UTC days of 86 400 s from 1970-01-01 (MJD 40587).
    let days = s / 86_400.0;
    let mjd = 40_587.0 + days;
    let (y, m, d) = tourwright_astro::time::calendar_from_mjd(mjd.floor() as i32);
    let sec = (mjd - mjd.floor()) * 86_400.0;
    Epoch::from_utc(y, m, d, 0, 0, 0.0).plus_days(sec / 86_400.0)
}
