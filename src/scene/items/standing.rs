//! How a building with `on_ground: true` meets the scene's sloping ground: the ground's
//! heights under its plan, the foot line where its walls meet the ground, and the plinth
//! that carries a level floor over the slope. Shared by `Block` and `Footprint`.
//!
//! The plinth is our answer to "a block on a slope": the floor is level at the highest
//! ground under the plan, and below it the plinth runs down to the ground, its face closed
//! along the foot line. Course lines, every `course` metres down from the floor, run round
//! the plinth and each stops where the ground rises to meet it, so the plinth reads as
//! stepping down the slope in courses, as a sketcher draws a stone base on a hillside.
//!
//! Every other item with a plan outline (an arcade's piers, a flight of stairs, a room, a
//! vault) stands the same way with `on_ground: true` ([`outline_foot`], [`draw_footing`]);
//! rooms and vaults may take a plinth too. A round item (a column, a tower, a dome) stands
//! at the lowest ground round its rim, and its foot line is exact: a vertical cylinder
//! meets each flat triangle of the ground in an arc of an ellipse ([`Rim`]).
//!
//! Things that stand at one point (a figure, a car, a tree) stand on the ground under that
//! point unless given a `base` ([`foot_at`]); a given `base` is a height in the item's
//! frame, as a block's without `on_ground`, and one sunk in the ground is refused.

use super::super::build::{ItemBuilder, Placement};
use super::super::ground::Ground;
use super::super::numbers::{zero, Finite, Positive};
use nalgebra::{Point3, Vector2, Vector3};
use serde::Deserialize;
use std::f64::consts::TAU;

/// Below this (metres, in the builder's frame) a height difference is no difference: a
/// course line this close to the ground is not drawn, a plinth corner this short is none.
const LEVEL_EPSILON: f64 = 1e-9;

/// Course lines beyond this many on one plinth are refused (a course of a millimetre on a
/// steep hill would be a grey smear, and slow).
pub const MAX_COURSES: usize = 1000;

/// Metres: how far a thing's given foot may lie under the scene's ground before it is
/// refused. A few centimetres, as the ground's own faces may hide lines
/// that far behind them (its slack): less is rounding or a kerb, more is a mistake.
pub const SUNK_TOLERANCE: f64 = 0.05;

/// A level plinth under a building on sloping ground.
#[derive(Clone, Copy, Debug, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct PlinthSpec {
    /// Height of one course: lines drawn round the plinth every `course` down from the
    /// floor, each stopping where the ground meets it. None: only the plinth's top and foot.
    #[serde(default)]
    pub course: Option<Positive>,
    /// How far the plinth stands out beyond the walls, a ledge round the building at its
    /// floor (negative: set back under them, the building overhanging it).
    #[serde(default = "zero")]
    pub projection: Finite,
}

impl Default for PlinthSpec {
    fn default() -> Self {
        PlinthSpec {
            course: None,
            projection: Finite(0.0),
        }
    }
}

/// The height of the foot of a building of `plan` (corners in `frame`) standing on the
/// ground, `base` above it: the lowest ground along its walls, or with a plinth the
/// highest ground under the building and under the plinth (so neither is sunk in the
/// slope).
pub fn standing_base(
    b: &ItemBuilder,
    frame: &Placement,
    plan: &[Vector2<f64>],
    base: f64,
    plinth: Option<&PlinthSpec>,
) -> Result<f64, String> {
    let (lowest, mut highest) = ground_under(b, frame, plan)?;
    match plinth {
        None => Ok(lowest + base),
        Some(plinth) => {
            let outline = plinth_outline(plan, plinth)?;
            highest = highest.max(ground_under(b, frame, &outline)?.1);
            plinth_floor(highest, base)
        }
    }
}

/// The foot of an item with a plan outline (corners in `frame`): `base` as written, or
/// with `on_ground` measured from the ground under it as a block's is ([`standing_base`]).
/// A plinth stands only on the ground.
pub fn outline_foot(
    b: &ItemBuilder,
    frame: &Placement,
    plan: &[Vector2<f64>],
    base: f64,
    on_ground: bool,
    plinth: Option<&PlinthSpec>,
) -> Result<f64, String> {
    if plinth.is_some() && !on_ground {
        return Err("a `plinth` needs `on_ground: true`".to_owned());
    }
    if !on_ground {
        return Ok(base);
    }
    standing_base(b, frame, plan, base, plinth)
}

/// Draws what an item with a plan outline stands on, once the builder is at its foot
/// (see [`outline_foot`]): its plinth, or the line where its walls meet the ground.
pub fn draw_footing(
    b: &mut ItemBuilder,
    plan: &[Vector2<f64>],
    on_ground: bool,
    plinth: Option<&PlinthSpec>,
) -> Result<(), String> {
    match plinth {
        Some(plinth) => build_plinth(b, plan, plinth)?,
        None if on_ground => draw_foot(b, plan),
        None => {}
    }
    Ok(())
}

/// The plinth's plan: the building's `plan` with every side moved out by the projection
/// (in by a setback), each corner where the moved sides meet (a mitred offset). Refused
/// when a setback is so deep that the outline turns inside out or crosses itself.
pub fn plinth_outline(
    plan: &[Vector2<f64>],
    plinth: &PlinthSpec,
) -> Result<Vec<Vector2<f64>>, String> {
    let distance = plinth.projection.0;
    if distance == 0.0 {
        return Ok(plan.to_vec());
    }
    offset_outline(plan, distance).ok_or_else(|| {
        format!(
            "a plinth set back {} under this plan turns inside out; give a smaller setback",
            -distance
        )
    })
}

/// A simple polygon with every side moved `distance` outwards (negative: inwards), the
/// corners mitred: the new corner k is where the moved sides before and after it meet,
/// `p + d (n1 + n2) / (1 + n1 . n2)` for the sides' outward unit normals n1 and n2 (the
/// point at distance d from both lines). `None` if a side would turn round or the outline
/// would cross itself, or two sides at a corner are parallel and opposite.
pub fn offset_outline(plan: &[Vector2<f64>], distance: f64) -> Option<Vec<Vector2<f64>>> {
    let n = plan.len();
    let area2: f64 = (0..n).map(|k| plan[k].perp(&plan[(k + 1) % n])).sum();
    // Outward normal of the side from a to b: to its right for a counter-clockwise plan.
    let outward = |a: Vector2<f64>, b: Vector2<f64>| {
        let d = (b - a).normalize();
        let right = Vector2::new(d.y, -d.x);
        if area2 > 0.0 {
            right
        } else {
            -right
        }
    };
    let mut moved = Vec::with_capacity(n);
    for k in 0..n {
        let (before, at, after) = (plan[(k + n - 1) % n], plan[k], plan[(k + 1) % n]);
        let (n1, n2) = (outward(before, at), outward(at, after));
        let cos = n1.dot(&n2);
        if cos <= -1.0 + 1e-9 {
            return None;
        }
        moved.push(at + (n1 + n2) * (distance / (1.0 + cos)));
    }
    // Every side keeps its direction, and no two sides cross.
    for k in 0..n {
        let (a, b) = (plan[k], plan[(k + 1) % n]);
        let (p, q) = (moved[k], moved[(k + 1) % n]);
        if (q - p).dot(&(b - a)) <= 0.0 {
            return None;
        }
    }
    let crosses = |a: Vector2<f64>, b: Vector2<f64>, c: Vector2<f64>, d: Vector2<f64>| {
        let side = |p: Vector2<f64>, q: Vector2<f64>, r: Vector2<f64>| (q - p).perp(&(r - p));
        side(a, b, c) * side(a, b, d) < 0.0 && side(c, d, a) * side(c, d, b) < 0.0
    };
    for i in 0..n {
        for j in i + 2..n {
            if i == 0 && j == n - 1 {
                continue;
            }
            if crosses(moved[i], moved[(i + 1) % n], moved[j], moved[(j + 1) % n]) {
                return None;
            }
        }
    }
    Some(moved)
}

/// The lowest and highest ground under a plan, in the units of `frame` and measured from
/// its origin: the lowest along its walls (where a block without a plinth stands, so that
/// no wall stops short of the ground where a hollow crosses it between two corners), the
/// highest anywhere under the plan. The ground is flat on each triangle, so along a wall it
/// is lowest and highest at a corner or where the wall crosses a triangle's edge, and over
/// the plan it is highest at one of those or at a triangle's corner inside the plan (a
/// linear function on a convex polygon takes its extremes at vertices; the plan cut by the
/// triangles is such polygons).
pub fn ground_under(
    b: &ItemBuilder,
    frame: &Placement,
    plan: &[Vector2<f64>],
) -> Result<(f64, f64), String> {
    let Some(ground) = b.ground() else {
        return Err("has `on_ground: true` but the scene has no `ground`".to_owned());
    };
    let local = |z: f64| (z - frame.shift.z) / frame.scale;
    let site = |p: Vector2<f64>| {
        let q = frame.point(&Point3::new(p.x, p.y, 0.0));
        Vector2::new(q.x, q.y)
    };
    let mut lowest = f64::INFINITY;
    let mut highest = f64::NEG_INFINITY;
    for &p in plan {
        let q = site(p);
        let Some(z) = ground.height_at(q.x, q.y) else {
            return Err(format!(
                "stands on the ground, but its corner at ({:.2}, {:.2}) lies outside the ground",
                q.x, q.y
            ));
        };
        lowest = lowest.min(local(z));
        highest = highest.max(local(z));
    }
    for (k, &p) in plan.iter().enumerate() {
        let q = plan[(k + 1) % plan.len()];
        for t in ground.bends(site(p), site(q)) {
            let r = site(p + (q - p) * t);
            if let Some(z) = ground.height_at(r.x, r.y) {
                lowest = lowest.min(local(z));
                highest = highest.max(local(z));
            }
        }
    }
    let site_plan: Vec<Vector2<f64>> = plan.iter().map(|&p| site(p)).collect();
    for corner in ground.triangles.iter().flatten() {
        if inside(&site_plan, Vector2::new(corner.x, corner.y)) {
            highest = highest.max(local(corner.z));
        }
    }
    Ok((lowest, highest))
}

/// The height of the scene's ground under the plan point `at` of the builder's frame, in
/// that frame's units and measured from its origin; `None` without a ground or off it.
pub fn ground_at(b: &ItemBuilder, at: Vector2<f64>) -> Option<f64> {
    let place = b.placement();
    let q = place.point(&Point3::new(at.x, at.y, 0.0));
    let z = b.ground()?.height_at(q.x, q.y)?;
    Some((z - place.shift.z) / place.scale)
}

/// The foot of a thing standing at the plan point `at` (a figure, a car, a tree), in the
/// builder's frame: the `base` given, kept as written; or, with none, the ground under
/// `at` (0 where the scene has no ground or it does not reach, as before there was one).
/// A given base more than [`SUNK_TOLERANCE`] under the ground there is refused (the
/// caller adds the file, line and item): nothing stands inside the ground.
pub fn foot_at(b: &mut ItemBuilder, at: Vector2<f64>, base: Option<f64>) -> Result<f64, String> {
    let ground = ground_at(b, at);
    let Some(base) = base else {
        return Ok(ground.unwrap_or(0.0));
    };
    if let Some(ground) = ground {
        let sunk = b.placement().length(ground - base);
        if sunk > SUNK_TOLERANCE {
            let site = b.placement().point(&Point3::new(at.x, at.y, base));
            return Err(format!(
                "it stands {sunk:.2} m under the ground at ({:.2}, {:.2}): its `base` puts its \
                 foot at height {:.2}, the ground there is at {:.2}; leave `base` out to stand \
                 on the ground",
                site.x,
                site.y,
                site.z,
                site.z + sunk
            ));
        }
    }
    Ok(base)
}

/// Metres: a model's foot is its points within this of its lowest.
const FOOT_THICKNESS: f64 = 1e-3;

/// How far to raise a placed model (its points in the site frame) so that it stands on the
/// ground `base` metres up: its foot, the points within a millimetre of its lowest, on the
/// lowest ground under them (as a block stands at its lowest corner). A hollow of the
/// ground between two of its corners may dip lower; no plinth is drawn.
pub fn model_lift(
    ground: Option<&Ground>,
    placed: &[Point3<f64>],
    base: f64,
) -> Result<f64, String> {
    let Some(ground) = ground else {
        return Err("has `on_ground: true` but the scene has no `ground`".to_owned());
    };
    let lowest = placed.iter().map(|p| p.z).fold(f64::INFINITY, f64::min);
    let mut under = f64::INFINITY;
    for p in placed.iter().filter(|p| p.z <= lowest + FOOT_THICKNESS) {
        let Some(z) = ground.height_at(p.x, p.y) else {
            return Err(format!(
                "stands on the ground, but its foot at ({:.2}, {:.2}) lies outside the ground",
                p.x, p.y
            ));
        };
        under = under.min(z);
    }
    if !under.is_finite() {
        return Err("stands on the ground, but has no points to stand on".to_owned());
    }
    Ok(under + base - lowest)
}

/// The floor of a building on a plinth: `base` above the highest ground under it. A
/// negative `base` would sink the floor into the slope, under the plinth's own top.
pub fn plinth_floor(highest: f64, base: f64) -> Result<f64, String> {
    if base < 0.0 {
        return Err(format!(
            "a plinth's floor stands `base` above the highest ground under it, so `base` \
             must not be negative; found {base}"
        ));
    }
    Ok(highest + base)
}

/// Where the rim of a round item (an upright circle in plan, in site coordinates) meets
/// the ground: arcs round the circle, one over each flat piece of the ground it crosses.
///
/// Over a flat triangle whose plane is `z = height + gradient . (p - centre)`, the rim
/// point `centre + radius (cos t, sin t)` lies on the ground at
/// `z = height + radius (gradient.x cos t + gradient.y sin t)`: the foot line is
/// `C + U cos t + V sin t` with `C = (centre, height)`, `U = radius (1, 0, gradient.x)`,
/// `V = radius (0, 1, gradient.y)`, an arc of the ellipse in which the plane cuts the
/// cylinder (plane geometry), drawn exactly like any other.
#[derive(Clone, Debug, PartialEq)]
pub struct Rim {
    pub centre: Vector2<f64>,
    pub radius: f64,
    /// In order round the circle (counter-clockwise from `arcs[0].start`), covering it.
    pub arcs: Vec<RimArc>,
}

/// One arc of a [`Rim`]: the angles `start` through `sweep` (radians counter-clockwise
/// from east), over a flat piece of ground.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct RimArc {
    pub start: f64,
    pub sweep: f64,
    /// The piece's plane: its height over the rim's centre, and its rise per metre east
    /// and north.
    pub height: f64,
    pub gradient: Vector2<f64>,
}

impl Rim {
    /// The rim of `radius` about `centre` on the ground, or what is wrong: it must lie on
    /// the ground all round.
    ///
    /// The arcs end where the circle crosses an edge of the ground's triangles (a line
    /// crossing a circle: the roots of a quadratic); between two such angles the rim lies
    /// in one triangle, found at the arc's middle. Neighbouring arcs over one plane are
    /// joined, so a rim on a plane is one whole ellipse.
    pub fn on(ground: &Ground, centre: Vector2<f64>, radius: f64) -> Result<Rim, String> {
        let mut angles = rim_crossings(ground, centre, radius);
        if angles.is_empty() {
            angles.push(0.0);
        }
        let mut arcs: Vec<RimArc> = Vec::with_capacity(angles.len());
        for (k, &start) in angles.iter().enumerate() {
            let end = angles.get(k + 1).copied().unwrap_or(angles[0] + TAU);
            let middle = centre + plan_at((start + end) / 2.0) * radius;
            let Some(triangle) = ground.triangle_at(middle.x, middle.y) else {
                return Err(format!(
                    "stands on the ground, but its rim at ({:.2}, {:.2}) lies outside the \
                     ground",
                    middle.x, middle.y
                ));
            };
            let (height, gradient) = plane_over(triangle, centre);
            let arc = RimArc {
                start,
                sweep: end - start,
                height,
                gradient,
            };
            match arcs.last_mut() {
                Some(last) if last.same_plane(&arc) => last.sweep += arc.sweep,
                _ => arcs.push(arc),
            }
        }
        if arcs.len() > 1 && arcs[0].same_plane(&arcs[arcs.len() - 1]) {
            let last = arcs.pop().expect("more than one arc");
            arcs[0].start = last.start;
            arcs[0].sweep += last.sweep;
        }
        Ok(Rim {
            centre,
            radius,
            arcs,
        })
    }

    /// The lowest ground round the rim: on each arc at an end, or where the rim runs
    /// straight down the slope, at `-gradient` from the centre (the derivative of
    /// `gradient . (cos t, sin t)` vanishes there).
    pub fn lowest(&self) -> f64 {
        let mut lowest = f64::INFINITY;
        for arc in &self.arcs {
            let at = |t: f64| arc.height + self.radius * arc.gradient.dot(&plan_at(t));
            lowest = lowest.min(at(arc.start)).min(at(arc.start + arc.sweep));
            if arc.gradient != Vector2::zeros() {
                let down = (-arc.gradient.y).atan2(-arc.gradient.x);
                if (down - arc.start).rem_euclid(TAU) <= arc.sweep {
                    lowest = lowest.min(at(down));
                }
            }
        }
        lowest
    }

    /// Draws the foot line, each arc as its exact ellipse, through a builder of any
    /// placement.
    pub fn draw(&self, b: &mut ItemBuilder) {
        let place = b.placement();
        for arc in &self.arcs {
            let r = self.radius;
            let centre = Point3::new(self.centre.x, self.centre.y, arc.height);
            let u = Vector3::new(r, 0.0, r * arc.gradient.x);
            let v = Vector3::new(0.0, r, r * arc.gradient.y);
            b.ellipse(
                place.local_point(&centre),
                place.local_vector(&u),
                place.local_vector(&v),
                arc.start,
                arc.sweep,
            );
        }
    }
}

impl RimArc {
    fn same_plane(&self, other: &RimArc) -> bool {
        let close = |a: f64, b: f64| (a - b).abs() <= 1e-12 * (1.0 + a.abs().max(b.abs()));
        close(self.height, other.height)
            && close(self.gradient.x, other.gradient.x)
            && close(self.gradient.y, other.gradient.y)
    }
}

/// The unit plan direction at `angle` radians counter-clockwise from east.
fn plan_at(angle: f64) -> Vector2<f64> {
    Vector2::new(angle.cos(), angle.sin())
}

/// The angles (in [0, 2 pi), in order, each once) at which the circle of `radius` about
/// `centre` crosses an edge of the ground's triangles: `|p + s (q - p) - centre| = radius`
/// for s in [0, 1], a quadratic in s.
fn rim_crossings(ground: &Ground, centre: Vector2<f64>, radius: f64) -> Vec<f64> {
    let mut angles = Vec::new();
    for triangle in &ground.triangles {
        let corners = triangle.map(|p| Vector2::new(p.x, p.y));
        let far = |f: fn(&Vector2<f64>) -> f64, reach: f64| {
            corners.iter().all(|p| f(p) - f(&centre) > reach)
        };
        if far(|p| p.x, radius)
            || far(|p| -p.x, radius)
            || far(|p| p.y, radius)
            || far(|p| -p.y, radius)
        {
            continue;
        }
        for k in 0..3 {
            let (p, q) = (corners[k], corners[(k + 1) % 3]);
            let (d, f) = (q - p, p - centre);
            let a = d.norm_squared();
            let half_b = f.dot(&d);
            let c = f.norm_squared() - radius * radius;
            let discriminant = half_b * half_b - a * c;
            if a == 0.0 || discriminant < 0.0 {
                continue;
            }
            for s in [-1.0, 1.0].map(|sign| (-half_b + sign * discriminant.sqrt()) / a) {
                if (-1e-12..=1.0 + 1e-12).contains(&s) {
                    let at = f + d * s;
                    angles.push(at.y.atan2(at.x).rem_euclid(TAU));
                }
            }
        }
    }
    angles.sort_by(f64::total_cmp);
    angles.dedup_by(|a, b| (*a - *b).abs() < 1e-12);
    if angles.len() > 1 && angles[angles.len() - 1] - angles[0] > TAU - 1e-12 {
        angles.pop();
    }
    angles
}

/// The plane of a triangle of the ground, as its height over `centre` and its gradient
/// (rise per metre east and north): from the normal `n = (b - a) x (c - a)`, the gradient
/// is `-(n.x, n.y) / n.z` (a plane's equation n . (p - a) = 0 solved for z).
pub fn plane_over(triangle: &[Point3<f64>; 3], centre: Vector2<f64>) -> (f64, Vector2<f64>) {
    let [a, b, c] = *triangle;
    let n = (b - a).cross(&(c - a));
    let gradient = Vector2::new(-n.x / n.z, -n.y / n.z);
    (a.z + gradient.dot(&(centre - a.coords.xy())), gradient)
}

/// The foot of a round item of `radius` about the plan point `centre` (in the builder's
/// frame): `base` as written; or with `on_ground`, `base` above the lowest ground round its
/// rim, and the rim to draw there.
pub fn round_foot(
    b: &ItemBuilder,
    centre: Vector2<f64>,
    radius: f64,
    base: f64,
    on_ground: bool,
) -> Result<(f64, Option<Rim>), String> {
    if !on_ground {
        return Ok((base, None));
    }
    let Some(ground) = b.ground() else {
        return Err("has `on_ground: true` but the scene has no `ground`".to_owned());
    };
    let place = b.placement();
    let site = place.point(&Point3::new(centre.x, centre.y, 0.0));
    let rim = Rim::on(ground, site.coords.xy(), place.length(radius))?;
    let lowest = (rim.lowest() - place.shift.z) / place.scale;
    Ok((lowest + base, Some(rim)))
}

/// Whether `p` lies strictly inside the polygon (crossing number: a ray to +x crosses the
/// outline an odd number of times; O'Rourke, Computational Geometry in C, 7.4).
fn inside(polygon: &[Vector2<f64>], p: Vector2<f64>) -> bool {
    let mut odd = false;
    for (k, &a) in polygon.iter().enumerate() {
        let b = polygon[(k + 1) % polygon.len()];
        if (a.y > p.y) != (b.y > p.y) {
            let x = a.x + (p.y - a.y) / (b.y - a.y) * (b.x - a.x);
            if x > p.x {
                odd = !odd;
            }
        }
    }
    odd
}

/// The foot of each wall of a plan (corners in the builder's frame): where the wall meets
/// the ground, from its first corner to the next, a point at each end and wherever the wall
/// crosses an edge of the ground's triangles, each at the ground's height there. A vertical
/// wall meets each flat triangle in a straight line (two planes meet in a line), so between
/// those points the foot is straight and lies on the ground. In the builder's frame.
pub fn wall_feet(b: &ItemBuilder, plan: &[Vector2<f64>]) -> Vec<Vec<Point3<f64>>> {
    let place = b.placement();
    let Some(ground) = b.ground() else {
        return Vec::new();
    };
    let site = |p: Vector2<f64>| {
        let q = place.point(&Point3::new(p.x, p.y, 0.0));
        Vector2::new(q.x, q.y)
    };
    // Back from the site's heights to the frame's (the frame keeps the vertical).
    let lift = |p: Vector2<f64>| {
        let q = site(p);
        let z = ground.height_at(q.x, q.y).unwrap_or(place.shift.z);
        Point3::new(p.x, p.y, (z - place.shift.z) / place.scale)
    };
    plan.iter()
        .enumerate()
        .map(|(k, &p)| {
            let q = plan[(k + 1) % plan.len()];
            let mut foot = vec![lift(p)];
            foot.extend(
                ground
                    .bends(site(p), site(q))
                    .into_iter()
                    .map(|t| lift(p + (q - p) * t)),
            );
            foot.push(lift(q));
            foot
        })
        .collect()
}

/// Draws the line where the walls of a plan meet the ground, as one closed path.
pub fn draw_foot(b: &mut ItemBuilder, plan: &[Vector2<f64>]) {
    let mut line = Vec::new();
    for foot in wall_feet(b, plan) {
        line.extend_from_slice(&foot[..foot.len() - 1]);
    }
    if !line.is_empty() {
        b.path(&line, true);
    }
}

/// Draws a plinth under a floor at the builder's z = 0, under a building whose plan
/// (corners in the builder's frame) stands over ground no higher than the floor: the foot
/// line, a face for each side closed along its foot (so it hides what is behind it, and
/// nothing below the ground is a face), the corners down to the ground and the course
/// lines; with a projection or setback, the plinth's own outline at the floor and the
/// ledge (or the overhang's underside) between it and the walls, a face with the walls'
/// plan as its hole.
pub fn build_plinth(
    b: &mut ItemBuilder,
    building: &[Vector2<f64>],
    spec: &PlinthSpec,
) -> Result<(), String> {
    let outline = plinth_outline(building, spec)?;
    let plan = outline.as_slice();
    if spec.projection.0 != 0.0 {
        let at_floor = |points: &[Vector2<f64>]| -> Vec<Point3<f64>> {
            points.iter().map(|p| Point3::new(p.x, p.y, 0.0)).collect()
        };
        let (outer, inner) = if spec.projection.0 > 0.0 {
            (at_floor(plan), at_floor(building))
        } else {
            (at_floor(building), at_floor(plan))
        };
        b.path(&at_floor(plan), true);
        b.face(&outer, &[inner]);
    }
    let feet = wall_feet(b, plan);
    let deepest = feet.iter().flatten().map(|p| p.z).fold(0.0_f64, f64::min);
    let courses = match spec.course {
        Some(course) => {
            let count = (-deepest / course.0 - LEVEL_EPSILON).floor().max(0.0) as usize;
            if count > MAX_COURSES {
                return Err(format!(
                    "a plinth course of {} makes {count} course lines over the slope \
                     (at most {MAX_COURSES}); give a larger `course`",
                    course.0
                ));
            }
            (1..=count).map(|k| -(k as f64) * course.0).collect()
        }
        None => Vec::new(),
    };
    draw_foot(b, plan);
    for foot in &feet {
        let (first, last) = (foot[0], foot[foot.len() - 1]);
        let top = |p: Point3<f64>| Point3::new(p.x, p.y, 0.0);
        if first.z < -LEVEL_EPSILON {
            b.segment(top(first), first);
        }
        // Top edge along the floor, then back along the foot: one flat face.
        let mut face = vec![top(first), top(last)];
        face.extend(foot.iter().rev().copied());
        face.dedup_by(|p, q| (*p - *q).norm() < LEVEL_EPSILON);
        if face.len() > 1 && (face[0] - face[face.len() - 1]).norm() < LEVEL_EPSILON {
            face.pop();
        }
        if face.len() >= 3 {
            b.face(&face, &[]);
        }
        for &level in &courses {
            for (start, end) in above_ground(foot, level) {
                b.segment(start, end);
            }
        }
    }
    Ok(())
}

/// The stretches of a horizontal line at `level`, running along a wall whose foot is
/// `foot`, that lie above the ground: where the foot is below the level. The foot is
/// straight between its points, so each stretch ends where a straight piece of it crosses
/// the level (linear interpolation).
pub fn above_ground(foot: &[Point3<f64>], level: f64) -> Vec<(Point3<f64>, Point3<f64>)> {
    let at = |p: Point3<f64>| Point3::new(p.x, p.y, level);
    let below = |p: &Point3<f64>| p.z < level - LEVEL_EPSILON;
    let mut stretches = Vec::new();
    let mut start = below(&foot[0]).then(|| at(foot[0]));
    for pair in foot.windows(2) {
        let (p, q) = (pair[0], pair[1]);
        let crossing = || {
            let t = (level - p.z) / (q.z - p.z);
            at(p + (q - p) * t)
        };
        match (below(&p), below(&q), start) {
            (true, false, Some(s)) => {
                stretches.push((s, crossing()));
                start = None;
            }
            (false, true, _) => start = Some(crossing()),
            _ => {}
        }
    }
    if let Some(s) = start {
        stretches.push((s, at(foot[foot.len() - 1])));
    }
    stretches
}

#[cfg(test)]
mod tests {
    use super::*;

    fn outline(points: &[(f64, f64)]) -> Vec<Vector2<f64>> {
        points.iter().map(|&(x, y)| Vector2::new(x, y)).collect()
    }

    fn assert_outline(got: &[Vector2<f64>], expected: &[(f64, f64)]) {
        assert_eq!(got.len(), expected.len());
        for (g, e) in got.iter().zip(expected) {
            assert!(
                (g.x - e.0).abs() < 1e-12 && (g.y - e.1).abs() < 1e-12,
                "{got:?}"
            );
        }
    }

    #[test]
    fn a_rectangle_moved_out_and_in_by_hand() {
        // Every side 0.5 further out: a 10 x 6 rectangle becomes 11 x 7 about the same
        // centre; in, 9 x 5. Either way round the plan is given.
        let plan = outline(&[(0.0, 0.0), (10.0, 0.0), (10.0, 6.0), (0.0, 6.0)]);
        let out = offset_outline(&plan, 0.5).unwrap();
        assert_outline(
            &out,
            &[(-0.5, -0.5), (10.5, -0.5), (10.5, 6.5), (-0.5, 6.5)],
        );
        let reversed: Vec<_> = plan.iter().rev().copied().collect();
        let out = offset_outline(&reversed, 0.5).unwrap();
        assert_outline(
            &out,
            &[(-0.5, 6.5), (10.5, 6.5), (10.5, -0.5), (-0.5, -0.5)],
        );
        let inward = offset_outline(&plan, -0.5).unwrap();
        assert_outline(&inward, &[(0.5, 0.5), (9.5, 0.5), (9.5, 5.5), (0.5, 5.5)]);
        // Set back 3.5 under a plan 6 deep: the sides would pass each other.
        assert!(offset_outline(&plan, -3.5).is_none());
    }

    #[test]
    fn an_l_plan_moves_its_inner_corner_too() {
        // The re-entrant corner at (4, 4) moves out along both its sides' normals to
        // (5, 5); the convex corners diagonally by 1 each way (by hand).
        let plan = outline(&[
            (0.0, 0.0),
            (10.0, 0.0),
            (10.0, 4.0),
            (4.0, 4.0),
            (4.0, 10.0),
            (0.0, 10.0),
        ]);
        let out = offset_outline(&plan, 1.0).unwrap();
        assert_outline(
            &out,
            &[
                (-1.0, -1.0),
                (11.0, -1.0),
                (11.0, 5.0),
                (5.0, 5.0),
                (5.0, 11.0),
                (-1.0, 11.0),
            ],
        );
        // The arms are 4 wide: a setback of 2.5 turns them inside out.
        assert!(offset_outline(&plan, -2.5).is_none());
        assert!(offset_outline(&plan, -1.5).is_some());
    }

    fn assert_near(a: f64, b: f64, tolerance: f64) {
        assert!((a - b).abs() <= tolerance, "{a} vs {b}");
    }

    #[test]
    fn a_course_line_stops_where_the_ground_rises_to_it() {
        // A foot rising 0 -> -2 -> 0 (a valley under the wall), a course at -1: by similar
        // triangles it is above ground from a quarter to three quarters of the way.
        let foot = [
            Point3::new(0.0, 0.0, 0.0),
            Point3::new(4.0, 0.0, -2.0),
            Point3::new(8.0, 0.0, 0.0),
        ];
        let stretches = above_ground(&foot, -1.0);
        assert_eq!(stretches.len(), 1);
        assert_near(stretches[0].0.x, 2.0, 1e-12);
        assert_near(stretches[0].1.x, 6.0, 1e-12);
        assert_near(stretches[0].0.z, -1.0, 1e-12);
    }

    #[test]
    fn a_course_line_above_all_the_ground_runs_the_whole_wall() {
        let foot = [Point3::new(0.0, 0.0, -3.0), Point3::new(5.0, 0.0, -2.0)];
        let stretches = above_ground(&foot, -1.0);
        assert_eq!(stretches.len(), 1);
        assert_near(stretches[0].0.x, 0.0, 1e-12);
        assert_near(stretches[0].1.x, 5.0, 1e-12);
        assert!(above_ground(&foot, -3.5).is_empty());
    }

    #[test]
    fn a_course_line_over_a_ridge_breaks_in_two() {
        let foot = [
            Point3::new(0.0, 0.0, -2.0),
            Point3::new(2.0, 0.0, 0.0),
            Point3::new(4.0, 0.0, -2.0),
        ];
        let stretches = above_ground(&foot, -1.0);
        assert_eq!(stretches.len(), 2);
        assert_near(stretches[0].1.x, 1.0, 1e-12);
        assert_near(stretches[1].0.x, 3.0, 1e-12);
    }

    #[test]
    fn a_triangle_plane_worked_by_hand() {
        // Through (0, 0, 1), (40, 0, 3) and (0, 40, 9): z = 1 + x / 20 + y / 5, so 3.5 over
        // (10, 10), rising 0.05 east and 0.2 north.
        let triangle = [
            Point3::new(0.0, 0.0, 1.0),
            Point3::new(40.0, 0.0, 3.0),
            Point3::new(0.0, 40.0, 9.0),
        ];
        let (height, gradient) = plane_over(&triangle, Vector2::new(10.0, 10.0));
        assert_near(height, 3.5, 1e-12);
        assert_near(gradient.x, 0.05, 1e-15);
        assert_near(gradient.y, 0.2, 1e-15);
    }

    #[test]
    fn a_rim_is_lowest_straight_down_the_slope_or_at_an_arc_end() {
        // The plane above, a rim of radius 2 about (10, 10): all round, lowest 2 |gradient|
        // below the centre's height; on the quarter from east to north (uphill of it),
        // lowest at its east end, 3.5 + 2 x 0.05.
        let arc = |start: f64, sweep: f64| RimArc {
            start,
            sweep,
            height: 3.5,
            gradient: Vector2::new(0.05, 0.2),
        };
        let rim = |arcs: Vec<RimArc>| Rim {
            centre: Vector2::new(10.0, 10.0),
            radius: 2.0,
            arcs,
        };
        assert_near(
            rim(vec![arc(1.0, TAU)]).lowest(),
            3.5 - 2.0 * 0.0425f64.sqrt(),
            1e-12,
        );
        assert_near(rim(vec![arc(0.0, TAU / 4.0)]).lowest(), 3.6, 1e-12);
    }

    #[test]
    fn inside_counts_crossings() {
        let square = [
            Vector2::new(0.0, 0.0),
            Vector2::new(2.0, 0.0),
            Vector2::new(2.0, 2.0),
            Vector2::new(0.0, 2.0),
        ];
        assert!(inside(&square, Vector2::new(1.0, 1.0)));
        assert!(!inside(&square, Vector2::new(3.0, 1.0)));
    }
}
