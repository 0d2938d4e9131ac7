//! Print-ready sheets read back from their SVG: every paper preset in both orientations,
//! with every aid on. Label groups (`data-text`) must lie inside the printable area and
//! apart; the title block's labels must keep clear of the panorama's frame and of the
//! scale bar; azimuth labels must name the azimuth of the meridian beside them.
//!
//! Sources: ISO 216 and ASME Y14.1 sheet sizes (the presets, checked in tests/pages.rs);
//! the SVG is parsed with roxmltree, a general XML parser, so nothing of ours reads it.

use pansite::aids::AidSettings;
use pansite::page::{PageSettings, Paper};
use pansite::render::{draw_sheets, RenderSettings};
use pansite::scene::load_scene;
use std::path::Path;

mod common;

/// A box in millimetres: left, top, right, bottom.
type MmBox = [f64; 4];

/// The boxes of every path's points in a group, millimetres.
fn group_box(group: roxmltree::Node) -> Option<MmBox> {
    let mut b = [
        f64::INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::NEG_INFINITY,
    ];
    for path in group.children().filter(|n| n.has_tag_name("path")) {
        let d = path.attribute("d")?;
        let numbers: Vec<f64> = d
            .split_whitespace()
            .filter_map(|t| t.parse().ok())
            .collect();
        for xy in numbers.chunks_exact(2) {
            b = [
                b[0].min(xy[0]),
                b[1].min(xy[1]),
                b[2].max(xy[0]),
                b[3].max(xy[1]),
            ];
        }
    }
    b[0].is_finite().then_some(b)
}

fn overlap(a: &MmBox, b: &MmBox) -> bool {
    a[0] < b[2] && b[0] < a[2] && a[1] < b[3] && b[1] < a[3]
}

struct ReadBack {
    labels: Vec<(String, String, MmBox)>,
    frame: MmBox,
    bar: Option<MmBox>,
}

fn read_back(svg: &str) -> ReadBack {
    let doc = roxmltree::Document::parse(svg).unwrap();
    let mut labels = Vec::new();
    let (mut frame, mut bar) = (None, None);
    for g in doc.descendants().filter(|n| n.has_tag_name("g")) {
        let layer = g.attribute("data-layer").unwrap_or("").to_owned();
        if let Some(text) = g.attribute("data-text") {
            if let Some(b) = group_box(g) {
                labels.push((layer, text.to_owned(), b));
            }
            // Each label group has its words as a title too.
            let title = g.children().find(|n| n.has_tag_name("title")).unwrap();
            assert_eq!(title.text(), Some(text));
        } else if layer == "frame" {
            frame = group_box(g);
        } else if layer == "scale bar" {
            bar = group_box(g);
        }
    }
    ReadBack {
        labels,
        frame: frame.unwrap(),
        bar,
    }
}

/// The names of the layers that hold one label each (the label placer's kinds).
const LABEL_LAYERS: [&str; 9] = [
    "title",
    "grid labels",
    "vanishing point labels",
    "sun hour labels",
    "pole labels",
    "division labels",
    "standpoint labels",
    "item labels",
    "captions",
];

/// Every marked section of the first page of a PDF (ISO 32000-1 §14.6: `/OC /tag BDC ...
/// EMC`, the tag a key of the page's `/Properties`, whose group's `/Name` is the layer's)
/// with the box of its path points (`m`, `l`) in millimetres from the sheet's top-left
/// corner (§8.3.2.3: default user space is 1/72 inch a unit, y up), read with lopdf.
fn pdf_sections(bytes: &[u8], height_mm: f64) -> Vec<(String, Option<MmBox>)> {
    let doc = lopdf::Document::load_mem(bytes).expect("lopdf parses the PDF");
    let page = *doc.get_pages().values().next().expect("a page");
    let dict_of = |o: &lopdf::Object| match o {
        lopdf::Object::Reference(id) => doc.get_dictionary(*id).unwrap().clone(),
        other => other.as_dict().unwrap().clone(),
    };
    let page_dict = doc.get_dictionary(page).unwrap();
    let resources = dict_of(page_dict.get(b"Resources").unwrap());
    let properties = dict_of(resources.get(b"Properties").unwrap());
    let content = doc.get_and_decode_page_content(page).unwrap();
    let mut sections: Vec<(String, Option<MmBox>)> = Vec::new();
    for op in &content.operations {
        match op.operator.as_str() {
            "BDC" => {
                let tag = op.operands[1].as_name().unwrap();
                let group = dict_of(properties.get(tag).unwrap());
                let name = group.get(b"Name").and_then(lopdf::Object::as_str).unwrap();
                sections.push((String::from_utf8(name.to_vec()).unwrap(), None));
            }
            "m" | "l" => {
                let x = op.operands[0].as_float().unwrap() as f64 * 25.4 / 72.0;
                let y = height_mm - op.operands[1].as_float().unwrap() as f64 * 25.4 / 72.0;
                let (_, b) = sections.last_mut().expect("paths inside a layer");
                let b = b.get_or_insert([x, y, x, y]);
                *b = [b[0].min(x), b[1].min(y), b[2].max(x), b[3].max(y)];
            }
            _ => {}
        }
    }
    sections
}

fn sheet_svg(paper: Paper, band: (f64, f64)) -> (String, PageSettings) {
    let (svg, _, page) = sheet_svg_and_pdf(paper, band, false);
    (svg, page)
}

fn sheet_svg_and_pdf(paper: Paper, band: (f64, f64), pdf: bool) -> (String, Vec<u8>, PageSettings) {
    let site =
        load_scene(&Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron"))
            .unwrap();
    let page = PageSettings {
        paper,
        margin_mm: 10.0,
        dpi: 100.0,
        band_deg: band,
        title: Some(vec![
            "WEXCOMBE SQUARE WITH A LONG NAME FOR A SMALL SHEET: STANDPOINT BY THE FOUNTAIN".to_owned(),
            "HEADING 45.0\u{b0}  PITCH 0.0\u{b0}  ROLL 0.0\u{b0}  EYE 1.60 M ABOVE GROUND AT 0.00 M, AT (12.00, -3.00)".to_owned(),
            "DRAWN 2026-12-02 WITH PANSITE".to_owned(),
        ]
        .into()),
        tiles: None,
    };
    let settings = RenderSettings {
        aids: AidSettings::all(),
        ..RenderSettings::default()
    };
    let (sheets, _) =
        draw_sheets(&site, &site.standpoints[0], &settings, Some(&page), 100.0).unwrap();
    let mut svg = Vec::new();
    pansite::output::write_svg(&sheets[0], &mut svg).unwrap();
    let mut bytes = Vec::new();
    if pdf {
        pansite::output::write_pdf(&sheets[..1], &mut bytes).unwrap();
    }
    (String::from_utf8(svg).unwrap(), bytes, page)
}

#[test]
fn every_preset_both_ways_keeps_its_labels_whole_apart_and_clear() {
    for name in pansite::page::preset_names().split(", ") {
        let paper = Paper::named(name).unwrap();
        for turned in [paper.portrait(), paper.landscape()] {
            let (svg, pdf, page) = sheet_svg_and_pdf(turned, (-90.0, 90.0), true);
            let back = read_back(&svg);
            // The PDF holds the same labels, in the same places: each label's marked
            // section has the box of the SVG's group, so every check below holds for it.
            let in_pdf: Vec<MmBox> = pdf_sections(&pdf, turned.height_mm)
                .into_iter()
                .filter(|(layer, _)| LABEL_LAYERS.contains(&layer.as_str()))
                .filter_map(|(_, b)| b)
                .collect();
            let in_svg: Vec<MmBox> = back
                .labels
                .iter()
                .filter(|(layer, ..)| LABEL_LAYERS.contains(&layer.as_str()))
                .map(|(.., b)| *b)
                .collect();
            assert_eq!(
                in_pdf.len(),
                in_svg.len(),
                "{name} {turned:?}: labels in the PDF"
            );
            for (p, v) in in_pdf.iter().zip(&in_svg) {
                // The PDF rounds to 0.001 pt, the SVG to 0.001 mm.
                assert!(
                    p.iter().zip(v).all(|(a, b)| (a - b).abs() < 0.002),
                    "{name} {turned:?}: PDF {p:?} against SVG {v:?}"
                );
            }
            let m = page.margin_mm;
            let printable = [m, m, turned.width_mm - m, turned.height_mm - m];
            // The lettering's strokes are drawn with round caps: allow half a stroke.
            let slack = 0.1;
            assert!(!back.labels.is_empty(), "{name}");
            for (layer, text, b) in &back.labels {
                assert!(
                    b[0] >= printable[0] - slack
                        && b[1] >= printable[1] - slack
                        && b[2] <= printable[2] + slack
                        && b[3] <= printable[3] + slack,
                    "{name} {turned:?}: {layer} {text:?} at {b:?} leaves the printable area"
                );
                if layer == "title" {
                    assert!(
                        !overlap(b, &back.frame),
                        "{name}: {text:?} over the drawing"
                    );
                    if let Some(bar) = &back.bar {
                        assert!(!overlap(b, bar), "{name}: {text:?} over the scale bar");
                    }
                }
            }
            for (i, (_, ta, a)) in back.labels.iter().enumerate() {
                for (_, tb, b) in &back.labels[i + 1..] {
                    // Boxes of stroke centre lines; touching is not overlapping.
                    assert!(
                        !overlap(&[a[0] + 0.01, a[1] + 0.01, a[2] - 0.01, a[3] - 0.01], b),
                        "{name} {turned:?}: {ta:?} {a:?} overlaps {tb:?} {b:?}"
                    );
                }
            }
        }
    }
}

/// The cases of the issue: A3, a band from -30 to +40 degrees, every aid. Each azimuth
/// label (unsigned degrees on the grid) stands just right or just left of its meridian;
/// the azimuth there, worked out from the frame alone (heading at the middle, 360 degrees
/// across, the seam behind), is the label's value. No label crosses the frame.
#[test]
fn azimuth_labels_name_the_meridian_beside_them() {
    let site =
        load_scene(&Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron"))
            .unwrap();
    let heading = site.standpoints[0].heading.to_degrees();
    for band in [(-30.0, 40.0), (-90.0, 90.0)] {
        let (svg, _) = sheet_svg(Paper::named("A3").unwrap().landscape(), band);
        let back = read_back(&svg);
        let [fl, ft, fr, fb] = back.frame;
        let per_degree = (fr - fl) / 360.0;
        let azimuth_at = |x: f64| (heading + (x - fl) / per_degree - 180.0).rem_euclid(360.0);
        let mut checked = 0;
        for (layer, text, b) in &back.labels {
            assert!(
                b[0] >= fl - 0.1 && b[2] <= fr + 0.1,
                "{text:?} crosses the frame"
            );
            if layer != "grid labels" {
                continue;
            }
            assert!(
                b[1] >= ft - 0.1 && b[3] <= fb + 0.1,
                "{text:?} crosses the band edge"
            );
            let Some(value) = text
                .strip_suffix('\u{b0}')
                .and_then(|v| v.parse::<f64>().ok())
            else {
                continue;
            };
            if text.starts_with(['+', '-']) {
                continue;
            }
            // The gap between a label and its line is 0.4 of the cap height; the box's
            // near edge is half a stroke nearer.
            let gap = 0.45 * (b[3] - b[1]).min(4.0);
            let near = |az: f64| {
                let d = (az - value).rem_euclid(360.0);
                d.min(360.0 - d) < 0.6
            };
            assert!(
                near(azimuth_at(b[0] - gap))
                    || near(azimuth_at(b[2] + gap))
                    || near(azimuth_at(b[0]))
                    || near(azimuth_at(b[2])),
                "{text:?} at {b:?}: meridians beside it are {:.1} and {:.1}",
                azimuth_at(b[0] - gap),
                azimuth_at(b[2] + gap)
            );
            checked += 1;
        }
        assert!(checked >= 8, "{checked} azimuth labels");
    }
}

/// Whether the segment `a`-`b` meets the box `r` (left, top, right, bottom): Liang-Barsky
/// clipping (Liang and Barsky 1984), written here so nothing of ours decides it.
fn segment_meets_box(a: (f64, f64), b: (f64, f64), r: &MmBox) -> bool {
    let (dx, dy) = (b.0 - a.0, b.1 - a.1);
    let (mut t0, mut t1) = (0.0f64, 1.0f64);
    for (p, q) in [
        (-dx, a.0 - r[0]),
        (dx, r[2] - a.0),
        (-dy, a.1 - r[1]),
        (dy, r[3] - a.1),
    ] {
        if p == 0.0 {
            if q < 0.0 {
                return false;
            }
        } else {
            let t = q / p;
            if p < 0.0 {
                t0 = t0.max(t);
            } else {
                t1 = t1.min(t);
            }
        }
    }
    t0 <= t1
}

/// The plan of the demo on A3, read back from its SVG: the standpoints' names are all
/// there, apart from every other label and crossed by no building's outline (the outlines
/// worked out here from the scene's edges and the plan's own origin and scale); the scale
/// is one of the standard series and the printed bar measures true at it.
#[test]
fn plan_names_keep_off_each_other_and_the_buildings_and_its_bar_reads_true() {
    let site =
        load_scene(&Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron"))
            .unwrap();
    for name in ["A3", "A4", "A5", "A6"] {
        check_plan(&site, Paper::named(name).unwrap().landscape());
    }
}

fn check_plan(site: &pansite::scene::Site, paper: Paper) {
    use pansite::compose::{plan_map, PlanSettings, STANDARD_SCALES};
    use pansite::scene::SiteCurve;
    let settings = PlanSettings::for_paper(&paper, 10.0, 150.0);
    let plan = plan_map(site, &site.standpoints, &settings).unwrap();
    let sheet = plan.on_paper(&paper, 10.0);
    let mut svg = Vec::new();
    pansite::output::write_svg(&sheet, &mut svg).unwrap();
    let svg = String::from_utf8(svg).unwrap();
    let doc = roxmltree::Document::parse(&svg).unwrap();
    let mut labels: Vec<(String, String, MmBox)> = Vec::new();
    let mut bar = None;
    for g in doc.descendants().filter(|n| n.has_tag_name("g")) {
        let layer = g.attribute("data-layer").unwrap_or("").to_owned();
        match (g.attribute("data-text"), group_box(g)) {
            (Some(text), Some(b)) => labels.push((layer, text.to_owned(), b)),
            (None, Some(b)) if layer == "scale bar" => bar = Some(b),
            _ => {}
        }
    }
    for s in &site.standpoints {
        assert!(
            labels
                .iter()
                .any(|(l, t, _)| l == "standpoint labels" && *t == s.name.to_uppercase()),
            "{} has no name on the plan",
            s.name
        );
    }
    for (i, (_, ta, a)) in labels.iter().enumerate() {
        for (_, tb, b) in &labels[i + 1..] {
            assert!(
                !overlap(&[a[0] + 0.01, a[1] + 0.01, a[2] - 0.01, a[3] - 0.01], b),
                "{ta:?} {a:?} overlaps {tb:?} {b:?}"
            );
        }
    }
    // Buildings' outlines in millimetres on the sheet: the plan's pixels plus the margin.
    let mm = 25.4 / 150.0;
    let on_sheet = |x: f64, y: f64| {
        let p = plan.to_px(x, y);
        (10.0 + p.x * mm, 10.0 + p.y * mm)
    };
    let buildings = ["block", "footprint", "tower", "arcade", "room", "dome"];
    let mut outlines = 0;
    for edge in &site.edges {
        let kind = site.items[edge.item.0 as usize].kind;
        let SiteCurve::Segment { start, end } = edge.curve else {
            continue;
        };
        if !buildings.contains(&kind) {
            continue;
        }
        outlines += 1;
        let (a, b) = (on_sheet(start.x, start.y), on_sheet(end.x, end.y));
        for (layer, text, r) in &labels {
            if layer == "standpoint labels" {
                assert!(
                    !segment_meets_box(a, b, r),
                    "{text:?} at {r:?} crosses an outline of a {kind} from {a:?} to {b:?}"
                );
            }
        }
    }
    assert!(outlines > 50, "{outlines} outline segments");
    // The scale: "SCALE 1:N ..." with N of the standard series, and the bar's "L M".
    let scale_text = labels
        .iter()
        .find_map(|(_, t, _)| t.strip_prefix("SCALE 1:"))
        .expect("a scale is written");
    let n: f64 = scale_text
        .split_whitespace()
        .next()
        .unwrap()
        .parse()
        .unwrap();
    assert!(STANDARD_SCALES.contains(&n), "1:{n}");
    let metres: f64 = labels
        .iter()
        .find_map(|(_, t, _)| t.strip_suffix(" M").and_then(|v| v.parse().ok()))
        .expect("the bar's length is written");
    // At 1:N a length of L metres is L * 1000 / N millimetres on paper (the definition of
    // a scale); the bar's box is its length plus nothing across (its ticks are upright).
    let bar = bar.expect("a scale bar");
    let printed = bar[2] - bar[0];
    assert!(
        (printed - metres * 1000.0 / n).abs() < 0.05,
        "{metres} m at 1:{n} printed {printed} mm"
    );
}

/// A contact sheet fitted to A4: each row of each caption is a group of its own (a name and
/// its numbers never read as one line), the groups apart and inside the printable area;
/// path thumbnails are named after the path.
#[test]
fn contact_sheet_on_paper_keeps_its_captions_apart_and_named_after_the_sweep() {
    use pansite::compose::{contact_sheet, sweep_path, ContactSettings, SheetGrid};
    let site =
        load_scene(&Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron"))
            .unwrap();
    let paper = Paper::named("A4").unwrap().landscape();
    let standpoints = sweep_path(
        &site.standpoints[0],
        &[(0.0, 0.0), (10.0, 0.0), (10.0, 10.0)],
        5,
    )
    .unwrap();
    let px_per_mm = 100.0 / 25.4;
    let (grid, (tw, th)) = SheetGrid::fit(
        standpoints.len(),
        None,
        277.0 * px_per_mm,
        190.0 * px_per_mm,
    )
    .unwrap();
    let mut settings = ContactSettings {
        dpi: 100.0,
        columns: Some(grid.columns as u32),
        ..ContactSettings::default()
    };
    (settings.thumbnail.width, settings.thumbnail.height) = (tw, th);
    settings.thumbnail.hidden = Some(pansite::scene::HiddenEdges::Solid);
    settings.thumbnail.dpi = 100.0;
    settings.thumbnail.aids.labels = true;
    settings.thumbnail.aids.item_labels = true;
    let sheet = contact_sheet(&site, &standpoints, &settings, &|_, _| {})
        .unwrap()
        .on_paper(&paper, 10.0)
        .expect("fitted to the paper");
    // ISO 216: A4 is 297 x 210 mm.
    assert_eq!((sheet.width_mm, sheet.height_mm), (297.0, 210.0));
    let mut svg = Vec::new();
    pansite::output::write_svg(&sheet, &mut svg).unwrap();
    let all = read_back_labels(&String::from_utf8(svg).unwrap());
    // The thumbnails' own labels (grid values, compass letters) keep a group each too, and
    // lie inside their thumbnails; the captions are the groups below the thumbnails' rows.
    let is_caption =
        |t: &str| t.contains(". PATH ") || (t.starts_with("HEADING ") && t.contains("  AT "));
    let (back, own): (Vec<_>, Vec<_>) = all.into_iter().partition(|(t, _)| is_caption(t));
    assert!(own.len() >= standpoints.len(), "thumbnail labels: {own:?}");
    for ((text, b), (caption, c)) in own.iter().flat_map(|o| back.iter().map(move |k| (o, k))) {
        assert!(
            !overlap(b, c),
            "{text:?} {b:?} overlaps the caption {caption:?} {c:?}"
        );
    }
    assert_eq!(back.len(), 2 * standpoints.len(), "{back:?}");
    for (k, (text, b)) in back.iter().enumerate() {
        if k % 2 == 0 {
            assert_eq!(*text, format!("{}. PATH {} OF 5", k / 2 + 1, k / 2 + 1));
        } else {
            assert!(text.starts_with("HEADING "), "{text}");
        }
        assert!(
            b[0] >= 9.9 && b[1] >= 9.9 && b[2] <= 287.1 && b[3] <= 200.1,
            "{text}"
        );
        for (tb, c) in &back[k + 1..] {
            assert!(!overlap(b, c), "{text:?} {b:?} overlaps {tb:?} {c:?}");
        }
    }
}

fn read_back_labels(svg: &str) -> Vec<(String, MmBox)> {
    let doc = roxmltree::Document::parse(svg).unwrap();
    doc.descendants()
        .filter(|n| n.has_tag_name("g"))
        .filter_map(|g| Some((g.attribute("data-text")?.to_owned(), group_box(g)?)))
        .collect()
}

/// `--lettering text`: the same sheet with each label's strokes replaced by one SVG text
/// element holding its words, where the strokes stood. usvg (a general SVG reader) accepts
/// the document; roxmltree reads the elements. The text's anchor point is compared with the
/// stroked label's box: its x at the box's start, middle or end as `text-anchor` says, its
/// baseline between the box's top and a little below its bottom (SVG 1.1, 10.9.1, for
/// `text-anchor`; the baseline is the `y` of a `<text>`, 10.4).
#[test]
fn text_lettering_puts_editable_words_where_the_strokes_were() {
    use pansite::output::{write_svg_with, Lettering, EM_PER_CAP};
    let site =
        load_scene(&Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron"))
            .unwrap();
    let page = PageSettings {
        paper: Paper::named("A3").unwrap().landscape(),
        margin_mm: 10.0,
        dpi: 100.0,
        band_deg: (-90.0, 90.0),
        title: Some(vec!["WEXCOMBE: FOUNTAIN & STEPS <EAST>".to_owned()].into()),
        tiles: None,
    };
    let settings = RenderSettings {
        aids: AidSettings::all(),
        ..RenderSettings::default()
    };
    let (sheets, _) =
        draw_sheets(&site, &site.standpoints[0], &settings, Some(&page), 100.0).unwrap();
    let mut strokes = Vec::new();
    write_svg_with(&sheets[0], Lettering::Strokes, &mut strokes).unwrap();
    let mut text = Vec::new();
    write_svg_with(&sheets[0], Lettering::Text, &mut text).unwrap();
    usvg::Tree::from_data(&text, &usvg::Options::default()).expect("usvg reads it");
    let stroked = read_back_labels(&String::from_utf8(strokes).unwrap());
    let text = String::from_utf8(text).unwrap();
    let doc = roxmltree::Document::parse(&text).unwrap();
    let groups: Vec<roxmltree::Node> = doc
        .descendants()
        .filter(|n| n.has_tag_name("g") && n.attribute("data-text").is_some())
        .collect();
    assert_eq!(groups.len(), stroked.len());
    assert!(groups.len() > 20);
    for (g, (words, b)) in groups.iter().zip(&stroked) {
        assert_eq!(g.attribute("data-text"), Some(words.as_str()));
        assert!(
            !g.children().any(|n| n.has_tag_name("path")),
            "{words}: strokes left"
        );
        let t = g
            .children()
            .find(|n| n.has_tag_name("text"))
            .unwrap_or_else(|| panic!("{words}: no text element"));
        assert_eq!(t.text(), Some(words.as_str()), "the words, unescaped");
        let number = |name: &str| t.attribute(name).unwrap().parse::<f64>().unwrap();
        let (x, y, size) = (number("x"), number("y"), number("font-size"));
        let cap = size / EM_PER_CAP;
        let stand = match t.attribute("text-anchor") {
            Some("start") => b[0],
            Some("middle") => (b[0] + b[2]) / 2.0,
            Some("end") => b[2],
            other => panic!("{words}: text-anchor {other:?}"),
        };
        assert!(
            (x - stand).abs() < 0.3 * cap,
            "{words}: x {x} against {b:?}"
        );
        assert!(
            y >= b[1] && y <= b[3] + 0.1 * cap,
            "{words}: y {y} against {b:?}"
        );
    }
    // The halos were for our letters: none is drawn round a font's.
    for g in doc
        .descendants()
        .filter(|n| n.attribute("data-layer") == Some("label halo"))
    {
        assert_eq!(g.children().filter(|n| n.is_element()).count(), 0);
    }
}

/// A standpoint in the middle of a close grid of small buildings: no place round it is
/// clear of their outlines, so its name is left out and counted, never drawn across a
/// building (the placer's promise; the outlines worked out here as above).
#[test]
fn a_name_with_no_clear_place_is_left_out_not_drawn_over_a_building() {
    use pansite::compose::{plan_map, PlanSettings};
    use pansite::scene::{parse_scene, SiteCurve};
    let mut items = String::new();
    for row in 0..6 {
        for column in 0..6 {
            let (x, y) = (column as f64 * 2.5 - 6.25, row as f64 * 2.5 - 6.25);
            items.push_str(&format!(
                "Block(label: \"b\", at: Centre({x}, {y}), width: 2, depth: 2, height: 3),\n"
            ));
        }
    }
    let text = format!(
        "Scene(standpoints: [(name: \"middle of the yard\", x: 0, y: 0)], items: [{items}])"
    );
    let site = parse_scene(text.as_bytes(), Path::new("yard.ron"), "yard").unwrap();
    let plan = plan_map(&site, &site.standpoints, &PlanSettings::default()).unwrap();
    let mut crossings = 0;
    for layer in &plan.drawing.layers {
        let Some(words) = &layer.text else { continue };
        if layer.name != "standpoint labels" {
            continue;
        }
        let p = layer.lines.points();
        let b = p
            .iter()
            .fold([f64::MAX, f64::MAX, f64::MIN, f64::MIN], |b, q| {
                [b[0].min(q.x), b[1].min(q.y), b[2].max(q.x), b[3].max(q.y)]
            });
        for edge in &site.edges {
            if let SiteCurve::Segment { start, end } = edge.curve {
                let (a, c) = (plan.to_px(start.x, start.y), plan.to_px(end.x, end.y));
                if segment_meets_box((a.x, a.y), (c.x, c.y), &b) {
                    crossings += 1;
                    eprintln!("{:?} crosses an outline", words.words);
                }
            }
        }
    }
    assert_eq!(crossings, 0);
    assert!(plan.labels_left_out >= 1, "the name has no clear place");
}

/// `plan --page`, `plan --beside --page` and `sheet --page` carry a title block: its words
/// are there (scene, standpoints, the plan's scale, the date) and every label lies inside
/// the printable area of the ISO 216 sheet (A4 210 x 297 mm, A3 297 x 420 mm, A5
/// 148 x 210 mm, from the standard's table) less the 10 mm margin.
#[test]
fn plans_and_sheets_on_paper_carry_a_title_block_inside_the_printable_area() {
    let dir = common::Scratch::new("titled-pages");
    let scene = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/stannock-hill.ron");
    let scene = scene.to_str().unwrap();
    // The arguments, the paper (mm), the words the block must hold.
    type Case<'a> = (&'a [&'a str], (f64, f64), &'a [&'a str]);
    let cases: [Case; 3] = [
        (
            &["plan", "--page", "a4", "--portrait"],
            (210.0, 297.0),
            &[": PLAN", "STANDPOINTS high street", "SCALE 1:", "DRAWN "],
        ),
        (
            &["plan", "--beside", "--page", "a3"],
            (420.0, 297.0),
            &[
                ": STANDPOINT high street",
                "PLAN SCALE 1:",
                "DRAWN ",
                "10\u{b0}",
            ],
        ),
        (
            &["sheet", "--page", "a5", "--portrait"],
            (148.0, 210.0),
            &[
                ": 3 VIEWS",
                "STANDPOINTS high street, church hill",
                "DRAWN ",
            ],
        ),
    ];
    for (k, (args, (w, h), words)) in cases.iter().enumerate() {
        let out = format!("page{k}.svg");
        let mut all: Vec<&str> = args.to_vec();
        all.extend([scene, "--dpi", "60", "-q", "-o", &out]);
        common::succeeds(&dir, &all);
        let svg = std::fs::read_to_string(dir.path(&out)).unwrap();
        let labels = read_back_labels(&svg);
        for word in *words {
            assert!(
                labels.iter().any(|(text, _)| text.contains(word)),
                "{args:?}: no {word:?} in {:?}",
                labels.iter().map(|l| &l.0).collect::<Vec<_>>()
            );
        }
        let printable = [10.0, 10.0, w - 10.0, h - 10.0];
        for (text, b) in &labels {
            assert!(
                b[0] >= printable[0] - 0.05
                    && b[1] >= printable[1] - 0.05
                    && b[2] <= printable[2] + 0.05
                    && b[3] <= printable[3] + 0.05,
                "{args:?}: {text:?} at {b:?} leaves {printable:?}"
            );
        }
    }
}

/// A drawing on titled paper is centred in the room above the block: the margins left and
/// right of it are equal, and so are those above and below it, within a pixel (ISO 216 A3
/// landscape, 420 x 297 mm).
#[test]
fn a_drawing_on_titled_paper_is_centred_above_the_block() {
    use pansite::drawing::{Drawing, Layer, Stroke};
    use pansite::page::{Sheet, TitledPaper};
    use pansite::plane::{ImagePoint, PolylineSet};
    let dpi = 100.0;
    let px = dpi / 25.4;
    // A 2:1 panorama and a square plan with 10 mm between, as `plan --beside` lays them.
    let (width, height) = ((3.0 * 80.0 + 10.0) * px, 80.0 * px);
    let mut outline = PolylineSet::new();
    outline.push(&[
        ImagePoint::new(0.0, 0.0),
        ImagePoint::new(width, 0.0),
        ImagePoint::new(width, height),
        ImagePoint::new(0.0, height),
        ImagePoint::new(0.0, 0.0),
    ]);
    let content = Sheet::full_bleed(
        Drawing {
            width: width.ceil() as u32,
            height: height.ceil() as u32,
            layers: vec![Layer {
                filled: false,
                text: None,
                name: "content".to_owned(),
                stroke: Stroke::black(1.0, 1.0),
                lines: outline,
            }],
        },
        dpi,
    );
    let content = Sheet {
        width_mm: width / px,
        height_mm: height / px,
        ..content
    };
    let a3 = Paper::named("A3").unwrap().landscape();
    let fields: pansite::page::TitleText = vec![
        "STANNOCK: STANDPOINT HIGH STREET".to_owned(),
        "DRAWN 2026-12-03".to_owned(),
    ]
    .into();
    let (sheets, left_out) = TitledPaper::new(a3, 10.0, None)
        .unwrap()
        .lay_out(&content, &fields, &fields, Some(0.5))
        .unwrap();
    assert_eq!((sheets.len(), left_out), (1, 0));
    let sheet = &sheets[0];
    let mut drawn = [
        f64::INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::NEG_INFINITY,
    ];
    for layer in sheet.drawing.layers.iter().filter(|l| l.name == "content") {
        for line in layer.lines.iter() {
            for p in line {
                drawn = [
                    drawn[0].min(p.x),
                    drawn[1].min(p.y),
                    drawn[2].max(p.x),
                    drawn[3].max(p.y),
                ];
            }
        }
    }
    let margin = 10.0 * px;
    let (left, right) = (drawn[0] - margin, 420.0 * px - margin - drawn[2]);
    assert!(
        left > 1.0 && (left - right).abs() <= 1.0,
        "{left} vs {right}"
    );
    // The block across the printable width, at the foot; the gap above it.
    let block = pansite::page::title_layout(&fields, 400.0, Some(5.0));
    let block_top = (297.0 - 10.0 - block.height_mm) * px;
    let gap = pansite::page::TITLE_GAP_MM * px;
    let (above, below) = (drawn[1] - margin, block_top - gap - drawn[3]);
    assert!(
        above > 1.0 && (above - below).abs() <= 1.0,
        "{above} vs {below}"
    );
}

/// The title block of a rendered page carries a north key: plan north up the sheet, and
/// when the scene's `location` turns true north from it, a second arrow along that bearing
/// (clockwise from plan north, as docs/scene-format.md defines `north`), measured here from
/// the SVG's own coordinates with atan2; the key lies in the block, below the frame, and
/// no title row crosses it. A plan page's block has none: the plan draws its own.
#[test]
fn the_title_block_shows_plan_north_and_true_north_when_they_differ() {
    let dir = common::Scratch::new("north-key");
    let square = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron"),
    )
    .unwrap();
    let turned = square.replacen(
        "standpoints: [",
        "location: (latitude: 50.9, longitude: -1.4, north: -37.5),\n    standpoints: [",
        1,
    );
    assert_ne!(turned, square);
    dir.write("turned.ron", &turned);
    dir.write("square.ron", &square);
    let bearing = |from: (f64, f64), to: (f64, f64)| {
        (to.0 - from.0)
            .atan2(from.1 - to.1)
            .to_degrees()
            .rem_euclid(360.0)
    };
    for (scene, shafts) in [("turned.ron", 2), ("square.ron", 1)] {
        let out = format!("{scene}.svg");
        common::succeeds(&dir, &["render", scene, "--page", "a4", "-q", "-o", &out]);
        let svg = std::fs::read_to_string(dir.path(&out)).unwrap();
        let key = common::svg_layer_paths(&svg, "north key");
        // The ring (the longest path) and its centre.
        let ring = key.iter().max_by_key(|p| p.len()).unwrap();
        let (xs, ys): (Vec<f64>, Vec<f64>) = ring.iter().copied().unzip();
        let box_of = |v: &[f64]| {
            v.iter()
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &x| {
                    (a.min(x), b.max(x))
                })
        };
        let ((left, right), (top, bottom)) = (box_of(&xs), box_of(&ys));
        let centre = (0.5 * (left + right), 0.5 * (top + bottom));
        // Straight shafts of two points: plan north's runs up through the centre; true
        // north's starts at the centre.
        let straight: Vec<&Vec<(f64, f64)>> = key.iter().filter(|p| p.len() == 2).collect();
        let through = straight
            .iter()
            .filter(|p| {
                (p[0].0 - centre.0).abs() < 0.05
                    && (p[1].0 - centre.0).abs() < 0.05
                    && p[0].1 > centre.1
                    && p[1].1 < centre.1
            })
            .count();
        assert_eq!(through, 1, "{scene}: one plan-north shaft up the sheet");
        let from_centre: Vec<f64> = straight
            .iter()
            .filter(|p| (p[0].0 - centre.0).hypot(p[0].1 - centre.1) < 0.05)
            .map(|p| bearing(p[0], p[1]))
            .collect();
        assert_eq!(from_centre.len(), shafts - 1, "{scene}");
        if let Some(b) = from_centre.first() {
            assert!(
                (b - (360.0 - 37.5)).abs() < 0.1,
                "{scene}: true north at {b}"
            );
        }
        let labels = read_back_labels(&svg);
        let words: Vec<&str> = labels.iter().map(|(t, _)| t.as_str()).collect();
        assert!(words.contains(&"N"), "{words:?}");
        assert_eq!(words.contains(&"TRUE N"), shafts == 2, "{words:?}");
        // In the block: below the frame, inside the printable area (A4 landscape, 10 mm
        // margins), and no title row over the ring.
        let frame = read_back(&svg).frame;
        assert!(top > frame[3] && bottom < 200.0 && left > 10.0 && right < 287.0);
        let ring_box = [left, top, right, bottom];
        for (text, b) in &labels {
            assert!(
                text == "N" || text == "TRUE N" || !overlap(b, &ring_box),
                "{text:?} over the key"
            );
        }
    }
    common::succeeds(
        &dir,
        &["plan", "turned.ron", "--page", "a4", "-q", "-o", "plan.svg"],
    );
    let plan = std::fs::read_to_string(dir.path("plan.svg")).unwrap();
    assert!(common::svg_layer_paths(&plan, "north key").is_empty());
    assert!(!common::svg_layer_paths(&plan, "north arrow").is_empty());
}

/// `plan` and `sheet` on tiled paper, as `render` is: a plan over 2 x 1 sheets of A4
/// landscape (ISO 216: 297 x 210 mm; 10 mm margins and overlap) is written one SVG a sheet
/// named by row and column, each with its crop marks; every label whole inside its
/// sheet's printable area; the title block on the bottom-left sheet only; a standard scale
/// at least as large as on one sheet; and the printed scale bar measures true (its words
/// "N M" at the scale 1:S: N metres are N * 1000 / S millimetres). The PDF holds both
/// sheets (read with lopdf), and a tiled contact sheet is cut the same way.
#[test]
fn plans_and_sheets_tile_like_panoramas() {
    let dir = common::Scratch::new("tiled-plans");
    let scene = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/stannock-hill.ron");
    let scene = scene.to_str().unwrap();
    let scale_of = |labels: &[(String, MmBox)]| -> f64 {
        let words = labels
            .iter()
            .find_map(|(t, _)| t.strip_prefix("SCALE 1:"))
            .expect("a scale");
        words.split_whitespace().next().unwrap().parse().unwrap()
    };
    let args = ["--dpi", "60", "-q"];
    common::succeeds(
        &dir,
        &[&["plan", scene, "--page", "a4", "-o", "one.svg"], &args[..]].concat(),
    );
    let one = read_back_labels(&std::fs::read_to_string(dir.path("one.svg")).unwrap());
    common::succeeds(
        &dir,
        &[
            &[
                "plan", scene, "--page", "a4", "--tiles", "2x1", "-o", "two.svg",
            ],
            &args[..],
        ]
        .concat(),
    );
    assert!(!dir.path("two.svg").exists());
    let mut titles = Vec::new();
    let mut scales = Vec::new();
    for (k, name) in ["two-r1c1.svg", "two-r1c2.svg"].iter().enumerate() {
        let svg = std::fs::read_to_string(dir.path(name)).expect(name);
        let doc = roxmltree::Document::parse(&svg).unwrap();
        assert_eq!(doc.root_element().attribute("width"), Some("297mm"));
        assert!(
            !common::svg_layer_paths(&svg, "sheet marks").is_empty(),
            "{name}"
        );
        let labels = read_back_labels(&svg);
        // (The sheet's own label, "ROW r/R, COLUMN ...", stands in the margin.)
        for (text, b) in labels.iter().filter(|(t, _)| !t.starts_with("ROW ")) {
            assert!(
                b[0] >= 9.95 && b[1] >= 9.95 && b[2] <= 287.05 && b[3] <= 200.05,
                "{name}: {text:?} at {b:?}"
            );
        }
        titles.push(labels.iter().any(|(t, _)| t.starts_with("DRAWN ")));
        if labels.iter().any(|(t, _)| t.starts_with("SCALE 1:")) {
            scales.push((k, labels, svg));
        }
    }
    assert_eq!(
        titles,
        [true, false],
        "the block on the bottom-left sheet only"
    );
    let (_, labels, svg) = scales.first().expect("the plan's scale on a sheet");
    let tiled = scale_of(labels);
    assert!(tiled <= scale_of(&one), "1:{tiled} vs 1:{}", scale_of(&one));
    let metres: f64 = labels
        .iter()
        .find_map(|(t, _)| t.strip_suffix(" M")?.parse().ok())
        .expect("the bar's length in metres");
    let bar = &common::svg_layer_paths(svg, "scale bar")[0];
    let length = (bar[1].0 - bar[0].0).abs();
    common::assert_near(length, metres * 1000.0 / tiled, 0.05);

    common::succeeds(
        &dir,
        &[
            &[
                "plan", scene, "--page", "a4", "--tiles", "2x1", "-o", "two.pdf",
            ],
            &args[..],
        ]
        .concat(),
    );
    let pdf = lopdf::Document::load(dir.path("two.pdf")).unwrap();
    assert_eq!(pdf.get_pages().len(), 2);

    common::succeeds(
        &dir,
        &[
            &[
                "sheet",
                scene,
                "--page",
                "a5",
                "--tiles",
                "1x2",
                "-o",
                "views.svg",
            ],
            &args[..],
        ]
        .concat(),
    );
    for name in ["views-r1c1.svg", "views-r2c1.svg"] {
        assert!(dir.path(name).exists(), "{name}");
    }
}
