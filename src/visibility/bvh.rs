//! A bounding-volume hierarchy over the site's faces, for one question asked millions of
//! times: does anything stand between the eye and this point?
//!
//! Built top-down by splitting each node's faces along the longest side of their centres'
//! box where the surface-area heuristic says a ray will meet the fewest faces (searched over
//! a few bins, one pass a level), down to leaves of a few faces. A sight line along a street
//! then passes the boxes of big ground and wall faces once instead of in every small box
//! they straddle: on the demo square about half the box tests of a median split. Models of
//! more than `SAH_FACES` faces are split at the middle of that side (or the median), which
//! builds three times faster. Boxes are stored in f32, rounded outwards, to keep a node to
//! 32 bytes; the triangle tests are in f64 against the site's own faces.

use crate::scene::{Face, Faces};
use nalgebra::{Point3, Vector3};

/// Faces in a leaf: more saves nodes, fewer saves triangle tests.
const LEAF_FACES: usize = 4;

#[derive(Clone, Copy, Debug, PartialEq)]
struct Node {
    lo: [f32; 3],
    hi: [f32; 3],
    /// A leaf: the first of its faces in `order`. An inner node: its second child (the
    /// first follows it directly).
    index: u32,
    /// Faces in a leaf; 0 for an inner node.
    count: u32,
}

/// What [`Bvh::front_to_back`] hands out: a node's box (site coordinates, rounded outwards)
/// or a face of a leaf.
#[derive(Clone, Copy, Debug)]
pub enum Visit {
    /// A box holding every face under a node.
    Box {
        /// Its lowest corner.
        lo: Point3<f64>,
        /// Its highest corner.
        hi: Point3<f64>,
    },
    /// A face (its index).
    Face(u32),
}

/// The hierarchy: nodes in depth-first order and the faces' indices in leaf order.
pub struct Bvh {
    nodes: Vec<Node>,
    order: Vec<u32>,
}

/// A box of f32 that holds every point it was given in f64: widened by a few f32 steps
/// before rounding, more than rounding can take back.
fn outward(lo: Vector3<f64>, hi: Vector3<f64>) -> ([f32; 3], [f32; 3]) {
    let widen = |x: f64| 4.0 * f32::EPSILON as f64 * x.abs() + f32::MIN_POSITIVE as f64;
    let down = |x: f64| (x - widen(x)) as f32;
    let up = |x: f64| (x + widen(x)) as f32;
    (
        [down(lo.x), down(lo.y), down(lo.z)],
        [up(hi.x), up(hi.y), up(hi.z)],
    )
}

/// A box of f32: lowest and highest corners.
type Bounds = ([f32; 3], [f32; 3]);

const EMPTY: Bounds = ([f32::INFINITY; 3], [f32::NEG_INFINITY; 3]);

fn union((lo, hi): Bounds, (other_lo, other_hi): Bounds) -> Bounds {
    (
        [0, 1, 2].map(|k| lo[k].min(other_lo[k])),
        [0, 1, 2].map(|k| hi[k].max(other_hi[k])),
    )
}

/// Faces below which a subtree is built on one core: a thread costs more than it saves.
const FACES_FOR_THREADS: usize = 50_000;

impl Bvh {
    /// The hierarchy of these faces, built on all cores when there are many.
    pub fn new(faces: &Faces) -> Bvh {
        let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
        // Each split below the root may hand one half to a thread of its own.
        Bvh::with_split_levels(faces, usize::BITS - (cores - 1).leading_zeros())
    }

    /// The hierarchy, with this many levels of splits handing a half to a thread.
    fn with_split_levels(faces: &Faces, split_levels: u32) -> Bvh {
        // Each face's centre travels with its index, so that the splits read memory in order.
        let mut items: Vec<Item> = faces
            .iter()
            .zip(0..)
            .map(|(f, face)| {
                let c = (f.corners[0].coords + f.corners[1].coords + f.corners[2].coords) / 3.0;
                Item {
                    centre: [c.x as f32, c.y as f32, c.z as f32],
                    face,
                }
            })
            .collect();
        let mut nodes = Vec::with_capacity(2 * faces.len() / LEAF_FACES + 1);
        if !faces.is_empty() {
            Build { faces }.node(&mut nodes, &mut items, 0, 0, split_levels);
        }
        Bvh {
            nodes,
            order: items.into_iter().map(|item| item.face).collect(),
        }
    }

    /// The memory the hierarchy holds, bytes.
    pub fn memory_bytes(&self) -> usize {
        self.nodes.capacity() * std::mem::size_of::<Node>() + self.order.capacity() * 4
    }

    /// Walks the hierarchy nearest box first as seen from `eye` (by the distance from the eye
    /// to each box), asking `visit` about each node's box (`Visit::Box`: false skips
    /// everything under it) and handing it each face of the leaves reached (`Visit::Face`).
    pub fn front_to_back(&self, eye: &Point3<f64>, visit: impl FnMut(Visit) -> bool) {
        self.front_to_back_under(0, eye, visit);
    }

    /// The two nodes under the root, when the root is not a leaf: each holds about half
    /// the faces, for two cores to walk apart.
    pub fn halves(&self) -> Option<[u32; 2]> {
        let root = self.nodes.first()?;
        (root.count == 0).then_some([1, root.index])
    }

    /// [`Bvh::front_to_back`] under the node `root` only.
    pub fn front_to_back_under(
        &self,
        root: u32,
        eye: &Point3<f64>,
        mut visit: impl FnMut(Visit) -> bool,
    ) {
        // `max` then `min` rather than `clamp`, which panics on a NaN bound: a box of faces
        // whose corners came out NaN is then only far away (NaN), never a crash.
        let distance = |node: &Node| {
            let nearest = Point3::from(
                [0, 1, 2].map(|k| eye[k].max(node.lo[k] as f64).min(node.hi[k] as f64)),
            );
            (nearest - eye).norm_squared()
        };
        let as_box = |node: &Node| Visit::Box {
            lo: Point3::from(node.lo.map(f64::from)),
            hi: Point3::from(node.hi.map(f64::from)),
        };
        if root as usize >= self.nodes.len() {
            return;
        }
        let mut stack = vec![root];
        while let Some(at) = stack.pop() {
            let node = &self.nodes[at as usize];
            if !visit(as_box(node)) {
                continue;
            }
            if node.count > 0 {
                let first = node.index as usize;
                for &index in &self.order[first..first + node.count as usize] {
                    visit(Visit::Face(index));
                }
                continue;
            }
            let (a, b) = (at + 1, node.index);
            let (near, far) =
                if distance(&self.nodes[a as usize]) <= distance(&self.nodes[b as usize]) {
                    (a, b)
                } else {
                    (b, a)
                };
            // The far child waits under the near one; each is asked about when it is reached,
            // after everything nearer has been handed out.
            stack.push(far);
            stack.push(near);
        }
    }

    /// A face for which `blocks(index, face, distance)` holds that meets the ray from
    /// `origin` along the unit `direction` closer than `limit` (its index), if any. Stops
    /// at the first one found.
    pub fn first_hit(
        &self,
        faces: &Faces,
        origin: &Point3<f64>,
        direction: &Vector3<f64>,
        limit: f64,
        blocks: impl Fn(u32, &Face, f64) -> bool,
    ) -> Option<u32> {
        let o = [origin.x as f32, origin.y as f32, origin.z as f32];
        let inverse = [
            (1.0 / direction.x) as f32,
            (1.0 / direction.y) as f32,
            (1.0 / direction.z) as f32,
        ];
        // f32 rounding of the ray itself is absorbed by a little slack on the boxes.
        let pad = 1e-5 * (1.0 + origin.coords.abs().max() as f32);
        let limit32 = limit as f32 * (1.0 + 1e-5) + pad;
        self.search(
            |node| ray_meets_box(&o, &inverse, &node.lo, &node.hi, pad, limit32),
            |index| {
                let face = faces.get(index as usize);
                ray_hits_triangle(origin, direction, &face.corners)
                    .is_some_and(|distance| distance < limit && blocks(index, &face, distance))
            },
        )
    }

    /// Whether any face crosses the triangle `wedge` (a fan of sight lines from the eye to a
    /// piece of an edge): if none does, nothing stands between the eye and that piece.
    /// Faces in the wedge's own plane are seen edge-on and do not count.
    pub fn crosses(&self, faces: &Faces, wedge: &[Point3<f64>; 3]) -> bool {
        let mut lo = wedge[0].coords;
        let mut hi = lo;
        for p in wedge {
            lo = lo.inf(&p.coords);
            hi = hi.sup(&p.coords);
        }
        let (lo, hi) = outward(lo, hi);
        let plane = Plane::of(wedge);
        let offset = plane.normal.dot(&wedge[0].coords);
        self.search(
            |node| {
                let apart = (0..3).any(|k| node.hi[k] < lo[k] || node.lo[k] > hi[k]);
                (!apart && box_meets_plane(node, &plane.normal, offset)).then_some(0.0)
            },
            |i| {
                let face = &faces.get(i as usize).corners;
                triangles_cross_in(face, &Plane::of(face), wedge, &plane)
            },
        )
        .is_some()
    }

    /// The one traversal both questions share: depth first through the nodes whose box
    /// `meets` (giving a distance along the question's ray at which it is entered, or 0),
    /// nearer children first, testing the faces of each leaf reached with `hit`; the first
    /// face for which `hit` holds, if any. Nearer first, a ray to a hidden point finds the
    /// first row of what hides it before the rows behind.
    fn search(
        &self,
        meets: impl Fn(&Node) -> Option<f32>,
        hit: impl Fn(u32) -> bool,
    ) -> Option<u32> {
        if self.nodes.is_empty() || meets(&self.nodes[0]).is_none() {
            return None;
        }
        let mut stack = [0u32; 64];
        let mut depth = 1;
        while depth > 0 {
            depth -= 1;
            let at = stack[depth];
            let node = &self.nodes[at as usize];
            if node.count > 0 {
                let first = node.index as usize;
                let leaf = &self.order[first..first + node.count as usize];
                if let Some(&index) = leaf.iter().find(|&&i| hit(i)) {
                    return Some(index);
                }
                continue;
            }
            // The first child is stored right after its parent.
            let (a, b) = (at + 1, node.index);
            let children = match (
                meets(&self.nodes[a as usize]),
                meets(&self.nodes[b as usize]),
            ) {
                (Some(near_a), Some(near_b)) if near_a <= near_b => [b, a],
                (Some(_), Some(_)) => [a, b],
                (Some(_), None) => [a, a],
                (None, Some(_)) => [b, b],
                (None, None) => continue,
            };
            // The nearer on top; one child is pushed once.
            let count = if children[0] == children[1] { 1 } else { 2 };
            if depth + count <= stack.len() {
                stack[depth..depth + count].copy_from_slice(&children[2 - count..]);
                depth += count;
            }
        }
        None
    }
}

/// What building the hierarchy reads: the faces.
struct Build<'a> {
    faces: &'a Faces,
}

/// A face being placed in the hierarchy: its centre and its index.
#[derive(Clone, Copy, Debug)]
struct Item {
    centre: [f32; 3],
    face: u32,
}

impl Build<'_> {
    /// A face's box in f32 (for the split's costs only, so rounding does not matter).
    fn face_box(&self, face: u32) -> Bounds {
        let [a, b, c] = self.faces.get(face as usize).corners;
        let (lo, hi) = (
            a.coords.inf(&b.coords).inf(&c.coords),
            a.coords.sup(&b.coords).sup(&c.coords),
        );
        (
            [lo.x as f32, lo.y as f32, lo.z as f32],
            [hi.x as f32, hi.y as f32, hi.z as f32],
        )
    }

    /// Appends to `nodes` the node for the faces in `order` (which start at `first` in the
    /// hierarchy's whole order) and everything under it, depth first; its box.
    ///
    /// The faces are split along the longest side of their centres' box where
    /// [`cheapest_split`] says (models of more than `SAH_FACES` faces: at its middle), or at
    /// the median of their centres along it when that leaves less than a sixteenth (a
    /// quarter) on one side or the node lies `SAH_LEVELS` down, so that the tree stays
    /// within the searches' stacks (64). A leaf's box is taken from its corners, in f64
    /// rounded outwards; an inner node's is the union of its children's, so each corner is read once. With
    /// `split_levels` left, the second half is built on a thread of its own, into nodes of
    /// its own that are moved in after the first half's.
    fn node(
        &self,
        nodes: &mut Vec<Node>,
        order: &mut [Item],
        first: usize,
        level: u32,
        split_levels: u32,
    ) -> Bounds {
        let at = nodes.len();
        nodes.push(Node {
            lo: EMPTY.0,
            hi: EMPTY.1,
            index: first as u32,
            count: order.len() as u32,
        });
        if order.len() <= LEAF_FACES {
            let mut lo = Vector3::repeat(f64::INFINITY);
            let mut hi = Vector3::repeat(f64::NEG_INFINITY);
            for item in order.iter() {
                for p in &self.faces.get(item.face as usize).corners {
                    lo = lo.inf(&p.coords);
                    hi = hi.sup(&p.coords);
                }
            }
            let (lo, hi) = outward(lo, hi);
            (nodes[at].lo, nodes[at].hi) = (lo, hi);
            return (lo, hi);
        }
        let (centre_lo, centre_hi) = order.iter().fold(EMPTY, |bounds, item| {
            union(bounds, (item.centre, item.centre))
        });
        let axis = (0..3)
            .max_by(|&a, &b| {
                (centre_hi[a] - centre_lo[a]).total_cmp(&(centre_hi[b] - centre_lo[b]))
            })
            .unwrap_or(0);
        let count = order.len();
        let (from, extent) = (centre_lo[axis], centre_hi[axis] - centre_lo[axis]);
        let bin = |item: &Item| {
            (((item.centre[axis] - from) / extent * BINS as f32) as usize).min(BINS - 1)
        };
        // The split the surface-area heuristic prefers, unless it leaves almost nothing on
        // one side; the median instead, and always below `SAH_LEVELS`, so that the tree
        // stays within the searches' stacks.
        let by_area = self.faces.len() <= SAH_FACES && level < SAH_LEVELS && extent > 0.0;
        let cheapest = by_area
            .then(|| cheapest_split(order, bin, |item| self.face_box(item.face)))
            .flatten();
        // Without it, the middle of the longest side, or the median when that leaves less
        // than a quarter on one side.
        let (mut middle, least) = if by_area {
            let split = cheapest.map_or(0, |split| partition(order, |item| bin(item) < split));
            (split, 16)
        } else {
            let halfway = from + 0.5 * extent;
            (partition(order, |item| item.centre[axis] < halfway), 4)
        };
        if !balanced_enough(middle, count, least) {
            middle = count / 2;
            order.select_nth_unstable_by(middle, |a, b| a.centre[axis].total_cmp(&b.centre[axis]));
        }
        let (left, right) = order.split_at_mut(middle);
        let (left_box, right_box) = if split_levels > 0 && count >= FACES_FOR_THREADS {
            let mut right_nodes = Vec::with_capacity(2 * right.len() / LEAF_FACES + 1);
            let (left_box, right_box) = std::thread::scope(|scope| {
                let handle = scope.spawn(|| {
                    self.node(
                        &mut right_nodes,
                        right,
                        first + middle,
                        level + 1,
                        split_levels - 1,
                    )
                });
                let left_box = self.node(nodes, left, first, level + 1, split_levels - 1);
                let right_box = handle
                    .join()
                    .unwrap_or_else(|panic| std::panic::resume_unwind(panic));
                (left_box, right_box)
            });
            // The second half's inner nodes point at their second children by position.
            let offset = nodes.len() as u32;
            nodes.extend(right_nodes.into_iter().map(|mut node| {
                if node.count == 0 {
                    node.index += offset;
                }
                node
            }));
            nodes[at].index = offset;
            (left_box, right_box)
        } else {
            let left_box = self.node(nodes, left, first, level + 1, split_levels);
            nodes[at].index = nodes.len() as u32;
            let right_box = self.node(nodes, right, first + middle, level + 1, split_levels);
            (left_box, right_box)
        };
        let bounds = union(left_box, right_box);
        nodes[at].count = 0;
        (nodes[at].lo, nodes[at].hi) = bounds;
        bounds
    }
}

/// Bins along the split axis for the surface-area heuristic.
const BINS: usize = 12;

/// Levels split by the surface-area heuristic; those below are split at the median. Each
/// heuristic split leaves at least a sixteenth on either side, so after these levels a node
/// holds at most (15/16)^32, about an eighth, of the faces, and the median splits below add
/// at most log2(faces / 4) levels: under 64 for any count of faces a u32 can index.
const SAH_LEVELS: u32 = 32;

/// Faces up to which the hierarchy is split by the surface-area heuristic: a scene looked at
/// again and again (the explorer's panes) repays its build. Above it, the median: on a town
/// of a million triangles seen once, the heuristic tripled the build (about 220 ms to 700 ms)
/// and saved no time in the rays, most of which the map of cover settles.
const SAH_FACES: usize = 200_000;

/// The bin boundary (1..BINS) at which splitting the items costs least by the surface-area
/// heuristic: the area of each side's box times its faces, summed (MacDonald and Booth,
/// "Heuristics for ray tracing using space subdivision", The Visual Computer 6(3), 1990; the
/// binned search of Wald, "On fast construction of SAH-based bounding volume hierarchies",
/// IEEE Symposium on Interactive Ray Tracing 2007). None when every item falls in one bin.
fn cheapest_split(
    items: &[Item],
    bin: impl Fn(&Item) -> usize,
    face_box: impl Fn(&Item) -> Bounds,
) -> Option<usize> {
    let mut bins = [(EMPTY, 0usize); BINS];
    for item in items {
        let (bounds, count) = &mut bins[bin(item)];
        *bounds = union(*bounds, face_box(item));
        *count += 1;
    }
    let area = |(lo, hi): Bounds| {
        let d = [0, 1, 2].map(|k| (hi[k] - lo[k]).max(0.0));
        d[0] * d[1] + d[1] * d[2] + d[2] * d[0]
    };
    // The cost of the right side from each boundary on, then a sweep from the left.
    let mut right_cost = [0.0f32; BINS];
    let (mut bounds, mut count) = (EMPTY, 0);
    for k in (1..BINS).rev() {
        bounds = union(bounds, bins[k].0);
        count += bins[k].1;
        right_cost[k] = area(bounds) * count as f32;
    }
    let (mut bounds, mut count) = (EMPTY, 0);
    let mut best: Option<(f32, usize)> = None;
    for k in 1..BINS {
        bounds = union(bounds, bins[k - 1].0);
        count += bins[k - 1].1;
        if count == 0 || count == items.len() {
            continue;
        }
        let cost = area(bounds) * count as f32 + right_cost[k];
        if best.is_none_or(|(least, _)| cost < least) {
            best = Some((cost, k));
        }
    }
    best.map(|(_, k)| k)
}

/// Whether a split leaving `left` of `count` faces on one side leaves at least a
/// `fraction`th (16 for a sixteenth), and at least one face, on each.
fn balanced_enough(left: usize, count: usize, fraction: usize) -> bool {
    let least = (count / fraction).max(1);
    left >= least && left + least <= count
}

/// Moves the items for which `left` holds before the others; how many there are.
fn partition(items: &mut [Item], left: impl Fn(&Item) -> bool) -> usize {
    let mut end = 0;
    for i in 0..items.len() {
        if left(&items[i]) {
            items.swap(i, end);
            end += 1;
        }
    }
    end
}

/// Whether the plane `normal . x = offset` passes through the box (its corners are not all
/// on one side): the centre's distance from the plane is within the box's reach along the
/// normal, the half extents weighted by |normal| (Akenine-Möller, Haines and Hoffman,
/// Real-Time Rendering, box/plane intersection), with a margin against rounding so that a
/// box touching the plane is never passed over.
fn box_meets_plane(node: &Node, normal: &Vector3<f64>, offset: f64) -> bool {
    let (mut centre, mut reach) = (-offset, 0.0);
    for k in 0..3 {
        let (lo, hi) = (node.lo[k] as f64, node.hi[k] as f64);
        centre += normal[k] * 0.5 * (lo + hi);
        reach += normal[k].abs() * 0.5 * (hi - lo);
    }
    centre.abs() <= reach + 1e-12 * (reach + offset.abs())
}

/// [`triangles_cross_in`], finding the planes.
#[cfg(test)]
fn triangles_cross(a: &[Point3<f64>; 3], b: &[Point3<f64>; 3]) -> bool {
    triangles_cross_in(a, &Plane::of(a), b, &Plane::of(b))
}

/// Whether two triangles, given with their planes, cross: a side of one passes through the
/// other. Triangles in one plane do not count (a face seen edge-on hides nothing).
///
/// Möller's test ("A fast triangle-triangle intersection test", Journal of Graphics Tools
/// 2(2), 1997): a triangle wholly on one side of the other's plane cannot meet it; two that
/// each cross the other's plane meet that plane in a segment of the line where the planes
/// meet, and cross exactly when the two segments overlap. A corner too near the other plane
/// to tell its side goes to the plain test instead: each side tried as a ray.
fn triangles_cross_in(
    a: &[Point3<f64>; 3],
    plane_a: &Plane,
    b: &[Point3<f64>; 3],
    plane_b: &Plane,
) -> bool {
    let (Some(against_a), Some(against_b)) = (plane_a.sides_of(b), plane_b.sides_of(a)) else {
        return false;
    };
    if against_a.touching || against_b.touching {
        return a_side_passes_through(a, b) || a_side_passes_through(b, a);
    }
    let line = plane_a.normal.cross(&plane_b.normal);
    let (a_from, a_to) = crossing_interval(a, &against_b.distances, &line);
    let (b_from, b_to) = crossing_interval(b, &against_a.distances, &line);
    a_from <= b_to && b_from <= a_to
}

/// The plane of a triangle: a normal (not of unit length) and a point.
struct Plane {
    normal: Vector3<f64>,
    point: Point3<f64>,
}

/// Where the corners of a triangle lie against a plane.
struct PlaneSides {
    /// Each corner's distance from the plane, times the normal's length.
    distances: [f64; 3],
    /// Whether a corner lies too near the plane to tell its side.
    touching: bool,
}

impl Plane {
    fn of([p, q, r]: &[Point3<f64>; 3]) -> Plane {
        Plane {
            normal: (q - p).cross(&(r - p)),
            point: *p,
        }
    }

    /// The sides of the corners against the plane; `None` when all lie clearly on one side
    /// (by a margin far above the rounding of the test, so a triangle touching the plane is
    /// never passed over: passing over must never be wrong).
    fn sides_of(&self, corners: &[Point3<f64>; 3]) -> Option<PlaneSides> {
        let offsets = corners.map(|corner| corner - self.point);
        let reach = offsets.iter().fold(0.0f64, |m, o| m.max(o.amax()));
        let margin = 1e-9 * self.normal.amax() * reach;
        let distances = offsets.map(|o| self.normal.dot(&o));
        if distances.iter().all(|&d| d > margin) || distances.iter().all(|&d| d < -margin) {
            return None;
        }
        Some(PlaneSides {
            distances,
            touching: distances.iter().any(|d| d.abs() <= margin),
        })
    }
}

/// Where a triangle whose corners lie at `distances` on both sides of a plane meets it, as
/// an interval of positions along `line` (the direction the two planes meet in): its two
/// sides from the corner alone on its side, cut where the distance is zero.
fn crossing_interval(
    t: &[Point3<f64>; 3],
    distances: &[f64; 3],
    line: &Vector3<f64>,
) -> (f64, f64) {
    let along = t.map(|corner| line.dot(&corner.coords));
    let above = distances.map(|d| d > 0.0);
    let alone = if above[1] == above[2] {
        0
    } else if above[0] == above[2] {
        1
    } else {
        2
    };
    let cut = |other: usize| {
        let (d, e) = (distances[alone], distances[other]);
        along[alone] + (along[other] - along[alone]) * d / (d - e)
    };
    let (x, y) = (cut((alone + 1) % 3), cut((alone + 2) % 3));
    (x.min(y), x.max(y))
}

/// Whether a side of `t` passes through `other`, each side tried as a ray.
fn a_side_passes_through(t: &[Point3<f64>; 3], other: &[Point3<f64>; 3]) -> bool {
    (0..3).any(|i| {
        let (p, q) = (t[i], t[(i + 1) % 3]);
        let along = q - p;
        let length = along.norm();
        length > 0.0 && ray_hits_triangle(&p, &(along / length), other).is_some_and(|d| d <= length)
    })
}

/// The slab test (Kay and Kajiya, "Ray tracing complex scenes", SIGGRAPH 1986), on a box
/// grown by `pad`, for the part of the ray from 0 to `limit`: where the ray enters it, if
/// it meets it.
fn ray_meets_box(
    o: &[f32; 3],
    inverse: &[f32; 3],
    lo: &[f32; 3],
    hi: &[f32; 3],
    pad: f32,
    limit: f32,
) -> Option<f32> {
    let (mut near, mut far) = (0.0f32, limit);
    for k in 0..3 {
        let a = (lo[k] - pad - o[k]) * inverse[k];
        let b = (hi[k] + pad - o[k]) * inverse[k];
        // A NaN (0 x infinity: a ray parallel to a face of the box, starting on its padded
        // side) keeps the old bounds, or, beside an infinity that the swap makes `a`, turns
        // the box away. Either is right: such a ray runs outside the true box.
        let (a, b) = if a <= b { (a, b) } else { (b, a) };
        if a > near {
            near = a;
        }
        if b < far {
            far = b;
        }
        if near > far {
            return None;
        }
    }
    Some(near)
}

/// The distance along the ray to the triangle, if the ray crosses it ahead of the origin
/// (Moeller and Trumbore, "Fast, minimum storage ray-triangle intersection", Journal of
/// Graphics Tools 2(1), 1997). A ray in the triangle's plane does not cross it.
pub fn ray_hits_triangle(
    origin: &Point3<f64>,
    direction: &Vector3<f64>,
    [a, b, c]: &[Point3<f64>; 3],
) -> Option<f64> {
    let (ab, ac) = (b - a, c - a);
    let p = direction.cross(&ac);
    let determinant = ab.dot(&p);
    // |det| <= 1e-14 |ab| |ac| (a ray in the triangle's plane, or a sliver), squared to
    // spare two square roots in the innermost test of every look.
    if determinant * determinant <= 1e-28 * ab.norm_squared() * ac.norm_squared() {
        return None;
    }
    let inverse = 1.0 / determinant;
    let to_origin = origin - a;
    let u = to_origin.dot(&p) * inverse;
    if !(0.0..=1.0).contains(&u) {
        return None;
    }
    let q = to_origin.cross(&ab);
    let v = direction.dot(&q) * inverse;
    if v < 0.0 || u + v > 1.0 {
        return None;
    }
    let distance = ac.dot(&q) * inverse;
    (distance > 0.0).then_some(distance)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::ItemId;

    fn triangle(z: f64, shift: f64) -> Face {
        Face {
            corners: [
                Point3::new(shift - 1.0, -1.0, z),
                Point3::new(shift + 1.0, -1.0, z),
                Point3::new(shift, 1.0, z),
            ],
            item: ItemId(0),
            slack: 0.0,
        }
    }

    #[test]
    fn rays_find_the_faces_a_brute_force_search_finds() {
        // A grid of small triangles at various heights; rays from below in many directions.
        let faces: Faces = (0..400)
            .map(|i| {
                let (x, y) = ((i % 20) as f64 * 0.7 - 7.0, (i / 20) as f64 * 0.7 - 7.0);
                let mut f = triangle(2.0 + (i % 7) as f64 * 0.3, x);
                for p in &mut f.corners {
                    p.y += y;
                    p.x *= 0.3;
                }
                f
            })
            .collect();
        let bvh = Bvh::new(&faces);
        let origin = Point3::new(0.1, 0.2, 0.0);
        for k in 0..500 {
            let a = k as f64 * 0.37;
            let d = Vector3::new(a.cos() * (k % 9) as f64 * 0.1, a.sin() * 0.8, 1.0).normalize();
            for limit in [2.5, 4.0, 100.0] {
                let brute = faces
                    .iter()
                    .any(|f| ray_hits_triangle(&origin, &d, &f.corners).is_some_and(|t| t < limit));
                assert_eq!(
                    bvh.first_hit(&faces, &origin, &d, limit, |_, _, _| true)
                        .is_some(),
                    brute
                );
            }
        }
    }

    #[test]
    fn built_on_threads_or_on_one_the_hierarchy_is_the_same() {
        let faces: Faces = (0..3 * FACES_FOR_THREADS)
            .map(|i| {
                let (x, y) = ((i % 400) as f64, (i / 400) as f64);
                triangle(0.5 * (x * 0.37).sin(), x + 0.1 * y)
            })
            .collect();
        let one = Bvh::with_split_levels(&faces, 0);
        for levels in [1, 2, 3] {
            let threaded = Bvh::with_split_levels(&faces, levels);
            assert!(threaded.nodes == one.nodes && threaded.order == one.order);
        }
        // Every face in exactly one leaf, every box holding its faces.
        let mut seen = vec![false; faces.len()];
        for node in one.nodes.iter().filter(|n| n.count > 0) {
            for &i in &one.order[node.index as usize..(node.index + node.count) as usize] {
                assert!(!seen[i as usize]);
                seen[i as usize] = true;
                for p in &faces.get(i as usize).corners {
                    for k in 0..3 {
                        assert!(node.lo[k] as f64 <= p[k] && p[k] <= node.hi[k] as f64);
                    }
                }
            }
        }
        assert!(seen.iter().all(|&s| s));
    }

    /// An item at `x` along the axis with a box of half-size `size` round it.
    fn item(x: f64, size: f64) -> (Item, Bounds) {
        let item = Item {
            centre: [x as f32, 0.0, 0.0],
            face: 0,
        };
        let (lo, hi) = ((x - size) as f32, (x + size) as f32);
        (item, ([lo, -(size as f32), 0.0], [hi, size as f32, 0.0]))
    }

    #[test]
    fn the_heuristic_splits_between_clusters_and_by_area_not_count() {
        // Two clusters of small faces, 0 to 1 and 9 to 10 along x, binned over 0 to 10: the
        // cheapest boundary lies in the empty stretch between them (bins 2 to 10 of 12), where
        // neither side's box reaches across the gap. By hand: cutting inside a cluster leaves
        // one side a box 9 long; cutting in the gap leaves two boxes about 1 long.
        let placed: Vec<(Item, Bounds)> = (0..10)
            .map(|i| item(0.1 * i as f64, 0.05))
            .chain((0..10).map(|i| item(9.1 + 0.1 * i as f64, 0.05)))
            .collect();
        let items: Vec<Item> = placed.iter().map(|(item, _)| *item).collect();
        let box_of = |it: &Item| {
            placed
                .iter()
                .find(|(p, _)| p.centre == it.centre)
                .unwrap()
                .1
        };
        let bin = |it: &Item| ((it.centre[0] / 10.0 * BINS as f32) as usize).min(BINS - 1);
        let split = cheapest_split(&items, bin, box_of).unwrap();
        assert!((2..=10).contains(&split), "{split}");
        // Everything in one bin: no split to choose.
        let (one, one_box) = item(3.0, 1.0);
        assert_eq!(cheapest_split(&[one; 5], |_| 4, |_| one_box), None);
    }

    /// How many levels the hierarchy has below its root.
    fn depth(bvh: &Bvh, at: u32) -> usize {
        let node = &bvh.nodes[at as usize];
        if node.count > 0 {
            return 0;
        }
        1 + depth(bvh, at + 1).max(depth(bvh, node.index))
    }

    #[test]
    fn a_split_leaves_a_sixteenth_on_each_side() {
        assert!(balanced_enough(50, 100, 16));
        assert!(balanced_enough(6, 100, 16) && balanced_enough(94, 100, 16));
        assert!(!balanced_enough(5, 100, 16) && !balanced_enough(95, 100, 16));
        assert!(!balanced_enough(0, 100, 16) && !balanced_enough(100, 100, 16));
        // Under sixteen faces a sixteenth is none, but a side is never left empty.
        assert!(balanced_enough(1, 10, 16) && balanced_enough(9, 10, 16));
        assert!(!balanced_enough(0, 10, 16) && !balanced_enough(10, 10, 16));
        // A quarter, for the median split's guard on large models.
        assert!(balanced_enough(25, 100, 4) && !balanced_enough(24, 100, 4));
    }

    #[test]
    fn faces_all_in_one_place_are_split_at_the_median() {
        // Twelve copies of one face: no extent to bin, so every split is the median.
        let faces: Faces = (0..12).map(|_| triangle(1.0, 0.0)).collect();
        let bvh = Bvh::new(&faces);
        let leaves: Vec<u32> = bvh
            .nodes
            .iter()
            .filter(|n| n.count > 0)
            .map(|n| n.count)
            .collect();
        assert_eq!(leaves.iter().sum::<u32>(), 12);
        assert!(
            leaves.iter().all(|&n| (1..=LEAF_FACES as u32).contains(&n)),
            "{leaves:?}"
        );
    }

    #[test]
    fn faces_spread_ever_wider_are_all_found_in_a_shallow_tree() {
        // Faces spaced ever wider (x doubling every thousand faces) give the heuristic
        // lopsided choices at every level; the tree stays within the 64 entries of the
        // searches' stacks and a ray to each face finds it.
        let faces: Faces = (0..20_000)
            .map(|i| triangle(1.0, (0.001 * i as f64).exp2()))
            .collect();
        let bvh = Bvh::new(&faces);
        let levels = depth(&bvh, 0);
        // At most SAH_LEVELS lopsided levels, then halving down to leaves of four.
        assert!(levels <= SAH_LEVELS as usize + 13, "{levels}");
        let origin = Point3::new(0.0, 0.0, 0.0);
        for (i, face) in faces.iter().enumerate().step_by(97) {
            let towards =
                (face.corners[0].coords + face.corners[1].coords + face.corners[2].coords) / 3.0;
            let d = towards.normalize();
            let hit = bvh.first_hit(&faces, &origin, &d, 1e30, |f, _, _| f as usize == i);
            assert_eq!(hit, Some(i as u32));
        }
    }

    #[test]
    fn wedges_cross_the_faces_a_brute_force_search_finds() {
        let faces: Faces = (0..300)
            .map(|i| {
                let mut f = triangle(1.0 + (i % 11) as f64 * 0.4, (i % 17) as f64 * 0.9 - 7.0);
                for p in &mut f.corners {
                    p.y += (i / 17) as f64 * 0.8 - 7.0;
                    p.z += 0.3 * p.x.sin();
                }
                f
            })
            .collect();
        let bvh = Bvh::new(&faces);
        let eye = Point3::new(0.3, -0.2, 0.0);
        let mut crossed = 0;
        for k in 0..400 {
            let a = k as f64 * 0.61;
            let p = Point3::new(6.0 * a.cos(), 6.0 * a.sin(), 1.0 + (k % 13) as f64 * 0.4);
            let q = p + Vector3::new(0.7 * (k as f64).sin(), 0.9, 0.2 * (k % 3) as f64);
            let wedge = [eye, p, q];
            let brute = faces.iter().any(|f| triangles_cross(&f.corners, &wedge));
            assert_eq!(bvh.crosses(&faces, &wedge), brute, "wedge {k}");
            crossed += brute as usize;
        }
        // Both answers are exercised.
        assert!(crossed > 20 && crossed < 380, "{crossed}");
    }

    /// Whether two triangles overlap, by the separating axis theorem (Gottschalk, Lin and
    /// Manocha, "OBBTree", SIGGRAPH 1996): apart exactly when their projections onto one of
    /// the two normals or the nine cross products of sides do not overlap.
    fn triangles_overlap(a: &[Point3<f64>; 3], b: &[Point3<f64>; 3]) -> bool {
        let sides = |t: &[Point3<f64>; 3]| [t[1] - t[0], t[2] - t[1], t[0] - t[2]];
        let (sa, sb) = (sides(a), sides(b));
        let mut axes = vec![sa[0].cross(&sa[1]), sb[0].cross(&sb[1])];
        for u in &sa {
            for v in &sb {
                axes.push(u.cross(v));
            }
        }
        let span = |t: &[Point3<f64>; 3], axis: &Vector3<f64>| {
            let d = t.map(|p| axis.dot(&p.coords));
            (d[0].min(d[1]).min(d[2]), d[0].max(d[1]).max(d[2]))
        };
        axes.iter().filter(|axis| axis.norm() > 1e-12).all(|axis| {
            let ((alo, ahi), (blo, bhi)) = (span(a, axis), span(b, axis));
            alo <= bhi && blo <= ahi
        })
    }

    #[test]
    fn triangles_cross_where_no_separating_axis_parts_them() {
        let mut next = crate::testing::numbers(97);
        let mut corner = || Point3::new(next(), next(), next());
        let (mut crossing, mut rejected_early) = (0, 0);
        for k in 0..4000 {
            let a = [corner(), corner(), corner()];
            let b = [corner(), corner(), corner()];
            let expected = triangles_overlap(&a, &b);
            assert_eq!(triangles_cross(&a, &b), expected, "pair {k}: {a:?} {b:?}");
            crossing += expected as usize;
            rejected_early += (Plane::of(&a).sides_of(&b).is_none()
                || Plane::of(&b).sides_of(&a).is_none()) as usize;
        }
        // Both answers, and the early rejection, are exercised.
        assert!(crossing > 400 && crossing < 3600, "{crossing}");
        assert!(rejected_early > 400, "{rejected_early}");
    }

    #[test]
    fn triangles_touching_a_plane_at_a_corner_cross_where_the_reference_finds_them_overlap() {
        // A corner exactly on the other's plane sends the pair to the side-by-side test. The
        // first triangle lies in z = 0, the second has its first corner there too; they cross
        // where the separating-axis reference finds an overlap. But a second triangle whose
        // other corners lie on one side meets the first at one point at most: where it does,
        // either answer is right (a crossing only costs the caller a closer look).
        let mut next = crate::testing::numbers(61);
        let (mut crossing, mut apart) = (0, 0);
        for k in 0..2000 {
            let mut flat = || Point3::new(4.0 * next() - 2.0, 4.0 * next() - 2.0, 0.0);
            let (a, touch) = ([flat(), flat(), flat()], flat());
            let mut off =
                || Point3::new(4.0 * next() - 2.0, 4.0 * next() - 2.0, 2.0 * next() - 1.0);
            let b = [touch, off(), off()];
            assert!(Plane::of(&a).sides_of(&b).unwrap().touching, "pair {k}");
            let expected = triangles_overlap(&a, &b);
            if expected && b[1].z * b[2].z > 0.0 {
                continue;
            }
            assert_eq!(triangles_cross(&a, &b), expected, "pair {k}: {a:?} {b:?}");
            assert_eq!(triangles_cross(&b, &a), expected, "pair {k}, swapped");
            crossing += expected as usize;
            apart += !expected as usize;
        }
        // Both answers are exercised.
        assert!(crossing > 200 && apart > 200, "{crossing} {apart}");
    }

    #[test]
    fn a_triangle_is_met_on_all_three_sides_but_not_at_the_ray_origin() {
        // The triangle is closed: a ray through the middle of any side, or through a
        // corner, meets it (its first two sides are closed by `0 <= u, v`; the third by
        // `u + v <= 1`, as in Moeller and Trumbore's own code, from memory). A ray starting
        // on it leaves it at distance 0, which is no crossing ahead of the origin: a face
        // through the eye hides nothing.
        let corners = [
            Point3::new(0.0, 0.0, 0.0),
            Point3::new(1.0, 0.0, 0.0),
            Point3::new(0.0, 1.0, 0.0),
        ];
        let down = Vector3::new(0.0, 0.0, -1.0);
        for (x, y) in [
            (0.5, 0.0),
            (0.0, 0.5),
            (0.5, 0.5),
            (0.0, 0.0),
            (1.0, 0.0),
            (0.0, 1.0),
        ] {
            let origin = Point3::new(x, y, 2.0);
            assert_eq!(
                ray_hits_triangle(&origin, &down, &corners),
                Some(2.0),
                "{x} {y}"
            );
        }
        let on_it = Point3::new(0.25, 0.25, 0.0);
        assert_eq!(ray_hits_triangle(&on_it, &down, &corners), None);
        assert_eq!(ray_hits_triangle(&on_it, &-down, &corners), None);
    }

    #[test]
    fn a_ray_meets_a_box_where_points_along_it_fall_inside() {
        // The definition, from points along the ray: a box it does not meet has none of 2,000
        // points of the ray from 0 to the limit inside it; where it meets one, the entry lies
        // on the box (a float's rounding aside), no earlier point lies inside, and the entry
        // is not beyond the limit.
        let mut next = crate::testing::numbers(83);
        let (mut met, mut missed) = (0, 0);
        for k in 0..3000 {
            let o = [0; 3].map(|_| (10.0 * next() - 5.0) as f32);
            let lo = [0; 3].map(|_| (6.0 * next() - 3.0) as f32);
            let hi = lo.map(|x| x + (2.0 * next()) as f32);
            // Aimed at a point near the box, so that about half the rays meet it.
            let towards = |i: usize, u: f64| {
                lo[i] as f64 + (hi[i] - lo[i]) as f64 * (2.0 * u - 0.5) - o[i] as f64
            };
            let d = Vector3::new(towards(0, next()), towards(1, next()), towards(2, next()));
            let d = d.normalize();
            let direction = [d.x as f32, d.y as f32, d.z as f32];
            let inverse = direction.map(|x| 1.0 / x);
            let (pad, limit) = (0.01f32, (10.0 * next()) as f32);
            let at = |t: f32| [0, 1, 2].map(|i| o[i] + t * direction[i]);
            let inside = |p: [f32; 3], slack: f32| {
                (0..3).all(|i| p[i] >= lo[i] - pad - slack && p[i] <= hi[i] + pad + slack)
            };
            let samples = (0..=2000).map(|i| limit * i as f32 / 2000.0);
            match ray_meets_box(&o, &inverse, &lo, &hi, pad, limit) {
                None => {
                    for t in samples {
                        assert!(!inside(at(t), -1e-3), "case {k}: {t} inside");
                    }
                    missed += 1;
                }
                Some(entry) => {
                    assert!((0.0..=limit).contains(&entry), "case {k}: {entry}");
                    assert!(inside(at(entry), 1e-3), "case {k}: {entry} outside");
                    for t in samples.filter(|&t| t < entry - 1e-3) {
                        assert!(!inside(at(t), -1e-3), "case {k}: {t} before {entry}");
                    }
                    met += 1;
                }
            }
        }
        // Both answers are exercised.
        assert!(met > 300 && missed > 300, "{met} {missed}");
    }

    #[test]
    fn a_plane_meets_a_box_when_its_corners_are_not_all_on_one_side() {
        let mut next = crate::testing::numbers(5);
        let mut met = 0;
        for k in 0..2000 {
            let (x, y, z) = (next() * 4.0, next() * 4.0, next() * 4.0);
            let node = Node {
                lo: [x as f32, y as f32, z as f32],
                hi: [
                    (x + next()) as f32,
                    (y + next()) as f32,
                    (z + next()) as f32,
                ],
                index: 0,
                count: 1,
            };
            let normal = Vector3::new(next() - 0.5, next() - 0.5, next() - 0.5);
            let offset = normal.dot(&Vector3::new(next(), next(), next()).scale(4.0));
            // The definition: the eight corners' sides.
            let sides: Vec<f64> = (0..8)
                .map(|corner| {
                    let pick = |k: usize| {
                        if corner >> k & 1 == 1 {
                            node.hi[k] as f64
                        } else {
                            node.lo[k] as f64
                        }
                    };
                    normal.dot(&Vector3::new(pick(0), pick(1), pick(2))) - offset
                })
                .collect();
            let expected = sides.iter().any(|&d| d <= 0.0) && sides.iter().any(|&d| d >= 0.0);
            assert_eq!(
                box_meets_plane(&node, &normal, offset),
                expected,
                "case {k}"
            );
            met += expected as usize;
        }
        assert!(met > 200 && met < 1800, "{met}");
        // A plane through a corner touches the box.
        let unit = Node {
            lo: [0.0; 3],
            hi: [1.0; 3],
            index: 0,
            count: 1,
        };
        assert!(box_meets_plane(&unit, &Vector3::new(1.0, 1.0, 1.0), 3.0));
        assert!(!box_meets_plane(&unit, &Vector3::new(1.0, 1.0, 1.0), 3.001));
    }

    #[test]
    fn a_plane_through_a_corner_touches_a_box_far_out_or_tiny() {
        // A plane through a corner of the box (its offset that corner's dot product, right
        // to within one rounding) touches it, whatever the rounding of the centre and the
        // reach: a box a metre across 1 km out (the sums carry about 1e-13 of rounding) and
        // a box a micrometre across a metre out (reach 1e-6, rounding about 1e-16).
        let mut next = crate::testing::numbers(41);
        for (out, size) in [(1000.0, 1.0), (1.0, 1e-6)] {
            for k in 0..500 {
                let lo = [0, 1, 2].map(|_| (out * (1.0 + 0.1 * next())) as f32);
                let hi = lo.map(|x| (x as f64 + size * (0.5 + next())) as f32);
                let node = Node {
                    lo,
                    hi,
                    index: 0,
                    count: 1,
                };
                let normal = Vector3::new(next() - 0.5, next() - 0.5, next() - 0.5);
                // Corner `k % 8`: bit `axis` of it picks that axis's high side.
                let pick = |axis: usize| {
                    if (k % 8) >> axis & 1 == 1 {
                        hi[axis] as f64
                    } else {
                        lo[axis] as f64
                    }
                };
                let at = Vector3::new(pick(0), pick(1), pick(2));
                assert!(
                    box_meets_plane(&node, &normal, normal.dot(&at)),
                    "{out} m out, case {k}"
                );
            }
        }
    }

    #[test]
    fn a_triangle_touching_the_plane_is_not_clear_of_it() {
        let floor = [
            Point3::new(0.0, 0.0, 0.0),
            Point3::new(4.0, 0.0, 0.0),
            Point3::new(0.0, 4.0, 0.0),
        ];
        let standing = |z: f64| {
            [
                Point3::new(1.0, 1.0, z),
                Point3::new(1.5, 1.0, z + 2.0),
                Point3::new(1.0, 1.5, z + 2.0),
            ]
        };
        let sides = |z: f64| Plane::of(&floor).sides_of(&standing(z));
        assert!(sides(0.01).is_none());
        assert!(sides(0.0).is_some_and(|s| s.touching));
        assert!(sides(-0.01).is_some_and(|s| !s.touching));
        assert!(sides(-2.01).is_none());
        // Hanging from the floor by its top side: touching from below.
        assert!(sides(-2.0).is_some_and(|s| s.touching));
        // Touching, the plain test answers: the standing triangle's corner is on the floor.
        assert!(triangles_cross(&floor, &standing(0.0)));
        assert!(!triangles_cross(&floor, &standing(0.01)));
        // The margin scales with the plane's normal and the corners' reach: on a floor 400 m
        // across, a corner 100 m out and 1e-8 m up is within it (1e-9 of the reach), so
        // touching; 1e-6 m up it is clear.
        let wide = floor.map(|p| p * 100.0);
        let far = |z: f64| standing(z).map(|p| p + Vector3::new(99.0, 99.0, 0.0));
        assert!(Plane::of(&wide)
            .sides_of(&far(1e-8))
            .is_some_and(|s| s.touching));
        assert!(Plane::of(&wide).sides_of(&far(1e-6)).is_none());
    }

    /// The faces under node `at` (the whole hierarchy for `None`), in the order the walk
    /// from it hands them out, with the boxes it asks about (each as the index of the first
    /// face after it).
    fn walk(bvh: &Bvh, at: Option<u32>, eye: &Point3<f64>) -> (Vec<u32>, Vec<usize>) {
        let (mut faces, mut boxes) = (Vec::new(), Vec::new());
        let visit = |visit| {
            match visit {
                Visit::Box { .. } => boxes.push(faces.len()),
                Visit::Face(index) => faces.push(index),
            }
            true
        };
        match at {
            Some(at) => bvh.front_to_back_under(at, eye, visit),
            None => bvh.front_to_back(eye, visit),
        }
        (faces, boxes)
    }

    #[test]
    fn the_memory_held_is_room_for_the_nodes_and_the_order() {
        // A node is six f32 and two u32, 32 bytes (as the module's notes say), and a face's
        // place in the order a u32; a list holds room for its capacity.
        assert_eq!(std::mem::size_of::<Node>(), 32);
        let faces: Faces = (0..100).map(|i| triangle(1.0, 3.0 * i as f64)).collect();
        let bvh = Bvh::new(&faces);
        assert!(bvh.nodes.capacity() >= bvh.nodes.len() && bvh.order.capacity() >= 100);
        assert_eq!(
            bvh.memory_bytes(),
            32 * bvh.nodes.capacity() + 4 * bvh.order.capacity()
        );
    }

    #[test]
    fn the_halves_are_the_roots_two_children_and_share_every_face() {
        // Forty faces in a row: the root is split, and the walks from its two children hand
        // out every face once between them, each some. Four faces make a single leaf (no
        // halves), and no faces no hierarchy.
        let faces: Faces = (0..40).map(|i| triangle(1.0, 3.0 * i as f64)).collect();
        let bvh = Bvh::new(&faces);
        let eye = Point3::new(-5.0, 0.0, 0.0);
        let [first, second] = bvh.halves().unwrap();
        let (mut a, _) = walk(&bvh, Some(first), &eye);
        let (b, _) = walk(&bvh, Some(second), &eye);
        assert!(!a.is_empty() && !b.is_empty());
        a.extend(b);
        a.sort_unstable();
        assert_eq!(a, (0..40).collect::<Vec<u32>>());
        assert_eq!(Bvh::new(&faces.iter().take(4).collect()).halves(), None);
        assert_eq!(Bvh::new(&Faces::new()).halves(), None);
        // A node past the end hands out nothing.
        assert_eq!(
            walk(&bvh, Some(bvh.nodes.len() as u32), &eye).0,
            Vec::<u32>::new()
        );
    }

    #[test]
    fn the_walk_hands_out_the_nearest_leaves_first() {
        // Forty faces 3 m apart in a row along x, seen from either end of it, 5 m beyond: the
        // leaves come nearest first, so each leaf's faces all lie nearer than the next
        // leaf's (a leaf's own faces come in the order they were grouped).
        let faces: Faces = (0..40).map(|i| triangle(1.0, 3.0 * i as f64)).collect();
        let bvh = Bvh::new(&faces);
        for (eye, toward) in [(-5.0, 1.0), (122.0, -1.0)] {
            let (order, boxes) = walk(&bvh, None, &Point3::new(eye, 0.0, 0.0));
            assert_eq!(order.len(), 40);
            // The faces' distances along the row, grouped by the box asked about before them.
            let along = |i: u32| toward * 3.0 * i as f64;
            let mut groups: Vec<Vec<f64>> = Vec::new();
            for (k, &start) in boxes.iter().enumerate() {
                let end = boxes.get(k + 1).copied().unwrap_or(order.len());
                if end > start {
                    groups.push(order[start..end].iter().map(|&i| along(i)).collect());
                }
            }
            for pair in groups.windows(2) {
                let last = pair[0].iter().cloned().fold(f64::NEG_INFINITY, f64::max);
                let next = pair[1].iter().cloned().fold(f64::INFINITY, f64::min);
                assert!(last < next, "{groups:?}");
            }
        }
        // A box turned down hides everything under it: turning down the root, nothing.
        let mut handed = 0;
        bvh.front_to_back(&Point3::origin(), |visit| match visit {
            Visit::Box { .. } => false,
            Visit::Face(_) => {
                handed += 1;
                true
            }
        });
        assert_eq!(handed, 0);
    }

    #[test]
    fn a_ray_finds_a_face_closer_than_its_limit_and_no_other() {
        // A ray straight up from the origin meets a level triangle over it (corners (-5, -5),
        // (5, -5) and (0, 5)) at its height. At 10 m: the distance is exactly 10 (by hand,
        // Moeller and Trumbore's terms are -100 for the determinant and -1000 for the
        // distance's numerator, and -1000 x (1 / -100) rounds to 10), and a face at the
        // limit is not closer than it. At 99.9995 m a limit of 100 m finds it (5e-6 of the
        // limit short of it: the boxes' allowance for the ray's f32 rounding must not turn
        // it away), and a limit of 99.999 m does not.
        let up = Vector3::z();
        let origin = Point3::origin();
        let level = |z: f64| {
            let mut face = triangle(z, 0.0);
            for p in &mut face.corners {
                p.x *= 5.0;
                p.y *= 5.0;
            }
            Faces::from([face])
        };
        let first_hit = |faces: &Faces, limit: f64| {
            Bvh::new(faces).first_hit(faces, &origin, &up, limit, |_, _, _| true)
        };
        let ten = level(10.0);
        assert_eq!(
            ray_hits_triangle(&origin, &up, &ten.get(0).corners),
            Some(10.0)
        );
        assert_eq!(first_hit(&ten, 10.0), None);
        assert_eq!(first_hit(&ten, 10.001), Some(0));
        let far = level(99.9995);
        assert_eq!(first_hit(&far, 100.0), Some(0));
        assert_eq!(first_hit(&far, 99.999), None);
    }

    #[test]
    fn an_empty_hierarchy_holds_nothing() {
        // No faces: no box, no walk, no ray's hit and no wedge crossed.
        let empty = Bvh::new(&Faces::new());
        assert!(empty.nodes.is_empty() && empty.order.is_empty());
        let origin = Point3::origin();
        assert_eq!(
            empty.first_hit(&Faces::new(), &origin, &Vector3::z(), 1e9, |_, _, _| true),
            None
        );
        let wedge = [
            origin,
            Point3::new(1.0, 5.0, 0.0),
            Point3::new(-1.0, 5.0, 0.0),
        ];
        assert!(!empty.crosses(&Faces::new(), &wedge));
        assert_eq!(walk(&empty, None, &origin), (vec![], vec![]));
    }

    #[test]
    fn a_ray_through_every_box_of_a_deep_tree_finds_the_face_it_asks_for() {
        // Upright faces across the x axis, placed so that every split is lopsided: of n
        // faces, the last n/16 lie within the last thousandth of the span and the rest
        // within its first sixteenth, in turn placed the same way, thirty times over (then
        // evenly). Binned in twelve along the span, they fill only the first bin and the
        // last, so the split is forced, and the tree is over 32 levels deep. A ray along the
        // axis from x = -1 meets every box: at each level the farther child waits on the
        // search's stack while the nearer one is searched, so the stack holds about as many
        // entries as the tree has levels, within its 64. Asked for one face, the ray finds
        // that face, whichever it is.
        fn place(n: usize, hi: f64, levels: u32, out: &mut Vec<f64>) {
            if levels == 0 || n <= 16 {
                out.extend((1..=n).map(|k| hi * k as f64 / n as f64));
                return;
            }
            let far = n / 16;
            place(n - far, hi / 16.0, levels - 1, out);
            out.extend((0..far).map(|k| hi * (1.0 - 0.001 * k as f64 / far as f64)));
        }
        let mut xs = Vec::new();
        place(20_000, 1e15, 30, &mut xs);
        let faces: Faces = xs
            .iter()
            .map(|&x| Face {
                corners: [
                    Point3::new(x - 1.0, -1.0, -1.0),
                    Point3::new(x + 1.0, -1.0, 1.0),
                    Point3::new(x, 1.0, 0.0),
                ],
                item: ItemId(0),
                slack: 0.0,
            })
            .collect();
        let bvh = Bvh::new(&faces);
        assert!(depth(&bvh, 0) > 32, "{}", depth(&bvh, 0));
        let origin = Point3::new(-1.0, 0.0, 0.0);
        for i in (0..faces.len()).step_by(97) {
            let hit = bvh.first_hit(&faces, &origin, &Vector3::x(), f64::INFINITY, |f, _, _| {
                f as usize == i
            });
            assert_eq!(hit, Some(i as u32));
        }
    }

    #[test]
    fn a_ray_from_far_out_finds_a_face_a_few_millimetres_ahead() {
        // From x = 1000 the boxes are grown by 1e-5 x 1001 m, about 1 cm, for the f32
        // rounding of the ray; a face 5 mm ahead is found with a limit of 1 cm, and not
        // with one of 4 mm.
        let faces = Faces::from([Face {
            corners: [
                Point3::new(1000.004, -1.0, -1.0),
                Point3::new(1000.006, -1.0, 1.0),
                Point3::new(1000.005, 1.0, 0.0),
            ],
            item: ItemId(0),
            slack: 0.0,
        }]);
        let bvh = Bvh::new(&faces);
        let origin = Point3::new(1000.0, 0.0, 0.0);
        let first_hit =
            |limit| bvh.first_hit(&faces, &origin, &Vector3::x(), limit, |_, _, _| true);
        assert_eq!(first_hit(0.01), Some(0));
        assert_eq!(first_hit(0.004), None);
    }

    #[test]
    fn a_ray_from_the_origin_with_a_vanishing_component_finds_its_face() {
        // A triangle in the plane y = 10, from x = x0 (just over the least normal f32,
        // 2^-126) to x = 1, is met by the ray from the origin along (2e-39, 1, 0) at
        // (2e-38, 10, 0): x0 < 2e-38 < 1 and z = 0 lies between the corners' -1 and 1, so
        // inside it, 10 m out. x0 is chosen so that the box's side, rounded outwards, is
        // exactly 0; and 1 / 2e-39 = 5e38 is past the largest f32 (3.4e38), so the slab
        // test's inverse is infinite. Without a pad the slab's near side is 0 x infinity, not
        // a number, and the box would be turned away; the pad (at least 1e-5 m, even at the
        // origin) keeps it finite.
        let x0 = f32::MIN_POSITIVE as f64 / (1.0 - 4.0 * f32::EPSILON as f64);
        let faces = Faces::from([Face {
            corners: [
                Point3::new(x0, 10.0, -1.0),
                Point3::new(x0, 10.0, 1.0),
                Point3::new(1.0, 10.0, 0.0),
            ],
            item: ItemId(0),
            slack: 0.0,
        }]);
        let bvh = Bvh::new(&faces);
        assert_eq!(bvh.nodes[0].lo[0], 0.0, "the case asked about");
        let (origin, direction) = (Point3::origin(), Vector3::new(2e-39, 1.0, 0.0));
        assert!((1.0 / direction.x) as f32 == f32::INFINITY);
        let hit = ray_hits_triangle(&origin, &direction, &faces.get(0).corners);
        assert!(hit.is_some_and(|t| (t - 10.0).abs() < 1e-12), "{hit:?}");
        assert_eq!(
            bvh.first_hit(&faces, &origin, &direction, 20.0, |_, _, _| true),
            Some(0)
        );
    }

    /// `n` faces along the x axis split lopsidedly `levels` times over (see below), each
    /// scaled with its level's span, reaching to `hi` from near the origin.
    fn lopsided_faces(n: usize, hi: f64, levels: u32) -> Faces {
        fn place(n: usize, hi: f64, levels: u32, out: &mut Vec<(f64, f64)>) {
            if levels == 0 || n <= 16 {
                out.extend((1..=n).map(|k| (hi * k as f64 / n as f64, hi / n as f64)));
                return;
            }
            let far = n / 16;
            place(n - far, hi / 16.0, levels - 1, out);
            let size = 1e-4 * hi / far as f64;
            out.extend((0..far).map(|k| (hi * (1.0 - 0.001 * k as f64 / far as f64), size)));
        }
        let mut placed = Vec::new();
        place(n, hi, levels, &mut placed);
        placed
            .iter()
            .map(|&(x, w)| Face {
                corners: [
                    Point3::new(x - w, -w, -w),
                    Point3::new(x + w, -w, w),
                    Point3::new(x, w, 0.0),
                ],
                item: ItemId(0),
                slack: 0.0,
            })
            .collect()
    }

    #[test]
    fn lopsided_splits_stop_after_sah_levels_so_every_face_is_found() {
        // Faces placed as in the deep tree above but lopsided sixty times over, each level's
        // faces scaled with its span (so that none is a sliver to the ray): the binned
        // heuristic alone would split them sixty times and then halve 416 faces down to
        // leaves of four, 67 levels, past the searches' stacks of 64. Below `SAH_LEVELS`
        // the median takes over, and a ray along the axis finds every face asked for; the
        // same mirrored (x to -x), the chain then running down the second halves.
        let mut faces = lopsided_faces(20_000, 3e37, 60);
        for toward in [1.0, -1.0] {
            faces.map_points(|p| Point3::new(toward * p.x.abs(), p.y, p.z));
            let bvh = Bvh::new(&faces);
            let levels = depth(&bvh, 0);
            assert!(levels < 64, "{levels}");
            let origin = Point3::new(-toward, 0.0, 0.0);
            let along = Vector3::new(toward, 0.0, 0.0);
            for i in (0..faces.len()).step_by(97) {
                let hit = bvh.first_hit(&faces, &origin, &along, f64::INFINITY, |f, _, _| {
                    f as usize == i
                });
                assert_eq!(hit, Some(i as u32), "{levels}");
            }
        }
    }

    #[test]
    fn a_lopsided_tree_built_on_threads_is_the_one_built_on_one() {
        // The lopsided faces, 100,000 of them, so that the three top levels are split on
        // threads; as they are, the long chain of splits runs down the first halves, and
        // mirrored (x to -x) down the second, the ones handed to threads. Each level is
        // counted the same on a thread, and the median takes over at the same depth: the
        // same hierarchy.
        let mut faces = lopsided_faces(100_000, 3e37, 60);
        for mirrored in [false, true] {
            if mirrored {
                faces.map_points(|p| Point3::new(-p.x, p.y, p.z));
            }
            let one = Bvh::with_split_levels(&faces, 0);
            let threaded = Bvh::with_split_levels(&faces, 3);
            assert!(depth(&one, 0) > SAH_LEVELS as usize);
            assert!(threaded.nodes == one.nodes && threaded.order == one.order);
        }
    }
}
