//! Physics only: time scales, constants, bodies, ephemerides, two-body motion, Lambert arcs and
//! swing-by geometry. No files, no GUI, no threads: pure functions on `f64` and nalgebra vectors.

pub mod bodies;
pub mod constants;
pub mod ephemeris;
pub mod flyby;
pub mod kepler;
pub mod kernel;
pub mod lambert;
pub mod mga_model;
pub mod nbody;
pub mod source;
pub mod time;
pub mod tisserand;
pub mod transfer;
pub mod work;

/// A 3-vector of f64 (km or km/s in the engine's frame).
pub type Vec3 = nalgebra::Vector3<f64>;

/// Position (km) and velocity (km/s) in one frame at one instant.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct State {
    /// Position, km.
    pub r: Vec3,
    /// Velocity, km/s.
    pub v: Vec3,
}
