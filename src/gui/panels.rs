//! The tour panel (stops, legs, arrival, spacecraft, launch vehicle) and the ledger.

use eframe::egui::{self, DragValue, RichText};

use crate::astro::bodies::Planet;
use crate::astro::ephemeris::mean_element_range;
use crate::astro::time::Epoch;
use crate::mission::design::{ArrivalGoal, LaunchVehicle, PerformancePoint, Stop, SwingbyMode};
use crate::mission::evaluate::StopKind;
use crate::mission::retarget;

use super::app::TourwrightApp;
use super::style;

impl TourwrightApp {
    /// Body names for pickers: catalogue then user bodies.
    fn body_names(&self) -> Vec<String> {
        let mut v: Vec<String> = Planet::ALL.iter().map(|p| p.name().to_string()).collect();
        v.extend(self.doc.design.user_bodies.iter().map(|u| u.name.clone()));
        v
    }

    /// The left panel.
    pub fn tour_panel(&mut self, ui: &mut egui::Ui) {
        ui.heading("Tour");
        let mut name = self.doc.design.name.clone();
        ui.horizontal(|ui| {
            let lab = ui.label("Name");
            if ui
                .text_edit_singleline(&mut name)
                .labelled_by(lab.id)
                .changed()
            {
                self.doc.edit_live(|d| d.name = name.clone());
            }
        });
        ui.label(RichText::new(self.doc.design.sequence_label()).strong());
        ui.add_space(4.0);
        let n = self.doc.design.stops.len();
        let names = self.body_names();
        let mut action: Option<(usize, &'static str)> = None;
        for k in 0..n {
            let kind = StopKind::of(k, n);
            let stop = self.doc.design.stops[k].clone();
            let selected = self.selected == k;
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
                    let header = format!("{} {} — {}", k + 1, kind.label(), stop.body);
                    if ui
                        .selectable_label(selected, RichText::new(header).strong())
                        .clicked()
                    {
                        self.selected = k;
                    }
                    // Body.
                    ui.horizontal(|ui| {
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
                            self.doc.edit(|d| d.stops[k].body = body.clone());
                        }
                    });
                    self.epoch_row(ui, k, stop.epoch);
                    if kind == StopKind::SwingBy {
                        self.swingby_rows(ui, k);
                    }
                    ui.horizontal(|ui| {
                        if ui
                            .small_button("+ after")
                            .on_hover_text("Insert a stop after this one")
                            .clicked()
                        {
                            action = Some((k, "add"));
                        }
                        if n > 2 && ui.small_button("remove").clicked() {
                            action = Some((k, "remove"));
                        }
                        if k > 0
                            && ui
                                .small_button("up")
                                .on_hover_text("Move earlier in the sequence")
                                .clicked()
                        {
                            action = Some((k, "up"));
                        }
                        if k + 1 < n
                            && ui
                                .small_button("down")
                                .on_hover_text("Move later in the sequence")
                                .clicked()
                        {
                            action = Some((k, "down"));
                        }
                    });
                });
                if k + 1 < n {
                    self.leg_row(ui, k);
                }
            });
        }
        if let Some((k, what)) = action {
            self.stop_action(k, what);
        }
        ui.add_space(6.0);
        egui::CollapsingHeader::new("Arrival goal")
            .default_open(true)
            .show(ui, |ui| self.arrival_rows(ui));
        egui::CollapsingHeader::new("Launch limits").show(ui, |ui| self.launch_rows(ui));
        egui::CollapsingHeader::new("Spacecraft")
            .default_open(true)
            .show(ui, |ui| self.spacecraft_rows(ui));
        egui::CollapsingHeader::new("Launch vehicle").show(ui, |ui| self.vehicle_rows(ui));
        egui::CollapsingHeader::new("Notes").show(ui, |ui| {
            let mut notes = self.doc.design.notes.clone();
            let lab = ui.label("Design notes");
            if ui
                .text_edit_multiline(&mut notes)
                .labelled_by(lab.id)
                .changed()
            {
                self.doc.edit_live(|d| d.notes = notes.clone());
            }
        });
    }

    fn stop_action(&mut self, k: usize, what: &str) {
        match what {
            "add" => self.doc.edit(|d| {
                let t = d.stops[k].epoch;
                let next = d.stops.get(k + 1).map(|s| s.epoch);
                let epoch = match next {
                    Some(tn) => Epoch::from_tdb_seconds(0.5 * (t.tdb_s + tn.tdb_s)),
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
                if k < d.legs.len() {
                    d.legs.insert(k, Default::default());
                }
                if k < d.search.leg_tof.len() {
                    d.search.leg_tof.clear();
                }
            }),
            "remove" => self.doc.edit(|d| {
                d.stops.remove(k);
                if k < d.legs.len() {
                    d.legs.remove(k.min(d.legs.len() - 1));
                }
                d.search.leg_tof.clear();
            }),
            "up" | "down" => self.doc.edit(|d| {
                // Reordering swaps bodies and settings but keeps the dates in time order.
                let j = if what == "up" { k - 1 } else { k + 1 };
                let (a, b) = (d.stops[k].clone(), d.stops[j].clone());
                d.stops[k] = Stop {
                    epoch: a.epoch,
                    ..b
                };
                d.stops[j] = Stop {
                    epoch: b.epoch,
                    ..a
                };
            }),
            _ => {}
        }
        self.selected = self.selected.min(self.doc.design.stops.len() - 1);
    }

    fn epoch_row(&mut self, ui: &mut egui::Ui, k: usize, epoch: Epoch) {
        ui.horizontal(|ui| {
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
                        .desired_width(150.0)
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
                        let (lo, hi) = mean_element_range();
                        if t.tdb_s < lo.tdb_s || t.tdb_s > hi.tdb_s {
                            self.epoch_error = Some((
                                k,
                                format!(
                                    "{} is outside the ephemeris range {} .. {}",
                                    t.to_date_utc(),
                                    lo.to_date_utc(),
                                    hi.to_date_utc()
                                ),
                            ));
                        } else {
                            // Keep the time of day when only a date was typed.
                            let t = if text.trim().len() <= 10 {
                                t.plus_days(epoch.mjd2000().fract().rem_euclid(1.0))
                            } else {
                                t
                            };
                            self.doc.edit(|d| d.stops[k].epoch = t);
                            self.epoch_error = None;
                            self.epoch_edit = None;
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
                    self.doc
                        .edit(|d| d.stops[k].epoch = d.stops[k].epoch.plus_days(days));
                    self.epoch_edit = None;
                    self.epoch_error = None;
                }
            }
        });
        if let Some((j, msg)) = &self.epoch_error {
            if *j == k {
                ui.label(
                    RichText::new(format!("! {msg}")).color(style::error_color(self.settings.dark)),
                );
            }
        }
    }

    fn swingby_rows(&mut self, ui: &mut egui::Ui, k: usize) {
        let stop = self.doc.design.stops[k].clone();
        let body = self.doc.design.resolve(&stop.body);
        let data = body.map(|b| self.doc.design.body_data(&b));
        ui.horizontal(|ui| {
            let mut custom = stop.swingby.min_altitude_km.is_some();
            let def = data.map(|d| d.min_altitude_km).unwrap_or(0.0);
            let r_box = ui.checkbox(&mut custom, "Min altitude");
            if r_box
                .clone()
                .on_hover_text(
                    "Lowest periapsis altitude allowed; the body's default when unticked",
                )
                .changed()
            {
                self.doc.edit(|d| {
                    d.stops[k].swingby.min_altitude_km = if custom { Some(def) } else { None }
                });
            }
            let mut v = stop.swingby.min_altitude_km.unwrap_or(def);
            let r = ui
                .add_enabled(
                    custom,
                    DragValue::new(&mut v)
                        .speed(10.0)
                        .range(-1.0e5..=1.0e7)
                        .suffix(" km"),
                )
                .labelled_by(r_box.id);
            if r.changed() {
                self.doc
                    .edit_live(|d| d.stops[k].swingby.min_altitude_km = Some(v));
            }
        });
        ui.horizontal(|ui| {
            ui.label("Mode").on_hover_text("Targeted: the dates fix both legs (powered if needed). Shaped: you set altitude and aim; the next leg is ballistic.");
            let shaped = matches!(stop.swingby.mode, SwingbyMode::Shaped { .. });
            if ui.selectable_label(!shaped, "targeted").clicked() && shaped {
                self.doc.edit(|d| d.stops[k].swingby.mode = SwingbyMode::Targeted);
            }
            if ui.selectable_label(shaped, "shaped").clicked() && !shaped {
                self.make_shaped(k);
            }
        });
        if let SwingbyMode::Shaped {
            mut altitude_km,
            mut aim_deg,
        } = stop.swingby.mode
        {
            ui.horizontal(|ui| {
                let speed = altitude_km.abs().max(100.0) * 0.005;
                let r1 = style::labelled(
                    ui,
                    "Altitude",
                    DragValue::new(&mut altitude_km).speed(speed).suffix(" km"),
                );
                let r2 = style::labelled(
                    ui,
                    "Aim",
                    DragValue::new(&mut aim_deg).speed(0.2).suffix("°"),
                );
                if r1.changed() || r2.changed() {
                    self.doc.edit_live(|d| {
                        d.stops[k].swingby.mode = SwingbyMode::Shaped {
                            altitude_km,
                            aim_deg,
                        }
                    });
                }
            });
            self.retarget_row(ui, k);
        }
    }

    /// Switch a targeted swing-by to shaped, starting from the altitude and aim it has now.
    pub fn make_shaped(&mut self, k: usize) {
        let sw = self
            .eval
            .stops
            .get(k)
            .and_then(|s| s.swingby)
            .unwrap_or_default();
        let alt = if sw.altitude_km.is_finite() && sw.altitude_km < 1e12 {
            sw.altitude_km
        } else {
            10_000.0
        };
        let aim = sw.bplane.aim.to_degrees();
        self.doc.edit(|d| {
            d.stops[k].swingby.mode = SwingbyMode::Shaped {
                altitude_km: alt,
                aim_deg: aim,
            }
        });
    }

    /// Miss distance and the retarget buttons of a shaped swing-by.
    pub fn retarget_row(&mut self, ui: &mut egui::Ui, k: usize) {
        let miss = self
            .eval
            .stops
            .get(k)
            .and_then(|s| s.swingby)
            .and_then(|s| s.miss_km);
        ui.horizontal_wrapped(|ui| {
            if let Some(m) = miss {
                let soi = self.doc.design.resolve(&self.doc.design.stops[k + 1].body).map(|b| self.doc.design.body_data(&b).soi_km).unwrap_or(1e5);
                let txt = format!("misses the next body by {} km", style::fixed(m, 0));
                if m > soi.max(1e4) {
                    ui.label(RichText::new(format!("! {txt}")).color(style::warn_color(self.settings.dark)));
                } else {
                    ui.label(txt);
                }
            }
            for (label, move_epoch) in [("Retarget", false), ("Retarget + move date", true)] {
                if ui.small_button(label).on_hover_text("Adjust altitude and aim (and the next date) so the ballistic leg meets the next body").clicked() {
                    match retarget::retarget(&self.doc.design, k, move_epoch) {
                        Ok(r) => {
                            self.doc.replace(r.design);
                            self.status = Some((format!("retargeted: miss {:.1} km", r.miss_km), false));
                        }
                        Err(e) => self.status = Some((e.to_string(), true)),
                    }
                }
            }
        });
    }

    fn leg_row(&mut self, ui: &mut egui::Ui, k: usize) {
        let leg = self.doc.design.leg(k);
        let tof = self.eval.legs.get(k).map(|l| l.tof_days).unwrap_or(0.0);
        let color = style::leg_color(k);
        let ballistic = self.eval.legs.get(k).is_some_and(|l| l.ballistic);
        ui.horizontal(|ui| {
            ui.label(RichText::new("|").color(color).strong());
            let leg_lab =
                ui.label(RichText::new(format!("leg {}: {:.0} d", k + 1, tof)).color(color));
            if ballistic {
                ui.label("ballistic");
                return;
            }
            let mut revs = leg.revolutions;
            let r = ui
                .add(
                    DragValue::new(&mut revs)
                        .range(0..=crate::astro::lambert::MAX_REVS as u32)
                        .prefix("revs "),
                )
                .labelled_by(leg_lab.id);
            let mut branch = leg.branch;
            if revs > 0 {
                egui::ComboBox::from_id_salt(("branch", k))
                    .width(60.0)
                    .selected_text(format!("{branch:?}"))
                    .show_ui(ui, |ui| {
                        ui.selectable_value(
                            &mut branch,
                            crate::astro::lambert::Branch::Left,
                            "Left",
                        );
                        ui.selectable_value(
                            &mut branch,
                            crate::astro::lambert::Branch::Right,
                            "Right",
                        );
                    })
                    .response
                    .labelled_by(leg_lab.id);
            }
            let mut retro = leg.direction == crate::astro::lambert::Direction::Retrograde;
            let r3 = ui
                .checkbox(&mut retro, "retro")
                .on_hover_text("Retrograde arc (clockwise seen from ecliptic north)");
            if r.changed() || branch != leg.branch || r3.changed() {
                self.doc.edit(|d| {
                    while d.legs.len() <= k {
                        d.legs.push(Default::default());
                    }
                    d.legs[k].revolutions = revs;
                    d.legs[k].branch = branch;
                    d.legs[k].direction = if retro {
                        crate::astro::lambert::Direction::Retrograde
                    } else {
                        crate::astro::lambert::Direction::Prograde
                    };
                });
            }
        });
    }

    fn arrival_rows(&mut self, ui: &mut egui::Ui) {
        let goal = self.doc.design.arrival;
        let mut kind = match goal {
            ArrivalGoal::FlybyOnly => 0,
            ArrivalGoal::Capture { .. } => 1,
            ArrivalGoal::Rendezvous => 2,
        };
        ui.horizontal(|ui| {
            ui.radio_value(&mut kind, 0, "flyby only");
            ui.radio_value(&mut kind, 1, "capture");
            ui.radio_value(&mut kind, 2, "rendezvous");
        });
        let new_goal = match (kind, goal) {
            (0, _) => ArrivalGoal::FlybyOnly,
            (2, _) => ArrivalGoal::Rendezvous,
            (_, ArrivalGoal::Capture { .. }) => goal,
            _ => {
                let r = self
                    .doc
                    .design
                    .stops
                    .last()
                    .and_then(|s| self.doc.design.resolve(&s.body))
                    .map(|b| self.doc.design.body_data(&b).radius_km)
                    .unwrap_or(1000.0);
                ArrivalGoal::Capture {
                    periapsis_radius_km: r * 1.2,
                    eccentricity: 0.5,
                }
            }
        };
        if new_goal != goal {
            self.doc.edit(|d| d.arrival = new_goal);
        }
        if let ArrivalGoal::Capture {
            mut periapsis_radius_km,
            mut eccentricity,
        } = new_goal
        {
            ui.horizontal(|ui| {
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
                    self.doc.edit_live(|d| {
                        d.arrival = ArrivalGoal::Capture {
                            periapsis_radius_km,
                            eccentricity,
                        }
                    });
                }
            });
        }
    }

    fn launch_rows(&mut self, ui: &mut egui::Ui) {
        let l = self.doc.design.launch;
        let mut row =
            |ui: &mut egui::Ui,
             label: &str,
             v: Option<f64>,
             def: f64,
             unit: &str,
             set: fn(&mut crate::mission::MissionDesign, Option<f64>)| {
                ui.horizontal(|ui| {
                    let mut on = v.is_some();
                    let mut x = v.unwrap_or(def);
                    let cb = ui.checkbox(&mut on, label);
                    let c = cb.changed();
                    let r = ui
                        .add_enabled(on, DragValue::new(&mut x).speed(0.1).suffix(unit))
                        .labelled_by(cb.id);
                    if c {
                        self.doc.edit(|d| set(d, on.then_some(x)));
                    } else if r.changed() {
                        self.doc.edit_live(|d| set(d, Some(x)));
                    }
                });
            };
        row(ui, "max C3", l.max_c3_km2_s2, 30.0, " km²/s²", |d, v| {
            d.launch.max_c3_km2_s2 = v
        });
        row(ui, "min DLA", l.min_dla_deg, -28.5, "°", |d, v| {
            d.launch.min_dla_deg = v
        });
        row(ui, "max DLA", l.max_dla_deg, 28.5, "°", |d, v| {
            d.launch.max_dla_deg = v
        });
    }

    fn spacecraft_rows(&mut self, ui: &mut egui::Ui) {
        let mut sc = self.doc.design.spacecraft.clone();
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
            self.doc.edit_live(|d| d.spacecraft = sc.clone());
        }
    }

    fn vehicle_rows(&mut self, ui: &mut egui::Ui) {
        let Some(mut lv) = self.doc.design.launch_vehicle.clone() else {
            if ui.button("Add a launch-vehicle table").clicked() {
                self.doc.edit(|d| {
                    d.launch_vehicle = Some(LaunchVehicle {
                        name: "Illustrative vehicle".into(),
                        note: "Invented curve; replace with the vehicle's published performance."
                            .into(),
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
                    })
                });
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
        ui.horizontal(|ui| {
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
                self.doc.edit(|d| d.launch_vehicle = None);
            }
        });
        let increasing = lv
            .performance
            .windows(2)
            .all(|w| w[1].c3_km2_s2 > w[0].c3_km2_s2);
        if !increasing {
            ui.label(
                RichText::new("! C3 must increase down the table; the table is not applied")
                    .color(style::error_color(self.settings.dark)),
            );
        }
        if changed && increasing && self.doc.design.launch_vehicle.is_some() {
            self.doc.edit_live(|d| d.launch_vehicle = Some(lv.clone()));
        }
    }

    /// The ledger panel: per-stop table, totals, warnings, copy.
    pub fn ledger(&mut self, ui: &mut egui::Ui) {
        let dark = self.settings.dark;
        let e = &self.eval;
        let d = &self.doc.design;
        let mut copy = None;
        ui.horizontal(|ui| {
            ui.heading("Ledger");
            if ui
                .button("Copy table")
                .on_hover_text("Copy the table as tab-separated text")
                .clicked()
            {
                copy = Some(self.ledger_text());
            }
            let l = &e.ledger;
            ui.label(format!(
                "Δv total {} km/s · propellant {} of {} kg (margin {} kg) · final {} kg",
                style::fixed(l.total_dv_km_s, 3),
                style::fixed(l.propellant_needed_kg, 0),
                style::fixed(d.spacecraft.propellant_kg, 0),
                style::fixed(l.propellant_margin_kg, 0),
                style::fixed(l.final_mass_kg, 0)
            ));
            if let Some(m) = l.delivered_mass_kg {
                ui.label(format!(
                    "· delivered with launch vehicle {} kg",
                    style::fixed(m, 0)
                ));
            }
            ui.label(format!(
                "· C3 {} km²/s² · TOF {} d",
                style::fixed(e.launch.c3, 2),
                style::fixed(e.total_tof_days(), 0)
            ));
        });
        egui::ScrollArea::both().show(ui, |ui| {
            egui::Grid::new("ledger-grid")
                .striped(true)
                .num_columns(11)
                .show(ui, |ui| {
                    for h in [
                        "#",
                        "stop",
                        "body",
                        "date (UTC)",
                        "v∞ in (km/s)",
                        "v∞ out (km/s)",
                        "altitude (km)",
                        "turn (°)",
                        "Δv (km/s)",
                        "energy gain (km²/s²)",
                        "mass (kg)",
                    ] {
                        ui.label(RichText::new(h).strong());
                    }
                    ui.end_row();
                    for (k, s) in e.stops.iter().enumerate() {
                        let sw = s.swingby;
                        let is_sw = s.kind == StopKind::SwingBy;
                        if ui
                            .selectable_label(self.selected == k, format!("{}", k + 1))
                            .clicked()
                        {
                            self.selected = k;
                        }
                        ui.label(s.kind.label());
                        ui.label(
                            RichText::new(&d.stops[k].body)
                                .color(style::body_color(&d.stops[k].body)),
                        );
                        ui.label(s.epoch.to_date_utc());
                        ui.label(if k > 0 {
                            style::fixed(s.vinf_in.norm(), 3)
                        } else {
                            "—".into()
                        });
                        ui.label(if k + 1 < e.stops.len() {
                            style::fixed(s.vinf_out.norm(), 3)
                        } else {
                            "—".into()
                        });
                        let alt = sw.map(|w| (w.altitude_km, w.min_altitude_km));
                        match alt {
                            Some((a, m)) if is_sw => {
                                let t = RichText::new(style::fixed(a, 0));
                                ui.label(if a < m - 1e-3 {
                                    t.color(style::error_color(dark))
                                } else {
                                    t
                                });
                            }
                            _ => {
                                ui.label("—");
                            }
                        }
                        ui.label(
                            sw.filter(|_| is_sw)
                                .map(|w| style::fixed(w.turn_rad.to_degrees(), 1))
                                .unwrap_or("—".into()),
                        );
                        ui.label(style::fixed(s.dv_km_s, 3));
                        ui.label(if is_sw {
                            style::fixed(s.gain(), 2)
                        } else {
                            "—".into()
                        });
                        ui.label(style::fixed(s.mass_after_kg, 0));
                        ui.end_row();
                    }
                });
            for w in &e.warnings {
                ui.label(RichText::new(format!("! {w}")).color(style::warn_color(dark)));
            }
        });
        if let Some(t) = copy {
            ui.ctx().copy_text(t);
            self.status = Some(("ledger copied to the clipboard".into(), false));
        }
    }

    /// The ledger as tab-separated text.
    pub fn ledger_text(&self) -> String {
        crate::mission::export::events_csv(&self.doc.design, &self.eval).replace(',', "\t")
    }
}
