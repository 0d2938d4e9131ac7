//! The page's requests as checked values: every parameter is a number or a word from a
//! short list, in a stated range; anything else is refused with a message naming the
//! parameter (the server answers 400). No parameter ever names a file.

use crate::scene::{HiddenEdges, Standpoint};
use std::collections::HashMap;

/// The farthest a standpoint may be from the site's origin, metres.
pub const MAX_POSITION_M: f64 = 1.0e6;
/// The highest eye above its ground, and ground above or below zero, metres.
pub const MAX_EYE_HEIGHT_M: f64 = 1000.0;
pub const MAX_GROUND_M: f64 = 10_000.0;
/// The largest image a pane may ask for, pixels a side (an underlay twice as wide as high).
pub const MAX_PANE_WIDTH: u32 = 4096;
pub const MAX_PANE_HEIGHT: u32 = 2048;
pub const MIN_PANE_SIDE: u32 = 16;
/// The longest pane key (the page's name for one of its panes), characters.
pub const MAX_KEY_CHARS: usize = 32;

/// A request's query string as names and raw values; a name given twice is refused.
pub fn query(url: &str) -> Result<HashMap<String, String>, String> {
    let Some((_, query)) = url.split_once('?') else {
        return Ok(HashMap::new());
    };
    let mut out = HashMap::new();
    for pair in query.split('&').filter(|p| !p.is_empty()) {
        let (name, value) = pair.split_once('=').unwrap_or((pair, ""));
        let (name, value) = (decode(name)?, decode(value)?);
        if out.insert(name.clone(), value).is_some() {
            return Err(format!("parameter '{name}' is given twice"));
        }
    }
    Ok(out)
}

/// Percent-decoding (`+` is a space), to UTF-8.
fn decode(text: &str) -> Result<String, String> {
    let bytes = text.as_bytes();
    let mut out = Vec::with_capacity(bytes.len());
    let mut i = 0;
    while i < bytes.len() {
        match bytes[i] {
            b'%' => {
                let hex = text
                    .get(i + 1..i + 3)
                    .and_then(|h| u8::from_str_radix(h, 16).ok())
                    .ok_or("a '%' in the query is not followed by two hex digits")?;
                out.push(hex);
                i += 3;
            }
            b'+' => {
                out.push(b' ');
                i += 1;
            }
            b => {
                out.push(b);
                i += 1;
            }
        }
    }
    String::from_utf8(out).map_err(|_| "the query is not UTF-8".to_owned())
}

/// Reads parameters by name, checking each, and refuses names it was not asked about.
pub struct Params {
    values: HashMap<String, String>,
    used: Vec<&'static str>,
}

impl Params {
    pub fn new(values: HashMap<String, String>) -> Params {
        Params {
            values,
            used: Vec::new(),
        }
    }

    /// A finite number within `range`; `default` when absent (None: required).
    pub fn number(
        &mut self,
        name: &'static str,
        range: (f64, f64),
        default: Option<f64>,
    ) -> Result<f64, String> {
        self.used.push(name);
        let Some(text) = self.values.get(name) else {
            return default.ok_or(format!("parameter '{name}' is missing"));
        };
        let value: f64 = text.parse().map_err(|_| {
            format!(
                "parameter '{name}': expected a number, got '{}'",
                shown(text)
            )
        })?;
        if !value.is_finite() || value < range.0 || value > range.1 {
            return Err(format!(
                "parameter '{name}' = {} is outside {} to {}",
                shown(text),
                range.0,
                range.1
            ));
        }
        Ok(value)
    }

    /// A whole number within `range`.
    pub fn whole(
        &mut self,
        name: &'static str,
        range: (u32, u32),
        default: Option<u32>,
    ) -> Result<u32, String> {
        self.used.push(name);
        let Some(text) = self.values.get(name) else {
            return default.ok_or(format!("parameter '{name}' is missing"));
        };
        let value: u32 = text.parse().map_err(|_| {
            format!(
                "parameter '{name}': expected a whole number from {} to {}, got '{}'",
                range.0,
                range.1,
                shown(text)
            )
        })?;
        if value < range.0 || value > range.1 {
            return Err(format!(
                "parameter '{name}' = {value} is outside {} to {}",
                range.0, range.1
            ));
        }
        Ok(value)
    }

    /// One of `words`; `default` when absent.
    pub fn word(
        &mut self,
        name: &'static str,
        words: &[&'static str],
        default: &'static str,
    ) -> Result<&'static str, String> {
        self.used.push(name);
        let Some(text) = self.values.get(name) else {
            return Ok(default);
        };
        words.iter().copied().find(|w| w == text).ok_or(format!(
            "parameter '{name}': expected one of {}, got '{}'",
            words.join(", "),
            shown(text)
        ))
    }

    /// The page's name for a pane: letters, digits, `-` and `_`, at most 32.
    pub fn key(&mut self, name: &'static str) -> Result<String, String> {
        self.used.push(name);
        let text = self.values.get(name).map_or("main", String::as_str);
        let fine = !text.is_empty()
            && text.len() <= MAX_KEY_CHARS
            && text
                .bytes()
                .all(|b| b.is_ascii_alphanumeric() || b == b'-' || b == b'_');
        if !fine {
            return Err(format!(
                "parameter '{name}': expected 1 to {MAX_KEY_CHARS} letters, digits, '-' or '_'"
            ));
        }
        Ok(text.to_owned())
    }

    /// Refuses the names nobody asked about.
    pub fn finish(self) -> Result<(), String> {
        let mut unknown: Vec<&String> = self
            .values
            .keys()
            .filter(|k| !self.used.contains(&k.as_str()) && k.as_str() != "t")
            .collect();
        unknown.sort();
        match unknown.first() {
            None => Ok(()),
            Some(name) => Err(format!("unknown parameter '{}'", shown(name))),
        }
    }
}

/// A value as it may be shown in a message: at most 40 characters, no control characters.
fn shown(text: &str) -> String {
    let mut out: String = text
        .chars()
        .take(40)
        .map(|c| if c.is_control() { '?' } else { c })
        .collect();
    if text.chars().count() > 40 {
        out.push_str("...");
    }
    out
}

/// Where the viewer stands and looks: the standpoint parameters every pane shares.
pub fn standpoint(p: &mut Params) -> Result<Standpoint, String> {
    let reach = (-MAX_POSITION_M, MAX_POSITION_M);
    let x = p.number("x", reach, None)?;
    let y = p.number("y", reach, None)?;
    let ground = p.number("ground", (-MAX_GROUND_M, MAX_GROUND_M), Some(0.0))?;
    let eye = p.number("eye", (0.0, MAX_EYE_HEIGHT_M), Some(1.6))?;
    let heading = p.number("heading", (-720.0, 720.0), Some(0.0))?;
    let pitch = p.number("pitch", (-90.0, 90.0), Some(0.0))?;
    let mut standpoint = Standpoint::from_degrees("explorer", x, y, eye, heading, pitch, 0.0);
    standpoint.ground = ground;
    Ok(standpoint)
}

/// The hidden-edge choice: `faint`, `solid` or `off`; `scene` leaves it to the scene.
pub fn hidden(p: &mut Params) -> Result<Option<HiddenEdges>, String> {
    Ok(
        match p.word("hidden", &["scene", "faint", "solid", "off"], "scene")? {
            "faint" => Some(HiddenEdges::Faint),
            "solid" => Some(HiddenEdges::Solid),
            "off" => Some(HiddenEdges::Off),
            _ => None,
        },
    )
}

/// The shade tone: `on` or `off`; `scene` leaves it to the scene's `sun` block.
pub fn tone(p: &mut Params) -> Result<Option<bool>, String> {
    Ok(match p.word("tone", &["scene", "on", "off"], "scene")? {
        "on" => Some(true),
        "off" => Some(false),
        _ => None,
    })
}

/// The size of a pane's image.
pub fn size(p: &mut Params, max: (u32, u32)) -> Result<(u32, u32), String> {
    let w = p.whole("w", (MIN_PANE_SIDE, max.0), None)?;
    let h = p.whole("h", (MIN_PANE_SIDE, max.1), None)?;
    Ok((w, h))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn params(url: &str) -> Params {
        Params::new(query(url).unwrap())
    }

    #[test]
    fn numbers_out_of_range_or_not_numbers_are_refused_by_name() {
        for bad in [
            "NaN",
            "inf",
            "-inf",
            "1e300",
            "../../etc/passwd",
            "",
            "0x10",
        ] {
            let mut p = params(&format!("/u?x={bad}&y=0"));
            let error = standpoint(&mut p).unwrap_err();
            assert!(error.contains("'x'"), "{bad}: {error}");
        }
        let mut p = params("/u?x=1.5&y=-4&heading=10&eye=1.2");
        let s = standpoint(&mut p).unwrap();
        assert_eq!((s.x, s.y, s.eye_height), (1.5, -4.0, 1.2));
        assert!(p.finish().is_ok());
    }

    #[test]
    fn unknown_and_repeated_names_are_refused() {
        let mut p = params("/u?x=1&y=2&file=/etc/passwd");
        standpoint(&mut p).unwrap();
        assert!(p.finish().unwrap_err().contains("'file'"));
        assert!(query("/u?x=1&x=2").unwrap_err().contains("twice"));
        assert!(query("/u?x=%zz").is_err());
    }

    #[test]
    fn the_tone_is_one_of_three_words() {
        for (query, expected) in [
            ("/u?tone=on", Some(true)),
            ("/u?tone=off", Some(false)),
            ("/u?tone=scene", None),
            ("/u", None),
        ] {
            let mut p = params(query);
            assert_eq!(tone(&mut p).unwrap(), expected, "{query}");
            assert!(p.finish().is_ok());
        }
        for bad in ["yes", "ON", "1", "../tone", ""] {
            let mut p = params(&format!("/u?tone={bad}"));
            let error = tone(&mut p).unwrap_err();
            assert!(
                error.contains("'tone'") && error.contains("on, off"),
                "{error}"
            );
        }
    }

    #[test]
    fn sizes_and_keys_are_bounded() {
        let mut p = params("/u?w=-5&h=100");
        assert!(size(&mut p, (4096, 2048)).is_err());
        let mut p = params("/u?w=100000&h=100");
        assert!(size(&mut p, (4096, 2048)).unwrap_err().contains("'w'"));
        let mut p = params("/u?pane=..%2Fx");
        assert!(p.key("pane").is_err());
        let mut p = params("/u?pane=look-1");
        assert_eq!(p.key("pane").unwrap(), "look-1");
    }

    #[test]
    fn messages_do_not_echo_huge_or_control_text() {
        let long = "9".repeat(5000);
        let mut p = params(&format!("/u?x={long}&y=0"));
        let error = standpoint(&mut p).unwrap_err();
        assert!(error.len() < 200, "{error}");
        assert_eq!(shown("a\u{1b}b"), "a?b");
    }
}
