//! A coarse map of what certainly hides, from one eye: the viewing sphere cut into cells of
//! azimuth and elevation (the image's own layout, row 0 at the zenith, column 0 at the seam),
//! each holding the nearest face that covers the whole cell and how far away, at most, that
//! face stands along any sight line through the cell.
//!
//! It only ever says "hidden", and only when that is certain: a point whose direction falls
//! in a covered cell and whose distance, less the depth bias, exceeds the cell's depth is
//! hidden by the cell's face, whatever the exact test would have found first; a piece of an
//! edge whose every direction lies in such cells, and whose nearest point lies beyond all of
//! them, is hidden throughout. Everything else goes to the exact test (`sight.rs`), so the
//! drawing is the same with or without the map; only the time differs. From a street, the
//! first row of houses covers most of the sphere below the roofs, and most of a town's edges
//! are settled here without a ray.
//!
//! Why each step is conservative:
//! - A face covers a cell when the cell's circumscribed cap (the smallest circle on the sphere
//!   round the cell's middle direction that holds its corners) lies inside the cone of sight
//!   lines through the triangle, which is the intersection of three half-spaces, one per side
//!   (a cap of angular radius r round c lies in the half-space m . x >= 0 exactly when
//!   m . c >= sin r, for unit m). An az/el cell a few tenths of a degree across lies within
//!   that cap: the angle to the middle grows along every row and every meridian of the cell
//!   towards its corners (spherical law of cosines), so the corners are the farthest points.
//! - How far a covering face is along a sight line d: t = h / (n . d), for the face's unit
//!   normal n at distance h from the eye. Over a cap of radius r round c, n . d is at least
//!   cos(a + r), a the angle between n and c. And no point of a triangle is farther than its
//!   farthest corner (distance is convex). The cell keeps the smaller bound, rounded up.
//! - Faces with slack (facets of curved surfaces) hide less than their plane and are left
//!   out, as are faces seen edge-on.
//! - Queries widen every angle by `ANGLE_MARGIN` and shrink every distance by `ROUNDING`, far
//!   more than the rounding of the few operations between.

use super::bvh::{Bvh, Visit};
use crate::scene::{Face, Faces};
use crate::sphere::{angle_between, direction_from_azimuth_elevation, SphereCurve, ViewFrame};
use nalgebra::{Point3, Vector3};
use std::f64::consts::{FRAC_PI_2, PI, TAU};

/// Radians every cap is widened by, against the rounding of the angles computed for it.
const ANGLE_MARGIN: f64 = 1e-9;

/// Relative amount every distance bound is moved the safe way, against rounding (including
/// the f32 the depths are stored in, whose rounding is 6e-8).
const ROUNDING: f64 = 1e-6;

/// A face whose plane passes within this fraction of its farthest corner's distance from the
/// eye is seen edge-on and covers nothing.
const EDGE_ON: f64 = 1e-6;

/// Map sizes: about one cell for two faces, between these numbers of rows (columns are twice
/// the rows). A million faces get cells of 0.18 degrees.
const MIN_ROWS: usize = 64;
const MAX_ROWS: usize = 1024;

/// Faces from which the map is filled on two cores.
const FACES_FOR_THREADS: usize = 50_000;

/// The mark of a cell covered by two faces together, `index` and `index + 1`.
const PAIR: u32 = 1 << 31;

/// The map of certain cover from one eye (see the module docs).
pub struct OcclusionMap {
    rows: usize,
    columns: usize,
    /// Per cell, row by row: at most how far the covering face is along any sight line through
    /// the cell (metres, rounded up); infinite where no face covers the whole cell.
    depth: Vec<f32>,
    /// Per cell: the covering face (the one with the smallest depth bound).
    face: Vec<u32>,
    /// Per row: the circumscribed cap's angular radius, and the sine and cosine of its middle
    /// elevation.
    row_caps: Vec<RowCap>,
    /// Per column: the sine and cosine of its middle azimuth.
    column_sin_cos: Vec<(f64, f64)>,
}

#[derive(Clone, Copy, Debug)]
struct RowCap {
    radius: f64,
    sin_radius: f64,
    cos_radius: f64,
    sin_elevation: f64,
    cos_elevation: f64,
}

/// Whether `a > b`: false when either is NaN, so that a NaN refuses what it guards.
fn exceeds(a: f64, b: f64) -> bool {
    a > b
}

/// Azimuth and elevation of a unit view-frame direction, as `sphere::azimuth_elevation`
/// gives them but with a plain square root for the horizontal length (the caps round them
/// are widened by far more than the difference).
fn azimuth_elevation(d: &Vector3<f64>) -> (f64, f64) {
    (d.x.atan2(d.y), d.z.atan2((d.x * d.x + d.y * d.y).sqrt()))
}

/// The half-open range of rows, and of columns (possibly past either end: they wrap round
/// the seam), whose cells may meet a cap of angular radius `radius` round the direction of
/// azimuth `azimuth` and elevation `elevation` in a map of `rows` x `columns` cells. Every
/// column, when the cap reaches a pole.
fn cells_near(
    rows: usize,
    columns: usize,
    azimuth: f64,
    elevation: f64,
    radius: f64,
) -> (std::ops::Range<usize>, std::ops::Range<i64>) {
    let (row_angle, column_angle) = (PI / rows as f64, TAU / columns as f64);
    let (top, bottom) = (elevation + radius, elevation - radius);
    let row = |e: f64| {
        ((FRAC_PI_2 - e) / row_angle)
            .floor()
            .clamp(0.0, rows as f64 - 1.0) as usize
    };
    let row_range = row(top)..row(bottom) + 1;
    if top >= FRAC_PI_2 || bottom <= -FRAC_PI_2 {
        return (row_range, 0..columns as i64);
    }
    // The azimuths of a cap not holding a pole reach sin(half) = sin(r) / cos(e) either side
    // of its middle (the meridians tangent to it).
    let reach = radius.sin() / elevation.cos();
    if reach >= 1.0 {
        return (row_range, 0..columns as i64);
    }
    let half = reach.asin() + ANGLE_MARGIN;
    let column = |a: f64| ((a + PI) / column_angle).floor() as i64;
    let (first, last) = (column(azimuth - half), column(azimuth + half));
    if last - first + 1 >= columns as i64 {
        return (row_range, 0..columns as i64);
    }
    (row_range, first..last + 1)
}

/// The angular radius of the circumscribed cap of a cell of row `row` in a map of `rows` x
/// `columns`: the angle from its middle direction to its farthest corner (see the module
/// docs), widened for rounding.
fn cell_radius(rows: usize, columns: usize, row: usize) -> f64 {
    let (row_angle, column_angle) = (PI / rows as f64, TAU / columns as f64);
    let top = FRAC_PI_2 - row as f64 * row_angle;
    let middle = direction_from_azimuth_elevation(0.0, top - 0.5 * row_angle);
    let corner = |e: f64| {
        angle_between(
            &middle,
            &direction_from_azimuth_elevation(0.5 * column_angle, e),
        )
    };
    corner(top).max(corner(top - row_angle)) * (1.0 + ROUNDING) + ANGLE_MARGIN
}

/// The inward unit normals of the sides of the cone of sight lines from the eye (the
/// origin) through a convex polygon with these corners (in order, either way round), or
/// `None` when the polygon is seen edge-on or its image is not convex. A direction d is in
/// the cone exactly when every `m . d >= 0`.
fn cone_sides<const N: usize>(corners: &[Vector3<f64>; N]) -> Option<[Vector3<f64>; N]> {
    let mut sides = [Vector3::zeros(); N];
    let mut orientation = 0.0;
    for k in 0..N {
        let side = corners[k].cross(&corners[(k + 1) % N]);
        // Every other corner on the same side of every side's plane: convex, and the same
        // way round throughout.
        for j in 2..N {
            let other = side.dot(&corners[(k + j) % N]);
            if orientation == 0.0 {
                orientation = other.signum();
            }
            if !exceeds(other * orientation, 0.0) {
                return None;
            }
        }
        sides[k] = side.try_normalize(0.0)? * orientation;
    }
    Some(sides)
}

/// Whether two triangles share a side: two corners, the very same points.
fn share_side(a: &Face, b: &Face) -> bool {
    a.corners.iter().filter(|p| b.corners.contains(p)).count() == 2
}

/// The sides of the cone through the quadrilateral that two triangles sharing a side make,
/// when it is convex as seen from the eye: `a` and `b` are their corners in the site (a
/// shared corner is the same point in both), `view_a` and `view_b` the same relative to the
/// eye. `None` when they share no side or their union is not convex.
fn quad_sides(
    a: &[Point3<f64>; 3],
    b: &[Point3<f64>; 3],
    view_a: &[Vector3<f64>; 3],
    view_b: &[Vector3<f64>; 3],
) -> Option<[Vector3<f64>; 4]> {
    let own = |t: &[Point3<f64>; 3], other: &[Point3<f64>; 3]| {
        let mine: Vec<usize> = (0..3).filter(|&i| !other.contains(&t[i])).collect();
        (mine.len() == 1).then(|| mine[0])
    };
    let (k, m) = (own(a, b)?, own(b, a)?);
    // Round `a` from its own corner: its own, a shared, b's own, the other shared.
    let quad = [
        view_a[k],
        view_a[(k + 1) % 3],
        view_b[m],
        view_a[(k + 2) % 3],
    ];
    cone_sides(&quad)
}

/// A face's flat piece, as the map needs it: the directions of its corners, the sides of its
/// cone, its plane (unit normal away from the eye, at distance `h`) and its farthest corner.
#[derive(Clone, Debug)]
struct Plate {
    units: [Vector3<f64>; 3],
    sides: [Vector3<f64>; 3],
    normal: Vector3<f64>,
    h: f64,
    farthest: f64,
}

impl Plate {
    /// The plate of a triangle with corners relative to the eye, or `None` when it is seen
    /// edge-on.
    fn of(corners: &[Vector3<f64>; 3]) -> Option<Plate> {
        let farthest = corners.iter().map(|p| p.norm()).fold(0.0, f64::max);
        let normal = (corners[1] - corners[0])
            .cross(&(corners[2] - corners[0]))
            .try_normalize(0.0)?;
        let h = normal.dot(&corners[0]);
        if !exceeds(h.abs(), EDGE_ON * farthest) {
            return None;
        }
        Some(Plate {
            units: corners.map(|p| p / p.norm()),
            sides: cone_sides(corners)?,
            normal: normal * h.signum(),
            h: h.abs(),
            farthest,
        })
    }

    /// At most how far the plate is along a sight line within a cell's cap (round `middle`).
    fn farthest_over(&self, middle: &Vector3<f64>, cap: &RowCap) -> f64 {
        self.farthest.min(farthest_on_plane(
            &self.normal,
            self.h,
            middle,
            cap.sin_radius,
            cap.cos_radius,
        ))
    }
}

/// Whether the cap of angular radius with sine `sin_radius` round the unit direction `centre`
/// lies inside the cone with these inward side normals.
fn cap_in_cone(sides: &[Vector3<f64>], centre: &Vector3<f64>, sin_radius: f64) -> bool {
    sides
        .iter()
        .all(|m| m.dot(centre) >= sin_radius + ANGLE_MARGIN)
}

/// At most how far along any sight line within the cap (unit `centre`, angular radius with
/// sine and cosine `sin_radius`, `cos_radius`) the plane `n . x = h` is, for a unit `n`
/// facing away from the eye (`h > 0`); infinite when the cap reaches the plane's horizon.
fn farthest_on_plane(
    normal: &Vector3<f64>,
    h: f64,
    centre: &Vector3<f64>,
    sin_radius: f64,
    cos_radius: f64,
) -> f64 {
    // n . d >= cos(a + r) over the cap, cos a = n . c.
    let cos_a = normal.dot(centre);
    let sin_a = (1.0 - cos_a * cos_a).max(0.0).sqrt();
    let least = cos_a * cos_radius - sin_a * sin_radius;
    if least > 0.0 {
        h / least
    } else {
        f64::INFINITY
    }
}

/// The distance from the eye (the origin) to the nearest point of the segment from `a` to
/// `b` (Ericson, "Real-Time Collision Detection", 2005, section 5.1.2: the closest point on a
/// segment).
pub(super) fn segment_distance(a: &Vector3<f64>, b: &Vector3<f64>) -> f64 {
    let along = b - a;
    let length2 = along.norm_squared();
    if length2 == 0.0 {
        return a.norm();
    }
    let s = (-a.dot(&along) / length2).clamp(0.0, 1.0);
    (a + along * s).norm()
}

impl OcclusionMap {
    /// The map of these faces (with their hierarchy) from the eye of `view`, sized to the
    /// number of faces.
    pub fn new(faces: &Faces, bvh: &Bvh, view: &ViewFrame) -> OcclusionMap {
        let rows = ((faces.len() as f64).sqrt() as usize)
            .next_power_of_two()
            .clamp(MIN_ROWS, MAX_ROWS);
        OcclusionMap::with_rows(faces, bvh, view, rows)
    }

    /// The map with `rows` rows of cells (and twice as many columns).
    ///
    /// The faces are entered nearest first, through their hierarchy: a box of faces whose
    /// every sight line is already covered nearer than the box could add nothing, and is
    /// passed over with everything in it. From a street that is most of a town.
    pub fn with_rows(faces: &Faces, bvh: &Bvh, view: &ViewFrame, rows: usize) -> OcclusionMap {
        let mut map = OcclusionMap::empty(rows.max(2), 2 * rows.max(2));
        let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
        let halves = bvh
            .halves()
            .filter(|_| cores > 1 && faces.len() >= FACES_FOR_THREADS);
        let Some([first, second]) = halves else {
            map.fill(faces, bvh, 0, view);
            return map;
        };
        // Each half of the hierarchy in a map of its own on its own core (each passes over
        // what its own near faces hide), then the nearer cover of the two in each cell.
        let mut other = OcclusionMap::empty(map.rows, map.columns);
        std::thread::scope(|scope| {
            scope.spawn(|| other.fill(faces, bvh, second, view));
            map.fill(faces, bvh, first, view);
        });
        for (cell, (&depth, &face)) in other.depth.iter().zip(&other.face).enumerate() {
            if depth < map.depth[cell] {
                map.depth[cell] = depth;
                map.face[cell] = face;
            }
        }
        map
    }

    /// Enters the faces under the node `root` of their hierarchy, nearest first; returns
    /// how many it entered (the rest lay in boxes already hidden).
    fn fill(&mut self, faces: &Faces, bvh: &Bvh, root: u32, view: &ViewFrame) -> usize {
        let eye = view.eye();
        let mut entered = 0;
        bvh.front_to_back_under(root, &eye, |visit| match visit {
            Visit::Box { lo, hi } => !self.hides_box(&lo, &hi, &eye, view),
            Visit::Face(index) => {
                self.enter(faces, index, view);
                entered += 1;
                true
            }
        });
        entered
    }

    /// Whether the map covers every sight line to the box (site coordinates) nearer than
    /// any point of it.
    fn hides_box(
        &self,
        lo: &Point3<f64>,
        hi: &Point3<f64>,
        eye: &Point3<f64>,
        view: &ViewFrame,
    ) -> bool {
        let middle = Point3::from((lo.coords + hi.coords) * 0.5);
        let half_diagonal = 0.5 * (hi - lo).norm();
        let to_middle = middle - eye;
        let distance = to_middle.norm();
        // The box's ball seen from the eye: a cap of radius asin(r / d).
        if !exceeds(distance, half_diagonal * (1.0 + ROUNDING)) {
            return false;
        }
        let radius = (half_diagonal / distance).asin() * (1.0 + ROUNDING) + ANGLE_MARGIN;
        let nearest = Point3::from([0, 1, 2].map(|k| eye[k].clamp(lo[k], hi[k])));
        let centre = view.direction_to_view(&(to_middle / distance));
        self.covers_cap(&centre, radius, (nearest - eye).norm() * (1.0 - ROUNDING))
    }

    /// Enters a face in the map: with the next one when the two share a side (a
    /// quadrilateral split in two, as modellers and the scene's builders write them), so
    /// that they cover the cells along that side together; not at all when it shares a side
    /// with the one before (it was entered with that one).
    fn enter(&mut self, faces: &Faces, index: u32, view: &ViewFrame) {
        let i = index as usize;
        let flat = |face: &Face| face.slack == 0.0;
        let face = faces.get(i);
        let entered_before = |before: Face| flat(&before) && share_side(&before, &face);
        if !flat(&face) || (i > 0 && entered_before(faces.get(i - 1))) {
            return;
        }
        let corners = face.corners.map(|p| view.to_view(&p));
        let plate = Plate::of(&corners);
        let Some(next) = (i + 1 < faces.len())
            .then(|| faces.get(i + 1))
            .filter(|next| flat(next) && share_side(&face, next))
        else {
            if let Some(plate) = plate {
                self.cover(index, &[plate], None);
            }
            return;
        };
        let next_corners = next.corners.map(|p| view.to_view(&p));
        match (plate, Plate::of(&next_corners)) {
            (Some(plate), Some(next_plate)) => {
                let outline = quad_sides(&face.corners, &next.corners, &corners, &next_corners);
                self.cover(index, &[plate, next_plate], outline.as_ref());
            }
            (Some(plate), None) => self.cover(index, &[plate], None),
            (None, Some(next_plate)) => self.cover(index + 1, &[next_plate], None),
            (None, None) => {}
        }
    }

    fn empty(rows: usize, columns: usize) -> OcclusionMap {
        let row_caps = (0..rows)
            .map(|row| {
                let radius = cell_radius(rows, columns, row);
                let elevation = FRAC_PI_2 - (row as f64 + 0.5) * PI / rows as f64;
                RowCap {
                    radius,
                    sin_radius: radius.sin(),
                    cos_radius: radius.cos(),
                    sin_elevation: elevation.sin(),
                    cos_elevation: elevation.cos(),
                }
            })
            .collect();
        let column_sin_cos = (0..columns)
            .map(|column| (-PI + (column as f64 + 0.5) * TAU / columns as f64).sin_cos())
            .collect();
        OcclusionMap {
            rows,
            columns,
            depth: vec![f32::INFINITY; rows * columns],
            face: vec![u32::MAX; rows * columns],
            row_caps,
            column_sin_cos,
        }
    }

    /// The map's size in cells: rows, columns.
    pub fn size(&self) -> (usize, usize) {
        (self.rows, self.columns)
    }

    /// The middle direction of a cell, in the view frame.
    fn cell_middle(&self, row: usize, column: usize) -> Vector3<f64> {
        let cap = &self.row_caps[row];
        let (sin_az, cos_az) = self.column_sin_cos[column];
        Vector3::new(
            cap.cos_elevation * sin_az,
            cap.cos_elevation * cos_az,
            cap.sin_elevation,
        )
    }

    /// Enters the face `index` (and with two plates, also `index + 1`; `outline`: the sides
    /// of their union's cone) in the cells it covers.
    fn cover(&mut self, index: u32, plates: &[Plate], outline: Option<&[Vector3<f64>; 4]>) {
        // The cap round the corners' mean direction holds the whole face when it is under
        // a quarter turn (caps that small are convex).
        let units = || plates.iter().flat_map(|p| p.units);
        let Some(centre) = units().sum::<Vector3<f64>>().try_normalize(0.0) else {
            return;
        };
        let cos_radius = units().map(|u| u.dot(&centre)).fold(1.0, f64::min);
        let radius = if cos_radius > 0.0 {
            cos_radius.min(1.0).acos() + ANGLE_MARGIN
        } else {
            PI
        };
        let (azimuth, elevation) = azimuth_elevation(&centre);
        let (row_range, column_range) =
            cells_near(self.rows, self.columns, azimuth, elevation, radius);
        for row in row_range {
            let cap = self.row_caps[row];
            if cap.radius > radius {
                continue;
            }
            for column in column_range.clone() {
                let column = column.rem_euclid(self.columns as i64) as usize;
                let middle = self.cell_middle(row, column);
                let inside = |plate: &Plate| cap_in_cone(&plate.sides, &middle, cap.sin_radius);
                let (bound, face) = if inside(&plates[0]) {
                    (plates[0].farthest_over(&middle, &cap), index)
                } else if plates.len() > 1 && inside(&plates[1]) {
                    (plates[1].farthest_over(&middle, &cap), index + 1)
                } else if outline.is_some_and(|sides| cap_in_cone(sides, &middle, cap.sin_radius)) {
                    let bound = plates
                        .iter()
                        .map(|plate| plate.farthest_over(&middle, &cap))
                        .fold(0.0, f64::max);
                    (bound, index | PAIR)
                } else {
                    continue;
                };
                // Rounded up, f32 included.
                let bound = (bound * (1.0 + ROUNDING)) as f32;
                let cell = row * self.columns + column;
                if bound < self.depth[cell] {
                    self.depth[cell] = bound;
                    self.face[cell] = face;
                }
            }
        }
    }

    /// The cell a direction falls in: row, column.
    fn cell_of(&self, direction: &Vector3<f64>) -> (usize, usize) {
        let (azimuth, elevation) = azimuth_elevation(direction);
        let row = ((FRAC_PI_2 - elevation) / PI * self.rows as f64).floor();
        let column = ((azimuth + PI) / TAU * self.columns as f64).floor();
        (
            row.clamp(0.0, self.rows as f64 - 1.0) as usize,
            column.clamp(0.0, self.columns as f64 - 1.0) as usize,
        )
    }

    /// The faces of which one certainly hides the point at `limit` (its distance less the
    /// depth bias) along the unit view-frame `direction`, if the map knows them: one face, or
    /// two that cover the cell together.
    pub fn blockers(&self, direction: &Vector3<f64>, limit: f64) -> Option<std::ops::Range<u32>> {
        let (row, column) = self.cell_of(direction);
        let cell = row * self.columns + column;
        if (self.depth[cell] as f64) >= limit * (1.0 - ROUNDING) {
            return None;
        }
        let face = self.face[cell];
        Some(if face & PAIR != 0 {
            face & !PAIR..(face & !PAIR) + 2
        } else {
            face..face + 1
        })
    }

    /// Whether every sight line within `radius` of the unit view-frame direction `centre`
    /// meets a face nearer than `limit`.
    pub fn covers_cap(&self, centre: &Vector3<f64>, radius: f64, limit: f64) -> bool {
        let limit = limit * (1.0 - ROUNDING);
        let (azimuth, elevation) = azimuth_elevation(centre);
        let (row_range, column_range) = cells_near(
            self.rows,
            self.columns,
            azimuth,
            elevation,
            radius + ANGLE_MARGIN,
        );
        row_range.into_iter().all(|row| {
            let cells = &self.depth[row * self.columns..(row + 1) * self.columns];
            column_range.clone().all(|column| {
                (cells[column.rem_euclid(self.columns as i64) as usize] as f64) < limit
            })
        })
    }

    /// Whether every direction of the great arc `curve` from `a` to `b` (its parameter is
    /// its angle) meets a face nearer than `limit`: checked in pieces about two cells long,
    /// each within half its length of its middle direction.
    pub fn covers_great_arc(&self, curve: &SphereCurve, a: f64, b: f64, limit: f64) -> bool {
        let pieces = ((b - a) / (2.0 * PI / self.rows as f64)).ceil().max(1.0);
        let length = (b - a) / pieces;
        (0..pieces as usize).all(|k| {
            curve
                .position(a + (k as f64 + 0.5) * length)
                .try_normalize(0.0)
                .is_some_and(|middle| self.covers_cap(&middle, 0.5 * length, limit))
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::{ItemId, Standpoint};
    use crate::visibility::ray_hits_triangle;
    use nalgebra::Point3;

    fn assert_near(a: f64, b: f64, eps: f64) {
        assert!((a - b).abs() <= eps, "{a} != {b} within {eps}");
    }

    fn face(corners: [[f64; 3]; 3]) -> Face {
        Face {
            corners: corners.map(|[x, y, z]| Point3::new(x, y, z)),
            item: ItemId(0),
            slack: 0.0,
        }
    }

    /// An upright rectangle `distance` m ahead, `half_width` m either side, from `bottom` to
    /// `top` m about eye height, as two triangles sharing its diagonal (as a modeller writes
    /// a quadrilateral).
    fn rectangle_ahead(distance: f64, half_width: f64, bottom: f64, top: f64) -> [Face; 2] {
        let (d, w) = (distance, half_width);
        [
            face([[-w, d, bottom], [w, d, bottom], [w, d, top]]),
            face([[-w, d, bottom], [w, d, top], [-w, d, top]]),
        ]
    }

    /// A large triangle 20 m to the left, facing the eye.
    fn triangle_to_the_left() -> Face {
        face([
            [-20.0, -20.0, -10.0],
            [-20.0, 20.0, -10.0],
            [-20.0, 0.0, 20.0],
        ])
    }

    /// The eye at the origin, looking north, level.
    fn level_view() -> ViewFrame {
        ViewFrame::new(&Standpoint::from_degrees("o", 0.0, 0.0, 0.0, 0.0, 0.0, 0.0))
    }

    /// The map of these faces from `level_view`, with `rows` rows.
    fn map_of(faces: &Faces, rows: usize) -> OcclusionMap {
        OcclusionMap::with_rows(faces, &Bvh::new(faces), &level_view(), rows)
    }

    /// Directions spread over a cell: its corners, the middles of its sides and an inner grid.
    fn cell_directions(map: &OcclusionMap, row: usize, column: usize) -> Vec<Vector3<f64>> {
        let (row_angle, column_angle) = (PI / map.rows as f64, TAU / map.columns as f64);
        let top = FRAC_PI_2 - row as f64 * row_angle;
        let left = -PI + column as f64 * column_angle;
        let mut out = Vec::new();
        for i in 0..=6 {
            for j in 0..=6 {
                out.push(direction_from_azimuth_elevation(
                    left + column_angle * j as f64 / 6.0,
                    top - row_angle * i as f64 / 6.0,
                ));
            }
        }
        out
    }

    /// Every direction of every covered cell meets the cell's face no farther than its depth.
    fn assert_cover_is_true(map: &OcclusionMap, faces: &Faces) -> usize {
        let mut covered = 0;
        for row in 0..map.rows {
            for column in 0..map.columns {
                let cell = row * map.columns + column;
                if map.depth[cell].is_infinite() {
                    continue;
                }
                covered += 1;
                let face = map.face[cell];
                let candidates = if face & PAIR != 0 {
                    vec![face & !PAIR, (face & !PAIR) + 1]
                } else {
                    vec![face]
                };
                for d in cell_directions(map, row, column) {
                    let hit = candidates.iter().find_map(|&f| {
                        ray_hits_triangle(&Point3::origin(), &d, &faces.get(f as usize).corners)
                    });
                    let hit =
                        hit.unwrap_or_else(|| panic!("cell {row},{column} not covered at {d:?}"));
                    assert!(
                        hit <= map.depth[cell] as f64,
                        "cell {row},{column}: {hit} beyond {}",
                        map.depth[cell]
                    );
                }
            }
        }
        covered
    }

    #[test]
    fn a_cell_is_inside_its_circumscribed_cap() {
        for (rows, row) in [
            (64, 0),
            (64, 31),
            (64, 63),
            (1024, 0),
            (1024, 1),
            (1024, 500),
        ] {
            let map = OcclusionMap::empty(rows, 2 * rows);
            let radius = map.row_caps[row].radius;
            let middle = map.cell_middle(row, 7);
            for d in cell_directions(&map, row, 7) {
                assert!(angle_between(&middle, &d) <= radius, "row {row} of {rows}");
            }
            // And the cap is not much larger than the cell: about half its diagonal.
            let (a, e) = (TAU / map.columns as f64, PI / map.rows as f64);
            let elevation = FRAC_PI_2 - (row as f64 + 0.5) * e;
            let diagonal = (e * e + (a * elevation.cos()).powi(2)).sqrt();
            assert!(
                radius < 0.75 * diagonal + a,
                "row {row}: {radius} for {diagonal}"
            );
        }
    }

    #[test]
    fn a_cell_covered_by_a_triangle_really_is() {
        // A wall 10 m ahead, 20 m wide, 2 m below to 6 m above the eye, as two triangles.
        let faces = Faces::from(rectangle_ahead(10.0, 10.0, -2.0, 6.0));
        let map = map_of(&faces, 64);
        let covered = assert_cover_is_true(&map, &faces);
        // The wall spans 90 degrees of azimuth and about 11 below to 31 above, at best
        // (straight ahead): a good part of it is covered, nothing beside it.
        assert!(covered > 100, "{covered}");
        assert!(map
            .blockers(&Vector3::new(0.0, 1.0, 0.1).normalize(), 10.5)
            .is_some());
        assert!(map
            .blockers(&Vector3::new(0.0, 1.0, 0.1).normalize(), 9.9)
            .is_none());
        assert!(map
            .blockers(&Vector3::new(0.0, -1.0, 0.1).normalize(), 1e9)
            .is_none());
        assert!(map
            .blockers(&Vector3::new(0.0, 1.0, 0.9).normalize(), 1e9)
            .is_none());
    }

    #[test]
    fn a_direction_falls_in_its_cell_counted_from_the_zenith_and_from_behind() {
        // Rows from the zenith down, columns from azimuth -180 degrees round to 180: the
        // image's own layout, so that a cell and the pixels it stands for agree.
        let map = OcclusionMap::empty(8, 16);
        // Written out here, not through the crate's own conversion: azimuth from ahead (+y)
        // towards the right (+x), elevation up (+z).
        let toward = |azimuth: f64, elevation: f64| {
            let (azimuth, elevation) = (azimuth.to_radians(), elevation.to_radians());
            Vector3::new(
                elevation.cos() * azimuth.sin(),
                elevation.cos() * azimuth.cos(),
                elevation.sin(),
            )
        };
        assert_eq!(map.cell_of(&toward(0.0, 89.0)), (0, 8));
        assert_eq!(map.cell_of(&toward(0.0, -89.0)), (7, 8));
        assert_eq!(map.cell_of(&toward(-179.0, 10.0)), (3, 0));
        assert_eq!(map.cell_of(&toward(179.0, -10.0)), (4, 15));
        assert_eq!(map.cell_of(&toward(-1.0, 30.0)), (2, 7));
        // The nadir and straight behind (x = +0: atan2 gives azimuth +180) lie on the far
        // borders: the last row, the last column.
        assert_eq!(map.cell_of(&Vector3::new(0.0, 0.0, -1.0)), (7, 8));
        assert_eq!(map.cell_of(&Vector3::new(0.0, -1.0, 0.0)), (4, 15));
        for row in 0..8 {
            for column in 0..16 {
                let middle = map.cell_middle(row, column);
                assert_eq!(map.cell_of(&middle), (row, column));
            }
        }
    }

    #[test]
    fn the_blockers_are_the_face_in_that_direction_and_only_beyond_its_bound() {
        // One triangle 10 m ahead (face 0), one 20 m to the left (face 1): apart, so each
        // covers cells alone.
        let faces = Faces::from([
            face([[-10.0, 10.0, -5.0], [10.0, 10.0, -5.0], [0.0, 10.0, 10.0]]),
            triangle_to_the_left(),
        ]);
        let map = map_of(&faces, 64);
        let (ahead, left) = (Vector3::y(), -Vector3::x());
        assert_eq!(map.blockers(&ahead, 11.0), Some(0..1));
        assert_eq!(map.blockers(&left, 21.0), Some(1..2));
        assert_eq!(map.blockers(&left, 19.0), None);
        assert_eq!(map.blockers(&Vector3::x(), 1e9), None);
        // The depth kept is already rounded up; a point at that depth is still not
        // certainly hidden, one a few roundings beyond it is.
        let (row, column) = map.cell_of(&ahead);
        let depth = map.depth[row * map.columns + column] as f64;
        assert_eq!(map.blockers(&ahead, depth), None);
        assert_eq!(
            map.blockers(&ahead, depth * (1.0 + 3.0 * ROUNDING)),
            Some(0..1)
        );
    }

    #[test]
    fn a_cell_covered_by_two_faces_together_names_both() {
        // A lone triangle to the left (face 0), then a 2 m square 5 m ahead split along its
        // diagonal (faces 1 and 2).
        let [lower, upper] = rectangle_ahead(5.0, 1.0, -1.0, 1.0);
        let faces = Faces::from([triangle_to_the_left(), lower, upper]);
        let map = map_of(&faces, 64);
        // A cell the diagonal runs through (azimuth and elevation 0 to 2.8 degrees) is
        // covered by neither triangle alone; one up and to the left of it, by face 2 alone.
        let on_diagonal = Vector3::new(0.02, 1.0, 0.02).normalize();
        assert_eq!(map.blockers(&on_diagonal, 6.0), Some(1..3));
        let above_diagonal = Vector3::new(-0.1, 1.0, 0.1).normalize();
        assert_eq!(map.blockers(&above_diagonal, 6.0), Some(2..3));
    }

    #[test]
    fn a_cap_is_covered_only_by_every_cell_it_touches_and_only_beyond_their_bounds() {
        let faces = Faces::from(rectangle_ahead(10.0, 10.0, -2.0, 6.0));
        let map = map_of(&faces, 64);
        let (row_angle, column_angle) = (PI / 64.0, TAU / 128.0);
        // Straight ahead (the middle of column 64), the highest row covered lies under one
        // that is not (the wall's top edge runs through it).
        let column = 64;
        let azimuth = 0.5 * column_angle;
        let depth = |row: usize| map.depth[row * map.columns + column] as f64;
        let top = (0..64).find(|&row| depth(row).is_finite()).unwrap();
        assert!(top > 0 && depth(top + 2).is_finite());
        // A cap reaching up to the border between them touches the row above: not covered;
        // one a micro-radian lower is.
        let border = FRAC_PI_2 - top as f64 * row_angle;
        let radius = 0.3 * row_angle;
        let centre = |elevation| direction_from_azimuth_elevation(azimuth, elevation);
        assert!(!map.covers_cap(&centre(border - radius), radius, 1e9));
        assert!(map.covers_cap(&centre(border - radius - 1e-6), radius, 1e9));
        // Within one cell: a point at the depth kept (already rounded up) is not certainly
        // hidden, one a few roundings beyond it is.
        let middle = map.cell_middle(top + 2, column);
        assert!(!map.covers_cap(&middle, 1e-6, depth(top + 2)));
        assert!(map.covers_cap(&middle, 1e-6, depth(top + 2) * (1.0 + 3.0 * ROUNDING)));
    }

    #[test]
    fn a_long_arc_behind_a_low_wall_is_covered_piece_by_piece() {
        // A wall 10 m ahead, 20 m wide and 4 m high round eye height: at least 8 degrees
        // above and below the horizon from azimuth -45 to 45. The horizon from -30 to 30
        // lies behind it, 20 m away; the sight lines 12 degrees up do not.
        let faces = Faces::from(rectangle_ahead(10.0, 10.0, -2.0, 2.0));
        let map = map_of(&faces, 128);
        let toward = |azimuth: f64, elevation: f64| {
            direction_from_azimuth_elevation(azimuth.to_radians(), elevation.to_radians())
        };
        let horizon = SphereCurve::great_arc(&toward(-30.0, 0.0), &toward(30.0, 0.0)).unwrap();
        // Checked in pieces about two cells long: a cap round the whole arc would reach 30
        // degrees up, over the wall.
        assert!(map.covers_great_arc(&horizon, horizon.t0, horizon.t1, 20.0));
        assert!(map.covers_great_arc(&horizon, 0.3, 0.6, 20.0));
        assert!(!map.covers_great_arc(&horizon, horizon.t0, horizon.t1, 9.0));
        let high = SphereCurve::great_arc(&toward(-5.0, 12.0), &toward(5.0, 12.0)).unwrap();
        assert!(!map.covers_great_arc(&high, high.t0, high.t1, 20.0));
    }

    #[test]
    fn the_depth_bound_is_tight_straight_ahead() {
        // Straight ahead the plane bound is about the wall's distance, well under the
        // farthest corner's (15 m).
        let faces = Faces::from([face([
            [-10.0, 10.0, -5.0],
            [10.0, 10.0, -5.0],
            [0.0, 10.0, 10.0],
        ])]);
        let map = map_of(&faces, 256);
        let (row, column) = map.cell_of(&Vector3::new(0.0, 1.0, 0.0));
        let depth = map.depth[row * map.columns + column] as f64;
        assert!((10.0..10.1).contains(&depth), "{depth}");
    }

    #[test]
    fn a_triangle_across_the_seam_covers_both_sides() {
        // Behind the eye (azimuth 180, the seam), a wall from azimuth 135 to -135.
        let faces = Faces::from([
            face([
                [10.0, -10.0, -3.0],
                [-10.0, -10.0, -3.0],
                [-10.0, -10.0, 3.0],
            ]),
            face([[10.0, -10.0, -3.0], [-10.0, -10.0, 3.0], [10.0, -10.0, 3.0]]),
        ]);
        let map = map_of(&faces, 64);
        assert_cover_is_true(&map, &faces);
        let equator = map.rows / 2;
        let row = &map.depth[equator * map.columns..(equator + 1) * map.columns];
        assert!(row[0].is_finite() && row[map.columns - 1].is_finite());
        assert!(row[1].is_finite() && row[map.columns - 2].is_finite());
        assert!(row[map.columns / 2].is_infinite());
        // A short arc across the seam, at 20 m, is hidden; the same arc ahead is not.
        assert!(map.covers_cap(&Vector3::new(0.0, -1.0, 0.0), 0.05, 20.0));
        assert!(!map.covers_cap(&Vector3::new(0.0, 1.0, 0.0), 0.05, 20.0));
        // Nor is a point in front of the wall.
        assert!(!map.covers_cap(&Vector3::new(0.0, -1.0, 0.0), 0.05, 9.0));
    }

    #[test]
    fn a_ceiling_covers_the_zenith_all_round() {
        // A ceiling 3 m above the eye, 40 m across, as two triangles.
        let faces = Faces::from([
            face([[-20.0, -20.0, 3.0], [20.0, -20.0, 3.0], [20.0, 20.0, 3.0]]),
            face([[-20.0, -20.0, 3.0], [20.0, 20.0, 3.0], [-20.0, 20.0, 3.0]]),
        ]);
        let map = map_of(&faces, 64);
        assert_cover_is_true(&map, &faces);
        // The top row's tiny cells, in every column.
        assert!(map.depth[..map.columns].iter().all(|d| d.is_finite()));
        assert!(map.covers_cap(&Vector3::new(0.0, 0.0, 1.0), 0.2, 3.5));
        // Down to 61 degrees of elevation, where the ceiling is 3.4 m away.
        assert!(map.covers_cap(&Vector3::new(0.3, 0.0, 1.0).normalize(), 0.2, 3.6));
        assert!(!map.covers_cap(&Vector3::new(0.0, 0.0, 1.0), 0.2, 2.9));
    }

    #[test]
    fn faces_seen_edge_on_or_with_slack_cover_nothing() {
        let mut curved = face([[-10.0, 10.0, -2.0], [10.0, 10.0, -2.0], [0.0, 10.0, 6.0]]);
        curved.slack = 0.01;
        let edge_on = face([[-10.0, 10.0, 0.0], [10.0, 10.0, 0.0], [0.0, 20.0, 0.0]]);
        let map = map_of(&Faces::from([curved, edge_on]), 64);
        assert!(map.depth.iter().all(|d| d.is_infinite()));
    }

    #[test]
    fn caps_reach_the_columns_round_the_seam_and_the_poles() {
        // Ahead on the horizon, 0.1 rad: a few columns either side of the middle.
        let (rows, columns) = cells_near(64, 128, 0.0, 0.0, 0.1);
        assert_eq!(rows, 29..35);
        assert!(columns.start < 64 && columns.end > 64 && columns.end - columns.start < 8);
        // At the seam: columns before 0 (they wrap to the last ones).
        let (_, columns) = cells_near(64, 128, PI - 0.01, 0.0, 0.1);
        assert!(columns.end > 128);
        let (_, columns) = cells_near(64, 128, -PI + 0.01, 0.0, 0.1);
        assert!(columns.start < 0);
        // Reaching the zenith: every column of the top rows.
        let (rows, columns) = cells_near(64, 128, 1.0, FRAC_PI_2 - 0.05, 0.1);
        assert_eq!((rows.start, columns), (0, 0..128));
        // Near but short of it: wider in azimuth than at the horizon.
        let (_, columns) = cells_near(64, 128, 1.0, 1.2, 0.1);
        assert!(columns.end - columns.start > 8);
    }

    #[test]
    fn a_face_whose_plane_passes_within_a_millionth_of_its_distance_is_edge_on() {
        // A level triangle about 100 m ahead (its farthest corner 100.5 m off), its plane h
        // above the eye: seen edge-on, and left out of the map, when h is within a
        // millionth of that distance (0.1 mm); a plate when it is twice that.
        let at = |h: f64| {
            [
                Vector3::new(-10.0, 100.0, h),
                Vector3::new(10.0, 100.0, h),
                Vector3::new(0.0, 90.0, h),
            ]
        };
        assert!(Plate::of(&at(5e-5)).is_none());
        assert!(Plate::of(&at(-5e-5)).is_none());
        let plate = Plate::of(&at(2e-4)).unwrap();
        assert!((plate.h - 2e-4).abs() < 1e-12 && plate.normal.z == 1.0);
        let below = Plate::of(&at(-2e-4)).unwrap();
        assert!((below.h - 2e-4).abs() < 1e-12 && below.normal.z == -1.0);
    }

    #[test]
    fn a_cap_touching_a_side_of_a_cone_is_not_inside_it() {
        // The cone of directions right of the plane x = 0 (inward normal +x); a cap of
        // radius 0.25 rad whose centre is 0.25 rad right of that plane touches it: rounding
        // may put the true cap a hair over, so it does not count as inside. A little
        // further right (a microradian), it does.
        let sides = [Vector3::x()];
        let sin_radius = 0.25f64.sin();
        let touching = Vector3::new(sin_radius, (1.0 - sin_radius * sin_radius).sqrt(), 0.0);
        assert!(!cap_in_cone(&sides, &touching, sin_radius));
        let further = 0.25f64 + 1e-6;
        let clear = Vector3::new(further.sin(), further.cos(), 0.0);
        assert!(cap_in_cone(&sides, &clear, sin_radius));
    }

    #[test]
    fn a_cap_whose_side_lies_on_a_column_border_takes_the_column_beyond() {
        // On the horizon the tangent meridians lie the radius either side of the middle:
        // a cap of radius pi / 32 (two columns of 128) round straight ahead has its sides
        // exactly on the borders between columns 61 and 62 and between 65 and 66. Rounding
        // may put the true cap a hair over either, so 61 and 66 are named too: the margin
        // widens the reach, never narrows it.
        let (_, columns) = cells_near(64, 128, 0.0, 0.0, PI / 32.0);
        assert_eq!(columns, 61..67);
    }

    #[test]
    fn the_nearest_point_of_a_segment() {
        let a = Vector3::new(-3.0, 4.0, 0.0);
        let b = Vector3::new(3.0, 4.0, 0.0);
        assert_near(segment_distance(&a, &b), 4.0, 1e-12);
        assert_near(
            segment_distance(&a, &Vector3::new(-3.0, 8.0, 0.0)),
            5.0,
            1e-12,
        );
        assert_near(segment_distance(&a, &a), 5.0, 1e-12);
        // Against brute force along the segment.
        let c = Vector3::new(1.0, 2.0, -0.5);
        let brute = (0..=10_000)
            .map(|i| (a + (c - a) * (i as f64 / 10_000.0)).norm())
            .fold(f64::INFINITY, f64::min);
        assert_near(segment_distance(&a, &c), brute, 1e-6);
    }

    #[test]
    fn the_plane_bound_holds_over_the_cap() {
        let normal = Vector3::new(0.2, 1.0, -0.1).normalize();
        let h = 7.0;
        let centre = Vector3::new(0.3, 1.0, 0.2).normalize();
        let radius: f64 = 0.05;
        let bound = farthest_on_plane(&normal, h, &centre, radius.sin(), radius.cos());
        // Directions on the cap's rim and inside it.
        let across = centre.cross(&Vector3::z()).normalize();
        let up = across.cross(&centre);
        let mut largest: f64 = 0.0;
        for k in 0..360 {
            for fraction in [0.5, 1.0] {
                let (s, c) = (k as f64).to_radians().sin_cos();
                let angle = radius * fraction;
                let d = centre * angle.cos() + (across * c + up * s) * angle.sin();
                largest = largest.max(h / normal.dot(&d));
            }
        }
        assert!(
            largest <= bound && bound < largest * 1.001,
            "{largest} {bound}"
        );
    }

    /// Houses of four walls and a roof as loose triangles (no two share a side), on a grid
    /// round the eye, with a fixed rule for their sizes.
    fn loose_houses() -> Faces {
        let mut faces = Faces::new();
        for i in -6..=6 {
            for j in -6..=6 {
                if i == 0 && j == 0 {
                    continue;
                }
                let (x, y) = (14.0 * i as f64, 14.0 * j as f64);
                let (w, h) = (
                    3.0 + ((i * 7 + j * 3) as f64).sin().abs() * 2.0,
                    4.0 + (j as f64).cos().abs() * 6.0,
                );
                let c = |dx: f64, dy: f64, z: f64| [x + dx, y + dy, z];
                for (a, b) in [
                    ((-w, -w), (w, -w)),
                    ((w, -w), (w, w)),
                    ((w, w), (-w, w)),
                    ((-w, w), (-w, -w)),
                ] {
                    // Each wall as two triangles a hair apart: they share no side.
                    faces.push(face([c(a.0, a.1, 0.0), c(b.0, b.1, 0.0), c(b.0, b.1, h)]));
                    faces.push(face([
                        c(a.0, a.1, -0.001),
                        c(b.0, b.1, h + 0.001),
                        c(a.0, a.1, h + 0.001),
                    ]));
                }
                faces.push(face([c(-w, -w, h), c(w, -w, h), c(0.0, 0.0, h + 3.0)]));
            }
        }
        faces
    }

    /// The loose houses, their hierarchy, and a view from between them at eye height.
    fn among_the_houses() -> (Faces, Bvh, ViewFrame) {
        let faces = loose_houses();
        let bvh = Bvh::new(&faces);
        let view = ViewFrame::new(&Standpoint::from_degrees(
            "o", 3.0, 4.0, 1.6, 20.0, 0.0, 0.0,
        ));
        (faces, bvh, view)
    }

    #[test]
    fn passing_over_hidden_boxes_changes_nothing() {
        // The map filled through the hierarchy (skipping boxes already hidden) against every
        // face entered one by one.
        let (faces, bvh, view) = among_the_houses();
        let culled = OcclusionMap::with_rows(&faces, &bvh, &view, 128);
        let mut every = OcclusionMap::empty(128, 256);
        for index in 0..faces.len() as u32 {
            every.enter(&faces, index, &view);
        }
        assert!(culled.depth == every.depth && culled.face == every.face);
        let covered = culled.depth.iter().filter(|d| d.is_finite()).count();
        assert!(covered > culled.depth.len() / 10, "{covered}");
    }

    #[test]
    fn from_among_the_houses_the_hidden_ones_are_passed_over() {
        // Some of the houses behind the nearest ones round the eye lie in boxes the map
        // already hides, and are never entered (here 470 of the 1,512 faces; at least a
        // quarter must be passed over).
        let (faces, bvh, view) = among_the_houses();
        let entered = OcclusionMap::empty(128, 256).fill(&faces, &bvh, 0, &view);
        assert!(
            4 * entered < 3 * faces.len(),
            "{entered} of {}",
            faces.len()
        );
    }

    #[test]
    fn a_box_close_before_the_cover_is_not_hidden_but_one_behind_is() {
        // A wall 10 m north of the eye, 60 m long, and two boxes half a metre across seen
        // through it, 2 m to the east: one 0.2 m before it (the wall covers every sight line
        // to it, but only beyond it) and one 0.5 m behind. Only the second is hidden.
        let wall = Faces::from([
            face([[-30.0, 10.0, -5.0], [30.0, 10.0, -5.0], [30.0, 10.0, 10.0]]),
            face([[-30.0, 10.0, -5.0], [30.0, 10.0, 10.0], [-30.0, 10.0, 10.0]]),
        ]);
        let view = ViewFrame::new(&Standpoint::from_degrees("o", 0.0, 0.0, 1.6, 0.0, 0.0, 0.0));
        let mut map = OcclusionMap::empty(512, 1024);
        map.enter(&wall, 0, &view);
        let hidden = |y: f64| {
            let (lo, hi) = (Point3::new(2.0, y - 0.5, 1.35), Point3::new(2.5, y, 1.85));
            map.hides_box(&lo, &hi, &view.eye(), &view)
        };
        assert!(!hidden(9.8));
        assert!(hidden(11.0));
    }

    #[test]
    fn a_map_filled_on_two_cores_is_the_one_filled_face_by_face() {
        // Four walls 10 m round the eye (north, south, east, west; 20 m long, 2 m below to
        // 3 m above it, each two triangles) and 224 x 224 small triangles 30 m below, spread
        // evenly either side of the eye: 50,184 faces, enough for the two halves of the
        // hierarchy to be filled on cores of their own where there are two. The halves
        // part the site down the middle, so each holds a wall the other does not, and the
        // merged map must be the one every face entered in turn makes, depths and faces.
        // Its size: floor(sqrt(50,184)) = 224 rounds up to 256 rows, and twice the columns.
        let wall = |along: [f64; 2], across: [f64; 2]| {
            // Corners at `across` +- 10 `along`, from z = -2 to 3.
            let at = |s: f64, z: f64| [across[0] + s * along[0], across[1] + s * along[1], z];
            [
                face([at(-10.0, -2.0), at(10.0, -2.0), at(10.0, 3.0)]),
                face([at(-10.0, -2.0), at(10.0, 3.0), at(-10.0, 3.0)]),
            ]
        };
        let mut faces = Faces::new();
        for (along, across) in [
            ([1.0, 0.0], [0.0, 10.0]),
            ([1.0, 0.0], [0.0, -10.0]),
            ([0.0, 1.0], [10.0, 0.0]),
            ([0.0, 1.0], [-10.0, 0.0]),
        ] {
            faces.extend(wall(along, across));
        }
        for i in 0..224 {
            for j in 0..224 {
                let (x, y) = (
                    -200.0 + (i as f64 + 0.5) * 400.0 / 224.0,
                    -200.0 + (j as f64 + 0.5) * 400.0 / 224.0,
                );
                faces.push(face([
                    [x, y, -30.0],
                    [x + 0.5, y, -30.0],
                    [x, y + 0.5, -30.0],
                ]));
            }
        }
        assert!(faces.len() >= FACES_FOR_THREADS);
        let view = level_view();
        let map = OcclusionMap::new(&faces, &Bvh::new(&faces), &view);
        assert_eq!(map.size(), (256, 512));
        let mut every = OcclusionMap::empty(256, 512);
        for index in 0..faces.len() as u32 {
            every.enter(&faces, index, &view);
        }
        assert!(map.depth == every.depth && map.face == every.face);
        // Each wall covers the cell straight towards it, at a little over 10 m.
        for direction in [Vector3::y(), -Vector3::y(), Vector3::x(), -Vector3::x()] {
            let (row, column) = map.cell_of(&direction);
            let depth = map.depth[row * map.columns + column] as f64;
            assert!((10.0..10.1).contains(&depth), "{direction:?}: {depth}");
        }
    }

    #[test]
    fn an_arc_declared_hidden_really_lies_behind() {
        // Random short arcs at random distances; wherever the map says hidden, every point
        // of the arc has a face nearer than the limit along its sight line (brute force).
        let (faces, bvh, view) = among_the_houses();
        let map = OcclusionMap::with_rows(&faces, &bvh, &view, 128);
        let (mut hidden, mut state) = (0, 0x2545_f491_4f6c_dd1du64);
        let mut next = || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            (state >> 11) as f64 / (1u64 << 53) as f64
        };
        for _ in 0..3000 {
            let a = direction_from_azimuth_elevation(TAU * next() - PI, 0.6 * next() - 0.2);
            let b = direction_from_azimuth_elevation(TAU * next() - PI, 0.6 * next() - 0.2);
            let b = (a + (b - a) * 0.05 * next()).normalize();
            let Some(arc) = SphereCurve::great_arc(&a, &b) else {
                continue;
            };
            let limit = 10.0 + 80.0 * next();
            if !map.covers_great_arc(&arc, arc.t0, arc.t1, limit) {
                continue;
            }
            hidden += 1;
            for k in 0..=20 {
                let d = view
                    .direction_to_site(&arc.position(arc.t0 + (arc.t1 - arc.t0) * k as f64 / 20.0));
                let behind = faces.iter().any(|f| {
                    ray_hits_triangle(&view.eye(), &d, &f.corners).is_some_and(|t| t < limit)
                });
                assert!(behind, "an arc declared hidden is seen at {d:?}");
            }
        }
        assert!(hidden > 100, "{hidden}");
    }

    #[test]
    fn two_triangles_of_a_convex_quadrilateral_cover_together() {
        let square = rectangle_ahead(5.0, 1.0, -1.0, 1.0);
        assert!(share_side(&square[0], &square[1]));
        let view = |f: &Face| f.corners.map(|p| p.coords);
        let sides = quad_sides(
            &square[0].corners,
            &square[1].corners,
            &view(&square[0]),
            &view(&square[1]),
        );
        let sides = sides.expect("a square is convex");
        // Its middle is inside, a point beyond its side is not.
        assert!(cap_in_cone(&sides, &Vector3::new(0.0, 1.0, 0.0), 0.1));
        assert!(!cap_in_cone(
            &sides,
            &Vector3::new(0.3, 1.0, 0.0).normalize(),
            0.0
        ));
        // An arrowhead (the fourth corner pulled inside) is not convex.
        let arrow = [
            square[0],
            face([[-1.0, 5.0, -1.0], [1.0, 5.0, 1.0], [0.5, 5.0, -0.5]]),
        ];
        assert!(quad_sides(
            &arrow[0].corners,
            &arrow[1].corners,
            &view(&arrow[0]),
            &view(&arrow[1])
        )
        .is_none());
        // Triangles sharing one corner only are no pair.
        let apart = face([[1.0, 5.0, 1.0], [3.0, 5.0, 1.0], [3.0, 5.0, 3.0]]);
        assert!(!share_side(&square[0], &apart));
    }
}
