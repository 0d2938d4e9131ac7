//! Cross-ratio invariance under central projection.
//!
//! Theorem (projective geometry; e.g. H. S. M. Coxeter, "Projective Geometry", 2nd ed.,
//! 1974, from memory, not confirmed here): if four collinear points A, B, C, D are joined to a
//! centre O not on their line, then
//! `(AC * BD) / (BC * AD) = (sin AOC * sin BOD) / (sin BOC * sin AOD)`.
//! (Each distance is `XY = OX * OY * sin XOY / h` with `h` the distance of O from the line;
//! the lengths OX cancel in the ratio.) The eye is the centre, the directions on the viewing
//! sphere are the rays, so the cross ratio read off the image must equal the one on the site,
//! whatever way the viewer faces.

use nalgebra::{Point3, Vector3};
use pansite::plane::{flatten, Equirect, PolylineSet};
use pansite::scene::Standpoint;
use pansite::sphere::{
    angle_between, azimuth_elevation, direction_from_azimuth_elevation, SphereCurve, ViewFrame,
};

mod common;
use common::{assert_near, distance_to_set};

/// The four site points: (-4, 6, 0) + t (2, 1, 0.5) at t = 0, 1, 3, 7.
fn points() -> [Point3<f64>; 4] {
    let origin = Point3::new(-4.0, 6.0, 0.0);
    let step = Vector3::new(2.0, 1.0, 0.5);
    [0.0, 1.0, 3.0, 7.0].map(|t| origin + step * t)
}

/// (heading, pitch, roll) in degrees: the answer must not depend on them.
const VIEWS: &[(f64, f64, f64)] = &[
    (0.0, 0.0, 0.0),
    (35.0, 10.0, 0.0),
    (-120.0, -25.0, 0.0),
    (200.0, 60.0, 15.0),
    (90.0, -80.0, -30.0),
    (163.0, 5.0, 170.0),
];

fn view(heading: f64, pitch: f64, roll: f64) -> ViewFrame {
    ViewFrame::new(&Standpoint::from_degrees(
        "e", 0.0, 0.0, 1.6, heading, pitch, roll,
    ))
}

fn cross_ratio_of_sines(d: &[Vector3<f64>; 4]) -> f64 {
    let s = |i: usize, j: usize| angle_between(&d[i], &d[j]).sin();
    // (sin AC sin BD) / (sin BC sin AD)
    (s(0, 2) * s(1, 3)) / (s(1, 2) * s(0, 3))
}

#[test]
fn cross_ratio_of_the_site_points_is_nine_sevenths() {
    let [a, b, c, d] = points();
    let ratio = ((c - a).norm() * (d - b).norm()) / ((c - b).norm() * (d - a).norm());
    // Arithmetic: the points sit at t = 0, 1, 3, 7 on one line, so
    // AC * BD / (BC * AD) = (3 * 6) / (2 * 7) = 18 / 14 = 9 / 7.
    assert_eq!((3.0 * 6.0) / (2.0 * 7.0), 9.0 / 7.0);
    assert_near(ratio, 9.0 / 7.0, 1e-14);
    // The eye (0, 0, 1.6) is not on the line (z = 1.6 at t = 3.2, where x = 2.4), as the
    // theorem needs.
    let at = Point3::new(-4.0, 6.0, 0.0) + Vector3::new(2.0, 1.0, 0.5) * 3.2;
    assert!((at - Point3::new(0.0, 0.0, 1.6)).norm() > 1.0);
}

#[test]
fn cross_ratio_of_the_image_directions_is_nine_sevenths_in_every_view() {
    let map = Equirect::from_size_px(4096.0, 2048.0);
    for &(heading, pitch, roll) in VIEWS {
        let frame = view(heading, pitch, roll);
        let directions = points().map(|p| frame.to_view(&p));
        // Source: the cross-ratio theorem (module docs), with the 9/7 computed above.
        assert_near(cross_ratio_of_sines(&directions), 9.0 / 7.0, 1e-12);
        // The same from the image: each direction to its pixel and back.
        let from_image = directions.map(|d| {
            let (azimuth, elevation) = azimuth_elevation(&d);
            let (r, e) = map.to_angles(map.to_image(azimuth, elevation));
            direction_from_azimuth_elevation(r, e)
        });
        assert_near(cross_ratio_of_sines(&from_image), 9.0 / 7.0, 1e-12);
    }
}

/// The cross ratio check can fail: move C off the line by 1 cm and the ratio moves.
#[test]
fn cross_ratio_notices_a_point_off_the_line() {
    let frame = view(35.0, 10.0, 0.0);
    let mut p = points();
    p[2].z += 0.01;
    let directions = p.map(|q| frame.to_view(&q));
    let ratio = cross_ratio_of_sines(&directions);
    assert!((ratio - 9.0 / 7.0).abs() > 1e-6, "{ratio}");
}

/// B and C, projected on their own, lie on the drawn image of the segment A..D: within the
/// flattening tolerance (0.1 px, the library's definition of "tolerance") of its polyline.
#[test]
fn inner_points_lie_on_the_flattened_arc() {
    let map = Equirect::from_size_px(4096.0, 2048.0);
    let tolerance = 0.1;
    for &(heading, pitch, roll) in VIEWS {
        let frame = view(heading, pitch, roll);
        let [a, b, c, d] = points().map(|p| frame.to_view(&p));
        let arc = SphereCurve::great_arc(&a, &d).unwrap();
        let mut set = PolylineSet::new();
        flatten(&arc, map, tolerance, &mut set);
        for inner in [b, c] {
            let (azimuth, elevation) = azimuth_elevation(&inner);
            let p = map.to_image(azimuth, elevation);
            let distance = distance_to_set(p, &set);
            assert!(
                distance <= tolerance,
                "view ({heading}, {pitch}, {roll}): {p:?} is {distance} px from the arc"
            );
        }
        // And the check can fail: a point 1 cm above C is farther than the tolerance.
        let above_c = frame.to_view(&(points()[2] + Vector3::new(0.0, 0.0, 0.01)));
        let (azimuth, elevation) = azimuth_elevation(&above_c);
        let off = distance_to_set(map.to_image(azimuth, elevation), &set);
        assert!(off > tolerance, "view ({heading}, {pitch}, {roll}): {off}");
    }
}
