//! Deep-space manoeuvres: the identities of the leg model (coast, impulse, Lambert arc), the edit
//! rules, the file rules, and the figures they feed (ledger, report rows, exports).

use std::path::{Path, PathBuf};

use tourwright_astro::constants::AU_KM;
use tourwright_astro::ephemeris::OsculatingElements;
use tourwright_astro::kepler::{self, Elements};
use tourwright_astro::time::{Epoch, TimeScale};
use tourwright_astro::{State, lambert};
use tourwright_mission::design::{ArrivalGoal, Dsm, DsmTime, MissionDesign, SwingbyMode, UserBody};
use tourwright_mission::evaluate::{Evaluation, evaluate_design};
use tourwright_mission::tour::PreparedTour;
use tourwright_mission::{Edit, EditError, export, files, launch, report, retarget};

fn sample(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../sample-missions")
        .join(name)
}

fn eval(d: &MissionDesign) -> Evaluation {
    let (t, e) = evaluate_design(d);
    assert!(t.is_some(), "{:?}", e.warnings);
    e
}

/// Lantern's first three stops: launch, a shaped Venus swing-by, Earth.
fn lantern_eve() -> MissionDesign {
    let mut d = files::load(&sample("lantern-jupiter-evej.tour.ron")).unwrap();
    d.stops.truncate(3);
    d.legs.truncate(2);
    d.search.leg_tof.truncate(2);
    d.arrival = ArrivalGoal::FlybyOnly;
    d.stops[2].swingby = Default::default();
    for l in d.legs.iter_mut() {
        l.dsm = None;
    }
    if !matches!(d.stops[1].swingby.mode, SwingbyMode::Shaped { .. }) {
        d.stops[1].swingby.mode = SwingbyMode::Shaped {
            altitude_km: 15_000.0,
            aim_deg: -40.0,
        };
    }
    d
}

/// Osculating elements (AU, degrees, mean anomaly) of a heliocentric state at `epoch`.
fn elements_of(s: &State, epoch: Epoch) -> OsculatingElements {
    let el = Elements::from_state(s, tourwright_astro::constants::MU_SUN).unwrap();
    assert!(el.e < 1.0);
    let ea = 2.0 * (((1.0 - el.e) / (1.0 + el.e)).sqrt() * (el.nu / 2.0).tan()).atan();
    OsculatingElements {
        epoch,
        q_au: el.periapsis() / AU_KM,
        e: el.e,
        i_deg: el.i.to_degrees(),
        raan_deg: el.raan.to_degrees(),
        argp_deg: el.argp.to_degrees(),
        mean_anomaly_deg: (ea - el.e * ea.sin()).to_degrees(),
    }
}

fn with_dsm(d: &MissionDesign, leg: usize, fraction: f64) -> MissionDesign {
    let mut x = d.clone();
    let e = eval(&x);
    let add = Edit::add_dsm(&x, &e, leg).unwrap();
    add.apply(&mut x).unwrap();
    let mut m = x.legs[leg].dsm.unwrap();
    m.at = DsmTime::Fraction(fraction);
    Edit::SetDsm { leg, dsm: Some(m) }.apply(&mut x).unwrap();
    x
}

/// Identity: where the ballistic leg after a shaped swing-by ends, a point target placed there
/// needs no manoeuvre; the coast before the manoeuvre is the ballistic arc itself.
#[test]
fn a_zero_manoeuvre_reproduces_the_ballistic_leg() {
    let mut d = lantern_eve();
    let e = eval(&d);
    let end = e.legs[1].arrive_state;
    let mark = elements_of(&end, d.stops[2].epoch);
    d.user_bodies.push(UserBody {
        name: "Mark".into(),
        mu_km3_s2: 0.0,
        radius_km: 0.0,
        elements: mark,
    });
    d.stops[2].body = "Mark".into();
    let e = eval(&d);
    let miss = e.stops[1].swingby.unwrap().miss_km.unwrap();
    assert!(
        miss < 1e-3,
        "the point target sits on the ballistic arc: {miss} km"
    );
    for f in [0.1, 0.4, 0.9] {
        let x = with_dsm(&d, 1, f);
        let ex = eval(&x);
        let m = ex.legs[1].dsm.unwrap();
        assert!(m.dv_km_s < 1e-7, "fraction {f}: Δv {} km/s", m.dv_km_s);
        // The coast is the ballistic arc: every coast sample lies on it.
        for s in &ex.samples[ex.legs[1].samples.start..m.split] {
            let on = e.samples[e.legs[1].samples.clone()]
                .iter()
                .map(|b| {
                    let dt = s.t.0 - b.t.0;
                    kepler::propagate(&b.state, dt, tourwright_astro::constants::MU_SUN)
                        .map(|p| (p.r - s.state.r).norm())
                        .unwrap_or(f64::INFINITY)
                })
                .fold(f64::INFINITY, f64::min);
            assert!(on < 1e-3, "coast sample off the ballistic arc by {on} km");
        }
        assert!((ex.legs[1].arrive_state.r - end.r).norm() < 1e-3);
        assert!((ex.legs[1].arrive_state.v - end.v).norm() < 1e-9);
    }
}

/// Identity: the coast ends exactly where the Lambert arc starts, and that arc reaches the next
/// body at its epoch.
#[test]
fn the_coast_ends_where_the_lambert_arc_starts() {
    let d = with_dsm(&lantern_eve(), 1, 0.37);
    let t = PreparedTour::prepare(&d).unwrap();
    let e = eval(&d);
    let m = e.legs[1].dsm.unwrap();
    let t1 = t.stops[1].t.0;
    let start = State {
        r: e.stops[1].body_state.r,
        v: e.stops[1].v_helio_out,
    };
    let coast = kepler::propagate(&start, m.t.0 - t1, t.mu_sun).unwrap();
    assert!((coast.r - m.r).norm() < 1e-6 * m.r.norm());
    assert!((coast.v - m.v_before).norm() < 1e-9);
    assert!((m.t.0 - t1 - 0.37 * (t.stops[2].t.0 - t1)).abs() < 1e-6);
    // The samples: the coast's last point and the arc's first are the manoeuvre, with the
    // velocities before and after.
    let before = e.samples[m.split - 1];
    let after = e.samples[m.split];
    assert!((before.state.r - m.r).norm() < 1e-6 * m.r.norm());
    assert!((before.state.v - m.v_before).norm() < 1e-9);
    assert_eq!(after.state.r, m.r);
    assert_eq!(after.state.v, m.v_after);
    assert!((m.v_after - m.v_before - m.dv).norm() < 1e-12);
    let arc = State {
        r: m.r,
        v: m.v_after,
    };
    let end = kepler::propagate(&arc, t.stops[2].t.0 - m.t.0, t.mu_sun).unwrap();
    let target = e.stops[2].body_state.r;
    assert!(
        (end.r - target).norm() < 1e-6 * target.norm(),
        "the arc ends {} km from the body",
        (end.r - target).norm()
    );
}

/// Identity: a manoeuvre right after the swing-by costs the difference between the Lambert leg
/// from the planet and the shaped swing-by's outgoing velocity.
#[test]
fn a_manoeuvre_at_the_start_is_the_velocity_difference() {
    let base = lantern_eve();
    let d = with_dsm(&base, 1, 1e-7);
    let e = eval(&d);
    let t = PreparedTour::prepare(&d).unwrap();
    let from = e.stops[1].body_state;
    let to = e.stops[2].body_state;
    let l = lambert::solve_single(
        &from.r,
        &to.r,
        t.stops[2].t.0 - t.stops[1].t.0,
        t.mu_sun,
        lambert::Direction::Prograde,
    )
    .unwrap();
    let expected = (l.v1 - e.stops[1].v_helio_out).norm();
    let m = e.legs[1].dsm.unwrap();
    assert!(
        (m.dv_km_s - expected).abs() < 1e-4,
        "{} vs {expected}",
        m.dv_km_s
    );
}

/// Identity: after a retarget the ballistic leg meets the next body, so a manoeuvre on it is
/// (nearly) free.
#[test]
fn a_retargeted_swingby_needs_almost_no_manoeuvre() {
    let mut d = lantern_eve();
    if let SwingbyMode::Shaped { altitude_km, .. } = &mut d.stops[1].swingby.mode {
        *altitude_km += 2000.0;
    }
    let missed = with_dsm(&d, 1, 0.5);
    let before = eval(&missed).legs[1].dsm.unwrap().dv_km_s;
    let r = retarget::retarget(&d, 1, false).unwrap();
    assert!(r.miss_km < 1.0);
    let x = with_dsm(&r.design, 1, 0.5);
    let after = eval(&x).legs[1].dsm.unwrap().dv_km_s;
    assert!(before > 1e-2, "the nudged swing-by misses: {before} km/s");
    assert!(after < 1e-4, "retargeted: {after} km/s");
    // Retargeting a swing-by whose next leg has a manoeuvre is refused with the reason.
    let err = retarget::retarget(&x, 1, false).unwrap_err().to_string();
    assert!(err.contains("deep-space manoeuvre"), "{err}");
}

#[test]
fn manoeuvres_enter_the_ledger_reports_and_exports() {
    let d = with_dsm(&lantern_eve(), 1, 0.5);
    let d = with_dsm(&d, 0, 0.3);
    let e = eval(&d);
    let t = PreparedTour::prepare(&d).unwrap();
    let dsm: Vec<_> = e.dsms().map(|(_, m)| *m).collect();
    assert_eq!(dsm.len(), 2);
    // Launch v∞ from the manoeuvre's start vector.
    let l = d.legs[0].dsm.unwrap().launch.unwrap();
    assert!((e.launch.vinf - l.vinf_km_s).abs() < 1e-9);
    assert!((e.launch.dla_deg - l.dla_deg).abs() < 1e-6);
    // Ledger: the total counts every manoeuvre; masses follow the rocket equation in time order.
    let sum: f64 =
        e.stops.iter().map(|s| s.dv_km_s).sum::<f64>() + dsm.iter().map(|m| m.dv_km_s).sum::<f64>();
    assert!((e.ledger.total_dv_km_s - sum).abs() < 1e-12);
    let isp = d.spacecraft.isp_s;
    let wet = d.spacecraft.dry_mass_kg + d.spacecraft.propellant_kg;
    let m1 = wet * launch::mass_ratio(dsm[0].dv_km_s, isp);
    assert!((dsm[0].mass_after_kg - m1).abs() < 1e-9 * wet);
    let m2 =
        m1 * launch::mass_ratio(e.stops[1].dv_km_s, isp) * launch::mass_ratio(dsm[1].dv_km_s, isp);
    assert!((dsm[1].mass_after_kg - m2).abs() < 1e-9 * wet);
    // Energy change of the impulse.
    let r = dsm[1].r.norm();
    let de = 0.5 * (dsm[1].v_after.norm_squared() - dsm[1].v_before.norm_squared());
    assert!((dsm[1].energy_after - dsm[1].energy_before - de).abs() < 1e-9);
    assert!((dsm[1].sun_distance_au() - r / AU_KM).abs() < 1e-12);
    // Reports: a row per manoeuvre between the stops; JSON lists them.
    let table = report::events(&t, &e);
    assert_eq!(table.rows.len(), d.stops.len() + 2);
    assert!(report::is_dsm_row(&table.rows[1]) && report::is_dsm_row(&table.rows[3]));
    let json = report::to_json(&t, &e);
    assert_eq!(json["stops"].as_array().unwrap().len(), d.stops.len());
    assert_eq!(json["dsms"].as_array().unwrap().len(), 2);
    assert!(
        report::ledger(&t, &e)
            .to_text()
            .contains("deep-space manoeuvre")
    );
    let csv = export::events_csv(&t, &e);
    assert_eq!(csv.lines().filter(|l| l.contains(",DSM,")).count(), 2);
    // OEM: one segment per piece, split at each manoeuvre, the velocity jumping there.
    let text = export::oem(&t, &e, Epoch::parse("2026-12-01T10:00:00").unwrap());
    let (_, segs) = export::read_oem(&text).unwrap();
    assert_eq!(segs.len(), e.legs.len() + 2);
    let (a, b) = (&segs[0], &segs[1]);
    let (ta, sa) = a.states.last().unwrap();
    let (tb, sb) = b.states.first().unwrap();
    assert!((ta.0 - tb.0).abs() < 1e-3);
    assert!((sa.r - sb.r).norm() < 1e-3);
    assert!(((sb.v - sa.v).norm() - dsm[0].dv_km_s).abs() < 1e-6);
    let samples = export::samples_csv(&e);
    assert!(samples.starts_with("leg,piece,"));
    assert_eq!(samples.lines().count(), e.samples.len() + 1);
    assert!(samples.lines().any(|l| l.starts_with("2,2,")));
}

#[test]
fn manoeuvre_rules_hold_in_edits_and_files() {
    let d = lantern_eve();
    // Adding on the leg after a targeted swing-by shapes it from its current geometry.
    let mut x = d.clone();
    x.stops[1].swingby.mode = SwingbyMode::Targeted;
    let ex = eval(&x);
    Edit::add_dsm(&x, &ex, 1).unwrap().apply(&mut x).unwrap();
    match x.stops[1].swingby.mode {
        SwingbyMode::Shaped { altitude_km, .. } => {
            // The current geometry's altitude, raised to the minimum when the targeted
            // swing-by dips below it.
            let sw = ex.stops[1].swingby.unwrap();
            let was = sw.altitude_km.unwrap().max(sw.min_altitude_km);
            assert!((altitude_km - was).abs() < 1e-6, "{altitude_km} vs {was}");
        }
        SwingbyMode::Targeted => panic!("the start swing-by was not shaped"),
    }
    // Going back to targeted is refused while the manoeuvre is there.
    let before = x.clone();
    let err = Edit::SetSwingbyMode {
        stop: 1,
        mode: SwingbyMode::Targeted,
    }
    .apply(&mut x)
    .unwrap_err();
    assert!(matches!(err, EditError::Dsm(_)));
    assert_eq!(x, before, "a refused edit changes nothing");
    // A fraction outside (0, 1) is refused.
    let mut bad = x.legs[1].dsm.unwrap();
    bad.at = DsmTime::Fraction(1.5);
    assert!(
        Edit::SetDsm {
            leg: 1,
            dsm: Some(bad)
        }
        .apply(&mut x)
        .is_err()
    );
    // Removing the launch stop drops the manoeuvre that has no launch v∞ to start from.
    let mut y = x.clone();
    Edit::RemoveStop(0).apply(&mut y).unwrap();
    assert!(y.legs.iter().all(|l| l.dsm.is_none()));
    // Files: a manoeuvre after a targeted swing-by, a date outside its leg, a first-leg
    // manoeuvre without launch v∞: each names its field.
    let mut f1 = x.clone();
    f1.stops[1].swingby.mode = SwingbyMode::Targeted;
    let err = files::validate(&f1).unwrap_err();
    assert_eq!(err.field, "legs[1].dsm");
    let mut f2 = x.clone();
    let mut m = f2.legs[1].dsm.unwrap();
    m.at = DsmTime::Date(f2.stops[0].epoch);
    f2.legs[1].dsm = Some(m);
    assert_eq!(files::validate(&f2).unwrap_err().field, "legs[1].dsm.at");
    let mut f3 = d.clone();
    f3.legs.resize(2, Default::default());
    f3.legs[0].dsm = Some(Dsm::at_fraction(0.5));
    assert_eq!(files::validate(&f3).unwrap_err().field, "legs[0].dsm");
    // A dated manoeuvre round-trips through the file and evaluates like the fraction it is at.
    let mut g = x.clone();
    let res = eval(&g).legs[1].dsm.unwrap();
    let mut m = g.legs[1].dsm.unwrap();
    m.at = DsmTime::Date(Epoch::from_tdb(res.t, TimeScale::Utc));
    g.legs[1].dsm = Some(m);
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("g.tour.ron");
    files::save(&g, &p).unwrap();
    let back = files::load(&p).unwrap();
    assert_eq!(back, g);
    let dv = eval(&back).legs[1].dsm.unwrap().dv_km_s;
    assert!((dv - res.dv_km_s).abs() < 1e-9);
}
