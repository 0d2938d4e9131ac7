//! `Vault`: a barrel vault over a rectangle, its axis running from front to back.

use super::super::build::{ellipse_points, facet_count, ItemBuilder};
use super::super::numbers::{default_facing, zero, Count, Finite, Positive};
use super::block::{rectangle_frame, Anchor};
use super::room::{build_interior, vault_room};
use nalgebra::{Point3, Vector3};
use serde::Deserialize;
use std::f64::consts::PI;

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

/// A barrel vault over the rectangle from (0, 0) to (`width`, `depth`) in a block's local
/// frame: springing lines at `springing` along the sides x = 0 and x = width, and a half
/// circle or half ellipse across, its axis along y.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BarrelVault {
    pub width: f64,
    pub depth: f64,
    pub springing: f64,
    /// Height of the crown above the springing.
    pub rise: f64,
    /// Bays along the axis, a transverse rib between each two.
    pub bays: u32,
}

impl BarrelVault {
    /// A vault rising half its width (a half circle) unless told otherwise, in one bay
    /// unless told otherwise.
    pub fn new(
        width: f64,
        depth: f64,
        springing: f64,
        rise: Option<Positive>,
        bays: Option<Count>,
    ) -> BarrelVault {
        BarrelVault {
            width,
            depth,
            springing,
            rise: rise.map_or(width / 2.0, |r| r.0),
            bays: bays.map_or(1, |n| n.0),
        }
    }

    /// The section's centre at `y`, and its half-axes across and up: the section is
    /// `centre + across cos t + up sin t` for t from 0 (at x = width) to pi (at x = 0).
    fn section_axes(&self, y: f64) -> (Point3<f64>, Vector3<f64>, Vector3<f64>) {
        (
            Point3::new(self.width / 2.0, y, self.springing),
            Vector3::x() * (self.width / 2.0),
            Vector3::z() * self.rise,
        )
    }

    /// Corners along the section at `y`, from the springing at x = 0 over the crown to the
    /// springing at x = width: where the flat pieces of the curved faces meet. The
    /// springings are put exactly on the springing lines so that the walls' faces share
    /// them.
    pub fn section(&self, y: f64) -> Vec<Point3<f64>> {
        let (centre, across, up) = self.section_axes(y);
        let count = facet_count(PI);
        let mut points = ellipse_points(centre, across, up, PI, -PI, count);
        points[0] = Point3::new(0.0, y, self.springing);
        points[count] = Point3::new(self.width, y, self.springing);
        points
    }

    /// The top of the end wall under the front arch, as (distance from x = 0, height): the
    /// section's corners, so that the end wall's face meets the vault's along them.
    pub fn end_wall_top(&self) -> Vec<(f64, f64)> {
        self.section(0.0).iter().map(|p| (p.x, p.z)).collect()
    }

    /// The springing lines, the end arcs, the ribs between the bays, and the curved faces.
    pub fn build(&self, b: &mut ItemBuilder) {
        let (width, depth, springing) = (self.width, self.depth, self.springing);
        for x in [0.0, width] {
            b.segment(
                Point3::new(x, 0.0, springing),
                Point3::new(x, depth, springing),
            );
        }
        // The arcs at k = 0 and k = bays are the ends; those between are the ribs.
        for k in 0..=self.bays {
            let (centre, across, up) = self.section_axes(depth * k as f64 / self.bays as f64);
            b.ellipse(centre, across, up, 0.0, PI);
        }
        // A cylinder: each flat piece runs the whole length, so the ribs need no corners.
        b.strip(&self.section(0.0), &self.section(depth));
    }
}

/// Draws the vault over an open room whose walls stand from the floor to the springing:
/// seen from inside, the floor's outline, the corners, the springing lines, the end arcs
/// and the ribs.
pub fn build_vault(b: &mut ItemBuilder, spec: &VaultSpec) -> Result<(), String> {
    let (width, depth) = (spec.width.0, spec.depth.0);
    let (corner, turn) = rectangle_frame(spec.at, width, depth, spec.facing.0);
    b.move_by(Vector3::new(corner.x, corner.y, spec.base.0), turn);
    let vault = BarrelVault::new(width, depth, spec.springing.0, spec.rise, spec.bays);
    build_interior(b, &vault_room(vault), &[], &[])
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
            .filter_map(|e| match e.curve {
                SiteCurve::Ellipse { centre, .. } => Some(centre.y),
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
