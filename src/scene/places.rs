//! Round places: a circle of kerb (with, for a roundabout, a round island in it) where
//! roads end. Each arm's kerb turns onto the circle on a return: the circle of the kerb
//! radius tangent to the arm's kerb line and touching the place's circle from outside (a
//! circle tangent to a line and a circle: its centre lies on the parallel to the line at
//! the radius and on the concentric circle of the two radii summed, the locus
//! construction of any geometry handbook). The backs of the pavements turn the same way
//! round the outer circle, the centre lines stop at each arm's mouth (where its returns
//! end), and the place is level at its own height.

use super::build::{ItemBuilder, Placement};
use super::items::plan::{left_of, PathPiece};
use super::items::{draw_kerb, draw_pavement_back, PieceEnd, PlaceLine, RoadLine};
use super::site::{ItemInfo, Site};
use super::streets::{angle_between, Culprit, StreetError};
use nalgebra::Vector2;
use std::f64::consts::TAU;

/// Radians: kerb arcs shorter than this round the circle are left out (arms that meet).
const TOUCH: f64 = 1e-9;

/// A return joining a straight line to a circle, tangent to both.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Return {
    /// The return's centre (on the line itself for a sharp corner, radius 0).
    pub centre: Vector2<f64>,
    pub radius: f64,
    /// How far along the line, from its given point, the return leaves it.
    pub along: f64,
    /// Where the return leaves the line.
    pub on_line: Vector2<f64>,
    /// Where it meets the circle.
    pub on_circle: Vector2<f64>,
}

impl Return {
    /// The return as an arc from the line to the circle, the short way round; none for a
    /// sharp corner.
    pub fn arc(&self) -> Option<PathPiece> {
        if self.radius <= 0.0 {
            return None;
        }
        let (from, to) = (self.on_line - self.centre, self.on_circle - self.centre);
        Some(PathPiece::Arc {
            centre: self.centre,
            radius: self.radius,
            start_angle: from.y.atan2(from.x),
            sweep: from.perp(&to).atan2(from.dot(&to)),
        })
    }
}

/// The return of radius `radius` (0: a sharp corner) from the line through `on` along the
/// unit `along` onto the circle (`centre`, `circle`), on the side `away` (a unit normal
/// of the line) and touching the circle from outside, beyond it along the line. Its centre
/// is `radius` from the line towards `away` and `circle + radius` from the circle's centre;
/// `None` when no such point exists (the line passes the circle too far out).
pub fn line_circle_return(
    centre: Vector2<f64>,
    circle: f64,
    on: Vector2<f64>,
    along: Vector2<f64>,
    away: Vector2<f64>,
    radius: f64,
) -> Option<Return> {
    // |w + along t| = circle + radius, w from the circle's centre to the parallel line.
    let w = on + away * radius - centre;
    let reach = circle + radius;
    let b = w.dot(&along);
    let discriminant = b * b - w.norm_squared() + reach * reach;
    if discriminant < 0.0 {
        return None;
    }
    let t = -b + discriminant.sqrt();
    let middle = on + away * radius + along * t;
    Some(Return {
        centre: middle,
        radius,
        along: t,
        on_line: on + along * t,
        on_circle: centre + (middle - centre) * (circle / reach),
    })
}

/// A road end in a round place.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PlaceArm {
    pub place: usize,
    pub road: usize,
    /// Whether it is the road's first point (or its last).
    pub first: bool,
}

fn place_error(place: usize, message: String) -> StreetError {
    StreetError {
        at: Culprit::Place(place),
        message,
    }
}

/// A length for a message: to a thousandth, without trailing zeros.
fn short(length: f64) -> String {
    let text = format!("{length:.3}");
    text.trim_end_matches('0').trim_end_matches('.').to_owned()
}

/// Finds each place's arms among the roads (by label) and cuts each arm's end back to the
/// place's circle, at the place's height.
pub fn attach_arms(
    roads: &mut [RoadLine],
    places: &[PlaceLine],
    items: &[ItemInfo],
) -> Result<Vec<PlaceArm>, StreetError> {
    let mut arms = Vec::new();
    for (p, place) in places.iter().enumerate() {
        for name in &place.arms {
            let named: Vec<usize> = (0..roads.len())
                .filter(|&r| {
                    items
                        .get(roads[r].item.0 as usize)
                        .and_then(|i| i.label.as_deref())
                        == Some(name.as_str())
                })
                .collect();
            let road = match named[..] {
                [road] => road,
                [] => {
                    return Err(place_error(
                        p,
                        format!("there is no road labelled \"{name}\" to be an arm of the place"),
                    ))
                }
                _ => {
                    return Err(place_error(
                        p,
                        format!(
                            "{} roads are labelled \"{name}\"; an arm names exactly one",
                            named.len()
                        ),
                    ))
                }
            };
            let line = &mut roads[road];
            let n = line.points.len();
            let gap = |k: usize| (line.points[k] - place.centre).norm();
            let first = gap(0) <= gap(n - 1);
            let (end, next) = if first { (0, 1) } else { (n - 1, n - 2) };
            if gap(end) > place.radius {
                return Err(place_error(
                    p,
                    format!(
                        "the arm \"{name}\" does not reach the place: its end nearest the \
                         centre is {} outside the circle of radius {}; end the road inside it",
                        short(gap(end) - place.radius),
                        short(place.radius)
                    ),
                ));
            }
            if gap(next) <= place.radius {
                return Err(place_error(
                    p,
                    format!(
                        "the arm \"{name}\" has a corner inside the place; its last straight \
                         must cross the circle"
                    ),
                ));
            }
            if arms
                .iter()
                .any(|a: &PlaceArm| a.road == road && a.first == first)
            {
                return Err(place_error(
                    p,
                    format!("the end of \"{name}\" is already an arm of another place"),
                ));
            }
            // Where the last straight leaves the circle: |e + u s| = radius, s in (0, 1].
            let (e, u) = (
                line.points[end] - place.centre,
                line.points[next] - line.points[end],
            );
            let (a, b, c) = (
                u.norm_squared(),
                e.dot(&u),
                e.norm_squared() - place.radius * place.radius,
            );
            let s = (-b + (b * b - a * c).max(0.0).sqrt()) / a;
            line.points[end] += u * s;
            line.heights[end] = place.height;
            arms.push(PlaceArm {
                place: p,
                road,
                first,
            });
        }
    }
    Ok(arms)
}

/// Where an arm meets its place: the returns on each side, `[left, right]` looking out
/// along the arm.
struct Mouth {
    angle: f64,
    kerb: [Return; 2],
    back: Option<[Return; 2]>,
}

/// Which of a mouth's returns (its kerb's, or its pavement backs').
type ReturnsOf = fn(&Mouth) -> Option<[Return; 2]>;

/// The end of each arm's piece of road, in the order of `arms`, after drawing each place:
/// its circle's kerb between the arms, their returns, the pavement's back and the island.
pub fn draw_places(
    site: &mut Site,
    places: &[PlaceLine],
    roads: &[RoadLine],
    arms: &[PlaceArm],
) -> Result<Vec<PieceEnd>, StreetError> {
    let mut ends = vec![PieceEnd::Open; arms.len()];
    for (p, place) in places.iter().enumerate() {
        let mut mouths: Vec<(usize, Mouth)> = Vec::new();
        for (k, arm) in arms.iter().enumerate().filter(|(_, a)| a.place == p) {
            let road = &roads[arm.road];
            let n = road.points.len();
            let (end, next) = if arm.first { (0, 1) } else { (n - 1, n - 2) };
            let at = road.points[end];
            let along = (road.points[next] - at).normalize();
            let left = left_of(along);
            let name = place.arms.get(mouths.len()).cloned().unwrap_or_default();
            let too_small = || {
                place_error(
                    p,
                    format!(
                        "the place's radius {} is too small for the arm \"{name}\", {} wide \
                         with its pavements; make `radius` larger",
                        short(place.radius),
                        short(2.0 * road.reach())
                    ),
                )
            };
            let turn = |offset: f64, circle: f64, radius: f64| -> Option<[Return; 2]> {
                let mut sides = [1.0, -1.0].map(|side| {
                    line_circle_return(
                        place.centre,
                        circle,
                        at + left * (side * offset),
                        along,
                        left * side,
                        radius,
                    )
                });
                Some([sides[0].take()?, sides[1].take()?])
            };
            let kerb =
                turn(road.half_width, place.radius, place.kerb_radius).ok_or_else(too_small)?;
            let back = if road.pavement > 0.0 || place.pavement > 0.0 {
                Some(
                    turn(
                        road.reach(),
                        place.radius + place.pavement,
                        (place.kerb_radius - road.pavement).max(0.0),
                    )
                    .ok_or_else(too_small)?,
                )
            } else {
                None
            };
            let edge = [kerb[0].along, kerb[1].along];
            ends[k] = PieceEnd::Junction {
                edge,
                back: back.map_or(edge, |b| [b[0].along, b[1].along]),
                mouth: edge[0].max(edge[1]).max(0.0),
            };
            let from_centre = at - place.centre;
            mouths.push((
                k,
                Mouth {
                    angle: from_centre.y.atan2(from_centre.x),
                    kerb,
                    back,
                },
            ));
        }
        mouths.sort_by(|x, y| x.1.angle.total_cmp(&y.1.angle));
        let mut b = ItemBuilder::new(site, place.item, Placement::in_unit(1.0));
        let (height, kerb) = (place.height, place.kerb);
        // The circles, between each arm's left return and the next arm's right one.
        let rings: [(f64, ReturnsOf, bool); 2] = [
            (place.radius, |m| Some(m.kerb), false),
            (place.radius + place.pavement, |m| m.back, true),
        ];
        for (circle, of, is_back) in rings {
            if is_back && place.pavement <= 0.0 && mouths.iter().all(|m| m.1.back.is_none()) {
                continue;
            }
            let angle = |q: Vector2<f64>| {
                let d = q - place.centre;
                d.y.atan2(d.x)
            };
            let mut arcs = Vec::new();
            let mut turned = 0.0;
            for i in 0..mouths.len() {
                let j = (i + 1) % mouths.len();
                let (Some(this), Some(next)) = (of(&mouths[i].1), of(&mouths[j].1)) else {
                    continue;
                };
                let (right, left) = (this[1].on_circle, this[0].on_circle);
                let gap_to = next[1].on_circle;
                let span = angle_between(right - place.centre, left - place.centre);
                let mut gap = angle_between(left - place.centre, gap_to - place.centre);
                if mouths.len() == 1 && gap < TOUCH {
                    gap = 0.0;
                }
                turned += span + gap;
                if gap > TOUCH {
                    arcs.push(PathPiece::Arc {
                        centre: place.centre,
                        radius: circle,
                        start_angle: angle(left),
                        sweep: gap,
                    });
                }
            }
            if mouths.len() > 1 && turned > TAU + 1e-9 {
                return Err(place_error(
                    p,
                    format!(
                        "the place's radius {} is too small for its arms: their kerb returns \
                         overlap round the circle; make `radius` larger or `kerb_radius` \
                         smaller",
                        short(place.radius)
                    ),
                ));
            }
            if mouths.is_empty() {
                arcs.push(PathPiece::Arc {
                    centre: place.centre,
                    radius: circle,
                    start_angle: 0.0,
                    sweep: TAU,
                });
            }
            for arc in arcs {
                if is_back {
                    draw_pavement_back(&mut b, arc, height, kerb);
                } else {
                    draw_kerb(&mut b, arc, height, kerb);
                }
            }
            for (_, mouth) in &mouths {
                for side in of(mouth).into_iter().flatten() {
                    if let Some(arc) = side.arc() {
                        if is_back {
                            draw_pavement_back(&mut b, arc, height, kerb);
                        } else {
                            draw_kerb(&mut b, arc, height, kerb);
                        }
                    }
                }
            }
        }
        if let Some(island) = place.island {
            let ring = PathPiece::Arc {
                centre: place.centre,
                radius: island,
                start_angle: 0.0,
                sweep: TAU,
            };
            draw_kerb(&mut b, ring, height, kerb);
        }
    }
    Ok(ends)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::items::{build_round_place, road_line, RoadSpec, RoundPlaceSpec};
    use crate::scene::streets::draw_streets;
    use crate::scene::SiteCurve;

    fn v(x: f64, y: f64) -> Vector2<f64> {
        Vector2::new(x, y)
    }

    fn assert_near(a: f64, b: f64, what: &str) {
        assert!((a - b).abs() < 1e-9, "{what}: {a} against {b}");
    }

    fn scene<T: serde::de::DeserializeOwned>(text: &str) -> T {
        ron::Options::default()
            .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
            .from_str(text)
            .expect("as written in a scene")
    }

    /// A place and its roads, each road `(label, spec)`, drawn.
    fn streets(place: &str, roads: &[(&str, &str)]) -> Result<Site, String> {
        let mut site = Site::default();
        let mut lines = Vec::new();
        for (label, text) in roads {
            let spec: RoadSpec = scene(text);
            let id = site.add_item("road", Some((*label).to_owned()));
            let b = ItemBuilder::new(&mut site, id, Placement::in_unit(1.0));
            lines.push(road_line(&b, &spec)?);
        }
        let spec: RoundPlaceSpec = scene(place);
        let id = site.add_item("round place", None);
        let mut b = ItemBuilder::new(&mut site, id, Placement::in_unit(1.0));
        build_round_place(&mut b, &spec)?;
        let places = std::mem::take(&mut site.places);
        draw_streets(&mut site, &lines, &places).map_err(|e| e.message)?;
        Ok(site)
    }

    #[test]
    fn a_return_touches_the_line_and_the_circle() {
        // A circle tangent to a line and to a circle (any geometry handbook, the locus
        // construction): its centre is r from the line and R + r from the circle's centre
        // (touching from outside), the point of contact with the circle lies on the line
        // of centres, and the one with the line is the foot of the perpendicular.
        let c = v(2.0, -1.0);
        for (big, offset, skew_deg, r) in [
            (10.0, 3.0, 0.0, 4.0),
            (16.0, 3.5, 20.0, 6.0),
            (8.0, 2.0, -35.0, 1.5),
            (12.0, 5.0, 60.0, 9.0),
        ] {
            let skew: f64 = f64::to_radians(skew_deg);
            let along = v(skew.cos(), skew.sin());
            let away = left_of(along);
            let on = c + away * offset;
            let ret = line_circle_return(c, big, on, along, away, r).expect("a return");
            assert_near(
                (ret.centre - on).perp(&along).abs(),
                r,
                "distance to the line",
            );
            assert_near((ret.centre - c).norm(), big + r, "distance between centres");
            assert_near((ret.on_circle - c).norm(), big, "contact on the circle");
            assert_near(
                (ret.on_circle - c).perp(&(ret.centre - c)),
                0.0,
                "contact on the line of centres",
            );
            assert_near(
                (ret.on_line - ret.centre).dot(&along),
                0.0,
                "foot of the perpendicular",
            );
            assert_near((ret.on_line - on).dot(&along), ret.along, "along");
            // Beyond the circle: the return leaves the line outside it.
            assert!((ret.on_line - c).norm() > big);
        }
        // A worked case by hand: R = 10, a kerb 3 off a radial arm, r = 4: the centre is
        // (sqrt(14^2 - 7^2), 7) = (12.124..., 7) from the circle's centre.
        let ret = line_circle_return(
            v(0.0, 0.0),
            10.0,
            v(10.0, 3.0),
            v(1.0, 0.0),
            v(0.0, 1.0),
            4.0,
        )
        .unwrap();
        assert_near(ret.centre.x, 147f64.sqrt(), "worked centre x");
        assert_near(ret.centre.y, 7.0, "worked centre y");
        assert_near(ret.along, 147f64.sqrt() - 10.0, "worked along");
        // A line too far out to meet the circle has no return.
        assert!(line_circle_return(
            v(0.0, 0.0),
            10.0,
            v(0.0, 11.0),
            v(1.0, 0.0),
            v(0.0, 1.0),
            4.0
        )
        .is_none());
    }

    #[test]
    fn the_arc_of_a_return_runs_from_the_line_to_the_circle() {
        let ret = line_circle_return(
            v(0.0, 0.0),
            10.0,
            v(10.0, 3.0),
            v(1.0, 0.0),
            v(0.0, 1.0),
            4.0,
        )
        .unwrap();
        let Some(PathPiece::Arc {
            centre,
            radius,
            start_angle,
            sweep,
        }) = ret.arc()
        else {
            panic!("no arc")
        };
        let point = |a: f64| centre + v(a.cos(), a.sin()) * radius;
        assert!((point(start_angle) - ret.on_line).norm() < 1e-9);
        assert!((point(start_angle + sweep) - ret.on_circle).norm() < 1e-9);
        assert!(sweep.abs() < std::f64::consts::PI);
    }

    /// Each horizontal arc drawn: centre, radius, start and end points.
    type Arc2 = (Vector2<f64>, f64, Vector2<f64>, Vector2<f64>);

    fn arcs(site: &Site) -> Vec<Arc2> {
        site.edges
            .iter()
            .filter_map(|e| match &e.curve {
                SiteCurve::Ellipse(arc) if arc.centre.z == 0.0 => {
                    let (s, t, c) = (arc.along(0.0), arc.along(1.0), arc.centre);
                    Some((v(c.x, c.y), arc.u.norm(), v(s.x, s.y), v(t.x, t.y)))
                }
                _ => None,
            })
            .collect()
    }

    #[test]
    fn a_roundabout_of_three_arms() {
        let site = streets(
            "(centre: (0, 0), radius: 16, island: 6, kerb: 0.15, kerb_radius: 5, \
             arms: [\"north\", \"west\", \"east\"])",
            &[
                (
                    "north",
                    "(points: [(0, 0), (0, 60)], width: 7, centre_line: Solid)",
                ),
                (
                    "west",
                    "(points: [(-60, 0), (0, 0)], width: 7, centre_line: Solid)",
                ),
                (
                    "east",
                    "(points: [(3, -2), (60, -40)], width: 6, centre_line: Solid)",
                ),
            ],
        )
        .unwrap();
        let arcs = arcs(&site);
        // The island: a whole circle of radius 6 at the centre.
        assert!(arcs
            .iter()
            .any(|a| a.0.norm() < 1e-12 && a.1 == 6.0 && (a.2 - a.3).norm() < 1e-9));
        // Three pieces of the circle of 16 and six returns of 5; every return ends on the
        // circle at a point where a piece of the circle ends, so the kerb is unbroken.
        let circle: Vec<_> = arcs
            .iter()
            .filter(|a| a.0.norm() < 1e-12 && a.1 == 16.0)
            .collect();
        let returns: Vec<_> = arcs.iter().filter(|a| a.1 == 5.0).collect();
        assert_eq!((circle.len(), returns.len()), (3, 6));
        for r in &returns {
            assert_near((r.0).norm(), 21.0, "a return's centre from the place's");
            assert!(circle
                .iter()
                .any(|c| (c.2 - r.3).norm() < 1e-9 || (c.3 - r.3).norm() < 1e-9));
        }
        // The north arm's kerbs start where its returns leave them, at
        // y = sqrt(21^2 - 8.5^2), and its centre line there too (the mouth).
        let mouth = (21.0f64.powi(2) - 8.5f64.powi(2)).sqrt();
        let starts_at = |p: Vector2<f64>| {
            site.edges.iter().any(|e| match e.curve {
                SiteCurve::Segment { start, end } => {
                    (v(start.x, start.y) - p).norm() < 1e-9 || (v(end.x, end.y) - p).norm() < 1e-9
                }
                _ => false,
            })
        };
        for p in [v(3.5, mouth), v(-3.5, mouth), v(0.0, mouth)] {
            assert!(starts_at(p), "{p:?}");
        }
        // Nothing of the north road is drawn inside the place.
        let inside = site.edges.iter().any(|e| match e.curve {
            SiteCurve::Segment { start, end } => {
                v(start.x, start.y).norm() < 15.99 || v(end.x, end.y).norm() < 15.99
            }
            _ => false,
        });
        assert!(!inside);
    }

    #[test]
    fn bad_places_are_refused() {
        let north = ("north", "(points: [(0, 0), (0, 60)], width: 7)");
        let south = ("south", "(points: [(0, -60), (1, -3)], width: 7)");
        // Wider than the place.
        let problem = streets(
            "(centre: (0, 0), radius: 3, kerb_radius: 2, arms: [\"north\"])",
            &[north],
        )
        .unwrap_err();
        assert!(
            problem.contains("too small for the arm \"north\""),
            "{problem}"
        );
        // Returns overlapping round the circle.
        let problem = streets(
            "(centre: (0, 0), radius: 6, kerb_radius: 8, arms: [\"north\", \"slant\"])",
            &[north, ("slant", "(points: [(0, 0), (20, 50)], width: 7)")],
        )
        .unwrap_err();
        assert!(problem.contains("overlap"), "{problem}");
        // An arm that stops short: its end (1, -3) is sqrt(1^2 + 13^2) - 6 = 7.038 m outside.
        let problem =
            streets("(centre: (0, 10), radius: 6, arms: [\"south\"])", &[south]).unwrap_err();
        assert!(
            problem.contains("does not reach the place: its end nearest the centre is 7.038"),
            "{problem}"
        );
        // No such road; an island too big.
        let problem =
            streets("(centre: (0, 0), radius: 6, arms: [\"nowhere\"])", &[north]).unwrap_err();
        assert!(
            problem.contains("no road labelled \"nowhere\""),
            "{problem}"
        );
        let problem = streets("(centre: (0, 0), radius: 6, island: 6)", &[]).unwrap_err();
        assert!(problem.contains("island"), "{problem}");
    }
}
