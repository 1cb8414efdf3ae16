//! Launch period: a design judged on N launch opportunities instead of one. Each day's tour is
//! re-optimised with that day's launch held (and, as an option, the arrival held at the design's
//! arrival date), its encounter dates free within the design's bounds. Every day goes through
//! [`search_design_held`] — the same search, write-back and judgement as `optimize` — and its
//! figures are read off the mission crate's one evaluation of the day's design, exactly as `eval`
//! reads them.
//!
//! The march: the centre day (the design's own launch) first, from the design itself; then the
//! days on each side, outward, each started from its neighbour's result moved to its own launch
//! (the encounter dates kept, the first leg taking up the change). The two sides run in
//! parallel; a seed and a budget give the same period on any number of cores. Neighbouring days
//! are compared, and a day whose tour left its neighbour's family (another revolution count or
//! branch, an encounter date that jumped, a Δv step) says so in its row. The period's summary is
//! what sizes the mission: the largest C3 and Δv, the range of launch declinations, the days that
//! break a limit, and the propellant and launch-vehicle margins that cover every day.

use std::fmt;
use std::sync::Arc;

use tourwright_astro::constants::G0_M_S2;
use tourwright_astro::lambert::Branch;
use tourwright_astro::time::Epoch;
use tourwright_mission::design::{DsmTime, LaunchPeriodRequest, PeriodField};
use tourwright_mission::evaluate::evaluate_design;
use tourwright_mission::report::{Cell, Column, Table};
use tourwright_mission::rules::shown;
use tourwright_mission::{Assessment, LimitSet, MissionDesign, files, launch};

use crate::job::Progress;
use crate::optimize::{Held, OptimizeOptions, Problem, Workspace, search_design_held};

/// Evaluations each day's search may spend by default (ours, measured on the Lantern sample:
/// README, "Launch period"): every day lands within 1 m/s of a run with ten times the budget, and
/// a 21-day period takes a few seconds on two cores.
pub const DEFAULT_EVALS_PER_DAY: u64 = 150_000;

/// Generations of differential evolution each day's search runs before basin hopping (ours: a
/// day starts next to its neighbour's optimum, so most of its budget goes to the local descent
/// and hops around it; 25 generations still sample the whole box for a better family).
pub const DAY_DE_GENERATIONS: usize = 25;

/// An encounter date that leaves its drift across the period (the move its neighbour made) by
/// more than this many launch steps marks a change of family, unless the legs it joins are long
/// (see [`DATE_JUMP_LEG_FRACTION`]) (ours: inside one family the drift itself changes by about a
/// day per day at most on the samples; README, "Launch period").
pub const DATE_JUMP_STEPS: f64 = 5.0;

/// ... or by more than this fraction of the shorter leg the encounter joins (ours: a long final
/// leg has a flat optimum along its arrival date, which wanders by weeks between days with a Δv
/// change of millimetres per second, as Osprey's 1 000-day Earth-Jupiter leg does; a different
/// family, such as another revolution about the Sun, moves an encounter by a large fraction of
/// its leg).
pub const DATE_JUMP_LEG_FRACTION: f64 = 0.05;

/// A change of total spacecraft Δv between neighbouring days larger than this, per day of step,
/// marks a change of family, km/s (ours: inside one family the Δv changes by a few m/s per day of
/// launch delay, see README; a tenth of a km/s per day is well beyond it).
pub const DV_JUMP_KM_S_PER_DAY: f64 = 0.1;

/// What a launch-period run does.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PeriodOptions {
    /// Launch opportunities, centred on the design's launch (offsets −(N−1)/2 … N/2 steps).
    pub days: u32,
    /// Days between opportunities.
    pub step_days: f64,
    /// Hold the arrival at the design's arrival date on every day.
    pub fixed_arrival: bool,
    /// Evaluation budget of each day's search (a hard cap).
    pub evals_per_day: u64,
    /// Seed of every day's search (a seed and a budget give the same period on any machine).
    pub seed: u64,
    /// Which limits judge each day.
    pub limits: LimitSet,
    /// Generations of differential evolution in each day's search.
    pub de_generations: usize,
}

impl Default for PeriodOptions {
    fn default() -> Self {
        PeriodOptions::from_request(LaunchPeriodRequest::default())
    }
}

impl PeriodOptions {
    /// The options of a request (the design file's field), with the default budget and seed.
    pub fn from_request(r: LaunchPeriodRequest) -> Self {
        PeriodOptions {
            days: r.days,
            step_days: r.step_days,
            fixed_arrival: r.fixed_arrival,
            evals_per_day: DEFAULT_EVALS_PER_DAY,
            seed: 1,
            limits: LimitSet::ALL,
            de_generations: DAY_DE_GENERATIONS,
        }
    }

    /// The design's own request (`launch_period` in its file), else the defaults: 21 days, one
    /// day apart, the arrival free.
    pub fn for_design(d: &MissionDesign) -> Self {
        Self::from_request(d.launch_period.unwrap_or_default())
    }

    /// The request these options carry (as a design file writes it).
    pub fn request(&self) -> LaunchPeriodRequest {
        LaunchPeriodRequest {
            days: self.days,
            step_days: self.step_days,
            fixed_arrival: self.fixed_arrival,
        }
    }

    /// The offset of every opportunity from the design's launch, in steps, in launch order.
    pub fn offsets(&self) -> Vec<i64> {
        let r = self.request();
        (0..self.days).map(|i| r.offset(i)).collect()
    }

    /// The launch epoch of the opportunity `offset` steps from `centre`.
    pub fn launch_of(&self, centre: Epoch, offset: i64) -> Epoch {
        centre.plus_days(offset as f64 * self.step_days)
    }
}

/// Why a launch period could not be run.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum PeriodError {
    /// The number of days or the step is out of range.
    #[error("{reason}")]
    Options {
        /// Which setting.
        field: PeriodField,
        /// Why.
        reason: String,
    },
    /// The design cannot be searched at all.
    #[error("{0}")]
    Design(String),
    /// One day's design could not be built or searched (e.g. its launch is outside the
    /// ephemeris range).
    #[error("launch period day {offset:+} ({launch}): {reason}")]
    Day {
        /// The day's offset from the centre, in steps.
        offset: i64,
        /// Its launch date, UTC.
        launch: String,
        /// Why.
        reason: String,
    },
}

/// How a day's tour differs from its neighbour's by more than a family allows.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum FamilyJump {
    /// A leg's revolutions or branch changed.
    Revolutions {
        /// Leg index.
        leg: usize,
        /// The neighbour's revolutions and branch.
        from: (u32, Branch),
        /// This day's.
        to: (u32, Branch),
    },
    /// An encounter date left its drift (the move the neighbour made) by more than the
    /// threshold.
    EncounterDate {
        /// Stop index.
        stop: usize,
        /// How far it moved from the neighbour's, days.
        shift_days: f64,
        /// The move its drift predicted (the neighbour's own move), days.
        expected_days: f64,
        /// The threshold on the difference, days.
        limit_days: f64,
    },
    /// The total spacecraft Δv changed by more than the threshold.
    DeltaV {
        /// This day's minus the neighbour's, km/s.
        change_km_s: f64,
        /// The threshold, km/s.
        limit_km_s: f64,
    },
}

impl fmt::Display for FamilyJump {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let rb = |(n, b): (u32, Branch)| match (n, b) {
            (0, _) => "0 revolutions".to_string(),
            (n, Branch::Left) => format!("{n} rev. left"),
            (n, Branch::Right) => format!("{n} rev. right"),
        };
        match *self {
            FamilyJump::Revolutions { leg, from, to } => {
                write!(f, "leg {}: {} to {}", leg + 1, rb(from), rb(to))
            }
            FamilyJump::EncounterDate {
                stop,
                shift_days,
                expected_days,
                limit_days,
            } => write!(
                f,
                "stop {} moved {shift_days:+.1} days where its drift gave {expected_days:+.1} \
                 (off by more than {limit_days:.1})",
                stop + 1
            ),
            FamilyJump::DeltaV {
                change_km_s,
                limit_km_s,
            } => write!(
                f,
                "Δv changed {change_km_s:+.3} km/s (more than {limit_km_s:.3})"
            ),
        }
    }
}

/// One launch opportunity: its design and the figures `eval` gives for it.
#[derive(Clone, Debug, PartialEq)]
pub struct PeriodDay {
    /// Offset from the design's launch, in steps (0: the design's own launch date).
    pub offset: i64,
    /// The launch epoch (held by the search).
    pub launch: Epoch,
    /// The day's design: open it, evaluate it, save it.
    pub design: MissionDesign,
    /// The day judged exactly as `eval` judges its design: objective and broken limits.
    pub assessment: Assessment,
    /// True when every leg was solved.
    pub complete: bool,
    /// Launch C3, km²/s².
    pub c3_km2_s2: f64,
    /// Launch v∞, km/s.
    pub vinf_km_s: f64,
    /// Declination of the launch asymptote, degrees.
    pub dla_deg: f64,
    /// Right ascension of the launch asymptote, degrees.
    pub rla_deg: f64,
    /// Every stop's epoch after the launch, the arrival last.
    pub encounters: Vec<Epoch>,
    /// Total time of flight, days.
    pub tof_days: f64,
    /// Total spacecraft Δv, km/s.
    pub total_dv_km_s: f64,
    /// Arrival v∞, km/s.
    pub arrival_vinf_km_s: f64,
    /// Arrival Δv for the design's goal, km/s.
    pub arrival_dv_km_s: f64,
    /// Arrival epoch.
    pub arrival: Epoch,
    /// Propellant the day's Δv needs, kg.
    pub propellant_needed_kg: f64,
    /// Propellant loaded minus needed, kg.
    pub propellant_margin_kg: f64,
    /// Mass the launch vehicle injects at the day's C3, kg.
    pub injected_mass_kg: Option<f64>,
    /// Mass delivered with the launch vehicle filled, kg.
    pub delivered_mass_kg: Option<f64>,
    /// Per leg: revolutions and branch (the family's signature).
    pub revolutions: Vec<(u32, Branch)>,
    /// No design better than the start was found: the start (the neighbour's tour moved to this
    /// launch) is the day's design.
    pub kept_start: bool,
    /// The run was cancelled during this day's search: the day holds the best found until then.
    pub interrupted: bool,
    /// Evaluations the day's search spent.
    pub evaluations: u64,
    /// How the day's tour differs from its neighbour's towards the centre by more than a
    /// family allows (empty: the same family; see [`family_jumps`]).
    pub jumps: Vec<FamilyJump>,
}

impl PeriodDay {
    /// True when the day's design meets every limit.
    pub fn meets_every_limit(&self) -> bool {
        self.assessment.feasible()
    }

    /// Each broken limit in words, with by how much.
    pub fn broken_limits(&self) -> Vec<String> {
        self.assessment.breach_lines()
    }

    /// A day of a design: its figures read off the design evaluated exactly as `eval` evaluates
    /// it, judged by `limits` (no search; the run fills in the search's own fields).
    pub fn from_design(
        offset: i64,
        launch: Epoch,
        design: MissionDesign,
        limits: LimitSet,
    ) -> PeriodDay {
        let (_, e) = evaluate_design(&design);
        let assessment = Assessment::of(design.search.objective, &e, limits);
        let n = design.stops.len();
        PeriodDay {
            offset,
            launch,
            assessment,
            complete: e.complete,
            c3_km2_s2: e.launch.c3,
            vinf_km_s: e.launch.vinf,
            dla_deg: e.launch.dla_deg,
            rla_deg: e.launch.rla_deg,
            encounters: design.stops.iter().skip(1).map(|s| s.epoch).collect(),
            tof_days: e.total_tof_days(),
            total_dv_km_s: e.ledger.total_dv_km_s,
            arrival_vinf_km_s: e.arrival.vinf,
            arrival_dv_km_s: e.arrival.dv_km_s,
            arrival: design.stops[n - 1].epoch,
            propellant_needed_kg: e.ledger.propellant_needed_kg,
            propellant_margin_kg: e.ledger.propellant_margin_kg,
            injected_mass_kg: e.launch.injected_mass_kg,
            delivered_mass_kg: e.ledger.delivered_mass_kg,
            revolutions: (0..n - 1)
                .map(|k| {
                    let l = design.leg(k);
                    (l.revolutions, l.branch)
                })
                .collect(),
            kept_start: false,
            interrupted: false,
            evaluations: 0,
            jumps: Vec::new(),
            design,
        }
    }
}

/// A figure at its worst day.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Extreme {
    /// The day's offset, in steps.
    pub offset: i64,
    /// The day's launch.
    pub launch: Epoch,
    /// The figure.
    pub value: f64,
}

/// What sizes the mission: the worst day of each figure and the margins that cover every day.
/// Only days whose tour could be evaluated count.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct PeriodSummary {
    /// Days that ran (all of them unless cancelled).
    pub days_run: usize,
    /// The largest launch C3, km²/s²: what the launch vehicle must give.
    pub largest_c3: Option<Extreme>,
    /// The largest total spacecraft Δv, km/s: what the propellant must give.
    pub largest_dv: Option<Extreme>,
    /// The smallest and largest declination of the launch asymptote, degrees.
    pub dla_range_deg: Option<(f64, f64)>,
    /// Offsets of the days that break a limit (or whose tour cannot be evaluated).
    pub days_breaking_limits: Vec<i64>,
    /// Offsets of the days whose tour changed family from its neighbour's.
    pub days_with_jumps: Vec<i64>,
    /// The most propellant any day needs, kg.
    pub largest_propellant_needed: Option<Extreme>,
    /// Propellant loaded minus the most any day needs, kg (negative: some day is short).
    pub propellant_margin_kg: Option<f64>,
    /// The Δv the loaded propellant gives (rocket equation), km/s.
    pub dv_capacity_km_s: Option<f64>,
    /// That capacity minus the largest Δv, km/s.
    pub dv_margin_km_s: Option<f64>,
    /// The launch vehicle's mass at the largest C3 minus the spacecraft's wet mass, kg (none
    /// without a vehicle table).
    pub lv_margin_kg: Option<f64>,
    /// The smallest delivered mass of any day, kg.
    pub smallest_delivered_mass: Option<Extreme>,
}

/// A launch period: one row per day that ran, in launch order, and the summary.
#[derive(Clone, Debug, PartialEq)]
pub struct PeriodResult {
    /// The options it ran with.
    pub options: PeriodOptions,
    /// The design's name.
    pub name: String,
    /// The centre: the design's own launch.
    pub centre: Epoch,
    /// The arrival every day holds (with `fixed_arrival`).
    pub arrival_held: Option<Epoch>,
    /// The days that ran, in launch order.
    pub days: Vec<PeriodDay>,
    /// The worst days and the margins.
    pub summary: PeriodSummary,
    /// True when the run was cancelled: `days` holds the days finished until then (a day cut
    /// short is marked `interrupted`).
    pub cancelled: bool,
    /// The design the period was computed for.
    pub base: MissionDesign,
    /// Days that could not run (a launch or an encounter outside the ephemeris' range, say),
    /// with the reason: the first such day on each side and every day beyond it.
    pub not_run: Vec<DayNotRun>,
    /// Evaluations spent by every day's search.
    pub evaluations: u64,
}

/// A launch day of the period that could not be searched.
#[derive(Clone, Debug, PartialEq)]
pub struct DayNotRun {
    /// Offset from the design's launch, in steps.
    pub offset: i64,
    /// Its launch epoch.
    pub launch: Epoch,
    /// Why, in words.
    pub reason: String,
}

/// Run a launch period of `design`. Progress counts finished days; cancelling `progress` stops
/// every day's search within one evaluation and returns the days finished so far (marked).
pub fn run(
    design: &MissionDesign,
    opts: &PeriodOptions,
    progress: &Arc<Progress>,
) -> Result<PeriodResult, PeriodError> {
    opts.request()
        .check()
        .map_err(|(field, reason)| PeriodError::Options { field, reason })?;
    if design.stops.len() < 2 {
        return Err(PeriodError::Design(
            "a tour needs at least a launch and an arrival stop".into(),
        ));
    }
    let centre = design.stops[0].epoch;
    let arrival_held = opts
        .fixed_arrival
        .then(|| design.stops[design.stops.len() - 1].epoch);
    let offsets = opts.offsets();
    progress.set_total(offsets.len() as u64);
    let ctx = Ctx {
        base: design,
        opts,
        centre,
        arrival_held,
        progress,
    };
    let mut days = Vec::with_capacity(offsets.len());
    let first = ctx.day(design.clone(), 0)?;
    progress.add(1);
    let stop = first.interrupted;
    let early: Vec<i64> = offsets.iter().rev().copied().filter(|&o| o < 0).collect();
    let late: Vec<i64> = offsets.iter().copied().filter(|&o| o > 0).collect();
    let ((mut before, mut not_run), (after, not_after)) = if stop {
        ((Vec::new(), Vec::new()), (Vec::new(), Vec::new()))
    } else {
        rayon::join(
            || ctx.march(&first.design, &early),
            || ctx.march(&first.design, &late),
        )
    };
    before.reverse();
    days.extend(before);
    days.push(first);
    days.extend(after);
    not_run.reverse();
    not_run.extend(not_after);
    ctx.repair(&mut days)?;
    flag_jumps(&mut days, opts.step_days);
    let summary = summarise(design, &days);
    let ran_all =
        days.len() + not_run.len() == offsets.len() && days.iter().all(|d| !d.interrupted);
    Ok(PeriodResult {
        options: *opts,
        name: design.name.clone(),
        centre,
        arrival_held,
        evaluations: days.iter().map(|d| d.evaluations).sum(),
        cancelled: !ran_all || progress.is_cancelled(),
        days,
        summary,
        not_run,
        base: design.clone(),
    })
}

/// What every day of a run shares.
struct Ctx<'a> {
    base: &'a MissionDesign,
    opts: &'a PeriodOptions,
    centre: Epoch,
    arrival_held: Option<Epoch>,
    progress: &'a Arc<Progress>,
}

impl Ctx<'_> {
    /// The days of `offsets` in order, each started from the one before (the first from
    /// `from`, the centre); stops at a cancelled day. A day that cannot run ends the march on
    /// its side: it and every day beyond it are returned as not run, with the reason (each
    /// day starts from its neighbour, and the days beyond lie further out of range).
    fn march(&self, from: &MissionDesign, offsets: &[i64]) -> (Vec<PeriodDay>, Vec<DayNotRun>) {
        let mut out: Vec<PeriodDay> = Vec::with_capacity(offsets.len());
        for (i, &o) in offsets.iter().enumerate() {
            if self.progress.is_cancelled() {
                break;
            }
            let n = out.len();
            let prev = out.last().map_or(from, |d| &d.design);
            // The day before the neighbour, for the secant predictor.
            let before = match n {
                0 => None,
                1 => Some(from),
                _ => Some(&out[n - 2].design),
            };
            let launch = self.opts.launch_of(self.centre, o);
            let day = self
                .start(prev, before, launch)
                .map_err(|reason| PeriodError::Day {
                    offset: o,
                    launch: launch.to_date_utc(),
                    reason,
                })
                .and_then(|start| self.day(start, o));
            let day = match day {
                Ok(d) => d,
                Err(e) => {
                    let reason = match e {
                        PeriodError::Day { reason, .. } => reason,
                        other => other.to_string(),
                    };
                    let rest = &offsets[i..];
                    self.progress.add(rest.len() as u64);
                    let not_run = rest
                        .iter()
                        .map(|&q| DayNotRun {
                            offset: q,
                            launch: self.opts.launch_of(self.centre, q),
                            reason: if q == o {
                                reason.clone()
                            } else {
                                format!("beyond day {o:+}, which could not run")
                            },
                        })
                        .collect();
                    return (out, not_run);
                }
            };
            self.progress.add(1);
            let stop = day.interrupted;
            out.push(day);
            if stop {
                break;
            }
        }
        (out, Vec::new())
    }

    /// The start of a day: of the candidate starts built from its neighbour `prev` (and the day
    /// before it, `before`), the one the day's search scores best.
    fn start(
        &self,
        prev: &MissionDesign,
        before: Option<&MissionDesign>,
        launch: Epoch,
    ) -> Result<MissionDesign, String> {
        let candidates = start_candidates(prev, before, launch, self.arrival_held);
        let held = Held {
            launch: Some(launch),
            arrival: self.arrival_held,
        };
        let score = |d: &MissionDesign| -> f64 {
            match Problem::with_limits(d, self.opts.limits) {
                Ok(mut p) => {
                    p.hold(held);
                    let x = p.start();
                    p.score(&x, &mut Workspace::new(&p))
                }
                Err(_) => f64::INFINITY,
            }
        };
        let mut best: Option<(MissionDesign, f64)> = None;
        for c in candidates {
            let v = score(&c);
            if best.as_ref().is_none_or(|b| v < b.1) {
                best = Some((c, v));
            }
        }
        best.map(|b| b.0)
            .ok_or_else(|| "no start for this day validates (outside the ephemeris range?)".into())
    }

    /// Second looks: a day whose objective sits above the mean of its two neighbours' (a bump
    /// in a curve that is convex inside one family), or that breaks a limit its neighbour meets,
    /// is searched again from each neighbour's tour; the better of the old and the new day is
    /// kept (judged as `eval` judges). Two passes at most.
    fn repair(&self, days: &mut [PeriodDay]) -> Result<(), PeriodError> {
        for _ in 0..REPAIR_PASSES {
            let mut changed = false;
            for i in 0..days.len() {
                if self.progress.is_cancelled() {
                    return Ok(());
                }
                if !suspicious(days, i) {
                    continue;
                }
                let (o, launch) = (days[i].offset, days[i].launch);
                let mut best: Option<PeriodDay> = None;
                let mut spent = days[i].evaluations;
                for j in [i.checked_sub(1), Some(i + 1)].into_iter().flatten() {
                    if j >= days.len() {
                        continue;
                    }
                    // The day beyond the neighbour, for the secant predictor.
                    let k = if j < i { j.checked_sub(1) } else { Some(j + 1) };
                    let before = k.and_then(|k| days.get(k)).map(|d| &d.design);
                    let Ok(start) = self.start(&days[j].design, before, launch) else {
                        continue;
                    };
                    let day = self.day(start, o)?;
                    spent += day.evaluations;
                    if best.as_ref().is_none_or(|b| better(&day, b)) {
                        best = Some(day);
                    }
                }
                if let Some(b) = best.filter(|b| !b.interrupted && better(b, &days[i])) {
                    days[i] = b;
                    changed = true;
                }
                // Every evaluation spent on the day counts, kept or not.
                days[i].evaluations = spent;
            }
            if !changed {
                break;
            }
        }
        Ok(())
    }

    /// Search one day from `start` (which carries the day's launch, and the held arrival).
    fn day(&self, start: MissionDesign, offset: i64) -> Result<PeriodDay, PeriodError> {
        let launch = self.opts.launch_of(self.centre, offset);
        let fail = |reason: String| PeriodError::Day {
            offset,
            launch: launch.to_date_utc(),
            reason,
        };
        let opt = OptimizeOptions {
            seed: self.opts.seed,
            max_evals: self.opts.evals_per_day,
            hop: crate::optimize::HopSettings {
                de_generations: self.opts.de_generations,
                ..Default::default()
            },
            ..Default::default()
        };
        let held = Held {
            launch: Some(launch),
            arrival: self.arrival_held,
        };
        let child = self.progress.child();
        let o = search_design_held(&start, &opt, self.opts.limits, &child, false, held)
            .map_err(|e| fail(e.to_string()))?;
        let mut d = o.design;
        // The search writes epochs back through MJD2000 (sub-microsecond rounding): give the
        // day its launch and held arrival exactly as labelled.
        d.stops[0].epoch = launch;
        if let Some(a) = self.arrival_held {
            let n = d.stops.len();
            d.stops[n - 1].epoch = a;
        }
        self.label(&mut d, offset, launch);
        files::validate(&d).map_err(|i| fail(i.to_string()))?;
        let mut day = PeriodDay::from_design(offset, launch, d, self.opts.limits);
        day.kept_start = o.kept_start;
        day.interrupted = o.cancelled;
        day.evaluations = o.evaluations;
        self.progress.set_message(format!(
            "day {offset:+} ({}): {}, {}",
            launch.to_date_utc(),
            day.assessment.value_text(),
            day.assessment.limits_text()
        ));
        Ok(day)
    }

    /// Name and notes of a day's design: the design's own, plus where the day comes from and
    /// what it breaks (a day's design is one opportunity, so it asks for no period itself).
    fn label(&self, d: &mut MissionDesign, offset: i64, launch: Epoch) {
        let b = self.base;
        let name = format!("{} (launch period day {offset:+})", b.name);
        d.name = if name.chars().count() <= files::MAX_NAME_CHARS {
            name
        } else {
            b.name.clone()
        };
        let mut notes = b.notes.clone();
        let mut line = format!(
            "Launch period day {offset:+} of {} (steps of {} days): launch {}{}.",
            self.opts.days,
            self.opts.step_days,
            launch.to_date_utc(),
            if self.arrival_held.is_some() {
                ", arrival held"
            } else {
                ""
            }
        );
        let (_, e) = evaluate_design(d);
        let a = Assessment::of(d.search.objective, &e, self.opts.limits);
        if !a.feasible() {
            line.push_str(&format!(
                " No design meeting every limit was found for this day; it breaks: {}.",
                a.breach_lines().join("; ")
            ));
        }
        if !notes.is_empty() {
            notes.push('\n');
        }
        notes.push_str(&line);
        if notes.chars().count() <= files::MAX_TEXT_CHARS {
            d.notes = notes;
        } else {
            d.notes = b.notes.clone();
        }
        d.launch_period = None;
    }
}

/// The starts a day's search may begin from, each a valid design with the day's launch (and the
/// held arrival): the neighbour's tour with its encounter dates kept (the first leg takes up the
/// change; gravity-assist encounters drift slowly across a launch period); the neighbour's tour
/// moved whole with the launch (its times of flight kept); and, with two days behind, the secant
/// predictor of continuation methods: each encounter moved as it moved between those two days.
fn start_candidates(
    prev: &MissionDesign,
    before: Option<&MissionDesign>,
    launch: Epoch,
    arrival: Option<Epoch>,
) -> Vec<MissionDesign> {
    let n = prev.stops.len();
    let shift = launch.days() - prev.stops[0].epoch.days();
    let with = |moves: &dyn Fn(usize) -> f64| {
        let mut d = prev.clone();
        for (k, s) in d.stops.iter_mut().enumerate() {
            let m = moves(k);
            if m != 0.0 {
                s.epoch = s.epoch.plus_days(m);
            }
        }
        d.stops[0].epoch = launch;
        if let Some(a) = arrival {
            d.stops[n - 1].epoch = a;
        }
        for (k, l) in d.legs.iter_mut().enumerate() {
            if let Some(m) = l.dsm.as_mut() {
                if let DsmTime::Date(t) = m.at {
                    // A dated manoeuvre keeps its place in its leg.
                    let (a, b) = (prev.stops[k].epoch.days(), prev.stops[k + 1].epoch.days());
                    let f = if b > a { (t.days() - a) / (b - a) } else { 0.5 };
                    let (a2, b2) = (d.stops[k].epoch.days(), d.stops[k + 1].epoch.days());
                    m.at = DsmTime::Date(t.plus_days(a2 + f * (b2 - a2) - t.days()));
                }
            }
        }
        d
    };
    let mut out = vec![with(&|_| 0.0), with(&|_| shift)];
    if let Some(b) = before.filter(|b| b.stops.len() == n) {
        let step = prev.stops[0].epoch.days() - b.stops[0].epoch.days();
        if step.abs() > 1e-9 {
            let r = shift / step;
            out.push(with(&|k| {
                r * (prev.stops[k].epoch.days() - b.stops[k].epoch.days())
            }));
        }
    }
    out.retain(|d| files::validate(d).is_ok());
    out
}

/// The family jumps of `day` against its neighbour towards the centre, `prev`. `trend` is each
/// encounter's move expected from the days before (days; zeros when unknown): a family drifts
/// steadily across a period, so a date is judged by how far it leaves that drift.
pub fn family_jumps(
    prev: &PeriodDay,
    day: &PeriodDay,
    trend: &[f64],
    step_days: f64,
) -> Vec<FamilyJump> {
    let mut jumps = Vec::new();
    for (leg, (x, y)) in prev.revolutions.iter().zip(&day.revolutions).enumerate() {
        let same = x.0 == y.0 && (x.0 == 0 || x.1 == y.1);
        if !same {
            jumps.push(FamilyJump::Revolutions {
                leg,
                from: *x,
                to: *y,
            });
        }
    }
    // Times of flight of the neighbour's legs, to scale each encounter's tolerance.
    let mut t = vec![prev.launch.days()];
    t.extend(prev.encounters.iter().map(|e| e.days()));
    for (k, (x, y)) in prev.encounters.iter().zip(&day.encounters).enumerate() {
        let shift = y.days() - x.days();
        let expected = trend.get(k).copied().unwrap_or(0.0);
        let before = t[k + 1] - t[k];
        let after = t.get(k + 2).map_or(before, |n| n - t[k + 1]);
        let limit = (DATE_JUMP_STEPS * step_days).max(DATE_JUMP_LEG_FRACTION * before.min(after));
        if (shift - expected).abs() > limit {
            jumps.push(FamilyJump::EncounterDate {
                stop: k + 1,
                shift_days: shift,
                expected_days: expected,
                limit_days: limit,
            });
        }
    }
    if prev.complete && day.complete {
        let change = day.total_dv_km_s - prev.total_dv_km_s;
        let limit = DV_JUMP_KM_S_PER_DAY * step_days.max(1.0);
        if change.abs() > limit {
            jumps.push(FamilyJump::DeltaV {
                change_km_s: change,
                limit_km_s: limit,
            });
        }
    }
    jumps
}

/// Passes of [`Ctx::repair`] (ours: one pass fixes the bumps measured on the samples; a second
/// catches a repair that made its neighbour the odd one out).
const REPAIR_PASSES: usize = 2;

/// A bump counts when the day's objective exceeds its neighbours' mean by more than this
/// fraction of it (ours: above the searches' own convergence, 1e-5 of the value on the samples,
/// and far below any change of family).
const BUMP_FRACTION: f64 = 1e-4;

/// True when `a` is a better day than `b`: meeting every limit beats not; then the smaller
/// objective.
fn better(a: &PeriodDay, b: &PeriodDay) -> bool {
    match (a.meets_every_limit(), b.meets_every_limit()) {
        (true, false) => true,
        (false, true) => false,
        _ => a.assessment.score < b.assessment.score,
    }
}

/// True when day `i` deserves a second look: it breaks a limit a neighbour meets, or its
/// objective sits above the mean of its two neighbours' by more than [`BUMP_FRACTION`].
fn suspicious(days: &[PeriodDay], i: usize) -> bool {
    let d = &days[i];
    let nb: Vec<&PeriodDay> = [i.checked_sub(1), Some(i + 1)]
        .into_iter()
        .flatten()
        .filter_map(|j| days.get(j))
        .collect();
    if !d.meets_every_limit() && nb.iter().any(|n| n.meets_every_limit()) {
        return true;
    }
    if nb.len() < 2 || !nb.iter().all(|n| n.meets_every_limit()) || !d.meets_every_limit() {
        return false;
    }
    let mean = 0.5 * (nb[0].assessment.score + nb[1].assessment.score);
    d.assessment.score > mean + BUMP_FRACTION * mean.abs().max(1e-9)
}

/// Compare each day with its neighbour towards the centre, outward from the centre. The trend
/// of a day is its neighbour's own move (mirrored across the centre for the first day on each
/// side); after a jump there is no trend to follow.
fn flag_jumps(days: &mut [PeriodDay], step_days: f64) {
    let Some(c) = days.iter().position(|d| d.offset == 0) else {
        return;
    };
    let moves = |a: &PeriodDay, b: &PeriodDay| -> Vec<f64> {
        a.encounters
            .iter()
            .zip(&b.encounters)
            .map(|(x, y)| y.days() - x.days())
            .collect()
    };
    let order: Vec<usize> = (c + 1..days.len()).chain((0..c).rev()).collect();
    for i in order {
        let outward = i > c;
        let j = if outward { i - 1 } else { i + 1 };
        let trend = if j == c {
            // The centre's other neighbour, moving towards the centre, moves as this day will.
            let m = if outward {
                c.checked_sub(1)
            } else {
                Some(c + 1)
            };
            match m.and_then(|m| days.get(m)) {
                Some(md) => moves(md, &days[c]),
                None => Vec::new(),
            }
        } else if days[j].jumps.is_empty() {
            let h = if outward { j - 1 } else { j + 1 };
            moves(&days[h], &days[j])
        } else {
            Vec::new()
        };
        days[i].jumps = family_jumps(&days[j], &days[i], &trend, step_days);
    }
}

fn summarise(design: &MissionDesign, days: &[PeriodDay]) -> PeriodSummary {
    let ok: Vec<&PeriodDay> = days.iter().filter(|d| d.complete).collect();
    let extreme = |f: &dyn Fn(&PeriodDay) -> Option<f64>, largest: bool| {
        ok.iter()
            .filter_map(|d| f(d).and_then(shown).map(|v| (d, v)))
            .fold(None::<Extreme>, |best, (d, v)| {
                let better = best.is_none_or(|b| if largest { v > b.value } else { v < b.value });
                if better {
                    Some(Extreme {
                        offset: d.offset,
                        launch: d.launch,
                        value: v,
                    })
                } else {
                    best
                }
            })
    };
    let largest_c3 = extreme(&|d| Some(d.c3_km2_s2), true);
    let largest_dv = extreme(&|d| Some(d.total_dv_km_s), true);
    let largest_propellant_needed = extreme(&|d| Some(d.propellant_needed_kg), true);
    let dla_range_deg = ok.iter().fold(None::<(f64, f64)>, |r, d| {
        let x = d.dla_deg;
        Some(r.map_or((x, x), |(a, b)| (a.min(x), b.max(x))))
    });
    let sc = &design.spacecraft;
    let wet = sc.dry_mass_kg + sc.propellant_kg;
    let dv_capacity_km_s = (sc.dry_mass_kg > 0.0 && sc.isp_s > 0.0)
        .then(|| sc.isp_s * G0_M_S2 / 1000.0 * (wet / sc.dry_mass_kg).ln())
        .and_then(shown);
    let lv_margin_kg = match (&design.launch_vehicle, largest_c3) {
        (Some(lv), Some(c3)) => {
            launch::injected_mass(lv, c3.value).and_then(|(m, _)| shown(m - wet))
        }
        _ => None,
    };
    PeriodSummary {
        days_run: days.len(),
        largest_c3,
        largest_dv,
        dla_range_deg,
        days_breaking_limits: days
            .iter()
            .filter(|d| !d.meets_every_limit())
            .map(|d| d.offset)
            .collect(),
        days_with_jumps: days
            .iter()
            .filter(|d| !d.jumps.is_empty())
            .map(|d| d.offset)
            .collect(),
        propellant_margin_kg: largest_propellant_needed
            .and_then(|p| shown(sc.propellant_kg - p.value)),
        largest_propellant_needed,
        dv_margin_km_s: match (dv_capacity_km_s, largest_dv) {
            (Some(c), Some(d)) => shown(c - d.value),
            _ => None,
        },
        dv_capacity_km_s,
        lv_margin_kg,
        smallest_delivered_mass: extreme(&|d| d.delivered_mass_kg, false),
    }
}

const fn col(key: &'static str, header: &'static str, decimals: usize) -> Column {
    Column {
        key,
        header,
        decimals,
    }
}

/// The columns of the period's table (CLI text, CSV and the workbench's grid).
pub const COLUMNS: [Column; 18] = [
    col("day", "day", 0),
    col("launch_utc", "launch (UTC)", 0),
    col("c3_km2_s2", "C3 (km²/s²)", 3),
    col("vinf_km_s", "v∞ (km/s)", 3),
    col("dla_deg", "DLA (°)", 1),
    col("rla_deg", "RLA (°)", 1),
    col("encounters_utc", "encounters (UTC)", 0),
    col("tof_days", "TOF (d)", 1),
    col("total_dv_km_s", "Δv (km/s)", 3),
    col("arrival_vinf_km_s", "arrival v∞ (km/s)", 3),
    col("arrival_utc", "arrival (UTC)", 0),
    col("propellant_needed_kg", "propellant (kg)", 0),
    col("delivered_mass_kg", "delivered (kg)", 0),
    col("objective", "objective", 4),
    col("meets_every_limit", "limits", 0),
    col("broken_limits", "broken limits", 0),
    col("family", "family", 0),
    col("note", "note", 0),
];

impl PeriodResult {
    /// The day `offset` steps from the centre, if it ran.
    pub fn day(&self, offset: i64) -> Option<&PeriodDay> {
        self.days.iter().find(|d| d.offset == offset)
    }

    /// True when every requested day ran and meets every limit.
    pub fn every_day_meets_limits(&self) -> bool {
        !self.cancelled
            && self.not_run.is_empty()
            && self.days.len() == self.options.days as usize
            && self.days.iter().all(PeriodDay::meets_every_limit)
    }

    /// One row per day: the one source of the text table, the CSV and the workbench's grid.
    pub fn table(&self) -> Table {
        let num = |x: f64| Cell::Num(shown(x));
        let rows = self
            .days
            .iter()
            .map(|d| {
                let mut note = Vec::new();
                if d.interrupted {
                    note.push("interrupted");
                }
                if !d.complete {
                    note.push("tour incomplete");
                }
                vec![
                    Cell::Num(Some(d.offset as f64)),
                    Cell::Text(d.launch.to_date_utc()),
                    num(d.c3_km2_s2),
                    num(d.vinf_km_s),
                    num(d.dla_deg),
                    num(d.rla_deg),
                    Cell::Text(
                        d.encounters
                            .iter()
                            .map(|e| e.to_date_utc())
                            .collect::<Vec<_>>()
                            .join(" "),
                    ),
                    num(d.tof_days),
                    num(d.total_dv_km_s),
                    num(d.arrival_vinf_km_s),
                    Cell::Text(d.arrival.to_date_utc()),
                    num(d.propellant_needed_kg),
                    Cell::Num(d.delivered_mass_kg.and_then(shown)),
                    Cell::Num(
                        shown(d.assessment.score).map(|s| d.assessment.objective.display_value(s)),
                    ),
                    Cell::Text(
                        if d.meets_every_limit() {
                            "met"
                        } else {
                            "BROKEN"
                        }
                        .into(),
                    ),
                    Cell::Text(d.broken_limits().join("; ")),
                    Cell::Text(
                        d.jumps
                            .iter()
                            .map(|j| format!("jump: {j}"))
                            .collect::<Vec<_>>()
                            .join("; "),
                    ),
                    Cell::Text(note.join(", ")),
                ]
            })
            .collect();
        Table {
            columns: COLUMNS.to_vec(),
            rows,
        }
    }

    /// The table as CSV (RFC 4180; numbers at full precision).
    pub fn to_csv(&self) -> String {
        self.table().to_csv()
    }

    /// The summary in words, one line each, units included.
    pub fn summary_lines(&self) -> Vec<String> {
        let s = &self.summary;
        let o = &self.options;
        let apart = if o.step_days == 1.0 {
            "1 day apart".to_string()
        } else {
            format!("{} days apart", o.step_days)
        };
        let mut out = vec![format!(
            "Launch period of {}: {} of {} launch days, {apart}, centred on {}{}",
            self.name,
            s.days_run,
            o.days,
            self.centre.to_date_utc(),
            match self.arrival_held {
                Some(a) => format!(", arrival held at {}", a.to_iso_utc()),
                None => ", encounter dates free".into(),
            }
        )];
        let at = |e: &Extreme| format!("day {:+}, {}", e.offset, e.launch.to_date_utc());
        if let Some(e) = &s.largest_c3 {
            out.push(format!("largest C3: {:.3} km²/s² ({})", e.value, at(e)));
        }
        if let Some(e) = &s.largest_dv {
            out.push(format!(
                "largest spacecraft Δv: {:.3} km/s ({})",
                e.value,
                at(e)
            ));
        }
        if let Some((a, b)) = s.dla_range_deg {
            out.push(format!("DLA range: {a:.1}° to {b:.1}°"));
        }
        if let (Some(p), Some(m)) = (&s.largest_propellant_needed, s.propellant_margin_kg) {
            out.push(format!(
                "propellant: {:.0} kg needed on the worst day ({}); margin {m:.0} kg",
                p.value,
                at(p)
            ));
        }
        if let (Some(c), Some(m)) = (s.dv_capacity_km_s, s.dv_margin_km_s) {
            out.push(format!(
                "Δv capacity of the propellant: {c:.3} km/s; margin over the largest Δv {m:.3} km/s"
            ));
        }
        if let Some(m) = s.lv_margin_kg {
            out.push(format!(
                "launch-vehicle margin at the largest C3: {m:.0} kg"
            ));
        }
        if let Some(e) = &s.smallest_delivered_mass {
            out.push(format!(
                "smallest delivered mass: {:.0} kg ({})",
                e.value,
                at(e)
            ));
        }
        if s.days_breaking_limits.is_empty() {
            out.push("every day meets every limit".into());
        } else {
            out.push(format!(
                "days breaking a limit: {}",
                offsets_text(&s.days_breaking_limits)
            ));
        }
        if !s.days_with_jumps.is_empty() {
            out.push(format!(
                "days whose tour changed family: {}",
                offsets_text(&s.days_with_jumps)
            ));
        }
        if let Some(first) = self.not_run.first() {
            let offsets: Vec<i64> = self.not_run.iter().map(|d| d.offset).collect();
            out.push(format!(
                "days that could not run: {} (day {:+}, {}: {})",
                offsets_text(&offsets),
                first.offset,
                first.launch.to_date_utc(),
                first.reason
            ));
        }
        if self.cancelled {
            out.push(format!(
                "cancelled: {} of {} days finished",
                self.days.iter().filter(|d| !d.interrupted).count(),
                o.days
            ));
        }
        out
    }

    /// The table and the summary as text.
    pub fn to_text(&self) -> String {
        let mut s = self.table().to_text();
        s.push('\n');
        for l in self.summary_lines() {
            s.push_str(&l);
            s.push('\n');
        }
        s
    }

    /// The period for machines (`--json`).
    pub fn report(&self) -> PeriodReport {
        let ext = |e: &Option<Extreme>| {
            e.map(|e| ExtremeReport {
                day: e.offset,
                launch_utc: e.launch.to_iso_utc(),
                value: e.value,
            })
        };
        let s = &self.summary;
        PeriodReport {
            name: self.name.clone(),
            days_requested: self.options.days,
            step_days: self.options.step_days,
            fixed_arrival: self.options.fixed_arrival,
            evals_per_day: self.options.evals_per_day,
            seed: self.options.seed,
            centre_utc: self.centre.to_iso_utc(),
            arrival_held_utc: self.arrival_held.map(|a| a.to_iso_utc()),
            cancelled: self.cancelled,
            evaluations: self.evaluations,
            every_day_meets_every_limit: self.every_day_meets_limits(),
            summary: SummaryReport {
                days_run: s.days_run,
                largest_c3_km2_s2: ext(&s.largest_c3),
                largest_dv_km_s: ext(&s.largest_dv),
                dla_min_deg: s.dla_range_deg.map(|r| r.0),
                dla_max_deg: s.dla_range_deg.map(|r| r.1),
                days_breaking_limits: s.days_breaking_limits.clone(),
                days_with_family_jumps: s.days_with_jumps.clone(),
                largest_propellant_needed_kg: ext(&s.largest_propellant_needed),
                propellant_margin_kg: s.propellant_margin_kg,
                dv_capacity_km_s: s.dv_capacity_km_s,
                dv_margin_km_s: s.dv_margin_km_s,
                lv_margin_at_largest_c3_kg: s.lv_margin_kg,
                smallest_delivered_mass_kg: ext(&s.smallest_delivered_mass),
            },
            days: self
                .days
                .iter()
                .map(|d| DayReport {
                    day: d.offset,
                    launch_utc: d.launch.to_iso_utc(),
                    c3_km2_s2: shown(d.c3_km2_s2),
                    vinf_km_s: shown(d.vinf_km_s),
                    dla_deg: shown(d.dla_deg),
                    rla_deg: shown(d.rla_deg),
                    encounters: d
                        .encounters
                        .iter()
                        .zip(d.design.stops.iter().skip(1))
                        .map(|(e, s)| EncounterReport {
                            body: s.body.clone(),
                            epoch_utc: e.to_iso_utc(),
                            mjd2000: shown(e.mjd2000()),
                        })
                        .collect(),
                    tof_days: shown(d.tof_days),
                    total_dv_km_s: shown(d.total_dv_km_s),
                    arrival_vinf_km_s: shown(d.arrival_vinf_km_s),
                    arrival_dv_km_s: shown(d.arrival_dv_km_s),
                    arrival_utc: d.arrival.to_iso_utc(),
                    propellant_needed_kg: shown(d.propellant_needed_kg),
                    propellant_margin_kg: shown(d.propellant_margin_kg),
                    injected_mass_kg: d.injected_mass_kg.and_then(shown),
                    delivered_mass_kg: d.delivered_mass_kg.and_then(shown),
                    objective: d.assessment.objective.label(),
                    unit: d.assessment.objective.unit(),
                    value: shown(d.assessment.score)
                        .map(|s| d.assessment.objective.display_value(s)),
                    meets_every_limit: d.meets_every_limit(),
                    broken_limits: d.broken_limits(),
                    family_jumps: d.jumps.iter().map(|j| j.to_string()).collect(),
                    kept_start: d.kept_start,
                    interrupted: d.interrupted,
                    evaluations: d.evaluations,
                })
                .collect(),
            days_not_run: self
                .not_run
                .iter()
                .map(|d| NotRunReport {
                    day: d.offset,
                    launch_utc: d.launch.to_iso_utc(),
                    reason: d.reason.clone(),
                })
                .collect(),
            lines: self.summary_lines(),
        }
    }
}

fn offsets_text(v: &[i64]) -> String {
    v.iter()
        .map(|o| format!("{o:+}"))
        .collect::<Vec<_>>()
        .join(", ")
}

/// A launch period for machines (`period --json`, and `launch_period` in `eval --json`). Keys
/// carry their units; absent figures are `null`.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct PeriodReport {
    /// The design's name.
    pub name: String,
    /// Launch opportunities asked for.
    pub days_requested: u32,
    /// Days between them.
    pub step_days: f64,
    /// The arrival held at the design's.
    pub fixed_arrival: bool,
    /// Each day's evaluation budget.
    pub evals_per_day: u64,
    /// The seed.
    pub seed: u64,
    /// The design's own launch, ISO-8601 UTC.
    pub centre_utc: String,
    /// The held arrival, ISO-8601 UTC.
    pub arrival_held_utc: Option<String>,
    /// Stopped before every day finished.
    pub cancelled: bool,
    /// Evaluations of every day's search.
    pub evaluations: u64,
    /// Every requested day ran and meets every limit.
    pub every_day_meets_every_limit: bool,
    /// The worst days and the margins.
    pub summary: SummaryReport,
    /// One per day that ran, in launch order.
    pub days: Vec<DayReport>,
    /// The days that could not run, with the reason.
    pub days_not_run: Vec<NotRunReport>,
    /// The summary in words.
    pub lines: Vec<String>,
}

/// A day of [`PeriodReport`] that could not run.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct NotRunReport {
    /// Offset from the design's launch, in steps.
    pub day: i64,
    /// Its launch, ISO-8601 UTC.
    pub launch_utc: String,
    /// Why.
    pub reason: String,
}

/// The summary of [`PeriodReport`].
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct SummaryReport {
    /// Days that ran.
    pub days_run: usize,
    /// The largest C3 and its day.
    pub largest_c3_km2_s2: Option<ExtremeReport>,
    /// The largest total spacecraft Δv and its day.
    pub largest_dv_km_s: Option<ExtremeReport>,
    /// The smallest launch declination, degrees.
    pub dla_min_deg: Option<f64>,
    /// The largest launch declination, degrees.
    pub dla_max_deg: Option<f64>,
    /// Days (offsets) that break a limit.
    pub days_breaking_limits: Vec<i64>,
    /// Days (offsets) whose tour changed family.
    pub days_with_family_jumps: Vec<i64>,
    /// The most propellant any day needs and its day.
    pub largest_propellant_needed_kg: Option<ExtremeReport>,
    /// Propellant loaded minus the most any day needs, kg.
    pub propellant_margin_kg: Option<f64>,
    /// Δv the loaded propellant gives, km/s.
    pub dv_capacity_km_s: Option<f64>,
    /// That capacity minus the largest Δv, km/s.
    pub dv_margin_km_s: Option<f64>,
    /// Vehicle mass at the largest C3 minus the wet mass, kg.
    pub lv_margin_at_largest_c3_kg: Option<f64>,
    /// The smallest delivered mass and its day.
    pub smallest_delivered_mass_kg: Option<ExtremeReport>,
}

/// A figure at its day.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct ExtremeReport {
    /// Offset from the centre, in steps.
    pub day: i64,
    /// The day's launch, ISO-8601 UTC.
    pub launch_utc: String,
    /// The figure (the unit is in the field's name).
    pub value: f64,
}

/// One encounter of a [`DayReport`].
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct EncounterReport {
    /// The body.
    pub body: String,
    /// Its epoch, ISO-8601 UTC.
    pub epoch_utc: String,
    /// Its epoch, MJD2000 (TDB).
    pub mjd2000: Option<f64>,
}

/// One day of [`PeriodReport`].
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct DayReport {
    /// Offset from the centre, in steps.
    pub day: i64,
    /// Launch, ISO-8601 UTC.
    pub launch_utc: String,
    /// Launch C3, km²/s².
    pub c3_km2_s2: Option<f64>,
    /// Launch v∞, km/s.
    pub vinf_km_s: Option<f64>,
    /// Declination of the launch asymptote, degrees.
    pub dla_deg: Option<f64>,
    /// Right ascension of the launch asymptote, degrees.
    pub rla_deg: Option<f64>,
    /// Every stop after the launch, the arrival last.
    pub encounters: Vec<EncounterReport>,
    /// Total time of flight, days.
    pub tof_days: Option<f64>,
    /// Total spacecraft Δv, km/s.
    pub total_dv_km_s: Option<f64>,
    /// Arrival v∞, km/s.
    pub arrival_vinf_km_s: Option<f64>,
    /// Arrival Δv for the goal, km/s.
    pub arrival_dv_km_s: Option<f64>,
    /// Arrival, ISO-8601 UTC.
    pub arrival_utc: String,
    /// Propellant needed, kg.
    pub propellant_needed_kg: Option<f64>,
    /// Propellant loaded minus needed, kg.
    pub propellant_margin_kg: Option<f64>,
    /// Launch-vehicle mass at the day's C3, kg.
    pub injected_mass_kg: Option<f64>,
    /// Delivered mass, kg.
    pub delivered_mass_kg: Option<f64>,
    /// The objective's name.
    pub objective: &'static str,
    /// Its unit.
    pub unit: &'static str,
    /// Its value as `eval` computes it.
    pub value: Option<f64>,
    /// The day meets every limit.
    pub meets_every_limit: bool,
    /// Each broken limit, with by how much.
    pub broken_limits: Vec<String>,
    /// How the tour left its neighbour's family.
    pub family_jumps: Vec<String>,
    /// No better design than the start was found.
    pub kept_start: bool,
    /// The day's search was cut short by cancellation.
    pub interrupted: bool,
    /// Evaluations of the day's search.
    pub evaluations: u64,
}
