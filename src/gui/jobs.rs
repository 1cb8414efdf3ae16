//! The workbench's background jobs: started from actions, polled each frame, never blocking it.
//! Each job carries the document generation and revision it was started for; a result that
//! arrives for another document is dropped, so an optimiser run started on one design can never
//! be applied to another. Opening or creating a design cancels every running job.

use std::sync::Arc;

use tourwright_mission::continuous::{self, Continuous, ContinuousOptions};
use tourwright_mission::evaluate::{EvalOptions, evaluate};
use tourwright_mission::fidelity::{self, Fidelity, FidelityOptions};
use tourwright_mission::{MissionDesign, PreparedTour};
use tourwright_search::direct::{self, DirectComparison};
use tourwright_search::explore::{self, Exploration};
use tourwright_search::optimize::{self, SearchOutcome};
use tourwright_search::period::{self, PeriodResult};
use tourwright_search::window::{self, WindowMap};
use tourwright_search::{Job, JobStatus, Progress};

use super::action::{JobKind, JobRequest};

enum Handle {
    Direct(Job<Option<DirectComparison>>),
    Window(Job<Result<WindowMap, String>>),
    Optimize(Job<Result<SearchOutcome, String>>),
    Explore(Job<Exploration>),
    Fidelity(Job<Result<Fidelity, String>>),
    Continuous(Job<Result<Continuous, String>>),
    Period(Job<Result<PeriodResult, String>>),
}

impl Handle {
    fn progress(&self) -> &Arc<Progress> {
        match self {
            Handle::Direct(j) => &j.progress,
            Handle::Window(j) => &j.progress,
            Handle::Optimize(j) => &j.progress,
            Handle::Explore(j) => &j.progress,
            Handle::Fidelity(j) => &j.progress,
            Handle::Continuous(j) => &j.progress,
            Handle::Period(j) => &j.progress,
        }
    }
}

/// A running job.
pub struct Running {
    /// What it is.
    pub kind: JobKind,
    /// The document generation it serves.
    pub generation: u64,
    /// The document revision it started from.
    pub revision: u64,
    handle: Handle,
}

impl Running {
    /// Shared progress (fraction, best value, message, cancel).
    pub fn progress(&self) -> &Arc<Progress> {
        self.handle.progress()
    }
}

/// A finished result with the revision it belongs to.
#[derive(Clone, Debug)]
pub struct ForRevision<T> {
    /// The result.
    pub value: T,
    /// The document revision it was computed from.
    pub revision: u64,
}

/// Running jobs and the latest results.
#[derive(Default)]
pub struct Jobs {
    /// Jobs still working.
    pub running: Vec<Running>,
    /// The latest direct-vs-assist comparison.
    pub direct: Option<ForRevision<DirectComparison>>,
    /// The latest optimiser outcome.
    pub optimum: Option<ForRevision<SearchOutcome>>,
    /// The latest exploration.
    pub exploration: Option<Exploration>,
    /// The latest n-body fidelity check.
    pub fidelity: Option<ForRevision<Fidelity>>,
    /// The latest continuous n-body trajectory.
    pub continuous: Option<ForRevision<Continuous>>,
    /// The latest launch period.
    pub period: Option<ForRevision<PeriodResult>>,
    /// A window map waiting to be shown.
    pub window: Option<WindowMap>,
    /// Results dropped because they belonged to another document.
    pub dropped: usize,
}

/// What polling finished, for the status bar.
pub enum Finished {
    /// A message (text, is an error).
    Message(String, bool),
}

impl Jobs {
    /// True when a job of this kind is running.
    pub fn is_running(&self, kind: JobKind) -> bool {
        self.running.iter().any(|r| r.kind == kind)
    }

    /// The progress of the running job of this kind, if any.
    pub fn progress_of(&self, kind: JobKind) -> Option<&Arc<Progress>> {
        self.running
            .iter()
            .find(|r| r.kind == kind)
            .map(Running::progress)
    }

    /// Start a job for `design` (document `generation`, `revision`). A job of the same kind that
    /// is still running is cancelled first.
    pub fn start(
        &mut self,
        request: JobRequest,
        design: &MissionDesign,
        generation: u64,
        revision: u64,
    ) {
        let kind = match &request {
            JobRequest::Direct(_) => JobKind::Direct,
            JobRequest::Window(_) => JobKind::Window,
            JobRequest::Optimize(..) => JobKind::Optimize,
            JobRequest::Explore(_) => JobKind::Explore,
            JobRequest::Fidelity => JobKind::Fidelity,
            JobRequest::Continuous => JobKind::Continuous,
            JobRequest::Period(_) => JobKind::Period,
        };
        self.cancel(kind);
        let d = design.clone();
        let label = kind.label();
        let handle = match request {
            JobRequest::Direct(o) => {
                Handle::Direct(Job::spawn(label, move |p| direct::compare(&d, &o, &p)))
            }
            JobRequest::Window(spec) => Handle::Window(Job::spawn(label, move |p| {
                window::compute(&d, &spec, &p).map_err(|e| e.to_string())
            })),
            JobRequest::Optimize(o, objective) => Handle::Optimize(Job::spawn(label, move |p| {
                let mut d = d;
                d.search.objective = objective;
                optimize::search_design(&d, &o, tourwright_mission::LimitSet::ALL, &p, true)
                    .map_err(|e| e.to_string())
            })),
            JobRequest::Explore(spec) => Handle::Explore(Job::spawn(label, move |p| {
                let mut template = d;
                template.user_bodies.clear();
                explore::explore(&spec, &template, &p)
            })),
            JobRequest::Fidelity => Handle::Fidelity(Job::spawn(label, move |p| {
                let tour = PreparedTour::prepare(&d).map_err(|e| e.to_string())?;
                let mut e = tourwright_mission::evaluate::Evaluation::default();
                evaluate(&tour, &EvalOptions::default(), &mut e);
                p.set_total(1000);
                let done = |f: f64| {
                    let now = (f * 1000.0) as u64;
                    let was = (p.fraction() * 1000.0).round() as u64;
                    p.add(now.saturating_sub(was));
                };
                fidelity::check(&tour, &e, &FidelityOptions::default(), &done, &|| {
                    p.is_cancelled()
                })
                .map_err(|e| e.to_string())
            })),
            JobRequest::Period(o) => Handle::Period(Job::spawn(label, move |p| {
                period::run(&d, &o, &p).map_err(|e| e.to_string())
            })),
            JobRequest::Continuous => Handle::Continuous(Job::spawn(label, move |p| {
                let tour = PreparedTour::prepare(&d).map_err(|e| e.to_string())?;
                let mut e = tourwright_mission::evaluate::Evaluation::default();
                evaluate(&tour, &EvalOptions::default(), &mut e);
                p.set_total(1000);
                let done = |f: f64| {
                    let now = (f.clamp(0.0, 1.0) * 1000.0) as u64;
                    let was = (p.fraction() * 1000.0).round() as u64;
                    p.add(now.saturating_sub(was));
                };
                let cancel = || p.is_cancelled();
                continuous::solve(&tour, &e, &ContinuousOptions::default(), &done, &cancel)
                    .map_err(|e| e.to_string())
            })),
        };
        self.running.push(Running {
            kind,
            generation,
            revision,
            handle,
        });
    }

    /// Ask every running job of a kind to stop (it is collected when it ends).
    pub fn cancel(&mut self, kind: JobKind) {
        for r in &self.running {
            if r.kind == kind {
                r.progress().cancel();
            }
        }
    }

    /// Ask every running job to stop and forget every result: another document is open.
    pub fn cancel_all(&mut self) {
        for r in &self.running {
            r.progress().cancel();
        }
        self.direct = None;
        self.optimum = None;
        self.window = None;
        self.fidelity = None;
        self.continuous = None;
        self.period = None;
    }

    /// Collect finished jobs. Results for another document generation are dropped.
    pub fn poll(&mut self, generation: u64) -> Vec<Finished> {
        let mut out = Vec::new();
        let mut keep = Vec::new();
        for mut r in std::mem::take(&mut self.running) {
            let current = r.generation == generation;
            let status = match &mut r.handle {
                Handle::Direct(j) => match j.poll() {
                    JobStatus::Running => None,
                    JobStatus::Done(v) => Some(
                        v.map(|c| {
                            if current {
                                self.direct = Some(ForRevision {
                                    value: c,
                                    revision: r.revision,
                                });
                            }
                        })
                        .ok_or("no direct transfer found in the launch period".to_string()),
                    ),
                    JobStatus::Failed(m) => Some(Err(m)),
                },
                Handle::Window(j) => match j.poll() {
                    JobStatus::Running => None,
                    JobStatus::Done(Ok(m)) => {
                        if current {
                            self.window = Some(m);
                        }
                        Some(Ok(()))
                    }
                    JobStatus::Done(Err(m)) | JobStatus::Failed(m) => Some(Err(m)),
                },
                Handle::Optimize(j) => match j.poll() {
                    JobStatus::Running => None,
                    JobStatus::Done(Ok(res)) => {
                        if current {
                            let what = if res.cancelled {
                                "optimiser cancelled; best so far"
                            } else {
                                "optimiser finished"
                            };
                            out.push(Finished::Message(
                                format!(
                                    "{what}: {}, {} ({} evaluations)",
                                    res.result.value_text(),
                                    res.result.limits_text(),
                                    res.evaluations
                                ),
                                !res.result.feasible(),
                            ));
                            self.optimum = Some(ForRevision {
                                value: res,
                                revision: r.revision,
                            });
                        }
                        Some(Ok(()))
                    }
                    JobStatus::Done(Err(m)) | JobStatus::Failed(m) => Some(Err(m)),
                },
                Handle::Explore(j) => match j.poll() {
                    JobStatus::Running => None,
                    JobStatus::Done(x) => {
                        if current {
                            self.exploration = Some(x);
                        }
                        Some(Ok(()))
                    }
                    JobStatus::Failed(m) => Some(Err(m)),
                },
                Handle::Continuous(j) => match j.poll() {
                    JobStatus::Running => None,
                    JobStatus::Done(Ok(c)) => {
                        if current {
                            out.push(Finished::Message(
                                format!("continuous n-body trajectory: {}", c.verdict()),
                                !c.converged,
                            ));
                            self.continuous = Some(ForRevision {
                                value: c,
                                revision: r.revision,
                            });
                        }
                        Some(Ok(()))
                    }
                    JobStatus::Done(Err(m)) | JobStatus::Failed(m) => Some(Err(m)),
                },
                Handle::Period(j) => match j.poll() {
                    JobStatus::Running => None,
                    JobStatus::Done(Ok(res)) => {
                        if current {
                            let broken = res.summary.days_breaking_limits.len();
                            let what = if res.cancelled {
                                "launch period cancelled"
                            } else {
                                "launch period"
                            };
                            out.push(Finished::Message(
                                format!(
                                    "{what}: {} days, {}",
                                    res.days.len(),
                                    if broken == 0 {
                                        "every day meets every limit".to_string()
                                    } else {
                                        format!("{broken} break a limit")
                                    }
                                ),
                                broken > 0,
                            ));
                            self.period = Some(ForRevision {
                                value: res,
                                revision: r.revision,
                            });
                        }
                        Some(Ok(()))
                    }
                    JobStatus::Done(Err(m)) | JobStatus::Failed(m) => Some(Err(m)),
                },
                Handle::Fidelity(j) => match j.poll() {
                    JobStatus::Running => None,
                    JobStatus::Done(Ok(f)) => {
                        if current {
                            let worst = f.encounters.iter().map(|c| c.miss_km).fold(0.0, f64::max);
                            out.push(Finished::Message(
                                format!("n-body check finished: largest miss {worst:.0} km"),
                                false,
                            ));
                            self.fidelity = Some(ForRevision {
                                value: f,
                                revision: r.revision,
                            });
                        }
                        Some(Ok(()))
                    }
                    JobStatus::Done(Err(m)) | JobStatus::Failed(m) => Some(Err(m)),
                },
            };
            match status {
                None => keep.push(r),
                Some(_) if !current => self.dropped += 1,
                Some(Ok(())) => {}
                // A job stopped by the user says so (its error is only the stop).
                Some(Err(_)) if r.progress().is_cancelled() => {
                    out.push(Finished::Message(
                        format!("{} cancelled", r.kind.label()),
                        false,
                    ));
                }
                Some(Err(m)) => out.push(Finished::Message(m, true)),
            }
        }
        self.running = keep;
        out
    }
}
