//! The equirectangular mapping (Snyder, "Map Projections: A Working Manual", USGS
//! Professional Paper 1395, 1987, section 12, equations 12-1 and 12-2 with the standard
//! parallel at the equator: `x = R (lon - lon0)`, `y = R lat`), scaled to pixels.
//!
//! Image conventions: the centre column is the heading; relative azimuth `r` in `[-pi, pi)`
//! grows to the right; the top row is the zenith. In pixel-edge coordinates (pixel centres at
//! `+0.5`): `x = (r + pi) / (2 pi) * W`, `y = (pi/2 - e) / pi * H`.

use crate::sphere::{azimuth_elevation, ViewFrame};
use nalgebra::{Point3, Vector3};
use std::f64::consts::{FRAC_PI_2, PI, TAU};

/// A point on the image in pixels: `x` grows to the right, `y` downwards.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct ImagePoint {
    /// Pixels from the image's left edge.
    pub x: f64,
    /// Pixels from the image's top edge.
    pub y: f64,
}

impl ImagePoint {
    /// The point `x` pixels from the left and `y` from the top.
    pub fn new(x: f64, y: f64) -> ImagePoint {
        ImagePoint { x, y }
    }
}

/// The mapping from (relative azimuth, elevation) to the pixels of a `width` x `height`
/// image covering the whole sphere.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Equirect {
    width: f64,
    height: f64,
}

impl Equirect {
    /// Any positive size; `width = 2 height` keeps angles equal in both directions.
    pub fn from_size_px(width: f64, height: f64) -> Equirect {
        Equirect { width, height }
    }

    /// The image's width, pixels.
    pub fn width(&self) -> f64 {
        self.width
    }

    /// The image's height, pixels.
    pub fn height(&self) -> f64 {
        self.height
    }

    /// Pixels per radian of azimuth.
    pub fn x_scale(&self) -> f64 {
        self.width / TAU
    }

    /// Pixels per radian of elevation.
    pub fn y_scale(&self) -> f64 {
        self.height / PI
    }

    /// Image point of a relative azimuth and an elevation (radians). An azimuth of exactly
    /// `pi` lands on the right border, `-pi` on the left: callers choose the side.
    pub fn to_image(&self, relative_azimuth: f64, elevation: f64) -> ImagePoint {
        ImagePoint {
            x: (relative_azimuth + PI) * self.x_scale(),
            y: (FRAC_PI_2 - elevation) * self.y_scale(),
        }
    }

    /// Relative azimuth and elevation (radians) of an image point.
    pub fn to_angles(&self, p: ImagePoint) -> (f64, f64) {
        (p.x / self.x_scale() - PI, FRAC_PI_2 - p.y / self.y_scale())
    }
}

/// Where a site direction lands on the image.
pub fn image_of_direction(view: &ViewFrame, map: &Equirect, d: &Vector3<f64>) -> ImagePoint {
    let (azimuth, elevation) = azimuth_elevation(&view.direction_to_view(d));
    map.to_image(azimuth, elevation)
}

/// Where a site point lands on the image; `None` at the eye.
pub fn image_of_point(view: &ViewFrame, map: &Equirect, p: &Point3<f64>) -> Option<ImagePoint> {
    let v = view.to_view(p);
    (v.norm() > 1e-9).then(|| {
        let (azimuth, elevation) = azimuth_elevation(&v);
        map.to_image(azimuth, elevation)
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn issue_formula_in_degrees() {
        let map = Equirect::from_size_px(4096.0, 2048.0);
        let (r, e) = (37.5f64, -12.25f64);
        let p = map.to_image(r.to_radians(), e.to_radians());
        assert!((p.x - (r + 180.0) / 360.0 * 4096.0).abs() < 1e-9);
        assert!((p.y - (90.0 - e) / 180.0 * 2048.0).abs() < 1e-9);
        let (r2, e2) = map.to_angles(p);
        assert!((r2.to_degrees() - r).abs() < 1e-12 && (e2.to_degrees() - e).abs() < 1e-12);
    }

    #[test]
    fn site_directions_and_points_land_by_the_standpoint_s_heading() {
        use crate::scene::Standpoint;
        // Heading 30 degrees (clockwise from north, +y): the direction (sin 30, cos 30, 0)
        // is the centre column on the horizon row; a point 10 m out that way and 10 m above
        // the eye is 45 degrees up, 45 * 500 / 180 = 125 px above it.
        let view = ViewFrame::new(&Standpoint::from_degrees(
            "here", 0.0, 0.0, 1.5, 30.0, 0.0, 0.0,
        ));
        let map = Equirect::from_size_px(1000.0, 500.0);
        let (sin, cos) = 30f64.to_radians().sin_cos();
        let ahead = image_of_direction(&view, &map, &Vector3::new(sin, cos, 0.0));
        assert!((ahead.x - 500.0).abs() < 1e-9 && (ahead.y - 250.0).abs() < 1e-9);
        let up = image_of_point(&view, &map, &Point3::new(10.0 * sin, 10.0 * cos, 11.5));
        let up = up.unwrap();
        assert!(
            (up.x - 500.0).abs() < 1e-9 && (up.y - 125.0).abs() < 1e-9,
            "{up:?}"
        );
        // The eye, and a point a nanometre from it, have no image; two nanometres do.
        let level = ViewFrame::new(&Standpoint::from_degrees(
            "here", 0.0, 0.0, 1.5, 0.0, 0.0, 0.0,
        ));
        let near = |dx: f64| image_of_point(&level, &map, &Point3::new(dx, 0.0, 1.5));
        assert!(near(0.0).is_none() && near(1e-9).is_none() && near(2e-9).is_some());
    }

    #[test]
    fn heading_is_the_centre_column_and_the_horizon_the_middle_row() {
        let map = Equirect::from_size_px(1000.0, 500.0);
        assert_eq!(map.to_image(0.0, 0.0), ImagePoint::new(500.0, 250.0));
        assert_eq!(map.to_image(-PI, FRAC_PI_2), ImagePoint::new(0.0, 0.0));
        assert_eq!(map.to_image(PI, -FRAC_PI_2), ImagePoint::new(1000.0, 500.0));
    }
}
