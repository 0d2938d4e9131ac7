//! The filled shadow tone: where the shade lies on the sheet, checked by the test's own
//! trigonometry and ray cast, across the seam, and as filled paths in SVG and PDF.

use pansite::output::{write_pdf, write_svg};
use pansite::render::{draw, draw_sheets, raster, RenderSettings, SunChoice, SHADOW_TONE};
use pansite::scene::{parse_scene, LocalMoment, Site, Standpoint};
use pansite::sun::Sky;
use std::path::Path;

/// An invented square at an invented place with a post 1 m square and 6 m tall at the
/// origin; the plan's y axis is true north.
fn post_scene() -> Site {
    let text = r#"Scene(
        name: "post",
        location: (latitude: 47.3, longitude: 8.1, time_zone: "Europe/Zurich"),
        standpoints: [(name: "somewhere", x: 0, y: -20)],
        items: [Block(label: "post", at: Centre(0, 0), width: 1, depth: 1, height: 6)],
    )"#;
    parse_scene(text.as_bytes(), Path::new("post.ron"), "post").unwrap()
}

const WHEN: (&str, &str) = ("2026-05-04", "16:10");

/// The sun's azimuth and elevation (degrees) at `WHEN`.
fn sun(site: &Site) -> (f64, f64) {
    let sky = Sky::of_site(site).unwrap();
    let place = sky
        .at(&LocalMoment::parse(WHEN.0, WHEN.1).unwrap())
        .unwrap()
        .place;
    (place.azimuth_deg, place.elevation_deg)
}

fn settings(width: u32) -> RenderSettings {
    RenderSettings {
        width,
        height: width / 2,
        overlays: false,
        sun: SunChoice {
            moment: Some(LocalMoment::parse(WHEN.0, WHEN.1).unwrap()),
            path: Some(false),
            shadows: Some(false),
            tone: Some(true),
            ..SunChoice::default()
        },
        ..RenderSettings::default()
    }
}

/// A unit vector on the plan towards `azimuth_deg` (clockwise from the y axis).
fn towards(azimuth_deg: f64) -> (f64, f64) {
    let a = azimuth_deg.to_radians();
    (a.sin(), a.cos())
}

/// The pixel (column, row) where a ground point lands, by the equirectangular mapping
/// written out here (x = (azimuth - heading + 180) / 360 W, y = (90 - elevation) / 180 H,
/// the conventions of the crate docs, standpoint level).
fn pixel_of(eye: (f64, f64, f64), heading_deg: f64, p: (f64, f64), w: u32) -> (u32, u32) {
    let (dx, dy, dz) = (p.0 - eye.0, p.1 - eye.1, -eye.2);
    let azimuth = dx.atan2(dy).to_degrees() - heading_deg;
    let azimuth = (azimuth + 180.0).rem_euclid(360.0) - 180.0;
    let elevation = dz.atan2(dx.hypot(dy)).to_degrees();
    let x = (azimuth + 180.0) / 360.0 * w as f64;
    let y = (90.0 - elevation) / 180.0 * (w / 2) as f64;
    (x as u32, y as u32)
}

#[test]
fn the_tone_covers_the_posts_shadow_and_stops_at_its_edge() {
    // Plain trigonometry: a post of height h on level ground casts a shadow
    // h / tan(elevation) long towards the sun's azimuth plus 180 degrees; the shadow of a
    // post 1 m square is a band 1 m wide (across the rays) along that line.
    let site = post_scene();
    let (azimuth, elevation) = sun(&site);
    assert!(elevation > 10.0, "{elevation}");
    let length = 6.0 / elevation.to_radians().tan();
    let along = towards(azimuth + 180.0);
    let side = towards(azimuth + 90.0);
    // Stand beside the shadow, 15 m off its middle, looking at it.
    let middle = (along.0 * length / 2.0, along.1 * length / 2.0);
    let eye_plan = (middle.0 + 15.0 * side.0, middle.1 + 15.0 * side.1);
    let heading = (azimuth + 270.0).rem_euclid(360.0);
    let standpoint =
        Standpoint::from_degrees("beside", eye_plan.0, eye_plan.1, 1.6, heading, 0.0, 0.0);
    let eye = (eye_plan.0, eye_plan.1, 1.6);
    let w = 2048;
    let mut render = draw(&site, &standpoint, &settings(w)).unwrap();
    assert!(render
        .drawing
        .layers
        .iter()
        .any(|l| l.name == SHADOW_TONE && l.filled && !l.lines.is_empty()));
    let canvas = raster(&mut render);
    let at = |along_m: f64, side_m: f64| {
        let p = (
            along.0 * along_m + side.0 * side_m,
            along.1 * along_m + side.1 * side_m,
        );
        let (x, y) = pixel_of(eye, heading, p, w);
        canvas.pixel(x, y)
    };
    // Inside: on the shadow's middle line, at a quarter, a half and three quarters of it.
    for f in [0.25, 0.5, 0.75] {
        assert!(at(f * length, 0.0) < 240, "{f}: {}", at(f * length, 0.0));
    }
    // Outside: 1 m to either side of the band's edge, and 2 m past its tip.
    for (a, s) in [
        (0.5 * length, 1.5),
        (0.5 * length, -1.5),
        (length + 2.0, 0.0),
    ] {
        assert_eq!(at(a, s), 255, "({a}, {s})");
    }
}

#[test]
fn a_shadow_across_the_seam_is_toned_at_both_borders_and_not_between() {
    let site = post_scene();
    let (azimuth, elevation) = sun(&site);
    let length = 6.0 / elevation.to_radians().tan();
    let along = towards(azimuth + 180.0);
    let side = towards(azimuth + 90.0);
    // Beside the shadow's middle, 4 m off, with the shadow straight behind: the seam
    // (behind the heading) runs across it.
    let middle = (along.0 * length / 2.0, along.1 * length / 2.0);
    let eye_plan = (middle.0 + 4.0 * side.0, middle.1 + 4.0 * side.1);
    let heading = (azimuth + 90.0).rem_euclid(360.0);
    let standpoint =
        Standpoint::from_degrees("beside", eye_plan.0, eye_plan.1, 1.6, heading, 0.0, 0.0);
    let w = 1024;
    let mut render = draw(&site, &standpoint, &settings(w)).unwrap();
    let canvas = raster(&mut render);
    let toned = |x: u32, y: u32| canvas.pixel(x, y) < 250;
    let mut rows = 0;
    for y in 0..canvas.height {
        if toned(0, y) && toned(w - 1, y) {
            rows += 1;
            // No streak: the middle of the row (straight ahead, away from the shadow) is
            // paper.
            for x in w / 4..3 * w / 4 {
                assert!(!toned(x, y), "a streak at row {y}, column {x}");
            }
        }
    }
    assert!(rows > 5, "{rows} rows toned at both borders");
}

#[test]
fn svg_and_pdf_carry_the_tone_as_a_filled_path_on_its_own_layer() {
    let site = post_scene();
    let standpoint = Standpoint::from_degrees("south", 0.0, -20.0, 1.6, 0.0, 0.0, 0.0);
    let (sheets, _) = draw_sheets(&site, &standpoint, &settings(1024), None, 150.0).unwrap();
    let mut svg = Vec::new();
    write_svg(&sheets[0], &mut svg).unwrap();
    let svg = String::from_utf8(svg).unwrap();
    // Read back with roxmltree: the layer's group (SVG 1.1 §5.2, `g`) fills and does not
    // stroke (§11.2, `fill`, `stroke`), and holds a closed path (§8.3.3, `Z`).
    let doc = roxmltree::Document::parse(&svg).unwrap();
    let group = doc
        .descendants()
        .find(|n| n.attribute("data-layer") == Some(SHADOW_TONE))
        .expect("a layer of its own");
    assert_eq!(group.attribute("id"), Some("shadow-tone"));
    assert_ne!(group.attribute("fill"), Some("none"));
    assert_eq!(group.attribute("stroke"), Some("none"));
    let path = group
        .children()
        .find(|n| n.has_tag_name("path"))
        .expect("a path");
    assert!(path.attribute("d").unwrap().contains('Z'));
    // PDF read back with lopdf: inside the layer's optional content group a path is
    // filled by the non-zero rule (ISO 32000-1 §8.5.3.3, Table 60: `f`).
    let mut pdf = Vec::new();
    write_pdf(&sheets, &mut pdf).unwrap();
    let doc = lopdf::Document::load_mem(&pdf).unwrap();
    let page = *doc.get_pages().values().next().unwrap();
    let content = doc.get_and_decode_page_content(page).unwrap();
    let operators: Vec<&str> = content
        .operations
        .iter()
        .map(|op| op.operator.as_str())
        .collect();
    assert!(operators.contains(&"f"), "{operators:?}");
    assert!(operators.contains(&"h"));
}
