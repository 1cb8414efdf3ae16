//! Heliocentric motion under the Sun and other bodies as point masses: the first step from
//! patched conics towards a high-fidelity check.
//!
//! Equations (heliocentric, so the Sun's acceleration by each body enters as the indirect term):
//! r̈ = −μ☉ r/|r|³ + Σⱼ μⱼ [ (rⱼ − r)/|rⱼ − r|³ − rⱼ/|rⱼ|³ ].
//! A body does not pull while the spacecraft is inside its sphere of influence: there the
//! patched-conic swing-by is the model, and a point mass at the arc's start (the planet's centre)
//! would be singular. Its pull ramps in smoothly between one and two radii of the sphere.
//!
//! Integrator: `ode_solvers`' Dormand-Prince 8(5,3) with adaptive steps.
//! Tolerances (per component, km and km/s): relative 1e-12, absolute 1e-8 by default.

use ode_solvers::dop853::Dop853;
use ode_solvers::{System, Vector6};

use crate::ephemeris::{Ephemeris, EphemerisError, PlanetEphemeris};
use crate::time::Tdb;
use crate::{State, Vec3};

/// A body that pulls on the spacecraft.
#[derive(Clone, Copy, Debug)]
pub struct Perturber<'a> {
    /// Gravitational parameter, km³/s².
    pub mu: f64,
    /// Inside this distance (km) the body does not pull (its sphere of influence).
    pub soi_km: f64,
    /// Where it is.
    pub source: PerturberSource<'a>,
}

/// Where a perturbing body is.
#[derive(Clone, Copy)]
pub enum PerturberSource<'a> {
    /// A planet of an ephemeris model (range checks off: the integrator may step a little past
    /// the ends of a leg).
    Planet(PlanetEphemeris),
    /// Any other source (user bodies, constructed test cases).
    Other(&'a (dyn Ephemeris + Sync)),
}

impl std::fmt::Debug for PerturberSource<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            PerturberSource::Planet(p) => write!(f, "Planet({p:?})"),
            PerturberSource::Other(_) => write!(f, "Other"),
        }
    }
}

impl PerturberSource<'_> {
    fn position(&self, t: Tdb) -> Option<Vec3> {
        match self {
            PerturberSource::Planet(p) => p.state_unchecked(t).ok().map(|s| s.r),
            PerturberSource::Other(e) => e.state(t).ok().map(|s| s.r),
        }
    }
}

/// Integration settings.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct NBodyOptions {
    /// Relative tolerance per step.
    pub rtol: f64,
    /// Absolute tolerance per step (km for positions, km/s for velocities).
    pub atol: f64,
    /// About how many points of the arc to keep for drawing (at least 2: start and end).
    pub samples: usize,
    /// Largest number of steps (the integration fails beyond it).
    pub max_steps: u32,
}

impl Default for NBodyOptions {
    fn default() -> Self {
        NBodyOptions {
            rtol: 1e-12,
            atol: 1e-8,
            samples: 2,
            max_steps: 200_000,
        }
    }
}

/// Why a propagation failed.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum NBodyError {
    /// The integrator gave up (step size too small, too many steps, stiffness).
    #[error("the n-body integration failed: {0}")]
    Integration(String),
    /// A body's position could not be had.
    #[error(transparent)]
    Ephemeris(#[from] EphemerisError),
    /// The caller cancelled.
    #[error("cancelled")]
    Cancelled,
    /// The arc has no length or a bad start.
    #[error("nothing to integrate: {0}")]
    Input(&'static str),
}

/// The result of a propagation.
#[derive(Clone, Debug, PartialEq)]
pub struct Propagated {
    /// State at the end.
    pub end: State,
    /// Points of the arc (step points, thinned): (instant, position), start and end included.
    pub track: Vec<(Tdb, Vec3)>,
    /// Right-hand-side evaluations.
    pub evaluations: u32,
}

struct Dynamics<'a, 'c> {
    mu_sun: f64,
    t0: f64,
    bodies: &'a [Perturber<'a>],
    cancel: &'c dyn Fn() -> bool,
    cancelled: bool,
    steps: u32,
}

impl Dynamics<'_, '_> {
    fn accel(&self, t: f64, r: &Vec3) -> Vec3 {
        let rn = r.norm();
        let mut a = -self.mu_sun / (rn * rn * rn) * r;
        for b in self.bodies {
            if b.mu == 0.0 {
                continue;
            }
            let Some(rj) = b.source.position(Tdb(self.t0 + t)) else {
                continue;
            };
            let d = rj - r;
            let dn = d.norm();
            let w = ramp(dn, b.soi_km);
            if w == 0.0 {
                continue;
            }
            let rjn = rj.norm();
            a += w * b.mu * (d / (dn * dn * dn) - rj / (rjn * rjn * rjn));
        }
        a
    }
}

/// How much of a body's pull acts at distance `d` from it: none inside its sphere of influence,
/// all beyond twice that, and a smooth step between (a sudden switch would be a discontinuity the
/// step-size control trips on).
fn ramp(d: f64, soi: f64) -> f64 {
    if soi <= 0.0 || d >= 2.0 * soi {
        return 1.0;
    }
    if d <= soi {
        return 0.0;
    }
    let x = d / soi - 1.0;
    x * x * (3.0 - 2.0 * x)
}

impl System<f64, Vector6<f64>> for Dynamics<'_, '_> {
    fn system(&self, t: f64, y: &Vector6<f64>, dy: &mut Vector6<f64>) {
        let r = Vec3::new(y[0], y[1], y[2]);
        let a = self.accel(t, &r);
        dy[0] = y[3];
        dy[1] = y[4];
        dy[2] = y[5];
        dy[3] = a.x;
        dy[4] = a.y;
        dy[5] = a.z;
    }

    fn solout(&mut self, _t: f64, _y: &Vector6<f64>, _dy: &Vector6<f64>) -> bool {
        self.steps += 1;
        // Checking the flag costs little; every 16 steps is often enough.
        if self.steps % 16 == 0 && (self.cancel)() {
            self.cancelled = true;
        }
        self.cancelled
    }
}

/// Propagate `start` from `t0` to `t1` under the Sun (`mu_sun`) and `bodies`.
pub fn propagate(
    start: &State,
    t0: Tdb,
    t1: Tdb,
    mu_sun: f64,
    bodies: &[Perturber<'_>],
    opts: &NBodyOptions,
    cancel: &dyn Fn() -> bool,
) -> Result<Propagated, NBodyError> {
    let span = t1.0 - t0.0;
    if !(span.is_finite() && span > 0.0) {
        return Err(NBodyError::Input("the arc must run forward in time"));
    }
    if !(start.r.norm() > 0.0 && start.r.iter().chain(start.v.iter()).all(|x| x.is_finite())) {
        return Err(NBodyError::Input("the start state is not finite"));
    }
    let n = opts.samples.max(2);
    let dx = span / (n - 1) as f64;
    let y0 = Vector6::new(
        start.r.x, start.r.y, start.r.z, start.v.x, start.v.y, start.v.z,
    );
    let sys = Dynamics {
        mu_sun,
        t0: t0.0,
        bodies,
        cancel,
        cancelled: false,
        steps: 0,
    };
    // Parameters as `Dop853::new` sets them, with our step limit.
    let mut stepper = Dop853::from_param(
        sys,
        0.0,
        span,
        dx,
        y0,
        opts.rtol,
        opts.atol,
        0.9,
        0.0,
        0.333,
        6.0,
        span,
        0.0,
        opts.max_steps,
        // Stiffness tests off: gravity is not stiff, and the ramp's bend must not stop a leg.
        u32::MAX,
        // Sparse: every accepted step, the last one exactly at the end. (ode_solvers 0.6.2's
        // dense output is wrong when the only requested point is the end of the span.)
        ode_solvers::dop_shared::OutputType::Sparse,
    );
    let stats = stepper
        .integrate()
        .map_err(|e| NBodyError::Integration(format!("{e:?}")))?;
    if cancel() {
        return Err(NBodyError::Cancelled);
    }
    let xs = stepper.x_out();
    let ys = stepper.y_out();
    let Some(last) = ys.last() else {
        return Err(NBodyError::Integration("no output".into()));
    };
    if (xs.last().copied().unwrap_or(0.0) - span).abs() > 1e-6 * span.max(1.0) {
        return Err(NBodyError::Integration(
            "stopped before the end of the arc".into(),
        ));
    }
    // The track: the step points, thinned to about `samples` (first and last kept).
    let stride = (xs.len() / n).max(1);
    let mut track: Vec<(Tdb, Vec3)> = xs
        .iter()
        .zip(ys)
        .step_by(stride)
        .map(|(x, y)| (Tdb(t0.0 + x), Vec3::new(y[0], y[1], y[2])))
        .collect();
    if track
        .last()
        .is_none_or(|p| p.0.0 != t0.0 + xs[xs.len() - 1])
    {
        track.push((
            Tdb(t0.0 + xs[xs.len() - 1]),
            Vec3::new(last[0], last[1], last[2]),
        ));
    }
    Ok(Propagated {
        end: State {
            r: Vec3::new(last[0], last[1], last[2]),
            v: Vec3::new(last[3], last[4], last[5]),
        },
        track,
        evaluations: stats.num_eval,
    })
}
