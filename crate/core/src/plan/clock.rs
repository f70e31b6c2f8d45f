//! Local wall-clock times (no time zone) for labelling intervals: parse `YYYY-MM-DDTHH:MM:SS`, add
//! seconds, print back. Pure arithmetic on the proleptic Gregorian calendar; the core reads no clock.

use crate::limits::{MAX_YEAR, MIN_YEAR};
use std::fmt;

/// A local date and time, kept as seconds since 1970-01-01T00:00:00 (no zone, no leap seconds).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub struct LocalTime {
    seconds: i64,
}

/// Days since 1970-01-01 of a civil date (H. Hinnant's algorithm).
fn days_from_civil(y: i64, m: i64, d: i64) -> i64 {
    let y = if m <= 2 { y - 1 } else { y };
    let era = y.div_euclid(400);
    let yoe = y - era * 400;
    let mp = (m + 9) % 12;
    let doy = (153 * mp + 2) / 5 + d - 1;
    let doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    era * 146_097 + doe - 719_468
}

fn civil_from_days(z: i64) -> (i64, i64, i64) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = yoe + era * 400 + i64::from(m <= 2);
    (y, m, d)
}

fn days_in_month(y: i64, m: i64) -> i64 {
    match m {
        1 | 3 | 5 | 7 | 8 | 10 | 12 => 31,
        4 | 6 | 9 | 11 => 30,
        _ if (y % 4 == 0 && y % 100 != 0) || y % 400 == 0 => 29,
        _ => 28,
    }
}

impl LocalTime {
    /// Parses `YYYY-MM-DDTHH:MM:SS` (a space instead of `T` and a missing `:SS` are accepted).
    pub fn parse(s: &str) -> Option<LocalTime> {
        let s = s.trim();
        let (date, time) = s.split_once(['T', ' '])?;
        let mut d = date.split('-');
        let y: i64 = d.next()?.parse().ok()?;
        if !(MIN_YEAR..=MAX_YEAR).contains(&y) {
            return None;
        }
        let m: i64 = d.next()?.parse().ok()?;
        let day: i64 = d.next()?.parse().ok()?;
        if d.next().is_some() || !(1..=12).contains(&m) || day < 1 || day > days_in_month(y, m) {
            return None;
        }
        let mut t = time.split(':');
        let h: i64 = t.next()?.parse().ok()?;
        let min: i64 = t.next()?.parse().ok()?;
        let sec: i64 = match t.next() {
            Some(v) => v.parse().ok()?,
            None => 0,
        };
        if t.next().is_some()
            || !(0..24).contains(&h)
            || !(0..60).contains(&min)
            || !(0..60).contains(&sec)
        {
            return None;
        }
        Some(LocalTime {
            seconds: days_from_civil(y, m, day) * 86_400 + h * 3600 + min * 60 + sec,
        })
    }

    /// Seconds since 1970-01-01T00:00:00 on the same (local) clock.
    pub fn seconds(self) -> i64 {
        self.seconds
    }

    /// The time `seconds` after 1970-01-01T00:00:00.
    pub fn from_seconds(seconds: i64) -> LocalTime {
        LocalTime { seconds }
    }

    /// This time plus whole seconds (saturating: labels past the year 9999 are never needed, as
    /// the number of intervals is limited).
    pub fn plus_seconds(self, s: i64) -> LocalTime {
        LocalTime {
            seconds: self.seconds.saturating_add(s),
        }
    }
}

impl fmt::Display for LocalTime {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let days = self.seconds.div_euclid(86_400);
        let rest = self.seconds.rem_euclid(86_400);
        let (y, m, d) = civil_from_days(days);
        write!(
            f,
            "{y:04}-{m:02}-{d:02}T{:02}:{:02}:{:02}",
            rest / 3600,
            rest % 3600 / 60,
            rest % 60
        )
    }
}

/// A time as a report writes it, from the ways a person or a spreadsheet may write it: a date and
/// a time (`2026-03-02 7:00`) as `2026-03-02T07:00:00`, a time alone (`7:00`, `00:15`,
/// `1:00:00`) as `HH:MM:SS`; anything else as it is (trimmed).
pub fn as_report_writes(s: &str) -> String {
    let s = s.trim();
    if let Some(t) = LocalTime::parse(s) {
        return t.to_string();
    }
    // Hours of 1 to 6 digits (at most 99,999); minutes and seconds of two, under 60.
    let number = |p: &str, digits: std::ops::RangeInclusive<usize>, most: u32| {
        (digits.contains(&p.len()) && p.bytes().all(|b| b.is_ascii_digit()))
            .then(|| p.parse::<u32>().ok())
            .flatten()
            .filter(|&v| v <= most)
    };
    let parts: Vec<&str> = s.split(':').collect();
    let (h, m, sec) = match parts.as_slice() {
        [h, m] => (*h, *m, "00"),
        [h, m, sec] => (*h, *m, *sec),
        _ => return s.to_string(),
    };
    let sixty = |p: &str| number(p, 2..=2, 59);
    match (number(h, 1..=6, 99_999), sixty(m), sixty(sec)) {
        (Some(h), Some(m), Some(sec)) => format!("{h:02}:{m:02}:{sec:02}"),
        _ => s.to_string(),
    }
}

/// Elapsed seconds as `HH:MM:SS` (hours may exceed 24), for plans without a start time: the
/// second a moment falls in, as a clock shows it (0.99 s is `00:00:00`, as the page shows it).
pub fn elapsed(seconds: f64) -> String {
    let s = whole_seconds(seconds.max(0.0));
    format!("{:02}:{:02}:{:02}", s / 3600, s % 3600 / 60, s % 60)
}

/// The whole second a moment falls in; a moment a rounding error short of a whole second (a
/// frame's time worked out at 29.97 frames a second) is taken as that second.
pub fn whole_seconds(seconds: f64) -> i64 {
    (seconds + 1e-6).floor() as i64
}

#[cfg(test)]
mod tests {
    use super::{as_report_writes, elapsed};

    /// A moment is labelled with the second it falls in, as a clock (and the page) shows it; a
    /// rounding error short of a whole second is that second (common practice).
    #[test]
    fn elapsed_time_is_the_second_a_moment_falls_in() {
        assert_eq!(elapsed(0.99), "00:00:00");
        assert_eq!(elapsed(1.0), "00:00:01");
        assert_eq!(elapsed((31.0 - 1.0) / 29.97 * 29.97), "00:00:30");
        assert_eq!(elapsed(3599.5), "00:59:59");
        assert_eq!(elapsed(-2.0), "00:00:00");
    }

    /// The ways a spreadsheet saves a time (common practice: `h:mm`, a date with a space).
    #[test]
    fn times_written_short_read_as_a_report_writes_them() {
        for (written, read) in [
            ("7:00", "07:00:00"),
            ("00:15", "00:15:00"),
            ("1:00:00", "01:00:00"),
            ("26:30", "26:30:00"),
            (" 2026-03-02 7:05 ", "2026-03-02T07:05:00"),
            ("2026-03-02T07:00:00", "2026-03-02T07:00:00"),
            ("7:5", "7:5"),
            ("7:60", "7:60"),
            ("am", "am"),
            ("", ""),
        ] {
            assert_eq!(as_report_writes(written), read, "{written:?}");
        }
    }
}
