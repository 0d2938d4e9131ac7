//! The site's edges, kept small: a straight edge is two numbers into one list of end points,
//! which the edges of a mesh share as its welded vertices do, and an arc is one number into a
//! list of arcs.
//!
//! A million-triangle model draws about a million straight edges; written out whole, each
//! would take 64 bytes (its two ends and its item) against 12, plus the vertices once, and
//! writing is what loading a big model spends most on. Readers get whole [`Edge`]s, ends
//! looked up.

use std::ops::Range;

use nalgebra::Point3;

use super::curve::{EllipseArc, SiteCurve};
use super::site::{Edge, ItemId};

/// A straight edge by the numbers of its two ends in a list of points, as a mesh lists its
/// drawn edges over its welded vertices (see [`Edges::extend_numbered`]).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct NumberedEdge {
    /// The numbers of its two ends.
    pub ends: [u32; 2],
    /// The item it belongs to.
    pub item: ItemId,
}

/// In an edge's first end as kept: the edge is an arc, and its second end numbers the arc.
/// (Points are numbered from 0 and never reach it: a site holds far fewer edges.)
const ARC: u32 = u32::MAX;

/// The edges of a site, in the order they were added. Two lists are equal when they hold
/// the same edges in the same order, however their ends are shared.
#[derive(Clone, Debug, Default)]
pub struct Edges {
    points: Vec<Point3<f64>>,
    arcs: Vec<EllipseArc>,
    /// Each edge: a segment's ends in `points`, or [`ARC`] and its number in `arcs`.
    edges: Vec<NumberedEdge>,
}

impl Edges {
    /// No edges.
    pub fn new() -> Edges {
        Edges::default()
    }

    /// How many edges.
    pub fn len(&self) -> usize {
        self.edges.len()
    }

    /// Whether there are none.
    pub fn is_empty(&self) -> bool {
        self.edges.is_empty()
    }

    /// The edge at `index`, its ends looked up. Panics past the end, as a slice does.
    #[inline]
    pub fn get(&self, index: usize) -> Edge {
        self.resolve(&self.edges[index])
    }

    /// Every edge, in order.
    pub fn iter(&self) -> EdgeIter<'_> {
        self.iter_range(0..self.edges.len())
    }

    /// The edges numbered in `range`, in order. Panics if it reaches past the end.
    pub fn iter_range(&self, range: Range<usize>) -> EdgeIter<'_> {
        EdgeIter {
            edges: self,
            stored: self.edges[range].iter(),
        }
    }

    /// Adds an edge with ends (or an arc) of its own.
    pub fn push(&mut self, edge: Edge) {
        let ends = match edge.curve {
            SiteCurve::Segment { start, end } => {
                let first = self.points.len() as u32;
                self.points.extend([start, end]);
                [first, first + 1]
            }
            SiteCurve::Ellipse(arc) => {
                self.arcs.push(arc);
                [ARC, self.arcs.len() as u32 - 1]
            }
        };
        debug_assert!(self.points.len() < ARC as usize);
        self.edges.push(NumberedEdge {
            ends,
            item: edge.item,
        });
    }

    /// Adds straight edges whose ends are numbers into `points`, which join the list once:
    /// a mesh's drawn edges over its welded vertices, in runs (one from each core). A run
    /// that can be kept as it is, is moved in rather than copied. Without any edge, the
    /// points are not kept (a smooth model draws only outlines, found from each eye).
    pub fn extend_numbered(
        &mut self,
        points: &[Point3<f64>],
        runs: impl IntoIterator<Item = Vec<NumberedEdge>>,
    ) {
        let runs: Vec<Vec<NumberedEdge>> = runs.into_iter().filter(|r| !r.is_empty()).collect();
        if runs.is_empty() {
            return;
        }
        let base = self.points.len() as u32;
        self.points.extend_from_slice(points);
        debug_assert!(self.points.len() < ARC as usize);
        for run in runs {
            if base == 0 && self.edges.is_empty() {
                self.edges = run;
            } else {
                self.edges.extend(run.iter().map(|edge| NumberedEdge {
                    ends: edge.ends.map(|end| base + end),
                    item: edge.item,
                }));
            }
        }
    }

    /// Keeps the first `len` edges, and drops the points and arcs that only the others used
    /// (they join with the edges that bring them, so those are the last ones).
    pub fn truncate(&mut self, len: usize) {
        let dropped = &self.edges[len.min(self.edges.len())..];
        let first_arc = dropped
            .iter()
            .filter(|e| e.ends[0] == ARC)
            .map(|e| e.ends[1]);
        if let Some(first_arc) = first_arc.min() {
            self.arcs.truncate(first_arc as usize);
        }
        let ends = dropped.iter().filter(|e| e.ends[0] != ARC);
        if let Some(first_point) = ends.flat_map(|e| e.ends).min() {
            self.points.truncate(first_point as usize);
        }
        self.edges.truncate(len);
    }

    /// Drops every edge, point and arc.
    pub fn clear(&mut self) {
        self.points.clear();
        self.arcs.clear();
        self.edges.clear();
    }

    #[inline]
    fn resolve(&self, stored: &NumberedEdge) -> Edge {
        let [a, b] = stored.ends;
        let curve = if a == ARC {
            SiteCurve::Ellipse(self.arcs[b as usize])
        } else {
            SiteCurve::Segment {
                start: self.points[a as usize],
                end: self.points[b as usize],
            }
        };
        Edge {
            curve,
            item: stored.item,
        }
    }
}

impl PartialEq for Edges {
    fn eq(&self, other: &Edges) -> bool {
        self.len() == other.len() && self.iter().eq(other.iter())
    }
}

/// The edges of [`Edges`] in order, each with its ends looked up.
#[derive(Clone, Debug)]
pub struct EdgeIter<'a> {
    edges: &'a Edges,
    stored: std::slice::Iter<'a, NumberedEdge>,
}

impl Iterator for EdgeIter<'_> {
    type Item = Edge;

    #[inline]
    fn next(&mut self) -> Option<Edge> {
        self.stored.next().map(|s| self.edges.resolve(s))
    }

    fn size_hint(&self) -> (usize, Option<usize>) {
        self.stored.size_hint()
    }
}

impl ExactSizeIterator for EdgeIter<'_> {}

impl<'a> IntoIterator for &'a Edges {
    type Item = Edge;
    type IntoIter = EdgeIter<'a>;

    fn into_iter(self) -> EdgeIter<'a> {
        self.iter()
    }
}

impl FromIterator<Edge> for Edges {
    fn from_iter<I: IntoIterator<Item = Edge>>(edges: I) -> Edges {
        let mut all = Edges::new();
        all.extend(edges);
        all
    }
}

impl<const N: usize> From<[Edge; N]> for Edges {
    fn from(edges: [Edge; N]) -> Edges {
        edges.into_iter().collect()
    }
}

impl Extend<Edge> for Edges {
    fn extend<I: IntoIterator<Item = Edge>>(&mut self, edges: I) {
        for edge in edges {
            self.push(edge);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::Vector3;

    fn segment(start: [f64; 3], end: [f64; 3], item: u32) -> Edge {
        Edge {
            curve: SiteCurve::Segment {
                start: start.into(),
                end: end.into(),
            },
            item: ItemId(item),
        }
    }

    fn arc(radius: f64, item: u32) -> Edge {
        Edge {
            curve: SiteCurve::from(EllipseArc {
                centre: Point3::new(1.0, 2.0, 3.0),
                u: Vector3::x() * radius,
                v: Vector3::y() * radius,
                start: 0.0,
                sweep: 1.0,
            }),
            item: ItemId(item),
        }
    }

    #[test]
    fn edges_come_back_as_they_went_in_segments_and_arcs_alike() {
        let given = [
            segment([0.0, 0.0, 0.0], [1.0, 0.0, 0.0], 0),
            arc(2.0, 1),
            segment([1.0, 0.0, 0.0], [1.0, 5.0, -2.5], 1),
            arc(0.5, 2),
        ];
        let edges = Edges::from(given);
        assert_eq!(edges.len(), 4);
        assert!(!edges.is_empty() && Edges::new().is_empty());
        assert_eq!(edges.iter().collect::<Vec<_>>(), given);
        assert_eq!(edges.iter().len(), 4);
        assert_eq!((&edges).into_iter().nth(3), Some(given[3]));
        assert_eq!(edges.get(1), given[1]);
        assert_eq!(edges.iter_range(1..3).collect::<Vec<_>>(), &given[1..3]);
        assert_eq!(edges.iter_range(1..3).len(), 2);
    }

    #[test]
    fn a_meshs_numbered_edges_share_its_points_and_count_from_its_first() {
        // An edge of its own first, so the mesh's numbers must be moved on by its two ends.
        let mut edges = Edges::from([segment([9.0; 3], [8.0; 3], 0)]);
        let points = [[0.0, 0.0, 0.0], [1.0, 0.0, 0.0], [1.0, 1.0, 0.0]].map(Point3::from);
        let numbered = |a, b, item| NumberedEdge {
            ends: [a, b],
            item: ItemId(item),
        };
        // A triangle's three sides, from two cores: the second run follows the first.
        edges.extend_numbered(
            &points,
            [
                vec![numbered(0, 1, 4), numbered(1, 2, 4)],
                vec![numbered(0, 2, 5)],
            ],
        );
        assert_eq!(
            edges.points.len(),
            2 + 3,
            "each of the mesh's points kept once"
        );
        let expected = [
            segment([9.0; 3], [8.0; 3], 0),
            segment([0.0, 0.0, 0.0], [1.0, 0.0, 0.0], 4),
            segment([1.0, 0.0, 0.0], [1.0, 1.0, 0.0], 4),
            segment([0.0, 0.0, 0.0], [1.0, 1.0, 0.0], 5),
        ];
        assert_eq!(edges.iter().collect::<Vec<_>>(), expected);
        // No edges bring no points.
        edges.extend_numbered(&points, [vec![], vec![]]);
        assert_eq!((edges.len(), edges.points.len()), (4, 5));
        // Into an empty list the numbers are kept as they are.
        let mut alone = Edges::new();
        alone.extend_numbered(&points, [vec![numbered(2, 0, 1)], vec![numbered(1, 2, 1)]]);
        assert_eq!(
            alone.iter().collect::<Vec<_>>(),
            [
                segment([1.0, 1.0, 0.0], [0.0, 0.0, 0.0], 1),
                segment([1.0, 0.0, 0.0], [1.0, 1.0, 0.0], 1),
            ]
        );
    }

    #[test]
    fn truncating_drops_only_the_dropped_edges_points_and_arcs() {
        let kept = [segment([0.0; 3], [1.0; 3], 0), arc(1.0, 0)];
        let mut edges = Edges::from(kept);
        let before = edges.clone();
        edges.extend([arc(3.0, 1), segment([2.0; 3], [3.0; 3], 1), arc(4.0, 1)]);
        edges.truncate(2);
        let lists = |e: &Edges| (e.points.clone(), e.arcs.clone(), e.edges.clone());
        assert_eq!(
            lists(&edges),
            lists(&before),
            "as before the three were added"
        );
        // Past the end, nothing changes.
        edges.truncate(5);
        assert_eq!(lists(&edges), lists(&before));
        edges.clear();
        assert_eq!(lists(&edges), lists(&Edges::new()));
    }

    #[test]
    fn lists_are_equal_when_their_edges_are_however_their_ends_are_shared() {
        let points = [[0.0, 0.0, 0.0], [1.0, 0.0, 0.0], [1.0, 1.0, 0.0]].map(Point3::from);
        let numbered = |a, b| NumberedEdge {
            ends: [a, b],
            item: ItemId(0),
        };
        let mut shared = Edges::new();
        shared.extend_numbered(&points, [vec![numbered(0, 1), numbered(1, 2)]]);
        let own = Edges::from([
            segment([0.0, 0.0, 0.0], [1.0, 0.0, 0.0], 0),
            segment([1.0, 0.0, 0.0], [1.0, 1.0, 0.0], 0),
        ]);
        assert_eq!(shared, own);
        let mut turned = own.clone();
        turned.truncate(1);
        turned.push(segment([1.0, 1.0, 0.0], [1.0, 0.0, 0.0], 0));
        assert_ne!(shared, turned, "the second edge runs the other way");
        turned.truncate(1);
        assert_ne!(shared, turned, "one edge fewer");
    }

    #[test]
    fn a_kept_edge_is_12_bytes() {
        // Two numbers and an item: a million mesh edges write 12 MB, not 64 MB.
        assert_eq!(std::mem::size_of::<NumberedEdge>(), 12);
    }
}
