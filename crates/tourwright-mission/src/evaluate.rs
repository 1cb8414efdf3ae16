//! `evaluate`: from a design to everything it implies. The GUI, the CLI, the optimiser and the
//! tests all go through [`evaluate_into`]; it reuses the buffers of the `Evaluation` it is given,
//! so repeated evaluation (dragging a swing-by, optimising) allocates nothing once warm.

use std::fmt;

use tourwright_astro::constants::{DAY_S, MU_SUN};
use tourwright_astro::ephemeris::EphemerisError;
use tourwright_astro::flyby::{self, BPlane};
use tourwright_astro::kepler;
use tourwright_astro::lambert::{self, LambertError};
use tourwright_astro::time::Epoch;
use tourwright_astro::{State, Vec3};

use crate::arrival::arrival_dv;
use crate::design::{MissionDesign, Objective, ResolvedBody, SwingbyMode};
use crate::launch;

/// The role of a stop in the tour.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum StopKind {
    /// First stop.
    #[default]
    Launch,
    /// Any stop between the first and the last.
    SwingBy,
    /// Last stop.
    Arrival,
}

impl StopKind {
    /// The role of stop `k` in a tour of `n` stops.
    pub fn of(k: usize, n: usize) -> Self {
        if k == 0 {
            StopKind::Launch
        } else if k + 1 == n {
            StopKind::Arrival
        } else {
            StopKind::SwingBy
        }
    }

    /// Display name.
    pub fn label(self) -> &'static str {
        match self {
            StopKind::Launch => "Launch",
            StopKind::SwingBy => "Swing-by",
            StopKind::Arrival => "Arrival",
        }
    }
}

/// Swing-by figures of one stop.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct SwingbyResult {
    /// True when the designer set altitude and aim (the next leg is ballistic).
    pub shaped: bool,
    /// Periapsis radius, km.
    pub rp_km: f64,
    /// Periapsis altitude, km.
    pub altitude_km: f64,
    /// Minimum altitude in force, km.
    pub min_altitude_km: f64,
    /// Turn angle between v∞ in and v∞ out, rad.
    pub turn_rad: f64,
    /// Largest ballistic turn available at the minimum altitude with the incoming v∞, rad.
    pub turn_available_rad: f64,
    /// Impulse at periapsis (powered swing-by), km/s.
    pub powered_dv_km_s: f64,
    /// Eccentricity of the incoming hyperbola.
    pub e_in: f64,
    /// Eccentricity of the outgoing hyperbola.
    pub e_out: f64,
    /// B-plane of the incoming hyperbola.
    pub bplane: BPlane,
    /// |v∞out − v∞in|: the velocity change the planet gave, km/s.
    pub planet_dv_km_s: f64,
    /// For a shaped swing-by: distance from the next body at the next stop's epoch, km.
    pub miss_km: Option<f64>,
    /// For a shaped swing-by: closest approach to the next body on the leg (km, epoch).
    pub closest_approach: Option<(f64, Epoch)>,
}

/// Per-stop results.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct StopResult {
    /// Role in the tour.
    pub kind: StopKind,
    /// Epoch of the encounter.
    pub epoch: Epoch,
    /// The body's heliocentric state.
    pub body_state: State,
    /// Heliocentric velocity arriving (zero at launch), km/s.
    pub v_helio_in: Vec3,
    /// Heliocentric velocity leaving (zero at arrival), km/s.
    pub v_helio_out: Vec3,
    /// v∞ arriving (zero at launch), km/s.
    pub vinf_in: Vec3,
    /// v∞ leaving (zero at arrival), km/s.
    pub vinf_out: Vec3,
    /// Swing-by figures (swing-bys only).
    pub swingby: Option<SwingbyResult>,
    /// Heliocentric specific energy before the stop, km²/s² (after, at launch).
    pub energy_before: f64,
    /// Heliocentric specific energy after the stop, km²/s² (before, at arrival).
    pub energy_after: f64,
    /// Heliocentric speed before, km/s.
    pub speed_before: f64,
    /// Heliocentric speed after, km/s.
    pub speed_after: f64,
    /// Spacecraft Δv spent at this stop, km/s.
    pub dv_km_s: f64,
    /// Spacecraft mass after this stop, kg.
    pub mass_after_kg: f64,
}

impl StopResult {
    /// Energy gained at the stop (the swing-by's "gain"), km²/s².
    pub fn gain(&self) -> f64 {
        self.energy_after - self.energy_before
    }
}

/// Per-leg results.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct LegResult {
    /// Time of flight, days.
    pub tof_days: f64,
    /// Heliocentric velocity at departure, km/s.
    pub v_depart: Vec3,
    /// Heliocentric velocity on arrival, km/s.
    pub v_arrive: Vec3,
    /// Heliocentric state on arrival (differs from the body's position after a shaped swing-by).
    pub arrive_state: State,
    /// False when no arc could be found (see warnings).
    pub solved: bool,
    /// True when flown ballistically after a shaped swing-by.
    pub ballistic: bool,
    /// Range of this leg's points in `Evaluation::samples`.
    pub samples: std::ops::Range<usize>,
}

/// One point of the trajectory for drawing and export.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct Sample {
    /// Epoch.
    pub t: Epoch,
    /// Heliocentric state.
    pub state: State,
}

/// Launch figures.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct LaunchResult {
    /// C3, km²/s².
    pub c3: f64,
    /// v∞, km/s.
    pub vinf: f64,
    /// Declination of the launch asymptote, degrees (Earth mean equator J2000).
    pub dla_deg: f64,
    /// Right ascension of the launch asymptote, degrees.
    pub rla_deg: f64,
    /// Mass the launch vehicle injects at this C3, kg.
    pub injected_mass_kg: Option<f64>,
}

/// Arrival figures.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct ArrivalResult {
    /// v∞ on arrival, km/s.
    pub vinf: f64,
    /// Δv for the arrival goal, km/s.
    pub dv_km_s: f64,
}

/// The Δv and mass budget.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct Ledger {
    /// Sum of spacecraft Δv, km/s.
    pub total_dv_km_s: f64,
    /// Wet mass at launch (dry + propellant), kg.
    pub wet_mass_kg: f64,
    /// Propellant the Δv needs from the wet mass, kg.
    pub propellant_needed_kg: f64,
    /// Propellant loaded minus needed, kg.
    pub propellant_margin_kg: f64,
    /// Mass after the last manoeuvre, kg.
    pub final_mass_kg: f64,
    /// Launch-vehicle capacity minus wet mass, kg.
    pub lv_margin_kg: Option<f64>,
    /// Mass delivered after all manoeuvres when the launch vehicle is filled to capacity, kg.
    pub delivered_mass_kg: Option<f64>,
}

/// Something the designer should know, with its reason.
#[derive(Clone, Debug, PartialEq)]
pub enum Warning {
    /// No Lambert arc for a leg.
    NoArc {
        /// Leg index.
        leg: usize,
        /// Why.
        reason: LambertError,
    },
    /// The ephemeris cannot give a body's state.
    Ephemeris {
        /// Stop index.
        stop: usize,
        /// Why.
        reason: EphemerisError,
    },
    /// A stop's body name is unknown.
    UnknownBody {
        /// Stop index.
        stop: usize,
    },
    /// A stop is not after the one before it.
    OutOfOrder {
        /// Stop index.
        stop: usize,
    },
    /// Periapsis below the minimum altitude.
    AltitudeBelowMinimum {
        /// Stop index.
        stop: usize,
        /// Altitude, km.
        altitude_km: f64,
        /// Minimum, km.
        min_km: f64,
    },
    /// The required turn cannot be made (v∞ reversal or zero v∞).
    TurnImpossible {
        /// Stop index.
        stop: usize,
    },
    /// C3 over the launch limit.
    C3OverLimit {
        /// C3, km²/s².
        c3: f64,
        /// Limit.
        max: f64,
    },
    /// DLA outside the acceptable band.
    DlaOutOfRange {
        /// DLA, degrees.
        dla: f64,
    },
    /// C3 outside the launch-vehicle table (value extrapolated).
    OutsideLvTable {
        /// C3, km²/s².
        c3: f64,
    },
    /// Not enough propellant.
    PropellantShort {
        /// Needed, kg.
        needed_kg: f64,
        /// Loaded, kg.
        loaded_kg: f64,
    },
    /// The launch vehicle cannot lift the wet mass at this C3.
    LvCapacityShort {
        /// Capacity, kg.
        capacity_kg: f64,
        /// Wet mass, kg.
        wet_kg: f64,
    },
    /// A shaped swing-by's ballistic leg misses the next body.
    MissesNextBody {
        /// Stop index of the shaped swing-by.
        stop: usize,
        /// Miss distance at the next epoch, km.
        miss_km: f64,
    },
    /// Fewer than two stops.
    TooFewStops,
}

impl fmt::Display for Warning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Warning::NoArc { leg, reason } => write!(f, "leg {}: no arc ({reason})", leg + 1),
            Warning::Ephemeris { stop, reason } => write!(f, "stop {}: {reason}", stop + 1),
            Warning::UnknownBody { stop } => write!(f, "stop {}: unknown body", stop + 1),
            Warning::OutOfOrder { stop } => {
                write!(f, "stop {}: epoch is not after the previous stop", stop + 1)
            }
            Warning::AltitudeBelowMinimum {
                stop,
                altitude_km,
                min_km,
            } => write!(
                f,
                "stop {}: periapsis altitude {altitude_km:.0} km is below the minimum {min_km:.0} km",
                stop + 1
            ),
            Warning::TurnImpossible { stop } => {
                write!(
                    f,
                    "stop {}: the required turn cannot be made by a swing-by",
                    stop + 1
                )
            }
            Warning::C3OverLimit { c3, max } => {
                write!(
                    f,
                    "launch C3 {c3:.2} km²/s² is over the limit {max:.2} km²/s²"
                )
            }
            Warning::DlaOutOfRange { dla } => {
                write!(
                    f,
                    "launch declination {dla:.1}° is outside the accepted band"
                )
            }
            Warning::OutsideLvTable { c3 } => write!(
                f,
                "C3 {c3:.2} km²/s² is outside the launch-vehicle table; mass is extrapolated"
            ),
            Warning::PropellantShort {
                needed_kg,
                loaded_kg,
            } => write!(
                f,
                "propellant short: {needed_kg:.0} kg needed, {loaded_kg:.0} kg loaded"
            ),
            Warning::LvCapacityShort {
                capacity_kg,
                wet_kg,
            } => write!(
                f,
                "launch vehicle injects {capacity_kg:.0} kg at this C3, spacecraft is {wet_kg:.0} kg"
            ),
            Warning::MissesNextBody { stop, miss_km } => write!(
                f,
                "stop {}: the shaped swing-by misses the next body by {:.0} km",
                stop + 1,
                miss_km
            ),
            Warning::TooFewStops => write!(f, "a tour needs at least a launch and an arrival"),
        }
    }
}

/// Options of an evaluation.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EvalOptions {
    /// Trajectory points per leg for drawing and export (0 for none, as in search).
    pub samples_per_leg: usize,
}

impl Default for EvalOptions {
    fn default() -> Self {
        EvalOptions {
            samples_per_leg: 240,
        }
    }
}

/// Everything a design implies.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct Evaluation {
    /// True when every leg was solved and every stop evaluated.
    pub complete: bool,
    /// Per stop.
    pub stops: Vec<StopResult>,
    /// Per leg.
    pub legs: Vec<LegResult>,
    /// Launch.
    pub launch: LaunchResult,
    /// Arrival.
    pub arrival: ArrivalResult,
    /// Budget.
    pub ledger: Ledger,
    /// Warnings, in words on display.
    pub warnings: Vec<Warning>,
    /// Trajectory points of every leg (see `LegResult::samples`).
    pub samples: Vec<Sample>,
}

impl Evaluation {
    /// Total time of flight, days.
    pub fn total_tof_days(&self) -> f64 {
        match (self.stops.first(), self.stops.last()) {
            (Some(a), Some(b)) => (b.epoch.tdb_s - a.epoch.tdb_s) / DAY_S,
            _ => 0.0,
        }
    }

    /// Value of an objective (smaller is better; delivered mass is negated). Incomplete
    /// evaluations score `f64::INFINITY`.
    pub fn objective(&self, obj: Objective) -> f64 {
        if !self.complete {
            return f64::INFINITY;
        }
        match obj {
            Objective::TotalDvWithLaunchVinf => self.launch.vinf + self.ledger.total_dv_km_s,
            Objective::SpacecraftDv => self.ledger.total_dv_km_s,
            Objective::DeliveredMass => -self.ledger.delivered_mass_kg.unwrap_or(0.0),
            Objective::TimeOfFlight => self.total_tof_days(),
        }
    }

    /// True when a warning says the design breaks a hard limit (altitude, C3, propellant, miss).
    pub fn violates_limits(&self) -> bool {
        self.warnings.iter().any(|w| {
            matches!(
                w,
                Warning::AltitudeBelowMinimum { .. }
                    | Warning::C3OverLimit { .. }
                    | Warning::TurnImpossible { .. }
                    | Warning::DlaOutOfRange { .. }
            )
        })
    }
}

/// Evaluate a design with default options into a fresh `Evaluation`.
pub fn evaluate(design: &MissionDesign) -> Evaluation {
    let mut out = Evaluation::default();
    evaluate_into(design, &EvalOptions::default(), &mut out);
    out
}

/// Evaluate a design into `out`, reusing its buffers.
pub fn evaluate_into(design: &MissionDesign, opts: &EvalOptions, out: &mut Evaluation) {
    out.complete = false;
    out.stops.clear();
    out.legs.clear();
    out.warnings.clear();
    out.samples.clear();
    out.launch = LaunchResult::default();
    out.arrival = ArrivalResult::default();
    out.ledger = Ledger::default();
    let n = design.stops.len();
    if n < 2 {
        out.warnings.push(Warning::TooFewStops);
        return;
    }
    // Bodies and their states.
    let mut ok = true;
    for (k, stop) in design.stops.iter().enumerate() {
        let kind = StopKind::of(k, n);
        let mut sr = StopResult {
            kind,
            epoch: stop.epoch,
            ..Default::default()
        };
        if k > 0 && stop.epoch.tdb_s <= design.stops[k - 1].epoch.tdb_s {
            out.warnings.push(Warning::OutOfOrder { stop: k });
            ok = false;
        }
        match design.resolve(&stop.body) {
            None => {
                out.warnings.push(Warning::UnknownBody { stop: k });
                ok = false;
            }
            Some(b) => match b.state(stop.epoch) {
                Ok(s) => sr.body_state = s,
                Err(e) => {
                    out.warnings.push(Warning::Ephemeris { stop: k, reason: e });
                    ok = false;
                }
            },
        }
        out.stops.push(sr);
    }
    if !ok {
        return;
    }

    // Legs, in order, because a shaped swing-by needs the incoming v∞ before the next leg.
    for k in 0..n - 1 {
        let tof = design.stops[k + 1].epoch.tdb_s - design.stops[k].epoch.tdb_s;
        let from = out.stops[k].body_state;
        let to = out.stops[k + 1].body_state;
        let mut leg = LegResult {
            tof_days: tof / DAY_S,
            ..Default::default()
        };
        let shaped = match design.stops[k].swingby.mode {
            SwingbyMode::Shaped {
                altitude_km,
                aim_deg,
            } if k > 0 => Some((altitude_km, aim_deg)),
            _ => None,
        };
        if let Some((alt, aim_deg)) = shaped {
            // Ballistic leg after a shaped swing-by.
            let body = design
                .resolve(&design.stops[k].body)
                .expect("resolved above");
            let data = design.body_data(&body);
            let vin = out.stops[k].vinf_in;
            let rp = data.radius_km + alt;
            let vout = if data.mu > 0.0 && vin.norm() > 0.0 && rp > 0.0 {
                flyby::outgoing_vinf(&vin, rp, aim_deg.to_radians(), data.mu)
            } else {
                vin
            };
            let s0 = State {
                r: from.r,
                v: from.v + vout,
            };
            match kepler::propagate(&s0, tof, MU_SUN) {
                Ok(end) => {
                    leg.v_depart = s0.v;
                    leg.v_arrive = end.v;
                    leg.arrive_state = end;
                    leg.solved = true;
                    leg.ballistic = true;
                }
                Err(_) => {
                    out.warnings.push(Warning::NoArc {
                        leg: k,
                        reason: LambertError::NoConvergence,
                    });
                }
            }
        } else {
            let lo = design.leg(k);
            match lambert::solve_revs(
                &from.r,
                &to.r,
                tof,
                MU_SUN,
                lo.direction,
                lo.revolutions,
                lo.branch,
            ) {
                Ok(s) => {
                    leg.v_depart = s.v1;
                    leg.v_arrive = s.v2;
                    leg.arrive_state = State { r: to.r, v: s.v2 };
                    leg.solved = true;
                }
                Err(e) => out.warnings.push(Warning::NoArc { leg: k, reason: e }),
            }
        }
        if !leg.solved {
            out.legs.push(leg);
            return;
        }
        // Samples for drawing.
        let start = out.samples.len();
        if opts.samples_per_leg >= 2 {
            let s0 = State {
                r: from.r,
                v: leg.v_depart,
            };
            let m = opts.samples_per_leg;
            let mut cur = s0;
            let dt = tof / (m - 1) as f64;
            for j in 0..m {
                if j > 0 {
                    cur = kepler::propagate(&cur, dt, MU_SUN).unwrap_or(cur);
                }
                out.samples.push(Sample {
                    t: design.stops[k].epoch.plus_days(dt * j as f64 / DAY_S),
                    state: cur,
                });
            }
        }
        leg.samples = start..out.samples.len();
        // Fill the stops at both ends.
        out.stops[k].v_helio_out = leg.v_depart;
        out.stops[k].vinf_out = leg.v_depart - from.v;
        out.stops[k + 1].v_helio_in = leg.v_arrive;
        out.stops[k + 1].vinf_in = leg.v_arrive - to.v;
        out.legs.push(leg);
        // Shaped swing-by: the miss at the next epoch and the closest approach on the leg.
        if shaped.is_some() {
            let miss = (out.legs[k].arrive_state.r - to.r).norm();
            let next = design
                .resolve(&design.stops[k + 1].body)
                .expect("resolved above");
            let closest = closest_approach(
                &out.legs[k],
                &out.samples,
                &next,
                design.stops[k].epoch,
                tof,
            );
            if let Some(sw) = out.stops[k].swingby.as_mut() {
                sw.miss_km = Some(miss);
                sw.closest_approach = closest;
            }
            let soi = design.body_data(&next).soi_km.max(1.0e4);
            if miss > soi {
                out.warnings.push(Warning::MissesNextBody {
                    stop: k,
                    miss_km: miss,
                });
            }
        }
        // Now stop k+1 has its incoming v∞; evaluate it as a swing-by if it is one (before the
        // next leg, which may need its outgoing v∞).
        if k + 1 < n - 1 {
            swingby_prepare(design, k + 1, out);
        }
    }
    // Swing-bys: complete the figures now both v∞ are known.
    for k in 1..n - 1 {
        swingby_finish(design, k, out);
    }
    // Launch.
    let l = &out.stops[0];
    out.launch.c3 = launch::c3(&l.vinf_out);
    out.launch.vinf = l.vinf_out.norm();
    let (dla, rla) = launch::dla_rla_deg(&l.vinf_out);
    out.launch.dla_deg = dla;
    out.launch.rla_deg = rla;
    if let Some(max) = design.launch.max_c3_km2_s2 {
        if out.launch.c3 > max {
            out.warnings.push(Warning::C3OverLimit {
                c3: out.launch.c3,
                max,
            });
        }
    }
    let dla_lo = design.launch.min_dla_deg.unwrap_or(-90.0);
    let dla_hi = design.launch.max_dla_deg.unwrap_or(90.0);
    if dla < dla_lo || dla > dla_hi {
        out.warnings.push(Warning::DlaOutOfRange { dla });
    }
    if let Some(lv) = &design.launch_vehicle {
        if let Some((m, inside)) = launch::injected_mass(lv, out.launch.c3) {
            out.launch.injected_mass_kg = Some(m);
            if !inside {
                out.warnings
                    .push(Warning::OutsideLvTable { c3: out.launch.c3 });
            }
        }
    }
    // Arrival.
    let last = n - 1;
    let arr_body = design
        .resolve(&design.stops[last].body)
        .expect("resolved above");
    let arr_data = design.body_data(&arr_body);
    out.arrival.vinf = out.stops[last].vinf_in.norm();
    out.arrival.dv_km_s = arrival_dv(&design.arrival, out.arrival.vinf, arr_data.mu);
    out.stops[last].dv_km_s = out.arrival.dv_km_s;

    // Energies and speeds along the tour.
    for k in 0..n {
        let r = out.stops[k].body_state.r.norm();
        let s = &mut out.stops[k];
        let vin = if k == 0 { s.v_helio_out } else { s.v_helio_in };
        let vout = if k == n - 1 {
            s.v_helio_in
        } else {
            s.v_helio_out
        };
        s.speed_before = vin.norm();
        s.speed_after = vout.norm();
        s.energy_before = 0.5 * vin.norm_squared() - MU_SUN / r;
        s.energy_after = 0.5 * vout.norm_squared() - MU_SUN / r;
    }

    // Ledger.
    let sc = &design.spacecraft;
    let wet = sc.dry_mass_kg + sc.propellant_kg;
    let mut m = wet;
    let mut ratio_total = 1.0;
    let mut total_dv = 0.0;
    for s in out.stops.iter_mut() {
        let r = launch::mass_ratio(s.dv_km_s, sc.isp_s);
        m *= r;
        ratio_total *= r;
        total_dv += s.dv_km_s;
        s.mass_after_kg = m;
    }
    let needed = wet - m;
    out.ledger = Ledger {
        total_dv_km_s: total_dv,
        wet_mass_kg: wet,
        propellant_needed_kg: needed,
        propellant_margin_kg: sc.propellant_kg - needed,
        final_mass_kg: m,
        lv_margin_kg: out.launch.injected_mass_kg.map(|c| c - wet),
        delivered_mass_kg: out.launch.injected_mass_kg.map(|c| c * ratio_total),
    };
    if needed > sc.propellant_kg + 1e-9 {
        out.warnings.push(Warning::PropellantShort {
            needed_kg: needed,
            loaded_kg: sc.propellant_kg,
        });
    }
    if let Some(c) = out.launch.injected_mass_kg {
        if c < wet {
            out.warnings.push(Warning::LvCapacityShort {
                capacity_kg: c,
                wet_kg: wet,
            });
        }
    }
    out.complete = out.legs.len() == n - 1 && out.legs.iter().all(|l| l.solved);
}

/// First half of a swing-by: for a shaped one, fix the outgoing v∞ figures from altitude and aim
/// (the next leg reads them); for both, record what is known from the incoming side.
fn swingby_prepare(design: &MissionDesign, k: usize, out: &mut Evaluation) {
    let stop = &design.stops[k];
    let body = design.resolve(&stop.body).expect("resolved above");
    let data = design.body_data(&body);
    let min_alt = stop.swingby.min_altitude_km.unwrap_or(data.min_altitude_km);
    let vin = out.stops[k].vinf_in;
    let mut sw = SwingbyResult {
        min_altitude_km: min_alt,
        ..Default::default()
    };
    let rp_min = data.radius_km + min_alt;
    if data.mu > 0.0 && vin.norm() > 0.0 {
        sw.turn_available_rad = flyby::turn_angle(rp_min, vin.norm(), data.mu);
    }
    if let SwingbyMode::Shaped { altitude_km, .. } = stop.swingby.mode {
        sw.shaped = true;
        sw.altitude_km = altitude_km;
        sw.rp_km = data.radius_km + altitude_km;
    }
    out.stops[k].swingby = Some(sw);
}

fn swingby_finish(design: &MissionDesign, k: usize, out: &mut Evaluation) {
    let stop = &design.stops[k];
    let body = design.resolve(&stop.body).expect("resolved above");
    let data = design.body_data(&body);
    let vin = out.stops[k].vinf_in;
    let vout = out.stops[k].vinf_out;
    let Some(mut sw) = out.stops[k].swingby else {
        return;
    };
    sw.planet_dv_km_s = (vout - vin).norm();
    if sw.shaped {
        let e = flyby::eccentricity(sw.rp_km, vin.norm(), data.mu.max(1e-300));
        sw.e_in = e;
        sw.e_out = e;
        sw.turn_rad = flyby::turn_angle(sw.rp_km, vin.norm(), data.mu.max(1e-300));
        sw.powered_dv_km_s = 0.0;
        sw.bplane = flyby::b_plane(&vin, &vout, sw.rp_km, data.mu.max(1e-300));
    } else if data.mu <= 0.0 {
        // A massless target: the whole velocity change is a manoeuvre.
        sw.powered_dv_km_s = sw.planet_dv_km_s;
        sw.turn_rad = angle(&vin, &vout);
    } else {
        match flyby::powered_swingby(&vin, &vout, data.mu) {
            Some(p) if p.rp.is_finite() => {
                sw.rp_km = p.rp;
                sw.altitude_km = p.rp - data.radius_km;
                sw.turn_rad = p.turn;
                sw.powered_dv_km_s = p.dv;
                sw.e_in = p.e_in;
                sw.e_out = p.e_out;
                sw.bplane = flyby::b_plane(&vin, &vout, p.rp, data.mu);
            }
            Some(p) => {
                // No turn needed: fly far out; only the magnitude change costs Δv.
                sw.rp_km = f64::MAX;
                sw.altitude_km = f64::MAX;
                sw.powered_dv_km_s = p.dv;
            }
            None => {
                out.warnings.push(Warning::TurnImpossible { stop: k });
                sw.powered_dv_km_s = sw.planet_dv_km_s;
                sw.turn_rad = angle(&vin, &vout);
            }
        }
    }
    if sw.altitude_km < sw.min_altitude_km - 1e-3 {
        out.warnings.push(Warning::AltitudeBelowMinimum {
            stop: k,
            altitude_km: sw.altitude_km,
            min_km: sw.min_altitude_km,
        });
    }
    out.stops[k].dv_km_s = sw.powered_dv_km_s;
    out.stops[k].swingby = Some(sw);
}

fn angle(a: &Vec3, b: &Vec3) -> f64 {
    let d = a.norm() * b.norm();
    if d == 0.0 {
        0.0
    } else {
        (a.dot(b) / d).clamp(-1.0, 1.0).acos()
    }
}

/// Closest approach of a leg to a body: coarse scan of the samples (or 64 steps when the leg has
/// none), then golden-section refinement around the best one.
fn closest_approach(
    leg: &LegResult,
    samples: &[Sample],
    body: &ResolvedBody,
    t0: Epoch,
    tof: f64,
) -> Option<(f64, Epoch)> {
    let s0 = State {
        r: samples.get(leg.samples.start).map(|s| s.state.r)?,
        v: leg.v_depart,
    };
    let dist = |dt: f64| -> Option<f64> {
        let sc = kepler::propagate(&s0, dt, MU_SUN).ok()?;
        let b = body.state(t0.plus_days(dt / DAY_S)).ok()?;
        Some((sc.r - b.r).norm())
    };
    let m = 64;
    let mut best = (f64::INFINITY, 0.0);
    for j in 0..=m {
        let dt = tof * j as f64 / m as f64;
        if let Some(d) = dist(dt) {
            if d < best.0 {
                best = (d, dt);
            }
        }
    }
    let h = tof / m as f64;
    let (mut a, mut b) = ((best.1 - h).max(0.0), (best.1 + h).min(tof));
    let g = 0.618_033_988_749_895;
    for _ in 0..40 {
        let c = b - g * (b - a);
        let d = a + g * (b - a);
        if dist(c)? < dist(d)? {
            b = d;
        } else {
            a = c;
        }
    }
    let t = 0.5 * (a + b);
    Some((dist(t)?, t0.plus_days(t / DAY_S)))
}
