//! The status bar: warnings, the last message, the ephemeris model in use, running jobs with
//! progress and cancel, and the frame-build time.

use eframe::egui::{self, Color32, RichText};

use super::action::{Action, Actions};
use super::context::ViewCtx;
use super::style;

/// Draw the status bar.
pub fn status_bar(
    ui: &mut egui::Ui,
    vc: &ViewCtx<'_>,
    status: Option<&(String, bool)>,
    out: &mut Actions,
) {
    ui.horizontal(|ui| {
        let n = vc.eval.warnings.len();
        if n == 0 {
            ui.label(RichText::new("no warnings").color(Color32::from_rgb(0x4C, 0xAF, 0x7A)));
        } else {
            ui.label(
                RichText::new(format!(
                    "! {n} warning{}: {}",
                    if n > 1 { "s" } else { "" },
                    vc.eval.warnings[0]
                ))
                .color(style::warn_color(vc.dark)),
            );
        }
        if let Some((m, err)) = status {
            ui.separator();
            ui.label(if *err {
                RichText::new(m).color(style::error_color(vc.dark))
            } else {
                RichText::new(m)
            });
        }
        ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
            if let Some(t) = vc.tour {
                ui.label(RichText::new(format!("ephemeris: {}", t.ephemeris_name)).weak());
            }
            for r in &vc.jobs.running {
                let p = r.progress();
                if ui
                    .small_button("x")
                    .on_hover_text("Cancel this job")
                    .clicked()
                {
                    out.push(Action::CancelJobs(r.kind));
                }
                let best = p.best();
                let text = if best.is_finite() {
                    format!("{}: best {best:.4}", r.kind.label())
                } else {
                    r.kind.label().to_string()
                };
                ui.add(
                    egui::ProgressBar::new(p.fraction())
                        .desired_width(160.0)
                        .text(text),
                );
            }
        });
    });
}
