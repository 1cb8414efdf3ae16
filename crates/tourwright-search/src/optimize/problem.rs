//! The optimisation problem a design describes: its variables (launch date, times of flight,
//! revolution choices, deep-space manoeuvre variables) with their bounds, the objective, and the
//! design's limits as constraints `g ≤ 0`. Scoring goes through the mission crate's one
//! `evaluate`; a point "meets every limit" exactly when that evaluation carries no broken limit of
//! the problem's [`LimitSet`] (the same rule `eval` and every report use).
//!
//! Shaped swing-bys whose next leg has no manoeuvre fly that leg ballistically; the search keeps
//! them ballistic in one of two ways. Towards another body, the leg is a Lambert arc and the
//! swing-by targeted, with its powered Δv held at zero as a constraint: a point that meets it is
//! a ballistic swing-by that reaches the next body, and the altitude and aim written back
//! reproduce the arc. Back to the same body (a resonant return), a Lambert arc between two points
//! of the body's orbit lies in that orbit's plane and cannot represent a return on an inclined
//! orbit; there the swing-by stays shaped, its altitude and aim are variables, and the miss at the
//! next stop is the constraint ([`Constraint::Miss`]).

use tourwright_astro::lambert::{self, Branch};
use tourwright_astro::time::{Epoch, Tdb};
use tourwright_mission::design::{
    ArrivalGoal, Dsm, DsmTime, LaunchVinf, LegOptions, MissionDesign, SwingbyMode,
};
use tourwright_mission::evaluate::{EvalOptions, Evaluation, StopKind, Warning, evaluate};
use tourwright_mission::launch::{asymptote_vector, dla_rla_deg};
use tourwright_mission::retarget::{ShapedLeg, meet_next_body};
use tourwright_mission::rules::DEFAULT_MAX_LAUNCH_VINF_KM_S;
use tourwright_mission::tour::{DsmWhen, TourDsm};
use tourwright_mission::{LimitSet, Objective, PreparedTour, Schedule};

use crate::polish::{NormBlocks, clamp_safe};

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
    /// Stops that are shaped in the design and flown ballistically to another body: searched as
    /// targeted swing-bys whose powered Δv must be zero.
    pub ballistic: Vec<usize>,
    /// Shaped swing-bys flown ballistically back to the same body: searched as shaped, with
    /// their altitude and aim as variables and the miss at the next stop as a constraint.
    pub returns: Vec<ShapedVars>,
    /// Which of the design's limits the problem keeps.
    pub limits: LimitSet,
    /// The arrival epoch held fixed (a launch period with its arrival held): the last leg's time
    /// of flight then follows from the other variables, and its own variable is pinned.
    pub arrival_held: Option<Tdb>,
}

/// Epochs a search holds fixed instead of searching them: a launch period's day holds the
/// launch, and may hold the arrival.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Held {
    /// The launch epoch.
    pub launch: Option<Epoch>,
    /// The arrival epoch (the last stop's).
    pub arrival: Option<Epoch>,
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
        Self::with_limits(d, LimitSet::ALL)
    }

    /// [`Problem::from_design`] keeping only the limits of `limits`.
    pub fn with_limits(d: &MissionDesign, limits: LimitSet) -> Result<Self, ProblemError> {
        let mut tour = PreparedTour::prepare(d).map_err(|e| ProblemError::Design(e.to_string()))?;
        let (ballistic, return_stops): (Vec<usize>, Vec<usize>) = ballistic_stops(d)
            .into_iter()
            .partition(|&k| d.stops[k].body != d.stops[k + 1].body);
        fit_ballistic_revolutions(&mut tour, &ballistic);
        for (k, s) in tour.stops.iter_mut().enumerate() {
            let stays_shaped = (k > 0 && d.leg(k).dsm.is_some()) || return_stops.contains(&k);
            if !stays_shaped {
                s.mode = SwingbyMode::Targeted;
            }
            if ballistic.contains(&k) {
                // The ballistic leg's arc must need no impulse at the swing-by.
                s.max_powered_dv_km_s = 0.0;
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
                if return_stops.contains(&k) {
                    // Flown ballistically: no Lambert arc, no revolution choice.
                    continue;
                }
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
        let mut returns = Vec::new();
        for &k in &return_stops {
            let st = &tour.stops[k];
            lo.push(st.min_altitude_km);
            hi.push(st.max_altitude_km.max(st.min_altitude_km));
            integer.push(false);
            lo.push(-180.0);
            hi.push(180.0);
            integer.push(false);
            returns.push(ShapedVars {
                stop: k,
                altitude: lo.len() - 2,
                aim: lo.len() - 1,
            });
        }
        let mut constraints = Vec::new();
        for r in &returns {
            constraints.push(Constraint::Miss { stop: r.stop });
        }
        for (k, st) in tour.stops.iter().enumerate() {
            if st.kind == StopKind::SwingBy && st.body.data.mu > 0.0 {
                constraints.push(Constraint::Altitude { stop: k });
                constraints.push(Constraint::MinVinf { stop: k });
                constraints.push(Constraint::MaxPoweredDv { stop: k });
            }
        }
        if limits.masses {
            let sc = &tour.spacecraft;
            if sc.dry_mass_kg > 0.0 && sc.isp_s > 0.0 {
                constraints.push(Constraint::Propellant {
                    max_dv_km_s: sc.isp_s * tourwright_astro::constants::G0_M_S2 / 1000.0
                        * ((sc.dry_mass_kg + sc.propellant_kg) / sc.dry_mass_kg).ln(),
                });
            }
            if let Some(lv) = &tour.vehicle {
                if let (Some(a), Some(b)) = (lv.performance.first(), lv.performance.last()) {
                    constraints.push(Constraint::LvCapacity);
                    constraints.push(Constraint::LvTable(a.c3_km2_s2, b.c3_km2_s2));
                }
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
            ballistic,
            returns,
            limits,
            arrival_held: None,
        })
    }

    /// Hold the epochs of `held`: the launch by pinning its variable's bounds; the arrival by
    /// deriving the last leg's time of flight from the other variables (its own variable is
    /// pinned and ignored). Other encounter dates stay free within their bounds.
    pub fn hold(&mut self, held: Held) {
        if let Some(t) = held.launch {
            let m = t.tdb().mjd2000();
            self.lo[0] = m;
            self.hi[0] = m;
        }
        if let Some(t) = held.arrival {
            let legs = self.tour.legs.len();
            let last = self.tour.stops[legs].t.days() - self.tour.stops[legs - 1].t.days();
            let v = clamp_safe(last, self.lo[legs], self.hi[legs]);
            self.lo[legs] = v;
            self.hi[legs] = v;
            self.arrival_held = Some(t.tdb());
        }
    }

    /// Number of variables the search may move (bounds not pinned, integer choices included).
    pub fn free_dim(&self) -> usize {
        self.lo.iter().zip(&self.hi).filter(|(a, b)| b > a).count()
    }

    /// The decision vector of the design the problem was built from: where every search starts.
    pub fn start(&self) -> Vec<f64> {
        self.vector_of(&self.tour)
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
        for r in self.returns.iter().filter(|r| r.stop == k) {
            v.extend([r.altitude, r.aim]);
        }
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
        match self.arrival_held {
            Some(t) => t.mjd2000() - x[0],
            None => x[1..=self.tour.legs.len()].iter().sum(),
        }
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
        if let Some(t) = self.arrival_held {
            // The last leg ends at the held arrival whatever the other legs take; a schedule
            // that reaches it too late is out of order, which the evaluation reports.
            tour.stops[legs].t = t;
        }
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
        for r in &self.returns {
            tour.stops[r.stop].mode = SwingbyMode::Shaped {
                altitude_km: x[r.altitude],
                aim_deg: x[r.aim],
            };
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
        let shaped_targeted = &self.ballistic;
        if !shaped_targeted.is_empty() {
            let mut work = Workspace::new(self);
            self.apply(x, &mut work.tour);
            evaluate(&work.tour, &EvalOptions::SEARCH, &mut work.eval);
            for &k in shaped_targeted {
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
        for r in &self.returns {
            modes[r.stop] = Some(SwingbyMode::Shaped {
                altitude_km: x[r.altitude],
                aim_deg: x[r.aim],
            });
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
                    self.push_shaped(&mut x, tour, k, altitude, aim)
                }
            }
        }
        for r in &self.returns {
            self.push_shaped(&mut x, tour, r.stop, r.altitude, r.aim);
        }
        x
    }

    /// Close each ballistic return of `x` onto its next stop: the shaped swing-by's altitude and
    /// aim and the leg's time of flight that meet the body (later stops move with it), from the
    /// values in `x`, kept inside the bounds. Returns the work done in evaluations' worth (one
    /// evaluation of the tour per return, and one per solver iteration).
    pub fn close_returns(&self, x: &mut [f64], work: &mut Workspace, max_iter: usize) -> u64 {
        let mut cost = 0;
        for r in &self.returns {
            let k = r.stop;
            self.apply(x, &mut work.tour);
            evaluate(&work.tour, &EvalOptions::SEARCH, &mut work.eval);
            cost += 1;
            let e = &work.eval;
            if e.legs.len() < k || !e.legs[..k].iter().all(|l| l.solved) || e.stops.len() <= k {
                break;
            }
            let t = &work.tour;
            let leg = ShapedLeg {
                body: &t.stops[k].body.data,
                vinf_in: e.stops[k].vinf_in,
                planet: e.stops[k].body_state,
                t: t.stops[k].t,
                next: &t.stops[k + 1].body,
                mu_sun: t.mu_sun,
                direction: t.legs[k].direction,
            };
            let x0 = [x[r.altitude], x[r.aim], x[k + 1] * 86_400.0];
            if let Some((y, _, n)) = meet_next_body(&leg, x0, true, max_iter, RETURN_TOL_KM, true) {
                cost += n as u64;
                x[r.altitude] = clamp_safe(y[0], self.lo[r.altitude], self.hi[r.altitude]);
                x[r.aim] = clamp_safe(
                    (y[1] + 180.0).rem_euclid(360.0) - 180.0,
                    self.lo[r.aim],
                    self.hi[r.aim],
                );
                x[k + 1] = clamp_safe(y[2] / 86_400.0, self.lo[k + 1], self.hi[k + 1]);
            }
        }
        cost
    }

    fn push_shaped(&self, x: &mut Vec<f64>, tour: &PreparedTour, k: usize, alt: usize, aim: usize) {
        let (a, m) = match tour.stops[k].mode {
            SwingbyMode::Shaped {
                altitude_km,
                aim_deg,
            } => (altitude_km, aim_deg),
            SwingbyMode::Targeted => (self.lo[alt], 0.0),
        };
        x.push(clamp_safe(a, self.lo[alt], self.hi[alt]));
        x.push(clamp_safe(
            (m + 180.0).rem_euclid(360.0) - 180.0,
            self.lo[aim],
            self.hi[aim],
        ));
    }

    /// The objective at `x` (smaller is better) and the constraints `g[j] ≤ 0` of
    /// [`Problem::constraints`], scaled to order one. An evaluation with a leg that has no
    /// solution returns 1e9 with every constraint violated.
    pub fn evaluate_parts(&self, x: &[f64], work: &mut Workspace, g: &mut [f64]) -> f64 {
        work.point.clear();
        work.point.extend_from_slice(x);
        if !self.returns.is_empty() {
            // Ballistic returns are solved, not searched: their altitude, aim and time of flight
            // in `x` are where the solver starts.
            let mut pt = std::mem::take(&mut work.point);
            self.close_returns(&mut pt, work, RETURN_ITERS);
            work.point = pt;
        }
        let x = &work.point[..];
        self.apply(x, &mut work.tour);
        evaluate(&work.tour, &EvalOptions::SEARCH, &mut work.eval);
        let e = &work.eval;
        let base = self.objective.value(e);
        work.feasible = base.is_finite() && self.meets_limits(e);
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
                Constraint::Miss { stop } => match e.stops[stop].swingby.and_then(|s| s.miss_km) {
                    Some(m) => {
                        let tol = self.tour.stops[stop].max_miss_km.min(SEARCH_MISS_KM);
                        (m - tol) / tol
                    }
                    None => 1e3,
                },
                Constraint::DlaBand(lo, hi) => {
                    (lo - e.launch.dla_deg).max(e.launch.dla_deg - hi) / 10.0
                }
                Constraint::Propellant { max_dv_km_s } => e.ledger.total_dv_km_s - max_dv_km_s,
                Constraint::LvCapacity => match e.launch.injected_mass_kg {
                    Some(m) => (e.ledger.wet_mass_kg - m) / e.ledger.wet_mass_kg.max(1.0),
                    None => -1.0,
                },
                Constraint::LvTable(lo, hi) => {
                    (lo - e.launch.c3).max(e.launch.c3 - hi) / hi.max(1.0)
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
        let layout = self.norm_layout()?;
        Some(NormBlocks {
            blocks: layout.iter().map(|b| b.0).collect(),
        })
    }

    /// [`Problem::norm_shape`]'s blocks with what each belongs to: (length, stop or leg index),
    /// the index `None` for constraints. The launch v∞ belongs to 0, the swing-by at stop k to
    /// k, leg k's manoeuvre to k, the arrival to the last stop's index.
    pub fn norm_layout(&self) -> Option<Vec<(usize, Option<usize>)>> {
        if !matches!(
            self.objective,
            Objective::TotalDvWithLaunchVinf | Objective::SpacecraftDv
        ) {
            return None;
        }
        let n = self.tour.stops.len();
        let mut blocks = Vec::new();
        if self.objective == Objective::TotalDvWithLaunchVinf {
            blocks.push((1, Some(0)));
        }
        for k in 0..n - 1 {
            if k > 0 {
                blocks.push((1, Some(k)));
            }
            if self.tour.legs[k].dsm.is_some() || self.dsm_vars.iter().any(|v| v.leg == k) {
                blocks.push((3, Some(k)));
            }
        }
        match self.tour.arrival {
            ArrivalGoal::Rendezvous => blocks.push((3, Some(n - 1))),
            ArrivalGoal::Capture { .. } => blocks.push((1, Some(n - 1))),
            ArrivalGoal::FlybyOnly => {}
        }
        blocks.extend(std::iter::repeat_n((1, None), self.constraints.len()));
        Some(blocks)
    }

    /// The residual vector of [`Problem::norm_shape`] at `x`, whose norms sum to the score. False
    /// when `x` cannot be evaluated.
    pub fn residuals(&self, x: &[f64], work: &mut Workspace, r: &mut [f64]) -> bool {
        let mut g = std::mem::take(&mut work.g);
        g.resize(self.constraints.len(), 0.0);
        let base = self.evaluate_parts(x, work, &mut g);
        let ok = base < 1e9;
        if ok {
            self.fill_residuals(&work.eval, &g, r);
        }
        work.g = g;
        ok
    }

    /// The residuals of an evaluation whose constraint values are `g`.
    pub fn fill_residuals(&self, e: &Evaluation, g: &[f64], r: &mut [f64]) {
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
        for (c, gj) in self.constraints.iter().zip(g) {
            put(&[self.weight(c) * gj.max(0.0)]);
        }
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
            Constraint::Miss { .. } => 1.0,
            Constraint::DlaBand(..) => 1.0,
            Constraint::Propellant { .. } => 5.0,
            Constraint::LvCapacity => 20.0,
            Constraint::LvTable(_, hi) => 0.1 * hi.max(1.0),
        }
    }

    /// True when an evaluation (of the problem's tour) breaks none of the problem's limits: the
    /// rule of `eval`'s warnings, with the problem's limit set.
    pub fn meets_limits(&self, e: &Evaluation) -> bool {
        e.complete
            && !e.warnings.iter().any(|w| self.limits.counts(w))
            && self.returns.iter().all(|r| {
                e.stops[r.stop]
                    .swingby
                    .and_then(|s| s.miss_km)
                    .is_some_and(|m| m <= self.tour.stops[r.stop].max_miss_km.min(SEARCH_MISS_KM))
            })
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

    /// True when `x` meets every limit of the problem (the evaluation's own rule, see
    /// [`Problem::meets_limits`]). Uses the workspace's buffers (no allocation).
    pub fn feasible(&self, x: &[f64], work: &mut Workspace) -> bool {
        let mut g = std::mem::take(&mut work.g);
        g.resize(self.constraints.len(), 0.0);
        self.evaluate_parts(x, work, &mut g);
        work.g = g;
        work.feasible
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
    /// A shaped swing-by's ballistic return meets its next stop within [`SEARCH_MISS_KM`]
    /// (per [`SEARCH_MISS_KM`] of miss).
    Miss {
        /// Stop index of the shaped swing-by.
        stop: usize,
    },
    /// Total spacecraft Δv within what the propellant gives (rocket equation), km/s.
    Propellant {
        /// The spacecraft's Δv capacity, km/s.
        max_dv_km_s: f64,
    },
    /// The launch vehicle lifts the wet mass at the launch C3 (relative to the wet mass).
    LvCapacity,
    /// Launch C3 inside the launch vehicle's table (relative).
    LvTable(f64, f64),
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
    /// Whether the last evaluation met every limit of the problem.
    pub feasible: bool,
    /// The point the last evaluation scored: the decision vector with its ballistic returns
    /// solved (the vector itself when there are none).
    pub point: Vec<f64>,
}

impl Workspace {
    /// Scratch for a problem.
    pub fn new(p: &Problem) -> Self {
        Workspace {
            tour: p.tour.clone(),
            eval: Evaluation::default(),
            g: vec![0.0; p.constraints.len()],
            feasible: false,
            point: Vec::with_capacity(p.dim()),
        }
    }
}

/// The variables of a shaped swing-by searched as shaped (a resonant return without a manoeuvre).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ShapedVars {
    /// Stop index.
    pub stop: usize,
    /// Index of the periapsis altitude (km).
    pub altitude: usize,
    /// Index of the B-plane aim (degrees).
    pub aim: usize,
}

/// Solver iterations allowed to close one ballistic return in an evaluation (ours:
/// Levenberg-Marquardt on three variables converges in a handful from a nearby point).
pub const RETURN_ITERS: usize = 30;

/// Miss at which the solver of a ballistic return stops, km (ours: a hundredth of
/// [`SEARCH_MISS_KM`]).
pub const RETURN_TOL_KM: f64 = 10.0;

/// Largest miss at the next stop a search accepts for a ballistic return, km (ours: small
/// against any planet's sphere of influence, so that the dates written back are those of the
/// encounter; the result is then retargeted onto the body).
pub const SEARCH_MISS_KM: f64 = 1_000.0;

/// Stops that are shaped in the design and whose next leg has no manoeuvre: their next leg is
/// flown ballistically.
fn ballistic_stops(d: &MissionDesign) -> Vec<usize> {
    let n = d.stops.len();
    (1..n.saturating_sub(1))
        .filter(|&k| {
            matches!(d.stops[k].swingby.mode, SwingbyMode::Shaped { .. }) && d.leg(k).dsm.is_none()
        })
        .collect()
}

/// A ballistic leg of the design is searched as a Lambert arc; so that the design itself is a
/// point of the search, give each such leg the revolutions and branch of the Lambert arc that
/// leaves the swing-by closest to the ballistic arc the design flies (the design's leg options
/// are not read for a ballistic leg and may say zero revolutions for an arc that loops).
fn fit_ballistic_revolutions(tour: &mut PreparedTour, ballistic: &[usize]) {
    if ballistic.is_empty() {
        return;
    }
    let mut e = Evaluation::default();
    evaluate(tour, &EvalOptions::SEARCH, &mut e);
    for &k in ballistic {
        let Some(leg) = e.legs.get(k).filter(|l| l.solved && l.ballistic) else {
            continue;
        };
        let (a, b) = (&e.stops[k], &e.stops[k + 1]);
        let tof = b.epoch.0 - a.epoch.0;
        let dir = tour.legs[k].direction;
        let mut best: Option<(f64, u32, Branch)> = None;
        for revs in 0..=4u32 {
            for branch in [Branch::Left, Branch::Right] {
                if revs == 0 && branch == Branch::Right {
                    continue;
                }
                let Ok(s) = lambert::solve_revs(
                    &a.body_state.r,
                    &b.body_state.r,
                    tof,
                    tour.mu_sun,
                    dir,
                    revs,
                    branch,
                ) else {
                    continue;
                };
                let d = (s.v1 - leg.v_depart).norm();
                if best.is_none_or(|(bd, _, _)| d < bd) {
                    best = Some((d, revs, branch));
                }
            }
        }
        if let Some((_, revs, branch)) = best {
            tour.legs[k].revs = revs;
            tour.legs[k].branch = branch;
        }
    }
}
