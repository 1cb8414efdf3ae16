//! From a design to a search outcome: the start is judged, the optimiser runs from it, its best
//! point is written back into the design, ballistic legs are closed onto their next body, and the
//! result is judged exactly as `eval` judges a design. The outcome is never worse than the start
//! when the start meets every limit; when nothing meeting every limit was found it says so, with
//! the closest design and what it breaks. The CLI, the workbench and the explorer all search
//! through [`search_design`].

use tourwright_mission::design::SwingbyMode;
use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::retarget::retarget;
use tourwright_mission::{
    Assessment, Edit, LimitSet, MissionDesign, PreparedTour, Schedule, TourShape,
};

use super::evolve::{OptimizeOptions, optimize_from};
use super::problem::{Held, Problem, ProblemError, Workspace};
use crate::job::Progress;

/// What a search of a design gives back.
#[derive(Clone, Debug)]
pub struct SearchOutcome {
    /// The design to use: the result written back, or the start itself when nothing better
    /// was found.
    pub design: MissionDesign,
    /// What the result changes in the start (apply it with `Edit::ApplySchedule`).
    pub schedule: Schedule,
    /// The shape of tour the search was run for: a result cannot be applied to another.
    pub shape: TourShape,
    /// The start, judged.
    pub start: Assessment,
    /// The result, judged exactly as `eval` judges it.
    pub result: Assessment,
    /// True when no design better than the start was found and the start is returned.
    pub kept_start: bool,
    /// Evaluations spent (at most the budget).
    pub evaluations: u64,
    /// True when the search was cancelled (the outcome is the best found until then).
    pub cancelled: bool,
    /// Trade-off front of points that meet every limit: (total TOF days, objective).
    pub front: Vec<(f64, f64)>,
    /// The limits the search kept.
    pub limits: LimitSet,
}

impl SearchOutcome {
    /// True when the returned design meets every limit.
    pub fn feasible(&self) -> bool {
        self.result.feasible()
    }

    /// The outcome in words, first line first: what was found, then start and result with
    /// their objective and unit, then each broken limit. The CLI prints these lines and the
    /// workbench shows them.
    pub fn lines(&self) -> Vec<String> {
        let mut out = Vec::new();
        let r = &self.result;
        if !r.feasible() {
            out.push("No design meeting every limit was found; the closest one breaks:".into());
            out.extend(r.breach_lines().into_iter().map(|l| format!("  - {l}")));
        } else if self.kept_start {
            out.push("No design better than the start was found; the start is kept.".into());
        } else {
            out.push("Found a better design that meets every limit.".into());
        }
        out.push(format!(
            "start:  {}, {}",
            self.start.value_text(),
            self.start.limits_text()
        ));
        let change = if r.score.is_finite() && self.start.score.is_finite() && !self.kept_start {
            let d =
                r.objective.display_value(r.score) - r.objective.display_value(self.start.score);
            let p = r.objective.decimals();
            let step = 10f64.powi(-(p as i32));
            if d.abs() < 0.5 * step {
                format!(" (within {step} {} of the start)", r.objective.unit())
            } else {
                format!(" ({d:+.p$} {})", r.objective.unit())
            }
        } else {
            String::new()
        };
        out.push(format!(
            "result: {}, {}{change}",
            r.value_text(),
            r.limits_text()
        ));
        if self.cancelled {
            out.push("The search was cancelled; this is the best found until then.".into());
        }
        if !self.limits.masses {
            out.push("Spacecraft masses were not held as limits.".into());
        }
        out
    }
}

/// Judge a design by its objective and `limits`, exactly as `eval` evaluates it.
pub fn assess(d: &MissionDesign, limits: LimitSet) -> Assessment {
    let (_, e) = tourwright_mission::evaluate_design(d);
    Assessment::of(d.search.objective, &e, limits)
}

/// Search a design within its bounds: the start is the first candidate, the result is judged as
/// `eval` judges it, and it is returned only if it is better than the start (a result that meets
/// every limit beats one that does not; then the smaller objective wins).
pub fn search_design(
    d: &MissionDesign,
    opts: &OptimizeOptions,
    limits: LimitSet,
    progress: &Progress,
    want_front: bool,
) -> Result<SearchOutcome, ProblemError> {
    search_design_held(d, opts, limits, progress, want_front, Held::default())
}

/// [`search_design`] with some epochs held fixed (a launch period's day: its launch, and the
/// arrival when the period holds it). The start should already carry the held epochs: it is
/// judged as it is, and a result is returned only if it is better.
pub fn search_design_held(
    d: &MissionDesign,
    opts: &OptimizeOptions,
    limits: LimitSet,
    progress: &Progress,
    want_front: bool,
    held: Held,
) -> Result<SearchOutcome, ProblemError> {
    let start = assess(d, limits);
    let mut p = Problem::with_limits(d, limits)?;
    p.hold(held);
    let x0 = p.start();
    // Nothing left to move (a direct transfer with both ends held): the start is the answer.
    let one = OptimizeOptions {
        max_evals: 1,
        ..*opts
    };
    let opts = if p.free_dim() == 0 { &one } else { opts };
    let r = optimize_from(&p, opts, progress, want_front, Some(&x0));
    let candidate = {
        let mut c = d.clone();
        match Edit::ApplySchedule(r.schedule.clone()).apply(&mut c) {
            Ok(()) => {
                let mut shaped = p.ballistic.clone();
                shaped.extend(p.returns.iter().map(|r| r.stop));
                shaped.sort_unstable();
                close_ballistic_legs(&mut c, &shaped, limits);
                let a = assess(&c, limits);
                Some((c, a))
            }
            Err(_) => None,
        }
    };
    // Neither meets every limit: the closer one by the search's own penalised score.
    let start_penalised = p.score(&x0, &mut Workspace::new(&p));
    let take = match &candidate {
        Some((_, a)) => match (a.feasible(), start.feasible()) {
            (true, true) => a.score <= start.score,
            (true, false) => true,
            (false, true) => false,
            (false, false) => r.value < start_penalised,
        },
        None => false,
    };
    let (mut design, result, kept_start) = match candidate {
        Some((c, a)) if take => (c, a, false),
        _ => (d.clone(), start.clone(), true),
    };
    if !result.feasible() {
        let note = format!(
            "Search result: no design meeting every limit was found; this one breaks: {}.",
            result.breach_lines().join("; ")
        );
        if !design.notes.contains(&note) {
            if !design.notes.is_empty() {
                design.notes.push('\n');
            }
            design.notes.push_str(&note);
        }
    }
    Ok(SearchOutcome {
        schedule: Schedule::of(&design),
        design,
        shape: TourShape::of(d),
        start,
        result,
        kept_start,
        evaluations: r.evaluations,
        cancelled: r.cancelled,
        front: r.front,
        limits,
    })
}

/// Close each ballistic leg onto its next body: the search held the swing-by's powered Δv at
/// zero (within 1 mm/s), so the altitude and aim written back leave a small miss; retargeting
/// the swing-by (altitude and aim only, dates kept) removes it. A retarget is kept only when the
/// design is judged no worse.
fn close_ballistic_legs(d: &mut MissionDesign, ballistic: &[usize], limits: LimitSet) {
    for &k in ballistic {
        if !matches!(
            d.stops.get(k).map(|s| s.swingby.mode),
            Some(SwingbyMode::Shaped { .. })
        ) {
            continue;
        }
        let Ok(tour) = PreparedTour::prepare(d) else {
            return;
        };
        let mut e = Evaluation::default();
        evaluate(&tour, &EvalOptions::SEARCH, &mut e);
        let miss = e
            .stops
            .get(k)
            .and_then(|s| s.swingby)
            .and_then(|s| s.miss_km);
        if !miss.is_some_and(|m| m > 1.0) {
            continue;
        }
        if let Ok(r) = retarget(d, k, false) {
            let before = Assessment::of(d.search.objective, &e, limits);
            let after = assess(&r.design, limits);
            if after.feasible() || !before.feasible() {
                *d = r.design;
            }
        }
    }
}
