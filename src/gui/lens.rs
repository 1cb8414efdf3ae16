//! Swing-by lens: the planet-centred hyperbola of the selected swing-by in its own plane, the
//! planet and its minimum-altitude ring, the v∞ asymptotes and the periapsis. Dragging the
//! periapsis changes the altitude, dragging on the aim dial turns the B-plane aim; the figures and
//! the Sun view follow on the same frame, and a drag is one undo step.

use eframe::egui::{
    self, Align2, Color32, FontId, Pos2, RichText, Sense, Shape, Stroke, pos2, vec2,
};

use crate::mission::design::SwingbyMode;
use crate::mission::evaluate::StopKind;

use super::app::TourwrightApp;
use super::style;

/// Interaction state of the lens.
#[derive(Default)]
pub struct LensState {
    /// km per point frozen during a periapsis drag (so the picture does not rescale under the
    /// pointer).
    pub frozen_km_per_pt: Option<f64>,
}

impl TourwrightApp {
    /// The lens view.
    pub fn lens_view(&mut self, ui: &mut egui::Ui) {
        let dark = self.settings.dark;
        let n = self.eval.stops.len();
        let swingbys: Vec<usize> = (0..n)
            .filter(|&k| self.eval.stops[k].kind == StopKind::SwingBy)
            .collect();
        ui.horizontal(|ui| {
            ui.label("Swing-by:");
            for &k in &swingbys {
                let label = format!("{} {}", k + 1, self.doc.design.stops[k].body);
                if ui.selectable_label(self.selected == k, label).clicked() {
                    self.selected = k;
                }
            }
        });
        if swingbys.is_empty() {
            ui.label("This tour has no swing-by: add a stop between launch and arrival in the Tour panel.");
            return;
        }
        if !swingbys.contains(&self.selected) {
            self.selected = swingbys[0];
        }
        let k = self.selected;
        let Some(sw) = self.eval.stops[k].swingby else {
            ui.label("The swing-by could not be evaluated; see the warnings.");
            return;
        };
        let st = self.eval.stops[k];
        let body_name = self.doc.design.stops[k].body.clone();
        let Some(body) = self.doc.design.resolve(&body_name) else {
            return;
        };
        let data = self.doc.design.body_data(&body);
        let vin = st.vinf_in;
        let vout = st.vinf_out;
        if vin.norm() == 0.0 || data.mu <= 0.0 || !sw.rp_km.is_finite() || sw.rp_km > 1e12 {
            ui.label("No hyperbola to show (zero v∞, massless body or no turn needed).");
            return;
        }
        let avail = ui.available_size();
        let side_w = 330.0f32.min(avail.x * 0.45);
        ui.horizontal_top(|ui| {
            // ---- the hyperbola canvas
            let canvas = vec2((avail.x - side_w - 12.0).max(200.0), avail.y.max(200.0));
            let (resp, painter) = ui.allocate_painter(canvas, Sense::click_and_drag());
            let rect = resp.rect;
            painter.rect_filled(rect, 4.0, style::canvas(dark));
            let painter = painter.with_clip_rect(rect);
            let rp = sw.rp_km;
            let r_body = data.radius_km.max(1.0);
            let extent_km = (rp * 5.0).max(r_body * 4.0);
            let km_per_pt = self
                .lens
                .frozen_km_per_pt
                .unwrap_or(extent_km / (rect.width().min(rect.height()) as f64 * 0.5));
            let c = rect.center() + vec2(rect.width() * 0.12, 0.0);
            let (e_in, e_out) = (sw.e_in.max(1.0 + 1e-9), sw.e_out.max(1.0 + 1e-9));
            // Rotate so the incoming asymptote points to +x on screen.
            let nu_in = (-1.0 / e_in).acos();
            let phi = (e_in - 1.0 / e_in).atan2(nu_in.sin());
            let (sphi, cphi) = (-phi).sin_cos();
            let to_screen = |x: f64, y: f64| -> Pos2 {
                let (xr, yr) = (x * cphi - y * sphi, x * sphi + y * cphi);
                pos2(c.x + (xr / km_per_pt) as f32, c.y - (yr / km_per_pt) as f32)
            };
            let branch = |e: f64, from: f64, to: f64| -> Vec<Pos2> {
                let p = rp * (1.0 + e);
                (0..=160)
                    .map(|i| {
                        let nu = from + (to - from) * i as f64 / 160.0;
                        let r = p / (1.0 + e * nu.cos());
                        to_screen(r * nu.cos(), r * nu.sin())
                    })
                    .collect()
            };
            // Planet, minimum-altitude ring.
            let pc = to_screen(0.0, 0.0);
            painter.circle_filled(
                pc,
                (r_body / km_per_pt) as f32,
                style::body_color(&body_name),
            );
            let ring_r = ((r_body + sw.min_altitude_km) / km_per_pt) as f32;
            let ring: Vec<Pos2> = (0..=120)
                .map(|i| pc + ring_r * egui::Vec2::angled(i as f32 / 120.0 * std::f32::consts::TAU))
                .collect();
            painter.extend(Shape::dashed_line(
                &ring,
                Stroke::new(1.2, style::error_color(dark)),
                5.0,
                4.0,
            ));
            // Branches.
            let nu_out = (-1.0 / e_out).acos();
            let col_in = style::leg_color(k - 1);
            let col_out = style::leg_color(k);
            painter.add(Shape::line(
                branch(e_in, -0.985 * nu_in, 0.0),
                Stroke::new(2.5, col_in),
            ));
            painter.add(Shape::line(
                branch(e_out, 0.0, 0.985 * nu_out),
                Stroke::new(2.5, col_out),
            ));
            // Asymptote directions as arrows from the planet.
            let arrow_len = 0.42 * rect.width().min(rect.height());
            let dir_in = {
                let a = to_screen(0.0, 0.0);
                let p = rp * (1.0 + e_in);
                let nu = -0.999 * nu_in;
                let r = p / (1.0 + e_in * nu.cos());
                let b = to_screen(r * nu.cos(), r * nu.sin());
                (a - b).normalized()
            };
            let dir_out = {
                let a = to_screen(0.0, 0.0);
                let p = rp * (1.0 + e_out);
                let nu = 0.999 * nu_out;
                let r = p / (1.0 + e_out * nu.cos());
                let b = to_screen(r * nu.cos(), r * nu.sin());
                (b - a).normalized()
            };
            let text_c = if dark {
                Color32::from_gray(215)
            } else {
                Color32::from_gray(40)
            };
            painter.arrow(
                rect.left_center() + vec2(20.0, -rect.height() * 0.38),
                dir_in * arrow_len * 0.35,
                Stroke::new(2.0, col_in),
            );
            painter.text(
                rect.left_center() + vec2(20.0, -rect.height() * 0.38 - 8.0),
                Align2::LEFT_BOTTOM,
                format!("v∞ in {:.2} km/s", vin.norm()),
                FontId::proportional(13.0),
                col_in,
            );
            painter.arrow(
                rect.left_center() + vec2(20.0, rect.height() * 0.30),
                dir_out * arrow_len * 0.35,
                Stroke::new(2.0, col_out),
            );
            painter.text(
                rect.left_center() + vec2(20.0, rect.height() * 0.30 - 8.0),
                Align2::LEFT_BOTTOM,
                format!("v∞ out {:.2} km/s", vout.norm()),
                FontId::proportional(13.0),
                col_out,
            );
            // Periapsis handle.
            let pp = to_screen(rp, 0.0);
            let handle = egui::Rect::from_center_size(pp, vec2(22.0, 22.0));
            let h_resp = ui.interact(handle, resp.id.with("periapsis"), Sense::drag());
            let hot = h_resp.hovered() || h_resp.dragged();
            painter.circle_filled(
                pp,
                if hot { 8.0 } else { 6.0 },
                if dark { Color32::WHITE } else { Color32::BLACK },
            );
            painter.circle_stroke(pp, 10.0, Stroke::new(1.5, col_out));
            painter.text(
                pp + vec2(12.0, 0.0),
                Align2::LEFT_CENTER,
                format!("periapsis {} km alt", style::fixed(sw.altitude_km, 0)),
                FontId::proportional(13.0),
                text_c,
            );
            if h_resp.drag_started() {
                self.lens.frozen_km_per_pt = Some(km_per_pt);
                if !sw.shaped {
                    self.make_shaped(k);
                }
            }
            if h_resp.dragged() {
                if let Some(p) = h_resp.interact_pointer_pos() {
                    let rp_new = (p.distance(pc) as f64 * km_per_pt).max(r_body * 0.2);
                    let alt = rp_new - r_body;
                    self.doc.edit_live(|d| {
                        if let SwingbyMode::Shaped { aim_deg, .. } = d.stops[k].swingby.mode {
                            d.stops[k].swingby.mode = SwingbyMode::Shaped {
                                altitude_km: alt,
                                aim_deg,
                            };
                        }
                    });
                }
            }
            if h_resp.drag_stopped() {
                self.lens.frozen_km_per_pt = None;
                self.doc.commit_gesture();
            }
            h_resp.on_hover_text(
                "Drag to change the periapsis altitude (switches a targeted swing-by to shaped)",
            );
            painter.text(
                rect.left_bottom() + vec2(8.0, -8.0),
                Align2::LEFT_BOTTOM,
                format!(
                    "{} · dashed ring: minimum altitude {} km",
                    body_name,
                    style::fixed(sw.min_altitude_km, 0)
                ),
                FontId::proportional(12.0),
                text_c,
            );
            // ---- side panel: aim dial and figures
            ui.vertical(|ui| {
                ui.set_width(side_w);
                self.aim_dial(ui, k, side_w);
                self.lens_controls(ui, k);
                self.lens_figures(ui, k);
            });
        });
    }

    fn aim_dial(&mut self, ui: &mut egui::Ui, k: usize, w: f32) {
        let dark = self.settings.dark;
        let Some(sw) = self.eval.stops[k].swingby else {
            return;
        };
        let size = w.min(190.0);
        let (resp, painter) = ui.allocate_painter(vec2(w, size), Sense::click_and_drag());
        let c = resp.rect.center();
        let r = size * 0.42;
        let faint = style::faint(dark);
        let text_c = if dark {
            Color32::from_gray(215)
        } else {
            Color32::from_gray(40)
        };
        painter.circle_stroke(c, r, Stroke::new(1.0, faint));
        painter.line_segment(
            [c - vec2(r, 0.0), c + vec2(r, 0.0)],
            Stroke::new(1.0, faint),
        );
        painter.line_segment(
            [c - vec2(0.0, r), c + vec2(0.0, r)],
            Stroke::new(1.0, faint),
        );
        painter.text(
            c + vec2(r + 4.0, 0.0),
            Align2::LEFT_CENTER,
            "T",
            FontId::proportional(12.0),
            text_c,
        );
        painter.text(
            c + vec2(0.0, r + 2.0),
            Align2::CENTER_TOP,
            "R",
            FontId::proportional(12.0),
            text_c,
        );
        let aim = sw.bplane.aim as f32;
        let tip = c + r * 0.9 * vec2(aim.cos(), aim.sin());
        painter.arrow(c, tip - c, Stroke::new(2.5, style::leg_color(k)));
        painter.text(
            resp.rect.left_top() + vec2(4.0, 2.0),
            Align2::LEFT_TOP,
            format!("B-plane aim {:.1}°", sw.bplane.aim.to_degrees()),
            FontId::proportional(12.0),
            text_c,
        );
        if resp.drag_started() && !sw.shaped {
            self.make_shaped(k);
        }
        if resp.dragged() {
            if let Some(p) = resp.interact_pointer_pos() {
                let v = p - c;
                let aim_deg = (v.y as f64).atan2(v.x as f64).to_degrees();
                self.doc.edit_live(|d| {
                    if let SwingbyMode::Shaped { altitude_km, .. } = d.stops[k].swingby.mode {
                        d.stops[k].swingby.mode = SwingbyMode::Shaped {
                            altitude_km,
                            aim_deg,
                        };
                    }
                });
            }
        }
        if resp.drag_stopped() {
            self.doc.commit_gesture();
        }
        resp.on_hover_text(
            "Drag around the dial to turn the aim (the direction of B from T towards R)",
        );
    }

    fn lens_controls(&mut self, ui: &mut egui::Ui, k: usize) {
        let mode = self.doc.design.stops[k].swingby.mode;
        match mode {
            SwingbyMode::Targeted => {
                ui.horizontal(|ui| {
                    ui.label(RichText::new("targeted").strong()).on_hover_text(
                        "The stop dates fix both legs; the swing-by is what it must be",
                    );
                    if ui.button("Shape by hand").clicked() {
                        self.make_shaped(k);
                    }
                });
            }
            SwingbyMode::Shaped {
                mut altitude_km,
                mut aim_deg,
            } => {
                let r1 = ui.add(
                    egui::Slider::new(&mut altitude_km, 0.0..=2.0e6)
                        .logarithmic(true)
                        .smallest_positive(50.0)
                        .text("periapsis altitude (km)"),
                );
                let r2 =
                    ui.add(egui::Slider::new(&mut aim_deg, -180.0..=180.0).text("aim angle (°)"));
                if r1.changed() || r2.changed() {
                    self.doc.edit_live(|d| {
                        d.stops[k].swingby.mode = SwingbyMode::Shaped {
                            altitude_km,
                            aim_deg,
                        }
                    });
                }
                ui.horizontal(|ui| {
                    if ui.button("Back to targeted").clicked() {
                        self.doc
                            .edit(|d| d.stops[k].swingby.mode = SwingbyMode::Targeted);
                    }
                });
                self.retarget_row(ui, k);
            }
        }
    }

    fn lens_figures(&mut self, ui: &mut egui::Ui, k: usize) {
        let dark = self.settings.dark;
        let st = self.eval.stops[k];
        let Some(sw) = st.swingby else { return };
        egui::Grid::new("lens-figures")
            .num_columns(2)
            .striped(true)
            .show(ui, |ui| {
                let mut row = |name: &str, tip: &str, val: String| {
                    ui.label(name).on_hover_text(tip);
                    ui.label(val);
                    ui.end_row();
                };
                row(
                    "v∞ in / out",
                    "hyperbolic excess speed relative to the planet",
                    format!(
                        "{} / {} km/s",
                        style::fixed(st.vinf_in.norm(), 3),
                        style::fixed(st.vinf_out.norm(), 3)
                    ),
                );
                row(
                    "eccentricity",
                    "e = 1 + r_p v∞²/μ (in / out)",
                    format!(
                        "{} / {}",
                        style::fixed(sw.e_in, 4),
                        style::fixed(sw.e_out, 4)
                    ),
                );
                row(
                    "periapsis radius",
                    "from the planet's centre",
                    format!("{} km", style::fixed(sw.rp_km, 0)),
                );
                row(
                    "altitude (min)",
                    "above the equatorial radius",
                    format!(
                        "{} ({}) km",
                        style::fixed(sw.altitude_km, 0),
                        style::fixed(sw.min_altitude_km, 0)
                    ),
                );
                row(
                    "turn angle",
                    "angle between v∞ in and v∞ out",
                    format!("{}°", style::fixed(sw.turn_rad.to_degrees(), 2)),
                );
                row(
                    "turn available",
                    "largest unpowered turn at the minimum altitude",
                    format!("{}°", style::fixed(sw.turn_available_rad.to_degrees(), 2)),
                );
                row(
                    "powered Δv",
                    "impulse at periapsis joining two v∞ magnitudes",
                    format!("{} km/s", style::fixed(sw.powered_dv_km_s, 3)),
                );
                row(
                    "B·T / B·R",
                    "B-plane coordinates (T = S × ecliptic north)",
                    format!(
                        "{} / {} km",
                        style::fixed(sw.bplane.b_t, 0),
                        style::fixed(sw.bplane.b_r, 0)
                    ),
                );
                row(
                    "|B|",
                    "impact parameter",
                    format!("{} km", style::fixed(sw.bplane.b, 0)),
                );
                row(
                    "speed before to after",
                    "heliocentric",
                    format!(
                        "{} to {} km/s",
                        style::fixed(st.speed_before, 3),
                        style::fixed(st.speed_after, 3)
                    ),
                );
                row(
                    "energy gain",
                    "change of heliocentric specific energy",
                    format!("{} km²/s²", style::fixed(st.gain(), 2)),
                );
                row(
                    "planet's Δv",
                    "|v∞ out − v∞ in|: what the planet gave",
                    format!("{} km/s", style::fixed(sw.planet_dv_km_s, 3)),
                );
                if let Some((d, t)) = sw.closest_approach {
                    row(
                        "closest approach",
                        "to the next body on the ballistic leg after a shaped swing-by",
                        format!("{} km on {}", style::fixed(d, 0), t.to_date_utc()),
                    );
                }
            });
        if sw.altitude_km < sw.min_altitude_km - 1e-3 {
            ui.label(
                RichText::new("! periapsis below the minimum altitude")
                    .color(style::error_color(dark)),
            );
        }
    }
}
