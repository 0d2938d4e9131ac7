//! Where the sun stands: its apparent (refracted) topocentric azimuth and elevation by the
//! Solar Position Algorithm of Reda and Andreas (NREL/TP-560-34302, 2003, revised 2008),
//! as implemented by the `solar-positioning` crate, and its direction in the plan's frame.
//!
//! Times are instants of universal time (seconds since 1970). The algorithm wants the
//! difference between terrestrial and universal time, delta T; for other dates than a
//! test's it is estimated from the year by the crate's fit of Espenak and Meeus's
//! polynomials (about 69 s in 2020). The air's pressure follows the site's height in the
//! International Standard Atmosphere (1013.25 hPa and 15 degrees C at sea level), which is
//! all the refraction term needs to be good to a minute of arc near the horizon.

use crate::error::{Error, Result};
use crate::scene::Location;
use nalgebra::Vector3;
use solar_positioning::{
    delta_t, time::JulianDate, Location as Place, RefractionCorrection, SolarPositions,
};

/// The Julian day of 1970-01-01 00:00 UT (Meeus, "Astronomical Algorithms", ch. 7).
const UNIX_EPOCH_JD: f64 = 2_440_587.5;
const SECONDS_PER_DAY: f64 = 86_400.0;
/// The mean length of a Gregorian year, days.
const DAYS_PER_YEAR: f64 = 365.2425;

/// The air the sun's light comes through, for the refraction near the horizon.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Air {
    /// Air pressure, hectopascals (millibars).
    pub pressure_hpa: f64,
    /// Air temperature, degrees Celsius.
    pub temperature_c: f64,
}

impl Air {
    /// The International Standard Atmosphere at `height_m` above sea level (ICAO Doc 7488:
    /// p = 1013.25 (1 - 2.25577e-5 h)^5.25588 hPa; 15 degrees C less 6.5 per km).
    pub fn standard_at(height_m: f64) -> Air {
        let h = height_m.clamp(-500.0, 11_000.0);
        Air {
            pressure_hpa: 1013.25 * (1.0 - 2.255_77e-5 * h).powf(5.255_88),
            temperature_c: 15.0 - 0.0065 * h,
        }
    }
}

/// The sun's apparent place in the sky.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SunPlace {
    /// Degrees clockwise from true north, [0, 360).
    pub azimuth_deg: f64,
    /// Degrees above the horizontal, refraction included.
    pub elevation_deg: f64,
}

impl SunPlace {
    /// Degrees from the zenith.
    pub fn zenith_deg(&self) -> f64 {
        90.0 - self.elevation_deg
    }

    /// The azimuth measured from the plan's y axis instead of true north (`north_deg` is
    /// the bearing of true north clockwise from the plan's y axis).
    pub fn plan_azimuth_deg(&self, north_deg: f64) -> f64 {
        (self.azimuth_deg + north_deg).rem_euclid(360.0)
    }

    /// The unit direction towards the sun in the site frame (x east of the plan, y the
    /// plan's y axis, z up).
    pub fn direction(&self, north_deg: f64) -> Vector3<f64> {
        let (a, e) = (
            self.plan_azimuth_deg(north_deg).to_radians(),
            self.elevation_deg.to_radians(),
        );
        Vector3::new(a.sin() * e.cos(), a.cos() * e.cos(), e.sin())
    }
}

/// Two unit directions across the sun's rays, square to each other and to the unit
/// direction `towards_sun`: the plane a parallel projection along the rays lands in.
/// `u` is square to the x axis (to the y axis when the sun is near the x axis, so the
/// cross product never vanishes), `v = s x u`, so (u, v, s) is right-handed.
pub fn across_rays(towards_sun: &Vector3<f64>) -> (Vector3<f64>, Vector3<f64>) {
    let s = towards_sun;
    let u = if s.x.abs() < 0.9 {
        Vector3::x().cross(s).normalize()
    } else {
        Vector3::y().cross(s).normalize()
    };
    (u, s.cross(&u))
}

/// The instant's decimal year, for the delta-T estimate.
pub fn decimal_year(instant_s: f64) -> f64 {
    1970.0 + instant_s / SECONDS_PER_DAY / DAYS_PER_YEAR
}

/// Delta T (terrestrial minus universal time, seconds) estimated for an instant.
pub fn estimated_delta_t(instant_s: f64) -> Result<f64> {
    delta_t::estimate(decimal_year(instant_s)).map_err(|e| Error::Sun(out_of_range(instant_s, e)))
}

/// The sun seen from `location` at `instant_s` (seconds of UT since 1970), with delta T
/// and the air given.
pub fn sun_place_with(
    location: &Location,
    instant_s: f64,
    delta_t_s: f64,
    air: Air,
) -> Result<SunPlace> {
    let time = JulianDate::new(UNIX_EPOCH_JD + instant_s / SECONDS_PER_DAY, delta_t_s)
        .map_err(|e| Error::Sun(out_of_range(instant_s, e)))?;
    let refraction = RefractionCorrection::new(air.pressure_hpa, air.temperature_c)
        .map_err(|e| Error::Sun(format!("the air for refraction: {e}")))?;
    let place = Place {
        latitude: location.latitude_deg,
        longitude: location.longitude_deg,
    };
    let position = SolarPositions::new()
        .at_from_julian(time, place, location.height_m, Some(refraction))
        .map_err(|e| Error::Sun(out_of_range(instant_s, e)))?;
    Ok(SunPlace {
        azimuth_deg: position.azimuth(),
        elevation_deg: position.elevation_angle(),
    })
}

/// The sun seen from `location` at `instant_s`, delta T estimated and the standard air of
/// the site's height.
pub fn sun_place(location: &Location, instant_s: f64) -> Result<SunPlace> {
    sun_place_with(
        location,
        instant_s,
        estimated_delta_t(instant_s)?,
        Air::standard_at(location.height_m),
    )
}

fn out_of_range(instant_s: f64, error: impl std::fmt::Display) -> String {
    format!(
        "the sun's position cannot be found for the year {:.0}: {error}",
        decimal_year(instant_s).floor()
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    fn assert_near(a: f64, b: f64, tolerance: f64) {
        assert!(
            (a - b).abs() <= tolerance,
            "{a} vs {b} (tolerance {tolerance})"
        );
    }

    /// The worked example of Reda and Andreas, "Solar Position Algorithm for Solar
    /// Radiation Applications", NREL/TP-560-34302 (2003, rev. 2008), table A4.1 (values
    /// from memory): 2003-10-17 12:30:30 local time at UT-7 (19:30:30 UT), latitude
    /// 39.742476, longitude -105.1786, 1830.14 m, 820 mbar, 11 degrees C, delta T 67 s
    /// (delta UT1 0): topocentric zenith 50.11162 and azimuth 194.34024 degrees.
    #[test]
    fn the_reports_worked_example() {
        let location = Location {
            latitude_deg: 39.742476,
            longitude_deg: -105.1786,
            height_m: 1830.14,
            north_deg: 0.0,
            time_zone: Some("America/Denver".into()),
        };
        // 2003-10-17 19:30:30 UT is 1066419030 s after 1970 (Python's calendar.timegm).
        let air = Air {
            pressure_hpa: 820.0,
            temperature_c: 11.0,
        };
        let sun = sun_place_with(&location, 1_066_419_030.0, 67.0, air).unwrap();
        assert_near(sun.zenith_deg(), 50.11162, 0.5e-5);
        assert_near(sun.azimuth_deg, 194.34024, 0.5e-5);
    }

    #[test]
    fn the_plan_frame_turns_with_true_north() {
        let sun = SunPlace {
            azimuth_deg: 90.0,
            elevation_deg: 30.0,
        };
        // True north 20 degrees clockwise of the plan's y axis: true east is plan 110.
        assert_near(sun.plan_azimuth_deg(20.0), 110.0, 1e-12);
        let d = sun.direction(0.0);
        assert_near(d.x, 30f64.to_radians().cos(), 1e-12);
        assert_near(d.z, 0.5, 1e-12);
        assert_near(d.norm(), 1.0, 1e-12);
    }

    #[test]
    fn the_directions_across_the_rays_are_square_to_them_and_each_other() {
        // An orthonormal right-handed frame: u . s = v . s = u . v = 0, |u| = |v| = 1 and
        // u x v = s (vector algebra), for suns high, low, and along either plan axis.
        for s in [
            Vector3::new(0.3, -0.5, 0.8),
            Vector3::new(0.999, 0.0, 0.045),
            Vector3::new(-0.95, 0.2, 0.1),
            Vector3::new(0.0, 1.0, 0.0),
            Vector3::z(),
        ] {
            let s = s.normalize();
            let (u, v) = across_rays(&s);
            for (a, b) in [(u.dot(&s), 0.0), (v.dot(&s), 0.0), (u.dot(&v), 0.0)] {
                assert_near(a, b, 1e-12);
            }
            assert_near(u.norm(), 1.0, 1e-12);
            assert_near(v.norm(), 1.0, 1e-12);
            assert_near((u.cross(&v) - s).norm(), 0.0, 1e-12);
        }
    }

    #[test]
    fn standard_air_and_delta_t() {
        // ICAO standard atmosphere: 1013.25 hPa at sea level, about 898.7 hPa at 1000 m
        // (from memory).
        assert_near(Air::standard_at(0.0).pressure_hpa, 1013.25, 1e-9);
        assert_near(Air::standard_at(1000.0).pressure_hpa, 898.7, 0.1);
        // Delta T was about 64 s in 2000 and about 69 s in 2020 (IERS figures, from memory).
        assert_near(estimated_delta_t(946_684_800.0).unwrap(), 64.0, 1.0);
        assert_near(estimated_delta_t(1_577_836_800.0).unwrap(), 69.4, 1.5);
    }
}
