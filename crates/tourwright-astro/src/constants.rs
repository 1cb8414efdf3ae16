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
