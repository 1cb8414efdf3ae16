//! Search panel: the date optimiser and the sequence explorer, run as background jobs with
//! progress, cancel and "apply" (one undo step).

use eframe::egui::{self, RichText};

use crate::astro::bodies::Planet;
use crate::astro::time::Epoch;
use crate::mission::design::Objective;
use crate::search::Job;
use crate::search::explore::{self, Exploration, ExploreSpec};
use crate::search::optimize::{self, OptimizeOptions, OptimizeResult, Problem};

use super::app::{GuiJob, Pending, TourwrightApp};
use super::compare::DirectUi;

/// Search settings and results.
pub struct SearchState {
    /// Direct-vs-assist options.
    pub direct: DirectUi,
    /// Optimiser objective.
    pub objective: Objective,
    /// Optimiser budget.
    pub evals: u64,
    /// Seed.
    pub seed: u64,
    /// Last optimiser result and the revision it started from.
    pub opt_result: Option<(OptimizeResult, u64)>,
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
    /// Last exploration.
    pub explore_result: Option<Exploration>,
    /// Form error.
    pub error: Option<String>,
}

impl Default for SearchState {
    fn default() -> Self {
        SearchState {
            direct: DirectUi::default(),
            objective: Objective::TotalDvWithLaunchVinf,
            evals: 200_000,
            seed: 1,
            opt_result: None,
            target: Planet::Jupiter,
            via: vec![Planet::Venus, Planet::Earth, Planet::Mars],
            max_swingbys: 2,
            max_tof_years: 7.0,
            launch: ("2030-01-01".into(), "2031-12-31".into()),
            evals_per_sequence: 40_000,
            explore_result: None,
            error: None,
        }
    }
}

fn objective_label(o: Objective) -> &'static str {
    match o {
        Objective::TotalDvWithLaunchVinf => "launch v∞ + Δv",
        Objective::SpacecraftDv => "spacecraft Δv (C3 under limit)",
        Objective::DeliveredMass => "delivered mass",
        Objective::TimeOfFlight => "time of flight",
    }
}

impl TourwrightApp {
    /// Start the optimiser on the current design.
    pub fn start_optimizer(&mut self) {
        let mut d = self.doc.design.clone();
        d.search.objective = self.search.objective;
        if d.search.objective == Objective::DeliveredMass && d.launch_vehicle.is_none() {
            self.search.error = Some("delivered mass needs a launch-vehicle table".into());
            return;
        }
        let p = Problem::from_design(&d);
        let opts = OptimizeOptions {
            seed: self.search.seed,
            max_evals: self.search.evals,
            ..Default::default()
        };
        let rev = self.doc.revision();
        self.jobs.retain(|j| !matches!(j, GuiJob::Optimize(..)));
        self.jobs.push(GuiJob::Optimize(
            Job::spawn("optimiser", move |pr| {
                optimize::optimize(&p, &opts, &pr, true)
            }),
            rev,
        ));
    }

    /// The right-hand Search panel.
    pub fn search_panel(&mut self, ui: &mut egui::Ui) {
        ui.heading("Search");
        ui.label(RichText::new("Date optimiser").strong());
        ui.label(RichText::new("Varies the launch date and every leg's TOF within the design's search bounds; self-adaptive differential evolution on 4 islands, then a local polish.").weak());
        egui::ComboBox::from_label("objective")
            .selected_text(objective_label(self.search.objective))
            .show_ui(ui, |ui| {
                for o in [
                    Objective::TotalDvWithLaunchVinf,
                    Objective::SpacecraftDv,
                    Objective::DeliveredMass,
                    Objective::TimeOfFlight,
                ] {
                    ui.selectable_value(&mut self.search.objective, o, objective_label(o));
                }
            });
        ui.horizontal(|ui| {
            super::style::labelled(
                ui,
                "budget",
                egui::DragValue::new(&mut self.search.evals)
                    .range(1_000..=20_000_000)
                    .speed(1000.0),
            );
            super::style::labelled(ui, "seed", egui::DragValue::new(&mut self.search.seed));
        });
        let running = self.jobs.iter().any(|j| matches!(j, GuiJob::Optimize(..)));
        ui.horizontal(|ui| {
            if ui
                .add_enabled(!running, egui::Button::new("Optimise dates"))
                .clicked()
            {
                self.start_optimizer();
            }
            if running && ui.button("Cancel").clicked() {
                for j in &self.jobs {
                    if matches!(j, GuiJob::Optimize(..)) {
                        j.cancel();
                    }
                }
            }
        });
        for j in &self.jobs {
            if let GuiJob::Optimize(job, _) = j {
                ui.add(
                    egui::ProgressBar::new(job.progress.fraction()).text(job.progress.message()),
                );
            }
        }
        if let Some((r, rev)) = &self.search.opt_result {
            ui.label(format!(
                "best {:.4} after {} evaluations{}",
                r.value,
                r.evaluations,
                if r.cancelled { " (cancelled)" } else { "" }
            ));
            let stale = *rev != self.doc.revision();
            if stale {
                ui.label(
                    RichText::new("the design changed since; applying replaces its dates").weak(),
                );
            }
            let apply = ui
                .button("Apply the dates")
                .on_hover_text("One undo step")
                .clicked();
            if !r.front.is_empty() {
                ui.label(format!(
                    "trade-off front: {} points from {:.0} to {:.0} days",
                    r.front.len(),
                    r.front[0].0,
                    r.front[r.front.len() - 1].0
                ));
                egui_plot::Plot::new("front")
                    .height(120.0)
                    .x_axis_label("total TOF (days)")
                    .show(ui, |pl| {
                        let pts: Vec<[f64; 2]> = r.front.iter().map(|p| [p.0, p.1]).collect();
                        pl.points(
                            egui_plot::Points::new("front", egui_plot::PlotPoints::from(pts))
                                .radius(2.5),
                        );
                    });
            }
            if apply {
                let epochs: Vec<Epoch> = r.design.stops.iter().map(|s| s.epoch).collect();
                if epochs.len() == self.doc.design.stops.len() {
                    self.doc.edit(|d| {
                        for (s, e) in d.stops.iter_mut().zip(&epochs) {
                            s.epoch = *e;
                        }
                    });
                } else {
                    self.status = Some((
                        "the design's stops changed since the run; not applied".into(),
                        true,
                    ));
                }
            }
        }
        ui.separator();
        ui.label(RichText::new("Sequence explorer").strong());
        ui.horizontal(|ui| {
            let lab = ui.label("from Earth to");
            egui::ComboBox::from_id_salt("target")
                .selected_text(self.search.target.name())
                .show_ui(ui, |ui| {
                    for p in Planet::ALL {
                        ui.selectable_value(&mut self.search.target, p, p.name());
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
                let mut on = self.search.via.contains(&p);
                if ui.checkbox(&mut on, p.letter()).changed() {
                    if on {
                        self.search.via.push(p);
                    } else {
                        self.search.via.retain(|x| *x != p);
                    }
                }
            }
        });
        ui.horizontal(|ui| {
            super::style::labelled(
                ui,
                "max swing-bys",
                egui::DragValue::new(&mut self.search.max_swingbys).range(0..=3),
            );
            super::style::labelled(
                ui,
                "max TOF",
                egui::DragValue::new(&mut self.search.max_tof_years)
                    .range(0.5..=20.0)
                    .speed(0.1)
                    .suffix(" y"),
            );
        });
        ui.horizontal(|ui| {
            super::style::labelled(
                ui,
                "launch",
                egui::TextEdit::singleline(&mut self.search.launch.0).desired_width(85.0),
            );
            super::style::labelled(
                ui,
                "..",
                egui::TextEdit::singleline(&mut self.search.launch.1).desired_width(85.0),
            );
        });
        ui.horizontal(|ui| {
            super::style::labelled(
                ui,
                "evaluations per sequence",
                egui::DragValue::new(&mut self.search.evals_per_sequence)
                    .range(1000..=2_000_000)
                    .speed(500.0),
            );
        });
        let running = self.jobs.iter().any(|j| matches!(j, GuiJob::Explore(..)));
        if ui
            .add_enabled(!running, egui::Button::new("Explore sequences"))
            .clicked()
        {
            match (
                Epoch::parse(&self.search.launch.0),
                Epoch::parse(&self.search.launch.1),
            ) {
                (Ok(a), Ok(b)) if b.tdb_s > a.tdb_s => {
                    self.search.error = None;
                    let spec = ExploreSpec {
                        from: Planet::Earth,
                        to: self.search.target,
                        launch: (a, b),
                        via: self.search.via.clone(),
                        max_swingbys: self.search.max_swingbys,
                        max_tof_years: self.search.max_tof_years,
                        objective: self.search.objective,
                        evals_per_sequence: self.search.evals_per_sequence,
                        seed: self.search.seed,
                    };
                    let mut template = self.doc.design.clone();
                    template.user_bodies.clear();
                    self.jobs
                        .push(GuiJob::Explore(Job::spawn("sequence explorer", move |p| {
                            explore::explore(&spec, &template, &p)
                        })));
                }
                _ => {
                    self.search.error =
                        Some("launch period: two dates, the second after the first".into())
                }
            }
        }
        if let Some(e) = &self.search.error {
            ui.label(
                RichText::new(format!("! {e}"))
                    .color(super::style::error_color(self.settings.dark)),
            );
        }
        for j in &self.jobs {
            if let GuiJob::Explore(job) = j {
                ui.add(
                    egui::ProgressBar::new(job.progress.fraction()).text(job.progress.message()),
                );
            }
        }
        let mut open = None;
        if let Some(ex) = &self.search.explore_result {
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
                for (i, c) in ex.ranked.iter().enumerate().take(30) {
                    let t = RichText::new(&c.label);
                    ui.label(if c.feasible { t } else { t.weak() });
                    ui.label(c.launch.to_date_utc());
                    ui.label(format!("{:.0}", c.tof_days));
                    ui.label(format!("{:.1}", c.c3));
                    ui.label(format!("{:.2}", c.dv_km_s));
                    if ui.small_button("open").clicked() {
                        open = Some(i);
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
        if let Some(i) = open {
            if let Some(c) = self
                .search
                .explore_result
                .as_ref()
                .map(|e| e.ranked[i].design.clone())
            {
                self.request(Pending::Replace(Box::new(c)));
            }
        }
    }
}
