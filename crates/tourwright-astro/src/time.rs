//! Epochs and time scales.
//!
//! The engine counts time as TDB seconds since J2000 (2000-01-01 12:00:00 TDB). Users see UTC
//! calendar dates. The chain is UTC -> TAI (leap-second table below) -> TT (+32.184 s) -> TDB
//! (periodic term, about 1.7 ms).
//!
//! Leap seconds: TAI−UTC from IERS Bulletin C (the table of leap seconds since 1972; last step
//! 2017-01-01, TAI−UTC = 37 s; Bulletin C has announced none since, as of this writing). Dates after
//! the table use the last value. Before 1972 UTC ran with fractional "rubber" offsets; this engine
//! uses TAI−UTC = 10 s there, a documented approximation (error under ~4 s back to 1960 and growing
//! before; immaterial for preliminary design at day-level dates).

use std::fmt;

use crate::constants::{DAY_S, JULIAN_CENTURY_DAYS};

/// Julian date of J2000 (2000-01-01 12:00 TDB).
pub const JD_J2000: f64 = 2_451_545.0;
/// Offset between Julian date and modified Julian date.
pub const MJD_OFFSET: f64 = 2_400_000.5;
/// TT − TAI, seconds (exact by definition, IAU 1991 / common practice).
pub const TT_MINUS_TAI_S: f64 = 32.184;

/// (MJD of the UTC day the step takes effect, TAI−UTC in seconds from then). IERS Bulletin C.
const LEAP_SECONDS: [(i32, f64); 28] = [
    (41317, 10.0), // 1972-01-01
    (41499, 11.0), // 1972-07-01
    (41683, 12.0), // 1973-01-01
    (42048, 13.0), // 1974-01-01
    (42413, 14.0), // 1975-01-01
    (42778, 15.0), // 1976-01-01
    (43144, 16.0), // 1977-01-01
    (43509, 17.0), // 1978-01-01
    (43874, 18.0), // 1979-01-01
    (44239, 19.0), // 1980-01-01
    (44786, 20.0), // 1981-07-01
    (45151, 21.0), // 1982-07-01
    (45516, 22.0), // 1983-07-01
    (46247, 23.0), // 1985-07-01
    (47161, 24.0), // 1988-01-01
    (47892, 25.0), // 1990-01-01
    (48257, 26.0), // 1991-01-01
    (48804, 27.0), // 1992-07-01
    (49169, 28.0), // 1993-07-01
    (49534, 29.0), // 1994-07-01
    (50083, 30.0), // 1996-01-01
    (50630, 31.0), // 1997-07-01
    (51179, 32.0), // 1999-01-01
    (53736, 33.0), // 2006-01-01
    (54832, 34.0), // 2009-01-01
    (56109, 35.0), // 2012-07-01
    (57204, 36.0), // 2015-07-01
    (57754, 37.0), // 2017-01-01
];

/// TAI − UTC in seconds for a UTC calendar day given as MJD (integer day).
pub fn tai_minus_utc(mjd_utc_day: i32) -> f64 {
    let mut off = 10.0;
    for &(mjd, s) in LEAP_SECONDS.iter() {
        if mjd_utc_day >= mjd {
            off = s;
        } else {
            break;
        }
    }
    off
}

/// TDB − TT in seconds, from the two leading periodic terms (Explanatory Supplement to the
/// Astronomical Almanac, 1992, eq. 2.222-1; from memory): 0.001657 sin g + 0.000014 sin 2g.
pub fn tdb_minus_tt(jd_tt: f64) -> f64 {
    let g = (357.53 + 0.985_600_28 * (jd_tt - JD_J2000)).to_radians();
    0.001_657 * g.sin() + 0.000_014 * (2.0 * g).sin()
}

/// Time scale of a calendar date written in a file or typed by a user.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum TimeScale {
    /// Coordinated Universal Time.
    Utc,
    /// Barycentric Dynamical Time (the engine's own scale).
    Tdb,
}

/// An instant, as TDB seconds since J2000.
#[derive(Clone, Copy, Debug, PartialEq, PartialOrd, Default)]
pub struct Epoch {
    /// TDB seconds since 2000-01-01 12:00:00 TDB.
    pub tdb_s: f64,
}

/// Why a date could not be read.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum TimeError {
    /// Text is not an ISO-8601 date.
    #[error(
        "'{0}' is not a date (expected YYYY-MM-DD or YYYY-MM-DDTHH:MM:SS[.fff] with optional UTC or TDB)"
    )]
    Syntax(String),
    /// A field is out of its range (month 13, day 32, ...).
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

impl Epoch {
    /// J2000 itself.
    pub const J2000: Epoch = Epoch { tdb_s: 0.0 };

    /// From TDB seconds since J2000.
    pub const fn from_tdb_seconds(s: f64) -> Self {
        Epoch { tdb_s: s }
    }

    /// From TDB days since J2000.
    pub fn from_tdb_days(d: f64) -> Self {
        Epoch { tdb_s: d * DAY_S }
    }

    /// From MJD2000 (days since 2000-01-01 00:00, counted in TDB as common in trajectory work).
    pub fn from_mjd2000(d: f64) -> Self {
        Epoch::from_tdb_days(d - 0.5)
    }

    /// From a Julian date in TDB.
    pub fn from_jd_tdb(jd: f64) -> Self {
        Epoch::from_tdb_days(jd - JD_J2000)
    }

    /// TDB days since J2000.
    pub fn days(self) -> f64 {
        self.tdb_s / DAY_S
    }

    /// Julian centuries (TDB) since J2000.
    pub fn centuries(self) -> f64 {
        self.days() / JULIAN_CENTURY_DAYS
    }

    /// Julian date in TDB.
    pub fn jd_tdb(self) -> f64 {
        JD_J2000 + self.days()
    }

    /// Modified Julian date in TDB.
    pub fn mjd_tdb(self) -> f64 {
        self.jd_tdb() - MJD_OFFSET
    }

    /// MJD2000: days since 2000-01-01 00:00 (TDB), i.e. MJD − 51544.
    pub fn mjd2000(self) -> f64 {
        self.days() + 0.5
    }

    /// This epoch shifted by a number of days.
    pub fn plus_days(self, d: f64) -> Self {
        Epoch {
            tdb_s: self.tdb_s + d * DAY_S,
        }
    }

    /// The epoch of a UTC calendar date and time of day.
    pub fn from_utc(year: i32, month: u32, day: u32, hour: u32, min: u32, sec: f64) -> Self {
        let mjd = mjd_from_calendar(year, month, day);
        let day_s = hour as f64 * 3600.0 + min as f64 * 60.0 + sec;
        let tai_s_from_mjd0 = day_s + tai_minus_utc(mjd);
        let tt_days = mjd as f64 + (tai_s_from_mjd0 + TT_MINUS_TAI_S) / DAY_S;
        let jd_tt = tt_days + MJD_OFFSET;
        let tdb_s = (jd_tt - JD_J2000) * DAY_S + tdb_minus_tt(jd_tt);
        Epoch { tdb_s }
    }

    /// The epoch of a TDB calendar date and time of day.
    pub fn from_tdb_calendar(
        year: i32,
        month: u32,
        day: u32,
        hour: u32,
        min: u32,
        sec: f64,
    ) -> Self {
        let mjd = mjd_from_calendar(year, month, day);
        let s = hour as f64 * 3600.0 + min as f64 * 60.0 + sec;
        Epoch {
            tdb_s: (mjd as f64 + MJD_OFFSET - JD_J2000) * DAY_S + s,
        }
    }

    /// UTC calendar fields (year, month, day, hour, minute, second) of this epoch.
    pub fn to_utc(self) -> (i32, u32, u32, u32, u32, f64) {
        let jd_tdb = self.jd_tdb();
        // TDB -> TT (the periodic term is a function of TT; one fixed-point step is exact to ns).
        let tt_s = self.tdb_s - tdb_minus_tt(jd_tdb - tdb_minus_tt(jd_tdb) / DAY_S);
        let tai_s = tt_s - TT_MINUS_TAI_S;
        // Seconds since MJD 51544.5 (J2000 noon) on the TAI scale; find the UTC day.
        let mut off = 37.0;
        for _ in 0..3 {
            let utc_s = tai_s - off;
            let mjd_f = 51_544.5 + utc_s / DAY_S;
            let new_off = tai_minus_utc(mjd_f.floor() as i32);
            if new_off == off {
                break;
            }
            off = new_off;
        }
        Self::split_days(51_544.5 + (tai_s - off) / DAY_S)
    }

    /// TDB calendar fields of this epoch.
    pub fn to_tdb_calendar(self) -> (i32, u32, u32, u32, u32, f64) {
        Self::split_days(self.mjd_tdb())
    }

    fn split_days(mjd: f64) -> (i32, u32, u32, u32, u32, f64) {
        // Round to the millisecond first so that formatting never shows 60.000 s.
        let total_ms = (mjd * DAY_S * 1000.0).round();
        let day = (total_ms / (DAY_S * 1000.0)).floor();
        let ms_of_day = total_ms - day * DAY_S * 1000.0;
        let (y, mo, d) = calendar_from_mjd(day as i32);
        let h = (ms_of_day / 3_600_000.0).floor();
        let mi = ((ms_of_day - h * 3_600_000.0) / 60_000.0).floor();
        let s = (ms_of_day - h * 3_600_000.0 - mi * 60_000.0) / 1000.0;
        (y, mo, d, h as u32, mi as u32, s)
    }

    /// ISO-8601 text in UTC with millisecond precision, e.g. `2031-03-04T12:00:00.000 UTC`.
    pub fn to_iso_utc(self) -> String {
        let (y, mo, d, h, mi, s) = self.to_utc();
        format!("{y:04}-{mo:02}-{d:02}T{h:02}:{mi:02}:{s:06.3} UTC")
    }

    /// ISO-8601 text in TDB with millisecond precision.
    pub fn to_iso_tdb(self) -> String {
        let (y, mo, d, h, mi, s) = self.to_tdb_calendar();
        format!("{y:04}-{mo:02}-{d:02}T{h:02}:{mi:02}:{s:06.3} TDB")
    }

    /// The UTC calendar date alone, `YYYY-MM-DD`.
    pub fn to_date_utc(self) -> String {
        let (y, mo, d, ..) = self.to_utc();
        format!("{y:04}-{mo:02}-{d:02}")
    }

    /// Parse ISO-8601 text: `YYYY-MM-DD`, optionally `THH:MM[:SS[.fff]]`, optionally followed by
    /// `Z`, ` UTC` or ` TDB`. Without a scale the text is read as UTC.
    pub fn parse(text: &str) -> Result<Epoch, TimeError> {
        let t = text.trim();
        let syntax = || TimeError::Syntax(text.to_string());
        let (body, scale) = if let Some(b) = t.strip_suffix("TDB") {
            (b.trim_end(), TimeScale::Tdb)
        } else if let Some(b) = t.strip_suffix("UTC") {
            (b.trim_end(), TimeScale::Utc)
        } else if let Some(b) = t.strip_suffix('Z') {
            (b, TimeScale::Utc)
        } else {
            (t, TimeScale::Utc)
        };
        let (date, time) = match body.split_once(['T', ' ']) {
            Some((d, tm)) => (d, Some(tm.trim())),
            None => (body, None),
        };
        let mut parts = date.splitn(3, '-');
        let y: i32 = parts
            .next()
            .and_then(|p| p.parse().ok())
            .ok_or_else(syntax)?;
        let mo: u32 = parts
            .next()
            .and_then(|p| p.parse().ok())
            .ok_or_else(syntax)?;
        let d: u32 = parts
            .next()
            .and_then(|p| p.parse().ok())
            .ok_or_else(syntax)?;
        if date.len() < 8 {
            return Err(syntax());
        }
        if !(1..=12).contains(&mo) {
            return Err(TimeError::Range(text.to_string(), "month"));
        }
        if d < 1 || d > days_in_month(y, mo) {
            return Err(TimeError::Range(text.to_string(), "day"));
        }
        let (mut h, mut mi, mut s) = (0u32, 0u32, 0.0f64);
        if let Some(tm) = time.filter(|tm| !tm.is_empty()) {
            let mut f = tm.split(':');
            h = f.next().and_then(|p| p.parse().ok()).ok_or_else(syntax)?;
            mi = f.next().and_then(|p| p.parse().ok()).ok_or_else(syntax)?;
            if let Some(sp) = f.next() {
                s = sp.parse().map_err(|_| syntax())?;
            }
            if f.next().is_some() {
                return Err(syntax());
            }
            if h > 23 {
                return Err(TimeError::Range(text.to_string(), "hour"));
            }
            if mi > 59 {
                return Err(TimeError::Range(text.to_string(), "minute"));
            }
            if !(0.0..61.0).contains(&s) {
                return Err(TimeError::Range(text.to_string(), "second"));
            }
        }
        Ok(match scale {
            TimeScale::Utc => Epoch::from_utc(y, mo, d, h, mi, s),
            TimeScale::Tdb => Epoch::from_tdb_calendar(y, mo, d, h, mi, s),
        })
    }
}

impl fmt::Display for Epoch {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.to_iso_utc())
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
        s.serialize_str(&self.to_iso_utc())
    }
}

impl<'de> serde::Deserialize<'de> for Epoch {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        let s = String::deserialize(d)?;
        Epoch::parse(&s).map_err(serde::de::Error::custom)
    }
}
