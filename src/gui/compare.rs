//! Direct vs assist: the best direct transfer in the launch period against the tour, as a table,
//! a sentence and a small chart. Computed as a background job for the current design revision.

use eframe::egui::{self, RichText};
use egui_plot::{Bar, BarChart, Legend, Plot};

use tourwright_mission::Objective;
use tourwright_search::direct::{DirectComparison, DirectOptions};

use super::action::{Action, Actions, JobKind, JobRequest, Pending};
use super::context::ViewCtx;
use super::style;

/// Options shown in the view.
pub struct DirectView {
    /// Measure chosen (None: the design's default).
    pub measure: Option<Objective>,
    /// Launch period half-width, days.
    pub window_days: f64,
    /// The revision a job was last requested for (so a failed search is not restarted every
    /// frame).
    requested: Option<u64>,
}

impl Default for DirectView {
    fn default() -> Self {
        DirectView {
            measure: None,
            window_days: 365.25,
            requested: None,
        }
    }
}

impl DirectView {
    fn request(&self, vc: &ViewCtx<'_>) -> JobRequest {
        let d = vc.design;
        let mut o = DirectOptions::for_design(d);
        if let Some(m) = self.measure {
            o.measure = if m.needs_vehicle() && d.launch_vehicle.is_none() {
                Objective::TotalDvWithLaunchVinf
            } else {
                m
            };
        }
        o.window_days = self.window_days;
        JobRequest::Direct(o)
    }

    /// Draw the view.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let mut out = Vec::new();
        let running = vc.jobs.is_running(JobKind::Direct);
        let current = vc.jobs.direct.as_ref();
        let stale = current.is_none_or(|c| c.revision != vc.revision);
        if stale
            && !running
            && !vc.in_gesture
            && vc.eval.complete
            && self.requested != Some(vc.revision)
        {
            self.requested = Some(vc.revision);
            out.push(Action::StartJob(self.request(vc)));
        }
        ui.horizontal_wrapped(|ui| {
            ui.label("Rank direct transfers by");
            let default = if vc.design.launch_vehicle.is_some() {
                Objective::DeliveredMass
            } else {
                Objective::TotalDvWithLaunchVinf
            };
            let mut m = self.measure.unwrap_or(default);
            let before = m;
            for x in [
                Objective::TotalDvWithLaunchVinf,
                Objective::DeliveredMass,
                Objective::LaunchC3,
            ] {
                ui.selectable_value(&mut m, x, x.label());
            }
            let r = style::labelled(
                ui,
                "launch period ±",
                egui::DragValue::new(&mut self.window_days)
                    .range(10.0..=1500.0)
                    .suffix(" d"),
            );
            if m != before || r.drag_stopped() || r.lost_focus() {
                self.measure = Some(m);
                out.push(Action::StartJob(self.request(vc)));
            }
            if running {
                ui.spinner();
                ui.label("searching…");
                if ui.small_button("cancel").clicked() {
                    out.push(Action::CancelJobs(JobKind::Direct));
                }
            }
        });
        let Some(c) = current else {
            ui.label("The comparison appears here once the search finishes.");
            return out;
        };
        if direct_result(ui, &c.value, c.revision != vc.revision) {
            out.push(Action::Request(Pending::Replace(Box::new(
                c.value.direct.clone(),
            ))));
        }
        out
    }
}

/// The comparison table, sentence and chart; true when "open as a design" was clicked.
fn direct_result(ui: &mut egui::Ui, c: &DirectComparison, stale: bool) -> bool {
    let mut open = false;
    if stale {
        ui.label(RichText::new("(for an earlier version of the design; updating)").weak());
    }
    let (t, dd) = (&c.tour_eval, &c.direct_eval);
    if let Some(note) = c.limits_note() {
        ui.label(RichText::new(note).color(super::style::warn_color(ui.visuals().dark_mode)));
    }
    // The headline compares with a direct transfer that breaks a launch limit: say so in it.
    let headline = match c.limits_note() {
        Some(_) => format!(
            "{} (that direct transfer breaks the design's launch limits)",
            c.summary().trim_end_matches('.')
        ),
        None => c.summary(),
    };
    ui.label(RichText::new(headline).heading());
    egui::Grid::new("dva")
        .striped(true)
        .num_columns(4)
        .show(ui, |ui| {
            for h in ["", "tour", "direct", "tour − direct"] {
                ui.label(RichText::new(h).strong());
            }
            ui.end_row();
            ui.label("sequence");
            ui.label(c.tour.sequence_label());
            ui.label(c.direct_tour.sequence_label());
            ui.label("");
            ui.end_row();
            ui.label("launch (UTC)");
            ui.label(
                t.stops
                    .first()
                    .map(|s| s.epoch.to_date_utc())
                    .unwrap_or_default(),
            );
            ui.label(
                dd.stops
                    .first()
                    .map(|s| s.epoch.to_date_utc())
                    .unwrap_or_default(),
            );
            ui.label("");
            ui.end_row();
            let mut row = |name: &str, a: f64, b: f64, p: usize| {
                ui.label(name);
                ui.label(style::fixed(a, p));
                ui.label(style::fixed(b, p));
                ui.label(match tourwright_mission::rules::shown(a - b) {
                    Some(v) => format!("{v:+.p$}"),
                    None => "—".into(),
                });
                ui.end_row();
            };
            row(
                "time of flight (days)",
                t.total_tof_days(),
                dd.total_tof_days(),
                1,
            );
            row("launch C3 (km²/s²)", t.launch.c3, dd.launch.c3, 2);
            row("arrival v∞ (km/s)", t.arrival.vinf, dd.arrival.vinf, 3);
            row(
                "spacecraft Δv (km/s)",
                t.ledger.total_dv_km_s,
                dd.ledger.total_dv_km_s,
                3,
            );
            row(
                "launch v∞ + Δv (km/s)",
                t.launch.vinf + t.ledger.total_dv_km_s,
                dd.launch.vinf + dd.ledger.total_dv_km_s,
                3,
            );
            if let (Some(a), Some(b)) = (t.ledger.delivered_mass_kg, dd.ledger.delivered_mass_kg) {
                row("delivered mass (kg)", a, b, 0);
            }
        });
    let h = &c.hohmann;
    ui.label(format!(
        "Hohmann between circular coplanar orbits: v∞ {:.3} km/s out, {:.3} km/s in, {:.0} days \
         (idealised reference).",
        h.vinf_depart, h.vinf_arrive, h.tof_days
    ));
    if ui.button("Open the direct transfer as a design").clicked() {
        open = true;
    }
    let ta = t.total_tof_days() / 365.25;
    let tb = dd.total_tof_days() / 365.25;
    let (ma, mb, unit) = match (t.ledger.delivered_mass_kg, dd.ledger.delivered_mass_kg) {
        (Some(a), Some(b)) => (a / 1000.0, b / 1000.0, "delivered mass (t)"),
        _ => (
            t.launch.vinf + t.ledger.total_dv_km_s,
            dd.launch.vinf + dd.ledger.total_dv_km_s,
            "launch v∞ + Δv (km/s)",
        ),
    };
    Plot::new("dva-chart")
        // Inside a scrolling page: the wheel scrolls the page.
        .allow_scroll(false)
        .allow_zoom(false)
        .height((ui.available_height() - 24.0).clamp(120.0, 260.0))
        .legend(Legend::default())
        .show_axes([false, true])
        .show(ui, |pl| {
            pl.bar_chart(
                BarChart::new(
                    "tour",
                    vec![
                        Bar::new(0.0, ta).name("TOF (years)"),
                        Bar::new(2.0, ma).name(unit),
                    ],
                )
                .color(style::leg_color(0))
                .width(0.7),
            );
            pl.bar_chart(
                BarChart::new(
                    "direct",
                    vec![
                        Bar::new(0.8, tb).name("TOF (years)"),
                        Bar::new(2.8, mb).name(unit),
                    ],
                )
                .color(style::leg_color(1))
                .width(0.7),
            );
        });
    ui.label(
        RichText::new(format!(
            "left pair: time of flight (years) · right pair: {unit}"
        ))
        .weak(),
    );
    open
}
