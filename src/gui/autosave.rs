//! Work that survives: a short while after each change the workbench writes the open design to an
//! autosave file in the platform's data folder (one per open document, written atomically: a
//! temporary file renamed over the old one). Saving or opening a design clears it; a clean exit
//! clears it; so an autosave found at start-up means the workbench ended uncleanly and the
//! design can be restored. A panic in the GUI thread writes the latest state before the process
//! ends, and never touches the design file itself.

use std::path::{Path, PathBuf};
use std::sync::Mutex;
use std::time::{Duration, Instant};

use tourwright_mission::{MissionDesign, files};

/// How long after a change the autosave is written.
pub const DELAY: Duration = Duration::from_secs(2);

/// An autosave found on disk.
#[derive(Clone, Debug, PartialEq)]
pub struct Recovered {
    /// The autosaved design file.
    pub file: PathBuf,
    /// The design's name.
    pub name: String,
    /// When it was written (UTC).
    pub saved_at: String,
    /// The file the design came from, if any.
    pub original: Option<PathBuf>,
}

/// What is written beside each autosave.
#[derive(Clone, Debug, serde::Serialize, serde::Deserialize)]
struct Meta {
    name: String,
    saved_at: String,
    original: Option<PathBuf>,
    pid: u32,
}

/// The autosave of one workbench.
#[derive(Debug)]
pub struct Autosave {
    dir: PathBuf,
    id: String,
    /// (revision, when it changed) not yet written.
    pending: Option<(u64, Instant)>,
    written: Option<u64>,
    /// The delay before writing (tests shorten it).
    pub delay: Duration,
}

/// The snapshot the panic hook writes: (folder, id, design text, meta).
type Snapshot = (PathBuf, String, String, Meta);
static SNAPSHOT: Mutex<Option<Snapshot>> = Mutex::new(None);

fn new_id() -> String {
    static COUNT: std::sync::atomic::AtomicU64 = std::sync::atomic::AtomicU64::new(0);
    let n = COUNT.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
    let t = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_millis())
        .unwrap_or(0);
    format!("doc-{}-{t}-{n}", std::process::id())
}

/// Write `text` to `path` atomically (the design files' own writer: a uniquely named temporary
/// file beside it, flushed, renamed over it). An interrupted write leaves the previous file as
/// it was.
pub fn write_atomic(path: &Path, text: &str) -> std::io::Result<()> {
    tourwright_mission::files::write_atomic(path, text.as_bytes())
        .map_err(|e| std::io::Error::other(e.to_string()))
}

fn write_snapshot(s: &Snapshot) -> std::io::Result<()> {
    let (dir, id, text, meta) = s;
    std::fs::create_dir_all(dir)?;
    write_atomic(&dir.join(format!("{id}.tour.ron")), text)?;
    let m = serde_json::to_string_pretty(meta).map_err(std::io::Error::other)?;
    write_atomic(&dir.join(format!("{id}.meta.json")), &m)
}

impl Autosave {
    /// Autosaves in `dir`.
    pub fn in_dir(dir: impl Into<PathBuf>) -> Autosave {
        Autosave {
            dir: dir.into(),
            id: new_id(),
            pending: None,
            written: None,
            delay: DELAY,
        }
    }

    /// Autosaves in the platform's data folder (`TOURWRIGHT_AUTOSAVE_DIR` overrides it).
    pub fn platform() -> Option<Autosave> {
        let dir = std::env::var_os("TOURWRIGHT_AUTOSAVE_DIR")
            .map(PathBuf::from)
            .or_else(|| eframe::storage_dir("Tourwright").map(|d| d.join("autosave")))?;
        Some(Autosave::in_dir(dir))
    }

    /// The folder.
    pub fn dir(&self) -> &Path {
        &self.dir
    }

    /// This document's autosave file.
    pub fn file(&self) -> PathBuf {
        self.dir.join(format!("{}.tour.ron", self.id))
    }

    fn snapshot(&self, d: &MissionDesign, original: Option<&Path>) -> Snapshot {
        (
            self.dir.clone(),
            self.id.clone(),
            files::to_string(d),
            Meta {
                name: d.name.clone(),
                saved_at: tourwright_astro::time::Epoch::now().to_iso_utc(),
                original: original.map(Path::to_path_buf),
                pid: std::process::id(),
            },
        )
    }

    /// Call once per frame: notes a change and writes it once `delay` has passed. Unchanged or
    /// saved designs write nothing.
    pub fn tick(
        &mut self,
        d: &MissionDesign,
        original: Option<&Path>,
        revision: u64,
        dirty: bool,
    ) -> std::io::Result<()> {
        if !dirty {
            self.pending = None;
            return Ok(());
        }
        if self.written == Some(revision) {
            return Ok(());
        }
        match self.pending {
            Some((r, _)) if r == revision => {}
            _ => {
                self.pending = Some((revision, Instant::now()));
                // The panic hook always has the latest state.
                let snap = self.snapshot(d, original);
                *SNAPSHOT.lock().unwrap_or_else(|e| e.into_inner()) = Some(snap);
            }
        }
        if let Some((r, since)) = self.pending {
            if since.elapsed() >= self.delay {
                self.write_now(d, original)?;
                self.written = Some(r);
                self.pending = None;
            }
        }
        Ok(())
    }

    /// True while a change waits to be written (the frame loop then wakes up in time).
    pub fn pending_write(&self) -> bool {
        self.pending.is_some()
    }

    /// Write the autosave now.
    pub fn write_now(&mut self, d: &MissionDesign, original: Option<&Path>) -> std::io::Result<()> {
        write_snapshot(&self.snapshot(d, original))
    }

    /// Remove this document's autosave (after a save, an open, a clean exit) and start afresh.
    pub fn clear(&mut self) {
        let _ = std::fs::remove_file(self.file());
        let _ = std::fs::remove_file(self.dir.join(format!("{}.meta.json", self.id)));
        let mut snap = SNAPSHOT.lock().unwrap_or_else(|e| e.into_inner());
        if snap.as_ref().is_some_and(|s| s.1 == self.id) {
            *snap = None;
        }
        self.pending = None;
        self.written = None;
    }

    /// Autosaves left by workbenches that are no longer running (this process's own excluded).
    pub fn orphans(dir: &Path) -> Vec<Recovered> {
        let Ok(rd) = std::fs::read_dir(dir) else {
            return Vec::new();
        };
        let mut out = Vec::new();
        for entry in rd.flatten() {
            let p = entry.path();
            let name = p.file_name().and_then(|n| n.to_str()).unwrap_or("");
            let Some(id) = name.strip_suffix(".tour.ron") else {
                continue;
            };
            let meta: Option<Meta> = std::fs::read_to_string(dir.join(format!("{id}.meta.json")))
                .ok()
                .and_then(|t| serde_json::from_str(&t).ok());
            if let Some(m) = &meta {
                if m.pid != std::process::id() && process_alive(m.pid) {
                    continue;
                }
            }
            let design_name = files::load(&p).map(|d| d.name).unwrap_or_default();
            out.push(Recovered {
                file: p.clone(),
                name: meta.as_ref().map(|m| m.name.clone()).unwrap_or(design_name),
                saved_at: meta
                    .as_ref()
                    .map(|m| m.saved_at.clone())
                    .unwrap_or_default(),
                original: meta.and_then(|m| m.original),
            });
        }
        out.sort_by(|a, b| b.saved_at.cmp(&a.saved_at));
        out
    }

    /// Delete a found autosave.
    pub fn discard(r: &Recovered) {
        let _ = std::fs::remove_file(&r.file);
        if let Some(stem) = r
            .file
            .file_name()
            .and_then(|n| n.to_str())
            .and_then(|n| n.strip_suffix(".tour.ron"))
        {
            let _ = std::fs::remove_file(r.file.with_file_name(format!("{stem}.meta.json")));
        }
    }
}

/// True when a process of that id is running (Linux's /proc; elsewhere unknown, so false and the
/// autosave is offered).
fn process_alive(pid: u32) -> bool {
    Path::new(&format!("/proc/{pid}")).exists()
}

/// Install (once) a panic hook that writes the latest autosave snapshot, then reports the panic
/// as before. The design's own file is never written here.
pub fn install_panic_hook() {
    static ONCE: std::sync::Once = std::sync::Once::new();
    ONCE.call_once(|| {
        let previous = std::panic::take_hook();
        std::panic::set_hook(Box::new(move |info| {
            let snap = SNAPSHOT.lock().ok().and_then(|s| s.clone());
            if let Some(s) = snap {
                match write_snapshot(&s) {
                    Ok(()) => eprintln!(
                        "tourwright: the workbench failed; your design \"{}\" was saved to {} and \
                         will be offered at the next start",
                        s.3.name,
                        s.0.join(format!("{}.tour.ron", s.1)).display()
                    ),
                    Err(e) => eprintln!("tourwright: the workbench failed; autosave failed: {e}"),
                }
            }
            previous(info);
        }));
    });
}
