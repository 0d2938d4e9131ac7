//! Which stretches of an edge the eye sees: sampled along the edge about a pixel apart, and
//! each change between seen and hidden found by bisection to a small fraction of a pixel.

use super::bvh::Bvh;
use crate::scene::Face;
use crate::sphere::{SphereCurve, ViewFrame};
use nalgebra::{Point3, Vector3};

/// A point is hidden only by a face nearer than its distance shortened by this fraction:
/// the depth bias, relative to distance so that it means the same near and far, and small
/// enough that a wall a few centimetres thick hides what is behind it from a hundred metres.
pub const DEPTH_BIAS: f64 = 2e-4;

/// Stretches of an edge, as parameter ranges of its curve on the sphere, in order; each
/// seen or hidden.
pub type Spans = Vec<(f64, f64, bool)>;

/// Everything that hides, from one eye.
pub struct Occluders<'a> {
    pub faces: &'a [Face],
    pub bvh: &'a Bvh,
    pub view: &'a ViewFrame,
    pub eye: Point3<f64>,
}

/// How far from the eye the edge is at each parameter of its curve on the sphere.
#[derive(Clone, Copy, Debug)]
pub enum Depth {
    /// An ellipse: the curve's points are the edge's points relative to the eye.
    Curve,
    /// A segment from `a` to `b` (relative to the eye, view frame): its great arc holds only
    /// directions, and the point along direction d is at |a x b| / |d x (b - a)| (the ray
    /// meets the segment's line within their common plane).
    Segment { a: Vector3<f64>, b: Vector3<f64> },
}

impl Depth {
    fn at(&self, curve: &SphereCurve, t: f64, direction: &Vector3<f64>) -> f64 {
        match self {
            Depth::Curve => curve.position(t).norm(),
            Depth::Segment { a, b } => {
                a.cross(b).norm() / direction.cross(&(b - a)).norm().max(f64::MIN_POSITIVE)
            }
        }
    }
}

impl Occluders<'_> {
    /// Whether the point of the edge at `t` is seen.
    fn sees(&self, curve: &SphereCurve, depth: &Depth, t: f64) -> bool {
        let Some(direction) = curve.position(t).try_normalize(0.0) else {
            return true;
        };
        let distance = depth.at(curve, t, &direction);
        let limit = distance * (1.0 - DEPTH_BIAS);
        let towards = self.view.direction_to_site(&direction);
        !self
            .bvh
            .any_hit(self.faces, &self.eye, &towards, limit, |face, hit| {
                // A facet of a curved surface may stand up to its slack in front of the true
                // surface that edges are drawn on, more so for rays that graze it.
                if face.slack == 0.0 {
                    return true;
                }
                let [p, q, r] = face.corners;
                let normal = (q - p).cross(&(r - p));
                let cosine = (normal.dot(&towards) / normal.norm()).abs().max(0.05);
                hit < limit - face.slack as f64 / cosine
            })
    }

    /// The stretches of the edge seen and hidden. `step` is the angle (radians) between
    /// samples; changes between samples are located to within `precision` radians.
    pub fn spans(&self, curve: &SphereCurve, depth: &Depth, step: f64, precision: f64) -> Spans {
        let mut spans: Spans = Vec::new();
        let mut t = curve.t0;
        let mut seen = self.sees(curve, depth, t);
        let mut start = t;
        while t < curve.t1 {
            let next = (t + parameter_step(curve, t, step)).min(curve.t1);
            let next_seen = self.sees(curve, depth, next);
            if next_seen != seen {
                let change = self.bisect(curve, depth, t, next, seen, precision);
                spans.push((start, change, seen));
                start = change;
                seen = next_seen;
            }
            t = next;
        }
        spans.push((start, curve.t1, seen));
        spans
    }

    /// The parameter between `a` (seen as `seen_at_a`) and `b` (the other) where the edge
    /// goes in or out of sight.
    fn bisect(
        &self,
        curve: &SphereCurve,
        depth: &Depth,
        mut a: f64,
        mut b: f64,
        seen_at_a: bool,
        precision: f64,
    ) -> f64 {
        for _ in 0..60 {
            if angular_speed(curve, a) * (b - a) <= precision {
                break;
            }
            let middle = 0.5 * (a + b);
            if self.sees(curve, depth, middle) == seen_at_a {
                a = middle;
            } else {
                b = middle;
            }
        }
        0.5 * (a + b)
    }
}

/// How fast the direction P(t) / |P(t)| turns, radians per unit of t: the part of P'
/// across the line of sight over |P|. A great arc turns at 1.
fn angular_speed(curve: &SphereCurve, t: f64) -> f64 {
    if curve.is_great_circle() {
        return 1.0;
    }
    let p = curve.position(t);
    let length = p.norm().max(f64::MIN_POSITIVE);
    let along = p / length;
    let velocity = curve.velocity(t);
    (velocity - along * velocity.dot(&along)).norm() / length
}

/// The parameter step that turns the direction by about `angle`, at most a tenth of a
/// radian of parameter (so no feature of an ellipse is stepped over).
fn parameter_step(curve: &SphereCurve, t: f64, angle: f64) -> f64 {
    (angle / angular_speed(curve, t).max(1e-12)).clamp(1e-9, 0.1)
}
