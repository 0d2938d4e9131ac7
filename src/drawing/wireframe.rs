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

/// Flattens every edge of the site; degenerate edges are listed, not drawn.
///
/// Large sites are cut into runs of consecutive edges that the cores take one at a time
/// (near edges cost far more than distant ones, so fixed halves would leave a core idle);
/// the runs' polylines are joined in edge order, so the result does not depend on the
/// number of cores.
pub fn wireframe(
    site: &Site,
    view: &ViewFrame,
    flattener: &Flattener,
    hidden_lines: &HiddenLines,
    by_distance: bool,
    budget: &Budget,
) -> Result<Wireframe> {
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
    let runs: Vec<&[Edge]> = site
        .edges
        .chunks(per_run)
        .chain(outlines.chunks(per_run))
        .collect();
    let fixed_runs = site.edges.len().div_ceil(per_run);
    let first_index = |run: usize| {
        if run < fixed_runs {
            run * per_run
        } else {
            site.edges.len() + (run - fixed_runs) * per_run
        }
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
            let Some(edges) = runs.get(index) else { break };
            let progress = index as f64 / runs.len() as f64;
            if let Err(error) = budget.check_time(stage, stage_started, progress) {
                refuse(&refused, error, &next_run, runs.len());
                break;
            }
            let (lines, hidden, skipped) = flatten_edges(
                edges,
                first_index(index),
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
    // The calling thread takes a share too, from the start: a thread it spawns may wait a
    // scheduler's time slice (measured: 1.5 to 2.5 ms) before it runs.
    const EDGES_FOR_CALLER: usize = 20_000;
    let mut parts: Vec<(usize, RunLines, PolylineSet, Vec<SkippedEdge>)> =
        std::thread::scope(|scope| {
            let work = &work;
            // Only a large drawing's calling thread takes a share: a small one is done
            // before a late thread costs much, and with its calling thread only waiting,
            // the explorer's memory over a thousand renders for twenty clients grows as
            // little as before (2 to 5 %, measured, against 6 to 10 % with each client's
            // thread keeping the lists of its share in a memory arena of its own).
            let here = threads > 1 && site.edges.len() + outlines.len() >= EDGES_FOR_CALLER;
            let handles: Vec<_> = (usize::from(here)..threads)
                .map(|_| {
                    let flattener = flattener.clone();
                    scope.spawn(move || work(flattener))
                })
                .collect();
            let mut parts = if here {
                work(flattener.clone())
            } else {
                Vec::new()
            };
            for handle in handles {
                parts.extend(
                    handle
                        .join()
                        .unwrap_or_else(|panic| std::panic::resume_unwind(panic)),
                );
            }
            parts
        });
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
    Ok(Wireframe {
        layers,
        hidden,
        skipped,
    })
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
            SiteCurve::Ellipse { centre, u, v, .. } => {
                ((centre - eye).norm() - u.norm().max(v.norm())).max(0.0)
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

fn flatten_edges(
    edges: &[Edge],
    first_index: usize,
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
    for (offset, edge) in edges.iter().enumerate() {
        let mut slot = slot_of_item.get(edge.item.0 as usize).copied().unwrap_or(0);
        if bands > 1 {
            slot += Distance::of(edge, &eye).offset();
        }
        match view.sphere_curve(&edge.curve) {
            Ok(curve) => {
                let position = match lines.iter().rposition(|(s, _)| *s == slot) {
                    Some(position) => position,
                    None => {
                        // Most edges draw as one polyline of two or three vertices.
                        let room = edges.len() - offset;
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
                            SiteCurve::Ellipse { .. } => Depth::Curve,
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
    use crate::scene::{parse_scene, HiddenEdges};
    use std::path::Path;

    fn drawn(scene: &str, width: f64, hidden: HiddenEdges) -> Wireframe {
        let site = parse_scene(scene.as_bytes(), Path::new("test.ron"), "test").unwrap();
        let view = ViewFrame::new(&site.standpoints[0]);
        let flattener = Flattener::new(Equirect::from_size_px(width, width / 2.0), 0.1);
        let hidden_lines = HiddenLines::new(&site, Some(hidden));
        wireframe(
            &site,
            &view,
            &flattener,
            &hidden_lines,
            false,
            &Budget::new(None),
        )
        .unwrap()
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
}
