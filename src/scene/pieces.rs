//! A mesh's triangles split into pieces joined edge to edge, and whether a piece is closed:
//! a model with a ground sheet, or one open house among closed ones, is not closed as a
//! whole, yet each closed house in it is a solid one cannot stand in.
//!
//! Only the pieces the standpoint checks ask about are walked, from one triangle out across
//! its edges: a house of a town is a few dozen triangles, whatever the town's size.

use std::collections::HashSet;

/// Which triangles meet at each vertex (vertex numbers from 0), listed once for the walks.
pub struct TrianglesAtVertices {
    starts: Vec<u32>,
    triangles: Vec<u32>,
}

impl TrianglesAtVertices {
    /// Counts the triangles at each vertex, then lists them (a counting sort: two passes).
    pub fn of(triangles: &[[u32; 3]]) -> TrianglesAtVertices {
        let vertices = triangles
            .iter()
            .flatten()
            .max()
            .map_or(0, |&v| v as usize + 1);
        let mut starts = vec![0u32; vertices + 1];
        for corners in triangles {
            for &v in corners {
                starts[v as usize + 1] += 1;
            }
        }
        for v in 0..vertices {
            starts[v + 1] += starts[v];
        }
        let mut next = starts.clone();
        let mut listed = vec![0u32; starts[vertices] as usize];
        for (t, corners) in triangles.iter().enumerate() {
            for &v in corners {
                listed[next[v as usize] as usize] = t as u32;
                next[v as usize] += 1;
            }
        }
        TrianglesAtVertices {
            starts,
            triangles: listed,
        }
    }

    fn at(&self, v: u32) -> &[u32] {
        &self.triangles[self.starts[v as usize] as usize..self.starts[v as usize + 1] as usize]
    }
}

/// The piece of `triangles` that triangle `t` belongs to, as its triangles' indices in
/// increasing order, if that piece is closed: every edge of it lies between exactly two of
/// its triangles. `None` if the piece is open.
///
/// Triangles across an edge between two of them are one piece. An edge of one triangle
/// opens its piece. At an edge of three or more (a sheet touching a box along an edge, two
/// boxes sharing one), the pieces are known from their other edges: each must have exactly
/// two triangles there.
pub fn closed_piece(
    triangles: &[[u32; 3]],
    at_vertices: &TrianglesAtVertices,
    t: usize,
) -> Option<Vec<u32>> {
    // The triangles on the edge from `a` to `b`.
    let on_edge = |a: u32, b: u32| {
        at_vertices
            .at(a)
            .iter()
            .copied()
            .filter(move |&u| triangles[u as usize].contains(&b))
    };
    let mut piece: HashSet<u32> = HashSet::from([t as u32]);
    let mut to_walk = vec![t as u32];
    let mut shared_by_more = Vec::new();
    while let Some(u) = to_walk.pop() {
        let corners = triangles[u as usize];
        for k in 0..3 {
            let (a, b) = (corners[k], corners[(k + 1) % 3]);
            if a == b {
                continue;
            }
            let mut others = on_edge(a, b).filter(|&w| w != u);
            match (others.next(), others.next()) {
                (None, _) => return None,
                (Some(w), None) => {
                    if piece.insert(w) {
                        to_walk.push(w);
                    }
                }
                _ => shared_by_more.push((a, b)),
            }
        }
    }
    for (a, b) in shared_by_more {
        if on_edge(a, b).filter(|u| piece.contains(u)).count() != 2 {
            return None;
        }
    }
    let mut piece: Vec<u32> = piece.into_iter().collect();
    piece.sort_unstable();
    Some(piece)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// For each triangle, the first triangle of its piece if the piece is closed.
    fn closed_pieces(triangles: &[[u32; 3]]) -> Vec<Option<usize>> {
        let at_vertices = TrianglesAtVertices::of(triangles);
        (0..triangles.len())
            .map(|t| closed_piece(triangles, &at_vertices, t).map(|piece| piece[0] as usize))
            .collect()
    }

    /// The twelve triangles of a box whose corners are numbered from `first` (bit 0 of the
    /// number less `first` is x, bit 1 y, bit 2 z).
    fn box_triangles(first: u32) -> Vec<[u32; 3]> {
        // Each side as a quad of corners, cut in two.
        let quads = [
            [0, 2, 3, 1],
            [4, 5, 7, 6],
            [0, 1, 5, 4],
            [2, 6, 7, 3],
            [0, 4, 6, 2],
            [1, 3, 7, 5],
        ];
        quads
            .iter()
            .flat_map(|q| [[q[0], q[1], q[2]], [q[0], q[2], q[3]]])
            .map(|t| t.map(|c| c + first))
            .collect()
    }

    #[test]
    fn a_closed_box_is_one_piece_named_by_its_first_triangle() {
        assert_eq!(closed_pieces(&box_triangles(0)), vec![Some(0); 12]);
    }

    #[test]
    fn a_box_missing_a_side_is_open_and_leaves_its_neighbour_closed() {
        // The first box without its bottom (triangles 0 and 1), the second after it.
        let triangles: Vec<[u32; 3]> = box_triangles(0)
            .into_iter()
            .skip(2)
            .chain(box_triangles(8))
            .collect();
        let pieces = closed_pieces(&triangles);
        assert_eq!(&pieces[..10], &[None; 10]);
        assert_eq!(&pieces[10..], &[Some(10); 12]);
    }

    #[test]
    fn a_sheet_touching_a_box_along_an_edge_is_open_and_the_box_closed() {
        // A sheet on the box's edge from corner 0 to corner 1, out to a vertex of its own:
        // three triangles on that edge, two of the box's.
        let mut triangles = box_triangles(0);
        triangles.push([0, 8, 1]);
        let pieces = closed_pieces(&triangles);
        assert_eq!(&pieces[..12], &[Some(0); 12]);
        assert_eq!(pieces[12], None);
    }

    #[test]
    fn two_boxes_sharing_an_edge_are_two_closed_pieces() {
        // The second box's edge from its corner 0 to its corner 4 is the first box's from
        // 3 to 7: four triangles there, two of each box.
        let second: Vec<[u32; 3]> = box_triangles(8)
            .into_iter()
            .map(|t| {
                t.map(|c| match c {
                    8 => 3,
                    12 => 7,
                    c => c,
                })
            })
            .collect();
        let triangles: Vec<[u32; 3]> = box_triangles(0).into_iter().chain(second).collect();
        let pieces = closed_pieces(&triangles);
        assert_eq!(&pieces[..12], &[Some(0); 12]);
        assert_eq!(&pieces[12..], &[Some(12); 12]);
    }
}
