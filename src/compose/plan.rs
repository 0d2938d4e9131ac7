//! The plan map: the site seen from straight above, with each standpoint as a marker, its
//! heading (the direction at the panorama's centre) as an arrow, the seam (the direction
//! behind it, where the panorama's left and right borders meet) as a dashed line, a scale
//! bar and a north arrow.
//!
//! Every edge is projected straight down, so the outlines at ground and roof level are
//! drawn (walls' vertical edges vanish to points, openings fall on their wall lines).
//! North is up: site `x` (east) to the right, site `y` (north) up the page.

use crate::drawing::{
    dashed, label_layers, north_key, north_key_half_extent, Align, Drawing, Label, LabelInk,
    LabelKind, LabelPlacer, Layer, Spot, Stroke,
};
use crate::error::{Error, Result};
use crate::page::{Paper, Sheet};
use crate::plane::{ImagePoint, PolylineSet, Rect};
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
    /// How the scale is chosen.
    pub scale: PlanScale,
    /// Lines (x, y in the plan's pixels) that labels must not cross: the edges of the
    /// sheets a tiled page is cut into.
    pub label_cuts: (Vec<f64>, Vec<f64>),
}

/// How a plan's scale is chosen.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum PlanScale {
    /// The largest of [`STANDARD_SCALES`] that fits (on paper at the plan's dpi).
    Standard,
    /// 1 : N exactly, refused if the site does not fit.
    Exact(f64),
    /// As large as fits, whatever number that makes (for a screen, not for paper).
    Fill,
}

impl PlanSettings {
    /// The size of the printable area of `paper` less `margin_mm` on every side, at `dpi`.
    pub fn for_paper(paper: &Paper, margin_mm: f64, dpi: f64) -> PlanSettings {
        PlanSettings::for_room(
            paper.width_mm - 2.0 * margin_mm,
            paper.height_mm - 2.0 * margin_mm,
            dpi,
        )
    }

    /// The size of a room `width_mm` x `height_mm` on paper, at `dpi`.
    pub fn for_room(width_mm: f64, height_mm: f64, dpi: f64) -> PlanSettings {
        let px = dpi / 25.4;
        let side = |mm: f64| (mm * px).max(0.0).floor() as u32;
        PlanSettings {
            width: side(width_mm),
            height: side(height_mm),
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
            scale: PlanScale::Standard,
            label_cuts: (Vec::new(), Vec::new()),
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
    /// Labels left out for want of room.
    pub labels_left_out: usize,
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
            .map(|layer| layer.moved(shift, shift))
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
/// Lines from standpoints to names that stand off from them.
pub const LEADERS: &str = "leaders";

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
    let mm_per_px = 25.4 / settings.dpi;
    let room_mm = (w * mm_per_px, (h - footer) * mm_per_px);
    let fill = (w / width_m).min((h - footer) / height_m);
    let scale = match settings.scale {
        PlanScale::Fill => None,
        PlanScale::Standard => Some(
            largest_standard_scale((width_m, height_m), room_mm)
                .ok_or_else(|| too_small(None, (width_m, height_m), room_mm))?,
        ),
        PlanScale::Exact(n) => {
            if !(n.is_finite() && n > 0.0) {
                return Err(Error::Setting(format!(
                    "a scale of 1:{n} cannot be drawn: give 1:N with N above 0"
                )));
            }
            if !fits(n, (width_m, height_m), room_mm) {
                return Err(too_small(Some(n), (width_m, height_m), room_mm));
            }
            Some(n)
        }
    };
    // 1:N on paper: a metre is 1000 / N mm, or 1000 / N / mm_per_px pixels.
    let px_per_metre = scale.map_or(fill, |n| 1000.0 / n / mm_per_px);
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
        labels_left_out: 0,
    };
    let weight = settings.line_weight_px;
    // Lettering a fiftieth of the height, at most 3.5 mm on paper (a preferred height of
    // ISO 3098, from memory): a large sheet gets more room, not larger words.
    let letter_px = (0.018 * h).min(3.5 / mm_per_px).clamp(7.0, 40.0);
    let mut labels: Vec<Label> = Vec::new();

    let (mut edges, mut outlines) = (PolylineSet::new(), PolylineSet::new());
    for edge in &site.edges {
        let mut lines = PolylineSet::new();
        plan_curve(&plan, &edge.curve, settings.tolerance_px, &mut lines);
        let kind = site.items.get(edge.item.0 as usize).map(|i| i.kind);
        if kind.is_some_and(|k| BUILDINGS.contains(&k)) {
            outlines.append(&mut lines.clone());
        }
        edges.append(&mut lines);
    }
    labels.extend(building_labels(site, &plan, letter_px));

    // Standpoints: a circle, the heading arrow, the seam behind, the name.
    let arrow = 0.08 * w.min(h);
    let radius = (0.012 * w.min(h)).max(3.0);
    let (mut markers, mut headings, mut seams) =
        (PolylineSet::new(), PolylineSet::new(), PolylineSet::new());
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
        labels.push(standpoint_label(&s.name, at, radius, letter_px));
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
    labels.push(Label::fixed(
        format!("{} M", trim(plan.bar_metres)),
        ImagePoint::new(x0 + length + letter_px, y0),
        LabelKind::Title,
        letter_px,
        Align::Start,
    ));
    let scale_words = match scale {
        Some(n) => format!("SCALE 1:{} PRINTED AT {} DPI", trim(n), trim(settings.dpi)),
        None => format!(
            "1:{:.0} AT {} DPI (FITTED, NOT A STANDARD SCALE)",
            plan.scale_denominator(),
            trim(settings.dpi)
        ),
    };
    labels.push(Label::fixed(
        scale_words,
        ImagePoint::new(x0, y0 + 1.8 * letter_px),
        LabelKind::Title,
        letter_px,
        Align::Start,
    ));

    // The north key at the bottom right (true north beside plan north when the scene's
    // `location` turns it: the sun uses true north), as in the title block.
    let true_north_deg = site.location.as_ref().map_or(0.0, |l| l.north_deg);
    let radius = ((0.5 * footer - 1.35 * letter_px) / 1.5).max(1.2 * letter_px);
    let (half_w, half_h) = north_key_half_extent(radius, letter_px, true_north_deg);
    let key = north_key(
        ImagePoint::new(w - 0.04 * w - half_w, h - half_h - 0.1 * letter_px),
        radius,
        letter_px,
        true_north_deg,
    );
    let north = key.lines;
    labels.extend(key.labels);

    // Every word through one placer: no two overlap; standpoint names never cross the
    // buildings' outlines or the marks of the plan, and keep off other lines where they can.
    let mut placer = LabelPlacer::new(Rect::from_ltrb(0.0, 0.0, w, h), 0.2 * letter_px);
    placer.cut_along(&settings.label_cuts.0, &settings.label_cuts.1);
    let cell = (letter_px / 3.0).max(2.0);
    for lines in [&edges, &markers, &headings, &seams, &bar, &north] {
        placer.avoid_lines(lines, cell);
    }
    for lines in [&outlines, &markers, &headings, &bar, &north] {
        placer.keep_off(LabelKind::Standpoint, lines, cell);
    }
    placer.place(labels);
    let placed = placer.finish();
    plan.labels_left_out = placed.left_out;
    // A name that had to stand off from its marker gets a leader from the marker's ring to
    // the nearest point of its box.
    let mut leaders = PolylineSet::new();
    for label in placed
        .labels
        .iter()
        .filter(|l| l.kind == LabelKind::Standpoint)
    {
        let (a, b) = (label.anchor, label.bounds);
        let near = ImagePoint::new(a.x.clamp(b.left, b.right), a.y.clamp(b.top, b.bottom));
        let d = (near.x - a.x).hypot(near.y - a.y);
        if d > 2.0 * radius {
            let k = radius / d;
            leaders.push(&[
                ImagePoint::new(a.x + (near.x - a.x) * k, a.y + (near.y - a.y) * k),
                near,
            ]);
        }
    }
    let ink = LabelInk {
        stroke: Stroke::black(0.8, weight),
        halo_px: Some(0.15 * letter_px),
    };
    let mut layers = vec![
        layer(PLAN_EDGES, 1.0, weight, edges),
        layer(SEAMS, 0.7, weight, seams),
        layer(HEADINGS, 1.0, 1.5 * weight, headings),
        layer(STANDPOINTS, 1.0, 1.5 * weight, markers),
        layer(SCALE_BAR, 1.0, 1.5 * weight, bar),
        layer(NORTH, 1.0, 1.5 * weight, north),
        layer(LEADERS, 0.8, 0.75 * weight, leaders),
    ];
    layers.extend(label_layers(&placed.labels, ink));
    plan.drawing.layers = layers;
    Ok(plan)
}

/// The standard scales a plan is drawn at, as denominators N of 1 : N, largest scale
/// first: the reductions 1:2, 1:5, 1:10 and their multiples by ten recommended by
/// ISO 5455:1979 "Technical drawings -- Scales" (from memory), with 1:250, 1:1250 and
/// 1:2500, long used for site and survey plans (common practice; 1:1250 and 1:2500 are
/// the large-scale survey plans of the United Kingdom, from memory).
pub const STANDARD_SCALES: [f64; 20] = [
    1.0, 2.0, 5.0, 10.0, 20.0, 50.0, 100.0, 200.0, 250.0, 500.0, 1000.0, 1250.0, 2000.0, 2500.0,
    5000.0, 10_000.0, 20_000.0, 50_000.0, 100_000.0, 200_000.0,
];

/// Whether an extent of `extent_m` (width, height, metres) fits `room_mm` at 1 : `n`.
fn fits(n: f64, extent_m: (f64, f64), room_mm: (f64, f64)) -> bool {
    // A thousandth of a millimetre of slack for rounding.
    extent_m.0 * 1000.0 / n <= room_mm.0 + 1e-3 && extent_m.1 * 1000.0 / n <= room_mm.1 + 1e-3
}

/// The largest standard scale (the smallest N of [`STANDARD_SCALES`]) at which an extent
/// of `extent_m` metres fits `room_mm` millimetres; `None` if none does.
pub fn largest_standard_scale(extent_m: (f64, f64), room_mm: (f64, f64)) -> Option<f64> {
    STANDARD_SCALES
        .into_iter()
        .find(|&n| fits(n, extent_m, room_mm))
}

fn too_small(asked: Option<f64>, extent_m: (f64, f64), room_mm: (f64, f64)) -> Error {
    let hint = match largest_standard_scale(extent_m, room_mm) {
        Some(n) => format!("1:{} is the largest standard scale that fits", trim(n)),
        None => "no standard scale fits: give a larger size or paper".to_owned(),
    };
    let n = asked.unwrap_or(STANDARD_SCALES[STANDARD_SCALES.len() - 1]);
    Error::Setting(format!(
        "the plan does not fit at 1:{}: the site with its margins ({:.1} x {:.1} m) needs \
         {:.0} x {:.0} mm and the plan has {:.0} x {:.0} mm; {hint}",
        trim(n),
        extent_m.0,
        extent_m.1,
        extent_m.0 * 1000.0 / n,
        extent_m.1 * 1000.0 / n,
        room_mm.0,
        room_mm.1
    ))
}

/// The item kinds a plan names: those that are buildings or parts of one.
const BUILDINGS: [&str; 9] = [
    "block",
    "footprint",
    "tower",
    "dome",
    "room",
    "arcade",
    "arch",
    "vault",
    "cylinder",
];

/// A label for each labelled building, anchored at the middle of its plan (the box of its
/// edges), free to stand inside it or round it.
fn building_labels(site: &Site, plan: &Plan, letter_px: f64) -> Vec<Label> {
    let n = site.items.len();
    let mut boxes = vec![
        [
            f64::INFINITY,
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::NEG_INFINITY
        ];
        n
    ];
    for edge in &site.edges {
        let Some(b) = boxes.get_mut(edge.item.0 as usize) else {
            continue;
        };
        let ends = match edge.curve {
            SiteCurve::Segment { start, end } => [start, end],
            SiteCurve::Ellipse(ref arc) => {
                let r = arc.u.norm().max(arc.v.norm());
                [
                    arc.centre - nalgebra::Vector3::new(r, r, 0.0),
                    arc.centre + nalgebra::Vector3::new(r, r, 0.0),
                ]
            }
        };
        for p in ends {
            *b = [b[0].min(p.x), b[1].min(p.y), b[2].max(p.x), b[3].max(p.y)];
        }
    }
    let mut labels = Vec::new();
    for (item, b) in site.items.iter().zip(&boxes) {
        let Some(words) = item.label.as_deref() else {
            continue;
        };
        if !BUILDINGS.contains(&item.kind) || !b[0].is_finite() {
            continue;
        }
        let at = plan.to_px((b[0] + b[2]) / 2.0, (b[1] + b[3]) / 2.0);
        let h = 0.8 * letter_px;
        let mut spots = vec![
            Spot::new(0.0, 0.5 * h, Align::Middle),
            Spot::new(0.0, -0.9 * h, Align::Middle),
            Spot::new(0.0, 1.9 * h, Align::Middle),
        ];
        spots.extend(Label::around(words.to_uppercase(), at, LabelKind::Item, h).spots);
        labels.push(
            Label::fixed(words.to_uppercase(), at, LabelKind::Item, h, Align::Middle)
                .with_spots(spots),
        );
    }
    labels
}

/// A standpoint's name round its marker (of `radius` pixels), nearest first.
fn standpoint_label(name: &str, at: ImagePoint, radius: f64, h: f64) -> Label {
    let mut spots = Vec::new();
    for reach in [1.4, 2.6, 4.0, 6.0, 9.0, 13.0] {
        let d = radius * reach;
        spots.extend([
            Spot::new(d, -d, Align::Start),
            Spot::new(-d, -d, Align::End),
            Spot::new(d, d + h, Align::Start),
            Spot::new(-d, d + h, Align::End),
            Spot::new(d + 0.3 * h, 0.5 * h, Align::Start),
            Spot::new(-d - 0.3 * h, 0.5 * h, Align::End),
            Spot::new(0.0, -d - 0.2 * h, Align::Middle),
            Spot::new(0.0, d + 1.2 * h, Align::Middle),
        ]);
    }
    Label::fixed(
        name.to_uppercase(),
        at,
        LabelKind::Standpoint,
        h,
        Align::Start,
    )
    .with_spots(spots)
}

fn layer(name: &str, opacity: f64, width: f64, lines: PolylineSet) -> Layer {
    Layer {
        filled: false,
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
        SiteCurve::Ellipse(ref arc) => {
            // The plan of an ellipse is an ellipse (or a segment): chords of angle dt stray
            // at most r dt^2 / 8 from it, r the larger semi-axis in plan.
            let r = arc.u.xy().norm().max(arc.v.xy().norm()) * plan.px_per_metre;
            if r < 1e-9 {
                return;
            }
            let dt = (8.0 * tolerance / r).sqrt().min(std::f64::consts::PI / 8.0);
            let n = ((arc.sweep.abs() / dt).ceil() as usize).clamp(1, 100_000);
            let points: Vec<ImagePoint> = (0..=n)
                .map(|k| {
                    let p = arc.along(k as f64 / n as f64);
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
        layers.push(layer.moved(dx, 0.0));
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

    #[test]
    fn the_largest_standard_scale_that_fits() {
        // Worked by hand: 40 x 30 m on 277 x 190 mm (A4 landscape less 10 mm margins) is
        // 400 x 300 mm at 1:100 (too big), 200 x 150 mm at 1:200 (fits).
        assert_eq!(
            largest_standard_scale((40.0, 30.0), (277.0, 190.0)),
            Some(200.0)
        );
        // 60 x 30 m: 300 mm across at 1:200 is too wide; 240 x 120 mm at 1:250 fits.
        assert_eq!(
            largest_standard_scale((60.0, 30.0), (277.0, 190.0)),
            Some(250.0)
        );
        // 277 m across exactly fills 277 mm at 1:1000.
        assert_eq!(
            largest_standard_scale((277.0, 10.0), (277.0, 190.0)),
            Some(1000.0)
        );
        // 300 m: 1:1250 gives 240 mm.
        assert_eq!(
            largest_standard_scale((300.0, 10.0), (277.0, 190.0)),
            Some(1250.0)
        );
        assert_eq!(largest_standard_scale((1e9, 1.0), (277.0, 190.0)), None);
    }
}
