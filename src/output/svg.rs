//! SVG 1.1 pages: the sheet at its true size in millimetres, one group per layer, every
//! polyline a stroked path, for vector editors and for printing at scale.
//!
//! User units are millimetres (`viewBox` = the sheet in mm, `width`/`height` in `mm`), so a
//! coordinate read in an editor is a distance on paper. Coordinates are written with three
//! decimals (0.001 mm, a few thousandths of a pixel at print resolutions), trailing zeros
//! trimmed, from integers so that no value prints as `-0` or in exponent form and the same
//! sheet always gives the same bytes. The document is written as it goes, through a buffer:
//! a drawing of a million vertices never becomes one string.

use super::vector::{check_sheet, layer_ids};
use crate::drawing::{Align, LayerText, HALO};
use crate::page::Sheet;
use std::io::{self, BufWriter, Write};

/// Writes `sheet` as an SVG 1.1 document into `out`.
///
/// Each layer becomes `<g id="…" data-layer="…">` (the id made from the layer's name, unique
/// in the document; `data-layer` the name as it is) carrying the stroke: `#rrggbb` colour,
/// opacity, width in mm, round caps and joins, no fill. A layer that is one label also
/// carries its words, as `data-text` and as a `<title>` (so editors show them). The layers paint in order over a
/// white rectangle the size of the sheet.
pub fn write_svg(sheet: &Sheet, out: impl Write) -> io::Result<()> {
    write_svg_with(sheet, Lettering::Strokes, out)
}

/// How the words of labels are written in an SVG.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum Lettering {
    /// As our single-stroke letters: every output shows the same lines, no font needed.
    #[default]
    Strokes,
    /// As SVG `<text>` elements in the reader's sans-serif font, which a vector editor
    /// can edit as words; their look and width depend on that font, and the halos go.
    Text,
}

/// The em of a sans-serif font is about 1/0.7 of its cap height (common practice; fonts
/// differ by a few hundredths, from memory): the font size that gives a cap height.
pub const EM_PER_CAP: f64 = 1.0 / 0.7;

/// [`write_svg`], with the words of labels written as `lettering` says. With
/// [`Lettering::Text`] each label's group holds a `<text>` element in place of its strokes:
/// at the label's baseline point, `text-anchor` from its alignment, `font-size` its cap
/// height times [`EM_PER_CAP`], filled with the label's ink; the halo layers are left
/// empty (a halo drawn for our letters would not fit the font's).
pub fn write_svg_with(sheet: &Sheet, lettering: Lettering, out: impl Write) -> io::Result<()> {
    check_sheet(sheet).map_err(|message| io::Error::new(io::ErrorKind::InvalidInput, message))?;
    let mut out = BufWriter::new(out);
    let (width, height) = (Mm(sheet.width_mm), Mm(sheet.height_mm));
    writeln!(out, r#"<?xml version="1.0" encoding="UTF-8"?>"#)?;
    writeln!(
        out,
        r#"<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="{width}mm" height="{height}mm" viewBox="0 0 {width} {height}">"#
    )?;
    writeln!(
        out,
        r##"<rect id="paper" width="{width}" height="{height}" fill="#ffffff"/>"##
    )?;
    let ids = layer_ids(sheet.drawing.layers.iter().map(|l| l.name.as_str()));
    let scale = sheet.mm_per_px;
    for (layer, id) in sheet.drawing.layers.iter().zip(&ids) {
        let stroke = &layer.stroke;
        let [r, g, b] = stroke.colour;
        // A stroke thinner than the precision would print as 0, which SVG draws as nothing.
        let stroke_width = Mm((stroke.width_px * scale).max(0.001));
        let opacity = Mm(stroke.opacity.clamp(0.0, 1.0));
        write!(out, r#"<g id="{id}" data-layer=""#)?;
        write_escaped(&mut out, &layer.name)?;
        if let Some(text) = &layer.text {
            out.write_all(br#"" data-text=""#)?;
            write_escaped(&mut out, &text.words)?;
        }
        if layer.filled {
            // The areas as one path, so that where outlines overlap the tone is laid once
            // (SVG 1.1 §11.3, fill-rule nonzero: every outline turns the same way).
            writeln!(
                out,
                r##"" fill="#{r:02x}{g:02x}{b:02x}" fill-opacity="{opacity}" fill-rule="nonzero" stroke="none">"##
            )?;
            out.write_all(br#"<path d=""#)?;
            for ring in layer.lines.iter().filter(|ring| ring.len() >= 3) {
                out.write_all(b"M")?;
                for p in ring {
                    write!(out, " {} {}", Mm(p.x * scale), Mm(p.y * scale))?;
                }
                out.write_all(b" Z ")?;
            }
            writeln!(out, r#""/>"#)?;
            writeln!(out, "</g>")?;
            continue;
        }
        writeln!(
            out,
            r##"" fill="none" stroke="#{r:02x}{g:02x}{b:02x}" stroke-opacity="{opacity}" stroke-width="{stroke_width}" stroke-linecap="round" stroke-linejoin="round">"##
        )?;
        if let Some(text) = &layer.text {
            out.write_all(b"<title>")?;
            write_escaped(&mut out, &text.words)?;
            out.write_all(b"</title>\n")?;
        }
        if lettering == Lettering::Text {
            if let Some(text) = &layer.text {
                write_text(&mut out, text, scale, (r, g, b), &opacity)?;
                writeln!(out, "</g>")?;
                continue;
            }
            if layer.name == HALO {
                writeln!(out, "</g>")?;
                continue;
            }
        }
        for line in layer.lines.iter() {
            let Some((first, rest)) = line.split_first() else {
                continue;
            };
            write!(
                out,
                r#"<path d="M {} {}"#,
                Mm(first.x * scale),
                Mm(first.y * scale)
            )?;
            // A lone point is a zero-length segment: with round caps it is drawn as a dot
            // (SVG 1.1, implementation notes F.5), as the raster draws it.
            let rest = if rest.is_empty() { line } else { rest };
            out.write_all(b" L")?;
            // Each point once: a point that rounds to the one before adds nothing.
            let mut last = (
                Mm(first.x * scale).to_string(),
                Mm(first.y * scale).to_string(),
            );
            let mut wrote = false;
            for p in rest {
                let here = (Mm(p.x * scale).to_string(), Mm(p.y * scale).to_string());
                if here != last || (!wrote && std::ptr::eq(rest, line)) {
                    write!(out, " {} {}", here.0, here.1)?;
                    wrote = true;
                }
                last = here;
            }
            if !wrote {
                // All of it rounds to one point: a dot, as a lone point is.
                write!(out, " {} {}", last.0, last.1)?;
            }
            writeln!(out, r#""/>"#)?;
        }
        writeln!(out, "</g>")?;
    }
    writeln!(out, "</svg>")?;
    out.flush()
}

/// A label's words as an SVG `<text>` element (see [`write_svg_with`]).
fn write_text(
    out: &mut impl Write,
    text: &LayerText,
    scale: f64,
    (r, g, b): (u8, u8, u8),
    opacity: &Mm,
) -> io::Result<()> {
    let anchor = match text.align {
        Align::Start => "start",
        Align::Middle => "middle",
        Align::End => "end",
    };
    write!(
        out,
        r##"<text x="{}" y="{}" font-family="sans-serif" font-size="{}" text-anchor="{anchor}" fill="#{r:02x}{g:02x}{b:02x}" fill-opacity="{opacity}" stroke="none">"##,
        Mm(text.at.x * scale),
        Mm(text.at.y * scale),
        Mm(text.height * EM_PER_CAP * scale)
    )?;
    // Element content: the same escapes as an attribute do no harm.
    write_escaped(out, &text.words)?;
    writeln!(out, "</text>")
}

/// A length in millimetres, shown with three decimals at most (0.001 mm), trailing zeros
/// trimmed: `12`, `12.5`, `0.254`, `-3.001`.
struct Mm(f64);

impl std::fmt::Display for Mm {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        // In thousandths, as an integer: rounding once, and never `-0` or `1e-5`. Coordinates
        // are finite and far below 2^63 thousandths (the sheet is checked, points are
        // inside the image); a non-finite one saturates rather than writing `NaN`.
        let thousandths = (self.0 * 1000.0).round() as i64;
        let sign = if thousandths < 0 { "-" } else { "" };
        let magnitude = thousandths.unsigned_abs();
        let (whole, mut fraction) = (magnitude / 1000, magnitude % 1000);
        write!(f, "{sign}{whole}")?;
        if fraction != 0 {
            let mut digits = 3;
            while fraction % 10 == 0 {
                fraction /= 10;
                digits -= 1;
            }
            write!(f, ".{fraction:0digits$}")?;
        }
        Ok(())
    }
}

/// Writes `text` as the inside of a double-quoted XML attribute: markup characters as
/// entities, white space that attribute normalisation would turn into spaces as character
/// references, and the control characters XML 1.0 forbids (§2.2) as U+FFFD.
fn write_escaped(out: &mut impl Write, text: &str) -> io::Result<()> {
    let mut start = 0;
    for (i, c) in text.char_indices() {
        let replacement = match c {
            '&' => "&amp;",
            '<' => "&lt;",
            '>' => "&gt;",
            '"' => "&quot;",
            '\'' => "&apos;",
            '\t' => "&#9;",
            '\n' => "&#10;",
            '\r' => "&#13;",
            c if (c as u32) < 0x20 || c == '\u{FFFE}' || c == '\u{FFFF}' => "\u{FFFD}",
            _ => continue,
        };
        out.write_all(&text.as_bytes()[start..i])?;
        out.write_all(replacement.as_bytes())?;
        start = i + c.len_utf8();
    }
    out.write_all(&text.as_bytes()[start..])
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::drawing::{Drawing, Layer, Stroke};
    use crate::plane::{ImagePoint, PolylineSet};

    #[test]
    fn millimetres_have_three_decimals_at_most() {
        let shown = |v: f64| Mm(v).to_string();
        assert_eq!(shown(0.0), "0");
        assert_eq!(shown(-0.0), "0");
        assert_eq!(shown(-0.0004), "0");
        assert_eq!(shown(12.0), "12");
        assert_eq!(shown(12.5), "12.5");
        assert_eq!(shown(0.254), "0.254");
        assert_eq!(shown(0.05), "0.05");
        assert_eq!(shown(1.0005), "1.001");
        assert_eq!(shown(-3.0014), "-3.001");
        assert_eq!(shown(1e-9), "0");
        assert_eq!(shown(841.0 * 2.0), "1682");
        assert_eq!(shown(25.4 / 150.0), "0.169");
    }

    #[test]
    fn attributes_are_escaped() {
        let mut out = Vec::new();
        write_escaped(&mut out, "a<b> & \"c\" 'd'\n\u{1}é").unwrap();
        assert_eq!(
            String::from_utf8(out).unwrap(),
            "a&lt;b&gt; &amp; &quot;c&quot; &apos;d&apos;&#10;\u{FFFD}é"
        );
    }

    fn sheet() -> Sheet {
        let mut lines = PolylineSet::new();
        lines.push(&[ImagePoint::new(10.0, 20.0), ImagePoint::new(30.5, 40.25)]);
        lines.push(&[ImagePoint::new(5.0, 5.0)]);
        let layer = |name: &str, lines: PolylineSet| Layer {
            filled: false,
            text: None,
            name: name.to_owned(),
            stroke: Stroke {
                colour: [255, 0, 16],
                opacity: 0.4,
                width_px: 1.5,
            },
            lines,
        };
        let drawing = Drawing {
            width: 100,
            height: 50,
            layers: vec![
                layer("wireframe: A&B", lines),
                layer("wireframe", PolylineSet::new()),
            ],
        };
        Sheet {
            drawing,
            width_mm: 200.0,
            height_mm: 100.0,
            mm_per_px: 2.0,
        }
    }

    #[test]
    fn writes_the_sheet_in_millimetres() {
        let mut out = Vec::new();
        write_svg(&sheet(), &mut out).unwrap();
        let text = String::from_utf8(out).unwrap();
        assert!(text.contains(r#"width="200mm" height="100mm" viewBox="0 0 200 100""#));
        assert!(text.contains(r##"<g id="wireframe-a-b" data-layer="wireframe: A&amp;B" fill="none" stroke="#ff0010" stroke-opacity="0.4" stroke-width="3""##));
        assert!(text.contains(r#"<path d="M 20 40 L 61 80.5"/>"#));
        assert!(text.contains(r#"<path d="M 10 10 L 10 10"/>"#));
        assert!(text.contains(r#"<g id="wireframe" data-layer="wireframe""#));
        assert!(text.trim_end().ends_with("</svg>"));
        let mut again = Vec::new();
        write_svg(&sheet(), &mut again).unwrap();
        assert_eq!(
            text.as_bytes(),
            again,
            "the same sheet gives the same bytes"
        );
    }

    #[test]
    fn refuses_a_sheet_of_no_size() {
        let mut bad = sheet();
        bad.mm_per_px = f64::NAN;
        let err = write_svg(&bad, Vec::new()).unwrap_err();
        assert_eq!(err.kind(), io::ErrorKind::InvalidInput);
    }
}
