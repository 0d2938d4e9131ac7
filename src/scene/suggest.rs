//! "Did you mean": RON's message for an unknown field or variant name, with the name the
//! author most likely meant when the one written is a near miss.

use ron::error::Error;

/// The RON error's message, with a suggestion when a field or variant name is unknown:
/// "unexpected field `widht` in `Block`; did you mean `width`? (expected one of: ...)".
/// Any other error keeps RON's own message.
pub(crate) fn explain(code: &ron::error::Error) -> String {
    match code {
        // `outer` is the struct as written in the scene (`Block`, `Scene`): worth naming.
        Error::NoSuchStructField {
            expected,
            found,
            outer,
        } => unknown("field", found, outer.as_deref(), expected),
        // Here `outer` is the name of the Rust enum, which the author never writes, so it is
        // left out; the list of what was expected says enough.
        Error::NoSuchEnumVariant {
            expected, found, ..
        } => unknown("variant", found, None, expected),
        Error::MissingStructField { field, outer } => match outer {
            Some(outer) => format!("missing field `{field}` in `{outer}` (it is required)"),
            None => format!("missing field `{field}` (it is required)"),
        },
        Error::DuplicateStructField { field, outer } => match outer {
            Some(outer) => format!("field `{field}` is given twice in `{outer}`; expected it once"),
            None => format!("field `{field}` is given twice; expected it once"),
        },
        // RON's own advice (raise the limit) is for programmers, not for scene authors.
        Error::ExceededRecursionLimit => {
            "brackets are nested too deeply (more than 128 levels); flatten the groups and repeats"
                .to_owned()
        }
        other => other.to_string(),
    }
}

/// "unexpected {what} `found` in `outer`; did you mean `x`? (expected one of: ...)".
fn unknown(what: &str, found: &str, outer: Option<&str>, expected: &[&str]) -> String {
    let mut text = format!("unexpected {what} {}", quoted(found));
    if let Some(outer) = outer {
        text.push_str(&format!(" in {}", quoted(outer)));
    }
    if let Some(best) = closest(found, expected).filter(|&best| best != found) {
        text.push_str(&format!("; did you mean {}?", quoted(best)));
    }
    let names: Vec<String> = expected.iter().map(|name| quoted(name)).collect();
    text.push_str(&match names.as_slice() {
        [] => format!(" (no {what}s are allowed here)"),
        [one] => format!(" (expected {one})"),
        many => format!(" (expected one of: {})", many.join(", ")),
    });
    text
}

/// A name in backquotes, as RON writes names; anything that is not a plain name (it came
/// from the file, so it may hold anything) is shown escaped in double quotes instead.
fn quoted(name: &str) -> String {
    if !name.is_empty() && name.chars().all(|c| c == '_' || c.is_alphanumeric()) {
        format!("`{name}`")
    } else {
        format!("{name:?}")
    }
}

/// Names longer than this are never taken for a typo, which also bounds the work of
/// comparing a pathological name from the file.
const MAX_NAME_CHARS: usize = 64;

/// The closest of `candidates` to `found`, if it is close enough to be a likely typo.
///
/// Names are compared ignoring case; a case-insensitive exact match always wins. Otherwise
/// the distance is the optimal-string-alignment (restricted Damerau-Levenshtein) distance,
/// in characters, so a swapped pair of letters (`widht`, `hieght`) is one edit. A candidate
/// is close enough if its normalized similarity, `1 - distance / longer length`, is at least
/// 0.7; or, for short names where one edit already weighs a lot, if it is one edit away and
/// neither name is a single character (`ta` for `at`, but not `z` for `x`); or two edits
/// away from a name of six or more characters (`hiegth` for `height`). Of several, the
/// nearest wins, and of equally near ones the first.
pub(crate) fn closest<'a>(found: &str, candidates: &[&'a str]) -> Option<&'a str> {
    let lowered = found.to_lowercase();
    let length = |name: &str| name.chars().count();
    if lowered.is_empty() || length(&lowered) > MAX_NAME_CHARS {
        return None;
    }
    if let Some(&same) = candidates
        .iter()
        .find(|candidate| candidate.to_lowercase() == found.to_lowercase())
    {
        return Some(same);
    }
    let mut best: Option<(usize, &'a str)> = None;
    for &candidate in candidates {
        let other = candidate.to_lowercase();
        if other.is_empty() || length(&other) > MAX_NAME_CHARS {
            continue;
        }
        let distance = strsim::osa_distance(&lowered, &other);
        let longer = length(&lowered).max(length(&other));
        let shorter = length(&lowered).min(length(&other));
        let similarity = 1.0 - distance as f64 / longer as f64;
        let close =
            similarity >= 0.7 || (distance == 1 && shorter >= 2) || (distance == 2 && longer >= 6);
        if close && best.is_none_or(|(nearest, _)| distance < nearest) {
            best = Some((distance, candidate));
        }
    }
    best.map(|(_, name)| name)
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde::Deserialize;

    #[allow(dead_code)]
    #[derive(Debug, Deserialize)]
    #[serde(deny_unknown_fields)]
    struct Block {
        label: Option<String>,
        width: f64,
        depth: f64,
        height: f64,
    }

    #[allow(dead_code)]
    #[derive(Debug, Deserialize)]
    enum Item {
        Block(Block),
        Polyline(Vec<(f64, f64)>),
        Model(String),
    }

    #[allow(dead_code)]
    #[derive(Debug, Deserialize)]
    #[serde(rename = "Scene", deny_unknown_fields)]
    struct Scene {
        items: Vec<Item>,
    }

    fn message(text: &str) -> String {
        let options = ron::Options::default().with_default_extension(
            ron::extensions::Extensions::IMPLICIT_SOME
                | ron::extensions::Extensions::UNWRAP_VARIANT_NEWTYPES,
        );
        let err = options
            .from_str::<Scene>(text)
            .expect_err("the text has a mistake");
        explain(&err.code)
    }

    #[test]
    fn a_misspelt_field_gets_a_suggestion() {
        assert_eq!(
            message("Scene(items: [Block(widht: 1, depth: 2, height: 3)])"),
            "unexpected field `widht` in `Block`; did you mean `width`? \
             (expected one of: `label`, `width`, `depth`, `height`)"
        );
        assert_eq!(
            message("Scene(items: [Block(width: 1, depth: 2, hieght: 3)])"),
            "unexpected field `hieght` in `Block`; did you mean `height`? \
             (expected one of: `label`, `width`, `depth`, `height`)"
        );
        assert_eq!(
            message("Scene(itms: [])"),
            "unexpected field `itms` in `Scene`; did you mean `items`? (expected `items`)"
        );
    }

    #[test]
    fn a_misspelt_variant_gets_a_suggestion() {
        assert_eq!(
            message("Scene(items: [Blok(width: 1, depth: 2, height: 3)])"),
            "unexpected variant `Blok`; did you mean `Block`? \
             (expected one of: `Block`, `Polyline`, `Model`)"
        );
        assert_eq!(
            message("Scene(items: [polyline([])])"),
            "unexpected variant `polyline`; did you mean `Polyline`? \
             (expected one of: `Block`, `Polyline`, `Model`)"
        );
    }

    #[test]
    fn a_far_off_name_gets_no_suggestion_but_the_list() {
        assert_eq!(
            message("Scene(items: [Block(colour: 1, width: 1, depth: 2, height: 3)])"),
            "unexpected field `colour` in `Block` \
             (expected one of: `label`, `width`, `depth`, `height`)"
        );
        assert_eq!(
            message("Scene(items: [Sphere(radius: 1)])"),
            "unexpected variant `Sphere` (expected one of: `Block`, `Polyline`, `Model`)"
        );
    }

    #[test]
    fn other_errors_keep_rons_message() {
        for text in [
            "Scene(items: [Block(width: \"wide\", depth: 2, height: 3)])",
            "Scene(items: [",
        ] {
            let err = ron::Options::default()
                .with_default_extension(ron::extensions::Extensions::UNWRAP_VARIANT_NEWTYPES)
                .from_str::<Scene>(text)
                .expect_err("the text has a mistake");
            assert_eq!(explain(&err.code), err.code.to_string(), "{text}");
        }
    }

    #[test]
    fn missing_and_repeated_fields_say_what_was_expected() {
        for (text, expected) in [
            (
                "Scene(items: [Block(depth: 2, height: 3)])",
                "missing field `width` in `Block` (it is required)",
            ),
            (
                "Scene(items: [Block(width: 1, width: 1, depth: 2, height: 3)])",
                "field `width` is given twice in `Block`; expected it once",
            ),
        ] {
            let err = ron::Options::default()
                .with_default_extension(ron::extensions::Extensions::UNWRAP_VARIANT_NEWTYPES)
                .from_str::<Scene>(text)
                .expect_err("the text has a mistake");
            assert_eq!(explain(&err.code), expected, "{text}");
        }
    }

    #[test]
    fn names_that_are_not_plain_are_escaped() {
        let code = Error::NoSuchStructField {
            expected: &[],
            found: "a`b".to_owned(),
            outer: None,
        };
        assert_eq!(
            explain(&code),
            "unexpected field \"a`b\" (no fields are allowed here)"
        );
    }

    #[test]
    fn closest_names() {
        let fields = ["label", "at", "width", "depth", "height", "facing", "base"];
        assert_eq!(closest("widht", &fields), Some("width"));
        assert_eq!(closest("hieght", &fields), Some("height"));
        assert_eq!(closest("hiegth", &fields), Some("height"));
        assert_eq!(closest("hight", &fields), Some("height"));
        assert_eq!(closest("Width", &fields), Some("width"));
        assert_eq!(closest("DEPTH", &fields), Some("depth"));
        assert_eq!(closest("ta", &fields), Some("at"));
        assert_eq!(closest("lable", &fields), Some("label"));
        assert_eq!(closest("facade", &fields), None);
        assert_eq!(closest("colour", &fields), None);
        assert_eq!(closest("", &fields), None);
        assert_eq!(closest("width", &[]), None);
        // A single letter is no evidence of a typo.
        assert_eq!(closest("z", &["x", "y"]), None);
        assert_eq!(closest("X", &["x", "y"]), Some("x"));
        // The nearest wins; of equally near ones, the first.
        assert_eq!(closest("bast", &["best", "base"]), Some("best"));
        assert_eq!(closest("heigh", &["weight", "height"]), Some("height"));
        assert_eq!(closest(&"w".repeat(1000), &["width"]), None);
        assert_eq!(closest("Straße", &["strasse", "straße"]), Some("straße"));
    }
}
