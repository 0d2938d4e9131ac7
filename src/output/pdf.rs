//! PDF pages: one page per sheet at its true size, every layer's polylines stroked in its
//! colour, for printing at scale and for vector editors.
//!
//! Lengths are PostScript points (1/72 inch, 25.4/72 mm: ISO 32000-1 §8.3.2.3, default
//! user space), y up from the page's bottom-left corner, so the drawing's y (down from the
//! top) is flipped against the sheet's height. Coordinates are rounded to 0.001 pt. Each
//! layer's opacity is an ExtGState (`CA`, §8.4.5) and each layer is an optional content
//! group (§8.11) named as the layer, so editors and viewers that show PDF layers show the
//! drawing's. The file holds no date and no random identifier: the same sheets give the
//! same bytes. Content streams are deflated (`FlateDecode`).

use super::vector::check_sheet;
use crate::error::{Error, Result};
use crate::page::Sheet;
use pdf_writer::types::{LineCapStyle, LineJoinStyle};
use pdf_writer::{Content, Filter, Finish, Name, Pdf, Rect, Ref, TextStr};
use std::io::Write;

/// Points per millimetre (1 pt = 1/72 in, 1 in = 25.4 mm).
const PT_PER_MM: f64 = 72.0 / 25.4;

/// A length in points, rounded to 0.001 pt for the file.
fn pt(mm: f64) -> f32 {
    ((mm * PT_PER_MM * 1000.0).round() / 1000.0) as f32
}

/// zlib level: the default trade between size and time.
const DEFLATE_LEVEL: u8 = 6;

/// Writes `sheets` as a PDF into `out`, one page per sheet, in order.
///
/// The whole file is built in memory before it is written (the writer works that way):
/// about 20 bytes per vertex before compression.
pub fn write_pdf(sheets: &[Sheet], mut out: impl Write) -> Result<()> {
    if sheets.is_empty() {
        return Err(Error::Setting("there are no sheets to write".into()));
    }
    for sheet in sheets {
        check_sheet(sheet).map_err(Error::Setting)?;
    }
    // What the pages share, in the order first met: one graphics state per opacity, one
    // optional content group per layer name.
    let mut opacities: Vec<f64> = Vec::new();
    let mut names: Vec<&str> = Vec::new();
    for layer in sheets.iter().flat_map(|s| &s.drawing.layers) {
        let opacity = layer.stroke.opacity.clamp(0.0, 1.0);
        if !opacities.contains(&opacity) {
            opacities.push(opacity);
        }
        if !names.contains(&layer.name.as_str()) {
            names.push(&layer.name);
        }
    }
    let mut next_id = 1;
    let mut new_ref = || {
        let r = Ref::new(next_id);
        next_id += 1;
        r
    };
    let catalog_id = new_ref();
    let tree_id = new_ref();
    let state_ids: Vec<Ref> = opacities.iter().map(|_| new_ref()).collect();
    let group_ids: Vec<Ref> = names.iter().map(|_| new_ref()).collect();
    let page_ids: Vec<(Ref, Ref)> = sheets.iter().map(|_| (new_ref(), new_ref())).collect();

    let mut pdf = Pdf::new();
    {
        let mut catalog = pdf.catalog(catalog_id);
        catalog.pages(tree_id);
        let mut properties = catalog.insert(Name(b"OCProperties")).dict();
        properties
            .insert(Name(b"OCGs"))
            .array()
            .items(group_ids.iter().copied());
        // The default view: every layer on, listed in painting order.
        let mut view = properties.insert(Name(b"D")).dict();
        view.insert(Name(b"Order"))
            .array()
            .items(group_ids.iter().copied());
    }
    pdf.pages(tree_id)
        .kids(page_ids.iter().map(|&(page, _)| page))
        .count(sheets.len() as i32);
    for (&id, &opacity) in state_ids.iter().zip(&opacities) {
        pdf.ext_graphics(id)
            .stroking_alpha(opacity as f32)
            .non_stroking_alpha(opacity as f32);
    }
    for (&id, name) in group_ids.iter().zip(&names) {
        pdf.indirect(id)
            .dict()
            .pair(Name(b"Type"), Name(b"OCG"))
            .pair(Name(b"Name"), TextStr(name));
    }

    for (sheet, &(page_id, content_id)) in sheets.iter().zip(&page_ids) {
        let content = page_content(sheet, &opacities, &names);
        let compressed = miniz_oxide::deflate::compress_to_vec_zlib(&content, DEFLATE_LEVEL);
        pdf.stream(content_id, &compressed)
            .filter(Filter::FlateDecode);
        let mut page = pdf.page(page_id);
        page.parent(tree_id)
            .media_box(Rect::new(0.0, 0.0, pt(sheet.width_mm), pt(sheet.height_mm)))
            .contents(content_id);
        let mut resources = page.resources();
        // Only what this page uses, under names that are the same on every page.
        let mut states = resources.ext_g_states();
        for (k, &id) in state_ids.iter().enumerate() {
            if sheet
                .drawing
                .layers
                .iter()
                .any(|l| l.stroke.opacity.clamp(0.0, 1.0) == opacities[k])
            {
                states.pair(Name(state_name(k).as_bytes()), id);
            }
        }
        states.finish();
        let mut groups = resources.insert(Name(b"Properties")).dict();
        for (k, &id) in group_ids.iter().enumerate() {
            if sheet.drawing.layers.iter().any(|l| l.name == names[k]) {
                groups.pair(Name(group_name(k).as_bytes()), id);
            }
        }
    }
    out.write_all(&pdf.finish()).map_err(Error::Output)?;
    out.flush().map_err(Error::Output)
}

fn state_name(index: usize) -> String {
    format!("G{index}")
}

fn group_name(index: usize) -> String {
    format!("L{index}")
}

/// The page's drawing operators, uncompressed: each layer inside its optional content
/// group, with its graphics state, colour and width, each polyline a stroked path.
fn page_content(sheet: &Sheet, opacities: &[f64], names: &[&str]) -> Vec<u8> {
    let scale = sheet.mm_per_px;
    let x = |px: f64| pt(px * scale);
    let y = |px: f64| pt(sheet.height_mm - px * scale);
    let mut content = Content::new();
    content
        .set_line_cap(LineCapStyle::RoundCap)
        .set_line_join(LineJoinStyle::RoundJoin);
    for layer in &sheet.drawing.layers {
        let stroke = &layer.stroke;
        let opacity = stroke.opacity.clamp(0.0, 1.0);
        // Both were collected from these very layers.
        let state = opacities.iter().position(|&o| o == opacity).unwrap_or(0);
        let group = names.iter().position(|&n| n == layer.name).unwrap_or(0);
        content
            .begin_marked_content_with_properties(Name(b"OC"))
            .properties_named(Name(group_name(group).as_bytes()));
        let [r, g, b] = stroke.colour.map(|c| c as f32 / 255.0);
        content
            .set_parameters(Name(state_name(state).as_bytes()))
            .set_stroke_rgb(r, g, b)
            .set_line_width(pt(stroke.width_px * scale));
        if layer.filled {
            // The areas as one path filled once by the non-zero winding rule (ISO 32000-1
            // §8.5.3.3), so that where outlines overlap the tone is laid once.
            content.set_fill_rgb(r, g, b);
            let mut any = false;
            for ring in layer.lines.iter().filter(|ring| ring.len() >= 3) {
                content.move_to(x(ring[0].x), y(ring[0].y));
                for p in &ring[1..] {
                    content.line_to(x(p.x), y(p.y));
                }
                content.close_path();
                any = true;
            }
            if any {
                content.fill_nonzero();
            }
            content.end_marked_content();
            continue;
        }
        for line in layer.lines.iter() {
            let Some((first, rest)) = line.split_first() else {
                continue;
            };
            content.move_to(x(first.x), y(first.y));
            // A lone point is a zero-length segment: with round caps it is painted as a
            // dot (ISO 32000-1 §8.5.3.2), as the raster draws it.
            let rest = if rest.is_empty() { line } else { rest };
            for p in rest {
                content.line_to(x(p.x), y(p.y));
            }
            content.stroke();
        }
        content.end_marked_content();
    }
    content.finish().into_vec()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::drawing::{Drawing, Layer, Stroke};
    use crate::plane::{ImagePoint, PolylineSet};

    fn sheet() -> Sheet {
        let mut lines = PolylineSet::new();
        lines.push(&[ImagePoint::new(10.0, 20.0), ImagePoint::new(30.0, 0.0)]);
        lines.push(&[ImagePoint::new(5.0, 5.0)]);
        Sheet {
            drawing: Drawing {
                width: 100,
                height: 50,
                layers: vec![Layer {
                    filled: false,
                    text: None,
                    name: "wireframe".to_owned(),
                    stroke: Stroke {
                        colour: [255, 0, 0],
                        opacity: 0.5,
                        width_px: 1.0,
                    },
                    lines,
                }],
            },
            width_mm: 200.0,
            height_mm: 100.0,
            mm_per_px: 2.0,
        }
    }

    #[test]
    fn content_is_in_points_with_y_up() {
        let text = String::from_utf8(page_content(&sheet(), &[0.5], &["wireframe"])).unwrap();
        // (10, 20) px = (20, 40) mm from the top left = (20, 60) mm from the bottom left.
        let expected = [
            "1 J\n1 j",
            "/OC /L0 BDC",
            "/G0 gs\n1 0 0 RG\n5.669 w",
            "56.693 170.079 m\n170.079 283.465 l\nS",
            "28.346 255.118 m\n28.346 255.118 l\nS",
            "EMC",
        ];
        for piece in expected {
            assert!(text.contains(piece), "{piece:?} not in\n{text}");
        }
    }

    #[test]
    fn refuses_no_sheets_and_sheets_of_no_size() {
        assert!(matches!(write_pdf(&[], Vec::new()), Err(Error::Setting(_))));
        let mut bad = sheet();
        bad.height_mm = 0.0;
        assert!(matches!(
            write_pdf(&[sheet(), bad], Vec::new()),
            Err(Error::Setting(_))
        ));
    }
}
