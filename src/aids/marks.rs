//! Small things the aids share: ring marks and how angles are written on the drawing.

use crate::plane::{ImagePoint, PolylineSet};

/// A small circle of `radius` pixels drawn on the image around `at` (a mark, not a curve
/// of the site).
pub fn ring(at: ImagePoint, radius: f64, out: &mut PolylineSet) {
    const SIDES: usize = 16;
    let points: Vec<ImagePoint> = (0..=SIDES)
        .map(|k| {
            let t = std::f64::consts::TAU * k as f64 / SIDES as f64;
            ImagePoint::new(at.x + radius * t.cos(), at.y + radius * t.sin())
        })
        .collect();
    out.push(&points);
}

/// An angle in degrees as written on the drawing: whole degrees when it is one, otherwise
/// to a tenth.
pub fn degrees_text(deg: f64) -> String {
    let tenths = (deg * 10.0).round();
    if tenths % 10.0 == 0.0 {
        format!("{}", (tenths / 10.0) as i64)
    } else {
        format!("{:.1}", tenths / 10.0)
    }
}

/// An azimuth in degrees moved into [0, 360).
pub fn normal_azimuth_deg(deg: f64) -> f64 {
    let a = deg.rem_euclid(360.0);
    if a >= 360.0 - 1e-9 {
        0.0
    } else {
        a
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn degrees_are_written_short() {
        assert_eq!(degrees_text(30.0), "30");
        assert_eq!(degrees_text(-12.25), "-12.3");
        assert_eq!(degrees_text(359.96), "360");
        assert_eq!(normal_azimuth_deg(-30.0), 330.0);
        assert_eq!(normal_azimuth_deg(720.0), 0.0);
    }
}
