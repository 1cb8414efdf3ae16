//! Search panel: the date optimiser and the sequence explorer, run as background jobs with
//! progress, cancel and "apply" (one undo step).

use eframe::egui::{self, RichText};

use tourwright_astro::bodies::Planet;
use tourwright_astro::time::Epoch;
use tourwright_mission::{Edit, Objective};
use tourwright_search::explore::{DsmPolicy, ExploreSpec};
use tourwright_search::optimize::OptimizeOptions;

use super::action::{Action, Actions, JobKind, JobRequest, Pending};
use super::app::ViewCtx;
use super::style;

/// Search settings (results live with the jobs).
pub struct SearchPanel {
    /// Optimiser objective.
    pub objective: Objective,
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
}

impl Default for SearchPanel {
    fn default() -> Self {
        SearchPanel {
            objective: Objective::TotalDvWithLaunchVinf,
            evals: 200_000,
            seed: 1,
            target: Planet::Jupiter,
            via: vec![Planet::Venus, Planet::Earth, Planet::Mars],
            max_swingbys: 2,
            max_tof_years: 7.0,
            launch: ("2030-01-01".into(), "2031-12-31".into()),
            evals_per_sequence: 40_000,
            dsm: DsmPolicy::None,
            error: None,
        }
    }
}

impl SearchPanel {
    /// The action that starts the optimiser with the panel's settings, or the reason it cannot.
    pub fn optimizer_request(&self, vc: &ViewCtx<'_>) -> Result<Action, String> {
        if self.objective.needs_vehicle() && vc.design.launch_vehicle.is_none() {
            return Err("delivered mass needs a launch-vehicle table".into());
        }
        Ok(Action::StartJob(JobRequest::Optimize(
            OptimizeOptions {
                seed: self.seed,
                max_evals: self.evals,
                ..Default::default()
            },
            self.objective,
        )))
    }

    /// Draw the panel.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let mut out = Vec::new();
        ui.heading("Search");
        ui.label(RichText::new("Date optimiser").strong());
        ui.label(
            RichText::new(
                "Varies the launch date and every leg's TOF within the design's search bounds; \
                 self-adaptive differential evolution on 4 islands, then a local polish.",
            )
            .weak(),
        );
        egui::ComboBox::from_label("objective")
            .selected_text(self.objective.label())
            .show_ui(ui, |ui| {
                for o in Objective::ALL {
                    ui.selectable_value(&mut self.objective, o, o.label());
                }
            });
        ui.horizontal(|ui| {
            style::labelled(
                ui,
                "budget",
                egui::DragValue::new(&mut self.evals)
                    .range(1_000..=20_000_000)
                    .speed(1000.0),
            );
            style::labelled(ui, "seed", egui::DragValue::new(&mut self.seed));
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
            let res = &r.value;
            ui.label(format!(
                "best {:.4} after {} evaluations{}",
                res.value,
                res.evaluations,
                if res.cancelled { " (cancelled)" } else { "" }
            ));
            if r.revision != vc.revision {
                ui.label(
                    RichText::new("the design changed since; applying replaces its dates").weak(),
                );
            }
            if ui
                .button("Apply the dates")
                .on_hover_text("One undo step")
                .clicked()
            {
                out.push(Action::Edit(Edit::ApplySchedule(res.schedule.clone())));
            }
            if !res.front.is_empty() {
                ui.label(format!(
                    "trade-off front: {} points from {:.0} to {:.0} days",
                    res.front.len(),
                    res.front[0].0,
                    res.front[res.front.len() - 1].0
                ));
                egui_plot::Plot::new("front")
                    .height(120.0)
                    .x_axis_label("total TOF (days)")
                    .show(ui, |pl| {
                        let pts: Vec<[f64; 2]> = res.front.iter().map(|p| [p.0, p.1]).collect();
                        pl.points(
                            egui_plot::Points::new("front", egui_plot::PlotPoints::from(pts))
                                .radius(2.5),
                        );
                    });
            }
        }
        ui.separator();
        self.explorer(ui, vc, &mut out);
        out
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
                egui::DragValue::new(&mut self.max_swingbys).range(0..=3),
            );
            style::labelled(
                ui,
                "max TOF",
                egui::DragValue::new(&mut self.max_tof_years)
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
            egui::DragValue::new(&mut self.evals_per_sequence)
                .range(1000..=2_000_000)
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
                            objective: self.objective,
                            evals_per_sequence: self.evals_per_sequence,
                            seed: self.seed,
                            shard: None,
                            dsm: self.dsm,
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
                "{} sequences, {} pruned, {} optimised",
                ex.enumerated,
                ex.pruned.len(),
                ex.ranked.len()
            ));
            egui::Grid::new("explore").striped(true).show(ui, |ui| {
                for h in ["sequence", "launch", "TOF d", "C3", "Δv", ""] {
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
