//! Long commands on a terminal: a progress bar on standard error (unless `--quiet` or standard
//! error is not a terminal), and Ctrl-C, which cancels the work so that the command can keep what
//! it found and end with exit status 130.

use std::io::IsTerminal as _;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::{Arc, Mutex, OnceLock, Weak};
use std::thread::JoinHandle;
use std::time::Duration;

use tourwright_search::Progress;

static QUIET: AtomicBool = AtomicBool::new(false);
static INTERRUPTED: AtomicBool = AtomicBool::new(false);
static WATCHED: Mutex<Vec<Weak<Progress>>> = Mutex::new(Vec::new());
static HANDLER: OnceLock<bool> = OnceLock::new();

/// Silence the progress bars (`--quiet`).
pub fn set_quiet(q: bool) {
    QUIET.store(q, Ordering::Relaxed);
}

/// True once Ctrl-C was pressed.
pub fn interrupted() -> bool {
    INTERRUPTED.load(Ordering::Relaxed)
}

/// Ctrl-C cancels every watched job (installed once per process).
fn install_handler() {
    HANDLER.get_or_init(|| {
        ctrlc::set_handler(|| {
            INTERRUPTED.store(true, Ordering::Relaxed);
            if let Ok(w) = WATCHED.lock() {
                for p in w.iter().filter_map(Weak::upgrade) {
                    p.cancel();
                }
            }
        })
        .is_ok()
    });
}

/// A job being watched: Ctrl-C cancels it and, on a terminal, a bar shows its progress. The bar
/// goes when the watch is dropped.
pub struct Watch {
    bar: Option<(JoinHandle<()>, Arc<AtomicBool>)>,
}

/// Watch `p` (labelled `what` on the bar).
pub fn watch(p: &Arc<Progress>, what: &str) -> Watch {
    install_handler();
    if let Ok(mut w) = WATCHED.lock() {
        w.retain(|x| x.strong_count() > 0);
        w.push(Arc::downgrade(p));
    }
    if QUIET.load(Ordering::Relaxed) || !std::io::stderr().is_terminal() {
        return Watch { bar: None };
    }
    let stop = Arc::new(AtomicBool::new(false));
    let (p, s, what) = (p.clone(), stop.clone(), what.to_string());
    let handle = std::thread::spawn(move || {
        let bar = indicatif::ProgressBar::new(1000);
        bar.set_style(
            indicatif::ProgressStyle::with_template("{prefix} [{bar:30}] {percent:>3}% {msg}")
                .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar())
                .progress_chars("=> "),
        );
        bar.set_prefix(what);
        while !s.load(Ordering::Relaxed) {
            bar.set_position((p.fraction() * 1000.0) as u64);
            bar.set_message(p.message());
            std::thread::sleep(Duration::from_millis(100));
        }
        bar.finish_and_clear();
    });
    Watch {
        bar: Some((handle, stop)),
    }
}

impl Drop for Watch {
    fn drop(&mut self) {
        if let Some((h, stop)) = self.bar.take() {
            stop.store(true, Ordering::Relaxed);
            let _ = h.join();
        }
    }
}
