//! A mesh's triangles split into pieces joined edge to edge, and which pieces are closed: a
//! model with a ground sheet, or one open house among closed ones, is not closed as a whole,
//! yet each closed house in it is a solid one cannot stand in.

use super::site::Face;
use std::collections::HashMap;

/// For each of `triangles` (in order): the piece it belongs to, named by the lowest index in
/// `triangles` among the piece's triangles, if that piece is closed (every edge of it lies
/// between exactly two of its triangles); `None` for a triangle of an open piece.
///
/// Corners are matched bit for bit: the mesh import welds every corner to one point, so the
/// corners of one vertex are equal floats.
pub fn closed_pieces(triangles: &[&Face]) -> Vec<Option<usize>> {
    // Vertices numbered by their exact coordinates, then each edge as (low, high, triangle).
    let mut numbers: HashMap<[u64; 3], u32> = HashMap::new();
    let mut edges: Vec<(u32, u32, u32)> = Vec::with_capacity(3 * triangles.len());
    for (t, face) in triangles.iter().enumerate() {
        let corners = face.corners.map(|p| {
            let next = numbers.len() as u32;
            *numbers
                .entry([p.x.to_bits(), p.y.to_bits(), p.z.to_bits()])
                .or_insert(next)
        });
        for k in 0..3 {
            let (a, b) = (corners[k], corners[(k + 1) % 3]);
            if a != b {
                edges.push((a.min(b), a.max(b), t as u32));
            }
        }
    }
    drop(numbers);
    edges.sort_unstable();

    // Triangles across an edge between two of them join one piece. An edge of one triangle
    // opens its piece. At an edge of three or more (a sheet touching a box along an edge,
    // two boxes sharing one), the pieces are known from their other edges: each piece must
    // have exactly two triangles there.
    let mut pieces = Pieces::new(triangles.len());
    let runs = || edges.chunk_by(|p, q| (p.0, p.1) == (q.0, q.1));
    for run in runs() {
        if let [one, other] = run {
            pieces.join(one.2 as usize, other.2 as usize);
        }
    }
    let mut open = vec![false; triangles.len()];
    let mut at_edge = Vec::new();
    for run in runs().filter(|run| run.len() != 2) {
        at_edge.clear();
        at_edge.extend(run.iter().map(|e| pieces.find(e.2 as usize)));
        at_edge.sort_unstable();
        for same in at_edge.chunk_by(|a, b| a == b) {
            if same.len() != 2 {
                open[same[0]] = true;
            }
        }
    }
    (0..triangles.len())
        .map(|t| {
            let piece = pieces.find(t);
            (!open[piece]).then_some(piece)
        })
        .collect()
}

/// Disjoint sets of triangles (union by lowest index, path halving: Tarjan and van
/// Leeuwen, "Worst-case analysis of set union algorithms", JACM 31(2), 1984), each named by
/// its lowest member.
struct Pieces {
    parent: Vec<usize>,
}

impl Pieces {
    fn new(count: usize) -> Pieces {
        Pieces {
            parent: (0..count).collect(),
        }
    }

    fn find(&mut self, mut t: usize) -> usize {
        while self.parent[t] != t {
            self.parent[t] = self.parent[self.parent[t]];
            t = self.parent[t];
        }
        t
    }

    fn join(&mut self, a: usize, b: usize) {
        let (a, b) = (self.find(a), self.find(b));
        self.parent[a.max(b)] = a.min(b);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::ItemId;
    use nalgebra::Point3;

    /// The twelve triangles of the box from `low` to `high`.
    fn box_faces(low: [f64; 3], high: [f64; 3]) -> Vec<Face> {
        let corner = |i: usize| {
            Point3::new(
                if i & 1 == 0 { low[0] } else { high[0] },
                if i & 2 == 0 { low[1] } else { high[1] },
                if i & 4 == 0 { low[2] } else { high[2] },
            )
        };
        // Each side as a quad of corner numbers (bit 0 x, bit 1 y, bit 2 z), cut in two.
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
            .map(|t| Face {
                corners: t.map(corner),
                item: ItemId(0),
                slack: 0.0,
            })
            .collect()
    }

    #[test]
    fn a_closed_box_is_one_piece_named_by_its_first_triangle() {
        let faces = box_faces([0.0; 3], [2.0, 3.0, 4.0]);
        let refs: Vec<&Face> = faces.iter().collect();
        assert_eq!(closed_pieces(&refs), vec![Some(0); 12]);
    }

    #[test]
    fn a_box_missing_a_side_is_open_and_leaves_its_neighbour_closed() {
        let open_box = box_faces([0.0; 3], [2.0; 3]);
        let closed_box = box_faces([5.0, 0.0, 0.0], [7.0, 2.0, 2.0]);
        // The open box without its top (triangles 2 and 3), the closed box after it.
        let refs: Vec<&Face> = open_box
            .iter()
            .enumerate()
            .filter(|(i, _)| *i != 2 && *i != 3)
            .map(|(_, f)| f)
            .chain(&closed_box)
            .collect();
        let pieces = closed_pieces(&refs);
        assert_eq!(&pieces[..10], &[None; 10]);
        assert_eq!(&pieces[10..], &[Some(10); 12]);
    }

    #[test]
    fn a_sheet_touching_a_box_along_an_edge_is_open_and_the_box_closed() {
        // A ground sheet sharing the box's bottom front edge: three triangles on that edge,
        // two of the box's.
        let mut faces = box_faces([0.0; 3], [2.0; 3]);
        faces.push(Face {
            corners: [
                Point3::new(0.0, 0.0, 0.0),
                Point3::new(2.0, -3.0, 0.0),
                Point3::new(2.0, 0.0, 0.0),
            ],
            item: ItemId(0),
            slack: 0.0,
        });
        let refs: Vec<&Face> = faces.iter().collect();
        let pieces = closed_pieces(&refs);
        assert_eq!(&pieces[..12], &[Some(0); 12]);
        assert_eq!(pieces[12], None);
    }

    #[test]
    fn two_boxes_sharing_an_edge_are_two_closed_pieces() {
        // Four triangles on the shared edge, two of each box.
        let first = box_faces([0.0; 3], [2.0; 3]);
        let second = box_faces([2.0, 2.0, 0.0], [4.0, 4.0, 2.0]);
        let refs: Vec<&Face> = first.iter().chain(&second).collect();
        let pieces = closed_pieces(&refs);
        assert_eq!(&pieces[..12], &[Some(0); 12]);
        assert_eq!(&pieces[12..], &[Some(12); 12]);
    }
}
