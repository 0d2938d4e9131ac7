//! Known places from open data: map footprints and streets in GeoJSON, 3D city models in
//! CityJSON, placed in the scene's plan around its `location`.
//!
//! The y axis of the plan is true north at the origin (turned by the location's `north`);
//! latitudes and longitudes become plan metres by the geodesic from the origin
//! ([`earth`]), and the ground falls away with the earth's curve. Grid coordinates of a
//! projected reference system (a CityJSON file's) are turned into the same plan through
//! the origin's latitude and longitude ([`grid`]).
//!
//! Everything the data does not say and pansite assumes (a height from levels, a default
//! roof, a road's width from its class) is kept beside the item it made, for `check`.

mod boundaries;
mod building;
pub mod cityjson;
pub mod earth;
pub mod geojson;
pub mod grid;
mod read;
mod tags;

pub use building::build_building;
pub use cityjson::{read_cityjson, CityModel, Placing, CITY_CREASE_DEG};
pub use earth::{curvature_drop, radius_of_curvature, LocalFrame, SURVEY_REFRACTION};
pub use geojson::{first_position, read_geojson, GeoJsonScene, Placed};
pub use read::{read_open_data, OpenData, OpenDataContent};
pub use tags::{
    Heights, RoofShape, DEFAULT_LEVELS, DEFAULT_ROOF_STOREYS, DEFAULT_STOREY, LANE_WIDTH,
    ROAD_WIDTHS,
};

use super::numbers::{FileName, Finite, NonNegative, Positive};
use crate::error::Error;
use serde::Deserialize;
use serde_json::{Map, Value};
use std::path::Path;

/// How far from the origin (metres) features are taken when the scene does not say: 5 km,
/// where the placement is still exact to a millimetre.
pub const DEFAULT_WITHIN: f64 = 5000.0;

/// The `OpenData` item of a scene file: a GeoJSON or CityJSON file, and what to take from
/// it.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct OpenDataSpec {
    /// Names the file's items in messages.
    #[serde(default)]
    pub label: Option<String>,
    /// The layer its items are drawn on (a city model's surfaces keep their own).
    #[serde(default)]
    pub layer: Option<String>,
    /// The data file (`.geojson`, `.json`, `.city.json`, `.jsonl`), relative to the scene.
    pub file: FileName,
    /// Only features with a position within this many metres of the origin.
    #[serde(default)]
    pub within: Option<Positive>,
    /// Only features with one of these tags: `"building"` (any value) or
    /// `"highway=residential"` (that value). All features if empty.
    #[serde(default)]
    pub only: Vec<String>,
    /// Metres per storey for `building:levels` and its kin.
    #[serde(default)]
    pub storey: Option<Positive>,
    /// The refraction coefficient applied to the fall of the ground (0.13 is the
    /// surveyors'); 0, the geometric fall, if not given.
    #[serde(default)]
    pub refraction: Option<NonNegative>,
    /// CityJSON: the level of detail to draw (`"2.2"`, `"1"`); the highest if not given.
    #[serde(default)]
    pub lod: Option<String>,
    /// CityJSON: the origin's easting and northing in the file's reference system, when
    /// the scene has no `location`.
    #[serde(default)]
    pub origin: Option<(Finite, Finite)>,
}

/// Which features an `OpenData` item keeps.
#[derive(Clone, Debug, PartialEq)]
pub struct Selection {
    /// Metres from the origin.
    pub within: f64,
    /// Tag filters (`key` or `key=value`); all features if empty.
    pub only: Vec<String>,
    /// Metres per storey.
    pub storey: f64,
}

impl Default for Selection {
    fn default() -> Self {
        Selection {
            within: DEFAULT_WITHIN,
            only: Vec::new(),
            storey: DEFAULT_STOREY,
        }
    }
}

impl Selection {
    /// The selection an `OpenData` item asks for.
    pub fn from_spec(spec: &OpenDataSpec) -> Selection {
        Selection {
            within: spec.within.map_or(DEFAULT_WITHIN, |w| w.0),
            only: spec.only.clone(),
            storey: spec.storey.map_or(DEFAULT_STOREY, |s| s.0),
        }
    }

    /// Whether a feature with these tags is kept by the tag filter.
    pub fn keeps(&self, tags: &Map<String, Value>) -> bool {
        self.only.is_empty()
            || self.only.iter().any(|filter| match filter.split_once('=') {
                Some((key, value)) => tags::tag(tags, key).is_some_and(|v| v == value),
                None => tags.contains_key(filter.as_str()),
            })
    }
}

/// Which kind of data file a path is, from its name.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum DataKind {
    /// RFC 7946 GeoJSON.
    GeoJson,
    /// CityJSON 2.0.
    CityJson,
    /// CityJSONSeq: CityJSON features one per line.
    CityJsonSeq,
}

impl DataKind {
    /// `.geojson` (and `.json` not ending `.city.json`), `.city.json`, `.jsonl`/`.city.jsonl`.
    pub fn of(path: &Path) -> Option<DataKind> {
        let name = path.file_name()?.to_string_lossy().to_ascii_lowercase();
        if name.ends_with(".jsonl") {
            Some(DataKind::CityJsonSeq)
        } else if name.ends_with(".city.json") {
            Some(DataKind::CityJson)
        } else if name.ends_with(".geojson") || name.ends_with(".json") {
            Some(DataKind::GeoJson)
        } else {
            None
        }
    }
}

/// Where in a data file something is: which feature or city object, by index and id.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Located {
    /// `feature` or `city object`.
    pub what: &'static str,
    /// Its place in the file, from 0.
    pub index: Option<usize>,
    /// Its id, if it has one.
    pub id: Option<String>,
}

impl Located {
    /// A GeoJSON feature.
    pub fn feature(index: usize, id: Option<String>) -> Located {
        Located {
            what: "feature",
            index: Some(index),
            id,
        }
    }

    /// How messages name it.
    pub fn describe(&self) -> String {
        match (&self.index, &self.id) {
            (Some(i), Some(id)) => format!("{} {i} (id {id:?})", self.what),
            (Some(i), None) => format!("{} {i}", self.what),
            (None, Some(id)) => format!("{} {id:?}", self.what),
            (None, None) => self.what.to_owned(),
        }
    }

    /// An error about it, at a JSON path.
    pub fn error(&self, json_path: &str, message: &str) -> OpenDataError {
        OpenDataError {
            at: format!("{}, at {json_path}", self.describe()),
            message: message.to_owned(),
            line_column: None,
        }
    }
}

/// What is wrong in a data file, and where: a feature and a JSON path, or a line and
/// column where the JSON itself is broken.
#[derive(Clone, Debug, PartialEq)]
pub struct OpenDataError {
    /// The feature or object and the JSON path.
    pub at: String,
    /// What is wrong and what was expected.
    pub message: String,
    /// Where broken JSON breaks: line and column from 1.
    pub line_column: Option<(usize, usize)>,
}

impl OpenDataError {
    /// An error at a JSON path, about no one feature.
    pub fn plain(json_path: &str, message: &str) -> OpenDataError {
        OpenDataError {
            at: format!("at {json_path}"),
            message: message.to_owned(),
            line_column: None,
        }
    }

    /// Broken JSON, where it breaks.
    pub fn json(e: serde_json::Error) -> OpenDataError {
        let text = e.to_string();
        // serde_json appends " at line L column C"; the place goes in front instead.
        let message = text
            .rsplit_once(" at line ")
            .map_or(text.as_str(), |(m, _)| m)
            .to_owned();
        OpenDataError {
            at: String::new(),
            message: format!("expected JSON ({message})"),
            line_column: Some((e.line().max(1), e.column().max(1))),
        }
    }

    /// The library error, naming `path`.
    pub fn in_file(self, path: &Path) -> Error {
        match self.line_column {
            Some((line, column)) => Error::Scene {
                path: path.to_owned(),
                line,
                column,
                message: self.message,
            },
            None => Error::Data {
                path: path.to_owned(),
                at: self.at,
                message: self.message,
            },
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn tag_filters_by_key_or_value() {
        let tags = match json!({"building": "yes", "highway": "service"}) {
            Value::Object(m) => m,
            _ => unreachable!(),
        };
        let with = |only: &[&str]| Selection {
            only: only.iter().map(|s| s.to_string()).collect(),
            ..Selection::default()
        };
        assert!(with(&[]).keeps(&tags));
        assert!(with(&["building"]).keeps(&tags));
        assert!(with(&["highway=service"]).keeps(&tags));
        assert!(!with(&["highway=primary", "amenity"]).keeps(&tags));
    }

    #[test]
    fn kinds_from_file_names() {
        assert_eq!(
            DataKind::of(Path::new("a.geojson")),
            Some(DataKind::GeoJson)
        );
        assert_eq!(
            DataKind::of(Path::new("a.City.JSON")),
            Some(DataKind::CityJson)
        );
        assert_eq!(
            DataKind::of(Path::new("a.city.jsonl")),
            Some(DataKind::CityJsonSeq)
        );
        assert_eq!(DataKind::of(Path::new("a.ron")), None);
    }
}
