//! Cutting polylines to a rectangle, and moving them.

use crate::plane::{ImagePoint, PolylineSet};

pub use crate::plane::Rect;

/// The part of the segment from `a` to `b` inside `rect`, as parameters `(t0, t1)` along
/// it, if any (Liang and Barsky, "A new concept and method for line clipping", ACM
/// Transactions on Graphics 3(1), 1984).
pub fn clip_segment(a: ImagePoint, b: ImagePoint, rect: &Rect) -> Option<(f64, f64)> {
    let (dx, dy) = (b.x - a.x, b.y - a.y);
    let (mut t0, mut t1) = (0.0f64, 1.0f64);
    for (p, q) in [
        (-dx, a.x - rect.left),
        (dx, rect.right - a.x),
        (-dy, a.y - rect.top),
        (dy, rect.bottom - a.y),
    ] {
        if p == 0.0 {
            if q < 0.0 {
                return None;
            }
        } else {
            let r = q / p;
            if p < 0.0 {
                t0 = t0.max(r);
            } else {
                t1 = t1.min(r);
            }
        }
    }
    (t0 <= t1).then_some((t0, t1))
}

/// The polylines cut to `rect` and moved by `(dx, dy)`: a polyline that leaves the
/// rectangle and comes back becomes two.
pub fn clip_and_move(lines: &PolylineSet, rect: &Rect, dx: f64, dy: f64) -> PolylineSet {
    let mut out = PolylineSet::new();
    let mut piece: Vec<ImagePoint> = Vec::new();
    let moved = |p: ImagePoint| ImagePoint::new(p.x + dx, p.y + dy);
    let at = |a: ImagePoint, b: ImagePoint, t: f64| {
        ImagePoint::new(a.x + (b.x - a.x) * t, a.y + (b.y - a.y) * t)
    };
    for line in lines.iter() {
        piece.clear();
        for pair in line.windows(2) {
            let (a, b) = (pair[0], pair[1]);
            match clip_segment(a, b, rect) {
                Some((t0, t1)) => {
                    if t0 > 0.0 || piece.is_empty() {
                        if piece.len() >= 2 {
                            out.push(&piece);
                        }
                        piece.clear();
                        piece.push(moved(at(a, b, t0)));
                    }
                    piece.push(moved(at(a, b, t1)));
                    if t1 < 1.0 {
                        if piece.len() >= 2 {
                            out.push(&piece);
                        }
                        piece.clear();
                    }
                }
                None => {
                    if piece.len() >= 2 {
                        out.push(&piece);
                    }
                    piece.clear();
                }
            }
        }
        if piece.len() >= 2 {
            out.push(&piece);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_line_through_a_box_is_cut_at_its_sides() {
        let rect = Rect {
            left: 0.0,
            top: 0.0,
            right: 10.0,
            bottom: 10.0,
        };
        let mut lines = PolylineSet::new();
        lines.push(&[
            ImagePoint::new(-5.0, 5.0),
            ImagePoint::new(5.0, 5.0),
            ImagePoint::new(15.0, 5.0),
            ImagePoint::new(15.0, 8.0),
            ImagePoint::new(5.0, 8.0),
        ]);
        let out = clip_and_move(&lines, &rect, 100.0, 0.0);
        let pieces: Vec<Vec<ImagePoint>> = out.iter().map(|l| l.to_vec()).collect();
        assert_eq!(
            pieces,
            vec![
                vec![
                    ImagePoint::new(100.0, 5.0),
                    ImagePoint::new(105.0, 5.0),
                    ImagePoint::new(110.0, 5.0)
                ],
                vec![ImagePoint::new(110.0, 8.0), ImagePoint::new(105.0, 8.0)],
            ]
        );
    }
}
