//! The drawing: a display list of stroked polylines in image pixels, built from the site and
//! the overlays, that every output backend reads.

mod dash;
mod lettering;
mod overlay;
mod wireframe;

pub use dash::dashed;
pub use lettering::{letter, text_width, Align};
pub use overlay::{grid_and_horizon, GRID_STEP_DEG};
pub use wireframe::{wireframe, SkippedEdge, Wireframe};

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
    pub name: String,
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

/// The name of the wireframe layer of a site layer (`None`: items on no layer).
pub fn wireframe_layer_name(site_layer: Option<&str>) -> String {
    match site_layer {
        None => WIREFRAME.to_owned(),
        Some(name) => format!("{WIREFRAME}: {name}"),
    }
}

/// The layer of the parts of edges hidden behind faces.
pub const HIDDEN: &str = "hidden";

/// Layer names start with this for the site's edges.
pub const WIREFRAME: &str = "wireframe";

impl Drawing {
    /// The polylines of the site's edges (every wireframe layer), not the overlays.
    pub fn wireframe_lines(&self) -> usize {
        self.layers
            .iter()
            .filter(|l| l.name.starts_with(WIREFRAME))
            .map(|l| l.lines.len())
            .sum()
    }

    pub fn vertex_count(&self) -> usize {
        self.layers.iter().map(|l| l.lines.vertex_count()).sum()
    }
}
