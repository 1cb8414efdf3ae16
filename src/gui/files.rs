//! Files from the workbench: the embedded samples, open, save (atomic), exports, pictures of a
//! view, and the choice of a path (a native dialog, or a typed path where none is available).

use std::path::{Path, PathBuf};
use std::sync::{Arc, Mutex};
use std::time::Instant;

use eframe::egui;
use tourwright_mission::{export, files};

use super::action::PathPurpose;
use super::app::TourwrightApp;

/// Open a design file; on failure the current design stays and the reason is shown.
pub fn open_path(app: &mut TourwrightApp, p: &Path) {
    match files::load(p) {
        Ok(d) => {
            app.set_document(d, Some(p.to_path_buf()));
            remember(app, p);
        }
        Err(e) => {
            app.dialogs.error = Some(format!(
                "The file could not be opened; your current design is unchanged.\n\n{e}"
            ));
        }
    }
}

fn remember(app: &mut TourwrightApp, p: &Path) {
    let p = p.to_path_buf();
    app.settings.recent.retain(|q| q != &p);
    app.settings.recent.insert(0, p);
    app.settings.recent.truncate(10);
}

/// Save to the document's file, or ask for one.
pub fn save(app: &mut TourwrightApp) {
    match app.doc.path.clone() {
        Some(p) => save_to(app, &p),
        None => ask_path(app, PathPurpose::SaveAs),
    }
}

/// Save to a path (atomic: the old file stays intact on any failure).
pub fn save_to(app: &mut TourwrightApp, p: &Path) {
    app.doc.commit_gesture();
    match files::save(app.doc.design(), p) {
        Ok(()) => {
            app.doc.mark_saved(p.to_path_buf());
            if let Some(a) = &mut app.autosave {
                a.clear();
            }
            remember(app, p);
            app.status = Some((format!("saved {}", p.display()), false));
        }
        Err(e) => app.dialogs.error = Some(format!("The design was not saved.\n\n{e}")),
    }
}

/// Carry out what a chosen path is for.
pub fn use_path(app: &mut TourwrightApp, purpose: PathPurpose, p: &Path) {
    match purpose {
        PathPurpose::Open => open_path(app, p),
        PathPurpose::SaveAs => save_to(app, p),
        PathPurpose::Picture => app.request_picture(p.to_path_buf()),
        PathPurpose::Kernel => use_kernel(app, p),
        other => export_to(app, other, p),
    }
}

/// Make a kernel file the design's ephemeris source: written relative to the design's folder
/// when it lies inside it, else as given. A kernel that cannot be used is refused with its
/// reason and the design stays as it was.
pub fn use_kernel(app: &mut TourwrightApp, p: &Path) {
    let folder = app
        .doc
        .path
        .as_ref()
        .and_then(|d| d.parent())
        .map(Path::to_path_buf);
    let abs = p.canonicalize().unwrap_or_else(|_| p.to_path_buf());
    let written = folder
        .as_ref()
        .and_then(|f| f.canonicalize().ok())
        .and_then(|f| abs.strip_prefix(&f).ok().map(Path::to_path_buf))
        .unwrap_or_else(|| p.to_path_buf());
    let choice = tourwright_mission::design::EphemerisChoice::Kernel(
        tourwright_mission::design::KernelRef {
            path: written.to_string_lossy().into_owned(),
            base: folder.filter(|_| written.is_relative()),
        },
    );
    match app
        .doc
        .apply(tourwright_mission::Edit::SetEphemeris(choice))
    {
        Ok(()) => {
            // The last kernel chosen is the default for designs that ask for one.
            app.settings.default_kernel = Some(abs.clone());
            tourwright_astro::kernel::set_default_kernel(Some(abs));
            app.status = Some((format!("ephemeris: kernel {}", p.display()), false));
        }
        Err(e) => {
            app.dialogs.error = Some(format!(
                "The kernel cannot be used; the design is unchanged.\n\n{e}"
            ))
        }
    }
}

/// Write an export to a path.
pub fn export_to(app: &mut TourwrightApp, purpose: PathPurpose, p: &Path) {
    let Some(tour) = &app.tour else {
        app.dialogs.error = Some("The design cannot be evaluated; nothing to export.".into());
        return;
    };
    let e = &app.eval;
    let text = match purpose {
        PathPurpose::EventsCsv => export::events_csv(tour, e),
        PathPurpose::LedgerCsv => export::ledger_csv(tour, e),
        PathPurpose::SamplesCsv => export::samples_csv(e),
        PathPurpose::Oem => {
            if !e.complete {
                app.dialogs.error = Some(
                    "The design has legs with no solution; there is no trajectory to export."
                        .into(),
                );
                return;
            }
            if let Some(u) = e.first_unreached() {
                app.dialogs.error = Some(format!(
                    "Stop {} is not reached (the shaped swing-by before it misses it): the \
                     trajectory after the miss is never flown. Retarget that swing-by, then export.",
                    u + 1
                ));
                return;
            }
            export::oem(tour, e, tourwright_astro::time::Epoch::now())
        }
        PathPurpose::ContinuousOem => match app
            .jobs
            .continuous
            .as_ref()
            .filter(|c| c.revision == app.doc.revision())
        {
            Some(c) => export::continuous_oem(tour, &c.value, tourwright_astro::time::Epoch::now()),
            None => {
                app.dialogs.error = Some(
                    "No continuous n-body trajectory for this version of the design: run it in the \
                     Fidelity view first."
                        .into(),
                );
                return;
            }
        },
        PathPurpose::PeriodCsv => match app
            .jobs
            .period
            .as_ref()
            .filter(|r| r.revision == app.doc.revision())
        {
            Some(r) => r.value.to_csv(),
            None => {
                app.dialogs.error = Some(
                    "No launch period for this version of the design: compute it in the Launch \
                     period view first."
                        .into(),
                );
                return;
            }
        },
        PathPurpose::Open | PathPurpose::SaveAs | PathPurpose::Picture | PathPurpose::Kernel => {
            return;
        }
    };
    if tourwright_mission::files::holds_design(p) {
        app.dialogs.error = Some(format!(
            "{} holds a design; an export never replaces a design file. Choose another name.",
            p.display()
        ));
        return;
    }
    match tourwright_mission::files::write_atomic(p, text.as_bytes()) {
        Ok(()) => app.status = Some((format!("wrote {}", p.display()), false)),
        Err(e) => app.dialogs.error = Some(e.to_string()),
    }
}

/// Ask for a path: a native dialog when one answers, else the typed-path prompt.
pub fn ask_path(app: &mut TourwrightApp, purpose: PathPurpose) {
    let name = default_path(app, purpose);
    if !app.native_dialogs {
        app.dialogs.path_prompt = Some((purpose, name));
        return;
    }
    let t = Instant::now();
    let base = rfd::FileDialog::new();
    let dlg = match purpose {
        PathPurpose::Open | PathPurpose::SaveAs => base.add_filter("Tourwright design", &["ron"]),
        PathPurpose::EventsCsv
        | PathPurpose::LedgerCsv
        | PathPurpose::SamplesCsv
        | PathPurpose::PeriodCsv => base.add_filter("CSV", &["csv"]),
        PathPurpose::Oem | PathPurpose::ContinuousOem => {
            base.add_filter("CCSDS OEM", &["oem", "txt"])
        }
        PathPurpose::Picture => base.add_filter("PNG picture", &["png"]),
        PathPurpose::Kernel => base.add_filter("SPICE SPK kernel", &["bsp"]),
    };
    let chosen = match purpose {
        PathPurpose::Open | PathPurpose::Kernel => dlg.pick_file(),
        _ => dlg
            .set_file_name(
                Path::new(&name)
                    .file_name()
                    .map(|f| f.to_string_lossy().to_string())
                    .unwrap_or_default(),
            )
            .save_file(),
    };
    match chosen {
        Some(p) => use_path(app, purpose, &p),
        None if t.elapsed().as_millis() < 150 => {
            // No dialog service answered (a person takes longer than that to cancel).
            app.native_dialogs = false;
            app.status = Some((
                "No native file dialog is available here; type a path instead.".into(),
                true,
            ));
            app.dialogs.path_prompt = Some((purpose, name));
        }
        None => {}
    }
}

fn default_path(app: &TourwrightApp, purpose: PathPurpose) -> String {
    let stem: String = app
        .design()
        .name
        .chars()
        .take(60)
        .map(|c| {
            if c.is_alphanumeric() {
                c.to_ascii_lowercase()
            } else {
                '-'
            }
        })
        .collect();
    let samples = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-missions");
    let home = || {
        std::env::var_os("HOME")
            .map(PathBuf::from)
            .filter(|h| h.is_dir())
            .unwrap_or_else(|| PathBuf::from("."))
    };
    // Never into the program's own samples folder: a design saved or exported from a sample goes
    // to the user's home folder instead.
    let dir = app
        .doc
        .path
        .as_ref()
        .and_then(|p| p.parent().map(Path::to_path_buf))
        .filter(|d| {
            let same = |a: &Path, b: &Path| match (a.canonicalize(), b.canonicalize()) {
                (Ok(x), Ok(y)) => x == y,
                _ => a == b,
            };
            !same(d, &samples)
        })
        .unwrap_or_else(home);
    let file = match purpose {
        PathPurpose::Open => return dir.to_string_lossy().to_string() + "/",
        PathPurpose::Kernel => {
            return tourwright_astro::kernel::default_kernel()
                .map(|k| k.to_string_lossy().into_owned())
                .unwrap_or_else(|| dir.join("de421.bsp").to_string_lossy().into_owned());
        }
        PathPurpose::SaveAs => format!("{stem}.tour.ron"),
        PathPurpose::EventsCsv => format!("{stem}-events.csv"),
        PathPurpose::LedgerCsv => format!("{stem}-ledger.csv"),
        PathPurpose::SamplesCsv => format!("{stem}-trajectory.csv"),
        PathPurpose::Oem => format!("{stem}.oem"),
        PathPurpose::ContinuousOem => format!("{stem}-nbody.oem"),
        PathPurpose::PeriodCsv => format!("{stem}-launch-period.csv"),
        PathPurpose::Picture => format!(
            "{stem}-{}.png",
            app.settings.view.title().to_lowercase().replace(' ', "-")
        ),
    };
    dir.join(file).to_string_lossy().to_string()
}

/// Ask the renderer for a screenshot and write the part inside `rect` as a PNG.
pub fn request_picture(
    ctx: &egui::Context,
    path: PathBuf,
    rect: egui::Rect,
    out: Arc<Mutex<Option<String>>>,
) {
    let ppp = ctx.pixels_per_point();
    let cb = egui::ScreenshotCallback::new(move |img: Arc<egui::ColorImage>| {
        let [w, h] = img.size;
        let x0 = ((rect.min.x * ppp) as usize).min(w);
        let y0 = ((rect.min.y * ppp) as usize).min(h);
        let x1 = ((rect.max.x * ppp) as usize).min(w).max(x0);
        let y1 = ((rect.max.y * ppp) as usize).min(h).max(y0);
        let mut rgba = Vec::with_capacity((x1 - x0) * (y1 - y0) * 4);
        for y in y0..y1 {
            for x in x0..x1 {
                let c = img.pixels[y * w + x];
                rgba.extend_from_slice(&[c.r(), c.g(), c.b(), 255]);
            }
        }
        let msg = match write_png(&path, (x1 - x0) as u32, (y1 - y0) as u32, &rgba) {
            Ok(()) => format!("wrote {}", path.display()),
            Err(e) => format!("{}: {e}", path.display()),
        };
        if let Ok(mut g) = out.lock() {
            *g = Some(msg);
        }
    });
    ctx.send_viewport_cmd(egui::ViewportCommand::Screenshot(cb));
}

/// Write RGBA8 pixels as a PNG through the `png` crate.
pub fn write_png(path: &Path, width: u32, height: u32, rgba: &[u8]) -> Result<(), String> {
    let file = std::fs::File::create(path).map_err(|e| e.to_string())?;
    let mut enc = png::Encoder::new(std::io::BufWriter::new(file), width, height);
    enc.set_color(png::ColorType::Rgba);
    enc.set_depth(png::BitDepth::Eight);
    let mut w = enc.write_header().map_err(|e| e.to_string())?;
    w.write_image_data(rgba).map_err(|e| e.to_string())?;
    w.finish().map_err(|e| e.to_string())
}
