//! Loading and saving design files (`*.tour.ron`): versioned RON, errors that say file, line,
//! column and reason, validation that names the field, and atomic saves (write a temporary file in
//! the same folder, then rename it over the old one).

use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};

use crate::design::{
    ArrivalGoal, FORMAT_TAG, FORMAT_VERSION, MissionDesign, PeriodField, SwingbyMode,
};
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

pub use crate::invalid::Invalid;

fn bad(field: impl Into<String>, reason: impl Into<String>) -> Invalid {
    Invalid {
        field: field.into(),
        reason: reason.into(),
    }
}

/// Largest length of a design's name, characters.
pub const MAX_NAME_CHARS: usize = 1_000;
/// Largest length of a design's notes (and of any text field), characters.
pub const MAX_TEXT_CHARS: usize = 65_536;

/// A number must be finite and inside [lo, hi] (units in the field's name).
fn in_range(field: impl Into<String>, x: f64, lo: f64, hi: f64) -> Result<(), Invalid> {
    if x.is_finite() && x >= lo && x <= hi {
        Ok(())
    } else {
        Err(bad(
            field,
            format!(
                "{} is outside the physical range {} .. {}",
                show(x),
                show(lo),
                show(hi)
            ),
        ))
    }
}

/// A number for a message: plain when moderate, with an exponent otherwise.
fn show(x: f64) -> String {
    if x == 0.0 || !x.is_finite() || (1e-4..1e9).contains(&x.abs()) {
        format!("{x}")
    } else {
        format!("{x:e}")
    }
}

/// Check a design for values a file or a user can get wrong. The first problem is returned.
/// Every number has a finite, physical range; epochs lie inside the ephemeris source's range.
pub fn validate(d: &MissionDesign) -> Result<(), Invalid> {
    if d.name.chars().count() > MAX_NAME_CHARS {
        return Err(bad(
            "name",
            format!("longer than {MAX_NAME_CHARS} characters"),
        ));
    }
    if d.notes.chars().count() > MAX_TEXT_CHARS {
        return Err(bad(
            "notes",
            format!("longer than {MAX_TEXT_CHARS} characters"),
        ));
    }
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
        if u.name.chars().count() > MAX_NAME_CHARS {
            return Err(bad(f("name"), "name too long"));
        }
        // Up to ten times Jupiter's μ and the Sun's radius: anything a user body can be.
        in_range(f("mu_km3_s2"), u.mu_km3_s2, 0.0, 1.3e9)?;
        in_range(f("radius_km"), u.radius_km, 0.0, 7.0e5)?;
        let el = &u.elements;
        // q from a sun-grazer to the inner Oort cloud; e up to strongly hyperbolic.
        in_range(f("elements.q_au"), el.q_au, 1e-4, 1e4)?;
        in_range(f("elements.e"), el.e, 0.0, 100.0)?;
        in_range(f("elements.i_deg"), el.i_deg, 0.0, 180.0)?;
        in_range(f("elements.raan_deg"), el.raan_deg, -3600.0, 3600.0)?;
        in_range(f("elements.argp_deg"), el.argp_deg, -3600.0, 3600.0)?;
        in_range(
            f("elements.mean_anomaly_deg"),
            el.mean_anomaly_deg,
            -1e7,
            1e7,
        )?;
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
        if k > 0 && t.0 - d.stops[k - 1].epoch.tdb().0 < MIN_LEG_S {
            return Err(bad(
                format!("stops[{k}].epoch"),
                format!(
                    "{:.0} s after the previous stop: a leg is at least an hour (patched conics \
                     have no meaning for shorter ones)",
                    t.0 - d.stops[k - 1].epoch.tdb().0
                ),
            ));
        }
        let sw = &s.swingby;
        if let Some(m) = sw.min_altitude_km {
            // Not below the surface; at most about a hundred times Jupiter's radius.
            in_range(format!("stops[{k}].swingby.min_altitude_km"), m, 0.0, 1e7)?;
        }
        if let Some(v) = sw.min_vinf_km_s {
            in_range(format!("stops[{k}].swingby.min_vinf_km_s"), v, 0.0, 100.0)?;
        }
        if let Some(m) = sw.max_miss_km {
            in_range(format!("stops[{k}].swingby.max_miss_km"), m, 1e-3, 1e8)?;
        }
        if let Some(v) = sw.max_powered_dv_km_s {
            in_range(
                format!("stops[{k}].swingby.max_powered_dv_km_s"),
                v,
                0.0,
                100.0,
            )?;
        }
        if let Some(m) = s.swingby.max_altitude_km {
            let min = s
                .swingby
                .min_altitude_km
                .unwrap_or(body.data.min_altitude_km);
            if !(m.is_finite() && m >= min && m <= 1e9) {
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
            in_range(
                format!("stops[{k}].swingby.mode.altitude_km"),
                altitude_km,
                0.0,
                1e9,
            )
            .map_err(|_| {
                bad(
                    format!("stops[{k}].swingby.mode.altitude_km"),
                    format!("{altitude_km} km: the periapsis must lie above the surface"),
                )
            })?;
            in_range(
                format!("stops[{k}].swingby.mode.aim_deg"),
                aim_deg,
                -3600.0,
                3600.0,
            )?;
            if !(body.data.mu > 0.0) && k > 0 && k + 1 < d.stops.len() {
                return Err(bad(
                    format!("stops[{k}].swingby.mode"),
                    format!(
                        "'{}' has no mass (μ = 0): it cannot shape a swing-by",
                        s.body
                    ),
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
    if !(sc.dry_mass_kg > 0.0) {
        return Err(bad("spacecraft.dry_mass_kg", "mass must be positive"));
    }
    in_range("spacecraft.dry_mass_kg", sc.dry_mass_kg, 1e-3, 1e8)?;
    in_range("spacecraft.propellant_kg", sc.propellant_kg, 0.0, 1e9)?;
    if !(sc.isp_s > 0.0) {
        return Err(bad("spacecraft.isp_s", "specific impulse must be positive"));
    }
    in_range("spacecraft.isp_s", sc.isp_s, 1.0, 1e5)?;
    if let Some(lv) = &d.launch_vehicle {
        for (i, p) in lv.performance.iter().enumerate() {
            if !(p.mass_kg >= 0.0) || !p.c3_km2_s2.is_finite() {
                return Err(bad(
                    format!("launch_vehicle.performance[{i}]"),
                    "mass must be zero or positive",
                ));
            }
            in_range(
                format!("launch_vehicle.performance[{i}].mass_kg"),
                p.mass_kg,
                0.0,
                1e9,
            )?;
            in_range(
                format!("launch_vehicle.performance[{i}].c3_km2_s2"),
                p.c3_km2_s2,
                -200.0,
                1e4,
            )?;
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
        // Above the arrival body's surface.
        let last = d.stops.last().map(|s| s.body.as_str()).unwrap_or("");
        let r = catalog.body(last).map(|b| b.data.radius_km).unwrap_or(0.0);
        if !(periapsis_radius_km.is_finite()
            && periapsis_radius_km > r
            && periapsis_radius_km <= 1e10)
        {
            return Err(bad(
                "arrival.periapsis_radius_km",
                format!(
                    "{} km: the capture periapsis must lie above the surface of {last} (radius \
                     {r} km)",
                    show(periapsis_radius_km)
                ),
            ));
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
        in_range("launch.max_c3_km2_s2", c3, 0.0, 1e4)?;
    }
    for (name, v) in [
        ("launch.min_dla_deg", d.launch.min_dla_deg),
        ("launch.max_dla_deg", d.launch.max_dla_deg),
    ] {
        if let Some(x) = v {
            in_range(name, x, -90.0, 90.0)?;
        }
    }
    if let (Some(a), Some(b)) = (d.launch.min_dla_deg, d.launch.max_dla_deg) {
        if a > b {
            return Err(bad("launch.max_dla_deg", "below the smallest declination"));
        }
    }
    for (k, b) in d.search.leg_tof.iter().enumerate() {
        if !(b.min_days > 0.0 && b.max_days >= b.min_days) {
            return Err(bad(
                format!("search.leg_tof[{k}]"),
                "need 0 < min_days ≤ max_days",
            ));
        }
        if b.min_days < MIN_LEG_S / 86_400.0 {
            return Err(bad(
                format!("search.leg_tof[{k}].min_days"),
                "a leg is at least an hour (1/24 day)",
            ));
        }
        in_range(
            format!("search.leg_tof[{k}].max_days"),
            b.max_days,
            0.0,
            1e5,
        )?;
    }
    if let Some(t) = d.search.max_total_tof_days {
        in_range("search.max_total_tof_days", t, 1e-3, 1e5)?;
    }
    for (name, e) in [
        ("search.launch_earliest", d.search.launch_earliest),
        ("search.launch_latest", d.search.launch_latest),
    ] {
        if let Some(e) = e {
            let t = e.tdb();
            if !(t.0 >= lo.0 && t.0 <= hi.0) {
                return Err(bad(
                    name,
                    format!(
                        "{} is outside the ephemeris range {} .. {}",
                        e.to_date_utc(),
                        lo.to_date_utc(),
                        hi.to_date_utc()
                    ),
                ));
            }
        }
    }
    if let Some(lp) = &d.launch_period {
        lp.check().map_err(|(f, reason)| {
            bad(
                match f {
                    PeriodField::Days => "launch_period.days",
                    PeriodField::Step => "launch_period.step_days",
                },
                reason,
            )
        })?;
    }
    if let (Some(a), Some(b)) = (d.search.launch_earliest, d.search.launch_latest) {
        if b.tdb().0 < a.tdb().0 {
            return Err(bad(
                "search.launch_latest",
                format!(
                    "{} is before launch_earliest {}: the search window is reversed",
                    b.to_date_utc(),
                    a.to_date_utc()
                ),
            ));
        }
    }
    Ok(())
}

/// Shortest leg a design may have, s (ours: a swing-by's hyperbola takes hours to days; two
/// stops closer than an hour are a typing error or two labels of one instant, and a Lambert arc
/// between them gives a v∞ of millions of km/s).
pub const MIN_LEG_S: f64 = 3600.0;

/// Largest design file read, bytes.
pub const MAX_FILE_BYTES: u64 = 16 * 1024 * 1024;
/// Longest string literal in a design file, bytes (as written, escapes included).
pub const MAX_STRING_BYTES: usize = 256 * 1024;
/// Most escape sequences in one string literal. The RON parser's work on a string grows with
/// the square of its escapes (measured: 128 k escapes 0.8 s, 512 k 12 s); this bound, with the
/// file-size limit, keeps parsing linear in the file's size.
pub const MAX_STRING_ESCAPES: usize = 4096;

/// One linear pass over the text: every string literal (plain or raw) must be shorter than
/// [`MAX_STRING_BYTES`]. Comments and character literals are skipped.
fn check_strings(text: &str, path: &Path) -> Result<(), FileError> {
    let b = text.as_bytes();
    let (mut i, mut line, mut col) = (0usize, 1usize, 1usize);
    let too_long = |line, column| FileError::Parse {
        path: path.into(),
        line,
        column,
        reason: format!(
            "a string longer than {} KiB or with more than {MAX_STRING_ESCAPES} escapes",
            MAX_STRING_BYTES / 1024
        ),
    };
    // Advance over b[i], keeping line and column.
    macro_rules! step {
        () => {{
            if b[i] == b'\n' {
                line += 1;
                col = 1;
            } else if b[i] & 0xC0 != 0x80 {
                col += 1;
            }
            i += 1;
        }};
    }
    while i < b.len() {
        match b[i] {
            b'/' if b.get(i + 1) == Some(&b'/') => {
                while i < b.len() && b[i] != b'\n' {
                    step!();
                }
            }
            b'/' if b.get(i + 1) == Some(&b'*') => {
                let mut depth = 0usize;
                while i < b.len() {
                    if b[i] == b'/' && b.get(i + 1) == Some(&b'*') {
                        depth += 1;
                        step!();
                    } else if b[i] == b'*' && b.get(i + 1) == Some(&b'/') {
                        depth -= 1;
                        step!();
                        if depth == 0 {
                            step!();
                            break;
                        }
                    }
                    step!();
                }
            }
            b'\'' => {
                // A character literal: 'c' or '\x'.
                step!();
                if i < b.len() && b[i] == b'\\' {
                    step!();
                }
                while i < b.len() && b[i] != b'\'' {
                    step!();
                }
                if i < b.len() {
                    step!();
                }
            }
            b'r' if matches!(b.get(i + 1), Some(b'"') | Some(b'#')) => {
                let (l0, c0, start) = (line, col, i);
                step!();
                let mut hashes = 0;
                while i < b.len() && b[i] == b'#' {
                    hashes += 1;
                    step!();
                }
                if i < b.len() && b[i] == b'"' {
                    step!();
                    'raw: while i < b.len() {
                        if b[i] == b'"'
                            && b[i + 1..].iter().take(hashes).all(|c| *c == b'#')
                            && i + hashes < b.len()
                        {
                            for _ in 0..=hashes {
                                step!();
                            }
                            break 'raw;
                        }
                        step!();
                    }
                    if i - start > MAX_STRING_BYTES {
                        return Err(too_long(l0, c0));
                    }
                }
            }
            b'"' => {
                let (l0, c0, start) = (line, col, i);
                let mut escapes = 0usize;
                step!();
                while i < b.len() && b[i] != b'"' {
                    if b[i] == b'\\' && i + 1 < b.len() {
                        escapes += 1;
                        step!();
                    }
                    step!();
                }
                if i < b.len() {
                    step!();
                }
                if i - start > MAX_STRING_BYTES || escapes > MAX_STRING_ESCAPES {
                    return Err(too_long(l0, c0));
                }
            }
            _ => step!(),
        }
    }
    Ok(())
}

/// Where the bad token is: a position past the end of a line's text (a parser that stopped after
/// the last good token) moves to the first character of the next line that is not blank or a
/// comment.
fn token_position(text: &str, line: usize, col: usize) -> (usize, usize) {
    let lines: Vec<&str> = text.lines().collect();
    let Some(l) = line.checked_sub(1).and_then(|i| lines.get(i)) else {
        return (line, col);
    };
    let content = l.split("//").next().unwrap_or("").trim_end();
    if col <= content.chars().count() {
        return (line, col);
    }
    for (i, next) in lines.iter().enumerate().skip(line) {
        let t = next.trim_start();
        if t.is_empty() || t.starts_with("//") {
            continue;
        }
        return (i + 1, next.chars().count() - t.chars().count() + 1);
    }
    (line, col)
}

/// A parser's message with every long run of characters (an echoed 40 000-digit number, say) cut
/// to its first 24 characters and its length.
fn shorten_tokens(msg: &str) -> String {
    let mut out = String::with_capacity(msg.len().min(512));
    for (i, word) in msg.split(' ').enumerate() {
        if i > 0 {
            out.push(' ');
        }
        let n = word.chars().count();
        if n > 48 {
            out.extend(word.chars().take(24));
            out.push_str(&format!("… ({n} characters)"));
        } else {
            out.push_str(word);
        }
    }
    out
}

fn too_big(path: &Path) -> FileError {
    FileError::Parse {
        path: path.into(),
        line: 1,
        column: 1,
        reason: format!(
            "file larger than {} MiB; not a design file",
            MAX_FILE_BYTES / (1024 * 1024)
        ),
    }
}

/// Parse design text; `path` names the file in messages, and its folder is where a relative
/// kernel path is looked for. Files larger than [`MAX_FILE_BYTES`] and strings longer than
/// [`MAX_STRING_BYTES`] are refused before parsing, so parsing time is linear in the size.
pub fn from_str(text: &str, path: &Path) -> Result<MissionDesign, FileError> {
    if text.len() as u64 > MAX_FILE_BYTES {
        return Err(too_big(path));
    }
    check_strings(text, path)?;
    let opts = ron::Options::default().with_recursion_limit(64);
    let mut d: MissionDesign = opts.from_str(text).map_err(|e| {
        let (line, column) = token_position(text, e.span.start.line, e.span.start.col);
        FileError::Parse {
            path: path.into(),
            line,
            column,
            reason: shorten_tokens(&e.code.to_string()),
        }
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
    // Refuse a huge file before reading it.
    if let Ok(m) = fs::metadata(path) {
        if m.len() > MAX_FILE_BYTES {
            return Err(too_big(path));
        }
    }
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
    write_atomic(path, to_string(d).as_bytes())
}

/// True when the file at `path` holds a design (its first 4 KiB carry the design format tag): an
/// export must never replace it.
pub fn holds_design(path: &Path) -> bool {
    use std::io::Read as _;
    let Ok(mut f) = fs::File::open(path) else {
        return false;
    };
    let mut head = vec![0u8; 4096];
    let n = f.read(&mut head).unwrap_or(0);
    String::from_utf8_lossy(&head[..n]).contains(FORMAT_TAG)
}

/// The file a path finally names: symbolic links followed (relative links against their own
/// folder), the path itself when it is not a link. At most 40 links, as POSIX systems allow.
pub fn link_target(path: &Path) -> std::io::Result<PathBuf> {
    let mut p = path.to_path_buf();
    for _ in 0..40 {
        match fs::symlink_metadata(&p) {
            Ok(m) if m.file_type().is_symlink() => {
                let t = fs::read_link(&p)?;
                p = if t.is_relative() {
                    folder_of(&p).join(t)
                } else {
                    t
                };
            }
            _ => return Ok(p),
        }
    }
    Err(std::io::Error::other("too many levels of symbolic links"))
}

/// Write a file atomically: a uniquely named temporary file beside the target, flushed to disk,
/// renamed over it. A symbolic link is written through (its target is replaced and the link
/// stays); a target that exists and is not a regular file (a device, a pipe, a folder) is
/// refused. The old file keeps its permissions. On any failure the old file is untouched.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), FileError> {
    let io = |e| FileError::Io {
        path: path.into(),
        source: e,
    };
    let target = link_target(path).map_err(io)?;
    let old = fs::metadata(&target).ok();
    if let Some(m) = &old {
        if !m.is_file() {
            return Err(io(std::io::Error::other(
                "not a regular file; refusing to replace it",
            )));
        }
    }
    let dir = folder_of(&target);
    let mut tmp = tempfile::Builder::new()
        .prefix(".tourwright-")
        .suffix(".tmp")
        .tempfile_in(&dir)
        .map_err(io)?;
    tmp.write_all(bytes).map_err(io)?;
    tmp.as_file().sync_all().map_err(io)?;
    match &old {
        Some(m) => fs::set_permissions(tmp.path(), m.permissions()).map_err(io)?,
        // A new file gets the mode a plain create gives under the usual umask (022), not the
        // temporary file's private 0600: designs and exports are shared documents.
        #[cfg(unix)]
        None => {
            use std::os::unix::fs::PermissionsExt;
            fs::set_permissions(tmp.path(), fs::Permissions::from_mode(0o644)).map_err(io)?
        }
        #[cfg(not(unix))]
        None => {}
    }
    tmp.persist(&target).map_err(|e| io(e.error))?;
    Ok(())
}
