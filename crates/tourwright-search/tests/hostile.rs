//! Hostile input. The classes an outside mutation harness found (each a named test), then a seeded
//! mutation fuzz of the samples and benchmark designs through every entry point a file reaches:
//! load, save (exact round trip), evaluate and the reports and exports, retarget, the optimiser,
//! window maps and the direct-transfer search. For every case: no panic (`catch_unwind`), solver
//! work bounded (the astro crate's iteration tally, not the clock), no non-finite number in any
//! output, and save-then-load gives the same design and the same text.
//!
//! `cargo test` runs a few thousand cases; `cargo test --release -- --ignored long_fuzz` runs
//! 200 000 (the seed and count can be changed with TOURWRIGHT_FUZZ_SEED / TOURWRIGHT_FUZZ_CASES).

use std::panic::AssertUnwindSafe;
use std::path::{Path, PathBuf};

use tourwright_astro::time::Epoch;
use tourwright_astro::work;
use tourwright_mission::design::SwingbyMode;
use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::{MissionDesign, PreparedTour, export, files, report, retarget};
use tourwright_search::direct::{self, DirectOptions};
use tourwright_search::job::Progress;
use tourwright_search::optimize::{self, OptimizeOptions, Problem};
use tourwright_search::window::{self, SecondAxis, WindowSpec};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../..")
}

fn sample_text(name: &str) -> String {
    std::fs::read_to_string(root().join("sample-missions").join(name)).unwrap()
}

fn load_text(text: &str) -> Result<MissionDesign, files::FileError> {
    files::from_str(text, Path::new("hostile.tour.ron"))
}

fn field_of(text: &str) -> String {
    match load_text(text) {
        Err(files::FileError::Invalid { field, reason, .. }) => format!("{field}: {reason}"),
        Err(e) => format!("parse: {e}"),
        Ok(_) => "loaded".into(),
    }
}

// ---------------------------------------------------------------------------------------------
// The classes found from outside, one by one.

#[test]
fn a_reversed_search_window_is_refused_and_the_optimiser_never_panics() {
    let t = sample_text("wayfarer-belt-em.tour.ron").replace(
        "launch_earliest: Some(\"2028-01-01T00:00:00.000 UTC\")",
        "launch_earliest: Some(\"2034-01-01T00:00:00.000 UTC\")",
    );
    let msg = field_of(&t);
    assert!(
        msg.starts_with("search.launch_latest") && msg.contains("reversed"),
        "{msg}"
    );
    // A design built in memory with the same mistake: the problem is refused, no clamp panic.
    let mut d = load_text(&sample_text("wayfarer-belt-em.tour.ron")).unwrap();
    std::mem::swap(&mut d.search.launch_earliest, &mut d.search.launch_latest);
    let r = std::panic::catch_unwind(AssertUnwindSafe(|| {
        Problem::from_design(&d).map(|p| {
            optimize::optimize(
                &p,
                &OptimizeOptions {
                    max_evals: 500,
                    ..Default::default()
                },
                &Progress::new(),
                false,
            )
        })
    }));
    assert!(r.is_ok(), "the optimiser panicked");
}

#[test]
fn far_near_parabolic_bodies_are_refused_and_solvers_stay_bounded() {
    let t = sample_text("wayfarer-belt-em.tour.ron")
        .replace("q_au: 2.05", "q_au: 1e10")
        .replace("e: 0.16,", "e: 1.000001,")
        .replace("mean_anomaly_deg: 210.0", "mean_anomaly_deg: 1e6");
    assert!(field_of(&t).starts_with("user_bodies[0].elements.q_au"));
    // The solver itself, asked directly: bounded, finite or a typed error.
    work::reset();
    let h = tourwright_astro::kepler::hyperbolic_anomaly(1e300, 1.000001);
    assert!(work::tally() <= 1200);
    // A finite root of e sinh H − H = M even this far out (H ≈ ln(2M/e) ≈ 691.5).
    assert!(h.is_finite(), "{h}");
    let resid = (1.000001 * h.sinh() - h - 1e300) / 1e300;
    assert!(resid.abs() < 1e-9, "H {h}: relative residual {resid}");
    let s = tourwright_astro::State {
        r: tourwright_astro::Vec3::new(1.5e18, 0.0, 0.0),
        v: tourwright_astro::Vec3::new(0.0, 1e-3, 0.0),
    };
    work::reset();
    let _ = tourwright_astro::kepler::propagate(&s, 1e15, tourwright_astro::constants::MU_SUN);
    // At most 2^13 pieces of 300 iterations each.
    assert!(work::tally() <= 300 * 8192, "{}", work::tally());
}

#[test]
fn long_escaped_strings_are_refused_before_parsing() {
    let t = sample_text("wayfarer-belt-em.tour.ron").replace(
        "name: \"Wayfarer to the belt\"",
        &format!("name: \"{}\"", "\\n".repeat(128_000)),
    );
    let msg = field_of(&t);
    assert!(msg.contains("escapes") && msg.contains(":5:"), "{msg}");
    // Within the limits the text still loads (escapes are fine in moderation).
    let ok = sample_text("wayfarer-belt-em.tour.ron").replace(
        "name: \"Wayfarer to the belt\"",
        "name: \"Wayfarer\\tto the \\\"belt\\\"\"",
    );
    assert_eq!(load_text(&ok).unwrap().name, "Wayfarer\tto the \"belt\"");
}

#[test]
fn numbers_without_a_physical_meaning_are_refused_with_the_field() {
    let w = sample_text("wayfarer-belt-em.tour.ron");
    let t = sample_text("tern-saturn-ejs.tour.ron");
    let cases: Vec<(String, &str)> = vec![
        (
            t.replace("periapsis_radius_km: 180000.0", "periapsis_radius_km: 1e-300"),
            "arrival.periapsis_radius_km",
        ),
        (
            w.replace(
                "body: \"Mars\",\n            epoch: \"2032-10-29T23:29:27.325 UTC\",",
                "body: \"Kestrel (invented asteroid)\",\n            epoch: \"2032-10-29T23:29:27.325 UTC\",\n            swingby: (mode: Shaped(altitude_km: 1000.0, aim_deg: 0.0)),",
            ),
            "stops[1].swingby.mode",
        ),
        (w.replace("mass_kg: 3200.0", "mass_kg: inf"), "launch_vehicle.performance[0].mass_kg"),
        (w.replace("dry_mass_kg: 500.0", "dry_mass_kg: 1e309"), "spacecraft.dry_mass_kg"),
        (w.replace("i_deg: 3.2", "i_deg: NaN"), "user_bodies[0].elements.i_deg"),
        (w.replace("q_au: 2.05", "q_au: 1e300"), "user_bodies[0].elements.q_au"),
        (
            t.replacen(
                "body: \"Jupiter\",",
                "body: \"Jupiter\",\n            swingby: (min_altitude_km: Some(-80000.0)),",
                1,
            ),
            "stops[1].swingby.min_altitude_km",
        ),
        (w.replace("max_days: 1400.0", "max_days: inf"), "search.leg_tof[1].max_days"),
        (w.replace("isp_s: 325.0", "isp_s: 1e300"), "spacecraft.isp_s"),
        (w.replace("radius_km: 12.0", "radius_km: -1.0"), "user_bodies[0].radius_km"),
    ];
    for (text, field) in cases {
        assert_ne!(text, w, "the mutation for {field} did not apply");
        let msg = field_of(&text);
        assert!(msg.starts_with(field), "{field}: got {msg}");
    }
}

#[test]
fn epochs_round_trip_to_the_nanosecond_leap_seconds_included() {
    let w = sample_text("wayfarer-belt-em.tour.ron");
    for (written, also) in [
        ("2016-12-31T23:59:60.500 UTC", "2016-12-31T23:59:60.5"),
        (
            "2031-07-11T00:31:23.279000001 UTC",
            "2031-07-11T00:31:23.279000001",
        ),
        (
            "2031-07-11T00:31:23.279000002 UTC",
            "2031-07-11T00:31:23.279000002",
        ),
        (
            "2031-07-11T00:31:23.123456789 TDB",
            "2031-07-11T00:31:23.123456789 TDB",
        ),
    ] {
        let text = w.replace("\"2031-07-11T00:31:23.279 UTC\"", &format!("\"{written}\""));
        let d = load_text(&text).unwrap();
        let saved = files::to_string(&d);
        assert!(saved.contains(also), "{written} saved as something else");
        let back = load_text(&saved).unwrap();
        assert_eq!(back, d, "{written}");
        assert_eq!(files::to_string(&back), saved);
    }
    // Two stops a nanosecond apart stay two instants.
    let a = Epoch::parse("2031-07-11T00:31:23.279000001 UTC").unwrap();
    let b = Epoch::parse("2031-07-11T00:31:23.279000002 UTC").unwrap();
    assert_ne!(a, b);
    assert_ne!(a.to_string(), b.to_string());
    // A year the engine cannot represent is refused where it is written.
    let text = w.replace(
        "launch_latest: Some(\"2033-12-31T00:00:00.000 UTC\")",
        "launch_latest: Some(\"99999999999-12-31T00:00:00.000 UTC\")",
    );
    assert!(field_of(&text).starts_with("parse"), "{}", field_of(&text));
    // The documented range runs through the end of 2050.
    let text = w.replace(
        "\"2034-11-29T17:26:47.740 UTC\"",
        "\"2050-12-31T12:00:00.000 UTC\"",
    );
    load_text(&text).unwrap();
}

// ---------------------------------------------------------------------------------------------
// The seeded mutation fuzz.

/// xorshift64*: small, deterministic, good enough to pick mutations.
struct Rng(u64);
impl Rng {
    fn next(&mut self) -> u64 {
        let mut x = self.0;
        x ^= x >> 12;
        x ^= x << 25;
        x ^= x >> 27;
        self.0 = x;
        x.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
    fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
}

const NUMBERS: &[&str] = &[
    "0",
    "-0.0",
    "1e-300",
    "-1e-300",
    "1e309",
    "-1e309",
    "inf",
    "-inf",
    "NaN",
    "1e300",
    "-1",
    "-1e6",
    "1e6",
    "0.5",
    "1.0000001",
    "0.999999",
    "180",
    "360",
    "-90",
    "1e15",
    "7",
    "3",
    "4294967296",
    "18446744073709551616",
    "5e-324",
    "2.2250738585072014e-308",
];

const EPOCHS: &[&str] = &[
    "2016-12-31T23:59:60.999999999 UTC",
    "2031-01-01T00:00:00.000000001 UTC",
    "1799-12-31T23:59:59 UTC",
    "1800-01-01T00:00:00 TDB",
    "2050-12-31T23:59:59.999999999 UTC",
    "2051-01-01T00:00:00 UTC",
    "99999-01-01T00:00:00 UTC",
    "2030-02-30T00:00:00 UTC",
    "2030-13-01T00:00:00 UTC",
    "2030-01-01T24:00:00 UTC",
    "2030-06-30T23:59:60 UTC",
    "1961-01-01T00:00:00 UTC",
    "2035-01-01",
    "garbage",
    "",
];

const WORDS: &[(&str, &str)] = &[
    ("Targeted", "Shaped(altitude_km: 500.0, aim_deg: 10.0)"),
    ("Rendezvous", "FlybyOnly"),
    (
        "FlybyOnly",
        "Capture(periapsis_radius_km: 1.0, eccentricity: 0.5)",
    ),
    ("Some(", "None, Some("),
    ("None", "Some(-5.0)"),
    ("Fraction(", "Date(\"2032-01-01T00:00:00 UTC\"), Fraction("),
    ("Prograde", "Retrograde"),
    ("true", "false"),
];

/// Spans of number tokens in a text (outside strings is not checked: mutating inside a string is
/// fair game too).
fn number_spans(t: &str) -> Vec<(usize, usize)> {
    let b = t.as_bytes();
    let mut out = Vec::new();
    let mut i = 0;
    while i < b.len() {
        if b[i].is_ascii_digit()
            && (i == 0 || !(b[i - 1].is_ascii_alphanumeric() || b[i - 1] == b'_'))
        {
            let s = if i > 0 && b[i - 1] == b'-' { i - 1 } else { i };
            let mut j = i;
            while j < b.len()
                && (b[j].is_ascii_digit() || matches!(b[j], b'.' | b'e' | b'E' | b'+' | b'-'))
            {
                j += 1;
            }
            out.push((s, j));
            i = j;
        } else {
            i += 1;
        }
    }
    out
}

fn epoch_spans(t: &str) -> Vec<(usize, usize)> {
    // Strings that start like a date: "YYYY-
    let b = t.as_bytes();
    let mut out = Vec::new();
    for i in 0..b.len().saturating_sub(6) {
        if b[i] == b'"' && b[i + 1..i + 5].iter().all(u8::is_ascii_digit) && b[i + 5] == b'-' {
            if let Some(end) = t[i + 1..].find('"') {
                out.push((i + 1, i + 1 + end));
            }
        }
    }
    out
}

fn mutate(base: &str, rng: &mut Rng) -> String {
    let mut t = base.to_string();
    for _ in 0..1 + rng.below(3) {
        if t.len() < 2 {
            break;
        }
        match rng.below(9) {
            0..=2 => {
                let spans = number_spans(&t);
                if !spans.is_empty() {
                    let (a, b) = spans[rng.below(spans.len())];
                    t.replace_range(a..b, NUMBERS[rng.below(NUMBERS.len())]);
                }
            }
            3 => {
                let spans = epoch_spans(&t);
                if !spans.is_empty() {
                    let (a, b) = spans[rng.below(spans.len())];
                    t.replace_range(a..b, EPOCHS[rng.below(EPOCHS.len())]);
                }
            }
            4 => {
                let lines: Vec<&str> = t.lines().collect();
                let k = rng.below(lines.len());
                t = lines
                    .iter()
                    .enumerate()
                    .filter(|(i, _)| *i != k)
                    .map(|(_, l)| *l)
                    .collect::<Vec<_>>()
                    .join("\n");
            }
            5 => {
                let lines: Vec<&str> = t.lines().collect();
                let k = rng.below(lines.len());
                let mut v: Vec<&str> = lines.clone();
                v.insert(k, lines[k]);
                t = v.join("\n");
            }
            6 => {
                let (from, to) = WORDS[rng.below(WORDS.len())];
                if let Some(p) = t.find(from) {
                    t.replace_range(p..p + from.len(), to);
                }
            }
            7 => {
                // Truncate at a character boundary.
                let mut k = rng.below(t.len());
                while !t.is_char_boundary(k) {
                    k -= 1;
                }
                t.truncate(k);
            }
            _ => {
                let mut k = rng.below(t.len());
                while !t.is_char_boundary(k) {
                    k -= 1;
                }
                let c = [
                    '(', ')', ',', '"', '\\', ':', '[', ']', '\u{00e9}', '0', '-',
                ][rng.below(11)];
                t.insert(k, c);
            }
        }
    }
    t
}

/// A number token that is not finite, in any text output.
fn has_non_finite(text: &str) -> Option<String> {
    for w in text.split(|c: char| !(c.is_ascii_alphanumeric() || c == '.' || c == '-')) {
        let l = w.trim_start_matches('-').to_ascii_lowercase();
        if l == "nan" || l == "inf" || l == "infinity" {
            return Some(w.to_string());
        }
    }
    None
}

/// Solver work one evaluation may charge (iteration caps summed): generous, and finite.
const WORK_BOUND: u64 = 50_000_000;

fn check_design(d: &MissionDesign, deep: bool) -> Result<(), String> {
    // Exact round trip.
    let t1 = files::to_string(d);
    let back = load_text(&t1).map_err(|e| format!("saved text does not load: {e}\n{t1}"))?;
    if &back != d {
        return Err("save then load changed the design".into());
    }
    let t2 = files::to_string(&back);
    if t2 != t1 {
        return Err("save then load then save changed the text".into());
    }
    // Evaluation: bounded work, finite outputs.
    let Ok(tour) = PreparedTour::prepare(d) else {
        return Ok(());
    };
    work::reset();
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    let w = work::tally();
    if w > WORK_BOUND {
        return Err(format!("evaluation charged {w} solver iterations"));
    }
    let mut outputs = vec![
        report::to_text(&tour, &e),
        export::events_csv(&tour, &e),
        export::ledger_csv(&tour, &e),
        export::samples_csv(&e),
        serde_json::to_string(&report::to_json(&tour, &e)).unwrap_or_default(),
    ];
    if e.complete {
        outputs.push(export::oem(&tour, &e, Epoch::parse("2030-01-01").unwrap()));
    }
    for o in &outputs {
        if let Some(bad) = has_non_finite(o) {
            return Err(format!("non-finite '{bad}' in an output"));
        }
    }
    if !deep {
        return Ok(());
    }
    // The other entry points, with small budgets.
    for k in 1..d.stops.len().saturating_sub(1) {
        if matches!(d.stops[k].swingby.mode, SwingbyMode::Shaped { .. }) {
            work::reset();
            if let Ok(r) = retarget::retarget(d, k, false) {
                if !r.miss_km.is_finite() {
                    return Err("retarget gave a non-finite miss".into());
                }
                files::validate(&r.design).map_err(|e| format!("retarget made {e}"))?;
            }
            if work::tally() > 40 * WORK_BOUND {
                return Err("retarget unbounded".into());
            }
        }
    }
    if let Ok(p) = Problem::from_design(d) {
        let r = optimize::optimize(
            &p,
            &OptimizeOptions {
                max_evals: 400,
                ..Default::default()
            },
            &Progress::new(),
            false,
        );
        if r.x.iter().any(|x| !x.is_finite()) {
            return Err("the optimiser returned a non-finite variable".into());
        }
        let mut nd = d.clone();
        if tourwright_mission::Edit::ApplySchedule(r.schedule.clone())
            .apply(&mut nd)
            .is_ok()
        {
            files::validate(&nd).map_err(|e| format!("optimiser result {e}"))?;
        }
    }
    let a = d.stops[0].epoch;
    let spec = WindowSpec {
        from: d.stops[0].body.clone(),
        to: d.stops[1].body.clone(),
        depart: (a, a.plus_days(60.0)),
        second: SecondAxis::Tof(100.0, 400.0),
        nx: 6,
        ny: 6,
        leg: d.leg(0),
        goal: d.arrival,
    };
    if let Ok(m) = window::compute(d, &spec, &Progress::new()) {
        for c in &m.cells {
            if ![c.c3, c.vinf_depart, c.vinf_arrive, c.total_dv, c.tof_days]
                .iter()
                .all(|v| v.is_finite())
            {
                return Err("a window-map cell is not finite".into());
            }
        }
    }
    let mut o = DirectOptions::for_design(d);
    o.grid = 12;
    o.window_days = 60.0;
    if let Some(c) = direct::compare(d, &o, &Progress::new()) {
        if !c.direct_eval.launch.c3.is_finite() {
            return Err("the direct transfer is not finite".into());
        }
    }
    Ok(())
}

fn fuzz(seed: u64, cases: usize, deep_every: usize) {
    let bases: Vec<String> = [
        "sample-missions/lantern-jupiter-evej.tour.ron",
        "sample-missions/tern-saturn-ejs.tour.ron",
        "sample-missions/wayfarer-belt-em.tour.ron",
        "sample-missions/ember-mercury-evvme.tour.ron",
        "sample-missions/osprey-jupiter-eej.tour.ron",
        "benches/mga/cassini1.tour.ron",
        "benches/mga/cassini2.tour.ron",
        "benches/mga/rosetta.tour.ron",
    ]
    .iter()
    .map(|p| std::fs::read_to_string(root().join(p)).unwrap())
    .collect();
    let mut rng = Rng(seed | 1);
    let (mut loaded, mut refused) = (0usize, 0usize);
    for case in 0..cases {
        let base = &bases[rng.below(bases.len())];
        let text = mutate(base, &mut rng);
        let deep = deep_every > 0 && case % deep_every == 0;
        let r = std::panic::catch_unwind(AssertUnwindSafe(|| match load_text(&text) {
            Ok(d) => check_design(&d, deep).map(|_| true),
            Err(e) => {
                // Every refusal names a place: line and column, or a field.
                let m = e.to_string();
                if m.contains("hostile.tour.ron") {
                    Ok(false)
                } else {
                    Err(format!("an error without its file: {m}"))
                }
            }
        }));
        match r {
            Ok(Ok(true)) => loaded += 1,
            Ok(Ok(false)) => refused += 1,
            Ok(Err(why)) => panic!("case {case} (seed {seed}): {why}\n--- input ---\n{text}"),
            Err(_) => panic!("case {case} (seed {seed}) panicked\n--- input ---\n{text}"),
        }
    }
    println!("{cases} cases: {loaded} loaded and checked, {refused} refused with a reason");
    assert!(
        loaded > cases / 10,
        "too few mutants load to test anything: {loaded}"
    );
}

#[test]
fn seeded_mutations_of_the_samples_hold_every_guarantee() {
    fuzz(0x7E57_2026, 3_000, 60);
}

#[test]
#[ignore = "long run: cargo test --release -p tourwright-search --test hostile -- --ignored"]
fn long_fuzz() {
    let seed = std::env::var("TOURWRIGHT_FUZZ_SEED")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(0xC0FF_EE11);
    let cases = std::env::var("TOURWRIGHT_FUZZ_CASES")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(200_000);
    fuzz(seed, cases, 200);
}
