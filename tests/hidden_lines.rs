//! Hidden lines checked against an independent reference: a brute-force ray caster over
//! every face, written here separately from the renderer's hierarchy, sampling and
//! bisection. Its definition of "seen" is the renderer's documented one: no face crosses
//! the sight line nearer than the point's distance less the depth bias (and less a curved
//! facet's slack, measured along the sight line).
//!
//! Scenes: a round tower in front of a hall, the interior demo with its columns, the
//! exterior demo from a standpoint inside the arcade, and a room whose pointed and round
//! windows are looked through.

mod common;
use common::crossing;
use nalgebra::{Point3, Vector3};
use pansite::scene::{load_scene, parse_scene, Faces, Site, SiteCurve, Standpoint};
use pansite::sphere::{SphereCurve, ViewFrame};
use pansite::visibility::{Bvh, Depth, Occluders, DEPTH_BIAS};
use std::f64::consts::TAU;
use std::path::Path;

/// Image width the pixel measures refer to.
const WIDTH: f64 = 1024.0;
const PIXEL: f64 = TAU / WIDTH;

/// The reference: is the site point `p` seen from `eye`, by every face in turn?
fn seen_by_brute_force(faces: &Faces, eye: &Point3<f64>, p: &Point3<f64>) -> bool {
    let to = p - eye;
    let distance = to.norm();
    let d = to / distance;
    let limit = distance * (1.0 - DEPTH_BIAS);
    !faces.iter().any(|f| {
        crossing(eye, &d, &f).is_some_and(|t| {
            let [a, b, c] = f.corners;
            let n = (b - a).cross(&(c - a)).normalize();
            let cosine = n.dot(&d).abs().max(0.05);
            t < limit - f.slack as f64 / cosine
        })
    })
}

/// The site point of an edge at parameter `t` of its sphere curve (back from the view
/// frame): the curve's own point for an ellipse, the segment's point in that direction for
/// a segment.
fn site_point(view: &ViewFrame, edge: &SiteCurve, curve: &SphereCurve, t: f64) -> Point3<f64> {
    let d = curve.position(t);
    match *edge {
        SiteCurve::Ellipse(_) => view.eye() + view.direction_to_site(&d),
        SiteCurve::Segment { start, end } => {
            // Where the sight line meets the segment: solve eye + s D = start + k (end - start)
            // by least squares in the plane they share.
            let dir = view.direction_to_site(&d.normalize());
            let (w, e) = (start - view.eye(), end - start);
            let (a, b, c) = (dir.dot(&dir), dir.dot(&e), e.dot(&e));
            let (dd, ee) = (dir.dot(&w), e.dot(&w));
            let k = (b * dd - a * ee) / (a * c - b * b);
            start + e * k
        }
    }
}

/// Parameter step that turns the direction by `angle`, from a finite difference.
fn step_for(curve: &SphereCurve, t: f64, angle: f64) -> f64 {
    let h = 1e-6;
    let a = curve.position(t).normalize();
    let b = curve.position((t + h).min(curve.t1)).normalize();
    let speed = (b - a).norm() / h;
    (angle / speed.max(1e-12)).clamp(1e-9, 0.05)
}

struct Tally {
    samples: usize,
    disagreeing: usize,
    transitions: usize,
}

fn check_scene(name: &str, site: &Site, standpoint: &Standpoint, every: usize) {
    let view = ViewFrame::new(standpoint);
    let eye = view.eye();
    let bvh = Bvh::new(&site.faces);
    let occluders = Occluders::new(&site.faces, &bvh, &view);
    let mut edges: Vec<SiteCurve> = site.edges.iter().map(|e| e.curve).collect();
    edges.extend(site.outline_edges_from(&eye).into_iter().map(|e| e.curve));
    let mut tally = Tally {
        samples: 0,
        disagreeing: 0,
        transitions: 0,
    };
    for edge in edges.iter().step_by(every) {
        let Ok(curve) = view.sphere_curve(edge) else {
            continue;
        };
        let depth = match *edge {
            SiteCurve::Segment { start, end } => Depth::Segment {
                a: view.to_view(&start),
                b: view.to_view(&end),
            },
            SiteCurve::Ellipse(_) => Depth::Curve,
        };
        let spans = occluders.spans(&curve, &depth, PIXEL, 1e-3 * PIXEL);
        let renderer_sees = |t: f64| {
            spans
                .iter()
                .find(|(a, b, _)| t >= *a && t <= *b)
                .is_none_or(|(_, _, seen)| *seen)
        };
        let reference =
            |t: f64| seen_by_brute_force(&site.faces, &eye, &site_point(&view, edge, &curve, t));
        // Samples a quarter of a pixel apart, and where each lies in angle.
        let mut ts = vec![curve.t0];
        while *ts.last().unwrap() < curve.t1 {
            let t = *ts.last().unwrap();
            ts.push((t + step_for(&curve, t, 0.25 * PIXEL)).min(curve.t1));
        }
        let truth: Vec<bool> = ts.iter().map(|&t| reference(t)).collect();
        let angle_between = |a: f64, b: f64| {
            let (p, q) = (curve.position(a).normalize(), curve.position(b).normalize());
            p.cross(&q).norm().atan2(p.dot(&q))
        };
        for (i, &t) in ts.iter().enumerate() {
            tally.samples += 1;
            if renderer_sees(t) == truth[i] {
                continue;
            }
            tally.disagreeing += 1;
            // A disagreement must lie within a pixel of a true change of visibility.
            let near_change = ts
                .iter()
                .zip(&truth)
                .any(|(&u, &seen)| seen != truth[i] && angle_between(t, u) <= PIXEL);
            assert!(
                near_change,
                "{name}: edge {edge:?} disagrees at t = {t} far from any change"
            );
        }
        // Each change the renderer finds is within half a pixel of a true one: just before
        // it the reference agrees with the stretch before, just after with the stretch
        // after, at most half a pixel away (less where a stretch is shorter than that).
        for window in spans.windows(2) {
            let ((a, t, seen_before), (_, b, seen_after)) = (
                (window[0].0, window[0].1, window[0].2),
                (window[1].0, window[1].1, window[1].2),
            );
            // A stretch a hundredth of a pixel long cannot be seen in the drawing (it is
            // where a sight line grazes a face, at an edge's end): nothing to place.
            if angle_between(a, t) < 0.01 * PIXEL || angle_between(t, b) < 0.01 * PIXEL {
                continue;
            }
            tally.transitions += 1;
            let reach = step_for(&curve, t, 0.5 * PIXEL);
            let before = t - reach.min(0.5 * (t - a));
            let after = t + reach.min(0.5 * (b - t));
            assert!(
                reference(before) == seen_before && reference(after) == seen_after,
                "{name}: the change at t = {t} on {edge:?} has no true change within half a pixel"
            );
        }
    }
    let agreement = 1.0 - tally.disagreeing as f64 / tally.samples as f64;
    assert!(
        agreement >= 0.995,
        "{name}: {} of {} samples disagree ({:.3} % agreement)",
        tally.disagreeing,
        tally.samples,
        100.0 * agreement
    );
    assert!(
        tally.transitions > 0,
        "{name}: nothing was hidden, a test of nothing"
    );
    eprintln!(
        "{name}: {} samples, {:.3} % agree, {} changes placed within half a pixel",
        tally.samples,
        100.0 * agreement,
        tally.transitions
    );
}

fn scene(path: &str) -> Site {
    load_scene(&Path::new(env!("CARGO_MANIFEST_DIR")).join(path)).unwrap()
}

#[test]
fn a_tower_in_front_of_a_hall() {
    let site = parse_scene(
        b"Scene(standpoints: [(name: \"street\", x: 2, y: -14, heading: 5)], items: [
            Block(label: \"hall\", at: Corner(-10, 0), width: 20, depth: 10, height: 8,
                  roof: Gable(ridge: 12, overhang: 0.4),
                  openings: [(wall: Front, count: 5, width: 1.2, height: 2, sill: 1, reveal: 0.3)]),
            Tower(label: \"tower\", at: (1, -5), diameter: 3, height: 14, roof: Cone(height: 4)),
            Column(at: (-4, -8), diameter: 0.5, height: 4),
        ])",
        Path::new("tower.ron"),
        "tower",
    )
    .unwrap();
    check_scene("tower", &site, &site.standpoints[0], 1);
}

#[test]
fn a_plinth_on_a_slope_hides_and_is_hidden() {
    // A hall on a plinth with course lines on a slope, and a lower block behind it: the
    // plinth's faces (closed along the foot) hide the block's foot, and the ground hides
    // what lies below it, against the brute-force ray caster.
    let site = parse_scene(
        b"Scene(standpoints: [(name: \"below\", x: 4, y: -6, heading: 10)],
               ground: (spots: [(-40, -20, 0), (40, -20, 0), (-40, 60, 6), (40, 60, 6)]),
               items: [
            Block(at: Centre(3, 22), width: 8, depth: 12, height: 6, on_ground: true,
                  plinth: (course: 0.3), roof: Gable(ridge: 9, along: Depth)),
            Block(at: Centre(4, 34), width: 14, depth: 5, height: 3, on_ground: true),
        ])",
        Path::new("plinth.ron"),
        "plinth",
    )
    .unwrap();
    check_scene("plinth", &site, &site.standpoints[0], 1);
}

#[test]
fn a_plinth_standing_out_or_set_back_hides_and_is_hidden() {
    // A ledge round a hall on a projecting plinth, and the underside of a hall overhanging
    // a plinth set back under it, seen from a little above its floor and from below it: their faces (with the
    // walls' plan as a hole) hide and are hidden like any other, against the brute-force
    // ray caster.
    for projection in ["0.6", "-0.4"] {
        let text = format!(
            "Scene(standpoints: [(name: \"above\", x: 6, y: 10, heading: 10),
                                 (name: \"below\", x: 5, y: 2, heading: 10)],
                   ground: (spots: [(-40, -20, 0), (40, -20, 0), (-40, 60, 6), (40, 60, 6)]),
                   items: [
                Block(at: Centre(3, 22), width: 8, depth: 12, height: 6, on_ground: true,
                      plinth: (course: 0.3, projection: {projection}),
                      roof: Gable(ridge: 9, along: Depth)),
                Block(at: Centre(4, 34), width: 14, depth: 5, height: 3, on_ground: true),
            ])"
        );
        let site = parse_scene(text.as_bytes(), Path::new("ledge.ron"), "ledge").unwrap();
        // Eyes 0.2 m above the floor (3.6 m or more) and 0.6 m below it.
        for standpoint in &site.standpoints {
            check_scene("ledge", &site, standpoint, 1);
        }
    }
}

#[test]
fn round_items_arcades_and_stairs_standing_on_a_slope_hide_and_are_hidden() {
    // A tower, a column, a dome, an arcade and a flight of steps with `on_ground` on a
    // slope: their walls run down into it and the ground hides what lies below it; the
    // round items' foot lines (ellipse arcs lying on the ground) and the piers' and the
    // flight's are seen where nothing stands in front, against the brute-force ray caster.
    let site = parse_scene(
        b"Scene(standpoints: [(name: \"below\", x: 4, y: -6, heading: 10)],
               ground: (spots: [(-40, -20, 0), (40, -20, 0), (-40, 60, 6), (40, 60, 6)],
                        contours: [(height: 2, points: [(-40, 10), (0, 12), (40, 10)])]),
               items: [
            Tower(at: (-2, 14), diameter: 5, height: 8, on_ground: true, roof: Cone(height: 3)),
            Column(at: (6, 4), diameter: 0.8, height: 3, on_ground: true),
            Dome(at: (12, 20), diameter: 6, drum: 2, on_ground: true),
            Arcade(at: Corner(-12, 2), count: 3, span: 2, springing: 2, pier: 0.6,
                   thickness: 0.5, on_ground: true),
            Stairs(at: (4, 0), bearing: 0, steps: 6, rise: 0.15, going: 0.35, width: 2,
                   on_ground: true),
        ])",
        Path::new("standing.ron"),
        "standing",
    )
    .unwrap();
    check_scene("standing", &site, &site.standpoints[0], 1);
}

#[test]
fn a_round_tower_with_recessed_openings() {
    // Square-headed openings set 0.5 into a round tower (their sills and lintels arcs of
    // its circle): their reveals and backs hide and are hidden like any face, and the
    // hall behind is hidden by the tower, against the brute-force ray caster.
    let site = parse_scene(
        b"Scene(standpoints: [(name: \"lane\", x: 4, y: -16, heading: 350)], items: [
            Block(at: Corner(-10, 6), width: 20, depth: 8, height: 7, roof: Gable(ridge: 10)),
            Tower(at: (0, 0), diameter: 6, height: 12, storeys: [4, 8], roof: Cone(height: 4),
                  openings: [(count: 4, facing: 170, width: 1.2, height: 2, sill: 1,
                              rows: 2, row_step: 4, reveal: 0.5)]),
        ])",
        Path::new("round-tower.ron"),
        "round tower",
    )
    .unwrap();
    check_scene("round tower", &site, &site.standpoints[0], 1);
}

#[test]
fn an_interior_with_columns() {
    let site = scene("scenes/wexcombe-corn-exchange.ron");
    for standpoint in &site.standpoints {
        check_scene(&standpoint.name, &site, standpoint, 3);
    }
}

#[test]
fn a_standpoint_inside_an_arcade() {
    let site = scene("scenes/wexcombe-square.ron");
    check_scene("loggia", &site, site.standpoint("loggia").unwrap(), 4);
}

#[test]
fn looking_out_through_a_pointed_window_and_an_oculus() {
    // Inside a room, facing its front wall: a pointed window (and, on the left, a round
    // one) through a wall 0.4 thick; a hall across the street and a tower beyond the
    // left wall are seen through them and hidden by the walls round them.
    let site = parse_scene(
        b"Scene(standpoints: [(name: \"inside\", x: 3, y: 3.5, heading: 200)], items: [
            Room(at: Corner(0, 0), width: 6, depth: 5, height: 4,
                 openings: [(wall: Front, width: 1.6, height: 3, sill: 0.5, head: Pointed(),
                             reveal: 0.4, surround: 0.1)],
                 round_windows: [(wall: Left, centre: 2.2, diameter: 1.2, reveal: 0.4)]),
            Block(at: Corner(-4, -14), width: 14, depth: 4, height: 9, roof: Gable(ridge: 12),
                  openings: [(wall: Front, count: 4, width: 1.2, height: 2.2, sill: 1,
                              head: Semicircular, reveal: 0.2)]),
            Tower(at: (-7, 2.5), diameter: 3, height: 8, roof: Cone(height: 3)),
        ])",
        Path::new("window.ron"),
        "window",
    )
    .unwrap();
    check_scene("window", &site, &site.standpoints[0], 1);
}

/// A small town of gabled houses as an OBJ model (the benchmark's houses, 8 x 8 on a 14 m
/// grid, sizes from a fixed rule), streets along x = 0 and y = 0.
fn small_town() -> Site {
    use pansite::scene::{add_mesh, parse_obj, MeshPlacement};
    use std::fmt::Write;
    let mut text = String::new();
    for i in 0..8 {
        for j in 0..8 {
            let (cx, cy) = (
                -56.0 + 14.0 * (i as f64 + 0.5),
                -56.0 + 14.0 * (j as f64 + 0.5),
            );
            let k = (i * 8 + j) as f64;
            let (w, d) = (6.0 + (k * 0.37) % 4.0, 6.0 + (k * 0.53) % 4.0);
            let eaves = 4.0 + (k * 1.7) % 8.0;
            let ridge = eaves + 0.5 * w * (35.0 + (k * 3.1) % 10.0).to_radians().tan();
            let turn = ((k * 0.9) % 10.0 - 5.0).to_radians();
            let (c, s) = (turn.cos(), turn.sin());
            let at = |x: f64, y: f64| (cx + c * x - s * y, cy + s * x + c * y);
            let plan = [
                at(-w / 2.0, -d / 2.0),
                at(w / 2.0, -d / 2.0),
                at(w / 2.0, d / 2.0),
                at(-w / 2.0, d / 2.0),
            ];
            for z in [0.0, eaves] {
                for (x, y) in plan {
                    writeln!(text, "v {x} {y} {z}").unwrap();
                }
            }
            for (x, y) in [at(0.0, -d / 2.0), at(0.0, d / 2.0)] {
                writeln!(text, "v {x} {y} {ridge}").unwrap();
            }
            text.push_str(
                "f -10 -7 -8\nf -10 -8 -9\nf -9 -8 -4\nf -9 -4 -5\nf -7 -10 -6\nf -7 -6 -3\n\
                 f -10 -9 -5\nf -10 -5 -6\nf -6 -5 -2\nf -8 -7 -3\nf -8 -3 -4\nf -4 -3 -1\n\
                 f -6 -2 -1\nf -6 -1 -3\nf -5 -4 -1\nf -5 -1 -2\n",
            );
        }
    }
    let obj = parse_obj(text.as_bytes(), Path::new("town.obj")).unwrap();
    let mut site = Site::default();
    let placement = MeshPlacement {
        up: pansite::scene::UpAxis::Z,
        ..MeshPlacement::default()
    };
    add_mesh(&mut site, &obj, &placement, "town.obj");
    assert_eq!(site.faces.len(), 64 * 16);
    site
}

/// The small town seen from a street corner at 1.6 m: almost everything is hidden behind
/// the first row, the view the occlusion shortcuts are for.
#[test]
fn a_small_town_from_a_street_corner() {
    let site = small_town();
    let corner = Standpoint::from_degrees("corner", 0.0, 0.0, 1.6, 30.0, 0.0, 0.0);
    check_scene("small town", &site, &corner, 1);
}

/// The small town from the middle of a lane, the view pitched and rolled so that the
/// seam (azimuth 180) and both poles of the drawing fall on nearby walls and roofs: the
/// occlusion shortcuts across the seam and round the poles, against the ray caster.
#[test]
fn a_small_town_with_the_seam_and_the_poles_on_near_walls() {
    let site = small_town();
    let lane = Standpoint::from_degrees("lane", 0.0, 17.0, 1.6, 15.0, -15.0, 60.0);
    let view = ViewFrame::new(&lane);
    // The drawing's zenith and nadir, and its seam at three elevations, look at faces.
    let bvh = Bvh::new(&site.faces);
    for d in [
        Vector3::new(0.0, 0.0, 1.0),
        Vector3::new(0.0, 0.0, -1.0),
        Vector3::new(0.0, -1.0, 0.0),
        Vector3::new(0.0, -1.0, 0.6),
        Vector3::new(0.0, -1.0, -0.6),
    ] {
        let towards = view.direction_to_site(&d.normalize());
        let blocked = bvh.first_hit(&site.faces, &view.eye(), &towards, 1e9, |_, _, _| true);
        assert!(blocked.is_some(), "{d:?} looks at the sky");
        // And the map of certain cover has it, so the shortcuts are taken there.
        let occluders = Occluders::new(&site.faces, &bvh, &view);
        assert!(
            occluders.map().blockers(&d.normalize(), 1e9).is_some(),
            "{d:?} not in the map"
        );
    }
    check_scene("lane", &site, &lane, 1);
}
