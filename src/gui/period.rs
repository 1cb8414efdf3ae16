//! Launch period view: the design's tour re-optimised on each day of a launch period (a
//! background job, with progress and cancel), drawn as C3, spacecraft Δv and launch declination
//! against the launch day, with the design's limits as lines and the days that break one marked.
//! Hover a day for its figures; click it (on a plot or in the table) to open that day's tour as the
//! design, one undo step.

use eframe::egui::{self, RichText};
use egui_plot::{HLine, Legend, Line, LineStyle, MarkerShape, Plot, PlotPoints, Points};
use tourwright_mission::Edit;
use tourwright_search::period::{PeriodDay, PeriodOptions, PeriodResult};

use super::action::{Action, Actions, JobKind, JobRequest};
use super::context::ViewCtx;
use super::{shared, style};

/// The form (days, step, arrival held, budget) and the day under the pointer.
#[derive(Default)]
pub struct PeriodView {
    /// The form's options.
    pub options: PeriodOptions,
    /// The document generation the form was filled for (a new document refills it from its
    /// `launch_period` field).
    filled_for: Option<u64>,
    /// The day (offset) under the pointer last frame.
    pub hovered: Option<i64>,
}

impl PeriodView {
    /// Draw the view.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let mut out = Vec::new();
        if self.filled_for != Some(vc.generation) {
            self.options = PeriodOptions::for_design(vc.design);
            self.filled_for = Some(vc.generation);
        }
        egui::ScrollArea::vertical()
            .auto_shrink([false, false])
            .show(ui, |ui| {
                self.form(ui, vc, &mut out);
                let Some(r) = vc.jobs.period.as_ref() else {
                    ui.label(
                        "Compute the launch period to see what every launch day costs: each \
                         day's tour is searched again with that launch date held.",
                    );
                    return;
                };
                if r.value.base != *vc.design {
                    ui.label(
                        RichText::new(
                            "(for an earlier version of the design; compute again to update)",
                        )
                        .weak(),
                    );
                }
                summary(ui, vc, &r.value);
                self.plots(ui, vc, &r.value, &mut out);
                table(ui, vc, &r.value, &mut out);
            });
        out
    }

    fn form(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>, out: &mut Actions) {
        let o = &mut self.options;
        ui.horizontal_wrapped(|ui| {
            style::labelled(
                ui,
                "launch days",
                egui::DragValue::new(&mut o.days).range(1..=366),
            )
            .on_hover_text("Launch opportunities, centred on the design's launch date");
            style::labelled(
                ui,
                "step",
                egui::DragValue::new(&mut o.step_days)
                    .range(1.0 / 24.0..=30.0)
                    .speed(0.1)
                    .suffix(" d"),
            );
            ui.checkbox(&mut o.fixed_arrival, "hold the arrival date")
                .on_hover_text(
                    "Every day arrives on the design's arrival date (otherwise the arrival is \
                     free within the search bounds)",
                );
            style::labelled(
                ui,
                "evaluations per day",
                egui::DragValue::new(&mut o.evals_per_day)
                    .range(1_000..=10_000_000)
                    .speed(1000.0),
            );
        });
        shared::job_row(
            ui,
            vc,
            JobKind::Period,
            JobRequest::Period(*o),
            "Compute launch period",
            "Search each day's tour with its launch held, starting from its neighbour's (runs in \
             the background)",
            out,
        );
    }

    fn plots(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>, r: &PeriodResult, out: &mut Actions) {
        let step = r.options.step_days;
        let x = |d: &PeriodDay| d.offset as f64 * step;
        // The view scrolls: plots keep a readable height on a short window.
        let h = ((ui.available_height() - 60.0) / 3.0).clamp(150.0, 240.0);
        let limits = vc.design.launch;
        let warn = style::error_color(vc.dark);
        let mut hovered = None;
        let mut clicked = false;
        let series = [
            (
                "C3 (km²/s²)",
                (|d: &PeriodDay| d.c3_km2_s2) as fn(&PeriodDay) -> f64,
                vec![("C3 limit", limits.max_c3_km2_s2)],
            ),
            (
                "Δv (km/s)",
                |d: &PeriodDay| d.total_dv_km_s,
                vec![("Δv the propellant gives", r.summary.dv_capacity_km_s)],
            ),
            (
                "DLA (°)",
                |d: &PeriodDay| d.dla_deg,
                vec![
                    ("DLA limits", limits.min_dla_deg),
                    ("DLA limits", limits.max_dla_deg),
                ],
            ),
        ];
        // The day under the pointer (last frame's), above the plots so it is always in view.
        match self.hovered.and_then(|o| r.day(o)) {
            Some(day) => ui.label(day_line(day)),
            None => ui.label(
                RichText::new(
                    "Hover a day for its figures; click it to open its tour. Drag a plot to \
                     pan it, double-click to reset.",
                )
                .weak(),
            ),
        };
        let n = series.len();
        for (i, (label, value, lines)) in series.into_iter().enumerate() {
            // The day axis is shared (linked): its title under the last plot only.
            let x_title = if i + 1 == n {
                format!("launch day (days from {})", r.centre.to_date_utc())
            } else {
                String::new()
            };
            let resp = Plot::new(("launch-period", i))
                .height(h)
                // The page scrolls with the wheel; the plots pan by drag (double-click resets).
                .allow_scroll(false)
                .allow_zoom(false)
                .legend(Legend::default().position(egui_plot::Corner::RightTop))
                .link_axis(egui::Id::unique("launch-period-x"), [true, false])
                .link_cursor(egui::Id::unique("launch-period-x"), [true, false])
                .x_axis_label(x_title)
                .y_axis_label(label)
                .show(ui, |pl| {
                    let pts: Vec<[f64; 2]> = r.days.iter().map(|d| [x(d), value(d)]).collect();
                    let name = match i {
                        0 => "launch C3",
                        1 => "spacecraft Δv",
                        _ => "launch declination",
                    };
                    pl.line(
                        Line::new(name, PlotPoints::from(pts.clone()))
                            .color(style::leg_color(i))
                            .width(2.0),
                    );
                    pl.points(
                        Points::new("", PlotPoints::from(pts))
                            .radius(3.0)
                            .color(style::leg_color(i)),
                    );
                    let broken: Vec<[f64; 2]> = r
                        .days
                        .iter()
                        .filter(|d| !d.meets_every_limit())
                        .map(|d| [x(d), value(d)])
                        .collect();
                    if !broken.is_empty() {
                        pl.points(
                            Points::new("breaks a limit", PlotPoints::from(broken))
                                .shape(MarkerShape::Cross)
                                .radius(7.0)
                                .color(warn),
                        );
                    }
                    let jumps: Vec<[f64; 2]> = r
                        .days
                        .iter()
                        .filter(|d| !d.jumps.is_empty())
                        .map(|d| [x(d), value(d)])
                        .collect();
                    if !jumps.is_empty() {
                        pl.points(
                            Points::new("tour changed family", PlotPoints::from(jumps))
                                .shape(MarkerShape::Diamond)
                                .filled(false)
                                .radius(7.0)
                                .color(style::SUN),
                        );
                    }
                    for (name, v) in lines {
                        if let Some(v) = v {
                            pl.hline(
                                HLine::new(name, v)
                                    .color(warn)
                                    .style(LineStyle::dashed_loose()),
                            );
                        }
                    }
                    pl.pointer_coordinate().map(|p| p.x)
                });
            if let Some(px) = resp.inner {
                hovered = nearest(r, px / step);
            }
            clicked |= resp.response.clicked();
        }
        self.hovered = hovered;
        if let Some(day) = hovered.and_then(|o| r.day(o)).filter(|_| clicked) {
            open(day, out);
        }
    }
}

/// The day nearest launch-step offset `f`.
fn nearest(r: &PeriodResult, f: f64) -> Option<i64> {
    r.days
        .iter()
        .min_by(|a, b| {
            (a.offset as f64 - f)
                .abs()
                .total_cmp(&(b.offset as f64 - f).abs())
        })
        .map(|d| d.offset)
}

/// A day's figures in one line.
fn day_line(d: &PeriodDay) -> String {
    let limits = if d.meets_every_limit() {
        "meets every limit".to_string()
    } else {
        format!("breaks {}", d.broken_limits().join("; "))
    };
    format!(
        "day {:+} · launch {} · C3 {:.2} km²/s² · DLA {:.1}° · Δv {:.3} km/s · arrival {} at v∞ \
         {:.2} km/s · {limits}",
        d.offset,
        d.launch.to_date_utc(),
        d.c3_km2_s2,
        d.dla_deg,
        d.total_dv_km_s,
        d.arrival.to_date_utc(),
        d.arrival_vinf_km_s,
    )
}

/// Open a day's tour as the design: one undo step.
fn open(d: &PeriodDay, out: &mut Actions) {
    out.push(Action::Edit(Edit::Replace(Box::new(d.design.clone()))));
    out.push(Action::Status(
        format!(
            "opened the tour of launch day {:+} ({}); Undo returns to the design",
            d.offset,
            d.launch.to_date_utc()
        ),
        false,
    ));
}

/// The period's summary, in words; the days that break a limit in the warning colour.
fn summary(ui: &mut egui::Ui, vc: &ViewCtx<'_>, r: &PeriodResult) {
    for line in r.summary_lines() {
        ui.label(line);
    }
    if r.cancelled {
        ui.label(
            RichText::new("Cancelled: the days above are those that finished.")
                .color(style::warn_color(vc.dark)),
        );
    }
}

/// One row per day with its figures and a button that opens its tour.
fn table(ui: &mut egui::Ui, vc: &ViewCtx<'_>, r: &PeriodResult, out: &mut Actions) {
    ui.separator();
    egui::Grid::new("period-days")
        .striped(true)
        .num_columns(8)
        .show(ui, |ui| {
            // The button first: the limits column can be long.
            for h in [
                "",
                "day",
                "launch (UTC)",
                "C3 (km²/s²)",
                "DLA (°)",
                "Δv (km/s)",
                "arrival (UTC)",
                "limits",
            ] {
                ui.label(RichText::new(h).strong());
            }
            ui.end_row();
            for d in &r.days {
                if ui
                    .small_button("open")
                    .on_hover_text("Open this day's tour as the design (Undo returns)")
                    .clicked()
                {
                    open(d, out);
                }
                ui.label(format!("{:+}", d.offset));
                ui.label(d.launch.to_date_utc());
                ui.label(format!("{:.2}", d.c3_km2_s2));
                ui.label(format!("{:.1}", d.dla_deg));
                ui.label(format!("{:.3}", d.total_dv_km_s));
                ui.label(d.arrival.to_date_utc());
                if d.meets_every_limit() {
                    let mut t = "met".to_string();
                    if !d.jumps.is_empty() {
                        t.push_str(" · family changed");
                    }
                    ui.label(t);
                } else {
                    ui.label(
                        RichText::new(d.broken_limits().join("; "))
                            .color(style::error_color(vc.dark)),
                    );
                }
                ui.end_row();
            }
        });
}
