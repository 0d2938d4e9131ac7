//! The reference grid and the horizon, drawn in the site frame (absolute azimuth, true
//! elevation) and projected like any other curve, so they stay right under pitch and roll.

use crate::plane::{Flattener, PolylineSet};
use crate::sphere::{SphereCurve, ViewFrame};
use nalgebra::Vector3;
use std::f64::consts::FRAC_PI_2;

/// Spacing of the default grid, degrees.
pub const GRID_STEP_DEG: u32 = 10;

/// The grid (meridians every `step_deg` of absolute azimuth, parallels every `step_deg` of
/// elevation except the horizon) and, separately, the horizon.
pub fn grid_and_horizon(
    view: &ViewFrame,
    flattener: &mut Flattener,
    step_deg: u32,
) -> (PolylineSet, PolylineSet) {
    let mut grid = PolylineSet::new();
    let mut horizon = PolylineSet::new();
    let up = view.direction_to_view(&Vector3::z());
    let step = step_deg.clamp(1, 90) as i32;
    for azimuth_deg in (0..360).step_by(step as usize) {
        let (sin, cos) = (azimuth_deg as f64).to_radians().sin_cos();
        let across = view.direction_to_view(&Vector3::new(sin, cos, 0.0));
        // Nadir to zenith through this azimuth.
        let meridian = SphereCurve {
            centre: Vector3::zeros(),
            u: across,
            v: up,
            t0: -FRAC_PI_2,
            t1: FRAC_PI_2,
            exact_end: None,
        };
        flattener.flatten(&meridian, &mut grid);
    }
    let east = view.direction_to_view(&Vector3::x());
    let north = view.direction_to_view(&Vector3::y());
    for elevation_deg in (-90 + step..90).step_by(step as usize) {
        let (sin, cos) = (elevation_deg as f64).to_radians().sin_cos();
        let parallel = SphereCurve::ellipse_arc(
            up * sin,
            north * cos,
            east * cos,
            0.0,
            std::f64::consts::TAU,
        );
        let target = if elevation_deg == 0 {
            &mut horizon
        } else {
            &mut grid
        };
        flattener.flatten(&parallel, target);
    }
    (grid, horizon)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plane::Equirect;
    use crate::scene::Standpoint;

    #[test]
    fn level_view_has_vertical_meridians_and_a_middle_horizon() {
        let view = ViewFrame::new(&Standpoint::from_degrees(
            "s", 0.0, 0.0, 1.6, 25.0, 0.0, 0.0,
        ));
        let map = Equirect::from_size_px(3600.0, 1800.0);
        let (grid, horizon) = grid_and_horizon(&view, &mut Flattener::new(map, 0.1), 10);
        for line in horizon.iter() {
            assert!(line.iter().all(|p| (p.y - 900.0).abs() < 1e-9), "{line:?}");
        }
        let span: f64 = horizon
            .iter()
            .map(|l| (l[l.len() - 1].x - l[0].x).abs())
            .sum();
        assert!(
            (span - 3600.0).abs() < 1e-6,
            "the horizon spans the width: {span}"
        );
        // Heading 25 deg: the meridian of azimuth 30 is 5 deg right of centre, full height.
        let x30 = 1800.0 + 5.0 * 10.0;
        let m = grid
            .iter()
            .find(|l| (l[0].x - x30).abs() < 1e-6)
            .expect("meridian at 30 deg");
        assert!(m.iter().all(|p| (p.x - x30).abs() < 1e-6));
        let ys: Vec<f64> = m.iter().map(|p| p.y).collect();
        assert!(ys.contains(&0.0) && ys.contains(&1800.0), "{ys:?}");
    }
}
