//! Window maps (porkchop plots): a grid over departure date × arrival date (or TOF) for a transfer
//! between two bodies, with C3, departure and arrival v∞, total Δv for the arrival goal and TOF.
//! Each cell is a two-stop prepared tour scored by the one `evaluate`; the bodies are resolved
//! once, before the grid.

use rayon::prelude::*;

use tourwright_astro::time::{Epoch, Tdb};
use tourwright_mission::design::{ArrivalGoal, LegOptions, MissionDesign};
use tourwright_mission::evaluate::{EvalOptions, Evaluation, evaluate};
use tourwright_mission::tour::{Catalog, PreparedTour, TourLeg};

use crate::job::Progress;

/// The second axis of a window map.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum SecondAxis {
    /// Arrival dates.
    Arrival(Epoch, Epoch),
    /// Time of flight, days.
    Tof(f64, f64),
}

/// What to map.
#[derive(Clone, Debug, PartialEq)]
pub struct WindowSpec {
    /// Departure body.
    pub from: String,
    /// Arrival body.
    pub to: String,
    /// Departure dates.
    pub depart: (Epoch, Epoch),
    /// Arrival dates or TOF.
    pub second: SecondAxis,
    /// Cells along departure.
    pub nx: usize,
    /// Cells along arrival / TOF.
    pub ny: usize,
    /// Revolutions and branch of the arcs (0 for the direct arc).
    pub leg: LegOptions,
    /// Arrival goal used for the total Δv.
    pub goal: ArrivalGoal,
}

/// Values of one cell (NaN-free: unsolved cells have `solved == false` and zeros).
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct Cell {
    /// C3, km²/s².
    pub c3: f64,
    /// Departure v∞, km/s.
    pub vinf_depart: f64,
    /// Arrival v∞, km/s.
    pub vinf_arrive: f64,
    /// Launch v∞ plus arrival Δv for the goal, km/s.
    pub total_dv: f64,
    /// TOF, days.
    pub tof_days: f64,
    /// False when no arc exists (arrival before departure, no such revolution count...).
    pub solved: bool,
}

/// Which cell value to show or minimise.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum Quantity {
    /// C3.
    #[default]
    C3,
    /// Departure v∞.
    VinfDepart,
    /// Arrival v∞.
    VinfArrive,
    /// Total Δv.
    TotalDv,
    /// TOF.
    Tof,
}

impl Quantity {
    /// All quantities, for menus.
    pub const ALL: [Quantity; 5] = [
        Quantity::C3,
        Quantity::VinfDepart,
        Quantity::VinfArrive,
        Quantity::TotalDv,
        Quantity::Tof,
    ];
    /// Label with unit.
    pub fn label(self) -> &'static str {
        match self {
            Quantity::C3 => "C3 (km²/s²)",
            Quantity::VinfDepart => "departure v∞ (km/s)",
            Quantity::VinfArrive => "arrival v∞ (km/s)",
            Quantity::TotalDv => "launch v∞ + arrival Δv (km/s)",
            Quantity::Tof => "TOF (days)",
        }
    }
    /// The value of a cell.
    pub fn of(self, c: &Cell) -> f64 {
        match self {
            Quantity::C3 => c.c3,
            Quantity::VinfDepart => c.vinf_depart,
            Quantity::VinfArrive => c.vinf_arrive,
            Quantity::TotalDv => c.total_dv,
            Quantity::Tof => c.tof_days,
        }
    }
}

/// A computed map. Cell (i, j) is departure i, second axis j, stored row-major by j.
#[derive(Clone, Debug, PartialEq)]
pub struct WindowMap {
    /// The specification.
    pub spec: WindowSpec,
    /// Departure epochs of the columns.
    pub depart: Vec<Tdb>,
    /// Second-axis values of the rows: arrival MJD2000 or TOF days.
    pub second: Vec<f64>,
    /// Cells, `ny` rows of `nx`.
    pub cells: Vec<Cell>,
}

impl WindowMap {
    /// The cell at column i, row j.
    pub fn cell(&self, i: usize, j: usize) -> &Cell {
        &self.cells[j * self.spec.nx + i]
    }
    /// Index (i, j) and value of the smallest solved value of a quantity.
    pub fn minimum(&self, q: Quantity) -> Option<(usize, usize, f64)> {
        let mut best: Option<(usize, usize, f64)> = None;
        for j in 0..self.spec.ny {
            for i in 0..self.spec.nx {
                let c = self.cell(i, j);
                if c.solved {
                    let v = q.of(c);
                    if best.is_none_or(|b| v < b.2) {
                        best = Some((i, j, v));
                    }
                }
            }
        }
        best
    }
    /// Departure and arrival epochs of a cell.
    pub fn epochs(&self, i: usize, j: usize) -> (Tdb, Tdb) {
        let t0 = self.depart[i];
        let t1 = match self.spec.second {
            SecondAxis::Arrival(..) => Tdb::from_mjd2000(self.second[j]),
            SecondAxis::Tof(..) => t0.plus_days(self.second[j]),
        };
        (t0, t1)
    }
    /// The grid as CSV (one line per cell).
    pub fn to_csv(&self) -> String {
        let mut rows = Vec::with_capacity(self.spec.nx * self.spec.ny);
        for j in 0..self.spec.ny {
            for i in 0..self.spec.nx {
                let c = self.cell(i, j);
                let (a, b) = self.epochs(i, j);
                rows.push(vec![
                    a.to_date_utc(),
                    b.to_date_utc(),
                    format!("{:.4}", c.tof_days),
                    format!("{:.6}", c.c3),
                    format!("{:.6}", c.vinf_depart),
                    format!("{:.6}", c.vinf_arrive),
                    format!("{:.6}", c.total_dv),
                    c.solved.to_string(),
                ]);
            }
        }
        tourwright_mission::report::csv_text(
            &[
                "depart_utc",
                "arrive_utc",
                "tof_days",
                "c3_km2_s2",
                "vinf_depart_km_s",
                "vinf_arrive_km_s",
                "total_dv_km_s",
                "solved",
            ],
            rows,
        )
    }
}

/// Why a map could not be computed.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum WindowError {
    /// A body name is unknown.
    #[error("unknown body '{0}'")]
    UnknownBody(String),
    /// The ranges are empty, reversed or not numbers.
    #[error("{0}")]
    Range(&'static str),
    /// The design's user bodies cannot be resolved.
    #[error("{0}")]
    Design(String),
    /// Cancelled.
    #[error("cancelled")]
    Cancelled,
}

/// Compute a map on all cores. `base` supplies user bodies and the ephemeris model; progress
/// counts rows; cancellation stops within a row.
pub fn compute(
    base: &MissionDesign,
    spec: &WindowSpec,
    progress: &Progress,
) -> Result<WindowMap, WindowError> {
    let nx = spec.nx.clamp(2, 4000);
    let ny = spec.ny.clamp(2, 4000);
    let catalog = Catalog::of(base).map_err(|e| WindowError::Design(e.to_string()))?;
    let body = |n: &str| {
        catalog
            .body(n)
            .ok_or_else(|| WindowError::UnknownBody(n.to_string()))
    };
    let (from, to) = (body(&spec.from)?, body(&spec.to)?);
    let (d0, d1) = (spec.depart.0.tdb(), spec.depart.1.tdb());
    if !(d1.0 > d0.0) {
        return Err(WindowError::Range(
            "departure range: the end must be after the start",
        ));
    }
    match spec.second {
        SecondAxis::Arrival(a, b) if !(b.tdb().0 > a.tdb().0) => {
            return Err(WindowError::Range(
                "arrival range: the end must be after the start",
            ));
        }
        SecondAxis::Tof(a, b) if !(a > 0.0 && b > a && b.is_finite()) => {
            return Err(WindowError::Range("TOF range must have 0 < min < max"));
        }
        _ => {}
    }
    let depart: Vec<Tdb> = (0..nx)
        .map(|i| {
            let f = i as f64 / (nx - 1) as f64;
            Tdb(d0.0 + f * (d1.0 - d0.0))
        })
        .collect();
    let second: Vec<f64> = (0..ny)
        .map(|j| {
            let f = j as f64 / (ny - 1) as f64;
            match spec.second {
                SecondAxis::Arrival(a, b) => {
                    let (a, b) = (a.tdb().mjd2000(), b.tdb().mjd2000());
                    a + f * (b - a)
                }
                SecondAxis::Tof(a, b) => a + f * (b - a),
            }
        })
        .collect();
    progress.set_total(ny as u64);
    let mut template = PreparedTour::two_stop(
        catalog.model(),
        from,
        to,
        d0,
        d0.plus_days(100.0),
        TourLeg {
            revs: spec.leg.revolutions,
            branch: spec.leg.branch,
            direction: spec.leg.direction,
            dsm: None,
        },
    );
    template.arrival = spec.goal;
    let opts = EvalOptions::SEARCH;
    let rows: Option<Vec<Vec<Cell>>> = (0..ny)
        .into_par_iter()
        .map_init(
            || (template.clone(), Evaluation::default()),
            |(d, e), j| {
                if progress.is_cancelled() {
                    return None;
                }
                let mut row = Vec::with_capacity(nx);
                for t0 in depart.iter() {
                    let t1 = match spec.second {
                        SecondAxis::Arrival(..) => Tdb::from_mjd2000(second[j]),
                        SecondAxis::Tof(..) => t0.plus_days(second[j]),
                    };
                    let mut c = Cell {
                        tof_days: t1.days() - t0.days(),
                        ..Default::default()
                    };
                    if t1.0 > t0.0 {
                        d.stops[0].t = *t0;
                        d.stops[1].t = t1;
                        evaluate(d, &opts, e);
                        if e.complete {
                            c.c3 = e.launch.c3;
                            c.vinf_depart = e.launch.vinf;
                            c.vinf_arrive = e.arrival.vinf;
                            c.total_dv = e.launch.vinf + e.arrival.dv_km_s;
                            c.solved = true;
                        }
                    }
                    row.push(c);
                }
                progress.count_evals(nx as u64);
                progress.add(1);
                Some(row)
            },
        )
        .collect();
    let cells = rows
        .ok_or(WindowError::Cancelled)?
        .into_iter()
        .flatten()
        .collect();
    Ok(WindowMap {
        spec: WindowSpec {
            nx,
            ny,
            ..spec.clone()
        },
        depart,
        second,
        cells,
    })
}
