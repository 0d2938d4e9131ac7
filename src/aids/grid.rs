//! The reference grid: meridians every `step` degrees of absolute azimuth, parallels every
//! `step` degrees of elevation, every `major`-th line heavier, and the horizon on its own.
//! Drawn in the site frame, so they stay right under pitch and roll.

use crate::plane::{Flattener, PolylineSet};
use crate::sphere::{SphereCurve, ViewFrame};
use nalgebra::Vector3;
use std::f64::consts::{FRAC_PI_2, TAU};

/// The grid's lines by weight.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct GridLines {
    /// The ordinary grid lines.
    pub minor: PolylineSet,
    /// The heavier lines at the chosen multiples.
    pub major: PolylineSet,
    /// The horizon.
    pub horizon: PolylineSet,
}

/// The meridian of an absolute azimuth (radians): nadir to zenith.
pub fn meridian(view: &ViewFrame, azimuth: f64) -> SphereCurve {
    let (sin, cos) = azimuth.sin_cos();
    SphereCurve {
        centre: Vector3::zeros(),
        u: view.direction_to_view(&Vector3::new(sin, cos, 0.0)),
        v: view.direction_to_view(&Vector3::z()),
        t0: -FRAC_PI_2,
        t1: FRAC_PI_2,
        exact_end: None,
    }
}

/// The parallel of an elevation (radians): the circle of directions at that angle above the
/// horizontal.
pub fn parallel(view: &ViewFrame, elevation: f64) -> SphereCurve {
    let (sin, cos) = elevation.sin_cos();
    SphereCurve::ellipse_arc(
        view.direction_to_view(&Vector3::z()) * sin,
        view.direction_to_view(&Vector3::y()) * cos,
        view.direction_to_view(&Vector3::x()) * cos,
        0.0,
        TAU,
    )
}

/// The multiples of `step` (degrees) from 0 up to but not including `limit`, with their index.
pub fn multiples(step: f64, limit: f64) -> impl Iterator<Item = (u32, f64)> {
    (0u32..)
        .map(move |k| (k, k as f64 * step))
        .take_while(move |&(_, a)| a < limit - 1e-9)
}

/// The grid at `step_deg`, every `major_every`-th line (from north and from the horizon)
/// heavier (0: none).
pub fn grid(
    view: &ViewFrame,
    flattener: &mut Flattener,
    step_deg: f64,
    major_every: u32,
) -> GridLines {
    let mut lines = GridLines::default();
    let is_major = |k: u32| major_every > 0 && k % major_every == 0;
    for (k, azimuth) in multiples(step_deg, 360.0) {
        let out = if is_major(k) {
            &mut lines.major
        } else {
            &mut lines.minor
        };
        flattener.flatten(&meridian(view, azimuth.to_radians()), out);
    }
    flattener.flatten(&parallel(view, 0.0), &mut lines.horizon);
    for (k, elevation) in multiples(step_deg, 90.0).skip(1) {
        for sign in [-1.0, 1.0] {
            let out = if is_major(k) {
                &mut lines.major
            } else {
                &mut lines.minor
            };
            flattener.flatten(&parallel(view, (sign * elevation).to_radians()), out);
        }
    }
    lines
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plane::Equirect;
    use crate::scene::Standpoint;

    fn view(heading: f64, pitch: f64) -> ViewFrame {
        ViewFrame::new(&Standpoint::from_degrees(
            "s", 0.0, 0.0, 1.6, heading, pitch, 0.0,
        ))
    }

    #[test]
    fn level_view_has_vertical_meridians_and_a_middle_horizon() {
        let map = Equirect::from_size_px(3600.0, 1800.0);
        let lines = grid(&view(25.0, 0.0), &mut Flattener::new(map, 0.1), 10.0, 0);
        assert!(lines.major.is_empty());
        for line in lines.horizon.iter() {
            assert!(line.iter().all(|p| (p.y - 900.0).abs() < 1e-9), "{line:?}");
        }
        let span: f64 = lines
            .horizon
            .iter()
            .map(|l| (l[l.len() - 1].x - l[0].x).abs())
            .sum();
        assert!(
            (span - 3600.0).abs() < 1e-6,
            "the horizon spans the width: {span}"
        );
        // Heading 25 deg: the meridian of azimuth 30 is 5 deg right of centre, full height
        // (the image mapping of the crate docs: x = (r + 180) / 360 * W).
        let x30 = 1800.0 + 5.0 * 10.0;
        let m = lines
            .minor
            .iter()
            .find(|l| (l[0].x - x30).abs() < 1e-6)
            .expect("meridian at 30 deg");
        assert!(m.iter().all(|p| (p.x - x30).abs() < 1e-6));
        let ys: Vec<f64> = m.iter().map(|p| p.y).collect();
        assert!(ys.contains(&0.0) && ys.contains(&1800.0), "{ys:?}");
    }

    #[test]
    fn major_lines_are_the_multiples() {
        // A 15-degree grid with every second line heavy: meridians at 0, 30, ... 330 (12),
        // parallels at +-30 and +-60 (4), on a level view each meridian is one polyline
        // (the one at the seam, azimuth 180 with heading 0, lies along both borders).
        let map = Equirect::from_size_px(1440.0, 720.0);
        let lines = grid(&view(0.0, 0.0), &mut Flattener::new(map, 0.1), 15.0, 2);
        let xs: Vec<f64> = lines
            .major
            .iter()
            .filter(|l| l.iter().all(|p| (p.x - l[0].x).abs() < 1e-9))
            .map(|l| l[0].x)
            .collect();
        for azimuth in (0..360).step_by(30) {
            let x = (azimuth as f64 + 180.0).rem_euclid(360.0) * 4.0;
            assert!(
                xs.iter()
                    .any(|&v| (v - x).abs() < 1e-6 || (v - x).abs() > 1439.9),
                "meridian {azimuth}"
            );
        }
        let row = |set: &PolylineSet, elevation: f64| {
            let y = (90.0 - elevation) * 4.0;
            set.iter()
                .any(|l| l.len() > 2 && l.iter().all(|p| (p.y - y).abs() < 1e-6))
        };
        for elevation in [-60.0, -30.0, 30.0, 60.0] {
            assert!(row(&lines.major, elevation) && !row(&lines.minor, elevation));
        }
        for elevation in [-75.0, -45.0, -15.0, 15.0, 45.0, 75.0] {
            assert!(row(&lines.minor, elevation) && !row(&lines.major, elevation));
        }
    }
}
