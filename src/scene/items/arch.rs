//! `Arch` and `Arcade`: a wall pierced by a row of equal arched openings on piers.

use super::super::build::{facet_count, ItemBuilder};
use super::super::numbers::{default_facing, zero, Count, Finite, Positive};
use super::block::{rectangle_frame, rectangle_plan, Anchor};
use super::standing::{draw_footing, outline_foot};
use nalgebra::{Point3, Vector2, Vector3};
use serde::Deserialize;
use std::f64::consts::PI;

/// The curve of an arch's opening above its springing.
#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub enum ArchShape {
    /// A half circle: the rise is half the span.
    #[default]
    Semicircular,
    /// An arc of a circle less than a half, rising `rise` above the springing.
    Segmental { rise: Positive },
    /// Two arcs meeting at a point (two-centred); equilateral (radius = span) unless a
    /// `rise` greater than half the span, or the arcs' `radius` (more than half the span),
    /// is given.
    Pointed {
        #[serde(default)]
        rise: Option<Positive>,
        #[serde(default)]
        radius: Option<Positive>,
    },
    /// A half ellipse rising `rise`.
    Elliptical { rise: Positive },
    /// Three arcs of 60 degrees each (a basket arch) rising `rise`.
    ThreeCentred { rise: Positive },
}

fn one() -> Count {
    Count(1)
}

/// One arch (`Arch`) or a row of equal arches (`Arcade`) in a wall of piers.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ArcadeSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The wall's front-left corner, or the centre of its plan.
    pub at: Anchor,
    /// The azimuth the front face of the wall faces.
    #[serde(default = "default_facing")]
    pub facing: Finite,
    #[serde(default = "zero")]
    pub base: Finite,
    /// Stands on the scene's ground: `base` is then measured from the lowest ground along
    /// the piers' sides, and the line where each pier meets the ground is drawn.
    #[serde(default)]
    pub on_ground: bool,
    #[serde(default = "one")]
    pub count: Count,
    /// Clear width of each opening.
    pub span: Positive,
    /// Height of the springing (where the curve starts) above the base.
    pub springing: Positive,
    #[serde(default)]
    pub shape: ArchShape,
    /// Width of each pier, the ones at the ends included.
    pub pier: Positive,
    /// Depth of the wall, front face to back face.
    pub thickness: Positive,
    /// Height of the wall's top above the base; by default the apex plus one pier width.
    #[serde(default)]
    pub height: Option<Positive>,
}

/// One arc of an arch's curve, in the plane of the wall: the point at `t` is
/// `centre + (radii.x cos t, radii.y sin t)` in (along the wall, up from the springing)
/// coordinates about the opening's centre line, for t from `start` through `sweep`. A
/// circle has equal radii. Seen from the front, t grows counter-clockwise.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ArcPiece {
    pub centre: Vector2<f64>,
    pub radii: Vector2<f64>,
    pub start: f64,
    pub sweep: f64,
}

impl ArcPiece {
    fn circle(centre: Vector2<f64>, radius: f64, start: f64, sweep: f64) -> ArcPiece {
        ArcPiece {
            centre,
            radii: Vector2::new(radius, radius),
            start,
            sweep,
        }
    }

    pub fn point(&self, t: f64) -> Vector2<f64> {
        self.centre + Vector2::new(self.radii.x * t.cos(), self.radii.y * t.sin())
    }

    #[cfg(test)]
    pub fn start_point(&self) -> Vector2<f64> {
        self.point(self.start)
    }

    #[cfg(test)]
    pub fn end_point(&self) -> Vector2<f64> {
        self.point(self.start + self.sweep)
    }

    /// The unit direction of travel (growing t) at `t`.
    #[cfg(test)]
    pub fn direction(&self, t: f64) -> Vector2<f64> {
        Vector2::new(-self.radii.x * t.sin(), self.radii.y * t.cos()).normalize()
    }
}

/// The curve of one opening above its springing: arcs from the right springing
/// `(span / 2, 0)` over the crown to the left springing `(-span / 2, 0)` (as seen from the
/// front), each beginning where the one before ends.
#[derive(Clone, Debug, PartialEq)]
pub struct ArchCurve {
    pub pieces: Vec<ArcPiece>,
    pub half_span: f64,
    /// Height of the crown above the springing.
    pub rise: f64,
    /// Whether the two halves meet at an angle at the crown, a crease in the soffit.
    pub pointed: bool,
}

impl ArchCurve {
    /// Points along the curve, from the right springing to the left, each arc cut into
    /// [`facet_count`] flat pieces: the edge of the faces that meet along the curve. The
    /// springings are put exactly on the springing line, and each joint is given once, so
    /// that the faces of the jambs, the soffit and the wall share their corners.
    pub fn facet_points(&self) -> Vec<Vector2<f64>> {
        let mut points = Vec::new();
        for (index, piece) in self.pieces.iter().enumerate() {
            let count = facet_count(piece.sweep);
            let first = if index == 0 { 0 } else { 1 };
            points.extend(
                (first..=count)
                    .map(|i| piece.point(piece.start + piece.sweep * i as f64 / count as f64)),
            );
        }
        let last = points.len() - 1;
        points[0] = Vector2::new(self.half_span, 0.0);
        points[last] = Vector2::new(-self.half_span, 0.0);
        points
    }
}

/// Radius of the circular arc on a chord `span` long that rises `rise` at its middle. By
/// the intersecting-chords theorem (any geometry handbook), the two parts of the
/// diameter through the middle of the chord multiply to the square of the half-chord:
/// `rise (2 r - rise) = (span / 2)^2`.
pub fn segmental_radius(span: f64, rise: f64) -> f64 {
    (span * span / 4.0 + rise * rise) / (2.0 * rise)
}

/// Radius of each arc of a pointed arch of half-span `half` rising `rise`. Each arc is
/// centred on the springing line at `r - half` beyond the axis on the far side, passes
/// through the near springing, and reaches the apex on the axis:
/// `r^2 = (r - half)^2 + rise^2` (Pythagoras).
pub fn pointed_radius(half: f64, rise: f64) -> f64 {
    (half * half + rise * rise) / (2.0 * half)
}

/// Rise of a pointed arch of half-span `half` whose arcs have `radius`: each arc's centre
/// lies on the springing line `radius - half` beyond the axis, and the apex on the axis is
/// `radius` from it, so `rise^2 + (radius - half)^2 = radius^2` (Pythagoras), the inverse
/// of [`pointed_radius`].
pub fn pointed_rise(half: f64, radius: f64) -> f64 {
    // radius^2 - (radius - half)^2, factored as a difference of squares so that a radius
    // much longer than the span loses no digits.
    (half * (2.0 * radius - half)).sqrt()
}

/// The radii (small, big) of a three-centred arch of half-span `half` rising `rise`, with
/// arcs of 60 degrees each. The small arcs stand on the springing line at `half - small`
/// from the axis; the big arc's centre is on the axis, on the line from a small centre
/// through its joint at 60 degrees (so the arcs share a tangent there) and `big` from
/// that joint. Its centre on the axis gives `small + big = 2 half`; its height,
/// `rise - big = (small - big) sin 60`, gives
/// `big = (sqrt 3 half - rise) / (sqrt 3 - 1)`.
pub fn three_centred_radii(half: f64, rise: f64) -> (f64, f64) {
    let root3 = 3f64.sqrt();
    let big = (root3 * half - rise) / (root3 - 1.0);
    (2.0 * half - big, big)
}

/// The curve of an arch of `span` in the given shape, or what is wrong with the shape.
pub fn arch_curve(shape: ArchShape, span: f64) -> Result<ArchCurve, String> {
    let half = span / 2.0;
    let curve = |pieces: Vec<ArcPiece>, rise: f64, pointed: bool| ArchCurve {
        pieces,
        half_span: half,
        rise,
        pointed,
    };
    Ok(match shape {
        ArchShape::Semicircular => curve(
            vec![ArcPiece::circle(Vector2::zeros(), half, 0.0, PI)],
            half,
            false,
        ),
        ArchShape::Segmental { rise } => {
            let rise = rise.0;
            if rise > half {
                return Err(format!(
                    "a segmental arch rises at most half its span ({half}), not {rise}; \
                     for a higher arch use Semicircular, Elliptical or Pointed"
                ));
            }
            let radius = segmental_radius(span, rise);
            // The springings are where the circle crosses the springing line, below its
            // centre by `radius - rise`.
            let start = (radius - rise).atan2(half);
            curve(
                vec![ArcPiece::circle(
                    Vector2::new(0.0, rise - radius),
                    radius,
                    start,
                    PI - 2.0 * start,
                )],
                rise,
                false,
            )
        }
        ArchShape::Pointed { rise, radius } => {
            // Equilateral unless told: each arc's radius is the span, so the apex and the
            // two springings make an equilateral triangle and the apex stands
            // span sin(60 degrees) above the springing (common practice).
            let (rise, radius) = match (rise, radius) {
                (Some(_), Some(_)) => {
                    return Err("a pointed arch is given by its `rise` or by its `radius`, \
                                not both"
                        .to_owned())
                }
                (None, Some(radius)) => {
                    let radius = radius.0;
                    if radius <= half {
                        return Err(format!(
                            "a pointed arch's arcs need a radius of more than half its span \
                             ({half}), not {radius}: a shorter one cannot reach from a \
                             springing to the crown, and one of half the span is Semicircular"
                        ));
                    }
                    (pointed_rise(half, radius), radius)
                }
                (rise, None) => {
                    let rise = rise.map_or(span * (PI / 3.0).sin(), |r| r.0);
                    if rise <= half {
                        return Err(format!(
                            "a pointed arch rises more than half its span ({half}), not \
                             {rise}; for a lower arch use Segmental, ThreeCentred or \
                             Elliptical"
                        ));
                    }
                    (rise, pointed_radius(half, rise))
                }
            };
            let reach = radius - half;
            // The angle at each centre between the springing line and the apex.
            let to_apex = rise.atan2(reach);
            curve(
                vec![
                    ArcPiece::circle(Vector2::new(-reach, 0.0), radius, 0.0, to_apex),
                    ArcPiece::circle(Vector2::new(reach, 0.0), radius, PI - to_apex, to_apex),
                ],
                rise,
                true,
            )
        }
        ArchShape::Elliptical { rise } => curve(
            vec![ArcPiece {
                centre: Vector2::zeros(),
                radii: Vector2::new(half, rise.0),
                start: 0.0,
                sweep: PI,
            }],
            rise.0,
            false,
        ),
        ArchShape::ThreeCentred { rise } => {
            let rise = rise.0;
            let lowest = (2.0 - 3f64.sqrt()) * half;
            if rise <= lowest || rise > half {
                return Err(format!(
                    "a three-centred arch over a span of {span} rises more than {lowest:.4} \
                     and at most {half} (half the span), not {rise}; for another rise use \
                     Elliptical, or Segmental (lower) or Pointed (higher)"
                ));
            }
            let (small, big) = three_centred_radii(half, rise);
            let sixty = PI / 3.0;
            curve(
                vec![
                    ArcPiece::circle(Vector2::new(half - small, 0.0), small, 0.0, sixty),
                    ArcPiece::circle(Vector2::new(0.0, rise - big), big, sixty, sixty),
                    ArcPiece::circle(Vector2::new(small - half, 0.0), small, 2.0 * sixty, sixty),
                ],
                rise,
                false,
            )
        }
    })
}

/// Draws the arcade. Its local frame is a block's (see [`rectangle_frame`]): x along the
/// front face from its left end, y from the front face (y = 0) back to the back face
/// (y = thickness), z up from the base.
pub fn build_arcade(b: &mut ItemBuilder, spec: &ArcadeSpec) -> Result<(), String> {
    let span = spec.span.0;
    let half = span / 2.0;
    let springing = spec.springing.0;
    let pier = spec.pier.0;
    let thickness = spec.thickness.0;
    let count = spec.count.0 as usize;
    let curve = arch_curve(spec.shape, span)?;
    let apex = springing + curve.rise;
    let height = match spec.height {
        None => apex + pier,
        Some(h) if h.0 > apex => h.0,
        Some(h) => {
            return Err(format!(
                "the top of the wall (`height`, {}) must be above the apex of the arches ({apex})",
                h.0
            ))
        }
    };
    let length = count as f64 * span + (count + 1) as f64 * pier;
    // A pier or span below a billionth of the length vanishes in the arithmetic: openings
    // then share corners and triangulating the wall took hours (found by fuzzing: 4,000
    // arches on piers of 2e-305 m).
    let least = 1e-9 * length;
    if pier < least || span < least {
        return Err(format!(
            "piers ({pier}) and spans ({span}) must each be at least a billionth of the arcade's length ({length:.3}), {least:.3e}"
        ));
    }
    let (corner, turn) = rectangle_frame(spec.at, length, thickness, spec.facing.0);
    let pier_starts: Vec<f64> = (0..=count).map(|i| (span + pier) * i as f64).collect();
    // What stands on the ground is the piers: the openings between them reach down to
    // the base with nothing across their feet.
    let piers: Vec<Vec<Vector2<f64>>> = pier_starts
        .iter()
        .map(|&start| {
            rectangle_plan(pier, thickness)
                .into_iter()
                .map(|p| p + Vector2::new(start, 0.0))
                .collect()
        })
        .collect();
    let frame = b
        .placement()
        .then_move(Vector3::new(corner.x, corner.y, 0.0), turn);
    let mut base = f64::INFINITY;
    for plan in &piers {
        base = base.min(outline_foot(
            b,
            &frame,
            plan,
            spec.base.0,
            spec.on_ground,
            None,
        )?);
    }
    b.move_by(Vector3::new(corner.x, corner.y, base), turn);
    for plan in &piers {
        draw_footing(b, plan, spec.on_ground, None)?;
    }

    let centres: Vec<f64> = (0..count)
        .map(|i| pier + half + (span + pier) * i as f64)
        .collect();
    let facets = curve.facet_points();
    let at = |along: f64, y: f64, up: f64| Point3::new(along, y, up);
    // The facet points of an opening's curve on the face at `y`, right to left.
    let curve_on = |centre: f64, y: f64| -> Vec<Point3<f64>> {
        facets
            .iter()
            .map(|p| at(centre + p.x, y, springing + p.y))
            .collect()
    };

    for y in [0.0, thickness] {
        // The face: the foot broken by the openings, each opening up one jamb, over the
        // curve and down the other; then the end, the top and the other end.
        let mut outline = vec![at(0.0, y, 0.0)];
        for &centre in &centres {
            outline.push(at(centre - half, y, 0.0));
            outline.extend(curve_on(centre, y).into_iter().rev());
            outline.push(at(centre + half, y, 0.0));
        }
        outline.extend([
            at(length, y, 0.0),
            at(length, y, height),
            at(0.0, y, height),
        ]);
        b.face(&outline, &[]);

        b.segment(at(0.0, y, 0.0), at(0.0, y, height));
        b.segment(at(length, y, 0.0), at(length, y, height));
        b.segment(at(0.0, y, height), at(length, y, height));
        for &start in &pier_starts {
            b.segment(at(start, y, 0.0), at(start + pier, y, 0.0));
        }
        for &centre in &centres {
            for side in [-half, half] {
                b.segment(at(centre + side, y, 0.0), at(centre + side, y, springing));
            }
            for piece in &curve.pieces {
                b.ellipse(
                    at(centre + piece.centre.x, y, springing + piece.centre.y),
                    Vector3::x() * piece.radii.x,
                    Vector3::z() * piece.radii.y,
                    piece.start,
                    piece.sweep,
                );
            }
        }
    }

    // Across the thickness: the corners of the top and the feet of the ends.
    for end in [0.0, length] {
        b.segment(at(end, 0.0, height), at(end, thickness, height));
        b.segment(at(end, 0.0, 0.0), at(end, thickness, 0.0));
    }
    for &centre in &centres {
        for side in [-half, half] {
            let x = centre + side;
            // The impost line at the springing, and the foot of the jamb.
            b.segment(at(x, 0.0, springing), at(x, thickness, springing));
            b.segment(at(x, 0.0, 0.0), at(x, thickness, 0.0));
            b.face(
                &[
                    at(x, 0.0, 0.0),
                    at(x, thickness, 0.0),
                    at(x, thickness, springing),
                    at(x, 0.0, springing),
                ],
                &[],
            );
        }
        if curve.pointed {
            // The two halves of the soffit meet at an angle along the crown.
            b.segment(at(centre, 0.0, apex), at(centre, thickness, apex));
        }
        b.strip(&curve_on(centre, 0.0), &curve_on(centre, thickness));
    }

    // The top, the ends, and the feet of the piers close the solid.
    let box_side = |x0: f64, x1: f64, z: f64| {
        [
            at(x0, 0.0, z),
            at(x1, 0.0, z),
            at(x1, thickness, z),
            at(x0, thickness, z),
        ]
    };
    b.face(&box_side(0.0, length, height), &[]);
    for &start in &pier_starts {
        b.face(&box_side(start, start + pier, 0.0), &[]);
    }
    for end in [0.0, length] {
        b.face(
            &[
                at(end, 0.0, 0.0),
                at(end, thickness, 0.0),
                at(end, thickness, height),
                at(end, 0.0, height),
            ],
            &[],
        );
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::super::super::site::{Site, SiteCurve};
    use super::super::checks::{
        assert_bounds, assert_faces_within, bounds, built, edge_counts, edge_points, unpaired_sides,
    };
    use super::*;

    const CLOSE: f64 = 1e-12;

    fn near(p: Vector2<f64>, q: Vector2<f64>) -> bool {
        (p - q).norm() < CLOSE
    }

    /// The checks every arch curve must pass: it runs from the right springing to the left
    /// without a break, and its highest point is the crown, `rise` up on the axis.
    fn assert_well_formed(curve: &ArchCurve, half: f64, rise: f64) {
        let pieces = &curve.pieces;
        assert!(near(pieces[0].start_point(), Vector2::new(half, 0.0)));
        assert!(near(
            pieces[pieces.len() - 1].end_point(),
            Vector2::new(-half, 0.0)
        ));
        for pair in pieces.windows(2) {
            assert!(
                near(pair[0].end_point(), pair[1].start_point()),
                "{pair:?} do not meet"
            );
        }
        assert!((curve.rise - rise).abs() < CLOSE);
        // The middle of a symmetric curve: the middle of its middle arc, or the joint
        // between its two halves.
        let middle = pieces.len() / 2;
        let crown = if pieces.len() % 2 == 1 {
            let piece = pieces[middle];
            piece.point(piece.start + piece.sweep / 2.0)
        } else {
            pieces[middle].start_point()
        };
        assert!(near(crown, Vector2::new(0.0, rise)), "crown at {crown}");
        let samples = 1000;
        for piece in pieces {
            for i in 0..=samples {
                let p = piece.point(piece.start + piece.sweep * i as f64 / samples as f64);
                assert!(p.y <= rise + CLOSE && p.y >= -CLOSE, "{p} outside the rise");
            }
        }
    }

    #[test]
    fn semicircle_is_a_half_circle_on_the_springing_line() {
        let curve = arch_curve(ArchShape::Semicircular, 4.0).unwrap();
        assert_eq!(curve.pieces.len(), 1);
        assert_eq!(curve.pieces[0].radii, Vector2::new(2.0, 2.0));
        assert_eq!(curve.pieces[0].centre, Vector2::zeros());
        assert_well_formed(&curve, 2.0, 2.0);
        assert!(!curve.pointed);
    }

    #[test]
    fn segmental_radius_follows_the_intersecting_chords() {
        // Intersecting-chords theorem (any geometry handbook): on a chord 4 long rising 1,
        // 2 x 2 = 1 x (2 r - 1), so r = 2.5.
        assert!((segmental_radius(4.0, 1.0) - 2.5).abs() < CLOSE);
        let (span, rise) = (5.0, 1.3);
        let r = segmental_radius(span, rise);
        assert!(((span / 2.0).powi(2) - rise * (2.0 * r - rise)).abs() < CLOSE);
        // A rise of half the span is a half circle.
        assert!((segmental_radius(4.0, 2.0) - 2.0).abs() < CLOSE);
    }

    #[test]
    fn segmental_arch_runs_between_the_springings_through_the_crown() {
        let curve = arch_curve(
            ArchShape::Segmental {
                rise: Positive(1.0),
            },
            4.0,
        )
        .unwrap();
        let piece = curve.pieces[0];
        // Centre 2.5 - 1 below the springing line; the springings are 2 across and 1.5
        // down from it, at atan(1.5 / 2) from the horizontal.
        assert!(near(piece.centre, Vector2::new(0.0, -1.5)));
        assert!((piece.start - 1.5f64.atan2(2.0)).abs() < CLOSE);
        assert_well_formed(&curve, 2.0, 1.0);
    }

    #[test]
    fn equilateral_pointed_arch_has_radius_span_and_apex_at_span_sin_60() {
        let span = 3.0;
        let curve = arch_curve(
            ArchShape::Pointed {
                rise: None,
                radius: None,
            },
            span,
        )
        .unwrap();
        // Equilateral pointed arch: each arc's radius is the span and the apex stands
        // span sin(60 deg) above the springing (common practice).
        let rise = span * 3f64.sqrt() / 2.0;
        assert_well_formed(&curve, 1.5, rise);
        for piece in &curve.pieces {
            assert!((piece.radii.x - span).abs() < CLOSE);
        }
        // Each arc is centred on the opposite springing.
        assert!(near(curve.pieces[0].centre, Vector2::new(-1.5, 0.0)));
        assert!(near(curve.pieces[1].centre, Vector2::new(1.5, 0.0)));
        assert!(curve.pointed);
    }

    #[test]
    fn pointed_arch_of_given_rise() {
        // Half-span 2 rising 4: r = (4 + 16) / 4 = 5, centres 3 beyond the axis, and the
        // apex 3-4-5 (Pythagoras) from each centre.
        assert!((pointed_radius(2.0, 4.0) - 5.0).abs() < CLOSE);
        let curve = arch_curve(
            ArchShape::Pointed {
                rise: Some(Positive(4.0)),
                radius: None,
            },
            4.0,
        )
        .unwrap();
        assert!(near(curve.pieces[0].centre, Vector2::new(-3.0, 0.0)));
        assert_well_formed(&curve, 2.0, 4.0);
        // The halves meet at an angle: their directions at the apex differ.
        let [right, left] = [curve.pieces[0], curve.pieces[1]];
        let arriving = right.direction(right.start + right.sweep);
        let leaving = left.direction(left.start);
        assert!(arriving.dot(&leaving) < 0.99);
    }

    #[test]
    fn pointed_arch_of_given_radius() {
        // Each arc is centred on the springing line r - s/2 beyond the axis and reaches the
        // apex on the axis, so rise^2 + (r - s/2)^2 = r^2 (plane geometry, Pythagoras):
        // span 4, radius 5 rises sqrt(25 - 9) = 4, the arch of given rise above.
        assert!((pointed_rise(2.0, 5.0) - 4.0).abs() < CLOSE);
        let curve = arch_curve(
            ArchShape::Pointed {
                rise: None,
                radius: Some(Positive(5.0)),
            },
            4.0,
        )
        .unwrap();
        assert!(near(curve.pieces[0].centre, Vector2::new(-3.0, 0.0)));
        for piece in &curve.pieces {
            assert!((piece.radii.x - 5.0).abs() < CLOSE);
        }
        assert_well_formed(&curve, 2.0, 4.0);
        // A radius equal to the span is the equilateral arch: rise s sin 60 degrees.
        let by_radius = |radius: f64| {
            arch_curve(
                ArchShape::Pointed {
                    rise: None,
                    radius: Some(Positive(radius)),
                },
                3.0,
            )
        };
        assert!((by_radius(3.0).unwrap().rise - 1.5 * 3f64.sqrt()).abs() < CLOSE);
        // No longer than half the span: no arc reaches the crown (or a half circle).
        for short in [1.5, 1.2] {
            let error = by_radius(short).unwrap_err();
            assert!(error.contains("more than half its span (1.5)"), "{error}");
        }
        let both = arch_curve(
            ArchShape::Pointed {
                rise: Some(Positive(4.0)),
                radius: Some(Positive(5.0)),
            },
            4.0,
        )
        .unwrap_err();
        assert!(both.contains("not both"), "{both}");
    }

    #[test]
    fn elliptical_arch_is_a_half_ellipse() {
        let curve = arch_curve(
            ArchShape::Elliptical {
                rise: Positive(0.8),
            },
            4.0,
        )
        .unwrap();
        assert_eq!(curve.pieces[0].radii, Vector2::new(2.0, 0.8));
        assert_well_formed(&curve, 2.0, 0.8);
    }

    #[test]
    fn three_centred_radii_meet_the_span_and_the_rise() {
        // A rise of half the span gives equal radii: the half circle.
        let (small, big) = three_centred_radii(2.0, 2.0);
        assert!((small - 2.0).abs() < CLOSE && (big - 2.0).abs() < CLOSE);
        // Half-span 3, rise 2: the big centre on the axis (small + big = 6) and the arcs
        // tangent inside each other at the joint, so the centres are big - small apart
        // (circles touching internally, any geometry handbook) along the 60-degree line.
        let (small, big) = three_centred_radii(3.0, 2.0);
        assert!((small + big - 6.0).abs() < CLOSE);
        let small_centre = Vector2::new(3.0 - small, 0.0);
        let big_centre = Vector2::new(0.0, 2.0 - big);
        assert!(((big_centre - small_centre).norm() - (big - small)).abs() < CLOSE);
        let along = (small_centre - big_centre).normalize();
        assert!(near(along, Vector2::new(0.5, 3f64.sqrt() / 2.0)));
    }

    #[test]
    fn three_centred_arch_is_tangent_continuous() {
        let curve = arch_curve(
            ArchShape::ThreeCentred {
                rise: Positive(2.0),
            },
            6.0,
        )
        .unwrap();
        assert_eq!(curve.pieces.len(), 3);
        assert_well_formed(&curve, 3.0, 2.0);
        for pair in curve.pieces.windows(2) {
            let arriving = pair[0].direction(pair[0].start + pair[0].sweep);
            let leaving = pair[1].direction(pair[1].start);
            assert!(near(arriving, leaving), "{arriving} then {leaving}");
        }
        for piece in &curve.pieces {
            assert!((piece.sweep - PI / 3.0).abs() < CLOSE);
        }
        assert!(!curve.pointed);
    }

    #[test]
    fn shapes_that_cannot_be_drawn_are_refused_in_words() {
        let refused = |shape: ArchShape| arch_curve(shape, 4.0).unwrap_err();
        let error = refused(ArchShape::Segmental {
            rise: Positive(2.5),
        });
        assert!(error.contains("Pointed"), "{error}");
        let error = refused(ArchShape::Pointed {
            rise: Some(Positive(2.0)),
            radius: None,
        });
        assert!(error.contains("Segmental"), "{error}");
        // (2 - sqrt 3) x 2 = 0.536: a rise of 0.5 is too flat for 60-degree arcs.
        for rise in [0.5, 2.1] {
            let error = refused(ArchShape::ThreeCentred {
                rise: Positive(rise),
            });
            assert!(error.contains("Elliptical"), "{error}");
        }
    }

    /// Arches 2 wide springing at 3 on piers 1 wide, in a wall 0.5 thick.
    fn arcade(count: u32, shape: ArchShape) -> ArcadeSpec {
        ArcadeSpec {
            label: None,
            layer: None,
            at: Anchor::Corner(Finite(0.0), Finite(0.0)),
            facing: default_facing(),
            base: zero(),
            on_ground: false,
            count: Count(count),
            span: Positive(2.0),
            springing: Positive(3.0),
            shape,
            pier: Positive(1.0),
            thickness: Positive(0.5),
            height: None,
        }
    }

    fn build(spec: &ArcadeSpec) -> Result<Site, String> {
        built("arcade", |b| build_arcade(b, spec))
    }

    #[test]
    fn a_half_circle_is_cut_into_48_facets() {
        // FACET_ANGLE is a 96th of a turn.
        assert_eq!(facet_count(PI), 48);
    }

    #[test]
    fn single_arch_edges_and_faces_counted_by_hand() {
        let site = build(&arcade(1, ArchShape::Semicircular)).unwrap();
        // On each face: the arch, two jambs, two ends, the top, the feet of two piers
        // (1 + 2 + 2 + 1 + 2 = 8). Across the thickness: the top and foot at each end, the
        // impost line and the foot of each jamb (4 + 4). 16 + 8 = 24, of which 2 arcs.
        assert_eq!(edge_counts(&site), (22, 2));
        // Each face is one polygon of 4 corners, two feet and the 49 points of the
        // curve: 55 corners, 53 triangles. The soffit: 48 quads, 96 triangles. Two
        // jambs, the top, two ends and two pier feet: 7 rectangles, 14 triangles.
        // 2 x 53 + 96 + 14 = 216.
        assert_eq!(site.faces.len(), 216);
    }

    #[test]
    fn three_arch_arcade_edges_and_faces_counted_by_hand() {
        let site = build(&arcade(3, ArchShape::Semicircular)).unwrap();
        // On each face: 3 arches, 6 jambs, 2 ends, the top and 4 pier feet (16). Across:
        // 4 at the ends, 6 impost lines and 6 jamb feet (16). 32 + 16 = 48, 6 of them arcs.
        assert_eq!(edge_counts(&site), (42, 6));
        // Each face: 4 + 3 x 51 = 157 corners, 155 triangles. Soffits 3 x 96. Jambs 6,
        // top 1, ends 2, pier feet 4: 13 rectangles, 26 triangles. 310 + 288 + 26 = 624.
        assert_eq!(site.faces.len(), 624);
    }

    #[test]
    fn pointed_arches_draw_the_crease_along_the_crown() {
        let site = build(&arcade(
            1,
            ArchShape::Pointed {
                rise: Some(Positive(2.0)),
                radius: None,
            },
        ))
        .unwrap();
        // As for the half circle, with two arcs on each face and the crown line.
        assert_eq!(edge_counts(&site), (23, 4));
    }

    #[test]
    fn arcade_fills_its_box_and_closes() {
        // 3 arches: 3 x 2 + 4 x 1 = 10 long; top at the apex (3 + 1) plus a pier, 5.
        for shape in [
            ArchShape::Semicircular,
            ArchShape::Segmental {
                rise: Positive(0.6),
            },
            ArchShape::Pointed {
                rise: None,
                radius: None,
            },
            ArchShape::Elliptical {
                rise: Positive(1.4),
            },
            ArchShape::ThreeCentred {
                rise: Positive(0.7),
            },
        ] {
            let spec = arcade(3, shape);
            let site = build(&spec).unwrap();
            let rise = arch_curve(shape, 2.0).unwrap().rise;
            let top = 3.0 + rise + 1.0;
            let box_ = bounds(&edge_points(&site));
            assert_bounds(box_, [0.0, 0.0, 0.0], [10.0, 0.5, top], 1e-9);
            assert_faces_within(&site, box_, 1e-9);
            assert_eq!(unpaired_sides(&site), 0, "{shape:?} is not closed");
            // The arcs reach the apex, springing + rise, and no higher.
            let arcs = Site {
                edges: site
                    .edges
                    .iter()
                    .filter(|e| matches!(e.curve, SiteCurve::Ellipse(_)))
                    .collect(),
                ..Site::default()
            };
            let highest_arc = bounds(&edge_points(&arcs)).1.z;
            assert!(
                (highest_arc - (3.0 + rise)).abs() < 1e-6,
                "{shape:?}: {highest_arc}"
            );
        }
    }

    #[test]
    fn the_top_must_clear_the_apex() {
        let mut spec = arcade(1, ArchShape::Semicircular);
        spec.height = Some(Positive(4.0));
        let error = build(&spec).unwrap_err();
        assert!(error.contains("apex"), "{error}");
        spec.height = Some(Positive(4.2));
        assert!(build(&spec).is_ok());
    }

    #[test]
    fn arcade_is_placed_by_its_centre_and_facing() {
        // Facing east, centred on (10, 20): the wall runs north and south, 4 long and 0.5
        // thick, on a base 2 up.
        let mut spec = arcade(1, ArchShape::Semicircular);
        spec.at = Anchor::Centre(Finite(10.0), Finite(20.0));
        spec.facing = Finite(90.0);
        spec.base = Finite(2.0);
        let site = build(&spec).unwrap();
        let box_ = bounds(&edge_points(&site));
        assert_bounds(box_, [9.75, 18.0, 2.0], [10.25, 22.0, 7.0], 1e-9);
    }
}
