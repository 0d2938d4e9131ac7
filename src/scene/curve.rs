//! The curves an item is drawn with, in site coordinates.
//!
//! A curve here is a value to work with; the site keeps its edges smaller (see
//! [`super::Edges`]).

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
    /// An elliptic arc: circles and ellipses of arches, columns and domes.
    Ellipse(EllipseArc),
}

/// `centre + u cos t + v sin t` for `t` from `start` through `sweep` (radians): the numbers
/// of a [`SiteCurve::Ellipse`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EllipseArc {
    /// The centre.
    pub centre: Point3<f64>,
    /// The semi-axis at `t = 0`.
    pub u: Vector3<f64>,
    /// The semi-axis at `t = pi / 2` (perpendicular to `u` for a true ellipse).
    pub v: Vector3<f64>,
    /// Where the arc starts, radians.
    pub start: f64,
    /// How far it runs, radians (negative runs backwards).
    pub sweep: f64,
}

impl EllipseArc {
    /// The point at angle `t` (radians).
    pub fn at(&self, t: f64) -> Point3<f64> {
        self.centre + self.u * t.cos() + self.v * t.sin()
    }

    /// The point a `fraction` of the way along the arc, from its start (0) to its end (1).
    pub fn along(&self, fraction: f64) -> Point3<f64> {
        self.at(self.start + self.sweep * fraction)
    }
}

impl From<EllipseArc> for SiteCurve {
    fn from(arc: EllipseArc) -> Self {
        SiteCurve::Ellipse(arc)
    }
}

impl SiteCurve {
    /// Whether every number of the curve is finite (an item's arithmetic gave no NaN or
    /// infinity).
    pub fn is_finite(&self) -> bool {
        match self {
            SiteCurve::Segment { start, end } => {
                start.iter().chain(end.iter()).all(|x| x.is_finite())
            }
            SiteCurve::Ellipse(arc) => {
                let EllipseArc {
                    centre,
                    u,
                    v,
                    start,
                    sweep,
                } = arc;
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
    fn an_arc_runs_from_its_start_through_its_sweep() {
        // A half circle of radius 2 about (1, 2, 3), from the top (+y) anticlockwise
        // round to the bottom: worked by hand from centre + u cos t + v sin t.
        let arc = EllipseArc {
            centre: Point3::new(1.0, 2.0, 3.0),
            u: Vector3::new(2.0, 0.0, 0.0),
            v: Vector3::new(0.0, 2.0, 0.0),
            start: std::f64::consts::FRAC_PI_2,
            sweep: std::f64::consts::PI,
        };
        let near = |p: Point3<f64>, x: f64, y: f64| (p - Point3::new(x, y, 3.0)).norm() < 1e-12;
        assert!(near(arc.along(0.0), 1.0, 4.0));
        assert!(near(arc.along(0.5), -1.0, 2.0));
        assert!(near(arc.along(1.0), 1.0, 0.0));
        assert!(near(arc.at(0.0), 3.0, 2.0));
    }

    #[test]
    fn a_curve_is_finite_only_when_every_number_is() {
        let p = Point3::new(1.0, 2.0, 3.0);
        let segment = |end: Point3<f64>| SiteCurve::Segment { start: p, end };
        assert!(segment(Point3::origin()).is_finite());
        assert!(!segment(Point3::new(0.0, f64::NAN, 0.0)).is_finite());
        assert!(!segment(Point3::new(0.0, 0.0, f64::INFINITY)).is_finite());
        let ellipse = |u: f64, sweep: f64| {
            SiteCurve::from(EllipseArc {
                centre: p,
                u: Vector3::new(u, 0.0, 0.0),
                v: Vector3::y(),
                start: 0.0,
                sweep,
            })
        };
        assert!(ellipse(1.0, 1.0).is_finite());
        assert!(!ellipse(f64::NAN, 1.0).is_finite());
        assert!(!ellipse(1.0, f64::NEG_INFINITY).is_finite());
    }
}
