//! `Block`: a rectangular mass placed by a corner or its centre, with a roof, openings and
//! storey lines.

use super::super::build::{plan_direction, ItemBuilder};
use super::super::numbers::{default_facing, zero, Finite, NonNegative, Positive};
use super::mass::{build_mass, Mass};
use super::standing::{draw_footing, outline_foot, PlinthSpec};
use super::walls::{
    openings_in_wall, round_window_in_wall, OpeningsSpec, RoundWindowSpec, WallChoice,
};
use nalgebra::{Point3, Vector2, Vector3};
use serde::Deserialize;
use std::f64::consts::PI;

/// Where a block's plan is anchored: its front-left corner (as seen by someone facing the
/// front) or the centre of its plan.
#[derive(Clone, Copy, Debug, Deserialize, PartialEq)]
pub enum Anchor {
    Corner(Finite, Finite),
    Centre(Finite, Finite),
}

/// Which way a gable roof's ridge runs.
#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq, Eq)]
pub enum Along {
    /// Parallel to the front.
    #[default]
    Width,
    /// From the front to the back.
    Depth,
}

/// A block's roof. Heights (`ridge`, `apex`, `back`) are measured from the block's base,
/// like its `height` (the eaves).
#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub enum RoofSpec {
    #[default]
    Flat,
    /// Two slopes meeting at a ridge, with upright gable ends.
    Gable {
        ridge: Positive,
        #[serde(default)]
        along: Along,
        #[serde(default)]
        overhang: Option<NonNegative>,
    },
    /// Four slopes of one pitch; the ridge runs along the longer side.
    Hip {
        ridge: Positive,
        #[serde(default)]
        overhang: Option<NonNegative>,
    },
    /// Four slopes meeting at a point over the centre.
    Pyramid {
        apex: Positive,
        #[serde(default)]
        overhang: Option<NonNegative>,
    },
    /// One slope (mono-pitch), from the front at `height` to the back at `back`.
    Shed {
        back: Positive,
        #[serde(default)]
        overhang: Option<NonNegative>,
    },
}

/// A parapet round a flat roof: its height above the roof and its thickness.
#[derive(Clone, Copy, Debug, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct ParapetSpec {
    pub height: Positive,
    pub thickness: Positive,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BlockSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    pub at: Anchor,
    /// Along the front.
    pub width: Positive,
    /// From the front backwards.
    pub depth: Positive,
    /// To the eaves (the top of the walls); 0 draws just the plan on the ground.
    pub height: NonNegative,
    /// The azimuth (degrees) the front wall faces, outwards; 180 = south-facing, which puts
    /// the width along +x and the depth along +y.
    #[serde(default = "default_facing")]
    pub facing: Finite,
    /// Height of the block's foot.
    #[serde(default = "zero")]
    pub base: Finite,
    /// Stands on the scene's ground: `base` is then measured from the lowest ground along
    /// the block's walls (its lowest corner, or lower where a hollow crosses a wall), and
    /// the walls run down into the slope (hidden by it).
    #[serde(default)]
    pub on_ground: bool,
    /// With `on_ground`: a level floor at the highest ground under the block, on a plinth
    /// running down to the slope.
    #[serde(default)]
    pub plinth: Option<PlinthSpec>,
    #[serde(default)]
    pub roof: RoofSpec,
    #[serde(default)]
    pub parapet: Option<ParapetSpec>,
    #[serde(default)]
    pub openings: Vec<OpeningsSpec>,
    /// Round windows (oculi), on walls named as for `openings`.
    #[serde(default)]
    pub round_windows: Vec<RoundWindowSpec>,
    /// Heights of storey lines (string courses) above the base.
    #[serde(default)]
    pub storeys: Vec<Positive>,
}

/// The frame of a rectangle placed by an anchor: its front-left corner, and the turn that
/// takes the local x (along the front) and y (backwards) onto the site.
pub fn rectangle_frame(at: Anchor, width: f64, depth: f64, facing_deg: f64) -> (Vector2<f64>, f64) {
    let facing = facing_deg.to_radians();
    // Facing the front, one looks towards facing + 180 degrees and one's right hand points a
    // quarter turn clockwise from there, so the width runs towards facing - 90 and the depth
    // towards facing + 180: local +y (north) turns onto facing + 180.
    let along = plan_direction(facing - PI / 2.0) * width;
    let back = -plan_direction(facing) * depth;
    let front_left = match at {
        Anchor::Corner(x, y) => Vector2::new(x.0, y.0),
        Anchor::Centre(x, y) => Vector2::new(x.0, y.0) - (along + back) / 2.0,
    };
    (front_left, facing + PI)
}

/// A rectangle's corners in its own frame, counter-clockwise from the front-left.
pub fn rectangle_plan(width: f64, depth: f64) -> Vec<Vector2<f64>> {
    vec![
        Vector2::new(0.0, 0.0),
        Vector2::new(width, 0.0),
        Vector2::new(width, depth),
        Vector2::new(0.0, depth),
    ]
}

/// The walls a choice names, counting a rectangle's walls from the front: front, right,
/// back, left.
pub fn rectangle_walls(choice: WallChoice) -> Result<Vec<usize>, String> {
    Ok(match choice {
        WallChoice::Front => vec![0],
        WallChoice::Right => vec![1],
        WallChoice::Back => vec![2],
        WallChoice::Left => vec![3],
        WallChoice::All => vec![0, 1, 2, 3],
        WallChoice::Side(n) if (1..=4).contains(&n.0) => vec![n.0 as usize - 1],
        WallChoice::Side(n) => {
            return Err(format!("a rectangle has sides 1 to 4, not side {}", n.0))
        }
    })
}

/// The names of a rectangle's corners, counter-clockwise from the front-left as
/// [`rectangle_plan`] gives them, as seen by someone facing the front.
pub const RECTANGLE_CORNERS: [&str; 4] = ["front left", "front right", "back right", "back left"];

/// Names the block's corners at its foot and eaves, and its ridge ends or apex.
fn name_block_points(b: &mut ItemBuilder, block: &BlockSpec, width: f64, depth: f64, height: f64) {
    let top = if block.roof == RoofSpec::Flat {
        "top"
    } else {
        "eaves"
    };
    for (corner, name) in rectangle_plan(width, depth).iter().zip(RECTANGLE_CORNERS) {
        b.name_point(Point3::new(corner.x, corner.y, 0.0), format!("{name} foot"));
        b.name_point(
            Point3::new(corner.x, corner.y, height),
            format!("{name} {top}"),
        );
    }
    let (half_w, half_d) = (width / 2.0, depth / 2.0);
    match block.roof {
        RoofSpec::Gable {
            ridge,
            along: Along::Width,
            ..
        } => {
            b.name_point(Point3::new(0.0, half_d, ridge.0), "ridge left end");
            b.name_point(Point3::new(width, half_d, ridge.0), "ridge right end");
        }
        RoofSpec::Gable {
            ridge,
            along: Along::Depth,
            ..
        } => {
            b.name_point(Point3::new(half_w, 0.0, ridge.0), "ridge front end");
            b.name_point(Point3::new(half_w, depth, ridge.0), "ridge back end");
        }
        RoofSpec::Hip { ridge, .. } => {
            // The hips rise at one pitch from all four sides, so the ridge ends stand half
            // the shorter side in from the ends.
            let inset = half_w.min(half_d);
            if width >= depth {
                b.name_point(Point3::new(inset, half_d, ridge.0), "ridge left end");
                b.name_point(
                    Point3::new(width - inset, half_d, ridge.0),
                    "ridge right end",
                );
            } else {
                b.name_point(Point3::new(half_w, inset, ridge.0), "ridge front end");
                b.name_point(
                    Point3::new(half_w, depth - inset, ridge.0),
                    "ridge back end",
                );
            }
        }
        RoofSpec::Pyramid { apex, .. } => {
            b.name_point(Point3::new(half_w, half_d, apex.0), "apex");
        }
        RoofSpec::Flat | RoofSpec::Shed { .. } => {}
    }
}

/// Moves the builder into the frame of a rectangle `width` by `depth` placed by `at` and
/// `facing_deg` (its first corner the origin, its width along x), standing `base` above
/// z = 0 or, `on_ground`, on the scene's ground with its foot line or plinth drawn: how a
/// block, a room and a vault stand.
pub fn stand_rectangle(
    b: &mut ItemBuilder,
    at: Anchor,
    (width, depth): (f64, f64),
    facing_deg: f64,
    base: f64,
    on_ground: bool,
    plinth: Option<&PlinthSpec>,
) -> Result<(), String> {
    let (corner, turn) = rectangle_frame(at, width, depth, facing_deg);
    let plan = rectangle_plan(width, depth);
    let frame = b
        .placement()
        .then_move(Vector3::new(corner.x, corner.y, 0.0), turn);
    let base = outline_foot(b, &frame, &plan, base, on_ground, plinth)?;
    b.move_by(Vector3::new(corner.x, corner.y, base), turn);
    draw_footing(b, &plan, on_ground, plinth)
}

pub fn build_block(b: &mut ItemBuilder, block: &BlockSpec) -> Result<(), String> {
    let (width, depth, height) = (block.width.0, block.depth.0, block.height.0);
    let (at, facing, base) = (block.at, block.facing.0, block.base.0);
    stand_rectangle(
        b,
        at,
        (width, depth),
        facing,
        base,
        block.on_ground,
        block.plinth.as_ref(),
    )?;
    if height == 0.0 {
        b.warn("has no height: only its plan is drawn, on the ground");
        let plan: Vec<Point3<f64>> = rectangle_plan(width, depth)
            .iter()
            .map(|p| Point3::new(p.x, p.y, 0.0))
            .collect();
        b.path(&plan, true);
        return Ok(());
    }
    let rise_above_eaves = |top: f64, what: &str| {
        if top > height {
            Ok(top - height)
        } else {
            Err(format!(
                "the {what} ({top}) must be higher than the eaves (`height`, {height})"
            ))
        }
    };
    let overhang = |o: Option<NonNegative>| o.map_or(0.0, |o| o.0);
    let (slopes, overhang) = match block.roof {
        RoofSpec::Flat => (Vec::new(), 0.0),
        RoofSpec::Gable {
            ridge,
            along,
            overhang: o,
        } => {
            let rise = rise_above_eaves(ridge.0, "ridge")?;
            let slopes = match along {
                Along::Width => {
                    let s = Some(rise / (depth / 2.0));
                    vec![s, None, s, None]
                }
                Along::Depth => {
                    let s = Some(rise / (width / 2.0));
                    vec![None, s, None, s]
                }
            };
            (slopes, overhang(o))
        }
        RoofSpec::Hip { ridge, overhang: o } => {
            let rise = rise_above_eaves(ridge.0, "ridge")?;
            (vec![Some(rise / (width.min(depth) / 2.0)); 4], overhang(o))
        }
        RoofSpec::Pyramid { apex, overhang: o } => {
            let rise = rise_above_eaves(apex.0, "apex")?;
            let (front, side) = (Some(rise / (depth / 2.0)), Some(rise / (width / 2.0)));
            (vec![front, side, front, side], overhang(o))
        }
        RoofSpec::Shed { back, overhang: o } => (
            vec![Some((back.0 - height) / depth), None, None, None],
            overhang(o),
        ),
    };
    if block.parapet.is_some() && block.roof != RoofSpec::Flat {
        return Err("a parapet needs a flat roof".to_owned());
    }
    let mass = Mass {
        plan: rectangle_plan(width, depth),
        eaves: height,
        slopes,
        upper: Vec::new(),
        overhang,
        parapet: block.parapet.map(|p| (p.height.0, p.thickness.0)),
    };
    name_block_points(b, block, width, depth, height);
    let walls = mass.walls();
    let mut openings = vec![Vec::new(); 4];
    for spec in &block.openings {
        for wall in rectangle_walls(spec.wall)? {
            openings[wall].extend(openings_in_wall(spec, &walls[wall])?);
        }
    }
    for spec in &block.round_windows {
        for wall in rectangle_walls(spec.wall)? {
            openings[wall].push(round_window_in_wall(spec, &walls[wall], false)?);
        }
    }
    let storeys: Vec<f64> = block.storeys.iter().map(|s| s.0).collect();
    build_mass(b, &mass, &walls, &openings, &storeys)
}

#[cfg(test)]
mod tests {
    use super::super::super::site::Site;
    use super::super::checks::{built, edge_counts, unpaired_sides};
    use super::*;

    fn block(openings: &str) -> BlockSpec {
        let text = format!(
            "(at: Corner(0, 0), width: 12, depth: 8, height: 7, roof: Gable(ridge: 10), {openings})"
        );
        ron::Options::default()
            .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
            .from_str(&text)
            .unwrap_or_else(|e| panic!("{text}: {e}"))
    }

    fn build(spec: &BlockSpec) -> Result<Site, String> {
        built("block", |b| build_block(b, spec))
    }

    #[test]
    fn shaped_heads_with_reveals_surrounds_and_sills_keep_the_block_closed() {
        assert_eq!(unpaired_sides(&build(&block("")).unwrap()), 0);
        for head in [
            "Square",
            "Semicircular",
            "Segmental(rise: 0.3)",
            "Pointed()",
            "Pointed(rise: 1.2)",
            "Elliptical(rise: 0.4)",
            "ThreeCentred(rise: 0.4)",
        ] {
            let spec = block(&format!(
                "openings: [(wall: Front, count: 2, width: 1.2, height: 2.4, sill: 1, \
                 reveal: 0.25, head: {head}, surround: 0.15, sill_projection: 0.06), \
                 (wall: Right, width: 1.2, height: 2.4, sill: 1, reveal: 0.25, head: {head}, \
                 surround: 0.15, sill_projection: 0.06)], \
                 round_windows: [(wall: Front, centre: 5.5, diameter: 1.4, reveal: 0.3, \
                 surround: 0.1)]"
            ));
            let site = build(&spec).unwrap_or_else(|e| panic!("{head}: {e}"));
            assert_eq!(unpaired_sides(&site), 0, "{head}: the block is not closed");
        }
    }

    #[test]
    fn a_round_headed_window_draws_its_arcs_exactly() {
        // One window on the front, a half circle over jambs; with a reveal the arc is
        // drawn on the face and at the back, with a surround once more: 3 arcs. A round
        // window adds a circle on the face, at the back and round its surround.
        let plain = build(&block("")).unwrap();
        let spec = block(
            "openings: [(wall: Front, width: 1, height: 2, sill: 1, reveal: 0.2, \
             head: Semicircular, surround: 0.1)], \
             round_windows: [(wall: Front, along: 2, centre: 5, diameter: 1, reveal: 0.2, \
             surround: 0.1)]",
        );
        let site = build(&spec).unwrap();
        assert_eq!(edge_counts(&site).1 - edge_counts(&plain).1, 6);
    }

    #[test]
    fn a_head_taller_than_the_opening_is_refused() {
        let spec =
            block("openings: [(wall: Front, width: 2, height: 0.9, sill: 1, head: Semicircular)]");
        let error = build(&spec).unwrap_err();
        assert!(error.contains("head"), "{error}");
    }
}
