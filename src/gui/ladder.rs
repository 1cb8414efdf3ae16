//! Energy ladder: heliocentric specific energy along the tour (constant on each conic arc, with
//! steps at the swing-bys and manoeuvres), the escape line at zero energy, heliocentric speed
//! along the arcs against the local solar escape speed, and v∞ at each stop. Every number comes
//! from the evaluation (energies) or the engine (escape speed).

use eframe::egui::{self, RichText};
use egui_plot::{
    HLine, Legend, Line, LineStyle, MarkerShape, Plot, PlotPoint, PlotPoints, Points, Text,
};

use tourwright_astro::kepler::escape_speed;
use tourwright_mission::evaluate::StopKind;

use super::action::Actions;
use super::context::ViewCtx;
use super::style;

/// The energy ladder (no state of its own).
#[derive(Default)]
pub struct LadderView;

impl LadderView {
    /// Draw the ladder.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let e = vc.eval;
        let Some(tour) = vc.tour else {
            ui.label("The design cannot be evaluated; see the warnings.");
            return Vec::new();
        };
        if !e.complete {
            ui.label("The tour is incomplete; the ladder shows the legs that have a solution.");
        }
        let t0 = e.stops.first().map(|s| s.epoch.days()).unwrap_or(0.0);
        let h = (ui.available_height() - 40.0).max(200.0);
        ui.label(
            RichText::new(
                "Heliocentric specific energy (km²/s²) against days from launch; steps are \
                 swing-bys and manoeuvres.",
            )
            .weak(),
        );
        let name = |k: usize| tour.stops[k].body.name.to_string();
        Plot::new("energy-ladder")
            .height(h * 0.58)
            .legend(Legend::default())
            .x_axis_label("days from launch")
            .y_axis_label("energy (km²/s²)")
            .show(ui, |pl| {
                pl.hline(
                    HLine::new("escape (zero energy)", 0.0)
                        .style(LineStyle::dashed_loose())
                        .color(style::SUN),
                );
                // Energy is constant on a two-body arc: the value leaving each stop.
                for (k, leg) in e.legs.iter().enumerate() {
                    if !leg.solved || k + 1 >= e.stops.len() {
                        continue;
                    }
                    let (a, b) = (&e.stops[k], &e.stops[k + 1]);
                    let (xa, xb) = (a.epoch.days() - t0, b.epoch.days() - t0);
                    // A manoeuvre splits the leg: a step at its date.
                    let pts = match leg.dsm {
                        Some(d) => {
                            let xd = d.t.days() - t0;
                            vec![
                                [xa, a.energy_after],
                                [xd, d.energy_before],
                                [xd, d.energy_after],
                                [xb, b.energy_before],
                            ]
                        }
                        None => vec![[xa, a.energy_after], [xb, b.energy_before]],
                    };
                    pl.line(
                        Line::new(format!("leg {}", k + 1), PlotPoints::from(pts))
                            .color(style::leg_color(k))
                            .width(3.0),
                    );
                    if let Some(d) = leg.dsm {
                        let xd = d.t.days() - t0;
                        pl.points(
                            Points::new(
                                format!("DSM leg {}", k + 1),
                                PlotPoints::from(vec![[xd, d.energy_after]]),
                            )
                            .shape(MarkerShape::Cross)
                            .radius(7.0)
                            .color(style::leg_color(k)),
                        );
                        pl.text(
                            Text::new(
                                "",
                                PlotPoint::new(xd, d.energy_after),
                                format!(
                                    "DSM Δv {:.3}\nΔE {:+.1}",
                                    d.dv_km_s,
                                    d.energy_after - d.energy_before
                                ),
                            )
                            .anchor(egui::Align2::LEFT_TOP),
                        );
                    }
                }
                for (k, s) in e.stops.iter().enumerate() {
                    let x = s.epoch.days() - t0;
                    let col = style::body_color(&name(k));
                    if s.kind == StopKind::SwingBy {
                        pl.line(
                            Line::new(
                                "",
                                PlotPoints::from(vec![[x, s.energy_before], [x, s.energy_after]]),
                            )
                            .color(col)
                            .width(2.0)
                            .style(LineStyle::dotted_dense()),
                        );
                    }
                    let y = if s.kind == StopKind::Arrival {
                        s.energy_before
                    } else {
                        s.energy_after
                    };
                    pl.points(
                        Points::new(name(k), PlotPoints::from(vec![[x, y]]))
                            .shape(match s.kind {
                                StopKind::Launch => MarkerShape::Up,
                                StopKind::SwingBy => MarkerShape::Diamond,
                                StopKind::Arrival => MarkerShape::Square,
                            })
                            .radius(6.0)
                            .color(col),
                    );
                    let mut label = format!("{} v∞ {:.2}", name(k), s.vinf());
                    if s.kind == StopKind::SwingBy {
                        label.push_str(&format!("\nΔE {:+.1}", s.gain()));
                    }
                    pl.text(
                        Text::new("", PlotPoint::new(x, y), label)
                            .anchor(egui::Align2::LEFT_BOTTOM),
                    );
                }
            });
        Plot::new("speed-ladder")
            .height(h * 0.38)
            .legend(Legend::default())
            .x_axis_label("days from launch")
            .y_axis_label("speed (km/s)")
            .show(ui, |pl| {
                for (k, leg) in e.legs.iter().enumerate() {
                    let series: Vec<[f64; 2]> = e.samples[leg.samples.clone()]
                        .iter()
                        .map(|s| [s.t.days() - t0, s.state.v.norm()])
                        .collect();
                    pl.line(
                        Line::new(
                            format!("heliocentric speed, leg {}", k + 1),
                            PlotPoints::from(series),
                        )
                        .color(style::leg_color(k))
                        .width(2.0),
                    );
                }
                let escape: Vec<[f64; 2]> = e
                    .samples
                    .iter()
                    .map(|s| [s.t.days() - t0, escape_speed(tour.mu_sun, s.state.r.norm())])
                    .collect();
                pl.line(
                    Line::new("local solar escape speed", PlotPoints::from(escape))
                        .color(style::SUN)
                        .style(LineStyle::dashed_loose()),
                );
                let vinf: Vec<[f64; 2]> = e
                    .stops
                    .iter()
                    .map(|s| [s.epoch.days() - t0, s.vinf()])
                    .collect();
                pl.points(
                    Points::new("v∞ at stops", PlotPoints::from(vinf))
                        .shape(MarkerShape::Circle)
                        .radius(5.0),
                );
            });
        Vec::new()
    }
}
