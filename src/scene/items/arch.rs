//! `Arch` and `Arcade`: a wall pierced by a row of equal arched openings on piers.

use super::super::build::ItemBuilder;
use super::super::numbers::{default_facing, zero, Count, Finite, Positive};
use super::block::Anchor;
use serde::Deserialize;

/// The curve of an arch's opening above its springing.
#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub enum ArchShape {
    /// A half circle: the rise is half the span.
    #[default]
    Semicircular,
    /// An arc of a circle less than a half, rising `rise` above the springing.
    Segmental { rise: Positive },
    /// Two arcs meeting at a point (two-centred); equilateral (radius = span) unless a
    /// `rise` greater than half the span is given.
    Pointed {
        #[serde(default)]
        rise: Option<Positive>,
    },
    /// A half ellipse rising `rise`.
    Elliptical { rise: Positive },
    /// Three arcs of 60 degrees each (a basket arch) rising `rise`.
    ThreeCentred { rise: Positive },
}

fn one() -> Count {
    Count(1)
}

/// One arch (`Arch`) or a row of equal arches (`Arcade`) in a wall of piers.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ArcadeSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The wall's front-left corner, or the centre of its plan.
    pub at: Anchor,
    /// The azimuth the front face of the wall faces.
    #[serde(default = "default_facing")]
    pub facing: Finite,
    #[serde(default = "zero")]
    pub base: Finite,
    #[serde(default = "one")]
    pub count: Count,
    /// Clear width of each opening.
    pub span: Positive,
    /// Height of the springing (where the curve starts) above the base.
    pub springing: Positive,
    #[serde(default)]
    pub shape: ArchShape,
    /// Width of each pier, the ones at the ends included.
    pub pier: Positive,
    /// Depth of the wall, front face to back face.
    pub thickness: Positive,
    /// Height of the wall's top above the base; by default the apex plus one pier width.
    #[serde(default)]
    pub height: Option<Positive>,
}

pub fn build_arcade(_b: &mut ItemBuilder, _spec: &ArcadeSpec) -> Result<(), String> {
    Err("arches are not built yet".to_owned())
}
