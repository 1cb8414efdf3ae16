//! Loading and saving design files (`*.tour.ron`): versioned RON, errors that say file, line,
//! column and reason, validation that names the field, and atomic saves (write a temporary file in
//! the same folder, then rename it over the old one).

use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};

use crate::design::{ArrivalGoal, FORMAT_TAG, FORMAT_VERSION, MissionDesign, SwingbyMode};
use crate::tour::Catalog;

/// Why a design file could not be read or written.
#[derive(Debug, thiserror::Error)]
pub enum FileError {
    /// The file system refused.
    #[error("{path}: {source}")]
    Io {
        /// The file.
        path: PathBuf,
        /// What the system said.
        source: std::io::Error,
    },
    /// The text is not a valid design file.
    #[error("{path}:{line}:{column}: {reason}")]
    Parse {
        /// The file.
        path: PathBuf,
        /// 1-based line.
        line: usize,
        /// 1-based column.
        column: usize,
        /// What is wrong.
        reason: String,
    },
    /// The file parsed but a value is not acceptable.
    #[error("{path}: {field}: {reason}")]
    Invalid {
        /// The file.
        path: PathBuf,
        /// The field, e.g. `stops[2].epoch`.
        field: String,
        /// What is wrong.
        reason: String,
    },
}

/// A validation problem, before a path is attached.
#[derive(Clone, Debug, PartialEq)]
pub struct Invalid {
    /// The field.
    pub field: String,
    /// Why.
    pub reason: String,
}

impl std::fmt::Display for Invalid {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}: {}", self.field, self.reason)
    }
}

fn bad(field: impl Into<String>, reason: impl Into<String>) -> Invalid {
    Invalid {
        field: field.into(),
        reason: reason.into(),
    }
}

/// Check a design for values a file or a user can get wrong. The first problem is returned.
pub fn validate(d: &MissionDesign) -> Result<(), Invalid> {
    if d.format != FORMAT_TAG {
        return Err(bad(
            "format",
            format!("expected \"{FORMAT_TAG}\", found \"{}\"", d.format),
        ));
    }
    if d.version == 0 || d.version > FORMAT_VERSION {
        return Err(bad(
            "version",
            format!(
                "version {} is not supported (this program reads 1 to {FORMAT_VERSION})",
                d.version
            ),
        ));
    }
    for (i, u) in d.user_bodies.iter().enumerate() {
        let f = |x: &str| format!("user_bodies[{i}].{x}");
        if u.name.trim().is_empty() {
            return Err(bad(f("name"), "empty name"));
        }
        if tourwright_astro::bodies::Planet::from_name(&u.name).is_some() {
            return Err(bad(
                f("name"),
                format!("'{}' is a catalogue planet", u.name),
            ));
        }
        if d.user_bodies[..i]
            .iter()
            .any(|o| o.name.eq_ignore_ascii_case(&u.name))
        {
            return Err(bad(f("name"), format!("'{}' is defined twice", u.name)));
        }
        if !(u.mu_km3_s2 >= 0.0) || !(u.radius_km >= 0.0) {
            return Err(bad(f("mu_km3_s2"), "μ and radius must be zero or positive"));
        }
    }
    let catalog = Catalog::of(d)?;
    if d.stops.len() < 2 {
        return Err(bad(
            "stops",
            "a tour needs at least a launch and an arrival stop",
        ));
    }
    let (lo, hi) = catalog.model().range();
    for (k, s) in d.stops.iter().enumerate() {
        let Some(body) = catalog.body(&s.body) else {
            return Err(bad(
                format!("stops[{k}].body"),
                format!(
                    "unknown body '{}' (not a catalogue planet nor a user body)",
                    s.body
                ),
            ));
        };
        let t = s.epoch.tdb();
        if !(t.0 >= lo.0 && t.0 <= hi.0) {
            return Err(bad(
                format!("stops[{k}].epoch"),
                format!(
                    "{} is outside the ephemeris range {} .. {}",
                    s.epoch.to_date_utc(),
                    lo.to_date_utc(),
                    hi.to_date_utc()
                ),
            ));
        }
        if k > 0 && t.0 <= d.stops[k - 1].epoch.tdb().0 {
            return Err(bad(
                format!("stops[{k}].epoch"),
                "stops must be in time order",
            ));
        }
        if let Some(m) = s.swingby.min_altitude_km {
            if !m.is_finite() {
                return Err(bad(
                    format!("stops[{k}].swingby.min_altitude_km"),
                    "not a number",
                ));
            }
        }
        if let Some(m) = s.swingby.max_altitude_km {
            let min = s
                .swingby
                .min_altitude_km
                .unwrap_or(body.data.min_altitude_km);
            if !(m.is_finite() && m >= min) {
                return Err(bad(
                    format!("stops[{k}].swingby.max_altitude_km"),
                    format!("need a number at least the minimum altitude ({min} km)"),
                ));
            }
        }
        if let SwingbyMode::Shaped {
            altitude_km,
            aim_deg,
        } = s.swingby.mode
        {
            if !altitude_km.is_finite() || !aim_deg.is_finite() {
                return Err(bad(
                    format!("stops[{k}].swingby.mode"),
                    "altitude and aim must be numbers",
                ));
            }
            if altitude_km <= -body.data.radius_km {
                return Err(bad(
                    format!("stops[{k}].swingby.mode.altitude_km"),
                    "periapsis below the planet's centre",
                ));
            }
        }
    }
    if d.legs.len() > d.stops.len() - 1 {
        return Err(bad(
            "legs",
            format!("{} legs listed for {} stops", d.legs.len(), d.stops.len()),
        ));
    }
    for (k, l) in d.legs.iter().enumerate() {
        if l.revolutions as usize > tourwright_astro::lambert::MAX_REVS {
            return Err(bad(
                format!("legs[{k}].revolutions"),
                "too many revolutions",
            ));
        }
        if let Some(m) = &l.dsm {
            crate::tour::prepare_dsm(d, k, m)?;
            if let crate::design::DsmTime::Date(e) = m.at {
                let t = e.tdb().0;
                if !(t > d.stops[k].epoch.tdb().0 && t < d.stops[k + 1].epoch.tdb().0) {
                    return Err(bad(
                        format!("legs[{k}].dsm.at"),
                        format!(
                            "{} is not inside the leg ({} .. {})",
                            e.to_date_utc(),
                            d.stops[k].epoch.to_date_utc(),
                            d.stops[k + 1].epoch.to_date_utc()
                        ),
                    ));
                }
            }
            if let Some(l) = m.launch {
                for (name, v) in [
                    ("min_vinf_km_s", l.min_vinf_km_s),
                    ("max_vinf_km_s", l.max_vinf_km_s),
                ] {
                    if v.is_some_and(|x| !(x.is_finite() && x >= 0.0)) {
                        return Err(bad(
                            format!("legs[{k}].dsm.launch.{name}"),
                            "need a finite speed ≥ 0 km/s",
                        ));
                    }
                }
                if let (Some(a), Some(b)) = (l.min_vinf_km_s, l.max_vinf_km_s) {
                    if a > b {
                        return Err(bad(
                            format!("legs[{k}].dsm.launch.max_vinf_km_s"),
                            "the largest v∞ is below the smallest",
                        ));
                    }
                }
            }
        }
    }
    let sc = &d.spacecraft;
    if !(sc.dry_mass_kg >= 0.0) {
        return Err(bad(
            "spacecraft.dry_mass_kg",
            "mass must be zero or positive",
        ));
    }
    if !(sc.propellant_kg >= 0.0) {
        return Err(bad(
            "spacecraft.propellant_kg",
            "mass must be zero or positive",
        ));
    }
    if !(sc.isp_s > 0.0) {
        return Err(bad("spacecraft.isp_s", "specific impulse must be positive"));
    }
    if let Some(lv) = &d.launch_vehicle {
        for (i, p) in lv.performance.iter().enumerate() {
            if !(p.mass_kg >= 0.0) || !p.c3_km2_s2.is_finite() {
                return Err(bad(
                    format!("launch_vehicle.performance[{i}]"),
                    "mass must be zero or positive",
                ));
            }
            if i > 0 && p.c3_km2_s2 <= lv.performance[i - 1].c3_km2_s2 {
                return Err(bad(
                    format!("launch_vehicle.performance[{i}].c3_km2_s2"),
                    "C3 must increase",
                ));
            }
        }
    }
    if let ArrivalGoal::Capture {
        periapsis_radius_km,
        eccentricity,
    } = d.arrival
    {
        if !(periapsis_radius_km > 0.0) {
            return Err(bad("arrival.periapsis_radius_km", "must be positive"));
        }
        if !(0.0..1.0).contains(&eccentricity) {
            return Err(bad(
                "arrival.eccentricity",
                "a capture orbit needs 0 ≤ e < 1",
            ));
        }
    }
    if let Some(c3) = d.launch.max_c3_km2_s2 {
        if !(c3 >= 0.0) {
            return Err(bad("launch.max_c3_km2_s2", "must be zero or positive"));
        }
    }
    for (k, b) in d.search.leg_tof.iter().enumerate() {
        if !(b.min_days > 0.0 && b.max_days >= b.min_days) {
            return Err(bad(
                format!("search.leg_tof[{k}]"),
                "need 0 < min_days ≤ max_days",
            ));
        }
    }
    Ok(())
}

/// Parse design text; `path` names the file in messages, and its folder is where a relative
/// kernel path is looked for.
pub fn from_str(text: &str, path: &Path) -> Result<MissionDesign, FileError> {
    if text.len() > 16 * 1024 * 1024 {
        return Err(FileError::Parse {
            path: path.into(),
            line: 1,
            column: 1,
            reason: "file larger than 16 MiB; not a design file".into(),
        });
    }
    let opts = ron::Options::default().with_recursion_limit(64);
    let mut d: MissionDesign = opts.from_str(text).map_err(|e| FileError::Parse {
        path: path.into(),
        line: e.span.start.line,
        column: e.span.start.col,
        reason: e.code.to_string(),
    })?;
    // A kernel path is relative to the design file's folder.
    if let crate::design::EphemerisChoice::Kernel(k) = &mut d.ephemeris {
        k.base = Some(folder_of(path));
    }
    validate(&d).map_err(|i| FileError::Invalid {
        path: path.into(),
        field: i.field,
        reason: i.reason,
    })?;
    Ok(d)
}

/// Read a design file.
pub fn load(path: &Path) -> Result<MissionDesign, FileError> {
    let text = fs::read_to_string(path).map_err(|e| FileError::Io {
        path: path.into(),
        source: e,
    })?;
    from_str(&text, path)
}

/// The folder a file is in ("." for a bare name).
fn folder_of(path: &Path) -> std::path::PathBuf {
    path.parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."))
        .to_path_buf()
}

/// The text a design is saved as (pretty RON with a header comment).
pub fn to_string(d: &MissionDesign) -> String {
    let cfg = ron::ser::PrettyConfig::new()
        .depth_limit(8)
        .struct_names(false)
        .separate_tuple_members(false)
        .indentor("    ".to_string());
    let body = ron::ser::to_string_pretty(d, cfg).expect("a design always serialises");
    format!(
        "// Tourwright design file. Units are in the field names; epochs are ISO-8601 with their time scale.\n{body}\n"
    )
}

/// Save atomically: write `NAME.tmp` beside the target, flush it to disk, rename over the target.
/// On any failure the old file is untouched.
pub fn save(d: &MissionDesign, path: &Path) -> Result<(), FileError> {
    validate(d).map_err(|i| FileError::Invalid {
        path: path.into(),
        field: i.field,
        reason: i.reason,
    })?;
    // A kernel path relative to another folder than the target's is written absolute, so the
    // saved file still finds its kernel.
    let owned;
    let mut d = d;
    if let crate::design::EphemerisChoice::Kernel(k) = &d.ephemeris {
        let rel = Path::new(&k.path).is_relative() && !k.path.trim().is_empty();
        let base = k.base.clone().unwrap_or_else(|| ".".into());
        if rel && base != folder_of(path) {
            if let Some(abs) = k.resolved() {
                let abs = abs.canonicalize().unwrap_or(abs);
                let mut copy = d.clone();
                copy.ephemeris = crate::design::EphemerisChoice::Kernel(
                    crate::design::KernelRef::new(abs.to_string_lossy()),
                );
                owned = copy;
                d = &owned;
            }
        }
    }
    let text = to_string(d);
    let io = |e| FileError::Io {
        path: path.into(),
        source: e,
    };
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let name = path
        .file_name()
        .ok_or_else(|| io(std::io::Error::other("no file name")))?;
    let tmp = dir.join(format!(".{}.tmp", name.to_string_lossy()));
    let write = || -> std::io::Result<()> {
        let mut f = fs::File::create(&tmp)?;
        f.write_all(text.as_bytes())?;
        f.sync_all()?;
        fs::rename(&tmp, path)
    };
    write().map_err(|e| {
        let _ = fs::remove_file(&tmp);
        io(e)
    })
}
