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

#[cfg(test)]
mod tests {
    use super::*;

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

    #[test]
    fn clipping_a_square_in_half() {
        let square = [v(0.0, 0.0), v(2.0, 0.0), v(2.0, 2.0), v(0.0, 2.0)];
        let half = clip_polygon(&square, |p| 1.0 - p.x);
        assert!((twice_signed_area(&half) - 4.0).abs() < 1e-12, "{half:?}");
    }
}
