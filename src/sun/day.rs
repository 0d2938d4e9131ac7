//! The sun over a day at the site: its path at a step, sunrise, transit and sunset, the
//! solstices and equinoxes of a year, and the times an item's walls are in sun.

use super::clock::{Clock, LocalMoment};
use super::hourly::{topocentric, Hourly};
use super::position::{estimated_delta_t, sun_place_with, Air, SunPlace};
use crate::error::{Error, Result};
use crate::scene::{ItemId, Location, Site};
use crate::visibility::Bvh;
use jiff::civil::{Date, DateTime};
use nalgebra::{Point3, Vector3};
use solar_positioning::{Horizon, Location as Place, SolarEvents};

const SECONDS_PER_DAY: f64 = 86_400.0;
const UNIX_EPOCH_JD: f64 = 2_440_587.5;

/// The sky over a site: its place on the earth, its clock and its air.
#[derive(Clone, Debug)]
pub struct Sky {
    /// Where the site is.
    pub location: Location,
    /// Its local clock.
    pub clock: Clock,
    /// The air for refraction (the standard atmosphere at its height).
    pub air: Air,
}

/// The sun at one instant.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SunSample {
    /// Seconds of UT since 1970.
    pub instant_s: f64,
    /// The local date and clock time.
    pub local: DateTime,
    /// Where the sun stands.
    pub place: SunPlace,
}

/// Sunrise, transit and sunset of a local day, or the sun up or down all day.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DayEvents {
    /// Sunrise, if the sun rises that day.
    pub rise: Option<SunSample>,
    /// The sun crossing the meridian.
    pub transit: Option<SunSample>,
    /// Sunset, if the sun sets that day.
    pub set: Option<SunSample>,
    /// For a day without a rise or a set: whether the sun stays up (polar day) or down.
    pub all_day: Option<bool>,
}

impl Sky {
    /// The sky of a location; its time zone (if any) must be in the database.
    pub fn new(location: &Location) -> Result<Sky> {
        Ok(Sky {
            location: location.clone(),
            clock: Clock::of(location.time_zone.as_deref())?,
            air: Air::standard_at(location.height_m),
        })
    }

    /// The sky of a site, which must say where it is.
    pub fn of_site(site: &Site) -> Result<Sky> {
        let location = site.location.as_ref().ok_or_else(|| {
            Error::Sun(format!(
                "the scene \"{}\" does not say where it is: add a `location` block with its \
                 latitude, longitude and time zone (docs/scene-format.md)",
                site.name
            ))
        })?;
        Sky::new(location)
    }

    /// The sun at an instant.
    pub fn sample(&self, instant_s: f64) -> Result<SunSample> {
        let place = sun_place_with(
            &self.location,
            instant_s,
            estimated_delta_t(instant_s)?,
            self.air,
        )?;
        let local = self.local(instant_s)?;
        Ok(SunSample {
            instant_s,
            local,
            place,
        })
    }

    /// [`Sky::sample`] with the algorithm's slow part interpolated between the whole
    /// hours of `hourly` (see [`Hourly`]); the whole algorithm outside them.
    pub fn sample_between(&self, hourly: &Hourly, instant_s: f64) -> Result<SunSample> {
        let Some(slow) = hourly.at(instant_s) else {
            return self.sample(instant_s);
        };
        let local = self.local(instant_s)?;
        Ok(SunSample {
            instant_s,
            local,
            place: topocentric(&self.location, instant_s, &slow, self.air),
        })
    }

    /// The local date and time of an instant.
    fn local(&self, instant_s: f64) -> Result<DateTime> {
        self.clock
            .local(instant_s)
            .ok_or_else(|| Error::Sun(format!("no local time for the instant {instant_s} s")))
    }

    /// The sun at a local date and time.
    pub fn at(&self, moment: &LocalMoment) -> Result<SunSample> {
        self.sample(self.clock.instant(moment)?)
    }

    /// The unit direction towards the sun in the site frame.
    pub fn direction(&self, sample: &SunSample) -> Vector3<f64> {
        sample.place.direction(self.location.north_deg)
    }

    /// The sun from the local midnight that begins `date` to the one that ends it, every
    /// `step_s` seconds (the last sample at the end of the day).
    pub fn day(&self, date: Date, step_s: f64) -> Result<Vec<SunSample>> {
        let (start, end) = self.day_bounds(date)?;
        self.span(start, end, step_s)
    }

    /// The sun from `start` to `end` (instants) every `step_s` seconds, both ends included.
    pub fn span(&self, start: f64, end: f64, step_s: f64) -> Result<Vec<SunSample>> {
        if !(step_s.is_finite() && step_s >= 1.0) {
            return Err(Error::Setting(format!(
                "a step of {step_s} s: expected at least a second"
            )));
        }
        let count = ((end - start) / step_s).ceil().max(0.0) as usize;
        (0..=count)
            .map(|k| self.sample((start + k as f64 * step_s).min(end)))
            .collect()
    }

    /// The instants of the local midnights that begin and end `date`.
    pub fn day_bounds(&self, date: Date) -> Result<(f64, f64)> {
        let next = date
            .tomorrow()
            .map_err(|e| Error::Sun(format!("the day after {date}: {e}")))?;
        Ok((
            self.clock.start_of_day(date)?,
            self.clock.start_of_day(next)?,
        ))
    }

    /// Sunrise, transit and sunset on a local day (the upper limb on a horizon 50 minutes
    /// of arc below the true one, as almanacs give them: refraction and the sun's radius).
    pub fn events(&self, date: Date) -> Result<DayEvents> {
        let (start, end) = self.day_bounds(date)?;
        let jd = |s: f64| UNIX_EPOCH_JD + s / SECONDS_PER_DAY;
        let place = Place {
            latitude: self.location.latitude_deg,
            longitude: self.location.longitude_deg,
        };
        let delta_t = estimated_delta_t(start)?;
        let events = SolarEvents::new()
            .for_interval_from_julian(jd(start), jd(end), place, delta_t, Horizon::SunriseSunset)
            .map_err(|e| Error::Sun(format!("sunrise and sunset on {date}: {e}")))?;
        let instant = |day: f64| (day - UNIX_EPOCH_JD) * SECONDS_PER_DAY;
        let sample = |days: Option<&f64>| days.map(|d| self.sample(instant(*d))).transpose();
        let all_day = if events.rises.is_empty() && events.sets.is_empty() {
            Some(events.always_above())
        } else {
            None
        };
        Ok(DayEvents {
            rise: sample(events.rises.first())?,
            transit: sample(events.transits.first())?,
            set: sample(events.sets.last())?,
            all_day,
        })
    }

    /// The local dates of the year's March equinox, June solstice, September equinox and
    /// December solstice: the days on which the sun's declination crosses zero or turns
    /// (found from the algorithm's own declination at each local noon).
    pub fn seasons(&self, year: i16) -> Result<[Date; 4]> {
        let noon_declination = |date: Date| -> Result<f64> {
            let (start, end) = self.day_bounds(date)?;
            declination(0.5 * (start + end))
        };
        let day = |month: i8, d: i8| {
            Date::new(year, month, d).map_err(|e| Error::Sun(format!("{year}: {e}")))
        };
        // Each event falls within a few days of the 21st of its month (common practice).
        let mut found = [day(3, 21)?, day(6, 21)?, day(9, 22)?, day(12, 21)?];
        for (k, date) in found.iter_mut().enumerate() {
            let mut best = (f64::INFINITY, *date);
            for shift in -4..=4 {
                let candidate = date
                    .checked_add(jiff::Span::new().days(shift))
                    .map_err(|e| Error::Sun(e.to_string()))?;
                let d = noon_declination(candidate)?;
                // Equinoxes: declination nearest zero; solstices: farthest from it.
                let score = if k % 2 == 0 { d.abs() } else { -d.abs() };
                if score < best.0 {
                    best = (score, candidate);
                }
            }
            *date = best.1;
        }
        Ok(found)
    }
}

/// The sun's geocentric declination at an instant, degrees.
fn declination(instant_s: f64) -> Result<f64> {
    let time = solar_positioning::time::JulianDate::new(
        UNIX_EPOCH_JD + instant_s / SECONDS_PER_DAY,
        estimated_delta_t(instant_s)?,
    )
    .map_err(|e| Error::Sun(e.to_string()))?;
    let prepared = solar_positioning::SolarPositions::new()
        .for_time_from_julian(time)
        .map_err(|e| Error::Sun(e.to_string()))?;
    Ok(prepared.declination())
}

/// A wall of an item: a vertical plane piece made of the item's faces in that plane.
#[derive(Clone, Debug, PartialEq)]
pub struct Wall {
    /// The horizontal outward normal, unit, in the site frame.
    pub normal: Vector3<f64>,
    /// Points on the wall whose light is tested: its triangles' centres.
    pub points: Vec<Point3<f64>>,
    /// The plan azimuth (degrees from the plan's y axis) the wall faces.
    pub facing_deg: f64,
}

/// The walls of an item: its faces within 5 degrees of vertical, grouped by plane, with
/// normals turned away from the item's centre (so walls of a convex item face out; a wall
/// in a re-entrant corner of another shape may be turned wrongly).
pub fn walls(site: &Site, item: ItemId) -> Vec<Wall> {
    const VERTICAL_WITHIN: f64 = 0.087; // sin 5 degrees
    let faces: Vec<_> = site.faces.iter().filter(|f| f.item == item).collect();
    if faces.is_empty() {
        return Vec::new();
    }
    let centre = faces
        .iter()
        .flat_map(|f| f.corners.iter())
        .fold(Vector3::zeros(), |sum, p| sum + p.coords)
        / (3 * faces.len()) as f64;
    let mut walls: Vec<(Vector3<f64>, f64, Vec<Point3<f64>>)> = Vec::new();
    for face in faces {
        let [a, b, c] = face.corners;
        let Some(mut normal) = (b - a).cross(&(c - a)).try_normalize(1e-12) else {
            continue;
        };
        if normal.z.abs() > VERTICAL_WITHIN {
            continue;
        }
        let middle = Point3::from((a.coords + b.coords + c.coords) / 3.0);
        if normal.dot(&(middle.coords - centre)) < 0.0 {
            normal = -normal;
        }
        let offset = normal.dot(&middle.coords);
        match walls
            .iter_mut()
            .find(|(n, d, _)| n.dot(&normal) > 1.0 - 1e-9 && (d - offset).abs() < 1e-6)
        {
            Some((_, _, points)) => points.push(middle),
            None => walls.push((normal, offset, vec![middle])),
        }
    }
    walls
        .into_iter()
        .map(|(normal, _, points)| Wall {
            facing_deg: normal.x.atan2(normal.y).to_degrees().rem_euclid(360.0),
            normal,
            points,
        })
        .collect()
}

/// Whether the sun (unit direction `towards_sun`, site frame) shines on a wall: in front
/// of its plane and above the horizon, and, with `blocking`, reaching at least one of its
/// test points past every other item's faces.
pub fn wall_in_sun(
    site: &Site,
    wall: &Wall,
    item: ItemId,
    towards_sun: &Vector3<f64>,
    blocking: Option<&Bvh>,
) -> bool {
    if towards_sun.z <= 0.0 || wall.normal.dot(towards_sun) <= 0.0 {
        return false;
    }
    let Some(bvh) = blocking else { return true };
    wall.points.iter().any(|p| {
        bvh.first_hit(
            &site.faces,
            p,
            towards_sun,
            f64::INFINITY,
            |_, face, distance| face.item != item && distance > 1e-6,
        )
        .is_none()
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sky(latitude: f64, longitude: f64, zone: &str) -> Sky {
        Sky::new(&Location {
            latitude_deg: latitude,
            longitude_deg: longitude,
            height_m: 0.0,
            north_deg: 0.0,
            time_zone: Some(zone.into()),
        })
        .unwrap()
    }

    #[test]
    fn at_transit_the_sun_is_due_south_north_of_the_tropic() {
        // Common practice: north of the Tropic of Cancer the sun at transit stands due
        // south, so a pole's shadow points true north.
        let sky = sky(48.85, 2.35, "Europe/Paris");
        for date in ["2026-01-15", "2026-06-21", "2026-09-30"] {
            let events = sky.events(date.parse().unwrap()).unwrap();
            let transit = events.transit.unwrap();
            assert!(
                (transit.place.azimuth_deg - 180.0).abs() < 0.01,
                "{date}: {transit:?}"
            );
        }
    }

    #[test]
    fn on_an_equinox_the_sun_rises_near_due_east() {
        // Common practice: at the equinoxes the sun rises close to due east and sets close
        // to due west, anywhere off the poles (within a degree or so, from refraction and
        // the day's change of declination).
        for (latitude, zone) in [(0.5, "Africa/Libreville"), (51.5, "Europe/London")] {
            let sky = sky(latitude, 0.0, zone);
            let [march, _, _, _] = sky.seasons(2026).unwrap();
            let events = sky.events(march).unwrap();
            let rise = events.rise.unwrap().place.azimuth_deg;
            let set = events.set.unwrap().place.azimuth_deg;
            assert!((rise - 90.0).abs() < 1.5, "rise at {rise}");
            assert!((set - 270.0).abs() < 1.5, "set at {set}");
        }
    }

    #[test]
    fn solstices_and_polar_days() {
        // The June solstice of 2026 is on 21 June (UT 08:24, from memory).
        let london = sky(51.5, 0.0, "Europe/London");
        let seasons = london.seasons(2026).unwrap();
        assert_eq!(seasons[1], Date::new(2026, 6, 21).unwrap());
        assert_eq!(seasons[3], Date::new(2026, 12, 21).unwrap());
        // North of the Arctic Circle the sun does not set at the June solstice, nor rise at
        // the December one (common practice).
        let north = sky(78.2, 15.6, "Arctic/Longyearbyen");
        let june = north.events(seasons[1]).unwrap();
        assert_eq!(
            (june.rise, june.set, june.all_day),
            (None, None, Some(true))
        );
        let december = north.events(seasons[3]).unwrap();
        assert_eq!(december.all_day, Some(false));
    }

    #[test]
    fn a_day_with_a_clock_change_is_23_hours_long() {
        let london = sky(51.5, 0.0, "Europe/London");
        let samples = london.day("2026-03-29".parse().unwrap(), 600.0).unwrap();
        // 23 hours at 10 minutes: 138 steps, 139 samples.
        assert_eq!(samples.len(), 139);
        assert_eq!(samples.last().unwrap().local.hour(), 0);
    }
}
