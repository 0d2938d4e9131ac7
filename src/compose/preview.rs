//! The rectilinear preview: what a panorama viewer shows when it looks one way, drawn
//! from the scene itself (not resampled from the panorama), so straight edges stay
//! straight and nothing is blurred.
//!
//! A pinhole camera at the standpoint's eye, looking along the view frame's `+y` (the
//! standpoint's heading and pitch; roll turns the image): a point `(x, y, z)` of the view
//! frame in front of the eye lands at `u = cx + f x / y`, `v = cy - f z / y` with
//! `f = (W / 2) / tan(fov / 2)`. This is the gnomonic projection of the viewing sphere
//! onto the tangent plane at the view's centre (Snyder 1987: x and y by eq. 22-4 and 22-5,
//! cos c by 5-3), which `tests/composition.rs` checks, with Snyder's worked example. A
//! segment's image is a segment, cut where it crosses the near plane; an elliptic arc is
//! sampled until every chord is within the tolerance of the true image.

use crate::drawing::{dashed, hidden_dash_px, hidden_layer};
use crate::drawing::{Drawing, Layer, Stroke, WIREFRAME};
use crate::error::{Error, Result};
use crate::page::{clip_segment, Rect};
use crate::plane::{ImagePoint, PolylineSet};
use crate::scene::{Edge, HiddenEdges, Site, SiteCurve, Standpoint};
use crate::sphere::ViewFrame;
use crate::visibility::{Depth, HiddenLines, Occluders};
use nalgebra::{Point3, Vector3};

/// Distance in front of the eye (metres, along the view axis) where edges are cut: the
/// image of a point nearer than this is too far out to draw.
pub const NEAR_M: f64 = 0.01;

/// The size and field of a preview.
#[derive(Clone, Debug, PartialEq)]
pub struct PreviewSettings {
    /// Pixels across.
    pub width: u32,
    /// Pixels down.
    pub height: u32,
    /// Horizontal field of view, degrees (more than 0, less than 180).
    pub fov_deg: f64,
    /// Width of the lines, pixels.
    pub line_weight_px: f64,
    /// Largest distance between a true curve and its drawn polyline, pixels.
    pub tolerance_px: f64,
    /// How edges hidden behind faces are drawn; `None` takes the scene's choice, or faint.
    pub hidden: Option<HiddenEdges>,
}

impl Default for PreviewSettings {
    fn default() -> Self {
        PreviewSettings {
            width: 1280,
            height: 800,
            fov_deg: 90.0,
            line_weight_px: 1.5,
            tolerance_px: 0.1,
            hidden: None,
        }
    }
}

/// A pinhole camera: the view frame of a standpoint and the image it makes.
#[derive(Clone, Copy, Debug)]
pub struct Pinhole {
    /// The standpoint's view frame.
    pub view: ViewFrame,
    /// The picture's width, pixels.
    pub width: f64,
    /// The picture's height, pixels.
    pub height: f64,
    /// Focal length in pixels.
    pub focal_px: f64,
}

impl Pinhole {
    /// The camera at `standpoint` looking along its heading and pitch, `fov_deg` across.
    pub fn new(standpoint: &Standpoint, settings: &PreviewSettings) -> Result<Pinhole> {
        let fov = settings.fov_deg;
        if !(fov.is_finite() && fov > 0.0 && fov < 179.0) {
            return Err(Error::Setting(format!(
                "field of view {fov} degrees is outside (0, 179) degrees: a flat picture cannot show more"
            )));
        }
        let (w, h) = (settings.width, settings.height);
        if w == 0 || h == 0 || w > 16_384 || h > 16_384 {
            return Err(Error::ImageSize {
                width: w as u64,
                height: h as u64,
                reason: "a preview is from 1 to 16384 pixels a side".into(),
            });
        }
        crate::plane::check_tolerance(settings.tolerance_px)?;
        Ok(Pinhole {
            view: ViewFrame::new(standpoint),
            width: w as f64,
            height: h as f64,
            focal_px: (w as f64 / 2.0) / (fov.to_radians() / 2.0).tan(),
        })
    }

    /// The image of a view-frame point in front of the near plane.
    fn image_of_view(&self, p: &Vector3<f64>) -> ImagePoint {
        ImagePoint::new(
            self.width / 2.0 + self.focal_px * p.x / p.y,
            self.height / 2.0 - self.focal_px * p.z / p.y,
        )
    }

    /// Where a site point lands, if it is in front of the near plane (it may be outside
    /// the picture).
    pub fn project(&self, p: &Point3<f64>) -> Option<ImagePoint> {
        let v = self.view.to_view(p);
        (v.y >= NEAR_M).then(|| self.image_of_view(&v))
    }

    /// The site direction (unit vector) seen at an image point.
    pub fn direction(&self, p: ImagePoint) -> Vector3<f64> {
        let ray = Vector3::new(
            (p.x - self.width / 2.0) / self.focal_px,
            1.0,
            -(p.y - self.height / 2.0) / self.focal_px,
        );
        self.view.direction_to_site(&ray).normalize()
    }

    /// The horizon: the image line of every level direction, if the picture shows it.
    pub fn horizon(&self) -> Option<(ImagePoint, ImagePoint)> {
        // A ray (a, 1, b) in view coordinates is level when n . ray = 0, with n the site's
        // up in the view frame: a line in the image.
        let n = self.view.direction_to_view(&Vector3::z());
        let (cx, cy, f) = (self.width / 2.0, self.height / 2.0, self.focal_px);
        // n.x (u - cx) / f + n.y - n.z (v - cy) / f = 0.
        let far = 4.0 * (self.width + self.height);
        let (a, b) = if n.z.abs() >= n.x.abs() {
            let v_at = |u: f64| cy + (n.x * (u - cx) / f + n.y) * f / n.z;
            (
                ImagePoint::new(-far, v_at(-far)),
                ImagePoint::new(far, v_at(far)),
            )
        } else {
            let u_at = |v: f64| cx + (n.z * (v - cy) / f - n.y) * f / n.x;
            (
                ImagePoint::new(u_at(-far), -far),
                ImagePoint::new(u_at(far), far),
            )
        };
        let (t0, t1) = clip_segment(a, b, &self.frame())?;
        Some((lerp(a, b, t0), lerp(a, b, t1)))
    }

    /// Whether every point within `radius` of the view-frame `points` lies outside the
    /// picture: beyond one plane of its pyramid of sight (the near plane, or one through
    /// the eye and an edge of the picture). Then nothing of the convex hull of those
    /// balls can be drawn, and its visibility need not be found.
    fn wholly_outside(&self, points: &[Vector3<f64>], radius: f64) -> bool {
        let (kx, kz) = (
            self.width / 2.0 / self.focal_px,
            self.height / 2.0 / self.focal_px,
        );
        // Outward unit normals of the four side planes through the eye.
        let (nx, nz) = ((1.0 + kx * kx).sqrt(), (1.0 + kz * kz).sqrt());
        let sides = [
            Vector3::new(1.0, -kx, 0.0) / nx,
            Vector3::new(-1.0, -kx, 0.0) / nx,
            Vector3::new(0.0, -kz, 1.0) / nz,
            Vector3::new(0.0, -kz, -1.0) / nz,
        ];
        // A margin of a millionth of the reach, so that rounding never culls an edge
        // that touches the picture.
        let margin = 1e-6 * (1.0 + radius + points.iter().map(|p| p.norm()).fold(0.0, f64::max));
        let behind = points.iter().all(|p| p.y + radius + margin < NEAR_M);
        behind
            || sides
                .iter()
                .any(|n| points.iter().all(|p| n.dot(p) > radius + margin))
    }

    fn frame(&self) -> Rect {
        Rect {
            left: 0.0,
            top: 0.0,
            right: self.width,
            bottom: self.height,
        }
    }

    /// Appends the image of the view-frame segment `a`-`b`, cut at the near plane and the
    /// picture's edges.
    fn segment(&self, a: Vector3<f64>, b: Vector3<f64>, out: &mut Vec<[ImagePoint; 2]>) {
        let (mut a, mut b) = (a, b);
        if a.y < NEAR_M && b.y < NEAR_M {
            return;
        }
        // Depth is linear along the segment in the view frame, so the cut is exact there.
        if a.y < NEAR_M {
            a = a + (b - a) * ((NEAR_M - a.y) / (b.y - a.y));
        } else if b.y < NEAR_M {
            b = b + (a - b) * ((NEAR_M - b.y) / (a.y - b.y));
        }
        let (p, q) = (self.image_of_view(&a), self.image_of_view(&b));
        if let Some((t0, t1)) = clip_segment(p, q, &self.frame()) {
            // A segment that only touches the picture's edge would be drawn as a dot.
            let (a, b) = (lerp(p, q, t0), lerp(p, q, t1));
            if (b.x - a.x).hypot(b.y - a.y) > 1e-6 || (p == q && t0 == 0.0) {
                out.push([a, b]);
            }
        }
    }

    /// Appends the image of a site curve as short segments.
    fn curve(&self, curve: &SiteCurve, tolerance: f64, out: &mut Vec<[ImagePoint; 2]>) {
        match *curve {
            SiteCurve::Segment { start, end } => {
                self.segment(self.view.to_view(&start), self.view.to_view(&end), out)
            }
            SiteCurve::Ellipse(ref arc) => {
                let at = |t: f64| self.view.to_view(&arc.at(t));
                self.arc(&at, arc.start, arc.start + arc.sweep, tolerance, out);
            }
        }
    }

    /// Appends the image of the view-frame curve `at(t)` for `t` from `t0` to `t1`.
    fn arc(
        &self,
        at: &impl Fn(f64) -> Vector3<f64>,
        t0: f64,
        t1: f64,
        tolerance: f64,
        out: &mut Vec<[ImagePoint; 2]>,
    ) {
        // Start from pieces of at most 1/64 turn, then halve any piece whose image strays
        // from its chord by more than the tolerance (at the middle and the quarter points,
        // which catches the bulge of a conic's piece).
        let sweep = t1 - t0;
        let pieces = ((sweep.abs() / (std::f64::consts::TAU / 64.0)).ceil() as usize).max(1);
        for k in 0..pieces {
            let a = t0 + sweep * k as f64 / pieces as f64;
            let b = t0 + sweep * (k + 1) as f64 / pieces as f64;
            self.arc_piece(at, a, b, tolerance, 0, out);
        }
    }

    fn arc_piece(
        &self,
        at: &impl Fn(f64) -> Vector3<f64>,
        t0: f64,
        t1: f64,
        tolerance: f64,
        depth: u32,
        out: &mut Vec<[ImagePoint; 2]>,
    ) {
        let (a, b) = (at(t0), at(t1));
        let straight_enough = || {
            if a.y < NEAR_M || b.y < NEAR_M {
                return false;
            }
            let (p, q) = (self.image_of_view(&a), self.image_of_view(&b));
            [0.25, 0.5, 0.75].iter().all(|&s| {
                let m = at(t0 + (t1 - t0) * s);
                m.y >= NEAR_M && distance_to_segment(self.image_of_view(&m), p, q) <= tolerance
            })
        };
        // Pieces wholly behind the near plane need no refining: their chord is dropped too
        // (a conic piece behind the eye stays behind it once small).
        let behind = a.y < NEAR_M && b.y < NEAR_M && at((t0 + t1) / 2.0).y < NEAR_M;
        if depth >= 24 || behind || straight_enough() {
            self.segment(a, b, out);
            return;
        }
        let mid = (t0 + t1) / 2.0;
        self.arc_piece(at, t0, mid, tolerance, depth + 1, out);
        self.arc_piece(at, mid, t1, tolerance, depth + 1, out);
    }
}

fn lerp(a: ImagePoint, b: ImagePoint, t: f64) -> ImagePoint {
    ImagePoint::new(a.x + (b.x - a.x) * t, a.y + (b.y - a.y) * t)
}

fn distance_to_segment(p: ImagePoint, a: ImagePoint, b: ImagePoint) -> f64 {
    let (dx, dy) = (b.x - a.x, b.y - a.y);
    let length2 = dx * dx + dy * dy;
    let t = if length2 > 0.0 {
        (((p.x - a.x) * dx + (p.y - a.y) * dy) / length2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    ((p.x - a.x - t * dx).powi(2) + (p.y - a.y - t * dy).powi(2)).sqrt()
}

/// Joins consecutive pieces that meet into polylines.
fn join(pieces: &[[ImagePoint; 2]]) -> PolylineSet {
    let mut lines = PolylineSet::new();
    let mut open: Vec<ImagePoint> = Vec::new();
    for &[a, b] in pieces {
        let continues = open.last().is_some_and(|&last| last == a);
        if !continues {
            if open.len() >= 2 {
                lines.push(&open);
            }
            open.clear();
            open.push(a);
        }
        open.push(b);
    }
    if open.len() >= 2 {
        lines.push(&open);
    }
    lines
}

/// The preview of `site` from `standpoint`: every edge (and the outlines of round items
/// and meshes seen from this eye), the parts hidden behind faces drawn faint and dashed or
/// left out as the settings or the scene say, and the horizon.
pub fn preview(
    site: &Site,
    standpoint: &Standpoint,
    settings: &PreviewSettings,
) -> Result<Drawing> {
    preview_with_hidden_lines(
        site,
        &HiddenLines::new(site, settings.hidden),
        standpoint,
        settings,
    )
}

/// [`preview`] with the hidden-line set-up made once by the caller
/// (`HiddenLines::new(site, settings.hidden)`) and kept for many standpoints of one site.
pub fn preview_with_hidden_lines(
    site: &Site,
    hidden_lines: &HiddenLines,
    standpoint: &Standpoint,
    settings: &PreviewSettings,
) -> Result<Drawing> {
    if !(settings.line_weight_px.is_finite() && settings.line_weight_px > 0.0) {
        return Err(Error::Setting(format!(
            "line weight {} px must be more than 0",
            settings.line_weight_px
        )));
    }
    let camera = Pinhole::new(standpoint, settings)?;
    let eye = camera.view.eye();
    let outlines = site.outline_edges_from(&eye);
    let occluders = hidden_lines.occluders(site, &camera.view);
    // The angle of a pixel at the picture's centre (smaller towards its edges).
    let pixel = 1.0 / camera.focal_px;
    let tolerance = settings.tolerance_px;
    // Runs of edges on all cores (with hidden lines an edge costs its sight lines), their
    // lines joined in edge order.
    let (fixed, all) = (site.edges.len(), site.edges.len() + outlines.len());
    let edge = |index: usize| match index.checked_sub(fixed) {
        None => site.edges.get(index),
        Some(outline) => outlines[outline],
    };
    let runs = crate::cores::in_order(all.div_ceil(EDGES_PER_RUN), |run| {
        let (mut seen, mut hidden) = (Vec::new(), Vec::new());
        let first = run * EDGES_PER_RUN;
        for index in first..(first + EDGES_PER_RUN).min(all) {
            look_at_edge(
                &camera,
                &edge(index),
                occluders.as_ref(),
                pixel,
                tolerance,
                &mut seen,
                &mut hidden,
            );
        }
        (seen, hidden)
    });
    let (mut seen, mut hidden) = (Vec::new(), Vec::new());
    for (run_seen, run_hidden) in runs {
        seen.extend(run_seen);
        hidden.extend(run_hidden);
    }
    let mut horizon = PolylineSet::new();
    if let Some((a, b)) = camera.horizon() {
        horizon.push(&[a, b]);
    }
    let width = settings.line_weight_px;
    let mut layers = vec![Layer {
        filled: false,
        text: None,
        name: "horizon".to_owned(),
        stroke: Stroke::black(0.5, 1.25),
        lines: horizon,
    }];
    if hidden_lines.mode == HiddenEdges::Faint && !hidden.is_empty() {
        // As in the panorama, under the seen edges; a preview has no styles to dash it.
        let (on, off) = hidden_dash_px(width);
        layers.push(hidden_layer(dashed(&join(&hidden), on, off), width));
    }
    layers.push(Layer {
        filled: false,
        text: None,
        name: WIREFRAME.to_owned(),
        stroke: Stroke::black(1.0, width),
        lines: join(&seen),
    });
    Ok(Drawing {
        width: settings.width,
        height: settings.height,
        layers,
    })
}

/// Edges a core takes at a time: few, as an edge with hidden lines costs its sight lines.
const EDGES_PER_RUN: usize = 32;

/// Draws one edge into the look-around's seen and hidden lines: with hidden lines, the same
/// seen and hidden stretches as the panorama's, found on the sphere curve, then drawn in
/// the picture.
fn look_at_edge(
    camera: &Pinhole,
    edge: &Edge,
    occluders: Option<&Occluders>,
    pixel: f64,
    tolerance: f64,
    seen: &mut Vec<[ImagePoint; 2]>,
    hidden: &mut Vec<[ImagePoint; 2]>,
) {
    let Some(occluders) = occluders else {
        camera.curve(&edge.curve, tolerance, seen);
        return;
    };
    let Ok(curve) = camera.view.sphere_curve(&edge.curve) else {
        return;
    };
    // What the picture cannot show needs no hidden-line work: the same drawing.
    let outside = match edge.curve {
        SiteCurve::Segment { start, end } => camera.wholly_outside(
            &[camera.view.to_view(&start), camera.view.to_view(&end)],
            0.0,
        ),
        SiteCurve::Ellipse(ref arc) => {
            // |u cos t + v sin t| <= |u| + |v|: a ball round the centre holds it.
            let radius = arc.u.norm() + arc.v.norm();
            camera.wholly_outside(&[camera.view.to_view(&arc.centre)], radius)
        }
    };
    if outside {
        return;
    }
    match edge.curve {
        SiteCurve::Segment { start, end } => {
            let (a, b) = (camera.view.to_view(&start), camera.view.to_view(&end));
            let depth = Depth::Segment { a, b };
            for (t0, t1, is_seen) in occluders.spans(&curve, &depth, pixel, 1e-3 * pixel) {
                if t1 <= t0 {
                    continue;
                }
                // Where the sight lines at t0 and t1 meet the segment.
                let (s0, s1) = (
                    along(&a, &b, &curve.position(t0)),
                    along(&a, &b, &curve.position(t1)),
                );
                let out = if is_seen { &mut *seen } else { &mut *hidden };
                camera.segment(a + (b - a) * s0, a + (b - a) * s1, out);
            }
        }
        SiteCurve::Ellipse(_) => {
            // An ellipse's sphere curve is its own points relative to the eye.
            for (t0, t1, is_seen) in occluders.spans(&curve, &Depth::Curve, pixel, 1e-3 * pixel) {
                if t1 > t0 {
                    let out = if is_seen { &mut *seen } else { &mut *hidden };
                    camera.arc(&|t| curve.position(t), t0, t1, tolerance, out);
                }
            }
        }
    }
}

/// The parameter along the segment from `a` to `b` (view frame, relative to the eye)
/// where the sight line along `d` meets it: `a + s (b - a) = k d` crossed with `d`.
fn along(a: &Vector3<f64>, b: &Vector3<f64>, d: &Vector3<f64>) -> f64 {
    let w = (b - a).cross(d);
    let denominator = w.norm_squared();
    if denominator <= f64::MIN_POSITIVE {
        return 0.0;
    }
    (-(a.cross(d)).dot(&w) / denominator).clamp(0.0, 1.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn straight_ahead_is_the_centre_and_directions_round_trip() {
        let s = Standpoint::from_degrees("s", 0.0, 0.0, 1.5, 30.0, 10.0, 0.0);
        let camera = Pinhole::new(&s, &PreviewSettings::default()).unwrap();
        let ahead = camera.direction(ImagePoint::new(640.0, 400.0));
        let h = 30f64.to_radians();
        let p = 10f64.to_radians();
        let expected = Vector3::new(h.sin() * p.cos(), h.cos() * p.cos(), p.sin());
        assert!((ahead - expected).norm() < 1e-12);
        let point = s.eye() + Vector3::new(3.0, 7.0, 1.0);
        let image = camera.project(&point).unwrap();
        let back = camera.direction(image);
        assert!((back - (point - s.eye()).normalize()).norm() < 1e-12);
    }

    #[test]
    fn what_is_culled_as_outside_draws_nothing_and_much_is_culled() {
        // Segments from a fixed sequence of our own all round a camera pitched and turned:
        // whenever the cull says "outside", the picture's own clipping draws nothing of it
        // (so the cull never changes a drawing); and it does take most of what lies
        // behind or beside a 60-degree picture.
        let s = Standpoint::from_degrees("s", 0.0, 0.0, 1.5, 30.0, 10.0, 5.0);
        let settings = PreviewSettings {
            fov_deg: 60.0,
            ..PreviewSettings::default()
        };
        let camera = Pinhole::new(&s, &settings).unwrap();
        let mut uniform = crate::testing::numbers(11);
        let mut next = || uniform() * 2.0 - 1.0;
        let (mut culled, mut total) = (0, 0);
        for _ in 0..20_000 {
            let mut point = || Vector3::new(30.0 * next(), 30.0 * next(), 30.0 * next());
            let (a, b) = (point(), point());
            let short = a + (b - a) * 0.05;
            for (a, b) in [(a, b), (a, short)] {
                total += 1;
                if camera.wholly_outside(&[a, b], 0.0) {
                    culled += 1;
                    let mut out = Vec::new();
                    camera.segment(a, b, &mut out);
                    assert!(out.is_empty(), "{a:?} {b:?} culled but drawn: {out:?}");
                }
            }
        }
        assert!(culled * 2 > total, "{culled} of {total}");
    }

    #[test]
    fn behind_the_eye_is_cut_at_the_near_plane() {
        let s = Standpoint::from_degrees("s", 0.0, 0.0, 1.5, 0.0, 0.0, 0.0);
        let camera = Pinhole::new(&s, &PreviewSettings::default()).unwrap();
        assert!(camera.project(&Point3::new(0.0, -1.0, 1.5)).is_none());
        let mut out = Vec::new();
        // From behind, through the eye's plane, to ahead: drawn from the picture's edge.
        camera.segment(
            Vector3::new(-1.0, -5.0, -1.0),
            Vector3::new(-1.0, 5.0, -1.0),
            &mut out,
        );
        assert_eq!(out.len(), 1);
        assert!(out[0][1].x < 640.0 && out[0][1].y > 400.0);
    }
}
