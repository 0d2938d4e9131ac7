//! One hidden-line case worked by plane trigonometry, with none of the visibility code's
//! faces, slack, silhouettes or intersection routine: a wall in front of a post, drawn by
//! the whole pipeline with hidden edges left out, and the post's hidden stretch found here
//! with similar triangles.
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
