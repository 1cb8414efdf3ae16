//! The workbench application: state apart from the views, the frame loop, menus, shortcuts,
//! dialogs and file actions. Views live in sibling modules as `impl TourwrightApp` blocks.

use std::path::{Path, PathBuf};
use std::sync::{Arc, Mutex};
use std::time::Instant;

use eframe::egui::{self, Color32, Key, KeyboardShortcut, Modifiers, RichText};

use crate::mission::evaluate::{EvalOptions, Evaluation, evaluate_into};
use crate::mission::{MissionDesign, export, files};
use crate::search::Job;
use crate::search::direct::DirectComparison;
use crate::search::explore::Exploration;
use crate::search::optimize::OptimizeResult;
use crate::search::window::WindowMap;

use super::document::Document;
use super::windowmap::WindowViewState;
use super::{lens::LensState, search_panel::SearchState, sun::SunViewState};

/// Sample designs shipped inside the program (file name, text).
pub const SAMPLES: [(&str, &str); 4] = [
    (
        "lantern-jupiter-evej.tour.ron",
        include_str!("../../sample-missions/lantern-jupiter-evej.tour.ron"),
    ),
    (
        "tern-saturn-ejs.tour.ron",
        include_str!("../../sample-missions/tern-saturn-ejs.tour.ron"),
    ),
    (
        "wayfarer-belt-em.tour.ron",
        include_str!("../../sample-missions/wayfarer-belt-em.tour.ron"),
    ),
    (
        "ember-mercury-evvme.tour.ron",
        include_str!("../../sample-missions/ember-mercury-evvme.tour.ron"),
    ),
];

/// The central views.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum View {
    /// Heliocentric top view.
    Sun,
    /// Planet-centred view of one swing-by.
    Lens,
    /// Energy and v∞ along the tour.
    Ladder,
    /// Tour vs direct transfer.
    Direct,
    /// Porkchop view.
    Window,
}

impl View {
    /// All views in tab order.
    pub const ALL: [View; 5] = [
        View::Sun,
        View::Lens,
        View::Ladder,
        View::Direct,
        View::Window,
    ];
    /// Tab title.
    pub fn title(self) -> &'static str {
        match self {
            View::Sun => "Sun view",
            View::Lens => "Swing-by lens",
            View::Ladder => "Energy ladder",
            View::Direct => "Direct vs assist",
            View::Window => "Window map",
        }
    }
}

/// Something that needs the user's consent because it would drop unsaved changes.
#[derive(Clone, Debug, PartialEq)]
pub enum Pending {
    /// Start a new design.
    New,
    /// Open a file (None: ask with a dialog).
    Open(Option<PathBuf>),
    /// Open an embedded sample.
    Sample(usize),
    /// Replace the design with one from elsewhere (an explorer row).
    Replace(Box<MissionDesign>),
    /// Close the window.
    Quit,
}

/// What a typed path is for (when no native file dialog is available).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PathPurpose {
    /// Open a design.
    Open,
    /// Save the design.
    SaveAs,
    /// Export the event table.
    EventsCsv,
    /// Export the ledger.
    LedgerCsv,
    /// Export trajectory samples.
    SamplesCsv,
    /// Export the OEM.
    Oem,
    /// Save a picture of the current view.
    Picture,
}

/// Settings kept between runs.
#[derive(Clone, Debug, serde::Serialize, serde::Deserialize)]
#[serde(default)]
pub struct Settings {
    /// Dark theme.
    pub dark: bool,
    /// Recent files, newest first.
    pub recent: Vec<PathBuf>,
    /// Show the tour panel.
    pub show_tour: bool,
    /// Show the ledger.
    pub show_ledger: bool,
    /// Show the search panel.
    pub show_search: bool,
    /// The view shown.
    pub view: View,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            dark: true,
            recent: vec![],
            show_tour: true,
            show_ledger: true,
            show_search: false,
            view: View::Sun,
        }
    }
}

/// A job the GUI runs, with what to do with its result.
pub enum GuiJob {
    /// Direct-vs-assist comparison for a design revision.
    Direct(Job<Option<DirectComparison>>, u64),
    /// A window map.
    Window(Job<Option<WindowMap>>),
    /// The date optimiser (result, the revision it started from).
    Optimize(Job<OptimizeResult>, u64),
    /// The sequence explorer.
    Explore(Job<Exploration>),
}

impl GuiJob {
    /// Progress and label for the status bar.
    pub fn progress(&self) -> (&str, f32, f64) {
        let (j_label, p) = match self {
            GuiJob::Direct(j, _) => (j.label.as_str(), &j.progress),
            GuiJob::Window(j) => (j.label.as_str(), &j.progress),
            GuiJob::Optimize(j, _) => (j.label.as_str(), &j.progress),
            GuiJob::Explore(j) => (j.label.as_str(), &j.progress),
        };
        (j_label, p.fraction(), p.best())
    }
    /// Ask the job to stop.
    pub fn cancel(&self) {
        match self {
            GuiJob::Direct(j, _) => j.progress.cancel(),
            GuiJob::Window(j) => j.progress.cancel(),
            GuiJob::Optimize(j, _) => j.progress.cancel(),
            GuiJob::Explore(j) => j.progress.cancel(),
        }
    }
}

/// The workbench.
pub struct TourwrightApp {
    /// The open design and its history.
    pub doc: Document,
    /// Cached evaluation of `doc` (re-run only when the revision changes).
    pub eval: Evaluation,
    eval_rev: u64,
    /// Persisted settings.
    pub settings: Settings,
    /// The selected stop (for the lens and the tour panel).
    pub selected: usize,
    /// Time slider position along the tour, 0..1.
    pub time_frac: f64,
    /// Status message (text, is_error).
    pub status: Option<(String, bool)>,
    /// An error shown in a dialog (e.g. a broken file).
    pub error: Option<String>,
    /// An action waiting for consent to drop unsaved changes.
    pub confirm: Option<Pending>,
    /// A typed-path prompt (purpose, text).
    pub path_prompt: Option<(PathPurpose, String)>,
    /// Use native file dialogs (off in tests and when none is available).
    pub native_dialogs: bool,
    /// Help window open (title).
    pub help: Option<&'static str>,
    /// Epoch text being edited: (stop, text).
    pub epoch_edit: Option<(usize, String)>,
    /// Validation message of the epoch field: (stop, message).
    pub epoch_error: Option<(usize, String)>,
    /// Running jobs.
    pub jobs: Vec<GuiJob>,
    /// Last direct-vs-assist result and the revision it belongs to.
    pub direct: Option<(DirectComparison, u64)>,
    /// Sun view state.
    pub sun: SunViewState,
    /// Lens state.
    pub lens: LensState,
    /// Window-map view state.
    pub window: WindowViewState,
    /// Search panel state.
    pub search: SearchState,
    /// Smoothed time spent building a frame, ms.
    pub frame_ms: f32,
    frame_log: Option<(Instant, Vec<f32>)>,
    close_confirmed: bool,
    screenshot_to: Option<PathBuf>,
    /// Picture-export result reported by the screenshot callback.
    pub shot_result: Arc<Mutex<Option<String>>>,
    theme_applied: Option<bool>,
    last_title: String,
}

impl TourwrightApp {
    /// A workbench on `design` (path when it came from a file).
    pub fn with_design(design: MissionDesign, path: Option<PathBuf>, settings: Settings) -> Self {
        let mut app = TourwrightApp {
            doc: Document::new(design, path),
            eval: Evaluation::default(),
            eval_rev: 0,
            settings,
            selected: 0,
            time_frac: 0.0,
            status: None,
            error: None,
            confirm: None,
            path_prompt: None,
            native_dialogs: true,
            help: None,
            epoch_edit: None,
            epoch_error: None,
            jobs: Vec::new(),
            direct: None,
            sun: SunViewState::default(),
            lens: LensState::default(),
            window: WindowViewState::default(),
            search: SearchState::default(),
            frame_ms: 0.0,
            frame_log: std::env::var_os("TOURWRIGHT_FRAME_STATS")
                .map(|_| (Instant::now(), Vec::new())),
            close_confirmed: false,
            screenshot_to: None,
            shot_result: Arc::new(Mutex::new(None)),
            theme_applied: None,
            last_title: String::new(),
        };
        app.select_first_swingby();
        app.refresh();
        app.window.reset_from_design(&app.doc.design, 0);
        app
    }

    /// A workbench on the first embedded sample (used by tests and as the fallback start).
    pub fn on_sample(index: usize) -> Self {
        let (d, p) = sample_design(index);
        TourwrightApp::with_design(d, p, Settings::default())
    }

    /// Start from the command line's file, the last file opened, or a sample.
    pub fn new(cc: &eframe::CreationContext<'_>, file: Option<PathBuf>) -> Self {
        let settings: Settings = cc
            .storage
            .and_then(|s| eframe::get_value(s, "tourwright.settings"))
            .unwrap_or_default();
        let mut tried_err = None;
        let candidate = file.or_else(|| settings.recent.first().cloned());
        if let Some(p) = candidate {
            match files::load(&p) {
                Ok(d) => return TourwrightApp::with_design(d, Some(p), settings),
                Err(e) => tried_err = Some(e.to_string()),
            }
        }
        let (d, p) = sample_design(0);
        let mut app = TourwrightApp::with_design(d, p, settings);
        if let Some(e) = tried_err {
            app.status = Some((format!("could not open the last file: {e}"), true));
        }
        app
    }

    fn select_first_swingby(&mut self) {
        self.selected = if self.doc.design.stops.len() > 2 {
            1
        } else {
            0
        };
    }

    /// Re-evaluate when the design changed.
    pub fn refresh(&mut self) {
        if self.eval_rev != self.doc.revision() {
            evaluate_into(&self.doc.design, &EvalOptions::default(), &mut self.eval);
            self.eval_rev = self.doc.revision();
            if self.selected >= self.doc.design.stops.len() {
                self.selected = self.doc.design.stops.len().saturating_sub(1);
            }
        }
    }

    /// The window title: design name, file and an unsaved mark.
    pub fn title(&self) -> String {
        let file = self
            .doc
            .path
            .as_ref()
            .and_then(|p| p.file_name())
            .map(|f| f.to_string_lossy().to_string())
            .unwrap_or_else(|| "not saved".into());
        format!(
            "{}{} — {} — Tourwright",
            if self.doc.is_dirty() { "* " } else { "" },
            self.doc.design.name,
            file
        )
    }

    // ----- file actions -------------------------------------------------------------------

    /// Ask for consent first when there are unsaved changes.
    pub fn request(&mut self, action: Pending) {
        if self.doc.is_dirty() {
            self.confirm = Some(action);
        } else {
            self.perform(action);
        }
    }

    /// Carry out an action (consent given).
    pub fn perform(&mut self, action: Pending) {
        match action {
            Pending::New => self.set_document(MissionDesign::new_blank(), None),
            Pending::Sample(i) => {
                let (d, p) = sample_design(i);
                self.set_document(d, p);
            }
            Pending::Replace(d) => self.set_document(*d, None),
            Pending::Open(Some(p)) => self.open_path(&p),
            Pending::Open(None) => {
                if let Some(p) = self.pick_file(PathPurpose::Open) {
                    self.open_path(&p);
                }
            }
            Pending::Quit => {
                self.close_confirmed = true;
            }
        }
    }

    fn set_document(&mut self, d: MissionDesign, p: Option<PathBuf>) {
        self.doc = Document::new(d, p);
        self.epoch_edit = None;
        self.epoch_error = None;
        self.direct = None;
        self.select_first_swingby();
        self.eval_rev = 0;
        self.refresh();
        self.window.reset_from_design(&self.doc.design, 0);
        self.status = Some((format!("opened {}", self.doc.design.name), false));
    }

    /// Open a design file; on failure the current design stays and the reason is shown.
    pub fn open_path(&mut self, p: &Path) {
        match files::load(p) {
            Ok(d) => {
                self.set_document(d, Some(p.to_path_buf()));
                self.remember(p);
            }
            Err(e) => {
                self.error = Some(format!(
                    "The file could not be opened; your current design is unchanged.\n\n{e}"
                ));
            }
        }
    }

    fn remember(&mut self, p: &Path) {
        let p = p.to_path_buf();
        self.settings.recent.retain(|q| q != &p);
        self.settings.recent.insert(0, p);
        self.settings.recent.truncate(10);
    }

    /// Save to the document's file, or ask for one.
    pub fn save(&mut self) {
        match self.doc.path.clone() {
            Some(p) => self.save_to(&p),
            None => self.save_as(),
        }
    }

    /// Ask for a file and save there.
    pub fn save_as(&mut self) {
        if let Some(p) = self.pick_file(PathPurpose::SaveAs) {
            self.save_to(&p);
        }
    }

    /// Save to a path (atomic).
    pub fn save_to(&mut self, p: &Path) {
        self.doc.commit_gesture();
        match files::save(&self.doc.design, p) {
            Ok(()) => {
                self.doc.mark_saved(p.to_path_buf());
                self.remember(p);
                self.status = Some((format!("saved {}", p.display()), false));
            }
            Err(e) => self.error = Some(format!("The design was not saved.\n\n{e}")),
        }
    }

    /// Write an export.
    pub fn export(&mut self, purpose: PathPurpose) {
        let Some(p) = self.pick_file(purpose) else {
            return;
        };
        self.export_to(purpose, &p);
    }

    /// Write an export to a path.
    pub fn export_to(&mut self, purpose: PathPurpose, p: &Path) {
        let d = &self.doc.design;
        let e = &self.eval;
        let text = match purpose {
            PathPurpose::EventsCsv => export::events_csv(d, e),
            PathPurpose::LedgerCsv => export::ledger_csv(d, e),
            PathPurpose::SamplesCsv => export::samples_csv(e),
            PathPurpose::Oem => {
                if !e.complete {
                    self.error = Some(
                        "The design has legs with no solution; there is no trajectory to export."
                            .into(),
                    );
                    return;
                }
                export::oem(d, e, export::now())
            }
            PathPurpose::Picture => {
                self.screenshot_to = Some(p.to_path_buf());
                return;
            }
            PathPurpose::Open | PathPurpose::SaveAs => return,
        };
        match std::fs::write(p, text) {
            Ok(()) => self.status = Some((format!("wrote {}", p.display()), false)),
            Err(e) => self.error = Some(format!("{}: {e}", p.display())),
        }
    }

    /// A native file dialog; when none answers, a typed-path prompt instead.
    fn pick_file(&mut self, purpose: PathPurpose) -> Option<PathBuf> {
        if !self.native_dialogs {
            self.path_prompt = Some((purpose, self.default_path(purpose)));
            return None;
        }
        let t = Instant::now();
        let base = rfd::FileDialog::new();
        let dlg = match purpose {
            PathPurpose::Open | PathPurpose::SaveAs => {
                base.add_filter("Tourwright design", &["ron"])
            }
            PathPurpose::EventsCsv | PathPurpose::LedgerCsv | PathPurpose::SamplesCsv => {
                base.add_filter("CSV", &["csv"])
            }
            PathPurpose::Oem => base.add_filter("CCSDS OEM", &["oem", "txt"]),
            PathPurpose::Picture => base.add_filter("PNG picture", &["png"]),
        };
        let name = self.default_path(purpose);
        let chosen = match purpose {
            PathPurpose::Open => dlg.pick_file(),
            _ => dlg
                .set_file_name(
                    Path::new(&name)
                        .file_name()
                        .map(|f| f.to_string_lossy().to_string())
                        .unwrap_or_default(),
                )
                .save_file(),
        };
        if chosen.is_none() && t.elapsed().as_millis() < 150 {
            // No dialog service answered (a person takes longer than that to cancel).
            self.native_dialogs = false;
            self.status = Some((
                "No native file dialog is available here; type a path instead.".into(),
                true,
            ));
            self.path_prompt = Some((purpose, name));
        }
        chosen
    }

    fn default_path(&self, purpose: PathPurpose) -> String {
        let stem: String = self
            .doc
            .design
            .name
            .chars()
            .map(|c| {
                if c.is_alphanumeric() {
                    c.to_ascii_lowercase()
                } else {
                    '-'
                }
            })
            .collect();
        let dir = self
            .doc
            .path
            .as_ref()
            .and_then(|p| p.parent().map(Path::to_path_buf))
            .unwrap_or_else(|| PathBuf::from("."));
        let file = match purpose {
            PathPurpose::Open => return dir.to_string_lossy().to_string() + "/",
            PathPurpose::SaveAs => format!("{stem}.tour.ron"),
            PathPurpose::EventsCsv => format!("{stem}-events.csv"),
            PathPurpose::LedgerCsv => format!("{stem}-ledger.csv"),
            PathPurpose::SamplesCsv => format!("{stem}-trajectory.csv"),
            PathPurpose::Oem => format!("{stem}.oem"),
            PathPurpose::Picture => format!(
                "{stem}-{}.png",
                self.settings.view.title().to_lowercase().replace(' ', "-")
            ),
        };
        dir.join(file).to_string_lossy().to_string()
    }

    fn finish_path_prompt(&mut self, purpose: PathPurpose, text: &str) {
        let p = PathBuf::from(text.trim());
        match purpose {
            PathPurpose::Open => self.open_path(&p),
            PathPurpose::SaveAs => self.save_to(&p),
            other => self.export_to(other, &p),
        }
    }

    // ----- the frame -------------------------------------------------------------------------

    /// Build one frame (the whole UI). Used by eframe and by the kittest tests.
    pub fn ui(&mut self, ui: &mut egui::Ui) {
        let t0 = Instant::now();
        let ctx = ui.ctx().clone();
        if self.theme_applied != Some(self.settings.dark) {
            ctx.set_theme(if self.settings.dark {
                egui::Theme::Dark
            } else {
                egui::Theme::Light
            });
            self.theme_applied = Some(self.settings.dark);
        }
        self.shortcuts(&ctx);
        self.poll_jobs(&ctx);
        self.refresh();

        egui::Panel::top("menu").show(ui, |ui| self.menu_bar(ui));
        egui::Panel::bottom("status").show(ui, |ui| self.status_bar(ui));
        if self.settings.show_ledger {
            egui::Panel::bottom("ledger")
                .resizable(true)
                .default_size(190.0)
                .show(ui, |ui| self.ledger(ui));
        }
        if self.settings.show_tour {
            egui::Panel::left("tour")
                .resizable(true)
                .default_size(340.0)
                .show(ui, |ui| {
                    egui::ScrollArea::vertical().show(ui, |ui| self.tour_panel(ui));
                });
        }
        if self.settings.show_search {
            egui::Panel::right("search")
                .resizable(true)
                .default_size(330.0)
                .show(ui, |ui| {
                    egui::ScrollArea::vertical().show(ui, |ui| self.search_panel(ui));
                });
        }
        self.refresh();
        egui::CentralPanel::default_margins().show(ui, |ui| {
            ui.horizontal(|ui| {
                for v in View::ALL {
                    ui.selectable_value(&mut self.settings.view, v, v.title());
                }
            });
            ui.separator();
            let view_rect = ui.available_rect_before_wrap();
            match self.settings.view {
                View::Sun => self.sun_view(ui),
                View::Lens => self.lens_view(ui),
                View::Ladder => self.ladder_view(ui),
                View::Direct => self.direct_view(ui),
                View::Window => self.window_view(ui),
            }
            if let Some(p) = self.screenshot_to.take() {
                self.request_picture(&ctx, p, view_rect);
            }
        });
        self.dialogs(&ctx);
        // A gesture ends when no button is held and no field is being typed into.
        let idle = !ctx.input(|i| i.pointer.any_down()) && ctx.memory(|m| m.focused().is_none());
        if idle {
            self.doc.commit_gesture();
        }
        self.handle_close(&ctx);
        // Only on change: a viewport command every frame would keep the loop repainting.
        let title = self.title();
        if self.last_title != title {
            ctx.send_viewport_cmd(egui::ViewportCommand::Title(title.clone()));
            self.last_title = title;
        }
        if let Some(msg) = self.shot_result.lock().ok().and_then(|mut g| g.take()) {
            self.status = Some((msg, false));
        }
        let ms = t0.elapsed().as_secs_f32() * 1000.0;
        self.frame_ms = if self.frame_ms == 0.0 {
            ms
        } else {
            0.9 * self.frame_ms + 0.1 * ms
        };
        if let Some((start, v)) = &mut self.frame_log {
            v.push(ms);
            if start.elapsed().as_secs_f32() > 2.0 {
                let dt = ctx.input(|i| i.unstable_dt) * 1000.0;
                let mean = v.iter().sum::<f32>() / v.len() as f32;
                let max = v.iter().cloned().fold(0.0, f32::max);
                eprintln!(
                    "frame stats: {} frames, ui build mean {mean:.2} ms max {max:.2} ms, last frame interval {dt:.1} ms",
                    v.len()
                );
                *start = Instant::now();
                v.clear();
            }
        }
        if !self.jobs.is_empty() {
            ctx.request_repaint_after(std::time::Duration::from_millis(50));
        }
    }

    fn request_picture(&mut self, ctx: &egui::Context, path: PathBuf, rect: egui::Rect) {
        let ppp = ctx.pixels_per_point();
        let out = self.shot_result.clone();
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
            let png = super::png::encode_rgba((x1 - x0) as u32, (y1 - y0) as u32, &rgba);
            let msg = match std::fs::write(&path, png) {
                Ok(()) => format!("wrote {}", path.display()),
                Err(e) => format!("{}: {e}", path.display()),
            };
            if let Ok(mut g) = out.lock() {
                *g = Some(msg);
            }
        });
        ctx.send_viewport_cmd(egui::ViewportCommand::Screenshot(cb));
    }

    fn handle_close(&mut self, ctx: &egui::Context) {
        if ctx.input(|i| i.viewport().close_requested())
            && !self.close_confirmed
            && self.doc.is_dirty()
        {
            ctx.send_viewport_cmd(egui::ViewportCommand::CancelClose);
            self.confirm = Some(Pending::Quit);
        }
        if self.close_confirmed {
            ctx.send_viewport_cmd(egui::ViewportCommand::Close);
        }
    }

    fn shortcuts(&mut self, ctx: &egui::Context) {
        let cmd = Modifiers::COMMAND;
        let cmd_shift = Modifiers::COMMAND | Modifiers::SHIFT;
        let (redo, undo, new, open, save_as, save) = ctx.input_mut(|i| {
            let redo = i.consume_shortcut(&KeyboardShortcut::new(cmd_shift, Key::Z))
                || i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::Y));
            let undo = i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::Z));
            let new = i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::N));
            let open = i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::O));
            let save_as = i.consume_shortcut(&KeyboardShortcut::new(cmd_shift, Key::S));
            let save = i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::S));
            (redo, undo, new, open, save_as, save)
        });
        if redo {
            self.doc.redo();
        }
        if undo {
            self.doc.undo();
        }
        if new {
            self.request(Pending::New);
        }
        if open {
            self.request(Pending::Open(None));
        }
        if save_as {
            self.save_as();
        } else if save {
            self.save();
        }
    }

    fn poll_jobs(&mut self, ctx: &egui::Context) {
        use crate::search::JobStatus;
        let mut keep = Vec::new();
        for job in std::mem::take(&mut self.jobs) {
            match job {
                GuiJob::Direct(mut j, rev) => match j.poll() {
                    JobStatus::Running => keep.push(GuiJob::Direct(j, rev)),
                    JobStatus::Done(Some(c)) => self.direct = Some((c, rev)),
                    JobStatus::Done(None) => {
                        self.status =
                            Some(("no direct transfer found in the launch period".into(), true))
                    }
                    JobStatus::Failed(m) => self.status = Some((m, true)),
                },
                GuiJob::Window(mut j) => match j.poll() {
                    JobStatus::Running => keep.push(GuiJob::Window(j)),
                    JobStatus::Done(Some(m)) => {
                        self.window.set_map(m);
                    }
                    JobStatus::Done(None) => {
                        self.status = Some(("window map cancelled".into(), false))
                    }
                    JobStatus::Failed(m) => self.status = Some((m, true)),
                },
                GuiJob::Optimize(mut j, rev) => match j.poll() {
                    JobStatus::Running => keep.push(GuiJob::Optimize(j, rev)),
                    JobStatus::Done(r) => {
                        self.status = Some((
                            format!(
                                "optimiser finished: {:.4} after {} evaluations",
                                r.value, r.evaluations
                            ),
                            false,
                        ));
                        self.search.opt_result = Some((r, rev));
                    }
                    JobStatus::Failed(m) => self.status = Some((m, true)),
                },
                GuiJob::Explore(mut j) => match j.poll() {
                    JobStatus::Running => keep.push(GuiJob::Explore(j)),
                    JobStatus::Done(r) => self.search.explore_result = Some(r),
                    JobStatus::Failed(m) => self.status = Some((m, true)),
                },
            }
        }
        self.jobs = keep;
        if !self.jobs.is_empty() {
            ctx.request_repaint();
        }
    }

    fn menu_bar(&mut self, ui: &mut egui::Ui) {
        egui::MenuBar::new().ui(ui, |ui| {
            ui.menu_button("File", |ui| {
                if ui.button("New          Ctrl+N").clicked() {
                    self.request(Pending::New);
                    ui.close();
                }
                if ui.button("Open…        Ctrl+O").clicked() {
                    self.request(Pending::Open(None));
                    ui.close();
                }
                ui.menu_button("Open sample", |ui| {
                    for (i, (name, _)) in SAMPLES.iter().enumerate() {
                        if ui.button(*name).clicked() {
                            self.request(Pending::Sample(i));
                            ui.close();
                        }
                    }
                });
                ui.menu_button("Recent", |ui| {
                    if self.settings.recent.is_empty() {
                        ui.label("(none yet)");
                    }
                    for p in self.settings.recent.clone() {
                        if ui.button(p.to_string_lossy()).clicked() {
                            self.request(Pending::Open(Some(p)));
                            ui.close();
                        }
                    }
                });
                ui.separator();
                if ui.button("Save         Ctrl+S").clicked() {
                    self.save();
                    ui.close();
                }
                if ui.button("Save as…     Ctrl+Shift+S").clicked() {
                    self.save_as();
                    ui.close();
                }
                ui.menu_button("Export", |ui| {
                    for (label, purpose) in [
                        ("Event table (CSV)…", PathPurpose::EventsCsv),
                        ("Ledger (CSV)…", PathPurpose::LedgerCsv),
                        ("Trajectory samples (CSV)…", PathPurpose::SamplesCsv),
                        ("Trajectory (CCSDS OEM)…", PathPurpose::Oem),
                        ("Picture of the current view (PNG)…", PathPurpose::Picture),
                    ] {
                        if ui.button(label).clicked() {
                            self.export(purpose);
                            ui.close();
                        }
                    }
                });
                ui.separator();
                if ui.button("Quit").clicked() {
                    self.request(Pending::Quit);
                    ui.close();
                }
            });
            ui.menu_button("Edit", |ui| {
                if ui
                    .add_enabled(self.doc.can_undo(), egui::Button::new("Undo   Ctrl+Z"))
                    .clicked()
                {
                    self.doc.undo();
                    ui.close();
                }
                if ui
                    .add_enabled(
                        self.doc.can_redo(),
                        egui::Button::new("Redo   Ctrl+Shift+Z"),
                    )
                    .clicked()
                {
                    self.doc.redo();
                    ui.close();
                }
            });
            ui.menu_button("View", |ui| {
                ui.checkbox(&mut self.settings.show_tour, "Tour panel");
                ui.checkbox(&mut self.settings.show_ledger, "Ledger");
                ui.checkbox(&mut self.settings.show_search, "Search panel");
                ui.separator();
                for v in View::ALL {
                    if ui
                        .radio_value(&mut self.settings.view, v, v.title())
                        .clicked()
                    {
                        ui.close();
                    }
                }
                ui.separator();
                ui.radio_value(&mut self.settings.dark, true, "Dark theme");
                ui.radio_value(&mut self.settings.dark, false, "Light theme");
            });
            ui.menu_button("Help", |ui| {
                for t in [
                    "Units and conventions",
                    "Keyboard shortcuts",
                    "Preliminary-design caution",
                    "About Tourwright",
                ] {
                    if ui.button(t).clicked() {
                        self.help = Some(t);
                        ui.close();
                    }
                }
            });
        });
    }

    fn status_bar(&mut self, ui: &mut egui::Ui) {
        let dark = self.settings.dark;
        ui.horizontal(|ui| {
            let n = self.eval.warnings.len();
            if n == 0 {
                ui.label(RichText::new("no warnings").color(Color32::from_rgb(0x4C, 0xAF, 0x7A)));
            } else {
                ui.label(
                    RichText::new(format!(
                        "! {n} warning{}: {}",
                        if n > 1 { "s" } else { "" },
                        self.eval.warnings[0]
                    ))
                    .color(super::style::warn_color(dark)),
                );
            }
            if let Some((m, err)) = &self.status {
                ui.separator();
                ui.label(if *err {
                    RichText::new(m).color(super::style::error_color(dark))
                } else {
                    RichText::new(m)
                });
            }
            ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
                ui.label(RichText::new(format!("frame {:.1} ms", self.frame_ms)).weak());
                let mut cancel = None;
                for (i, j) in self.jobs.iter().enumerate() {
                    let (label, frac, best) = j.progress();
                    if ui
                        .small_button("x")
                        .on_hover_text("Cancel this job")
                        .clicked()
                    {
                        cancel = Some(i);
                    }
                    let text = if best.is_finite() {
                        format!("{label}: best {best:.4}")
                    } else {
                        label.to_string()
                    };
                    ui.add(egui::ProgressBar::new(frac).desired_width(160.0).text(text));
                }
                if let Some(i) = cancel {
                    self.jobs[i].cancel();
                }
            });
        });
    }

    fn dialogs(&mut self, ctx: &egui::Context) {
        if let Some(msg) = self.error.clone() {
            egui::Modal::new(egui::Id::unique("error")).show(ctx, |ui| {
                ui.set_max_width(520.0);
                ui.heading("Cannot do that");
                ui.label(msg);
                if ui.button("OK").clicked() {
                    self.error = None;
                }
            });
        }
        if let Some(action) = self.confirm.clone() {
            egui::Modal::new(egui::Id::unique("confirm")).show(ctx, |ui| {
                ui.heading("Unsaved changes");
                ui.label(format!(
                    "“{}” has changes that are not saved.",
                    self.doc.design.name
                ));
                ui.horizontal(|ui| {
                    if ui.button("Save first").clicked() {
                        self.confirm = None;
                        self.save();
                        if !self.doc.is_dirty() {
                            self.perform(action.clone());
                        }
                    }
                    if ui.button("Discard changes").clicked() {
                        self.confirm = None;
                        self.perform(action.clone());
                    }
                    if ui.button("Cancel").clicked() {
                        self.confirm = None;
                    }
                });
            });
        }
        if let Some((purpose, mut text)) = self.path_prompt.clone() {
            let mut done = None;
            egui::Modal::new(egui::Id::unique("path")).show(ctx, |ui| {
                ui.heading(match purpose {
                    PathPurpose::Open => "Open a design file",
                    PathPurpose::SaveAs => "Save the design as",
                    _ => "Export to",
                });
                let lab = ui.label("Type a path (no native file dialog is in use):");
                let r = ui
                    .add(egui::TextEdit::singleline(&mut text).desired_width(480.0))
                    .labelled_by(lab.id);
                let enter = r.lost_focus() && ui.input(|i| i.key_pressed(Key::Enter));
                ui.horizontal(|ui| {
                    if ui.button("OK").clicked() || enter {
                        done = Some(true);
                    }
                    if ui.button("Cancel").clicked() {
                        done = Some(false);
                    }
                });
            });
            match done {
                Some(true) => {
                    self.path_prompt = None;
                    self.finish_path_prompt(purpose, &text);
                }
                Some(false) => self.path_prompt = None,
                None => self.path_prompt = Some((purpose, text)),
            }
        }
        if let Some(topic) = self.help {
            let mut open = true;
            egui::Window::new(topic)
                .open(&mut open)
                .default_width(520.0)
                .show(ctx, |ui| {
                    ui.label(help_text(topic, self.frame_ms));
                });
            if !open {
                self.help = None;
            }
        }
    }
}

impl eframe::App for TourwrightApp {
    fn ui(&mut self, ui: &mut egui::Ui, _frame: &mut eframe::Frame) {
        TourwrightApp::ui(self, ui);
    }

    fn save(&mut self, storage: &mut dyn eframe::Storage) {
        eframe::set_value(storage, "tourwright.settings", &self.settings);
    }
}

/// The design of an embedded sample, with the repository path when the file is there.
pub fn sample_design(i: usize) -> (MissionDesign, Option<PathBuf>) {
    let (name, text) = SAMPLES[i.min(SAMPLES.len() - 1)];
    let on_disk = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-missions")
        .join(name);
    let d = files::from_str(text, Path::new(name)).expect("embedded samples are valid (tested)");
    (d, on_disk.exists().then_some(on_disk))
}

/// Text of the help topics.
pub fn help_text(topic: &str, frame_ms: f32) -> String {
    match topic {
        "Units and conventions" => "Distances km (Sun view in AU, 1 AU = 149 597 870.7 km), speeds km/s, C3 km²/s², \
energies km²/s² (heliocentric specific energy v²/2 − μ☉/r), angles degrees, masses kg, times days.\n\n\
Frame: heliocentric ecliptic and equinox of J2000. Epochs are kept in TDB and shown as UTC dates \
(leap seconds from IERS Bulletin C); MJD2000 counts days from 2000-01-01 00:00.\n\n\
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
        "Preliminary-design caution" => crate::CAUTION.into(),
        _ => format!(
            "Tourwright {} — a workbench for gravity-assist tours.\n\nEngine: Izzo's Lambert solver, \
universal-variable Kepler propagation, patched-conic swing-bys, self-adaptive differential evolution.\n\n\
Frame build time (smoothed): {frame_ms:.2} ms.\n\n{}",
            crate::VERSION,
            crate::CAUTION
        ),
    }
}
