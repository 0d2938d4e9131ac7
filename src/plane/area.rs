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
        let (ends_a, ends_b) = (view.to_view(&a), view.to_view(&b));
        let Some(arc) = SphereCurve::great_arc(&ends_a, &ends_b) else {
            // A side with an end at the eye, or through it, puts the polygon in a plane
            // through the eye: seen edge-on, it covers nothing (its other sides would
            // close into a sliver). A side seen end-on is only skipped.
            if ends_a.dot(&ends_b) <= 0.0 {
                return Vec::new();
            }
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

    /// Square pixels of image (one pixel a degree) that a wall 5 m off, 2 m wide, from eye
    /// height (1.5 m) up to 3 m, covers between azimuths `from` and `to` (degrees from the
    /// direction square to it), by plane trigonometry: at azimuth `a` the wall is `5 / cos
    /// a` away, so its top stands at elevation `atan(1.5 cos a / 5)` and its foot on the
    /// horizon; the area is the integral of that elevation, by Simpson's rule.
    fn wall_area_by_hand(from: f64, to: f64) -> f64 {
        let steps = 1000;
        let h = (to - from).to_radians() / steps as f64;
        let sum: f64 = (0..=steps)
            .map(|k| {
                let a = from.to_radians() + h * k as f64;
                let weight = if k == 0 || k == steps {
                    1.0
                } else if k % 2 == 1 {
                    4.0
                } else {
                    2.0
                };
                weight * (1.5 * a.cos() / 5.0).atan()
            })
            .sum();
        (sum * h / 3.0).to_degrees().to_degrees()
    }

    /// The wall's half-width in azimuth, degrees: atan(1 / 5).
    fn wall_reach() -> f64 {
        0.2f64.atan().to_degrees()
    }

    /// The wall's corners, its middle 5 m from the viewer at `bearing` degrees clockwise
    /// from north (the view's heading is 0), listed one way round or the other.
    fn wall(bearing: f64, reversed: bool) -> Vec<Point3<f64>> {
        let (s, c) = bearing.to_radians().sin_cos();
        let mut corners: Vec<Point3<f64>> = [(-1.0, 1.5), (1.0, 1.5), (1.0, 3.0), (-1.0, 3.0)]
            .iter()
            .map(|&(across, z)| Point3::new(5.0 * s + across * c, 5.0 * c - across * s, z))
            .collect();
        if reversed {
            corners.reverse();
        }
        corners
    }

    #[test]
    fn the_shoelace_area_of_a_right_triangle_is_half_its_legs_product() {
        // Legs of 4 and 3 px away from the origin: 6 px^2, positive going right then down
        // (clockwise on a y-down image), negative the other way round.
        let ring = [(1.0, 1.0), (5.0, 1.0), (5.0, 4.0)].map(|(x, y)| ImagePoint::new(x, y));
        assert_eq!(signed_area(&ring), 6.0);
        let mut back = ring.to_vec();
        back.reverse();
        assert_eq!(signed_area(&back), -6.0);
        // A square of side 2 px with a corner at (10, 20): 4 px^2.
        let square = [(10.0, 20.0), (12.0, 20.0), (12.0, 22.0), (10.0, 22.0)]
            .map(|(x, y)| ImagePoint::new(x, y));
        assert_eq!(signed_area(&square), 4.0);
    }

    #[test]
    fn a_wall_ahead_covers_the_area_worked_by_hand_either_way_round() {
        // Straight ahead, the middle column (x = 180): from 180 - 11.31 to 180 + 11.31,
        // between the horizon (y = 90) and its top, atan(1.5 / 5) = 16.70 degrees up in
        // the middle.
        let view = view();
        let map = Equirect::from_size_px(360.0, 180.0);
        // Flattened to 0.001 px, the top strays at most that far from its curve over
        // 22.6 px of width: at most 0.023 px^2 of area.
        let mut flattener = Flattener::new(map, 0.001);
        let expected = wall_area_by_hand(-wall_reach(), wall_reach());
        for reversed in [false, true] {
            let rings = area_outlines(&view, &mut flattener, &wall(0.0, reversed));
            assert_eq!(rings.len(), 1, "{rings:?}");
            let area = signed_area(&rings[0]);
            assert!((area - expected).abs() < 0.03, "{area} vs {expected}");
            for p in &rings[0] {
                assert!((p.x - 180.0).abs() <= wall_reach() + 1e-9, "{p:?}");
                assert!(p.y <= 90.0 + 1e-9 && p.y >= 90.0 - 16.7, "{p:?}");
            }
        }
    }

    #[test]
    fn a_wall_across_the_seam_keeps_its_area_in_two_pieces() {
        // Straight behind, and 10 degrees to either side of it: the seam (due south) cuts
        // the wall where its azimuth from the wall's middle is 0, 10 and -10 degrees. The
        // piece left of the seam lands at the right border, the rest at the left border;
        // each covers the area worked by hand between its azimuths.
        let view = view();
        let map = Equirect::from_size_px(360.0, 180.0);
        let mut flattener = Flattener::new(map, 0.001);
        let reach = wall_reach();
        for (bearing, cut) in [(180.0, 0.0), (170.0, 10.0), (190.0, -10.0)] {
            for reversed in [false, true] {
                let mut rings = area_outlines(&view, &mut flattener, &wall(bearing, reversed));
                assert_eq!(rings.len(), 2, "{bearing}: {rings:?}");
                rings.sort_by(|a, b| a[0].x.total_cmp(&b[0].x));
                let (left, right) = (&rings[0], &rings[1]);
                assert!(left.iter().all(|p| p.x <= reach - cut + 1e-9), "{left:?}");
                assert!(right.iter().all(|p| p.x >= 360.0 - reach - cut - 1e-9));
                let (a_left, a_right) = (signed_area(left), signed_area(right));
                let (e_left, e_right) = (
                    wall_area_by_hand(cut, reach),
                    wall_area_by_hand(-reach, cut),
                );
                assert!(
                    (a_left - e_left).abs() < 0.03,
                    "{bearing}: {a_left} vs {e_left}"
                );
                assert!(
                    (a_right - e_right).abs() < 0.03,
                    "{bearing}: {a_right} vs {e_right}"
                );
            }
        }
    }

    /// A square of side 4 m at height `z`, centred under or over the point (x, y), its
    /// corners anticlockwise seen from above, or clockwise.
    fn square_at(x: f64, y: f64, z: f64, clockwise: bool) -> Vec<Point3<f64>> {
        let mut corners: Vec<Point3<f64>> = [(-2.0, -2.0), (2.0, -2.0), (2.0, 2.0), (-2.0, 2.0)]
            .iter()
            .map(|&(dx, dy)| Point3::new(x + dx, y + dy, z))
            .collect();
        if clockwise {
            corners.reverse();
        }
        corners
    }

    #[test]
    fn the_ray_straight_up_meets_a_ceiling_over_the_eye_and_nothing_else() {
        // Standing 20 m from the origin each way, the eye 1.5 m up: a ceiling at 3 m over
        // the eye is met by the ray up, whichever way round its corners go; the floor
        // under the eye by the ray down only; a ceiling 10 m to the side by neither.
        let (up, down) = (Vector3::z(), -Vector3::z());
        for (x, y) in [(0.0, 20.0), (0.0, -20.0), (20.0, 0.0), (-20.0, 0.0)] {
            let view = ViewFrame::new(&Standpoint::from_degrees("test", x, y, 1.5, 0.0, 0.0, 0.0));
            for clockwise in [false, true] {
                let ceiling = square_at(x, y, 3.0, clockwise);
                let floor = square_at(x, y, 0.0, clockwise);
                let aside = square_at(x + 10.0, y, 3.0, clockwise);
                assert!(surrounds(&view, &ceiling, &up), "{x} {y} {clockwise}");
                assert!(!surrounds(&view, &ceiling, &down), "{x} {y} {clockwise}");
                assert!(surrounds(&view, &floor, &down), "{x} {y} {clockwise}");
                assert!(!surrounds(&view, &floor, &up), "{x} {y} {clockwise}");
                assert!(!surrounds(&view, &aside, &up), "{x} {y} {clockwise}");
            }
        }
    }

    #[test]
    fn the_ray_up_meets_a_sloping_roof_only_where_it_is_overhead() {
        // A roof rising northwards at 45 degrees, z = 3 + y, 4 m long east-west and 0.5 m
        // deep in plan: straight above the eye (y = 0) it is 3 m up, 1.5 m above the eye.
        // Moved 0.5 m north (y from 0.25 to 0.75) it is beside the ray and not over it.
        let view = view();
        let roof = |from: f64, to: f64| {
            [(-2.0, from), (2.0, from), (2.0, to), (-2.0, to)]
                .map(|(x, y)| Point3::new(x, y, 3.0 + y))
        };
        assert!(surrounds(&view, &roof(-0.25, 0.25), &Vector3::z()));
        assert!(!surrounds(&view, &roof(0.25, 0.75), &Vector3::z()));
        assert!(!surrounds(&view, &roof(-0.75, -0.25), &Vector3::z()));
    }

    #[test]
    fn a_ceiling_over_a_viewer_away_from_the_origin_closes_along_the_top() {
        // The mirror of the square under the viewer: the band above elevation
        // atan(1.5 / 2.83) = 27.9 degrees is all inside, and nothing below
        // atan(1.5 / 2) = 36.9 degrees is.
        let (x, y) = (0.0, 20.0);
        let view = ViewFrame::new(&Standpoint::from_degrees("test", x, y, 1.5, 0.0, 0.0, 0.0));
        let map = Equirect::from_size_px(360.0, 180.0);
        let mut flattener = Flattener::new(map, 0.1);
        for clockwise in [false, true] {
            let rings = area_outlines(&view, &mut flattener, &square_at(x, y, 3.0, clockwise));
            assert!(!rings.is_empty());
            assert!(
                rings.iter().all(|r| r.iter().any(|p| p.y == 0.0)),
                "{rings:?}"
            );
            let area: f64 = rings.iter().map(|r| signed_area(r)).sum();
            let least = 360.0 * (90.0 - 1.5f64.atan2(2.0).to_degrees());
            let most = 360.0 * (90.0 - 1.5f64.atan2(8f64.sqrt()).to_degrees());
            assert!(area > least && area < most, "{area} not in {least}..{most}");
        }
    }

    #[test]
    fn nothing_is_outlined_without_corners_or_seen_edge_on() {
        // No corners; every corner at the eye; a floor at eye height, seen edge-on (its
        // image is a stretch of the horizon, of no area).
        let view = view();
        let map = Equirect::from_size_px(360.0, 180.0);
        let mut flattener = Flattener::new(map, 0.1);
        assert!(area_outlines(&view, &mut flattener, &[]).is_empty());
        let eye = [view.eye(); 4];
        assert!(area_outlines(&view, &mut flattener, &eye).is_empty());
        let level = square_at(0.0, 6.0, 1.5, false);
        assert!(area_outlines(&view, &mut flattener, &level).is_empty());
    }

    #[test]
    fn a_triangle_with_a_corner_or_a_side_at_the_eye_is_seen_edge_on() {
        // The eye lies in its plane, so it is seen edge-on and covers nothing; but the one
        // or two sides not through the eye still draw a curve, and closing that curve by
        // a straight chord on the image would fill the sliver between them.
        let view = view();
        let map = Equirect::from_size_px(360.0, 180.0);
        let mut flattener = Flattener::new(map, 0.1);
        let eye = view.eye();
        // A corner at the eye, the other two on the ground 5 m ahead, 6 m apart.
        let corner = [eye, Point3::new(3.0, 5.0, 0.0), Point3::new(-3.0, 5.0, 0.0)];
        assert!(area_outlines(&view, &mut flattener, &corner).is_empty());
        // The eye in the middle of a side, 4 m west to 4 m east of it, the third corner on
        // the ground 5 m ahead: the other two sides run along one great circle, through
        // due west, 16.7 degrees below due north and due east.
        let side = [
            Point3::new(-4.0, 0.0, 1.5),
            Point3::new(4.0, 0.0, 1.5),
            Point3::new(0.0, 5.0, 0.0),
        ];
        assert!(area_outlines(&view, &mut flattener, &side).is_empty());
    }
}
