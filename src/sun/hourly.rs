//! The sun's place at many instants of a day without the whole Solar Position Algorithm at
//! each: its slow part (steps 1-8 and 3.7 of Reda and Andreas, NREL/TP-560-34302: the
//! earth's heliocentric place, nutation, aberration, the sun's geocentric right ascension
//! and declination, and the nutation's share of the sidereal time) is found by the
//! `solar-positioning` crate at every whole hour of universal time and interpolated (three
//! hours, quadratic) between; the fast part (the mean sidereal time, the hour angle, the
//! parallax, the zenith, the azimuth and the refraction, the report's equations 12 and
//! 3.9-3.15) is worked out at each instant.
//!
//! The report's own appendix A.2 interpolates the right ascension and declination between
//! days for sunrise, transit and sunset. Over hours the interpolation is far closer: the
//! right ascension's third derivative is of the order of 1e-4 degrees a day cubed, so a
//! quadratic through points an hour apart is off by about 1e-9 degrees, against the
//! algorithm's stated uncertainty of +/-0.0003 degrees and the table's printed 0.001. The
//! test in this file holds it to 1e-7 degrees at every row of a year.

use super::position::{Air, SunPlace};
use crate::error::{Error, Result};
use crate::scene::Location;
use solar_positioning::{time::JulianDate, Location as Place, SolarPositions};

const UNIX_EPOCH_JD: f64 = 2_440_587.5;
const SECONDS_PER_DAY: f64 = 86_400.0;
const SECONDS_PER_HOUR: f64 = 3_600.0;
/// The earth's equatorial radius, metres, and its polar to equatorial ratio, as the report
/// takes them (equations 3.10).
const EARTH_RADIUS_M: f64 = 6_378_140.0;
const EARTH_FLATTENING: f64 = 0.996_647_19;
/// Below this elevation (degrees: the sun's radius and the refraction at the horizon) no
/// refraction is added, as the crate does.
const REFRACTION_CUTOFF_DEG: f64 = -0.83337;

/// The slow part of the algorithm at one instant.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Geocentric {
    /// The sun's geocentric right ascension and declination, degrees.
    pub alpha_deg: f64,
    pub delta_deg: f64,
    /// The earth's distance from the sun, astronomical units.
    pub r_au: f64,
    /// The nutation in longitude times the cosine of the true obliquity (the equation of
    /// the equinoxes, degrees): the apparent sidereal time less the mean.
    pub equinoxes_deg: f64,
}

/// The Julian day of an instant (seconds of UT since 1970).
fn julian_day(instant_s: f64) -> f64 {
    UNIX_EPOCH_JD + instant_s / SECONDS_PER_DAY
}

/// The mean sidereal time at Greenwich, degrees in [0, 360): equation 12 of the report
/// (Meeus, "Astronomical Algorithms", 12.4), from the Julian day of universal time.
pub fn mean_sidereal_deg(jd: f64) -> f64 {
    let jc = (jd - 2_451_545.0) / 36_525.0;
    (280.460_618_37
        + 360.985_647_366_29 * (jd - 2_451_545.0)
        + jc * jc * (0.000_387_933 - jc / 38_710_000.0))
        .rem_euclid(360.0)
}

/// An angle less a reference, brought within (-180, 180] degrees.
fn turn(angle_deg: f64, reference_deg: f64) -> f64 {
    let d = (angle_deg - reference_deg).rem_euclid(360.0);
    if d > 180.0 {
        d - 360.0
    } else {
        d
    }
}

impl Geocentric {
    /// The slow part at `instant_s` with delta T `delta_t_s`, by the crate. The crate
    /// gives the right ascension, declination and distance; the equation of the
    /// equinoxes is read back from its position at a place on the equator where the sun
    /// stands at an hour angle near 90 degrees (there every step inverts without loss):
    /// the topocentric hour angle from the zenith and azimuth (at latitude 0,
    /// cos z = cos d' cos H' and sin z sin A = -cos d' sin H'), the geocentric one by
    /// undoing the parallax in right ascension (equation 3.11, a fixed point reached in
    /// a few turns since sin xi is about 4e-5), and the sidereal time from it.
    pub fn at(instant_s: f64, delta_t_s: f64) -> Result<Geocentric> {
        let sun_error = |e: solar_positioning::Error| Error::Sun(e.to_string());
        let jd = julian_day(instant_s);
        let time = JulianDate::new(jd, delta_t_s).map_err(sun_error)?;
        let prepared = SolarPositions::new()
            .for_time_from_julian(time)
            .map_err(sun_error)?;
        let (alpha, delta) = (prepared.right_ascension(), prepared.declination());
        let r = prepared
            .earth_radius_vector()
            .ok_or_else(|| Error::Sun("the algorithm gave no distance".into()))?;
        let mean = mean_sidereal_deg(jd);
        let longitude = turn(alpha - mean + 90.0, 0.0);
        let place = Place {
            latitude: 0.0,
            longitude,
        };
        let seen = prepared.at(place, 0.0, None).map_err(sun_error)?;
        let (a, z) = (
            seen.azimuth().to_radians(),
            seen.zenith_angle().to_radians(),
        );
        let h_prime = (-z.sin() * a.sin()).atan2(z.cos());
        let sin_xi = (8.794 / (3600.0 * r)).to_radians().sin();
        let cos_delta = delta.to_radians().cos();
        let mut h = h_prime;
        for _ in 0..4 {
            let shift = (-sin_xi * h.sin()).atan2(cos_delta - sin_xi * h.cos());
            h = h_prime + shift;
        }
        let apparent = h.to_degrees() - longitude + alpha;
        Ok(Geocentric {
            alpha_deg: alpha,
            delta_deg: delta,
            r_au: r,
            equinoxes_deg: turn(apparent, mean),
        })
    }
}

/// The sun seen from `location` at `instant_s` given the slow part there: the report's
/// steps 3.9-3.15 (the hour angle, the topocentric right ascension and declination, the
/// zenith, the refraction of equation 3.14.2 in `air`, and the azimuth).
pub fn topocentric(location: &Location, instant_s: f64, slow: &Geocentric, air: Air) -> SunPlace {
    let nu = mean_sidereal_deg(julian_day(instant_s)) + slow.equinoxes_deg;
    let h = (nu + location.longitude_deg - slow.alpha_deg)
        .rem_euclid(360.0)
        .to_radians();
    let xi = (8.794 / (3600.0 * slow.r_au)).to_radians();
    let phi = location.latitude_deg.to_radians();
    let delta = slow.delta_deg.to_radians();
    let u = (EARTH_FLATTENING * phi.tan()).atan();
    let y = EARTH_FLATTENING * u.sin() + location.height_m / EARTH_RADIUS_M * phi.sin();
    let x = u.cos() + location.height_m / EARTH_RADIUS_M * phi.cos();
    let below = delta.cos() - x * xi.sin() * h.cos();
    let delta_alpha = (-x * xi.sin() * h.sin()).atan2(below);
    let delta_prime = ((delta.sin() - y * xi.sin()) * delta_alpha.cos()).atan2(below);
    let h_prime = h - delta_alpha;
    let cos_zenith = phi.sin() * delta_prime.sin() + phi.cos() * delta_prime.cos() * h_prime.cos();
    let zenith = cos_zenith.clamp(-1.0, 1.0).acos().to_degrees();
    let azimuth = (180.0
        + h_prime
            .sin()
            .atan2(h_prime.cos() * phi.sin() - delta_prime.tan() * phi.cos())
            .to_degrees())
    .rem_euclid(360.0);
    let elevation = 90.0 - zenith;
    let refraction = if elevation > REFRACTION_CUTOFF_DEG {
        (air.pressure_hpa / 1010.0) * (283.0 / (273.0 + air.temperature_c)) * 1.02
            / (60.0 * (elevation + 10.3 / (elevation + 5.11)).to_radians().tan())
    } else {
        0.0
    };
    SunPlace {
        azimuth_deg: azimuth,
        elevation_deg: elevation + refraction,
    }
}

/// The slow part at every whole hour of universal time over a stretch of time, to be
/// interpolated between.
pub struct Hourly {
    /// The hour (since 1970) of the first node.
    first_hour: i64,
    nodes: Vec<Geocentric>,
}

impl Hourly {
    /// The nodes for instants from `start_s` to `end_s`, delta T by `delta_t` at each.
    pub fn over(start_s: f64, end_s: f64, delta_t: impl Fn(f64) -> Result<f64>) -> Result<Hourly> {
        let first_hour = (start_s / SECONDS_PER_HOUR).round() as i64 - 1;
        let last_hour = (end_s / SECONDS_PER_HOUR).round() as i64 + 1;
        let nodes = (first_hour..=last_hour)
            .map(|hour| {
                let t = hour as f64 * SECONDS_PER_HOUR;
                Geocentric::at(t, delta_t(t)?)
            })
            .collect::<Result<Vec<_>>>()?;
        Ok(Hourly { first_hour, nodes })
    }

    /// The slow part at `instant_s` (within the stretch), through the nearest whole hour
    /// and the hours either side of it: Lagrange's quadratic, the right ascension taken
    /// round the circle from the middle node's.
    pub fn at(&self, instant_s: f64) -> Option<Geocentric> {
        let hours = instant_s / SECONDS_PER_HOUR;
        let middle = hours.round() as i64;
        let k = usize::try_from(middle - self.first_hour).ok()?;
        let (before, here, after) = (
            self.nodes.get(k.checked_sub(1)?)?,
            self.nodes.get(k)?,
            self.nodes.get(k + 1)?,
        );
        let x = hours - middle as f64;
        let quadratic =
            |a: f64, b: f64, c: f64| b + x * (c - a) / 2.0 + x * x * (c - 2.0 * b + a) / 2.0;
        let alpha = here.alpha_deg;
        Some(Geocentric {
            alpha_deg: (alpha
                + quadratic(
                    turn(before.alpha_deg, alpha),
                    0.0,
                    turn(after.alpha_deg, alpha),
                ))
            .rem_euclid(360.0),
            delta_deg: quadratic(before.delta_deg, here.delta_deg, after.delta_deg),
            r_au: quadratic(before.r_au, here.r_au, after.r_au),
            equinoxes_deg: quadratic(
                before.equinoxes_deg,
                here.equinoxes_deg,
                after.equinoxes_deg,
            ),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sun::position::{estimated_delta_t, sun_place_with};

    fn place(latitude_deg: f64, longitude_deg: f64, height_m: f64) -> Location {
        Location {
            latitude_deg,
            longitude_deg,
            height_m,
            north_deg: 0.0,
            time_zone: None,
        }
    }

    /// The azimuth's difference round the circle, degrees.
    fn apart(a: f64, b: f64) -> f64 {
        turn(a, b).abs()
    }

    #[test]
    fn the_fast_steps_agree_with_the_crate_at_the_reports_worked_example() {
        // Reda and Andreas, NREL/TP-560-34302, table A4.1 (values from memory):
        // 2003-10-17 19:30:30 UT, 39.742476 N, 105.1786 W, 1830.14 m, 820 mbar, 11 C,
        // delta T 67 s: topocentric zenith 50.11162, azimuth 194.34024 degrees. With
        // the slow part at that instant (no interpolation) the fast steps give the same
        // place as the crate's whole algorithm, to rounding.
        let location = place(39.742476, -105.1786, 1830.14);
        let air = Air {
            pressure_hpa: 820.0,
            temperature_c: 11.0,
        };
        let t = 1_066_419_030.0;
        let slow = Geocentric::at(t, 67.0).unwrap();
        let ours = topocentric(&location, t, &slow, air);
        assert!(
            (90.0 - ours.elevation_deg - 50.11162).abs() < 0.5e-5,
            "{ours:?}"
        );
        assert!((ours.azimuth_deg - 194.34024).abs() < 0.5e-5, "{ours:?}");
        let whole = sun_place_with(&location, t, 67.0, air).unwrap();
        assert!((ours.elevation_deg - whole.elevation_deg).abs() < 1e-9);
        assert!(apart(ours.azimuth_deg, whole.azimuth_deg) < 1e-9);
        // The report's equation of the equinoxes there: delta psi -0.00399840 degrees
        // times cos(23.440465) (table A4.1, from memory).
        let expected = -0.003_998_40 * 23.440_465f64.to_radians().cos();
        assert!((slow.equinoxes_deg - expected).abs() < 1e-7, "{slow:?}");
    }

    #[test]
    fn interpolated_hours_agree_with_the_whole_algorithm_through_a_year() {
        // Every 10 minutes of 2026 at the demo's latitude, and every 10 minutes of a
        // month round each solstice at 78 N (the sun up all day or all night) and 34 S:
        // azimuth and elevation within 1e-7 degrees of the whole algorithm (its stated
        // uncertainty is +/-0.0003 degrees, Reda and Andreas, NREL/TP-560-34302,
        // abstract), so the table's 0.001 degrees are the same.
        let air = Air::standard_at(80.0);
        let stretches = [
            (place(51.2, -2.1, 80.0), 1_767_225_600.0, 365.0), // 2026-01-01 UT
            (place(78.2, 15.6, 10.0), 1_781_049_600.0, 31.0),  // 2026-06-10
            (place(-33.9, 151.2, 40.0), 1_796_860_800.0, 31.0), // 2026-12-10
        ];
        let mut worst: f64 = 0.0;
        let mut rows = 0;
        for (location, start, days) in stretches {
            let end = start + days * SECONDS_PER_DAY;
            let hourly = Hourly::over(start, end, estimated_delta_t).unwrap();
            let mut t = start;
            while t < end {
                let slow = hourly.at(t).unwrap();
                let ours = topocentric(&location, t, &slow, air);
                let whole =
                    sun_place_with(&location, t, estimated_delta_t(t).unwrap(), air).unwrap();
                worst = worst
                    .max((ours.elevation_deg - whole.elevation_deg).abs())
                    .max(apart(ours.azimuth_deg, whole.azimuth_deg));
                rows += 1;
                t += 600.0;
            }
        }
        assert!(rows > 60_000, "{rows}");
        assert!(worst < 1e-7, "worst difference {worst} degrees");
    }

    #[test]
    fn the_mean_sidereal_time_at_the_epoch() {
        // Meeus, "Astronomical Algorithms", example 12.a (from memory): 1987-04-10 0h UT,
        // JD 2446895.5, mean sidereal time 13h10m46.3668s = 197.693195 degrees.
        assert!((mean_sidereal_deg(2_446_895.5) - 197.693_195).abs() < 1e-5);
    }
}
