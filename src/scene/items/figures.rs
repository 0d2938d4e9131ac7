//! Figures and scale objects: `Figure` (a person standing or seated), `Car` and `Tree`,
//! drawn as true 3D edges at true sizes, so that they shrink with distance exactly as the
//! buildings round them do and give the drawing its scale.
//!
//! A figure is a flat outline of our own design (a cut-out standing square to its
//! facing), proportioned to its stature; its head is an ellipse centred at its eyes, so
//! the eyes of a figure on level ground whose eye height is the viewer's lie on the
//! horizon whatever its distance (the sketcher's rule, common practice). Its stature
//! follows from its eye height: standing eye height is 0.936 of stature (adult
//! anthropometric tables, men and women alike to a few thousandths; from memory), seated
//! eye height above the floor 0.706 (a seat 0.25 of stature high, common practice for
//! chairs and benches, plus sitting eye height 0.456 of stature; from memory).
//!
//! The car is a family car of common size, 4.4 m long, 1.8 m wide and 1.5 m high on
//! wheels 0.65 m across 2.65 m apart (common practice for a mid-sized car; from memory).
//! The tree is a trunk under a round crown; its outline from the eye is the exact rim of
//! the crown's sphere.

use super::super::build::{ellipse_points, facet_count, ItemBuilder};
use super::super::numbers::{default_facing, plan, Finite, Plan, Positive};
use super::super::outline::RoundOutline;
use super::super::site::DEFAULT_EYE_HEIGHT;
use super::standing::foot_at;
use nalgebra::{Point3, Vector3};
use serde::Deserialize;
use std::f64::consts::{PI, TAU};

/// Eye height of a person standing, metres: the scene's standing eye height, a
/// standpoint's (common practice).
pub const STANDING_EYE_HEIGHT: f64 = DEFAULT_EYE_HEIGHT;
/// Eye height of a person seated on a chair or bench, metres (common practice; the same
/// as a seated standpoint's).
pub const SEATED_EYE_HEIGHT: f64 = 1.2;
/// Standing eye height as a share of stature (from memory: adult anthropometric tables).
pub const STANDING_EYES: f64 = 0.936;
/// Seated eye height above the floor as a share of stature (from memory, see above).
pub const SEATED_EYES: f64 = 0.706;
/// The head's half-width and half-height as shares of stature; the chin is the
/// half-height below the eyes and the crown as far above them.
const HEAD: (f64, f64) = (0.045, 1.0 - STANDING_EYES);
/// How far a seated figure's upper body is lowered from standing, share of stature.
const SEATED_DROP: f64 = STANDING_EYES - SEATED_EYES;

/// The right half of a standing figure's outline, seen from the front, as (across, up)
/// shares of its stature: from the neck under the chin, out over the shoulder, down the
/// arm, up inside it to the armpit, down the side to the hip, down the leg to the foot,
/// and up the inside of the leg to the crotch on the axis.
const STANDING_UPPER: [(f64, f64); 11] = [
    (0.028, 0.875),
    (0.030, 0.835),
    (0.125, 0.815),
    (0.140, 0.760),
    (0.135, 0.600),
    (0.140, 0.480),
    (0.115, 0.470),
    (0.108, 0.600),
    (0.100, 0.720),
    (0.088, 0.610),
    (0.098, 0.500),
];
const STANDING_LEGS: [(f64, f64); 6] = [
    (0.085, 0.280),
    (0.075, 0.040),
    (0.095, 0.000),
    (0.020, 0.000),
    (0.022, 0.280),
    (0.000, 0.470),
];
/// A seated figure's legs seen from the front, below the lowered upper body: the knees
/// come towards the viewer over the seat, the shins down to the feet.
const SEATED_LEGS: [(f64, f64); 6] = [
    (0.108, 0.262),
    (0.090, 0.040),
    (0.100, 0.000),
    (0.022, 0.000),
    (0.022, 0.240),
    (0.000, 0.250),
];

/// How a figure holds itself.
#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq, Eq)]
pub enum Pose {
    #[default]
    Standing,
    Seated,
}

/// A person, standing or seated.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FigureSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// Where it stands (or sits), on the plan.
    pub at: Plan,
    #[serde(default)]
    pub pose: Pose,
    /// The azimuth it faces.
    #[serde(default = "default_facing")]
    pub facing: Finite,
    /// Height of its eyes above its feet; by default a standpoint's for the pose.
    #[serde(default)]
    pub eye_height: Option<Positive>,
    /// Height of its feet; by default the ground's under it (0 without a ground).
    #[serde(default)]
    pub base: Option<Finite>,
}

/// A parked car of common size.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CarSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The centre of its plan.
    pub at: Plan,
    /// The azimuth its front points to.
    #[serde(default = "default_facing")]
    pub facing: Finite,
    /// Height of its wheels' feet; by default the ground's under its centre.
    #[serde(default)]
    pub base: Option<Finite>,
}

/// A tree: a trunk under a round crown.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TreeSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    pub at: Plan,
    /// To the top of the crown.
    pub height: Positive,
    /// Diameter of the crown (a sphere).
    pub crown: Positive,
    /// Diameter of the trunk; by default a thirtieth of the height.
    #[serde(default)]
    pub trunk: Option<Positive>,
    /// Height of the trunk's foot; by default the ground's under it.
    #[serde(default)]
    pub base: Option<Finite>,
}

/// The closed outline of a figure of stature 1 (across, up), and the height of its eyes.
pub fn figure_outline(pose: Pose) -> (Vec<(f64, f64)>, f64) {
    let (drop, legs, eyes): (f64, &[(f64, f64)], f64) = match pose {
        Pose::Standing => (0.0, &STANDING_LEGS, STANDING_EYES),
        Pose::Seated => (SEATED_DROP, &SEATED_LEGS, SEATED_EYES),
    };
    let right: Vec<(f64, f64)> = STANDING_UPPER
        .iter()
        .map(|&(x, z)| (x, z - drop))
        .chain(legs.iter().copied())
        .collect();
    // The left half mirrors the right, from the crotch back up to the neck (the crotch,
    // on the axis, once).
    let left = right[..right.len() - 1].iter().rev().map(|&(x, z)| (-x, z));
    (right.iter().copied().chain(left).collect(), eyes)
}

/// Refuses eye heights no person has: above 2.5 m standing (taller than anyone recorded)
/// or 1.9 m seated, in metres.
fn check_eye_height(eyes: f64, pose: Pose) -> Result<(), String> {
    let most = match pose {
        Pose::Standing => 2.5,
        Pose::Seated => 1.9,
    };
    if eyes > most {
        return Err(format!(
            "an eye height of {eyes:.3} m is taller than any person ({pose:?}: at most {most} m); \
             for a statue, use other items"
        ));
    }
    Ok(())
}

pub fn build_figure(b: &mut ItemBuilder, spec: &FigureSpec) -> Result<(), String> {
    let metres = b.metres_per_unit();
    let given = spec.base.map(|base| base.0);
    if let (Some(base), None) = (given, b.ground()) {
        // On a scene without a sloping ground the ground is the level z = 0; on one with a
        // ground, a figure sunk in it is refused by `foot_at`.
        if base < 0.0 {
            return Err(format!(
                "the figure stands under the ground (`base` {base}); figures stand on the \
                 ground (base 0) or on something above it"
            ));
        }
    }
    let default_eyes = match spec.pose {
        Pose::Standing => STANDING_EYE_HEIGHT,
        Pose::Seated => SEATED_EYE_HEIGHT,
    };
    let eyes = spec.eye_height.map_or(default_eyes / metres, |e| e.0);
    check_eye_height(eyes * metres, spec.pose)?;
    let (outline, share) = figure_outline(spec.pose);
    let stature = eyes / share;
    let centre = plan(&spec.at);
    let foot = foot_at(b, centre, given)?;
    b.move_by(
        Vector3::new(centre.x, centre.y, foot),
        spec.facing.0.to_radians(),
    );
    // The figure stands in its local x-z plane, facing +y.
    let at = |(x, z): (f64, f64)| Point3::new(x * stature, 0.0, z * stature);
    let body: Vec<Point3<f64>> = outline.iter().map(|&p| at(p)).collect();
    // Drawn open at the neck, which the head covers.
    b.path(&body, false);
    b.face(&body, &[]);
    let head_centre = Point3::new(0.0, 0.0, eyes);
    let (u, v) = (
        Vector3::x() * (HEAD.0 * stature),
        Vector3::z() * (HEAD.1 * stature),
    );
    b.ellipse(head_centre, u, v, 0.0, TAU);
    let rim = ellipse_points(head_centre, u, v, 0.0, TAU, facet_count(TAU));
    b.convex_face(&rim[..rim.len() - 1]);
    Ok(())
}

/// The car's sizes, metres (see the module's notes).
const CAR_LENGTH: f64 = 4.4;
const CAR_WIDTH: f64 = 1.8;
const CAR_HEIGHT: f64 = 1.5;
const CAR_WHEELBASE: f64 = 2.65;
const CAR_WHEEL: f64 = 0.65;
/// The body runs from above the wheels' hubs to the waist, the glasshouse from the waist
/// to the roof, narrower (tumblehome) and shorter (raked screens).
const CAR_SILL: f64 = 0.3;
const CAR_WAIST: f64 = 0.95;

/// A solid with a bottom and a top quadrilateral (corners in the same order): its twelve
/// edges and six faces.
fn frustum(b: &mut ItemBuilder, bottom: [Point3<f64>; 4], top: [Point3<f64>; 4]) {
    b.path(&bottom, true);
    b.path(&top, true);
    for i in 0..4 {
        b.segment(bottom[i], top[i]);
        b.face(
            &[bottom[i], bottom[(i + 1) % 4], top[(i + 1) % 4], top[i]],
            &[],
        );
    }
    b.face(&bottom, &[]);
    b.face(&top, &[]);
}

/// A level rectangle's corners, across from -x to x and along from y0 to y1, at height z.
fn level(x: f64, y0: f64, y1: f64, z: f64) -> [Point3<f64>; 4] {
    [
        Point3::new(-x, y0, z),
        Point3::new(x, y0, z),
        Point3::new(x, y1, z),
        Point3::new(-x, y1, z),
    ]
}

pub fn build_car(b: &mut ItemBuilder, spec: &CarSpec) -> Result<(), String> {
    let unit = 1.0 / b.metres_per_unit();
    let centre = plan(&spec.at);
    // On a slope the car stands level at the ground under its centre (not tilted to it).
    let foot = foot_at(b, centre, spec.base.map(|base| base.0))?;
    b.move_by(
        Vector3::new(centre.x, centre.y, foot),
        spec.facing.0.to_radians(),
    );
    // Local frame in metres turned into scene units: x across, y towards the front.
    let m = |x: f64| x * unit;
    let (half_width, half_length) = (m(CAR_WIDTH / 2.0), m(CAR_LENGTH / 2.0));
    frustum(
        b,
        level(half_width, -half_length, half_length, m(CAR_SILL)),
        level(half_width, -half_length, half_length, m(CAR_WAIST)),
    );
    frustum(
        b,
        level(m(0.85), m(-1.5), m(0.95), m(CAR_WAIST)),
        level(m(0.65), m(-1.15), m(0.1), m(CAR_HEIGHT)),
    );
    let radius = m(CAR_WHEEL / 2.0);
    for side in [-half_width, half_width] {
        for axle in [-m(CAR_WHEELBASE / 2.0), m(CAR_WHEELBASE / 2.0)] {
            let hub = Point3::new(side, axle, radius);
            let (u, v) = (Vector3::y() * radius, Vector3::z() * radius);
            b.ellipse(hub, u, v, 0.0, TAU);
            let rim = ellipse_points(hub, u, v, 0.0, TAU, facet_count(TAU));
            b.convex_face(&rim[..rim.len() - 1]);
        }
    }
    b.axis(Vector3::y());
    Ok(())
}

pub fn build_tree(b: &mut ItemBuilder, spec: &TreeSpec) -> Result<(), String> {
    let (height, crown) = (spec.height.0, spec.crown.0);
    let trunk = spec.trunk.map_or(height / 30.0, |t| t.0);
    if crown >= height {
        return Err(format!(
            "a crown {crown} across does not fit on a tree {height} high: the crown must be \
             narrower than the tree is tall, to leave a trunk under it"
        ));
    }
    if trunk >= crown {
        return Err(format!(
            "a trunk {trunk} across is not narrower than its crown ({crown})"
        ));
    }
    let centre = plan(&spec.at);
    let foot = Point3::new(
        centre.x,
        centre.y,
        foot_at(b, centre, spec.base.map(|base| base.0))?,
    );
    let radius = crown / 2.0;
    let middle = foot + Vector3::z() * (height - radius);
    // The trunk runs up into the crown, where the crown's faces hide it.
    let (trunk_radius, trunk_height) = (trunk / 2.0, height - radius);
    b.circle(foot, trunk_radius);
    b.round_outline(RoundOutline::Cylinder {
        base: foot,
        radius: trunk_radius,
        height: trunk_height,
    });
    let count = facet_count(TAU);
    let ring = |z: f64, r: f64| {
        ellipse_points(
            foot + Vector3::z() * z,
            Vector3::x() * r,
            Vector3::y() * r,
            0.0,
            TAU,
            count,
        )
    };
    b.strip(&ring(0.0, trunk_radius), &ring(trunk_height, trunk_radius));
    b.round_outline(RoundOutline::Sphere {
        centre: middle,
        radius,
    });
    let up = facet_count(PI);
    let parallel = |k: usize| {
        let elevation = -PI / 2.0 + PI * k as f64 / up as f64;
        let (r, z) = (radius * elevation.cos(), radius * elevation.sin());
        ring(height - radius + z, r)
    };
    for k in 0..up {
        b.strip(&parallel(k), &parallel(k + 1));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::super::checks::{bounds, built, edge_points};
    use super::*;

    fn assert_near(a: f64, b: f64, eps: f64) {
        assert!((a - b).abs() <= eps, "{a} is not within {eps} of {b}");
    }

    fn figure(pose: Pose, eye_height: Option<f64>, base: f64) -> FigureSpec {
        FigureSpec {
            label: None,
            layer: None,
            at: (Finite(0.0), Finite(0.0)),
            pose,
            facing: default_facing(),
            eye_height: eye_height.map(Positive),
            base: Some(Finite(base)),
        }
    }

    #[test]
    fn a_standing_figure_is_as_tall_as_its_eyes_make_it() {
        let site = built("figure", |b| {
            build_figure(b, &figure(Pose::Standing, None, 0.0))
        })
        .unwrap();
        let (low, high) = bounds(&edge_points(&site));
        // Eyes at 1.6 m: stature 1.6 / 0.936 = 1.709 m, from the soles to the crown.
        assert_near(low.z, 0.0, 1e-12);
        assert_near(high.z, 1.6 / STANDING_EYES, 1e-9);
        // A flat outline across its facing (south): no depth.
        assert_near(high.y - low.y, 0.0, 1e-12);
        // Our outline is 0.28 of stature across the arms, shoulder breadth being about a
        // quarter of stature (from memory: adult anthropometric tables).
        assert_near(high.x - low.x, 0.28 * 1.6 / STANDING_EYES, 1e-9);
    }

    #[test]
    fn a_seated_figure_has_its_eyes_at_a_seated_height() {
        let site = built("figure", |b| {
            build_figure(b, &figure(Pose::Seated, None, 0.0))
        })
        .unwrap();
        let (_, high) = bounds(&edge_points(&site));
        let stature = 1.2 / SEATED_EYES;
        assert_near(high.z, 1.2 + HEAD.1 * stature, 1e-9);
    }

    #[test]
    fn the_outline_does_not_cross_itself() {
        for pose in [Pose::Standing, Pose::Seated] {
            let (points, _) = figure_outline(pose);
            let n = points.len();
            let cross = |a: (f64, f64), b: (f64, f64), c: (f64, f64)| {
                (b.0 - a.0) * (c.1 - a.1) - (b.1 - a.1) * (c.0 - a.0)
            };
            for i in 0..n {
                for j in i + 2..n {
                    if i == 0 && j == n - 1 {
                        continue;
                    }
                    let (a, b) = (points[i], points[(i + 1) % n]);
                    let (c, d) = (points[j], points[(j + 1) % n]);
                    let crosses = cross(a, b, c) * cross(a, b, d) < 0.0
                        && cross(c, d, a) * cross(c, d, b) < 0.0;
                    assert!(!crosses, "{pose:?}: sides {i} and {j} cross");
                }
            }
        }
    }

    #[test]
    fn figures_under_the_ground_or_taller_than_people_are_refused() {
        let error = built("figure", |b| {
            build_figure(b, &figure(Pose::Standing, None, -0.5))
        })
        .unwrap_err();
        assert!(error.contains("under the ground"), "{error}");
        let error = built("figure", |b| {
            build_figure(b, &figure(Pose::Standing, Some(3.0), 0.0))
        })
        .unwrap_err();
        assert!(error.contains("taller than any person"), "{error}");
    }

    #[test]
    fn a_car_fills_its_common_size() {
        let spec = CarSpec {
            label: None,
            layer: None,
            at: (Finite(0.0), Finite(0.0)),
            facing: Finite(90.0),
            base: None,
        };
        let site = built("car", |b| build_car(b, &spec)).unwrap();
        let (low, high) = bounds(&edge_points(&site));
        // Facing east: its length along x.
        assert_near(high.x - low.x, CAR_LENGTH, 1e-9);
        assert_near(high.y - low.y, CAR_WIDTH, 1e-9);
        assert_near(low.z, 0.0, 1e-9);
        assert_near(high.z, CAR_HEIGHT, 1e-9);
    }

    #[test]
    fn a_tree_reaches_its_height_and_its_crown_is_a_sphere() {
        let spec = TreeSpec {
            label: None,
            layer: None,
            at: (Finite(0.0), Finite(0.0)),
            height: Positive(10.0),
            crown: Positive(6.0),
            trunk: None,
            base: None,
        };
        let site = built("tree", |b| build_tree(b, &spec)).unwrap();
        // From beside it, level with the crown's centre 7 m up and 20 m away, the rim is
        // the circle of tangent points: radius r sqrt(d^2 - r^2) / d (tangent to a
        // sphere, any geometry handbook), its top as high as that above the centre.
        let eye = Point3::new(0.0, -20.0, 7.0);
        let rims: Vec<_> = site
            .outline_edges_from(&eye)
            .into_iter()
            .filter_map(|e| match e.curve {
                crate::scene::SiteCurve::Ellipse(arc) => Some((arc.u.norm(), arc.v.norm())),
                _ => None,
            })
            .collect();
        assert_eq!(rims.len(), 1);
        let expected = 3.0 * (400.0f64 - 9.0).sqrt() / 20.0;
        assert_near(rims[0].0, expected, 1e-9);
        assert_near(rims[0].1, expected, 1e-9);
        let mut too_big = TreeSpec { ..spec };
        too_big.crown = Positive(12.0);
        assert!(built("tree", |b| build_tree(b, &too_big)).is_err());
    }
}
