//! `Stairs`: a straight flight of equal steps, with landings.
//!
//! The flight is drawn in a frame of its own: the origin at the middle of the foot of the
//! first riser on the base, +y the way up the flight, x across it (to the right going up),
//! z up. It is a solid: the steps stand on a block that reaches down to the base under the
//! whole flight, closed at the back of the top step.

use super::super::build::ItemBuilder;
use super::super::numbers::{plan, zero, Count, Finite, Plan, Positive};
use super::standing::{draw_footing, outline_foot};
use nalgebra::{Point3, Vector2, Vector3};
use serde::Deserialize;

/// A level stretch after a step.
#[derive(Clone, Copy, Debug, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct LandingSpec {
    /// The step it follows, counting from 1.
    pub after: Count,
    /// Its length in the direction of travel.
    pub length: Positive,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StairsSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The middle of the foot of the first riser.
    pub at: Plan,
    /// The azimuth (degrees) one faces going up.
    pub bearing: Finite,
    pub steps: Count,
    /// Height of each step.
    pub rise: Positive,
    /// Depth of each tread.
    pub going: Positive,
    pub width: Positive,
    #[serde(default = "zero")]
    pub base: Finite,
    /// Stands on the scene's ground: `base` is then measured from the lowest ground along
    /// the flight's sides (where the flight climbs the slope, at the foot of the first
    /// riser), and the line where the flight meets the ground is drawn.
    #[serde(default)]
    pub on_ground: bool,
    #[serde(default)]
    pub landings: Vec<LandingSpec>,
}

/// Where each riser stands along the flight, from the first (at 0), and the back of the
/// top step last: `steps + 1` distances, a landing's length taking the place of the
/// going of the tread it makes.
fn riser_positions(spec: &StairsSpec) -> Result<Vec<f64>, String> {
    let steps = spec.steps.0 as usize;
    let mut treads = vec![spec.going.0; steps];
    let mut has_landing = vec![false; steps];
    for landing in &spec.landings {
        let after = landing.after.0 as usize;
        if after >= steps {
            return Err(if steps == 1 {
                "a flight of one step has no room for a landing".to_owned()
            } else {
                format!(
                    "a landing after step {after}: it must follow one of steps 1 to {} \
                     (the flight has {steps} steps, and a landing after the top step would \
                     be the floor above)",
                    steps - 1
                )
            });
        }
        if has_landing[after - 1] {
            return Err(format!("two landings after step {after}"));
        }
        has_landing[after - 1] = true;
        treads[after - 1] = landing.length.0;
    }
    let mut positions = Vec::with_capacity(steps + 1);
    let mut distance = 0.0;
    positions.push(distance);
    for tread in treads {
        distance += tread;
        positions.push(distance);
    }
    Ok(positions)
}

pub fn build_stairs(b: &mut ItemBuilder, spec: &StairsSpec) -> Result<(), String> {
    let positions = riser_positions(spec)?;
    let steps = spec.steps.0 as usize;
    let (rise, half) = (spec.rise.0, spec.width.0 / 2.0);
    let foot = plan(&spec.at);
    let turn = spec.bearing.0.to_radians();
    let back = positions[steps];
    let outline =
        [(-half, 0.0), (half, 0.0), (half, back), (-half, back)].map(|(x, y)| Vector2::new(x, y));
    let frame = b
        .placement()
        .then_move(Vector3::new(foot.x, foot.y, 0.0), turn);
    let base = outline_foot(b, &frame, &outline, spec.base.0, spec.on_ground, None)?;
    // Turning by the bearing takes the local +y onto `plan_direction(bearing)`, the way up.
    b.move_by(Vector3::new(foot.x, foot.y, base), turn);
    draw_footing(b, &outline, spec.on_ground, None)?;
    // The side profile, in (along, height): up each riser and along each tread, down the
    // back of the top step and back along the base; a sawtooth, not convex.
    let mut profile = Vec::with_capacity(2 * steps + 2);
    for (step, &riser) in positions[..steps].iter().enumerate() {
        profile.push((riser, step as f64 * rise));
        profile.push((riser, (step + 1) as f64 * rise));
    }
    let top = steps as f64 * rise;
    profile.push((back, top));
    profile.push((back, 0.0));
    // The rake: the line of the nosings, one going and one rise per step.
    b.axis(Vector3::new(0.0, spec.going.0, rise));
    let side = |x: f64| -> Vec<Point3<f64>> {
        profile
            .iter()
            .map(|&(along, height)| Point3::new(x, along, height))
            .collect()
    };
    let across = |along: f64, height: f64| {
        [
            Point3::new(-half, along, height),
            Point3::new(half, along, height),
        ]
    };
    for x in [-half, half] {
        let outline = side(x);
        b.path(&outline, true);
        b.face(&outline, &[]);
    }
    for (step, tread) in positions.windows(2).enumerate() {
        let (riser, next) = (tread[0], tread[1]);
        let (low, high) = (step as f64 * rise, (step + 1) as f64 * rise);
        let [foot_left, foot_right] = across(riser, low);
        let [nosing_left, nosing_right] = across(riser, high);
        let [tread_back_left, tread_back_right] = across(next, high);
        b.segment(foot_left, foot_right);
        b.segment(nosing_left, nosing_right);
        b.face(&[foot_left, foot_right, nosing_right, nosing_left], &[]);
        b.face(
            &[nosing_left, nosing_right, tread_back_right, tread_back_left],
            &[],
        );
    }
    let [top_left, top_right] = across(back, top);
    let [back_left, back_right] = across(back, 0.0);
    let [front_left, front_right] = across(0.0, 0.0);
    b.segment(top_left, top_right);
    b.face(&[back_left, back_right, top_right, top_left], &[]);
    let bottom = [front_left, front_right, back_right, back_left];
    b.path(&bottom, true);
    b.face(&bottom, &[]);
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::super::super::build::{plan_direction, Placement};
    use super::super::super::site::{Site, SiteCurve};
    use super::*;

    fn stairs(text: &str) -> Result<Site, String> {
        let spec: StairsSpec = ron::from_str(text).expect("stairs as written in a scene");
        let mut site = Site::default();
        let id = site.add_item("stairs", None);
        let mut b = ItemBuilder::new(&mut site, id, Placement::in_unit(1.0));
        build_stairs(&mut b, &spec)?;
        Ok(site)
    }

    /// The lowest and highest corner of everything drawn and every face.
    fn bounds(site: &Site) -> (Point3<f64>, Point3<f64>) {
        let mut points = Vec::new();
        for edge in &site.edges {
            if let SiteCurve::Segment { start, end } = edge.curve {
                points.extend([start, end]);
            }
        }
        points.extend(site.faces.iter().flat_map(|f| f.corners));
        let (mut low, mut high) = (points[0], points[0]);
        for p in points {
            low = low.inf(&p);
            high = high.sup(&p);
        }
        (low, high)
    }

    fn close(a: Point3<f64>, b: Point3<f64>) -> bool {
        (a - b).norm() < 1e-12
    }

    const THREE_STEPS: &str =
        "(at: (10, 20), bearing: 0, steps: 3, rise: 0.25, going: 0.5, width: 2, base: 1)";

    #[test]
    fn three_steps_counted_by_hand() {
        let site = stairs(THREE_STEPS).unwrap();
        // Edges: 3 nosings and 3 riser feet across; each side's sawtooth of 8 corners has
        // 8 sides; the top and the foot of the back across (the bottom's front is the first
        // riser's foot, its sides are in the sawtooth).
        assert_eq!(site.edges.len(), 3 + 3 + 2 * 8 + 2);
        // Faces: 3 treads and 3 risers (2 triangles each), two sides of 8 corners (6
        // triangles each), the back and the bottom (2 each).
        assert_eq!(site.faces.len(), 6 + 6 + 2 * 6 + 2 + 2);
        let (low, high) = bounds(&site);
        assert!(close(low, Point3::new(9.0, 20.0, 1.0)), "{low}");
        assert!(close(high, Point3::new(11.0, 21.5, 1.75)), "{high}");
    }

    #[test]
    fn the_faces_close_the_solid() {
        // A closed surface of triangles: every side of every triangle is a side of
        // exactly one other.
        let site = stairs(THREE_STEPS).unwrap();
        let key = |p: &Point3<f64>| p.coords.map(|c| (c * 1e9).round() as i64);
        let mut sides = std::collections::HashMap::new();
        for face in &site.faces {
            for i in 0..3 {
                let (a, b) = (key(&face.corners[i]), key(&face.corners[(i + 1) % 3]));
                let side = if (a.x, a.y, a.z) < (b.x, b.y, b.z) {
                    (a, b)
                } else {
                    (b, a)
                };
                *sides.entry((side.0.data.0, side.1.data.0)).or_insert(0) += 1;
            }
        }
        assert!(sides.values().all(|&n| n == 2), "{sides:?}");
    }

    #[test]
    fn the_top_tread_is_steps_times_rise_up() {
        let site =
            stairs("(at: (0, 0), bearing: 0, steps: 12, rise: 0.175, going: 0.25, width: 1)")
                .unwrap();
        let (_, high) = bounds(&site);
        assert!((high.z - 12.0 * 0.175).abs() < 1e-12, "{high}");
        assert!((high.y - 12.0 * 0.25).abs() < 1e-12, "{high}");
    }

    #[test]
    fn a_landing_moves_the_later_steps_on_by_its_length() {
        let plain = stairs(THREE_STEPS).unwrap();
        let landed = stairs(
            "(at: (10, 20), bearing: 0, steps: 3, rise: 0.25, going: 0.5, width: 2, base: 1, \
             landings: [(after: 1, length: 1.25)])",
        )
        .unwrap();
        assert_eq!(landed.edges.len(), plain.edges.len());
        assert_eq!(landed.faces.len(), plain.faces.len());
        let (_, high) = bounds(&landed);
        assert!((high.y - (21.5 + 0.75)).abs() < 1e-12, "{high}");
        // The second nosing stands at 20 + 1.25 rather than 20.5.
        let nosing = |site: &Site, y: f64| {
            site.edges.iter().any(|e| match e.curve {
                SiteCurve::Segment { start, end } => {
                    close(start, Point3::new(9.0, y, 1.5)) && close(end, Point3::new(11.0, y, 1.5))
                }
                SiteCurve::Ellipse(_) => false,
            })
        };
        assert!(nosing(&plain, 20.5) && !nosing(&plain, 21.25));
        assert!(nosing(&landed, 21.25) && !nosing(&landed, 20.5));
    }

    #[test]
    fn the_flight_runs_towards_its_bearing() {
        let site = stairs("(at: (0, 0), bearing: 90, steps: 4, rise: 0.25, going: 0.5, width: 2)")
            .unwrap();
        let (low, high) = bounds(&site);
        assert!(close(low, Point3::new(0.0, -1.0, 0.0)), "{low}");
        assert!(close(high, Point3::new(2.0, 1.0, 1.0)), "{high}");
        // Any bearing: the top of the flight is the flight's length along plan_direction.
        let site = stairs("(at: (3, 4), bearing: 230, steps: 4, rise: 0.25, going: 0.5, width: 2)")
            .unwrap();
        let top_back = plan_direction(230f64.to_radians()) * 2.0;
        let top = site.edges.iter().any(|e| match e.curve {
            SiteCurve::Segment { start, end } => {
                let middle = (start.coords + end.coords) / 2.0;
                (middle - Vector3::new(3.0 + top_back.x, 4.0 + top_back.y, 1.0)).norm() < 1e-12
            }
            SiteCurve::Ellipse(_) => false,
        });
        assert!(top);
    }

    #[test]
    fn landings_must_fall_between_steps() {
        let with_landing = |after: u32| {
            stairs(&format!(
                "(at: (0, 0), bearing: 0, steps: 3, rise: 0.25, going: 0.5, width: 2, \
                 landings: [(after: {after}, length: 1)])"
            ))
        };
        assert!(with_landing(2).is_ok());
        let top = with_landing(3).unwrap_err();
        assert!(top.contains("steps 1 to 2"), "{top}");
        assert!(with_landing(7).is_err());
        let twice = stairs(
            "(at: (0, 0), bearing: 0, steps: 3, rise: 0.25, going: 0.5, width: 2, \
             landings: [(after: 1, length: 0.5), (after: 1, length: 1)])",
        )
        .unwrap_err();
        assert!(twice.contains("two landings after step 1"), "{twice}");
        let one = stairs(
            "(at: (0, 0), bearing: 0, steps: 1, rise: 0.25, going: 0.5, width: 2, \
             landings: [(after: 1, length: 1)])",
        )
        .unwrap_err();
        assert!(one.contains("one step"), "{one}");
    }
}
