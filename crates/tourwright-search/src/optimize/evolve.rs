//! The search itself: self-adaptive differential evolution (jDE: Brest et al., IEEE TEC 10(6),
//! 2006) on islands with ring migration, then monotonic basin hopping (Wales & Doye 1997; Leary
//! 2000) with a local descent on several chains.
//!
//! Three promises, kept by construction:
//! - **Deterministic per seed and budget**: the islands' and chains' counts are fixed, they advance
//!   in lock-step blocks and rounds, and each gets its share of the budget before a block starts,
//!   so the answer does not depend on the number of cores.
//! - **A budget is a hard cap, and more budget never gives a worse answer**: the run's course does
//!   not depend on its budget (the evolutionary phase has a fixed length; every block and round
//!   is the same in a longer run), a block or round that would overrun is cut short and ends the
//!   run. So a run with budget N evaluates a subset of the points a run with budget 2N evaluates,
//!   and the answer is the best point ever evaluated (below).
//! - **The answer is the best point evaluated**: every evaluation goes through a [`Worker`] that
//!   remembers the best point meeting every limit and the best penalised point; the result is
//!   the former when any point met every limit. The start, when given, is the first point
//!   evaluated, so a start that meets every limit is never beaten by a worse answer.

use rayon::prelude::*;

use super::problem::{DsmStartVars, Problem, Workspace, launch_angles};
use super::rng::Rng;
use crate::job::Progress;
use crate::polish::{LocalOptions, NormBlocks, auglag_box, clamp_safe, lm_sum_of_norms};
use tourwright_mission::Schedule;
use tourwright_mission::evaluate::legs;
use tourwright_mission::launch::asymptote_vector;

/// Optimiser settings.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OptimizeOptions {
    /// Seed of every random choice.
    pub seed: u64,
    /// Most objective evaluations (all islands and chains together): a hard cap.
    pub max_evals: u64,
    /// Optional wall-clock limit, seconds (results then depend on machine speed).
    pub time_limit_s: Option<f64>,
    /// Islands (fixed, so that results do not depend on the number of cores).
    pub islands: usize,
    /// Individuals per island (0: 15 × dimension, between 30 and 120).
    pub population: usize,
    /// Basin-hopping settings.
    pub hop: HopSettings,
}

/// The default evaluation budget of an optimiser run (CLI and workbench alike): ours, measured on
/// the samples (DEVELOPERS.md): about 2-6 s on two cores.
pub const DEFAULT_EVALS: u64 = 1_000_000;

impl Default for OptimizeOptions {
    fn default() -> Self {
        OptimizeOptions {
            seed: 1,
            max_evals: DEFAULT_EVALS,
            time_limit_s: None,
            islands: 4,
            population: 0,
            hop: HopSettings::default(),
        }
    }
}

/// Basin-hopping settings (ours; tuned on the Cassini benchmarks, see DEVELOPERS.md).
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
    /// Generations of differential evolution before basin hopping (a fixed count, so that the
    /// course of a run does not depend on its budget).
    pub de_generations: usize,
    /// With a time limit, the share of the time given to differential evolution at most.
    pub de_time_share: f64,
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
            de_generations: 100,
            de_time_share: 0.1,
            chains: 4,
        }
    }
}

/// What the optimiser found.
#[derive(Clone, Debug)]
pub struct OptimizeResult {
    /// Best decision vector.
    pub x: Vec<f64>,
    /// Its score: the objective when it meets every limit, else the penalised score.
    pub value: f64,
    /// The objective at `x` (without penalties).
    pub objective: f64,
    /// True when `x` meets every limit of the problem.
    pub feasible: bool,
    /// What the design takes from the optimum: epochs (each in its design's time scale), leg
    /// options (revolution choices, manoeuvres) and the shaped swing-bys' altitude and aim.
    pub schedule: Schedule,
    /// Objective evaluations used (at most the budget).
    pub evaluations: u64,
    /// Trade-off front of points that meet every limit: (total TOF days, objective) pairs, none
    /// dominated, sorted by TOF.
    pub front: Vec<(f64, f64)>,
    /// True when stopped by cancellation.
    pub cancelled: bool,
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

/// One worker's evaluations: scratch space, the evaluations it may still spend in the current
/// block or round, and the best points it has seen.
struct Worker {
    work: Workspace,
    g: Vec<f64>,
    evals: u64,
    allowance: u64,
    /// Best point meeting every limit, with its objective.
    feasible: Option<(Vec<f64>, f64)>,
    /// Best point by penalised score, with that score and its objective.
    any: Option<(Vec<f64>, f64)>,
    /// The objective of `any`.
    any_objective: f64,
    /// Whether the last evaluation met every limit, and its objective.
    last: (bool, f64),
    front: Vec<(f64, f64)>,
}

impl Worker {
    fn new(p: &Problem) -> Self {
        Worker {
            work: Workspace::new(p),
            g: vec![0.0; p.constraints.len()],
            evals: 0,
            allowance: 0,
            feasible: None,
            any: None,
            any_objective: f64::INFINITY,
            last: (false, f64::INFINITY),
            front: Vec::new(),
        }
    }

    fn can(&self, progress: &Progress) -> bool {
        self.allowance > 0 && !progress.is_cancelled()
    }

    /// Objective at `x` with the constraints in `g`; `None` when the allowance is spent or the
    /// run is cancelled (nothing is evaluated or counted then).
    fn parts(&mut self, p: &Problem, x: &[f64], g: &mut [f64], progress: &Progress) -> Option<f64> {
        if !self.can(progress) {
            return None;
        }
        self.allowance -= 1;
        self.evals += 1;
        progress.count_evals(1);
        let base = p.evaluate_parts(x, &mut self.work, g);
        let pen = p.penalised(base, g);
        self.record(x, base, pen);
        Some(base)
    }

    fn record(&mut self, _x: &[f64], base: f64, pen: f64) {
        // The point scored (ballistic returns solved), not the vector asked for.
        let x = &self.work.point[..];
        let feasible = self.work.feasible;
        self.last = (feasible, base);
        if feasible && self.feasible.as_ref().is_none_or(|b| base < b.1) {
            keep(&mut self.feasible, x, base);
        }
        if pen < 1e9 && self.any.as_ref().is_none_or(|b| pen < b.1) {
            keep(&mut self.any, x, pen);
            self.any_objective = base;
        }
    }

    /// Penalised score at `x` (`None` as for [`Worker::parts`]).
    fn score(&mut self, p: &Problem, x: &[f64], progress: &Progress) -> Option<f64> {
        let mut g = std::mem::take(&mut self.g);
        let v = self
            .parts(p, x, &mut g, progress)
            .map(|base| p.penalised(base, &g));
        self.g = g;
        v
    }

    /// Residuals of the sum-of-norms objective at `x`; false when not evaluated or not
    /// evaluable.
    fn residuals(&mut self, p: &Problem, x: &[f64], r: &mut [f64], progress: &Progress) -> bool {
        let mut g = std::mem::take(&mut self.g);
        let ok = match self.parts(p, x, &mut g, progress) {
            Some(base) if base < 1e9 => {
                p.fill_residuals(&self.work.eval, &g, r);
                true
            }
            _ => false,
        };
        self.g = g;
        ok
    }

    fn offer_front(&mut self, tof: f64) {
        if self.last.0 && self.last.1.is_finite() {
            add_front(&mut self.front, (tof, self.last.1));
        }
    }
}

/// Share of the leg redraws that set up a resonant return, in tours with a same-body manoeuvre
/// leg long enough for it (ours; measured on the Messenger and Rosetta benchmarks, DEVELOPERS.md).
const RESONANT_SHARE: f64 = 0.3;

/// Fewest whole periods of the body a same-body leg's TOF bounds must reach for resonant moves
/// (ours; measured, DEVELOPERS.md).
const RESONANT_MIN_PERIODS: f64 = 3.0;

/// Resonant draws per leg when a chain of returns is built leg by leg (ours).
const GROW_DRAWS: usize = 40;

/// Evaluations the compass refinement of each built leg may spend (ours).
const GROW_POLISH: usize = 120;

/// Share of the restarts that build a chain of returns leg by leg, in tours with two or more
/// resonant legs (ours; measured on Messenger full, DEVELOPERS.md).
const GROW_SHARE: f64 = 0.5;

/// Share of those builds that keep the best tour's legs before the returns; the others descend
/// the legs before the returns of a fresh start first (ours).
const GROW_FROM_BEST: f64 = 0.5;

/// Half-width of the region around the start the first island is seeded in, as a fraction of
/// each variable's range (ours).
const START_RADIUS: f64 = 0.05;

fn keep(slot: &mut Option<(Vec<f64>, f64)>, x: &[f64], v: f64) {
    match slot {
        Some((bx, bv)) => {
            bx.clear();
            bx.extend_from_slice(x);
            *bv = v;
        }
        None => *slot = Some((x.to_vec(), v)),
    }
}

/// A same-body leg with a manoeuvre that a resonant move can set up.
#[derive(Clone, Copy, Debug)]
struct ResonantLeg {
    /// Leg index.
    leg: usize,
    /// Period of the body, days.
    period: f64,
    /// Index of the manoeuvre's fraction η.
    eta: usize,
    /// How the leg's start is searched.
    start: DsmStartVars,
}

/// A leg start's two free numbers for a resonant move: their indices (a, b), the v∞ they give,
/// the values of a to try and the scan of b.
type StartNumbers = (
    usize,
    usize,
    Box<dyn Fn(f64, f64) -> tourwright_astro::Vec3>,
    Vec<f64>,
    Box<dyn Fn(usize) -> f64>,
);

/// Same-body legs with a manoeuvre whose TOF bounds reach at least [`RESONANT_MIN_PERIODS`] of
/// the body's periods: the legs a resonant move sets up (a launch or a shaped swing-by starts
/// them). On shorter legs (one or two periods: Cassini2's Venus-Venus leg, Rosetta's
/// Earth-Earth legs) the move was measured to hurt or not to help (DEVELOPERS.md).
fn resonant_dsm_legs(p: &Problem) -> Vec<ResonantLeg> {
    p.dsm_vars
        .iter()
        .filter_map(|v| {
            let period = p.resonant_periods.get(v.leg).copied().flatten()?;
            let (lo, hi) = (p.lo[v.leg + 1], p.hi[v.leg + 1]);
            let most = (hi / period).floor();
            (most >= RESONANT_MIN_PERIODS && most >= (lo / period).ceil().max(1.0)).then_some(
                ResonantLeg {
                    leg: v.leg,
                    period,
                    eta: v.eta,
                    start: v.start,
                },
            )
        })
        .collect()
}

/// Points (a, b) of a leg start's two free numbers that put the spacecraft on a heliocentric
/// orbit of period `period_days` (an n:m resonance with the body it leaves): along each of
/// `a_values`, where the heliocentric speed `planet.v + vinf(a, b)` crosses the one vis-viva
/// asks for at the body's distance, found by a scan of `b_at(0..=16)` and bisection.
fn resonant_geometries(
    planet: &tourwright_astro::State,
    mu_sun: f64,
    period_days: f64,
    vinf: &dyn Fn(f64, f64) -> tourwright_astro::Vec3,
    a_values: &[f64],
    b_at: &dyn Fn(usize) -> f64,
    out: &mut Vec<(f64, f64)>,
) {
    out.clear();
    let r = planet.r.norm();
    let a = (mu_sun * (period_days * 86_400.0 / std::f64::consts::TAU).powi(2)).cbrt();
    let v2 = mu_sun * (2.0 / r - 1.0 / a);
    if !(v2 > 0.0) {
        return;
    }
    let target = v2.sqrt();
    let miss = |x: f64, y: f64| (planet.v + vinf(x, y)).norm() - target;
    let steps = 16;
    for &x in a_values {
        let mut prev = (b_at(0), miss(x, b_at(0)));
        for i in 1..=steps {
            let h = b_at(i);
            let f = miss(x, h);
            if prev.1.is_finite() && f.is_finite() && prev.1.signum() != f.signum() {
                let (mut lo, mut hi, mut flo) = (prev.0, h, prev.1);
                for _ in 0..30 {
                    let mid = 0.5 * (lo + hi);
                    let fm = miss(x, mid);
                    if fm.signum() == flo.signum() {
                        lo = mid;
                        flo = fm;
                    } else {
                        hi = mid;
                    }
                }
                out.push((x, 0.5 * (lo + hi)));
            }
            prev = (h, f);
        }
    }
}

struct Island {
    rng: Rng,
    pop: Vec<Vec<f64>>,
    fit: Vec<f64>,
    f: Vec<f64>,
    cr: Vec<f64>,
    trial: Vec<f64>,
    stall: usize,
    best: f64,
    /// Members still to be evaluated for the first time (the first block evaluates them).
    unscored: usize,
    worker: Worker,
}

impl Island {
    fn new(p: &Problem, np: usize, seed: u64) -> Self {
        let mut rng = Rng::new(seed);
        let d = p.dim();
        let pop: Vec<Vec<f64>> = (0..np)
            .map(|_| {
                (0..d)
                    .map(|i| p.lo[i] + rng.uniform() * (p.hi[i] - p.lo[i]))
                    .collect()
            })
            .collect();
        Island {
            rng,
            pop,
            fit: vec![f64::INFINITY; np],
            f: vec![0.5; np],
            cr: vec![0.9; np],
            trial: vec![0.0; d],
            stall: 0,
            best: f64::INFINITY,
            unscored: np,
            worker: Worker::new(p),
        }
    }

    fn best_index(&self) -> usize {
        (0..self.fit.len())
            .min_by(|&a, &b| self.fit[a].total_cmp(&self.fit[b]))
            .unwrap_or(0)
    }

    /// Score the members not yet scored. False when the allowance ran out first.
    fn score_members(&mut self, p: &Problem, progress: &Progress) -> bool {
        let np = self.pop.len();
        while self.unscored > 0 {
            let i = np - self.unscored;
            match self.worker.score(p, &self.pop[i], progress) {
                Some(v) => {
                    self.fit[i] = v;
                    self.pop[i].copy_from_slice(&self.worker.work.point);
                }
                None => return false,
            }
            self.unscored -= 1;
        }
        self.best = self.fit.iter().copied().fold(f64::INFINITY, f64::min);
        true
    }

    /// One generation of jDE rand/1/bin. False when the allowance ran out.
    fn generation(&mut self, p: &Problem, want_front: bool, progress: &Progress) -> bool {
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
            let Some(ft) = self.worker.score(p, &self.trial, progress) else {
                return false;
            };
            if want_front {
                self.worker.offer_front(p.total_tof(&self.trial));
            }
            if ft <= self.fit[i] {
                // The point scored (ballistic returns solved): the next trials start from it.
                self.pop[i].copy_from_slice(&self.worker.work.point);
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
        true
    }

    /// Restart after a long stall: keep the best, scatter the rest. False when the allowance ran
    /// out.
    fn restart(&mut self, p: &Problem, progress: &Progress) -> bool {
        let keep = self.best_index();
        let d = p.dim();
        for i in 0..self.pop.len() {
            if i == keep {
                continue;
            }
            for j in 0..d {
                self.pop[i][j] = p.lo[j] + self.rng.uniform() * (p.hi[j] - p.lo[j]);
            }
            let Some(v) = self.worker.score(p, &self.pop[i], progress) else {
                return false;
            };
            self.pop[i].copy_from_slice(&self.worker.work.point);
            self.fit[i] = v;
            self.f[i] = 0.5;
            self.cr[i] = 0.9;
        }
        self.stall = 0;
        true
    }
}

/// One monotonic basin-hopping chain: its best point, its own random stream and its worker.
struct Chain {
    rng: Rng,
    x: Vec<f64>,
    fx: f64,
    /// The best point this chain ever held (a restart forgets `x`, not this).
    best: (Vec<f64>, f64),
    fails: usize,
    trial: Vec<f64>,
    worker: Worker,
    /// A point to descend from before any hop (the start, for the first chain).
    first: Option<Vec<f64>>,
}

impl Chain {
    /// Local descent from `x0` (augmented Lagrangian over the problem's constraints with
    /// quasi-Newton inner solves; Gauss-Newton on the sum of norms for tours with manoeuvres):
    /// the point and its penalised score.
    fn descend(
        &mut self,
        p: &Problem,
        x0: &[f64],
        hs: &HopSettings,
        progress: &Progress,
    ) -> (Vec<f64>, f64) {
        let worker = &mut self.worker;
        // Start from the point as scored (ballistic returns solved), so that every nearby
        // evaluation solves its returns from close by.
        let solved;
        let x0 = if p.returns.is_empty() {
            x0
        } else {
            if worker.score(p, x0, progress).is_none() {
                return (x0.to_vec(), 1e9);
            }
            solved = worker.work.point.clone();
            &solved[..]
        };
        if let Some(shape) = p.norm_shape().filter(|_| !p.dsm_vars.is_empty()) {
            // Manoeuvre legs: a sum of norms whose terms may vanish; Gauss-Newton reaches a zero
            // manoeuvre where a quasi-Newton method zigzags on the kink.
            let mut rf = |x: &[f64], r: &mut [f64]| worker.residuals(p, x, r, progress);
            let (x, f, _) = lm_sum_of_norms(
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
            return (x, score);
        }
        let mut fg = |x: &[f64], g: &mut [f64]| match worker.parts(p, x, g, progress) {
            Some(v) => v,
            None => {
                g.iter_mut().for_each(|v| *v = 1.0);
                f64::INFINITY
            }
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
        (r.x.clone(), p.penalised(r.f, &r.g))
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

    /// A resonant move (tours with manoeuvres): redraw a same-body leg as a return after m of
    /// the body's periods on an orbit of n revolutions (an n:m resonance), the launch or the
    /// swing-by before it turned so that the orbit has that period, and the manoeuvre late
    /// enough that the coast covers all but part of the last revolution: a ballistic return the
    /// descent can then trade against leveraging manoeuvres. Every later stop keeps its own
    /// leg's time of flight. Starts from `self.trial`; one evaluation (the state the leg
    /// starts from). False when no geometry was found.
    fn resonant_move(&mut self, p: &Problem, leg: ResonantLeg, progress: &Progress) -> bool {
        let (k, per) = (leg.leg, leg.period);
        let t = k + 1;
        let mmin = (p.lo[t] / per).ceil().max(1.0) as usize;
        let mmax = (p.hi[t] / per).floor() as usize;
        if mmax < mmin {
            return false;
        }
        let m = mmin + self.rng.below(mmax - mmin + 1);
        if let DsmStartVars::Launch { vinf, .. } = leg.start {
            // A launch v∞ of any size inside its bounds.
            self.trial[vinf] = p.lo[vinf] + self.rng.uniform() * (p.hi[vinf] - p.lo[vinf]);
        }
        let trial = std::mem::take(&mut self.trial);
        let scored = self.worker.score(p, &trial, progress).is_some();
        self.trial = trial;
        if !scored {
            return false;
        }
        let Some(stop) = self.worker.work.eval.stops.get(k) else {
            return false;
        };
        let planet = stop.body_state;
        let vin = stop.vinf_in;
        let Some(tstop) = self.worker.work.tour.stops.get(k) else {
            return false;
        };
        let body = tstop.body.data;
        let phase = self.rng.uniform();
        // The two numbers that set the start: (aim, altitude) after a swing-by, (u, w) at launch.
        let (ia, ib, vinf_of, a_values, b_at): StartNumbers = match leg.start {
            DsmStartVars::Swingby { altitude, aim } => {
                if !(vin.norm() > 1e-6) || !vin.norm().is_finite() {
                    return false;
                }
                let (lo, hi) = (p.lo[altitude], p.hi[altitude]);
                let base = body.radius_km.max(1.0);
                if !(hi > lo) || !(base + lo > 0.0) {
                    return false;
                }
                let (l0, l1) = ((base + lo).ln(), (base + hi).ln());
                (
                    aim,
                    altitude,
                    Box::new(move |a, h| legs::shaped_vinf_out(&body, &vin, h, a)),
                    (0..24)
                        .map(|j| (360.0 * (phase + j as f64 / 24.0)).rem_euclid(360.0) - 180.0)
                        .collect(),
                    // Altitudes on a geometric scale: the turn changes fastest near the body.
                    Box::new(move |i| {
                        ((l0 + (l1 - l0) * i as f64 / 16.0).exp() - base).clamp(lo, hi)
                    }),
                )
            }
            DsmStartVars::Launch { vinf, u, w } => {
                let speed = self.trial[vinf];
                (
                    u,
                    w,
                    Box::new(move |a, b| {
                        let (rla, dla) = launch_angles(a, b);
                        asymptote_vector(speed, rla, dla)
                    }),
                    (0..24).map(|j| (phase + j as f64 / 24.0).fract()).collect(),
                    Box::new(|i| i as f64 / 16.0),
                )
            }
        };
        let mut found = Vec::new();
        let mut choices: Vec<(usize, Vec<(f64, f64)>)> = Vec::new();
        for n in 1..=(2 * m + 1) {
            let period = m as f64 * per / n as f64;
            resonant_geometries(
                &planet,
                p.tour.mu_sun,
                period,
                &*vinf_of,
                &a_values,
                &*b_at,
                &mut found,
            );
            if !found.is_empty() {
                choices.push((n, found.clone()));
            }
        }
        if choices.is_empty() {
            return false;
        }
        let (n, geo) = &choices[self.rng.below(choices.len())];
        let (a, b) = geo[self.rng.below(geo.len())];
        let p_sc = m as f64 * per / *n as f64;
        let tof = m as f64 * per;
        self.trial[t] = clamp_safe(tof, p.lo[t], p.hi[t]);
        self.trial[ia] = clamp_safe(a, p.lo[ia], p.hi[ia]);
        self.trial[ib] = clamp_safe(b, p.lo[ib], p.hi[ib]);
        // The coast ends within the last revolution: the arc after the manoeuvre is the
        // zero-revolution rest of the orbit.
        let eta = leg.eta;
        let eta_lo = (1.0 - 0.9 * p_sc / tof).max(p.lo[eta]);
        let eta_hi = p.hi[eta];
        self.trial[eta] = if eta_hi > eta_lo {
            eta_lo + self.rng.uniform() * (eta_hi - eta_lo)
        } else {
            eta_hi
        };
        true
    }

    /// What the tour leaves to do after leg `k` of the point last scored: leg k's manoeuvre plus
    /// the cost of the v∞ it brings to the next stop (the design's arrival Δv there when that
    /// body is the last one, else the v∞ itself). The sequential build of a chain of returns
    /// ranks leg k's choices by it; later legs do not enter.
    fn after_leg(&self, p: &Problem, k: usize) -> f64 {
        let e = &self.worker.work.eval;
        let (Some(leg), Some(next)) = (e.legs.get(k), e.stops.get(k + 1)) else {
            return f64::INFINITY;
        };
        if !leg.solved {
            return f64::INFINITY;
        }
        let dsm = leg.dsm.map_or(0.0, |d| d.dv_km_s);
        let v = next.vinf_in.norm();
        let tour = &self.worker.work.tour;
        let last = tour.stops.len() - 1;
        let to_go = if tour.stops[k + 1].body.id == tour.stops[last].body.id {
            tourwright_mission::arrival::arrival_dv(
                &p.tour.arrival,
                v,
                tour.stops[k + 1].body.data.mu,
            )
        } else {
            v
        };
        let c = dsm + to_go;
        if c.is_finite() { c } else { f64::INFINITY }
    }

    /// A descent of the legs before a chain of returns (legs `0..first`), scored by what they
    /// cost and what they leave: the launch v∞ (when counted), their swing-bys' and manoeuvres'
    /// Δv, the cost of the v∞ they bring to stop `first` ([`Chain::after_leg`]'s measure) and
    /// every limit's violation. The other variables stay put. `None` when the allowance ran out.
    fn descend_prefix(
        &mut self,
        p: &Problem,
        x0: &[f64],
        first: usize,
        max_evals: usize,
        progress: &Progress,
    ) -> Option<Vec<f64>> {
        if first == 0 {
            // The returns start at launch: nothing comes before them.
            return Some(x0.to_vec());
        }
        let layout = p.norm_layout()?;
        let full_len: usize = layout.iter().map(|b| b.0).sum();
        // The legs' own blocks, the cost of what they leave at stop `first`, then the
        // constraints: the first and last copied from the full residual.
        let (mut own, mut limits) = (Vec::new(), Vec::new());
        let mut at = 0;
        for (b, o) in &layout {
            match o {
                Some(k) if *k < first => own.push(at..at + b),
                Some(_) => {}
                None => limits.push(at..at + b),
            }
            at += b;
        }
        let blocks: Vec<usize> = own
            .iter()
            .map(|r| r.len())
            .chain(std::iter::once(1))
            .chain(limits.iter().map(|r| r.len()))
            .collect();
        let shape = NormBlocks { blocks };
        let mut fixed = vec![true; p.dim()];
        fixed[0] = false;
        for f in fixed.iter_mut().take(first + 1).skip(1) {
            *f = false;
        }
        for v in p.dsm_vars.iter().filter(|v| v.leg < first) {
            fixed[v.eta] = false;
            match v.start {
                DsmStartVars::Launch { vinf, u, w } => {
                    fixed[vinf] = false;
                    fixed[u] = false;
                    fixed[w] = false;
                }
                DsmStartVars::Swingby { altitude, aim } => {
                    fixed[altitude] = false;
                    fixed[aim] = false;
                }
            }
        }
        for (i, f) in fixed.iter_mut().enumerate() {
            *f |= p.integer[i];
        }
        let mut buf = vec![0.0; full_len];
        let mut out_of_evals = false;
        let (x, _, _) = {
            let mut rf = |x: &[f64], r: &mut [f64]| {
                if !self.worker.residuals(p, x, &mut buf, progress) {
                    out_of_evals |= !self.worker.can(progress);
                    return false;
                }
                let cost = self.after_leg(p, first - 1)
                    - self.worker.work.eval.legs[first - 1]
                        .dsm
                        .map_or(0.0, |d| d.dv_km_s);
                let mut j = 0;
                for rg in &own {
                    r[j..j + rg.len()].copy_from_slice(&buf[rg.clone()]);
                    j += rg.len();
                }
                r[j] = if cost.is_finite() { cost } else { 1e6 };
                j += 1;
                for rg in &limits {
                    r[j..j + rg.len()].copy_from_slice(&buf[rg.clone()]);
                    j += rg.len();
                }
                true
            };
            lm_sum_of_norms(
                &mut rf,
                &shape,
                x0,
                &p.lo,
                &p.hi,
                &fixed,
                &LocalOptions {
                    max_evals,
                    fd_step: 1e-7,
                    f_tol: 1e-10,
                },
            )
        };
        if out_of_evals {
            return None;
        }
        Some(x)
    }

    /// Build a chain of returns leg by leg (tours with two or more resonant legs): from
    /// `self.x`, each resonant leg in turn is redrawn [`GROW_DRAWS`] times as a return near a
    /// resonance (the resonant move, its time of flight then moved by up to a few tenths of the
    /// body's period so that the manoeuvre can leverage); of those draws and the leg as it
    /// stands, the one that leaves the least to do ([`Chain::after_leg`]) is refined by a compass
    /// search on that leg's four numbers, and the next leg starts from it. The result is in `self.trial`; false when the allowance ran out
    /// or no leg could be drawn.
    fn grow_returns(&mut self, p: &Problem, resonant: &[ResonantLeg], progress: &Progress) -> bool {
        let mut base = self.x.clone();
        let mut grown = false;
        for &leg in resonant {
            let k = leg.leg;
            let t = k + 1;
            let (ia, ib) = match leg.start {
                DsmStartVars::Swingby { altitude, aim } => (aim, altitude),
                DsmStartVars::Launch { u, w, .. } => (u, w),
            };
            // The leg as it stands is the first candidate: a build never trades it for worse.
            let Some(_) = self.worker.score(p, &base, progress) else {
                return false;
            };
            let mut best: Option<(Vec<f64>, f64)> = Some((base.clone(), self.after_leg(p, k)));
            for _ in 0..GROW_DRAWS {
                self.trial.copy_from_slice(&base);
                if !self.resonant_move(p, leg, progress) {
                    if !self.worker.can(progress) {
                        return false;
                    }
                    continue;
                }
                let shift = (-0.1 + 0.4 * self.rng.uniform()) * leg.period;
                self.trial[t] = clamp_safe(self.trial[t] + shift, p.lo[t], p.hi[t]);
                let trial = std::mem::take(&mut self.trial);
                let scored = self.worker.score(p, &trial, progress).is_some();
                self.trial = trial;
                if !scored {
                    return false;
                }
                let c = self.after_leg(p, k);
                if best.as_ref().is_none_or(|b| c < b.1) {
                    best = Some((self.trial.clone(), c));
                }
            }
            let Some((mut x, mut c)) = best else { continue };
            // Compass search on the leg's time of flight, manoeuvre fraction and start.
            let vars = [t, leg.eta, ia, ib];
            let mut step: Vec<f64> = vars.iter().map(|&i| 0.05 * (p.hi[i] - p.lo[i])).collect();
            step[0] = 0.05 * leg.period;
            let mut spent = 0;
            while spent < GROW_POLISH
                && step
                    .iter()
                    .zip(&vars)
                    .any(|(s, &i)| *s > 1e-4 * (p.hi[i] - p.lo[i]))
            {
                let mut moved = false;
                for j in 0..vars.len() {
                    for sign in [1.0, -1.0] {
                        let i = vars[j];
                        let v = clamp_safe(x[i] + sign * step[j], p.lo[i], p.hi[i]);
                        if v == x[i] {
                            continue;
                        }
                        self.trial.copy_from_slice(&x);
                        self.trial[i] = v;
                        let trial = std::mem::take(&mut self.trial);
                        let scored = self.worker.score(p, &trial, progress).is_some();
                        self.trial = trial;
                        if !scored {
                            return false;
                        }
                        spent += 1;
                        let ct = self.after_leg(p, k);
                        if ct < c {
                            c = ct;
                            x.copy_from_slice(&self.trial);
                            moved = true;
                            break;
                        }
                    }
                }
                if !moved {
                    step.iter_mut().for_each(|s| *s *= 0.5);
                }
            }
            base = x;
            grown = true;
        }
        self.trial.copy_from_slice(&base);
        grown
    }

    /// Redraw one leg of `self.x` into `self.trial`: a resonant move on a same-body leg now and
    /// then (when the tour has one), else a leg move.
    fn redraw_leg(
        &mut self,
        p: &Problem,
        hs: &HopSettings,
        resonant: &[ResonantLeg],
        progress: &Progress,
    ) {
        if !resonant.is_empty() && self.rng.uniform() < RESONANT_SHARE {
            self.trial.copy_from_slice(&self.x);
            let leg = resonant[self.rng.below(resonant.len())];
            if self.resonant_move(p, leg, progress) {
                return;
            }
        }
        self.leg_move(p, hs);
    }

    /// One hop: perturb the chain's best, descend, keep the result if it is better; restart
    /// from a fresh point after too many failures.
    fn hop(
        &mut self,
        p: &Problem,
        pool: &[Vec<f64>],
        incumbent: &[f64],
        hs: &HopSettings,
        want_front: bool,
        progress: &Progress,
    ) {
        let resonant = if p.dsm_vars.is_empty() {
            Vec::new()
        } else {
            resonant_dsm_legs(p)
        };
        let start = if let Some(x0) = self.first.take() {
            // The designer's own design, refined where it stands before anything else.
            self.fx = f64::INFINITY;
            x0
        } else if self.fails >= hs.fails_before_restart || !self.fx.is_finite() {
            self.fails = 0;
            self.fx = f64::INFINITY;
            if resonant.len() >= 2 && self.rng.uniform() < GROW_SHARE {
                // A chain of returns built leg by leg, after the legs before it: the best
                // tour's, or a fresh start's descended first. The build takes this hop's
                // allowance; the next hop descends the whole tour from it.
                if incumbent.len() == p.dim() && self.rng.uniform() < GROW_FROM_BEST {
                    self.x.copy_from_slice(incumbent);
                } else {
                    let x0 = self.fresh_start(p, pool);
                    let build = resonant.len() * (2 * GROW_DRAWS + GROW_POLISH) + 16;
                    let evals = (self.worker.allowance as usize)
                        .saturating_sub(build)
                        .min(hs.local_evals_norms);
                    self.x = self
                        .descend_prefix(p, &x0, resonant[0].leg, evals, progress)
                        .unwrap_or(x0);
                }
                let built = if self.grow_returns(p, &resonant, progress) {
                    self.trial.clone()
                } else {
                    self.x.clone()
                };
                self.first = Some(built);
                return;
            } else if !p.dsm_vars.is_empty()
                && incumbent.len() == p.dim()
                && self.rng.uniform() < 0.5
            {
                // Manoeuvre tours: half the restarts leave from the best point of all chains
                // with one leg redrawn, so effort gathers in the best funnel found so far.
                self.x.copy_from_slice(incumbent);
                self.redraw_leg(p, hs, &resonant, progress);
                self.trial.clone()
            } else {
                self.fresh_start(p, pool)
            }
        } else if !p.dsm_vars.is_empty() && self.rng.uniform() < 0.5 {
            self.redraw_leg(p, hs, &resonant, progress);
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
        let (x, fx) = self.descend(p, &start, hs, progress);
        if want_front && fx < 1e8 {
            // The descent's end point, as scored: a front point when it meets every limit.
            let mut g = std::mem::take(&mut self.worker.g);
            if self.worker.parts(p, &x, &mut g, progress).is_some() {
                self.worker.offer_front(p.total_tof(&x));
            }
            self.worker.g = g;
        }
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
    }
}

/// Run the optimiser from nowhere in particular (see [`optimize_from`]).
pub fn optimize(
    p: &Problem,
    opts: &OptimizeOptions,
    progress: &Progress,
    want_front: bool,
) -> OptimizeResult {
    optimize_from(p, opts, progress, want_front, None)
}

/// Run the optimiser: `start` (a decision vector, typically [`Problem::start`]) is the first
/// point evaluated and joins the first island's population; then differential evolution on
/// islands, then basin hopping on chains started from the islands' bests. `progress` receives
/// the evaluation count and the best value; cancelling it stops within one evaluation per worker.
pub fn optimize_from(
    p: &Problem,
    opts: &OptimizeOptions,
    progress: &Progress,
    want_front: bool,
    start: Option<&[f64]>,
) -> OptimizeResult {
    let clock = std::time::Instant::now();
    let d = p.dim();
    let np = if opts.population > 0 {
        opts.population.max(5)
    } else {
        (15 * d).clamp(30, 120)
    };
    let n_isl = opts.islands.max(1);
    let hs = opts.hop;
    let out_of_time = |share: f64| {
        opts.time_limit_s
            .is_some_and(|t| clock.elapsed().as_secs_f64() >= t * share)
    };
    let cap = opts.max_evals;
    progress.set_total(cap.min(u64::MAX / 2));
    let mut islands: Vec<Island> = (0..n_isl)
        .map(|k| {
            Island::new(
                p,
                np,
                opts.seed.wrapping_mul(1_000_003).wrapping_add(k as u64),
            )
        })
        .collect();
    let spent = |isl: &[Island], ch: &[Chain]| -> u64 {
        isl.iter().map(|i| i.worker.evals).sum::<u64>()
            + ch.iter().map(|c| c.worker.evals).sum::<u64>()
    };
    let mut chains: Vec<Chain> = Vec::new();
    // The start: the first point evaluated, a member of the first island, and where the first
    // chain descends from before it hops.
    let start: Option<Vec<f64>> = start.filter(|x| x.len() == d).map(|x0| {
        (0..d)
            .map(|i| clamp_safe(x0[i], p.lo[i], p.hi[i]))
            .collect()
    });
    if let Some(x0) = start.clone() {
        let isl = &mut islands[0];
        isl.worker.allowance = cap.min(1);
        if let Some(v) = isl.worker.score(p, &x0, progress) {
            // The first island searches around the start first: its other members are drawn
            // within a tenth of each range of it (a designer who moves a design by weeks expects
            // the search to find the optimum next to it, and the other islands search the box).
            for m in isl.pop.iter_mut().skip(1) {
                for (i, v) in m.iter_mut().enumerate() {
                    let span = p.hi[i] - p.lo[i];
                    let y = if p.integer[i] {
                        *v
                    } else {
                        x0[i] + (2.0 * isl.rng.uniform() - 1.0) * START_RADIUS * span
                    };
                    *v = clamp_safe(y, p.lo[i], p.hi[i]);
                }
            }
            isl.pop[0] = x0;
            isl.fit[0] = v;
            // The first member is scored: the others follow from index 1.
            isl.unscored -= 1;
        }
    }
    let mut truncated = false;
    let mut cancelled = false;
    // Phase 1: differential evolution, a fixed number of generations (blocks of 25), each
    // island granted its block's evaluations before it starts.
    let block = 25usize;
    let block_cost = (block * np + np) as u64;
    let de_evals = (hs.de_generations * np * n_isl) as u64;
    let mut first = true;
    loop {
        if progress.is_cancelled() {
            cancelled = true;
            break;
        }
        let used = spent(&islands, &chains);
        if (!first && used >= de_evals) || out_of_time(hs.de_time_share) {
            break;
        }
        let left = cap.saturating_sub(used);
        let grant = block_cost.min(left / n_isl as u64);
        if grant < block_cost {
            truncated = true;
        }
        if grant == 0 {
            break;
        }
        islands.par_iter_mut().for_each(|isl| {
            isl.worker.allowance = grant;
            if !isl.score_members(p, progress) {
                return;
            }
            for _ in 0..block {
                if !isl.generation(p, want_front, progress) {
                    return;
                }
                if isl.stall > 150 && !isl.restart(p, progress) {
                    return;
                }
            }
        });
        first = false;
        let now = spent(&islands, &chains);
        progress.add(now - used);
        if truncated {
            break;
        }
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
        report(p, progress, &islands, &chains, now);
    }
    // Phase 2: basin hopping in lock-step rounds.
    if !truncated && !cancelled {
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
        chains = (0..hs.chains.max(1))
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
                    trial: vec![0.0; d],
                    worker: Worker::new(p),
                    first: if k == 0 { start.clone() } else { None },
                }
            })
            .collect();
        let n_ch = chains.len() as u64;
        let hop_cost = (hs.local_evals.max(hs.local_evals_norms) + 8 * d + 64) as u64;
        loop {
            if progress.is_cancelled() {
                cancelled = true;
                break;
            }
            let used = spent(&islands, &chains);
            if out_of_time(1.0) {
                break;
            }
            let grant = hop_cost.min(cap.saturating_sub(used) / n_ch);
            if grant == 0 {
                break;
            }
            let last = grant < hop_cost;
            let incumbent: Vec<f64> = chains
                .iter()
                .map(|c| &c.best)
                .min_by(|a, b| a.1.total_cmp(&b.1))
                .filter(|b| b.1.is_finite())
                .map(|b| b.0.clone())
                .unwrap_or_default();
            chains.par_iter_mut().for_each(|c| {
                c.worker.allowance = grant;
                c.hop(p, &pool, &incumbent, &hs, want_front, progress);
            });
            let now = spent(&islands, &chains);
            progress.add(now - used);
            report(p, progress, &islands, &chains, now);
            if last {
                break;
            }
        }
    }
    if progress.is_cancelled() {
        cancelled = true;
    }
    // The answer: the best point any worker evaluated, in a fixed order of workers.
    let workers: Vec<&Worker> = islands
        .iter()
        .map(|i| &i.worker)
        .chain(chains.iter().map(|c| &c.worker))
        .collect();
    let (x, value, objective, feasible) =
        best_of(&workers).unwrap_or_else(|| (p.lo.clone(), 1e9, f64::INFINITY, false));
    let evaluations = spent(&islands, &chains);
    progress.offer_best(value);
    let mut front = Vec::new();
    for w in &workers {
        for &pt in &w.front {
            add_front(&mut front, pt);
        }
    }
    front.sort_by(|a, b| a.0.total_cmp(&b.0));
    OptimizeResult {
        schedule: p.schedule_at(&x),
        x,
        value,
        objective,
        feasible,
        evaluations,
        front,
        cancelled,
    }
}

/// The best point of all workers: the one with the smallest objective among those that meet
/// every limit, else the smallest penalised score; ties go to the earlier worker. Returns the
/// point, its score, its objective and whether it meets every limit.
fn best_of(workers: &[&Worker]) -> Option<(Vec<f64>, f64, f64, bool)> {
    let mut best: Option<(&Vec<f64>, f64, f64)> = None;
    for w in workers {
        if let Some((x, v)) = &w.feasible {
            if best.is_none_or(|b| *v < b.1) {
                best = Some((x, *v, *v));
            }
        }
    }
    if let Some((x, v, o)) = best {
        return Some((x.clone(), v, o, true));
    }
    for w in workers {
        if let Some((x, v)) = &w.any {
            if best.is_none_or(|b| *v < b.1) {
                best = Some((x, *v, w.any_objective));
            }
        }
    }
    best.map(|(x, v, o)| (x.clone(), v, o, false))
}

fn report(p: &Problem, progress: &Progress, islands: &[Island], chains: &[Chain], evals: u64) {
    let workers: Vec<&Worker> = islands
        .iter()
        .map(|i| &i.worker)
        .chain(chains.iter().map(|c| &c.worker))
        .collect();
    if let Some((_, v, _, feasible)) = best_of(&workers) {
        progress.offer_best(v);
        progress.set_message(format!(
            "{evals} evaluations, best {}{}",
            p.objective.text(v),
            if feasible {
                ""
            } else {
                " (no point meets every limit yet)"
            }
        ));
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use tourwright_astro::bodies::BodyData;
    use tourwright_astro::{State, Vec3, kepler};

    /// Every swing-by geometry the resonant move finds puts the spacecraft on an orbit that comes
    /// back to the point it left after m of the body's periods (n of its own): checked by
    /// two-body propagation, not by the vis-viva relation the search solves.
    #[test]
    fn resonant_geometries_return_to_the_body_after_m_periods() {
        let mu_sun: f64 = 1.327_124_28e11;
        // A Mercury-like body on a circular orbit (radius and μ of the benchmark model).
        let r = 0.387_098_6 * 149_597_870.66;
        let v = (mu_sun / r).sqrt();
        let planet = State {
            r: Vec3::new(r, 0.0, 0.0),
            v: Vec3::new(0.0, v, 0.0),
        };
        let body = BodyData {
            mu: 22_321.0,
            radius_km: 2_440.0,
            min_altitude_km: 0.0,
            soi_km: 0.0,
        };
        let period = std::f64::consts::TAU * (r * r * r / mu_sun).sqrt() / 86_400.0;
        // v∞ mostly radial: the turns a 5 km/s Mercury swing-by can make reach several periods.
        let vin = Vec3::new(4.0, -2.5, 1.0);
        let aims: Vec<f64> = (0..24).map(|j| -180.0 + 15.0 * j as f64).collect();
        let (lo, hi) = (122.0_f64, 12_200.0_f64);
        let base = body.radius_km;
        let (l0, l1) = ((base + lo).ln(), (base + hi).ln());
        let b_at = move |i: usize| ((l0 + (l1 - l0) * i as f64 / 16.0).exp() - base).clamp(lo, hi);
        let vinf = move |a: f64, h: f64| legs::shaped_vinf_out(&body, &vin, h, a);
        let mut found = Vec::new();
        let mut checked = 0;
        let pairs = (1..=5usize).flat_map(|m| (1..=2 * m + 1).map(move |n| (m, n)));
        for (m, n) in pairs {
            let p_sc = m as f64 * period / n as f64;
            resonant_geometries(&planet, mu_sun, p_sc, &vinf, &aims, &b_at, &mut found);
            for &(aim, alt) in &found {
                assert!((lo..=hi).contains(&alt));
                let s = State {
                    r: planet.r,
                    v: planet.v + vinf(aim, alt),
                };
                let back = kepler::propagate(&s, m as f64 * period * 86_400.0, mu_sun).unwrap();
                // The circular body is back where it was after m periods too.
                let miss = (back.r - planet.r).norm();
                assert!(
                    miss < 1.0,
                    "{m}:{n} at aim {aim}, altitude {alt}: {miss} km"
                );
                checked += 1;
            }
        }
        assert!(checked >= 5, "{checked}");
    }

    fn messenger_full() -> Problem {
        let file = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("../../benches/mga/messenger_full.tour.ron");
        let d = tourwright_mission::files::load(&file).unwrap();
        Problem::from_design(&d).unwrap()
    }

    fn chain(p: &Problem, seed: u64) -> Chain {
        let mut worker = Worker::new(p);
        worker.allowance = 1_000_000;
        Chain {
            rng: Rng::new(seed),
            x: p.start(),
            fx: f64::INFINITY,
            best: (p.start(), f64::INFINITY),
            fails: 0,
            trial: vec![0.0; p.dim()],
            worker,
            first: None,
        }
    }

    /// Σ manoeuvres of legs 0..first plus what leg first − 1 leaves at stop `first`.
    fn prefix_cost(c: &mut Chain, p: &Problem, x: &[f64], first: usize) -> f64 {
        c.worker.score(p, x, &Progress::new()).unwrap();
        let e = &c.worker.work.eval;
        let dsms: f64 = e.legs[..first - 1]
            .iter()
            .map(|l| l.dsm.map_or(0.0, |d| d.dv_km_s))
            .sum();
        dsms + c.after_leg(p, first - 1)
    }

    /// Messenger full's three Mercury-Mercury legs form a chain of returns; the descent of the
    /// legs before them lowers their cost and what they leave at the first Mercury encounter,
    /// and moves none of the returns' variables.
    #[test]
    fn the_legs_before_a_chain_of_returns_descend_alone() {
        let p = messenger_full();
        let resonant = resonant_dsm_legs(&p);
        let legs: Vec<usize> = resonant.iter().map(|l| l.leg).collect();
        assert_eq!(legs, [3, 4, 5]);
        let progress = Progress::new();
        for seed in 1..=3 {
            let mut c = chain(&p, seed);
            let x0 = c.fresh_start(&p, &[]);
            let before = prefix_cost(&mut c, &p, &x0, 3);
            let x = c.descend_prefix(&p, &x0, 3, 1500, &progress).unwrap();
            let after = prefix_cost(&mut c, &p, &x, 3);
            assert!(after < before, "seed {seed}: {after} vs {before}");
            let mut returns: Vec<usize> = (4..=6).collect();
            for k in 3..6 {
                returns.extend(p.leg_vars(k));
            }
            for i in returns {
                assert_eq!(x[i].to_bits(), x0[i].to_bits(), "seed {seed}: x[{i}] moved");
            }
        }
    }

    /// The returns built leg by leg from a tour whose Mercury legs are drawn at random cost less
    /// than that tour (each leg keeps its own draw unless one leaves less to do: never worse,
    /// and here much better), and lie inside their bounds.
    #[test]
    fn a_chain_of_returns_built_leg_by_leg_beats_the_tour_it_starts_from() {
        let p = messenger_full();
        let resonant = resonant_dsm_legs(&p);
        let progress = Progress::new();
        for seed in 1..=3 {
            let mut c = chain(&p, seed);
            let x0 = c.fresh_start(&p, &[]);
            c.x = c.descend_prefix(&p, &x0, 3, 1500, &progress).unwrap();
            let start = c.worker.score(&p, &c.x.clone(), &progress).unwrap();
            assert!(c.grow_returns(&p, &resonant, &progress));
            let built = c.trial.clone();
            let v = c.worker.score(&p, &built, &progress).unwrap();
            assert!(v < start, "seed {seed}: {v} vs {start}");
            for (i, x) in built.iter().enumerate() {
                assert!(p.lo[i] <= *x && *x <= p.hi[i], "x[{i}] = {x}");
            }
        }
    }
}
