//! The Tisserand graph against its definition: every contour point keeps the Tisserand parameter
//! T = 3 − (v∞/v_p)² of its planet (common practice: the Jacobi-integral relation for a circular
//! coplanar planet), and an unpowered swing-by of a sample tour moves the orbit along its
//! planet's contour (T before ≈ T after, and √(3 − T) v_p ≈ the swing-by's v∞).

use std::path::PathBuf;

use tourwright_astro::State;
use tourwright_astro::bodies::Planet;
use tourwright_astro::ephemeris::EphemerisModel;
use tourwright_astro::kepler::Elements;
use tourwright_astro::tisserand::{self, contours_for, crossings, parameter};
use tourwright_mission::evaluate::{EvalOptions, evaluate, legs};
use tourwright_mission::{PreparedTour, files};

#[test]
fn contour_points_keep_the_tisserand_parameter() {
    let model = EphemerisModel::MeanElements;
    let cs = contours_for(
        &model,
        &[Planet::Venus, Planet::Earth, Planet::Jupiter],
        &[3.0, 5.0, 9.0],
        181,
    );
    assert_eq!(cs.len(), 9);
    for c in &cs {
        let a_p = c.a_p_au;
        let v_p = (model.mu_sun() / (a_p * tourwright_astro::constants::AU_KM)).sqrt();
        let want = 3.0 - (c.vinf_km_s / v_p).powi(2);
        assert!(c.points.len() > 20, "{} {}", c.body, c.vinf_km_s);
        for p in &c.points {
            let a = 0.5 * (p.rp_au + p.ra_au);
            let e = (p.ra_au - p.rp_au) / (p.ra_au + p.rp_au);
            let t = parameter(a_p, a, e, 0.0);
            assert!(
                (t - want).abs() < 1e-9,
                "{} v∞ {}: T {t} vs {want}",
                c.body,
                c.vinf_km_s
            );
            assert!(p.rp_au <= a_p * (1.0 + 1e-9) && p.ra_au >= a_p * (1.0 - 1e-9));
        }
    }
    // Venus at 5 km/s and Earth at 5 km/s cross: a V-E transfer orbit between 0.72 and 1 AU.
    let x = crossings(&cs);
    assert!(
        x.iter().any(|k| cs[k.a].body == "Venus"
            && cs[k.b].body == "Earth"
            && k.rp_au < 0.73
            && k.ra_au > 0.99),
        "{x:?}"
    );
}

#[test]
fn an_unpowered_swingby_moves_along_its_planets_contour() {
    // Lantern's Venus swing-by is shaped and unpowered: the orbit before (leg 1) and after
    // (leg 2) keep Venus's Tisserand parameter to the accuracy of the circular coplanar model.
    let p = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../../sample-missions/lantern-jupiter-evej.tour.ron");
    let d = files::load(&p).unwrap();
    let tour = PreparedTour::prepare(&d).unwrap();
    let mut e = tourwright_mission::evaluate::Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    let k = 1; // Venus
    assert_eq!(&*tour.stops[k].body.name, "Venus");
    let venus = tour.model.planet(Planet::Venus).unwrap();
    let a_p = venus.a_km();
    let t_of = |s: &State| {
        let el = Elements::from_state(s, tour.mu_sun).unwrap();
        let a = el.p / (1.0 - el.e * el.e);
        parameter(a_p, a, el.e, el.i)
    };
    let r = e.stops[k].body_state.r;
    let before = t_of(&State {
        r,
        v: e.stops[k].v_helio_in,
    });
    let after = t_of(&State {
        r,
        v: e.stops[k].v_helio_out,
    });
    let vinf = e.stops[k].vinf_in.norm();
    let v_p = (tour.mu_sun / a_p).sqrt();
    let from_t = tisserand::vinf_of(before, v_p).unwrap();
    println!(
        "Venus: T before {before:.5}, after {after:.5}; v∞ {vinf:.3} km/s, from T {from_t:.3}"
    );
    assert!(e.stops[k].dv_km_s < 1e-9, "the swing-by is unpowered");
    assert!((before - after).abs() < 0.02, "{before} vs {after}");
    assert!((from_t - vinf).abs() / vinf < 0.05, "{from_t} vs {vinf}");
    // The design overlay: one point per arc, the manoeuvre leg has two.
    let arcs = legs::arc_orbits(&tour, &e);
    assert_eq!(arcs.len(), e.legs.len() + e.dsms().count());
}
