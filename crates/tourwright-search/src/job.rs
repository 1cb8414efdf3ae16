//! Background jobs: a worker thread with shared progress, a best-so-far value, cancellation and a
//! result to collect. The GUI polls a job each frame; the CLI waits on it.

use std::sync::Arc;
use std::sync::Mutex;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};
use std::thread::JoinHandle;

/// Progress shared between a job and its watchers: work done, evaluations spent, the best value
/// so far, a status line, and cancellation. A child progress (for an inner search) has its own
/// work count but shares its parent's cancellation and adds its evaluations to the parent's.
#[derive(Debug, Default)]
pub struct Progress {
    done: AtomicU64,
    total: AtomicU64,
    evals: AtomicU64,
    best_bits: AtomicU64,
    cancel: AtomicBool,
    message: Mutex<String>,
    parent: Option<Arc<Progress>>,
}

impl Progress {
    /// A new shared progress with nothing done.
    pub fn new() -> Arc<Self> {
        let p = Progress::default();
        p.best_bits
            .store(f64::INFINITY.to_bits(), Ordering::Relaxed);
        Arc::new(p)
    }

    /// A progress for inner work: cancelling `self` cancels the child, and the child's
    /// evaluations count in `self` too.
    pub fn child(self: &Arc<Self>) -> Arc<Progress> {
        let p = Progress {
            parent: Some(self.clone()),
            ..Default::default()
        };
        p.best_bits
            .store(f64::INFINITY.to_bits(), Ordering::Relaxed);
        Arc::new(p)
    }

    /// Count objective evaluations (here and in every ancestor).
    pub fn count_evals(&self, n: u64) {
        self.evals.fetch_add(n, Ordering::Relaxed);
        if let Some(p) = &self.parent {
            p.count_evals(n);
        }
    }

    /// Objective evaluations counted so far (including children's).
    pub fn evaluations(&self) -> u64 {
        self.evals.load(Ordering::Relaxed)
    }
    /// Set the amount of work.
    pub fn set_total(&self, n: u64) {
        self.total.store(n, Ordering::Relaxed);
    }
    /// Add finished work.
    pub fn add(&self, n: u64) {
        self.done.fetch_add(n, Ordering::Relaxed);
    }
    /// Fraction done in [0, 1].
    pub fn fraction(&self) -> f32 {
        let t = self.total.load(Ordering::Relaxed);
        if t == 0 {
            0.0
        } else {
            (self.done.load(Ordering::Relaxed) as f64 / t as f64).min(1.0) as f32
        }
    }
    /// Record a best-so-far value (keeps the smaller).
    pub fn offer_best(&self, v: f64) {
        let mut cur = self.best_bits.load(Ordering::Relaxed);
        while v < f64::from_bits(cur) {
            match self.best_bits.compare_exchange_weak(
                cur,
                v.to_bits(),
                Ordering::Relaxed,
                Ordering::Relaxed,
            ) {
                Ok(_) => break,
                Err(x) => cur = x,
            }
        }
    }
    /// Best value so far (infinite when none).
    pub fn best(&self) -> f64 {
        f64::from_bits(self.best_bits.load(Ordering::Relaxed))
    }
    /// Ask the job to stop.
    pub fn cancel(&self) {
        self.cancel.store(true, Ordering::Relaxed);
    }
    /// True once cancellation was asked for, here or in an ancestor.
    pub fn is_cancelled(&self) -> bool {
        self.cancel.load(Ordering::Relaxed)
            || self.parent.as_ref().is_some_and(|p| p.is_cancelled())
    }
    /// Set the status line.
    pub fn set_message(&self, m: impl Into<String>) {
        if let Ok(mut g) = self.message.lock() {
            *g = m.into();
        }
    }
    /// The status line.
    pub fn message(&self) -> String {
        self.message.lock().map(|g| g.clone()).unwrap_or_default()
    }
}

/// State of a job as seen by a watcher.
#[derive(Debug)]
pub enum JobStatus<T> {
    /// Still working.
    Running,
    /// Finished with a result (taken once).
    Done(T),
    /// The worker panicked or the result was already taken.
    Failed(String),
}

/// A computation on its own thread.
pub struct Job<T: Send + 'static> {
    /// Shared progress.
    pub progress: Arc<Progress>,
    /// What the job is, for the status bar.
    pub label: String,
    handle: Option<JoinHandle<T>>,
}

impl<T: Send + 'static> Job<T> {
    /// Start `work` on a new thread; it receives the shared progress.
    pub fn spawn<F>(label: impl Into<String>, work: F) -> Self
    where
        F: FnOnce(Arc<Progress>) -> T + Send + 'static,
    {
        let progress = Progress::new();
        let p = progress.clone();
        let handle = std::thread::Builder::new()
            .name("tourwright-job".into())
            .spawn(move || work(p))
            .expect("the OS can start a thread");
        Job {
            progress,
            label: label.into(),
            handle: Some(handle),
        }
    }

    /// Non-blocking check.
    pub fn poll(&mut self) -> JobStatus<T> {
        match &self.handle {
            Some(h) if !h.is_finished() => JobStatus::Running,
            Some(_) => self.wait(),
            None => JobStatus::Failed("result already taken".into()),
        }
    }

    /// Block until the job ends.
    pub fn wait(&mut self) -> JobStatus<T> {
        match self.handle.take() {
            Some(h) => match h.join() {
                Ok(v) => JobStatus::Done(v),
                Err(_) => JobStatus::Failed("the job stopped on an internal error".into()),
            },
            None => JobStatus::Failed("result already taken".into()),
        }
    }
}
