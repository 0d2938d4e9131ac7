//! Turning the items of a scene file into edges.

use super::format::{
    Anchor, BlockSpec, ItemSpec, ModelSpec, PolylineSpec, SceneFile, StandpointSpec,
};
use super::obj::read_obj;
use super::{add_mesh, ItemId, MeshPlacement, Site, Standpoint};
use crate::error::{Error, Result};
use nalgebra::{Point3, Vector2, Vector3};
use std::path::Path;

/// The resolved site of a parsed scene file read from `scene_path` (models are found
/// relative to its folder).
pub fn expand(file: SceneFile, fallback_name: &str, scene_path: &Path) -> Result<Site> {
    let mut site = Site {
        name: file.name.unwrap_or_else(|| fallback_name.to_owned()),
        ..Site::default()
    };
    site.standpoints = file.standpoints.into_iter().map(standpoint).collect();
    for item in file.items {
        match item {
            ItemSpec::Block(block) => {
                let id = site.add_item("block", block.label.clone());
                add_block(&mut site, id, &block);
            }
            ItemSpec::Polyline(polyline) => {
                let id = site.add_item("polyline", polyline.label.clone());
                add_polyline(&mut site, id, &polyline);
            }
            ItemSpec::Model(model) => {
                add_model(&mut site, &model, scene_path).map_err(|source| Error::InModel {
                    scene: scene_path.to_owned(),
                    item: model.label.clone().unwrap_or_else(|| model.file.0.clone()),
                    source: Box::new(source),
                })?
            }
        }
    }
    Ok(site)
}

fn add_model(site: &mut Site, model: &ModelSpec, scene_path: &Path) -> Result<()> {
    let path = scene_path
        .parent()
        .unwrap_or(Path::new(""))
        .join(&model.file.0);
    let obj = read_obj(&path)?;
    let placement = MeshPlacement {
        up: model.up,
        unit: model.unit,
        crease_deg: model.crease.0,
        scale: model.scale.0,
        turn_deg: model.turn.0,
        offset: Vector3::new(model.at.0 .0, model.at.1 .0, model.at.2 .0),
    };
    let name = model.label.clone().unwrap_or_else(|| model.file.0.clone());
    add_mesh(site, &obj, &placement, &name);
    Ok(())
}

fn standpoint(spec: StandpointSpec) -> Standpoint {
    Standpoint {
        name: spec.name,
        x: spec.x.0,
        y: spec.y.0,
        ground: spec.ground.0,
        eye_height: spec.eye_height.0,
        heading: spec.heading.0.to_radians(),
        pitch: spec.pitch.0.to_radians(),
        roll: spec.roll.0.to_radians(),
    }
}

/// The unit plan vector pointing at an azimuth (radians clockwise from north).
fn plan_direction(azimuth: f64) -> Vector2<f64> {
    let (sin, cos) = azimuth.sin_cos();
    Vector2::new(sin, cos)
}

/// The four plan corners of a block, counter-clockwise seen from above, starting at the
/// front-left corner (as seen by someone facing the front).
pub fn block_plan(block: &BlockSpec) -> [Vector2<f64>; 4] {
    let facing = block.facing.0.to_radians();
    // Facing the front, one looks towards facing + 180; one's right is a quarter turn
    // clockwise from that, so the width runs towards facing - 90 and the depth towards
    // facing + 180.
    let along = plan_direction(facing - std::f64::consts::FRAC_PI_2) * block.width.0;
    let back = -plan_direction(facing) * block.depth.0;
    let front_left = match block.at {
        Anchor::Corner(x, y) => Vector2::new(x.0, y.0),
        Anchor::Centre(x, y) => Vector2::new(x.0, y.0) - (along + back) / 2.0,
    };
    [
        front_left,
        front_left + along,
        front_left + along + back,
        front_left + back,
    ]
}

fn add_block(site: &mut Site, id: ItemId, block: &BlockSpec) {
    let plan = block_plan(block);
    let bottom = block.base.0;
    let top = bottom + block.height.0;
    let corner = |i: usize, z: f64| Point3::new(plan[i % 4].x, plan[i % 4].y, z);
    // Each ring of edges end to end, so consecutive edges share their ends (the projector
    // reuses the angles of a shared end), then the uprights.
    for z in [bottom, top] {
        for i in 0..4 {
            site.add_segment(id, corner(i, z), corner(i + 1, z));
        }
    }
    for i in 0..4 {
        site.add_segment(id, corner(i, bottom), corner(i, top));
    }
}

fn add_polyline(site: &mut Site, id: ItemId, polyline: &PolylineSpec) {
    let points: Vec<Point3<f64>> = polyline
        .points
        .0
        .iter()
        .map(|(x, y, z)| Point3::new(x.0, y.0, z.0))
        .collect();
    for pair in points.windows(2) {
        site.add_segment(id, pair[0], pair[1]);
    }
    if polyline.closed && points.len() > 2 {
        site.add_segment(id, points[points.len() - 1], points[0]);
    }
}

#[cfg(test)]
mod tests {
    use super::super::format::{Finite, Positive};
    use super::*;

    fn block(at: Anchor, facing: f64) -> BlockSpec {
        BlockSpec {
            label: None,
            at,
            width: Positive(4.0),
            depth: Positive(2.0),
            height: Positive(3.0),
            facing: Finite(facing),
            base: Finite(0.0),
        }
    }

    fn assert_plan(plan: [Vector2<f64>; 4], expected: [(f64, f64); 4]) {
        for (p, (x, y)) in plan.iter().zip(expected) {
            assert!(
                (p.x - x).abs() < 1e-12 && (p.y - y).abs() < 1e-12,
                "{plan:?}"
            );
        }
    }

    #[test]
    fn south_facing_block_runs_east_and_north_from_its_corner() {
        let plan = block_plan(&block(Anchor::Corner(Finite(1.0), Finite(1.0)), 180.0));
        assert_plan(plan, [(1.0, 1.0), (5.0, 1.0), (5.0, 3.0), (1.0, 3.0)]);
    }

    #[test]
    fn east_facing_block_centred() {
        // Facing east, the front runs north-south; facing it one looks west and the right
        // hand points north, so the width runs north and the depth west.
        let plan = block_plan(&block(Anchor::Centre(Finite(0.0), Finite(0.0)), 90.0));
        assert_plan(plan, [(1.0, -2.0), (1.0, 2.0), (-1.0, 2.0), (-1.0, -2.0)]);
    }

    #[test]
    fn block_has_twelve_edges() {
        let mut site = Site::default();
        let id = site.add_item("block", None);
        add_block(
            &mut site,
            id,
            &block(Anchor::Corner(Finite(0.0), Finite(0.0)), 180.0),
        );
        assert_eq!(site.edges.len(), 12);
    }
}
