//! The n-body check of whole designs: with every perturbing mass set to zero it reproduces the
//! patched-conic legs (manoeuvres included); with the planets' masses it reports a finite miss
//! and a departure correction that removes it.

use std::path::PathBuf;

use tourwright_mission::evaluate::{EvalOptions, evaluate};
use tourwright_mission::fidelity::{FidelityOptions, check};
use tourwright_mission::{PreparedTour, files};

fn sample(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../../sample-missions")
        .join(name)
}

fn run(name: &str, mass_scale: f64) -> tourwright_mission::fidelity::Fidelity {
    let d = files::load(&sample(name)).unwrap();
    let tour = PreparedTour::prepare(&d).unwrap();
    let mut e = tourwright_mission::evaluate::Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    assert!(e.complete, "{name}");
    check(
        &tour,
        &e,
        &FidelityOptions {
            mass_scale,
            ..Default::default()
        },
        &|_| {},
        &|| false,
    )
    .unwrap()
}

#[test]
fn with_massless_planets_the_check_reproduces_the_patched_conic_legs() {
    // Tern (targeted Lambert legs) and Osprey (a manoeuvre on the Earth-Earth leg, then a
    // targeted swing-by): the two-body arcs end on the bodies to well under a kilometre.
    for name in ["tern-saturn-ejs.tour.ron", "osprey-jupiter-eej.tour.ron"] {
        let f = run(name, 0.0);
        for c in &f.encounters {
            assert!(
                (c.miss_km - c.conic_miss_km).abs() < 1.0,
                "{name} leg {}: n-body {} km vs conic {} km",
                c.leg + 1,
                c.miss_km,
                c.conic_miss_km
            );
            assert!(c.dvinf_km_s.abs() < 1e-6, "{name}: Δv∞ {}", c.dvinf_km_s);
        }
    }
}

#[test]
fn the_planets_pull_the_tour_off_and_shooting_puts_it_back() {
    let f = run("osprey-jupiter-eej.tour.ron", 1.0);
    assert_eq!(f.encounters.len(), 2);
    assert!(f.bodies.iter().any(|b| b == "Jupiter"));
    for c in &f.encounters {
        println!(
            "leg {} to {}: miss {:.0} km (B·T {:.0}, B·R {:.0}, along {:.0}), Δv∞ {:.2} m/s, correction {:?} m/s",
            c.leg + 1,
            c.body,
            c.miss_km,
            c.b_t_km,
            c.b_r_km,
            c.along_s_km,
            c.dvinf_km_s * 1e3,
            c.correction_dv_km_s.map(|v| v * 1e3)
        );
        assert!(c.miss_km.is_finite() && c.miss_km > 1.0, "{c:?}");
        // The B-plane and along-track parts make up the whole miss.
        let parts = (c.b_t_km.powi(2) + c.b_r_km.powi(2) + c.along_s_km.powi(2)).sqrt();
        assert!((parts - c.miss_km).abs() < 1e-6 * c.miss_km.max(1.0));
        let dv = c.correction_dv_km_s.expect("the shooting converges");
        assert!(dv > 0.0 && dv < 1.0, "correction {dv} km/s");
    }
    // A swing-by's pull is larger than the others': more mass, larger miss (here: the whole
    // solar system against a tenth of it).
    let tenth = run("osprey-jupiter-eej.tour.ron", 0.1);
    for (a, b) in f.encounters.iter().zip(&tenth.encounters) {
        assert!(a.miss_km > b.miss_km, "{} vs {}", a.miss_km, b.miss_km);
    }
}
