//! The drawing aids checked against outside sources, each named beside its check:
//! vanishing points (classical perspective), perspective-correct division (cross-ratio
//! invariance, projective geometry; the diagonals of a rectangle, common practice), the
//! table of angles (GeographicLib on a unit sphere) and the measuring pole (the tangent of the
//! elevation of a point, plane trigonometry).

use geographiclib_rs::{Geodesic, InverseGeodesic};
use nalgebra::{Point3, Vector3};
use pansite::aids::AidSettings;
use pansite::aids::{angle_table, to_csv, PagePlacement, TableChoice};
use pansite::drawing::Layer;
use pansite::plane::{Equirect, ImagePoint};
use pansite::render::{draw, RenderSettings};
use pansite::scene::{parse_scene, Site, Standpoint};
use pansite::sphere::{angle_between, direction_from_azimuth_elevation, ViewFrame};
use std::f64::consts::{PI, TAU};
use std::path::Path;

mod common;
use common::assert_near;

const WIDTH: u32 = 3600;
const HEIGHT: u32 = 1800;

fn site(text: &str) -> Site {
    parse_scene(text.as_bytes(), Path::new("aids.ron"), "aids").unwrap()
}

fn layers(site: &Site, standpoint: &Standpoint, aids: AidSettings) -> Vec<Layer> {
    let settings = RenderSettings {
        width: WIDTH,
        height: HEIGHT,
        aids,
        ..RenderSettings::default()
    };
    draw(site, standpoint, &settings).unwrap().drawing.layers
}

fn layer<'a>(layers: &'a [Layer], name: &str) -> &'a Layer {
    layers
        .iter()
        .find(|l| l.name == name)
        .unwrap_or_else(|| panic!("no layer {name}"))
}

fn map() -> Equirect {
    Equirect::from_size_px(WIDTH as f64, HEIGHT as f64)
}

/// The view-frame direction of an image point.
fn direction_of(p: ImagePoint) -> Vector3<f64> {
    let (azimuth, elevation) = map().to_angles(p);
    direction_from_azimuth_elevation(azimuth, elevation)
}

/// Centres of the closed 17-point rings drawn as marks.
fn ring_centres(layer: &Layer) -> Vec<ImagePoint> {
    layer
        .lines
        .iter()
        .filter(|l| l.len() == 17 && l[0] == l[16])
        .map(|l| {
            let n = 16.0;
            let (x, y) = l[..16]
                .iter()
                .fold((0.0, 0.0), |(x, y), p| (x + p.x / n, y + p.y / n));
            ImagePoint::new(x, y)
        })
        .collect()
}

/// Centres of two-point strokes (ticks, and some letter strokes).
fn stroke_centres(layer: &Layer) -> Vec<(ImagePoint, ImagePoint)> {
    layer
        .lines
        .iter()
        .filter(|l| l.len() == 2)
        .map(|l| {
            (
                ImagePoint::new((l[0].x + l[1].x) / 2.0, (l[0].y + l[1].y) / 2.0),
                ImagePoint::new(l[1].x - l[0].x, l[1].y - l[0].y),
            )
        })
        .collect()
}

/// Classical perspective: the vanishing point of a direction d is the image of d itself (the
/// limit of the images of points running along any line parallel to d). Checked against
/// atan2 of the direction, in views turned every way.
#[test]
fn vanishing_points_are_the_images_of_their_directions() {
    let s = site(
        "Scene(items: [Point(at: (0, 5, 0))],
               guides: (bearings: [35, 301.5], slopes: [(bearing: 120, pitch: 38)]))",
    );
    for (heading, pitch, roll) in [(0.0, 0.0, 0.0), (35.0, 0.0, 0.0), (250.0, 12.0, -7.0)] {
        let standpoint = Standpoint::from_degrees("s", 2.0, -3.0, 1.6, heading, pitch, roll);
        let view = ViewFrame::new(&standpoint);
        let drawn = layers(&s, &standpoint, AidSettings::default());
        let centres = ring_centres(layer(&drawn, "vanishing points"));
        assert_eq!(centres.len(), 6);
        for (bearing, climb) in [(35f64, 0f64), (301.5, 0.0), (120.0, 38.0)] {
            let (b, c) = (bearing.to_radians(), climb.to_radians());
            let d = Vector3::new(b.sin() * c.cos(), b.cos() * c.cos(), c.sin());
            for d in [d, -d] {
                // The outside formula: azimuth = atan2(x, y), elevation = atan2(z, |xy|),
                // of the direction in the view frame.
                let v = view.direction_to_view(&d);
                let (azimuth, elevation) = (v.x.atan2(v.y), v.z.atan2(v.x.hypot(v.y)));
                let x = (azimuth + PI) / TAU * WIDTH as f64;
                let y = (PI / 2.0 - elevation) / PI * HEIGHT as f64;
                let nearest = centres
                    .iter()
                    .map(|p| {
                        let dx = (p.x - x).abs();
                        dx.min(WIDTH as f64 - dx).hypot(p.y - y)
                    })
                    .fold(f64::INFINITY, f64::min);
                assert!(nearest < 1e-9, "{bearing}/{climb}: {nearest} px");
                // Common practice: points far along a parallel line run to the same place.
                let far = Point3::new(7.0, 4.0, -2.0) + d * 1e7;
                let u = view.to_view(&far);
                assert!(angle_between(&u, &v) < 1e-6);
            }
        }
    }
}

/// The directions found in a site: a block turned 30 degrees off north gives 30 and 120; a
/// second block a degree further round merges with it.
#[test]
fn found_vanishing_points_lie_on_the_horizon_at_the_blocks_bearings() {
    let s = site(
        "Scene(items: [
            Block(at: Centre(0, 20), width: 12, depth: 8, height: 6, facing: 210),
            Block(at: Centre(25, 20), width: 6, depth: 6, height: 4, facing: 211),
        ])",
    );
    let standpoint = Standpoint::from_degrees("s", 0.0, 0.0, 1.6, 0.0, 0.0, 0.0);
    let aids = AidSettings {
        vanishing_points: true,
        ..AidSettings::default()
    };
    let centres = ring_centres(layer(&layers(&s, &standpoint, aids), "vanishing points"));
    assert_eq!(centres.len(), 4, "two directions, two points each");
    for p in &centres {
        assert_near(p.y, HEIGHT as f64 / 2.0, 1e-9);
        let azimuth = (p.x / WIDTH as f64 * 360.0 - 180.0).rem_euclid(90.0);
        assert!((azimuth - 30.3).abs() < 0.5, "{azimuth}");
    }
}

/// The cross ratio of the division ticks' directions equals the site's.
///
/// Theorem (projective geometry; H. S. M. Coxeter, "Projective Geometry", 2nd ed., 1974,
/// from memory): four collinear points joined to a centre O keep their cross ratio,
/// `(AC * BD) / (BC * AD) = (sin AOC * sin BOD) / (sin BOC * sin AOD)`. Ticks at the
/// quarters of a segment, at 0, 1/4, 1/2 and 1, have cross ratio (1/2 * 3/4) / (1/4 * 1) =
/// 3/2; with the multiples (extend 2) at 0, 1, 2, 3 lengths it is (2 * 2) / (1 * 3) = 4/3.
#[test]
fn division_ticks_keep_the_cross_ratio() {
    let s = site(
        "Scene(items: [Point(at: (0, 5, 0))],
               guides: (divide: [Between(from: (-6, 8, 0), to: (2, 12, 5), parts: 4, extend: 2)]))",
    );
    for (heading, pitch, roll) in [(0.0, 0.0, 0.0), (140.0, 20.0, 0.0), (300.0, -10.0, 25.0)] {
        let standpoint = Standpoint::from_degrees("s", 0.0, 0.0, 1.6, heading, pitch, roll);
        let view = ViewFrame::new(&standpoint);
        let drawn = layers(&s, &standpoint, AidSettings::default());
        let ticks = stroke_centres(layer(&drawn, "divisions"));
        // The tick of each division point, found by its image.
        let from = Point3::new(-6.0, 8.0, 0.0);
        let step = Vector3::new(8.0, 4.0, 5.0);
        let tick_direction = |t: f64| -> Vector3<f64> {
            let expected = view.to_view(&(from + step * t)).normalize();
            let (centre, _) = ticks
                .iter()
                .min_by(|a, b| {
                    angle_between(&direction_of(a.0), &expected)
                        .total_cmp(&angle_between(&direction_of(b.0), &expected))
                })
                .unwrap();
            let found = direction_of(*centre);
            assert!(angle_between(&found, &expected) < 1e-9, "tick at {t}");
            found
        };
        let cross = |d: [Vector3<f64>; 4]| {
            let s = |i: usize, j: usize| angle_between(&d[i], &d[j]).sin();
            (s(0, 2) * s(1, 3)) / (s(1, 2) * s(0, 3))
        };
        let quarters = [0.0, 0.25, 0.5, 1.0].map(tick_direction);
        assert_near(cross(quarters), 1.5, 1e-9);
        let multiples = [0.0, 1.0, 2.0, 3.0].map(tick_direction);
        assert_near(cross(multiples), 4.0 / 3.0, 1e-9);
    }
}

/// Common practice: the centre of a rectangle drawn in perspective is where its diagonals
/// cross. The midpoint tick of each diagonal (divided in two) lies on the other diagonal's
/// great circle, at the image of the rectangle's centre.
#[test]
fn midpoints_of_diagonals_meet_at_the_centre_of_a_rectangle() {
    // A rectangle on a wall 9 m away, turned 25 degrees, 6 m by 3 m.
    let (a, b, c, d) = (
        Point3::new(-3.0, 9.0, 0.5),
        Point3::new(2.4, 11.5, 0.5),
        Point3::new(2.4, 11.5, 3.5),
        Point3::new(-3.0, 9.0, 3.5),
    );
    let scene = format!(
        "Scene(items: [Point(at: (0, 5, 0))], guides: (divide: [
            Between(from: ({}, {}, {}), to: ({}, {}, {})),
            Between(from: ({}, {}, {}), to: ({}, {}, {})),
        ]))",
        a.x, a.y, a.z, c.x, c.y, c.z, b.x, b.y, b.z, d.x, d.y, d.z
    );
    let s = site(&scene);
    let standpoint = Standpoint::from_degrees("s", 0.0, 0.0, 1.6, 10.0, 5.0, 0.0);
    let view = ViewFrame::new(&standpoint);
    let drawn = layers(&s, &standpoint, AidSettings::default());
    let ticks = stroke_centres(layer(&drawn, "divisions"));
    let [ea, eb, ec, ed] = [a, b, c, d].map(|p| view.to_view(&p));
    // The two diagonals' great circles meet along the cross product of their normals.
    let mut crossing = ea.cross(&ec).cross(&eb.cross(&ed)).normalize();
    if crossing.dot(&(ea + ec)) < 0.0 {
        crossing = -crossing;
    }
    let centre = view.to_view(&Point3::from((a.coords + c.coords) / 2.0));
    assert!(angle_between(&crossing, &centre) < 1e-12);
    let longest = ticks.iter().map(|t| t.1.x.hypot(t.1.y)).fold(0.0, f64::max);
    let midpoints: Vec<_> = ticks
        .iter()
        .filter(|t| (t.1.x.hypot(t.1.y) - longest).abs() < 1e-6)
        .collect();
    assert_eq!(midpoints.len(), 2, "one long tick on each diagonal");
    for (at, _) in midpoints {
        assert!(angle_between(&direction_of(*at), &crossing) < 1e-9);
    }
}

/// GeographicLib (Karney 2013, via geographiclib-rs on a sphere of radius 1, where the
/// inverse distance is the angle): the angle between two entries of the table, taken as
/// latitude = elevation and longitude = azimuth, is the angle between the two sight lines.
#[test]
fn angles_between_table_entries_agree_with_geographiclib() {
    let text = std::fs::read_to_string("scenes/wexcombe-square.ron").unwrap();
    let s = parse_scene(
        text.as_bytes(),
        Path::new("scenes/wexcombe-square.ron"),
        "w",
    )
    .unwrap();
    let standpoint = s.standpoint("fountain").unwrap().clone();
    let rows = angle_table(
        &s,
        &standpoint,
        &map(),
        Some(PagePlacement::panorama_width(720.0)),
        &TableChoice::default(),
    );
    assert!(rows.len() > 500, "{}", rows.len());
    let eye = standpoint.eye();
    let sphere = Geodesic::new(1.0, 0.0);
    let mut worst = 0.0f64;
    for (i, j) in (0..rows.len()).step_by(7).zip((3..rows.len()).step_by(11)) {
        let (p, q) = (&rows[i], &rows[j]);
        let s12: f64 = sphere.inverse(
            p.elevation_deg,
            p.azimuth_deg,
            q.elevation_deg,
            q.azimuth_deg,
        );
        let truth = angle_between(&(p.at - eye), &(q.at - eye));
        worst = worst.max((s12 - truth).abs());
        // The page is 720 mm wide for 3600 px: 0.2 mm a pixel.
        let (x_mm, y_mm) = p.page_mm.unwrap();
        assert_near(x_mm, p.x_px * 0.2, 1e-9);
        assert_near(y_mm, p.y_px * 0.2, 1e-9);
    }
    assert!(worst < 1e-12, "worst {worst:e} rad");
    // The CSV keeps a thousandth of a degree: within 2e-5 rad of GeographicLib's answer.
    let csv = to_csv(&rows[..2]);
    let cells: Vec<Vec<f64>> = csv
        .lines()
        .skip(1)
        .map(|l| {
            l.rsplit(',')
                .skip(4)
                .take(9)
                .filter_map(|c| c.parse().ok())
                .collect()
        })
        .collect();
    // Reversed, after y_mm, x_mm and the empty latitude and longitude: [y_px, x_px, distance, elevation, relative, azimuth, ...].
    let s12: f64 = sphere.inverse(cells[0][3], cells[0][5], cells[1][3], cells[1][5]);
    let truth = angle_between(&(rows[0].at - eye), &(rows[1].at - eye));
    assert!((s12 - truth).abs() < 2e-5, "{s12} {truth}");
}

/// The measuring pole's ticks sit at elevation atan((h - eye) / d) (plane trigonometry: the
/// tangent of the angle of elevation is rise over run), the one at eye height on the horizon.
#[test]
fn pole_ticks_sit_at_the_tangent_of_their_height_over_distance() {
    let s = site(
        "Scene(items: [Point(at: (0, 5, 0))],
               guides: (poles: [(label: \"pole\", at: (6, 8), base: 0.5, height: 12, step: 0.8)]))",
    );
    let standpoint = Standpoint::from_degrees("s", 0.0, 0.0, 1.6, 20.0, 0.0, 0.0);
    let drawn = layers(&s, &standpoint, AidSettings::default());
    let poles = layer(&drawn, "poles");
    let distance = 6f64.hypot(8.0);
    let x = ((6f64.atan2(8.0).to_degrees() - 20.0 + 180.0) / 360.0) * WIDTH as f64;
    // The top of the pole, 12.5 m up: the pole's label (centred above it) is left out.
    let top = (90.0 - ((12.5 - 1.6) / distance).atan().to_degrees()) / 180.0 * HEIGHT as f64;
    let ticks: Vec<ImagePoint> = stroke_centres(poles)
        .into_iter()
        .filter(|(c, v)| (c.x - x).abs() < 1e-6 && v.y.abs() < 1e-9 && c.y > top - 1e-6)
        .map(|(c, _)| c)
        .collect();
    // 0, 0.8, ... 12: 16 ticks, and the eye-height tick.
    assert_eq!(ticks.len(), 17, "{ticks:?}");
    for k in 0..=15 {
        let h = 0.5 + 0.8 * k as f64;
        let elevation = ((h - 1.6) / distance).atan().to_degrees();
        let y = (90.0 - elevation) / 180.0 * HEIGHT as f64;
        assert!(ticks.iter().any(|t| (t.y - y).abs() < 1e-9), "tick {k}");
    }
    assert!(
        ticks
            .iter()
            .any(|t| (t.y - HEIGHT as f64 / 2.0).abs() < 1e-9),
        "the eye tick"
    );
}

/// The bare mode draws no aid, even those the scene asks for.
#[test]
fn bare_mode_draws_no_aid() {
    let s = site(
        "Scene(items: [Point(label: \"well\", at: (0, 5, 0))],
               guides: (bearings: [10], fans: [(bearing: 10)], meridians: [5],
                        poles: [(at: (3, 3))], divide: [Edges(item: \"well\")]))",
    );
    let standpoint = Standpoint::from_degrees("s", 0.0, 0.0, 1.6, 0.0, 0.0, 0.0);
    let settings = RenderSettings {
        width: 720,
        height: 360,
        overlays: false,
        aids: AidSettings::all(),
        ..RenderSettings::default()
    };
    let drawn = draw(&s, &standpoint, &settings).unwrap().drawing;
    let names: Vec<&str> = drawn.layers.iter().map(|l| l.name.as_str()).collect();
    assert_eq!(names, vec!["wireframe"]);
    let with = layers(&s, &standpoint, AidSettings::all());
    let names: Vec<&str> = with.iter().map(|l| l.name.as_str()).collect();
    for name in [
        "grid",
        "grid major",
        "horizon",
        "fans",
        "meridians",
        "vanishing points",
        "poles",
        "grid labels",
        "item labels",
    ] {
        assert!(names.contains(&name), "{name} in {names:?}");
    }
}

/// The command: a CSV table with the page columns, and a refusal for an unknown item.
#[test]
fn angles_command_writes_a_table() {
    let dir = common::Scratch::new("angles");
    dir.write(
        "s.ron",
        "Scene(standpoints: [(name: \"gate\", x: 0, y: 0, heading: 90)],
               items: [Point(label: \"well\", at: (10, 0, 1.6))])",
    );
    let run = |args: &[&str]| {
        let mut all = vec!["angles", "s.ron"];
        all.extend_from_slice(args);
        common::pansite(&dir, &all)
    };
    let out = run(&[
        "--format",
        "csv",
        "--page-width-mm",
        "720",
        "--size",
        "3600x1800",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    assert_eq!(
        text.lines().nth(1),
        Some(
            "well,point,10.000,0.000,1.600,90.000,0.000,0.000,10.000,1800.00,900.00,360.00,180.00,,"
        )
    );
    // The same table as JSON (RFC 8259), read back with serde_json: the well stands 10 m
    // due east of an eye at 1.6 m, so azimuth 90 and elevation 0 (plain trigonometry).
    let out = run(&["--format", "json"]);
    assert!(out.status.success());
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).expect("valid JSON");
    assert_eq!(json["standpoint"], "gate");
    let well = &json["rows"][0];
    assert_eq!(
        (&well["item"], &well["what"]),
        (&"well".into(), &"point".into())
    );
    assert_eq!(well["azimuth"].as_f64(), Some(90.0));
    assert_eq!(well["elevation"].as_f64(), Some(0.0));
    assert!(well["x_mm"].is_null(), "no page was asked for");
    let out = run(&["--item", "pump"]);
    assert_eq!(out.status.code(), Some(2));
}
