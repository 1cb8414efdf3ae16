//! Edits of a design as values. The workbench's panels, menus and shortcuts produce them; the
//! document applies them one at a time, each as one undo step (or as part of a gesture). An edit
//! keeps the design's invariants (legs and search bounds follow the stops) and refuses what it
//! cannot do with a reason instead of panicking.

use tourwright_astro::time::Epoch;

use crate::design::{
    ArrivalGoal, Dsm, EphemerisChoice, LaunchLimits, LaunchPeriodRequest, LaunchVehicle,
    LaunchVinf, LegOptions, MissionDesign, Objective, SearchBounds, Spacecraft, Stop, SwingbyMode,
    UserBody,
};
use crate::evaluate::Evaluation;

/// A search result to write into a design: every stop's epoch, every leg's options (revolution
/// choices and manoeuvres included) and, per stop, a swing-by mode to set (`None` keeps it).
#[derive(Clone, Debug, PartialEq, Default)]
pub struct Schedule {
    /// One epoch per stop.
    pub epochs: Vec<Epoch>,
    /// One set of options per leg.
    pub legs: Vec<LegOptions>,
    /// Per stop: the swing-by mode found (shaped swing-bys that start a manoeuvre leg).
    pub modes: Vec<Option<SwingbyMode>>,
}

impl Schedule {
    /// Everything a search may change in `d`, as it stands: the schedule that, applied to `d`,
    /// leaves it unchanged.
    pub fn of(d: &MissionDesign) -> Schedule {
        let n = d.stops.len();
        Schedule {
            epochs: d.stops.iter().map(|s| s.epoch).collect(),
            legs: (0..n.saturating_sub(1)).map(|k| d.leg(k)).collect(),
            modes: d
                .stops
                .iter()
                .enumerate()
                .map(|(k, s)| (k > 0 && k + 1 < n).then_some(s.swingby.mode))
                .collect(),
        }
    }
}

/// What a search result depends on beyond its dates: the bodies in order, which swing-bys are
/// shaped, which legs carry a manoeuvre, the ephemeris and the user bodies. A result computed
/// for one shape of tour cannot be applied to another.
#[derive(Clone, Debug, PartialEq)]
pub struct TourShape {
    /// Body names in order.
    pub bodies: Vec<String>,
    /// Per stop: a shaped swing-by.
    pub shaped: Vec<bool>,
    /// Per leg: a deep-space manoeuvre.
    pub dsm: Vec<bool>,
    /// The ephemeris model.
    pub ephemeris: EphemerisChoice,
    /// The user bodies.
    pub user_bodies: Vec<UserBody>,
}

impl TourShape {
    /// The shape of a design.
    pub fn of(d: &MissionDesign) -> TourShape {
        TourShape {
            bodies: d.stops.iter().map(|s| s.body.clone()).collect(),
            shaped: d
                .stops
                .iter()
                .map(|s| matches!(s.swingby.mode, SwingbyMode::Shaped { .. }))
                .collect(),
            dsm: (0..d.stops.len().saturating_sub(1))
                .map(|k| d.leg(k).dsm.is_some())
                .collect(),
            ephemeris: d.ephemeris.clone(),
            user_bodies: d.user_bodies.clone(),
        }
    }

    /// Why a result for `self` does not fit a design of shape `now`, in words; `None` when it
    /// fits.
    pub fn mismatch(&self, now: &TourShape) -> Option<String> {
        let seq = |b: &[String]| b.join("-");
        if self.bodies != now.bodies {
            return Some(format!(
                "it was computed for the tour {} and the tour is now {}",
                seq(&self.bodies),
                seq(&now.bodies)
            ));
        }
        if self.shaped != now.shaped {
            return Some("a swing-by changed between targeted and shaped since".into());
        }
        if self.dsm != now.dsm {
            return Some("a deep-space manoeuvre was added or removed since".into());
        }
        if self.ephemeris != now.ephemeris {
            return Some(format!(
                "it was computed with {} and the design now uses {}",
                self.ephemeris.label(),
                now.ephemeris.label()
            ));
        }
        if self.user_bodies != now.user_bodies {
            return Some("the user bodies changed since".into());
        }
        None
    }
}

/// One change to a design.
#[derive(Clone, Debug, PartialEq)]
pub enum Edit {
    /// Rename the design.
    SetName(String),
    /// Replace the notes.
    SetNotes(String),
    /// Change a stop's body.
    SetBody {
        /// Stop index.
        stop: usize,
        /// Body name.
        body: String,
    },
    /// Set a stop's epoch.
    SetEpoch {
        /// Stop index.
        stop: usize,
        /// New epoch.
        epoch: Epoch,
    },
    /// Move a stop's epoch by a number of days.
    ShiftEpoch {
        /// Stop index.
        stop: usize,
        /// Days (any sign).
        days: f64,
    },
    /// Set every stop's epoch at once.
    SetEpochs(Vec<Epoch>),
    /// Apply a search result: every stop's epoch, every leg's options, the swing-bys it shaped.
    ApplySchedule(Schedule),
    /// Set both ends of a leg (a window-map click).
    SetLegEpochs {
        /// Leg index.
        leg: usize,
        /// Departure epoch.
        depart: Epoch,
        /// Arrival epoch.
        arrive: Epoch,
    },
    /// Insert a stop after this one (same body, half-way to the next stop).
    InsertStopAfter(usize),
    /// Remove a stop (a tour keeps at least two).
    RemoveStop(usize),
    /// Swap a stop's body and settings with its neighbour, keeping the dates in time order.
    MoveStop {
        /// Stop index.
        stop: usize,
        /// Towards the launch (true) or the arrival (false).
        earlier: bool,
    },
    /// Set how a swing-by is modelled.
    SetSwingbyMode {
        /// Stop index.
        stop: usize,
        /// The mode.
        mode: SwingbyMode,
    },
    /// Set or clear a swing-by's minimum altitude.
    SetMinAltitude {
        /// Stop index.
        stop: usize,
        /// Km, or `None` for the body's default.
        km: Option<f64>,
    },
    /// Set a leg's Lambert options.
    SetLeg {
        /// Leg index.
        leg: usize,
        /// Options.
        options: LegOptions,
    },
    /// Put a deep-space manoeuvre on a leg and, in the same step, set the mode of the swing-by
    /// the leg starts from (a manoeuvre leg starts from a shaped swing-by). See [`Edit::add_dsm`].
    AddDsm {
        /// Leg index.
        leg: usize,
        /// The manoeuvre.
        dsm: Dsm,
        /// The start swing-by's new mode, if it changes.
        start: Option<SwingbyMode>,
    },
    /// Change or remove a leg's deep-space manoeuvre.
    SetDsm {
        /// Leg index.
        leg: usize,
        /// The manoeuvre, or `None` to remove it.
        dsm: Option<Dsm>,
    },
    /// Set the arrival goal.
    SetArrival(ArrivalGoal),
    /// Set the launch limits.
    SetLaunchLimits(LaunchLimits),
    /// Set the spacecraft.
    SetSpacecraft(Spacecraft),
    /// Set or remove the launch-vehicle table.
    SetVehicle(Option<LaunchVehicle>),
    /// Set the search objective.
    SetObjective(Objective),
    /// Set the search bounds (launch window, legs' times of flight, total time of flight) and
    /// objective.
    SetSearch(SearchBounds),
    /// Choose the ephemeris model.
    SetEphemeris(EphemerisChoice),
    /// Ask for a launch period (or none): how many opportunities, how far apart, and whether
    /// the arrival is held.
    SetLaunchPeriod(Option<LaunchPeriodRequest>),
    /// Replace the whole design.
    Replace(Box<MissionDesign>),
}

/// Why an edit was refused.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum EditError {
    /// No such stop.
    #[error("there is no stop {0}")]
    NoStop(usize),
    /// No such leg.
    #[error("there is no leg {0}")]
    NoLeg(usize),
    /// The tour would have fewer than two stops.
    #[error("a tour keeps at least a launch and an arrival")]
    TooFewStops,
    /// The stop cannot move further.
    #[error("the stop cannot move further")]
    CannotMove,
    /// The epochs do not fit the stops.
    #[error("{0}")]
    Epochs(&'static str),
    /// A deep-space manoeuvre's rules (start state, place on the leg).
    #[error("{0}")]
    Dsm(&'static str),
    /// The ephemeris source cannot be used (the kernel's file, body or range in the text).
    #[error("{0}")]
    Ephemeris(String),
    /// The result would not be a valid design (field path and reason).
    #[error("{0}")]
    Invalid(String),
}

impl Edit {
    /// A short description for the status bar and undo history.
    pub fn label(&self) -> &'static str {
        match self {
            Edit::SetName(_) => "rename",
            Edit::SetNotes(_) => "notes",
            Edit::SetBody { .. } => "change body",
            Edit::SetEpoch { .. } | Edit::ShiftEpoch { .. } => "change date",
            Edit::SetEpochs(_) | Edit::ApplySchedule { .. } => "apply dates",
            Edit::SetLegEpochs { .. } => "set leg dates",
            Edit::InsertStopAfter(_) => "insert stop",
            Edit::RemoveStop(_) => "remove stop",
            Edit::MoveStop { .. } => "move stop",
            Edit::SetSwingbyMode { .. } => "swing-by mode",
            Edit::SetMinAltitude { .. } => "minimum altitude",
            Edit::SetLeg { .. } => "leg options",
            Edit::AddDsm { .. } => "add manoeuvre",
            Edit::SetDsm { dsm: None, .. } => "remove manoeuvre",
            Edit::SetDsm { .. } => "move manoeuvre",
            Edit::SetArrival(_) => "arrival goal",
            Edit::SetLaunchLimits(_) => "launch limits",
            Edit::SetSpacecraft(_) => "spacecraft",
            Edit::SetVehicle(_) => "launch vehicle",
            Edit::SetObjective(_) => "objective",
            Edit::SetSearch(_) => "search bounds",
            Edit::SetEphemeris(_) => "ephemeris",
            Edit::SetLaunchPeriod(_) => "launch period",
            Edit::Replace(_) => "replace design",
        }
    }

    /// Apply to `d`. On an error `d` is unchanged. The result passes the same validation as a
    /// file (`files::validate`): an edit can never make a design that would not load.
    pub fn apply(self, d: &mut MissionDesign) -> Result<(), EditError> {
        let mut next = d.clone();
        self.apply_unchecked(&mut next)?;
        crate::files::validate(&next).map_err(|i| EditError::Invalid(i.to_string()))?;
        *d = next;
        Ok(())
    }

    fn apply_unchecked(self, d: &mut MissionDesign) -> Result<(), EditError> {
        let n = d.stops.len();
        let stop = |k: usize| {
            if k < n {
                Ok(k)
            } else {
                Err(EditError::NoStop(k))
            }
        };
        match self {
            Edit::SetName(s) => d.name = s,
            Edit::SetNotes(s) => d.notes = s,
            Edit::SetBody { stop: k, body } => d.stops[stop(k)?].body = body,
            Edit::SetEpoch { stop: k, epoch } => d.stops[stop(k)?].epoch = epoch,
            Edit::ShiftEpoch { stop: k, days } => {
                let k = stop(k)?;
                if !days.is_finite() {
                    return Err(EditError::Epochs("the shift is not a number"));
                }
                d.stops[k].epoch = d.stops[k].epoch.plus_days(days);
            }
            Edit::SetEpochs(v) => {
                if v.len() != n {
                    return Err(EditError::Epochs(
                        "the stops changed since those dates were computed",
                    ));
                }
                for (s, e) in d.stops.iter_mut().zip(v) {
                    s.epoch = e;
                }
            }
            Edit::ApplySchedule(Schedule {
                epochs,
                legs,
                modes,
            }) => {
                if epochs.len() != n
                    || legs.len() + 1 != n
                    || !(modes.is_empty() || modes.len() == n)
                {
                    return Err(EditError::Epochs(
                        "the stops changed since those dates were computed",
                    ));
                }
                let mut next = d.clone();
                for (s, e) in next.stops.iter_mut().zip(epochs) {
                    s.epoch = e;
                }
                for (s, m) in next.stops.iter_mut().zip(modes) {
                    if let Some(m) = m {
                        s.swingby.mode = m;
                    }
                }
                next.legs = legs;
                trim_legs(&mut next);
                check_dsms(&next)?;
                *d = next;
            }
            Edit::SetLegEpochs {
                leg,
                depart,
                arrive,
            } => {
                if leg + 1 >= n {
                    return Err(EditError::NoLeg(leg));
                }
                let prev_ok = leg == 0 || d.stops[leg - 1].epoch.tdb().0 < depart.tdb().0;
                let next_ok = leg + 2 >= n || d.stops[leg + 2].epoch.tdb().0 > arrive.tdb().0;
                if !(prev_ok && next_ok && arrive.tdb().0 > depart.tdb().0) {
                    return Err(EditError::Epochs(
                        "those dates would put the stops out of time order",
                    ));
                }
                d.stops[leg].epoch = depart;
                d.stops[leg + 1].epoch = arrive;
            }
            Edit::InsertStopAfter(k) => {
                let k = stop(k)?;
                let t = d.stops[k].epoch;
                let epoch = match d.stops.get(k + 1) {
                    Some(next) => {
                        let dt = next.epoch.tdb().0 - t.tdb().0;
                        t.plus_seconds(0.5 * dt)
                    }
                    None => t.plus_days(200.0),
                };
                let body = inserted_body(&d.stops[k].body, d.stops.get(k + 1).map(|s| &*s.body));
                d.stops.insert(
                    k + 1,
                    Stop {
                        body,
                        epoch,
                        swingby: Default::default(),
                    },
                );
                // The leg k splits in two: its options go to the first half.
                if k < d.legs.len() {
                    d.legs.insert(k + 1, LegOptions::default());
                }
                split_leg_bounds(d, k);
                drop_orphan_dsms(d);
            }
            Edit::RemoveStop(k) => {
                let k = stop(k)?;
                if n <= 2 {
                    return Err(EditError::TooFewStops);
                }
                d.stops.remove(k);
                // Legs k-1 and k merge (or the first/last leg goes).
                let leg = k.min(n - 2);
                if leg < d.legs.len() {
                    d.legs.remove(leg);
                }
                d.search.leg_tof.clear();
                drop_orphan_dsms(d);
            }
            Edit::MoveStop { stop: k, earlier } => {
                let k = stop(k)?;
                let j = if earlier {
                    k.checked_sub(1).ok_or(EditError::CannotMove)?
                } else if k + 1 < n {
                    k + 1
                } else {
                    return Err(EditError::CannotMove);
                };
                let (a, b) = (d.stops[k].clone(), d.stops[j].clone());
                d.stops[k] = Stop {
                    epoch: a.epoch,
                    ..b
                };
                d.stops[j] = Stop {
                    epoch: b.epoch,
                    ..a
                };
                drop_orphan_dsms(d);
            }
            Edit::SetSwingbyMode { stop: k, mode } => {
                let k = stop(k)?;
                if mode == SwingbyMode::Targeted && d.leg(k).dsm.is_some() && k > 0 {
                    return Err(EditError::Dsm(
                        "the next leg has a deep-space manoeuvre, which starts from a shaped swing-by; remove the manoeuvre first",
                    ));
                }
                d.stops[k].swingby.mode = mode;
            }
            Edit::SetMinAltitude { stop: k, km } => d.stops[stop(k)?].swingby.min_altitude_km = km,
            Edit::SetLeg { leg, options } => {
                if leg + 1 >= n {
                    return Err(EditError::NoLeg(leg));
                }
                let mut next = d.clone();
                while next.legs.len() <= leg {
                    next.legs.push(LegOptions::default());
                }
                next.legs[leg] = options;
                trim_legs(&mut next);
                check_dsms(&next)?;
                *d = next;
            }
            Edit::AddDsm { leg, dsm, start } => {
                if leg + 1 >= n {
                    return Err(EditError::NoLeg(leg));
                }
                let mut next = d.clone();
                if let Some(m) = start {
                    next.stops[leg].swingby.mode = m;
                }
                while next.legs.len() <= leg {
                    next.legs.push(LegOptions::default());
                }
                next.legs[leg].dsm = Some(dsm);
                check_dsms(&next)?;
                *d = next;
            }
            Edit::SetDsm { leg, dsm } => {
                if leg + 1 >= n {
                    return Err(EditError::NoLeg(leg));
                }
                let mut next = d.clone();
                while next.legs.len() <= leg {
                    next.legs.push(LegOptions::default());
                }
                next.legs[leg].dsm = dsm;
                trim_legs(&mut next);
                check_dsms(&next)?;
                *d = next;
            }
            Edit::SetArrival(a) => d.arrival = a,
            Edit::SetLaunchLimits(l) => d.launch = l,
            Edit::SetSpacecraft(s) => d.spacecraft = s,
            Edit::SetVehicle(v) => d.launch_vehicle = v,
            Edit::SetObjective(o) => d.search.objective = o,
            Edit::SetSearch(s) => {
                if s.leg_tof.len() + 1 > n {
                    return Err(EditError::Epochs(
                        "the stops changed since those bounds were set",
                    ));
                }
                d.search = s
            }
            Edit::SetEphemeris(e) => {
                // A kernel is opened and checked before the design changes.
                let mut probe = d.clone();
                probe.ephemeris = e.clone();
                crate::tour::Catalog::of(&probe).map_err(|i| EditError::Ephemeris(i.reason))?;
                d.ephemeris = e
            }
            Edit::SetLaunchPeriod(p) => d.launch_period = p,
            Edit::Replace(x) => *d = *x,
        }
        Ok(())
    }
}

impl Edit {
    /// The edit that adds a manoeuvre at mid-leg to leg `leg`, starting from what the current
    /// evaluation `e` flies: on the first leg the launch v∞ it has now; after a targeted swing-by,
    /// a shaped one with the periapsis altitude and aim it has now (so the tour changes as little
    /// as possible and the manoeuvre absorbs the rest).
    pub fn add_dsm(d: &MissionDesign, e: &Evaluation, leg: usize) -> Result<Edit, EditError> {
        if leg + 1 >= d.stops.len() {
            return Err(EditError::NoLeg(leg));
        }
        let mut dsm = Dsm::at_fraction(0.5);
        let mut start = None;
        if leg == 0 {
            let v = e.stops.first().map(|s| s.vinf_out).unwrap_or_default();
            let (dla, rla) = crate::launch::dla_rla_deg(&v);
            dsm.launch = Some(LaunchVinf {
                vinf_km_s: v.norm(),
                rla_deg: rla,
                dla_deg: dla,
                min_vinf_km_s: None,
                max_vinf_km_s: None,
            });
        } else if d.stops[leg].swingby.mode == SwingbyMode::Targeted {
            let sw = e.stops.get(leg).and_then(|s| s.swingby);
            let min = sw.map(|w| w.min_altitude_km).unwrap_or(300.0);
            let altitude_km = sw
                .and_then(|w| w.altitude_km)
                .filter(|a| a.is_finite())
                .unwrap_or(min.max(1000.0))
                .max(min);
            let aim_deg = sw
                .and_then(|w| w.bplane)
                .map(|b| b.aim.to_degrees())
                .filter(|a| a.is_finite())
                .unwrap_or(0.0);
            start = Some(SwingbyMode::Shaped {
                altitude_km,
                aim_deg,
            });
        }
        Ok(Edit::AddDsm { leg, dsm, start })
    }
}

/// Drop trailing default leg options (files stay short).
fn trim_legs(d: &mut MissionDesign) {
    while d.legs.last() == Some(&LegOptions::default()) {
        d.legs.pop();
    }
}

/// The manoeuvre rules a design must keep: the first leg's manoeuvre carries the launch v∞, a
/// later one starts from a shaped swing-by, fractions lie in (0, 1).
fn check_dsms(d: &MissionDesign) -> Result<(), EditError> {
    for (k, l) in d.legs.iter().enumerate() {
        let Some(m) = l.dsm else { continue };
        if k + 1 >= d.stops.len() {
            return Err(EditError::NoLeg(k));
        }
        if let crate::design::DsmTime::Fraction(f) = m.at {
            if !(f > 0.0 && f < 1.0) {
                return Err(EditError::Dsm(
                    "a manoeuvre lies strictly inside its leg (0 < fraction < 1)",
                ));
            }
        }
        if !(m.min_fraction > 0.0 && m.min_fraction <= m.max_fraction && m.max_fraction < 1.0) {
            return Err(EditError::Dsm(
                "the manoeuvre's search bounds need 0 < min_fraction ≤ max_fraction < 1",
            ));
        }
        if k == 0 && m.launch.is_none() {
            return Err(EditError::Dsm(
                "a manoeuvre on the first leg needs the launch v∞ it starts from",
            ));
        }
        if k > 0 && m.launch.is_some() {
            return Err(EditError::Dsm("only the first leg starts at launch"));
        }
        if k > 0 && d.stops[k].swingby.mode == SwingbyMode::Targeted {
            return Err(EditError::Dsm(
                "a manoeuvre leg starts from a shaped swing-by (set its altitude and aim first)",
            ));
        }
    }
    Ok(())
}

/// After a structural edit, a manoeuvre whose leg no longer starts from a known state (launch v∞
/// on the first leg, a shaped swing-by later) is removed; the edit stays one undo step.
fn drop_orphan_dsms(d: &mut MissionDesign) {
    let n = d.stops.len();
    d.legs.truncate(n.saturating_sub(1));
    for k in 0..d.legs.len() {
        if let Some(m) = d.legs[k].dsm {
            let ok = if k == 0 {
                m.launch.is_some()
            } else {
                m.launch.is_none() && d.stops[k].swingby.mode != SwingbyMode::Targeted
            };
            if !ok {
                d.legs[k].dsm = None;
            }
        }
    }
    trim_legs(d);
}

/// After inserting a stop after `k`, split leg k's search bounds between the two new legs (or
/// drop per-leg bounds when they no longer line up).
fn split_leg_bounds(d: &mut MissionDesign, k: usize) {
    let b = &mut d.search.leg_tof;
    if k < b.len() {
        let half = b[k];
        let h = crate::design::TofBounds {
            min_days: (half.min_days * 0.5).max(1.0),
            max_days: (half.max_days * 0.5).max(2.0),
        };
        b[k] = h;
        b.insert(k + 1, h);
    } else if !b.is_empty() {
        b.clear();
    }
}

/// The body a new stop after `before` (and before `after`, when there is one) gets: the catalogue
/// planet whose orbit is nearest the middle of its neighbours' (the geometric mean of their
/// semi-major axes), never the body of either neighbour — a copy of the same body would make a
/// zero-length return. Among Venus, Earth, Mars and Jupiter, the usual swing-by bodies.
fn inserted_body(before: &str, after: Option<&str>) -> String {
    use tourwright_astro::bodies::Planet;
    use tourwright_astro::ephemeris::MeanElements;
    let a_of = |name: &str| Planet::from_name(name).map(|p| MeanElements::of(p).a_km());
    let target = match (a_of(before), after.and_then(a_of)) {
        (Some(x), Some(y)) => (x * y).sqrt(),
        (Some(x), None) | (None, Some(x)) => x,
        (None, None) => MeanElements::of(Planet::Earth).a_km(),
    };
    let same = |p: Planet| {
        p.name().eq_ignore_ascii_case(before)
            || after.is_some_and(|a| p.name().eq_ignore_ascii_case(a))
    };
    [Planet::Venus, Planet::Earth, Planet::Mars, Planet::Jupiter]
        .into_iter()
        .filter(|&p| !same(p))
        .min_by(|&p, &q| {
            let d = |p: Planet| (MeanElements::of(p).a_km() / target).ln().abs();
            d(p).total_cmp(&d(q))
        })
        .map_or_else(|| before.to_string(), |p| p.name().to_string())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn three_stops() -> MissionDesign {
        let mut d = MissionDesign::new_blank();
        Edit::InsertStopAfter(0).apply(&mut d).unwrap();
        d
    }

    #[test]
    fn an_inserted_stop_is_never_a_copy_of_its_neighbours() {
        // Earth to Jupiter: the new swing-by body sits between them (Mars); after the arrival,
        // something other than Jupiter; between Earth and Venus, neither of them.
        assert_eq!(inserted_body("Earth", Some("Jupiter")), "Mars");
        assert_ne!(inserted_body("Jupiter", None), "Jupiter");
        let b = inserted_body("Earth", Some("Venus"));
        assert!(b != "Earth" && b != "Venus", "{b}");
        // And the design that results evaluates with every leg solved.
        let mut d = MissionDesign::new_blank();
        Edit::InsertStopAfter(0).apply(&mut d).unwrap();
        assert_ne!(d.stops[1].body, d.stops[0].body);
        assert_ne!(d.stops[1].body, d.stops[2].body);
    }

    #[test]
    fn structural_edits_keep_legs_in_step_with_stops() {
        let mut d = three_stops();
        assert_eq!(d.stops.len(), 3);
        Edit::SetLeg {
            leg: 1,
            options: LegOptions {
                revolutions: 1,
                ..Default::default()
            },
        }
        .apply(&mut d)
        .unwrap();
        assert_eq!(d.legs.len(), 2);
        Edit::InsertStopAfter(2).apply(&mut d).unwrap();
        assert!(d.legs.len() < d.stops.len());
        Edit::RemoveStop(3).apply(&mut d).unwrap();
        Edit::RemoveStop(0).apply(&mut d).unwrap();
        assert!(d.legs.len() < d.stops.len());
        assert_eq!(
            Edit::RemoveStop(0).apply(&mut d),
            Err(EditError::TooFewStops)
        );
        assert_eq!(Edit::RemoveStop(7).apply(&mut d), Err(EditError::NoStop(7)));
        assert_eq!(
            Edit::MoveStop {
                stop: 0,
                earlier: true
            }
            .apply(&mut d),
            Err(EditError::CannotMove)
        );
    }

    #[test]
    fn inserted_stop_lies_between_its_neighbours() {
        let d = three_stops();
        let t: Vec<f64> = d.stops.iter().map(|s| s.epoch.tdb().0).collect();
        assert!(t[0] < t[1] && t[1] < t[2]);
    }
}
