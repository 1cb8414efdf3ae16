//! Edits of a design as values. The workbench's panels, menus and shortcuts produce them; the
//! document applies them one at a time, each as one undo step (or as part of a gesture). An edit
//! keeps the design's invariants (legs and search bounds follow the stops) and refuses what it
//! cannot do with a reason instead of panicking.

use tourwright_astro::time::Epoch;

use crate::design::{
    ArrivalGoal, EphemerisChoice, LaunchLimits, LaunchVehicle, LegOptions, MissionDesign,
    Objective, Spacecraft, Stop, SwingbyMode,
};

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
    /// Apply a search result: every stop's epoch and every leg's Lambert options.
    ApplySchedule {
        /// One epoch per stop.
        epochs: Vec<Epoch>,
        /// One set of options per leg.
        legs: Vec<LegOptions>,
    },
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
    /// Choose the ephemeris model.
    SetEphemeris(EphemerisChoice),
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
            Edit::SetArrival(_) => "arrival goal",
            Edit::SetLaunchLimits(_) => "launch limits",
            Edit::SetSpacecraft(_) => "spacecraft",
            Edit::SetVehicle(_) => "launch vehicle",
            Edit::SetObjective(_) => "objective",
            Edit::SetEphemeris(_) => "ephemeris",
            Edit::Replace(_) => "replace design",
        }
    }

    /// Apply to `d`. On an error `d` is unchanged.
    pub fn apply(self, d: &mut MissionDesign) -> Result<(), EditError> {
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
            Edit::ApplySchedule { epochs, legs } => {
                if epochs.len() != n || legs.len() + 1 != n {
                    return Err(EditError::Epochs(
                        "the stops changed since those dates were computed",
                    ));
                }
                for (s, e) in d.stops.iter_mut().zip(epochs) {
                    s.epoch = e;
                }
                d.legs = legs;
                while d.legs.last() == Some(&LegOptions::default()) {
                    d.legs.pop();
                }
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
                let body = d.stops[k].body.clone();
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
            }
            Edit::SetSwingbyMode { stop: k, mode } => d.stops[stop(k)?].swingby.mode = mode,
            Edit::SetMinAltitude { stop: k, km } => d.stops[stop(k)?].swingby.min_altitude_km = km,
            Edit::SetLeg { leg, options } => {
                if leg + 1 >= n {
                    return Err(EditError::NoLeg(leg));
                }
                while d.legs.len() <= leg {
                    d.legs.push(LegOptions::default());
                }
                d.legs[leg] = options;
                while d.legs.last() == Some(&LegOptions::default()) {
                    d.legs.pop();
                }
            }
            Edit::SetArrival(a) => d.arrival = a,
            Edit::SetLaunchLimits(l) => d.launch = l,
            Edit::SetSpacecraft(s) => d.spacecraft = s,
            Edit::SetVehicle(v) => d.launch_vehicle = v,
            Edit::SetObjective(o) => d.search.objective = o,
            Edit::SetEphemeris(e) => d.ephemeris = e,
            Edit::Replace(x) => *d = *x,
        }
        Ok(())
    }
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

#[cfg(test)]
mod tests {
    use super::*;

    fn three_stops() -> MissionDesign {
        let mut d = MissionDesign::new_blank();
        Edit::InsertStopAfter(0).apply(&mut d).unwrap();
        d
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
