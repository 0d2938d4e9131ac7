//! Golden images of the demo scene, compared with an explicit per-channel tolerance and a
//! count of differing pixels (so that another machine's last-bit differences in `atan2` do
//! not fail the test, while any real change in the drawing does).
//!
//! On failure `target/golden/NAME.png` shows expected | difference | actual side by side.
//! Regenerate the references with `PANSITE_BLESS=1 cargo test --test golden` (that run
//! fails on purpose, naming each rewritten file: it compared nothing). A control test turns
//! one view by 0.3 pixel and requires the comparison to fail.

use pansite::output::{encode_grey_png, GreyCanvas};
use pansite::render::{draw, raster, RenderSettings};
use pansite::scene::{load_scene, HiddenEdges};
use std::path::{Path, PathBuf};

/// Largest difference in grey levels that counts as equal.
const CHANNEL_TOLERANCE: u8 = 24;
/// How many pixels may differ by more than that.
const MAX_DIFFERING_PIXELS: usize = 8;

fn golden_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/golden")
}

fn read_png(path: &Path) -> GreyCanvas {
    let decoder = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(path).unwrap()));
    let mut reader = decoder.read_info().unwrap();
    let mut pixels = vec![0; reader.output_buffer_size().unwrap()];
    let info = reader.next_frame(&mut pixels).unwrap();
    assert_eq!(info.color_type, png::ColorType::Grayscale);
    GreyCanvas {
        width: info.width,
        height: info.height,
        pixels,
    }
}

fn write_png(canvas: &GreyCanvas, path: &Path) {
    std::fs::create_dir_all(path.parent().unwrap()).unwrap();
    encode_grey_png(canvas, std::fs::File::create(path).unwrap()).unwrap();
}

/// The core demo (plain blocks and polylines), frozen as a test fixture.
const CORE_SCENE: &str = "tests/fixtures/scenes/core-square.ron";

/// The core demo's references are see-through wireframes, as the core drew them.
fn check(name: &str, standpoint: &str, settings: RenderSettings) {
    let settings = RenderSettings {
        hidden: Some(HiddenEdges::Solid),
        ..settings
    };
    check_scene(CORE_SCENE, name, standpoint, settings)
}

fn check_scene(scene: &str, name: &str, standpoint: &str, settings: RenderSettings) {
    let site = load_scene(&Path::new(env!("CARGO_MANIFEST_DIR")).join(scene)).unwrap();
    let standpoint = site.standpoint(standpoint).unwrap();
    let mut render = draw(&site, standpoint, &settings).unwrap();
    let actual = raster(&mut render);
    let reference = golden_dir().join(format!("{name}.png"));
    if std::env::var_os("PANSITE_BLESS").is_some() {
        write_png(&actual, &reference);
        // A bless run compares nothing, so it must not pass as if it had.
        panic!(
            "{name}: reference rewritten from this run ({}); nothing was compared: \
             look at it, then run again without PANSITE_BLESS",
            reference.display()
        );
    }
    let expected = read_png(&reference);
    let differing = differing_pixels(&expected, &actual);
    if differing > MAX_DIFFERING_PIXELS {
        let (w, h) = (actual.width as usize, actual.height as usize);
        let mut side_by_side = GreyCanvas {
            width: 3 * actual.width,
            height: actual.height,
            pixels: vec![255; 3 * w * h],
        };
        for y in 0..h {
            for x in 0..w {
                let (e, a) = (expected.pixels[y * w + x], actual.pixels[y * w + x]);
                side_by_side.pixels[y * 3 * w + x] = e;
                side_by_side.pixels[y * 3 * w + w + x] = 255 - e.abs_diff(a);
                side_by_side.pixels[y * 3 * w + 2 * w + x] = a;
            }
        }
        let report =
            Path::new(env!("CARGO_MANIFEST_DIR")).join(format!("target/golden/{name}.png"));
        write_png(&side_by_side, &report);
        panic!(
            "{name}: {differing} pixels differ by more than {CHANNEL_TOLERANCE} levels (at most {MAX_DIFFERING_PIXELS} may); see {}",
            report.display()
        );
    }
}

/// How many pixels differ by more than [`CHANNEL_TOLERANCE`].
fn differing_pixels(expected: &GreyCanvas, actual: &GreyCanvas) -> usize {
    assert_eq!(
        (expected.width, expected.height),
        (actual.width, actual.height)
    );
    expected
        .pixels
        .iter()
        .zip(&actual.pixels)
        .filter(|(e, a)| e.abs_diff(**a) > CHANNEL_TOLERANCE)
        .count()
}

/// The control: the same view turned by 0.3 pixel (0.3 x 360 / 1024 degrees of heading)
/// must fail the comparison, so the tolerances cannot hide a real shift of the drawing.
#[test]
fn a_shift_of_three_tenths_of_a_pixel_fails() {
    let site = load_scene(&Path::new(env!("CARGO_MANIFEST_DIR")).join(CORE_SCENE)).unwrap();
    let mut standpoint = site.standpoint("hall steps").unwrap().clone();
    standpoint.heading += (0.3 * 360.0 / 1024.0f64).to_radians();
    let settings = RenderSettings {
        width: 1024,
        height: 512,
        overlays: false,
        hidden: Some(HiddenEdges::Solid),
        ..RenderSettings::default()
    };
    let actual = raster(&mut draw(&site, &standpoint, &settings).unwrap());
    let expected = read_png(&golden_dir().join("wexcombe-steps-bare.png"));
    let differing = differing_pixels(&expected, &actual);
    assert!(
        differing > MAX_DIFFERING_PIXELS,
        "a 0.3 px turn changed only {differing} pixels"
    );
}

#[test]
fn demo_with_grid() {
    check(
        "wexcombe-fountain",
        "fountain",
        RenderSettings {
            width: 1024,
            height: 512,
            ..RenderSettings::default()
        },
    );
}

#[test]
fn demo_bare_from_the_steps() {
    let settings = RenderSettings {
        width: 1024,
        height: 512,
        overlays: false,
        ..RenderSettings::default()
    };
    check("wexcombe-steps-bare", "hall steps", settings);
}

#[test]
fn demo_seated_at_the_lane_corner() {
    check(
        "wexcombe-lane-corner",
        "lane corner",
        RenderSettings {
            width: 800,
            height: 400,
            line_weight_px: 1.0,
            ..RenderSettings::default()
        },
    );
}

#[test]
fn exterior_demo_of_every_outdoor_item_bare() {
    check_scene(
        "scenes/wexcombe-square.ron",
        "exterior-loggia-bare",
        "loggia",
        RenderSettings {
            width: 1024,
            height: 512,
            overlays: false,
            hidden: Some(HiddenEdges::Solid),
            ..RenderSettings::default()
        },
    );
}

#[test]
fn interior_demo_bare() {
    check_scene(
        "scenes/wexcombe-corn-exchange.ron",
        "interior-door-bare",
        "door",
        RenderSettings {
            width: 1024,
            height: 512,
            overlays: false,
            hidden: Some(HiddenEdges::Solid),
            ..RenderSettings::default()
        },
    );
}

#[test]
fn exterior_demo_with_hidden_edges_faint() {
    check_scene(
        "scenes/wexcombe-square.ron",
        "exterior-fountain-hidden-faint",
        "fountain",
        RenderSettings {
            width: 1024,
            height: 512,
            hidden: Some(HiddenEdges::Faint),
            ..RenderSettings::default()
        },
    );
}

#[test]
fn exterior_demo_with_hidden_edges_off() {
    check_scene(
        "scenes/wexcombe-square.ron",
        "exterior-loggia-hidden-off",
        "loggia",
        RenderSettings {
            width: 1024,
            height: 512,
            overlays: false,
            hidden: Some(HiddenEdges::Off),
            ..RenderSettings::default()
        },
    );
}

#[test]
fn interior_demo_with_hidden_edges_faint_and_off() {
    for (name, hidden) in [
        ("interior-aisle-hidden-faint", HiddenEdges::Faint),
        ("interior-aisle-hidden-off", HiddenEdges::Off),
    ] {
        check_scene(
            "scenes/wexcombe-corn-exchange.ron",
            name,
            "aisle",
            RenderSettings {
                width: 1024,
                height: 512,
                overlays: false,
                hidden: Some(hidden),
                ..RenderSettings::default()
            },
        );
    }
}

#[test]
fn exterior_demo_with_every_aid() {
    use pansite::aids::AidSettings;
    use pansite::scene::{Division, Fan, Pole, Slope};
    let mut aids = AidSettings::all();
    aids.guides.fans.push(Fan {
        direction: Slope {
            bearing_deg: 0.0,
            pitch_deg: 0.0,
        },
        step_deg: 15.0,
    });
    aids.guides.meridians.push(45.0);
    aids.guides.poles.push(Pole {
        label: Some("pole".to_owned()),
        foot: nalgebra::Point3::new(-6.0, 4.0, 0.0),
        height: 8.0,
        step: 1.0,
        unit: 1.0,
    });
    aids.guides.divisions.push(Division::Between {
        from: nalgebra::Point3::new(8.0, -4.0, 0.0),
        to: nalgebra::Point3::new(8.0, 4.0, 0.0),
        parts: 4,
        extend: 2,
    });
    check_scene(
        "scenes/wexcombe-square.ron",
        "exterior-fountain-aids",
        "fountain",
        RenderSettings {
            width: 1024,
            height: 512,
            aids,
            ..RenderSettings::default()
        },
    );
}

/// The hill-town demo: streets meeting at a junction with kerb returns, sloping ground
/// hiding what lies behind the hill, drawn as renders are by default (hidden parts faint).
#[test]
fn hill_town_from_the_high_street() {
    let settings = RenderSettings {
        width: 1024,
        height: 512,
        ..RenderSettings::default()
    };
    check_scene(
        "scenes/stannock-hill.ron",
        "stannock-high-street",
        "high street",
        settings,
    );
}
