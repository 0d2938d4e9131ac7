//! Open data against outside sources: RFC 7946's own examples and winding rule, CityJSON
//! 2.0's transform on a hand-made file (in the reader's unit tests), GeographicLib's
//! geodesics, the Aviation Formulary's local flat-earth radii, EPSG Guidance Note 7-2's
//! transverse-Mercator example, and every footprint corner in `pansite angles` against a
//! position computed here independently.

use geographiclib_rs::{DirectGeodesic, Geodesic, InverseGeodesic};
use pansite::scene::{read_geojson, LocalFrame, Placed, Selection};
use std::process::Command;

mod common;
use common::assert_near;

fn far() -> Selection {
    Selection {
        within: 1e7,
        ..Selection::default()
    }
}

fn signed_area(ring: &[nalgebra::Vector2<f64>]) -> f64 {
    (0..ring.len())
        .map(|i| ring[i].perp(&ring[(i + 1) % ring.len()]))
        .sum::<f64>()
        / 2.0
}

/// RFC 7946, Appendix A.3, "Polygons", the example with holes; and A.6, "MultiPolygons".
const RFC_POLYGON_WITH_HOLE: &str = r#"{"type": "FeatureCollection", "features": [
  {"type": "Feature", "properties": {"building": "yes"}, "geometry": {"type": "Polygon",
   "coordinates": [
     [[100.0, 0.0], [101.0, 0.0], [101.0, 1.0], [100.0, 1.0], [100.0, 0.0]],
     [[100.8, 0.8], [100.8, 0.2], [100.2, 0.2], [100.2, 0.8], [100.8, 0.8]]]}},
  {"type": "Feature", "properties": {"building": "yes"}, "geometry": {"type": "MultiPolygon",
   "coordinates": [
     [[[102.0, 2.0], [103.0, 2.0], [103.0, 3.0], [102.0, 3.0], [102.0, 2.0]]],
     [[[100.0, 0.0], [101.0, 0.0], [101.0, 1.0], [100.0, 1.0], [100.0, 0.0]],
      [[100.2, 0.2], [100.2, 0.8], [100.8, 0.8], [100.8, 0.2], [100.2, 0.2]]]]}}]}"#;

fn buildings(text: &str, frame: &LocalFrame) -> Vec<Vec<Vec<nalgebra::Vector2<f64>>>> {
    read_geojson(text.as_bytes(), frame, &far())
        .unwrap()
        .placed
        .into_iter()
        .filter_map(|p| match p {
            Placed::Building { rings, .. } => Some(rings),
            _ => None,
        })
        .collect()
}

#[test]
fn rfc_7946_polygons_and_multipolygons_with_holes() {
    let frame = LocalFrame::new(0.5, 100.5, 0.0, 0.0);
    let found = buildings(RFC_POLYGON_WITH_HOLE, &frame);
    // One polygon with its hole, then the multipolygon's two polygons (the second holed).
    let ring_counts: Vec<usize> = found.iter().map(Vec::len).collect();
    assert_eq!(ring_counts, [2, 1, 2]);
    // RFC 7946, 3.1.6: exterior rings counter-clockwise, holes clockwise. The example's
    // rings follow the rule, and the plan (x east, y north) keeps their turn: no mirror.
    for rings in &found {
        assert!(signed_area(&rings[0]) > 0.0);
        for hole in &rings[1..] {
            assert!(signed_area(hole) < 0.0);
        }
    }
    // The hole is 0.6 degree square inside the 1 degree square: 36 % of its area, near
    // the equator (to 1 % for the change of scale with latitude).
    let ratio = -signed_area(&found[0][1]) / signed_area(&found[0][0]);
    assert_near(ratio, 0.36, 0.0036);
}

#[test]
fn rfc_7946_winding_is_not_trusted() {
    // 3.1.6: "parsers SHOULD NOT reject Polygons that do not follow the right-hand rule".
    let reversed = RFC_POLYGON_WITH_HOLE.replace(
        "[[100.0, 0.0], [101.0, 0.0], [101.0, 1.0], [100.0, 1.0], [100.0, 0.0]],\n     [[100.8",
        "[[100.0, 0.0], [100.0, 1.0], [101.0, 1.0], [101.0, 0.0], [100.0, 0.0]],\n     [[100.8",
    );
    assert_ne!(reversed, RFC_POLYGON_WITH_HOLE);
    let site_of = |text: &str| {
        let dir = std::env::temp_dir().join(format!("pansite-winding-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        std::fs::write(dir.join("rfc.geojson"), text).unwrap();
        let scene = "Scene(location: (latitude: 0.5, longitude: 100.5), items: [\
                     OpenData(file: \"rfc.geojson\", within: 1000000)])";
        let site = pansite::scene::parse_scene(scene.as_bytes(), &dir.join("s.ron"), "s").unwrap();
        let _ = std::fs::remove_dir_all(&dir);
        let mut ends: Vec<[i64; 6]> = site
            .edges
            .iter()
            .filter_map(|e| match e.curve {
                pansite::scene::SiteCurve::Segment { start, end } => {
                    let (a, b) = if (start.x, start.y, start.z) < (end.x, end.y, end.z) {
                        (start, end)
                    } else {
                        (end, start)
                    };
                    let k = |v: f64| (v * 1e3).round() as i64;
                    Some([k(a.x), k(a.y), k(a.z), k(b.x), k(b.y), k(b.z)])
                }
                _ => None,
            })
            .collect();
        ends.sort();
        (ends, site.faces.len())
    };
    assert_eq!(site_of(RFC_POLYGON_WITH_HOLE), site_of(&reversed));
}

#[test]
fn plan_positions_are_geodesics_from_the_origin() {
    // GeographicLib (Karney 2013, the geographiclib-rs port) as the oracle: a point
    // s metres from the origin at azimuth a lies at (s sin a, s cos a), to 1 mm and
    // 1e-6 degree of azimuth, within 5 km.
    let geodesic = Geodesic::wgs84();
    for (lat0, lon0) in [(51.5, -0.1), (-33.9, 151.2), (64.1, -21.9), (0.0, 179.999)] {
        let frame = LocalFrame::new(lat0, lon0, 0.0, 0.0);
        for (azimuth, s) in [
            (0.0, 5000.0),
            (37.0, 1234.5),
            (135.0, 4999.0),
            (270.0, 80.0),
        ] {
            let (lat, lon, _): (f64, f64, f64) = geodesic.direct(lat0, lon0, azimuth, s);
            let (x, y, _) = frame.to_plan(lat, lon);
            assert_near(x.hypot(y), s, 1e-3);
            let plan_azimuth = x.atan2(y).to_degrees().rem_euclid(360.0);
            let diff = (plan_azimuth - azimuth + 180.0).rem_euclid(360.0) - 180.0;
            assert!(diff.abs() < 1e-6, "{azimuth} vs {plan_azimuth}");
        }
        // Between two points other than the origin, the plan distance is the geodesic's
        // to a millimetre (the azimuthal equidistant projection's distortion, about
        // d^3 / R^2, stays below it within 5 km).
        let (lat_a, lon_a, _): (f64, f64, f64) = geodesic.direct(lat0, lon0, 20.0, 4000.0);
        let (lat_b, lon_b, _): (f64, f64, f64) = geodesic.direct(lat0, lon0, 250.0, 3500.0);
        let s_ab: f64 = geodesic.inverse(lat_a, lon_a, lat_b, lon_b);
        let (xa, ya, _) = frame.to_plan(lat_a, lon_a);
        let (xb, yb, _) = frame.to_plan(lat_b, lon_b);
        assert_near((xa - xb).hypot(ya - yb), s_ab, 1e-3);
    }
}

#[test]
fn aviation_formulary_local_flat_earth_radii() {
    // Ed Williams, "Aviation Formulary" V1.47, "Local, flat earth approximation" (from
    // memory): north = R1 dlat, east = R2 cos(lat0) dlon, with R1 = a (1 - e^2) /
    // (1 - e^2 sin^2 lat0)^(3/2) and R2 = a / sqrt(1 - e^2 sin^2 lat0); exact in the limit
    // of small offsets. Checked at 10 m, where the approximation is good to 0.1 mm.
    let (a, f): (f64, f64) = (6_378_137.0, 1.0 / 298.257_223_563);
    let e2 = f * (2.0 - f);
    for lat0 in [0.0f64, 33.95, 52.0, 70.0] {
        let w = 1.0 - e2 * lat0.to_radians().sin().powi(2);
        let (r1, r2) = (a * (1.0 - e2) / w.powf(1.5), a / w.sqrt());
        let frame = LocalFrame::new(lat0, -118.4, 0.0, 0.0);
        let dlat = (10.0 / r1).to_degrees();
        let (x, y, _) = frame.to_plan(lat0 + dlat, -118.4);
        assert_near(y, 10.0, 1e-4);
        assert_near(x, 0.0, 1e-4);
        let dlon = (10.0 / (r2 * lat0.to_radians().cos())).to_degrees();
        let (x, y, _) = frame.to_plan(lat0, -118.4 + dlon);
        assert_near(x, 10.0, 1e-4);
        assert!(
            y.abs() < 1e-4 + 10.0 * 10.0 / 6.3e6 * lat0.to_radians().tan(),
            "{y}"
        );
        // And the radii themselves, as pansite uses them for the fall of the ground.
        let east: f64 = pansite::scene::radius_of_curvature(lat0, 90.0);
        let north: f64 = pansite::scene::radius_of_curvature(lat0, 0.0);
        assert_near(east, r2, 1e-6 * r2);
        assert_near(north, r1, 1e-6 * r1);
    }
}

#[test]
fn epsg_guidance_note_7_2_transverse_mercator_example() {
    // IOGP Publication 373-7-2 (EPSG Guidance Note 7-2), section on Transverse Mercator
    // (EPSG method 9807), worked example on OSGB 1936 / British National Grid: latitude
    // 50 deg 30' N, longitude 0 deg 30' E on OSGB 1936 gives E = 577,274.99 m,
    // N = 69,740.50 m (from memory; not confirmed against the document here). The
    // definition of EPSG:27700 comes from crs-definitions, the projection from proj4rs,
    // as pansite reads grids; both ends on OSGB 1936, so no datum shift enters.
    let def = crs_definitions::from_code(27700).unwrap();
    let grid = proj4rs::Proj::from_proj_string(def.proj4).unwrap();
    let geographic = proj4rs::Proj::from_proj_string("+proj=longlat +datum=OSGB36").unwrap();
    let (e, n) = proj4rs::adaptors::transform_vertex_2d(
        &geographic,
        &grid,
        (0.5f64.to_radians(), 50.5f64.to_radians()),
    )
    .unwrap();
    assert_near(e, 577_274.99, 0.01);
    assert_near(n, 69_740.50, 0.01);
}

#[test]
fn every_footprint_corner_in_angles_where_it_is_computed_here() {
    // One building 6 m high, 40 m north-east of the origin, seen from the origin (a
    // standpoint by latitude and longitude). Each corner is placed here independently:
    // GeographicLib's inverse from the standpoint gives distance and azimuth; the corner
    // lies d^2 / 2R lower (R = 6,371 km, good to a micrometre at this distance).
    let corners = [
        (-2.50000, 51.00030),
        (-2.49990, 51.00030),
        (-2.49990, 51.00040),
        (-2.50000, 51.00040),
    ];
    let ring: Vec<String> = corners
        .iter()
        .chain(std::iter::once(&corners[0]))
        .map(|(lon, lat)| format!("[{lon}, {lat}]"))
        .collect();
    let geojson = format!(
        r#"{{"type": "FeatureCollection", "features": [{{"type": "Feature", "id": "w1",
            "properties": {{"building": "yes", "name": "mill", "height": "6"}},
            "geometry": {{"type": "Polygon", "coordinates": [[{}]]}}}}]}}"#,
        ring.join(", ")
    );
    let dir = std::env::temp_dir().join(format!("pansite-angles-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    std::fs::write(dir.join("mill.geojson"), geojson).unwrap();
    std::fs::write(
        dir.join("mill.ron"),
        "Scene(location: (latitude: 51.0, longitude: -2.5), standpoints: [(name: \"here\", \
         latitude: 51.0002, longitude: -2.50005, eye_height: 1.5)], \
         items: [OpenData(file: \"mill.geojson\")])",
    )
    .unwrap();
    let output = Command::new(env!("CARGO_BIN_EXE_pansite"))
        .args(["angles", "mill.ron", "--format", "csv", "--item", "mill"])
        .current_dir(&dir)
        .output()
        .unwrap();
    let _ = std::fs::remove_dir_all(&dir);
    assert!(
        output.status.success(),
        "{}",
        String::from_utf8_lossy(&output.stderr)
    );
    let text = String::from_utf8(output.stdout).unwrap();
    let header: Vec<&str> = text.lines().next().unwrap().split(',').collect();
    let column = |name: &str| header.iter().position(|h| *h == name).unwrap();
    let rows: Vec<Vec<f64>> = text
        .lines()
        .skip(1)
        .map(|line| {
            line.split(',')
                .skip(2)
                .map(|c| c.parse().unwrap_or(f64::NAN))
                .collect()
        })
        .collect();
    let get = |row: &Vec<f64>, name: &str| row[column(name) - 2];
    assert_eq!(rows.len(), 8, "{text}");
    let geodesic = Geodesic::wgs84();
    let (eye_lat, eye_lon, eye_z) = (51.0002, -2.50005, 1.5);
    for (lon, lat) in corners {
        for height in [0.0, 6.0] {
            let (s, azimuth, _, _): (f64, f64, f64, f64) =
                geodesic.inverse(eye_lat, eye_lon, lat, lon);
            // The corner's height: the building stands on the ground at its middle,
            // d^2 / 2R below the origin's plane (d from the origin, about 45 m).
            let (d_mid, _, _, _): (f64, f64, f64, f64) =
                geodesic.inverse(51.0, -2.5, 51.00035, -2.49995);
            let z = height - d_mid * d_mid / (2.0 * 6_371_000.0);
            let elevation = (z - eye_z).atan2(s).to_degrees();
            let row = rows
                .iter()
                .find(|r| {
                    (get(r, "latitude") - lat).abs() < 1e-7
                        && (get(r, "longitude") - lon).abs() < 1e-7
                        && (get(r, "z") - z).abs() < 0.01
                })
                .unwrap_or_else(|| panic!("no row for {lat}, {lon}, {height} in\n{text}"));
            let diff =
                (get(row, "azimuth") - azimuth.rem_euclid(360.0) + 180.0).rem_euclid(360.0) - 180.0;
            // The table prints three decimals.
            assert!(
                diff.abs() <= 0.0006,
                "azimuth {} vs {azimuth}",
                get(row, "azimuth")
            );
            assert_near(get(row, "elevation"), elevation, 0.0006);
        }
    }
}

/// A mapped street that cannot be joined where it meets another (here the demo's lane, whose
/// last mapped piece is 1 m long at an acute corner) is drawn on its own with a warning that
/// names it: one awkward mapped corner must not refuse the whole block. A road written in
/// the scene is still refused (the bad-input corpus's kerb files).
#[test]
fn a_mapped_street_that_cannot_be_joined_is_drawn_alone_with_a_warning() {
    let site =
        pansite::scene::load_scene(std::path::Path::new("scenes/opendata/saltmarsh-row.ron"))
            .unwrap();
    let lane = site
        .items
        .iter()
        .position(|i| i.label.as_deref() == Some("Harbour Lane"))
        .expect("the demo's lane");
    let warned: Vec<&String> = site
        .warnings
        .iter()
        .filter(|(item, _)| item.0 as usize == lane)
        .map(|(_, w)| w)
        .collect();
    assert!(
        warned
            .iter()
            .any(|w| w.starts_with("not joined to the streets it meets")),
        "{warned:?}"
    );
    assert!(
        site.edges.iter().any(|e| e.item.0 as usize == lane),
        "the lane is still drawn"
    );
}

#[test]
fn an_outline_holding_a_building_part_is_drawn_by_its_parts_alone() {
    // The simple 3D buildings convention (common practice in mapping): a `building`
    // outline that holds a `building:part` is left out, its parts drawn instead; an
    // outline with no part inside stays. Here an outline about 22 m square holds a part
    // about 11 m square in its middle, and a second outline, 220 m east, holds none.
    let square = |lon: f64, lat: f64, half: f64| {
        format!(
            "[[[{a}, {b}], [{c}, {b}], [{c}, {d}], [{a}, {d}], [{a}, {b}]]]",
            a = lon - half,
            b = lat - half,
            c = lon + half,
            d = lat + half
        )
    };
    let feature = |tags: &str, rings: String| {
        format!(
            r#"{{"type": "Feature", "properties": {{{tags}}}, "geometry": {{"type": "Polygon", "coordinates": {rings}}}}}"#
        )
    };
    let text = format!(
        r#"{{"type": "FeatureCollection", "features": [{}, {}, {}]}}"#,
        feature(r#""building": "yes""#, square(0.0, 0.0, 0.0001)),
        feature(r#""building:part": "yes""#, square(0.0, 0.0, 0.00005)),
        feature(r#""building": "yes""#, square(0.002, 0.0, 0.0001)),
    );
    let frame = LocalFrame::new(0.0, 0.0, 0.0, 0.0);
    let found = buildings(&text, &frame);
    assert_eq!(found.len(), 2, "{found:?}");
    // Sizes in metres: 0.0001 degree is about 11.1 m at the equator.
    let width = |rings: &Vec<Vec<nalgebra::Vector2<f64>>>| {
        let xs = rings[0].iter().map(|p| p.x);
        xs.clone().fold(f64::MIN, f64::max) - xs.fold(f64::MAX, f64::min)
    };
    let mut widths: Vec<f64> = found.iter().map(width).collect();
    widths.sort_by(f64::total_cmp);
    assert_near(widths[0], 11.13, 0.05);
    assert_near(widths[1], 22.26, 0.05);
    // The one left whole is the far one: its middle is about 222.6 m east.
    let far_one = found.iter().find(|r| width(r) > 20.0).unwrap();
    let middle = far_one[0].iter().map(|p| p.x).sum::<f64>() / far_one[0].len() as f64;
    assert!(middle > 200.0, "{middle}");
}

/// The crest of a convex outline seen across a half ellipse x^2 / r^2 + z^2 / h^2 = 1
/// (z >= 0) from the point (d, e) of its plane: a line z = m x + c touches the ellipse when
/// c^2 = m^2 r^2 + h^2, at (-m r^2 / c, h^2 / c) (the tangent condition of an ellipse, any
/// handbook of conics). Through the eye c = e - m d; the crest is the steeper tangent, the
/// smaller root m.
fn crest_by_conics(d: f64, e: f64, r: f64, h: f64) -> (f64, f64) {
    let (a, b, c) = (d * d - r * r, -2.0 * e * d, e * e - h * h);
    let m = (-b - (b * b - 4.0 * a * c).sqrt()) / (2.0 * a);
    let intercept = e - m * d;
    (-m * r * r / intercept, h * h / intercept)
}

/// Draws the site from its first standpoint (eye 1.6 m above the origin, level, facing
/// north) at 4096 x 2048 without hidden edges, and gives the distance (pixels) from where a
/// site point lands, worked here, to the nearest drawn line.
fn drawn_from_eye_level(site: &pansite::scene::Site) -> impl Fn([f64; 3]) -> f64 {
    let (w, h) = (4096.0, 2048.0);
    let settings = pansite::render::RenderSettings {
        width: w as u32,
        height: h as u32,
        overlays: false,
        hidden: Some(pansite::scene::HiddenEdges::Off),
        ..pansite::render::RenderSettings::default()
    };
    let drawing = pansite::render::draw(site, &site.standpoints[0], &settings)
        .unwrap()
        .drawing;
    move |point: [f64; 3]| {
        let (x, y) = common::predicted_pixel([0.0, 0.0, 1.6], (0.0, 0.0, 0.0), point, w, h);
        common::distance_to_polylines(
            pansite::plane::ImagePoint::new(x, y),
            drawing.layers.iter().flat_map(|l| l.lines.iter()),
        )
    }
}

#[test]
fn a_mapped_dome_rises_its_roof_height_and_its_outline_is_the_tangent_conics_give() {
    // A round building mapped as a 32-sided polygon of radius 8 m, 60 m north of the
    // standpoint, tagged `height=14`, `roof:shape=dome`, `roof:height=6`: by the simple 3D
    // buildings conventions (common practice in mapping) its walls stand 8 m and the
    // dome's crown 6 m above them.
    let (lat0, lon0) = (45.0, -30.0);
    let geodesic = Geodesic::wgs84();
    let (centre_lat, centre_lon, _) = geodesic.direct(lat0, lon0, 0.0, 60.0);
    let ring: Vec<String> = (0..=32)
        .map(|k| {
            let azimuth = 360.0 * (k % 32) as f64 / 32.0;
            let (lat, lon, _) = geodesic.direct(centre_lat, centre_lon, azimuth, 8.0);
            format!("[{lon}, {lat}]")
        })
        .collect();
    let data = format!(
        r#"{{"type": "FeatureCollection", "features": [{{"type": "Feature", "properties":
        {{"building": "yes", "height": "14", "roof:shape": "dome", "roof:height": "6"}},
        "geometry": {{"type": "Polygon", "coordinates": [[{}]]}}}}]}}"#,
        ring.join(", ")
    );
    let dir = common::Scratch::new("dome");
    dir.write("dome.geojson", &data);
    let scene = format!(
        "Scene(location: (latitude: {lat0}, longitude: {lon0}), \
         standpoints: [(name: \"here\", x: 0, y: 0, ground: 0, eye_height: 1.6)], \
         items: [OpenData(file: \"dome.geojson\")])"
    );
    let site = pansite::scene::parse_scene(scene.as_bytes(), &dir.path("s.ron"), "s").unwrap();
    assert!(site.warnings.is_empty(), "{:?}", site.warnings);

    // The ground there has fallen d^2 / 2R with the earth's curve (0.28 mm at 60 m).
    let fall = 60.0f64.powi(2) / (2.0 * 6_371_000.0);
    let (centre, r, h) = site
        .outlines
        .iter()
        .find_map(|o| match o.shape {
            pansite::scene::RoundOutline::Dome {
                centre,
                radius,
                height,
            } => Some((centre, radius, height)),
            _ => None,
        })
        .expect("a dome");
    assert_near(h, 6.0, 1e-9);
    assert_near(centre.z, 8.0 - fall, 5e-4);
    assert_near(centre.coords.xy().norm(), 60.0, 1e-3);
    // It stands on the largest circle inside the footprint: the apothem 8 cos(pi / 32).
    assert_near(r, 8.0 * (std::f64::consts::PI / 32.0).cos(), 1e-3);
    let crown = site
        .faces
        .iter()
        .flat_map(|f| f.corners)
        .map(|p| p.z)
        .fold(f64::MIN, f64::max);
    assert_near(crown, 14.0 - fall, 5e-4);

    // The crest of its outline from the eye, by conics: in the vertical plane through the
    // eye and the dome's axis the dome is the half ellipse x^2 / r^2 + z^2 / h^2 = 1 (x
    // towards the eye, z up from the walls' top).
    let eye = nalgebra::Point3::new(0.0, 0.0, 1.6);
    let towards_eye = (eye.coords.xy() - centre.coords.xy()).normalize();
    let (x_t, z_t) = crest_by_conics(
        (eye.coords.xy() - centre.coords.xy()).norm(),
        eye.z - centre.z,
        r,
        h,
    );
    let crest = |z_t: f64| {
        [
            centre.x + towards_eye.x * x_t,
            centre.y + towards_eye.y * x_t,
            centre.z + z_t,
        ]
    };
    let on_drawing = drawn_from_eye_level(&site);
    assert!(on_drawing(crest(z_t)) < 0.5, "{}", on_drawing(crest(z_t)));
    // 0.3 m above it (3 pixels at 60 m): nothing drawn.
    assert!(on_drawing(crest(z_t + 0.3)) > 2.0);
}

/// A scene standing at 45 N, 30 W over a GeoJSON of two 10 m square buildings 6 m high,
/// "near" 500 m and "far" 2 km due north of the origin, with the `OpenData` item's extra
/// fields; the site, and the lowest z of each building's edges by its id.
fn two_buildings_north(fields: &str) -> (usize, Option<f64>, Option<f64>) {
    let geodesic = Geodesic::wgs84();
    let building = |id: &str, north: f64| {
        let ring: Vec<String> = [
            (-5.0, -5.0),
            (5.0, -5.0),
            (5.0, 5.0),
            (-5.0, 5.0),
            (-5.0, -5.0),
        ]
        .iter()
        .map(|&(e, n): &(f64, f64)| {
            let (lat, lon, _): (f64, f64, f64) = geodesic.direct(
                45.0,
                -30.0,
                e.atan2(north + n).to_degrees(),
                e.hypot(north + n),
            );
            format!("[{lon}, {lat}]")
        })
        .collect();
        format!(
            r#"{{"type": "Feature", "id": "{id}", "properties": {{"building": "yes", "height": "6"}},
            "geometry": {{"type": "Polygon", "coordinates": [[{}]]}}}}"#,
            ring.join(", ")
        )
    };
    let dir = common::Scratch::new("two-north");
    dir.write(
        "two.geojson",
        format!(
            r#"{{"type": "FeatureCollection", "features": [{}, {}]}}"#,
            building("near", 500.0),
            building("far", 2000.0)
        ),
    );
    let scene = format!(
        "Scene(location: (latitude: 45.0, longitude: -30.0), \
         items: [OpenData(file: \"two.geojson\"{fields})])"
    );
    let site = pansite::scene::parse_scene(scene.as_bytes(), &dir.path("s.ron"), "s").unwrap();
    let lowest = |id: &str| {
        site.edges
            .iter()
            .filter(|e| site.describe_item(e.item).contains(&format!("\"{id}\"")))
            .flat_map(|e| match e.curve {
                pansite::scene::SiteCurve::Segment { start, end } => [start.z, end.z],
                _ => unreachable!("a footprint's edges are straight"),
            })
            .reduce(f64::min)
    };
    let buildings = site.items.iter().filter(|i| i.kind == "building").count();
    (buildings, lowest("near"), lowest("far"))
}

#[test]
fn within_drops_what_lies_beyond_and_the_ground_falls_with_the_earth() {
    // The fall of the ground d metres out is d^2 (1 - k) / 2R (common practice in
    // surveying; k the refraction coefficient, 0.13 the surveyors' usual value, R the
    // earth's radius of curvature along the line). Due north R is the meridian's radius
    // M = a (1 - e^2) / (1 - e^2 sin^2 lat)^(3/2) on WGS84 (a = 6378137 m,
    // 1/f = 298.257223563; any geodesy text, e.g. EPSG Guidance Note 7-2, from memory).
    let (a, f) = (6_378_137.0, 1.0 / 298.257_223_563);
    let e2 = f * (2.0 - f);
    let sin_lat = 45f64.to_radians().sin();
    let m = a * (1.0 - e2) / (1.0 - e2 * sin_lat * sin_lat).powf(1.5);
    let fall = |d: f64, k: f64| d * d * (1.0 - k) / (2.0 * m);
    // At 2 km: 0.314 m, and 0.273 m through air of k = 0.13: 41 mm apart, so a building
    // that did not fall, or fell by the wrong rule, is told apart at 2 mm (the spread of
    // the fall across a 10 m footprint, whose ground is its corners' mean, is 1.6 mm).
    assert_near(fall(2000.0, 0.0), 0.314, 0.001);

    let (count, near, far) = two_buildings_north(", within: 1000");
    assert_eq!(count, 1, "the building 2 km out is beyond 1 km");
    assert!(near.is_some() && far.is_none());
    assert_near(-near.unwrap(), fall(500.0, 0.0), 0.002);

    let (count, near, far) = two_buildings_north(", within: 3000");
    assert_eq!(count, 2);
    assert_near(-far.unwrap(), fall(2000.0, 0.0), 0.002);
    assert_near(-near.unwrap(), fall(500.0, 0.0), 0.002);

    let (_, _, far) = two_buildings_north(", within: 3000, refraction: 0.13");
    assert_near(-far.unwrap(), fall(2000.0, 0.13), 0.002);
}

#[test]
fn a_mapped_round_roof_rises_its_roof_height_and_its_crest_is_the_tangent_conics_give() {
    // A hall 20 m east-west and 8 m north-south, its middle 40 m north of the standpoint,
    // tagged `height=10`, `roof:shape=round`, `roof:height=3` (the simple 3D buildings
    // conventions, common practice in mapping; a round roof's axis runs along the long
    // sides): walls 7 m, the crown 3 m above them, over the 8 m span.
    let geodesic = Geodesic::wgs84();
    let corners = [
        (-10.0, 36.0),
        (10.0, 36.0),
        (10.0, 44.0),
        (-10.0, 44.0),
        (-10.0, 36.0),
    ];
    let ring: Vec<String> = corners
        .iter()
        .map(|&(east, north): &(f64, f64)| {
            let (lat, lon, _): (f64, f64, f64) = geodesic.direct(
                45.0,
                -30.0,
                east.atan2(north).to_degrees(),
                east.hypot(north),
            );
            format!("[{lon}, {lat}]")
        })
        .collect();
    let dir = common::Scratch::new("round-roof");
    dir.write(
        "hall.geojson",
        format!(
            r#"{{"type": "FeatureCollection", "features": [{{"type": "Feature", "properties":
            {{"building": "yes", "height": "10", "roof:shape": "round", "roof:height": "3"}},
            "geometry": {{"type": "Polygon", "coordinates": [[{}]]}}}}]}}"#,
            ring.join(", ")
        ),
    );
    let scene = "Scene(location: (latitude: 45.0, longitude: -30.0), \
                 standpoints: [(name: \"here\", x: 0, y: 0, ground: 0, eye_height: 1.6)], \
                 items: [OpenData(file: \"hall.geojson\")])";
    let site = pansite::scene::parse_scene(scene.as_bytes(), &dir.path("s.ron"), "s").unwrap();
    assert!(site.warnings.is_empty(), "{:?}", site.warnings);
    let fall = 40.0f64.powi(2) / (2.0 * 6_371_000.0);
    let crown = site
        .faces
        .iter()
        .flat_map(|f| f.corners)
        .map(|p| p.z)
        .fold(f64::MIN, f64::max);
    assert_near(crown, 10.0 - fall, 5e-4);
    // The two ends are exact half ellipses: 4 m across, 3 m up, springing at 7 m.
    let arches: Vec<_> = site
        .edges
        .iter()
        .filter_map(|e| match &e.curve {
            pansite::scene::SiteCurve::Ellipse(arc) => Some((arc.centre, arc.u, arc.v)),
            _ => None,
        })
        .collect();
    assert_eq!(arches.len(), 2);
    for (centre, u, v) in arches {
        assert_near(centre.z, 7.0 - fall, 5e-4);
        assert_near(centre.y, 40.0, 1e-3);
        assert_near(u.norm(), 4.0, 1e-3);
        assert_near(v.z, 3.0, 1e-9);
    }
    // Across the axis the roof is the half ellipse y^2 / 16 + z^2 / 9 = 1 above the eaves;
    // the eye is 40 m from the axis and 5.4 m below the eaves.
    let (y_t, z_t) = crest_by_conics(40.0, 1.6 - (7.0 - fall), 4.0, 3.0);
    let on_drawing = drawn_from_eye_level(&site);
    for x in [-6.0, 0.0, 6.0] {
        let point = [x, 40.0 - y_t, 7.0 - fall + z_t];
        assert!(on_drawing(point) < 0.5, "{x}: {}", on_drawing(point));
        // 0.3 m above it (about 3 pixels at 40 m): nothing drawn.
        assert!(on_drawing([point[0], point[1], point[2] + 0.3]) > 2.0);
    }
}

/// A small city model written by hand in CityJSON 2.0's structure (OGC 20-072r5,
/// "Geometry Objects": a Solid's boundaries are shells of surfaces, a MultiSurface's are
/// surfaces, each surface a list of rings, the first its outer ring and the others its
/// holes; "Semantics of geometric primitives": one value per surface; "Transform Object":
/// a vertex is its integers times the scale plus the translate). Millimetre integers,
/// the translate the grid origin the scene gives, so plan metres are the integers / 1000.
///
/// `house` (a Solid, lod 2): 10 m by 6 m, walls 5 m high, a gable roof of two quads rising
/// to a ridge 8 m high along x. The south wall is a quad with a window 2 m square cut in it
/// (an inner ring); the east gable end is one pentagon, the west one is a quad wall and
/// the triangle of its gable above it, two surfaces in one plane, as files often give it.
/// `yard-store` (a MultiSurface, lod 1): a flat block 4 m high on an L-shaped ground,
/// concave at (24, 4).
const GABLE_AND_L: &str = r#"{"type": "CityJSON", "version": "2.0",
  "transform": {"scale": [0.001, 0.001, 0.001], "translate": [500000.0, 5400000.0, 0.0]},
  "CityObjects": {
    "house": {"type": "Building", "geometry": [{"type": "Solid", "lod": "2",
      "boundaries": [[
        [[0, 3, 2, 1]],
        [[0, 1, 5, 4], [10, 13, 12, 11]],
        [[1, 2, 6, 9, 5]],
        [[2, 3, 7, 6]],
        [[3, 0, 4, 7]],
        [[7, 4, 8]],
        [[4, 5, 9, 8]],
        [[6, 7, 8, 9]]]],
      "semantics": {"surfaces": [{"type": "GroundSurface"}, {"type": "WallSurface"},
          {"type": "RoofSurface"}],
        "values": [[0, 1, 1, 1, 1, 1, 2, 2]]}}]},
    "yard-store": {"type": "Building", "geometry": [{"type": "MultiSurface", "lod": "1",
      "boundaries": [
        [[14, 19, 18, 17, 16, 15]],
        [[20, 21, 22, 23, 24, 25]],
        [[14, 15, 21, 20]], [[15, 16, 22, 21]], [[16, 17, 23, 22]],
        [[17, 18, 24, 23]], [[18, 19, 25, 24]], [[19, 14, 20, 25]]]}]}},
  "vertices": [
    [0, 0, 0], [10000, 0, 0], [10000, 6000, 0], [0, 6000, 0],
    [0, 0, 5000], [10000, 0, 5000], [10000, 6000, 5000], [0, 6000, 5000],
    [0, 3000, 8000], [10000, 3000, 8000],
    [4000, 0, 1000], [6000, 0, 1000], [6000, 0, 3000], [4000, 0, 3000],
    [20000, 0, 0], [32000, 0, 0], [32000, 4000, 0], [24000, 4000, 0], [24000, 10000, 0],
    [20000, 10000, 0],
    [20000, 0, 4000], [32000, 0, 4000], [32000, 4000, 4000], [24000, 4000, 4000],
    [24000, 10000, 4000], [20000, 10000, 4000]]}"#;

/// A segment as its two ends in millimetres, the lower end first.
type MillimetreSegment = ([i64; 3], [i64; 3]);

fn millimetres(a: nalgebra::Point3<f64>, b: nalgebra::Point3<f64>) -> MillimetreSegment {
    let mm = |p: nalgebra::Point3<f64>| [p.x, p.y, p.z].map(|v| (v * 1e3).round() as i64);
    let (a, b) = (mm(a), mm(b));
    if a < b {
        (a, b)
    } else {
        (b, a)
    }
}

/// The site a scene makes of a city model written as `text`, its grid origin at the
/// model's translate.
fn city_site(text: &str) -> pansite::scene::Site {
    // A folder of its own for each call: the tests run side by side.
    static CALLS: std::sync::atomic::AtomicUsize = std::sync::atomic::AtomicUsize::new(0);
    let call = CALLS.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
    let dir =
        std::env::temp_dir().join(format!("pansite-city-edges-{}-{call}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    std::fs::write(dir.join("block.city.json"), text).unwrap();
    let scene = "Scene(items: [OpenData(file: \"block.city.json\", origin: (500000, 5400000))])";
    let site = pansite::scene::parse_scene(scene.as_bytes(), &dir.join("s.ron"), "s");
    let _ = std::fs::remove_dir_all(&dir);
    site.unwrap()
}

/// The site's drawn edges, sorted, each asserted drawn once.
fn drawn_segments(site: &pansite::scene::Site) -> Vec<MillimetreSegment> {
    let mut drawn: Vec<MillimetreSegment> = site
        .edges
        .iter()
        .map(|e| match e.curve {
            pansite::scene::SiteCurve::Segment { start, end } => millimetres(start, end),
            ref other => panic!("a city model draws straight edges only: {other:?}"),
        })
        .collect();
    drawn.sort();
    let count = drawn.len();
    drawn.dedup();
    assert_eq!(drawn.len(), count, "an edge drawn twice");
    drawn
}

/// The edges of [`GABLE_AND_L`], sorted.
fn gable_and_l_sides() -> Vec<MillimetreSegment> {
    // The sides counted by hand, each once however many surfaces share it (metres).
    let side = |a: [i64; 3], b: [i64; 3]| {
        let m = |p: [i64; 3]| nalgebra::Point3::new(p[0] as f64, p[1] as f64, p[2] as f64);
        millimetres(m(a), m(b))
    };
    let mut expected = vec![
        // The house: the four sides of its ground, its four corner posts, the two eaves,
        // the four rakes of the gables and the ridge. The side the west wall's quad shares
        // with its gable triangle lies in one plane: no edge there, as on the east end.
        side([0, 0, 0], [10, 0, 0]),
        side([10, 0, 0], [10, 6, 0]),
        side([10, 6, 0], [0, 6, 0]),
        side([0, 6, 0], [0, 0, 0]),
        side([0, 0, 0], [0, 0, 5]),
        side([10, 0, 0], [10, 0, 5]),
        side([10, 6, 0], [10, 6, 5]),
        side([0, 6, 0], [0, 6, 5]),
        side([0, 0, 5], [10, 0, 5]),
        side([0, 6, 5], [10, 6, 5]),
        side([10, 0, 5], [10, 3, 8]),
        side([10, 3, 8], [10, 6, 5]),
        side([0, 0, 5], [0, 3, 8]),
        side([0, 3, 8], [0, 6, 5]),
        side([0, 3, 8], [10, 3, 8]),
        // The window: the four sides of the south wall's inner ring.
        side([4, 0, 1], [6, 0, 1]),
        side([6, 0, 1], [6, 0, 3]),
        side([6, 0, 3], [4, 0, 3]),
        side([4, 0, 3], [4, 0, 1]),
    ];
    // The L-shaped store: its six ground sides, six roof sides and six posts.
    let l = [[20, 0], [32, 0], [32, 4], [24, 4], [24, 10], [20, 10]];
    for k in 0..6 {
        let (p, q) = (l[k], l[(k + 1) % 6]);
        expected.push(side([p[0], p[1], 0], [q[0], q[1], 0]));
        expected.push(side([p[0], p[1], 4], [q[0], q[1], 4]));
        expected.push(side([p[0], p[1], 0], [p[0], p[1], 4]));
    }
    expected.sort();
    assert_eq!(expected.len(), 19 + 18);
    expected
}

#[test]
fn a_city_models_edges_are_its_polygons_sides_never_a_triangulation() {
    let site = city_site(GABLE_AND_L);
    let drawn = drawn_segments(&site);
    let expected = gable_and_l_sides();
    assert_eq!(drawn, expected);

    // Every surface meets its neighbours at 45 or 90 degrees or lies in their plane:
    // nothing is left to be drawn only as an outline from the eye.
    assert!(site.silhouette_candidates.is_empty());

    // The surfaces are cut into triangles for the hidden lines (ground 2, holed wall 8,
    // pentagon 3, north wall 2, west wall 2 + 1, roof 2 + 2; the store's L twice 4 and its
    // walls 6 x 2): the diagonals exist, among them the store's ground and roof from the
    // inner corner (24, 4), and none is drawn.
    assert_eq!(site.faces.len(), 22 + 20);
    let diagonals: std::collections::BTreeSet<MillimetreSegment> = site
        .faces
        .iter()
        .flat_map(|f| {
            let [a, b, c] = f.corners;
            [millimetres(a, b), millimetres(b, c), millimetres(c, a)]
        })
        .filter(|s| drawn.binary_search(s).is_err())
        .collect();
    assert!(
        diagonals
            .iter()
            .any(|(a, b)| *a == [24000, 4000, 0] || *b == [24000, 4000, 0]),
        "{diagonals:?}"
    );
    // A polygon of n corners cut into n - 2 triangles has n - 3 diagonals; the holed wall
    // (8 triangles, 8 sides) has (3 x 8 - 8) / 2 = 8. House 1 + 8 + 2 + 1 + 1 + 0 + 1 + 1,
    // store 3 + 3 + 6 x 1, and the west wall's side in one plane with its gable: 28.
    assert_eq!(diagonals.len(), 15 + 12 + 1, "{diagonals:?}");
}

#[test]
fn a_city_model_given_as_triangles_draws_the_same_edges() {
    // Many published models are triangulated before they are shared: each surface cut
    // into triangles, each triangle a surface of its own. Here the same house and store
    // written so (every triangle the hidden-line pass made of them, vertices repeated per
    // triangle): the sides between triangles of one plane are not edges, so the same
    // edges are drawn, the window's ring among them.
    let triangles = city_site(GABLE_AND_L).faces;
    let mut vertices = Vec::new();
    let mut surfaces = Vec::new();
    for (k, t) in triangles.iter().enumerate() {
        for p in t.corners {
            let mm = [p.x, p.y, p.z].map(|v| (v * 1e3).round() as i64);
            vertices.push(format!("[{}, {}, {}]", mm[0], mm[1], mm[2]));
        }
        surfaces.push(format!("[[{}, {}, {}]]", 3 * k, 3 * k + 1, 3 * k + 2));
    }
    let text = format!(
        r#"{{"type": "CityJSON", "version": "2.0",
          "transform": {{"scale": [0.001, 0.001, 0.001], "translate": [500000.0, 5400000.0, 0.0]}},
          "CityObjects": {{"block": {{"type": "Building", "geometry": [{{"type": "MultiSurface",
            "lod": "2", "boundaries": [{}]}}]}}}},
          "vertices": [{}]}}"#,
        surfaces.join(", "),
        vertices.join(", ")
    );
    let site = city_site(&text);
    assert_eq!(site.faces.len(), 42);
    assert_eq!(drawn_segments(&site), gable_and_l_sides());
    assert!(site.silhouette_candidates.is_empty());
}
