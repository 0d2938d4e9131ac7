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

use super::items;
use super::numbers::{origin, zero, Count, Finite, NonNegative, Spot};
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
    pub x: Finite,
    pub y: Finite,
    #[serde(default = "zero")]
    pub ground: Finite,
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

/// Runs `$body` on whichever spec the item holds (every spec has `label` and `layer`).
macro_rules! each_spec {
    ($item:expr, $spec:ident => $body:expr) => {
        match $item {
            ItemSpec::Block($spec) => $body,
            ItemSpec::Footprint($spec) => $body,
            ItemSpec::Road($spec) => $body,
            ItemSpec::Arch($spec) | ItemSpec::Arcade($spec) => $body,
            ItemSpec::Column($spec) | ItemSpec::Cylinder($spec) => $body,
            ItemSpec::Tower($spec) => $body,
            ItemSpec::Dome($spec) => $body,
            ItemSpec::Stairs($spec) => $body,
            ItemSpec::Tiles($spec) => $body,
            ItemSpec::Vault($spec) => $body,
            ItemSpec::Room($spec) => $body,
            ItemSpec::Polyline($spec) => $body,
            ItemSpec::Line($spec) => $body,
            ItemSpec::Point($spec) => $body,
            ItemSpec::Group($spec) => $body,
            ItemSpec::Repeat($spec) => $body,
            ItemSpec::Model($spec) => $body,
        }
    };
}

/// Every kind of item a scene can hold.
#[derive(Debug, Deserialize)]
pub enum ItemSpec {
    Block(items::BlockSpec),
    Footprint(items::FootprintSpec),
    Road(items::RoadSpec),
    Arch(items::ArcadeSpec),
    Arcade(items::ArcadeSpec),
    Column(items::ColumnSpec),
    /// The same as a column, for those who think of it so.
    Cylinder(items::ColumnSpec),
    Tower(items::TowerSpec),
    Dome(items::DomeSpec),
    Stairs(items::StairsSpec),
    Tiles(items::TilesSpec),
    Vault(items::VaultSpec),
    Room(items::RoomSpec),
    Polyline(items::PolylineSpec),
    Line(items::LineSpec),
    Point(items::PointSpec),
    Group(GroupSpec),
    Repeat(RepeatSpec),
    Model(items::ModelSpec),
}

impl ItemSpec {
    /// The word messages use for the item.
    pub fn kind(&self) -> &'static str {
        match self {
            ItemSpec::Block(_) => "block",
            ItemSpec::Footprint(_) => "footprint",
            ItemSpec::Road(_) => "road",
            ItemSpec::Arch(_) => "arch",
            ItemSpec::Arcade(_) => "arcade",
            ItemSpec::Column(_) => "column",
            ItemSpec::Cylinder(_) => "cylinder",
            ItemSpec::Tower(_) => "tower",
            ItemSpec::Dome(_) => "dome",
            ItemSpec::Stairs(_) => "stairs",
            ItemSpec::Tiles(_) => "tiles",
            ItemSpec::Vault(_) => "vault",
            ItemSpec::Room(_) => "room",
            ItemSpec::Polyline(_) => "polyline",
            ItemSpec::Line(_) => "line",
            ItemSpec::Point(_) => "point",
            ItemSpec::Group(_) => "group",
            ItemSpec::Repeat(_) => "repeat",
            ItemSpec::Model(_) => "model",
        }
    }

    pub fn label(&self) -> Option<&str> {
        each_spec!(self, spec => spec.label.as_deref())
    }

    pub fn layer(&self) -> Option<&str> {
        each_spec!(self, spec => spec.layer.as_deref())
    }
}

/// Items moved and turned together.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GroupSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// Where the group's origin goes.
    #[serde(default = "origin")]
    pub at: Spot,
    /// Degrees clockwise seen from above, about the group's origin.
    #[serde(default = "zero")]
    pub turn: Finite,
    pub items: Vec<ItemSpec>,
}

/// Copies of items, each moved `step` further (and turned `turn` further about the
/// origin) than the one before.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RepeatSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    pub count: Count,
    #[serde(default = "origin")]
    pub step: Spot,
    /// Degrees clockwise seen from above, for radial arrays.
    #[serde(default = "zero")]
    pub turn: Finite,
    pub items: Vec<ItemSpec>,
}
