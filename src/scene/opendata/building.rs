//! A building (or building part) from a map footprint: walls raised on its rings from its
//! base to its eaves, and the roof its tags ask for.
//!
//! Flat roofs, and any footprint with a courtyard (a hole), are drawn as a prism: the rings
//! at the base and at the top, an upright edge at every corner where the outline turns
//! (not where a mapper left a node on a straight side), and faces on the walls, the roof
//! and the floor for hidden lines. Pitched roofs go through the same mass as the scene's
//! own `Footprint` items (`items/mass.rs`), which needs a convex plan for equal pitches; a
//! roof that cannot be drawn as tagged is drawn flat with a warning.

use super::super::build::ItemBuilder;
use super::super::items::{build_mass, clip_polygon, is_convex, turn_angle, Mass};
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
                "a {:?} roof over a courtyard is not drawn; drawn flat",
                heights.roof
            ));
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
    let plan = corners(ring);
    let n = plan.len();
    if n < 3 || !is_convex(&plan) {
        return Err(format!(
            "a {:?} roof needs a convex footprint",
            heights.roof
        ));
    }
    let length = |i: usize| (plan[(i + 1) % n] - plan[i]).norm();
    let sloped: Vec<bool> = match heights.roof {
        RoofShape::Flat => unreachable!("flat roofs are prisms"),
        RoofShape::Hipped | RoofShape::Pyramidal => vec![true; n],
        RoofShape::Gabled => {
            if n != 4 {
                return Err(format!(
                    "a gabled roof needs a footprint of four corners, not {n}"
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
    let slope = (heights.top - heights.eaves) / depth;
    Ok(Mass {
        plan,
        eaves: heights.eaves - heights.base,
        slopes: sloped.iter().map(|&s| s.then_some(slope)).collect(),
        overhang: 0.0,
        parapet: None,
    })
}

/// How far into a convex counter-clockwise plan one can go from all the `sloped` sides at
/// once: max over the plan of the least distance to those sides' lines. Found by halving
/// the interval of distances, each step clipping the plan by the sides moved inwards.
fn deepest(plan: &[Vector2<f64>], sloped: &[bool]) -> f64 {
    let n = plan.len();
    let inward: Vec<(Vector2<f64>, Vector2<f64>)> = (0..n)
        .filter(|&i| sloped[i])
        .map(|i| {
            let d = (plan[(i + 1) % n] - plan[i]).normalize();
            (plan[i], Vector2::new(-d.y, d.x))
        })
        .collect();
    let reaches = |r: f64| {
        let mut piece = plan.to_vec();
        for &(start, normal) in &inward {
            piece = clip_polygon(&piece, |p| normal.dot(&(p - start)) - r);
            if piece.is_empty() {
                return false;
            }
        }
        true
    };
    let size = plan
        .iter()
        .map(|p| (p - plan[0]).norm())
        .fold(0.0, f64::max);
    let (mut low, mut high) = (0.0, size);
    // 60 halvings: below a nanometre for any building.
    for _ in 0..60 {
        let mid = 0.5 * (low + high);
        if reaches(mid) {
            low = mid;
        } else {
            high = mid;
        }
    }
    low
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
