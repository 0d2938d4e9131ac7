//! The view frame: the eye's position and the rotation from the site frame into the frame
//! the panorama is laid out in.

use super::SphereCurve;
use crate::scene::{SiteCurve, Standpoint};
use nalgebra::{Point3, Rotation3, Vector3};

/// Why an edge has no drawable image from a standpoint. The renderer skips such edges with a
/// warning naming the item; the run goes on.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Degeneracy {
    /// Start and end coincide (or an ellipse has a zero semi-axis).
    ZeroLength,
    /// An end of the edge is at the eye.
    EndAtEye,
    /// The edge's line passes through the eye, so it is seen end-on: a point, or two opposite
    /// points if the eye lies between its ends.
    SeenEndOn,
}

impl std::fmt::Display for Degeneracy {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            Degeneracy::ZeroLength => "it has zero length",
            Degeneracy::EndAtEye => "one of its ends is at the eye",
            Degeneracy::SeenEndOn => "its line passes through the eye (it is seen end-on)",
        })
    }
}

/// Distances from the eye below this (metres) count as "at the eye".
const AT_EYE: f64 = 1e-9;

/// The eye and the rotation site frame -> view frame for one standpoint.
#[derive(Clone, Copy, Debug)]
pub struct ViewFrame {
    eye: Point3<f64>,
    site_to_view: Rotation3<f64>,
}

impl ViewFrame {
    /// The view frame of a standpoint: first turn about the vertical by the heading (so the
    /// heading direction becomes `+y`), then tilt about the new `x` axis by the pitch
    /// (positive looks up), then turn about the view axis by the roll (positive turns the
    /// viewer's up towards their right).
    pub fn new(standpoint: &Standpoint) -> ViewFrame {
        // Rotating (sin h, cos h, 0) counter-clockwise by h about z gives (0, 1, 0).
        let heading = Rotation3::from_axis_angle(&Vector3::z_axis(), standpoint.heading);
        // (0, cos p, sin p) turned by -p about x gives (0, 1, 0).
        let pitch = Rotation3::from_axis_angle(&Vector3::x_axis(), -standpoint.pitch);
        // The rolled up vector (sin r, 0, cos r) turned by -r about y gives (0, 0, 1).
        let roll = Rotation3::from_axis_angle(&Vector3::y_axis(), -standpoint.roll);
        ViewFrame {
            eye: standpoint.eye(),
            site_to_view: roll * pitch * heading,
        }
    }

    /// Where the eye is, in site coordinates.
    pub fn eye(&self) -> Point3<f64> {
        self.eye
    }

    /// A site point relative to the eye, in the view frame.
    pub fn to_view(&self, p: &Point3<f64>) -> Vector3<f64> {
        self.site_to_view * (p - self.eye)
    }

    /// A view-frame direction in the site frame.
    pub fn direction_to_site(&self, d: &Vector3<f64>) -> Vector3<f64> {
        self.site_to_view.inverse_transform_vector(d)
    }

    /// A site direction (free vector) in the view frame.
    pub fn direction_to_view(&self, d: &Vector3<f64>) -> Vector3<f64> {
        self.site_to_view * d
    }

    /// The curve an edge traces on the viewing sphere, or why it has none.
    pub fn sphere_curve(&self, curve: &SiteCurve) -> Result<SphereCurve, Degeneracy> {
        match *curve {
            SiteCurve::Segment { start, end } => {
                let (a, b) = (self.to_view(&start), self.to_view(&end));
                let (length_a, length_b) = (a.norm(), b.norm());
                let scale = length_a.max(length_b).max(1.0);
                if (end - start).norm_squared() <= (1e-12 * scale).powi(2) {
                    return Err(Degeneracy::ZeroLength);
                }
                if length_a <= AT_EYE || length_b <= AT_EYE {
                    return Err(Degeneracy::EndAtEye);
                }
                SphereCurve::great_arc_between_units(a * (1.0 / length_a), b * (1.0 / length_b))
                    .ok_or(Degeneracy::SeenEndOn)
            }
            SiteCurve::Ellipse(ref arc) => {
                let (u, v) = (arc.u, arc.v);
                if u.cross(&v).norm() <= 1e-12 * (u.norm() * v.norm()).max(1e-300)
                    || arc.sweep == 0.0
                {
                    return Err(Degeneracy::ZeroLength);
                }
                Ok(SphereCurve::ellipse_arc(
                    self.to_view(&arc.centre),
                    self.direction_to_view(&u),
                    self.direction_to_view(&v),
                    arc.start,
                    arc.sweep,
                ))
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::EllipseArc;
    use crate::sphere::azimuth_elevation;

    fn standpoint(heading_deg: f64, pitch_deg: f64, roll_deg: f64) -> Standpoint {
        Standpoint::from_degrees("test", 1.0, 2.0, 1.5, heading_deg, pitch_deg, roll_deg)
    }

    #[test]
    fn heading_direction_is_straight_ahead() {
        let view = ViewFrame::new(&standpoint(30.0, 0.0, 0.0));
        let ahead = Point3::new(
            1.0 + 30f64.to_radians().sin(),
            2.0 + 30f64.to_radians().cos(),
            1.5,
        );
        let v = view.to_view(&ahead);
        assert!((v - Vector3::new(0.0, 1.0, 0.0)).norm() < 1e-15, "{v}");
        // East lies 60 degrees to the right of a 30-degree heading.
        let (az, el) = azimuth_elevation(&view.direction_to_view(&Vector3::x()));
        assert!((az.to_degrees() - 60.0).abs() < 1e-12 && el.abs() < 1e-15);
    }

    #[test]
    fn pitch_looks_up_and_roll_turns_up_to_the_right() {
        let pitched = ViewFrame::new(&standpoint(0.0, 20.0, 0.0));
        let up20 = Vector3::new(0.0, 20f64.to_radians().cos(), 20f64.to_radians().sin());
        assert!((pitched.direction_to_view(&up20) - Vector3::y()).norm() < 1e-15);
        let rolled = ViewFrame::new(&standpoint(0.0, 0.0, 10.0));
        let tilted_up = Vector3::new(10f64.to_radians().sin(), 0.0, 10f64.to_radians().cos());
        assert!((rolled.direction_to_view(&tilted_up) - Vector3::z()).norm() < 1e-15);
    }

    #[test]
    fn degenerate_edges_are_named() {
        let view = ViewFrame::new(&standpoint(0.0, 0.0, 0.0));
        let eye = view.eye();
        let seg = |a: Point3<f64>, b: Point3<f64>| {
            view.sphere_curve(&SiteCurve::Segment { start: a, end: b })
        };
        let p = Point3::new(5.0, 5.0, 0.0);
        assert_eq!(seg(p, p), Err(Degeneracy::ZeroLength));
        assert_eq!(seg(eye, p), Err(Degeneracy::EndAtEye));
        let beyond = eye + (p - eye) * 3.0;
        assert_eq!(seg(p, beyond), Err(Degeneracy::SeenEndOn));
        let behind = eye - (p - eye) * 2.0;
        assert_eq!(seg(p, behind), Err(Degeneracy::SeenEndOn));
        assert!(seg(p, Point3::new(6.0, 5.0, 0.0)).is_ok());
    }

    #[test]
    fn the_tolerances_scale_with_distance_and_size() {
        // Looking along +y from the eye at (1, 2, 1.5).
        let view = ViewFrame::new(&standpoint(0.0, 0.0, 0.0));
        let eye = view.eye();
        let seg = |a: Vector3<f64>, b: Vector3<f64>| {
            view.sphere_curve(&SiteCurve::Segment {
                start: eye + a,
                end: eye + b,
            })
        };
        // Half a nanometre a kilometre off is a point (under a part in 1e12 of its distance)...
        let far = Vector3::new(0.0, 1000.0, 0.0);
        let half_nanometre = Vector3::new(5e-10, 0.0, 0.0);
        assert_eq!(seg(far, far + half_nanometre), Err(Degeneracy::ZeroLength));
        // ...and "seen end-on" is an angle (under 1e-12 rad between the ends' directions),
        // whatever the distance: here 5e-13 rad at one and two kilometres, then 5e-11 rad.
        let farther = Vector3::new(0.0, 2000.0, 1e-9);
        assert_eq!(seg(far, farther), Err(Degeneracy::SeenEndOn));
        let curve = seg(far, Vector3::new(0.0, 2000.0, 1e-7)).expect("a thin but true arc");
        let angle = curve.t1 - curve.t0;
        assert!((angle - 5e-11).abs() < 1e-13, "{angle}");

        let ellipse = |u: Vector3<f64>, v: Vector3<f64>, sweep: f64| {
            let centre = eye + far;
            view.sphere_curve(&SiteCurve::from(EllipseArc {
                centre,
                u,
                v,
                start: 0.0,
                sweep,
            }))
        };
        let (u, v) = (Vector3::new(1.0, 0.0, 0.0), Vector3::new(0.0, 0.0, 1.0));
        assert_eq!(ellipse(u, v, 0.0), Err(Degeneracy::ZeroLength));
        assert!(ellipse(u, v, 1.0).is_ok());
        // Kilometre semi-axes 1e-10 m out of line: flat to a part in 1e13 of their product.
        let (long_u, nearly_along) = (u * 1000.0, Vector3::new(1000.0, 0.0, 1e-10));
        assert_eq!(
            ellipse(long_u, nearly_along, 1.0),
            Err(Degeneracy::ZeroLength)
        );
    }

    #[test]
    fn the_reasons_read_as_sentences_for_the_warning() {
        // The command line warns "skipped an edge of <item>: {reason}".
        assert_eq!(Degeneracy::ZeroLength.to_string(), "it has zero length");
        assert!(Degeneracy::EndAtEye.to_string().contains("at the eye"));
        assert!(Degeneracy::SeenEndOn.to_string().contains("end-on"));
    }
}
