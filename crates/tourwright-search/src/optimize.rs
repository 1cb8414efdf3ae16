//! The date optimiser: self-adaptive differential evolution (jDE: Brest et al., IEEE TEC 10(6),
//! 2006) on several islands with ring migration and restarts, then a compass-search polish.
//! Variables are the launch epoch (MJD2000) and each leg's time of flight (days); the objective is
//! the design's (see `Objective`) plus penalties for broken limits. Deterministic per seed: the
//! islands' count is fixed, they advance in lock-step blocks and migrate in a fixed order.

use rayon::prelude::*;

use tourwright_astro::lambert::Branch;
use tourwright_astro::time::{Epoch, Tdb};
use tourwright_mission::design::{
    ArrivalGoal, Dsm, DsmTime, LaunchVinf, LegOptions, MissionDesign, SwingbyMode,
};
use tourwright_mission::evaluate::{EvalOptions, Evaluation, Warning, evaluate};
use tourwright_mission::launch::{asymptote_vector, dla_rla_deg};
use tourwright_mission::rules::DEFAULT_MAX_LAUNCH_VINF_KM_S;
use tourwright_mission::tour::{DsmWhen, TourDsm};
use tourwright_mission::{Objective, PreparedTour, Schedule};

use crate::job::Progress;
use crate::polish::{
    LocalOptions, NormBlocks, auglag_box, clamp_safe, compass_search, lm_sum_of_norms,
};

/// A small, fast, seedable generator (xoshiro256**, Blackman & Vigna 2018).
#[derive(Clone, Debug)]
pub struct Rng([u64; 4]);

impl Rng {
    /// Seed through SplitMix64 so that nearby seeds give unrelated streams.
    pub fn new(seed: u64) -> Self {
        let mut z = seed;
        let mut next = || {
            z = z.wrapping_add(0x9E37_79B9_7F4A_7C15);
            let mut x = z;
            x = (x ^ (x >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            x = (x ^ (x >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
            x ^ (x >> 31)
        };
        Rng([next(), next(), next(), next()])
    }
    /// Next 64 random bits.
    pub fn next_u64(&mut self) -> u64 {
        let s = &mut self.0;
        let result = s[1].wrapping_mul(5).rotate_left(7).wrapping_mul(9);
        let t = s[1] << 17;
        s[2] ^= s[0];
        s[3] ^= s[1];
        s[1] ^= s[2];
        s[0] ^= s[3];
        s[2] ^= t;
        s[3] = s[3].rotate_left(45);
        result
    }
    /// Uniform in [0, 1).
    pub fn uniform(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }
    /// Uniform in [a, b).
    pub fn range(&mut self, a: f64, b: f64) -> f64 {
        a + (b - a) * self.uniform()
    }
    /// Uniform integer in [0, n).
    pub fn below(&mut self, n: usize) -> usize {
        ((self.uniform() * n as f64) as usize).min(n - 1)
    }
}

/// Why a design cannot be optimised.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum ProblemError {
    /// The design cannot be prepared.
    #[error("{0}")]
    Design(String),
    /// A bound is reversed or not a number.
    #[error("{field}: {reason}")]
    Bounds {
        /// The field of the design.
        field: String,
        /// Why.
        reason: String,
    },
}

/// An optimisation problem built from a design: bounds, objective and limits.
#[derive(Clone, Debug)]
pub struct Problem {
    /// The tour whose epochs are varied (shaped swing-bys are treated as targeted).
    pub tour: PreparedTour,
    /// Lower bounds: launch (MJD2000), then each leg's TOF (days).
    pub lo: Vec<f64>,
    /// Upper bounds.
    pub hi: Vec<f64>,
    /// What is minimised.
    pub objective: Objective,
    /// Limit on the total time of flight, days.
    pub max_total_tof_days: Option<f64>,
    /// Per leg: the body's orbital period (days) when the leg returns to the body it left.
    pub resonant_periods: Vec<Option<f64>>,
    /// The limits kept, each as `g ≤ 0`.
    pub constraints: Vec<Constraint>,
    /// Which variables are integer choices (held fixed by the local descent).
    pub integer: Vec<bool>,
    /// (leg, variable index) of each revolution choice.
    pub rev_vars: Vec<(usize, usize)>,
    /// The variables of each leg with a deep-space manoeuvre (the MGA-1DSM model).
    pub dsm_vars: Vec<DsmVars>,
    /// The design's leg options (manoeuvre bounds and how dates are written back).
    pub design_legs: Vec<LegOptions>,
    /// The design's swing-by modes (a shaped swing-by searched as targeted is written back
    /// shaped, with the geometry found).
    pub design_modes: Vec<SwingbyMode>,
}

/// The variables of a leg with a deep-space manoeuvre.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DsmVars {
    /// Leg index.
    pub leg: usize,
    /// Index of the manoeuvre's fraction of the leg, η.
    pub eta: usize,
    /// The variables of the state the leg starts from.
    pub start: DsmStartVars,
}

/// How a manoeuvre leg's start is searched.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum DsmStartVars {
    /// First leg: the launch v∞ magnitude (km/s) and direction as two numbers in [0, 1] that map
    /// uniformly onto the sphere: RLA = 360° u, DLA = asin(2 w − 1).
    Launch {
        /// Index of |v∞|.
        vinf: usize,
        /// Index of u.
        u: usize,
        /// Index of w.
        w: usize,
    },
    /// After a swing-by: an unpowered, shaped swing-by's periapsis altitude (km) and B-plane aim
    /// (degrees).
    Swingby {
        /// Index of the altitude.
        altitude: usize,
        /// Index of the aim.
        aim: usize,
    },
}

/// Revolutions and branch of a revolution-choice variable's value.
pub fn rev_choice(v: f64) -> (u32, Branch) {
    let c = if v.is_finite() {
        v.max(0.0).floor() as u32
    } else {
        0
    };
    if c == 0 {
        (0, Branch::Left)
    } else if c % 2 == 1 {
        (c.div_ceil(2), Branch::Left)
    } else {
        (c / 2, Branch::Right)
    }
}

impl Problem {
    /// The problem a design's search bounds describe. Legs without a manoeuvre are Lambert arcs
    /// between the searched dates (their swing-bys targeted, powered if they must be); a leg with
    /// a manoeuvre adds its fraction and its start (launch v∞ vector, or the altitude and aim of
    /// the shaped swing-by it leaves) to the variables.
    pub fn from_design(d: &MissionDesign) -> Result<Self, ProblemError> {
        let mut tour = PreparedTour::prepare(d).map_err(|e| ProblemError::Design(e.to_string()))?;
        for (k, s) in tour.stops.iter_mut().enumerate() {
            if !(k > 0 && d.leg(k).dsm.is_some()) {
                s.mode = SwingbyMode::Targeted;
            }
        }
        let (a, b) = d.launch_window();
        let mut lo = vec![a.mjd2000()];
        let mut hi = vec![b.mjd2000()];
        let bad = |field: String, reason: &str| ProblemError::Bounds {
            field,
            reason: reason.to_string(),
        };
        if !(lo[0].is_finite() && hi[0].is_finite() && lo[0] <= hi[0]) {
            return Err(bad(
                "search.launch_latest".into(),
                "the launch window ends before it starts",
            ));
        }
        for k in 0..d.stops.len() - 1 {
            let t = d.tof_bounds(k);
            if !(t.min_days > 0.0 && t.max_days >= t.min_days && t.max_days.is_finite()) {
                return Err(bad(
                    format!("search.leg_tof[{k}]"),
                    "need 0 < min_days ≤ max_days, both finite",
                ));
            }
            lo.push(t.min_days);
            hi.push(t.max_days);
        }
        let resonant_periods: Vec<Option<f64>> = tour
            .stops
            .windows(2)
            .map(|w| {
                (w[0].body.id == w[1].body.id).then(|| {
                    let a = w[0].body.mean_distance_km();
                    std::f64::consts::TAU * (a * a * a / tour.mu_sun).sqrt() / 86_400.0
                })
            })
            .collect();
        // Revolution choices of legs that return to the body they left: 0 (zero revolutions),
        // then N revolutions on the left and right branch, up to what the longest TOF allows.
        let mut rev_vars = Vec::new();
        let mut integer = vec![false; lo.len()];
        if d.search.resonant_revolutions {
            for (k, per) in resonant_periods.iter().enumerate() {
                if let Some(per) = per {
                    let nmax = ((hi[k + 1] / per).floor() as usize).min(3);
                    if nmax >= 1 {
                        let choices = 1 + 2 * nmax;
                        rev_vars.push((k, lo.len()));
                        lo.push(0.0);
                        hi.push(choices as f64 - 1e-9);
                        integer.push(true);
                    }
                }
            }
        }
        let mut dsm_vars = Vec::new();
        for k in 0..d.stops.len() - 1 {
            let Some(m) = d.leg(k).dsm else { continue };
            let mut push = |a: f64, b: f64| {
                lo.push(a);
                hi.push(b);
                integer.push(false);
                lo.len() - 1
            };
            let eta = push(m.min_fraction, m.max_fraction);
            let start = if k == 0 {
                let l = m.launch.unwrap_or(LaunchVinf {
                    vinf_km_s: 3.0,
                    rla_deg: 0.0,
                    dla_deg: 0.0,
                    min_vinf_km_s: None,
                    max_vinf_km_s: None,
                });
                let top = l.max_vinf_km_s.unwrap_or(
                    tour.launch
                        .max_c3_km2_s2
                        .map(|c| c.max(0.0).sqrt())
                        .unwrap_or(DEFAULT_MAX_LAUNCH_VINF_KM_S),
                );
                let bottom = l.min_vinf_km_s.unwrap_or(0.0);
                if !(bottom <= top) {
                    return Err(bad(
                        format!("legs[{k}].dsm.launch.max_vinf_km_s"),
                        "the launch v∞ bounds are empty (check them and the C3 limit)",
                    ));
                }
                let vinf = push(bottom, top);
                let u = push(0.0, 1.0);
                let dl = tour.launch.min_dla_deg.unwrap_or(-90.0).clamp(-90.0, 90.0);
                let dh = tour.launch.max_dla_deg.unwrap_or(90.0).clamp(-90.0, 90.0);
                let w_of = |dla: f64| 0.5 * (dla.to_radians().sin() + 1.0);
                let w = push(w_of(dl), w_of(dh.max(dl)));
                DsmStartVars::Launch { vinf, u, w }
            } else {
                let st = &tour.stops[k];
                let altitude = push(
                    st.min_altitude_km,
                    st.max_altitude_km.max(st.min_altitude_km),
                );
                let aim = push(-180.0, 180.0);
                DsmStartVars::Swingby { altitude, aim }
            };
            dsm_vars.push(DsmVars { leg: k, eta, start });
        }
        let mut constraints = Vec::new();
        for (k, st) in tour.stops.iter().enumerate() {
            if st.kind == tourwright_mission::evaluate::StopKind::SwingBy && st.body.data.mu > 0.0 {
                constraints.push(Constraint::Altitude { stop: k });
                constraints.push(Constraint::MinVinf { stop: k });
                constraints.push(Constraint::MaxPoweredDv { stop: k });
            }
        }
        if let Some(m) = tour.launch.max_c3_km2_s2 {
            constraints.push(Constraint::MaxC3(m));
        }
        if let Some(m) = d.search.max_total_tof_days {
            constraints.push(Constraint::MaxTof(m));
        }
        if tour.launch.min_dla_deg.is_some() || tour.launch.max_dla_deg.is_some() {
            constraints.push(Constraint::DlaBand(
                tour.launch.min_dla_deg.unwrap_or(-90.0),
                tour.launch.max_dla_deg.unwrap_or(90.0),
            ));
        }
        Ok(Problem {
            tour,
            lo,
            hi,
            objective: d.search.objective,
            max_total_tof_days: d.search.max_total_tof_days,
            resonant_periods,
            constraints,
            integer,
            rev_vars,
            dsm_vars,
            design_legs: (0..d.stops.len() - 1).map(|k| d.leg(k)).collect(),
            design_modes: d.stops.iter().map(|s| s.swingby.mode).collect(),
        })
    }

    /// The variables that belong to leg `k` alone: its revolution choice, its manoeuvre's
    /// fraction and the variables of the state it starts from.
    pub fn leg_vars(&self, k: usize) -> Vec<usize> {
        let mut v: Vec<usize> = self
            .rev_vars
            .iter()
            .filter(|r| r.0 == k)
            .map(|r| r.1)
            .collect();
        for d in self.dsm_vars.iter().filter(|d| d.leg == k) {
            v.push(d.eta);
            match d.start {
                DsmStartVars::Launch { vinf, u, w } => v.extend([vinf, u, w]),
                DsmStartVars::Swingby { altitude, aim } => v.extend([altitude, aim]),
            }
        }
        v
    }

    /// Total time of flight of `x`, days.
    pub fn total_tof(&self, x: &[f64]) -> f64 {
        x[1..=self.tour.legs.len()].iter().sum()
    }

    /// Number of variables.
    pub fn dim(&self) -> usize {
        self.lo.len()
    }

    /// Write the epochs (and revolution choices) of `x` into `tour`.
    #[inline]
    pub fn apply(&self, x: &[f64], tour: &mut PreparedTour) {
        let legs = tour.legs.len();
        tour.set_schedule(Tdb::from_mjd2000(x[0]), &x[1..=legs]);
        for &(k, i) in &self.rev_vars {
            let (revs, branch) = rev_choice(x[i]);
            tour.legs[k].revs = revs;
            tour.legs[k].branch = branch;
        }
        for v in &self.dsm_vars {
            let launch_vinf = match v.start {
                DsmStartVars::Launch { vinf, u, w } => {
                    let (rla, dla) = launch_angles(x[u], x[w]);
                    Some(asymptote_vector(x[vinf], rla, dla))
                }
                DsmStartVars::Swingby { altitude, aim } => {
                    tour.stops[v.leg].mode = SwingbyMode::Shaped {
                        altitude_km: x[altitude],
                        aim_deg: x[aim],
                    };
                    None
                }
            };
            tour.legs[v.leg].dsm = Some(TourDsm {
                at: DsmWhen::Fraction(x[v.eta]),
                launch_vinf,
            });
        }
    }

    /// The stops' epochs at `x`, each in the scale its design writes it in.
    pub fn epochs_at(&self, x: &[f64]) -> Vec<Epoch> {
        let mut t = self.tour.clone();
        self.apply(x, &mut t);
        t.stops
            .iter()
            .map(|s| Epoch::from_tdb(s.t, s.scale))
            .collect()
    }

    /// Every leg's options at `x` (revolution choices and manoeuvres; a manoeuvre the design
    /// dates keeps being dated, at its new date).
    pub fn legs_at(&self, x: &[f64]) -> Vec<LegOptions> {
        let mut t = self.tour.clone();
        self.apply(x, &mut t);
        t.legs
            .iter()
            .enumerate()
            .map(|(k, l)| LegOptions {
                revolutions: l.revs,
                branch: l.branch,
                direction: l.direction,
                dsm: self.dsm_at(x, &t, k),
            })
            .collect()
    }

    fn dsm_at(&self, x: &[f64], t: &PreparedTour, k: usize) -> Option<Dsm> {
        let mut m = self.design_legs.get(k).and_then(|l| l.dsm)?;
        let v = self.dsm_vars.iter().find(|v| v.leg == k)?;
        let eta = x[v.eta];
        m.at = match m.at {
            DsmTime::Fraction(_) => DsmTime::Fraction(eta),
            DsmTime::Date(_) => {
                let (a, b) = (t.stops[k].t, t.stops[k + 1].t);
                DsmTime::Date(Epoch::from_tdb(
                    Tdb(a.0 + eta * (b.0 - a.0)),
                    t.stops[k].scale,
                ))
            }
        };
        if let DsmStartVars::Launch { vinf, u, w } = v.start {
            let (rla_deg, dla_deg) = launch_angles(x[u], x[w]);
            let old = m.launch;
            m.launch = Some(LaunchVinf {
                vinf_km_s: x[vinf],
                rla_deg,
                dla_deg,
                min_vinf_km_s: old.and_then(|l| l.min_vinf_km_s),
                max_vinf_km_s: old.and_then(|l| l.max_vinf_km_s),
            });
        }
        Some(m)
    }

    /// Per stop, the swing-by mode at `x` for the design's shaped swing-bys: those that start a
    /// manoeuvre leg take their searched altitude and aim; the others were searched as targeted
    /// and take the periapsis altitude and aim of that solution (ballistic only where it needed
    /// no powered Δv; the workbench then shows the miss).
    pub fn modes_at(&self, x: &[f64]) -> Vec<Option<SwingbyMode>> {
        let mut modes = vec![None; self.tour.stops.len()];
        let shaped_targeted: Vec<usize> = (1..self.tour.stops.len().saturating_sub(1))
            .filter(|&k| {
                matches!(self.design_modes.get(k), Some(SwingbyMode::Shaped { .. }))
                    && !self.dsm_vars.iter().any(|v| v.leg == k)
            })
            .collect();
        if !shaped_targeted.is_empty() {
            let mut work = Workspace::new(self);
            self.apply(x, &mut work.tour);
            evaluate(&work.tour, &EvalOptions::SEARCH, &mut work.eval);
            for k in shaped_targeted {
                let sw = work.eval.stops.get(k).and_then(|s| s.swingby);
                if let (Some(altitude_km), Some(b)) =
                    (sw.and_then(|w| w.altitude_km), sw.and_then(|w| w.bplane))
                {
                    modes[k] = Some(SwingbyMode::Shaped {
                        altitude_km,
                        aim_deg: b.aim.to_degrees(),
                    });
                }
            }
        }
        for v in &self.dsm_vars {
            if let DsmStartVars::Swingby { altitude, aim } = v.start {
                modes[v.leg] = Some(SwingbyMode::Shaped {
                    altitude_km: x[altitude],
                    aim_deg: x[aim],
                });
            }
        }
        modes
    }

    /// Everything a design takes from `x`.
    pub fn schedule_at(&self, x: &[f64]) -> Schedule {
        Schedule {
            epochs: self.epochs_at(x),
            legs: self.legs_at(x),
            modes: self.modes_at(x),
        }
    }

    /// The decision vector of a tour's current epochs and revolution choices.
    pub fn vector_of(&self, tour: &PreparedTour) -> Vec<f64> {
        let mut x = vec![tour.stops[0].t.mjd2000()];
        for k in 1..tour.stops.len() {
            x.push(tour.stops[k].t.days() - tour.stops[k - 1].t.days());
        }
        for &(k, i) in &self.rev_vars {
            let l = &tour.legs[k];
            let c = match (l.revs, l.branch) {
                (0, _) => 0,
                (n, Branch::Left) => 2 * n - 1,
                (n, Branch::Right) => 2 * n,
            };
            x.push((c as f64 + 0.5).min(self.hi[i]));
        }
        for v in &self.dsm_vars {
            let k = v.leg;
            let (a, b) = (tour.stops[k].t, tour.stops[k + 1].t);
            let eta = tour.legs[k].dsm.map(|m| m.at.fraction(a, b)).unwrap_or(0.5);
            x.push(clamp_safe(eta, self.lo[v.eta], self.hi[v.eta]));
            match v.start {
                DsmStartVars::Launch { vinf, u, w } => {
                    let vv = tour.legs[k]
                        .dsm
                        .and_then(|m| m.launch_vinf)
                        .unwrap_or_default();
                    let (dla, rla) = dla_rla_deg(&vv);
                    x.push(clamp_safe(vv.norm(), self.lo[vinf], self.hi[vinf]));
                    x.push(clamp_safe(rla / 360.0, self.lo[u], self.hi[u]));
                    let wv = 0.5 * (dla.to_radians().sin() + 1.0);
                    x.push(clamp_safe(wv, self.lo[w], self.hi[w]));
                }
                DsmStartVars::Swingby { altitude, aim } => {
                    let (alt, am) = match tour.stops[k].mode {
                        SwingbyMode::Shaped {
                            altitude_km,
                            aim_deg,
                        } => (altitude_km, aim_deg),
                        SwingbyMode::Targeted => (self.lo[altitude], 0.0),
                    };
                    x.push(clamp_safe(alt, self.lo[altitude], self.hi[altitude]));
                    x.push(clamp_safe(
                        (am + 180.0).rem_euclid(360.0) - 180.0,
                        self.lo[aim],
                        self.hi[aim],
                    ));
                }
            }
        }
        x
    }

    /// The objective at `x` (smaller is better) and the constraints `g[j] ≤ 0` of
    /// [`Problem::constraints`], scaled to order one. An evaluation with a leg that has no
    /// solution returns 1e9 with every constraint violated.
    pub fn evaluate_parts(&self, x: &[f64], work: &mut Workspace, g: &mut [f64]) -> f64 {
        self.apply(x, &mut work.tour);
        evaluate(&work.tour, &EvalOptions::SEARCH, &mut work.eval);
        let e = &work.eval;
        let base = self.objective.value(e);
        if !base.is_finite() {
            g.iter_mut().for_each(|v| *v = 1.0);
            return 1e9;
        }
        let turn_impossible = |k: usize| {
            e.warnings
                .iter()
                .any(|w| matches!(w, Warning::TurnImpossible { stop } if *stop == k))
        };
        for (j, c) in self.constraints.iter().enumerate() {
            let v = match *c {
                Constraint::Altitude { stop } => {
                    let s = &self.tour.stops[stop];
                    let scale = (s.body.data.radius_km + s.min_altitude_km).max(1.0);
                    match e.stops[stop].swingby.and_then(|w| w.altitude_km) {
                        Some(alt) => (s.min_altitude_km - alt) / scale,
                        None if turn_impossible(stop) => 1.0,
                        None => -1.0,
                    }
                }
                Constraint::MinVinf { stop } => {
                    self.tour.stops[stop].min_vinf_km_s - e.stops[stop].vinf_in.norm()
                }
                Constraint::MaxPoweredDv { stop } => {
                    e.stops[stop].dv_km_s - self.tour.stops[stop].max_powered_dv_km_s
                }
                Constraint::MaxC3(max) => (e.launch.c3 - max) / max.max(1.0),
                Constraint::MaxTof(max) => (e.total_tof_days() - max) / max.max(1.0),
                Constraint::DlaBand(lo, hi) => {
                    (lo - e.launch.dla_deg).max(e.launch.dla_deg - hi) / 10.0
                }
            };
            g[j] = if v.is_finite() { v } else { 1.0 };
        }
        base
    }

    /// The objective as a sum of norms (launch v∞, each swing-by's and each manoeuvre's Δv, the
    /// arrival Δv or v∞ vector, each constraint's weighted violation), when it is one: the Δv
    /// objectives are; mass, C3 and time are not. Block lengths in [`Problem::residuals`] order.
    pub fn norm_shape(&self) -> Option<NormBlocks> {
        if !matches!(
            self.objective,
            Objective::TotalDvWithLaunchVinf | Objective::SpacecraftDv
        ) {
            return None;
        }
        let n = self.tour.stops.len();
        let mut blocks = Vec::new();
        if self.objective == Objective::TotalDvWithLaunchVinf {
            blocks.push(1);
        }
        for k in 0..n - 1 {
            if k > 0 {
                blocks.push(1);
            }
            if self.tour.legs[k].dsm.is_some() || self.dsm_vars.iter().any(|v| v.leg == k) {
                blocks.push(3);
            }
        }
        match self.tour.arrival {
            ArrivalGoal::Rendezvous => blocks.push(3),
            ArrivalGoal::Capture { .. } => blocks.push(1),
            ArrivalGoal::FlybyOnly => {}
        }
        blocks.extend(std::iter::repeat_n(1, self.constraints.len()));
        Some(NormBlocks { blocks })
    }

    /// The residual vector of [`Problem::norm_shape`] at `x`, whose norms sum to the score. False
    /// when `x` cannot be evaluated.
    pub fn residuals(&self, x: &[f64], work: &mut Workspace, r: &mut [f64]) -> bool {
        let mut g = std::mem::take(&mut work.g);
        g.resize(self.constraints.len(), 0.0);
        let base = self.evaluate_parts(x, work, &mut g);
        let ok = base < 1e9;
        if ok {
            let e = &work.eval;
            let n = e.stops.len();
            let mut at = 0;
            let mut put = |v: &[f64]| {
                r[at..at + v.len()].copy_from_slice(v);
                at += v.len();
            };
            if self.objective == Objective::TotalDvWithLaunchVinf {
                put(&[e.launch.vinf]);
            }
            for k in 0..n - 1 {
                if k > 0 {
                    put(&[e.stops[k].dv_km_s]);
                }
                if let Some(d) = e.legs[k].dsm {
                    put(&[d.dv.x, d.dv.y, d.dv.z]);
                }
            }
            match self.tour.arrival {
                ArrivalGoal::Rendezvous => {
                    let v = e.stops[n - 1].vinf_in;
                    put(&[v.x, v.y, v.z]);
                }
                ArrivalGoal::Capture { .. } => put(&[e.arrival.dv_km_s]),
                ArrivalGoal::FlybyOnly => {}
            }
            for (c, gj) in self.constraints.iter().zip(&g) {
                put(&[self.weight(c) * gj.max(0.0)]);
            }
        }
        work.g = g;
        ok
    }

    /// The penalty weight of each constraint, in the objective's units per unit of `g`: ours,
    /// chosen so that a violation never pays. Altitude: at least the benchmark set's 0.01 km/s per
    /// km and 20 km/s per periapsis-radius fraction; v∞ and powered Δv: 5 km/s per km/s; C3 0.1
    /// km/s per km²/s²; TOF 0.01 km/s per day; declination 0.1 km/s per degree. Scaled by the
    /// objective's units (×1000 for kilograms, ×10 for C3, ×100 for days).
    pub fn weight(&self, c: &Constraint) -> f64 {
        let unit = match self.objective {
            Objective::DeliveredMass => 1000.0,
            Objective::LaunchC3 => 10.0,
            Objective::TimeOfFlight => 100.0,
            _ => 1.0,
        };
        unit * match *c {
            Constraint::Altitude { stop } => {
                let s = &self.tour.stops[stop];
                (0.01 * (s.body.data.radius_km + s.min_altitude_km)).max(20.0)
            }
            Constraint::MinVinf { .. } | Constraint::MaxPoweredDv { .. } => 5.0,
            Constraint::MaxC3(max) => 0.1 * max.max(1.0),
            Constraint::MaxTof(max) => 0.01 * max.max(1.0),
            Constraint::DlaBand(..) => 1.0,
        }
    }

    /// Penalised score of `x` (smaller is better): the objective plus each constraint's weight
    /// times its violation. `work` is scratch.
    pub fn score(&self, x: &[f64], work: &mut Workspace) -> f64 {
        let mut g = std::mem::take(&mut work.g);
        g.resize(self.constraints.len(), 0.0);
        let base = self.evaluate_parts(x, work, &mut g);
        let v = self.penalised(base, &g);
        work.g = g;
        v
    }

    /// The score of an objective value and its constraint values.
    pub fn penalised(&self, base: f64, g: &[f64]) -> f64 {
        let mut v = base;
        if base < 1e9 {
            for (c, gj) in self.constraints.iter().zip(g) {
                if *gj > 0.0 {
                    v += self.weight(c) * gj;
                }
            }
        }
        if v.is_finite() { v.min(1e9) } else { 1e9 }
    }

    /// True when every constraint holds at `x` (the altitude within the program's tolerance).
    /// Uses the workspace's constraint buffer (no allocation: the closing polish calls it per
    /// evaluation).
    pub fn feasible(&self, x: &[f64], work: &mut Workspace) -> bool {
        let mut g = std::mem::take(&mut work.g);
        g.resize(self.constraints.len(), 0.0);
        let base = self.evaluate_parts(x, work, &mut g);
        let ok = base < 1e9
            && self.constraints.iter().zip(&g).all(|(c, gj)| match *c {
                Constraint::Altitude { stop } => {
                    let s = &self.tour.stops[stop];
                    let scale = (s.body.data.radius_km + s.min_altitude_km).max(1.0);
                    *gj * scale <= tourwright_mission::rules::ALTITUDE_TOLERANCE_KM
                }
                Constraint::MinVinf { .. } | Constraint::MaxPoweredDv { .. } => {
                    *gj <= tourwright_mission::rules::SPEED_TOLERANCE_KM_S
                }
                _ => *gj <= 1e-9,
            });
        work.g = g;
        ok
    }
}

/// RLA and DLA (degrees) of the two launch-direction numbers in [0, 1] (uniform on the sphere).
pub fn launch_angles(u: f64, w: f64) -> (f64, f64) {
    (
        360.0 * u,
        (2.0 * w - 1.0).clamp(-1.0, 1.0).asin().to_degrees(),
    )
}

/// A limit the optimiser keeps, as `g ≤ 0`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Constraint {
    /// A swing-by's periapsis altitude at least its minimum (scaled by the minimum radius).
    Altitude {
        /// Stop index.
        stop: usize,
    },
    /// A swing-by's v∞ at least its minimum, km/s.
    MinVinf {
        /// Stop index.
        stop: usize,
    },
    /// A powered swing-by's impulse within its limit, km/s.
    MaxPoweredDv {
        /// Stop index.
        stop: usize,
    },
    /// Launch C3 under the limit (relative).
    MaxC3(f64),
    /// Total time of flight under the limit (relative).
    MaxTof(f64),
    /// Launch declination inside the band (per 10°).
    DlaBand(f64, f64),
}

/// Scratch space for scoring: a tour copy and an evaluation whose buffers are reused.
#[derive(Clone, Debug)]
pub struct Workspace {
    /// Tour copy whose epochs are overwritten.
    pub tour: PreparedTour,
    /// Reused evaluation.
    pub eval: Evaluation,
    /// Reused constraint values.
    pub g: Vec<f64>,
}

impl Workspace {
    /// Scratch for a problem.
    pub fn new(p: &Problem) -> Self {
        Workspace {
            tour: p.tour.clone(),
            eval: Evaluation::default(),
            g: vec![0.0; p.constraints.len()],
        }
    }
}

/// Optimiser settings.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OptimizeOptions {
    /// Seed of every random choice.
    pub seed: u64,
    /// Budget of objective evaluations (all islands together).
    pub max_evals: u64,
    /// Optional wall-clock limit, seconds (results then depend on machine speed).
    pub time_limit_s: Option<f64>,
    /// Islands (fixed, so that results do not depend on the number of cores).
    pub islands: usize,
    /// Individuals per island (0: 15 × dimension, at least 30).
    pub population: usize,
    /// Basin-hopping settings.
    pub hop: HopSettings,
}

impl Default for OptimizeOptions {
    fn default() -> Self {
        OptimizeOptions {
            seed: 1,
            max_evals: 400_000,
            time_limit_s: None,
            islands: 4,
            population: 0,
            hop: HopSettings::default(),
        }
    }
}

/// What the optimiser found.
#[derive(Clone, Debug)]
pub struct OptimizeResult {
    /// Best decision vector.
    pub x: Vec<f64>,
    /// Its penalised score.
    pub value: f64,
    /// What the design takes from the optimum: epochs (each in its design's time scale), leg
    /// options (revolution choices, manoeuvres) and the shaped swing-bys' altitude and aim.
    pub schedule: Schedule,
    /// Objective evaluations used.
    pub evaluations: u64,
    /// Trade-off front: (total TOF days, score) pairs, none dominated, sorted by TOF.
    pub front: Vec<(f64, f64)>,
    /// True when stopped by cancellation.
    pub cancelled: bool,
}

struct Island {
    rng: Rng,
    pop: Vec<Vec<f64>>,
    fit: Vec<f64>,
    f: Vec<f64>,
    cr: Vec<f64>,
    work: Workspace,
    trial: Vec<f64>,
    stall: usize,
    best: f64,
    front: Vec<(f64, f64)>,
}

fn add_front(front: &mut Vec<(f64, f64)>, p: (f64, f64)) {
    if front.iter().any(|q| q.0 <= p.0 && q.1 <= p.1) {
        return;
    }
    front.retain(|q| !(p.0 <= q.0 && p.1 <= q.1));
    front.push(p);
    if front.len() > 400 {
        front.sort_by(|a, b| a.0.total_cmp(&b.0));
        let keep: Vec<_> = front.iter().step_by(2).copied().collect();
        *front = keep;
    }
}

impl Island {
    fn new(p: &Problem, np: usize, seed: u64, progress: &Progress) -> Self {
        let mut rng = Rng::new(seed);
        let d = p.dim();
        let mut work = Workspace::new(p);
        let mut pop = Vec::with_capacity(np);
        let mut fit = Vec::with_capacity(np);
        for _ in 0..np {
            let x: Vec<f64> = (0..d)
                .map(|i| p.lo[i] + rng.uniform() * (p.hi[i] - p.lo[i]))
                .collect();
            if progress.is_cancelled() {
                fit.push(f64::INFINITY);
            } else {
                fit.push(p.score(&x, &mut work));
                progress.count_evals(1);
            }
            pop.push(x);
        }
        let best = fit.iter().copied().fold(f64::INFINITY, f64::min);
        Island {
            rng,
            pop,
            fit,
            f: vec![0.5; np],
            cr: vec![0.9; np],
            work,
            trial: vec![0.0; d],
            stall: 0,
            best,
            front: Vec::new(),
        }
    }

    fn best_index(&self) -> usize {
        (0..self.fit.len())
            .min_by(|&a, &b| self.fit[a].total_cmp(&self.fit[b]))
            .unwrap_or(0)
    }

    /// One generation of jDE rand/1/bin; returns evaluations used.
    fn generation(&mut self, p: &Problem, want_front: bool, progress: &Progress) -> u64 {
        let np = self.pop.len();
        let d = p.dim();
        for i in 0..np {
            let fi = if self.rng.uniform() < 0.1 {
                0.1 + 0.9 * self.rng.uniform()
            } else {
                self.f[i]
            };
            let ci = if self.rng.uniform() < 0.1 {
                self.rng.uniform()
            } else {
                self.cr[i]
            };
            let (mut a, mut b, mut c) = (i, i, i);
            while a == i {
                a = self.rng.below(np);
            }
            while b == i || b == a {
                b = self.rng.below(np);
            }
            while c == i || c == a || c == b {
                c = self.rng.below(np);
            }
            let jr = self.rng.below(d);
            for j in 0..d {
                let v = if j == jr || self.rng.uniform() < ci {
                    self.pop[a][j] + fi * (self.pop[b][j] - self.pop[c][j])
                } else {
                    self.pop[i][j]
                };
                // Out of bounds: a random point between the parent and the bound.
                self.trial[j] = if v < p.lo[j] {
                    p.lo[j] + self.rng.uniform() * (self.pop[i][j] - p.lo[j])
                } else if v > p.hi[j] {
                    p.hi[j] - self.rng.uniform() * (p.hi[j] - self.pop[i][j])
                } else {
                    v
                };
            }
            if progress.is_cancelled() {
                return i as u64;
            }
            let ft = p.score(&self.trial, &mut self.work);
            progress.count_evals(1);
            if want_front && ft < 1e8 {
                let tof = p.total_tof(&self.trial);
                add_front(&mut self.front, (tof, ft));
            }
            if ft <= self.fit[i] {
                self.pop[i].copy_from_slice(&self.trial);
                self.fit[i] = ft;
                self.f[i] = fi;
                self.cr[i] = ci;
            }
        }
        let b = self.fit[self.best_index()];
        if b < self.best - 1e-9 * self.best.abs().max(1.0) {
            self.best = b;
            self.stall = 0;
        } else {
            self.stall += 1;
        }
        np as u64
    }

    /// Restart around nothing: keep the best, scatter the rest (after a long stall).
    fn restart(&mut self, p: &Problem, progress: &Progress) -> u64 {
        let keep = self.best_index();
        let d = p.dim();
        let mut n = 0;
        for i in 0..self.pop.len() {
            if i == keep {
                continue;
            }
            for j in 0..d {
                self.pop[i][j] = p.lo[j] + self.rng.uniform() * (p.hi[j] - p.lo[j]);
            }
            if progress.is_cancelled() {
                break;
            }
            self.fit[i] = p.score(&self.pop[i], &mut self.work);
            progress.count_evals(1);
            self.f[i] = 0.5;
            self.cr[i] = 0.9;
            n += 1;
        }
        self.stall = 0;
        n
    }
}

/// Basin-hopping settings (ours; tuned on the Cassini1 benchmark, see DEVELOPERS.md).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct HopSettings {
    /// Perturbation of each variable, as a fraction of its range.
    pub radius: f64,
    /// Failed hops before a chain restarts from a fresh point.
    pub fails_before_restart: usize,
    /// Evaluations allowed to one local descent (augmented Lagrangian with quasi-Newton solves).
    pub local_evals: usize,
    /// Evaluations allowed to one Gauss-Newton descent of a sum of norms (tours with
    /// manoeuvres; it converges in fewer evaluations).
    pub local_evals_norms: usize,
    /// Share of the budget (or of the time) given to differential evolution first.
    pub de_share: f64,
    /// Basin-hopping chains.
    pub chains: usize,
}

impl Default for HopSettings {
    fn default() -> Self {
        HopSettings {
            radius: 0.02,
            fails_before_restart: 20,
            local_evals: 2000,
            local_evals_norms: 1500,
            de_share: 0.1,
            chains: 4,
        }
    }
}

/// One monotonic basin-hopping chain: its best point, its own random stream and scratch space.
struct Chain {
    rng: Rng,
    x: Vec<f64>,
    fx: f64,
    /// The best point this chain ever held (a restart forgets `x`, not this).
    best: (Vec<f64>, f64),
    fails: usize,
    work: Workspace,
    trial: Vec<f64>,
}

impl Chain {
    /// Local descent from `x0` (augmented Lagrangian over the problem's constraints, quasi-Newton
    /// inner solves): the point, its penalised score and the evaluations spent.
    fn descend(
        &mut self,
        p: &Problem,
        x0: &[f64],
        hs: &HopSettings,
        progress: &Progress,
    ) -> (Vec<f64>, f64, u64) {
        let work = &mut self.work;
        if let Some(shape) = p.norm_shape().filter(|_| !p.dsm_vars.is_empty()) {
            // Manoeuvre legs: a sum of norms whose terms may vanish; Gauss-Newton reaches a zero
            // manoeuvre where a quasi-Newton method zigzags on the kink.
            let mut rf = |x: &[f64], r: &mut [f64]| {
                if progress.is_cancelled() {
                    return false;
                }
                progress.count_evals(1);
                p.residuals(x, work, r)
            };
            let (x, f, n) = lm_sum_of_norms(
                &mut rf,
                &shape,
                x0,
                &p.lo,
                &p.hi,
                &p.integer,
                &LocalOptions {
                    max_evals: hs.local_evals_norms,
                    fd_step: 1e-7,
                    f_tol: 1e-10,
                },
            );
            let score = if f.is_finite() { f.min(1e9) } else { 1e9 };
            return (x, score, n as u64);
        }
        let mut fg = |x: &[f64], g: &mut [f64]| {
            if progress.is_cancelled() {
                g.iter_mut().for_each(|v| *v = 1.0);
                return f64::INFINITY;
            }
            progress.count_evals(1);
            p.evaluate_parts(x, work, g)
        };
        let r = auglag_box(
            &mut fg,
            p.constraints.len(),
            x0,
            &p.lo,
            &p.hi,
            &p.integer,
            &LocalOptions {
                max_evals: hs.local_evals,
                fd_step: 1e-9,
                ..Default::default()
            },
        );
        let score = p.penalised(r.f, &r.g);
        (r.x, score, r.evals as u64)
    }

    /// A new starting point: now and then a member of the global population, mostly a uniform
    /// draw whose same-body legs sit just short of a resonance (a whole number of the body's
    /// periods, within the bounds). Just short, because a zero-revolution arc that returns to a
    /// body after m of its periods sweeps nearly 360°: a little more time and the arc flips to
    /// an almost straight one.
    fn fresh_start(&mut self, p: &Problem, pool: &[Vec<f64>]) -> Vec<f64> {
        if !pool.is_empty() && self.rng.uniform() < 0.25 {
            return pool[self.rng.below(pool.len())].clone();
        }
        let mut x: Vec<f64> = (0..p.dim())
            .map(|i| p.lo[i] + self.rng.uniform() * (p.hi[i] - p.lo[i]))
            .collect();
        for (k, period) in p.resonant_periods.iter().enumerate() {
            let Some(period) = period else { continue };
            let (lo, hi) = (p.lo[k + 1], p.hi[k + 1]);
            let kmin = (lo / period).ceil().max(1.0) as usize;
            let kmax = (hi / period).floor() as usize;
            if kmax >= kmin && self.rng.uniform() < 0.8 {
                let m = kmin + self.rng.below(kmax - kmin + 1);
                let t = m as f64 * period * (0.98 + 0.02 * self.rng.uniform());
                x[k + 1] = clamp_safe(t, lo, hi);
            }
        }
        x
    }

    /// A move that changes one leg and keeps every other stop's date: redraw the leg's own
    /// variables (its manoeuvre, the state it starts from, its revolutions) and either move the
    /// stop at its start (the launch date for the first leg) anywhere inside the bounds or shift it
    /// by the hop radius, the neighbouring time of flight absorbing the change. Tours with
    /// manoeuvres have long valleys along which one encounter slides while the others hold
    /// (launch date against first time of flight, for one); whole-vector perturbations cross them
    /// only by luck.
    fn leg_move(&mut self, p: &Problem, hs: &HopSettings) {
        let legs = p.tour.legs.len();
        self.trial.copy_from_slice(&self.x);
        let k = self.rng.below(legs);
        for i in p.leg_vars(k) {
            self.trial[i] = p.lo[i] + self.rng.uniform() * (p.hi[i] - p.lo[i]);
        }
        // Absolute date of stop k (the launch for k = 0) moves; stop k+1's date holds.
        let (ti, tj) = if k == 0 { (0, 1) } else { (k, k + 1) };
        let far = self.rng.uniform() < 0.5;
        let span = p.hi[ti] - p.lo[ti];
        let delta = if far {
            p.lo[ti] + self.rng.uniform() * span - self.x[ti]
        } else {
            (2.0 * self.rng.uniform() - 1.0) * hs.radius * span
        };
        // x[ti] grows by delta and x[tj] shrinks by it (for k = 0: launch later, first leg
        // shorter); both stay inside their bounds.
        let lo_d = (p.lo[ti] - self.x[ti]).max(self.x[tj] - p.hi[tj]);
        let hi_d = (p.hi[ti] - self.x[ti]).min(self.x[tj] - p.lo[tj]);
        let d = clamp_safe(delta, lo_d.min(0.0), hi_d.max(0.0));
        self.trial[ti] = clamp_safe(self.x[ti] + d, p.lo[ti], p.hi[ti]);
        self.trial[tj] = clamp_safe(self.x[tj] - d, p.lo[tj], p.hi[tj]);
    }

    /// One hop: perturb the chain's best, descend, keep the result if it is better; restart
    /// from a fresh point after too many failures. Returns the evaluations spent.
    fn hop(
        &mut self,
        p: &Problem,
        pool: &[Vec<f64>],
        incumbent: &[f64],
        hs: &HopSettings,
        progress: &Progress,
    ) -> u64 {
        let start = if self.fails >= hs.fails_before_restart || !self.fx.is_finite() {
            self.fails = 0;
            self.fx = f64::INFINITY;
            if !p.dsm_vars.is_empty() && incumbent.len() == p.dim() && self.rng.uniform() < 0.5 {
                // Manoeuvre tours: half the restarts leave from the best point of all chains
                // with one leg redrawn, so effort gathers in the best funnel found so far.
                self.x.copy_from_slice(incumbent);
                self.leg_move(p, hs);
                self.trial.clone()
            } else {
                self.fresh_start(p, pool)
            }
        } else if !p.dsm_vars.is_empty() && self.rng.uniform() < 0.5 {
            self.leg_move(p, hs);
            self.trial.clone()
        } else {
            for i in 0..p.dim() {
                self.trial[i] = if p.integer[i] {
                    if self.rng.uniform() < 0.25 {
                        p.lo[i] + self.rng.uniform() * (p.hi[i] - p.lo[i])
                    } else {
                        self.x[i]
                    }
                } else {
                    let r = (2.0 * self.rng.uniform() - 1.0) * hs.radius * (p.hi[i] - p.lo[i]);
                    clamp_safe(self.x[i] + r, p.lo[i], p.hi[i])
                };
            }
            self.trial.clone()
        };
        let (x, fx, n) = self.descend(p, &start, hs, progress);
        let min_gain = if p.dsm_vars.is_empty() { 1e-10 } else { 1e-6 };
        // After a restart the chain holds nothing (infinity): any finite result is taken.
        let better = if self.fx.is_finite() {
            fx < self.fx - min_gain * self.fx.abs().max(1.0)
        } else {
            fx.is_finite()
        };
        if better {
            if fx < self.best.1 {
                self.best = (x.clone(), fx);
            }
            self.x = x;
            self.fx = fx;
            self.fails = 0;
        } else {
            self.fails += 1;
        }
        n
    }
}

/// Run the optimiser: a global phase of self-adaptive differential evolution on islands, then
/// monotonic basin hopping (Wales & Doye 1997; Leary 2000) with a quasi-Newton local descent on
/// several chains started from the islands' bests, restarting from the population or from
/// resonant seeds when a chain stalls; a compass polish closes. `progress` receives the evaluation
/// count and the best value; cancelling it stops within one evaluation per worker.
pub fn optimize(
    p: &Problem,
    opts: &OptimizeOptions,
    progress: &Progress,
    want_front: bool,
) -> OptimizeResult {
    let start = std::time::Instant::now();
    let d = p.dim();
    let np = if opts.population > 0 {
        opts.population.max(5)
    } else {
        (15 * d).clamp(30, 120)
    };
    let n_isl = opts.islands.max(1);
    let out_of_time = |share: f64| {
        opts.time_limit_s
            .is_some_and(|t| start.elapsed().as_secs_f64() >= t * share)
    };
    progress.set_total(opts.max_evals.min(u64::MAX / 2));
    let mut islands: Vec<Island> = (0..n_isl)
        .into_par_iter()
        .map(|k| {
            Island::new(
                p,
                np,
                opts.seed.wrapping_mul(1_000_003).wrapping_add(k as u64),
                progress,
            )
        })
        .collect();
    let mut evals = (np * n_isl) as u64;
    progress.add(evals);
    let block = 25;
    let mut cancelled = false;
    let hs = opts.hop;
    // Phase 1: differential evolution for a share of the budget (or of the time).
    let de_budget = (opts.max_evals as f64 * hs.de_share) as u64;
    loop {
        if progress.is_cancelled() {
            cancelled = true;
            break;
        }
        if evals >= de_budget || out_of_time(hs.de_share) {
            break;
        }
        let used: u64 = islands
            .par_iter_mut()
            .map(|isl| {
                let mut n = 0;
                for _ in 0..block {
                    n += isl.generation(p, want_front, progress);
                    if isl.stall > 150 {
                        n += isl.restart(p, progress);
                    }
                }
                n
            })
            .sum();
        evals += used;
        progress.add(used);
        // Ring migration: island k's best replaces island k+1's worst.
        let bests: Vec<(Vec<f64>, f64)> = islands
            .iter()
            .map(|isl| {
                let b = isl.best_index();
                (isl.pop[b].clone(), isl.fit[b])
            })
            .collect();
        for k in 0..n_isl {
            let (x, f) = &bests[(k + n_isl - 1) % n_isl];
            let isl = &mut islands[k];
            let w = (0..isl.fit.len())
                .max_by(|&a, &b| isl.fit[a].total_cmp(&isl.fit[b]))
                .unwrap_or(0);
            if *f < isl.fit[w] {
                isl.pop[w].clone_from(x);
                isl.fit[w] = *f;
            }
        }
        let best = bests.iter().map(|b| b.1).fold(f64::INFINITY, f64::min);
        progress.offer_best(best);
        progress.set_message(format!("{evals} evaluations, best {best:.4}"));
    }
    // Phase 2: basin hopping in lock-step rounds.
    let pool: Vec<Vec<f64>> = islands
        .iter()
        .flat_map(|isl| {
            let mut idx: Vec<usize> = (0..isl.fit.len()).collect();
            idx.sort_by(|&a, &b| isl.fit[a].total_cmp(&isl.fit[b]));
            idx.into_iter()
                .take(10)
                .map(|i| isl.pop[i].clone())
                .collect::<Vec<_>>()
        })
        .collect();
    let mut chains: Vec<Chain> = (0..hs.chains.max(1))
        .map(|k| {
            let isl = &islands[k % n_isl];
            let b = isl.best_index();
            Chain {
                rng: Rng::new(opts.seed.wrapping_mul(7_919).wrapping_add(100 + k as u64)),
                x: isl.pop[b].clone(),
                // Chains beyond the islands' count start fresh.
                fx: if k < n_isl { isl.fit[b] } else { f64::INFINITY },
                best: (isl.pop[b].clone(), isl.fit[b]),
                fails: 0,
                work: Workspace::new(p),
                trial: vec![0.0; d],
            }
        })
        .collect();
    while !cancelled {
        if progress.is_cancelled() {
            cancelled = true;
            break;
        }
        if evals >= opts.max_evals || out_of_time(1.0) {
            break;
        }
        let incumbent: Vec<f64> = chains
            .iter()
            .map(|c| &c.best)
            .min_by(|a, b| a.1.total_cmp(&b.1))
            .filter(|b| b.1.is_finite())
            .map(|b| b.0.clone())
            .unwrap_or_default();
        let used: u64 = chains
            .par_iter_mut()
            .map(|c| c.hop(p, &pool, &incumbent, &hs, progress))
            .sum();
        evals += used;
        progress.add(used);
        let best = chains
            .iter()
            .map(|c| c.best.1)
            .fold(f64::INFINITY, f64::min);
        progress.offer_best(best);
        progress.set_message(format!("{evals} evaluations, best {best:.4}"));
        if want_front {
            for c in &chains {
                if c.fx < 1e8 {
                    add_front(&mut islands[0].front, (p.total_tof(&c.x), c.fx));
                }
            }
        }
    }
    // Closing polish of the best point found by either phase.
    let mut best: (Vec<f64>, f64) = chains
        .iter()
        .map(|c| c.best.clone())
        .chain(islands.iter().map(|isl| {
            let b = isl.best_index();
            (isl.pop[b].clone(), isl.fit[b])
        }))
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .unwrap_or((p.lo.clone(), f64::INFINITY));
    if !cancelled {
        let mut work = Workspace::new(p);
        // A best point that misses a limit by a hair (penalties are soft while searching) is
        // pushed onto the limit by a compass search on a stiff penalty.
        if best.1 < 1e8 && !p.feasible(&best.0, &mut work) {
            let mut g = vec![0.0; p.constraints.len()];
            let mut stiff = |x: &[f64]| {
                if progress.is_cancelled() {
                    return f64::INFINITY;
                }
                progress.count_evals(1);
                let base = p.evaluate_parts(x, &mut work, &mut g);
                if base >= 1e9 {
                    return f64::INFINITY;
                }
                base + p
                    .constraints
                    .iter()
                    .zip(&g)
                    .map(|(c, gj)| 1e3 * p.weight(c) * gj.max(0.0))
                    .sum::<f64>()
            };
            let step: Vec<f64> = (0..d)
                .map(|j| ((p.hi[j] - p.lo[j]) * 1e-4).max(1e-4))
                .collect();
            let (x, _, n) = compass_search(&mut stiff, &best.0, &p.lo, &p.hi, &step, 1e-7, 4_000);
            evals += n as u64;
            if p.feasible(&x, &mut work) {
                let mut g = vec![0.0; p.constraints.len()];
                let base = p.evaluate_parts(&x, &mut work, &mut g);
                best = (x, p.penalised(base, &g));
            } else {
                // Still short: the best point of either phase that meets every limit.
                let mut pool: Vec<(Vec<f64>, f64)> = chains
                    .iter()
                    .map(|c| c.best.clone())
                    .chain(
                        islands
                            .iter()
                            .flat_map(|isl| isl.pop.iter().cloned().zip(isl.fit.iter().copied())),
                    )
                    .filter(|c| c.1 < 1e8)
                    .collect();
                pool.sort_by(|a, b| a.1.total_cmp(&b.1));
                if let Some(c) = pool
                    .into_iter()
                    .take(256)
                    .find(|c| p.feasible(&c.0, &mut work))
                {
                    best = c;
                }
            }
        }
        // Compass polish; once the point meets every limit, it keeps meeting them.
        let keep_feasible = p.feasible(&best.0, &mut work);
        let step: Vec<f64> = (0..d)
            .map(|j| ((p.hi[j] - p.lo[j]) * 1e-3).max(1e-3))
            .collect();
        let mut f = |x: &[f64]| {
            if progress.is_cancelled() {
                return f64::INFINITY;
            }
            progress.count_evals(1);
            let v = p.score(x, &mut work);
            if keep_feasible && !p.feasible(x, &mut work) {
                f64::INFINITY
            } else {
                v
            }
        };
        let (x, fx, n) = compass_search(&mut f, &best.0, &p.lo, &p.hi, &step, 1e-6, 3_000);
        evals += n as u64;
        if fx <= best.1 {
            best = (x, fx);
        }
    }
    let (x, value) = best;
    progress.offer_best(value);
    let mut front = Vec::new();
    for isl in &islands {
        for &pt in &isl.front {
            add_front(&mut front, pt);
        }
    }
    front.sort_by(|a, b| a.0.total_cmp(&b.0));
    OptimizeResult {
        schedule: p.schedule_at(&x),
        x,
        value,
        evaluations: evals,
        front,
        cancelled,
    }
}
