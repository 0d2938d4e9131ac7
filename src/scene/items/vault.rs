//! `Vault`: a barrel vault over a rectangle, its axis running from front to back.

use super::super::build::ItemBuilder;
use super::super::numbers::{default_facing, zero, Count, Finite, Positive};
use super::barrel::BarrelVault;
use super::block::{stand_rectangle, Anchor};
use super::room::{build_interior, vault_room};
use super::standing::PlinthSpec;
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
    /// Stands on the scene's ground, as a block does: `base` is then measured from the
    /// lowest ground along its walls, and the line where they meet the ground is drawn.
    #[serde(default)]
    pub on_ground: bool,
    /// With `on_ground`: a level floor at the highest ground under it, on a plinth (as a
    /// block's), so that no ground rises inside.
    #[serde(default)]
    pub plinth: Option<PlinthSpec>,
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

/// Draws the vault over an open room whose walls stand from the floor to the springing:
/// seen from inside, the floor's outline, the corners, the springing lines, the end arcs
/// and the ribs.
pub fn build_vault(b: &mut ItemBuilder, spec: &VaultSpec) -> Result<(), String> {
    let (width, depth) = (spec.width.0, spec.depth.0);
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
    let vault = BarrelVault::new(width, depth, spec.springing.0, spec.rise, spec.bays);
    build_interior(b, &vault_room(vault), &[], &[], &[])
}

#[cfg(test)]
mod tests {
    use super::super::super::site::{Site, SiteCurve};
    use super::super::checks::{
        assert_bounds, assert_faces_within, bounds, built, edge_counts, edge_points, unpaired_sides,
    };
    use super::*;

    /// A vault 4 wide and 6 long springing at 3.
    fn vault(rise: Option<f64>, bays: Option<u32>) -> VaultSpec {
        VaultSpec {
            label: None,
            layer: None,
            at: Anchor::Corner(Finite(0.0), Finite(0.0)),
            width: Positive(4.0),
            depth: Positive(6.0),
            facing: default_facing(),
            base: zero(),
            on_ground: false,
            plinth: None,
            springing: Positive(3.0),
            rise: rise.map(Positive),
            bays: bays.map(Count),
        }
    }

    fn build(spec: &VaultSpec) -> Site {
        built("vault", |b| build_vault(b, spec)).unwrap()
    }

    #[test]
    fn vault_edges_and_faces_counted_by_hand() {
        let site = build(&vault(None, Some(3)));
        // Floor outline 4, corners 4, springing lines 2; the two end arcs and 2 ribs.
        assert_eq!(edge_counts(&site), (10, 4));
        // Floor and side walls: 3 rectangles, 6 triangles. Each end wall: its two floor
        // corners and the 49 corners of the half ellipse, 51 corners, 49 triangles. The
        // curved surface: 48 quads, 96 triangles. 6 + 98 + 96 = 200.
        assert_eq!(site.faces.len(), 200);
        assert_eq!(unpaired_sides(&site), 0);
    }

    #[test]
    fn ribs_divide_the_vault_into_equal_bays() {
        let site = build(&vault(None, Some(3)));
        let mut along: Vec<f64> = site
            .edges
            .iter()
            .filter_map(|e| match &e.curve {
                SiteCurve::Ellipse(arc) => Some(arc.centre.y),
                SiteCurve::Segment { .. } => None,
            })
            .collect();
        along.sort_by(f64::total_cmp);
        for (y, expected) in along.iter().zip([0.0, 2.0, 4.0, 6.0]) {
            assert!((y - expected).abs() < 1e-9, "{along:?}");
        }
        // One bay, or none said: the end arcs alone.
        assert_eq!(edge_counts(&build(&vault(None, Some(1)))).1, 2);
        assert_eq!(edge_counts(&build(&vault(None, None))).1, 2);
    }

    #[test]
    fn half_circle_by_default_half_ellipse_when_told() {
        for (rise, crown) in [(None, 5.0), (Some(1.2), 4.2)] {
            let site = build(&vault(rise, None));
            let box_ = bounds(&edge_points(&site));
            assert_bounds(box_, [0.0, 0.0, 0.0], [4.0, 6.0, crown], 1e-6);
            assert_faces_within(&site, box_, 1e-9);
            assert_eq!(unpaired_sides(&site), 0);
        }
    }

    #[test]
    fn vault_is_placed_like_a_block() {
        // Facing east, centred on (10, 20): the width runs north, the axis west.
        let mut spec = vault(None, None);
        spec.at = Anchor::Centre(Finite(10.0), Finite(20.0));
        spec.facing = Finite(90.0);
        spec.base = Finite(1.0);
        let site = build(&spec);
        let box_ = bounds(&edge_points(&site));
        assert_bounds(box_, [7.0, 18.0, 1.0], [13.0, 22.0, 6.0], 1e-6);
        assert_faces_within(&site, box_, 1e-9);
    }
}
