//! Dates and local clock times at the site, turned into instants of universal time through
//! the IANA time-zone database bundled with `jiff` (so the answer does not depend on the
//! machine's own copy of the database).
//!
//! A clock time that a daylight-saving change skips is refused, and so is one that it
//! repeats unless the offset is written after it (`01:30+01:00`); the message says which
//! times are valid. Without a time zone the clock is universal time.

use crate::error::{Error, Result};
pub use crate::scene::LocalMoment;
use crate::scene::{find_time_zone, offset_in};
use jiff::civil::{Date, DateTime, Time};
use jiff::tz::TimeZone;
use jiff::Timestamp;

/// The site's clock: a zone of the bundled database, or universal time.
#[derive(Clone, Debug)]
pub struct Clock {
    name: String,
    zone: TimeZone,
}

impl Clock {
    /// Universal time, for a site that names no time zone.
    pub fn universal() -> Clock {
        Clock {
            name: "UTC".to_owned(),
            zone: TimeZone::UTC,
        }
    }

    /// The zone of this IANA name; an unknown name is refused, with the nearest known one.
    pub fn named(name: &str) -> Result<Clock> {
        Ok(Clock {
            name: name.to_owned(),
            zone: find_time_zone(name)?,
        })
    }

    /// The zone of an optional name: universal time when there is none.
    pub fn of(name: Option<&str>) -> Result<Clock> {
        name.map_or_else(|| Ok(Clock::universal()), Clock::named)
    }

    /// The zone's name (`UTC` without one).
    pub fn name(&self) -> &str {
        &self.name
    }

    /// The instant (seconds of UT since 1970) of a local date and clock time. A time the
    /// clocks skip is refused, and a time they repeat unless its offset picks a reading.
    pub fn instant(&self, moment: &LocalMoment) -> Result<f64> {
        let local = DateTime::from_parts(moment.date, moment.time);
        let offset = offset_in(&self.zone, &self.name, moment).map_err(Error::Sun)?;
        let timestamp = offset.to_timestamp(local).map_err(|e| {
            Error::Sun(format!(
                "{} {}: {e}",
                moment.date,
                moment.time.strftime("%H:%M:%S")
            ))
        })?;
        Ok(timestamp.as_millisecond() as f64 / 1000.0)
    }

    /// The local date and time of an instant.
    pub fn local(&self, instant_s: f64) -> Option<DateTime> {
        let timestamp = Timestamp::from_millisecond((instant_s * 1000.0).round() as i64).ok()?;
        Some(self.zone.to_datetime(timestamp))
    }

    /// The offset from UT at an instant, seconds.
    pub fn offset_at(&self, instant_s: f64) -> i32 {
        Timestamp::from_second(instant_s.floor() as i64)
            .map_or(0, |t| self.zone.to_offset(t).seconds())
    }

    /// The instant of a local midnight that begins `date` (or the first instant of that
    /// day, if the clocks skip midnight).
    pub fn start_of_day(&self, date: Date) -> Result<f64> {
        let timestamp = self
            .zone
            .to_ambiguous_timestamp(date.to_datetime(Time::midnight()))
            .compatible()
            .map_err(|e| Error::Sun(format!("{date}: {e}")))?;
        Ok(timestamp.as_millisecond() as f64 / 1000.0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn moment(date: &str, time: &str) -> LocalMoment {
        LocalMoment::parse(date, time).unwrap()
    }

    // The IANA database (as bundled by jiff): in the European Union's rule, clocks go
    // forward at 01:00 UT on the last Sunday of March and back at 01:00 UT on the last
    // Sunday of October (Directive 2000/84/EC); in the United States, forward at 02:00
    // local on the second Sunday of March and back at 02:00 on the first Sunday of November
    // (Energy Policy Act of 2005).
    #[test]
    fn a_skipped_hour_is_refused_with_the_valid_times() {
        let clock = Clock::named("Europe/London").unwrap();
        let error = clock.instant(&moment("2026-03-29", "01:30")).unwrap_err();
        let text = error.to_string();
        assert!(text.contains("does not exist"), "{text}");
        assert!(text.contains("before 01:00 or from 02:00"), "{text}");
        // Either side of the gap is fine, and an hour of clock is an hour of UT less one.
        let before = clock.instant(&moment("2026-03-29", "00:59")).unwrap();
        let after = clock.instant(&moment("2026-03-29", "02:00")).unwrap();
        assert_eq!(after - before, 60.0);
        let clock = Clock::named("America/Denver").unwrap();
        let text = clock
            .instant(&moment("2026-03-08", "02:15"))
            .unwrap_err()
            .to_string();
        assert!(text.contains("before 02:00 or from 03:00"), "{text}");
    }

    #[test]
    fn a_repeated_hour_needs_its_offset() {
        let clock = Clock::named("Europe/London").unwrap();
        let text = clock
            .instant(&moment("2026-10-25", "01:30"))
            .unwrap_err()
            .to_string();
        assert!(text.contains("happens twice"), "{text}");
        assert!(
            text.contains("01:30+01:00") && text.contains("01:30+00:00"),
            "{text}"
        );
        let first = clock.instant(&moment("2026-10-25", "01:30+01:00")).unwrap();
        let second = clock.instant(&moment("2026-10-25", "01:30+00:00")).unwrap();
        assert_eq!(second - first, 3600.0);
        // 2026-10-25 00:30 UT is 1792888200 s after 1970 (Python's calendar.timegm).
        assert_eq!(first, 1_792_888_200.0);
        assert!(clock.instant(&moment("2026-10-25", "01:30+02:00")).is_err());
    }

    #[test]
    fn ordinary_times_and_unknown_zones() {
        let clock = Clock::named("Europe/Paris").unwrap();
        // Summer time in Paris is UT + 2 h: 2026-06-21 14:00 local is 12:00 UT, which is
        // 1782043200 s after 1970 (Python's calendar.timegm).
        let noon = clock.instant(&moment("2026-06-21", "14:00")).unwrap();
        assert_eq!(noon, 1_782_043_200.0);
        assert_eq!(clock.offset_at(noon), 7200);
        let error = Clock::named("Europe/Pariss").unwrap_err().to_string();
        assert!(
            error.contains("not a time zone") && error.contains("Europe/Paris"),
            "{error}"
        );
        assert!(Clock::of(None).unwrap().name() == "UTC");
    }
}
