//! Facts of the perspective-drawing trade that an equirectangular underlay must honour.
//! Each is marked "common practice": what people who draw spherical (360 x 180 degree)
//! perspectives by hand rely on, not a result quoted from one publication.

use nalgebra::{Point3, Vector3};
use pansite::plane::{flatten, Equirect, ImagePoint, PolylineSet, DEFAULT_TOLERANCE_PX};
use pansite::scene::Standpoint;
use pansite::sphere::{angle_between, azimuth_elevation, SphereCurve, ViewFrame};
use std::f64::consts::{PI, TAU};

mod common;
use common::{assert_near, distance_to_segment, distance_to_set};

/// An angle moved by whole turns into [-pi, pi).
fn wrap(angle: f64) -> f64 {
    (angle + PI).rem_euclid(TAU) - PI
}

fn standpoint(x: f64, y: f64, heading: f64, pitch: f64, roll: f64) -> ViewFrame {
    ViewFrame::new(&Standpoint::from_degrees(
        "s", x, y, 1.6, heading, pitch, roll,
    ))
}

fn image_of(map: &Equirect, v: &Vector3<f64>) -> ImagePoint {
    let (azimuth, elevation) = azimuth_elevation(v);
    map.to_image(azimuth, elevation)
}

fn flattened(curve: &SphereCurve, map: Equirect, tolerance: f64) -> PolylineSet {
    let mut set = PolylineSet::new();
    flatten(curve, map, tolerance, &mut set);
    set
}

/// (a) Common practice: parallel horizontal lines all run to the same two vanishing points on
/// the horizon, 180 degrees apart, at the azimuth of their direction and its opposite.
#[test]
fn parallel_horizontal_lines_share_two_vanishing_points_on_the_horizon() {
    let bearing = 35f64.to_radians();
    let direction = Vector3::new(bearing.sin(), bearing.cos(), 0.0);
    // Lines through these points (eye at (0, 0, 1.6)): different heights and offsets, all
    // within 5 m of the eye so that 1e6 m out they are within 5e-6 rad of their limits.
    let through = [
        Point3::new(3.0, -2.0, 0.0),
        Point3::new(-4.0, 1.0, 3.0),
        Point3::new(0.5, 4.0, -1.2),
        Point3::new(-1.0, -1.0, 6.0),
        Point3::new(2.0, 2.0, 1.6), // at eye height: the line lies in the horizon itself
    ];
    let map = Equirect::from_size_px(4096.0, 2048.0);
    // Heading 35 puts one vanishing point straight ahead and the other on the seam.
    for heading in [0.0f64, 35.0, 100.0, -150.0, 215.0] {
        let frame = standpoint(0.0, 0.0, heading, 0.0, 0.0);
        let ahead = wrap(bearing - heading.to_radians());
        let behind = wrap(ahead + PI);
        for p in through {
            let far = frame.to_view(&(p + direction * 1e6));
            let near = frame.to_view(&(p - direction * 1e6));
            let ((az_far, el_far), (az_near, el_near)) =
                (azimuth_elevation(&far), azimuth_elevation(&near));
            // Source: common practice (doc comment above).
            assert_near(wrap(az_far - ahead), 0.0, 1e-5);
            assert_near(el_far, 0.0, 1e-5);
            assert_near(wrap(az_near - behind), 0.0, 1e-5);
            assert_near(el_near, 0.0, 1e-5);
            // The drawn image runs from one vanishing point to the other.
            let arc = SphereCurve::great_arc(&near, &far).unwrap();
            let set = flattened(&arc, map, DEFAULT_TOLERANCE_PX);
            let first = set.iter().next().unwrap()[0];
            let last = *set.iter().last().unwrap().last().unwrap();
            for (end, expected) in [(first, behind), (last, ahead)] {
                let (r, e) = map.to_angles(end);
                assert_near(wrap(r - expected), 0.0, 1e-5);
                assert_near(e, 0.0, 1e-5);
            }
        }
    }
}

/// (b) Common practice: the centre of a rectangle drawn in perspective is where its
/// diagonals cross (how a wall is halved, or a door centred, by hand). On the sphere: the
/// great circles of the two diagonals meet (the cross product of their normals) in the
/// direction of the centre.
#[test]
fn diagonals_of_a_rectangle_cross_at_the_image_of_its_centre() {
    let (s20, c20) = 20f64.to_radians().sin_cos();
    let (s40, c40) = 40f64.to_radians().sin_cos();
    // (centre, half side 1, half side 2), the sides at right angles.
    let rectangles = [
        // A south-facing wall 12 m ahead.
        (
            Point3::new(1.0, 12.0, 2.0),
            Vector3::new(4.0, 0.0, 0.0),
            Vector3::new(0.0, 0.0, 2.0),
        ),
        // A roof plane pitched 40 degrees, turned 20 degrees.
        (
            Point3::new(-6.0, 4.0, 5.0),
            Vector3::new(c20, s20, 0.0) * 3.0,
            Vector3::new(-s20 * c40, c20 * c40, s40) * 2.0,
        ),
        // A wall behind the viewer, across the seam when the heading is 0.
        (
            Point3::new(0.5, -8.0, 1.0),
            Vector3::new(4.0, 0.0, 0.0),
            Vector3::new(0.0, 0.0, 2.5),
        ),
        // A floor rectangle right under the eye's side.
        (
            Point3::new(2.0, 1.0, 0.0),
            Vector3::new(1.5, 0.0, 0.0),
            Vector3::new(0.0, 1.0, 0.0),
        ),
    ];
    let map = Equirect::from_size_px(4096.0, 2048.0);
    for (heading, pitch, roll) in [(0.0, 0.0, 0.0), (30.0, 10.0, 5.0), (-135.0, -20.0, 0.0)] {
        let frame = standpoint(0.0, 0.0, heading, pitch, roll);
        for (centre, e1, e2) in rectangles {
            assert!(e1.dot(&e2).abs() < 1e-15);
            let corner = |s1: f64, s2: f64| frame.to_view(&(centre + e1 * s1 + e2 * s2));
            let diagonal1 = SphereCurve::great_arc(&corner(1.0, 1.0), &corner(-1.0, -1.0)).unwrap();
            let diagonal2 = SphereCurve::great_arc(&corner(-1.0, 1.0), &corner(1.0, -1.0)).unwrap();
            let n1 = diagonal1.u.cross(&diagonal1.v);
            let n2 = diagonal2.u.cross(&diagonal2.v);
            let mut crossing = n1.cross(&n2).normalize();
            let centre_direction = frame.to_view(&centre).normalize();
            if crossing.dot(&centre_direction) < 0.0 {
                crossing = -crossing; // the other of the two antipodal crossings
            }
            // Source: common practice (doc comment above).
            assert_near((crossing - centre_direction).norm(), 0.0, 1e-12);
            // And on the drawing: the centre's pixel is on both drawn diagonals.
            let p = image_of(&map, &centre_direction);
            for diagonal in [diagonal1, diagonal2] {
                let set = flattened(&diagonal, map, DEFAULT_TOLERANCE_PX);
                let d = distance_to_set(p, &set);
                assert!(d <= DEFAULT_TOLERANCE_PX, "{centre}: {d} px");
            }
        }
    }
}

/// SplitMix64 (Steele, Lea and Flood 2014): deterministic pseudo-random numbers in [0, 1).
struct Rng(u64);

impl Rng {
    fn uniform(&mut self) -> f64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        ((z ^ (z >> 31)) >> 11) as f64 / (1u64 << 53) as f64
    }

    fn direction(&mut self) -> Vector3<f64> {
        let z = 2.0 * self.uniform() - 1.0;
        let phi = TAU * self.uniform();
        let r = (1.0 - z * z).sqrt();
        Vector3::new(r * phi.cos(), r * phi.sin(), z)
    }
}

/// (c) Common practice: on a print with a 5-degree grid a careful hand traces to within about
/// half a cell, 2.5 degrees; so the underlay's own error must be far below that. With the
/// default tolerance at 4096 x 2048 the drawn polyline must stay within 0.1 px of the true
/// image of the arc, found by sampling the arc densely (`position(t)` to pixels), and 0.1 px
/// is far below 2.5 degrees (28.4 px at that width).
///
/// Besides random arcs, arcs that miss the zenith or the nadir by a hair (1e-5 to 1e-3 rad;
/// 0.1 px is 1.5e-4 rad there) are included: near a pole the image of an arc sweeps across
/// many columns within a pixel row or two, which is where the pixel tolerance is hardest.
#[test]
fn flattening_error_is_far_below_what_a_hand_traces() {
    let (width, height) = (4096.0, 2048.0);
    let map = Equirect::from_size_px(width, height);
    let hand_px = 2.5 / 360.0 * width; // 28.4 px
    let mut rng = Rng(7);
    let mut arcs = Vec::new();
    for _ in 0..120 {
        let a = rng.direction();
        let b = rng.direction();
        if angle_between(&a, &b) < PI - 1e-3 {
            arcs.push((
                format!("random arc {a:?} -> {b:?}"),
                SphereCurve::great_arc(&a, &b).unwrap(),
            ));
        }
    }
    for miss in [1e-5, 4e-5, 1e-4, 3e-4, 1e-3] {
        for pole in [1.0, -1.0] {
            arcs.push((
                format!("arc missing pole {pole} by {miss} rad"),
                near_miss(miss, pole),
            ));
        }
    }
    let (mut worst, mut worst_case) = (0f64, String::new());
    let mut samples = 0usize;
    for (case, arc) in arcs {
        let set = flattened(&arc, map, DEFAULT_TOLERANCE_PX);
        let index = SegmentIndex::new(&set, width);
        for p in dense_image_samples(&arc, &map) {
            if p.y <= DEFAULT_TOLERANCE_PX || p.y >= height - DEFAULT_TOLERANCE_PX {
                // Within the tolerance of a pole row: that whole row is the pole, which the
                // polyline reaches, so the sample is within the tolerance of the drawing.
                continue;
            }
            let distance = index.distance(p);
            if distance > worst {
                (worst, worst_case) = (distance, format!("{case}, at {p:?}"));
            }
            samples += 1;
        }
    }
    assert!(samples > 100_000, "{samples}");
    // Source: common practice (doc comment above); 0.1 px is the library's default tolerance.
    assert!(
        worst <= DEFAULT_TOLERANCE_PX,
        "worst {worst} px: {worst_case}"
    );
    assert!(
        worst < hand_px / 100.0,
        "worst {worst} px vs {hand_px} px: {worst_case}"
    );
}

/// The segments of a polyline set bucketed by column, for fast nearest-segment distances:
/// any segment within `MARGIN` px of a point is in the point's bucket, so a bucket answer
/// within the margin is exact; otherwise all segments are searched.
struct SegmentIndex {
    segments: Vec<(ImagePoint, ImagePoint)>,
    buckets: Vec<Vec<usize>>,
}

impl SegmentIndex {
    const MARGIN: f64 = 1.0;
    const BUCKET_PX: f64 = 8.0;

    fn new(set: &PolylineSet, width: f64) -> SegmentIndex {
        let mut segments = Vec::new();
        for line in set.iter() {
            if line.len() == 1 {
                segments.push((line[0], line[0]));
            }
            segments.extend(line.windows(2).map(|w| (w[0], w[1])));
        }
        let count = (width / Self::BUCKET_PX).ceil() as usize + 1;
        let mut buckets = vec![Vec::new(); count];
        let bucket = |x: f64| ((x / Self::BUCKET_PX).floor().max(0.0) as usize).min(count - 1);
        for (i, (a, b)) in segments.iter().enumerate() {
            let (lo, hi) = (a.x.min(b.x) - Self::MARGIN, a.x.max(b.x) + Self::MARGIN);
            for list in &mut buckets[bucket(lo)..=bucket(hi)] {
                list.push(i);
            }
        }
        SegmentIndex { segments, buckets }
    }

    fn distance(&self, p: ImagePoint) -> f64 {
        let k = ((p.x / Self::BUCKET_PX).floor().max(0.0) as usize).min(self.buckets.len() - 1);
        let near = self.buckets[k]
            .iter()
            .map(|&i| distance_to_segment(p, self.segments[i].0, self.segments[i].1))
            .fold(f64::INFINITY, f64::min);
        if near <= Self::MARGIN {
            return near;
        }
        self.segments
            .iter()
            .map(|(a, b)| distance_to_segment(p, *a, *b))
            .fold(f64::INFINITY, f64::min)
    }
}

/// Points of the true image of `arc`, no more than 0.25 px apart except across the seam:
/// four per pixel of arc length to start with, then each gap halved until it is small (near
/// a pole the image sweeps sideways much faster than the arc moves).
fn dense_image_samples(arc: &SphereCurve, map: &Equirect) -> Vec<ImagePoint> {
    fn fill(
        arc: &SphereCurve,
        map: &Equirect,
        t: (f64, f64),
        p: (ImagePoint, ImagePoint),
        depth: u32,
        out: &mut Vec<ImagePoint>,
    ) {
        let gap = (p.1.x - p.0.x).hypot(p.1.y - p.0.y);
        if gap > 0.25 && depth < 40 {
            let tm = (t.0 + t.1) / 2.0;
            let pm = image_of(map, &arc.position(tm));
            fill(arc, map, (t.0, tm), (p.0, pm), depth + 1, out);
            fill(arc, map, (tm, t.1), (pm, p.1), depth + 1, out);
        } else {
            out.push(p.1);
        }
    }
    let n = ((arc.t1 * map.y_scale()) * 4.0).ceil().max(16.0) as usize;
    let t = |i: usize| arc.t0 + (arc.t1 - arc.t0) * i as f64 / n as f64;
    let mut out = vec![image_of(map, &arc.position(t(0)))];
    for i in 0..n {
        let (a, b) = (out[out.len() - 1], image_of(map, &arc.position(t(i + 1))));
        fill(arc, map, (t(i), t(i + 1)), (a, b), 0, &mut out);
    }
    out
}

/// A great arc that passes `miss` radians from the zenith (`pole = 1`) or the nadir
/// (`pole = -1`): 0.4 rad of it before the nearest point, 1.9 rad after.
fn near_miss(miss: f64, pole: f64) -> SphereCurve {
    let alpha = 0.7f64; // the side of the pole it passes on (any)
    let nearest = Vector3::new(
        miss.sin() * alpha.cos(),
        miss.sin() * alpha.sin(),
        pole * miss.cos(),
    );
    let along = Vector3::new(-alpha.sin(), alpha.cos(), 0.0);
    let at = |s: f64| nearest * s.cos() + along * s.sin();
    let arc = SphereCurve::great_arc(&at(-0.4), &at(1.9)).unwrap();
    let normal = arc.u.cross(&arc.v);
    assert!((normal.z.abs().asin() - miss).abs() < 1e-12 * miss.max(1e-3));
    arc
}

/// (d) Common practice: in an equirectangular panorama held level (pitch = roll = 0) every
/// vertical edge is a vertical line of the image, in the column of its azimuth, and the
/// horizon (the eye's height) is the middle row.
#[test]
fn verticals_are_vertical_lines_and_the_horizon_is_the_middle_row() {
    let (width, height) = (4096.0, 2048.0);
    let map = Equirect::from_size_px(width, height);
    let plan = [
        (3.0, 4.0),
        (-5.0, 2.0),
        (1.0, -6.0),
        (-2.0, -3.0),
        (7.0, 0.5),
    ];
    for heading in [0.0f64, 50.0, -100.0, 170.0] {
        let (ex, ey) = (0.7, -0.5); // no plan point exactly behind (on the seam)
        let frame = standpoint(ex, ey, heading, 0.0, 0.0);
        for (x, y) in plan {
            // Source: common practice. Expected column from plan geometry alone.
            let relative = wrap((x - ex).atan2(y - ey) - heading.to_radians());
            let column = (relative + PI) / TAU * width;
            let bottom = frame.to_view(&Point3::new(x, y, 0.0));
            let top = frame.to_view(&Point3::new(x, y, 12.0));
            let set = flattened(
                &SphereCurve::great_arc(&bottom, &top).unwrap(),
                map,
                DEFAULT_TOLERANCE_PX,
            );
            assert_eq!(set.len(), 1, "heading {heading}, ({x}, {y})");
            let line = set.iter().next().unwrap();
            for p in line {
                assert_near(p.x, column, 1e-9);
            }
            // It runs from below the horizon to above it ...
            assert!(line[0].y > height / 2.0 && line[line.len() - 1].y < height / 2.0);
            // ... and its point at eye height is on the middle row.
            let at_eye = image_of(&map, &frame.to_view(&Point3::new(x, y, 1.6)));
            assert_near(at_eye.y, height / 2.0, 1e-9);
            assert_near(at_eye.x, column, 1e-9);
        }
        // A horizontal edge at eye height is drawn along the middle row, wherever it is.
        let edge = SphereCurve::great_arc(
            &frame.to_view(&Point3::new(-10.0, 5.0, 1.6)),
            &frame.to_view(&Point3::new(8.0, 7.0, 1.6)),
        )
        .unwrap();
        for line in flattened(&edge, map, DEFAULT_TOLERANCE_PX).iter() {
            for p in line {
                assert_near(p.y, height / 2.0, 1e-9);
            }
        }
    }
    // The check can fail: look up 10 degrees and a vertical off to the side is no longer a
    // vertical line of the image.
    let frame = standpoint(0.0, 0.0, 0.0, 10.0, 0.0);
    let arc = SphereCurve::great_arc(
        &frame.to_view(&Point3::new(5.0, 1.0, 0.0)),
        &frame.to_view(&Point3::new(5.0, 1.0, 12.0)),
    )
    .unwrap();
    let set = flattened(&arc, map, DEFAULT_TOLERANCE_PX);
    let xs: Vec<f64> = set.iter().flatten().map(|p| p.x).collect();
    let spread = xs.iter().cloned().fold(f64::NEG_INFINITY, f64::max)
        - xs.iter().cloned().fold(f64::INFINITY, f64::min);
    assert!(spread > 10.0, "spread {spread} px");
}

/// Common practice, and plain trigonometry: a street climbing at angle `a` runs to a
/// vanishing point at elevation `a` above the horizon (its lines' direction makes that
/// angle with the level). Here the street has no heights of its own: it follows sloping
/// ground that rises 1 in 10 (a = atan 0.1, 5.71 degrees) north of a level stretch.
#[test]
fn a_street_climbing_at_an_angle_vanishes_at_that_elevation() {
    let scene = "Scene(standpoints: [(name: \"foot\", x: -2, y: -5, heading: 0)], \
        ground: (spots: [(-40, -20, 0), (40, -20, 0), (-40, 10, 0), (40, 10, 0), \
                         (-40, 110, 10), (40, 110, 10)]), \
        items: [Road(points: [(0, -15), (0, 100)], width: 6, kerb: 0.15, pavement: 2)])";
    let site =
        pansite::scene::parse_scene(scene.as_bytes(), std::path::Path::new("hill.ron"), "hill")
            .unwrap();
    // Every line of the street along the climb (kerbs, kerb tops, pavement backs) runs
    // at that angle: their common direction is the vanishing point's.
    let climbing: Vec<Vector3<f64>> = site
        .edges
        .iter()
        .filter(|e| site.items[e.item.0 as usize].kind == "road")
        .filter_map(|e| match e.curve {
            pansite::scene::SiteCurve::Segment { start, end } if start.y > 10.0 && end.y > 10.0 => {
                let d = if end.y > start.y {
                    end - start
                } else {
                    start - end
                };
                (d.y > 1.0).then_some(d.normalize())
            }
            _ => None,
        })
        .collect();
    assert!(climbing.len() >= 4, "{climbing:?}");
    for d in &climbing {
        let (azimuth, elevation) = azimuth_elevation(d);
        assert_near(elevation, 0.1f64.atan(), 1e-9);
        assert_near(wrap(azimuth), 0.0, 1e-9);
    }
    // Points far up the street's kerb seen from the foot of the hill close in on that
    // elevation (the vanishing point as the limit of the line's images).
    let eye = site.standpoints[0].eye();
    let far = Point3::new(3.0, 10.0, 0.15) + climbing[0] * 1e7;
    let (_, seen) = azimuth_elevation(&(far - eye));
    assert_near(seen, 0.1f64.atan(), 1e-6);
}

/// Figures whose eyes are at the viewer's eye height, standing on the same level ground,
/// have their eyes on the horizon whatever their distance; only their size changes
/// (common practice: the sketcher's rule for placing figures). A seated viewer sees
/// standing figures' eyes above the horizon, seated figures' on it.
#[test]
fn figures_eyes_lie_on_the_horizon_at_any_distance() {
    let scene = |posture: &str| {
        pansite::scene::parse_scene(
            format!(
                "Scene(standpoints: [(name: \"here\", x: 0, y: 0, heading: 30{posture})], items: [
                    Figure(label: \"near\", at: (1, 3)),
                    Figure(label: \"middle\", at: (-4, 12), facing: 120),
                    Figure(label: \"far\", at: (25, 60), facing: 250),
                    Figure(label: \"very far\", at: (-180, 240)),
                    Figure(label: \"on a bench\", at: (6, 9), pose: Seated),
                ])"
            )
            .as_bytes(),
            std::path::Path::new("figures.ron"),
            "figures",
        )
        .unwrap()
    };
    // The eyes of each figure (its head's ellipse at parameters 0 and pi, level with its
    // centre) and the head's half-height seen from the standpoint, in radians.
    let eyes = |site: &pansite::scene::Site| -> Vec<(String, [f64; 2], f64)> {
        let view = ViewFrame::new(&site.standpoints[0]);
        site.edges
            .iter()
            .filter_map(|edge| {
                let pansite::scene::SiteCurve::Ellipse(arc) = &edge.curve else {
                    return None;
                };
                let label = site.items[edge.item.0 as usize]
                    .label
                    .clone()
                    .unwrap_or_default();
                let curve = view.sphere_curve(&edge.curve).unwrap();
                let middle = (curve.t0 + curve.t1) / 2.0;
                let elevation = |t: f64| azimuth_elevation(&curve.position(t)).1;
                let size = (arc.v.norm() / curve.centre.norm()).atan();
                Some((label, [elevation(curve.t0), elevation(middle)], size))
            })
            .collect()
    };
    let standing = eyes(&scene(""));
    assert_eq!(standing.len(), 5);
    for (label, [a, b], _) in &standing {
        if label != "on a bench" {
            assert_near(*a, 0.0, 1e-12);
            assert_near(*b, 0.0, 1e-12);
        } else {
            assert!(*a < -0.01 && *b < -0.01, "{label}: {a} {b}");
        }
    }
    // Nearer figures are bigger.
    let sizes: Vec<f64> = standing.iter().map(|(_, _, s)| *s).collect();
    assert!(sizes[0] > sizes[1] && sizes[1] > sizes[2] && sizes[2] > sizes[3]);
    let seated = eyes(&scene(", posture: Seated"));
    for (label, [a, b], _) in &seated {
        if label == "on a bench" {
            assert_near(*a, 0.0, 1e-12);
            assert_near(*b, 0.0, 1e-12);
        } else {
            assert!(*a > 0.0 && *b > 0.0, "{label}: {a} {b}");
        }
    }
}
