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

impl SiteCurve {
    /// Whether every number of the curve is finite (an item's arithmetic gave no NaN or
    /// infinity).
    pub fn is_finite(&self) -> bool {
        match self {
            SiteCurve::Segment { start, end } => {
                start.iter().chain(end.iter()).all(|x| x.is_finite())
            }
            SiteCurve::Ellipse {
                centre,
                u,
                v,
                start,
                sweep,
            } => {
                let numbers = centre.iter().chain(u.iter()).chain(v.iter());
                numbers.chain([start, sweep]).all(|x| x.is_finite())
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_curve_is_finite_only_when_every_number_is() {
        let p = Point3::new(1.0, 2.0, 3.0);
        let segment = |end: Point3<f64>| SiteCurve::Segment { start: p, end };
        assert!(segment(Point3::origin()).is_finite());
        assert!(!segment(Point3::new(0.0, f64::NAN, 0.0)).is_finite());
        assert!(!segment(Point3::new(0.0, 0.0, f64::INFINITY)).is_finite());
        let ellipse = |u: f64, sweep: f64| SiteCurve::Ellipse {
            centre: p,
            u: Vector3::new(u, 0.0, 0.0),
            v: Vector3::y(),
            start: 0.0,
            sweep,
        };
        assert!(ellipse(1.0, 1.0).is_finite());
        assert!(!ellipse(f64::NAN, 1.0).is_finite());
        assert!(!ellipse(1.0, f64::NEG_INFINITY).is_finite());
    }
}
