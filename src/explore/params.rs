//! The page's requests as checked values: every parameter is a number or a word from a
//! short list, in a stated range, or (a division's item) a short label that the renderer
//! looks up among the site's labels; anything else is refused with a message naming the
//! parameter (the server answers 400). No parameter ever names a file.

use crate::aids::AidSettings;
use crate::render::SunChoice;
use crate::scene::{Division, Fan, HiddenEdges, Pole, Slope, Standpoint, DEFAULT_FAN_STEP_DEG};
use nalgebra::Point3;
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
/// The longest item label a division may name, characters.
pub const MAX_LABEL_CHARS: usize = 80;
/// The most equal parts a division of the page may ask for.
pub const MAX_PARTS: u32 = 100;
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

    /// A number in `range` if the parameter is given, `None` if it is not.
    pub fn optional_number(
        &mut self,
        name: &'static str,
        range: (f64, f64),
    ) -> Result<Option<f64>, String> {
        if self.values.contains_key(name) {
            self.number(name, range, None).map(Some)
        } else {
            self.used.push(name);
            Ok(None)
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

    /// A switch: `on` or `off`, `default` when absent.
    pub fn switch(&mut self, name: &'static str, default: bool) -> Result<bool, String> {
        let default = if default { "on" } else { "off" };
        Ok(self.word(name, &["on", "off"], default)? == "on")
    }

    /// A short line of text (an item's label): 1 to `MAX_LABEL_CHARS` characters, no
    /// control characters; `None` when absent.
    pub fn label(&mut self, name: &'static str) -> Result<Option<String>, String> {
        self.used.push(name);
        let Some(text) = self.values.get(name) else {
            return Ok(None);
        };
        let count = text.chars().count();
        if count == 0 || count > MAX_LABEL_CHARS || text.chars().any(char::is_control) {
            return Err(format!(
                "parameter '{name}': expected a label of 1 to {MAX_LABEL_CHARS} characters, got '{}'",
                shown(text)
            ));
        }
        Ok(Some(text.clone()))
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

/// Where the viewer stands and looks: the standpoint parameters every pane shares. Without
/// a `ground`, the viewer stands on the scene's ground at (x, y), as `ground_under` gives
/// it (a standpoint dragged across a hill keeps its eye above the slope); with one, on that
/// height (a balcony, a standpoint that names its own).
pub fn standpoint(
    p: &mut Params,
    ground_under: &dyn Fn(f64, f64) -> f64,
) -> Result<Standpoint, String> {
    let reach = (-MAX_POSITION_M, MAX_POSITION_M);
    let x = p.number("x", reach, None)?;
    let y = p.number("y", reach, None)?;
    let own_ground = p.optional_number("ground", (-MAX_GROUND_M, MAX_GROUND_M))?;
    let ground = own_ground.unwrap_or_else(|| ground_under(x, y));
    let eye = p.number("eye", (0.0, MAX_EYE_HEIGHT_M), Some(1.6))?;
    let heading = p.number("heading", (-720.0, 720.0), Some(0.0))?;
    let pitch = p.number("pitch", (-90.0, 90.0), Some(0.0))?;
    let mut standpoint = Standpoint::from_degrees("explorer", x, y, eye, heading, pitch, 0.0);
    standpoint.ground = ground;
    standpoint.own_ground = own_ground.is_some();
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

/// The drawing aids of the underlay, each as `render`'s option of the same meaning:
/// `grid=off` is the bare wireframe (`--bare`: no aid at all, the others are still read
/// and checked); `step` the grid's spacing (`--grid`); `labels` (`--labels`), `names`
/// (`--item-labels`) and `vanishing` (`--vanishing`) switches; `fan` a bearing with
/// `fan_step` (`--fan BEARING,STEP`); `pole_x`, `pole_y` with `pole_step` and
/// `pole_height` (`--pole X,Y,STEP,HEIGHT`); `divide` an item's label with `parts`
/// (`--divide-edges LABEL:PARTS`).
pub fn aids(p: &mut Params) -> Result<Option<AidSettings>, String> {
    let grid = p.switch("grid", true)?;
    let mut aids = AidSettings {
        grid_step_deg: p.number("step", (0.5, 90.0), Some(10.0))?,
        labels: p.switch("labels", false)?,
        item_labels: p.switch("names", false)?,
        vanishing_points: p.switch("vanishing", false)?,
        ..AidSettings::default()
    };
    let fan = optional(p, "fan", (-360.0, 360.0))?;
    let fan_step = p.number("fan_step", (1.0, 90.0), Some(DEFAULT_FAN_STEP_DEG))?;
    if let Some(bearing_deg) = fan {
        aids.guides.fans.push(Fan {
            direction: Slope {
                bearing_deg,
                pitch_deg: 0.0,
            },
            step_deg: fan_step,
        });
    }
    let reach = (-MAX_POSITION_M, MAX_POSITION_M);
    let (pole_x, pole_y) = (optional(p, "pole_x", reach)?, optional(p, "pole_y", reach)?);
    let step = p.number("pole_step", (0.01, 100.0), Some(1.0))?;
    let height = p.number("pole_height", (0.1, 1000.0), Some(10.0))?;
    match (pole_x, pole_y) {
        (Some(x), Some(y)) => aids.guides.poles.push(Pole {
            label: None,
            foot: Point3::new(x, y, 0.0),
            height,
            step,
            unit: 1.0,
        }),
        (None, None) => {}
        _ => return Err("parameters 'pole_x' and 'pole_y' go together: give both".into()),
    }
    let item = p.label("divide")?;
    let parts = p.whole("parts", (1, MAX_PARTS), Some(4))?;
    if let Some(item) = item {
        aids.guides.divisions.push(Division::Edges { item, parts });
    }
    Ok(grid.then_some(aids))
}

/// A number within `range`, or `None` when absent.
fn optional(p: &mut Params, name: &'static str, range: (f64, f64)) -> Result<Option<f64>, String> {
    if p.values.contains_key(name) {
        p.number(name, range, None).map(Some)
    } else {
        p.used.push(name);
        Ok(None)
    }
}

/// The sun's drawing on the underlay: `tone` (see [`tone`]), `sun_path` (`--no-sun-path`
/// when `off`) and `seasons` (`--seasons` when `on`), each `scene` (the default) leaving it
/// to the scene's `sun` block.
pub fn sun(p: &mut Params) -> Result<SunChoice, String> {
    let either = |p: &mut Params, name| -> Result<Option<bool>, String> {
        Ok(match p.word(name, &["scene", "on", "off"], "scene")? {
            "on" => Some(true),
            "off" => Some(false),
            _ => None,
        })
    };
    Ok(SunChoice {
        tone: tone(p)?,
        path: either(p, "sun_path")?,
        seasons: either(p, "seasons")?,
        ..SunChoice::default()
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

    /// Level ground at zero.
    fn level(_x: f64, _y: f64) -> f64 {
        0.0
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
            let error = standpoint(&mut p, &level).unwrap_err();
            assert!(error.contains("'x'"), "{bad}: {error}");
        }
        let mut p = params("/u?x=1.5&y=-4&heading=10&eye=1.2");
        let s = standpoint(&mut p, &level).unwrap();
        assert_eq!((s.x, s.y, s.eye_height), (1.5, -4.0, 1.2));
        assert!(p.finish().is_ok());
    }

    #[test]
    fn a_standpoint_without_its_own_ground_stands_on_the_scenes() {
        // A slope rising 1 in 10 eastwards: without `ground`, the ground under (x, y).
        let slope = |x: f64, _y: f64| x / 10.0;
        let mut p = params("/u?x=20&y=3");
        let s = standpoint(&mut p, &slope).unwrap();
        assert_eq!((s.ground, s.eye().z, s.own_ground), (2.0, 3.6, false));
        assert!(p.finish().is_ok());
        // Given, it is kept (a balcony over the slope), and checked like any number.
        let mut p = params("/u?x=20&y=3&ground=14");
        let s = standpoint(&mut p, &slope).unwrap();
        assert_eq!((s.ground, s.own_ground), (14.0, true));
        let mut p = params("/u?x=20&y=3&ground=NaN");
        assert!(standpoint(&mut p, &slope).unwrap_err().contains("'ground'"));
    }

    #[test]
    fn unknown_and_repeated_names_are_refused() {
        let mut p = params("/u?x=1&y=2&file=/etc/passwd");
        standpoint(&mut p, &level).unwrap();
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
    fn aids_are_read_as_render_reads_its_options() {
        let mut p = params(
            "/u?grid=on&step=15&labels=on&names=off&vanishing=on&fan=-30&fan_step=5\
             &pole_x=4&pole_y=-10.5&pole_step=0.5&divide=clock+tower&parts=3",
        );
        let read = aids(&mut p).unwrap().unwrap();
        assert!(p.finish().is_ok());
        assert_eq!(read.grid_step_deg, 15.0);
        assert!(read.labels && !read.item_labels && read.vanishing_points);
        let fan = &read.guides.fans[0];
        assert_eq!((fan.direction.bearing_deg, fan.step_deg), (-30.0, 5.0));
        let pole = &read.guides.poles[0];
        assert_eq!(
            (pole.foot.x, pole.foot.y, pole.step, pole.height),
            (4.0, -10.5, 0.5, 10.0)
        );
        assert_eq!(
            read.guides.divisions,
            vec![Division::Edges {
                item: "clock tower".into(),
                parts: 3
            }]
        );
        // Absent: the plain underlay, the same settings as `render` without options.
        let mut p = params("/u");
        assert_eq!(aids(&mut p).unwrap(), Some(AidSettings::default()));
        // Off: no aid, and the other aid parameters are still checked.
        let mut p = params("/u?grid=off&labels=on");
        assert_eq!(aids(&mut p).unwrap(), None);
        assert!(p.finish().is_ok());
        assert!(aids(&mut params("/u?grid=off&labels=yes")).is_err());
    }

    #[test]
    fn malformed_aids_are_refused_by_name() {
        for (query, name) in [
            ("grid=10", "'grid'"),
            ("step=0", "'step'"),
            ("step=NaN", "'step'"),
            ("labels=1", "'labels'"),
            ("vanishing=ON", "'vanishing'"),
            ("fan=north", "'fan'"),
            ("fan=1e300", "'fan'"),
            ("fan=30&fan_step=0", "'fan_step'"),
            ("pole_x=3", "'pole_y'"),
            ("pole_x=3&pole_y=inf", "'pole_y'"),
            ("pole_x=3&pole_y=1&pole_step=0", "'pole_step'"),
            ("pole_x=3&pole_y=1&pole_height=-2", "'pole_height'"),
            ("divide=", "'divide'"),
            ("divide=a%0Ab", "'divide'"),
            ("divide=tower&parts=0", "'parts'"),
            ("divide=tower&parts=100000", "'parts'"),
        ] {
            let error = aids(&mut params(&format!("/u?{query}"))).unwrap_err();
            assert!(error.contains(name), "{query}: {error}");
        }
        let long = "x".repeat(MAX_LABEL_CHARS + 1);
        assert!(aids(&mut params(&format!("/u?divide={long}"))).is_err());
    }

    #[test]
    fn the_sun_switches_are_three_words_each() {
        let mut p = params("/u?sun_path=off&seasons=on&tone=on");
        let choice = sun(&mut p).unwrap();
        assert!(p.finish().is_ok());
        assert_eq!(
            (choice.path, choice.seasons, choice.tone),
            (Some(false), Some(true), Some(true))
        );
        assert_eq!(sun(&mut params("/u")).unwrap(), SunChoice::default());
        assert!(sun(&mut params("/u?seasons=yes"))
            .unwrap_err()
            .contains("'seasons'"));
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
        let error = standpoint(&mut p, &level).unwrap_err();
        assert!(error.len() < 200, "{error}");
        assert_eq!(shown("a\u{1b}b"), "a?b");
    }
}
