//! A finished drawing (a plan, a panorama with its plan, a sheet of thumbnails) on paper
//! with the title block of the rendered pages across the foot of the printable area, the
//! drawing centred in the room left above it.

use super::layout::{cut_into_sheets, tiled_area};
use super::title::{title_block, title_layers, title_layout, TitleText, GAP_MM};
use super::{Paper, Sheet, Tiling};
use crate::drawing::Drawing;
use crate::error::Result;
use crate::plane::ImagePoint;

/// Paper for a finished drawing: the sheet, the margin kept clear round it, and the sheets
/// the layout is split over to print large (`None`: one), as for a panorama's page.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TitledPaper {
    /// The sheet, already turned as wanted.
    pub paper: Paper,
    /// The margin kept clear round each sheet, millimetres.
    pub margin_mm: f64,
    /// Several sheets to print and join, or `None` for one.
    pub tiles: Option<Tiling>,
    /// The layout's printable area (the sheets' printable areas, overlapped), millimetres.
    area_mm: (f64, f64),
}

impl TitledPaper {
    /// Checks the margin and the overlap as a panorama's page does.
    pub fn new(paper: Paper, margin_mm: f64, tiles: Option<Tiling>) -> Result<TitledPaper> {
        let area_mm = tiled_area(&paper, margin_mm, tiles)?;
        Ok(TitledPaper {
            paper,
            margin_mm,
            tiles,
            area_mm,
        })
    }

    /// The layout's printable area (the sheets' printable areas, overlapped), millimetres.
    pub fn area_mm(&self) -> (f64, f64) {
        self.area_mm
    }

    /// How many sheets across the layout is cut into.
    pub fn columns(&self) -> u32 {
        self.tiles.map_or(1, |t| t.columns)
    }

    /// The title block's width: the printable width of one sheet (on tiled sheets the
    /// bottom-left one, so that no tile edge crosses it).
    fn block_width_mm(&self) -> f64 {
        self.area_mm
            .0
            .min(self.paper.width_mm - 2.0 * self.margin_mm)
    }

    /// The width and height (millimetres) left for a drawing above a title block holding
    /// `fields` (and a scale bar of ten degrees when the drawing has one scale of degrees,
    /// `mm_per_degree`) and the gap under the drawing; `None` when nothing is left.
    pub fn room_above_title(
        &self,
        fields: &TitleText,
        mm_per_degree: Option<f64>,
    ) -> Option<(f64, f64)> {
        let block = title_layout(
            fields,
            self.block_width_mm(),
            mm_per_degree.map(|m| 10.0 * m),
        );
        let (width, height) = (self.area_mm.0, self.area_mm.1 - block.height_mm - GAP_MM);
        (width > 0.0 && height > 0.0).then_some((width, height))
    }

    /// Where the edges of the tiled sheets cross a drawing `content_px` (width, height) big
    /// at `px_per_mm`, laid out by [`TitledPaper::lay_out`] with `planned` fields: x and y
    /// in the drawing's pixels from its top-left corner (none on one sheet), the lines its
    /// label placer keeps words off.
    pub fn tile_edges(
        &self,
        content_px: (f64, f64),
        px_per_mm: f64,
        planned: &TitleText,
        mm_per_degree: Option<f64>,
    ) -> (Vec<f64>, Vec<f64>) {
        let (Some(t), Some((room_w, room_h))) =
            (self.tiles, self.room_above_title(planned, mm_per_degree))
        else {
            return (Vec::new(), Vec::new());
        };
        let m = self.margin_mm;
        let left = centred(m, room_w, content_px.0 / px_per_mm);
        let top = centred(m, room_h, content_px.1 / px_per_mm);
        let (pw, ph) = (
            self.paper.width_mm - 2.0 * m,
            self.paper.height_mm - 2.0 * m,
        );
        let edges = |count: u32, printable: f64, start: f64| -> Vec<f64> {
            (0..count)
                .flat_map(|k| {
                    let near = m + k as f64 * (printable - t.overlap_mm);
                    [near - start, near + printable - start].map(|mm| mm * px_per_mm)
                })
                .collect()
        };
        (edges(t.columns, pw, left), edges(t.rows, ph, top))
    }

    /// `content` laid out: a title block of `fields` along the foot of the printable area,
    /// as tall as one of `planned` fields (the room was measured with those, see
    /// [`TitledPaper::room_above_title`]), and the drawing centred in the room above it, by
    /// a translation only so printed lengths hold; cut into the sheets when tiled. With the
    /// number of the block's labels left out for want of room. `None` if the drawing does
    /// not fit that room.
    pub fn lay_out(
        &self,
        content: &Sheet,
        fields: &TitleText,
        planned: &TitleText,
        mm_per_degree: Option<f64>,
    ) -> Option<(Vec<Sheet>, usize)> {
        let (room_w, room_h) = self.room_above_title(planned, mm_per_degree)?;
        let fits = content.width_mm <= room_w + 1e-6 && content.height_mm <= room_h + 1e-6;
        if !fits {
            return None;
        }
        let margin_mm = self.margin_mm;
        let px = 1.0 / content.mm_per_px;
        let bar = mm_per_degree.map(|m| 10.0 * m);
        let block_w = self.block_width_mm();
        let planned_block = title_layout(planned, block_w, bar);
        let block = title_layout(fields, block_w, bar).with_height_of(&planned_block);
        let top_mm = margin_mm + self.area_mm.1 - block.height_mm;
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
        let (width_mm, height_mm) = (
            self.area_mm.0 + 2.0 * margin_mm,
            self.area_mm.1 + 2.0 * margin_mm,
        );
        let layout = Drawing {
            width: (width_mm * px).ceil() as u32,
            height: (height_mm * px).ceil() as u32,
            layers,
        };
        let sheets = match self.tiles {
            Some(tiling) => cut_into_sheets(&layout, &self.paper, margin_mm, px, tiling),
            None => vec![Sheet {
                drawing: layout,
                width_mm,
                height_mm,
                mm_per_px: content.mm_per_px,
            }],
        };
        Some((sheets, left_out))
    }
}

/// The offset (millimetres) that centres a length `content` in a room `room` long
/// starting at `start`: the room left over, halved, on each side.
pub fn centred(start: f64, room: f64, content: f64) -> f64 {
    start + (room - content) / 2.0
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
        let page = TitledPaper::new(a4, 10.0, None).unwrap();
        let (w, h) = page.room_above_title(&fields, None).unwrap();
        assert!((w - 277.0).abs() < 1e-12);
        let block = title_layout(&fields, 277.0, None);
        assert!((h - (190.0 - block.height_mm - GAP_MM)).abs() < 1e-12);
        assert!(TitledPaper::new(a4, 200.0, None).is_err());
    }

    #[test]
    fn tiled_paper_spreads_the_room_and_names_the_edges() {
        // Two A4 landscape sheets side by side, 10 mm margins and a 10 mm overlap: the
        // printable area is 2 x 277 - 10 = 544 mm wide; the block one sheet (277 mm) wide.
        let a4 = Paper {
            width_mm: 297.0,
            height_mm: 210.0,
        };
        let tiles = Tiling {
            columns: 2,
            rows: 1,
            overlap_mm: 10.0,
        };
        let page = TitledPaper::new(a4, 10.0, Some(tiles)).unwrap();
        assert_eq!(page.area_mm(), (544.0, 190.0));
        let fields = TitleText::from(vec!["HILL: PLAN".to_owned()]);
        let (w, h) = page.room_above_title(&fields, None).unwrap();
        let block = title_layout(&fields, 277.0, None);
        assert!((w - 544.0).abs() < 1e-12);
        assert!((h - (190.0 - block.height_mm - GAP_MM)).abs() < 1e-12);
        // A drawing 500 mm wide (at a pixel a millimetre) is centred: its left at 10 + 22 = 32 mm. The sheets'
        // printable areas run 10..287 and 277..554 mm on the layout.
        let (xs, ys) = page.tile_edges((500.0, 100.0), 1.0, &fields, None);
        let expected = [10.0 - 32.0, 287.0 - 32.0, 277.0 - 32.0, 554.0 - 32.0];
        for (x, e) in xs.iter().zip(expected) {
            assert!((x - e).abs() < 1e-9, "{xs:?}");
        }
        assert_eq!(ys.len(), 2);
        let untiled = TitledPaper::new(a4, 10.0, None).unwrap();
        assert_eq!(
            untiled.tile_edges((100.0, 100.0), 1.0, &fields, None),
            (vec![], vec![])
        );
        // An overlap of half a sheet is refused, as on a panorama's page.
        let wide = Tiling {
            overlap_mm: 100.0,
            ..tiles
        };
        assert!(TitledPaper::new(a4, 10.0, Some(wide)).is_err());
    }
}
