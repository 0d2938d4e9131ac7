//! Property tests (proptest) of the projection engine over random segments, elliptic arcs
//! and standpoints, biased towards the seam and the poles where the image is hardest.
//! The reference is the definition itself: the true image of a curve is the image of
//! `P(t) / |P(t)|` for every `t`, sampled densely here.

use nalgebra::Vector3;
use pansite::plane::{flatten, Equirect, ImagePoint, PolylineSet};
use pansite::sphere::{azimuth_elevation, direction_from_azimuth_elevation, SphereCurve};
use proptest::prelude::*;
use std::f64::consts::{FRAC_PI_2, PI, TAU};

mod common;
use common::distance_to_polylines;

const WIDTH: f64 = 4096.0;
const HEIGHT: f64 = 2048.0;
const TOLERANCE: f64 = 0.1;

fn map() -> Equirect {
    Equirect::from_size_px(WIDTH, HEIGHT)
}

/// Azimuths: anywhere, or within a hair of the seam.
fn azimuth() -> impl Strategy<Value = f64> {
    prop_oneof![
        -PI..PI,
        (0.0..1e-3f64).prop_map(|d| PI - d),
        (0.0..1e-3f64).prop_map(|d| -PI + d),
        Just(PI),
    ]
}

/// Elevations: anywhere, or near a pole.
fn elevation() -> impl Strategy<Value = f64> {
    prop_oneof![
        -FRAC_PI_2..FRAC_PI_2,
        (0.0..0.05f64).prop_map(|d| FRAC_PI_2 - d),
        (0.0..0.05f64).prop_map(|d| -FRAC_PI_2 + d),
    ]
}

/// A point relative to the eye.
fn point() -> impl Strategy<Value = Vector3<f64>> {
    (azimuth(), elevation(), 0.2..200.0f64)
        .prop_map(|(az, el, r)| direction_from_azimuth_elevation(az, el) * r)
}

/// Segments, including ones that pass over the eye's head and through the seam behind it.
fn segment() -> impl Strategy<Value = (Vector3<f64>, Vector3<f64>)> {
    prop_oneof![
        (point(), point()),
        // Pairs symmetric about the vertical plane through the view axis pass the poles or
        // the seam closely.
        (point(), 0.0..1e-6f64).prop_map(|(p, e)| (p, Vector3::new(-p.x + e, -p.y, p.z))),
        (point(), 0.0..1e-6f64).prop_map(|(p, e)| (p, Vector3::new(p.x + e, -p.y, p.z))),
    ]
}

fn ellipse() -> impl Strategy<Value = SphereCurve> {
    (point(), point(), point(), -PI..PI, 0.1..TAU).prop_map(|(c, u, v, start, sweep)| {
        SphereCurve::ellipse_arc(c, u * 0.3, v * 0.3, start, sweep)
    })
}

/// The true image point of a direction, with the azimuth in `[-pi, pi]`.
fn true_image(d: &Vector3<f64>) -> ImagePoint {
    let (az, el) = azimuth_elevation(d);
    map().to_image(az, el)
}

fn flattened(curve: &SphereCurve) -> Vec<Vec<ImagePoint>> {
    let mut set = PolylineSet::new();
    flatten(curve, map(), TOLERANCE, &mut set);
    set.iter().map(|l| l.to_vec()).collect()
}

/// Distance from a point to the drawing, counting the seam as one line (x and x +- W).
fn distance_to_drawing(p: ImagePoint, lines: &[Vec<ImagePoint>]) -> f64 {
    [0.0, WIDTH, -WIDTH]
        .iter()
        .map(|shift| {
            distance_to_polylines(
                ImagePoint::new(p.x + shift, p.y),
                lines.iter().map(Vec::as_slice),
            )
        })
        .fold(f64::INFINITY, f64::min)
}

/// Whether an image point lies in the band along the top or bottom border where a pole is
/// drawn: the whole border row is one direction, so horizontal position there carries no
/// meaning (see `plane::flatten`).
fn in_pole_band(p: ImagePoint) -> bool {
    p.y <= TOLERANCE * 1.5 || p.y >= HEIGHT - TOLERANCE * 1.5
}

fn check_tolerance(curve: &SphereCurve, lines: &[Vec<ImagePoint>]) -> Result<(), TestCaseError> {
    const SAMPLES: usize = 4000;
    for i in 0..=SAMPLES {
        let t = curve.t0 + (curve.t1 - curve.t0) * i as f64 / SAMPLES as f64;
        let p = true_image(&curve.position(t));
        if in_pole_band(p) {
            continue;
        }
        let d = distance_to_drawing(p, lines);
        prop_assert!(
            d <= TOLERANCE * 1.0001 + 1e-9,
            "t = {t}: true point {p:?} is {d} px from the drawing"
        );
    }
    Ok(())
}

fn check_no_jumps(lines: &[Vec<ImagePoint>]) -> Result<(), TestCaseError> {
    for line in lines {
        for w in line.windows(2) {
            prop_assert!(
                (w[1].x - w[0].x).abs() <= WIDTH / 4.0,
                "a stroke across the image: {:?} -> {:?}",
                w[0],
                w[1]
            );
        }
        for p in line {
            prop_assert!(
                p.x >= 0.0 && p.x <= WIDTH && p.y >= 0.0 && p.y <= HEIGHT,
                "{p:?} is off the image"
            );
        }
    }
    Ok(())
}

/// The curve passes or ends within `within` of a pole: then the drawing runs through the
/// pole and may be shifted by that much.
fn near_pole(curve: &SphereCurve, within: f64) -> bool {
    let off_vertical = |d: Vector3<f64>| d.x.hypot(d.y).atan2(d.z.abs());
    curve.pole_approaches(true, within).len() + curve.pole_approaches(false, within).len() > 0
        || off_vertical(curve.position(curve.t0)) < within
        || off_vertical(curve.position(curve.t1)) < within
}

/// The pole band: within half the tolerance of a pole, a curve is drawn on the border row.
fn pole_tolerance() -> f64 {
    0.5 * TOLERANCE / map().y_scale()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 400, ..ProptestConfig::default() })]

    #[test]
    fn segment_images_stay_within_tolerance((a, b) in segment()) {
        let Some(curve) = SphereCurve::great_arc(&a, &b) else { return Ok(()) };
        let lines = flattened(&curve);
        // Only a curve lying wholly in a pole band (drawn as the border row) draws nothing.
        let within_band = |d: Vector3<f64>| d.x.hypot(d.y).atan2(d.z.abs()) < pole_tolerance();
        let all_in_band = (0..=100).all(|i| within_band(curve.position(curve.t1 * i as f64 / 100.0)));
        prop_assert!(!lines.is_empty() || all_in_band);
        check_no_jumps(&lines)?;
        check_tolerance(&curve, &lines)?;
    }

    #[test]
    fn every_vertex_lies_on_the_great_circle((a, b) in segment()) {
        let Some(curve) = SphereCurve::great_arc(&a, &b) else { return Ok(()) };
        let normal = curve.u.cross(&curve.v).normalize();
        // Where a curve enters a pole band its end is put on the border row (the pole), a
        // move of at most the band.
        let allowed = if near_pole(&curve, pole_tolerance()) { pole_tolerance() } else { 1e-9 };
        for line in flattened(&curve) {
            for p in line {
                let (r, e) = map().to_angles(p);
                let d = direction_from_azimuth_elevation(r, e);
                prop_assert!(normal.dot(&d).abs().asin() <= allowed, "{p:?} is {} rad off the circle", normal.dot(&d).abs().asin());
            }
        }
    }

    #[test]
    fn pieces_end_at_segment_ends_or_exact_crossings((a, b) in segment()) {
        let Some(curve) = SphereCurve::great_arc(&a, &b) else { return Ok(()) };
        let ends = [true_image(&a), true_image(&b)];
        let allowed = 1e-6;
        for line in flattened(&curve) {
            for p in [line[0], line[line.len() - 1]] {
                let at_end = ends.iter().any(|e| {
                    // An end's own image may sit on either border.
                    [0.0, WIDTH, -WIDTH].iter().any(|shift| (e.x + shift - p.x).hypot(e.y - p.y) <= allowed)
                });
                let on_border = p.x == 0.0 || p.x == WIDTH;
                let on_pole_row = p.y == 0.0 || p.y == HEIGHT;
                prop_assert!(at_end || on_border || on_pole_row, "piece end {p:?} is neither an end {ends:?} nor a crossing");
            }
        }
    }

    #[test]
    fn seam_crossings_meet_at_one_row((a, b) in segment()) {
        let Some(curve) = SphereCurve::great_arc(&a, &b) else { return Ok(()) };
        let lines = flattened(&curve);
        let ends: Vec<ImagePoint> = lines.iter().flat_map(|l| [l[0], l[l.len() - 1]]).collect();
        let segment_ends = [true_image(&a), true_image(&b)];
        let is_segment_end = |p: &ImagePoint| {
            segment_ends.iter().any(|e| (e.y - p.y).abs() < 1e-6 && ((e.x - p.x).abs() < 1e-6 || (e.x - p.x).abs() > WIDTH - 1e-6))
        };
        for p in ends.iter().filter(|p| (p.x == 0.0 || p.x == WIDTH) && p.y != 0.0 && p.y != HEIGHT && !is_segment_end(p)) {
            let other_border = WIDTH - p.x;
            prop_assert!(
                ends.iter().any(|q| q.x == other_border && (q.y - p.y).abs() <= 0.01),
                "{p:?} has no partner on the other border among {ends:?}"
            );
        }
    }

    #[test]
    fn curved_edges_stay_within_tolerance(curve in ellipse()) {
        // Skip ellipses that pass through the eye (their image is not defined there).
        let nearest = (0..=2000)
            .map(|i| curve.position(curve.t0 + (curve.t1 - curve.t0) * i as f64 / 2000.0).norm())
            .fold(f64::INFINITY, f64::min);
        prop_assume!(nearest > 1e-3);
        let lines = flattened(&curve);
        check_no_jumps(&lines)?;
        check_tolerance(&curve, &lines)?;
    }
}
