//! The workbench application: its state and the frame.
//!
//! One frame: (1) refresh the evaluation if the design changed out of band; (2) collect actions
//! from the shortcuts and from every panel and view as they draw (they read the design and the
//! evaluation, never change them); (3) apply the actions in order; (4) refresh the evaluation once.
//! Nothing is ever drawn from an evaluation of another design state.

use std::path::PathBuf;
use std::sync::{Arc, Mutex};
use std::time::Instant;

use eframe::egui;
use tourwright_mission::evaluate::{EvalOptions, Evaluation, Warning, evaluate};
use tourwright_mission::report::{self, Table};
use tourwright_mission::{MissionDesign, PreparedTour};

use super::action::{Action, Actions, Pending, SettingsChange, View};
use super::compare::DirectView;
use super::context::{LEDGER_MIN_HEIGHT, Settings, ViewCtx};
use super::dialogs::Dialogs;
use super::document::Document;
use super::jobs::{Finished, Jobs};
use super::ladder::LadderView;
use super::ledger::LedgerPanel;
use super::lens::LensView;
use super::panels::TourPanel;
use super::search_panel::SearchPanel;
use super::sun::SunView;
use super::windowmap::WindowView;
use super::{files, menus, samples, status};

/// The panels and views, each with its own state.
#[derive(Default)]
pub struct Views {
    /// Tour panel.
    pub tour: TourPanel,
    /// Ledger.
    pub ledger: LedgerPanel,
    /// Sun view.
    pub sun: SunView,
    /// Swing-by lens.
    pub lens: LensView,
    /// Energy ladder.
    pub ladder: LadderView,
    /// Direct vs assist.
    pub direct: DirectView,
    /// Window map.
    pub window: WindowView,
    /// Search panel.
    pub search: SearchPanel,
    /// n-body fidelity check.
    pub fidelity: super::fidelity::FidelityView,
    /// Tisserand graph.
    pub tisserand: super::tisserand::TisserandView,
    /// Launch period.
    pub period: super::period::PeriodView,
}

/// The ledger's grip: a band along its top edge that resizes it. Returns the pointer's vertical
/// motion this frame while it is dragged.
fn ledger_grip(ui: &mut egui::Ui) -> Option<f32> {
    let (rect, resp) = ui.allocate_exact_size(
        egui::vec2(ui.available_width(), 2.0 * PANEL_GRAB),
        egui::Sense::drag(),
    );
    let hot = resp.hovered() || resp.dragged();
    if hot {
        ui.ctx().set_cursor_icon(egui::CursorIcon::ResizeVertical);
    }
    let c = rect.center();
    let color = if hot {
        ui.visuals().strong_text_color()
    } else {
        ui.visuals().weak_text_color()
    };
    ui.painter().line_segment(
        [c - egui::vec2(24.0, 0.0), c + egui::vec2(24.0, 0.0)],
        egui::Stroke::new(2.0, color),
    );
    let resp = resp.on_hover_text("Drag to resize the ledger");
    resp.dragged().then(|| resp.drag_delta().y)
}

/// Mean, 95th percentile and largest of frame times, in words.
fn spread(v: &mut [f32]) -> String {
    if v.is_empty() {
        return "n/a".into();
    }
    v.sort_by(f32::total_cmp);
    let mean = v.iter().sum::<f32>() / v.len() as f32;
    let p95 = v[(v.len() * 95 / 100).min(v.len() - 1)];
    format!(
        "mean {mean:.2} ms, p95 {p95:.2} ms, max {:.2} ms",
        v[v.len() - 1]
    )
}

/// Half the width of the band that grabs a panel's edge, points.
const PANEL_GRAB: f32 = 6.0;

/// The workbench.
pub struct TourwrightApp {
    /// The open design and its history.
    pub doc: Document,
    /// The prepared tour of the current design state.
    pub tour: Option<PreparedTour>,
    /// The evaluation of the current design state.
    pub eval: Evaluation,
    /// The event table of `eval`.
    pub events: Table,
    eval_key: (u64, u64),
    /// Persisted settings.
    pub settings: Settings,
    /// The selected stop.
    pub selected: usize,
    /// Background jobs and their results.
    pub jobs: Jobs,
    /// Panels and views.
    pub views: Views,
    /// Dialogs (error, unsaved changes, typed path, help).
    pub dialogs: Dialogs,
    /// Status message (text, is an error).
    pub status: Option<(String, bool)>,
    /// Use native file dialogs (off in tests and when none is available).
    pub native_dialogs: bool,
    /// Smoothed time spent building a frame, ms.
    pub frame_ms: f32,
    /// With TOURWRIGHT_FRAME_STATS set: since when, UI build times and whole-frame times (ms).
    frame_log: Option<(Instant, Vec<f32>, Vec<f32>)>,
    close_confirmed: bool,
    screenshot_to: Option<PathBuf>,
    /// Picture-export result reported by the screenshot callback.
    pub shot_result: Arc<Mutex<Option<String>>>,
    theme_applied: Option<bool>,
    last_title: String,
    /// The autosave of the open document (off in tests unless set).
    pub autosave: Option<super::autosave::Autosave>,
}

impl TourwrightApp {
    /// A workbench on `design` (path when it came from a file).
    pub fn with_design(design: MissionDesign, path: Option<PathBuf>, settings: Settings) -> Self {
        let mut app = TourwrightApp {
            doc: Document::new(design, path),
            tour: None,
            eval: Evaluation::default(),
            events: Table::default(),
            eval_key: (0, 0),
            settings,
            selected: 0,
            jobs: Jobs::default(),
            views: Views::default(),
            dialogs: Dialogs::default(),
            status: None,
            native_dialogs: true,
            frame_ms: 0.0,
            frame_log: std::env::var_os("TOURWRIGHT_FRAME_STATS")
                .map(|_| (Instant::now(), Vec::new(), Vec::new())),
            close_confirmed: false,
            screenshot_to: None,
            shot_result: Arc::new(Mutex::new(None)),
            theme_applied: None,
            last_title: String::new(),
            autosave: None,
        };
        app.document_opened();
        app
    }

    /// A workbench on an embedded sample (used by tests and as the fallback start).
    pub fn on_sample(index: usize) -> Self {
        let (d, p) = samples::sample_design(index);
        TourwrightApp::with_design(d, p, Settings::default())
    }

    /// Start from the command line's file, the last file opened, or a sample; autosave on, and
    /// any autosave left by a workbench that ended uncleanly offered for recovery.
    pub fn new(cc: &eframe::CreationContext<'_>, file: Option<PathBuf>) -> Self {
        let mut app = Self::start(cc, file);
        app.enable_autosave(super::autosave::Autosave::platform());
        super::autosave::install_panic_hook();
        app
    }

    /// Turn autosave on in `a`'s folder and offer what an unclean exit left there.
    pub fn enable_autosave(&mut self, a: Option<super::autosave::Autosave>) {
        if let Some(a) = &a {
            self.dialogs.recovery = super::autosave::Autosave::orphans(a.dir());
        }
        self.autosave = a;
    }

    /// A clean exit: the autosave is not needed any more.
    pub fn clean_exit(&mut self) {
        if let Some(a) = &mut self.autosave {
            a.clear();
        }
    }

    fn start(cc: &eframe::CreationContext<'_>, file: Option<PathBuf>) -> Self {
        let settings: Settings = cc
            .storage
            .and_then(|s| eframe::get_value(s, "tourwright.settings"))
            .unwrap_or_default();
        if settings.default_kernel.is_some() {
            tourwright_astro::kernel::set_default_kernel(settings.default_kernel.clone());
        }
        let mut tried_err = None;
        let candidate = file.or_else(|| settings.recent.first().cloned());
        if let Some(p) = candidate {
            match tourwright_mission::files::load(&p) {
                Ok(d) => return TourwrightApp::with_design(d, Some(p), settings),
                Err(e) => tried_err = Some(e.to_string()),
            }
        }
        let (d, p) = samples::sample_design(0);
        let mut app = TourwrightApp::with_design(d, p, settings);
        if let Some(e) = tried_err {
            app.status = Some((format!("could not open the last file: {e}"), true));
        }
        app
    }

    /// The design.
    pub fn design(&self) -> &MissionDesign {
        self.doc.design()
    }

    /// After a document was created or opened: select its first swing-by, evaluate, centre the
    /// window map on its first leg.
    fn document_opened(&mut self) {
        self.selected = usize::from(self.doc.design().stops.len() > 2);
        self.refresh();
        self.views.window.reset_from_design(self.doc.design(), 0);
        self.views.tour.forget_edits();
        self.views.search.forget_edits();
    }

    /// Replace the document (New, Open, a sample, an explorer row): running jobs are cancelled
    /// and their results will not be applied to the new design.
    pub fn set_document(&mut self, d: MissionDesign, p: Option<PathBuf>) {
        self.jobs.cancel_all();
        if let Some(a) = &mut self.autosave {
            a.clear();
        }
        self.doc = Document::new(d, p);
        self.document_opened();
        self.status = Some((format!("opened {}", self.doc.design().name), false));
    }

    /// Re-evaluate when the design changed (once per change, never per frame).
    pub fn refresh(&mut self) {
        let key = (self.doc.generation(), self.doc.revision());
        if self.eval_key == key {
            return;
        }
        self.eval_key = key;
        match PreparedTour::prepare(self.doc.design()) {
            Ok(t) => {
                evaluate(&t, &EvalOptions::default(), &mut self.eval);
                self.tour = Some(t);
            }
            Err(e) => {
                self.eval = Evaluation::default();
                self.eval.warnings.push(Warning::Design {
                    field: e.field,
                    reason: e.reason,
                });
                self.tour = None;
            }
        }
        self.events = match &self.tour {
            Some(t) => report::events(t, &self.eval),
            None => Table::default(),
        };
        let n = self.doc.design().stops.len();
        if self.selected >= n {
            self.selected = n.saturating_sub(1);
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
            self.doc.design().name,
            file
        )
    }

    /// Apply one action.
    pub fn apply(&mut self, action: Action) {
        match action {
            Action::Edit(e) => match self.doc.apply(e) {
                Ok(()) => self.views.tour.clear_refusal(),
                Err(err) => {
                    self.views.tour.note_refusal(&err.to_string());
                    self.status = Some((format!("not changed: {err}"), true));
                }
            },
            Action::EditLive(e) => match self.doc.apply_live(e) {
                Ok(()) => self.views.tour.clear_refusal(),
                Err(err) => {
                    self.views.tour.note_refusal(&err.to_string());
                    self.status = Some((format!("not changed: {err}"), true));
                }
            },
            Action::CommitGesture => self.doc.commit_gesture(),
            Action::Undo => {
                self.doc.undo();
                self.views.tour.forget_edits();
                self.views.search.forget_edits();
            }
            Action::Redo => {
                self.doc.redo();
                self.views.tour.forget_edits();
                self.views.search.forget_edits();
            }
            Action::Select(k) => self.selected = k,
            Action::Request(p) => {
                if self.doc.is_dirty() {
                    self.dialogs.confirm = Some(p);
                } else {
                    self.perform(p);
                }
            }
            Action::Perform(p) => {
                self.dialogs.confirm = None;
                self.perform(p);
            }
            Action::CancelPending => self.dialogs.confirm = None,
            Action::Save => files::save(self),
            Action::SaveThen(p) => {
                self.dialogs.confirm = None;
                files::save(self);
                if !self.doc.is_dirty() {
                    self.perform(p);
                } else if self.dialogs.path_prompt.is_some() {
                    self.dialogs.after_save = Some(p);
                }
            }
            Action::SaveAs => files::ask_path(self, super::action::PathPurpose::SaveAs),
            Action::Export(p) => files::ask_path(self, p),
            Action::PathChosen(purpose, path) => {
                self.dialogs.path_prompt = None;
                files::use_path(self, purpose, &path);
                if let Some(p) = self.dialogs.after_save.take() {
                    if !self.doc.is_dirty() {
                        self.perform(p);
                    }
                }
            }
            Action::ClosePathPrompt => {
                self.dialogs.path_prompt = None;
                self.dialogs.after_save = None;
            }
            Action::StartJob(r) => {
                let (g, rev) = (self.doc.generation(), self.doc.revision());
                self.jobs.start(r, self.doc.design(), g, rev);
            }
            Action::CancelJobs(k) => self.jobs.cancel(k),
            Action::Retarget { stop, move_epoch } => {
                match tourwright_mission::retarget::retarget(self.doc.design(), stop, move_epoch) {
                    Ok(r) => {
                        let _ = self
                            .doc
                            .apply(tourwright_mission::Edit::Replace(Box::new(r.design)));
                        self.status =
                            Some((format!("retargeted: miss now {:.1} km", r.miss_km), false));
                    }
                    Err(e) => {
                        let hint = match (&e, move_epoch) {
                            (
                                tourwright_mission::retarget::RetargetError::NoConvergence(_)
                                | tourwright_mission::retarget::RetargetError::BelowMinimum {
                                    ..
                                },
                                false,
                            ) => {
                                "; altitude and aim alone cannot do it with the next date \
                                 fixed: try \"Retarget + move date\""
                            }
                            _ => "",
                        };
                        self.status = Some((format!("retarget: {e}{hint}"), true));
                    }
                }
            }
            Action::Settings(c) => match c {
                SettingsChange::ShowTour(b) => self.settings.show_tour = b,
                SettingsChange::ShowLedger(b) => self.settings.show_ledger = b,
                SettingsChange::ShowSearch(b) => self.settings.show_search = b,
                SettingsChange::Dark(b) => self.settings.dark = b,
                SettingsChange::View(v) => self.settings.view = v,
            },
            Action::ShowHelp(t) => self.dialogs.help = Some(t),
            Action::Recover(i, restore) => {
                if i < self.dialogs.recovery.len() {
                    let r = self.dialogs.recovery.remove(i);
                    if restore {
                        match tourwright_mission::files::load(&r.file) {
                            Ok(d) => {
                                self.jobs.cancel_all();
                                if let Some(a) = &mut self.autosave {
                                    a.clear();
                                }
                                self.doc = Document::recovered(d, r.original.clone());
                                self.document_opened();
                                self.status =
                                    Some((format!("restored {} (not saved yet)", r.name), false));
                            }
                            Err(e) => {
                                self.dialogs.error =
                                    Some(format!("The autosave could not be read.\n\n{e}"))
                            }
                        }
                    }
                    super::autosave::Autosave::discard(&r);
                }
            }
            Action::CloseHelp => self.dialogs.help = None,
            Action::DismissError => self.dialogs.error = None,
            Action::Status(m, e) => self.status = Some((m, e)),
            Action::Copy(t) => self.dialogs.clipboard = Some(t),
        }
    }

    /// Carry out a pending action (consent given).
    fn perform(&mut self, action: Pending) {
        match action {
            Pending::New => self.set_document(MissionDesign::new_blank(), None),
            Pending::Sample(i) => {
                let (d, p) = samples::sample_design(i);
                self.set_document(d, p);
            }
            Pending::Replace(d) => self.set_document(*d, None),
            Pending::Open(Some(p)) => files::open_path(self, &p),
            Pending::Open(None) => files::ask_path(self, super::action::PathPurpose::Open),
            Pending::Quit => self.close_confirmed = true,
        }
    }

    /// Ask for a picture of the current view at the end of this frame.
    pub fn request_picture(&mut self, p: PathBuf) {
        self.screenshot_to = Some(p);
    }

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
            // Panel edges easy to grab (egui's default band is 3 points either side).
            ctx.all_styles_mut(|s| s.interaction.resize_grab_radius_side = PANEL_GRAB);
        }
        self.refresh();
        for f in self.jobs.poll(self.doc.generation()) {
            let Finished::Message(m, e) = f;
            self.status = Some((m, e));
        }
        if let Some(m) = self.jobs.window.take() {
            self.views.window.set_map(m);
        }
        let mut actions: Actions = menus::shortcuts(&ctx);
        let mut view_rect = None;
        let mut ledger_drag = None;
        {
            let vc = ViewCtx {
                design: self.doc.design(),
                tour: self.tour.as_ref(),
                eval: &self.eval,
                events: &self.events,
                selected: self.selected,
                dark: self.settings.dark,
                revision: self.doc.revision(),
                generation: self.doc.generation(),
                in_gesture: self.doc.in_gesture(),
                jobs: &self.jobs,
            };
            let (can_undo, can_redo) = (self.doc.can_undo(), self.doc.can_redo());
            let settings = &self.settings;
            egui::Panel::top("menu").show(ui, |ui| {
                menus::menu_bar(ui, settings, can_undo, can_redo, &mut actions)
            });
            egui::Panel::bottom("status").show(ui, |ui| {
                status::status_bar(ui, &vc, self.status.as_ref(), &mut actions)
            });
            let screen = ctx.content_rect();
            if settings.show_ledger {
                // Its height is the user's (a grip along its top edge, kept in the settings),
                // never more than half the window, never less than a row or two. The grip lies
                // inside the panel, so a view's canvas can never take its drag.
                let max_h = (screen.height() * 0.5).max(LEDGER_MIN_HEIGHT);
                let h = settings.ledger_height.clamp(LEDGER_MIN_HEIGHT, max_h);
                egui::Panel::bottom("ledger")
                    .resizable(false)
                    .exact_size(h)
                    .show(ui, |ui| {
                        ledger_drag = ledger_grip(ui);
                        actions.extend(self.views.ledger.ui(ui, &vc));
                    });
                ledger_drag = ledger_drag.map(|dy| (h - dy).clamp(LEDGER_MIN_HEIGHT, max_h));
            }
            // Side panels: width ranges that leave the central view at least a third of the
            // window; their content scrolls and never sets their width.
            let side_max = |share: f32, cap: f32| (screen.width() * share).clamp(220.0, cap);
            if settings.show_tour {
                egui::Panel::left("tour")
                    .resizable(true)
                    .default_size(340.0_f32.min(side_max(0.34, 460.0)))
                    .size_range(220.0..=side_max(0.34, 460.0))
                    .show(ui, |ui| {
                        egui::ScrollArea::both()
                            .auto_shrink(false)
                            .show(ui, |ui| actions.extend(self.views.tour.ui(ui, &vc)));
                    });
            }
            if settings.show_search {
                egui::Panel::right("search")
                    .resizable(true)
                    .default_size(360.0_f32.min(side_max(0.3, 560.0)))
                    .size_range(220.0..=side_max(0.3, 560.0))
                    .show(ui, |ui| {
                        egui::ScrollArea::both()
                            .auto_shrink(false)
                            .show(ui, |ui| actions.extend(self.views.search.ui(ui, &vc)));
                    });
            }
            let view = settings.view;
            let views = &mut self.views;
            // A wider bottom margin than egui's: the ledger's resize band lies above its edge, and
            // a view's canvas under it would take the drag (and pan instead of resizing).
            let central = egui::Frame::central_panel(ui.style()).inner_margin(egui::Margin {
                left: 8,
                right: 8,
                top: 8,
                bottom: (PANEL_GRAB + 6.0) as i8,
            });
            egui::CentralPanel::default_margins()
                .frame(central)
                .show(ui, |ui| {
                    // Tabs wrap onto a second row when the view is narrow.
                    ui.horizontal_wrapped(|ui| {
                        for v in View::ALL {
                            if ui.selectable_label(view == v, v.title()).clicked() {
                                actions.push(Action::Settings(SettingsChange::View(v)));
                            }
                        }
                    });
                    ui.separator();
                    view_rect = Some(ui.available_rect_before_wrap());
                    // A view draws inside the central rectangle only, whatever its content's size.
                    ui.set_clip_rect(ui.available_rect_before_wrap().intersect(ui.clip_rect()));
                    actions.extend(match view {
                        View::Sun => views.sun.ui(ui, &vc),
                        View::Lens => views.lens.ui(ui, &vc),
                        View::Ladder => views.ladder.ui(ui, &vc),
                        // Text-and-table views scroll when the window is short.
                        View::Direct => {
                            egui::ScrollArea::vertical()
                                .auto_shrink(false)
                                .show(ui, |ui| views.direct.ui(ui, &vc))
                                .inner
                        }
                        View::Window => views.window.ui(ui, &vc),
                        View::Tisserand => views.tisserand.ui(ui, &vc),
                        View::Fidelity => views.fidelity.ui(ui, &vc),
                        View::Period => views.period.ui(ui, &vc),
                    });
                });
            actions.extend(self.dialogs.ui(&ctx, &vc, self.frame_ms));
        }
        if let Some(h) = ledger_drag {
            self.settings.ledger_height = h;
        }
        // A gesture ends when no button is held and no field is being typed into.
        let idle = !ctx.input(|i| i.pointer.any_down()) && ctx.memory(|m| m.focused().is_none());
        if idle && self.doc.in_gesture() {
            actions.push(Action::CommitGesture);
        }
        for a in actions {
            self.apply(a);
        }
        self.refresh();
        if let Some(a) = &mut self.autosave {
            let (rev, dirty) = (self.doc.revision(), self.doc.is_dirty());
            if let Err(e) = a.tick(self.doc.design(), self.doc.path.as_deref(), rev, dirty) {
                self.status = Some((format!("autosave failed: {e}"), true));
            }
            if a.pending_write() {
                ctx.request_repaint_after(a.delay);
            }
        }
        if let Some(t) = self.dialogs.clipboard.take() {
            ctx.copy_text(t);
        }
        if let (Some(p), Some(rect)) = (self.screenshot_to.take(), view_rect) {
            files::request_picture(&ctx, p, rect, self.shot_result.clone());
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
        self.frame_stats(&ctx, t0);
        if !self.jobs.running.is_empty() {
            ctx.request_repaint_after(std::time::Duration::from_millis(50));
        }
    }

    fn frame_stats(&mut self, ctx: &egui::Context, t0: Instant) {
        let ms = t0.elapsed().as_secs_f32() * 1000.0;
        self.frame_ms = if self.frame_ms == 0.0 {
            ms
        } else {
            0.9 * self.frame_ms + 0.1 * ms
        };
        if let Some((start, v, whole)) = &mut self.frame_log {
            v.push(ms);
            if start.elapsed().as_secs_f32() > 2.0 {
                let dt = ctx.input(|i| i.unstable_dt) * 1000.0;
                eprintln!(
                    "frame stats: {} frames; ui build {}; whole frame incl. paint and swap {}; last frame interval {dt:.1} ms",
                    v.len(),
                    spread(v),
                    spread(whole)
                );
                *start = Instant::now();
                v.clear();
                whole.clear();
            }
        }
    }

    fn handle_close(&mut self, ctx: &egui::Context) {
        if ctx.input(|i| i.viewport().close_requested())
            && !self.close_confirmed
            && self.doc.is_dirty()
        {
            ctx.send_viewport_cmd(egui::ViewportCommand::CancelClose);
            self.dialogs.confirm = Some(Pending::Quit);
        }
        if self.close_confirmed {
            ctx.send_viewport_cmd(egui::ViewportCommand::Close);
        }
    }
}

impl eframe::App for TourwrightApp {
    fn ui(&mut self, ui: &mut egui::Ui, frame: &mut eframe::Frame) {
        // eframe's figure for the previous frame: building, tessellation, the GL calls and the
        // buffer swap (where a software rasteriser does its work).
        if let (Some((_, _, whole)), Some(s)) = (&mut self.frame_log, frame.info().cpu_usage) {
            whole.push(s * 1000.0);
        }
        TourwrightApp::ui(self, ui);
    }

    fn save(&mut self, storage: &mut dyn eframe::Storage) {
        eframe::set_value(storage, "tourwright.settings", &self.settings);
    }

    fn on_exit(&mut self, _gl: Option<&eframe::glow::Context>) {
        self.clean_exit();
    }
}
