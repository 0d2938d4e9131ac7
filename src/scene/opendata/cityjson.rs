//! Reading CityJSON 2.0 city models (and the line-delimited CityJSONSeq form): the
//! transform, the vertices, Building and BuildingPart objects with MultiSurface,
//! CompositeSurface, Solid, MultiSolid and CompositeSolid geometries at one level of detail,
//! their semantic surfaces (roof, wall, ground...) as layers, and holes in surfaces; and
//! GeometryInstance geometries, a template placed by a matrix at a reference point.
//!
//! A vertex is its integers times the scale plus the translate (CityJSON 2.0, section
//! "Transform object"). The model becomes a mesh like an OBJ model (`mesh.rs`): the edges
//! drawn are its real edges (where surfaces meet at an angle, outlines, the rims of holes),
//! never the diagonals of a triangulation, and its surfaces hide what is behind them.
//!
//! The boundaries are nested arrays whose depth depends on the geometry's type; they are
//! read flat (`boundaries.rs`), one list of numbers per geometry, and one walk serves every
//! type.

use super::boundaries::{path_text, walk, Boundaries, Node, Values};
use super::earth::LocalFrame;
use super::grid::{Grid, GridToPlan};
use super::OpenDataError;
use crate::scene::obj::ObjFile;
use nalgebra::Point3;
use serde::de::{Deserializer, Error, IgnoredAny, MapAccess, SeqAccess, Visitor};
use serde::Deserialize;
use std::borrow::Cow;
use std::collections::{BTreeMap, HashMap};

/// Faces between surfaces of a city model meeting at more than this angle (degrees) are
/// drawn: its surfaces are flat, so any fold is a real edge; a flat wall cut into several
/// surfaces is not. Our own choice.
pub const CITY_CREASE_DEG: f64 = 1.0;

#[derive(Clone, Debug, Deserialize)]
pub struct Semantics<'a> {
    #[serde(borrow, default)]
    pub surfaces: Vec<SemanticSurface<'a>>,
    #[serde(default)]
    pub values: Option<Values>,
}

#[derive(Clone, Debug, Deserialize)]
pub struct SemanticSurface<'a> {
    #[serde(borrow, rename = "type")]
    pub kind: Cow<'a, str>,
}

/// A level of detail, written as a string ("2.2") or, in older files, a number.
#[derive(Clone, Debug)]
pub enum Lod<'a> {
    Text(Cow<'a, str>),
    Number(f64),
}

impl Lod<'_> {
    fn value(&self) -> Option<f64> {
        match self {
            Lod::Text(t) => t.trim().parse().ok(),
            Lod::Number(n) => Some(*n),
        }
    }

    fn text(&self) -> String {
        match self {
            Lod::Text(t) => t.to_string(),
            Lod::Number(n) => n.to_string(),
        }
    }
}

impl<'de: 'a, 'a> Deserialize<'de> for Lod<'a> {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        // As serde's untagged enum of a string and a number read it (its words when
        // neither), without buffering the value first.
        struct V;
        const NEITHER: &str = "data did not match any variant of untagged enum Lod";
        impl<'de> Visitor<'de> for V {
            type Value = Option<Lod<'de>>;
            fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
                f.write_str("a level of detail")
            }
            fn visit_borrowed_str<E: Error>(self, v: &'de str) -> Result<Self::Value, E> {
                Ok(Some(Lod::Text(Cow::Borrowed(v))))
            }
            fn visit_str<E: Error>(self, v: &str) -> Result<Self::Value, E> {
                Ok(Some(Lod::Text(Cow::Owned(v.to_owned()))))
            }
            fn visit_f64<E: Error>(self, v: f64) -> Result<Self::Value, E> {
                Ok(Some(Lod::Number(v)))
            }
            fn visit_u64<E: Error>(self, v: u64) -> Result<Self::Value, E> {
                Ok(Some(Lod::Number(v as f64)))
            }
            fn visit_i64<E: Error>(self, v: i64) -> Result<Self::Value, E> {
                Ok(Some(Lod::Number(v as f64)))
            }
            fn visit_bool<E: Error>(self, _: bool) -> Result<Self::Value, E> {
                Ok(None)
            }
            fn visit_unit<E: Error>(self) -> Result<Self::Value, E> {
                Ok(None)
            }
            fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<Self::Value, A::Error> {
                while seq.next_element::<IgnoredAny>()?.is_some() {}
                Ok(None)
            }
            fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Self::Value, A::Error> {
                while map.next_entry::<IgnoredAny, IgnoredAny>()?.is_some() {}
                Ok(None)
            }
        }
        d.deserialize_any(V)?
            .ok_or_else(|| D::Error::custom(NEITHER))
    }
}

#[derive(Clone, Debug, Deserialize)]
pub struct Geometry<'a> {
    #[serde(borrow, rename = "type")]
    pub kind: Cow<'a, str>,
    #[serde(borrow, default)]
    pub lod: Option<Lod<'a>>,
    #[serde(default)]
    pub boundaries: Option<Boundaries>,
    #[serde(borrow, default)]
    pub semantics: Option<Semantics<'a>>,
    /// A GeometryInstance's template, an index into the file's templates.
    #[serde(default)]
    pub template: Option<usize>,
    /// A GeometryInstance's 4 x 4 matrix, row by row.
    #[serde(rename = "transformationMatrix", default)]
    pub transformation_matrix: Option<Vec<f64>>,
}

/// Geometries defined once and placed many times by GeometryInstance geometries
/// (CityJSON 2.0, "Geometry templates"): their vertices are real coordinates relative to
/// each instance's reference point, not compressed by the transform.
#[derive(Clone, Debug, Default, Deserialize)]
pub struct Templates<'a> {
    #[serde(borrow, default)]
    pub templates: Vec<Geometry<'a>>,
    #[serde(rename = "vertices-templates", default)]
    pub vertices: Vec<[f64; 3]>,
}

#[derive(Clone, Debug, Deserialize)]
pub struct CityObject<'a> {
    #[serde(borrow, rename = "type")]
    pub kind: Cow<'a, str>,
    /// Boxed: a list grown one geometry at a time keeps room for four, and a city has
    /// hundreds of thousands of objects of one geometry.
    #[serde(borrow, default)]
    pub geometry: Box<[Geometry<'a>]>,
    #[serde(borrow, default)]
    pub children: Vec<Cow<'a, str>>,
}

#[derive(Clone, Debug, Deserialize)]
pub struct Transform {
    pub scale: [f64; 3],
    pub translate: [f64; 3],
}

#[derive(Clone, Debug, Default, Deserialize)]
pub struct Metadata {
    #[serde(rename = "referenceSystem", default)]
    pub reference_system: Option<String>,
}

/// A CityJSON object, or one CityJSONFeature of a sequence. Its words are borrowed from
/// the file's bytes where they can be (no escapes in them).
#[derive(Debug, Deserialize)]
pub struct CityFile<'a> {
    #[serde(borrow, rename = "type")]
    pub kind: Cow<'a, str>,
    #[serde(default)]
    pub version: Option<String>,
    #[serde(default)]
    pub transform: Option<Transform>,
    #[serde(default)]
    pub metadata: Option<Metadata>,
    #[serde(borrow, rename = "CityObjects", default)]
    pub city_objects: BTreeMap<Cow<'a, str>, CityObject<'a>>,
    #[serde(default)]
    pub vertices: Vec<[i64; 3]>,
    #[serde(borrow, rename = "geometry-templates", default)]
    pub geometry_templates: Option<Templates<'a>>,
}

/// How the file's coordinates reach the plan.
pub enum Placing {
    /// Through the origin's latitude and longitude (exact, turned to true north); heights
    /// are lowered by `height` (the origin's height in the file's vertical system).
    Geodesic {
        /// Grid metres to plan metres.
        map: GridToPlan,
        /// The origin's height in the file's vertical system.
        height: f64,
    },
    /// Grid metres less an origin, grid north as the plan's y.
    Shift {
        /// The grid point (and height) that is the plan's origin.
        origin: [f64; 3],
    },
}

impl Placing {
    /// How a file in `reference_system` is placed: by the scene's location through the
    /// grid, or around a grid origin the scene gives, or (neither given) around the middle
    /// of the model's ground.
    pub fn choose(
        reference_system: Option<&str>,
        frame: Option<(&LocalFrame, f64)>,
        origin: Option<(f64, f64)>,
    ) -> Result<Option<Placing>, String> {
        match (frame, origin) {
            (_, Some((e, n))) => Ok(Some(Placing::Shift {
                origin: [e, n, frame.map_or(0.0, |(_, h)| h)],
            })),
            (Some((frame, height)), None) => {
                let name = reference_system.ok_or(
                    "the file names no reference system (metadata.referenceSystem), so the \
                     scene's location cannot be found in it; give the item an origin: \
                     (easting, northing)",
                )?;
                let grid = Grid::from_name(name)?;
                let (lat, lon) = frame.origin_deg();
                let origin = grid.to_grid(lat, lon)?;
                Ok(Some(Placing::Geodesic {
                    map: GridToPlan::new(&grid, frame, origin)?,
                    height,
                }))
            }
            (None, None) => Ok(None),
        }
    }

    /// A point of the file (grid metres and height) on the plan.
    fn place(&self, p: [f64; 3]) -> Point3<f64> {
        match self {
            Placing::Geodesic { map, height } => {
                let [x, y, fall] = map.plan(p[0], p[1]);
                Point3::new(x, y, p[2] - height - fall)
            }
            Placing::Shift { origin } => {
                Point3::new(p[0] - origin[0], p[1] - origin[1], p[2] - origin[2])
            }
        }
    }
}

/// A city model read: the mesh of its chosen surfaces, by group (a city object's id and a
/// semantic layer), and what was left out.
#[derive(Debug, Default)]
pub struct CityModel {
    /// The chosen surfaces as a mesh in plan metres (its groups unnamed: their names are
    /// `group_names`).
    pub mesh: ObjFile,
    /// For each group of the mesh: the city object's id and the layer (`roof`, `wall`,
    /// `ground`... or `building` where the surface has no semantics).
    pub group_names: Vec<(String, String)>,
    /// What was left out.
    pub notes: Vec<String>,
    /// The file's `metadata.referenceSystem`.
    pub reference_system: Option<String>,
}

/// The layer of a semantic surface type: `RoofSurface` -> `roof`.
pub fn layer_of(kind: &str) -> String {
    kind.strip_suffix("Surface")
        .unwrap_or(kind)
        .to_ascii_lowercase()
}

/// Reads a CityJSON file (`sequence`: a CityJSONSeq, one JSON text per line).
pub fn read_cityjson(
    bytes: &[u8],
    sequence: bool,
    lod: Option<&str>,
    placing: impl FnOnce(Option<&str>) -> Result<Option<Placing>, String>,
) -> Result<CityModel, OpenDataError> {
    let mut parts: Vec<(Option<usize>, CityFile)> = Vec::new();
    if sequence {
        for (number, line) in bytes.split(|&b| b == b'\n').enumerate() {
            if line.iter().all(u8::is_ascii_whitespace) {
                continue;
            }
            let file: CityFile = serde_json::from_slice(line).map_err(|e| {
                let mut error = OpenDataError::json(e);
                error.line_column = error.line_column.map(|(_, c)| (number + 1, c));
                error
            })?;
            parts.push((Some(number + 1), file));
        }
    } else {
        let file: CityFile = serde_json::from_slice(bytes).map_err(OpenDataError::json)?;
        parts.push((None, file));
    }
    let Some((_, header)) = parts.first() else {
        return Err(OpenDataError::plain(
            "$",
            "the file is empty; expected CityJSON",
        ));
    };
    if header.kind != "CityJSON" {
        return Err(OpenDataError::plain(
            "$.type",
            &format!("expected \"CityJSON\", found {:?}", header.kind),
        ));
    }
    if let Some(version) = &header.version {
        if !matches!(version.as_str(), "2.0" | "1.1") {
            return Err(OpenDataError::plain(
                "$.version",
                &format!("CityJSON {version} is not read; pansite reads versions 2.0 and 1.1"),
            ));
        }
    }
    let transform = header.transform.clone().ok_or_else(|| {
        OpenDataError::plain(
            "$.transform",
            "the file has no transform (CityJSON 2.0 requires one)",
        )
    })?;
    if transform.scale.iter().any(|s| *s <= 0.0) {
        return Err(OpenDataError::plain(
            "$.transform.scale",
            &format!(
                "expected scales greater than zero, found {:?}",
                transform.scale
            ),
        ));
    }
    let reference_system = header
        .metadata
        .as_ref()
        .and_then(|m| m.reference_system.clone());
    let real = |v: &[i64; 3]| -> [f64; 3] {
        [0, 1, 2].map(|k| v[k] as f64 * transform.scale[k] + transform.translate[k])
    };
    let placing = match placing(reference_system.as_deref())
        .map_err(|m| OpenDataError::plain("$.metadata.referenceSystem", &m))?
    {
        Some(p) => p,
        None => {
            // Around the middle of the model's plan, on its lowest point.
            let (mut lo, mut hi) = ([f64::INFINITY; 3], [f64::NEG_INFINITY; 3]);
            for (_, part) in &parts {
                for v in &part.vertices {
                    let p = real(v);
                    for k in 0..3 {
                        lo[k] = lo[k].min(p[k]);
                        hi[k] = hi[k].max(p[k]);
                    }
                }
            }
            if lo[0].is_finite() {
                Placing::Shift {
                    origin: [0.5 * (lo[0] + hi[0]), 0.5 * (lo[1] + hi[1]), lo[2]],
                }
            } else {
                Placing::Shift { origin: [0.0; 3] }
            }
        }
    };
    let wanted_lod = match lod {
        Some(text) => Some(text.trim().parse::<f64>().map_err(|_| {
            OpenDataError::plain(
                "lod",
                &format!("expected a level of detail such as \"2.2\", found {text:?}"),
            )
        })?),
        None => None,
    };

    let mut model = CityModel {
        reference_system,
        ..CityModel::default()
    };
    let mut skipped_kinds: BTreeMap<String, usize> = BTreeMap::new();
    // Templates live in the file's (or the sequence's first line's) root.
    let templates = parts[0].1.geometry_templates.clone();
    let templates = templates.as_ref();
    // The layer of each semantic surface type met, worked out once.
    let mut layer_names: HashMap<&str, String> = HashMap::new();
    // A surface's first ring, its indices moved to the mesh's numbering.
    let mut outer: Vec<u32> = Vec::new();
    for (line, part) in &parts {
        let base = model.mesh.positions.len() as u32;
        model
            .mesh
            .positions
            .extend(place_vertices(&part.vertices, |v| placing.place(real(v))));
        let count = part.vertices.len() as u32;
        let with_parts: std::collections::HashSet<&str> = part
            .city_objects
            .iter()
            .filter(|(_, o)| o.kind == "BuildingPart" && !o.geometry.is_empty())
            .map(|(id, _)| id.as_ref())
            .collect();
        for (id, object) in &part.city_objects {
            // Paths are spelled out only for a message.
            let object_path = || match line {
                Some(l) => format!("line {l}, $.CityObjects[{id:?}]"),
                None => format!("$.CityObjects[{id:?}]"),
            };
            if !matches!(object.kind.as_ref(), "Building" | "BuildingPart") {
                *skipped_kinds.entry(object.kind.to_string()).or_default() += 1;
                continue;
            }
            // A building drawn by its parts: its own (coarser) geometry is left out.
            if object.kind == "Building"
                && object
                    .children
                    .iter()
                    .any(|c| with_parts.contains(c.as_ref()))
            {
                continue;
            }
            let lods = || {
                object
                    .geometry
                    .iter()
                    .filter_map(|g| resolved(g, templates).lod.as_ref().and_then(Lod::value))
            };
            let chosen = match wanted_lod {
                Some(l) => l,
                None => lods().fold(f64::NEG_INFINITY, f64::max),
            };
            let mut drawn = false;
            for (g, geometry) in object.geometry.iter().enumerate() {
                let mut template_path = None;
                let at = |template_path: &Option<String>| {
                    template_path
                        .clone()
                        .unwrap_or_else(|| format!("{}.geometry[{g}]", object_path()))
                };
                let (mut base, mut count) = (base, count);
                let instance = geometry;
                let geometry = resolved(geometry, templates);
                // An instance's template vertices where it puts them (checked whatever
                // its level of detail, so that a broken instance is never passed over).
                let placed = match instance.kind.as_ref() {
                    "GeometryInstance" => Some(place_instance(
                        instance,
                        templates,
                        &part.vertices,
                        &real,
                        &at(&None),
                    )?),
                    _ => None,
                };
                if geometry.lod.as_ref().and_then(Lod::value) != Some(chosen) {
                    continue;
                }
                if let Some(placed) = placed {
                    // The placed vertices join the mesh; the template's boundaries index
                    // them.
                    base = model.mesh.positions.len() as u32;
                    count = placed.len() as u32;
                    model
                        .mesh
                        .positions
                        .extend(placed.into_iter().map(|p| placing.place(p)));
                    template_path = Some(format!(
                        "$.geometry-templates.templates[{}]",
                        instance.template.unwrap_or(0)
                    ));
                }
                let depth = match geometry.kind.as_ref() {
                    "MultiSurface" | "CompositeSurface" => 3,
                    "Solid" => 4,
                    "MultiSolid" | "CompositeSolid" => 5,
                    other => {
                        model.notes.push(format!(
                            "{id}: a {other} geometry (lod {}) is not drawn",
                            geometry.lod.as_ref().map_or(String::new(), Lod::text)
                        ));
                        continue;
                    }
                };
                let Some(boundaries) = &geometry.boundaries else {
                    return Err(OpenDataError::plain(
                        &at(&template_path),
                        "the geometry has no boundaries",
                    ));
                };
                let kinds = geometry.semantics.as_ref().map_or(&[][..], |s| &s.surfaces);
                for kind in kinds {
                    if !layer_names.contains_key(kind.kind.as_ref()) {
                        layer_names.insert(kind.kind.as_ref(), layer_of(&kind.kind));
                    }
                }
                let layers: Vec<&str> = kinds
                    .iter()
                    .map(|k| layer_names[k.kind.as_ref()].as_str())
                    .collect();
                let values = geometry.semantics.as_ref().and_then(|s| s.values.as_ref());
                // The groups of this geometry, by layer (a handful).
                let mut group_of_layer: Vec<(&str, u32)> = Vec::new();
                let mut problem = None;
                walk(boundaries, values, depth, &mut |rings, semantic, path| {
                    if problem.is_some() {
                        return;
                    }
                    let layer = semantic
                        .and_then(|s| layers.get(s as usize).copied())
                        .unwrap_or("building");
                    for (r, ring) in rings.iter().enumerate() {
                        if let Some(&bad) = ring.iter().find(|&&i| i >= count) {
                            problem = Some(OpenDataError::plain(
                                &format!(
                                    "{}.boundaries{}[{r}]",
                                    at(&template_path),
                                    path_text(path)
                                ),
                                &format!(
                                    "vertex index {bad} is beyond the {count} vertices{}",
                                    if line.is_some() {
                                        " of its feature"
                                    } else {
                                        ""
                                    }
                                ),
                            ));
                            return;
                        }
                    }
                    let group = match group_of_layer.iter().find(|(l, _)| *l == layer) {
                        Some(&(_, group)) => group,
                        None => {
                            let group = model.group_names.len() as u32;
                            model.group_names.push((id.to_string(), layer.to_owned()));
                            group_of_layer.push((layer, group));
                            group
                        }
                    };
                    let face = model.mesh.faces.len() as u32;
                    outer.clear();
                    outer.extend(rings[0].iter().map(|i| i + base));
                    model.mesh.push_face(&outer, group);
                    for hole in &rings[1..] {
                        model
                            .mesh
                            .holes
                            .push((face, hole.iter().map(|i| i + base).collect()));
                    }
                });
                if let Some(problem) = problem {
                    return Err(problem);
                }
                drawn = true;
            }
            if !drawn && !object.geometry.is_empty() {
                model.notes.push(format!(
                    "{id}: no geometry at lod {chosen} (it has {})",
                    lods().map(|l| l.to_string()).collect::<Vec<_>>().join(", ")
                ));
            }
        }
    }
    for (kind, count) in skipped_kinds {
        model.notes.push(format!(
            "{count} {kind} object(s) left out (pansite draws buildings)"
        ));
    }
    // The items take their names from `group_names` (through `add_mesh_named`): the mesh
    // keeps an empty name per group, for their count.
    model.mesh.groups = vec![String::new(); model.group_names.len()];
    if model.mesh.groups.is_empty() {
        model.mesh.groups.push(String::new());
    }
    Ok(model)
}

/// The geometry a city object's geometry stands for: a GeometryInstance's template (when
/// the file has it), any other geometry itself.
fn resolved<'g, 'a>(
    geometry: &'g Geometry<'a>,
    templates: Option<&'g Templates<'a>>,
) -> &'g Geometry<'a> {
    if geometry.kind != "GeometryInstance" {
        return geometry;
    }
    geometry
        .template
        .and_then(|t| templates?.templates.get(t))
        .unwrap_or(geometry)
}

/// The vertices of a GeometryInstance's template where the instance puts them, in the
/// file's coordinates: each template vertex `v` taken through the instance's 4 x 4 matrix
/// (row by row, `v` as the column (x, y, z, 1)), then moved by the instance's reference
/// point, its one boundary index into the file's vertices (CityJSON 2.0, "Geometry
/// templates"; the order, matrix then reference point, from memory).
fn place_instance(
    instance: &Geometry,
    templates: Option<&Templates>,
    vertices: &[[i64; 3]],
    real: &impl Fn(&[i64; 3]) -> [f64; 3],
    at: &str,
) -> Result<Vec<[f64; 3]>, OpenDataError> {
    let templates = templates.ok_or_else(|| {
        OpenDataError::plain(
            at,
            "a GeometryInstance, but the file has no geometry-templates",
        )
    })?;
    let index = instance
        .template
        .ok_or_else(|| OpenDataError::plain(at, "a GeometryInstance needs a \"template\" index"))?;
    if index >= templates.templates.len() {
        return Err(OpenDataError::plain(
            &format!("{at}.template"),
            &format!(
                "template {index} is beyond the file's {} templates",
                templates.templates.len()
            ),
        ));
    }
    let reference = match instance.boundaries.as_ref().map(Boundaries::root) {
        Some(Node::Ring(&[reference])) => reference,
        _ => {
            return Err(OpenDataError::plain(
                &format!("{at}.boundaries"),
                "expected one vertex index, the instance's reference point, such as [0]",
            ))
        }
    };
    let reference = vertices.get(reference as usize).ok_or_else(|| {
        OpenDataError::plain(
            &format!("{at}.boundaries[0]"),
            &format!(
                "vertex index {reference} is beyond the {} vertices",
                vertices.len()
            ),
        )
    })?;
    let m = instance
        .transformation_matrix
        .as_deref()
        .filter(|m| m.len() == 16 && m.iter().all(|v| v.is_finite()))
        .ok_or_else(|| {
            OpenDataError::plain(
                &format!("{at}.transformationMatrix"),
                "expected 16 finite numbers, a 4 x 4 matrix row by row",
            )
        })?;
    let origin = real(reference);
    Ok(templates
        .vertices
        .iter()
        .map(|v| {
            let row = |r: usize| {
                m[4 * r] * v[0] + m[4 * r + 1] * v[1] + m[4 * r + 2] * v[2] + m[4 * r + 3]
            };
            [0, 1, 2].map(|k| row(k) + origin[k])
        })
        .collect())
}

/// The file's vertices placed in the plan by `place`: a large model's in pieces on every
/// core, in order.
fn place_vertices(
    vertices: &[[i64; 3]],
    place: impl Fn(&[i64; 3]) -> Point3<f64> + Sync,
) -> Vec<Point3<f64>> {
    const PIECE: usize = 1 << 14;
    let pieces: Vec<&[[i64; 3]]> = vertices.chunks(PIECE).collect();
    let placed = crate::cores::in_order(pieces.len(), |k| {
        pieces[k].iter().map(&place).collect::<Vec<_>>()
    });
    let mut all = Vec::with_capacity(vertices.len());
    for piece in placed {
        all.extend(piece);
    }
    all
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A unit cube as a Solid, its top a RoofSurface with a square hole, scaled by the
    /// transform. Hand-made after the CityJSON 2.0 specification's examples.
    const CUBE: &str = r#"{"type": "CityJSON", "version": "2.0",
      "transform": {"scale": [0.001, 0.001, 0.001], "translate": [1000.0, 2000.0, 5.0]},
      "CityObjects": {"b1": {"type": "Building", "geometry": [
        {"type": "Solid", "lod": "1", "boundaries": [[[[0, 3, 2, 1]], [[4, 5, 6, 7]]]]},
        {"type": "Solid", "lod": "2.2", "boundaries": [[
          [[0, 3, 2, 1]], [[4, 5, 6, 7], [8, 9, 10, 11]], [[0, 1, 5, 4]], [[1, 2, 6, 5]],
          [[2, 3, 7, 6]], [[3, 0, 4, 7]]]],
         "semantics": {"surfaces": [{"type": "GroundSurface"}, {"type": "RoofSurface"},
            {"type": "WallSurface"}], "values": [[0, 1, 2, 2, 2, 2]]}}]},
        "t1": {"type": "SolitaryVegetationObject", "geometry": []}},
      "vertices": [[0, 0, 0], [10000, 0, 0], [10000, 10000, 0], [0, 10000, 0],
        [0, 0, 10000], [10000, 0, 10000], [10000, 10000, 10000], [0, 10000, 10000],
        [4000, 4000, 10000], [6000, 4000, 10000], [6000, 6000, 10000], [4000, 6000, 10000]]}"#;

    fn shift(origin: [f64; 3]) -> impl FnOnce(Option<&str>) -> Result<Option<Placing>, String> {
        move |_| Ok(Some(Placing::Shift { origin }))
    }

    /// The form a level of detail had before: serde's untagged enum, the reference here.
    mod before {
        #[derive(Debug, serde::Deserialize)]
        #[serde(untagged)]
        pub enum Lod {
            Text(String),
            Number(f64),
        }
    }

    #[derive(Debug, Deserialize)]
    struct HeldLod<T> {
        lod: T,
    }

    #[test]
    fn a_level_of_detail_reads_as_the_untagged_enum_did() {
        for good in [r#""2.2""#, r#"" 1 ""#, "2", "1.5", "-1"] {
            let text = format!("{{\"lod\": {good}}}");
            let ours = serde_json::from_str::<HeldLod<Lod>>(&text).unwrap().lod;
            let serde = serde_json::from_str::<HeldLod<before::Lod>>(&text)
                .unwrap()
                .lod;
            let value = match serde {
                before::Lod::Text(t) => t.trim().parse().ok(),
                before::Lod::Number(n) => Some(n),
            };
            assert_eq!(ours.value(), value, "{good}");
        }
        for bad in ["true", "[1, [2]]", r#"{"a": 1}"#] {
            let text = format!("{{\"lod\": {bad}, \"after\": 1}}");
            let ours = serde_json::from_str::<HeldLod<Lod>>(&text).unwrap_err();
            let serde = serde_json::from_str::<HeldLod<before::Lod>>(&text).unwrap_err();
            assert_eq!(ours.to_string(), serde.to_string(), "{bad}");
        }
    }

    #[test]
    fn vertices_are_integers_times_scale_plus_translate() {
        // CityJSON 2.0, "Transform object": v = i * scale + translate.
        let model = read_cityjson(CUBE.as_bytes(), false, None, shift([0.0; 3])).unwrap();
        assert_eq!(model.mesh.positions[6], Point3::new(1010.0, 2010.0, 15.0));
        assert_eq!(model.mesh.positions[8], Point3::new(1004.0, 2004.0, 15.0));
    }

    #[test]
    fn the_highest_lod_with_its_semantic_layers_and_holes() {
        let model =
            read_cityjson(CUBE.as_bytes(), false, None, shift([1000.0, 2000.0, 5.0])).unwrap();
        assert_eq!(model.mesh.faces.len(), 6);
        assert_eq!(model.mesh.holes.len(), 1);
        let layers: Vec<&str> = model.group_names.iter().map(|(_, l)| l.as_str()).collect();
        assert_eq!(layers, ["ground", "roof", "wall"]);
        assert!(model
            .notes
            .iter()
            .any(|n| n.contains("SolitaryVegetationObject")));
        let lod1 = read_cityjson(CUBE.as_bytes(), false, Some("1"), shift([0.0; 3])).unwrap();
        assert_eq!(lod1.mesh.faces.len(), 2);
        assert_eq!(lod1.group_names[0].1, "building");
    }

    #[test]
    fn a_vertex_index_out_of_range_is_named_by_its_path() {
        let bad = CUBE.replace(
            "[[4, 5, 6, 7], [8, 9, 10, 11]]",
            "[[4, 5, 6, 7], [8, 9, 10, 12]]",
        );
        let error = read_cityjson(bad.as_bytes(), false, None, shift([0.0; 3])).unwrap_err();
        assert!(
            error
                .at
                .contains("$.CityObjects[\"b1\"].geometry[1].boundaries[0][1][1]"),
            "{error:?}"
        );
        assert!(error.message.contains("12"), "{error:?}");
    }

    #[test]
    fn a_sequence_shares_the_first_lines_transform() {
        let seq = concat!(
            r#"{"type": "CityJSON", "version": "2.0", "transform": {"scale": [0.5, 0.5, 0.5], "translate": [10, 0, 0]}, "CityObjects": {}, "vertices": []}"#,
            "\n",
            r#"{"type": "CityJSONFeature", "id": "a", "CityObjects": {"a": {"type": "Building", "geometry": [{"type": "MultiSurface", "lod": "1", "boundaries": [[[0, 1, 2]]]}]}}, "vertices": [[0, 0, 0], [2, 0, 0], [2, 2, 0]]}"#,
            "\n",
            r#"{"type": "CityJSONFeature", "id": "b", "CityObjects": {"b": {"type": "Building", "geometry": [{"type": "MultiSurface", "lod": "1", "boundaries": [[[0, 1, 2]]]}]}}, "vertices": [[4, 0, 0], [6, 0, 0], [6, 2, 0]]}"#,
            "\n"
        );
        let model = read_cityjson(seq.as_bytes(), true, None, shift([0.0; 3])).unwrap();
        assert_eq!(model.mesh.faces.len(), 2);
        // The second feature's indices point at its own vertices.
        assert_eq!(model.mesh.face_corners(&model.mesh.faces[1]), [3, 4, 5]);
        assert_eq!(model.mesh.positions[3], Point3::new(12.0, 0.0, 0.0));
        let broken = seq.replace("\"b\", \"CityObjects\"", "\"b\" \"CityObjects\"");
        let error = read_cityjson(broken.as_bytes(), true, None, shift([0.0; 3])).unwrap_err();
        assert_eq!(error.line_column.map(|(l, _)| l), Some(3));
    }

    /// A template (a unit square, a MultiSurface with a wall and a roof triangle, lod 2)
    /// placed twice in one building: once as it is at the reference point (10, 20, 0), once
    /// turned a quarter clockwise seen from above, doubled in x and y and lifted 0.5 by its
    /// matrix at (30, 20, 0). The vertex (1, 0, 0) goes, by hand, to (0 x 1 + 2 x 0 + 0,
    /// -2 x 1 + 0, 0.5) = (0, -2, 0.5) before the reference point is added.
    const INSTANCES: &str = r#"{"type": "CityJSON", "version": "2.0",
      "transform": {"scale": [0.01, 0.01, 0.01], "translate": [0, 0, 0]},
      "CityObjects": {"kiosks": {"type": "Building", "geometry": [
        {"type": "GeometryInstance", "template": 0, "boundaries": [0],
         "transformationMatrix": [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1]},
        {"type": "GeometryInstance", "template": 0, "boundaries": [1],
         "transformationMatrix": [0, 2, 0, 0, -2, 0, 0, 0, 0, 0, 1, 0.5, 0, 0, 0, 1]}]}},
      "vertices": [[1000, 2000, 0], [3000, 2000, 0]],
      "geometry-templates": {
        "templates": [{"type": "MultiSurface", "lod": "2",
          "boundaries": [[[0, 1, 2, 3]], [[0, 1, 4]]],
          "semantics": {"surfaces": [{"type": "WallSurface"}, {"type": "RoofSurface"}],
                        "values": [0, 1]}}],
        "vertices-templates": [[0, 0, 0], [1, 0, 0], [1, 0, 1], [0, 0, 1], [0.5, 0.5, 1.5]]}}"#;

    #[test]
    fn an_instance_places_its_template_by_matrix_then_reference_point() {
        let model = read_cityjson(INSTANCES.as_bytes(), false, None, shift([0.0; 3])).unwrap();
        // Two instances of two surfaces each; five vertices each after the file's own two.
        assert_eq!(model.mesh.faces.len(), 4);
        assert_eq!(model.mesh.positions.len(), 2 + 5 + 5);
        let near = |p: Point3<f64>, q: [f64; 3]| (p - Point3::from(q)).norm() < 1e-9;
        // The first as it is, at (10, 20, 0).
        assert!(near(model.mesh.positions[2 + 1], [11.0, 20.0, 0.0]));
        assert!(near(model.mesh.positions[2 + 4], [10.5, 20.5, 1.5]));
        // The second turned, doubled and lifted, at (30, 20, 0).
        assert!(near(model.mesh.positions[7 + 1], [30.0, 18.0, 0.5]));
        assert!(near(model.mesh.positions[7 + 4], [31.0, 19.0, 2.0]));
        // Its faces index its own placed vertices, with the template's semantics.
        assert_eq!(model.mesh.face_corners(&model.mesh.faces[2]), [7, 8, 9, 10]);
        let layers: Vec<&str> = model.group_names.iter().map(|(_, l)| l.as_str()).collect();
        assert_eq!(layers, ["wall", "roof", "wall", "roof"]);
        assert!(model.notes.is_empty(), "{:?}", model.notes);
    }

    /// A Building drawn by two BuildingParts (CityJSON 2.0 specification, "Building,
    /// BuildingPart and BuildingInstallation": a BuildingPart is a child of its Building,
    /// listed in the Building's `children` and naming it in `parents`): the first part a
    /// 10 m box as a CompositeSurface with roof, wall and ground semantics, the second a
    /// box beside it as a Solid without semantics; the Building itself carries a coarser
    /// MultiSurface (lod 1, one face over both). The specification's "Geometry objects":
    /// a CompositeSurface's boundaries are surfaces of rings, as a MultiSurface's; a
    /// Solid's are shells of such surfaces.
    const PARTS: &str = r#"{"type": "CityJSON", "version": "2.0",
      "transform": {"scale": [0.001, 0.001, 0.001], "translate": [0, 0, 0]},
      "CityObjects": {
        "hall": {"type": "Building", "children": ["hall-east", "hall-west"],
          "geometry": [{"type": "MultiSurface", "lod": "1",
            "boundaries": [[[4, 5, 14, 15]]]}]},
        "hall-east": {"type": "BuildingPart", "parents": ["hall"],
          "geometry": [{"type": "CompositeSurface", "lod": "2.2",
            "boundaries": [[[0, 3, 2, 1]], [[4, 5, 6, 7]], [[0, 1, 5, 4]], [[1, 2, 6, 5]],
              [[2, 3, 7, 6]], [[3, 0, 4, 7]]],
            "semantics": {"surfaces": [{"type": "GroundSurface"}, {"type": "RoofSurface"},
              {"type": "WallSurface"}], "values": [0, 1, 2, 2, 2, 2]}}]},
        "hall-west": {"type": "BuildingPart", "parents": ["hall"],
          "geometry": [{"type": "Solid", "lod": "2.2",
            "boundaries": [[[[8, 11, 10, 9]], [[12, 13, 14, 15]], [[8, 9, 13, 12]],
              [[9, 10, 14, 13]], [[10, 11, 15, 14]], [[11, 8, 12, 15]]]]}]}},
      "vertices": [[0, 0, 0], [10000, 0, 0], [10000, 10000, 0], [0, 10000, 0],
        [0, 0, 10000], [10000, 0, 10000], [10000, 10000, 10000], [0, 10000, 10000],
        [-10000, 0, 0], [0, 0, 0], [0, 10000, 0], [-10000, 10000, 0],
        [-10000, 0, 6000], [0, 0, 6000], [0, 10000, 6000], [-10000, 10000, 6000]]}"#;

    #[test]
    fn a_building_is_drawn_by_its_parts_their_composite_surface_and_solid_read() {
        let model = read_cityjson(PARTS.as_bytes(), false, None, shift([0.0; 3])).unwrap();
        assert!(model.notes.is_empty(), "{:?}", model.notes);
        // Six faces a part; the Building's own face left out.
        assert_eq!(model.mesh.faces.len(), 12);
        let mut groups: Vec<(&str, &str)> = model
            .group_names
            .iter()
            .map(|(id, layer)| (id.as_str(), layer.as_str()))
            .collect();
        groups.sort();
        assert_eq!(
            groups,
            [
                ("hall-east", "ground"),
                ("hall-east", "roof"),
                ("hall-east", "wall"),
                ("hall-west", "building")
            ]
        );
        // The CompositeSurface's roof at 10 m and the Solid's at 6 m, as the integers
        // times the scale give them (and the grounds at 0).
        let top = |face: usize| {
            model
                .mesh
                .face_corners(&model.mesh.faces[face])
                .iter()
                .map(|&i| model.mesh.positions[i as usize].z)
                .fold(f64::MIN, f64::max)
        };
        let mut tops: Vec<f64> = (0..12).map(top).collect();
        tops.sort_by(f64::total_cmp);
        tops.dedup();
        assert_eq!(tops, [0.0, 6.0, 10.0]);

        // A Building that lists no parts is drawn by its own face.
        let without_parts = PARTS.replace(
            r#""children": ["hall-east", "hall-west"]"#,
            r#""children": []"#,
        );
        let model = read_cityjson(without_parts.as_bytes(), false, None, shift([0.0; 3])).unwrap();
        assert_eq!(model.mesh.faces.len(), 13);
        assert!(model.group_names.iter().any(|(id, _)| id == "hall"));
    }

    #[test]
    fn a_broken_instance_is_named_by_its_path() {
        for (from, to, at, words) in [
            (
                r#""template": 0, "boundaries": [1]"#,
                r#""template": 3, "boundaries": [1]"#,
                r#"geometry[1].template"#,
                "template 3 is beyond the file's 1 templates",
            ),
            (
                r#""boundaries": [1]"#,
                r#""boundaries": [7]"#,
                r#"geometry[1].boundaries[0]"#,
                "vertex index 7",
            ),
            (
                r#"0, 0, 1, 0.5, 0, 0, 0, 1]"#,
                r#"0, 0, 1, 0.5]"#,
                r#"geometry[1].transformationMatrix"#,
                "16 finite numbers",
            ),
            (
                r#"[[0, 1, 2, 3]], [[0, 1, 4]]"#,
                r#"[[0, 1, 2, 3]], [[0, 1, 5]]"#,
                r#"$.geometry-templates.templates[0].boundaries[1][0]"#,
                "vertex index 5",
            ),
        ] {
            let bad = INSTANCES.replace(from, to);
            assert_ne!(bad, INSTANCES);
            let error = read_cityjson(bad.as_bytes(), false, None, shift([0.0; 3])).unwrap_err();
            assert!(error.at.contains(at), "{error:?}");
            assert!(error.message.contains(words), "{error:?}");
        }
    }
}
