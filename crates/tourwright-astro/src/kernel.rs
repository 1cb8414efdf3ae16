//! JPL development ephemerides (DE421, DE440s, DE440, ...) read from SPICE SPK kernels through
//! the `anise` crate (Chebyshev segment types 2 and 3, which those files use).
//!
//! Which segments give each body (heliocentric = body − Sun, both from the solar-system
//! barycentre):
//! - Mercury, Venus, Earth, Mars: the planet centres (NAIF 199, 299, 399, 499) through their
//!   system barycentres (1-4). Note that Earth here is the planet, not the Earth-Moon barycentre
//!   the mean elements describe.
//! - Jupiter, Saturn, Uranus, Neptune, Pluto: the system barycentres (5-9); DE4xx planetary
//!   kernels carry no planet-centre segments for them.
//!
//! Frames: the kernels are in ICRF/J2000 (equatorial); states are rotated to ecliptic J2000 by the
//! IAU 2006 obliquity at J2000 (84381.406″), like the rest of the engine.
//!
//! A kernel is read once per process and path, and kept for the process's lifetime (a handful of
//! files at most), so the ephemeris handles stay `Copy` and cheap on the search's hot path.

use std::path::{Path, PathBuf};
use std::sync::Mutex;

use anise::prelude::{Almanac, Frame, SPK};

use crate::bodies::Planet;
use crate::source::{EphemerisError, equatorial_to_ecliptic};
use crate::time::{Epoch, Tdb, TimeScale};
use crate::{State, Vec3};

/// NAIF code of the Sun.
const SUN: i32 = 10;
/// J2000 orientation code.
const J2000: i32 = 1;

/// The NAIF code used for a planet and the chain of segments below it.
pub fn naif_id(p: Planet) -> i32 {
    match p {
        Planet::Mercury => 199,
        Planet::Venus => 299,
        Planet::Earth => 399,
        Planet::Mars => 499,
        Planet::Jupiter => 5,
        Planet::Saturn => 6,
        Planet::Uranus => 7,
        Planet::Neptune => 8,
        Planet::Pluto => 9,
    }
}

/// An SPK kernel, opened and checked.
pub struct SpkKernel {
    path: PathBuf,
    almanac: Almanac,
    /// Per planet (in `Planet::ALL` order): the instants the kernel covers, when it carries it.
    coverage: [Option<(Tdb, Tdb)>; 9],
}

impl std::fmt::Debug for SpkKernel {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "SpkKernel({})", self.path.display())
    }
}

impl PartialEq for SpkKernel {
    fn eq(&self, other: &Self) -> bool {
        self.path == other.path
    }
}

/// Kernels opened so far in this process: (canonical path, length, modification time, kernel).
type Opened = Vec<(
    PathBuf,
    u64,
    Option<std::time::SystemTime>,
    &'static SpkKernel,
)>;
static OPENED: Mutex<Opened> = Mutex::new(Vec::new());

fn iso(t: Tdb) -> String {
    Epoch::from_tdb(t, TimeScale::Tdb).to_string()
}

fn tdb_of(e: anise::prelude::Epoch) -> Tdb {
    Tdb(e.to_et_seconds())
}

impl SpkKernel {
    /// Open a kernel (or return the one already open for this file, unless it changed on disk).
    /// A missing, truncated or non-SPK file is an error naming the file.
    pub fn open(path: &Path) -> Result<&'static SpkKernel, EphemerisError> {
        let fail = |why: String| EphemerisError::Kernel(format!("{}: {why}", path.display()));
        let meta = std::fs::metadata(path).map_err(|e| fail(e.to_string()))?;
        if !meta.is_file() {
            return Err(fail("not a file".into()));
        }
        let canon = path.canonicalize().unwrap_or_else(|_| path.to_path_buf());
        let (len, mtime) = (meta.len(), meta.modified().ok());
        let mut opened = OPENED.lock().unwrap_or_else(|e| e.into_inner());
        if let Some((_, _, _, k)) = opened
            .iter()
            .find(|(p, l, m, _)| *p == canon && *l == len && *m == mtime)
        {
            return Ok(k);
        }
        let k = Self::read(path)?;
        let k: &'static SpkKernel = Box::leak(Box::new(k));
        opened.push((canon, len, mtime, k));
        Ok(k)
    }

    fn read(path: &Path) -> Result<SpkKernel, EphemerisError> {
        let fail = |why: String| EphemerisError::Kernel(format!("{}: {why}", path.display()));
        let bytes = std::fs::read(path).map_err(|e| fail(e.to_string()))?;
        if bytes.len() < 1024 || !bytes.starts_with(b"DAF/SPK") {
            return Err(fail(
                "not a SPICE SPK kernel (the file does not start with a DAF/SPK record)".into(),
            ));
        }
        // anise checks the DAF structure and each summary; a truncated file fails here or when
        // its segments are read below.
        let spk = std::panic::catch_unwind(|| SPK::parse(bytes))
            .map_err(|_| fail("unreadable SPK structure".into()))?
            .map_err(|e| fail(format!("not a readable SPK kernel ({e})")))?;
        let almanac = Almanac::default().with_spk(spk);
        let mut coverage = [None; 9];
        for (i, p) in Planet::ALL.iter().enumerate() {
            coverage[i] = Self::chain_domain(&almanac, naif_id(*p));
        }
        if coverage.iter().all(Option::is_none) {
            return Err(fail(
                "the kernel carries no planet relative to the Sun".into(),
            ));
        }
        let k = SpkKernel {
            path: path.to_path_buf(),
            almanac,
            coverage,
        };
        // Read one state of every body it carries: a truncated file fails here, not in a search.
        for (i, p) in Planet::ALL.iter().enumerate() {
            if let Some((a, b)) = k.coverage[i] {
                k.state_of(*p, Tdb(0.5 * (a.0 + b.0)))?;
            }
        }
        Ok(k)
    }

    /// The instants over which every segment from `id` down to the barycentre, and the Sun's,
    /// is covered; `None` when any is missing.
    fn chain_domain(almanac: &Almanac, id: i32) -> Option<(Tdb, Tdb)> {
        let mut ids = vec![id, SUN];
        if id > 100 {
            ids.push(id / 100);
        }
        let mut lo = f64::NEG_INFINITY;
        let mut hi = f64::INFINITY;
        for i in ids {
            let (a, b) = almanac.spk_domain(i).ok()?;
            lo = lo.max(tdb_of(a).0);
            hi = hi.min(tdb_of(b).0);
        }
        (lo < hi).then_some((Tdb(lo), Tdb(hi)))
    }

    /// The file this kernel was read from.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// The file name, for labels.
    pub fn file_name(&self) -> String {
        self.path
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_else(|| self.path.display().to_string())
    }

    /// The instants the kernel covers for `p`, when it carries it.
    pub fn coverage(&self, p: Planet) -> Option<(Tdb, Tdb)> {
        self.coverage[p as usize]
    }

    /// The instants covered for every planet the kernel carries (their intersection).
    pub fn range(&self) -> (Tdb, Tdb) {
        let mut lo = f64::NEG_INFINITY;
        let mut hi = f64::INFINITY;
        for (a, b) in self.coverage.iter().flatten() {
            lo = lo.max(a.0);
            hi = hi.min(b.0);
        }
        (Tdb(lo), Tdb(hi))
    }

    /// Heliocentric ecliptic J2000 state of `p` at `t`. Errors name the file, the body and the
    /// range covered.
    pub fn state_of(&self, p: Planet, t: Tdb) -> Result<State, EphemerisError> {
        let Some((a, b)) = self.coverage(p) else {
            return Err(EphemerisError::NoBody(format!(
                "{} has no segments for {} (NAIF {})",
                self.file_name(),
                p.name(),
                naif_id(p)
            )));
        };
        if !(t.0 >= a.0 && t.0 <= b.0) {
            return Err(EphemerisError::OutOfRange {
                epoch: format!("{} ({})", iso(t), p.name()),
                from: iso(a),
                to: format!("{} in {}", iso(b), self.file_name()),
            });
        }
        self.equatorial(p, t).map(|s| State {
            r: equatorial_to_ecliptic(&s.r),
            v: equatorial_to_ecliptic(&s.v),
        })
    }

    /// Heliocentric ICRF/J2000 (equatorial) state of `p` at `t`, as the kernel gives it.
    pub fn equatorial(&self, p: Planet, t: Tdb) -> Result<State, EphemerisError> {
        self.equatorial_naif(naif_id(p), t)
            .map_err(|err| EphemerisError::Kernel(format!("{}: {err}", p.name())))
    }

    /// Heliocentric ICRF/J2000 state of any NAIF body the kernel carries (3 for the Earth-Moon
    /// barycentre, say), no range check beyond the kernel's own.
    pub fn equatorial_naif(&self, id: i32, t: Tdb) -> Result<State, EphemerisError> {
        // SPICE's ephemeris time is TDB; anise reads segments at `to_et_seconds`, so the instant
        // goes in as ET seconds (hifitime's TDB and ET series differ by tens of microseconds,
        // metres at planetary speeds).
        let e = anise::prelude::Epoch::from_et_seconds(t.0);
        let s = self
            .almanac
            .translate_geometric(Frame::new(id, J2000), Frame::new(SUN, J2000), e)
            .map_err(|err| {
                EphemerisError::Kernel(format!(
                    "{}: NAIF {id} at {}: {err}",
                    self.file_name(),
                    iso(t)
                ))
            })?;
        let r = s.radius_km;
        let v = s.velocity_km_s;
        Ok(State {
            r: Vec3::new(r[0], r[1], r[2]),
            v: Vec3::new(v[0], v[1], v[2]),
        })
    }
}

/// The kernel used when a design asks for "the default kernel": set by the workbench's settings
/// or read from the `TOURWRIGHT_KERNEL` environment variable.
static DEFAULT_KERNEL: Mutex<Option<PathBuf>> = Mutex::new(None);

/// Set (or clear) the default kernel path.
pub fn set_default_kernel(path: Option<PathBuf>) {
    *DEFAULT_KERNEL.lock().unwrap_or_else(|e| e.into_inner()) = path;
}

/// The default kernel path: the one set, else `TOURWRIGHT_KERNEL`.
pub fn default_kernel() -> Option<PathBuf> {
    DEFAULT_KERNEL
        .lock()
        .unwrap_or_else(|e| e.into_inner())
        .clone()
        .or_else(|| std::env::var_os("TOURWRIGHT_KERNEL").map(PathBuf::from))
}
