//! Which stretches of an edge the eye sees: sampled along the edge about a pixel apart, and
//! each change between seen and hidden found by bisection to a small fraction of a pixel.

use super::bvh::{ray_hits_triangle, Bvh};
use super::occlusion::{segment_distance, OcclusionMap};
use crate::scene::{Face, Faces};
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
    /// The faces that may hide things.
    pub faces: &'a Faces,
    /// Their hierarchy.
    pub bvh: &'a Bvh,
    /// The view the curves are given in.
    pub view: &'a ViewFrame,
    /// Where the eye is, in site coordinates.
    pub eye: Point3<f64>,
    /// What certainly hides, cell by cell, from this eye.
    map: OcclusionMap,
}

/// How far from the eye the edge is at each parameter of its curve on the sphere.
#[derive(Clone, Copy, Debug)]
pub enum Depth {
    /// An ellipse: the curve's points are the edge's points relative to the eye.
    Curve,
    /// A segment from `a` to `b` (relative to the eye, view frame): its great arc holds only
    /// directions, and the point along direction d is at |a x b| / |d x (b - a)| (the ray
    /// meets the segment's line within their common plane).
    Segment {
        /// The start, relative to the eye.
        a: Vector3<f64>,
        /// The end, relative to the eye.
        b: Vector3<f64>,
    },
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

/// What the eye finds looking at one point of an edge: whether it is seen, and if not, a
/// face that hides it.
#[derive(Clone, Copy, Debug)]
struct Look {
    t: f64,
    blocker: Option<u32>,
}

impl Look {
    fn seen(&self) -> bool {
        self.blocker.is_none()
    }
}

impl<'a> Occluders<'a> {
    /// What hides things from the eye of `view`: the faces, their hierarchy, and the map of
    /// certain cover made for this eye.
    pub fn new(faces: &'a Faces, bvh: &'a Bvh, view: &'a ViewFrame) -> Occluders<'a> {
        Occluders {
            faces,
            bvh,
            view,
            eye: view.eye(),
            map: OcclusionMap::new(faces, bvh, view),
        }
    }

    /// The map of certain cover.
    pub fn map(&self) -> &OcclusionMap {
        &self.map
    }

    /// The point of the edge at `t`, in site coordinates, and its direction from the eye.
    fn point(&self, curve: &SphereCurve, depth: &Depth, t: f64) -> Option<(Vector3<f64>, f64)> {
        let direction = curve.position(t).try_normalize(0.0)?;
        Some((direction, depth.at(curve, t, &direction)))
    }

    /// Whether `face` hides the point at `distance` along the site direction `towards`,
    /// given that the sight line meets it at `hit`.
    fn hides(&self, face: &Face, towards: &Vector3<f64>, hit: f64, limit: f64) -> bool {
        // A facet of a curved surface may stand up to its slack in front of the true
        // surface that edges are drawn on, more so for sight lines that graze it.
        if face.slack == 0.0 {
            return hit < limit;
        }
        let [p, q, r] = face.corners;
        let normal = (q - p).cross(&(r - p));
        let cosine = (normal.dot(towards) / normal.norm()).abs().max(0.05);
        hit < limit - face.slack as f64 / cosine
    }

    /// Looks at the point of the edge at `t`.
    fn look(&self, curve: &SphereCurve, depth: &Depth, t: f64) -> Look {
        let Some((direction, distance)) = self.point(curve, depth, t) else {
            return Look { t, blocker: None };
        };
        let limit = distance * (1.0 - DEPTH_BIAS);
        let towards = self.view.direction_to_site(&direction);
        // The map names the faces to try first; the hierarchy answers when it cannot.
        let blocker = self
            .map
            .blockers(&direction, limit)
            .and_then(|mut faces| faces.find(|&face| self.blocks(face, &towards, limit)))
            .or_else(|| {
                self.bvh
                    .first_hit(self.faces, &self.eye, &towards, limit, |_, face, hit| {
                        self.hides(face, &towards, hit, limit)
                    })
            });
        Look { t, blocker }
    }

    /// Whether the face hides the point at `limit` along the site direction `towards`.
    fn blocks(&self, face: u32, towards: &Vector3<f64>, limit: f64) -> bool {
        let face = self.faces.get(face as usize);
        ray_hits_triangle(&self.eye, towards, &face.corners)
            .is_some_and(|hit| self.hides(&face, towards, hit, limit))
    }

    /// Whether the face hides the point of the edge at `t`.
    fn face_hides(&self, curve: &SphereCurve, depth: &Depth, t: f64, face: u32) -> bool {
        let Some((direction, distance)) = self.point(curve, depth, t) else {
            return false;
        };
        let limit = distance * (1.0 - DEPTH_BIAS);
        let towards = self.view.direction_to_site(&direction);
        self.blocks(face, &towards, limit)
    }

    /// Whether the map shows the piece of a straight edge from `a` to `b` hidden
    /// throughout: every direction of it in cells covered nearer than its nearest point.
    fn piece_covered(&self, curve: &SphereCurve, depth: &Depth, a: f64, b: f64) -> bool {
        let (Some((da, ra)), Some((db, rb))) =
            (self.point(curve, depth, a), self.point(curve, depth, b))
        else {
            return false;
        };
        let nearest = segment_distance(&(da * ra), &(db * rb));
        self.map
            .covers_great_arc(curve, a, b, nearest * (1.0 - DEPTH_BIAS))
    }

    /// The stretches of the edge seen and hidden. `step` is the angle (radians) below
    /// which a piece of the edge is not divided further; changes are located to within
    /// `precision` radians.
    ///
    /// A straight piece whose two ends are seen is seen throughout if no face crosses the
    /// fan of sight lines to it (one query of the hierarchy); one whose ends are hidden by
    /// the same face is hidden throughout (a triangle meets the fan's plane in a segment,
    /// and two straight pieces in a plane that are ordered the same way at both ends of a
    /// fan are ordered so between). Other pieces are halved, down to `step`; curved edges
    /// are sampled every `step`.
    pub fn spans(&self, curve: &SphereCurve, depth: &Depth, step: f64, precision: f64) -> Spans {
        let mut spans: Spans = Vec::new();
        // The whole segment at once: no point of it is nearer than its nearest point.
        if let Depth::Segment { a, b } = depth {
            let nearest = segment_distance(a, b) * (1.0 - DEPTH_BIAS);
            if self
                .map
                .covers_great_arc(curve, curve.t0, curve.t1, nearest)
            {
                return vec![(curve.t0, curve.t1, false)];
            }
        }
        let first = self.look(curve, depth, curve.t0);
        match depth {
            Depth::Segment { .. } => {
                let last = self.look(curve, depth, curve.t1);
                self.divide(curve, depth, first, last, step, precision, &mut spans);
            }
            Depth::Curve => {
                let mut here = first;
                while here.t < curve.t1 {
                    let next_t = (here.t + parameter_step(curve, here.t, step)).min(curve.t1);
                    let next = self.look(curve, depth, next_t);
                    self.settle(curve, depth, here, next, precision, &mut spans);
                    here = next;
                }
            }
        }
        merge(spans)
    }

    /// The stretches between two looked-at points of a straight edge.
    #[allow(clippy::too_many_arguments)]
    fn divide(
        &self,
        curve: &SphereCurve,
        depth: &Depth,
        a: Look,
        b: Look,
        step: f64,
        precision: f64,
        spans: &mut Spans,
    ) {
        // A great arc's parameter is its angle.
        if b.t - a.t <= step {
            self.settle(curve, depth, a, b, precision, spans);
            return;
        }
        match (a.blocker, b.blocker) {
            (None, None) if !self.fan_crossed(curve, depth, a.t, b.t) => {
                spans.push((a.t, b.t, true));
                return;
            }
            (Some(fa), Some(fb))
                if fa == fb
                    || self.face_hides(curve, depth, b.t, fa)
                    || self.face_hides(curve, depth, a.t, fb)
                    || self.piece_covered(curve, depth, a.t, b.t) =>
            {
                spans.push((a.t, b.t, false));
                return;
            }
            _ => {}
        }
        let middle = self.look(curve, depth, 0.5 * (a.t + b.t));
        self.divide(curve, depth, a, middle, step, precision, spans);
        self.divide(curve, depth, middle, b, step, precision, spans);
    }

    /// Whether any face crosses the fan of sight lines from the eye to the piece of a
    /// straight edge from `a` to `b` (stopped short by the depth bias, so that the faces
    /// the edge lies on do not count).
    fn fan_crossed(&self, curve: &SphereCurve, depth: &Depth, a: f64, b: f64) -> bool {
        let end = |t: f64| {
            self.point(curve, depth, t).map(|(direction, distance)| {
                self.eye + self.view.direction_to_site(&direction) * (distance * (1.0 - DEPTH_BIAS))
            })
        };
        match (end(a), end(b)) {
            (Some(p), Some(q)) => self.bvh.crosses(self.faces, &[self.eye, p, q]),
            _ => true,
        }
    }

    /// The stretch between two neighbouring looked-at points: one, or two with the change
    /// between them found by bisection.
    fn settle(
        &self,
        curve: &SphereCurve,
        depth: &Depth,
        a: Look,
        b: Look,
        precision: f64,
        spans: &mut Spans,
    ) {
        if a.seen() == b.seen() {
            spans.push((a.t, b.t, a.seen()));
        } else {
            let change = self.bisect(curve, depth, a, b, precision);
            spans.push((a.t, change, a.seen()));
            spans.push((change, b.t, b.seen()));
        }
    }

    /// The parameter between `a` and `b` (one seen, the other hidden) where the edge goes in
    /// or out of sight, to within `precision` radians of the view.
    ///
    /// Bisection, helped by a guess: where the curve crosses the outline of the face that
    /// hides the hidden end (as the eye sees it: the planes through the eye and the
    /// triangle's sides) is usually where it comes out from behind it. Two looks just either
    /// side of that crossing settle it when the guess is right. Either way every look keeps
    /// the two ends looking different, so the answer is always a bisection's: the middle of
    /// an interval no wider than `precision` whose ends look different (a wrong guess only
    /// costs its two looks; there is one guess, then halving).
    fn bisect(&self, curve: &SphereCurve, depth: &Depth, a: Look, b: Look, precision: f64) -> f64 {
        let seen_at_a = a.seen();
        let (mut a, mut b) = (a, b);
        let mut guessed = false;
        for _ in 0..60 {
            if angular_speed(curve, a.t) * (b.t - a.t) <= precision {
                break;
            }
            // One guess only: on a mesh of small faces a wrong one leads to the next face's
            // outline, face after face; halving is then the quicker way.
            let hider = if seen_at_a { b.blocker } else { a.blocker };
            let guess = hider
                .filter(|_| !guessed)
                .and_then(|face| self.outline_crossing(curve, face, a.t, b.t, seen_at_a));
            let probes = match guess {
                Some(t) => {
                    guessed = true;
                    // Just inside half the precision either side (0.45, not 0.5, so that the
                    // speed's change across the interval cannot leave it a hair too wide).
                    let half = 0.45 * precision / angular_speed(curve, t).max(1e-12);
                    [t - half, t + half]
                }
                None => [0.5 * (a.t + b.t), f64::NAN],
            };
            for t in probes {
                // (NaN fails both comparisons.)
                if t > a.t && t < b.t {
                    let look = self.look(curve, depth, t);
                    if look.seen() == seen_at_a {
                        a = look;
                    } else {
                        b = look;
                    }
                }
            }
        }
        0.5 * (a.t + b.t)
    }

    /// Where, strictly between `a` and `b`, the curve crosses one of the planes through the
    /// eye and a side of the face: where it may pass the face's outline. Of several, the
    /// one nearest the hidden end: the face hides that end, and going from there towards the
    /// seen end its cover stops where its outline is first crossed.
    fn outline_crossing(
        &self,
        curve: &SphereCurve,
        face: u32,
        a: f64,
        b: f64,
        hidden_at_b: bool,
    ) -> Option<f64> {
        let [p, q, r] = self
            .faces
            .get(face as usize)
            .corners
            .map(|corner| self.view.to_view(&corner));
        let crossings = [p.cross(&q), q.cross(&r), r.cross(&p)]
            .into_iter()
            .flat_map(|side| curve.plane_crossings(&side).into_iter())
            .filter(|&t| t > a && t < b);
        if hidden_at_b {
            crossings.max_by(|x, y| x.total_cmp(y))
        } else {
            crossings.min_by(|x, y| x.total_cmp(y))
        }
    }
}

/// Joins neighbouring stretches that are both seen or both hidden.
fn merge(spans: Spans) -> Spans {
    let mut merged: Spans = Vec::with_capacity(spans.len());
    for (a, b, seen) in spans {
        match merged.last_mut() {
            Some(last) if last.2 == seen => last.1 = b,
            _ => merged.push((a, b, seen)),
        }
    }
    merged
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::{EllipseArc, ItemId, SiteCurve, Standpoint};
    use std::f64::consts::{PI, TAU};

    #[test]
    fn a_segment_s_depth_is_where_the_ray_meets_its_line() {
        // The line x = 2 in the plane z = 0, from y = -1 to y = 1: straight ahead along x it
        // is 2 away, and towards (2, 1) (its end) sqrt(5) away (plane geometry).
        let (a, b) = (Vector3::new(2.0, -1.0, 0.0), Vector3::new(2.0, 1.0, 0.0));
        let curve = SphereCurve::great_arc(&a, &b).unwrap();
        let depth = Depth::Segment { a, b };
        let ahead = depth.at(&curve, 0.0, &Vector3::new(1.0, 0.0, 0.0));
        assert!((ahead - 2.0).abs() < 1e-15, "{ahead}");
        let to_end = depth.at(&curve, 0.0, &Vector3::new(2.0, 1.0, 0.0).normalize());
        assert!((to_end - 5f64.sqrt()).abs() < 1e-15, "{to_end}");
    }

    /// The wall of tests/hidden_by_hand.rs seen from (0, 0) at 1.5 m: its face y = 10, x from
    /// -2 to 2, z from 0 to 3, cut into `rows` strips of two triangles each.
    fn wall(rows: usize) -> Faces {
        let height = |k: usize| 3.0 * k as f64 / rows as f64;
        (0..rows)
            .flat_map(|k| panel((-2.0, 2.0), 10.0, (height(k), height(k + 1)), 0.0))
            .collect()
    }

    /// The stretches of the post at (1, 20) from the ground to 5 m, at 4096 pixels round,
    /// and the height on the post where the first stretch ends.
    fn post_behind(faces: &Faces) -> (Spans, f64) {
        let (spans, curve) = stretches(
            faces,
            Point3::new(1.0, 20.0, 0.0),
            Point3::new(1.0, 20.0, 5.0),
        );
        // The sight line through the change, followed out to the post's plan distance.
        let d = eye_at_1_5().direction_to_site(&curve.position(spans[0].1));
        let height = 1.5 + d.z * 1f64.hypot(20.0) / d.x.hypot(d.y);
        (spans, height)
    }

    /// A panel in the plane y = `y`, from x0 to x1 and z0 to z1, as two triangles.
    fn panel(x: (f64, f64), y: f64, z: (f64, f64), slack: f32) -> [Face; 2] {
        let corner = |x: f64, z: f64| Point3::new(x, y, z);
        [
            [corner(x.0, z.0), corner(x.1, z.0), corner(x.1, z.1)],
            [corner(x.0, z.0), corner(x.1, z.1), corner(x.0, z.1)],
        ]
        .map(|corners| Face {
            corners,
            item: ItemId(0),
            slack,
        })
    }

    fn eye_at_1_5() -> ViewFrame {
        ViewFrame::new(&Standpoint::from_degrees(
            "here", 0.0, 0.0, 1.5, 0.0, 0.0, 0.0,
        ))
    }

    /// The stretches of a straight edge, a pixel apart at 4096 round.
    fn stretches(faces: &Faces, start: Point3<f64>, end: Point3<f64>) -> (Spans, SphereCurve) {
        let bvh = Bvh::new(faces);
        let view = eye_at_1_5();
        let occluders = Occluders::new(faces, &bvh, &view);
        let curve = view
            .sphere_curve(&SiteCurve::Segment { start, end })
            .unwrap();
        let depth = Depth::Segment {
            a: view.to_view(&start),
            b: view.to_view(&end),
        };
        let pixel = TAU / 4096.0;
        (occluders.spans(&curve, &depth, pixel, 1e-3 * pixel), curve)
    }

    /// A rail along y = 20 at height `z`, from x = -`half` to `half`, behind `faces`: which
    /// of its stretches are seen, and where along x each change lies (its sight line followed
    /// out to y = 20).
    fn rail(faces: &Faces, half: f64, z: f64) -> (Vec<bool>, Vec<f64>) {
        let (spans, curve) = stretches(
            faces,
            Point3::new(-half, 20.0, z),
            Point3::new(half, 20.0, z),
        );
        let view = eye_at_1_5();
        let changes = spans[..spans.len() - 1]
            .iter()
            .map(|span| {
                let d = view.direction_to_site(&curve.position(span.1));
                d.x * 20.0 / d.y
            })
            .collect();
        (spans.iter().map(|span| span.2).collect(), changes)
    }

    fn assert_changes_at(changes: &[f64], expected: &[f64]) {
        assert_eq!(changes.len(), expected.len(), "{changes:?}");
        for (x, want) in changes.iter().zip(expected) {
            assert!((x - want).abs() < 1e-4, "{changes:?} against {expected:?}");
        }
    }

    #[test]
    fn a_facet_hides_only_what_lies_beyond_its_slack_as_seen_along_the_sight_line() {
        // A facet in the plane y = 10 (its normal's length 16, not 1) that may stand 0.25 m
        // in front of the true surface: a point 10 m away hides behind it only if the sight
        // line meets it more than 0.25 m nearer, or 0.25 / cos 60 deg = 0.5 m when the line
        // meets it at 60 degrees from the normal.
        let face = Face {
            corners: [
                Point3::new(0.0, 10.0, 0.0),
                Point3::new(4.0, 10.0, 0.0),
                Point3::new(0.0, 10.0, 4.0),
            ],
            item: ItemId(0),
            slack: 0.25,
        };
        let faces = Faces::from([face]);
        let bvh = Bvh::new(&faces);
        let view = eye_at_1_5();
        let occluders = Occluders::new(&faces, &bvh, &view);
        let head_on = Vector3::new(0.0, 1.0, 0.0);
        let hides = |towards: &Vector3<f64>, hit: f64| occluders.hides(&face, towards, hit, 10.0);
        assert!(hides(&head_on, 9.7));
        assert!(!hides(&head_on, 9.75)); // exactly the slack: the surface itself
        assert!(!hides(&head_on, 9.8));
        let slanting = Vector3::new(3f64.sqrt() / 2.0, 0.5, 0.0);
        assert!(hides(&slanting, 9.45));
        assert!(!hides(&slanting, 9.55));
        // A flat face hides whatever lies beyond the hit.
        let flat = Face { slack: 0.0, ..face };
        assert!(occluders.hides(&flat, &head_on, 9.99, 10.0));
        assert!(!occluders.hides(&flat, &head_on, 10.0, 10.0));
    }

    #[test]
    fn an_edge_drawn_on_a_face_is_not_hidden_by_it() {
        // A line across the middle of a wall, in its plane: the depth bias keeps the wall
        // from hiding it.
        let faces = Faces::from(panel((-2.0, 2.0), 10.0, (0.0, 3.0), 0.0));
        let (spans, curve) = stretches(
            &faces,
            Point3::new(-1.0, 10.0, 1.0),
            Point3::new(1.0, 10.0, 1.0),
        );
        assert_eq!(spans, vec![(curve.t0, curve.t1, true)]);
    }

    #[test]
    fn a_rail_behind_two_walls_shows_through_the_gap_between_them() {
        // Walls at y = 10 from x = -4 to -0.5 and 0.5 to 4, 3 m high; a rail at y = 20, 1 m
        // up, from x = -6 to 6. Seen from (0, 0) at 1.5 m, the rail's sight lines cross the
        // walls' plane at half its x (similar triangles) and 1.25 m up: its ends hide
        // behind different walls, and it shows through the gap where |x| < 1.
        let mut faces = Faces::from(panel((-4.0, -0.5), 10.0, (0.0, 3.0), 0.0));
        faces.extend(panel((0.5, 4.0), 10.0, (0.0, 3.0), 0.0));
        let (seen, changes) = rail(&faces, 6.0, 1.0);
        assert_eq!(seen, [false, true, false]);
        assert_changes_at(&changes, &[-1.0, 1.0]);
    }

    #[test]
    fn a_rail_seen_at_both_ends_hides_in_the_middle_behind_a_pillar() {
        // The rail of the test above behind a pillar at y = 10 from x = -0.5 to 0.5: both
        // ends are seen, and the middle, where |x| < 1, is hidden.
        let faces = Faces::from(panel((-0.5, 0.5), 10.0, (0.0, 3.0), 0.0));
        let (seen, changes) = rail(&faces, 6.0, 1.0);
        assert_eq!(seen, [true, false, true]);
        assert_changes_at(&changes, &[-1.0, 1.0]);
    }

    #[test]
    fn a_railing_before_a_facade_shows_between_the_posts_in_front_of_it() {
        // A rail (y = 20, 3 m up, x from -3 to 3) 0.2 m in front of a facade at y = 20.2,
        // its two ends behind posts at y = 10 (x from -1.75 to -1.25 and 1.25 to 1.75).
        // The facade covers every direction near the rail, all of it within a metre of the
        // rail's nearest point, but hides none of the rail: the rail shows between the
        // posts, where |x| / 2 < 1.25 (similar triangles).
        let mut faces = Faces::from(panel((-20.0, 20.0), 20.2, (0.0, 10.0), 0.0));
        faces.extend(panel((-1.75, -1.25), 10.0, (0.0, 3.0), 0.0));
        faces.extend(panel((1.25, 1.75), 10.0, (0.0, 3.0), 0.0));
        let (seen, changes) = rail(&faces, 3.0, 3.0);
        assert_eq!(seen, [false, true, false]);
        assert_changes_at(&changes, &[-2.5, 2.5]);
    }

    #[test]
    fn the_direction_turns_at_the_speed_across_the_line_of_sight() {
        // A level ring of radius 2 round (0, 20, 0): at t = 0 it is at P = (2, 20, 0) going
        // P' = (0, 2, 0), partly along the sight line. The direction turns at |P x P'| / |P|^2
        // (the angular speed of a moving point, any mechanics text).
        let ring = SphereCurve::ellipse_arc(
            Vector3::new(0.0, 20.0, 0.0),
            Vector3::new(2.0, 0.0, 0.0),
            Vector3::new(0.0, 2.0, 0.0),
            0.0,
            TAU,
        );
        let (p, velocity) = (ring.position(0.0), ring.velocity(0.0));
        let expected = p.cross(&velocity).norm() / p.norm_squared();
        assert!((angular_speed(&ring, 0.0) - expected).abs() < 1e-15);
        // A step of a pixel's angle is that angle over the speed, at most a tenth.
        assert!((parameter_step(&ring, 0.0, 1e-4) - 1e-4 / expected).abs() < 1e-12);
        assert_eq!(parameter_step(&ring, 0.0, 1.0), 0.1);
        let arc = SphereCurve::great_arc(&Vector3::x(), &Vector3::y()).unwrap();
        assert_eq!(angular_speed(&arc, 0.3), 1.0);
        assert_eq!(parameter_step(&arc, 0.3, 0.01), 0.01);
    }

    #[test]
    fn a_fence_through_a_wall_hides_behind_it_and_behind_a_post_in_front() {
        // A fence from (-4, 25) behind a wall at y = 10.8 to (4, 10) just in front of it,
        // 1 m up, passes through the wall at s = 14.2 / 15 of its length (x = 3.57). Its
        // near end hides behind a post at y = 5, x from 1.75 to 2.25 (the sight line to it
        // crosses y = 5 at x = 2), which covers the fence from s = 63.75 / 66.25 on (where
        // x * 5 / y = 1.75, similar triangles). Hidden behind the wall, seen, hidden behind
        // the post: the wall, which hides the far end, lies 0.86 m behind the near end
        // along its sight line and must not be taken to hide it.
        let mut faces = Faces::from(panel((-20.0, 20.0), 10.8, (0.0, 10.0), 0.0));
        faces.extend(panel((1.75, 2.25), 5.0, (0.0, 3.0), 0.0));
        let (start, end) = (Point3::new(-4.0, 25.0, 1.0), Point3::new(4.0, 10.0, 1.0));
        let (spans, curve) = stretches(&faces, start, end);
        let seen: Vec<bool> = spans.iter().map(|s| s.2).collect();
        assert_eq!(seen, [false, true, false], "{spans:?}");
        // Where along the fence each change lies: solve eye + k d = start + s (end - start)
        // in plan for s.
        let view = eye_at_1_5();
        let along = end - start;
        let fraction = |t: f64| {
            let d = view.direction_to_site(&curve.position(t));
            (d.x * start.y - d.y * start.x) / (d.y * along.x - d.x * along.y)
        };
        // (The depth bias lets the fence show until it is 2e-4 of its distance, 2.3 mm at
        // 11.6 m, behind the wall: 1.6e-4 of its length.)
        let through = fraction(spans[0].1) - 14.2 / 15.0;
        assert!(through < 0.0 && through > -2e-4, "{through}");
        assert!((fraction(spans[1].1) - 63.75 / 66.25).abs() < 1e-5);
    }

    #[test]
    fn a_ring_behind_a_narrow_wall_hides_at_its_near_and_far_points() {
        // A ring of radius 2 round (0, 20), 1 m up, behind a wall at y = 10 from x = -0.5 to
        // 0.5: its sight lines cross the wall's plane at x * 10 / y, so the points of the
        // ring straight ahead and straight behind its centre hide, and its sides show.
        let faces = Faces::from(panel((-0.5, 0.5), 10.0, (0.0, 3.0), 0.0));
        let bvh = Bvh::new(&faces);
        let view = eye_at_1_5();
        let occluders = Occluders::new(&faces, &bvh, &view);
        let ring = SiteCurve::from(EllipseArc {
            centre: Point3::new(0.0, 20.0, 1.0),
            u: Vector3::new(2.0, 0.0, 0.0),
            v: Vector3::new(0.0, 2.0, 0.0),
            start: -PI / 2.0,
            sweep: TAU,
        });
        let curve = view.sphere_curve(&ring).unwrap();
        let pixel = TAU / 4096.0;
        let spans = occluders.spans(&curve, &Depth::Curve, pixel, 1e-3 * pixel);
        let seen: Vec<bool> = spans.iter().map(|s| s.2).collect();
        assert_eq!(seen, [false, true, false, true, false], "{spans:?}");
        assert_eq!((spans[0].0, spans[4].1), (curve.t0, curve.t1));
        for pair in spans.windows(2) {
            assert_eq!(pair[0].1, pair[1].0);
            let d = view.direction_to_site(&curve.position(pair[0].1));
            assert!(((d.x * 10.0 / d.y).abs() - 0.5).abs() < 1e-4, "{d:?}");
        }
    }

    #[test]
    fn a_change_is_found_where_plane_trigonometry_puts_it_whether_the_guess_is_right_or_not() {
        // By similar triangles (see tests/hidden_by_hand.rs) the wall hides the post up to
        // 4.5 m. A thousandth of a pixel at 4096 round is 1.5e-6 rad, 3e-5 m at the post.
        // One strip: the face hiding the post's top hidden point has the wall's top as a
        // side, and the guess is right. Three hundred strips of a centimetre, thinner than
        // a pixel there: the hiding strip is usually not the top one, its top side is a
        // wrong guess, and halving must still find the change.
        for rows in [1, 300] {
            let (spans, height) = post_behind(&wall(rows));
            assert_eq!(spans.len(), 2, "{rows} rows: {spans:?}");
            assert!(!spans[0].2 && spans[1].2, "{rows} rows: {spans:?}");
            assert!((height - 4.5).abs() < 6e-5, "{rows} rows: {height}");
        }
    }
}
