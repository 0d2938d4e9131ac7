//! proj4rs as an outside oracle for pansite's angle -> image mapping.
//!
//! The image is the equidistant cylindrical (plate carree) projection: J. P. Snyder, "Map
//! Projections: A Working Manual", USGS Professional Paper 1395 (1987), section 12, equations
//! 12-1 `x = R (lon - lon0) cos lat1` and 12-2 `y = R lat` (section and equation numbers from
//! memory; the formulas themselves, for R = 1, are confirmed here by E. W. Weisstein,
//! "Cylindrical Equidistant Projection", CRC Concise Encyclopedia of Mathematics,
//! archive.lib.msu.edu/crcmath/math/math/c/c911.htm). Snyder gives no numerical example for
//! this projection (from memory, not confirmed here), so the numbers
//! come from proj4rs 0.1.10 (a Rust port of PROJ's `eqc`, `src/projections/eqc.rs`:
//! `forward(lam, phi) = (lam * cos(lat_ts), phi - lat_0)`, then `transform.rs` scales by the
//! semi-major axis `a` and adds `x_0`, `y_0`).
//!
//! On the unit sphere (`+a=1 +b=1`) with `lon_0 = lat_ts = 0` proj4rs gives
//! `(x, y) = (lon, lat)` in radians. pansite puts relative azimuth `r` = longitude and
//! elevation `e` = latitude at `x_px = (x + pi) W / (2 pi)`, `y_px = (pi/2 - y) H / pi`: the
//! plate carree shifted so the left border is -180 degrees and flipped so the top row is the
//! zenith (pansite's lib.rs conventions).

use pansite::plane::{Equirect, ImagePoint};
use proj4rs::adaptors::transform_vertex_2d;
use proj4rs::Proj;
use std::f64::consts::{FRAC_PI_2, PI};

mod common;
use common::assert_near;

/// The two coordinate systems, with the parameter names proj4rs 0.1.10 reads: `+a`/`+b` for
/// the ellipsoid (`proj.rs` `get_ellipsoid`, `ellps.rs`), `+lon_0`, `+x_0`, `+y_0` (`proj.rs`),
/// `+lat_ts` (`projections/eqc.rs`); `longlat` is an alias of `latlong` (`projections/mod.rs`).
fn systems() -> (Proj, Proj) {
    let geographic = Proj::from_proj_string("+proj=longlat +a=1 +b=1").expect("longlat");
    let plate_carree =
        Proj::from_proj_string("+proj=eqc +a=1 +b=1 +lon_0=0 +lat_ts=0 +x_0=0 +y_0=0")
            .expect("eqc");
    (geographic, plate_carree)
}

/// Longitudes and latitudes (radians) on a 7.5-degree grid including the borders, plus a few
/// awkward values.
fn grid() -> Vec<(f64, f64)> {
    let mut points = Vec::new();
    for i in 0..=48 {
        for j in 0..=24 {
            let lon = (-180.0 + 7.5 * i as f64).to_radians();
            let lat = (-90.0 + 7.5 * j as f64).to_radians();
            points.push((lon, lat));
        }
    }
    points.extend_from_slice(&[
        (-PI, FRAC_PI_2),
        (PI, -FRAC_PI_2),
        (0.0, 0.0),
        (1e-12, -1e-12),
        (PI - 1e-9, 0.3),
        (-PI + 1e-9, -0.3),
        (0.123_456_789, 1.234_567_89),
        (-2.5, -0.577_215_664),
    ]);
    points
}

#[test]
fn proj4rs_plate_carree_is_longitude_latitude_on_the_unit_sphere() {
    // The oracle itself, checked before it is used: on the unit sphere with no offsets the
    // projected coordinates are the angles in radians (Snyder 12-1, 12-2 with R = 1,
    // lon0 = lat1 = 0).
    let (geographic, plate_carree) = systems();
    for (lon, lat) in grid() {
        // Source: proj4rs 0.1.10 eqc forward.
        let (x, y) = transform_vertex_2d(&geographic, &plate_carree, (lon, lat)).unwrap();
        assert_near(x, lon, 1e-15);
        assert_near(y, lat, 1e-15);
    }
    // With R = 2 and lat_ts = 60 degrees, x = R lon cos 60 = lon (Snyder 12-1), y = 2 lat
    // (12-2): the oracle does read the parameters this file relies on.
    let sphere2 = Proj::from_proj_string("+proj=longlat +a=2 +b=2").unwrap();
    let eqc60 = Proj::from_proj_string("+proj=eqc +a=2 +b=2 +lat_ts=60").unwrap();
    let (x, y) = transform_vertex_2d(&sphere2, &eqc60, (0.5, 0.25)).unwrap();
    assert_near(x, 0.5, 1e-15);
    assert_near(y, 0.5, 1e-15);
}

#[test]
fn to_image_matches_proj4rs_plate_carree() {
    let (geographic, plate_carree) = systems();
    for (width, height) in [(8192.0, 4096.0), (1000.0, 500.0)] {
        let map = Equirect::from_size_px(width, height);
        for (lon, lat) in grid() {
            // Source: proj4rs 0.1.10 eqc forward (Snyder 1987, section 12).
            let (x, y) = transform_vertex_2d(&geographic, &plate_carree, (lon, lat)).unwrap();
            let expected_x = (x + PI) * width / (2.0 * PI);
            let expected_y = (FRAC_PI_2 - y) * height / PI;
            let p = map.to_image(lon, lat);
            assert_near(p.x, expected_x, 1e-9);
            assert_near(p.y, expected_y, 1e-9);
        }
    }
}

#[test]
fn to_angles_matches_proj4rs_inverse() {
    let (geographic, plate_carree) = systems();
    for (width, height) in [(8192.0, 4096.0), (1000.0, 500.0)] {
        let map = Equirect::from_size_px(width, height);
        for i in 0..=40 {
            for j in 0..=20 {
                let p = ImagePoint::new(width * i as f64 / 40.0, height * j as f64 / 20.0);
                // Pixels to plate carree coordinates, then proj4rs eqc inverse.
                let x = p.x * 2.0 * PI / width - PI;
                let y = FRAC_PI_2 - p.y * PI / height;
                let (lon, lat) = transform_vertex_2d(&plate_carree, &geographic, (x, y)).unwrap();
                let (r, e) = map.to_angles(p);
                assert_near(r, lon, 1e-12);
                assert_near(e, lat, 1e-12);
            }
        }
    }
}
