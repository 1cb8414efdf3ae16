//! The workbench's main flows, driven headless with egui_kittest.

use eframe::egui::accesskit::Role;
use eframe::egui::{Key, Modifiers};
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use tourwright::gui::TourwrightApp;
use tourwright::mission::design::SwingbyMode;
use tourwright::mission::files;

fn harness(sample: usize) -> Harness<'static, TourwrightApp> {
    let mut app = TourwrightApp::on_sample(sample);
    app.native_dialogs = false;
    let mut h = Harness::builder()
        .with_size([1440.0, 900.0])
        .build_ui_state(|ui, app: &mut TourwrightApp| app.ui(ui), app);
    h.run_steps(3);
    h
}

fn altitude(h: &Harness<'_, TourwrightApp>, k: usize) -> f64 {
    match h.state().doc.design.stops[k].swingby.mode {
        SwingbyMode::Shaped { altitude_km, .. } => altitude_km,
        SwingbyMode::Targeted => f64::NAN,
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
    let slider = h.get_by_role_and_label(Role::Slider, "periapsis altitude (km)");
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
    let before = h.state().doc.design.clone();
    let date_field = || {
        |n: &egui_kittest::kittest::AccessKitNode<'_>| {
            n.role() == Role::TextInput && n.value().as_deref() == Some("2029-10-16")
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
        h.state().doc.design,
        before,
        "an invalid date must not change the design"
    );
}

#[test]
fn save_as_through_the_path_prompt_and_read_back() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("copy.tour.ron");
    let mut h = harness(2);
    h.get_by_label("File").click();
    h.run_steps(2);
    h.get_by_label_contains("Save as").click();
    h.run_steps(2);
    assert!(h.state().path_prompt.is_some());
    h.state_mut().path_prompt.as_mut().unwrap().1 = target.to_string_lossy().to_string();
    h.run_steps(1);
    h.get_by_label("OK").click();
    h.run_steps(3);
    let back = files::load(&target).unwrap();
    assert_eq!(back, h.state().doc.design);
    assert!(!h.state().doc.is_dirty());
    assert!(!h.state().title().starts_with('*'));
}

#[test]
fn broken_file_leaves_the_design_unchanged() {
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("bad.tour.ron");
    std::fs::write(&bad, "(format: \"tourwright-design\", version: 1, name: \"x\",\n stops: [(body: \"Earth\" epoch: \"2030-01-01\")])").unwrap();
    let mut h = harness(1);
    let before = h.state().doc.design.clone();
    h.get_by_label("File").click();
    h.run_steps(2);
    h.get_by_label_contains("Open…").click();
    h.run_steps(2);
    h.state_mut().path_prompt.as_mut().unwrap().1 = bad.to_string_lossy().to_string();
    h.run_steps(1);
    h.get_by_label("OK").click();
    h.run_steps(3);
    let err = h.state().error.clone().expect("an error dialog");
    assert!(err.contains("bad.tour.ron:2:"), "{err}");
    assert!(h.query_by_label_contains("unchanged").is_some());
    assert_eq!(h.state().doc.design, before);
    h.get_by_label("OK").click();
    h.run_steps(2);
    assert!(h.state().error.is_none());
}

#[test]
fn unsaved_changes_ask_before_new() {
    let mut h = harness(0);
    h.state_mut().doc.edit(|d| d.name = "changed".into());
    h.run_steps(1);
    h.key_press_modifiers(Modifiers::COMMAND, Key::N);
    h.run_steps(2);
    assert!(h.query_by_label("Unsaved changes").is_some());
    h.get_by_label("Cancel").click();
    h.run_steps(2);
    assert_eq!(h.state().doc.design.name, "changed");
    h.key_press_modifiers(Modifiers::COMMAND, Key::N);
    h.run_steps(2);
    h.get_by_label("Discard changes").click();
    h.run_steps(2);
    assert_eq!(h.state().doc.design.name, "Untitled tour");
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
    // A long optimiser run: the UI keeps building frames while it works, then cancel stops it.
    h.state_mut().search.evals = 50_000_000;
    h.state_mut().start_optimizer();
    let t = std::time::Instant::now();
    for _ in 0..20 {
        h.step();
    }
    assert!(
        !h.state().jobs.is_empty(),
        "the job should still be running"
    );
    // Twenty frames while the job runs on other threads (not a timing assertion: a blocked UI
    // thread would not return from step() until the job ended, which takes minutes here).
    assert!(t.elapsed().as_secs() < 60);
    for j in &h.state().jobs {
        j.cancel();
    }
    let t = std::time::Instant::now();
    while !h.state().jobs.is_empty() && t.elapsed().as_secs() < 60 {
        h.step();
        std::thread::sleep(std::time::Duration::from_millis(20));
    }
    assert!(h.state().jobs.is_empty(), "cancel did not stop the job");
}

#[test]
fn window_map_click_sets_the_leg_dates_as_one_undo_step() {
    use tourwright::search::job::Progress;
    use tourwright::search::window::{self, SecondAxis, WindowSpec};
    let mut h = harness(1);
    h.get_by_label("Window map").click();
    h.run_steps(2);
    let d = h.state().doc.design.clone();
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
    h.state_mut().window.leg = Some(0);
    h.state_mut().window_click(&map, 2, 7);
    h.run_steps(2);
    let (t0, t1) = map.epochs(2, 7);
    assert_eq!(h.state().doc.design.stops[0].epoch, t0);
    assert_eq!(h.state().doc.design.stops[1].epoch, t1);
    assert!((h.state().eval.launch.c3 - map.cell(2, 7).c3).abs() < 1e-6);
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(2);
    assert_eq!(h.state().doc.design.stops[0].epoch, a);
    assert_eq!(h.state().doc.design.stops[1].epoch, b);
}
