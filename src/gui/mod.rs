//! The workbench (eframe, glow renderer).

use std::path::PathBuf;

/// Open the workbench, optionally on a design file.
pub fn run(_file: Option<PathBuf>) -> Result<(), String> {
    Err("the workbench is not built yet".into())
}
