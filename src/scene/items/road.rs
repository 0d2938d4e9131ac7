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

use super::super::build::{ellipse_points, facet_count, ItemBuilder};
use super::super::numbers::{plan, Finite, Plan, Positive, MAX_COUNT};
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
        let heights = match &spec.elevations {
            None => vec![0.0; n],
            Some(elevations) if elevations.len() == n => elevations.iter().map(|e| e.0).collect(),
            Some(elevations) => {
                return Err(format!(
                    "`elevations` has {} heights but `points` has {n} points: give one \
                     height for each point",
                    elevations.len()
                ))
            }
        };
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
            if let Some(radius) = spec.corner_radius {
                fillets[j] = Fillet::round(points[j - 1], points[j], points[j + 1], radius.0);
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

pub fn build_road(b: &mut ItemBuilder, spec: &RoadSpec) -> Result<(), String> {
    let centreline = Centreline::new(spec)?;
    let half = spec.width.0 / 2.0;
    let kerb = spec.kerb.map_or(0.0, |k| k.0);
    let pavement = spec.pavement.map_or(0.0, |p| p.0);
    for side in [1.0, -1.0] {
        let edge = centreline.line(side * half)?;
        for run in &edge {
            run.draw(b, 0.0);
            if kerb > 0.0 {
                run.draw(b, kerb);
                run.upright_face(b, kerb);
            }
        }
        if pavement > 0.0 {
            for run in centreline.line(side * (half + pavement))? {
                run.draw(b, kerb);
            }
        }
    }
    match spec.centre_line {
        CentreLine::None => {}
        CentreLine::Solid => {
            for run in centreline.line(0.0)? {
                run.draw(b, 0.0);
            }
        }
        CentreLine::Dashed { dash, gap } => {
            let runs = centreline.line(0.0)?;
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
    // The ends: a line square across the carriageway, stepping up the kerbs onto the
    // pavements.
    let last = centreline.points.len() - 1;
    for (point, segment) in [(0, 0), (last, last - 1)] {
        let across = left_of(centreline.direction(segment));
        let (middle, height) = (centreline.points[point], centreline.heights[point]);
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
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::super::super::build::Placement;
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
        let mut b = ItemBuilder::new(&mut site, id, Placement::in_unit(1.0));
        build_road(&mut b, &spec)?;
        Ok(site)
    }

    fn segments(site: &Site) -> Vec<(Point3<f64>, Point3<f64>)> {
        site.edges
            .iter()
            .filter_map(|edge| match edge.curve {
                SiteCurve::Segment { start, end } => Some((start, end)),
                SiteCurve::Ellipse { .. } => None,
            })
            .collect()
    }

    /// Each arc's centre, radius (checked to be a horizontal circle) and sweep.
    fn arcs(site: &Site) -> Vec<(Point3<f64>, f64, f64)> {
        site.edges
            .iter()
            .filter_map(|edge| match edge.curve {
                SiteCurve::Ellipse {
                    centre,
                    u,
                    v,
                    sweep,
                    ..
                } => {
                    assert!(u.z == 0.0 && v.z == 0.0 && u.dot(&v) == 0.0);
                    assert_eq!(u.norm(), v.norm());
                    Some((centre, u.norm(), sweep))
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
}
