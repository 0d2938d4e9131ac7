//! Flat areas of the site on the equirectangular image, as closed outlines to fill.
//!
//! Each side of a flat polygon is a great-circle arc on the viewing sphere, flattened like
//! any edge (cut at the seam and the poles). The pieces are joined in order and their
//! columns unwrapped (each point moved by a whole image width to lie within half a width
//! of the one before), so the outline is one closed curve on the unrolled cylinder: an area
//! across the seam runs past a border instead of streaking across the page. If the
//! unwrapped outline ends a whole width from where it began, the polygon surrounds a pole
//! (the ray from the eye straight up or down meets it), and it is closed along that
//! border row. Copies a width to either side are then cut to the image (Sutherland and
//! Hodgman), so each side of the seam gets its piece, and every piece is turned the same
//! way, so that overlapping areas fill as their union under the non-zero rule.

use super::{Flattener, ImagePoint, PolylineSet, Rect};
use crate::sphere::{SphereCurve, ViewFrame};
use nalgebra::{Point3, Vector3};

/// Outlines enclosing less than this (square pixels) are left out: a polygon seen edge-on.
const LEAST_AREA_PX2: f64 = 1e-6;

/// The closed outlines, inside the image, of the flat polygon `corners` (site frame, in
/// order around it) seen from `view`: one for each side of the seam it reaches.
pub fn area_outlines(
    view: &ViewFrame,
    flattener: &mut Flattener,
    corners: &[Point3<f64>],
) -> Vec<Vec<ImagePoint>> {
    let map = flattener.map();
    let (width, height) = (map.width(), map.height());
    let mut ring: Vec<ImagePoint> = Vec::new();
    let mut pieces = PolylineSet::new();
    for k in 0..corners.len() {
        let (a, b) = (corners[k], corners[(k + 1) % corners.len()]);
        let Some(arc) = SphereCurve::great_arc(&view.to_view(&a), &view.to_view(&b)) else {
            continue;
        };
        pieces = PolylineSet::new();
        flattener.flatten(&arc, &mut pieces);
        for p in pieces.iter().flatten() {
            let x = match ring.last() {
                Some(last) => p.x + width * ((last.x - p.x) / width).round(),
                None => p.x,
            };
            ring.push(ImagePoint::new(x, p.y));
        }
    }
    drop(pieces);
    if ring.len() < 3 {
        return Vec::new();
    }
    let (first, last) = (ring[0], ring[ring.len() - 1]);
    let turns = ((last.x - first.x) / width).round();
    if turns != 0.0 {
        let border = if surrounds(view, corners, &Vector3::z()) {
            0.0
        } else {
            height
        };
        ring.push(ImagePoint::new(last.x, border));
        ring.push(ImagePoint::new(first.x, border));
    }
    let (lo, hi) = ring
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), p| {
            (l.min(p.x), h.max(p.x))
        });
    let image = Rect::from_ltrb(0.0, 0.0, width, height);
    let mut out = Vec::new();
    let (first_shift, last_shift) = (
        (-hi / width).floor() as i64,
        ((width - lo) / width).ceil() as i64,
    );
    for shift in first_shift..=last_shift {
        let moved: Vec<ImagePoint> = ring
            .iter()
            .map(|p| ImagePoint::new(p.x + shift as f64 * width, p.y))
            .collect();
        let mut piece = image.clip_polygon(&moved);
        let area = signed_area(&piece);
        if area.abs() > LEAST_AREA_PX2 {
            if area < 0.0 {
                piece.reverse();
            }
            out.push(piece);
        }
    }
    out
}

/// The signed area of a closed polygon by the shoelace formula, positive when
/// it turns clockwise on the image (y down).
pub fn signed_area(ring: &[ImagePoint]) -> f64 {
    let n = ring.len();
    (0..n)
        .map(|k| {
            let (a, b) = (ring[k], ring[(k + 1) % n]);
            a.x * b.y - b.x * a.y
        })
        .sum::<f64>()
        / 2.0
}

/// Whether the ray from the eye along the view's `up` (view frame) meets the flat polygon.
fn surrounds(view: &ViewFrame, corners: &[Point3<f64>], up: &Vector3<f64>) -> bool {
    let d = view.direction_to_site(up);
    let eye = view.eye();
    let n = (1..corners.len().saturating_sub(1)).fold(Vector3::zeros(), |n, k| {
        n + (corners[k] - corners[0]).cross(&(corners[k + 1] - corners[0]))
    });
    let along = n.dot(&d);
    if along.abs() < 1e-15 {
        return false;
    }
    let t = n.dot(&(corners[0] - eye)) / along;
    if t <= 0.0 {
        return false;
    }
    let hit = eye + d * t;
    // Inside: the hit is on the same side of every side (the polygon's turn about n);
    // the polygons drawn are convex.
    (0..corners.len()).all(|k| {
        let (a, b) = (corners[k], corners[(k + 1) % corners.len()]);
        (b - a).cross(&(hit - a)).dot(&n) >= 0.0
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plane::Equirect;
    use crate::scene::Standpoint;

    fn view() -> ViewFrame {
        ViewFrame::new(&Standpoint::from_degrees(
            "test", 0.0, 0.0, 1.5, 0.0, 0.0, 0.0,
        ))
    }

    #[test]
    fn a_square_across_the_seam_is_cut_in_two_without_a_streak() {
        // A square on the ground straight behind the viewer (heading 0 looks north, so the
        // seam is due south): half of it on each side of the seam.
        let view = view();
        let map = Equirect::from_size_px(360.0, 180.0);
        let mut flattener = Flattener::new(map, 0.1);
        let square = [(-1.0, -6.0), (1.0, -6.0), (1.0, -4.0), (-1.0, -4.0)]
            .map(|(x, y)| Point3::new(x, y, 0.0));
        let rings = area_outlines(&view, &mut flattener, &square);
        assert_eq!(rings.len(), 2, "{rings:?}");
        for ring in &rings {
            let (lo, hi) = ring
                .iter()
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), p| {
                    (l.min(p.x), h.max(p.x))
                });
            // Each piece hugs a border: no piece spans the middle of the page.
            assert!(hi - lo < 60.0, "{ring:?}");
            assert!(lo < 1e-9 || hi > 360.0 - 1e-9, "{ring:?}");
            assert!(signed_area(ring) > 0.0);
        }
    }

    #[test]
    fn a_square_under_the_viewer_closes_along_the_bottom() {
        let view = view();
        let map = Equirect::from_size_px(360.0, 180.0);
        let mut flattener = Flattener::new(map, 0.1);
        let square = [(-2.0, -2.0), (2.0, -2.0), (2.0, 2.0), (-2.0, 2.0)]
            .map(|(x, y)| Point3::new(x, y, 0.0));
        let rings = area_outlines(&view, &mut flattener, &square);
        // The whole bottom of the sheet below the square's image, by plane trigonometry: the
        // nearest side is 2 m away at 1.5 m below the eye, the corners 2.83 m away; so the
        // band below elevation -atan(1.5 / 2.83) = -27.9 degrees is all inside, and its
        // area is at least 360 x (90 - 36.9) pixels (the sides' nearest, -atan(1.5/2)).
        // (The outline may be cut where the unrolled outline met the border: its pieces
        // add up.)
        let area: f64 = rings.iter().map(|r| signed_area(r)).sum();
        assert!(
            rings.iter().all(|r| r.iter().any(|p| p.y == 180.0)),
            "{rings:?}"
        );
        let least = 360.0 * (90.0 - 1.5f64.atan2(2.0).to_degrees());
        let most = 360.0 * (90.0 - 1.5f64.atan2(8f64.sqrt()).to_degrees());
        assert!(area > least && area < most, "{area} not in {least}..{most}");
    }
}
