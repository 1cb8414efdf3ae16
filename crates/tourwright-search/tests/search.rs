//! Search: window maps against direct Lambert solves, the optimiser against an exhaustive grid,
//! determinism, cancellation, and the sequence explorer's ranking.

use std::path::Path;

use tourwright_astro::bodies::Planet;
use tourwright_astro::constants::MU_SUN;
use tourwright_astro::ephemeris::Ephemeris;
use tourwright_astro::lambert::{self, Direction};
use tourwright_astro::time::Epoch;
use tourwright_mission::design::{Objective, TofBounds};
use tourwright_mission::evaluate::evaluate_design;
use tourwright_mission::files;
use tourwright_mission::{LimitSet, MissionDesign};
use tourwright_search::direct::{self, DirectOptions};
use tourwright_search::explore::{self, ExploreSpec};
use tourwright_search::job::Progress;
use tourwright_search::optimize::{OptimizeOptions, Problem, Workspace, optimize};
use tourwright_search::window::{self, Quantity, SecondAxis, WindowSpec};

fn spec(nx: usize) -> WindowSpec {
    WindowSpec {
        from: "Earth".into(),
        to: "Mars".into(),
        depart: (
            Epoch::parse("2033-01-01").unwrap(),
            Epoch::parse("2033-09-01").unwrap(),
        ),
        second: SecondAxis::Arrival(
            Epoch::parse("2033-08-01").unwrap(),
            Epoch::parse("2034-08-01").unwrap(),
        ),
        nx,
        ny: nx,
        leg: Default::default(),
        goal: Default::default(),
    }
}

#[test]
fn window_cells_equal_direct_lambert_and_minimum_is_the_grid_minimum() {
    let s = spec(41);
    let map = window::compute(&MissionDesign::new_blank(), &s, &Progress::new()).unwrap();
    for (i, j) in [(0, 40), (10, 30), (20, 20), (35, 39), (40, 25)] {
        let c = map.cell(i, j);
        let (t0, t1) = map.epochs(i, j);
        let e = Planet::Earth.state(t0).unwrap();
        let m = Planet::Mars.state(t1).unwrap();
        let l =
            lambert::solve_single(&e.r, &m.r, t1.0 - t0.0, MU_SUN, Direction::Prograde).unwrap();
        assert!(c.solved);
        assert!(
            (c.c3 - (l.v1 - e.v).norm_squared()).abs() < 1e-9,
            "cell {i},{j}"
        );
        assert!((c.vinf_arrive - (l.v2 - m.v).norm()).abs() < 1e-12);
    }
    let (i, j, v) = map.minimum(Quantity::C3).unwrap();
    assert_eq!(v, map.cell(i, j).c3);
    assert!(map.cells.iter().filter(|c| c.solved).all(|c| c.c3 >= v));
    // Cells whose arrival precedes departure are unsolved, never NaN.
    let s2 = WindowSpec {
        second: SecondAxis::Arrival(
            Epoch::parse("2032-01-01").unwrap(),
            Epoch::parse("2033-06-01").unwrap(),
        ),
        ..spec(11)
    };
    let m2 = window::compute(&MissionDesign::new_blank(), &s2, &Progress::new()).unwrap();
    assert!(m2.cells.iter().any(|c| !c.solved));
    assert!(m2.cells.iter().all(|c| c.c3.is_finite()));
    // A cancelled map returns nothing.
    let p = Progress::new();
    p.cancel();
    assert!(window::compute(&MissionDesign::new_blank(), &spec(30), &p).is_err());
}

fn small_problem() -> Problem {
    let mut d = MissionDesign::new_blank();
    d.stops[0].epoch = Epoch::parse("2033-04-01").unwrap();
    d.stops[1].epoch = Epoch::parse("2033-11-01").unwrap();
    d.search.launch_earliest = Some(Epoch::parse("2033-01-01").unwrap());
    d.search.launch_latest = Some(Epoch::parse("2033-08-01").unwrap());
    d.search.leg_tof = vec![TofBounds {
        min_days: 120.0,
        max_days: 420.0,
    }];
    d.search.objective = Objective::TotalDvWithLaunchVinf;
    Problem::from_design(&d).unwrap()
}

#[test]
fn optimiser_beats_an_exhaustive_grid_and_is_deterministic() {
    let p = small_problem();
    let mut w = Workspace::new(&p);
    // Exhaustive grid over the same bounds: 150 × 150.
    let n = 150;
    let mut grid_best = f64::INFINITY;
    for i in 0..n {
        for j in 0..n {
            let x = [
                p.lo[0] + (p.hi[0] - p.lo[0]) * i as f64 / (n - 1) as f64,
                p.lo[1] + (p.hi[1] - p.lo[1]) * j as f64 / (n - 1) as f64,
            ];
            grid_best = grid_best.min(p.score(&x, &mut w));
        }
    }
    let opts = OptimizeOptions {
        seed: 7,
        max_evals: 20_000,
        ..Default::default()
    };
    let a = optimize(&p, &opts, &Progress::new(), false);
    assert!(
        a.value <= grid_best + 1e-9,
        "optimiser {} vs grid {}",
        a.value,
        grid_best
    );
    // Same seed, same answer; another seed may take another path but also beats the grid.
    let b = optimize(&p, &opts, &Progress::new(), false);
    assert_eq!(a.x, b.x);
    assert_eq!(a.value, b.value);
    let c = optimize(
        &p,
        &OptimizeOptions { seed: 8, ..opts },
        &Progress::new(),
        true,
    );
    assert!(c.value <= grid_best + 1e-9);
    // The trade-off front is non-dominated and sorted by TOF.
    assert!(!c.front.is_empty());
    for w in c.front.windows(2) {
        assert!(w[0].0 <= w[1].0 && w[0].1 >= w[1].1);
    }
}

#[test]
fn cancelling_stops_the_optimiser_promptly() {
    let p = small_problem();
    let progress = Progress::new();
    let p2 = progress.clone();
    let h = std::thread::spawn(move || {
        optimize(
            &p,
            &OptimizeOptions {
                max_evals: 500_000_000,
                ..Default::default()
            },
            &p2,
            false,
        )
    });
    std::thread::sleep(std::time::Duration::from_millis(300));
    progress.cancel();
    let r = h.join().unwrap();
    assert!(r.cancelled);
    assert!(r.evaluations < 500_000_000);
    assert!(r.value.is_finite());
}

#[test]
fn explorer_ranks_a_jupiter_assist_ahead_of_a_mercury_detour_to_saturn() {
    // Common practice: when Jupiter leads Saturn suitably (the early 2030s, see the Tern sample),
    // a Jupiter swing-by lowers the launch energy to Saturn; a Mercury swing-by cannot help an
    // outbound trip (Mercury sits deep in the Sun's well).
    let spec = ExploreSpec {
        from: Planet::Earth,
        to: Planet::Saturn,
        launch: (
            Epoch::parse("2033-01-01").unwrap(),
            Epoch::parse("2034-06-30").unwrap(),
        ),
        via: vec![Planet::Jupiter, Planet::Mercury],
        max_swingbys: 1,
        max_tof_years: 10.0,
        objective: Objective::TotalDvWithLaunchVinf,
        evals_per_sequence: 12_000,
        seed: 3,
        shard: None,
        dsm: Default::default(),
        limits: LimitSet::TRAJECTORY,
    };
    let ex = explore::explore(&spec, &MissionDesign::new_blank(), &Progress::new());
    assert_eq!(ex.enumerated, 3);
    let rank = |l: &str| ex.ranked.iter().position(|c| c.label == l);
    let ejs = rank("E-J-S").expect("E-J-S is optimised");
    match rank("E-Me-S") {
        Some(me) => assert!(ejs < me),
        None => assert!(ex.pruned.iter().any(|(s, _)| s == "E-Me-S")),
    }
    assert_eq!(
        ex.ranked[0].label,
        "E-J-S",
        "{:?}",
        ex.ranked
            .iter()
            .map(|c| (&c.label, c.value))
            .collect::<Vec<_>>()
    );
    assert!(ex.ranked[ejs].design.stops.len() == 3);
}

#[test]
fn mga_benchmark_design_loads_and_evaluates() {
    let d = files::load(
        &Path::new(env!("CARGO_MANIFEST_DIR")).join("../../benches/mga/cassini1.tour.ron"),
    )
    .unwrap();
    assert_eq!(d.sequence_label(), "E-V-V-E-J-S");
    let p = Problem::from_design(&d).unwrap();
    assert_eq!(p.dim(), 6);
    // Bounds as published (Vinkó & Izzo 2008, from memory): launch −1000..0 MJD2000.
    assert!((p.lo[0] + 1000.0).abs() < 1e-6 && p.hi[0].abs() < 1e-6);
}

fn samples() -> Vec<std::path::PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../sample-missions");
    let mut v: Vec<std::path::PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.to_string_lossy().ends_with(".tour.ron"))
        .collect();
    v.sort();
    v
}

#[test]
fn direct_vs_assist_finds_the_grid_best() {
    let p = samples()
        .into_iter()
        .find(|p| p.to_string_lossy().contains("tern-saturn"))
        .unwrap();
    let d = files::load(&p).unwrap();
    let mut o = DirectOptions::for_design(&d);
    o.grid = 80;
    o.measure = Objective::TotalDvWithLaunchVinf;
    let c = direct::compare(&d, &o, &Progress::new()).unwrap();
    assert!(c.direct_eval.complete);
    assert_eq!(c.direct.stops.len(), 2);
    // Nothing on a coarse independent sweep of the same box (within the C3 limit) beats it.
    let best = Objective::TotalDvWithLaunchVinf.value(&c.direct_eval);
    let t0 = d.stops[0].epoch;
    for i in 0..25 {
        for j in 0..25 {
            let mut x = c.direct.clone();
            x.stops[0].epoch = t0.plus_days(-o.window_days + 2.0 * o.window_days * i as f64 / 24.0);
            x.stops[1].epoch = x.stops[0]
                .epoch
                .plus_days(o.tof_min_days + (o.tof_max_days - o.tof_min_days) * j as f64 / 24.0);
            let ev = evaluate_design(&x).1;
            if ev.launch.c3 > d.launch.max_c3_km2_s2.unwrap() {
                continue; // the direct search respects the design's C3 limit
            }
            let s = Objective::TotalDvWithLaunchVinf.value(&ev);
            assert!(s >= best - 1e-6, "cell {i},{j}: {s} < {best}");
        }
    }
    // Hohmann Earth-Saturn (1 -> 9.5367 AU): 10.3 km/s out, 5.44 km/s in, about 6.0 years
    // (formula; common practice).
    assert!(
        (c.hohmann.vinf_depart - 10.29).abs() < 0.05,
        "{}",
        c.hohmann.vinf_depart
    );
    assert!(
        (c.hohmann.vinf_arrive - 5.44).abs() < 0.05,
        "{}",
        c.hohmann.vinf_arrive
    );
    assert!((c.hohmann.tof_days / 365.25 - 6.05).abs() < 0.1);
    assert!(c.summary().starts_with("The tour "));
}

#[test]
fn direct_vs_assist_honours_the_launch_limits_or_says_none_meets_them() {
    let p = samples()
        .into_iter()
        .find(|p| p.to_string_lossy().contains("lantern"))
        .unwrap();
    let mut d = files::load(&p).unwrap();
    let mut o = DirectOptions::for_design(&d);
    o.grid = 60;
    o.measure = Objective::TotalDvWithLaunchVinf;
    // Earth to Jupiter direct needs C3 near 80 km²/s² (a Hohmann transfer alone needs v∞
    // 8.8 km/s; common practice): with Lantern's limit of 25 none meets it, and it says so.
    let c = direct::compare(&d, &o, &Progress::new()).unwrap();
    assert!(c.direct_eval.launch.c3 > 25.0);
    assert!(!c.launch_breaches.is_empty());
    let note = c.limits_note().unwrap();
    assert!(
        note.starts_with("No direct transfer") && note.contains("launch C3"),
        "{note}"
    );
    // With room for it, the transfer chosen meets the limit and nothing is said.
    d.launch.max_c3_km2_s2 = Some(100.0);
    let c = direct::compare(&d, &o, &Progress::new()).unwrap();
    assert!(c.direct_eval.launch.c3 <= 100.0);
    assert!(c.launch_breaches.is_empty() && c.limits_note().is_none());
    // A declination band is honoured the same way.
    d.launch.min_dla_deg = Some(-10.0);
    d.launch.max_dla_deg = Some(10.0);
    let c = direct::compare(&d, &o, &Progress::new()).unwrap();
    let dla = c.direct_eval.launch.dla_deg;
    if c.launch_breaches.is_empty() {
        assert!((-10.0..=10.0).contains(&dla), "DLA {dla}");
    } else {
        assert!(c.limits_note().unwrap().contains("declination"));
    }
}

/// Spin until `p` has counted at least `n` evaluations (the work is on another thread).
fn wait_for_evals(p: &Progress, n: u64) {
    while p.evaluations() < n {
        std::thread::sleep(std::time::Duration::from_millis(2));
    }
}

#[test]
fn cancelling_the_explorer_stops_its_inner_optimiser() {
    let spec = ExploreSpec {
        from: Planet::Earth,
        to: Planet::Jupiter,
        launch: (
            Epoch::parse("2030-01-01").unwrap(),
            Epoch::parse("2031-12-31").unwrap(),
        ),
        via: vec![Planet::Venus, Planet::Earth, Planet::Mars],
        max_swingbys: 2,
        max_tof_years: 8.0,
        objective: Objective::TotalDvWithLaunchVinf,
        evals_per_sequence: 50_000_000,
        seed: 1,
        shard: None,
        dsm: Default::default(),
        limits: LimitSet::TRAJECTORY,
    };
    let p = Progress::new();
    let p2 = p.clone();
    let h = std::thread::spawn(move || explore::explore(&spec, &MissionDesign::new_blank(), &p2));
    wait_for_evals(&p, 20_000);
    p.cancel();
    let at_cancel = p.evaluations();
    let ex = h.join().unwrap();
    let after = p.evaluations() - at_cancel;
    // Every inner loop checks the shared cancel flag before each evaluation: at most one
    // evaluation per island already under way, nothing like the 50 million asked for.
    assert!(after <= 16, "{after} evaluations after cancel");
    assert!(ex.ranked.len() <= 1);
}

#[test]
fn cancelling_the_direct_search_stops_its_grid_and_polish() {
    let d = files::load(
        &samples()
            .into_iter()
            .find(|p| p.to_string_lossy().contains("tern-saturn"))
            .unwrap(),
    )
    .unwrap();
    let mut o = DirectOptions::for_design(&d);
    o.grid = 1500;
    let p = Progress::new();
    let p2 = p.clone();
    let h = std::thread::spawn(move || direct::compare(&d, &o, &p2));
    wait_for_evals(&p, 3_000);
    p.cancel();
    let at_cancel = p.evaluations();
    let r = h.join().unwrap();
    let after = p.evaluations() - at_cancel;
    // Every cell checks the shared cancel flag first: at most one evaluation per worker thread
    // already under way; the polish does not run.
    assert!(after <= 64, "{after} evaluations after cancel");
    assert!(r.is_none());
}

fn evej_spec(evals: u64) -> ExploreSpec {
    // The case that ranked a deferred launch first (issue 9): E to J, 2030-2031, via V, E, M.
    ExploreSpec {
        from: Planet::Earth,
        to: Planet::Jupiter,
        launch: (
            Epoch::parse("2030-01-01").unwrap(),
            Epoch::parse("2031-12-31").unwrap(),
        ),
        via: vec![Planet::Venus, Planet::Earth, Planet::Mars],
        max_swingbys: 2,
        max_tof_years: 7.0,
        objective: Objective::TotalDvWithLaunchVinf,
        evals_per_sequence: evals,
        seed: 1,
        shard: None,
        dsm: Default::default(),
        limits: LimitSet::TRAJECTORY,
    }
}

#[test]
fn explorer_never_ranks_a_deferred_launch_as_a_tour() {
    let ex = explore::explore(
        &evej_spec(6_000),
        &MissionDesign::new_blank(),
        &Progress::new(),
    );
    let first = &ex.ranked[0];
    assert!(first.feasible, "{first:?}");
    // Not the zero-energy launch that meets Earth again at v∞ ≈ 0: a real launch, and every
    // swing-by of every tour marked feasible at least the default minimum v∞ (1 km/s).
    assert!(first.c3 > 1.0, "{} C3 {}", first.label, first.c3);
    for c in ex.ranked.iter().filter(|c| c.feasible) {
        let e = tourwright_mission::evaluate::evaluate_design(&c.design).1;
        for s in &e.stops[1..e.stops.len() - 1] {
            assert!(
                s.vinf_in.norm() >= 1.0 - 1e-6,
                "{}: v∞ {}",
                c.label,
                s.vinf_in.norm()
            );
        }
    }
}

#[test]
fn explorer_ranks_the_voyager_sequence_first_in_its_1977_window() {
    // Voyager 1 and 2 left Earth in August-September 1977 for Jupiter and Saturn (launches on
    // 1977-08-20 and 1977-09-05, from memory). In that window a Jupiter swing-by is the way to
    // Saturn within 4.5 years: it must rank ahead of flying direct or by Mars or Venus.
    let spec = ExploreSpec {
        from: Planet::Earth,
        to: Planet::Saturn,
        launch: (
            Epoch::parse("1977-08-01").unwrap(),
            Epoch::parse("1977-09-30").unwrap(),
        ),
        via: vec![Planet::Jupiter, Planet::Mars, Planet::Venus],
        max_swingbys: 1,
        max_tof_years: 4.5,
        objective: Objective::TotalDvWithLaunchVinf,
        evals_per_sequence: 8_000,
        seed: 1,
        shard: None,
        dsm: Default::default(),
        limits: LimitSet::TRAJECTORY,
    };
    let ex = explore::explore(&spec, &MissionDesign::new_blank(), &Progress::new());
    let labels: Vec<&str> = ex.ranked.iter().map(|c| c.label.as_str()).collect();
    assert_eq!(labels[0], "E-J-S", "{labels:?}");
    let best = &ex.ranked[0];
    assert!(best.feasible);
    // The launch falls in the window the Voyagers used.
    let launch = best.launch.to_date_utc();
    assert!(launch.as_str() >= "1977-08-01" && launch.as_str() <= "1977-09-30");
    for worse in ["E-S", "E-M-S", "E-V-S"] {
        let k = labels.iter().position(|l| *l == worse).unwrap();
        assert!(ex.ranked[k].value > best.value + 1.0, "{worse}");
    }
}

#[test]
fn shards_merged_equal_the_whole_survey() {
    let whole = explore::explore(
        &evej_spec(2_000),
        &MissionDesign::new_blank(),
        &Progress::new(),
    );
    let n = 3;
    let lines: Vec<(String, String)> = (0..n)
        .map(|k| {
            let spec = ExploreSpec {
                shard: Some((k, n)),
                ..evej_spec(2_000)
            };
            let ex = explore::explore(&spec, &MissionDesign::new_blank(), &Progress::new());
            (format!("shard {}", k + 1), ex.to_json_lines())
        })
        .collect();
    let merged =
        explore::Exploration::merge_json_lines(lines.iter().map(|(a, b)| (a.as_str(), b.as_str())))
            .unwrap();
    assert_eq!(merged.enumerated, whole.enumerated);
    assert_eq!(merged.pruned, whole.pruned);
    let key = |e: &explore::Exploration| -> Vec<(String, u64)> {
        e.ranked
            .iter()
            .map(|c| (c.label.clone(), c.value.to_bits()))
            .collect()
    };
    assert_eq!(key(&merged), key(&whole));
    assert_eq!(merged.ranked, whole.ranked);
}

/// A published MGA-1DSM decision vector written in our variables. The benchmark's layout for a
/// tour of n legs: t0 (MJD2000), |v∞|, u, v, T1..Tn, η1..ηn, rp/R at each swing-by, γ at each
/// swing-by. It gives the launch direction in a frame of Earth's velocity and orbit normal and the
/// swing-by planes by an angle about the incoming v∞ measured from v∞ × v_planet; both are
/// converted here through the engine's own states. `radii`: the benchmark's body radii at the
/// swing-bys, km.
fn published_vector(file: &str, g: &[f64], radii: &[f64]) -> (Problem, Vec<f64>) {
    use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate, legs};
    use tourwright_search::optimize::DsmStartVars;
    let file = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../benches/mga")
        .join(file);
    let d = files::load(&file).unwrap();
    let p = Problem::from_design(&d).unwrap();
    let n = p.tour.legs.len();
    assert_eq!(g.len(), 4 * n + 2, "the set's layout for {n} legs");
    assert_eq!(radii.len(), n - 1);
    let mut x = p.vector_of(&p.tour);
    x[0] = g[0];
    x[1..=n].copy_from_slice(&g[4..4 + n]);
    let mut work = Workspace::new(&p);
    let mut e = Evaluation::default();
    for v in p.dsm_vars.clone() {
        x[v.eta] = g[4 + n + v.leg];
        p.apply(&x, &mut work.tour);
        evaluate(&work.tour, &EvalOptions::SEARCH, &mut e);
        match v.start {
            DsmStartVars::Launch { vinf, u, w } => {
                let earth = e.stops[0].body_state;
                let i = earth.v.normalize();
                let k = earth.r.cross(&earth.v).normalize();
                let j = k.cross(&i);
                let theta = std::f64::consts::TAU * g[2];
                let phi = (2.0 * g[3] - 1.0f64).acos() - std::f64::consts::FRAC_PI_2;
                let dir = phi.cos() * theta.cos() * i + phi.cos() * theta.sin() * j + phi.sin() * k;
                let (dla, rla) = tourwright_mission::launch::dla_rla_deg(&dir);
                x[vinf] = g[1];
                x[u] = rla / 360.0;
                x[w] = 0.5 * (dla.to_radians().sin() + 1.0);
            }
            DsmStartVars::Swingby { altitude, aim } => {
                let s = v.leg;
                x[altitude] = (g[4 + 2 * n + s - 1] - 1.0) * radii[s - 1];
                let vin = e.stops[s].vinf_in;
                let ix = vin.normalize();
                let iy = ix.cross(&e.stops[s].body_state.v).normalize();
                let iz = ix.cross(&iy);
                let gamma = g[4 + 3 * n - 1 + s - 1];
                let target = gamma.cos() * iy + gamma.sin() * iz;
                let body = &work.tour.stops[s].body.data;
                let perp = |aim_deg: f64| {
                    let vo = legs::shaped_vinf_out(body, &vin, x[altitude], aim_deg);
                    (vo - ix * vo.dot(&ix)).normalize()
                };
                let (p0, p90) = (perp(0.0), perp(90.0));
                x[aim] = target.dot(&p90).atan2(target.dot(&p0)).to_degrees();
            }
        }
    }
    (p, x)
}

/// The published Cassini2 decision vector (GTOP database entry for Cassini2, from memory).
fn cassini2_published() -> (Problem, Vec<f64>) {
    // t0, |v∞|, u, v, T1..T5, η1..η5, rp/R at V, V, E, J, γ at V, V, E, J.
    let g = [
        -779.046753814506,
        3.25911446832345,
        0.525976214695235,
        0.38086496458657,
        167.378952534645,
        424.028254165935,
        53.2897409769205,
        589.766954923325,
        2200.0,
        0.769483451363201,
        0.513289529822621,
        0.0274175362264024,
        0.263985256705873,
        0.599984695281461,
        1.34877968657176,
        1.05,
        1.30730278372017,
        69.8090142993495,
        -1.5937371121191,
        -1.95952512232447,
        -1.55498859283059,
        -1.5134625299674,
    ];
    published_vector("cassini2.tour.ron", &g, &[6052.0, 6052.0, 6378.0, 71492.0])
}

#[test]
fn messenger_reduced_published_vector_evaluates_to_the_published_value() {
    // The first solution the set's page lists for Messenger (reduced): 8.703 km/s, found by T.
    // Vinkó and D. Izzo with differential evolution, March 2008 (ESA Advanced Concepts Team,
    // GTOP database, problem "Messenger (reduced version)"; vector copied from that page):
    // t0, |v∞|, u, v, T1..T4, η1..η4, rp/R at E, V, V, γ at E, V, V.
    let g = [
        2369.89, 1.67208, 0.380256, 0.499911, 400.0, 168.06, 224.695, 212.292, 0.237501, 0.0223169,
        0.161132, 0.468419, 1.80818, 1.64195, 1.1, 1.29702, 2.80363, 1.57266,
    ];
    let (p, x) = published_vector("messenger.tour.ron", &g, &[6378.0, 6052.0, 6052.0]);
    let mut work = Workspace::new(&p);
    let v = p.score(&x, &mut work);
    // "The objective function is considered to the precision of meters per second" (same page);
    // the vector is printed to six figures. Our evaluation: 8.7026 km/s.
    assert!((v - 8.703).abs() < 2e-3, "{v}");
    assert!(p.feasible(&x, &mut work));
    // Our optimiser's runs at 6 M evaluations reach below it (README table); the point lies
    // inside our file's bounds.
    for (i, xi) in x.iter().enumerate() {
        assert!(p.lo[i] <= *xi && *xi <= p.hi[i], "x[{i}] = {xi}");
    }
}

#[test]
fn cassini2_published_optimum_evaluates_to_the_published_value() {
    let (p, x) = cassini2_published();
    let mut work = Workspace::new(&p);
    let v = p.score(&x, &mut work);
    // Published best 8.383 km/s (Vinkó & Izzo 2008 set; value and vector from memory). Our
    // evaluation of the recalled vector: 8.3852.
    assert!((v - 8.383).abs() < 0.01, "{v}");
    assert!(p.feasible(&x, &mut work));
    // The sum-of-norms residuals add up to the same score.
    let shape = p.norm_shape().unwrap();
    let mut r = vec![0.0; shape.len()];
    assert!(p.residuals(&x, &mut work, &mut r));
    assert!((shape.value(&r) - v).abs() < 1e-9);
    // Legs 3 to 5 fly ballistically at the optimum (their manoeuvres vanish).
    let e = &work.eval;
    let dv: Vec<f64> = e.dsms().map(|(_, m)| m.dv_km_s).collect();
    assert!(dv[2] < 1e-3 && dv[3] < 1e-3 && dv[4] < 1e-3, "{dv:?}");
}

#[test]
fn gauss_newton_descent_returns_to_the_cassini2_optimum() {
    use tourwright_search::optimize::Rng;
    use tourwright_search::polish::{LocalOptions, clamp_safe, lm_sum_of_norms};
    let (p, xs) = cassini2_published();
    let shape = p.norm_shape().unwrap();
    let mut rng = Rng::new(3);
    let mut work = Workspace::new(&p);
    let mut best = f64::INFINITY;
    for _ in 0..4 {
        let x0: Vec<f64> = (0..xs.len())
            .map(|i| {
                let r = (2.0 * rng.uniform() - 1.0) * 1e-3 * (p.hi[i] - p.lo[i]);
                clamp_safe(xs[i] + r, p.lo[i], p.hi[i])
            })
            .collect();
        let start = p.score(&x0, &mut work);
        let mut res = |x: &[f64], r: &mut [f64]| p.residuals(x, &mut work, r);
        let (_, f, n) = lm_sum_of_norms(
            &mut res,
            &shape,
            &x0,
            &p.lo,
            &p.hi,
            &p.integer,
            &LocalOptions {
                max_evals: 3000,
                fd_step: 1e-7,
                f_tol: 1e-10,
            },
        );
        assert!(n <= 3000 && f < start, "{start} -> {f}");
        best = best.min(f);
    }
    // From a 0.1 % perturbation the descent comes back to within 0.1 % of the published 8.383.
    assert!(best < 8.392, "{best}");
}

#[test]
fn optimised_manoeuvres_are_written_back_as_evaluated() {
    use tourwright_mission::Edit;
    let file = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../benches/mga/cassini2.tour.ron");
    let mut d = files::load(&file).unwrap();
    // A dated manoeuvre stays dated.
    let e0 = evaluate_design(&d).1;
    let t = e0.legs[2].dsm.unwrap().t;
    let mut m = d.legs[2].dsm.unwrap();
    m.at = tourwright_mission::design::DsmTime::Date(Epoch::from_tdb(
        t,
        tourwright_astro::time::TimeScale::Tdb,
    ));
    d.legs[2].dsm = Some(m);
    let p = Problem::from_design(&d).unwrap();
    assert_eq!(p.dim(), 6 + 4 + 4 * 3);
    let r = optimize(
        &p,
        &OptimizeOptions {
            seed: 2,
            max_evals: 150_000,
            ..Default::default()
        },
        &Progress::new(),
        false,
    );
    Edit::ApplySchedule(r.schedule.clone())
        .apply(&mut d)
        .unwrap();
    assert!(matches!(
        d.legs[2].dsm.unwrap().at,
        tourwright_mission::design::DsmTime::Date(_)
    ));
    let e = evaluate_design(&d).1;
    let v = Objective::TotalDvWithLaunchVinf.value(&e);
    // The objective as written back equals the optimiser's own figure for the point.
    assert!(
        (v - r.objective).abs() < 1e-6 * r.objective,
        "design {v} vs optimiser {}",
        r.objective
    );
    assert!(r.objective < 20.0, "{}", r.objective);
}

#[test]
fn explorer_with_resonant_manoeuvres_ranks_the_earth_leveraging_tour_ahead_of_the_direct_flight() {
    // A v∞-leveraging Earth-Earth leg (launch, a burn near aphelion, Earth again two years
    // later) is the classic way to reach Jupiter with a small launch energy; common practice.
    // Without manoeuvres the Earth-Earth leg cannot pump v∞ and E-E-J is broken or costly; with
    // a manoeuvre on the resonant leg it beats the direct flight's launch v∞ (C3 ≈ 80 km²/s²).
    let spec = |dsm| ExploreSpec {
        from: Planet::Earth,
        to: Planet::Jupiter,
        launch: (
            Epoch::parse("2031-01-01").unwrap(),
            Epoch::parse("2033-12-31").unwrap(),
        ),
        via: vec![Planet::Earth],
        max_swingbys: 1,
        max_tof_years: 7.0,
        objective: Objective::TotalDvWithLaunchVinf,
        evals_per_sequence: 100_000,
        seed: 1,
        shard: None,
        dsm,
        limits: LimitSet::TRAJECTORY,
    };
    let ex = explore::explore(
        &spec(explore::DsmPolicy::Resonant),
        &MissionDesign::new_blank(),
        &Progress::new(),
    );
    let labels: Vec<&str> = ex.ranked.iter().map(|c| c.label.as_str()).collect();
    assert_eq!(labels, ["E-E-J", "E-J"]);
    let eej = &ex.ranked[0];
    assert!(eej.feasible, "{eej:?}");
    assert!(eej.c3 < 30.0, "C3 {}", eej.c3);
    let (_, e) = tourwright_mission::evaluate::evaluate_design(&eej.design);
    assert_eq!(e.dsms().count(), 1, "one manoeuvre, on the Earth-Earth leg");
    assert!(e.legs[0].dsm.is_some());
    // No broken limit (the blank template's propellant load is not a limit).
    assert!(!e.warnings.iter().any(|w| w.is_limit()), "{:?}", e.warnings);
    // The direct flight's objective is its launch v∞ alone.
    let ej = &ex.ranked[1];
    assert!(ej.value > eej.value + 1.0, "{} vs {}", ej.value, eej.value);
}

/// The rest of the published MGA-1DSM set (Vinkó & Izzo 2008; bounds written from memory in the
/// files): each design loads in the benchmark model with the set's number of variables, and a
/// short run is deterministic, stays inside its bounds, meets every limit and writes back a
/// design that evaluates to the optimiser's own figure. Messenger (reduced)'s published vector is
/// checked above; Rosetta's and Messenger (full)'s are not: we do not recall them, and do not
/// invent them.
#[test]
fn rosetta_and_messenger_benchmarks_load_and_a_short_run_stays_inside_their_bounds() {
    use tourwright_mission::Edit;
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../benches/mga");
    // (file, variables as the set counts them: t0, v∞, two direction numbers, a TOF and a
    // fraction per leg, periapsis and plane angle per swing-by)
    for (file, dim) in [
        ("rosetta.tour.ron", 22),
        ("messenger.tour.ron", 18),
        ("messenger_full.tour.ron", 26),
    ] {
        let mut d = files::load(&dir.join(file)).unwrap();
        let p = Problem::from_design(&d).unwrap();
        assert_eq!(p.dim(), dim, "{file}");
        let opts = OptimizeOptions {
            seed: 3,
            max_evals: 80_000,
            ..Default::default()
        };
        let r = optimize(&p, &opts, &Progress::new(), false);
        let again = optimize(&p, &opts, &Progress::new(), false);
        assert_eq!(r.value.to_bits(), again.value.to_bits(), "{file}");
        assert!(r.evaluations <= 80_000);
        assert!(
            r.feasible && r.value.is_finite() && r.value < 30.0,
            "{file}: {}",
            r.value
        );
        for (i, x) in r.x.iter().enumerate() {
            assert!(p.lo[i] <= *x && *x <= p.hi[i], "{file}: x[{i}] = {x}");
        }
        Edit::ApplySchedule(r.schedule.clone())
            .apply(&mut d)
            .unwrap();
        let e = evaluate_design(&d).1;
        let v = d.search.objective.value(&e);
        assert!(
            (v - r.objective).abs() < 1e-6 * r.objective,
            "{file}: design {v} vs optimiser {}",
            r.objective
        );
    }
}

#[test]
fn the_rosetta_comet_is_at_perihelion_at_its_element_epoch_in_the_models_au() {
    use tourwright_mission::tour::Catalog;
    let file = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../benches/mga/rosetta.tour.ron");
    let d = files::load(&file).unwrap();
    let el = d.user_bodies[0].elements;
    // The set's epoch for the comet's elements, MJD 52504.23754000012 (from memory).
    assert!((el.epoch.mjd2000() - (52_504.237_540_000_12 - 51_544.0)).abs() < 1e-9);
    let comet = Catalog::of(&d).unwrap().body("67P").unwrap();
    let r = comet.state(el.epoch.tdb()).unwrap().r.norm();
    // a = 3.50294972836275 AU, e = 0.6319356 (the set's elements, from memory), AU of the
    // benchmark model 149 597 870.66 km.
    let q = 3.502_949_728_362_75 * (1.0 - 0.631_935_6) * 149_597_870.66;
    assert!((r - q).abs() < 1e-3, "{r} vs {q}");
}
