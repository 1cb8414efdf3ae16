//! `evaluate`: from a prepared tour to everything it implies. The GUI, the CLI, the optimiser and
//! the tests all go through [`evaluate`]; it reuses the buffers of the `Evaluation` it is given,
//! so repeated evaluation (dragging a swing-by, optimising) allocates nothing once warm.
//!
//! The work is split by concern: [`legs`] (Lambert arcs, shaped swing-by departures, ballistic
//! legs, drawing samples), [`swingby`] (the figures at each swing-by), [`budget`] (launch,
//! arrival, heliocentric energies and the Δv/mass ledger). No figure leaves as NaN or infinity:
//! what cannot be computed is absent, and a warning says why.

pub mod budget;
pub mod legs;
pub mod swingby;

use std::fmt;

use tourwright_astro::ephemeris::EphemerisError;
use tourwright_astro::flyby::BPlane;
use tourwright_astro::kepler::KeplerError;
use tourwright_astro::lambert::LambertError;
use tourwright_astro::time::Tdb;
use tourwright_astro::{State, Vec3};

use crate::design::MissionDesign;
use crate::tour::PreparedTour;
pub use crate::tour::StopKind;

/// Swing-by figures of one stop. Figures that do not exist for this swing-by (no periapsis when
/// no turn is needed, no hyperbola at a massless body) are `None`.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct SwingbyResult {
    /// True when the designer set altitude and aim (the next leg is ballistic).
    pub shaped: bool,
    /// Periapsis radius, km.
    pub rp_km: Option<f64>,
    /// Periapsis altitude, km.
    pub altitude_km: Option<f64>,
    /// Minimum altitude in force, km.
    pub min_altitude_km: f64,
    /// Turn angle between v∞ in and v∞ out, rad.
    pub turn_rad: f64,
    /// Largest ballistic turn available at the minimum altitude with the incoming v∞, rad.
    pub turn_available_rad: Option<f64>,
    /// Impulse at periapsis (powered swing-by), km/s.
    pub powered_dv_km_s: f64,
    /// Eccentricity of the incoming hyperbola.
    pub e_in: Option<f64>,
    /// Eccentricity of the outgoing hyperbola.
    pub e_out: Option<f64>,
    /// B-plane of the incoming hyperbola.
    pub bplane: Option<BPlane>,
    /// |v∞out − v∞in|: the velocity change the planet gave, km/s.
    pub planet_dv_km_s: f64,
    /// For a shaped swing-by: distance from the next body at the next stop's epoch, km.
    pub miss_km: Option<f64>,
    /// For a shaped swing-by: closest approach to the next body on the leg (km, epoch).
    pub closest_approach: Option<(f64, Tdb)>,
}

/// Per-stop results.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct StopResult {
    /// Role in the tour.
    pub kind: StopKind,
    /// Epoch of the encounter.
    pub epoch: Tdb,
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

    /// The v∞ that characterises the stop: leaving at launch, arriving elsewhere.
    pub fn vinf(&self) -> f64 {
        if self.kind == StopKind::Launch {
            self.vinf_out.norm()
        } else {
            self.vinf_in.norm()
        }
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
    /// The deep-space manoeuvre, when the leg has one.
    pub dsm: Option<DsmResult>,
}

/// A deep-space manoeuvre as flown.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct DsmResult {
    /// When.
    pub t: Tdb,
    /// Where on the leg, as a fraction of its time of flight.
    pub fraction: f64,
    /// Heliocentric position, km.
    pub r: Vec3,
    /// Heliocentric velocity before the impulse (end of the coast), km/s.
    pub v_before: Vec3,
    /// Heliocentric velocity after the impulse (start of the Lambert arc), km/s.
    pub v_after: Vec3,
    /// The impulse, km/s (ecliptic J2000).
    pub dv: Vec3,
    /// Its magnitude, km/s.
    pub dv_km_s: f64,
    /// Heliocentric specific energy before, km²/s².
    pub energy_before: f64,
    /// Heliocentric specific energy after, km²/s².
    pub energy_after: f64,
    /// Spacecraft mass after the impulse, kg.
    pub mass_after_kg: f64,
    /// Index into `Evaluation::samples` where the arc after the manoeuvre starts (its first
    /// point repeats the manoeuvre's position with the new velocity).
    pub split: usize,
}

impl DsmResult {
    /// Heliocentric distance, AU.
    pub fn sun_distance_au(&self) -> f64 {
        self.r.norm() / tourwright_astro::constants::AU_KM
    }
}

/// One point of the trajectory for drawing and export.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct Sample {
    /// Epoch.
    pub t: Tdb,
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
    /// When a shaped swing-by misses its next body: the budget of the part that is flown (the
    /// stops before the first one not reached). The totals above cover the whole planned tour,
    /// as the search needs them; reports show this part instead.
    pub flown: Option<FlownPart>,
}

/// The budget of the flown part of a tour that misses a body (see [`Ledger::flown`]).
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct FlownPart {
    /// The first stop not reached (index).
    pub first_unreached: usize,
    /// Spacecraft Δv up to the miss, km/s.
    pub dv_km_s: f64,
    /// Propellant that Δv needs, kg.
    pub propellant_needed_kg: f64,
    /// Propellant loaded minus needed, kg.
    pub propellant_margin_kg: f64,
    /// Mass when the swing-by that misses is flown, kg.
    pub mass_kg: f64,
}

/// Something the designer should know, with its reason.
#[derive(Clone, Debug, PartialEq)]
pub enum Warning {
    /// The design could not be prepared (a field and a reason).
    Design {
        /// The field.
        field: String,
        /// Why.
        reason: String,
    },
    /// No Lambert arc for a leg.
    NoArc {
        /// Leg index.
        leg: usize,
        /// Why.
        reason: LambertError,
    },
    /// The ballistic leg after a shaped swing-by could not be propagated.
    NoBallisticArc {
        /// Leg index.
        leg: usize,
        /// Why.
        reason: KeplerError,
    },
    /// The ephemeris cannot give a body's state.
    Ephemeris {
        /// Stop index.
        stop: usize,
        /// Why.
        reason: EphemerisError,
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
    /// A swing-by's v∞ is below its minimum.
    VinfBelowMinimum {
        /// Stop index.
        stop: usize,
        /// v∞ arriving, km/s.
        vinf: f64,
        /// Minimum, km/s.
        min: f64,
    },
    /// A powered swing-by's impulse is over its design limit.
    PoweredDvOverLimit {
        /// Stop index.
        stop: usize,
        /// Impulse, km/s.
        dv: f64,
        /// Limit, km/s.
        max: f64,
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
        /// Smallest acceptable DLA, degrees.
        min: f64,
        /// Largest acceptable DLA, degrees.
        max: f64,
    },
    /// C3 outside the launch-vehicle table (value extrapolated).
    OutsideLvTable {
        /// C3, km²/s².
        c3: f64,
        /// The table's smallest C3, km²/s².
        min: f64,
        /// The table's largest C3, km²/s².
        max: f64,
    },
    /// The total time of flight is over the design's limit.
    TofOverLimit {
        /// Total time of flight, days.
        tof_days: f64,
        /// Limit, days.
        max_days: f64,
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
        /// The largest miss that still counts as meeting the body, km.
        tolerance_km: f64,
    },
    /// A manoeuvre's date lies outside its leg (evaluated at the nearer end).
    DsmOutsideLeg {
        /// Leg index.
        leg: usize,
        /// The fraction of the leg the date falls at.
        fraction: f64,
    },
    /// A figure came out as a non-finite number and was dropped.
    NotFinite {
        /// Which figure.
        what: &'static str,
    },
}

impl fmt::Display for Warning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Warning::Design { field, reason } => write!(f, "{field}: {reason}"),
            Warning::NoArc { leg, reason } => write!(f, "leg {}: no arc ({reason})", leg + 1),
            Warning::NoBallisticArc { leg, reason } => {
                write!(f, "leg {}: the ballistic arc fails ({reason})", leg + 1)
            }
            Warning::Ephemeris { stop, reason } => write!(f, "stop {}: {reason}", stop + 1),
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
            Warning::VinfBelowMinimum { stop, vinf, min } => write!(
                f,
                "stop {}: v∞ {vinf:.2} km/s is below the swing-by minimum {min:.2} km/s",
                stop + 1
            ),
            Warning::PoweredDvOverLimit { stop, dv, max } => write!(
                f,
                "stop {}: powered swing-by Δv {dv:.3} km/s is over the design limit {max:.3} km/s",
                stop + 1
            ),
            Warning::TurnImpossible { stop } => write!(
                f,
                "stop {}: the required turn cannot be made by a swing-by",
                stop + 1
            ),
            Warning::C3OverLimit { c3, max } => write!(
                f,
                "launch C3 {c3:.2} km²/s² is over the limit {max:.2} km²/s²"
            ),
            Warning::DlaOutOfRange { dla, min, max } => write!(
                f,
                "launch declination {dla:.1}° is outside the accepted band {min:.1}° .. {max:.1}°"
            ),
            Warning::OutsideLvTable { c3, min, max } => write!(
                f,
                "C3 {c3:.2} km²/s² is outside the launch-vehicle table ({min:.1} .. {max:.1} km²/s²); mass is extrapolated"
            ),
            Warning::TofOverLimit { tof_days, max_days } => write!(
                f,
                "total time of flight {tof_days:.1} days is over the limit {max_days:.1} days"
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
            Warning::MissesNextBody {
                stop,
                miss_km,
                tolerance_km,
            } => write!(
                f,
                "stop {}: the shaped swing-by misses the next body by {:.0} km (at most {:.0} km counts as meeting it); stop {} and those after it are not reached",
                stop + 1,
                miss_km,
                tolerance_km,
                stop + 2
            ),
            Warning::DsmOutsideLeg { leg, fraction } => write!(
                f,
                "leg {}: the deep-space manoeuvre's date is outside the leg (at {:.0} % of it)",
                leg + 1,
                fraction * 100.0
            ),
            Warning::NotFinite { what } => {
                write!(f, "{what} could not be computed (not a finite number)")
            }
        }
    }
}

impl Warning {
    /// True for a broken limit of the design: swing-by altitude, v∞, powered Δv and turn, a
    /// shaped swing-by that misses its next body, launch C3 and declination, the total time of
    /// flight, a manoeuvre off its leg, and the mass limits ([`Warning::is_mass_limit`]). Every
    /// search keeps these as constraints; a result that breaks one says so.
    pub fn is_limit(&self) -> bool {
        matches!(
            self,
            Warning::AltitudeBelowMinimum { .. }
                | Warning::VinfBelowMinimum { .. }
                | Warning::PoweredDvOverLimit { .. }
                | Warning::C3OverLimit { .. }
                | Warning::TurnImpossible { .. }
                | Warning::DlaOutOfRange { .. }
                | Warning::DsmOutsideLeg { .. }
                | Warning::MissesNextBody { .. }
                | Warning::TofOverLimit { .. }
        ) || self.is_mass_limit()
    }

    /// True for a limit of the spacecraft's masses: propellant, the launch vehicle's capacity,
    /// and a C3 outside the vehicle's table (its mass would be extrapolated).
    pub fn is_mass_limit(&self) -> bool {
        matches!(
            self,
            Warning::PropellantShort { .. }
                | Warning::LvCapacityShort { .. }
                | Warning::OutsideLvTable { .. }
        )
    }

    /// True when the warning means the tour could not be evaluated at all (no arc, no state, a
    /// stop out of order, an unusable field, a figure that is not a number).
    pub fn is_failure(&self) -> bool {
        matches!(
            self,
            Warning::Design { .. }
                | Warning::NoArc { .. }
                | Warning::NoBallisticArc { .. }
                | Warning::Ephemeris { .. }
                | Warning::OutOfOrder { .. }
                | Warning::NotFinite { .. }
        )
    }

    /// By how much a broken limit is broken, with its unit (`None` when there is no measure, as
    /// for a turn no swing-by can make).
    pub fn excess(&self) -> Option<(f64, &'static str)> {
        let v = match *self {
            Warning::AltitudeBelowMinimum {
                altitude_km,
                min_km,
                ..
            } => (min_km - altitude_km, "km"),
            Warning::VinfBelowMinimum { vinf, min, .. } => (min - vinf, "km/s"),
            Warning::PoweredDvOverLimit { dv, max, .. } => (dv - max, "km/s"),
            Warning::C3OverLimit { c3, max } => (c3 - max, "km²/s²"),
            Warning::DlaOutOfRange { dla, min, max } => ((min - dla).max(dla - max), "°"),
            Warning::OutsideLvTable { c3, min, max } => ((min - c3).max(c3 - max), "km²/s²"),
            Warning::TofOverLimit { tof_days, max_days } => (tof_days - max_days, "days"),
            Warning::MissesNextBody {
                miss_km,
                tolerance_km,
                ..
            } => (miss_km - tolerance_km, "km"),
            Warning::PropellantShort {
                needed_kg,
                loaded_kg,
            } => (needed_kg - loaded_kg, "kg"),
            Warning::LvCapacityShort {
                capacity_kg,
                wet_kg,
            } => (wet_kg - capacity_kg, "kg"),
            Warning::DsmOutsideLeg { fraction, .. } => {
                (100.0 * (-fraction).max(fraction - 1.0), "% of the leg")
            }
            _ => return None,
        };
        (v.0.is_finite()).then_some(v)
    }
}

/// Options of an evaluation.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EvalOptions {
    /// Trajectory points per leg for drawing and export (0 for none, as in search).
    pub samples_per_leg: usize,
    /// Find each ballistic leg's closest approach to its next body (a figure for the views; a
    /// hundred propagations per leg, so search leaves it out).
    pub closest_approach: bool,
}

impl Default for EvalOptions {
    fn default() -> Self {
        EvalOptions {
            samples_per_leg: 240,
            closest_approach: true,
        }
    }
}

impl EvalOptions {
    /// No drawing samples (search).
    pub const SEARCH: EvalOptions = EvalOptions {
        samples_per_leg: 0,
        closest_approach: false,
    };
}

/// Everything a tour implies.
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
    /// The bodies' states of the last evaluation, per stop: reused when a stop's body and epoch
    /// are unchanged (the search's finite differences move one variable at a time, most of them
    /// no epoch). A cache, not part of the value.
    pub(crate) body_memo: BodyMemo,
    /// The coast and arc of each Lambert or manoeuvre leg of the last evaluation, reused when the leg's
    /// inputs are unchanged bit for bit (a finite-difference step on a later leg's variable
    /// leaves the earlier legs alone). A cache, not part of the value.
    pub(crate) arc_memo: ArcMemo,
}

/// Per leg: the inputs of a leg's solves and their results.
#[derive(Clone, Debug, Default)]
pub(crate) struct ArcMemo(pub(crate) Vec<Option<ArcMemoEntry>>);

/// One leg's coast (Kepler; none on a leg without a manoeuvre) and arc (Lambert) with every
/// input they read: the start state, the coast time, the target position, the leg's time of
/// flight, μ☉ (as bits), whether the leg has a manoeuvre and the arc's direction, revolutions
/// and branch.
#[derive(Clone, Copy, Debug)]
pub(crate) struct ArcMemoEntry {
    pub(crate) key: [u64; 12],
    pub(crate) shape: (
        bool,
        tourwright_astro::lambert::Direction,
        u32,
        tourwright_astro::lambert::Branch,
    ),
    pub(crate) coast: State,
    pub(crate) arc: tourwright_astro::lambert::LambertSolution,
}

impl PartialEq for ArcMemo {
    fn eq(&self, _: &Self) -> bool {
        true
    }
}

/// Per stop: the body's ephemeris, the epoch (TDB days, compared bit for bit) and the state
/// computed for them. Equal to any other memo: it never changes what an evaluation says.
#[derive(Clone, Debug, Default)]
pub(crate) struct BodyMemo(pub(crate) Vec<Option<(crate::tour::BodyEphemeris, f64, State)>>);

impl PartialEq for BodyMemo {
    fn eq(&self, _: &Self) -> bool {
        true
    }
}

impl Evaluation {
    /// The first stop the spacecraft does not reach: the one after the earliest shaped swing-by
    /// whose ballistic leg misses its next body beyond the tolerance. The figures of that stop and
    /// of every later one are computed as if it were reached (the optimiser needs them to find its
    /// way back); views and reports show them as not reached.
    pub fn first_unreached(&self) -> Option<usize> {
        self.warnings
            .iter()
            .filter_map(|w| match w {
                Warning::MissesNextBody { stop, .. } => Some(stop + 1),
                _ => None,
            })
            .min()
    }

    /// True when stop `k` is reached (see [`Evaluation::first_unreached`]).
    pub fn reached(&self, k: usize) -> bool {
        self.first_unreached().is_none_or(|u| k < u)
    }

    /// Total time of flight, days.
    pub fn total_tof_days(&self) -> f64 {
        match (self.stops.first(), self.stops.last()) {
            (Some(a), Some(b)) => (b.epoch.0 - a.epoch.0) / 86_400.0,
            _ => 0.0,
        }
    }

    /// The spacecraft's heliocentric position at `t`, interpolated between drawing samples
    /// (clamped to the first and last sample).
    pub fn position_at(&self, t: Tdb) -> Option<Vec3> {
        let s = &self.samples;
        let first = s.first()?;
        let i = s.partition_point(|x| x.t.0 < t.0);
        if i == 0 {
            return Some(first.state.r);
        }
        let Some(b) = s.get(i) else {
            return s.last().map(|l| l.state.r);
        };
        let a = &s[i - 1];
        let f = if b.t.0 > a.t.0 {
            (t.0 - a.t.0) / (b.t.0 - a.t.0)
        } else {
            0.0
        };
        Some(a.state.r + (b.state.r - a.state.r) * f)
    }

    /// The deep-space manoeuvres with their legs, in time order.
    pub fn dsms(&self) -> impl Iterator<Item = (usize, &DsmResult)> {
        self.legs
            .iter()
            .enumerate()
            .filter_map(|(k, l)| l.dsm.as_ref().map(|d| (k, d)))
    }

    /// True when a warning says the tour breaks a hard limit.
    pub fn violates_limits(&self) -> bool {
        self.warnings.iter().any(Warning::is_limit)
    }

    fn reset(&mut self) {
        self.complete = false;
        self.stops.clear();
        self.legs.clear();
        self.warnings.clear();
        self.samples.clear();
        self.launch = LaunchResult::default();
        self.arrival = ArrivalResult::default();
        self.ledger = Ledger::default();
    }
}

/// Evaluate a prepared tour into `out`, reusing its buffers.
pub fn evaluate(tour: &PreparedTour, opts: &EvalOptions, out: &mut Evaluation) {
    out.reset();
    if !legs::body_states(tour, out) {
        return;
    }
    let n = tour.stops.len();
    // Legs in order: a shaped swing-by needs its incoming v∞ before the next leg.
    for k in 0..n - 1 {
        if !legs::leg(tour, k, opts, out) {
            return;
        }
        if k + 1 < n - 1 {
            swingby::prepare(tour, k + 1, out);
        }
    }
    for k in 1..n - 1 {
        swingby::finish(tour, k, out);
    }
    budget::launch(tour, out);
    budget::tof_limit(tour, out);
    budget::arrival(tour, out);
    budget::energies(tour.mu_sun, out);
    budget::ledger(tour, out);
    out.complete = out.legs.len() == n - 1 && out.legs.iter().all(|l| l.solved);
    budget::drop_non_finite(out);
}

/// Prepare and evaluate a design with default options. A design that cannot be prepared gives
/// an incomplete evaluation whose warning names the field and the reason.
pub fn evaluate_design(design: &MissionDesign) -> (Option<PreparedTour>, Evaluation) {
    let mut out = Evaluation::default();
    match PreparedTour::prepare(design) {
        Ok(t) => {
            evaluate(&t, &EvalOptions::default(), &mut out);
            (Some(t), out)
        }
        Err(e) => {
            out.warnings.push(Warning::Design {
                field: e.field,
                reason: e.reason,
            });
            (None, out)
        }
    }
}
