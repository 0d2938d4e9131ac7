//! Pages and raster outputs against their standards: paper sizes against ISO 216, the
//! North American sizes and ASME Y14.1 (and against Debian's libpaper, `paperconf`, where it
//! is installed), the PNG resolution chunk against the chosen dpi (PNG specification,
//! pHYs), and the panorama metadata against the published GPano property names, read back
//! with a general XML parser.

use pansite::output::{write_png, Panorama, PngOptions};
use pansite::page::{PageSettings, Paper, Tiling};
use pansite::render::{draw, draw_sheets, RenderSettings};
use pansite::scene::load_scene;
use std::path::Path;

fn demo() -> pansite::scene::Site {
    load_scene(&Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron")).unwrap()
}

/// ISO 216 (2007), table 1 (A series) and table 2 (B series), millimetres.
const ISO_216: &[(&str, f64, f64)] = &[
    ("A0", 841.0, 1189.0),
    ("A1", 594.0, 841.0),
    ("A2", 420.0, 594.0),
    ("A3", 297.0, 420.0),
    ("A4", 210.0, 297.0),
    ("A5", 148.0, 210.0),
    ("A6", 105.0, 148.0),
    ("B0", 1000.0, 1414.0),
    ("B1", 707.0, 1000.0),
    ("B2", 500.0, 707.0),
    ("B3", 353.0, 500.0),
    ("B4", 250.0, 353.0),
    ("B5", 176.0, 250.0),
    ("B6", 125.0, 176.0),
];

/// North American sizes (ANSI/ASME Y14.1 sheet sizes A to E, and the everyday names of
/// the first two), inches.
const INCHES: &[(&str, f64, f64)] = &[
    ("letter", 8.5, 11.0),
    ("legal", 8.5, 14.0),
    ("tabloid", 11.0, 17.0),
    ("asme-a", 8.5, 11.0),
    ("asme-b", 11.0, 17.0),
    ("asme-c", 17.0, 22.0),
    ("asme-d", 22.0, 34.0),
    ("asme-e", 34.0, 44.0),
];

#[test]
fn paper_presets_match_the_standards() {
    for &(name, w, h) in ISO_216 {
        let paper = Paper::named(name).unwrap();
        assert_eq!((paper.width_mm, paper.height_mm), (w, h), "{name}");
    }
    for &(name, w, h) in INCHES {
        let paper = Paper::named(name).unwrap();
        assert!((paper.width_mm - w * 25.4).abs() < 1e-9, "{name}");
        assert!((paper.height_mm - h * 25.4).abs() < 1e-9, "{name}");
    }
}

/// Opts out of the libpaper comparison on a machine without `paperconf`; its value is the
/// reason, printed by the test.
const NO_LIBPAPER: &str = "PANSITE_NO_LIBPAPER";

/// The same sizes as Debian's libpaper reports them (`paperconf -p NAME -s -m`). `.ci/run`
/// installs it (package libpaper-utils); without it the test fails, unless
/// `PANSITE_NO_LIBPAPER=REASON` opts out, which is printed.
#[test]
fn paper_presets_match_libpaper() {
    if std::process::Command::new("paperconf")
        .arg("-v")
        .output()
        .is_err()
    {
        match std::env::var(NO_LIBPAPER) {
            Ok(reason) if !reason.trim().is_empty() => {
                eprintln!(
                    "NOT CHECKED against libpaper: paperconf is missing and {NO_LIBPAPER} says: {reason}"
                );
                return;
            }
            _ => panic!(
                "paperconf (Debian package libpaper-utils) is not installed: install it, or set \
                 {NO_LIBPAPER}=REASON to skip this comparison and say why"
            ),
        }
    }
    let names = [
        ("a0", "A0"),
        ("a1", "A1"),
        ("a2", "A2"),
        ("a3", "A3"),
        ("a4", "A4"),
        ("a5", "A5"),
        ("a6", "A6"),
        ("b0", "B0"),
        ("b1", "B1"),
        ("b2", "B2"),
        ("b3", "B3"),
        ("b4", "B4"),
        ("b5", "B5"),
        ("b6", "B6"),
        ("letter", "letter"),
        ("legal", "legal"),
        ("tabloid", "tabloid"),
        ("csheet", "asme-c"),
        ("dsheet", "asme-d"),
        ("esheet", "asme-e"),
    ];
    let mut checked = 0;
    for (theirs, ours) in names {
        let out = std::process::Command::new("paperconf")
            .args(["-p", theirs, "-s", "-m"])
            .output()
            .expect("paperconf ran a moment ago");
        let text = String::from_utf8_lossy(&out.stdout);
        let numbers: Vec<f64> = text
            .split_whitespace()
            .filter_map(|w| w.parse().ok())
            .collect();
        let paper = Paper::named(ours).unwrap();
        assert_eq!(numbers.len(), 2, "paperconf said {text:?} for {theirs}");
        // libpaper rounds to a tenth of a millimetre (it works in points).
        assert!(
            (numbers[0] - paper.width_mm).abs() <= 0.1,
            "{theirs}: {text}"
        );
        assert!(
            (numbers[1] - paper.height_mm).abs() <= 0.1,
            "{theirs}: {text}"
        );
        checked += 1;
    }
    assert_eq!(checked, names.len());
    eprintln!("{checked} sizes agree with libpaper");
}

fn decode(bytes: &[u8]) -> (png::Info<'static>, Vec<u8>) {
    let mut reader = png::Decoder::new(std::io::Cursor::new(bytes.to_vec()))
        .read_info()
        .unwrap();
    let mut pixels = vec![0; reader.output_buffer_size().unwrap()];
    reader.next_frame(&mut pixels).unwrap();
    (reader.info().clone(), pixels)
}

#[test]
fn a_page_prints_at_true_size() {
    let site = demo();
    let page = PageSettings {
        paper: Paper::named("A4").unwrap().landscape(),
        margin_mm: 10.0,
        dpi: 150.0,
        band_deg: (-90.0, 90.0),
        title: Some(vec!["TEST".to_owned()].into()),
        tiles: None,
    };
    let (sheets, _) = draw_sheets(
        &site,
        &site.standpoints[0],
        &RenderSettings::default(),
        Some(&page),
        150.0,
    )
    .unwrap();
    assert_eq!(sheets.len(), 1);
    let mut bytes = Vec::new();
    let options = PngOptions {
        dpi: Some(150.0),
        ..PngOptions::default()
    };
    write_png(&sheets[0].drawing, &options, &mut bytes).unwrap();
    let (info, _) = decode(&bytes);
    // The PNG specification's pHYs chunk: pixels per metre, unit 1 = the metre.
    let dims = info.pixel_dims.unwrap();
    assert_eq!(dims.unit, png::Unit::Meter);
    // Both directions: square pixels at the asked resolution, across and down.
    assert!((dims.xppu as f64 * 0.0254 - 150.0).abs() < 0.02, "{dims:?}");
    assert!((dims.yppu as f64 * 0.0254 - 150.0).abs() < 0.02, "{dims:?}");
    // The image is the sheet: 297 x 210 mm at 150 dpi.
    assert_eq!(info.width, (297.0f64 * 150.0 / 25.4).ceil() as u32);
    assert_eq!(info.height, (210.0f64 * 150.0 / 25.4).ceil() as u32);
}

#[test]
fn tiles_cover_the_layout_with_overlaps_and_labels() {
    let site = demo();
    let page = PageSettings {
        paper: Paper::named("A4").unwrap().landscape(),
        margin_mm: 12.0,
        dpi: 72.0,
        band_deg: (-45.0, 60.0),
        title: None,
        tiles: Some(Tiling {
            columns: 3,
            rows: 2,
            overlap_mm: 15.0,
        }),
    };
    let (sheets, _) = draw_sheets(
        &site,
        &site.standpoints[0],
        &RenderSettings::default(),
        Some(&page),
        72.0,
    )
    .unwrap();
    assert_eq!(sheets.len(), 6);
    for sheet in &sheets {
        assert_eq!((sheet.width_mm, sheet.height_mm), (297.0, 210.0));
        let marks = sheet
            .drawing
            .layers
            .iter()
            .find(|l| l.name == "sheet marks")
            .unwrap();
        // Eight crop-mark strokes and a lettered label.
        assert!(marks.lines.len() > 8);
    }
    // The panorama's width spans three sheets less two overlaps: 3 x 273 - 2 x 15 mm.
    let placement = page.place().unwrap();
    assert!((placement.mm_per_degree * 360.0 - (3.0 * 273.0 - 30.0)).abs() < 0.2);
}

/// The panorama's XMP packet read back with a general XML parser: the GPano properties of
/// the published photo-sphere metadata, with the image's size and the heading.
#[test]
fn a_full_panorama_carries_its_metadata() {
    let site = demo();
    let standpoint = &site.standpoints[0];
    let settings = RenderSettings {
        width: 512,
        height: 256,
        ..RenderSettings::default()
    };
    let render = draw(&site, standpoint, &settings).unwrap();
    let mut bytes = Vec::new();
    let options = PngOptions {
        colour: true,
        dpi: Some(96.0),
        panorama: Some(Panorama {
            width: 512,
            height: 256,
            heading_deg: standpoint.heading.to_degrees(),
            pitch_deg: -12.5,
            roll_deg: 7.25,
        }),
    };
    write_png(&render.drawing, &options, &mut bytes).unwrap();
    let (info, pixels) = decode(&bytes);
    assert_eq!(info.color_type, png::ColorType::Rgba);
    assert_eq!(pixels.len(), 512 * 256 * 4);
    let chunk = info
        .utf8_text
        .iter()
        .find(|t| t.keyword == "XML:com.adobe.xmp")
        .expect("an XMP packet");
    let xmp = chunk.get_text().unwrap();
    let document = roxmltree::Document::parse(&xmp).unwrap();
    let gpano = "http://ns.google.com/photos/1.0/panorama/";
    let field = |name: &str| {
        document
            .descendants()
            .find(|n| n.tag_name().namespace() == Some(gpano) && n.tag_name().name() == name)
            .and_then(|n| n.text())
            .map(str::to_owned)
            .unwrap_or_else(|| panic!("no GPano:{name}"))
    };
    // Every field written, each against what the image is: the whole sphere, uncropped.
    assert_eq!(field("ProjectionType"), "equirectangular");
    assert_eq!(field("UsePanoramaViewer"), "True");
    assert_eq!(field("FullPanoWidthPixels"), "512");
    assert_eq!(field("FullPanoHeightPixels"), "256");
    assert_eq!(field("CroppedAreaImageWidthPixels"), "512");
    assert_eq!(field("CroppedAreaImageHeightPixels"), "256");
    assert_eq!(field("CroppedAreaLeftPixels"), "0");
    assert_eq!(field("CroppedAreaTopPixels"), "0");
    let degrees = |name: &str| field(name).parse::<f64>().unwrap();
    assert!((degrees("PoseHeadingDegrees") - 10.0).abs() < 1e-3);
    assert!((degrees("PosePitchDegrees") + 12.5).abs() < 1e-3);
    assert!((degrees("PoseRollDegrees") - 7.25).abs() < 1e-3);
    let written = document
        .descendants()
        .filter(|n| n.tag_name().namespace() == Some(gpano))
        .count();
    assert_eq!(
        written, 11,
        "a GPano field is written that this test does not check"
    );
}

#[test]
fn styles_from_the_scene_and_weights_by_distance() {
    let site = pansite::scene::parse_scene(
        b"Scene(standpoints: [(name: \"s\", x: 0, y: 0)], styles: {\"wireframe\": (colour: \"#102030\", weight_px: 2), \
          \"grid\": (opacity: 0.5), \"posts\": (colour: \"red\")}, items: [
            Block(at: Centre(0, 5), width: 4, depth: 2, height: 3),
            Block(at: Centre(40, 60), width: 10, depth: 4, height: 12),
            Column(layer: \"posts\", at: (12, 15), diameter: 0.2, height: 3),
        ])",
        Path::new("styled.ron"),
        "styled",
    )
    .unwrap();
    let settings = RenderSettings {
        width: 512,
        height: 256,
        weight_by_distance: true,
        ..RenderSettings::default()
    };
    let render = draw(&site, &site.standpoints[0], &settings).unwrap();
    let layer = |name: &str| {
        render
            .drawing
            .layers
            .iter()
            .find(|l| l.name == name)
            .unwrap_or_else(|| panic!("no layer {name}"))
    };
    // The scene's wireframe style, then 1.6 times heavier near and 0.6 times far.
    assert_eq!(layer("wireframe (near)").stroke.colour, [0x10, 0x20, 0x30]);
    assert_eq!(layer("wireframe (near)").stroke.width_px, 2.0 * 1.6);
    assert_eq!(layer("wireframe (far)").stroke.width_px, 2.0 * 0.6);
    // A site layer's own style wins over the general one.
    assert_eq!(layer("wireframe: posts").stroke.colour, [200, 30, 30]);
    assert_eq!(layer("grid").stroke.opacity, 0.5);
}
