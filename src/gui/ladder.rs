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
        // Stops after a shaped swing-by that misses its next body are not reached: they are not
        // drawn, and the leg that misses ends in a note.
        let reached = e.first_unreached().unwrap_or(usize::MAX).min(e.stops.len());
        if reached < e.stops.len() {
            ui.label(
                RichText::new(format!(
                    "! stop {} ({}) and those after it are not reached: the swing-by at stop {} \
                     misses it. Retarget that swing-by.",
                    reached + 1,
                    name(reached),
                    reached
                ))
                .color(style::warn_color(vc.dark)),
            );
        }
        Plot::new("energy-ladder")
            .height(h * 0.58)
            // Energy rises left to right on a tour outwards, falls on one inwards: the legend goes
            // in the corner the first and last stops leave free.
            .legend(Legend::default().position(legend_corner(e)))
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
                    if !leg.solved || k + 1 >= e.stops.len() || k + 1 > reached {
                        continue;
                    }
                    let (a, b) = (&e.stops[k], &e.stops[k + 1]);
                    let (xa, xb) = (a.epoch.days() - t0, b.epoch.days() - t0);
                    // A manoeuvre splits the leg: a step at its date.
                    // Constant energy on each coast arc: one horizontal piece per arc, and a
                    // manoeuvre's step as a dotted riser (pieces, not one polyline: a polyline's
                    // joins drew the step as a wedge).
                    let missing = k + 1 == reached;
                    let color = style::leg_color(k);
                    let piece = |x0: f64, x1: f64, y: f64| {
                        let l = Line::new(
                            format!("leg {}", k + 1),
                            PlotPoints::from(vec![[x0, y], [x1, y]]),
                        )
                        .color(color)
                        .width(3.0);
                        if missing {
                            l.style(LineStyle::dashed_dense())
                        } else {
                            l
                        }
                    };
                    match leg.dsm {
                        Some(d) => {
                            let xd = d.t.days() - t0;
                            pl.line(piece(xa, xd, d.energy_before));
                            pl.line(piece(xd, xb, d.energy_after));
                            pl.line(
                                Line::new(
                                    "",
                                    PlotPoints::from(vec![
                                        [xd, d.energy_before],
                                        [xd, d.energy_after],
                                    ]),
                                )
                                .color(color)
                                .width(2.0)
                                .style(LineStyle::dotted_dense()),
                            );
                            pl.points(
                                Points::new("", PlotPoints::from(vec![[xd, d.energy_after]]))
                                    .shape(MarkerShape::Cross)
                                    .radius(7.0)
                                    .color(color),
                            );
                            // Under the arc after the manoeuvre, clear of the stops' labels.
                            pl.text(
                                Text::new(
                                    "",
                                    PlotPoint::new(0.5 * (xd + xb), d.energy_after),
                                    format!(
                                        "DSM Δv {:.3} · ΔE {:+.1}",
                                        d.dv_km_s,
                                        d.energy_after - d.energy_before
                                    ),
                                )
                                .anchor(egui::Align2::CENTER_TOP)
                                .color(color),
                            );
                        }
                        None => pl.line(piece(xa, xb, a.energy_after)),
                    }
                    if missing {
                        pl.text(
                            Text::new(
                                "",
                                PlotPoint::new(xb, b.energy_before),
                                format!("misses {}", name(k + 1)),
                            )
                            .anchor(egui::Align2::RIGHT_BOTTOM)
                            .color(style::warn_color(vc.dark)),
                        );
                    }
                }
                for (k, s) in e.stops.iter().enumerate().take(reached) {
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
                        // Unnamed: labelled beside the point, kept out of the legend.
                        Points::new("", PlotPoints::from(vec![[x, y]]))
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
                    // Neighbouring labels on opposite sides of their points, so close stops'
                    // labels do not overlap.
                    pl.text(
                        Text::new("", PlotPoint::new(x, y), label).anchor(if k % 2 == 0 {
                            egui::Align2::LEFT_BOTTOM
                        } else {
                            egui::Align2::RIGHT_TOP
                        }),
                    );
                }
            });
        Plot::new("speed-ladder")
            .height(h * 0.38)
            .legend(Legend::default())
            .x_axis_label("days from launch")
            .y_axis_label("speed (km/s)")
            .show(ui, |pl| {
                for (k, leg) in e.legs.iter().enumerate().take(reached) {
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
                let last_t = e.stops.get(reached).map(|s| s.epoch.0);
                let escape: Vec<[f64; 2]> = e
                    .samples
                    .iter()
                    .filter(|s| last_t.is_none_or(|l| s.t.0 <= l))
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
                    .take(reached)
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

/// The legend's corner: the top left when the tour climbs in energy (the first stop sits low on
/// the left, the last high on the right, and the labels of both sit beside them), the top right
/// when it descends.
fn legend_corner(e: &tourwright_mission::evaluate::Evaluation) -> egui_plot::Corner {
    match (e.stops.first(), e.stops.last()) {
        (Some(a), Some(b)) if b.energy_before < a.energy_after => egui_plot::Corner::RightTop,
        _ => egui_plot::Corner::LeftTop,
    }
}
