//! What the vector backends (SVG, PDF) share: the checks on a sheet and the layers' ids.
//!
//! ## Vector outputs (design notes)
//!
//! `output::write_svg(&Sheet, out)` and `output::write_pdf(&[Sheet], out)` write the drawing
//! at its size on paper, for printing at scale and for vector editors. Both draw stroked
//! polylines (text and dashes are already polylines in the drawing) and, for a filled layer,
//! its closed outlines as one path filled by the non-zero rule (`fill-rule="nonzero"`; PDF's
//! `f`, with the layer's opacity as `ca`), with round caps and joins
//! like the raster's capsules; a polyline of one point is a zero-length segment, which round
//! caps paint as a dot in both formats. Neither writes the command line's files yet (the
//! `render` command is wired separately).
//!
//! - **SVG** (1.1): `width`/`height` in `mm` and a `viewBox` of the sheet in mm, so user units
//!   are millimetres and a coordinate read in an editor is a distance on paper. A white
//!   `<rect id="paper">`, then one `<g>` per layer in painting order: `id` made from the layer's
//!   name (lower case, other characters than those of an XML name made `-`, `-2`, `-3` added to
//!   repeats: `wireframe`, `wireframe-lamps`, `hidden`, `grid`), `data-layer` the name as it
//!   is (escaped), and the stroke (`#rrggbb`, `stroke-opacity`, `stroke-width` in mm, round
//!   caps and joins, no fill); each polyline a `<path d="M x y L x y …">`. Numbers have three
//!   decimals at most (0.001 mm; at 150 dpi a pixel is 0.17 mm), trailing zeros trimmed, from
//!   integers, so there is no `-0` or exponent. Written as it goes through a buffer, never as
//!   one string.
//! - **PDF** (1.7, read by any viewer of 1.5 or later): a page per sheet, its MediaBox the
//!   sheet in points (1 pt = 25.4/72 mm), y flipped (PDF's y is up), coordinates to 0.001 pt.
//!   Each layer's opacity is an ExtGState (`CA`) and each layer an optional content group named
//!   as the layer, so viewers and editors that show PDF layers show the drawing's. Content
//!   streams are deflated. The whole file is built in memory first (the writer works that way;
//!   about 20 bytes a vertex before compression; the demo at 1024x512 is 37 KB).
//! - **Reproducible**: no dates, no document ID, nothing random, layers and shared objects in
//!   the order first met: the same sheets give the same bytes (the tests write twice and
//!   compare).
//! - **Opacity** differs from the raster where two polylines of one faint layer overlap: the
//!   raster keeps the darkest ink (`min`), SVG and PDF composite each path over the last, so
//!   grid crossings are a little darker on paper. The seen wireframe is opaque, so it is not
//!   affected.
//! - A sheet whose size or scale is not a positive finite number is refused (SVG: an
//!   `InvalidInput` I/O error; PDF: `Error::Setting`), as is a PDF of no sheets. Pages over
//!   200 inches (5.08 m) a side exceed what ISO 32000-1 Annex C expects readers to support.

use crate::page::Sheet;
use std::collections::BTreeSet;

/// Refuses a sheet whose size or scale is not a positive finite number: its numbers would
/// otherwise reach the file as `NaN` or as a page of no size.
pub(crate) fn check_sheet(sheet: &Sheet) -> Result<(), String> {
    let sizes = [
        ("width", sheet.width_mm),
        ("height", sheet.height_mm),
        ("millimetres per pixel", sheet.mm_per_px),
    ];
    for (what, value) in sizes {
        if !(value.is_finite() && value > 0.0) {
            return Err(format!(
                "the sheet's {what} is {value}, not a positive size"
            ));
        }
    }
    Ok(())
}

/// The id written for the paper under the layers; no layer takes it.
pub(crate) const PAPER_ID: &str = "paper";

/// A readable id for each layer name, unique among them (and not [`PAPER_ID`]): lower case,
/// each run of characters that cannot be in an XML name (or that is a colon, which
/// namespaces reserve) made one `-`, `layer-` put before a name that cannot start an id;
/// a later layer whose id is taken gets `-2`, `-3`, ... So `wireframe: Lamps` is
/// `wireframe-lamps`, and the ids stay the same from one run to the next.
pub(crate) fn layer_ids<'a>(names: impl IntoIterator<Item = &'a str>) -> Vec<String> {
    let mut taken = BTreeSet::from([PAPER_ID.to_owned()]);
    let mut ids = Vec::new();
    for name in names {
        let mut id = String::new();
        for c in name.chars().flat_map(char::to_lowercase) {
            if c != ':' && is_xml_name_char(c) {
                id.push(c);
            } else if !id.ends_with('-') {
                id.push('-');
            }
        }
        let mut id = id.trim_matches('-').to_owned();
        match id.chars().next() {
            None => id = "layer".to_owned(),
            Some(first) if !is_xml_name_start_char(first) => id.insert_str(0, "layer-"),
            Some(_) => {}
        }
        let mut unique = id.clone();
        let mut n = 2;
        while taken.contains(&unique) {
            unique = format!("{id}-{n}");
            n += 1;
        }
        taken.insert(unique.clone());
        ids.push(unique);
    }
    ids
}

/// XML 1.0 (fifth edition) §2.3, production [4] NameStartChar.
fn is_xml_name_start_char(c: char) -> bool {
    matches!(c,
        ':' | 'A'..='Z' | '_' | 'a'..='z'
        | '\u{C0}'..='\u{D6}' | '\u{D8}'..='\u{F6}' | '\u{F8}'..='\u{2FF}'
        | '\u{370}'..='\u{37D}' | '\u{37F}'..='\u{1FFF}' | '\u{200C}'..='\u{200D}'
        | '\u{2070}'..='\u{218F}' | '\u{2C00}'..='\u{2FEF}' | '\u{3001}'..='\u{D7FF}'
        | '\u{F900}'..='\u{FDCF}' | '\u{FDF0}'..='\u{FFFD}' | '\u{10000}'..='\u{EFFFF}')
}

/// XML 1.0 (fifth edition) §2.3, production [4a] NameChar.
fn is_xml_name_char(c: char) -> bool {
    is_xml_name_start_char(c)
        || matches!(c,
            '-' | '.' | '0'..='9' | '\u{B7}' | '\u{300}'..='\u{36F}' | '\u{203F}'..='\u{2040}')
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn layer_ids_are_readable_names_and_unique() {
        let names = [
            "wireframe",
            "wireframe: lamps",
            "hidden",
            "grid",
            "Wireframe: Lamps",
            "wireframe-lamps",
            "",
            "3rd floor",
            "  <façade & roof>  ",
            "paper",
            "a:b",
        ];
        assert_eq!(
            layer_ids(names),
            [
                "wireframe",
                "wireframe-lamps",
                "hidden",
                "grid",
                "wireframe-lamps-2",
                "wireframe-lamps-3",
                "layer",
                "layer-3rd-floor",
                "façade-roof",
                "paper-2",
                "a-b",
            ]
        );
    }

    #[test]
    fn sheets_need_a_positive_size() {
        use crate::drawing::Drawing;
        let sheet = |width_mm: f64, mm_per_px: f64| Sheet {
            drawing: Drawing {
                width: 2,
                height: 1,
                layers: Vec::new(),
            },
            width_mm,
            height_mm: 1.0,
            mm_per_px,
        };
        assert!(check_sheet(&sheet(2.0, 1.0)).is_ok());
        assert!(check_sheet(&sheet(0.0, 1.0)).is_err());
        assert!(check_sheet(&sheet(2.0, f64::INFINITY)).is_err());
        assert!(check_sheet(&sheet(f64::NAN, 1.0)).is_err());
    }
}
