//! The curves an item is drawn with, in site coordinates.

use nalgebra::{Point3, Vector3};

/// A drawable edge in site coordinates.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum SiteCurve {
    /// A straight edge.
    Segment {
        /// One end.
        start: Point3<f64>,
        /// The other end.
        end: Point3<f64>,
    },
    /// `centre + u cos t + v sin t` for `t` from `start` through `sweep` (radians): circles
    /// and ellipses of arches, columns and domes.
    Ellipse {
        /// The centre.
        centre: Point3<f64>,
        /// The semi-axis at `t = 0`.
        u: Vector3<f64>,
        /// The semi-axis at `t = pi / 2` (perpendicular to `u` for a true ellipse).
        v: Vector3<f64>,
        /// Where the arc starts, radians.
        start: f64,
        /// How far it runs, radians (negative runs backwards).
        sweep: f64,
    },
}
