//! The site's edges as seen from one standpoint.

use crate::plane::{Flattener, PolylineSet};
use crate::scene::{ItemId, Site};
use crate::sphere::{Degeneracy, ViewFrame};

/// An edge left out because it has no drawable image from the standpoint.
#[derive(Clone, Debug, PartialEq)]
pub struct SkippedEdge {
    pub item: ItemId,
    pub edge_index: usize,
    pub why: Degeneracy,
}

/// Flattens every edge of the site; degenerate edges are listed, not drawn.
pub fn wireframe(
    site: &Site,
    view: &ViewFrame,
    flattener: &Flattener,
) -> (PolylineSet, Vec<SkippedEdge>) {
    let mut lines = PolylineSet::new();
    let mut skipped = Vec::new();
    for (edge_index, edge) in site.edges.iter().enumerate() {
        match view.sphere_curve(&edge.curve) {
            Ok(curve) => flattener.flatten(&curve, &mut lines),
            Err(why) => skipped.push(SkippedEdge {
                item: edge.item,
                edge_index,
                why,
            }),
        }
    }
    (lines, skipped)
}
