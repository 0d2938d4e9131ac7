//! Round items: `Column`, `Tower` and `Dome`. Their rims are exact circles; their outlines
//! from the eye are found for each standpoint (see `outline.rs`).

use super::super::build::{ellipse_points, facet_count, ItemBuilder};
use super::super::numbers::{plan, zero, Finite, Plan, Positive};
use super::super::outline::RoundOutline;
use super::standing::round_foot;
use super::tower_openings::{build_pierced_side, tower_slots, Slot, TowerOpeningsSpec};
use nalgebra::{Point3, Vector3};
use serde::Deserialize;
use std::f64::consts::{PI, TAU};

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ColumnSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The centre of its plan.
    pub at: Plan,
    pub diameter: Positive,
    pub height: Positive,
    #[serde(default = "zero")]
    pub base: Finite,
    /// Stands on the scene's ground: `base` is then measured from the lowest ground round
    /// its rim, and the line where it meets the ground is drawn.
    #[serde(default)]
    pub on_ground: bool,
    /// Height of a ring drawn round the foot (the top of a base moulding).
    #[serde(default)]
    pub plinth: Option<Positive>,
    /// Depth below the top of a ring drawn round the head (the foot of a capital).
    #[serde(default)]
    pub capital: Option<Positive>,
}

/// What stands on a round tower.
#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub enum TowerRoof {
    #[default]
    Flat,
    /// A cone rising `height` above the top of the wall.
    Cone { height: Positive },
    /// A hemisphere as wide as the tower.
    Dome,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TowerSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    pub at: Plan,
    pub diameter: Positive,
    /// To the top of the wall.
    pub height: Positive,
    #[serde(default = "zero")]
    pub base: Finite,
    /// Stands on the scene's ground: `base` is then measured from the lowest ground round
    /// its rim, and the line where it meets the ground is drawn.
    #[serde(default)]
    pub on_ground: bool,
    #[serde(default)]
    pub roof: TowerRoof,
    /// Heights of storey lines above the base.
    #[serde(default)]
    pub storeys: Vec<Positive>,
    /// Square-headed openings spaced round the wall.
    #[serde(default)]
    pub openings: Vec<TowerOpeningsSpec>,
}

/// A hemisphere on a round drum.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DomeSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    pub at: Plan,
    pub diameter: Positive,
    /// Height of the drum the dome stands on (0 for none).
    #[serde(default)]
    pub drum: Option<Positive>,
    #[serde(default = "zero")]
    pub base: Finite,
    /// Stands on the scene's ground: `base` is then measured from the lowest ground round
    /// its rim, and the line where it meets the ground is drawn.
    #[serde(default)]
    pub on_ground: bool,
}

/// A drum: top and bottom circles and rings drawn; side faces and a floor for hiding; its
/// outline from each eye. Returns the facet corners round its top (last = first), for
/// whatever closes it.
fn drum(
    b: &mut ItemBuilder,
    foot: Point3<f64>,
    radius: f64,
    height: f64,
    rings: &[f64],
    openings: &[Slot],
) -> Vec<Point3<f64>> {
    let top = foot + Vector3::z() * height;
    b.circle(foot, radius);
    b.circle(top, radius);
    b.round_outline(RoundOutline::Cylinder {
        base: foot,
        radius,
        height,
    });
    let count = facet_count(TAU);
    let (u, v) = (Vector3::x() * radius, Vector3::y() * radius);
    let bottom = if openings.is_empty() {
        for &ring in rings {
            b.circle(foot + Vector3::z() * ring, radius);
        }
        ellipse_points(foot, u, v, 0.0, TAU, count)
    } else {
        // The floor and whatever closes the top share the side's facet corners, the
        // openings' jambs among them.
        let cuts = build_pierced_side(b, foot, radius, height, rings, openings);
        cuts.iter()
            .chain(cuts.first())
            .map(|t| foot + u * t.cos() + v * t.sin())
            .collect()
    };
    // The top is the bottom lifted: no second round of sines and cosines.
    let upper: Vec<Point3<f64>> = bottom.iter().map(|p| p + (top - foot)).collect();
    if openings.is_empty() {
        b.strip(&bottom, &upper);
    }
    b.convex_face(&bottom[..bottom.len() - 1]);
    upper
}

/// The level circle of `radius` about `centre` in facets, its first point repeated at the
/// end: the rim a lid closes and a cone rises from.
fn level_rim(centre: Point3<f64>, radius: f64) -> Vec<Point3<f64>> {
    let (x, y) = (Vector3::x() * radius, Vector3::y() * radius);
    ellipse_points(centre, x, y, 0.0, TAU, facet_count(TAU))
}

fn lid(b: &mut ItemBuilder, centre: Point3<f64>, radius: f64) {
    let rim = level_rim(centre, radius);
    b.convex_face(&rim[..rim.len() - 1]);
}

/// A hemisphere on the circle of `radius` about `centre`.
fn dome(b: &mut ItemBuilder, centre: Point3<f64>, radius: f64) {
    spheroid_dome(b, centre, radius, radius);
}

/// The upper half of a spheroid on the circle of `radius` about `centre`, its crown
/// `height` above it (a hemisphere when `height` is `radius`): the outline from each eye,
/// and faces cut along meridians and parallels (a meridian of the spheroid is the quarter
/// ellipse `(r cos a, h sin a)`).
pub fn spheroid_dome(b: &mut ItemBuilder, centre: Point3<f64>, radius: f64, height: f64) {
    b.round_outline(RoundOutline::Dome {
        centre,
        radius,
        height,
    });
    let around = facet_count(TAU);
    let up = facet_count(PI / 2.0);
    let ring = |k: usize| {
        let elevation = PI / 2.0 * k as f64 / up as f64;
        let (r, z) = (radius * elevation.cos(), height * elevation.sin());
        ellipse_points(
            centre + Vector3::z() * z,
            Vector3::x() * r,
            Vector3::y() * r,
            0.0,
            TAU,
            around,
        )
    };
    for k in 0..up {
        b.strip(&ring(k), &ring(k + 1));
    }
}

/// A cone on the circle of `radius` about `centre`, its apex `height` above it: the
/// outline from each eye and its faces.
pub fn cone(b: &mut ItemBuilder, centre: Point3<f64>, radius: f64, height: f64) {
    b.round_outline(RoundOutline::Cone {
        base: centre,
        radius,
        height,
    });
    let rim = level_rim(centre, radius);
    let apex = centre + Vector3::z() * height;
    b.strip(&rim, &vec![apex; rim.len()]);
}

fn check_rings(rings: &[f64], height: f64) -> Result<(), String> {
    match rings.iter().find(|&&r| r >= height) {
        Some(r) => Err(format!("a ring at {r} is not below the top ({height})")),
        None => Ok(()),
    }
}

pub fn build_column(b: &mut ItemBuilder, spec: &ColumnSpec) -> Result<(), String> {
    let height = spec.height.0;
    let mut rings = Vec::new();
    if let Some(plinth) = spec.plinth {
        rings.push(plinth.0);
    }
    if let Some(capital) = spec.capital {
        rings.push(height - capital.0);
        if capital.0 >= height {
            return Err(format!(
                "the capital ({}) is deeper than the column is tall",
                capital.0
            ));
        }
    }
    check_rings(&rings, height)?;
    let centre = plan(&spec.at);
    let radius = spec.diameter.0 / 2.0;
    let (base, on_ground) = round_foot(b, centre, radius, spec.base.0, spec.on_ground)?;
    let foot = Point3::new(centre.x, centre.y, base);
    let rim = drum(b, foot, radius, height, &rings, &[]);
    b.convex_face(&rim[..rim.len() - 1]);
    if let Some(ground_line) = on_ground {
        ground_line.draw(b);
    }
    Ok(())
}

pub fn build_tower(b: &mut ItemBuilder, spec: &TowerSpec) -> Result<(), String> {
    let height = spec.height.0;
    let rings: Vec<f64> = spec.storeys.iter().map(|s| s.0).collect();
    check_rings(&rings, height)?;
    let centre = plan(&spec.at);
    let radius = spec.diameter.0 / 2.0;
    let (base, on_ground) = round_foot(b, centre, radius, spec.base.0, spec.on_ground)?;
    let foot = Point3::new(centre.x, centre.y, base);
    let top = foot + Vector3::z() * height;
    let slots = tower_slots(&spec.openings, radius, height)?;
    let rim = drum(b, foot, radius, height, &rings, &slots);
    match spec.roof {
        TowerRoof::Flat => b.convex_face(&rim[..rim.len() - 1]),
        TowerRoof::Cone { height: rise } => {
            b.round_outline(RoundOutline::Cone {
                base: top,
                radius,
                height: rise.0,
            });
            let apex = top + Vector3::z() * rise.0;
            b.strip(&rim, &vec![apex; rim.len()]);
        }
        TowerRoof::Dome => dome(b, top, radius),
    }
    if let Some(ground_line) = on_ground {
        ground_line.draw(b);
    }
    Ok(())
}

pub fn build_dome(b: &mut ItemBuilder, spec: &DomeSpec) -> Result<(), String> {
    let centre = plan(&spec.at);
    let radius = spec.diameter.0 / 2.0;
    let (base, on_ground) = round_foot(b, centre, radius, spec.base.0, spec.on_ground)?;
    let foot = Point3::new(centre.x, centre.y, base);
    let springing = match spec.drum {
        Some(drum_height) => {
            // The dome closes the drum's top.
            drum(b, foot, radius, drum_height.0, &[], &[]);
            foot + Vector3::z() * drum_height.0
        }
        None => {
            b.circle(foot, radius);
            lid(b, foot, radius);
            foot
        }
    };
    dome(b, springing, radius);
    if let Some(ground_line) = on_ground {
        ground_line.draw(b);
    }
    Ok(())
}
