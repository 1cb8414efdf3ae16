//! The tour panel (stops, legs, arrival, spacecraft, launch vehicle) and the ledger. Both read the
//! design and its evaluation and return edits as actions.

use eframe::egui::{self, DragValue, RichText};

use tourwright_astro::lambert::{Branch, Direction, MAX_REVS};
use tourwright_astro::time::Epoch;
use tourwright_mission::design::{
    ArrivalGoal, Dsm, DsmTime, EphemerisChoice, LaunchLimits, LaunchVehicle, LaunchVinf,
    LegOptions, PerformancePoint, SwingbyMode,
};
use tourwright_mission::evaluate::StopKind;
use tourwright_mission::{Edit, MissionDesign};

use super::action::{Action, Actions, PathPurpose};
use super::context::ViewCtx;
use super::{shared, style};

/// The tour panel, with the date being typed and its validation message.
#[derive(Default)]
pub struct TourPanel {
    /// Epoch text being edited: (stop, text).
    epoch_edit: Option<(usize, String)>,
    /// Validation message of the epoch field: (stop, message).
    epoch_error: Option<(usize, String)>,
    /// The last refused edit's reason, with the stop its field belongs to (None: the design).
    refusal: Option<(Option<usize>, String)>,
}

impl TourPanel {
    /// Drop typed-but-uncommitted text (after undo, redo or another document).
    pub fn forget_edits(&mut self) {
        self.epoch_edit = None;
        self.epoch_error = None;
        self.refusal = None;
    }

    /// Show why an edit was refused beside the part of the design it touched: the stop named in
    /// the field path (`stops[k]...`), or the top of the panel.
    pub fn note_refusal(&mut self, message: &str) {
        let stop = message
            .strip_prefix("stops[")
            .and_then(|r| r.split(']').next())
            .and_then(|n| n.parse().ok());
        self.refusal = Some((stop, message.to_string()));
    }

    /// Clear the refusal message (after a successful edit).
    pub fn clear_refusal(&mut self) {
        self.refusal = None;
    }

    /// The refusal message shown, if any: (stop, message).
    pub fn refusal(&self) -> Option<&(Option<usize>, String)> {
        self.refusal.as_ref()
    }

    /// The validation message shown under a stop's date, if any.
    pub fn epoch_error(&self) -> Option<&(usize, String)> {
        self.epoch_error.as_ref()
    }

    /// Draw the panel.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let mut out = Vec::new();
        let d = vc.design;
        ui.heading("Tour");
        let mut name = d.name.clone();
        ui.horizontal_wrapped(|ui| {
            let lab = ui.label("Name");
            if ui
                .text_edit_singleline(&mut name)
                .labelled_by(lab.id)
                .changed()
            {
                out.push(Action::EditLive(Edit::SetName(name.clone())));
            }
        });
        ui.label(RichText::new(d.sequence_label()).strong());
        if let Some((None, msg)) = &self.refusal {
            ui.label(
                RichText::new(format!("! not changed: {msg}")).color(style::error_color(vc.dark)),
            );
        }
        ui.horizontal_wrapped(|ui| {
            let lab = ui
                .label("Ephemeris")
                .on_hover_text("The model that gives the planets' states and constants");
            let mut choice = d.ephemeris.clone();
            egui::ComboBox::from_id_salt("ephemeris")
                .selected_text(choice.label())
                .show_ui(ui, |ui| {
                    for (_, c) in EphemerisChoice::NAMED {
                        ui.selectable_value(&mut choice, c.clone(), c.label());
                    }
                    if tourwright_astro::kernel::default_kernel().is_some() {
                        let default = EphemerisChoice::Kernel(Default::default());
                        let label = default.label();
                        ui.selectable_value(&mut choice, default, label);
                    }
                    if ui
                        .selectable_label(
                            matches!(d.ephemeris, EphemerisChoice::Kernel(_)),
                            "JPL kernel (SPK file)…",
                        )
                        .on_hover_text(
                            "A JPL development ephemeris such as de421.bsp or de440s.bsp",
                        )
                        .clicked()
                    {
                        out.push(Action::Export(PathPurpose::Kernel));
                    }
                })
                .response
                .labelled_by(lab.id);
            if choice != d.ephemeris {
                out.push(Action::Edit(Edit::SetEphemeris(choice)));
            }
        });
        if let EphemerisChoice::Kernel(k) = &d.ephemeris {
            ui.horizontal_wrapped(|ui| {
                ui.label("Kernel");
                let shown = if k.path.is_empty() {
                    "(default kernel of the settings)".to_string()
                } else {
                    k.path.clone()
                };
                ui.label(egui::RichText::new(shown).monospace())
                    .on_hover_text(
                        k.resolved()
                            .map(|p| p.display().to_string())
                            .unwrap_or_else(|| "no default kernel set".into()),
                    );
                if ui.small_button("change…").clicked() {
                    out.push(Action::Export(PathPurpose::Kernel));
                }
            });
        }
        ui.add_space(4.0);
        let n = d.stops.len();
        let names = d.body_names();
        for k in 0..n {
            let kind = StopKind::of(k, n);
            let stop = &d.stops[k];
            let selected = vc.selected == k;
            ui.push_id(("stop", k), |ui| {
                let frame = egui::Frame::group(ui.style()).stroke(egui::Stroke::new(
                    if selected { 2.0 } else { 1.0 },
                    if selected {
                        style::leg_color(k.saturating_sub(1))
                    } else {
                        ui.visuals().widgets.noninteractive.bg_stroke.color
                    },
                ));
                frame.show(ui, |ui| {
                    if let Some((Some(j), msg)) = &self.refusal {
                        if *j == k {
                            ui.label(
                                RichText::new(format!("! not changed: {msg}"))
                                    .color(style::error_color(vc.dark)),
                            );
                        }
                    }
                    let header = format!("{} {} — {}", k + 1, kind.label(), stop.body);
                    if ui
                        .selectable_label(selected, RichText::new(header).strong())
                        .clicked()
                    {
                        out.push(Action::Select(k));
                    }
                    ui.horizontal_wrapped(|ui| {
                        let lab = ui.label("Body");
                        let mut body = stop.body.clone();
                        egui::ComboBox::from_id_salt("body")
                            .selected_text(body.clone())
                            .show_ui(ui, |ui| {
                                for nm in &names {
                                    ui.selectable_value(&mut body, nm.clone(), nm);
                                }
                            })
                            .response
                            .labelled_by(lab.id);
                        if body != stop.body {
                            out.push(Action::Edit(Edit::SetBody { stop: k, body }));
                        }
                    });
                    self.epoch_row(ui, vc, k, stop.epoch, &mut out);
                    if kind == StopKind::SwingBy {
                        swingby_rows(ui, vc, k, &mut out);
                    }
                    ui.horizontal_wrapped(|ui| {
                        if ui
                            .small_button("+ after")
                            .on_hover_text("Insert a stop after this one")
                            .clicked()
                        {
                            out.push(Action::Edit(Edit::InsertStopAfter(k)));
                        }
                        if n > 2 && ui.small_button("remove").clicked() {
                            out.push(Action::Edit(Edit::RemoveStop(k)));
                        }
                        if k > 0
                            && ui
                                .small_button("up")
                                .on_hover_text("Move earlier in the sequence")
                                .clicked()
                        {
                            out.push(Action::Edit(Edit::MoveStop {
                                stop: k,
                                earlier: true,
                            }));
                        }
                        if k + 1 < n
                            && ui
                                .small_button("down")
                                .on_hover_text("Move later in the sequence")
                                .clicked()
                        {
                            out.push(Action::Edit(Edit::MoveStop {
                                stop: k,
                                earlier: false,
                            }));
                        }
                    });
                });
                if k + 1 < n {
                    leg_row(ui, vc, k, &mut out);
                }
            });
        }
        ui.add_space(6.0);
        egui::CollapsingHeader::new("Arrival goal")
            .default_open(true)
            .show(ui, |ui| arrival_rows(ui, vc, &mut out));
        egui::CollapsingHeader::new("Launch limits").show(ui, |ui| launch_rows(ui, d, &mut out));
        egui::CollapsingHeader::new("Spacecraft")
            .default_open(true)
            .show(ui, |ui| spacecraft_rows(ui, d, &mut out));
        egui::CollapsingHeader::new("Launch vehicle").show(ui, |ui| vehicle_rows(ui, vc, &mut out));
        egui::CollapsingHeader::new("Notes").show(ui, |ui| {
            let mut notes = d.notes.clone();
            let lab = ui.label("Design notes");
            if ui
                .text_edit_multiline(&mut notes)
                .labelled_by(lab.id)
                .changed()
            {
                out.push(Action::EditLive(Edit::SetNotes(notes)));
            }
        });
        out
    }

    fn epoch_row(
        &mut self,
        ui: &mut egui::Ui,
        vc: &ViewCtx<'_>,
        k: usize,
        epoch: Epoch,
        out: &mut Actions,
    ) {
        ui.horizontal_wrapped(|ui| {
            let lab = ui
                .label("Date")
                .on_hover_text("UTC calendar date; also accepts …T12:00:00 and a TDB suffix");
            let mut text = match &self.epoch_edit {
                Some((j, t)) if *j == k => t.clone(),
                _ => epoch.to_date_utc(),
            };
            let r = ui
                .add(
                    egui::TextEdit::singleline(&mut text)
                        .desired_width(96.0)
                        .id_salt("epoch"),
                )
                .labelled_by(lab.id);
            if r.changed() {
                self.epoch_edit = Some((k, text.clone()));
            }
            let commit = r.lost_focus() && self.epoch_edit.as_ref().is_some_and(|(j, _)| *j == k);
            if commit {
                match Epoch::parse(&text) {
                    Ok(t) => {
                        let range = vc
                            .tour
                            .map_or_else(tourwright_astro::ephemeris::mean_element_range, |t| {
                                t.model.range()
                            });
                        let tt = t.tdb();
                        if !(tt.0 >= range.0.0 && tt.0 <= range.1.0) {
                            self.epoch_error = Some((
                                k,
                                format!(
                                    "{} is outside the ephemeris range {} .. {}",
                                    t.to_date_utc(),
                                    range.0.to_date_utc(),
                                    range.1.to_date_utc()
                                ),
                            ));
                        } else {
                            // Keep the time of day when only a date was typed.
                            let t = if text.trim().len() <= 10 {
                                keep_time_of_day(t, epoch)
                            } else {
                                t
                            };
                            out.push(Action::Edit(Edit::SetEpoch { stop: k, epoch: t }));
                            self.forget_edits();
                        }
                    }
                    Err(e) => self.epoch_error = Some((k, e.to_string())),
                }
            }
            for (label, days) in [("−10", -10.0), ("−1", -1.0), ("+1", 1.0), ("+10", 10.0)] {
                if ui
                    .small_button(label)
                    .on_hover_text(format!("move the date by {days} days"))
                    .clicked()
                {
                    out.push(Action::Edit(Edit::ShiftEpoch { stop: k, days }));
                    self.forget_edits();
                }
            }
        });
        if let Some((j, msg)) = &self.epoch_error {
            if *j == k {
                ui.label(RichText::new(format!("! {msg}")).color(style::error_color(vc.dark)));
            }
        }
    }
}

/// The typed UTC date `date` at the UTC time of day of `old`.
fn keep_time_of_day(date: Epoch, old: Epoch) -> Epoch {
    use tourwright_astro::time::{Calendar, TimeScale};
    let (d, o) = (date.calendar(), old.in_scale(TimeScale::Utc).calendar());
    Epoch::from_calendar(
        TimeScale::Utc,
        Calendar {
            hour: o.hour,
            minute: o.minute,
            second: o.second.min(59),
            nanos: o.nanos,
            ..d
        },
    )
    .unwrap_or(date)
}

fn swingby_rows(ui: &mut egui::Ui, vc: &ViewCtx<'_>, k: usize, out: &mut Actions) {
    let stop = &vc.design.stops[k];
    let def = vc
        .tour
        .and_then(|t| t.stops.get(k))
        .map(|s| s.body.data.min_altitude_km)
        .unwrap_or(0.0);
    ui.horizontal_wrapped(|ui| {
        let mut custom = stop.swingby.min_altitude_km.is_some();
        let r_box = ui.checkbox(&mut custom, "Min altitude");
        if r_box
            .clone()
            .on_hover_text("Lowest periapsis altitude allowed; the body's default when unticked")
            .changed()
        {
            out.push(Action::Edit(Edit::SetMinAltitude {
                stop: k,
                km: custom.then_some(def),
            }));
        }
        let mut v = stop.swingby.min_altitude_km.unwrap_or(def);
        let r = ui
            .add_enabled(
                custom,
                DragValue::new(&mut v)
                    .speed(10.0)
                    .range(0.0..=1.0e7)
                    .suffix(" km"),
            )
            .labelled_by(r_box.id);
        if r.changed() {
            out.push(Action::EditLive(Edit::SetMinAltitude {
                stop: k,
                km: Some(v),
            }));
        }
    });
    ui.horizontal_wrapped(|ui| {
        ui.label("Mode").on_hover_text(
            "Targeted: the dates fix both legs (powered if needed). Shaped: you set altitude and \
             aim; the next leg is ballistic, or coasts to its deep-space manoeuvre.",
        );
        let shaped = matches!(stop.swingby.mode, SwingbyMode::Shaped { .. });
        let dsm_next = vc.design.leg(k).dsm.is_some();
        let t = ui
            .add_enabled(!dsm_next, egui::Button::selectable(!shaped, "targeted"))
            .on_disabled_hover_text(
                "The next leg has a deep-space manoeuvre, which starts from a shaped swing-by",
            );
        if t.clicked() && shaped {
            out.push(Action::Edit(Edit::SetSwingbyMode {
                stop: k,
                mode: SwingbyMode::Targeted,
            }));
        }
        if ui.selectable_label(shaped, "shaped").clicked() && !shaped {
            out.push(Action::Edit(shared::shaped_from_current(vc, k)));
        }
    });
    if let SwingbyMode::Shaped {
        mut altitude_km,
        mut aim_deg,
    } = stop.swingby.mode
    {
        ui.horizontal_wrapped(|ui| {
            let speed = altitude_km.abs().max(100.0) * 0.005;
            let r1 = style::labelled(
                ui,
                "Altitude",
                DragValue::new(&mut altitude_km).speed(speed).suffix(" km"),
            );
            let r2 = style::labelled(
                ui,
                "Aim",
                DragValue::new(&mut aim_deg)
                    .speed(0.2)
                    .range(-180.0..=180.0)
                    .suffix("°"),
            );
            if r1.changed() || r2.changed() {
                out.push(Action::EditLive(Edit::SetSwingbyMode {
                    stop: k,
                    mode: SwingbyMode::Shaped {
                        altitude_km,
                        aim_deg,
                    },
                }));
            }
        });
        if vc.design.leg(k).dsm.is_none() {
            shared::retarget_row(ui, vc, k, out);
        } else {
            ui.label(
                RichText::new(format!(
                    "the manoeuvre on leg {} meets the next body",
                    k + 1
                ))
                .weak(),
            );
        }
    }
}

fn leg_row(ui: &mut egui::Ui, vc: &ViewCtx<'_>, k: usize, out: &mut Actions) {
    let leg = vc.design.leg(k);
    let tof = vc
        .design
        .stops
        .get(k + 1)
        .map(|b| b.epoch.days() - vc.design.stops[k].epoch.days())
        .unwrap_or(0.0);
    let color = style::leg_color(k);
    let ballistic = matches!(vc.design.stops[k].swingby.mode, SwingbyMode::Shaped { .. })
        && k > 0
        && k + 1 < vc.design.stops.len()
        && leg.dsm.is_none();
    ui.horizontal_wrapped(|ui| {
        ui.label(RichText::new("|").color(color).strong());
        let leg_lab = ui.label(
            RichText::new(format!("leg {}: {}", k + 1, style::fixed(tof, 0) + " d")).color(color),
        );
        if leg.dsm.is_none()
            && ui
                .small_button("+ DSM")
                .on_hover_text(
                    "Add a deep-space manoeuvre on this leg: the leg coasts from its start, makes \
                     one impulse and flies a Lambert arc to the next stop",
                )
                .clicked()
        {
            match Edit::add_dsm(vc.design, vc.eval, k) {
                Ok(e) => out.push(Action::Edit(e)),
                Err(e) => out.push(Action::Status(e.to_string(), true)),
            }
        }
        if ballistic {
            ui.label("ballistic");
            return;
        }
        let mut revs = leg.revolutions;
        let r = ui
            .add(
                DragValue::new(&mut revs)
                    .range(0..=MAX_REVS as u32)
                    .prefix("revs "),
            )
            .labelled_by(leg_lab.id);
        let mut branch = leg.branch;
        if revs > 0 {
            egui::ComboBox::from_id_salt(("branch", k))
                .width(60.0)
                .selected_text(format!("{branch:?}"))
                .show_ui(ui, |ui| {
                    ui.selectable_value(&mut branch, Branch::Left, "Left");
                    ui.selectable_value(&mut branch, Branch::Right, "Right");
                })
                .response
                .labelled_by(leg_lab.id);
        }
        let mut retro = leg.direction == Direction::Retrograde;
        let r3 = ui
            .checkbox(&mut retro, "retro")
            .on_hover_text("Retrograde arc (clockwise seen from ecliptic north)");
        if r.changed() || branch != leg.branch || r3.changed() {
            out.push(Action::Edit(Edit::SetLeg {
                leg: k,
                options: LegOptions {
                    revolutions: revs,
                    branch,
                    direction: if retro {
                        Direction::Retrograde
                    } else {
                        Direction::Prograde
                    },
                    dsm: leg.dsm,
                },
            }));
        }
    });
    if let Some(m) = leg.dsm {
        dsm_rows(ui, vc, k, m, tof, out);
    }
}

/// A leg's deep-space manoeuvre: where (fraction, or day of the leg for a dated one), its Δv, the
/// launch v∞ it starts from on the first leg, and removal.
fn dsm_rows(
    ui: &mut egui::Ui,
    vc: &ViewCtx<'_>,
    k: usize,
    m: Dsm,
    tof_days: f64,
    out: &mut Actions,
) {
    let color = style::leg_color(k);
    let res = vc.eval.legs.get(k).and_then(|l| l.dsm);
    ui.horizontal_wrapped(|ui| {
        ui.label(RichText::new("|").color(color).strong());
        ui.label(RichText::new("DSM").color(color).strong())
            .on_hover_text("Deep-space manoeuvre: one impulse on this leg");
        let t0 = vc.design.stops[k].epoch;
        let mut next = m;
        let mut changed = false;
        match m.at {
            DsmTime::Fraction(f) => {
                let mut pct = f * 100.0;
                let r = style::labelled(
                    ui,
                    "at",
                    DragValue::new(&mut pct)
                        .speed(0.2)
                        .range(0.1..=99.9)
                        .max_decimals(1)
                        .suffix(" % of the leg"),
                );
                if r.changed() {
                    next.at = DsmTime::Fraction(pct / 100.0);
                    changed = true;
                }
            }
            DsmTime::Date(e) => {
                let mut day = e.days() - t0.days();
                let r = style::labelled(
                    ui,
                    "on day",
                    DragValue::new(&mut day)
                        .speed(0.5)
                        .range(0.01..=(tof_days - 0.01).max(0.02))
                        .max_decimals(2),
                );
                if r.changed() {
                    next.at = DsmTime::Date(t0.plus_days(day));
                    changed = true;
                }
            }
        }
        let dated = matches!(m.at, DsmTime::Date(_));
        let mut by_date = dated;
        if ui
            .checkbox(&mut by_date, "dated")
            .on_hover_text("Fix the manoeuvre to a date instead of a fraction of the leg")
            .changed()
        {
            let f = res.map(|d| d.fraction).unwrap_or(0.5);
            next.at = if by_date {
                DsmTime::Date(t0.plus_days(f * tof_days))
            } else {
                DsmTime::Fraction(f.clamp(1e-3, 1.0 - 1e-3))
            };
            out.push(Action::Edit(Edit::SetDsm {
                leg: k,
                dsm: Some(next),
            }));
        }
        if changed {
            out.push(Action::EditLive(Edit::SetDsm {
                leg: k,
                dsm: Some(next),
            }));
        }
        if let Some(d) = res {
            ui.label(format!(
                "Δv {} km/s at {} AU",
                style::fixed(d.dv_km_s, 3),
                style::fixed(d.sun_distance_au(), 2)
            ));
        }
        if ui
            .small_button("remove DSM")
            .on_hover_text("Remove the manoeuvre (the swing-by stays shaped)")
            .clicked()
        {
            out.push(Action::Edit(Edit::SetDsm { leg: k, dsm: None }));
        }
    });
    if let Some(l) = m.launch {
        ui.horizontal_wrapped(|ui| {
            ui.label(RichText::new("|").color(color).strong());
            let (mut v, mut ra, mut dec) = (l.vinf_km_s, l.rla_deg, l.dla_deg);
            let r1 = style::labelled(
                ui,
                "launch v∞",
                DragValue::new(&mut v)
                    .speed(0.01)
                    .range(0.0..=20.0)
                    .max_decimals(3)
                    .suffix(" km/s"),
            );
            let r2 = style::labelled(
                ui,
                "RLA",
                DragValue::new(&mut ra)
                    .speed(0.2)
                    .range(0.0..=360.0)
                    .max_decimals(1)
                    .suffix("°"),
            );
            let r3 = style::labelled(
                ui,
                "DLA",
                DragValue::new(&mut dec)
                    .speed(0.2)
                    .range(-90.0..=90.0)
                    .max_decimals(1)
                    .suffix("°"),
            );
            if r1.changed() || r2.changed() || r3.changed() {
                let mut next = m;
                next.launch = Some(LaunchVinf {
                    vinf_km_s: v,
                    rla_deg: ra,
                    dla_deg: dec,
                    ..l
                });
                out.push(Action::EditLive(Edit::SetDsm {
                    leg: k,
                    dsm: Some(next),
                }));
            }
        });
    }
}

fn arrival_rows(ui: &mut egui::Ui, vc: &ViewCtx<'_>, out: &mut Actions) {
    let goal = vc.design.arrival;
    let mut kind = match goal {
        ArrivalGoal::FlybyOnly => 0,
        ArrivalGoal::Capture { .. } => 1,
        ArrivalGoal::Rendezvous => 2,
    };
    ui.horizontal_wrapped(|ui| {
        ui.radio_value(&mut kind, 0, "flyby only");
        ui.radio_value(&mut kind, 1, "capture");
        ui.radio_value(&mut kind, 2, "rendezvous");
    });
    let new_goal = match (kind, goal) {
        (0, _) => ArrivalGoal::FlybyOnly,
        (2, _) => ArrivalGoal::Rendezvous,
        (_, ArrivalGoal::Capture { .. }) => goal,
        _ => {
            let r = vc
                .tour
                .and_then(|t| t.stops.last())
                .map(|s| s.body.data.radius_km)
                .filter(|r| *r > 0.0)
                .unwrap_or(1000.0);
            ArrivalGoal::Capture {
                periapsis_radius_km: r * 1.2,
                eccentricity: 0.5,
            }
        }
    };
    if new_goal != goal {
        out.push(Action::Edit(Edit::SetArrival(new_goal)));
    }
    if let ArrivalGoal::Capture {
        mut periapsis_radius_km,
        mut eccentricity,
    } = new_goal
    {
        ui.horizontal_wrapped(|ui| {
            let speed = periapsis_radius_km * 0.002;
            let a = style::labelled(
                ui,
                "r_p",
                DragValue::new(&mut periapsis_radius_km)
                    .speed(speed)
                    .range(1.0..=1e9)
                    .suffix(" km"),
            );
            let b = style::labelled(
                ui,
                "e",
                DragValue::new(&mut eccentricity)
                    .speed(0.002)
                    .range(0.0..=0.999),
            );
            if a.changed() || b.changed() {
                out.push(Action::EditLive(Edit::SetArrival(ArrivalGoal::Capture {
                    periapsis_radius_km,
                    eccentricity,
                })));
            }
        });
    }
}

fn launch_rows(ui: &mut egui::Ui, d: &MissionDesign, out: &mut Actions) {
    type Set = fn(&mut LaunchLimits, Option<f64>);
    let rows: [(&str, Option<f64>, f64, &str, Set); 3] = [
        (
            "max C3",
            d.launch.max_c3_km2_s2,
            30.0,
            " km²/s²",
            |l, v| l.max_c3_km2_s2 = v,
        ),
        ("min DLA", d.launch.min_dla_deg, -28.5, "°", |l, v| {
            l.min_dla_deg = v
        }),
        ("max DLA", d.launch.max_dla_deg, 28.5, "°", |l, v| {
            l.max_dla_deg = v
        }),
    ];
    for (label, v, def, unit, set) in rows {
        ui.horizontal_wrapped(|ui| {
            let mut on = v.is_some();
            let mut x = v.unwrap_or(def);
            let cb = ui.checkbox(&mut on, label);
            let c = cb.changed();
            let r = ui
                .add_enabled(on, DragValue::new(&mut x).speed(0.1).suffix(unit))
                .labelled_by(cb.id);
            let mut l = d.launch;
            if c {
                set(&mut l, on.then_some(x));
                out.push(Action::Edit(Edit::SetLaunchLimits(l)));
            } else if r.changed() {
                set(&mut l, Some(x));
                out.push(Action::EditLive(Edit::SetLaunchLimits(l)));
            }
        });
    }
}

fn spacecraft_rows(ui: &mut egui::Ui, d: &MissionDesign, out: &mut Actions) {
    let mut sc = d.spacecraft.clone();
    let mut changed = false;
    egui::Grid::new("sc").num_columns(2).show(ui, |ui| {
        let lab = ui.label("Name");
        changed |= ui
            .text_edit_singleline(&mut sc.name)
            .labelled_by(lab.id)
            .changed();
        ui.end_row();
        let rows: [(&str, &mut f64, f64, f64, &str); 3] = [
            ("Dry mass", &mut sc.dry_mass_kg, 5.0, 0.0, " kg"),
            ("Propellant", &mut sc.propellant_kg, 5.0, 0.0, " kg"),
            ("Isp", &mut sc.isp_s, 1.0, 1.0, " s"),
        ];
        for (name, v, speed, min, unit) in rows {
            let lab = ui.label(name);
            if name == "Isp" {
                lab.clone()
                    .on_hover_text("Specific impulse of the main engine");
            }
            changed |= ui
                .add(DragValue::new(v).speed(speed).range(min..=1e6).suffix(unit))
                .labelled_by(lab.id)
                .changed();
            ui.end_row();
        }
    });
    if changed {
        out.push(Action::EditLive(Edit::SetSpacecraft(sc)));
    }
}

fn vehicle_rows(ui: &mut egui::Ui, vc: &ViewCtx<'_>, out: &mut Actions) {
    let Some(mut lv) = vc.design.launch_vehicle.clone() else {
        if ui.button("Add a launch-vehicle table").clicked() {
            out.push(Action::Edit(Edit::SetVehicle(Some(LaunchVehicle {
                name: "Illustrative vehicle".into(),
                note: "Invented curve; replace with the vehicle's published performance.".into(),
                performance: vec![
                    PerformancePoint {
                        c3_km2_s2: 0.0,
                        mass_kg: 5000.0,
                    },
                    PerformancePoint {
                        c3_km2_s2: 20.0,
                        mass_kg: 3500.0,
                    },
                    PerformancePoint {
                        c3_km2_s2: 40.0,
                        mass_kg: 2200.0,
                    },
                ],
            }))));
        }
        return;
    };
    let mut changed = false;
    let lab = ui.label("Vehicle");
    changed |= ui
        .text_edit_singleline(&mut lv.name)
        .labelled_by(lab.id)
        .changed();
    ui.label(RichText::new(&lv.note).weak());
    let mut remove = None;
    egui::Grid::new("lv").num_columns(3).show(ui, |ui| {
        let c3_lab = ui.label("C3 (km²/s²)");
        let m_lab = ui.label("mass (kg)");
        ui.end_row();
        for (i, p) in lv.performance.iter_mut().enumerate() {
            changed |= ui
                .add(DragValue::new(&mut p.c3_km2_s2).speed(0.2))
                .labelled_by(c3_lab.id)
                .changed();
            changed |= ui
                .add(DragValue::new(&mut p.mass_kg).speed(10.0).range(0.0..=1e6))
                .labelled_by(m_lab.id)
                .changed();
            if ui.small_button("x").clicked() {
                remove = Some(i);
            }
            ui.end_row();
        }
    });
    if let Some(i) = remove {
        lv.performance.remove(i);
        changed = true;
    }
    ui.horizontal_wrapped(|ui| {
        if ui.small_button("+ row").clicked() {
            let last = lv.performance.last().copied().unwrap_or(PerformancePoint {
                c3_km2_s2: 0.0,
                mass_kg: 1000.0,
            });
            lv.performance.push(PerformancePoint {
                c3_km2_s2: last.c3_km2_s2 + 10.0,
                mass_kg: (last.mass_kg * 0.8).max(0.0),
            });
            changed = true;
        }
        if ui.small_button("remove table").clicked() {
            out.push(Action::Edit(Edit::SetVehicle(None)));
        }
    });
    let increasing = lv
        .performance
        .windows(2)
        .all(|w| w[1].c3_km2_s2 > w[0].c3_km2_s2);
    if !increasing {
        ui.label(
            RichText::new("! C3 must increase down the table; the table is not applied")
                .color(style::error_color(vc.dark)),
        );
    }
    if changed && increasing {
        out.push(Action::EditLive(Edit::SetVehicle(Some(lv))));
    }
}
