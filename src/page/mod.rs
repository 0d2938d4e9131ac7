//! Pages: the panorama laid out on paper of a chosen size, with a title block, or split
//! over several sheets; what the vector and raster backends write.
//!
//! ## Pages and styles (design notes)
//!
//! `render --page PAPER` lays the panorama out on paper; without it the output is the panorama
//! alone at `--size` pixels (and in SVG and PDF each pixel is 25.4 / `--dpi` mm).
//!
//! - **Layout** (`page/layout.rs`). The printable area is the paper less `--margin` on each
//!   side; a title block of 16 mm (and a 3 mm gap) is kept at the bottom unless `--no-title`.
//!   The scale, millimetres per degree, is the largest that fits 360 degrees across and the
//!   band of elevations (`--band LOW,HIGH`, the whole sphere by default) down. The panorama is
//!   rendered for the whole sphere at exactly the page's resolution (its width in pixels is
//!   360 degrees times the scale times dpi / 25.4, rounded), so placing it on the page is a
//!   translation by whole pixels' worth of millimetres, never a resampling; the rows outside
//!   the band are clipped away. The title block holds the scene and standpoint, heading,
//!   pitch, roll, eye height, position, date (`SOURCE_DATE_EPOCH` when set, for reproducible
//!   output) and the scale, and a scale bar ten degrees long ticked every degree.
//! - **Tiling** (`--tiles CxR`, `--overlap MM`). The layout's printable area becomes C x R
//!   sheets' printable areas less the overlaps; each sheet shows its part, with corner crop
//!   marks in the margin along the edges of its printable area, registration targets (ring and
//!   cross) in the middle of each margin, and a label (row, column, count, overlap). PDF puts the sheets on pages of one file; PNG and SVG write one file a
//!   sheet, `NAME-rRcC.EXT`.
//! - **Memory.** Page PNGs are rasterised in bands like panoramas, so memory stays bounded
//!   whatever the sheet (the 500-megapixel cap still refuses absurd sizes before anything is
//!   allocated): an A1 sheet at 300 dpi is 70 megapixels, drawn a few bands at a time.
//! - **Colour.** Grey PNG by default (a monochrome underlay in a quarter of the bytes);
//!   `--colour` writes RGBA, each channel inked like the grey canvas (the darkest wins), so
//!   colour is as independent of drawing order as grey; grey output takes each stroke's
//!   darkness (opacity times one less the colour's luminance).
//! - **Styles** (`drawing/style.rs`). Applied in order: a page's default (black 0.25 mm seen
//!   edges, light dashed hidden edges, non-photo blue grid), the scene's `styles`, the
//!   `--style` file. Keys are layer names; `wireframe` styles every wireframe layer, and a
//!   site layer's name styles its own. Dashes are cut into the polylines (`drawing/dash.rs`)
//!   so every output shows the same dashes.
//! - **Weight by distance** (`--weigh-by-distance`, a common drawing convention): each site
//!   layer's edges are split by their nearest point's distance from the eye into near (under
//!   8 m, drawn 1.6 times heavier), middle and far (over 30 m, 0.6 times), as layers
//!   `wireframe (near)` and `wireframe (far)` that take the wireframe's styles first.
//! - **Metadata.** PNG pHYs in pixels per metre from `--dpi`; a full panorama (no page) gets
//!   an XMP packet with the GPano properties (projection, full and cropped sizes, heading,
//!   pitch, roll) in an iTXt chunk, so panorama viewers open it as a sphere.

mod clip;
mod layout;
mod paper;
mod title;
mod titled;

pub use clip::{clip_and_move, clip_segment, Rect};
pub use layout::{label_frame, PageSettings, Placement, Tiling, HALO_MM};
pub use paper::{preset_names, Paper, MAX_SIDE_MM, MM_PER_INCH};
pub use title::{
    civil_date, plan_title_lines, sheet_title_lines, title_block, title_layers, title_layout,
    title_lines, today, wrap, TitleBlock, TitleLayout, TitleText, GAP_MM as TITLE_GAP_MM, LEGEND,
    LETTER_MM, MIN_LETTER_MM,
};
pub use titled::{centred, TitledPaper};

use crate::drawing::Drawing;

/// A drawing on a sheet of paper. The drawing's coordinates are pixels (x right, y down,
/// from the sheet's top-left corner), each `mm_per_px` millimetres on paper; the sheet is
/// `width_mm` x `height_mm` (its drawing is that size in pixels, rounded up).
#[derive(Clone, Debug, PartialEq)]
pub struct Sheet {
    /// What is drawn on the sheet, in its own pixels.
    pub drawing: Drawing,
    /// The sheet's width, millimetres.
    pub width_mm: f64,
    /// The sheet's height, millimetres.
    pub height_mm: f64,
    /// How big a pixel is on paper, millimetres.
    pub mm_per_px: f64,
}

impl Sheet {
    /// The same drawing on a sheet of `paper`, `margin_mm` in from its top-left corner (a
    /// translation only, so printed lengths hold); `None` if it does not fit inside the
    /// margins.
    pub fn on_paper(&self, paper: &Paper, margin_mm: f64) -> Option<Sheet> {
        let fits = self.width_mm <= paper.width_mm - 2.0 * margin_mm + 1e-6
            && self.height_mm <= paper.height_mm - 2.0 * margin_mm + 1e-6;
        if !(fits && margin_mm >= 0.0) {
            return None;
        }
        let shift = margin_mm / self.mm_per_px;
        Some(Sheet {
            drawing: Drawing {
                width: (paper.width_mm / self.mm_per_px).ceil() as u32,
                height: (paper.height_mm / self.mm_per_px).ceil() as u32,
                layers: self
                    .drawing
                    .layers
                    .iter()
                    .map(|l| l.moved(shift, shift))
                    .collect(),
            },
            width_mm: paper.width_mm,
            height_mm: paper.height_mm,
            mm_per_px: self.mm_per_px,
        })
    }

    /// A sheet holding the panorama alone, edge to edge, at `dpi` pixels per inch.
    pub fn full_bleed(drawing: Drawing, dpi: f64) -> Sheet {
        let mm_per_px = 25.4 / dpi;
        Sheet {
            width_mm: drawing.width as f64 * mm_per_px,
            height_mm: drawing.height as f64 * mm_per_px,
            mm_per_px,
            drawing,
        }
    }
}
