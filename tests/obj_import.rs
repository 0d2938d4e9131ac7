//! The OBJ importer against outside material: hand-written cases from the Wavefront
//! "Object Files (.obj)" appendix of the Advanced Visualizer manual (tests/fixtures/obj,
//! described in its README), and two open datasets from the npm registry, the packages
//! `bunny` 1.0.1 and `teapot` 1.0.0 (both marked "Public Domain" by their packages),
//! converted to OBJ by tests/fixtures/meshes/convert_npm_mesh.py (each file's header names
//! its source).

mod common;

use common::{succeeds, Scratch};
use nalgebra::Point3;
use pansite::render::{draw, RenderSettings};
use pansite::scene::{load_obj, parse_obj, MeshPlacement, MeshStats, Site, Standpoint};
use pansite::Error;
use std::collections::HashSet;
use std::path::{Path, PathBuf};

fn fixture(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures")
        .join(name)
}

fn import(name: &str) -> (Site, MeshStats) {
    load_obj(&fixture(name), &MeshPlacement::default()).unwrap()
}

/// Unique undirected edges of the faces as written (no welding), counted here independently
/// of the importer.
fn raw_edges(name: &str) -> usize {
    let bytes = std::fs::read(fixture(name)).unwrap();
    let obj = parse_obj(&bytes, Path::new(name)).unwrap();
    let mut edges = HashSet::new();
    for face in &obj.faces {
        let face = obj.face_corners(face);
        for k in 0..face.len() {
            let (a, b) = (face[k], face[(k + 1) % face.len()]);
            edges.insert((a.min(b), a.max(b)));
        }
    }
    edges.len()
}

#[test]
fn bunny_counts_match_the_dataset() {
    // npm bunny 1.0.1: 1,839 vertices, 3,674 triangles, 5,511 unique edges, closed.
    let (site, stats) = import("meshes/bunny.obj");
    assert_eq!(
        (stats.vertices, stats.triangles, stats.edges),
        (1839, 3674, 5511)
    );
    assert_eq!((stats.boundary, stats.non_manifold), (0, 0));
    // Euler's formula for a closed surface of genus 0: V - E + F = 2.
    assert_eq!(
        stats.vertices as i64 - stats.edges as i64 + stats.triangles as i64,
        2
    );
    assert_eq!(site.faces.len(), 3674);
    assert_eq!(raw_edges("meshes/bunny.obj"), 5511);
}

#[test]
fn teapot_counts_match_the_dataset_and_welding_joins_its_patches() {
    // npm teapot 1.0.0: 792 vertices, 992 triangles, 1,752 edges, as written: 32 patches
    // that share positions along their seams.
    let bytes = std::fs::read(fixture("meshes/teapot.obj")).unwrap();
    let obj = parse_obj(&bytes, Path::new("teapot.obj")).unwrap();
    assert_eq!((obj.positions.len(), obj.faces.len()), (792, 992));
    assert_eq!(raw_edges("meshes/teapot.obj"), 1752);
    // Welded, the patches join: 529 positions, 1,520 edges, the 64 left open are the rims
    // of the body and lid and the ends of the spout and handle (counts confirmed
    // independently when the fixture was made; see tests/fixtures/obj/README.md).
    let (_, stats) = import("meshes/teapot.obj");
    assert_eq!(
        (stats.vertices, stats.triangles, stats.edges, stats.boundary),
        (529, 992, 1520, 64)
    );
}

#[test]
fn cubes_draw_their_twelve_edges_and_no_diagonal() {
    for name in ["obj/cube_triangles.obj", "obj/cube_quads_relative.obj"] {
        let (site, stats) = import(name);
        assert_eq!(stats.vertices, 8, "{name}");
        assert_eq!(site.edges.len(), 12, "{name}");
        assert!(site.silhouette_candidates.is_empty(), "{name}");
    }
}

#[test]
fn cylinder_draws_its_rims_and_two_silhouettes() {
    let (site, stats) = import("obj/cylinder64.obj");
    assert_eq!((stats.faces, stats.edges), (66, 192));
    assert_eq!(site.edges.len(), 128, "the two rims");
    // Y up in the file: the axis is vertical in the site; an eye outside sees two
    // generators on the outline.
    let eye = Point3::new(0.0, -6.0, 0.3);
    let outline = site
        .silhouette_candidates
        .iter()
        .filter(|c| c.is_outline_from(&eye))
        .count();
    assert_eq!(outline, 2);
    // From inside, none.
    let inside = Point3::new(0.1, 0.0, 0.2);
    assert_eq!(
        site.silhouette_candidates
            .iter()
            .filter(|c| c.is_outline_from(&inside))
            .count(),
        0
    );
}

#[test]
fn ngons_lines_groups_and_index_forms() {
    let (site, stats) = import("obj/ngon_and_lines.obj");
    assert_eq!(
        (
            stats.faces,
            stats.triangles,
            stats.boundary,
            stats.line_segments
        ),
        (1, 3, 5, 4)
    );
    assert_eq!(site.edges.len(), 9);
    let (site, stats) = import("obj/groups_vtn.obj");
    assert_eq!((stats.vertices, stats.faces, stats.triangles), (8, 5, 6));
    assert_eq!((stats.edges, stats.boundary), (12, 8));
    let layers: HashSet<&str> = site
        .items
        .iter()
        .filter_map(|i| i.layer.as_deref())
        .collect();
    assert!(layers.len() >= 2, "groups become layers: {layers:?}");
    // ... and layers of the drawing, one for each group that has edges.
    let standpoint = Standpoint::from_degrees("s", 0.3, -5.0, 1.6, 0.0, 0.0, 0.0);
    let settings = RenderSettings {
        width: 400,
        height: 200,
        overlays: false,
        ..RenderSettings::default()
    };
    let render = draw(&site, &standpoint, &settings).unwrap();
    let drawn: Vec<&str> = render
        .drawing
        .layers
        .iter()
        .map(|l| l.name.as_str())
        .collect();
    for layer in &layers {
        let name = format!("wireframe: {layer}");
        let has_edges = site
            .edges
            .iter()
            .any(|e| site.items[e.item.0 as usize].layer.as_deref() == Some(layer));
        assert_eq!(
            drawn.contains(&name.as_str()),
            has_edges,
            "{name} in {drawn:?}"
        );
    }
}

#[test]
fn bad_files_are_refused_on_the_right_line() {
    // Lines as listed in tests/fixtures/obj/README.md.
    let cases = [
        ("index_out_of_range.obj", 8, "out of range"),
        ("index_zero.obj", 9, "start at 1"),
        ("face_two_vertices.obj", 8, "at least 3"),
        ("line_one_vertex.obj", 10, "at least 2"),
        ("malformed_number.obj", 6, "abc"),
        ("nan_coordinate.obj", 8, "finite"),
        (
            "relative_index_before_start.obj",
            9,
            "before the first vertex",
        ),
        ("empty.obj", 1, "empty"),
        ("binary_garbage.obj", 1, "binary"),
    ];
    for (name, expected_line, expected_text) in cases {
        let path = fixture(&format!("obj/bad/{name}"));
        match load_obj(&path, &MeshPlacement::default()) {
            Err(Error::Scene { line, message, .. }) => {
                assert_eq!(line, expected_line, "{name}: {message}");
                assert!(message.contains(expected_text), "{name}: {message}");
            }
            other => panic!("{name}: expected an error, got {:?}", other.map(|(_, s)| s)),
        }
    }
}

/// Every valid fixture, read by pansite and by obj-rs 0.7 (crates.io `obj-rs`, an
/// independent OBJ reader): the same positions (obj-rs keeps f32), the same faces' position
/// and normal indices, and each face in the same group, smoothing group and material.
///
/// obj-rs refuses a `g` line of several names, which the Wavefront appendix allows
/// (`groups_vtn.obj` has `g back shared_name`; pansite names that group by the whole line):
/// obj-rs reads such a file with each such line cut to its first name, and everything else
/// is compared as for the other files, the group by that first name.
#[test]
fn obj_rs_reads_every_valid_fixture_the_same() {
    use obj::raw::object::Polygon;
    use pansite::scene::{Smoothing, NO_NORMAL};
    let mut files: Vec<String> = ["obj", "meshes"]
        .iter()
        .flat_map(|folder| {
            std::fs::read_dir(fixture(folder))
                .unwrap()
                .map(move |e| format!("{folder}/{}", e.unwrap().file_name().to_string_lossy()))
        })
        .filter(|name| name.ends_with(".obj"))
        .collect();
    files.sort();
    assert!(files.len() >= 8, "{files:?}");
    let mut cut = Vec::new();
    for name in &files {
        let bytes = std::fs::read(fixture(name)).unwrap();
        let ours = parse_obj(&bytes, Path::new(name)).unwrap();
        // Each `g` line of several names cut to its first, for obj-rs.
        let text = String::from_utf8(bytes.clone()).unwrap();
        let one_name_groups: String = text
            .lines()
            .map(|line| {
                let words: Vec<&str> = line.split_whitespace().collect();
                if words.first() == Some(&"g") && words.len() > 2 {
                    cut.push(name.as_str());
                    format!("g {}\n", words[1])
                } else {
                    format!("{line}\n")
                }
            })
            .collect();
        let theirs = obj::raw::parse_obj(std::io::BufReader::new(one_name_groups.as_bytes()))
            .unwrap_or_else(|e| panic!("obj-rs refuses {name}: {e}"));
        assert_eq!(ours.positions.len(), theirs.positions.len(), "{name}");
        for (p, q) in ours.positions.iter().zip(&theirs.positions) {
            for (a, b) in [(p.x, q.0), (p.y, q.1), (p.z, q.2)] {
                // f32 keeps 24 bits: a relative error of 6e-8, plus a little near zero.
                assert!(
                    (a - b as f64).abs() <= 1e-7 * a.abs() + 1e-30,
                    "{name}: {a} {b}"
                );
            }
        }
        assert_eq!(ours.normals.len(), theirs.normals.len(), "{name}");
        assert_eq!(ours.faces.len(), theirs.polygons.len(), "{name}");
        // Per polygon: the group, smoothing group and material obj-rs puts it in.
        let n = theirs.polygons.len();
        let mut group = vec!["default".to_owned(); n];
        let mut smoothing = vec![None; n];
        let mut material = vec![String::new(); n];
        for (key, g) in &theirs.groups {
            for range in &g.polygons {
                (range.start..range.end).for_each(|i| group[i] = key.clone());
            }
        }
        for (key, g) in &theirs.smoothing_groups {
            for range in &g.polygons {
                (range.start..range.end).for_each(|i| smoothing[i] = Some(*key as u32));
            }
        }
        for (key, g) in &theirs.meshes {
            for range in &g.polygons {
                (range.start..range.end).for_each(|i| material[i] = key.clone());
            }
        }
        for (k, (face, polygon)) in ours.faces.iter().zip(&theirs.polygons).enumerate() {
            let (positions, normals): (Vec<usize>, Vec<Option<usize>>) = match polygon {
                Polygon::P(v) => (v.clone(), vec![None; v.len()]),
                Polygon::PT(v) => (v.iter().map(|c| c.0).collect(), vec![None; v.len()]),
                Polygon::PN(v) => v.iter().map(|c| (c.0, Some(c.1))).unzip(),
                Polygon::PTN(v) => v.iter().map(|c| (c.0, Some(c.2))).unzip(),
            };
            let our_positions: Vec<usize> = ours
                .face_corners(face)
                .iter()
                .map(|&i| i as usize)
                .collect();
            let our_normals: Vec<Option<usize>> = ours
                .face_normals(face)
                .iter()
                .map(|&i| (i != NO_NORMAL).then_some(i as usize))
                .collect();
            assert_eq!(our_positions, positions, "{name}: face {k}");
            assert_eq!(our_normals, normals, "{name}: face {k}");
            // obj-rs names the group of faces before any `g` "default"; pansite leaves it
            // unnamed (or names it after the object).
            if group[k] != "default" {
                let our_group = &ours.groups[face.group as usize];
                let first_name = our_group.split_whitespace().next().unwrap_or_default();
                assert_eq!(first_name, group[k], "{name}: face {k}");
            }
            let our_smoothing = match face.smoothing {
                Smoothing::Group(g) => Some(g),
                Smoothing::Off | Smoothing::Unsaid => None,
            };
            assert_eq!(our_smoothing, smoothing[k], "{name}: face {k}");
            assert_eq!(
                ours.materials[face.material as usize], material[k],
                "{name}: face {k}"
            );
        }
    }
    // The one file with a group of two names, and the group pansite gives it.
    assert_eq!(cut, ["obj/groups_vtn.obj"]);
    let vtn = parse_obj(
        &std::fs::read(fixture("obj/groups_vtn.obj")).unwrap(),
        Path::new("groups_vtn.obj"),
    )
    .unwrap();
    let named: Vec<&str> = vtn
        .faces
        .iter()
        .map(|f| vtn.groups[f.group as usize].as_str())
        .collect();
    assert_eq!(
        named,
        ["front", "front", "floor", "floor", "back shared_name"]
    );
}

#[test]
fn the_file_decides_the_towers_edges_and_its_materials_are_layers() {
    let (site, stats) = import("obj/tower_smoothing_materials.obj");
    // Counts stated in the fixture's header (see tests/fixtures/obj/README.md).
    assert_eq!(
        (stats.vertices, stats.faces, stats.edges, stats.boundary),
        (9, 9, 16, 0)
    );
    assert_eq!((stats.creases, stats.smooth, stats.by_file), (12, 4, 16));
    let mut layers: Vec<&str> = site
        .items
        .iter()
        .filter_map(|i| i.layer.as_deref())
        .collect();
    layers.sort();
    assert_eq!(layers, ["slate", "stone"]);
    // tower.mtl defines both materials: no warning.
    assert!(site.warnings.is_empty(), "{:?}", site.warnings);
    assert_eq!(site.models.len(), 1);
    assert!(site.models[0].is_closed());
}

/// What the default crease angle (20 degrees, was 30) adds on the bundled meshes, which say
/// nothing of smoothing: the counts the contributor guide reports.
#[test]
fn what_the_default_crease_angle_draws_on_the_bundled_meshes() {
    let at = |name: &str, crease_deg: f64| {
        let placement = MeshPlacement {
            crease_deg,
            ..MeshPlacement::default()
        };
        load_obj(&fixture(name), &placement).unwrap().1.creases
    };
    let counts: Vec<(usize, usize)> = [
        "meshes/bunny.obj",
        "meshes/teapot.obj",
        "obj/cylinder64.obj",
    ]
    .iter()
    .map(|name| (at(name, 30.0), at(name, 20.0)))
    .collect();
    // The coarse scanned bunny (3,674 triangles) and the teapot (992) are curved all over:
    // 20 degrees draws about twice the creases 30 did (bunny 357 -> 841 of 5,511 edges,
    // teapot 246 -> 467 of 1,520); the cylinder's 64 sides (5.6 degrees) stay smooth and its
    // rims (90 degrees) drawn. Files that carry smoothing groups or normals are not touched.
    assert_eq!(counts, [(357, 841), (246, 467), (128, 128)]);
}

/// A box 2 m wide, 3 m deep and 4 m high, Z up, its first corner at the origin: 8 corners,
/// 6 quads wound outwards.
const BOX_Z_UP: &str = "v 0 0 0\nv 2 0 0\nv 2 3 0\nv 0 3 0\nv 0 0 4\nv 2 0 4\nv 2 3 4\nv 0 3 4\n\
    f 1 4 3 2\nf 5 6 7 8\nf 1 2 6 5\nf 2 3 7 6\nf 3 4 8 7\nf 4 1 5 8\n";

/// The corners `angles` lists, as (x, y, z, azimuth, elevation, distance) read from its CSV.
fn angles_rows(csv: &str) -> Vec<[f64; 6]> {
    let mut lines = csv.lines();
    let head: Vec<&str> = lines.next().unwrap().split(',').collect();
    let column = |name: &str| head.iter().position(|h| *h == name).unwrap();
    let wanted = ["x", "y", "z", "azimuth", "elevation", "distance"].map(column);
    lines
        .map(|line| {
            let cells: Vec<&str> = line.split(',').collect();
            wanted.map(|k| cells[k].parse::<f64>().unwrap())
        })
        .collect()
}

/// Where each corner must lie from an eye, worked here by plane trigonometry (common
/// practice: azimuth clockwise from north, elevation above the level, as the crate docs
/// state): sorted rows of (x, y, z, azimuth, elevation, distance).
fn expected_rows(corners: &[[f64; 3]], eye: [f64; 3]) -> Vec<[f64; 6]> {
    let mut rows: Vec<[f64; 6]> = corners
        .iter()
        .map(|&[x, y, z]| {
            let (dx, dy, dz) = (x - eye[0], y - eye[1], z - eye[2]);
            let level = dx.hypot(dy);
            let azimuth = dx.atan2(dy).to_degrees().rem_euclid(360.0);
            let elevation = dz.atan2(level).to_degrees();
            [x, y, z, azimuth, elevation, level.hypot(dz)]
        })
        .collect();
    rows.sort_by(|a, b| a.partial_cmp(b).unwrap());
    rows
}

fn assert_rows_match(mut found: Vec<[f64; 6]>, expected: &[[f64; 6]], what: &str) {
    found.sort_by(|a, b| a.partial_cmp(b).unwrap());
    assert_eq!(found.len(), expected.len(), "{what}: {found:?}");
    for (f, e) in found.iter().zip(expected) {
        // The table prints millimetres and thousandths of a degree.
        for k in 0..6 {
            assert!(
                (f[k] - e[k]).abs() <= 6e-4,
                "{what}: found {f:?}, expected {e:?}"
            );
        }
    }
}

/// `angles` on a model given directly and on a model a scene names (moved and turned): every
/// corner of the box, where the trigonometry above puts it.
#[test]
fn angles_lists_the_corners_of_a_model_given_directly_or_named_by_a_scene() {
    let dir = Scratch::new("obj-angles");
    dir.write("box.obj", BOX_Z_UP);
    let corners: Vec<[f64; 3]> = BOX_Z_UP
        .lines()
        .filter_map(|l| l.strip_prefix("v "))
        .map(|v| {
            let c: Vec<f64> = v.split(' ').map(|w| w.parse().unwrap()).collect();
            [c[0], c[1], c[2]]
        })
        .collect();
    // Given directly, Z up, the eye 1.6 m over (10, 1) (the default eye height).
    let out = succeeds(
        &dir,
        &[
            "angles", "box.obj", "--up", "z", "--at", "10,1", "--format", "csv",
        ],
    );
    let csv = String::from_utf8_lossy(&out.stdout);
    assert_rows_match(
        angles_rows(&csv),
        &expected_rows(&corners, [10.0, 1.0, 1.6]),
        "direct",
    );
    // Named by a scene: turned 90 degrees clockwise seen from above ((x, y) -> (y, -x)) and
    // moved to (5, 20, 1); the eye 1.7 m over (-6, 12).
    dir.write(
        "yard.ron",
        "Scene(standpoints: [(name: \"gate\", x: -6, y: 12, eye_height: 1.7)], items: [\n\
         Model(file: \"box.obj\", at: (5, 20, 1), turn: 90, up: Z)])",
    );
    let moved: Vec<[f64; 3]> = corners
        .iter()
        .map(|&[x, y, z]| [5.0 + y, 20.0 - x, 1.0 + z])
        .collect();
    let out = succeeds(&dir, &["angles", "yard.ron", "--format", "csv"]);
    let csv = String::from_utf8_lossy(&out.stdout);
    assert_rows_match(
        angles_rows(&csv),
        &expected_rows(&moved, [-6.0, 12.0, 1.7]),
        "named",
    );
}
