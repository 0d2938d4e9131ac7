//! Guide fans and meridians.
//!
//! Every line parallel to a direction `d` lies in a plane through the eye that holds `d`,
//! and each such plane meets the viewing sphere in a great circle through the two vanishing
//! points of `d`. A fan is that family of circles, the planes turned about `d` by equal
//! steps from the one that holds the horizontal perpendicular to `d` (for a horizontal
//! direction, the horizon itself); any further line parallel to `d` can be traced along the
//! nearest circles. Meridians are the vertical great half-circles at chosen azimuths.

use super::grid::{meridian, multiples};
use super::vanishing::slope_vector;
use crate::plane::{Flattener, PolylineSet};
use crate::scene::Fan;
use crate::sphere::{SphereCurve, ViewFrame};
use nalgebra::Vector3;
use std::f64::consts::TAU;

/// The great circle through `±d` and `e` (site frame, unit, perpendicular).
fn circle(view: &ViewFrame, d: &Vector3<f64>, e: &Vector3<f64>) -> SphereCurve {
    SphereCurve::ellipse_arc(
        Vector3::zeros(),
        view.direction_to_view(d),
        view.direction_to_view(e),
        0.0,
        TAU,
    )
}

/// The unit vectors `e(phi)` perpendicular to `d` that, with `d`, span the fan's planes:
/// `e(phi) = h cos phi + (d x h) sin phi`, `h` horizontal and perpendicular to `d`.
pub fn fan_normals(d: &Vector3<f64>, step_deg: f64) -> Vec<Vector3<f64>> {
    let h = Vector3::z().cross(d).normalize();
    let k = d.cross(&h);
    multiples(step_deg, 180.0)
        .map(|(_, phi)| {
            let (sin, cos) = phi.to_radians().sin_cos();
            h * cos + k * sin
        })
        .collect()
}

/// The circles of every fan.
pub fn fans(view: &ViewFrame, flattener: &mut Flattener, fans: &[Fan]) -> PolylineSet {
    let mut out = PolylineSet::new();
    for fan in fans {
        let d = slope_vector(fan.direction.bearing_deg, fan.direction.pitch_deg);
        for e in fan_normals(&d, fan.step_deg) {
            flattener.flatten(&circle(view, &d, &e), &mut out);
        }
    }
    out
}

/// The meridians at these absolute azimuths (degrees).
pub fn meridians(view: &ViewFrame, flattener: &mut Flattener, azimuths: &[f64]) -> PolylineSet {
    let mut out = PolylineSet::new();
    for azimuth in azimuths {
        flattener.flatten(&meridian(view, azimuth.to_radians()), &mut out);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fan_planes_hold_the_direction_and_turn_by_the_step() {
        for (bearing, pitch) in [(30.0, 0.0), (200.0, 35.0)] {
            let d = slope_vector(bearing, pitch);
            let normals = fan_normals(&d, 15.0);
            assert_eq!(normals.len(), 12);
            for (k, e) in normals.iter().enumerate() {
                assert!(e.dot(&d).abs() < 1e-15 && (e.norm() - 1.0).abs() < 1e-15);
                // The angle between neighbouring planes about d is the step.
                let next = normals[(k + 1) % 12] * if k == 11 { -1.0 } else { 1.0 };
                let turn = e.cross(&next).dot(&d).atan2(e.dot(&next)).to_degrees();
                assert!((turn - 15.0).abs() < 1e-9, "{turn}");
            }
            // The first plane holds a horizontal line: for a level direction, the horizon.
            assert!(normals[0].z.abs() < 1e-15);
        }
    }
}
