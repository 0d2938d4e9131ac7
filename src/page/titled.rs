//! A finished drawing (a plan, a panorama with its plan, a sheet of thumbnails) on paper
//! with the title block of the rendered pages across the foot of the printable area, the
//! drawing centred in the room left above it.

use super::title::{title_block, title_layers, title_layout, TitleText, GAP_MM};
use super::{Paper, Sheet};
use crate::drawing::Drawing;
use crate::plane::ImagePoint;

/// The width and height (millimetres) left for a drawing on `paper` inside `margin_mm`,
/// above a title block holding `fields` (and a scale bar of ten degrees when the drawing
/// has one scale of degrees, `mm_per_degree`) and the gap under the drawing; `None` when
/// nothing is left.
pub fn room_above_title(
    paper: &Paper,
    margin_mm: f64,
    fields: &TitleText,
    mm_per_degree: Option<f64>,
) -> Option<(f64, f64)> {
    let width = paper.width_mm - 2.0 * margin_mm;
    let block = title_layout(fields, width, mm_per_degree.map(|m| 10.0 * m));
    let height = paper.height_mm - 2.0 * margin_mm - block.height_mm - GAP_MM;
    (margin_mm >= 0.0 && width > 0.0 && height > 0.0).then_some((width, height))
}

/// The offset (millimetres) that centres a length `content` in a room `room` long
/// starting at `start`: the room left over, halved, on each side.
pub fn centred(start: f64, room: f64, content: f64) -> f64 {
    start + (room - content) / 2.0
}

/// `content` on `paper`: a title block of `fields` along the foot of the printable area,
/// as tall as one of `planned` fields (the room was measured with those, see
/// [`room_above_title`]), and the drawing centred in the room above it, by a translation
/// only so printed lengths hold; with the number of the block's labels left out for want
/// of room. `None` if the drawing does not fit that room.
pub fn on_titled_paper(
    content: &Sheet,
    paper: &Paper,
    margin_mm: f64,
    fields: &TitleText,
    planned: &TitleText,
    mm_per_degree: Option<f64>,
) -> Option<(Sheet, usize)> {
    let (room_w, room_h) = room_above_title(paper, margin_mm, planned, mm_per_degree)?;
    let fits = content.width_mm <= room_w + 1e-6 && content.height_mm <= room_h + 1e-6;
    if !fits {
        return None;
    }
    let px = 1.0 / content.mm_per_px;
    let bar = mm_per_degree.map(|m| 10.0 * m);
    let planned_block = title_layout(planned, room_w, bar);
    let block = title_layout(fields, room_w, bar).with_height_of(&planned_block);
    let top_mm = paper.height_mm - margin_mm - block.height_mm;
    let left = centred(margin_mm, room_w, content.width_mm) * px;
    let top = centred(margin_mm, room_h, content.height_mm) * px;
    let mut layers: Vec<_> = content
        .drawing
        .layers
        .iter()
        .map(|l| l.moved(left, top))
        .collect();
    let drawn = title_block(
        &block,
        ImagePoint::new(margin_mm * px, top_mm * px),
        px,
        mm_per_degree,
    );
    let left_out = drawn.left_out;
    layers.extend(title_layers(drawn, px));
    let sheet = Sheet {
        drawing: Drawing {
            width: (paper.width_mm * px).ceil() as u32,
            height: (paper.height_mm * px).ceil() as u32,
            layers,
        },
        width_mm: paper.width_mm,
        height_mm: paper.height_mm,
        mm_per_px: content.mm_per_px,
    };
    Some((sheet, left_out))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn centring_leaves_equal_margins() {
        // 100 mm of content in a room from 10 to 287 mm (A4 landscape's 297 mm less
        // 10 mm margins, ISO 216): 88.5 mm each side.
        let left = centred(10.0, 277.0, 100.0);
        assert!((left - 98.5).abs() < 1e-12);
        assert!(((left - 10.0) - (287.0 - (left + 100.0))).abs() < 1e-12);
    }

    #[test]
    fn the_room_shrinks_by_the_block() {
        let a4 = Paper {
            width_mm: 297.0,
            height_mm: 210.0,
        };
        let fields = TitleText::from(vec!["HILL: PLAN".to_owned(), "DRAWN 2026-01-01".to_owned()]);
        let (w, h) = room_above_title(&a4, 10.0, &fields, None).unwrap();
        assert!((w - 277.0).abs() < 1e-12);
        let block = title_layout(&fields, 277.0, None);
        assert!((h - (190.0 - block.height_mm - GAP_MM)).abs() < 1e-12);
        assert!(room_above_title(&a4, 200.0, &fields, None).is_none());
    }
}
