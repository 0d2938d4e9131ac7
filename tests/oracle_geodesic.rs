//! GeographicLib as an outside oracle for pansite's great-circle arithmetic.
//!
//! Oracle: C. F. F. Karney, "Algorithms for geodesics", Journal of Geodesy 87 (2013) 43-55,
//! as implemented by the `geographiclib-rs` crate (a port of GeographicLib), used here with
//! `Geodesic::new(1.0, 0.0)`: a sphere of radius 1, on which geodesics are great circles and
//! the distance `s12` is the central angle in radians (`a12` is the same angle in degrees).
//!
//! Dictionary: latitude = elevation, longitude = azimuth (degrees in GeographicLib, radians in
//! pansite). pansite embeds (azimuth, elevation) as `(cos el sin az, cos el cos az, sin el)`;
//! the usual geographic embedding is `(cos lat cos lon, cos lat sin lon, sin lat)`. The two
//! differ by swapping the first two coordinates, a reflection (orthogonal, determinant -1),
//! which preserves every angle between directions and maps great circles to great circles.
//! So every great-circle distance and every "lies on the geodesic" statement carries over
//! unchanged when points are exchanged through (latitude, longitude); azimuths at a point are
//! only ever passed back into GeographicLib itself, never compared with pansite's.

use geographiclib_rs::{DirectGeodesic, Geodesic, InverseGeodesic};
use nalgebra::Vector3;
use pansite::plane::{flatten, Equirect, PolylineSet};
use pansite::sphere::{angle_between, direction_from_azimuth_elevation, SphereCurve};
use std::f64::consts::{FRAC_PI_2, PI};

mod common;
use common::assert_near;

/// `assert_near` with a note saying which case failed.
#[track_caller]
fn assert_near_in(a: f64, b: f64, eps: f64, case: &str) {
    assert!(
        (a - b).abs() <= eps,
        "{case}: {a:.17e} vs {b:.17e}: differ by {:.3e} > {eps:.3e}",
        (a - b).abs()
    );
}

fn sphere() -> Geodesic {
    // Karney (2013) on the unit sphere: equatorial radius 1, flattening 0.
    Geodesic::new(1.0, 0.0)
}

/// The embedding written out here, independently of the library (see the module docs).
fn unit(lat_deg: f64, lon_deg: f64) -> Vector3<f64> {
    let (lat, lon) = (lat_deg.to_radians(), lon_deg.to_radians());
    Vector3::new(lat.cos() * lon.sin(), lat.cos() * lon.cos(), lat.sin())
}

/// SplitMix64 (Steele, Lea and Flood 2014): deterministic pseudo-random numbers.
struct Rng(u64);

impl Rng {
    fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// Uniform in [0, 1).
    fn uniform(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }

    /// (latitude, longitude) in degrees, uniform on the sphere.
    fn lat_lon(&mut self) -> (f64, f64) {
        let lat = (2.0 * self.uniform() - 1.0).asin().to_degrees();
        let lon = 360.0 * self.uniform() - 180.0;
        (lat, lon)
    }
}

/// (lat1, lon1, lat2, lon2) in degrees: hand-picked awkward pairs.
const SPECIAL_PAIRS: &[(f64, f64, f64, f64)] = &[
    // Near the north pole, on opposite sides of it (5 milli-degrees = 8.7e-5 rad from it,
    // just outside the 0.1 px pole tolerance at 4096 rows, 7.7e-5 rad).
    (89.995, 10.0, 89.995, -170.0),
    (-89.995, 10.0, -30.0, 100.0),
    // Near the pole but farther than the 0.1 px pole tolerance at 4096 rows (1.75e-4 rad).
    (89.99, 35.0, 10.0, 100.0),
    // Exactly at a pole.
    (90.0, 0.0, 45.0, 60.0),
    (-90.0, 0.0, -30.0, -120.0),
    // Through a pole exactly (longitudes 180 degrees apart).
    (10.0, -100.0, 80.0, 80.0),
    (-60.0, 45.0, -70.0, -135.0),
    // Across longitude +-180 (the seam when the heading is 0).
    (10.0, 179.5, -5.0, -179.5),
    (0.0, 179.999_999, 0.0, -179.999_999),
    (60.0, 170.0, 60.0, -170.0),
    (-45.0, -179.0, 30.0, 178.0),
    (0.0, 180.0, 20.0, -150.0),
    // Long arcs.
    (0.0, 0.0, 0.0, 179.9),
    (30.0, -60.0, -29.0, 115.0),
    // Very short arc.
    (30.0, 10.0, 30.000_001, 10.000_001),
];

/// Pairs that are only for the distance check (a): geodesics of these are ill-defined
/// (identical or antipodal points) or ill-conditioned (nearly antipodal).
const DISTANCE_ONLY_PAIRS: &[(f64, f64, f64, f64)] = &[
    (40.0, 40.0, 40.0, 40.0),
    (20.0, 30.0, -20.0, -150.0),
    (20.0, 30.0, -19.9999, -150.0001),
    (90.0, 0.0, -90.0, 0.0),
    (89.9999, 0.0, -89.9999, 180.0),
];

fn random_pairs(count: usize, seed: u64) -> Vec<(f64, f64, f64, f64)> {
    let mut rng = Rng(seed);
    (0..count)
        .map(|_| {
            let (lat1, lon1) = rng.lat_lon();
            let (lat2, lon2) = rng.lat_lon();
            (lat1, lon1, lat2, lon2)
        })
        .collect()
}

/// (a) The angle between two directions is the geodesic distance on the unit sphere.
#[test]
fn angle_between_equals_geodesic_distance() {
    let g = sphere();
    let mut pairs = random_pairs(2000, 1);
    pairs.extend_from_slice(SPECIAL_PAIRS);
    pairs.extend_from_slice(DISTANCE_ONLY_PAIRS);
    for &(lat1, lon1, lat2, lon2) in &pairs {
        let case = format!("({lat1}, {lon1}) -> ({lat2}, {lon2})");
        // Source: Karney (2013) via geographiclib-rs; on the unit sphere s12 is the angle.
        let (s12, a12): (f64, f64) = g.inverse(lat1, lon1, lat2, lon2);
        let a = direction_from_azimuth_elevation(lon1.to_radians(), lat1.to_radians());
        let b = direction_from_azimuth_elevation(lon2.to_radians(), lat2.to_radians());
        // The library's embedding is the one written out in the module docs.
        assert!((a - unit(lat1, lon1)).norm() < 1e-15, "{case}");
        let angle = angle_between(&a, &b);
        assert_near_in(angle, s12, 1e-9, &case);
        assert_near_in(angle, a12.to_radians(), 1e-9, &case);
        // The arc the renderer draws has the same length (where it is defined).
        if let Some(arc) = SphereCurve::great_arc(&a, &b) {
            assert_near_in(arc.t1, s12, 1e-9, &case);
        }
    }
}

/// (b) Points of the great arc at fractions of its length are where GeographicLib's direct
/// problem lands, starting at the first point along the azimuth its inverse problem gives.
#[test]
fn great_arc_points_match_geodesic_direct() {
    let g = sphere();
    let mut pairs = random_pairs(500, 2);
    pairs.extend_from_slice(SPECIAL_PAIRS);
    let mut checked = 0;
    for &(lat1, lon1, lat2, lon2) in &pairs {
        let case = format!("({lat1}, {lon1}) -> ({lat2}, {lon2})");
        // Source: Karney (2013) via geographiclib-rs, inverse then direct.
        let (s12, azi1, _azi2, _a12): (f64, f64, f64, f64) = g.inverse(lat1, lon1, lat2, lon2);
        if s12 > PI - 1e-3 {
            // Nearly antipodal: the arc's plane (and the geodesic's azimuth) is
            // ill-conditioned, so neither side is a fair oracle for the other.
            continue;
        }
        let arc = SphereCurve::great_arc(&unit(lat1, lon1), &unit(lat2, lon2))
            .unwrap_or_else(|| panic!("{case}: no arc"));
        assert_near_in(arc.t1, s12, 1e-9, &case);
        for f in [0.0, 0.1, 0.25, 0.4, 0.5, 0.75, 0.9, 1.0] {
            let (lat, lon): (f64, f64) = g.direct(lat1, lon1, azi1, f * s12);
            let expected = unit(lat, lon);
            let got = arc.position(f * arc.t1);
            // Chord length ~ angle for angles this small.
            assert_near_in(
                (got - expected).norm(),
                0.0,
                1e-9,
                &format!("{case} at f = {f}"),
            );
            checked += 1;
        }
    }
    assert!(checked > 4000, "only {checked} points checked");
}

/// Angular distance (radians) of `(lat, lon)` from the geodesic from point 1 to point 2, and
/// how much the detour through it is longer than the geodesic.
///
/// The detour excess `d(1, V) + d(V, 2) - d(1, 2)` is zero exactly when `V` lies on the minor
/// arc, but it grows only with the *square* of the distance from the arc (an offset `h` adds
/// about `h^2 / 2 (cot d1 + cot d2)`), so an excess below 1e-9 alone would let offsets of
/// 1e-5 rad through. The cross-track distance (Ed Williams, "Aviation Formulary",
/// `xtd = asin(sin d1V sin(crs1V - crs12))`) is first order in the offset and closes that
/// gap; both are computed with GeographicLib distances and azimuths only.
fn off_geodesic(g: &Geodesic, p1: (f64, f64), p2: (f64, f64), v: (f64, f64)) -> (f64, f64) {
    let (s12, azi12, _, _): (f64, f64, f64, f64) = g.inverse(p1.0, p1.1, p2.0, p2.1);
    let (s1v, azi1v, _, _): (f64, f64, f64, f64) = g.inverse(p1.0, p1.1, v.0, v.1);
    let sv2: f64 = g.inverse(v.0, v.1, p2.0, p2.1);
    let cross_track = (s1v.sin() * (azi1v - azi12).to_radians().sin()).asin();
    (cross_track, s1v + sv2 - s12)
}

/// How close the arc comes to a pole (radians), from GeographicLib's azimuths: the ends'
/// distance from the poles and, when the arc's highest (or lowest) point lies strictly inside
/// it, that point's distance, `asin |sin azi1 cos lat1|` (Clairaut's relation).
fn nearest_pole_approach(g: &Geodesic, lat1: f64, lon1: f64, lat2: f64, lon2: f64) -> f64 {
    let (_, azi1, azi2, _): (f64, f64, f64, f64) = g.inverse(lat1, lon1, lat2, lon2);
    let mut nearest =
        (FRAC_PI_2 - lat1.to_radians().abs()).min(FRAC_PI_2 - lat2.to_radians().abs());
    let (c1, c2) = (azi1.to_radians().cos(), azi2.to_radians().cos());
    if c1 * c2 < 0.0 {
        // Heading north then south (or the reverse): the vertex is inside the arc.
        let vertex = (azi1.to_radians().sin() * lat1.to_radians().cos())
            .abs()
            .asin();
        nearest = nearest.min(vertex);
    }
    nearest
}

/// (c) The full image path: every vertex the flattener emits for an arc, read back from the
/// image with `Equirect::to_angles`, lies on GeographicLib's geodesic within 1e-9 rad.
///
/// Two documented exceptions, held to the flattening tolerance (0.1 px = 7.7e-5 rad at 4096
/// rows) instead of being skipped:
/// - vertices on the pole rows (`y == 0` or `y == H`). Such a row stands for a single point,
///   the pole, and the flattener deliberately puts the ends of a curve that reaches into the
///   tolerance around a pole onto that row (see the `plane::flatten` module docs), a move of
///   at most the tolerance;
/// - every vertex of an arc that comes within the tolerance of a pole without passing
///   through it: one version of the flattener removes such an arc's horizontal offset from
///   the pole ("which moves no point by more than the tolerance"), moving all its vertices.
///
/// Everything else (seam vertices, vertices near but outside the pole tolerance, exact pole
/// passes) must be on the geodesic to 1e-9 rad.
#[test]
fn flattened_vertices_lie_on_the_geodesic() {
    let g = sphere();
    let (width, height) = (8192.0, 4096.0);
    let map = Equirect::from_size_px(width, height);
    let tolerance_px = 0.1;
    let snap_rad = tolerance_px * PI / height;
    let mut pairs = random_pairs(60, 3);
    pairs.extend_from_slice(SPECIAL_PAIRS);
    // Arcs that come within the tolerance of a pole: an end 1.7e-7 rad from the pole, and
    // a pass 8.7e-6 rad from it.
    pairs.extend_from_slice(&[(89.99999, 20.0, 40.0, 70.0), (45.0, 10.0, 45.0, -169.999)]);
    let (mut vertices, mut snapped_arcs, mut pole_vertices) = (0usize, 0usize, 0usize);
    let mut worst = 0f64;
    for &(lat1, lon1, lat2, lon2) in &pairs {
        let case = format!("({lat1}, {lon1}) -> ({lat2}, {lon2})");
        let s12: f64 = g.inverse(lat1, lon1, lat2, lon2);
        if s12 > PI - 1e-2 {
            continue; // nearly antipodal: see great_arc_points_match_geodesic_direct
        }
        let approach = nearest_pole_approach(&g, lat1, lon1, lat2, lon2);
        let snapped = approach > 1e-12 && approach < snap_rad;
        snapped_arcs += snapped as usize;
        if snapped {
            eprintln!("{case}: comes within {approach:e} rad of a pole");
        }
        // With heading 0 the relative azimuth is the longitude itself.
        let arc = SphereCurve::great_arc(&unit(lat1, lon1), &unit(lat2, lon2))
            .unwrap_or_else(|| panic!("{case}: no arc"));
        let mut set = PolylineSet::new();
        flatten(&arc, map, tolerance_px, &mut set);
        assert!(!set.is_empty(), "{case}: nothing drawn");
        for line in set.iter() {
            for p in line {
                assert!(
                    p.x >= 0.0 && p.x <= width && p.y >= 0.0 && p.y <= height,
                    "{case}: {p:?}"
                );
                let on_pole_row = p.y == 0.0 || p.y == height;
                pole_vertices += on_pole_row as usize;
                let bound = if snapped || on_pole_row {
                    snap_rad + 1e-9
                } else {
                    1e-9
                };
                let (r, e) = map.to_angles(*p);
                let v = (e.to_degrees(), r.to_degrees());
                // Source: Karney (2013) via geographiclib-rs (distances and azimuths).
                let (cross_track, excess) = off_geodesic(&g, (lat1, lon1), (lat2, lon2), v);
                let at = format!("{case}, vertex {p:?} = ({}, {})", v.0, v.1);
                if bound < 1e-6 {
                    worst = worst.max(cross_track.abs()).max(excess.abs());
                }
                assert_near_in(cross_track, 0.0, bound, &at);
                assert_near_in(excess, 0.0, bound, &at);
                vertices += 1;
            }
        }
    }
    eprintln!("{vertices} vertices, {pole_vertices} on the pole rows, worst strict {worst:e} rad");
    // The checks above really ran over pole vertices and snapped arcs.
    assert!(vertices > 2000, "only {vertices} vertices");
    assert!(
        pole_vertices >= 4,
        "only {pole_vertices} vertices on the pole rows"
    );
    assert_eq!(snapped_arcs, 2, "snapped arcs");
}

/// The on-geodesic test of (c) can fail: a point a hair off the arc is caught by the
/// cross-track distance although the detour excess alone would let it through.
#[test]
fn off_geodesic_detects_small_offsets() {
    let g = sphere();
    let (p1, p2) = ((10.0, 20.0), (40.0, 80.0));
    let (_, azi1, _, _): (f64, f64, f64, f64) = g.inverse(p1.0, p1.1, p2.0, p2.1);
    // Source: Karney (2013) direct: 0.3 rad along, then 1e-7 rad off at right angles.
    let (lat, lon, azi): (f64, f64, f64) = g.direct(p1.0, p1.1, azi1, 0.3);
    let on = off_geodesic(&g, p1, p2, (lat, lon));
    assert_near(on.0, 0.0, 1e-12);
    assert_near(on.1, 0.0, 1e-12);
    let (lat, lon): (f64, f64) = g.direct(lat, lon, azi + 90.0, 1e-7);
    let (cross_track, excess) = off_geodesic(&g, p1, p2, (lat, lon));
    assert_near(cross_track.abs(), 1e-7, 1e-12);
    assert!(
        excess < 1e-9,
        "the excess alone would not see it: {excess:e}"
    );
}
