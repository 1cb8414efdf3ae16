//! Physical constants used by the engine. Each value names its source beside it.

/// Astronomical unit, km. IAU 2012 Resolution B2 (exact by definition).
pub const AU_KM: f64 = 149_597_870.700;

/// Seconds per day (SI days of 86 400 s, as used for TDB day counts).
pub const DAY_S: f64 = 86_400.0;

/// Days per Julian year.
pub const JULIAN_YEAR_DAYS: f64 = 365.25;

/// Days per Julian century (the time unit of the mean-element ephemeris).
pub const JULIAN_CENTURY_DAYS: f64 = 36_525.0;

/// Obliquity of the ecliptic at J2000, rad. IAU 2006 precession (Capitaine et al. 2003):
/// ε0 = 84381.406 arcsec.
pub const OBLIQUITY_J2000_RAD: f64 = 84_381.406 / 3600.0 * std::f64::consts::PI / 180.0;

/// Standard gravitational acceleration, m/s² (CGPM 1901, exact), used by the rocket equation.
pub const G0_M_S2: f64 = 9.806_65;

/// Heliocentric gravitational parameter, km³/s². IAU 2015 Resolution B3 nominal value
/// (1.327 124 4 × 10^20 m³/s²); JPL DE440 gives 1.327 124 400 41 × 10^11 km³/s².
pub const MU_SUN: f64 = 1.327_124_400_41e11;

/// Nominal solar radius, km. IAU 2015 Resolution B3.
pub const R_SUN_KM: f64 = 695_700.0;

/// Degrees to radians.
pub const DEG: f64 = std::f64::consts::PI / 180.0;

/// Gravitational parameters that go with one planetary ephemeris (km³/s²): the Sun, each planet
/// (or planetary system, where the ephemeris carries the system's barycentre) in `Planet::ALL`
/// order, and the Earth and the Moon apart. For an n-body model to be consistent with the
/// ephemeris its positions came from, it uses the GM values that ephemeris was fitted with.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct GmSet {
    /// Name of the set, as reports show it.
    pub name: &'static str,
    /// The Sun.
    pub sun: f64,
    /// Mercury, Venus, Earth (the planet alone), Mars system, Jupiter system, Saturn system,
    /// Uranus system, Neptune system, Pluto system.
    pub planets: [f64; 9],
    /// The Moon.
    pub moon: f64,
}

impl GmSet {
    /// The Earth-Moon system (Earth + Moon), for models that carry only the barycentre.
    pub fn earth_moon(&self) -> f64 {
        self.planets[2] + self.moon
    }
}

/// Split a GM of the Earth-Moon barycentre into (Earth, Moon) with the Earth/Moon mass ratio.
const fn split_emb(emb: f64, emrat: f64) -> (f64, f64) {
    let moon = emb / (1.0 + emrat);
    (emb - moon, moon)
}

const DE421_EMB: (f64, f64) = split_emb(403_503.235_502, 81.300_569_069_915_3);
/// JPL DE421's constants (Folkner, Williams & Boggs 2009, IPN Progress Report 42-178, the
/// kernel's header constants: GM of the Sun, planetary systems, Earth-Moon barycentre and the
/// Earth/Moon mass ratio EMRAT), from memory.
pub const DE421_GM: GmSet = GmSet {
    name: "DE421 (Folkner et al. 2009; from memory)",
    sun: 132_712_440_040.944,
    planets: [
        22_032.09,
        324_858.592,
        DE421_EMB.0,
        42_828.375_214,
        126_712_764.8,
        37_940_585.2,
        5_794_548.6,
        6_836_535.0,
        977.0,
    ],
    moon: DE421_EMB.1,
};

const DE440_EMB: (f64, f64) = split_emb(403_503.235_625, 81.300_568_221_497_2);
/// JPL DE440's constants (Park et al. 2021, AJ 161:105, the kernel's header constants), from
/// memory. The program's body catalogue takes its planetary GM values from this set.
pub const DE440_GM: GmSet = GmSet {
    name: "DE440 (Park et al. 2021; from memory)",
    sun: 132_712_440_041.279_42,
    planets: [
        22_031.868_551,
        324_858.592,
        DE440_EMB.0,
        42_828.375_816,
        126_712_764.1,
        37_940_584.841_8,
        5_794_556.4,
        6_836_527.100_58,
        975.5,
    ],
    moon: DE440_EMB.1,
};
