//! A mesh's triangles split into pieces joined edge to edge, and whether a piece is closed:
//! a model with a ground sheet, or one open house among closed ones, is not closed as a
//! whole, yet each closed house in it is a solid one cannot stand in.
//!
//! Only the pieces the standpoint checks ask about are walked, from one triangle out across
//! its edges: a house of a town is a few dozen triangles, whatever the town's size.
//!
//! A known limit: two houses that share a wall face (the same vertices, one face each) meet
//! four triangles at each edge of that wall, and a walk cannot tell which two are whose; both
//! are then taken as open. That errs towards no warning, never a wrong one.

/// The closed pieces of a mesh's triangles, found as they are asked for and remembered.
pub struct Pieces<'a> {
    triangles: &'a [[u32; 3]],
    at_vertices: TrianglesAtVertices,
    /// For each triangle: [`UNKNOWN`], [`OPEN`], [`WALKING`] during a walk, or the first
    /// triangle of its closed piece.
    piece_of: Vec<u32>,
}

const UNKNOWN: u32 = u32::MAX;
const OPEN: u32 = u32::MAX - 1;
const WALKING: u32 = u32::MAX - 2;

impl<'a> Pieces<'a> {
    /// Ready to walk `triangles` (three vertex numbers each).
    pub fn of(triangles: &'a [[u32; 3]]) -> Pieces<'a> {
        Pieces {
            triangles,
            at_vertices: TrianglesAtVertices::of(triangles),
            piece_of: vec![UNKNOWN; triangles.len()],
        }
    }

    /// The closed piece triangle `t` belongs to, named by its lowest triangle index; `None`
    /// if its piece is open.
    ///
    /// Triangles across an edge between two of them are one piece. An edge of one triangle
    /// opens its piece. At an edge of three or more (a sheet touching a box along an edge,
    /// two boxes sharing one), the pieces are known from their other edges: each must have
    /// exactly two triangles there.
    pub fn closed_piece_of(&mut self, t: usize) -> Option<usize> {
        match self.piece_of[t] {
            UNKNOWN => {}
            OPEN => return None,
            first => return Some(first as usize),
        }
        let mut reached = vec![t as u32];
        self.piece_of[t] = WALKING;
        let mut shared_by_more = Vec::new();
        let mut open = false;
        let mut next = 0;
        'walk: while next < reached.len() {
            let u = reached[next];
            next += 1;
            let corners = self.triangles[u as usize];
            for k in 0..3 {
                let (a, b) = (corners[k], corners[(k + 1) % 3]);
                if a == b {
                    continue;
                }
                let others = {
                    let mut others = self.on_edge(a, b).filter(|&w| w != u);
                    (others.next(), others.next())
                };
                match others {
                    (None, _) => {
                        open = true;
                        break 'walk;
                    }
                    (Some(w), None) => match self.piece_of[w as usize] {
                        UNKNOWN => {
                            self.piece_of[w as usize] = WALKING;
                            reached.push(w);
                        }
                        WALKING => {}
                        // A piece found open before (a closed one has no edge of two
                        // triangles leading out of it).
                        _ => {
                            open = true;
                            break 'walk;
                        }
                    },
                    _ => shared_by_more.push((a, b)),
                }
            }
        }
        if !open {
            open = shared_by_more.into_iter().any(|(a, b)| {
                self.on_edge(a, b)
                    .filter(|&u| self.piece_of[u as usize] == WALKING)
                    .count()
                    != 2
            });
        }
        let first = *reached.iter().min().expect("the walk starts at t");
        let name = if open { OPEN } else { first };
        for u in reached {
            self.piece_of[u as usize] = name;
        }
        (!open).then_some(first as usize)
    }

    /// The triangles on the edge from vertex `a` to vertex `b`.
    fn on_edge(&self, a: u32, b: u32) -> impl Iterator<Item = u32> + '_ {
        self.at_vertices
            .at(a)
            .iter()
            .copied()
            .filter(move |&u| self.triangles[u as usize].contains(&b))
    }
}

/// Which triangles meet at each vertex (vertex numbers from 0). A triangle with a repeated
/// vertex is listed there twice, which only makes its piece open.
struct TrianglesAtVertices {
    starts: Vec<u32>,
    triangles: Vec<u32>,
}

impl TrianglesAtVertices {
    /// Counts the triangles at each vertex, then lists them (a counting sort: two passes).
    fn of(triangles: &[[u32; 3]]) -> TrianglesAtVertices {
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

#[cfg(test)]
mod tests {
    use super::*;

    /// For each triangle, the first triangle of its piece if the piece is closed, asked in
    /// order and, afresh, in reverse order (each walk then starting where none did).
    fn closed_pieces(triangles: &[[u32; 3]]) -> Vec<Option<usize>> {
        let mut pieces = Pieces::of(triangles);
        let forward: Vec<Option<usize>> = (0..triangles.len())
            .map(|t| pieces.closed_piece_of(t))
            .collect();
        let mut pieces = Pieces::of(triangles);
        let mut backward: Vec<Option<usize>> = (0..triangles.len())
            .rev()
            .map(|t| pieces.closed_piece_of(t))
            .collect();
        backward.reverse();
        assert_eq!(forward, backward);
        forward
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

    #[test]
    fn two_boxes_sharing_a_wall_face_are_taken_as_open() {
        // The second box's bottom is the first box's top, one face each: four triangles at
        // every edge of it (the known limit: no warning rather than a wrong one).
        let triangles: Vec<[u32; 3]> = box_triangles(0)
            .into_iter()
            .chain(box_triangles(4))
            .collect();
        assert_eq!(closed_pieces(&triangles), vec![None; 24]);
    }

    #[test]
    fn a_walk_stopped_at_an_open_edge_leaves_its_triangles_open() {
        // A box without its bottom: asking one triangle, then every other, says open.
        let triangles: Vec<[u32; 3]> = box_triangles(0).into_iter().skip(2).collect();
        let mut pieces = Pieces::of(&triangles);
        assert_eq!(pieces.closed_piece_of(5), None);
        assert!((0..triangles.len()).all(|t| pieces.closed_piece_of(t).is_none()));
    }
}
