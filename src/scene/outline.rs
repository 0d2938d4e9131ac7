//! Outlines that depend on where the eye is: the two generators of a column or a cone that
//! the lines of sight graze, and the rim of a dome as seen from the eye.
//!
//! Each is found exactly from the eye's position (tangent planes through the eye), so a
//! round column reads correctly from anywhere.

use super::curve::{EllipseArc, SiteCurve};
use nalgebra::{Point3, Vector2, Vector3};
use std::f64::consts::PI;

/// A round shape with a vertical axis.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum RoundOutline {
    /// A vertical cylinder standing on the circle of `radius` about `base`.
    Cylinder {
        /// The centre of its foot.
        base: Point3<f64>,
        /// Its radius.
        radius: f64,
        /// Its height.
        height: f64,
    },
    /// A cone on the circle of `radius` about `base`, its apex `height` above `base`.
    Cone {
        /// The centre of its foot.
        base: Point3<f64>,
        /// Its radius at the foot.
        radius: f64,
        /// The height of its apex above the foot.
        height: f64,
    },
    /// The upper half of a spheroid with a vertical axis (a dome standing on its equator):
    /// a hemisphere when `height` equals `radius`.
    Dome {
        /// The centre of its equator.
        centre: Point3<f64>,
        /// The radius of its equator.
        radius: f64,
        /// The height of its crown above the equator.
        height: f64,
    },
    /// A half elliptic cylinder lying along a horizontal axis (a round roof): its
    /// sections by two vertical end planes are the half ellipses `centre + u cos t +
    /// up sin t`, t from 0 to pi, the same t on both ends on one straight generator (each
    /// end's `u` reaches the same distance across the axis, so an end may stand askew).
    Barrel {
        /// Each end's section: its centre on the axis and its half-span along the end.
        ends: [(Point3<f64>, Vector3<f64>); 2],
        /// The crown's rise above the axis (vertical).
        up: Vector3<f64>,
    },
    /// A whole sphere (a tree's crown).
    Sphere {
        /// Its centre.
        centre: Point3<f64>,
        /// Its radius.
        radius: f64,
    },
}

/// The points where the two tangents from `from` touch the circle of `radius` about
/// `centre`, or `None` when `from` is on or inside the circle.
///
/// The tangent points lie at the angle acos(r / d) either side of the direction from the
/// centre towards `from`, d being the distance from the centre (right angle between radius
/// and tangent: Euclid, Elements III.18; any geometry handbook).
pub fn tangent_points(
    centre: Vector2<f64>,
    radius: f64,
    from: Vector2<f64>,
) -> Option<[Vector2<f64>; 2]> {
    let towards = from - centre;
    let distance = towards.norm();
    if distance <= radius * (1.0 + 1e-12) {
        return None;
    }
    let along = towards / distance;
    let across = Vector2::new(-along.y, along.x);
    // cos(angle) = r / d, sin(angle) = sqrt(d^2 - r^2) / d, written without cancellation.
    let cos = radius / distance;
    let sin = ((distance - radius) * (distance + radius)).sqrt() / distance;
    Some([
        centre + (along * cos + across * sin) * radius,
        centre + (along * cos - across * sin) * radius,
    ])
}

impl RoundOutline {
    /// The outline curves seen from `eye` (none when the eye is inside the shape's plan or
    /// otherwise sees no outline).
    pub fn curves_from(&self, eye: &Point3<f64>) -> Vec<SiteCurve> {
        match *self {
            RoundOutline::Cylinder {
                base,
                radius,
                height,
            } => {
                let plan = |p: &Point3<f64>| Vector2::new(p.x, p.y);
                tangent_points(plan(&base), radius, plan(eye))
                    .map(|points| {
                        points
                            .iter()
                            .map(|t| SiteCurve::Segment {
                                start: Point3::new(t.x, t.y, base.z),
                                end: Point3::new(t.x, t.y, base.z + height),
                            })
                            .collect()
                    })
                    .unwrap_or_default()
            }
            RoundOutline::Cone {
                base,
                radius,
                height,
            } => cone_generators(base, radius, height, eye),
            RoundOutline::Dome {
                centre,
                radius,
                height,
            } => spheroid_dome_rim(centre, radius, height, eye)
                .into_iter()
                .collect(),
            RoundOutline::Sphere { centre, radius } => {
                sphere_rim(centre, radius, eye).into_iter().collect()
            }
            RoundOutline::Barrel { ends, up } => barrel_generators(ends, up, eye),
        }
    }
}

/// The generators of a cone whose tangent planes hold the eye. A plane through the apex
/// and the eye meets the base plane in a line through P, the point where the line from the
/// apex through the eye meets that plane; the plane is tangent to the cone where that
/// line is tangent to the base circle, so the generators run from the apex to the tangent
/// points from P.
fn cone_generators(
    base: Point3<f64>,
    radius: f64,
    height: f64,
    eye: &Point3<f64>,
) -> Vec<SiteCurve> {
    let apex = base + Vector3::z() * height;
    let from_apex = eye - apex;
    let centre = Vector2::new(base.x, base.y);
    let touch = if from_apex.z.abs() <= 1e-12 * from_apex.norm() {
        // The eye is level with the apex: the tangent planes are vertical, parallel to the
        // line of sight, and touch the circle across it.
        let along = Vector2::new(from_apex.x, from_apex.y);
        if along.norm() == 0.0 {
            return Vec::new();
        }
        let across = Vector2::new(-along.y, along.x).normalize() * radius;
        Some([centre + across, centre - across])
    } else {
        // Along the line apex + s (eye - apex), the base plane is at s = -height / dz.
        let s = -height / from_apex.z;
        let p = apex + from_apex * s;
        tangent_points(centre, radius, Vector2::new(p.x, p.y))
    };
    touch
        .map(|points| {
            points
                .iter()
                .map(|t| SiteCurve::Segment {
                    start: apex,
                    end: Point3::new(t.x, t.y, base.z),
                })
                .collect()
        })
        .unwrap_or_default()
}

/// The generators of a half elliptic cylinder whose tangent planes hold the eye. A plane
/// holding a generator holds the axis's direction, so it is tangent where its trace on any
/// section across the axis is tangent to that section. In the section's own coordinates
/// (across in units of the half-span, up in units of the rise) the section is the unit
/// circle, and the affine map keeps tangency: the generators stand at the tangent points
/// from the eye's own coordinates, on the upper half.
fn barrel_generators(
    ends: [(Point3<f64>, Vector3<f64>); 2],
    up: Vector3<f64>,
    eye: &Point3<f64>,
) -> Vec<SiteCurve> {
    let [(first, u0), (second, u1)] = ends;
    let axis = Vector2::new(second.x - first.x, second.y - first.y);
    if axis.norm() == 0.0 || up.norm() == 0.0 {
        return Vec::new();
    }
    let across = Vector2::new(-axis.y, axis.x) / axis.norm();
    let span = across.dot(&Vector2::new(u0.x, u0.y));
    if span == 0.0 {
        return Vec::new();
    }
    let from = eye - first;
    let at = Vector2::new(
        across.dot(&Vector2::new(from.x, from.y)) / span,
        from.z / up.norm(),
    );
    tangent_points(Vector2::zeros(), 1.0, at)
        .map(|points| {
            points
                .iter()
                .filter(|t| t.y >= 0.0)
                .map(|t| SiteCurve::Segment {
                    start: first + u0 * t.x + up * t.y,
                    end: second + u1 * t.x + up * t.y,
                })
                .collect()
        })
        .unwrap_or_default()
}

/// The part of a sphere's outline seen from the eye that lies on its upper half.
///
/// The lines of sight from an eye at distance D from the centre touch a sphere of radius R
/// on a circle of radius R sqrt(1 - R^2 / D^2) whose centre lies R^2 / D from the sphere's
/// centre towards the eye (the tangent cone; same right-angle fact as for a circle).
/// The whole rim of a sphere seen from `eye`: the circle where the cone of sight lines
/// from the eye touches it, centred r^2 / d from the centre towards the eye, of radius
/// r sqrt(d^2 - r^2) / d (right angle between radius and tangent, any geometry handbook).
fn sphere_rim(centre: Point3<f64>, radius: f64, eye: &Point3<f64>) -> Option<SiteCurve> {
    let towards = eye - centre;
    let distance = towards.norm();
    if distance <= radius * (1.0 + 1e-12) {
        return None;
    }
    let n = towards / distance;
    let rim_centre = centre + n * (radius * radius / distance);
    let rim_radius = radius * ((distance - radius) * (distance + radius)).sqrt() / distance;
    let horizontal = Vector3::new(-n.y, n.x, 0.0);
    let u = if horizontal.norm() < 1e-12 {
        Vector3::x()
    } else {
        horizontal.normalize()
    };
    let v = n.cross(&u);
    Some(SiteCurve::from(EllipseArc {
        centre: rim_centre,
        u: u * rim_radius,
        v: v * rim_radius,
        start: 0.0,
        sweep: 2.0 * PI,
    }))
}

/// The rim of the upper half of a spheroid (equator `radius`, crown `height` above it) seen
/// from `eye`. Stretching heights by radius / height about the equator's plane turns the
/// spheroid into a sphere; an affine map keeps lines of sight lines and tangency tangency,
/// so the rim is the sphere's rim seen from the stretched eye, squeezed back. A dome too
/// flat to stretch (no height, or so little that the stretch overflows) has no rim.
fn spheroid_dome_rim(
    centre: Point3<f64>,
    radius: f64,
    height: f64,
    eye: &Point3<f64>,
) -> Option<SiteCurve> {
    let stretch = radius / height;
    if !(height > 0.0 && stretch.is_finite()) {
        return None;
    }
    let stretched_eye = Point3::new(eye.x, eye.y, centre.z + (eye.z - centre.z) * stretch);
    let squeeze = |v: Vector3<f64>| Vector3::new(v.x, v.y, v.z / stretch);
    match dome_rim(centre, radius, &stretched_eye)? {
        SiteCurve::Ellipse(mut arc) => {
            arc.centre = centre + squeeze(arc.centre - centre);
            arc.u = squeeze(arc.u);
            arc.v = squeeze(arc.v);
            Some(SiteCurve::Ellipse(arc))
        }
        other => Some(other),
    }
}

fn dome_rim(centre: Point3<f64>, radius: f64, eye: &Point3<f64>) -> Option<SiteCurve> {
    let towards = eye - centre;
    let distance = towards.norm();
    if distance <= radius * (1.0 + 1e-12) {
        return None;
    }
    let n = towards / distance;
    let rim_centre = centre + n * (radius * radius / distance);
    let rim_radius = radius * ((distance - radius) * (distance + radius)).sqrt() / distance;
    let rim_height = rim_centre.z - centre.z;
    // u horizontal and across the line of sight; v completes the rim's plane, pointing up.
    let horizontal = Vector3::new(-n.y, n.x, 0.0);
    if horizontal.norm() < 1e-12 {
        // Straight above or below the centre: the rim is a level circle.
        return (rim_height > 0.0).then(|| {
            SiteCurve::from(EllipseArc {
                centre: rim_centre,
                u: Vector3::x() * rim_radius,
                v: Vector3::y() * rim_radius,
                start: 0.0,
                sweep: 2.0 * PI,
            })
        });
    }
    let u = horizontal.normalize();
    let mut v = n.cross(&u);
    if v.z < 0.0 {
        v = -v;
    }
    // Height above the equator: rim_height + rim_radius v.z sin t >= 0.
    let k = -rim_height / (rim_radius * v.z);
    let (start, sweep) = if v.z <= 1e-12 {
        if rim_height >= 0.0 {
            (0.0, 2.0 * PI)
        } else {
            return None;
        }
    } else if k <= -1.0 {
        (0.0, 2.0 * PI)
    } else if k >= 1.0 {
        return None;
    } else {
        let low = k.asin();
        (low, PI - 2.0 * low)
    };
    Some(SiteCurve::from(EllipseArc {
        centre: rim_centre,
        u: u * rim_radius,
        v: v * rim_radius,
        start,
        sweep,
    }))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tangent_points_are_at_right_angles_to_their_radii() {
        let centre = Vector2::new(1.0, 2.0);
        let from = Vector2::new(6.0, -1.0);
        let [a, b] = tangent_points(centre, 1.5, from).unwrap();
        for t in [a, b] {
            assert!(((t - centre).norm() - 1.5).abs() < 1e-12);
            assert!((t - centre).dot(&(from - t)).abs() < 1e-12);
        }
        assert!(tangent_points(centre, 1.5, centre).is_none());
    }

    #[test]
    fn dome_rim_from_the_side_is_a_half_circle() {
        // Eye level with the centre: the rim's upper half is the half above the equator.
        let rim = dome_rim(Point3::origin(), 1.0, &Point3::new(0.0, -4.0, 0.0)).unwrap();
        let SiteCurve::Ellipse(arc) = rim else {
            panic!()
        };
        assert!(arc.start.abs() < 1e-12 && (arc.sweep - PI).abs() < 1e-12);
    }

    #[test]
    fn a_spheroid_domes_rim_touches_it_along_the_lines_of_sight() {
        // Equator radius 5 about (1, 2, 3), crown 2 above it. On the surface
        // (x^2 + y^2) / r^2 + z^2 / h^2 = 1 the normal is (x / r^2, y / r^2, z / h^2); a
        // line of sight grazes it where that normal is at right angles to it.
        let (centre, r, h) = (Point3::new(1.0, 2.0, 3.0), 5.0, 2.0);
        for eye in [
            Point3::new(20.0, -7.0, 4.5),
            Point3::new(-12.0, 3.0, 3.0),
            Point3::new(2.0, 9.0, 30.0),
        ] {
            let Some(SiteCurve::Ellipse(arc)) = spheroid_dome_rim(centre, r, h, &eye) else {
                panic!("no rim from {eye:?}")
            };
            for k in 0..=8 {
                let p = arc.along(k as f64 / 8.0);
                let q = p - centre;
                let on = (q.x * q.x + q.y * q.y) / (r * r) + q.z * q.z / (h * h);
                assert!((on - 1.0).abs() < 1e-9, "{on}");
                assert!(q.z >= -1e-9, "below the equator: {q:?}");
                let normal = Vector3::new(q.x / (r * r), q.y / (r * r), q.z / (h * h));
                let sight = (eye - p).normalize();
                assert!(normal.normalize().dot(&sight).abs() < 1e-9);
            }
        }
        // A hemisphere is the spheroid of equal axes.
        let eye = Point3::new(6.0, -4.0, 5.0);
        assert_eq!(
            spheroid_dome_rim(centre, 2.0, 2.0, &eye),
            dome_rim(centre, 2.0, &eye)
        );
        // No rim (rather than one of NaNs) for a dome of no height, or one so low that
        // stretching it to a sphere overflows, even seen from its equator's plane.
        for height in [0.0, 1e-320, -1.0, f64::NAN] {
            for eye in [Point3::new(20.0, -7.0, 3.0), Point3::new(20.0, -7.0, 4.5)] {
                assert_eq!(spheroid_dome_rim(centre, r, height, &eye), None, "{height}");
            }
        }
    }

    #[test]
    fn a_barrels_generators_are_where_lines_of_sight_graze_it() {
        // Axis along x at height 4, half-span 3 across (y), rise 2; one end askew. The
        // cylinder is (y - 5)^2 / 9 + (z - 4)^2 / 4 = 1, its normal (0, (y - 5) / 9,
        // (z - 4) / 4): a line of sight grazes it where that is at right angles to it.
        let ends = [
            (Point3::new(0.0, 5.0, 4.0), Vector3::new(0.0, 3.0, 0.0)),
            (Point3::new(11.0, 5.0, 4.0), Vector3::new(1.0, 3.0, 0.0)),
        ];
        let up = Vector3::new(0.0, 0.0, 2.0);
        for (eye, count) in [
            (Point3::new(5.0, -20.0, 1.5), 1),
            (Point3::new(-8.0, 5.5, 12.0), 2),
            (Point3::new(30.0, 40.0, 5.0), 1),
        ] {
            let curves = barrel_generators(ends, up, &eye);
            assert_eq!(curves.len(), count, "{eye:?}");
            for curve in curves {
                let SiteCurve::Segment { start, end } = curve else {
                    panic!()
                };
                for p in [start, end] {
                    let (y, z) = (p.y - 5.0, p.z - 4.0);
                    assert!((y * y / 9.0 + z * z / 4.0 - 1.0).abs() < 1e-12);
                    assert!(z >= 0.0);
                    let normal = Vector3::new(0.0, y / 9.0, z / 4.0).normalize();
                    assert!(normal.dot(&(eye - p).normalize()).abs() < 1e-12);
                }
                // A generator runs along the axis.
                assert!((end.y - start.y).abs() < 1e-12 && (end.z - start.z).abs() < 1e-12);
            }
        }
        // Inside the cylinder, under the roof: no outline.
        assert!(barrel_generators(ends, up, &Point3::new(5.0, 5.0, 3.0)).is_empty());
    }

    #[test]
    fn dome_rim_seen_from_above_is_whole() {
        let rim = dome_rim(Point3::origin(), 1.0, &Point3::new(0.3, -0.2, 5.0)).unwrap();
        let SiteCurve::Ellipse(arc) = rim else {
            panic!()
        };
        assert!((arc.sweep - 2.0 * PI).abs() < 1e-12);
    }
}
