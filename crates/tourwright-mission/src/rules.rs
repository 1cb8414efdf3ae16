//! The rules every part of the program applies the same way: when an altitude counts as below
//! its minimum, when a ballistic leg misses its next body, which numbers are shown at all.

use tourwright_astro::bodies::BodyData;

/// Default smallest v∞ of a swing-by, km/s (common practice for patched-conic concept work):
/// below about 1 km/s the spacecraft spends weeks inside the planet's sphere of influence (Earth's
/// is about 925 000 km across), the "instantaneous swing-by" of patched conics no longer holds, and
/// an encounter at such a speed is a deferred launch or a capture, not a swing-by.
pub const DEFAULT_MIN_VINF_KM_S: f64 = 1.0;

/// Default design limit on a powered swing-by's periapsis impulse, km/s (common practice: a burn
/// at low altitude is kept to a few hundred m/s, rarely above 1 km/s, because a pointing or
/// timing error there is amplified through the hyperbola; larger Δv is flown as deep-space
/// manoeuvres).
pub const DEFAULT_MAX_POWERED_DV_KM_S: f64 = 1.0;

/// An altitude this far below the minimum still counts as meeting it (rounding of typed values
/// and of the powered swing-by's periapsis solution), km.
pub const ALTITUDE_TOLERANCE_KM: f64 = 1e-3;

/// A speed limit (swing-by minimum v∞, powered-Δv limit) this close still counts as met, km/s:
/// 1 mm/s, the rounding of a search that lands on the limit from either side.
pub const SPEED_TOLERANCE_KM_S: f64 = 1e-6;

/// A total time of flight this far over its limit still counts as meeting it, days (a
/// microsecond: the rounding of epochs written to a file).
pub const TOF_TOLERANCE_DAYS: f64 = 1e-6 / 86_400.0;

/// The smallest "sphere" a ballistic leg must reach at its next body, km: bodies without a
/// sphere of influence (massless user bodies) still need a finite target.
pub const MIN_ARRIVAL_SPHERE_KM: f64 = 1.0e4;

/// True when `altitude_km` is below `min_km` by more than the tolerance.
#[inline]
pub fn below_minimum(altitude_km: f64, min_km: f64) -> bool {
    altitude_km < min_km - ALTITUDE_TOLERANCE_KM
}

/// How far from the next body a ballistic leg may end and still count as meeting it, km: the
/// body's sphere of influence (Laplace), at least [`MIN_ARRIVAL_SPHERE_KM`].
#[inline]
pub fn arrival_sphere_km(next: &BodyData) -> f64 {
    next.soi_km.max(MIN_ARRIVAL_SPHERE_KM)
}

/// True when a ballistic leg ends outside the next body's arrival sphere.
#[inline]
pub fn misses(miss_km: f64, next: &BodyData) -> bool {
    !(miss_km <= arrival_sphere_km(next))
}

/// What a retarget must achieve to count as a success, km: inside the arrival sphere and within
/// 100 000 km (a swing-by at the giants needs more precision than their huge spheres suggest).
#[inline]
pub fn retarget_tolerance_km(next: &BodyData) -> f64 {
    arrival_sphere_km(next).min(1.0e5)
}

/// A number fit to show: finite and not absurdly large. Anything else is shown as absent.
#[inline]
pub fn shown(x: f64) -> Option<f64> {
    (x.is_finite() && x.abs() < 1e15).then_some(x)
}

/// Default search bounds of a deep-space manoeuvre's place on its leg, as fractions of the leg's
/// time of flight (ours: the manoeuvre stays clear of both encounters).
pub const DSM_FRACTION_BOUNDS: (f64, f64) = (0.05, 0.95);

/// Default largest periapsis altitude the optimiser gives a shaped swing-by, km: a periapsis
/// radius of 20 planet radii (ours; far enough that the swing-by still turns usefully at typical
/// v∞, near enough to stay well inside every planet's sphere of influence).
pub fn default_max_altitude_km(radius_km: f64) -> f64 {
    19.0 * radius_km.max(1.0)
}

/// Default largest launch v∞ the optimiser may choose when the design gives no C3 limit, km/s
/// (ours: C3 49 km²/s², beyond most launch vehicles with a useful payload).
pub const DEFAULT_MAX_LAUNCH_VINF_KM_S: f64 = 7.0;
