//! The plan map: the site seen from straight above, with each standpoint as a marker, its
//! heading (the direction at the panorama's centre) as an arrow, the seam (the direction
//! behind it, where the panorama's left and right borders meet) as a dashed line, a scale
//! bar and a north arrow.
//!
//! Every edge is projected straight down, so the outlines at ground and roof level are
//! drawn (walls' vertical edges vanish to points, openings fall on their wall lines).
//! North is up: site `x` (east) to the right, site `y` (north) up the page.

use crate::drawing::{dashed, letter, Align, Drawing, Layer, Stroke};
use crate::error::{Error, Result};
use crate::page::{Paper, Sheet};
use crate::plane::{ImagePoint, PolylineSet};
use crate::scene::{bounds, Site, SiteCurve, Standpoint};

/// The size of the plan and its paper resolution.
#[derive(Clone, Debug, PartialEq)]
pub struct PlanSettings {
    /// Pixels across.
    pub width: u32,
    /// Pixels down.
    pub height: u32,
    /// Pixels per inch: how big a pixel is on paper (SVG, PDF, PNG pHYs).
    pub dpi: f64,
    /// Width of the edges' lines, pixels.
    pub line_weight_px: f64,
    /// Largest distance between a true arc and its drawn chords, pixels.
    pub tolerance_px: f64,
}

impl PlanSettings {
    /// The size of the printable area of `paper` less `margin_mm` on every side, at `dpi`.
    pub fn for_paper(paper: &Paper, margin_mm: f64, dpi: f64) -> PlanSettings {
        let px = dpi / 25.4;
        let side = |mm: f64| ((mm - 2.0 * margin_mm) * px).max(0.0).floor() as u32;
        PlanSettings {
            width: side(paper.width_mm),
            height: side(paper.height_mm),
            dpi,
            ..PlanSettings::default()
        }
    }
}

impl Default for PlanSettings {
    fn default() -> Self {
        PlanSettings {
            width: 1600,
            height: 1200,
            dpi: 150.0,
            line_weight_px: 1.0,
            tolerance_px: 0.1,
        }
    }
}

/// A plan map and the numbers it was drawn with.
#[derive(Clone, Debug, PartialEq)]
pub struct Plan {
    /// The plan's layers.
    pub drawing: Drawing,
    /// Pixels per site metre.
    pub px_per_metre: f64,
    /// The site point at the drawing's top-left corner (x east, y north), metres.
    pub origin: (f64, f64),
    /// The scale bar's length, metres (a round number).
    pub bar_metres: f64,
    /// Pixels per inch on paper.
    pub dpi: f64,
}

impl Plan {
    /// The drawing position of a site plan position.
    pub fn to_px(&self, x: f64, y: f64) -> ImagePoint {
        ImagePoint::new(
            (x - self.origin.0) * self.px_per_metre,
            (self.origin.1 - y) * self.px_per_metre,
        )
    }

    /// The plan as a sheet at its resolution.
    pub fn sheet(&self) -> Sheet {
        Sheet::full_bleed(self.drawing.clone(), self.dpi)
    }

    /// The plan on a sheet of `paper`, `margin_mm` in from its top-left corner (draw it at
    /// the size of the printable area: [`PlanSettings::for_paper`]).
    pub fn on_paper(&self, paper: &Paper, margin_mm: f64) -> Sheet {
        let mm_per_px = 25.4 / self.dpi;
        let shift = margin_mm / mm_per_px;
        let layers = self
            .drawing
            .layers
            .iter()
            .map(|layer| {
                let mut lines = PolylineSet::new();
                for line in layer.lines.iter() {
                    let moved: Vec<ImagePoint> = line
                        .iter()
                        .map(|p| ImagePoint::new(p.x + shift, p.y + shift))
                        .collect();
                    lines.push(&moved);
                }
                Layer {
                    text: None,
                    name: layer.name.clone(),
                    stroke: layer.stroke,
                    lines,
                }
            })
            .collect();
        Sheet {
            drawing: Drawing {
                width: (paper.width_mm / mm_per_px).ceil() as u32,
                height: (paper.height_mm / mm_per_px).ceil() as u32,
                layers,
            },
            width_mm: paper.width_mm,
            height_mm: paper.height_mm,
            mm_per_px,
        }
    }

    /// The printed scale's denominator: 1 : N on paper at the plan's resolution.
    pub fn scale_denominator(&self) -> f64 {
        1000.0 / (self.px_per_metre * 25.4 / self.dpi)
    }
}

/// Layer names, for styles and for reading the vector outputs back.
pub const PLAN_EDGES: &str = "plan";
pub const STANDPOINTS: &str = "standpoints";
pub const HEADINGS: &str = "headings";
pub const SEAMS: &str = "seams";
pub const SCALE_BAR: &str = "scale bar";
pub const NORTH: &str = "north arrow";
pub const LABELS: &str = "plan labels";

/// The plan of `site` with `standpoints` marked (usually the site's own).
pub fn plan_map(site: &Site, standpoints: &[Standpoint], settings: &PlanSettings) -> Result<Plan> {
    let (w, h) = (settings.width as f64, settings.height as f64);
    if !(64.0..=16_384.0).contains(&w) || !(64.0..=16_384.0).contains(&h) {
        return Err(Error::ImageSize {
            width: settings.width as u64,
            height: settings.height as u64,
            reason: "a plan is from 64 to 16384 pixels a side".into(),
        });
    }
    if !(settings.dpi.is_finite() && settings.dpi > 0.0) {
        return Err(Error::Setting(format!(
            "dpi {} must be more than 0",
            settings.dpi
        )));
    }
    crate::plane::check_tolerance(settings.tolerance_px)?;
    // The extent: the site's and the standpoints', with a little room round it.
    let (mut lo, mut hi) = match bounds(site) {
        Some((lo, hi)) => ((lo.x, lo.y), (hi.x, hi.y)),
        None => (
            (f64::INFINITY, f64::INFINITY),
            (f64::NEG_INFINITY, f64::NEG_INFINITY),
        ),
    };
    for s in standpoints {
        lo = (lo.0.min(s.x), lo.1.min(s.y));
        hi = (hi.0.max(s.x), hi.1.max(s.y));
    }
    if !(lo.0.is_finite() && hi.0.is_finite()) {
        return Err(Error::Setting(
            "the scene has nothing to draw on a plan".into(),
        ));
    }
    let span = ((hi.0 - lo.0).max(hi.1 - lo.1)).max(1.0);
    // Margins: 6 % of the span round the site, and room at the bottom for the scale bar.
    let pad = 0.06 * span;
    let (width_m, height_m) = (hi.0 - lo.0 + 2.0 * pad, hi.1 - lo.1 + 2.0 * pad);
    let footer = 0.1 * h;
    let px_per_metre = (w / width_m).min((h - footer) / height_m);
    let centre = ((lo.0 + hi.0) / 2.0, (lo.1 + hi.1) / 2.0);
    let origin = (
        centre.0 - w / 2.0 / px_per_metre,
        centre.1 + (h - footer) / 2.0 / px_per_metre,
    );
    let mut plan = Plan {
        drawing: Drawing {
            width: settings.width,
            height: settings.height,
            layers: Vec::new(),
        },
        px_per_metre,
        origin,
        bar_metres: round_length(0.25 * w / px_per_metre),
        dpi: settings.dpi,
    };
    let weight = settings.line_weight_px;
    let letter_px = (0.018 * h).clamp(7.0, 40.0);

    let mut edges = PolylineSet::new();
    for edge in &site.edges {
        plan_curve(&plan, &edge.curve, settings.tolerance_px, &mut edges);
    }

    // Standpoints: a circle, the heading arrow, the seam behind, the name.
    let arrow = 0.08 * w.min(h);
    let radius = (0.012 * w.min(h)).max(3.0);
    let (mut markers, mut headings, mut seams, mut labels) = (
        PolylineSet::new(),
        PolylineSet::new(),
        PolylineSet::new(),
        PolylineSet::new(),
    );
    for s in standpoints {
        let at = plan.to_px(s.x, s.y);
        let circle: Vec<ImagePoint> = (0..=32)
            .map(|k| {
                let a = std::f64::consts::TAU * k as f64 / 32.0;
                ImagePoint::new(at.x + radius * a.cos(), at.y + radius * a.sin())
            })
            .collect();
        markers.push(&circle);
        // On the page, azimuth h points (sin h, -cos h): x right is east, y down is south.
        let (sin, cos) = s.heading.sin_cos();
        let tip = ImagePoint::new(at.x + arrow * sin, at.y - arrow * cos);
        headings.push(&[at, tip]);
        let head = 0.25 * arrow;
        for side in [-1.0, 1.0] {
            let a = s.heading + std::f64::consts::PI + side * 0.4;
            headings.push(&[
                tip,
                ImagePoint::new(tip.x + head * a.sin(), tip.y - head * a.cos()),
            ]);
        }
        let mut seam = PolylineSet::new();
        seam.push(&[at, ImagePoint::new(at.x - arrow * sin, at.y + arrow * cos)]);
        seams.append(&mut dashed(&seam, 3.0 * weight + 3.0, 2.0 * weight + 2.0));
        letter(
            &s.name,
            ImagePoint::new(at.x + 1.5 * radius, at.y - 1.5 * radius),
            letter_px,
            Align::Start,
            &mut labels,
        );
    }

    // Scale bar at the bottom left, ticked at its ends and middle.
    let mut bar = PolylineSet::new();
    let (x0, y0) = (0.04 * w, h - 0.45 * footer);
    let length = plan.bar_metres * px_per_metre;
    bar.push(&[ImagePoint::new(x0, y0), ImagePoint::new(x0 + length, y0)]);
    for k in 0..=2 {
        let x = x0 + length * k as f64 / 2.0;
        bar.push(&[
            ImagePoint::new(x, y0),
            ImagePoint::new(x, y0 - letter_px * 0.7),
        ]);
    }
    letter(
        &format!("{} M", trim(plan.bar_metres)),
        ImagePoint::new(x0 + length + letter_px, y0),
        letter_px,
        Align::Start,
        &mut labels,
    );
    letter(
        &format!("1:{:.0} AT {} DPI", plan.scale_denominator(), settings.dpi),
        ImagePoint::new(x0, y0 + 1.8 * letter_px),
        letter_px,
        Align::Start,
        &mut labels,
    );

    // North arrow at the bottom right: a shaft, a head and an N.
    let mut north = PolylineSet::new();
    let (nx, ny) = (w - 0.05 * w, h - 0.25 * footer);
    let shaft = 0.6 * footer;
    north.push(&[ImagePoint::new(nx, ny), ImagePoint::new(nx, ny - shaft)]);
    north.push(&[
        ImagePoint::new(nx - 0.2 * shaft, ny - 0.7 * shaft),
        ImagePoint::new(nx, ny - shaft),
        ImagePoint::new(nx + 0.2 * shaft, ny - 0.7 * shaft),
    ]);
    letter(
        "N",
        ImagePoint::new(nx - 0.4 * shaft, ny - 0.5 * shaft),
        letter_px,
        Align::End,
        &mut north,
    );

    // True north beside it when the scene's plan is turned from it: the sun uses true north.
    if let Some(bearing) = site
        .location
        .as_ref()
        .map(|l| l.north_deg.to_radians())
        .filter(|b| b.sin().abs() > 1e-9 || b.cos() < 0.0)
    {
        let (sx, sy) = (bearing.sin(), -bearing.cos());
        let (cx, cy) = (nx - 1.6 * shaft, ny - 0.5 * shaft);
        let at = |along: f64, side: f64| {
            ImagePoint::new(
                cx + shaft * (along * sx - side * sy),
                cy + shaft * (along * sy + side * sx),
            )
        };
        north.push(&[at(-0.5, 0.0), at(0.5, 0.0)]);
        north.push(&[at(0.2, -0.2), at(0.5, 0.0), at(0.2, 0.2)]);
        letter(
            "TRUE N",
            ImagePoint::new(cx - 0.7 * shaft, ny),
            0.7 * letter_px,
            Align::End,
            &mut north,
        );
    }

    plan.drawing.layers = vec![
        layer(PLAN_EDGES, 1.0, weight, edges),
        layer(SEAMS, 0.7, weight, seams),
        layer(HEADINGS, 1.0, 1.5 * weight, headings),
        layer(STANDPOINTS, 1.0, 1.5 * weight, markers),
        layer(SCALE_BAR, 1.0, 1.5 * weight, bar),
        layer(NORTH, 1.0, 1.5 * weight, north),
        layer(LABELS, 0.8, weight, labels),
    ];
    Ok(plan)
}

fn layer(name: &str, opacity: f64, width: f64, lines: PolylineSet) -> Layer {
    Layer {
        text: None,
        name: name.to_owned(),
        stroke: Stroke::black(opacity, width),
        lines,
    }
}

/// One edge seen from above; vertical segments (a point in plan) are left out.
fn plan_curve(plan: &Plan, curve: &SiteCurve, tolerance: f64, out: &mut PolylineSet) {
    match *curve {
        SiteCurve::Segment { start, end } => {
            let (a, b) = (plan.to_px(start.x, start.y), plan.to_px(end.x, end.y));
            if (a.x - b.x).hypot(a.y - b.y) > 1e-6 {
                out.push(&[a, b]);
            }
        }
        SiteCurve::Ellipse {
            centre,
            u,
            v,
            start,
            sweep,
        } => {
            // The plan of an ellipse is an ellipse (or a segment): chords of angle dt stray
            // at most r dt^2 / 8 from it, r the larger semi-axis in plan.
            let r = u.xy().norm().max(v.xy().norm()) * plan.px_per_metre;
            if r < 1e-9 {
                return;
            }
            let dt = (8.0 * tolerance / r).sqrt().min(std::f64::consts::PI / 8.0);
            let n = ((sweep.abs() / dt).ceil() as usize).clamp(1, 100_000);
            let points: Vec<ImagePoint> = (0..=n)
                .map(|k| {
                    let t = start + sweep * k as f64 / n as f64;
                    let p = centre + u * t.cos() + v * t.sin();
                    plan.to_px(p.x, p.y)
                })
                .collect();
            out.push(&points);
        }
    }
}

/// A round length near `metres`, not above it: 1, 2 or 5 times a power of ten.
fn round_length(metres: f64) -> f64 {
    let power = 10f64.powf(metres.max(1e-3).log10().floor());
    [5.0, 2.0, 1.0]
        .into_iter()
        .map(|k| k * power)
        .find(|&l| l <= metres)
        .unwrap_or(power)
}

fn trim(x: f64) -> String {
    let text = format!("{x:.3}");
    text.trim_end_matches('0').trim_end_matches('.').to_owned()
}

/// Two sheets side by side on one: `left` (usually a panorama) and `right` (a plan drawn
/// at the same resolution, so that its printed scale holds), with `gap_mm` between them;
/// the taller sets the height. Sheets of different resolutions are refused.
pub fn beside(left: &Sheet, right: &Sheet, gap_mm: f64) -> Result<Sheet> {
    let mm_per_px = left.mm_per_px;
    if (right.mm_per_px - mm_per_px).abs() > 1e-9 * mm_per_px || gap_mm.is_nan() || gap_mm < 0.0 {
        return Err(Error::Setting(
            "sheets placed side by side need the same resolution and a gap of 0 or more".into(),
        ));
    }
    let dx = left.drawing.width as f64 + (gap_mm / mm_per_px).round();
    let mut layers = left.drawing.layers.clone();
    for layer in &right.drawing.layers {
        let mut lines = PolylineSet::new();
        for line in layer.lines.iter() {
            let moved: Vec<ImagePoint> = line
                .iter()
                .map(|p| ImagePoint::new(dx + p.x, p.y))
                .collect();
            lines.push(&moved);
        }
        layers.push(Layer {
            text: None,
            name: layer.name.clone(),
            stroke: layer.stroke,
            lines,
        });
    }
    let width = dx as u32 + right.drawing.width;
    let height = left.drawing.height.max(right.drawing.height);
    Ok(Sheet {
        drawing: Drawing {
            width,
            height,
            layers,
        },
        width_mm: width as f64 * mm_per_px,
        height_mm: height as f64 * mm_per_px,
        mm_per_px,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn round_lengths() {
        assert_eq!(round_length(37.0), 20.0);
        assert_eq!(round_length(7.5), 5.0);
        assert_eq!(round_length(1.0), 1.0);
        assert_eq!(round_length(0.3), 0.2);
    }
}
