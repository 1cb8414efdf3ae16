//! Window map (porkchop plot): a coloured map of a quantity over departure × arrival dates (or
//! TOF), contour lines with labels, lines of constant TOF, the minimum marked, hover values, zoom
//! and pan; a click sets the leg's dates in the design (one undo step).
//!
//! Contour lines come from the `contour` crate (marching squares with linear smoothing, stitched
//! into polylines). Unsolved cells are holes: the crate closes every ring along the grid's edge
//! and around holes, so those artificial stretches are cut away before drawing.

use eframe::egui::{
    self, Align2, Color32, FontId, Pos2, Rect, RichText, Sense, Stroke, TextureHandle, pos2, vec2,
};

use tourwright_astro::time::{Epoch, Tdb};
use tourwright_mission::design::{EphemerisChoice, LegOptions};
use tourwright_mission::{Edit, MissionDesign};
use tourwright_search::window::{Quantity, SecondAxis, WindowMap, WindowSpec};

use super::action::{Action, Actions, JobKind, JobRequest};
use super::context::ViewCtx;
use super::style;

/// Contour polylines (grid coordinates: cell centres at integers) with their level.
pub type LevelLines = Vec<(f64, Vec<[f32; 2]>)>;

/// Form values and the computed map.
pub struct WindowView {
    /// Departure body.
    pub from: String,
    /// Arrival body.
    pub to: String,
    /// Departure range (text).
    pub depart: (String, String),
    /// Arrival range (text).
    pub arrive: (String, String),
    /// Use a TOF axis instead of arrival dates.
    pub use_tof: bool,
    /// TOF range, days.
    pub tof: (f64, f64),
    /// Cells per axis.
    pub steps: usize,
    /// Revolutions.
    pub revs: u32,
    /// Multi-revolution branch.
    pub branch: crate::astro::lambert::Branch,
    /// Quantity shown.
    pub quantity: Quantity,
    /// Upper end of the colour scale (None: automatic).
    pub cap: Option<f64>,
    /// The design leg the map stands for (clicks set its dates).
    pub leg: Option<usize>,
    /// The computed map.
    pub map: Option<std::sync::Arc<WindowMap>>,
    /// Visible part of the map in normalised coordinates (None: all).
    pub view: Option<Rect>,
    /// Form error.
    pub error: Option<String>,
    /// Compute as soon as the view is shown (after the form was centred on a leg).
    pub auto: bool,
    /// The ephemeris model of the design the map was computed with (set when it is started).
    map_model: Option<EphemerisChoice>,
    pending_model: Option<EphemerisChoice>,
    texture: Option<(TextureHandle, Quantity, u64)>,
    contours: Option<(Quantity, u64, LevelLines)>,
    map_id: u64,
    stats: Option<(Quantity, u64, f64, f64, f64)>,
}

impl Default for WindowView {
    fn default() -> Self {
        WindowView {
            from: "Earth".into(),
            to: "Mars".into(),
            depart: ("2033-01-01".into(), "2033-12-31".into()),
            arrive: ("2033-06-01".into(), "2035-01-01".into()),
            use_tof: false,
            tof: (80.0, 500.0),
            steps: 300,
            revs: 0,
            branch: Default::default(),
            quantity: Quantity::C3,
            cap: None,
            leg: None,
            map: None,
            view: None,
            error: None,
            auto: true,
            map_model: None,
            pending_model: None,
            texture: None,
            contours: None,
            map_id: 0,
            stats: None,
        }
    }
}

impl WindowView {
    /// Show a newly computed map.
    pub fn set_map(&mut self, m: WindowMap) {
        self.map = Some(std::sync::Arc::new(m));
        self.map_model = self.pending_model.take();
        self.map_id += 1;
        self.view = None;
    }

    /// Centre the form on leg `k` of a design.
    pub fn reset_from_design(&mut self, d: &MissionDesign, k: usize) {
        if k + 1 >= d.stops.len() {
            return;
        }
        let (a, b) = (d.stops[k].epoch, d.stops[k + 1].epoch);
        let tof = b.days() - a.days();
        self.from = d.stops[k].body.clone();
        self.to = d.stops[k + 1].body.clone();
        self.depart = (
            a.plus_days(-90.0).to_date_utc(),
            a.plus_days(90.0).to_date_utc(),
        );
        let half = (0.35 * tof).clamp(30.0, 400.0);
        self.arrive = (
            b.plus_days(-half).to_date_utc(),
            b.plus_days(half).to_date_utc(),
        );
        self.revs = d.leg(k).revolutions;
        self.branch = d.leg(k).branch;
        self.leg = Some(k);
        self.map = None;
        self.view = None;
        self.auto = true;
    }
}

/// Contour polylines of a grid of `nx × ny` values (row-major by j; `None` marks holes) at
/// `levels`, through the `contour` crate. Returns polylines in grid coordinates (cell centres at
/// integers), with the crate's closing stretches along the grid edge and around holes removed.
pub fn contour_lines(
    nx: usize,
    ny: usize,
    value: impl Fn(usize, usize) -> Option<f64>,
    levels: &[f64],
) -> LevelLines {
    if nx < 2 || ny < 2 || levels.is_empty() {
        return Vec::new();
    }
    let mut values = vec![f64::NAN; nx * ny];
    let mut hole = vec![false; nx * ny];
    for j in 0..ny {
        for i in 0..nx {
            match value(i, j) {
                Some(v) if v.is_finite() => values[j * nx + i] = v,
                _ => hole[j * nx + i] = true,
            }
        }
    }
    // Holes read as "below every level" in the crate; they are cut out below.
    let fill = levels.iter().copied().fold(f64::INFINITY, f64::min) - 1.0;
    for (v, h) in values.iter_mut().zip(&hole) {
        if *h {
            *v = fill;
        }
    }
    let Ok(lines) = contour::ContourBuilder::new(nx, ny, true).lines(&values, levels) else {
        return Vec::new();
    };
    let is_hole = |i: f64, j: f64| -> bool {
        let (i, j) = (i.round(), j.round());
        i < 0.0
            || j < 0.0
            || i as usize >= nx
            || j as usize >= ny
            || hole[j as usize * nx + i as usize]
    };
    // A vertex in the crate's coordinates lies between two cell centres (x−0.5, y−0.5 has one
    // half-integer coordinate); it is real when both cells exist and hold values.
    let real = |x: f64, y: f64| -> bool {
        let (gx, gy) = (x - 0.5, y - 0.5);
        if !(gx.is_finite() && gy.is_finite()) || gx <= -0.5 || gy <= -0.5 {
            return false;
        }
        if gx >= nx as f64 - 0.5 || gy >= ny as f64 - 0.5 {
            return false;
        }
        !(is_hole(gx.floor(), gy.floor()) || is_hole(gx.ceil(), gy.ceil()))
    };
    let mut out = Vec::new();
    for l in lines {
        let (geom, level) = l.into_inner();
        for ls in geom.0 {
            let mut run: Vec<[f32; 2]> = Vec::new();
            for c in ls.0 {
                if real(c.x, c.y) {
                    run.push([(c.x - 0.5) as f32, (c.y - 0.5) as f32]);
                } else if run.len() >= 2 {
                    out.push((level, std::mem::take(&mut run)));
                } else {
                    run.clear();
                }
            }
            if run.len() >= 2 {
                out.push((level, run));
            }
        }
    }
    out
}

/// "Nice" contour levels between `lo` and `hi` (about `n` of them).
pub fn nice_levels(lo: f64, hi: f64, n: usize) -> Vec<f64> {
    if !(hi > lo) {
        return vec![];
    }
    let raw = (hi - lo) / n as f64;
    let mag = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 2.5, 5.0, 10.0]
        .iter()
        .map(|m| m * mag)
        .find(|s| *s >= raw)
        .unwrap_or(10.0 * mag);
    let mut v = Vec::new();
    let mut x = (lo / step).ceil() * step;
    while x <= hi && v.len() < 40 {
        v.push(x);
        x += step;
    }
    v
}

impl WindowView {
    /// The action that computes the map the form describes (or the form's error).
    fn start(&mut self, vc: &ViewCtx<'_>) -> Option<Action> {
        let w = &*self;
        let parse = |s: &str| Epoch::parse(s).map_err(|e| e.to_string());
        let spec = (|| -> Result<WindowSpec, String> {
            let depart = (parse(&w.depart.0)?, parse(&w.depart.1)?);
            if depart.1.tdb().0 <= depart.0.tdb().0 {
                return Err("departure range: the end must be after the start".into());
            }
            let second = if w.use_tof {
                if !(w.tof.0 > 0.0 && w.tof.1 > w.tof.0) {
                    return Err("TOF range must have 0 < min < max".into());
                }
                SecondAxis::Tof(w.tof.0, w.tof.1)
            } else {
                let a = (parse(&w.arrive.0)?, parse(&w.arrive.1)?);
                if a.1.tdb().0 <= a.0.tdb().0 {
                    return Err("arrival range: the end must be after the start".into());
                }
                SecondAxis::Arrival(a.0, a.1)
            };
            Ok(WindowSpec {
                from: w.from.clone(),
                to: w.to.clone(),
                depart,
                second,
                nx: w.steps,
                ny: w.steps,
                leg: LegOptions {
                    revolutions: w.revs,
                    branch: w.branch,
                    ..Default::default()
                },
                goal: vc.design.arrival,
            })
        })();
        match spec {
            Err(e) => {
                self.error = Some(e);
                None
            }
            Ok(spec) => {
                self.error = None;
                self.pending_model = Some(vc.design.ephemeris.clone());
                Some(Action::StartJob(JobRequest::Window(spec)))
            }
        }
    }

    /// Draw the view.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let mut out = Vec::new();
        let dark = vc.dark;
        let names = vc.design.body_names();
        let n_legs = vc.design.stops.len().saturating_sub(1);
        ui.horizontal_wrapped(|ui| {
            let leg_lab = ui.label("Leg");
            let mut leg = self.leg;
            egui::ComboBox::from_id_salt("wm-leg")
                .selected_text(leg.map(|k| format!("{}", k + 1)).unwrap_or("free".into()))
                .show_ui(ui, |ui| {
                    ui.selectable_value(&mut leg, None, "free");
                    for k in 0..n_legs {
                        ui.selectable_value(
                            &mut leg,
                            Some(k),
                            format!(
                                "{} ({} to {})",
                                k + 1,
                                vc.design.stops[k].body,
                                vc.design.stops[k + 1].body
                            ),
                        );
                    }
                })
                .response
                .labelled_by(leg_lab.id);
            if leg != self.leg {
                match leg {
                    Some(k) => self.reset_from_design(vc.design, k),
                    None => self.leg = None,
                }
            }
            for (label, v) in [("from", 0), ("to", 1)] {
                let lab = ui.label(label);
                let cur = if v == 0 {
                    self.from.clone()
                } else {
                    self.to.clone()
                };
                let mut sel = cur.clone();
                egui::ComboBox::from_id_salt(("wm-body", v))
                    .selected_text(sel.clone())
                    .show_ui(ui, |ui| {
                        for n in &names {
                            ui.selectable_value(&mut sel, n.clone(), n);
                        }
                    })
                    .response
                    .labelled_by(lab.id);
                if sel != cur {
                    if v == 0 {
                        self.from = sel
                    } else {
                        self.to = sel
                    }
                    self.leg = None;
                }
            }
        });
        ui.horizontal_wrapped(|ui| {
            let w = &mut *self;
            style::labelled(
                ui,
                "depart",
                egui::TextEdit::singleline(&mut w.depart.0).desired_width(90.0),
            );
            style::labelled(
                ui,
                "..",
                egui::TextEdit::singleline(&mut w.depart.1).desired_width(90.0),
            );
            ui.checkbox(&mut w.use_tof, "TOF axis");
            if w.use_tof {
                style::labelled(ui, "TOF", egui::DragValue::new(&mut w.tof.0).suffix(" d"));
                style::labelled(ui, "..", egui::DragValue::new(&mut w.tof.1).suffix(" d"));
            } else {
                style::labelled(
                    ui,
                    "arrive",
                    egui::TextEdit::singleline(&mut w.arrive.0).desired_width(90.0),
                );
                style::labelled(
                    ui,
                    "..",
                    egui::TextEdit::singleline(&mut w.arrive.1).desired_width(90.0),
                );
            }
            style::labelled(
                ui,
                "cells",
                egui::DragValue::new(&mut w.steps).range(20..=1000),
            );
            style::labelled(ui, "revs", egui::DragValue::new(&mut w.revs).range(0..=4));
            if w.revs > 0 {
                use crate::astro::lambert::Branch;
                ui.selectable_value(&mut w.branch, Branch::Left, "left branch")
                    .on_hover_text("Izzo's left branch: the smaller x (higher energy)");
                ui.selectable_value(&mut w.branch, Branch::Right, "right branch");
            }
            let running = vc.jobs.is_running(JobKind::Window);
            if ui
                .add_enabled(!running, egui::Button::new("Compute"))
                .clicked()
            {
                out.extend(w.start(vc));
            }
            if running {
                ui.spinner();
            }
        });
        ui.horizontal(|ui| {
            ui.label("show");
            for q in Quantity::ALL {
                ui.selectable_value(&mut self.quantity, q, q.label());
            }
        });
        if self.auto && self.map.is_none() && !vc.jobs.is_running(JobKind::Window) {
            self.auto = false;
            out.extend(self.start(vc));
        }
        if let Some(e) = &self.error {
            ui.label(RichText::new(format!("! {e}")).color(style::error_color(dark)));
        }
        if self.map.is_none() {
            ui.label("Press Compute to map the launch window (runs in the background; the bar below shows progress).");
            return out;
        }
        self.canvas(ui, vc, &mut out);
        out
    }

    /// Why the map shown no longer stands for the chosen leg of the design (None: it does). The
    /// one rule for the banner and for clicks: the leg's bodies, its revolutions and branch, and
    /// the ephemeris model must be those the map was computed for.
    pub fn stale_reason(&self, vc: &ViewCtx<'_>, map: &WindowMap) -> Option<String> {
        let k = self.leg?;
        let d = vc.design;
        if k + 1 >= d.stops.len()
            || !d.stops[k].body.eq_ignore_ascii_case(&map.spec.from)
            || !d.stops[k + 1].body.eq_ignore_ascii_case(&map.spec.to)
        {
            return Some(format!(
                "this map is for {} to {}, not for leg {} of the design as it is now",
                map.spec.from,
                map.spec.to,
                k + 1
            ));
        }
        let leg = d.leg(k);
        if leg.revolutions != map.spec.leg.revolutions
            || (leg.revolutions > 0 && leg.branch != map.spec.leg.branch)
        {
            return Some(format!(
                "leg {} now flies {} revolutions ({:?} branch); the map was computed for {}",
                k + 1,
                leg.revolutions,
                leg.branch,
                map.spec.leg.revolutions
            ));
        }
        if self.map_model.as_ref().is_some_and(|m| *m != d.ephemeris) {
            return Some("the design's ephemeris model changed since the map was computed".into());
        }
        None
    }

    /// The map: a stale banner, the colour-scale row, then the canvas drawn in named steps.
    fn canvas(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>, out: &mut Actions) {
        let dark = vc.dark;
        // Shared, not copied: the map can hold a million cells.
        let map = self.map.clone().expect("checked");
        if let Some(why) = self.stale_reason(vc, &map) {
            ui.label(
                RichText::new(format!(
                    "! Stale: {why}. Compute it again; clicks on it set no dates."
                ))
                .color(style::warn_color(dark)),
            );
        }
        let Some((lo, auto_cap, hi)) = self.colour_range(&map) else {
            ui.label("No cell has a solution for these dates.");
            return;
        };
        let cap = self.scale_row(ui, &map, lo, auto_cap, hi);
        self.ensure_texture(ui, &map, lo, cap, dark);
        self.ensure_contours(&map, lo, cap);
        let (resp, painter) = ui.allocate_painter(ui.available_size(), Sense::click_and_drag());
        let g = Grid::new(&resp, &map, self.view);
        let p2 = painter.with_clip_rect(g.plot);
        let text_c = if dark {
            Color32::from_gray(210)
        } else {
            Color32::from_gray(40)
        };
        if let Some((tex, ..)) = &self.texture {
            // The texture spans cell centres 0..n-1 over half a cell beyond.
            let a = g.to_screen(-0.5, -0.5);
            let b = g.to_screen((g.nx - 1) as f32 + 0.5, (g.ny - 1) as f32 + 0.5);
            p2.image(
                tex.id(),
                Rect::from_two_pos(a, b),
                Rect::from_min_max(pos2(0.0, 0.0), pos2(1.0, 1.0)),
                Color32::WHITE,
            );
        }
        if let Some((_, _, lines)) = &self.contours {
            draw_contours(&p2, &g, lines, dark);
        }
        draw_tof_lines(&p2, &g, &map);
        self.draw_markers(&p2, &g, &map, vc);
        draw_axes(&painter, &g, &map, text_c);
        draw_colour_bar(&painter, &g, lo, cap, text_c);
        self.interact(ui, &resp, &g, &map, vc, out);
    }

    /// Colour range from the minimum to a cap; the percentiles are computed once per map and
    /// quantity, not every frame. The cap defaults to min + 3 × (30th percentile − min): the 180°
    /// ridge and the far corners would otherwise squash the useful part of the scale. Returns
    /// (min, automatic cap, max).
    fn colour_range(&mut self, map: &WindowMap) -> Option<(f64, f64, f64)> {
        let (q, id) = (self.quantity, self.map_id);
        if self.stats.is_none_or(|s| s.0 != q || s.1 != id) {
            let mut vals: Vec<f64> = map
                .cells
                .iter()
                .filter(|c| c.solved)
                .map(|c| q.of(c))
                .collect();
            vals.sort_by(f64::total_cmp);
            self.stats = vals.first().map(|&lo| {
                let hi = vals[vals.len() - 1];
                let p30 = vals[vals.len() * 3 / 10];
                (
                    q,
                    id,
                    lo,
                    (lo + 3.0 * (p30 - lo)).min(hi).max(lo + 1e-9),
                    hi,
                )
            });
        }
        self.stats.map(|(_, _, lo, cap, hi)| (lo, cap, hi))
    }

    /// The colour-scale cap (editable, or automatic) and the minimum's read-out; returns the cap.
    fn scale_row(
        &mut self,
        ui: &mut egui::Ui,
        map: &WindowMap,
        lo: f64,
        auto: f64,
        hi: f64,
    ) -> f64 {
        let mut cap = self.cap.unwrap_or(auto);
        ui.horizontal_wrapped(|ui| {
            if style::labelled(
                ui,
                "colour scale up to",
                egui::DragValue::new(&mut cap)
                    .speed((auto - lo) * 0.01)
                    .range(lo..=hi),
            )
            .changed()
            {
                self.cap = Some(cap);
                self.texture = None;
                self.contours = None;
            }
            if ui.small_button("auto").clicked() {
                self.cap = None;
                self.texture = None;
                self.contours = None;
            }
            if let Some((i, j, v)) = map.minimum(self.quantity) {
                let (a, b) = map.epochs(i, j);
                ui.label(format!(
                    "minimum {v:.3} · depart {} · arrive {} · {:.0} d",
                    a.to_date_utc(),
                    b.to_date_utc(),
                    b.days() - a.days()
                ));
            }
        });
        self.cap.unwrap_or(auto)
    }

    /// The colour image of the map, rebuilt only for a new map, quantity or cap.
    fn ensure_texture(&mut self, ui: &egui::Ui, map: &WindowMap, lo: f64, cap: f64, dark: bool) {
        let (q, id) = (self.quantity, self.map_id);
        if !self
            .texture
            .as_ref()
            .is_none_or(|(_, tq, tid)| *tq != q || *tid != id)
        {
            return;
        }
        let (nx, ny) = (map.spec.nx, map.spec.ny);
        let mut img = egui::ColorImage::new([nx, ny], vec![Color32::TRANSPARENT; nx * ny]);
        let (over, none) = if dark {
            (Color32::from_gray(40), Color32::from_gray(22))
        } else {
            (Color32::from_gray(225), Color32::from_gray(240))
        };
        for j in 0..ny {
            for i in 0..nx {
                let c = map.cell(i, j);
                // Row 0 of the image is the top: highest second-axis value.
                img.pixels[(ny - 1 - j) * nx + i] = if c.solved {
                    let t = ((q.of(c) - lo) / (cap - lo)) as f32;
                    if t > 1.0 { over } else { style::ramp(t) }
                } else {
                    none
                };
            }
        }
        let tex = ui
            .ctx()
            .load_texture("window-map", img, egui::TextureOptions::NEAREST);
        self.texture = Some((tex, q, id));
    }

    /// The contour lines, rebuilt only for a new map or quantity.
    fn ensure_contours(&mut self, map: &WindowMap, lo: f64, cap: f64) {
        let (q, id) = (self.quantity, self.map_id);
        if self
            .contours
            .as_ref()
            .is_none_or(|(cq, cid, _)| *cq != q || *cid != id)
        {
            let lines = contour_lines(
                map.spec.nx,
                map.spec.ny,
                |i, j| {
                    let c = map.cell(i, j);
                    c.solved.then(|| q.of(c))
                },
                &nice_levels(lo, cap, 9),
            );
            self.contours = Some((q, id, lines));
        }
    }

    /// The map's minimum and the design's own leg dates.
    fn draw_markers(&self, p2: &egui::Painter, g: &Grid, map: &WindowMap, vc: &ViewCtx<'_>) {
        if let Some((i, j, _)) = map.minimum(self.quantity) {
            let p = g.to_screen(i as f32, j as f32);
            p2.circle_stroke(p, 7.0, Stroke::new(2.0, Color32::WHITE));
            p2.line_segment(
                [p - vec2(10.0, 0.0), p + vec2(10.0, 0.0)],
                Stroke::new(1.5, Color32::BLACK),
            );
            p2.line_segment(
                [p - vec2(0.0, 10.0), p + vec2(0.0, 10.0)],
                Stroke::new(1.5, Color32::BLACK),
            );
        }
        let Some(k) = self.leg.filter(|k| k + 1 < vc.design.stops.len()) else {
            return;
        };
        let (nx, ny) = (g.nx, g.ny);
        let (a, b) = (
            vc.design.stops[k].epoch.tdb(),
            vc.design.stops[k + 1].epoch.tdb(),
        );
        let gi = ((a.days() - map.depart[0].days())
            / (map.depart[nx - 1].days() - map.depart[0].days())
            * (nx - 1) as f64) as f32;
        let yv = match map.spec.second {
            SecondAxis::Arrival(..) => b.mjd2000(),
            SecondAxis::Tof(..) => b.days() - a.days(),
        };
        let gj =
            ((yv - map.second[0]) / (map.second[ny - 1] - map.second[0]) * (ny - 1) as f64) as f32;
        style::stop_marker(
            p2,
            g.to_screen(gi, gj),
            tourwright_mission::evaluate::StopKind::SwingBy,
            style::leg_color(k),
            7.0,
            Color32::WHITE,
        );
    }

    /// Zoom (wheel about the pointer), pan (drag), reset (double click), hover read-out, click.
    fn interact(
        &mut self,
        ui: &egui::Ui,
        resp: &egui::Response,
        g: &Grid,
        map: &WindowMap,
        vc: &ViewCtx<'_>,
        out: &mut Actions,
    ) {
        let view = g.view;
        if resp.hovered() {
            let scroll = ui.input(|i| i.smooth_scroll_delta.y);
            if let (true, Some(p)) = (scroll != 0.0, resp.hover_pos()) {
                let (u, v) = g.normalised(p);
                let f = (1.0 - scroll * 0.002).clamp(0.5, 1.5);
                self.view = Some(Rect::from_min_max(
                    pos2(u - (u - view.min.x) * f, v - (v - view.min.y) * f),
                    pos2(u + (view.max.x - u) * f, v + (view.max.y - v) * f),
                ));
            }
        }
        if resp.dragged() {
            let dd = resp.drag_delta();
            self.view = Some(view.translate(vec2(
                -dd.x / g.plot.width() * view.width(),
                dd.y / g.plot.height() * view.height(),
            )));
        }
        if resp.double_clicked() {
            self.view = None;
        }
        if let Some((i, j)) = resp.hover_pos().and_then(|p| g.cell_at(p)) {
            let c = *map.cell(i, j);
            let (a, b) = map.epochs(i, j);
            resp.clone().on_hover_ui_at_pointer(|ui| {
                ui.label(format!(
                    "depart {} · arrive {} · {:.0} d",
                    a.to_date_utc(),
                    b.to_date_utc(),
                    c.tof_days
                ));
                if c.solved {
                    ui.label(format!(
                        "C3 {:.2} km²/s² · v∞ out {:.3} km/s · v∞ in {:.3} km/s",
                        c.c3, c.vinf_depart, c.vinf_arrive
                    ));
                    ui.label(format!("launch v∞ + arrival Δv {:.3} km/s", c.total_dv));
                } else {
                    ui.label("no arc");
                }
                ui.label(RichText::new("click to set the leg's dates").weak());
            });
        }
        if resp.clicked() {
            if let Some((i, j)) = resp.interact_pointer_pos().and_then(|p| g.cell_at(p)) {
                out.push(self.click(vc, map, i, j));
            }
        }
    }

    /// The action a click on cell (i, j) of a map stands for: set the chosen leg's dates (one
    /// undo step) when the map's bodies are those of the leg, else a message saying why not.
    pub fn click(&self, vc: &ViewCtx<'_>, map: &WindowMap, i: usize, j: usize) -> Action {
        let (a, b) = map.epochs(i, j);
        let Some(k) = self.leg else {
            return Action::Status(
                "choose a leg of the design to set its dates from the map".into(),
                true,
            );
        };
        if let Some(why) = self.stale_reason(vc, map) {
            return Action::Status(format!("no dates set: {why}"), true);
        }
        let d = vc.design;
        let scale = |s: usize| d.stops[s].epoch.scale();
        Action::Edit(Edit::SetLegEpochs {
            leg: k,
            depart: Epoch::from_tdb(a, scale(k)),
            arrive: Epoch::from_tdb(b, scale(k + 1)),
        })
    }
}

/// The map's plot area and the part of the grid shown: grid (i, j) to normalised (u, v) to screen.
struct Grid {
    full: Rect,
    plot: Rect,
    view: Rect,
    nx: usize,
    ny: usize,
}

impl Grid {
    fn new(resp: &egui::Response, map: &WindowMap, view: Option<Rect>) -> Self {
        let full = resp.rect;
        Grid {
            full,
            // Margins for the axes' labels and the colour bar.
            plot: Rect::from_min_max(full.min + vec2(70.0, 10.0), full.max - vec2(80.0, 40.0)),
            view: view.unwrap_or(Rect::from_min_max(pos2(0.0, 0.0), pos2(1.0, 1.0))),
            nx: map.spec.nx,
            ny: map.spec.ny,
        }
    }
    fn to_screen(&self, gi: f32, gj: f32) -> Pos2 {
        let (plot, view) = (self.plot, self.view);
        let u = gi / (self.nx - 1) as f32;
        let v = gj / (self.ny - 1) as f32;
        pos2(
            plot.left() + (u - view.min.x) / view.width() * plot.width(),
            plot.bottom() - (v - view.min.y) / view.height() * plot.height(),
        )
    }
    fn normalised(&self, p: Pos2) -> (f32, f32) {
        let (plot, view) = (self.plot, self.view);
        let u = view.min.x + (p.x - plot.left()) / plot.width() * view.width();
        let v = view.min.y + (plot.bottom() - p.y) / plot.height() * view.height();
        (u, v)
    }
    fn cell_at(&self, p: Pos2) -> Option<(usize, usize)> {
        if !self.plot.contains(p) {
            return None;
        }
        let (u, v) = self.normalised(p);
        let i = (u * (self.nx - 1) as f32).round();
        let j = (v * (self.ny - 1) as f32).round();
        (i >= 0.0 && j >= 0.0 && (i as usize) < self.nx && (j as usize) < self.ny)
            .then_some((i as usize, j as usize))
    }
}

/// Contour lines, with one label per level: along each line from its middle outwards, the first
/// visible spot at least 40 points away from labels already placed.
fn draw_contours(p2: &egui::Painter, g: &Grid, lines: &LevelLines, dark: bool) {
    let line_c = if dark {
        Color32::from_rgba_unmultiplied(255, 255, 255, 170)
    } else {
        Color32::from_rgba_unmultiplied(0, 0, 0, 160)
    };
    for (_, l) in lines {
        let pts: Vec<Pos2> = l.iter().map(|p| g.to_screen(p[0], p[1])).collect();
        p2.add(egui::Shape::line(pts, Stroke::new(1.0, line_c)));
    }
    let mut best: Vec<(f64, Pos2)> = Vec::new();
    for (lv, l) in lines {
        if best.iter().any(|b| b.0 == *lv) {
            continue;
        }
        let mid = l.len() / 2;
        let order = (0..l.len()).map(|k| {
            if k % 2 == 0 {
                mid + k / 2
            } else {
                mid.saturating_sub(k / 2 + 1)
            }
        });
        for idx in order.filter(|i| *i < l.len()) {
            let a = g.to_screen(l[idx][0], l[idx][1]);
            if g.plot.shrink(16.0).contains(a) && best.iter().all(|b| b.1.distance(a) > 40.0) {
                best.push((*lv, a));
                break;
            }
        }
    }
    let bg = if dark {
        Color32::from_rgba_unmultiplied(0, 0, 0, 150)
    } else {
        Color32::from_rgba_unmultiplied(255, 255, 255, 170)
    };
    for (lv, a) in best {
        let galley = p2.layout_no_wrap(format!("{lv}"), FontId::proportional(11.0), line_c);
        let r = Align2::CENTER_CENTER.anchor_size(a, galley.size());
        p2.rect_filled(r.expand(1.0), 2.0, bg);
        p2.galley(r.min, galley, line_c);
    }
}

/// Lines of constant TOF when both axes are dates.
fn draw_tof_lines(p2: &egui::Painter, g: &Grid, map: &WindowMap) {
    let SecondAxis::Arrival(a0, a1) = map.spec.second else {
        return;
    };
    let nx = g.nx;
    let (d0, d1) = (map.depart[0].days(), map.depart[nx - 1].days());
    let (r0, r1) = (a0.days(), a1.days());
    let tmin = (r0 - d1).max(1.0);
    let tmax = r1 - d0;
    for t in nice_levels(tmin, tmax, 6) {
        // arrive = depart + t: endpoints across the departure range.
        let gi = |dd: f64| ((dd - d0) / (d1 - d0) * (nx - 1) as f64) as f32;
        let gj = |rr: f64| ((rr - r0) / (r1 - r0) * (g.ny - 1) as f64) as f32;
        let a = g.to_screen(gi(d0), gj(d0 + t));
        let b = g.to_screen(gi(d1), gj(d1 + t));
        p2.extend(egui::Shape::dashed_line(
            &[a, b],
            Stroke::new(1.0, style::SUN),
            6.0,
            5.0,
        ));
        let mid = pos2(0.5 * (a.x + b.x), 0.5 * (a.y + b.y));
        if g.plot.contains(mid) {
            p2.text(
                mid,
                Align2::LEFT_BOTTOM,
                format!("{t:.0} d"),
                FontId::proportional(11.0),
                style::SUN,
            );
        }
    }
}

/// The frame, five date labels on each axis, the departure axis' title.
fn draw_axes(painter: &egui::Painter, g: &Grid, map: &WindowMap, text_c: Color32) {
    let (plot, view) = (g.plot, g.view);
    painter.rect_stroke(
        plot,
        0.0,
        Stroke::new(1.0, text_c),
        egui::StrokeKind::Outside,
    );
    for f in [0.0f32, 0.25, 0.5, 0.75, 1.0] {
        let u = view.min.x + f * view.width();
        let i = (u * (g.nx - 1) as f32)
            .round()
            .clamp(0.0, (g.nx - 1) as f32) as usize;
        let x = plot.left() + f * plot.width();
        painter.text(
            pos2(x, plot.bottom() + 4.0),
            Align2::CENTER_TOP,
            map.depart[i].to_date_utc(),
            FontId::proportional(11.0),
            text_c,
        );
        let v = view.min.y + f * view.height();
        let j = (v * (g.ny - 1) as f32)
            .round()
            .clamp(0.0, (g.ny - 1) as f32) as usize;
        let y = plot.bottom() - f * plot.height();
        let label = match map.spec.second {
            SecondAxis::Arrival(..) => Tdb::from_mjd2000(map.second[j]).to_date_utc(),
            SecondAxis::Tof(..) => format!("{:.0} d", map.second[j]),
        };
        painter.text(
            pos2(plot.left() - 4.0, y),
            Align2::RIGHT_CENTER,
            label,
            FontId::proportional(11.0),
            text_c,
        );
    }
    painter.text(
        pos2(plot.center().x, g.full.bottom() - 2.0),
        Align2::CENTER_BOTTOM,
        format!("departure from {} (UTC)", map.spec.from),
        FontId::proportional(12.0),
        text_c,
    );
}

/// The colour bar beside the plot, from the minimum to the cap.
fn draw_colour_bar(painter: &egui::Painter, g: &Grid, lo: f64, cap: f64, text_c: Color32) {
    let plot = g.plot;
    let bar = Rect::from_min_max(
        pos2(plot.right() + 12.0, plot.top()),
        pos2(plot.right() + 26.0, plot.bottom()),
    );
    for s in 0..64 {
        let t0 = s as f32 / 64.0;
        let r = Rect::from_min_max(
            pos2(bar.left(), bar.bottom() - (t0 + 1.0 / 64.0) * bar.height()),
            pos2(bar.right(), bar.bottom() - t0 * bar.height()),
        );
        painter.rect_filled(r, 0.0, style::ramp(t0));
    }
    painter.text(
        bar.right_top() + vec2(3.0, 0.0),
        Align2::LEFT_TOP,
        format!("{cap:.1}"),
        FontId::proportional(11.0),
        text_c,
    );
    painter.text(
        bar.right_bottom() + vec2(3.0, 0.0),
        Align2::LEFT_BOTTOM,
        format!("{lo:.1}"),
        FontId::proportional(11.0),
        text_c,
    );
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn contour_lines_find_a_circle_and_skip_holes() {
        // f = x² + y² on a grid; the level r² contour has points at distance r from the centre.
        let n = 41;
        let f = |i: usize, j: usize| {
            let (x, y) = (i as f64 - 20.0, j as f64 - 20.0);
            Some(x * x + y * y)
        };
        let lines = contour_lines(n, n, f, &[100.0]);
        let pts: Vec<[f32; 2]> = lines.iter().flat_map(|l| l.1.clone()).collect();
        assert!(pts.len() > 40);
        for p in &pts {
            let r = ((p[0] - 20.0).powi(2) + (p[1] - 20.0).powi(2)).sqrt();
            assert!((r - 10.0).abs() < 0.3, "{r}");
        }
        // A plane f = i crossed by a level: the line runs at i = 2.5 and never along the grid's
        // edge; the hole (j = 5) cuts it in two.
        let g = |i: usize, j: usize| (j != 5).then_some(i as f64);
        let lines = contour_lines(8, 10, g, &[2.5]);
        assert_eq!(lines.len(), 2, "{lines:?}");
        for (_, l) in &lines {
            for p in l {
                assert!((p[0] - 2.5).abs() < 1e-6, "{p:?}");
                assert!((p[1] - 5.0).abs() >= 0.5, "{p:?}");
            }
        }
        assert!(contour_lines(8, 8, |_, _| None, &[1.0]).is_empty());
    }

    #[test]
    fn nice_levels_are_round() {
        assert_eq!(
            nice_levels(0.0, 10.0, 5),
            vec![0.0, 2.0, 4.0, 6.0, 8.0, 10.0]
        );
        assert!(nice_levels(3.0, 3.0, 5).is_empty());
    }
}
