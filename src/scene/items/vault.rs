//! `Vault`: a barrel vault over a rectangle, its axis running from front to back.

use super::super::build::ItemBuilder;
use super::super::numbers::{default_facing, zero, Count, Finite, Positive};
use super::block::Anchor;
use serde::Deserialize;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct VaultSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    pub at: Anchor,
    /// The span, across the axis.
    pub width: Positive,
    /// The length, along the axis (from the front backwards).
    pub depth: Positive,
    #[serde(default = "default_facing")]
    pub facing: Finite,
    #[serde(default = "zero")]
    pub base: Finite,
    /// Height of the springing lines above the base.
    pub springing: Positive,
    /// Height of the crown above the springing; half the width (a half circle) by default,
    /// otherwise a half ellipse.
    #[serde(default)]
    pub rise: Option<Positive>,
    /// The number of bays, with a transverse rib between each two.
    #[serde(default)]
    pub bays: Option<Count>,
}

pub fn build_vault(_b: &mut ItemBuilder, _spec: &VaultSpec) -> Result<(), String> {
    Err("vaults are not built yet".to_owned())
}
