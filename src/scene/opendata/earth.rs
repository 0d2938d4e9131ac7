//! From latitude and longitude to the scene's local metres, and back.
//!
//! A point's plan position is its geodesic from the scene's origin on the WGS84 ellipsoid:
//! east = s sin(a), north = s cos(a), s the geodesic distance and a its azimuth at the origin,
//! both from Karney's method ("Algorithms for geodesics", J. Geodesy 87, 2013) as the
//! `geographiclib-rs` crate implements it. This is the azimuthal equidistant projection
//! centred on the origin: distances and azimuths from the origin are exact, and distances
//! between two other points within 5 km of it are off by less than a millimetre. The plan's
//! y axis is true north at the origin, turned by the location's `north` when the plan's y
//! axis is not true north.
//!
//! Heights: the ground falls away from the origin's horizontal plane as the earth curves,
//! by d^2 / 2R at distance d (R the radius of curvature of the ellipsoid in that direction,
//! Euler's formula). Light bends down along the surface and hides part of that fall; the
//! usual surveying allowance multiplies the fall by (1 - k), k about 0.13 (common practice).
//! Items from open data stand on the fallen ground; `refraction` sets k (0 by default: the
//! geometric fall).

use geographiclib_rs::{DirectGeodesic, Geodesic, InverseGeodesic};
use nalgebra::Point3;

/// The refraction coefficient of surveying, the ratio of a sight line's curvature to the
/// earth's: 0.13 (common practice; about 1/7).
pub const SURVEY_REFRACTION: f64 = 0.13;

/// The WGS84 ellipsoid's semi-major axis (metres) and flattening (EPSG::7030).
const WGS84_A: f64 = 6_378_137.0;
const WGS84_F: f64 = 1.0 / 298.257_223_563;

/// How far (metres) the ground at distance `d` from a point lies below that point's
/// horizontal plane, seen through air of refraction coefficient `k`:
/// (1 - k) d^2 / (2 R). The circle's exact fall is R - sqrt(R^2 - d^2); the two differ by
/// d^4 / (8 R^3), under a micrometre at 5 km.
pub fn curvature_drop(d: f64, radius: f64, k: f64) -> f64 {
    (1.0 - k) * d * d / (2.0 * radius)
}

/// The ellipsoid's radius of curvature (metres) at `latitude_deg` in the direction of
/// `azimuth_deg`, by Euler's formula 1/R = cos^2 a / M + sin^2 a / N, with M and N the
/// meridian and prime-vertical radii of curvature (EPSG Guidance Note 7-2, from memory).
pub fn radius_of_curvature(latitude_deg: f64, azimuth_deg: f64) -> f64 {
    let e2 = WGS84_F * (2.0 - WGS84_F);
    let sin_lat = latitude_deg.to_radians().sin();
    let w2 = 1.0 - e2 * sin_lat * sin_lat;
    let n = WGS84_A / w2.sqrt();
    let m = WGS84_A * (1.0 - e2) / (w2 * w2.sqrt());
    let (sin_a, cos_a) = azimuth_deg.to_radians().sin_cos();
    1.0 / (cos_a * cos_a / m + sin_a * sin_a / n)
}

/// The scene's origin on the earth and the turn of its plan: converts WGS84 latitudes and
/// longitudes to plan metres and back.
#[derive(Clone, Debug)]
pub struct LocalFrame {
    geodesic: Geodesic,
    latitude_deg: f64,
    longitude_deg: f64,
    /// The bearing of true north, degrees clockwise from the plan's y axis.
    north_deg: f64,
    /// The refraction coefficient applied to the fall of the ground.
    refraction: f64,
}

impl LocalFrame {
    /// The frame of an origin (WGS84 degrees), the bearing of true north from the plan's y
    /// axis (degrees clockwise) and the refraction coefficient for the fall of the ground.
    pub fn new(latitude_deg: f64, longitude_deg: f64, north_deg: f64, refraction: f64) -> Self {
        LocalFrame {
            geodesic: Geodesic::wgs84(),
            latitude_deg,
            longitude_deg,
            north_deg,
            refraction,
        }
    }

    /// The origin's latitude and longitude, degrees.
    pub fn origin_deg(&self) -> (f64, f64) {
        (self.latitude_deg, self.longitude_deg)
    }

    /// Plan metres (x, y) of a point, and the fall of the ground there (metres, positive
    /// down).
    pub fn to_plan(&self, latitude_deg: f64, longitude_deg: f64) -> (f64, f64, f64) {
        let (s, azimuth, _, _): (f64, f64, f64, f64) = self.geodesic.inverse(
            self.latitude_deg,
            self.longitude_deg,
            latitude_deg,
            longitude_deg,
        );
        let plan_azimuth = (azimuth + self.north_deg).to_radians();
        let drop = curvature_drop(
            s,
            radius_of_curvature(self.latitude_deg, azimuth),
            self.refraction,
        );
        (s * plan_azimuth.sin(), s * plan_azimuth.cos(), drop)
    }

    /// A plan point's WGS84 latitude and longitude (degrees): the inverse of [`Self::to_plan`].
    pub fn to_latlon(&self, p: &Point3<f64>) -> (f64, f64) {
        let s = p.x.hypot(p.y);
        let azimuth = p.x.atan2(p.y).to_degrees() - self.north_deg;
        let (latitude, longitude, _): (f64, f64, f64) =
            self.geodesic
                .direct(self.latitude_deg, self.longitude_deg, azimuth, s);
        (latitude, longitude)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn assert_near(a: f64, b: f64, eps: f64) {
        assert!(
            (a - b).abs() <= eps,
            "{a} vs {b} (differ by {:e})",
            (a - b).abs()
        );
    }

    #[test]
    fn the_fall_of_the_ground_at_one_and_five_kilometres() {
        // The figures, and the surveyor's rule of thumb (common practice): about
        // 7.8 cm at 1 km and 1.96 m at 5 km on a sphere of 6371 km (d^2 / 2R).
        assert_near(curvature_drop(1000.0, 6_371_000.0, 0.0), 0.0785, 0.0001);
        assert_near(curvature_drop(5000.0, 6_371_000.0, 0.0), 1.962, 0.001);
        // With refraction the apparent fall is (1 - k) of it: 6.8 cm at 1 km for k = 0.13.
        assert_near(
            curvature_drop(1000.0, 6_371_000.0, SURVEY_REFRACTION),
            0.0683,
            0.0001,
        );
        // Against the circle's exact sagitta R - sqrt(R^2 - d^2).
        let r: f64 = 6_371_000.0;
        assert_near(
            curvature_drop(5000.0, r, 0.0),
            r - (r * r - 5000.0f64.powi(2)).sqrt(),
            1e-6,
        );
    }

    #[test]
    fn radii_of_curvature_of_wgs84() {
        // At the equator the meridian radius is a (1 - e^2) = 6,335,439 m and the
        // prime-vertical radius is a; at the pole both are a^2 / b = 6,399,594 m (WGS84's
        // defining figures, from memory).
        assert_near(radius_of_curvature(0.0, 0.0), 6_335_439.3, 0.1);
        assert_near(radius_of_curvature(0.0, 90.0), 6_378_137.0, 1e-6);
        assert_near(radius_of_curvature(90.0, 33.0), 6_399_593.6, 0.1);
    }

    #[test]
    fn plan_and_latlon_are_inverse() {
        let frame = LocalFrame::new(47.2, 8.5, 12.0, 0.0);
        for (x, y) in [(0.0, 0.0), (120.5, -30.25), (-4000.0, 2500.0)] {
            let (lat, lon) = frame.to_latlon(&Point3::new(x, y, 0.0));
            let (x2, y2, _) = frame.to_plan(lat, lon);
            assert_near(x2, x, 1e-7);
            assert_near(y2, y, 1e-7);
        }
    }

    #[test]
    fn north_turns_the_plan_clockwise() {
        // A point due east (true) of an origin on the equator, in a plan whose y axis is
        // 90 degrees west of true north (true north bears 90 clockwise from y): it lies on
        // the plan's -y axis.
        let frame = LocalFrame::new(0.0, 0.0, 90.0, 0.0);
        let (x, y, _) = frame.to_plan(0.0, 0.001);
        assert_near(x, 0.0, 1e-9);
        assert!(y < -100.0, "{y}");
    }
}
