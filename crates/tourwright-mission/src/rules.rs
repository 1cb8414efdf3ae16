//! The rules every part of the program applies the same way: when an altitude counts as below
//! its minimum, when a ballistic leg misses its next body, which numbers are shown at all.

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

/// Default largest miss of the next body a shaped swing-by's ballistic leg may have, km. Ours,
/// justified: patched conics place the next swing-by at the body's centre, and a miss shifts its
/// B-vector by up to the miss; 1 000 km is a tenth of a terrestrial-planet swing-by's |B| (about
/// 10 000 km at a few km/s), so the swing-by the design shows is the one that happens, and it is
/// the accuracy to which the searches close a ballistic return. It is far below any planet's
/// sphere of influence (Mercury's is 112 000 km), which the program used before and which let a
/// 28 000 km miss read as "no warnings".
pub const DEFAULT_MAX_MISS_KM: f64 = 1_000.0;

/// True when `altitude_km` is below `min_km` by more than the tolerance.
#[inline]
pub fn below_minimum(altitude_km: f64, min_km: f64) -> bool {
    altitude_km < min_km - ALTITUDE_TOLERANCE_KM
}

/// True when a ballistic leg ends farther than `tolerance_km` from its next body (the shaped
/// swing-by's `max_miss_km`).
#[inline]
pub fn misses(miss_km: f64, tolerance_km: f64) -> bool {
    !(miss_km <= tolerance_km)
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
