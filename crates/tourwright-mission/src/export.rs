//! Exports: CSV tables (events, ledger, trajectory samples) and the trajectory as a CCSDS Orbit
//! Ephemeris Message (CCSDS 502.0-B-2, KVN text), centred on the Sun in the EME2000 frame (the
//! mean equator and equinox of J2000, a frame named by the standard), one segment per leg.

use std::fmt::Write as _;

use tourwright_astro::ephemeris::{ecliptic_to_equatorial, equatorial_to_ecliptic};
use tourwright_astro::time::{Epoch, Tdb, TimeScale};
use tourwright_astro::{State, Vec3};

use crate::evaluate::Evaluation;
use crate::report;
use crate::tour::PreparedTour;

/// The event table as CSV (one row per stop).
pub fn events_csv(tour: &PreparedTour, e: &Evaluation) -> String {
    report::events(tour, e).to_csv()
}

/// The ledger as CSV (each manoeuvre, then the totals).
pub fn ledger_csv(tour: &PreparedTour, e: &Evaluation) -> String {
    report::ledger(tour, e).to_csv()
}

/// The pieces of each leg's samples: the whole leg, or the coast before its deep-space manoeuvre
/// and the arc after it. `(leg, piece, range)` with piece 1 or 2.
fn pieces(e: &Evaluation) -> Vec<(usize, usize, std::ops::Range<usize>)> {
    let mut v = Vec::new();
    for (k, leg) in e.legs.iter().enumerate() {
        let r = leg.samples.clone();
        match leg.dsm {
            Some(d) if d.split > r.start && d.split < r.end => {
                v.push((k, 1, r.start..d.split));
                v.push((k, 2, d.split..r.end));
            }
            _ => v.push((k, 1, r)),
        }
    }
    v
}

/// Trajectory samples, heliocentric ecliptic J2000. A leg with a deep-space manoeuvre has two
/// pieces (column `piece`): the coast, whose last point is the manoeuvre with the velocity
/// before it, and the arc, whose first point repeats it with the velocity after.
pub fn samples_csv(e: &Evaluation) -> String {
    let mut rows = Vec::with_capacity(e.samples.len());
    for (k, piece, range) in pieces(e) {
        for s in &e.samples[range] {
            let (r, v) = (s.state.r, s.state.v);
            rows.push(vec![
                (k + 1).to_string(),
                piece.to_string(),
                s.t.to_iso_utc(),
                format!("{:.9}", s.t.days()),
                format!("{:.3}", r.x),
                format!("{:.3}", r.y),
                format!("{:.3}", r.z),
                format!("{:.9}", v.x),
                format!("{:.9}", v.y),
                format!("{:.9}", v.z),
            ]);
        }
    }
    report::csv_text(
        &[
            "leg",
            "piece",
            "epoch_utc",
            "tdb_days_since_j2000",
            "x_km",
            "y_km",
            "z_km",
            "vx_km_s",
            "vy_km_s",
            "vz_km_s",
        ],
        rows,
    )
}

/// Tisserand-graph contours (and extra rows such as a design's arcs) as CSV: one row per point,
/// the contour's body and v∞ level on each.
pub fn tisserand_csv(
    contours: &[tourwright_astro::tisserand::Contour],
    extra: &[(String, f64, f64)],
) -> String {
    let mut rows: Vec<Vec<String>> = Vec::new();
    for c in contours {
        for p in &c.points {
            rows.push(vec![
                c.body.clone(),
                format!("{}", c.vinf_km_s),
                format!("{:.6}", p.pump_deg),
                format!("{:.9}", p.rp_au),
                format!("{:.9}", p.ra_au),
                format!("{:.6}", p.period_days),
            ]);
        }
    }
    for (label, rp, ra) in extra {
        rows.push(vec![
            label.clone(),
            String::new(),
            String::new(),
            format!("{rp:.9}"),
            format!("{ra:.9}"),
            String::new(),
        ]);
    }
    report::csv_text(
        &[
            "body",
            "vinf_km_s",
            "pump_deg",
            "rp_au",
            "ra_au",
            "period_days",
        ],
        rows,
    )
}

fn oem_time(t: Tdb) -> String {
    let c = t.epoch().calendar();
    format!(
        "{:04}-{:02}-{:02}T{:02}:{:02}:{:02}.{:06}",
        c.year,
        c.month,
        c.day,
        c.hour,
        c.minute,
        c.second,
        c.nanos / 1000
    )
}

/// One OEM segment: its comment and its states (heliocentric ecliptic J2000, time order).
struct Segment<'s> {
    comment: String,
    states: Vec<(Tdb, &'s State)>,
}

/// Write an OEM (KVN, version 2.0, TDB, Sun-centred EME2000) of `segments`.
fn oem_text(
    tour: &PreparedTour,
    what: &str,
    segments: &[Segment<'_>],
    extra_comments: &[String],
    creation: Epoch,
) -> String {
    let mut out = String::new();
    let object = if tour.spacecraft.name.is_empty() {
        tour.name.as_str()
    } else {
        tour.spacecraft.name.as_str()
    };
    let _ = writeln!(out, "CCSDS_OEM_VERS = 2.0");
    let _ = writeln!(
        out,
        "COMMENT Tourwright {} {what} of design \"{}\"",
        crate::VERSION,
        tour.name.replace(['\n', '"'], " ")
    );
    for c in extra_comments {
        let _ = writeln!(out, "COMMENT {}", c.replace('\n', " "));
    }
    let _ = writeln!(
        out,
        "COMMENT Preliminary design only: confirm in high-fidelity tools."
    );
    let c = creation.in_scale(TimeScale::Utc).calendar();
    let _ = writeln!(
        out,
        "CREATION_DATE = {:04}-{:02}-{:02}T{:02}:{:02}:{:02}",
        c.year,
        c.month,
        c.day,
        c.hour,
        c.minute,
        c.second.min(59)
    );
    let _ = writeln!(out, "ORIGINATOR = TOURWRIGHT");
    for seg in segments {
        let pts = &seg.states;
        if pts.is_empty() {
            continue;
        }
        let _ = writeln!(out);
        let _ = writeln!(out, "META_START");
        let _ = writeln!(out, "OBJECT_NAME = {}", object.replace(['\n', '='], " "));
        let _ = writeln!(out, "OBJECT_ID = {}", tour.sequence_label());
        let _ = writeln!(out, "CENTER_NAME = SUN");
        let _ = writeln!(out, "REF_FRAME = EME2000");
        let _ = writeln!(out, "TIME_SYSTEM = TDB");
        let _ = writeln!(out, "START_TIME = {}", oem_time(pts[0].0));
        let _ = writeln!(out, "STOP_TIME = {}", oem_time(pts[pts.len() - 1].0));
        let _ = writeln!(out, "INTERPOLATION = HERMITE");
        let _ = writeln!(out, "INTERPOLATION_DEGREE = 5");
        let _ = writeln!(out, "META_STOP");
        let _ = writeln!(out, "COMMENT {}", seg.comment.replace('\n', " "));
        for (t, s) in pts {
            let r = ecliptic_to_equatorial(&s.r);
            let v = ecliptic_to_equatorial(&s.v);
            let _ = writeln!(
                out,
                "{} {:.6} {:.6} {:.6} {:.9} {:.9} {:.9}",
                oem_time(*t),
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

/// The trajectory as a CCSDS OEM (KVN), version 2.0, time system TDB, one segment per leg and a
/// new segment at each deep-space manoeuvre (the velocity is discontinuous there, so no
/// interpolation may cross it).
/// `creation` is the CREATION_DATE written in the header (UTC).
pub fn oem(tour: &PreparedTour, e: &Evaluation, creation: Epoch) -> String {
    let segments: Vec<Segment<'_>> = pieces(e)
        .into_iter()
        .map(|(k, piece, range)| {
            let what = match (e.legs[k].dsm.is_some(), piece) {
                (false, _) => String::new(),
                (true, 1) => ", coast to the deep-space manoeuvre".into(),
                (true, _) => ", arc after the deep-space manoeuvre".into(),
            };
            Segment {
                comment: format!(
                    "Leg {} of {}: {} to {}{what}",
                    k + 1,
                    e.legs.len(),
                    tour.stops[k].body.name,
                    tour.stops[k + 1].body.name
                ),
                states: e.samples[range].iter().map(|p| (p.t, &p.state)).collect(),
            }
        })
        .collect();
    oem_text(tour, "patched-conic trajectory", &segments, &[], creation)
}

/// The converged continuous n-body trajectory as a CCSDS OEM: one segment per coast arc between
/// impulses, every integration step (at least one state a day, hourly within two days of each
/// encounter). The header's comments name the force model (bodies, GM values, ephemeris).
pub fn continuous_oem(
    tour: &PreparedTour,
    c: &crate::continuous::Continuous,
    creation: Epoch,
) -> String {
    let segments: Vec<Segment<'_>> = c
        .arcs
        .iter()
        .enumerate()
        .map(|(i, a)| Segment {
            comment: format!("Coast arc {} of {}: {}", i + 1, c.arcs.len(), a.label),
            states: a.states.iter().map(|(t, s)| (*t, s)).collect(),
        })
        .collect();
    let mut comments = vec![
        format!(
            "Force model: the Sun (GM {} km^3/s^2) and, as point masses, {}",
            c.model.gm_sun_km3_s2,
            c.model
                .bodies
                .iter()
                .map(|b| format!("{} (GM {} km^3/s^2)", b.name, b.gm_km3_s2))
                .collect::<Vec<_>>()
                .join(", ")
        ),
        format!(
            "Ephemeris: {}; GM values: {}; Earth-Moon: {}",
            c.model.ephemeris, c.model.gm_set, c.model.earth_moon
        ),
    ];
    if !c.converged {
        comments.push(format!(
            "NOT CONVERGED: {}",
            c.failure.as_deref().unwrap_or("unknown")
        ));
    }
    oem_text(
        tour,
        "continuous n-body trajectory",
        &segments,
        &comments,
        creation,
    )
}

/// Keyword = value pairs in file order.
pub type KeyValues = Vec<(String, String)>;

/// One segment of an OEM read back.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct OemSegment {
    /// Metadata keywords and values in order.
    pub meta: Vec<(String, String)>,
    /// States (epoch, ecliptic J2000 state).
    pub states: Vec<(Tdb, State)>,
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
        let t = Epoch::parse(&format!("{} TDB", f[0]))
            .map_err(|e| err(&e.to_string()))?
            .tdb();
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
