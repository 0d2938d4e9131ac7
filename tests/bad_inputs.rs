//! The bad-input corpus (`tests/bad_inputs/`, described in its README): one test per file,
//! each running the real binary in a fresh folder over an earlier good output. Behavioural:
//! a refused file must exit 2 with a message naming the file, the line and column and what
//! was expected, create no file, and leave the earlier output byte for byte as it was; a
//! standpoint inside a solid is a warning (exit 0, a written image).

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

mod common;
use common::Scratch;

/// Stands for a good image written by an earlier run.
const EARLIER: &[u8] = b"\x89PNG\r\n\x1a\nan earlier good output, not to be touched";

fn corpus() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/bad_inputs")
}

/// Every file of the corpus (the README aside) copied into a fresh folder (the shared
/// harness's), with the earlier output beside them.
fn scratch_with_corpus(name: &str) -> Scratch {
    let dir = Scratch::new(&format!("bad-{name}"));
    for entry in std::fs::read_dir(corpus()).unwrap() {
        let path = entry.unwrap().path();
        std::fs::copy(
            &path,
            dir.path(&path.file_name().unwrap().to_string_lossy()),
        )
        .unwrap();
    }
    dir.write("out.png", EARLIER);
    dir
}

/// Every file in the folder with its bytes.
fn contents(dir: &Scratch) -> BTreeMap<String, Vec<u8>> {
    std::fs::read_dir(&dir.0)
        .unwrap()
        .map(|e| {
            let path = e.unwrap().path();
            let name = path.file_name().unwrap().to_string_lossy().into_owned();
            (name, std::fs::read(&path).unwrap())
        })
        .collect()
}

/// Renders `file` from the corpus over `out.png`, small, with `extra` options (an OBJ model
/// gets a standpoint).
fn render(dir: &Scratch, file: &str, extra: &[&str]) -> (Option<i32>, String) {
    let mut args = vec!["render", file, "-o", "out.png"];
    if !extra.contains(&"--size") {
        args.extend(["--size", "256x128"]);
    }
    if file.ends_with(".obj") {
        args.extend(["--at", "0,-5"]);
    }
    args.extend(extra);
    let out = dir.command().args(&args).output().unwrap();
    (
        out.status.code(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// Refused: exit 2, `pansite: error: ` and then `at` (`file:line:column`, or what else
/// names the place) and each of `expected`; the folder exactly as it was.
#[track_caller]
fn refused(file: &str, extra: &[&str], at: &str, expected: &[&str]) {
    let dir = scratch_with_corpus(file);
    let before = contents(&dir);
    let (code, text) = render(&dir, file, extra);
    assert_eq!(code, Some(2), "{file}: {text}");
    assert!(
        text.starts_with(&format!("pansite: error: {at}")),
        "{file}: expected the message to start with {at:?}: {text}"
    );
    for e in expected {
        assert!(text.contains(e), "{file}: expected {e:?} in: {text}");
    }
    assert_eq!(
        text.lines().count(),
        1,
        "{file}: one line of message: {text}"
    );
    assert!(
        contents(&dir) == before,
        "{file}: the folder changed (a file was made, or the earlier output touched)"
    );
}

/// Accepted with a warning: exit 0, the warning, and a new image over the earlier one.
#[track_caller]
fn warned(file: &str, expected: &[&str]) {
    let dir = scratch_with_corpus(file);
    let before = contents(&dir);
    let (code, text) = render(&dir, file, &[]);
    assert_eq!(code, Some(0), "{file}: {text}");
    assert!(text.starts_with("pansite: warning: "), "{file}: {text}");
    for e in expected {
        assert!(text.contains(e), "{file}: expected {e:?} in: {text}");
    }
    let after = contents(&dir);
    assert_eq!(
        after.keys().collect::<Vec<_>>(),
        before.keys().collect::<Vec<_>>(),
        "{file}: only out.png may change"
    );
    assert!(after["out.png"].starts_with(b"\x89PNG") && after["out.png"] != EARLIER);
}

/// One test per corpus file, and the list of files they cover.
macro_rules! corpus {
    ($(
        $test:ident: $file:literal $([$($extra:literal),*])? => $how:ident($($arg:expr),*);
    )*) => {
        $(
            #[test]
            fn $test() {
                corpus!(@call $how, $file, [$($($extra),*)?], $($arg),*);
            }
        )*
        const COVERED: &[&str] = &[$($file),*];
    };
    (@call refused, $file:literal, [$($extra:literal),*], $at:expr, $expected:expr) => {
        refused($file, &[$($extra),*], $at, $expected)
    };
    (@call warned, $file:literal, [$($extra:literal),*], $expected:expr) => {
        warned($file, $expected)
    };
}

corpus! {
    // Empty files, encodings, line ends, garbage.
    empty: "empty.ron" => refused("empty.ron:1:1:", &["empty", "expected a scene"]);
    whitespace_only: "whitespace-only.ron" => refused("whitespace-only.ron:1:1:", &["empty"]);
    byte_order_mark_only: "bom-only.ron" => refused("bom-only.ron:1:1:", &["empty"]);
    byte_order_mark_does_not_shift_columns: "bom-then-typo.ron" => refused("bom-then-typo.ron:4:43:", &["`depht`", "did you mean `depth`"]);
    crlf_line_ends_count_lines: "crlf-typo.ron" => refused("crlf-typo.ron:4:43:", &["`depht`", "did you mean `depth`"]);
    crlf_nan: "crlf-nan.ron" => refused("crlf-nan.ron:4:39:", &["expected a finite number", "NaN"]);
    binary_garbage: "binary-garbage.ron" => refused("binary-garbage.ron:1:3:", &["expected UTF-8 text"]);
    // Truncated and malformed RON.
    truncated_mid_item: "truncated-mid-item.ron" => refused("truncated-mid-item.ron:3:13:", &["end of RON"]);
    truncated_mid_number: "truncated-mid-number.ron" => refused("truncated-mid-number.ron:3:61:", &["Block (item 1)", "Expected comma"]);
    truncated_in_string: "truncated-in-string.ron" => refused("truncated-in-string.ron:2:11:", &["Expected end of string"]);
    unbalanced_bracket: "unbalanced-bracket.ron" => refused("unbalanced-bracket.ron:6:2:", &["trailing characters"]);
    missing_comma: "missing-comma.ron" => refused("missing-comma.ron:4:32:", &["Expected comma"]);
    deep_nesting: "deep-nesting.ron" => refused("deep-nesting.ron:4:", &["nested too deeply"]);
    // Wrong types.
    string_for_number: "string-for-number.ron" => refused("string-for-number.ron:4:39:", &["Block (item 1)", "Expected float"]);
    number_for_list: "number-for-list.ron" => refused("number-for-list.ron:4:25:", &["Expected opening `[`"]);
    number_for_bool: "number-for-bool.ron" => refused("number-for-bool.ron:4:57:", &["Expected boolean"]);
    tuple_too_short: "tuple-too-short.ron" => refused("tuple-too-short.ron:4:25:", &["tuple of size 3", "2 elements"]);
    // Unknown and missing names.
    unknown_field: "unknown-field.ron" => refused("unknown-field.ron:4:53:", &["`hieght`", "did you mean `height`"]);
    unknown_item_kind: "unknown-item-kind.ron" => refused("unknown-item-kind.ron:4:9:", &["`Blok`", "did you mean `Block`"]);
    unknown_scene_field: "unknown-scene-field.ron" => refused("unknown-scene-field.ron:2:5:", &["did you mean `standpoints`"]);
    unknown_roof: "unknown-roof.ron" => refused("unknown-roof.ron:4:70:", &["did you mean `Gable`"]);
    unknown_unit: "unknown-unit.ron" => refused("unknown-unit.ron:3:11:", &["`Furlong`", "`Metre`, `Foot`"]);
    missing_required_field: "missing-required-field.ron" => refused("missing-required-field.ron:4:51:", &["missing field `height` in `Block`"]);
    missing_items: "missing-items.ron" => refused("missing-items.ron:3:1:", &["missing field `items`"]);
    duplicate_field: "duplicate-field.ron" => refused("duplicate-field.ron:4:43:", &["`width` is given twice", "expected it once"]);
    unknown_default_standpoint: "unknown-default-standpoint.ron" => refused("unknown-default-standpoint.ron:3:5:", &["no standpoint named \"there\""]);
    // Numbers out of bounds.
    nan: "nan.ron" => refused("nan.ron:4:40:", &["expected a finite number, found NaN"]);
    nan_standpoint: "nan-standpoint.ron" => refused("nan-standpoint.ron:2:57:", &["expected a finite number, found NaN"]);
    infinity: "infinity.ron" => refused("infinity.ron:4:49:", &["expected a finite number, found inf"]);
    negative_infinity: "negative-infinity.ron" => refused("negative-infinity.ron:4:21:", &["found -inf"]);
    huge_1e300: "huge-1e300.ron" => refused("huge-1e300.ron:4:26:", &["from -1e9 to 1e9, found 1e300"]);
    beyond_1e9: "beyond-1e9.ron" => refused("beyond-1e9.ron:4:36:", &["from -1e9 to 1e9, found 2e9"]);
    negative_width: "negative-width.ron" => refused("negative-width.ron:4:40:", &["greater than zero, found -8"]);
    zero_depth: "zero-depth.ron" => refused("zero-depth.ron:4:50:", &["greater than zero, found 0"]);
    size_below_a_nanometre: "size-below-a-nanometre.ron" => refused("size-below-a-nanometre.ron:4:50:", &["expected a size of at least 1e-9, found 1e-250"]);
    zero_diameter: "zero-diameter.ron" => refused("zero-diameter.ron:4:38:", &["greater than zero, found 0"]);
    negative_count: "negative-count.ron" => refused("negative-count.ron:4:23:", &["whole count from 1 to 100000, found -3"]);
    zero_count: "zero-count.ron" => refused("zero-count.ron:4:23:", &["found 0"]);
    fractional_count: "fractional-count.ron" => refused("fractional-count.ron:4:47:", &["whole count", "found 2.5"]);
    huge_count: "huge-count.ron" => refused("huge-count.ron:4:47:", &["found 10000000"]);
    // Shapes that cannot be built.
    self_intersecting_footprint: "self-intersecting-footprint.ron" => refused("self-intersecting-footprint.ron:4:9:", &["crosses side 3", "must not cross itself"]);
    footprint_of_two_points: "footprint-two-points.ron" => refused("footprint-two-points.ron:4:9:", &["expected at least three corners, found 2"]);
    kerb_radius_too_big: "kerb-radius-too-big.ron" => refused("kerb-radius-too-big.ron:5:9:", &["kerb returns of the junction at (0, 0) do not fit", "kerb_radius"]);
    place_radius_too_small: "place-radius-too-small.ron" => refused("place-radius-too-small.ron:5:9:", &["RoundPlace \"Kiln Circle\"", "radius 3 is too small for the arm \"Weir Street\""]);
    place_returns_overlap: "place-returns-overlap.ron" => refused("place-returns-overlap.ron:6:9:", &["kerb returns overlap round the circle"]);
    place_arm_short: "place-arm-short.ron" => refused("place-arm-short.ron:5:9:", &["\"Weir Street\" does not reach the place", "4 outside the circle of radius 10"]);
    junction_name_astray: "junction-name-astray.ron" => refused("junction-name-astray.ron:6:9:", &["Junction \"Saddler's Cross\"", "no junction at (30, 0)"]);
    ground_crossing_contours: "ground-crossing-contours.ron" => refused("ground-crossing-contours.ron:3:5:", &["contour 2 (height 2) crosses contour 1 (height 1)"]);
    ground_too_few_spots: "ground-too-few-spots.ron" => refused("ground-too-few-spots.ron:3:5:", &["at least three points", "found 2"]);
    ground_spots_on_one_line: "ground-spots-on-one-line.ron" => refused("ground-spots-on-one-line.ron:3:5:", &["all lie on one line"]);
    block_on_ground_without_ground: "block-on-ground-without-ground.ron" => refused("block-on-ground-without-ground.ron:4:9:", &["on_ground", "no `ground`"]);
    column_on_ground_without_ground: "column-on-ground-without-ground.ron" => refused("column-on-ground-without-ground.ron:4:9:", &["Column \"pump\" (item 1)", "on_ground", "no `ground`"]);
    tower_on_ground_without_ground: "tower-on-ground-without-ground.ron" => refused("tower-on-ground-without-ground.ron:4:9:", &["Tower (item 1)", "on_ground", "no `ground`"]);
    model_on_ground_without_ground: "model-on-ground-without-ground.ron" => refused("model-on-ground-without-ground.ron:4:9:", &["\"shed\"", "on_ground", "no `ground`"]);
    dome_on_ground_without_ground: "dome-on-ground-without-ground.ron" => refused("dome-on-ground-without-ground.ron:4:9:", &["Dome (item 1)", "on_ground", "no `ground`"]);
    arcade_on_ground_without_ground: "arcade-on-ground-without-ground.ron" => refused("arcade-on-ground-without-ground.ron:4:9:", &["Arcade (item 1)", "on_ground", "no `ground`"]);
    stairs_on_ground_without_ground: "stairs-on-ground-without-ground.ron" => refused("stairs-on-ground-without-ground.ron:4:9:", &["Stairs (item 1)", "on_ground", "no `ground`"]);
    vault_on_ground_without_ground: "vault-on-ground-without-ground.ron" => refused("vault-on-ground-without-ground.ron:4:9:", &["Vault (item 1)", "on_ground", "no `ground`"]);
    room_on_ground_without_ground: "room-on-ground-without-ground.ron" => refused("room-on-ground-without-ground.ron:4:9:", &["Room (item 1)", "on_ground", "no `ground`"]);
    tower_rim_off_the_ground: "tower-rim-off-the-ground.ron" => refused("tower-rim-off-the-ground.ron:6:9:", &["Tower \"keep\"", "its rim at (-1.00, 20.00) lies outside the ground"]);
    plinth_without_on_ground: "plinth-without-on-ground.ron" => refused("plinth-without-on-ground.ron:5:9:", &["`plinth` needs `on_ground: true`"]);
    plinth_course_too_fine: "plinth-course-too-fine.ron" => refused("plinth-course-too-fine.ron:5:9:", &["course of 0.001", "at most 1000"]);
    plinth_setback_too_deep: "plinth-setback-too-deep.ron" => refused("plinth-setback-too-deep.ron:5:9:", &["set back 2.5", "turns inside out"]);
    road_of_one_point: "road-one-point.ron" => refused("road-one-point.ron:4:9:", &["at least two points", "found 1"]);
    polyline_of_one_point: "polyline-one-point.ron" => refused("polyline-one-point.ron:4:36:", &["expected at least two points", "found 1"]);
    arcade_piers_too_thin: "arcade-piers-too-thin.ron" => refused("arcade-piers-too-thin.ron:4:9:", &["at least a billionth of the arcade's length"]);
    windows_that_do_not_fit: "windows-do-not-fit.ron" => refused("windows-do-not-fit.ron:4:9:", &["12 openings 1.2 wide do not fit"]);
    head_taller_than_opening: "head-taller-than-opening.ron" => refused("head-taller-than-opening.ron:4:9:", &["Semicircular head", "rises 1.0000", "height (0.8) must exceed"]);
    segmental_head_too_high: "segmental-head-too-high.ron" => refused("segmental-head-too-high.ron:4:9:", &["the head", "rises at most half its span", "Pointed"]);
    pointed_head_radius_too_short: "pointed-head-radius-too-short.ron" => refused("pointed-head-radius-too-short.ron:4:9:", &["the head", "radius of more than half its span (0.6), not 0.5", "Semicircular"]);
    round_window_below_foot: "round-window-below-foot.ron" => refused("round-window-below-foot.ron:4:9:", &["round window 1.5 across", "below the foot"]);
    figure_under_the_ground: "figure-under-the-ground.ron" => refused("figure-under-the-ground.ron:4:9:", &["figure", "under the ground", "base` -1.5"]);
    figure_under_the_slope: "figure-under-the-slope.ron" => refused("figure-under-the-slope.ron:5:9:", &["Figure \"walker\"", "stands 1.25 m under the ground at (5.00, 10.00)", "leave `base` out"]);
    figure_taller_than_people: "figure-taller-than-people.ron" => refused("figure-taller-than-people.ron:4:9:", &["16.000 m", "taller than any person"]);
    tower_shaped_head: "tower-shaped-head.ron" => refused("tower-shaped-head.ron:4:9:", &["Semicircular head cannot be set in a round wall", "Square heads"]);
    unknown_head: "unknown-head.ron" => refused("unknown-head.ron:5:76:", &["Gothic", "Pointed"]);
    // Models named in a scene.
    model_missing: "model-missing-file.ron" => refused("model-missing-file.ron:4:9:", &["in the model", "cannot read no-such-model.obj"]);
    model_not_a_file: "model-not-a-file.ron" => refused("model-not-a-file.ron:4:9:", &["/dev/zero", "expected a file"]);
    model_bad: "model-bad-obj.ron" => refused("model-bad-obj.ron:4:9:", &["\"shed\"", "obj-index-zero.obj:4:3:", "start at 1"]);
    // Resource bounds.
    nested_repeats_too_many_items: "nested-repeats-too-many-items.ron" => refused("nested-repeats-too-many-items.ron:5:58:", &["more than 1000000 items"]);
    too_many_edges: "too-many-edges.ron" => refused("too-many-edges.ron:4:9:", &["3000 copies would make 5946000 edges", "5000000 edges"]);
    too_many_triangles: "too-many-triangles.ron" => refused("too-many-triangles.ron:4:9:", &["487700000 face triangles", "5000000 triangles"]);
    too_slow_for_the_limit: "too-slow-for-the-limit.ron" ["--time-limit", "0.001", "--size", "8192x4096"] => refused("rendering out.png: stopped in the visibility and flatten stage", &["the time limit is 0.001 s", "--time-limit"]);
    // Where the scene is on the earth, and its sun's local time (the clock changes in the
    // IANA database follow the European Union's rule, Directive 2000/84/EC, which the United
    // Kingdom keeps: forward at 01:00 UT on the last Sunday of March, back at 01:00 UT on the
    // last Sunday of October; in 2026 the 29th of March and the 25th of October).
    sun_time_skipped: "sun-time-skipped.ron" => refused("sun-time-skipped.ron:4:37:", &["`sun.time`", "2026-03-29 01:30:00 does not exist in Europe/London", "before 01:00 or from 02:00"]);
    sun_time_twice: "sun-time-twice.ron" => refused("sun-time-twice.ron:6:15:", &["`sun.time`", "happens twice in Europe/London", "01:30+01:00 (the first) or 01:30+00:00 (the second)"]);
    time_zone_unknown: "time-zone-unknown.ron" => refused("time-zone-unknown.ron:3:61:", &["\"Europe/Londn\" is not a time zone", "did you mean \"Europe/London\"?"]);
    latitude_beyond_the_pole: "latitude-beyond-the-pole.ron" => refused("latitude-beyond-the-pole.ron:3:26:", &["expected a latitude from -90 to 90 degrees, found 91.5"]);
    // Standpoints inside solids: warnings, not errors.
    standpoint_inside_block: "standpoint-inside-block.ron" => warned(&["standpoint \"cellar\" is inside block (item 1)"]);
    standpoint_inside_tower: "standpoint-inside-tower.ron" => warned(&["standpoint \"stair\" is inside tower \"keep\""]);
    // OBJ models.
    obj_empty: "obj-empty.obj" => refused("obj-empty.obj:1:1:", &["empty", "expected `v` and `f` lines"]);
    obj_comments_only: "obj-comments-only.obj" => refused("obj-comments-only.obj:1:1:", &["no faces (`f`) or lines (`l`)"]);
    obj_no_faces: "obj-no-faces.obj" => refused("obj-no-faces.obj:1:1:", &["no faces"]);
    obj_binary_garbage: "obj-binary-garbage.obj" => refused("obj-binary-garbage.obj:1:1:", &["expected OBJ text"]);
    obj_index_zero: "obj-index-zero.obj" => refused("obj-index-zero.obj:4:3:", &["start at 1; found 0"]);
    obj_index_out_of_range: "obj-index-out-of-range.obj" => refused("obj-index-out-of-range.obj:4:7:", &["index 4 is out of range", "3 vertices"]);
    obj_negative_index_before_start: "obj-negative-index-before-start.obj" => refused("obj-negative-index-before-start.obj:4:9:", &["-4 reaches before the first vertex"]);
    obj_index_beyond_64_bits: "obj-index-beyond-64-bits.obj" => refused("obj-index-beyond-64-bits.obj:4:7:", &["expected a vertex index"]);
    obj_declared_but_absent: "obj-declared-but-absent.obj" => refused("obj-declared-but-absent.obj:6:3:", &["999999 is out of range", "3 vertices"]);
    obj_face_of_no_vertices: "obj-face-no-vertices.obj" => refused("obj-face-no-vertices.obj:4:2:", &["at least 3 vertices, found 0"]);
    obj_face_of_one_vertex: "obj-face-one-vertex.obj" => refused("obj-face-one-vertex.obj:4:4:", &["at least 3 vertices, found 1"]);
    obj_face_of_two_vertices: "obj-face-two-vertices.obj" => refused("obj-face-two-vertices.obj:4:6:", &["at least 3 vertices, found 2"]);
    obj_line_of_one_vertex: "obj-line-one-vertex.obj" => refused("obj-line-one-vertex.obj:3:4:", &["at least 2 vertices, found 1"]);
    obj_vertex_of_two_coordinates: "obj-vertex-two-coordinates.obj" => refused("obj-vertex-two-coordinates.obj:2:6:", &["three coordinates", "found 2"]);
    obj_nan: "obj-nan.obj" => refused("obj-nan.obj:2:3:", &["expected a finite number"]);
    obj_infinity: "obj-infinity.obj" => refused("obj-infinity.obj:2:5:", &["expected a finite number"]);
    obj_1e300: "obj-1e300.obj" => refused("obj-1e300.obj:2:7:", &["from -1e12 to 1e12, found 1e300"]);
    obj_malformed_number: "obj-malformed-number.obj" => refused("obj-malformed-number.obj:3:5:", &["expected a number, found \"1,5\""]);
    obj_malformed_index: "obj-malformed-index.obj" => refused("obj-malformed-index.obj:4:7:", &["expected a vertex index, found \"three\""]);
    obj_crlf_line_ends_count_lines: "obj-crlf-bad-index.obj" => refused("obj-crlf-bad-index.obj:5:7:", &["index 9 is out of range"]);
    // Smoothing groups and normals (issue 18).
    obj_smoothing_word: "obj-smoothing-word.obj" => refused("obj-smoothing-word.obj:5:3:", &["expected a smoothing group", "or `off`", "found \"smooth\""]);
    obj_smoothing_missing: "obj-smoothing-missing.obj" => refused("obj-smoothing-missing.obj:5:2:", &["expected a smoothing group after `s`"]);
    obj_normal_two_coordinates: "obj-normal-two-coordinates.obj" => refused("obj-normal-two-coordinates.obj:5:7:", &["three coordinates after `vn`, found 2"]);
    obj_normal_bad_number: "obj-normal-bad-number.obj" => refused("obj-normal-bad-number.obj:5:6:", &["expected a number, found \"1.0.0\""]);
    obj_normal_index_out_of_range: "obj-normal-index-out-of-range.obj" => refused("obj-normal-index-out-of-range.obj:6:16:", &["normal index 2 is out of range", "1 normals"]);
    obj_normal_index_malformed: "obj-normal-index-malformed.obj" => refused("obj-normal-index-malformed.obj:6:11:", &["expected a normal index", "\"one\""]);
    obj_normal_relative_before_start: "obj-normal-relative-before-start.obj" => refused("obj-normal-relative-before-start.obj:6:18:", &["relative index -2 reaches before the first normal"]);
    obj_missing_material_library: "obj-missing-mtl.obj" => warned(&["material library \"nowhere.mtl\"", "not beside it"]);
    obj_standpoint_inside_model: "obj-standpoint-inside-model.obj" => warned(&["standpoint", "is inside", "obj-standpoint-inside-model.obj"]);
    obj_standpoint_inside_house_on_ground: "obj-standpoint-inside-house-on-ground.obj" => warned(&["standpoint", "is inside", "obj-standpoint-inside-house-on-ground.obj: house"]);
    obj_byte_order_mark_does_not_shift_columns: "obj-bom-bad-number.obj" => refused("obj-bom-bad-number.obj:2:7:", &["expected a number, found \"x\""]);
    // Open data: the file, the feature (index and id) or city object, the JSON path.
    geojson_truncated: "geojson-truncated.geojson" => refused("geojson-truncated.geojson:4:1:", &["expected JSON"]);
    geojson_ring_not_closed: "geojson-ring-not-closed.geojson" => refused("geojson-ring-not-closed.geojson: feature 0 (id \"way/7\"), at $.features[0].geometry.coordinates[0]:", &["not closed", "RFC 7946"]);
    geojson_ring_crosses_itself: "geojson-crosses-itself.geojson" => refused("geojson-crosses-itself.geojson: feature 0 (id \"bow-tie\")", &["crosses"]);
    geojson_latitude_written_first: "geojson-latitude-first.geojson" => refused("geojson-latitude-first.geojson: feature 0 (id \"harbour road\"), at $.features[0].geometry.coordinates[0]:", &["out of range", "longitude first"]);
    geojson_polygon_without_rings: "geojson-empty-polygon.geojson" => refused("geojson-empty-polygon.geojson: feature 0 (id \"hall\"), at $.features[0].geometry.coordinates[1]:", &["outer ring", "RFC 7946"]);
    geojson_feature_without_geometry: "geojson-no-geometry.geojson" => refused("geojson-no-geometry.geojson: feature 1 (id \"2\"), at $.features[1].geometry:", &["no geometry"]);
    geojson_other_reference_system: "geojson-other-crs.geojson" => refused("geojson-other-crs.geojson: at $.crs:", &["EPSG::27700", "WGS84"]);
    cityjson_vertex_index_out_of_range: "cityjson-index-out-of-range.city.json" => refused("cityjson-index-out-of-range.city.json: at $.CityObjects[\"shed\"].geometry[0].boundaries[1][0]:", &["vertex index 3"]);
    cityjson_template_missing: "cityjson-template-missing.city.json" => refused("cityjson-template-missing.city.json: at $.CityObjects[\"kiosk\"].geometry[0].template:", &["template 2 is beyond the file's 1 templates"]);
    cityjson_unread_reference_system: "cityjson-web-mercator.ron" => refused("cityjson-web-mercator.ron:4:15: in the data file", &["EPSG:3857", "not a transverse Mercator"]);
    cityjson_unread_reference_system_data: "cityjson-web-mercator.city.json" ["--at-latlon", "48,2"] => refused("cityjson-web-mercator.city.json: at $.metadata.referenceSystem:", &["EPSG:3857"]);
    // UTM zone 31N (EPSG:32631) is used between 0 and 6 degrees east (its area of use in
    // the EPSG registry, from memory); 20 degrees east is far outside it.
    cityjson_outside_the_area_of_use: "cityjson-outside-area-of-use.city.json" ["--at-latlon", "45,20"] => refused("cityjson-outside-area-of-use.city.json: at $.metadata.referenceSystem:", &["outside the area of use", "EPSG:32631", "longitude 20"]);
    cityjson_sequence_broken_line: "cityjson-seq-broken-line.city.jsonl" => refused("cityjson-seq-broken-line.city.jsonl:3:39:", &["expected JSON"]);
}

/// Every file in the corpus has its test, and the corpus is as large as promised.
#[test]
fn every_corpus_file_has_a_test() {
    let mut files: Vec<String> = std::fs::read_dir(corpus())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|name| name != "README.md")
        .collect();
    files.sort();
    let mut covered: Vec<String> = COVERED.iter().map(|s| s.to_string()).collect();
    covered.sort();
    assert_eq!(files, covered);
    assert!(files.len() >= 40);
}

/// Every file in the folder with its size, and the earlier output's bytes: what a refused
/// run must leave as it was, without reading a file too large to read.
fn sizes_and_earlier_output(dir: &Scratch) -> (BTreeMap<String, u64>, Vec<u8>) {
    let sizes = std::fs::read_dir(&dir.0)
        .unwrap()
        .map(|e| {
            let entry = e.unwrap();
            let name = entry.file_name().to_string_lossy().into_owned();
            (name, entry.metadata().unwrap().len())
        })
        .collect();
    (sizes, std::fs::read(dir.path("out.png")).unwrap())
}

/// A data file larger than any loader reads (`pansite::scene::MAX_INPUT_BYTES`, 2 GiB)
/// is refused before it is read: exit 2, one line naming the file, its size and the limit,
/// and the folder as it was. The file cannot live in the corpus: it is made here, sparse
/// (`File::set_len` writes no data, so it takes no room on disk), one byte over the limit.
#[test]
fn a_data_file_over_the_size_limit_is_refused_unread() {
    let limit = pansite::scene::MAX_INPUT_BYTES;
    let cases: [(&str, &[&str], &str); 3] = [
        (
            "huge.geojson",
            &["--at-latlon", "48,2"],
            "cannot read huge.geojson",
        ),
        (
            "huge.city.json",
            &["--at-latlon", "48,2"],
            "cannot read huge.city.json",
        ),
        (
            "huge-city.ron",
            &[],
            "huge-city.ron:3:5: in the data file \"huge.city.json\": cannot read huge.city.json",
        ),
    ];
    for (file, extra, at) in cases {
        let dir = Scratch::new(&format!("bad-{file}"));
        let data = if file.ends_with(".ron") {
            dir.write(
                file,
                "Scene(location: (latitude: 48, longitude: 2),\n    items: [\n    \
                 OpenData(file: \"huge.city.json\"),\n])\n",
            );
            "huge.city.json"
        } else {
            file
        };
        std::fs::File::create(dir.path(data))
            .unwrap()
            .set_len(limit + 1)
            .unwrap();
        dir.write("out.png", EARLIER);
        let before = sizes_and_earlier_output(&dir);
        let mut args = vec!["render", file, "-o", "out.png", "--size", "256x128"];
        args.extend(extra);
        let out = dir.command().args(&args).output().unwrap();
        let text = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{file}: {text}");
        assert!(
            text.starts_with(&format!("pansite: error: {at}: ")),
            "{file}: {text}"
        );
        // The size and the limit to the byte: one byte over is not "as large as" it.
        assert!(
            text.contains(&format!(
                "the file is {} bytes, more than the {limit} bytes (2 GiB) pansite reads",
                limit + 1
            )),
            "{file}: {text}"
        );
        assert_eq!(text.lines().count(), 1, "{file}: {text}");
        assert!(
            sizes_and_earlier_output(&dir) == before,
            "{file}: the folder changed"
        );
    }
}
