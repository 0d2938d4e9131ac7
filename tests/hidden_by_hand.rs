//! Hidden-line cases worked by plane trigonometry, with none of the visibility code's
//! faces, slack, silhouettes or intersection routine: a wall in front of a post, drawn by
//! the whole pipeline with hidden edges left out, and the post's hidden stretch found here
//! with similar triangles. A ridge of the sloping ground in front of a post is worked the
//! same way further down.
//!
//! The eye is at (0, 0, 1.5). The wall is a block 4 m wide (x from -2 to 2), 0.2 m thick
//! (y from 10 to 10.2), 3 m high. The post is a vertical line at (1, 20) from the ground to
//! 5 m. The sight line to the post runs in plan from (0, 0) to (1, 20) and meets the wall's
//! face y = 10 at x = 0.5, inside the wall, at the plan distance r = |(0.5, 10)|, exactly
//! half the post's d = |(1, 20)|. A sight line to the post's point at height z rises by
//! (z - 1.5) over d, so at the wall's face it is at 1.5 + (z - 1.5) / 2; the wall hides the
//! point while that is between 0 and 3: for every z from 0 (where it is 0.75) up to
//! z = 1.5 + 2 x 1.5 = 4.5 m. Above 4.5 m the sight line passes over the wall's near top
//! edge and, rising, over its far one too. So the drawing shows the post from 4.5 m to 5 m
//! and nothing of it below.

mod common;
use common::{distance_to_polylines, predicted_pixel};
use pansite::drawing::{hidden_dash_px, HIDDEN};
use pansite::plane::{ImagePoint, PolylineSet};
use pansite::render::{draw, RenderSettings};
use pansite::scene::{parse_scene, HiddenEdges};
use std::path::Path;

const SCENE: &str = r#"Scene(
    standpoints: [(name: "here", x: 0, y: 0, eye_height: 1.5)],
    items: [
        Block(at: Corner(-2, 10), width: 4, depth: 0.2, height: 3),
        Line(from: (1, 20, 0), to: (1, 20, 5)),
    ],
)"#;

/// The height (metres) above which the post is seen, by the similar triangles above.
const EMERGES_AT: f64 = 1.5 + 1.5 * 2.0;

#[test]
fn a_post_behind_a_wall_is_hidden_up_to_the_height_plane_trigonometry_gives() {
    // The plan distances really are in the ratio 2 (the case's premise).
    assert!((1f64.hypot(20.0) / 0.5f64.hypot(10.0) - 2.0).abs() < 1e-15);
    let site = parse_scene(SCENE.as_bytes(), Path::new("wall.ron"), "wall").unwrap();
    let (w, h) = (4096.0, 2048.0);
    let settings = RenderSettings {
        width: w as u32,
        height: h as u32,
        overlays: false,
        hidden: Some(HiddenEdges::Off),
        ..RenderSettings::default()
    };
    let drawing = draw(&site, &site.standpoints[0], &settings)
        .unwrap()
        .drawing;
    let mut lines = PolylineSet::new();
    for layer in &drawing.layers {
        lines.append(&mut layer.lines.clone());
    }
    let on_drawing = |z: f64| {
        let (x, y) = predicted_pixel([0.0, 0.0, 1.5], (0.0, 0.0, 0.0), [1.0, 20.0, z], w, h);
        distance_to_polylines(ImagePoint::new(x, y), lines.iter())
    };
    // One pixel is 0.088 degrees here; 5 cm of the post is 0.14 degrees, 1.6 pixels.
    let mut hidden = 0;
    for k in 0..=89 {
        // From the ground to 4.45 m, 5 cm below where the post emerges.
        let z = k as f64 * 0.05;
        assert!(
            on_drawing(z) > 0.5,
            "the post is drawn at {z} m, behind the wall"
        );
        hidden += 1;
    }
    let mut seen = 0;
    for k in 0..=8 {
        let z = EMERGES_AT + 0.05 + k as f64 * 0.05;
        assert!(
            on_drawing(z) < 0.2,
            "the post is missing at {z} m, above the wall"
        );
        seen += 1;
    }
    assert_eq!((hidden, seen), (90, 9));
}

/// A ridge of the sloping ground in front of a post, worked the same way. The ground is
/// level (height 0) to y = 5, rises in one plane to a straight level crest along y = 10 at
/// 3 m, falls in another to height 0 at y = 20 and is level again beyond; the crest and the
/// two feet of the slopes are break lines, so the triangles meet along them. The eye is at
/// (0, 0, 1.5); the post is a vertical line at (3, 30) from the ground (0 there) to 8 m.
/// The sight line to the post runs in plan from (0, 0) to (3, 30) and crosses the crest at
/// (1, 10), at the plan distance r = |(1, 10)|, a third of the post's d = |(3, 30)|. A sight
/// line to the post's point at height z is at 1.5 + (z - 1.5) / 3 over the crest, so the
/// ridge hides the point while that is under 3 m: up to z = 1.5 + 3 x (3 - 1.5) = 6 m.
/// Higher sight lines clear the crest and, rising, clear both slopes (each is a plane that
/// lies under the line at the crest and at the slope's other foot). Only the ground's
/// triangles stand between the eye and the post.
const RIDGE: &str = r#"Scene(
    standpoints: [(name: "here", x: 0, y: 0, ground: 0, eye_height: 1.5)],
    ground: (
        spots: [(-20, -10, 0), (20, -10, 0), (-20, 40, 0), (20, 40, 0)],
        break_lines: [[(-20, 5, 0), (20, 5, 0)], [(-20, 10, 3), (20, 10, 3)],
                      [(-20, 20, 0), (20, 20, 0)]],
        draw: Outline,
    ),
    items: [Line(from: (3, 30, 0), to: (3, 30, 8))],
)"#;

#[test]
fn a_post_beyond_a_ridge_of_the_ground_is_hidden_up_to_the_height_plane_trigonometry_gives() {
    // Plane trigonometry, similar triangles: the sight line over the crest (height 3 m at
    // the plan distance r) from the eye at 1.5 m reaches the post's plan distance d at
    // 1.5 + (3 - 1.5) d / r.
    let (eye, crest) = (1.5, 3.0);
    let (r, d) = (1f64.hypot(10.0), 3f64.hypot(30.0));
    let emerges_at = eye + (crest - eye) * d / r;
    assert!((emerges_at - 6.0).abs() < 1e-12);

    let site = parse_scene(RIDGE.as_bytes(), Path::new("ridge.ron"), "ridge").unwrap();
    let (w, h) = (4096.0, 2048.0);
    let settings = RenderSettings {
        width: w as u32,
        height: h as u32,
        overlays: false,
        hidden: Some(HiddenEdges::Faint),
        ..RenderSettings::default()
    };
    let drawing = draw(&site, &site.standpoints[0], &settings)
        .unwrap()
        .drawing;
    // The post is a meridian of the viewing sphere: one column of the drawing. The ridge's
    // lines cross that column but never run along it.
    let column = predicted_pixel([0.0, 0.0, eye], (0.0, 0.0, 0.0), [3.0, 30.0, 0.0], w, h).0;
    let post_rows = |hidden: bool| -> Vec<f64> {
        drawing
            .layers
            .iter()
            .filter(|layer| (layer.name == HIDDEN) == hidden)
            .flat_map(|layer| layer.lines.iter())
            .filter(|line| line.iter().all(|p| (p.x - column).abs() < 0.5))
            .flat_map(|line| line.iter().map(|p| p.y))
            .collect()
    };
    // Back from a row of the drawing to a height on the post: elevation from the row, then
    // the height where that sight line meets the post, d away.
    let height_at_row = |y: f64| eye + d * ((h / 2.0 - y) * 180.0 / h).to_radians().tan();
    let (seen, hidden) = (post_rows(false), post_rows(true));
    assert!(!seen.is_empty(), "nothing of the post is drawn as seen");
    assert!(!hidden.is_empty(), "nothing of the post is drawn as hidden");
    let lowest_seen = height_at_row(seen.iter().copied().fold(f64::MIN, f64::max));
    let highest_seen = height_at_row(seen.iter().copied().fold(f64::MAX, f64::min));
    let lowest_hidden = height_at_row(hidden.iter().copied().fold(f64::MIN, f64::max));
    let highest_hidden = height_at_row(hidden.iter().copied().fold(f64::MAX, f64::min));
    eprintln!(
        "ridge: seen from {lowest_seen:.6} to {highest_seen:.6} m, hidden (dashed) from \
         {lowest_hidden:.6} to {highest_hidden:.6} m; plane trigonometry: hidden up to \
         {emerges_at} m"
    );
    // One pixel is 0.088 degrees here, 4.6 cm of the post at d = 30.15 m; the post is
    // drawn from where it emerges to within a tenth of that.
    let pixel = d * (180.0 / h).to_radians();
    assert!(
        (lowest_seen - emerges_at).abs() < 0.1 * pixel,
        "the post is seen from {lowest_seen} m, not from {emerges_at} m"
    );
    assert!((highest_seen - 8.0).abs() < 1e-6 * d);
    // The hidden stretch is dashed: it runs from the foot to within one dash and gap under
    // where the post emerges, and never above it.
    let (on, off) = hidden_dash_px(settings.line_weight_px);
    assert!(lowest_hidden.abs() < (on + off) * pixel);
    assert!(
        highest_hidden <= emerges_at + 0.01 * pixel
            && highest_hidden > emerges_at - (on + off) * pixel,
        "the post's hidden stretch ends at {highest_hidden} m, not at {emerges_at} m"
    );
}
