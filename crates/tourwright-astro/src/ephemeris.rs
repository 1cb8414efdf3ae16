//! Ephemerides behind one trait. The built-in source is JPL's approximate Keplerian elements with
//! linear rates (E. M. Standish, "Keplerian Elements for Approximate Positions of the Major
//! Planets", JPL Solar System Dynamics, Table 1, valid 1800 AD - 2050 AD). Earth is the Earth-Moon
//! barycentre of that table (the table has no separate Earth); the ~4 700 km offset to the geocentre
//! is below the table's own error. User bodies (asteroids, comets) use osculating elements at an
//! epoch, propagated as two-body orbits about the Sun.
//!
//! Output: heliocentric ecliptic J2000 position (km) and velocity (km/s).

use std::f64::consts::TAU;

use serde::{Deserialize, Serialize};

use crate::bodies::Planet;
use crate::constants::{AU_KM, DAY_S, DEG, JULIAN_CENTURY_DAYS, MU_SUN};
use crate::kepler::{self, Elements};
use crate::kernel::SpkKernel;
use crate::mga_model::MgaElements;
use crate::time::{Epoch, Tdb};
use crate::{State, Vec3};

pub use crate::source::{
    Ephemeris, EphemerisError, check_range, ecliptic_to_equatorial, equatorial_to_ecliptic,
};

/// One row of the mean-element table: values at J2000 and rates per Julian century.
/// a in AU, e, then angles in degrees: I, L (mean longitude), ϖ (longitude of perihelion),
/// Ω (longitude of the ascending node).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MeanElements {
    /// Values at J2000: a, e, I, L, ϖ, Ω.
    pub at_j2000: [f64; 6],
    /// Rates per Julian century (TDB).
    pub per_century: [f64; 6],
}

/// The accuracy we document for the mean elements: worst heliocentric ecliptic longitude
/// difference (arcseconds) and distance difference (km) against JPL's DE421 over 1900-2050,
/// measured by `tests/de421.rs` (3 001 epochs; Earth compared as the Earth-Moon barycentre) and
/// rounded up. Standish's own error column for 1800-2050, as we remember it (15", 20", 20", 40",
/// 400", 600", 50", 10", 5"), is smaller for Mars and beyond; the measured figures are what
/// designs get.
pub const MEAN_ELEMENT_ACCURACY: [(Planet, f64, f64); 9] = [
    (Planet::Mercury, 35.0, 2_500.0),
    (Planet::Venus, 30.0, 7_000.0),
    (Planet::Earth, 25.0, 9_000.0),
    (Planet::Mars, 110.0, 45_000.0),
    (Planet::Jupiter, 550.0, 700_000.0),
    (Planet::Saturn, 800.0, 3_000_000.0),
    (Planet::Uranus, 120.0, 1_700_000.0),
    (Planet::Neptune, 65.0, 1_700_000.0),
    (Planet::Pluto, 65.0, 1_400_000.0),
];

/// Standish Table 1 (1800 AD - 2050 AD), transcribed from memory and checked against ERFA's
/// `plan94` through pyerfa (tests/fixtures/ephemeris).
const STANDISH_1800_2050: [MeanElements; 9] = [
    MeanElements {
        at_j2000: [
            0.38709927,
            0.20563593,
            7.00497902,
            252.25032350,
            77.45779628,
            48.33076593,
        ],
        per_century: [
            0.00000037,
            0.00001906,
            -0.00594749,
            149472.67411175,
            0.16047689,
            -0.12534081,
        ],
    },
    MeanElements {
        at_j2000: [
            0.72333566,
            0.00677672,
            3.39467605,
            181.97909950,
            131.60246718,
            76.67984255,
        ],
        per_century: [
            0.00000390,
            -0.00004107,
            -0.00078890,
            58517.81538729,
            0.00268329,
            -0.27769418,
        ],
    },
    MeanElements {
        at_j2000: [
            1.00000261,
            0.01671123,
            -0.00001531,
            100.46457166,
            102.93768193,
            0.0,
        ],
        per_century: [
            0.00000562,
            -0.00004392,
            -0.01294668,
            35999.37244981,
            0.32327364,
            0.0,
        ],
    },
    MeanElements {
        at_j2000: [
            1.52371034,
            0.09339410,
            1.84969142,
            -4.55343205,
            -23.94362959,
            49.55953891,
        ],
        per_century: [
            0.00001847,
            0.00007882,
            -0.00813131,
            19140.30268499,
            0.44441088,
            -0.29257343,
        ],
    },
    MeanElements {
        at_j2000: [
            5.20288700,
            0.04838624,
            1.30439695,
            34.39644051,
            14.72847983,
            100.47390909,
        ],
        per_century: [
            -0.00011607,
            -0.00013253,
            -0.00183714,
            3034.74612775,
            0.21252668,
            0.20469106,
        ],
    },
    MeanElements {
        at_j2000: [
            9.53667594,
            0.05386179,
            2.48599187,
            49.95424423,
            92.59887831,
            113.66242448,
        ],
        per_century: [
            -0.00125060,
            -0.00050991,
            0.00193609,
            1222.49362201,
            -0.41897216,
            -0.28867794,
        ],
    },
    MeanElements {
        at_j2000: [
            19.18916464,
            0.04725744,
            0.77263783,
            313.23810451,
            170.95427630,
            74.01692503,
        ],
        per_century: [
            -0.00196176,
            -0.00004397,
            -0.00242939,
            428.48202785,
            0.40805281,
            0.04240589,
        ],
    },
    MeanElements {
        at_j2000: [
            30.06992276,
            0.00859048,
            1.77004347,
            -55.12002969,
            44.96476227,
            131.78422574,
        ],
        per_century: [
            0.00026291,
            0.00005105,
            0.00035372,
            218.45945325,
            -0.32241464,
            -0.00508664,
        ],
    },
    MeanElements {
        at_j2000: [
            39.48211675,
            0.24882730,
            17.14001206,
            238.92903833,
            224.06891629,
            110.30393684,
        ],
        per_century: [
            -0.00031596,
            0.00005170,
            0.00004818,
            145.20780515,
            -0.04062942,
            -0.01183482,
        ],
    },
];

/// Validity of the 1800-2050 table: from 1800-01-01 00:00 to the end of 2050-12-31 UTC, inclusive
/// (the end is 2051-01-01 00:00:00 UTC, which is 69.184 s later in TDB, rounded up to 70 s).
pub fn mean_element_range() -> (Tdb, Tdb) {
    // JD 2378496.5 = 1800-01-01 0h (MJD −21504); JD 2470172.5 = 2051-01-01 0h (MJD 70172), both
    // from erfa.cal2jd (see tests/astro_reference_tables.rs).
    (
        Tdb::from_jd(2_378_496.5),
        Tdb::from_jd(2_470_172.5).plus_days(70.0 / 86_400.0),
    )
}

impl MeanElements {
    /// The table row of a planet.
    pub fn of(planet: Planet) -> &'static MeanElements {
        &STANDISH_1800_2050[planet as usize]
    }

    /// State at `t` without the range check (used for drawing orbits just outside the range).
    #[inline]
    pub fn state_unchecked(&self, t: Tdb) -> State {
        let tc = t.0 / (JULIAN_CENTURY_DAYS * DAY_S);
        let el = |k: usize| self.at_j2000[k] + self.per_century[k] * tc;
        let a = el(0) * AU_KM;
        let e = el(1);
        let inc = el(2) * DEG;
        let l = el(3) * DEG;
        let varpi = el(4) * DEG;
        let node = el(5) * DEG;
        let argp = varpi - node;
        let m = (l - varpi).rem_euclid(TAU);
        let ea = kepler::eccentric_anomaly(m, e);
        let (se, ce) = ea.sin_cos();
        // Mean motion from the table's own mean-longitude rate, so that velocity and positions
        // agree with each other (the rate differs from √(μ☉/a³) by the planet's mass and by the
        // table's fit).
        let n = self.per_century[3] * DEG / (JULIAN_CENTURY_DAYS * DAY_S);
        let b = (1.0 - e * e).sqrt();
        let xp = a * (ce - e);
        let yp = a * b * se;
        let edot = n / (1.0 - e * ce);
        let vxp = -a * se * edot;
        let vyp = a * b * ce * edot;
        let rot = kepler::perifocal_to_inertial(node, inc, argp);
        State {
            r: rot * Vec3::new(xp, yp, 0.0),
            v: rot * Vec3::new(vxp, vyp, 0.0),
        }
    }

    /// Orbital period at J2000 from the mean-longitude rate, days.
    pub fn period_days(&self) -> f64 {
        360.0 / self.per_century[3] * JULIAN_CENTURY_DAYS
    }

    /// Semi-major axis at J2000, km.
    pub fn a_km(&self) -> f64 {
        self.at_j2000[0] * AU_KM
    }
}

impl Ephemeris for MeanElements {
    fn state(&self, t: Tdb) -> Result<State, EphemerisError> {
        check_range(t, self.valid_range())?;
        Ok(self.state_unchecked(t))
    }
    fn valid_range(&self) -> (Tdb, Tdb) {
        mean_element_range()
    }
}

impl Ephemeris for Planet {
    fn state(&self, t: Tdb) -> Result<State, EphemerisError> {
        MeanElements::of(*self).state(t)
    }
    fn valid_range(&self) -> (Tdb, Tdb) {
        mean_element_range()
    }
}

/// The ephemeris of one catalogue planet under a chosen model.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum PlanetEphemeris {
    /// A row of the Standish 1800-2050 mean-element table.
    Standish(&'static MeanElements),
    /// A row of the multiple-gravity-assist benchmark's model.
    Mga(&'static MgaElements),
    /// A planet read from a JPL SPK kernel.
    Kernel(&'static SpkKernel, Planet),
}

impl PlanetEphemeris {
    /// State at `t` without the range check (for drawing whole orbits near the ends of a range).
    pub fn state_unchecked(&self, t: Tdb) -> Result<State, EphemerisError> {
        match self {
            PlanetEphemeris::Standish(m) => Ok(m.state_unchecked(t)),
            PlanetEphemeris::Mga(m) => m.state_unchecked(t),
            PlanetEphemeris::Kernel(k, p) => k.state_of(*p, t),
        }
    }

    /// Semi-major axis of the orbit this model gives the planet, km.
    pub fn a_km(&self) -> f64 {
        match self {
            PlanetEphemeris::Standish(m) => m.a_km(),
            PlanetEphemeris::Mga(m) => m.a_km(),
            // The mean orbit's size: used for periods and drawing scales only.
            PlanetEphemeris::Kernel(_, p) => MeanElements::of(*p).a_km(),
        }
    }
}

impl Ephemeris for PlanetEphemeris {
    #[inline]
    fn state(&self, t: Tdb) -> Result<State, EphemerisError> {
        match self {
            PlanetEphemeris::Standish(m) => m.state(t),
            PlanetEphemeris::Mga(m) => m.state(t),
            PlanetEphemeris::Kernel(k, p) => k.state_of(*p, t),
        }
    }
    fn valid_range(&self) -> (Tdb, Tdb) {
        match self {
            PlanetEphemeris::Standish(m) => m.valid_range(),
            PlanetEphemeris::Mga(m) => m.valid_range(),
            PlanetEphemeris::Kernel(k, p) => k.coverage(*p).unwrap_or(k.range()),
        }
    }
}

/// A selectable model of the planets: where they are and the constants that go with them (μ☉
/// included: the benchmark model has its own).
#[derive(Clone, Debug, Default, PartialEq)]
pub enum EphemerisModel {
    /// JPL approximate Keplerian elements, 1800-2050 (Standish), with the catalogue's constants.
    #[default]
    MeanElements,
    /// The published multiple-gravity-assist benchmark's analytic model (Mercury to Saturn) with
    /// its own μ, radii, AU and μ☉.
    MgaBenchmark,
    /// A JPL development ephemeris read from an SPK kernel, with the catalogue's constants.
    Kernel(&'static SpkKernel),
}

impl EphemerisModel {
    /// Short name shown in the status bar and reports.
    pub fn name(&self) -> String {
        match self {
            EphemerisModel::MeanElements => "JPL mean elements 1800-2050".into(),
            EphemerisModel::MgaBenchmark => "MGA benchmark model".into(),
            EphemerisModel::Kernel(k) => format!("JPL kernel {}", k.file_name()),
        }
    }

    /// The ephemeris of a planet under this model.
    pub fn planet(&self, p: Planet) -> Result<PlanetEphemeris, EphemerisError> {
        match self {
            EphemerisModel::MeanElements => Ok(PlanetEphemeris::Standish(MeanElements::of(p))),
            EphemerisModel::MgaBenchmark => {
                MgaElements::of(p).map(PlanetEphemeris::Mga).ok_or_else(|| {
                    EphemerisError::NoBody(format!(
                        "{} is not in the MGA benchmark model",
                        p.name()
                    ))
                })
            }
            EphemerisModel::Kernel(k) => {
                k.coverage(p).ok_or_else(|| {
                    EphemerisError::NoBody(format!(
                        "{} is not in the kernel {}",
                        p.name(),
                        k.file_name()
                    ))
                })?;
                Ok(PlanetEphemeris::Kernel(k, p))
            }
        }
    }

    /// Physical constants of a planet under this model.
    pub fn planet_data(&self, p: Planet) -> crate::bodies::BodyData {
        match self {
            EphemerisModel::MeanElements | EphemerisModel::Kernel(_) => p.data(),
            EphemerisModel::MgaBenchmark => crate::mga_model::planet_data(p).unwrap_or(p.data()),
        }
    }

    /// The heliocentric gravitational parameter that goes with this model, km³/s².
    pub fn mu_sun(&self) -> f64 {
        match self {
            EphemerisModel::MeanElements | EphemerisModel::Kernel(_) => MU_SUN,
            EphemerisModel::MgaBenchmark => crate::mga_model::MU_SUN,
        }
    }

    /// The astronomical unit that goes with this model, km (user bodies' elements are in AU).
    pub fn au_km(&self) -> f64 {
        match self {
            EphemerisModel::MeanElements | EphemerisModel::Kernel(_) => AU_KM,
            EphemerisModel::MgaBenchmark => crate::mga_model::AU_KM,
        }
    }

    /// Instants this model covers.
    pub fn range(&self) -> (Tdb, Tdb) {
        match self {
            EphemerisModel::MeanElements => mean_element_range(),
            EphemerisModel::MgaBenchmark => crate::mga_model::range(),
            EphemerisModel::Kernel(k) => k.range(),
        }
    }
}

/// Heliocentric osculating elements of a user body at an epoch, in the units designers write:
/// a in AU (negative for hyperbolic comets; use `q_au` for parabolas), angles in degrees.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct OsculatingElements {
    /// Epoch of the elements.
    pub epoch: Epoch,
    /// Perihelion distance, AU (works for every conic).
    pub q_au: f64,
    /// Eccentricity.
    pub e: f64,
    /// Inclination to the ecliptic J2000, degrees.
    pub i_deg: f64,
    /// Longitude of the ascending node, degrees.
    pub raan_deg: f64,
    /// Argument of perihelion, degrees.
    pub argp_deg: f64,
    /// Mean anomaly at epoch, degrees: M = E − e sin E (ellipse), M = e sinh H − H (hyperbola),
    /// M = D + D³/3 with D = tan(ν/2) (parabola).
    pub mean_anomaly_deg: f64,
}

/// A two-body heliocentric orbit, valid 1800-2050 like the planets (propagation far from the
/// element epoch loses meaning for small bodies, and the design uses one range for all bodies).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OsculatingOrbit {
    /// Elements as given.
    pub elements: OsculatingElements,
    /// Time since perihelion at the element epoch, s (derived once).
    tp_offset_s: f64,
    /// The element epoch as engine time (converted once).
    t_elements: Tdb,
    /// Heliocentric gravitational parameter the orbit is propagated with, km³/s².
    mu_sun: f64,
    /// Kilometres per AU of the elements.
    au_km: f64,
}

impl OsculatingOrbit {
    /// Build from elements with the program's own μ☉ and AU; fails for non-physical values.
    pub fn new(el: OsculatingElements) -> Result<Self, EphemerisError> {
        Self::with_constants(el, MU_SUN, AU_KM)
    }

    /// Build from elements read with an ephemeris model's μ☉ (km³/s²) and AU (km), so that a
    /// user body moves in the same solar system as the model's planets.
    pub fn with_constants(
        el: OsculatingElements,
        mu_sun: f64,
        au_km: f64,
    ) -> Result<Self, EphemerisError> {
        if !(el.q_au > 0.0) || !(el.e >= 0.0) || !el.q_au.is_finite() || !el.e.is_finite() {
            return Err(EphemerisError::Orbit(
                "perihelion distance must be positive and eccentricity non-negative".into(),
            ));
        }
        let tp_offset_s = if el.e < 1.0 {
            let a = el.q_au * au_km / (1.0 - el.e);
            let n = (mu_sun / (a * a * a)).sqrt();
            el.mean_anomaly_deg * DEG / n
        } else {
            let q = el.q_au * au_km;
            if (el.e - 1.0).abs() < 1e-9 {
                el.mean_anomaly_deg * DEG / (mu_sun / (2.0 * q * q * q)).sqrt()
            } else {
                let a = q / (el.e - 1.0);
                el.mean_anomaly_deg * DEG / (mu_sun / (a * a * a)).sqrt()
            }
        };
        if !tp_offset_s.is_finite() {
            return Err(EphemerisError::Orbit(
                "the mean anomaly and perihelion distance give no finite time from perihelion"
                    .into(),
            ));
        }
        Ok(OsculatingOrbit {
            elements: el,
            tp_offset_s,
            t_elements: el.epoch.tdb(),
            mu_sun,
            au_km,
        })
    }
}

impl OsculatingOrbit {
    /// Kilometres per AU the elements are read with.
    pub fn au_km(&self) -> f64 {
        self.au_km
    }

    /// Heliocentric gravitational parameter the orbit moves under, km³/s².
    pub fn mu_sun(&self) -> f64 {
        self.mu_sun
    }
}

impl Ephemeris for OsculatingOrbit {
    fn state(&self, t: Tdb) -> Result<State, EphemerisError> {
        check_range(t, self.valid_range())?;
        let el = &self.elements;
        let q = el.q_au * self.au_km;
        let dt = t.0 - self.t_elements.0 + self.tp_offset_s;
        let nu = kepler::true_anomaly_from_time(q, el.e, self.mu_sun, dt);
        let e = Elements {
            p: q * (1.0 + el.e),
            e: el.e,
            i: el.i_deg * DEG,
            raan: el.raan_deg * DEG,
            argp: el.argp_deg * DEG,
            nu,
        };
        e.to_state(self.mu_sun)
            .map_err(|x| EphemerisError::Orbit(x.to_string()))
    }
    fn valid_range(&self) -> (Tdb, Tdb) {
        mean_element_range()
    }
}
