//! The workbench: an eframe app on the glow renderer (runs on software OpenGL, no GPU needed).
//! State (document, undo, cached evaluation, jobs) lives in `app`; each view is its own module.

pub mod app;
pub mod compare;
pub mod document;
pub mod ladder;
pub mod lens;
pub mod panels;
pub mod png;
pub mod search_panel;
pub mod style;
pub mod sun;
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
