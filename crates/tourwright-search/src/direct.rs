//! The direct-transfer baseline: the best single Lambert arc from the launch body to the arrival
//! body in a launch period around the tour's launch, by the designer's measure, plus the idealised
//! Hohmann figures; and the side-by-side comparison with the tour.

use rayon::prelude::*;

use tourwright_astro::constants::DAY_S;
use tourwright_astro::ephemeris::MeanElements;
use tourwright_astro::time::Epoch;
pub use tourwright_astro::transfer::{Hohmann, hohmann};

use tourwright_mission::design::{MissionDesign, ResolvedBody, Stop};
use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate_into};

/// How transfers are ranked.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
pub enum Measure {
    /// Launch v∞ plus every spacecraft Δv, km/s (the launch counted as a Δv).
    #[default]
    TotalDv,
    /// Mass delivered with the design's launch vehicle, kg (maximised).
    DeliveredMass,
    /// Launch C3, km²/s².
    C3,
}

impl Measure {
    /// Score (smaller is better) of an evaluation under this measure.
    pub fn score(self, e: &Evaluation) -> f64 {
        if !e.complete {
            return f64::INFINITY;
        }
        match self {
            Measure::TotalDv => e.launch.vinf + e.ledger.total_dv_km_s,
            Measure::DeliveredMass => -e.ledger.delivered_mass_kg.unwrap_or(0.0),
            Measure::C3 => e.launch.c3,
        }
    }
    /// Label for tables.
    pub fn label(self) -> &'static str {
        match self {
            Measure::TotalDv => "launch v∞ + spacecraft Δv",
            Measure::DeliveredMass => "delivered mass",
            Measure::C3 => "launch C3",
        }
    }
}

/// Options of the direct-transfer search.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DirectOptions {
    /// Half-width of the launch period around the tour's launch, days.
    pub window_days: f64,
    /// Shortest TOF considered, days.
    pub tof_min_days: f64,
    /// Longest TOF considered, days.
    pub tof_max_days: f64,
    /// The measure.
    pub measure: Measure,
    /// Grid cells per axis before the local polish.
    pub grid: usize,
}

impl DirectOptions {
    /// Defaults for a design: ±1 year, TOF from 1/10 of the tour's up to the tour's TOF plus 25%,
    /// delivered mass when the design has a launch vehicle, else total Δv.
    pub fn for_design(d: &MissionDesign) -> Self {
        let tour = d.total_tof_days().max(30.0);
        DirectOptions {
            window_days: 365.25,
            tof_min_days: (tour * 0.1).max(20.0),
            tof_max_days: tour * 1.25,
            measure: if d.launch_vehicle.is_some() {
                Measure::DeliveredMass
            } else {
                Measure::TotalDv
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
    /// Its evaluation.
    pub direct_eval: Evaluation,
    /// The tour's evaluation.
    pub tour_eval: Evaluation,
    /// Hohmann figures.
    pub hohmann: Hohmann,
    /// The measure used.
    pub measure: Measure,
    /// Lambert arcs evaluated.
    pub evaluations: usize,
}

impl DirectComparison {
    /// One sentence: "the tour takes 3.1 years longer and delivers 1.8 t more".
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
            (Some(a), Some(b)) if self.measure == Measure::DeliveredMass => {
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
                if self.measure == Measure::C3 {
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
}

fn mass_text(kg: f64) -> String {
    if kg >= 1000.0 {
        format!("{:.1} t", kg / 1000.0)
    } else {
        format!("{kg:.0} kg")
    }
}

fn direct_design(d: &MissionDesign, t0: Epoch, tof_days: f64) -> MissionDesign {
    let first = &d.stops[0];
    let last = d.stops.last().expect("at least two stops");
    let mut out = d.clone();
    out.name = format!("{} — direct", d.name);
    out.stops = vec![
        Stop {
            body: first.body.clone(),
            epoch: t0,
            swingby: Default::default(),
        },
        Stop {
            body: last.body.clone(),
            epoch: t0.plus_days(tof_days),
            swingby: Default::default(),
        },
    ];
    out.legs.clear();
    out.search.leg_tof.clear();
    out
}

fn mean_distance(d: &MissionDesign, b: &ResolvedBody) -> f64 {
    match b {
        ResolvedBody::Planet(p) => MeanElements::of(*p).a_km(),
        ResolvedBody::User(i, _) => {
            let e = &d.user_bodies[*i].elements;
            let q = e.q_au * tourwright_astro::constants::AU_KM;
            if e.e < 1.0 { q / (1.0 - e.e) } else { q }
        }
    }
}

/// Compass (pattern) search on a box: a derivative-free local polish that never leaves the box.
/// `f` returns the score (smaller is better). Returns the best point and value.
pub fn compass_search<F: FnMut(&[f64]) -> f64>(
    f: &mut F,
    x0: &[f64],
    lo: &[f64],
    hi: &[f64],
    step0: &[f64],
    min_step_frac: f64,
    max_evals: usize,
) -> (Vec<f64>, f64) {
    let n = x0.len();
    let mut x = x0.to_vec();
    let mut fx = f(&x);
    let mut step = step0.to_vec();
    let mut evals = 1;
    let mut trial = x.clone();
    while evals < max_evals {
        let mut improved = false;
        for i in 0..n {
            for sgn in [1.0, -1.0] {
                trial.copy_from_slice(&x);
                trial[i] = (x[i] + sgn * step[i]).clamp(lo[i], hi[i]);
                if trial[i] == x[i] {
                    continue;
                }
                let ft = f(&trial);
                evals += 1;
                if ft < fx {
                    fx = ft;
                    x.copy_from_slice(&trial);
                    improved = true;
                    break;
                }
            }
        }
        if !improved {
            let mut all_small = true;
            for i in 0..n {
                step[i] *= 0.5;
                if step[i] > step0[i] * min_step_frac {
                    all_small = false;
                }
            }
            if all_small {
                break;
            }
        }
    }
    (x, fx)
}

/// Find the best direct transfer for a design and compare. Runs the grid on all cores.
pub fn compare(d: &MissionDesign, opts: &DirectOptions) -> Option<DirectComparison> {
    let n = d.stops.len();
    if n < 2 {
        return None;
    }
    let tour_eval = tourwright_mission::evaluate(d);
    let t_launch = d.stops[0].epoch;
    let g = opts.grid.max(8);
    let t_lo = -opts.window_days;
    let t_hi = opts.window_days;
    let (f_lo, f_hi) = (
        opts.tof_min_days,
        opts.tof_max_days.max(opts.tof_min_days + 1.0),
    );
    let eval_opts = EvalOptions { samples_per_leg: 0 };
    // The template design is mutated in place per evaluation (epochs only): no allocation per
    // Lambert solve.
    let template = direct_design(d, t_launch, f_lo);
    let score_at = |work: &mut (MissionDesign, Evaluation), dt0: f64, tof: f64| -> f64 {
        let t0 = t_launch.plus_days(dt0);
        work.0.stops[0].epoch = t0;
        work.0.stops[1].epoch = t0.plus_days(tof);
        evaluate_into(&work.0, &eval_opts, &mut work.1);
        let s = opts.measure.score(&work.1);
        // Hard limit: C3 must respect the design's maximum.
        match d.launch.max_c3_km2_s2 {
            Some(m) if work.1.launch.c3 > m => s + 1e3 + (work.1.launch.c3 - m),
            _ => s,
        }
    };
    // Full grid, rows of departure dates.
    let grid: Vec<Vec<f64>> = (0..g)
        .into_par_iter()
        .map_init(
            || (template.clone(), Evaluation::default()),
            |work, i| {
                let dt0 = t_lo + (t_hi - t_lo) * i as f64 / (g - 1) as f64;
                (0..g)
                    .map(|j| score_at(work, dt0, f_lo + (f_hi - f_lo) * j as f64 / (g - 1) as f64))
                    .collect()
            },
        )
        .collect();
    // Polish from the best local minima of the grid (one per basin: launch opportunities and
    // short/long-way arcs are separate basins).
    let mut cands: Vec<(f64, usize, usize)> = Vec::new();
    for i in 0..g {
        for j in 0..g {
            let v = grid[i][j];
            if !v.is_finite() {
                continue;
            }
            let mut is_min = true;
            for (di, dj) in [
                (-1i64, -1i64),
                (-1, 0),
                (-1, 1),
                (0, -1),
                (0, 1),
                (1, -1),
                (1, 0),
                (1, 1),
            ] {
                let (a, b) = (i as i64 + di, j as i64 + dj);
                if a >= 0
                    && b >= 0
                    && (a as usize) < g
                    && (b as usize) < g
                    && grid[a as usize][b as usize] < v
                {
                    is_min = false;
                    break;
                }
            }
            if is_min {
                cands.push((v, i, j));
            }
        }
    }
    cands.sort_by(|a, b| a.0.total_cmp(&b.0));
    let steps = [(t_hi - t_lo) / g as f64, (f_hi - f_lo) / g as f64];
    let at = |i: usize, j: usize| {
        (
            t_lo + (t_hi - t_lo) * i as f64 / (g - 1) as f64,
            f_lo + (f_hi - f_lo) * j as f64 / (g - 1) as f64,
        )
    };
    let best = cands
        .par_iter()
        .take(8)
        .map(|c| {
            let mut work = (template.clone(), Evaluation::default());
            let mut f = |x: &[f64]| score_at(&mut work, x[0], x[1]);
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
    let direct = direct_design(d, t_launch.plus_days(best.0[0]), best.0[1]);
    let direct_eval = tourwright_mission::evaluate(&direct);
    let a = d.resolve(&d.stops[0].body)?;
    let b = d.resolve(&d.stops[n - 1].body)?;
    let hohmann = hohmann(mean_distance(d, &a), mean_distance(d, &b));
    Some(DirectComparison {
        direct,
        direct_eval,
        tour_eval,
        hohmann,
        measure: opts.measure,
        evaluations: g * g + 8 * 400,
    })
}
