//! The whole pipeline for one standpoint: site -> sphere curves -> image polylines ->
//! drawing -> canvas -> file, with the time each stage took.

use crate::aids::{self, AidSettings};
use crate::budget::{Budget, DEFAULT_TIME_LIMIT};
use crate::drawing::{
    apply_styles, hidden_dash_px, hidden_layer, page_style, wireframe, wireframe_layer_name,
    Distance, Drawing, Layer, SkippedEdge, Stroke, Wireframe,
};
use crate::error::{Error, Result};
use crate::output::{
    rasterize, rasterize_grey_png_within, write_atomically, GreyCanvas, MAX_PIXELS,
};
use crate::page::{PageSettings, Sheet};
use crate::plane::{Equirect, Flattener, DEFAULT_TOLERANCE_PX};
use crate::scene::{HiddenEdges, Site, Standpoint, StyleSheet};
use crate::sphere::ViewFrame;
use crate::visibility::HiddenLines;
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
    /// Of which the calling thread spent encoding (set by [`render_png_to`]); the other
    /// cores rasterise later bands meanwhile.
    pub encode: Option<Duration>,
}

/// A finished drawing and what happened on the way.
#[derive(Clone, Debug)]
pub struct Render {
    /// The layers drawn.
    pub drawing: Drawing,
    /// Edges left out, with why (they are named as warnings).
    pub skipped: Vec<SkippedEdge>,
    /// How long each stage took.
    pub timings: Timings,
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
    let mut layers = Vec::new();
    if settings.overlays {
        layers.extend(aids::under(site, &view, &mut flattener, &settings.aids));
    }
    let Wireframe {
        layers: site_layers,
        hidden,
        skipped,
    } = wireframe(
        site,
        &view,
        &flattener,
        hidden_lines,
        settings.weight_by_distance,
        budget,
    )?;
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
    if settings.overlays {
        let over = aids::over(site, &view, &mut flattener, &settings.aids, &layers);
        layers.extend(over);
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
    let placement = page.place().map_err(Error::Setting)?;
    let sized = RenderSettings {
        width: placement.width,
        height: placement.height,
        dpi: page.dpi,
        base_styles: Some(page_style()),
        ..settings.clone()
    };
    let render = draw(site, standpoint, &sized)?;
    let sheets = page.lay_out(&render.drawing, &placement);
    Ok((sheets, render))
}

/// The title block's lines for a drawing of `site` from `standpoint`, dated `date`
/// (year, month, day).
pub fn title_lines(site: &Site, standpoint: &Standpoint, date: (i64, u32, u32)) -> Vec<String> {
    let (year, month, day) = date;
    vec![
        format!("{}: STANDPOINT {}", site.name, standpoint.name),
        format!(
            "HEADING {:.1}\u{b0}  PITCH {:.1}\u{b0}  ROLL {:.1}\u{b0}  EYE {:.2} M ABOVE GROUND AT {:.2} M, AT ({:.2}, {:.2})",
            standpoint.heading.to_degrees().rem_euclid(360.0),
            standpoint.pitch.to_degrees(),
            standpoint.roll.to_degrees(),
            standpoint.eye_height,
            standpoint.ground,
            standpoint.x,
            standpoint.y
        ),
        format!("DRAWN {year:04}-{month:02}-{day:02} WITH PANSITE"),
    ]
}

/// Today's date (UTC), or the date of `SOURCE_DATE_EPOCH` when that is set (the usual way
/// to ask for reproducible output).
pub fn today() -> (i64, u32, u32) {
    let seconds = std::env::var("SOURCE_DATE_EPOCH")
        .ok()
        .and_then(|s| s.trim().parse::<i64>().ok())
        .unwrap_or_else(|| {
            std::time::SystemTime::now()
                .duration_since(std::time::UNIX_EPOCH)
                .map_or(0, |d| d.as_secs() as i64)
        });
    civil_date(seconds.div_euclid(86_400))
}

/// The proleptic Gregorian date of a day counted from 1970-01-01 (Howard Hinnant,
/// "chrono-Compatible Low-Level Date Algorithms", `civil_from_days`).
pub fn civil_date(days: i64) -> (i64, u32, u32) {
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let day_of_era = z.rem_euclid(146_097);
    let year_of_era =
        (day_of_era - day_of_era / 1460 + day_of_era / 36_524 - day_of_era / 146_096) / 365;
    let day_of_year = day_of_era - (365 * year_of_era + year_of_era / 4 - year_of_era / 100);
    let month_index = (5 * day_of_year + 2) / 153;
    let day = (day_of_year - (153 * month_index + 2) / 5 + 1) as u32;
    let month = if month_index < 10 {
        month_index + 3
    } else {
        month_index - 9
    } as u32;
    let year = year_of_era + era * 400 + i64::from(month <= 2);
    (year, month, day)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn civil_dates_of_known_days() {
        // 1970-01-01 is day 0; 2000-03-01 is day 11017; 2026-12-02 is day 20789.
        assert_eq!(civil_date(0), (1970, 1, 1));
        assert_eq!(civil_date(11_017), (2000, 3, 1));
        assert_eq!(civil_date(20_789), (2026, 12, 2));
        assert_eq!(civil_date(-1), (1969, 12, 31));
    }
}
