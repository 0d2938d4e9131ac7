//! The RON scene format, as serde types: the scene, its standpoints and the list of item
//! kinds. Each item's own fields live beside the code that builds it, in `items/`, and the
//! validated numbers they are made of in `numbers.rs`. The reference for users is
//! `docs/scene-format.md`.
//!
//! ```ron
//! Scene(
//!     name: "Tollgate Square",
//!     standpoints: [(name: "fountain", x: 0, y: -6, heading: 20)],
//!     items: [
//!         Block(label: "corn hall", at: Corner(0, 10), width: 24, depth: 12, height: 9.5),
//!         Polyline(points: [(-30, -3, 0), (30, -3, 0)]),
//!     ],
//! )
//! ```

pub use super::items::ItemSpec;
use super::numbers::{zero, Finite, NonNegative};
use serde::Deserialize;

/// The unit of every length in a scene file.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Deserialize)]
pub enum SceneUnit {
    #[default]
    Metre,
    /// Decimal feet (0.3048 m exactly, by the international yard and pound agreement of 1959).
    Foot,
}

impl SceneUnit {
    pub fn metres(self) -> f64 {
        match self {
            SceneUnit::Metre => 1.0,
            SceneUnit::Foot => 0.3048,
        }
    }
}

#[derive(Debug, Deserialize)]
#[serde(rename = "Scene", deny_unknown_fields)]
pub struct SceneFile {
    #[serde(default)]
    pub name: Option<String>,
    #[serde(default)]
    pub unit: SceneUnit,
    #[serde(default)]
    pub standpoints: Vec<StandpointSpec>,
    /// The standpoint used when none is asked for; the first if not given.
    #[serde(default)]
    pub default_standpoint: Option<String>,
    /// How edges hidden behind faces are drawn: `Solid`, `Faint` (the default) or `Off`.
    #[serde(default)]
    pub hidden: Option<super::site::HiddenEdges>,
    /// How the drawing's layers look, by layer name.
    #[serde(default)]
    pub styles: Option<super::style::StyleSheet>,
    /// Drawing aids: vanishing points, fans, meridians, poles, divisions (`guides.rs`).
    #[serde(default)]
    pub guides: Option<super::guides::GuidesSpec>,
    /// Where the plan's origin is on the earth (`location.rs`).
    #[serde(default)]
    pub location: Option<super::location::LocationSpec>,
    /// Sloping ground from spot heights, contours and break lines (`ground.rs`).
    #[serde(default)]
    pub ground: Option<super::ground::GroundSpec>,
    /// The date and local time of the sun and shadows drawn (`when.rs`).
    #[serde(default)]
    pub sun: Option<super::when::SunSpec>,
    pub items: Vec<ItemSpec>,
}

/// How the viewer's eye height is chosen when it is not given.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Deserialize)]
pub enum Posture {
    #[default]
    Standing,
    Seated,
}

#[derive(Debug, Deserialize)]
#[serde(rename = "Standpoint", deny_unknown_fields)]
pub struct StandpointSpec {
    pub name: String,
    /// Plan position; or give `latitude` and `longitude` instead (with a `location`).
    #[serde(default)]
    pub x: Option<Finite>,
    #[serde(default)]
    pub y: Option<Finite>,
    /// WGS84 degrees, placed by the scene's `location` (the geodesic from its origin).
    #[serde(default)]
    pub latitude: Option<super::location::Latitude>,
    #[serde(default)]
    pub longitude: Option<super::location::Longitude>,
    /// Height of the ground under the viewer; on the scene's `ground` (or 0) if not given.
    #[serde(default)]
    pub ground: Option<Finite>,
    /// In the scene's unit; by default the posture's eye height.
    #[serde(default)]
    pub eye_height: Option<NonNegative>,
    #[serde(default)]
    pub posture: Posture,
    /// Degrees clockwise from north.
    #[serde(default = "zero")]
    pub heading: Finite,
    #[serde(default = "zero")]
    pub pitch: Finite,
    #[serde(default = "zero")]
    pub roll: Finite,
}
