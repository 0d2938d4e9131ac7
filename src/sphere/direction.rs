//! Directions on the viewing sphere and the two angles that name them.
//!
//! Convention (stated once for the crate): azimuth is measured clockwise from the forward
//! axis `+y` towards the right axis `+x`; elevation is the angle above the `x`-`y` plane.
//! Both in radians.

use nalgebra::Vector3;

/// Azimuth and elevation (radians) of a non-zero vector in the view frame.
///
/// Azimuth is in `(-pi, pi]` (the `atan2` range); elevation in `[-pi/2, pi/2]`.
/// At a pole the azimuth is meaningless and this returns `atan2(0, 0) = 0`; callers that need
/// the limiting azimuth there take it from the curve's tangent (see `plane::flatten`).
pub fn azimuth_elevation(v: &Vector3<f64>) -> (f64, f64) {
    let horizontal = v.x.hypot(v.y);
    (v.x.atan2(v.y), v.z.atan2(horizontal))
}

/// The unit vector with the given azimuth and elevation (radians): the inverse of
/// [`azimuth_elevation`].
pub fn direction_from_azimuth_elevation(azimuth: f64, elevation: f64) -> Vector3<f64> {
    let (sin_az, cos_az) = azimuth.sin_cos();
    let (sin_el, cos_el) = elevation.sin_cos();
    Vector3::new(cos_el * sin_az, cos_el * cos_az, sin_el)
}

/// The angle (radians, in `[0, pi]`) between two non-zero vectors.
///
/// Uses `atan2(|a x b|, a . b)`, which keeps full precision for nearly parallel and nearly
/// opposite vectors where `acos(a . b)` loses half its digits.
pub fn angle_between(a: &Vector3<f64>, b: &Vector3<f64>) -> f64 {
    a.cross(b).norm().atan2(a.dot(b))
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::{FRAC_PI_2, PI};

    fn assert_near(a: f64, b: f64, eps: f64) {
        assert!((a - b).abs() <= eps, "{a} vs {b} (eps {eps})");
    }

    #[test]
    fn azimuth_turns_clockwise_from_forward() {
        assert_near(azimuth_elevation(&Vector3::new(0.0, 1.0, 0.0)).0, 0.0, 0.0);
        assert_near(
            azimuth_elevation(&Vector3::new(1.0, 0.0, 0.0)).0,
            FRAC_PI_2,
            1e-15,
        );
        assert_near(
            azimuth_elevation(&Vector3::new(-1.0, 0.0, 0.0)).0,
            -FRAC_PI_2,
            1e-15,
        );
        assert_near(
            azimuth_elevation(&Vector3::new(0.0, -1.0, 0.0)).0,
            PI,
            1e-15,
        );
    }

    #[test]
    fn round_trip() {
        for (az, el) in [(0.3, 0.2), (-2.9, -1.2), (3.0, 1.5), (-0.1, 0.0)] {
            let v = direction_from_azimuth_elevation(az, el) * 7.5;
            let (a, e) = azimuth_elevation(&v);
            assert_near(a, az, 1e-14);
            assert_near(e, el, 1e-14);
        }
    }

    #[test]
    fn angle_between_keeps_precision_near_zero_and_pi() {
        let a = Vector3::new(1.0, 0.0, 0.0);
        let tiny = 1e-9;
        assert_near(
            angle_between(&a, &Vector3::new(1.0, tiny, 0.0)),
            tiny,
            1e-20,
        );
        assert_near(
            angle_between(&a, &Vector3::new(-1.0, tiny, 0.0)),
            PI - tiny,
            1e-15,
        );
    }
}
