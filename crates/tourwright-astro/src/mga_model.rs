//! The analytic ephemeris and constants of the published multiple-gravity-assist benchmark set
//! (Vinkó & Izzo 2008, ESA ACT technical report ACT-TNT-MAD-GOHTPPSTD), as given in
//! `../shared/reference/mga-benchmark-model.md`. Its published best values hold only in this model.
//!
//! Each planet: a (AU, constant), e, i, Ω, ω as cubic polynomials in T, and the mean anomaly
//! M = M0 + XM(T)·T with XM itself quadratic in T, where T = (MJD2000 + 36525)/36525 centuries
//! counted from 1900 January 0.5 as the benchmark uses it. The elements are ecliptic J2000 as they
//! stand; the velocity is two-body with the model's μ☉.

use std::f64::consts::TAU;

use crate::State;
use crate::bodies::{BodyData, Planet};
use crate::constants::DEG;
use crate::kepler::{self, Elements};
use crate::source::{Ephemeris, EphemerisError, check_range};
use crate::time::Tdb;

/// The model's astronomical unit, km.
pub const AU_KM: f64 = 149_597_870.66;
/// The model's heliocentric gravitational parameter, km³/s².
pub const MU_SUN: f64 = 1.327_124_28e11;

/// Polynomial coefficients of one planet: a, then e, i, Ω, ω (cubic), M0 and XM (quadratic).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MgaElements {
    /// Semi-major axis, AU.
    pub a_au: f64,
    /// e0 + e1 T + e2 T² + e3 T³.
    pub e: [f64; 4],
    /// Inclination, degrees.
    pub i: [f64; 4],
    /// Longitude of the ascending node, degrees.
    pub node: [f64; 4],
    /// Argument of perihelion, degrees.
    pub argp: [f64; 4],
    /// Mean anomaly at T = 0, degrees.
    pub m0: f64,
    /// XM = x0 + x1 T + x2 T², degrees per century.
    pub xm: [f64; 3],
}

const fn row(
    a_au: f64,
    e: [f64; 4],
    i: [f64; 4],
    node: [f64; 4],
    argp: [f64; 4],
    m0: f64,
    xm: [f64; 3],
) -> MgaElements {
    MgaElements {
        a_au,
        e,
        i,
        node,
        argp,
        m0,
        xm,
    }
}

/// Mercury to Saturn, transcribed from the reference page.
const TABLE: [MgaElements; 6] = [
    row(
        0.38709860,
        [0.205614210, 0.000020460, -0.000000030, 0.0],
        [
            7.002880555555555560,
            1.86083333333333333e-3,
            -1.83333333333333333e-5,
            0.0,
        ],
        [
            4.71459444444444444e+1,
            1.185208333333333330,
            1.73888888888888889e-4,
            0.0,
        ],
        [
            2.87537527777777778e+1,
            3.70280555555555556e-1,
            1.20833333333333333e-4,
            0.0,
        ],
        1.02279380555555556e2,
        [1.49472515288888889e+5, 6.38888888888888889e-6, 0.0],
    ),
    row(
        0.72333160,
        [0.006820690, -0.000047740, 0.0000000910, 0.0],
        [
            3.393630555555555560,
            1.00583333333333333e-3,
            -9.72222222222222222e-7,
            0.0,
        ],
        [7.57796472222222222e+1, 8.9985e-1, 4.1e-4, 0.0],
        [
            5.43841861111111111e+1,
            5.08186111111111111e-1,
            -1.38638888888888889e-3,
            0.0,
        ],
        2.12603219444444444e2,
        [5.8517803875e+4, 1.28605555555555556e-3, 0.0],
    ),
    row(
        1.000000230,
        [0.016751040, -0.000041800, -0.0000001260, 0.0],
        [0.0, 0.0, 0.0, 0.0],
        [0.0, 0.0, 0.0, 0.0],
        [
            1.01220833333333333e+2,
            1.7191750,
            4.52777777777777778e-4,
            3.33333333333333333e-6,
        ],
        3.58475844444444444e2,
        [
            3.599904975e+4,
            -1.50277777777777778e-4,
            -3.33333333333333333e-6,
        ],
    ),
    row(
        1.5236883990,
        [0.093312900, 0.0000920640, -0.0000000770, 0.0],
        [1.850333333333333330, -6.75e-4, 1.26111111111111111e-5, 0.0],
        [
            4.87864416666666667e+1,
            7.70991666666666667e-1,
            -1.38888888888888889e-6,
            -5.33333333333333333e-6,
        ],
        [
            2.85431761111111111e+2,
            1.069766666666666670,
            1.3125e-4,
            4.13888888888888889e-6,
        ],
        3.19529425e2,
        [
            1.91398585e+4,
            1.80805555555555556e-4,
            1.19444444444444444e-6,
        ],
    ),
    row(
        5.2025610,
        [0.048334750, 0.000164180, -0.00000046760, -0.00000000170],
        [
            1.308736111111111110,
            -5.69611111111111111e-3,
            3.88888888888888889e-6,
            0.0,
        ],
        [
            9.94433861111111111e+1,
            1.010530,
            3.52222222222222222e-4,
            -8.51111111111111111e-6,
        ],
        [
            2.73277541666666667e+2,
            5.99431666666666667e-1,
            7.0405e-4,
            5.07777777777777778e-6,
        ],
        2.25328327777777778e2,
        [
            3.03469202388888889e+3,
            -7.21588888888888889e-4,
            1.78444444444444444e-6,
        ],
    ),
    row(
        9.5547470,
        [0.055892320, -0.00034550, -0.0000007280, 0.000000000740],
        [
            2.492519444444444440,
            -3.91888888888888889e-3,
            -1.54888888888888889e-5,
            4.44444444444444444e-8,
        ],
        [
            1.12790388888888889e+2,
            8.73195138888888889e-1,
            -1.52180555555555556e-4,
            -5.30555555555555556e-6,
        ],
        [
            3.38307772222222222e+2,
            1.085220694444444440,
            9.78541666666666667e-4,
            9.91666666666666667e-6,
        ],
        1.75466216666666667e2,
        [
            1.22155146777777778e+3,
            -5.01819444444444444e-4,
            -5.19444444444444444e-6,
        ],
    ),
];

/// Instants the model is offered for: 1900-01-01 to 2100-12-31 (TDB). The benchmark states no
/// validity; its problems run 1997-2016.
pub fn range() -> (Tdb, Tdb) {
    // JD 2415020.5 = 1900-01-01 0h; JD 2488434.5 = 2101-01-01 0h (erfa.cal2jd).
    (Tdb::from_jd(2_415_020.5), Tdb::from_jd(2_488_434.5))
}

impl MgaElements {
    /// The model's row of a planet (Mercury to Saturn); `None` for the others.
    pub fn of(p: Planet) -> Option<&'static MgaElements> {
        let k = match p {
            Planet::Mercury => 0,
            Planet::Venus => 1,
            Planet::Earth => 2,
            Planet::Mars => 3,
            Planet::Jupiter => 4,
            Planet::Saturn => 5,
            _ => return None,
        };
        Some(&TABLE[k])
    }

    /// State at `t`, without the range check.
    pub fn state_unchecked(&self, t: Tdb) -> Result<State, EphemerisError> {
        let tc = (t.mjd2000() + 36_525.0) / 36_525.0;
        let cubic = |c: &[f64; 4]| c[0] + tc * (c[1] + tc * (c[2] + tc * c[3]));
        let e = cubic(&self.e);
        let i = cubic(&self.i) * DEG;
        let node = cubic(&self.node) * DEG;
        let argp = cubic(&self.argp) * DEG;
        let xm = self.xm[0] + tc * (self.xm[1] + tc * self.xm[2]);
        let m = ((self.m0 + xm * tc) * DEG).rem_euclid(TAU);
        let ea = kepler::eccentric_anomaly(m, e);
        let nu = 2.0 * (((1.0 + e) / (1.0 - e)).sqrt() * (ea / 2.0).tan()).atan();
        let a = self.a_au * AU_KM;
        Elements {
            p: a * (1.0 - e * e),
            e,
            i,
            raan: node,
            argp,
            nu,
        }
        .to_state(MU_SUN)
        .map_err(|x| EphemerisError::Orbit(x.to_string()))
    }

    /// Semi-major axis, km.
    pub fn a_km(&self) -> f64 {
        self.a_au * AU_KM
    }
}

impl Ephemeris for MgaElements {
    fn state(&self, t: Tdb) -> Result<State, EphemerisError> {
        check_range(t, range())?;
        self.state_unchecked(t)
    }
    fn valid_range(&self) -> (Tdb, Tdb) {
        range()
    }
}

/// The model's constants of a planet: μ and the radii used to scale periapsis bounds, with the
/// catalogue's default minimum altitude; the sphere of influence from the model's a, μ and μ☉.
/// Saturn's μ is the pure swing-by problems' 37.9e6 km³/s² (the problems with manoeuvres end in
/// a rendezvous at Saturn, where μ plays no part).
pub fn planet_data(p: Planet) -> Option<BodyData> {
    let (mu, radius_km) = match p {
        Planet::Mercury => (22_321.0, 2_440.0),
        Planet::Venus => (324_860.0, 6_052.0),
        Planet::Earth => (398_601.19, 6_378.0),
        Planet::Mars => (42_828.3, 3_397.0),
        Planet::Jupiter => (126.7e6, 71_492.0),
        Planet::Saturn => (37.9e6, 60_330.0),
        _ => return None,
    };
    let a = MgaElements::of(p)?.a_km();
    Some(BodyData {
        mu,
        radius_km,
        min_altitude_km: p.data().min_altitude_km,
        soi_km: a * (mu / MU_SUN).powf(0.4),
    })
}
