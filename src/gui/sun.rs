//! Sun view: heliocentric top view (ecliptic J2000, x right, y up) with planet orbits, the
//! tour's arcs coloured by leg, stop symbols, a scale in AU, hover read-outs and a time slider.

use eframe::egui::{self, Align2, Color32, FontId, Pos2, Sense, Shape, Stroke, Vec2, pos2, vec2};

use crate::astro::bodies::Planet;
use crate::astro::constants::AU_KM;
use crate::astro::ephemeris::{Ephemeris, MeanElements, OsculatingOrbit};
use crate::astro::time::Epoch;
use crate::mission::design::ResolvedBody;

use super::app::TourwrightApp;
use super::style;

/// Orbit polylines (name, points in AU).
pub type Orbits = Vec<(String, Vec<[f64; 2]>)>;

/// Zoom, pan and a cache of orbit polylines.
#[derive(Default)]
pub struct SunViewState {
    /// Extra zoom factor over the fitted scale.
    pub zoom: f32,
    /// Pan offset in AU.
    pub pan: Vec2,
    orbits: Option<(u64, Orbits)>,
}

fn orbit_points(eph: &dyn Ephemeris, t0: Epoch, period_days: f64, n: usize) -> Vec<[f64; 2]> {
    (0..=n)
        .filter_map(|i| {
            eph.state(t0.plus_days(period_days * i as f64 / n as f64))
                .ok()
        })
        .map(|s| [s.r.x / AU_KM, s.r.y / AU_KM])
        .collect()
}

impl TourwrightApp {
    fn sun_orbits(&mut self) -> &Orbits {
        let rev = self.doc.revision();
        if self.sun.orbits.as_ref().is_none_or(|(r, _)| *r != rev) {
            let d = &self.doc.design;
            let t0 = d.stops.first().map(|s| s.epoch).unwrap_or(Epoch::J2000);
            // Draw planets out to the farthest body of the tour (at least Mars), plus user bodies.
            let mut reach = 1.6 * AU_KM;
            for s in &d.stops {
                match d.resolve(&s.body) {
                    Some(ResolvedBody::Planet(p)) => {
                        reach = reach.max(MeanElements::of(p).a_km() * 1.05)
                    }
                    Some(ResolvedBody::User(i, _)) => {
                        let e = &d.user_bodies[i].elements;
                        reach = reach
                            .max(e.q_au * AU_KM * (1.0 + e.e.min(0.95)) / (1.0 - e.e.min(0.95)));
                    }
                    None => {}
                }
            }
            let mut v = Vec::new();
            let (lo, hi) = crate::astro::ephemeris::mean_element_range();
            let t0 = Epoch::from_tdb_seconds(t0.tdb_s.clamp(lo.tdb_s, hi.tdb_s));
            for p in Planet::ALL {
                let me = MeanElements::of(p);
                if me.a_km() * 0.9 > reach {
                    continue;
                }
                let period = me.period_days();
                // Orbits are drawn from the elements at the launch epoch (without the range check,
                // so outer planets' full ellipses show even near 2050).
                let pts: Vec<[f64; 2]> = (0..=240)
                    .map(|i| {
                        let s = me.state_unchecked(t0.plus_days(period * i as f64 / 240.0));
                        [s.r.x / AU_KM, s.r.y / AU_KM]
                    })
                    .collect();
                v.push((p.name().to_string(), pts));
            }
            for u in &d.user_bodies {
                if let Ok(o) = OsculatingOrbit::new(u.elements) {
                    if u.elements.e < 1.0 {
                        let a = u.elements.q_au / (1.0 - u.elements.e);
                        let period = 365.25 * a.powf(1.5);
                        v.push((u.name.clone(), orbit_points(&o, t0, period.min(3.0e4), 240)));
                    }
                }
            }
            self.sun.orbits = Some((rev, v));
        }
        &self.sun.orbits.as_ref().expect("filled above").1
    }

    /// The Sun view.
    pub fn sun_view(&mut self, ui: &mut egui::Ui) {
        let dark = self.settings.dark;
        let tof_days = self.eval.total_tof_days();
        let t_launch = self
            .doc
            .design
            .stops
            .first()
            .map(|s| s.epoch)
            .unwrap_or_default();
        // Time slider row.
        ui.horizontal(|ui| {
            let mut days = self.time_frac * tof_days;
            let r = ui.add(
                egui::Slider::new(&mut days, 0.0..=tof_days.max(1.0))
                    .suffix(" d")
                    .text("after launch")
                    .show_value(true),
            );
            if r.changed() && tof_days > 0.0 {
                self.time_frac = (days / tof_days).clamp(0.0, 1.0);
            }
            ui.label(t_launch.plus_days(self.time_frac * tof_days).to_date_utc());
            if ui
                .small_button("fit")
                .on_hover_text("Fit the whole tour")
                .clicked()
            {
                self.sun.zoom = 1.0;
                self.sun.pan = Vec2::ZERO;
            }
        });
        self.sun_orbits();
        // Borrowed out of the cache for this frame (no copy), put back at the end.
        let cache = self.sun.orbits.take();
        let orbits: &Orbits = &cache.as_ref().expect("filled above").1;
        let size = ui.available_size();
        let (resp, painter) = ui.allocate_painter(size, Sense::click_and_drag());
        let rect = resp.rect;
        painter.rect_filled(rect, 4.0, style::canvas(dark));
        // Fit: the largest orbit drawn or trajectory point.
        let mut r_max: f64 = 1.2;
        for (_, pts) in orbits {
            for p in pts {
                r_max = r_max.max(p[0].hypot(p[1]));
            }
        }
        for s in &self.eval.samples {
            r_max = r_max.max(s.state.r.xy().norm() / AU_KM);
        }
        if self.sun.zoom <= 0.0 {
            self.sun.zoom = 1.0;
        }
        if resp.hovered() {
            let scroll = ui.input(|i| i.smooth_scroll_delta.y);
            if scroll != 0.0 {
                self.sun.zoom = (self.sun.zoom * (1.0 + scroll * 0.002)).clamp(0.2, 200.0);
            }
        }
        let scale = (rect.width().min(rect.height()) * 0.5 / (r_max as f32 * 1.05)) * self.sun.zoom;
        if resp.dragged() {
            self.sun.pan += resp.drag_delta() / scale * vec2(1.0, -1.0);
        }
        if resp.double_clicked() {
            self.sun.zoom = 1.0;
            self.sun.pan = Vec2::ZERO;
        }
        let c = rect.center();
        let pan = self.sun.pan;
        let to_screen = |x: f64, y: f64| {
            pos2(
                c.x + (x as f32 + pan.x) * scale,
                c.y - (y as f32 + pan.y) * scale,
            )
        };
        let painter = painter.with_clip_rect(rect);
        // Orbits.
        for (_, pts) in orbits {
            let line: Vec<Pos2> = pts.iter().map(|p| to_screen(p[0], p[1])).collect();
            painter.add(Shape::line(line, Stroke::new(1.0, style::faint(dark))));
        }
        // Sun.
        painter.circle_filled(to_screen(0.0, 0.0), 6.0, style::SUN);
        // Legs.
        let mut hover_best: Option<(f32, usize, usize)> = None;
        let pointer = resp.hover_pos();
        for (k, leg) in self.eval.legs.iter().enumerate() {
            let pts: Vec<Pos2> = self.eval.samples[leg.samples.clone()]
                .iter()
                .map(|s| to_screen(s.state.r.x / AU_KM, s.state.r.y / AU_KM))
                .collect();
            if let Some(p) = pointer {
                for (i, q) in pts.iter().enumerate() {
                    let dd = q.distance(p);
                    if dd < 10.0 && hover_best.is_none_or(|b| dd < b.0) {
                        hover_best = Some((dd, k, leg.samples.start + i));
                    }
                }
            }
            let stroke = Stroke::new(2.2, style::leg_color(k));
            if leg.ballistic {
                painter.extend(Shape::dashed_line(&pts, stroke, 8.0, 4.0));
            } else {
                painter.add(Shape::line(pts, stroke));
            }
        }
        // Planets at the slider time, and the spacecraft.
        let t_now = t_launch.plus_days(self.time_frac * tof_days);
        let d = &self.doc.design;
        let mut shown = std::collections::BTreeSet::new();
        for s in &d.stops {
            if !shown.insert(s.body.clone()) {
                continue;
            }
            if let Some(b) = d.resolve(&s.body) {
                if let Ok(st) = b.state(t_now) {
                    let p = to_screen(st.r.x / AU_KM, st.r.y / AU_KM);
                    painter.circle_filled(p, 4.5, style::body_color(&s.body));
                    painter.text(
                        p + vec2(6.0, -6.0),
                        Align2::LEFT_BOTTOM,
                        &s.body,
                        FontId::proportional(12.0),
                        style::body_color(&s.body),
                    );
                }
            }
        }
        if let Some(sc) = self.spacecraft_at(t_now) {
            let p = to_screen(sc[0], sc[1]);
            painter.circle_stroke(
                p,
                6.0,
                Stroke::new(2.0, if dark { Color32::WHITE } else { Color32::BLACK }),
            );
            painter.circle_filled(p, 2.5, if dark { Color32::WHITE } else { Color32::BLACK });
        }
        // Stop symbols at the stop epochs.
        let outline = if dark {
            Color32::from_gray(20)
        } else {
            Color32::WHITE
        };
        let mut clicked_stop = None;
        for (k, st) in self.eval.stops.iter().enumerate() {
            let p = to_screen(st.body_state.r.x / AU_KM, st.body_state.r.y / AU_KM);
            let color = if k == 0 {
                style::leg_color(0)
            } else {
                style::leg_color(k - 1)
            };
            let size = if self.selected == k { 9.0 } else { 7.0 };
            style::stop_marker(&painter, p, st.kind, color, size, outline);
            painter.text(
                p + vec2(9.0, 9.0),
                Align2::LEFT_TOP,
                format!("{} {}", d.stops[k].body, st.epoch.to_date_utc()),
                FontId::proportional(11.0),
                if dark {
                    Color32::from_gray(200)
                } else {
                    Color32::from_gray(60)
                },
            );
            if resp.clicked() && pointer.is_some_and(|q| q.distance(p) < 12.0) {
                clicked_stop = Some(k);
            }
        }
        if let Some(k) = clicked_stop {
            self.selected = k;
        }
        // Scale bar.
        let nice = [0.05, 0.1, 0.2, 0.5, 1.0, 2.0, 5.0, 10.0, 20.0];
        let au = nice
            .iter()
            .copied()
            .find(|&a| a as f32 * scale >= 80.0)
            .unwrap_or(50.0);
        let y = rect.bottom() - 18.0;
        let x0 = rect.left() + 16.0;
        let x1 = x0 + au as f32 * scale;
        let sc = if dark {
            Color32::from_gray(210)
        } else {
            Color32::from_gray(40)
        };
        painter.line_segment([pos2(x0, y), pos2(x1, y)], Stroke::new(2.0, sc));
        painter.line_segment([pos2(x0, y - 4.0), pos2(x0, y + 4.0)], Stroke::new(1.5, sc));
        painter.line_segment([pos2(x1, y - 4.0), pos2(x1, y + 4.0)], Stroke::new(1.5, sc));
        painter.text(
            pos2(0.5 * (x0 + x1), y - 6.0),
            Align2::CENTER_BOTTOM,
            format!("{au} AU"),
            FontId::proportional(12.0),
            sc,
        );
        painter.text(
            rect.right_top() + vec2(-8.0, 8.0),
            Align2::RIGHT_TOP,
            "ecliptic J2000 · x to vernal equinox",
            FontId::proportional(11.0),
            sc,
        );
        // Legend of legs.
        for k in 0..self.eval.legs.len() {
            let yy = rect.top() + 12.0 + 16.0 * k as f32;
            painter.line_segment(
                [pos2(rect.left() + 10.0, yy), pos2(rect.left() + 30.0, yy)],
                Stroke::new(3.0, style::leg_color(k)),
            );
            painter.text(
                pos2(rect.left() + 36.0, yy),
                Align2::LEFT_CENTER,
                format!(
                    "leg {}: {} to {}",
                    k + 1,
                    d.stops[k].body,
                    d.stops.get(k + 1).map(|s| s.body.as_str()).unwrap_or("")
                ),
                FontId::proportional(12.0),
                sc,
            );
        }
        if let Some((_, k, i)) = hover_best {
            let s = self.eval.samples[i];
            let r = s.state.r.norm() / AU_KM;
            let v = s.state.v.norm();
            resp.on_hover_ui_at_pointer(|ui| {
                ui.label(format!("leg {} · {}", k + 1, s.t.to_date_utc()));
                ui.label(format!("distance from the Sun {r:.3} AU"));
                ui.label(format!("heliocentric speed {v:.2} km/s"));
            });
        }
        self.sun.orbits = cache;
    }

    /// Spacecraft position (AU) at `t`, interpolated from the samples.
    pub fn spacecraft_at(&self, t: Epoch) -> Option<[f64; 2]> {
        let s = &self.eval.samples;
        if s.is_empty() {
            return None;
        }
        let i = s.partition_point(|x| x.t.tdb_s < t.tdb_s);
        if i == 0 {
            return Some([s[0].state.r.x / AU_KM, s[0].state.r.y / AU_KM]);
        }
        if i >= s.len() {
            let l = s[s.len() - 1].state.r;
            return Some([l.x / AU_KM, l.y / AU_KM]);
        }
        let (a, b) = (&s[i - 1], &s[i]);
        let f = if b.t.tdb_s > a.t.tdb_s {
            (t.tdb_s - a.t.tdb_s) / (b.t.tdb_s - a.t.tdb_s)
        } else {
            0.0
        };
        let r = a.state.r + (b.state.r - a.state.r) * f;
        Some([r.x / AU_KM, r.y / AU_KM])
    }
}
