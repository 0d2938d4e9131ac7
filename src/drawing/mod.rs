//! The drawing: a display list of stroked polylines in image pixels, built from the site and
//! the overlays, that every output backend reads.

mod overlay;
mod wireframe;

pub use overlay::{grid_and_horizon, GRID_STEP_DEG};
pub use wireframe::{wireframe, SkippedEdge};

use crate::plane::PolylineSet;

/// How a layer's lines are drawn: darkness on white paper and width, in image pixels.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Stroke {
    /// 0 = invisible, 1 = black.
    pub ink: f64,
    pub width_px: f64,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Layer {
    pub name: &'static str,
    pub stroke: Stroke,
    pub lines: PolylineSet,
}

/// Layers in painting order over a `width` x `height` pixel panorama.
#[derive(Clone, Debug, PartialEq)]
pub struct Drawing {
    pub width: u32,
    pub height: u32,
    pub layers: Vec<Layer>,
}

impl Drawing {
    pub fn vertex_count(&self) -> usize {
        self.layers.iter().map(|l| l.lines.vertex_count()).sum()
    }
}
