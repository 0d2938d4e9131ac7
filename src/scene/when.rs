//! Dates and clock times as a scene or a command line writes them (`2026-06-21`, `15:30`,
//! `01:30+01:00`), read strictly, and their offset from UT in the site's time zone
//! ([`offset_in`]): the loader checks the scene's `sun` block with it, so that a time the
//! clocks skip is refused where it is written, and the sun's clock turns times into instants
//! with it.

use crate::error::{Error, Result};
use jiff::civil::{Date, DateTime, Time};
use jiff::tz::{AmbiguousOffset, Offset, TimeZone};
use jiff::Timestamp;
use serde::{Deserialize, Deserializer};

/// The years the sun is found for: those of the delta-T estimate the sun's position uses
/// (Espenak and Meeus's polynomials, -500 to 3000); NREL's algorithm itself covers -2000
/// to 6000 (Reda and Andreas, NREL/TP-560-34302, section 1).
pub const YEARS: std::ops::RangeInclusive<i16> = -500..=3000;

/// A date and a clock time as a person writes them, with the offset from UT when they
/// give one (to pick one of the two readings of a repeated hour).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct LocalMoment {
    /// The calendar day.
    pub date: Date,
    /// The local clock time.
    pub time: Time,
    /// The offset from UT written after the time, seconds east.
    pub offset_s: Option<i32>,
}

impl LocalMoment {
    /// Reads `YYYY-MM-DD` and `HH:MM[:SS][+HH:MM|-HH:MM|Z]`.
    pub fn parse(date: &str, time: &str) -> Result<LocalMoment> {
        let (date, (time, offset_s)) = (parse_date(date)?, parse_time(time)?);
        Ok(LocalMoment {
            date,
            time,
            offset_s,
        })
    }

    /// The same day at another clock time, without an offset.
    pub fn at(&self, time: Time) -> LocalMoment {
        LocalMoment {
            date: self.date,
            time,
            offset_s: None,
        }
    }
}

/// Reads a date written `YYYY-MM-DD`, in the years the sun is found for.
pub fn parse_date(text: &str) -> Result<Date> {
    let bad = || {
        Error::Sun(format!(
            "\"{text}\" is not a date: expected year-month-day, such as 2026-06-21"
        ))
    };
    let text = text.trim();
    let (sign, rest) = match text.strip_prefix('-') {
        Some(rest) => (-1, rest),
        None => (1, text),
    };
    let mut parts = rest.split('-');
    let mut number = |digits: std::ops::RangeInclusive<usize>| -> Result<i32> {
        let part = parts.next().ok_or_else(bad)?;
        if !digits.contains(&part.len()) || !part.bytes().all(|b| b.is_ascii_digit()) {
            return Err(bad());
        }
        part.parse().map_err(|_| bad())
    };
    let (year, month, day) = (sign * number(1..=4)?, number(2..=2)?, number(2..=2)?);
    if parts.next().is_some() {
        return Err(bad());
    }
    let year = i16::try_from(year).map_err(|_| bad())?;
    if !YEARS.contains(&year) {
        return Err(Error::Sun(format!(
            "the year {year} is outside the years the sun's position is found for ({} to {})",
            YEARS.start(),
            YEARS.end()
        )));
    }
    Date::new(year, month as i8, day as i8).map_err(|_| {
        Error::Sun(format!(
            "\"{text}\" is not a day of the calendar (month 1 to 12, day within the month)"
        ))
    })
}

/// Reads a clock time `HH:MM` or `HH:MM:SS`, optionally followed by its offset from UT.
pub fn parse_time(text: &str) -> Result<(Time, Option<i32>)> {
    let bad = || {
        Error::Sun(format!(
            "\"{text}\" is not a clock time: expected hours and minutes such as 15:30, \
             optionally seconds (15:30:20) and an offset from UT (01:30+01:00)"
        ))
    };
    let text = text.trim();
    let (clock, offset_s) = match text.find(['+', '-', 'Z']) {
        Some(at) => (
            &text[..at],
            Some(parse_offset(&text[at..]).ok_or_else(bad)?),
        ),
        None => (text, None),
    };
    let fields: Vec<&str> = clock.split(':').collect();
    if !(2..=3).contains(&fields.len())
        || fields
            .iter()
            .any(|f| f.len() != 2 || !f.bytes().all(|b| b.is_ascii_digit()))
    {
        return Err(bad());
    }
    let value = |k: usize| {
        fields
            .get(k)
            .map_or(Ok(0), |f| f.parse::<i8>().map_err(|_| bad()))
    };
    let time = Time::new(value(0)?, value(1)?, value(2)?, 0).map_err(|_| bad())?;
    Ok((time, offset_s))
}

/// `Z`, `+HH:MM` or `-HH:MM`, in seconds east of UT.
fn parse_offset(text: &str) -> Option<i32> {
    if text == "Z" {
        return Some(0);
    }
    let sign = match text.as_bytes().first()? {
        b'+' => 1,
        b'-' => -1,
        _ => return None,
    };
    let (hours, minutes) = text[1..].split_once(':')?;
    if hours.len() != 2 || minutes.len() != 2 {
        return None;
    }
    let (hours, minutes): (i32, i32) = (hours.parse().ok()?, minutes.parse().ok()?);
    (hours <= 18 && minutes < 60).then_some(sign * (hours * 3600 + minutes * 60))
}

/// The offset from UT of a local moment in `zone` (called `zone_name` in messages). A time
/// the clocks skip is refused, saying which times are valid that day; a time they repeat is
/// refused unless its written offset picks one of its two readings; a written offset that
/// is neither reading is refused.
pub fn offset_in(
    zone: &TimeZone,
    zone_name: &str,
    moment: &LocalMoment,
) -> std::result::Result<Offset, String> {
    let local = DateTime::from_parts(moment.date, moment.time);
    let written = format!("{} {}", moment.date, moment.time.strftime("%H:%M:%S"));
    let offsets: Vec<Offset> = match zone.to_ambiguous_timestamp(local).offset() {
        AmbiguousOffset::Unambiguous { offset } => vec![offset],
        AmbiguousOffset::Gap { before, after } => {
            let (start, end) = change_times(zone, local, before, after);
            return Err(format!(
                "{written} does not exist in {zone_name}: the clocks go forward from {} to {} \
                 that day, so valid times are before {} or from {} on",
                clock_text(start),
                clock_text(end),
                clock_text(start),
                clock_text(end)
            ));
        }
        AmbiguousOffset::Fold { before, after } => {
            if moment.offset_s.is_none() {
                return Err(format!(
                    "{written} happens twice in {zone_name}: the clocks go back that day, so \
                     say which with its offset: {}{} (the first) or {}{} (the second)",
                    moment.time.strftime("%H:%M"),
                    offset_text(before),
                    moment.time.strftime("%H:%M"),
                    offset_text(after)
                ));
            }
            vec![before, after]
        }
    };
    match moment.offset_s {
        None => Ok(offsets[0]),
        Some(seconds) => offsets
            .iter()
            .find(|o| o.seconds() == seconds)
            .copied()
            .ok_or_else(|| {
                let valid: Vec<String> = offsets.iter().map(|o| offset_text(*o)).collect();
                format!(
                    "{written} in {zone_name} is at UT{}, not at the offset written ({})",
                    valid.join(" or UT"),
                    offset_seconds_text(seconds)
                )
            }),
    }
}

/// The local clock times just before and just after the change around `local` (a time in
/// a gap): the change happens at one instant, read at the old and the new offset.
fn change_times(
    zone: &TimeZone,
    local: DateTime,
    before: Offset,
    after: Offset,
) -> (DateTime, DateTime) {
    let at = |offset: Offset| offset.to_timestamp(local).map_or(0, |t| t.as_second());
    // The change lies between the two readings of the skipped time; find its second.
    let (mut lo, mut hi) = (at(after).min(at(before)), at(after).max(at(before)));
    let seconds = |s: i64| Timestamp::from_second(s).map_or(0, |t| zone.to_offset(t).seconds());
    while hi - lo > 1 {
        let mid = lo + (hi - lo) / 2;
        if seconds(mid) == before.seconds() {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let change = Timestamp::from_second(hi).unwrap_or(Timestamp::UNIX_EPOCH);
    (before.to_datetime(change), after.to_datetime(change))
}

fn clock_text(t: DateTime) -> String {
    t.strftime("%H:%M").to_string()
}

fn offset_text(offset: Offset) -> String {
    offset_seconds_text(offset.seconds())
}

/// An offset from UT in seconds as it is written, `+HH:MM` or `-HH:MM`.
pub fn offset_seconds_text(seconds: i32) -> String {
    let sign = if seconds < 0 { '-' } else { '+' };
    let s = seconds.unsigned_abs();
    format!("{sign}{:02}:{:02}", s / 3600, s / 60 % 60)
}

/// The scene's `sun` block: the date and local time of the sun and shadows drawn, and
/// which of them to draw.
///
/// ```ron
/// sun: (date: "2026-06-21", time: "15:30", path: true, seasons: false, shadows: true),
/// ```
#[derive(Clone, Debug, PartialEq, Deserialize)]
#[serde(rename = "Sun", deny_unknown_fields)]
pub struct SunSpec {
    /// The day, `YYYY-MM-DD`.
    pub date: DateText,
    /// The local clock time, `HH:MM[:SS]`, with its offset if written.
    pub time: TimeText,
    /// The sun's mark and the day's path with its hours.
    #[serde(default = "yes")]
    pub path: bool,
    /// The paths at the solstices and the equinox.
    #[serde(default)]
    pub seasons: bool,
    /// The outlines of the shadows.
    #[serde(default = "yes")]
    pub shadows: bool,
    /// Hatching of what is in shadow, lines this many metres apart (none if not given).
    #[serde(default)]
    pub hatch: Option<super::numbers::Positive>,
    /// A pale filled tone over the shade the eye sees.
    #[serde(default)]
    pub tone: bool,
}

fn yes() -> bool {
    true
}

impl SunSpec {
    /// The date and time as one moment.
    pub fn moment(&self) -> LocalMoment {
        LocalMoment {
            date: self.date.0,
            time: self.time.0,
            offset_s: self.time.1,
        }
    }
}

/// A date read from its text.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DateText(pub Date);

impl<'de> Deserialize<'de> for DateText {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> std::result::Result<Self, D::Error> {
        let text = String::deserialize(deserializer)?;
        parse_date(&text)
            .map(DateText)
            .map_err(serde::de::Error::custom)
    }
}

/// A clock time (and its offset, if written) read from its text.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TimeText(pub Time, pub Option<i32>);

impl<'de> Deserialize<'de> for TimeText {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> std::result::Result<Self, D::Error> {
        let text = String::deserialize(deserializer)?;
        parse_time(&text)
            .map(|(t, o)| TimeText(t, o))
            .map_err(serde::de::Error::custom)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dates_and_times_are_read_strictly() {
        assert!(parse_date("2026-02-30").is_err());
        assert!(parse_date("26-02-03").is_ok()); // the year 26
        assert!(parse_date("2026/02/03").is_err());
        let far = parse_date("3001-01-01").unwrap_err().to_string();
        assert!(far.contains("outside the years"), "{far}");
        assert!(parse_date("-0400-01-01").is_ok());
        assert_eq!(parse_time("07:05").unwrap().0, Time::constant(7, 5, 0, 0));
        assert_eq!(parse_time("07:05:09Z").unwrap().1, Some(0));
        assert_eq!(parse_time("07:05-06:30").unwrap().1, Some(-23_400));
        for bad in ["7:05", "24:00", "12:60", "12", "12:00+1", "noon"] {
            assert!(parse_time(bad).is_err(), "{bad}");
        }
    }

    #[test]
    fn a_sun_block_reads_with_defaults() {
        let spec: SunSpec = ron::from_str("(date: \"2026-06-21\", time: \"15:30\")").unwrap();
        assert!(spec.path && spec.shadows && !spec.seasons);
        assert_eq!(spec.moment().time, Time::constant(15, 30, 0, 0));
        let error = ron::from_str::<SunSpec>("(date: \"2026-13-01\", time: \"15:30\")")
            .unwrap_err()
            .to_string();
        assert!(error.contains("not a day of the calendar"), "{error}");
    }
}
