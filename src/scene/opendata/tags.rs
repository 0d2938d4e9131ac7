//! What the tags of a map feature say about its shape: the open tagging conventions for
//! simple 3D buildings (the keys `height`, `min_height`, `building:levels`,
//! `building:min_level`, `roof:shape`, `roof:height`, `roof:levels`, `roof:direction`,
//! `roof:orientation`, as mappers write them) and a road's width from its class.
//!
//! Every value the tags do not give is assumed, and each assumption is written down in
//! words so that `check` can list them feature by feature: nobody should mistake a guess
//! for a survey.

use serde_json::{Map, Value};

/// Storey height (metres) used for `building:levels` and its kin unless the scene says
/// otherwise: 3 m (common practice for the conventions' renderers, from memory).
pub const DEFAULT_STOREY: f64 = 3.0;

/// Storeys of a building whose tags give neither a height nor a number of levels: two.
/// Our own choice, between a shed and a town house; always listed as an assumption.
pub const DEFAULT_LEVELS: f64 = 2.0;

/// Height (metres) of a pitched roof whose tags name its shape but not its height or
/// levels: one storey. Our own choice, listed as an assumption.
pub const DEFAULT_ROOF_STOREYS: f64 = 1.0;

/// The least rise (metres) of a roof drawn as tagged, a millimetre: below it the roof is
/// drawn flat with a warning, as its pitches, crown or rim would be lost in rounding (our
/// own bound, far below anything a mapper measures).
pub const MIN_ROOF_RISE: f64 = 1e-3;

/// Width (metres) of one lane when a road's width comes from its `lanes`: 3 m (common
/// practice for town streets; national design manuals give 2.75 to 3.65 m, from memory).
pub const LANE_WIDTH: f64 = 3.0;

/// The carriageway widths (metres, kerb to kerb) we assume for each `highway` class when a
/// road gives neither `width` nor `lanes`. Our own table, for drawing: typical of European
/// towns, not a standard.
pub const ROAD_WIDTHS: &[(&str, f64)] = &[
    ("motorway", 11.0),
    ("trunk", 9.0),
    ("primary", 8.0),
    ("secondary", 7.0),
    ("tertiary", 6.5),
    ("residential", 5.5),
    ("unclassified", 5.0),
    ("living_street", 4.5),
    ("service", 3.5),
    ("pedestrian", 4.0),
    ("track", 3.0),
    ("cycleway", 2.0),
    ("footway", 2.0),
    ("steps", 2.0),
    ("path", 1.5),
];

/// Width of a road of a class missing from [`ROAD_WIDTHS`].
pub const OTHER_ROAD_WIDTH: f64 = 4.0;

/// The roof shapes we draw, from `roof:shape`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum RoofShape {
    /// No pitch.
    Flat,
    /// Two planes from the long sides (or the short ones, `roof:orientation=across`).
    Gabled,
    /// Equal pitches from every side.
    Hipped,
    /// Equal pitches from every side, meeting in a point on a regular plan.
    Pyramidal,
    /// One plane, falling towards `roof:direction`.
    Skillion,
    /// A gable whose top is hipped back (`half-hipped`).
    HalfHipped,
    /// A gable of two pitches on each side, steep below and shallow above (`gambrel`).
    Gambrel,
    /// A hip of two pitches on every side, steep below and shallow above (`mansard`).
    Mansard,
    /// Half a spheroid on the largest circle inside the footprint (`dome`, and `onion`
    /// drawn as one).
    Dome,
    /// A cone on the largest circle inside the footprint (`cone`).
    Cone,
    /// Half an elliptic cylinder over the footprint, its axis along the long sides or,
    /// `roof:orientation=across`, across them (`round`).
    Round,
}

/// The `roof:shape` values we draw, as the OpenStreetMap wiki's Key:roof:shape page spells
/// them (https://wiki.openstreetmap.org/wiki/Key:roof:shape, its table of common values),
/// and our roof for each. `onion` is drawn as a dome (its bulge left out), said as an
/// assumption. The wiki's other shapes (`gabled_height_moved`, `side_hipped`,
/// `side_half-hipped`, `hipped-and-gabled`, `crosspitched`, `sawtooth`, `butterfly`,
/// `many`) are drawn flat with a warning.
pub const ROOF_SHAPES: &[(&str, RoofShape)] = &[
    ("flat", RoofShape::Flat),
    ("gabled", RoofShape::Gabled),
    ("hipped", RoofShape::Hipped),
    ("pyramidal", RoofShape::Pyramidal),
    ("skillion", RoofShape::Skillion),
    ("half-hipped", RoofShape::HalfHipped),
    ("gambrel", RoofShape::Gambrel),
    ("mansard", RoofShape::Mansard),
    ("dome", RoofShape::Dome),
    ("onion", RoofShape::Dome),
    ("cone", RoofShape::Cone),
    ("round", RoofShape::Round),
];

/// The vertical shape of one building or building part, in metres above its ground.
#[derive(Clone, Debug, PartialEq)]
pub struct Heights {
    /// Where its walls start (`min_height`).
    pub base: f64,
    /// The top of the walls, where the roof begins.
    pub eaves: f64,
    /// The top of the roof (`height`).
    pub top: f64,
    /// The roof drawn (`roof:shape`, or flat).
    pub roof: RoofShape,
    /// The roof's `roof:shape` as the tag spells it (`onion` for an onion drawn as a dome),
    /// for messages; `flat` when it is drawn flat.
    pub roof_tag: &'static str,
    /// The true azimuth (degrees) a skillion or the slopes of a roof face, if tagged.
    pub roof_direction: Option<f64>,
    /// `roof:orientation=across`: the ridge runs across the long sides.
    pub across: bool,
}

/// A tag's value as text (numbers written as JSON numbers are accepted too).
pub fn tag<'a>(tags: &'a Map<String, Value>, key: &str) -> Option<std::borrow::Cow<'a, str>> {
    match tags.get(key)? {
        Value::String(s) => Some(std::borrow::Cow::Borrowed(s.as_str())),
        Value::Number(n) => Some(std::borrow::Cow::Owned(n.to_string())),
        Value::Bool(b) => Some(std::borrow::Cow::Owned(b.to_string())),
        _ => None,
    }
}

/// A length as mappers write it: `12`, `12.5`, `12 m`, `12m`, or feet as `40'` or
/// `40'6"`. `None` for anything else, and for negative or non-finite numbers.
pub fn parse_length(text: &str) -> Option<f64> {
    let text = text.trim();
    let metres = if let Some((feet, rest)) = text.split_once('\'') {
        let inches = rest
            .trim()
            .strip_suffix('"')
            .map_or(Some(0.0), |i| i.trim().parse::<f64>().ok())?;
        if !rest.trim().is_empty() && !rest.trim().ends_with('"') {
            return None;
        }
        feet.trim().parse::<f64>().ok()? * 0.3048 + inches * 0.0254
    } else {
        let number = text.strip_suffix('m').unwrap_or(text).trim_end();
        number.parse::<f64>().ok()?
    };
    (metres.is_finite() && metres >= 0.0).then_some(metres)
}

/// A compass direction as mappers write it: degrees (`135`) or a point of the 16-point
/// compass (`SE`, `NNW`). Degrees clockwise from true north.
pub fn parse_direction(text: &str) -> Option<f64> {
    const POINTS: [&str; 16] = [
        "N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE", "S", "SSW", "SW", "WSW", "W", "WNW",
        "NW", "NNW",
    ];
    let text = text.trim();
    if let Some(i) = POINTS.iter().position(|p| p.eq_ignore_ascii_case(text)) {
        return Some(22.5 * i as f64);
    }
    let degrees: f64 = text.parse().ok()?;
    degrees.is_finite().then(|| degrees.rem_euclid(360.0))
}

/// The heights of a building from its tags. `storey` is the storey height; what the tags
/// leave out is assumed and said in `assumptions`; tags that cannot be read or used are
/// said in `warnings`.
pub fn heights(
    tags: &Map<String, Value>,
    storey: f64,
    assumptions: &mut Vec<String>,
    warnings: &mut Vec<String>,
) -> Heights {
    let mut length = |key: &str| -> Option<f64> {
        let text = tag(tags, key)?;
        let value = parse_length(&text);
        if value.is_none() {
            warnings.push(format!("{key}={text:?} is not a length; left out"));
        }
        value
    };
    let height = length("height");
    let min_height = length("min_height");
    let roof_height = length("roof:height");
    let levels = length("building:levels");
    let min_level = length("building:min_level");
    let roof_levels = length("roof:levels");

    let shape_tag = tag(tags, "roof:shape");
    let (mut roof, mut roof_tag) = match shape_tag.as_deref() {
        None => {
            assumptions.push("no roof:shape: a flat roof".to_owned());
            (RoofShape::Flat, "flat")
        }
        Some(name) => match ROOF_SHAPES.iter().find(|(known, _)| *known == name) {
            Some(&(known, shape)) => {
                if known == "onion" {
                    assumptions
                        .push("roof:shape=onion: drawn as a dome, its bulge left out".to_owned());
                }
                (shape, known)
            }
            None => {
                let drawn: Vec<&str> = ROOF_SHAPES.iter().map(|(known, _)| *known).collect();
                warnings.push(format!(
                    "roof:shape={name:?} is not one pansite draws ({}); drawn flat",
                    drawn.join(", ")
                ));
                (RoofShape::Flat, "flat")
            }
        },
    };
    let mut roof_rise = if roof == RoofShape::Flat {
        0.0
    } else if let Some(h) = roof_height {
        h
    } else if let Some(l) = roof_levels {
        l * storey
    } else {
        assumptions.push(format!(
            "no roof:height or roof:levels: the roof {:.1} m high ({} storey)",
            DEFAULT_ROOF_STOREYS * storey,
            DEFAULT_ROOF_STOREYS
        ));
        DEFAULT_ROOF_STOREYS * storey
    };
    if roof_rise == 0.0 {
        // `roof:height=0`: whatever its shape, a roof of no height is flat.
        (roof, roof_tag) = (RoofShape::Flat, "flat");
    } else if roof_rise < MIN_ROOF_RISE {
        warnings.push(format!(
            "the roof ({roof_rise:e} m high) is lower than a millimetre; drawn flat"
        ));
        (roof, roof_tag, roof_rise) = (RoofShape::Flat, "flat", 0.0);
    }
    let base = match (min_height, min_level) {
        (Some(h), _) => h,
        (None, Some(l)) => l * storey,
        (None, None) => 0.0,
    };
    let top = match (height, levels) {
        (Some(h), _) => h,
        (None, Some(l)) => {
            assumptions.push(format!(
                "height from building:levels: {l} x {storey} m{}",
                if roof_rise > 0.0 {
                    format!(" + {roof_rise:.1} m of roof")
                } else {
                    String::new()
                }
            ));
            l * storey + roof_rise
        }
        (None, None) => {
            let top = DEFAULT_LEVELS * storey + roof_rise;
            assumptions.push(format!(
                "no height or building:levels: {top:.1} m high ({DEFAULT_LEVELS} storeys of \
                 {storey} m{})",
                if roof_rise > 0.0 { " and the roof" } else { "" }
            ));
            top
        }
    };
    let mut eaves = top - roof_rise;
    if roof != RoofShape::Flat && eaves <= base {
        warnings.push(format!(
            "the roof ({roof_rise:.1} m) is as high as the whole building ({:.1} m above \
             its base); drawn flat",
            top - base
        ));
        (roof, roof_tag) = (RoofShape::Flat, "flat");
        eaves = top;
    }
    let roof_direction = match tag(tags, "roof:direction") {
        None => None,
        Some(text) => {
            let d = parse_direction(&text);
            if d.is_none() {
                warnings.push(format!(
                    "roof:direction={text:?} is not a direction; left out"
                ));
            }
            d
        }
    };
    let across = tag(tags, "roof:orientation").as_deref() == Some("across");
    Heights {
        base,
        eaves,
        top,
        roof,
        roof_tag,
        roof_direction,
        across,
    }
}

/// A road's carriageway width from its tags: `width`, else `lanes` lanes of
/// [`LANE_WIDTH`], else its `highway` class in [`ROAD_WIDTHS`].
pub fn road_width(tags: &Map<String, Value>, assumptions: &mut Vec<String>) -> f64 {
    if let Some(w) = tag(tags, "width").and_then(|t| parse_length(&t)) {
        if w > 0.0 {
            return w;
        }
    }
    if let Some(lanes) = tag(tags, "lanes").and_then(|t| t.trim().parse::<u32>().ok()) {
        if lanes > 0 {
            assumptions.push(format!("width from lanes: {lanes} x {LANE_WIDTH} m"));
            return lanes as f64 * LANE_WIDTH;
        }
    }
    let class = tag(tags, "highway").unwrap_or_default();
    let width = ROAD_WIDTHS
        .iter()
        .find(|(name, _)| *name == class)
        .map_or(OTHER_ROAD_WIDTH, |(_, w)| *w);
    assumptions.push(format!(
        "no width or lanes: {width} m for highway={class:?}"
    ));
    width
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    fn tags(value: Value) -> Map<String, Value> {
        match value {
            Value::Object(map) => map,
            _ => unreachable!(),
        }
    }

    fn heights_of(value: Value) -> (Heights, Vec<String>, Vec<String>) {
        let (mut assumptions, mut warnings) = (Vec::new(), Vec::new());
        let h = heights(
            &tags(value),
            DEFAULT_STOREY,
            &mut assumptions,
            &mut warnings,
        );
        (h, assumptions, warnings)
    }

    #[test]
    fn lengths_as_mappers_write_them() {
        assert_eq!(parse_length("12"), Some(12.0));
        assert_eq!(parse_length("12.5 m"), Some(12.5));
        assert_eq!(parse_length("7m"), Some(7.0));
        // 40 ft 6 in = 12.3444 m exactly (international foot and inch).
        let feet = parse_length("40'6\"").unwrap();
        assert!((feet - 12.3444).abs() < 1e-9, "{feet}");
        assert_eq!(parse_length("tall"), None);
        assert_eq!(parse_length("-3"), None);
        assert_eq!(parse_length("NaN"), None);
    }

    #[test]
    fn directions_as_degrees_or_compass_points() {
        assert_eq!(parse_direction("135"), Some(135.0));
        assert_eq!(parse_direction("SE"), Some(135.0));
        assert_eq!(parse_direction("nnw"), Some(337.5));
        assert_eq!(parse_direction("-90"), Some(270.0));
        assert_eq!(parse_direction("up"), None);
    }

    #[test]
    fn height_is_the_top_of_the_roof() {
        // The conventions: `height` is ground to the top of the roof, `roof:height` the
        // part of it that is roof, `min_height` where the part starts.
        let (h, _, warnings) = heights_of(json!({
            "height": "15", "min_height": "3", "roof:shape": "gabled", "roof:height": "4"
        }));
        assert_eq!((h.base, h.eaves, h.top), (3.0, 11.0, 15.0));
        assert_eq!(h.roof, RoofShape::Gabled);
        assert!(warnings.is_empty());
    }

    #[test]
    fn levels_times_the_storey_and_every_guess_listed() {
        let (h, assumptions, _) = heights_of(json!({
            "building:levels": 4, "building:min_level": "1", "roof:shape": "hipped",
            "roof:levels": "1"
        }));
        assert_eq!((h.base, h.eaves, h.top), (3.0, 12.0, 15.0));
        assert!(
            assumptions.iter().any(|a| a.contains("building:levels")),
            "{assumptions:?}"
        );
        let (h, assumptions, _) = heights_of(json!({"building": "yes"}));
        assert_eq!((h.base, h.eaves, h.top), (0.0, 6.0, 6.0));
        assert_eq!(assumptions.len(), 2, "{assumptions:?}");
    }

    #[test]
    fn the_wikis_roof_shapes_onto_ours() {
        // The values as spelt in the OpenStreetMap wiki's Key:roof:shape table of common
        // values (https://wiki.openstreetmap.org/wiki/Key:roof:shape), written out here
        // rather than taken from `ROOF_SHAPES`.
        for (name, shape) in [
            ("flat", RoofShape::Flat),
            ("gabled", RoofShape::Gabled),
            ("hipped", RoofShape::Hipped),
            ("pyramidal", RoofShape::Pyramidal),
            ("skillion", RoofShape::Skillion),
            ("half-hipped", RoofShape::HalfHipped),
            ("gambrel", RoofShape::Gambrel),
            ("mansard", RoofShape::Mansard),
            ("dome", RoofShape::Dome),
            ("onion", RoofShape::Dome),
            ("cone", RoofShape::Cone),
            ("round", RoofShape::Round),
        ] {
            let (h, assumptions, warnings) =
                heights_of(json!({"height": 12, "roof:shape": name, "roof:height": 4}));
            assert_eq!((h.roof, h.roof_tag), (shape, name));
            assert!(warnings.is_empty(), "{name}: {warnings:?}");
            // The conventions: `roof:height` is the part of `height` that is roof.
            let rise = if shape == RoofShape::Flat { 0.0 } else { 4.0 };
            assert_eq!((h.eaves, h.top), (12.0 - rise, 12.0), "{name}");
            // Only the onion is drawn otherwise than tagged, and says so.
            assert_eq!(assumptions.len(), usize::from(name == "onion"), "{name}");
        }
        let (_, assumptions, _) = heights_of(json!({"height": 12, "roof:shape": "onion"}));
        assert!(
            assumptions
                .iter()
                .any(|a| a.contains("onion") && a.contains("dome")),
            "{assumptions:?}"
        );
        // Across the long sides, as for a gable.
        let (h, _, _) = heights_of(json!({"roof:shape": "gambrel", "roof:orientation": "across"}));
        assert!(h.across);
    }

    #[test]
    fn unknown_roofs_are_flat_with_a_warning() {
        // Shapes of the wiki's table that we do not draw, and a value not in it.
        for name in ["butterfly", "sawtooth", "crosspitched", "many", "tent"] {
            let (h, _, warnings) = heights_of(json!({"height": 9, "roof:shape": name}));
            assert_eq!(h.roof, RoofShape::Flat);
            assert_eq!(h.eaves, 9.0);
            assert!(
                warnings[0].contains(name) && warnings[0].contains("drawn flat"),
                "{warnings:?}"
            );
        }
        let (h, _, warnings) =
            heights_of(json!({"height": 9, "roof:shape": "dome", "roof:height": 0}));
        assert_eq!((h.roof, h.eaves), (RoofShape::Flat, 9.0));
        assert!(warnings.is_empty(), "{warnings:?}");
        let (h, _, warnings) =
            heights_of(json!({"height": 9, "roof:shape": "hipped", "roof:levels": "0"}));
        assert_eq!((h.roof, h.eaves), (RoofShape::Flat, 9.0));
        assert!(warnings.is_empty(), "{warnings:?}");
        // Under a millimetre (here a subnormal number): flat, and said; a millimetre is
        // drawn as tagged.
        for rise in ["1e-320", "0.0009", "0.0009 m"] {
            let (h, _, warnings) =
                heights_of(json!({"height": 9, "roof:shape": "round", "roof:height": rise}));
            assert_eq!(
                (h.roof, h.roof_tag, h.eaves),
                (RoofShape::Flat, "flat", 9.0)
            );
            assert_eq!(warnings.len(), 1, "{warnings:?}");
            assert!(
                warnings[0].contains("lower than a millimetre; drawn flat"),
                "{warnings:?}"
            );
        }
        let (h, _, warnings) =
            heights_of(json!({"height": 9, "roof:shape": "cone", "roof:height": "0.001"}));
        assert_eq!((h.roof, h.eaves), (RoofShape::Cone, 8.999));
        assert!(warnings.is_empty(), "{warnings:?}");
        let (h, _, warnings) =
            heights_of(json!({"height": 3, "roof:shape": "gabled", "roof:height": 5}));
        assert_eq!(h.roof, RoofShape::Flat);
        assert!(warnings[0].contains("drawn flat"), "{warnings:?}");
    }

    #[test]
    fn road_widths_from_width_lanes_or_class() {
        let mut a = Vec::new();
        assert_eq!(
            road_width(&tags(json!({"highway": "primary", "width": "9.5"})), &mut a),
            9.5
        );
        assert!(a.is_empty());
        assert_eq!(
            road_width(&tags(json!({"highway": "primary", "lanes": "3"})), &mut a),
            9.0
        );
        assert_eq!(
            road_width(&tags(json!({"highway": "residential"})), &mut a),
            5.5
        );
        assert_eq!(
            road_width(&tags(json!({"highway": "bridleway"})), &mut a),
            OTHER_ROAD_WIDTH
        );
        assert_eq!(a.len(), 3);
    }
}
