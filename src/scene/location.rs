//! Where on the earth a scene stands: the one `location` block that the open-data readers
//! and the sun share. Plan coordinates stay local metres (x east, y north of the plan);
//! this block ties their origin to WGS84 and says how the plan's y axis is turned from true
//! north.
//!
//! ```ron
//! location: (latitude: 51.4779, longitude: -0.0015, height: 45, north: 3.5, time_zone: "Europe/London"),
//! ```

use super::numbers::{zero, Finite};
use jiff::tz::{TimeZone, TimeZoneDatabase};
use serde::{Deserialize, Deserializer};

/// The `location` block as written in a scene file.
#[derive(Debug, Deserialize)]
#[serde(rename = "Location", deny_unknown_fields)]
pub struct LocationSpec {
    /// Degrees north of the equator (WGS84), from -90 to 90, of the plan's origin.
    pub latitude: Latitude,
    /// Degrees east of Greenwich (WGS84), from -180 to 180, of the plan's origin.
    pub longitude: Longitude,
    /// Metres above sea level of the plan's ground level (z = 0); 0 if not given.
    #[serde(default = "zero")]
    pub height: Finite,
    /// The bearing of true north, in degrees clockwise from the plan's y axis: 0 when the
    /// plan's y axis is true north.
    #[serde(default = "zero")]
    pub north: Finite,
    /// An IANA time-zone name such as "Europe/Paris", for local times; checked against the
    /// database bundled with the program.
    #[serde(default, deserialize_with = "zone_name")]
    pub time_zone: Option<String>,
}

/// Where the scene's origin is on the earth, resolved.
#[derive(Clone, Debug, PartialEq)]
pub struct Location {
    /// WGS84 latitude of the plan's origin, degrees.
    pub latitude_deg: f64,
    /// WGS84 longitude of the plan's origin, degrees.
    pub longitude_deg: f64,
    /// Height above sea level of the plan's z = 0, metres.
    pub height_m: f64,
    /// The bearing of true north, degrees clockwise from the plan's y axis.
    pub north_deg: f64,
    /// An IANA time-zone name, as written (checked by whoever uses it).
    pub time_zone: Option<String>,
}

impl Location {
    /// The resolved location of a scene's `location` block.
    pub fn from_spec(spec: &LocationSpec) -> Location {
        Location {
            latitude_deg: spec.latitude.0,
            longitude_deg: spec.longitude.0,
            height_m: spec.height.0,
            north_deg: spec.north.0,
            time_zone: spec.time_zone.clone(),
        }
    }
}

fn zone_name<'de, D: Deserializer<'de>>(deserializer: D) -> Result<Option<String>, D::Error> {
    let name = String::deserialize(deserializer)?;
    find_time_zone(&name).map_err(serde::de::Error::custom)?;
    Ok(Some(name))
}

/// The time zone of an IANA name in the database bundled with the program (so results do
/// not depend on the machine's copy); an unknown name is refused with the nearest known one.
pub fn find_time_zone(name: &str) -> crate::Result<TimeZone> {
    static DATABASE: std::sync::OnceLock<TimeZoneDatabase> = std::sync::OnceLock::new();
    let database = DATABASE.get_or_init(TimeZoneDatabase::bundled);
    database.get(name).map_err(|_| {
        let lower = name.to_lowercase();
        let nearest = database
            .available()
            .map(|known| {
                let known = known.as_str().to_owned();
                (strsim::jaro_winkler(&known.to_lowercase(), &lower), known)
            })
            .filter(|(score, _)| *score > 0.8)
            .max_by(|a, b| a.0.total_cmp(&b.0));
        let hint = nearest.map_or(String::new(), |(_, known)| {
            format!(" (did you mean \"{known}\"?)")
        });
        crate::Error::Sun(format!(
            "\"{name}\" is not a time zone of the IANA database{hint}: expected a name such \
             as \"Europe/Paris\" or \"America/Denver\""
        ))
    })
}

/// A latitude in degrees, from -90 to 90.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Latitude(pub f64);

impl<'de> Deserialize<'de> for Latitude {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let Finite(value) = Finite::deserialize(deserializer)?;
        if (-90.0..=90.0).contains(&value) {
            Ok(Latitude(value))
        } else {
            Err(serde::de::Error::custom(format!(
                "expected a latitude from -90 to 90 degrees, found {value}"
            )))
        }
    }
}

/// A longitude in degrees, from -180 to 180.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Longitude(pub f64);

impl<'de> Deserialize<'de> for Longitude {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let Finite(value) = Finite::deserialize(deserializer)?;
        if (-180.0..=180.0).contains(&value) {
            Ok(Longitude(value))
        } else {
            Err(serde::de::Error::custom(format!(
                "expected a longitude from -180 to 180 degrees, found {value}"
            )))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_location_reads_with_defaults() {
        let spec: LocationSpec = ron::from_str("(latitude: 48.5, longitude: -3.25)").unwrap();
        let location = Location::from_spec(&spec);
        assert_eq!(location.latitude_deg, 48.5);
        assert_eq!(location.longitude_deg, -3.25);
        assert_eq!((location.height_m, location.north_deg), (0.0, 0.0));
        assert_eq!(location.time_zone, None);
    }

    #[test]
    fn time_zones_are_checked_on_reading() {
        let spec: LocationSpec =
            ron::from_str("(latitude: 1, longitude: 2, time_zone: \"Asia/Tokyo\")").unwrap();
        assert_eq!(spec.time_zone.as_deref(), Some("Asia/Tokyo"));
        let error =
            ron::from_str::<LocationSpec>("(latitude: 1, longitude: 2, time_zone: \"Asia/Tokio\")")
                .unwrap_err()
                .to_string();
        assert!(
            error.contains("not a time zone") && error.contains("Asia/Tokyo"),
            "{error}"
        );
    }

    #[test]
    fn latitudes_beyond_the_poles_are_refused() {
        let error = ron::from_str::<LocationSpec>("(latitude: 91, longitude: 0)").unwrap_err();
        assert!(error.to_string().contains("expected a latitude"), "{error}");
        let error = ron::from_str::<LocationSpec>("(latitude: 0, longitude: 180.5)").unwrap_err();
        assert!(
            error.to_string().contains("expected a longitude"),
            "{error}"
        );
    }
}
