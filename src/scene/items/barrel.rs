//! The geometry of a barrel vault, shared by the `Vault` item and a `Room` with a vaulted
//! ceiling.

use super::super::build::{ellipse_points, facet_count, ItemBuilder};
use super::super::numbers::{Count, Positive};
use nalgebra::{Point3, Vector3};
use std::f64::consts::PI;

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
