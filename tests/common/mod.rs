//! Helpers shared by the integration tests.
#![allow(dead_code)]

use pansite::plane::{ImagePoint, PolylineSet};

/// Asserts `|a - b| <= eps`, printing both values and the difference.
#[track_caller]
pub fn assert_near(a: f64, b: f64, eps: f64) {
    assert!(
        (a - b).abs() <= eps,
        "{a:.17e} vs {b:.17e}: differ by {:.3e} > {eps:.3e}",
        (a - b).abs()
    );
}

/// Distance (pixels) from `p` to the segment from `a` to `b`.
pub fn distance_to_segment(p: ImagePoint, a: ImagePoint, b: ImagePoint) -> f64 {
    let (dx, dy) = (b.x - a.x, b.y - a.y);
    let length2 = dx * dx + dy * dy;
    let s = if length2 > 0.0 {
        (((p.x - a.x) * dx + (p.y - a.y) * dy) / length2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    (p.x - a.x - s * dx).hypot(p.y - a.y - s * dy)
}

/// Distance (pixels) from `p` to the nearest segment (or lone point) of any polyline.
pub fn distance_to_polylines<'a>(
    p: ImagePoint,
    lines: impl IntoIterator<Item = &'a [ImagePoint]>,
) -> f64 {
    let mut best = f64::INFINITY;
    for line in lines {
        if line.len() == 1 {
            best = best.min((p.x - line[0].x).hypot(p.y - line[0].y));
        }
        for w in line.windows(2) {
            best = best.min(distance_to_segment(p, w[0], w[1]));
        }
    }
    best
}

/// The same for a [`PolylineSet`].
pub fn distance_to_set(p: ImagePoint, set: &PolylineSet) -> f64 {
    distance_to_polylines(p, set.iter())
}
