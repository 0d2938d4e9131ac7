//! Laying the panorama out on paper: centred at 2:1 (or the proportion of the chosen band
//! of elevations) in the printable area, a title block under it, and the whole split over
//! several sheets when asked.

use super::clip::{clip_and_move, Rect};
use super::title::{title_block, title_layers, title_layout, TitleLayout, TitleText, GAP_MM};
use super::{Paper, Sheet};
use crate::drawing::{
    label_layers, Align, Drawing, Label, LabelInk, LabelKind, LabelPlacer, Layer, LayerText, Stroke,
};
use crate::error::{Error, Result};
use crate::plane::{ImagePoint, PolylineSet};

/// How the panorama goes on paper.
#[derive(Clone, Debug, PartialEq)]
pub struct PageSettings {
    /// The sheet, already turned as wanted.
    pub paper: Paper,
    /// The margin kept clear round the sheet, millimetres.
    pub margin_mm: f64,
    /// Pixels per inch of the raster output; also the precision of the vector outputs.
    pub dpi: f64,
    /// The elevations shown, lowest and highest, degrees: (-90, 90) for the whole sphere.
    pub band_deg: (f64, f64),
    /// The lines of the title block (scene, standpoint, ...); the scale is added to them.
    /// `None`: no title block.
    pub title: Option<TitleText>,
    /// Several sheets to print and join, or `None` for one.
    pub tiles: Option<Tiling>,
}

/// A layout split over `columns` x `rows` sheets of the paper, overlapping by
/// `overlap_mm` so that they can be trimmed and joined.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Tiling {
    /// Sheets across.
    pub columns: u32,
    /// Sheets down.
    pub rows: u32,
    /// How far neighbouring sheets overlap, millimetres.
    pub overlap_mm: f64,
}

/// Where the panorama lands: the size to render it at (the whole sphere, `width` x
/// `height` pixels at the page's resolution), the rows of it shown, and its top-left
/// corner on the whole layout, in layout pixels.
#[derive(Clone, Debug, PartialEq)]
pub struct Placement {
    /// Pixels across the whole sphere at the page's resolution.
    pub width: u32,
    /// Pixels down the whole sphere.
    pub height: u32,
    /// The first row of the band shown.
    pub band_top_px: f64,
    /// The row after the band's last.
    pub band_bottom_px: f64,
    /// The panorama's left edge on the layout, pixels.
    pub left_px: f64,
    /// The band's top edge on the layout, pixels.
    pub top_px: f64,
    /// The scale: millimetres of paper per degree of angle.
    pub mm_per_degree: f64,
    /// The whole layout (all sheets together), millimetres.
    pub layout_width_mm: f64,
    /// The whole layout's height, millimetres.
    pub layout_height_mm: f64,
    /// The title block's rows and size, if there is one, and its top-left corner
    /// (layout millimetres).
    pub title: Option<(TitleLayout, f64, f64)>,
}

/// Cap height of the sheet marks' lettering (tiled sheets), millimetres.
const LETTER_MM: f64 = 2.5;
/// Width of a label's white halo each side of its strokes, millimetres.
pub const HALO_MM: f64 = 0.3;

impl PageSettings {
    /// Pixels per millimetre of paper.
    pub fn px_per_mm(&self) -> f64 {
        self.dpi / 25.4
    }

    /// Checks the settings and works out where the panorama goes.
    pub fn place(&self) -> Result<Placement> {
        let (low, high) = self.band_deg;
        if !(low.is_finite() && high.is_finite() && -90.0 <= low && low < high && high <= 90.0) {
            return Err(Error::Setting(format!(
                "expected a band of elevations from low to high within -90..90 degrees, found {low}..{high}"
            )));
        }
        if !(self.dpi.is_finite() && (10.0..=2400.0).contains(&self.dpi)) {
            return Err(Error::Setting(format!(
                "expected a resolution from 10 to 2400 dpi, found {}",
                self.dpi
            )));
        }
        let (area_w, area_h) = tiled_area(&self.paper, self.margin_mm, self.tiles)?;
        let printable_w = self.paper.width_mm - 2.0 * self.margin_mm;
        let printable_h = self.paper.height_mm - 2.0 * self.margin_mm;
        let overlap = self.tiles.map_or(0.0, |t| t.overlap_mm);
        // The title block spans the printable width of one sheet (on tiled sheets, the
        // bottom-left one, so no tile edge crosses it), at the bottom of the area.
        let block_w = area_w.min(printable_w);
        let layout = self.title.as_ref().map(|fields| {
            let mut all = fields.clone();
            all.fields.push(scale_line(0.0).replace('.', "0."));
            title_layout(&all, block_w, Some(area_w / 36.0))
        });
        let title = layout.as_ref().map_or(0.0, |l| l.height_mm + GAP_MM);
        if title > printable_h - overlap {
            return Err(Error::Setting(
                "the title block leaves no room for the panorama".to_owned(),
            ));
        }
        let pano_h_room = area_h - title;
        if pano_h_room <= 0.0 {
            return Err(Error::Setting(
                "the title block leaves no room for the panorama".to_owned(),
            ));
        }
        let span = high - low;
        let mm_per_degree = (area_w / 360.0).min(pano_h_room / span);
        let px_per_mm = self.px_per_mm();
        let width = (360.0 * mm_per_degree * px_per_mm).round().max(2.0) as u32;
        let height = (width as f64 / 2.0).round() as u32;
        let band_top_px = (90.0 - high) / 180.0 * height as f64;
        let band_bottom_px = (90.0 - low) / 180.0 * height as f64;
        let pano_w_mm = width as f64 / px_per_mm;
        let pano_h_mm = (band_bottom_px - band_top_px) / px_per_mm;
        let left_mm = self.margin_mm + (area_w - pano_w_mm) / 2.0;
        let top_mm = self.margin_mm + (pano_h_room - pano_h_mm) / 2.0;
        Ok(Placement {
            width,
            height,
            band_top_px,
            band_bottom_px,
            left_px: left_mm * px_per_mm,
            top_px: top_mm * px_per_mm,
            mm_per_degree: pano_w_mm / 360.0,
            layout_width_mm: area_w + 2.0 * self.margin_mm,
            layout_height_mm: area_h + 2.0 * self.margin_mm,
            title: layout.map(|l| {
                let top = self.margin_mm + area_h - l.height_mm;
                (l, self.margin_mm, top)
            }),
        })
    }

    /// Lays the panorama's drawing (the whole sphere, rendered at the placement's size) out
    /// on the sheets: its band, a frame round it, the title block, and on tiled sheets
    /// crop marks and a label. Also the number of the title block's labels left out for
    /// want of room, for the run's count.
    pub fn lay_out(&self, panorama: &Drawing, placement: &Placement) -> (Vec<Sheet>, usize) {
        let px = self.px_per_mm();
        let window = Rect {
            left: 0.0,
            top: placement.band_top_px,
            right: placement.width as f64,
            bottom: placement.band_bottom_px,
        };
        let (dx, dy) = (placement.left_px, placement.top_px - placement.band_top_px);
        let mut layers = clip_layers(&panorama.layers, &window, dx, dy);
        let frame = Rect {
            left: placement.left_px,
            top: placement.top_px,
            right: placement.left_px + placement.width as f64,
            bottom: placement.top_px + (placement.band_bottom_px - placement.band_top_px),
        };
        let mut frame_lines = PolylineSet::new();
        frame_lines.push(&rectangle(&frame));
        layers.push(Layer {
            filled: false,
            text: None,
            name: "frame".to_owned(),
            stroke: Stroke::black(0.7, (0.25 * px).max(1.0)),
            lines: frame_lines,
        });
        let mut left_out = 0;
        if let (Some(fields), Some((plan, left_mm, top_mm))) = (&self.title, &placement.title) {
            let mut all = fields.clone();
            all.fields.push(scale_line(placement.mm_per_degree));
            let plan = title_layout(&all, plan.width_mm, Some(10.0 * placement.mm_per_degree))
                .with_height_of(plan);
            let block = title_block(
                &plan,
                ImagePoint::new(left_mm * px, top_mm * px),
                px,
                Some(placement.mm_per_degree),
            );
            left_out = block.left_out;
            layers.extend(title_layers(block, px));
        }
        let layout = Drawing {
            width: (placement.layout_width_mm * px).ceil() as u32,
            height: (placement.layout_height_mm * px).ceil() as u32,
            layers,
        };
        let sheets = match self.tiles {
            None => vec![Sheet {
                drawing: layout,
                width_mm: self.paper.width_mm,
                height_mm: self.paper.height_mm,
                mm_per_px: 1.0 / px,
            }],
            Some(tiling) => cut_into_sheets(&layout, &self.paper, self.margin_mm, px, tiling),
        };
        (sheets, left_out)
    }
}

/// The printable area of a layout on `paper` kept `margin_mm` clear of its edges, spread
/// over the sheets of `tiles` (overlapped), millimetres; an error for margins that leave
/// nothing or an overlap of more than half a sheet.
pub(super) fn tiled_area(
    paper: &Paper,
    margin_mm: f64,
    tiles: Option<Tiling>,
) -> Result<(f64, f64)> {
    let (columns, rows, overlap) = match tiles {
        Some(t) => (t.columns.max(1) as f64, t.rows.max(1) as f64, t.overlap_mm),
        None => (1.0, 1.0, 0.0),
    };
    let printable_w = paper.width_mm - 2.0 * margin_mm;
    let printable_h = paper.height_mm - 2.0 * margin_mm;
    let margin_ok = margin_mm.is_finite() && margin_mm >= 0.0;
    if !margin_ok || printable_w <= 0.0 || printable_h <= 0.0 {
        return Err(Error::Setting(format!(
            "margins of {} mm leave nothing of a {} x {} mm sheet",
            margin_mm, paper.width_mm, paper.height_mm
        )));
    }
    if overlap.is_nan() || overlap < 0.0 || overlap >= printable_w.min(printable_h) / 2.0 {
        return Err(Error::Setting(format!(
            "an overlap of {overlap} mm is more than half a sheet"
        )));
    }
    // The layout's printable area: the sheets' printable areas, overlapped.
    let area_w = columns * printable_w - (columns - 1.0) * overlap;
    let area_h = rows * printable_h - (rows - 1.0) * overlap;
    Ok((area_w, area_h))
}

/// Cuts a layout (`px` pixels a millimetre, kept `margin_mm` clear of the edges of each
/// sheet of `paper`) into sheets: each shows its part of the layout's printable area in its
/// own printable area, with crop marks at the corners of that area and a label.
pub(super) fn cut_into_sheets(
    layout: &Drawing,
    paper: &Paper,
    margin_mm: f64,
    px: f64,
    tiling: Tiling,
) -> Vec<Sheet> {
    let margin = margin_mm * px;
    let (printable_w, printable_h) = (
        paper.width_mm * px - 2.0 * margin,
        paper.height_mm * px - 2.0 * margin,
    );
    let overlap = tiling.overlap_mm * px;
    let total = tiling.columns * tiling.rows;
    let mut sheets = Vec::new();
    for row in 0..tiling.rows {
        for column in 0..tiling.columns {
            // This sheet's printable area, in layout pixels.
            let x0 = margin + column as f64 * (printable_w - overlap);
            let y0 = margin + row as f64 * (printable_h - overlap);
            let part = Rect {
                left: x0,
                top: y0,
                right: x0 + printable_w,
                bottom: y0 + printable_h,
            };
            let (dx, dy) = (margin - x0, margin - y0);
            let mut layers = clip_layers(&layout.layers, &part, dx, dy);
            let mut marks = PolylineSet::new();
            let reach = (margin * 0.8).min(8.0 * px);
            for (x, y, sx, sy) in [
                (margin, margin, -1.0, -1.0),
                (margin + printable_w, margin, 1.0, -1.0),
                (margin, margin + printable_h, -1.0, 1.0),
                (margin + printable_w, margin + printable_h, 1.0, 1.0),
            ] {
                // Crop marks in the margin, in line with the edges of the printable
                // area, that meet there: cut along them to trim the sheet.
                marks.push(&[
                    ImagePoint::new(x, y + sy * 1.0),
                    ImagePoint::new(x, y + sy * reach),
                ]);
                marks.push(&[
                    ImagePoint::new(x + sx * 1.0, y),
                    ImagePoint::new(x + sx * reach, y),
                ]);
            }
            // Registration targets in the middle of each margin: a ring and a cross, so
            // that neighbouring sheets can be lined up by eye through their overlap.
            let ring = (margin * 0.25).min(3.0 * px);
            for (x, y) in [
                (margin + printable_w / 2.0, margin / 2.0),
                (
                    margin + printable_w / 2.0,
                    margin + printable_h + margin / 2.0,
                ),
                (margin / 2.0, margin + printable_h / 2.0),
                (
                    margin + printable_w + margin / 2.0,
                    margin + printable_h / 2.0,
                ),
            ] {
                let circle: Vec<ImagePoint> = (0..=32)
                    .map(|k| {
                        let a = std::f64::consts::TAU * k as f64 / 32.0;
                        ImagePoint::new(x + ring * a.cos(), y + ring * a.sin())
                    })
                    .collect();
                marks.push(&circle);
                marks.push(&[
                    ImagePoint::new(x - 1.5 * ring, y),
                    ImagePoint::new(x + 1.5 * ring, y),
                ]);
                marks.push(&[
                    ImagePoint::new(x, y - 1.5 * ring),
                    ImagePoint::new(x, y + 1.5 * ring),
                ]);
            }
            // Short enough to stay left of the registration target in the margin.
            let label = format!(
                "ROW {}/{}, COLUMN {}/{} ({total}), OVERLAP {} MM",
                row + 1,
                tiling.rows,
                column + 1,
                tiling.columns,
                tiling.overlap_mm
            );
            let height = (LETTER_MM * px).min(margin * 0.4);
            let mut placer = LabelPlacer::new(
                Rect::from_ltrb(
                    0.0,
                    margin + printable_h,
                    margin + printable_w / 2.0 - 2.0 * ring,
                    margin + printable_h + margin,
                ),
                0.0,
            );
            placer.place(vec![Label::fixed(
                label,
                ImagePoint::new(
                    margin + reach.max(height),
                    margin + printable_h + margin * 0.6,
                ),
                LabelKind::Title,
                height,
                Align::Start,
            )]);
            let ink = LabelInk {
                stroke: Stroke::black(1.0, (0.2 * px).max(1.0)),
                halo_px: None,
            };
            let sheet_labels = label_layers(&placer.finish().labels, ink);
            layers.push(Layer {
                filled: false,
                text: None,
                name: "sheet marks".to_owned(),
                stroke: Stroke::black(1.0, (0.2 * px).max(1.0)),
                lines: marks,
            });
            layers.extend(sheet_labels);
            sheets.push(Sheet {
                drawing: Drawing {
                    width: (paper.width_mm * px).ceil() as u32,
                    height: (paper.height_mm * px).ceil() as u32,
                    layers,
                },
                width_mm: paper.width_mm,
                height_mm: paper.height_mm,
                mm_per_px: 1.0 / px,
            });
        }
    }
    sheets
}

/// The closed outlines of areas cut to `rect` (each stays closed) and moved by `(dx, dy)`.
fn clip_areas(rings: &PolylineSet, rect: &Rect, dx: f64, dy: f64) -> PolylineSet {
    let mut out = PolylineSet::new();
    for ring in rings.iter() {
        let clipped = rect.clip_polygon(ring);
        if clipped.len() >= 3 {
            let moved: Vec<ImagePoint> = clipped
                .iter()
                .map(|p| ImagePoint::new(p.x + dx, p.y + dy))
                .collect();
            out.push(&moved);
        }
    }
    out
}

/// Every layer cut to `rect` and moved by `(dx, dy)`, keeping its name and stroke. A label
/// is kept whole or left out: never shown cut, where it could read as another word.
fn clip_layers(layers: &[Layer], rect: &Rect, dx: f64, dy: f64) -> Vec<Layer> {
    layers
        .iter()
        .filter(|layer| {
            layer.text.is_none() || layer.lines.points().iter().all(|p| rect.contains(*p))
        })
        .map(|layer| Layer {
            filled: layer.filled,
            text: layer.text.as_ref().map(|t| LayerText {
                at: ImagePoint::new(t.at.x + dx, t.at.y + dy),
                ..t.clone()
            }),
            name: layer.name.clone(),
            stroke: layer.stroke,
            lines: if layer.filled {
                clip_areas(&layer.lines, rect, dx, dy)
            } else {
                clip_and_move(&layer.lines, rect, dx, dy)
            },
        })
        .collect()
}

/// The scale written in the title block.
fn scale_line(mm_per_degree: f64) -> String {
    format!(
        "SCALE 1\u{b0} = {:.3} MM; 10\u{b0} = {:.2} MM",
        mm_per_degree,
        10.0 * mm_per_degree
    )
}

/// The label area and the cut lines for the panorama's labels on this page, in the
/// panorama's pixels: the band shown, and the edges of the tiled sheets.
pub fn label_frame(page: &PageSettings, placement: &Placement) -> (Rect, Vec<f64>, Vec<f64>) {
    let px = page.px_per_mm();
    let area = Rect::from_ltrb(
        0.0,
        placement.band_top_px,
        placement.width as f64,
        placement.band_bottom_px,
    );
    let (mut xs, mut ys) = (Vec::new(), Vec::new());
    if let Some(t) = page.tiles {
        let margin = page.margin_mm * px;
        let pw = (page.paper.width_mm - 2.0 * page.margin_mm) * px;
        let ph = (page.paper.height_mm - 2.0 * page.margin_mm) * px;
        let overlap = t.overlap_mm * px;
        let (dx, dy) = (placement.left_px, placement.top_px - placement.band_top_px);
        for c in 0..t.columns {
            let x0 = margin + c as f64 * (pw - overlap);
            xs.extend([x0 - dx, x0 + pw - dx]);
        }
        for r in 0..t.rows {
            let y0 = margin + r as f64 * (ph - overlap);
            ys.extend([y0 - dy, y0 + ph - dy]);
        }
    }
    (area, xs, ys)
}

/// The corners of a rectangle, closed.
fn rectangle(r: &Rect) -> [ImagePoint; 5] {
    [
        ImagePoint::new(r.left, r.top),
        ImagePoint::new(r.right, r.top),
        ImagePoint::new(r.right, r.bottom),
        ImagePoint::new(r.left, r.bottom),
        ImagePoint::new(r.left, r.top),
    ]
}

#[cfg(test)]
mod tests {
    use super::*;

    fn a3_landscape() -> PageSettings {
        PageSettings {
            paper: Paper::named("A3").unwrap().landscape(),
            margin_mm: 10.0,
            dpi: 300.0,
            band_deg: (-90.0, 90.0),
            title: Some(vec!["TEST".to_owned()].into()),
            tiles: None,
        }
    }

    #[test]
    fn the_panorama_is_two_to_one_and_centred_across() {
        let settings = a3_landscape();
        let placement = settings.place().unwrap();
        // 400 mm of printable width sets the scale: 400 / 360 mm a degree.
        assert!((placement.mm_per_degree - 400.0 / 360.0).abs() < 0.01);
        assert_eq!(placement.height * 2, placement.width);
        let px = settings.px_per_mm();
        let right_gap = 420.0 * px - placement.left_px - placement.width as f64;
        assert!((placement.left_px - right_gap).abs() < 1.0);
    }

    #[test]
    fn a_band_of_elevations_fills_more_of_the_sheet() {
        let mut settings = a3_landscape();
        settings.paper = Paper::named("A4").unwrap().landscape();
        settings.title = None;
        let whole = settings.place().unwrap();
        settings.band_deg = (-30.0, 60.0);
        let band = settings.place().unwrap();
        assert!(band.mm_per_degree >= whole.mm_per_degree);
        let rows = band.band_bottom_px - band.band_top_px;
        assert!(
            (rows - band.height as f64 / 2.0).abs() < 1.0,
            "90 of 180 degrees"
        );
    }

    #[test]
    fn bad_settings_are_refused_in_words() {
        let mut settings = a3_landscape();
        settings.band_deg = (40.0, 10.0);
        assert!(settings.place().unwrap_err().to_string().contains("band"));
        let mut settings = a3_landscape();
        settings.margin_mm = 200.0;
        assert!(settings
            .place()
            .unwrap_err()
            .to_string()
            .contains("margins"));
    }
}
