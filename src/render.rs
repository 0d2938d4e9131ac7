//! The whole pipeline for one standpoint: site -> sphere curves -> image polylines ->
//! drawing -> canvas -> file, with the time each stage took.

use crate::budget::{Budget, DEFAULT_TIME_LIMIT};
use crate::drawing::{
    dashed, grid_and_horizon, wireframe, wireframe_layer_name, Drawing, Layer, SkippedEdge, Stroke,
    Wireframe, GRID_STEP_DEG, HIDDEN,
};
use crate::error::{Error, Result};
use crate::output::{
    rasterize, rasterize_grey_png_within, write_atomically, GreyCanvas, MAX_PIXELS,
};
use crate::plane::{Equirect, Flattener, DEFAULT_TOLERANCE_PX};
use crate::scene::{HiddenEdges, Site, Standpoint};
use crate::sphere::ViewFrame;
use std::io::Write;
use std::path::Path;
use std::time::{Duration, Instant};

/// What to draw and how large. Build with `Default` and change fields; [`draw`] validates.
#[derive(Clone, Debug, PartialEq)]
pub struct RenderSettings {
    pub width: u32,
    pub height: u32,
    /// See [`crate::plane`]: the largest distance between true curve and drawn polyline.
    pub tolerance_px: f64,
    /// Width of the wireframe's lines, pixels.
    pub line_weight_px: f64,
    /// The reference grid and the horizon under the wireframe. Off gives the bare wireframe,
    /// full-bleed on white, for exact checks.
    pub overlays: bool,
    /// How edges hidden behind faces are drawn; `None` takes the scene's choice, or faint.
    pub hidden: Option<HiddenEdges>,
    /// The longest a render may take (see [`crate::budget`]); `None` for no limit.
    pub time_limit: Option<Duration>,
}

impl Default for RenderSettings {
    fn default() -> Self {
        RenderSettings {
            width: 4096,
            height: 2048,
            tolerance_px: DEFAULT_TOLERANCE_PX,
            line_weight_px: 1.5,
            overlays: true,
            hidden: None,
            time_limit: Some(DEFAULT_TIME_LIMIT),
        }
    }
}

impl RenderSettings {
    /// Refuses settings that cannot be drawn, before anything is allocated.
    pub fn validate(&self) -> Result<()> {
        let (w, h) = (self.width as u64, self.height as u64);
        if w == 0 || h == 0 {
            return Err(Error::ImageSize {
                width: w,
                height: h,
                reason: "empty".into(),
            });
        }
        if w > MAX_SIDE_PX || h > MAX_SIDE_PX {
            return Err(Error::ImageSize {
                width: w,
                height: h,
                reason: format!("wider or taller than the limit of {MAX_SIDE_PX} pixels"),
            });
        }
        if w < h / 2 || w > 8 * h {
            return Err(Error::ImageSize {
                width: w,
                height: h,
                reason: "too far from the 2:1 shape of a panorama (width from half the height to 8 times it)".into(),
            });
        }
        if w * h > MAX_PIXELS {
            return Err(Error::ImageSize {
                width: w,
                height: h,
                reason: format!(
                    "{:.0} megapixels, above the limit of {} megapixels",
                    (w * h) as f64 / 1e6,
                    MAX_PIXELS / 1_000_000
                ),
            });
        }
        if !(self.tolerance_px.is_finite() && (0.001..=100.0).contains(&self.tolerance_px)) {
            return Err(Error::Setting(format!(
                "tolerance {} px is outside 0.001 to 100 px",
                self.tolerance_px
            )));
        }
        if !(self.line_weight_px.is_finite()
            && self.line_weight_px > 0.0
            && self.line_weight_px <= MAX_LINE_WEIGHT_PX)
        {
            return Err(Error::Setting(format!(
                "line weight {} px is outside (0, {MAX_LINE_WEIGHT_PX}] px",
                self.line_weight_px
            )));
        }
        Ok(())
    }
}

/// The widest stroke: the rasteriser's work grows with the square of the width.
pub const MAX_LINE_WEIGHT_PX: f64 = 64.0;

/// The longest side of an image, pixels.
pub const MAX_SIDE_PX: u64 = 1 << 17;

/// Stage times, for `--timings`.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Timings {
    /// Everything [`draw`] does: the hierarchy of faces, visibility and flattening.
    pub flatten: Duration,
    /// Of which building the hierarchy of faces for hidden lines (zero without); the
    /// visibility of each edge is found in the same pass that flattens it, so the two are
    /// timed together.
    pub hierarchy: Duration,
    /// Rasterising alone (set by [`raster`]).
    pub raster: Option<Duration>,
    /// Rasterising and encoding, which overlap (set by [`render_png_to`]).
    pub raster_and_encode: Option<Duration>,
    /// Of which the calling thread spent encoding (set by [`render_png_to`]); the other
    /// cores rasterise later bands meanwhile.
    pub encode: Option<Duration>,
}

/// A finished drawing and what happened on the way.
#[derive(Clone, Debug)]
pub struct Render {
    pub drawing: Drawing,
    pub skipped: Vec<SkippedEdge>,
    pub timings: Timings,
}

/// The grid's strokes: light enough to draw over, the horizon a little stronger.
const GRID_STROKE: Stroke = Stroke {
    ink: 0.22,
    width_px: 1.0,
};
const HORIZON_STROKE: Stroke = Stroke {
    ink: 0.5,
    width_px: 1.25,
};

/// Builds the drawing of `site` seen from `standpoint`.
pub fn draw(site: &Site, standpoint: &Standpoint, settings: &RenderSettings) -> Result<Render> {
    draw_within(
        site,
        standpoint,
        settings,
        &Budget::new(settings.time_limit),
    )
}

/// [`draw`] within a budget of time and drawn vertices.
pub fn draw_within(
    site: &Site,
    standpoint: &Standpoint,
    settings: &RenderSettings,
    budget: &Budget,
) -> Result<Render> {
    settings.validate()?;
    let started = Instant::now();
    let view = ViewFrame::new(standpoint);
    let map = Equirect::from_size_px(settings.width as f64, settings.height as f64);
    let mut flattener = Flattener::new(map, settings.tolerance_px);
    let mut layers = Vec::new();
    if settings.overlays {
        let (grid, horizon) = grid_and_horizon(&view, &mut flattener, GRID_STEP_DEG);
        layers.push(Layer {
            name: "grid".to_owned(),
            stroke: GRID_STROKE,
            lines: grid,
        });
        layers.push(Layer {
            name: "horizon".to_owned(),
            stroke: HORIZON_STROKE,
            lines: horizon,
        });
    }
    let hidden_edges = settings.hidden.or(site.hidden_edges).unwrap_or_default();
    let Wireframe {
        layers: site_layers,
        hidden,
        skipped,
        hierarchy,
    } = wireframe(site, &view, &flattener, hidden_edges, budget)?;
    if hidden_edges == HiddenEdges::Faint && !hidden.is_empty() {
        // Under the seen edges, lighter, thinner and dashed.
        let width = settings.line_weight_px;
        layers.push(Layer {
            name: HIDDEN.to_owned(),
            stroke: Stroke {
                ink: 0.4,
                width_px: (0.75 * width).max(0.75),
            },
            lines: dashed(&hidden, 3.0 * width + 3.0, 2.0 * width + 2.0),
        });
    }
    let stroke = Stroke {
        ink: 1.0,
        width_px: settings.line_weight_px,
    };
    for (index, (name, lines)) in site_layers.into_iter().enumerate() {
        // The default layer is always there, even empty; named layers only when used.
        if index == 0 || !lines.is_empty() {
            layers.push(Layer {
                name: wireframe_layer_name(name.as_deref()),
                stroke,
                lines,
            });
        }
    }
    let drawing = Drawing {
        width: settings.width,
        height: settings.height,
        layers,
    };
    let timings = Timings {
        flatten: started.elapsed(),
        hierarchy,
        ..Timings::default()
    };
    Ok(Render {
        drawing,
        skipped,
        timings,
    })
}

/// Rasterises a drawing, timing it into `render`.
pub fn raster(render: &mut Render) -> GreyCanvas {
    let started = Instant::now();
    let canvas = rasterize(&render.drawing);
    render.timings.raster = Some(started.elapsed());
    canvas
}

/// Draws, rasterises and writes a grey PNG atomically: on any error no file is left at
/// `path` and an earlier file there is untouched.
pub fn render_png(
    site: &Site,
    standpoint: &Standpoint,
    settings: &RenderSettings,
    path: &Path,
) -> Result<Render> {
    let mut render = None;
    write_atomically(path, |file| {
        render = Some(render_png_to(site, standpoint, settings, file)?);
        Ok(())
    })?;
    Ok(render.expect("set by the successful write"))
}

/// Draws, rasterises and encodes a grey PNG into `out` (rasterising and encoding overlap,
/// so they are timed together).
pub fn render_png_to(
    site: &Site,
    standpoint: &Standpoint,
    settings: &RenderSettings,
    out: impl Write,
) -> Result<Render> {
    let budget = Budget::new(settings.time_limit);
    let mut render = draw_within(site, standpoint, settings, &budget)?;
    let started = Instant::now();
    let encode = rasterize_grey_png_within(&render.drawing, out, &budget)?;
    render.timings.raster_and_encode = Some(started.elapsed());
    render.timings.encode = Some(encode);
    Ok(render)
}
