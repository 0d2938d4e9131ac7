//! The standing eye height against the figures the scene format cites for it: the
//! 50th-percentile standing eye heights of British adults aged 19 to 65 in S. Pheasant and
//! C. M. Haslegrave, *Bodyspace*, 3rd ed. (CRC Press, 2006), table of standing dimensions:
//! men 1630 mm, women 1505 mm; 5th to 95th percentiles men 1515 to 1745 mm, women 1410 to
//! 1600 mm (all from memory, not confirmed here).

use pansite::scene::{parse_scene, DEFAULT_EYE_HEIGHT};
use std::path::Path;

const MEN_P50_MM: f64 = 1630.0;
const WOMEN_P50_MM: f64 = 1505.0;
const MEN_P5_MM: f64 = 1515.0;
const WOMEN_P95_MM: f64 = 1600.0;

#[test]
fn the_standing_eye_height_lies_among_the_cited_figures() {
    let eye_mm = DEFAULT_EYE_HEIGHT * 1000.0;
    // Between the two medians, and within 5 cm of their mean (1567.5 mm)...
    assert!((WOMEN_P50_MM..=MEN_P50_MM).contains(&eye_mm), "{eye_mm} mm");
    assert!(
        (eye_mm - (MEN_P50_MM + WOMEN_P50_MM) / 2.0).abs() <= 50.0,
        "{eye_mm} mm"
    );
    // ... and inside the middle 90 per cent of both men and women.
    assert!((MEN_P5_MM..=WOMEN_P95_MM).contains(&eye_mm), "{eye_mm} mm");
}

#[test]
fn a_standing_viewer_without_an_eye_height_gets_it() {
    let site = parse_scene(
        b"Scene(standpoints: [(name: \"s\", x: 0, y: 0, ground: 2)], items: [])",
        Path::new("eye.ron"),
        "eye",
    )
    .unwrap();
    let s = &site.standpoints[0];
    assert_eq!(s.eye_height, DEFAULT_EYE_HEIGHT);
    assert!((s.eye().z - (2.0 + 1.6)).abs() < 1e-12);
}
