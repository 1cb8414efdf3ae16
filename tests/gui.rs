//! The workbench's flows, driven headless with egui_kittest as a user would: buttons, menus and
//! the keyboard.

use std::path::{Path, PathBuf};

use eframe::egui::accesskit::Role;
use eframe::egui::{Key, Modifiers};
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use tourwright::gui::TourwrightApp;
use tourwright::gui::context::Settings;
use tourwright::gui::samples::sample_design;
use tourwright::mission::design::SwingbyMode;
use tourwright::mission::{Edit, files};

fn harness_for(app: TourwrightApp) -> Harness<'static, TourwrightApp> {
    let mut h = Harness::builder()
        .with_size([1440.0, 900.0])
        .build_ui_state(|ui, app: &mut TourwrightApp| app.ui(ui), app);
    h.run_steps(3);
    h
}

/// The action a click on cell (i, j) of `map` in the Window map stands for, as the view decides.
fn window_click(
    h: &Harness<'static, TourwrightApp>,
    map: &tourwright::search::window::WindowMap,
    i: usize,
    j: usize,
) -> tourwright::gui::action::Action {
    let app = h.state();
    let vc = tourwright::gui::context::ViewCtx {
        design: app.design(),
        tour: app.tour.as_ref(),
        eval: &app.eval,
        events: &app.events,
        selected: app.selected,
        dark: true,
        revision: app.doc.revision(),
        generation: app.doc.generation(),
        in_gesture: false,
        jobs: &app.jobs,
    };
    app.views.window.click(&vc, map, i, j)
}

fn harness(sample: usize) -> Harness<'static, TourwrightApp> {
    let mut app = TourwrightApp::on_sample(sample);
    app.native_dialogs = false;
    harness_for(app)
}

/// A sample copied into a temporary folder and opened from there (so that saving never touches
/// the repository's sample files).
fn harness_on_copy(sample: usize, dir: &Path) -> (Harness<'static, TourwrightApp>, PathBuf) {
    let (d, _) = sample_design(sample);
    let p = dir.join("copy.tour.ron");
    files::save(&d, &p).unwrap();
    let mut app = TourwrightApp::with_design(d, Some(p.clone()), Settings::default());
    app.native_dialogs = false;
    (harness_for(app), p)
}

fn altitude(h: &Harness<'_, TourwrightApp>, k: usize) -> f64 {
    match h.state().design().stops[k].swingby.mode {
        SwingbyMode::Shaped { altitude_km, .. } => altitude_km,
        SwingbyMode::Targeted => f64::NAN,
    }
}

/// The ledger's stop rows are the design's stops, in order, with their bodies (manoeuvre rows
/// sit between them).
fn assert_ledger_matches(h: &Harness<'_, TourwrightApp>, when: &str) {
    let app = h.state();
    let d = app.design();
    let rows: Vec<_> = app
        .events
        .rows
        .iter()
        .filter(|r| !tourwright::mission::report::is_dsm_row(r))
        .collect();
    assert_eq!(rows.len(), d.stops.len(), "{when}: ledger rows vs stops");
    assert_eq!(app.eval.stops.len(), d.stops.len(), "{when}: evaluation");
    for (k, (row, stop)) in rows.iter().zip(&d.stops).enumerate() {
        assert_eq!(
            row[2].display(0),
            stop.body,
            "{when}: row {k} shows another body"
        );
    }
}

/// File › Export › `entry`, with `target` typed into the path prompt, then OK.
fn export_through_prompt(h: &mut Harness<'static, TourwrightApp>, entry: &str, target: &Path) {
    h.get_by_label("File").click();
    h.run_steps(2);
    h.get_by_label("Export").click();
    h.run_steps(2);
    h.get_by_label_contains(entry).click();
    h.run_steps(2);
    h.state_mut().dialogs.path_prompt.as_mut().unwrap().1 = target.to_string_lossy().to_string();
    h.run_steps(1);
    h.get_by_label("OK").click();
    h.run_steps(3);
}

fn menu(h: &mut Harness<'static, TourwrightApp>, top: &str, entry: &str) {
    h.get_by_label(top).click();
    h.run_steps(2);
    h.get_by_label_contains(entry).click();
    h.run_steps(3);
}

fn menu_exact(h: &mut Harness<'static, TourwrightApp>, top: &str, entry: &str) {
    h.get_by_label(top).click();
    h.run_steps(2);
    h.get_by_label(entry).click();
    h.run_steps(3);
}

/// View ▸ Search panel, through the menu, then the menu closed.
fn open_search_panel(h: &mut Harness<'static, TourwrightApp>) {
    menu_role(h, "View", Role::CheckBox, "Search panel");
    h.key_press(Key::Escape);
    h.run_steps(2);
}

fn menu_role(h: &mut Harness<'static, TourwrightApp>, top: &str, role: Role, entry: &str) {
    h.get_by_label(top).click();
    h.run_steps(2);
    h.get_by_role_and_label(role, entry).click();
    h.run_steps(3);
}

fn undo_redo_both_ways(h: &mut Harness<'static, TourwrightApp>, when: &str) {
    let after = h.state().design().clone();
    menu(h, "Edit", "Undo");
    assert_ledger_matches(h, &format!("{when}, Edit ▸ Undo"));
    let before = h.state().design().clone();
    assert_ne!(before, after, "{when}: undo changed nothing");
    menu(h, "Edit", "Redo");
    assert_ledger_matches(h, &format!("{when}, Edit ▸ Redo"));
    assert_eq!(*h.state().design(), after, "{when}: redo");
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
    assert_ledger_matches(h, &format!("{when}, Ctrl+Z"));
    assert_eq!(*h.state().design(), before, "{when}: Ctrl+Z");
    h.key_press_modifiers(Modifiers::COMMAND | Modifiers::SHIFT, Key::Z);
    h.run_steps(3);
    assert_ledger_matches(h, &format!("{when}, Ctrl+Shift+Z"));
    assert_eq!(*h.state().design(), after, "{when}: Ctrl+Shift+Z");
}

/// The crash that lost work: "+ after" on the Launch stop, then Edit ▸ Undo from the menu.
#[test]
fn add_a_stop_then_undo_from_the_menu_does_not_crash() {
    let mut h = harness(0);
    let n = h.state().design().stops.len();
    h.get_all_by_label("+ after").next().unwrap().click();
    h.run_steps(3);
    assert_eq!(h.state().design().stops.len(), n + 1);
    assert_ledger_matches(&h, "after + after");
    menu(&mut h, "Edit", "Undo");
    assert_eq!(h.state().design().stops.len(), n);
    assert_ledger_matches(&h, "after Edit ▸ Undo");
}

#[test]
fn structural_edits_undo_and_redo_from_menu_and_keyboard() {
    let mut h = harness(0);
    // Add a stop (the second "+ after": after the first swing-by).
    h.get_all_by_label("+ after").nth(1).unwrap().click();
    h.run_steps(3);
    assert_ledger_matches(&h, "add");
    undo_redo_both_ways(&mut h, "add");
    // Remove a stop.
    h.get_all_by_label("remove").nth(2).unwrap().click();
    h.run_steps(3);
    assert_ledger_matches(&h, "remove");
    undo_redo_both_ways(&mut h, "remove");
    // Move a stop.
    h.get_all_by_label("down").nth(1).unwrap().click();
    h.run_steps(3);
    assert_ledger_matches(&h, "move");
    undo_redo_both_ways(&mut h, "move");
    // Switch a swing-by's mode.
    h.get_all_by_label("shaped").next().unwrap().click();
    h.run_steps(3);
    assert_ledger_matches(&h, "mode");
    undo_redo_both_ways(&mut h, "mode");
    // Change a body (through the same edit the combo box sends).
    h.state_mut()
        .apply(tourwright::gui::action::Action::Edit(Edit::SetBody {
            stop: 1,
            body: "Mars".into(),
        }));
    h.run_steps(3);
    assert_eq!(h.state().design().stops[1].body, "Mars");
    assert_ledger_matches(&h, "body");
    undo_redo_both_ways(&mut h, "body");
}

#[test]
fn every_file_edit_and_view_menu_entry_works() {
    let dir = tempfile::tempdir().unwrap();
    let (mut h, path) = harness_on_copy(0, dir.path());
    // View: every panel toggle and every view, then the themes.
    for (entry, check) in [
        ("Tour panel", 0),
        ("Ledger", 1),
        ("Search panel", 2),
        ("Tour panel", 0),
        ("Ledger", 1),
        ("Search panel", 2),
    ] {
        let before = {
            let s = &h.state().settings;
            [s.show_tour, s.show_ledger, s.show_search][check]
        };
        menu_role(&mut h, "View", Role::CheckBox, entry);
        let s = &h.state().settings;
        assert_ne!([s.show_tour, s.show_ledger, s.show_search][check], before);
        h.key_press(Key::Escape);
        h.run_steps(2);
    }
    for v in tourwright::gui::action::View::ALL {
        menu_role(&mut h, "View", Role::RadioButton, v.title());
        assert_eq!(h.state().settings.view, v);
        assert_ledger_matches(&h, v.title());
    }
    menu_role(&mut h, "View", Role::RadioButton, "Light theme");
    assert!(!h.state().settings.dark);
    h.key_press(Key::Escape);
    h.run_steps(2);
    menu_role(&mut h, "View", Role::RadioButton, "Dark theme");
    assert!(h.state().settings.dark);
    h.key_press(Key::Escape);
    h.run_steps(2);
    // Edit: undo and redo an edit.
    h.state_mut()
        .apply(tourwright::gui::action::Action::Edit(Edit::SetName(
            "renamed".into(),
        )));
    h.run_steps(2);
    undo_redo_both_ways(&mut h, "rename");
    // File ▸ Save writes the copy.
    menu_exact(&mut h, "File", "Save         Ctrl+S");
    assert!(!h.state().doc.is_dirty());
    assert_eq!(files::load(&path).unwrap(), *h.state().design());
    // File ▸ Export ▸ each table and the OEM, through the typed-path prompt.
    for (entry, file, head) in [
        ("Event table", "e.csv", "stop,kind,body"),
        ("Ledger (CSV)", "l.csv", "item,body"),
        ("Trajectory samples", "s.csv", "leg,piece,epoch_utc"),
        ("Trajectory (CCSDS OEM)", "t.oem", "CCSDS_OEM_VERS"),
    ] {
        let target = dir.path().join(file);
        export_through_prompt(&mut h, entry, &target);
        let text = std::fs::read_to_string(&target).unwrap();
        assert!(text.starts_with(head), "{entry}: {}", &text[..40]);
    }
    // Picture: asks for a path and does not panic (the headless harness takes no screenshots).
    h.get_by_label("File").click();
    h.run_steps(2);
    h.get_by_label("Export").click();
    h.run_steps(2);
    h.get_by_label_contains("Picture").click();
    h.run_steps(2);
    assert!(h.state().dialogs.path_prompt.is_some());
    h.get_by_label("Cancel").click();
    h.run_steps(2);
    // Open… shows the prompt; cancel keeps the design.
    let before = h.state().design().clone();
    menu(&mut h, "File", "Open…");
    assert!(h.state().dialogs.path_prompt.is_some());
    h.get_by_label("Cancel").click();
    h.run_steps(2);
    assert_eq!(*h.state().design(), before);
    // Recent lists the saved copy; opening it keeps the design.
    h.get_by_label("File").click();
    h.run_steps(2);
    h.get_by_label("Recent").click();
    h.run_steps(2);
    h.get_by_label_contains("copy.tour.ron").click();
    h.run_steps(3);
    assert_eq!(*h.state().design(), before);
    // Open sample ▸ each sample (nothing unsaved, so no question).
    for (i, (name, _)) in tourwright::gui::samples::SAMPLES.iter().enumerate() {
        h.get_by_label("File").click();
        h.run_steps(2);
        h.get_by_label("Open sample").click();
        h.run_steps(2);
        h.get_by_label(name).click();
        h.run_steps(3);
        assert_eq!(h.state().design().name, sample_design(i).0.name);
        assert_ledger_matches(&h, name);
    }
    // New asks nothing when nothing is unsaved (a sample opened from disk is saved).
    menu_exact(&mut h, "File", "New          Ctrl+N");
    assert_eq!(h.state().design().name, "Untitled tour");
    // Save as… through the prompt.
    let target = dir.path().join("new.tour.ron");
    menu(&mut h, "File", "Save as");
    h.state_mut().dialogs.path_prompt.as_mut().unwrap().1 = target.to_string_lossy().to_string();
    h.run_steps(1);
    h.get_by_label("OK").click();
    h.run_steps(3);
    assert_eq!(files::load(&target).unwrap(), *h.state().design());
    // Quit with unsaved changes asks first; Cancel keeps the workbench.
    h.state_mut()
        .apply(tourwright::gui::action::Action::Edit(Edit::SetName(
            "x".into(),
        )));
    h.run_steps(2);
    menu(&mut h, "File", "Quit");
    assert!(h.query_by_label("Unsaved changes").is_some());
    h.get_by_label("Cancel").click();
    h.run_steps(2);
    assert!(h.state().dialogs.confirm.is_none());
    // Help topics open and close.
    for t in tourwright::gui::menus::HELP_TOPICS {
        menu(&mut h, "Help", t);
        assert_eq!(h.state().dialogs.help, Some(t));
        h.state_mut()
            .apply(tourwright::gui::action::Action::CloseHelp);
        h.run_steps(2);
    }
}

#[test]
fn reshape_a_swingby_and_undo() {
    let mut h = harness(0);
    h.get_by_label("2 Swing-by — Venus").click();
    h.run_steps(2);
    assert_eq!(h.state().selected, 1);
    h.get_by_label("Swing-by lens").click();
    h.run_steps(2);
    let alt0 = altitude(&h, 1);
    let turn0 = h.state().eval.stops[1].swingby.unwrap().turn_rad;
    let vout0 = h.state().eval.stops[1].vinf_out;
    // Keyboard on the altitude slider: each arrow press is a step of the slider.
    let slider = h.get_by_role_and_label(Role::Slider, "altitude (km)");
    slider.focus();
    h.run_steps(1);
    for _ in 0..5 {
        h.key_press(Key::ArrowRight);
        h.run_steps(1);
    }
    // Release focus so the gesture closes as one undo step.
    h.key_press(Key::Escape);
    h.run_steps(3);
    let alt1 = altitude(&h, 1);
    assert!(alt1 > alt0, "altitude {alt0} -> {alt1}");
    let turn1 = h.state().eval.stops[1].swingby.unwrap().turn_rad;
    assert!(
        turn1 < turn0,
        "a higher periapsis turns less: {turn0} -> {turn1}"
    );
    assert!((h.state().eval.stops[1].vinf_out - vout0).norm() > 1e-6);
    // The miss distance is reported and the retarget button is offered.
    assert!(h.state().eval.stops[1].swingby.unwrap().miss_km.unwrap() > 1000.0);
    assert!(h.query_all_by_label("Retarget").count() >= 1);
    // Undo restores the figures.
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(2);
    assert!((altitude(&h, 1) - alt0).abs() < 1e-9);
    assert!((h.state().eval.stops[1].swingby.unwrap().turn_rad - turn0).abs() < 1e-12);
    // Redo brings the change back.
    h.key_press_modifiers(Modifiers::COMMAND | Modifiers::SHIFT, Key::Z);
    h.run_steps(2);
    assert!((altitude(&h, 1) - alt1).abs() < 1e-9);
}

#[test]
fn invalid_epoch_is_refused_with_a_reason() {
    let mut h = harness(0);
    let before = h.state().design().clone();
    let launch_date = before.stops[0].epoch.to_date_utc();
    let date_field = || {
        let d = launch_date.clone();
        move |n: &egui_kittest::kittest::AccessKitNode<'_>| {
            n.role() == Role::TextInput && n.value().as_deref() == Some(d.as_str())
        }
    };
    h.get_by(date_field()).click();
    h.run_steps(1);
    h.key_press_modifiers(Modifiers::COMMAND, Key::A);
    h.run_steps(1);
    h.get_by(date_field()).type_text("2029-13-45");
    h.run_steps(1);
    h.key_press(Key::Enter);
    h.run_steps(3);
    assert!(
        h.query_by_label_contains("month out of range").is_some(),
        "no validation message shown"
    );
    assert_eq!(
        *h.state().design(),
        before,
        "an invalid date must not change the design"
    );
}

#[test]
fn broken_file_leaves_the_design_unchanged() {
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("bad.tour.ron");
    std::fs::write(&bad, "(format: \"tourwright-design\", version: 1, name: \"x\",\n stops: [(body: \"Earth\" epoch: \"2030-01-01\")])").unwrap();
    let mut h = harness(1);
    let before = h.state().design().clone();
    menu(&mut h, "File", "Open…");
    h.state_mut().dialogs.path_prompt.as_mut().unwrap().1 = bad.to_string_lossy().to_string();
    h.run_steps(1);
    h.get_by_label("OK").click();
    h.run_steps(3);
    let err = h.state().dialogs.error.clone().expect("an error dialog");
    assert!(err.contains("bad.tour.ron:2:"), "{err}");
    assert!(h.query_by_label_contains("unchanged").is_some());
    assert_eq!(*h.state().design(), before);
    h.get_by_label("OK").click();
    h.run_steps(2);
    assert!(h.state().dialogs.error.is_none());
}

#[test]
fn unsaved_changes_ask_before_new() {
    let mut h = harness(0);
    h.state_mut()
        .apply(tourwright::gui::action::Action::Edit(Edit::SetName(
            "changed".into(),
        )));
    h.run_steps(1);
    h.key_press_modifiers(Modifiers::COMMAND, Key::N);
    h.run_steps(2);
    assert!(h.query_by_label("Unsaved changes").is_some());
    h.get_by_label("Cancel").click();
    h.run_steps(2);
    assert_eq!(h.state().design().name, "changed");
    h.key_press_modifiers(Modifiers::COMMAND, Key::N);
    h.run_steps(2);
    h.get_by_label("Discard changes").click();
    h.run_steps(2);
    assert_eq!(h.state().design().name, "Untitled tour");
}

#[test]
fn every_view_draws_and_frames_keep_coming_while_a_job_runs() {
    let mut h = harness(0);
    for tab in [
        "Sun view",
        "Energy ladder",
        "Window map",
        "Direct vs assist",
        "Swing-by lens",
    ] {
        h.get_by_label(tab).click();
        h.run_steps(3);
    }
    // A long optimiser run, started from the Search panel's button: the UI keeps building frames
    // while it works, then cancel stops it.
    h.state_mut().views.search.evals = 50_000_000;
    open_search_panel(&mut h);
    h.get_by_label("Optimise dates").click();
    h.run_steps(2);
    for _ in 0..20 {
        h.step();
    }
    assert!(
        !h.state().jobs.running.is_empty(),
        "the job should still be running"
    );
    h.state_mut()
        .apply(tourwright::gui::action::Action::CancelJobs(
            tourwright::gui::action::JobKind::Optimize,
        ));
    let t = std::time::Instant::now();
    while !h.state().jobs.running.is_empty() && t.elapsed().as_secs() < 60 {
        h.step();
        std::thread::sleep(std::time::Duration::from_millis(20));
    }
    assert!(
        h.state().jobs.running.is_empty(),
        "cancel did not stop the job"
    );
}

#[test]
fn a_job_for_one_design_is_not_applied_to_another() {
    use tourwright::gui::action::{Action, JobKind, JobRequest, Pending};
    let mut h = harness(0);
    h.state_mut().apply(Action::StartJob(JobRequest::Optimize(
        tourwright::search::optimize::OptimizeOptions {
            max_evals: 2_000_000,
            ..Default::default()
        },
        Default::default(),
    )));
    assert!(h.state().jobs.is_running(JobKind::Optimize));
    // Open another sample: the running job is cancelled and its result must not land.
    h.state_mut().apply(Action::Perform(Pending::Sample(1)));
    let t = std::time::Instant::now();
    while !h.state().jobs.running.is_empty() && t.elapsed().as_secs() < 60 {
        h.step();
        std::thread::sleep(std::time::Duration::from_millis(10));
    }
    assert!(h.state().jobs.running.is_empty());
    assert!(h.state().jobs.optimum.is_none(), "a stale result was kept");
    assert_eq!(h.state().jobs.dropped, 1);
    assert_eq!(h.state().design().name, sample_design(1).0.name);
}

#[test]
fn window_map_click_sets_the_leg_dates_as_one_undo_step() {
    use tourwright::search::Progress;
    use tourwright::search::window::{self, SecondAxis, WindowSpec};
    let mut h = harness(1);
    h.get_by_label("Window map").click();
    h.run_steps(2);
    let d = h.state().design().clone();
    let (a, b) = (d.stops[0].epoch, d.stops[1].epoch);
    let spec = WindowSpec {
        from: d.stops[0].body.clone(),
        to: d.stops[1].body.clone(),
        depart: (a.plus_days(-20.0), a.plus_days(20.0)),
        second: SecondAxis::Arrival(b.plus_days(-30.0), b.plus_days(30.0)),
        nx: 9,
        ny: 9,
        leg: Default::default(),
        goal: d.arrival,
    };
    let map = window::compute(&d, &spec, &Progress::new()).unwrap();
    h.state_mut().views.window.leg = Some(0);
    let action = window_click(&h, &map, 2, 7);
    h.state_mut().apply(action);
    h.run_steps(2);
    let (t0, t1) = map.epochs(2, 7);
    assert!((h.state().design().stops[0].epoch.tdb().0 - t0.0).abs() < 1e-3);
    assert!((h.state().design().stops[1].epoch.tdb().0 - t1.0).abs() < 1e-3);
    assert!((h.state().eval.launch.c3 - map.cell(2, 7).c3).abs() < 1e-6);
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(2);
    assert_eq!(h.state().design().stops[0].epoch, a);
    assert_eq!(h.state().design().stops[1].epoch, b);
}

/// A continuous solve that does not converge is shown in words (Fidelity view, Sun view legend)
/// without a glyph the workbench's font lacks.
#[test]
fn a_continuous_trajectory_that_does_not_converge_is_shown_in_words() {
    use tourwright::mission::continuous::{ContinuousOptions, solve};
    use tourwright::mission::evaluate::{EvalOptions, Evaluation, evaluate};
    let mut h = harness(0);
    // Lantern with its Venus swing-by 40 000 km higher: the leg to Earth misses by millions of km.
    let mut d = h.state().design().clone();
    if let SwingbyMode::Shaped { altitude_km, .. } = &mut d.stops[1].swingby.mode {
        *altitude_km += 40_000.0;
    }
    h.state_mut()
        .apply(tourwright::gui::action::Action::Edit(Edit::Replace(
            Box::new(d.clone()),
        )));
    h.run_steps(2);
    let tour = tourwright::mission::PreparedTour::prepare(&d).unwrap();
    let mut e = Evaluation::default();
    evaluate(&tour, &EvalOptions::default(), &mut e);
    let c = solve(&tour, &e, &ContinuousOptions::default(), &|_| {}, &|| false).unwrap();
    assert!(!c.converged);
    let revision = h.state().doc.revision();
    h.state_mut().jobs.continuous = Some(tourwright::gui::jobs::ForRevision { value: c, revision });
    h.get_by_label("Fidelity").click();
    h.run_steps(3);
    h.get_by_label_contains("Not converged:");
    h.get_by_label("Sun view").click();
    h.run_steps(3);
}

/// A map computed for a leg goes stale when that leg's bodies change: it says so, and a click on
/// it sets no dates.
#[test]
fn a_window_map_for_other_bodies_says_it_is_stale_and_sets_nothing() {
    use tourwright::search::Progress;
    use tourwright::search::window::{self, SecondAxis, WindowSpec};
    let mut h = harness(1);
    h.get_by_label("Window map").click();
    h.run_steps(2);
    let d = h.state().design().clone();
    let (a, b) = (d.stops[0].epoch, d.stops[1].epoch);
    let spec = WindowSpec {
        from: d.stops[0].body.clone(),
        to: d.stops[1].body.clone(),
        depart: (a.plus_days(-20.0), a.plus_days(20.0)),
        second: SecondAxis::Arrival(b.plus_days(-30.0), b.plus_days(30.0)),
        nx: 9,
        ny: 9,
        leg: Default::default(),
        goal: d.arrival,
    };
    let map = window::compute(&d, &spec, &Progress::new()).unwrap();
    h.state_mut().views.window.leg = Some(0);
    h.state_mut().views.window.map = Some(std::sync::Arc::new(map.clone()));
    h.run_steps(2);
    assert!(h.query_by_label_contains("Stale").is_none());
    // The leg's arrival body changes: the map is stale.
    h.state_mut()
        .apply(tourwright::gui::action::Action::Edit(Edit::SetBody {
            stop: 1,
            body: "Mars".into(),
        }));
    h.run_steps(3);
    h.get_by_label_contains("Stale: this map is for");
    let before = h.state().design().clone();
    let action = window_click(&h, &map, 2, 7);
    h.state_mut().apply(action);
    h.run_steps(2);
    assert_eq!(*h.state().design(), before);
}

#[test]
fn sun_view_orbits_are_not_rebuilt_while_a_swingby_is_dragged() {
    let mut h = harness(0);
    h.run_steps(2);
    let builds = h.state().views.sun.orbit_builds;
    assert!(builds >= 1);
    for i in 0..5 {
        h.state_mut()
            .apply(tourwright::gui::action::Action::EditLive(
                Edit::SetSwingbyMode {
                    stop: 1,
                    mode: SwingbyMode::Shaped {
                        altitude_km: 15_000.0 + 500.0 * i as f64,
                        aim_deg: -50.0,
                    },
                },
            ));
        h.run_steps(1);
    }
    assert_eq!(h.state().views.sun.orbit_builds, builds);
}

#[test]
fn ephemeris_model_is_picked_in_the_tour_panel_and_shown_in_the_status_bar() {
    let mut h = harness(0);
    let vinf_before = h.state().eval.launch.c3;
    h.get_by_label("ephemeris: JPL mean elements 1800-2050");
    h.get_by_role_and_label(Role::ComboBox, "Ephemeris").click();
    h.run_steps(2);
    h.get_by_label("MGA benchmark model").click();
    h.run_steps(3);
    assert_eq!(
        h.state().design().ephemeris,
        tourwright::mission::design::EphemerisChoice::MgaBenchmark
    );
    h.get_by_label("ephemeris: MGA benchmark model");
    let vinf_after = h.state().eval.launch.c3;
    assert!(
        (vinf_after - vinf_before).abs() > 1e-4,
        "the evaluation follows the model: {vinf_before} -> {vinf_after}"
    );
    undo_redo_both_ways(&mut h, "ephemeris model");
}

/// A deep-space manoeuvre: add it from the tour panel, drag its marker along the leg in the Sun
/// view (the figures follow; the drag is one undo step), undo restores it, remove it.
#[test]
fn add_a_manoeuvre_drag_it_along_the_leg_and_undo() {
    let mut h = harness(0);
    assert!(h.state().design().leg(0).dsm.is_none());
    // The first "+ DSM" button belongs to leg 1 (launch to Venus).
    h.get_all_by_label("+ DSM").next().unwrap().click();
    h.run_steps(3);
    let d = h.state().design().clone();
    let m = d.leg(0).dsm.expect("the manoeuvre was added");
    assert!(
        m.launch.is_some(),
        "a first-leg manoeuvre carries the launch v∞"
    );
    assert_ledger_matches(&h, "after adding a manoeuvre");
    let res0 = h.state().eval.legs[0]
        .dsm
        .expect("the manoeuvre is evaluated");
    assert!(
        h.state()
            .events
            .rows
            .iter()
            .filter(|r| tourwright::mission::report::is_dsm_row(r))
            .count()
            >= 2
    );
    // Drag its marker along the leg.
    h.run_steps(2);
    let start = h
        .state()
        .views
        .sun
        .dsm_markers
        .iter()
        .find(|(k, _)| *k == 0)
        .map(|(_, p)| *p)
        .expect("the marker is drawn");
    h.hover_at(start);
    h.run_steps(1);
    h.drag_at(start);
    h.run_steps(1);
    // Follow the leg towards Venus: move in small steps to where the marker for a later time
    // would be (the track is the coast the leg starts with).
    let venus = {
        let e = &h.state().eval;
        let st = e.stops[1].body_state.r;
        let (s0, r0) = (start, res0.r);
        // Screen direction from the marker towards Venus, using the view's scale along x.
        let dx = (st.x - r0.x) as f32;
        let dy = (st.y - r0.y) as f32;
        let n = (dx * dx + dy * dy).sqrt().max(1.0);
        (s0, eframe::egui::vec2(dx / n, -dy / n))
    };
    for i in 1..=12 {
        h.hover_at(venus.0 + venus.1 * (4.0 * i as f32));
        h.run_steps(1);
    }
    h.drop_at(venus.0 + venus.1 * 48.0);
    h.run_steps(3);
    let moved = h.state().design().leg(0).dsm.unwrap();
    assert_ne!(moved.at, m.at, "the drag moved the manoeuvre");
    let res1 = h.state().eval.legs[0].dsm.unwrap();
    assert!(
        (res1.t.0 - res0.t.0).abs() > 3600.0,
        "a later or earlier date"
    );
    // Added from the current launch v∞, the coast is the leg's own arc: the manoeuvre slides
    // along it at (nearly) zero cost.
    assert!(
        (res1.r - res0.r).norm() > 1.0e5,
        "the marker moved along the leg"
    );
    assert!(res1.dv_km_s < 1e-3, "{}", res1.dv_km_s);
    let row = h
        .state()
        .events
        .rows
        .iter()
        .find(|r| tourwright::mission::report::is_dsm_row(r))
        .unwrap()[3]
        .display(0);
    assert_eq!(row, res1.t.to_iso_utc(), "the ledger row follows");
    // One undo step restores the manoeuvre where it was added.
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
    assert_eq!(h.state().design().leg(0).dsm.unwrap().at, m.at);
    assert!((h.state().eval.legs[0].dsm.unwrap().dv_km_s - res0.dv_km_s).abs() < 1e-12);
    // Another undo removes it; redo brings it back; the remove button takes it away.
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
    assert!(h.state().design().leg(0).dsm.is_none());
    h.key_press_modifiers(Modifiers::COMMAND | Modifiers::SHIFT, Key::Z);
    h.run_steps(3);
    assert!(h.state().design().leg(0).dsm.is_some());
    h.get_all_by_label("remove DSM").next().unwrap().click();
    h.run_steps(3);
    assert!(h.state().design().leg(0).dsm.is_none());
    assert_ledger_matches(&h, "after removing the manoeuvre");
}

/// The n-body check from the Fidelity tab: the button starts a job (progress shown), the table
/// fills in, and the Sun view draws the n-body arcs over the patched-conic ones.
#[test]
fn fidelity_check_runs_from_its_tab_and_draws_the_arcs() {
    let mut h = harness(0);
    h.get_by_label("Fidelity").click();
    h.run_steps(3);
    h.get_by_label("Run n-body check").click();
    h.run_steps(2);
    let t = std::time::Instant::now();
    while h.state().jobs.fidelity.is_none() && t.elapsed().as_secs() < 120 {
        h.step();
        std::thread::sleep(std::time::Duration::from_millis(20));
    }
    let f = &h
        .state()
        .jobs
        .fidelity
        .as_ref()
        .expect("the check finished")
        .value;
    let legs = h.state().design().stops.len() - 1;
    assert_eq!(f.encounters.len(), legs);
    assert!(f.encounters.iter().all(|c| c.miss_km.is_finite()));
    h.run_steps(2);
    h.get_by_label("miss (km)");
    h.get_by_label("Sun view").click();
    h.run_steps(3);
    assert_eq!(h.state().views.sun.nbody_arcs_drawn, legs);
}

/// The continuous n-body trajectory from the Fidelity tab: the button starts a job, the verdict
/// and the encounters show, the Sun view draws its coast arcs with a legend, the Swing-by lens
/// shows the n-body periapsis, and File › Export writes its OEM.
#[test]
fn continuous_trajectory_runs_from_the_fidelity_tab_and_reaches_every_view() {
    let mut h = harness(0);
    h.get_by_label("Fidelity").click();
    h.run_steps(3);
    h.get_by_label("Converge trajectory").click();
    h.run_steps(2);
    let t = std::time::Instant::now();
    while h.state().jobs.continuous.is_none() && t.elapsed().as_secs() < 120 {
        h.step();
        std::thread::sleep(std::time::Duration::from_millis(20));
    }
    let c = &h
        .state()
        .jobs
        .continuous
        .as_ref()
        .expect("the solve finished")
        .value;
    assert!(c.converged, "{}", c.verdict());
    let arcs = c.arcs.len();
    assert_eq!(c.encounters.len(), h.state().design().stops.len());
    h.run_steps(2);
    h.get_by_label("Copy report");
    h.get_by_label("Sun view").click();
    h.run_steps(3);
    assert_eq!(h.state().views.sun.continuous_arcs_drawn, arcs);
    h.get_by_label("Swing-by lens").click();
    h.run_steps(3);
    h.get_by_label("n-body altitude");
    // File › Export › the converged trajectory, through the typed-path prompt.
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("nbody.oem");
    export_through_prompt(&mut h, "Continuous n-body trajectory", &target);
    let text = std::fs::read_to_string(&target).unwrap();
    assert!(text.starts_with("CCSDS_OEM_VERS"));
    assert_eq!(text.matches("META_START").count(), arcs);
}

/// Choosing a kernel that cannot be used (here: not an SPK file, typed into the path prompt)
/// leaves the design as it was and says why.
#[test]
fn a_bad_kernel_is_refused_and_the_design_stays() {
    let dir = tempfile::tempdir().unwrap();
    let bogus = dir.path().join("bogus.bsp");
    std::fs::write(&bogus, "not a kernel\n".repeat(200)).unwrap();
    let mut h = harness(0);
    let before = h.state().design().clone();
    h.get_by_role_and_label(Role::ComboBox, "Ephemeris").click();
    h.run_steps(2);
    h.get_by_label("JPL kernel (SPK file)…").click();
    h.run_steps(3);
    let (purpose, _) = h.state().dialogs.path_prompt.clone().expect("path prompt");
    assert_eq!(purpose, tourwright::gui::action::PathPurpose::Kernel);
    h.state_mut()
        .apply(tourwright::gui::action::Action::PathChosen(
            purpose,
            bogus.clone(),
        ));
    h.run_steps(3);
    assert_eq!(*h.state().design(), before, "the design changed");
    let err = h.state().dialogs.error.clone().expect("an error is shown");
    assert!(err.contains("bogus.bsp") && err.contains("SPK"), "{err}");
    // With DE421 at hand (CI), the same path switches the model and the status bar shows it.
    if let Some(k) = std::env::var_os("TOURWRIGHT_DE421") {
        h.state_mut().dialogs.error = None;
        let c3_before = h.state().eval.launch.c3;
        h.state_mut()
            .apply(tourwright::gui::action::Action::PathChosen(
                tourwright::gui::action::PathPurpose::Kernel,
                PathBuf::from(k),
            ));
        h.run_steps(3);
        assert!(h.state().dialogs.error.is_none());
        h.get_by_label("ephemeris: JPL kernel de421.bsp");
        assert!((h.state().eval.launch.c3 - c3_before).abs() > 1e-6);
    }
}

/// The Tisserand graph tab: contours from the engine for the ticked planets, the design's arcs,
/// a planet ticked off redraws; the CLI writes the same contours.
#[test]
fn tisserand_graph_shows_contours_and_the_design() {
    let mut h = harness(0);
    h.get_by_label("Tisserand graph").click();
    h.run_steps(3);
    let builds = h.state().views.tisserand.builds;
    assert!(builds >= 1);
    assert!(h.query_all_by_label("Venus").count() >= 1);
    // The planet row's box comes first (the legend has a "Mars" entry too).
    h.query_all_by_role_and_label(Role::CheckBox, "Mars")
        .next()
        .unwrap()
        .click();
    h.run_steps(3);
    assert!(h.state().views.tisserand.builds > builds);
    assert!(
        !h.state()
            .views
            .tisserand
            .bodies
            .contains(&tourwright::astro::bodies::Planet::Mars)
    );
    // What the view shows is what the CLI writes.
    let view = h.state().views.tisserand.bodies.clone();
    let levels = tourwright::gui::tisserand::parse_levels(&h.state().views.tisserand.levels_text);
    let shown = tourwright::astro::tisserand::contours_for(
        &h.state().tour.as_ref().unwrap().model,
        &view,
        &levels,
        tourwright::gui::tisserand::POINTS,
    );
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("t.csv");
    let letters: Vec<&str> = view.iter().map(|p| p.name()).collect();
    let vinfs: Vec<String> = levels.iter().map(|v| v.to_string()).collect();
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_tourwright"))
        .args([
            "tisserand",
            "--bodies",
            &letters.join(","),
            "--vinf",
            &vinfs.join(","),
            "--csv",
        ])
        .arg(&csv)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert_eq!(
        std::fs::read_to_string(&csv).unwrap(),
        tourwright::mission::export::tisserand_csv(&shown, &[])
    );
}

/// Work that survives: an edit is autosaved; the app is dropped without a clean exit; a new app
/// offers the recovery and restores the same design. A clean exit leaves nothing behind; an
/// interrupted write leaves the previous autosave readable.
#[test]
fn autosave_survives_an_unclean_exit_and_a_clean_exit_leaves_nothing() {
    use tourwright::gui::autosave::Autosave;
    let dir = tempfile::tempdir().unwrap();
    let auto = dir.path().join("autosave");
    let (mut h, file) = harness_on_copy(0, dir.path());
    let on_disk = std::fs::read_to_string(&file).unwrap();
    // A long delay: the timer writes nothing in this test's first part.
    let mut a = Autosave::in_dir(&auto);
    a.delay = std::time::Duration::from_secs(3600);
    h.state_mut().enable_autosave(Some(a));
    assert!(h.state().dialogs.recovery.is_empty());
    h.state_mut()
        .apply(tourwright::gui::action::Action::Edit(Edit::SetName(
            "Edited in a crash".into(),
        )));
    h.run_steps(3);
    let edited = h.state().design().clone();
    let saved = h.state().autosave.as_ref().unwrap().file();
    assert!(!saved.exists(), "written before its time");
    // A panic writes the autosave first (the hook runs, then the panic goes on as before).
    tourwright::gui::autosave::install_panic_hook();
    let r = std::panic::catch_unwind(|| panic!("simulated failure in the GUI thread"));
    assert!(r.is_err());
    assert!(saved.is_file(), "the panic hook wrote no autosave");
    assert_eq!(files::load(&saved).unwrap(), edited);
    // The timer writes too, once its delay has passed.
    std::fs::remove_file(&saved).unwrap();
    h.state_mut().autosave.as_mut().unwrap().delay = std::time::Duration::ZERO;
    h.run_steps(2);
    assert!(saved.is_file(), "no autosave written");
    // An interrupted later write (the temporary file half written, never renamed) leaves the
    // autosave readable as it was.
    std::fs::write(saved.with_extension("tmp"), "(format: \"tourwri").unwrap();
    assert_eq!(files::load(&saved).unwrap(), edited);
    drop(h); // no clean exit
    assert_eq!(
        std::fs::read_to_string(&file).unwrap(),
        on_disk,
        "the design file was touched"
    );
    // A new workbench offers it and restores it.
    let mut app = TourwrightApp::on_sample(1);
    app.native_dialogs = false;
    app.enable_autosave(Some(Autosave::in_dir(&auto)));
    let mut h = harness_for(app);
    assert_eq!(h.state().dialogs.recovery.len(), 1);
    h.get_by_label("Restore Edited in a crash").click();
    h.run_steps(3);
    assert_eq!(*h.state().design(), edited);
    assert_eq!(h.state().doc.path.as_deref(), Some(file.as_path()));
    assert!(h.state().doc.is_dirty(), "restored work is not saved yet");
    assert!(h.state().dialogs.recovery.is_empty());
    // Saving clears the autosave; a clean exit leaves none behind.
    h.state_mut()
        .apply(tourwright::gui::action::Action::Edit(Edit::SetName(
            "Again".into(),
        )));
    h.state_mut().autosave.as_mut().unwrap().delay = std::time::Duration::ZERO;
    h.run_steps(3);
    h.state_mut().clean_exit();
    let left: Vec<_> = std::fs::read_dir(&auto)
        .unwrap()
        .flatten()
        .map(|e| e.file_name())
        .filter(|n| n.to_string_lossy().ends_with(".tour.ron"))
        .collect();
    assert!(left.is_empty(), "{left:?}");
}

/// An edit that would make a design no file could hold is refused: the reason (field path and
/// why) appears beside the stop it touched, and the design does not change.
#[test]
fn an_out_of_range_edit_is_refused_beside_its_field() {
    let mut h = harness(0);
    let before = h.state().design().clone();
    h.state_mut().apply(tourwright::gui::action::Action::Edit(
        Edit::SetMinAltitude {
            stop: 1,
            km: Some(-5000.0),
        },
    ));
    h.run_steps(3);
    assert_eq!(*h.state().design(), before);
    let (stop, msg) = h
        .state()
        .views
        .tour
        .refusal()
        .cloned()
        .expect("a refusal is shown");
    assert_eq!(stop, Some(1));
    assert!(msg.starts_with("stops[1].swingby.min_altitude_km"), "{msg}");
    // Beside the stop, and in the status bar.
    assert_eq!(
        h.query_all_by_label_contains("not changed: stops[1].swingby.min_altitude_km")
            .count(),
        2
    );
    // A good edit clears it.
    h.state_mut().apply(tourwright::gui::action::Action::Edit(
        Edit::SetMinAltitude {
            stop: 1,
            km: Some(500.0),
        },
    ));
    h.run_steps(2);
    assert!(h.state().views.tour.refusal().is_none());
}

/// Wait for every running job to end (at most a minute).
fn wait_for_jobs(h: &mut Harness<'static, TourwrightApp>) {
    let t = std::time::Instant::now();
    while !h.state().jobs.running.is_empty() && t.elapsed().as_secs() < 60 {
        h.step();
        std::thread::sleep(std::time::Duration::from_millis(10));
    }
    assert!(h.state().jobs.running.is_empty(), "a job did not end");
    h.run_steps(2);
}

#[test]
fn a_result_for_another_tour_is_refused_and_one_for_a_changed_tour_is_judged_first() {
    use tourwright::gui::action::Action;
    let mut h = harness(0);
    open_search_panel(&mut h);
    h.state_mut().views.search.evals = 60_000;
    h.get_by_label("Optimise dates").click();
    h.run_steps(1);
    // While the result is pending, a body changes: the result is for another tour.
    h.state_mut().apply(Action::Edit(Edit::SetBody {
        stop: 2,
        body: "Mars".into(),
    }));
    wait_for_jobs(&mut h);
    assert!(h.state().jobs.optimum.is_some());
    h.get_by_label_contains("cannot be applied");
    assert!(
        h.query_by_label_contains("Apply").is_none(),
        "Apply offered"
    );
    // Back to the tour it was computed for, then a date moved: the result is judged on the
    // design as it is now, before Apply.
    menu(&mut h, "Edit", "Undo");
    h.state_mut()
        .apply(Action::Edit(Edit::ShiftEpoch { stop: 0, days: 3.0 }));
    h.run_steps(3);
    h.get_by_label_contains("The design changed since this search");
    let schedule = h
        .state()
        .jobs
        .optimum
        .as_ref()
        .unwrap()
        .value
        .schedule
        .clone();
    h.get_by_label_contains("Apply").click();
    h.run_steps(3);
    let d = h.state().design();
    let epochs: Vec<_> = d.stops.iter().map(|s| s.epoch).collect();
    assert_eq!(epochs, schedule.epochs);
    // One undo step takes the result back off.
    menu(&mut h, "Edit", "Undo");
    assert_ne!(
        h.state()
            .design()
            .stops
            .iter()
            .map(|s| s.epoch)
            .collect::<Vec<_>>(),
        schedule.epochs
    );
}

#[test]
fn the_search_panel_shows_and_edits_the_search_bounds() {
    let mut h = harness(0);
    open_search_panel(&mut h);
    // Lantern sets its bounds: the first leg's shortest time of flight is 80 days.
    let before = h.state().design().search.leg_tof[0];
    assert_eq!(before.min_days, 80.0);
    h.get_by_label("Use the default bounds").click();
    h.run_steps(3);
    let s = &h.state().design().search;
    assert!(s.leg_tof.is_empty() && s.launch_earliest.is_none());
    // The defaults are shown for what the search will use, marked as defaults.
    assert!(
        h.get_all_by_label_contains("(default)").count() >= 3,
        "three legs"
    );
    h.get_by_label_contains("default window");
    menu(&mut h, "Edit", "Undo");
    assert_eq!(h.state().design().search.leg_tof[0], before);
}

/// The Search panel's objective is the design's own (`search.objective`, what `tourwright
/// optimize` uses by default): it shows the file's choice, a change is an edit of the design
/// that undo takes back, and the optimiser runs on it.
#[test]
fn the_search_objective_is_the_designs_and_an_undoable_edit() {
    let mut h = harness(0);
    open_search_panel(&mut h);
    let from_file = h.state().design().search.objective;
    let shown = |h: &Harness<'static, TourwrightApp>| {
        let n = h.get_by_role_and_label(Role::ComboBox, "objective");
        n.value().unwrap_or_default().to_string()
    };
    let o = from_file;
    assert_eq!(shown(&h), format!("{} ({})", o.label(), o.unit()));
    h.get_by_role_and_label(Role::ComboBox, "objective").click();
    h.run_steps(2);
    h.get_by_label("spacecraft Δv (km/s)").click();
    h.run_steps(3);
    assert_eq!(
        h.state().design().search.objective,
        tourwright::mission::Objective::SpacecraftDv
    );
    assert_eq!(shown(&h), "spacecraft Δv (km/s)");
    h.get_by_label("Optimise dates").click();
    h.run_steps(1);
    wait_for_jobs(&mut h);
    let o = h
        .state()
        .jobs
        .optimum
        .clone()
        .expect("an optimiser result")
        .value;
    assert_eq!(
        o.result.objective,
        tourwright::mission::Objective::SpacecraftDv
    );
    menu(&mut h, "Edit", "Undo");
    assert_eq!(h.state().design().search.objective, from_file);
}

#[test]
fn explorer_rows_show_their_objective_and_the_limits_they_break() {
    let mut h = harness(0);
    open_search_panel(&mut h);
    {
        let s = &mut h.state_mut().views.search;
        s.via = vec![tourwright::astro::bodies::Planet::Venus];
        s.max_swingbys = 1;
        s.evals_per_sequence = 20_000;
    }
    h.get_by_label("Explore sequences").click();
    h.run_steps(1);
    wait_for_jobs(&mut h);
    let ex = h.state().jobs.exploration.clone().expect("an exploration");
    h.get_by_label("objective (km/s)");
    h.get_by_label("limits");
    // Lantern's launch limit (C3 at most 25 km²/s²) cannot reach Jupiter directly (a Hohmann
    // transfer needs v∞ 8.8 km/s, common practice): E-J is pruned, with the reason.
    assert!(
        ex.pruned
            .iter()
            .any(|(s, why)| s == "E-J" && why.contains("launch energy")),
        "{:?}",
        ex.pruned
    );
    h.get_by_label("1 pruned");
    // The row that was searched says whether it meets every limit, and if not, which it breaks.
    let evj = ex.ranked.iter().find(|c| c.label == "E-V-J").unwrap();
    if evj.feasible {
        h.get_by_label("met");
    } else {
        assert!(!evj.breaches.is_empty());
        h.get_by_label_contains("broken: ");
    }
}

/// A harness of `size` on a sample, with the Search panel shown (the tightest layout).
fn harness_sized(sample: usize, size: [f32; 2]) -> Harness<'static, TourwrightApp> {
    let settings = Settings {
        show_search: true,
        ..Settings::default()
    };
    let (d, p) = sample_design(sample);
    let mut app = TourwrightApp::with_design(d, p, settings);
    app.native_dialogs = false;
    let mut h = Harness::builder()
        .with_size(size)
        .build_ui_state(|ui, app: &mut TourwrightApp| app.ui(ui), app);
    h.run_steps(3);
    h
}

/// The node labelled `label` lies wholly inside the window.
fn assert_inside(h: &Harness<'static, TourwrightApp>, label: &str, size: [f32; 2]) {
    let window = eframe::egui::Rect::from_min_size(eframe::egui::Pos2::ZERO, size.into());
    let r = h.get_by_label(label).rect();
    assert!(
        window.contains_rect(r),
        "at {size:?}: '{label}' at {r:?} is outside the window"
    );
}

/// The status line after the frames that follow an action.
fn status(h: &Harness<'static, TourwrightApp>) -> String {
    h.state()
        .status
        .as_ref()
        .map(|s| s.0.clone())
        .unwrap_or_default()
}

/// At laptop sizes, with every panel shown: each tab and each panel's key widget lies inside the
/// window and answers a click at its centre (the clicks a user makes).
#[test]
fn every_tab_and_panel_fits_and_answers_clicks_at_laptop_sizes() {
    use tourwright::gui::action::View;
    for size in [[1024.0, 640.0], [1280.0, 800.0]] {
        let mut h = harness_sized(0, size);
        // Tabs: each inside, each click shows its view.
        for v in View::ALL {
            assert_inside(&h, v.title(), size);
            h.get_by_label(v.title()).click();
            h.run_steps(3);
            assert_eq!(h.state().settings.view, v, "at {size:?}: tab {}", v.title());
        }
        // Fidelity: the job row's button starts the job, its cancel stops it, and the status
        // line says it was cancelled.
        assert_inside(&h, "Converge trajectory", size);
        h.get_by_label("Converge trajectory").click();
        h.run_steps(2);
        assert!(!h.state().jobs.running.is_empty(), "at {size:?}: no job");
        assert_inside(&h, "cancel", size);
        h.get_by_label("cancel").click();
        h.run_steps(1);
        wait_for_jobs(&mut h);
        assert!(
            status(&h).contains("cancelled"),
            "at {size:?}: status '{}'",
            status(&h)
        );
        // Window map: the form's checkbox answers.
        h.get_by_label(View::Window.title()).click();
        h.run_steps(3);
        assert_inside(&h, "TOF axis", size);
        h.get_by_label("TOF axis").click();
        h.run_steps(2);
        assert!(h.state().views.window.use_tof, "at {size:?}: TOF axis");
        wait_for_jobs(&mut h);
        // Tisserand graph: a planet's checkbox answers.
        h.get_by_label(View::Tisserand.title()).click();
        h.run_steps(3);
        assert_inside(&h, "Saturn", size);
        let shown = h.state().views.tisserand.bodies.len();
        h.get_by_label("Saturn").click();
        h.run_steps(2);
        assert_ne!(
            h.state().views.tisserand.bodies.len(),
            shown,
            "at {size:?}: Saturn"
        );
        // Launch period: its button lies inside.
        h.get_by_label(View::Period.title()).click();
        h.run_steps(2);
        assert_inside(&h, "Compute launch period", size);
        // Swing-by lens: "Back to targeted" answers (and Undo restores the shaped swing-by).
        h.get_by_label(View::Lens.title()).click();
        h.run_steps(3);
        assert_inside(&h, "Back to targeted", size);
        let before = h.state().design().clone();
        h.get_by_label("Back to targeted").click();
        h.run_steps(2);
        assert_ne!(*h.state().design(), before, "at {size:?}: Back to targeted");
        h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
        h.run_steps(2);
        assert_eq!(*h.state().design(), before);
        // Direct vs assist: its ranking choices lie inside.
        h.get_by_label(View::Direct.title()).click();
        h.run_steps(2);
        assert_inside(&h, "Rank direct transfers by", size);
        wait_for_jobs(&mut h);
        // Sun view: "fit" resets the zoom.
        h.get_by_label(View::Sun.title()).click();
        h.run_steps(2);
        h.state_mut().views.sun.zoom = 3.0;
        assert_inside(&h, "fit", size);
        h.get_by_label("fit").click();
        h.run_steps(2);
        assert_eq!(h.state().views.sun.zoom, 1.0, "at {size:?}: fit");
        // Ledger: its button and its column header.
        assert_inside(&h, "Copy table", size);
        assert_inside(&h, "v∞ in (km/s)", size);
        h.get_by_label("Copy table").click();
        h.run_steps(2);
        assert!(status(&h).contains("copied"), "at {size:?}: {}", status(&h));
        // Tour panel: the first stop's "+ after".
        let r = h.get_all_by_label("+ after").next().unwrap().rect();
        assert!(
            r.max.x <= size[0] && r.max.y <= size[1],
            "at {size:?}: + after at {r:?}"
        );
        // Search panel: start the optimiser from its button and cancel it from its own.
        assert_inside(&h, "Optimise dates", size);
        h.get_by_label("Optimise dates").click();
        h.run_steps(2);
        assert!(
            !h.state().jobs.running.is_empty(),
            "at {size:?}: no optimiser"
        );
        assert_inside(&h, "Cancel", size);
        h.get_by_label("Cancel").click();
        h.run_steps(1);
        wait_for_jobs(&mut h);
        assert!(
            status(&h).contains("cancelled"),
            "at {size:?}: status '{}'",
            status(&h)
        );
        // The menu bar's Search toggle hides the panel and shows it again.
        h.get_all_by_label("Search").next().unwrap().click();
        h.run_steps(2);
        assert!(!h.state().settings.show_search);
    }
}

/// The grip on the ledger's top edge resizes it, the height is kept in the settings, and the view
/// above is not panned by that drag.
#[test]
fn the_ledger_is_resized_by_its_grip() {
    let mut h = harness_sized(0, [1280.0, 800.0]);
    h.get_by_label("Window map").click();
    h.run_steps(3);
    wait_for_jobs(&mut h);
    let view_before = h.state().views.window.view;
    let before = h.state().settings.ledger_height;
    let top = h.get_by_label("Ledger").rect().top();
    // The grip lies just above the heading: where the pointer turns into the resize cursor.
    let band: Vec<f32> = (0..24)
        .map(|d| top - d as f32)
        .filter(|&y| {
            h.hover_at(eframe::egui::pos2(640.0, y));
            h.run_steps(1);
            h.output().platform_output.cursor_icon == eframe::egui::CursorIcon::ResizeVertical
        })
        .collect();
    assert!(!band.is_empty(), "the ledger offers no grip");
    let grab = eframe::egui::pos2(640.0, band[band.len() / 2]);
    h.hover_at(grab);
    h.run_steps(1);
    h.drag_at(grab);
    h.run_steps(1);
    for i in 1..=10 {
        h.hover_at(grab - eframe::egui::vec2(0.0, 10.0 * i as f32));
        h.run_steps(1);
    }
    h.drop_at(grab - eframe::egui::vec2(0.0, 100.0));
    h.run_steps(3);
    let moved = top - h.get_by_label("Ledger").rect().top();
    assert!((moved - 100.0).abs() < 4.0, "the ledger grew by {moved}");
    let after = h.state().settings.ledger_height;
    assert!((after - before - 100.0).abs() < 4.0, "{before} -> {after}");
    assert_eq!(
        h.state().views.window.view,
        view_before,
        "the map was panned"
    );
    // The settings kept between runs carry the height.
    let saved = serde_json::to_string(&h.state().settings).unwrap();
    let back: Settings = serde_json::from_str(&saved).unwrap();
    assert_eq!(back.ledger_height, after);
}

/// Past the cliff: a shaped swing-by moved so far that its ballistic leg misses the next body.
/// The miss is a warning, and the stops after it are shown as not reached in the ledger, the lens
/// and the ladder, with no flight figures.
#[test]
fn a_shaped_swingby_that_misses_marks_the_stops_after_it_not_reached() {
    use tourwright::gui::action::View;
    let mut h = harness(0);
    assert!(h.state().eval.first_unreached().is_none());
    let (alt, aim) = match h.state().design().stops[1].swingby.mode {
        SwingbyMode::Shaped {
            altitude_km,
            aim_deg,
        } => (altitude_km, aim_deg),
        SwingbyMode::Targeted => panic!("Lantern's Venus swing-by is shaped"),
    };
    // Drag the lens' periapsis handle outwards by a few points, as a user would.
    let _ = (alt, aim);
    h.get_by_label("Swing-by lens").click();
    h.run_steps(3);
    let (handle, centre) = h.state().views.lens.handle.expect("the handle is drawn");
    let out = (handle - centre).normalized();
    h.hover_at(handle);
    h.run_steps(1);
    h.drag_at(handle);
    h.run_steps(1);
    for i in 1..=6 {
        h.hover_at(handle + out * (2.0 * i as f32));
        h.run_steps(1);
    }
    h.drop_at(handle + out * 12.0);
    h.run_steps(3);
    let moved = match h.state().design().stops[1].swingby.mode {
        SwingbyMode::Shaped { altitude_km, .. } => altitude_km - alt,
        SwingbyMode::Targeted => f64::NAN,
    };
    assert!(moved > 100.0, "the drag raised the periapsis by {moved} km");
    h.get_by_label("Sun view").click();
    h.run_steps(3);
    let app = h.state();
    assert_eq!(app.eval.first_unreached(), Some(2));
    assert!(
        app.eval
            .warnings
            .iter()
            .any(|w| w.to_string().contains("not reached")),
        "{:?}",
        app.eval.warnings
    );
    let rows: Vec<_> = app
        .events
        .rows
        .iter()
        .filter(|r| tourwright::mission::report::is_unreached_row(r))
        .collect();
    // Earth (stop 3), the DSM on leg 3 and Jupiter.
    assert_eq!(rows.len(), 3, "{:?}", app.events.rows);
    for r in &rows {
        // v∞ in, v∞ out, Δv, mass: no figures.
        for c in [5, 6, 18, 19] {
            assert_eq!(r[c].num(), None, "{r:?}");
        }
    }
    h.get_by_label("Swing-by lens").click();
    h.run_steps(3);
    h.get_by_label("3 Earth (not reached)").click();
    h.run_steps(3);
    let _ = h.get_by_label_contains("is not reached: the shaped swing-by at stop 2");
    h.get_by_label("Go to stop 2").click();
    h.run_steps(3);
    assert_eq!(h.state().selected, 1);
    h.get_by_label(View::Ladder.title()).click();
    h.run_steps(3);
    let _ = h.get_by_label_contains("the swing-by at stop 2 misses it");
    // Retarget from the lens puts the tour back together.
    h.get_by_label(View::Lens.title()).click();
    h.run_steps(2);
    h.get_by_label("3 Earth (not reached)").click();
    h.run_steps(3);
    h.get_all_by_label("Retarget").last().unwrap().click();
    h.run_steps(4);
    assert!(h.state().eval.first_unreached().is_none(), "{}", status(&h));
}

/// Shift on the manoeuvre marker: a fine drag, a tenth of the pointer's motion along the leg.
#[test]
fn a_shift_drag_moves_the_manoeuvre_a_tenth_as_far() {
    let mut h = harness(0);
    h.get_all_by_label("+ DSM").next().unwrap().click();
    h.run_steps(4);
    let f0 = h.state().eval.legs[0].dsm.unwrap().fraction;
    let drag = |h: &mut Harness<'static, TourwrightApp>, shift: bool| {
        let start = h.state().views.sun.dsm_markers[0].1;
        let venus = h.state().eval.stops[1].body_state.r;
        let here = h.state().eval.legs[0].dsm.unwrap().r;
        let dir =
            eframe::egui::vec2((venus.x - here.x) as f32, -(venus.y - here.y) as f32).normalized();
        // Shift held from before the press to after the release.
        h.event(eframe::egui::Event::ModifiersChanged(if shift {
            Modifiers::SHIFT
        } else {
            Modifiers::NONE
        }));
        h.hover_at(start);
        h.run_steps(1);
        h.drag_at(start);
        h.run_steps(1);
        for i in 1..=10 {
            h.hover_at(start + dir * (4.0 * i as f32));
            h.run_steps(1);
        }
        h.drop_at(start + dir * 40.0);
        h.run_steps(3);
        h.event(eframe::egui::Event::ModifiersChanged(Modifiers::NONE));
        h.state().eval.legs[0].dsm.unwrap().fraction
    };
    let coarse = drag(&mut h, false) - f0;
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
    assert!((h.state().eval.legs[0].dsm.unwrap().fraction - f0).abs() < 1e-12);
    let fine = drag(&mut h, true) - f0;
    assert!(coarse.abs() > 0.01, "the plain drag moved {coarse}");
    assert!(
        (fine / coarse - 0.1).abs() < 0.04,
        "fine {fine} vs coarse {coarse}"
    );
}

/// The launch period from its tab: the job runs (progress, then the result for this revision),
/// hovering a plot picks the nearest day, and a day's "open" makes its tour the design in one
/// undo step.
#[test]
fn launch_period_runs_from_its_tab_and_opens_a_day_as_one_undo_step() {
    let mut h = harness(0);
    h.get_by_label("Launch period").click();
    h.run_steps(3);
    // A short period on a small budget (the engine's own tests check convergence).
    {
        let o = &mut h.state_mut().views.period.options;
        assert_eq!((o.days, o.step_days), (21, 1.0), "the defaults");
        o.days = 5;
        o.step_days = 2.0;
        o.evals_per_day = 3_000;
    }
    h.get_by_label("Compute launch period").click();
    h.run_steps(2);
    assert!(
        h.state()
            .jobs
            .is_running(tourwright::gui::action::JobKind::Period)
    );
    wait_for_jobs(&mut h);
    let (days, launches, revision) = {
        let r = h.state().jobs.period.as_ref().expect("a result");
        let launches: Vec<_> = r.value.days.iter().map(|d| d.launch).collect();
        (r.value.days.len(), launches, r.revision)
    };
    assert_eq!(days, 5);
    assert_eq!(revision, h.state().doc.revision());
    // Two days apart, centred on the design's launch.
    let l0 = h.state().design().stops[0].epoch;
    assert!((launches[0].days() - (l0.days() - 4.0)).abs() < 1e-6);
    assert!((launches[4].days() - (l0.days() + 4.0)).abs() < 1e-6);
    assert!(
        status(&h).contains("launch period: 5 days"),
        "{}",
        status(&h)
    );
    // File › Export › the launch period's table, through the typed-path prompt.
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("period.csv");
    export_through_prompt(&mut h, "Launch period (CSV)", &target);
    let csv = std::fs::read_to_string(&target).unwrap();
    assert_eq!(csv.lines().count(), 1 + 5, "{csv}");
    let before = h.state().design().clone();
    // The table lies under the plots: scroll to its first row's button, as a user would.
    h.get_all_by_label("open").next().unwrap().scroll_to_me();
    h.run_steps(3);
    h.get_all_by_label("open").next().unwrap().hover();
    h.run_steps(2);
    h.get_all_by_label("open").next().unwrap().click();
    h.run_steps(3);
    let opened = h.state().design().clone();
    assert_ne!(opened, before);
    assert!((opened.stops[0].epoch.days() - launches[0].days()).abs() < 1e-6);
    assert_ledger_matches(&h, "after opening a launch day");
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
    assert_eq!(*h.state().design(), before, "one undo step returns");
}
