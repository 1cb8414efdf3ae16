//! The workbench: an eframe app on the glow renderer (runs on software OpenGL, no GPU needed).
//!
//! The house: `app` holds the state and runs the frame; every panel and view is a component with
//! its own state and a `ui(&mut self, ui, &ViewCtx) -> Actions` that reads the design and its
//! evaluation and returns [`action::Action`]s; `menus` (menu bar and shortcuts), `dialogs`,
//! `files` (open, save, export, samples) and `jobs` (background work keyed by document
//! generation) are split by concern. The app applies the actions after the frame's panels are
//! drawn and refreshes the evaluation once.

pub mod action;
pub mod app;
pub mod autosave;
pub mod compare;
pub mod context;
pub mod dialogs;
pub mod document;
pub mod fidelity;
pub mod files;
pub mod jobs;
pub mod ladder;
pub mod ledger;
pub mod lens;
pub mod menus;
pub mod panels;
pub mod period;
pub mod samples;
pub mod search_panel;
pub mod shared;
pub mod status;
pub mod style;
pub mod sun;
pub mod tisserand;
pub mod windowmap;

use std::path::PathBuf;

pub use app::TourwrightApp;

/// Open the workbench, optionally on a design file.
pub fn run(file: Option<PathBuf>) -> Result<(), String> {
    let options = eframe::NativeOptions {
        viewport: eframe::egui::ViewportBuilder::default()
            .with_inner_size([1440.0, 900.0])
            .with_min_inner_size([900.0, 600.0])
            .with_title("Tourwright"),
        renderer: eframe::Renderer::Glow,
        ..Default::default()
    };
    eframe::run_native(
        "Tourwright",
        options,
        Box::new(move |cc| Ok(Box::new(TourwrightApp::new(cc, file)))),
    )
    .map_err(|e| format!("the workbench could not start: {e}"))
}
