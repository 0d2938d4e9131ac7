//! Reading Wavefront OBJ files (the format of the "Object Files (.obj)" appendix of the
//! Advanced Visualizer manual): `v` positions, `f` faces of any arity, `l` polylines,
//! absolute and negative (relative) indices, the `v/vt/vn` index forms, and `o` / `g` names.
//! Everything else (`vt`, `vn`, materials, smoothing groups, free-form geometry) is read past.
//!
//! Why not a crate: the ones on crates.io either report malformed numbers without the line
//! (obj-rs, tobj), keep positions in `f32` (obj-rs), or reject relative indices in quads,
//! scope indices to each object, and turn a two-vertex face into a line without a word
//! (wavefront_obj 11). A user must be told which line of their export is wrong, so pansite
//! reads the few statements it needs itself.

use crate::budget::{MAX_EDGES, MAX_TRIANGLES};
use crate::error::{Error, Result};
use nalgebra::Point3;
use std::collections::HashMap;
use std::path::Path;

/// A parsed OBJ file, in its own coordinates and units.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct ObjFile {
    pub positions: Vec<Point3<f64>>,
    /// Faces as 0-based position indices, with the group they belong to.
    pub faces: Vec<(Vec<u32>, u32)>,
    /// `l` polylines as 0-based position indices, with their group.
    pub lines: Vec<(Vec<u32>, u32)>,
    /// Group names (from `g`, or `o` where no `g` is given); index 0 is the file's default.
    pub groups: Vec<String>,
    /// Holes cut out of faces: the face's index in `faces` and the hole's ring of position
    /// indices. OBJ has none; CityJSON surfaces do.
    pub holes: Vec<(u32, Vec<u32>)>,
}

/// Reads and parses an OBJ file.
pub fn read_obj(path: &Path) -> Result<ObjFile> {
    // Through the loaders' checks: a model named `/dev/zero` must not be read for ever.
    let bytes = super::file::read_input(path)?;
    parse_obj(&bytes, path)
}

/// Parses OBJ text; `path` names the file in messages.
pub fn parse_obj(bytes: &[u8], path: &Path) -> Result<ObjFile> {
    let error = |line: usize, column: usize, message: String| Error::Scene {
        path: path.to_owned(),
        line,
        column,
        message,
    };
    let text = std::str::from_utf8(bytes).map_err(|e| {
        let line = bytes[..e.valid_up_to()]
            .iter()
            .filter(|&&b| b == b'\n')
            .count()
            + 1;
        error(
            line,
            1,
            "expected OBJ text (this looks like a binary file)".to_owned(),
        )
    })?;
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    if text.trim().is_empty() {
        return Err(error(
            1,
            1,
            "the file is empty; expected `v` and `f` lines".to_owned(),
        ));
    }
    let mut obj = ObjFile {
        groups: vec![String::new()],
        ..ObjFile::default()
    };
    let mut group_index = HashMap::from([(String::new(), 0u32)]);
    let mut group = 0u32;
    let mut object_name = String::new();
    // Absolute indices may point forward; they are checked once every `v` is read.
    let mut absolute_checks: Vec<(usize, usize, i64)> = Vec::new();
    let (mut triangles, mut line_edges) = (0usize, 0usize);
    for (number, line) in text.lines().enumerate() {
        let number = number + 1;
        let line = line.split('#').next().unwrap_or("");
        let mut words = words_with_columns(line);
        let Some((_, keyword)) = words.next() else {
            continue;
        };
        let line_end = line.chars().count() + 1;
        match keyword {
            "v" => {
                let mut coordinates = [0.0; 3];
                for (axis, value) in coordinates.iter_mut().enumerate() {
                    let (column, word) = words.next().ok_or_else(|| {
                        error(
                            number,
                            line_end,
                            format!("expected three coordinates after `v`, found {axis}"),
                        )
                    })?;
                    *value = parse_number(word).map_err(|m| error(number, column, m))?;
                }
                if obj.positions.len() >= MAX_TRIANGLES {
                    return Err(error(
                        number,
                        1,
                        format!("the model has more than {MAX_TRIANGLES} vertices by this line; pansite draws at most that many"),
                    ));
                }
                obj.positions.push(Point3::from(coordinates));
            }
            "f" | "l" => {
                let mut indices = Vec::new();
                for (column, word) in words {
                    let index = word.split('/').next().unwrap_or("");
                    let index: i64 = index.parse().map_err(|_| {
                        error(
                            number,
                            column,
                            format!("expected a vertex index, found \"{word}\""),
                        )
                    })?;
                    let resolved = match index {
                        0 => {
                            return Err(error(
                                number,
                                column,
                                "vertex indices start at 1; found 0".to_owned(),
                            ))
                        }
                        i if i < 0 => {
                            let resolved = obj.positions.len() as i64 + i;
                            if resolved < 0 {
                                return Err(error(number, column, format!(
                                    "relative index {i} reaches before the first vertex (only {} are defined so far)",
                                    obj.positions.len()
                                )));
                            }
                            resolved
                        }
                        i => {
                            absolute_checks.push((number, column, i));
                            i - 1
                        }
                    };
                    indices.push(u32::try_from(resolved).map_err(|_| {
                        error(number, column, format!("vertex index {index} is too large"))
                    })?);
                }
                let (least, what) = if keyword == "f" {
                    (3, "a face")
                } else {
                    (2, "a line")
                };
                if indices.len() < least {
                    return Err(error(
                        number,
                        line_end,
                        format!(
                            "{what} needs at least {least} vertices, found {}",
                            indices.len()
                        ),
                    ));
                }
                // The bounds of one run, checked as the file is read, before the mesh is
                // built: a face of n corners makes n - 2 triangles, a line of n points
                // n - 1 edges.
                let (count, limit, what) = if keyword == "f" {
                    triangles += indices.len() - 2;
                    (triangles, MAX_TRIANGLES, "triangles")
                } else {
                    line_edges += indices.len() - 1;
                    (line_edges, MAX_EDGES, "line segments")
                };
                if count > limit {
                    return Err(error(
                        number,
                        1,
                        format!("the model has more than {limit} {what} by this line; pansite draws at most that many"),
                    ));
                }
                if keyword == "f" {
                    obj.faces.push((indices, group));
                } else {
                    obj.lines.push((indices, group));
                }
            }
            "o" => {
                object_name = words.map(|(_, w)| w).collect::<Vec<_>>().join(" ");
                group = name_group(&mut obj.groups, &mut group_index, &object_name);
            }
            "g" => {
                let name = words.map(|(_, w)| w).collect::<Vec<_>>().join(" ");
                let name = if name.is_empty() {
                    object_name.clone()
                } else {
                    name
                };
                group = name_group(&mut obj.groups, &mut group_index, &name);
            }
            // Texture and normal vectors, materials, smoothing, points, free-form geometry:
            // nothing pansite draws.
            _ => {}
        }
    }
    let count = obj.positions.len() as i64;
    if let Some(&(line, column, index)) = absolute_checks.iter().find(|&&(_, _, i)| i > count) {
        return Err(error(
            line,
            column,
            format!("vertex index {index} is out of range: the file has {count} vertices"),
        ));
    }
    if obj.faces.is_empty() && obj.lines.is_empty() {
        return Err(error(
            1,
            1,
            "no faces (`f`) or lines (`l`) in the file; is it an OBJ file?".to_owned(),
        ));
    }
    Ok(obj)
}

/// The largest coordinate read from a file, in its own units (a thousand kilometres in
/// millimetres): beyond it a model is a mistake, and sums of coordinates lose all precision.
const MAX_COORDINATE: f64 = 1e12;

fn parse_number(word: &str) -> std::result::Result<f64, String> {
    let value: f64 = word
        .parse()
        .map_err(|_| format!("expected a number, found \"{word}\""))?;
    if !value.is_finite() {
        Err(format!("expected a finite number, found \"{word}\""))
    } else if value.abs() > MAX_COORDINATE {
        Err(format!(
            "expected a coordinate from -1e12 to 1e12, found {word}"
        ))
    } else {
        Ok(value)
    }
}

/// The whitespace-separated words of a line with their columns (counting characters from 1).
fn words_with_columns(line: &str) -> impl Iterator<Item = (usize, &str)> {
    let mut column = 0;
    let mut rest = line;
    std::iter::from_fn(move || {
        let start = rest.find(|c: char| !c.is_whitespace())?;
        column += rest[..start].chars().count();
        rest = &rest[start..];
        let end = rest.find(char::is_whitespace).unwrap_or(rest.len());
        let word = &rest[..end];
        let word_column = column + 1;
        column += word.chars().count();
        rest = &rest[end..];
        Some((word_column, word))
    })
}

/// The index of a group name, adding it if new (`index` maps names to indices: exports
/// from CAD write a group for every component, hundreds of thousands of them).
fn name_group(groups: &mut Vec<String>, index: &mut HashMap<String, u32>, name: &str) -> u32 {
    if let Some(&i) = index.get(name) {
        return i;
    }
    groups.push(name.to_owned());
    let i = groups.len() as u32 - 1;
    index.insert(name.to_owned(), i);
    i
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse(text: &str) -> Result<ObjFile> {
        parse_obj(text.as_bytes(), Path::new("t.obj"))
    }

    fn error_line(text: &str) -> (usize, String) {
        match parse(text) {
            Err(Error::Scene { line, message, .. }) => (line, message),
            other => panic!("expected an error, got {other:?}"),
        }
    }

    fn error_column(text: &str) -> usize {
        match parse(text) {
            Err(Error::Scene { column, .. }) => column,
            other => panic!("expected an error, got {other:?}"),
        }
    }

    #[test]
    fn errors_point_at_the_word() {
        assert_eq!(error_column("v 0 0 0\nv 1 0 0\nv 1 1 0\nf 1 2 0\n"), 7);
        assert_eq!(error_column("v 0 0 0\nv 1 0 0\nv 1 1 0\nf  1 2   9\n"), 10);
        assert_eq!(error_column("v 1.0 abc 2\n"), 7);
        assert_eq!(error_column("v 1e13 0 0\n"), 3);
        assert_eq!(
            words_with_columns("  f\t1 22").collect::<Vec<_>>(),
            vec![(3, "f"), (5, "1"), (7, "22")]
        );
    }

    // Cases written from the Wavefront "Object Files (.obj)" appendix of the Advanced
    // Visualizer manual: relative indices, the v/vt/vn forms, polylines, groups.
    #[test]
    fn relative_indices_quads_and_index_forms() {
        let obj = parse("v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\nf -4 -3 -2 -1\nvt 0 0\nvn 0 0 1\nf 1/1/1 2/1/1 3//1\nl 1 2 3 4\nl 1/1 3/1\n").unwrap();
        assert_eq!(obj.faces[0].0, vec![0, 1, 2, 3]);
        assert_eq!(obj.faces[1].0, vec![0, 1, 2]);
        assert_eq!(obj.lines[0].0, vec![0, 1, 2, 3]);
        assert_eq!(obj.lines[1].0, vec![0, 2]);
    }

    #[test]
    fn indices_are_global_across_objects_and_groups_are_named() {
        let obj = parse("o first\nv 0 0 0\nv 1 0 0\nv 1 1 0\nf 1 2 3\no second\ng wall door\nv 5 5 5\nf 1 2 4 # uses the first object's vertices\n").unwrap();
        assert_eq!(obj.faces[1].0, vec![0, 1, 3]);
        assert_eq!(obj.groups[obj.faces[0].1 as usize], "first");
        assert_eq!(obj.groups[obj.faces[1].1 as usize], "wall door");
    }

    #[test]
    fn bad_input_names_the_line() {
        assert_eq!(error_line("v 0 0 0\nv 1 0 0\nv 1 1 0\nf 1 2 9\n").0, 4);
        assert!(error_line("v 0 0 0\nv 1 0 0\nv 1 1 0\nf 1 2 9\n")
            .1
            .contains("out of range"));
        assert_eq!(error_line("v 0 0 0\nv 1 0 0\nv 1 1 0\nf 0 1 2\n").0, 4);
        let (line, message) = error_line("v 0 0 0\nv 1 0 0\nf 1 2\n");
        assert_eq!(line, 3);
        assert!(message.contains("at least 3"), "{message}");
        let (line, message) = error_line("v 0 0 0\nl 1\n");
        assert_eq!(line, 2);
        assert!(message.contains("at least 2"), "{message}");
        let (line, message) = error_line("v 0 0 0\nv 1.0 abc 2\n");
        assert_eq!(line, 2);
        assert!(message.contains("abc"), "{message}");
        assert!(error_line("v nan 0 0\nv 1 0 0\nv 1 1 0\nf 1 2 3\n")
            .1
            .contains("finite"));
        assert!(error_line("v 0 0 0\nf -5 -4 -3\n")
            .1
            .contains("before the first vertex"));
        assert!(error_line("").1.contains("empty"));
        assert!(error_line("v 0 0 0\nv 1 0 0\n").1.contains("no faces"));
        match parse_obj(&[b'v', b' ', 0xff, 0xfe, b'\n'], Path::new("x.obj")) {
            Err(Error::Scene {
                line: 1, message, ..
            }) => assert!(message.contains("binary")),
            other => panic!("{other:?}"),
        }
    }
}
