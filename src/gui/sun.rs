//! Sun view: heliocentric top view (ecliptic J2000, x right, y up) with planet orbits, the
//! tour's arcs coloured by leg, stop symbols, a scale in AU, hover read-outs and a time slider.

use eframe::egui::{
    self, Align2, Color32, FontId, Pos2, RichText, Sense, Shape, Stroke, Vec2, pos2, vec2,
};

use tourwright_astro::bodies::Planet;
use tourwright_astro::constants::AU_KM;
use tourwright_astro::ephemeris::Ephemeris;
use tourwright_astro::time::{Epoch, Tdb};
use tourwright_mission::Edit;
use tourwright_mission::design::DsmTime;
use tourwright_mission::evaluate::{Evaluation, legs};
use tourwright_mission::tour::{BodyEphemeris, BodyId, PreparedTour};

use super::action::{Action, Actions};
use super::context::ViewCtx;
use super::style;

/// Orbit polylines (name, points in AU).
pub type Orbits = Vec<(String, Vec<[f64; 2]>)>;

/// What the drawn orbits depend on: which planets, the user bodies' orbits, and the day the
/// orbits are drawn for (the launch epoch, to the day). Not the design revision: dragging a
/// swing-by does not redraw the planets' orbits.
#[derive(Clone, Debug, PartialEq)]
struct OrbitKey {
    model: String,
    planets: Vec<Planet>,
    users: Vec<(String, [u64; 6])>,
    day: i64,
}

/// Zoom, pan, the time slider and a cache of orbit polylines.
pub struct SunView {
    /// Extra zoom factor over the fitted scale.
    pub zoom: f32,
    /// Pan offset in AU.
    pub pan: Vec2,
    /// Time slider position along the tour, 0..1.
    pub time_frac: f64,
    orbits: Option<(OrbitKey, Orbits)>,
    /// How many times the orbit polylines were rebuilt (for tests).
    pub orbit_builds: usize,
    /// The leg whose deep-space manoeuvre is being dragged.
    dragging_dsm: Option<usize>,
    /// Where each manoeuvre marker was drawn last frame (leg, screen position), for hit tests.
    pub dsm_markers: Vec<(usize, Pos2)>,
    /// n-body arcs drawn last frame (for tests).
    pub nbody_arcs_drawn: usize,
    /// Coast arcs of the continuous trajectory drawn last frame (for tests).
    pub continuous_arcs_drawn: usize,
}

impl Default for SunView {
    fn default() -> Self {
        SunView {
            zoom: 1.0,
            pan: Vec2::ZERO,
            time_frac: 0.0,
            orbits: None,
            orbit_builds: 0,
            dragging_dsm: None,
            dsm_markers: Vec::new(),
            nbody_arcs_drawn: 0,
            continuous_arcs_drawn: 0,
        }
    }
}

fn orbit_key(tour: &PreparedTour) -> OrbitKey {
    // Planets out to the farthest body of the tour (at least Mars), plus user bodies.
    let mut reach = 1.6 * AU_KM;
    let mut users = Vec::new();
    for s in &tour.stops {
        reach = reach.max(s.body.mean_distance_km() * 1.05);
        if let (BodyId::User(_), BodyEphemeris::User(o)) = (s.body.id, s.body.ephemeris) {
            let e = o.elements;
            let bits = [
                e.q_au.to_bits(),
                e.e.to_bits(),
                e.i_deg.to_bits(),
                e.raan_deg.to_bits(),
                e.argp_deg.to_bits(),
                e.mean_anomaly_deg.to_bits(),
            ];
            let entry = (s.body.name.to_string(), bits);
            if !users.contains(&entry) {
                users.push(entry);
            }
        }
    }
    OrbitKey {
        model: tour.ephemeris_name.clone(),
        planets: Planet::ALL
            .into_iter()
            .filter(|p| tour.model.planet(*p).is_ok_and(|e| e.a_km() * 0.9 <= reach))
            .collect(),
        users,
        day: tour.stops[0].t.days().floor() as i64,
    }
}

fn build_orbits(tour: &PreparedTour, key: &OrbitKey) -> Orbits {
    let (lo, hi) = tour.model.range();
    let t0 = Tdb(tour.stops[0].t.0.clamp(lo.0, hi.0));
    let mut v = Vec::new();
    for &p in &key.planets {
        let Ok(eph) = tour.model.planet(p) else {
            continue;
        };
        let a = eph.a_km();
        let period = std::f64::consts::TAU * (a * a * a / tour.mu_sun).sqrt() / 86_400.0;
        // Drawn from the launch epoch on, without the range check, so that outer planets' full
        // ellipses show even near the end of the model's range.
        let pts: Vec<[f64; 2]> = (0..=240)
            .filter_map(|i| {
                eph.state_unchecked(t0.plus_days(period * i as f64 / 240.0))
                    .ok()
            })
            .map(|s| [s.r.x / AU_KM, s.r.y / AU_KM])
            .collect();
        v.push((p.name().to_string(), pts));
    }
    for s in &tour.stops {
        if let BodyEphemeris::User(o) = &s.body.ephemeris {
            if v.iter().any(|(n, _)| n.as_str() == &*s.body.name) || o.elements.e >= 1.0 {
                continue;
            }
            let a = o.elements.q_au / (1.0 - o.elements.e);
            let period = (365.25 * a.powf(1.5)).min(3.0e4);
            let pts = (0..=240)
                .filter_map(|i| o.state(t0.plus_days(period * i as f64 / 240.0)).ok())
                .map(|st| [st.r.x / AU_KM, st.r.y / AU_KM])
                .collect();
            v.push((s.body.name.to_string(), pts));
        }
    }
    v
}

impl SunView {
    fn orbits_for(&mut self, tour: &PreparedTour) {
        let key = orbit_key(tour);
        if self.orbits.as_ref().is_none_or(|(k, _)| *k != key) {
            let o = build_orbits(tour, &key);
            self.orbits = Some((key, o));
            self.orbit_builds += 1;
        }
    }

    /// Draw the view: the time slider, then the canvas in named steps (navigation, orbits, legs,
    /// n-body overlays, manoeuvre handles, planets and spacecraft, stops, legend, read-outs).
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let mut out = Vec::new();
        let Some(tour) = vc.tour else {
            ui.label("The design cannot be evaluated; see the warnings.");
            return out;
        };
        self.time_row(ui, tour, vc.eval);
        self.orbits_for(tour);
        if self.orbits.is_none() {
            return out;
        }
        let (resp, painter) = ui.allocate_painter(ui.available_size(), Sense::click_and_drag());
        painter.rect_filled(resp.rect, 4.0, style::canvas(vc.dark));
        let frame = self.navigate(ui, &resp, vc.eval);
        let painter = painter.with_clip_rect(resp.rect);
        let mut labels = Labels {
            bounds: resp.rect.shrink(2.0),
            placed: Vec::new(),
        };
        // Labels keep off the Sun and every stop's symbol.
        labels.block(frame.au(0.0, 0.0), 8.0);
        for st in &vc.eval.stops {
            labels.block(frame.km(&st.body_state.r), 8.0);
        }
        self.draw_orbits(&painter, &frame, vc.dark);
        let hover = draw_legs(&painter, &frame, vc.eval, resp.hover_pos());
        self.draw_nbody(&painter, &frame, vc);
        let dsm_hover =
            self.manoeuvres(ui, &resp, &painter, &frame, vc, tour, &mut labels, &mut out);
        self.draw_bodies(&painter, &frame, vc, tour, &mut labels);
        draw_stops(&painter, &frame, &resp, vc, tour, &mut labels, &mut out);
        draw_legend(&painter, &frame, vc, tour);
        read_outs(&resp, vc.eval, dsm_hover.or(self.dragging_dsm), hover);
        out
    }

    fn time_row(&mut self, ui: &mut egui::Ui, tour: &PreparedTour, e: &Evaluation) {
        let tof_days = e.total_tof_days();
        let t_launch = tour.stops[0].t;
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
                self.zoom = 1.0;
                self.pan = Vec2::ZERO;
            }
        });
    }

    /// Zoom (wheel), pan (drag off a manoeuvre), reset (double click); the frame to draw in.
    fn navigate(&mut self, ui: &egui::Ui, resp: &egui::Response, e: &Evaluation) -> Frame {
        let rect = resp.rect;
        // Fit: the largest orbit drawn or trajectory point.
        let mut r_max: f64 = 1.2;
        for (_, pts) in self.orbits.iter().flat_map(|(_, o)| o) {
            for p in pts {
                r_max = r_max.max(p[0].hypot(p[1]));
            }
        }
        for s in &e.samples {
            r_max = r_max.max(s.state.r.xy().norm() / AU_KM);
        }
        if resp.hovered() {
            let scroll = ui.input(|i| i.smooth_scroll_delta.y);
            if scroll != 0.0 {
                self.zoom = (self.zoom * (1.0 + scroll * 0.002)).clamp(0.2, 200.0);
            }
        }
        let scale = (rect.width().min(rect.height()) * 0.5 / (r_max as f32 * 1.05)) * self.zoom;
        // A drag that starts on a manoeuvre marker moves the manoeuvre, not the view. The press
        // point decides (a drag is recognised only after the pointer has moved a little).
        if resp.drag_started() {
            let origin = ui.input(|i| i.pointer.press_origin());
            self.dragging_dsm = origin.and_then(|p| {
                self.dsm_markers
                    .iter()
                    .filter(|(_, q)| q.distance(p) < DSM_GRAB)
                    .min_by(|a, b| a.1.distance(p).total_cmp(&b.1.distance(p)))
                    .map(|(k, _)| *k)
            });
        }
        if !resp.dragged() {
            self.dragging_dsm = None;
        }
        if resp.dragged() && self.dragging_dsm.is_none() {
            self.pan += resp.drag_delta() / scale * vec2(1.0, -1.0);
        }
        if resp.double_clicked() {
            self.zoom = 1.0;
            self.pan = Vec2::ZERO;
        }
        Frame {
            rect,
            c: rect.center(),
            scale,
            pan: self.pan,
            time_frac: self.time_frac,
        }
    }

    fn draw_orbits(&self, painter: &egui::Painter, f: &Frame, dark: bool) {
        for (_, pts) in self.orbits.iter().flat_map(|(_, o)| o) {
            let line: Vec<Pos2> = pts.iter().map(|p| f.au(p[0], p[1])).collect();
            painter.add(Shape::line(line, Stroke::new(1.0, style::faint(dark))));
        }
        painter.circle_filled(f.au(0.0, 0.0), 6.0, style::SUN);
    }

    /// The n-body arcs of the latest fidelity check and the continuous trajectory, when they
    /// belong to this revision, each with its legend line.
    fn draw_nbody(&mut self, painter: &egui::Painter, f: &Frame, vc: &ViewCtx<'_>) {
        let dark = vc.dark;
        let rect = f.rect;
        self.nbody_arcs_drawn = 0;
        if let Some(fc) = vc
            .jobs
            .fidelity
            .as_ref()
            .filter(|x| x.revision == vc.revision)
        {
            for arc in &fc.value.arcs {
                let line: Vec<Pos2> = arc.iter().map(|(_, r)| f.km(r)).collect();
                painter.extend(Shape::dotted_line(
                    &line,
                    style::ink(dark).gamma_multiply(0.8),
                    5.0,
                    1.1,
                ));
                self.nbody_arcs_drawn += 1;
            }
            painter.text(
                rect.right_bottom() + vec2(-8.0, -26.0),
                Align2::RIGHT_BOTTOM,
                "··· n-body check, leg by leg (each leg from its patched-conic start)",
                FontId::proportional(12.0),
                style::ink(dark).gamma_multiply(0.8),
            );
        }
        self.continuous_arcs_drawn = 0;
        if let Some(c) = vc
            .jobs
            .continuous
            .as_ref()
            .filter(|c| c.revision == vc.revision)
        {
            let color = style::nbody_color(dark);
            for arc in &c.value.arcs {
                let line: Vec<Pos2> = arc.states.iter().map(|(_, s)| f.km(&s.r)).collect();
                painter.add(Shape::line(line, Stroke::new(1.2, color)));
                self.continuous_arcs_drawn += 1;
            }
            let words = if c.value.converged {
                "— continuous n-body trajectory (converged)"
            } else {
                "— continuous n-body trajectory (NOT converged)"
            };
            painter.text(
                rect.right_bottom() + vec2(-8.0, -8.0),
                Align2::RIGHT_BOTTOM,
                words,
                FontId::proportional(12.0),
                color,
            );
        }
    }

    /// Deep-space manoeuvres: the markers, the track a dragged one moves along, and the drag
    /// itself (Shift: a fine drag, one tenth of the pointer's motion along the track). Returns the
    /// leg whose marker is under the pointer.
    #[allow(clippy::too_many_arguments)]
    fn manoeuvres(
        &mut self,
        ui: &egui::Ui,
        resp: &egui::Response,
        painter: &egui::Painter,
        f: &Frame,
        vc: &ViewCtx<'_>,
        tour: &PreparedTour,
        labels: &mut Labels,
        out: &mut Actions,
    ) -> Option<usize> {
        let e = vc.eval;
        let dark = vc.dark;
        self.dsm_markers.clear();
        if let Some(k) = self.dragging_dsm {
            let track = legs::coast_track(tour, e, k, 400);
            let line: Vec<Pos2> = track.iter().map(|(_, r)| f.km(r)).collect();
            painter.extend(Shape::dotted_line(
                &line,
                style::leg_color(k).gamma_multiply(0.7),
                6.0,
                1.2,
            ));
            let (t0, t1) = (tour.stops[k].t, tour.stops[k + 1].t);
            let fraction_at = |p: Pos2| {
                line.iter()
                    .enumerate()
                    .min_by(|a, b| a.1.distance(p).total_cmp(&b.1.distance(p)))
                    .map(|(i, _)| (track[i].0.0 - t0.0) / (t1.0 - t0.0))
            };
            let current = e.legs.get(k).and_then(|l| l.dsm).map(|d| d.fraction);
            if let (Some(p), Some(m), Some(now)) =
                (resp.interact_pointer_pos(), vc.design.leg(k).dsm, current)
            {
                let target = if ui.input(|i| i.modifiers.shift) {
                    match (fraction_at(p), fraction_at(p - resp.drag_delta())) {
                        (Some(a), Some(b)) => Some(now + super::lens::FINE * (a - b)),
                        _ => None,
                    }
                } else {
                    fraction_at(p)
                };
                if let Some(fr) = target {
                    let fr = fr.clamp(0.005, 0.995);
                    let mut next = m;
                    next.at = match m.at {
                        DsmTime::Fraction(_) => DsmTime::Fraction(fr),
                        DsmTime::Date(old) => DsmTime::Date(Epoch::from_tdb(
                            Tdb(t0.0 + fr * (t1.0 - t0.0)),
                            old.scale(),
                        )),
                    };
                    if next != m {
                        out.push(Action::EditLive(Edit::SetDsm {
                            leg: k,
                            dsm: Some(next),
                        }));
                    }
                }
            }
        }
        let mut hover = None;
        let pointer = resp.hover_pos();
        let unreached = e.first_unreached().unwrap_or(usize::MAX);
        for (k, d) in e.dsms() {
            // A manoeuvre on a leg that is not flown: no marker, no figure.
            if k + 1 >= unreached {
                continue;
            }
            let p = f.km(&d.r);
            self.dsm_markers.push((k, p));
            let col = style::leg_color(k);
            let hot =
                self.dragging_dsm == Some(k) || pointer.is_some_and(|q| q.distance(p) < DSM_GRAB);
            let r = if hot { 8.0 } else { 6.0 };
            let diamond = vec![
                p + vec2(0.0, -r),
                p + vec2(r, 0.0),
                p + vec2(0.0, r),
                p + vec2(-r, 0.0),
            ];
            painter.add(Shape::convex_polygon(
                diamond,
                col,
                Stroke::new(1.5, outline_of(dark)),
            ));
            labels.place(
                painter,
                p,
                8.0,
                format!("DSM {:.3} km/s", d.dv_km_s),
                11.0,
                col,
            );
            if pointer.is_some_and(|q| q.distance(p) < DSM_GRAB) {
                hover = Some(k);
                ui.ctx().set_cursor_icon(egui::CursorIcon::Grab);
            }
        }
        hover
    }

    /// The planets of the tour at the slider's time, and the spacecraft.
    fn draw_bodies(
        &self,
        painter: &egui::Painter,
        f: &Frame,
        vc: &ViewCtx<'_>,
        tour: &PreparedTour,
        labels: &mut Labels,
    ) {
        let t_now = tour.stops[0]
            .t
            .plus_days(f.time_frac * vc.eval.total_tof_days());
        let mut shown: Vec<&str> = Vec::new();
        for s in &tour.stops {
            if shown.contains(&&*s.body.name) {
                continue;
            }
            shown.push(&s.body.name);
            if let Ok(st) = s.body.state(t_now) {
                let p = f.km(&st.r);
                let col = style::body_color(&s.body.name);
                painter.circle_filled(p, 4.5, col);
                labels.place(painter, p, 6.0, s.body.name.to_string(), 12.0, col);
            }
        }
        if let Some(sc) = vc.eval.position_at(t_now) {
            let p = f.km(&sc);
            let ink = if vc.dark {
                Color32::WHITE
            } else {
                Color32::BLACK
            };
            painter.circle_stroke(p, 6.0, Stroke::new(2.0, ink));
            painter.circle_filled(p, 2.5, ink);
        }
    }
}

/// The drawing frame of one paint: the canvas, its centre, points per AU, pan and slider time.
struct Frame {
    rect: egui::Rect,
    c: Pos2,
    scale: f32,
    pan: Vec2,
    time_frac: f64,
}

impl Frame {
    /// Screen point of ecliptic (x, y) in AU.
    fn au(&self, x: f64, y: f64) -> Pos2 {
        pos2(
            self.c.x + (x as f32 + self.pan.x) * self.scale,
            self.c.y - (y as f32 + self.pan.y) * self.scale,
        )
    }
    /// Screen point of a heliocentric position in km.
    fn km(&self, r: &tourwright_astro::Vec3) -> Pos2 {
        self.au(r.x / AU_KM, r.y / AU_KM)
    }
}

/// A manoeuvre marker is grabbed within this many points of its centre.
const DSM_GRAB: f32 = 14.0;

/// Text labels placed so that they do not overlap: each tries the four corners around its point,
/// then the same corners stacked outwards line by line, and takes the first one inside the canvas
/// and free, else the first corner inside, else the first.
struct Labels {
    bounds: egui::Rect,
    placed: Vec<egui::Rect>,
}

impl Labels {
    /// Keep labels off a symbol of radius `r` at `at`.
    fn block(&mut self, at: Pos2, r: f32) {
        self.placed
            .push(egui::Rect::from_center_size(at, vec2(2.0 * r, 2.0 * r)));
    }

    fn place(
        &mut self,
        painter: &egui::Painter,
        at: Pos2,
        gap: f32,
        text: String,
        size: f32,
        color: Color32,
    ) {
        let galley = painter.layout_no_wrap(text, FontId::proportional(size), color);
        let sz = galley.size();
        let corners = [
            (vec2(gap, gap), Align2::LEFT_TOP),
            (vec2(gap, -gap), Align2::LEFT_BOTTOM),
            (vec2(-gap, -gap), Align2::RIGHT_BOTTOM),
            (vec2(-gap, gap), Align2::RIGHT_TOP),
        ];
        let rect_at = |(off, align): (Vec2, Align2)| align.anchor_size(at + off, sz);
        let inside = |r: &egui::Rect| self.bounds.contains_rect(*r);
        let free = |r: &egui::Rect| !self.placed.iter().any(|q| q.intersects(*r));
        let rects = corners.map(rect_at);
        // Several stops at one place (a chain of resonant returns meets the body where it left
        // it): when the four corners are taken, the labels stack outwards above and below.
        let line = sz.y + 1.0;
        let stacked = (1..=6).flat_map(|k| {
            let dy = k as f32 * line;
            corners.map(|(off, align)| {
                let off = vec2(off.x, off.y + if off.y > 0.0 { dy } else { -dy });
                rect_at((off, align))
            })
        });
        let pick = rects
            .iter()
            .copied()
            .chain(stacked)
            .find(|r| inside(r) && free(r))
            .or_else(|| rects.iter().copied().find(|r| inside(r)))
            .unwrap_or(rects[0]);
        painter.galley(pick.min, galley, color);
        self.placed.push(pick);
    }
}

/// The tour's legs, coloured by leg (dashed when ballistic after a shaped swing-by; faint after a
/// miss, where the spacecraft does not fly). Returns the sample nearest the pointer.
fn draw_legs(
    painter: &egui::Painter,
    f: &Frame,
    e: &Evaluation,
    pointer: Option<Pos2>,
) -> Option<(f32, usize, usize)> {
    let unreached = e.first_unreached().unwrap_or(usize::MAX);
    let mut hover_best: Option<(f32, usize, usize)> = None;
    for (k, leg) in e.legs.iter().enumerate() {
        let pts: Vec<Pos2> = e.samples[leg.samples.clone()]
            .iter()
            .map(|s| f.km(&s.state.r))
            .collect();
        if let Some(p) = pointer {
            for (i, q) in pts.iter().enumerate() {
                let dd = q.distance(p);
                if dd < 10.0 && hover_best.is_none_or(|b| dd < b.0) {
                    hover_best = Some((dd, k, leg.samples.start + i));
                }
            }
        }
        let mut color = style::leg_color(k);
        if k >= unreached {
            color = color.gamma_multiply(0.3);
        }
        let stroke = Stroke::new(2.2, color);
        if leg.ballistic || k >= unreached {
            painter.extend(Shape::dashed_line(&pts, stroke, 8.0, 4.0));
        } else {
            painter.add(Shape::line(pts, stroke));
        }
    }
    hover_best
}

/// Stop symbols at the stop epochs, labelled (a stop not reached says so); a click selects.
fn draw_stops(
    painter: &egui::Painter,
    f: &Frame,
    resp: &egui::Response,
    vc: &ViewCtx<'_>,
    tour: &PreparedTour,
    labels: &mut Labels,
    out: &mut Actions,
) {
    let e = vc.eval;
    let unreached = e.first_unreached().unwrap_or(usize::MAX);
    let outline = outline_of(vc.dark);
    let label_c = if vc.dark {
        Color32::from_gray(200)
    } else {
        Color32::from_gray(60)
    };
    let pointer = resp.hover_pos();
    for (k, st) in e.stops.iter().enumerate() {
        let p = f.km(&st.body_state.r);
        let mut color = style::leg_color(k.saturating_sub(1));
        let mut text = format!("{} {}", tour.stops[k].body.name, st.epoch.to_date_utc());
        if k >= unreached {
            color = color.gamma_multiply(0.35);
            text.push_str(" (not reached)");
        }
        let size = if vc.selected == k { 9.0 } else { 7.0 };
        style::stop_marker(painter, p, st.kind, color, size, outline);
        labels.place(painter, p, 9.0, text, 11.0, label_c);
        if resp.clicked() && pointer.is_some_and(|q| q.distance(p) < 12.0) {
            out.push(Action::Select(k));
        }
    }
}

/// The scale bar, the frame note and the legs' legend.
fn draw_legend(painter: &egui::Painter, f: &Frame, vc: &ViewCtx<'_>, tour: &PreparedTour) {
    let rect = f.rect;
    let sc = if vc.dark {
        Color32::from_gray(210)
    } else {
        Color32::from_gray(40)
    };
    style::scale_bar(painter, rect, f.scale, sc);
    painter.text(
        rect.right_top() + vec2(-8.0, 8.0),
        Align2::RIGHT_TOP,
        "ecliptic J2000 · x to vernal equinox",
        FontId::proportional(11.0),
        sc,
    );
    let unreached = vc.eval.first_unreached().unwrap_or(usize::MAX);
    for k in 0..vc.eval.legs.len() {
        let yy = rect.top() + 12.0 + 16.0 * k as f32;
        painter.line_segment(
            [pos2(rect.left() + 10.0, yy), pos2(rect.left() + 30.0, yy)],
            Stroke::new(3.0, style::leg_color(k)),
        );
        let mut text = format!(
            "leg {}: {} to {}",
            k + 1,
            tour.stops[k].body.name,
            tour.stops[k + 1].body.name
        );
        if k + 1 == unreached {
            text.push_str(" (misses it)");
        } else if k + 1 > unreached {
            text.push_str(" (not flown)");
        }
        painter.text(
            pos2(rect.left() + 36.0, yy),
            Align2::LEFT_CENTER,
            text,
            FontId::proportional(12.0),
            sc,
        );
    }
}

/// The hover read-out: a manoeuvre's figures, else the leg point under the pointer.
fn read_outs(
    resp: &egui::Response,
    e: &Evaluation,
    dsm: Option<usize>,
    hover: Option<(f32, usize, usize)>,
) {
    if let Some(k) = dsm {
        if let Some(d) = e.legs.get(k).and_then(|l| l.dsm) {
            resp.clone().on_hover_ui_at_pointer(|ui| {
                ui.label(format!("deep-space manoeuvre, leg {}", k + 1));
                ui.label(format!(
                    "{} · {:.1} % of the leg",
                    d.t.to_iso_utc(),
                    d.fraction * 100.0
                ));
                ui.label(format!("Δv {:.3} km/s", d.dv_km_s));
                ui.label(format!(
                    "distance from the Sun {:.3} AU",
                    d.sun_distance_au()
                ));
                ui.label(format!(
                    "energy {:+.2} km²/s² · mass after {:.0} kg",
                    d.energy_after - d.energy_before,
                    d.mass_after_kg
                ));
                ui.label(
                    RichText::new("drag along the leg to move it; Shift for a fine drag").weak(),
                );
            });
        }
    } else if let Some((_, k, i)) = hover {
        let s = e.samples[i];
        let r = s.state.r.norm() / AU_KM;
        let v = s.state.v.norm();
        resp.clone().on_hover_ui_at_pointer(|ui| {
            ui.label(format!("leg {} · {}", k + 1, s.t.to_date_utc()));
            ui.label(format!("distance from the Sun {r:.3} AU"));
            ui.label(format!("heliocentric speed {v:.2} km/s"));
        });
    }
}

fn outline_of(dark: bool) -> Color32 {
    if dark {
        Color32::from_gray(20)
    } else {
        Color32::WHITE
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Four stops at one place (Messenger full's Mercury returns meet Mercury where it left it)
    /// and the body's own label: every label is drawn, none overlaps another or the symbol, all
    /// inside the canvas.
    #[test]
    fn labels_of_stops_at_one_place_stack_apart() {
        let ctx = egui::Context::default();
        let mut out = ctx.run_pass(egui::RawInput::default(), |ctx| {
            let painter = ctx.layer_painter(egui::LayerId::background());
            let bounds = egui::Rect::from_min_size(egui::pos2(0.0, 0.0), vec2(600.0, 400.0));
            let mut labels = Labels {
                bounds,
                placed: Vec::new(),
            };
            let at = egui::pos2(300.0, 200.0);
            labels.block(at, 6.0);
            let texts = [
                "Mercury",
                "Mercury 2007-08-31",
                "Mercury 2008-02-23",
                "Mercury 2008-11-13",
                "Mercury 2009-10-31",
                "Mercury 2011-01-12",
            ];
            for t in texts {
                labels.place(&painter, at, 9.0, t.to_string(), 11.0, Color32::WHITE);
            }
            let placed = &labels.placed;
            assert_eq!(placed.len(), texts.len() + 1);
            for (i, a) in placed.iter().enumerate() {
                assert!(bounds.contains_rect(*a), "{a:?}");
                for b in &placed[i + 1..] {
                    assert!(!a.intersects(*b), "{a:?} overlaps {b:?}");
                }
            }
        });
        // No renderer here: the font atlas' upload is dropped on purpose.
        out.textures_delta.clear();
    }
}
