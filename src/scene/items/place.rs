//! `RoundPlace`: a circular place (or, with an island, a roundabout) of a given radius
//! where the roads named as its arms end. Like a road it is placed, not drawn: the street
//! network (`scene/streets.rs`, `scene/places.rs`) draws it once every road is known, so
//! that the arms' kerbs can turn onto its circle.

use super::super::build::ItemBuilder;
use super::super::numbers::{plan, Finite, Plan, Positive};
use super::super::site::ItemId;
use nalgebra::{Point3, Vector2};
use serde::Deserialize;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RoundPlaceSpec {
    /// The place's name, drawn as a label near it.
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The centre of the circle in plan.
    pub centre: Plan,
    /// Radius of the carriageway's outer kerb.
    pub radius: Positive,
    /// Radius of a central island (a roundabout); none: an open circular place.
    #[serde(default)]
    pub island: Option<Positive>,
    /// Height of the kerb, round the circle, its returns and the island (none: no kerb).
    #[serde(default)]
    pub kerb: Option<Positive>,
    /// Width of the pavement round the outside of the circle (none: no pavement).
    #[serde(default)]
    pub pavement: Option<Positive>,
    /// Radius of the kerb return turning each arm's kerb onto the circle (none: the kerb
    /// lines meet the circle in a sharp corner).
    #[serde(default)]
    pub kerb_radius: Option<Positive>,
    /// Height of the place (none: the ground's height at the centre, or 0 without ground).
    #[serde(default)]
    pub elevation: Option<Finite>,
    /// The labels of the roads that end in the place, each once.
    #[serde(default)]
    pub arms: Vec<String>,
}

/// A round place resolved into site coordinates (metres), waiting for its arms.
#[derive(Clone, Debug, PartialEq)]
pub struct PlaceLine {
    pub item: ItemId,
    pub centre: Vector2<f64>,
    pub height: f64,
    pub radius: f64,
    pub island: Option<f64>,
    pub kerb: f64,
    pub pavement: f64,
    pub kerb_radius: f64,
    pub arms: Vec<String>,
}

/// Checks a round place as written and places it in the site; it is drawn with the roads.
pub fn build_round_place(b: &mut ItemBuilder, spec: &RoundPlaceSpec) -> Result<(), String> {
    if let Some(island) = spec.island {
        if island.0 >= spec.radius.0 {
            return Err(format!(
                "the island (radius {}) must be smaller than the place (radius {}), leaving \
                 a carriageway round it",
                island.0, spec.radius.0
            ));
        }
    }
    for (k, arm) in spec.arms.iter().enumerate() {
        if spec.arms[..k].contains(arm) {
            return Err(format!("the arm \"{arm}\" is named twice in `arms`"));
        }
    }
    let place = b.placement();
    let centre = plan(&spec.centre);
    let given = spec.elevation.map_or(0.0, |e| e.0);
    let at = place.point(&Point3::new(centre.x, centre.y, given));
    let height = match (spec.elevation, b.ground()) {
        (None, Some(ground)) => ground.height_at(at.x, at.y).unwrap_or(at.z),
        _ => at.z,
    };
    let place_line = PlaceLine {
        item: b.item(),
        centre: Vector2::new(at.x, at.y),
        height,
        radius: place.length(spec.radius.0),
        island: spec.island.map(|i| place.length(i.0)),
        kerb: spec.kerb.map_or(0.0, |k| place.length(k.0)),
        pavement: spec.pavement.map_or(0.0, |p| place.length(p.0)),
        kerb_radius: spec.kerb_radius.map_or(0.0, |r| place.length(r.0)),
        arms: spec.arms.clone(),
    };
    b.add_place(place_line);
    Ok(())
}
