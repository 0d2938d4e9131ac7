//! `Stairs`: a straight flight of equal steps, with landings.

use super::super::build::ItemBuilder;
use super::super::numbers::{zero, Count, Finite, Plan, Positive};
use serde::Deserialize;

/// A level stretch after a step.
#[derive(Clone, Copy, Debug, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct LandingSpec {
    /// The step it follows, counting from 1.
    pub after: Count,
    /// Its length in the direction of travel.
    pub length: Positive,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StairsSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The middle of the foot of the first riser.
    pub at: Plan,
    /// The azimuth (degrees) one faces going up.
    pub bearing: Finite,
    pub steps: Count,
    /// Height of each step.
    pub rise: Positive,
    /// Depth of each tread.
    pub going: Positive,
    pub width: Positive,
    #[serde(default = "zero")]
    pub base: Finite,
    #[serde(default)]
    pub landings: Vec<LandingSpec>,
}

pub fn build_stairs(_b: &mut ItemBuilder, _spec: &StairsSpec) -> Result<(), String> {
    Err("stairs are not built yet".to_owned())
}
