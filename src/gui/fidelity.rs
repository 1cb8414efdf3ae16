//! Fidelity: the n-body check of the open design as a background job (progress, cancel), with a
//! table per encounter. The Sun view draws the n-body arcs over the patched-conic ones while the
//! result belongs to the current revision.

use eframe::egui::{self, RichText};

use super::action::{Actions, JobKind, JobRequest};
use super::context::ViewCtx;
use super::shared;

/// The view's own state.
#[derive(Default)]
pub struct FidelityView;

impl FidelityView {
    /// Draw the view.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let mut out = Vec::new();
        egui::ScrollArea::vertical()
            .auto_shrink([false, false])
            .show(ui, |ui| {
                continuous_ui(ui, vc, &mut out);
                ui.separator();
                ui.label(RichText::new("Leg-by-leg check").strong());
                self.check_ui(ui, vc, &mut out);
            });
        out
    }

    /// The leg-by-leg check (each leg from its patched-conic departure state).
    fn check_ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>, out: &mut Actions) {
        shared::job_row(
            ui,
            vc,
            JobKind::Fidelity,
            JobRequest::Fidelity,
            "Run n-body check",
            "Propagate every leg from its departure state under the Sun and the other planets as \
             point masses (each silent inside its sphere of influence), and measure the miss at \
             each encounter",
            out,
        );
        ui.label(
            RichText::new(
                "Integrator: Dormand-Prince 8(5,3), relative tolerance 1e-12, absolute 1e-8 \
                 (km, km/s). B-plane axes from the patched-conic incoming v∞ (T in the ecliptic).",
            )
            .weak(),
        );
        let Some(f) = vc.jobs.fidelity.as_ref() else {
            ui.label("Run the check to see how far the tour drifts under the planets' pull.");
            return;
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
    }
}

/// The continuous trajectory: run it, its verdict, its encounters and impulses.
fn continuous_ui(ui: &mut egui::Ui, vc: &ViewCtx<'_>, out: &mut Actions) {
    ui.label(RichText::new("Continuous n-body trajectory").strong());
    shared::job_row(
        ui,
        vc,
        JobKind::Continuous,
        JobRequest::Continuous,
        "Converge trajectory",
        "Multiple shooting: one continuous trajectory through every swing-by under the Sun and \
         the planets (and the Moon, with a kernel) as point masses; periapsis nodes at each stop, \
         manoeuvres as impulses",
        out,
    );
    let Some(c) = vc.jobs.continuous.as_ref() else {
        ui.label(
            "Converge the tour into one n-body trajectory to see the encounters, impulses and \
             Δv it really takes.",
        );
        return;
    };
    if c.revision != vc.revision {
        ui.label(
            RichText::new("(for an earlier version of the design; run again to update)").weak(),
        );
    }
    let c = &c.value;
    if ui
        .small_button("Copy report")
        .on_hover_text("The continuous trajectory's report as text (as the command line prints it)")
        .clicked()
    {
        let name = vc.design.name.clone();
        ui.ctx()
            .copy_text(tourwright_mission::continuous::summary_text(&name, c, 0.0));
    }
    let verdict = RichText::new(c.verdict());
    ui.label(if c.converged {
        verdict.color(super::style::nbody_color(ui.visuals().dark_mode))
    } else {
        verdict.color(ui.visuals().warn_fg_color)
    });
    for n in &c.notes {
        ui.label(RichText::new(format!("Note: {n}.")).color(ui.visuals().warn_fg_color));
    }
    ui.label(
        RichText::new(format!(
            "Model: the Sun and {} as point masses; {}; GM values {}; ephemeris {}.",
            c.model
                .bodies
                .iter()
                .filter(|b| b.gm_km3_s2 > 0.0)
                .map(|b| b.name.as_str())
                .collect::<Vec<_>>()
                .join(", "),
            c.model.earth_moon,
            c.model.gm_set,
            c.model.ephemeris
        ))
        .weak(),
    );
    let km = |v: Option<f64>| v.map_or("—".to_string(), |x| format!("{x:.0}"));
    egui::Grid::new("continuous")
        .striped(true)
        .num_columns(8)
        .show(ui, |ui| {
            for h in [
                "stop",
                "periapsis (UTC)",
                "shift (h)",
                "altitude (km)",
                "designed (km)",
                "B·T (km)",
                "B·R (km)",
                "v∞ (km/s)",
            ] {
                ui.label(RichText::new(h).strong());
            }
            ui.end_row();
            for e in &c.encounters {
                ui.label(format!("{} {} ({})", e.stop + 1, e.body, e.role));
                ui.label(&e.epoch);
                ui.label(format!("{:+.1}", e.epoch_shift_s / 3600.0));
                ui.label(km(e.altitude_km));
                ui.label(km(e.designed_altitude_km));
                ui.label(km(e.b_t_km));
                ui.label(km(e.b_r_km));
                ui.label(format!("{:.3} ({:.3})", e.vinf_km_s, e.designed_vinf_km_s));
                ui.end_row();
            }
        });
    ui.add_space(4.0);
    ui.label(format!(
        "Launch C3 {:.3} km²/s² (patched conics {:.3}). Total Δv {:.3} km/s (patched conics {:.3}).",
        c.launch_c3, c.designed_launch_c3, c.total_dv_km_s, c.designed_total_dv_km_s
    ));
    for i in &c.impulses {
        ui.label(format!(
            "• {}: {:.4} km/s on {} (patched conics {:.4})",
            i.what, i.magnitude_km_s, i.epoch, i.designed_km_s
        ));
    }
    ui.label(
        RichText::new(
            "Export it with File › Export › Continuous n-body trajectory (CCSDS OEM). \
             Preliminary design only: confirm in high-fidelity tools.",
        )
        .weak(),
    );
}
