//! The site's edges as seen from one standpoint.

use crate::budget::Budget;
use crate::error::{Error, Result};
use crate::plane::{Flattener, PolylineSet};
use crate::scene::{Edge, ItemId, Marker, Site, SiteCurve};
use crate::sphere::SphereCurve;
use crate::sphere::{Degeneracy, ViewFrame};
use crate::visibility::{Depth, HiddenLines, Occluders};
use nalgebra::{Point3, Vector3};

/// An edge left out because it has no drawable image from the standpoint.
#[derive(Clone, Debug, PartialEq)]
pub struct SkippedEdge {
    /// The item the edge belongs to.
    pub item: ItemId,
    /// Its index among the site's edges (eye-dependent edges numbered after them).
    pub edge_index: usize,
    /// Why it has no image.
    pub why: Degeneracy,
}

/// Edges are flattened in runs of this many; below two runs a second thread costs more
/// than it saves.
const EDGES_PER_RUN: usize = 2048;

/// The same with hidden lines: an edge then costs a hundred times more (its sight lines),
/// so a square of a few hundred edges is already worth both cores.
const SEEN_EDGES_PER_RUN: usize = 64;

/// Flattens every edge of the site; degenerate edges are listed, not drawn. `meanwhile()`
/// is done on the calling thread once the other cores have started on the edges (the
/// overlays under the drawing, which would otherwise keep them waiting; `|| ()` for
/// nothing), and its result returned beside the wireframe.
///
/// Large sites are cut into runs of consecutive edges that the cores take one at a time
/// (near edges cost far more than distant ones, so fixed halves would leave a core idle);
/// the runs' polylines are joined in edge order, so the result does not depend on the
/// number of cores.
pub fn wireframe<U>(
    site: &Site,
    view: &ViewFrame,
    flattener: &Flattener,
    hidden_lines: &HiddenLines,
    by_distance: bool,
    budget: &Budget,
    meanwhile: impl FnOnce() -> U,
) -> Result<(Wireframe, U)> {
    // The edges that depend on the eye (mesh silhouettes, the outlines of round items,
    // point markers) join the fixed edges; they are numbered after them in the list of
    // skipped edges.
    let eye = view.eye();
    let mut outlines = site.outline_edges_from(&eye);
    let arm = MARKER_ARM_PX * std::f64::consts::TAU / flattener.map().width();
    outlines.extend(site.markers.iter().flat_map(|m| marker_cross(m, &eye, arm)));
    let occluders = hidden_lines.occluders(site, view);
    let occluders = occluders.as_ref();
    let per_run = if occluders.is_some() {
        SEEN_EDGES_PER_RUN
    } else {
        EDGES_PER_RUN
    };
    // Runs of the site's edges, then runs of these, each as its first edge's number
    // (counting on past the site's into these) and its length.
    let fixed = site.edges.len();
    let runs: Vec<(usize, usize)> = (0..fixed)
        .step_by(per_run)
        .map(|first| (first, per_run.min(fixed - first)))
        .chain(
            (0..outlines.len())
                .step_by(per_run)
                .map(|first| (fixed + first, per_run.min(outlines.len() - first))),
        )
        .collect();
    // The site's edges, then these, by one count.
    let edge_at = |index: usize| match index.checked_sub(fixed) {
        None => site.edges.get(index),
        Some(found) => outlines[found],
    };
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    let threads = cores.min(runs.len()).max(1);
    let next_run = std::sync::atomic::AtomicUsize::new(0);
    // The first run to exceed the budget stops every thread before its next run.
    let refused: std::sync::Mutex<Option<Error>> = std::sync::Mutex::new(None);
    let stage = if occluders.is_some() {
        "visibility and flatten"
    } else {
        "flatten"
    };
    let stage_started = std::time::Instant::now();
    let (names, slot_of_item) = site.layer_slots();
    // With weights by distance each site layer has three slots: middle, near and far.
    let bands: u32 = if by_distance { 3 } else { 1 };
    let slot_of_item: Vec<u32> = slot_of_item.iter().map(|slot| slot * bands).collect();
    let names: Vec<(Option<&str>, Distance)> = names
        .iter()
        .flat_map(|name| {
            let all = [Distance::Middle, Distance::Near, Distance::Far];
            all.into_iter()
                .take(bands as usize)
                .map(move |band| (*name, band))
        })
        .collect();
    let (names, slot_of_item) = (&names, &slot_of_item);
    // One thread's share: runs taken in turn until none is left.
    let work = |mut flattener: Flattener| {
        let mut done = Vec::new();
        loop {
            let index = next_run.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
            let Some(&run) = runs.get(index) else { break };
            if let Err(error) = budget.check_time(stage, stage_started, index, runs.len()) {
                refuse(&refused, error, &next_run, runs.len());
                break;
            }
            let (lines, hidden, skipped) = flatten_edges(
                &edge_at,
                run,
                view,
                &mut flattener,
                slot_of_item,
                bands,
                occluders,
            );
            let vertices =
                hidden.vertex_count() + lines.iter().map(|(_, l)| l.vertex_count()).sum::<usize>();
            if let Err(error) = budget.add_vertices(vertices) {
                refuse(&refused, error, &next_run, runs.len());
                break;
            }
            done.push((index, lines, hidden, skipped));
        }
        done
    };
    /// Edges from which the calling thread takes a share of the runs from the start.
    const EDGES_FOR_CALLER: usize = 20_000;
    // Only a large drawing's calling thread takes a share: a small one is done before a
    // late thread costs much, and with its calling thread only waiting, the explorer's
    // memory over a thousand renders for twenty clients grows as little as before (2 to
    // 5 %, measured, against 6 to 10 % with each client's thread keeping the lists of its
    // share in a memory arena of its own).
    let here = threads > 1 && site.edges.len() + outlines.len() >= EDGES_FOR_CALLER;
    let (parts, meanwhile) =
        crate::cores::each_on_a_thread_and(vec![flattener.clone(); threads], here, work, meanwhile);
    let mut parts: Vec<(usize, RunLines, PolylineSet, Vec<SkippedEdge>)> =
        parts.into_iter().flatten().collect();
    if let Some(error) = refused
        .into_inner()
        .unwrap_or_else(|poisoned| poisoned.into_inner())
    {
        return Err(error);
    }
    parts.sort_by_key(|(index, _, _, _)| *index);
    let mut layers: Vec<WireLayer> = names
        .iter()
        .map(|(name, distance)| WireLayer {
            site_layer: name.map(str::to_owned),
            distance: *distance,
            lines: PolylineSet::new(),
        })
        .collect();
    // Each layer sized once for all its parts: grown part by part, its points would be
    // copied and their fresh pages faulted in again at every doubling.
    let mut sizes = vec![(0, 0); layers.len()];
    for (_, part_layers, _, _) in &parts {
        for (slot, part) in part_layers {
            let size = &mut sizes[*slot as usize];
            *size = (size.0 + part.len(), size.1 + part.vertex_count());
        }
    }
    for (layer, (lines, points)) in layers.iter_mut().zip(sizes) {
        layer.lines.reserve(lines, points);
    }
    let mut skipped = Vec::new();
    let mut hidden = PolylineSet::new();
    for (_, part_layers, mut part_hidden, part_skipped) in parts {
        for (slot, mut part) in part_layers {
            layers[slot as usize].lines.append(&mut part);
        }
        hidden.append(&mut part_hidden);
        skipped.extend(part_skipped);
    }
    let wireframe = Wireframe {
        layers,
        hidden,
        skipped,
    };
    Ok((wireframe, meanwhile))
}

/// Keeps the first refusal and sends the other threads past the last run.
fn refuse(
    refused: &std::sync::Mutex<Option<Error>>,
    error: Error,
    next_run: &std::sync::atomic::AtomicUsize,
    runs: usize,
) {
    next_run.store(runs, std::sync::atomic::Ordering::Relaxed);
    let mut slot = refused
        .lock()
        .unwrap_or_else(|poisoned| poisoned.into_inner());
    slot.get_or_insert(error);
}

/// Half the width of a point marker's cross, in pixels.
const MARKER_ARM_PX: f64 = 6.0;

/// A point marker as an upright cross seen square-on from the eye: a vertical arm and a
/// level arm across the line of sight, each reaching `arm` radians either side of the point
/// (tan(arm) times its distance). None for a marker at the eye.
pub fn marker_cross(marker: &Marker, eye: &Point3<f64>, arm: f64) -> Vec<Edge> {
    let towards = marker.at - eye;
    let distance = towards.norm();
    if distance == 0.0 {
        return Vec::new();
    }
    let reach = distance * arm.tan();
    let level = Vector3::new(-towards.y, towards.x, 0.0);
    // Straight above or below the eye any level direction is across the line of sight.
    let across = if level.norm() > 1e-12 * distance {
        level.normalize()
    } else {
        Vector3::x()
    };
    let upright = towards.cross(&across).normalize();
    [across, upright]
        .iter()
        .map(|arm| Edge {
            curve: SiteCurve::Segment {
                start: marker.at - arm * reach,
                end: marker.at + arm * reach,
            },
            item: marker.item,
        })
        .collect()
}

/// The wireframe of a site from one standpoint: one set of polylines for each of the
/// site's layers (the first for items on no layer), and the edges left out.
#[derive(Clone, Debug, Default)]
pub struct Wireframe {
    /// One set of polylines for each of the site's layers.
    pub layers: Vec<WireLayer>,
    /// The parts of edges hidden behind faces (empty unless hidden parts are looked for).
    pub hidden: PolylineSet,
    /// Edges left out, with why.
    pub skipped: Vec<SkippedEdge>,
}

/// How far an edge is from the eye, when lines are weighed by distance (a common drawing
/// convention: nearer edges heavier). The bands are fixed in metres: near within
/// [`NEAR_METRES`], far beyond [`FAR_METRES`].
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Distance {
    /// Between near and far, or every edge when lines are not weighed by distance.
    Middle,
    /// Nearer than [`NEAR_METRES`]: drawn heavier.
    Near,
    /// Beyond [`FAR_METRES`]: drawn lighter.
    Far,
}

/// Edges nearer than this (metres, at their nearest point) are near.
pub const NEAR_METRES: f64 = 8.0;
/// Edges farther than this (metres, at their nearest point) are far.
pub const FAR_METRES: f64 = 30.0;

impl Distance {
    /// The band of an edge, by its nearest point to the eye (a circle or ellipse by its
    /// centre's distance less its larger semi-axis).
    fn of(edge: &Edge, eye: &Point3<f64>) -> Distance {
        let nearest = match edge.curve {
            SiteCurve::Segment { start, end } => {
                let along = end - start;
                let t = ((eye - start).dot(&along) / along.norm_squared().max(f64::MIN_POSITIVE))
                    .clamp(0.0, 1.0);
                (start + along * t - eye).norm()
            }
            SiteCurve::Ellipse(ref arc) => {
                ((arc.centre - eye).norm() - arc.u.norm().max(arc.v.norm())).max(0.0)
            }
        };
        if nearest < NEAR_METRES {
            Distance::Near
        } else if nearest > FAR_METRES {
            Distance::Far
        } else {
            Distance::Middle
        }
    }

    /// Slot offset within a site layer's three slots.
    fn offset(self) -> u32 {
        match self {
            Distance::Middle => 0,
            Distance::Near => 1,
            Distance::Far => 2,
        }
    }
}

/// The polylines of one site layer (`None`: items on no layer), in one band of distance.
#[derive(Clone, Debug)]
pub struct WireLayer {
    /// The site layer (`None`: items on no layer).
    pub site_layer: Option<String>,
    /// The distance band, when lines are weighed by distance.
    pub distance: Distance,
    /// The polylines.
    pub lines: PolylineSet,
}

/// One run's polylines, by layer slot.
type RunLines = Vec<(u32, PolylineSet)>;

/// Flattens the `count` edges from the one numbered `first_index`.
fn flatten_edges(
    edge_at: &impl Fn(usize) -> Edge,
    (first_index, count): (usize, usize),
    view: &ViewFrame,
    flattener: &mut Flattener,
    slot_of_item: &[u32],
    bands: u32,
    occluders: Option<&Occluders>,
) -> (RunLines, PolylineSet, Vec<SkippedEdge>) {
    let eye = view.eye();
    // One pixel of angle between visibility samples, changes found to a thousandth of it.
    let pixel = std::f64::consts::TAU / flattener.map().width();
    let mut hidden = PolylineSet::new();
    // Only the layers this run uses (a model may have a layer for each of its parts).
    let mut lines: Vec<(u32, PolylineSet)> = Vec::new();
    let mut skipped = Vec::new();
    for offset in 0..count {
        let edge = edge_at(first_index + offset);
        let mut slot = slot_of_item.get(edge.item.0 as usize).copied().unwrap_or(0);
        if bands > 1 {
            slot += Distance::of(&edge, &eye).offset();
        }
        match view.sphere_curve(&edge.curve) {
            Ok(curve) => {
                let position = match lines.iter().rposition(|(s, _)| *s == slot) {
                    Some(position) => position,
                    None => {
                        // Most edges draw as one polyline of two or three vertices.
                        let room = count - offset;
                        lines.push((slot, PolylineSet::with_capacity(room, 3 * room)));
                        lines.len() - 1
                    }
                };
                match occluders {
                    None => flattener.flatten(&curve, &mut lines[position].1),
                    Some(occluders) => {
                        let depth = match edge.curve {
                            SiteCurve::Segment { start, end } => Depth::Segment {
                                a: view.to_view(&start),
                                b: view.to_view(&end),
                            },
                            SiteCurve::Ellipse(_) => Depth::Curve,
                        };
                        for (t0, t1, seen) in occluders.spans(&curve, &depth, pixel, 1e-3 * pixel) {
                            if t1 <= t0 {
                                continue;
                            }
                            let part = SphereCurve {
                                t0,
                                t1,
                                exact_end: if t1 == curve.t1 {
                                    curve.exact_end
                                } else {
                                    None
                                },
                                ..curve
                            };
                            let out = if seen {
                                &mut lines[position].1
                            } else {
                                &mut hidden
                            };
                            flattener.flatten(&part, out);
                        }
                    }
                }
            }
            Err(why) => skipped.push(SkippedEdge {
                item: edge.item,
                edge_index: first_index + offset,
                why,
            }),
        }
    }
    (lines, hidden, skipped)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plane::Equirect;
    use crate::scene::{parse_scene, EllipseArc, Face, Faces, HiddenEdges};
    use std::path::Path;

    fn drawn(scene: &str, width: f64, hidden: HiddenEdges) -> Wireframe {
        let site = parse_scene(scene.as_bytes(), Path::new("test.ron"), "test").unwrap();
        drawn_site(&site, width, hidden, false, &Budget::new(None)).unwrap()
    }

    /// The wireframe of `site` from its first standpoint, on an image `width` pixels wide.
    fn drawn_site(
        site: &Site,
        width: f64,
        hidden: HiddenEdges,
        by_distance: bool,
        budget: &Budget,
    ) -> Result<Wireframe> {
        let view = ViewFrame::new(&site.standpoints[0]);
        let flattener = Flattener::new(Equirect::from_size_px(width, width / 2.0), 0.1);
        let hidden_lines = HiddenLines::new(site, Some(hidden));
        wireframe(
            site,
            &view,
            &flattener,
            &hidden_lines,
            by_distance,
            budget,
            || (),
        )
        .map(|(wireframe, ())| wireframe)
    }

    fn segment(start: Point3<f64>, end: Point3<f64>) -> Edge {
        Edge {
            curve: SiteCurve::Segment { start, end },
            item: ItemId(0),
        }
    }

    #[test]
    fn a_point_marker_is_a_cross_a_fixed_number_of_pixels_across() {
        // Whatever the image's width, the arms reach MARKER_ARM_PX either side of the point.
        let scene = "Scene(standpoints: [(name: \"here\", x: 0, y: 0)], \
            items: [Point(label: \"well\", at: (3, 40, 0.5))])";
        for width in [2048.0, 8192.0] {
            let wire = drawn(scene, width, HiddenEdges::Solid);
            let points: Vec<_> = wire.layers.iter().flat_map(|l| l.lines.points()).collect();
            assert!(!points.is_empty());
            let (xs, ys): (Vec<f64>, Vec<f64>) = points.iter().map(|p| (p.x, p.y)).unzip();
            let spread = |v: &[f64]| {
                v.iter().cloned().fold(f64::NEG_INFINITY, f64::max)
                    - v.iter().cloned().fold(f64::INFINITY, f64::min)
            };
            assert!(
                (spread(&xs) - 2.0 * MARKER_ARM_PX).abs() < 0.05,
                "{width}: {xs:?}"
            );
            assert!(
                (spread(&ys) - 2.0 * MARKER_ARM_PX).abs() < 0.05,
                "{width}: {ys:?}"
            );
        }
    }

    #[test]
    fn a_block_is_drawn_and_its_back_edges_found_hidden() {
        // A block seen from 20 m off one face: its twelve edges are drawn; with hidden parts
        // looked for, the three edges meeting at the far bottom corner are hidden, partly
        // or wholly, and go to the hidden set.
        let scene = "Scene(standpoints: [(name: \"here\", x: 3, y: -20)], \
            items: [Block(at: Corner(0, 0), width: 10, depth: 10, height: 9)])";
        let solid = drawn(scene, 4096.0, HiddenEdges::Solid);
        let lines: usize = solid.layers.iter().map(|l| l.lines.len()).sum();
        assert!(lines >= 12, "{lines}");
        assert!(solid.hidden.is_empty() && solid.skipped.is_empty());
        let faint = drawn(scene, 4096.0, HiddenEdges::Faint);
        assert!(!faint.hidden.is_empty());
    }

    #[test]
    fn skipped_edges_are_numbered_in_the_sites_order_across_runs() {
        // 2,148 fixed edges (a run of 2,048 and one of 100), every fifth of no length; then
        // 1,100 point markers (2,200 edges that depend on the eye: a run of 2,048 and one of
        // 152), every third half a nanometre from the eye, so that both arms of its cross end
        // at the eye (within 1e-9 m of it). Each edge left out keeps its place in that
        // order, whichever run and thread took it: fixed edge i is i, marker k's two arms
        // are 2,148 + 2k and 2,148 + 2k + 1.
        let scene = "Scene(standpoints: [(name: \"here\", x: 0, y: 0)], \
            items: [Point(label: \"well\", at: (3, 40, 0.5))])";
        let mut site = parse_scene(scene.as_bytes(), Path::new("test.ron"), "test").unwrap();
        let eye = ViewFrame::new(&site.standpoints[0]).eye();
        let fixed = EDGES_PER_RUN + 100;
        site.edges = (0..fixed)
            .map(|i| {
                let start = Point3::new(-10.0 + 0.01 * i as f64, 30.0, 0.0);
                let rise = if i % 5 == 0 { 0.0 } else { 1.0 };
                segment(start, start + Vector3::new(0.0, 0.0, rise))
            })
            .collect();
        site.markers = (0..1100)
            .map(|k| Marker {
                at: if k % 3 == 0 {
                    eye + Vector3::new(5e-10, 0.0, 0.0)
                } else {
                    let a = k as f64;
                    Point3::new(20.0 * a.cos(), 20.0 * a.sin(), 1.0)
                },
                item: ItemId(0),
            })
            .collect();
        let wire =
            drawn_site(&site, 2048.0, HiddenEdges::Solid, false, &Budget::new(None)).unwrap();
        let expected: Vec<(usize, Degeneracy)> = (0..fixed)
            .filter(|i| i % 5 == 0)
            .map(|i| (i, Degeneracy::ZeroLength))
            .chain(
                (0..1100)
                    .filter(|k| k % 3 == 0)
                    .flat_map(|k| [fixed + 2 * k, fixed + 2 * k + 1])
                    .map(|i| (i, Degeneracy::EndAtEye)),
            )
            .collect();
        let found: Vec<(usize, Degeneracy)> =
            wire.skipped.iter().map(|s| (s.edge_index, s.why)).collect();
        assert_eq!(found.len(), expected.len());
        for (found, expected) in found.iter().zip(&expected) {
            assert_eq!(found, expected);
        }
    }

    #[test]
    fn the_drawn_vertices_count_against_the_budget() {
        // Each of the block's twelve edges draws as a polyline of at least its two ends, so
        // a budget with 20 vertices left refuses the drawing (`MAX_DRAWN_VERTICES`, the
        // limit the budget's table gives); with all of it left, it is drawn.
        let scene = "Scene(standpoints: [(name: \"here\", x: 3, y: -20)], \
            items: [Block(at: Corner(0, 0), width: 10, depth: 10, height: 9)])";
        let site = parse_scene(scene.as_bytes(), Path::new("test.ron"), "test").unwrap();
        let budget = Budget::new(None);
        budget
            .add_vertices(crate::budget::MAX_DRAWN_VERTICES - 20)
            .unwrap();
        let refused = drawn_site(&site, 4096.0, HiddenEdges::Solid, false, &budget);
        assert!(
            matches!(refused, Err(Error::TooLarge { .. })),
            "{refused:?}"
        );
        let budget = Budget::new(None);
        assert!(drawn_site(&site, 4096.0, HiddenEdges::Solid, false, &budget).is_ok());
    }

    #[test]
    fn an_edge_is_banded_by_its_nearest_point() {
        // From an eye at (1, 2, 1.5), by hand: a level segment 7 m ahead reaching 40 m to
        // either side is near by its middle (its ends are 40.6 m off); at 20 m it is middle
        // and at 35 m far (ends at 44.7 and 53.2 m). A segment from 10 to 40 m straight
        // along x is middle by its nearer end (its line passes through the eye, beyond that
        // end). Exactly 8 m and exactly 30 m (the middles (1, 10, 1.5) and (1, 32, 1.5) of
        // segments 2 m long) are middle: near is nearer than 8 m, far beyond 30 m.
        let eye = Point3::new(1.0, 2.0, 1.5);
        let level = |ahead: f64, half: f64| {
            segment(
                eye + Vector3::new(-half, ahead, 0.0),
                eye + Vector3::new(half, ahead, 0.0),
            )
        };
        let band = |edge: Edge| Distance::of(&edge, &eye);
        assert_eq!(band(level(7.0, 40.0)), Distance::Near);
        assert_eq!(band(level(20.0, 40.0)), Distance::Middle);
        assert_eq!(band(level(35.0, 40.0)), Distance::Far);
        let along = segment(
            eye + Vector3::new(10.0, 0.0, 0.0),
            eye + Vector3::new(40.0, 0.0, 0.0),
        );
        assert_eq!(band(along), Distance::Middle);
        assert_eq!(band(level(8.0, 1.0)), Distance::Middle);
        assert_eq!(band(level(30.0, 1.0)), Distance::Middle);
        assert_eq!(band(level(7.99, 1.0)), Distance::Near);
        assert_eq!(band(level(30.01, 1.0)), Distance::Far);
        // A circle or ellipse by its centre's distance less its larger semi-axis: 9 m off
        // with semi-axes 1 and 2 m, 7 m (near); 9.5 m off, 7.5 m (near; by its smaller
        // semi-axis 8.5 m); 40 m off with semi-axes 2 and 1 m, 38 m (far); 3 m off with a
        // radius of 5 m the eye is inside it, 0 m (near).
        let ellipse = |ahead: f64, u: f64, v: f64| Edge {
            curve: SiteCurve::from(EllipseArc {
                centre: eye + Vector3::new(0.0, ahead, 0.0),
                u: Vector3::new(u, 0.0, 0.0),
                v: Vector3::new(0.0, 0.0, v),
                start: 0.0,
                sweep: std::f64::consts::TAU,
            }),
            item: ItemId(0),
        };
        assert_eq!(band(ellipse(9.0, 1.0, 2.0)), Distance::Near);
        assert_eq!(band(ellipse(9.5, 1.0, 2.0)), Distance::Near);
        assert_eq!(band(ellipse(40.0, 2.0, 1.0)), Distance::Far);
        assert_eq!(band(ellipse(3.0, 5.0, 5.0)), Distance::Near);
    }

    #[test]
    fn with_weights_by_distance_each_layer_has_three_bands() {
        // Items on no layer and on "rails": the layers are (none, rails) times (middle,
        // near, far), in that order; a line 5 m ahead on no layer is near, one 20 m ahead
        // on rails middle and one 50 m ahead on rails far (the eye 1.6 m up at the origin).
        let scene = "Scene(standpoints: [(name: \"here\", x: 0, y: 0)], items: [\
            Line(from: (-1, 5, 0), to: (1, 5, 0)), \
            Line(layer: \"rails\", from: (-1, 20, 0), to: (1, 20, 0)), \
            Line(layer: \"rails\", from: (-1, 50, 0), to: (1, 50, 0))])";
        let site = parse_scene(scene.as_bytes(), Path::new("test.ron"), "test").unwrap();
        let wire = drawn_site(&site, 2048.0, HiddenEdges::Solid, true, &Budget::new(None)).unwrap();
        let found: Vec<(Option<&str>, Distance, usize)> = wire
            .layers
            .iter()
            .map(|l| (l.site_layer.as_deref(), l.distance, l.lines.len()))
            .collect();
        let rails = Some("rails");
        assert_eq!(
            found,
            [
                (None, Distance::Middle, 0),
                (None, Distance::Near, 1),
                (None, Distance::Far, 0),
                (rails, Distance::Middle, 1),
                (rails, Distance::Near, 0),
                (rails, Distance::Far, 1),
            ]
        );
    }

    #[test]
    fn a_marker_cross_is_square_to_the_sight_line_in_every_direction() {
        // Each arm is centred on the point, reaches d tan(arm) either side of it and is
        // square to the sight line; the first is level, the second square to the first.
        // Due east at eye height the level arm runs north and south and the other upright;
        // straight overhead, where no level direction is singled out, the arms run east-west
        // (x, the fallback) and north-south. Towards (-3, 4, -2), by hand: the level arm is
        // (-4, -3, 0) / 5 and the other (-3, 4, -2) x (-0.8, -0.6, 0) = (-1.2, 1.6, 5).
        let eye = Point3::new(2.0, -1.0, 1.6);
        let arm = 0.02;
        for (towards, first, second) in [
            (Vector3::new(10.0, 0.0, 0.0), Vector3::y(), Vector3::z()),
            (Vector3::new(0.0, 0.0, 10.0), Vector3::x(), Vector3::y()),
            (
                Vector3::new(-3.0, 4.0, -2.0),
                Vector3::new(-0.8, -0.6, 0.0),
                Vector3::new(-1.2, 1.6, 5.0),
            ),
        ] {
            let marker = Marker {
                at: eye + towards,
                item: ItemId(0),
            };
            let cross = marker_cross(&marker, &eye, arm);
            assert_eq!(cross.len(), 2);
            let reach = towards.norm() * arm.tan();
            let arms: Vec<Vector3<f64>> = cross
                .iter()
                .map(|edge| {
                    let SiteCurve::Segment { start, end } = edge.curve else {
                        panic!("{edge:?}")
                    };
                    assert!(((start + (end - start) / 2.0) - marker.at).norm() < 1e-12);
                    assert!(
                        ((end - start).norm() - 2.0 * reach).abs() < 1e-12,
                        "{edge:?}"
                    );
                    (end - start) / (2.0 * reach)
                })
                .collect();
            assert!(
                arms.iter().all(|a| a.dot(&towards).abs() < 1e-12),
                "{arms:?}"
            );
            assert!(
                arms[0].dot(&arms[1]).abs() < 1e-12 && arms[0].z == 0.0,
                "{arms:?}"
            );
            // Each arm's line, either way along it.
            let along = |a: &Vector3<f64>, b: &Vector3<f64>| a.cross(b).norm() < 1e-12;
            assert!(along(&arms[0], &first.normalize()), "{arms:?}");
            assert!(along(&arms[1], &second.normalize()), "{arms:?}");
        }
        // At the eye, none.
        let at_eye = Marker {
            at: eye,
            item: ItemId(0),
        };
        assert!(marker_cross(&at_eye, &eye, arm).is_empty());
    }

    #[test]
    fn a_line_behind_a_plate_is_cut_where_the_plates_sides_hide_it() {
        // The eye 1.6 m up at the origin looking north (+y); a plate 2 m wide and 3 m high,
        // 5 m ahead (x from -1 to 1), hides the middle of a line 10 m ahead from x = -5 to
        // 5, 1 m up. By similar triangles the sight lines past the plate's sides meet the line
        // at x = -2 and 2 (the plate's top and foot are above and below it: at y = 5 the sight
        // line to the line is 1.3 m up). So the line is drawn from azimuth -atan(1/2) to
        // -atan(1/5) and from atan(1/5) to atan(1/2), and hidden between; on an image 2,048
        // px wide, 2048 / 2 pi px a radian either side of the middle column, 1,024.
        let scene = "Scene(standpoints: [(name: \"here\", x: 0, y: 0)], \
            items: [Line(from: (-5, 10, 1), to: (5, 10, 1))])";
        let mut site = parse_scene(scene.as_bytes(), Path::new("test.ron"), "test").unwrap();
        let corner = |x: f64, z: f64| Point3::new(x, 5.0, z);
        let face = |corners| Face {
            corners,
            item: ItemId(0),
            slack: 0.0,
        };
        site.faces = Faces::from([
            face([corner(-1.0, 0.0), corner(1.0, 0.0), corner(1.0, 3.0)]),
            face([corner(-1.0, 0.0), corner(1.0, 3.0), corner(-1.0, 3.0)]),
        ]);
        let width = 2048.0;
        let column = |x: f64| width / 2.0 + (x / 10.0).atan() * width / std::f64::consts::TAU;
        let wire = drawn_site(&site, width, HiddenEdges::Faint, false, &Budget::new(None)).unwrap();
        let ends = |lines: &PolylineSet| -> Vec<(f64, f64)> {
            lines.iter().map(|l| (l[0].x, l[l.len() - 1].x)).collect()
        };
        let seen: Vec<(f64, f64)> = wire.layers.iter().flat_map(|l| ends(&l.lines)).collect();
        let hidden = ends(&wire.hidden);
        let near = |found: &[(f64, f64)], expected: &[(f64, f64)]| {
            found.len() == expected.len()
                && found
                    .iter()
                    .zip(expected)
                    .all(|(f, e)| (f.0 - e.0).abs() < 0.01 && (f.1 - e.1).abs() < 0.01)
        };
        let expected_seen = [(column(-5.0), column(-2.0)), (column(2.0), column(5.0))];
        assert!(
            near(&seen, &expected_seen),
            "{seen:?}, not {expected_seen:?}"
        );
        let expected_hidden = [(column(-2.0), column(2.0))];
        assert!(
            near(&hidden, &expected_hidden),
            "{hidden:?}, not {expected_hidden:?}"
        );
    }
}
