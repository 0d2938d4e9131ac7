//! Reading a RON scene file into a [`Site`].

use super::expand::{expand, ExpandError};
use super::file::read_input;
use super::format::SceneFile;
use super::locate::{describe_path, field_value_at, item_path_at, item_spans, ItemSpan};
use super::mesh::{add_mesh, MeshPlacement, MeshStats};
use super::obj::read_obj;
use super::site::Site;
use super::style::StyleSheet;
use super::suggest::explain;
use crate::error::{Error, Result};
use ron::extensions::Extensions;
use std::path::Path;
use std::time::{Duration, Instant};

/// How long loading took, for `--timings`: reading and parsing the text, then expanding
/// it into the site (a scene's items, a model's mesh).
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct LoadTimings {
    /// Reading the file and parsing its text.
    pub parse: Duration,
    /// Turning the parsed scene into the site's edges and faces.
    pub expand: Duration,
}

/// Reads and resolves a scene file.
pub fn load_scene(path: &Path) -> Result<Site> {
    load_scene_timed(path).map(|(site, _)| site)
}

/// [`load_scene`], timed.
pub fn load_scene_timed(path: &Path) -> Result<(Site, LoadTimings)> {
    let started = Instant::now();
    let bytes = read_input(path)?;
    let fallback = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    let (site, mut timings) = parse_scene_timed(&bytes, path, &fallback)?;
    timings.parse = started.elapsed() - timings.expand;
    Ok((site, timings))
}

/// Reads a Wavefront OBJ model into a site of its own. It has no standpoints: the caller
/// gives one.
pub fn load_obj(path: &Path, placement: &MeshPlacement) -> Result<(Site, MeshStats)> {
    load_obj_timed(path, placement).map(|(site, stats, _)| (site, stats))
}

/// [`load_obj`], timed.
pub fn load_obj_timed(
    path: &Path,
    placement: &MeshPlacement,
) -> Result<(Site, MeshStats, LoadTimings)> {
    let started = Instant::now();
    let obj = read_obj(path)?;
    let parse = started.elapsed();
    let name = path
        .file_name()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    let mut site = Site {
        name: name.clone(),
        ..Site::default()
    };
    let stats = add_mesh(&mut site, &obj, placement, &name);
    if site.edges.len() > crate::budget::MAX_EDGES {
        return Err(Error::TooLarge {
            what: "the model's drawn edges",
            found: site.edges.len() as u64,
            limit: crate::budget::MAX_EDGES as u64,
            advice: "raise --crease to draw fewer creases, or simplify the model",
        });
    }
    let expand = started.elapsed() - parse;
    Ok((site, stats, LoadTimings { parse, expand }))
}

/// A message for text that is JSON rather than a RON scene (a JSON object or array at the
/// start, where a scene begins with `Scene(` or `(`), or `None`.
fn looks_like_json(text: &str) -> Option<String> {
    let start = text.trim_start();
    let json = start.starts_with('{') || (start.starts_with('[') && !start.contains("Scene("));
    json.then(|| {
        "this file looks like JSON, not a pansite scene; a scene is written in RON and begins \
         Scene(standpoints: [...], items: [...]) (see docs/scene-format.md)"
            .to_owned()
    })
}

/// Reads an open-data file (GeoJSON, CityJSON, CityJSONSeq) given instead of a scene: a
/// site of its buildings and streets around `origin` (WGS84 latitude and longitude), or
/// around a point of the file's own (its first position; a city model's middle), with one
/// standpoint, `origin`, there. Its local times are in `time_zone` (an IANA name, looked up
/// in the bundled database as a scene's `location` is), or universal time without one; a
/// zone needs the origin's latitude and longitude, which a city model in a grid does not
/// give of itself.
pub fn load_open_data(
    path: &Path,
    origin: Option<(f64, f64)>,
    time_zone: Option<&str>,
) -> Result<Site> {
    if let Some(zone) = time_zone {
        super::location::find_time_zone(zone)?;
    }
    let name = path
        .file_name()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    let origin = match (origin, super::opendata::DataKind::of(path)) {
        (Some(o), _) => Some(o),
        (None, Some(super::opendata::DataKind::GeoJson)) => {
            let bytes = read_input(path)?;
            match super::opendata::first_position(&bytes) {
                Ok(origin) => Some(origin),
                // No usable position: the reader says what is wrong with them, if it can.
                Err(e) => {
                    let frame = super::opendata::LocalFrame::new(0.0, 0.0, 0.0, 0.0);
                    let selection = super::opendata::Selection::default();
                    super::opendata::read_geojson(&bytes, &frame, &selection)
                        .map_err(|e| e.in_file(path))?;
                    return Err(e.in_file(path));
                }
            }
        }
        _ => None,
    };
    let location = match (origin, time_zone) {
        (Some((lat, lon)), zone) => {
            let zone = zone.map_or(String::new(), |z| format!(", time_zone: {z:?}"));
            format!("location: (latitude: {lat:?}, longitude: {lon:?}{zone}),")
        }
        (None, None) => String::new(),
        (None, Some(zone)) => {
            return Err(Error::Setting(format!(
                "{}: local times in \"{zone}\" need the latitude and longitude of the plan's \
                 origin, and this file gives positions in a grid: name the origin's latitude \
                 and longitude too",
                path.display()
            )))
        }
    };
    // The file's name goes into a RON string as Rust writes strings, escapes and all.
    let scene = format!(
        "Scene(name: {name:?}, {location} standpoints: [(name: \"origin\", x: 0, y: 0)], \
         items: [OpenData(file: {name:?})])"
    );
    parse_scene(scene.as_bytes(), path, &name).map_err(|e| match e {
        // The scene is ours: the data file's own error is the one to show.
        Error::InModel { source, .. } => *source,
        other => other,
    })
}

/// Parses scene text. `path` names the file in messages and is where models (OBJ files)
/// named in the scene are looked for, relative to its folder; `fallback_name` names a scene
/// that has no `name`.
pub fn parse_scene(bytes: &[u8], path: &Path, fallback_name: &str) -> Result<Site> {
    parse_scene_timed(bytes, path, fallback_name).map(|(site, _)| site)
}

/// [`parse_scene`], timed.
pub fn parse_scene_timed(
    bytes: &[u8],
    path: &Path,
    fallback_name: &str,
) -> Result<(Site, LoadTimings)> {
    let started = Instant::now();
    let text = text_of(bytes, path)?;
    if text.trim().is_empty() {
        return Err(Error::Scene {
            path: path.to_owned(),
            line: 1,
            column: 1,
            message: "the file is empty; expected a scene: Scene(items: [...])".to_owned(),
        });
    }
    if let Some(message) = looks_like_json(text) {
        return Err(Error::Scene {
            path: path.to_owned(),
            line: 1,
            column: 1,
            message,
        });
    }
    let options = ron::Options::default()
        .with_default_extension(Extensions::IMPLICIT_SOME | Extensions::UNWRAP_VARIANT_NEWTYPES);
    let file: SceneFile = options.from_str(text).map_err(|e| {
        let (line, column) = (e.span.start.line, e.span.start.col);
        let spans = item_spans(text);
        let at = item_path_at(&spans, line, column);
        let message = match describe_path(&spans, &at) {
            Some(item) => format!("in {item}: {}", explain(&e.code)),
            None => explain(&e.code),
        };
        Error::Scene {
            path: path.to_owned(),
            line,
            column,
            message,
        }
    })?;
    let parsed = Instant::now();
    let site = expand(file, fallback_name, path).map_err(|e| match e {
        ExpandError::Item { path: at, message } => {
            let spans = item_spans(text);
            let (line, column) = item_start(&spans, &at).unwrap_or((1, 1));
            let name = describe_path(&spans, &at).unwrap_or_else(|| describe_path_plain(&at));
            Error::Scene {
                path: path.to_owned(),
                line,
                column,
                message: format!("in {name}: {message}"),
            }
        }
        ExpandError::Field { field, message } => {
            let (line, column) = text
                .find(field)
                .map_or((1, 1), |at| line_and_column(&text.as_bytes()[..at]));
            Error::Scene {
                path: path.to_owned(),
                line,
                column,
                message: format!("`{field}`: {message}"),
            }
        }
        ExpandError::Value {
            path: fields,
            message,
        } => {
            let (line, column) = field_value_at(text, fields).unwrap_or((1, 1));
            Error::Scene {
                path: path.to_owned(),
                line,
                column,
                message: format!("`{}`: {message}", fields.join(".")),
            }
        }
        ExpandError::Model {
            path: at,
            kind,
            label,
            source,
        } => Error::InModel {
            scene: path.to_owned(),
            kind,
            // Where the model is named in the scene.
            line: item_start(&item_spans(text), &at).map_or(1, |(line, _)| line),
            column: item_start(&item_spans(text), &at).map_or(1, |(_, column)| column),
            item: label,
            source,
        },
    })?;
    let timings = LoadTimings {
        parse: parsed - started,
        expand: parsed.elapsed(),
    };
    Ok((site, timings))
}

/// How a message names an item by its path alone: `item 2 of item 5`, counting from 1.
fn describe_path_plain(path: &[usize]) -> String {
    path.iter()
        .rev()
        .map(|i| format!("item {}", i + 1))
        .collect::<Vec<_>>()
        .join(" of ")
}

/// Where the item at `path` starts.
fn item_start(spans: &[ItemSpan], path: &[usize]) -> Option<(usize, usize)> {
    let (&first, rest) = path.split_first()?;
    let span = spans.get(first)?;
    if rest.is_empty() {
        Some(span.start)
    } else {
        item_start(&span.children, rest).or(Some(span.start))
    }
}

/// Reads a style file: a map from layer names to styles,
/// `{"grid": (colour: "non-photo blue"), "hidden": (opacity: 0.3)}`.
pub fn load_style_sheet(path: &Path) -> Result<StyleSheet> {
    let bytes = read_input(path)?;
    let text = text_of(&bytes, path)?;
    ron::Options::default()
        .with_default_extension(Extensions::IMPLICIT_SOME)
        .from_str(text)
        .map_err(|e| Error::Scene {
            path: path.to_owned(),
            line: e.span.start.line,
            column: e.span.start.col,
            message: explain(&e.code),
        })
}

/// The length of a scene file's unit in metres (`unit: Foot` gives 0.3048), for writing
/// positions back into the file in its own unit.
pub fn scene_unit_metres(bytes: &[u8], path: &Path) -> Result<f64> {
    let text = text_of(bytes, path)?;
    let options = ron::Options::default()
        .with_default_extension(Extensions::IMPLICIT_SOME | Extensions::UNWRAP_VARIANT_NEWTYPES);
    let file: SceneFile = options.from_str(text).map_err(|e| Error::Scene {
        path: path.to_owned(),
        line: e.span.start.line,
        column: e.span.start.col,
        message: explain(&e.code),
    })?;
    Ok(file.unit.metres())
}

/// The text of a RON file: UTF-8 (a binary file is refused where its first bad byte is),
/// without a byte-order mark, which is legal UTF-8 but not RON.
fn text_of<'a>(bytes: &'a [u8], path: &Path) -> Result<&'a str> {
    let text = std::str::from_utf8(bytes).map_err(|e| {
        let (line, column) = line_and_column(&bytes[..e.valid_up_to()]);
        Error::Scene {
            path: path.to_owned(),
            line,
            column,
            message: "expected UTF-8 text (this looks like a binary file)".to_owned(),
        }
    })?;
    Ok(text.strip_prefix('\u{feff}').unwrap_or(text))
}

/// Line and column (from 1, counting characters) just after `prefix`.
fn line_and_column(prefix: &[u8]) -> (usize, usize) {
    let text = String::from_utf8_lossy(prefix);
    let line = text.matches('\n').count() + 1;
    let column = text
        .rsplit('\n')
        .next()
        .map_or(0, |last| last.chars().count())
        + 1;
    (line, column)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse(text: &str) -> Result<Site> {
        parse_scene(text.as_bytes(), Path::new("test.ron"), "test")
    }

    fn error_at(text: &str) -> (usize, usize, String) {
        match parse(text) {
            Err(Error::Scene {
                line,
                column,
                message,
                ..
            }) => (line, column, message),
            other => panic!("expected a scene error, got {other:?}"),
        }
    }

    #[test]
    fn a_sun_time_the_clocks_skip_or_repeat_is_refused_where_it_is_written() {
        let scene = |zone: &str, time: &str| {
            format!(
                "Scene(\n  location: (latitude: 40.7, longitude: -105.1{zone}),\n  \
                 sun: (date: \"2026-03-08\",\n        time: \"{time}\"),\n  \
                 standpoints: [(name: \"here\", x: 0, y: 0)],\n  items: [],\n)"
            )
        };
        // America/Denver goes forward at 02:00 local on the second Sunday of March (the
        // Energy Policy Act of 2005): 2026-03-08.
        let denver = ", time_zone: \"America/Denver\"";
        let (line, column, message) = error_at(&scene(denver, "02:15"));
        assert_eq!((line, column), (4, 15), "{message}");
        assert!(message.starts_with("`sun.time`: 2026-03-08 02:15:00 does not exist"));
        assert!(message.contains("before 02:00 or from 03:00"), "{message}");
        // Either side of the gap, and the same time in universal time, are read.
        assert!(parse(&scene(denver, "01:59")).is_ok());
        assert!(parse(&scene(denver, "03:00")).is_ok());
        assert!(parse(&scene("", "02:15")).is_ok());
    }

    #[test]
    fn json_is_told_apart_from_a_scene() {
        for text in ["{\"type\": \"FeatureCollection\"}", "  [1, 2]"] {
            let (line, column, message) = error_at(text);
            assert_eq!((line, column), (1, 1));
            assert!(message.contains("looks like JSON"), "{message}");
            assert!(message.contains("Scene("), "{message}");
        }
        // A RON scene is never taken for JSON.
        assert!(looks_like_json("Scene(items: [])").is_none());
        assert!(looks_like_json("(items: [])").is_none());
    }

    #[test]
    fn minimal_scene_with_integers_for_numbers() {
        let site = parse(
            "Scene(standpoints: [(name: \"a\", x: 1, y: 2)], items: [\n\
             Block(label: \"b\", at: Corner(0, 0), width: 4, depth: 3, height: 2),\n\
             Polyline(points: [(0, 0, 0), (1, 1, 1), (2, 0, 0)], closed: true)])",
        )
        .unwrap();
        assert_eq!(site.name, "test");
        assert_eq!(site.standpoints[0].eye_height, 1.6);
        assert_eq!(site.items.len(), 2);
        assert_eq!(site.edges.len(), 12 + 3);
        assert_eq!(
            site.describe_item(crate::scene::ItemId(0)),
            "block \"b\" (item 1)"
        );
    }

    #[test]
    fn non_finite_numbers_are_refused_where_they_stand() {
        let (line, column, message) =
            error_at("Scene(items: [\n  Polyline(points: [(0, 0, 0), (NaN, 1, 1)])])");
        assert_eq!(line, 2);
        assert!(column > 20, "column {column}");
        assert!(message.contains("finite"), "{message}");
        let (_, _, message) =
            error_at("Scene(items: [Polyline(points: [(0, 0, inf), (1, 1, 1)])])");
        assert!(message.contains("finite"), "{message}");
    }

    #[test]
    fn unknown_fields_and_wrong_types_are_explained() {
        let (line, _, message) = error_at("Scene(items: [\n\nBlock(at: Corner(0, 0), widht: 4)])");
        assert_eq!(line, 3);
        assert!(message.contains("widht"), "{message}");
        let (_, _, message) =
            error_at("Scene(items: [Block(at: Corner(0, 0), width: \"4\", depth: 1, height: 1)])");
        assert!(message.to_lowercase().contains("expected"), "{message}");
    }

    #[test]
    fn sizes_must_be_positive() {
        let (_, _, message) =
            error_at("Scene(items: [Block(at: Corner(0, 0), width: 0, depth: 1, height: 1)])");
        assert!(message.contains("greater than zero"), "{message}");
    }

    #[test]
    fn empty_binary_and_bom_files() {
        assert!(error_at("  \n").2.contains("empty"));
        let garbage = [b'S', b'c', 0xff, 0xfe, 0x00];
        match parse_scene(&garbage, Path::new("x.ron"), "x") {
            Err(Error::Scene {
                line: 1,
                column: 3,
                message,
                ..
            }) => {
                assert!(message.contains("UTF-8"))
            }
            other => panic!("{other:?}"),
        }
        let with_bom = "\u{feff}Scene(items: [])\r\n";
        assert!(parse(with_bom).is_ok());
    }

    #[test]
    fn truncated_file_names_the_end() {
        let (line, _, _) = error_at("Scene(items: [\n  Block(at: Corner(0, 0), width: 4,");
        assert_eq!(line, 2);
    }
}
