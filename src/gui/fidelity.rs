//! Fidelity: the n-body check of the open design as a background job (progress, cancel), with a
//! table per encounter. The Sun view draws the n-body arcs over the patched-conic ones while the
//! result belongs to the current revision.

use eframe::egui::{self, RichText};

use super::action::{Action, Actions, JobKind, JobRequest};
use super::app::ViewCtx;

/// The view's own state.
#[derive(Default)]
pub struct FidelityView;

impl FidelityView {
    /// Draw the view.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let mut out = Vec::new();
        let running = vc.jobs.progress_of(JobKind::Fidelity);
        ui.horizontal(|ui| {
            let can = vc.tour.is_some() && vc.eval.complete && running.is_none();
            if ui
                .add_enabled(can, egui::Button::new("Run n-body check"))
                .on_hover_text(
                    "Propagate every leg from its departure state under the Sun and the other \
                     planets as point masses (each silent inside its sphere of influence), and \
                     measure the miss at each encounter",
                )
                .clicked()
            {
                out.push(Action::StartJob(JobRequest::Fidelity));
            }
            if let Some(p) = running {
                ui.add(
                    egui::ProgressBar::new(p.fraction())
                        .desired_width(160.0)
                        .show_percentage(),
                );
                if ui.small_button("cancel").clicked() {
                    out.push(Action::CancelJobs(JobKind::Fidelity));
                }
            }
        });
        ui.label(
            RichText::new(
                "Integrator: Dormand-Prince 8(5,3), relative tolerance 1e-12, absolute 1e-8 \
                 (km, km/s). B-plane axes from the patched-conic incoming v∞ (T in the ecliptic).",
            )
            .weak(),
        );
        let Some(f) = vc.jobs.fidelity.as_ref() else {
            ui.label("Run the check to see how far the tour drifts under the planets' pull.");
            return out;
        };
        if f.revision != vc.revision {
            ui.label(
                RichText::new("(for an earlier version of the design; run again to update)").weak(),
            );
        }
        ui.label(format!(
            "Perturbing bodies: {} — each leg leaves out its own departure and arrival bodies, \
             whose pull the patched-conic hyperbolas already model.",
            f.value.bodies.join(", ")
        ));
        ui.add_space(4.0);
        egui::Grid::new("fidelity")
            .striped(true)
            .num_columns(9)
            .show(ui, |ui| {
                for h in [
                    "leg",
                    "to",
                    "miss (km)",
                    "conic miss (km)",
                    "B·T (km)",
                    "B·R (km)",
                    "along v∞ (km)",
                    "Δv∞ (m/s)",
                    "correction (m/s)",
                ] {
                    ui.label(RichText::new(h).strong());
                }
                ui.end_row();
                for c in &f.value.encounters {
                    ui.label(format!("{}", c.leg + 1));
                    ui.label(&c.body);
                    ui.label(format!("{:.0}", c.miss_km));
                    ui.label(format!("{:.0}", c.conic_miss_km));
                    ui.label(format!("{:.0}", c.b_t_km));
                    ui.label(format!("{:.0}", c.b_r_km));
                    ui.label(format!("{:.0}", c.along_s_km));
                    ui.label(format!("{:.2}", c.dvinf_km_s * 1e3));
                    ui.label(
                        c.correction_dv_km_s
                            .map(|v| format!("{:.2}", v * 1e3))
                            .unwrap_or_else(|| "did not converge".into()),
                    );
                    ui.end_row();
                }
            });
        ui.add_space(6.0);
        ui.label(
            RichText::new(
                "The correction is the departure Δv that brings the n-body arc onto the body \
                 at the stop's epoch. Preliminary design only: confirm in high-fidelity tools.",
            )
            .weak(),
        );
        out
    }
}
