//! Search panel: the date optimiser with its search bounds, and the sequence explorer, run as
//! background jobs with progress and cancel. An optimiser result is shown with its objective,
//! unit and every broken limit before it is applied; a result computed for another tour cannot
//! be applied, and one for an earlier state of this tour is judged again on the design as it is
//! now before it is applied (one undo step).

use eframe::egui::{self, DragValue, RichText};

use tourwright_astro::bodies::Planet;
use tourwright_astro::time::Epoch;
use tourwright_mission::design::{SearchBounds, TofBounds};
use tourwright_mission::{Assessment, Edit, LimitSet, MissionDesign, Objective, TourShape};
use tourwright_search::explore::{DsmPolicy, ExploreSpec};
use tourwright_search::optimize::{self, OptimizeOptions, SearchOutcome};

use super::action::{Action, Actions, JobKind, JobRequest, Pending};
use super::context::ViewCtx;
use super::style;

/// What applying a result would give on the design as it is now.
#[derive(Clone, Debug)]
pub enum Preview {
    /// The result fits this tour: applied now, it would be judged so.
    Fits(Assessment),
    /// The result cannot be applied, and why.
    Refused(String),
}

/// Search settings (results live with the jobs).
pub struct SearchPanel {
    /// Optimiser budget.
    pub evals: u64,
    /// Seed.
    pub seed: u64,
    /// Explorer target.
    pub target: Planet,
    /// Explorer swing-by bodies.
    pub via: Vec<Planet>,
    /// Largest number of swing-bys.
    pub max_swingbys: usize,
    /// Largest TOF, years.
    pub max_tof_years: f64,
    /// Launch period text.
    pub launch: (String, String),
    /// Evaluations per sequence.
    pub evals_per_sequence: u64,
    /// Which legs get a deep-space manoeuvre.
    pub dsm: DsmPolicy,
    /// Form error.
    pub error: Option<String>,
    /// A launch-window date being typed: (0 earliest or 1 latest, text).
    window_edit: Option<(usize, String)>,
    /// Why the typed launch-window date was refused.
    window_error: Option<String>,
    /// The last preview of a stale result: (design revision, result's evaluations, preview).
    preview: Option<(u64, u64, Preview)>,
}

impl Default for SearchPanel {
    fn default() -> Self {
        SearchPanel {
            evals: optimize::DEFAULT_EVALS,
            seed: 1,
            target: Planet::Jupiter,
            via: vec![Planet::Venus, Planet::Earth, Planet::Mars],
            max_swingbys: 2,
            max_tof_years: 7.0,
            launch: ("2030-01-01".into(), "2031-12-31".into()),
            evals_per_sequence: tourwright_search::explore::DEFAULT_EVALS_PER_SEQUENCE,
            dsm: DsmPolicy::default(),
            error: None,
            window_edit: None,
            window_error: None,
            preview: None,
        }
    }
}

/// What a result would give applied to `d` now: refused when it was computed for another shape
/// of tour, else judged as `eval` judges the design.
pub fn preview(o: &SearchOutcome, d: &MissionDesign) -> Preview {
    if let Some(why) = o.shape.mismatch(&TourShape::of(d)) {
        return Preview::Refused(why);
    }
    let mut next = d.clone();
    next.search.objective = o.result.objective;
    match Edit::ApplySchedule(o.schedule.clone()).apply(&mut next) {
        Ok(()) => Preview::Fits(optimize::writeback::assess(&next, o.limits)),
        Err(e) => Preview::Refused(e.to_string()),
    }
}

impl SearchPanel {
    /// The action that starts the optimiser with the panel's settings, or the reason it cannot.
    pub fn optimizer_request(&self, vc: &ViewCtx<'_>) -> Result<Action, String> {
        let objective = vc.design.search.objective;
        if objective.needs_vehicle() && vc.design.launch_vehicle.is_none() {
            return Err("delivered mass needs a launch-vehicle table".into());
        }
        Ok(Action::StartJob(JobRequest::Optimize(
            OptimizeOptions {
                seed: self.seed,
                max_evals: self.evals,
                ..Default::default()
            },
            objective,
        )))
    }

    /// Drop typed text and cached previews (another document, undo, redo).
    pub fn forget_edits(&mut self) {
        self.window_edit = None;
        self.window_error = None;
        self.preview = None;
    }

    /// Draw the panel.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let mut out = Vec::new();
        ui.heading("Search");
        ui.label(RichText::new("Date optimiser").strong());
        ui.label(
            RichText::new(
                "Varies the launch date, every leg's time of flight and the manoeuvre and \
                 shaped swing-by variables within the search bounds below. The design itself \
                 is the first candidate: when it meets every limit, the result is never worse.",
            )
            .weak(),
        );
        // The design's own objective (`search.objective`, what `tourwright optimize` uses by
        // default): a change is an edit of the design, undone like any other.
        let lab = ui.label("objective");
        let current = vc.design.search.objective;
        let mut chosen = current;
        egui::ComboBox::from_id_salt("objective")
            .selected_text(format!("{} ({})", current.label(), current.unit()))
            .show_ui(ui, |ui| {
                for o in Objective::ALL {
                    ui.selectable_value(&mut chosen, o, format!("{} ({})", o.label(), o.unit()));
                }
            })
            .response
            .labelled_by(lab.id);
        if chosen != current {
            out.push(Action::Edit(Edit::SetObjective(chosen)));
        }
        ui.horizontal(|ui| {
            style::labelled(
                ui,
                "budget",
                DragValue::new(&mut self.evals)
                    .range(1_000..=50_000_000)
                    .speed(1000.0)
                    .suffix(" evaluations"),
            )
            .on_hover_text(
                "The search never spends more; a larger budget never gives a worse result",
            );
            style::labelled(ui, "seed", DragValue::new(&mut self.seed));
        });
        let running = vc.jobs.is_running(JobKind::Optimize);
        ui.horizontal(|ui| {
            if ui
                .add_enabled(!running, egui::Button::new("Optimise dates"))
                .clicked()
            {
                match self.optimizer_request(vc) {
                    Ok(a) => {
                        self.error = None;
                        out.push(a);
                    }
                    Err(e) => self.error = Some(e),
                }
            }
            if running && ui.button("Cancel").clicked() {
                out.push(Action::CancelJobs(JobKind::Optimize));
            }
        });
        if let Some(p) = vc.jobs.progress_of(JobKind::Optimize) {
            ui.add(egui::ProgressBar::new(p.fraction()).text(p.message()));
        }
        if let Some(r) = &vc.jobs.optimum {
            self.outcome(ui, vc, &r.value, r.revision, &mut out);
        }
        egui::CollapsingHeader::new("Search bounds")
            .default_open(true)
            .show(ui, |ui| self.bounds(ui, vc, &mut out));
        ui.separator();
        self.explorer(ui, vc, &mut out);
        out
    }

    /// The optimiser's outcome: what was found, start and result with their unit, broken limits,
    /// and Apply — refused for another tour, judged again for a changed one.
    fn outcome(
        &mut self,
        ui: &mut egui::Ui,
        vc: &ViewCtx<'_>,
        o: &SearchOutcome,
        revision: u64,
        out: &mut Actions,
    ) {
        let dark = vc.dark;
        let lines = o.lines();
        for (i, l) in lines.iter().enumerate() {
            let t = RichText::new(l);
            ui.add(
                egui::Label::new(if i == 0 && !o.feasible() {
                    t.color(style::error_color(dark)).strong()
                } else if i == 0 {
                    t.strong()
                } else {
                    t
                })
                .wrap(),
            );
        }
        let stale = revision != vc.revision;
        let pv = if stale || o.shape.mismatch(&TourShape::of(vc.design)).is_some() {
            let key = (vc.revision, o.evaluations);
            match &self.preview {
                Some((r, n, p)) if (*r, *n) == key => p.clone(),
                _ => {
                    let p = preview(o, vc.design);
                    self.preview = Some((key.0, key.1, p.clone()));
                    p
                }
            }
        } else {
            Preview::Fits(o.result.clone())
        };
        match pv {
            Preview::Refused(why) => {
                ui.label(
                    RichText::new(format!(
                        "This result cannot be applied: {why}. Run the optimiser again."
                    ))
                    .color(style::error_color(dark)),
                );
            }
            Preview::Fits(a) => {
                if stale {
                    ui.label(
                        RichText::new(format!(
                            "The design changed since this search. Applied to the design as it \
                             is now, the result gives {}, {}.",
                            a.value_text(),
                            a.limits_text()
                        ))
                        .color(style::warn_color(dark)),
                    );
                    for l in a.breach_lines() {
                        ui.label(format!("  - {l}"));
                    }
                }
                if o.kept_start && !stale {
                    ui.label(
                        RichText::new("Nothing to apply: the design is the best found.").weak(),
                    );
                } else {
                    let label = if a.feasible() {
                        "Apply".to_string()
                    } else {
                        format!("Apply anyway ({})", a.limits_text())
                    };
                    let mut hover = String::from("One undo step.");
                    for l in a.breach_lines() {
                        hover.push_str("\n- ");
                        hover.push_str(&l);
                    }
                    if ui.button(label).on_hover_text(hover).clicked() {
                        out.push(Action::Edit(Edit::ApplySchedule(o.schedule.clone())));
                    }
                }
            }
        }
        if !o.front.is_empty() {
            let obj = o.result.objective;
            ui.add_space(6.0);
            ui.label(format!(
                "trade-off front: {} points from {:.0} to {:.0} days",
                o.front.len(),
                o.front[0].0,
                o.front[o.front.len() - 1].0
            ));
            egui_plot::Plot::new("front")
                .height(120.0)
                .x_axis_label("total TOF (days)")
                .y_axis_label(format!("objective ({})", obj.unit()))
                .show(ui, |pl| {
                    let pts: Vec<[f64; 2]> = o
                        .front
                        .iter()
                        .map(|p| [p.0, obj.display_value(p.1)])
                        .collect();
                    pl.points(
                        egui_plot::Points::new("front", egui_plot::PlotPoints::from(pts))
                            .radius(2.5),
                    );
                });
        }
    }

    /// The search bounds as the optimiser will use them: the design's own where it sets them,
    /// the defaults (marked) elsewhere. Every change is an edit of the design.
    fn bounds(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>, out: &mut Actions) {
        let d = vc.design;
        let sb = &d.search;
        let (w0, w1) = d.launch_window();
        let dark = vc.dark;
        ui.horizontal(|ui| {
            for (i, (name, e, set)) in [
                ("launch from", w0, sb.launch_earliest.is_some()),
                ("to", w1, sb.launch_latest.is_some()),
            ]
            .into_iter()
            .enumerate()
            {
                let lab = ui.label(name);
                let mut text = match &self.window_edit {
                    Some((j, t)) if *j == i => t.clone(),
                    _ => e.to_date_utc(),
                };
                let r = ui
                    .add(
                        egui::TextEdit::singleline(&mut text)
                            .desired_width(82.0)
                            .id_salt(("window", i)),
                    )
                    .labelled_by(lab.id)
                    .on_hover_text(if set {
                        "set in the design"
                    } else {
                        "default: 60 days either side of the launch date"
                    });
                if r.changed() {
                    self.window_edit = Some((i, text.clone()));
                }
                if r.lost_focus() && self.window_edit.as_ref().is_some_and(|(j, _)| *j == i) {
                    match Epoch::parse(&text) {
                        Ok(t) => {
                            let mut s = sb.clone();
                            if i == 0 {
                                s.launch_earliest = Some(t);
                            } else {
                                s.launch_latest = Some(t);
                            }
                            let (a, b) = (
                                s.launch_earliest.unwrap_or(w0),
                                s.launch_latest.unwrap_or(w1),
                            );
                            if b.tdb().0 < a.tdb().0 {
                                self.window_error =
                                    Some("the launch window would end before it starts".into());
                            } else {
                                out.push(Action::Edit(Edit::SetSearch(s)));
                                self.window_edit = None;
                                self.window_error = None;
                            }
                        }
                        Err(e) => self.window_error = Some(e.to_string()),
                    }
                }
            }
        });
        if sb.launch_earliest.is_none() || sb.launch_latest.is_none() {
            ui.label(RichText::new("(default window: launch date ± 60 days)").weak());
        }
        if let Some(e) = &self.window_error {
            ui.label(RichText::new(format!("! {e}")).color(style::error_color(dark)));
        }
        let n = d.stops.len();
        egui::Grid::new("leg-bounds").num_columns(3).show(ui, |ui| {
            for k in 0..n.saturating_sub(1) {
                let b = d.tof_bounds(k);
                let set = k < sb.leg_tof.len();
                let (mut lo, mut hi) = (b.min_days, b.max_days);
                let lab = ui.label(format!(
                    "leg {} {}-{}{}",
                    k + 1,
                    letter(&d.stops[k].body),
                    letter(&d.stops[k + 1].body),
                    if set { "" } else { " (default)" }
                ));
                let r1 = ui
                    .add(
                        DragValue::new(&mut lo)
                            .range(1.0..=hi)
                            .speed(1.0)
                            .suffix(" d"),
                    )
                    .labelled_by(lab.id)
                    .on_hover_text("shortest time of flight of the leg");
                let r2 = ui
                    .add(
                        DragValue::new(&mut hi)
                            .range(lo..=1e5)
                            .speed(1.0)
                            .suffix(" d"),
                    )
                    .labelled_by(lab.id)
                    .on_hover_text("longest time of flight of the leg");
                if r1.changed() || r2.changed() {
                    let mut s = sb.clone();
                    s.leg_tof = (0..n - 1).map(|j| d.tof_bounds(j)).collect();
                    s.leg_tof[k] = TofBounds {
                        min_days: lo,
                        max_days: hi.max(lo),
                    };
                    out.push(Action::EditLive(Edit::SetSearch(s)));
                }
                ui.end_row();
            }
        });
        ui.horizontal(|ui| {
            let mut on = sb.max_total_tof_days.is_some();
            let mut v = sb
                .max_total_tof_days
                .unwrap_or(d.total_tof_days().ceil().max(1.0));
            let cb = ui.checkbox(&mut on, "max total TOF");
            let r = ui
                .add_enabled(on, DragValue::new(&mut v).range(1.0..=1e5).suffix(" d"))
                .labelled_by(cb.id);
            let mut s = sb.clone();
            if cb.changed() {
                s.max_total_tof_days = on.then_some(v);
                out.push(Action::Edit(Edit::SetSearch(s)));
            } else if r.changed() {
                s.max_total_tof_days = Some(v);
                out.push(Action::EditLive(Edit::SetSearch(s)));
            }
        });
        if ui
            .button("Use the default bounds")
            .on_hover_text(
                "Launch date ± 60 days; each leg's time of flight ± 30 %; no total limit",
            )
            .clicked()
        {
            out.push(Action::Edit(Edit::SetSearch(SearchBounds {
                launch_earliest: None,
                launch_latest: None,
                leg_tof: Vec::new(),
                max_total_tof_days: None,
                ..sb.clone()
            })));
            self.forget_edits();
        }
    }

    fn explorer(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>, out: &mut Actions) {
        ui.label(RichText::new("Sequence explorer").strong());
        ui.horizontal(|ui| {
            let lab = ui.label("from Earth to");
            egui::ComboBox::from_id_salt("target")
                .selected_text(self.target.name())
                .show_ui(ui, |ui| {
                    for p in Planet::ALL {
                        ui.selectable_value(&mut self.target, p, p.name());
                    }
                })
                .response
                .labelled_by(lab.id);
        });
        ui.horizontal_wrapped(|ui| {
            ui.label("swing-bys at");
            for p in [
                Planet::Mercury,
                Planet::Venus,
                Planet::Earth,
                Planet::Mars,
                Planet::Jupiter,
                Planet::Saturn,
            ] {
                let mut on = self.via.contains(&p);
                if ui.checkbox(&mut on, p.letter()).changed() {
                    if on {
                        self.via.push(p);
                    } else {
                        self.via.retain(|x| *x != p);
                    }
                }
            }
        });
        ui.horizontal(|ui| {
            style::labelled(
                ui,
                "max swing-bys",
                DragValue::new(&mut self.max_swingbys).range(0..=3),
            );
            style::labelled(
                ui,
                "max TOF",
                DragValue::new(&mut self.max_tof_years)
                    .range(0.5..=20.0)
                    .speed(0.1)
                    .suffix(" y"),
            );
        });
        ui.horizontal(|ui| {
            style::labelled(
                ui,
                "launch",
                egui::TextEdit::singleline(&mut self.launch.0).desired_width(85.0),
            );
            style::labelled(
                ui,
                "..",
                egui::TextEdit::singleline(&mut self.launch.1).desired_width(85.0),
            );
        });
        style::labelled(
            ui,
            "evaluations per sequence",
            DragValue::new(&mut self.evals_per_sequence)
                .range(1000..=20_000_000)
                .speed(500.0),
        );
        ui.horizontal(|ui| {
            let lab = ui.label("deep-space manoeuvres").on_hover_text(
                "Give legs a manoeuvre (MGA-1DSM) so that v∞-leveraging sequences such as \
                 E-E-J rank fairly; the swing-by before such a leg is unpowered",
            );
            let words = |p: DsmPolicy| {
                DsmPolicy::ALL
                    .iter()
                    .find(|x| x.0 == p)
                    .map(|x| x.2)
                    .unwrap_or("")
            };
            egui::ComboBox::from_id_salt("explore-dsm")
                .selected_text(words(self.dsm))
                .show_ui(ui, |ui| {
                    for (p, _, w) in DsmPolicy::ALL {
                        ui.selectable_value(&mut self.dsm, p, w);
                    }
                })
                .response
                .labelled_by(lab.id);
        });
        let running = vc.jobs.is_running(JobKind::Explore);
        ui.horizontal(|ui| {
            if ui
                .add_enabled(!running, egui::Button::new("Explore sequences"))
                .clicked()
            {
                match (Epoch::parse(&self.launch.0), Epoch::parse(&self.launch.1)) {
                    (Ok(a), Ok(b)) if b.tdb().0 > a.tdb().0 => {
                        self.error = None;
                        out.push(Action::StartJob(JobRequest::Explore(ExploreSpec {
                            from: Planet::Earth,
                            to: self.target,
                            launch: (a, b),
                            via: self.via.clone(),
                            max_swingbys: self.max_swingbys,
                            max_tof_years: self.max_tof_years,
                            objective: vc.design.search.objective,
                            evals_per_sequence: self.evals_per_sequence,
                            seed: self.seed,
                            shard: None,
                            dsm: self.dsm,
                            limits: LimitSet::ALL,
                        })));
                    }
                    _ => {
                        self.error =
                            Some("launch period: two dates, the second after the first".into())
                    }
                }
            }
            if running && ui.button("Cancel").clicked() {
                out.push(Action::CancelJobs(JobKind::Explore));
            }
        });
        if let Some(e) = &self.error {
            ui.label(RichText::new(format!("! {e}")).color(style::error_color(vc.dark)));
        }
        if let Some(p) = vc.jobs.progress_of(JobKind::Explore) {
            ui.add(egui::ProgressBar::new(p.fraction()).text(p.message()));
        }
        if let Some(ex) = &vc.jobs.exploration {
            ui.label(format!(
                "{} sequences, {} pruned, {} optimised; limits of the open design's spacecraft \
                 and launch vehicle",
                ex.enumerated,
                ex.pruned.len(),
                ex.ranked.len()
            ));
            let unit = ex.ranked.first().map(|c| c.objective.unit()).unwrap_or("");
            egui::Grid::new("explore").striped(true).show(ui, |ui| {
                for h in [
                    "sequence",
                    "launch",
                    "TOF d",
                    "C3",
                    "Δv",
                    &format!("objective ({unit})"),
                    "limits",
                    "",
                ] {
                    ui.label(RichText::new(h).strong());
                }
                ui.end_row();
                for c in ex.ranked.iter().take(30) {
                    let t = RichText::new(&c.label);
                    ui.label(if c.feasible { t } else { t.weak() });
                    ui.label(c.launch.to_date_utc());
                    ui.label(style::fixed(c.tof_days, 0));
                    ui.label(style::fixed(c.c3, 1));
                    ui.label(style::fixed(c.dv_km_s, 2));
                    ui.label(style::fixed(
                        c.objective.display_value(c.value),
                        c.objective.decimals().min(3),
                    ));
                    if c.feasible {
                        ui.label("met");
                    } else {
                        let first = c.breaches.first().cloned().unwrap_or_default();
                        let short: String = first.chars().take(28).collect();
                        ui.label(
                            RichText::new(format!(
                                "broken: {short}{}",
                                if first.chars().count() > 28 {
                                    "…"
                                } else {
                                    ""
                                }
                            ))
                            .color(style::warn_color(vc.dark)),
                        )
                        .on_hover_text(c.breaches.join("\n"));
                    }
                    if ui.small_button("open").clicked() {
                        out.push(Action::Request(Pending::Replace(Box::new(
                            c.design.clone(),
                        ))));
                    }
                    ui.end_row();
                }
            });
            if !ex.pruned.is_empty() {
                egui::CollapsingHeader::new(format!("{} pruned", ex.pruned.len())).show(ui, |ui| {
                    for (s, why) in ex.pruned.iter().take(60) {
                        ui.label(format!("{s}: {why}"));
                    }
                });
            }
        }
    }
}

/// The sequence letter of a body name (planets), or the name.
fn letter(name: &str) -> String {
    Planet::from_name(name)
        .map(|p| p.letter().to_string())
        .unwrap_or_else(|| name.to_string())
}
