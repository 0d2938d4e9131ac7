//! The one curve type the projector knows: `P(t) = c + u cos t + v sin t`, `t0 <= t <= t1`,
//! a point set relative to the eye in the view frame. Its image on the viewing sphere is
//! `P(t) / |P(t)|`.
//!
//! Why one trigonometric form: it covers both kinds of edge a site holds.
//! - A straight segment seen from the eye lies in a plane through the eye, so its image is a
//!   great-circle arc; written as `c = 0`, `u` = the unit direction of the start, `v` = the
//!   unit direction a quarter turn further in that plane, `t` = the angle travelled along the
//!   arc (unit speed on the sphere). It is built from the two end directions alone.
//! - A circle or ellipse (arches, columns, domes) is `c` = its centre minus the eye and `u`,
//!   `v` = its semi-axes, `t` = the eccentric angle.
//!
//! Any plane through the eye cuts such a curve where `m . P(t) = 0`, that is
//! `C + A cos t + B sin t = 0`, which has a closed-form solution: that is how the seam is found
//! exactly. Derivatives are exact too, so the flattener can bound its chord error.

use nalgebra::Vector3;
use std::f64::consts::{PI, TAU};

/// A trigonometric curve on the viewing sphere (see the module docs).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SphereCurve {
    /// `c` of `P(t) = c + u cos t + v sin t`, in the view frame (zero for great circles).
    pub centre: Vector3<f64>,
    /// `u`, the part along `cos t`.
    pub u: Vector3<f64>,
    /// `v`, the part along `sin t`.
    pub v: Vector3<f64>,
    /// Where the curve starts, radians of `t`.
    pub t0: f64,
    /// Where it ends.
    pub t1: f64,
    /// `P(t1)` where it is known exactly (a great arc's end direction, as given), which the
    /// trigonometric form only reproduces to the last bit or two; `None` otherwise. Only a
    /// great arc has one, so where it is set, `u` and `v` are unit and square to each other.
    pub exact_end: Option<Vector3<f64>>,
}

/// The roots of `m . P(t) = 0` strictly inside `(t0, t1)`, ascending. There are at most two
/// because the curve's parameter range never exceeds one turn.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct TrigRoots {
    roots: [f64; 2],
    len: usize,
}

impl TrigRoots {
    fn push(&mut self, t: f64) {
        if self.len < 2 {
            self.roots[self.len] = t;
            self.len += 1;
        }
    }

    /// The roots found, in order.
    pub fn as_slice(&self) -> &[f64] {
        &self.roots[..self.len]
    }
}

impl IntoIterator for TrigRoots {
    type Item = f64;
    type IntoIter = std::iter::Take<std::array::IntoIter<f64, 2>>;

    fn into_iter(self) -> Self::IntoIter {
        self.roots.into_iter().take(self.len)
    }
}

/// The relative size below which a coefficient counts as zero when deciding that a curve lies
/// entirely in a plane (a curve drawn along the seam itself, for example).
const IN_PLANE_EPSILON: f64 = 1e-12;

impl SphereCurve {
    /// The great-circle arc from direction `a` to direction `b` (any lengths, not parallel or
    /// opposite). Returns `None` when the directions are (anti)parallel within `1e-12` rad,
    /// where the plane of the arc is undefined.
    pub fn great_arc(a: &Vector3<f64>, b: &Vector3<f64>) -> Option<SphereCurve> {
        let a = a.try_normalize(0.0)?;
        let b = b.try_normalize(0.0)?;
        Self::great_arc_between_units(a, b)
    }

    /// [`SphereCurve::great_arc`] for directions already of unit length.
    pub fn great_arc_between_units(a: Vector3<f64>, b: Vector3<f64>) -> Option<SphereCurve> {
        let normal = a.cross(&b);
        let sin_angle = normal.norm();
        // NaN (from non-finite input) must be refused too, so not `sin_angle < 1e-12` alone.
        if sin_angle.is_nan() || sin_angle < 1e-12 {
            return None;
        }
        let angle = arc_angle(sin_angle, a.dot(&b));
        // v = n x a / |n| is the unit vector a quarter turn from `a` towards `b` in the plane.
        let v = normal.cross(&a) * (1.0 / sin_angle);
        Some(SphereCurve {
            centre: Vector3::zeros(),
            u: a,
            v,
            t0: 0.0,
            t1: angle,
            exact_end: Some(b),
        })
    }

    /// An elliptic arc with the given centre (relative to the eye) and semi-axes, from
    /// eccentric angle `start` through `sweep` (radians, either sign, at most one turn).
    pub fn ellipse_arc(
        centre: Vector3<f64>,
        u: Vector3<f64>,
        v: Vector3<f64>,
        start: f64,
        sweep: f64,
    ) -> SphereCurve {
        let sweep = sweep.clamp(-TAU, TAU);
        if sweep >= 0.0 {
            SphereCurve {
                centre,
                u,
                v,
                t0: start,
                t1: start + sweep,
                exact_end: None,
            }
        } else {
            // Run the same points the other way round so that t0 < t1 always holds:
            // P(-s) with v negated traces the arc backwards.
            SphereCurve {
                centre,
                u,
                v: -v,
                t0: -start,
                t1: -start - sweep,
                exact_end: None,
            }
        }
    }

    /// Whether the curve lies on a great circle (its centre is the eye).
    pub fn is_great_circle(&self) -> bool {
        self.centre == Vector3::zeros()
    }

    /// `P(t)`, a point of the curve in the view frame (its direction is what is drawn).
    pub fn position(&self, t: f64) -> Vector3<f64> {
        let (s, c) = t.sin_cos();
        self.centre + self.u * c + self.v * s
    }

    /// `dP/dt`.
    pub fn velocity(&self, t: f64) -> Vector3<f64> {
        let (s, c) = t.sin_cos();
        self.v * c - self.u * s
    }

    /// The coefficients `(C, A, B)` of `m . P(t) = C + A cos t + B sin t`.
    fn coefficients(&self, m: &Vector3<f64>) -> (f64, f64, f64) {
        (m.dot(&self.centre), m.dot(&self.u), m.dot(&self.v))
    }

    /// Whether the whole curve lies in the plane through the eye with normal `m`.
    pub fn lies_in_plane(&self, m: &Vector3<f64>) -> bool {
        let (c, a, b) = self.coefficients(m);
        // Largest components rather than norms: the same test within a factor of two, and
        // no square roots (this runs for every edge).
        let scale = self.centre.amax() + self.u.amax() + self.v.amax();
        c.abs().max(a.abs()).max(b.abs()) <= IN_PLANE_EPSILON * scale * m.amax()
    }

    /// Parameters strictly inside the range where the curve meets the plane through the eye
    /// with normal `m`: the solutions of `C + A cos t + B sin t = 0`, that is
    /// `R cos(t - phi) = -C` with `R = hypot(A, B)`, `phi = atan2(B, A)`, so
    /// `t = phi +- acos(-C / R)` (any trigonometry handbook). A curve lying in the plane has no
    /// isolated roots and returns none; test that with [`SphereCurve::lies_in_plane`].
    pub fn plane_crossings(&self, m: &Vector3<f64>) -> TrigRoots {
        let mut out = TrigRoots::default();
        if self.lies_in_plane(m) {
            return out;
        }
        let (c, a, b) = self.coefficients(m);
        let r = (a * a + b * b).sqrt();
        if r == 0.0 || c.abs() > r {
            return out;
        }
        let phi = b.atan2(a);
        let spread = (-c / r).clamp(-1.0, 1.0).acos();
        let mut candidates = [phi - spread, phi + spread];
        if spread == 0.0 || spread == PI {
            // A tangency: one double root, counted once.
            candidates[1] = f64::NAN;
        }
        for root in candidates.iter_mut() {
            if root.is_nan() {
                continue;
            }
            // Bring the root into [t0, t0 + 2 pi).
            *root = self.t0 + wrap_turn(*root - self.t0);
        }
        candidates.sort_by(|x, y| x.total_cmp(y));
        for root in candidates {
            if root > self.t0 && root < self.t1 {
                out.push(root);
            }
        }
        out
    }

    /// Where the curve crosses the half-plane of directions with the given azimuth (the
    /// meridian at `azimuth`, radians): the crossings of the full meridian plane that fall on
    /// that side of the vertical. The seam is the meridian at `pi`.
    pub fn meridian_crossings(&self, azimuth: f64) -> TrigRoots {
        let (sin_az, cos_az) = azimuth.sin_cos();
        // The meridian plane holds the vertical and (sin az, cos az, 0); its normal:
        let normal = Vector3::new(cos_az, -sin_az, 0.0);
        let along = Vector3::new(sin_az, cos_az, 0.0);
        let mut out = TrigRoots::default();
        for &t in self.plane_crossings(&normal).as_slice() {
            if along.dot(&self.position(t)) > 0.0 {
                out.push(t);
            }
        }
        out
    }

    /// Where the curve comes nearest the zenith (`towards_zenith`) or the nadir, if that is
    /// closer than `within` radians and happens strictly inside the range: the parameter and
    /// the angular distance to the pole there.
    ///
    /// For a great circle with unit normal `n`, the nearest point to the pole `p` is `p`
    /// projected into the plane, at angle `asin(|n . p|)` from it. Other curves are searched
    /// numerically (64 samples, then golden-section refinement of each local minimum).
    pub fn pole_approaches(&self, towards_zenith: bool, within: f64) -> Vec<(f64, f64)> {
        let pole = Vector3::new(0.0, 0.0, if towards_zenith { 1.0 } else { -1.0 });
        if self.is_great_circle() {
            let normal = self.u.cross(&self.v).normalize();
            let sine = normal.dot(&pole).abs();
            if sine >= within.sin() {
                return Vec::new(); // the whole circle keeps further than `within` away
            }
            // The point of the circle nearest the pole is the pole's projection into the
            // plane; inside the arc only if it lies between the ends (cheap cross-product
            // tests before any trigonometry, then the parameter's range decides). Neither
            // the tests nor the parameter see a component along the normal, so the pole
            // itself stands for its projection.
            let (start, end) = (self.position(self.t0), self.position(self.t1));
            let inside = self.t1 - self.t0 >= std::f64::consts::PI
                || (start.cross(&pole).dot(&normal) > 0.0 && pole.cross(&end).dot(&normal) > 0.0);
            if !inside {
                return Vec::new();
            }
            let t = self.v.dot(&pole).atan2(self.u.dot(&pole));
            let t = self.t0 + wrap_turn(t - self.t0);
            return if t > self.t0 && t < self.t1 {
                vec![(t, sine.min(1.0).asin())]
            } else {
                Vec::new()
            };
        }
        self.pole_approaches_numerically(&pole, within)
    }

    #[cold]
    fn pole_approaches_numerically(&self, pole: &Vector3<f64>, within: f64) -> Vec<(f64, f64)> {
        const SAMPLES: usize = 64;
        let step = (self.t1 - self.t0) / SAMPLES as f64;
        let distance = |t: f64| super::angle_between(&self.position(t), pole);
        let values: Vec<f64> = (0..=SAMPLES)
            .map(|i| distance(self.t0 + step * i as f64))
            .collect();
        let mut found = Vec::new();
        let (lowest, highest) = values.iter().fold((f64::INFINITY, 0.0f64), |(lo, hi), &v| {
            (lo.min(v), hi.max(v))
        });
        if highest - lowest <= 1e-12 * highest {
            // A circle round the vertical (a parallel) keeps one distance: no nearest point.
            return found;
        }
        // A sampled minimum at either end still brackets a minimum that may lie inside.
        for i in 0..=SAMPLES {
            let lower = i == 0 || values[i] <= values[i - 1];
            let upper = i == SAMPLES || values[i] <= values[i + 1];
            if lower && upper {
                let (t, d) = golden_section_minimum(
                    &distance,
                    self.t0 + step * i.saturating_sub(1) as f64,
                    self.t0 + step * (i + 1).min(SAMPLES) as f64,
                );
                if d < within && t > self.t0 && t < self.t1 {
                    found.push((t, d));
                }
            }
        }
        found
    }
}

/// `atan2(sin, cos)` for `sin >= 0`: the angle of an arc from the sine and cosine of it,
/// each times the same positive factor. An arc under 1/32 rad (most edges of a site, seen
/// from a standpoint) takes the Taylor series `atan r = r - r^3/3 + r^5/5 - ...`,
/// `r = sin / cos` (Abramowitz and Stegun 4.4.42, from memory), to its `r^11` term, with no
/// library call. The series alternates with falling terms, so it is off by less than its
/// next term, `r^13 / 13 < 7e-20 r`: below the rounding of `r` itself.
fn arc_angle(sin: f64, cos: f64) -> f64 {
    if sin <= cos * (1.0 / 32.0) {
        let r = sin / cos;
        let r2 = r * r;
        let tail = 1.0 / 7.0 - r2 * (1.0 / 9.0 - r2 * (1.0 / 11.0));
        r * (1.0 - r2 * (1.0 / 3.0 - r2 * (1.0 / 5.0 - r2 * tail)))
    } else {
        sin.atan2(cos)
    }
}

/// An angle brought into `[0, 2 pi)` by whole turns (for angles within a few turns of zero;
/// cheaper than `rem_euclid`, which calls `fmod`).
fn wrap_turn(mut angle: f64) -> f64 {
    if !angle.is_finite() {
        return angle;
    }
    while angle < 0.0 {
        angle += TAU;
    }
    while angle >= TAU {
        angle -= TAU;
    }
    angle
}

/// The minimum of a unimodal function on `[a, b]` by golden-section search (Kiefer 1953;
/// Press et al., "Numerical Recipes", 3rd ed., section 10.2), to a bracket of `1e-15` of the
/// range.
fn golden_section_minimum(f: &impl Fn(f64) -> f64, mut a: f64, mut b: f64) -> (f64, f64) {
    let ratio = (5f64.sqrt() - 1.0) / 2.0;
    let mut x1 = b - ratio * (b - a);
    let mut x2 = a + ratio * (b - a);
    let (mut f1, mut f2) = (f(x1), f(x2));
    let stop = (b - a).abs() * 1e-15;
    for _ in 0..200 {
        if (b - a).abs() <= stop {
            break;
        }
        if f1 < f2 {
            b = x2;
            x2 = x1;
            f2 = f1;
            x1 = b - ratio * (b - a);
            f1 = f(x1);
        } else {
            a = x1;
            x1 = x2;
            f1 = f2;
            x2 = a + ratio * (b - a);
            f2 = f(x2);
        }
    }
    let t = (a + b) / 2.0;
    (t, f(t))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_short_arcs_angle_agrees_with_the_library_atan2() {
        // Reference: the platform's `atan2` (std's `f64::atan2`, correctly rounded or
        // nearly so). The series must agree within two units in the last place, over the
        // whole range it serves and across the change to the library call at 1/32.
        let mut worst: f64 = 0.0;
        for i in 1..=20_000 {
            let angle = i as f64 * (1.0 / 32.0) / 20_000.0 * 1.02;
            for scale in [1.0, 0.37, 5.0e3] {
                let (sin, cos) = (angle.sin() * scale, angle.cos() * scale);
                let (ours, library) = (arc_angle(sin, cos), sin.atan2(cos));
                worst = worst.max((ours - library).abs() / library);
            }
        }
        assert!(
            worst <= 2.0 * f64::EPSILON,
            "worst relative difference {worst:e}"
        );
        // Tiny, right-angled and wide arcs.
        for (sin, cos) in [(1e-12, 1.0), (1.0, 0.0), (1.0, -1.0), (0.0, 1.0)] {
            assert_eq!(arc_angle(sin, cos), sin.atan2(cos), "{sin}, {cos}");
        }
    }

    fn v(x: f64, y: f64, z: f64) -> Vector3<f64> {
        Vector3::new(x, y, z)
    }

    #[test]
    fn great_arc_runs_from_start_to_end_at_unit_speed() {
        let a = v(3.0, 4.0, 1.0);
        let b = v(-2.0, 5.0, 2.5);
        let arc = SphereCurve::great_arc(&a, &b).unwrap();
        assert!((arc.position(arc.t0) - a.normalize()).norm() < 1e-15);
        assert!((arc.position(arc.t1) - b.normalize()).norm() < 1e-15);
        for t in [0.0, 0.2, arc.t1] {
            assert!((arc.velocity(t).norm() - 1.0).abs() < 1e-15);
            assert!((arc.position(t).norm() - 1.0).abs() < 1e-15);
        }
    }

    #[test]
    fn great_arc_rejects_parallel_and_opposite_directions() {
        assert!(SphereCurve::great_arc(&v(1.0, 2.0, 3.0), &v(2.0, 4.0, 6.0)).is_none());
        assert!(SphereCurve::great_arc(&v(1.0, 2.0, 3.0), &v(-1.0, -2.0, -3.0)).is_none());
        assert!(SphereCurve::great_arc(&v(0.0, 0.0, 0.0), &v(1.0, 0.0, 0.0)).is_none());
    }

    /// A whole circle of radius 2 (x) by 1.5 (z) round (0.5, 3, 0.2): it crosses x = 0.
    fn upright_circle() -> SphereCurve {
        SphereCurve::ellipse_arc(
            v(0.5, 3.0, 0.2),
            v(2.0, 0.0, 0.0),
            v(0.0, 0.0, 1.5),
            0.0,
            TAU,
        )
    }

    #[test]
    fn plane_crossings_solve_the_trigonometric_equation() {
        let circle = upright_circle();
        let m = v(1.0, 0.0, 0.0);
        let roots = circle.plane_crossings(&m);
        assert_eq!(roots.as_slice().len(), 2);
        for &t in roots.as_slice() {
            assert!(m.dot(&circle.position(t)).abs() < 1e-14, "root {t}");
        }
        // x = 0.5 + 2 cos t: cos t = -1/4.
        let expected = (-0.25f64).acos();
        assert!((roots.as_slice()[0] - expected).abs() < 1e-14);
        assert!((roots.as_slice()[1] - (TAU - expected)).abs() < 1e-14);
        // Half the circle holds only the first.
        let half = SphereCurve { t1: PI, ..circle };
        assert_eq!(half.plane_crossings(&m).as_slice(), &roots.as_slice()[..1]);
    }

    #[test]
    fn crossings_of_a_tilted_plane_satisfy_the_equation() {
        // Both A and B non-zero, A not 2 (so hypot(A, B) differs from A + A and from
        // A^2 - B^2 and the like): roots checked against m . P(t) = 0 directly.
        let circle = upright_circle();
        let m = v(1.0, 0.3, -0.8);
        let roots = circle.plane_crossings(&m);
        assert_eq!(roots.as_slice().len(), 2);
        for &t in roots.as_slice() {
            assert!(m.dot(&circle.position(t)).abs() < 1e-14, "root {t}");
        }
    }

    #[test]
    fn a_plane_the_curve_misses_or_touches() {
        // A unit circle round (x, 0, 0) from t = -1 to 1.
        let round = |x: f64| {
            SphereCurve::ellipse_arc(
                v(x, 0.0, 0.0),
                v(1.0, 0.0, 0.0),
                v(0.0, 1.0, 0.0),
                -1.0,
                2.0,
            )
        };
        // P(t) = (cos t - 1, sin t, 0): x = cos t - 1 touches x = 0 at t = 0 only.
        let circle = round(-1.0);
        assert_eq!(circle.plane_crossings(&v(1.0, 0.0, 0.0)).as_slice(), &[0.0]);
        // x = cos t - 1.5 never reaches 0: no crossing, not a tangency at the nearest point.
        let shifted = round(-1.5);
        assert!(shifted
            .plane_crossings(&v(1.0, 0.0, 0.0))
            .as_slice()
            .is_empty());
    }

    #[test]
    fn a_plane_through_an_end_is_not_crossed_inside_the_arc() {
        // The quarter arc from x to y: the plane y = 0 holds its start, the plane x = 0 its
        // end; the roots lie at exactly 0 and pi / 2, the range's ends, not inside it.
        let arc = SphereCurve::great_arc(&v(1.0, 0.0, 0.0), &v(0.0, 1.0, 0.0)).unwrap();
        assert_eq!((arc.t0, arc.t1), (0.0, PI / 2.0));
        assert!(arc.plane_crossings(&v(0.0, 1.0, 0.0)).as_slice().is_empty());
        assert!(arc.plane_crossings(&v(1.0, 0.0, 0.0)).as_slice().is_empty());
    }

    #[test]
    fn velocity_is_the_derivative_of_position() {
        // Against a central difference of positions (common practice).
        let arc = SphereCurve::great_arc(&v(3.0, 4.0, 1.0), &v(-2.0, 5.0, 2.5)).unwrap();
        let h = 1e-6;
        for t in [0.1, 0.4, 0.7] {
            let difference = (arc.position(t + h) - arc.position(t - h)) / (2.0 * h);
            assert!((arc.velocity(t) - difference).norm() < 1e-9, "t = {t}");
        }
    }

    #[test]
    fn lying_in_a_plane_is_judged_relative_to_the_curve_and_the_normal() {
        // Coefficients (0, 2e, 0) against m = (2, 0, 0); the scale is 0 + 1 + 1 and |m| is
        // 2, so the curve lies in the plane while 2e <= 1e-12 * 2 * 2, that is e <= 2e-12.
        let tilted = |e: f64| SphereCurve {
            centre: Vector3::zeros(),
            u: v(e, 1.0, 0.0),
            v: v(0.0, 0.0, 1.0),
            t0: 0.0,
            t1: 1.0,
            exact_end: None,
        };
        let m = v(2.0, 0.0, 0.0);
        assert!(tilted(1.5e-12).lies_in_plane(&m));
        assert!(!tilted(2.5e-12).lies_in_plane(&m));
    }

    #[test]
    fn the_parallel_threshold_is_strict() {
        // (1, 1e-12, 0) is a unit vector in f64, and its cross product with x has length
        // exactly 1e-12: an arc of that angle is still an arc.
        let arc = SphereCurve::great_arc_between_units(v(1.0, 0.0, 0.0), v(1.0, 1e-12, 0.0));
        assert!(arc.is_some());
        assert!(
            SphereCurve::great_arc_between_units(v(1.0, 0.0, 0.0), v(1.0, 5e-13, 0.0)).is_none()
        );
    }

    #[test]
    fn a_third_root_is_dropped() {
        // At most two roots exist within one turn; a third push must not write past the end.
        let mut roots = TrigRoots::default();
        for t in [0.1, 0.2, 0.3] {
            roots.push(t);
        }
        assert_eq!(roots.as_slice(), &[0.1, 0.2]);
    }

    #[test]
    fn reversed_ellipse_arc_traces_the_same_points() {
        let forward = SphereCurve::ellipse_arc(
            v(0.0, 4.0, 0.0),
            v(1.0, 0.0, 0.0),
            v(0.0, 0.0, 2.0),
            0.3,
            1.2,
        );
        let backward = SphereCurve::ellipse_arc(
            v(0.0, 4.0, 0.0),
            v(1.0, 0.0, 0.0),
            v(0.0, 0.0, 2.0),
            1.5,
            -1.2,
        );
        assert!(backward.t0 < backward.t1);
        assert!((forward.position(forward.t0) - backward.position(backward.t1)).norm() < 1e-14);
        assert!((forward.position(forward.t1) - backward.position(backward.t0)).norm() < 1e-14);
    }

    #[test]
    fn a_curve_in_the_plane_has_no_isolated_crossings() {
        let arc = SphereCurve::great_arc(&v(0.0, 1.0, 0.2), &v(0.0, -1.0, 0.3)).unwrap();
        assert!(arc.lies_in_plane(&v(1.0, 0.0, 0.0)));
        assert!(arc.plane_crossings(&v(1.0, 0.0, 0.0)).as_slice().is_empty());
    }

    #[test]
    fn pole_approach_of_a_great_arc_is_exact() {
        // An arc over the head that misses the zenith by about 0.01 rad to the right.
        let miss = 0.01f64;
        let a = v(miss.tan(), 1.0, 1.0);
        let b = v(miss.tan(), -1.0, 1.0);
        let arc = SphereCurve::great_arc(&a, &b).unwrap();
        let found = arc.pole_approaches(true, 0.1);
        assert_eq!(found.len(), 1);
        let (t, d) = found[0];
        let zenith = v(0.0, 0.0, 1.0);
        assert!((d - super::super::angle_between(&arc.position(t), &zenith)).abs() < 1e-15);
        // The closest point lies straight to the right of the zenith, at 90 deg - 0.01 rad.
        assert!((d - miss).abs() < 1e-15, "{d}");
        assert!(arc.position(t).y.abs() < 1e-15);
        assert!(arc.pole_approaches(false, 0.1).is_empty());
        // The first half alone ends before the closest point is reached.
        let half = SphereCurve::great_arc(&a, &v(miss.tan(), 0.1, 1.0)).unwrap();
        assert!(half.pole_approaches(true, 0.1).is_empty());
    }

    /// The great circle whose point nearest the zenith is at t = 0, 0.01 rad from it (u
    /// leans that far off the zenith, v is horizontal), from `t0` to `t1`.
    fn leaning_circle(t0: f64, t1: f64) -> SphereCurve {
        SphereCurve {
            centre: Vector3::zeros(),
            u: v(0.0, 0.01f64.sin(), 0.01f64.cos()),
            v: v(1.0, 0.0, 0.0),
            t0,
            t1,
            exact_end: None,
        }
    }

    #[test]
    fn an_arc_longer_than_half_a_turn_reaches_its_nearest_point() {
        // The leaning circle from t = -3.5 to 0.5: its point nearest the zenith, at t = 0,
        // lies more than half a turn from the start, where cross products with the start no
        // longer tell which side it is on.
        let found = leaning_circle(-3.5, 0.5).pole_approaches(true, 0.1);
        assert_eq!(found.len(), 1);
        assert!(
            found[0].0.abs() < 1e-15 && (found[0].1 - 0.01).abs() < 1e-15,
            "{found:?}"
        );
        // The rest of the circle, from t = 0.5 to 4, is as long and passes no nearest point.
        assert!(leaning_circle(0.5, 4.0)
            .pole_approaches(true, 0.1)
            .is_empty());
    }

    #[test]
    fn a_meridian_is_a_half_plane_and_the_poles_lie_on_none() {
        // The horizon meets the meridian plane of azimuth 0 (the y-z plane) straight ahead
        // (0, 1, 0) and behind; only the first is on the meridian at azimuth 0.
        let horizon = SphereCurve::ellipse_arc(
            Vector3::zeros(),
            v(1.0, 0.0, 0.0),
            v(0.0, 1.0, 0.0),
            0.0,
            TAU,
        );
        // And at any azimuth (clockwise from y): 1 rad, towards (sin 1, cos 1, 0).
        for azimuth in [0.0f64, 1.0] {
            let ahead = horizon.meridian_crossings(azimuth);
            assert_eq!(ahead.as_slice().len(), 1);
            let towards = v(azimuth.sin(), azimuth.cos(), 0.0);
            assert!((horizon.position(ahead.as_slice()[0]) - towards).norm() < 1e-15);
        }
        // The vertical circle through the zenith and the nadir in the plane y = 0 crosses
        // the meridian plane of azimuth 0 (x = 0) only at the poles.
        let vertical = SphereCurve::ellipse_arc(
            Vector3::zeros(),
            v(1.0, 0.0, 0.0),
            v(0.0, 0.0, 1.0),
            0.0,
            TAU,
        );
        assert_eq!(
            vertical.plane_crossings(&v(1.0, 0.0, 0.0)).as_slice().len(),
            2
        );
        assert!(vertical.meridian_crossings(0.0).as_slice().is_empty());
    }

    #[test]
    fn numeric_pole_approach_matches_a_dense_scan() {
        // A ring off the vertical, whole and in part (a range not starting at 0 and short
        // of a turn): each approach found must be where the curve is that far from the
        // zenith, inside the range, and the nearest of them as near as a dense scan finds.
        let ring = |start: f64, sweep: f64| {
            SphereCurve::ellipse_arc(
                v(0.3, 0.1, 5.0),
                v(2.0, 0.0, 0.0),
                v(0.0, 1.5, 0.5),
                start,
                sweep,
            )
        };
        let pole = v(0.0, 0.0, 1.0);
        for arc in [ring(0.0, TAU), ring(1.0, 3.0), ring(-3.0, 4.0)] {
            let found = arc.pole_approaches(true, 1.0);
            assert!(!found.is_empty());
            for &(t, d) in &found {
                assert!(
                    t > arc.t0 && t < arc.t1,
                    "{t} outside {}..{}",
                    arc.t0,
                    arc.t1
                );
                let there = super::super::angle_between(&arc.position(t), &pole);
                assert!((d - there).abs() < 1e-15, "{d} vs {there}");
                // A nearest point: no nearer a little way either side within the range.
                // (A range that ends while still approaching reports its end, a hair
                // inside it: checked on its inner side only.)
                let sides = [t - 1e-4, t + 1e-4];
                for side in sides.into_iter().filter(|s| *s > arc.t0 && *s < arc.t1) {
                    let beside = super::super::angle_between(&arc.position(side), &pole);
                    assert!(beside >= d, "{t}: {beside} < {d}");
                }
            }
            let dense = (0..=200_000)
                .map(|i| arc.t0 + (arc.t1 - arc.t0) * i as f64 / 200_000.0)
                .map(|t| super::super::angle_between(&arc.position(t), &pole))
                .fold(f64::INFINITY, f64::min);
            let best = found.iter().map(|f| f.1).fold(f64::INFINITY, f64::min);
            assert!((best - dense).abs() < 1e-9, "{best} vs {dense}");
            // None nearer than the nearest.
            assert!(arc.pole_approaches(true, 0.99 * best).is_empty());
        }
    }

    #[test]
    fn a_parallel_has_no_nearest_point_and_a_nearly_parallel_ring_has_one() {
        // A ring of radius 2, 5 up, round the vertical keeps atan(2 / 5) from the zenith.
        // Moved 3.5e-12 m sideways its distance varies by about 0.345 * 3.5e-12 = 1.2e-12
        // rad (d atan(r / 5) = 5 / 29 dr, r = 2 + dx cos t), more than the relative 1e-12 of
        // its distance (0.38 rad): nearest at t = pi.
        let ring = |dx: f64| {
            SphereCurve::ellipse_arc(
                v(dx, 0.0, 5.0),
                v(2.0, 0.0, 0.0),
                v(0.0, 2.0, 0.0),
                0.0,
                TAU,
            )
        };
        assert!(ring(0.0).pole_approaches(true, 1.0).is_empty());
        let found = ring(3.5e-12).pole_approaches(true, 1.0);
        assert_eq!(found.len(), 1, "{found:?}");
        // (So flat a minimum is found only roughly: 0.05 rad off pi, the curve is nearer by
        // less than 1e-15 rad.)
        assert!((found[0].0 - PI).abs() < 0.05, "{found:?}");
    }

    #[test]
    fn a_nearest_point_at_an_end_of_the_range_is_not_inside_it() {
        // The leaning circle on ranges longer than half a turn that start or end exactly
        // at its point nearest the zenith.
        assert_eq!(
            leaning_circle(-0.5, 4.0).pole_approaches(true, 0.1).len(),
            1
        );
        assert!(leaning_circle(0.0, 4.0)
            .pole_approaches(true, 0.1)
            .is_empty());
        assert!(leaning_circle(-4.0, 0.0)
            .pole_approaches(true, 0.1)
            .is_empty());
    }
}
