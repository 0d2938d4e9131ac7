//! The SVG and PDF pages read back by general-purpose parsers (usvg for SVG, lopdf for PDF)
//! and held against the drawing they came from and against the raster of the same drawing.

use pansite::drawing::{Drawing, Layer, Stroke};
use pansite::output::{rasterize, write_pdf, write_svg, GreyCanvas};
use pansite::page::Sheet;
use pansite::plane::{ImagePoint, PolylineSet};
use pansite::render::{draw, RenderSettings};
use pansite::scene::load_scene;
use std::collections::BTreeMap;
use std::path::Path;
use std::sync::OnceLock;

/// The demo square from its first standpoint at 1024x512, full bleed at 150 dpi: every kind
/// of layer (grid, horizon, hidden, wireframe), drawn once for all the tests here.
fn demo_sheet() -> &'static Sheet {
    static SHEET: OnceLock<Sheet> = OnceLock::new();
    SHEET.get_or_init(|| {
        let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron");
        let site = load_scene(&path).expect("the demo scene loads");
        let settings = RenderSettings {
            width: 1024,
            height: 512,
            ..RenderSettings::default()
        };
        let render = draw(&site, &site.standpoints[0], &settings).expect("the demo draws");
        Sheet::full_bleed(render.drawing, 150.0)
    })
}

/// A small landscape A4 sheet with awkward layer names: markup characters, a name that
/// sanitises to another layer's id, a lone point, a coloured stroke.
fn awkward_sheet() -> Sheet {
    let layer = |name: &str, colour: [u8; 3], opacity: f64, points: &[&[ImagePoint]]| {
        let mut lines = PolylineSet::new();
        for line in points {
            lines.push(line);
        }
        Layer {
            filled: false,
            text: None,
            name: name.to_owned(),
            stroke: Stroke {
                colour,
                opacity,
                width_px: 2.0,
            },
            lines,
        }
    };
    let p = ImagePoint::new;
    let drawing = Drawing {
        width: 297,
        height: 210,
        layers: vec![
            layer(
                "grid",
                [0, 0, 0],
                0.22,
                &[&[p(0.0, 105.0), p(297.0, 105.0)]],
            ),
            layer(
                "wireframe: <Lamps> & \"posts\"",
                [200, 30, 10],
                1.0,
                &[
                    &[p(10.0, 10.0), p(100.0, 50.5), p(150.25, 20.0)],
                    &[p(40.0, 60.0)],
                ],
            ),
            layer(
                "Wireframe: Lamps & Posts",
                [0, 90, 0],
                0.5,
                &[&[p(5.0, 200.0), p(290.0, 5.0)]],
            ),
        ],
    };
    Sheet {
        drawing,
        width_mm: 297.0,
        height_mm: 210.0,
        mm_per_px: 1.0,
    }
}

fn svg_bytes(sheet: &Sheet) -> Vec<u8> {
    let mut bytes = Vec::new();
    write_svg(sheet, &mut bytes).expect("SVG written");
    bytes
}

fn pdf_bytes(sheets: &[Sheet]) -> Vec<u8> {
    let mut bytes = Vec::new();
    write_pdf(sheets, &mut bytes).expect("PDF written");
    bytes
}

/// A stroked path read back from the SVG: its points in millimetres on the sheet, and the
/// stroke as the SVG gives it (width in millimetres).
struct ParsedPath {
    layer_id: String,
    points_mm: Vec<(f64, f64)>,
    stroke: Stroke,
}

/// Parses the SVG with usvg and returns its size in px, usvg's px per mm, and every
/// stroked path under a layer group.
fn parse_svg(bytes: &[u8]) -> (usvg::Size, f64, Vec<ParsedPath>) {
    let options = usvg::Options::default();
    let tree = usvg::Tree::from_data(bytes, &options).expect("usvg parses the SVG");
    // SVG 1.1 §7.10 (Units): an absolute length such as `mm` is a fixed number of user
    // units (px); usvg takes that number from its `dpi` (96 px per inch, as in CSS 2.1).
    let px_per_mm = options.dpi as f64 / 25.4;
    let mut paths = Vec::new();
    collect_paths(tree.root(), "", px_per_mm, &mut paths);
    (tree.size(), px_per_mm, paths)
}

fn collect_paths(group: &usvg::Group, layer_id: &str, px_per_mm: f64, out: &mut Vec<ParsedPath>) {
    for node in group.children() {
        match node {
            usvg::Node::Group(g) => {
                let id = if g.id().is_empty() { layer_id } else { g.id() };
                collect_paths(g, id, px_per_mm, out);
            }
            usvg::Node::Path(path) => {
                let Some(stroke) = path.stroke() else {
                    continue; // the paper
                };
                let usvg::Paint::Color(colour) = stroke.paint() else {
                    panic!("strokes are plain colours");
                };
                // The path's transform takes its user units (mm, by the viewBox) to px.
                let transform = path.abs_transform();
                let (scale_x, scale_y) = transform.get_scale();
                let scale = px_per_mm as f32;
                assert!(
                    (scale_x - scale).abs() < 1e-4 * scale
                        && (scale_y - scale).abs() < 1e-4 * scale
                );
                let mut points = path.data().points().to_vec();
                transform.map_points(&mut points);
                out.push(ParsedPath {
                    layer_id: layer_id.to_owned(),
                    points_mm: points
                        .iter()
                        .map(|p| (p.x as f64 / px_per_mm, p.y as f64 / px_per_mm))
                        .collect(),
                    stroke: Stroke {
                        colour: [colour.red, colour.green, colour.blue],
                        opacity: stroke.opacity().get() as f64,
                        width_px: stroke.width().get() as f64,
                    },
                });
            }
            _ => panic!("only groups and paths are written"),
        }
    }
}

/// Each layer group's `data-layer` (the layer's name) and `id`, in document order, read
/// with a plain XML parser (usvg keeps no unknown attributes).
fn layer_attributes(bytes: &[u8]) -> Vec<(String, String)> {
    let text = std::str::from_utf8(bytes).expect("UTF-8");
    let doc = roxmltree::Document::parse(text).expect("well-formed XML");
    doc.descendants()
        .filter(|n| n.has_tag_name("g"))
        .map(|g| {
            let name = g.attribute("data-layer").expect("data-layer").to_owned();
            let id = g.attribute("id").expect("id").to_owned();
            (name, id)
        })
        .collect()
}

/// Every `stride`-th vertex of the layer, in pixels.
fn sample_vertices(layer: &Layer, stride: usize) -> impl Iterator<Item = ImagePoint> + '_ {
    layer.lines.points().iter().copied().step_by(stride)
}

/// Distance from `(x, y)` to the nearest of `points`, in the points' unit.
fn nearest(points: &[(f64, f64)], x: f64, y: f64) -> f64 {
    points
        .iter()
        .map(|&(px, py)| (px - x).hypot(py - y))
        .fold(f64::INFINITY, f64::min)
}

#[test]
fn svg_is_the_sheet_in_millimetres_with_the_drawings_points() {
    let sheet = demo_sheet();
    let bytes = svg_bytes(sheet);
    let (size, px_per_mm, paths) = parse_svg(&bytes);
    // SVG 1.1 §7.10: width="…mm" is the size on paper; usvg reports it in px.
    assert!((size.width() as f64 / px_per_mm - sheet.width_mm).abs() < 0.001);
    assert!((size.height() as f64 / px_per_mm - sheet.height_mm).abs() < 0.001);
    // SVG 1.1 §7.7 (viewBox): the viewBox spans the sheet in mm, so one user unit is 1 mm.
    let text = std::str::from_utf8(&bytes).expect("UTF-8");
    let doc = roxmltree::Document::parse(text).expect("well-formed XML");
    let view_box: Vec<f64> = doc
        .root_element()
        .attribute("viewBox")
        .expect("viewBox")
        .split_whitespace()
        .map(|v| v.parse().expect("number"))
        .collect();
    assert_eq!(view_box.len(), 4);
    assert_eq!(&view_box[..2], &[0.0, 0.0]);
    assert!((view_box[2] - sheet.width_mm).abs() < 0.001);
    assert!((view_box[3] - sheet.height_mm).abs() < 0.001);

    // Every layer has its group, with the names the contributor guide promises.
    let attributes = layer_attributes(&bytes);
    let names: Vec<&str> = sheet
        .drawing
        .layers
        .iter()
        .map(|l| l.name.as_str())
        .collect();
    assert_eq!(
        attributes
            .iter()
            .map(|(n, _)| n.as_str())
            .collect::<Vec<_>>(),
        names
    );
    let ids: BTreeMap<&str, &str> = attributes
        .iter()
        .map(|(n, id)| (n.as_str(), id.as_str()))
        .collect();
    for name in ["grid", "horizon", "hidden", "wireframe"] {
        assert_eq!(ids.get(name), Some(&name), "the {name} layer's id");
    }
    let tree = usvg::Tree::from_data(&bytes, &usvg::Options::default()).expect("parses");
    for (layer, (_, id)) in sheet.drawing.layers.iter().zip(&attributes) {
        if !layer.lines.is_empty() {
            assert!(tree.node_by_id(id).is_some(), "usvg keeps the group {id}");
        }
    }

    // Sampled vertices of every layer are in their layer's paths, at the place on paper,
    // within half a pixel (they are written to 0.001 mm).
    let mut checked = 0;
    for (layer, (_, id)) in sheet.drawing.layers.iter().zip(&attributes) {
        let points: Vec<(f64, f64)> = paths
            .iter()
            .filter(|p| &p.layer_id == id)
            .flat_map(|p| p.points_mm.iter().copied())
            .collect();
        for p in sample_vertices(layer, 29) {
            let (x, y) = (p.x * sheet.mm_per_px, p.y * sheet.mm_per_px);
            let off = nearest(&points, x, y);
            assert!(
                off <= 0.5 * sheet.mm_per_px,
                "layer {id}: ({x:.3}, {y:.3}) mm is {off:.4} mm from the nearest point written"
            );
            checked += 1;
        }
    }
    assert!(checked > 200, "only {checked} points checked");
}

#[test]
fn svg_layer_ids_are_unique_names_and_the_names_survive_escaping() {
    let sheet = awkward_sheet();
    let bytes = svg_bytes(&sheet);
    let attributes = layer_attributes(&bytes);
    let expected = [
        ("grid", "grid"),
        ("wireframe: <Lamps> & \"posts\"", "wireframe-lamps-posts"),
        ("Wireframe: Lamps & Posts", "wireframe-lamps-posts-2"),
    ];
    let got: Vec<(&str, &str)> = attributes
        .iter()
        .map(|(n, i)| (n.as_str(), i.as_str()))
        .collect();
    assert_eq!(got, expected);
    let (_, _, paths) = parse_svg(&bytes);
    let lamps: Vec<&ParsedPath> = paths
        .iter()
        .filter(|p| p.layer_id == "wireframe-lamps-posts")
        .collect();
    assert_eq!(lamps.len(), 2, "a path per polyline, the lone point too");
    assert_eq!(lamps[0].stroke.colour, [200, 30, 10]);
    assert!(
        (lamps[0].stroke.width_px - 2.0).abs() < 1e-6,
        "2 px at 1 mm a pixel"
    );
    let third = lamps[0].points_mm[2];
    assert!((third.0 - 150.25).abs() < 1e-4 && (third.1 - 20.0).abs() < 1e-4);
    assert_eq!(
        svg_bytes(&sheet),
        bytes,
        "the same sheet gives the same bytes"
    );
}

/// The page's MediaBox, in points.
fn media_box(doc: &lopdf::Document, page: lopdf::ObjectId) -> Vec<f64> {
    let dict = doc.get_dictionary(page).expect("page dictionary");
    let array = dict
        .get(b"MediaBox")
        .and_then(lopdf::Object::as_array)
        .expect("MediaBox");
    array
        .iter()
        .map(|v| v.as_float().expect("number") as f64)
        .collect()
}

/// A dictionary given inline or by reference.
fn dictionary<'a>(doc: &'a lopdf::Document, object: &'a lopdf::Object) -> &'a lopdf::Dictionary {
    match object {
        lopdf::Object::Reference(id) => doc.get_dictionary(*id).expect("dictionary"),
        other => other.as_dict().expect("dictionary"),
    }
}

/// Every point of every path operator (`m`, `l`) on the page, in millimetres from the
/// sheet's top-left corner, by the name of the optional content group it is marked with
/// (ISO 32000-1 §14.6: `/OC /tag BDC ... EMC`, the tag a key of the page's `/Properties`
/// resource naming the group's dictionary, whose `/Name` is the layer's).
fn pdf_path_points_mm(
    doc: &lopdf::Document,
    page: lopdf::ObjectId,
    height_mm: f64,
) -> std::collections::HashMap<String, Vec<(f64, f64)>> {
    let page_dict = doc.get_dictionary(page).expect("page dictionary");
    let resources = dictionary(doc, page_dict.get(b"Resources").expect("Resources"));
    let properties = dictionary(doc, resources.get(b"Properties").expect("Properties"));
    let content = doc
        .get_and_decode_page_content(page)
        .expect("content decodes");
    let mut by_layer: std::collections::HashMap<String, Vec<(f64, f64)>> = Default::default();
    let mut current: Option<String> = None;
    for op in &content.operations {
        match op.operator.as_str() {
            "BDC" => {
                let tag = op.operands[1].as_name().expect("a named property list");
                let group = dictionary(doc, properties.get(tag).expect("the tag's group"));
                let name = group
                    .get(b"Name")
                    .and_then(lopdf::Object::as_str)
                    .expect("Name");
                current = Some(String::from_utf8(name.to_vec()).expect("ASCII names"));
            }
            "EMC" => current = None,
            "m" | "l" => {
                let x = op.operands[0].as_float().expect("x") as f64;
                let y = op.operands[1].as_float().expect("y") as f64;
                let layer = current.clone().expect("every path inside a layer's group");
                // ISO 32000-1 §8.3.2.3: default user space is 1/72 inch a unit, y up.
                by_layer
                    .entry(layer)
                    .or_default()
                    .push((x * 25.4 / 72.0, height_mm - y * 25.4 / 72.0));
            }
            _ => {}
        }
    }
    by_layer
}

#[test]
fn pdf_has_a_page_per_sheet_at_its_size_and_is_reproducible() {
    let sheets = [demo_sheet().clone(), awkward_sheet()];
    let bytes = pdf_bytes(&sheets);
    assert_eq!(
        pdf_bytes(&sheets),
        bytes,
        "the same sheets give the same bytes"
    );
    let doc = lopdf::Document::load_mem(&bytes).expect("lopdf parses the PDF");
    let pages = doc.get_pages();
    assert_eq!(pages.len(), sheets.len());
    let mut compared = 0;
    for (sheet, (_, &page)) in sheets.iter().zip(&pages) {
        // ISO 32000-1 §7.7.3.3 (Table 30, MediaBox) in default user space units, 1/72 inch.
        let mm: Vec<f64> = media_box(&doc, page)
            .iter()
            .map(|pt| pt * 25.4 / 72.0)
            .collect();
        assert_eq!(&mm[..2], &[0.0, 0.0]);
        assert!((mm[2] - sheet.width_mm).abs() < 0.01, "width {} mm", mm[2]);
        assert!(
            (mm[3] - sheet.height_mm).abs() < 0.01,
            "height {} mm",
            mm[3]
        );

        // Sampled vertices are on the page where the sheet puts them, within half a pixel,
        // among the points of their own layer (a point of another layer does not count).
        let by_layer = pdf_path_points_mm(&doc, page, sheet.height_mm);
        for layer in &sheet.drawing.layers {
            let none = Vec::new();
            let points = by_layer.get(&layer.name).unwrap_or(&none);
            for p in sample_vertices(layer, 29) {
                let (x, y) = (p.x * sheet.mm_per_px, p.y * sheet.mm_per_px);
                let off = nearest(points, x, y);
                assert!(
                    off <= 0.5 * sheet.mm_per_px,
                    "layer {}: ({x:.3}, {y:.3}) mm is {off:.4} mm off",
                    layer.name
                );
                compared += 1;
            }
        }
    }
    assert!(compared > 50, "only {compared} vertices compared");
    // The layers are optional content groups named as the layers (ISO 32000-1 §8.11.2).
    let catalog = doc.catalog().expect("catalog");
    let groups = catalog
        .get(b"OCProperties")
        .and_then(lopdf::Object::as_dict)
        .and_then(|d| d.get(b"OCGs"))
        .and_then(lopdf::Object::as_array)
        .expect("OCGs");
    let names: Vec<String> = groups
        .iter()
        .map(|r| {
            let group = doc
                .get_dictionary(r.as_reference().expect("reference"))
                .expect("OCG");
            let name = group
                .get(b"Name")
                .and_then(lopdf::Object::as_str)
                .expect("Name");
            String::from_utf8(name.to_vec()).expect("ASCII names")
        })
        .collect();
    let mut expected: Vec<String> = Vec::new();
    for layer in sheets.iter().flat_map(|s| &s.drawing.layers) {
        if !expected.contains(&layer.name) {
            expected.push(layer.name.clone());
        }
    }
    assert_eq!(names, expected);
}

/// The least darkening the raster must show at `pixel` for a stroke through `sample` (both
/// in pixels): the rasteriser's rule (coverage `clamp(w/2 + 1/2 - d, 0, 1)`, `d` the
/// distance from the pixel's centre to the stroke, no more than to `sample`), less a
/// `slack` in pixels for the 0.001 mm rounding of the file.
fn least_value_drop(stroke: &Stroke, pixel: (u32, u32), sample: (f64, f64), slack: f64) -> f64 {
    let centre = (pixel.0 as f64 + 0.5, pixel.1 as f64 + 0.5);
    let d = (centre.0 - sample.0).hypot(centre.1 - sample.1) + slack;
    let reach = stroke.width_px.max(1.0) / 2.0 + 0.5;
    let ink = 255.0 * stroke.darkness() * stroke.width_px.min(1.0);
    (reach - d).clamp(0.0, 1.0) * ink
}

/// The SVG's stroke samples, moved by `shift` pixels, checked against the raster: how many
/// were checked and the ones lighter than the rasteriser's rule allows.
fn lighter_than_their_strokes(shift: (f64, f64)) -> (usize, Vec<String>) {
    let sheet = demo_sheet();
    let canvas: GreyCanvas = rasterize(&sheet.drawing);
    let (_, _, paths) = parse_svg(&svg_bytes(sheet));
    let mut checked = 0;
    let mut failures = Vec::new();
    for path in &paths {
        let stroke = Stroke {
            width_px: path.stroke.width_px / sheet.mm_per_px,
            ..path.stroke
        };
        let px: Vec<(f64, f64)> = path
            .points_mm
            .iter()
            .map(|&(x, y)| (x / sheet.mm_per_px + shift.0, y / sheet.mm_per_px + shift.1))
            .collect();
        // The vertices and the middle of every segment, a sample of each path.
        let samples = px.iter().copied().chain(
            px.windows(2)
                .map(|w| ((w[0].0 + w[1].0) / 2.0, (w[0].1 + w[1].1) / 2.0)),
        );
        for (x, y) in samples.step_by(7) {
            if !(x >= 0.0 && y >= 0.0 && x < canvas.width as f64 && y < canvas.height as f64) {
                continue;
            }
            let pixel = (x as u32, y as u32);
            let value = canvas.pixel(pixel.0, pixel.1) as f64;
            let most = 255.0 - least_value_drop(&stroke, pixel, (x, y), 0.02) + 1.0;
            checked += 1;
            if value > most {
                failures.push(format!(
                    "{} at ({x:.3}, {y:.3}) px: pixel {value}, at most {most:.1}",
                    path.layer_id
                ));
            }
        }
    }
    (checked, failures)
}

#[test]
fn svg_positions_agree_with_the_raster_within_half_a_pixel() {
    let (checked, failures) = lighter_than_their_strokes((0.0, 0.0));
    assert!(checked > 1000, "only {checked} samples");
    assert!(
        failures.is_empty(),
        "{} of {checked} samples lighter than their stroke:\n{}",
        failures.len(),
        failures.join("\n")
    );
    // The control: the same samples moved 0.3 px across and down fail the rule.
    let (moved, failures) = lighter_than_their_strokes((0.3, 0.3));
    assert!(
        failures.len() * 20 > moved,
        "a 0.3 px shift failed only {} of {moved} samples",
        failures.len()
    );
}
