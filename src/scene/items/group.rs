//! Items that hold other items: groups (moved and turned together) and repeats (copies).
//! The walker in `expand.rs` places what they hold; they draw nothing themselves.

use super::super::numbers::{origin, zero, Count, Finite, Spot};
use super::ItemSpec;
use serde::Deserialize;

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
