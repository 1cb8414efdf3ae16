//! The direct-transfer baseline: the best single Lambert arc from the launch body to the arrival
//! body in a launch period around the tour's launch, by the designer's objective, plus the
//! idealised Hohmann figures; and the side-by-side comparison with the tour.

use rayon::prelude::*;

use tourwright_astro::time::Tdb;
pub use tourwright_astro::transfer::{Hohmann, hohmann};
use tourwright_mission::design::{LaunchLimits, Stop};
use tourwright_mission::evaluate::{EvalOptions, Evaluation, Warning, evaluate};
use tourwright_mission::{MissionDesign, Objective, PreparedTour};

use crate::job::Progress;
use crate::polish::compass_search;

/// Options of the direct-transfer search.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DirectOptions {
    /// Half-width of the launch period around the tour's launch, days.
    pub window_days: f64,
    /// Shortest TOF considered, days.
    pub tof_min_days: f64,
    /// Longest TOF considered, days.
    pub tof_max_days: f64,
    /// What ranks the transfers.
    pub measure: Objective,
    /// Grid cells per axis before the local polish.
    pub grid: usize,
}

impl DirectOptions {
    /// Defaults for a design: ±1 year, TOF from 1/10 of the tour's up to the tour's TOF plus 25%,
    /// delivered mass when the design has a launch vehicle, else launch v∞ + Δv.
    pub fn for_design(d: &MissionDesign) -> Self {
        let tour = d.total_tof_days();
        let tour = if tour.is_finite() {
            tour.max(30.0)
        } else {
            365.0
        };
        DirectOptions {
            window_days: 365.25,
            tof_min_days: (tour * 0.1).max(20.0),
            tof_max_days: tour * 1.25,
            measure: if d.launch_vehicle.is_some() {
                Objective::DeliveredMass
            } else {
                Objective::TotalDvWithLaunchVinf
            },
            grid: 240,
        }
    }
}

/// The best direct transfer and how the tour compares with it.
#[derive(Clone, Debug)]
pub struct DirectComparison {
    /// The direct design (launch and arrival stops only, same spacecraft, vehicle and goal).
    pub direct: MissionDesign,
    /// Its prepared tour.
    pub direct_tour: PreparedTour,
    /// Its evaluation.
    pub direct_eval: Evaluation,
    /// The tour's prepared form.
    pub tour: PreparedTour,
    /// The tour's evaluation.
    pub tour_eval: Evaluation,
    /// Hohmann figures between the two bodies' mean distances.
    pub hohmann: Hohmann,
    /// The ranking objective.
    pub measure: Objective,
    /// Lambert arcs evaluated.
    pub evaluations: u64,
    /// The design's launch limits (C3, declination band) the direct transfer breaks: empty
    /// unless no direct transfer in the launch period meets them.
    pub launch_breaches: Vec<Warning>,
}

impl DirectComparison {
    /// One sentence: "The tour takes 3.1 years longer and delivers 1.8 t more than the best direct
    /// transfer."
    pub fn summary(&self) -> String {
        let dt_years =
            (self.tour_eval.total_tof_days() - self.direct_eval.total_tof_days()) / 365.25;
        let time = if dt_years.abs() < 0.05 {
            "takes about as long".to_string()
        } else if dt_years > 0.0 {
            format!("takes {:.1} years longer", dt_years)
        } else {
            format!("is {:.1} years shorter", -dt_years)
        };
        let gain = match (
            self.tour_eval.ledger.delivered_mass_kg,
            self.direct_eval.ledger.delivered_mass_kg,
        ) {
            (Some(a), Some(b)) if self.measure == Objective::DeliveredMass => {
                let d = a - b;
                if d >= 0.0 {
                    format!("delivers {} more", mass_text(d))
                } else {
                    format!("delivers {} less", mass_text(-d))
                }
            }
            _ => {
                let a = self.tour_eval.launch.vinf + self.tour_eval.ledger.total_dv_km_s;
                let b = self.direct_eval.launch.vinf + self.direct_eval.ledger.total_dv_km_s;
                let dc3 = self.tour_eval.launch.c3 - self.direct_eval.launch.c3;
                if self.measure == Objective::LaunchC3 {
                    if dc3 <= 0.0 {
                        format!("needs {:.1} km²/s² less C3", -dc3)
                    } else {
                        format!("needs {:.1} km²/s² more C3", dc3)
                    }
                } else if a <= b {
                    format!("saves {:.2} km/s of launch v∞ + Δv", b - a)
                } else {
                    format!("costs {:.2} km/s more launch v∞ + Δv", a - b)
                }
            }
        };
        format!("The tour {time} and {gain} than the best direct transfer.")
    }

    /// When no direct transfer in the launch period meets the design's launch limits, a
    /// sentence that says so and names what the one shown breaks.
    pub fn limits_note(&self) -> Option<String> {
        (!self.launch_breaches.is_empty()).then(|| {
            format!(
                "No direct transfer in the launch period meets the design's launch limits; the \
                 best one breaks: {}.",
                self.launch_breaches
                    .iter()
                    .map(tourwright_mission::score::breach_text)
                    .collect::<Vec<_>>()
                    .join("; ")
            )
        })
    }
}

fn mass_text(kg: f64) -> String {
    if kg >= 1000.0 {
        format!("{:.1} t", kg / 1000.0)
    } else {
        format!("{kg:.0} kg")
    }
}

/// The score of a direct arc: the objective plus a steep price for breaking the design's launch
/// limits (C3, declination band), so that any arc within them ranks ahead of every arc outside.
fn penalised(measure: Objective, e: &Evaluation, launch: &LaunchLimits) -> f64 {
    let mut s = measure.value(e);
    if let Some(m) = launch.max_c3_km2_s2 {
        if e.launch.c3 > m {
            s += 1e3 + (e.launch.c3 - m);
        }
    }
    let (lo, hi) = (
        launch.min_dla_deg.unwrap_or(-90.0),
        launch.max_dla_deg.unwrap_or(90.0),
    );
    let out = (lo - e.launch.dla_deg).max(e.launch.dla_deg - hi);
    if out > 0.0 {
        s += 1e3 + out;
    }
    s
}

/// Find the best direct transfer for a design and compare. The grid runs on all cores; cancelling
/// `progress` stops it within a row, and the polish within one step. `None` when the design cannot
/// be prepared, the search was cancelled, or nothing was found.
pub fn compare(
    d: &MissionDesign,
    opts: &DirectOptions,
    progress: &Progress,
) -> Option<DirectComparison> {
    let tour = PreparedTour::prepare(d).ok()?;
    let mut tour_eval = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut tour_eval);
    let n = tour.stops.len();
    let t_launch = tour.stops[0].t;
    let g = opts.grid.clamp(8, 2000);
    let (t_lo, t_hi) = (-opts.window_days.abs(), opts.window_days.abs());
    let f_lo = opts.tof_min_days.max(1.0);
    let f_hi = opts.tof_max_days.max(f_lo + 1.0);
    if !(t_hi.is_finite() && f_hi.is_finite()) {
        return None;
    }
    let mut template = PreparedTour::two_stop(
        &tour.model,
        tour.stops[0].body.clone(),
        tour.stops[n - 1].body.clone(),
        t_launch,
        t_launch.plus_days(f_lo),
        Default::default(),
    );
    template.arrival = tour.arrival;
    template.spacecraft = tour.spacecraft.clone();
    template.vehicle = tour.vehicle.clone();
    template.launch = tour.launch;
    let limits = tour.launch;
    let measure = opts.measure;
    let score_at = |work: &mut (PreparedTour, Evaluation), dt0: f64, tof: f64| -> f64 {
        let t0 = t_launch.plus_days(dt0);
        work.0.stops[0].t = t0;
        work.0.stops[1].t = t0.plus_days(tof);
        evaluate(&work.0, &EvalOptions::SEARCH, &mut work.1);
        penalised(measure, &work.1, &limits)
    };
    progress.set_total(g as u64);
    let at = |i: usize, j: usize| {
        (
            t_lo + (t_hi - t_lo) * i as f64 / (g - 1) as f64,
            f_lo + (f_hi - f_lo) * j as f64 / (g - 1) as f64,
        )
    };
    // Full grid, one row of departure dates per task.
    let grid: Vec<Vec<f64>> = (0..g)
        .into_par_iter()
        .map_init(
            || (template.clone(), Evaluation::default()),
            |work, i| {
                let row = (0..g)
                    .map(|j| {
                        if progress.is_cancelled() {
                            return f64::INFINITY;
                        }
                        let (x, y) = at(i, j);
                        progress.count_evals(1);
                        score_at(work, x, y)
                    })
                    .collect();
                progress.add(1);
                row
            },
        )
        .collect();
    if progress.is_cancelled() {
        return None;
    }
    // Polish from the best local minima of the grid (one per basin: launch opportunities and
    // short/long-way arcs are separate basins).
    let mut cands: Vec<(f64, usize, usize)> = Vec::new();
    for i in 0..g {
        for j in 0..g {
            let v = grid[i][j];
            if !v.is_finite() {
                continue;
            }
            let is_min = (-1i64..=1).all(|di| {
                (-1i64..=1).all(|dj| {
                    let (a, b) = (i as i64 + di, j as i64 + dj);
                    (di == 0 && dj == 0)
                        || a < 0
                        || b < 0
                        || a as usize >= g
                        || b as usize >= g
                        || grid[a as usize][b as usize] >= v
                })
            });
            if is_min {
                cands.push((v, i, j));
            }
        }
    }
    cands.sort_by(|a, b| a.0.total_cmp(&b.0));
    let steps = [(t_hi - t_lo) / g as f64, (f_hi - f_lo) / g as f64];
    let best = cands
        .par_iter()
        .take(8)
        .map(|c| {
            let mut work = (template.clone(), Evaluation::default());
            let mut f = |x: &[f64]| {
                if progress.is_cancelled() {
                    return f64::INFINITY;
                }
                progress.count_evals(1);
                score_at(&mut work, x[0], x[1])
            };
            let (x0, y0) = at(c.1, c.2);
            compass_search(
                &mut f,
                &[x0, y0],
                &[t_lo, f_lo],
                &[t_hi, f_hi],
                &steps,
                1e-4,
                400,
            )
        })
        .min_by(|a, b| a.1.total_cmp(&b.1))?;
    if progress.is_cancelled() || !best.1.is_finite() {
        return None;
    }
    let (t0, t1) = (
        t_launch.plus_days(best.0[0]),
        t_launch.plus_days(best.0[0] + best.0[1]),
    );
    let direct = direct_design(d, t0, t1, tour.stops[0].scale);
    let direct_tour = PreparedTour::prepare(&direct).ok()?;
    let mut direct_eval = Evaluation::default();
    evaluate(&direct_tour, &EvalOptions::default(), &mut direct_eval);
    let launch_breaches = direct_eval
        .warnings
        .iter()
        .filter(|w| {
            matches!(
                w,
                Warning::C3OverLimit { .. } | Warning::DlaOutOfRange { .. }
            )
        })
        .cloned()
        .collect();
    let hohmann = hohmann(
        tour.stops[0].body.mean_distance_km(),
        tour.stops[n - 1].body.mean_distance_km(),
    );
    Some(DirectComparison {
        direct,
        direct_tour,
        direct_eval,
        tour,
        tour_eval,
        hohmann,
        measure,
        evaluations: progress.evaluations(),
        launch_breaches,
    })
}

fn direct_design(
    d: &MissionDesign,
    t0: Tdb,
    t1: Tdb,
    scale: tourwright_astro::time::TimeScale,
) -> MissionDesign {
    use tourwright_astro::time::Epoch;
    let first = &d.stops[0];
    let last = &d.stops[d.stops.len() - 1];
    let mut out = d.clone();
    out.name = format!("{} — direct", d.name);
    out.stops = vec![
        Stop {
            body: first.body.clone(),
            epoch: Epoch::from_tdb(t0, scale),
            swingby: Default::default(),
        },
        Stop {
            body: last.body.clone(),
            epoch: Epoch::from_tdb(t1, scale),
            swingby: Default::default(),
        },
    ];
    out.legs.clear();
    out.search.leg_tof.clear();
    out
}
