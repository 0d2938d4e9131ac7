//! Reading Wavefront OBJ files (the format of the "Object Files (.obj)" appendix of the
//! Advanced Visualizer manual): `v` positions, `vn` normals, `f` faces of any arity, `l`
//! polylines, absolute and negative (relative) indices, the `v/vt/vn` index forms, `o` / `g`
//! names, `s` smoothing groups, and `usemtl` / `mtllib` materials. Everything else (`vt`,
//! points, free-form geometry) is read past.
//!
//! What the file says about its edges is kept for the mesh: each face's smoothing group and
//! the normal index at each corner. The appendix on `s`: "If you do not want to use a
//! smoothing group, specify off or a value of 0", so `s off` and `s 0` both mean that the
//! faces after it belong to no smoothing group (they are not smoothed with any neighbour).
//! Faces before the first `s` carry no word either way.
//!
//! Speed: a large file is cut at line ends into one piece per core, each piece read on its
//! own thread into flat arrays made with room for all the piece can hold (no allocation
//! per line, no array copied as it grows; numbers by `fast-float2`; lines scanned once for
//! their end and comment; a plainly written `v` or `f` line read in one pass, and anything
//! unusual by the general, careful path), then the pieces are joined: indices relative to
//! the vertices so far, and the group, material and smoothing in force where a piece
//! begins, are settled in the join. Anything wrong in any
//! piece sends the whole file through the one-piece reader again, which finds the first
//! mistake in file order and reports its line and column: errors cost time, good files none.
//!
//! Why not a crate: the ones on crates.io either report malformed numbers without the line
//! (obj-rs, tobj), keep positions in `f32` (obj-rs), or reject relative indices in quads,
//! scope indices to each object, and turn a two-vertex face into a line without a word
//! (wavefront_obj 11). A user must be told which line of their export is wrong, so pansite
//! reads the few statements it needs itself; obj-rs reads every valid fixture beside it in
//! the tests.

use crate::budget::{MAX_EDGES, MAX_TRIANGLES};
use crate::error::{Error, Result};
use nalgebra::{Point3, Vector3};
use std::collections::HashMap;
use std::path::Path;

/// A corner with no normal index.
pub const NO_NORMAL: u32 = u32::MAX;

/// What the file says about smoothing a face with its neighbours.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
pub enum Smoothing {
    /// No `s` statement before the face: the file says nothing.
    #[default]
    Unsaid,
    /// `s off` or `s 0`: smoothed with no neighbour.
    Off,
    /// `s N`: smoothed with the neighbours of the same group N.
    Group(u32),
}

/// One `f` face or `l` polyline: its corners are `corners[first..first + count]` (of
/// [`ObjFile::corners`] or [`ObjFile::line_points`]).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct ObjElement {
    /// Its first corner's place in the corner list.
    pub first: u32,
    /// How many corners it has.
    pub count: u32,
    /// Index into [`ObjFile::groups`].
    pub group: u32,
    /// Index into [`ObjFile::materials`] (0: none).
    pub material: u32,
    /// The smoothing in force where it was written (faces only).
    pub smoothing: Smoothing,
}

impl ObjElement {
    fn range(&self) -> std::ops::Range<usize> {
        self.first as usize..(self.first + self.count) as usize
    }
}

/// A parsed OBJ file, in its own coordinates and units.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct ObjFile {
    /// `v` positions as written.
    pub positions: Vec<Point3<f64>>,
    /// `vn` vectors as written (not necessarily of unit length).
    pub normals: Vec<Vector3<f64>>,
    /// `f` faces in file order.
    pub faces: Vec<ObjElement>,
    /// Faces' corners as 0-based position indices.
    pub corners: Vec<u32>,
    /// Beside each corner, its 0-based normal index, or [`NO_NORMAL`].
    pub corner_normals: Vec<u32>,
    /// `l` polylines in file order.
    pub lines: Vec<ObjElement>,
    /// `l` polylines' points as 0-based position indices.
    pub line_points: Vec<u32>,
    /// Group names (from `g`, or `o` where no `g` is given); index 0 is the file's default.
    pub groups: Vec<String>,
    /// Holes cut out of faces: the face's index in `faces` and the hole's ring of position
    /// indices. OBJ has none; CityJSON surfaces do.
    pub holes: Vec<(u32, Vec<u32>)>,
    /// Material names from `usemtl`; index 0 (empty) is none.
    pub materials: Vec<String>,
    /// `mtllib` file names, with the line naming each.
    pub material_libraries: Vec<(String, usize)>,
    /// Oddities that do not stop the model being drawn (a missing `.mtl` file).
    pub warnings: Vec<String>,
}

impl ObjFile {
    /// Adds a face made elsewhere (a CityJSON surface): its position indices, in a group, with
    /// no normals, no material and nothing said about smoothing.
    pub fn push_face(&mut self, corners: &[u32], group: u32) {
        if self.materials.is_empty() {
            self.materials.push(String::new());
        }
        self.faces.push(ObjElement {
            first: self.corners.len() as u32,
            count: corners.len() as u32,
            group,
            material: 0,
            smoothing: Smoothing::Unsaid,
        });
        self.corners.extend_from_slice(corners);
        self.corner_normals
            .extend(std::iter::repeat_n(NO_NORMAL, corners.len()));
    }

    /// A face's position indices.
    pub fn face_corners(&self, face: &ObjElement) -> &[u32] {
        &self.corners[face.range()]
    }

    /// A face's normal indices ([`NO_NORMAL`] where a corner gives none).
    pub fn face_normals(&self, face: &ObjElement) -> &[u32] {
        &self.corner_normals[face.range()]
    }

    /// A polyline's position indices.
    pub fn line_indices(&self, line: &ObjElement) -> &[u32] {
        &self.line_points[line.range()]
    }
}

/// Reads and parses an OBJ file, and checks the material libraries it names: one that is
/// missing or does not define a material the model uses is a warning, not an error (the
/// materials still become layers, named as the OBJ names them).
pub fn read_obj(path: &Path) -> Result<ObjFile> {
    // Through the loaders' checks: a model named `/dev/zero` must not be read for ever.
    let bytes = super::file::read_input(path)?;
    let mut obj = parse_obj(&bytes, path)?;
    check_material_libraries(&mut obj, path);
    Ok(obj)
}

/// Reads the `.mtl` files `obj` names (beside `path`) for their `newmtl` names, and warns
/// of those missing and of materials none defines.
fn check_material_libraries(obj: &mut ObjFile, path: &Path) {
    if obj.material_libraries.is_empty() {
        return;
    }
    let folder = path.parent().unwrap_or(Path::new(""));
    let mut defined: Vec<String> = Vec::new();
    let mut all_read = true;
    for (name, line) in obj.material_libraries.clone() {
        let relative = Path::new(&name);
        // Only names within the model's folder: a model file is not a way to read others.
        let inside = relative.components().all(|c| {
            matches!(
                c,
                std::path::Component::Normal(_) | std::path::Component::CurDir
            )
        });
        let read = inside
            .then(|| super::file::read_input(&folder.join(relative)).ok())
            .flatten();
        match read {
            Some(bytes) => defined.extend(
                String::from_utf8_lossy(&bytes)
                    .lines()
                    .filter_map(|l| l.trim().strip_prefix("newmtl"))
                    .filter(|rest| rest.starts_with(char::is_whitespace))
                    .map(|rest| rest.trim().to_owned()),
            ),
            None => {
                all_read = false;
                obj.warnings.push(format!(
                    "names the material library \"{name}\" (line {line}), which is not beside it: its materials become layers by the names the model gives them"
                ));
            }
        }
    }
    if all_read {
        for material in obj.materials.iter().skip(1) {
            if !defined.contains(material) {
                obj.warnings.push(format!(
                    "uses the material \"{material}\", which no material library it names defines"
                ));
            }
        }
    }
}

/// Below this size a file is read in one piece: threads cost more than they save.
const PARALLEL_BYTES: usize = 1 << 20;

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
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    let obj = if text.len() >= PARALLEL_BYTES && cores > 1 {
        let pieces = split_at_line_ends(text, cores.min(8));
        let read: Vec<std::result::Result<Piece, Mistake>> = std::thread::scope(|scope| {
            let handles: Vec<_> = pieces
                .iter()
                .enumerate()
                .map(|(k, piece)| {
                    // The first piece's arrays become the file's: room for all of it.
                    let room = if k == 0 { text.len() } else { piece.len() };
                    scope.spawn(move || read_piece(piece, k == 0, false, room))
                })
                .collect();
            handles
                .into_iter()
                .map(|h| h.join().unwrap_or_else(|_| Err(Mistake::default())))
                .collect()
        });
        match read.into_iter().collect::<std::result::Result<Vec<_>, _>>() {
            Ok(pieces) => join(pieces),
            Err(_) => None,
        }
    } else {
        None
    };
    let obj = match obj {
        Some(obj) => obj,
        // One piece: every check in file order, so the first mistake is the one reported.
        None => {
            let piece = read_piece(text, true, true, text.len())
                .map_err(|m| error(m.line, column_of(text, m.line, m.byte), m.message))?;
            join(vec![piece])
                .ok_or_else(|| error(1, 1, "internal: the file could not be joined".to_owned()))?
        }
    };
    if obj.faces.is_empty() && obj.lines.is_empty() {
        return Err(error(
            1,
            1,
            "no faces (`f`) or lines (`l`) in the file; is it an OBJ file?".to_owned(),
        ));
    }
    Ok(obj)
}

/// `text` cut into about `count` pieces of similar length, each ending at a line end.
fn split_at_line_ends(text: &str, count: usize) -> Vec<&str> {
    let mut pieces = Vec::with_capacity(count);
    let mut rest = text;
    for k in (1..=count).rev() {
        if k == 1 || rest.is_empty() {
            pieces.push(rest);
            break;
        }
        let target = rest.len() / k;
        let cut = rest.as_bytes()[target..]
            .iter()
            .position(|&b| b == b'\n')
            .map_or(rest.len(), |p| target + p + 1);
        let (piece, after) = rest.split_at(cut);
        pieces.push(piece);
        rest = after;
    }
    pieces
}

/// The column (characters from 1) of byte `byte` of line `line` (from 1) of `text`.
#[cold]
fn column_of(text: &str, line: usize, byte: usize) -> usize {
    let row = text.split('\n').nth(line.saturating_sub(1)).unwrap_or("");
    let byte = byte.min(row.len());
    let mut end = byte;
    while !row.is_char_boundary(end) {
        end -= 1;
    }
    row[..end].chars().count() + 1
}

/// A mistake found in a piece: its line (within the piece, from 1), the byte of the line
/// where it is, and what is wrong.
#[derive(Debug, Default)]
struct Mistake {
    line: usize,
    byte: usize,
    message: String,
}

/// Group, material or smoothing in force when a piece begins, not yet known.
const INHERITED: u32 = u32::MAX;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Slot {
    Corner,
    CornerNormal,
    LinePoint,
}

/// The name a `g` gives: its own, or (an empty `g`) the object's in force.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
enum GroupName {
    Named(String),
    /// The object named before the piece began.
    InheritedObject,
}

/// One piece of a file, read.
#[derive(Debug, Default)]
struct Piece {
    positions: Vec<Point3<f64>>,
    normals: Vec<Vector3<f64>>,
    faces: Vec<ObjElement>,
    corners: Vec<u32>,
    corner_normals: Vec<u32>,
    lines: Vec<ObjElement>,
    line_points: Vec<u32>,
    /// Elements' `group` and `material` index these (or are [`INHERITED`]); smoothing
    /// `Group(INHERITED)` stands for the smoothing in force before the piece.
    groups: Vec<GroupName>,
    materials: Vec<String>,
    libraries: Vec<(String, usize)>,
    /// Indices written relative to the vertices (or normals) read so far, in a piece that
    /// does not know how many came before it: where they are in `corners`,
    /// `corner_normals` and `line_points`, which hold for now the piece's own count before
    /// the index plus the (negative) index, as an `i32`.
    relative: [Vec<u32>; 3],
    /// The largest absolute position and normal index (1-based; 0 for none).
    largest_position: i64,
    largest_normal: i64,
    /// What is in force at the piece's end (`None`: never set in the piece).
    group: Option<u32>,
    material: Option<u32>,
    smoothing: Option<Smoothing>,
    /// The last object name set in the piece, if any.
    object: Option<String>,
    /// Line ends in the piece.
    line_count: usize,
}

impl Piece {
    /// Empty, with room for the most that `bytes` of text can hold (a `v` or `f` line
    /// takes at least 7 bytes and its line end, a corner 2), within the limits of one run:
    /// no array grows (and is copied) while it is read, and what is never written costs
    /// address space, not memory.
    fn with_room(bytes: usize) -> Self {
        let lines = (bytes / 8 + 1).min(MAX_TRIANGLES + 1);
        let corners = (bytes / 2 + 1).min(3 * MAX_TRIANGLES + 1);
        Piece {
            positions: Vec::with_capacity(lines),
            faces: Vec::with_capacity(lines),
            corners: Vec::with_capacity(corners),
            corner_normals: Vec::with_capacity(corners),
            ..Piece::default()
        }
    }
}

fn mistake(line: usize, byte: usize, message: String) -> Mistake {
    Mistake {
        line,
        byte,
        message,
    }
}

/// The lines of `text` as `text.split('\n')` gives them (a last empty line too), each cut at
/// its first `#`: one pass over the bytes, where splitting and then searching each short
/// line cost more than reading the numbers.
fn lines(text: &str) -> impl Iterator<Item = &str> {
    let bytes = text.as_bytes();
    let mut at = 0;
    let mut done = false;
    std::iter::from_fn(move || {
        if done {
            return None;
        }
        let start = at;
        let mut comment = None;
        while at < bytes.len() && bytes[at] != b'\n' {
            if bytes[at] == b'#' && comment.is_none() {
                comment = Some(at);
            }
            at += 1;
        }
        let end = comment.unwrap_or(at);
        if at == bytes.len() {
            done = true;
        } else {
            at += 1;
        }
        // Cut at ASCII bytes: always on character boundaries.
        Some(&text[start..end])
    })
}

/// A face corner's position index and its normal index, as `v`, `v/vt`, `v/vt/vn` or
/// `v//vn` write them: the first and third of its `/`-separated parts (`None`: no third).
fn corner_parts(word: &str) -> (&str, Option<&str>) {
    let slash = |text: &str| text.bytes().position(|b| b == b'/');
    let Some(first) = slash(word) else {
        return (word, None);
    };
    let after_texture = &word[first + 1..];
    let normal = slash(after_texture).map(|second| {
        let normal = &after_texture[second + 1..];
        slash(normal).map_or(normal, |third| &normal[..third])
    });
    (&word[..first], normal)
}

/// The coordinates of a `v` line written plainly (`v` at its start, then three numbers that
/// are fine as coordinates), in one pass: most of a large file. `None` for anything else,
/// which the general reader reads and words any mistake in; for every line this accepts,
/// the general reader reads the same three numbers.
fn plain_vertex(line: &[u8]) -> Option<[f64; 3]> {
    if line.first() != Some(&b'v') || !line.get(1)?.is_ascii_whitespace() {
        return None;
    }
    let mut at = 1;
    let mut coordinates = [0.0; 3];
    for coordinate in &mut coordinates {
        while line.get(at)?.is_ascii_whitespace() {
            at += 1;
        }
        let (value, used) = fast_float2::parse_partial::<f64, _>(&line[at..]).ok()?;
        at += used;
        // The number must be the whole word, as the general reader takes it.
        if line.get(at).is_some_and(|b| !b.is_ascii_whitespace()) {
            return None;
        }
        // Not NaN, not infinite, and within the range the general reader allows.
        if value.is_nan() || value.abs() > MAX_COORDINATE {
            return None;
        }
        *coordinate = value;
    }
    Some(coordinates)
}

/// The most corners of a face that [`plain_face`] reads; longer faces take the general path.
const PLAIN_CORNERS: usize = 8;

/// A face corner as written: its position index and where the index begins in the line,
/// and the same for its normal index if it gives one.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
struct PlainCorner {
    position: i64,
    position_byte: usize,
    normal: Option<(i64, usize)>,
}

/// The corners of an `f` line written plainly (`f` at its start, then 3 to
/// [`PLAIN_CORNERS`] corners `p`, `p/t`, `p//n` or `p/t/n`, each index a whole number of
/// at most 18 digits), read in one pass into `corners`: most of a large file. `None` for
/// anything else, which the general reader reads and words any mistake in; for every line
/// this accepts, the general reader finds the same indices at the same bytes.
fn plain_face(line: &[u8], corners: &mut [PlainCorner; PLAIN_CORNERS]) -> Option<usize> {
    if line.first() != Some(&b'f') || !line.get(1)?.is_ascii_whitespace() {
        return None;
    }
    let space = |at: usize| line.get(at).is_none_or(|b| b.is_ascii_whitespace());
    let mut at = 1;
    let mut count = 0;
    loop {
        while line.get(at).is_some_and(|b| b.is_ascii_whitespace()) {
            at += 1;
        }
        if at == line.len() {
            break;
        }
        let corner = corners.get_mut(count)?;
        corner.position_byte = at;
        corner.position = index_at(line, &mut at)?;
        corner.normal = None;
        if line.get(at) == Some(&b'/') {
            at += 1;
            // The texture index, not kept.
            if !space(at) && line[at] != b'/' {
                index_at(line, &mut at)?;
            }
            if line.get(at) == Some(&b'/') {
                at += 1;
                if !space(at) {
                    let byte = at;
                    corner.normal = Some((index_at(line, &mut at)?, byte));
                }
            }
        }
        if !space(at) {
            return None;
        }
        count += 1;
    }
    (count >= 3).then_some(count)
}

/// A whole number at `line[*at..]` (a sign, then 1 to 18 digits, so that it cannot
/// overflow), `at` moved past it.
fn index_at(line: &[u8], at: &mut usize) -> Option<i64> {
    let negative = line.get(*at) == Some(&b'-');
    if negative || line.get(*at) == Some(&b'+') {
        *at += 1;
    }
    let start = *at;
    let mut value: i64 = 0;
    while let Some(digit) = line
        .get(*at)
        .map(|b| b.wrapping_sub(b'0'))
        .filter(|&d| d <= 9)
    {
        if *at - start == 18 {
            return None;
        }
        value = value * 10 + i64::from(digit);
        *at += 1;
    }
    (*at > start).then_some(if negative { -value } else { value })
}

/// The ASCII-whitespace-separated words of a line with their byte offsets.
fn words(line: &str) -> impl Iterator<Item = (usize, &str)> {
    let bytes = line.as_bytes();
    let mut at = 0;
    std::iter::from_fn(move || {
        while at < bytes.len() && bytes[at].is_ascii_whitespace() {
            at += 1;
        }
        if at == bytes.len() {
            return None;
        }
        let start = at;
        while at < bytes.len() && !bytes[at].is_ascii_whitespace() {
            at += 1;
        }
        Some((start, &line[start..at]))
    })
}

/// Reads one piece. `first` says it begins the file (so relative indices and what is in
/// force are known); `whole` that it is the whole file, checked in full in file order
/// (absolute indices against the final counts, the limits by the line that passes them).
/// Its arrays are made with room for the most that `room` bytes of text can hold.
fn read_piece(
    text: &str,
    first: bool,
    whole: bool,
    room: usize,
) -> std::result::Result<Piece, Mistake> {
    let mut piece = Piece::with_room(room);
    let mut group_index: HashMap<GroupName, u32> = HashMap::new();
    let mut material_index: HashMap<String, u32> = HashMap::new();
    let (mut group, mut material, mut smoothing) = if first {
        (0, 0, Smoothing::Unsaid)
    } else {
        (INHERITED, INHERITED, Smoothing::Group(INHERITED))
    };
    if first {
        piece.groups.push(GroupName::Named(String::new()));
        group_index.insert(GroupName::Named(String::new()), 0);
        piece.materials.push(String::new());
        material_index.insert(String::new(), 0);
    }
    // Absolute indices may point forward; in the whole file they are checked once every
    // `v` and `vn` is read: (line, byte, index, a normal).
    let mut forward: Vec<(usize, usize, i64, bool)> = Vec::new();
    let (mut triangles, mut line_edges) = (0usize, 0usize);
    let mut number = 0;
    let mut plain = [PlainCorner::default(); PLAIN_CORNERS];
    for line in lines(text) {
        number += 1;
        if let Some(coordinates) = plain_vertex(line.as_bytes()) {
            if piece.positions.len() < MAX_TRIANGLES {
                piece.positions.push(Point3::from(coordinates));
                continue;
            }
        }
        if let Some(count) = plain_face(line.as_bytes(), &mut plain) {
            // The general path's steps for these corners, in its order.
            let start = piece.corners.len();
            for corner in &plain[..count] {
                let resolved = resolve(
                    &mut piece,
                    corner.position,
                    Slot::Corner,
                    first,
                    (number, corner.position_byte),
                    false,
                    whole.then_some(&mut forward),
                )?;
                piece.corners.push(resolved);
                let normal = match corner.normal {
                    None => NO_NORMAL,
                    Some((index, byte)) => resolve(
                        &mut piece,
                        index,
                        Slot::CornerNormal,
                        first,
                        (number, byte),
                        true,
                        whole.then_some(&mut forward),
                    )?,
                };
                piece.corner_normals.push(normal);
            }
            triangles += count - 2;
            if triangles > MAX_TRIANGLES {
                return Err(too_many(number, MAX_TRIANGLES, "triangles"));
            }
            piece.faces.push(ObjElement {
                first: start as u32,
                count: count as u32,
                group,
                material,
                smoothing,
            });
            continue;
        }
        let mut words = words(line);
        let Some((_, keyword)) = words.next() else {
            continue;
        };
        let line_end = line.trim_end_matches('\r').len();
        match keyword {
            "v" | "vn" => {
                let mut coordinates = [0.0; 3];
                for (axis, value) in coordinates.iter_mut().enumerate() {
                    let (byte, word) = words.next().ok_or_else(|| {
                        mistake(
                            number,
                            line_end,
                            format!("expected three coordinates after `{keyword}`, found {axis}"),
                        )
                    })?;
                    *value = parse_number(word).map_err(|m| mistake(number, byte, m))?;
                }
                if keyword == "v" {
                    if piece.positions.len() >= MAX_TRIANGLES {
                        return Err(mistake(number, 0, format!("the model has more than {MAX_TRIANGLES} vertices by this line; pansite draws at most that many")));
                    }
                    piece.positions.push(Point3::from(coordinates));
                } else {
                    if let Some((byte, word)) = words.next() {
                        return Err(mistake(
                            number,
                            byte,
                            format!("a normal has three coordinates; found more, \"{word}\""),
                        ));
                    }
                    if piece.normals.len() >= MAX_TRIANGLES {
                        return Err(mistake(number, 0, format!("the model has more than {MAX_TRIANGLES} normals by this line; pansite reads at most that many")));
                    }
                    piece.normals.push(Vector3::from(coordinates));
                }
            }
            "f" | "l" => {
                let is_face = keyword == "f";
                let start = if is_face {
                    piece.corners.len()
                } else {
                    piece.line_points.len()
                };
                for (byte, word) in words {
                    let (position, normal) = corner_parts(word);
                    let index = parse_index(position).ok_or_else(|| {
                        mistake(
                            number,
                            byte,
                            format!("expected a vertex index, found \"{word}\""),
                        )
                    })?;
                    let slot = if is_face {
                        Slot::Corner
                    } else {
                        Slot::LinePoint
                    };
                    let resolved = resolve(
                        &mut piece,
                        index,
                        slot,
                        first,
                        (number, byte),
                        false,
                        whole.then_some(&mut forward),
                    )?;
                    if is_face {
                        piece.corners.push(resolved);
                        let normal = match normal {
                            None | Some("") => NO_NORMAL,
                            Some(text) => {
                                let at = text.as_ptr() as usize - line.as_ptr() as usize;
                                let index = parse_index(text).ok_or_else(|| {
                                    mistake(
                                        number,
                                        at,
                                        format!("expected a normal index after the second `/`, found \"{text}\""),
                                    )
                                })?;
                                resolve(
                                    &mut piece,
                                    index,
                                    Slot::CornerNormal,
                                    first,
                                    (number, at),
                                    true,
                                    whole.then_some(&mut forward),
                                )?
                            }
                        };
                        piece.corner_normals.push(normal);
                    } else {
                        piece.line_points.push(resolved);
                    }
                }
                let count = if is_face {
                    piece.corners.len()
                } else {
                    piece.line_points.len()
                } - start;
                let (least, what) = if is_face {
                    (3, "a face")
                } else {
                    (2, "a line")
                };
                if count < least {
                    return Err(mistake(
                        number,
                        line_end,
                        format!("{what} needs at least {least} vertices, found {count}"),
                    ));
                }
                // The bounds of one run, checked as the file is read, before the mesh is
                // built: a face of n corners makes n - 2 triangles, a line of n points
                // n - 1 edges.
                let (total, limit, what) = if is_face {
                    triangles += count - 2;
                    (triangles, MAX_TRIANGLES, "triangles")
                } else {
                    line_edges += count - 1;
                    (line_edges, MAX_EDGES, "line segments")
                };
                if total > limit {
                    return Err(too_many(number, limit, what));
                }
                let element = ObjElement {
                    first: start as u32,
                    count: count as u32,
                    group,
                    material,
                    smoothing,
                };
                if is_face {
                    piece.faces.push(element);
                } else {
                    piece.lines.push(element);
                }
            }
            "o" => {
                let name = rest_of(line, words);
                group = name_index(
                    &mut piece.groups,
                    &mut group_index,
                    GroupName::Named(name.to_owned()),
                );
                piece.object = Some(name.to_owned());
                piece.group = Some(group);
            }
            "g" => {
                let name = rest_of(line, words);
                let name = match (name.is_empty(), &piece.object) {
                    (false, _) => GroupName::Named(name.to_owned()),
                    (true, Some(object)) => GroupName::Named(object.clone()),
                    (true, None) if first => GroupName::Named(String::new()),
                    (true, None) => GroupName::InheritedObject,
                };
                group = name_index(&mut piece.groups, &mut group_index, name);
                piece.group = Some(group);
            }
            "s" => {
                let Some((byte, word)) = words.next() else {
                    return Err(mistake(
                        number,
                        line_end,
                        "expected a smoothing group after `s`: a number, or `off`".to_owned(),
                    ));
                };
                smoothing = match word {
                    "off" | "0" => Smoothing::Off,
                    _ => match word.parse::<u32>() {
                        Ok(n) if n < INHERITED => Smoothing::Group(n),
                        _ => {
                            return Err(mistake(
                                number,
                                byte,
                                format!("expected a smoothing group (a whole number from 0 to 4294967294, or `off`), found \"{word}\""),
                            ))
                        }
                    },
                };
                if let Some((byte, word)) = words.next() {
                    return Err(mistake(
                        number,
                        byte,
                        format!("`s` takes one smoothing group; found more, \"{word}\""),
                    ));
                }
                piece.smoothing = Some(smoothing);
            }
            "usemtl" => {
                let name = rest_of(line, words);
                material = name_index(&mut piece.materials, &mut material_index, name.to_owned());
                piece.material = Some(material);
            }
            "mtllib" => {
                for (_, word) in words {
                    piece.libraries.push((word.to_owned(), number));
                }
            }
            // Texture vectors, points, free-form geometry: nothing pansite draws.
            _ => {}
        }
    }
    // `split` gives one more piece than there are line ends.
    piece.line_count = number - 1;
    if whole {
        let counts = (piece.positions.len() as i64, piece.normals.len() as i64);
        if let Some(&(line, byte, index, normal)) = forward
            .iter()
            .find(|&&(_, _, i, normal)| i > if normal { counts.1 } else { counts.0 })
        {
            let message = if normal {
                format!(
                    "normal index {index} is out of range: the file has {} normals (`vn`)",
                    counts.1
                )
            } else {
                format!(
                    "vertex index {index} is out of range: the file has {} vertices",
                    counts.0
                )
            };
            return Err(mistake(line, byte, message));
        }
    }
    Ok(piece)
}

/// A model passing a limit of one run by line `number`.
#[cold]
fn too_many(number: usize, limit: usize, what: &str) -> Mistake {
    mistake(
        number,
        0,
        format!(
            "the model has more than {limit} {what} by this line; pansite draws at most that many"
        ),
    )
}

/// The words of a line after the keyword, as written (names may hold spaces).
fn rest_of<'a>(line: &'a str, mut words: impl Iterator<Item = (usize, &'a str)>) -> &'a str {
    match words.next() {
        Some((byte, _)) => line[byte..].trim_end(),
        None => "",
    }
}

/// A 1-based index as written (`-3`, `12`): `None` if it is not a whole number in `i64`.
fn parse_index(word: &str) -> Option<i64> {
    let (negative, digits) = match word.as_bytes().first()? {
        b'-' => (true, &word.as_bytes()[1..]),
        b'+' => (false, &word.as_bytes()[1..]),
        _ => (false, word.as_bytes()),
    };
    if digits.is_empty() {
        return None;
    }
    let mut value: i64 = 0;
    for &b in digits {
        let digit = b.wrapping_sub(b'0');
        if digit > 9 {
            return None;
        }
        value = value.checked_mul(10)?.checked_add(digit as i64)?;
    }
    Some(if negative { -value } else { value })
}

/// Resolves a position or normal index to 0-based, or records it for the join where the
/// piece's place in the file is needed.
#[inline]
fn resolve(
    piece: &mut Piece,
    index: i64,
    slot: Slot,
    first: bool,
    (number, byte): (usize, usize),
    normal: bool,
    forward: Option<&mut Vec<(usize, usize, i64, bool)>>,
) -> std::result::Result<u32, Mistake> {
    let (count, what) = if normal {
        (piece.normals.len() as i64, "normal")
    } else {
        (piece.positions.len() as i64, "vertex")
    };
    match index {
        0 => Err(mistake(
            number,
            byte,
            format!("{what} indices start at 1; found 0"),
        )),
        i if i < 0 => {
            let local = count + i;
            if first {
                if local < 0 {
                    let (things, kind) = if normal {
                        ("normals", "normal")
                    } else {
                        ("vertices", "vertex")
                    };
                    return Err(mistake(number, byte, format!(
                        "relative index {i} reaches before the first {kind} (only {count} {things} are defined so far)"
                    )));
                }
                return Ok(local as u32);
            }
            let at = match slot {
                Slot::Corner => piece.corners.len(),
                Slot::CornerNormal => piece.corner_normals.len(),
                Slot::LinePoint => piece.line_points.len(),
            } as u32;
            piece.relative[slot as usize].push(at);
            // Further back than any file can reach: wrong, and the one-piece reader says so.
            let local = i32::try_from(local).map_err(|_| Mistake::default())?;
            Ok(local as u32)
        }
        i => {
            let resolved = u32::try_from(i - 1)
                .ok()
                .filter(|&r| r < NO_NORMAL)
                .ok_or_else(|| {
                    mistake(number, byte, format!("{what} index {index} is too large"))
                })?;
            if normal {
                piece.largest_normal = piece.largest_normal.max(i);
            } else {
                piece.largest_position = piece.largest_position.max(i);
            }
            if let Some(forward) = forward {
                if i > count {
                    forward.push((number, byte, i, normal));
                }
            }
            Ok(resolved)
        }
    }
}

/// The index of a name, adding it if new (`index` maps names to indices: exports from CAD
/// write a group for every component, hundreds of thousands of them).
fn name_index<N: Clone + Eq + std::hash::Hash>(
    names: &mut Vec<N>,
    index: &mut HashMap<N, u32>,
    name: N,
) -> u32 {
    if let Some(&i) = index.get(&name) {
        return i;
    }
    names.push(name.clone());
    let i = names.len() as u32 - 1;
    index.insert(name, i);
    i
}

/// Appends a piece's part to the file's, room made for `total` at first: the first piece's
/// own vector becomes the file's, so its contents are never copied.
fn gather<T>(all: &mut Vec<T>, mut part: Vec<T>, total: usize) {
    if all.is_empty() {
        part.reserve_exact(total.saturating_sub(part.len()));
        *all = part;
    } else {
        all.append(&mut part);
    }
}

/// Joins the pieces of a file in order; `None` if anything is wrong that only the whole
/// file shows (an index out of range, a limit passed), for the one-piece reader to report.
fn join(pieces: Vec<Piece>) -> Option<ObjFile> {
    let mut obj = ObjFile {
        groups: vec![String::new()],
        materials: vec![String::new()],
        ..ObjFile::default()
    };
    let sum = |f: fn(&Piece) -> usize| pieces.iter().map(f).sum::<usize>();
    let (positions, normals) = (sum(|p| p.positions.len()), sum(|p| p.normals.len()));
    if positions > MAX_TRIANGLES
        || normals > MAX_TRIANGLES
        || pieces
            .iter()
            .any(|p| p.largest_position > positions as i64 || p.largest_normal > normals as i64)
    {
        return None;
    }
    let (face_count, corner_count) = (sum(|p| p.faces.len()), sum(|p| p.corners.len()));
    let point_count = sum(|p| p.line_points.len());
    let mut group_index = HashMap::from([(String::new(), 0u32)]);
    let mut material_index = HashMap::from([(String::new(), 0u32)]);
    let (mut group, mut material, mut smoothing) = (0u32, 0u32, Smoothing::Unsaid);
    let mut object = String::new();
    let (mut triangles, mut line_edges) = (0usize, 0usize);
    let mut lines_before = 0;
    for mut piece in pieces {
        let (base, normal_base) = (obj.positions.len() as i64, obj.normals.len() as i64);
        let [corners, corner_normals, line_points] = &piece.relative;
        for (slots, values, base) in [
            (corners, &mut piece.corners, base),
            (corner_normals, &mut piece.corner_normals, normal_base),
            (line_points, &mut piece.line_points, base),
        ] {
            for &at in slots {
                let value = &mut values[at as usize];
                *value = u32::try_from(*value as i32 as i64 + base).ok()?;
            }
        }
        let groups: Vec<u32> = piece
            .groups
            .iter()
            .map(|name| {
                let name = match name {
                    GroupName::Named(name) => name.as_str(),
                    GroupName::InheritedObject => object.as_str(),
                };
                name_index(&mut obj.groups, &mut group_index, name.to_owned())
            })
            .collect();
        let materials: Vec<u32> = piece
            .materials
            .iter()
            .map(|name| name_index(&mut obj.materials, &mut material_index, name.clone()))
            .collect();
        let settle = |e: &mut ObjElement, first: u32| {
            e.first += first;
            e.group = if e.group == INHERITED {
                group
            } else {
                groups[e.group as usize]
            };
            e.material = if e.material == INHERITED {
                material
            } else {
                materials[e.material as usize]
            };
            if e.smoothing == Smoothing::Group(INHERITED) {
                e.smoothing = smoothing;
            }
        };
        let first_corner = obj.corners.len() as u32;
        for face in &mut piece.faces {
            settle(face, first_corner);
            triangles += face.count as usize - 2;
        }
        let first_point = obj.line_points.len() as u32;
        for line in &mut piece.lines {
            settle(line, first_point);
            line_edges += line.count as usize - 1;
        }
        if triangles > MAX_TRIANGLES || line_edges > MAX_EDGES {
            return None;
        }
        gather(&mut obj.positions, piece.positions, positions);
        gather(&mut obj.normals, piece.normals, normals);
        gather(&mut obj.faces, piece.faces, face_count);
        gather(&mut obj.lines, piece.lines, 0);
        gather(&mut obj.corners, piece.corners, corner_count);
        gather(&mut obj.corner_normals, piece.corner_normals, corner_count);
        gather(&mut obj.line_points, piece.line_points, point_count);
        obj.material_libraries.extend(
            piece
                .libraries
                .into_iter()
                .map(|(name, line)| (name, line + lines_before)),
        );
        lines_before += piece.line_count;
        if let Some(g) = piece.group {
            group = groups[g as usize];
        }
        if let Some(m) = piece.material {
            material = materials[m as usize];
        }
        if let Some(s) = piece.smoothing {
            smoothing = s;
        }
        if let Some(name) = piece.object {
            object = name;
        }
    }
    Some(obj)
}

/// The largest coordinate read from a file, in its own units (a thousand kilometres in
/// millimetres): beyond it a model is a mistake, and sums of coordinates lose all precision.
const MAX_COORDINATE: f64 = 1e12;

fn parse_number(word: &str) -> std::result::Result<f64, String> {
    let value: f64 =
        fast_float2::parse(word).map_err(|_| format!("expected a number, found \"{word}\""))?;
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
            words("  f\t1 22").collect::<Vec<_>>(),
            vec![(2, "f"), (4, "1"), (6, "22")]
        );
    }

    #[test]
    fn the_fast_paths_read_as_the_general_reader_does() {
        // Lines as `str::split` gives them, each cut at its first `#`.
        for text in ["", "\n", "a\nb", "v 1 # x\n#\n\nf 1#2\n", "a\r\n# b\nc#d#e"] {
            let expected: Vec<&str> = text
                .split('\n')
                .map(|l| l.split('#').next().unwrap_or(""))
                .collect();
            assert_eq!(lines(text).collect::<Vec<_>>(), expected, "{text:?}");
        }
        // A corner's first and third `/` parts, as `split('/')` gives them.
        for word in [
            "1", "1/2", "1//3", "1/2/3", "1/2/3/4", "/", "//", "-1//-2", "1/",
        ] {
            let mut parts = word.split('/');
            let expected = (parts.next().unwrap_or(""), parts.nth(1));
            assert_eq!(corner_parts(word), expected, "{word}");
        }
        // Plain vertices: what the general reader reads; the rest is left to it.
        let plain = |line: &str| plain_vertex(line.as_bytes());
        assert_eq!(plain("v 1 -2.5 3e2"), Some([1.0, -2.5, 300.0]));
        assert_eq!(plain("v\t1  2 3 0.5\r"), Some([1.0, 2.0, 3.0]));
        for other in [
            "v 1 2",
            "v 1 2 x",
            "v 1.5x 2 3",
            "v 1e13 0 0",
            "v nan 0 0",
            "v inf 0 0",
            " v 1 2 3",
            "vn 0 0 1",
            "v",
            "v1 2 3 4",
        ] {
            assert_eq!(plain(other), None, "{other}");
        }
        // Plain faces: the corners the general reader finds, at the same bytes.
        let general = |line: &str| -> Vec<PlainCorner> {
            words(line)
                .skip(1)
                .map(|(byte, word)| {
                    let (position, normal) = corner_parts(word);
                    PlainCorner {
                        position: parse_index(position).unwrap(),
                        position_byte: byte,
                        normal: normal.filter(|n| !n.is_empty()).map(|n| {
                            let at = n.as_ptr() as usize - line.as_ptr() as usize;
                            (parse_index(n).unwrap(), at)
                        }),
                    }
                })
                .collect()
        };
        let mut corners = [PlainCorner::default(); PLAIN_CORNERS];
        for line in [
            "f 1 2 3",
            "f -10 -7 -8",
            "f\t1/1/1  2/2/2 3/3/3\r",
            "f 1//4 2//5 3//6 7//-8",
            "f 1/ 2// 3/9 4/-1/",
            "f +1 2 -3",
            "f 1 2 3 4 5 6 7 8",
            "f 123456789012345678 2 3",
        ] {
            let count = plain_face(line.as_bytes(), &mut corners);
            assert_eq!(
                count.map(|n| corners[..n].to_vec()),
                Some(general(line)),
                "{line}"
            );
        }
        for other in [
            "f 1 2",
            "f",
            "f 1 2 x",
            "f 1/2/3/4 5 6",
            "f 1/x/3 2 3",
            "f 1 2 3 4 5 6 7 8 9",
            "f 1234567890123456789 2 3",
            "fo 1 2 3",
            " f 1 2 3",
            "f 1 2 3a",
            "f 1 2 //3",
            "f 1 2 3/4/x",
            "f 1 2 +-3",
            "f - 2 3",
            "l 1 2 3",
        ] {
            assert_eq!(plain_face(other.as_bytes(), &mut corners), None, "{other}");
        }
    }

    // Cases written from the Wavefront "Object Files (.obj)" appendix of the Advanced
    // Visualizer manual: relative indices, the v/vt/vn forms, polylines, groups.
    #[test]
    fn relative_indices_quads_and_index_forms() {
        let obj = parse("v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\nf -4 -3 -2 -1\nvt 0 0\nvn 0 0 1\nf 1/1/1 2/1/1 3//1\nl 1 2 3 4\nl 1/1 3/1\n").unwrap();
        assert_eq!(obj.face_corners(&obj.faces[0]), [0, 1, 2, 3]);
        assert_eq!(obj.face_corners(&obj.faces[1]), [0, 1, 2]);
        assert_eq!(obj.line_indices(&obj.lines[0]), [0, 1, 2, 3]);
        assert_eq!(obj.line_indices(&obj.lines[1]), [0, 2]);
    }

    #[test]
    fn indices_are_global_across_objects_and_groups_are_named() {
        let obj = parse("o first\nv 0 0 0\nv 1 0 0\nv 1 1 0\nf 1 2 3\no second\ng wall door\nv 5 5 5\nf 1 2 4 # uses the first object's vertices\n").unwrap();
        assert_eq!(obj.face_corners(&obj.faces[1]), [0, 1, 3]);
        assert_eq!(obj.groups[obj.faces[0].group as usize], "first");
        assert_eq!(obj.groups[obj.faces[1].group as usize], "wall door");
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

    // The `s` statement as the Wavefront appendix gives it: "s group_number ... If you do
    // not want to use a smoothing group, specify off or a value of 0."
    #[test]
    fn smoothing_groups_off_and_zero_and_unsaid() {
        let obj = parse(
            "v 0 0 0\nv 1 0 0\nv 1 1 0\nf 1 2 3\ns 4\nf 1 2 3\ns off\nf 1 2 3\ns 0\nf 1 2 3\ns 2\nf 1 2 3\n",
        )
        .unwrap();
        let s: Vec<Smoothing> = obj.faces.iter().map(|f| f.smoothing).collect();
        assert_eq!(
            s,
            [
                Smoothing::Unsaid,
                Smoothing::Group(4),
                Smoothing::Off,
                Smoothing::Off,
                Smoothing::Group(2)
            ]
        );
    }

    #[test]
    fn normals_and_their_indices() {
        let obj = parse(
            "v 0 0 0\nv 1 0 0\nv 1 1 0\nvn 0 0 1\nvn 0 0 -1\nf 1//1 2//2 3//-1\nf 1/1/2 2 3/5\n",
        )
        .unwrap();
        assert_eq!(obj.normals.len(), 2);
        assert_eq!(obj.face_normals(&obj.faces[0]), [0, 1, 1]);
        assert_eq!(obj.face_normals(&obj.faces[1]), [1, NO_NORMAL, NO_NORMAL]);
    }

    #[test]
    fn materials_and_libraries() {
        let obj = parse(
            "mtllib town.mtl extra.mtl\nv 0 0 0\nv 1 0 0\nv 1 1 0\nf 1 2 3\nusemtl roof tiles\nf 1 2 3\nusemtl brick\nf 1 2 3\nusemtl roof tiles\nl 1 2\n",
        )
        .unwrap();
        let m: Vec<&str> = obj
            .faces
            .iter()
            .map(|f| obj.materials[f.material as usize].as_str())
            .collect();
        assert_eq!(m, ["", "roof tiles", "brick"]);
        assert_eq!(obj.materials[obj.lines[0].material as usize], "roof tiles");
        assert_eq!(
            obj.material_libraries,
            [("town.mtl".to_owned(), 1), ("extra.mtl".to_owned(), 1)]
        );
    }

    #[test]
    fn bad_smoothing_and_normals_name_the_line_and_column() {
        let base = "v 0 0 0\nv 1 0 0\nv 1 1 0\n";
        let cases = [
            ("s\n", 4, 2, "expected a smoothing group"),
            ("s smooth\n", 4, 3, "found \"smooth\""),
            ("s -1\n", 4, 3, "found \"-1\""),
            ("s 1 2\n", 4, 5, "takes one smoothing group"),
            ("vn 0 x 1\n", 4, 6, "expected a number, found \"x\""),
            ("vn 0 1\n", 4, 7, "three coordinates after `vn`, found 2"),
            ("vn 0 0 1 1\n", 4, 10, "three coordinates; found more"),
            (
                "vn 0 0 1\nf 1//1 2//2 3//1\n",
                5,
                11,
                "normal index 2 is out of range: the file has 1 normals",
            ),
            (
                "f 1//1 2//1 3//1\n",
                4,
                6,
                "normal index 1 is out of range: the file has 0 normals",
            ),
            (
                "vn 0 0 1\nf 1//-2 2//1 3//1\n",
                5,
                6,
                "relative index -2 reaches before the first normal",
            ),
            (
                "vn 0 0 1\nf 1//0 2//1 3//1\n",
                5,
                6,
                "normal indices start at 1",
            ),
            (
                "vn 0 0 1\nf 1/1/a 2//1 3//1\n",
                5,
                7,
                "expected a normal index",
            ),
        ];
        for (tail, line, column, words) in cases {
            let text = format!("{base}{tail}");
            match parse(&text) {
                Err(Error::Scene {
                    line: l,
                    column: c,
                    message,
                    ..
                }) => {
                    assert_eq!((l, c), (line, column), "{tail:?}: {message}");
                    assert!(message.contains(words), "{tail:?}: {message}");
                }
                other => panic!("{tail:?}: expected an error, got {other:?}"),
            }
        }
    }

    /// A file large enough to be read in pieces, with every statement whose meaning carries
    /// from one piece into the next.
    fn big_file() -> String {
        use std::fmt::Write;
        let mut text = String::from("mtllib a.mtl\no first\n");
        let mut k = 0;
        while text.len() < 3 * PARALLEL_BYTES {
            writeln!(text, "v {k} 0.5 -1e-3\nv {k} 1 0\nv {k}.25 1 2\nvn 0 {k} 1").unwrap();
            match k % 97 {
                0 => writeln!(text, "s {}", k % 5).unwrap(),
                13 => writeln!(text, "usemtl m{}", k % 3).unwrap(),
                29 => writeln!(text, "g").unwrap(),
                41 => writeln!(text, "g part {}", k % 7).unwrap(),
                53 => writeln!(text, "o obj{}", k % 4).unwrap(),
                71 => writeln!(text, "s off").unwrap(),
                _ => {}
            }
            writeln!(text, "f -3//-1 -2//1 -1//{}\nl {} -1", k + 1, 3 * k + 1).unwrap();
            k += 1;
        }
        text
    }

    #[test]
    fn reading_in_pieces_gives_what_reading_whole_gives() {
        let text = big_file();
        let whole = read_piece(&text, true, true, text.len())
            .map(|p| join(vec![p]).unwrap())
            .unwrap();
        let pieces = parse(&text).unwrap();
        assert_eq!(split_at_line_ends(&text, 3).concat(), text);
        assert!(split_at_line_ends(&text, 3).len() == 3);
        assert_eq!(pieces, whole);
        assert!(whole.groups.len() > 5 && whole.materials.len() == 4);
        // A mistake deep in the file is reported from its own line, not a piece's.
        let bad = text.replacen("vn 0 2000 1", "vn 0 2000 q", 1);
        let line = bad[..bad.find(" q").unwrap()].matches('\n').count() + 1;
        match parse(&bad) {
            Err(Error::Scene {
                line: l,
                column: 11,
                ..
            }) => assert_eq!(l, line),
            other => panic!("{other:?}"),
        }
    }
}
