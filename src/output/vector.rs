//! What the vector backends (SVG, PDF) share: the checks on a sheet and the layers' ids.

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
