//! The n-body propagator against independent physics: with no perturbing mass it is the
//! two-body motion of `kepler::propagate` (itself checked against textbook examples); over a long
//! coast it keeps energy and angular momentum; a constructed third body deflects the arc in
//! proportion to its mass and more when closer (the linear regime of a small perturbation;
//! common practice).

use tourwright_astro::constants::{AU_KM, DAY_S, MU_SUN};
use tourwright_astro::ephemeris::{OsculatingElements, OsculatingOrbit};
use tourwright_astro::kepler;
use tourwright_astro::nbody::{NBodyOptions, Perturber, PerturberSource, propagate};
use tourwright_astro::time::{Epoch, Tdb};
use tourwright_astro::{State, Vec3};

fn circular(r_au: f64, angle_deg: f64) -> State {
    let r = r_au * AU_KM;
    let v = (MU_SUN / r).sqrt();
    let (s, c) = angle_deg.to_radians().sin_cos();
    State {
        r: Vec3::new(r * c, r * s, 0.0),
        v: Vec3::new(-v * s, v * c, 0.0),
    }
}

#[test]
fn with_no_perturbing_mass_it_is_two_body_motion() {
    let s0 = State {
        r: Vec3::new(1.0 * AU_KM, 0.1 * AU_KM, 0.02 * AU_KM),
        v: Vec3::new(-3.0, 36.0, 1.5),
    };
    let t1 = Tdb(400.0 * DAY_S);
    let massless = OsculatingOrbit::new(OsculatingElements {
        epoch: Epoch::parse("2000-01-01T12:00:00 TDB").unwrap(),
        q_au: 1.2,
        e: 0.1,
        i_deg: 1.0,
        raan_deg: 0.0,
        argp_deg: 0.0,
        mean_anomaly_deg: 0.0,
    })
    .unwrap();
    let bodies = [Perturber {
        mu: 0.0,
        soi_km: 0.0,
        source: PerturberSource::Other(&massless),
    }];
    let p = propagate(
        &s0,
        Tdb(0.0),
        t1,
        MU_SUN,
        &bodies,
        &NBodyOptions::default(),
        &|| false,
    )
    .unwrap();
    let k = kepler::propagate(&s0, t1.0, MU_SUN).unwrap();
    let dr = (p.end.r - k.r).norm();
    let dv = (p.end.v - k.v).norm();
    println!("400-day arc: n-body vs Kepler {dr:.3e} km, {dv:.3e} km/s");
    assert!(dr < 1e-2, "{dr} km");
    assert!(dv < 1e-9, "{dv} km/s");
}

#[test]
fn a_long_coast_keeps_energy_and_angular_momentum() {
    // An eccentric orbit (e ≈ 0.6) over 20 years: many perihelion passages.
    let s0 = State {
        r: Vec3::new(0.5 * AU_KM, 0.0, 0.0),
        v: Vec3::new(0.0, 52.0, 2.0),
    };
    let energy = |s: &State| s.v.norm_squared() / 2.0 - MU_SUN / s.r.norm();
    let h0 = s0.r.cross(&s0.v);
    let p = propagate(
        &s0,
        Tdb(0.0),
        Tdb(20.0 * 365.25 * DAY_S),
        MU_SUN,
        &[],
        &NBodyOptions::default(),
        &|| false,
    )
    .unwrap();
    let de = ((energy(&p.end) - energy(&s0)) / energy(&s0)).abs();
    let dh = (p.end.r.cross(&p.end.v) - h0).norm() / h0.norm();
    println!("20 years: relative energy drift {de:.2e}, angular momentum {dh:.2e}");
    assert!(de < 1e-8, "{de}");
    assert!(dh < 1e-8, "{dh}");
}

#[test]
fn a_third_body_deflects_in_proportion_to_its_mass_and_more_when_closer() {
    // Spacecraft on a circular 1 AU orbit; a massive body on a circular 1.3 AU orbit, starting
    // `lead` degrees ahead (never closer than 0.3 AU: a small perturbation). The deflection after
    // 120 days against pure two-body motion.
    let s0 = circular(1.0, 0.0);
    let t1 = Tdb(120.0 * DAY_S);
    let two_body = kepler::propagate(&s0, t1.0, MU_SUN).unwrap();
    let deflection = |mu: f64, lead: f64| {
        let body = OsculatingOrbit::new(OsculatingElements {
            epoch: Epoch::from_tdb(Tdb(0.0), Default::default()),
            q_au: 1.3,
            e: 0.0,
            i_deg: 0.0,
            raan_deg: 0.0,
            argp_deg: 0.0,
            mean_anomaly_deg: lead,
        })
        .unwrap();
        let bodies = [Perturber {
            mu,
            soi_km: 0.0,
            source: PerturberSource::Other(&body),
        }];
        let p = propagate(
            &s0,
            Tdb(0.0),
            t1,
            MU_SUN,
            &bodies,
            &NBodyOptions::default(),
            &|| false,
        )
        .unwrap();
        (p.end.r - two_body.r).norm()
    };
    let earth_mu = 398_600.4;
    let small = deflection(earth_mu, 0.0);
    let ten = deflection(10.0 * earth_mu, 0.0);
    let far = deflection(earth_mu, 120.0);
    println!(
        "deflection: μ⊕ alongside {small:.1} km, 10 μ⊕ {ten:.1} km, μ⊕ 120° ahead {far:.1} km"
    );
    assert!(small > 10.0, "an Earth mass nearby must show: {small} km");
    let ratio = ten / small;
    assert!((ratio - 10.0).abs() < 0.2, "linear in mass: ratio {ratio}");
    assert!(far < small, "closer pulls harder: {far} vs {small}");
}
