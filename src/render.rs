//! The whole pipeline for one standpoint: site -> sphere curves -> image polylines ->
//! drawing -> canvas -> file, with the time each stage took.

use crate::aids::{self, AidSettings};
use crate::aids::{sun_layers, SunDrawing};
use crate::budget::{Budget, DEFAULT_TIME_LIMIT};
use crate::drawing::{
    apply_styles, hidden_dash_px, hidden_layer, page_style, wireframe, wireframe_layer_name,
    Distance, Drawing, Layer, SkippedEdge, Stroke, Wireframe,
};
use crate::error::{Error, Result};
use crate::output::{
    rasterize, rasterize_grey_png_within, write_atomically, GreyCanvas, MAX_PIXELS,
};
use crate::page::{label_frame, PageSettings, Sheet, HALO_MM};
use crate::plane::{area_outlines, Equirect, Flattener, PolylineSet, DEFAULT_TOLERANCE_PX};
use crate::scene::{HiddenEdges, LocalMoment, Site, Standpoint, StyleSheet};
use crate::sphere::ViewFrame;
use crate::sun::Sky;
use crate::sun::{seen_shade, with_shadows_and_hatching};
use crate::visibility::HiddenLines;
use nalgebra::Point3;
use std::io::Write;
use std::path::Path;
use std::time::{Duration, Instant};

/// What to draw and how large. Build with `Default` and change fields; [`draw`] validates.
#[derive(Clone, Debug, PartialEq)]
pub struct RenderSettings {
    /// Pixels across (twice the height for the whole sphere).
    pub width: u32,
    /// Pixels down.
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
    /// Pixels per inch: how styles given in millimetres become pixels.
    pub dpi: f64,
    /// Styles applied before the scene's own (a page's defaults).
    pub base_styles: Option<StyleSheet>,
    /// Styles applied after the scene's own (a style file from the command line).
    pub styles: Option<StyleSheet>,
    /// Draw edges nearer than 8 m heavier and those beyond 30 m lighter.
    pub weight_by_distance: bool,
    /// The drawing aids drawn with the overlays (see [`crate::aids`]).
    pub aids: AidSettings,
    /// The longest a render may take (see [`crate::budget`]); `None` for no limit.
    pub time_limit: Option<Duration>,
    /// The sun and the shadows, where they differ from the scene's `sun` block.
    pub sun: SunChoice,
}

/// The sun and shadows asked for on the command line; each `None` takes the scene's `sun`
/// block (or, without one, draws nothing of the sun).
#[derive(Clone, Debug, Default, PartialEq)]
pub struct SunChoice {
    /// The local date and time of the sun and shadows.
    pub moment: Option<LocalMoment>,
    /// The sun's mark and the day's path.
    pub path: Option<bool>,
    /// The paths of the solstices and the equinox.
    pub seasons: Option<bool>,
    /// The shadows' outlines.
    pub shadows: Option<bool>,
    /// Hatching of what is in shadow, lines this many metres apart.
    pub hatch_m: Option<f64>,
    /// A filled tone over the shade the eye sees (layer [`SHADOW_TONE`]).
    pub tone: Option<bool>,
}

impl SunChoice {
    /// What to draw of the sun for `site`: nothing without a date and time.
    /// Also whether to draw the shadows' outlines, the hatching's spacing if any, and
    /// whether to lay the tone.
    pub fn resolve(&self, site: &Site) -> Option<(SunDrawing, bool, Option<f64>, bool)> {
        let scene = site.sun.as_ref();
        let moment = self.moment.or_else(|| scene.map(|s| s.moment()))?;
        let pick = |asked: Option<bool>, of_scene: Option<bool>, default: bool| {
            asked.or(of_scene).unwrap_or(default)
        };
        let drawing = SunDrawing {
            moment: Some(moment),
            path: pick(self.path, scene.map(|s| s.path), true),
            seasons: pick(self.seasons, scene.map(|s| s.seasons), false),
        };
        let hatch = self
            .hatch_m
            .or_else(|| scene.and_then(|s| s.hatch.map(|h| h.0)));
        Some((
            drawing,
            pick(self.shadows, scene.map(|s| s.shadows), true),
            hatch,
            pick(self.tone, scene.map(|s| s.tone), false),
        ))
    }
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
            dpi: 300.0,
            base_styles: None,
            styles: None,
            weight_by_distance: false,
            aids: AidSettings::default(),
            time_limit: Some(DEFAULT_TIME_LIMIT),
            sun: SunChoice::default(),
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
        crate::plane::check_tolerance(self.tolerance_px)?;
        if !(self.line_weight_px.is_finite()
            && self.line_weight_px > 0.0
            && self.line_weight_px <= MAX_LINE_WEIGHT_PX)
        {
            return Err(Error::Setting(format!(
                "line weight {} px is outside (0, {MAX_LINE_WEIGHT_PX}] px",
                self.line_weight_px
            )));
        }
        self.aids.validate()
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
    /// Of which the calling thread spent writing the compressed bands out in order (set
    /// by [`render_png_to`]); the cores that draw the bands also filter and compress them.
    pub encode: Option<Duration>,
}

/// A finished drawing and what happened on the way.
#[derive(Clone, Debug)]
pub struct Render {
    /// The layers drawn.
    pub drawing: Drawing,
    /// Edges left out, with why (they are named as warnings).
    pub skipped: Vec<SkippedEdge>,
    /// Things said in words, not errors (the sun below the horizon: no shadows).
    pub notes: Vec<String>,
    /// How long each stage took.
    pub timings: Timings,
    /// Labels left out for want of room, for the run's summary.
    pub labels_left_out: usize,
    /// Characters drawn as the placeholder (no glyph), for a warning.
    pub unlettered: Vec<char>,
}

/// Layer names of the near and far wireframe when lines are weighed by distance, and how
/// much heavier or lighter they are drawn than the middle distance.
pub const NEAR_SUFFIX: &str = " (near)";
/// The suffix of the far wireframe layers' names.
pub const FAR_SUFFIX: &str = " (far)";
const NEAR_WEIGHT: f64 = 1.6;
const FAR_WEIGHT: f64 = 0.6;

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
    let hidden_lines = HiddenLines::new(site, settings.hidden);
    draw_with_hidden_lines(site, &hidden_lines, standpoint, settings, budget)
}

/// [`draw_within`] with the hidden-line set-up made once by the caller
/// (`HiddenLines::new(site, settings.hidden)`) and kept for many standpoints of one site:
/// its hierarchy of faces depends on the faces only.
pub fn draw_with_hidden_lines(
    site: &Site,
    hidden_lines: &HiddenLines,
    standpoint: &Standpoint,
    settings: &RenderSettings,
    budget: &Budget,
) -> Result<Render> {
    settings.validate()?;
    let started = Instant::now();
    let view = ViewFrame::new(standpoint);
    let map = Equirect::from_size_px(settings.width as f64, settings.height as f64);
    let mut flattener = Flattener::new(map, settings.tolerance_px);
    // The overlays under the drawing are found while the other cores flatten the edges
    // (below); they go under the sun's layers.
    let mut under_flattener = flattener.clone();
    let under = || match settings.overlays {
        true => aids::under(site, &view, &mut under_flattener, &settings.aids),
        false => Vec::new(),
    };
    let mut layers = Vec::new();
    let mut notes = Vec::new();
    let mut sun_labels = Vec::new();
    let shadowed;
    let site = match settings.sun.resolve(site) {
        None => site,
        Some((drawing, shadows, hatch, tone)) => {
            let sky = Sky::of_site(site)?;
            if settings.overlays {
                let text = settings.aids.text_height(&map);
                let (sun, hours) = sun_layers(&sky, &view, &mut flattener, &drawing, text)?;
                layers.extend(sun);
                sun_labels = hours;
            }
            let moment = drawing.moment.expect("resolved with a moment");
            let now = sky.at(&moment)?;
            if now.place.elevation_deg <= 0.0 {
                notes.push(format!(
                    "the sun is {:.1} degrees below the horizon at {} {} ({}): no shadows",
                    -now.place.elevation_deg,
                    moment.date,
                    moment.time.strftime("%H:%M"),
                    sky.clock.name()
                ));
                site
            } else {
                if tone {
                    let shade = seen_shade(site, &sky.direction(&now), &view.eye());
                    layers.push(tone_layer(&shade, &view, map, settings.tolerance_px));
                }
                if shadows || hatch.is_some() {
                    shadowed = with_shadows_and_hatching(site, &sky.direction(&now), hatch);
                    &shadowed
                } else {
                    site
                }
            }
        }
    };
    // Shadows and hatching add edges, never faces: the caller's hidden-line set-up
    // (the faces' hierarchy) holds for the shadowed site too.
    let (
        Wireframe {
            layers: site_layers,
            hidden,
            skipped,
        },
        under,
    ) = wireframe(
        site,
        &view,
        &flattener,
        hidden_lines,
        settings.weight_by_distance,
        budget,
        under,
    )?;
    layers.splice(0..0, under);
    let width = settings.line_weight_px;
    if hidden_lines.mode == HiddenEdges::Faint && !hidden.is_empty() {
        // Under the seen edges; dashed by the styles.
        layers.push(hidden_layer(hidden, width));
    }
    let stroke = Stroke::black(1.0, settings.line_weight_px);
    // Which layers hold near and far edges, by index: their weights change after styles.
    let mut by_distance: Vec<(usize, Distance)> = Vec::new();
    for (index, wire) in site_layers.into_iter().enumerate() {
        // The default layer is always there, even empty; named layers only when used.
        if index == 0 || !wire.lines.is_empty() {
            let name = wireframe_layer_name(wire.site_layer.as_deref());
            by_distance.push((layers.len(), wire.distance));
            layers.push(Layer {
                filled: false,
                text: None,
                name: match wire.distance {
                    Distance::Middle => name,
                    Distance::Near => format!("{name}{NEAR_SUFFIX}"),
                    Distance::Far => format!("{name}{FAR_SUFFIX}"),
                },
                stroke,
                lines: wire.lines,
            });
        }
    }
    let (mut labels_left_out, mut unlettered) = (0, Vec::new());
    if settings.overlays {
        let over = aids::over(
            site,
            &view,
            &mut flattener,
            &settings.aids,
            &layers,
            sun_labels,
        );
        labels_left_out = over.labels_left_out;
        unlettered = over.unlettered;
        layers.extend(over.layers);
    }
    let sheets: Vec<&StyleSheet> = [
        settings.base_styles.as_ref(),
        Some(&site.styles),
        settings.styles.as_ref(),
    ]
    .into_iter()
    .flatten()
    .collect();
    apply_styles(
        &mut layers,
        &sheets,
        settings.dpi / 25.4,
        hidden_dash_px(width),
    );
    // Nearer edges heavier, farther ones lighter, after the styles have set the weight.
    for (index, distance) in by_distance {
        layers[index].stroke.width_px *= match distance {
            Distance::Near => NEAR_WEIGHT,
            Distance::Middle => 1.0,
            Distance::Far => FAR_WEIGHT,
        };
    }
    let drawing = Drawing {
        width: settings.width,
        height: settings.height,
        layers,
    };
    let timings = Timings {
        flatten: started.elapsed(),
        hierarchy: hidden_lines.hierarchy_time,
        ..Timings::default()
    };
    Ok(Render {
        drawing,
        skipped,
        notes,
        timings,
        labels_left_out,
        unlettered,
    })
}

/// The layer of the filled tone over the shade the eye sees.
pub const SHADOW_TONE: &str = "shadow tone";

/// The seen shade's polygons as one filled layer: a quiet slate, light enough to draw
/// over and to print in black and white as a pale grey.
fn tone_layer(
    shade: &[Vec<Point3<f64>>],
    view: &ViewFrame,
    map: Equirect,
    tolerance_px: f64,
) -> Layer {
    // The polygons' outlines on all cores, in their order: the demo square's seen shade
    // on a summer afternoon makes 80,000 outlines, an eighth of the tone's instructions
    // (measured), all of them on this thread before.
    let outlines = crate::cores::in_order(shade.len(), |k| {
        area_outlines(view, &mut Flattener::new(map, tolerance_px), &shade[k])
    });
    let mut lines = PolylineSet::new();
    for ring in outlines.iter().flatten() {
        lines.push(ring);
    }
    Layer {
        filled: true,
        text: None,
        name: SHADOW_TONE.to_owned(),
        stroke: Stroke {
            colour: [112, 122, 150],
            opacity: 0.3,
            width_px: 0.0,
        },
        lines,
    }
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

/// Draws, rasterises and encodes a grey PNG into `out` (each band is compressed by the
/// core that drew it, so rasterising and encoding are timed together).
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

/// The drawing laid out on sheets of paper (`page`), or on one sheet of its own size,
/// edge to edge, at `dpi` (no page). With a page the panorama is rendered at the size the
/// page gives it, whatever `settings` say.
pub fn draw_sheets(
    site: &Site,
    standpoint: &Standpoint,
    settings: &RenderSettings,
    page: Option<&PageSettings>,
    dpi: f64,
) -> Result<(Vec<Sheet>, Render)> {
    let Some(page) = page else {
        let render = draw(site, standpoint, settings)?;
        let sheet = Sheet::full_bleed(render.drawing.clone(), dpi);
        return Ok((vec![sheet], render));
    };
    let placement = page.place()?;
    let (area, cuts_x, cuts_y) = label_frame(page, &placement);
    let mut aids = settings.aids.clone();
    aids.label_area = Some(area);
    aids.label_cuts = (cuts_x, cuts_y);
    aids.halo_px = aids.halo_px.or(Some(HALO_MM * page.px_per_mm()));
    let sized = RenderSettings {
        aids,
        width: placement.width,
        height: placement.height,
        dpi: page.dpi,
        base_styles: Some(page_style()),
        ..settings.clone()
    };
    let mut render = draw(site, standpoint, &sized)?;
    let (sheets, title_left_out) = page.lay_out(&render.drawing, &placement);
    render.labels_left_out += title_left_out;
    Ok((sheets, render))
}
