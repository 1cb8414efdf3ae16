//! The continuous n-body trajectory by multiple shooting: the samples converge (mean elements
//! always; the DE421 kernel when `TOURWRIGHT_DE421` names it) to 1 km and 1 mm/s at every match
//! point with the designed altitudes held; with every mass at zero it gives the patched-conic legs
//! back; a tour that cannot converge says where, with no NaN.

use std::path::PathBuf;

use tourwright_mission::continuous::{Continuous, ContinuousOptions, solve};
use tourwright_mission::design::{EphemerisChoice, KernelRef, SwingbyMode};
use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::{MissionDesign, PreparedTour, files};

fn sample(name: &str) -> MissionDesign {
    let p = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../../sample-missions")
        .join(name);
    files::load(&p).unwrap()
}

fn de421() -> Option<PathBuf> {
    match std::env::var_os("TOURWRIGHT_DE421") {
        Some(p) if PathBuf::from(&p).is_file() => Some(PathBuf::from(p)),
        _ => {
            assert!(
                std::env::var_os("TOURWRIGHT_REQUIRE_KERNEL").is_none(),
                "the DE421 kernel is required here but TOURWRIGHT_DE421 does not name it"
            );
            eprintln!("SKIPPED: continuous trajectory on DE421 (TOURWRIGHT_DE421 not set)");
            None
        }
    }
}

fn run(d: &MissionDesign, mass_scale: f64) -> (Evaluation, Continuous) {
    let tour = PreparedTour::prepare(d).unwrap();
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    assert!(e.complete, "{}", d.name);
    let c = solve(
        &tour,
        &e,
        &ContinuousOptions {
            mass_scale,
            ..Default::default()
        },
        &|_| {},
        &|| false,
    )
    .unwrap();
    (e, c)
}

const CONVERGING: [&str; 5] = [
    "ember-mercury-evvme.tour.ron",
    "lantern-jupiter-evej.tour.ron",
    "osprey-jupiter-eej.tour.ron",
    "tern-saturn-ejs.tour.ron",
    "wayfarer-belt-em.tour.ron",
];

/// Every figure of a converged solve is what the issue asks of it.
fn check_converged(name: &str, d: &MissionDesign, e: &Evaluation, c: &Continuous) {
    assert!(c.converged, "{name}: {}", c.verdict());
    assert!(
        c.max_position_gap_km <= 1.0,
        "{name}: {}",
        c.max_position_gap_km
    );
    assert!(
        c.max_velocity_gap_km_s <= 1e-6,
        "{name}: {}",
        c.max_velocity_gap_km_s
    );
    for m in &c.matches {
        assert!(
            m.position_km <= 1.0,
            "{name} leg {}: {}",
            m.leg,
            m.position_km
        );
    }
    for enc in &c.encounters {
        // Shaped swing-bys, the launch parking orbit and the arrival periapsis: as designed
        // within 1 km; targeted swing-bys: at least the minimum altitude.
        let shaped = matches!(d.stops[enc.stop].swingby.mode, SwingbyMode::Shaped { .. });
        let Some(alt) = enc.altitude_km else {
            // A massless body (Wayfarer's asteroid): a point node, met at its centre.
            assert_eq!(enc.role, "arrival", "{name}");
            continue;
        };
        if shaped || enc.role != "swing-by" {
            let want = enc.designed_altitude_km.unwrap();
            assert!(
                (alt - want).abs() <= 1.0,
                "{name} {}: {alt} vs {want}",
                enc.body
            );
        } else {
            assert!(
                alt >= enc.min_altitude_km - 1.0,
                "{name} {}: {alt}",
                enc.body
            );
        }
        assert!(enc.epoch_shift_s.abs() <= 30.0 * 86_400.0);
        assert!(enc.vinf_km_s.is_finite() && enc.vinf_km_s > 0.0);
    }
    // The n-body trajectory costs about what the patched-conic one does, and its launch energy
    // is close to the design's. Bounds ours (0.25 km/s, 2 km²/s²): a few times the largest change
    // measured on the samples (0.104 km/s, 0.44 km²/s², README table), so that a solver that
    // wanders to another family of trajectories fails. Gaps, altitude and epoch limits: the
    // issue's requirements (1 km, 1 mm/s, 1 km) and the default epoch tolerance (30 days).
    assert!(
        (c.total_dv_km_s - e.ledger.total_dv_km_s).abs() < 0.25,
        "{name}: {} vs {}",
        c.total_dv_km_s,
        e.ledger.total_dv_km_s
    );
    assert!((c.launch_c3 - c.designed_launch_c3).abs() < 2.0, "{name}");
    // The trajectory: coast arcs in time order, states at least once a day.
    assert!(!c.arcs.is_empty());
    for a in &c.arcs {
        for w in a.states.windows(2) {
            let dt = w[1].0.0 - w[0].0.0;
            assert!(
                dt > 0.0 && dt <= 86_400.0 * 1.000_001,
                "{name} {}: {dt}",
                a.label
            );
        }
    }
}

#[test]
fn the_samples_converge_under_mean_elements() {
    for name in CONVERGING {
        let d = sample(name);
        let (e, c) = run(&d, 1.0);
        check_converged(name, &d, &e, &c);
        assert!(c.model.earth_moon.contains("barycentre"));
    }
}

#[test]
fn the_samples_converge_on_the_de421_kernel_with_the_moon() {
    let Some(k) = de421() else {
        return;
    };
    for name in CONVERGING {
        let mut d = sample(name);
        d.ephemeris = EphemerisChoice::Kernel(KernelRef {
            path: k.to_string_lossy().into(),
            base: None,
        });
        let (e, c) = run(&d, 1.0);
        check_converged(name, &d, &e, &c);
        assert!(c.model.bodies.iter().any(|b| b.name == "Moon"), "{name}");
        assert!(c.model.gm_set.starts_with("DE421"));
    }
}

#[test]
fn with_every_mass_at_zero_the_trajectory_is_the_patched_conic_one() {
    // Massless bodies are points: the solve then joins the same two-body arcs the patched-conic
    // evaluation flies, and the velocity change at each swing-by becomes an impulse of the size
    // of the v∞ change there.
    // Tern and Wayfarer: targeted legs only, so the patched-conic arcs end exactly on the
    // bodies (a shaped swing-by's ballistic leg ends where it ends, a few km off).
    for name in ["tern-saturn-ejs.tour.ron", "wayfarer-belt-em.tour.ron"] {
        let d = sample(name);
        let (e, c) = run(&d, 0.0);
        assert!(c.converged, "{name}: {}", c.verdict());
        assert!((c.launch_c3 - c.designed_launch_c3).abs() < 1e-6, "{name}");
        for enc in &c.encounters {
            assert!(
                enc.epoch_shift_s.abs() < 1.0,
                "{name}: {}",
                enc.epoch_shift_s
            );
            assert!(
                (enc.vinf_km_s - enc.designed_vinf_km_s).abs() < 1e-6,
                "{name} {}",
                enc.body
            );
            assert!(enc.altitude_km.is_none());
        }
        for (k, st) in e.stops.iter().enumerate() {
            if k == 0 || k + 1 == e.stops.len() {
                continue;
            }
            let want = (st.vinf_out - st.vinf_in).norm();
            let got = c
                .impulses
                .iter()
                .find(|i| i.what.contains(&*d.stops[k].body))
                .map(|i| i.magnitude_km_s)
                .unwrap();
            assert!((got - want).abs() < 1e-6, "{name}: {got} vs {want}");
        }
        // Every state of the trajectory lies on the patched-conic legs: compare with the
        // evaluation's samples at the arcs' ends (launch and arrival positions).
        let first = c.arcs[0].states[0].1.r;
        let last = c.arcs.last().unwrap().states.last().unwrap().1.r;
        assert!((first - e.stops[0].body_state.r).norm() < 1e-3);
        assert!((last - e.stops.last().unwrap().body_state.r).norm() < 1e-3);
    }
}

#[test]
fn a_tour_that_cannot_converge_says_where() {
    // Lantern with its Venus swing-by shaped 40 000 km higher: the ballistic leg to Earth then
    // misses it by millions of km.
    let mut d = sample("lantern-jupiter-evej.tour.ron");
    if let SwingbyMode::Shaped { altitude_km, .. } = &mut d.stops[1].swingby.mode {
        *altitude_km += 40_000.0;
    }
    let tour = PreparedTour::prepare(&d).unwrap();
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    let miss = e.stops[1].swingby.as_ref().unwrap().miss_km.unwrap();
    assert!(miss > 1e6, "the patched-conic miss is {miss} km");
    let c = solve(&tour, &e, &ContinuousOptions::default(), &|_| {}, &|| false).unwrap();
    assert!(!c.converged);
    let why = c.failure.clone().unwrap();
    assert!(why.contains("leg") && why.contains(" to "), "{why}");
    assert!(c.verdict().starts_with("Not converged"));
    for v in [c.launch_c3, c.total_dv_km_s, c.max_position_gap_km] {
        assert!(v.is_finite());
    }
    for enc in &c.encounters {
        assert!(enc.vinf_km_s.is_finite() && enc.epoch_shift_s.is_finite());
    }
}

#[test]
fn a_return_that_meets_the_body_on_the_way_is_reported_where_it_fails() {
    // An earlier Ember design (a test fixture): its Venus-Venus leg is two Venus years long and
    // passes Venus after one (a 1:1 resonance the patched conics do not see). The continuous
    // solve cannot close that leg and says so, naming it.
    let p = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/ember-hidden-venus-encounter.tour.ron");
    let d = files::load(&p).unwrap();
    let (_, c) = run(&d, 1.0);
    assert!(!c.converged);
    assert!(
        c.failure.as_deref().unwrap().contains("Venus to Venus"),
        "{:?}",
        c.failure
    );
}
