//! Turning a polygon mesh (an OBJ file) into the edges a person would draw: outlines
//! (boundary edges), creases, edges shared by three or more faces, explicit `l` lines, and
//! the smooth edges that become the outline from a given standpoint (silhouettes). The
//! edges between coplanar or nearly coplanar faces (triangulation diagonals, subdivided flat
//! walls) are never drawn.
//!
//! Method: weld positions that coincide within a tolerance relative to the model's size
//! (exporters split vertices along seams of normals and textures); list every face edge as
//! (low vertex, high vertex, face), sort, and walk the runs of equal edges. A face's normal
//! comes from Newell's method (Newell 1972; see Sutherland, Sproull and Schumacker, "A
//! characterization of ten hidden-surface algorithms", ACM Computing Surveys 6(1), 1974,
//! from memory), which is exact for planar polygons and robust for slightly warped ones.
//!
//! ## OBJ models (design notes)
//!
//! `pansite render model.obj --at X,Y` draws a model on its own (`--up y|z`, `--unit
//! m|cm|mm|in|ft`, `--crease DEG`); a scene places models with `Model(file: "...", at: (x, y, z),
//! turn: DEG, scale: K, up: Y, unit: Metre, crease: DEG)`, the file relative to the scene.
//!
//! - **Reader** (`scene/obj.rs`): hand-written, because the crates on offer fell short of what a
//!   user needs told: obj-rs and tobj report a malformed number without its line (and obj-rs
//!   keeps positions in `f32`); wavefront_obj 11 rejects `f -4 -3 -2 -1`, scopes indices to each
//!   `o` object against the format, and turns a two-vertex face into a line silently (all seen
//!   on hand-written cases). The reader takes `v`, `vn`, `f`, `l`, `o`, `g`, `s`, `usemtl` and
//!   `mtllib` (a missing library only warns), the `v/vt/vn` forms and negative indices, and
//!   passes over the rest. Errors: index out of range or zero (positions and normals), a face
//!   of fewer than three vertices or a line of fewer than two, a malformed or non-finite
//!   number, a malformed smoothing group, binary data, an empty file, a file with no faces or
//!   lines; each with its line and column.
//! - **Axes and units**: Y-up files map (x, y, z) to site (x, -z, y) (x east, -z north);
//!   Z-up files map straight across. Units: metre, centimetre, millimetre, inch (25.4 mm) and
//!   foot (0.3048 m), exact by the 1959 international yard and pound agreement.
//! - **Which edges** (`scene/mesh.rs`): positions are welded when their coordinates round to the
//!   same multiple of 1e-7 of the bounding box's largest side (exact duplicates always merge; two
//!   points within the tolerance across a rounding boundary do not, a known limit). Each face's
//!   own edges are listed as (low, high, face and direction), grouped by their low vertex
//!   (which the group then holds, so each is 8 bytes) and sorted; an edge of one face is a
//!   boundary,
//!   of three or more non-manifold, both drawn; of two, never drawn when the faces are
//!   coplanar (within 1e-6 rad), else hard (a crease, drawn) or smooth as the file says where
//!   it says (the same normals at both ends, or one smoothing group, is smooth; split normals,
//!   or different groups, hard), and where it does not, a crease when their normals (Newell's
//!   method, orientation mended where neighbours are wound inconsistently) differ by more than
//!   the crease angle (default 20 degrees, [`DEFAULT_CREASE_DEG`]); a smooth edge is a
//!   silhouette candidate. Triangulation diagonals are not face edges of
//!   the polygon, and between triangles they are coplanar: never drawn. Silhouettes are chosen
//!   per standpoint (`SilhouetteEdge::is_outline_from`: one face's plane has the eye in front,
//!   the other's behind). Faces are kept as triangles (`Site::faces`) for hidden lines, and
//!   both they and the drawn edges as numbers into the welded vertices (`Faces`, `Edges`).
//! - **Layers**: each `g` group (or `o` object) and `usemtl` material becomes an item on a
//!   layer of that name (the material's where a face has one), and each used layer becomes a
//!   layer of the drawing (`wireframe: NAME`).
//! - **Solids**: a model whose every edge lies between two faces is one solid; in an open
//!   model each closed piece is (`scene/pieces.rs`). A standpoint inside one is warned of.

use super::obj::{ObjElement, ObjFile, Smoothing, NO_NORMAL};
use super::site::{ItemId, ItemInfo, MeshModel, NumberedEdge, SilhouetteEdge, Site};
use nalgebra::{Point3, Rotation3, Vector3};
use rayon::prelude::*;
use std::collections::HashMap;
use std::ops::Range;

/// Which axis of the file points up.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, serde::Deserialize)]
pub enum UpAxis {
    /// The usual OBJ convention: x east, y up, z towards the viewer (south).
    #[default]
    Y,
    /// x east, y north, z up, as in the site frame.
    Z,
}

/// Units of the file's coordinates.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, serde::Deserialize)]
pub enum Unit {
    /// Metres.
    #[default]
    Metre,
    /// Centimetres.
    Centimetre,
    /// Millimetres.
    Millimetre,
    /// Inches (25.4 mm exactly).
    Inch,
    /// Feet (0.3048 m exactly).
    Foot,
}

impl Unit {
    /// Metres per unit (the inch is exactly 25.4 mm and the foot 12 inches by the
    /// international yard and pound agreement of 1959).
    pub fn metres(self) -> f64 {
        match self {
            Unit::Metre => 1.0,
            Unit::Centimetre => 0.01,
            Unit::Millimetre => 0.001,
            Unit::Inch => 0.0254,
            Unit::Foot => 0.3048,
        }
    }
}

/// Where and how a mesh is placed in the site, and which of its edges are creases.
#[derive(Clone, Debug, PartialEq)]
pub struct MeshPlacement {
    /// Which of the file's axes points up.
    pub up: UpAxis,
    /// The unit of its coordinates.
    pub unit: Unit,
    /// Edges whose faces meet at more than this angle (degrees) are drawn as creases.
    pub crease_deg: f64,
    /// Then scaled by this factor,
    pub scale: f64,
    /// turned about the vertical by this many degrees, clockwise seen from above,
    pub turn_deg: f64,
    /// and moved by this offset (metres, site frame).
    pub offset: Vector3<f64>,
}

/// The default crease angle, degrees, for edges the file says nothing about (no smoothing
/// groups, no normals): corners of buildings are drawn, the facets of a smooth curved
/// surface are not. 20 degrees keeps the eaves of a pyramid roof whose faces rise 63
/// degrees (their normals are 27 degrees from the walls'), which 30 lost; a surface needs
/// 18 or more facets around to stay smooth under it.
pub const DEFAULT_CREASE_DEG: f64 = 20.0;

impl Default for MeshPlacement {
    fn default() -> Self {
        MeshPlacement {
            up: UpAxis::Y,
            unit: Unit::Metre,
            crease_deg: DEFAULT_CREASE_DEG,
            scale: 1.0,
            turn_deg: 0.0,
            offset: Vector3::zeros(),
        }
    }
}

/// What the import found, for `check` summaries and tests.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct MeshStats {
    /// Distinct positions after welding.
    pub vertices: usize,
    /// Faces kept, and faces of no area left out.
    pub faces: usize,
    /// Faces of no area left out.
    pub dropped_faces: usize,
    /// The triangles the kept faces make.
    pub triangles: usize,
    /// Distinct face edges, and how they were classed.
    pub edges: usize,
    /// Edges of one face only (drawn).
    pub boundary: usize,
    /// Edges where faces meet at a hard edge (drawn).
    pub creases: usize,
    /// Edges of three or more faces (drawn).
    pub non_manifold: usize,
    /// Smooth edges that can become silhouettes.
    pub smooth: usize,
    /// Edges between two faces that the file's smoothing groups or normals called smooth
    /// or hard (the crease angle decided the rest).
    pub by_file: usize,
    /// Segments of `l` polylines.
    pub line_segments: usize,
}

/// Faces meeting at less than this angle (radians) count as one plane: their shared edge is
/// neither a crease nor ever a silhouette.
const COPLANAR: f64 = 1e-6;

/// Positions closer than this fraction of the model's bounding box (its largest side) are welded.
const WELD_FRACTION: f64 = 1e-7;

/// Normals closer than this (as unit vectors) are the same normal: exporters that split a
/// vertex write the same vector twice, to the digits they print.
const SAME_NORMAL: f64 = 1e-5;

/// Names the item of a mesh's group and material: its kind, label and layer.
pub type ItemNames<'a> = &'a (dyn Fn(u32, u32) -> ItemInfo + Sync);

/// Adds a mesh to the site: one item per group and material of the file (named `name`,
/// `name: group`, `name: group (material)`; its layer is the material where the face has
/// one, else the group), its drawn edges, its silhouette candidates and its faces.
pub fn add_mesh(
    site: &mut Site,
    obj: &ObjFile,
    placement: &MeshPlacement,
    name: &str,
) -> MeshStats {
    add_mesh_named(site, obj, placement, &|group, material| {
        model_item(obj, name, group, material)
    })
}

/// [`add_mesh`], its items named by `names`: the kind, label and layer of the item of a
/// group and material (a city model names its items after its objects and layers).
pub fn add_mesh_named(
    site: &mut Site,
    obj: &ObjFile,
    placement: &MeshPlacement,
    names: ItemNames<'_>,
) -> MeshStats {
    add_mesh_on_cores(site, obj, placement, names, PARALLEL_FACES)
}

/// How [`add_mesh`] names the item of a group and material.
fn model_item(obj: &ObjFile, name: &str, group: u32, material: u32) -> ItemInfo {
    let group = &obj.groups[group as usize];
    let material = &obj.materials[material as usize];
    let label = match (group.is_empty(), material.is_empty()) {
        (true, true) => name.to_owned(),
        (false, true) => format!("{name}: {group}"),
        (true, false) => format!("{name} ({material})"),
        (false, false) => format!("{name}: {group} ({material})"),
    };
    let layer = [material, group].into_iter().find(|s| !s.is_empty());
    ItemInfo {
        kind: "model",
        label: Some(label),
        layer: layer.cloned(),
    }
}

/// From this many faces on, a model's faces are welded and cut into triangles, and its
/// edges listed and classed, in two halves on two cores: below it threads cost more than
/// they save.
const PARALLEL_FACES: usize = 50_000;

/// [`add_mesh_named`], on two cores from `parallel_from` faces on (the tests force the
/// split on small models to check that it changes nothing).
fn add_mesh_on_cores(
    site: &mut Site,
    obj: &ObjFile,
    placement: &MeshPlacement,
    names: ItemNames<'_>,
    parallel_from: usize,
) -> MeshStats {
    let two_cores = obj.faces.len() >= parallel_from;
    let positions = place(&obj.positions, placement);
    let used = used_positions(obj, two_cores);
    let (weld, vertices) = weld(&positions, &used, two_cores);
    drop(used);
    let points = representatives(positions, &weld, vertices);
    let first_item = site.items.len() as u32;
    // The items first, in the order the faces first use them (a face of no area makes
    // none), so that the faces can then be cut up on two cores.
    let mut items = MeshItems::new(obj, names);
    items.add_for_faces(site, obj, &weld, &points);

    // Holes, by face: welded rings without repeats (CityJSON surfaces have them, OBJ none).
    let mut holes_of: HashMap<u32, Vec<Vec<u32>>> = HashMap::new();
    for (face, ring) in &obj.holes {
        let ring = welded_ring(ring, &weld);
        if ring.len() >= 3 {
            holes_of.entry(*face).or_default().push(ring);
        }
    }
    // Faces: welded corner lists without repeats (flat, with each corner's normal index
    // where the file has normals), their normals, and their triangles; a large model's
    // second half on another core, its faces and triangles then following the first
    // half's, as one pass gives them.
    let work = FaceWork {
        obj,
        weld: &weld,
        points: &points,
        items: &items,
        holes_of: &holes_of,
    };
    let all = 0..obj.faces.len();
    // Normal indices are kept only where the file has normals to point at.
    let normals = !obj.normals.is_empty();
    // Each triangle's vertex numbers and item: the site's faces once the edges are found.
    let (welded, first_triangles, later_triangles) = if two_cores {
        // Each core welds and lists its half's triangles; the second half's follow the
        // first's, as one pass gives them.
        let middle = obj.faces.len() / 2;
        let half = |range: Range<usize>| {
            let faces = &obj.faces[range.clone()];
            let mut triangles = Vec::with_capacity(triangles_of(faces));
            let mut welded = WeldedFaces::with_room(faces, vertices, normals);
            work.run(range, &mut welded, |t, item| triangles.push((t, item)));
            (welded, triangles)
        };
        let ((first, first_triangles), (second, later_triangles)) = std::thread::scope(|scope| {
            let later = scope.spawn(|| half(middle..all.end));
            (half(0..middle), joined(later))
        });
        let welded = WeldedMesh { first, second };
        (welded, first_triangles, later_triangles)
    } else {
        let mut welded = WeldedFaces::with_room(&obj.faces, vertices, normals);
        let mut triangles = Vec::with_capacity(triangles_of(&obj.faces));
        work.run(all, &mut welded, |t, item| triangles.push((t, item)));
        let welded = WeldedMesh {
            first: welded,
            second: WeldedFaces::with_room(&[], 0, false),
        };
        (welded, triangles, Vec::new())
    };
    drop(holes_of);
    let mut stats = MeshStats {
        vertices,
        faces: welded.len(),
        dropped_faces: welded.first.dropped + welded.second.dropped,
        triangles: welded.first.triangles + welded.second.triangles,
        ..MeshStats::default()
    };

    // Every face edge as (low vertex, high vertex, face and direction), grouped by the low
    // vertex: each run's on the core that welded it. Then the edges at each vertex, from both
    // runs, sorted (equal edges are adjacent) and classed: a large model's in two ranges
    // of low vertices on two cores, cut where half the face edges lie on either side
    // (equal edges share their low vertex); the second range's edges follow the first's,
    // as one pass gives them.
    let (first_run, second_run) = std::thread::scope(|scope| {
        let [(base, first), (later_base, second)] = welded.numbered_runs();
        let later = (!second.faces.is_empty())
            .then(|| scope.spawn(move || EdgesByLow::of(second, later_base, vertices)));
        let first = EdgesByLow::of(first, base, vertices);
        let second = later.map_or_else(|| EdgesByLow::of(second, later_base, vertices), joined);
        (first, second)
    });
    let edges_below = |v: usize| first_run.starts[v] + second_run.starts[v];
    let cut = if two_cores {
        // The first vertex with half the face edges below it (they only grow with it).
        let half = edges_below(vertices) / 2;
        let (mut low, mut high) = (0, vertices);
        while low < high {
            let middle = (low + high) / 2;
            if edges_below(middle) < half {
                low = middle + 1;
            } else {
                high = middle;
            }
        }
        low
    } else {
        vertices
    };
    let classes = EdgeClasses {
        obj,
        welded: &welded,
        points: &points,
        coplanar: Bend::of_angle(COPLANAR),
        crease: Bend::of_angle(placement.crease_deg.to_radians()),
    };
    // Each core lists its range's drawn edges by vertex number and keeps its smooth ones;
    // the drawn lists then become the site's edges as they are (12 bytes an edge). The
    // lists have room for every face edge of the range (each distinct edge is at least
    // one, a smooth one two): what is never written costs address space, not memory.
    let range_edges = |range: Range<usize>| {
        let room = (edges_below(range.end) - edges_below(range.start)) as usize;
        let mut drawn = Vec::with_capacity(room);
        let mut smooth = Vec::with_capacity(room / 2);
        let mut counts = MeshStats::default();
        let mut at_a = Vec::new();
        for a in range {
            at_a.clear();
            at_a.extend_from_slice(first_run.at(a));
            at_a.extend_from_slice(second_run.at(a));
            at_a.sort_unstable();
            classes.classify(
                a,
                &at_a,
                &mut |a, b, item| drawn.push(NumberedEdge { ends: [a, b], item }),
                &mut smooth,
                &mut counts,
            );
        }
        (drawn, smooth, counts)
    };
    let (mut first, mut later) = std::thread::scope(|scope| {
        let later = (cut < vertices).then(|| scope.spawn(|| range_edges(cut..vertices)));
        (range_edges(0..cut), later.map(joined))
    });
    drop((first_run, second_run));
    // The drawn edges over the welded vertices, which join the site's edges' points once:
    // the first range's list moved in where it can be, the second's after it.
    let later_drawn = later.as_mut().map(|l| std::mem::take(&mut l.0));
    let drawn = [Some(std::mem::take(&mut first.0)), later_drawn];
    site.edges
        .extend_numbered(&points, drawn.into_iter().flatten());
    let later_smooth = later.as_ref().map_or(&[][..], |l| &l.1[..]);
    // The first range's smooth edges become the site's list when it has none yet (a
    // single model), rather than being copied into it.
    if site.silhouette_candidates.is_empty() {
        std::mem::swap(&mut site.silhouette_candidates, &mut first.1);
    }
    site.silhouette_candidates
        .par_extend(first.1.par_iter().chain(later_smooth).copied());
    for (_, _, counts) in [Some(&first), later.as_ref()].into_iter().flatten() {
        stats.edges += counts.edges;
        stats.boundary += counts.boundary;
        stats.creases += counts.creases;
        stats.non_manifold += counts.non_manifold;
        stats.smooth += counts.smooth;
        stats.by_file += counts.by_file;
    }
    drop((first, later));

    for line in &obj.lines {
        let item = items.get_or_add(site, line);
        for pair in obj.line_indices(line).windows(2) {
            let (a, b) = (weld[pair[0] as usize], weld[pair[1] as usize]);
            if a != b {
                site.add_segment(item, points[a as usize], points[b as usize]);
                stats.line_segments += 1;
            }
        }
    }
    let last_item = site.items.len() as u32;
    // A closed surface (every edge between exactly two faces) is a solid one cannot stand in;
    // an open one may still hold closed pieces, which the standpoint checks look for by its
    // triangles' vertex numbers.
    let first_face = site.faces.len();
    let closed = stats.boundary == 0 && stats.non_manifold == 0;
    let open_corners = if closed {
        Vec::new()
    } else {
        let triangles = first_triangles.iter().chain(&later_triangles);
        triangles.map(|&(t, _)| t).collect()
    };
    // The welded vertices become the faces' corner points, shared (a model of lines alone
    // keeps none).
    if stats.triangles > 0 {
        site.faces.extend_sharing(
            points,
            first_triangles
                .par_iter()
                .chain(later_triangles.par_iter())
                .copied(),
        );
    }
    if stats.faces > 0 {
        site.models.push(MeshModel {
            items: first_item..last_item,
            faces: first_face..site.faces.len(),
            open_corners,
        });
    }
    if let Some(item) = items.first() {
        for warning in &obj.warnings {
            site.warnings.push((item, warning.clone()));
        }
    }
    stats
}

/// What a scoped thread returned, its panic passed on.
fn joined<T>(handle: std::thread::ScopedJoinHandle<'_, T>) -> T {
    handle
        .join()
        .unwrap_or_else(|e| std::panic::resume_unwind(e))
}

/// The site's items for a mesh's groups and materials, made in the order the faces, then
/// the lines, first use them.
struct MeshItems<'a> {
    /// The kind, label and layer of the item of a group and material.
    names: ItemNames<'a>,
    /// The item of each group and material: a table by group and material where the file
    /// has few enough of them (a city model has an object and layer per group), else a map.
    table: Option<(Vec<Option<ItemId>>, usize)>,
    of: HashMap<(u32, u32), ItemId>,
    /// Runs of faces share their group and material: the last answer is kept at hand.
    last: Option<((u32, u32), ItemId)>,
}

impl<'a> MeshItems<'a> {
    fn new(obj: &ObjFile, names: ItemNames<'a>) -> Self {
        let (groups, materials) = (obj.groups.len().max(1), obj.materials.len().max(1));
        let cells = groups.saturating_mul(materials);
        let table = (cells <= 4 * (obj.faces.len() + obj.lines.len()) + 1024)
            .then(|| (vec![None; cells], materials));
        MeshItems {
            names,
            table,
            of: HashMap::new(),
            last: None,
        }
    }

    /// The item of a group and material, if one is made.
    fn get(&self, (group, material): (u32, u32)) -> Option<ItemId> {
        match &self.table {
            Some((table, materials)) => table
                .get(group as usize * materials + material as usize)
                .copied()
                .flatten(),
            None => self.of.get(&(group, material)).copied(),
        }
    }

    /// The first item made.
    fn first(&self) -> Option<ItemId> {
        match &self.table {
            Some((table, _)) => table.iter().flatten().min_by_key(|i| i.0).copied(),
            None => self.of.values().min_by_key(|i| i.0).copied(),
        }
    }

    /// The item of an element's group and material, made if new.
    fn get_or_add(&mut self, site: &mut Site, element: &ObjElement) -> ItemId {
        let key = (element.group, element.material);
        if let Some((k, item)) = self.last {
            if k == key {
                return item;
            }
        }
        let item = match self.get(key) {
            Some(item) => item,
            None => {
                let ItemInfo { kind, label, layer } = (self.names)(key.0, key.1);
                let item = site.add_item_on_layer(kind, label, layer);
                match &mut self.table {
                    Some((table, materials)) => {
                        table[key.0 as usize * *materials + key.1 as usize] = Some(item)
                    }
                    None => {
                        self.of.insert(key, item);
                    }
                }
                item
            }
        };
        self.last = Some((key, item));
        item
    }

    /// Makes the item of every group and material that a face of some area uses, in the
    /// order of those faces. Only a face whose group and material have no item yet is
    /// welded to see whether it has an area: one or a few per item.
    fn add_for_faces(
        &mut self,
        site: &mut Site,
        obj: &ObjFile,
        weld: &[u32],
        points: &[Point3<f64>],
    ) {
        let mut scratch = Corners::default();
        let mut known = None;
        for face in &obj.faces {
            let key = (face.group, face.material);
            if known == Some(key) {
                continue;
            }
            if self.get(key).is_some() {
                known = Some(key);
                continue;
            }
            scratch.clear();
            if weld_face(obj, face, weld, points, &mut scratch).is_some() {
                self.get_or_add(site, face);
                known = Some(key);
            }
        }
    }
}

/// A face's corners through the weld without repeats (nor the first repeated at the end),
/// appended to `corners` with each corner's normal index, and its unit normal; for a face
/// of no area `None`, and nothing appended.
fn weld_face(
    obj: &ObjFile,
    face: &ObjElement,
    weld: &[u32],
    points: &[Point3<f64>],
    corners: &mut Corners,
) -> Option<Vector3<f64>> {
    let first = corners.len();
    for (&c, &n) in obj.face_corners(face).iter().zip(obj.face_normals(face)) {
        let w = weld[c as usize];
        if corners.len() == first || corners.vertices.last() != Some(&w) {
            corners.push(w, n);
        }
    }
    while corners.len() > first + 1
        && corners.vertices[first] == corners.vertices[corners.len() - 1]
    {
        corners.pop();
    }
    let welded = &corners.vertices[first..];
    let normal = if welded.len() < 3 {
        None
    } else {
        newell_normal(welded.iter().copied(), welded.len(), points)
    };
    if normal.is_none() {
        corners.truncate(first);
    }
    normal
}

/// A mesh's faces after welding (those of some area), in file order.
struct WeldedFaces {
    faces: Vec<MeshFace>,
    /// Where each face's corners begin in `corners` (they end where the next face's
    /// begin): apart from the faces, so that walking every face's edges reads only these
    /// and the corners.
    firsts: Vec<u32>,
    /// Each face's corners.
    corners: Corners,
    /// Holes: the face's place in `faces`, and the welded ring.
    holes: Vec<(usize, Vec<u32>)>,
    /// How many edges of these faces and holes have each vertex as their lower end, at
    /// the vertex's number plus one: counted as the faces are welded, for
    /// [`EdgesByLow`].
    low_ends: Vec<u32>,
    /// Faces of no area left out.
    dropped: usize,
    /// Triangles made.
    triangles: usize,
}

impl WeldedFaces {
    /// Empty, with room for `faces` on a mesh of `vertices` welded vertices, and for their
    /// normal indices if the file has normals.
    fn with_room(faces: &[ObjElement], vertices: usize, normals: bool) -> Self {
        let corners: usize = faces.iter().map(|f| f.count as usize).sum();
        WeldedFaces {
            faces: Vec::with_capacity(faces.len()),
            firsts: Vec::with_capacity(faces.len()),
            corners: Corners::with_room(corners, normals),
            holes: Vec::new(),
            low_ends: vec![0; vertices + 1],
            dropped: 0,
            triangles: 0,
        }
    }

    /// Where face `f`'s corners lie in `corners`: up to the next face's.
    fn span(&self, f: usize) -> Range<usize> {
        let end = self
            .firsts
            .get(f + 1)
            .map_or(self.corners.len(), |&e| e as usize);
        self.firsts[f] as usize..end
    }

    /// Face `f`'s corners (vertices after welding).
    fn ring(&self, f: usize) -> &[u32] {
        &self.corners.vertices[self.span(f)]
    }
}

/// Faces' corners after welding, one face's after another: each corner's vertex, and its
/// normal index where the file has normals. The normals are kept apart, and not at all for
/// a file without them (most big models): the vertices are what walking edges reads.
#[derive(Default)]
struct Corners {
    vertices: Vec<u32>,
    /// One for each vertex, if the file has normals.
    normals: Option<Vec<u32>>,
}

impl Corners {
    /// Empty, with room for `corners`, and for their normal indices if `normals`.
    fn with_room(corners: usize, normals: bool) -> Self {
        Corners {
            vertices: Vec::with_capacity(corners),
            normals: normals.then(|| Vec::with_capacity(corners)),
        }
    }

    fn len(&self) -> usize {
        self.vertices.len()
    }

    fn push(&mut self, vertex: u32, normal: u32) {
        self.vertices.push(vertex);
        if let Some(normals) = &mut self.normals {
            normals.push(normal);
        }
    }

    fn pop(&mut self) {
        self.truncate(self.len().saturating_sub(1));
    }

    fn truncate(&mut self, len: usize) {
        self.vertices.truncate(len);
        if let Some(normals) = &mut self.normals {
            normals.truncate(len);
        }
    }

    fn clear(&mut self) {
        self.truncate(0);
    }
}

/// A face after welding and, if the file has normals (only then are they asked for), its
/// corners (vertices after welding) with their normal indices.
struct WeldedFace<'a> {
    face: &'a MeshFace,
    ring_and_normals: Option<(&'a [u32], &'a [u32])>,
}

/// A mesh's faces after welding, as the cores welded them: the file's faces in two runs,
/// one after the other (the second empty on one core), numbered through both in turn.
struct WeldedMesh {
    first: WeldedFaces,
    second: WeldedFaces,
}

impl WeldedMesh {
    /// How many faces.
    fn len(&self) -> usize {
        self.first.faces.len() + self.second.faces.len()
    }

    /// Face number `f`'s run, and its number there.
    fn run_of(&self, f: usize) -> (&WeldedFaces, usize) {
        match f.checked_sub(self.first.faces.len()) {
            None => (&self.first, f),
            Some(later) => (&self.second, later),
        }
    }

    /// Face number `f`.
    fn face(&self, f: usize) -> &MeshFace {
        let (run, f) = self.run_of(f);
        &run.faces[f]
    }

    /// Face number `f`, with its corners and their normals if the file has normals.
    fn with_normals(&self, f: usize) -> WeldedFace<'_> {
        let (run, f) = self.run_of(f);
        let ring_and_normals = run.corners.normals.as_ref().map(|normals| {
            let span = run.span(f);
            (&run.corners.vertices[span.clone()], &normals[span])
        });
        WeldedFace {
            face: &run.faces[f],
            ring_and_normals,
        }
    }

    /// The two runs, each with the number of its first face.
    fn numbered_runs(&self) -> [(u32, &WeldedFaces); 2] {
        [
            (0, &self.first),
            (self.first.faces.len() as u32, &self.second),
        ]
    }
}

/// The triangles `faces` make when none is dropped, concave or holed.
fn triangles_of(faces: &[ObjElement]) -> usize {
    faces
        .iter()
        .map(|f| (f.count as usize).saturating_sub(2))
        .sum()
}

/// What welding faces and cutting them into triangles reads.
struct FaceWork<'a> {
    obj: &'a ObjFile,
    weld: &'a [u32],
    points: &'a [Point3<f64>],
    items: &'a MeshItems<'a>,
    holes_of: &'a HashMap<u32, Vec<Vec<u32>>>,
}

impl FaceWork<'_> {
    /// Welds the file's faces `range` into `welded`, and hands each of their triangles
    /// (its vertices after welding) with its item to `triangle`.
    fn run(
        &self,
        range: Range<usize>,
        welded: &mut WeldedFaces,
        mut triangle: impl FnMut([u32; 3], ItemId),
    ) {
        let points = self.points;
        let p = |i: u32| points[i as usize];
        let mut last: Option<((u32, u32), ItemId)> = None;
        for (index, face) in range.clone().zip(&self.obj.faces[range]) {
            let first = welded.corners.len();
            let normal = weld_face(self.obj, face, self.weld, points, &mut welded.corners);
            let key = (face.group, face.material);
            let item = match last {
                Some((k, item)) if k == key => Some(item),
                _ => self.items.get(key),
            };
            // Every face of some area has its item (`MeshItems::add_for_faces`).
            let (Some(normal), Some(item)) = (normal, item) else {
                welded.corners.truncate(first);
                welded.dropped += 1;
                continue;
            };
            last = Some((key, item));
            let corners = &welded.corners.vertices[first..];
            let holes = self
                .holes_of
                .get(&(index as u32))
                .map_or(&[][..], |h| h.as_slice());
            if holes.is_empty() && (corners.len() == 3 || is_convex_face(corners, points, &normal))
            {
                for k in 1..corners.len() - 1 {
                    triangle([corners[0], corners[k], corners[k + 1]], item);
                }
                welded.triangles += corners.len() - 2;
            } else {
                // A concave face, or one with holes: the general triangulator.
                let mut ring: Vec<u32> = corners.to_vec();
                let mut hole_starts = Vec::with_capacity(holes.len());
                for hole in holes {
                    hole_starts.push(ring.len());
                    ring.extend(hole);
                }
                let ring_points: Vec<Point3<f64>> = ring.iter().map(|&i| p(i)).collect();
                let made = super::build::triangulate(&ring_points, &hole_starts);
                welded.triangles += made.len();
                for t in made {
                    triangle(t.map(|i| ring[i]), item);
                }
            }
            count_low_ends(&mut welded.low_ends, &welded.corners.vertices[first..]);
            for hole in holes {
                count_low_ends(&mut welded.low_ends, hole);
                welded.holes.push((welded.faces.len(), hole.clone()));
            }
            welded.firsts.push(first as u32);
            welded.faces.push(MeshFace {
                normal,
                item,
                smoothing: PackedSmoothing::of(face.smoothing),
            });
        }
    }
}

/// What classing the edges needs: the faces after welding, their corners, the welded
/// positions, and the two angles that class them: below `coplanar` one plane, above
/// `crease` a hard edge.
struct EdgeClasses<'a> {
    obj: &'a ObjFile,
    welded: &'a WeldedMesh,
    points: &'a [Point3<f64>],
    coplanar: Bend,
    crease: Bend,
}

impl EdgeClasses<'_> {
    /// Walks the runs of equal edges at vertex `a` (`at_a`: its face edges as (high
    /// vertex, [`face_and_direction`]), sorted), handing the drawn ones (their vertices and
    /// item) to `draw`, adding the smooth ones to `silhouettes`, and counting them.
    fn classify(
        &self,
        a: usize,
        at_a: &[(u32, u32)],
        draw: &mut impl FnMut(u32, u32, ItemId),
        silhouettes: &mut Vec<SilhouetteEdge>,
        stats: &mut MeshStats,
    ) {
        let points = self.points;
        let pa = points[a];
        for run in at_a.chunk_by(|x, y| x.0 == y.0) {
            let (b, first) = run[0];
            let first_face = face_of(first);
            stats.edges += 1;
            let item = self.welded.face(first_face).item;
            let pb = points[b as usize];
            match run.len() {
                1 => {
                    stats.boundary += 1;
                    draw(a as u32, b, item);
                }
                2 => {
                    let second = run[1].1;
                    let second_face = face_of(second);
                    let n1 = self.welded.face(first_face).normal;
                    // Consistently wound neighbours run a shared edge in opposite
                    // directions; where they do not, one of them is turned over.
                    let flip = if runs_upwards(first) == runs_upwards(second) {
                        -1.0
                    } else {
                        1.0
                    };
                    let n2 = self.welded.face(second_face).normal * flip;
                    let bend = Bend::between(&n1, &n2);
                    if !bend.exceeds(&self.coplanar) {
                        // A triangulation diagonal or a subdivided flat wall: never drawn.
                    } else {
                        let said = file_says_smooth(
                            self.obj,
                            (a as u32, b),
                            (self.welded.with_normals(first_face), runs_upwards(first)),
                            (self.welded.with_normals(second_face), runs_upwards(second)),
                        );
                        if said.is_some() {
                            stats.by_file += 1;
                        }
                        if !said.unwrap_or_else(|| !bend.exceeds(&self.crease)) {
                            stats.creases += 1;
                            draw(a as u32, b, item);
                        } else {
                            stats.smooth += 1;
                            silhouettes.push(SilhouetteEdge {
                                start: pa,
                                end: pb,
                                normals: [n1, n2],
                                item,
                            });
                        }
                    }
                }
                _ => {
                    stats.non_manifold += 1;
                    draw(a as u32, b, item);
                }
            }
        }
    }
}

/// An angle between 0 and pi as its sine and cosine, up to a common positive factor: the
/// angle between two faces' normals is (|n1 x n2|, n1 . n2), which keeps full precision near
/// 0 and pi (unlike acos of the dot product) and, compared as below, needs no atan2 for
/// each of a million edges.
#[derive(Clone, Copy, Debug)]
struct Bend {
    sin: f64,
    cos: f64,
}

impl Bend {
    fn between(n1: &Vector3<f64>, n2: &Vector3<f64>) -> Bend {
        Bend {
            sin: n1.cross(n2).norm(),
            cos: n1.dot(n2),
        }
    }

    fn of_angle(radians: f64) -> Bend {
        let (sin, cos) = radians.sin_cos();
        Bend { sin, cos }
    }

    /// Whether this angle is greater than `limit`. Both lie in [0, pi], in the upper half
    /// of the plane, so this one is the greater when it lies anticlockwise of the limit:
    /// their cross product is positive; zero, the two point the same way (equal) or
    /// opposite ways (pi against 0: greater when this one is pi).
    fn exceeds(&self, limit: &Bend) -> bool {
        let cross = limit.cos * self.sin - limit.sin * self.cos;
        cross > 0.0 || (cross == 0.0 && self.cos < 0.0 && limit.cos > 0.0)
    }
}

/// A ring of position indices through the weld, without repeated corners (nor the first
/// repeated at the end).
fn welded_ring(corners: &[u32], weld: &[u32]) -> Vec<u32> {
    let mut welded: Vec<u32> = corners.iter().map(|&c| weld[c as usize]).collect();
    welded.dedup();
    while welded.len() > 1 && welded.first() == welded.last() {
        welded.pop();
    }
    welded
}

/// Calls `visit(low, high, face_and_direction)` for every face edge of a run whose first
/// face is number `base`, its faces first, then its holes.
fn each_face_edge(run: &WeldedFaces, base: u32, mut visit: impl FnMut(u32, u32, u32)) {
    for (f, index) in (base..).zip(0..run.faces.len()) {
        for (_, a, b) in sides(run.ring(index)) {
            visit(a.min(b), a.max(b), face_and_direction(f, a < b));
        }
    }
    for (f, ring) in &run.holes {
        for (_, a, b) in sides(ring) {
            visit(
                a.min(b),
                a.max(b),
                face_and_direction(base + *f as u32, a < b),
            );
        }
    }
}

/// A face edge's face and direction in one number, so that a face edge is 8 bytes: the
/// face's number times two, plus one if the face runs the edge from its lower vertex to
/// its higher. (A model has at most [`crate::budget::MAX_TRIANGLES`] faces, far below 2^31.)
fn face_and_direction(face: u32, upwards: bool) -> u32 {
    debug_assert!(face < 1 << 31);
    face << 1 | upwards as u32
}

/// The face of a [`face_and_direction`].
fn face_of(face_and_direction: u32) -> usize {
    (face_and_direction >> 1) as usize
}

/// Whether a [`face_and_direction`]'s face runs the edge from its lower vertex to its higher.
fn runs_upwards(face_and_direction: u32) -> bool {
    face_and_direction & 1 == 1
}

/// Adds one at each side's lower end (plus one) for the sides of a closed ring.
fn count_low_ends(low_ends: &mut [u32], ring: &[u32]) {
    for (_, a, b) in sides(ring) {
        low_ends[a.min(b) as usize + 1] += 1;
    }
}

/// Each side of a closed ring: its place, its start and its end, the last side closing
/// back to the first corner.
fn sides<T: Copy>(ring: &[T]) -> impl Iterator<Item = (usize, T, T)> + '_ {
    let ends = ring.iter().skip(1).chain(ring.first());
    ring.iter()
        .zip(ends)
        .enumerate()
        .map(|(k, (&a, &b))| (k, a, b))
}

/// A run's face edges as (high vertex, [`face_and_direction`]), grouped by their low
/// vertex: those at
/// `v` are `edges[starts[v]..starts[v + 1]]` (a counting sort, from the counts made while
/// welding), in the order the faces give them. Grouping leaves only a handful of edges
/// at each vertex to sort: linear time, where sorting all the edges at once was the
/// costliest step of a large model.
struct EdgesByLow {
    starts: Vec<u32>,
    edges: Vec<(u32, u32)>,
}

impl EdgesByLow {
    /// The face edges of a run whose first face is number `base`, on a mesh of
    /// `vertices` welded vertices.
    fn of(run: &WeldedFaces, base: u32, vertices: usize) -> Self {
        let mut starts = run.low_ends.clone();
        starts.resize(vertices + 1, 0);
        for v in 1..starts.len() {
            starts[v] += starts[v - 1];
        }
        let mut edges = vec![(0, 0); starts[vertices] as usize];
        let mut next = starts.clone();
        each_face_edge(run, base, |low, high, face| {
            let at = &mut next[low as usize];
            edges[*at as usize] = (high, face);
            *at += 1;
        });
        EdgesByLow { starts, edges }
    }

    /// The face edges whose low vertex is `v`.
    fn at(&self, v: usize) -> &[(u32, u32)] {
        &self.edges[self.starts[v] as usize..self.starts[v + 1] as usize]
    }
}

/// Whether a face turns the same way at every corner about its normal (a fan of triangles
/// from its first corner then covers it exactly).
fn is_convex_face(corners: &[u32], points: &[Point3<f64>], normal: &Vector3<f64>) -> bool {
    let n = corners.len();
    (0..n).all(|k| {
        let (a, b, c) = (
            points[corners[k] as usize],
            points[corners[(k + 1) % n] as usize],
            points[corners[(k + 2) % n] as usize],
        );
        (b - a).cross(&(c - b)).dot(normal) >= 0.0
    })
}

/// A face of the mesh after welding.
struct MeshFace {
    normal: Vector3<f64>,
    item: ItemId,
    smoothing: PackedSmoothing,
}

/// A face's [`Smoothing`] in four bytes rather than eight, so that a face after welding is
/// 32 bytes (a million-face model writes 8 MB less): 0 for unsaid, `u32::MAX` for off,
/// else the group's number, which the reader keeps between 1 and `u32::MAX - 1` (`s 0` is
/// off, and `u32::MAX` marks an inherited group while reading).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
struct PackedSmoothing(u32);

impl PackedSmoothing {
    const UNSAID: u32 = 0;
    const OFF: u32 = u32::MAX;

    fn of(smoothing: Smoothing) -> Self {
        PackedSmoothing(match smoothing {
            Smoothing::Unsaid => Self::UNSAID,
            Smoothing::Off => Self::OFF,
            // Out of the reader's range only from a caller's own file; kept in range.
            Smoothing::Group(n) => n.clamp(1, u32::MAX - 1),
        })
    }

    fn get(self) -> Smoothing {
        match self.0 {
            Self::UNSAID => Smoothing::Unsaid,
            Self::OFF => Smoothing::Off,
            n => Smoothing::Group(n),
        }
    }
}

/// Whether the file says two faces meet smoothly along their shared edge `(low, high)`,
/// `None` if it says nothing. With each face goes whether it runs the edge upwards (from
/// the lower vertex to the higher).
///
/// The normals decide where both faces give them at both ends: the same normal at each end
/// (by index, or the same vector) is smooth, a split one is hard. Otherwise the smoothing
/// groups: the same group is smooth; different groups, or no group (`s off`), hard.
fn file_says_smooth(
    obj: &ObjFile,
    (low, high): (u32, u32),
    (f1, upwards1): (WeldedFace<'_>, bool),
    (f2, upwards2): (WeldedFace<'_>, bool),
) -> Option<bool> {
    // Each face's normal indices at the edge's low and high vertex: those of the side of
    // its ring that runs the edge. A hole's edge is no side of the ring, and has none.
    let ends = |face: &WeldedFace, upwards: bool| {
        let ends = if upwards { (low, high) } else { (high, low) };
        let Some((ring, normals)) = face.ring_and_normals else {
            return (NO_NORMAL, NO_NORMAL);
        };
        let Some((k, _, _)) = sides(ring).find(|&(_, a, b)| (a, b) == ends) else {
            return (NO_NORMAL, NO_NORMAL);
        };
        let (start, next) = (normals[k], normals[(k + 1) % ring.len()]);
        if upwards {
            (start, next)
        } else {
            (next, start)
        }
    };
    let (low1, high1) = ends(&f1, upwards1);
    let (low2, high2) = ends(&f2, upwards2);
    if [low1, high1, low2, high2].iter().all(|&n| n != NO_NORMAL) {
        let same = |i: u32, j: u32| {
            i == j || {
                let (a, b) = (obj.normals[i as usize], obj.normals[j as usize]);
                match (a.try_normalize(0.0), b.try_normalize(0.0)) {
                    (Some(a), Some(b)) => (a - b).norm() <= SAME_NORMAL,
                    _ => false,
                }
            }
        };
        return Some(same(low1, low2) && same(high1, high2));
    }
    match (f1.face.smoothing.get(), f2.face.smoothing.get()) {
        (Smoothing::Unsaid, _) | (_, Smoothing::Unsaid) => None,
        (Smoothing::Group(a), Smoothing::Group(b)) => Some(a == b),
        _ => Some(false),
    }
}

/// Which of the file's positions its faces, holes and lines use (a stray vertex is not part
/// of the model: it neither widens the weld's tolerance nor stands on the ground).
/// On two cores, each marks half of the faces' corners and the marks are joined.
fn used_positions(obj: &ObjFile, two_cores: bool) -> Vec<bool> {
    fn mark<'a>(positions: usize, indices: impl Iterator<Item = &'a u32>) -> Vec<bool> {
        let mut used = vec![false; positions];
        for &i in indices {
            used[i as usize] = true;
        }
        used
    }
    let positions = obj.positions.len();
    let middle = if two_cores {
        obj.corners.len() / 2
    } else {
        obj.corners.len()
    };
    let (corners, later) = obj.corners.split_at(middle);
    let hole_points = obj.holes.iter().flat_map(|(_, ring)| ring);
    let rest = corners.iter().chain(&obj.line_points).chain(hole_points);
    if later.is_empty() {
        return mark(positions, rest);
    }
    let (mut used, later) = std::thread::scope(|scope| {
        let later = scope.spawn(|| mark(positions, later.iter()));
        (mark(positions, rest), joined(later))
    });
    for (u, l) in used.iter_mut().zip(later) {
        *u |= l;
    }
    used
}

/// The positions a mesh's faces, holes and lines use, placed in the site frame.
pub fn placed_used_positions(obj: &ObjFile, placement: &MeshPlacement) -> Vec<Point3<f64>> {
    place(&obj.positions, placement)
        .into_iter()
        .zip(used_positions(obj, false))
        .filter_map(|(p, used)| used.then_some(p))
        .collect()
}

/// The file's positions in the site frame: axes, units, scale, turn, offset.
fn place(positions: &[Point3<f64>], placement: &MeshPlacement) -> Vec<Point3<f64>> {
    let factor = placement.unit.metres() * placement.scale;
    // Clockwise seen from above is a negative turn about +z.
    let turn = Rotation3::from_axis_angle(&Vector3::z_axis(), -placement.turn_deg.to_radians());
    positions
        .iter()
        .map(|p| {
            let site = match placement.up {
                UpAxis::Y => Point3::new(p.x, -p.z, p.y),
                UpAxis::Z => *p,
            };
            turn * (site * factor) + placement.offset
        })
        .collect()
}

/// For each position, the index of its welded vertex; and the number of welded vertices.
/// Positions are keyed by their coordinates rounded to the weld tolerance, so exact
/// duplicates (what exporters write) always merge; two positions within the tolerance but
/// on either side of a rounding boundary stay apart (a limitation, documented).
fn weld(positions: &[Point3<f64>], used: &[bool], two_cores: bool) -> (Vec<u32>, usize) {
    // The model's size from the positions its faces and lines use: a stray vertex far away
    // must not widen the tolerance until the model welds into a point.
    // Plain comparisons: a third of the time `inf` and `sup` of points took here.
    let (mut low, mut high) = ([f64::INFINITY; 3], [f64::NEG_INFINITY; 3]);
    for (p, _) in positions.iter().zip(used).filter(|(_, &u)| u) {
        for k in 0..3 {
            if p[k] < low[k] {
                low[k] = p[k];
            }
            if p[k] > high[k] {
                high[k] = p[k];
            }
        }
    }
    // The largest side rather than the diagonal: no squares to overflow.
    let size = (0..3)
        .map(|k| high[k] - low[k])
        .fold(f64::NEG_INFINITY, f64::max);
    let tolerance = size * WELD_FRACTION;
    let keyable = tolerance.is_finite() && tolerance > 0.0;
    // A position's coordinates rounded to the tolerance, counted in tolerances from the
    // model's lowest corner: below 2^24 for every position the model uses (it is 10^7
    // tolerances across), so they pack with the position's index into one integer, and
    // sorting keys is sorting integers. A stray position too far away to pack (or every
    // position, where there is no tolerance) goes the general way.
    let corner = low.map(|c| (c / tolerance).round());
    let packed = |p: &Point3<f64>, i: usize| -> Option<u128> {
        let mut key = i as u128;
        for k in 0..3 {
            let counted = (p[k] / tolerance).round() - corner[k];
            if !(keyable && (0.0..PACKED_SPAN).contains(&counted)) {
                return None;
            }
            key |= u128::from(counted as u32) << (32 * (3 - k));
        }
        Some(key)
    };
    let general = |p: &Point3<f64>| {
        // Beyond what rounding to the tolerance can key (a model spanning 1e300, say),
        // only identical positions weld.
        if keyable && p.iter().all(|c| (c / tolerance).abs() < 9e18) {
            [p.x, p.y, p.z].map(|c| (c / tolerance).round() as i64)
        } else {
            [p.x, p.y, p.z].map(|c| c.to_bits() as i64)
        }
    };
    // Keys sorted: each run of equal keys is one vertex, led by the first position that
    // has it. (Sorting is cheaper than a hash map of a million keys, whose every insert
    // misses the cache.) A large model's two halves keyed and sorted on two cores, then
    // walked together as if merged.
    let keyed = |range: Range<usize>| {
        let mut keys: Vec<u128> = Vec::with_capacity(range.len());
        let mut strays: Vec<([i64; 3], u32)> = Vec::new();
        for (p, i) in positions[range.clone()].iter().zip(range) {
            match packed(p, i) {
                Some(key) => keys.push(key),
                None => strays.push((general(p), i as u32)),
            }
        }
        keys.sort_unstable();
        (keys, strays)
    };
    let all = 0..positions.len();
    let ((first, mut strays), (second, later_strays)) = if two_cores {
        let middle = all.end / 2;
        std::thread::scope(|scope| {
            let second = scope.spawn(|| keyed(middle..all.end));
            (keyed(0..middle), joined(second))
        })
    } else {
        (keyed(all), Default::default())
    };
    let mut leader: Vec<u32> = vec![0; positions.len()];
    lead_runs(&first, &second, |&k| k >> 32, |&k| k as u32, &mut leader);
    // A packed key never equals a stray's: the strays weld among themselves.
    strays.extend(later_strays);
    strays.sort_unstable();
    lead_runs(&strays, &[], |e| e.0, |e| e.1, &mut leader);
    drop((first, second, strays));
    // Vertices numbered in order of first appearance, as the file lists them.
    let mut weld = Vec::with_capacity(positions.len());
    let mut count = 0u32;
    for (i, &first) in leader.iter().enumerate() {
        if first as usize == i {
            weld.push(count);
            count += 1;
        } else {
            weld.push(weld[first as usize]);
        }
    }
    (weld, count as usize)
}

/// How many tolerances a packed weld key counts along each axis: 32 bits of it.
const PACKED_SPAN: f64 = 4_294_967_296.0;

/// Writes each position's leader: the first position of its run of equal keys. `first`
/// and `second` are sorted by key and index, every index in `first` below those in
/// `second`; they are walked together as if merged.
fn lead_runs<T, K: Ord>(
    first: &[T],
    second: &[T],
    key: impl Fn(&T) -> K,
    index: impl Fn(&T) -> u32,
    leader: &mut [u32],
) {
    let (mut i, mut j) = (0, 0);
    while let Some(k) = match (first.get(i), second.get(j)) {
        (Some(a), Some(b)) => Some(key(a).min(key(b))),
        (a, b) => a.or(b).map(&key),
    } {
        let run = |list: &[T], from: usize| {
            from..from + list[from..].iter().take_while(|e| key(e) == k).count()
        };
        let (here, there) = (run(first, i), run(second, j));
        let mut members = first[here.clone()].iter().chain(&second[there.clone()]);
        if let Some(lead) = members.next().map(&index) {
            leader[lead as usize] = lead;
            for e in members {
                leader[index(e) as usize] = lead;
            }
        }
        (i, j) = (here.end, there.end);
    }
}

/// One position for each welded vertex (the first that welded into it), in the positions'
/// own list: vertices are numbered in order of first appearance, so vertex `k`'s first
/// position lies at or after index `k`, and moving each down in one pass overwrites only
/// positions already read.
fn representatives(
    mut positions: Vec<Point3<f64>>,
    weld: &[u32],
    count: usize,
) -> Vec<Point3<f64>> {
    let mut next = 0;
    for i in 0..positions.len() {
        if weld[i] as usize == next {
            positions[next] = positions[i];
            next += 1;
        }
    }
    positions.truncate(count);
    positions
}

/// The unit normal of a polygon by Newell's method, `None` for a polygon of no area (its
/// doubled area below a billionth of its longest edge squared: a sliver or a line).
fn newell_normal(
    corners: impl Iterator<Item = u32> + Clone,
    count: usize,
    points: &[Point3<f64>],
) -> Option<Vector3<f64>> {
    let mut n: Vector3<f64> = Vector3::zeros();
    let mut longest_sq = 0.0f64;
    let next = corners.clone().cycle().skip(1);
    for (a, b) in corners.zip(next).take(count) {
        let (a, b) = (points[a as usize], points[b as usize]);
        n.x += (a.y - b.y) * (a.z + b.z);
        n.y += (a.z - b.z) * (a.x + b.x);
        n.z += (a.x - b.x) * (a.y + b.y);
        longest_sq = longest_sq.max((b - a).norm_squared());
    }
    let doubled_area = n.norm();
    if doubled_area.is_nan() || doubled_area <= 1e-9 * longest_sq || doubled_area <= 0.0 {
        return None;
    }
    // What `try_normalize` gives, without taking the norm a second time.
    Some(n / doubled_area).filter(|v: &Vector3<f64>| v.iter().all(|c| c.is_finite()))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::parse_obj;
    use std::f64::consts::{FRAC_PI_2, PI};
    use std::fmt::Write;
    use std::path::Path;

    fn import(text: &str, placement: &MeshPlacement) -> (Site, MeshStats) {
        let obj = parse_obj(text.as_bytes(), Path::new("t.obj")).unwrap();
        let mut site = Site::default();
        let stats = add_mesh(&mut site, &obj, placement, "t.obj");
        (site, stats)
    }

    /// A unit cube as 12 triangles, wound counter-clockwise seen from outside (z up).
    const CUBE: &str = "v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\nv 0 0 1\nv 1 0 1\nv 1 1 1\nv 0 1 1\n\
        f 1 3 2\nf 1 4 3\nf 5 6 7\nf 5 7 8\nf 1 2 6\nf 1 6 5\nf 2 3 7\nf 2 7 6\n\
        f 3 4 8\nf 3 8 7\nf 4 1 5\nf 4 5 8\n";

    fn z_up() -> MeshPlacement {
        MeshPlacement {
            up: UpAxis::Z,
            ..MeshPlacement::default()
        }
    }

    #[test]
    fn a_triangulated_cube_has_its_twelve_real_edges() {
        let (site, stats) = import(CUBE, &z_up());
        assert_eq!(site.edges.len(), 12);
        assert_eq!(
            (stats.vertices, stats.triangles, stats.edges, stats.creases),
            (8, 12, 18, 12)
        );
        assert_eq!(site.faces.len(), 12);
        assert!(
            site.silhouette_candidates.is_empty(),
            "the diagonals are coplanar, not smooth"
        );
        // Every drawn edge is axis-parallel with length 1: no diagonal.
        for edge in &site.edges {
            let crate::scene::SiteCurve::Segment { start, end } = edge.curve else {
                panic!()
            };
            assert!(((end - start).norm() - 1.0).abs() < 1e-12, "{start} {end}");
        }
    }

    #[test]
    fn split_vertices_weld_and_winding_mistakes_are_forgiven() {
        // The same cube as 6 quads with 4 vertices each (24 positions), one face wound the
        // wrong way round.
        let mut text = String::new();
        let quads = [
            [[0, 0, 0], [0, 1, 0], [1, 1, 0], [1, 0, 0]],
            [[0, 0, 1], [1, 0, 1], [1, 1, 1], [0, 1, 1]],
            [[0, 0, 0], [1, 0, 0], [1, 0, 1], [0, 0, 1]],
            [[1, 0, 0], [1, 1, 0], [1, 1, 1], [1, 0, 1]],
            [[1, 1, 0], [0, 1, 0], [0, 1, 1], [1, 1, 1]],
            [[0, 0, 1], [0, 1, 1], [0, 1, 0], [0, 0, 0]], // wrong way round
        ];
        for quad in quads {
            for [x, y, z] in quad {
                writeln!(text, "v {x} {y} {z}").unwrap();
            }
            writeln!(text, "f -4 -3 -2 -1").unwrap();
        }
        let (site, stats) = import(&text, &z_up());
        assert_eq!((stats.vertices, stats.faces, stats.edges), (8, 6, 12));
        assert_eq!(site.edges.len(), 12);
        assert_eq!(stats.boundary, 0);
    }

    fn cylinder(sides: usize) -> String {
        // Radius 1, from z = 0 to 2, side quads and two n-gon caps, wound outwards.
        let mut text = String::new();
        for z in [0.0, 2.0] {
            for k in 0..sides {
                let a = std::f64::consts::TAU * k as f64 / sides as f64;
                writeln!(text, "v {} {} {z}", a.cos(), a.sin()).unwrap();
            }
        }
        for k in 0..sides {
            let (a, b) = (k + 1, (k + 1) % sides + 1);
            writeln!(text, "f {a} {b} {} {}", b + sides, a + sides).unwrap();
        }
        let bottom: Vec<String> = (1..=sides).rev().map(|i| i.to_string()).collect();
        let top: Vec<String> = (1..=sides).map(|i| (i + sides).to_string()).collect();
        writeln!(text, "f {}\nf {}", bottom.join(" "), top.join(" ")).unwrap();
        text
    }

    #[test]
    fn a_64_sided_cylinder_shows_two_circles_and_two_silhouettes() {
        let (site, stats) = import(&cylinder(64), &z_up());
        // The caps' rims are creases (90 degrees); the sides meet at 5.6 degrees: smooth.
        assert_eq!((stats.creases, stats.smooth, stats.boundary), (128, 64, 0));
        assert_eq!(site.edges.len(), 128);
        let eye = Point3::new(5.0, 0.7, 1.6);
        let outline: Vec<&SilhouetteEdge> = site
            .silhouette_candidates
            .iter()
            .filter(|c| c.is_outline_from(&eye))
            .collect();
        assert_eq!(outline.len(), 2);
        // They are the generators nearest the tangent points, at acos(r / d) from the
        // direction of the eye (standard geometry of tangents to a circle).
        let d = eye.x.hypot(eye.y);
        let tangent = (1.0 / d).acos();
        let towards_eye = eye.y.atan2(eye.x);
        for edge in outline {
            let angle = edge.start.y.atan2(edge.start.x);
            let off = ((angle - towards_eye).abs() - tangent).abs();
            assert!(
                off <= std::f64::consts::TAU / 64.0,
                "generator at {angle}, {off} from the tangent"
            );
        }
    }

    #[test]
    fn each_vertex_keeps_the_first_position_welded_into_it() {
        let p = |x: f64| Point3::new(x, 0.0, 0.0);
        // Positions 0 and 2 weld into vertex 0, 3 and 4 into vertex 2; 1 is vertex 1.
        let positions = vec![p(0.0), p(1.0), p(0.1), p(3.0), p(3.1)];
        let kept = representatives(positions, &[0, 1, 0, 2, 2], 3);
        assert_eq!(kept, vec![p(0.0), p(1.0), p(3.0)]);
        assert_eq!(representatives(vec![p(5.0)], &[0], 1), vec![p(5.0)]);
        assert!(representatives(Vec::new(), &[], 0).is_empty());
    }

    #[test]
    fn a_bend_exceeds_a_limit_as_its_angle_does() {
        // Against atan2 (the angle itself) over angles from 0 to pi, each as the sine and
        // cosine of unit normals rotated by it, and scaled as unnormalised normals are.
        let angles = [
            0.0, 1e-9, 1e-6, 2e-6, 0.1, 0.35, 1.0, 1.5, FRAC_PI_2, 2.0, 3.0, PI,
        ];
        for &theta in &angles {
            for &limit in angles.iter().filter(|&&limit| limit != theta) {
                let n1 = Vector3::new(0.0, 0.0, 1.0);
                let n2 = Vector3::new(theta.sin(), 0.0, theta.cos()) * 0.999_999_999;
                let bend = Bend::between(&n1, &n2);
                let measured = bend.sin.atan2(bend.cos);
                assert_eq!(
                    bend.exceeds(&Bend::of_angle(limit)),
                    measured > limit,
                    "{theta} against {limit}"
                );
            }
        }
        // An angle equal to the limit does not exceed it (a crease at exactly the crease
        // angle stays smooth, as the angle compared with `<=` had it).
        for &theta in &angles {
            let bend = Bend::of_angle(theta);
            assert!(!bend.exceeds(&bend), "{theta}");
        }
        // Pi against a limit of 0, though the two are on one line: greater; and not the
        // other way round.
        let (pi, zero) = (
            Bend {
                sin: 0.0,
                cos: -1.0,
            },
            Bend { sin: 0.0, cos: 1.0 },
        );
        assert!(pi.exceeds(&zero) && !zero.exceeds(&pi) && !zero.exceeds(&zero));
    }

    #[test]
    fn crease_angle_and_axes_and_units() {
        // With a crease of 3 degrees the cylinder's sides all show.
        let placement = MeshPlacement {
            crease_deg: 3.0,
            ..z_up()
        };
        let (_, stats) = import(&cylinder(64), &placement);
        assert_eq!((stats.creases, stats.smooth), (192, 0));
        // Y-up in millimetres, turned 90 degrees clockwise and moved: (1000, 0, -2000) mm
        // is 1 m east and 2 m north, then turned to 1 m south and 2 m east, then moved.
        let placement = MeshPlacement {
            unit: Unit::Millimetre,
            turn_deg: 90.0,
            offset: Vector3::new(10.0, 20.0, 0.0),
            ..MeshPlacement::default()
        };
        let placed = place(&[Point3::new(1000.0, 500.0, -2000.0)], &placement);
        assert!(
            (placed[0] - Point3::new(12.0, 19.0, 0.5)).norm() < 1e-12,
            "{}",
            placed[0]
        );
        assert_eq!(Unit::Foot.metres(), 0.3048);
        assert_eq!(Unit::Inch.metres(), 0.0254);
    }

    #[test]
    fn a_stray_vertex_far_away_does_not_weld_the_model_into_a_point() {
        // A 10 cm cube in georeferenced coordinates, plus one unused vertex at the origin.
        let mut text = String::from("v 0 0 0\n");
        for line in CUBE.lines() {
            match line.strip_prefix("v ") {
                Some(v) => {
                    let c: Vec<f64> = v.split_whitespace().map(|w| w.parse().unwrap()).collect();
                    writeln!(
                        text,
                        "v {} {} {}",
                        500000.0 + c[0] * 0.1,
                        5000000.0 + c[1] * 0.1,
                        c[2] * 0.1
                    )
                    .unwrap();
                }
                None => {
                    let shifted: Vec<String> = line
                        .split_whitespace()
                        .skip(1)
                        .map(|i| (i.parse::<u32>().unwrap() + 1).to_string())
                        .collect();
                    writeln!(text, "f {}", shifted.join(" ")).unwrap();
                }
            }
        }
        let (site, stats) = import(&text, &z_up());
        assert_eq!(
            (stats.vertices, site.edges.len(), stats.dropped_faces),
            (9, 12, 0)
        );
    }

    #[test]
    fn positions_weld_within_the_tolerance_and_strays_among_themselves() {
        // Worked by hand: the used positions span 1 m in x, so the tolerance is 1e-7 m.
        // B' lies 0.2 tolerances from B and welds into it. The unused strays lie 10^10
        // tolerances out, beyond the packed keys' 2^32, and go the general way: S2 is S1
        // again, S3 0.3 tolerances from them (welds), S4 ten tolerances off (does not).
        let p = |x: f64| Point3::new(x, 0.0, 0.0);
        let positions = [
            p(0.0),           // A
            p(1000.0),        // S1
            p(1.0),           // B
            p(1000.0),        // S2
            p(1.0 + 2e-8),    // B'
            p(1000.0 + 3e-8), // S3
            p(1000.0 + 1e-6), // S4
        ];
        let used = [true, false, true, false, true, false, false];
        for two_cores in [false, true] {
            // On two cores the halves (0..3 and 3..7) weld across the split.
            assert_eq!(
                weld(&positions, &used, two_cores),
                (vec![0, 1, 2, 1, 2, 1, 3], 4),
                "two cores: {two_cores}"
            );
        }
    }

    /// A run of level triangles over `vertices` welded vertices, with its low-end counts,
    /// as welding leaves it.
    fn level_triangles(vertices: usize, rings: &[[u32; 3]]) -> WeldedFaces {
        let mut run = WeldedFaces::with_room(&[], vertices, false);
        for ring in rings {
            run.firsts.push(run.corners.len() as u32);
            run.corners.vertices.extend(ring);
            count_low_ends(&mut run.low_ends, ring);
            run.faces.push(MeshFace {
                normal: Vector3::z(),
                item: ItemId(0),
                smoothing: PackedSmoothing::of(Smoothing::Unsaid),
            });
        }
        run
    }

    #[test]
    fn face_edges_are_grouped_by_their_lower_vertex_with_their_direction() {
        // Worked by hand: triangles (0 1 2) and (2 1 3), numbered from 10, share the edge
        // 1-2, which they run in opposite directions (consistent winding). Each side of a
        // face f from a to b is (high, 2f + [a < b]) at its lower vertex.
        let run = level_triangles(4, &[[0, 1, 2], [2, 1, 3]]);
        let grouped = EdgesByLow::of(&run, 10, 4);
        assert_eq!(grouped.at(0), [(1, 21), (2, 20)]);
        assert_eq!(grouped.at(1), [(2, 21), (2, 22), (3, 23)]);
        assert_eq!(grouped.at(2), [(3, 22)]);
        assert_eq!((face_of(23), runs_upwards(23)), (11, true));
        assert_eq!((face_of(22), runs_upwards(22)), (11, false));
        assert_eq!(grouped.at(3), []);
    }

    #[test]
    fn a_ring_has_a_side_from_each_corner_to_the_next_and_back_to_the_first() {
        assert_eq!(
            sides(&['a', 'b', 'c']).collect::<Vec<_>>(),
            [(0, 'a', 'b'), (1, 'b', 'c'), (2, 'c', 'a')]
        );
        assert_eq!(sides(&['a']).collect::<Vec<_>>(), [(0, 'a', 'a')]);
        assert_eq!(sides::<char>(&[]).count(), 0);
    }

    #[test]
    fn faces_of_no_area_are_counted() {
        let (_, stats) = import(
            "v 0 0 0\nv 1 0 0\nv 2 0 0\nv 0 1 0\nf 1 2 3\nf 1 1 1\nf 1 2 4\n",
            &z_up(),
        );
        assert_eq!((stats.faces, stats.dropped_faces), (1, 2));
    }

    #[test]
    fn lines_groups_and_non_manifold_edges() {
        let text = "g fin\nv 0 0 0\nv 1 0 0\nv 0 1 0\nv 0 -1 0\nv 0 0 1\n\
            f 1 2 3\nf 2 1 4\nf 1 2 5\ng mast\nl 1 5 3\n";
        let (site, stats) = import(text, &z_up());
        assert_eq!(stats.non_manifold, 1, "the edge 1-2 has three faces");
        assert_eq!(stats.line_segments, 2);
        let layers: Vec<Option<&str>> = site.items.iter().map(|i| i.layer.as_deref()).collect();
        assert_eq!(layers, vec![Some("fin"), Some("mast")]);
    }

    /// A square tower of side 2 and height 4 with a pyramid roof whose faces rise
    /// `pitch_deg` from the horizontal, quads and triangles wound outwards, z up.
    fn tower(pitch_deg: f64) -> String {
        let apex = 4.0 + pitch_deg.to_radians().tan();
        format!(
            "v 0 0 0\nv 2 0 0\nv 2 2 0\nv 0 2 0\nv 0 0 4\nv 2 0 4\nv 2 2 4\nv 0 2 4\nv 1 1 {apex}\n\
             f 1 4 3 2\nf 1 2 6 5\nf 2 3 7 6\nf 3 4 8 7\nf 4 1 5 8\n\
             f 5 6 9\nf 6 7 9\nf 7 8 9\nf 8 5 9\n"
        )
    }

    #[test]
    fn the_default_crease_keeps_the_eaves_of_a_steep_pyramid_roof() {
        // Faces rising 63 degrees meet the walls at 27 degrees between normals (90 - 63),
        // the case of the issue; 30 degrees lost the eaves.
        let (site, stats) = import(&tower(63.0), &z_up());
        // 4 base + 4 corners + 4 eaves + 4 hips.
        assert_eq!((stats.creases, stats.smooth, stats.boundary), (16, 0, 0));
        assert_eq!(site.edges.len(), 16);
        let old = MeshPlacement {
            crease_deg: 30.0,
            ..z_up()
        };
        assert_eq!(import(&tower(63.0), &old).1.creases, 12);
        // Closed: one solid, and a standpoint inside it is found.
        assert_eq!(
            site.models,
            vec![MeshModel {
                items: 0..1,
                faces: 0..site.faces.len(),
                open_corners: Vec::new(),
            }]
        );
        let inside = crate::scene::solids_enclosing(&site, &Point3::new(1.0, 1.0, 1.6));
        assert_eq!(inside, vec![ItemId(0)]);
        assert!(crate::scene::solids_enclosing(&site, &Point3::new(5.0, 1.0, 1.6)).is_empty());
    }

    /// An upright box from `(x0, y0, 0)` to `(x1, y1, height)` as OBJ text (z up), its
    /// vertices numbered from `first`; without its floor when `floor` is false.
    fn box_obj(
        name: &str,
        [x0, y0, x1, y1, height]: [f64; 5],
        first: usize,
        floor: bool,
    ) -> String {
        let mut text = format!("o {name}\n");
        for z in [0.0, height] {
            for (x, y) in [(x0, y0), (x1, y0), (x1, y1), (x0, y1)] {
                writeln!(text, "v {x} {y} {z}").unwrap();
            }
        }
        let sides = [
            [1, 2, 6, 5],
            [2, 3, 7, 6],
            [3, 4, 8, 7],
            [4, 1, 5, 8],
            [5, 6, 7, 8],
        ];
        for side in sides.iter().chain(floor.then_some(&[4, 3, 2, 1])) {
            let [a, b, c, d] = side.map(|k| k + first - 1);
            writeln!(text, "f {a} {b} {c} {d}").unwrap();
        }
        text
    }

    #[test]
    fn a_closed_house_in_an_open_model_is_still_a_solid() {
        // A ground sheet, a closed house and a shed without a floor, one model: open as a
        // whole, so only its closed pieces are solids.
        let mut text =
            String::from("o ground\nv -50 -50 0\nv 50 -50 0\nv 50 50 0\nv -50 50 0\nf 1 2 3 4\n");
        text += &box_obj("house", [0.0, 0.0, 8.0, 6.0, 5.0], 5, true);
        text += &box_obj("shed", [20.0, 0.0, 24.0, 3.0, 2.5], 13, false);
        let (site, stats) = import(&text, &z_up());
        assert!(stats.boundary > 0);
        assert_eq!(site.models.len(), 1);
        assert!(!site.models[0].is_closed());
        let named = |items: Vec<ItemId>| -> Vec<String> {
            items
                .iter()
                .map(|i| site.items[i.0 as usize].layer.clone().unwrap_or_default())
                .collect()
        };
        let inside = |x, y, z| named(crate::scene::solids_enclosing(&site, &Point3::new(x, y, z)));
        assert_eq!(inside(4.0, 3.0, 1.6), ["house"]);
        assert_eq!(inside(7.5, 0.5, 4.9), ["house"]);
        // Outside the house (beside it, above it; below its eaves, where the ray goes in
        // through the wall and out through the roof), and inside the open shed: no solid.
        assert!(inside(-2.0, 3.0, 1.6).is_empty());
        assert!(inside(-1.0, -1.0, 0.5).is_empty());
        assert!(inside(4.0, 3.0, 5.5).is_empty());
        assert!(inside(22.0, 1.5, 1.6).is_empty());
    }

    #[test]
    fn smoothing_packs_into_four_bytes_and_back() {
        for smoothing in [
            Smoothing::Unsaid,
            Smoothing::Off,
            Smoothing::Group(1),
            Smoothing::Group(7),
            Smoothing::Group(u32::MAX - 1),
        ] {
            assert_eq!(PackedSmoothing::of(smoothing).get(), smoothing);
        }
        assert_eq!(std::mem::size_of::<MeshFace>(), 32);
    }

    #[test]
    fn smoothing_groups_decide_whatever_the_angle() {
        // The whole cylinder in one group: sides smooth, and the caps' rims too (a rounded
        // can): no creases at all.
        let text = format!("s 1\n{}", cylinder(64));
        let (site, stats) = import(&text, &z_up());
        assert_eq!((stats.creases, stats.smooth, stats.by_file), (0, 192, 192));
        assert!(site.edges.is_empty());
        // Caps in their own groups: the rims come back, the sides stay smooth.
        let mut text = String::from("s 1\n");
        for line in cylinder(64).lines() {
            if line.starts_with("f") && line.split_whitespace().count() > 5 {
                text.push_str("s 2\n");
            }
            text.push_str(line);
            text.push('\n');
        }
        let (_, stats) = import(&text, &z_up());
        assert_eq!((stats.creases, stats.smooth), (128, 64));
        // `s off` (no smoothing group, by the Wavefront appendix): every facet is hard,
        // 5.6 degrees apart and all.
        let (_, stats) = import(&format!("s off\n{}", cylinder(64)), &z_up());
        assert_eq!((stats.creases, stats.smooth), (192, 0));
        let (_, stats) = import(&format!("s 0\n{}", cylinder(64)), &z_up());
        assert_eq!((stats.creases, stats.smooth), (192, 0));
        // The tower's roof in one group with the walls: the eaves and hips are smooth
        // (silhouettes only), though the crease angle would draw them.
        let (_, stats) = import(&format!("s 3\n{}", tower(63.0)), &z_up());
        assert_eq!((stats.creases, stats.smooth), (0, 16));
    }

    #[test]
    fn normals_decide_where_both_faces_give_them() {
        // Two quads folded 10 degrees (below any crease angle) along x = 1.
        let fold = |normals: &str, faces: &str| {
            let z = 10f64.to_radians().tan();
            format!("v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\nv 2 0 {z}\nv 2 1 {z}\n{normals}{faces}")
        };
        // Split normals along the fold: hard.
        let split = fold(
            "vn 0 0 1\nvn -0.17 0 0.98\n",
            "f 1//1 2//1 3//1 4//1\nf 2//2 5//2 6//2 3//2\n",
        );
        let (site, stats) = import(&split, &z_up());
        assert_eq!((stats.creases, stats.by_file), (1, 1));
        assert_eq!(site.edges.len(), 7);
        // Shared (averaged) normals at both ends of the fold, though written twice: smooth.
        let shared = fold(
            "vn 0 0 1\nvn -0.17 0 0.98\nvn -0.087 0 0.996\nvn -0.087 0 0.996\n",
            "f 1//1 2//3 3//4 4//1\nf 2//3 5//2 6//2 3//3\n",
        );
        let (_, stats) = import(&shared, &z_up());
        assert_eq!((stats.creases, stats.smooth, stats.by_file), (0, 1, 1));
        // Normals beat smoothing groups; without normals the groups decide.
        let (_, stats) = import(&format!("s 1\n{split}"), &z_up());
        assert_eq!(stats.creases, 1);
        let plain = fold("", "s 1\nf 1 2 3 4\ns 2\nf 2 5 6 3\n");
        assert_eq!(import(&plain, &z_up()).1.creases, 1);
        // A fold of 10 degrees with nothing said: the crease angle leaves it smooth.
        let bare = fold("", "f 1 2 3 4\nf 2 5 6 3\n");
        assert_eq!(import(&bare, &z_up()).1.creases, 0);
    }

    #[test]
    fn two_cores_give_what_one_gives() {
        // Groups and materials (one whose first face has no area), smoothing groups,
        // normals split and shared, concave faces, faces of no area, holes, a non-manifold
        // fin and a polyline: every path of the two-core split against one core.
        let mut text = String::from("vn 0 0 1\nvn 0 1 0\n");
        let mut base = 0;
        for k in 0..12 {
            let x = 3.0 * k as f64;
            let group = ["wall", "roof", "slab"][k % 3];
            writeln!(text, "g {group}\nusemtl m{}\ns {}", k % 2, k % 4).unwrap();
            if k == 4 {
                // A face of no area first: its item comes from the next face.
                writeln!(text, "g sliver\nf {} {} {}", base + 1, base + 1, base + 2).unwrap();
            }
            for line in tower(40.0 + k as f64).lines() {
                match line.strip_prefix("v ") {
                    Some(v) => {
                        let c: Vec<f64> = v.split(' ').map(|w| w.parse().unwrap()).collect();
                        writeln!(text, "v {} {} {}", c[0] + x, c[1], c[2]).unwrap();
                    }
                    None => {
                        let corners: Vec<String> = line
                            .split(' ')
                            .skip(1)
                            .map(|i| {
                                let i = i.parse::<usize>().unwrap() + base;
                                if k % 3 == 1 {
                                    format!("{i}//{}", 1 + i % 2)
                                } else {
                                    i.to_string()
                                }
                            })
                            .collect();
                        writeln!(text, "f {}", corners.join(" ")).unwrap();
                    }
                }
            }
            // An L-shaped (concave) lid beside it, and a fin on its base.
            writeln!(
                text,
                "v {x} 5 0\nv {} 5 0\nv {} 6 0\nv {} 6 0\nv {} 7 0\nv {x} 7 0\nf -6 -5 -4 -3 -2 -1\nv {} 0 -1\nf {} {} -1",
                x + 2.0, x + 2.0, x + 1.0, x + 1.0, x + 1.0, base + 1, base + 2
            ).unwrap();
            base += 16;
        }
        text.push_str("g mast\nl 1 5 9\n");
        let mut obj = parse_obj(text.as_bytes(), Path::new("t.obj")).unwrap();
        // A hole in the first tower's floor (as CityJSON surfaces have them).
        obj.positions
            .extend([[0.5, 0.5, 0.0], [1.5, 0.5, 0.0], [1.0, 1.5, 0.0]].map(Point3::from));
        let n = obj.positions.len() as u32;
        obj.holes.push((0, vec![n - 3, n - 2, n - 1]));
        let placement = z_up();
        let names = |g, m| model_item(&obj, "t.obj", g, m);
        let mut one = Site::default();
        let one_stats = add_mesh_on_cores(&mut one, &obj, &placement, &names, usize::MAX);
        let mut two = Site::default();
        let two_stats = add_mesh_on_cores(&mut two, &obj, &placement, &names, 0);
        assert_eq!(one_stats, two_stats);
        assert_eq!(one, two);
        assert!(
            one_stats.dropped_faces == 1 && one_stats.non_manifold > 0 && one_stats.by_file > 0
        );
        assert!(
            one.items.len() > 6 && one.faces.len() > 12 * 18,
            "{} {}",
            one.items.len(),
            one.faces.len()
        );
        // And the smallest models.
        for text in [
            CUBE,
            "v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 3\n",
            "v 0 0 0\nv 1 0 0\nl 1 2\n",
        ] {
            let obj = parse_obj(text.as_bytes(), Path::new("t.obj")).unwrap();
            let (mut one, mut two) = (Site::default(), Site::default());
            let names = |g, m| model_item(&obj, "t.obj", g, m);
            let a = add_mesh_on_cores(&mut one, &obj, &placement, &names, usize::MAX);
            let b = add_mesh_on_cores(&mut two, &obj, &placement, &names, 0);
            assert_eq!((a, one), (b, two));
        }
    }

    #[test]
    fn materials_and_groups_become_items_and_layers() {
        let text = "v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\ng wall\nusemtl brick\nf 1 2 3\ng roof\nf 1 3 4\nusemtl slate\nf 1 2 4\n";
        let (site, _) = import(text, &z_up());
        let items: Vec<(Option<&str>, Option<&str>)> = site
            .items
            .iter()
            .map(|i| (i.label.as_deref(), i.layer.as_deref()))
            .collect();
        assert_eq!(
            items,
            [
                (Some("t.obj: wall (brick)"), Some("brick")),
                (Some("t.obj: roof (brick)"), Some("brick")),
                (Some("t.obj: roof (slate)"), Some("slate")),
            ]
        );
    }

    #[test]
    fn a_neighbour_wound_the_wrong_way_is_turned_over_before_its_bend_is_measured() {
        // Worked by hand: a flat unit square as two triangles, the second wound the wrong
        // way round, so both run the diagonal from corner 3 to corner 1. Turned over, its
        // normal is the first's (+z): a bend of 0, and the diagonal is no edge. Taken as
        // given, the two normals are opposite, a bend of pi, and the diagonal a crease.
        let text = "v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\nf 1 2 3\nf 1 4 3\n";
        let (site, stats) = import(text, &z_up());
        assert_eq!((stats.edges, stats.boundary, stats.creases), (5, 4, 0));
        assert_eq!(site.edges.len(), 4);
    }

    #[test]
    fn a_smoothing_group_numbered_out_of_range_stays_a_group() {
        // Worked by hand from the packing's two reserved numbers (0 unsaid, u32::MAX off): a
        // caller's group u32::MAX is kept as the highest group left, u32::MAX - 1, not read
        // back as `s off` (which would make its faces hard); a group 0 as group 1.
        let packed = |n| PackedSmoothing::of(Smoothing::Group(n)).get();
        assert_eq!(packed(u32::MAX), Smoothing::Group(u32::MAX - 1));
        assert_eq!(packed(0), Smoothing::Group(1));
    }

    #[test]
    fn normals_are_compared_end_by_end_along_the_shared_edge() {
        // Two quads folded 10 degrees along x = 1, the edge from vertex 2 (y = 0) to vertex
        // 3 (y = 1), as in `normals_decide_where_both_faces_give_them`; smooth shading gives
        // each end of the fold a normal of its own (common practice: a vertex normal
        // averages the faces around that vertex), here 3 at vertex 2 and 4 at vertex 3.
        let z = 10f64.to_radians().tan();
        let fold = |second: &str| {
            format!(
                "v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\nv 2 0 {z}\nv 2 1 {z}\n\
                 vn 0 0 1\nvn -0.17 0 0.98\nvn -0.087 0 0.996\nvn -0.087 0.05 0.995\n\
                 f 1//1 2//3 3//4 4//1\n{second}\n"
            )
        };
        // Worked by hand: both faces give 3 at vertex 2 and 4 at vertex 3: smooth.
        let (_, stats) = import(&fold("f 2//3 5//2 6//2 3//4"), &z_up());
        assert_eq!((stats.creases, stats.smooth, stats.by_file), (0, 1, 1));
        // The same at one end and split at the other, either end: hard.
        for second in ["f 2//3 5//2 6//2 3//2", "f 2//2 5//2 6//2 3//4"] {
            let (_, stats) = import(&fold(second), &z_up());
            assert_eq!(
                (stats.creases, stats.smooth, stats.by_file),
                (1, 0, 1),
                "{second}"
            );
        }
    }

    #[test]
    fn a_welded_hole_ring_keeps_each_corner_once_and_does_not_close_on_itself() {
        // Worked by hand: corners 0 to 5 weld to 7 7 8 9 7 7 (a hole whose file repeats
        // corners and closes back on its first): the repeats within go, and so do the 7s
        // at the end that only return to the first corner, leaving the triangle 7 8 9.
        assert_eq!(
            welded_ring(&[0, 1, 2, 3, 4, 5], &[7, 7, 8, 9, 7, 7]),
            [7, 8, 9]
        );
        // A ring already without repeats comes through as it is, in its order.
        assert_eq!(welded_ring(&[2, 0, 1], &[5, 3, 4]), [4, 5, 3]);
    }

    #[test]
    fn a_holes_edges_belong_to_its_face_with_their_direction() {
        // Worked by hand: a run numbered from 10 with triangles (0 1 2) and (2 1 3), the
        // second (face 11) holding the hole ring 5 4 6. Its sides 5-4, 4-6 and 6-5 are
        // (high, 2f + [a < b]) at their lower vertex: 22, 23 and 22.
        let mut run = level_triangles(7, &[[0, 1, 2], [2, 1, 3]]);
        let hole = vec![5, 4, 6];
        count_low_ends(&mut run.low_ends, &hole);
        run.holes.push((1, hole));
        let grouped = EdgesByLow::of(&run, 10, 7);
        assert_eq!(grouped.at(4), [(5, 22), (6, 23)]);
        assert_eq!(grouped.at(5), [(6, 22)]);
        assert_eq!(grouped.at(6), []);
    }
}
