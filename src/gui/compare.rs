//! Direct vs assist: the best direct transfer in the launch period against the tour, as a table,
//! a sentence and a small chart. Computed as a background job and kept for the design revision.

use eframe::egui::{self, RichText};
use egui_plot::{Bar, BarChart, Legend, Plot};

use crate::search::Job;
use crate::search::direct::{self, DirectOptions, Measure};

use super::app::{GuiJob, TourwrightApp};
use super::style;

/// Options shown in the view.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DirectUi {
    /// Measure chosen.
    pub measure: Option<Measure>,
    /// Launch period half-width, days.
    pub window_days: f64,
}

impl Default for DirectUi {
    fn default() -> Self {
        DirectUi {
            measure: None,
            window_days: 365.25,
        }
    }
}

impl TourwrightApp {
    /// Start the comparison job for the current design.
    pub fn start_direct(&mut self) {
        let d = self.doc.design.clone();
        let rev = self.doc.revision();
        let mut o = DirectOptions::for_design(&d);
        if let Some(m) = self.search.direct.measure {
            o.measure = if m == Measure::DeliveredMass && d.launch_vehicle.is_none() {
                Measure::TotalDv
            } else {
                m
            };
        }
        o.window_days = self.search.direct.window_days;
        self.jobs.retain(|j| {
            if let GuiJob::Direct(job, _) = j {
                job.progress.cancel();
                false
            } else {
                true
            }
        });
        self.jobs.push(GuiJob::Direct(
            Job::spawn("direct transfer search", move |_p| direct::compare(&d, &o)),
            rev,
        ));
    }

    /// The Direct vs assist view.
    pub fn direct_view(&mut self, ui: &mut egui::Ui) {
        let rev = self.doc.revision();
        let running = self.jobs.iter().any(|j| matches!(j, GuiJob::Direct(..)));
        let stale = self.direct.as_ref().is_none_or(|(_, r)| *r != rev);
        if stale && !running && !self.doc.in_gesture() && self.eval.complete {
            self.start_direct();
        }
        ui.horizontal(|ui| {
            ui.label("Rank direct transfers by");
            let mut m =
                self.search
                    .direct
                    .measure
                    .unwrap_or(if self.doc.design.launch_vehicle.is_some() {
                        Measure::DeliveredMass
                    } else {
                        Measure::TotalDv
                    });
            let before = m;
            for x in [Measure::TotalDv, Measure::DeliveredMass, Measure::C3] {
                ui.selectable_value(&mut m, x, x.label());
            }
            let r = super::style::labelled(
                ui,
                "launch period ±",
                egui::DragValue::new(&mut self.search.direct.window_days)
                    .range(10.0..=1500.0)
                    .suffix(" d"),
            );
            if m != before || r.drag_stopped() || r.lost_focus() {
                self.search.direct.measure = Some(m);
                self.direct = None;
            }
            if running {
                ui.spinner();
                ui.label("searching…");
            }
        });
        // Taken out of `self` for drawing (no per-frame copy of two evaluations), put back below.
        let Some((c, r)) = self.direct.take() else {
            ui.label("The comparison appears here once the search finishes.");
            return;
        };
        let open = direct_result(ui, &c, r != rev, &self.doc.design.sequence_label());
        let direct = c.direct.clone();
        self.direct = Some((c, r));
        if open {
            self.request(super::app::Pending::Replace(Box::new(direct)));
        }
    }
}

/// The comparison table, sentence and chart; true when "open as a design" was clicked.
fn direct_result(
    ui: &mut egui::Ui,
    c: &crate::search::direct::DirectComparison,
    stale: bool,
    tour_sequence: &str,
) -> bool {
    let mut open = false;
    if stale {
        ui.label(RichText::new("(for an earlier version of the design; updating)").weak());
    }
    let (t, dd) = (&c.tour_eval, &c.direct_eval);
    ui.label(RichText::new(c.summary()).heading());
    egui::Grid::new("dva")
        .striped(true)
        .num_columns(4)
        .show(ui, |ui| {
            for h in ["", "tour", "direct", "tour − direct"] {
                ui.label(RichText::new(h).strong());
            }
            ui.end_row();
            ui.label("sequence");
            ui.label(tour_sequence);
            ui.label(c.direct.sequence_label());
            ui.label("");
            ui.end_row();
            ui.label("launch (UTC)");
            ui.label(t.stops[0].epoch.to_date_utc());
            ui.label(dd.stops[0].epoch.to_date_utc());
            ui.label("");
            ui.end_row();
            let mut row = |name: &str, a: f64, b: f64, p: usize| {
                ui.label(name);
                ui.label(format!("{a:.p$}"));
                ui.label(format!("{b:.p$}"));
                ui.label(format!("{:+.p$}", a - b));
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
            "Hohmann between circular coplanar orbits: v∞ {:.3} km/s out, {:.3} km/s in, {:.0} days (idealised reference).",
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
