//! `Road`: a carriageway along a centreline, with pavements, kerbs, a centre line and
//! rounded corners, level or sloping.
//!
//! Every line of the road (the carriageway's edges, the kerb tops, the backs of the
//! pavements, the centre line) is the centreline moved sideways: straight parts parallel to
//! it, and round each rounded corner an arc about the same centre. On the inside of a tight
//! corner, where that arc's radius would be zero or less, the line has a sharp mitred corner
//! instead; without `corner_radius` every corner is mitred.
//!
//! Heights: a rounded corner keeps the height of its corner point over its whole arc, so
//! the arcs stay level and exact circles; the straight parts slope evenly between the ends
//! of the arcs (or between the corner points themselves where a corner is sharp). Each
//! line's arc ends and mitre points take the height of their corner point, so a section
//! square across a straight part is level. A section through the middle of a corner is
//! level too, so the road is never tilted sideways (no superelevation).

use super::super::build::{ellipse_points, facet_count, ItemBuilder, Placement};
use super::super::numbers::{plan, Finite, NonNegative, Plan, Positive, MAX_COUNT};
use super::super::site::ItemId;
use super::plan::{dash_spans, left_of, offset_polyline, turn_angle, Fillet, PathPiece};
use nalgebra::{Point3, Vector2, Vector3};
use serde::Deserialize;
use std::f64::consts::PI;

#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub enum CentreLine {
    #[default]
    None,
    Solid,
    /// Dashes `dash` long with `gap` between them, measured along the centreline from its
    /// first point and running on round the corners.
    Dashed {
        dash: Positive,
        gap: Positive,
    },
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RoadSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The centreline's corners in plan.
    pub points: Vec<Plan>,
    /// The height of the road at each corner (all 0 if not given).
    #[serde(default)]
    pub elevations: Option<Vec<Finite>>,
    /// Width of the carriageway, kerb to kerb.
    pub width: Positive,
    /// Width of the pavement on each side.
    #[serde(default)]
    pub pavement: Option<Positive>,
    /// Height of the kerb: the pavement stands this much above the carriageway.
    #[serde(default)]
    pub kerb: Option<Positive>,
    #[serde(default)]
    pub centre_line: CentreLine,
    /// Radius of the centreline round each corner.
    #[serde(default)]
    pub corner_radius: Option<Positive>,
    /// Radius of the kerb's circular return round each corner of a junction this road
    /// meets (the smaller of the two roads' radii where both give one); without one on
    /// either road the kerbs meet in a sharp corner.
    #[serde(default)]
    pub kerb_radius: Option<Positive>,
    /// Stripes of a pedestrian crossing across the carriageway at each junction the road
    /// opens into.
    #[serde(default)]
    pub crossing: Option<CrossingSpec>,
}

/// A pedestrian crossing: stripes along the road, side by side across the carriageway.
#[derive(Clone, Copy, Debug, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct CrossingSpec {
    /// Length of each stripe along the road (3 if not given).
    #[serde(default = "three")]
    pub depth: Positive,
    /// Width of each stripe (0.5 if not given).
    #[serde(default = "half")]
    pub stripe: Positive,
    /// Gap between stripes (0.5 if not given).
    #[serde(default = "half")]
    pub gap: Positive,
    /// How far from the mouth of the junction, where the kerb returns end, the stripes
    /// begin (1 if not given).
    #[serde(default = "one")]
    pub set_back: NonNegative,
}

fn three() -> Positive {
    Positive(3.0)
}

fn half() -> Positive {
    Positive(0.5)
}

fn one() -> NonNegative {
    NonNegative(1.0)
}

/// A piece of one of the road's lines, with the heights at its start and end (the same
/// at both ends of an arc).
#[derive(Clone, Copy, Debug, PartialEq)]
struct Run {
    piece: PathPiece,
    heights: (f64, f64),
}

impl Run {
    /// The part from `from` to `to` along the run, its heights on the run's even slope.
    fn part(&self, from: f64, to: f64) -> Run {
        let (start_height, end_height) = self.heights;
        let length = self.piece.length();
        let height = |d: f64| start_height + (end_height - start_height) * d / length;
        Run {
            piece: self.piece.part(from, to),
            heights: (height(from), height(to)),
        }
    }

    /// Draws the run `lift` above its heights.
    fn draw(&self, b: &mut ItemBuilder, lift: f64) {
        let (start_height, end_height) = self.heights;
        match self.piece {
            PathPiece::Line { start, end } => {
                b.segment(at(start, start_height + lift), at(end, end_height + lift))
            }
            PathPiece::Arc {
                centre,
                radius,
                start_angle,
                sweep,
            } => b.ellipse(
                at(centre, start_height + lift),
                Vector3::x() * radius,
                Vector3::y() * radius,
                start_angle,
                sweep,
            ),
        }
    }

    /// The upright face standing `height` high on the run (a kerb's face): a quad on a
    /// line, a curved strip on an arc.
    fn upright_face(&self, b: &mut ItemBuilder, height: f64) {
        let (start_height, end_height) = self.heights;
        match self.piece {
            PathPiece::Line { start, end } => b.face(
                &[
                    at(start, start_height),
                    at(end, end_height),
                    at(end, end_height + height),
                    at(start, start_height + height),
                ],
                &[],
            ),
            PathPiece::Arc {
                centre,
                radius,
                start_angle,
                sweep,
            } => {
                let rim = |z: f64| {
                    ellipse_points(
                        at(centre, z),
                        Vector3::x() * radius,
                        Vector3::y() * radius,
                        start_angle,
                        sweep,
                        facet_count(sweep),
                    )
                };
                b.strip(&rim(start_height), &rim(start_height + height));
            }
        }
    }
}

fn at(p: Vector2<f64>, z: f64) -> Point3<f64> {
    Point3::new(p.x, p.y, z)
}

/// A length for a message: to a thousandth, without trailing zeros.
fn short(length: f64) -> String {
    let text = format!("{length:.3}");
    text.trim_end_matches('0').trim_end_matches('.').to_owned()
}

/// The road's centreline, checked, with its heights and the arcs rounding its corners.
#[derive(Debug)]
struct Centreline {
    points: Vec<Vector2<f64>>,
    heights: Vec<f64>,
    /// One for each point: the arc rounding that corner, if it is rounded (never at the
    /// two ends).
    fillets: Vec<Option<Fillet>>,
}

impl Centreline {
    fn new(spec: &RoadSpec) -> Result<Centreline, String> {
        let points: Vec<Vector2<f64>> = spec.points.iter().map(plan).collect();
        let heights = match &spec.elevations {
            None => vec![0.0; points.len()],
            Some(elevations) if elevations.len() == points.len() => {
                elevations.iter().map(|e| e.0).collect()
            }
            Some(elevations) => {
                return Err(format!(
                    "`elevations` has {} heights but `points` has {} points: give one \
                     height for each point",
                    elevations.len(),
                    points.len()
                ))
            }
        };
        Centreline::from_parts(points, heights, spec.corner_radius.map(|r| r.0))
    }

    fn from_parts(
        points: Vec<Vector2<f64>>,
        heights: Vec<f64>,
        corner_radius: Option<f64>,
    ) -> Result<Centreline, String> {
        let n = points.len();
        if n < 2 {
            return Err(format!(
                "a road needs at least two points in `points`, found {n}"
            ));
        }
        for i in 0..n - 1 {
            if points[i] == points[i + 1] {
                return Err(format!(
                    "points {} and {} are the same point: consecutive points must differ",
                    i + 1,
                    i + 2
                ));
            }
        }
        let mut fillets = vec![None; n];
        for j in 1..n - 1 {
            let turn = turn_angle(points[j - 1], points[j], points[j + 1]);
            // Within a billionth of a half turn of going straight back, the mitres and
            // fillets run off to infinity.
            if turn.abs() >= PI * (1.0 - 1e-9) {
                return Err(format!(
                    "the road turns straight back on itself at point {}",
                    j + 1
                ));
            }
            if let Some(radius) = corner_radius {
                fillets[j] = Fillet::round(points[j - 1], points[j], points[j + 1], radius);
            }
        }
        let centreline = Centreline {
            points,
            heights,
            fillets,
        };
        centreline.check_fillets_fit()?;
        Ok(centreline)
    }

    /// How far along the segment from point `i` to `i + 1` it heads.
    fn direction(&self, i: usize) -> Vector2<f64> {
        (self.points[i + 1] - self.points[i]).normalize()
    }

    /// Each segment must hold the tangent lengths of the arcs at both its ends.
    fn check_fillets_fit(&self) -> Result<(), String> {
        let tangent = |j: usize| self.fillets[j].map_or(0.0, |f| f.tangent_length);
        for i in 0..self.points.len() - 1 {
            let length = (self.points[i + 1] - self.points[i]).norm();
            let (before, after) = (tangent(i), tangent(i + 1));
            // A fillet that fits exactly may overshoot by rounding.
            if before + after <= length * (1.0 + 1e-9) {
                continue;
            }
            let stretch = format!(
                "the stretch from point {} to point {} is only {} long",
                i + 1,
                i + 2,
                short(length)
            );
            let problem = if before > 0.0 && after > 0.0 {
                format!(
                    "the rounded corners at points {} and {} do not fit: they need {} and {}                      of straight between them, but {stretch}",
                    i + 1,
                    i + 2,
                    short(before),
                    short(after)
                )
            } else {
                let corner = if before > 0.0 { i } else { i + 1 };
                let fillet = self.fillets[corner].expect("a corner with a tangent length");
                format!(
                    "the rounded corner at point {} does not fit: turning {} degrees with                      radius {} it needs {} of straight on each side, but {stretch}",
                    corner + 1,
                    short(fillet.sweep.abs().to_degrees()),
                    short(fillet.radius),
                    short(fillet.tangent_length)
                )
            };
            return Err(format!(
                "{problem}; make `corner_radius` smaller or the stretch longer"
            ));
        }
        Ok(())
    }

    /// The line `offset` to the left of the centreline (negative: to the right), as runs
    /// from the first point to the last.
    fn line(&self, offset: f64) -> Result<Vec<Run>, String> {
        let n = self.points.len();
        let mitred = offset_polyline(&self.points, offset);
        // Where the line arrives at each corner, where it leaves it, and the arc between.
        let ends: Vec<(Vector2<f64>, Vector2<f64>, Option<Fillet>)> = (0..n)
            .map(
                |j| match self.fillets[j].and_then(|f| f.concentric(offset)) {
                    Some(arc) => (arc.start, arc.end, Some(arc)),
                    None => (mitred[j], mitred[j], None),
                },
            )
            .collect();
        let mut runs = Vec::with_capacity(2 * n);
        for i in 0..n - 1 {
            let (from, to) = (ends[i].1, ends[i + 1].0);
            let length = (self.points[i + 1] - self.points[i]).norm();
            let tolerance = 1e-9 * (length + offset.abs());
            if (to - from).dot(&self.direction(i)) < -tolerance {
                let side = if offset > 0.0 { "left" } else { "right" };
                return Err(format!(
                    "the road is too wide for its corners: the line {} to the {side} of the \
                     centreline would run backwards between points {} and {}; make the road \
                     narrower, the stretch longer or `corner_radius` larger",
                    short(offset.abs()),
                    i + 1,
                    i + 2
                ));
            }
            if (to - from).norm() > tolerance {
                runs.push(Run {
                    piece: PathPiece::Line {
                        start: from,
                        end: to,
                    },
                    heights: (self.heights[i], self.heights[i + 1]),
                });
            }
            if let Some(arc) = ends[i + 1].2 {
                let height = self.heights[i + 1];
                runs.push(Run {
                    piece: arc.arc(),
                    heights: (height, height),
                });
            }
        }
        Ok(runs)
    }
}

/// A road resolved into site coordinates (metres), ready to be joined with the others at
/// the junctions where they meet ([`crate::scene`]'s street network) and drawn.
#[derive(Clone, Debug, PartialEq)]
pub struct RoadLine {
    pub item: ItemId,
    pub points: Vec<Vector2<f64>>,
    pub heights: Vec<f64>,
    pub half_width: f64,
    pub pavement: f64,
    pub kerb: f64,
    pub centre_line: CentreLine,
    pub corner_radius: Option<f64>,
    pub kerb_radius: Option<f64>,
    pub crossing: Option<CrossingSpec>,
}

impl RoadLine {
    /// How far the road reaches to each side of its centreline, pavements included.
    pub fn reach(&self) -> f64 {
        self.half_width + self.pavement
    }
}

/// Checks a road as written and places it in the site. Nothing is drawn yet: a road is
/// drawn once every road of the scene is known, so that those that meet are joined.
pub fn build_road(b: &mut ItemBuilder, spec: &RoadSpec) -> Result<(), String> {
    let road = road_line(b, spec)?;
    b.add_road(road);
    Ok(())
}

/// A road as written, checked and placed in the site.
pub fn road_line(b: &ItemBuilder, spec: &RoadSpec) -> Result<RoadLine, String> {
    let centreline = Centreline::new(spec)?;
    // The lines must fit round the road's own corners.
    let half = spec.width.0 / 2.0;
    let pavement = spec.pavement.map_or(0.0, |p| p.0);
    for offset in [half, -half, half + pavement, -half - pavement] {
        centreline.line(offset)?;
    }
    let place: Placement = b.placement();
    let length = |l: f64| place.length(l);
    let scaled = |p: Positive| Positive(length(p.0));
    let mut points = centreline
        .points
        .iter()
        .zip(&centreline.heights)
        .map(|(p, &h)| place.point(&at(*p, h)))
        .collect::<Vec<_>>();
    if let (None, Some(ground)) = (&spec.elevations, b.ground()) {
        points = on_ground(&points, ground);
    }
    Ok(RoadLine {
        item: b.item(),
        heights: points.iter().map(|p| p.z).collect(),
        points: points.iter().map(|p| Vector2::new(p.x, p.y)).collect(),
        half_width: length(half),
        pavement: length(pavement),
        kerb: spec.kerb.map_or(0.0, |k| length(k.0)),
        centre_line: match spec.centre_line {
            CentreLine::Dashed { dash, gap } => CentreLine::Dashed {
                dash: scaled(dash),
                gap: scaled(gap),
            },
            other => other,
        },
        corner_radius: spec.corner_radius.map(|r| length(r.0)),
        kerb_radius: spec.kerb_radius.map(|r| length(r.0)),
        crossing: spec.crossing.map(|c| CrossingSpec {
            depth: scaled(c.depth),
            stripe: scaled(c.stripe),
            gap: scaled(c.gap),
            set_back: NonNegative(length(c.set_back.0)),
        }),
    })
}

/// A centreline without heights laid on the ground: a point where it crosses each edge of
/// the ground's triangles, and every point at the ground's height there (0 off the ground).
fn on_ground(points: &[Point3<f64>], ground: &crate::scene::Ground) -> Vec<Point3<f64>> {
    let plan_of = |p: &Point3<f64>| Vector2::new(p.x, p.y);
    let height = |q: Vector2<f64>| ground.height_at(q.x, q.y).unwrap_or(0.0);
    let mut laid = Vec::with_capacity(points.len());
    for pair in points.windows(2) {
        let (a, b) = (plan_of(&pair[0]), plan_of(&pair[1]));
        laid.push(at(a, height(a)));
        for t in ground.bends(a, b) {
            let q = a + (b - a) * t;
            laid.push(at(q, height(q)));
        }
    }
    let last = plan_of(&points[points.len() - 1]);
    laid.push(at(last, height(last)));
    laid
}

/// One end of a piece of road: open (the road stops there) or opening into a junction.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum PieceEnd {
    Open,
    /// Each line starts this far along the piece from the junction's centre (negative:
    /// it reaches back past it), `[left, right]` as seen looking from the junction along
    /// the piece; the centre line and crossing start at `mouth`, where the kerb returns end.
    Junction {
        edge: [f64; 2],
        back: [f64; 2],
        mouth: f64,
    },
}

/// A stretch of a road between two of its ends or junctions.
#[derive(Clone, Debug, PartialEq)]
pub struct Piece {
    pub points: Vec<Vector2<f64>>,
    pub heights: Vec<f64>,
    pub ends: [PieceEnd; 2],
}

impl Piece {
    /// Where the line `side` (+1 left, -1 right of the piece's direction) starts and ends,
    /// measured from each end; `back` for the back of the pavement.
    fn trims(&self, side: f64, back: bool) -> (f64, f64) {
        let trim = |end: PieceEnd, left_is_left: bool| match end {
            PieceEnd::Open => 0.0,
            PieceEnd::Junction {
                edge, back: rear, ..
            } => {
                let lines = if back { rear } else { edge };
                let left = (side > 0.0) == left_is_left;
                lines[if left { 0 } else { 1 }]
            }
        };
        (trim(self.ends[0], true), trim(self.ends[1], false))
    }

    fn mouths(&self) -> (f64, f64) {
        let mouth = |end: PieceEnd| match end {
            PieceEnd::Open => 0.0,
            PieceEnd::Junction { mouth, .. } => mouth,
        };
        (mouth(self.ends[0]), mouth(self.ends[1]))
    }
}

/// The runs cut to start `from` after the first run's start and end `to` before the last
/// run's end; a negative distance reaches back along the end's straight direction. On
/// failure, the straight length that was there to be cut into.
fn cut_runs(runs: &[Run], from: f64, to: f64) -> Result<Vec<Run>, (bool, f64)> {
    let lengths: Vec<f64> = runs.iter().map(|r| r.piece.length()).collect();
    let total: f64 = lengths.iter().sum();
    let tolerance = 1e-9 * (total + from.abs() + to.abs());
    let straight = |run: Option<&Run>| match run {
        Some(
            run @ Run {
                piece: PathPiece::Line { .. },
                ..
            },
        ) => run.piece.length(),
        _ => 0.0,
    };
    if from > straight(runs.first()) + tolerance {
        return Err((true, straight(runs.first())));
    }
    if to > straight(runs.last()) + tolerance {
        return Err((false, straight(runs.last())));
    }
    if from + to > total + tolerance {
        return Err((true, total - to.max(0.0)));
    }
    let mut cut = Vec::with_capacity(runs.len() + 2);
    if from < 0.0 {
        if let Some(PathPiece::Line { start, end }) = runs.first().map(|r| r.piece) {
            let back = start - (end - start).normalize() * -from;
            let height = runs[0].heights.0;
            cut.push(Run {
                piece: PathPiece::Line {
                    start: back,
                    end: start,
                },
                heights: (height, height),
            });
        }
    }
    let (keep_from, keep_to) = (from.max(0.0), total - to.max(0.0));
    let mut along = 0.0;
    for (run, length) in runs.iter().zip(&lengths) {
        let (a, b) = ((keep_from - along).max(0.0), (keep_to - along).min(*length));
        if b - a > tolerance {
            cut.push(run.part(a, b));
        }
        along += length;
    }
    if to < 0.0 {
        if let Some(PathPiece::Line { start, end }) = runs.last().map(|r| r.piece) {
            let on = end + (end - start).normalize() * -to;
            let height = runs[runs.len() - 1].heights.1;
            cut.push(Run {
                piece: PathPiece::Line {
                    start: end,
                    end: on,
                },
                heights: (height, height),
            });
        }
    }
    Ok(cut)
}

/// Draws the line along a kerb: on the carriageway, on the kerb's top and the kerb's face.
pub fn draw_kerb(b: &mut ItemBuilder, piece: PathPiece, height: f64, kerb: f64) {
    let run = Run {
        piece,
        heights: (height, height),
    };
    run.draw(b, 0.0);
    if kerb > 0.0 {
        run.draw(b, kerb);
        run.upright_face(b, kerb);
    }
}

/// Draws the back of a pavement, `kerb` above the carriageway.
pub fn draw_pavement_back(b: &mut ItemBuilder, piece: PathPiece, height: f64, kerb: f64) {
    Run {
        piece,
        heights: (height, height),
    }
    .draw(b, kerb);
}

/// Draws a stretch of road: its edges and kerbs, its pavements, its centre line, a
/// section across each open end and the crossings at its junctions.
pub fn draw_piece(b: &mut ItemBuilder, road: &RoadLine, piece: &Piece) -> Result<(), String> {
    let centreline = Centreline::from_parts(
        piece.points.clone(),
        piece.heights.clone(),
        road.corner_radius,
    )?;
    let (half, kerb, pavement) = (road.half_width, road.kerb, road.pavement);
    let junction_at = |first: bool| {
        let p = if first {
            piece.points[0]
        } else {
            piece.points[piece.points.len() - 1]
        };
        format!("({}, {})", short(p.x), short(p.y))
    };
    let misfit = |(first, room): (bool, f64)| {
        format!(
            "the kerb returns of the junction at {} do not fit: they need more straight \
             road than the {} there is along this road; make `kerb_radius` smaller or the \
             road longer",
            junction_at(first),
            short(room)
        )
    };
    for side in [1.0, -1.0] {
        let (from, to) = piece.trims(side, false);
        for run in cut_runs(&centreline.line(side * half)?, from, to).map_err(misfit)? {
            run.draw(b, 0.0);
            if kerb > 0.0 {
                run.draw(b, kerb);
                run.upright_face(b, kerb);
            }
        }
        if pavement > 0.0 {
            let (from, to) = piece.trims(side, true);
            let runs = centreline.line(side * (half + pavement))?;
            for run in cut_runs(&runs, from, to).map_err(misfit)? {
                run.draw(b, kerb);
            }
        }
    }
    let (mouth_start, mouth_end) = piece.mouths();
    let middle = || -> Result<Vec<Run>, String> {
        let runs = centreline.line(0.0)?;
        cut_runs(&runs, mouth_start, mouth_end).map_err(|_| {
            format!(
                "the junctions at {} and {} are too close together for their kerb returns; \
                 make `kerb_radius` smaller or move the roads apart",
                junction_at(true),
                junction_at(false)
            )
        })
    };
    match road.centre_line {
        CentreLine::None => {
            middle()?;
        }
        CentreLine::Solid => {
            for run in middle()? {
                run.draw(b, 0.0);
            }
        }
        CentreLine::Dashed { dash, gap } => {
            let runs = middle()?;
            let lengths: Vec<f64> = runs.iter().map(|run| run.piece.length()).collect();
            let dashes = lengths.iter().sum::<f64>() / (dash.0 + gap.0);
            if dashes > MAX_COUNT as f64 {
                return Err(format!(
                    "the dashed centre line would have about {} dashes, more than {MAX_COUNT}: \
                     make `dash` and `gap` longer",
                    dashes.ceil()
                ));
            }
            for (index, from, to) in dash_spans(&lengths, dash.0, gap.0) {
                runs[index].part(from, to).draw(b, 0.0);
            }
        }
    }
    let last = centreline.points.len() - 1;
    for (end, point, segment) in [(0, 0, 0), (1, last, last - 1)] {
        let across = left_of(centreline.direction(segment));
        let (middle, height) = (centreline.points[point], centreline.heights[point]);
        match piece.ends[end] {
            PieceEnd::Open => draw_end(b, middle, across, height, road),
            PieceEnd::Junction { mouth, .. } => {
                if let Some(crossing) = road.crossing {
                    let outward = if end == 0 {
                        centreline.direction(0)
                    } else {
                        -centreline.direction(segment)
                    };
                    let next = if end == 0 { 1 } else { last - 1 };
                    let room = (centreline.points[next] - middle).norm();
                    let slope = (centreline.heights[next] - height) / room;
                    let start = mouth + crossing.set_back.0;
                    if start + crossing.depth.0 > room {
                        return Err(format!(
                            "the crossing at the junction at {} does not fit: it needs {} of \
                             straight road from the junction, but there is only {}",
                            junction_at(end == 0),
                            short(start + crossing.depth.0),
                            short(room)
                        ));
                    }
                    draw_crossing(b, middle, outward, height, slope, start, half, &crossing);
                }
            }
        }
    }
    Ok(())
}

/// The open end of a road: a line square across the carriageway, stepping up the kerbs
/// onto the pavements.
fn draw_end(
    b: &mut ItemBuilder,
    middle: Vector2<f64>,
    across: Vector2<f64>,
    height: f64,
    road: &RoadLine,
) {
    let (half, kerb, pavement) = (road.half_width, road.kerb, road.pavement);
    let spot = |offset: f64, lift: f64| at(middle + across * offset, height + lift);
    let outer = half + pavement;
    let section = if kerb > 0.0 {
        let mut section = Vec::with_capacity(6);
        if pavement > 0.0 {
            section.push(spot(outer, kerb));
        }
        section.extend([
            spot(half, kerb),
            spot(half, 0.0),
            spot(-half, 0.0),
            spot(-half, kerb),
        ]);
        if pavement > 0.0 {
            section.push(spot(-outer, kerb));
        }
        section
    } else {
        vec![spot(outer, 0.0), spot(-outer, 0.0)]
    };
    b.path(&section, false);
}

/// Where the stripes of a crossing lie across a carriageway `half` wide each side of the
/// centreline: as many whole stripes as fit, with their gaps, centred. Offsets of each
/// stripe's two sides from the centreline.
pub fn stripe_offsets(half: f64, stripe: f64, gap: f64) -> Vec<(f64, f64)> {
    let count = ((2.0 * half + gap) / (stripe + gap)).floor().max(0.0) as usize;
    let used = count as f64 * (stripe + gap) - gap;
    (0..count)
        .map(|k| {
            let from = -used / 2.0 + k as f64 * (stripe + gap);
            (from, from + stripe)
        })
        .collect()
}

/// The stripes of a crossing, each a closed outline on the carriageway, from `start` to
/// `start + depth` along `outward` from the junction's centre `middle`.
#[allow(clippy::too_many_arguments)]
fn draw_crossing(
    b: &mut ItemBuilder,
    middle: Vector2<f64>,
    outward: Vector2<f64>,
    height: f64,
    slope: f64,
    start: f64,
    half: f64,
    crossing: &CrossingSpec,
) {
    let across = left_of(outward);
    let spot = |along: f64, offset: f64| {
        at(
            middle + outward * along + across * offset,
            height + slope * along,
        )
    };
    let end = start + crossing.depth.0;
    for (a, c) in stripe_offsets(half, crossing.stripe.0, crossing.gap.0) {
        b.path(
            &[spot(start, a), spot(end, a), spot(end, c), spot(start, c)],
            true,
        );
    }
}

#[cfg(test)]
mod tests {
    use super::super::super::site::{Site, SiteCurve};
    use super::*;
    use std::f64::consts::FRAC_PI_2;

    fn road(text: &str) -> Result<Site, String> {
        // The scene loader's extensions: `kerb: 0.2` rather than `kerb: Some(0.2)`.
        let spec: RoadSpec = ron::Options::default()
            .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
            .from_str(text)
            .expect("a road as written in a scene");
        let mut site = Site::default();
        let id = site.add_item("road", None);
        let b = ItemBuilder::new(&mut site, id, Placement::in_unit(1.0));
        let line = road_line(&b, &spec)?;
        super::super::super::streets::draw_streets(&mut site, &[line], &[])
            .map_err(|e| e.message)?;
        Ok(site)
    }

    fn segments(site: &Site) -> Vec<(Point3<f64>, Point3<f64>)> {
        site.edges
            .iter()
            .filter_map(|edge| match edge.curve {
                SiteCurve::Segment { start, end } => Some((start, end)),
                SiteCurve::Ellipse(_) => None,
            })
            .collect()
    }

    /// Each arc's centre, radius (checked to be a horizontal circle) and sweep.
    fn arcs(site: &Site) -> Vec<(Point3<f64>, f64, f64)> {
        site.edges
            .iter()
            .filter_map(|edge| match &edge.curve {
                SiteCurve::Ellipse(arc) => {
                    let (u, v) = (arc.u, arc.v);
                    assert!(u.z == 0.0 && v.z == 0.0 && u.dot(&v) == 0.0);
                    assert_eq!(u.norm(), v.norm());
                    Some((arc.centre, u.norm(), arc.sweep))
                }
                SiteCurve::Segment { .. } => None,
            })
            .collect()
    }

    fn has_segment(site: &Site, a: Point3<f64>, b: Point3<f64>) -> bool {
        segments(site).iter().any(|&(s, e)| {
            ((s - a).norm() < 1e-9 && (e - b).norm() < 1e-9)
                || ((s - b).norm() < 1e-9 && (e - a).norm() < 1e-9)
        })
    }

    fn p(x: f64, y: f64, z: f64) -> Point3<f64> {
        Point3::new(x, y, z)
    }

    #[test]
    fn a_straight_road_is_its_two_edges_and_its_ends() {
        let site = road("(points: [(0, 0), (0, 100)], width: 6)").unwrap();
        assert_eq!(site.edges.len(), 4);
        assert!(site.faces.is_empty());
        assert!(has_segment(&site, p(-3.0, 0.0, 0.0), p(-3.0, 100.0, 0.0)));
        assert!(has_segment(&site, p(3.0, 0.0, 0.0), p(3.0, 100.0, 0.0)));
        assert!(has_segment(&site, p(-3.0, 100.0, 0.0), p(3.0, 100.0, 0.0)));
    }

    #[test]
    fn kerbs_stand_between_the_carriageway_and_the_pavements() {
        let site =
            road("(points: [(0, 0), (0, 100)], width: 6, pavement: 2, kerb: 0.125)").unwrap();
        // Each side: the carriageway's edge, the kerb top and the back of the pavement;
        // each end: pavement, kerb, carriageway, kerb, pavement.
        assert_eq!(site.edges.len(), 6 + 10);
        // The two kerb faces, two triangles each.
        assert_eq!(site.faces.len(), 4);
        assert!(has_segment(&site, p(3.0, 0.0, 0.125), p(3.0, 100.0, 0.125)));
        assert!(has_segment(
            &site,
            p(-5.0, 0.0, 0.125),
            p(-5.0, 100.0, 0.125)
        ));
        assert!(has_segment(&site, p(-3.0, 0.0, 0.0), p(-3.0, 0.0, 0.125)));
        assert!(has_segment(
            &site,
            p(3.0, 100.0, 0.125),
            p(5.0, 100.0, 0.125)
        ));
        for face in &site.faces {
            assert!(face.corners.iter().all(|c| c.x.abs() == 3.0), "{face:?}");
        }
    }

    #[test]
    fn a_rounded_corner_gives_concentric_arcs() {
        // East 20 then north 20, centreline radius 5: the arcs' centre is (15, 5), the
        // left edge is inside the turn.
        let site = road(
            "(points: [(0, 0), (20, 0), (20, 20)], width: 4, corner_radius: 5, \
             centre_line: Solid)",
        )
        .unwrap();
        let mut radii: Vec<f64> = arcs(&site).iter().map(|a| a.1).collect();
        radii.sort_by(f64::total_cmp);
        assert_eq!(radii, vec![3.0, 5.0, 7.0]);
        for (centre, _, sweep) in arcs(&site) {
            assert!((centre - p(15.0, 5.0, 0.0)).norm() < 1e-12, "{centre}");
            assert!((sweep - FRAC_PI_2).abs() < 1e-12);
        }
        assert!(has_segment(&site, p(0.0, 2.0, 0.0), p(15.0, 2.0, 0.0)));
        assert!(has_segment(&site, p(22.0, 5.0, 0.0), p(22.0, 20.0, 0.0)));
    }

    #[test]
    fn too_tight_for_the_inner_edge_it_is_mitred() {
        // Radius 1, half width 2: the inner (left) edge has a sharp corner at (18, 2).
        let site =
            road("(points: [(0, 0), (20, 0), (20, 20)], width: 4, corner_radius: 1)").unwrap();
        let arcs = arcs(&site);
        assert_eq!(arcs.len(), 1);
        assert_eq!(arcs[0].1, 3.0);
        assert!(has_segment(&site, p(0.0, 2.0, 0.0), p(18.0, 2.0, 0.0)));
        assert!(has_segment(&site, p(18.0, 2.0, 0.0), p(18.0, 20.0, 0.0)));
    }

    #[test]
    fn without_a_radius_every_corner_is_mitred() {
        let site = road("(points: [(0, 0), (20, 0), (20, 20)], width: 4)").unwrap();
        assert!(arcs(&site).is_empty());
        assert!(has_segment(&site, p(0.0, -2.0, 0.0), p(22.0, -2.0, 0.0)));
        assert!(has_segment(&site, p(22.0, -2.0, 0.0), p(22.0, 20.0, 0.0)));
        assert_eq!(site.edges.len(), 6);
    }

    #[test]
    fn a_sloping_road_keeps_its_corners_level() {
        let site = road(
            "(points: [(0, 0), (20, 0), (20, 20)], elevations: [0, 2, 6], width: 4, \
             corner_radius: 5, centre_line: Solid)",
        )
        .unwrap();
        for (centre, _, _) in arcs(&site) {
            assert_eq!(centre.z, 2.0);
        }
        // The straight parts slope between the ends of the arcs.
        assert!(has_segment(&site, p(0.0, 0.0, 0.0), p(15.0, 0.0, 2.0)));
        assert!(has_segment(&site, p(20.0, 5.0, 2.0), p(20.0, 20.0, 6.0)));
        assert!(has_segment(&site, p(18.0, 20.0, 6.0), p(22.0, 20.0, 6.0)));
    }

    #[test]
    fn dashes_run_on_round_the_corner_as_arcs() {
        // Centreline: 15 straight, a quarter circle of radius 5 (7.854), 15 straight.
        // Dashes of 3 every 5: those at 15 and 20 fall on the arc, the second running on
        // past its end at 22.854 into the straight.
        let site = road(
            "(points: [(0, 0), (20, 0), (20, 20)], width: 4, corner_radius: 5, \
             centre_line: Dashed(dash: 3, gap: 2))",
        )
        .unwrap();
        let dash_arcs: Vec<_> = arcs(&site).into_iter().filter(|a| a.1 == 5.0).collect();
        assert_eq!(dash_arcs.len(), 2);
        let arc_length: f64 = dash_arcs.iter().map(|a| a.1 * a.2.abs()).sum();
        let quarter = 5.0 * FRAC_PI_2;
        assert!(
            (arc_length - (3.0 + quarter - 5.0)).abs() < 1e-9,
            "{arc_length}"
        );
        let total = 15.0 + quarter + 15.0;
        let dash_lines: f64 = segments(&site)
            .iter()
            .filter(|(s, e)| {
                let on_centreline = |q: &Point3<f64>| q.y.abs() < 1e-9 || (q.x - 20.0).abs() < 1e-9;
                on_centreline(s) && on_centreline(e)
            })
            .map(|(s, e)| (e - s).norm())
            .sum();
        // Seven whole dashes and the last cut short by the end of the road.
        let expected = 7.0 * 3.0 + (total - 35.0);
        assert!(
            (arc_length + dash_lines - expected).abs() < 1e-9,
            "{dash_lines}"
        );
        // Edges: three runs on each side, two ends, nine pieces of dashes.
        assert_eq!(site.edges.len(), 6 + 2 + 9);
    }

    #[test]
    fn kerbs_round_a_corner_are_curved_strips() {
        let site =
            road("(points: [(0, 0), (20, 0), (20, 20)], width: 4, kerb: 0.25, corner_radius: 5)")
                .unwrap();
        let pieces = facet_count(FRAC_PI_2);
        assert_eq!(site.faces.len(), 2 * (2 + 2 + 2 * pieces));
        let radius_of = |q: &Point3<f64>| (Vector2::new(q.x, q.y) - Vector2::new(15.0, 5.0)).norm();
        // Only the curved strips lie wholly in the quarter swept by the arcs.
        let curved: Vec<_> = site
            .faces
            .iter()
            .filter(|f| {
                f.corners
                    .iter()
                    .all(|c| c.x > 15.0 - 1e-9 && c.y < 5.0 + 1e-9)
            })
            .collect();
        assert_eq!(curved.len(), 2 * 2 * pieces);
        for face in curved {
            for corner in &face.corners {
                let r = radius_of(corner);
                assert!((r - 3.0).abs() < 1e-9 || (r - 7.0).abs() < 1e-9, "{r}");
            }
        }
    }

    #[test]
    fn mistakes_are_told_in_words() {
        let problem = |text: &str| road(text).unwrap_err();
        let one = problem("(points: [(0, 0)], width: 4)");
        assert!(one.contains("at least two points"), "{one}");
        let repeated = problem("(points: [(0, 0), (5, 5), (5, 5)], width: 4)");
        assert!(repeated.contains("points 2 and 3"), "{repeated}");
        let heights = problem("(points: [(0, 0), (5, 5), (9, 5)], elevations: [0, 1], width: 4)");
        assert!(
            heights.contains("2 heights") && heights.contains("3 points"),
            "{heights}"
        );
        let back = problem("(points: [(0, 0), (10, 0), (5, 0)], width: 4)");
        assert!(
            back.contains("straight back on itself at point 2"),
            "{back}"
        );
        let folded = problem("(points: [(0, 0), (10, 0), (10, 1), (0, 1)], width: 4)");
        assert!(folded.contains("too wide"), "{folded}");
        let dashes =
            problem("(points: [(0, 0), (1e6, 0)], width: 4, centre_line: Dashed(dash: 1, gap: 1))");
        assert!(dashes.contains("dashes"), "{dashes}");
    }

    #[test]
    fn a_corner_that_does_not_fit_is_named() {
        let alone =
            road("(points: [(0, 0), (4, 0), (4, 10)], width: 2, corner_radius: 5)").unwrap_err();
        assert!(alone.contains("corner at point 2 does not fit"), "{alone}");
        assert!(
            alone.contains("from point 1 to point 2 is only 4"),
            "{alone}"
        );
        assert!(alone.contains("needs 5 of straight"), "{alone}");
        // Two right angles 6 apart each need 5 of the stretch between them.
        let shared =
            road("(points: [(0, 0), (10, 0), (10, 6), (20, 6)], width: 2, corner_radius: 5)")
                .unwrap_err();
        assert!(
            shared.contains("corners at points 2 and 3") && shared.contains("only 6"),
            "{shared}"
        );
        // An exact fit is fine.
        road("(points: [(0, 0), (10, 0), (10, 10), (20, 10)], width: 2, corner_radius: 5)")
            .unwrap();
    }

    #[test]
    fn a_crossing_has_as_many_whole_stripes_as_fit_centred_on_the_carriageway() {
        // Worked by hand: a 7 m carriageway (3.5 m each side), stripes and gaps of 0.5 m:
        // floor((7 + 0.5) / 1) = 7 stripes using 6.5 m, so 0.25 m clear at each kerb, the
        // first from -3.25 to -2.75 and the middle one across the centreline.
        let stripes = stripe_offsets(3.5, 0.5, 0.5);
        assert_eq!(stripes.len(), 7);
        for (k, &(from, to)) in stripes.iter().enumerate() {
            let expected = -3.25 + k as f64;
            assert!((from - expected).abs() < 1e-12 && (to - from - 0.5).abs() < 1e-12);
        }
        assert!((stripes[3].0 + stripes[3].1).abs() < 1e-12);
        // Stripes of 0.6 m with gaps of 0.4 m on 6 m: floor(6.4 / 1) = 6 stripes using
        // 5.6 m, 0.2 m clear each side.
        let stripes = stripe_offsets(3.0, 0.6, 0.4);
        assert_eq!(stripes.len(), 6);
        assert!((stripes[0].0 + 2.8).abs() < 1e-12 && (stripes[5].1 - 2.8).abs() < 1e-12);
        // A carriageway narrower than one stripe has none.
        assert!(stripe_offsets(0.2, 0.5, 0.5).is_empty());
    }
}
