//! Designs: samples, files, evaluation identities, launch/arrival figures, direct vs assist,
//! exports. Expected values name their source.

use std::path::{Path, PathBuf};

use approx::assert_relative_eq;
use tourwright_astro::Vec3;
use tourwright_astro::constants::{AU_KM, MU_SUN};
use tourwright_astro::lambert::{self, Direction};
use tourwright_astro::time::Epoch;
use tourwright_astro::transfer as direct;
use tourwright_mission::design::{ArrivalGoal, SwingbyMode};
use tourwright_mission::evaluate::{Evaluation, StopKind, Warning, evaluate_design};
use tourwright_mission::files::{self, FileError};
use tourwright_mission::tour::PreparedTour;
use tourwright_mission::{arrival, export, launch, retarget};

fn evaluate(d: &tourwright_mission::MissionDesign) -> Evaluation {
    evaluate_design(d).1
}

fn tour(d: &tourwright_mission::MissionDesign) -> PreparedTour {
    PreparedTour::prepare(d).unwrap()
}

fn samples() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../sample-missions");
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.to_string_lossy().ends_with(".tour.ron"))
        .collect();
    v.sort();
    v
}

#[test]
fn samples_open_evaluate_and_save_unchanged() {
    let all = samples();
    assert!(all.len() >= 4);
    for p in all {
        let text = std::fs::read_to_string(&p).unwrap();
        let d = files::load(&p).unwrap_or_else(|e| panic!("{e}"));
        let e = evaluate(&d);
        assert!(e.complete, "{}: {:?}", p.display(), e.warnings);
        assert!(
            e.warnings.is_empty(),
            "{}: {:?}",
            p.display(),
            e.warnings.iter().map(|w| w.to_string()).collect::<Vec<_>>()
        );
        assert_eq!(
            files::to_string(&d),
            text,
            "{} does not save unchanged",
            p.display()
        );
        // Launch-vehicle tables in samples say they are illustrative.
        let lv = d.launch_vehicle.as_ref().unwrap();
        assert!(
            lv.name.to_lowercase().contains("illustrative")
                && lv.note.to_lowercase().contains("invented")
        );
    }
}

/// An evaluation buffer reused across tours (the search's hot path keeps the bodies' states of
/// the last evaluation) says exactly what a fresh one says: after another design, after an epoch
/// moved by one ulp, after a body changed at the same stop.
#[test]
fn a_reused_evaluation_buffer_says_what_a_fresh_one_says() {
    use tourwright_mission::evaluate::{EvalOptions, evaluate as eval_into};
    let bench = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../benches/mga");
    let tours: Vec<PreparedTour> = samples()
        .into_iter()
        .chain(
            ["cassini2", "messenger_full", "rosetta"].map(|n| bench.join(format!("{n}.tour.ron"))),
        )
        .map(|p| tour(&files::load(&p).unwrap()))
        .collect();
    let fresh = |t: &PreparedTour| {
        let mut e = Evaluation::default();
        eval_into(t, &EvalOptions::default(), &mut e);
        e
    };
    let mut buf = Evaluation::default();
    let mut checked = 0;
    for a in &tours {
        for b in &tours {
            eval_into(a, &EvalOptions::default(), &mut buf);
            eval_into(b, &EvalOptions::default(), &mut buf);
            assert_eq!(buf, fresh(b), "{} after {}", b.name, a.name);
            // One stop's epoch moved by the smallest step a double allows.
            let mut moved = b.clone();
            let k = moved.stops.len() - 1;
            moved.stops[k].t.0 = f64::from_bits(moved.stops[k].t.0.to_bits() + 1);
            eval_into(&moved, &EvalOptions::default(), &mut buf);
            let f = fresh(&moved);
            assert_eq!(buf, f, "{}: epoch moved", b.name);
            assert_eq!(
                buf.stops[k].body_state, f.stops[k].body_state,
                "{}: epoch moved",
                b.name
            );
            // Each manoeuvre moved by one ulp of its fraction, one leg at a time.
            for j in 0..b.legs.len() {
                let mut shifted = b.clone();
                let Some(m) = shifted.legs[j].dsm.as_mut() else {
                    continue;
                };
                if let tourwright_mission::tour::DsmWhen::Fraction(f) = &mut m.at {
                    *f = f64::from_bits(f.to_bits() + 1);
                }
                eval_into(b, &EvalOptions::default(), &mut buf);
                eval_into(&shifted, &EvalOptions::default(), &mut buf);
                let f = fresh(&shifted);
                assert_eq!(buf, f, "{}: manoeuvre of leg {j} moved", b.name);
                assert_eq!(
                    buf.legs[j].dsm.map(|d| d.v_after),
                    f.legs[j].dsm.map(|d| d.v_after),
                    "{}: manoeuvre of leg {j} moved",
                    b.name
                );
            }
            // Another body at the last stop, same epoch.
            let mut other = b.clone();
            other.stops[k].body = a.stops[a.stops.len() - 1].body.clone();
            eval_into(b, &EvalOptions::default(), &mut buf);
            eval_into(&other, &EvalOptions::default(), &mut buf);
            assert_eq!(buf, fresh(&other), "{} with {}'s last body", b.name, a.name);
            checked += 1;
        }
    }
    assert!(checked >= 49);
}

#[test]
fn save_is_atomic_and_round_trips() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("t.tour.ron");
    let d = files::load(&samples()[0]).unwrap();
    files::save(&d, &p).unwrap();
    let back = files::load(&p).unwrap();
    assert_eq!(back, d);
    // No temporary left behind.
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
    // A new file is a shared document (0644), not the temporary file's private 0600; a file
    // that existed keeps its own mode.
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        let mode = |p: &Path| std::fs::metadata(p).unwrap().permissions().mode() & 0o777;
        assert_eq!(mode(&p), 0o644);
        std::fs::set_permissions(&p, std::fs::Permissions::from_mode(0o600)).unwrap();
        files::save(&d, &p).unwrap();
        assert_eq!(mode(&p), 0o600);
    }
    // A save that fails validation leaves the old file as it was.
    let before = std::fs::read_to_string(&p).unwrap();
    let mut bad = d.clone();
    bad.spacecraft.dry_mass_kg = -5.0;
    assert!(files::save(&bad, &p).is_err());
    assert_eq!(std::fs::read_to_string(&p).unwrap(), before);
}

fn field_error(text: &str) -> (String, String) {
    match files::from_str(text, Path::new("x.tour.ron")) {
        Err(FileError::Invalid { field, reason, .. }) => (field, reason),
        other => panic!("expected a field error, got {other:?}"),
    }
}

#[test]
fn broken_files_give_line_column_or_field() {
    let good = std::fs::read_to_string(&samples()[0]).unwrap();
    // Syntax: a missing comma after a field on a known line.
    let broken = good.replacen("    version: 1,", "    version: 1", 1);
    match files::from_str(&broken, Path::new("b.tour.ron")) {
        Err(FileError::Parse {
            line,
            column,
            reason,
            ..
        }) => {
            assert!(line >= 4 && column >= 1, "{line}:{column} {reason}");
        }
        other => panic!("expected a parse error, got {other:?}"),
    }
    // Hostile: deep nesting and garbage do not panic.
    let deep = "(".repeat(10_000);
    assert!(files::from_str(&deep, Path::new("d")).is_err());
    assert!(files::from_str("\u{0}\u{1}garbage", Path::new("g")).is_err());
    // Values with the field named.
    let d = files::load(&samples()[0]).unwrap();
    let mut x = d.clone();
    x.stops[1].body = "Vulcan".into();
    assert_eq!(field_error(&files::to_string(&x)).0, "stops[1].body");
    let mut x = d.clone();
    x.spacecraft.propellant_kg = -1.0;
    assert_eq!(
        field_error(&files::to_string(&x)).0,
        "spacecraft.propellant_kg"
    );
    let mut x = d.clone();
    x.stops[2].epoch = Epoch::parse("2075-01-01").unwrap();
    let (f, r) = field_error(&files::to_string(&x));
    assert_eq!(f, "stops[2].epoch");
    assert!(
        r.contains("ephemeris range") || r.contains("time order"),
        "{r}"
    );
    let mut x = d.clone();
    x.stops.swap(1, 2);
    assert!(field_error(&files::to_string(&x)).0.ends_with(".epoch"));
    let mut x = d.clone();
    x.version = 99;
    assert_eq!(field_error(&files::to_string(&x)).0, "version");
    // A bad date text names its line.
    let bad_date = good.replacen("UTC\"", "UTC-ish\"", 1);
    assert!(matches!(
        files::from_str(&bad_date, Path::new("b")),
        Err(FileError::Parse { .. })
    ));
}

#[test]
fn older_files_without_optional_fields_still_open() {
    let minimal = r#"(format: "tourwright-design", version: 1, name: "min",
        stops: [(body: "Earth", epoch: "2030-01-01"), (body: "Mars", epoch: "2030-09-01")])"#;
    let d = files::from_str(minimal, Path::new("m")).unwrap();
    assert_eq!(d.arrival, ArrivalGoal::FlybyOnly);
    assert!(evaluate(&d).complete);
}

#[test]
fn two_stop_design_reproduces_lambert_and_hohmann() {
    // Earth to Mars around the 2033 opposition with TOF near the Hohmann 259 days.
    let mut d = tourwright_mission::MissionDesign::new_blank();
    d.stops[0].epoch = Epoch::parse("2033-04-10").unwrap();
    d.stops[1].epoch = Epoch::parse("2033-12-25").unwrap();
    let e = evaluate(&d);
    assert!(e.complete);
    let r1 = e.stops[0].body_state;
    let r2 = e.stops[1].body_state;
    let tof = d.stops[1].epoch.tdb().0 - d.stops[0].epoch.tdb().0;
    let s = lambert::solve_single(&r1.r, &r2.r, tof, MU_SUN, Direction::Prograde).unwrap();
    assert!((e.stops[0].vinf_out - (s.v1 - r1.v)).norm() < 1e-12);
    assert!((e.stops[1].vinf_in - (s.v2 - r2.v)).norm() < 1e-12);
    assert_relative_eq!(
        e.launch.c3,
        (s.v1 - r1.v).norm_squared(),
        max_relative = 1e-12
    );
    // Hohmann between the mean distances (1.00000261 and 1.52371034 AU, Standish table):
    // formula values, common practice 2.945 / 2.649 km/s and 258.9 days for 1 -> 1.5237 AU.
    let h = direct::hohmann(1.000_002_61 * AU_KM, 1.523_710_34 * AU_KM);
    assert!((h.vinf_depart - 2.945).abs() < 2e-3 && (h.vinf_arrive - 2.649).abs() < 2e-3);
    assert!((h.tof_days - 258.9).abs() < 0.5);
    // The real ephemeris (eccentric, inclined Mars) costs more than Hohmann but not wildly so.
    assert!(
        e.launch.vinf > h.vinf_depart * 0.9 && e.launch.vinf < h.vinf_depart * 1.6,
        "{}",
        e.launch.vinf
    );
}

#[test]
fn swingby_energy_bookkeeping() {
    for p in samples() {
        let d = files::load(&p).unwrap();
        let e = evaluate(&d);
        for (k, s) in e.stops.iter().enumerate() {
            if s.kind != StopKind::SwingBy {
                continue;
            }
            // Identity of the patched-conic model: ΔE = V_p·(v∞out − v∞in) + (|v∞out|² − |v∞in|²)/2.
            let vp = s.body_state.v;
            let expect = vp.dot(&(s.vinf_out - s.vinf_in))
                + 0.5 * (s.vinf_out.norm_squared() - s.vinf_in.norm_squared());
            assert_relative_eq!(s.gain(), expect, epsilon = 1e-9 * (1.0 + expect.abs()));
            let sw = s.swingby.unwrap();
            if sw.shaped || sw.powered_dv_km_s < 1e-9 {
                // A ballistic swing-by changes no v∞ magnitude.
                assert!(
                    (s.vinf_in.norm() - s.vinf_out.norm()).abs() < 1e-9,
                    "{} stop {k}",
                    p.display()
                );
            }
        }
    }
}

#[test]
fn capture_dv_textbook_relations() {
    // Minimum-Δv capture (Curtis, Orbital Mechanics for Engineering Students, §8.8, eq. 8.59-8.60,
    // from memory): for periapsis r_p = 2μ(1−e)/(v∞²(1+e)), Δv = v∞ √((1−e)/2).
    let mu = 42_828.375_816;
    let vinf = 2.649;
    for e in [0.0, 0.3, 0.6] {
        let rp = 2.0 * mu / (vinf * vinf) * (1.0 - e) / (1.0 + e);
        let goal = ArrivalGoal::Capture {
            periapsis_radius_km: rp,
            eccentricity: e,
        };
        assert_relative_eq!(
            arrival::arrival_dv(&goal, vinf, mu),
            vinf * ((1.0 - e) / 2.0).sqrt(),
            max_relative = 1e-12
        );
    }
    // Hohmann arrival at Mars into a 300 km circular orbit: √(v∞² + 2μ/r) − √(μ/r) ≈ 2.09 km/s
    // (worked by hand from the formula, common practice).
    let goal = ArrivalGoal::Capture {
        periapsis_radius_km: 3_396.19 + 300.0,
        eccentricity: 0.0,
    };
    assert!((arrival::arrival_dv(&goal, vinf, mu) - 2.090).abs() < 2e-3);
    assert_eq!(arrival::arrival_dv(&ArrivalGoal::Rendezvous, 3.2, 0.0), 3.2);
}

#[test]
fn launch_asymptote_and_vehicle_table() {
    // The ecliptic north pole lies at RA 270°, Dec 90° − ε = 66.56° (common practice).
    let (dla, rla) = launch::dla_rla_deg(&Vec3::new(0.0, 0.0, 3.0));
    assert!(
        (dla - 66.560_7).abs() < 1e-3 && (rla - 270.0).abs() < 1e-9,
        "{dla} {rla}"
    );
    let (dla, rla) = launch::dla_rla_deg(&Vec3::new(2.0, 0.0, 0.0));
    assert!(dla.abs() < 1e-12 && rla.abs() < 1e-12);
    let d = files::load(&samples()[0]).unwrap();
    let lv = d.launch_vehicle.as_ref().unwrap();
    let p = &lv.performance;
    let mid = 0.5 * (p[1].c3_km2_s2 + p[2].c3_km2_s2);
    let (m, inside) = launch::injected_mass(lv, mid).unwrap();
    assert!(inside);
    assert_relative_eq!(m, 0.5 * (p[1].mass_kg + p[2].mass_kg), max_relative = 1e-12);
    let (_, inside) = launch::injected_mass(lv, 1e4).unwrap();
    assert!(!inside);
    // Rocket equation (Tsiolkovsky): Δv = Isp g0 ln(m0/m1); 3 km/s at 300 s -> ratio e^(−1.0197).
    assert_relative_eq!(
        launch::mass_ratio(3.0, 300.0),
        (-3000.0f64 / (300.0 * 9.806_65)).exp(),
        max_relative = 1e-14
    );
}

#[test]
fn limits_become_warnings_not_nan() {
    let mut d = files::load(&samples()[0]).unwrap();
    d.launch.max_c3_km2_s2 = Some(1.0);
    d.spacecraft.propellant_kg = 10.0;
    let e = evaluate(&d);
    assert!(
        e.warnings
            .iter()
            .any(|w| matches!(w, Warning::C3OverLimit { .. }))
    );
    assert!(
        e.warnings
            .iter()
            .any(|w| matches!(w, Warning::PropellantShort { .. }))
    );
    // A leg whose arrival precedes its departure is reported, never NaN.
    let mut d = files::load(&samples()[0]).unwrap();
    d.stops[2].epoch = d.stops[1].epoch.plus_days(-1.0);
    let e = evaluate(&d);
    assert!(!e.complete);
    assert!(
        e.warnings
            .iter()
            .any(|w| matches!(w, Warning::OutOfOrder { stop: 2 }))
    );
    for s in &e.stops {
        assert!(
            s.vinf_in
                .iter()
                .chain(s.vinf_out.iter())
                .all(|c| c.is_finite())
        );
    }
}

#[test]
fn shaped_swingby_reports_miss_and_retargets() {
    let p = samples()
        .into_iter()
        .find(|p| p.to_string_lossy().contains("lantern"))
        .unwrap();
    let d = files::load(&p).unwrap();
    let k = d
        .stops
        .iter()
        .position(|s| matches!(s.swingby.mode, SwingbyMode::Shaped { .. }))
        .unwrap();
    let e = evaluate(&d);
    assert!(e.stops[k].swingby.unwrap().miss_km.unwrap() < 100.0);
    // Nudge the altitude: the ballistic leg now misses; retarget brings it back.
    let mut x = d.clone();
    if let SwingbyMode::Shaped { altitude_km, .. } = &mut x.stops[k].swingby.mode {
        *altitude_km += 3000.0;
    }
    let e = evaluate(&x);
    let miss = e.stops[k].swingby.unwrap().miss_km.unwrap();
    assert!(miss > 1.0e5, "{miss}");
    assert!(
        e.warnings
            .iter()
            .any(|w| matches!(w, Warning::MissesNextBody { .. }))
    );
    let r = retarget::retarget(&x, k, false).unwrap();
    assert!(r.miss_km < 1.0, "{}", r.miss_km);
    let r = retarget::retarget(&x, k, true).unwrap();
    assert!(r.miss_km < 1.0);
    // Not a shaped stop: a typed error.
    assert!(retarget::retarget(&x, 0, false).is_err());
}

#[test]
fn oem_export_parses_back_with_required_header() {
    let d = files::load(&samples()[0]).unwrap();
    let e = evaluate(&d);
    let t = tour(&d);
    let text = export::oem(&t, &e, Epoch::parse("2026-12-01T10:00:00").unwrap());
    let (header, segs) = export::read_oem(&text).unwrap();
    let key = |k: &str| header.iter().find(|(a, _)| a == k).map(|(_, b)| b.clone());
    // CCSDS 502.0-B-2 header: CCSDS_OEM_VERS, CREATION_DATE, ORIGINATOR are mandatory.
    assert_eq!(key("CCSDS_OEM_VERS").as_deref(), Some("2.0"));
    assert_eq!(key("CREATION_DATE").as_deref(), Some("2026-12-01T10:00:00"));
    assert!(key("ORIGINATOR").is_some());
    // One segment per leg, and a new one at each deep-space manoeuvre.
    let mut pieces = Vec::new();
    for l in &e.legs {
        match l.dsm {
            Some(m) => {
                pieces.push(l.samples.start..m.split);
                pieces.push(m.split..l.samples.end);
            }
            None => pieces.push(l.samples.clone()),
        }
    }
    assert_eq!(segs.len(), pieces.len());
    for (k, seg) in segs.iter().enumerate() {
        for m in [
            "OBJECT_NAME",
            "OBJECT_ID",
            "CENTER_NAME",
            "REF_FRAME",
            "TIME_SYSTEM",
            "START_TIME",
            "STOP_TIME",
        ] {
            assert!(
                seg.meta.iter().any(|(a, _)| a == m),
                "segment {k} lacks {m}"
            );
        }
        let pts = &e.samples[pieces[k].clone()];
        assert_eq!(seg.states.len(), pts.len());
        for ((t, s), p) in seg.states.iter().zip(pts) {
            assert!((t.0 - p.t.0).abs() < 1e-3);
            assert!((s.r - p.state.r).norm() < 1e-3);
            assert!((s.v - p.state.v).norm() < 1e-8);
        }
    }
    let csv = export::events_csv(&t, &e);
    assert_eq!(csv.lines().count(), d.stops.len() + e.dsms().count() + 1);
    assert!(csv.starts_with("stop,kind,body,epoch_utc"));
    assert!(export::ledger_csv(&t, &e).contains("total Δv"));
    assert_eq!(export::samples_csv(&e).lines().count(), e.samples.len() + 1);
}

#[test]
fn user_body_rendezvous_uses_the_osculating_orbit() {
    let p = samples()
        .into_iter()
        .find(|p| p.to_string_lossy().contains("wayfarer"))
        .unwrap();
    let d = files::load(&p).unwrap();
    assert_eq!(d.user_bodies.len(), 1);
    let e = evaluate(&d);
    assert_eq!(d.arrival, ArrivalGoal::Rendezvous);
    assert_relative_eq!(e.arrival.dv_km_s, e.arrival.vinf, max_relative = 1e-12);
    // The body sits at its perihelion distance when its mean anomaly is zero.
    let u = &d.user_bodies[0];
    let mut el = u.elements;
    el.mean_anomaly_deg = 0.0;
    let o = tourwright_astro::ephemeris::OsculatingOrbit::new(el).unwrap();
    use tourwright_astro::ephemeris::Ephemeris;
    let s = o.state(el.epoch.tdb()).unwrap();
    assert_relative_eq!(s.r.norm(), el.q_au * AU_KM, max_relative = 1e-10);
}

#[test]
fn mga_benchmark_model_reproduces_the_cassini1_check_values() {
    use tourwright_astro::time::{Tdb, TimeScale};
    let p = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../benches/mga/cassini1.tour.ron");
    let mut d = files::load(&p).unwrap();
    // The published Cassini1 optimum (decision vector from memory) and the check values computed
    // from it with an independent implementation of the benchmark model
    // (../shared/reference/mga-benchmark-model.md).
    let t0 = -789.8117;
    let tof = [
        158.302027105278,
        449.385873819743,
        54.7489684339665,
        1024.36205846918,
        4552.30796805542,
    ];
    let mut t = Tdb::from_mjd2000(t0);
    d.stops[0].epoch = Epoch::from_tdb(t, TimeScale::Tdb);
    for (k, dt) in tof.iter().enumerate() {
        t = t.plus_days(*dt);
        d.stops[k + 1].epoch = Epoch::from_tdb(t, TimeScale::Tdb);
    }
    let e = evaluate(&d);
    assert!(e.complete, "{:?}", e.warnings);
    assert!((e.launch.vinf - 2.7546).abs() < 5e-4, "{}", e.launch.vinf);
    let sw = |k: usize| e.stops[k].swingby.unwrap();
    for (k, dv, rp) in [
        (1, 1.0906, 6_352.0),
        (2, 0.6158, 8_882.0),
        (3, 0.0000, 6_778.0),
        (4, 0.0000, 833_991.0),
    ] {
        let s = sw(k);
        assert!(
            (s.powered_dv_km_s - dv).abs() < 5e-4,
            "stop {k}: Δv {}",
            s.powered_dv_km_s
        );
        let r = s.rp_km.unwrap();
        assert!((r - rp).abs() < 2.0 + 1e-5 * rp, "stop {k}: r_p {r}");
    }
    assert!(
        (e.arrival.dv_km_s - 0.4697).abs() < 5e-4,
        "{}",
        e.arrival.dv_km_s
    );
    let total = e.launch.vinf + e.ledger.total_dv_km_s;
    assert!((total - 4.93073).abs() < 5e-4, "total {total}");
}

#[test]
fn retarget_returns_only_designs_that_validate() {
    // A seeded sweep of shaped swing-bys moved far from where they meet their next body (altitude
    // scaled or below the surface, aim anywhere, dates moved by weeks): whatever retarget returns
    // must load like a file would; otherwise it says what it could not meet.
    let mut state = 0x5EED_2026_u64;
    let mut next = || {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    let (mut ok, mut refused) = (0, 0);
    for f in samples() {
        let d0 = files::load(&f).unwrap();
        let shaped: Vec<usize> = (1..d0.stops.len() - 1)
            .filter(|&k| {
                matches!(d0.stops[k].swingby.mode, SwingbyMode::Shaped { .. })
                    && d0.leg(k).dsm.is_none()
            })
            .collect();
        for &k in &shaped {
            for case in 0..40 {
                let mut d = d0.clone();
                if let SwingbyMode::Shaped { altitude_km, .. } = d.stops[k].swingby.mode {
                    d.stops[k].swingby.mode = SwingbyMode::Shaped {
                        altitude_km: if case % 5 == 0 {
                            -500.0 * next()
                        } else {
                            altitude_km * (0.2 + 5.0 * next())
                        },
                        aim_deg: 360.0 * next() - 180.0,
                    };
                }
                let shift = 60.0 * next() - 30.0;
                d.stops[k + 1].epoch = d.stops[k + 1].epoch.plus_days(shift);
                if files::validate(&d).is_err() {
                    continue;
                }
                match retarget::retarget(&d, k, case % 2 == 0) {
                    Ok(r) => {
                        files::validate(&r.design).unwrap_or_else(|e| {
                            panic!("{}: stop {k} case {case}: {e}", f.display())
                        });
                        ok += 1;
                    }
                    Err(e) => {
                        assert!(!e.to_string().is_empty());
                        refused += 1;
                    }
                }
            }
        }
    }
    assert!(
        ok > 0 && ok + refused > 40,
        "{ok} retargeted, {refused} refused"
    );
}

#[cfg(unix)]
#[test]
fn a_save_writes_through_a_link_and_keeps_the_file_mode() {
    use std::os::unix::fs::PermissionsExt as _;
    let dir = tempfile::tempdir().unwrap();
    let d = files::load(&samples()[0]).unwrap();
    let target = dir.path().join("real.tour.ron");
    files::save(&d, &target).unwrap();
    std::fs::set_permissions(&target, std::fs::Permissions::from_mode(0o640)).unwrap();
    let link = dir.path().join("link.tour.ron");
    std::os::unix::fs::symlink("real.tour.ron", &link).unwrap();
    let mut e = d.clone();
    e.name = "through the link".into();
    files::save(&e, &link).unwrap();
    assert!(
        std::fs::symlink_metadata(&link)
            .unwrap()
            .file_type()
            .is_symlink()
    );
    assert_eq!(files::load(&target).unwrap().name, "through the link");
    let mode = std::fs::metadata(&target).unwrap().permissions().mode() & 0o777;
    assert_eq!(mode, 0o640);
    // Special files are refused and left alone.
    assert!(files::save(&e, Path::new("/dev/null")).is_err());
}

/// A retarget that can meet the next body only below the swing-by's minimum altitude says so
/// and changes nothing (an earlier Osprey: its Earth swing-by missed Jupiter by 20 712 km).
#[test]
fn a_retarget_below_the_minimum_altitude_is_refused_with_the_reason() {
    let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/osprey-missing-jupiter.tour.ron");
    let d = tourwright_mission::files::load(&p).unwrap();
    match tourwright_mission::retarget::retarget(&d, 1, true) {
        Err(tourwright_mission::retarget::RetargetError::BelowMinimum {
            altitude_km,
            min_km,
        }) => assert!(altitude_km < min_km, "{altitude_km} {min_km}"),
        other => panic!("{:?}", other.map(|r| r.miss_km)),
    }
    // With the date fixed it cannot meet it at all, and says how close it came.
    let e = tourwright_mission::retarget::retarget(&d, 1, false).unwrap_err();
    assert!(e.to_string().contains("closest miss"), "{e}");
}

/// A shaped swing-by moved past the cliff: its ballistic leg misses the next body by far more
/// than the tolerance. The stops after it are not reached: the event table keeps their planned
/// dates and drops every flight figure, and the JSON report says `reached: false`.
#[test]
fn stops_after_a_miss_are_not_reached_in_every_report() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../sample-missions");
    let mut d = files::load(&dir.join("lantern-jupiter-evej.tour.ron")).unwrap();
    let e0 = evaluate(&d);
    assert_eq!(e0.first_unreached(), None);
    let SwingbyMode::Shaped {
        altitude_km,
        aim_deg,
    } = d.stops[1].swingby.mode
    else {
        panic!("Lantern's Venus swing-by is shaped");
    };
    d.stops[1].swingby.mode = SwingbyMode::Shaped {
        altitude_km: altitude_km + 560.0,
        aim_deg,
    };
    let t = tour(&d);
    let e = evaluate(&d);
    assert_eq!(e.first_unreached(), Some(2));
    assert!(e.reached(1) && !e.reached(2) && !e.reached(3));
    let miss = e
        .warnings
        .iter()
        .find_map(|w| match w {
            Warning::MissesNextBody { miss_km, .. } => Some(*miss_km),
            _ => None,
        })
        .unwrap();
    // Far beyond the 1 000 km default tolerance (the cliff: millions of km).
    assert!(miss > 1.0e6, "{miss}");
    let table = tourwright_mission::report::events(&t, &e);
    let unreached: Vec<_> = table
        .rows
        .iter()
        .filter(|r| tourwright_mission::report::is_unreached_row(r))
        .collect();
    assert_eq!(unreached.len(), 3, "Earth, the manoeuvre on leg 3, Jupiter");
    for r in &unreached {
        assert!(r[3].display(0).starts_with("20"), "the planned date stays");
        assert!(r[5..].iter().all(|c| c.num().is_none()), "{r:?}");
    }
    let json = tourwright_mission::report::eval_report(&t, &e);
    let reached: Vec<bool> = json.stops.iter().map(|s| s.reached).collect();
    assert_eq!(reached, [true, true, false, false]);
    assert_eq!(json.stops[2].kind, "Swing-by");
    assert!(json.stops[2].vinf_in_km_s.is_none() && json.stops[2].swingby.is_none());
    // The budget is the flown part's: launch and Venus spend nothing (Lantern's only manoeuvres,
    // the leg-3 DSM and the capture, lie after the miss), so no propellant is needed; nothing
    // arrives, so there is no arrival, final or delivered mass, and the manoeuvre on the leg
    // that is never flown is not reported.
    let p = e.ledger.flown.expect("the flown part");
    assert_eq!(p.first_unreached, 2);
    assert!(p.dv_km_s.abs() < 1e-12 && p.propellant_needed_kg.abs() < 1e-9);
    assert!(
        e.ledger.total_dv_km_s > 1.0,
        "the planned totals stay for the search"
    );
    assert!(
        !e.warnings
            .iter()
            .any(|w| matches!(w, Warning::PropellantShort { .. })),
        "{:?}",
        e.warnings
    );
    assert_eq!(json.ledger.total_dv_km_s, Some(0.0));
    assert!(json.ledger.final_mass_kg.is_none() && json.ledger.delivered_mass_kg.is_none());
    assert!(json.arrival.vinf_km_s.is_none() && json.total_tof_days.is_none());
    assert!(json.dsms.is_empty());
    let text = tourwright_mission::report::to_text(&t, &e);
    assert!(text.contains("Arrival: not reached"), "{text}");
    let line = tourwright_mission::report::summary_line(&t, &e);
    assert!(line.starts_with("not reached from stop 3 on"), "{line}");
    let ledger = tourwright_mission::report::ledger(&t, &e);
    assert!(
        !ledger
            .rows
            .iter()
            .any(|r| r[0].display(0).contains("deep-space")),
        "{:?}",
        ledger.rows
    );
}

#[test]
fn user_bodies_follow_the_selected_models_constants_and_epochs_take_day_counts() {
    use tourwright_astro::ephemeris::{Ephemeris, OsculatingOrbit};
    use tourwright_astro::mga_model;
    use tourwright_mission::design::EphemerisChoice;
    use tourwright_mission::tour::Catalog;
    let p = samples()
        .into_iter()
        .find(|p| p.to_string_lossy().contains("wayfarer"))
        .unwrap();
    let text = std::fs::read_to_string(&p).unwrap();
    let calendar = files::load(&p).unwrap();
    let name = calendar.user_bodies[0].name.clone();
    // The same element epoch written as an MJD and as an MJD2000 day count (2029-12-31 is
    // MJD 62501, MJD2000 10957; 23:58:50.816 is 86330.816 s, 0.99919925925... of the day).
    let at = calendar.user_bodies[0].elements.epoch.tdb().0;
    for form in [
        "MJD 62501.999199259259 UTC",
        "MJD2000 10957.999199259259 UTC",
    ] {
        let t = text.replace("2029-12-31T23:58:50.816 UTC", form);
        let d = files::from_str(&t, &p).unwrap();
        let got = d.user_bodies[0].elements.epoch.tdb().0;
        assert!((got - at).abs() < 1e-6, "{form}: {} s", got - at);
    }
    // A malformed day count names the line of the field and the forms it may take.
    let bad = text.replace("2029-12-31T23:58:50.816 UTC", "MJD 6250l.5 UTC");
    match files::from_str(&bad, &p) {
        Err(FileError::Parse { line, reason, .. }) => {
            let want = text
                .lines()
                .position(|l| l.contains("2029-12-31T23:58:50.816"))
                .unwrap()
                + 1;
            assert_eq!(line, want);
            assert!(reason.contains("MJD2000"), "{reason}");
        }
        other => panic!("{other:?}"),
    }
    // In the benchmark model the body moves with the model's μ☉ and AU, not the program's.
    let mut d = calendar.clone();
    d.ephemeris = EphemerisChoice::MgaBenchmark;
    let cat = Catalog::of(&d).unwrap();
    let body = cat.body(&name).unwrap();
    let el = d.user_bodies[0].elements;
    let model = OsculatingOrbit::with_constants(el, mga_model::MU_SUN, mga_model::AU_KM).unwrap();
    let program = OsculatingOrbit::new(el).unwrap();
    let t = tourwright_astro::time::Tdb(el.epoch.tdb().0 + 400.0 * 86_400.0);
    let s = body.state(t).unwrap();
    assert_relative_eq!(
        (s.r - model.state(t).unwrap().r).norm(),
        0.0,
        epsilon = 1e-6
    );
    let apart = (s.r - program.state(t).unwrap().r).norm();
    assert!(apart > 10.0, "{apart} km");
    assert_relative_eq!(
        body.mean_distance_km(),
        el.q_au * mga_model::AU_KM / (1.0 - el.e),
        max_relative = 1e-14
    );
    // Under the mean elements it is the program's own.
    let cat = Catalog::of(&calendar).unwrap();
    let s = cat.body(&name).unwrap().state(t).unwrap();
    assert_relative_eq!(
        (s.r - program.state(t).unwrap().r).norm(),
        0.0,
        epsilon = 1e-6
    );
}
