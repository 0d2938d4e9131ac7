//! The label placer: every word written on a sheet (grid values, compass points, vanishing
//! points, pole ticks, item labels, captions, the title block) is a [`Label`] handed to one
//! [`LabelPlacer`], which knows every label placed before and the lines already drawn.
//!
//! A label is data: its text, the point it belongs to (its anchor), its kind (which sets
//! its priority and its layer) and the places beside the anchor where it may stand
//! ([`Spot`]s, in order of preference). The placer puts labels in order of their kind's
//! priority, each at the first of its spots that
//! - lies wholly inside the placer's area (the frame of the panorama or its band, the
//!   sheet's printable area), so no label is cut by a frame, a band edge or the seam;
//! - crosses none of the cut lines (the edges of tiled sheets);
//! - overlaps no label placed before it and no blocked box (a scale bar, a title block);
//!
//! and, for labels that should keep clear of the drawing (items, captions), crosses the
//! fewest drawn lines among those spots. A label with no such spot is left out and counted
//! ([`Placed::left_out`]), never drawn over another. Because a value's spots all stand
//! beside its own anchor (an azimuth to the right or the left of its meridian, never
//! across another), a value is shown whole and beside the line it names, or not at all.
//!
//! [`label_layers`] turns the placed labels into layers: one layer per label, carrying its
//! text (an SVG writes it as `data-text` and a `<title>`), and under them, when asked, a
//! white halo: the labels' strokes drawn wider in white, which knocks out the lines behind
//! the letters.

use super::lettering::{letter, stroke_width, text_extent, text_width, Align};
use super::{Layer, LayerText, Stroke};
use crate::plane::{ImagePoint, PolylineSet, Rect};

/// What a label names; the order is the order of placing (earlier kinds win a place).
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum LabelKind {
    /// The title block's fields and the sheet's own marks.
    Title,
    /// The heading written at the top of the centre column.
    Heading,
    /// Compass points on the horizon.
    Compass,
    /// Values of the grid: azimuths and elevations.
    GridValue,
    /// Bearings (and climbs) of vanishing points.
    VanishingPoint,
    /// The sun's hours along its path.
    SunHour,
    /// Heights on a measuring pole, its name, the eye height.
    Pole,
    /// Multiples of a divided segment.
    Division,
    /// Standpoints on a plan.
    Standpoint,
    /// Items of the site.
    Item,
    /// Captions of thumbnails and of plans.
    Caption,
}

impl LabelKind {
    /// The layer a label of this kind is drawn on (styles address it by this name).
    pub fn layer_name(self) -> &'static str {
        match self {
            LabelKind::Title => "title",
            LabelKind::Heading | LabelKind::Compass | LabelKind::GridValue => "grid labels",
            LabelKind::VanishingPoint => "vanishing point labels",
            LabelKind::SunHour => "sun hour labels",
            LabelKind::Pole => "pole labels",
            LabelKind::Division => "division labels",
            LabelKind::Standpoint => "standpoint labels",
            LabelKind::Item => "item labels",
            LabelKind::Caption => "captions",
        }
    }

    /// Whether the placer looks for the spot crossing the fewest lines, rather than the
    /// first free spot (values belong on their line; names may move to clear space).
    fn avoids_lines(self) -> bool {
        matches!(
            self,
            LabelKind::Item | LabelKind::Caption | LabelKind::Pole | LabelKind::Standpoint
        )
    }
}

/// Where a label may stand: its baseline point relative to the anchor, and how the text is
/// aligned on it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Spot {
    /// Pixels right of the anchor.
    pub dx: f64,
    /// Pixels below the anchor.
    pub dy: f64,
    /// How the text is aligned on that point.
    pub align: Align,
}

impl Spot {
    /// A spot `dx`, `dy` pixels from the anchor, aligned.
    pub const fn new(dx: f64, dy: f64, align: Align) -> Spot {
        Spot { dx, dy, align }
    }
}

/// A label to place: the words, the point they belong to, what they name, the cap height
/// (pixels) and the spots they may take, best first.
#[derive(Clone, Debug, PartialEq)]
pub struct Label {
    /// The words.
    pub text: String,
    /// The point they belong to, in drawing pixels.
    pub anchor: ImagePoint,
    /// What they name, which sets their priority and layer.
    pub kind: LabelKind,
    /// Cap height, pixels.
    pub height: f64,
    /// The places they may stand, best first.
    pub spots: Vec<Spot>,
}

impl Label {
    /// A label that stands in one place only: its baseline through `anchor`, aligned.
    pub fn fixed(
        text: impl Into<String>,
        anchor: ImagePoint,
        kind: LabelKind,
        height: f64,
        align: Align,
    ) -> Label {
        Label {
            text: text.into(),
            anchor,
            kind,
            height,
            spots: vec![Spot::new(0.0, 0.0, align)],
        }
    }

    /// A label for a point mark: above right, above left, below right, below left, above,
    /// below, then the same a little further out.
    pub fn around(
        text: impl Into<String>,
        anchor: ImagePoint,
        kind: LabelKind,
        height: f64,
    ) -> Label {
        let mut spots = Vec::new();
        for reach in [0.6, 1.5] {
            let d = reach * height;
            spots.extend([
                Spot::new(d, -d, Align::Start),
                Spot::new(-d, -d, Align::End),
                Spot::new(d, d + height, Align::Start),
                Spot::new(-d, d + height, Align::End),
                Spot::new(0.0, -d - 0.4 * height, Align::Middle),
                Spot::new(0.0, d + 1.4 * height, Align::Middle),
            ]);
        }
        Label {
            text: text.into(),
            anchor,
            kind,
            height,
            spots,
        }
    }

    /// The same label with these spots instead.
    pub fn with_spots(mut self, spots: Vec<Spot>) -> Label {
        self.spots = spots;
        self
    }

    /// The box of the label's ink at `spot`: the strokes' centre lines grown by half a
    /// stroke width.
    pub fn bounds_at(&self, spot: &Spot) -> Rect {
        let width = text_width(&self.text, self.height);
        let (up, down) = text_extent(&self.text, self.height);
        let x = self.anchor.x + spot.dx;
        let y = self.anchor.y + spot.dy;
        let left = match spot.align {
            Align::Start => x,
            Align::Middle => x - width / 2.0,
            Align::End => x - width,
        };
        Rect::from_ltrb(left, y - up, left + width, y + down).grown(stroke_width(self.height) / 2.0)
    }
}

/// A label where the placer put it.
#[derive(Clone, Debug, PartialEq)]
pub struct PlacedLabel {
    /// The words.
    pub text: String,
    /// What they name.
    pub kind: LabelKind,
    /// The point they belong to.
    pub anchor: ImagePoint,
    /// Its baseline point and alignment.
    pub at: ImagePoint,
    /// How the text is aligned on its baseline point.
    pub align: Align,
    /// Cap height, pixels.
    pub height: f64,
    /// The box of its ink.
    pub bounds: Rect,
}

/// What the placer did: the labels it placed, and how many it left out for want of room.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Placed {
    /// The labels placed, in the order they were placed.
    pub labels: Vec<PlacedLabel>,
    /// How many were left out for want of room.
    pub left_out: usize,
}

/// Places labels without overlap inside an area; see the module's docs.
#[derive(Clone, Debug)]
pub struct LabelPlacer {
    area: Rect,
    /// Clear space kept round every label, pixels (room for the halo).
    clearance: f64,
    cuts_x: Vec<f64>,
    cuts_y: Vec<f64>,
    blocked: Vec<Rect>,
    lines: LineCells,
    off_lines: Vec<LabelKind>,
    forbidden: LineCells,
    placed: Placed,
}

impl LabelPlacer {
    /// A placer for labels wholly inside `area`, each kept `clearance` pixels from the
    /// others.
    pub fn new(area: Rect, clearance: f64) -> LabelPlacer {
        LabelPlacer {
            area,
            clearance: clearance.max(0.0),
            cuts_x: Vec::new(),
            cuts_y: Vec::new(),
            blocked: Vec::new(),
            lines: LineCells::new(area, 4.0),
            off_lines: Vec::new(),
            forbidden: LineCells::new(area, 4.0),
            placed: Placed::default(),
        }
    }

    /// Lines no label may cross: the edges of tiled sheets, at these x (vertical lines)
    /// and y (horizontal lines).
    pub fn cut_along(&mut self, xs: &[f64], ys: &[f64]) {
        self.cuts_x.extend_from_slice(xs);
        self.cuts_y.extend_from_slice(ys);
    }

    /// A box no label may overlap.
    pub fn block(&mut self, rect: Rect) {
        self.blocked.push(rect);
    }

    /// Drawn lines that labels keep clear of where they can; cells of `cell` pixels.
    pub fn avoid_lines(&mut self, lines: &PolylineSet, cell: f64) {
        if self.lines.cell != cell.max(1.0) && self.lines.is_empty() {
            self.lines = LineCells::new(self.area, cell);
        }
        self.lines.mark(lines);
    }

    /// Labels of `kind` take only spots that cross none of `lines` (checked on cells of
    /// `cell` pixels over a box a cell wider all round than the label, so a line grazing a
    /// cell is not missed); with none such they are left out and counted. The lines are
    /// kept off by every kind so asked.
    pub fn keep_off(&mut self, kind: LabelKind, lines: &PolylineSet, cell: f64) {
        if !self.off_lines.contains(&kind) {
            self.off_lines.push(kind);
        }
        if self.forbidden.cell != cell.max(1.0) && self.forbidden.is_empty() {
            self.forbidden = LineCells::new(self.area, cell);
        }
        self.forbidden.mark(lines);
    }

    /// The labels placed so far.
    pub fn placed(&self) -> &[PlacedLabel] {
        &self.placed.labels
    }

    /// Places `labels` in order of their kind (stable within a kind). A label whose anchor
    /// lies outside the area is not for this area and is neither placed nor counted.
    pub fn place(&mut self, mut labels: Vec<Label>) {
        labels.sort_by_key(|l| l.kind);
        for label in labels {
            if !self.area.contains(label.anchor) || label.text.trim().is_empty() {
                continue;
            }
            let mut best: Option<(usize, Spot, Rect)> = None;
            for spot in &label.spots {
                let bounds = label.bounds_at(spot);
                if !self.fits(&bounds) {
                    continue;
                }
                if self.off_lines.contains(&label.kind)
                    && self.forbidden.count(&bounds.grown(self.forbidden.cell)) > 0
                {
                    continue;
                }
                let crossed = if label.kind.avoids_lines() {
                    self.lines.count(&bounds)
                } else {
                    0
                };
                if best.as_ref().is_none_or(|(c, ..)| crossed < *c) {
                    best = Some((crossed, *spot, bounds));
                    if crossed == 0 {
                        break;
                    }
                }
            }
            match best {
                Some((_, spot, bounds)) => self.placed.labels.push(PlacedLabel {
                    at: ImagePoint::new(label.anchor.x + spot.dx, label.anchor.y + spot.dy),
                    align: spot.align,
                    text: label.text,
                    kind: label.kind,
                    anchor: label.anchor,
                    height: label.height,
                    bounds,
                }),
                None => self.placed.left_out += 1,
            }
        }
    }

    fn fits(&self, bounds: &Rect) -> bool {
        let spaced = bounds.grown(self.clearance);
        self.area.encloses(bounds)
            && !self
                .cuts_x
                .iter()
                .any(|&x| spaced.left < x && x < spaced.right)
            && !self
                .cuts_y
                .iter()
                .any(|&y| spaced.top < y && y < spaced.bottom)
            && !self.blocked.iter().any(|b| b.overlaps(&spaced))
            && !self
                .placed
                .labels
                .iter()
                .any(|p| p.bounds.overlaps(&spaced))
    }

    /// What was placed, and how many were left out.
    pub fn finish(self) -> Placed {
        self.placed
    }
}

/// How labels are inked: their stroke (its width is set from each label's height) and the
/// halo behind them (its width each side of the strokes, pixels; `None` for none).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LabelInk {
    /// The letters' ink.
    pub stroke: Stroke,
    /// The halo's width each side of the strokes, pixels; `None` for none.
    pub halo_px: Option<f64>,
}

/// The layers of placed labels: the halo (if any) under them all, then one layer per label
/// with its text.
pub fn label_layers(labels: &[PlacedLabel], ink: LabelInk) -> Vec<Layer> {
    let mut layers = Vec::with_capacity(labels.len() + 1);
    if let Some(halo) = ink.halo_px {
        // The halo of each height in one layer of its width.
        let mut heights: Vec<f64> = labels.iter().map(|l| l.height).collect();
        heights.sort_by(f64::total_cmp);
        heights.dedup();
        for h in heights {
            let mut lines = PolylineSet::new();
            for l in labels.iter().filter(|l| l.height == h) {
                letter(&l.text, l.at, l.height, l.align, &mut lines);
            }
            layers.push(Layer {
                filled: false,
                text: None,
                name: HALO.to_owned(),
                stroke: Stroke {
                    colour: [255, 255, 255],
                    opacity: 1.0,
                    width_px: stroke_width(h) + 2.0 * halo,
                },
                lines,
            });
        }
    }
    for l in labels {
        let mut lines = PolylineSet::new();
        letter(&l.text, l.at, l.height, l.align, &mut lines);
        layers.push(Layer {
            filled: false,
            text: Some(LayerText {
                words: l.text.clone(),
                at: l.at,
                height: l.height,
                align: l.align,
            }),
            name: l.kind.layer_name().to_owned(),
            stroke: Stroke {
                width_px: stroke_width(l.height).max(ink.stroke.width_px.min(1.0)),
                ..ink.stroke
            },
            lines,
        });
    }
    layers
}

/// The name of the layer of label halos.
pub const HALO: &str = "label halo";

/// A coarse map of the cells of an area that drawn lines pass through.
#[derive(Clone, Debug)]
struct LineCells {
    origin: ImagePoint,
    cell: f64,
    columns: usize,
    rows: usize,
    taken: Vec<bool>,
    any: bool,
}

impl LineCells {
    fn new(area: Rect, cell: f64) -> LineCells {
        let cell = cell.max(1.0);
        let columns = (area.width() / cell).ceil().clamp(1.0, 1e5) as usize + 1;
        let rows = (area.height() / cell).ceil().clamp(1.0, 1e5) as usize + 1;
        LineCells {
            origin: ImagePoint::new(area.left, area.top),
            cell,
            columns,
            rows,
            taken: vec![false; columns * rows],
            any: false,
        }
    }

    fn is_empty(&self) -> bool {
        !self.any
    }

    fn mark(&mut self, lines: &PolylineSet) {
        for line in lines.iter() {
            for pair in line.windows(2) {
                let (a, b) = (pair[0], pair[1]);
                let steps = ((b.x - a.x).hypot(b.y - a.y) / (0.5 * self.cell)).ceil() as usize;
                for k in 0..=steps.min(1 << 16) {
                    let s = k as f64 / steps.max(1) as f64;
                    let (x, y) = (a.x + (b.x - a.x) * s, a.y + (b.y - a.y) * s);
                    let c = ((x - self.origin.x) / self.cell).floor();
                    let r = ((y - self.origin.y) / self.cell).floor();
                    if c >= 0.0
                        && r >= 0.0
                        && (c as usize) < self.columns
                        && (r as usize) < self.rows
                    {
                        self.taken[r as usize * self.columns + c as usize] = true;
                        self.any = true;
                    }
                }
            }
        }
    }

    fn count(&self, b: &Rect) -> usize {
        let span = |lo: f64, hi: f64, origin: f64, n: usize| {
            let a = ((lo - origin) / self.cell).floor().max(0.0) as usize;
            let z = (((hi - origin) / self.cell).floor().max(0.0) as usize).min(n - 1);
            a..=z
        };
        let columns = span(b.left, b.right, self.origin.x, self.columns);
        span(b.top, b.bottom, self.origin.y, self.rows)
            .flat_map(|r| columns.clone().map(move |c| r * self.columns + c))
            .filter(|&i| self.taken[i])
            .count()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn area() -> Rect {
        Rect::from_ltrb(0.0, 0.0, 400.0, 200.0)
    }

    #[test]
    fn labels_never_overlap_and_the_loser_is_counted() {
        let mut placer = LabelPlacer::new(area(), 1.0);
        let p = ImagePoint::new(100.0, 100.0);
        placer.place(vec![
            Label::fixed("AAAA", p, LabelKind::GridValue, 10.0, Align::Start),
            Label::fixed("BBBB", p, LabelKind::Item, 10.0, Align::Start),
        ]);
        let placed = placer.finish();
        assert_eq!(placed.labels.len(), 1);
        assert_eq!(placed.labels[0].text, "AAAA", "grid values come first");
        assert_eq!(placed.left_out, 1);
    }

    #[test]
    fn a_label_at_the_edge_stays_whole_on_its_side() {
        // An azimuth at the left border: it may stand right or left of its line, and only
        // the right is inside the frame.
        let mut placer = LabelPlacer::new(area(), 0.0);
        let spots = vec![
            Spot::new(-3.0, 12.0, Align::End),
            Spot::new(3.0, 12.0, Align::Start),
        ];
        let label = Label::fixed(
            "180",
            ImagePoint::new(0.0, 100.0),
            LabelKind::GridValue,
            10.0,
            Align::Start,
        )
        .with_spots(spots);
        placer.place(vec![label]);
        let placed = placer.finish();
        assert_eq!(placed.labels.len(), 1);
        assert!(placed.labels[0].bounds.left >= 0.0);
        assert_eq!(placed.labels[0].at, ImagePoint::new(3.0, 112.0));
    }

    #[test]
    fn cuts_and_blocks_are_kept_clear() {
        let mut placer = LabelPlacer::new(area(), 0.0);
        placer.cut_along(&[110.0], &[]);
        placer.block(Rect::from_ltrb(0.0, 150.0, 400.0, 200.0));
        placer.place(vec![
            Label::fixed(
                "ACROSS",
                ImagePoint::new(100.0, 50.0),
                LabelKind::Item,
                10.0,
                Align::Start,
            ),
            Label::fixed(
                "LOW",
                ImagePoint::new(10.0, 160.0),
                LabelKind::Item,
                10.0,
                Align::Start,
            ),
        ]);
        assert_eq!(placer.finish().left_out, 2);
    }

    #[test]
    fn names_move_off_the_lines() {
        let mut placer = LabelPlacer::new(area(), 0.0);
        let mut lines = PolylineSet::new();
        // A line through the anchor, up and to the right, blocks the first spot.
        lines.push(&[ImagePoint::new(200.0, 100.0), ImagePoint::new(300.0, 0.0)]);
        placer.avoid_lines(&lines, 3.0);
        placer.place(vec![Label::around(
            "WELL",
            ImagePoint::new(200.0, 100.0),
            LabelKind::Item,
            10.0,
        )]);
        let placed = placer.finish();
        let b = placed.labels[0].bounds;
        assert!(b.right <= 200.0 && b.bottom <= 100.0, "above left: {b:?}");
    }

    #[test]
    fn labels_kept_off_lines_never_cross_one() {
        // A grid of lines 60 px apart leaves 60 px squares: a 6 px label fits in one, a
        // 40 px high one (about 140 px wide) fits nowhere and is left out.
        let mut placer = LabelPlacer::new(area(), 0.0);
        let mut lines = PolylineSet::new();
        for k in 0..=6 {
            let x = 60.0 * k as f64;
            lines.push(&[ImagePoint::new(x, 0.0), ImagePoint::new(x, 200.0)]);
        }
        for k in 0..=3 {
            let y = 60.0 * k as f64;
            lines.push(&[ImagePoint::new(0.0, y), ImagePoint::new(400.0, y)]);
        }
        placer.keep_off(LabelKind::Standpoint, &lines, 3.0);
        let at = ImagePoint::new(90.0, 90.0);
        placer.place(vec![
            Label::around("AB", at, LabelKind::Standpoint, 6.0),
            Label::around(
                "TALL",
                ImagePoint::new(200.0, 100.0),
                LabelKind::Standpoint,
                40.0,
            ),
        ]);
        let placed = placer.finish();
        assert_eq!(placed.left_out, 1);
        let b = placed.labels[0].bounds;
        assert!(
            b.left > 60.0 && b.right < 120.0 && b.top > 60.0 && b.bottom < 120.0,
            "{b:?}"
        );
    }

    #[test]
    fn layers_carry_the_text_over_a_halo() {
        let mut placer = LabelPlacer::new(area(), 0.0);
        placer.place(vec![Label::fixed(
            "N",
            ImagePoint::new(10.0, 50.0),
            LabelKind::Compass,
            10.0,
            Align::Start,
        )]);
        let ink = LabelInk {
            stroke: Stroke::black(0.8, 1.0),
            halo_px: Some(2.0),
        };
        let layers = label_layers(&placer.finish().labels, ink);
        assert_eq!(layers.len(), 2);
        assert_eq!(layers[0].name, HALO);
        assert_eq!(layers[0].stroke.width_px, 5.0);
        assert_eq!(layers[1].text.as_ref().map(|t| t.words.as_str()), Some("N"));
        assert_eq!(layers[1].stroke.width_px, 1.0);
    }

    /// A line's points, x and y in pixels.
    type Points = [(f64, f64)];

    /// A grid of 10 px cells over `grid` with `lines` marked on it.
    fn marked(grid: Rect, lines: &[&Points]) -> LineCells {
        let mut set = PolylineSet::new();
        for line in lines {
            let points: Vec<ImagePoint> =
                line.iter().map(|&(x, y)| ImagePoint::new(x, y)).collect();
            set.push(&points);
        }
        let mut cells = LineCells::new(grid, 10.0);
        cells.mark(&set);
        cells
    }

    #[test]
    fn a_line_takes_the_cells_it_passes_through_worked_by_hand() {
        // A 400 x 200 px area whose corner stands at (100, 50), so that cells are found
        // from the corner, not from the origin; lines and boxes below are given relative
        // to that corner.
        let (x0, y0) = (100.0, 50.0);
        let moved = |line: &Points| line.iter().map(|&(x, y)| (x0 + x, y0 + y)).collect();
        let boxed =
            |l: f64, t: f64, r: f64, b: f64| Rect::from_ltrb(x0 + l, y0 + t, x0 + r, y0 + b);
        let whole = boxed(0.0, 0.0, 400.0, 200.0);
        // Along row 2 (y 20 to 30) from x = 15 to 55: columns 1 to 5.
        let along = [(15.0, 25.0), (55.0, 25.0)];
        // Down column 3 (x 30 to 40) from y = 42 to 78: rows 4 to 7.
        let down = [(35.0, 42.0), (35.0, 78.0)];
        // The diagonal from (5, 5) to (35, 35) stays in the cells (k, k), k = 0 to 3.
        let diagonal = [(5.0, 5.0), (35.0, 35.0)];
        // From (5, 5) to (45, 15) the line crosses y = 10 at x = 25: columns 0 to 2 of
        // row 0 and 2 to 4 of row 1 (sampled every half cell, none missed).
        let shallow = [(5.0, 5.0), (45.0, 15.0)];
        // Beyond the area's right or bottom edge (the grid has one column and one row
        // spare), above it and left of it: no cell, and none of another row.
        let beyond = [(415.0, 55.0), (418.0, 56.0)];
        let below = [(50.0, 215.0), (90.0, 218.0)];
        let above = [(50.0, -15.0), (90.0, -12.0)];
        let left = [(-15.0, 50.0), (-12.0, 90.0)];
        // Entering from the left: only the cells inside.
        let entering = [(-20.0, 15.0), (25.0, 15.0)];
        let cases: [(&[&Points], Rect, usize); 13] = [
            (&[&along], whole, 5),
            (&[&along], boxed(0.0, 20.0, 29.0, 29.0), 2),
            (&[&along], boxed(60.0, 0.0, 400.0, 200.0), 0),
            (&[&along], boxed(0.0, 30.0, 400.0, 200.0), 0),
            (&[&down], whole, 4),
            (&[&down], boxed(30.0, 60.0, 39.0, 200.0), 2),
            (&[&diagonal], whole, 4),
            (&[&diagonal], boxed(20.0, 0.0, 29.0, 19.0), 0),
            (&[&diagonal], boxed(20.0, 20.0, 29.0, 29.0), 1),
            (&[&shallow], whole, 6),
            (&[&beyond, &below, &above, &left], whole, 0),
            // A box reaching far past the grid counts what lies inside it.
            (&[&along, &down], boxed(-50.0, -50.0, 1000.0, 1000.0), 9),
            (&[&entering], whole, 3),
        ];
        for (k, (lines, b, expected)) in cases.into_iter().enumerate() {
            let lines: Vec<Vec<(f64, f64)>> = lines.iter().map(|l| moved(l)).collect();
            let lines: Vec<&Points> = lines.iter().map(Vec::as_slice).collect();
            assert_eq!(marked(whole, &lines).count(&b), expected, "case {k}");
        }
    }

    #[test]
    fn a_cell_grid_is_empty_until_a_line_falls_inside_it() {
        assert!(marked(area(), &[]).is_empty());
        assert!(marked(area(), &[&[(-30.0, -30.0), (-20.0, -25.0)]]).is_empty());
        assert!(!marked(area(), &[&[(30.0, 30.0), (50.0, 35.0)]]).is_empty());
    }

    #[test]
    fn a_line_is_sampled_along_its_whole_length() {
        // Across the left edge, from x = -20 to 25 on row 1 of a grid from the origin: the
        // three cells inside; and up across the top edge in column 10: three more.
        let across = [(-20.0, 15.0), (25.0, 15.0)];
        let upward = [(105.0, -20.0), (105.0, 25.0)];
        assert_eq!(marked(area(), &[&across, &upward]).count(&area()), 6);
        // A line 19,990 px long (a wide panorama's horizon) takes every cell along it, to
        // its far end: columns 0 to 1,999.
        let wide = Rect::from_ltrb(0.0, 0.0, 20_010.0, 100.0);
        let horizon = [(5.0, 55.0), (19_995.0, 55.0)];
        assert_eq!(marked(wide, &[&horizon]).count(&wide), 2_000);
    }

    /// The box round the centre lines of `text` as the lettering draws it at `at`.
    fn drawn_box(text: &str, at: ImagePoint, height: f64, align: Align) -> Rect {
        let mut out = PolylineSet::new();
        letter(text, at, height, align, &mut out);
        let (xs, ys): (Vec<f64>, Vec<f64>) = out.points().iter().map(|p| (p.x, p.y)).unzip();
        let low = |v: &[f64]| v.iter().copied().fold(f64::INFINITY, f64::min);
        let high = |v: &[f64]| v.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        Rect::from_ltrb(low(&xs), low(&ys), high(&xs), high(&ys))
    }

    fn assert_box_near(a: Rect, b: Rect, what: &str) {
        let sides = [
            (a.left, b.left),
            (a.top, b.top),
            (a.right, b.right),
            (a.bottom, b.bottom),
        ];
        assert!(
            sides.iter().all(|(p, q)| (p - q).abs() < 1e-9),
            "{what}: {a:?} != {b:?}"
        );
    }

    #[test]
    fn a_label_box_is_its_drawn_ink_grown_by_half_a_stroke() {
        // A round cap or join reaches half the stroke's width beyond its centre line on
        // every side (plane geometry); "Hp" reaches the cap line and the descender.
        for height in [10.0, 25.0] {
            for align in [Align::Start, Align::Middle, Align::End] {
                let label = Label::fixed(
                    "Hp",
                    ImagePoint::new(200.0, 100.0),
                    LabelKind::Item,
                    height,
                    align,
                );
                let drawn = drawn_box("Hp", ImagePoint::new(207.0, 97.0), height, align);
                assert_box_near(
                    label.bounds_at(&Spot::new(7.0, -3.0, align)),
                    drawn.grown(stroke_width(height) / 2.0),
                    &format!("{align:?} at {height} px"),
                );
            }
        }
    }

    #[test]
    fn a_point_label_stands_clear_of_its_mark_all_round() {
        // Worked by hand from the design: above right, above left, below right, below
        // left, the ink d = 0.6 h clear of the anchor across and up or down (its baseline
        // d above it, or its cap line d below); straight above and below, centred on it,
        // 0.4 h further; then the same six with d = 1.5 h. "H" has only the cap height.
        let (h, ax, ay) = (10.0, 200.0, 100.0);
        let label = Label::around("H", ImagePoint::new(ax, ay), LabelKind::Item, h);
        let w = drawn_box("H", ImagePoint::new(0.0, 0.0), h, Align::Start).width();
        // The ink's box from its left edge and its baseline.
        let ink = |left: f64, base: f64| Rect::from_ltrb(left, base - h, left + w, base);
        let mut expected = Vec::new();
        for d in [0.6 * h, 1.5 * h] {
            expected.extend([
                ink(ax + d, ay - d),
                ink(ax - d - w, ay - d),
                ink(ax + d, ay + d + h),
                ink(ax - d - w, ay + d + h),
                ink(ax - w / 2.0, ay - d - 0.4 * h),
                ink(ax - w / 2.0, ay + d + 0.4 * h + h),
            ]);
        }
        assert_eq!(label.spots.len(), expected.len());
        for (k, (spot, want)) in label.spots.iter().zip(expected).enumerate() {
            let at = ImagePoint::new(ax + spot.dx, ay + spot.dy);
            let drawn = drawn_box("H", at, h, spot.align);
            assert_box_near(drawn, want, &format!("spot {k}"));
        }
    }

    /// "H", 10 px high, anchored at (100, 100): its ink 100 to 107 across and 90 to 100
    /// down (strokes 1 px wide), at the first spot of `spots` that the placer takes.
    fn h_at(kind: LabelKind, spots: &[(f64, f64)]) -> Label {
        let spots = spots
            .iter()
            .map(|&(dx, dy)| Spot::new(dx, dy, Align::Start))
            .collect();
        Label::fixed("H", ImagePoint::new(100.0, 100.0), kind, 10.0, Align::Start).with_spots(spots)
    }

    /// Where `label` stands once `placer` has placed it, if it was placed.
    fn stands(mut placer: LabelPlacer, label: Label) -> Option<(f64, f64)> {
        placer.place(vec![label]);
        placer.placed().first().map(|p| (p.at.x, p.at.y))
    }

    /// A line across the whole area at `y`.
    fn across(y: f64) -> PolylineSet {
        let mut lines = PolylineSet::new();
        lines.push(&[ImagePoint::new(0.0, y), ImagePoint::new(400.0, y)]);
        lines
    }

    #[test]
    fn a_cut_stops_a_label_only_by_passing_through_its_clear_space() {
        // With 1.5 px clear space round its ink box (the ink grown by half a stroke:
        // 99.5 to 107.5 across, 89.5 to 100.5 down), the label keeps 98 to 109 across and
        // 88 to 102 down: a cut through that stops it, one along its edge or far off not.
        let fits = |xs: &[f64], ys: &[f64]| {
            let mut placer = LabelPlacer::new(area(), 1.5);
            placer.cut_along(xs, ys);
            stands(placer, h_at(LabelKind::Item, &[(0.0, 0.0)])).is_some()
        };
        for x in [98.0, 109.0, 20.0, 300.0] {
            assert!(fits(&[x], &[]), "a cut at x = {x}");
        }
        assert!(!fits(&[103.0], &[]));
        for y in [88.0, 102.0, 20.0, 150.0] {
            assert!(fits(&[], &[y]), "a cut at y = {y}");
        }
        assert!(!fits(&[], &[95.0]));
    }

    #[test]
    fn only_names_move_off_the_lines_and_the_earlier_of_equals_wins() {
        // A line at y = 95 crosses the ink of the spot on the anchor and of the one 50 px
        // right of it, on cells of 10 px: two cells each (columns 9 and 10, and 14 and
        // 15, of row 9); 30 px lower the ink (rows 11 to 13) is clear of it.
        let placer = || {
            let mut placer = LabelPlacer::new(area(), 0.0);
            placer.avoid_lines(&across(95.0), 10.0);
            placer
        };
        let (on, right, lower) = ((0.0, 0.0), (50.0, 0.0), (0.0, 30.0));
        let item = |spots: &[(f64, f64)]| stands(placer(), h_at(LabelKind::Item, spots));
        assert_eq!(item(&[on, lower]), Some((100.0, 130.0)));
        assert_eq!(item(&[on, right, lower]), Some((100.0, 130.0)));
        assert_eq!(
            item(&[on, right]),
            Some((100.0, 100.0)),
            "the first of equals"
        );
        // A value belongs on its line: it takes its first free spot.
        let value = stands(placer(), h_at(LabelKind::GridValue, &[on, lower]));
        assert_eq!(value, Some((100.0, 100.0)));
    }

    #[test]
    fn lines_are_avoided_on_cells_of_the_size_asked_and_none_is_forgotten() {
        let (on, lower) = ((0.0, 0.0), (0.0, 30.0));
        // On cells of 50 px a line at y = 80 shares row 1 (50 to 100) with the ink on
        // the anchor (90 to 100), though 10 px above it; the ink 30 px lower is in row 2.
        let mut placer = LabelPlacer::new(area(), 0.0);
        placer.avoid_lines(&across(80.0), 50.0);
        let item = h_at(LabelKind::Item, &[on, lower]);
        assert_eq!(stands(placer, item.clone()), Some((100.0, 130.0)));
        // Lines given later on another cell size are added to those given before.
        let mut placer = LabelPlacer::new(area(), 0.0);
        placer.avoid_lines(&across(95.0), 10.0);
        placer.avoid_lines(&across(190.0), 5.0);
        assert_eq!(stands(placer, item), Some((100.0, 130.0)));
    }

    #[test]
    fn lines_kept_off_are_kept_a_cell_of_the_size_asked_away() {
        // Kept a 50 px cell away, a line at y = 60 (row 1) is too near the ink box grown
        // by a cell (39.5 to 150.5 down: rows 0 to 3): left out.
        let on = h_at(LabelKind::Standpoint, &[(0.0, 0.0)]);
        let mut placer = LabelPlacer::new(area(), 0.0);
        placer.keep_off(LabelKind::Standpoint, &across(60.0), 50.0);
        assert_eq!(stands(placer, on.clone()), None);
        // Lines given later on another cell size are added to those given before: the
        // line at y = 95 through the ink still keeps it out.
        let mut placer = LabelPlacer::new(area(), 0.0);
        placer.keep_off(LabelKind::Standpoint, &across(95.0), 10.0);
        placer.keep_off(LabelKind::Standpoint, &across(190.0), 5.0);
        assert_eq!(stands(placer, on), None);
    }

    #[test]
    fn a_label_anchored_outside_the_area_or_blank_is_not_counted() {
        // Anchored 50 px left of the area, its spot 150 px right of the anchor is inside:
        // not this area's label all the same. Blank words have nothing to write.
        let mut placer = LabelPlacer::new(area(), 0.0);
        let outside = Label::fixed(
            "H",
            ImagePoint::new(-50.0, 100.0),
            LabelKind::Item,
            10.0,
            Align::Start,
        )
        .with_spots(vec![Spot::new(150.0, 0.0, Align::Start)]);
        let blank = Label {
            text: "   ".into(),
            ..h_at(LabelKind::Item, &[(0.0, 0.0)])
        };
        placer.place(vec![outside, blank]);
        assert_eq!(placer.finish(), Placed::default());
    }

    #[test]
    fn each_height_has_a_halo_of_its_own_wider_by_the_halo_each_side() {
        // Strokes d = h/10 (ISO 3098-0 type B, from memory): 1 px at 10 px, 2 px at 20 px.
        // A halo of 3 px each side of the strokes is 6 px wider than them: 7 and 8 px,
        // each under the letters of its own height only.
        let mut placer = LabelPlacer::new(area(), 0.0);
        let at = |x| ImagePoint::new(x, 50.0);
        placer.place(vec![
            Label::fixed("N", at(10.0), LabelKind::Compass, 10.0, Align::Start),
            Label::fixed("E", at(100.0), LabelKind::Compass, 20.0, Align::Start),
        ]);
        let ink = LabelInk {
            stroke: Stroke::black(1.0, 0.8),
            halo_px: Some(3.0),
        };
        let layers = label_layers(&placer.finish().labels, ink);
        let widths: Vec<f64> = layers.iter().map(|l| l.stroke.width_px).collect();
        assert_eq!(widths, [7.0, 8.0, 1.0, 2.0]);
        assert_eq!(layers[0].lines, layers[2].lines, "the 10 px halo");
        assert_eq!(layers[1].lines, layers[3].lines, "the 20 px halo");
    }

    #[test]
    fn each_kind_is_drawn_on_the_layer_its_readers_and_styles_name() {
        // The names the sheets' read-back looks for (`LABEL_LAYERS` in `tests/sheets.rs`),
        // which styles address too; heading and compass points go with the grid's values.
        use LabelKind::*;
        let grid = "grid labels";
        let names = [
            (Title, "title"),
            (Heading, grid),
            (Compass, grid),
            (GridValue, grid),
            (VanishingPoint, "vanishing point labels"),
            (SunHour, "sun hour labels"),
            (Pole, "pole labels"),
            (Division, "division labels"),
            (Standpoint, "standpoint labels"),
            (Item, "item labels"),
            (Caption, "captions"),
        ];
        for (kind, name) in names {
            assert_eq!(kind.layer_name(), name);
        }
    }
}
