//! The site's edges as seen from one standpoint.

use crate::plane::{Flattener, PolylineSet};
use crate::scene::{Edge, ItemId, Site};
use crate::sphere::{Degeneracy, ViewFrame};

/// An edge left out because it has no drawable image from the standpoint.
#[derive(Clone, Debug, PartialEq)]
pub struct SkippedEdge {
    pub item: ItemId,
    pub edge_index: usize,
    pub why: Degeneracy,
}

/// Below this many edges a second thread costs more than it saves.
const EDGES_PER_THREAD: usize = 4096;

/// Flattens every edge of the site; degenerate edges are listed, not drawn.
///
/// Large sites are split into one run of consecutive edges per core; the runs' polylines
/// are joined in edge order, so the result does not depend on the number of cores.
pub fn wireframe(
    site: &Site,
    view: &ViewFrame,
    flattener: &Flattener,
) -> (PolylineSet, Vec<SkippedEdge>) {
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    let threads = cores.min(site.edges.len() / EDGES_PER_THREAD).max(1);
    let chunk = site.edges.len().div_ceil(threads).max(1);
    let parts: Vec<(PolylineSet, Vec<SkippedEdge>)> = std::thread::scope(|scope| {
        let handles: Vec<_> = site
            .edges
            .chunks(chunk)
            .enumerate()
            .map(|(i, edges)| {
                let mut flattener = flattener.clone();
                scope.spawn(move || flatten_edges(edges, i * chunk, view, &mut flattener))
            })
            .collect();
        handles
            .into_iter()
            .map(|h| {
                h.join()
                    .unwrap_or_else(|panic| std::panic::resume_unwind(panic))
            })
            .collect()
    });
    let mut lines = PolylineSet::new();
    let mut skipped = Vec::new();
    for (mut part_lines, part_skipped) in parts {
        lines.append(&mut part_lines);
        skipped.extend(part_skipped);
    }
    (lines, skipped)
}

fn flatten_edges(
    edges: &[Edge],
    first_index: usize,
    view: &ViewFrame,
    flattener: &mut Flattener,
) -> (PolylineSet, Vec<SkippedEdge>) {
    let mut lines = PolylineSet::new();
    let mut skipped = Vec::new();
    for (offset, edge) in edges.iter().enumerate() {
        match view.sphere_curve(&edge.curve) {
            Ok(curve) => flattener.flatten(&curve, &mut lines),
            Err(why) => skipped.push(SkippedEdge {
                item: edge.item,
                edge_index: first_index + offset,
                why,
            }),
        }
    }
    (lines, skipped)
}
