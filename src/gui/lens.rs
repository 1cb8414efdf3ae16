//! Swing-by lens: the planet-centred hyperbola of the selected swing-by in its own plane (points
//! from the engine's `flyby::hyperbola_arc`), the planet and its minimum-altitude ring, the v∞
//! asymptotes and the periapsis. Dragging the periapsis changes the altitude, dragging on the aim
//! dial turns the B-plane aim; the figures, the Sun view and the ledger follow on the next frame,
//! and a drag is one undo step.

use eframe::egui::{self, Align2, Color32, FontId, Pos2, RichText, Sense, Shape, Stroke, vec2};

use tourwright_astro::flyby;
use tourwright_mission::design::SwingbyMode;
use tourwright_mission::evaluate::StopKind;
use tourwright_mission::{Edit, rules};

use super::action::{Action, Actions};
use super::context::ViewCtx;
use super::{shared, style};

/// Interaction state of the lens.
#[derive(Default)]
pub struct LensView {
    /// km per point frozen during a periapsis drag (so the picture does not rescale under the
    /// pointer).
    frozen_km_per_pt: Option<f64>,
    /// Hyperbola points, reused frame to frame.
    buf: Vec<(f64, f64)>,
    /// Where the periapsis handle and the planet's centre were drawn last frame (for tests).
    pub handle: Option<(Pos2, Pos2)>,
}

impl LensView {
    /// Draw the lens.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let mut out = Vec::new();
        let Some(tour) = vc.tour else {
            ui.label("The design cannot be evaluated; see the warnings.");
            return out;
        };
        let e = vc.eval;
        let swingbys: Vec<usize> = (0..e.stops.len())
            .filter(|&k| e.stops[k].kind == StopKind::SwingBy)
            .collect();
        let unreached = e.first_unreached().unwrap_or(usize::MAX);
        ui.horizontal_wrapped(|ui| {
            ui.label("Swing-by:");
            for &k in &swingbys {
                let mut label = format!("{} {}", k + 1, tour.stops[k].body.name);
                if k >= unreached {
                    label.push_str(" (not reached)");
                }
                if ui.selectable_label(vc.selected == k, label).clicked() {
                    out.push(Action::Select(k));
                }
            }
        });
        if swingbys.is_empty() {
            ui.label(
                "This tour has no swing-by: add a stop between launch and arrival in the Tour panel.",
            );
            return out;
        }
        let k = if swingbys.contains(&vc.selected) {
            vc.selected
        } else {
            swingbys[0]
        };
        if k >= unreached {
            not_reached(ui, vc, k, unreached, &mut out);
            return out;
        }
        let Some(sw) = e.stops.get(k).and_then(|s| s.swingby) else {
            ui.label("The swing-by could not be evaluated; see the warnings.");
            return out;
        };
        let st = e.stops[k];
        let body = &tour.stops[k].body;
        let data = body.data;
        let (Some(rp), Some(e_in), Some(e_out)) = (sw.rp_km, sw.e_in, sw.e_out) else {
            ui.label("No hyperbola to show (zero v∞, massless body or no turn needed).");
            return out;
        };
        let (Some(phi), Some(_)) = (
            flyby::incoming_direction_angle(e_in),
            flyby::asymptote_true_anomaly(e_out),
        ) else {
            ui.label("No hyperbola to show.");
            return out;
        };
        let dark = vc.dark;
        let avail = ui.available_size();
        let side_w = 330.0f32.min(avail.x * 0.45);
        ui.horizontal_top(|ui| {
            let canvas = vec2((avail.x - side_w - 12.0).max(200.0), avail.y.max(200.0));
            let (resp, painter) = ui.allocate_painter(canvas, Sense::click_and_drag());
            let rect = resp.rect;
            painter.rect_filled(rect, 4.0, style::canvas(dark));
            let painter = painter.with_clip_rect(rect);
            let r_body = data.radius_km.max(1.0);
            let extent_km = (rp * 5.0).max(r_body * 4.0);
            let km_per_pt = self
                .frozen_km_per_pt
                .unwrap_or(extent_km / (rect.width().min(rect.height()) as f64 * 0.5));
            let c = rect.center() + vec2(rect.width() * 0.12, 0.0);
            // Rotate so the incoming asymptote points to +x on screen.
            let (sphi, cphi) = (-phi).sin_cos();
            let to_screen = |(x, y): (f64, f64)| -> Pos2 {
                let (xr, yr) = (x * cphi - y * sphi, x * sphi + y * cphi);
                egui::pos2(c.x + (xr / km_per_pt) as f32, c.y - (yr / km_per_pt) as f32)
            };
            let pc = to_screen((0.0, 0.0));
            painter.circle_filled(
                pc,
                (r_body / km_per_pt) as f32,
                style::body_color(&body.name),
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
            // Branches from the engine: incoming up to periapsis, outgoing from it.
            let col_in = style::leg_color(k - 1);
            let col_out = style::leg_color(k);
            self.buf.resize(161, (0.0, 0.0));
            for (ecc, from, to, col) in [(e_in, -0.985, 0.0, col_in), (e_out, 0.0, 0.985, col_out)]
            {
                let n = flyby::hyperbola_arc(rp, ecc, from, to, &mut self.buf);
                let pts: Vec<Pos2> = self.buf[..n].iter().map(|p| to_screen(*p)).collect();
                painter.add(Shape::line(pts, Stroke::new(2.5, col)));
            }
            let mut ends = [(0.0, 0.0); 2];
            let dir = |ecc: f64, f: f64, ends: &mut [(f64, f64); 2]| {
                flyby::hyperbola_arc(rp, ecc, f, f * 0.99, ends);
                let (a, b) = (to_screen(ends[0]), to_screen(ends[1]));
                (b - a).normalized()
            };
            let dir_in = dir(e_in, -0.999, &mut ends);
            let dir_out = -dir(e_out, 0.999, &mut ends);
            let arrow_len = 0.42 * rect.width().min(rect.height());
            let ink = style::ink(dark);
            for (pos, d, text, col) in [
                (
                    rect.left_center() + vec2(20.0, -rect.height() * 0.38),
                    dir_in,
                    format!("v∞ in {:.2} km/s", st.vinf_in.norm()),
                    col_in,
                ),
                (
                    rect.left_center() + vec2(20.0, rect.height() * 0.30),
                    dir_out,
                    format!("v∞ out {:.2} km/s", st.vinf_out.norm()),
                    col_out,
                ),
            ] {
                painter.arrow(pos, d * arrow_len * 0.35, Stroke::new(2.0, col));
                painter.text(
                    pos - vec2(0.0, 8.0),
                    Align2::LEFT_BOTTOM,
                    text,
                    FontId::proportional(13.0),
                    col,
                );
            }
            // Periapsis handle.
            let pp = to_screen((rp, 0.0));
            self.handle = Some((pp, pc));
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
                format!("periapsis {} km alt", style::fixed_opt(sw.altitude_km, 0)),
                FontId::proportional(13.0),
                ink,
            );
            if h_resp.drag_started() {
                self.frozen_km_per_pt = Some(km_per_pt);
                if !sw.shaped {
                    out.push(Action::Edit(shared::shaped_from_current(vc, k)));
                }
            }
            if h_resp.dragged() {
                if let Some(p) = h_resp.interact_pointer_pos() {
                    // Shift: a fine drag, one tenth of the pointer's radial motion, from the
                    // altitude the design has now.
                    let fine = ui.input(|i| i.modifiers.shift);
                    let rp_new = if fine {
                        let radial = h_resp.drag_delta().dot((pp - pc).normalized()) as f64;
                        rp + FINE * radial * km_per_pt
                    } else {
                        p.distance(pc) as f64 * km_per_pt
                    }
                    .max(r_body * 0.2);
                    let aim_deg = match vc.design.stops[k].swingby.mode {
                        SwingbyMode::Shaped { aim_deg, .. } => aim_deg,
                        SwingbyMode::Targeted => {
                            sw.bplane.map(|b| b.aim.to_degrees()).unwrap_or(0.0)
                        }
                    };
                    out.push(Action::EditLive(Edit::SetSwingbyMode {
                        stop: k,
                        mode: SwingbyMode::Shaped {
                            altitude_km: rp_new - r_body,
                            aim_deg,
                        },
                    }));
                }
            }
            if h_resp.drag_stopped() {
                self.frozen_km_per_pt = None;
                out.push(Action::CommitGesture);
            }
            h_resp.on_hover_text(
                "Drag to change the periapsis altitude (switches a targeted swing-by to shaped); \
                 hold Shift for a fine drag",
            );
            painter.text(
                rect.left_bottom() + vec2(8.0, -8.0),
                Align2::LEFT_BOTTOM,
                format!(
                    "{} · dashed ring: minimum altitude {} km",
                    body.name,
                    style::fixed(sw.min_altitude_km, 0)
                ),
                FontId::proportional(12.0),
                ink,
            );
            // The side column scrolls when the window is short.
            egui::ScrollArea::vertical()
                .id_salt("lens-side")
                .show(ui, |ui| {
                    // Top-down inside (the scroll area takes the row's left-to-right layout).
                    ui.vertical(|ui| {
                        ui.set_width(side_w);
                        aim_dial(ui, vc, k, side_w, &mut out);
                        lens_controls(ui, vc, k, &mut out);
                        lens_figures(ui, vc, k);
                    });
                });
        });
        out
    }
}

/// A fine drag (Shift held) moves by this fraction of the pointer's motion.
pub const FINE: f64 = 0.1;

/// A swing-by the spacecraft does not reach: say why, and offer the way back.
fn not_reached(ui: &mut egui::Ui, vc: &ViewCtx<'_>, k: usize, unreached: usize, out: &mut Actions) {
    let from = unreached.saturating_sub(1);
    let name = |j: usize| {
        vc.tour
            .map_or(String::new(), |t| t.stops[j].body.name.to_string())
    };
    let miss = vc
        .eval
        .stops
        .get(from)
        .and_then(|s| s.swingby)
        .and_then(|s| s.miss_km);
    ui.label(
        RichText::new(format!(
            "! Stop {} ({}) is not reached: the shaped swing-by at stop {} ({}) misses {} by {} \
             km, so the spacecraft never gets here and this swing-by has no figures.",
            k + 1,
            name(k),
            from + 1,
            name(from),
            name(unreached),
            miss.map_or("?".into(), |m| style::fixed(m, 0)),
        ))
        .color(style::warn_color(vc.dark)),
    );
    if ui.button(format!("Go to stop {}", from + 1)).clicked() {
        out.push(Action::Select(from));
    }
    shared::retarget_row(ui, vc, from, out);
}

fn aim_dial(ui: &mut egui::Ui, vc: &ViewCtx<'_>, k: usize, w: f32, out: &mut Actions) {
    let dark = vc.dark;
    let Some(sw) = vc.eval.stops[k].swingby else {
        return;
    };
    let size = w.min(190.0);
    let (resp, painter) = ui.allocate_painter(vec2(w, size), Sense::click_and_drag());
    let c = resp.rect.center();
    let r = size * 0.42;
    let faint = style::faint(dark);
    let ink = style::ink(dark);
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
        ink,
    );
    painter.text(
        c + vec2(0.0, r + 2.0),
        Align2::CENTER_TOP,
        "R",
        FontId::proportional(12.0),
        ink,
    );
    let aim = sw.bplane.map(|b| b.aim).unwrap_or(0.0) as f32;
    let tip = c + r * 0.9 * vec2(aim.cos(), aim.sin());
    painter.arrow(c, tip - c, Stroke::new(2.5, style::leg_color(k)));
    painter.text(
        resp.rect.left_top() + vec2(4.0, 2.0),
        Align2::LEFT_TOP,
        format!("B-plane aim {:.1}°", aim.to_degrees()),
        FontId::proportional(12.0),
        ink,
    );
    if resp.drag_started() && !sw.shaped {
        out.push(Action::Edit(shared::shaped_from_current(vc, k)));
    }
    if resp.dragged() {
        if let Some(p) = resp.interact_pointer_pos() {
            let v = p - c;
            let pointer_deg = (v.y as f64).atan2(v.x as f64).to_degrees();
            // Shift: a fine drag, one tenth of the pointer's turn about the centre.
            let aim_deg = if ui.input(|i| i.modifiers.shift) {
                let before = v - resp.drag_delta();
                let turn = pointer_deg - (before.y as f64).atan2(before.x as f64).to_degrees();
                let turn = (turn + 540.0).rem_euclid(360.0) - 180.0;
                (aim as f64).to_degrees() + FINE * turn
            } else {
                pointer_deg
            };
            let altitude_km = match vc.design.stops[k].swingby.mode {
                SwingbyMode::Shaped { altitude_km, .. } => altitude_km,
                SwingbyMode::Targeted => sw.altitude_km.unwrap_or(10_000.0),
            };
            out.push(Action::EditLive(Edit::SetSwingbyMode {
                stop: k,
                mode: SwingbyMode::Shaped {
                    altitude_km,
                    aim_deg,
                },
            }));
        }
    }
    if resp.drag_stopped() {
        out.push(Action::CommitGesture);
    }
    resp.on_hover_text(
        "Drag around the dial to turn the aim (the direction of B from T towards R); hold Shift \
         for a fine drag",
    );
}

fn lens_controls(ui: &mut egui::Ui, vc: &ViewCtx<'_>, k: usize, out: &mut Actions) {
    match vc.design.stops[k].swingby.mode {
        SwingbyMode::Targeted => {
            ui.horizontal(|ui| {
                ui.label(RichText::new("targeted").strong())
                    .on_hover_text("The stop dates fix both legs; the swing-by is what it must be");
                if ui.button("Shape by hand").clicked() {
                    out.push(Action::Edit(shared::shaped_from_current(vc, k)));
                }
            });
        }
        SwingbyMode::Shaped {
            mut altitude_km,
            mut aim_deg,
        } => {
            // Sliders sized to the column (value and label beside them).
            ui.spacing_mut().slider_width = (ui.available_width() - 150.0).clamp(60.0, 180.0);
            let r1 = ui
                .add(
                    egui::Slider::new(&mut altitude_km, 0.0..=2.0e6)
                        .logarithmic(true)
                        .smallest_positive(50.0)
                        .text("altitude (km)"),
                )
                .on_hover_text("Periapsis altitude above the surface");
            let r2 = ui
                .add(egui::Slider::new(&mut aim_deg, -180.0..=180.0).text("aim (°)"))
                .on_hover_text("B-plane aim: the direction of B from T towards R");
            if r1.changed() || r2.changed() {
                out.push(Action::EditLive(Edit::SetSwingbyMode {
                    stop: k,
                    mode: SwingbyMode::Shaped {
                        altitude_km,
                        aim_deg,
                    },
                }));
            }
            if ui.button("Back to targeted").clicked() {
                out.push(Action::Edit(Edit::SetSwingbyMode {
                    stop: k,
                    mode: SwingbyMode::Targeted,
                }));
            }
            shared::retarget_row(ui, vc, k, out);
        }
    }
}

fn lens_figures(ui: &mut egui::Ui, vc: &ViewCtx<'_>, k: usize) {
    let st = vc.eval.stops[k];
    let Some(sw) = st.swingby else { return };
    let f = style::fixed;
    let fo = style::fixed_opt;
    let bp = sw.bplane;
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
                    f(st.vinf_in.norm(), 3),
                    f(st.vinf_out.norm(), 3)
                ),
            );
            row(
                "eccentricity",
                "e = 1 + r_p v∞²/μ (in / out)",
                format!("{} / {}", fo(sw.e_in, 4), fo(sw.e_out, 4)),
            );
            row(
                "periapsis radius",
                "from the planet's centre",
                format!("{} km", fo(sw.rp_km, 0)),
            );
            row(
                "altitude (min)",
                "above the equatorial radius",
                format!(
                    "{} ({}) km",
                    fo(sw.altitude_km, 0),
                    f(sw.min_altitude_km, 0)
                ),
            );
            // The converged continuous n-body trajectory's periapsis here, beside the design's.
            if let Some(enc) = vc
                .jobs
                .continuous
                .as_ref()
                .filter(|c| c.revision == vc.revision && c.value.converged)
                .and_then(|c| c.value.encounters.iter().find(|en| en.stop == k))
            {
                row(
                    "n-body altitude",
                    "periapsis altitude of the converged continuous n-body trajectory (Fidelity \
                     view), and its epoch against the design's",
                    format!(
                        "{} km, {:+.1} h",
                        fo(enc.altitude_km, 0),
                        enc.epoch_shift_s / 3600.0
                    ),
                );
                row(
                    "n-body B·T / B·R",
                    "B-plane of the converged trajectory's osculating approach",
                    format!("{} / {} km", fo(enc.b_t_km, 0), fo(enc.b_r_km, 0)),
                );
            }
            row(
                "turn angle",
                "angle between v∞ in and v∞ out",
                format!("{}°", f(sw.turn_rad.to_degrees(), 2)),
            );
            row(
                "turn available",
                "largest unpowered turn at the minimum altitude",
                format!("{}°", fo(sw.turn_available_rad.map(f64::to_degrees), 2)),
            );
            row(
                "powered Δv",
                "impulse at periapsis joining two v∞ magnitudes",
                format!("{} km/s", f(sw.powered_dv_km_s, 3)),
            );
            row(
                "B·T / B·R",
                "B-plane coordinates (T = S × ecliptic north)",
                format!(
                    "{} / {} km",
                    fo(bp.map(|b| b.b_t), 0),
                    fo(bp.map(|b| b.b_r), 0)
                ),
            );
            row(
                "|B|",
                "impact parameter",
                format!("{} km", fo(bp.map(|b| b.b), 0)),
            );
            row(
                "speed before to after",
                "heliocentric",
                format!("{} to {} km/s", f(st.speed_before, 3), f(st.speed_after, 3)),
            );
            row(
                "energy gain",
                "change of heliocentric specific energy",
                format!("{} km²/s²", f(st.gain(), 2)),
            );
            row(
                "planet's Δv",
                "|v∞ out − v∞ in|: what the planet gave",
                format!("{} km/s", f(sw.planet_dv_km_s, 3)),
            );
            if let Some((d, t)) = sw.closest_approach {
                row(
                    "closest approach",
                    "to the next body on the ballistic leg after a shaped swing-by",
                    format!("{} km on {}", f(d, 0), t.to_date_utc()),
                );
            }
        });
    if sw
        .altitude_km
        .is_some_and(|a| rules::below_minimum(a, sw.min_altitude_km))
    {
        ui.label(
            RichText::new("! periapsis below the minimum altitude")
                .color(style::error_color(vc.dark)),
        );
    }
}
