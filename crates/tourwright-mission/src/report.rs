//! One report, many renderings: the event table (one row per stop) and the ledger (one row per
//! manoeuvre, then the totals) are built here once from a prepared tour and its evaluation, then
//! rendered as text (CLI), CSV (exports), JSON (CLI) and a grid (the GUI ledger).

use std::fmt::Write as _;

use serde_json::{Map, Value, json};

use crate::evaluate::{Evaluation, StopKind};
use crate::rules::shown;
use crate::tour::PreparedTour;

/// A column: its machine key (CSV header, JSON field), its header for people, and how many
/// decimals numbers get.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Column {
    /// Machine key with the unit in it, e.g. `vinf_in_km_s`.
    pub key: &'static str,
    /// Header for people, e.g. `v∞ in (km/s)`.
    pub header: &'static str,
    /// Decimals in text and in the GUI.
    pub decimals: usize,
}

/// One cell.
#[derive(Clone, Debug, PartialEq)]
pub enum Cell {
    /// Words.
    Text(String),
    /// A number, or nothing when the figure does not apply or cannot be computed.
    Num(Option<f64>),
}

impl Cell {
    /// The cell for people: text, a number to the column's decimals, or an em dash.
    pub fn display(&self, decimals: usize) -> String {
        match self {
            Cell::Text(t) => t.clone(),
            Cell::Num(Some(x)) => format!("{x:.decimals$}"),
            Cell::Num(None) => "—".into(),
        }
    }

    /// The number, if any.
    pub fn num(&self) -> Option<f64> {
        match self {
            Cell::Num(x) => *x,
            Cell::Text(_) => None,
        }
    }
}

/// A table of rows under columns.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct Table {
    /// Columns.
    pub columns: Vec<Column>,
    /// Rows, each as long as `columns`.
    pub rows: Vec<Vec<Cell>>,
}

impl Table {
    /// The same rows with only some columns, in the order given.
    pub fn select(&self, columns: &[usize]) -> Table {
        Table {
            columns: columns
                .iter()
                .filter_map(|&c| self.columns.get(c).copied())
                .collect(),
            rows: self
                .rows
                .iter()
                .map(|r| columns.iter().filter_map(|&c| r.get(c).cloned()).collect())
                .collect(),
        }
    }

    /// Aligned text with a header line (numbers right-aligned).
    pub fn to_text(&self) -> String {
        let cells: Vec<Vec<String>> = self
            .rows
            .iter()
            .map(|r| {
                r.iter()
                    .zip(&self.columns)
                    .map(|(c, col)| c.display(col.decimals))
                    .collect()
            })
            .collect();
        let widths: Vec<usize> = self
            .columns
            .iter()
            .enumerate()
            .map(|(i, c)| {
                cells
                    .iter()
                    .map(|r| r[i].chars().count())
                    .chain(std::iter::once(c.header.chars().count()))
                    .max()
                    .unwrap_or(0)
            })
            .collect();
        let mut s = String::new();
        let pad = |s: &mut String, text: &str, w: usize, right: bool| {
            let n = w.saturating_sub(text.chars().count());
            if right {
                s.push_str(&" ".repeat(n));
                s.push_str(text);
            } else {
                s.push_str(text);
                s.push_str(&" ".repeat(n));
            }
        };
        for (i, c) in self.columns.iter().enumerate() {
            if i > 0 {
                s.push_str("  ");
            }
            pad(&mut s, c.header, widths[i], false);
        }
        s.push('\n');
        for (r, row) in cells.iter().enumerate() {
            for (i, text) in row.iter().enumerate() {
                if i > 0 {
                    s.push_str("  ");
                }
                let right = matches!(self.rows[r][i], Cell::Num(_));
                pad(&mut s, text, widths[i], right);
            }
            s.push('\n');
        }
        s
    }

    /// CSV with the machine keys as header; numbers at full precision, absent figures empty.
    pub fn to_csv(&self) -> String {
        csv_text(
            &self.columns.iter().map(|c| c.key).collect::<Vec<_>>(),
            self.rows.iter().map(|row| {
                row.iter()
                    .map(|c| match c {
                        Cell::Text(t) => t.clone(),
                        Cell::Num(Some(x)) => format!("{x}"),
                        Cell::Num(None) => String::new(),
                    })
                    .collect::<Vec<_>>()
            }),
        )
    }

    /// Tab-separated text with the human headers (for the clipboard).
    pub fn to_tsv(&self) -> String {
        let mut s = self
            .columns
            .iter()
            .map(|c| c.header)
            .collect::<Vec<_>>()
            .join("\t");
        s.push('\n');
        for row in &self.rows {
            let line: Vec<String> = row
                .iter()
                .zip(&self.columns)
                .map(|(c, col)| match c {
                    Cell::Num(None) => String::new(),
                    other => other.display(col.decimals),
                })
                .collect();
            let _ = writeln!(s, "{}", line.join("\t"));
        }
        s
    }

    /// An array of objects keyed by the machine keys; absent figures are `null`.
    pub fn to_json(&self) -> Value {
        Value::Array(
            self.rows
                .iter()
                .map(|row| {
                    let mut m = Map::new();
                    for (c, col) in row.iter().zip(&self.columns) {
                        m.insert(
                            col.key.to_string(),
                            match c {
                                Cell::Text(t) => Value::String(t.clone()),
                                Cell::Num(x) => json!(x),
                            },
                        );
                    }
                    Value::Object(m)
                })
                .collect(),
        )
    }
}

/// CSV text (RFC 4180, through the `csv` crate: fields quoted when they need it) of a header
/// and rows. Every CSV the program writes goes through here.
pub fn csv_text<R, S>(header: &[&str], rows: impl IntoIterator<Item = R>) -> String
where
    R: IntoIterator<Item = S>,
    S: AsRef<[u8]>,
{
    let mut w = csv::WriterBuilder::new()
        .flexible(true)
        .from_writer(Vec::with_capacity(4096));
    // Writing to memory cannot fail; a row that could is skipped rather than panicking.
    let _ = w.write_record(header);
    for r in rows {
        let _ = w.write_record(r);
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}

const fn col(key: &'static str, header: &'static str, decimals: usize) -> Column {
    Column {
        key,
        header,
        decimals,
    }
}

/// Appended to the `kind` cell of a stop the spacecraft does not reach (a shaped swing-by before
/// it misses its next body); such a row keeps its planned date and loses its figures.
pub const NOT_REACHED: &str = " (not reached)";

/// The `kind` cell of a deep-space manoeuvre's row in the event table.
pub const DSM_KIND: &str = "DSM";

/// Columns of the event table.
pub const EVENT_COLUMNS: [Column; 21] = [
    col("stop", "#", 0),
    col("kind", "stop", 0),
    col("body", "body", 0),
    col("epoch_utc", "date (UTC)", 0),
    col("mjd2000", "MJD2000", 3),
    col("vinf_in_km_s", "v∞ in (km/s)", 3),
    col("vinf_out_km_s", "v∞ out (km/s)", 3),
    col("periapsis_altitude_km", "altitude (km)", 0),
    col("turn_deg", "turn (°)", 1),
    col("powered_dv_km_s", "powered Δv (km/s)", 3),
    col("b_t_km", "B·T (km)", 0),
    col("b_r_km", "B·R (km)", 0),
    col("aim_deg", "aim (°)", 1),
    col("speed_before_km_s", "speed before (km/s)", 3),
    col("speed_after_km_s", "speed after (km/s)", 3),
    col("energy_before_km2_s2", "energy before (km²/s²)", 2),
    col("energy_after_km2_s2", "energy after (km²/s²)", 2),
    col("energy_gain_km2_s2", "energy gain (km²/s²)", 2),
    col("dv_km_s", "Δv (km/s)", 3),
    col("mass_after_kg", "mass (kg)", 0),
    col("sun_distance_au", "r (AU)", 3),
];

/// Indices into [`EVENT_COLUMNS`] of the compact view the GUI ledger shows.
pub const LEDGER_VIEW_COLUMNS: [usize; 11] = [0, 1, 2, 3, 5, 6, 7, 8, 18, 17, 19];

/// The event table: one row per stop and, between them, one per deep-space manoeuvre (kind
/// [`DSM_KIND`], no stop number). Figures that do not apply to a row are absent.
pub fn events(tour: &PreparedTour, e: &Evaluation) -> Table {
    let n = e.stops.len().min(tour.stops.len());
    let unreached = e.first_unreached().unwrap_or(usize::MAX);
    let mut rows = Vec::with_capacity(n + e.legs.len());
    for k in 0..n {
        let mut row = stop_row(tour, e, k, n);
        if k >= unreached {
            not_reached(&mut row);
        }
        rows.push(row);
        if let Some(d) = e.legs.get(k).and_then(|l| l.dsm.as_ref()) {
            let mut row = dsm_row(tour, k, d);
            if k >= unreached {
                not_reached(&mut row);
            }
            rows.push(row);
        }
    }
    Table {
        columns: EVENT_COLUMNS.to_vec(),
        rows,
    }
}

/// A row of a stop (or manoeuvre) that is not reached: the kind says so; the number, body, date
/// and the Sun distance of the planned stop stay; every flight figure is dropped.
fn not_reached(row: &mut [Cell]) {
    if let Some(Cell::Text(kind)) = row.get_mut(1) {
        kind.push_str(NOT_REACHED);
    }
    for (c, cell) in row.iter_mut().enumerate() {
        if !matches!(
            EVENT_COLUMNS[c].key,
            "stop" | "kind" | "body" | "epoch_utc" | "mjd2000"
        ) {
            *cell = Cell::Num(None);
        }
    }
}

/// True when a row of the event table is of a stop that is not reached.
pub fn is_unreached_row(row: &[Cell]) -> bool {
    matches!(row.get(1), Some(Cell::Text(t)) if t.ends_with(NOT_REACHED))
}

/// True for a manoeuvre's row of the event table.
pub fn is_dsm_row(row: &[Cell]) -> bool {
    matches!(row.get(1), Some(Cell::Text(t)) if t.strip_suffix(NOT_REACHED).unwrap_or(t) == DSM_KIND)
}

fn dsm_row(tour: &PreparedTour, k: usize, d: &crate::evaluate::DsmResult) -> Vec<Cell> {
    let num = |x: f64| Cell::Num(shown(x));
    let none = || Cell::Num(None);
    let leg = match (tour.stops.get(k), tour.stops.get(k + 1)) {
        (Some(a), Some(b)) => format!("leg {} ({}-{})", k + 1, a.body.letter(), b.body.letter()),
        _ => format!("leg {}", k + 1),
    };
    vec![
        none(),
        Cell::Text(DSM_KIND.into()),
        Cell::Text(leg),
        Cell::Text(d.t.to_iso_utc()),
        num(d.t.mjd2000()),
        none(),
        none(),
        none(),
        none(),
        none(),
        none(),
        none(),
        none(),
        num(d.v_before.norm()),
        num(d.v_after.norm()),
        num(d.energy_before),
        num(d.energy_after),
        num(d.energy_after - d.energy_before),
        num(d.dv_km_s),
        num(d.mass_after_kg),
        num(d.sun_distance_au()),
    ]
}

fn stop_row(tour: &PreparedTour, e: &Evaluation, k: usize, n: usize) -> Vec<Cell> {
    {
        {
            let s = &e.stops[k];
            let sw = s.swingby.filter(|_| s.kind == StopKind::SwingBy);
            let num = |x: f64| Cell::Num(shown(x));
            let opt = |x: Option<f64>| Cell::Num(x.and_then(shown));
            let arriving = k > 0;
            let leaving = k + 1 < n;
            vec![
                Cell::Num(Some((k + 1) as f64)),
                Cell::Text(s.kind.label().into()),
                Cell::Text(tour.stops[k].body.name.to_string()),
                Cell::Text(s.epoch.to_iso_utc()),
                num(s.epoch.mjd2000()),
                if arriving {
                    num(s.vinf_in.norm())
                } else {
                    Cell::Num(None)
                },
                if leaving {
                    num(s.vinf_out.norm())
                } else {
                    Cell::Num(None)
                },
                opt(sw.and_then(|w| w.altitude_km)),
                opt(sw.map(|w| w.turn_rad.to_degrees())),
                opt(sw.map(|w| w.powered_dv_km_s)),
                opt(sw.and_then(|w| w.bplane).map(|b| b.b_t)),
                opt(sw.and_then(|w| w.bplane).map(|b| b.b_r)),
                opt(sw.and_then(|w| w.bplane).map(|b| b.aim.to_degrees())),
                num(s.speed_before),
                num(s.speed_after),
                num(s.energy_before),
                num(s.energy_after),
                if s.kind == StopKind::SwingBy {
                    num(s.gain())
                } else {
                    Cell::Num(None)
                },
                num(s.dv_km_s),
                num(s.mass_after_kg),
                num(s.body_state.r.norm() / tourwright_astro::constants::AU_KM),
            ]
        }
    }
}

/// Columns of the ledger table.
pub const LEDGER_COLUMNS: [Column; 5] = [
    col("item", "item", 0),
    col("body", "body", 0),
    col("epoch_utc", "date (UTC)", 0),
    col("dv_km_s", "Δv (km/s)", 3),
    col("mass_after_kg", "mass (kg)", 1),
];

/// The ledger: the wet mass, each manoeuvre with the mass after it, then totals and margins.
pub fn ledger(tour: &PreparedTour, e: &Evaluation) -> Table {
    let mut rows = Vec::new();
    let text = |s: &str| Cell::Text(s.to_string());
    let n = e.stops.len().min(tour.stops.len());
    if n > 0 {
        rows.push(vec![
            text("wet mass at launch"),
            Cell::Text(tour.stops[0].body.name.to_string()),
            Cell::Text(e.stops[0].epoch.to_iso_utc()),
            Cell::Num(Some(0.0)),
            Cell::Num(shown(e.ledger.wet_mass_kg)),
        ]);
    }
    let reach = e.ledger.flown.map_or(n, |p| p.first_unreached.min(n));
    for k in 0..reach {
        let s = &e.stops[k];
        if k > 0 && s.dv_km_s > 0.0 {
            rows.push(vec![
                text(if s.kind == StopKind::Arrival {
                    "arrival manoeuvre"
                } else {
                    "powered swing-by"
                }),
                Cell::Text(tour.stops[k].body.name.to_string()),
                Cell::Text(s.epoch.to_iso_utc()),
                Cell::Num(shown(s.dv_km_s)),
                Cell::Num(shown(s.mass_after_kg)),
            ]);
        }
        if let Some(d) = e.legs.get(k).and_then(|l| l.dsm.as_ref()) {
            rows.push(vec![
                text("deep-space manoeuvre"),
                Cell::Text(format!("leg {}", k + 1)),
                Cell::Text(d.t.to_iso_utc()),
                Cell::Num(shown(d.dv_km_s)),
                Cell::Num(shown(d.mass_after_kg)),
            ]);
        }
    }
    let l = &e.ledger;
    if let Some(p) = l.flown {
        // The rest of the tour is never flown: its manoeuvres and totals are not shown.
        let row = |name: String, dv: Option<f64>, m: Option<f64>| {
            vec![
                Cell::Text(name),
                text(""),
                text(""),
                Cell::Num(dv.and_then(shown)),
                Cell::Num(m.and_then(shown)),
            ]
        };
        rows.push(row(
            format!(
                "Δv and mass up to the miss (stop {} on not reached)",
                p.first_unreached + 1
            ),
            Some(p.dv_km_s),
            Some(p.mass_kg),
        ));
        rows.push(row(
            "propellant needed (kg)".into(),
            None,
            Some(p.propellant_needed_kg),
        ));
        rows.push(row(
            "propellant margin (kg)".into(),
            None,
            Some(p.propellant_margin_kg),
        ));
        if let Some(m) = l.lv_margin_kg {
            rows.push(row("launch-vehicle margin (kg)".into(), None, Some(m)));
        }
        return Table {
            columns: LEDGER_COLUMNS.to_vec(),
            rows,
        };
    }
    let total = |name: &str, dv: Option<f64>, m: Option<f64>| {
        vec![
            text(name),
            text(""),
            text(""),
            Cell::Num(dv.and_then(shown)),
            Cell::Num(m.and_then(shown)),
        ]
    };
    rows.push(total(
        "total Δv and final mass",
        Some(l.total_dv_km_s),
        Some(l.final_mass_kg),
    ));
    rows.push(total(
        "propellant needed (kg)",
        None,
        Some(l.propellant_needed_kg),
    ));
    rows.push(total(
        "propellant margin (kg)",
        None,
        Some(l.propellant_margin_kg),
    ));
    if let Some(m) = l.lv_margin_kg {
        rows.push(total("launch-vehicle margin (kg)", None, Some(m)));
    }
    if let Some(m) = l.delivered_mass_kg {
        rows.push(total(
            "delivered mass with the launch vehicle (kg)",
            None,
            Some(m),
        ));
    }
    Table {
        columns: LEDGER_COLUMNS.to_vec(),
        rows,
    }
}

/// The one-line summary under the tables: Δv, propellant, masses, C3 and TOF.
pub fn summary_line(tour: &PreparedTour, e: &Evaluation) -> String {
    let l = &e.ledger;
    let f = |x: f64, p: usize| match shown(x) {
        Some(v) => format!("{v:.p$}"),
        None => "—".into(),
    };
    // A tour that misses a body: the flown part only, and say so.
    if let Some(p) = l.flown {
        return format!(
            "not reached from stop {} on · Δv up to the miss {} km/s · propellant {} of {} kg \
             (margin {} kg) · C3 {} km²/s²",
            p.first_unreached + 1,
            f(p.dv_km_s, 3),
            f(p.propellant_needed_kg, 0),
            f(tour.spacecraft.propellant_kg, 0),
            f(p.propellant_margin_kg, 0),
            f(e.launch.c3, 2),
        );
    }
    let mut s = format!(
        "Δv total {} km/s · propellant {} of {} kg (margin {} kg) · final {} kg",
        f(l.total_dv_km_s, 3),
        f(l.propellant_needed_kg, 0),
        f(tour.spacecraft.propellant_kg, 0),
        f(l.propellant_margin_kg, 0),
        f(l.final_mass_kg, 0)
    );
    if let Some(m) = l.delivered_mass_kg {
        let _ = write!(s, " · delivered with launch vehicle {} kg", f(m, 0));
    }
    let _ = write!(
        s,
        " · C3 {} km²/s² · TOF {} d",
        f(e.launch.c3, 2),
        f(e.total_tof_days(), 0)
    );
    s
}

/// The whole evaluation for machines (`eval --json`): the event table's stop rows as `stops`
/// (with the swing-by figures that are not table columns), the manoeuvres, launch, arrival, the
/// ledger, warnings and the caution. Keys carry their units.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct EvalReport {
    /// Design name.
    pub name: String,
    /// The sequence, e.g. `E-V-E-J`.
    pub sequence: String,
    /// The ephemeris model's name.
    pub ephemeris: String,
    /// True when every leg was solved.
    pub complete: bool,
    /// One per stop.
    pub stops: Vec<StopReport>,
    /// One per deep-space manoeuvre.
    pub dsms: Vec<DsmReport>,
    /// Launch figures.
    pub launch: LaunchReport,
    /// Arrival figures.
    pub arrival: ArrivalReport,
    /// Total time of flight, days.
    pub total_tof_days: Option<f64>,
    /// The Δv and mass budget.
    pub ledger: LedgerReport,
    /// Warnings in words.
    pub warnings: Vec<String>,
    /// The caution that goes with every figure.
    pub caution: &'static str,
}

/// One stop of [`EvalReport`]: the event table's columns (absent figures are `null`).
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct StopReport {
    /// Stop number, from 1.
    pub stop: usize,
    /// Launch, Swing-by or Arrival.
    pub kind: String,
    /// False for a stop the spacecraft does not reach (an earlier shaped swing-by misses its
    /// next body); its flight figures are then `null`.
    pub reached: bool,
    /// Body name.
    pub body: String,
    /// Epoch, ISO-8601 UTC.
    pub epoch_utc: String,
    /// Epoch, MJD2000 (TDB).
    pub mjd2000: Option<f64>,
    /// v∞ arriving, km/s.
    pub vinf_in_km_s: Option<f64>,
    /// v∞ leaving, km/s.
    pub vinf_out_km_s: Option<f64>,
    /// Periapsis altitude, km.
    pub periapsis_altitude_km: Option<f64>,
    /// Turn angle, degrees.
    pub turn_deg: Option<f64>,
    /// Powered swing-by impulse, km/s.
    pub powered_dv_km_s: Option<f64>,
    /// B·T, km.
    pub b_t_km: Option<f64>,
    /// B·R, km.
    pub b_r_km: Option<f64>,
    /// B-plane aim, degrees.
    pub aim_deg: Option<f64>,
    /// Heliocentric speed before, km/s.
    pub speed_before_km_s: Option<f64>,
    /// Heliocentric speed after, km/s.
    pub speed_after_km_s: Option<f64>,
    /// Heliocentric energy before, km²/s².
    pub energy_before_km2_s2: Option<f64>,
    /// Heliocentric energy after, km²/s².
    pub energy_after_km2_s2: Option<f64>,
    /// Energy gain, km²/s².
    pub energy_gain_km2_s2: Option<f64>,
    /// Spacecraft Δv at the stop, km/s.
    pub dv_km_s: Option<f64>,
    /// Mass after the stop, kg.
    pub mass_after_kg: Option<f64>,
    /// Distance from the Sun, AU.
    pub sun_distance_au: Option<f64>,
    /// Swing-by figures that are not table columns (swing-bys only).
    pub swingby: Option<SwingbyReport>,
}

/// Swing-by extras of a [`StopReport`].
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct SwingbyReport {
    /// Altitude and aim set by the designer (the next leg is ballistic).
    pub shaped: bool,
    /// Periapsis radius, km.
    pub periapsis_radius_km: Option<f64>,
    /// Minimum altitude in force, km.
    pub min_altitude_km: Option<f64>,
    /// Largest unpowered turn at the minimum altitude, degrees.
    pub turn_available_deg: Option<f64>,
    /// Eccentricity of the incoming hyperbola.
    pub e_in: Option<f64>,
    /// Eccentricity of the outgoing hyperbola.
    pub e_out: Option<f64>,
    /// |v∞ out − v∞ in|, km/s.
    pub planet_dv_km_s: Option<f64>,
    /// A shaped swing-by's miss at the next stop's epoch, km.
    pub miss_km: Option<f64>,
    /// Closest approach to the next body on the ballistic leg, km.
    pub closest_approach_km: Option<f64>,
    /// When, ISO-8601 UTC.
    pub closest_approach_utc: Option<String>,
}

/// A deep-space manoeuvre of [`EvalReport`].
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct DsmReport {
    /// Leg number, from 1.
    pub leg: usize,
    /// When, ISO-8601 UTC.
    pub epoch_utc: String,
    /// When, MJD2000.
    pub mjd2000: Option<f64>,
    /// Where on the leg, as a fraction of its time of flight.
    pub fraction_of_leg: Option<f64>,
    /// Impulse, km/s.
    pub dv_km_s: Option<f64>,
    /// Impulse vector (ecliptic J2000), km/s.
    pub dv_vector_km_s: [Option<f64>; 3],
    /// Distance from the Sun, AU.
    pub sun_distance_au: Option<f64>,
    /// Heliocentric energy before, km²/s².
    pub energy_before_km2_s2: Option<f64>,
    /// Heliocentric energy after, km²/s².
    pub energy_after_km2_s2: Option<f64>,
    /// Mass after, kg.
    pub mass_after_kg: Option<f64>,
}

/// Launch figures of [`EvalReport`].
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct LaunchReport {
    /// C3, km²/s².
    pub c3_km2_s2: Option<f64>,
    /// v∞, km/s.
    pub vinf_km_s: Option<f64>,
    /// Declination of the launch asymptote, degrees.
    pub dla_deg: Option<f64>,
    /// Right ascension of the launch asymptote, degrees.
    pub rla_deg: Option<f64>,
    /// Mass the launch vehicle injects at this C3, kg.
    pub injected_mass_kg: Option<f64>,
}

/// Arrival figures of [`EvalReport`].
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct ArrivalReport {
    /// v∞, km/s.
    pub vinf_km_s: Option<f64>,
    /// Δv of the arrival goal, km/s.
    pub dv_km_s: Option<f64>,
}

/// The budget of [`EvalReport`].
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct LedgerReport {
    /// Total spacecraft Δv, km/s.
    pub total_dv_km_s: Option<f64>,
    /// Wet mass at launch, kg.
    pub wet_mass_kg: Option<f64>,
    /// Propellant needed, kg.
    pub propellant_needed_kg: Option<f64>,
    /// Propellant loaded minus needed, kg.
    pub propellant_margin_kg: Option<f64>,
    /// Mass after the last manoeuvre, kg.
    pub final_mass_kg: Option<f64>,
    /// Launch-vehicle capacity minus wet mass, kg.
    pub lv_margin_kg: Option<f64>,
    /// Mass delivered when the launch vehicle is filled, kg.
    pub delivered_mass_kg: Option<f64>,
    /// The ledger table's rows.
    pub manoeuvres: Vec<LedgerRow>,
}

/// One row of the ledger table.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct LedgerRow {
    /// What the row is.
    pub item: String,
    /// Where.
    pub body: String,
    /// When, ISO-8601 UTC.
    pub epoch_utc: String,
    /// Δv, km/s.
    pub dv_km_s: Option<f64>,
    /// Mass after, kg.
    pub mass_after_kg: Option<f64>,
}

fn text_of(c: &Cell) -> String {
    match c {
        Cell::Text(t) => t.clone(),
        Cell::Num(Some(x)) => x.to_string(),
        Cell::Num(None) => String::new(),
    }
}

/// The whole evaluation for machines (see [`EvalReport`]). The stop and ledger rows are the
/// tables' own rows: one source for text, CSV, JSON and the workbench.
pub fn eval_report(tour: &PreparedTour, e: &Evaluation) -> EvalReport {
    let table = events(tour, e);
    let stops = table
        .rows
        .iter()
        .filter(|r| !is_dsm_row(r))
        .enumerate()
        .map(|(k, r)| {
            let n = |i: usize| r.get(i).and_then(Cell::num);
            let reached = !is_unreached_row(r);
            StopReport {
                stop: k + 1,
                kind: text_of(&r[1]).trim_end_matches(NOT_REACHED).to_string(),
                reached,
                body: text_of(&r[2]),
                epoch_utc: text_of(&r[3]),
                mjd2000: n(4),
                vinf_in_km_s: n(5),
                vinf_out_km_s: n(6),
                periapsis_altitude_km: n(7),
                turn_deg: n(8),
                powered_dv_km_s: n(9),
                b_t_km: n(10),
                b_r_km: n(11),
                aim_deg: n(12),
                speed_before_km_s: n(13),
                speed_after_km_s: n(14),
                energy_before_km2_s2: n(15),
                energy_after_km2_s2: n(16),
                energy_gain_km2_s2: n(17),
                dv_km_s: n(18),
                mass_after_kg: n(19),
                sun_distance_au: n(20),
                swingby: e
                    .stops
                    .get(k)
                    .filter(|_| reached)
                    .and_then(|s| s.swingby)
                    .map(|sw| SwingbyReport {
                        shaped: sw.shaped,
                        periapsis_radius_km: sw.rp_km.and_then(shown),
                        min_altitude_km: shown(sw.min_altitude_km),
                        turn_available_deg: sw.turn_available_rad.map(f64::to_degrees),
                        e_in: sw.e_in,
                        e_out: sw.e_out,
                        planet_dv_km_s: shown(sw.planet_dv_km_s),
                        miss_km: sw.miss_km,
                        closest_approach_km: sw.closest_approach.map(|c| c.0),
                        closest_approach_utc: sw.closest_approach.map(|c| c.1.to_iso_utc()),
                    }),
            }
        })
        .collect();
    let reach = e.ledger.flown.map(|p| p.first_unreached);
    let dsms = e
        .dsms()
        // A manoeuvre on a leg that is not flown is not reported.
        .filter(|(k, _)| reach.is_none_or(|u| k + 1 < u))
        .map(|(k, d)| DsmReport {
            leg: k + 1,
            epoch_utc: d.t.to_iso_utc(),
            mjd2000: shown(d.t.mjd2000()),
            fraction_of_leg: shown(d.fraction),
            dv_km_s: shown(d.dv_km_s),
            dv_vector_km_s: [shown(d.dv.x), shown(d.dv.y), shown(d.dv.z)],
            sun_distance_au: shown(d.sun_distance_au()),
            energy_before_km2_s2: shown(d.energy_before),
            energy_after_km2_s2: shown(d.energy_after),
            mass_after_kg: shown(d.mass_after_kg),
        })
        .collect();
    let l = &e.ledger;
    EvalReport {
        name: tour.name.clone(),
        sequence: tour.sequence_label(),
        ephemeris: tour.ephemeris_name.clone(),
        complete: e.complete,
        stops,
        dsms,
        launch: LaunchReport {
            c3_km2_s2: shown(e.launch.c3),
            vinf_km_s: shown(e.launch.vinf),
            dla_deg: shown(e.launch.dla_deg),
            rla_deg: shown(e.launch.rla_deg),
            injected_mass_kg: e.launch.injected_mass_kg,
        },
        // A tour that misses a body never arrives: no arrival figures, no total time of flight,
        // and the budget of the flown part (its Δv and propellant; no final or delivered mass).
        arrival: ArrivalReport {
            vinf_km_s: shown(e.arrival.vinf).filter(|_| reach.is_none()),
            dv_km_s: shown(e.arrival.dv_km_s).filter(|_| reach.is_none()),
        },
        total_tof_days: shown(e.total_tof_days()).filter(|_| reach.is_none()),
        ledger: LedgerReport {
            total_dv_km_s: shown(l.flown.map_or(l.total_dv_km_s, |p| p.dv_km_s)),
            wet_mass_kg: shown(l.wet_mass_kg),
            propellant_needed_kg: shown(
                l.flown
                    .map_or(l.propellant_needed_kg, |p| p.propellant_needed_kg),
            ),
            propellant_margin_kg: shown(
                l.flown
                    .map_or(l.propellant_margin_kg, |p| p.propellant_margin_kg),
            ),
            final_mass_kg: shown(l.final_mass_kg).filter(|_| reach.is_none()),
            lv_margin_kg: l.lv_margin_kg,
            delivered_mass_kg: l.delivered_mass_kg.filter(|_| reach.is_none()),
            manoeuvres: ledger(tour, e)
                .rows
                .iter()
                .map(|r| LedgerRow {
                    item: text_of(&r[0]),
                    body: text_of(&r[1]),
                    epoch_utc: text_of(&r[2]),
                    dv_km_s: r[3].num(),
                    mass_after_kg: r[4].num(),
                })
                .collect(),
        },
        warnings: e.warnings.iter().map(|w| w.to_string()).collect(),
        caution: crate::CAUTION,
    }
}

/// [`eval_report`] as a JSON value.
pub fn to_json(tour: &PreparedTour, e: &Evaluation) -> Value {
    serde_json::to_value(eval_report(tour, e)).unwrap_or(Value::Null)
}

/// The whole evaluation as text: the event table, launch and arrival lines, the ledger, warnings
/// and the caution.
pub fn to_text(tour: &PreparedTour, e: &Evaluation) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "{} ({}) · ephemeris: {}",
        tour.name,
        tour.sequence_label(),
        tour.ephemeris_name
    );
    let _ = writeln!(s);
    s.push_str(&events(tour, e).select(&LEDGER_VIEW_COLUMNS).to_text());
    let _ = writeln!(s);
    let l = &e.launch;
    let _ = writeln!(
        s,
        "Launch: C3 {:.3} km²/s²  v∞ {:.3} km/s  DLA {:.1}°  RLA {:.1}°{}",
        l.c3,
        l.vinf,
        l.dla_deg,
        l.rla_deg,
        l.injected_mass_kg
            .map(|m| format!("  injected {m:.0} kg"))
            .unwrap_or_default()
    );
    match e.ledger.flown {
        Some(p) => {
            let _ = writeln!(
                s,
                "Arrival: not reached (stop {} and those after it are not reached)",
                p.first_unreached + 1
            );
        }
        None => {
            let _ = writeln!(
                s,
                "Arrival: v∞ {:.3} km/s  Δv {:.3} km/s  total TOF {:.1} days ({:.2} years)",
                e.arrival.vinf,
                e.arrival.dv_km_s,
                e.total_tof_days(),
                e.total_tof_days() / 365.25
            );
        }
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "Ledger");
    s.push_str(&ledger(tour, e).to_text());
    if e.warnings.is_empty() {
        let _ = writeln!(s, "No warnings.");
    } else {
        for w in &e.warnings {
            let _ = writeln!(s, "warning: {w}");
        }
    }
    let _ = writeln!(s, "{}", crate::CAUTION);
    s
}
