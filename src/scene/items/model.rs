//! `Model`: a Wavefront OBJ file placed in the scene.

use super::super::mesh::{Unit, UpAxis, DEFAULT_CREASE_DEG};
use super::super::numbers::{origin, zero, FileName, Finite, HalfTurn, Positive, Spot};
use serde::Deserialize;

fn one() -> Positive {
    Positive(1.0)
}

fn default_crease() -> HalfTurn {
    HalfTurn(DEFAULT_CREASE_DEG)
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ModelSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The OBJ file, relative to the scene file's folder.
    pub file: FileName,
    /// Where the model's origin goes (x east, y north, z up), in the scene's unit.
    #[serde(default = "origin")]
    pub at: Spot,
    /// Turn about the vertical, degrees clockwise seen from above.
    #[serde(default = "zero")]
    pub turn: Finite,
    #[serde(default = "one")]
    pub scale: Positive,
    /// Which axis of the file is up: `Y` (the OBJ habit) or `Z`.
    #[serde(default)]
    pub up: UpAxis,
    /// The unit of the file's numbers: `Metre`, `Centimetre`, `Millimetre`, `Inch` or
    /// `Foot`.
    #[serde(default)]
    pub unit: Unit,
    /// Edges whose faces meet at more than this angle (degrees) are drawn.
    #[serde(default = "default_crease")]
    pub crease: HalfTurn,
    /// Stand on the scene's ground: the model's lowest points on the lowest ground under
    /// them, `at`'s height above it.
    #[serde(default)]
    pub on_ground: bool,
}
