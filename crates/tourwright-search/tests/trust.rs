//! A search keeps faith with the designer's own tours: the start is a candidate, a start that
//! meets every limit is never made worse, a result that breaks a limit says so, a ballistic leg
//! reaches its next body, and a budget is a hard cap that never buys a worse answer.

use std::path::{Path, PathBuf};

use tourwright_astro::time::Epoch;
use tourwright_mission::design::{Stop, SwingbyMode};
use tourwright_mission::evaluate::{Warning, evaluate_design};
use tourwright_mission::{LimitSet, MissionDesign, files};
use tourwright_search::Progress;
use tourwright_search::optimize::{OptimizeOptions, Problem, optimize, search_design};

fn samples() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../sample-missions");
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.to_string_lossy().ends_with(".tour.ron"))
        .collect();
    v.sort();
    assert_eq!(v.len(), 5);
    v
}

/// The kinds of warning a design carries (what a designer sees listed under the ledger).
fn warning_kinds(d: &MissionDesign) -> Vec<std::mem::Discriminant<Warning>> {
    let (_, e) = evaluate_design(d);
    let mut k: Vec<_> = e.warnings.iter().map(std::mem::discriminant).collect();
    k.dedup();
    k
}

/// Every stop's epoch moved by weeks (a different shift per stop).
fn moved(d: &MissionDesign) -> MissionDesign {
    let shifts = [21.0, -14.0, 28.0, -21.0, 35.0];
    let mut m = d.clone();
    for (k, s) in m.stops.iter_mut().enumerate() {
        s.epoch = s.epoch.plus_days(shifts[k % shifts.len()]);
    }
    m
}

#[test]
fn every_sample_optimised_from_itself_is_no_worse_and_gains_no_warning() {
    for f in samples() {
        let d = files::load(&f).unwrap();
        let o = search_design(
            &d,
            &OptimizeOptions::default(),
            LimitSet::ALL,
            &Progress::new(),
            false,
        )
        .unwrap();
        let name = f.file_name().unwrap().to_string_lossy();
        assert!(o.start.feasible(), "{name}: the sample meets every limit");
        assert!(o.feasible(), "{name}: {:?}", o.lines());
        assert!(
            o.result.score <= o.start.score,
            "{name}: {} after {}",
            o.result.score,
            o.start.score
        );
        // The start is judged as `eval` judges it.
        let (_, e) = evaluate_design(&d);
        assert_eq!(o.start.score, d.search.objective.value(&e), "{name}");
        // No warning the sample did not have.
        let before = warning_kinds(&d);
        for w in warning_kinds(&o.design) {
            assert!(before.contains(&w), "{name}: new warning {w:?}");
        }
        // The result as written is the result as reported.
        let (_, e) = evaluate_design(&o.design);
        assert_eq!(d.search.objective.value(&e), o.result.score, "{name}");
    }
}

#[test]
fn every_sample_moved_by_weeks_comes_back_within_two_percent() {
    for f in samples() {
        let d = files::load(&f).unwrap();
        let m = moved(&d);
        let o = search_design(
            &m,
            &OptimizeOptions::default(),
            LimitSet::ALL,
            &Progress::new(),
            false,
        )
        .unwrap();
        let name = f.file_name().unwrap().to_string_lossy();
        let (_, e) = evaluate_design(&d);
        let sample = d.search.objective.value(&e);
        assert!(o.feasible(), "{name}: {:?}", o.lines());
        assert!(
            o.result.score <= 1.02 * sample,
            "{name}: {} from the moved start, the sample has {sample}",
            o.result.score
        );
    }
}

#[test]
fn a_task_no_tour_can_meet_says_which_limits_break() {
    // Earth to Jupiter direct needs a launch C3 of about 80 km²/s² (a Hohmann transfer alone
    // needs v∞ 8.8 km/s, common practice): with C3 at most 5 no date works.
    let mut d = MissionDesign::new_blank();
    d.stops = vec![
        Stop {
            body: "Earth".into(),
            epoch: Epoch::parse("2031-06-01").unwrap(),
            swingby: Default::default(),
        },
        Stop {
            body: "Jupiter".into(),
            epoch: Epoch::parse("2034-01-01").unwrap(),
            swingby: Default::default(),
        },
    ];
    d.launch.max_c3_km2_s2 = Some(5.0);
    let o = search_design(
        &d,
        &OptimizeOptions {
            max_evals: 40_000,
            ..Default::default()
        },
        LimitSet::ALL,
        &Progress::new(),
        false,
    )
    .unwrap();
    assert!(!o.feasible());
    let lines = o.lines();
    assert!(lines[0].starts_with("No design meeting every limit was found"));
    assert!(
        o.result
            .breaches
            .iter()
            .any(|w| matches!(w, Warning::C3OverLimit { .. })),
        "{lines:?}"
    );
    // Each broken limit is listed with by how much.
    assert!(
        lines[1].contains("launch C3") && lines[1].contains("(by "),
        "{lines:?}"
    );
    // The closest design says in its notes that it breaks limits.
    assert!(o.design.notes.contains("no design meeting every limit"));
}

#[test]
fn a_larger_budget_never_gives_a_worse_answer_and_a_budget_is_a_cap() {
    let f = samples()
        .into_iter()
        .find(|p| p.to_string_lossy().contains("lantern"))
        .unwrap();
    let d = moved(&files::load(&f).unwrap());
    let p = Problem::from_design(&d).unwrap();
    // Ranked as the optimiser ranks: meeting every limit first, then the value.
    let mut last = (1, f64::INFINITY);
    for budget in [20_000, 40_000, 80_000, 160_000] {
        let r = optimize(
            &p,
            &OptimizeOptions {
                seed: 3,
                max_evals: budget,
                ..Default::default()
            },
            &Progress::new(),
            false,
        );
        assert!(r.evaluations <= budget, "{} > {budget}", r.evaluations);
        let key = (usize::from(!r.feasible), r.value);
        assert!(
            key.0 < last.0 || (key.0 == last.0 && key.1 <= last.1),
            "{budget}: {key:?} after {last:?}"
        );
        last = key;
    }
}

#[test]
fn a_shaped_swing_by_returned_by_a_search_reaches_its_next_body() {
    // Lantern's swing-bys are shaped; Ember returns to Venus ballistically after two Venus
    // years. Whatever the search returns, each ballistic leg ends on its next body.
    for name in ["lantern", "ember"] {
        let f = samples()
            .into_iter()
            .find(|p| p.to_string_lossy().contains(name))
            .unwrap();
        let d = moved(&files::load(&f).unwrap());
        let o = search_design(
            &d,
            &OptimizeOptions {
                max_evals: 100_000,
                ..Default::default()
            },
            LimitSet::ALL,
            &Progress::new(),
            false,
        )
        .unwrap();
        let (_, e) = evaluate_design(&o.design);
        for (k, s) in o.design.stops.iter().enumerate() {
            let SwingbyMode::Shaped { .. } = s.swingby.mode else {
                continue;
            };
            if o.design.leg(k).dsm.is_some() {
                continue;
            }
            let miss = e.stops[k].swingby.unwrap().miss_km.unwrap();
            // Inside the search's own tolerance, far inside the sphere of influence.
            assert!(
                miss <= tourwright_search::optimize::SEARCH_MISS_KM,
                "{name} stop {}: miss {miss} km",
                k + 1
            );
        }
        assert!(
            !o.result
                .breaches
                .iter()
                .any(|w| matches!(w, Warning::MissesNextBody { .. }))
        );
    }
}
