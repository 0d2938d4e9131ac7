//! Lettering: text drawn as strokes, so that it is the same lines in every output (a PNG, an
//! SVG, a PDF) and needs no font file.
//!
//! The letters are our own single-stroke capitals and figures on a grid 4 units wide and 6
//! high (the cap height), in the manner of technical lettering, which is written in capitals
//! (common practice; ISO 3098 shows the style). Small letters are drawn as small capitals;
//! zero is slashed so it cannot be read as the letter O. A character without a glyph is drawn
//! as a question mark.

use crate::plane::{ImagePoint, PolylineSet};

/// Where a line of text stands relative to its anchor point, which is on its baseline.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Align {
    Start,
    Middle,
    End,
}

/// Grid units from one letter's origin to the next's.
const ADVANCE: f64 = 6.0;
/// Grid units of the cap height.
const CAP: f64 = 6.0;
/// The size of a small letter's small capital, relative to a capital.
const SMALL: f64 = 0.78;

/// The strokes of a glyph: polylines separated by `;`, points as `x,y` separated by
/// spaces, on the 4 x 6 grid with y up from the baseline.
fn glyph(c: char) -> Option<&'static str> {
    Some(match c {
        'A' => "0,0 2,6 4,0;0.7,2 3.3,2",
        'B' => "0,0 0,6 3,6 4,5 4,4 3,3 0,3;3,3 4,2 4,1 3,0 0,0",
        'C' => "4,5 3,6 1,6 0,5 0,1 1,0 3,0 4,1",
        'D' => "0,0 0,6 2.5,6 4,4.5 4,1.5 2.5,0 0,0",
        'E' => "4,6 0,6 0,0 4,0;0,3 3,3",
        'F' => "4,6 0,6 0,0;0,3 3,3",
        'G' => "4,5 3,6 1,6 0,5 0,1 1,0 3,0 4,1 4,3 2.5,3",
        'H' => "0,0 0,6;4,0 4,6;0,3 4,3",
        'I' => "1,6 3,6;2,6 2,0;1,0 3,0",
        'J' => "4,6 4,1 3,0 1,0 0,1",
        'K' => "0,0 0,6;4,6 0,2;1.3,3.3 4,0",
        'L' => "0,6 0,0 4,0",
        'M' => "0,0 0,6 2,3 4,6 4,0",
        'N' => "0,0 0,6 4,0 4,6",
        'O' => "1,0 0,1 0,5 1,6 3,6 4,5 4,1 3,0 1,0",
        'P' => "0,0 0,6 3,6 4,5 4,4 3,3 0,3",
        'Q' => "1,0 0,1 0,5 1,6 3,6 4,5 4,1 3,0 1,0;2.5,1.5 4,0",
        'R' => "0,0 0,6 3,6 4,5 4,4 3,3 0,3;2,3 4,0",
        'S' => "4,5 3,6 1,6 0,5 0,4 1,3 3,3 4,2 4,1 3,0 1,0 0,1",
        'T' => "0,6 4,6;2,6 2,0",
        'U' => "0,6 0,1 1,0 3,0 4,1 4,6",
        'V' => "0,6 2,0 4,6",
        'W' => "0,6 1,0 2,4 3,0 4,6",
        'X' => "0,0 4,6;0,6 4,0",
        'Y' => "0,6 2,3 4,6;2,3 2,0",
        'Z' => "0,6 4,6 0,0 4,0",
        '0' => "1,0 0,1 0,5 1,6 3,6 4,5 4,1 3,0 1,0;0.6,1 3.4,5",
        '1' => "1,5 2,6 2,0;1,0 3,0",
        '2' => "0,5 1,6 3,6 4,5 4,4 0,0 4,0",
        '3' => "0,5 1,6 3,6 4,5 4,4 3,3 2,3;3,3 4,2 4,1 3,0 1,0 0,1",
        '4' => "3,0 3,6 0,2 4,2",
        '5' => "4,6 0,6 0,3.5 3,3.5 4,2.5 4,1 3,0 1,0 0,1",
        '6' => "4,5 3,6 1,6 0,5 0,1 1,0 3,0 4,1 4,2 3,3 0,3",
        '7' => "0,6 4,6 1.5,0",
        '8' => "1,3 0,4 0,5 1,6 3,6 4,5 4,4 3,3 1,3 0,2 0,1 1,0 3,0 4,1 4,2 3,3",
        '9' => "0,1 1,0 3,0 4,1 4,5 3,6 1,6 0,5 0,4 1,3 4,3",
        '.' => "1.8,0 2.2,0 2.2,0.4 1.8,0.4 1.8,0",
        ',' => "2.2,0.4 2.2,0 1.6,-1",
        ':' => "1.8,1 2.2,1 2.2,1.4 1.8,1.4 1.8,1;1.8,4 2.2,4 2.2,4.4 1.8,4.4 1.8,4",
        ';' => "1.8,4 2.2,4 2.2,4.4 1.8,4.4 1.8,4;2.2,1.4 2.2,1 1.6,0",
        '-' | '\u{2212}' | '\u{2013}' => "0.5,3 3.5,3",
        '+' => "0.5,3 3.5,3;2,1.5 2,4.5",
        '=' => "0.5,2 3.5,2;0.5,4 3.5,4",
        '/' => "0,0 4,6",
        '(' => "2.5,6 1.5,5 1.5,1 2.5,0",
        ')' => "1.5,6 2.5,5 2.5,1 1.5,0",
        '[' => "2.5,6 1.5,6 1.5,0 2.5,0",
        ']' => "1.5,6 2.5,6 2.5,0 1.5,0",
        '\'' | '\u{2019}' => "2,6 2,4.5",
        '"' => "1.3,6 1.3,4.5;2.7,6 2.7,4.5",
        '\u{b0}' => "1.5,6 2.2,5.7 2.5,5 2.2,4.3 1.5,4 0.8,4.3 0.5,5 0.8,5.7 1.5,6",
        '_' => "0,-0.5 4,-0.5",
        '*' => "2,1.5 2,4.5;0.7,2.2 3.3,3.8;0.7,3.8 3.3,2.2",
        '!' => "2,6 2,1.8;2,0.4 2,0",
        '?' => "0,5 1,6 3,6 4,5 4,4 2,3 2,1.8;2,0.4 2,0",
        '#' => "1.3,0 1.3,6;2.7,0 2.7,6;0,2 4,2;0,4 4,4",
        '%' => "0,0 4,6;0.5,6 1,5.5 0.5,5 0,5.5 0.5,6;3.5,1 4,0.5 3.5,0 3,0.5 3.5,1",
        '&' => "4,0 0.5,4.5 0.5,5.5 1.2,6 2,6 2.7,5.5 2.7,4.7 0,2 0,1 1,0 2.5,0 4,2",
        '<' => "4,5 0,3 4,1",
        '>' => "0,5 4,3 0,1",
        '|' => "2,-1 2,7",
        '\u{d7}' => "0.7,1.3 3.3,3.9;0.7,3.9 3.3,1.3",
        _ => return None,
    })
}

/// The strokes of a character, and the scale of its small capital (1 for capitals).
fn strokes(c: char) -> (&'static str, f64) {
    if let Some(strokes) = glyph(c) {
        return (strokes, 1.0);
    }
    let upper = c.to_uppercase().next().unwrap_or(c);
    match glyph(upper) {
        Some(strokes) if c.is_lowercase() => (strokes, SMALL),
        Some(strokes) => (strokes, 1.0),
        None => (glyph('?').unwrap_or(""), 1.0),
    }
}

/// The width of a line of text `height` pixels high (cap height), in pixels: from the
/// first letter's left edge to the last one's right edge.
pub fn text_width(text: &str, height: f64) -> f64 {
    let count = text.chars().count();
    if count == 0 {
        0.0
    } else {
        (ADVANCE * count as f64 - (ADVANCE - 4.0)) * height / CAP
    }
}

/// Appends the strokes of a line of text whose cap height is `height` pixels, its
/// baseline through `at`, aligned to `at` as `align` says.
pub fn letter(text: &str, at: ImagePoint, height: f64, align: Align, out: &mut PolylineSet) {
    let scale = height / CAP;
    let width = text_width(text, height);
    let left = match align {
        Align::Start => at.x,
        Align::Middle => at.x - width / 2.0,
        Align::End => at.x - width,
    };
    let mut points: Vec<ImagePoint> = Vec::new();
    for (index, c) in text.chars().enumerate() {
        if c.is_whitespace() {
            continue;
        }
        let (strokes, size) = strokes(c);
        // Small capitals stand on the baseline, centred in the letter's cell.
        let origin_x = left + (ADVANCE * index as f64 + 2.0 * (1.0 - size)) * scale;
        for stroke in strokes.split(';') {
            points.clear();
            for pair in stroke.split_whitespace() {
                let mut xy = pair.split(',').filter_map(|n| n.parse::<f64>().ok());
                if let (Some(x), Some(y)) = (xy.next(), xy.next()) {
                    points.push(ImagePoint::new(
                        origin_x + x * size * scale,
                        at.y - y * size * scale,
                    ));
                }
            }
            if points.len() >= 2 {
                out.push(&points);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_printable_ascii_character_draws_something() {
        for c in (33u8..127).map(char::from) {
            let mut out = PolylineSet::new();
            letter(
                &c.to_string(),
                ImagePoint::new(0.0, 0.0),
                12.0,
                Align::Start,
                &mut out,
            );
            assert!(!out.is_empty(), "{c:?}");
        }
    }

    #[test]
    fn glyph_strokes_parse_and_stay_in_their_cell() {
        let chars = "ABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789.,:;-+=/()[]'\"\u{b0}_*!?#%&<>|\u{d7}";
        for c in chars.chars() {
            let strokes = glyph(c).unwrap();
            for stroke in strokes.split(';') {
                let points: Vec<(f64, f64)> = stroke
                    .split_whitespace()
                    .map(|p| {
                        let (x, y) = p.split_once(',').unwrap();
                        (x.parse().unwrap(), y.parse().unwrap())
                    })
                    .collect();
                assert!(points.len() >= 2, "{c:?}: {stroke}");
                for (x, y) in points {
                    assert!(
                        (0.0..=4.0).contains(&x) && (-1.0..=7.0).contains(&y),
                        "{c:?}"
                    );
                }
            }
        }
    }

    #[test]
    fn alignment_and_width() {
        // Three letters 12 px high: 3 cells of 6 units less the last gap of 2, at 2 px a unit.
        assert_eq!(text_width("N45", 12.0), 32.0);
        let mut out = PolylineSet::new();
        letter(
            "I",
            ImagePoint::new(100.0, 50.0),
            12.0,
            Align::Middle,
            &mut out,
        );
        // The stem of the I runs down the middle, from the cap line to the baseline.
        let stem = out.iter().nth(1).unwrap();
        assert_eq!(
            stem,
            &[ImagePoint::new(100.0, 38.0), ImagePoint::new(100.0, 50.0)]
        );
    }

    #[test]
    fn small_letters_are_small_capitals() {
        let (capital, _) = strokes('A');
        let (small, size) = strokes('a');
        assert_eq!(capital, small);
        assert_eq!(size, SMALL);
    }
}
