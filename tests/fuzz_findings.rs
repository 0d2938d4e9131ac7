//! What fuzzing (`fuzz/`) and the review of the bad-input corpus found, each kept as a named
//! case so it stays fixed. Behavioural: each input must be refused quickly with a message
//! that says what was expected (or, for bounds, drawn within them).

use pansite::render::{render_png_to, RenderSettings};
use pansite::scene::parse_scene;
use std::path::Path;
use std::time::{Duration, Instant};

fn refusal(scene: &str) -> String {
    let started = Instant::now();
    let error = parse_scene(scene.as_bytes(), Path::new("finding.ron"), "finding")
        .expect_err("the scene must be refused");
    assert!(
        started.elapsed() < Duration::from_secs(5),
        "refused too slowly"
    );
    assert!(error.is_bad_input(), "{error}");
    error.to_string()
}

/// A model named `/dev/zero` was read for ever (the OBJ reader skipped the loaders' check
/// for regular files of bounded size).
#[test]
fn a_model_that_is_a_device_is_refused_at_once() {
    let text = refusal(r#"Scene(items: [Model(file: "/dev/zero")])"#);
    assert!(text.starts_with("finding.ron:1:15:"), "{text}");
}

/// `steps: 2.5` met the parser's "Expected comma" at the `.5`; `count: -3` its "Integer is
/// out of bounds". Both now say what a count is.
#[test]
fn a_fractional_or_negative_count_is_told_what_a_count_is() {
    for (count, found) in [
        ("2.5", "2.5"),
        ("-3", "-3"),
        ("1e20", "100000000000000000000"),
    ] {
        let text = refusal(&format!(
            "Scene(items: [Stairs(at: (0, 0), bearing: 0, steps: {count}, rise: 0.15, going: 0.3, width: 2)])"
        ));
        assert!(
            text.contains(&format!(
                "expected a whole count from 1 to 100000, found {found}"
            )),
            "{text}"
        );
    }
}

/// Nesting beyond RON's recursion limit said "try increasing the limit", which a scene's
/// author cannot do.
#[test]
fn deep_nesting_says_what_to_do() {
    let depth = 400;
    let scene = format!(
        "Scene(items: [{}{}])",
        "Group(items: [".repeat(depth),
        "])".repeat(depth)
    );
    let text = refusal(&scene);
    assert!(text.contains("nested too deeply"), "{text}");
    assert!(!text.contains("increasing"), "{text}");
}

/// A repeat of heavy items built millions of edges before the item count stopped it; now
/// the first copy tells how many the rest would make.
#[test]
fn a_repeat_too_large_is_refused_after_its_first_copy() {
    let text = refusal(
        "Scene(items: [Repeat(count: 100000, step: (0, 0, 1), items: [\
         Tiles(corner: (0, 0, 0), along: (99, 0, 0), across: (0, 99, 0), tile: (0.1, 0.1))])])",
    );
    assert!(text.contains("100000 copies would make"), "{text}");
}

/// Absurd but finite numbers all through a scene: each must give what is written beside it,
/// an image of the asked size or a refusal naming what was wrong (the numbers the pipeline
/// target tried first).
#[test]
fn extreme_numbers_in_every_item_draw_or_are_refused() {
    for (x, expected) in EXTREMES {
        let scene = format!(
            "Scene(standpoints: [(name: \"s\", x: {x}, y: {x}, heading: {x}, pitch: {x}, roll: {x})], items: [\
             Block(at: Corner({x}, {x}), width: 1e-6, depth: 1e9, height: 1e-6, roof: Hip(ridge: 1e9)),\
             Column(at: ({x}, 0), diameter: 1e-6, height: 1e9),\
             Dome(at: (0, {x}), diameter: 1e9),\
             Line(from: ({x}, {x}, {x}), to: (0, 0, 0)),\
             Point(at: ({x}, 0, 0))])"
        );
        let outcome = match parse_scene(scene.as_bytes(), Path::new("finding.ron"), "finding") {
            Err(error) => {
                assert!(error.is_bad_input(), "{x}: {error}");
                format!("refused: {error}")
            }
            Ok(site) => {
                let settings = RenderSettings {
                    width: 128,
                    height: 64,
                    ..RenderSettings::default()
                };
                let mut png = Vec::new();
                match render_png_to(&site, &site.standpoints[0], &settings, &mut png) {
                    Ok(_) => {
                        let info = png::Decoder::new(std::io::Cursor::new(&png))
                            .read_info()
                            .expect("a PNG")
                            .info()
                            .clone();
                        format!("image {}x{}", info.width, info.height)
                    }
                    Err(error) => format!("refused: {error}"),
                }
            }
        };
        assert!(
            outcome.starts_with(expected),
            "{x}: expected {expected:?}, got {outcome:?}"
        );
    }
}

/// Each extreme number and the start of what it must give: every one is a scene that can
/// be drawn (tiny or huge but finite sizes are legal), so each must give the whole image.
const EXTREMES: [(&str, &str); 5] = [
    ("1e9", "image 128x64"),
    ("-1e9", "image 128x64"),
    ("1e-300", "image 128x64"),
    ("0.000001", "image 128x64"),
    ("999999999", "image 128x64"),
];

/// The pipeline target's timeout: an arcade on piers of 2e-305 m, thinner than the
/// arithmetic can tell from nothing, so its openings shared corners and triangulating its
/// wall took hours for 4,000 arches (11 s for 255 under the fuzzer's instrumentation).
/// Since 2026-12-05 such a pier is refused where it is written (sizes are at least a
/// nanometre); piers above that but below a billionth of the arcade's length still meet
/// the arcade's own rule.
#[test]
fn an_arcade_on_piers_too_thin_to_exist_is_refused_at_once() {
    let text = refusal(
        "Scene(items: [Arcade(at: Centre(4.778309726736751e-299, 0), count: 4000, span: 3.7, \
         springing: 33, pier: 2.2565935439425233e-305, thickness: 5.43222665692e-312)])",
    );
    assert!(
        text.contains("expected a size of at least 1e-9, found 2.2565935439425233e-305"),
        "{text}"
    );
    // 4,000 spans of 3.7 m: a billionth of the length is about 1.5e-5 m.
    let text = refusal(
        "Scene(items: [Arcade(at: Centre(0, 0), count: 4000, span: 3.7, springing: 33, \
         pier: 1e-6, thickness: 0.5)])",
    );
    assert!(
        text.contains("at least a billionth of the arcade's length"),
        "{text}"
    );
    // Thin but real piers still build, quickly.
    let started = Instant::now();
    parse_scene(
        b"Scene(items: [Arcade(at: Centre(0, 0), count: 4000, span: 3.7, springing: 33, pier: 1e-4, thickness: 0.5)])",
        Path::new("finding.ron"),
        "finding",
    )
    .unwrap();
    assert!(started.elapsed() < Duration::from_secs(5));
}

/// The pipeline target's crash: the grid drawn 32x16 for a view pitched 110 degrees found
/// an infinite error estimate near a pole, and counting the parts to cut it into
/// overflowed (a panic where overflow is checked, as in tests).
#[test]
fn a_grid_near_a_pole_with_an_infinite_error_estimate_draws() {
    let scene = "Scene(standpoints: [(name: \"s\", x: 51, y: 46, eye_height: 1182.2, \
                 heading: 4.600556940150025e-91, pitch: 110, roll: 0)], \
                 items: [Repeat(count: 138, step: (-56, 32, 0), turn: 230.4, items: [])])";
    let site = parse_scene(scene.as_bytes(), Path::new("finding.ron"), "finding").unwrap();
    draws_32_by_16(&site, pansite::scene::HiddenEdges::Solid);
}

/// Draws the site's first standpoint 32x16 px and checks a PNG came out.
fn draws_32_by_16(site: &pansite::scene::Site, hidden: pansite::scene::HiddenEdges) {
    let settings = RenderSettings {
        width: 32,
        height: 16,
        hidden: Some(hidden),
        ..RenderSettings::default()
    };
    let mut png = Vec::new();
    render_png_to(site, &site.standpoints[0], &settings, &mut png).unwrap();
    assert!(png.starts_with(b"\x89PNG"));
}

/// The pipeline target's crash (2026-12-05): a block 1.2e-250 m deep. The square of its
/// depth is below the smallest double, so its end walls had a length of 0, their points
/// came out NaN (0 / 0), and the hierarchy of faces panicked on a box of NaN. Sizes are
/// now at least a nanometre, refused where they are written; at the floor the block draws.
#[test]
fn a_block_thinner_than_the_arithmetic_is_refused_where_it_is_written() {
    let scene = |depth: &str| {
        format!(
            "Scene(standpoints: [(name: \"here\", x: 12, y: 1, eye_height: 9.345984231267034e-307, \
             heading: 1282.2, pitch: -90, roll: 1802.2)], \
             items: [Block(at: Corner(32, 0), width: 12, depth: {depth}, height: 12, facing: 12)])"
        )
    };
    let text = refusal(&scene("1.224167783418391e-250"));
    assert!(text.starts_with("finding.ron:1:"), "{text}");
    assert!(
        text.contains("expected a size of at least 1e-9, found 1.224167783418391e-250"),
        "{text}"
    );
    let text = refusal(&scene("0"));
    assert!(
        text.contains("expected a size greater than zero, found 0"),
        "{text}"
    );
    let site = parse_scene(
        scene("1e-9").as_bytes(),
        Path::new("finding.ron"),
        "finding",
    )
    .unwrap();
    assert!(site.faces.iter().all(|face| face.is_finite()));
    draws_32_by_16(&site, pansite::scene::HiddenEdges::Faint);
}

/// The same crash one layer down: a site whose faces came out NaN (as the thin block's did,
/// and as a library caller's own site might) must still draw in every hidden-line mode.
/// The hierarchy of faces clamped the eye into each box with `f64::clamp`, which panics on
/// a NaN bound; it now takes `max` and `min`, so such a box is only far away.
#[test]
fn a_site_with_faces_of_nan_draws_in_every_mode() {
    use pansite::scene::HiddenEdges;
    let scene = "Scene(standpoints: [(name: \"s\", x: 5, y: -20)], \
                 items: [Block(at: Corner(0, 0), width: 10, depth: 8, height: 6)])";
    let mut site = parse_scene(scene.as_bytes(), Path::new("finding.ron"), "finding").unwrap();
    // All but two faces lose their plan position, as the block's end walls and roof did.
    let first_two = site.faces.iter().take(2);
    let broken = site.faces.iter().skip(2).map(|mut face| {
        for corner in face.corners.iter_mut() {
            corner.x = f64::NAN;
            corner.y = f64::NAN;
        }
        face
    });
    site.faces = first_two.chain(broken).collect();
    for hidden in [HiddenEdges::Solid, HiddenEdges::Faint, HiddenEdges::Off] {
        draws_32_by_16(&site, hidden);
    }
}
