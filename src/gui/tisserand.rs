//! The Tisserand graph: v∞ contours of the chosen planets on (periapsis radius, apoapsis radius),
//! both log-scaled in AU, with the open design's arcs drawn on it (each heliocentric arc a point,
//! the swing-bys and manoeuvres as steps between them). Hover shows the figures; clicking near a
//! crossing of two planets' contours tells which transfer the shared orbit is. Every point comes
//! from the engine (`tourwright_astro::tisserand`, `evaluate::legs::arc_orbits`).

use eframe::egui::{self, RichText};
use egui_plot::{Legend, Line, LineStyle, MarkerShape, Plot, PlotPoint, PlotPoints, Points, Text};

use tourwright_astro::bodies::Planet;
use tourwright_astro::constants::AU_KM;
use tourwright_astro::tisserand::{self, Contour, Crossing};
use tourwright_mission::evaluate::legs;

use super::action::Actions;
use super::context::ViewCtx;
use super::style;

/// Points per contour (pump angle 0-180°); the CLI uses the same.
pub const POINTS: usize = 181;

/// The view's own state.
pub struct TisserandView {
    /// Planets shown.
    pub bodies: Vec<Planet>,
    /// v∞ levels as typed, km/s.
    pub levels_text: String,
    /// Contours and crossings, with what they were computed from.
    cache: Option<(String, Vec<Contour>, Vec<Crossing>)>,
    /// The crossing picked by a click.
    pub picked: Option<Crossing>,
    /// How many times the contours were computed (for tests).
    pub builds: usize,
}

impl Default for TisserandView {
    fn default() -> Self {
        TisserandView {
            bodies: vec![Planet::Venus, Planet::Earth, Planet::Mars, Planet::Jupiter],
            levels_text: "3, 5, 7, 9".into(),
            cache: None,
            picked: None,
            builds: 0,
        }
    }
}

/// The v∞ levels of a typed list, km/s (bad entries are skipped).
pub fn parse_levels(text: &str) -> Vec<f64> {
    text.split([',', ' ', ';'])
        .filter_map(|s| s.trim().parse::<f64>().ok())
        .filter(|v| v.is_finite() && *v > 0.0 && *v < 100.0)
        .collect()
}

/// Grid marks of a log10 axis at 1, 2, 3 and 5 times each power of ten (the default spacer puts
/// one mark per decade, and a plot of Mercury to Jupiter spans little more than one).
fn log_marks(input: egui_plot::GridInput) -> Vec<egui_plot::GridMark> {
    let (lo, hi) = input.bounds;
    let mut marks = Vec::new();
    for e in -3..=4 {
        for m in [1.0, 2.0, 3.0, 5.0] {
            let x = (m * 10f64.powi(e)).log10();
            if x >= lo && x <= hi {
                marks.push(egui_plot::GridMark {
                    value: x,
                    step_size: if m == 1.0 { 1.0 } else { 0.3 },
                });
            }
        }
    }
    marks
}

fn log_axis(v: f64) -> String {
    let au = 10f64.powf(v);
    if au >= 10.0 {
        format!("{au:.0} AU")
    } else if au >= 1.0 {
        format!("{au:.1} AU")
    } else {
        format!("{au:.2} AU")
    }
}

impl TisserandView {
    /// The contours for the current choices (computed when the choices or the model change).
    pub fn contours(&mut self, vc: &ViewCtx<'_>) -> Option<&[Contour]> {
        let tour = vc.tour?;
        let levels = parse_levels(&self.levels_text);
        let key = format!("{}|{:?}|{:?}", tour.ephemeris_name, self.bodies, levels);
        if self.cache.as_ref().is_none_or(|c| c.0 != key) {
            let c = tisserand::contours_for(&tour.model, &self.bodies, &levels, POINTS);
            let x = tisserand::crossings(&c);
            self.cache = Some((key, c, x));
            self.builds += 1;
            self.picked = None;
        }
        self.cache.as_ref().map(|c| c.1.as_slice())
    }

    /// Draw the view.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let out = Vec::new();
        let Some(tour) = vc.tour else {
            ui.label("The design cannot be evaluated; see the warnings.");
            return out;
        };
        ui.horizontal_wrapped(|ui| {
            ui.label("Planets");
            for p in Planet::ALL {
                let mut on = self.bodies.contains(&p);
                if ui.checkbox(&mut on, p.name()).changed() {
                    if on {
                        self.bodies.push(p);
                        self.bodies.sort_by_key(|q| *q as usize);
                    } else {
                        self.bodies.retain(|q| *q != p);
                    }
                }
            }
            let lab = ui.label("v∞ levels (km/s)");
            ui.add(egui::TextEdit::singleline(&mut self.levels_text).desired_width(120.0))
                .labelled_by(lab.id);
        });
        ui.label(
            RichText::new(
                "Each curve: the orbits a swing-by of that planet at that v∞ can reach (the \
                 Tisserand parameter is kept). Dots: the design's heliocentric arcs in flight \
                 order. Click near a crossing of two planets' curves to read it.",
            )
            .weak(),
        );
        self.contours(vc);
        let Some((_, contours, crossings)) = self.cache.as_ref() else {
            return out;
        };
        let arcs = legs::arc_orbits(tour, vc.eval);
        let picked = self.picked.clone();
        // The first view: the chosen planets' region and the design (the contours run on to
        // very long orbits; zoom out to see them).
        let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
        for c in contours.iter() {
            lo = lo.min(c.a_p_au);
            hi = hi.max(c.a_p_au);
        }
        let (mut x0, mut x1) = (lo / 4.0, hi * 1.1);
        let (mut y0, mut y1) = (lo * 0.9, hi * 4.0);
        for a in &arcs {
            x0 = x0.min(a.rp_au * 0.8);
            x1 = x1.max(a.rp_au * 1.2);
            y0 = y0.min(a.ra_au * 0.8);
            y1 = y1.max(a.ra_au * 1.2);
        }
        if !(x0 > 0.0 && x1 > x0) {
            (x0, x1, y0, y1) = (0.2, 10.0, 0.5, 40.0);
        }
        let a_of: Vec<(String, f64, f64)> = contours
            .iter()
            .map(|c| {
                let v_p = (tour.mu_sun / (c.a_p_au * AU_KM)).sqrt();
                (c.body.clone(), c.a_p_au, v_p)
            })
            .collect();
        let resp = Plot::new("tisserand")
            .height((ui.available_height() - 40.0).max(200.0))
            .legend(Legend::default())
            .default_x_bounds(x0.log10(), x1.log10())
            .default_y_bounds(y0.log10(), y1.log10())
            .x_axis_label("periapsis radius (log scale)")
            .y_axis_label("apoapsis radius (log scale)")
            .x_grid_spacer(log_marks)
            .y_grid_spacer(log_marks)
            .x_axis_formatter(|m, _| log_axis(m.value))
            .y_axis_formatter(|m, _| log_axis(m.value))
            .label_formatter(|pos| {
                let (name, p) = match pos {
                    egui_plot::HoverPosition::NearDataPoint {
                        plot_name,
                        position,
                        ..
                    } => (*plot_name, *position),
                    egui_plot::HoverPosition::Elsewhere { position } => ("", *position),
                };
                let (rp, ra) = (10f64.powf(p.x), 10f64.powf(p.y));
                if !(ra >= rp) {
                    return Some(String::new());
                }
                let a = 0.5 * (rp + ra);
                let e = (ra - rp) / (ra + rp);
                let mut text = format!(
                    "{name}\nperiapsis {rp:.3} AU\napoapsis {ra:.3} AU\nperiod {:.0} d",
                    365.25 * a.powf(1.5)
                );
                // The v∞ at each planet this orbit reaches (Tisserand parameter, engine).
                let mut seen = Vec::new();
                for (body, a_p, v_p) in &a_of {
                    if seen.contains(body) || rp > *a_p || ra < *a_p {
                        continue;
                    }
                    seen.push(body.clone());
                    let t = tisserand::parameter(*a_p, a, e, 0.0);
                    if let Some(v) = tisserand::vinf_of(t, *v_p) {
                        text.push_str(&format!("\nv∞ at {body} {v:.2} km/s"));
                    }
                }
                Some(text)
            })
            .show(ui, |pl| {
                for c in contours.iter() {
                    let pts: Vec<[f64; 2]> = c
                        .points
                        .iter()
                        .map(|p| [p.rp_au.log10(), p.ra_au.log10()])
                        .collect();
                    let Some(mid) = pts.get(pts.len() / 3).copied() else {
                        continue;
                    };
                    pl.line(
                        Line::new(c.body.clone(), PlotPoints::from(pts))
                            .color(style::body_color(&c.body))
                            .width(1.4),
                    );
                    pl.text(
                        Text::new(
                            "",
                            PlotPoint::new(mid[0], mid[1]),
                            format!("{} km/s", c.vinf_km_s),
                        )
                        .color(style::body_color(&c.body)),
                    );
                }
                // The design: its arcs in flight order.
                if !arcs.is_empty() {
                    let pts: Vec<[f64; 2]> = arcs
                        .iter()
                        .map(|a| [a.rp_au.log10(), a.ra_au.log10()])
                        .collect();
                    pl.line(
                        Line::new("design", PlotPoints::from(pts.clone()))
                            .color(style::ink(vc.dark))
                            .style(LineStyle::dashed_dense())
                            .width(1.5),
                    );
                    for (a, p) in arcs.iter().zip(&pts) {
                        let label = if a.piece == 1 {
                            format!("leg {} after DSM", a.leg + 1)
                        } else {
                            format!("leg {}", a.leg + 1)
                        };
                        pl.points(
                            Points::new("design", PlotPoints::from(vec![*p]))
                                .shape(MarkerShape::Circle)
                                .radius(5.0)
                                .color(style::leg_color(a.leg)),
                        );
                        pl.text(
                            Text::new("", PlotPoint::new(p[0], p[1]), label)
                                .anchor(egui::Align2::LEFT_BOTTOM),
                        );
                    }
                }
                if let Some(x) = &picked {
                    pl.points(
                        Points::new(
                            "picked crossing",
                            PlotPoints::from(vec![[x.rp_au.log10(), x.ra_au.log10()]]),
                        )
                        .shape(MarkerShape::Asterisk)
                        .radius(9.0)
                        .color(style::SUN),
                    );
                }
            });
        if resp.response.clicked() {
            if let Some(pos) = resp.response.interact_pointer_pos() {
                let t = &resp.transform;
                self.picked = crossings
                    .iter()
                    .map(|x| {
                        let s = t
                            .position_from_point(&PlotPoint::new(x.rp_au.log10(), x.ra_au.log10()));
                        (s.distance(pos), x)
                    })
                    .filter(|(d, _)| *d < 14.0)
                    .min_by(|a, b| a.0.total_cmp(&b.0))
                    .map(|(_, x)| x.clone());
            }
        }
        if let Some(x) = &self.picked {
            let (a, b) = (&contours[x.a], &contours[x.b]);
            ui.label(egui::RichText::new(crossing_text(a, b, x)).strong());
        }
        out
    }
}

/// The words for a picked crossing.
pub fn crossing_text(a: &Contour, b: &Contour, x: &Crossing) -> String {
    format!(
        "Orbit with periapsis {:.3} AU and apoapsis {:.3} AU meets {} at v∞ {} km/s and {} at \
         v∞ {} km/s: a swing-by of {} at {} km/s can put the spacecraft on it towards {} (or \
         the reverse).",
        x.rp_au, x.ra_au, a.body, a.vinf_km_s, b.body, b.vinf_km_s, a.body, a.vinf_km_s, b.body
    )
}
