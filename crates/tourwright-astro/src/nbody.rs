//! Heliocentric motion under the Sun and other bodies as point masses, with the state transition
//! matrix when asked (the variational equations), forwards or backwards in time.
//!
//! Equations (heliocentric, so the Sun's acceleration by each body enters as the indirect term):
//! r̈ = −μ☉ r/|r|³ + Σⱼ μⱼ [ (rⱼ − r)/|rⱼ − r|³ − rⱼ/|rⱼ|³ ].
//! A perturber may be given a sphere of influence inside which it does not pull (the patched-conic
//! check of `fidelity`: there the swing-by hyperbola is the model); its pull then ramps in smoothly
//! between one and two radii of the sphere. With a sphere of zero every body pulls everywhere
//! (the continuous trajectory, which integrates each swing-by under its planet's full gravity).
//!
//! Variational equations: Φ̇ = A Φ with A = [[0, I], [G, 0]] and the gravity gradient
//! G = ∂r̈/∂r = Σ μ (3 d dᵀ/|d|⁵ − I/|d|³) over the Sun and every body (d from the spacecraft to
//! the body; for the Sun d = −r).
//!
//! Integrator: `ode_solvers`' Dormand-Prince 8(5,3) with adaptive steps. That crate (0.6.2) reads
//! the twelfth stage at the start of the step instead of its end (its node c₁₂ is 0, not 1: an
//! open upstream defect), which only matters when the equations depend on time — as these do, the
//! planets moving. The work-around: time is carried as a component of the state, with derivative
//! 1 (or −1 backwards), and the equations read it from there; a Runge-Kutta stage's time is then
//! t₀ + h Σⱼ aᵢⱼ, and the method's row sums are right. The independent variable the crate sees is
//! the elapsed |t − t₀|. Checked against scipy's DOP853 on a time-dependent problem and on
//! y′ = 7t⁶ (tests/nbody.rs).
//!
//! Tolerances (per component, km and km/s): relative 1e-12, absolute 1e-8 by default.

use nalgebra::{Matrix3, Matrix6, SVector};
use ode_solvers::System;
use ode_solvers::dop853::Dop853;

use crate::ephemeris::{Ephemeris, EphemerisError, PlanetEphemeris};
use crate::kernel::SpkKernel;
use crate::time::Tdb;
use crate::{State, Vec3};

/// A body that pulls on the spacecraft.
#[derive(Clone, Copy, Debug)]
pub struct Perturber<'a> {
    /// Gravitational parameter, km³/s².
    pub mu: f64,
    /// Inside this distance (km) the body does not pull (0: it pulls everywhere).
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
    /// Any NAIF body of an SPK kernel (the Moon, 301), heliocentric.
    Naif(&'static SpkKernel, i32),
    /// Any other source (user bodies, constructed test cases).
    Other(&'a (dyn Ephemeris + Sync)),
}

impl std::fmt::Debug for PerturberSource<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            PerturberSource::Planet(p) => write!(f, "Planet({p:?})"),
            PerturberSource::Naif(k, id) => write!(f, "Naif({}, {id})", k.file_name()),
            PerturberSource::Other(_) => write!(f, "Other"),
        }
    }
}

impl PerturberSource<'_> {
    /// Heliocentric ecliptic J2000 position at `t`.
    pub fn position(&self, t: Tdb) -> Option<Vec3> {
        self.state(t).map(|s| s.r)
    }

    /// Heliocentric ecliptic J2000 state at `t`.
    pub fn state(&self, t: Tdb) -> Option<State> {
        match self {
            PerturberSource::Planet(p) => p.state_unchecked(t).ok(),
            PerturberSource::Naif(k, id) => k.equatorial_naif(*id, t).ok().map(|s| State {
                r: crate::source::equatorial_to_ecliptic(&s.r),
                v: crate::source::equatorial_to_ecliptic(&s.v),
            }),
            PerturberSource::Other(e) => e.state(t).ok(),
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
    /// Largest step, s (0: no limit). With a limit of a day, every day has a state.
    pub max_step_s: f64,
}

impl Default for NBodyOptions {
    fn default() -> Self {
        NBodyOptions {
            rtol: 1e-12,
            atol: 1e-8,
            samples: 2,
            max_steps: 200_000,
            max_step_s: 0.0,
        }
    }
}

/// Why a propagation failed.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum NBodyError {
    /// The integrator gave up (step size too small, too many steps, stiffness).
    #[error("the n-body integration failed: {0}")]
    Integration(String),
    /// The integrator gave up at an instant and place (a pass through a body, usually).
    #[error("the n-body integration stalled at TDB {t:.0} s ({why})")]
    Stalled {
        /// The last instant reached, TDB seconds past J2000.
        t: f64,
        /// The position there (the first three components of the state).
        r: [f64; 3],
        /// The integrator's words.
        why: String,
    },
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

/// The result of a propagation with the state transition matrix.
#[derive(Clone, Debug, PartialEq)]
pub struct PropagatedStm {
    /// State at the end.
    pub end: State,
    /// Φ(t₁, t₀) = ∂x(t₁)/∂x(t₀), x = (r, v).
    pub phi: Matrix6<f64>,
    /// Every accepted step's state, in the order flown (start and end included).
    pub states: Vec<(Tdb, State)>,
    /// Right-hand-side evaluations.
    pub evaluations: u32,
}

/// The forces: the Sun and the perturbers, read at the time carried in the state.
pub struct Forces<'a> {
    /// μ of the Sun, km³/s².
    pub mu_sun: f64,
    /// The perturbing bodies.
    pub bodies: &'a [Perturber<'a>],
}

impl Forces<'_> {
    /// Acceleration at `r` (heliocentric) and `t`, km/s².
    pub fn accel(&self, t: Tdb, r: &Vec3) -> Vec3 {
        self.accel_and_gradient(t, r, false).0
    }

    /// Acceleration and, when asked, its gradient ∂a/∂r.
    pub fn accel_and_gradient(&self, t: Tdb, r: &Vec3, grad: bool) -> (Vec3, Matrix3<f64>) {
        let rn = r.norm();
        let r3 = rn * rn * rn;
        let mut a = -self.mu_sun / r3 * r;
        let mut g = Matrix3::zeros();
        if grad {
            g +=
                self.mu_sun * (3.0 * r * r.transpose() / (r3 * rn * rn) - Matrix3::identity() / r3);
        }
        for b in self.bodies {
            if b.mu == 0.0 {
                continue;
            }
            let Some(rj) = b.source.position(t) else {
                continue;
            };
            let d = rj - r;
            let dn = d.norm();
            let w = ramp(dn, b.soi_km);
            if w == 0.0 {
                continue;
            }
            let d3 = dn * dn * dn;
            let rjn = rj.norm();
            a += w * b.mu * (d / d3 - rj / (rjn * rjn * rjn));
            if grad {
                g += w
                    * b.mu
                    * (3.0 * d * d.transpose() / (d3 * dn * dn) - Matrix3::identity() / d3);
            }
        }
        (a, g)
    }

    /// The time derivative of (r, v) at `t`: (v, a).
    pub fn derivative(&self, t: Tdb, s: &State) -> [f64; 6] {
        let a = self.accel(t, &s.r);
        [s.v.x, s.v.y, s.v.z, a.x, a.y, a.z]
    }
}

/// How much of a body's pull acts at distance `d` from it: none inside its sphere of influence,
/// all beyond twice that, and a smooth step between (a sudden switch would be a discontinuity the
/// step-size control trips on). A sphere of zero: all, everywhere.
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

/// A system ẏ = f(t, y) whose last component is time, advanced over the elapsed |t − t₀|.
struct TimeCarried<'c, F, const N: usize> {
    f: F,
    /// +1 forwards, −1 backwards.
    dir: f64,
    cancel: &'c dyn Fn() -> bool,
    cancelled: bool,
    steps: u32,
}

impl<F, const N: usize> System<f64, SVector<f64, N>> for TimeCarried<'_, F, N>
where
    F: Fn(f64, &SVector<f64, N>, &mut SVector<f64, N>),
{
    fn system(&self, _s: f64, y: &SVector<f64, N>, dy: &mut SVector<f64, N>) {
        (self.f)(y[N - 1], y, dy);
        for v in dy.iter_mut().take(N - 1) {
            *v *= self.dir;
        }
        dy[N - 1] = self.dir;
    }

    fn solout(&mut self, _s: f64, _y: &SVector<f64, N>, _dy: &SVector<f64, N>) -> bool {
        self.steps += 1;
        // Checking the flag costs little; every 16 steps is often enough.
        if self.steps % 16 == 0 && (self.cancel)() {
            self.cancelled = true;
        }
        self.cancelled
    }
}

/// Settings of [`integrate_ode`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OdeOptions {
    /// Relative tolerance per step.
    pub rtol: f64,
    /// Absolute tolerance per step.
    pub atol: f64,
    /// Largest number of steps.
    pub max_steps: u32,
    /// Largest step (0: none).
    pub max_step: f64,
}

/// Integrate ẏ = f(t, y) from `t0` to `t1` (either way) with Dormand-Prince 8(5,3), time carried
/// as the last component of `y` (see the module's note: the work-around for the crate's stage
/// node). `f(t, y, dy)` fills the first N − 1 components of `dy` with dy/dt; the last component of
/// `y0` is replaced by `t0`. Returns every accepted step's state (time last), in the order flown,
/// and the number of right-hand-side evaluations.
pub fn integrate_ode<F, const N: usize>(
    f: F,
    mut y0: SVector<f64, N>,
    t0: f64,
    t1: f64,
    opts: &OdeOptions,
    cancel: &dyn Fn() -> bool,
) -> Result<(Vec<SVector<f64, N>>, u32), NBodyError>
where
    F: Fn(f64, &SVector<f64, N>, &mut SVector<f64, N>),
{
    let span = (t1 - t0).abs();
    if !(span.is_finite() && span > 0.0) {
        return Err(NBodyError::Input("the arc has no length"));
    }
    y0[N - 1] = t0;
    let sys = TimeCarried {
        f,
        dir: (t1 - t0).signum(),
        cancel,
        cancelled: false,
        steps: 0,
    };
    let hmax = if opts.max_step > 0.0 {
        opts.max_step.min(span)
    } else {
        span
    };
    let mut stepper = Dop853::from_param(
        sys,
        0.0,
        span,
        span,
        y0,
        opts.rtol,
        opts.atol,
        0.9,
        0.0,
        0.333,
        6.0,
        hmax,
        0.0,
        opts.max_steps,
        // Stiffness tests off: gravity is not stiff, and the ramp's bend must not stop a leg.
        u32::MAX,
        // Sparse: every accepted step, the last one exactly at the end. (The crate's dense
        // output is wrong when the only requested point is the end of the span.)
        ode_solvers::dop_shared::OutputType::Sparse,
    );
    let stats = match stepper.integrate() {
        Ok(s) => s,
        Err(e) => {
            // Where it stopped: the last accepted step (time is the last component).
            return Err(match stepper.y_out().last() {
                Some(y) if N > 3 => NBodyError::Stalled {
                    t: y[N - 1],
                    r: [y[0], y[1], y[2]],
                    why: format!("{e:?}"),
                },
                _ => NBodyError::Integration(format!("{e:?}")),
            });
        }
    };
    if cancel() {
        return Err(NBodyError::Cancelled);
    }
    let xs = stepper.x_out();
    if xs.is_empty() || (xs[xs.len() - 1] - span).abs() > 1e-6 * span.max(1.0) {
        return Err(NBodyError::Integration(
            "stopped before the end of the arc".into(),
        ));
    }
    Ok((stepper.y_out().clone(), stats.num_eval))
}

/// The equations of motion as [`integrate_ode`] takes them: state 7 (r, v, t) or 43 (r, v, Φ
/// column by column, t).
fn motion<'f, const N: usize>(
    forces: &'f Forces<'f>,
) -> impl Fn(f64, &SVector<f64, N>, &mut SVector<f64, N>) + 'f {
    move |t, y, dy| {
        let r = Vec3::new(y[0], y[1], y[2]);
        let stm = N == 43;
        let (a, g) = forces.accel_and_gradient(Tdb(t), &r, stm);
        dy[0] = y[3];
        dy[1] = y[4];
        dy[2] = y[5];
        dy[3] = a.x;
        dy[4] = a.y;
        dy[5] = a.z;
        if stm {
            // Φ̇ = A Φ, column by column: the top half of each column is the bottom half of Φ's,
            // the bottom half is G times the top half.
            for c in 0..6 {
                let o = 6 + 6 * c;
                let top = Vec3::new(y[o], y[o + 1], y[o + 2]);
                let gb = g * top;
                dy[o] = y[o + 3];
                dy[o + 1] = y[o + 4];
                dy[o + 2] = y[o + 5];
                dy[o + 3] = gb.x;
                dy[o + 4] = gb.y;
                dy[o + 5] = gb.z;
            }
        }
    }
}

fn ode_options(opts: &NBodyOptions) -> OdeOptions {
    OdeOptions {
        rtol: opts.rtol,
        atol: opts.atol,
        max_steps: opts.max_steps,
        max_step: opts.max_step_s,
    }
}

fn check_start(start: &State, span: f64) -> Result<(), NBodyError> {
    if !(span.is_finite() && span > 0.0) {
        return Err(NBodyError::Input("the arc has no length"));
    }
    if !(start.r.norm() > 0.0 && start.r.iter().chain(start.v.iter()).all(|x| x.is_finite())) {
        return Err(NBodyError::Input("the start state is not finite"));
    }
    Ok(())
}

/// Propagate `start` from `t0` to `t1` (after `t0`) under the Sun (`mu_sun`) and `bodies`.
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
    if !(span > 0.0) {
        return Err(NBodyError::Input("the arc must run forward in time"));
    }
    check_start(start, span)?;
    let y0 = SVector::<f64, 7>::from_column_slice(&[
        start.r.x, start.r.y, start.r.z, start.v.x, start.v.y, start.v.z, t0.0,
    ]);
    let forces = Forces { mu_sun, bodies };
    let (ys, evals) = integrate_ode(
        motion::<7>(&forces),
        y0,
        t0.0,
        t1.0,
        &ode_options(opts),
        cancel,
    )?;
    let n = opts.samples.max(2);
    let last = ys[ys.len() - 1];
    // The track: the step points, thinned to about `samples` (first and last kept).
    let stride = (ys.len() / n).max(1);
    let mut track: Vec<(Tdb, Vec3)> = ys
        .iter()
        .step_by(stride)
        .map(|y| (Tdb(y[6]), Vec3::new(y[0], y[1], y[2])))
        .collect();
    if track.last().is_none_or(|p| p.0.0 != last[6]) {
        track.push((Tdb(last[6]), Vec3::new(last[0], last[1], last[2])));
    }
    // Time is integrated: its last value is t1 to a few rounding errors; name it exactly.
    if let Some(l) = track.last_mut() {
        l.0 = t1;
    }
    Ok(Propagated {
        end: State {
            r: Vec3::new(last[0], last[1], last[2]),
            v: Vec3::new(last[3], last[4], last[5]),
        },
        track,
        evaluations: evals,
    })
}

/// Propagate `start` from `t0` to `t1` (either side of `t0`) with the state transition matrix
/// Φ(t₁, t₀); every accepted step's state is kept (in the order flown).
pub fn propagate_stm(
    start: &State,
    t0: Tdb,
    t1: Tdb,
    mu_sun: f64,
    bodies: &[Perturber<'_>],
    opts: &NBodyOptions,
    cancel: &dyn Fn() -> bool,
) -> Result<PropagatedStm, NBodyError> {
    let span = (t1.0 - t0.0).abs();
    check_start(start, span)?;
    let mut y0 = SVector::<f64, 43>::zeros();
    y0[0] = start.r.x;
    y0[1] = start.r.y;
    y0[2] = start.r.z;
    y0[3] = start.v.x;
    y0[4] = start.v.y;
    y0[5] = start.v.z;
    for i in 0..6 {
        y0[6 + 7 * i] = 1.0;
    }
    y0[42] = t0.0;
    let forces = Forces { mu_sun, bodies };
    let (ys, evals) = integrate_ode(
        motion::<43>(&forces),
        y0,
        t0.0,
        t1.0,
        &ode_options(opts),
        cancel,
    )?;
    let last = ys[ys.len() - 1];
    let state = |y: &SVector<f64, 43>| State {
        r: Vec3::new(y[0], y[1], y[2]),
        v: Vec3::new(y[3], y[4], y[5]),
    };
    let mut states: Vec<(Tdb, State)> = ys.iter().map(|y| (Tdb(y[42]), state(y))).collect();
    // Time is integrated: its last value is t1 to a few rounding errors; name it exactly.
    if let Some(l) = states.last_mut() {
        l.0 = t1;
    }
    Ok(PropagatedStm {
        end: state(&last),
        phi: Matrix6::from_column_slice(&last.as_slice()[6..42]),
        states,
        evaluations: evals,
    })
}
