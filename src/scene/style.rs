//! How a scene (or a style file) asks the layers of its drawing to look. The drawing
//! applies these; the scene only carries them.

use super::numbers::{Finite, NonNegative, Positive};
use serde::{Deserialize, Deserializer};

/// A colour written `"#rrggbb"` or by one of a few names.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Colour(pub [u8; 3]);

impl Colour {
    /// A colour by name or as `#rrggbb`, or `None`.
    pub fn parse(text: &str) -> Option<Colour> {
        let named = match text.trim().to_lowercase().as_str() {
            "black" => Some([0, 0, 0]),
            "white" => Some([255, 255, 255]),
            "grey" | "gray" => Some([128, 128, 128]),
            "red" => Some([200, 30, 30]),
            "blue" => Some([30, 80, 200]),
            // The light blue of guide lines that copiers and scans drop out (common
            // practice; the exact shade varies between makers).
            "non-photo blue" => Some([164, 221, 237]),
            _ => None,
        };
        if let Some(rgb) = named {
            return Some(Colour(rgb));
        }
        let hex = text.trim().strip_prefix('#')?;
        if hex.len() != 6 || !hex.is_ascii() {
            return None;
        }
        let byte = |i: usize| u8::from_str_radix(&hex[i..i + 2], 16).ok();
        Some(Colour([byte(0)?, byte(2)?, byte(4)?]))
    }
}

impl<'de> Deserialize<'de> for Colour {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let text = String::deserialize(deserializer)?;
        Colour::parse(&text).ok_or_else(|| {
            serde::de::Error::custom(format!(
                "expected a colour \"#rrggbb\" or black, white, grey, red, blue or \"non-photo blue\", found \"{text}\""
            ))
        })
    }
}

/// An opacity from 0 (invisible) to 1.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Opacity(pub f64);

impl<'de> Deserialize<'de> for Opacity {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let Finite(value) = Finite::deserialize(deserializer)?;
        if (0.0..=1.0).contains(&value) {
            Ok(Opacity(value))
        } else {
            Err(serde::de::Error::custom(format!(
                "expected an opacity from 0 to 1, found {value}"
            )))
        }
    }
}

/// How one layer looks. Every field is optional: what is not given is kept.
#[derive(Clone, Debug, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct LayerStyle {
    /// The ink's colour.
    #[serde(default)]
    pub colour: Option<Colour>,
    /// How opaque the ink is, 0 to 1.
    #[serde(default)]
    pub opacity: Option<Opacity>,
    /// Line weight on paper, millimetres.
    #[serde(default)]
    pub weight_mm: Option<Positive>,
    /// Line weight in image pixels (for panoramas seen on screen).
    #[serde(default)]
    pub weight_px: Option<Positive>,
    /// Dashes: drawn and left lengths, millimetres; `(0, 0)` for none.
    #[serde(default)]
    pub dash_mm: Option<(NonNegative, NonNegative)>,
}

impl LayerStyle {
    /// A complete style: colour, opacity, weight in millimetres and dashes (drawn, left)
    /// in millimetres, if any.
    pub fn on_paper(
        colour: Colour,
        opacity: f64,
        weight_mm: f64,
        dash_mm: Option<(f64, f64)>,
    ) -> LayerStyle {
        LayerStyle {
            colour: Some(colour),
            opacity: Some(Opacity(opacity.clamp(0.0, 1.0))),
            weight_mm: (weight_mm > 0.0).then_some(Positive(weight_mm)),
            weight_px: None,
            dash_mm: dash_mm.map(|(on, off)| (NonNegative(on.max(0.0)), NonNegative(off.max(0.0)))),
        }
    }
}

/// Styles by layer name: a drawing layer's name (`wireframe`, `hidden`, `grid`,
/// `horizon`, `frame`, `title`, ...) or the name of a layer of the site's items (which
/// styles `wireframe: NAME`).
#[derive(Clone, Debug, Default, Deserialize, PartialEq)]
#[serde(transparent)]
pub struct StyleSheet(pub std::collections::BTreeMap<String, LayerStyle>);
