//! Pages: the panorama laid out on paper of a chosen size, with a title block, or split
//! over several sheets; what the vector and raster backends write.

mod clip;
mod layout;
mod paper;

pub use clip::{clip_and_move, clip_segment, Rect};
pub use layout::{PageSettings, Placement, Tiling};
pub use paper::{preset_names, Paper, MAX_SIDE_MM, MM_PER_INCH};

use crate::drawing::Drawing;

/// A drawing on a sheet of paper. The drawing's coordinates are pixels (x right, y down,
/// from the sheet's top-left corner), each `mm_per_px` millimetres on paper; the sheet is
/// `width_mm` x `height_mm` (its drawing is that size in pixels, rounded up).
#[derive(Clone, Debug, PartialEq)]
pub struct Sheet {
    pub drawing: Drawing,
    pub width_mm: f64,
    pub height_mm: f64,
    pub mm_per_px: f64,
}

impl Sheet {
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
