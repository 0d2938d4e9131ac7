//! Lettering: text drawn as strokes, so that it is the same lines in every output (a PNG, an
//! SVG, a PDF) and needs no font file.
//!
//! The letters are a single-stroke alphabet of our own ([`super::glyphs`]): capitals, small
//! letters, figures, the degree sign, minus and common punctuation, and every letter of
//! Unicode's Latin-1 Supplement and Latin Extended-A, the accented ones built from a base
//! letter and its marks (the canonical decomposition, by `unicode-normalization`). A
//! character we cannot draw is drawn as a crossed box and reported by [`unlettered`], never
//! dropped.
//!
//! Proportions are those of ISO 3098-0 lettering type B, relative to the cap height h
//! (from memory; the ratios are the standard's table for type B):
//! - stroke width d = h/10 ([`stroke_width`]);
//! - x-height c = 7/10 h, descenders 3/10 h;
//! - spacing between characters a = 2/10 h, clear space between the inked strokes
//!   ([`CHARACTER_SPACE`]);
//! - spacing between words e = 6/10 h, clear space ([`WORD_SPACE`]);
//! - smallest pitch of baselines b = 14/10 h ([`line_pitch`]).
//!
//! Strokes are drawn with round caps and joins by every backend, so the lettering has
//! rounded ends.

use super::glyphs::{self, Place, CAP, CARON_BESIDE, COMMA_ABOVE, COMMA_BELOW, PLACEHOLDER};
use crate::plane::{ImagePoint, PolylineSet};

/// Where a line of text stands relative to its anchor point, which is on its baseline.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Align {
    /// The text starts at the anchor.
    Start,
    /// The text is centred on the anchor.
    Middle,
    /// The text ends at the anchor.
    End,
}

/// Stroke width as a fraction of the cap height (ISO 3098-0 type B, d = h/10; from memory).
pub const STROKE: f64 = 0.1;
/// Clear space between characters, fraction of the cap height (type B, a = 2/10 h).
pub const CHARACTER_SPACE: f64 = 0.2;
/// Clear space between words, fraction of the cap height (type B, e = 6/10 h).
pub const WORD_SPACE: f64 = 0.6;
/// Smallest baseline pitch, fraction of the cap height (type B, b = 14/10 h).
pub const LINE_PITCH: f64 = 1.4;

/// Degrees between the points of a flattened arc: at a 60 px cap height the largest
/// bowl's chord strays 0.1 px from its arc.
const ARC_STEP_DEG: f64 = 10.0;

/// The stroke width for lettering `height` pixels high (cap height).
pub fn stroke_width(height: f64) -> f64 {
    STROKE * height
}

/// The smallest baseline pitch for lettering `height` pixels high.
pub fn line_pitch(height: f64) -> f64 {
    LINE_PITCH * height
}

/// A character's strokes on the glyph grid (cap height [`CAP`]), its width between the
/// centre lines of its leftmost and rightmost strokes, and whether it is the placeholder.
#[derive(Clone, Debug, Default)]
struct Shape {
    width: f64,
    strokes: Vec<Vec<(f64, f64)>>,
    placeholder: bool,
}

impl Shape {
    fn from_glyph((width, text): (f64, &str)) -> Shape {
        let mut shape = Shape {
            width,
            ..Shape::default()
        };
        shape.add(text, 0.0, 0.0);
        shape
    }

    /// Appends strokes given in the glyph language, moved by `(dx, dy)`.
    fn add(&mut self, text: &str, dx: f64, dy: f64) {
        for stroke in text.split(';').filter(|s| !s.trim().is_empty()) {
            let mut points: Vec<(f64, f64)> = Vec::new();
            for token in stroke.split_whitespace() {
                let numbers: Vec<f64> = token
                    .trim_start_matches("e:")
                    .split(',')
                    .filter_map(|n| n.parse().ok())
                    .collect();
                match numbers[..] {
                    [x, y] => points.push((x + dx, y + dy)),
                    [cx, cy, rx, ry, from, to] => {
                        let steps = ((to - from).abs() / ARC_STEP_DEG).ceil().max(1.0) as usize;
                        for k in 0..=steps {
                            let t = (from + (to - from) * k as f64 / steps as f64).to_radians();
                            points.push((cx + rx * t.cos() + dx, cy + ry * t.sin() + dy));
                        }
                    }
                    _ => {}
                }
            }
            if points.len() >= 2 {
                self.strokes.push(points);
            }
        }
    }

    fn points(&self) -> impl Iterator<Item = (f64, f64)> + '_ {
        self.strokes.iter().flatten().copied()
    }

    fn top(&self) -> f64 {
        self.points().map(|p| p.1).fold(0.0, f64::max)
    }

    /// The point of the glyph nearest its foot at `x`: where a mark below attaches.
    fn foot_near(&self, x: f64) -> (f64, f64) {
        let low = self.points().map(|p| p.1).fold(f64::INFINITY, f64::min);
        self.points()
            .filter(|p| p.1 <= low.max(0.0) + 0.3)
            .min_by(|a, b| (a.0 - x).abs().total_cmp(&(b.0 - x).abs()))
            .unwrap_or((x, 0.0))
    }
}

/// The shape of a character: its own glyph, or its base letter with marks, or the
/// placeholder.
fn shape(c: char) -> Shape {
    if let Some(g) = glyphs::glyph(c) {
        return Shape::from_glyph(g);
    }
    // A character that decomposes into one other is that character (Unicode's canonical
    // equivalence: the Kelvin sign is K); one that does not decompose gives itself back,
    // which has no glyph.
    let mut parts = Vec::new();
    unicode_normalization::char::decompose_canonical(c, |p| parts.push(p));
    let composed = parts
        .split_first()
        .and_then(|(&base, marks)| compose(base, marks));
    composed.unwrap_or_else(|| Shape {
        placeholder: true,
        ..Shape::from_glyph(PLACEHOLDER)
    })
}

/// A base letter with combining marks, if we can draw every part.
fn compose(base: char, marks: &[char]) -> Option<Shape> {
    let above = marks
        .iter()
        .any(|&m| glyphs::mark(m).is_some_and(|(place, _)| place == Place::Above));
    // An i or j loses its dot under a mark above.
    let mut shape = match base {
        'i' if above => Shape::from_glyph(glyphs::glyph('\u{131}')?),
        'j' if above => Shape::from_glyph((2.0, "2,7 2,-1 e:1,-1,1,2,0,-170")),
        _ => Shape::from_glyph(glyphs::glyph(base)?),
    };
    for &m in marks {
        let (place, strokes) = glyphs::mark(m)?;
        let centre = shape.width / 2.0;
        match (place, m, base) {
            (Place::Above, '\u{30c}', 'd' | 'l' | 't' | 'L') => {
                let x = shape.width + 2.05;
                shape.add(CARON_BESIDE, x, 0.0);
                shape.width = x + 0.6;
            }
            (Place::Above, ..) => {
                let mark = Shape::from_glyph((0.0, strokes));
                let lowest = mark.points().map(|p| p.1).fold(f64::INFINITY, f64::min);
                // Two stroke widths between centre lines: one stroke width of clear space.
                let foot = shape.top() + 2.05 - lowest;
                shape.add(strokes, centre, foot);
            }
            (Place::Below, _, 'c' | 's' | 't' | 'C' | 'S' | 'T') => {
                let (x, y) = shape.foot_near(centre);
                shape.add(strokes, x, y);
            }
            (Place::Below, _, 'g') => {
                let foot = shape.top() + 2.05 - 0.4;
                shape.add(COMMA_ABOVE, centre, foot);
            }
            (Place::Below, ..) => {
                let (x, _) = shape.foot_near(centre);
                shape.add(COMMA_BELOW, x, 0.0);
            }
            (Place::BelowRight, ..) => {
                let (x, y) = shape.foot_near(shape.width);
                shape.add(strokes, x, y);
            }
        }
    }
    Some(shape)
}

/// The characters of `text` drawn as the placeholder (no glyph of ours), each once, in order.
pub fn unlettered(text: &str) -> Vec<char> {
    let mut missing: Vec<char> = Vec::new();
    for c in text.chars() {
        if !missing.contains(&c) && !c.is_whitespace() && shape(c).placeholder {
            missing.push(c);
        }
    }
    missing
}

/// The distance from one character's origin to the next's, grid units: its width, the
/// stroke width (half a stroke's round cap on each side) and the clear space.
fn advance(shape: &Shape) -> f64 {
    shape.width + (STROKE + CHARACTER_SPACE) * CAP
}

/// The width of a space, grid units, so that the clear space between words is
/// [`WORD_SPACE`].
fn space_width() -> f64 {
    (WORD_SPACE - 2.0 * CHARACTER_SPACE - STROKE) * CAP
}

/// The width of a line of text `height` pixels high (cap height), in pixels: from the
/// centre line of the first letter's leftmost stroke to that of the last one's rightmost.
pub fn text_width(text: &str, height: f64) -> f64 {
    let mut units = 0.0;
    let mut count = 0;
    for c in text.chars() {
        let width = if c.is_whitespace() {
            space_width()
        } else {
            shape(c).width
        };
        units += width + (STROKE + CHARACTER_SPACE) * CAP;
        count += 1;
    }
    if count == 0 {
        return 0.0;
    }
    (units - (STROKE + CHARACTER_SPACE) * CAP) * height / CAP
}

/// How far a line of text reaches above and below its baseline, pixels (stroke centre
/// lines): at least the cap height above and nothing below.
pub fn text_extent(text: &str, height: f64) -> (f64, f64) {
    let (mut up, mut down) = (CAP, 0.0f64);
    for c in text.chars().filter(|c| !c.is_whitespace()) {
        for (_, y) in shape(c).points() {
            up = up.max(y);
            down = down.max(-y);
        }
    }
    (up * height / CAP, down * height / CAP)
}

/// Appends the strokes of a line of text whose cap height is `height` pixels, its
/// baseline through `at`, aligned to `at` as `align` says.
pub fn letter(text: &str, at: ImagePoint, height: f64, align: Align, out: &mut PolylineSet) {
    let scale = height / CAP;
    let width = text_width(text, height);
    let mut x = match align {
        Align::Start => at.x,
        Align::Middle => at.x - width / 2.0,
        Align::End => at.x - width,
    };
    let mut points: Vec<ImagePoint> = Vec::new();
    for c in text.chars() {
        if c.is_whitespace() {
            x += (space_width() + (STROKE + CHARACTER_SPACE) * CAP) * scale;
            continue;
        }
        let shape = shape(c);
        for stroke in &shape.strokes {
            points.clear();
            points.extend(
                stroke
                    .iter()
                    .map(|&(gx, gy)| ImagePoint::new(x + gx * scale, at.y - gy * scale)),
            );
            out.push(&points);
        }
        x += advance(&shape) * scale;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn assert_near(a: f64, b: f64, tolerance: f64) {
        assert!(
            (a - b).abs() <= tolerance,
            "{a} != {b} (within {tolerance})"
        );
    }

    /// Every character the lettering promises: printable ASCII, the letters and signs of
    /// Latin-1 Supplement, and Latin Extended-A.
    fn promised() -> impl Iterator<Item = char> {
        (0x21u32..0x7f)
            .chain(0xa1..0x100)
            .chain(0x100..0x180)
            .filter_map(char::from_u32)
            .filter(|c| !matches!(c, '\u{ad}' | '\u{bc}' | '\u{bd}' | '\u{be}'))
    }

    #[test]
    fn every_promised_character_has_a_glyph_of_its_own() {
        let missing: String = promised().filter(|&c| shape(c).placeholder).collect();
        assert_eq!(
            missing,
            "",
            "{:?}",
            missing.chars().map(|c| c as u32).collect::<Vec<_>>()
        );
        // Anything else is drawn as the placeholder and reported.
        assert_eq!(
            unlettered("A\u{3b1}B\u{4e2d}\u{3b1}"),
            vec!['\u{3b1}', '\u{4e2d}']
        );
        let mut out = PolylineSet::new();
        letter(
            "\u{3b1}",
            ImagePoint::new(0.0, 0.0),
            10.0,
            Align::Start,
            &mut out,
        );
        assert_eq!(out.len(), 2, "a crossed box");
    }

    #[test]
    fn a_sign_that_unicode_makes_another_character_is_drawn_as_that_character() {
        // Canonical decompositions of one character, from the Unicode Standard's
        // UnicodeData.txt (from memory, and as the normalisation crate gives them): the
        // Kelvin sign U+212A is K, the Greek question mark U+037E a semicolon, the ohm
        // sign U+2126 the Greek capital omega, which has no glyph of ours.
        for (sign, character) in [('\u{212a}', 'K'), ('\u{37e}', ';')] {
            let (drawn, own) = (shape(sign), shape(character));
            assert!(!drawn.placeholder, "{sign}");
            assert_eq!((drawn.width, drawn.strokes), (own.width, own.strokes));
        }
        assert!(shape('\u{2126}').placeholder);
        assert_eq!(unlettered("3 \u{212a}, 5 \u{2126}"), vec!['\u{2126}']);
    }

    /// Samples of a glyph's strokes every `step` units, each with its stroke and its
    /// distance along it.
    fn samples(shape: &Shape, step: f64) -> Vec<(usize, f64, (f64, f64))> {
        let mut out = Vec::new();
        for (s, stroke) in shape.strokes.iter().enumerate() {
            let mut along = 0.0;
            for pair in stroke.windows(2) {
                let (a, b) = (pair[0], pair[1]);
                let length = (b.0 - a.0).hypot(b.1 - a.1);
                let n = (length / step).ceil().max(1.0) as usize;
                for k in 0..n {
                    let t = k as f64 / n as f64;
                    out.push((
                        s,
                        along + t * length,
                        (a.0 + (b.0 - a.0) * t, a.1 + (b.1 - a.1) * t),
                    ));
                }
                along += length;
            }
            if let Some(&last) = stroke.last() {
                out.push((s, along, last));
            }
        }
        out
    }

    /// At 2 mm cap height and 300 dpi (23.6 px, strokes 2.36 px wide), no two strokes of a
    /// glyph come closer than one stroke width: any two points of the centre lines less
    /// than two stroke widths apart (less than one of clear space between the inks) are
    /// joined by the lettering itself within a short way (where two strokes meet at a
    /// corner or cross). "A short way": 8 stroke widths along the strokes, so that the
    /// ink between arms that meet at a corner down to 29 degrees counts as the corner.
    #[test]
    fn strokes_of_a_glyph_keep_a_stroke_width_apart() {
        let height = 2.0 / 25.4 * 300.0;
        let d = stroke_width(height);
        let unit = height / CAP;
        let reach = 8.0 * d;
        let mut failures = Vec::new();
        for c in promised() {
            let shape = shape(c);
            let points = samples(&shape, 0.2);
            let n = points.len();
            let close = |i: usize, j: usize| {
                let (a, b) = (points[i].2, points[j].2);
                (a.0 - b.0).hypot(a.1 - b.1) * unit
            };
            // Neighbours: the next and previous sample of the same stroke, and samples of
            // other strokes that touch (strokes that meet or cross).
            let mut next: Vec<Vec<(usize, f64)>> = vec![Vec::new(); n];
            for i in 0..n {
                for j in 0..n {
                    let (si, ai, _) = points[i];
                    let (sj, aj, _) = points[j];
                    let along = si == sj && i.abs_diff(j) == 1;
                    if along {
                        next[i].push((j, (ai - aj).abs() * unit));
                    } else if i != j && close(i, j) < 0.15 * unit {
                        next[i].push((j, close(i, j)));
                    }
                }
            }
            'points: for i in 0..n {
                // Every sample within `reach` along the lettering.
                let mut best = vec![f64::INFINITY; n];
                best[i] = 0.0;
                let mut frontier = vec![i];
                while let Some(k) = frontier.pop() {
                    for &(j, w) in &next[k] {
                        if best[k] + w < best[j] && best[k] + w <= reach {
                            best[j] = best[k] + w;
                            frontier.push(j);
                        }
                    }
                }
                for j in 0..n {
                    if close(i, j) < 2.0 * d - 1e-9 && best[j] > reach {
                        failures.push(format!(
                            "{c:?} at {:?} and {:?}: {:.2} px",
                            points[i].2,
                            points[j].2,
                            close(i, j)
                        ));
                        break 'points;
                    }
                }
            }
        }
        assert!(failures.is_empty(), "{}", failures.join("\n"));
    }

    /// ISO 3098-0, lettering type B (ratios from memory): d = h/10, c = 7/10 h, a = 2/10 h,
    /// e = 6/10 h, b = 14/10 h; measured on drawn text.
    #[test]
    fn proportions_are_those_of_iso_3098_type_b() {
        let h = 20.0;
        let ink_gap = |text: &str| {
            // Two stems: "II" stands 0 wide each, so the gap between the centre lines is
            // the advance, and the clear space is that less one stroke width.
            text_width(text, h) - stroke_width(h)
        };
        assert_near(stroke_width(h), 0.1 * h, 1e-12);
        assert_near(ink_gap("II"), 0.2 * h, 1e-9);
        assert_near(ink_gap("I I") - ink_gap("II"), 0.4 * h, 1e-9);
        assert_near(text_width("I I", h) - stroke_width(h), 0.6 * h, 1e-9);
        assert_near(line_pitch(h), 1.4 * h, 1e-12);
        // Drawn heights: capitals reach h, small letters c = 0.7 h, descenders 0.3 h.
        let reach = |c: char| {
            let mut out = PolylineSet::new();
            letter(
                &c.to_string(),
                ImagePoint::new(0.0, 0.0),
                h,
                Align::Start,
                &mut out,
            );
            let top = out.points().iter().map(|p| -p.y).fold(f64::MIN, f64::max);
            let bottom = out.points().iter().map(|p| -p.y).fold(f64::MAX, f64::min);
            (top, bottom)
        };
        for c in ['H', 'E', 'O', 'N'] {
            assert_near(reach(c).0, h, 1e-9);
            assert_near(reach(c).1, 0.0, 1e-9);
        }
        for c in ['x', 'o', 'n', 'v'] {
            assert_near(reach(c).0, 0.7 * h, 1e-9);
        }
        for c in ['p', 'q', 'g'] {
            assert_near(reach(c).1, -0.3 * h, 1e-9);
        }
        for c in ['b', 'd', 'h', 'k', 'l'] {
            assert_near(reach(c).0, h, 1e-9);
        }
    }

    #[test]
    fn zero_is_not_slashed_and_is_narrower_than_o() {
        let zero = shape('0');
        assert_eq!(zero.strokes.len(), 1, "one oval, no slash");
        assert!(zero.width < 0.75 * shape('O').width);
    }

    #[test]
    fn alignment_and_width() {
        let mut out = PolylineSet::new();
        letter(
            "I",
            ImagePoint::new(100.0, 50.0),
            12.0,
            Align::Middle,
            &mut out,
        );
        // The I is one stem from the cap line to the baseline, on the anchor.
        assert_eq!(
            out.iter().next().unwrap(),
            &[ImagePoint::new(100.0, 50.0), ImagePoint::new(100.0, 38.0)]
        );
        let w = text_width("N45", 12.0);
        let mut out = PolylineSet::new();
        letter(
            "N45",
            ImagePoint::new(10.0, 50.0),
            12.0,
            Align::End,
            &mut out,
        );
        let right = out.points().iter().map(|p| p.x).fold(f64::MIN, f64::max);
        let left = out.points().iter().map(|p| p.x).fold(f64::MAX, f64::min);
        assert_near(right, 10.0, 1e-9);
        assert_near(right - left, w, 1e-9);
    }

    #[test]
    fn accented_letters_carry_their_marks() {
        // É is E with an acute above the cap height; ç is c with a cedilla below.
        let e = shape('\u{c9}');
        assert_eq!(e.strokes.len(), shape('E').strokes.len() + 1);
        assert!(e.top() > CAP + 1.0);
        let (_, below) = text_extent("\u{e7}", 10.0);
        assert!(below > 1.0);
        // í has no dot under its acute.
        assert_eq!(shape('\u{ed}').strokes.len(), 2);
    }

    fn assert_points_near(a: &[(f64, f64)], b: &[(f64, f64)], what: &str) {
        let near = |p: &(f64, f64), q: &(f64, f64)| (p.0 - q.0).abs().max((p.1 - q.1).abs());
        assert!(
            a.len() == b.len() && a.iter().zip(b).all(|(p, q)| near(p, q) < 1e-9),
            "{what}: {a:?} != {b:?}"
        );
    }

    #[test]
    fn marks_keep_a_stroke_width_clear_of_their_letter_worked_by_hand() {
        // Grid units (cap height 10, strokes 1 wide): a mark's centre line stands 2.05
        // from its letter's, two stroke widths and a little, so one stroke width is clear.
        // The acute (-0.8,0.8 to 1,2.4) over E (6 wide, 10 high): centred at x = 3, its
        // foot at 10 + 2.05.
        let last = |c: char| shape(c).strokes.last().cloned().unwrap_or_default();
        assert_points_near(&last('\u{c9}'), &[(2.2, 12.05), (4.0, 13.65)], "E acute");
        // The turned comma over g (x-height 7, 6 wide): its foot (0.4 up the comma) at
        // 7 + 2.05, centred at x = 3.
        let g_comma = [(3.4, 9.05), (2.8, 10.05), (2.8, 10.85)];
        assert_points_near(&last('\u{123}'), &g_comma, "g cedilla");
        // A caron beside d (stem at x = 6): 2.05 right of the stem, and the letter as wide
        // as the caron's right end, 6 + 2.05 + 0.6.
        let d_caron = [(8.65, 10.0), (8.65, 9.0), (8.05, 7.5)];
        assert_points_near(&last('\u{10f}'), &d_caron, "d caron");
        assert_near(shape('\u{10f}').width, 8.65, 1e-12);
        // The ring over a (radius 1.2): centred at x = 3, its foot at 7 + 2.05 = 9.05 and
        // its centre a radius above that, (3, 10.25).
        for (x, y) in last('\u{e5}') {
            assert_near((x - 3.0).hypot(y - 10.25), 1.2, 1e-9);
        }
    }

    #[test]
    fn marks_below_hang_from_the_foot_of_their_letter_worked_by_hand() {
        // c is an arc about (3.3, 3.5), radii 3.3 and 3.5, from 45 to 315 degrees in
        // 10-degree steps: its lowest points, within 0.3 of its foot, are those at 255,
        // 265, 275 and 285 degrees, and the one nearest its middle (x = 2.8) is at 265
        // (x = 3.3 + 3.3 cos 265 = 3.012, against 2.446 at 255). The cedilla hangs there.
        let (cos, sin) = (265f64.to_radians().cos(), 265f64.to_radians().sin());
        let foot = (3.3 + 3.3 * cos, 3.5 + 3.5 * sin);
        assert_points_near(&shape('\u{e7}').strokes[1][..1], &[foot], "c cedilla");
        // The ogonek hangs from the foot of a's stem, right (6, 0), its nearest point.
        assert_points_near(&shape('\u{105}').strokes[2][..1], &[(6.0, 0.0)], "a ogonek");
    }

    #[test]
    fn a_mark_above_i_or_j_takes_the_place_of_its_dot() {
        // Common practice: i and j lose their dot under an accent (the stem and the mark
        // are left), but keep it over an ogonek (Lithuanian).
        assert_eq!(shape('\u{ed}').strokes.len(), 2, "i acute");
        assert_eq!(shape('\u{135}').strokes.len(), 2, "j circumflex");
        assert_eq!(shape('\u{12f}').strokes.len(), 3, "i ogonek");
    }

    #[test]
    fn text_reaches_the_cap_line_and_the_descender_exactly() {
        // ISO 3098-0 type B (from memory): descenders 3/10 of the cap height; a line
        // reaches at least the cap height, and an accent over a capital beyond it (the
        // acute's top at 13.65 units, worked above).
        assert_eq!(text_extent("p", 20.0), (20.0, 6.0));
        assert_eq!(text_extent("x x", 20.0), (20.0, 0.0));
        let (up, down) = text_extent("\u{c9}", 20.0);
        assert_near(up, 27.3, 1e-9);
        assert_eq!(down, 0.0);
    }

    #[test]
    fn drawn_words_stand_a_word_space_apart_and_centred_text_either_side() {
        // Two stems 20 px high a word apart: the clear space e = 0.6 h and a stroke width
        // d = 0.1 h between their centre lines, 14 px (ISO 3098-0 type B, from memory).
        let drawn = |text: &str, align| {
            let mut out = PolylineSet::new();
            letter(text, ImagePoint::new(100.0, 50.0), 20.0, align, &mut out);
            out.points().iter().map(|p| p.x).collect::<Vec<f64>>()
        };
        let stems = drawn("I I", Align::Start);
        assert_near(stems[2] - stems[0], 14.0, 1e-9);
        // Centred, "N45" reaches as far left of the anchor as right of it.
        let xs = drawn("N45", Align::Middle);
        let right = xs.iter().copied().fold(f64::MIN, f64::max);
        let left = xs.iter().copied().fold(f64::MAX, f64::min);
        assert_near(right - 100.0, 100.0 - left, 1e-9);
        assert!(right - left > 20.0);
    }
}
