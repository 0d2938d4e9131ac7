//! The RON scene format, as serde types. Validation that can name a position in the file
//! happens here, while deserialising: non-finite numbers, non-positive sizes and too-short
//! point lists are rejected by the number and list types below, so the RON parser reports the
//! line and column.
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

fn default_eye_height() -> NonNegative {
    NonNegative(super::DEFAULT_EYE_HEIGHT)
}

fn default_facing() -> Finite {
    Finite(180.0)
}

fn zero() -> Finite {
    Finite(0.0)
}

#[derive(Debug, Deserialize)]
#[serde(rename = "Scene", deny_unknown_fields)]
pub struct SceneFile {
    #[serde(default)]
    pub name: Option<String>,
    #[serde(default)]
    pub standpoints: Vec<StandpointSpec>,
    pub items: Vec<ItemSpec>,
}

#[derive(Debug, Deserialize)]
#[serde(rename = "Standpoint", deny_unknown_fields)]
pub struct StandpointSpec {
    pub name: String,
    pub x: Finite,
    pub y: Finite,
    #[serde(default = "zero")]
    pub ground: Finite,
    #[serde(default = "default_eye_height")]
    pub eye_height: NonNegative,
    /// Degrees clockwise from north.
    #[serde(default = "zero")]
    pub heading: Finite,
    #[serde(default = "zero")]
    pub pitch: Finite,
    #[serde(default = "zero")]
    pub roll: Finite,
}

#[derive(Debug, Deserialize)]
pub enum ItemSpec {
    Block(BlockSpec),
    Polyline(PolylineSpec),
    Model(ModelSpec),
}

fn one() -> Positive {
    Positive(1.0)
}

fn default_crease() -> HalfTurn {
    HalfTurn(super::DEFAULT_CREASE_DEG)
}

fn origin() -> (Finite, Finite, Finite) {
    (Finite(0.0), Finite(0.0), Finite(0.0))
}

/// A Wavefront OBJ model placed in the scene.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ModelSpec {
    #[serde(default)]
    pub label: Option<String>,
    /// The OBJ file, relative to the scene file's folder.
    pub file: FileName,
    /// Where the model's origin goes, metres (x east, y north, z up).
    #[serde(default = "origin")]
    pub at: (Finite, Finite, Finite),
    /// Turn about the vertical, degrees clockwise seen from above.
    #[serde(default = "zero")]
    pub turn: Finite,
    #[serde(default = "one")]
    pub scale: Positive,
    /// Which axis of the file is up: `Y` (the OBJ habit) or `Z`.
    #[serde(default)]
    pub up: super::UpAxis,
    /// `Metre`, `Centimetre`, `Millimetre`, `Inch` or `Foot`.
    #[serde(default)]
    pub unit: super::Unit,
    /// Edges whose faces meet at more than this angle (degrees) are drawn.
    #[serde(default = "default_crease")]
    pub crease: HalfTurn,
}

/// Where a block's plan is anchored: its front-left corner (as seen by someone facing the
/// front) or the centre of its plan.
#[derive(Debug, Deserialize)]
pub enum Anchor {
    Corner(Finite, Finite),
    Centre(Finite, Finite),
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BlockSpec {
    #[serde(default)]
    pub label: Option<String>,
    pub at: Anchor,
    /// Along the front, metres.
    pub width: Positive,
    /// From the front backwards, metres.
    pub depth: Positive,
    pub height: Positive,
    /// The azimuth (degrees) the front wall faces, outwards; 180 = south-facing, which puts
    /// the width along +x and the depth along +y.
    #[serde(default = "default_facing")]
    pub facing: Finite,
    /// Height of the block's base, metres.
    #[serde(default = "zero")]
    pub base: Finite,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PolylineSpec {
    #[serde(default)]
    pub label: Option<String>,
    pub points: Vertices,
    /// Join the last point back to the first.
    #[serde(default)]
    pub closed: bool,
}
