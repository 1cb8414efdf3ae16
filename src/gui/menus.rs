//! The menu bar and the keyboard shortcuts. Both only produce actions, the same ones the buttons
//! produce, so a menu entry and its shortcut take one path.

use eframe::egui::{self, Key, KeyboardShortcut, Modifiers};

use super::action::{Action, Actions, PathPurpose, Pending, SettingsChange, View};
use super::context::Settings;
use super::samples::SAMPLES;

/// Help topics in the Help menu.
pub const HELP_TOPICS: [&str; 4] = [
    "Units and conventions",
    "Keyboard shortcuts",
    "Preliminary-design caution",
    "About Tourwright",
];

/// The shortcuts pressed this frame, as actions.
pub fn shortcuts(ctx: &egui::Context) -> Actions {
    let cmd = Modifiers::COMMAND;
    let cmd_shift = Modifiers::COMMAND | Modifiers::SHIFT;
    let mut out = Vec::new();
    ctx.input_mut(|i| {
        // The longer combination first, so that Ctrl+Shift+Z is not read as Ctrl+Z.
        if i.consume_shortcut(&KeyboardShortcut::new(cmd_shift, Key::Z))
            || i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::Y))
        {
            out.push(Action::Redo);
        }
        if i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::Z)) {
            out.push(Action::Undo);
        }
        if i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::N)) {
            out.push(Action::Request(Pending::New));
        }
        if i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::O)) {
            out.push(Action::Request(Pending::Open(None)));
        }
        if i.consume_shortcut(&KeyboardShortcut::new(cmd_shift, Key::S)) {
            out.push(Action::SaveAs);
        }
        if i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::S)) {
            out.push(Action::Save);
        }
    });
    out
}

/// The menu bar.
pub fn menu_bar(
    ui: &mut egui::Ui,
    settings: &Settings,
    can_undo: bool,
    can_redo: bool,
    out: &mut Actions,
) {
    egui::MenuBar::new().ui(ui, |ui| {
        ui.menu_button("File", |ui| {
            let mut item = |ui: &mut egui::Ui, label: &str, a: Action| {
                if ui.button(label).clicked() {
                    out.push(a);
                    ui.close();
                }
            };
            item(ui, "New          Ctrl+N", Action::Request(Pending::New));
            item(
                ui,
                "Open…        Ctrl+O",
                Action::Request(Pending::Open(None)),
            );
            ui.menu_button("Open sample", |ui| {
                for (i, (name, _)) in SAMPLES.iter().enumerate() {
                    item(ui, name, Action::Request(Pending::Sample(i)));
                }
            });
            ui.menu_button("Recent", |ui| {
                if settings.recent.is_empty() {
                    ui.label("(none yet)");
                }
                for p in &settings.recent {
                    item(
                        ui,
                        &p.to_string_lossy(),
                        Action::Request(Pending::Open(Some(p.clone()))),
                    );
                }
            });
            ui.separator();
            item(ui, "Save         Ctrl+S", Action::Save);
            item(ui, "Save as…     Ctrl+Shift+S", Action::SaveAs);
            ui.menu_button("Export", |ui| {
                for (label, purpose) in PathPurpose::EXPORTS {
                    item(ui, label, Action::Export(purpose));
                }
            });
            ui.separator();
            item(ui, "Quit", Action::Request(Pending::Quit));
        });
        ui.menu_button("Edit", |ui| {
            if ui
                .add_enabled(can_undo, egui::Button::new("Undo   Ctrl+Z"))
                .clicked()
            {
                out.push(Action::Undo);
                ui.close();
            }
            if ui
                .add_enabled(can_redo, egui::Button::new("Redo   Ctrl+Shift+Z"))
                .clicked()
            {
                out.push(Action::Redo);
                ui.close();
            }
        });
        ui.menu_button("View", |ui| {
            let mut check =
                |ui: &mut egui::Ui, on: bool, label: &str, f: fn(bool) -> SettingsChange| {
                    let mut v = on;
                    if ui.checkbox(&mut v, label).changed() {
                        out.push(Action::Settings(f(v)));
                    }
                };
            check(
                ui,
                settings.show_tour,
                "Tour panel",
                SettingsChange::ShowTour,
            );
            check(
                ui,
                settings.show_ledger,
                "Ledger",
                SettingsChange::ShowLedger,
            );
            check(
                ui,
                settings.show_search,
                "Search panel",
                SettingsChange::ShowSearch,
            );
            ui.separator();
            for v in View::ALL {
                if ui.radio(settings.view == v, v.title()).clicked() {
                    out.push(Action::Settings(SettingsChange::View(v)));
                    ui.close();
                }
            }
            ui.separator();
            if ui.radio(settings.dark, "Dark theme").clicked() {
                out.push(Action::Settings(SettingsChange::Dark(true)));
            }
            if ui.radio(!settings.dark, "Light theme").clicked() {
                out.push(Action::Settings(SettingsChange::Dark(false)));
            }
        });
        ui.menu_button("Help", |ui| {
            for t in HELP_TOPICS {
                if ui.button(t).clicked() {
                    out.push(Action::ShowHelp(t));
                    ui.close();
                }
            }
        });
        ui.separator();
        // The search is the workbench's main tool after the drag: one click away, not a menu
        // entry deep.
        if ui
            .selectable_label(settings.show_search, "Search")
            .on_hover_text("Show or hide the Search panel: optimise dates, explore sequences")
            .clicked()
        {
            out.push(Action::Settings(SettingsChange::ShowSearch(
                !settings.show_search,
            )));
        }
    });
}
