//! `Junction`: a name for the junction where roads meet at a point. The junction itself
//! is found from the roads (`scene/streets.rs`); this item only names it, and the name is
//! drawn as a label through the one label placer, like any item's label.

use super::super::build::ItemBuilder;
use super::super::numbers::{plan, Plan};
use nalgebra::{Point3, Vector2};
use serde::Deserialize;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct JunctionSpec {
    /// The junction's name.
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// Where the junction is in plan: at or near the point where the roads' centrelines
    /// meet (within the widest road's reach, pavements included).
    pub at: Plan,
}

/// Places the name; the junction is looked for once every road is joined.
pub fn build_junction(b: &mut ItemBuilder, spec: &JunctionSpec) -> Result<(), String> {
    if spec.label.is_none() {
        return Err("a junction needs a `label`: the name to write there".to_owned());
    }
    let p = plan(&spec.at);
    let at = b.placement().point(&Point3::new(p.x, p.y, 0.0));
    b.add_junction_name(Vector2::new(at.x, at.y));
    Ok(())
}
