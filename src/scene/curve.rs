//! The curves an item is drawn with, in site coordinates.

use nalgebra::{Point3, Vector3};

/// A drawable edge in site coordinates.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum SiteCurve {
    Segment {
        start: Point3<f64>,
        end: Point3<f64>,
    },
    /// `centre + u cos t + v sin t` for `t` from `start` through `sweep` (radians): circles
    /// and ellipses of arches, columns and domes.
    Ellipse {
        centre: Point3<f64>,
        u: Vector3<f64>,
        v: Vector3<f64>,
        start: f64,
        sweep: f64,
    },
}
