//! Dialogs: the error box, the unsaved-changes question, the typed-path prompt (when no native
//! file dialog is available) and the help window. Their answers are actions.

use std::path::PathBuf;

use eframe::egui::{self, Key};

use super::action::{Action, Actions, PathPurpose, Pending};
use super::context::ViewCtx;

/// Open dialogs and their state.
#[derive(Default)]
pub struct Dialogs {
    /// An error shown in a dialog (e.g. a broken file).
    pub error: Option<String>,
    /// An action waiting for consent to drop unsaved changes.
    pub confirm: Option<Pending>,
    /// A typed-path prompt (purpose, text).
    pub path_prompt: Option<(PathPurpose, String)>,
    /// Help window open (title).
    pub help: Option<&'static str>,
    /// Text to put on the clipboard at the end of the frame.
    pub clipboard: Option<String>,
    /// What to do once a save that is waiting for a path has succeeded.
    pub after_save: Option<Pending>,
    /// Autosaves an unclean exit left, offered for recovery.
    pub recovery: Vec<super::autosave::Recovered>,
    /// The typed-path prompt already shown (its text field gets the focus when it opens).
    prompt_shown: Option<PathPurpose>,
}

impl Dialogs {
    /// Draw the open dialogs.
    pub fn ui(&mut self, ctx: &egui::Context, vc: &ViewCtx<'_>, frame_ms: f32) -> Actions {
        let mut out = Vec::new();
        if let Some(msg) = &self.error {
            egui::Modal::new(egui::Id::unique("error")).show(ctx, |ui| {
                ui.set_max_width(520.0);
                ui.heading("Cannot do that");
                ui.label(msg.as_str());
                if ui.button("OK").clicked() {
                    out.push(Action::DismissError);
                }
            });
        }
        if let Some(action) = &self.confirm {
            egui::Modal::new(egui::Id::unique("confirm")).show(ctx, |ui| {
                ui.heading("Unsaved changes");
                ui.label(format!(
                    "“{}” has changes that are not saved.",
                    vc.design.name
                ));
                ui.horizontal(|ui| {
                    if ui.button("Save first").clicked() {
                        out.push(Action::SaveThen(action.clone()));
                    }
                    if ui.button("Discard changes").clicked() {
                        out.push(Action::Perform(action.clone()));
                    }
                    if ui.button("Cancel").clicked() {
                        out.push(Action::CancelPending);
                    }
                });
            });
        }
        if !self.recovery.is_empty() {
            egui::Modal::new(egui::Id::unique("recovery")).show(ctx, |ui| {
                ui.set_max_width(620.0);
                ui.heading("Restore unsaved work?");
                ui.label(
                    "The workbench did not close cleanly last time. These designs were saved \
                     automatically:",
                );
                egui::Grid::new("recovery-grid")
                    .num_columns(5)
                    .striped(true)
                    .show(ui, |ui| {
                        for (i, r) in self.recovery.iter().enumerate() {
                            ui.label(egui::RichText::new(&r.name).strong());
                            ui.label(&r.saved_at);
                            ui.label(
                                r.original
                                    .as_ref()
                                    .map(|p| p.display().to_string())
                                    .unwrap_or_else(|| "(never saved)".into()),
                            );
                            if ui.button(format!("Restore {}", r.name)).clicked() {
                                out.push(Action::Recover(i, true));
                            }
                            if ui.button(format!("Discard {}", r.name)).clicked() {
                                out.push(Action::Recover(i, false));
                            }
                            ui.end_row();
                        }
                    });
            });
        }
        if self.path_prompt.is_none() {
            self.prompt_shown = None;
        }
        if let Some((purpose, text)) = &mut self.path_prompt {
            let purpose = *purpose;
            egui::Modal::new(egui::Id::unique("path")).show(ctx, |ui| {
                ui.heading(match purpose {
                    PathPurpose::Open => "Open a design file",
                    PathPurpose::SaveAs => "Save the design as",
                    PathPurpose::Kernel => "Use a JPL SPK kernel (.bsp)",
                    _ => "Export to",
                });
                let lab = ui.label("Type a path (no native file dialog is in use):");
                let r = ui
                    .add(egui::TextEdit::singleline(text).desired_width(480.0))
                    .labelled_by(lab.id);
                if self.prompt_shown != Some(purpose) {
                    // Just opened: the path can be typed at once.
                    r.request_focus();
                    self.prompt_shown = Some(purpose);
                }
                let enter = r.lost_focus() && ui.input(|i| i.key_pressed(Key::Enter));
                ui.horizontal(|ui| {
                    if ui.button("OK").clicked() || enter {
                        out.push(Action::PathChosen(purpose, PathBuf::from(text.trim())));
                    }
                    if ui.button("Cancel").clicked() {
                        out.push(Action::ClosePathPrompt);
                    }
                });
            });
        }
        if let Some(topic) = self.help {
            let mut open = true;
            egui::Window::new(topic)
                .open(&mut open)
                .default_width(520.0)
                .show(ctx, |ui| {
                    ui.label(help_text(topic, frame_ms));
                });
            if !open {
                out.push(Action::CloseHelp);
            }
        }
        out
    }
}

/// Text of the help topics.
pub fn help_text(topic: &str, frame_ms: f32) -> String {
    match topic {
        "Units and conventions" => "Distances km (Sun view in AU, 1 AU = 149 597 870.7 km), speeds km/s, C3 km²/s², \
energies km²/s² (heliocentric specific energy v²/2 − μ/r, μ of the Sun), angles degrees, masses kg, times days.\n\n\
Frame: heliocentric ecliptic and equinox of J2000. Epochs are kept in TDB and shown as UTC dates \
(leap seconds from the IERS table carried by hifitime); MJD2000 counts days from 2000-01-01 00:00 TDB. \
Design files keep each date in the scale it was written in, to the nanosecond.\n\n\
Ephemeris: JPL approximate Keplerian elements (Standish, 1800-2050); Earth is the Earth-Moon barycentre.\n\n\
Swing-bys: patched conics. v∞ is the hyperbolic excess velocity relative to the planet; the turn angle \
δ = 2 asin(1/e) with e = 1 + r_p v∞²/μ. A targeted swing-by is what the stop dates make it (powered at \
periapsis when |v∞ in| ≠ |v∞ out|); a shaped one is set by periapsis altitude and B-plane aim angle \
(measured from T towards R, T = S × ecliptic north), and the next leg is flown ballistically.\n\n\
Launch: DLA and RLA are the declination and right ascension of the outgoing asymptote in the Earth \
mean equator of J2000.".into(),
        "Keyboard shortcuts" => "Ctrl+N new · Ctrl+O open · Ctrl+S save · Ctrl+Shift+S save as\n\
Ctrl+Z undo · Ctrl+Shift+Z (or Ctrl+Y) redo\n\
Sun view and Window map: scroll to zoom, drag to pan, double-click to reset.\n\
Swing-by lens: drag the periapsis handle to change the altitude, drag around the aim dial to turn the aim.".into(),
        "Preliminary-design caution" => tourwright_mission::CAUTION.into(),
        _ => format!(
            "Tourwright {} — a workbench for gravity-assist tours.\n\nEngine: Izzo's Lambert solver, \
universal-variable Kepler propagation, patched-conic swing-bys, self-adaptive differential evolution.\n\n\
Frame build time (smoothed): {frame_ms:.2} ms.\n\n{}",
            tourwright_mission::VERSION,
            tourwright_mission::CAUTION
        ),
    }
}
