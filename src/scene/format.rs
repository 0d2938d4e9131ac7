//! The RON scene format, as serde types. Validation that can name a position in the file
//! happens here, while deserialising: non-finite numbers, non-positive sizes and too-short
//! point lists are rejected by the number and list types below, so the RON parser reports the
//! line and column.
//!
//! The item specs themselves live beside the code that builds them, in `items/`.
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
use serde::{Deserialize, Deserializer};

/// The largest magnitude of any number in a scene: a million kilometres, far beyond any
/// site, and small enough that sums and products of coordinates stay exact enough.
pub const MAX_MAGNITUDE: f64 = 1e9;

/// A finite number within [`MAX_MAGNITUDE`] (NaN, infinities and absurd sizes are refused
/// where they are written).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Finite(pub f64);

impl<'de> Deserialize<'de> for Finite {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let value = f64::deserialize(deserializer)?;
        if !value.is_finite() {
            Err(serde::de::Error::custom(format!(
                "expected a finite number, found {value}"
            )))
        } else if value.abs() > MAX_MAGNITUDE {
            Err(serde::de::Error::custom(format!(
                "expected a number from -1e9 to 1e9, found {value:e}"
            )))
        } else {
            Ok(Finite(value))
        }
    }
}

/// An angle from 0 to 180 degrees.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct HalfTurn(pub f64);

impl<'de> Deserialize<'de> for HalfTurn {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let Finite(value) = Finite::deserialize(deserializer)?;
        if (0.0..=180.0).contains(&value) {
            Ok(HalfTurn(value))
        } else {
            Err(serde::de::Error::custom(format!(
                "expected an angle from 0 to 180 degrees, found {value}"
            )))
        }
    }
}

/// A file name that is not empty.
#[derive(Clone, Debug, PartialEq)]
pub struct FileName(pub String);

impl<'de> Deserialize<'de> for FileName {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let name = String::deserialize(deserializer)?;
        if name.trim().is_empty() {
            Err(serde::de::Error::custom(
                "expected a file name, found an empty string",
            ))
        } else {
            Ok(FileName(name))
        }
    }
}

/// A finite number greater than zero (a size).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Positive(pub f64);

impl<'de> Deserialize<'de> for Positive {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let Finite(value) = Finite::deserialize(deserializer)?;
        if value > 0.0 {
            Ok(Positive(value))
        } else {
            Err(serde::de::Error::custom(format!(
                "expected a size greater than zero, found {value}"
            )))
        }
    }
}

/// A finite number at least zero.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct NonNegative(pub f64);

impl<'de> Deserialize<'de> for NonNegative {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let Finite(value) = Finite::deserialize(deserializer)?;
        if value >= 0.0 {
            Ok(NonNegative(value))
        } else {
            Err(serde::de::Error::custom(format!(
                "expected zero or more, found {value}"
            )))
        }
    }
}

/// A polyline's vertices: at least two.
#[derive(Clone, Debug, PartialEq)]
pub struct Vertices(pub Vec<(Finite, Finite, Finite)>);

impl<'de> Deserialize<'de> for Vertices {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let points = Vec::<(Finite, Finite, Finite)>::deserialize(deserializer)?;
        if points.len() >= 2 {
            Ok(Vertices(points))
        } else {
            Err(serde::de::Error::custom(format!(
                "expected at least two points (x, y, z), found {}",
                points.len()
            )))
        }
    }
}

/// A count of things: 1 to 100,000.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Count(pub u32);

/// The most of anything one field can ask for (steps, openings, copies).
pub const MAX_COUNT: u32 = 100_000;

impl<'de> Deserialize<'de> for Count {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let value = u64::deserialize(deserializer)?;
        if (1..=MAX_COUNT as u64).contains(&value) {
            Ok(Count(value as u32))
        } else {
            Err(serde::de::Error::custom(format!(
                "expected a count from 1 to {MAX_COUNT}, found {value}"
            )))
        }
    }
}

/// A plan position or size pair (x, y).
pub type Plan = (Finite, Finite);
/// A site position (x, y, z).
pub type Spot = (Finite, Finite, Finite);

pub fn plan(p: &Plan) -> nalgebra::Vector2<f64> {
    nalgebra::Vector2::new(p.0 .0, p.1 .0)
}

pub fn spot(p: &Spot) -> nalgebra::Point3<f64> {
    nalgebra::Point3::new(p.0 .0, p.1 .0, p.2 .0)
}

pub fn zero() -> Finite {
    Finite(0.0)
}

pub fn origin() -> Spot {
    (Finite(0.0), Finite(0.0), Finite(0.0))
}

/// The azimuth a block's front faces by default: south, so that its width runs east.
pub fn default_facing() -> Finite {
    Finite(180.0)
}

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
            ItemSpec::Column($spec) => $body,
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
