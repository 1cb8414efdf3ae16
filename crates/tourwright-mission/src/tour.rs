//! Prepare once, evaluate many: a design resolved into a [`PreparedTour`] (bodies with their
//! ephemerides and constants, limits per stop, legs' Lambert options, epochs as engine time).
//! Evaluation, search and every view work on the prepared tour; no body is looked up by name on
//! a hot path. A prepared tour always has at least two stops.

use std::sync::Arc;

use tourwright_astro::State;
use tourwright_astro::bodies::{BodyData, Planet};
use tourwright_astro::ephemeris::{
    Ephemeris, EphemerisError, EphemerisModel, OsculatingOrbit, PlanetEphemeris,
};
use tourwright_astro::lambert::{Branch, Direction};
use tourwright_astro::time::{Tdb, TimeScale};

use crate::design::{
    ArrivalGoal, Dsm, DsmTime, EphemerisChoice, LaunchLimits, LaunchVehicle, MissionDesign,
    Spacecraft, SwingbyMode,
};
use crate::invalid::Invalid;

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

/// Which body, without its data.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum BodyId {
    /// A catalogue planet.
    Planet(Planet),
    /// A user body, by index into the design's `user_bodies`.
    User(usize),
}

/// Where a body is, under the design's ephemeris model.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum BodyEphemeris {
    /// A catalogue planet.
    Planet(PlanetEphemeris),
    /// A user body on its osculating two-body orbit.
    User(OsculatingOrbit),
}

impl Ephemeris for BodyEphemeris {
    #[inline]
    fn state(&self, t: Tdb) -> Result<State, EphemerisError> {
        match self {
            BodyEphemeris::Planet(p) => p.state(t),
            BodyEphemeris::User(o) => o.state(t),
        }
    }
    fn valid_range(&self) -> (Tdb, Tdb) {
        match self {
            BodyEphemeris::Planet(p) => p.valid_range(),
            BodyEphemeris::User(o) => o.valid_range(),
        }
    }
}

/// A body resolved for evaluation: its name, identity, constants and ephemeris.
#[derive(Clone, Debug, PartialEq)]
pub struct Body {
    /// Name as the design writes it.
    pub name: Arc<str>,
    /// Identity.
    pub id: BodyId,
    /// μ, radius, default minimum altitude, sphere of influence.
    pub data: BodyData,
    /// Where it is.
    pub ephemeris: BodyEphemeris,
}

impl Body {
    /// Heliocentric state at `t`.
    #[inline]
    pub fn state(&self, t: Tdb) -> Result<State, EphemerisError> {
        self.ephemeris.state(t)
    }

    /// Mean heliocentric distance (semi-major axis, or perihelion distance for open orbits), km.
    pub fn mean_distance_km(&self) -> f64 {
        match &self.ephemeris {
            BodyEphemeris::Planet(p) => p.a_km(),
            BodyEphemeris::User(o) => {
                let e = &o.elements;
                let q = e.q_au * o.au_km();
                if e.e < 1.0 { q / (1.0 - e.e) } else { q }
            }
        }
    }

    /// The sequence letter of a planet (E, V, J...) or the user body's name.
    pub fn letter(&self) -> String {
        match self.id {
            BodyId::Planet(p) => p.letter().to_string(),
            BodyId::User(_) => self.name.to_string(),
        }
    }
}

/// Every body a design can name, resolved once under the design's ephemeris model.
#[derive(Clone, Debug, Default)]
pub struct Catalog {
    model: EphemerisModel,
    users: Vec<Body>,
}

impl Catalog {
    /// The catalogue of a design: the planets under its ephemeris model and its user bodies.
    pub fn of(d: &MissionDesign) -> Result<Catalog, Invalid> {
        let model = match &d.ephemeris {
            EphemerisChoice::MeanElements => EphemerisModel::MeanElements,
            EphemerisChoice::MgaBenchmark => EphemerisModel::MgaBenchmark,
            EphemerisChoice::Kernel(k) => {
                let path = k.resolved().ok_or_else(|| Invalid {
                    field: "ephemeris".into(),
                    reason: "no default kernel: set one in the settings or TOURWRIGHT_KERNEL, \
                             or give the kernel's path"
                        .into(),
                })?;
                let kernel =
                    tourwright_astro::kernel::SpkKernel::open(&path).map_err(|e| Invalid {
                        field: "ephemeris".into(),
                        reason: e.to_string(),
                    })?;
                EphemerisModel::Kernel(kernel)
            }
        };
        // User bodies move in the model's solar system: its μ☉ and its AU (the benchmark model
        // has its own), not the program's.
        let (mu_sun, au_km) = (model.mu_sun(), model.au_km());
        let mut users = Vec::with_capacity(d.user_bodies.len());
        for (i, u) in d.user_bodies.iter().enumerate() {
            let orbit =
                OsculatingOrbit::with_constants(u.elements, mu_sun, au_km).map_err(|e| {
                    Invalid {
                        field: format!("user_bodies[{i}].elements"),
                        reason: e.to_string(),
                    }
                })?;
            let mu = u.mu_km3_s2;
            let a = if u.elements.e < 1.0 {
                u.elements.q_au * au_km / (1.0 - u.elements.e)
            } else {
                0.0
            };
            let soi = if mu > 0.0 && a > 0.0 {
                a * (mu / mu_sun).powf(0.4)
            } else {
                0.0
            };
            users.push(Body {
                name: u.name.as_str().into(),
                id: BodyId::User(i),
                data: BodyData {
                    mu,
                    radius_km: u.radius_km,
                    min_altitude_km: 0.0,
                    soi_km: soi,
                },
                ephemeris: BodyEphemeris::User(orbit),
            });
        }
        Ok(Catalog { model, users })
    }

    /// The ephemeris model in use.
    pub fn model(&self) -> &EphemerisModel {
        &self.model
    }

    /// A body by name: catalogue planets first (name or sequence letter), then user bodies
    /// (case-insensitive). A planet the model does not carry is `None`.
    pub fn body(&self, name: &str) -> Option<Body> {
        if let Some(p) = Planet::from_name(name) {
            return self.planet(p).ok();
        }
        self.users
            .iter()
            .find(|b| b.name.eq_ignore_ascii_case(name.trim()))
            .cloned()
    }

    /// A catalogue planet under the model.
    pub fn planet(&self, p: Planet) -> Result<Body, EphemerisError> {
        Ok(Body {
            name: p.name().into(),
            id: BodyId::Planet(p),
            data: self.model.planet_data(p),
            ephemeris: BodyEphemeris::Planet(self.model.planet(p)?),
        })
    }

    /// The user bodies.
    pub fn user_bodies(&self) -> &[Body] {
        &self.users
    }
}

/// One stop of a prepared tour.
#[derive(Clone, Debug, PartialEq)]
pub struct TourStop {
    /// The body.
    pub body: Body,
    /// Launch, swing-by or arrival.
    pub kind: StopKind,
    /// Epoch.
    pub t: Tdb,
    /// The scale the design writes this epoch in (kept when a search writes epochs back).
    pub scale: TimeScale,
    /// How the swing-by is modelled (launch and arrival: targeted).
    pub mode: SwingbyMode,
    /// Minimum periapsis altitude in force, km.
    pub min_altitude_km: f64,
    /// Smallest v∞ a swing-by here may have, km/s.
    pub min_vinf_km_s: f64,
    /// Design limit on the powered-swing-by impulse here, km/s.
    pub max_powered_dv_km_s: f64,
    /// Largest periapsis altitude a search may give a shaped swing-by here, km.
    pub max_altitude_km: f64,
    /// Largest miss of the next body the ballistic leg after this shaped swing-by may have, km.
    pub max_miss_km: f64,
}

/// Lambert options of one leg, and its deep-space manoeuvre.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct TourLeg {
    /// Complete revolutions (of the arc after the manoeuvre, when there is one).
    pub revs: u32,
    /// Branch for multi-revolution arcs.
    pub branch: Branch,
    /// Sense of motion.
    pub direction: Direction,
    /// The deep-space manoeuvre, if any.
    pub dsm: Option<TourDsm>,
}

/// A deep-space manoeuvre resolved for evaluation.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TourDsm {
    /// When it is made.
    pub at: DsmWhen,
    /// First leg: the launch v∞ (ecliptic J2000, km/s) the coast starts from.
    pub launch_vinf: Option<tourwright_astro::Vec3>,
}

/// When a manoeuvre is made, as the engine reads it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum DsmWhen {
    /// Fraction of the leg's time of flight.
    Fraction(f64),
    /// An instant (must lie inside the leg).
    At(Tdb),
}

impl DsmWhen {
    /// The fraction of a leg from `t0` to `t1` (unclamped; outside (0, 1) the date is off the leg).
    #[inline]
    pub fn fraction(&self, t0: Tdb, t1: Tdb) -> f64 {
        match *self {
            DsmWhen::Fraction(f) => f,
            DsmWhen::At(t) => (t.0 - t0.0) / (t1.0 - t0.0),
        }
    }
}

/// A design resolved for evaluation.
#[derive(Clone, Debug, PartialEq)]
pub struct PreparedTour {
    /// Design name.
    pub name: String,
    /// Stops, at least two.
    pub stops: Vec<TourStop>,
    /// Legs, one fewer than stops.
    pub legs: Vec<TourLeg>,
    /// Launch limits.
    pub launch: LaunchLimits,
    /// Arrival goal.
    pub arrival: ArrivalGoal,
    /// Spacecraft.
    pub spacecraft: Spacecraft,
    /// Launch vehicle table.
    pub vehicle: Option<LaunchVehicle>,
    /// Name of the ephemeris model (for reports).
    pub ephemeris_name: String,
    /// The ephemeris model (for views that draw planets not in the tour).
    pub model: EphemerisModel,
    /// The heliocentric gravitational parameter of the model, km³/s².
    pub mu_sun: f64,
    /// The design's limit on the total time of flight, days.
    pub max_total_tof_days: Option<f64>,
}

impl PreparedTour {
    /// Resolve a design. Fails with the field and the reason when a body is unknown, an epoch is
    /// outside the ephemeris or the tour has fewer than two stops.
    pub fn prepare(d: &MissionDesign) -> Result<PreparedTour, Invalid> {
        let catalog = Catalog::of(d)?;
        Self::prepare_with(d, &catalog)
    }

    /// Resolve a design with a catalogue already built.
    pub fn prepare_with(d: &MissionDesign, catalog: &Catalog) -> Result<PreparedTour, Invalid> {
        let n = d.stops.len();
        if n < 2 {
            return Err(Invalid {
                field: "stops".into(),
                reason: "a tour needs at least a launch and an arrival stop".into(),
            });
        }
        let mut stops = Vec::with_capacity(n);
        for (k, s) in d.stops.iter().enumerate() {
            let body = catalog.body(&s.body).ok_or_else(|| Invalid {
                field: format!("stops[{k}].body"),
                reason: format!(
                    "unknown body '{}' (not a catalogue planet nor a user body)",
                    s.body
                ),
            })?;
            let kind = StopKind::of(k, n);
            let min_altitude_km = s
                .swingby
                .min_altitude_km
                .unwrap_or(body.data.min_altitude_km);
            stops.push(TourStop {
                kind,
                t: s.epoch.tdb(),
                scale: s.epoch.scale(),
                mode: if kind == StopKind::SwingBy {
                    s.swingby.mode
                } else {
                    SwingbyMode::Targeted
                },
                min_altitude_km,
                min_vinf_km_s: s
                    .swingby
                    .min_vinf_km_s
                    .unwrap_or(crate::rules::DEFAULT_MIN_VINF_KM_S),
                max_powered_dv_km_s: s
                    .swingby
                    .max_powered_dv_km_s
                    .unwrap_or(crate::rules::DEFAULT_MAX_POWERED_DV_KM_S),
                max_altitude_km: s
                    .swingby
                    .max_altitude_km
                    .unwrap_or(crate::rules::default_max_altitude_km(body.data.radius_km)),
                max_miss_km: s
                    .swingby
                    .max_miss_km
                    .unwrap_or(crate::rules::DEFAULT_MAX_MISS_KM),
                body,
            });
        }
        let mut legs = Vec::with_capacity(n - 1);
        for k in 0..n - 1 {
            let o = d.leg(k);
            legs.push(TourLeg {
                revs: o.revolutions,
                branch: o.branch,
                direction: o.direction,
                dsm: match o.dsm {
                    Some(m) => Some(prepare_dsm(d, k, &m)?),
                    None => None,
                },
            });
        }
        Ok(PreparedTour {
            name: d.name.clone(),
            stops,
            legs,
            launch: d.launch,
            arrival: d.arrival,
            spacecraft: d.spacecraft.clone(),
            vehicle: d.launch_vehicle.clone(),
            ephemeris_name: catalog.model().name(),
            model: catalog.model().clone(),
            mu_sun: catalog.model().mu_sun(),
            max_total_tof_days: d.search.max_total_tof_days,
        })
    }

    /// True when any leg carries a deep-space manoeuvre.
    pub fn has_dsm(&self) -> bool {
        self.legs.iter().any(|l| l.dsm.is_some())
    }

    /// A two-stop tour between two bodies (window maps, direct transfers) under `model`.
    pub fn two_stop(
        model: &EphemerisModel,
        from: Body,
        to: Body,
        t0: Tdb,
        t1: Tdb,
        leg: TourLeg,
    ) -> PreparedTour {
        let stop = |body: Body, kind, t| TourStop {
            min_altitude_km: body.data.min_altitude_km,
            min_vinf_km_s: crate::rules::DEFAULT_MIN_VINF_KM_S,
            max_powered_dv_km_s: crate::rules::DEFAULT_MAX_POWERED_DV_KM_S,
            max_altitude_km: crate::rules::default_max_altitude_km(body.data.radius_km),
            max_miss_km: crate::rules::DEFAULT_MAX_MISS_KM,
            body,
            kind,
            t,
            scale: TimeScale::Utc,
            mode: SwingbyMode::Targeted,
        };
        PreparedTour {
            name: String::new(),
            stops: vec![
                stop(from, StopKind::Launch, t0),
                stop(to, StopKind::Arrival, t1),
            ],
            legs: vec![leg],
            launch: LaunchLimits::default(),
            arrival: ArrivalGoal::FlybyOnly,
            spacecraft: Spacecraft::default(),
            vehicle: None,
            ephemeris_name: model.name(),
            model: model.clone(),
            mu_sun: model.mu_sun(),
            max_total_tof_days: None,
        }
    }

    /// Number of stops.
    pub fn len(&self) -> usize {
        self.stops.len()
    }

    /// Never true: a prepared tour has at least two stops.
    pub fn is_empty(&self) -> bool {
        self.stops.is_empty()
    }

    /// The sequence as letters, e.g. `E-V-E-J`.
    pub fn sequence_label(&self) -> String {
        self.stops
            .iter()
            .map(|s| s.body.letter())
            .collect::<Vec<_>>()
            .join("-")
    }

    /// Total time of flight, days.
    pub fn total_tof_days(&self) -> f64 {
        (self.stops[self.stops.len() - 1].t.0 - self.stops[0].t.0) / 86_400.0
    }

    /// Set the launch epoch and each leg's time of flight (days): the search variables.
    pub fn set_schedule(&mut self, launch: Tdb, tof_days: &[f64]) {
        let mut t = launch;
        self.stops[0].t = t;
        for (stop, tof) in self.stops.iter_mut().skip(1).zip(tof_days) {
            t = t.plus_days(*tof);
            stop.t = t;
        }
    }
}

/// Check a leg's manoeuvre against its leg and resolve it: a first leg needs the launch v∞; a
/// later leg needs a shaped swing-by to start from; the fraction and its bounds lie in (0, 1).
pub(crate) fn prepare_dsm(d: &MissionDesign, k: usize, m: &Dsm) -> Result<TourDsm, Invalid> {
    let bad = |field: &str, reason: String| Invalid {
        field: format!("legs[{k}].dsm{field}"),
        reason,
    };
    if !(m.min_fraction > 0.0 && m.min_fraction <= m.max_fraction && m.max_fraction < 1.0) {
        return Err(bad(
            ".min_fraction",
            "need 0 < min_fraction ≤ max_fraction < 1".into(),
        ));
    }
    let at = match m.at {
        DsmTime::Fraction(f) => {
            if !(f > 0.0 && f < 1.0) {
                return Err(bad(
                    ".at",
                    format!("the fraction {f} of the leg must lie strictly between 0 and 1"),
                ));
            }
            DsmWhen::Fraction(f)
        }
        DsmTime::Date(e) => DsmWhen::At(e.tdb()),
    };
    let launch_vinf = if k == 0 {
        let Some(l) = m.launch else {
            return Err(bad(
                "",
                "a manoeuvre on the first leg needs the launch v∞ it starts from (launch: (vinf_km_s, rla_deg, dla_deg))".into(),
            ));
        };
        if !(l.vinf_km_s.is_finite()
            && l.vinf_km_s >= 0.0
            && l.rla_deg.is_finite()
            && l.dla_deg.abs() <= 90.0)
        {
            return Err(bad(
                ".launch",
                "need a finite v∞ ≥ 0 km/s, a finite RLA and a DLA within ±90°".into(),
            ));
        }
        Some(crate::launch::asymptote_vector(
            l.vinf_km_s,
            l.rla_deg,
            l.dla_deg,
        ))
    } else {
        if m.launch.is_some() {
            return Err(bad(".launch", "only the first leg starts at launch".into()));
        }
        if d.stops[k].swingby.mode == SwingbyMode::Targeted {
            return Err(bad(
                "",
                format!(
                    "the leg starts at stop {} ({}), a targeted swing-by; a manoeuvre leg starts from a shaped swing-by (set its altitude and aim)",
                    k + 1,
                    d.stops[k].body
                ),
            ));
        }
        None
    };
    Ok(TourDsm { at, launch_vinf })
}
