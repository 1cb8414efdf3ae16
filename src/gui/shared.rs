//! Pieces several views share: switching a swing-by to shaped from its current geometry, the
//! miss distance with the retarget buttons, and a background job's button, progress and cancel.

use eframe::egui::{self, RichText};

use tourwright_mission::design::SwingbyMode;
use tourwright_mission::{Edit, rules};

use super::action::{Action, Actions, JobKind, JobRequest};
use super::context::ViewCtx;
use super::style;

/// The edit that switches stop `k` to shaped, starting from the altitude and aim it has now (or
/// 10 000 km and 0° when it has none).
pub fn shaped_from_current(vc: &ViewCtx<'_>, k: usize) -> Edit {
    let sw = vc.eval.stops.get(k).and_then(|s| s.swingby);
    let altitude_km = sw.and_then(|s| s.altitude_km).unwrap_or(10_000.0);
    let aim_deg = sw
        .and_then(|s| s.bplane)
        .map(|b| b.aim.to_degrees())
        .unwrap_or(0.0);
    Edit::SetSwingbyMode {
        stop: k,
        mode: SwingbyMode::Shaped {
            altitude_km,
            aim_deg,
        },
    }
}

/// The miss distance of a shaped swing-by and the retarget buttons.
pub fn retarget_row(ui: &mut egui::Ui, vc: &ViewCtx<'_>, k: usize, out: &mut Actions) {
    let miss = vc
        .eval
        .stops
        .get(k)
        .and_then(|s| s.swingby)
        .and_then(|s| s.miss_km);
    ui.horizontal_wrapped(|ui| {
        if let Some(m) = miss {
            let tol = vc.tour.and_then(|t| t.stops.get(k)).map(|s| s.max_miss_km);
            let txt = format!("misses the next body by {} km", style::fixed(m, 0));
            if tol.is_some_and(|t| rules::misses(m, t)) {
                ui.label(RichText::new(format!("! {txt}")).color(style::warn_color(vc.dark)));
            } else {
                ui.label(txt);
            }
        }
        for (label, move_epoch) in [("Retarget", false), ("Retarget + move date", true)] {
            if ui
                .small_button(label)
                .on_hover_text(
                    "Adjust altitude and aim (and the next date) so the ballistic leg meets the \
                     next body",
                )
                .clicked()
            {
                out.push(Action::Retarget {
                    stop: k,
                    move_epoch,
                });
            }
        }
    });
}

/// A job's button (enabled when the design evaluates and no such job runs), its progress bar and
/// its cancel button.
#[allow(clippy::too_many_arguments)]
pub fn job_row(
    ui: &mut egui::Ui,
    vc: &ViewCtx<'_>,
    kind: JobKind,
    request: JobRequest,
    label: &str,
    hover: &str,
    out: &mut Actions,
) {
    let running = vc.jobs.progress_of(kind);
    ui.horizontal_wrapped(|ui| {
        let can = vc.tour.is_some() && vc.eval.complete && running.is_none();
        if ui
            .add_enabled(can, egui::Button::new(label))
            .on_hover_text(hover)
            .clicked()
        {
            out.push(Action::StartJob(request));
        }
        if let Some(p) = running {
            ui.add(
                egui::ProgressBar::new(p.fraction())
                    .desired_width(160.0)
                    .show_percentage(),
            );
            if ui.small_button("cancel").clicked() {
                out.push(Action::CancelJobs(kind));
            }
        }
    });
}
