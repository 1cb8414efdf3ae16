//! The body catalogue (Sun, planets, Pluto) and user bodies defined by osculating elements.

use serde::{Deserialize, Serialize};

use crate::constants::{MU_SUN, R_SUN_KM};

/// A body of the built-in catalogue.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize, PartialOrd, Ord)]
pub enum Planet {
    /// Mercury.
    Mercury,
    /// Venus.
    Venus,
    /// Earth (its heliocentric orbit is that of the Earth-Moon barycentre).
    Earth,
    /// Mars.
    Mars,
    /// Jupiter.
    Jupiter,
    /// Saturn.
    Saturn,
    /// Uranus.
    Uranus,
    /// Neptune.
    Neptune,
    /// Pluto.
    Pluto,
}

/// Physical data of a body used in swing-by and capture computations.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BodyData {
    /// Gravitational parameter, km³/s².
    pub mu: f64,
    /// Equatorial radius, km.
    pub radius_km: f64,
    /// Default minimum swing-by altitude above the equatorial radius, km.
    pub min_altitude_km: f64,
    /// Sphere-of-influence radius (Laplace, a (μ/μ☉)^(2/5)), km.
    pub soi_km: f64,
}

impl Planet {
    /// Every catalogue planet, in order from the Sun.
    pub const ALL: [Planet; 9] = [
        Planet::Mercury,
        Planet::Venus,
        Planet::Earth,
        Planet::Mars,
        Planet::Jupiter,
        Planet::Saturn,
        Planet::Uranus,
        Planet::Neptune,
        Planet::Pluto,
    ];

    /// Display name.
    pub fn name(self) -> &'static str {
        match self {
            Planet::Mercury => "Mercury",
            Planet::Venus => "Venus",
            Planet::Earth => "Earth",
            Planet::Mars => "Mars",
            Planet::Jupiter => "Jupiter",
            Planet::Saturn => "Saturn",
            Planet::Uranus => "Uranus",
            Planet::Neptune => "Neptune",
            Planet::Pluto => "Pluto",
        }
    }

    /// One-letter abbreviation used in sequence strings (E-V-E-J); Mercury is `Me`, Mars `M`.
    pub fn letter(self) -> &'static str {
        match self {
            Planet::Mercury => "Me",
            Planet::Venus => "V",
            Planet::Earth => "E",
            Planet::Mars => "M",
            Planet::Jupiter => "J",
            Planet::Saturn => "S",
            Planet::Uranus => "U",
            Planet::Neptune => "N",
            Planet::Pluto => "P",
        }
    }

    /// Look a planet up by name or sequence letter (case-insensitive).
    pub fn from_name(s: &str) -> Option<Planet> {
        let s = s.trim();
        Planet::ALL
            .into_iter()
            .find(|p| p.name().eq_ignore_ascii_case(s) || p.letter().eq_ignore_ascii_case(s))
    }

    /// Physical data.
    ///
    /// μ: JPL DE440 planetary constants (Park et al. 2021, AJ 161:105), from memory; the Earth value
    /// is the planet alone (398 600.4418, common practice for orbits about Earth), Mars to Pluto are
    /// system values (planet plus moons), as used for swing-bys outside the moons' orbits.
    /// Radii: IAU WGCCRE 2015 report (Archinal et al. 2018), equatorial, from memory.
    /// Minimum altitudes: common practice for concept studies (atmosphere and safety margins for the
    /// terrestrial planets; radiation (Jupiter) and ring (Saturn) clearance for the giants), rounded.
    pub fn data(self) -> BodyData {
        let (mu, radius_km, min_altitude_km, a_au) = match self {
            Planet::Mercury => (22_031.868_551, 2_440.53, 200.0, 0.387_099),
            Planet::Venus => (324_858.592, 6_051.8, 300.0, 0.723_336),
            Planet::Earth => (398_600.4418, 6_378.1366, 300.0, 1.000_003),
            Planet::Mars => (42_828.375_816, 3_396.19, 200.0, 1.523_710),
            Planet::Jupiter => (126_712_764.1, 71_492.0, 300_000.0, 5.202_887),
            Planet::Saturn => (37_940_584.841_8, 60_268.0, 80_000.0, 9.536_676),
            Planet::Uranus => (5_794_556.4, 25_559.0, 5_000.0, 19.189_165),
            Planet::Neptune => (6_836_527.100_58, 24_764.0, 1_000.0, 30.069_923),
            Planet::Pluto => (975.5, 1_188.3, 100.0, 39.482_117),
        };
        BodyData {
            mu,
            radius_km,
            min_altitude_km,
            soi_km: a_au * crate::constants::AU_KM * (mu / MU_SUN).powf(0.4),
        }
    }
}

/// Data of the Sun (for completeness of the catalogue and for drawing).
pub fn sun_data() -> BodyData {
    BodyData {
        mu: MU_SUN,
        radius_km: R_SUN_KM,
        min_altitude_km: 0.0,
        soi_km: f64::INFINITY,
    }
}
