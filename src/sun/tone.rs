//! The parts of the site in shade that the eye sees, as flat polygons, for a filled tone.
//!
//! On each receiving plane (each face, and the ground plane z = 0 where the scene has no
//! sloping ground, whose triangles are faces) the shade is the union of the shadows of the
//! other faces, each face carried along the sun's rays onto the plane (the part of it in
//! front of the plane, towards the sun) and cut to the receiver: convex polygons, since a
//! parallel projection keeps a triangle's convexity. A receiver whose seen side is turned
//! from the sun is in shade whole. What the eye cannot see is then taken away: every face
//! between the eye and the plane is carried from the eye (a central projection, again
//! convex for the part of the face strictly between them) onto the plane, and subtracted
//! from each polygon, one side of the hiding polygon at a time (the part of a convex polygon
//! outside a convex one is at most one convex piece per side). The polygons left are the
//! seen shade, exactly, on plane faces; they overlap where shadows overlap, and are filled
//! as their union.
//!
//! The work grows with the square of the faces (the pairs are culled by their extents
//! across the sun's rays, by cones from the eye round each face, and on the plane).

use super::boxes::{Bounds, BoxGrid};
use super::cones::{Cone, ConeGrid};
use super::position::across_rays;
use crate::cores;
use crate::scene::{Face, Site};
use nalgebra::{Point3, Vector2, Vector3};

/// A receiving plane nearly edge-on to the sun or the eye (|n . s| below this, or the eye
/// this close to it in metres) shows no shade.
const EDGE_ON: f64 = 1e-9;
/// Pieces smaller than this (square metres) are dropped.
const LEAST_AREA_M2: f64 = 1e-10;

/// A convex polygon in a receiver's plane coordinates.
type Polygon = Vec<Vector2<f64>>;

/// A plane with coordinates: `origin + e1 x + e2 y`, unit normal `n`.
struct PlaneFrame {
    origin: Point3<f64>,
    e1: Vector3<f64>,
    e2: Vector3<f64>,
    n: Vector3<f64>,
}

impl PlaneFrame {
    fn to_plane(&self, p: &Point3<f64>) -> Vector2<f64> {
        let d = p - self.origin;
        Vector2::new(d.dot(&self.e1), d.dot(&self.e2))
    }

    fn to_site(&self, q: &Vector2<f64>) -> Point3<f64> {
        self.origin + self.e1 * q.x + self.e2 * q.y
    }

    /// Signed height of `p` above the plane.
    fn height(&self, p: &Point3<f64>) -> f64 {
        self.n.dot(&(p - self.origin))
    }
}

/// The seen parts of everything in shade at a sun in the unit direction `towards_sun`,
/// from `eye`: flat convex polygons in the site frame, corners in order.
pub fn seen_shade(
    site: &Site,
    towards_sun: &Vector3<f64>,
    eye: &Point3<f64>,
) -> Vec<Vec<Point3<f64>>> {
    let s = towards_sun.normalize();
    if s.z <= 0.0 {
        return Vec::new();
    }
    // Extents across the sun's rays, to cull pairs of faces.
    let (u, v) = across_rays(&s);
    let across = |corners: &[Point3<f64>; 3]| {
        let us = corners.map(|c| u.dot(&c.coords));
        let vs = corners.map(|c| v.dot(&c.coords));
        let range = |x: [f64; 3]| (x[0].min(x[1]).min(x[2]), x[0].max(x[1]).max(x[2]));
        (range(us), range(vs))
    };
    let extents: Vec<_> = site.faces.iter().map(|f| across(&f.corners)).collect();
    let overlaps = |a: &((f64, f64), (f64, f64)), b: &((f64, f64), (f64, f64))| {
        a.0 .0 <= b.0 .1 && b.0 .0 <= a.0 .1 && a.1 .0 <= b.1 .1 && b.1 .0 <= a.1 .1
    };
    // The faces whose extents may overlap a receiver's, through a grid of the extents
    // (ascending, so the shadows come in the faces' order as when every face was tried).
    let extent_grid = BoxGrid::new(
        &extents
            .iter()
            .map(|&((u0, u1), (v0, v1))| (Vector2::new(u0, v0), Vector2::new(u1, v1)))
            .collect::<Vec<Bounds>>(),
    );
    // Cones from the eye round each face's bounding sphere, to cull the faces that cannot
    // stand in front of a receiver; a grid of them over the sphere of directions names
    // the few a receiver's cone may overlap (ascending, so the hiders come in the faces'
    // order as when every face was tried).
    let cones: Vec<Cone> = site.faces.iter().map(|f| Cone::round(&f, eye)).collect();
    let cone_grid = ConeGrid::new(&cones);
    let mut receivers: Vec<(Option<usize>, PlaneFrame)> = Vec::new();
    if site.ground.is_none() {
        receivers.push((
            None,
            PlaneFrame {
                origin: Point3::origin(),
                e1: Vector3::x(),
                e2: Vector3::y(),
                n: Vector3::z(),
            },
        ));
    }
    for (i, face) in site.faces.iter().enumerate() {
        let [a, b, c] = face.corners;
        let (Some(n), Some(e1)) = (
            (b - a).cross(&(c - a)).try_normalize(1e-12),
            (b - a).try_normalize(1e-12),
        ) else {
            continue;
        };
        receivers.push((
            Some(i),
            PlaneFrame {
                origin: a,
                e1,
                e2: n.cross(&e1),
                n,
            },
        ));
    }
    // Each receiving plane's shade and what may hide it, the planes shared out among the
    // cores.
    let shade_on = |index: Option<usize>, plane: &PlaneFrame| -> Option<(Vec<Polygon>, Hiders)> {
        let (ns, eye_height) = (plane.n.dot(&s), plane.height(eye));
        if ns.abs() < EDGE_ON || eye_height.abs() < EDGE_ON {
            return None;
        }
        let outline: Option<Polygon> = index.map(|i| {
            let mut t: Polygon = site
                .faces
                .get(i)
                .corners
                .iter()
                .map(|c| plane.to_plane(c))
                .collect();
            if area(&t) < 0.0 {
                t.reverse();
            }
            t
        });
        let mut shade: Vec<Polygon> = Vec::new();
        if (ns > 0.0) != (eye_height > 0.0) {
            // The seen side is turned from the sun.
            match &outline {
                Some(t) => shade.push(t.clone()),
                None => return None,
            }
        } else {
            let mut casters = Vec::new();
            match (index, &extent_grid) {
                (Some(i), Some(grid)) => {
                    let ((u0, u1), (v0, v1)) = extents[i];
                    grid.overlapping(&(Vector2::new(u0, v0), Vector2::new(u1, v1)), &mut casters);
                }
                _ => casters = (0..site.faces.len() as u32).collect(),
            }
            for &j in &casters {
                let j = j as usize;
                if Some(j) == index || index.is_some_and(|i| !overlaps(&extents[i], &extents[j])) {
                    continue;
                }
                let face = site.faces.get(j);
                if let Some(piece) = carried_by_sun(&face, plane, &s, ns, outline.as_ref()) {
                    shade.push(piece);
                }
            }
        }
        if shade.is_empty() {
            return None;
        }
        // The faces that may stand in front of the receiver: every face for the ground,
        // else those the grid of cones names whose cone passes the test.
        let mut candidates = Vec::new();
        match index {
            Some(i) => {
                cone_grid.near(&cones[i], &mut candidates);
                candidates.retain(|&j| j as usize != i && cones[j as usize].may_hide(&cones[i]));
            }
            None => candidates = (0..site.faces.len() as u32).collect(),
        }
        // A face wholly outside the pyramid of sight through the shade's box hides none
        // of it: it is passed over before it is carried onto the plane.
        let all = shade
            .iter()
            .map(|p| bounds(p))
            .reduce(|a, b| (a.0.inf(&b.0), a.1.sup(&b.1)));
        let pyramid = all.and_then(|b| Pyramid::through(plane, eye, &b));
        let hiders: Vec<Polygon> = candidates
            .iter()
            .map(|&j| site.faces.get(j as usize))
            .filter(|face| pyramid.as_ref().is_none_or(|p| !p.leaves_out(face)))
            .filter_map(|face| carried_from_eye(&face, plane, eye, eye_height))
            .collect();
        Some((shade, Hiders::new(hiders)))
    };
    let shaded: Vec<_> = cores::in_order(receivers.len(), |k| {
        shade_on(receivers[k].0, &receivers[k].1)
    });
    // What the hiders leave of each piece of shade, every piece on its own (one plane,
    // the ground, may hold thousands), the pieces shared out among the cores and put
    // back in the planes' and the pieces' order.
    let pieces: Vec<(&PlaneFrame, &Hiders, &Polygon)> = receivers
        .iter()
        .zip(&shaded)
        .filter_map(|((_, plane), shaded)| shaded.as_ref().map(|(shade, h)| (plane, h, shade)))
        .flat_map(|(plane, hiders, shade)| shade.iter().map(move |piece| (plane, hiders, piece)))
        .collect();
    cores::in_order(pieces.len(), |k| {
        let (plane, hiders, piece) = pieces[k];
        let mut left = Vec::new();
        hiders.take_from(piece.clone(), &mut left);
        left.iter()
            .map(|piece| piece.iter().map(|q| plane.to_site(q)).collect::<Vec<_>>())
            .collect::<Vec<_>>()
    })
    .into_iter()
    .flatten()
    .collect()
}

/// The pyramid of sight from the eye through a box of a receiving plane: its four sides,
/// each as a unit normal pointing in and the eye (on every side).
struct Pyramid {
    eye: Point3<f64>,
    inward: [Vector3<f64>; 4],
}

/// How far (relative to the size of the coordinates) a face's corners must all lie
/// outside a side of the pyramid of sight for the face to be passed over: far more than
/// rounding, so that its image on the plane lies clearly outside the box (an image moves
/// away from the side's line at least as far as the point lies from the side).
const PYRAMID_MARGIN: f64 = 1e-9;

impl Pyramid {
    /// The pyramid from `eye` through the box `(lo, hi)` (plane coordinates) of `plane`;
    /// `None` for a box without width or height.
    fn through(plane: &PlaneFrame, eye: &Point3<f64>, (lo, hi): &Bounds) -> Option<Pyramid> {
        let corners = [
            Vector2::new(lo.x, lo.y),
            Vector2::new(hi.x, lo.y),
            Vector2::new(hi.x, hi.y),
            Vector2::new(lo.x, hi.y),
        ]
        .map(|q| plane.to_site(&q) - eye);
        let middle = plane.to_site(&((lo + hi) / 2.0)) - eye;
        let mut inward = [Vector3::zeros(); 4];
        for k in 0..4 {
            let n = corners[k]
                .cross(&corners[(k + 1) % 4])
                .try_normalize(1e-300)?;
            inward[k] = if n.dot(&middle) < 0.0 { -n } else { n };
            if !inward[k].iter().all(|v| v.is_finite()) {
                return None;
            }
        }
        Some(Pyramid { eye: *eye, inward })
    }

    /// Whether every corner of `face` lies outside one side, by more than the margin.
    fn leaves_out(&self, face: &Face) -> bool {
        let margin = PYRAMID_MARGIN * (size_scale(face) + self.eye.coords.abs().max());
        self.inward.iter().any(|n| {
            face.corners
                .iter()
                .all(|c| n.dot(&(c - self.eye)) < -margin)
        })
    }
}

/// The convex polygons that may hide a receiving plane, in their order, with their boxes
/// in a grid.
struct Hiders {
    polygons: Vec<Polygon>,
    boxes: Vec<Bounds>,
    grid: Option<BoxGrid>,
}

impl Hiders {
    fn new(polygons: Vec<Polygon>) -> Hiders {
        let boxes: Vec<Bounds> = polygons.iter().map(|h| bounds(h)).collect();
        let grid = BoxGrid::new(&boxes);
        Hiders {
            polygons,
            boxes,
            grid,
        }
    }

    /// What is left of the convex polygon `piece` once every hider is taken away from it,
    /// in the hiders' order, added to `out`. The piece meets only the hiders whose boxes
    /// overlap its own (found through the grid), and each piece a difference leaves goes
    /// on with the hiders after the one that made it: the same pieces as taking every
    /// hider from every piece in turn, without trying the pairs that cannot meet. A hider
    /// that leaves a piece whole leaves its box and area as they were.
    fn take_from(&self, piece: Polygon, out: &mut Vec<Polygon>) {
        if self.polygons.is_empty() {
            out.push(piece);
            return;
        }
        let apart = |a: &Bounds, b: &Bounds| {
            a.1.x < b.0.x || a.0.x > b.1.x || a.1.y < b.0.y || a.0.y > b.1.y
        };
        let mut near = Vec::new();
        match &self.grid {
            Some(grid) => grid.overlapping(&bounds(&piece), &mut near),
            // Boxes beyond any grid (not finite): every hider is tried.
            None => near = (0..self.polygons.len() as u32).collect(),
        }
        let mut stack = vec![(piece, 0usize)];
        while let Some((mut piece, mut next)) = stack.pop() {
            let own = bounds(&piece);
            let own_area = area(&piece);
            loop {
                while next < near.len() && apart(&own, &self.boxes[near[next] as usize]) {
                    next += 1;
                }
                if next == near.len() {
                    out.push(piece);
                    break;
                }
                let hider = &self.polygons[near[next] as usize];
                let after = next + 1;
                match cut_by(piece, own_area, hider, |p| stack.push((p, after))) {
                    Cut::Whole(whole) => {
                        piece = whole;
                        next = after;
                    }
                    Cut::Done => break,
                }
            }
        }
    }
}

/// What is left of each convex polygon of `shade` once every one of `hiders` (convex) is
/// taken away from it, in the hiders' order (see [`Hiders::take_from`]).
#[cfg(test)]
fn take_away(shade: Vec<Polygon>, hiders: &[Polygon]) -> Vec<Polygon> {
    let hiders = Hiders::new(hiders.to_vec());
    let mut out = Vec::new();
    for piece in shade {
        hiders.take_from(piece, &mut out);
    }
    out
}

/// The shadow of `face` on the plane (the part of the face in front of it towards the sun,
/// carried along the rays), cut to the receiver's `outline`; turned counter-clockwise.
fn carried_by_sun(
    face: &Face,
    plane: &PlaneFrame,
    s: &Vector3<f64>,
    ns: f64,
    outline: Option<&Polygon>,
) -> Option<Polygon> {
    let scale = size_scale(face);
    // Travel back along the ray to the plane: positive in front of it.
    let travel = |p: &Point3<f64>| plane.height(p) / ns;
    let front = clip_3d(&face.corners, |p| travel(p) - EDGE_ON * scale)?;
    let mut piece: Polygon = front
        .iter()
        .map(|p| plane.to_plane(&(p - s * travel(p))))
        .collect();
    if area(&piece) < 0.0 {
        piece.reverse();
    }
    if let Some(t) = outline {
        piece = intersection(piece, t);
    }
    (area(&piece) > LEAST_AREA_M2).then_some(piece)
}

/// What `face` hides of the plane from `eye` (at `eye_height` above it): the part of the
/// face strictly between them, carried from the eye onto the plane; counter-clockwise.
fn carried_from_eye(
    face: &Face,
    plane: &PlaneFrame,
    eye: &Point3<f64>,
    eye_height: f64,
) -> Option<Polygon> {
    let side = eye_height.signum();
    let reach = eye_height.abs();
    let eps = EDGE_ON * size_scale(face);
    // Height towards the eye: between 0 (on the plane) and `reach` (the eye's).
    let between = clip_3d(&face.corners, |p| side * plane.height(p) - eps)?;
    let between = clip_polygon_3d(between, |p| reach - side * plane.height(p) - eps)?;
    let mut piece: Polygon = between
        .iter()
        .map(|p| {
            let b = side * plane.height(p);
            plane.to_plane(&(eye + (p - eye) * (reach / (reach - b))))
        })
        .collect();
    if area(&piece) < 0.0 {
        piece.reverse();
    }
    (area(&piece) > LEAST_AREA_M2).then_some(piece)
}

/// The scale of a face's coordinates (1 plus its largest coordinate's size, metres), which
/// the tolerances of cutting it to a plane grow with, as rounding does.
fn size_scale(face: &Face) -> f64 {
    1.0 + face
        .corners
        .iter()
        .map(|c| c.coords.abs().max())
        .fold(0.0, f64::max)
}

/// The part of a triangle where `inside` (linear) is non-negative.
fn clip_3d(
    corners: &[Point3<f64>; 3],
    inside: impl Fn(&Point3<f64>) -> f64,
) -> Option<Vec<Point3<f64>>> {
    clip_polygon_3d(corners.to_vec(), inside)
}

fn clip_polygon_3d(
    polygon: Vec<Point3<f64>>,
    inside: impl Fn(&Point3<f64>) -> f64,
) -> Option<Vec<Point3<f64>>> {
    let out = keep_inside(&polygon, inside);
    (out.len() >= 3).then_some(out)
}

/// One Sutherland-Hodgman step (Sutherland and Hodgman, "Reentrant polygon clipping",
/// CACM 17(1), 1974): the part of a polygon where `inside` is not negative, `inside` being
/// linear along each side, so a side crossing zero is cut where it crosses.
fn keep_inside<P, D>(polygon: &[P], inside: impl Fn(&P) -> f64) -> Vec<P>
where
    P: Copy + std::ops::Sub<Output = D> + std::ops::Add<D, Output = P>,
    D: std::ops::Mul<f64, Output = D>,
{
    let mut out = Vec::with_capacity(polygon.len() + 1);
    for (k, &b) in polygon.iter().enumerate() {
        let a = polygon[(k + polygon.len() - 1) % polygon.len()];
        let (da, db) = (inside(&a), inside(&b));
        if (da >= 0.0) != (db >= 0.0) {
            out.push(a + (b - a) * (da / (da - db)));
        }
        if db >= 0.0 {
            out.push(b);
        }
    }
    out
}

/// The part of a polygon on the left of the directed line from `a` to `b` (inside of a
/// counter-clockwise polygon), or on its right with `left` false.
fn clip_side(polygon: &[Vector2<f64>], a: Vector2<f64>, b: Vector2<f64>, left: bool) -> Polygon {
    let d = b - a;
    let sign = if left { 1.0 } else { -1.0 };
    keep_inside(polygon, |p: &Vector2<f64>| {
        sign * (d.x * (p.y - a.y) - d.y * (p.x - a.x))
    })
}

/// Two convex counter-clockwise polygons' common part.
fn intersection(mut polygon: Polygon, convex: &Polygon) -> Polygon {
    for k in 0..convex.len() {
        if polygon.len() < 3 {
            return Vec::new();
        }
        polygon = clip_side(&polygon, convex[k], convex[(k + 1) % convex.len()], true);
    }
    polygon
}

/// A convex polygon less a convex counter-clockwise one: a convex piece outside each side
/// of the second, in turn.
#[cfg(test)]
fn difference(polygon: Polygon, convex: &Polygon) -> Vec<Polygon> {
    let mut out = Vec::new();
    difference_each(polygon, convex, |piece| out.push(piece));
    out
}

/// [`difference`], each piece handed to `piece` as it is cut.
#[cfg(test)]
fn difference_each(polygon: Polygon, convex: &Polygon, mut piece: impl FnMut(Polygon)) {
    let polygon_area = area(&polygon);
    if let Cut::Whole(whole) = cut_by(polygon, polygon_area, convex, &mut piece) {
        piece(whole);
    }
}

/// What a cut left of a polygon besides the pieces it handed on.
enum Cut {
    /// The polygon, untouched and not handed on: no side of the hider crossed it and it
    /// lies outside one of them (and is larger than the least area).
    Whole(Polygon),
    /// Every piece is handed on.
    Done,
}

/// A convex polygon (of area `polygon_area`) less a convex counter-clockwise one: each
/// piece outside a side of the second handed to `piece` as it is cut, or the polygon
/// given back whole. A side with every corner strictly on one side of its line leaves the
/// polygon as it is (wholly inside: nothing is cut off) or hands it on whole (wholly
/// outside: nothing is left inside), which is what the two clips would give, without
/// building either; only a side that crosses the polygon (or touches a corner) clips it.
fn cut_by(
    mut polygon: Polygon,
    mut polygon_area: f64,
    convex: &Polygon,
    mut piece: impl FnMut(Polygon),
) -> Cut {
    let mut cut = false;
    for k in 0..convex.len() {
        let (a, b) = (convex[k], convex[(k + 1) % convex.len()]);
        match side_of(&polygon, a, b) {
            Side::Left => {}
            Side::Right => {
                if polygon_area > LEAST_AREA_M2 {
                    if !cut {
                        return Cut::Whole(polygon);
                    }
                    piece(polygon);
                }
                return Cut::Done;
            }
            Side::Across => {
                let outside = clip_side(&polygon, a, b, false);
                if area(&outside) > LEAST_AREA_M2 {
                    piece(outside);
                }
                polygon = clip_side(&polygon, a, b, true);
                polygon_area = area(&polygon);
                cut = true;
            }
        }
        if polygon_area <= LEAST_AREA_M2 {
            return Cut::Done;
        }
    }
    Cut::Done
}

/// Where a polygon's corners lie from the directed line from `a` to `b`.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Side {
    /// Every corner strictly on the left.
    Left,
    /// Every corner strictly on the right.
    Right,
    /// Some on each side, or some on the line.
    Across,
}

/// Which side of the line from `a` to `b` the corners of `polygon` lie, by the same
/// cross product [`clip_side`] cuts by.
fn side_of(polygon: &[Vector2<f64>], a: Vector2<f64>, b: Vector2<f64>) -> Side {
    let d = b - a;
    let (mut left, mut right) = (true, true);
    for p in polygon {
        let c = d.x * (p.y - a.y) - d.y * (p.x - a.x);
        left &= c > 0.0;
        right &= c < 0.0;
    }
    match (left, right) {
        (true, false) => Side::Left,
        (false, true) => Side::Right,
        _ => Side::Across,
    }
}

/// Signed area (counter-clockwise positive), the shoelace formula.
fn area(polygon: &[Vector2<f64>]) -> f64 {
    let n = polygon.len();
    (0..n)
        .map(|k| {
            let (a, b) = (polygon[k], polygon[(k + 1) % n]);
            a.x * b.y - b.x * a.y
        })
        .sum::<f64>()
        / 2.0
}

fn bounds(polygon: &[Vector2<f64>]) -> (Vector2<f64>, Vector2<f64>) {
    polygon.iter().fold(
        (
            Vector2::repeat(f64::INFINITY),
            Vector2::repeat(f64::NEG_INFINITY),
        ),
        |(lo, hi), p| (lo.inf(p), hi.sup(p)),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    fn square(x0: f64, y0: f64, side: f64) -> Polygon {
        [(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.0, 1.0)]
            .iter()
            .map(|&(x, y)| Vector2::new(x0 + x * side, y0 + y * side))
            .collect()
    }

    #[test]
    fn a_difference_keeps_the_area_outside() {
        // Areas of squares by the shoelace formula: 4 less the overlap of 1.
        let pieces = difference(square(0.0, 0.0, 2.0), &square(1.0, 1.0, 2.0));
        let total: f64 = pieces.iter().map(|p| area(p)).sum();
        assert!((total - 3.0).abs() < 1e-12, "{pieces:?}");
        assert!(
            (area(&intersection(square(0.0, 0.0, 2.0), &square(1.0, 1.0, 2.0))) - 1.0).abs()
                < 1e-12
        );
        assert!(difference(square(0.0, 0.0, 1.0), &square(-1.0, -1.0, 3.0)).is_empty());
    }

    #[test]
    fn taking_away_through_the_grid_leaves_the_pieces_every_pair_would() {
        // Shade pieces and hiders scattered over a plane (a fixed sequence of our own):
        // the pieces left are the same, as a set, as taking every hider from every piece
        // in turn, and so is their total area.
        let mut next = crate::testing::numbers(7);
        let mut shapes = |count: usize, side: f64| -> Vec<Polygon> {
            (0..count)
                .map(|_| square(40.0 * next(), 40.0 * next(), side * (0.3 + next())))
                .collect()
        };
        let shade = shapes(60, 6.0);
        let hiders = shapes(200, 3.0);
        let mut every = shade.clone();
        for hider in &hiders {
            every = every
                .into_iter()
                .flat_map(|p| {
                    let ((plo, phi), (lo, hi)) = (bounds(&p), bounds(hider));
                    if phi.x < lo.x || plo.x > hi.x || phi.y < lo.y || plo.y > hi.y {
                        vec![p]
                    } else {
                        difference(p, hider)
                    }
                })
                .collect();
        }
        let fast = take_away(shade, &hiders);
        let key = |p: &Polygon| -> Vec<(u64, u64)> {
            p.iter().map(|v| (v.x.to_bits(), v.y.to_bits())).collect()
        };
        let mut a: Vec<_> = fast.iter().map(key).collect();
        let mut b: Vec<_> = every.iter().map(key).collect();
        a.sort();
        b.sort();
        assert!(b.len() > 60, "the hiders cut the pieces: {}", b.len());
        assert_eq!(a, b);
    }
}
