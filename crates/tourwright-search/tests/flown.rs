//! The explorer at its default settings finds tours that were flown: in each mission's launch
//! year it ranks the flown sequence among its first three, launching within 45 days of the flown
//! date. Sequences and dates are the trade's history, from memory (marked so beside each).
//! Every survey uses the defaults (evaluations per sequence, manoeuvres on resonant legs, seed),
//! the same as `tourwright explore` with no options but the survey's own.

use tourwright_astro::bodies::Planet;
use tourwright_astro::time::Epoch;
use tourwright_mission::{LimitSet, MissionDesign, Objective};
use tourwright_search::Progress;
use tourwright_search::explore::{self, DEFAULT_EVALS_PER_SEQUENCE, ExploreSpec};

fn survey(
    to: Planet,
    launch: (&str, &str),
    via: &[Planet],
    max_swingbys: usize,
    years: f64,
) -> ExploreSpec {
    ExploreSpec {
        from: Planet::Earth,
        to,
        launch: (
            Epoch::parse(launch.0).unwrap(),
            Epoch::parse(launch.1).unwrap(),
        ),
        via: via.to_vec(),
        max_swingbys,
        max_tof_years: years,
        objective: Objective::default(),
        evals_per_sequence: DEFAULT_EVALS_PER_SEQUENCE,
        seed: 1,
        shard: None,
        dsm: Default::default(),
        limits: LimitSet::TRAJECTORY,
    }
}

/// Rank (1-based) of `sequence` and its launch's distance from `flown`, days.
fn found(spec: &ExploreSpec, sequence: &str, flown: &str) -> (usize, f64) {
    let ex = explore::explore(spec, &MissionDesign::new_blank(), &Progress::new());
    let table: Vec<String> = ex
        .ranked
        .iter()
        .map(|c| {
            format!(
                "{} {} {:.3} {}",
                c.label,
                c.launch.to_date_utc(),
                c.value,
                c.feasible
            )
        })
        .collect();
    let (i, c) = ex
        .ranked
        .iter()
        .enumerate()
        .find(|(_, c)| c.label == sequence)
        .unwrap_or_else(|| panic!("{sequence} not ranked: {table:?}"));
    assert!(c.feasible, "{sequence}: {:?}", c.breaches);
    let days = (c.launch.tdb().0 - Epoch::parse(flown).unwrap().tdb().0).abs() / 86_400.0;
    eprintln!(
        "{sequence}: rank {}, launch {} ({days:.0} days from {flown}); {table:?}",
        i + 1,
        c.launch.to_date_utc()
    );
    (i + 1, days)
}

#[test]
fn mariner_10_venus_then_mercury_1973() {
    // Mariner 10: launched 1973-11-03, Venus 1974-02-05, Mercury 1974-03-29 (from memory).
    let spec = survey(
        Planet::Mercury,
        ("1973-01-01", "1974-12-31"),
        &[Planet::Venus, Planet::Earth],
        1,
        2.0,
    );
    let (rank, days) = found(&spec, "E-V-Me", "1973-11-03");
    assert!(rank <= 3 && days <= 45.0, "rank {rank}, {days:.0} days");
}

#[test]
fn voyager_1_jupiter_then_saturn_1977() {
    // Voyager 1: launched 1977-09-05, Jupiter 1979-03-05, Saturn 1980-11-12 (from memory).
    let spec = survey(
        Planet::Saturn,
        ("1976-06-01", "1978-12-31"),
        &[Planet::Jupiter, Planet::Mars, Planet::Venus],
        1,
        5.0,
    );
    let (rank, days) = found(&spec, "E-J-S", "1977-09-05");
    assert!(rank <= 3 && days <= 45.0, "rank {rank}, {days:.0} days");
}

#[test]
fn galileo_venus_earth_earth_to_jupiter_1989() {
    // Galileo: launched 1989-10-18; Venus 1990-02-10, Earth 1990-12-08 and 1992-12-08, Jupiter
    // 1995-12-07 (from memory).
    let spec = survey(
        Planet::Jupiter,
        ("1989-01-01", "1990-06-30"),
        &[Planet::Venus, Planet::Earth],
        3,
        7.0,
    );
    let (rank, days) = found(&spec, "E-V-E-E-J", "1989-10-18");
    assert!(rank <= 3 && days <= 45.0, "rank {rank}, {days:.0} days");
}

#[test]
fn juno_earth_return_to_jupiter_2011() {
    // Juno: launched 2011-08-05, deep-space manoeuvres in 2012, Earth 2013-10-09, Jupiter
    // 2016-07-05 (from memory); about five years of flight.
    let spec = survey(
        Planet::Jupiter,
        ("2011-01-01", "2011-12-31"),
        &[Planet::Venus, Planet::Earth, Planet::Mars],
        1,
        5.0,
    );
    let (rank, days) = found(&spec, "E-E-J", "2011-08-05");
    assert!(rank <= 3 && days <= 45.0, "rank {rank}, {days:.0} days");
}
