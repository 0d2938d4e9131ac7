//! A mass: walls standing on a plan outline, under a flat or pitched roof. Blocks and
//! footprints are both masses.
//!
//! A pitched roof is the lowest of the planes rising at their slopes from the sides of the
//! plan: z = eaves + min over sloped sides i of slope_i * d_i(p), d_i being the distance
//! from side i into the plan. For a convex plan this is the roof of equal-pitched planes
//! that a straight skeleton gives (Aichholzer, Aurenhammer, Alberts and Gaertner, "A novel
//! type of skeleton for polygons", J. Universal Computer Science 1(12), 1995, from memory);
//! with a gable end the side has no plane, so its wall rises to the ridge. Each roof face is
//! the part of the plan where its plane is the lowest: the plan cut by the half-planes
//! slope_i d_i <= slope_j d_j, which are straight lines because the d are affine.

use super::super::build::ItemBuilder;
use super::plan::{clip_polygon, simple_polygon_problem};
use super::walls::{build_walls, Opening, OpeningKind, Wall};
use nalgebra::{Point3, Vector2};

/// Walls on a counter-clockwise plan outline, from height 0, under a roof.
#[derive(Clone, Debug, PartialEq)]
pub struct Mass {
    pub plan: Vec<Vector2<f64>>,
    /// Height of the tops of the walls where the roof starts.
    pub eaves: f64,
    /// One slope (rise per run) for each side of the plan, or `None` for a gable end;
    /// empty for a flat roof. Side i runs from corner i to corner i + 1.
    pub slopes: Vec<Option<f64>>,
    /// A second plane on a side, `(rise, slope)`: starting `rise` above the eaves over the
    /// side's wall and rising at `slope`, so that the roof there is the lower of the two
    /// (a gambrel's or a mansard's upper, shallower slope, or a half-hip's small hip at the
    /// top of a gable end); empty, or `None` on a side, for none.
    pub upper: Vec<Option<(f64, f64)>>,
    /// How far the roof reaches out beyond the walls.
    pub overhang: f64,
    /// Height above the eaves and thickness of a parapet round a flat roof.
    pub parapet: Option<(f64, f64)>,
}

/// An affine function of the plan position: `at_origin + gradient . p`.
#[derive(Clone, Copy, Debug, PartialEq)]
struct Affine {
    at_origin: f64,
    gradient: Vector2<f64>,
}

impl Affine {
    fn at(&self, p: Vector2<f64>) -> f64 {
        self.at_origin + self.gradient.dot(&p)
    }
}

impl Mass {
    /// The roof planes' heights above the eaves: one for each sloped side, then the upper
    /// ones.
    fn planes(&self) -> Vec<Affine> {
        let n = self.plan.len();
        let plane = |i: usize, rise: f64, slope: f64| {
            let (start, end) = (self.plan[i], self.plan[(i + 1) % n]);
            let along = (end - start).normalize();
            let inward = Vector2::new(-along.y, along.x);
            Affine {
                at_origin: rise - slope * inward.dot(&start),
                gradient: inward * slope,
            }
        };
        let lower = self
            .slopes
            .iter()
            .enumerate()
            .filter_map(|(i, slope)| Some(plane(i, 0.0, (*slope)?)));
        let upper = self
            .upper
            .iter()
            .enumerate()
            .filter_map(|(i, upper)| upper.map(|(rise, slope)| plane(i, rise, slope)));
        lower.chain(upper).collect()
    }

    /// The height of the roof over a plan point.
    #[cfg(test)]
    pub fn roof_height(&self, p: Vector2<f64>) -> f64 {
        let planes = self.planes();
        let rise = planes
            .iter()
            .map(|plane| plane.at(p))
            .fold(f64::INFINITY, f64::min);
        self.eaves + if planes.is_empty() { 0.0 } else { rise }
    }

    /// The walls, one on each side of the plan, their tops following the roof (or the
    /// parapet).
    pub fn walls(&self) -> Vec<Wall> {
        let n = self.plan.len();
        let planes = self.planes();
        let lift = self.parapet.map_or(0.0, |(height, _)| height);
        (0..n)
            .map(|i| {
                let (start, end) = (self.plan[i], self.plan[(i + 1) % n]);
                let top = top_profile(start, end, &planes)
                    .into_iter()
                    .map(|(t, z)| (t, self.eaves + lift + z))
                    .collect();
                Wall { start, end, top }
            })
            .collect()
    }
}

/// The lowest of the planes along the line from `start` to `end`, as (distance, height)
/// at its ends and at every change of plane; zero height where there are no planes.
fn top_profile(start: Vector2<f64>, end: Vector2<f64>, planes: &[Affine]) -> Vec<(f64, f64)> {
    let length = (end - start).norm();
    if planes.is_empty() {
        return vec![(0.0, 0.0), (length, 0.0)];
    }
    let along = (end - start) / length;
    // Each plane is a straight line in t: value + rate * t.
    let lines: Vec<(f64, f64)> = planes
        .iter()
        .map(|p| (p.at(start), p.gradient.dot(&along)))
        .collect();
    let lowest = |t: f64| {
        lines
            .iter()
            .map(|(v, r)| v + r * t)
            .fold(f64::INFINITY, f64::min)
    };
    let mut breaks = vec![0.0, length];
    for (i, (v1, r1)) in lines.iter().enumerate() {
        for (v2, r2) in &lines[i + 1..] {
            if r1 != r2 {
                let t = (v2 - v1) / (r1 - r2);
                if t > 0.0 && t < length {
                    breaks.push(t);
                }
            }
        }
    }
    breaks.sort_by(f64::total_cmp);
    breaks.dedup();
    let points: Vec<(f64, f64)> = breaks.iter().map(|&t| (t, lowest(t))).collect();
    drop_straight_through(points)
}

/// Leaves out the inner points of a profile where it does not bend.
fn drop_straight_through(points: Vec<(f64, f64)>) -> Vec<(f64, f64)> {
    let mut kept: Vec<(f64, f64)> = Vec::with_capacity(points.len());
    for (i, &p) in points.iter().enumerate() {
        if i > 0 && i + 1 < points.len() {
            let (a, c) = (kept[kept.len() - 1], points[i + 1]);
            let bend = (p.0 - a.0) * (c.1 - a.1) - (p.1 - a.1) * (c.0 - a.0);
            if bend.abs() <= 1e-12 * (c.0 - a.0).abs().max(1.0) * (1.0 + p.1.abs()) {
                continue;
            }
        }
        kept.push(p);
    }
    kept
}

/// A simple polygon moved outwards (negative: inwards) by `distance`, each side parallel to
/// its original, meeting at mitred corners.
pub fn offset_polygon(plan: &[Vector2<f64>], distance: f64) -> Vec<Vector2<f64>> {
    let n = plan.len();
    let side = |i: usize| {
        let (start, end) = (plan[i % n], plan[(i + 1) % n]);
        let along = (end - start).normalize();
        // Outwards is the right of a counter-clockwise outline.
        let out = Vector2::new(along.y, -along.x);
        (start + out * distance, along)
    };
    (0..n)
        .map(|i| {
            let (p0, d0) = side(i + n - 1);
            let (p1, d1) = side(i);
            let denominator = d0.perp(&d1);
            if denominator.abs() < 1e-12 {
                // Straight through: the corner just moves out.
                p1
            } else {
                p0 + d0 * ((p1 - p0).perp(&d1) / denominator)
            }
        })
        .collect()
}

/// Draws a mass: its walls with their openings and storey lines, the roof, the floor.
pub fn build_mass(
    b: &mut ItemBuilder,
    mass: &Mass,
    walls: &[Wall],
    openings: &[Vec<Opening>],
    storeys: &[f64],
) -> Result<(), String> {
    let n = mass.plan.len();
    let at = |p: Vector2<f64>, z: f64| Point3::new(p.x, p.y, z);
    // The foot of the walls, the corners, the tops.
    for wall in walls {
        b.segment(wall.point(0.0, 0.0), wall.point(wall.length(), 0.0));
        b.segment(wall.point(0.0, 0.0), wall.point(0.0, wall.top[0].1));
        for pair in wall.top.windows(2) {
            b.segment(
                wall.point(pair[0].0, pair[0].1),
                wall.point(pair[1].0, pair[1].1),
            );
        }
    }
    build_walls(b, walls, openings, storeys, OpeningKind::Recess)?;
    let floor: Vec<Point3<f64>> = mass.plan.iter().map(|&p| at(p, 0.0)).collect();
    b.face(&floor, &[]);
    if let Some((height, thickness)) = mass.parapet {
        let inner = offset_polygon(&mass.plan, -thickness);
        if let Some(problem) = simple_polygon_problem(&inner) {
            return Err(format!("the parapet is too thick for the plan: {problem}"));
        }
        let top = mass.eaves + height;
        let outer_top: Vec<Point3<f64>> = mass.plan.iter().map(|&p| at(p, top)).collect();
        let inner_top: Vec<Point3<f64>> = inner.iter().map(|&p| at(p, top)).collect();
        let deck: Vec<Point3<f64>> = inner.iter().map(|&p| at(p, mass.eaves)).collect();
        b.path(&inner_top, true);
        b.path(&deck, true);
        for i in 0..n {
            b.segment(deck[i], inner_top[i]);
            let j = (i + 1) % n;
            b.face(&[deck[i], deck[j], inner_top[j], inner_top[i]], &[]);
        }
        b.face(&outer_top, &[inner_top]);
        b.face(&deck, &[]);
        return Ok(());
    }
    let eaves_plan = offset_polygon(&mass.plan, mass.overhang);
    let planes = mass.planes();
    if planes.is_empty() {
        let roof: Vec<Point3<f64>> = eaves_plan.iter().map(|&p| at(p, mass.eaves)).collect();
        b.path(&roof, true);
        b.face(&roof, &[]);
        soffits(b, mass, walls, &eaves_plan, &planes);
        return Ok(());
    }
    for (i, plane) in planes.iter().enumerate() {
        let mut region = eaves_plan.clone();
        for (j, other) in planes.iter().enumerate() {
            if i != j {
                region = clip_polygon(&region, |p| other.at(p) - plane.at(p));
            }
        }
        let region = tidy(region);
        if region.len() < 3 {
            continue;
        }
        let face: Vec<Point3<f64>> = region
            .iter()
            .map(|&p| at(p, mass.eaves + plane.at(p)))
            .collect();
        b.path(&face, true);
        b.face(&face, &[]);
    }
    soffits(b, mass, walls, &eaves_plan, &planes);
    Ok(())
}

/// The undersides of an overhanging roof: from the top of each wall out to the roof's
/// edge above it. With them the walls, floor and roof close one solid, the overhang
/// included, so a ray from inside crosses its surface an odd number of times.
fn soffits(
    b: &mut ItemBuilder,
    mass: &Mass,
    walls: &[Wall],
    eaves_plan: &[Vector2<f64>],
    planes: &[Affine],
) {
    if mass.overhang <= 0.0 {
        return;
    }
    let n = eaves_plan.len();
    for (i, wall) in walls.iter().enumerate() {
        let (start, end) = (eaves_plan[i], eaves_plan[(i + 1) % n]);
        let along = (end - start) / (end - start).norm();
        let mut outline: Vec<Point3<f64>> =
            wall.top.iter().map(|&(t, z)| wall.point(t, z)).collect();
        outline.extend(top_profile(start, end, planes).iter().rev().map(|&(t, z)| {
            let p = start + along * t;
            Point3::new(p.x, p.y, mass.eaves + z)
        }));
        b.face(&outline, &[]);
    }
}

/// A clipped polygon without repeated corners or corners in the middle of a straight side,
/// so that the sides shared by two roof faces come out the same in both.
fn tidy(points: Vec<Vector2<f64>>) -> Vec<Vector2<f64>> {
    let scale = points.iter().map(|p| p.abs().max()).fold(1.0, f64::max);
    let mut out: Vec<Vector2<f64>> = Vec::with_capacity(points.len());
    for p in points {
        if out.last().is_none_or(|q| (p - q).norm() > 1e-9 * scale) {
            out.push(p);
        }
    }
    while out.len() > 1 && (out[0] - out[out.len() - 1]).norm() <= 1e-9 * scale {
        out.pop();
    }
    let n = out.len();
    if n < 3 {
        return out;
    }
    (0..n)
        .filter(|&i| {
            let (a, p, c) = (out[(i + n - 1) % n], out[i], out[(i + 1) % n]);
            (p - a).perp(&(c - p)).abs() > 1e-12 * scale * scale
        })
        .map(|i| out[i])
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rectangle(w: f64, d: f64) -> Vec<Vector2<f64>> {
        vec![
            Vector2::new(0.0, 0.0),
            Vector2::new(w, 0.0),
            Vector2::new(w, d),
            Vector2::new(0.0, d),
        ]
    }

    #[test]
    fn gable_end_wall_rises_to_the_ridge() {
        // 10 x 6 plan, eaves 4, ridge along the width 3 above the eaves: slope 3 / 3.
        let mass = Mass {
            plan: rectangle(10.0, 6.0),
            eaves: 4.0,
            slopes: vec![Some(1.0), None, Some(1.0), None],
            upper: Vec::new(),
            overhang: 0.0,
            parapet: None,
        };
        let walls = mass.walls();
        assert_eq!(walls[0].top, vec![(0.0, 4.0), (10.0, 4.0)]);
        assert_eq!(walls[1].top, vec![(0.0, 4.0), (3.0, 7.0), (6.0, 4.0)]);
        assert_eq!(mass.roof_height(Vector2::new(5.0, 3.0)), 7.0);
    }

    #[test]
    fn hip_roof_ridge_is_the_length_less_the_span() {
        // Equal pitches on a 10 x 6 plan: the ridge runs from x = 3 to x = 7.
        let mass = Mass {
            plan: rectangle(10.0, 6.0),
            eaves: 0.0,
            slopes: vec![Some(1.0); 4],
            upper: Vec::new(),
            overhang: 0.0,
            parapet: None,
        };
        assert_eq!(mass.roof_height(Vector2::new(3.0, 3.0)), 3.0);
        assert_eq!(mass.roof_height(Vector2::new(7.0, 3.0)), 3.0);
        assert_eq!(mass.roof_height(Vector2::new(1.0, 3.0)), 1.0);
    }

    #[test]
    fn offset_of_a_square_is_a_bigger_square() {
        let bigger = offset_polygon(&rectangle(2.0, 2.0), 0.5);
        let expected = [(-0.5, -0.5), (2.5, -0.5), (2.5, 2.5), (-0.5, 2.5)];
        for (p, (x, y)) in bigger.iter().zip(expected) {
            assert!((p - Vector2::new(x, y)).norm() < 1e-12, "{bigger:?}");
        }
    }
}
