//! `Road`: a carriageway along a centreline, with pavements, kerbs, a centre line and
//! rounded corners, level or sloping.

use super::super::build::ItemBuilder;
use super::super::numbers::{Finite, Plan, Positive};
use serde::Deserialize;

#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub enum CentreLine {
    #[default]
    None,
    Solid,
    Dashed {
        dash: Positive,
        gap: Positive,
    },
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RoadSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The centreline's corners in plan.
    pub points: Vec<Plan>,
    /// The height of the road at each corner (all 0 if not given).
    #[serde(default)]
    pub elevations: Option<Vec<Finite>>,
    /// Width of the carriageway, kerb to kerb.
    pub width: Positive,
    /// Width of the pavement on each side.
    #[serde(default)]
    pub pavement: Option<Positive>,
    /// Height of the kerb: the pavement stands this much above the carriageway.
    #[serde(default)]
    pub kerb: Option<Positive>,
    #[serde(default)]
    pub centre_line: CentreLine,
    /// Radius of the centreline round each corner.
    #[serde(default)]
    pub corner_radius: Option<Positive>,
}

pub fn build_road(_b: &mut ItemBuilder, _spec: &RoadSpec) -> Result<(), String> {
    Err("roads are not built yet".to_owned())
}
