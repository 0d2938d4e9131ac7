//! "Keep this standpoint": a new entry written into the scene text, and nothing else.
//!
//! The file is a person's work, with their comments and their layout, so it is not parsed
//! and printed again: the text is scanned (comments, strings and brackets understood) for
//! the scene's `standpoints: [...]` list, and the new entry is inserted after its last
//! element, on a line of its own indented like that element (or inline when the list is
//! written on one line). Every byte of the old text stays, in order; the only other byte
//! that may be added is the comma that separates the new entry when the last one had none.

use crate::error::{Error, Result};
use crate::scene::{parse_scene, scene_unit_metres, Location, Standpoint};
use std::path::Path;

/// The longest name a kept standpoint may have, characters.
pub const MAX_NAME_CHARS: usize = 80;

/// The new entry in the scene's own unit: `(name: "...", x: .., y: .., ...)`. Lengths are
/// written to the millimetre (in metres) and angles to a hundredth of a degree.
pub fn standpoint_entry(standpoint: &Standpoint, metres_per_unit: f64) -> Result<String> {
    let name = &standpoint.name;
    if name.trim().is_empty() || name.chars().count() > MAX_NAME_CHARS {
        return Err(Error::Setting(format!(
            "a standpoint's name has 1 to {MAX_NAME_CHARS} characters"
        )));
    }
    if name.chars().any(char::is_control) {
        return Err(Error::Setting(
            "a standpoint's name cannot hold line breaks or other control characters".into(),
        ));
    }
    let quoted: String = name
        .chars()
        .flat_map(|c| match c {
            '"' | '\\' => vec!['\\', c],
            _ => vec![c],
        })
        .collect();
    let length = |metres: f64| number(metres / metres_per_unit, 3);
    let angle = |radians: f64| number(radians.to_degrees(), 2);
    let mut entry = format!(
        "(name: \"{quoted}\", x: {}, y: {}",
        length(standpoint.x),
        length(standpoint.y)
    );
    // Its own ground only: one found under it is found again when the scene is read, and
    // follows the scene's ground if that is edited.
    if standpoint.own_ground {
        entry += &format!(", ground: {}", length(standpoint.ground));
    }
    entry += &format!(
        ", eye_height: {}, heading: {}",
        length(standpoint.eye_height),
        angle(standpoint.heading.rem_euclid(std::f64::consts::TAU))
    );
    if standpoint.pitch != 0.0 {
        entry += &format!(", pitch: {}", angle(standpoint.pitch));
    }
    entry.push(')');
    Ok(entry)
}

/// `value` rounded to `decimals` places, without trailing zeros (`1.5`, `-4`, `0.125`).
fn number(value: f64, decimals: usize) -> String {
    let text = format!("{value:.decimals$}");
    let text = if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.').to_owned()
    } else {
        text
    };
    if text == "-0" {
        "0".to_owned()
    } else {
        text
    }
}

/// The scene text with `entry` added to its standpoints; the result is read back to make
/// sure it holds one standpoint more, named as asked.
pub fn keep_in_scene(text: &str, path: &Path, standpoint: &Standpoint) -> Result<String> {
    let metres_per_unit = scene_unit_metres(text.as_bytes(), path)?;
    let entry = standpoint_entry(standpoint, metres_per_unit)?;
    let before = parse_scene(text.as_bytes(), path, "scene")?;
    if before.standpoints.iter().any(|s| s.name == standpoint.name) {
        return Err(Error::Setting(format!(
            "the scene already has a standpoint named \"{}\": choose another name",
            standpoint.name
        )));
    }
    let inserted = insert_standpoint(text, &entry).map_err(|message| Error::Scene {
        path: path.to_owned(),
        line: 1,
        column: 1,
        message,
    })?;
    let after = parse_scene(inserted.as_bytes(), path, "scene")?;
    let added = after.standpoints.len() == before.standpoints.len() + 1
        && after.standpoints.iter().any(|s| s.name == standpoint.name);
    if !added {
        return Err(Error::Setting(format!(
            "could not find where the standpoints of {} are listed",
            path.display()
        )));
    }
    Ok(inserted)
}

/// A small new scene beside a model or data file given directly: the kept standpoint,
/// `model_item` (the item that places the model, e.g. `Model(file: "hall.obj")`) and, for
/// open data, the `location` (latitude, longitude) of the plan's origin.
pub fn new_scene_for_model(
    model_name: &str,
    model_item: &str,
    location: Option<&Location>,
    entry: &str,
) -> String {
    let location = location.map_or(String::new(), location_block);
    format!(
        "// Standpoints kept for {model_name}; the model file itself is not changed.\n\
         Scene(\n{location}    standpoints: [\n        {entry},\n    ],\n    items: [\n        {model_item},\n    ],\n)\n"
    )
}

/// A scene's `location` block for `location`: its latitude and longitude, and its height,
/// the bearing of true north and the time zone where they say something.
fn location_block(location: &Location) -> String {
    let mut fields = vec![
        format!("latitude: {:?}", location.latitude_deg),
        format!("longitude: {:?}", location.longitude_deg),
    ];
    if location.height_m != 0.0 {
        fields.push(format!("height: {:?}", location.height_m));
    }
    if location.north_deg != 0.0 {
        fields.push(format!("north: {:?}", location.north_deg));
    }
    if let Some(zone) = &location.time_zone {
        fields.push(format!("time_zone: {zone:?}"));
    }
    format!("    location: ({}),\n", fields.join(", "))
}

/// A token of the scene text that matters for its structure.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Token {
    Open(u8),
    Close(u8),
    Comma,
    Colon,
    /// An identifier or number, `start..end`.
    Word(usize, usize),
    /// A string literal.
    Text,
}

/// The structural tokens of RON text with their byte offsets: comments (`//`, nested
/// `/* */`) and the inside of strings (plain and raw) are skipped.
fn tokens(text: &str) -> std::result::Result<Vec<(usize, Token)>, String> {
    let bytes = text.as_bytes();
    let mut out = Vec::new();
    let mut i = 0;
    while i < bytes.len() {
        let c = bytes[i];
        match c {
            b'/' if bytes.get(i + 1) == Some(&b'/') => {
                while i < bytes.len() && bytes[i] != b'\n' {
                    i += 1;
                }
                continue;
            }
            b'/' if bytes.get(i + 1) == Some(&b'*') => {
                let mut depth = 0;
                loop {
                    if i + 1 >= bytes.len() {
                        return Err("a block comment is not closed".into());
                    }
                    if bytes[i] == b'/' && bytes[i + 1] == b'*' {
                        depth += 1;
                        i += 2;
                    } else if bytes[i] == b'*' && bytes[i + 1] == b'/' {
                        depth -= 1;
                        i += 2;
                        if depth == 0 {
                            break;
                        }
                    } else {
                        i += 1;
                    }
                }
                continue;
            }
            b'"' => {
                out.push((i, Token::Text));
                i += 1;
                while i < bytes.len() && bytes[i] != b'"' {
                    i += if bytes[i] == b'\\' { 2 } else { 1 };
                }
                if i >= bytes.len() {
                    return Err("a string is not closed".into());
                }
            }
            b'r' if matches!(bytes.get(i + 1), Some(b'"' | b'#')) => {
                let hashes = bytes[i + 1..].iter().take_while(|&&b| b == b'#').count();
                if bytes.get(i + 1 + hashes) == Some(&b'"') {
                    out.push((i, Token::Text));
                    let close: Vec<u8> = std::iter::once(b'"')
                        .chain(std::iter::repeat_n(b'#', hashes))
                        .collect();
                    let from = i + 2 + hashes;
                    let Some(at) = bytes[from..].windows(close.len()).position(|w| w == close)
                    else {
                        return Err("a raw string is not closed".into());
                    };
                    i = from + at + close.len();
                    continue;
                }
                let end = word_end(bytes, i);
                out.push((i, Token::Word(i, end)));
                i = end;
                continue;
            }
            b'\'' => {
                out.push((i, Token::Text));
                i += 1;
                while i < bytes.len() && bytes[i] != b'\'' {
                    i += if bytes[i] == b'\\' { 2 } else { 1 };
                }
            }
            b'(' | b'[' | b'{' => out.push((i, Token::Open(c))),
            b')' | b']' | b'}' => out.push((i, Token::Close(c))),
            b',' => out.push((i, Token::Comma)),
            b':' => out.push((i, Token::Colon)),
            _ if c.is_ascii_whitespace() => {}
            _ => {
                let end = word_end(bytes, i);
                out.push((i, Token::Word(i, end)));
                i = end;
                continue;
            }
        }
        i += 1;
    }
    Ok(out)
}

fn word_end(bytes: &[u8], start: usize) -> usize {
    let mut end = start + 1;
    while end < bytes.len()
        && (bytes[end].is_ascii_alphanumeric() || matches!(bytes[end], b'_' | b'.' | b'-' | b'+'))
    {
        end += 1;
    }
    end
}

/// `text` with `entry` inserted into the scene's `standpoints` list (a list is added after
/// the scene's opening bracket when there is none). Only insertions: every byte of `text`
/// is kept, in order.
pub fn insert_standpoint(text: &str, entry: &str) -> std::result::Result<String, String> {
    let tokens = tokens(text)?;
    // The scene's own bracket: the first opening one.
    let Some(scene_open) = tokens
        .iter()
        .position(|(_, t)| matches!(t, Token::Open(b'(')))
    else {
        return Err("expected a scene: Scene(...)".into());
    };
    let mut depth = 0usize;
    let mut list_open = None;
    let mut first_field = None;
    for k in scene_open..tokens.len() {
        match tokens[k].1 {
            Token::Open(_) => depth += 1,
            Token::Close(_) => {
                depth -= 1;
                if depth == 0 {
                    break;
                }
            }
            Token::Word(a, b) if depth == 1 => {
                first_field.get_or_insert(k);
                if &text[a..b] == "standpoints"
                    && tokens.get(k + 1).map(|t| t.1) == Some(Token::Colon)
                    && tokens.get(k + 2).map(|t| t.1) == Some(Token::Open(b'['))
                {
                    list_open = Some(k + 2);
                }
            }
            _ => {}
        }
    }
    let Some(open) = list_open else {
        // No list yet: one before the first field, indented like it.
        let Some(field) = first_field else {
            return Err("expected the scene's fields after Scene(".into());
        };
        let at = tokens[field].0;
        let indent = indent_of(text, at);
        return Ok(splice(
            text,
            &[(
                at,
                format!("standpoints: [\n{indent}    {entry},\n{indent}],\n{indent}"),
            )],
        ));
    };
    // The matching close and the last token inside the list.
    let mut depth = 0usize;
    let mut close = None;
    for (k, (_, token)) in tokens.iter().enumerate().skip(open) {
        match token {
            Token::Open(_) => depth += 1,
            Token::Close(_) => {
                depth -= 1;
                if depth == 0 {
                    close = Some(k);
                    break;
                }
            }
            _ => {}
        }
    }
    let close = close.ok_or("the standpoints list is not closed")?;
    if close == open + 1 {
        // An empty list: the entry alone, inline.
        return Ok(splice(text, &[(tokens[open].0 + 1, entry.to_owned())]));
    }
    let last = close - 1;
    let (last_at, last_token) = tokens[last];
    let has_comma = last_token == Token::Comma;
    let last_end = match last_token {
        Token::Comma | Token::Close(_) => last_at + 1,
        Token::Word(_, end) => end,
        _ => last_at + 1,
    };
    let open_at = tokens[open].0;
    let inline = !text[open_at..last_end].contains('\n');
    if inline {
        let insert = if has_comma {
            format!(" {entry}")
        } else {
            format!(", {entry}")
        };
        return Ok(splice(text, &[(last_end, insert)]));
    }
    // On a line of its own after the last element's line (and any comment ending it),
    // indented like the line where the last element starts.
    let element_start = element_start(&tokens, open, last);
    let indent = indent_of(text, tokens[element_start].0);
    let line_end = text[last_end..]
        .find('\n')
        .map_or(text.len(), |n| last_end + n);
    let mut inserts = Vec::new();
    if !has_comma {
        inserts.push((last_end, ",".to_owned()));
    }
    inserts.push((line_end, format!("\n{indent}{entry},")));
    Ok(splice(text, &inserts))
}

/// The first token of the list element that ends at token `last`.
fn element_start(tokens: &[(usize, Token)], open: usize, last: usize) -> usize {
    let mut depth = 0i32;
    let mut k = if tokens[last].1 == Token::Comma {
        last - 1
    } else {
        last
    };
    while k > open {
        match tokens[k].1 {
            Token::Close(_) => depth += 1,
            Token::Open(_) => depth -= 1,
            Token::Comma if depth == 0 => return k + 1,
            _ => {}
        }
        k -= 1;
    }
    open + 1
}

/// The run of spaces and tabs that starts the line holding byte `at`.
fn indent_of(text: &str, at: usize) -> &str {
    let line_start = text[..at].rfind('\n').map_or(0, |n| n + 1);
    let line = &text[line_start..];
    let width = line
        .bytes()
        .take_while(|b| *b == b' ' || *b == b'\t')
        .count();
    &line[..width]
}

/// `text` with each `(offset, insertion)` inserted (offsets into the original, ascending).
fn splice(text: &str, inserts: &[(usize, String)]) -> String {
    let mut out = String::with_capacity(text.len() + 256);
    let mut from = 0;
    for (at, insertion) in inserts {
        out.push_str(&text[from..*at]);
        out.push_str(insertion);
        from = *at;
    }
    out.push_str(&text[from..]);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The old text is the new text with the inserted bytes taken out: true when `old` is
    /// a subsequence of `new` and `new` is only `extra` bytes longer.
    fn only_inserted(old: &str, new: &str, extra: usize) -> bool {
        let mut rest = new.bytes();
        old.bytes().all(|b| rest.any(|n| n == b)) && new.len() == old.len() + extra
    }

    #[test]
    fn a_new_line_after_the_last_entry_and_its_comment() {
        let old = "// top\nScene(\n    standpoints: [\n        // one\n        (name: \"a\", x: 1, y: 2), // end\n    ],\n    items: [],\n)\n";
        let new = insert_standpoint(old, "(name: \"b\", x: 0, y: 0)").unwrap();
        assert_eq!(
            new,
            "// top\nScene(\n    standpoints: [\n        // one\n        (name: \"a\", x: 1, y: 2), // end\n        (name: \"b\", x: 0, y: 0),\n    ],\n    items: [],\n)\n"
        );
    }

    #[test]
    fn a_comma_is_added_when_the_last_entry_has_none() {
        let old = "Scene(\n  standpoints: [\n    Standpoint(name: \"a\", x: 1, y: 2)\n  ],\n  items: [],\n)";
        let entry = "(name: \"b\", x: 0, y: 0)";
        let new = insert_standpoint(old, entry).unwrap();
        assert!(
            only_inserted(old, &new, 1 + 1 + 4 + entry.len() + 1),
            "{new}"
        );
        assert!(
            new.contains(
                "    Standpoint(name: \"a\", x: 1, y: 2),\n    (name: \"b\", x: 0, y: 0),\n  ]"
            ),
            "{new}"
        );
    }

    #[test]
    fn inline_and_empty_lists_stay_inline() {
        let new = insert_standpoint(
            "Scene(standpoints: [(name: \"a\", x: 1, y: 2)], items: [])",
            "(B)",
        )
        .unwrap();
        assert_eq!(
            new,
            "Scene(standpoints: [(name: \"a\", x: 1, y: 2), (B)], items: [])"
        );
        let new = insert_standpoint("Scene(standpoints: [], items: [])", "(B)").unwrap();
        assert_eq!(new, "Scene(standpoints: [(B)], items: [])");
    }

    #[test]
    fn a_list_is_added_when_there_is_none() {
        let old = "Scene(\n    name: \"x\", // the name\n    items: [],\n)\n";
        let new = insert_standpoint(old, "(B)").unwrap();
        assert_eq!(
            new,
            "Scene(\n    standpoints: [\n        (B),\n    ],\n    name: \"x\", // the name\n    items: [],\n)\n"
        );
    }

    #[test]
    fn brackets_in_comments_and_strings_are_not_structure() {
        let old = "Scene(\n    /* standpoints: [ /* nested ] */ ( */\n    name: \"standpoints: [\",\n    standpoints: [\n        (name: \"a ] (\", x: 1, y: 2),\n    ],\n    items: [Block(label: r#\"]\"#, at: Centre(0, 0), width: 1, depth: 1, height: 1)],\n)";
        let new = insert_standpoint(old, "(B)").unwrap();
        assert!(
            new.contains("(name: \"a ] (\", x: 1, y: 2),\n        (B),\n    ],"),
            "{new}"
        );
    }

    #[test]
    fn the_demo_keeps_every_byte_and_reads_back() {
        let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron");
        let old = std::fs::read_to_string(&path).unwrap();
        let standpoint =
            Standpoint::from_degrees("by \"the\" well", 3.25, -6.5, 1.6, 45.0, 5.0, 0.0);
        let new = keep_in_scene(&old, &path, &standpoint).unwrap();
        let entry = standpoint_entry(&standpoint, 1.0).unwrap();
        assert_eq!(entry, "(name: \"by \\\"the\\\" well\", x: 3.25, y: -6.5, eye_height: 1.6, heading: 45, pitch: 5)");
        assert!(
            only_inserted(&old, &new, entry.len() + 10),
            "{}",
            new.len() - old.len()
        );
        let site = parse_scene(new.as_bytes(), &path, "x").unwrap();
        let kept = site.standpoints.last().unwrap();
        assert_eq!(kept.name, "by \"the\" well");
        assert!((kept.x - 3.25).abs() < 1e-9 && (kept.heading - 45f64.to_radians()).abs() < 1e-9);
        // A second keep of the same name is refused.
        assert!(keep_in_scene(&new, &path, &standpoint).is_err());
    }

    #[test]
    fn positions_are_written_in_the_scene_unit() {
        let old = "Scene(unit: Foot, standpoints: [], items: [])";
        let standpoint = Standpoint::from_degrees("a", 3.048, 0.0, 1.524, 0.0, 0.0, 0.0);
        let new = keep_in_scene(old, Path::new("f.ron"), &standpoint).unwrap();
        assert!(new.contains("x: 10, y: 0, eye_height: 5,"), "{new}");
    }

    #[test]
    fn names_that_cannot_be_written_are_refused() {
        let mut s = Standpoint::from_degrees("", 0.0, 0.0, 1.6, 0.0, 0.0, 0.0);
        assert!(standpoint_entry(&s, 1.0).is_err());
        s.name = "two\nlines".into();
        assert!(standpoint_entry(&s, 1.0).is_err());
        s.name = "x".repeat(81);
        assert!(standpoint_entry(&s, 1.0).is_err());
    }

    #[test]
    fn numbers_are_short() {
        assert_eq!(number(1.5, 3), "1.5");
        assert_eq!(number(-4.0, 3), "-4");
        assert_eq!(number(-0.0001, 3), "0");
        assert_eq!(number(359.996, 2), "360");
    }
}
