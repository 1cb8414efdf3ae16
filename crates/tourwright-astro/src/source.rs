//! What every ephemeris source shares: the trait, its error, the range check and the rotation
//! between the ecliptic and equatorial J2000 frames. A module of its own so that the sources
//! (mean elements in `ephemeris`, the benchmark model in `mga_model`, SPK kernels in `kernel`)
//! depend on it and not on each other.

use crate::time::Tdb;
use crate::{State, Vec3};

/// Why a state could not be given.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum EphemerisError {
    /// The epoch lies outside the source's validity interval.
    #[error("epoch {epoch} outside the ephemeris range {from} .. {to}")]
    OutOfRange {
        /// The epoch asked for (ISO text).
        epoch: String,
        /// Start of validity (ISO text).
        from: String,
        /// End of validity (ISO text).
        to: String,
    },
    /// The orbit could not be evaluated (degenerate elements).
    #[error("orbit cannot be evaluated: {0}")]
    Orbit(String),
    /// The source has no such body.
    #[error("{0}")]
    NoBody(String),
    /// An ephemeris kernel could not be used (file named in the text).
    #[error("ephemeris kernel {0}")]
    Kernel(String),
}

/// A source of heliocentric ecliptic J2000 states.
pub trait Ephemeris {
    /// Position (km) and velocity (km/s) at `t`.
    fn state(&self, t: Tdb) -> Result<State, EphemerisError>;
    /// First and last instants this source is valid for.
    fn valid_range(&self) -> (Tdb, Tdb);
}

/// An error unless `t` lies within `range` (inclusive).
pub fn check_range(t: Tdb, range: (Tdb, Tdb)) -> Result<(), EphemerisError> {
    if !(t.0 >= range.0.0 && t.0 <= range.1.0) {
        return Err(EphemerisError::OutOfRange {
            epoch: if t.0.is_finite() {
                t.to_date_utc()
            } else {
                "not a number".into()
            },
            from: range.0.to_date_utc(),
            to: range.1.to_date_utc(),
        });
    }
    Ok(())
}

/// Rotate an ecliptic J2000 vector into the Earth mean equator and equinox of J2000 (EME2000)
/// about x by the obliquity.
pub fn ecliptic_to_equatorial(v: &Vec3) -> Vec3 {
    let (s, c) = crate::constants::OBLIQUITY_J2000_RAD.sin_cos();
    Vec3::new(v.x, c * v.y - s * v.z, s * v.y + c * v.z)
}

/// Inverse of [`ecliptic_to_equatorial`].
pub fn equatorial_to_ecliptic(v: &Vec3) -> Vec3 {
    let (s, c) = crate::constants::OBLIQUITY_J2000_RAD.sin_cos();
    Vec3::new(v.x, c * v.y + s * v.z, -s * v.y + c * v.z)
}
