//! Numbers and lists as a scene file may write them, validated while they are read, so
//! that the RON parser reports the line and column of a bad one: non-finite numbers,
//! non-positive sizes, absurd counts and too-short point lists.

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

/// The smallest size a scene may give: a nanometre in metres (a picometre in millimetres).
/// No site holds anything smaller, and smaller sizes vanish in the arithmetic (their
/// squares underflow to zero, so a wall 1e-200 long has a length of 0 and its points come
/// out NaN).
pub const MIN_SIZE: f64 = 1e-9;

/// A finite number of at least [`MIN_SIZE`] (a size).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Positive(pub f64);

impl<'de> Deserialize<'de> for Positive {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let Finite(value) = Finite::deserialize(deserializer)?;
        if value >= MIN_SIZE {
            Ok(Positive(value))
        } else if value > 0.0 {
            Err(serde::de::Error::custom(format!(
                "expected a size of at least {MIN_SIZE:e}, found {value:e}"
            )))
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
        // Read as any number, so that `2.5` or `-3` is told what a count is rather than
        // meeting the parser's complaint about the characters after the integer.
        let value = f64::deserialize(deserializer)?;
        if value.fract() == 0.0 && (1.0..=MAX_COUNT as f64).contains(&value) {
            Ok(Count(value as u32))
        } else {
            Err(serde::de::Error::custom(format!(
                "expected a whole count from 1 to {MAX_COUNT}, found {value}"
            )))
        }
    }
}

/// The number of a wall side, counted from 1: `Side(1)` runs from the first corner to the
/// second.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SideNumber(pub u32);

impl<'de> Deserialize<'de> for SideNumber {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let value = f64::deserialize(deserializer)?;
        if value.fract() == 0.0 && (1.0..=MAX_COUNT as f64).contains(&value) {
            Ok(SideNumber(value as u32))
        } else {
            Err(serde::de::Error::custom(format!(
                "expected a side number counted from 1 (Side(1) runs from the first corner to the second), found {value}"
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
