//! Flattening a curve on the sphere into polylines on the equirectangular image.
//!
//! **Tolerance** means one thing throughout pansite: the largest distance, in output pixels,
//! between the true image of a curve and the polyline drawn for it ([`DEFAULT_TOLERANCE_PX`]).
//!
//! The method:
//! 1. *Cut* the curve where its image is discontinuous or hard to follow: at the seam (the
//!    meridian behind the viewer, found in closed form by [`SphereCurve::meridian_crossings`]),
//!    around the poles, and where it comes near a pole (so that the fast sweep of azimuth
//!    there lies at the end of a piece, where it is sampled). Each pole is drawn as the whole
//!    top (or bottom) border row, so the part of a curve within half the tolerance of a pole,
//!    the *pole band*, is not drawn: the curve is cut where it enters and leaves the band, and
//!    those ends are put on the border row at their true azimuth (a move of at most half the
//!    tolerance). A curve through a pole thus runs up to the border and continues from the
//!    column 180 degrees away; a near pass does the same at its own true columns, instead of
//!    drawing a sweep along the border. Most edges of a site are short great arcs far from
//!    the poles and ahead of the viewer or clearly to one side of the seam, where there is
//!    nothing to cut: they skip the search (see `is_short_and_clear`).
//! 2. *Refine* each piece recursively. For a chord from parameter `a` to `b` the error is
//!    estimated as the larger of (i) the distance of the curve's midpoint from the chord and
//!    (ii) the bound `max |n . P''| (b - a)^2 / 8`, where `P''` is the exact second derivative
//!    of the image point with respect to the parameter, sampled at both ends and the middle,
//!    and `n` the chord's normal. (ii) is the standard remainder bound of linear
//!    interpolation, `|f(t) - chord| <= max|f''| (t - a)(b - t) / 2`, applied to the
//!    component across the chord. Three samples can miss a little of a fast-changing second
//!    derivative, so the bound is widened by the spread of the sampled values; where the image
//!    runs back against the chord (an ellipse seen edge-on) the whole second derivative is
//!    bounded, not just its part across. A chord whose error exceeds the tolerance is split
//!    into `ceil(sqrt(error / tolerance))` equal parts (the error falls with the square of the
//!    span), which keeps the vertex count near the minimum for the tolerance.
//! 3. *Guard* what the estimate cannot see: an ellipse's chord is also measured at its
//!    quarter points; near a pole (the top and bottom 5% of rows) the estimate must stay
//!    within 80% of the tolerance; no chord is longer than an eighth of the image height or
//!    wider than a quarter of its width. Short great-arc spans away from the poles are
//!    accepted on their end samples alone (most edges of a site: two samples, no middle).
//!    Property tests over 20,000 random curves biased to the seam and the poles hold every
//!    point of the true image within the tolerance of the drawing.
//!
//! A piece never crosses the seam (it is cut there), so the azimuths of its samples are
//! continuous as `atan2` gives them; only a sample on the seam itself takes the side of the
//! piece, read from the way the curve leaves or reaches the seam there (not from the
//! azimuth at the piece's middle: a curve passing close to the eye swings more than half a
//! turn within one piece). So a piece ending on the seam ends exactly on the left or right
//! border, and the two pieces on either side of a seam crossing share the same `t` and so
//! the same row.

use super::{Equirect, ImagePoint, PolylineSet};
use crate::sphere::SphereCurve;
use nalgebra::{Vector2, Vector3};
use std::cell::Cell;
use std::f64::consts::{FRAC_PI_4, PI};

/// The default tolerance, in output pixels.
pub const DEFAULT_TOLERANCE_PX: f64 = 0.1;

/// The tolerances a drawing may ask for, in output pixels: finer than a thousandth of a
/// pixel only multiplies vertices, coarser than 100 pixels is no longer a drawing of the
/// curve.
pub const TOLERANCE_RANGE_PX: std::ops::RangeInclusive<f64> = 0.001..=100.0;

/// Refuses a tolerance outside [`TOLERANCE_RANGE_PX`] (or not a number), with the message
/// every setting that takes one gives.
pub fn check_tolerance(tolerance_px: f64) -> crate::Result<()> {
    if TOLERANCE_RANGE_PX.contains(&tolerance_px) {
        Ok(())
    } else {
        Err(crate::Error::Setting(format!(
            "tolerance {tolerance_px} px is outside {} to {} px",
            TOLERANCE_RANGE_PX.start(),
            TOLERANCE_RANGE_PX.end()
        )))
    }
}

/// Pieces longer than this in parameter (radians of arc for great circles) are cut in equal
/// parts first, so that no single chord test spans an inflection on both sides.
const MAX_PIECE_PARAMETER: f64 = FRAC_PI_4;

/// A curve passing nearer than this to a pole (radians) is cut at its nearest point.
const NEAR_POLE: f64 = 0.35;
/// `sin(NEAR_POLE)`.
const SIN_NEAR_POLE: f64 = 0.342_897_807_455_451_24;
/// Great arcs up to this long (radians) are tested for pole approaches by their ends alone.
const SHORT_ARC: f64 = 0.05;
/// `cos(NEAR_POLE + SHORT_ARC)`: an end further than this from both poles.
const COS_NEAR_POLE_AND_SHORT_ARC: f64 = 0.921_060_994_002_885_1;

/// How far from the seam's plane, as a fraction of its length, a direction must lie to be
/// clearly on one side of it (see [`is_short_and_clear`]).
const CLEAR_OF_SEAM: f64 = 1e-9;

/// Great-arc spans up to this long (radians) may be accepted on their ends' curvature alone
/// (see [`Flattener::ends_bound`]): over so short an arc, away from the poles, the image's
/// curvature changes little, and the spread between the ends widens the bound.
const SHORT_SPAN: f64 = 0.03;

/// The rows within this fraction of the height from the top or bottom (9 degrees of
/// elevation) count as near a pole, where chords must stay within `POLAR_MARGIN` of the
/// tolerance by the estimate (property tests over 20,000 random curves found the estimate
/// there up to 0.4% short when it was added; a later search of 18,000 curves near the poles,
/// drawn without the margin, found none past the tolerance: kept as a margin, see
/// `mutants/README.md`).
const POLAR_ROWS: f64 = 0.05;
const POLAR_MARGIN: f64 = 0.8;

/// A sample within this angle of the seam (radians of azimuth) but on the border a piece
/// does not lie on is put on the piece's own: a piece is cut where it crosses the seam, so
/// only the rounding of that cut can put a sample there (1e-6 rad is about a thousandth of
/// a pixel on the widest image).
const NEAR_SEAM: f64 = 1e-6;

/// Recursion and work limits, reached only by pathological input.
const MAX_DEPTH: u32 = 60;
const MAX_PARTS: usize = 16;
const MAX_SAMPLES_PER_CURVE: usize = 1 << 20;

/// Flattens curves for one image at one tolerance. Holds a scratch list reused from curve
/// to curve, so flattening allocates nothing but the output, and the angles of the last end
/// it met (see `angles`); give each thread its own.
#[derive(Clone, Debug)]
pub struct Flattener {
    map: Equirect,
    tolerance: f64,
    cuts: Vec<(f64, Cut)>,
    /// `tan^2` of the pole band's angle, for [`Flattener::is_in_pole_band`].
    pole_band_tan_squared: f64,
    /// The last position whose angles were computed, and its angles (see `angles`).
    last_angles: Cell<Option<([u64; 3], f64, f64)>>,
}

/// Flattens one curve; a convenience over [`Flattener`].
pub fn flatten(curve: &SphereCurve, map: Equirect, tolerance_px: f64, out: &mut PolylineSet) {
    Flattener::new(map, tolerance_px).flatten(curve, out);
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
enum Cut {
    // Ordered by priority when two cuts fall on the same parameter.
    Plain,
    Seam,
    Pole,
}

#[derive(Clone, Copy, Debug)]
struct Sample {
    t: f64,
    /// The curve's point there (relative to the eye, view frame).
    position: Vector3<f64>,
    at: ImagePoint,
    /// First and second derivatives of the image point with respect to `t`; `None` at a
    /// pole, where they do not exist.
    derivatives: Option<(Vector2<f64>, Vector2<f64>)>,
}

/// The state carried from piece to piece of one curve.
struct Run {
    /// Some of the curve lies in a pole band, so pieces must be checked for it.
    touches_pole_band: bool,
    /// The curve lies in the plane of the seam (straight behind or ahead of the viewer).
    on_seam_plane: bool,
    /// The open polyline lies along the seam.
    on_seam: bool,
    /// A polyline is open (the last piece was drawn).
    drawing: bool,
    samples_left: usize,
    /// The samples at the curve's two ends, with `atan2`'s own azimuths.
    ends: (Sample, Sample),
}

/// What one piece of a curve needs while it is refined.
struct Piece<'a> {
    curve: &'a SphereCurve,
    /// The border a piece that meets the seam lies on: -pi (left) or pi (right); 0 for one
    /// that does not. Only samples on the seam take it (see [`onto_side`]).
    seam_side: f64,
    samples_left: usize,
}

impl Flattener {
    /// `tolerance_px` must be positive and finite (validated by the caller's settings).
    pub fn new(map: Equirect, tolerance_px: f64) -> Flattener {
        Flattener {
            map,
            tolerance: tolerance_px,
            cuts: Vec::with_capacity(16),
            pole_band_tan_squared: (0.5 * tolerance_px / map.y_scale()).tan().powi(2),
            last_angles: Cell::new(None),
        }
    }

    /// The mapping this flattener draws into.
    pub fn map(&self) -> Equirect {
        self.map
    }

    /// Appends the image of `curve` to `out`: one polyline for each stretch between the
    /// seam and pole crossings.
    pub fn flatten(&mut self, curve: &SphereCurve, out: &mut PolylineSet) {
        // The two ends are sampled once, for the cuts and for the pieces that end there.
        let mut whole = Piece {
            curve,
            seam_side: 0.0,
            samples_left: MAX_SAMPLES_PER_CURVE,
        };
        let ends = (
            self.sample(&mut whole, curve.t0),
            self.sample(&mut whole, curve.t1),
        );
        if is_short_and_clear(curve, &ends.0.position, &ends.1.position) {
            // No cut can fall inside (see `find_cuts`): one piece, refined from its ends.
            out.move_to(ends.0.at);
            self.refine(&mut whole, &ends.0, &ends.1, 0, out);
            return;
        }
        let mut cuts = std::mem::take(&mut self.cuts);
        let touches_pole_band =
            self.find_cuts(curve, &mut cuts, (&ends.0.position, &ends.1.position));
        let mut run = Run {
            touches_pole_band,
            on_seam_plane: curve.lies_in_plane(&Vector3::x()),
            on_seam: false,
            drawing: false,
            samples_left: whole.samples_left,
            ends,
        };
        for pair in cuts.windows(2) {
            let ((ta, cut_a), (tb, cut_b)) = (pair[0], pair[1]);
            // Long stretches go in equal pieces so that no chord test spans too much.
            let parts = whole_parts((tb - ta) / MAX_PIECE_PARAMETER);
            for k in 0..parts {
                let start = ta + (tb - ta) * k as f64 / parts as f64;
                let end = if k + 1 == parts {
                    tb
                } else {
                    ta + (tb - ta) * (k + 1) as f64 / parts as f64
                };
                let start_cut = if k == 0 { cut_a } else { Cut::Plain };
                let end_cut = if k + 1 == parts { cut_b } else { Cut::Plain };
                self.piece(curve, (start, start_cut), (end, end_cut), &mut run, out);
            }
        }
        if run.on_seam {
            self.copy_to_right_border(out);
        }
        self.cuts = cuts;
    }

    /// Flattens the piece of `curve` between two cuts.
    fn piece(
        &self,
        curve: &SphereCurve,
        (ta, cut_a): (f64, Cut),
        (tb, cut_b): (f64, Cut),
        run: &mut Run,
        out: &mut PolylineSet,
    ) {
        let middle = || curve.position((ta + tb) / 2.0);
        if run.touches_pole_band && self.is_in_pole_band(&middle()) {
            run.drawing = false;
            return;
        }
        let lies_on_seam = run.on_seam_plane && middle().y < 0.0;
        // A piece never crosses the seam (it is cut there), so atan2's own range is
        // continuous along it but at an end lying on the seam, whose side atan2 picks by the
        // sign of a zero: only there is the piece's side needed.
        let mut piece = Piece {
            curve,
            seam_side: 0.0,
            samples_left: run.samples_left,
        };
        let mut sample_at = |t: f64, known: &Sample| {
            if t == known.t {
                *known
            } else {
                self.sample(&mut piece, t)
            }
        };
        let (mut a, mut b) = (sample_at(ta, &run.ends.0), sample_at(tb, &run.ends.1));
        let on_border = |s: &Sample| s.at.x == 0.0 || s.at.x == self.map.width();
        let (a_on_seam, b_on_seam) = (
            cut_a == Cut::Seam || on_border(&a),
            cut_b == Cut::Seam || on_border(&b),
        );
        if lies_on_seam || a_on_seam || b_on_seam {
            piece.seam_side = if lies_on_seam {
                -PI
            } else {
                seam_side(curve, (ta, a_on_seam), tb, &middle())
            };
            for end in [&mut a, &mut b] {
                end.at.x = self.onto_side_x(end.at.x, piece.seam_side);
            }
        }
        self.snap_to_cut(&mut a, cut_a, &piece);
        self.snap_to_cut(&mut b, cut_b, &piece);
        // Plain cuts only help the refinement; the polyline goes on through them.
        if !run.drawing || cut_a != Cut::Plain {
            if run.on_seam {
                self.copy_to_right_border(out);
            }
            out.move_to(a.at);
            run.on_seam = lies_on_seam;
            run.drawing = true;
        }
        self.refine(&mut piece, &a, &b, 0, out);
        run.samples_left = piece.samples_left;
    }

    /// A polyline drawn along the seam belongs to both borders: repeat the last one (drawn
    /// on the left border) on the right border.
    fn copy_to_right_border(&self, out: &mut PolylineSet) {
        let copy: Vec<ImagePoint> = out
            .last()
            .map(|line| {
                line.iter()
                    .map(|p| ImagePoint::new(self.map.width(), p.y))
                    .collect()
            })
            .unwrap_or_default();
        out.push(&copy);
    }

    /// Half the tolerance, as an angle from a pole (radians).
    fn pole_band(&self) -> f64 {
        0.5 * self.tolerance / self.map.y_scale()
    }

    fn in_pole_band(&self, curve: &SphereCurve, t: f64) -> bool {
        self.is_in_pole_band(&curve.position(t))
    }

    /// `atan2(rho, |z|) < band`, as `rho^2 < tan^2(band) z^2` (no trigonometry).
    fn is_in_pole_band(&self, p: &Vector3<f64>) -> bool {
        p.x * p.x + p.y * p.y < self.pole_band_tan_squared * p.z * p.z
    }

    /// Where the curve, inside the pole band at `inside`, leaves it on the way to
    /// `outside`, by bisection (to the last bit of `t`); `None` if `outside` is in the band.
    fn pole_band_edge(&self, curve: &SphereCurve, inside: f64, outside: f64) -> Option<f64> {
        if self.in_pole_band(curve, outside) {
            return None;
        }
        let (mut a, mut b) = (inside, outside);
        for _ in 0..128 {
            let m = (a + b) / 2.0;
            if m == a || m == b {
                break;
            }
            if self.in_pole_band(curve, m) {
                a = m;
            } else {
                b = m;
            }
        }
        Some(b)
    }

    /// The cut parameters of a curve, sorted, with their kinds, into `cuts`; and whether
    /// any of the curve lies in a pole band.
    fn find_cuts(
        &self,
        curve: &SphereCurve,
        cuts: &mut Vec<(f64, Cut)>,
        (start, end): (&Vector3<f64>, &Vector3<f64>),
    ) -> bool {
        let (t0, t1) = (curve.t0, curve.t1);
        cuts.clear();
        cuts.extend([(t0, Cut::Plain), (t1, Cut::Plain)]);
        let band_edges = |inside: f64, outwards: &[f64], cuts: &mut Vec<(f64, Cut)>| {
            for &outside in outwards {
                if let Some(t) = self.pole_band_edge(curve, inside, outside) {
                    cuts.push((t, Cut::Pole));
                }
            }
        };
        // A great circle whose plane is steeper than NEAR_POLE from the horizontal never comes
        // that near either pole: |n . z| >= sin(NEAR_POLE) |n| for its normal n.
        // Or a short great arc whose ends are both far from the poles: no point of it is more
        // than its length from its start. (Squared: |z| <= c |p| as z^2 <= c^2 |p|^2.)
        let short_and_level = t1 - t0 <= SHORT_ARC && is_level(start) && is_level(end);
        let far_from_poles = curve.is_great_circle() && {
            short_and_level || {
                let normal = curve.u.cross(&curve.v);
                normal.z * normal.z >= SIN_NEAR_POLE * SIN_NEAR_POLE * normal.norm_squared()
            }
        };
        for zenith in [true, false].into_iter().filter(|_| !far_from_poles) {
            for (t, distance) in curve.pole_approaches(zenith, NEAR_POLE) {
                if distance < self.pole_band() {
                    band_edges(t, &[t0, t1], cuts);
                } else {
                    cuts.push((t, Cut::Plain));
                }
            }
        }
        let ends_in_band = [self.is_in_pole_band(start), self.is_in_pole_band(end)];
        if ends_in_band[0] {
            band_edges(t0, &[t1], cuts);
        }
        if ends_in_band[1] {
            band_edges(t1, &[t0], cuts);
        }
        // A great arc shorter than a half turn lies in the cone of its ends: with both ends
        // ahead of the viewer, or both on the same side (right or left) of the plane of the
        // seam, it cannot cross the seam. Most edges skip the search.
        let in_cone = curve.is_great_circle() && t1 - t0 < PI;
        let ahead = start.y > 0.0 && end.y > 0.0;
        let one_side = (start.x > 0.0 && end.x > 0.0) || (start.x < 0.0 && end.x < 0.0);
        if !(in_cone && (ahead || one_side)) {
            for &t in curve.meridian_crossings(PI).as_slice() {
                cuts.push((t, Cut::Seam));
            }
        }
        if cuts.len() > 2 {
            cuts.sort_by(|a, b| a.0.total_cmp(&b.0).then(b.1.cmp(&a.1)));
            // Merge cuts closer than a whisker, keeping the most significant kind.
            let whisker = (t1 - t0) * 1e-12;
            let mut kept = 0;
            for i in 1..cuts.len() {
                if cuts[i].0 - cuts[kept].0 <= whisker {
                    cuts[kept].1 = cuts[kept].1.max(cuts[i].1);
                } else {
                    kept += 1;
                    cuts[kept] = cuts[i];
                }
            }
            cuts.truncate(kept + 1);
        }
        // The ends of the curve stay the ends even when a cut merged into them.
        if let Some(first) = cuts.first_mut() {
            first.0 = t0;
        }
        if let Some(last) = cuts.last_mut() {
            last.0 = t1;
        }
        // Only then can a piece lie in a pole band.
        ends_in_band.contains(&true) || cuts.iter().any(|(_, cut)| *cut == Cut::Pole)
    }

    /// Puts the sample at one end of a piece on the border for a seam crossing, or on the
    /// border row for the edge of a pole band.
    fn snap_to_cut(&self, sample: &mut Sample, cut: Cut, piece: &Piece) {
        match cut {
            Cut::Plain => {}
            Cut::Seam => {
                sample.at.x = if piece.seam_side < 0.0 {
                    0.0
                } else {
                    self.map.width()
                }
            }
            Cut::Pole => {
                let zenith = piece.curve.position(sample.t).z > 0.0;
                sample.at.y = if zenith { 0.0 } else { self.map.height() };
            }
        }
    }

    /// An image column put on the border `side` if it lies on the seam (see [`onto_side`]).
    fn onto_side_x(&self, x: f64, side: f64) -> f64 {
        let azimuth = onto_side(x / self.map.x_scale() - PI, side);
        (azimuth + PI) * self.map.x_scale()
    }

    /// The image point at `t` and its exact derivatives.
    fn sample(&self, piece: &mut Piece, t: f64) -> Sample {
        piece.samples_left = piece.samples_left.saturating_sub(1);
        let curve = piece.curve;
        let (p, d1, d2) = match curve.exact_end {
            // A great arc's end, given exactly. On a great circle (`u`, `v` unit and square,
            // no centre) `P' = (u x v) x P` and `P'' = -P`: no sine or cosine is needed.
            Some(end) if t == curve.t1 => (end, curve.u.cross(&curve.v).cross(&end), -end),
            _ => {
                // Every great arc starts at t = 0: spare the library call there.
                let (sin, cos) = if t == 0.0 { (0.0, 1.0) } else { t.sin_cos() };
                let radius = curve.u * cos + curve.v * sin;
                (
                    curve.centre + radius,
                    curve.v * cos - curve.u * sin,
                    -radius,
                )
            }
        };
        let rho2 = p.x * p.x + p.y * p.y;
        let rho = rho2.sqrt();
        let (raw_azimuth, elevation) = self.angles(&p, rho);
        let azimuth = onto_side(raw_azimuth, piece.seam_side);
        let at = self.map.to_image(azimuth, elevation);
        let derivatives = (rho2 > 1e-300 * p.norm_squared())
            .then(|| self.image_derivatives(&p, &d1, &d2, rho))
            // A sum is finite only if every term is (one that overflows counts as not).
            .filter(|(v, a)| (v.x + v.y + a.x + a.y).is_finite());
        Sample {
            t,
            position: p,
            at,
            derivatives,
        }
    }

    /// The azimuth (`atan2`'s own range) and elevation of a position. Consecutive edges of a
    /// polyline or a block share their ends exactly, so the angles of the last end met are
    /// kept and reused when the next edge starts there: a third fewer `atan2` on a wireframe.
    /// (Keeping the last four, so that a window's last edge finds its first corner, saved
    /// about as many instructions in `atan2` as the longer search cost.)
    fn angles(&self, p: &Vector3<f64>, rho: f64) -> (f64, f64) {
        let key = [p.x.to_bits(), p.y.to_bits(), p.z.to_bits()];
        if let Some((last, azimuth, elevation)) = self.last_angles.get() {
            if last == key {
                return (azimuth, elevation);
            }
        }
        let (azimuth, elevation) = (p.x.atan2(p.y), p.z.atan2(rho));
        self.last_angles.set(Some((key, azimuth, elevation)));
        (azimuth, elevation)
    }

    /// `d/dt` and `d2/dt2` of the image point of `P(t)`, from `P`, `P'` and `P''`, in pixels.
    ///
    /// With `lambda = atan2(x, y)`, `rho = hypot(x, y)`, `phi = atan2(z, rho)`:
    /// `lambda' = w / rho^2` with `w = y x' - x y'`, so
    /// `lambda'' = (y x'' - x y'') / rho^2 - 2 w (x x' + y y') / rho^4`;
    /// `phi' = N / M` with `N = rho z' - z rho'`, `M = rho^2 + z^2`, so
    /// `phi'' = (N' M - N M') / M^2`, `N' = rho z'' - z rho''`, `M' = 2 (rho rho' + z z')`,
    /// where `rho' = (x x' + y y') / rho` and `rho'' = (x'^2 + y'^2 + x x'' + y y'' - rho'^2) / rho`.
    fn image_derivatives(
        &self,
        p: &Vector3<f64>,
        d1: &Vector3<f64>,
        d2: &Vector3<f64>,
        rho: f64,
    ) -> (Vector2<f64>, Vector2<f64>) {
        let rho2 = rho * rho;
        let (inverse_rho, inverse_rho2) = (1.0 / rho, 1.0 / rho2);
        let w = p.y * d1.x - p.x * d1.y;
        let radial = p.x * d1.x + p.y * d1.y;
        let azimuth_dd =
            ((p.y * d2.x - p.x * d2.y) - 2.0 * w * radial * inverse_rho2) * inverse_rho2;
        let rho_d = radial * inverse_rho;
        let rho_dd =
            (d1.x * d1.x + d1.y * d1.y + p.x * d2.x + p.y * d2.y - rho_d * rho_d) * inverse_rho;
        let n = rho * d1.z - p.z * rho_d;
        let m = rho2 + p.z * p.z;
        let inverse_m = 1.0 / m;
        let n_d = rho * d2.z - p.z * rho_dd;
        let m_d = 2.0 * (rho * rho_d + p.z * d1.z);
        let elevation_dd = (n_d - n * m_d * inverse_m) * inverse_m;
        let (sx, sy) = (self.map.x_scale(), self.map.y_scale());
        let velocity = Vector2::new(w * inverse_rho2 * sx, -n * inverse_m * sy);
        (velocity, Vector2::new(azimuth_dd * sx, -elevation_dd * sy))
    }

    /// Appends the vertices after `a` up to and including `b`.
    fn refine(&self, piece: &mut Piece, a: &Sample, b: &Sample, depth: u32, out: &mut PolylineSet) {
        if piece.curve.is_great_circle()
            && b.t - a.t <= SHORT_SPAN
            && self
                .ends_bound(a, b)
                .is_some_and(|e| e <= self.tolerance / 2.0)
        {
            out.line_to(b.at);
            return;
        }
        let middle = self.sample(piece, (a.t + b.t) / 2.0);
        let mut error = self.chord_error(a, &middle, b);
        if error <= self.tolerance && !piece.curve.is_great_circle() {
            // An ellipse's image bends less regularly than a great circle's (its parameter is
            // not an angle on the sphere): before accepting, measure the quarter points too.
            for t in [(3.0 * a.t + b.t) / 4.0, (a.t + 3.0 * b.t) / 4.0] {
                let quarter = self.sample(piece, t);
                error = error.max(distance_to_chord(a.at, b.at, quarter.at));
            }
        }
        // A chord may not run across a quarter of the image even where the curve is straight
        // there (a sweep along a pole row), so no stroke can look like one across the seam;
        // and none is longer than an eighth of the height, so that the samples that judge it
        // stay close enough together to see how its curvature changes.
        let short = (b.at.x - a.at.x).abs() <= self.map.width() / 4.0
            && (b.at.x - a.at.x).hypot(b.at.y - a.at.y) <= self.map.height() / 8.0;
        // Near a pole the curvature varies fastest and three samples may miss a little of
        // its peak: keep a margin there.
        let polar = |y: f64| {
            y < POLAR_ROWS * self.map.height() || y > (1.0 - POLAR_ROWS) * self.map.height()
        };
        let allowed = if polar(a.at.y) || polar(b.at.y) {
            POLAR_MARGIN * self.tolerance
        } else {
            self.tolerance
        };
        let done = error <= allowed && short;
        if done || depth >= MAX_DEPTH || piece.samples_left == 0 {
            if short {
                out.line_to(b.at);
            } else {
                // Only reached at a limit: better a gap than a stroke across the image.
                out.move_to(b.at);
            }
            return;
        }
        let parts = whole_parts((error / self.tolerance).sqrt()).clamp(2, MAX_PARTS);
        let parts = if short { parts } else { parts.max(4) };
        if parts == 2 {
            self.refine(piece, a, &middle, depth + 1, out);
            self.refine(piece, &middle, b, depth + 1, out);
            return;
        }
        let mut previous = *a;
        for k in 1..parts {
            let next = self.sample(piece, a.t + (b.t - a.t) * k as f64 / parts as f64);
            self.refine(piece, &previous, &next, depth + 1, out);
            previous = next;
        }
        self.refine(piece, &previous, b, depth + 1, out);
    }

    /// The curvature bound of [`Flattener::chord_error`] from the two ends alone, for a
    /// short span whose image runs along its chord (it cannot hold an inflection pair or a
    /// turn that only a middle sample would show); `None` where it does not apply.
    fn ends_bound(&self, a: &Sample, b: &Sample) -> Option<f64> {
        let ((va, acc_a), (vb, acc_b)) = (a.derivatives?, b.derivatives?);
        let chord = Vector2::new(b.at.x - a.at.x, b.at.y - a.at.y);
        let length = chord.norm();
        let too_wide = chord.x.abs() > self.map.width() / 4.0;
        // Near a pole the curvature changes too fast for two samples.
        let polar = |y: f64| {
            y < POLAR_ROWS * self.map.height() || y > (1.0 - POLAR_ROWS) * self.map.height()
        };
        if polar(a.at.y) || polar(b.at.y) {
            return None;
        }
        if too_wide || length <= 1e-12 || va.dot(&chord) <= 0.0 || vb.dot(&chord) <= 0.0 {
            return None;
        }
        let across = |acc: &Vector2<f64>| (chord.x * acc.y - chord.y * acc.x).abs() / length;
        let (p, q) = (across(&acc_a), across(&acc_b));
        let (smallest, largest) = (p.min(q), p.max(q));
        let spread = if largest > 0.0 {
            (largest - smallest) / largest
        } else {
            0.0
        };
        let span = b.t - a.t;
        Some(largest * (1.0 + spread) * span * span / 8.0)
    }

    /// The estimated largest distance between the curve and the chord from `a` to `b`.
    fn chord_error(&self, a: &Sample, middle: &Sample, b: &Sample) -> f64 {
        let chord = Vector2::new(b.at.x - a.at.x, b.at.y - a.at.y);
        let length = chord.norm();
        let direction = if length > 1e-12 {
            chord / length
        } else {
            Vector2::zeros()
        };
        let samples = [a, middle, b];
        let derivatives = samples.iter().filter_map(|s| s.derivatives);
        // Where the image runs back against the chord (an ellipse seen edge-on turns back
        // on itself), it can overshoot the chord's ends: bound the whole second derivative
        // then, not just its part across the chord.
        let reverses =
            length <= 1e-12 || derivatives.clone().any(|(v, _)| v.dot(&direction) <= 0.0);
        let (smallest, largest) = derivatives
            .map(|(_, acc)| {
                if reverses {
                    acc.norm()
                } else {
                    (direction.x * acc.y - direction.y * acc.x).abs()
                }
            })
            .fold((f64::INFINITY, 0.0f64), |(lo, hi), c| {
                (lo.min(c), hi.max(c))
            });
        // Three samples can miss the peak where the second derivative changes fast (near a
        // pole it grows without bound): widen the bound by its spread across the samples.
        let spread = if largest > 0.0 {
            (largest - smallest) / largest
        } else {
            0.0
        };
        let span = b.t - a.t;
        let bound = largest * (1.0 + spread) * span * span / 8.0;
        distance_to_chord(a.at, b.at, middle.at).max(bound)
    }
}

/// Whether a direction lies further than `NEAR_POLE + SHORT_ARC` from both poles:
/// `|z| <= c |p|`, squared as `z^2 <= c^2 |p|^2`.
fn is_level(p: &Vector3<f64>) -> bool {
    p.z * p.z <= COS_NEAR_POLE_AND_SHORT_ARC.powi(2) * p.norm_squared()
}

/// Whether a curve is a short great arc that can meet neither the seam nor a pole band, so
/// that [`Flattener::find_cuts`] would find no cut inside it and nothing in it lies on the
/// seam: at most `SHORT_ARC` long, its ends level (so it comes no nearer a pole than
/// `NEAR_POLE`), and its ends both ahead of the viewer or both clearly to one side. A short
/// arc lies in the cone of its ends, so it stays there too. Most edges of a site are such
/// arcs.
///
/// "Clearly" to one side: `|x| > CLEAR_OF_SEAM |p|` at both ends of a true great arc (one
/// with an exact end, so `u` and `v` are unit vectors). Then the arc does not lie in the
/// seam's plane by [`SphereCurve::lies_in_plane`] (a start `u cos t0 + v sin t0` with
/// `|x| > 1e-9` needs `u.x` or `v.x` past `1e-9 / sqrt 2`, far over its `2e-12`), and
/// neither end's azimuth is on the seam: both are `1e-9` rad or more from it.
fn is_short_and_clear(curve: &SphereCurve, start: &Vector3<f64>, end: &Vector3<f64>) -> bool {
    let ahead = start.y > 0.0 && end.y > 0.0;
    let clear = |p: &Vector3<f64>| p.x * p.x > CLEAR_OF_SEAM * CLEAR_OF_SEAM * p.norm_squared();
    let one_side = curve.exact_end.is_some() && start.x * end.x > 0.0 && clear(start) && clear(end);
    curve.is_great_circle()
        && curve.t1 - curve.t0 <= SHORT_ARC
        && (ahead || one_side)
        && is_level(start)
        && is_level(end)
}

/// `ceil(x)` as a count of at least one, without the library call `ceil` makes on the
/// baseline x86-64 target (this runs for every edge). An infinite `x` (an error estimate
/// at a pole) gives the largest count rather than overflowing; NaN gives one.
fn whole_parts(x: f64) -> usize {
    let whole = x as usize;
    if (whole as f64) < x {
        whole.saturating_add(1)
    } else {
        whole.max(1)
    }
}

/// The distance from `p` to the segment from `a` to `b`.
fn distance_to_chord(a: ImagePoint, b: ImagePoint, p: ImagePoint) -> f64 {
    let chord = Vector2::new(b.x - a.x, b.y - a.y);
    let to_p = Vector2::new(p.x - a.x, p.y - a.y);
    let length_sq = chord.norm_squared();
    let along = if length_sq > 0.0 {
        (to_p.dot(&chord) / length_sq).clamp(0.0, 1.0)
    } else {
        0.0
    };
    (to_p - chord * along).norm()
}

/// An azimuth in `[-pi, pi]` (atan2's own) put on the border `side` (-pi or pi) when it lies
/// on the seam on the other border, within `NEAR_SEAM`; every other azimuth, and every one
/// when `side` is 0, as it is.
fn onto_side(azimuth: f64, side: f64) -> f64 {
    if azimuth * side < 0.0 && PI - azimuth.abs() <= NEAR_SEAM {
        side
    } else {
        azimuth
    }
}

/// The border, -pi (left) or pi (right), of a piece of `curve` from `ta` to `tb` that meets
/// the seam at an end (at `ta` when `a_on_seam`, else at `tb`): the side the curve leaves
/// the seam towards at `ta`, or comes to it from at `tb`. Just right of straight behind, x
/// is positive and the azimuth near pi, so the side is the sign of x just inside the piece,
/// the sign of the curve's sideways velocity at `ta` and the opposite at `tb`. The middle of
/// the piece is no guide: a curve passing close to the eye swings through more than half a
/// turn of azimuth in a short piece. Should the curve run along the seam's plane at that end
/// (no sideways velocity), the side of `middle` decides.
fn seam_side(
    curve: &SphereCurve,
    (ta, a_on_seam): (f64, bool),
    tb: f64,
    middle: &Vector3<f64>,
) -> f64 {
    let sideways = if a_on_seam {
        curve.velocity(ta).x
    } else {
        -curve.velocity(tb).x
    };
    let sign = if sideways != 0.0 { sideways } else { middle.x };
    if sign < 0.0 {
        -PI
    } else {
        PI
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sphere::azimuth_elevation;
    use std::f64::consts::TAU;

    fn map() -> Equirect {
        Equirect::from_size_px(4096.0, 2048.0)
    }

    fn lines(curve: &SphereCurve) -> Vec<Vec<ImagePoint>> {
        lines_at(curve, DEFAULT_TOLERANCE_PX)
    }

    fn lines_at(curve: &SphereCurve, tolerance_px: f64) -> Vec<Vec<ImagePoint>> {
        let mut out = PolylineSet::new();
        flatten(curve, map(), tolerance_px, &mut out);
        out.iter().map(|l| l.to_vec()).collect()
    }

    fn arc(a: [f64; 3], b: [f64; 3]) -> SphereCurve {
        SphereCurve::great_arc(&Vector3::from(a), &Vector3::from(b)).unwrap()
    }

    #[test]
    fn tolerances_are_checked_in_one_place() {
        assert!(check_tolerance(DEFAULT_TOLERANCE_PX).is_ok());
        assert!(check_tolerance(0.001).is_ok() && check_tolerance(100.0).is_ok());
        for bad in [0.0, 0.0009, 100.5, f64::NAN, f64::INFINITY, -1.0] {
            let error = check_tolerance(bad).unwrap_err().to_string();
            assert!(error.contains("outside 0.001 to 100 px"), "{bad}: {error}");
        }
    }

    #[test]
    fn a_piece_takes_the_side_the_curve_leaves_or_reaches_the_seam_from() {
        // A level ring round the eye, 5 m across, starting straight behind (0, -5, 0) and
        // turning towards +x (u straight behind, v to the right): it leaves the seam to
        // the right (pi) at t = 0 and, run backwards from t = 0, reaches it from the left.
        let ring = SphereCurve::ellipse_arc(
            Vector3::zeros(),
            Vector3::new(0.0, -5.0, 0.0),
            Vector3::new(5.0, 0.0, 0.0),
            -1.0,
            2.0,
        );
        // Whatever side the middle given lies on.
        for middle in [Vector3::new(-1.0, 1.0, 0.0), Vector3::new(1.0, 1.0, 0.0)] {
            assert_eq!(seam_side(&ring, (0.0, true), 0.5, &middle), PI);
            assert_eq!(seam_side(&ring, (-0.5, false), 0.0, &middle), -PI);
        }
        // A curve running along the seam's plane at that end (no sideways velocity): the
        // middle's side decides.
        let upright = SphereCurve::ellipse_arc(
            Vector3::new(0.0, -5.0, 0.0),
            Vector3::new(0.0, 0.0, 1.0),
            Vector3::new(0.0, 1.0, 0.0),
            0.0,
            1.0,
        );
        assert_eq!(
            seam_side(&upright, (0.0, true), 1.0, &Vector3::new(-1.0, -1.0, 0.0)),
            -PI
        );
        assert_eq!(
            seam_side(&upright, (0.0, true), 1.0, &Vector3::new(1.0, -1.0, 0.0)),
            PI
        );
    }

    #[test]
    fn only_an_azimuth_on_the_seam_takes_the_side() {
        assert_eq!(onto_side(-PI, PI), PI);
        assert_eq!(onto_side(PI, -PI), -PI);
        assert_eq!(onto_side(-PI + 0.5e-6, PI), PI);
        // Away from the seam, on the piece's own border, or with no side: as it is.
        for (azimuth, side) in [
            (-PI + 2e-6, PI),
            (-3.0, PI),
            (0.5, -PI),
            (PI, PI),
            (-PI, 0.0),
        ] {
            assert_eq!(onto_side(azimuth, side), azimuth);
        }
    }

    #[test]
    fn the_distance_to_a_chord_is_to_its_nearest_point() {
        let point = |x, y| ImagePoint { x, y };
        let (a, b) = (point(0.0, 0.0), point(4.0, 0.0));
        // Beside the chord, the perpendicular; beyond an end, the distance to that end.
        assert_eq!(distance_to_chord(a, b, point(1.0, 3.0)), 3.0);
        assert_eq!(distance_to_chord(a, b, point(7.0, 4.0)), 5.0);
        assert_eq!(distance_to_chord(a, b, point(-3.0, -4.0)), 5.0);
        // A chord of no length (a curve back at its start) is a point.
        assert_eq!(distance_to_chord(b, b, point(7.0, 4.0)), 5.0);
    }

    #[test]
    fn first_and_second_derivatives_match_finite_differences() {
        let curve = SphereCurve::ellipse_arc(
            Vector3::new(1.0, 4.0, 2.0),
            Vector3::new(2.0, 0.5, 0.0),
            Vector3::new(0.0, 1.0, 1.5),
            0.0,
            TAU,
        );
        let flattener = Flattener::new(map(), 0.1);
        for t in [0.1, 1.0, 2.5, 4.0] {
            let mut piece = Piece {
                curve: &curve,
                seam_side: 0.0,
                samples_left: 100,
            };
            let h = 1e-4;
            let s = |t| {
                flattener
                    .sample(
                        &mut Piece {
                            curve: &curve,
                            seam_side: 0.0,
                            samples_left: 9,
                        },
                        t,
                    )
                    .at
            };
            let (m, p0, p) = (s(t - h), s(t), s(t + h));
            // Central differences: (P(t+h) - P(t-h)) / 2h and (P(t+h) - 2 P(t) + P(t-h)) / h^2.
            let fd_velocity = Vector2::new(p.x - m.x, p.y - m.y) / (2.0 * h);
            let fd = Vector2::new(m.x - 2.0 * p0.x + p.x, m.y - 2.0 * p0.y + p.y) / (h * h);
            let (velocity, exact) = flattener.sample(&mut piece, t).derivatives.unwrap();
            assert!(
                (fd_velocity - velocity).norm() <= 1e-6 * velocity.norm().max(1.0),
                "t {t}: {fd_velocity} vs {velocity}"
            );
            assert!(
                (fd - exact).norm() <= 1e-4 * exact.norm().max(1.0),
                "t {t}: {fd} vs {exact}"
            );
        }
    }

    #[test]
    fn vertical_edge_is_a_vertical_line() {
        // An edge straight ahead-right, from below the eye to above it.
        let pieces = lines(&arc([3.0, 4.0, -1.5], [3.0, 4.0, 8.0]));
        assert_eq!(pieces.len(), 1);
        let expected_x = (3f64.atan2(4.0) + PI) / TAU * 4096.0;
        for p in &pieces[0] {
            assert!((p.x - expected_x).abs() < 1e-9, "{p:?}");
        }
        // A straight image needs only its ends, plus a vertex wherever a chord would be longer
        // than an eighth of the height (256 px here).
        let length = pieces[0][pieces[0].len() - 1].y - pieces[0][0].y;
        let most = (length.abs() / 256.0).ceil() as usize * 2 + 1;
        assert!(
            pieces[0].len() <= most,
            "{} vertices for {length} px: {:?}",
            pieces[0].len(),
            pieces[0]
        );
    }

    #[test]
    fn seam_crossing_ends_on_both_borders_at_one_row() {
        let pieces = lines(&arc([-2.0, -5.0, 1.0], [2.0, -5.0, -0.5]));
        assert_eq!(pieces.len(), 2);
        let end_of_first = *pieces[0].last().unwrap();
        let start_of_second = pieces[1][0];
        let borders = [end_of_first.x, start_of_second.x];
        assert!(
            borders.contains(&0.0) && borders.contains(&4096.0),
            "{borders:?}"
        );
        assert!((end_of_first.y - start_of_second.y).abs() < 0.01);
    }

    #[test]
    fn an_arc_from_behind_to_ahead_across_the_seam_is_cut_there() {
        // From behind and to the left (azimuth about -163 degrees) to ahead and to the right
        // (about 79): the shorter way, 118 degrees, passes behind the eye, over the seam. One
        // end behind and one ahead is not "both ahead": the seam must be sought, in either
        // direction of travel, and each direction draws the other's vertices in reverse
        // (33 in all; refining across an unsought seam instead costs some 220).
        let (behind, ahead) = ([-0.3, -1.0, 0.2], [1.0, 0.2, 0.0]);
        let drawn = |a, b| {
            let pieces = lines(&arc(a, b));
            assert_eq!(pieces.len(), 2, "{a:?} to {b:?}");
            let (end_of_first, start_of_second) = (*pieces[0].last().unwrap(), pieces[1][0]);
            let mut borders = [end_of_first.x, start_of_second.x];
            borders.sort_by(f64::total_cmp);
            assert_eq!(borders, [0.0, 4096.0], "{a:?} to {b:?}");
            assert!((end_of_first.y - start_of_second.y).abs() < 0.01);
            pieces
        };
        let forward = drawn(behind, ahead);
        let mut backward = drawn(ahead, behind);
        backward.reverse();
        for (f, b) in forward.iter().zip(&backward) {
            assert_eq!(f.len(), b.len());
            for (p, q) in f.iter().zip(b.iter().rev()) {
                assert!(
                    (p.x - q.x).abs() < 1e-6 && (p.y - q.y).abs() < 1e-6,
                    "{p:?} {q:?}"
                );
            }
        }
    }

    #[test]
    fn exact_pole_pass_runs_to_the_border_and_continues_opposite() {
        // Over the head from ahead-right to behind-left, through the zenith.
        let pieces = lines(&arc([1.0, 1.0, 1.0], [-1.0, -1.0, 1.0]));
        assert_eq!(pieces.len(), 2);
        let top_a = *pieces[0].last().unwrap();
        let top_b = pieces[1][0];
        assert_eq!((top_a.y, top_b.y), (0.0, 0.0));
        assert!(
            ((top_a.x - top_b.x).abs() - 2048.0).abs() < 1e-9,
            "{top_a:?} {top_b:?}"
        );
        // Both pieces are vertical lines.
        for piece in &pieces {
            assert!(
                piece.iter().all(|p| (p.x - piece[0].x).abs() < 1e-9),
                "{piece:?}"
            );
        }
    }

    #[test]
    fn near_pole_pass_within_the_band_breaks_at_the_border_row() {
        let miss = 1e-5; // the band is 0.05 px at 2048 rows, about 7.7e-5 rad
        let pieces = lines(&arc([miss, 1.0, 1.0], [miss, -1.0, 1.0]));
        assert_eq!(pieces.len(), 2, "{pieces:?}");
        let (up, down) = (*pieces[0].last().unwrap(), pieces[1][0]);
        assert_eq!((up.y, down.y), (0.0, 0.0));
        // Both ends at the true azimuth where the curve meets the band: the nearest point
        // lies miss to the right, so the curve enters at atan(miss / s) with
        // s = sqrt(band^2 - miss^2) past the meridian, and leaves symmetrically.
        let band = 0.05 * PI / 2048.0;
        let offset = miss.atan2((band * band - miss * miss).sqrt());
        let expected_up = 2048.0 + offset * 4096.0 / TAU;
        assert!(
            (up.x - expected_up).abs() < 0.05,
            "{} vs {expected_up}",
            up.x
        );
        assert!(((up.x - down.x).abs() - (2048.0 - 2.0 * offset * 4096.0 / TAU)).abs() < 0.1);
    }

    #[test]
    fn a_short_arc_through_a_pole_band_breaks_at_the_border_row() {
        // Arcs of 0.04 rad (shorter than the 0.05 rad that may skip the search for a pole
        // when both ends lie well away from it), passing 1e-5 rad from the zenith and from
        // the nadir: inside the band, so each breaks at its border row.
        for (z, row) in [(1.0, 0.0), (-1.0, 2048.0)] {
            let pieces = lines(&arc([1e-5, 0.02, z], [1e-5, -0.02, z]));
            assert_eq!(pieces.len(), 2, "{pieces:?}");
            assert_eq!((pieces[0].last().unwrap().y, pieces[1][0].y), (row, row));
        }
    }

    #[test]
    fn the_pole_band_is_an_angle_whatever_the_height() {
        // A ring of 3 m radius 10 m overhead, passing 0.1 mm from the vertical: 1e-5 rad
        // from the zenith, inside the band of about 7.7e-5 rad, so it breaks at the border
        // row like the great arc above, though the 0.1 mm is more than the band's 7.7e-5
        // taken as a length.
        let ring = SphereCurve::ellipse_arc(
            Vector3::new(3.0 + 1e-4, 0.0, 10.0),
            Vector3::new(-3.0, 0.0, 0.0),
            Vector3::new(0.0, 3.0, 0.0),
            -1.0,
            2.0,
        );
        let pieces = lines(&ring);
        assert_eq!(pieces.len(), 2, "{pieces:?}");
        let (up, down) = (*pieces[0].last().unwrap(), pieces[1][0]);
        assert_eq!((up.y, down.y), (0.0, 0.0));
        // It meets the band's circle, 10 tan(band) from the vertical, s either side of its
        // nearest point (the ring's own bend there, 1.5 t^2, is a thousandth of the miss):
        // coming from straight behind at pi - atan(miss / s), leaving ahead at atan(miss / s).
        let (miss, reach): (f64, f64) = (1e-4, 10.0 * (0.05 * PI / 2048.0).tan());
        let off = miss.atan2((reach * reach - miss * miss).sqrt()) * 4096.0 / TAU;
        assert!((up.x - (4096.0 - off)).abs() < 0.5, "{up:?}, off {off}");
        assert!((down.x - (2048.0 + off)).abs() < 0.5, "{down:?}, off {off}");
    }

    #[test]
    fn near_pole_pass_beyond_tolerance_sweeps_below_the_border() {
        let miss = 0.02; // about 13 px from the zenith
        let pieces = lines(&arc([miss, 1.0, 1.0], [miss, -1.0, 1.0]));
        let top = pieces
            .iter()
            .flatten()
            .map(|p| p.y)
            .fold(f64::INFINITY, f64::min);
        let expected = miss.atan() * 2048.0 / PI;
        assert!((top - expected).abs() < 0.1, "{top} vs {expected}");
    }

    #[test]
    fn piece_on_the_seam_is_drawn_on_both_borders() {
        // Straight behind the viewer, from the ground up.
        let pieces = lines(&arc([0.0, -4.0, -1.6], [0.0, -4.0, 3.0]));
        assert_eq!(pieces.len(), 2);
        assert!(pieces[0].iter().all(|p| p.x == 0.0));
        assert!(pieces[1].iter().all(|p| p.x == 4096.0));
    }

    #[test]
    fn a_seam_crossing_costs_no_more_vertices_than_a_crossing_straight_ahead() {
        // Turning a curve half a turn about the vertical only slides its image half the
        // width sideways, so across the seam it needs about as many vertices as across the
        // middle column (a few more: the cut at the seam moves where the refinement splits
        // it). A seam crossing missed by the cuts is still found, by bisecting the chord
        // that jumps across the image down to `MAX_DEPTH`, and lands on the same border
        // points, but leaves a trail of a hundred or more vertices on either side.
        let v = Vector3::new;
        let half_turn = |p: Vector3<f64>| v(-p.x, -p.y, p.z);
        let vertices = |curve: &SphereCurve| lines(curve).iter().map(Vec::len).sum::<usize>();
        let level_ring = |u: Vector3<f64>, w: Vector3<f64>| {
            SphereCurve::ellipse_arc(Vector3::zeros(), u, w, 0.5, 5.0)
        };
        let (a, b) = (v(-1.0, 0.1, 0.0), v(1.0, -1.5, 0.0));
        let (ahead, right) = (v(0.0, 5.0, 0.0), v(5.0, 0.0, 0.0));
        let cases = [
            // A great arc from ahead on the left to behind on the right, the short way
            // round (through the seam), and the same turned to cross straight ahead.
            (
                arc(a.into(), b.into()),
                arc(half_turn(a).into(), half_turn(b).into()),
            ),
            // Most of a level great circle, five radians from ahead on the right round
            // behind to ahead on the left: both ends ahead, yet more than half a turn.
            (
                level_ring(ahead, right),
                level_ring(half_turn(ahead), half_turn(right)),
            ),
        ];
        for (across_the_seam, across_the_middle) in cases {
            assert_eq!(lines(&across_the_seam).len(), 2);
            assert_eq!(lines(&across_the_middle).len(), 1);
            let (seam, middle) = (vertices(&across_the_seam), vertices(&across_the_middle));
            assert!(
                seam <= 2 * middle,
                "{seam} vertices across the seam, {middle} ahead"
            );
        }
    }

    #[test]
    fn the_pole_band_widens_with_the_tolerance() {
        // The band is half the tolerance deep in rows: at 100 px, the widest tolerance
        // allowed, it reaches 50 / (2048 / pi) = 0.077 rad from the zenith of a 4096 x 2048
        // image. A great arc whose plane leans 0.065 rad from the vertical passes that far
        // from the zenith: at the default tolerance it is drawn whole, just below the top
        // row; at 100 px it is cut at the band's edge, on the top row, like an arc through
        // the zenith itself.
        let lean = 0.065;
        let curve = arc([-lean, 1.0, 1.0], [-lean, -1.0, 1.0]);
        assert_eq!(lines(&curve).len(), 1);
        let drawn = lines_at(&curve, 100.0);
        assert_eq!(drawn.len(), 2, "{drawn:?}");
        assert_eq!(drawn[0].last().unwrap().y, 0.0);
        assert_eq!(drawn[1][0].y, 0.0);
    }

    /// The true image of a direction, by the mapping written out here (the crate's
    /// convention, Snyder 1987 eq. 12-1 and 12-2 scaled to pixels): azimuth `atan2(x, y)`
    /// clockwise from straight ahead, elevation `atan2(z, hypot(x, y))`,
    /// `x = (r + pi) / 2 pi * W`, `y = (pi/2 - e) / pi * H`.
    fn true_image(d: &Vector3<f64>) -> ImagePoint {
        let (r, e) = (d.x.atan2(d.y), d.z.atan2(d.x.hypot(d.y)));
        ImagePoint::new((r + PI) / TAU * 4096.0, (PI / 2.0 - e) / PI * 2048.0)
    }

    /// The distance from `p` to the nearest stroke, counting the seam as one line (a point
    /// on one border is the same direction as on the other).
    fn distance_to_drawing(p: ImagePoint, lines: &[Vec<ImagePoint>]) -> f64 {
        let mut nearest = f64::INFINITY;
        for shift in [0.0, 4096.0, -4096.0] {
            let q = ImagePoint::new(p.x + shift, p.y);
            for line in lines {
                if line.len() == 1 {
                    nearest = nearest.min((line[0].x - q.x).hypot(line[0].y - q.y));
                }
                for w in line.windows(2) {
                    nearest = nearest.min(distance_to_chord(w[0], w[1], q));
                }
            }
        }
        nearest
    }

    /// Checks the drawing of `curve` at the default tolerance against the definition of the
    /// tolerance (the crate docs: the largest distance between the true image and the
    /// polyline): every one of 3,000 points of the true image lies within 0.1 px of a stroke,
    /// but those within half the tolerance of a pole (drawn as the border row); no stroke
    /// runs across a quarter of the image or off it. Returns the drawing.
    fn drawn_within_tolerance(curve: &SphereCurve) -> Vec<Vec<ImagePoint>> {
        drawn_within(curve, DEFAULT_TOLERANCE_PX)
    }

    /// [`drawn_within_tolerance`] at any tolerance.
    fn drawn_within(curve: &SphereCurve, tolerance_px: f64) -> Vec<Vec<ImagePoint>> {
        let drawn = lines_at(curve, tolerance_px);
        let band = 0.5 * tolerance_px * PI / 2048.0;
        for i in 0..=3000 {
            let t = curve.t0 + (curve.t1 - curve.t0) * i as f64 / 3000.0;
            let d = curve.position(t);
            if d.x.hypot(d.y).atan2(d.z.abs()) < band * 1.0001 {
                continue;
            }
            let p = true_image(&d);
            let off = distance_to_drawing(p, &drawn);
            assert!(
                off <= tolerance_px * 1.0001 + 1e-9,
                "t = {t}: {p:?} is {off} px from the drawing {drawn:?}"
            );
        }
        for line in &drawn {
            for w in line.windows(2) {
                assert!((w[1].x - w[0].x).abs() <= 1024.0, "{w:?}");
            }
            for p in line {
                assert!((0.0..=4096.0).contains(&p.x) && (0.0..=2048.0).contains(&p.y));
            }
        }
        drawn
    }

    /// The direction of an image point, by the inverse of `true_image`.
    fn direction_of(p: ImagePoint) -> Vector3<f64> {
        let (r, e) = (p.x / 4096.0 * TAU - PI, PI / 2.0 - p.y / 2048.0 * PI);
        Vector3::new(e.cos() * r.sin(), e.cos() * r.cos(), e.sin())
    }

    #[test]
    fn great_arcs_anywhere_stay_within_the_tolerance() {
        // Each with the polylines it must make: one, and one more for each seam crossing
        // and each pass through a pole band (worked from where the ends lie: two ends
        // ahead, y > 0, or both on one side, x of one sign, cannot cross the seam).
        let arcs = [
            // Long, ahead, rising from below the eye to well above it.
            ([-5.0, 2.0, -1.0], [4.0, 3.0, 6.0], 1),
            // Across the seam behind the viewer; and from ahead on the left (azimuth -84
            // degrees) to behind on the right (146), the short way round, through the seam.
            ([-2.0, -5.0, 1.0], [2.0, -5.0, -0.5], 2),
            ([-1.0, 0.1, 0.0], [1.0, -1.5, 0.0], 2),
            // Past the zenith 0.02 rad off (13 px below the top row), and the nadir 0.1 off.
            ([0.02, 1.0, 1.0], [0.02, -1.0, 1.0], 1),
            ([0.1, 1.0, -1.0], [0.1, -1.0, -1.0], 1),
            // Past the zenith 5e-4 rad off: 0.33 px below the top row, outside the pole band
            // (0.05 px), so drawn below the row, not on it.
            ([5e-4, 1.0, 1.0], [5e-4, -1.0, 1.0], 1),
            // Through the zenith.
            ([1.0, 1.0, 1.0], [-1.0, -1.0, 1.0], 2),
            // Ending in the zenith's pole band, and starting in the nadir's.
            ([1.0, 2.0, 0.5], [1e-6, 0.0, 1.0], 1),
            ([0.0, 1e-6, -1.0], [-3.0, 1.0, 0.2], 1),
            // Short, away from the poles; and short near one.
            ([1.0, 10.0, 1.0], [1.2, 10.0, 1.1], 1),
            ([0.5, 0.2, 10.0], [0.6, -0.1, 10.0], 1),
            // Along the seam, from the ground up: drawn on both borders.
            ([0.0, -4.0, -1.6], [0.0, -4.0, 3.0], 2),
        ];
        let band = 0.5 * DEFAULT_TOLERANCE_PX * PI / 2048.0;
        for (a, b, count) in arcs {
            let curve = arc(a, b);
            let drawn = drawn_within_tolerance(&curve);
            assert_eq!(drawn.len(), count, "{a:?} {b:?}: {drawn:?}");
            // The drawing starts and ends at the ends' images (on either border, or on the
            // border row for an end in a pole band).
            let (a, b) = (Vector3::from(a), Vector3::from(b));
            let (first, last) = (drawn[0][0], *drawn[count - 1].last().unwrap());
            for (end, p) in [(a, first), (b, last)] {
                if end.x.hypot(end.y).atan2(end.z.abs()) < band {
                    assert_eq!(p.y, if end.z > 0.0 { 0.0 } else { 2048.0 });
                } else {
                    let q = true_image(&end);
                    let dx = (q.x - p.x).abs();
                    assert!(dx.min((dx - 4096.0).abs()) < 1e-9 && (q.y - p.y).abs() < 1e-9);
                }
            }
            // And runs along the arc from a to b, never back: the angle from a of each
            // vertex's direction, in the arc's plane, grows (a vertex on the border row
            // stands for the pole band's edge, within the band of the arc).
            let (u, normal) = (a.normalize(), a.cross(&b).normalize());
            let v = normal.cross(&u);
            // An arc along the seam is drawn twice, once on each border: each is checked
            // from its start; any other arc's pieces follow on from one another.
            let along_the_seam = a.x == 0.0 && b.x == 0.0;
            let mut before = -1e-9;
            for (k, line) in drawn.iter().enumerate() {
                if along_the_seam && k == 1 {
                    before = -1e-9;
                }
                for p in line {
                    let d = direction_of(*p);
                    let along = d.dot(&v).atan2(d.dot(&u));
                    let slack = if p.y == 0.0 || p.y == 2048.0 {
                        band
                    } else {
                        1e-9
                    };
                    assert!(along >= before - slack, "{p:?}: {along} after {before}");
                    before = before.max(along);
                }
            }
        }
        // The level arc through the seam breaks exactly on the borders, on the horizon row.
        let level = lines(&arc([-1.0, 0.1, 0.0], [1.0, -1.5, 0.0]));
        assert_eq!(*level[0].last().unwrap(), ImagePoint::new(0.0, 1024.0));
        assert_eq!(level[1][0], ImagePoint::new(4096.0, 1024.0));
    }

    /// The span of a great circle inclined `inclination_degrees` (its top straight ahead)
    /// from `-half` to `half`, the parameter 0 at its top; and the top.
    fn over_the_top(inclination_degrees: f64, half: f64) -> (SphereCurve, Vector3<f64>) {
        let inclination = inclination_degrees.to_radians();
        let top = Vector3::new(0.0, inclination.cos(), inclination.sin());
        let curve =
            SphereCurve::ellipse_arc(Vector3::zeros(), top, Vector3::x(), -half, 2.0 * half);
        (curve, top)
    }

    /// The samples at `ta` and `tb` of `curve`, as `refine` takes them, and their ends' bound.
    fn ends_and_bound(curve: &SphereCurve, ta: f64, tb: f64) -> (Sample, Sample, f64) {
        let flattener = Flattener::new(map(), DEFAULT_TOLERANCE_PX);
        let mut piece = Piece {
            curve,
            seam_side: 0.0,
            samples_left: 2,
        };
        let (a, b) = (
            flattener.sample(&mut piece, ta),
            flattener.sample(&mut piece, tb),
        );
        let bound = flattener.ends_bound(&a, &b).unwrap();
        (a, b, bound)
    }

    #[test]
    fn a_short_span_over_the_top_of_a_steep_great_circle_is_cut_where_it_sags() {
        // A great circle inclined 69 degrees bends most over its top, 21 degrees from the
        // zenith (outside the cut near a pole). A span of 0.0298 rad centred there (short
        // enough to be judged on its ends' curvature) sags 0.19 px from its chord, above the
        // default tolerance (worked numerically from the true image): its ends' bound must
        // send it to be cut, not let it be drawn as the chord.
        let half = 0.0149;
        let (curve, top) = over_the_top(69.0, half);
        let (a, b) = (curve.position(-half), curve.position(half));
        let sag = distance_to_chord(true_image(&a), true_image(&b), true_image(&top));
        assert!((sag - 0.19).abs() < 0.002, "{sag}");
        let drawn = drawn_within_tolerance(&curve);
        assert!(drawn.len() == 1 && drawn[0].len() > 2, "{drawn:?}");
        // The ends' curvature is a little below the top's, so their bound falls 0.2% short
        // of the sag here: hence only half the tolerance is taken on it. At a tolerance just
        // over the bound, the span is still cut.
        let (_, _, bound) = ends_and_bound(&curve, -half, half);
        assert!(sag > 1.0015 * bound, "{sag} {bound}");
        let drawn = drawn_within(&curve, 1.0003 * bound);
        assert!(drawn.len() == 1 && drawn[0].len() > 2, "{drawn:?}");
    }

    #[test]
    fn a_short_slanting_span_is_judged_by_its_bend_across_the_chord() {
        // Two spans of 0.029 rad on steep great circles, 79 to 81 degrees below the horizon
        // (just outside the cut near the pole), whose images bend strongly and whose chords
        // run slantwise across the image. Each sags more than the default tolerance from its
        // chord (0.44 and 0.65 px, worked from the true image), so each must be cut; its
        // ends' bound must measure the curvature across the chord, not along either axis.
        // (Found among 200,000 random short spans as the ones a wrongly turned
        // bound would pass.)
        let spans = [
            (
                [-0.185107, 0.033524, -0.982146],
                [-0.204081, 0.012303, -0.978877],
                0.44,
            ),
            (
                [-0.128626, 0.092094, -0.987408],
                [-0.145332, 0.115148, -0.982659],
                0.65,
            ),
        ];
        for (a, b, sag_px) in spans {
            let curve = arc(a, b);
            let middle = curve.position(curve.t1 / 2.0);
            let (start, end) = (Vector3::from(a), Vector3::from(b));
            let sag = distance_to_chord(true_image(&start), true_image(&end), true_image(&middle));
            assert!((sag - sag_px).abs() < 0.01, "{sag}");
            let drawn = drawn_within_tolerance(&curve);
            assert!(drawn.len() == 1 && drawn[0].len() > 2, "{drawn:?}");
        }
    }

    #[test]
    fn a_long_span_is_never_taken_on_its_ends_bound() {
        // The ends' bound holds only over a short span: over 0.7 rad across the top of a
        // great circle inclined 68.5 degrees (its top 21.5 degrees from the zenith, outside
        // the cut near a pole) it is less than half the sag of the true image. At a
        // tolerance just over twice that bound, the shortcut would draw the span as its
        // chord, more than the tolerance from the curve; the span must be cut instead.
        let half = 0.35;
        let (curve, top) = over_the_top(68.5, half);
        let (a, b, bound) = ends_and_bound(&curve, -half, half);
        let sag = distance_to_chord(a.at, b.at, true_image(&top));
        assert!(sag > 2.1 * bound, "{sag} {bound}");
        let tolerance = 2.02 * bound;
        assert!(tolerance <= 100.0, "{tolerance}");
        let drawn = drawn_within(&curve, tolerance);
        assert!(drawn.len() == 1 && drawn[0].len() > 2, "{drawn:?}");
    }

    #[test]
    fn an_image_that_doubles_back_is_bounded_by_its_whole_bend() {
        // A narrow ellipse about 2 m by 0.2 m, 1.8 m from the eye: its image runs out and back
        // along almost the same track, turning sharply at each end. Where a span's image turns
        // back against its chord, only the whole second derivative bounds it (its part across
        // the chord does not), at any tolerance. (Found among 20,000 random ellipses; drawn
        // without that rule it strays 7% beyond a 0.5 px tolerance.)
        let v = Vector3::new;
        let narrow = SphereCurve::ellipse_arc(
            v(0.9355464287274895, -0.42020091203588095, 1.5151372845004039),
            v(0.860315370406777, 0.41137110256330967, -0.33228256161585046),
            v(
                0.06887636265421446,
                0.05040161003809869,
                -0.04714071970214705,
            ),
            1.7754902259502783,
            7.605529303171973 - 1.7754902259502783,
        );
        drawn_within(&narrow, 0.5);
    }

    #[test]
    fn the_bend_bound_follows_the_chord_at_any_tolerance() {
        // Four ellipses a few metres across and off, drawn for quick drafts at 10, 5, 3 and
        // 1 px, and a great arc at 0.05 px: the bound on a span's bend across its chord must
        // take the chord's true direction. (Found among 32,000 random curves at tolerances
        // from 0.05 to 10 px as the ones a chord or its direction worked wrongly lets stray
        // 0.3% to 2.2% beyond the tolerance.)
        let v = Vector3::new;
        let curves = [
            (
                v(-2.1772166022141723, 3.9348600917290577, -2.6387873319162782),
                v(-2.74700336362808, 2.9006313942780317, 1.9307882366810973),
                v(1.6987026694252276, 1.0957841984061665, -1.9742419933334465),
                (2.4187956771546117, 6.890577241869501),
                10.0,
            ),
            (
                v(1.9179270435259115, 1.1817526596372847, -1.0305310306872197),
                v(1.0127007558709205, 1.7450480907224069, -2.4114492156559315),
                v(
                    1.1933666333126425,
                    -0.0507606359584331,
                    -0.15687289463686277,
                ),
                (3.4979671629052946, 5.990662102677703),
                5.0,
            ),
            (
                v(1.5375948090140046, -0.7345379193532668, -0.881811996150649),
                v(0.19393587833380255, 1.6516774762996465, 2.2838268981947647),
                v(0.1360963593494202, -0.632439139361449, -2.504003910402006),
                (4.282038751332368, 10.13363740981558),
                3.0,
            ),
            (
                v(-1.2391404206331442, 0.263382617017208, 0.9911735151602103),
                v(-0.06958074771307782, 2.357364861630654, 1.7277341133729667),
                v(2.989186701005763, 1.3161245325710755, 2.920882271289522),
                (1.0163997915844258, 3.9742662187698192),
                1.0,
            ),
            (
                Vector3::zeros(),
                v(0.6292438655990769, 0.7060380818676628, 0.3249036542708656),
                v(-0.7243415800875763, 0.38119665892785043, 0.5744722644118487),
                (0.0, 2.9606374118449743),
                0.05,
            ),
        ];
        for (centre, u, v, (t0, t1), tolerance_px) in curves {
            drawn_within(
                &SphereCurve::ellipse_arc(centre, u, v, t0, t1 - t0),
                tolerance_px,
            );
        }
    }

    /// The fewest chords, none longer than an eighth of the image's height (the flattener's
    /// own limit), that keep within `tolerance_px` of the true image of `curve`: a greedy
    /// walk taking each chord as long as it can be.
    fn fewest_chords(curve: &SphereCurve, tolerance_px: f64) -> usize {
        let image = |t: f64| true_image(&curve.position(t));
        let fits = |ta: f64, tb: f64| {
            let (a, b) = (image(ta), image(tb));
            (b.x - a.x).hypot(b.y - a.y) <= map().height() / 8.0
                && (1..100).all(|i| {
                    let t = ta + (tb - ta) * i as f64 / 100.0;
                    distance_to_chord(a, b, image(t)) <= tolerance_px
                })
        };
        let (mut t, mut count) = (curve.t0, 1);
        while !fits(t, curve.t1) {
            let (mut reach, mut beyond) = (t, curve.t1);
            for _ in 0..50 {
                let middle = (reach + beyond) / 2.0;
                if fits(t, middle) {
                    reach = middle;
                } else {
                    beyond = middle;
                }
            }
            (t, count) = (reach, count + 1);
        }
        count
    }

    #[test]
    fn refining_spends_no_more_than_twice_the_fewest_chords() {
        // Great arcs ahead of the viewer, rising, falling and crossing the horizon, each at
        // least 100 degrees long: the flattener halves spans where a greedy walk stretches
        // each chord to the limit, so it draws more chords than the fewest (here 444 where
        // 301 would do; about 1.6 times on 400 random arcs ahead), but never twice as many.
        let arcs = [
            ((-80.0, -40.0), (70.0, 50.0)),
            ((-60.0, 10.0), (80.0, -30.0)),
            ((-30.0, 60.0), (40.0, -60.0)),
            ((-85.0, 0.0), (85.0, 20.0)),
            ((-70.0, 45.0), (75.0, 40.0)),
        ];
        let (mut drawn, mut fewest) = (0, 0);
        for ((az_a, el_a), (az_b, el_b)) in arcs {
            let end = |az: f64, el: f64| {
                crate::sphere::direction_from_azimuth_elevation(az.to_radians(), el.to_radians())
            };
            let curve = SphereCurve::great_arc(&end(az_a, el_a), &end(az_b, el_b)).unwrap();
            let lines = drawn_within_tolerance(&curve);
            drawn += lines.iter().map(|l| l.len() - 1).sum::<usize>();
            fewest += fewest_chords(&curve, DEFAULT_TOLERANCE_PX);
        }
        assert!(drawn < 2 * fewest, "{drawn} chords where {fewest} would do");
    }

    #[test]
    fn rings_and_ellipses_stay_within_the_tolerance() {
        let v = Vector3::new;
        // Each with the polylines it must make (from where its points lie).
        let curves = [
            // A level ring round the eye, 2 m up, 5 m across: a straight row at elevation
            // atan(2 / 5), cut once at the seam.
            (
                SphereCurve::ellipse_arc(
                    v(0.0, 0.0, 2.0),
                    v(5.0, 0.0, 0.0),
                    v(0.0, 5.0, 0.0),
                    0.0,
                    TAU,
                ),
                2,
            ),
            // A ring in the vertical plane x = 0 ahead (y from 7 to 13), seen edge-on: it
            // runs up and back down the middle column.
            (
                SphereCurve::ellipse_arc(
                    v(0.0, 10.0, 0.0),
                    v(0.0, 3.0, 0.0),
                    v(0.0, 0.0, 3.0),
                    0.0,
                    TAU,
                ),
                1,
            ),
            // A ring overhead round the zenith (no nearer than 0.59 m to the vertical at 10 m
            // up): a wave along the top of the image, cut once at the seam.
            (
                SphereCurve::ellipse_arc(
                    v(1.0, 1.0, 10.0),
                    v(2.0, 0.0, 0.0),
                    v(0.0, 2.0, 0.0),
                    0.0,
                    TAU,
                ),
                2,
            ),
            // Oblique, all ahead (y = 4 + 0.5 cos t + sin t > 0), and part of one backwards
            // all to the left (x = -3 + cos t < 0).
            (
                SphereCurve::ellipse_arc(
                    v(1.0, 4.0, 2.0),
                    v(2.0, 0.5, 0.0),
                    v(0.0, 1.0, 1.5),
                    0.0,
                    TAU,
                ),
                1,
            ),
            // A level ring 8 m across round a point 3.5 m ahead (the eye inside it, 0.5 m
            // from its back), from t = 3.3 to 6.2: both ends ahead (y = 2.87 and 3.17) in
            // less than half a turn of parameter, yet it passes behind, through the seam at
            // t = 3 pi / 2, y = -0.5.
            (
                SphereCurve::ellipse_arc(
                    v(0.0, 3.5, 0.0),
                    v(4.0, 0.0, 0.0),
                    v(0.0, 4.0, 0.0),
                    3.3,
                    2.9,
                ),
                2,
            ),
            (
                SphereCurve::ellipse_arc(
                    v(-3.0, -4.0, -1.0),
                    v(1.0, 0.0, 0.5),
                    v(0.0, 2.0, 0.0),
                    1.0,
                    -4.0,
                ),
                1,
            ),
        ];
        for (curve, count) in &curves {
            let drawn = drawn_within_tolerance(curve);
            assert_eq!(drawn.len(), *count, "{curve:?}: {drawn:?}");
        }
        // The level ring is a straight row at elevation atan(2 / 5) from border to border.
        let row = (PI / 2.0 - (2.0f64 / 5.0).atan()) / PI * 2048.0;
        let ring = lines(&curves[0].0);
        assert!(ring.iter().flatten().all(|p| (p.y - row).abs() < 1e-9));
        let ends = [
            ring[0][0].x,
            ring[0].last().unwrap().x,
            ring[1][0].x,
            ring[1].last().unwrap().x,
        ];
        // It starts due right (t = 0 at (5, 0, 2): x = 3072), runs left to the seam on
        // the left border, and on from the right border back to its start.
        assert_eq!(ends, [3072.0, 0.0, 4096.0, 3072.0]);
    }

    #[test]
    fn an_end_straight_behind_lies_on_the_border_its_edge_comes_from() {
        // Level edges (on the horizon row, y = 1024) with one end exactly behind the eye,
        // where atan2 gives +pi or -pi by the sign of a zero x: the end must be drawn on the
        // border on the edge's own side, the left (x = 0) for an edge on the left
        // (azimuth atan2(-4, -3) = -126.9 degrees, x = 604.5), the right (x = 4096) for one
        // on the right, whichever the zero's sign.
        let left = (PI + (-4f64).atan2(-3.0)) / TAU * 4096.0;
        let right = 4096.0 - left;
        let cases = [
            ([-4.0, -3.0, 0.0], [0.0, -5.0, 0.0], (left, 0.0)),
            ([-4.0, -3.0, 0.0], [-0.0, -5.0, 0.0], (left, 0.0)),
            ([4.0, -3.0, 0.0], [0.0, -5.0, 0.0], (right, 4096.0)),
            ([4.0, -3.0, 0.0], [-0.0, -5.0, 0.0], (right, 4096.0)),
            ([0.0, -5.0, 0.0], [-4.0, -3.0, 0.0], (0.0, left)),
            ([-0.0, -5.0, 0.0], [-4.0, -3.0, 0.0], (0.0, left)),
            ([0.0, -5.0, 0.0], [4.0, -3.0, 0.0], (4096.0, right)),
            ([-0.0, -5.0, 0.0], [4.0, -3.0, 0.0], (4096.0, right)),
        ];
        for (a, b, (first, last)) in cases {
            let drawn = lines(&arc(a, b));
            assert_eq!(drawn.len(), 1, "{a:?} {b:?}: {drawn:?}");
            let line = &drawn[0];
            assert!(line.iter().all(|p| (p.y - 1024.0).abs() < 1e-9), "{line:?}");
            let ends = (line[0].x, line.last().unwrap().x);
            assert!(
                (ends.0 - first).abs() < 1e-9 && (ends.1 - last).abs() < 1e-9,
                "{a:?} {b:?}: {ends:?}"
            );
        }
    }

    #[test]
    fn a_stretch_swinging_past_half_a_turn_meets_the_seam_on_its_own_border() {
        // An ellipse passing 1.45 m from the eye (its points worked in the test's own
        // terms: azimuth atan2(x, y), elevation atan2(z, hypot(x, y))): it starts below on
        // the left (azimuth -75.9 degrees, elevation -42.8), swings up over the front and
        // the right (87.9 degrees, 55.5 up at t = -4) and round behind, meets the seam at
        // t = -1.901 and ends behind on the left (-155.0 degrees). The azimuth at the
        // middle of its first stretch, to the seam, is 109.9 degrees, more than half a turn
        // (185.8 degrees) from the start's: no azimuth of one point of a stretch tells
        // every other which side of the seam it is on (this drawing once began beyond the
        // right border, when the middle's did).
        let curve = SphereCurve::ellipse_arc(
            Vector3::new(-1.3, -2.1, -1.3),
            Vector3::new(-4.3, 1.1, -4.6),
            Vector3::new(0.1, 3.8, 0.8),
            -5.6,
            4.3,
        );
        crosses_the_seam_from_right_to_left(&curve);
    }

    #[test]
    fn a_curve_passing_close_to_the_eye_keeps_to_its_side_of_the_seam() {
        // A ring of 4.3 m radius, tilted a little, passing 3.5 cm from the eye (worked
        // outside the crate, the ring's points in the test's own terms): it starts behind on
        // the right (azimuth 167.7 degrees), crosses the seam behind at t = -3.448, sweeps
        // round the left and past the eye, where its azimuth turns through most of a half
        // turn in a few hundredths of a radian, and ends ahead on the right (39.7 degrees).
        // The piece that leaves the seam swings more than half a turn from the azimuth at
        // its own middle, so only the way the curve leaves the seam tells which border it
        // starts from (the left: it runs on to negative azimuths).
        let curve = SphereCurve::ellipse_arc(
            Vector3::new(4.1, -1.2, -0.2),
            Vector3::new(4.3, 0.0, 0.0),
            Vector3::new(0.0, -4.2, -0.8),
            -3.86,
            1.8,
        );
        crosses_the_seam_from_right_to_left(&curve);
    }

    /// Checks that `curve` is drawn within the tolerance as two polylines: from its start
    /// to the seam on the right border, then from the left border to its end.
    fn crosses_the_seam_from_right_to_left(curve: &SphereCurve) {
        let drawn = drawn_within_tolerance(curve);
        assert_eq!(drawn.len(), 2, "{drawn:?}");
        assert_eq!(drawn[0].last().unwrap().x, 4096.0);
        assert_eq!(drawn[1][0].x, 0.0);
    }

    #[test]
    fn a_short_arc_clear_of_the_seam_and_the_poles_has_no_cut_inside() {
        // `flatten` skips the search for cuts on arcs `is_short_and_clear` passes. Over arcs
        // of every direction, heading and length up to the limit, and starts a hair to
        // either side of the seam's plane, wherever the shortcut is taken the search must
        // find only the ends, no pole band, and neither end on the seam. (Worked through
        // the search's own rules: this test ties the shortcut to them.)
        let flattener = Flattener::new(map(), DEFAULT_TOLERANCE_PX);
        let mut cuts = Vec::new();
        let (mut taken, mut refused_near_seam) = (0, 0);
        for i in 0..20_000u32 {
            // A low-discrepancy walk over the start's azimuth and elevation, the arc's
            // heading and its length (golden-ratio steps).
            let step = |k: f64| (f64::from(i) * k).fract();
            let azimuth = match i % 4 {
                0 => PI - 1e-10 * step(0.618),
                1 => -PI + 1e-7 * step(0.618),
                _ => (2.0 * step(0.618_033_988_7) - 1.0) * PI,
            };
            let elevation = (2.0 * step(0.754_877_666_2) - 1.0) * 1.5;
            let heading = step(0.569_840_290_9) * TAU;
            let length = 1e-6 + step(0.412_454_033_6) * if i % 3 == 0 { 1.0 } else { 0.06 };
            let start = Vector3::new(
                azimuth.sin() * elevation.cos(),
                azimuth.cos() * elevation.cos(),
                elevation.sin(),
            );
            // A direction square to the start, turned by the heading, and the end that far on.
            let east = Vector3::new(azimuth.cos(), -azimuth.sin(), 0.0);
            let north = start.cross(&east);
            let along = east * heading.cos() + north * heading.sin();
            let end = start * length.cos() + along * length.sin();
            let Some(curve) = SphereCurve::great_arc(&start, &end) else {
                continue;
            };
            let mut whole = Piece {
                curve: &curve,
                seam_side: 0.0,
                samples_left: MAX_SAMPLES_PER_CURVE,
            };
            let ends = (
                flattener.sample(&mut whole, curve.t0),
                flattener.sample(&mut whole, curve.t1),
            );
            if !is_short_and_clear(&curve, &ends.0.position, &ends.1.position) {
                refused_near_seam += usize::from(i % 4 < 2 && start.y < 0.0);
                continue;
            }
            taken += 1;
            let touches =
                flattener.find_cuts(&curve, &mut cuts, (&ends.0.position, &ends.1.position));
            let plain_ends = [(curve.t0, Cut::Plain), (curve.t1, Cut::Plain)];
            assert_eq!(cuts, plain_ends, "{start:?} -> {end:?}");
            assert!(!touches, "{start:?} -> {end:?}");
            for end in [&ends.0, &ends.1] {
                assert!(end.at.x > 0.0 && end.at.x < map().width(), "{:?}", end.at);
            }
            let behind = ends.0.position.y < 0.0 || ends.1.position.y < 0.0;
            assert!(!(behind && curve.lies_in_plane(&Vector3::x())), "{start:?}");
        }
        assert!(taken > 5_000, "the shortcut was taken {taken} times");
        assert!(
            refused_near_seam > 1_000,
            "{refused_near_seam} refused near the seam"
        );
    }

    #[test]
    fn consecutive_edges_meet_at_the_same_point_exactly() {
        // Edges of a polyline share their ends: the image of a shared end must be the same
        // bit for bit whichever edge draws it, however long the edge (these are 95 to 150
        // degrees, cut into three or four equal parts before refining), so a wireframe's
        // strokes join without a hair's gap.
        let corners = [
            [-1.0, 0.1, 0.0],
            [1.0, 0.3, 0.5],
            [-0.8, 0.2, 0.9],
            [0.9, 0.5, -0.7],
            [-1.0, 0.4, -0.2],
            [0.7, 0.1, 0.3],
        ];
        for w in corners.windows(3) {
            let first = lines(&arc(w[0], w[1]));
            let second = lines(&arc(w[1], w[2]));
            assert_eq!((first.len(), second.len()), (1, 1), "{w:?}");
            assert_eq!(first[0].last().unwrap(), &second[0][0], "{w:?}");
        }
    }

    #[test]
    fn every_vertex_lies_on_the_curve() {
        let curve = arc([5.0, 2.0, -1.0], [-3.0, 6.0, 4.0]);
        let normal = curve.u.cross(&curve.v);
        for piece in lines(&curve) {
            for p in piece {
                let (r, e) = map().to_angles(p);
                let d = crate::sphere::direction_from_azimuth_elevation(r, e);
                assert!(normal.dot(&d).abs() < 1e-12);
                let _ = azimuth_elevation(&d);
            }
        }
    }

    /// A level ring 4 m across through the eye, from eccentric angle `start` through
    /// `sweep`: the eye at angle 0, due left of it below 0 and due right above.
    fn ring_through_the_eye(start: f64, sweep: f64) -> SphereCurve {
        let v = Vector3::new;
        SphereCurve::ellipse_arc(
            v(0.0, 2.0, 0.0),
            v(0.0, -2.0, 0.0),
            v(2.0, 0.0, 0.0),
            start,
            sweep,
        )
    }

    #[test]
    fn a_curve_through_the_eye_is_drawn_with_bounded_work() {
        // A level ring 4 m across passing exactly through the eye (an arch's circle through
        // the standpoint): its image tears there, from due left to due right, and no chord
        // across the tear can meet the tolerance. Refining stops at its depth limit beside
        // the tear, the ring drawn up to it from either side; it does not go on until the
        // curve's whole budget of a million samples is spent.
        let drawn = lines(&ring_through_the_eye(-1.0, 2.0));
        assert_eq!(drawn.len(), 2, "{drawn:?}");
        let vertices: usize = drawn.iter().map(Vec::len).sum();
        assert!(vertices < 1000, "{vertices}");
        let near = |p: ImagePoint, x: f64| (p.x - x).abs() < 1e-6 && (p.y - 1024.0).abs() < 1e-6;
        assert!(
            near(*drawn[0].last().unwrap(), 1024.0),
            "{:?}",
            drawn[0].last()
        );
        assert!(near(drawn[1][0], 3072.0), "{:?}", drawn[1][0]);
    }

    #[test]
    fn an_arc_leaving_or_reaching_the_eye_is_drawn_with_bounded_work() {
        // The ring above cut at the eye, so the tear sits at an end of the arc: the parameter
        // can close in on it, a quarter at a time, for some 500 levels before floats run out.
        // The depth limit must count every level, whether the tear falls in the first of the
        // parts (an arc leaving the eye) or in the last (an arc reaching it).
        for (start, tear_x) in [(0.0, 3072.0), (-2.0, 1024.0)] {
            let half_ring = ring_through_the_eye(start, 2.0);
            // The eye itself has no direction: a lone vertex may stand for it, never a stroke.
            let drawn: Vec<_> = lines(&half_ring)
                .into_iter()
                .filter(|l| l.len() > 1)
                .collect();
            assert_eq!(drawn.len(), 1, "{drawn:?}");
            let line = &drawn[0];
            assert!(line.len() < 1000, "{}", line.len());
            let beside_eye = if start == 0.0 {
                line[0]
            } else {
                line[line.len() - 1]
            };
            assert!(
                (beside_eye.x - tear_x).abs() < 1e-6 && (beside_eye.y - 1024.0).abs() < 1e-6,
                "{beside_eye:?}"
            );
        }
    }
}
