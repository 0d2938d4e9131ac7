//! The outlines of the shadows the site's solids cast, at one direction of the sun.
//!
//! A shadow's outline on a plane face is made of the images, carried along the sun's rays,
//! of the edges that outline the solids as seen from the sun (their silhouette edges): an
//! edge both of whose faces lie on one side of the plane through it and the sun's
//! direction. Each such edge is carried to every face behind it (and to the ground: the
//! plane z = 0, or the sloping ground's triangles, which are faces) and cut to the face;
//! what is left is a line of the outline where the ray from its point to the sun grazes
//! the edge and meets nothing else on the way. Both the faces behind an edge and the
//! faces its rays may meet are found once for the edge, as the faces whose images in the
//! sun's view come near the edge's (see [`SunView`]). Where that changes along the line
//! (another shadow falls across it) the change is found by bisection to
//! [`BREAK_TOLERANCE_M`]. The lines are straight segments in the site frame, so they are
//! drawn, and hidden behind nearer faces, exactly like the site's own edges.
//!
//! Curved surfaces cast the shadows of their facets (3.75 degrees); a change along a line
//! shorter than the sampling step ([`SAMPLE_STEP_M`]) can be missed.

use super::boxes::{Bounds, BoxGrid};
use super::position::across_rays;
use crate::cores;
use crate::scene::{Face, Faces, Site};
use crate::visibility::{ray_hits_triangle, Bvh};
use nalgebra::{Point3, Vector2, Vector3};

/// Where a line of an outline starts or stops being one is found to this length, metres.
pub const BREAK_TOLERANCE_M: f64 = 1e-6;
/// Lines of an outline are tested for light at least this often, metres (and at least at
/// [`MIN_SAMPLES`] points).
pub const SAMPLE_STEP_M: f64 = 0.25;
const MIN_SAMPLES: usize = 6;
const MAX_SAMPLES: usize = 400;
/// Corners closer than this (metres) are one corner when faces are joined along edges.
const WELD_M: f64 = 1e-6;
/// How far (relative to the size of a point's coordinates) beyond a face's box, across
/// the sun's rays, a ray to the sun is still tried against the face: far more than the
/// rounding of the projections (about 1e-15), far less than a face.
const VIEW_PAD: f64 = 1e-6;
/// A face nearly edge-on to the sun (|n . s| below this) receives no outline.
const EDGE_ON: f64 = 1e-9;

/// A straight piece of a shadow's outline, in the site frame.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ShadowLine {
    /// One end.
    pub start: Point3<f64>,
    /// The other end.
    pub end: Point3<f64>,
}

/// A silhouette edge from the sun and the faces it joins.
#[derive(Clone, Debug)]
struct Silhouette {
    a: Point3<f64>,
    b: Point3<f64>,
    faces: Vec<u32>,
}

/// Where a receiving plane is cut off: a triangle (an index into the faces) or the
/// unbounded ground.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Receiver {
    Face(u32),
    Ground,
}

/// The outlines of the shadows at a sun in the unit direction `towards_sun` (site frame,
/// above the horizon), on the site's faces and on the ground plane z = 0 (where the scene
/// has no sloping ground; its triangles are faces).
pub fn shadow_outlines(site: &Site, towards_sun: &Vector3<f64>) -> Vec<ShadowLine> {
    outlines(site, towards_sun, None)
}

/// [`shadow_outlines`], the receivers of each edge and the faces each ray to the sun may
/// meet found through the sun's view of the faces or, to check that (with `every_face`),
/// every face tried as a receiver and the rays cast through that hierarchy. The
/// silhouette edges are shared out among the cores and their lines put back in order.
fn outlines(site: &Site, towards_sun: &Vector3<f64>, every_face: Option<&Bvh>) -> Vec<ShadowLine> {
    let through_grid = every_face.is_none();
    let s = towards_sun.normalize();
    // A direction that is not a number casts nothing either.
    if s.z.is_nan() || s.z <= 0.0 {
        return Vec::new();
    }
    let silhouettes = silhouettes(&site.faces, &s);
    let planes: Vec<Option<(Vector3<f64>, f64)>> =
        site.faces.iter().map(|face| plane_of(&face)).collect();
    // The plane z = 0 receives only where the scene has no sloping ground: then the
    // ground's triangles, faces like any other, receive instead.
    let level = site.ground.is_none().then_some(Receiver::Ground);
    let receivers = (0..site.faces.len() as u32)
        .map(Receiver::Face)
        .chain(level);
    let receivers: Vec<(Receiver, Vector3<f64>, f64)> = receivers
        .filter_map(|r| match r {
            Receiver::Ground => Some((r, Vector3::z(), 0.0)),
            Receiver::Face(i) => planes[i as usize].map(|(n, d)| (r, n, d)),
        })
        .filter(|(_, n, _)| n.dot(&s).abs() > EDGE_ON)
        .collect();
    // Where each face stands in the list of receivers (the ground, if any, is last).
    let mut receiver_index: Vec<Option<usize>> = vec![None; site.faces.len()];
    for (k, (receiver, ..)) in receivers.iter().enumerate() {
        if let Receiver::Face(i) = receiver {
            receiver_index[*i as usize] = Some(k);
        }
    }
    // Only the faces whose images seen from the sun the edge's comes near can receive its
    // shadow or stand between it and the sun: found through a grid over that view, in the
    // faces' order as before.
    let grid = SunView::new(&site.faces, &s);
    // No point of a face lies farther out than this (largest coordinate): the reach
    // of every point on a face the outlines are tried at.
    let faces_reach = site
        .faces
        .iter()
        .flat_map(|f| f.corners)
        .fold(0.0, |m: f64, c| m.max(c.coords.abs().max()));
    let lines_of = |edge: &Silhouette| {
        let mut out = Vec::new();
        // The ground's piece is found first (its points may lie farther out than any
        // face's) and tried last. A sun within EDGE_ON of the horizon has left it out.
        let ground = receivers
            .last()
            .is_some_and(|(r, ..)| *r == Receiver::Ground)
            .then(|| receivers.len() - 1);
        let ground_span = ground.and_then(|k| {
            let (receiver, n, d) = receivers[k];
            carried_span(edge, receiver, &n, d, &s, &site.faces)
        });
        let near: Vec<u32> = if through_grid {
            let reach = ground_span.map_or(faces_reach, |(u0, u1)| {
                let end = |u: f64| {
                    let p = edge.a + (edge.b - edge.a) * u;
                    (p - s * (p.z / s.z)).coords.abs().max()
                };
                faces_reach.max(end(u0)).max(end(u1))
            });
            let mut near = Vec::new();
            grid.faces_near(&edge.a, &edge.b, reach, &mut near);
            near
        } else {
            (0..site.faces.len() as u32).collect()
        };
        let mut blockers = Vec::new();
        let candidates = near
            .iter()
            .filter_map(|&i| receiver_index[i as usize])
            .chain(ground);
        for k in candidates {
            let (receiver, n, d) = receivers[k];
            if let Receiver::Face(i) = receiver {
                if edge.faces.contains(&i) {
                    continue;
                }
            }
            let span = match receiver {
                Receiver::Ground => ground_span,
                Receiver::Face(_) => carried_span(edge, receiver, &n, d, &s, &site.faces),
            };
            let Some((u0, u1)) = span else {
                continue;
            };
            let on_plane = |u: f64| {
                let p = edge.a + (edge.b - edge.a) * u;
                p - s * ((n.dot(&p.coords) - d) / n.dot(&s))
            };
            // Its own faces and the receiver never block a point of the outline.
            let own = |index: u32| edge.faces.contains(&index) || receiver == Receiver::Face(index);
            blockers.clear();
            blockers.extend(near.iter().filter(|&&index| !own(index)));
            let lit = |u: f64| {
                let p = on_plane(u);
                let blocks =
                    |index: u32, distance: f64, start: f64| distance > start && !own(index);
                match every_face {
                    None => !grid.ray_meets_among(&site.faces, &blockers, &p, &s, blocks),
                    Some(bvh) => !meets(site, bvh, &p, &s, blocks),
                }
            };
            for (from, to) in runs(u0, u1, (edge.b - edge.a).norm(), lit) {
                out.push(ShadowLine {
                    start: on_plane(from),
                    end: on_plane(to),
                });
            }
        }
        out
    };
    cores::in_order(silhouettes.len(), |k| lines_of(&silhouettes[k]))
        .into_iter()
        .flatten()
        .collect()
}

/// The faces as the sun sees them: each triangle projected along the sun's rays onto a
/// plane across them, its box entered in a grid over that plane. Carrying a point along
/// the rays does not move its projection, so an edge's shadow can fall on a face only
/// where the edge's projection crosses the face's, and the ray to the sun from a point of
/// that shadow can meet only faces whose images hold the point's projection, which lies
/// on the edge's: the faces whose images come near the edge's projection are all the
/// faces that may receive its shadow and all those that may stand between it and the sun.
/// Found once for each edge, they spare the grid a search for each of the many points
/// tried along the outline.
struct SunView {
    /// Two unit vectors across the sun's rays.
    u: Vector3<f64>,
    v: Vector3<f64>,
    /// The faces' projected boxes; `None` without faces.
    grid: Option<BoxGrid>,
    /// The same boxes, face by face.
    boxes: Vec<Bounds>,
    /// Each face's image across the rays as the three lines of its sides (unit normal
    /// into the image, offset), or `None` for an image too thin to tell its inside by
    /// them (a face within about [`THIN_IMAGE`] radians of edge-on to the sun).
    images: Vec<Option<Sides>>,
}

/// A triangle's sides as lines: unit normal pointing in, and offset (n . p on the line).
type Sides = [(Vector2<f64>, f64); 3];

/// The least |sin| of the angle between a face's sides, as the sun sees it, for its
/// image to rule rays out: the ray-triangle test's rounding grows as the image thins,
/// and stays far below [`VIEW_PAD`] above this.
const THIN_IMAGE: f64 = 1e-6;

/// The sides of the triangle `a`, `b`, `c` as lines with unit normals pointing in, or
/// `None` when the triangle is too thin for [`THIN_IMAGE`].
fn image_sides(a: Vector2<f64>, b: Vector2<f64>, c: Vector2<f64>) -> Option<Sides> {
    let twice_area = (b - a).perp(&(c - a));
    // Written so that NaN is thin too.
    let fat = twice_area.abs() > THIN_IMAGE * (b - a).norm() * (c - a).norm();
    if !fat {
        return None;
    }
    let sign = twice_area.signum();
    let side = |p: Vector2<f64>, q: Vector2<f64>| {
        let d = q - p;
        let n = Vector2::new(-d.y, d.x) * sign / d.norm();
        (n, n.dot(&p))
    };
    Some([side(a, b), side(b, c), side(c, a)])
}

/// Whether the segment from `a` to `b` meets the closed box from `lo` to `hi` (clipped to
/// each slab of the box in turn: Liang and Barsky's clipping).
fn segment_meets_box(a: Vector2<f64>, b: Vector2<f64>, lo: Vector2<f64>, hi: Vector2<f64>) -> bool {
    let d = b - a;
    let (mut t0, mut t1) = (0.0f64, 1.0f64);
    for axis in 0..2 {
        if d[axis] == 0.0 {
            if a[axis] < lo[axis] || a[axis] > hi[axis] {
                return false;
            }
            continue;
        }
        let (p, q) = (
            (lo[axis] - a[axis]) / d[axis],
            (hi[axis] - a[axis]) / d[axis],
        );
        t0 = t0.max(p.min(q));
        t1 = t1.min(p.max(q));
        if t0 > t1 {
            return false;
        }
    }
    true
}

impl SunView {
    fn new(faces: &Faces, s: &Vector3<f64>) -> SunView {
        let (u, v) = across_rays(s);
        let view = SunView {
            u,
            v,
            grid: None,
            boxes: Vec::new(),
            images: Vec::new(),
        };
        let images: Vec<[Vector2<f64>; 3]> = faces
            .iter()
            .map(|f| f.corners.map(|p| view.project(&p)))
            .collect();
        let boxes: Vec<Bounds> = images
            .iter()
            .map(|[a, b, c]| (a.inf(b).inf(c), a.sup(b).sup(c)))
            .collect();
        SunView {
            grid: BoxGrid::new(&boxes),
            boxes,
            images: images
                .iter()
                .map(|&[a, b, c]| image_sides(a, b, c))
                .collect(),
            ..view
        }
    }

    /// A point's place across the sun's rays.
    fn project(&self, p: &Point3<f64>) -> Vector2<f64> {
        Vector2::new(self.u.dot(&p.coords), self.v.dot(&p.coords))
    }

    /// Whether the ray from `p` towards the sun `s` (the unit direction the view is
    /// across) meets a face for which `blocks(face, distance, start)` holds, `start` being
    /// the distance within which a hit is the point's own face. A face the ray meets holds
    /// the ray's point there, and so the point's projection, within rounding: only the
    /// faces whose projected boxes, and then images (where not too thin), come within
    /// [`VIEW_PAD`] (relative) of `p`'s projection are tried, by the same test
    /// ([`ray_hits_triangle`]) the hierarchy's rays use, so the answer is the same as
    /// casting the ray through it.
    fn ray_meets(
        &self,
        faces: &Faces,
        p: &Point3<f64>,
        s: &Vector3<f64>,
        blocks: impl Fn(u32, f64, f64) -> bool,
    ) -> bool {
        let Some(grid) = &self.grid else {
            return false;
        };
        let start = own_face_reach(p);
        let (q, pad) = (self.project(p), VIEW_PAD * (1.0 + p.coords.abs().max()));
        grid.any_near(q, pad, |index| {
            self.tried(faces, index, p, q, pad, s, &blocks, start)
        })
    }

    /// [`SunView::ray_meets`] with only the faces `among` tried: the same answer when
    /// they hold every face that comes within [`VIEW_PAD`] of `p` as the sun sees it (as
    /// [`SunView::faces_near`] lists them for an edge whose shadow holds `p`) and `blocks`
    /// is false for the rest.
    fn ray_meets_among(
        &self,
        faces: &Faces,
        among: &[u32],
        p: &Point3<f64>,
        s: &Vector3<f64>,
        blocks: impl Fn(u32, f64, f64) -> bool,
    ) -> bool {
        let start = own_face_reach(p);
        let (q, pad) = (self.project(p), VIEW_PAD * (1.0 + p.coords.abs().max()));
        among
            .iter()
            .any(|&index| self.tried(faces, index, p, q, pad, s, &blocks, start))
    }

    /// Whether the ray from `p` (seen at `q` across the rays) to the sun meets the face
    /// `index` where `blocks` holds: ruled out first by the face's image, where it is not
    /// too thin, lying beyond `pad` of `q`.
    #[allow(clippy::too_many_arguments)]
    fn tried(
        &self,
        faces: &Faces,
        index: u32,
        p: &Point3<f64>,
        q: Vector2<f64>,
        pad: f64,
        s: &Vector3<f64>,
        blocks: &impl Fn(u32, f64, f64) -> bool,
        start: f64,
    ) -> bool {
        let outside = |sides: &Sides| sides.iter().any(|(n, offset)| n.dot(&q) - offset < -pad);
        if self.images[index as usize].as_ref().is_some_and(outside) {
            return false;
        }
        ray_hits_triangle(p, s, &faces.get(index as usize).corners)
            .is_some_and(|distance| blocks(index, distance, start))
    }

    /// The faces whose images come near the edge from `a` to `b` as the sun sees it,
    /// ascending: every face that may receive its shadow, and every face a ray to the sun
    /// may meet from a point of its shadow lying within `reach` (largest coordinate) of
    /// the origin, so that [`SunView::ray_meets_among`] over them answers as
    /// [`SunView::ray_meets`]. Carrying a point along the rays does not move its
    /// projection, so the edge's projection holds every such point's: the faces are found
    /// once for the edge instead of once for each point, as those in the grid's cells
    /// within [`VIEW_PAD`] (at `reach`, twice over for the rounding) of the edge's
    /// projection whose box, so padded, it crosses and whose image no side keeps both its
    /// ends beyond by the pad; a face with a thin image is kept by its cells alone, as
    /// [`SunView::ray_meets`] tries it.
    fn faces_near(&self, a: &Point3<f64>, b: &Point3<f64>, reach: f64, out: &mut Vec<u32>) {
        let Some(grid) = &self.grid else {
            out.clear();
            return;
        };
        let pad = 2.0 * VIEW_PAD * (1.0 + reach);
        let (a, b) = (self.project(a), self.project(b));
        grid.near_segment(a, b, pad, out);
        out.retain(|&index| {
            let Some(sides) = &self.images[index as usize] else {
                return true;
            };
            let (lo, hi) = self.boxes[index as usize];
            let beyond = |(n, offset): &(Vector2<f64>, f64)| {
                n.dot(&a) - offset < -pad && n.dot(&b) - offset < -pad
            };
            let pad = Vector2::repeat(pad);
            segment_meets_box(a, b, lo - pad, hi + pad) && !sides.iter().any(beyond)
        });
    }
}

/// The layer (and the label) of the shadows' outlines.
pub const SHADOWS: &str = "shadows";

/// The site with the outlines of its shadows at a sun in the direction `towards_sun` added
/// as one item, labelled and layered [`SHADOWS`], so that they are drawn, hidden and
/// listed (`pansite angles --item shadows`) like any item's edges.
pub fn with_shadows(site: &Site, towards_sun: &Vector3<f64>) -> Site {
    with_shadows_and_hatching(site, towards_sun, None)
}

/// [`with_shadows`], and with `hatch_spacing_m` the [`hatching`] as a second item on its
/// own layer ([`HATCHING`]).
pub fn with_shadows_and_hatching(
    site: &Site,
    towards_sun: &Vector3<f64>,
    hatch_spacing_m: Option<f64>,
) -> Site {
    let lines = shadow_outlines(site, towards_sun);
    let hatch = hatch_spacing_m.map(|spacing| hatching(site, towards_sun, spacing));
    let mut shadowed = site.clone();
    let item =
        shadowed.add_item_on_layer("shadow", Some(SHADOWS.to_owned()), Some(SHADOWS.to_owned()));
    for line in lines {
        shadowed.add_segment(item, line.start, line.end);
    }
    if let Some(hatch) = hatch {
        let item = shadowed.add_item_on_layer(
            "shadow",
            Some(HATCHING.to_owned()),
            Some(HATCHING.to_owned()),
        );
        for line in hatch {
            shadowed.add_segment(item, line.start, line.end);
        }
    }
    shadowed
}

/// The layer of the shadows' hatching.
pub const HATCHING: &str = "shadow hatching";

/// Hatching of everything in shadow or turned from the sun, on the faces and on the
/// ground, for prints in black and white: parallel lines `spacing_m` apart on each plane
/// (at 45 degrees on upright faces and across the plan elsewhere), kept where the ray
/// from their points to the sun meets a face, their ends found like the outlines' breaks.
pub fn hatching(site: &Site, towards_sun: &Vector3<f64>, spacing_m: f64) -> Vec<ShadowLine> {
    hatch_lines(site, towards_sun, spacing_m, None)
}

/// [`hatching`], the rays to the sun tried against the faces the sun's view names or, to
/// check that (with `every_face`), cast through that hierarchy. The lines to hatch are
/// listed first, then shared out among the cores and their pieces put back in order.
fn hatch_lines(
    site: &Site,
    towards_sun: &Vector3<f64>,
    spacing_m: f64,
    every_face: Option<&Bvh>,
) -> Vec<ShadowLine> {
    let s = towards_sun.normalize();
    if s.z <= 0.0 || !(spacing_m.is_finite() && spacing_m > 0.0) {
        return Vec::new();
    }
    let view = SunView::new(&site.faces, &s);
    // Whether the ray from `p` on a receiver towards the sun meets a face (other than
    // the receiver): the point is in shadow, or on a face turned from the sun.
    let shaded = |p: &Point3<f64>, receiver: Receiver| {
        let blocks = |index: u32, distance: f64, start: f64| {
            distance > start && receiver != Receiver::Face(index)
        };
        match every_face {
            None => view.ray_meets(&site.faces, p, &s, blocks),
            Some(bvh) => meets(site, bvh, p, &s, blocks),
        }
    };
    let hatch = |&(receiver, a, b): &(Receiver, Point3<f64>, Point3<f64>)| {
        let length = (b - a).norm();
        if length < 1e-9 {
            return Vec::new();
        }
        let at = |u: f64| a + (b - a) * u;
        runs(0.0, 1.0, length, |u| shaded(&at(u), receiver))
            .into_iter()
            .map(|(from, to)| ShadowLine {
                start: at(from),
                end: at(to),
            })
            .collect()
    };
    let mut lines: Vec<(Receiver, Point3<f64>, Point3<f64>)> = Vec::new();
    for (index, face) in site.faces.iter().enumerate() {
        let Some((n, _)) = plane_of(&face) else {
            continue;
        };
        // Along: 45 degrees up an upright face; the plan's diagonal projected elsewhere.
        let along = if n.z.abs() < 0.5 {
            (n.cross(&Vector3::z()).normalize() + Vector3::z()).normalize()
        } else {
            let d = Vector3::new(1.0, 1.0, 0.0);
            (d - n * n.dot(&d)).normalize()
        };
        let across = n.cross(&along);
        let offsets = face.corners.map(|c| across.dot(&c.coords));
        let (lo, hi) = offsets
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), &o| {
                (l.min(o), h.max(o))
            });
        let first = (lo / spacing_m).ceil() as i64;
        let last = (hi / spacing_m).floor() as i64;
        for k in first..=last.min(first + 100_000) {
            if let Some((a, b)) = cut_triangle(&face.corners, &across, k as f64 * spacing_m) {
                lines.push((Receiver::Face(index as u32), a, b));
            }
        }
    }
    // The level ground (sloping ground is hatched as faces): over the plan's extent of
    // the solids and their shadows.
    let mut lo = (f64::INFINITY, f64::INFINITY);
    let mut hi = (f64::NEG_INFINITY, f64::NEG_INFINITY);
    for corner in site.faces.iter().flat_map(|f| f.corners) {
        if corner.z < 0.0 {
            continue;
        }
        let foot = corner - s * (corner.z / s.z);
        for p in [corner, foot] {
            lo = (lo.0.min(p.x), lo.1.min(p.y));
            hi = (hi.0.max(p.x), hi.1.max(p.y));
        }
    }
    if site.ground.is_none() && lo.0.is_finite() {
        // Lines x - y = c, cut to the extent.
        let first = ((lo.0 - hi.1) / spacing_m).ceil() as i64;
        let last = ((hi.0 - lo.1) / spacing_m).floor() as i64;
        for k in first..=last.min(first + 100_000) {
            let c = k as f64 * spacing_m;
            let x0 = lo.0.max(lo.1 + c);
            let x1 = hi.0.min(hi.1 + c);
            if x1 > x0 {
                lines.push((
                    Receiver::Ground,
                    Point3::new(x0, x0 - c, 0.0),
                    Point3::new(x1, x1 - c, 0.0),
                ));
            }
        }
    }
    cores::in_order(lines.len(), |k| hatch(&lines[k]))
        .into_iter()
        .flatten()
        .collect()
}

/// The piece of the line {p : across . p = offset} inside a triangle, if any.
fn cut_triangle(
    corners: &[Point3<f64>; 3],
    across: &Vector3<f64>,
    offset: f64,
) -> Option<(Point3<f64>, Point3<f64>)> {
    let mut ends = Vec::with_capacity(2);
    for k in 0..3 {
        let (p, q) = (corners[k], corners[(k + 1) % 3]);
        let (fp, fq) = (
            across.dot(&p.coords) - offset,
            across.dot(&q.coords) - offset,
        );
        if (fp < 0.0) != (fq < 0.0) {
            ends.push(p + (q - p) * (fp / (fp - fq)));
        }
    }
    (ends.len() == 2).then(|| (ends[0], ends[1]))
}

/// The unit normal and offset (n . p = d) of a face's plane; `None` for a sliver.
fn plane_of(face: &Face) -> Option<(Vector3<f64>, f64)> {
    let [a, b, c] = face.corners;
    let n = (b - a).cross(&(c - a)).try_normalize(1e-12)?;
    Some((n, n.dot(&a.coords)))
}

/// The silhouette edges of the faces from the sun: edges of one face, or of faces on one
/// side of the plane through the edge and the sun's direction.
fn silhouettes(faces: &Faces, s: &Vector3<f64>) -> Vec<Silhouette> {
    let key = |p: &Point3<f64>| [p.x, p.y, p.z].map(|v| (v / WELD_M).round() as i64);
    // Every side of every face under its welded ends (the lesser first), sorted so that
    // the faces along one edge come together in the faces' order: a sort of one list
    // instead of a hash map of lists, in a fraction of the time.
    let mut sides: Vec<([i64; 3], [i64; 3], u32, usize)> = Vec::with_capacity(3 * faces.len());
    for (index, face) in faces.iter().enumerate() {
        for k in 0..3 {
            let (ka, kb) = (key(&face.corners[k]), key(&face.corners[(k + 1) % 3]));
            match ka.cmp(&kb) {
                std::cmp::Ordering::Less => sides.push((ka, kb, index as u32, k)),
                std::cmp::Ordering::Greater => sides.push((kb, ka, index as u32, k)),
                std::cmp::Ordering::Equal => {}
            }
        }
    }
    sides.sort_unstable();
    // An edge's two ends (the first face's, the lesser key first) and, for each face
    // along it, the face's index and third corner.
    let edges = sides.chunk_by(|p, q| (p.0, p.1) == (q.0, q.1)).map(|run| {
        let (ka, _, index, k) = run[0];
        let corners = faces.get(index as usize).corners;
        let (a, b) = (corners[k], corners[(k + 1) % 3]);
        let (a, b) = if key(&a) == ka { (a, b) } else { (b, a) };
        let around: Vec<(u32, Point3<f64>)> = run
            .iter()
            .map(|&(_, _, index, k)| (index, faces.get(index as usize).corners[(k + 2) % 3]))
            .collect();
        (a, b, around)
    });
    let mut out: Vec<Silhouette> = edges
        .filter_map(|(a, b, around)| {
            let m = (b - a).cross(s);
            if m.norm() < 1e-12 * (b - a).norm() {
                return None; // Along the sun's rays: its shadow is a point.
            }
            let side = |c: &Point3<f64>| m.dot(&(c - a));
            let first = side(&around[0].1);
            let one_side = around.iter().all(|(_, c)| side(c) * first > 0.0);
            (around.len() == 1 || one_side).then(|| Silhouette {
                a,
                b,
                faces: around.iter().map(|(i, _)| *i).collect(),
            })
        })
        .collect();
    // A fixed order: by the ends' coordinates.
    out.sort_by(|p, q| {
        let k = |e: &Silhouette| [e.a.x, e.a.y, e.a.z, e.b.x, e.b.y, e.b.z];
        k(p).partial_cmp(&k(q)).unwrap_or(std::cmp::Ordering::Equal)
    });
    out
}

/// The part (parameters along the edge, 0 at `a`) of a silhouette edge whose image carried
/// away from the sun onto the receiver's plane lies on the receiver, behind the edge.
fn carried_span(
    edge: &Silhouette,
    receiver: Receiver,
    n: &Vector3<f64>,
    d: f64,
    s: &Vector3<f64>,
    faces: &Faces,
) -> Option<(f64, f64)> {
    let ns = n.dot(s);
    // How far along the ray back from the sun each end travels to the plane: positive
    // when the plane is behind the edge.
    let travel = |p: &Point3<f64>| (n.dot(&p.coords) - d) / ns;
    let (ta, tb) = (travel(&edge.a), travel(&edge.b));
    let mut span = (0.0, 1.0);
    let scale = 1.0 + edge.a.coords.abs().max();
    clip_linear(&mut span, ta - 1e-9 * scale, tb - 1e-9 * scale)?;
    if let Receiver::Face(i) = receiver {
        let carried = |p: &Point3<f64>, t: f64| p - s * t;
        let (pa, pb) = (carried(&edge.a, ta), carried(&edge.b, tb));
        let c = faces.get(i as usize).corners;
        for k in 0..3 {
            let (from, to) = (c[k], c[(k + 1) % 3]);
            // Inside is where (n x side) . (p - from) >= 0, the corners turning about n.
            let inward = n.cross(&(to - from));
            clip_linear(
                &mut span,
                inward.dot(&(pa - from)),
                inward.dot(&(pb - from)),
            )?;
        }
    }
    (span.1 - span.0 > 1e-12).then_some(span)
}

/// Narrows `span` to where the linear function with values `at0` (u = 0) and `at1`
/// (u = 1) is non-negative; `None` when nothing is left.
fn clip_linear(span: &mut (f64, f64), at0: f64, at1: f64) -> Option<()> {
    if at0 < 0.0 && at1 < 0.0 {
        return None;
    }
    if at0 < 0.0 || at1 < 0.0 {
        let root = at0 / (at0 - at1);
        if at0 < 0.0 {
            span.0 = span.0.max(root);
        } else {
            span.1 = span.1.min(root);
        }
    }
    (span.0 < span.1).then_some(())
}

/// How far along a ray to the sun from `p` a hit is the point's own face, not a shadow:
/// relative to the size of the point's coordinates. One function, so that the sun's view
/// and the hierarchy (which the tests compare) draw the line in the same place.
fn own_face_reach(p: &Point3<f64>) -> f64 {
    1e-7 * (1.0 + p.coords.abs().max())
}

/// Whether the ray from `p` towards the sun, cast through the hierarchy of faces, meets a
/// face for which `blocks(face, distance, start)` holds, `start` being the distance
/// within which a hit is the point's own face.
fn meets(
    site: &Site,
    bvh: &Bvh,
    p: &Point3<f64>,
    s: &Vector3<f64>,
    blocks: impl Fn(u32, f64, f64) -> bool,
) -> bool {
    let start = own_face_reach(p);
    bvh.first_hit(&site.faces, p, s, f64::INFINITY, |index, _, distance| {
        blocks(index, distance, start)
    })
    .is_some()
}

/// The stretches of [u0, u1] (an edge of length `length`) where `inside` holds: sampled
/// at least every [`SAMPLE_STEP_M`], each change found by bisection.
fn runs(u0: f64, u1: f64, length: f64, inside: impl Fn(f64) -> bool) -> Vec<(f64, f64)> {
    let span = u1 - u0;
    let count = ((span * length / SAMPLE_STEP_M).ceil() as usize).clamp(MIN_SAMPLES, MAX_SAMPLES);
    // The ends themselves are nudged inwards: there the ray meets corners exactly.
    let nudge = 1e-9 * span;
    let at = |k: usize| (u0 + span * k as f64 / count as f64).clamp(u0 + nudge, u1 - nudge);
    let tolerance = BREAK_TOLERANCE_M / length.max(1e-12);
    let change = |mut lo: f64, mut hi: f64, lo_inside: bool| {
        while hi - lo > tolerance {
            let mid = 0.5 * (lo + hi);
            if inside(mid) == lo_inside {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        0.5 * (lo + hi)
    };
    let mut out = Vec::new();
    let mut previous = (at(0), inside(at(0)));
    let mut open = previous.1.then_some(u0);
    for k in 1..=count {
        let u = at(k);
        let now = inside(u);
        if now != previous.1 {
            let x = change(previous.0, u, previous.1);
            match open.take() {
                Some(from) => out.push((from, x)),
                None => open = Some(x),
            }
        }
        previous = (u, now);
    }
    if let Some(from) = open {
        out.push((from, u1));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::{parse_scene, ItemId};
    use std::path::Path;

    fn site(items: &str) -> Site {
        let text = format!("Scene(items: [{items}])");
        parse_scene(text.as_bytes(), Path::new("test.ron"), "test").unwrap()
    }

    /// Whether a point on a surface is in shadow, by a ray cast of the test's own: the ray
    /// from just off the surface (on the side of the sun) towards the sun meets any face.
    fn shaded(site: &Site, p: &Point3<f64>, off: &Vector3<f64>, s: &Vector3<f64>) -> bool {
        let o = p + off * 1e-4;
        site.faces
            .iter()
            .any(|f| ray_meets(&o, s, &f.corners).is_some_and(|t| t > 1e-9))
    }

    /// How far along the ray from `o` in the direction `d` it meets the triangle, if it
    /// does: where the ray crosses the triangle's plane (t = n . (a - o) / n . d), that
    /// point lies on the inner side of all three sides (the same-side test of any geometry
    /// text). Written here, apart from the crate's ray test (Moeller and Trumbore's), so
    /// that the shadows are checked against a ray cast that shares nothing with them.
    fn ray_meets(o: &Point3<f64>, d: &Vector3<f64>, [a, b, c]: &[Point3<f64>; 3]) -> Option<f64> {
        let n = (b - a).cross(&(c - a));
        let across = n.dot(d);
        if across.abs() <= 1e-12 * n.norm() * d.norm() {
            return None;
        }
        let t = n.dot(&(a - o)) / across;
        let p = o + d * t;
        let inside = [(a, b), (b, c), (c, a)]
            .iter()
            .all(|(u, v)| (*v - *u).cross(&(p - *u)).dot(&n) >= 0.0);
        inside.then_some(t)
    }

    /// Blocks, a round tower and a vault: what the sun's view tests cast over.
    const BLOCKS_TOWER_AND_VAULT: &str =
        "Block(at: Corner(0, 0), width: 4, depth: 3, height: 5, roof: Gable(ridge: 7)),
         Block(at: Corner(7, 1), width: 2, depth: 6, height: 9),
         Tower(at: (2, 9), diameter: 3, height: 6),
         Arcade(at: Corner(-6, -6), count: 3, span: 2.4, springing: 2.8, pier: 0.6,
                thickness: 1.5, height: 5)";

    fn sun(azimuth_deg: f64, elevation_deg: f64) -> Vector3<f64> {
        let (a, e) = (azimuth_deg.to_radians(), elevation_deg.to_radians());
        Vector3::new(a.sin() * e.cos(), a.cos() * e.cos(), e.sin())
    }

    #[test]
    fn the_sun_view_grid_finds_every_receiver_trying_all_faces_would() {
        // The grid only skips faces that cannot receive an edge's shadow: the outlines
        // are the same lines, in the same order, as with every face tried, for suns
        // high and low, from every side, over blocks, a round tower and a vault.
        let site = site(BLOCKS_TOWER_AND_VAULT);
        let bvh = Bvh::new(&site.faces);
        for (azimuth, elevation) in [(140.0, 35.0), (250.0, 8.0), (10.0, 60.0), (95.0, 3.0)] {
            let s = sun(azimuth, elevation);
            let fast = outlines(&site, &s, None);
            let every = outlines(&site, &s, Some(&bvh));
            assert!(!every.is_empty());
            assert_eq!(fast, every, "sun at {azimuth}, {elevation}");
        }
    }

    #[test]
    fn a_block_on_the_ground_casts_its_outline_and_points_beside_it_agree() {
        let site = site("Block(at: Corner(0, 0), width: 4, depth: 3, height: 5)");
        let s = sun(140.0, 35.0);
        let lines = shadow_outlines(&site, &s);
        assert!(!lines.is_empty());
        let up = Vector3::z();
        let mut checked = 0;
        for line in &lines {
            assert!(
                line.start.z.abs() < 1e-9 && line.end.z.abs() < 1e-9,
                "{line:?}"
            );
            let along = line.end - line.start;
            if along.norm() < 0.05 {
                continue;
            }
            // Points just either side of the middle of each line: one shaded, one lit.
            let across = up.cross(&along).normalize() * 0.01;
            let middle = line.start + along * 0.5;
            let (left, right) = (middle + across, middle - across);
            assert_ne!(
                shaded(&site, &left, &up, &s),
                shaded(&site, &right, &up, &s),
                "{line:?}"
            );
            checked += 1;
        }
        assert!(checked >= 3, "{checked}");
    }

    #[test]
    fn a_shadow_on_a_wall_agrees_with_a_ray_cast() {
        // A tall block south of a long wall-like block, the sun low in the south: the
        // first's shadow climbs the second's south wall (y = 6).
        let site = site(
            "Block(at: Corner(0, 0), width: 3, depth: 3, height: 12),
             Block(at: Corner(-6, 6), width: 15, depth: 2, height: 8)",
        );
        let s = sun(170.0, 30.0);
        let lines = shadow_outlines(&site, &s);
        let on_wall: Vec<_> = lines
            .iter()
            .filter(|l| (l.start.y - 6.0).abs() < 1e-6 && (l.end.y - 6.0).abs() < 1e-6)
            .collect();
        assert!(!on_wall.is_empty(), "{lines:?}");
        let south = -Vector3::y();
        for line in on_wall {
            let along = line.end - line.start;
            if along.norm() < 0.05 {
                continue;
            }
            let across = south.cross(&along).normalize() * 0.01;
            let middle = line.start + along * 0.5;
            assert_ne!(
                shaded(&site, &(middle + across), &south, &s),
                shaded(&site, &(middle - across), &south, &s),
                "{line:?}"
            );
        }
    }

    #[test]
    fn a_pole_casts_a_line_of_its_height_over_the_tangent_of_the_elevation() {
        // Plain trigonometry: a vertical pole of height h on level ground casts a shadow
        // h / tan(elevation) long, pointing to the sun's azimuth plus 180 degrees.
        let site = site("Block(at: Centre(0, 0), width: 0.1, depth: 0.1, height: 6)");
        let (azimuth, elevation) = (125.0f64, 28.0f64);
        let lines = shadow_outlines(&site, &sun(azimuth, elevation));
        let far = lines
            .iter()
            .flat_map(|l| [l.start, l.end])
            .max_by(|a, b| a.coords.xy().norm().total_cmp(&b.coords.xy().norm()))
            .unwrap();
        let length = 6.0 / elevation.to_radians().tan();
        let expected = (azimuth + 180.0).to_radians();
        let tip = Vector3::new(expected.sin(), expected.cos(), 0.0) * length;
        // The block's far corner is within half its width's diagonal of the pole's line.
        assert!((far.coords - tip).norm() < 0.08, "{far} vs {tip}");
    }

    #[test]
    fn a_sun_on_the_horizon_casts_no_outline_on_the_ground_and_does_not_fail() {
        // A sun 6e-9 degrees up (s.z = 1e-10, below EDGE_ON): the level ground is edge-on
        // to it and receives nothing; a lone horizontal triangle once took the ground's
        // place in the list and read past its end. A direction that is not a number casts
        // nothing.
        let site = site("Block(at: Centre(0, 0), width: 2, depth: 2, height: 3)");
        let low = Vector3::new(1.0, 0.3, 1e-10);
        assert!(shadow_outlines(&site, &low)
            .iter()
            .all(|l| l.start.z.abs() > 1e-9 || l.end.z.abs() > 1e-9));
        let mut flat = site.clone();
        flat.faces.truncate(0);
        flat.faces.push(Face {
            corners: [
                Point3::new(0.0, 0.0, 1.0),
                Point3::new(1.0, 0.0, 1.0),
                Point3::new(0.0, 1.0, 1.0),
            ],
            item: ItemId(0),
            slack: 0.0,
        });
        assert!(shadow_outlines(&flat, &low).is_empty());
        assert!(shadow_outlines(&site, &Vector3::new(f64::NAN, 0.0, 1.0)).is_empty());
    }

    #[test]
    fn hatching_lies_in_shadow_by_a_ray_cast() {
        let site = site("Block(at: Corner(0, 0), width: 4, depth: 3, height: 5)");
        let s = sun(200.0, 40.0);
        let lines = hatching(&site, &s, 0.5);
        let on_ground: Vec<_> = lines.iter().filter(|l| l.start.z.abs() < 1e-9).collect();
        assert!(on_ground.len() > 5, "{}", on_ground.len());
        for line in on_ground {
            let middle = line.start + (line.end - line.start) * 0.5;
            assert!(shaded(&site, &middle, &Vector3::z(), &s), "{line:?}");
            // Just beyond either end along the line, the ground is lit (unless the end is
            // at the block's foot, where the line meets the wall).
            let along = (line.end - line.start).normalize() * 0.01;
            for (end, out) in [(line.end, along), (line.start, -along)] {
                let beyond = end + out;
                let at_foot =
                    (-0.02..=4.02).contains(&beyond.x) && (-0.02..=3.02).contains(&beyond.y);
                assert!(
                    at_foot || !shaded(&site, &beyond, &Vector3::z(), &s),
                    "{line:?}"
                );
            }
        }
    }

    #[test]
    fn hatching_through_the_sun_view_is_hatching_through_the_hierarchy() {
        // The sun's view only skips faces a ray cannot meet: the hatching is the same
        // lines, in the same order, as with the rays cast through the hierarchy, for suns
        // high and low over blocks, a round tower and a vault, on faces and the ground.
        let site = site(BLOCKS_TOWER_AND_VAULT);
        let bvh = Bvh::new(&site.faces);
        for (azimuth, elevation) in [(140.0, 35.0), (250.0, 8.0), (10.0, 60.0)] {
            let s = sun(azimuth, elevation);
            let fast = hatch_lines(&site, &s, 0.4, None);
            let every = hatch_lines(&site, &s, 0.4, Some(&bvh));
            assert!(every.len() > 100, "{}", every.len());
            assert!(every.iter().any(|l| l.start.z.abs() < 1e-9));
            assert_eq!(fast, every, "sun at {azimuth}, {elevation}");
        }
    }

    #[test]
    fn an_image_rules_out_only_points_outside_it() {
        // A right triangle (0,0), (4,0), (0,3), either way round: points inside or on a
        // side are within it, points beyond a side by more than a hair are out (plane
        // geometry: the distance to a side is the dot product with its unit normal).
        let (a, b, c) = (
            Vector2::new(0.0, 0.0),
            Vector2::new(4.0, 0.0),
            Vector2::new(0.0, 3.0),
        );
        for sides in [image_sides(a, b, c), image_sides(a, c, b)] {
            let sides = sides.unwrap();
            let distance_out = |q: Vector2<f64>| {
                sides
                    .iter()
                    .map(|(n, o)| o - n.dot(&q))
                    .fold(f64::NEG_INFINITY, f64::max)
            };
            assert!(distance_out(Vector2::new(1.0, 1.0)) < 0.0);
            assert!(distance_out(Vector2::new(2.0, 1.5)).abs() < 1e-12); // on the slope
            assert!((distance_out(Vector2::new(1.0, -0.5)) - 0.5).abs() < 1e-12);
            // Beyond the slope 3x + 4y = 12 by 1: (3, 4) / 5 from its point (2, 1.5).
            assert!((distance_out(Vector2::new(2.6, 2.3)) - 1.0).abs() < 1e-12);
        }
        // Edge-on to the sun: no image to rule anything out by.
        assert!(image_sides(a, b, Vector2::new(8.0, 1e-9)).is_none());
    }

    #[test]
    fn a_segment_meets_a_box_where_a_point_of_it_lies_inside() {
        // Against points along the segment (every 1/2000 of it) inside the closed box
        // from (1, 1) to (3, 2): through, beside, ending inside, along a side, a corner
        // touched, level and upright, and a point. Plane geometry.
        let (lo, hi) = (Vector2::new(1.0, 1.0), Vector2::new(3.0, 2.0));
        let v = Vector2::new;
        let cases = [
            (v(0.0, 0.0), v(4.0, 3.0), true),
            (v(0.0, 0.0), v(4.0, 0.5), false),
            (v(2.0, 1.5), v(9.0, 9.0), true),
            (v(0.0, 2.0), v(4.0, 2.0), true),
            (v(0.0, 2.0001), v(4.0, 2.0001), false),
            (v(0.0, 3.0), v(3.0, 0.0), true),
            (v(0.0, 3.5), v(3.5, 0.0), true),
            (v(0.0, 5.1), v(5.1, 0.0), false),
            (v(3.5, -1.0), v(3.5, 5.0), false),
            (v(2.5, -1.0), v(2.5, 5.0), true),
            (v(2.0, 1.2), v(2.0, 1.2), true),
            (v(0.5, 1.2), v(0.5, 1.2), false),
        ];
        for (a, b, expected) in cases {
            let inside = (0..=2000).any(|i| {
                let p = a + (b - a) * (i as f64 / 2000.0);
                (lo.x..=hi.x).contains(&p.x) && (lo.y..=hi.y).contains(&p.y)
            });
            assert_eq!(inside, expected, "{a} {b}");
            assert_eq!(segment_meets_box(a, b, lo, hi), expected, "{a} {b}");
            assert_eq!(segment_meets_box(b, a, lo, hi), expected, "{b} {a}");
        }
    }

    #[test]
    fn runs_find_their_ends() {
        let r = runs(0.0, 1.0, 10.0, |u| (0.3..0.62).contains(&u));
        assert_eq!(r.len(), 1);
        assert!(
            (r[0].0 - 0.3).abs() < 1e-6 && (r[0].1 - 0.62).abs() < 1e-6,
            "{r:?}"
        );
        assert_eq!(runs(0.2, 0.4, 10.0, |_| true), vec![(0.2, 0.4)]);
        assert!(runs(0.0, 1.0, 10.0, |_| false).is_empty());
    }
}
