//! `Room`: the inside of a box (floor, walls, ceiling) seen from within, with doors and
//! windows through its walls.

use super::super::build::ItemBuilder;
use super::super::numbers::{default_facing, zero, Count, Finite, Positive};
use super::barrel::BarrelVault;
use super::block::{rectangle_plan, rectangle_walls, stand_rectangle, Anchor};
use super::standing::PlinthSpec;
use super::walls::{
    build_walls, openings_in_wall, round_window_in_wall, OpeningKind, OpeningsSpec,
    RoundWindowSpec, Wall,
};
use nalgebra::{Point3, Vector2};
use serde::Deserialize;

#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub enum Ceiling {
    #[default]
    Flat,
    /// A barrel vault springing from the tops of the side walls, its axis from front to
    /// back; `rise` is half the width by default.
    Vault {
        #[serde(default)]
        rise: Option<Positive>,
        #[serde(default)]
        bays: Option<Count>,
    },
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RoomSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The front-left corner of the floor (seen from outside, facing the front wall), or its
    /// centre.
    pub at: Anchor,
    pub width: Positive,
    pub depth: Positive,
    /// Floor to ceiling (or to the springing of a vault).
    pub height: Positive,
    #[serde(default = "default_facing")]
    pub facing: Finite,
    #[serde(default = "zero")]
    pub base: Finite,
    /// Stands on the scene's ground, as a block does: `base` is then measured from the
    /// lowest ground along its walls, and the line where they meet the ground is drawn.
    #[serde(default)]
    pub on_ground: bool,
    /// With `on_ground`: a level floor at the highest ground under it, on a plinth (as a
    /// block's), so that no ground rises inside.
    #[serde(default)]
    pub plinth: Option<PlinthSpec>,
    #[serde(default)]
    pub ceiling: Ceiling,
    /// Doors and windows; their `reveal` is the depth of the wall they pass through.
    #[serde(default)]
    pub openings: Vec<OpeningsSpec>,
    /// Round windows through the walls; their `reveal` is the depth of the wall.
    #[serde(default)]
    pub round_windows: Vec<RoundWindowSpec>,
    #[serde(default)]
    pub storeys: Vec<Positive>,
}

/// The box a room encloses, in a block's local frame: the rectangle from (0, 0) to
/// (`width`, `depth`), walls `height` tall, under a flat ceiling or a vault springing from
/// the tops of the side walls.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Interior {
    pub width: f64,
    pub depth: f64,
    pub height: f64,
    pub vault: Option<BarrelVault>,
}

/// The room under a vault, its walls rising to the springing.
pub fn vault_room(vault: BarrelVault) -> Interior {
    Interior {
        width: vault.width,
        depth: vault.depth,
        height: vault.springing,
        vault: Some(vault),
    }
}

impl Interior {
    /// The walls round the rectangle, counted from the front: front, right, back, left
    /// (counter-clockwise seen from above, so the room is on their left). Under a vault the
    /// front and back walls rise to the end arcs, as the flat pieces of the vault's
    /// faces do; that outline is what openings must fit under.
    pub fn walls(&self) -> Vec<Wall> {
        let plan = rectangle_plan(self.width, self.depth);
        (0..4)
            .map(|i| {
                let (start, end) = (plan[i], plan[(i + 1) % 4]);
                let length = (end - start).norm();
                let top = match (&self.vault, i) {
                    (Some(vault), 0) => vault.end_wall_top(),
                    // The back wall runs from x = width to x = 0.
                    (Some(vault), 2) => vault
                        .end_wall_top()
                        .iter()
                        .rev()
                        .map(|&(x, z)| (self.width - x, z))
                        .collect(),
                    _ => vec![(0.0, self.height), (length, self.height)],
                };
                Wall { start, end, top }
            })
            .collect()
    }
}

/// Draws a room from inside: the floor's outline, the corners, the ceiling's outline or the
/// vault; the faces of the floor, the walls and the ceiling; openings through the walls
/// and storey lines round them.
pub fn build_interior(
    b: &mut ItemBuilder,
    room: &Interior,
    openings: &[OpeningsSpec],
    round_windows: &[RoundWindowSpec],
    storeys: &[f64],
) -> Result<(), String> {
    let walls = room.walls();
    let mut cut = vec![Vec::new(); walls.len()];
    for spec in openings {
        for wall in rectangle_walls(spec.wall)? {
            cut[wall].extend(openings_in_wall(spec, &walls[wall])?);
        }
    }
    for spec in round_windows {
        for wall in rectangle_walls(spec.wall)? {
            cut[wall].push(round_window_in_wall(spec, &walls[wall], false)?);
        }
    }
    // Openings go through: from inside one looks out through them. Their reveals run
    // outwards, through the thickness of the wall.
    build_walls(b, &walls, &cut, storeys, OpeningKind::Through)?;
    let at = |p: Vector2<f64>, z: f64| Point3::new(p.x, p.y, z);
    let plan = rectangle_plan(room.width, room.depth);
    let floor: Vec<Point3<f64>> = plan.iter().map(|&p| at(p, 0.0)).collect();
    b.path(&floor, true);
    b.face(&floor, &[]);
    for &corner in &plan {
        b.segment(at(corner, 0.0), at(corner, room.height));
    }
    match &room.vault {
        Some(vault) => vault.build(b),
        None => {
            let ceiling: Vec<Point3<f64>> = plan.iter().map(|&p| at(p, room.height)).collect();
            b.path(&ceiling, true);
            b.face(&ceiling, &[]);
        }
    }
    Ok(())
}

pub fn build_room(b: &mut ItemBuilder, spec: &RoomSpec) -> Result<(), String> {
    let (width, depth, height) = (spec.width.0, spec.depth.0, spec.height.0);
    let (at, facing, base) = (spec.at, spec.facing.0, spec.base.0);
    stand_rectangle(
        b,
        at,
        (width, depth),
        facing,
        base,
        spec.on_ground,
        spec.plinth.as_ref(),
    )?;
    let vault = match spec.ceiling {
        Ceiling::Flat => None,
        Ceiling::Vault { rise, bays } => Some(BarrelVault::new(width, depth, height, rise, bays)),
    };
    let room = Interior {
        width,
        depth,
        height,
        vault,
    };
    let storeys: Vec<f64> = spec.storeys.iter().map(|s| s.0).collect();
    build_interior(b, &room, &spec.openings, &spec.round_windows, &storeys)
}

#[cfg(test)]
mod tests {
    use super::super::super::numbers::{NonNegative, SideNumber};
    use super::super::super::site::Site;
    use super::super::checks::{
        assert_bounds, assert_faces_within, bounds, built, edge_counts, edge_points, unpaired_sides,
    };
    use super::super::vault::{build_vault, VaultSpec};
    use super::super::walls::WallChoice;
    use super::*;

    /// A room 5 wide, 4 deep and 3 high.
    fn room(ceiling: Ceiling) -> RoomSpec {
        RoomSpec {
            label: None,
            layer: None,
            at: Anchor::Corner(Finite(0.0), Finite(0.0)),
            width: Positive(5.0),
            depth: Positive(4.0),
            height: Positive(3.0),
            facing: default_facing(),
            base: zero(),
            on_ground: false,
            plinth: None,
            ceiling,
            openings: Vec::new(),
            round_windows: Vec::new(),
            storeys: Vec::new(),
        }
    }

    /// One opening in the middle of a wall.
    fn opening(wall: WallChoice, width: f64, height: f64, sill: f64, reveal: f64) -> OpeningsSpec {
        OpeningsSpec {
            wall,
            count: None,
            spacing: None,
            width: Positive(width),
            height: Positive(height),
            sill: Some(NonNegative(sill)),
            margin: None,
            rows: Count(1),
            row_step: None,
            reveal: Some(NonNegative(reveal)),
            head: Default::default(),
            surround: None,
            sill_projection: None,
        }
    }

    fn build(spec: &RoomSpec) -> Result<Site, String> {
        built("room", |b| build_room(b, spec))
    }

    #[test]
    fn flat_room_is_a_closed_box() {
        let site = build(&room(Ceiling::Flat)).unwrap();
        // Floor outline 4, corners 4, ceiling outline 4; six rectangles, two triangles each.
        assert_eq!(edge_counts(&site), (12, 0));
        assert_eq!(site.faces.len(), 12);
        assert_eq!(unpaired_sides(&site), 0);
        let box_ = bounds(&edge_points(&site));
        assert_bounds(box_, [0.0, 0.0, 0.0], [5.0, 4.0, 3.0], 1e-9);
        assert_faces_within(&site, box_, 1e-9);
    }

    #[test]
    fn vaulted_room_is_the_vault_springing_at_its_height() {
        let rise = Some(Positive(1.5));
        let bays = Some(Count(2));
        let site = build(&room(Ceiling::Vault { rise, bays })).unwrap();
        let vault = VaultSpec {
            label: None,
            layer: None,
            at: Anchor::Corner(Finite(0.0), Finite(0.0)),
            width: Positive(5.0),
            depth: Positive(4.0),
            facing: default_facing(),
            base: zero(),
            on_ground: false,
            plinth: None,
            springing: Positive(3.0),
            rise,
            bays,
        };
        let same = built("vault", |b| build_vault(b, &vault)).unwrap();
        assert_eq!(site.edges, same.edges);
        assert_eq!(site.faces, same.faces);
        // Floor 4, corners 4, springing lines 2; end arcs 2 and one rib.
        assert_eq!(edge_counts(&site), (10, 3));
        assert_eq!(unpaired_sides(&site), 0);
    }

    #[test]
    fn window_goes_through_the_wall_outwards() {
        let mut spec = room(Ceiling::Flat);
        spec.openings = vec![opening(WallChoice::Front, 1.0, 1.2, 1.0, 0.3)];
        let site = build(&spec).unwrap();
        // The box's 12, and the window's: its outline on the inner face, on the outer face,
        // and the four lines between.
        assert_eq!(edge_counts(&site), (24, 0));
        // The front wall with a hole: 8 corners and a hole, 8 triangles (earcut bridges the
        // hole, 8 + 2 corners less 2). The reveal: 4 rectangles, 8 triangles. The other
        // five sides of the box: 10. 8 + 8 + 10 = 26.
        assert_eq!(site.faces.len(), 26);
        // The front wall is at y = 0 and the room behind it: outwards is -y.
        let box_ = bounds(&edge_points(&site));
        assert_bounds(box_, [0.0, -0.3, 0.0], [5.0, 4.0, 3.0], 1e-9);
        assert_faces_within(&site, box_, 1e-9);
        // Open to the outside only round the outer edge of the reveal.
        assert_eq!(unpaired_sides(&site), 4);
    }

    #[test]
    fn openings_fit_under_the_vault_not_just_the_springing() {
        // Under a half circle springing at 3 over a width of 5, a window 1 wide in the
        // middle of the front wall may reach nearly to 3 + sqrt(2.5^2 - 0.5^2) = 5.449.
        let mut spec = room(Ceiling::Vault {
            rise: None,
            bays: None,
        });
        spec.openings = vec![opening(WallChoice::Front, 1.0, 3.0, 2.0, 0.4)];
        assert!(build(&spec).is_ok());
        spec.openings = vec![opening(WallChoice::Back, 1.0, 3.5, 2.0, 0.4)];
        let error = build(&spec).unwrap_err();
        assert!(error.contains("does not fit"), "{error}");
        // The side walls stop at the springing.
        spec.openings = vec![opening(WallChoice::Left, 1.0, 1.5, 2.0, 0.4)];
        assert!(build(&spec).is_err());
    }

    #[test]
    fn storey_lines_go_round_the_walls_below_the_ceiling() {
        let mut spec = room(Ceiling::Flat);
        spec.storeys = vec![Positive(1.5)];
        let site = build(&spec).unwrap();
        assert_eq!(edge_counts(&site), (16, 0));
        spec.storeys = vec![Positive(3.0)];
        assert!(build(&spec).is_err());
    }

    #[test]
    fn walls_are_named_from_the_front() {
        let mut spec = room(Ceiling::Flat);
        spec.openings = vec![opening(WallChoice::Right, 1.0, 1.2, 1.0, 0.3)];
        let site = build(&spec).unwrap();
        // The right wall is at x = 5; its reveal reaches out to x = 5.3.
        let box_ = bounds(&edge_points(&site));
        assert_bounds(box_, [0.0, 0.0, 0.0], [5.3, 4.0, 3.0], 1e-9);
        spec.openings = vec![opening(WallChoice::Side(SideNumber(5)), 1.0, 1.2, 1.0, 0.3)];
        assert!(build(&spec).is_err());
    }
}
