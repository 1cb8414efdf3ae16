//! Epochs and time scales.
//!
//! Two types:
//! - [`Epoch`]: an exact calendar label in UTC or TDB, as written in a design file or typed by a
//!   user (day number plus nanoseconds of the day, so that a leap second `23:59:60` and
//!   sub-millisecond precision survive a save and a load unchanged).
//! - [`Tdb`]: TDB seconds since J2000 (2000-01-01 12:00:00 TDB) as `f64`, the engine's working
//!   time on every hot path (ephemerides, Lambert arcs, evaluation, search).
//!
//! Time scales come from `hifitime`: its leap-second table (IERS announcements, and SOFA's
//! offsets for 1960-1972) and its TAI -> TT -> TDB model. The UTC calendar itself (which second of
//! the day, including second 60 on a leap-second day) is handled here, because hifitime 4.3 folds
//! `23:59:60` onto `23:59:59` when it builds or prints a UTC date (measured; see
//! DEVELOPERS.md). Before 1960 UTC is not defined; there a UTC label is read with TAI−UTC = 0,
//! as hifitime does (a few seconds, immaterial for preliminary design).

use std::fmt;

use hifitime::leap_seconds::LatestLeapSeconds;

use crate::constants::{DAY_S, JULIAN_CENTURY_DAYS};

/// Julian date of J2000 (2000-01-01 12:00 TDB).
pub const JD_J2000: f64 = 2_451_545.0;
/// Offset between Julian date and modified Julian date.
pub const MJD_OFFSET: f64 = 2_400_000.5;
/// MJD of 1900-01-01, hifitime's TAI reference day.
const MJD_1900: i64 = 15_020;
/// MJD of 2000-01-01 (J2000 is noon of that day).
const MJD_2000: i64 = 51_544;
const NS_PER_S: i128 = 1_000_000_000;
const NS_PER_DAY: i128 = 86_400 * NS_PER_S;
/// TT − TAI, seconds (exact by definition, IAU 1991).
pub const TT_MINUS_TAI_S: f64 = 32.184;

/// Time scale of a calendar label.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Default)]
pub enum TimeScale {
    /// Coordinated Universal Time (with leap seconds).
    #[default]
    Utc,
    /// Barycentric Dynamical Time (the engine's own scale).
    Tdb,
}

impl TimeScale {
    /// The suffix written after a date.
    pub fn suffix(self) -> &'static str {
        match self {
            TimeScale::Utc => "UTC",
            TimeScale::Tdb => "TDB",
        }
    }
}

/// Why a date could not be read.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum TimeError {
    /// Text is not an ISO-8601 date.
    #[error(
        "'{0}' is not a date (expected YYYY-MM-DD or YYYY-MM-DDTHH:MM:SS[.fffffffff] with optional UTC or TDB)"
    )]
    Syntax(String),
    /// A day count that is not a decimal number of days.
    #[error(
        "'{0}' is not a day count (expected MJD 52504.2375 or MJD2000 960.2375, a decimal number of days, with optional UTC or TDB)"
    )]
    DayCount(String),
    /// A field is out of its range (month 13, day 32, second 60 on a day without a leap second).
    #[error("'{0}': {1} out of range")]
    Range(String, &'static str),
}

/// Days from the civil calendar (proleptic Gregorian), as a Julian day number at 0h (MJD integer).
/// The integer Julian-day-number algorithm (Richards, Explanatory Supplement to the Astronomical
/// Almanac, 3rd ed. 2013, §15.11; common practice).
pub fn mjd_from_calendar(year: i32, month: u32, day: u32) -> i32 {
    let (y, m, d) = (year as i64, month as i64, day as i64);
    let a = (14 - m) / 12;
    let yy = y + 4800 - a;
    let mm = m + 12 * a - 3;
    let jdn = d + (153 * mm + 2) / 5 + 365 * yy + yy.div_euclid(4) - yy.div_euclid(100)
        + yy.div_euclid(400)
        - 32045;
    (jdn - 2_400_001) as i32
}

/// Civil calendar date (year, month, day) from an integer MJD.
pub fn calendar_from_mjd(mjd: i32) -> (i32, u32, u32) {
    // Inverse of the above (Richards' algorithm, Explanatory Supplement 2013 §15.11.3).
    let j = mjd as i64 + 2_400_001;
    let f = j + 1401 + (((4 * j + 274_277) / 146_097) * 3) / 4 - 38;
    let e = 4 * f + 3;
    let g = (e % 1461) / 4;
    let h = 5 * g + 2;
    let day = (h % 153) / 5 + 1;
    let month = ((h / 153 + 2) % 12) + 1;
    let year = e / 1461 - 4716 + (12 + 2 - month) / 12;
    (year as i32, month as u32, day as u32)
}

fn days_in_month(y: i32, m: u32) -> u32 {
    match m {
        1 | 3 | 5 | 7 | 8 | 10 | 12 => 31,
        4 | 6 | 9 | 11 => 30,
        _ => {
            if (y % 4 == 0 && y % 100 != 0) || y % 400 == 0 {
                29
            } else {
                28
            }
        }
    }
}

/// TAI − UTC in nanoseconds in force on the UTC day `mjd` (hifitime's table; 0 before 1960).
fn tai_minus_utc_ns(mjd: i64) -> i128 {
    let day_start = (mjd - MJD_1900) as f64 * DAY_S;
    let mut off = 0.0;
    for ls in LatestLeapSeconds::default() {
        if ls.timestamp_tai_s <= day_start {
            off = ls.delta_at;
        } else {
            break;
        }
    }
    (off * 1e9).round() as i128
}

/// How long UTC day `mjd` is beyond 86 400 s (the leap second before the next offset step), ns.
fn day_extension_ns(mjd: i64) -> i128 {
    (tai_minus_utc_ns(mjd + 1) - tai_minus_utc_ns(mjd)).max(0)
}

/// TAI − UTC in seconds for a UTC calendar day given as MJD (integer day).
pub fn tai_minus_utc(mjd_utc_day: i32) -> f64 {
    tai_minus_utc_ns(mjd_utc_day as i64) as f64 / 1e9
}

/// Calendar fields of an epoch in one scale.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Calendar {
    /// Year.
    pub year: i32,
    /// Month 1-12.
    pub month: u32,
    /// Day 1-31.
    pub day: u32,
    /// Hour 0-23.
    pub hour: u32,
    /// Minute 0-59.
    pub minute: u32,
    /// Second 0-59, or 60 during a leap second.
    pub second: u32,
    /// Nanoseconds of the second.
    pub nanos: u32,
}

/// An exact calendar label: a day (MJD) and the nanoseconds into it, in UTC or TDB.
///
/// Two labels are equal when they are written the same way; compare instants through
/// [`Epoch::tdb`]. On a UTC leap-second day the nanoseconds may run past 86 400 s.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Epoch {
    scale: TimeScale,
    mjd: i32,
    nanos: u64,
}

impl Default for Epoch {
    fn default() -> Self {
        Epoch::J2000
    }
}

impl Epoch {
    /// J2000 (2000-01-01 12:00:00 TDB).
    pub const J2000: Epoch = Epoch {
        scale: TimeScale::Tdb,
        mjd: MJD_2000 as i32,
        nanos: 43_200 * 1_000_000_000,
    };

    /// The scale the label is written in.
    pub fn scale(self) -> TimeScale {
        self.scale
    }

    /// From calendar fields in a scale; second 60 only on a UTC leap-second day.
    pub fn from_calendar(scale: TimeScale, c: Calendar) -> Result<Epoch, TimeError> {
        let text = || {
            format!(
                "{:04}-{:02}-{:02}T{:02}:{:02}:{:02}",
                c.year, c.month, c.day, c.hour, c.minute, c.second
            )
        };
        if !(0..=9999).contains(&c.year) {
            return Err(TimeError::Range(text(), "year (0000-9999)"));
        }
        if !(1..=12).contains(&c.month) {
            return Err(TimeError::Range(text(), "month"));
        }
        if c.day < 1 || c.day > days_in_month(c.year, c.month) {
            return Err(TimeError::Range(text(), "day"));
        }
        if c.hour > 23 {
            return Err(TimeError::Range(text(), "hour"));
        }
        if c.minute > 59 {
            return Err(TimeError::Range(text(), "minute"));
        }
        if c.nanos >= 1_000_000_000 {
            return Err(TimeError::Range(text(), "fraction of a second"));
        }
        let mjd = mjd_from_calendar(c.year, c.month, c.day);
        let nanos = (c.hour as i128 * 3600 + c.minute as i128 * 60 + c.second as i128) * NS_PER_S
            + c.nanos as i128;
        let limit = NS_PER_DAY
            + if scale == TimeScale::Utc {
                day_extension_ns(mjd as i64)
            } else {
                0
            };
        if c.second > 60 || nanos >= limit {
            return Err(TimeError::Range(text(), "second"));
        }
        Ok(Epoch {
            scale,
            mjd,
            nanos: nanos as u64,
        })
    }

    /// A UTC date and time; `sec` may carry a fraction (rounded to the nanosecond).
    pub fn from_utc(
        year: i32,
        month: u32,
        day: u32,
        hour: u32,
        min: u32,
        sec: f64,
    ) -> Result<Epoch, TimeError> {
        Self::from_fields(TimeScale::Utc, year, month, day, hour, min, sec)
    }

    /// A TDB date and time; `sec` may carry a fraction (rounded to the nanosecond).
    pub fn from_tdb_calendar(
        year: i32,
        month: u32,
        day: u32,
        hour: u32,
        min: u32,
        sec: f64,
    ) -> Result<Epoch, TimeError> {
        Self::from_fields(TimeScale::Tdb, year, month, day, hour, min, sec)
    }

    fn from_fields(
        scale: TimeScale,
        year: i32,
        month: u32,
        day: u32,
        hour: u32,
        min: u32,
        sec: f64,
    ) -> Result<Epoch, TimeError> {
        if !(0.0..61.0).contains(&sec) {
            return Err(TimeError::Range(format!("{sec}"), "second"));
        }
        let ns = (sec * 1e9).round() as u64;
        Self::from_calendar(
            scale,
            Calendar {
                year,
                month,
                day,
                hour,
                minute: min,
                second: (ns / 1_000_000_000) as u32,
                nanos: (ns % 1_000_000_000) as u32,
            },
        )
    }

    /// The label as a linear count of nanoseconds from 1900-01-01 in its own scale's clock (TAI for
    /// UTC labels, TDB for TDB labels).
    fn linear_ns(self) -> i128 {
        let day = self.mjd as i128 - MJD_1900 as i128;
        let base = day * NS_PER_DAY + self.nanos as i128;
        match self.scale {
            TimeScale::Utc => base + tai_minus_utc_ns(self.mjd as i64),
            TimeScale::Tdb => base,
        }
    }

    /// Inverse of `linear_ns`.
    fn from_linear_ns(scale: TimeScale, ns: i128) -> Epoch {
        let split = |ns: i128| {
            let day = ns.div_euclid(NS_PER_DAY);
            (day + MJD_1900 as i128, ns.rem_euclid(NS_PER_DAY))
        };
        match scale {
            TimeScale::Tdb => {
                let (mjd, nanos) = split(ns);
                Epoch {
                    scale,
                    mjd: mjd as i32,
                    nanos: nanos as u64,
                }
            }
            TimeScale::Utc => {
                // Try the offset in force on the candidate day and on the day before; a TAI instant
                // inside a leap second belongs to the previous day, past 86 400 s.
                let (mjd0, _) = split(ns);
                for mjd in [mjd0 as i64, mjd0 as i64 - 1, mjd0 as i64 + 1] {
                    let off = tai_minus_utc_ns(mjd);
                    let rel = ns - off - (mjd - MJD_1900) as i128 * NS_PER_DAY;
                    if rel >= 0 && rel < NS_PER_DAY + day_extension_ns(mjd) {
                        return Epoch {
                            scale,
                            mjd: mjd as i32,
                            nanos: rel as u64,
                        };
                    }
                }
                // A negative step (1961, 1968) leaves a gap: take the later day's reading.
                let off = tai_minus_utc_ns(mjd0 as i64);
                let (mjd, nanos) = split(ns - off);
                Epoch {
                    scale,
                    mjd: mjd as i32,
                    nanos: nanos as u64,
                }
            }
        }
    }

    /// The instant as TDB seconds since J2000.
    pub fn tdb(self) -> Tdb {
        match self.scale {
            TimeScale::Tdb => {
                // Whole days and nanoseconds apart, so that no digits are lost before the sum.
                let days = (self.mjd as i64 - MJD_2000) as f64 * DAY_S - 43_200.0;
                Tdb(days + self.nanos as f64 * 1e-9)
            }
            TimeScale::Utc => {
                let tai = hifitime::Duration::from_total_nanoseconds(self.linear_ns());
                let t = hifitime::Epoch::from_tai_duration(tai).to_tdb_duration();
                Tdb(t.to_seconds())
            }
        }
    }

    /// The label in `scale` of the instant `t` (rounded to the nanosecond).
    pub fn from_tdb(t: Tdb, scale: TimeScale) -> Epoch {
        let tdb_ns = (t.0 * 1e9).round() as i128;
        match scale {
            TimeScale::Tdb => {
                let j2000 = (MJD_2000 - MJD_1900) as i128 * NS_PER_DAY + 43_200 * NS_PER_S;
                Epoch::from_linear_ns(TimeScale::Tdb, j2000 + tdb_ns)
            }
            TimeScale::Utc => {
                let e = hifitime::Epoch::from_tdb_duration(
                    hifitime::Duration::from_total_nanoseconds(tdb_ns),
                );
                Epoch::from_linear_ns(TimeScale::Utc, e.to_tai_duration().total_nanoseconds())
            }
        }
    }

    /// The same instant labelled in another scale.
    pub fn in_scale(self, scale: TimeScale) -> Epoch {
        if scale == self.scale {
            self
        } else {
            Epoch::from_tdb(self.tdb(), scale)
        }
    }

    /// This epoch moved by `s` seconds of its own clock (SI seconds; leap seconds counted).
    pub fn plus_seconds(self, s: f64) -> Epoch {
        Epoch::from_linear_ns(self.scale, self.linear_ns() + (s * 1e9).round() as i128)
    }

    /// This epoch moved by `d` days of 86 400 s.
    pub fn plus_days(self, d: f64) -> Epoch {
        self.plus_seconds(d * DAY_S)
    }

    /// Calendar fields in the label's own scale.
    pub fn calendar(self) -> Calendar {
        let (year, month, day) = calendar_from_mjd(self.mjd);
        let s = self.nanos / 1_000_000_000;
        let (hour, minute, second) = if s >= 86_400 {
            (23, 59, 60 + (s - 86_400) as u32)
        } else {
            ((s / 3600) as u32, ((s / 60) % 60) as u32, (s % 60) as u32)
        };
        Calendar {
            year,
            month,
            day,
            hour,
            minute,
            second,
            nanos: (self.nanos % 1_000_000_000) as u32,
        }
    }

    /// ISO-8601 text in the label's own scale with every significant digit (at least
    /// milliseconds), e.g. `2031-03-04T12:00:00.000 UTC`. This is what design files hold; it reads
    /// back to the identical label.
    pub fn to_iso(self) -> String {
        let c = self.calendar();
        let mut frac = format!("{:09}", c.nanos);
        while frac.len() > 3 && frac.ends_with('0') {
            frac.pop();
        }
        format!(
            "{:04}-{:02}-{:02}T{:02}:{:02}:{:02}.{frac} {}",
            c.year,
            c.month,
            c.day,
            c.hour,
            c.minute,
            c.second,
            self.scale.suffix()
        )
    }

    /// ISO-8601 text in UTC to the millisecond (truncated, so that 23:59:59.9996 never shows as
    /// 60.000), for display.
    pub fn to_iso_utc(self) -> String {
        let c = self.in_scale(TimeScale::Utc).calendar();
        format!(
            "{:04}-{:02}-{:02}T{:02}:{:02}:{:02}.{:03} UTC",
            c.year,
            c.month,
            c.day,
            c.hour,
            c.minute,
            c.second,
            c.nanos / 1_000_000
        )
    }

    /// The UTC calendar date alone, `YYYY-MM-DD`.
    pub fn to_date_utc(self) -> String {
        let c = self.in_scale(TimeScale::Utc).calendar();
        format!("{:04}-{:02}-{:02}", c.year, c.month, c.day)
    }

    /// MJD2000 of the instant (days since 2000-01-01 00:00 TDB).
    pub fn mjd2000(self) -> f64 {
        self.tdb().mjd2000()
    }

    /// TDB days since J2000.
    pub fn days(self) -> f64 {
        self.tdb().days()
    }

    /// Now, from the system clock (UTC; the system clock does not count leap seconds).
    pub fn now() -> Epoch {
        let d = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .unwrap_or_default();
        let s = d.as_secs() as i64;
        // Unix time counts UTC days of 86 400 s from 1970-01-01 (MJD 40587).
        Epoch {
            scale: TimeScale::Utc,
            mjd: (40_587 + s.div_euclid(86_400)) as i32,
            nanos: s.rem_euclid(86_400) as u64 * 1_000_000_000 + d.subsec_nanos() as u64,
        }
    }

    /// Parse ISO-8601 text: `YYYY-MM-DD`, optionally `THH:MM[:SS[.f…]]` (up to nanoseconds),
    /// optionally followed by `Z`, ` UTC` or ` TDB`; or a day count, `MJD 52504.2375` (modified
    /// Julian date) or `MJD2000 960.2375` (days since 2000-01-01 00:00), with the same optional
    /// scale. Without a scale the text is read as UTC.
    pub fn parse(text: &str) -> Result<Epoch, TimeError> {
        let t = text.trim();
        let syntax = || TimeError::Syntax(text.chars().take(80).collect());
        if t.len() > 64 {
            return Err(syntax());
        }
        let (body, scale) = if let Some(b) = t.strip_suffix("TDB") {
            (b.trim_end(), TimeScale::Tdb)
        } else if let Some(b) = t.strip_suffix("UTC") {
            (b.trim_end(), TimeScale::Utc)
        } else if let Some(b) = t.strip_suffix('Z') {
            (b, TimeScale::Utc)
        } else {
            (t, TimeScale::Utc)
        };
        if let Some(days) = body.strip_prefix("MJD2000") {
            return Self::from_day_count(text, days, MJD_2000, scale);
        }
        if let Some(days) = body.strip_prefix("MJD") {
            return Self::from_day_count(text, days, 0, scale);
        }
        let (date, time) = match body.split_once(['T', ' ']) {
            Some((d, tm)) => (d, Some(tm.trim())),
            None => (body, None),
        };
        let digits = |p: &str, n: std::ops::RangeInclusive<usize>| -> Result<u32, TimeError> {
            if !n.contains(&p.len()) || !p.bytes().all(|b| b.is_ascii_digit()) {
                return Err(syntax());
            }
            p.parse().map_err(|_| syntax())
        };
        let mut parts = date.split('-');
        let (Some(y), Some(mo), Some(d), None) =
            (parts.next(), parts.next(), parts.next(), parts.next())
        else {
            return Err(syntax());
        };
        let mut c = Calendar {
            year: digits(y, 4..=4)? as i32,
            month: digits(mo, 1..=2)?,
            day: digits(d, 1..=2)?,
            hour: 0,
            minute: 0,
            second: 0,
            nanos: 0,
        };
        if let Some(tm) = time.filter(|tm| !tm.is_empty()) {
            let mut f = tm.split(':');
            c.hour = digits(f.next().ok_or_else(syntax)?, 1..=2)?;
            c.minute = digits(f.next().ok_or_else(syntax)?, 1..=2)?;
            if let Some(sp) = f.next() {
                let (whole, frac) = match sp.split_once('.') {
                    Some((w, fr)) => (w, fr),
                    None => (sp, ""),
                };
                c.second = digits(whole, 1..=2)?;
                if !frac.is_empty() {
                    if frac.len() > 9 || !frac.bytes().all(|b| b.is_ascii_digit()) {
                        return Err(syntax());
                    }
                    c.nanos = format!("{frac:0<9}").parse().map_err(|_| syntax())?;
                } else if sp.contains('.') {
                    return Err(syntax());
                }
            }
            if f.next().is_some() {
                return Err(syntax());
            }
        }
        Epoch::from_calendar(scale, c).map_err(|e| match e {
            TimeError::Range(_, what) => TimeError::Range(text.trim().to_string(), what),
            other => other,
        })
    }
}

impl Epoch {
    /// A day count `days` (decimal text, sign allowed) after MJD `origin`, to the nanosecond.
    /// A day of the count is 86 400 s; in UTC the count runs over calendar days, so a fraction
    /// on a leap-second day lands as if the day had 86 400 s (as MJD counts are used).
    fn from_day_count(
        text: &str,
        days: &str,
        origin: i64,
        scale: TimeScale,
    ) -> Result<Epoch, TimeError> {
        let syntax = || TimeError::DayCount(text.trim().chars().take(80).collect());
        let d = days.trim();
        if !days.starts_with(' ') || d.is_empty() {
            return Err(syntax());
        }
        let (negative, d) = match d.strip_prefix('-') {
            Some(rest) => (true, rest),
            None => (false, d.strip_prefix('+').unwrap_or(d)),
        };
        let (whole, frac) = d.split_once('.').unwrap_or((d, ""));
        let all_digits = |p: &str| p.bytes().all(|b| b.is_ascii_digit());
        if whole.is_empty() || whole.len() > 7 || !all_digits(whole) || !all_digits(frac) {
            return Err(syntax());
        }
        if frac.len() > 18 {
            return Err(syntax());
        }
        let whole: i128 = whole.parse().map_err(|_| syntax())?;
        // The fraction to the nanosecond, rounded half up, from its digits (no binary rounding).
        let frac_ns = if frac.is_empty() {
            0
        } else {
            let digits: i128 = frac.parse().map_err(|_| syntax())?;
            let scale10 = 10i128.pow(frac.len() as u32);
            (digits * NS_PER_DAY * 2 + scale10) / (scale10 * 2)
        };
        let mut ns = whole * NS_PER_DAY + frac_ns;
        if negative {
            ns = -ns;
        }
        ns += origin as i128 * NS_PER_DAY;
        let mjd = ns.div_euclid(NS_PER_DAY);
        let nanos = ns.rem_euclid(NS_PER_DAY);
        let year_range =
            mjd_from_calendar(0, 1, 1) as i128..=mjd_from_calendar(9999, 12, 31) as i128;
        if !year_range.contains(&mjd) {
            return Err(TimeError::Range(
                text.trim().to_string(),
                "year (0000-9999)",
            ));
        }
        Ok(Epoch {
            scale,
            mjd: mjd as i32,
            nanos: nanos as u64,
        })
    }
}

impl fmt::Display for Epoch {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.to_iso())
    }
}

impl std::str::FromStr for Epoch {
    type Err = TimeError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        Epoch::parse(s)
    }
}

impl serde::Serialize for Epoch {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(&self.to_iso())
    }
}

impl<'de> serde::Deserialize<'de> for Epoch {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        let s = String::deserialize(d)?;
        Epoch::parse(&s).map_err(serde::de::Error::custom)
    }
}

/// An instant as TDB seconds since J2000: the engine's working time.
#[derive(Clone, Copy, Debug, PartialEq, PartialOrd, Default)]
pub struct Tdb(pub f64);

impl Tdb {
    /// J2000 itself.
    pub const J2000: Tdb = Tdb(0.0);

    /// Seconds since J2000.
    #[inline]
    pub fn seconds(self) -> f64 {
        self.0
    }

    /// From TDB days since J2000.
    #[inline]
    pub fn from_days(d: f64) -> Tdb {
        Tdb(d * DAY_S)
    }

    /// From MJD2000 (days since 2000-01-01 00:00, counted in TDB as common in trajectory work).
    #[inline]
    pub fn from_mjd2000(d: f64) -> Tdb {
        Tdb::from_days(d - 0.5)
    }

    /// From a Julian date in TDB.
    pub fn from_jd(jd: f64) -> Tdb {
        Tdb::from_days(jd - JD_J2000)
    }

    /// TDB days since J2000.
    #[inline]
    pub fn days(self) -> f64 {
        self.0 / DAY_S
    }

    /// Julian centuries (TDB) since J2000.
    #[inline]
    pub fn centuries(self) -> f64 {
        self.days() / JULIAN_CENTURY_DAYS
    }

    /// Julian date in TDB.
    pub fn jd(self) -> f64 {
        JD_J2000 + self.days()
    }

    /// MJD2000: days since 2000-01-01 00:00 (TDB), i.e. MJD − 51544.
    #[inline]
    pub fn mjd2000(self) -> f64 {
        self.days() + 0.5
    }

    /// Shifted by a number of days.
    #[inline]
    pub fn plus_days(self, d: f64) -> Tdb {
        Tdb(self.0 + d * DAY_S)
    }

    /// The exact TDB label of this instant (rounded to the nanosecond).
    pub fn epoch(self) -> Epoch {
        Epoch::from_tdb(self, TimeScale::Tdb)
    }

    /// ISO text in UTC to the nearest millisecond, for display.
    pub fn to_iso_utc(self) -> String {
        if !self.0.is_finite() {
            return "not a date".into();
        }
        // Half a millisecond added to the instant, then truncated: rounding that carries across
        // minutes, days and leap seconds correctly.
        Epoch::from_tdb(Tdb(self.0 + 5e-4), TimeScale::Utc).to_iso_utc()
    }

    /// The UTC calendar date, `YYYY-MM-DD`, for display.
    pub fn to_date_utc(self) -> String {
        if !self.0.is_finite() {
            return "not a date".into();
        }
        Epoch::from_tdb(self, TimeScale::Utc).to_date_utc()
    }
}

impl fmt::Display for Tdb {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.to_iso_utc())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn leap_second_labels_round_trip_and_count_one_second() {
        // IERS Bulletin C 52: a positive leap second at the end of 2016-12-31.
        let before = Epoch::parse("2016-12-31T23:59:59 UTC").unwrap();
        let leap = Epoch::parse("2016-12-31T23:59:60.5 UTC").unwrap();
        let after = Epoch::parse("2017-01-01T00:00:00 UTC").unwrap();
        assert_eq!(leap.to_iso(), "2016-12-31T23:59:60.500 UTC");
        assert_eq!(Epoch::parse(&leap.to_iso()).unwrap(), leap);
        assert!((after.tdb().0 - before.tdb().0 - 2.0).abs() < 1e-6);
        assert!((after.tdb().0 - leap.tdb().0 - 0.5).abs() < 1e-6);
        // From the engine's time back to a UTC label lands inside the leap second (f64 TDB
        // seconds near 5e8 resolve about 60 ns).
        let back = Epoch::from_tdb(leap.tdb(), TimeScale::Utc);
        assert_eq!(back.calendar().second, 60);
        assert!((back.tdb().0 - leap.tdb().0).abs() < 1e-7);
        // Second 60 on an ordinary day is refused.
        assert!(Epoch::parse("2020-01-01T23:59:60 UTC").is_err());
        assert!(Epoch::parse("2016-12-31T23:59:61 UTC").is_err());
    }

    #[test]
    fn nanoseconds_survive_text() {
        for s in [
            "2031-03-04T05:06:07.000000001 UTC",
            "2031-03-04T05:06:07.123456789 TDB",
            "1800-01-01T00:00:00.000 TDB",
            "2050-12-31T23:59:59.999999999 UTC",
        ] {
            let e = Epoch::parse(s).unwrap();
            assert_eq!(e.to_iso(), s);
        }
        let a = Epoch::parse("2031-03-04T05:06:07.0000001 UTC").unwrap();
        let b = Epoch::parse("2031-03-04T05:06:07.0000002 UTC").unwrap();
        assert_ne!(a, b);
        assert_eq!(a.to_iso(), "2031-03-04T05:06:07.0000001 UTC");
        assert!(Epoch::parse("12031-03-04").is_err());
        assert!(Epoch::parse("2031-03-04T05:06:07.1234567891").is_err());
    }

    #[test]
    fn tdb_labels_are_exact_and_j2000_is_zero() {
        assert_eq!(Epoch::J2000.tdb(), Tdb(0.0));
        let e = Epoch::parse("2000-01-01T00:00:00 TDB").unwrap();
        assert_eq!(e.tdb().mjd2000(), 0.0);
        let t = Tdb(1.234_567_890_123e9);
        let back = Epoch::from_tdb(t, TimeScale::Tdb).tdb();
        assert!((back.0 - t.0).abs() < 1e-6);
    }

    #[test]
    fn day_counts_read_as_the_same_instants_as_calendar_dates() {
        // MJD 51544 is 2000-01-01 (common practice: MJD = JD − 2400000.5).
        let cal = Epoch::parse("2002-08-20T05:42:03.456 TDB").unwrap();
        // 2002-08-20 is MJD 52506; 05:42:03.456 is 20523.456 s = 0.23754 days.
        let mjd = Epoch::parse("MJD 52506.23754 TDB").unwrap();
        let mjd2000 = Epoch::parse("MJD2000 962.23754 TDB").unwrap();
        assert_eq!(mjd, cal);
        assert_eq!(mjd2000, cal);
        assert!((mjd2000.mjd2000() - 962.23754).abs() < 1e-9);
        // Negative MJD2000 (the Cassini launch window) and a whole number with no fraction.
        let neg = Epoch::parse("MJD2000 -789.8117 TDB").unwrap();
        assert!((neg.mjd2000() + 789.8117).abs() < 1e-9);
        assert_eq!(
            Epoch::parse("MJD2000 0 TDB").unwrap(),
            Epoch::parse("2000-01-01 TDB").unwrap()
        );
        // The scale rule is the calendar's: none means UTC.
        assert_eq!(Epoch::parse("MJD 52506.5").unwrap().scale(), TimeScale::Utc);
        // Many digits round to the nanosecond, not through binary fractions.
        let fine = Epoch::parse("MJD 52504.23754000012 TDB").unwrap();
        assert_eq!(fine.to_iso(), "2002-08-18T05:42:03.456010368 TDB");
        for bad in [
            "MJD",
            "MJD2000",
            "MJD 12a",
            "MJD 1.2.3",
            "MJD2000 .5",
            "MJD52504",
            "MJD 1e3",
            "MJD2000 99999999",
        ] {
            assert!(Epoch::parse(bad).is_err(), "{bad}");
        }
        let e = Epoch::parse("MJD 12a TDB").unwrap_err().to_string();
        assert!(e.contains("day count") && e.contains("MJD2000"), "{e}");
    }
}
