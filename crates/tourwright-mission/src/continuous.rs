//! One continuous trajectory through the whole tour in a point-mass n-body model, by multiple
//! shooting: the hand-off a high-fidelity team can start from.
//!
//! Model: the Sun and every planet of the design's ephemeris source as point masses, with the
//! GM values that source was fitted with ([`tourwright_astro::constants::GmSet`]). With a JPL
//! kernel the Earth (NAIF 399) and the Moon (301) are separate bodies; with the mean-element or
//! benchmark models, whose Earth is the Earth-Moon barycentre, the Earth carries the combined GM
//! (the Moon's pull is then that of a point at the barycentre). User bodies with a mass pull too.
//!
//! Nodes: one per stop, at the periapsis of its planetocentric passage (launch: of the departure
//! hyperbola from a parking orbit; arrival: of the approach). A node of a body with a mass has
//! free variables ρ, w (periapsis position and velocity relative to the body), the periapsis
//! epoch and, for a powered swing-by, a tangential impulse δ at periapsis. A node of a massless
//! body (a point) has the velocities relative to the body in and out, and the epoch. Every leg is
//! flown forward from its departure node and backward from its arrival node to a match point (the
//! leg's midpoint, or its deep-space manoeuvre, where the velocity may jump: that jump is the
//! manoeuvre), through each planet's sphere of influence under its full gravity.
//!
//! Constraints: continuity at every match point (position; and velocity where there is no
//! manoeuvre), each node at periapsis (ρ·ŵ = 0), periapsis radius as designed where the design
//! fixes it (a shaped swing-by, the launch parking orbit, a capture orbit, a flyby arrival at the
//! body's minimum altitude) and at least the minimum elsewhere (added as an equality when a
//! targeted swing-by would dip below it), epochs within the user's tolerance of the patched-conic
//! epochs (an epoch that reaches its bound is held there).
//!
//! Solver: Newton steps of least norm in scaled variables (the system is under-determined: the
//! smallest change keeps the trajectory near the design), Jacobians from the variational
//! equations (`nbody::propagate_stm`) and the chain rule through each node's parameters, a
//! backtracking line search on the scaled residual. When a direct solve fails, continuation in
//! the masses of the bodies the tour does not visit (from Sun + visited bodies to the full model).

use nalgebra::{DMatrix, DVector, Matrix3, Matrix6};
use serde::Serialize;
use tourwright_astro::bodies::Planet;
use tourwright_astro::constants::{DE421_GM, DE440_GM, GmSet};
use tourwright_astro::ephemeris::EphemerisModel;
use tourwright_astro::flyby::BPlaneFrame;
use tourwright_astro::nbody::{self, Forces, NBodyError, NBodyOptions, Perturber, PerturberSource};
use tourwright_astro::time::Tdb;
use tourwright_astro::{State, Vec3};

use crate::design::ArrivalGoal;
use crate::evaluate::Evaluation;
use crate::tour::{BodyEphemeris, BodyId, PreparedTour, StopKind};

/// Settings of the continuous solve.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ContinuousOptions {
    /// Integrator tolerances.
    pub integration: NBodyOptions,
    /// Every body's GM times this (1: the real solar system; 0: the patched-conic legs).
    pub mass_scale: f64,
    /// Altitude of the launch parking orbit (periapsis of the departure hyperbola), km.
    pub launch_altitude_km: f64,
    /// How far an encounter's epoch may move from the patched-conic epoch, days.
    pub epoch_tolerance_days: f64,
    /// Newton iterations per continuation stage.
    pub max_iterations: usize,
    /// Continuity in position, km.
    pub position_tol_km: f64,
    /// Continuity in velocity, km/s.
    pub velocity_tol_km_s: f64,
    /// Periapsis radius (and the periapsis condition), km.
    pub altitude_tol_km: f64,
}

impl Default for ContinuousOptions {
    fn default() -> Self {
        ContinuousOptions {
            integration: NBodyOptions::default(),
            mass_scale: 1.0,
            launch_altitude_km: 200.0,
            epoch_tolerance_days: 30.0,
            max_iterations: 30,
            position_tol_km: 1.0,
            velocity_tol_km_s: 1e-6,
            altitude_tol_km: 1.0,
        }
    }
}

/// A body of the model, as reports name it.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct ModelBody {
    /// Name.
    pub name: String,
    /// Gravitational parameter used, km³/s².
    pub gm_km3_s2: f64,
    /// Where its position comes from.
    pub position: String,
}

/// The force model, as reports name it.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct ModelInfo {
    /// Ephemeris source.
    pub ephemeris: String,
    /// The set of GM values.
    pub gm_set: String,
    /// GM of the Sun, km³/s².
    pub gm_sun_km3_s2: f64,
    /// Every body that pulls, besides the Sun.
    pub bodies: Vec<ModelBody>,
    /// How the Earth-Moon system is treated.
    pub earth_moon: String,
    /// The integrator.
    pub integrator: String,
}

/// One encounter of the converged trajectory.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Encounter {
    /// Stop index (0 = launch).
    pub stop: usize,
    /// Body.
    pub body: String,
    /// "launch", "swing-by" or "arrival".
    pub role: &'static str,
    /// Periapsis (or node) epoch, TDB seconds past J2000.
    pub epoch_tdb_s: f64,
    /// The same, ISO UTC.
    pub epoch: String,
    /// Epoch minus the patched-conic epoch, s.
    pub epoch_shift_s: f64,
    /// Periapsis altitude of the converged trajectory, km (absent at a massless body).
    pub altitude_km: Option<f64>,
    /// The patched-conic design's altitude there, km.
    pub designed_altitude_km: Option<f64>,
    /// The minimum altitude in force, km.
    pub min_altitude_km: f64,
    /// B·T and B·R of the converged approach (its osculating hyperbola), km.
    pub b_t_km: Option<f64>,
    /// B·R, km.
    pub b_r_km: Option<f64>,
    /// B·T and B·R of the patched-conic design, km.
    pub designed_b_t_km: Option<f64>,
    /// Designed B·R, km.
    pub designed_b_r_km: Option<f64>,
    /// |v∞| of the converged passage (osculating), km/s.
    pub vinf_km_s: f64,
    /// The patched-conic |v∞| there, km/s.
    pub designed_vinf_km_s: f64,
}

/// An impulse of the converged trajectory.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Impulse {
    /// What it is ("powered swing-by at Venus", "deep-space manoeuvre on leg 3", ...).
    pub what: String,
    /// Epoch, TDB seconds past J2000.
    pub epoch_tdb_s: f64,
    /// Epoch, ISO UTC.
    pub epoch: String,
    /// Δv vector (ecliptic J2000), km/s.
    pub dv_km_s: [f64; 3],
    /// |Δv|, km/s.
    pub magnitude_km_s: f64,
    /// The patched-conic design's impulse here, km/s.
    pub designed_km_s: f64,
}

/// Continuity at one match point.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct MatchPoint {
    /// Leg (1-based).
    pub leg: usize,
    /// Epoch, ISO UTC.
    pub epoch: String,
    /// Position gap, km.
    pub position_km: f64,
    /// Velocity gap (the manoeuvre removed, where the leg has one), km/s.
    pub velocity_km_s: f64,
}

/// A coast arc between impulses: states in time order.
#[derive(Clone, Debug, PartialEq)]
pub struct CoastArc {
    /// Words for the arc ("launch from Earth to the powered swing-by at Venus").
    pub label: String,
    /// States (heliocentric ecliptic J2000).
    pub states: Vec<(Tdb, State)>,
}

/// The result of the solve (converged or not: `converged` and `failure` say which).
#[derive(Clone, Debug, PartialEq)]
pub struct Continuous {
    /// Whether every constraint is met.
    pub converged: bool,
    /// When not: where, and by how much.
    pub failure: Option<String>,
    /// What the solve had to give up of the design (a swing-by altitude it could not hold).
    pub notes: Vec<String>,
    /// The force model.
    pub model: ModelInfo,
    /// One per stop.
    pub encounters: Vec<Encounter>,
    /// Every impulse, in time order (launch injection excluded: see `launch_c3`).
    pub impulses: Vec<Impulse>,
    /// Continuity at each leg's match point.
    pub matches: Vec<MatchPoint>,
    /// Launch C3 of the converged departure hyperbola, km²/s².
    pub launch_c3: f64,
    /// Patched-conic launch C3, km²/s².
    pub designed_launch_c3: f64,
    /// Arrival |v∞| (osculating), km/s.
    pub arrival_vinf_km_s: f64,
    /// Total Δv (swing-by burns, manoeuvres, arrival), km/s.
    pub total_dv_km_s: f64,
    /// The patched-conic total, km/s.
    pub designed_total_dv_km_s: f64,
    /// Largest position gap at a match point, km.
    pub max_position_gap_km: f64,
    /// Largest velocity gap at a match point without a manoeuvre, km/s.
    pub max_velocity_gap_km_s: f64,
    /// Newton iterations in all.
    pub iterations: usize,
    /// Continuation stages (mass scales of the unvisited bodies) solved.
    pub continuation: Vec<f64>,
    /// The trajectory, one coast arc between impulses each.
    pub arcs: Vec<CoastArc>,
    /// Right-hand-side evaluations.
    pub evaluations: u64,
}

/// Why the solve could not start.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum ContinuousError {
    /// The patched-conic evaluation did not solve a leg.
    #[error("leg {0} is not solved; fix the design first")]
    Unsolved(usize),
    /// Cancelled.
    #[error("cancelled")]
    Cancelled,
}

/// Which side of a node a leg leaves from or arrives at.
#[derive(Clone, Copy, PartialEq)]
enum Side {
    In,
    Out,
}

#[derive(Clone, Copy, PartialEq, Debug)]
enum Role {
    Launch,
    SwingBy,
    Arrival,
}

impl Role {
    fn word(self) -> &'static str {
        match self {
            Role::Launch => "launch",
            Role::SwingBy => "swing-by",
            Role::Arrival => "arrival",
        }
    }
}

#[derive(Clone, Debug)]
struct Node {
    stop: usize,
    role: Role,
    /// μ of the body in the model (after the mass scale).
    mu: f64,
    radius: f64,
    /// Periapsis node (body with a mass) or point node.
    hyperbola: bool,
    /// A tangential impulse at periapsis is a variable.
    powered: bool,
    /// Periapsis radius held (km).
    rp_target: Option<f64>,
    /// Smallest periapsis radius allowed (km).
    rp_min: f64,
    /// Patched-conic epoch.
    t0: f64,
    /// Largest epoch shift, s.
    tol_s: f64,
    /// Offset of the node's variables in the vector.
    off: usize,
    /// Number of variables.
    nv: usize,
}

impl Node {
    fn t_index(&self) -> usize {
        self.off + self.nv - 1
    }
}

/// The bodies that pull, and what reports say of them.
struct Model<'a> {
    mu_sun: f64,
    bodies: Vec<Perturber<'a>>,
    /// Nominal μ (before any continuation scale).
    mu0: Vec<f64>,
    /// Visited by the tour (never scaled by continuation).
    visited: Vec<bool>,
    info: ModelInfo,
}

fn gm_set(model: &EphemerisModel) -> Option<&'static GmSet> {
    match model {
        EphemerisModel::Kernel(k) if k.file_name().to_ascii_lowercase().contains("de421") => {
            Some(&DE421_GM)
        }
        EphemerisModel::Kernel(_) | EphemerisModel::MeanElements => Some(&DE440_GM),
        EphemerisModel::MgaBenchmark => None,
    }
}

/// The force model of a tour, and the index of each stop's body in it.
fn build_model<'a>(
    tour: &'a PreparedTour,
    scale: f64,
    opts: &NBodyOptions,
) -> (Model<'a>, Vec<Option<usize>>) {
    let set = gm_set(&tour.model);
    let kernel = match &tour.model {
        EphemerisModel::Kernel(k) => Some(*k),
        _ => None,
    };
    let mut bodies = Vec::new();
    let mut info = Vec::new();
    for (i, p) in Planet::ALL.into_iter().enumerate() {
        let Ok(eph) = tour.model.planet(p) else {
            continue;
        };
        let mu = match (set, p, kernel) {
            (Some(s), Planet::Earth, None) => s.earth_moon(),
            (Some(s), _, _) => s.planets[i],
            (None, _, _) => tour.model.planet_data(p).mu,
        };
        bodies.push(Perturber {
            mu: mu * scale,
            soi_km: 0.0,
            source: PerturberSource::Planet(eph),
        });
        let what = match (p, kernel) {
            (Planet::Earth, None) => "Earth-Moon barycentre, Earth + Moon GM".to_string(),
            _ => tour.model.name(),
        };
        info.push(ModelBody {
            name: p.name().into(),
            gm_km3_s2: mu * scale,
            position: what,
        });
    }
    let earth_moon;
    if let (Some(k), Some(s)) = (kernel, set) {
        if k.equatorial_naif(301, tour.stops[0].t).is_ok() {
            bodies.push(Perturber {
                mu: s.moon * scale,
                soi_km: 0.0,
                source: PerturberSource::Naif(k, 301),
            });
            info.push(ModelBody {
                name: "Moon".into(),
                gm_km3_s2: s.moon * scale,
                position: format!("{} (NAIF 301)", tour.model.name()),
            });
            earth_moon = "the Earth (NAIF 399) and the Moon (NAIF 301) as separate bodies".into();
        } else {
            earth_moon = "the Earth alone: the kernel carries no Moon".into();
        }
    } else if set.is_some() {
        earth_moon =
            "the Earth-Moon barycentre with the combined GM (the model's Earth is the barycentre)"
                .into();
    } else {
        earth_moon =
            "the Earth alone, with the benchmark model's GM (the model has no Moon)".into();
    }
    // Stops' bodies.
    let mut index = Vec::new();
    for s in &tour.stops {
        let i = match (&s.body.id, &s.body.ephemeris) {
            (BodyId::Planet(p), _) => info.iter().position(|b| b.name == p.name()),
            (BodyId::User(_), BodyEphemeris::User(o)) => {
                if s.body.data.mu > 0.0 {
                    match info.iter().position(|b| b.name == *s.body.name) {
                        Some(i) => Some(i),
                        None => {
                            bodies.push(Perturber {
                                mu: s.body.data.mu * scale,
                                soi_km: 0.0,
                                source: PerturberSource::Other(o),
                            });
                            info.push(ModelBody {
                                name: s.body.name.to_string(),
                                gm_km3_s2: s.body.data.mu * scale,
                                position: "the design's osculating elements".into(),
                            });
                            Some(info.len() - 1)
                        }
                    }
                } else {
                    None
                }
            }
            _ => None,
        };
        index.push(i);
    }
    let mut visited = vec![false; bodies.len()];
    for i in index.iter().flatten() {
        visited[*i] = true;
    }
    let mu0 = bodies.iter().map(|b| b.mu).collect();
    let mu_sun = set.map_or(tour.mu_sun, |s| s.sun);
    let model = Model {
        mu_sun,
        mu0,
        bodies,
        visited,
        info: ModelInfo {
            ephemeris: tour.model.name(),
            gm_set: set.map_or("the benchmark model's own".to_string(), |s| s.name.into()),
            gm_sun_km3_s2: mu_sun,
            bodies: info,
            earth_moon,
            integrator: format!(
                "Dormand-Prince 8(5,3) with time carried as a state component, rtol {:e}, atol {:e} (km, km/s)",
                opts.rtol, opts.atol
            ),
        },
    };
    (model, index)
}

impl Model<'_> {
    /// Scale the unvisited bodies' GM by `s` (continuation).
    fn set_stage(&mut self, s: f64) {
        for (i, b) in self.bodies.iter_mut().enumerate() {
            b.mu = if self.visited[i] {
                self.mu0[i]
            } else {
                self.mu0[i] * s
            };
        }
    }
}

/// Longest interval between two points of the shooting, s: long legs get patch points (free
/// heliocentric states at fixed epochs) so that no arc is flown for long enough to turn the
/// problem strongly non-linear (a resonant return is the hard case).
const MAX_INTERVAL_S: f64 = 100.0 * 86_400.0;

/// A point of the shooting: a stop's node, or a patch point of a long leg.
#[derive(Clone, Copy, Debug, PartialEq)]
enum End {
    Node(usize),
    Patch(usize),
}

/// A patch point: a free heliocentric state at a fixed epoch.
#[derive(Clone, Copy, Debug)]
struct Patch {
    t: f64,
    off: usize,
}

/// Between two consecutive points: flown forward from `a` and backward from `b` to `tm`.
#[derive(Clone, Copy, Debug)]
struct Interval {
    a: End,
    b: End,
    tm: f64,
    /// The leg's deep-space manoeuvre is at `tm` (the velocity may jump there).
    dsm: bool,
    leg: usize,
}

/// The problem: nodes, patch points, intervals, the vector of variables and its scales.
struct Problem<'a> {
    tour: &'a PreparedTour,
    nodes: Vec<Node>,
    patches: Vec<Patch>,
    intervals: Vec<Interval>,
    scales: Vec<f64>,
    opts: ContinuousOptions,
}

/// Cut `[a, b]` into intervals of at most `MAX_INTERVAL_S`: the inner boundaries.
fn cuts(a: f64, b: f64) -> Vec<f64> {
    let m = ((b - a) / MAX_INTERVAL_S).ceil().max(1.0) as usize;
    (1..m).map(|j| a + (b - a) * j as f64 / m as f64).collect()
}

/// The guess of a ballistic leg flown in the full model from node `a` (unpowered, its variables
/// in `z`): the states at the patch epochs `bounds`, and, when the arc ends inside node `b`'s
/// sphere of influence on an approach, `b`'s periapsis variables (ρ, w, epoch shift).
fn fly_ballistic_guess(
    tour: &PreparedTour,
    a: &Node,
    b: &Node,
    z: &[f64],
    bounds: &[f64],
    model: &Model<'_>,
    opts: &ContinuousOptions,
) -> Option<(Vec<State>, Option<[f64; 7]>)> {
    if !a.hyperbola || a.powered {
        return None;
    }
    let ta = a.t0 + z[a.t_index()];
    let body_a = tour.stops[a.stop].body.state(Tdb(ta)).ok()?;
    let mut s = State {
        r: body_a.r + Vec3::new(z[a.off], z[a.off + 1], z[a.off + 2]),
        v: body_a.v + Vec3::new(z[a.off + 3], z[a.off + 4], z[a.off + 5]),
    };
    let step = NBodyOptions {
        samples: 2,
        ..opts.integration
    };
    let mut t = ta;
    let mut states = Vec::with_capacity(bounds.len());
    for &tb in bounds.iter().chain(std::iter::once(&b.t0)) {
        s = nbody::propagate(
            &s,
            Tdb(t),
            Tdb(tb),
            model.mu_sun,
            &model.bodies,
            &step,
            &|| false,
        )
        .ok()?
        .end;
        t = tb;
        states.push(s);
    }
    let arrival = states.pop()?;
    let next = (|| {
        if !b.hyperbola {
            return None;
        }
        let body = &tour.stops[b.stop].body;
        let bs = body.state(Tdb(b.t0)).ok()?;
        let (r, v) = (arrival.r - bs.r, arrival.v - bs.v);
        if r.norm() > body.data.soi_km || r.dot(&v) >= 0.0 {
            return None;
        }
        periapsis_of(&r, &v, b.mu, b.rp_min)
    })();
    Some((states, next))
}

/// The periapsis of the osculating hyperbola through (r, v) relative to a body of `mu`, before
/// or after: (ρ, w, time from now to periapsis) with ρ at least `rp_floor` (same energy).
fn periapsis_of(r: &Vec3, v: &Vec3, mu: f64, rp_floor: f64) -> Option<[f64; 7]> {
    let rn = r.norm();
    let energy = 0.5 * v.norm_squared() - mu / rn;
    if !(energy > 0.0 && mu > 0.0) {
        return None;
    }
    let h = r.cross(v);
    let e_vec = ((v.norm_squared() - mu / rn) * r - r.dot(v) * v) / mu;
    let e = e_vec.norm();
    if !(e > 1.0) {
        return None;
    }
    let p = h.norm_squared() / mu;
    let rp = p / (1.0 + e);
    let a = mu / (2.0 * energy);
    let cosh_f = (1.0 + rn / a) / e;
    let f = cosh_f.max(1.0).acosh() * r.dot(v).signum();
    let n = (mu / (a * a * a)).sqrt();
    let dt = -(e * f.sinh() - f) / n;
    let p_hat = e_vec / e;
    let q_hat = h.normalize().cross(&p_hat);
    let rp = rp.max(rp_floor);
    let vp = (2.0 * energy + 2.0 * mu / rp).sqrt();
    let rho = rp * p_hat;
    let w = vp * q_hat;
    let out = [rho.x, rho.y, rho.z, w.x, w.y, w.z, dt];
    out.iter().all(|x| x.is_finite()).then_some(out)
}

/// Periapsis state of a hyperbola with incoming and outgoing asymptote directions `s_in`,
/// `s_out`, periapsis radius `rp` and incoming periapsis speed `vp`.
fn periapsis_guess(s_in: &Vec3, s_out: &Vec3, rp: f64, vp: f64) -> (Vec3, Vec3) {
    let d = s_in - s_out;
    let sum = s_in + s_out;
    let r_hat = d.try_normalize(1e-12).unwrap_or_else(|| any_normal(s_in));
    let v_hat = sum
        .try_normalize(1e-12)
        .unwrap_or_else(|| r_hat.cross(&s_in.cross(&r_hat)).normalize());
    (rp * r_hat, vp * v_hat)
}

fn any_normal(v: &Vec3) -> Vec3 {
    let n = v.cross(&Vec3::z());
    n.try_normalize(1e-9)
        .unwrap_or_else(|| v.cross(&Vec3::x()).normalize())
}

/// Turn a unit vector by angle `a` about the normal of the plane it shares with the ecliptic
/// pole (prograde).
fn turned(s: &Vec3, a: f64) -> Vec3 {
    let n = (Vec3::z() - Vec3::z().dot(s) * s)
        .try_normalize(1e-9)
        .unwrap_or_else(|| any_normal(s));
    s * a.cos() + n.cross(s) * a.sin()
}

impl<'a> Problem<'a> {
    fn new(
        tour: &'a PreparedTour,
        e: &Evaluation,
        index: &[Option<usize>],
        model: &Model<'_>,
        opts: &ContinuousOptions,
    ) -> (Problem<'a>, Vec<f64>) {
        let n = tour.stops.len();
        let mut nodes = Vec::with_capacity(n);
        let mut z = Vec::new();
        let mut scales = Vec::new();
        let tol_days = opts.epoch_tolerance_days.max(0.0);
        for (k, s) in tour.stops.iter().enumerate() {
            let role = match s.kind {
                StopKind::Launch => Role::Launch,
                StopKind::SwingBy => Role::SwingBy,
                StopKind::Arrival => Role::Arrival,
            };
            let mu = index[k].map_or(0.0, |i| model.bodies[i].mu);
            let radius = s.body.data.radius_km;
            let st = &e.stops[k];
            let sb = st.swingby.as_ref();
            let rp_min = radius + s.min_altitude_km;
            let tol_s = tol_days * 86_400.0;
            let off = z.len();
            let hyperbola = mu > 0.0;
            let mut node = Node {
                stop: k,
                role,
                mu,
                radius,
                hyperbola,
                powered: false,
                rp_target: None,
                rp_min,
                t0: s.t.0,
                tol_s,
                off,
                nv: 0,
            };
            if hyperbola {
                let (s_in, s_out, rp, vin, vout) = match role {
                    Role::Launch => {
                        let rp = radius + opts.launch_altitude_km;
                        let vout = st.vinf_out.norm();
                        let so = st.vinf_out / vout;
                        let e = 1.0 + rp * vout * vout / mu;
                        let turn = 2.0 * (1.0 / e).asin();
                        node.rp_target = Some(rp);
                        (turned(&so, -turn), so, rp, vout, vout)
                    }
                    Role::Arrival => {
                        let vin = st.vinf_in.norm();
                        let si = st.vinf_in / vin;
                        let rp = match tour.arrival {
                            ArrivalGoal::Capture {
                                periapsis_radius_km,
                                ..
                            } => periapsis_radius_km,
                            _ => rp_min,
                        };
                        let e = 1.0 + rp * vin * vin / mu;
                        let turn = 2.0 * (1.0 / e).asin();
                        node.rp_target = Some(rp);
                        (si, turned(&si, turn), rp, vin, vin)
                    }
                    Role::SwingBy => {
                        let vin = st.vinf_in.norm();
                        let vout = st.vinf_out.norm();
                        let rp = sb.and_then(|b| b.rp_km).unwrap_or(rp_min);
                        let shaped = matches!(s.mode, crate::design::SwingbyMode::Shaped { .. });
                        if shaped {
                            node.rp_target = Some(rp);
                        } else {
                            node.rp_min = rp_min.min(rp);
                        }
                        node.powered = sb.is_some_and(|b| b.powered_dv_km_s > 1e-9);
                        (st.vinf_in / vin, st.vinf_out / vout, rp, vin, vout)
                    }
                };
                let vp_in = (vin * vin + 2.0 * mu / rp).sqrt();
                let (rho, w) = periapsis_guess(&s_in, &s_out, rp, vp_in);
                z.extend_from_slice(&[rho.x, rho.y, rho.z, w.x, w.y, w.z]);
                scales.extend_from_slice(&[100.0, 100.0, 100.0, 1e-3, 1e-3, 1e-3]);
                if node.powered {
                    let vp_out = (vout * vout + 2.0 * mu / rp).sqrt();
                    z.push(vp_out - vp_in);
                    scales.push(1e-4);
                }
            } else {
                if role != Role::Launch {
                    z.extend_from_slice(st.vinf_in.as_slice());
                    scales.extend_from_slice(&[1e-3; 3]);
                }
                if role != Role::Arrival {
                    z.extend_from_slice(st.vinf_out.as_slice());
                    scales.extend_from_slice(&[1e-3; 3]);
                }
            }
            z.push(0.0);
            scales.push(600.0);
            node.nv = z.len() - off;
            nodes.push(node);
        }
        // Intervals and patch points, leg by leg; a deep-space manoeuvre is the match point of
        // an interval of its own, centred on it.
        let mut patches = Vec::new();
        let mut intervals = Vec::new();
        let sun_only = NBodyOptions {
            samples: 2,
            ..opts.integration
        };
        for k in 0..n - 1 {
            let (ta, tb) = (tour.stops[k].t.0, tour.stops[k + 1].t.0);
            let dsm = e.legs[k].dsm.filter(|m| m.t.0 > ta && m.t.0 < tb);
            // Boundaries (patch epochs) and the DSM's interval.
            let mut bounds = Vec::new();
            let mut dsm_at = None;
            match dsm {
                Some(m) => {
                    let h = (50.0f64 * 86_400.0)
                        .min(0.5 * (m.t.0 - ta))
                        .min(0.5 * (tb - m.t.0));
                    bounds.extend(cuts(ta, m.t.0 - h));
                    bounds.push(m.t.0 - h);
                    dsm_at = Some(bounds.len());
                    bounds.push(m.t.0 + h);
                    bounds.extend(cuts(m.t.0 + h, tb));
                }
                None => bounds.extend(cuts(ta, tb)),
            }
            // A ballistic leg after a shaped swing-by: fly it from the swing-by's periapsis in
            // the full model and start from that arc (patch states, and the next node at the
            // periapsis of the osculating approach), so that the leg is continuous from the first
            // iteration. A resonant return needs it: its arrival B-plane is set by the departure.
            let flown = if e.legs[k].ballistic && dsm.is_none() {
                fly_ballistic_guess(tour, &nodes[k], &nodes[k + 1], &z, &bounds, model, opts)
            } else {
                None
            };
            if let Some((_, Some(next))) = &flown {
                let n = &nodes[k + 1];
                z[n.off..n.off + 6].copy_from_slice(&next[..6]);
                z[n.t_index()] = next[6].clamp(-n.tol_s, n.tol_s);
            }
            // Patch states: the patched-conic leg, flown under the Sun alone (or the arc above).
            let mut ends = vec![End::Node(k)];
            for (j, &t) in bounds.iter().enumerate() {
                if let Some((states, _)) = &flown {
                    let st = states[j];
                    let off = z.len();
                    z.extend_from_slice(&[st.r.x, st.r.y, st.r.z, st.v.x, st.v.y, st.v.z]);
                    scales.extend_from_slice(&[1000.0, 1000.0, 1000.0, 1e-3, 1e-3, 1e-3]);
                    patches.push(Patch { t, off });
                    ends.push(End::Patch(patches.len() - 1));
                    continue;
                }
                let (t0, s0) = match dsm {
                    Some(m) if t > m.t.0 => (
                        m.t.0,
                        State {
                            r: m.r,
                            v: m.v_after,
                        },
                    ),
                    _ => (
                        ta,
                        State {
                            r: e.stops[k].body_state.r,
                            v: e.stops[k].v_helio_out,
                        },
                    ),
                };
                let st =
                    nbody::propagate(&s0, Tdb(t0), Tdb(t), model.mu_sun, &[], &sun_only, &|| {
                        false
                    })
                    .map(|p| p.end)
                    .unwrap_or(s0);
                let off = z.len();
                z.extend_from_slice(&[st.r.x, st.r.y, st.r.z, st.v.x, st.v.y, st.v.z]);
                scales.extend_from_slice(&[1000.0, 1000.0, 1000.0, 1e-3, 1e-3, 1e-3]);
                patches.push(Patch { t, off });
                ends.push(End::Patch(patches.len() - 1));
            }
            ends.push(End::Node(k + 1));
            let epoch_of = |end: End| match end {
                End::Node(i) => tour.stops[i].t.0,
                End::Patch(i) => patches[i].t,
            };
            for j in 0..ends.len() - 1 {
                let (a, b) = (ends[j], ends[j + 1]);
                let is_dsm = dsm_at == Some(j);
                let tm = match (is_dsm, dsm) {
                    (true, Some(m)) => m.t.0,
                    _ => 0.5 * (epoch_of(a) + epoch_of(b)),
                };
                intervals.push(Interval {
                    a,
                    b,
                    tm,
                    dsm: is_dsm,
                    leg: k,
                });
            }
        }
        // A node's epoch stays short of its nearest match point.
        for iv in &intervals {
            for end in [iv.a, iv.b] {
                if let End::Node(i) = end {
                    let nd = &mut nodes[i];
                    nd.tol_s = nd.tol_s.min(0.9 * (iv.tm - nd.t0).abs());
                }
            }
        }
        (
            Problem {
                tour,
                nodes,
                patches,
                intervals,
                scales,
                opts: *opts,
            },
            z,
        )
    }

    fn epoch(&self, node: &Node, z: &[f64]) -> f64 {
        node.t0 + z[node.t_index()]
    }

    /// Words for a stalled integration: the nearest body and how far from its centre.
    fn stall_words(&self, model: &Model<'_>, t: f64, r: [f64; 3]) -> String {
        let r = Vec3::new(r[0], r[1], r[2]);
        let mut best: Option<(f64, &str)> = None;
        for (b, info) in model.bodies.iter().zip(&model.info.bodies) {
            if let Some(p) = b.source.position(Tdb(t)) {
                let d = (p - r).norm();
                if best.is_none_or(|(bd, _)| d < bd) {
                    best = Some((d, &info.name));
                }
            }
        }
        match best {
            Some((d, name)) => format!(
                "the integration stalled at {}, {d:.0} km from the centre of {name}: the trajectory passes through or very close to {name}",
                Tdb(t).to_iso_utc()
            ),
            None => format!("the integration stalled at {}", Tdb(t).to_iso_utc()),
        }
    }

    /// The state at one end of an interval, its partials with respect to that end's variables,
    /// and its epoch.
    fn end_state(
        &self,
        end: End,
        z: &[f64],
        side: Side,
    ) -> Result<(State, DMatrix<f64>, f64), NBodyError> {
        match end {
            End::Node(i) => {
                let n = &self.nodes[i];
                let (s, p) = self.side_state(n, z, side)?;
                Ok((s, p, self.epoch(n, z)))
            }
            End::Patch(i) => {
                let o = self.patches[i].off;
                Ok((
                    State {
                        r: Vec3::new(z[o], z[o + 1], z[o + 2]),
                        v: Vec3::new(z[o + 3], z[o + 4], z[o + 5]),
                    },
                    DMatrix::identity(6, 6),
                    self.patches[i].t,
                ))
            }
        }
    }

    /// The heliocentric state on one side of a node, and its partials with respect to the
    /// node's variables (the time column: the body's motion only).
    fn side_state(
        &self,
        node: &Node,
        z: &[f64],
        side: Side,
    ) -> Result<(State, DMatrix<f64>), NBodyError> {
        let t = Tdb(self.epoch(node, z));
        let body = &self.tour.stops[node.stop].body;
        let b = body.state(t)?;
        let h = 600.0;
        let ab = (body.state(Tdb(t.0 + h))?.v - body.state(Tdb(t.0 - h))?.v) / (2.0 * h);
        let x = &z[node.off..node.off + node.nv];
        let mut p = DMatrix::zeros(6, node.nv);
        let (dr, dv);
        if node.hyperbola {
            let rho = Vec3::new(x[0], x[1], x[2]);
            let w = Vec3::new(x[3], x[4], x[5]);
            dr = rho;
            for i in 0..3 {
                p[(i, i)] = 1.0;
            }
            if side == Side::Out && node.powered {
                let d = x[6];
                let wn = w.norm();
                let wh = w / wn;
                dv = w + d * wh;
                let m = Matrix3::identity() + d * (Matrix3::identity() - wh * wh.transpose()) / wn;
                p.view_mut((3, 3), (3, 3)).copy_from(&m);
                for i in 0..3 {
                    p[(3 + i, 6)] = wh[i];
                }
            } else {
                dv = w;
                for i in 0..3 {
                    p[(3 + i, 3 + i)] = 1.0;
                }
            }
        } else {
            dr = Vec3::zeros();
            let col = match (node.role, side) {
                (Role::SwingBy, Side::Out) => 3,
                _ => 0,
            };
            dv = Vec3::new(x[col], x[col + 1], x[col + 2]);
            for i in 0..3 {
                p[(3 + i, col + i)] = 1.0;
            }
        }
        let tc = node.nv - 1;
        for i in 0..3 {
            p[(i, tc)] = b.v[i];
            p[(3 + i, tc)] = ab[i];
        }
        Ok((
            State {
                r: b.r + dr,
                v: b.v + dv,
            },
            p,
        ))
    }
}

/// One half-leg flown: end state, Φ, and the states of its steps.
struct Half {
    end: State,
    phi: Matrix6<f64>,
    states: Vec<(Tdb, State)>,
    evaluations: u64,
}

fn fly(
    start: &State,
    t0: f64,
    t1: f64,
    model: &Model<'_>,
    opts: &NBodyOptions,
    dense: bool,
    cancel: &dyn Fn() -> bool,
) -> Result<Half, NBodyError> {
    let go = |s: &State, a: f64, b: f64, max_step: f64| {
        nbody::propagate_stm(
            s,
            Tdb(a),
            Tdb(b),
            model.mu_sun,
            &model.bodies,
            &NBodyOptions {
                max_step_s: max_step,
                ..*opts
            },
            cancel,
        )
    };
    if !dense {
        let p = go(start, t0, t1, opts.max_step_s)?;
        return Ok(Half {
            end: p.end,
            phi: p.phi,
            states: p.states,
            evaluations: p.evaluations as u64,
        });
    }
    // Dense: hourly states within two days of the node, at least daily beyond (the largest
    // step a little under the hour and the day: the integrator may stretch its last step by 1 %).
    let near = 2.0 * 86_400.0;
    let span = (t1 - t0).abs();
    if span <= near {
        let p = go(start, t0, t1, 3_500.0)?;
        return Ok(Half {
            end: p.end,
            phi: p.phi,
            states: p.states,
            evaluations: p.evaluations as u64,
        });
    }
    let mid = t0 + near * (t1 - t0).signum();
    let a = go(start, t0, mid, 3_500.0)?;
    let b = go(&a.end, mid, t1, 84_000.0)?;
    let mut states = a.states;
    states.extend(b.states.into_iter().skip(1));
    Ok(Half {
        end: b.end,
        phi: b.phi * a.phi,
        states,
        evaluations: (a.evaluations + b.evaluations) as u64,
    })
}

/// Everything one evaluation of the residual produces.
struct Flown {
    /// Scaled residual.
    f: DVector<f64>,
    /// Unscaled residual rows' kinds, for reports: (leg or node, what).
    rows: Vec<Row>,
    /// Jacobian (unscaled residual by unscaled variables).
    jac: DMatrix<f64>,
    /// Per leg: forward half and backward half.
    halves: Vec<(Half, Half)>,
    evaluations: u64,
}

#[derive(Clone, Copy, Debug)]
enum Row {
    Position(usize),
    Velocity(usize),
    Periapsis(usize),
    Radius(usize),
}

impl Problem<'_> {
    fn rows(&self) -> Vec<Row> {
        let mut rows = Vec::new();
        for (k, iv) in self.intervals.iter().enumerate() {
            rows.extend([Row::Position(k); 3]);
            if !iv.dsm {
                rows.extend([Row::Velocity(k); 3]);
            }
        }
        for (i, n) in self.nodes.iter().enumerate() {
            if n.hyperbola {
                rows.push(Row::Periapsis(i));
                if n.rp_target.is_some() {
                    rows.push(Row::Radius(i));
                }
            }
        }
        rows
    }

    fn row_scale(&self, r: Row) -> f64 {
        match r {
            // Per component, so that the vector's norm meets the tolerance.
            Row::Position(_) => self.opts.position_tol_km / 3f64.sqrt(),
            Row::Velocity(_) => self.opts.velocity_tol_km_s / 3f64.sqrt(),
            Row::Periapsis(_) | Row::Radius(_) => self.opts.altitude_tol_km,
        }
    }

    /// Fly every leg from `z` and build the residual and its Jacobian.
    fn fly_all(
        &self,
        z: &[f64],
        model: &Model<'_>,
        dense: bool,
        cancel: &(dyn Fn() -> bool + Sync),
    ) -> Result<Flown, (usize, NBodyError)> {
        let rows = self.rows();
        let nz = z.len();
        let n_iv = self.intervals.len();
        // Starts of each half (forward from a, backward from b), with their partials.
        let mut starts = Vec::with_capacity(2 * n_iv);
        for iv in &self.intervals {
            for (end, side) in [(iv.a, Side::Out), (iv.b, Side::In)] {
                starts.push(self.end_state(end, z, side).map_err(|e| (iv.leg, e))?);
            }
        }
        // Fly the halves on every core, each worker taking the next half not yet taken.
        let opts = &self.opts.integration;
        let next = std::sync::atomic::AtomicUsize::new(0);
        let workers = std::thread::available_parallelism()
            .map_or(2, |n| n.get())
            .min(2 * n_iv);
        let mut results: Vec<Option<Result<Half, NBodyError>>> =
            (0..2 * n_iv).map(|_| None).collect();
        let done: Vec<Vec<(usize, Result<Half, NBodyError>)>> = std::thread::scope(|scope| {
            let handles: Vec<_> = (0..workers)
                .map(|_| {
                    let (next, starts) = (&next, &starts);
                    scope.spawn(move || {
                        let mut out = Vec::new();
                        loop {
                            let i = next.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
                            if i >= starts.len() {
                                break;
                            }
                            let (s, _, t) = &starts[i];
                            let tm = self.intervals[i / 2].tm;
                            let r = fly(s, *t, tm, model, opts, dense, cancel).map_err(|e| {
                                let arc = format!(
                                    "the arc from {} {} to {}",
                                    Tdb(*t).to_iso_utc(),
                                    if i % 2 == 0 { "forwards" } else { "backwards" },
                                    Tdb(tm).to_iso_utc()
                                );
                                match e {
                                    NBodyError::Integration(why) => {
                                        NBodyError::Integration(format!("{why} ({arc})"))
                                    }
                                    NBodyError::Stalled { t, r, .. } => NBodyError::Integration(
                                        format!("{} ({arc})", self.stall_words(model, t, r)),
                                    ),
                                    other => other,
                                }
                            });
                            out.push((i, r));
                        }
                        out
                    })
                })
                .collect();
            handles
                .into_iter()
                .map(|h| h.join().unwrap_or_default())
                .collect()
        });
        for (i, r) in done.into_iter().flatten() {
            results[i] = Some(r);
        }
        let mut halves = Vec::with_capacity(n_iv);
        let mut evaluations = 0;
        let mut it = results.into_iter();
        for iv in &self.intervals {
            let mut take = || {
                it.next()
                    .flatten()
                    .unwrap_or(Err(NBodyError::Integration("a worker stopped".into())))
                    .map_err(|e| (iv.leg, e))
            };
            let fwd = take()?;
            let bwd = take()?;
            evaluations += fwd.evaluations + bwd.evaluations;
            halves.push((fwd, bwd));
        }
        let m = rows.len();
        let mut f = DVector::zeros(m);
        let mut jac = DMatrix::zeros(m, nz);
        let mut row = 0;
        let forces = Forces {
            mu_sun: model.mu_sun,
            bodies: &model.bodies,
        };
        for (k, iv) in self.intervals.iter().enumerate() {
            let (fwd, bwd) = &halves[k];
            let nrow = if iv.dsm { 3 } else { 6 };
            let xf = [fwd.end.r, fwd.end.v];
            let xb = [bwd.end.r, bwd.end.v];
            for i in 0..nrow {
                f[row + i] = xf[i / 3][i % 3] - xb[i / 3][i % 3];
            }
            for (side, half, end, sign) in [(0, fwd, iv.a, 1.0), (1, bwd, iv.b, -1.0)] {
                let (s, p, t) = &starts[2 * k + side];
                let mut p = p.clone();
                let (off, nv) = match end {
                    End::Node(i) => {
                        let node = &self.nodes[i];
                        // The flow's own dependence on its start time: −Φ f(t₀, x₀).
                        let a = forces.accel(Tdb(*t), &s.r);
                        let tc = node.nv - 1;
                        for i in 0..3 {
                            p[(i, tc)] -= s.v[i];
                            p[(3 + i, tc)] -= a[i];
                        }
                        (node.off, node.nv)
                    }
                    End::Patch(i) => (self.patches[i].off, 6),
                };
                let phi = DMatrix::from_fn(6, 6, |i, j| half.phi[(i, j)]);
                let d = phi * p;
                for i in 0..nrow {
                    for j in 0..nv {
                        jac[(row + i, off + j)] += sign * d[(i, j)];
                    }
                }
            }
            row += nrow;
        }
        for n in &self.nodes {
            if !n.hyperbola {
                continue;
            }
            let x = &z[n.off..n.off + 6];
            let rho = Vec3::new(x[0], x[1], x[2]);
            let w = Vec3::new(x[3], x[4], x[5]);
            let wn = w.norm();
            let wh = w / wn;
            let c = rho.dot(&wh);
            f[row] = c;
            let dw = (rho - c * wh) / wn;
            for i in 0..3 {
                jac[(row, n.off + i)] = wh[i];
                jac[(row, n.off + 3 + i)] = dw[i];
            }
            row += 1;
            if let Some(rp) = n.rp_target {
                let rn = rho.norm();
                f[row] = rn - rp;
                for i in 0..3 {
                    jac[(row, n.off + i)] = rho[i] / rn;
                }
                row += 1;
            }
        }
        for (i, r) in rows.iter().enumerate() {
            f[i] /= self.row_scale(*r);
        }
        Ok(Flown {
            f,
            rows,
            jac,
            halves,
            evaluations,
        })
    }
}

fn merit(f: &DVector<f64>) -> f64 {
    f.norm()
}

fn converged(f: &DVector<f64>) -> bool {
    f.iter().all(|x| x.abs() <= 1.0)
}

/// Outcome of one Newton stage.
enum Stage {
    Done,
    Failed(String),
}

struct Solver<'a, 'b> {
    p: Problem<'a>,
    frozen: Vec<bool>,
    iterations: usize,
    evaluations: u64,
    cancel: &'b (dyn Fn() -> bool + Sync),
    progress: &'b dyn Fn(f64),
}

impl Solver<'_, '_> {
    fn describe(&self, fl: &Flown) -> String {
        // The worst row, in words.
        let mut worst = (0usize, 0.0f64);
        for (i, v) in fl.f.iter().enumerate() {
            if v.abs() > worst.1 {
                worst = (i, v.abs());
            }
        }
        let tour = self.p.tour;
        let leg_words = |k: usize| {
            format!(
                "leg {} ({} to {})",
                k + 1,
                tour.stops[k].body.name,
                tour.stops[k + 1].body.name
            )
        };
        match fl.rows[worst.0] {
            Row::Position(k) | Row::Velocity(k) => {
                let (fwd, bwd) = &fl.halves[k];
                let iv = &self.p.intervals[k];
                format!(
                    "{} does not close: at the match point ({}) the two halves are {:.0} km and {:.4} km/s apart",
                    leg_words(iv.leg),
                    Tdb(iv.tm).to_iso_utc(),
                    (fwd.end.r - bwd.end.r).norm(),
                    (fwd.end.v - bwd.end.v).norm()
                )
            }
            Row::Periapsis(i) | Row::Radius(i) => {
                let n = &self.p.nodes[i];
                format!(
                    "the {} at {} is off its periapsis target by {:.0} km",
                    n.role.word(),
                    tour.stops[n.stop].body.name,
                    worst.1 * self.p.opts.altitude_tol_km
                )
            }
        }
    }

    /// Newton iterations at one stage of the model.
    fn newton(
        &mut self,
        z: &mut [f64],
        model: &Model<'_>,
        dense: bool,
    ) -> Result<Stage, ContinuousError> {
        let mut fl = match self.p.fly_all(z, model, dense, self.cancel) {
            Ok(f) => f,
            Err((_, NBodyError::Cancelled)) => return Err(ContinuousError::Cancelled),
            Err((k, e)) => return Ok(Stage::Failed(format!("leg {}: {e}", k + 1))),
        };
        self.evaluations += fl.evaluations;
        for _ in 0..self.p.opts.max_iterations {
            if (self.cancel)() {
                return Err(ContinuousError::Cancelled);
            }
            if converged(&fl.f) {
                // Inequalities: a targeted swing-by below its minimum radius is held at it.
                let mut added = false;
                for n in &mut self.p.nodes {
                    if n.hyperbola && n.rp_target.is_none() {
                        let rho = Vec3::new(z[n.off], z[n.off + 1], z[n.off + 2]);
                        if rho.norm() < n.rp_min - self.p.opts.altitude_tol_km {
                            n.rp_target = Some(n.rp_min);
                            added = true;
                        }
                    }
                }
                if !added {
                    return Ok(Stage::Done);
                }
                fl = match self.p.fly_all(z, model, dense, self.cancel) {
                    Ok(f) => f,
                    Err((_, NBodyError::Cancelled)) => return Err(ContinuousError::Cancelled),
                    Err((k, e)) => return Ok(Stage::Failed(format!("leg {}: {e}", k + 1))),
                };
                continue;
            }
            self.iterations += 1;
            // Scaled least-norm step over the free variables.
            let free: Vec<usize> = (0..z.len()).filter(|&j| !self.frozen[j]).collect();
            let m = fl.f.len();
            let rs: Vec<f64> = fl.rows.iter().map(|r| self.p.row_scale(*r)).collect();
            let a = DMatrix::from_fn(m, free.len(), |i, j| {
                fl.jac[(i, free[j])] * self.p.scales[free[j]] / rs[i]
            });
            let svd = a.svd(true, true);
            let (Some(uu), Some(vt)) = (&svd.u, &svd.v_t) else {
                return Ok(Stage::Failed(self.describe(&fl)));
            };
            let sv = &svd.singular_values;
            let smax = sv.max();
            if !(smax.is_finite() && smax > 0.0) {
                return Ok(Stage::Failed(self.describe(&fl)));
            }
            // Uᵀ(−F), once; each damping λ then gives u = V diag(σ/(σ²+λ)) Uᵀ(−F) (λ → 0: the
            // least-norm Newton step; larger λ: shorter steps towards steepest descent).
            let utf = uu.transpose() * (-&fl.f);
            let m0 = merit(&fl.f);
            let mut accepted = None;
            // Trials: the least-norm Newton step, then shorter ones along it, then damped
            // (Levenberg-Marquardt) steps of growing damping.
            let trials: [(f64, f64); 12] = [
                (0.0, 1.0),
                (0.0, 0.5),
                (0.0, 0.25),
                (0.0, 0.125),
                (1e-12, 1.0),
                (1e-10, 1.0),
                (1e-8, 1.0),
                (1e-6, 1.0),
                (1e-4, 1.0),
                (1e-3, 1.0),
                (1e-2, 1.0),
                (1e-1, 1.0),
            ];
            for (lam_rel, alpha) in trials {
                let lam = lam_rel * smax * smax;
                let mut c = DVector::zeros(sv.len());
                for i in 0..sv.len() {
                    let si = sv[i];
                    if si > 1e-13 * smax {
                        c[i] = si / (si * si + lam) * utf[i];
                    }
                }
                let u = vt.transpose() * c;
                let mut dz = vec![0.0; z.len()];
                for (j, &col) in free.iter().enumerate() {
                    dz[col] = u[j] * self.p.scales[col];
                }
                // Trust region: a periapsis may move by half its radius per step at most.
                let mut cap: f64 = alpha;
                for n in &self.p.nodes {
                    if n.hyperbola {
                        let r = Vec3::new(z[n.off], z[n.off + 1], z[n.off + 2]).norm();
                        let d = Vec3::new(dz[n.off], dz[n.off + 1], dz[n.off + 2]).norm();
                        if alpha * d > 0.5 * r {
                            cap = cap.min(0.5 * r / d);
                        }
                    }
                }
                let mut trial = z.to_vec();
                for j in 0..z.len() {
                    trial[j] += cap * dz[j];
                }
                // Epochs within their bounds.
                for n in &self.p.nodes {
                    let i = n.t_index();
                    trial[i] = trial[i].clamp(-n.tol_s, n.tol_s);
                }
                match self.p.fly_all(&trial, model, dense, self.cancel) {
                    Ok(t) => {
                        self.evaluations += t.evaluations;
                        if merit(&t.f) < m0 {
                            accepted = Some((trial, t));
                            break;
                        }
                    }
                    Err((_, NBodyError::Cancelled)) => return Err(ContinuousError::Cancelled),
                    Err(_) => {}
                }
            }
            match accepted {
                Some((trial, t)) => {
                    z.copy_from_slice(&trial);
                    for n in &self.p.nodes {
                        let i = n.t_index();
                        if z[i].abs() >= n.tol_s {
                            self.frozen[i] = true;
                        }
                    }
                    fl = t;
                }
                None => return Ok(Stage::Failed(self.describe(&fl))),
            }
            let progress = (1.0 / (1.0 + merit(&fl.f).log10().max(0.0))).clamp(0.0, 1.0);
            (self.progress)(progress);
        }
        if converged(&fl.f) {
            return Ok(Stage::Done);
        }
        Ok(Stage::Failed(format!(
            "not converged in {} iterations: {}",
            self.p.opts.max_iterations,
            self.describe(&fl)
        )))
    }
}

/// Direct solve, then continuation in the unvisited bodies' masses: (converged, stages solved,
/// why not, the variables reached).
type Attempt = (bool, Vec<f64>, Option<String>, Vec<f64>);

fn attempt(
    s: &mut Solver<'_, '_>,
    model: &mut Model<'_>,
    z0: &[f64],
) -> Result<Attempt, ContinuousError> {
    let mut z = z0.to_vec();
    let mut stages = Vec::new();
    let mut failure = None;
    model.set_stage(1.0);
    let mut done = match s.newton(&mut z, model, false)? {
        Stage::Done => {
            stages.push(1.0);
            true
        }
        Stage::Failed(why) => {
            failure = Some(why);
            false
        }
    };
    let unvisited = model.visited.iter().any(|v| !v);
    if !done && unvisited {
        z.copy_from_slice(z0);
        s.frozen = vec![false; z.len()];
        let mut scale = 0.0;
        let mut step: f64 = 0.25;
        let mut last_good = z.clone();
        loop {
            model.set_stage(scale);
            match s.newton(&mut z, model, false)? {
                Stage::Done => {
                    stages.push(scale);
                    last_good.copy_from_slice(&z);
                    if scale >= 1.0 {
                        done = true;
                        failure = None;
                        break;
                    }
                    step = (step * 2.0).min(1.0);
                    scale = (scale + step).min(1.0);
                }
                Stage::Failed(why) => {
                    if stages.is_empty() || step < 1.0 / 64.0 {
                        failure = Some(format!(
                            "{why} (continuation in the masses of the bodies not visited reached {:.3} of full mass)",
                            stages.last().copied().unwrap_or(0.0)
                        ));
                        break;
                    }
                    z.copy_from_slice(&last_good);
                    let back = stages.last().copied().unwrap_or(0.0);
                    step *= 0.5;
                    scale = back + step;
                }
            }
        }
    }
    Ok((done, stages, failure, z))
}

/// Osculating hyperbola at a periapsis state: (|v∞|, incoming asymptote direction, B·T, B·R).
fn approach(rho: &Vec3, w: &Vec3, mu: f64) -> Option<(f64, Vec3, f64, f64)> {
    let r = rho.norm();
    let energy = 0.5 * w.norm_squared() - mu / r;
    if !(energy > 0.0) {
        return None;
    }
    let vinf = (2.0 * energy).sqrt();
    let e = 1.0 + r * vinf * vinf / mu;
    let th = (-1.0 / e).acos();
    let p = rho / r;
    let q = w.normalize();
    let s = -th.cos() * p + th.sin() * q;
    let frame = BPlaneFrame::new(&(s * vinf));
    let b = mu / (vinf * vinf) * (e * e - 1.0).sqrt();
    let bh = (p - p.dot(&s) * s).try_normalize(1e-12)?;
    let bv = b * bh;
    Some((vinf, s, bv.dot(&frame.t), bv.dot(&frame.r)))
}

/// Solve for the continuous trajectory of an evaluated tour. `progress(f)` is told a rough
/// fraction done; `cancel()` stops it.
pub fn solve(
    tour: &PreparedTour,
    e: &Evaluation,
    opts: &ContinuousOptions,
    progress: &dyn Fn(f64),
    cancel: &(dyn Fn() -> bool + Sync),
) -> Result<Continuous, ContinuousError> {
    for (k, l) in e.legs.iter().enumerate() {
        if !l.solved {
            return Err(ContinuousError::Unsolved(k + 1));
        }
    }
    let (mut model, index) = build_model(tour, opts.mass_scale, &opts.integration);
    let (p, z0) = Problem::new(tour, e, &index, &model, opts);
    let nz = z0.len();
    let mut s = Solver {
        p,
        frozen: vec![false; nz],
        iterations: 0,
        evaluations: 0,
        cancel,
        progress,
    };
    let (mut done, mut stages, mut failure, mut z) = attempt(&mut s, &mut model, &z0)?;
    let mut notes = Vec::new();
    // Shaped swing-bys whose altitude cannot be held: a resonant return (back to the same body
    // after whole revolutions) is the usual case, where the n-body trajectory has no solution
    // with both altitudes fixed near the design. Free them (at least the minimum altitude) and
    // say so.
    let held: Vec<(usize, f64)> = (0..s.p.nodes.len())
        .filter(|&i| s.p.nodes[i].role == Role::SwingBy)
        .filter_map(|i| s.p.nodes[i].rp_target.map(|r| (i, r)))
        .collect();
    if !done && !held.is_empty() {
        for &(i, _) in &held {
            s.p.nodes[i].rp_target = None;
        }
        s.frozen = vec![false; nz];
        let again = attempt(&mut s, &mut model, &z0)?;
        if again.0 {
            for &(i, _) in &held {
                let n = &s.p.nodes[i];
                notes.push(format!(
                    "the designed altitude of the swing-by at {} (stop {}) could not be held; it was freed (at least the minimum altitude)",
                    tour.stops[n.stop].body.name,
                    n.stop + 1
                ));
            }
            (done, stages, failure, z) = again;
        } else {
            // Keep the first attempt's report (it held the design's altitudes).
            for &(i, r) in &held {
                s.p.nodes[i].rp_target = Some(r);
            }
        }
    }
    model.set_stage(if done {
        1.0
    } else {
        stages.last().copied().unwrap_or(1.0)
    });
    // The last iterations on the trajectory as exported (dense steps): the converged trajectory
    // is the one written, not a neighbour of it.
    if done {
        if let Stage::Failed(why) = s.newton(&mut z, &model, true)? {
            done = false;
            failure = Some(format!("with the export's step sizes: {why}"));
        }
    }
    // The trajectory as solved (or as far as it got), densely.
    let fl = match s.p.fly_all(&z, &model, true, cancel) {
        Ok(f) => f,
        Err((_, NBodyError::Cancelled)) => return Err(ContinuousError::Cancelled),
        Err((k, err)) => {
            // Even the start does not fly: report the leg, with no trajectory.
            return Ok(Continuous {
                converged: false,
                notes: Vec::new(),
                failure: Some(format!(
                    "leg {} ({} to {}) cannot be flown: {err}",
                    k + 1,
                    tour.stops[k].body.name,
                    tour.stops[k + 1].body.name
                )),
                model: model.info,
                encounters: Vec::new(),
                impulses: Vec::new(),
                matches: Vec::new(),
                launch_c3: 0.0,
                designed_launch_c3: e.launch.vinf * e.launch.vinf,
                arrival_vinf_km_s: 0.0,
                total_dv_km_s: 0.0,
                designed_total_dv_km_s: e.ledger.total_dv_km_s,
                max_position_gap_km: 0.0,
                max_velocity_gap_km_s: 0.0,
                iterations: s.iterations,
                continuation: stages,
                arcs: Vec::new(),
                evaluations: s.evaluations,
            });
        }
    };
    s.evaluations += fl.evaluations;
    progress(1.0);
    let mut c = report(
        tour,
        e,
        &s.p,
        &z,
        &fl,
        model.info,
        stages,
        s.iterations,
        s.evaluations,
        done,
        failure,
    );
    c.notes = notes;
    Ok(c)
}

#[allow(clippy::too_many_arguments)]
fn report(
    tour: &PreparedTour,
    e: &Evaluation,
    p: &Problem<'_>,
    z: &[f64],
    fl: &Flown,
    info: ModelInfo,
    stages: Vec<f64>,
    iterations: usize,
    evaluations: u64,
    done: bool,
    failure: Option<String>,
) -> Continuous {
    let mut encounters = Vec::new();
    let mut impulses = Vec::new();
    let mut launch_c3 = 0.0;
    let mut arrival_vinf = 0.0;
    let mut total = 0.0;
    for n in &p.nodes {
        let stop = &tour.stops[n.stop];
        let st = &e.stops[n.stop];
        let t = p.epoch(n, z);
        let x = &z[n.off..n.off + n.nv];
        let sb = st.swingby.as_ref();
        let designed_vinf = match n.role {
            Role::Launch => st.vinf_out.norm(),
            _ => st.vinf_in.norm(),
        };
        let designed_alt = match n.role {
            Role::Launch => n.hyperbola.then_some(p.opts.launch_altitude_km),
            Role::SwingBy => sb.and_then(|b| b.altitude_km),
            Role::Arrival => n.rp_target.map(|r| r - n.radius),
        };
        let (mut alt, mut bt, mut br, mut vinf) = (None, None, None, designed_vinf);
        if n.hyperbola {
            let rho = Vec3::new(x[0], x[1], x[2]);
            let w = Vec3::new(x[3], x[4], x[5]);
            alt = Some(rho.norm() - n.radius);
            let wout = if n.powered {
                w + x[6] * w.normalize()
            } else {
                w
            };
            match n.role {
                Role::Launch => {
                    let c3 = wout.norm_squared() - 2.0 * n.mu / rho.norm();
                    launch_c3 = c3;
                    vinf = c3.max(0.0).sqrt();
                }
                _ => {
                    if let Some((v, _, t_, r_)) = approach(&rho, &w, n.mu) {
                        vinf = v;
                        bt = Some(t_);
                        br = Some(r_);
                    }
                }
            }
            if n.powered {
                let dv = wout - w;
                total += dv.norm();
                impulses.push(Impulse {
                    what: format!("powered swing-by at {}", stop.body.name),
                    epoch_tdb_s: t,
                    epoch: Tdb(t).to_iso_utc(),
                    dv_km_s: [dv.x, dv.y, dv.z],
                    magnitude_km_s: dv.norm(),
                    designed_km_s: sb.map_or(0.0, |b| b.powered_dv_km_s),
                });
            }
            if n.role == Role::Arrival {
                arrival_vinf = vinf;
                let dv = match tour.arrival {
                    ArrivalGoal::Capture { eccentricity, .. } => {
                        let r = rho.norm();
                        w.norm() - (n.mu * (1.0 + eccentricity) / r).sqrt()
                    }
                    ArrivalGoal::Rendezvous => w.norm(),
                    ArrivalGoal::FlybyOnly => 0.0,
                };
                if dv > 0.0 {
                    total += dv;
                    let d = -dv * w.normalize();
                    impulses.push(Impulse {
                        what: format!("arrival manoeuvre at {} (periapsis)", stop.body.name),
                        epoch_tdb_s: t,
                        epoch: Tdb(t).to_iso_utc(),
                        dv_km_s: [d.x, d.y, d.z],
                        magnitude_km_s: dv,
                        designed_km_s: e.arrival.dv_km_s,
                    });
                }
            }
        } else {
            match n.role {
                Role::Launch => {
                    launch_c3 = x[0] * x[0] + x[1] * x[1] + x[2] * x[2];
                    vinf = launch_c3.sqrt();
                }
                Role::SwingBy => {
                    let vin = Vec3::new(x[0], x[1], x[2]);
                    let vout = Vec3::new(x[3], x[4], x[5]);
                    vinf = vin.norm();
                    let dv = vout - vin;
                    total += dv.norm();
                    impulses.push(Impulse {
                        what: format!("impulse at {} (a massless body)", stop.body.name),
                        epoch_tdb_s: t,
                        epoch: Tdb(t).to_iso_utc(),
                        dv_km_s: [dv.x, dv.y, dv.z],
                        magnitude_km_s: dv.norm(),
                        designed_km_s: sb.map_or(0.0, |b| b.powered_dv_km_s),
                    });
                }
                Role::Arrival => {
                    let vin = Vec3::new(x[0], x[1], x[2]);
                    vinf = vin.norm();
                    arrival_vinf = vinf;
                    let dv = match tour.arrival {
                        ArrivalGoal::FlybyOnly => 0.0,
                        ArrivalGoal::Rendezvous => vinf,
                        ArrivalGoal::Capture { .. } => e.arrival.dv_km_s,
                    };
                    if dv > 0.0 {
                        total += dv;
                        impulses.push(Impulse {
                            what: format!("arrival manoeuvre at {}", stop.body.name),
                            epoch_tdb_s: t,
                            epoch: Tdb(t).to_iso_utc(),
                            dv_km_s: [-vin.x, -vin.y, -vin.z],
                            magnitude_km_s: dv,
                            designed_km_s: e.arrival.dv_km_s,
                        });
                    }
                }
            }
        }
        encounters.push(Encounter {
            stop: n.stop,
            body: stop.body.name.to_string(),
            role: n.role.word(),
            epoch_tdb_s: t,
            epoch: Tdb(t).to_iso_utc(),
            epoch_shift_s: t - n.t0,
            altitude_km: alt,
            designed_altitude_km: designed_alt,
            min_altitude_km: stop.min_altitude_km,
            b_t_km: bt,
            b_r_km: br,
            designed_b_t_km: sb.and_then(|b| b.bplane.map(|p| p.b_t)),
            designed_b_r_km: sb.and_then(|b| b.bplane.map(|p| p.b_r)),
            vinf_km_s: vinf,
            designed_vinf_km_s: designed_vinf,
        });
    }
    // Match points, manoeuvres, arcs.
    let mut matches = Vec::new();
    let mut max_pos: f64 = 0.0;
    let mut max_vel: f64 = 0.0;
    let mut arcs: Vec<CoastArc> = Vec::new();
    let mut current: Vec<(Tdb, State)> = Vec::new();
    let mut from = format!("launch from {}", tour.stops[0].body.name);
    let close =
        |arcs: &mut Vec<CoastArc>, states: &mut Vec<(Tdb, State)>, from: &str, to: String| {
            if !states.is_empty() {
                arcs.push(CoastArc {
                    label: format!("{from} to {to}"),
                    states: std::mem::take(states),
                });
            }
        };
    for (iv, (fwd, bwd)) in p.intervals.iter().zip(&fl.halves) {
        let (tm, dsm, k) = (iv.tm, iv.dsm, iv.leg);
        let gap_r = (fwd.end.r - bwd.end.r).norm();
        let gap_v = (fwd.end.v - bwd.end.v).norm();
        max_pos = max_pos.max(gap_r);
        if !dsm {
            max_vel = max_vel.max(gap_v);
        }
        matches.push(MatchPoint {
            leg: k + 1,
            epoch: Tdb(tm).to_iso_utc(),
            position_km: gap_r,
            velocity_km_s: gap_v,
        });
        let skip = usize::from(!current.is_empty());
        current.extend(fwd.states.iter().skip(skip).copied());
        if dsm {
            let dv = bwd.end.v - fwd.end.v;
            total += dv.norm();
            impulses.push(Impulse {
                what: format!("deep-space manoeuvre on leg {}", k + 1),
                epoch_tdb_s: tm,
                epoch: Tdb(tm).to_iso_utc(),
                dv_km_s: [dv.x, dv.y, dv.z],
                magnitude_km_s: dv.norm(),
                designed_km_s: e.legs[k].dsm.map_or(0.0, |m| m.dv_km_s),
            });
            close(
                &mut arcs,
                &mut current,
                &from,
                format!("the deep-space manoeuvre of leg {}", k + 1),
            );
            from = format!("the deep-space manoeuvre of leg {}", k + 1);
            current.extend(bwd.states.iter().rev().copied());
        } else {
            current.extend(bwd.states.iter().rev().skip(1).copied());
        }
        let End::Node(next) = iv.b else {
            continue;
        };
        let next = &p.nodes[next];
        let impulsive = next.powered || (!next.hyperbola && next.role == Role::SwingBy);
        if impulsive {
            let name = &tour.stops[next.stop].body.name;
            close(
                &mut arcs,
                &mut current,
                &from,
                format!("the powered swing-by at {name}"),
            );
            from = format!("the powered swing-by at {name}");
        }
    }
    let last = &tour.stops[tour.stops.len() - 1].body.name;
    close(&mut arcs, &mut current, &from, format!("arrival at {last}"));
    impulses.sort_by(|a, b| a.epoch_tdb_s.total_cmp(&b.epoch_tdb_s));
    Continuous {
        converged: done,
        failure: if done { None } else { failure },
        notes: Vec::new(),
        model: info,
        encounters,
        impulses,
        matches,
        launch_c3,
        designed_launch_c3: e.launch.vinf * e.launch.vinf,
        arrival_vinf_km_s: arrival_vinf,
        total_dv_km_s: total,
        designed_total_dv_km_s: e.ledger.total_dv_km_s,
        max_position_gap_km: max_pos,
        max_velocity_gap_km_s: max_vel,
        iterations,
        continuation: stages,
        arcs,
        evaluations,
    }
}

/// Km with no decimals, or a dash.
fn km(v: Option<f64>) -> String {
    v.map_or("—".into(), |x| format!("{x:.0}"))
}

impl Continuous {
    /// The verdict in one sentence.
    pub fn verdict(&self) -> String {
        if self.converged {
            format!(
                "Converged: one continuous n-body trajectory through every swing-by (largest gap at a match point {:.3} km, {:.3} mm/s); total Δv {:.3} km/s against {:.3} km/s in patched conics ({:+.3}).",
                self.max_position_gap_km,
                self.max_velocity_gap_km_s * 1e6,
                self.total_dv_km_s,
                self.designed_total_dv_km_s,
                self.total_dv_km_s - self.designed_total_dv_km_s
            )
        } else {
            format!(
                "Not converged: {}",
                self.failure.as_deref().unwrap_or("no reason recorded")
            )
        }
    }
}

/// The text report of a solve (the CLI's, and the workbench's report).
pub fn summary_text(design: &str, c: &Continuous, seconds: f64) -> String {
    use std::fmt::Write as _;
    let mut s = String::new();
    let _ = writeln!(s, "{design} · continuous n-body trajectory");
    let _ = writeln!(s, "{}", c.verdict());
    for n in &c.notes {
        let _ = writeln!(s, "Note: {n}.");
    }
    let _ = writeln!(
        s,
        "Model: the Sun (GM {:.3} km³/s²) and {} as point masses; ephemeris {}; GM values {}; {}.",
        c.model.gm_sun_km3_s2,
        c.model
            .bodies
            .iter()
            .map(|b| format!("{} {:.6}", b.name, b.gm_km3_s2))
            .collect::<Vec<_>>()
            .join(", "),
        c.model.ephemeris,
        c.model.gm_set,
        c.model.earth_moon
    );
    let _ = writeln!(s, "Integrator: {}.", c.model.integrator);
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "{:<3} {:<9} {:<9} {:<28} {:>10} {:>12} {:>12} {:>11} {:>11} {:>11} {:>11} {:>9} {:>9}",
        "#",
        "body",
        "role",
        "periapsis (UTC)",
        "shift (s)",
        "alt (km)",
        "design (km)",
        "B·T (km)",
        "B·R (km)",
        "design B·T",
        "design B·R",
        "v∞",
        "design v∞"
    );
    for e in &c.encounters {
        let _ = writeln!(
            s,
            "{:<3} {:<9} {:<9} {:<28} {:>10.1} {:>12} {:>12} {:>11} {:>11} {:>11} {:>11} {:>9.4} {:>9.4}",
            e.stop + 1,
            e.body,
            e.role,
            e.epoch,
            e.epoch_shift_s,
            km(e.altitude_km),
            km(e.designed_altitude_km),
            km(e.b_t_km),
            km(e.b_r_km),
            km(e.designed_b_t_km),
            km(e.designed_b_r_km),
            e.vinf_km_s,
            e.designed_vinf_km_s
        );
    }
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "Launch C3 {:.3} km²/s² (patched conics {:.3}); arrival v∞ {:.4} km/s.",
        c.launch_c3, c.designed_launch_c3, c.arrival_vinf_km_s
    );
    if c.impulses.is_empty() {
        let _ = writeln!(s, "No impulses after launch.");
    } else {
        let _ = writeln!(s, "Impulses:");
        for i in &c.impulses {
            let _ = writeln!(
                s,
                "  {:<48} {:<28} {:>9.4} km/s  (patched conics {:.4})",
                i.what, i.epoch, i.magnitude_km_s, i.designed_km_s
            );
        }
    }
    let _ = writeln!(
        s,
        "Total Δv {:.4} km/s (patched conics {:.4}, change {:+.4}).",
        c.total_dv_km_s,
        c.designed_total_dv_km_s,
        c.total_dv_km_s - c.designed_total_dv_km_s
    );
    let _ = writeln!(s, "Match points:");
    for m in &c.matches {
        let _ = writeln!(
            s,
            "  leg {:<3} {:<28} gap {:.3} km, {:.6} km/s",
            m.leg, m.epoch, m.position_km, m.velocity_km_s
        );
    }
    let _ = writeln!(
        s,
        "{} Newton iterations; continuation stages {:?}; {} right-hand-side evaluations; {:.1} s.",
        c.iterations, c.continuation, c.evaluations, seconds
    );
    s.push_str(crate::CAUTION);
    s
}
