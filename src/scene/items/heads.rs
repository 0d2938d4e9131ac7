//! The outline of one opening on its wall: its sill, jambs and head as straight lines and
//! exact arcs, in the wall's own plane (x along the wall, y up from its foot).
//!
//! A head is one of the arch curves of `arch.rs` (the same true circles and ellipses) set
//! on the jambs at the springing; a round window is a whole circle. The drawn edges stay
//! exact curves; the faces that hide (the wall's hole, the reveal's soffit) follow the
//! curves cut into [`facet_count`] flat pieces, as the arcade's do. The surround
//! (architrave) is the same outline grown by its width: each arc about the same centre
//! with its radii that much longer, so the surround of a pointed head is pointed and that
//! of a three-centred head keeps its tangent joints (the centres, the joints and the
//! tangent lie on one line). For an elliptical head the grown curve is the ellipse with
//! both semi-axes longer, which is close to, but not exactly, a curve parallel to the
//! ellipse (a true parallel curve of an ellipse is no ellipse).

use super::super::build::facet_count;
use super::super::numbers::Positive;
use super::arch::{arch_curve, ArcPiece, ArchShape};
use nalgebra::Vector2;
use serde::Deserialize;
use std::f64::consts::{PI, TAU};

/// The head of a row of openings: square (a flat lintel, the default) or one of the arch
/// curves over the opening's width, its crown at the opening's `height`.
#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub enum Head {
    #[default]
    Square,
    Semicircular,
    Segmental {
        rise: Positive,
    },
    /// Equilateral (each arc's radius the opening's width) unless given a `rise` or the
    /// arcs' `radius`.
    Pointed {
        #[serde(default)]
        rise: Option<Positive>,
        #[serde(default)]
        radius: Option<Positive>,
    },
    Elliptical {
        rise: Positive,
    },
    ThreeCentred {
        rise: Positive,
    },
}

impl Head {
    /// The arch curve of a shaped head; `None` for a square one.
    pub fn arch(self) -> Option<ArchShape> {
        Some(match self {
            Head::Square => return None,
            Head::Semicircular => ArchShape::Semicircular,
            Head::Segmental { rise } => ArchShape::Segmental { rise },
            Head::Pointed { rise, radius } => ArchShape::Pointed { rise, radius },
            Head::Elliptical { rise } => ArchShape::Elliptical { rise },
            Head::ThreeCentred { rise } => ArchShape::ThreeCentred { rise },
        })
    }

    /// The name used in scene files, for messages.
    pub fn name(self) -> &'static str {
        match self {
            Head::Square => "Square",
            Head::Semicircular => "Semicircular",
            Head::Segmental { .. } => "Segmental",
            Head::Pointed { .. } => "Pointed",
            Head::Elliptical { .. } => "Elliptical",
            Head::ThreeCentred { .. } => "ThreeCentred",
        }
    }
}

/// One piece of an outline, from `from` to `to` (given exactly, so that pieces meet
/// bit for bit and the faces built on them share their corners).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Piece {
    Line {
        from: Vector2<f64>,
        to: Vector2<f64>,
    },
    /// An arc of a circle or ellipse in the wall's plane (see [`ArcPiece`]), its centre
    /// already in wall coordinates.
    Arc {
        arc: ArcPiece,
        from: Vector2<f64>,
        to: Vector2<f64>,
    },
}

impl Piece {
    #[cfg(test)]
    pub fn from(&self) -> Vector2<f64> {
        match *self {
            Piece::Line { from, .. } | Piece::Arc { from, .. } => from,
        }
    }

    /// Its points from `from` to `to`, an arc cut into [`facet_count`] flat pieces.
    pub fn points(&self) -> Vec<Vector2<f64>> {
        match *self {
            Piece::Line { from, to } => vec![from, to],
            Piece::Arc { arc, from, to } => {
                let count = facet_count(arc.sweep);
                let mut points = vec![from];
                points.extend(
                    (1..count).map(|i| arc.point(arc.start + arc.sweep * i as f64 / count as f64)),
                );
                points.push(to);
                points
            }
        }
    }

    /// Where a level line at height `y` crosses the piece, as distances along the wall.
    fn crossings(&self, y: f64) -> Vec<f64> {
        match *self {
            Piece::Line { from, to } => {
                let (low, high) = (from.y.min(to.y), from.y.max(to.y));
                if from.y == to.y || y < low || y > high {
                    Vec::new()
                } else {
                    vec![from.x + (to.x - from.x) * (y - from.y) / (to.y - from.y)]
                }
            }
            Piece::Arc { arc, .. } => {
                let s = (y - arc.centre.y) / arc.radii.y;
                if !(-1.0..=1.0).contains(&s) {
                    return Vec::new();
                }
                let first = s.asin();
                [first, PI - first]
                    .into_iter()
                    .filter(|&t| within_sweep(t, arc.start, arc.sweep))
                    .map(|t| arc.point(t).x)
                    .collect()
            }
        }
    }

    /// The highest point of the piece.
    fn top(&self) -> f64 {
        match *self {
            Piece::Line { from, to } => from.y.max(to.y),
            Piece::Arc { arc, from, to } => {
                let mut top = from.y.max(to.y);
                if within_sweep(PI / 2.0, arc.start, arc.sweep) {
                    top = top.max(arc.centre.y + arc.radii.y);
                }
                top
            }
        }
    }
}

/// Whether the angle `t` lies on the arc from `start` through `sweep` (positive).
fn within_sweep(t: f64, start: f64, sweep: f64) -> bool {
    (t - start).rem_euclid(TAU) <= sweep + 1e-12 || sweep >= TAU
}

/// The closed outline of an opening, counter-clockwise seen from the front, and the
/// points where a line is drawn across the reveal (corners and creases, not the smooth
/// joints of arcs that share a tangent).
#[derive(Clone, Debug, PartialEq)]
pub struct Outline {
    pub pieces: Vec<Piece>,
    pub creases: Vec<Vector2<f64>>,
}

impl Outline {
    /// The outline as a polygon (each piece's points but its last, which the next piece
    /// begins with).
    pub fn polygon(&self) -> Vec<Vector2<f64>> {
        let mut polygon = Vec::new();
        for piece in &self.pieces {
            let points = piece.points();
            polygon.extend_from_slice(&points[..points.len() - 1]);
        }
        polygon
    }

    /// From the leftmost to the rightmost point where a level line at height `y` crosses
    /// the outline, if it does.
    pub fn span_at(&self, y: f64) -> Option<(f64, f64)> {
        let xs: Vec<f64> = self.pieces.iter().flat_map(|p| p.crossings(y)).collect();
        let left = xs.iter().copied().fold(f64::INFINITY, f64::min);
        let right = xs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        (left < right).then_some((left, right))
    }

    pub fn top(&self) -> f64 {
        self.pieces
            .iter()
            .map(Piece::top)
            .fold(f64::NEG_INFINITY, f64::max)
    }
}

/// The shape of one opening in its wall.
#[derive(Clone, Debug, PartialEq)]
pub enum Shape {
    /// A rectangle, from `left` to `right` and `bottom` to `top`.
    Square,
    /// Jambs up to `top - rise`, then the arch curve to the crown at `top`.
    Arched(ArchShape),
    /// A circle filling the square from `left` to `right` and `bottom` to `top`.
    Round,
}

/// The curve of a shaped head over an opening `width` wide and `height` high, or what is
/// wrong with it: the arch's own limits, or a head that leaves no jamb below it.
pub fn checked_head(head: Head, width: f64, height: f64) -> Result<Option<ArchShape>, String> {
    let Some(shape) = head.arch() else {
        return Ok(None);
    };
    let curve = arch_curve(shape, width).map_err(|e| format!("the head: {e}"))?;
    if curve.rise >= height {
        return Err(format!(
            "a {} head over an opening {width} wide rises {:.4}, which the opening's height \
             ({height}) must exceed (the height is from the sill to the crown); make the \
             opening taller or the head lower",
            head.name(),
            curve.rise
        ));
    }
    Ok(Some(shape))
}

/// The outline of a square-headed opening from `left` to `right` and `bottom` to `top`,
/// grown by `grow` at the sides and the top.
pub fn rectangle((left, right, bottom, top): (f64, f64, f64, f64), grow: f64) -> Outline {
    let line = |from: Vector2<f64>, to: Vector2<f64>| Piece::Line { from, to };
    let (l, r, t) = (left - grow, right + grow, top + grow);
    let corners = [
        Vector2::new(l, bottom),
        Vector2::new(r, bottom),
        Vector2::new(r, t),
        Vector2::new(l, t),
    ];
    Outline {
        pieces: (0..4)
            .map(|i| line(corners[i], corners[(i + 1) % 4]))
            .collect(),
        creases: corners.to_vec(),
    }
}

/// The outline of an opening from `left` to `right` and `bottom` to `top` of the given
/// shape, grown outwards by `grow` (0 for the opening itself, the surround's width for
/// the surround's outer edge). A grown opening keeps its bottom: a surround rises from
/// the sill.
pub fn outline(
    shape: &Shape,
    (left, right, bottom, top): (f64, f64, f64, f64),
    grow: f64,
) -> Result<Outline, String> {
    let line = |from: Vector2<f64>, to: Vector2<f64>| Piece::Line { from, to };
    let (l, r) = (left - grow, right + grow);
    let bottom_left = Vector2::new(l, bottom);
    let bottom_right = Vector2::new(r, bottom);
    Ok(match shape {
        Shape::Square => rectangle((left, right, bottom, top), grow),
        Shape::Round => {
            let centre = Vector2::new((left + right) / 2.0, (bottom + top) / 2.0);
            let radius = (right - left) / 2.0 + grow;
            let foot = centre - Vector2::new(0.0, radius);
            let arc = ArcPiece {
                centre,
                radii: Vector2::new(radius, radius),
                start: -PI / 2.0,
                sweep: TAU,
            };
            Outline {
                pieces: vec![Piece::Arc {
                    arc,
                    from: foot,
                    to: foot,
                }],
                creases: Vec::new(),
            }
        }
        Shape::Arched(shape) => {
            let curve = arch_curve(*shape, right - left)?;
            let middle = (left + right) / 2.0;
            let springing = top - curve.rise;
            let last = curve.pieces.len() - 1;
            let mut arcs: Vec<ArcPiece> = curve
                .pieces
                .iter()
                .map(|p| ArcPiece {
                    centre: p.centre + Vector2::new(middle, springing),
                    radii: p.radii.add_scalar(grow),
                    ..*p
                })
                .collect();
            // The grown curve meets the grown jambs where its first and last arcs cross
            // them (on the springing line, except for a segmental head whose centre is
            // below it).
            let meet =
                |arc: &ArcPiece, x: f64| ((x - arc.centre.x) / arc.radii.x).clamp(-1.0, 1.0).acos();
            let first_start = meet(&arcs[0], r);
            let last_end = meet(&arcs[last], l);
            if last == 0 {
                arcs[0].start = first_start;
                arcs[0].sweep = last_end - first_start;
            } else {
                // The two halves of a grown pointed head meet on the axis, at angles
                // that are not the inner curve's.
                let (first_end, last_start) = if curve.pointed {
                    (meet(&arcs[0], middle), meet(&arcs[last], middle))
                } else {
                    (arcs[0].start + arcs[0].sweep, arcs[last].start)
                };
                arcs[0].start = first_start;
                arcs[0].sweep = first_end - first_start;
                arcs[last].start = last_start;
                arcs[last].sweep = last_end - last_start;
            }
            let right_springing = Vector2::new(r, arcs[0].point(arcs[0].start).y);
            let right_springing = if grow == 0.0 {
                Vector2::new(r, springing)
            } else {
                right_springing
            };
            let left_springing = Vector2::new(l, right_springing.y);
            let mut pieces = vec![
                line(bottom_left, bottom_right),
                line(bottom_right, right_springing),
            ];
            let mut creases = vec![bottom_left, bottom_right, right_springing];
            let mut from = right_springing;
            for (index, arc) in arcs.iter().enumerate() {
                let to = if index == last {
                    left_springing
                } else {
                    arc.point(arc.start + arc.sweep)
                };
                pieces.push(Piece::Arc {
                    arc: *arc,
                    from,
                    to,
                });
                if index < last && curve.pointed {
                    creases.push(to);
                }
                from = to;
            }
            pieces.push(line(left_springing, bottom_left));
            creases.push(left_springing);
            Outline { pieces, creases }
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    const CLOSE: f64 = 1e-12;

    fn assert_near(a: f64, b: f64, eps: f64) {
        assert!((a - b).abs() <= eps, "{a} is not within {eps} of {b}");
    }

    fn arched(head: Head, box_: (f64, f64, f64, f64), grow: f64) -> Outline {
        outline(&Shape::Arched(head.arch().unwrap()), box_, grow).unwrap()
    }

    /// Every piece begins exactly where the one before ends, and the last ends where the
    /// first begins.
    fn assert_closed(outline: &Outline) {
        let pieces = &outline.pieces;
        for (i, piece) in pieces.iter().enumerate() {
            let next = pieces[(i + 1) % pieces.len()];
            let end = *piece.points().last().unwrap();
            assert_eq!(end, next.from(), "piece {i} does not meet the next");
        }
    }

    #[test]
    fn a_semicircular_head_springs_from_the_jambs_and_crowns_at_the_top() {
        // An opening 1 wide from 1 to 3 up: jambs to 2.5, a half circle of radius 0.5.
        let o = arched(Head::Semicircular, (2.0, 3.0, 1.0, 3.0), 0.0);
        assert_closed(&o);
        assert_near(o.top(), 3.0, CLOSE);
        assert_eq!(o.pieces[1].points()[1], Vector2::new(3.0, 2.5));
        assert_eq!(o.span_at(2.0), Some((2.0, 3.0)));
        // Half a radius above the springing the circle is sqrt(1 - 1/4) r across either
        // side of the axis (Pythagoras).
        let (l, r) = o.span_at(2.75).unwrap();
        assert_near(r - 2.5, 0.25 * 3f64.sqrt(), CLOSE);
        assert_near(2.5 - l, 0.25 * 3f64.sqrt(), CLOSE);
        assert!(o.span_at(3.1).is_none());
        // Corners at the sill, and the impost lines at the springings.
        assert_eq!(o.creases.len(), 4);
    }

    #[test]
    fn a_grown_pointed_head_is_the_extrados_of_an_arch_of_constant_depth() {
        // Equilateral head over a span of 2: each arc of radius 2 centred on the far
        // springing (common practice). Grown by 0.25 the arcs keep their centres, radius
        // 2.25, so the outer crown stands sqrt(2.25^2 - 1^2) above the springing
        // (Pythagoras), higher than the inner crown (sqrt 3) plus 0.25.
        let o = arched(
            Head::Pointed {
                rise: None,
                radius: None,
            },
            (0.0, 2.0, 0.0, 4.0),
            0.25,
        );
        assert_closed(&o);
        let springing = 4.0 - 3f64.sqrt();
        assert_near(o.top(), springing + (2.25f64 * 2.25 - 1.0).sqrt(), 1e-12);
        assert!(o.top() > 4.25);
        // The crease at the apex is drawn across the reveal.
        assert_eq!(o.creases.len(), 5);
        // The grown jambs stand 0.25 outside.
        assert_eq!(o.pieces[0].from(), Vector2::new(-0.25, 0.0));
    }

    #[test]
    fn a_grown_segmental_head_meets_its_jambs_above_the_springing() {
        // Span 4 rising 1: radius 2.5 (intersecting chords), centre 1.5 below the springing.
        // Grown by 0.5: radius 3 meets the jamb at x = 2.5 where
        // y = -1.5 + sqrt(9 - 6.25) (Pythagoras).
        let rise = Positive(1.0);
        let o = arched(Head::Segmental { rise }, (-2.0, 2.0, 0.0, 3.0), 0.5);
        assert_closed(&o);
        let jamb_top = 2.0 - 1.5 + (9.0f64 - 6.25).sqrt();
        assert_near(o.pieces[1].points()[1].y, jamb_top, CLOSE);
        assert_near(o.top(), 3.5, CLOSE);
    }

    #[test]
    fn a_round_window_is_one_circle_without_creases() {
        let o = outline(&Shape::Round, (1.0, 3.0, 2.0, 4.0), 0.0).unwrap();
        assert_closed(&o);
        assert!(o.creases.is_empty());
        assert_near(o.top(), 4.0, CLOSE);
        let (l, r) = o.span_at(3.0).unwrap();
        assert_near(l, 1.0, CLOSE);
        assert_near(r, 3.0, CLOSE);
        // 96 pieces to a turn.
        assert_eq!(o.polygon().len(), 96);
    }

    #[test]
    fn a_head_as_tall_as_the_opening_is_refused() {
        let error = checked_head(Head::Semicircular, 2.0, 1.0).unwrap_err();
        assert!(error.contains("taller"), "{error}");
        assert!(checked_head(Head::Semicircular, 2.0, 1.01).is_ok());
        let error = checked_head(
            Head::Segmental {
                rise: Positive(1.5),
            },
            2.0,
            4.0,
        )
        .unwrap_err();
        assert!(error.contains("Pointed"), "{error}");
        assert_eq!(checked_head(Head::Square, 2.0, 0.1), Ok(None));
    }
}
