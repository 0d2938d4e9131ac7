//! The street network: every road of a scene joined to the others where they meet.
//!
//! Roads are gathered first (from the scene's `Road` items and from any loader that makes
//! them) and drawn together: where two centrelines cross, or one ends on another, the
//! roads are cut there into arms of a junction. Round the junction, each pair of
//! neighbouring arms meets in a corner: a kerb return, the circle of the kerb radius
//! tangent to both kerb lines (a circle inscribed in an angle, any geometry handbook),
//! where the corner is less than a half turn; a sharp corner where the kerb lines simply
//! meet (the far side of a bend, or no kerb radius given). The pavements' backs turn the
//! same corner on a concentric circle, the centre lines stop at the mouth of the junction
//! (where its kerb returns end), and an arm may carry crossing stripes.
//!
//! A junction is level, at the height of the first road through it (in scene order).
//! Centrelines that cross more than [`PASS_OVER`] apart in height pass over each other
//! (a bridge) and are not joined.

use super::build::{ItemBuilder, Placement};
use super::items::plan::{left_of, PathPiece};
use super::items::{
    draw_kerb, draw_pavement_back, draw_piece, Piece, PieceEnd, PlaceLine, RoadLine,
};
use super::places::{attach_arms, draw_places, PlaceArm};
use super::site::{Marker, Site};
use nalgebra::Vector2;
use std::f64::consts::{PI, TAU};

/// Metres: centrelines meeting closer than this meet at one point.
pub const SNAP: f64 = 1e-6;

/// Metres: centrelines crossing further apart than this in height pass over each other.
pub const PASS_OVER: f64 = 0.5;

/// Radians: arms closer than this to a straight line across the junction are taken as
/// going straight on.
const STRAIGHT: f64 = 1e-9;

/// Which item of the street network is at fault.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Culprit {
    /// A road, an index into the roads given.
    Road(usize),
    /// A round place, an index into the places given.
    Place(usize),
    /// A junction's name, an index into the site's junction names.
    Name(usize),
}

/// What is wrong, and with which item.
#[derive(Debug, PartialEq)]
pub struct StreetError {
    /// The item at fault.
    pub at: Culprit,
    /// What is wrong, in words.
    pub message: String,
}

/// A place where roads meet.
#[derive(Clone, Debug, PartialEq)]
pub struct Junction {
    /// The centre in plan: where the centrelines meet.
    pub at: Vector2<f64>,
    /// The height of the whole junction.
    pub height: f64,
    /// The roads that meet there (indices into the list given), without repeats.
    pub roads: Vec<usize>,
}

/// Where two lines `p + u t` and `q + v s` cross: (t, s), or `None` if they are parallel.
pub fn crossing_params(
    p: Vector2<f64>,
    u: Vector2<f64>,
    q: Vector2<f64>,
    v: Vector2<f64>,
) -> Option<(f64, f64)> {
    let denominator = u.perp(&v);
    if denominator.abs() <= 1e-15 * u.norm() * v.norm() {
        return None;
    }
    Some((
        (q - p).perp(&v) / denominator,
        (q - p).perp(&u) / denominator,
    ))
}

/// The angle (radians, in [0, 2 pi)) turned counter-clockwise from `a` to `b`.
pub fn angle_between(a: Vector2<f64>, b: Vector2<f64>) -> f64 {
    let angle = a.perp(&b).atan2(a.dot(&b));
    if angle < 0.0 {
        angle + TAU
    } else {
        angle
    }
}

/// The corner between two neighbouring arms of a junction at `node`: arm `a` leaving
/// along `d_a` with a line `off_a` to its left, and the next arm counter-clockwise, `b`,
/// leaving along `d_b` with a line `off_b` to its right.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Corner {
    /// Where the line along `a` starts, measured along `a` from the node (negative: back
    /// past it).
    pub along_a: f64,
    /// Where the line along `b` starts, measured along `b` from the node.
    pub along_b: f64,
    /// The circular return joining the lines, tangent to both.
    pub arc: Option<PathPiece>,
    /// A step joining parallel lines at different offsets (straight on, roads of two widths).
    pub step: Option<(Vector2<f64>, Vector2<f64>)>,
}

/// The corner of two lines round a junction (see [`Corner`]). With `radius > 0`, and the
/// corner less than a half turn, a return: the circle of that radius inscribed in the
/// angle of the two lines, its centre `radius` beyond each (so at `off + radius` from each
/// arm's centreline), its tangent points the feet of the perpendiculars from the centre;
/// otherwise the lines meet where they cross.
pub fn corner(
    node: Vector2<f64>,
    d_a: Vector2<f64>,
    off_a: f64,
    d_b: Vector2<f64>,
    off_b: f64,
    radius: f64,
) -> Corner {
    let gap = angle_between(d_a, d_b);
    let (left_a, left_b) = (left_of(d_a), left_of(d_b));
    if gap < PI - STRAIGHT && radius > 0.0 {
        let on_a = node + left_a * (off_a + radius);
        let on_b = node - left_b * (off_b + radius);
        if let Some((t, s)) = crossing_params(on_a, d_a, on_b, d_b) {
            let centre = on_a + d_a * t;
            let from = -left_a;
            return Corner {
                along_a: t,
                along_b: s,
                arc: Some(PathPiece::Arc {
                    centre,
                    radius,
                    start_angle: from.y.atan2(from.x),
                    // Along a's kerb towards the node, then out along b: a turn of
                    // gap - pi (clockwise, as the corner is less than a half turn).
                    sweep: gap - PI,
                }),
                step: None,
            };
        }
    }
    let (on_a, on_b) = (node + left_a * off_a, node - left_b * off_b);
    match crossing_params(on_a, d_a, on_b, d_b) {
        Some((t, s)) if (gap - PI).abs() > STRAIGHT => Corner {
            along_a: t,
            along_b: s,
            arc: None,
            step: None,
        },
        _ => Corner {
            along_a: 0.0,
            along_b: 0.0,
            arc: None,
            step: ((on_a - on_b).norm() > SNAP).then_some((on_a, on_b)),
        },
    }
}

/// Moves a road end that stops on another road (within that road's reach, pavements
/// included, of its centreline, or short of it by as much) along its own line onto the
/// other's centreline, so that the two meet in a junction.
fn snap_ends(roads: &mut [RoadLine], arms: &[PlaceArm]) {
    for r in 0..roads.len() {
        for first in [true, false] {
            if arms.iter().any(|a| a.road == r && a.first == first) {
                continue;
            }
            let n = roads[r].points.len();
            let (end, inner) = if first { (0, 1) } else { (n - 1, n - 2) };
            let (e, before) = (roads[r].points[end], roads[r].points[inner]);
            let outward = (e - before).normalize();
            let room = (e - before).norm();
            let mut best: Option<f64> = None;
            for (s, other) in roads.iter().enumerate() {
                if s == r {
                    continue;
                }
                for pair in other.points.windows(2) {
                    let Some((t, u)) = crossing_params(e, outward, pair[0], pair[1] - pair[0])
                    else {
                        continue;
                    };
                    let reach = other.reach();
                    if (-1e-12..=1.0 + 1e-12).contains(&u)
                        && t.abs() <= reach
                        && t > -room
                        && best.is_none_or(|b: f64| t.abs() < b.abs())
                    {
                        best = Some(t);
                    }
                }
            }
            if let Some(t) = best {
                if t.abs() > SNAP {
                    roads[r].points[end] = e + outward * t;
                }
            }
        }
    }
}

/// A point along a road where it is cut: `key` orders it (segment index plus the
/// fraction along it), `node` is the junction there if any.
#[derive(Clone, Copy, Debug)]
struct Station {
    key: f64,
    point: Vector2<f64>,
    height: f64,
    node: Option<usize>,
}

fn node_at(junctions: &mut Vec<Junction>, at: Vector2<f64>, height: f64) -> usize {
    match junctions.iter().position(|j| (j.at - at).norm() <= SNAP) {
        Some(index) => index,
        None => {
            junctions.push(Junction {
                at,
                height,
                roads: Vec::new(),
            });
            junctions.len() - 1
        }
    }
}

/// Every junction of the roads, and each road's stations (its corners and where it is cut).
fn find_junctions(roads: &[RoadLine]) -> (Vec<Junction>, Vec<Vec<Station>>) {
    let mut junctions = Vec::new();
    let mut stations: Vec<Vec<Station>> = roads
        .iter()
        .map(|road| {
            road.points
                .iter()
                .zip(&road.heights)
                .enumerate()
                .map(|(i, (&point, &height))| Station {
                    key: i as f64,
                    point,
                    height,
                    node: None,
                })
                .collect()
        })
        .collect();
    // Each pair of segments of two roads, within a whisker of their ends.
    let slack = 1e-9;
    for r in 0..roads.len() {
        for s in r + 1..roads.len() {
            let (a, b) = (&roads[r], &roads[s]);
            for i in 0..a.points.len() - 1 {
                for j in 0..b.points.len() - 1 {
                    let (p, u) = (a.points[i], a.points[i + 1] - a.points[i]);
                    let (q, v) = (b.points[j], b.points[j + 1] - b.points[j]);
                    let Some((t, w)) = crossing_params(p, u, q, v) else {
                        continue;
                    };
                    let within = |x: f64| (-slack..=1.0 + slack).contains(&x);
                    if !within(t) || !within(w) {
                        continue;
                    }
                    let (t, w) = (t.clamp(0.0, 1.0), w.clamp(0.0, 1.0));
                    let height_a = a.heights[i] + (a.heights[i + 1] - a.heights[i]) * t;
                    let height_b = b.heights[j] + (b.heights[j + 1] - b.heights[j]) * w;
                    if (height_a - height_b).abs() > PASS_OVER {
                        continue;
                    }
                    let point = p + u * t;
                    let node = node_at(&mut junctions, point, height_a);
                    for (road, key, height) in
                        [(r, i as f64 + t, height_a), (s, j as f64 + w, height_b)]
                    {
                        stations[road].push(Station {
                            key,
                            point,
                            height,
                            node: Some(node),
                        });
                        if !junctions[node].roads.contains(&road) {
                            junctions[node].roads.push(road);
                        }
                    }
                }
            }
        }
    }
    for list in &mut stations {
        list.sort_by(|x, y| x.key.total_cmp(&y.key));
        // Stations at one point become one, keeping its junction.
        let mut merged: Vec<Station> = Vec::with_capacity(list.len());
        for station in list.drain(..) {
            match merged.last_mut() {
                Some(last) if (last.point - station.point).norm() <= SNAP => {
                    last.node = last.node.or(station.node);
                }
                _ => merged.push(station),
            }
        }
        *list = merged;
    }
    (junctions, stations)
}

/// An arm of a junction: a piece of road leaving it.
#[derive(Clone, Copy, Debug)]
struct Arm {
    piece: usize,
    /// Whether the piece starts at the junction (or ends there).
    at_start: bool,
    outward: Vector2<f64>,
}

/// Joins the roads where they meet and ends the arms of the round places in them, and
/// draws them all into the site. Returns the junctions found.
pub fn draw_streets(
    site: &mut Site,
    roads: &[RoadLine],
    places: &[PlaceLine],
) -> Result<Vec<Junction>, StreetError> {
    let mut roads = roads.to_vec();
    let arms = attach_arms(&mut roads, places, &site.items)?;
    snap_ends(&mut roads, &arms);
    let (junctions, stations) = find_junctions(&roads);
    // Cut each road into pieces at its junctions.
    let mut pieces: Vec<(usize, Piece, [Option<usize>; 2])> = Vec::new();
    for (r, list) in stations.iter().enumerate() {
        let mut current: Vec<Station> = Vec::new();
        for (k, station) in list.iter().enumerate() {
            current.push(*station);
            let last = k + 1 == list.len();
            if current.len() > 1 && (station.node.is_some() || last) {
                let ends = [current[0].node, station.node];
                let mut heights: Vec<f64> = current.iter().map(|s| s.height).collect();
                let n = heights.len();
                for (end, index) in [(0, 0), (1, n - 1)] {
                    if let Some(node) = ends[end] {
                        heights[index] = junctions[node].height;
                    }
                }
                pieces.push((
                    r,
                    Piece {
                        points: current.iter().map(|s| s.point).collect(),
                        heights,
                        ends: [PieceEnd::Open, PieceEnd::Open],
                    },
                    ends,
                ));
                current = vec![*station];
            }
        }
    }
    // Each junction's corners.
    let mut corners_drawn: Vec<(usize, f64, PathPiece, bool)> = Vec::new();
    let mut steps: Vec<(usize, f64, PathPiece, bool)> = Vec::new();
    for (node, junction) in junctions.iter().enumerate() {
        let mut arms: Vec<Arm> = Vec::new();
        for (index, (_, piece, ends)) in pieces.iter().enumerate() {
            let n = piece.points.len();
            if ends[0] == Some(node) {
                arms.push(Arm {
                    piece: index,
                    at_start: true,
                    outward: (piece.points[1] - piece.points[0]).normalize(),
                });
            }
            if ends[1] == Some(node) {
                arms.push(Arm {
                    piece: index,
                    at_start: false,
                    outward: (piece.points[n - 2] - piece.points[n - 1]).normalize(),
                });
            }
        }
        if arms.len() < 2 {
            for arm in &arms {
                pieces[arm.piece].2[if arm.at_start { 0 } else { 1 }] = None;
            }
            continue;
        }
        arms.sort_by(|x, y| {
            let angle = |d: Vector2<f64>| d.y.atan2(d.x);
            angle(x.outward).total_cmp(&angle(y.outward))
        });
        // [left, right] trims of each arm's edge and pavement back.
        let mut edge = vec![[0.0; 2]; arms.len()];
        let mut back = vec![[0.0; 2]; arms.len()];
        for i in 0..arms.len() {
            let j = (i + 1) % arms.len();
            let (a, b) = (arms[i], arms[j]);
            let (road_a, road_b) = (pieces[a.piece].0, pieces[b.piece].0);
            let (la, lb) = (&roads[road_a], &roads[road_b]);
            if angle_between(a.outward, b.outward) < 1e-6 {
                return Err(StreetError {
                    at: Culprit::Road(road_a.max(road_b)),
                    message: format!(
                        "two roads leave the junction at ({}, {}) in the same direction, one \
                         on top of the other",
                        short(junction.at.x),
                        short(junction.at.y)
                    ),
                });
            }
            let radius = match (la.kerb_radius, lb.kerb_radius) {
                (Some(x), Some(y)) => x.min(y),
                (Some(x), None) | (None, Some(x)) => x,
                (None, None) => 0.0,
            };
            let c = corner(
                junction.at,
                a.outward,
                la.half_width,
                b.outward,
                lb.half_width,
                radius,
            );
            edge[i][0] = c.along_a;
            edge[j][1] = c.along_b;
            if let Some(arc) = c.arc {
                corners_drawn.push((road_a, junction.height, arc, false));
            }
            if let Some((p, q)) = c.step {
                steps.push((
                    road_a,
                    junction.height,
                    PathPiece::Line { start: p, end: q },
                    false,
                ));
            }
            if la.pavement > 0.0 || lb.pavement > 0.0 {
                let c = corner(
                    junction.at,
                    a.outward,
                    la.reach(),
                    b.outward,
                    lb.reach(),
                    radius - la.pavement.max(lb.pavement),
                );
                back[i][0] = c.along_a;
                back[j][1] = c.along_b;
                if let Some(arc) = c.arc {
                    corners_drawn.push((road_a, junction.height, arc, true));
                }
                if let Some((p, q)) = c.step {
                    steps.push((
                        road_a,
                        junction.height,
                        PathPiece::Line { start: p, end: q },
                        true,
                    ));
                }
            }
        }
        for (k, arm) in arms.iter().enumerate() {
            let mouth = edge[k][0].max(edge[k][1]).max(0.0);
            pieces[arm.piece].1.ends[if arm.at_start { 0 } else { 1 }] = PieceEnd::Junction {
                edge: edge[k],
                back: back[k],
                mouth,
            };
        }
    }
    // The arms' ends in the round places: the first piece of the road, or its last.
    let place_ends = draw_places(site, places, &roads, &arms)?;
    for (arm, end) in arms.iter().zip(place_ends) {
        let mut of_road = pieces.iter_mut().filter(|p| p.0 == arm.road);
        let piece = if arm.first {
            of_road.next()
        } else {
            of_road.last()
        };
        if let Some(piece) = piece {
            piece.1.ends[if arm.first { 0 } else { 1 }] = end;
        }
    }
    for (r, piece, _) in &pieces {
        let mut b = ItemBuilder::new(site, roads[*r].item, Placement::in_unit(1.0));
        draw_piece(&mut b, &roads[*r], piece).map_err(|message| StreetError {
            at: Culprit::Road(*r),
            message,
        })?;
    }
    for (r, height, arc, is_back) in corners_drawn.into_iter().chain(steps) {
        let road = &roads[r];
        let mut b = ItemBuilder::new(site, road.item, Placement::in_unit(1.0));
        if is_back {
            draw_pavement_back(&mut b, arc, height, road.kerb);
        } else {
            draw_kerb(&mut b, arc, height, road.kerb);
        }
    }
    Ok(junctions
        .into_iter()
        .filter(|j| j.roads.len() > 1)
        .collect())
}

/// Gives each junction name (`Site::junction_names`) its junction: the one whose centre
/// is nearest the name's point, within the reach (pavements included) of the widest road
/// there. The name is drawn as its item's label, at a mark at the junction's centre.
pub fn name_junctions(
    site: &mut Site,
    junctions: &[Junction],
    roads: &[RoadLine],
) -> Result<(), StreetError> {
    let names = std::mem::take(&mut site.junction_names);
    for (k, (item, at)) in names.into_iter().enumerate() {
        let found = junctions
            .iter()
            .map(|j| {
                let reach = j
                    .roads
                    .iter()
                    .map(|&r| roads[r].reach())
                    .fold(0.0, f64::max);
                (j, (j.at - at).norm(), reach)
            })
            .filter(|(_, gap, reach)| gap <= reach)
            .min_by(|x, y| x.1.total_cmp(&y.1));
        let Some((junction, _, _)) = found else {
            return Err(StreetError {
                at: Culprit::Name(k),
                message: format!(
                    "there is no junction at ({}, {}): no two roads meet within their width \
                     of it",
                    short(at.x),
                    short(at.y)
                ),
            });
        };
        site.markers.push(Marker {
            at: nalgebra::Point3::new(junction.at.x, junction.at.y, junction.height),
            item,
        });
    }
    Ok(())
}

/// A length for a message: to a thousandth, without trailing zeros.
fn short(length: f64) -> String {
    let text = format!("{length:.3}");
    text.trim_end_matches('0').trim_end_matches('.').to_owned()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::items::{road_line, RoadSpec};
    use crate::scene::SiteCurve;
    use std::f64::consts::FRAC_PI_2;

    fn v(x: f64, y: f64) -> Vector2<f64> {
        Vector2::new(x, y)
    }

    fn streets(roads: &[&str]) -> Result<(Site, Vec<Junction>), String> {
        let mut site = Site::default();
        let mut lines = Vec::new();
        for text in roads {
            let spec: RoadSpec = ron::Options::default()
                .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
                .from_str(text)
                .expect("a road as written in a scene");
            let id = site.add_item("road", None);
            let b = ItemBuilder::new(&mut site, id, Placement::in_unit(1.0));
            lines.push(road_line(&b, &spec)?);
        }
        let junctions = draw_streets(&mut site, &lines, &[]).map_err(|e| e.message)?;
        Ok((site, junctions))
    }

    /// Each arc: centre (plan), radius, sweep.
    fn arcs(site: &Site) -> Vec<(Vector2<f64>, f64, f64, f64)> {
        site.edges
            .iter()
            .filter_map(|e| match &e.curve {
                SiteCurve::Ellipse(arc) => {
                    let c = arc.centre;
                    Some((v(c.x, c.y), arc.u.norm(), arc.sweep, c.z))
                }
                _ => None,
            })
            .collect()
    }

    fn distance_to_line(p: Vector2<f64>, on: Vector2<f64>, along: Vector2<f64>) -> f64 {
        (p - on).perp(&along.normalize()).abs()
    }

    #[test]
    fn a_return_is_the_circle_inscribed_in_the_corner() {
        // Tangent circle to two lines (any geometry handbook): its centre lies on the
        // bisector of the angle, r from each line, and the tangent points lie
        // r cot(theta / 2) from the lines' crossing, theta the angle between them.
        for degrees in [30.0_f64, 60.0, 90.0, 120.0, 150.0] {
            let theta = degrees.to_radians();
            let (d_a, d_b) = (v(1.0, 0.0), v(theta.cos(), theta.sin()));
            let (half, radius) = (3.0, 5.0);
            let c = corner(v(0.0, 0.0), d_a, half, d_b, half, radius);
            let Some(PathPiece::Arc {
                centre,
                radius: r,
                start_angle,
                sweep,
            }) = c.arc
            else {
                panic!("no return at {degrees} degrees")
            };
            assert_eq!(r, radius);
            // The kerb lines: y = 3 along a, and 3 to the right of b.
            let kerb_a = v(0.0, half);
            let kerb_b = -left_of(d_b) * half;
            assert!((distance_to_line(centre, kerb_a, d_a) - radius).abs() < 1e-9);
            assert!((distance_to_line(centre, kerb_b, d_b) - radius).abs() < 1e-9);
            // The kerb lines cross on the bisector, `half / sin(theta / 2)` out.
            let bisector = (d_a + d_b).normalize();
            let vertex = bisector * (half / (theta / 2.0).sin());
            assert!(distance_to_line(centre, vertex, bisector) < 1e-9);
            let tangent = radius / (theta / 2.0).tan();
            let start = centre + v(start_angle.cos(), start_angle.sin()) * radius;
            let end_angle = start_angle + sweep;
            let end = centre + v(end_angle.cos(), end_angle.sin()) * radius;
            assert!(
                ((start - vertex).norm() - tangent).abs() < 1e-9,
                "{degrees}"
            );
            assert!(((end - vertex).norm() - tangent).abs() < 1e-9, "{degrees}");
            // The arc's ends are on the kerb lines, and it turns through pi - theta.
            assert!(distance_to_line(start, kerb_a, d_a) < 1e-9);
            assert!(distance_to_line(end, kerb_b, d_b) < 1e-9);
            assert!((sweep + (PI - theta)).abs() < 1e-12);
            assert!((c.along_a - (start - kerb_a).dot(&d_a)).abs() < 1e-9);
        }
    }

    #[test]
    fn the_far_side_of_a_bend_is_a_sharp_corner() {
        // Arms east and north, 3 each side: going round from north to east the
        // corner is three quarters of a turn, and the kerbs meet at (-3, -3).
        let c = corner(v(0.0, 0.0), v(0.0, 1.0), 3.0, v(1.0, 0.0), 3.0, 5.0);
        assert!(c.arc.is_none());
        assert!((c.along_a + 3.0).abs() < 1e-12 && (c.along_b + 3.0).abs() < 1e-12);
        // Straight on, the kerbs run through.
        let c = corner(v(0.0, 0.0), v(1.0, 0.0), 3.0, v(-1.0, 0.0), 3.0, 5.0);
        assert_eq!(
            (c.along_a, c.along_b, c.arc, c.step),
            (0.0, 0.0, None, None)
        );
    }

    #[test]
    fn a_road_ending_on_another_makes_a_t_junction() {
        let (site, junctions) = streets(&[
            "(points: [(-50, 0), (50, 0)], width: 6, kerb: 0.15, pavement: 2, \
             kerb_radius: 4, centre_line: Solid)",
            // Ends on the near kerb of the first road: moved on to its centreline.
            "(points: [(0, 40), (0, 3)], width: 6, kerb: 0.15, pavement: 2, \
             centre_line: Solid)",
        ])
        .unwrap();
        assert_eq!(junctions.len(), 1);
        assert!((junctions[0].at - v(0.0, 0.0)).norm() < 1e-12);
        let arcs = arcs(&site);
        // Two kerb returns (drawn at the carriageway and the kerb top) and two pavement
        // returns, concentric: radius 4 and 4 - 2.
        let mut radii: Vec<f64> = arcs.iter().map(|a| a.1).collect();
        radii.sort_by(f64::total_cmp);
        assert_eq!(radii, vec![2.0, 2.0, 4.0, 4.0, 4.0, 4.0]);
        for (centre, _, sweep, _) in &arcs {
            assert!((centre.x.abs() - 7.0).abs() < 1e-9 && (centre.y - 7.0).abs() < 1e-9);
            assert!((sweep.abs() - FRAC_PI_2).abs() < 1e-12);
        }
        // The centre lines stop at the mouth: the side road's at y = 3 + 4, the through
        // road's run straight through (its two arms' mouths are where the returns end).
        let has = |a: Vector2<f64>, b: Vector2<f64>| {
            site.edges.iter().any(|e| match e.curve {
                SiteCurve::Segment { start, end } => {
                    let (s, t) = (v(start.x, start.y), v(end.x, end.y));
                    start.z == 0.0
                        && (((s - a).norm() < 1e-9 && (t - b).norm() < 1e-9)
                            || ((s - b).norm() < 1e-9 && (t - a).norm() < 1e-9))
                }
                _ => false,
            })
        };
        assert!(
            has(v(0.0, 40.0), v(0.0, 7.0)),
            "the side road's centre line"
        );
        assert!(has(v(7.0, 0.0), v(50.0, 0.0)));
        assert!(!has(v(0.0, 0.0), v(0.0, 7.0)));
        // The far kerb of the through road runs straight on, in two pieces meeting at x = 0.
        assert!(has(v(-50.0, -3.0), v(0.0, -3.0)) && has(v(0.0, -3.0), v(50.0, -3.0)));
        // The side road's kerbs begin where the returns end.
        assert!(has(v(3.0, 7.0), v(3.0, 40.0)) && has(v(-3.0, 7.0), v(-3.0, 40.0)));
    }

    #[test]
    fn crossing_roads_make_four_returns() {
        let (site, junctions) = streets(&[
            "(points: [(-50, 0), (50, 0)], width: 8, kerb_radius: 6)",
            "(points: [(10, -50), (10, 50)], width: 6)",
        ])
        .unwrap();
        assert_eq!(junctions.len(), 1);
        assert_eq!(junctions[0].at, v(10.0, 0.0));
        let arcs = arcs(&site);
        assert_eq!(arcs.len(), 4);
        for (centre, radius, _, _) in arcs {
            assert_eq!(radius, 6.0);
            assert!((centre.x - 10.0).abs() - 9.0 < 1e-9 && centre.y.abs() - 10.0 < 1e-9);
        }
    }

    #[test]
    fn a_y_junction_at_shared_ends() {
        let (site, junctions) = streets(&[
            "(points: [(0, -40), (0, 0)], width: 6, kerb_radius: 3)",
            "(points: [(0, 0), (-30, 30)], width: 6)",
            "(points: [(0, 0), (30, 30)], width: 6)",
        ])
        .unwrap();
        assert_eq!(junctions.len(), 1);
        assert_eq!(junctions[0].roads.len(), 3);
        // Beside the stem the corners are three eighths of a turn, less than a half turn,
        // so they get the stem's returns; between the branches (neither with a radius)
        // the kerbs meet in a sharp corner, 3 / sin 45 degrees out along the bisector.
        let arcs = arcs(&site);
        assert_eq!(arcs.len(), 2);
        assert!(arcs.iter().all(|a| a.1 == 3.0 && a.0.y < 0.0));
        let sharp = v(0.0, 3.0 / std::f64::consts::FRAC_1_SQRT_2);
        let meets_there = site.edges.iter().any(|e| match e.curve {
            SiteCurve::Segment { start, .. } => (v(start.x, start.y) - sharp).norm() < 1e-9,
            _ => false,
        });
        assert!(meets_there);
    }

    #[test]
    fn roads_at_different_heights_pass_over() {
        let (_, junctions) = streets(&[
            "(points: [(-50, 0), (50, 0)], width: 6)",
            "(points: [(0, -50), (0, 50)], elevations: [6, 6], width: 6)",
        ])
        .unwrap();
        assert!(junctions.is_empty());
    }

    #[test]
    fn a_kerb_radius_too_big_for_the_arm_is_refused() {
        let problem = streets(&[
            "(points: [(-50, 0), (50, 0)], width: 6, kerb_radius: 20)",
            "(points: [(0, 10), (0, 0)], width: 6)",
        ])
        .unwrap_err();
        assert!(
            problem.contains("junction at (0, 0)") && problem.contains("kerb_radius"),
            "{problem}"
        );
    }
}
