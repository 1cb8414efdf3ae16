//! `MissionDesign`: what a designer writes down. This is the file model (RON, `*.tour.ron`):
//! units are in field names, dates are ISO-8601 text with their time scale, and every field added
//! after version 1 has a default so that older files keep opening.

use serde::{Deserialize, Serialize};

use tourwright_astro::bodies::Planet;
use tourwright_astro::ephemeris::OsculatingElements;
use tourwright_astro::lambert::{Branch, Direction};
use tourwright_astro::time::Epoch;

/// The `format` tag every design file carries.
pub const FORMAT_TAG: &str = "tourwright-design";
/// The newest file version this program writes and reads.
pub const FORMAT_VERSION: u32 = 1;

/// A complete design: the tour, the spacecraft, the launch vehicle and the limits.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MissionDesign {
    /// Always [`FORMAT_TAG`].
    pub format: String,
    /// File version, at most [`FORMAT_VERSION`].
    pub version: u32,
    /// Name of the design (shown in the title bar).
    pub name: String,
    /// Free notes.
    #[serde(default)]
    pub notes: String,
    /// Bodies defined by osculating elements (asteroids, comets).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub user_bodies: Vec<UserBody>,
    /// The tour: Launch, any number of Swing-bys, Arrival.
    pub stops: Vec<Stop>,
    /// Per leg (between stop k and k+1) Lambert options; missing entries take the defaults.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub legs: Vec<LegOptions>,
    /// Launch limits.
    #[serde(default)]
    pub launch: LaunchLimits,
    /// What happens at the last stop.
    #[serde(default)]
    pub arrival: ArrivalGoal,
    /// Spacecraft masses and engine.
    #[serde(default)]
    pub spacecraft: Spacecraft,
    /// Launch-vehicle performance (C3 -> injected mass), if known.
    #[serde(default)]
    pub launch_vehicle: Option<LaunchVehicle>,
    /// Bounds and objective for the date optimiser.
    #[serde(default)]
    pub search: SearchBounds,
    /// Which ephemeris model gives the planets' states and constants.
    #[serde(default, skip_serializing_if = "EphemerisChoice::is_default")]
    pub ephemeris: EphemerisChoice,
    /// A launch period to judge the design on (`eval` then reports its summary); absent: the
    /// design is judged on its one launch date.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub launch_period: Option<LaunchPeriodRequest>,
}

/// A launch period: daily launch opportunities centred on the design's launch date, each with
/// its own tour re-optimised with that launch day fixed. Written in a design file as
/// `launch_period: Some((days: 21, step_days: 1.0, fixed_arrival: false))`; every field may be
/// left out.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LaunchPeriodRequest {
    /// Launch opportunities, centred on the design's launch (offsets −(N−1)/2 … N/2 steps,
    /// rounded down on the early side).
    #[serde(default = "default_period_days")]
    pub days: u32,
    /// Days between opportunities.
    #[serde(default = "default_period_step")]
    pub step_days: f64,
    /// Hold the arrival at the design's arrival date on every day (a landing or an arrival
    /// geometry fixed for the whole period); otherwise every encounter date is free within its
    /// bounds.
    #[serde(default)]
    pub fixed_arrival: bool,
}

/// Default number of launch opportunities of a launch period (common practice: a proposal
/// shows a launch period of 21 days or more).
pub const DEFAULT_PERIOD_DAYS: u32 = 21;
/// Most opportunities of one launch period (ours: a year of daily launches; anything longer is
/// a survey of launch windows, which `window` and `explore` do).
pub const MAX_PERIOD_DAYS: u32 = 366;
/// Smallest step between opportunities, days (ours: an hour; launch opportunities recur daily,
/// and a finer step only repeats the same day).
pub const MIN_PERIOD_STEP_DAYS: f64 = 1.0 / 24.0;
/// Largest span of a launch period from its first to its last opportunity, days (ours: a year,
/// as [`MAX_PERIOD_DAYS`]).
pub const MAX_PERIOD_SPAN_DAYS: f64 = 366.0;

fn default_period_days() -> u32 {
    DEFAULT_PERIOD_DAYS
}

fn default_period_step() -> f64 {
    1.0
}

impl Default for LaunchPeriodRequest {
    fn default() -> Self {
        LaunchPeriodRequest {
            days: DEFAULT_PERIOD_DAYS,
            step_days: 1.0,
            fixed_arrival: false,
        }
    }
}

/// Which setting of a launch period is out of range.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PeriodField {
    /// The number of opportunities.
    Days,
    /// The step between them.
    Step,
}

impl LaunchPeriodRequest {
    /// Check the numbers: 1 to [`MAX_PERIOD_DAYS`] opportunities, a step of at least
    /// [`MIN_PERIOD_STEP_DAYS`], a span of at most [`MAX_PERIOD_SPAN_DAYS`]. The file and the
    /// command line share this rule and name the field their own way.
    pub fn check(&self) -> Result<(), (PeriodField, String)> {
        if !(1..=MAX_PERIOD_DAYS).contains(&self.days) {
            return Err((
                PeriodField::Days,
                format!(
                    "{} launch opportunities: need 1 to {MAX_PERIOD_DAYS}",
                    self.days
                ),
            ));
        }
        if !(self.step_days.is_finite() && self.step_days >= MIN_PERIOD_STEP_DAYS) {
            return Err((
                PeriodField::Step,
                format!(
                    "a step of {} days: need at least an hour ({MIN_PERIOD_STEP_DAYS:.4} days)",
                    self.step_days
                ),
            ));
        }
        let span = f64::from(self.days - 1) * self.step_days;
        if span > MAX_PERIOD_SPAN_DAYS {
            return Err((
                PeriodField::Step,
                format!(
                    "{} opportunities {} days apart span {span} days: a launch period spans at \
                     most {MAX_PERIOD_SPAN_DAYS} days",
                    self.days, self.step_days
                ),
            ));
        }
        Ok(())
    }

    /// Offset of opportunity `i` (0-based) from the design's launch, in steps.
    pub fn offset(&self, i: u32) -> i64 {
        i64::from(i) - i64::from(self.days.saturating_sub(1) / 2)
    }
}

/// A figure of merit of a tour: what a search minimises and what the direct-transfer comparison
/// ranks by. How it is read off an evaluation is in `score.rs`.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default, Hash)]
pub enum Objective {
    /// Launch v∞ plus every spacecraft Δv (the usual multiple-gravity-assist measure), km/s.
    #[default]
    TotalDvWithLaunchVinf,
    /// Spacecraft Δv only, with C3 held under the design's limit, km/s.
    SpacecraftDv,
    /// Mass delivered with the launch vehicle (maximised), kg.
    DeliveredMass,
    /// Launch C3 (minimised), km²/s².
    LaunchC3,
    /// Total time of flight (minimised), days.
    TimeOfFlight,
}

impl Objective {
    /// Every objective, for menus.
    pub const ALL: [Objective; 5] = [
        Objective::TotalDvWithLaunchVinf,
        Objective::SpacecraftDv,
        Objective::DeliveredMass,
        Objective::LaunchC3,
        Objective::TimeOfFlight,
    ];

    /// Words for tables and menus.
    pub fn label(self) -> &'static str {
        match self {
            Objective::TotalDvWithLaunchVinf => "launch v∞ + spacecraft Δv",
            Objective::SpacecraftDv => "spacecraft Δv",
            Objective::DeliveredMass => "delivered mass",
            Objective::LaunchC3 => "launch C3",
            Objective::TimeOfFlight => "time of flight",
        }
    }

    /// Unit of the value as a designer reads it.
    pub fn unit(self) -> &'static str {
        match self {
            Objective::TotalDvWithLaunchVinf | Objective::SpacecraftDv => "km/s",
            Objective::DeliveredMass => "kg",
            Objective::LaunchC3 => "km²/s²",
            Objective::TimeOfFlight => "days",
        }
    }

    /// Decimals that show the value to its useful precision.
    pub fn decimals(self) -> usize {
        match self {
            Objective::TotalDvWithLaunchVinf | Objective::SpacecraftDv => 4,
            Objective::DeliveredMass => 1,
            Objective::LaunchC3 => 3,
            Objective::TimeOfFlight => 2,
        }
    }

    /// True when a launch vehicle table is needed.
    pub fn needs_vehicle(self) -> bool {
        self == Objective::DeliveredMass
    }

    /// The score as a designer reads it (delivered mass positive again).
    pub fn display_value(self, score: f64) -> f64 {
        if self == Objective::DeliveredMass {
            -score
        } else {
            score
        }
    }

    /// A score as text with its unit, e.g. `7.8852 km/s`.
    pub fn text(self, score: f64) -> String {
        if !score.is_finite() {
            return "no value (the tour cannot be evaluated)".into();
        }
        format!(
            "{:.*} {}",
            self.decimals(),
            self.display_value(score),
            self.unit()
        )
    }
}

/// The ephemeris model a design uses.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize, Default)]
pub enum EphemerisChoice {
    /// JPL approximate Keplerian elements 1800-2050 (Standish) with the catalogue's constants.
    #[default]
    MeanElements,
    /// The published multiple-gravity-assist benchmark's analytic model and constants.
    MgaBenchmark,
    /// A JPL development ephemeris (DE421, DE440, ...) from a SPICE SPK kernel file.
    Kernel(KernelRef),
}

/// Where a design's SPK kernel is: a path as written in the file (relative to the design file's
/// folder, or absolute), or empty for the default kernel of the settings (`TOURWRIGHT_KERNEL`).
#[derive(Clone, Debug, Serialize, Deserialize, Default)]
#[serde(deny_unknown_fields)]
pub struct KernelRef {
    /// The path as written.
    pub path: String,
    /// The folder a relative path is taken from (the design file's folder; the working folder
    /// when none). Not written to files.
    #[serde(skip)]
    pub base: Option<std::path::PathBuf>,
}

impl PartialEq for KernelRef {
    fn eq(&self, other: &Self) -> bool {
        self.path == other.path
    }
}
impl Eq for KernelRef {}

impl KernelRef {
    /// A kernel at `path` as given (relative to the working folder when relative).
    pub fn new(path: impl Into<String>) -> KernelRef {
        KernelRef {
            path: path.into(),
            base: None,
        }
    }

    /// The file to open: the path against its base, or the default kernel when empty.
    pub fn resolved(&self) -> Option<std::path::PathBuf> {
        if self.path.trim().is_empty() {
            return tourwright_astro::kernel::default_kernel();
        }
        let p = std::path::Path::new(&self.path);
        Some(match &self.base {
            Some(b) if p.is_relative() => b.join(p),
            _ => p.to_path_buf(),
        })
    }
}

impl EphemerisChoice {
    /// True for the default (not written to files).
    pub fn is_default(&self) -> bool {
        *self == EphemerisChoice::default()
    }

    /// Every choice with its command-line name.
    pub const NAMED: [(&'static str, EphemerisChoice); 2] = [
        ("mean-elements", EphemerisChoice::MeanElements),
        ("mga-benchmark", EphemerisChoice::MgaBenchmark),
    ];

    /// Read a command-line name (`mean-elements`, `mga-benchmark`, `kernel:PATH`, or `kernel`
    /// for the default kernel).
    pub fn parse(s: &str) -> Result<EphemerisChoice, String> {
        let t = s.trim();
        if t.eq_ignore_ascii_case("kernel") {
            return Ok(EphemerisChoice::Kernel(KernelRef::default()));
        }
        if let Some(p) = t.strip_prefix("kernel:") {
            if p.trim().is_empty() {
                return Err("kernel: needs a path, e.g. kernel:de421.bsp".into());
            }
            return Ok(EphemerisChoice::Kernel(KernelRef::new(p)));
        }
        Self::NAMED
            .iter()
            .find(|(n, _)| n.eq_ignore_ascii_case(s.trim()))
            .map(|(_, c)| c.clone())
            .ok_or_else(|| {
                format!(
                    "unknown ephemeris '{s}' (choose {}, kernel:PATH)",
                    Self::NAMED.map(|n| n.0).join(", ")
                )
            })
    }

    /// Words for menus.
    pub fn label(&self) -> String {
        match self {
            EphemerisChoice::MeanElements => "JPL mean elements 1800-2050".into(),
            EphemerisChoice::MgaBenchmark => "MGA benchmark model".into(),
            EphemerisChoice::Kernel(k) if k.path.trim().is_empty() => {
                "JPL kernel (default from settings)".into()
            }
            EphemerisChoice::Kernel(k) => format!("JPL kernel {}", k.path),
        }
    }
}

/// A body defined by heliocentric osculating elements.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct UserBody {
    /// Name used by stops (must not clash with a catalogue planet).
    pub name: String,
    /// Gravitational parameter, km³/s² (0 for a point target).
    #[serde(default)]
    pub mu_km3_s2: f64,
    /// Mean radius, km.
    #[serde(default)]
    pub radius_km: f64,
    /// Elements at their epoch.
    pub elements: OsculatingElements,
}

/// One encounter of the tour.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Stop {
    /// Body name: a catalogue planet or a user body.
    pub body: String,
    /// Epoch of the encounter.
    pub epoch: Epoch,
    /// Swing-by settings (used for stops between launch and arrival).
    #[serde(default, skip_serializing_if = "SwingbySettings::is_default")]
    pub swingby: SwingbySettings,
}

/// How a swing-by is modelled.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, Default)]
#[serde(deny_unknown_fields)]
pub struct SwingbySettings {
    /// Minimum periapsis altitude, km; the body's default when absent.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub min_altitude_km: Option<f64>,
    /// Smallest v∞ a swing-by may have, km/s; [`crate::rules::DEFAULT_MIN_VINF_KM_S`] when absent.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub min_vinf_km_s: Option<f64>,
    /// Design limit on the powered-swing-by impulse, km/s;
    /// [`crate::rules::DEFAULT_MAX_POWERED_DV_KM_S`] when absent.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max_powered_dv_km_s: Option<f64>,
    /// Largest periapsis altitude the optimiser may give a shaped swing-by, km;
    /// [`crate::rules::default_max_altitude_km`] when absent.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max_altitude_km: Option<f64>,
    /// Largest miss of the next body the ballistic leg after a shaped swing-by may have, km;
    /// [`crate::rules::DEFAULT_MAX_MISS_KM`] when absent.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max_miss_km: Option<f64>,
    /// Targeted or shaped.
    #[serde(default)]
    pub mode: SwingbyMode,
}

impl SwingbySettings {
    /// True for the default settings (targeted, body's minimum altitude): not written to files.
    pub fn is_default(&self) -> bool {
        *self == SwingbySettings::default()
    }
}

/// Targeted: the epochs fix both legs and the swing-by is what it must be (powered if needed).
/// Shaped: the designer sets periapsis altitude and aim; the next leg is flown ballistically.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, Default)]
pub enum SwingbyMode {
    /// The legs are Lambert arcs between the stops' epochs.
    #[default]
    Targeted,
    /// The outgoing v∞ follows from the periapsis altitude and the B-plane aim angle.
    Shaped {
        /// Periapsis altitude above the equatorial radius, km.
        altitude_km: f64,
        /// Aim angle in the B-plane, degrees from T towards R.
        aim_deg: f64,
    },
}

/// Lambert options of one leg.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, Default)]
#[serde(deny_unknown_fields)]
pub struct LegOptions {
    /// Complete revolutions about the Sun.
    #[serde(default)]
    pub revolutions: u32,
    /// Branch for multi-revolution arcs.
    #[serde(default)]
    pub branch: Branch,
    /// Sense of motion.
    #[serde(default)]
    pub direction: Direction,
    /// A deep-space manoeuvre on this leg: the leg coasts from its start, makes one impulse and
    /// ends on a Lambert arc (with the options above) to the next stop.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dsm: Option<Dsm>,
}

/// A deep-space manoeuvre (DSM): one impulse on a leg. The leg starts from a known state: on the
/// first leg, the launch body plus the launch v∞ given in `launch`; after a swing-by, the
/// outgoing state of a shaped (unpowered) swing-by. It coasts on a two-body arc to the
/// manoeuvre, then flies a Lambert arc to the next stop at its epoch.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Dsm {
    /// When the impulse is made.
    pub at: DsmTime,
    /// Smallest fraction of the leg's time of flight the optimiser may place it at.
    #[serde(default = "default_min_fraction")]
    pub min_fraction: f64,
    /// Largest fraction.
    #[serde(default = "default_max_fraction")]
    pub max_fraction: f64,
    /// First leg only: the launch v∞ the coast starts from.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub launch: Option<LaunchVinf>,
}

fn default_min_fraction() -> f64 {
    crate::rules::DSM_FRACTION_BOUNDS.0
}

fn default_max_fraction() -> f64 {
    crate::rules::DSM_FRACTION_BOUNDS.1
}

impl Dsm {
    /// A manoeuvre at a fraction of its leg, with the default search bounds.
    pub fn at_fraction(f: f64) -> Self {
        Dsm {
            at: DsmTime::Fraction(f),
            min_fraction: default_min_fraction(),
            max_fraction: default_max_fraction(),
            launch: None,
        }
    }
}

/// When a deep-space manoeuvre is made.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub enum DsmTime {
    /// A fraction (0 < η < 1) of the leg's time of flight after its start: it moves with the
    /// stops' dates.
    Fraction(f64),
    /// A date, which must fall inside the leg.
    Date(Epoch),
}

/// The launch v∞ as a vector: magnitude and the asymptote's direction (right ascension and
/// declination in the Earth mean equator and equinox of J2000), with search bounds.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LaunchVinf {
    /// Magnitude, km/s (C3 = v∞²).
    pub vinf_km_s: f64,
    /// Right ascension of the launch asymptote (RLA), degrees.
    pub rla_deg: f64,
    /// Declination of the launch asymptote (DLA), degrees.
    pub dla_deg: f64,
    /// Smallest magnitude the optimiser may choose, km/s (0 when absent).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub min_vinf_km_s: Option<f64>,
    /// Largest magnitude the optimiser may choose, km/s (from the C3 limit, else 7 km/s).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max_vinf_km_s: Option<f64>,
}

/// Launch limits.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, Default)]
#[serde(deny_unknown_fields)]
pub struct LaunchLimits {
    /// Largest C3 the launch can give, km²/s².
    #[serde(default)]
    pub max_c3_km2_s2: Option<f64>,
    /// Smallest acceptable declination of the launch asymptote, degrees.
    #[serde(default)]
    pub min_dla_deg: Option<f64>,
    /// Largest acceptable declination of the launch asymptote, degrees.
    #[serde(default)]
    pub max_dla_deg: Option<f64>,
}

/// What the spacecraft does at the last stop.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, Default)]
pub enum ArrivalGoal {
    /// Fly past: no arrival manoeuvre.
    #[default]
    FlybyOnly,
    /// Capture into an orbit of this periapsis radius and eccentricity (impulse at periapsis).
    Capture {
        /// Periapsis radius of the capture orbit, km.
        periapsis_radius_km: f64,
        /// Eccentricity of the capture orbit (0 ≤ e < 1).
        eccentricity: f64,
    },
    /// Match the body's velocity (small bodies): Δv = |v∞|.
    Rendezvous,
}

/// Spacecraft masses and main engine.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Spacecraft {
    /// Name of the spacecraft.
    #[serde(default)]
    pub name: String,
    /// Dry mass, kg.
    pub dry_mass_kg: f64,
    /// Propellant loaded, kg.
    pub propellant_kg: f64,
    /// Specific impulse of the main engine, s.
    pub isp_s: f64,
}

impl Default for Spacecraft {
    fn default() -> Self {
        Spacecraft {
            name: String::new(),
            dry_mass_kg: 1000.0,
            propellant_kg: 1000.0,
            isp_s: 320.0,
        }
    }
}

/// One point of a launch-vehicle performance curve.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PerformancePoint {
    /// Launch energy, km²/s².
    pub c3_km2_s2: f64,
    /// Mass injected at that C3, kg.
    pub mass_kg: f64,
}

/// A launch vehicle's C3 -> injected-mass table.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LaunchVehicle {
    /// Name (for invented or illustrative curves, say so in it or in `note`).
    pub name: String,
    /// Where the curve comes from.
    #[serde(default)]
    pub note: String,
    /// Points in increasing C3.
    pub performance: Vec<PerformancePoint>,
}

/// Bounds of a time-of-flight variable, days.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TofBounds {
    /// Shortest, days.
    pub min_days: f64,
    /// Longest, days.
    pub max_days: f64,
}

/// Search bounds: launch window and per-leg time of flight.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SearchBounds {
    /// Earliest launch.
    #[serde(default)]
    pub launch_earliest: Option<Epoch>,
    /// Latest launch.
    #[serde(default)]
    pub launch_latest: Option<Epoch>,
    /// Per-leg TOF bounds; missing legs get ±30% around the design's current TOF.
    #[serde(default)]
    pub leg_tof: Vec<TofBounds>,
    /// Limit on the total flight time, days.
    #[serde(default)]
    pub max_total_tof_days: Option<f64>,
    /// The objective.
    #[serde(default)]
    pub objective: Objective,
    /// Search the revolution count (and branch) of legs that return to the body they left;
    /// `false` keeps every leg as the design sets it (e.g. a benchmark's zero-revolution legs).
    #[serde(default = "yes", skip_serializing_if = "is_yes")]
    pub resonant_revolutions: bool,
}

fn yes() -> bool {
    true
}

fn is_yes(b: &bool) -> bool {
    *b
}

impl Default for SearchBounds {
    fn default() -> Self {
        SearchBounds {
            launch_earliest: None,
            launch_latest: None,
            leg_tof: Vec::new(),
            max_total_tof_days: None,
            objective: Objective::default(),
            resonant_revolutions: true,
        }
    }
}

impl MissionDesign {
    /// An empty two-stop design (Earth to Mars) to start from.
    pub fn new_blank() -> Self {
        let t0 = Epoch::from_utc(2033, 4, 1, 0, 0, 0.0).unwrap_or_default();
        MissionDesign {
            format: FORMAT_TAG.into(),
            version: FORMAT_VERSION,
            name: "Untitled tour".into(),
            notes: String::new(),
            user_bodies: vec![],
            stops: vec![
                Stop {
                    body: "Earth".into(),
                    epoch: t0,
                    swingby: Default::default(),
                },
                Stop {
                    body: "Mars".into(),
                    epoch: t0.plus_days(210.0),
                    swingby: Default::default(),
                },
            ],
            legs: vec![],
            launch: Default::default(),
            arrival: ArrivalGoal::FlybyOnly,
            spacecraft: Default::default(),
            launch_vehicle: None,
            search: Default::default(),
            ephemeris: Default::default(),
            launch_period: None,
        }
    }

    /// Lambert options of leg `k` (defaults when the file lists fewer legs).
    pub fn leg(&self, k: usize) -> LegOptions {
        self.legs.get(k).copied().unwrap_or_default()
    }

    /// True when any leg carries a deep-space manoeuvre.
    pub fn has_dsm(&self) -> bool {
        self.legs.iter().any(|l| l.dsm.is_some())
    }

    /// The sequence as letters, e.g. `E-V-E-J`.
    pub fn sequence_label(&self) -> String {
        self.stops
            .iter()
            .map(|s| {
                Planet::from_name(&s.body)
                    .map(|p| p.letter().to_string())
                    .unwrap_or(s.body.clone())
            })
            .collect::<Vec<_>>()
            .join("-")
    }

    /// Total time of flight, days.
    pub fn total_tof_days(&self) -> f64 {
        match (self.stops.first(), self.stops.last()) {
            (Some(a), Some(b)) => b.epoch.days() - a.epoch.days(),
            _ => 0.0,
        }
    }

    /// Per-leg TOF bounds for search: from the file, else ±30% around the current TOF.
    pub fn tof_bounds(&self, k: usize) -> TofBounds {
        if let Some(b) = self.search.leg_tof.get(k) {
            return *b;
        }
        let tof = match (self.stops.get(k), self.stops.get(k + 1)) {
            (Some(a), Some(b)) => b.epoch.days() - a.epoch.days(),
            _ => 100.0,
        };
        let tof = if tof.is_finite() { tof.max(1.0) } else { 100.0 };
        TofBounds {
            min_days: (tof * 0.7).max(1.0),
            max_days: tof * 1.3 + 1.0,
        }
    }

    /// Launch window for search: from the file, else ±60 days around the current launch.
    pub fn launch_window(&self) -> (Epoch, Epoch) {
        let t0 = self.stops.first().map(|s| s.epoch).unwrap_or_default();
        (
            self.search.launch_earliest.unwrap_or(t0.plus_days(-60.0)),
            self.search.launch_latest.unwrap_or(t0.plus_days(60.0)),
        )
    }

    /// Names of every body a stop may use: the catalogue planets, then the user bodies.
    pub fn body_names(&self) -> Vec<String> {
        Planet::ALL
            .iter()
            .map(|p| p.name().to_string())
            .chain(self.user_bodies.iter().map(|u| u.name.clone()))
            .collect()
    }
}
