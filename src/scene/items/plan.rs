//! Plan geometry (x east, y north): the small pure functions the items share.

use nalgebra::Vector2;

/// Twice the signed area of a polygon (the shoelace formula); positive when its corners run
/// counter-clockwise seen from above.
pub fn twice_signed_area(points: &[Vector2<f64>]) -> f64 {
    (0..points.len())
        .map(|i| {
            let (p, q) = (points[i], points[(i + 1) % points.len()]);
            p.x * q.y - q.x * p.y
        })
        .sum()
}

/// Whether segments `a0 a1` and `b0 b1` share any point (touching counts), by the signs of
/// the orientation tests (Cormen, Leiserson, Rivest and Stein, "Introduction to
/// Algorithms", section 33.1, from memory).
pub fn segments_meet(
    a0: Vector2<f64>,
    a1: Vector2<f64>,
    b0: Vector2<f64>,
    b1: Vector2<f64>,
) -> bool {
    let orient = |p: Vector2<f64>, q: Vector2<f64>, r: Vector2<f64>| {
        let cross = (q - p).perp(&(r - p));
        if cross > 0.0 {
            1
        } else if cross < 0.0 {
            -1
        } else {
            0
        }
    };
    let on_segment = |p: Vector2<f64>, q: Vector2<f64>, r: Vector2<f64>| {
        r.x >= p.x.min(q.x) && r.x <= p.x.max(q.x) && r.y >= p.y.min(q.y) && r.y <= p.y.max(q.y)
    };
    let (d1, d2) = (orient(b0, b1, a0), orient(b0, b1, a1));
    let (d3, d4) = (orient(a0, a1, b0), orient(a0, a1, b1));
    if d1 * d2 < 0 && d3 * d4 < 0 {
        return true;
    }
    (d1 == 0 && on_segment(b0, b1, a0))
        || (d2 == 0 && on_segment(b0, b1, a1))
        || (d3 == 0 && on_segment(a0, a1, b0))
        || (d4 == 0 && on_segment(a0, a1, b1))
}

/// Why a polygon cannot be a plan outline, if it cannot: fewer than three distinct corners,
/// no area, or sides that cross or touch (other than neighbours at their shared corner).
pub fn simple_polygon_problem(points: &[Vector2<f64>]) -> Option<String> {
    let n = points.len();
    if n < 3 {
        return Some(format!("expected at least three corners, found {n}"));
    }
    for i in 0..n {
        if points[i] == points[(i + 1) % n] {
            return Some(format!(
                "corners {} and {} are the same point",
                i + 1,
                (i + 1) % n + 1
            ));
        }
    }
    for i in 0..n {
        for j in i + 1..n {
            let neighbours = j == i + 1 || (i == 0 && j == n - 1);
            if neighbours {
                continue;
            }
            let (a0, a1) = (points[i], points[(i + 1) % n]);
            let (b0, b1) = (points[j], points[(j + 1) % n]);
            if segments_meet(a0, a1, b0, b1) {
                return Some(format!(
                    "side {} (corners {} to {}) crosses side {} (corners {} to {}): \
                     the outline must not cross itself",
                    i + 1,
                    i + 1,
                    (i + 1) % n + 1,
                    j + 1,
                    j + 1,
                    (j + 1) % n + 1
                ));
            }
        }
    }
    if twice_signed_area(points).abs() <= 1e-12 * bounding_size(points).powi(2) {
        return Some("the outline encloses no area".to_owned());
    }
    None
}

fn bounding_size(points: &[Vector2<f64>]) -> f64 {
    let (mut lo, mut hi) = (points[0], points[0]);
    for p in points {
        lo = lo.inf(p);
        hi = hi.sup(p);
    }
    (hi - lo).max()
}

/// Whether a counter-clockwise polygon is convex (no corner turns right).
pub fn is_convex(points: &[Vector2<f64>]) -> bool {
    let n = points.len();
    (0..n).all(|i| {
        let (p, q, r) = (points[i], points[(i + 1) % n], points[(i + 2) % n]);
        (q - p).perp(&(r - q)) >= 0.0
    })
}

/// The part of a polygon where `keep(p) >= 0`, for an affine `keep` (one step of
/// Sutherland and Hodgman, "Reentrant polygon clipping", CACM 17(1), 1974).
pub fn clip_polygon(
    points: &[Vector2<f64>],
    keep: impl Fn(Vector2<f64>) -> f64,
) -> Vec<Vector2<f64>> {
    let mut out = Vec::with_capacity(points.len() + 1);
    for i in 0..points.len() {
        let (p, q) = (points[i], points[(i + 1) % points.len()]);
        let (kp, kq) = (keep(p), keep(q));
        if kp >= 0.0 {
            out.push(p);
        }
        if (kp >= 0.0) != (kq >= 0.0) {
            out.push(p + (q - p) * (kp / (kp - kq)));
        }
    }
    out
}

/// The left-hand normal of a direction (a quarter turn counter-clockwise seen from above).
pub fn left_of(direction: Vector2<f64>) -> Vector2<f64> {
    Vector2::new(-direction.y, direction.x)
}

/// The signed angle (radians, in (-pi, pi]) a path turns through at `corner` on its way
/// from `before` to `after`: positive for a left turn (counter-clockwise seen from above).
pub fn turn_angle(before: Vector2<f64>, corner: Vector2<f64>, after: Vector2<f64>) -> f64 {
    let (incoming, outgoing) = (corner - before, after - corner);
    incoming.perp(&outgoing).atan2(incoming.dot(&outgoing))
}

/// Whether a turn is so small that the path goes straight on (no fillet, no mitre).
pub fn is_straight_on(turn: f64) -> bool {
    turn.abs() <= 1e-12
}

/// A piece of a plan path: a straight line or an arc of a circle.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum PathPiece {
    Line {
        start: Vector2<f64>,
        end: Vector2<f64>,
    },
    /// The points `centre + radius (cos t, sin t)` for t from `start_angle` through
    /// `sweep` (radians counter-clockwise from east; a negative sweep runs clockwise).
    Arc {
        centre: Vector2<f64>,
        radius: f64,
        start_angle: f64,
        sweep: f64,
    },
}

impl PathPiece {
    pub fn length(&self) -> f64 {
        match *self {
            PathPiece::Line { start, end } => (end - start).norm(),
            PathPiece::Arc { radius, sweep, .. } => radius * sweep.abs(),
        }
    }

    /// The point `distance` along the piece from its start.
    pub fn point_at(&self, distance: f64) -> Vector2<f64> {
        match *self {
            PathPiece::Line { start, end } => {
                let length = (end - start).norm();
                start + (end - start) * (distance / length)
            }
            PathPiece::Arc {
                centre,
                radius,
                start_angle,
                sweep,
            } => {
                let (sin, cos) = (start_angle + sweep.signum() * distance / radius).sin_cos();
                centre + Vector2::new(cos, sin) * radius
            }
        }
    }

    /// The part of the piece from `from` to `to` along it (an arc stays an exact arc).
    pub fn part(&self, from: f64, to: f64) -> PathPiece {
        match *self {
            PathPiece::Line { .. } => PathPiece::Line {
                start: self.point_at(from),
                end: self.point_at(to),
            },
            PathPiece::Arc {
                centre,
                radius,
                start_angle,
                sweep,
            } => PathPiece::Arc {
                centre,
                radius,
                start_angle: start_angle + sweep.signum() * from / radius,
                sweep: sweep.signum() * (to - from) / radius,
            },
        }
    }
}

/// A circular arc rounding the corner between two straight segments, tangent to both.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Fillet {
    /// Where the arc leaves the incoming segment.
    pub start: Vector2<f64>,
    /// Where it joins the outgoing segment.
    pub end: Vector2<f64>,
    pub centre: Vector2<f64>,
    pub radius: f64,
    /// The direction of `start` from the centre, radians counter-clockwise from east.
    pub start_angle: f64,
    /// The turn: positive (counter-clockwise) for a left-hand corner.
    pub sweep: f64,
    /// The distance from the corner back to `start` and on to `end`.
    pub tangent_length: f64,
}

impl Fillet {
    /// The arc that rounds the corner at `corner` between the segments from `before` and
    /// to `after` with a circle of `radius`; `None` where the path goes straight on, or
    /// turns right back on itself (no circle is tangent to both).
    ///
    /// The tangent length is r tan(theta / 2) for a turn of theta, and the centre lies r
    /// from the first tangent point on the inside of the turn: standard highway circular
    /// curve geometry (common practice).
    pub fn round(
        before: Vector2<f64>,
        corner: Vector2<f64>,
        after: Vector2<f64>,
        radius: f64,
    ) -> Option<Fillet> {
        let turn = turn_angle(before, corner, after);
        if is_straight_on(turn) || turn.abs() >= std::f64::consts::PI {
            return None;
        }
        let incoming = (corner - before).normalize();
        let outgoing = (after - corner).normalize();
        let tangent_length = radius * (turn.abs() / 2.0).tan();
        let start = corner - incoming * tangent_length;
        let centre = start + left_of(incoming) * (radius * turn.signum());
        let from_centre = start - centre;
        Some(Fillet {
            start,
            end: corner + outgoing * tangent_length,
            centre,
            radius,
            start_angle: from_centre.y.atan2(from_centre.x),
            sweep: turn,
            tangent_length,
        })
    }

    /// The concentric arc of the line `offset` to the left of the path (negative: to the
    /// right), or `None` where that line is on the inside of the turn and its radius,
    /// r - offset for a left turn, r + offset for a right one, is not positive.
    pub fn concentric(&self, offset: f64) -> Option<Fillet> {
        let radius = self.radius - offset * self.sweep.signum();
        if radius <= 0.0 {
            return None;
        }
        let scale = radius / self.radius;
        Some(Fillet {
            start: self.centre + (self.start - self.centre) * scale,
            end: self.centre + (self.end - self.centre) * scale,
            radius,
            tangent_length: self.tangent_length * scale,
            ..*self
        })
    }

    pub fn arc(&self) -> PathPiece {
        PathPiece::Arc {
            centre: self.centre,
            radius: self.radius,
            start_angle: self.start_angle,
            sweep: self.sweep,
        }
    }
}

/// Where the lines `offset` to the left (negative: right) of the segments meeting at
/// `corner` cross: the sharp, mitred corner of the offset path. Straight on, the corner
/// just moves sideways. The turn must not be a full reversal.
pub fn mitre_point(
    before: Vector2<f64>,
    corner: Vector2<f64>,
    after: Vector2<f64>,
    offset: f64,
) -> Vector2<f64> {
    let incoming = (corner - before).normalize();
    let turn = turn_angle(before, corner, after);
    // The two offset lines meet on the bisector of the corner: from the corner, `offset`
    // along the incoming line's normal, then back along it by offset tan(theta / 2) (the
    // right triangle between the corner, the mitre point and the foot of the normal).
    corner + left_of(incoming) * offset - incoming * (offset * (turn / 2.0).tan())
}

/// The polyline `offset` to the left (negative: right) of `points`: its ends moved square
/// to the end segments, its corners mitred. Consecutive points must differ and no corner
/// may turn right back on itself.
pub fn offset_polyline(points: &[Vector2<f64>], offset: f64) -> Vec<Vector2<f64>> {
    let n = points.len();
    (0..n)
        .map(|i| {
            if i == 0 {
                points[0] + left_of((points[1] - points[0]).normalize()) * offset
            } else if i == n - 1 {
                points[i] + left_of((points[i] - points[i - 1]).normalize()) * offset
            } else {
                mitre_point(points[i - 1], points[i], points[i + 1], offset)
            }
        })
        .collect()
}

/// Where the dashes of a dashed line fall along a path made of pieces of the given
/// lengths: (piece index, from, to), distances along that piece. The pattern starts with a
/// whole dash at the start of the path and runs on from piece to piece, so a dash that
/// reaches past the end of a piece goes on into the next.
pub fn dash_spans(lengths: &[f64], dash: f64, gap: f64) -> Vec<(usize, f64, f64)> {
    let period = dash + gap;
    // Shorter than this, a part of a dash cut off by the end of a piece is rounding noise.
    let sliver = 1e-9 * period;
    let mut spans = Vec::new();
    let mut piece_start = 0.0;
    for (index, &length) in lengths.iter().enumerate() {
        let piece_end = piece_start + length;
        // Counting whole periods from the start of the path keeps the dashes from drifting
        // as rounding errors would add up over many pieces.
        let mut count = (piece_start / period).floor();
        while count * period < piece_end {
            let from = (count * period).max(piece_start);
            let to = (count * period + dash).min(piece_end);
            if to - from > sliver {
                spans.push((index, from - piece_start, to - piece_start));
            }
            count += 1.0;
        }
        piece_start = piece_end;
    }
    spans
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::{FRAC_PI_2, PI, TAU};

    fn v(x: f64, y: f64) -> Vector2<f64> {
        Vector2::new(x, y)
    }

    #[test]
    fn shoelace_area_of_a_unit_square() {
        let square = [v(0.0, 0.0), v(1.0, 0.0), v(1.0, 1.0), v(0.0, 1.0)];
        assert_eq!(twice_signed_area(&square), 2.0);
        assert!(is_convex(&square));
        assert!(simple_polygon_problem(&square).is_none());
    }

    #[test]
    fn a_bow_tie_crosses_itself() {
        let bow = [v(0.0, 0.0), v(1.0, 1.0), v(1.0, 0.0), v(0.0, 1.0)];
        let problem = simple_polygon_problem(&bow).unwrap();
        assert!(problem.contains("crosses"), "{problem}");
    }

    #[test]
    fn a_spike_back_along_itself_is_refused() {
        let spike = [v(0.0, 0.0), v(2.0, 0.0), v(1.0, 0.0), v(1.0, 1.0)];
        assert!(simple_polygon_problem(&spike).is_some());
        let flat = [v(0.0, 0.0), v(1.0, 0.0), v(2.0, 0.0)];
        assert!(simple_polygon_problem(&flat).is_some());
    }

    fn end_of(piece: &PathPiece) -> Vector2<f64> {
        piece.point_at(piece.length())
    }

    fn close(a: Vector2<f64>, b: Vector2<f64>) -> bool {
        (a - b).norm() < 1e-12
    }

    #[test]
    fn fillet_of_a_left_hand_right_angle() {
        // East 10 then north: radius 2 cuts 2 off each leg (tan 45 degrees = 1), centre
        // inside the turn, the arc running counter-clockwise from due south of the centre.
        let f = Fillet::round(v(0.0, 0.0), v(10.0, 0.0), v(10.0, 10.0), 2.0).unwrap();
        assert!((f.tangent_length - 2.0).abs() < 1e-12, "{f:?}");
        assert!(
            close(f.start, v(8.0, 0.0)) && close(f.end, v(10.0, 2.0)),
            "{f:?}"
        );
        assert!(close(f.centre, v(8.0, 2.0)), "{f:?}");
        assert!((f.start_angle + FRAC_PI_2).abs() < 1e-12, "{f:?}");
        assert!((f.sweep - FRAC_PI_2).abs() < 1e-12, "{f:?}");
        assert!(close(end_of(&f.arc()), f.end));
    }

    #[test]
    fn fillet_of_a_right_hand_turn_runs_clockwise() {
        // North then turning 60 degrees right: tangent length 3 tan 30 degrees.
        let corner = v(0.0, 10.0);
        let after = corner + v(60f64.to_radians().sin(), 60f64.to_radians().cos()) * 10.0;
        let f = Fillet::round(v(0.0, 0.0), corner, after, 3.0).unwrap();
        let tangent = 3.0 * 30f64.to_radians().tan();
        assert!((f.tangent_length - tangent).abs() < 1e-12, "{f:?}");
        assert!(close(f.centre, v(3.0, 10.0 - tangent)), "{f:?}");
        assert!((f.sweep + 60f64.to_radians()).abs() < 1e-12, "{f:?}");
        assert!((f.start_angle - PI).abs() < 1e-12, "{f:?}");
        assert!(close(end_of(&f.arc()), f.end), "{:?}", end_of(&f.arc()));
        assert!(((f.end - f.centre).norm() - 3.0).abs() < 1e-12);
    }

    #[test]
    fn no_fillet_where_the_path_goes_straight_on() {
        assert!(Fillet::round(v(0.0, 0.0), v(1.0, 1.0), v(3.0, 3.0), 5.0).is_none());
    }

    #[test]
    fn concentric_fillets_share_the_centre_and_the_turn() {
        let f = Fillet::round(v(0.0, 0.0), v(10.0, 0.0), v(10.0, 10.0), 4.0).unwrap();
        // The left line is on the inside of this left turn.
        let inner = f.concentric(1.0).unwrap();
        assert_eq!(inner.radius, 3.0);
        assert!(close(inner.start, v(6.0, 1.0)) && close(inner.end, v(9.0, 4.0)));
        let outer = f.concentric(-1.0).unwrap();
        assert_eq!(outer.radius, 5.0);
        assert!(close(outer.start, v(6.0, -1.0)) && close(outer.end, v(11.0, 4.0)));
        assert_eq!((outer.centre, outer.sweep), (f.centre, f.sweep));
        assert!(f.concentric(4.0).is_none());
        assert!(f.concentric(5.0).is_none());
    }

    #[test]
    fn offset_polyline_mitres_its_corners() {
        let points = [v(0.0, 0.0), v(10.0, 0.0), v(10.0, 10.0)];
        let left = offset_polyline(&points, 1.0);
        let right = offset_polyline(&points, -1.0);
        for (p, q) in left.iter().zip([v(0.0, 1.0), v(9.0, 1.0), v(9.0, 10.0)]) {
            assert!(close(*p, q), "{left:?}");
        }
        for (p, q) in right
            .iter()
            .zip([v(0.0, -1.0), v(11.0, -1.0), v(11.0, 10.0)])
        {
            assert!(close(*p, q), "{right:?}");
        }
        // Straight on, the corner just moves sideways.
        let straight = offset_polyline(&[v(0.0, 0.0), v(0.0, 5.0), v(0.0, 9.0)], 2.0);
        assert!(close(straight[1], v(-2.0, 5.0)), "{straight:?}");
    }

    #[test]
    fn dashes_run_on_from_piece_to_piece() {
        // Period 1.5: dashes over [0, 1], [1.5, 2.5], [3, 4], [4.5, 5.5], ...
        let spans = dash_spans(&[1.75, 2.0, 1.0], 1.0, 0.5);
        let expected = [
            (0, 0.0, 1.0),
            (0, 1.5, 1.75),
            (1, 0.0, 0.75),
            (1, 1.25, 2.0),
            (2, 0.0, 0.25),
            (2, 0.75, 1.0),
        ];
        assert_eq!(spans.len(), expected.len(), "{spans:?}");
        for (span, want) in spans.iter().zip(expected) {
            assert_eq!(span.0, want.0, "{spans:?}");
            assert!((span.1 - want.1).abs() < 1e-12 && (span.2 - want.2).abs() < 1e-12);
        }
    }

    #[test]
    fn a_dash_ending_at_a_joint_leaves_no_sliver() {
        let spans = dash_spans(&[1.0, 1.0], 1.0, 0.5);
        assert_eq!(spans, vec![(0, 0.0, 1.0), (1, 0.5, 1.0)]);
    }

    #[test]
    fn part_of_an_arc_is_an_arc_on_the_same_circle() {
        let arc = PathPiece::Arc {
            centre: v(1.0, 1.0),
            radius: 2.0,
            start_angle: 0.0,
            sweep: -PI,
        };
        assert!((arc.length() - TAU).abs() < 1e-12);
        let part = arc.part(PI, TAU);
        assert!(close(part.point_at(0.0), v(1.0, -1.0)), "{part:?}");
        assert!(close(end_of(&part), v(-1.0, 1.0)), "{part:?}");
        assert!(close(arc.point_at(PI), v(1.0, -1.0)));
    }

    #[test]
    fn clipping_a_square_in_half() {
        let square = [v(0.0, 0.0), v(2.0, 0.0), v(2.0, 2.0), v(0.0, 2.0)];
        let half = clip_polygon(&square, |p| 1.0 - p.x);
        assert!((twice_signed_area(&half) - 4.0).abs() < 1e-12, "{half:?}");
    }
}
