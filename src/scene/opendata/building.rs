//! A building (or building part) from a map footprint: walls raised on its rings from its
//! base to its eaves, and the roof its tags ask for.
//!
//! Flat roofs, and any footprint with a courtyard (a hole), are drawn as a prism: the rings
//! at the base and at the top, an upright edge at every corner where the outline turns
//! (not where a mapper left a node on a straight side), and faces on the walls, the roof
//! and the floor for hidden lines. Pitched roofs go through the same mass as the scene's
//! own `Footprint` items (`items/mass.rs`), which needs a convex plan for equal pitches (a
//! gambrel's or mansard's two pitches and a half-hip are its planes too). A dome or a cone
//! stands on the largest circle inside the footprint, on the prism's flat roof, as the
//! scene's own domes do (`items/round.rs`); a round roof is half an elliptic cylinder from
//! eaves to eaves, its ends' walls closed up to its half ellipses. A roof that cannot be
//! drawn as tagged is drawn flat with a warning.

use super::super::build::{ellipse_points, facet_count, ItemBuilder};
use super::super::items::{
    build_mass, clip_polygon, cone, is_convex, spheroid_dome, turn_angle, Mass,
};
use super::super::outline::RoundOutline;
use super::tags::{Heights, RoofShape};
use nalgebra::{Point3, Vector2, Vector3};

/// A corner turning through less than this (radians) is a node on a straight side: no
/// upright edge is drawn there, and it is left out when choosing a roof's sides.
const STRAIGHT_ON: f64 = 1e-3;

/// Draws a building whose outer ring and holes are given in plan (any winding), standing on
/// ground at height `ground`. Returns warnings for roofs drawn otherwise than tagged.
pub fn build_building(
    b: &mut ItemBuilder,
    rings: &[Vec<Vector2<f64>>],
    heights: &Heights,
    ground: f64,
    north_deg: f64,
) -> Result<Vec<String>, String> {
    let mut warnings = Vec::new();
    b.move_by(Vector3::new(0.0, 0.0, ground + heights.base), 0.0);
    let wall_top = heights.eaves - heights.base;
    if wall_top <= 0.0 {
        return Err(format!(
            "its top ({:.2} m) is not above its base ({:.2} m)",
            heights.eaves, heights.base
        ));
    }
    if heights.roof != RoofShape::Flat {
        if rings.len() > 1 {
            warnings.push(format!(
                "roof:shape={} over a courtyard is not drawn; drawn flat",
                heights.roof_tag
            ));
        } else if heights.roof == RoofShape::Round {
            match barrel_plan(&rings[0], heights.across) {
                Ok(barrel) => {
                    build_barrel(b, &barrel, wall_top, heights.top - heights.eaves);
                    return Ok(warnings);
                }
                Err(why) => warnings.push(format!("{why}; drawn flat")),
            }
        } else if matches!(heights.roof, RoofShape::Dome | RoofShape::Cone) {
            match inscribed_circle(&rings[0], heights.roof_tag) {
                Ok((centre, radius)) => {
                    prism(b, rings, wall_top);
                    let springing = Point3::new(centre.x, centre.y, wall_top);
                    let rise = heights.top - heights.eaves;
                    b.circle(springing, radius);
                    if heights.roof == RoofShape::Dome {
                        spheroid_dome(b, springing, radius, rise);
                    } else {
                        cone(b, springing, radius, rise);
                    }
                    return Ok(warnings);
                }
                Err(why) => warnings.push(format!("{why}; drawn flat")),
            }
        } else {
            match pitched_mass(&rings[0], heights, north_deg) {
                Ok(mass) => {
                    let walls = mass.walls();
                    let openings = vec![Vec::new(); walls.len()];
                    build_mass(b, &mass, &walls, &openings, &[])?;
                    return Ok(warnings);
                }
                Err(why) => warnings.push(format!("{why}; drawn flat")),
            }
        }
    }
    prism(b, rings, wall_top);
    Ok(warnings)
}

/// Walls from 0 to `top` on every ring, a flat roof with the holes cut out, and the floor.
fn prism(b: &mut ItemBuilder, rings: &[Vec<Vector2<f64>>], top: f64) {
    let at = |p: Vector2<f64>, z: f64| Point3::new(p.x, p.y, z);
    for ring in rings {
        let n = ring.len();
        let bottom: Vec<Point3<f64>> = ring.iter().map(|&p| at(p, 0.0)).collect();
        let upper: Vec<Point3<f64>> = ring.iter().map(|&p| at(p, top)).collect();
        b.path(&bottom, true);
        b.path(&upper, true);
        for i in 0..n {
            let turn = turn_angle(ring[(i + n - 1) % n], ring[i], ring[(i + 1) % n]);
            if turn.abs() > STRAIGHT_ON {
                b.segment(bottom[i], upper[i]);
            }
            let j = (i + 1) % n;
            b.face(&[bottom[i], bottom[j], upper[j], upper[i]], &[]);
        }
    }
    let holes = |z: f64| -> Vec<Vec<Point3<f64>>> {
        rings[1..]
            .iter()
            .map(|r| r.iter().map(|&p| at(p, z)).collect())
            .collect()
    };
    let outer = |z: f64| -> Vec<Point3<f64>> { rings[0].iter().map(|&p| at(p, z)).collect() };
    b.face(&outer(top), &holes(top));
    b.face(&outer(0.0), &holes(0.0));
}

/// The corners of a plan for a roof (`roof` as tagged) that needs at least three.
fn roof_corners(ring: &[Vector2<f64>], roof: &str) -> Result<Vec<Vector2<f64>>, String> {
    let plan = corners(ring);
    if plan.len() < 3 {
        // A finely mapped circle can turn less than that at every node.
        return Err(format!(
            "roof:shape={roof} needs a footprint with corners, but its outline turns by more \
             than {STRAIGHT_ON} rad at only {} of its nodes",
            plan.len()
        ));
    }
    Ok(plan)
}

/// The corners of a plan where its outline turns, counter-clockwise.
fn corners(ring: &[Vector2<f64>]) -> Vec<Vector2<f64>> {
    let n = ring.len();
    let mut out: Vec<Vector2<f64>> = (0..n)
        .filter(|&i| {
            turn_angle(ring[(i + n - 1) % n], ring[i], ring[(i + 1) % n]).abs() > STRAIGHT_ON
        })
        .map(|i| ring[i])
        .collect();
    if super::super::items::twice_signed_area(&out) < 0.0 {
        out.reverse();
    }
    out
}

/// The mass of a pitched roof: which sides slope, and the slope that gives the roof its
/// tagged height.
fn pitched_mass(ring: &[Vector2<f64>], heights: &Heights, north_deg: f64) -> Result<Mass, String> {
    let plan = roof_corners(ring, heights.roof_tag)?;
    let n = plan.len();
    if !is_convex(&plan) {
        return Err(format!(
            "roof:shape={} needs a convex footprint",
            heights.roof_tag
        ));
    }
    let length = |i: usize| (plan[(i + 1) % n] - plan[i]).norm();
    let sloped: Vec<bool> = match heights.roof {
        RoofShape::Flat | RoofShape::Dome | RoofShape::Cone | RoofShape::Round => {
            unreachable!("flat roofs are prisms, round ones are drawn by their own")
        }
        RoofShape::Hipped | RoofShape::Pyramidal | RoofShape::Mansard => vec![true; n],
        RoofShape::Gabled | RoofShape::HalfHipped | RoofShape::Gambrel => {
            if n != 4 {
                return Err(format!(
                    "roof:shape={} needs a footprint of four corners, not {n}",
                    heights.roof_tag
                ));
            }
            let long_first = length(0) + length(2) >= length(1) + length(3);
            let first = long_first != heights.across;
            (0..4).map(|i| (i % 2 == 0) == first).collect()
        }
        RoofShape::Skillion => {
            // The side facing the way the roof falls is its low eaves; without a direction,
            // the longest side.
            let low = match heights.roof_direction {
                Some(azimuth) => {
                    let towards = (azimuth + north_deg).to_radians();
                    let facing = Vector2::new(towards.sin(), towards.cos());
                    (0..n)
                        .max_by(|&i, &j| {
                            let out = |k: usize| {
                                let d = (plan[(k + 1) % n] - plan[k]).normalize();
                                Vector2::new(d.y, -d.x).dot(&facing)
                            };
                            out(i).total_cmp(&out(j))
                        })
                        .unwrap_or(0)
                }
                None => (0..n)
                    .max_by(|&i, &j| length(i).total_cmp(&length(j)))
                    .unwrap_or(0),
            };
            (0..n).map(|i| i == low).collect()
        }
    };
    let depth = deepest(&plan, &sloped);
    if depth <= 0.0 {
        return Err("the footprint has no depth to pitch a roof over".to_owned());
    }
    let rise = heights.top - heights.eaves;
    let slope = rise / depth;
    // Gambrel and mansard: two pitches on each sloped side, broken two thirds of the way
    // up and a third of the way in: the lower plane rises at twice the mean slope, the
    // upper one at half of it, starting half the roof's height above the wall. Half-hipped:
    // a gable whose top half is hipped back at the roof's own pitch. (Our own proportions:
    // the conventions leave them open.)
    let two_pitches = matches!(heights.roof, RoofShape::Gambrel | RoofShape::Mansard);
    let lower = if two_pitches { 2.0 * slope } else { slope };
    let slopes = sloped.iter().map(|&s| s.then_some(lower)).collect();
    let upper = sloped
        .iter()
        .map(|&s| match heights.roof {
            _ if two_pitches => s.then_some((rise / 2.0, slope / 2.0)),
            RoofShape::HalfHipped => (!s).then_some((rise / 2.0, slope)),
            _ => None,
        })
        .collect();
    Ok(Mass {
        plan,
        eaves: heights.eaves - heights.base,
        slopes,
        upper,
        overhang: 0.0,
        parapet: None,
    })
}

/// How far (radians) the long sides under a round roof may turn from parallel: 0.001, a
/// centimetre's misfit over 20 m (our own bound; a footprint squared by a map editor is
/// parallel far closer).
const BARREL_PARALLEL: f64 = 1e-3;

/// A round roof's plan: a four-cornered footprint counter-clockwise from the first corner
/// of a long side (its eaves, corners 0 to 1; the other eaves 2 to 3) and each end's half
/// ellipse in plan: its centre on the axis midway between the long sides, and its half-span
/// along the end, reaching across to the eaves 2 to 3. First the end from corner 3 to 0,
/// then the end from 1 to 2.
#[derive(Clone, Debug, PartialEq)]
struct BarrelPlan {
    corners: [Vector2<f64>; 4],
    ends: [(Vector2<f64>, Vector2<f64>); 2],
}

/// The plan of a round roof whose axis runs along the long sides (across them with
/// `roof:orientation=across`): four corners, convex, the eaves parallel.
fn barrel_plan(ring: &[Vector2<f64>], across: bool) -> Result<BarrelPlan, String> {
    let plan = roof_corners(ring, "round")?;
    if plan.len() != 4 {
        return Err(format!(
            "roof:shape=round needs a footprint of four corners, not {}",
            plan.len()
        ));
    }
    if !is_convex(&plan) {
        return Err("roof:shape=round needs a convex footprint".to_owned());
    }
    let length = |i: usize| (plan[(i + 1) % 4] - plan[i]).norm();
    let long_first = length(0) + length(2) >= length(1) + length(3);
    let first = if long_first != across { 0 } else { 1 };
    let c: [Vector2<f64>; 4] = std::array::from_fn(|k| plan[(first + k) % 4]);
    let (d0, d2) = ((c[1] - c[0]).normalize(), (c[2] - c[3]).normalize());
    if d0.perp(&d2).abs() > BARREL_PARALLEL || d0.dot(&d2) <= 0.0 {
        return Err("roof:shape=round needs its two eaves parallel".to_owned());
    }
    let axis = (d0 + d2).normalize();
    let inward = Vector2::new(-axis.y, axis.x);
    let offset = |a: Vector2<f64>, b: Vector2<f64>| 0.5 * (inward.dot(&a) + inward.dot(&b));
    let (near, far) = (offset(c[0], c[1]), offset(c[2], c[3]));
    let half = 0.5 * (far - near);
    if half <= 0.0 {
        return Err("the footprint has no width to span with a round roof".to_owned());
    }
    // Along an end from its corner on the near eaves towards the far one: where it
    // crosses the axis, and the step along it that goes `half` across.
    let end = |from: Vector2<f64>, to: Vector2<f64>| {
        let along = to - from;
        let rate = inward.dot(&along);
        let centre = from + along * ((near + half - inward.dot(&from)) / rate);
        (centre, along * (half / rate))
    };
    Ok(BarrelPlan {
        corners: c,
        ends: [end(c[0], c[3]), end(c[1], c[2])],
    })
}

/// Walls to `top` under a round roof rising `rise` above them: the eaves and the upright
/// corners, each end's half ellipse drawn exactly and its wall closed up to it, the roof's
/// faces running from end to end, and its outline from each eye.
fn build_barrel(b: &mut ItemBuilder, barrel: &BarrelPlan, top: f64, rise: f64) {
    let at = |p: Vector2<f64>, z: f64| Point3::new(p.x, p.y, z);
    let c = &barrel.corners;
    let foot: Vec<Point3<f64>> = c.iter().map(|&p| at(p, 0.0)).collect();
    let head: Vec<Point3<f64>> = c.iter().map(|&p| at(p, top)).collect();
    b.path(&foot, true);
    for k in 0..4 {
        b.segment(foot[k], head[k]);
    }
    b.segment(head[0], head[1]);
    b.segment(head[2], head[3]);
    b.face(&[foot[0], foot[1], head[1], head[0]], &[]);
    b.face(&[foot[2], foot[3], head[3], head[2]], &[]);
    let up = Vector3::z() * rise;
    let count = facet_count(std::f64::consts::PI);
    // Each end's section from the far eaves (t = 0) over the crown to the near (t = pi),
    // its springings put exactly on the corners so that walls and roof share them.
    let section = |(centre, half): (Vector2<f64>, Vector2<f64>), far: usize, near: usize| {
        let mut points = ellipse_points(
            at(centre, top),
            Vector3::new(half.x, half.y, 0.0),
            up,
            0.0,
            std::f64::consts::PI,
            count,
        );
        points[0] = head[far];
        points[count] = head[near];
        points
    };
    let sections = [section(barrel.ends[0], 3, 0), section(barrel.ends[1], 2, 1)];
    for (k, &(near, far)) in [(0, 3), (1, 2)].iter().enumerate() {
        let (centre, half) = barrel.ends[k];
        b.ellipse(
            at(centre, top),
            Vector3::new(half.x, half.y, 0.0),
            up,
            0.0,
            std::f64::consts::PI,
        );
        // From the far eaves over the crown down to the near eaves' corner, both included.
        let mut wall = vec![foot[near], foot[far]];
        wall.extend_from_slice(&sections[k]);
        b.face(&wall, &[]);
    }
    b.strip(&sections[0], &sections[1]);
    b.face(&foot, &[]);
    b.round_outline(RoundOutline::Barrel {
        ends: barrel
            .ends
            .map(|(centre, half)| (at(centre, top), Vector3::new(half.x, half.y, 0.0))),
        up,
    });
}

/// The least share of its footprint the circle under a dome or cone must cover: a tenth.
/// A square's inscribed circle covers pi / 4 of it, a rectangle n times as long as wide
/// pi / 4n; below a tenth (longer than about 8 to 1) the roof would be a needle or a
/// spike standing on a sliver of the roof, which a mapper hardly meant (our own bound).
const MIN_CIRCLE_COVER: f64 = 0.1;

/// The circle a round roof stands on: the largest circle inside the footprint (its centre
/// midway along the line of centres when there are many, as in a long rectangle), as a
/// dome stands on its drum; the rest of the roof stays flat at the eaves. Refused when it
/// covers less than [`MIN_CIRCLE_COVER`] of the footprint. `roof` is the shape as tagged,
/// for messages.
fn inscribed_circle(ring: &[Vector2<f64>], roof: &str) -> Result<(Vector2<f64>, f64), String> {
    let plan = roof_corners(ring, roof)?;
    if !is_convex(&plan) {
        return Err(format!("roof:shape={roof} needs a convex footprint"));
    }
    let (radius, centres) = deepest_piece(&plan, &vec![true; plan.len()]);
    if radius <= 0.0 || centres.is_empty() {
        return Err("the footprint has no room for a round roof".to_owned());
    }
    let cover = std::f64::consts::PI * radius * radius
        / (0.5 * super::super::items::twice_signed_area(&plan));
    if cover < MIN_CIRCLE_COVER {
        return Err(format!(
            "roof:shape={roof} stands on the largest circle inside the footprint, {:.2} m \
             across, which covers {:.1} % of it (less than {} %): too thin a footprint",
            2.0 * radius,
            100.0 * cover,
            100.0 * MIN_CIRCLE_COVER
        ));
    }
    // The two centres farthest apart: the ends of the line of centres, or one point.
    let mut ends = (centres[0], centres[0]);
    for (i, &a) in centres.iter().enumerate() {
        for &c in &centres[i + 1..] {
            if (c - a).norm() > (ends.1 - ends.0).norm() {
                ends = (a, c);
            }
        }
    }
    Ok(((ends.0 + ends.1) / 2.0, radius))
}

/// How far into a convex counter-clockwise plan one can go from all the `sloped` sides at
/// once: max over the plan of the least distance to those sides' lines.
fn deepest(plan: &[Vector2<f64>], sloped: &[bool]) -> f64 {
    deepest_piece(plan, sloped).0
}

/// [`deepest`], and the corners of the (tiny) piece of the plan that deep: found by halving
/// the interval of distances, each step clipping the plan by the sides moved inwards.
fn deepest_piece(plan: &[Vector2<f64>], sloped: &[bool]) -> (f64, Vec<Vector2<f64>>) {
    let n = plan.len();
    let inward: Vec<(Vector2<f64>, Vector2<f64>)> = (0..n)
        .filter(|&i| sloped[i])
        .map(|i| {
            let d = (plan[(i + 1) % n] - plan[i]).normalize();
            (plan[i], Vector2::new(-d.y, d.x))
        })
        .collect();
    let piece_at = |r: f64| {
        let mut piece = plan.to_vec();
        for &(start, normal) in &inward {
            piece = clip_polygon(&piece, |p| normal.dot(&(p - start)) - r);
            if piece.is_empty() {
                break;
            }
        }
        piece
    };
    let size = plan
        .iter()
        .map(|p| (p - plan[0]).norm())
        .fold(0.0, f64::max);
    let (mut low, mut high) = (0.0, size);
    let mut piece = plan.to_vec();
    // 60 halvings: below a nanometre for any building.
    for _ in 0..60 {
        let mid = 0.5 * (low + high);
        let at_mid = piece_at(mid);
        if at_mid.is_empty() {
            high = mid;
        } else {
            low = mid;
            piece = at_mid;
        }
    }
    (low, piece)
}

#[cfg(test)]
mod tests {
    use super::super::super::build::Placement;
    use super::super::super::site::{Site, SiteCurve};
    use super::super::tags::ROOF_SHAPES;
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
    fn the_depth_of_a_rectangle_is_half_its_width() {
        let plan = rectangle(10.0, 6.0);
        assert!((deepest(&plan, &[true; 4]) - 3.0).abs() < 1e-9);
        // Only the long sides: still half the depth; only one side: the whole depth.
        assert!((deepest(&plan, &[true, false, true, false]) - 3.0).abs() < 1e-9);
        assert!((deepest(&plan, &[true, false, false, false]) - 6.0).abs() < 1e-9);
    }

    fn heights(roof: RoofShape) -> Heights {
        Heights {
            base: 0.0,
            eaves: 6.0,
            top: 9.0,
            roof,
            roof_tag: ROOF_SHAPES.iter().find(|(_, s)| *s == roof).unwrap().0,
            roof_direction: None,
            across: false,
        }
    }

    #[test]
    fn a_gabled_roof_rises_from_the_long_sides_to_its_height() {
        // A nodes on a straight side is left out; the ridge runs along the 10 m sides.
        let mut ring = rectangle(10.0, 6.0);
        ring.insert(1, Vector2::new(4.0, 0.0));
        let mass = pitched_mass(&ring, &heights(RoofShape::Gabled), 0.0).unwrap();
        assert_eq!(mass.plan.len(), 4);
        assert!((mass.roof_height(Vector2::new(5.0, 3.0)) - 9.0).abs() < 1e-9);
        assert_eq!(mass.slopes.iter().filter(|s| s.is_some()).count(), 2);
        let across = Heights {
            across: true,
            ..heights(RoofShape::Gabled)
        };
        let mass = pitched_mass(&ring, &across, 0.0).unwrap();
        // Across: the slopes rise from the 6 m sides over 5 m to the ridge.
        assert!((mass.slopes[1].unwrap() - 3.0 / 5.0).abs() < 1e-9);
    }

    #[test]
    fn a_skillion_falls_towards_its_direction() {
        let facing_south = Heights {
            roof_direction: Some(180.0),
            ..heights(RoofShape::Skillion)
        };
        let mass = pitched_mass(&rectangle(10.0, 6.0), &facing_south, 0.0).unwrap();
        // Low along the south side (y = 0), 3 m higher along the north side.
        assert!((mass.roof_height(Vector2::new(5.0, 0.0)) - 6.0).abs() < 1e-9);
        assert!((mass.roof_height(Vector2::new(5.0, 6.0)) - 9.0).abs() < 1e-9);
    }

    #[test]
    fn a_gambrel_breaks_two_thirds_up_a_third_of_the_way_in() {
        // 10 x 6 plan, eaves 6, top 9: a run of 3 m from each long side. By our rule the
        // lower plane climbs 2 m over the first 1 m, the upper one 1 m over the last 2 m.
        let mass = pitched_mass(&rectangle(10.0, 6.0), &heights(RoofShape::Gambrel), 0.0).unwrap();
        for (y, z) in [(0.5, 7.0), (1.0, 8.0), (2.0, 8.5), (3.0, 9.0), (5.0, 8.0)] {
            assert!(
                (mass.roof_height(Vector2::new(5.0, y)) - z).abs() < 1e-9,
                "{y}"
            );
        }
        // The gable ends rise to the top: the end walls are five-sided.
        assert_eq!(mass.walls()[1].top.len(), 5);
    }

    #[test]
    fn a_mansard_breaks_the_same_way_on_every_side() {
        let mass = pitched_mass(&rectangle(12.0, 6.0), &heights(RoofShape::Mansard), 0.0).unwrap();
        // From the 6 m ends as from the long sides: 2 m up at 1 m in, the top along the
        // ridge between points 3 m in from the ends.
        for (x, y, z) in [
            (1.0, 3.0, 8.0),
            (0.5, 3.0, 7.0),
            (6.0, 1.0, 8.0),
            (6.0, 3.0, 9.0),
        ] {
            assert!(
                (mass.roof_height(Vector2::new(x, y)) - z).abs() < 1e-9,
                "{x} {y}"
            );
        }
        // Every wall's top is level: no gable.
        assert!(mass
            .walls()
            .iter()
            .all(|w| w.top.iter().all(|&(_, z)| z == 6.0)));
    }

    #[test]
    fn a_half_hip_cuts_the_top_half_of_each_gable() {
        let mass =
            pitched_mass(&rectangle(10.0, 6.0), &heights(RoofShape::HalfHipped), 0.0).unwrap();
        // The end wall's top: up the pitch (1 in 1) to half the roof's height (7.5), level,
        // and down again: a trapezoid.
        let end = &mass.walls()[1].top;
        let expected = [(0.0, 6.0), (1.5, 7.5), (4.5, 7.5), (6.0, 6.0)];
        assert_eq!(end.len(), 4, "{end:?}");
        for (got, want) in end.iter().zip(expected) {
            assert!((got.0 - want.0).abs() < 1e-9 && (got.1 - want.1).abs() < 1e-9);
        }
        // The hip rises from 7.5 at the end wall at the roof's pitch, meeting the ridge
        // 1.5 m in.
        assert!((mass.roof_height(Vector2::new(0.75, 3.0)) - 8.25).abs() < 1e-9);
        assert!((mass.roof_height(Vector2::new(1.5, 3.0)) - 9.0).abs() < 1e-9);
        assert!((mass.roof_height(Vector2::new(5.0, 3.0)) - 9.0).abs() < 1e-9);
    }

    #[test]
    fn a_round_roof_stands_on_the_largest_circle_inside() {
        // A rectangle: the circle across its width, midway along.
        let (centre, radius) = inscribed_circle(&rectangle(10.0, 6.0), "dome").unwrap();
        assert!((centre - Vector2::new(5.0, 3.0)).norm() < 1e-6 && (radius - 3.0).abs() < 1e-9);
        // A 3-4-5 triangle: the incircle, radius (a + b - c) / 2 = 1 about (1, 1) (any
        // geometry handbook).
        let triangle = [
            Vector2::new(0.0, 0.0),
            Vector2::new(4.0, 0.0),
            Vector2::new(0.0, 3.0),
        ];
        let (centre, radius) = inscribed_circle(&triangle, "cone").unwrap();
        assert!((centre - Vector2::new(1.0, 1.0)).norm() < 1e-6 && (radius - 1.0).abs() < 1e-9);
        // A regular 24-gon of circumradius 8: the apothem 8 cos(pi / 24) about its centre.
        let round: Vec<Vector2<f64>> = (0..24)
            .map(|k| {
                let a = std::f64::consts::TAU * k as f64 / 24.0;
                Vector2::new(3.0 + 8.0 * a.cos(), -2.0 + 8.0 * a.sin())
            })
            .collect();
        let (centre, radius) = inscribed_circle(&round, "dome").unwrap();
        assert!((centre - Vector2::new(3.0, -2.0)).norm() < 1e-6);
        assert!((radius - 8.0 * (std::f64::consts::PI / 24.0).cos()).abs() < 1e-9);
    }

    #[test]
    fn a_dome_or_cone_on_a_sliver_of_a_footprint_is_refused() {
        // An 8 x 1 rectangle's circle covers pi / 32 = 9.8 % of it; a 7 x 1 one's pi / 28 =
        // 11.2 %, and a 10 m x 1 um one's 0.00001 %.
        let refusal = inscribed_circle(&rectangle(8.0, 1.0), "cone").unwrap_err();
        assert_eq!(
            refusal,
            "roof:shape=cone stands on the largest circle inside the footprint, 1.00 m \
             across, which covers 9.8 % of it (less than 10 %): too thin a footprint"
        );
        assert!(inscribed_circle(&rectangle(10.0, 1e-6), "dome").is_err());
        let (_, radius) = inscribed_circle(&rectangle(7.0, 1.0), "dome").unwrap();
        assert!((radius - 0.5).abs() < 1e-9);
        // Drawn flat, and said.
        let mut site = Site::default();
        let id = site.add_item("building", None);
        let mut b = ItemBuilder::new(&mut site, id, Placement::in_unit(1.0));
        let warnings = build_building(
            &mut b,
            &[rectangle(10.0, 0.5)],
            &heights(RoofShape::Dome),
            0.0,
            0.0,
        )
        .unwrap();
        assert!(
            warnings.len() == 1 && warnings[0].ends_with("too thin a footprint; drawn flat"),
            "{warnings:?}"
        );
        assert!(site.edges.iter().all(|e| matches!(
            e.curve,
            SiteCurve::Segment { start, end } if start.z.max(end.z) <= 6.0
        )));
    }

    #[test]
    fn a_round_roof_spans_between_its_eaves_from_end_to_end() {
        // 10 x 6: the axis along the 10 m sides, 3 m from each; the ends' half ellipses
        // span 3 m either way from their middles.
        let barrel = barrel_plan(&rectangle(10.0, 6.0), false).unwrap();
        assert_eq!(barrel.corners[0], Vector2::new(0.0, 0.0));
        let close = |a: Vector2<f64>, b: [f64; 2]| (a - Vector2::new(b[0], b[1])).norm() < 1e-12;
        let [(c0, u0), (c1, u1)] = barrel.ends;
        assert!(close(c0, [0.0, 3.0]) && close(u0, [0.0, 3.0]), "{c0} {u0}");
        assert!(close(c1, [10.0, 3.0]) && close(u1, [0.0, 3.0]), "{c1} {u1}");
        // Across: the axis along the 6 m sides, starting from the second corner.
        let barrel = barrel_plan(&rectangle(10.0, 6.0), true).unwrap();
        assert_eq!(barrel.corners[0], Vector2::new(10.0, 0.0));
        assert!(close(barrel.ends[0].0, [5.0, 0.0]) && close(barrel.ends[0].1, [-5.0, 0.0]));
        // An end standing askew: from (10, 0) to (12, 6) it crosses the axis (y = 3) at
        // (11, 3), and reaches the far eaves 3 m across at (12, 6).
        let askew = [
            Vector2::new(0.0, 0.0),
            Vector2::new(10.0, 0.0),
            Vector2::new(12.0, 6.0),
            Vector2::new(0.0, 6.0),
        ];
        let barrel = barrel_plan(&askew, false).unwrap();
        assert!(close(barrel.ends[1].0, [11.0, 3.0]) && close(barrel.ends[1].1, [1.0, 3.0]));
        // Eaves that are not parallel are refused.
        let mut splayed = rectangle(10.0, 6.0);
        splayed[2].y = 6.5;
        assert!(barrel_plan(&splayed, false)
            .unwrap_err()
            .contains("parallel"));
    }

    #[test]
    fn a_round_roofed_building_is_a_closed_solid() {
        // Every side of every triangle shared by exactly two of them: no slit for lines
        // behind to show through, and a standpoint inside is told by ray parity.
        let mut site = Site::default();
        let id = site.add_item("building", None);
        let mut b = ItemBuilder::new(&mut site, id, Placement::in_unit(1.0));
        let barrel = barrel_plan(&rectangle(20.0, 8.0), false).unwrap();
        build_barrel(&mut b, &barrel, 7.0, 3.0);
        let key = |p: &Point3<f64>| [p.x.to_bits(), p.y.to_bits(), p.z.to_bits()];
        let mut sides = std::collections::HashMap::new();
        for face in &site.faces {
            let c = face.corners.map(|p| key(&p));
            for (a, b) in [(c[0], c[1]), (c[1], c[2]), (c[2], c[0])] {
                *sides
                    .entry(if a < b { (a, b) } else { (b, a) })
                    .or_insert(0) += 1;
            }
        }
        let open: Vec<_> = sides.iter().filter(|(_, &n)| n != 2).collect();
        assert!(
            open.is_empty(),
            "{} sides not shared by two: {open:?}",
            open.len()
        );
    }

    #[test]
    fn refusals_name_the_roof_as_tagged_and_what_its_footprint_lacks() {
        let triangle = [
            Vector2::new(0.0, 0.0),
            Vector2::new(4.0, 0.0),
            Vector2::new(0.0, 3.0),
        ];
        let refusal = pitched_mass(&triangle, &heights(RoofShape::HalfHipped), 0.0);
        assert_eq!(
            refusal.unwrap_err(),
            "roof:shape=half-hipped needs a footprint of four corners, not 3"
        );
        // A dart: four corners, one turning inwards.
        let dart = [
            Vector2::new(0.0, 0.0),
            Vector2::new(10.0, 3.0),
            Vector2::new(0.0, 6.0),
            Vector2::new(3.0, 3.0),
        ];
        assert_eq!(
            barrel_plan(&dart, false).unwrap_err(),
            "roof:shape=round needs a convex footprint"
        );
        let mut five = rectangle(10.0, 6.0);
        five.insert(1, Vector2::new(5.0, -1.0));
        assert_eq!(
            barrel_plan(&five, false).unwrap_err(),
            "roof:shape=round needs a footprint of four corners, not 5"
        );
        assert_eq!(
            inscribed_circle(&dart, "onion").unwrap_err(),
            "roof:shape=onion needs a convex footprint"
        );
        // A circle of 8000 nodes turns by 2 pi / 8000 < 0.001 rad at each: no corners.
        let circle: Vec<Vector2<f64>> = (0..8000)
            .map(|k| {
                let a = std::f64::consts::TAU * k as f64 / 8000.0;
                Vector2::new(20.0 * a.cos(), 20.0 * a.sin())
            })
            .collect();
        let refusal = inscribed_circle(&circle, "dome").unwrap_err();
        assert!(
            refusal.starts_with("roof:shape=dome needs a footprint with corners")
                && refusal.contains("at only 0 of its nodes")
                && !refusal.contains("convex"),
            "{refusal}"
        );
        // Over a courtyard, by its tag's name.
        let warnings_over_a_courtyard = |heights: &Heights| {
            let mut site = Site::default();
            let id = site.add_item("building", None);
            let mut b = ItemBuilder::new(&mut site, id, Placement::in_unit(1.0));
            let hole: Vec<Vector2<f64>> = rectangle(2.0, 2.0)
                .iter()
                .map(|p| p + Vector2::new(4.0, 2.0))
                .collect();
            build_building(&mut b, &[rectangle(10.0, 6.0), hole], heights, 0.0, 0.0).unwrap()
        };
        let onion = Heights {
            roof_tag: "onion",
            ..heights(RoofShape::Dome)
        };
        assert_eq!(
            warnings_over_a_courtyard(&onion),
            ["roof:shape=onion over a courtyard is not drawn; drawn flat"]
        );
    }

    #[test]
    fn a_hipped_roof_on_an_l_shaped_plan_is_refused() {
        let l = vec![
            Vector2::new(0.0, 0.0),
            Vector2::new(10.0, 0.0),
            Vector2::new(10.0, 4.0),
            Vector2::new(4.0, 4.0),
            Vector2::new(4.0, 10.0),
            Vector2::new(0.0, 10.0),
        ];
        assert!(pitched_mass(&l, &heights(RoofShape::Hipped), 0.0)
            .unwrap_err()
            .contains("convex"));
    }
}
