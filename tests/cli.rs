//! The `pansite` binary, run for real in a fresh temporary folder for each test.

use std::path::{Path, PathBuf};

mod common;
use common::{pansite, stderr, succeeds, Scratch};

const DEMO: &str = "scenes/wexcombe-square.ron";

fn demo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(DEMO)
}

fn png_size(bytes: &[u8]) -> (u32, u32, png::ColorType) {
    let decoder = png::Decoder::new(std::io::Cursor::new(bytes));
    let reader = decoder.read_info().unwrap();
    let info = reader.info();
    (info.width, info.height, info.color_type)
}

#[test]
fn renders_the_demo_into_renders_by_default() {
    let dir = Scratch::new("default");
    let out = succeeds(
        &dir,
        &["render", demo().to_str().unwrap(), "--size", "800x400"],
    );
    assert_eq!(dir.files(), vec!["renders/wexcombe-square-fountain.png"]);
    let bytes = std::fs::read(dir.path("renders/wexcombe-square-fountain.png")).unwrap();
    assert_eq!(png_size(&bytes), (800, 400, png::ColorType::Grayscale));
    assert!(
        stderr(&out).contains("wrote renders/wexcombe-square-fountain.png"),
        "{}",
        stderr(&out)
    );
}

#[test]
fn standpoint_by_name_and_output_path() {
    let dir = Scratch::new("named");
    let out = succeeds(
        &dir,
        &[
            "render",
            demo().to_str().unwrap(),
            "-s",
            "hall steps",
            "-o",
            "steps.png",
            "--size",
            "400x200",
            "-q",
        ],
    );
    assert!(
        out.stderr.is_empty(),
        "--quiet prints nothing: {}",
        stderr(&out)
    );
    assert_eq!(dir.files(), vec!["steps.png"]);
}

#[test]
fn writes_png_to_standard_output() {
    let dir = Scratch::new("stdout");
    let out = succeeds(
        &dir,
        &[
            "render",
            demo().to_str().unwrap(),
            "-o",
            "-",
            "--size",
            "200x100",
            "-q",
        ],
    );
    assert_eq!(png_size(&out.stdout), (200, 100, png::ColorType::Grayscale));
    assert!(dir.files().is_empty());
}

#[test]
fn bare_render_is_white_where_nothing_is_drawn() {
    let dir = Scratch::new("bare");
    let scene = dir.write(
        "one.ron",
        "Scene(items: [Polyline(points: [(-1, 10, 1.6), (1, 10, 1.6)])])",
    );
    succeeds(
        &dir,
        &[
            "render",
            scene.to_str().unwrap(),
            "--at",
            "0,0",
            "--bare",
            "-o",
            "bare.png",
            "--size",
            "360x180",
        ],
    );
    let decoder = png::Decoder::new(std::io::BufReader::new(
        std::fs::File::open(dir.path("bare.png")).unwrap(),
    ));
    let mut reader = decoder.read_info().unwrap();
    let mut pixels = vec![0; reader.output_buffer_size().unwrap()];
    reader.next_frame(&mut pixels).unwrap();
    // The short line straight ahead at eye level spans about +-5.7 degrees on the horizon
    // row (rows 89 and 90 share it); everything else is white.
    let dark: Vec<(usize, usize)> = (0..180 * 360)
        .filter(|&i| pixels[i] < 255)
        .map(|i| (i % 360, i / 360))
        .collect();
    assert!(
        dark.iter()
            .all(|&(x, y)| (172..=188).contains(&x) && (88..=91).contains(&y)),
        "{dark:?}"
    );
    assert!(dark.iter().any(|&(x, _)| x == 180));
}

#[test]
fn overrides_and_timings() {
    let dir = Scratch::new("overrides");
    let out = succeeds(
        &dir,
        &[
            "render",
            demo().to_str().unwrap(),
            "--at",
            "0,-2",
            "--eye-height",
            "1.2",
            "--heading",
            "-45",
            "--pitch",
            "10",
            "--roll",
            "-5",
            "--line-weight",
            "2",
            "--tolerance",
            "0.2",
            "--timings",
            "-o",
            "o.png",
            "--size",
            "400x200",
        ],
    );
    let text = stderr(&out);
    for stage in [
        "load",
        "expand",
        "visibility",
        "flatten",
        "raster",
        "encode",
    ] {
        assert!(text.contains(stage), "{text}");
    }
}

#[test]
fn skipped_edges_are_named_and_counted() {
    let dir = Scratch::new("skipped");
    // The second polyline runs straight through the eye at (0, 0, 1.6).
    let scene = dir.write(
        "s.ron",
        "Scene(standpoints: [(name: \"here\", x: 0, y: 0)], items: [\n\
         Polyline(label: \"rail\", points: [(-3, 5, 1), (3, 5, 1)]),\n\
         Polyline(label: \"sight line\", points: [(0, -5, 1.6), (0, 5, 1.6)])])",
    );
    let out = succeeds(
        &dir,
        &[
            "render",
            scene.to_str().unwrap(),
            "-o",
            "s.png",
            "--size",
            "200x100",
        ],
    );
    let text = stderr(&out);
    assert!(
        text.contains("polyline \"sight line\" (item 2)") && text.contains("through the eye"),
        "{text}"
    );
    assert!(text.contains("1 skipped"), "{text}");
}

/// Bad input: exit 2, a message naming the problem, no output file, an earlier file intact
/// (and nothing else left in the folder but the inputs).
fn assert_refused(dir: &Scratch, args: &[&str], expected: &[&str]) {
    let earlier = dir.write("out.png", "earlier good output");
    let mut all = args.to_vec();
    all.extend(["-o", "out.png"]);
    let out = pansite(dir, &all);
    let text = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{args:?}: {text}");
    assert!(
        text.starts_with("pansite: ") || text.starts_with("error:"),
        "{text}"
    );
    for e in expected {
        assert!(text.contains(e), "{args:?}: expected {e:?} in {text}");
    }
    assert_eq!(
        std::fs::read_to_string(&earlier).unwrap(),
        "earlier good output"
    );
    assert_eq!(
        dir.files()
            .iter()
            .filter(|f| f.as_str() != "out.png" && !f.ends_with(".ron") && !f.ends_with(".obj"))
            .count(),
        0,
        "{:?}",
        dir.files()
    );
}

#[test]
fn bad_scene_names_file_line_and_column() {
    let dir = Scratch::new("bad-scene");
    let scene = dir.write(
        "bad.ron",
        "Scene(items: [\n  Polyline(points: [(0, 0, 0), (1, NaN, 0)]),\n])",
    );
    assert_refused(
        &dir,
        &["render", scene.to_str().unwrap(), "--at", "0,0"],
        &["bad.ron:2:", "finite"],
    );
    let scene = dir.write(
        "typo.ron",
        "Scene(items: [\n  Block(at: Corner(0, 0), width: 4, depht: 3, height: 2),\n])",
    );
    assert_refused(
        &dir,
        &["render", scene.to_str().unwrap(), "--at", "0,0"],
        &["typo.ron:2:", "depht"],
    );
}

#[test]
fn bad_options_are_refused_before_work() {
    let dir = Scratch::new("bad-options");
    let demo = demo();
    let demo = demo.to_str().unwrap();
    assert_refused(
        &dir,
        &["render", demo, "--size", "0x100"],
        &["0x100", "empty"],
    );
    assert_refused(
        &dir,
        &["render", demo, "--size", "100000x50000"],
        &["megapixels"],
    );
    assert_refused(
        &dir,
        &["render", demo, "-s", "nowhere"],
        &["nowhere", "fountain"],
    );
    assert_refused(&dir, &["render", demo, "--tolerance", "0"], &["tolerance"]);
    assert_refused(&dir, &["render", demo, "--size", "wide"], &["WIDTHxHEIGHT"]);
    assert_refused(&dir, &["render", "missing.ron"], &["missing.ron"]);
    let no_standpoint = dir.write("none.ron", "Scene(items: [])");
    assert_refused(
        &dir,
        &["render", no_standpoint.to_str().unwrap()],
        &["standpoint"],
    );
}

#[test]
fn unwritable_output_is_a_failure_not_bad_input() {
    let dir = Scratch::new("unwritable");
    let out = pansite(
        &dir,
        &[
            "render",
            demo().to_str().unwrap(),
            "-o",
            "no/such/folder/x.png",
            "--size",
            "100x50",
        ],
    );
    assert_eq!(out.status.code(), Some(1), "{}", stderr(&out));
    assert!(stderr(&out).contains("cannot write"), "{}", stderr(&out));
    assert!(dir.files().is_empty());
}

/// A unit cube as 12 triangles, Y up (the OBJ habit).
const CUBE_OBJ: &str = "v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\nv 0 0 1\nv 1 0 1\nv 1 1 1\nv 0 1 1\n\
f 1 2 3\nf 1 3 4\nf 5 7 6\nf 5 8 7\nf 1 6 2\nf 1 5 6\nf 2 7 3\nf 2 6 7\nf 3 8 4\nf 3 7 8\nf 4 5 1\nf 4 8 5\n";

#[test]
fn renders_an_obj_model_from_a_standpoint_given_on_the_command_line() {
    let dir = Scratch::new("obj");
    let model = dir.write("cube.obj", CUBE_OBJ);
    let out = succeeds(
        &dir,
        &[
            "render",
            model.to_str().unwrap(),
            "--at",
            "0.5,-4",
            "--unit",
            "m",
            "--up",
            "y",
            "-o",
            "cube.png",
            "--size",
            "400x200",
        ],
    );
    assert!(stderr(&out).contains("12 edges"), "{}", stderr(&out));
    // Without a standpoint it says how to give one.
    let out = pansite(
        &dir,
        &[
            "render",
            model.to_str().unwrap(),
            "-o",
            "none.png",
            "--size",
            "400x200",
        ],
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("--at"), "{}", stderr(&out));
}

#[test]
fn a_scene_places_a_model_beside_its_own_items() {
    let dir = Scratch::new("obj-in-scene");
    std::fs::create_dir_all(dir.path("models")).unwrap();
    dir.write("models/cube.obj", CUBE_OBJ);
    let scene = dir.write(
        "square.ron",
        "Scene(standpoints: [(name: \"s\", x: 0, y: -10)], items: [\n\
         Model(label: \"kiosk\", file: \"models/cube.obj\", at: (2, 3, 0), turn: 30, scale: 2.5, unit: Metre),\n\
         Polyline(points: [(-5, 0, 0), (5, 0, 0)]),\n])",
    );
    let out = succeeds(
        &dir,
        &[
            "render",
            scene.to_str().unwrap(),
            "-o",
            "s.png",
            "--size",
            "400x200",
        ],
    );
    assert!(stderr(&out).contains("13 edges"), "{}", stderr(&out));
}

#[test]
fn bad_obj_files_name_the_line() {
    let dir = Scratch::new("bad-obj");
    let cases = [
        (
            "range.obj",
            "v 0 0 0\nv 1 0 0\nv 1 1 0\nf 1 2 9\n",
            "range.obj:4:",
            "out of range",
        ),
        (
            "short.obj",
            "v 0 0 0\nv 1 0 0\nf 1 2\n",
            "short.obj:3:",
            "at least 3",
        ),
        ("number.obj", "v 0 0 0\nv 1 zz 0\n", "number.obj:2:", "zz"),
        ("empty.obj", "", "empty.obj:1:", "empty"),
    ];
    for (name, text, place, what) in cases {
        let model = dir.write(name, text);
        assert_refused(
            &dir,
            &["render", model.to_str().unwrap(), "--at", "0,0"],
            &[place, what],
        );
    }
    let garbage = dir.path("garbage.obj");
    std::fs::write(&garbage, [0x89u8, 0x50, 0x4e, 0x47, 0xff, 0x00, 0x13]).unwrap();
    assert_refused(
        &dir,
        &["render", garbage.to_str().unwrap(), "--at", "0,0"],
        &["garbage.obj:1:", "binary"],
    );
    assert_refused(
        &dir,
        &["render", "missing.obj", "--at", "0,0"],
        &["missing.obj"],
    );
    // A scene naming a bad model: both places are named, the model's to the column.
    dir.write("bad_model.obj", "v 0 0 0\nv 1 0 0\nv 1 1 0\nf 1 2 9\n");
    let scene = dir.write(
        "with_bad.ron",
        "Scene(items: [Model(file: \"bad_model.obj\")])",
    );
    assert_refused(
        &dir,
        &["render", scene.to_str().unwrap(), "--at", "0,0"],
        &["with_bad.ron:1:15: in the model", "bad_model.obj:4:7:"],
    );
    // A scene naming a model that is not there.
    let scene = dir.write("s.ron", "Scene(items: [Model(file: \"nowhere.obj\")])");
    assert_refused(
        &dir,
        &["render", scene.to_str().unwrap(), "--at", "0,0"],
        &["nowhere.obj"],
    );
}

#[test]
fn check_summarises_a_scene_and_warns_of_a_standpoint_in_a_wall() {
    let dir = Scratch::new("check");
    dir.write(
        "yard.ron",
        "Scene(standpoints: [(name: \"in the shed\", x: 1, y: 1), (name: \"cellar\", x: 9, y: 9, ground: -3)], \
         items: [Block(label: \"shed\", at: Corner(0, 0), width: 3, depth: 2, height: 2.5, roof: Gable(ridge: 3.2)), \
         Column(at: (6, 6), diameter: 0.5, height: 3)])",
    );
    let out = succeeds(&dir, &["check", "yard.ron"]);
    let report = String::from_utf8_lossy(&out.stdout);
    for expected in [
        "items: 2 (block 1, column 1)",
        "17 edges", // 15 for the gabled shed, 2 rims for the column
        "1 round outlines",
        "extent: x 0.00 to 6.25",
        "\"in the shed\"",
        "INSIDE block \"shed\"",
        "UNDER THE GROUND",
    ] {
        assert!(
            report.contains(expected),
            "expected {expected:?} in\n{report}"
        );
    }
    let warnings = stderr(&out);
    assert!(
        warnings.contains("warning: standpoint \"in the shed\" is inside block \"shed\""),
        "{warnings}"
    );
    assert!(warnings.contains("under the ground"), "{warnings}");
    // A broken scene: exit 2, the place and the suggestion.
    dir.write(
        "broken.ron",
        "Scene(items: [\n  Colum(at: (0, 0), diameter: 1, height: 2),\n])",
    );
    let out = pansite(&dir, &["check", "broken.ron"]);
    assert_eq!(out.status.code(), Some(2));
    let text = stderr(&out);
    assert!(
        text.contains("broken.ron:2:3") && text.contains("did you mean `Column`"),
        "{text}"
    );
}

#[test]
fn new_writes_a_starter_scene_and_never_replaces_a_file() {
    let dir = Scratch::new("new");
    succeeds(&dir, &["new", "plan.ron"]);
    succeeds(&dir, &["check", "plan.ron"]);
    succeeds(
        &dir,
        &["render", "plan.ron", "-o", "plan.png", "--size", "512x256"],
    );
    let mine = dir.write("mine.ron", "my own work");
    let out = pansite(&dir, &["new", "mine.ron"]);
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(stderr(&out).contains("already exists"));
    assert_eq!(std::fs::read_to_string(mine).unwrap(), "my own work");
}

#[test]
fn hidden_edges_from_the_command_line_and_the_scene() {
    let dir = Scratch::new("hidden");
    // A small block in front of a tall one: the tall one's lower edges are hidden.
    let scene = "Scene(hidden: Off, standpoints: [(name: \"s\", x: 0, y: -10)], items: [\n\
                 Block(at: Centre(0, 0), width: 4, depth: 2, height: 3),\n\
                 Block(at: Centre(0, 8), width: 10, depth: 2, height: 12)])";
    dir.write("pair.ron", scene);
    let ink = |name: &str| -> u64 {
        let decoder =
            png::Decoder::new(std::io::Cursor::new(std::fs::read(dir.path(name)).unwrap()));
        let mut reader = decoder.read_info().unwrap();
        let mut pixels = vec![0; reader.output_buffer_size().unwrap()];
        reader.next_frame(&mut pixels).unwrap();
        pixels.iter().map(|&p| 255 - p as u64).sum()
    };
    let size = ["--size", "1024x512", "--bare"];
    for (how, out) in [
        ("solid", "solid.png"),
        ("faint", "faint.png"),
        ("off", "off.png"),
    ] {
        let mut args = vec!["render", "pair.ron", "--hidden", how, "-o", out];
        args.extend(size);
        succeeds(&dir, &args);
    }
    let mut args = vec!["render", "pair.ron", "-o", "scene.png"];
    args.extend(size);
    succeeds(&dir, &args);
    // Less ink as hidden parts fade and go; the scene's own choice is `Off`.
    assert!(ink("solid.png") > ink("faint.png"));
    assert!(ink("faint.png") > ink("off.png"));
    assert_eq!(
        std::fs::read(dir.path("scene.png")).unwrap(),
        std::fs::read(dir.path("off.png")).unwrap()
    );
    // Standing inside the small block is warned about.
    let inside = "Scene(standpoints: [(name: \"in\", x: 0, y: 0)], items: [Block(at: Centre(0, 0), width: 4, depth: 2, height: 3)])";
    dir.write("inside.ron", inside);
    let out = succeeds(
        &dir,
        &[
            "render",
            "inside.ron",
            "-o",
            "inside.png",
            "--size",
            "256x128",
        ],
    );
    assert!(stderr(&out).contains("is inside block"), "{}", stderr(&out));
}

#[test]
fn pages_and_formats_from_the_command_line() {
    let dir = Scratch::new("pages");
    let demo = demo();
    let demo = demo.to_str().unwrap();
    succeeds(
        &dir,
        &[
            "render", demo, "--page", "a4", "--dpi", "100", "-o", "a4.pdf",
        ],
    );
    assert!(std::fs::read(dir.path("a4.pdf"))
        .unwrap()
        .starts_with(b"%PDF-"));
    succeeds(
        &dir,
        &[
            "render",
            demo,
            "--page",
            "letter",
            "--portrait",
            "--dpi",
            "100",
            "-o",
            "p.svg",
        ],
    );
    let svg = std::fs::read_to_string(dir.path("p.svg")).unwrap();
    assert!(
        svg.contains("width=\"215.9mm\"") && svg.contains("height=\"279.4mm\""),
        "{}",
        &svg[..300]
    );
    succeeds(
        &dir,
        &[
            "render", demo, "--page", "a5", "--dpi", "72", "--tiles", "2x2", "--band", "-30,60",
            "-o", "m.png",
        ],
    );
    for name in ["m-r1c1.png", "m-r1c2.png", "m-r2c1.png", "m-r2c2.png"] {
        assert!(dir.path(name).exists(), "{name}: {:?}", dir.files());
    }
    succeeds(
        &dir,
        &[
            "render", demo, "--size", "512x256", "--colour", "-o", "c.png",
        ],
    );
    assert_eq!(
        png_size(&std::fs::read(dir.path("c.png")).unwrap()).2,
        png::ColorType::Rgba
    );
    // Page options without a page, a paper nobody knows, an extension that names no format.
    let dir = Scratch::new("pages-refused");
    assert_refused(
        &dir,
        &["render", demo, "--band", "-30,60"],
        &["--band needs a page"],
    );
    assert_refused(
        &dir,
        &["render", demo, "--page", "a9"],
        &["a4", "letter", "asme-c"],
    );
    let out = pansite(&dir, &["render", demo, "-o", "x.jpg"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        stderr(&out).contains(".png, .svg or .pdf"),
        "{}",
        stderr(&out)
    );
}

// Everyday friction found in use (issue: a house a newcomer can live in).

/// Runs the binary with `input` on standard input.
fn with_stdin(dir: &Scratch, args: &[&str], input: &[u8]) -> std::process::Output {
    use std::io::Write;
    use std::process::Stdio;
    let mut child = dir
        .command()
        .args(args)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    // A command that refuses a stream (`watch -`) may end before it is written: its closed
    // pipe is its answer, not the test's failure.
    match child.stdin.take().unwrap().write_all(input) {
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => {}
        written => written.unwrap(),
    }
    child.wait_with_output().unwrap()
}

#[test]
fn a_reader_that_stops_early_ends_the_program_quietly() {
    use std::io::Read;
    use std::process::Stdio;
    let dir = Scratch::new("pipe");
    // Enough rows that the table cannot fit in the pipe's buffer (64 KiB on Linux).
    let points: String = (0..4000)
        .map(|k| format!("Point(label: \"post {k}\", at: ({}, 5, 0)),\n", k % 50))
        .collect();
    dir.write(
        "many.ron",
        format!("Scene(standpoints: [(name: \"a\", x: 0, y: 0)], items: [{points}])"),
    );
    for args in [
        &["angles", "many.ron"][..],
        &["render", "many.ron", "--size", "2048x1024", "-o", "-"],
    ] {
        let mut child = dir
            .command()
            .args(args)
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn()
            .unwrap();
        // Read a little, as `head` does, then close the pipe.
        let mut first = [0u8; 16];
        child
            .stdout
            .as_mut()
            .unwrap()
            .read_exact(&mut first)
            .unwrap();
        drop(child.stdout.take());
        let out = child.wait_with_output().unwrap();
        assert_eq!(out.status.code(), Some(0), "{args:?}: {}", stderr(&out));
        assert!(!stderr(&out).contains("pipe"), "{args:?}: {}", stderr(&out));
    }
}

#[test]
fn every_command_that_takes_a_scene_reads_standard_input() {
    let dir = Scratch::new("stdin-all");
    let scene = std::fs::read(demo()).unwrap();
    let check = with_stdin(&dir, &["check", "-"], &scene);
    assert_eq!(check.status.code(), Some(0), "{}", stderr(&check));
    assert!(String::from_utf8_lossy(&check.stdout).contains("Wexcombe"));
    for (args, file) in [
        (&["plan", "-", "-o", "plan.svg"][..], "plan.svg"),
        (&["preview", "-", "-o", "preview.png"], "preview.png"),
        (
            &[
                "sheet",
                "-",
                "--thumb",
                "96x48",
                "--hidden",
                "solid",
                "-o",
                "sheet.png",
            ],
            "sheet.png",
        ),
        (&["angles", "-", "-o", "angles.txt"], "angles.txt"),
    ] {
        let out = with_stdin(&dir, args, &scene);
        assert_eq!(out.status.code(), Some(0), "{args:?}: {}", stderr(&out));
        assert!(dir.path(file).exists(), "{args:?} wrote no {file}");
    }
    // watch must read its file again on every save, so it says it cannot watch a stream.
    let out = with_stdin(&dir, &["watch", "-"], &scene);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        stderr(&out).contains("needs a scene file"),
        "{}",
        stderr(&out)
    );
}

#[cfg(unix)]
#[test]
fn stopping_watch_says_what_it_wrote() {
    use std::process::Stdio;
    let dir = Scratch::new("watch-stop");
    std::fs::copy(demo(), dir.path("square.ron")).unwrap();
    let child = dir
        .command()
        .args(["watch", "square.ron", "--size", "256x128", "-o", "live.png"])
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let started = std::time::Instant::now();
    while !dir.path("live.png").exists() {
        assert!(started.elapsed().as_secs() < 60, "watch wrote nothing");
        std::thread::sleep(std::time::Duration::from_millis(50));
    }
    let sent = std::process::Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(sent.success());
    let out = child.wait_with_output().unwrap();
    let err = stderr(&out);
    assert_eq!(out.status.code(), Some(130), "{err}");
    assert!(err.contains("1 file written before"), "{err}");
    assert!(!err.contains("no file was written"), "{err}");
}

#[test]
fn a_json_file_is_told_it_is_not_a_scene() {
    let dir = Scratch::new("json");
    dir.write(
        "data.json",
        "{\"type\": \"FeatureCollection\", \"features\": []}",
    );
    let out = pansite(&dir, &["render", "data.json"]);
    assert_eq!(out.status.code(), Some(2));
    let err = stderr(&out);
    assert!(err.contains("data.json:1:1"), "{err}");
    assert!(err.contains("looks like JSON"), "{err}");
    assert!(!err.contains("Expected opening"), "{err}");
}

#[test]
fn footprint_sides_are_said_to_count_from_one() {
    let dir = Scratch::new("side0");
    dir.write(
        "side.ron",
        "Scene(standpoints: [(name: \"a\", x: 0, y: -20)], items: [\n\
         Footprint(points: [(0, 0), (8, 0), (8, 6), (0, 6)], height: 5,\n\
         openings: [(wall: Side(0), count: 2, width: 1, height: 1.5)])])",
    );
    let out = pansite(&dir, &["check", "side.ron"]);
    assert_eq!(out.status.code(), Some(2));
    let err = stderr(&out);
    assert!(err.contains("side.ron:3:"), "{err}");
    assert!(err.contains("counted from 1"), "{err}");
}

/// A block facing north at Corner(0, 0), 4 m wide and 3 m deep, under a gable along its
/// width: its width runs west and its depth south (docs/scene-format.md, "Block").
const NORTH_FACING: &str = "Scene(standpoints: [(name: \"a\", x: 2, y: 12)], items: [\n\
     Block(label: \"shed\", at: Corner(0, 0), width: 4, depth: 3, height: 2.5, facing: 0,\n\
     roof: Gable(ridge: 4))])";

#[test]
fn angles_names_corners_by_what_they_are() {
    let dir = Scratch::new("corner-names");
    dir.write("shed.ron", NORTH_FACING);
    let out = succeeds(&dir, &["angles", "shed.ron", "--format", "csv"]);
    let table = String::from_utf8_lossy(&out.stdout).into_owned();
    for name in [
        "front left foot",
        "front right foot",
        "back left eaves",
        "ridge left end",
        "ridge right end",
    ] {
        assert!(table.contains(name), "no \"{name}\" in\n{table}");
    }
    assert!(!table.contains("corner "), "an unnamed corner in\n{table}");
}

#[test]
fn check_lists_each_blocks_corners() {
    let dir = Scratch::new("block-corners");
    dir.write("shed.ron", NORTH_FACING);
    let out = succeeds(&dir, &["check", "shed.ron"]);
    let report = String::from_utf8_lossy(&out.stdout).into_owned();
    // Facing north, the front-left corner is the north-east one: the width runs west
    // (x falls) and the depth south (y falls).
    assert!(
        report.contains(
            "front left (0.00, 0.00), front right (-4.00, 0.00), back right (-4.00, -3.00), back left (0.00, -3.00)"
        ),
        "{report}"
    );
}

/// `check` reports the sloping ground's extent and height range, and warns of a standpoint
/// and an item the ground does not reach (a post half off its edge at x = 20), not of one
/// wholly on it.
#[test]
fn check_reports_the_ground_and_what_lies_off_it() {
    let dir = Scratch::new("ground-check");
    dir.write(
        "hill.ron",
        "Scene(standpoints: [(name: \"on\", x: 5, y: 5), (name: \"off\", x: 50, y: 5)],\n\
         ground: (spots: [(0, 0, 1), (20, 0, 1), (0, 20, 4), (20, 20, 4)]),\n\
         items: [Column(label: \"post\", at: (20, 5), diameter: 0.4, height: 3),\n\
                 Figure(label: \"walker\", at: (10, 10))])",
    );
    let out = succeeds(&dir, &["check", "hill.ron"]);
    let report = String::from_utf8_lossy(&out.stdout).into_owned();
    assert!(
        report.contains("ground: x 0.00 to 20.00, y 0.00 to 20.00, heights 1.00 to 4.00 m"),
        "{report}"
    );
    // The standpoint on the ground stands on it: 1 + 3 * 5 / 20 under it.
    assert!(report.contains("above ground at 1.75 m"), "{report}");
    let all = format!("{report}{}", stderr(&out));
    assert!(all.contains("does not reach standpoint \"off\""), "{all}");
    assert!(
        all.contains("ground (item 3) does not reach under all of column \"post\" (item 1)"),
        "{all}"
    );
    assert!(!all.contains("all of figure"), "{all}");
}

/// `check` and `render` warn of a figure set in the ground by its `base`, naming it; one
/// without a `base` stands on the ground and is not warned of. The ground is one plane
/// through three spots, worked by hand: z = 1 + 3 x / 20 + y / 20, 2.25 at (5, 10).
#[test]
fn check_and_render_refuse_a_figure_sunk_in_the_ground() {
    let dir = Scratch::new("sunk-figure");
    dir.write(
        "hill.ron",
        "Scene(standpoints: [(name: \"on\", x: 5, y: 5)],\n\
         ground: (spots: [(0, 0, 1), (20, 0, 4), (0, 20, 2)]),\n\
         items: [Figure(label: \"walker\", at: (5, 10), base: 1),\n\
                 Figure(label: \"climber\", at: (10, 5))])",
    );
    let expected = [
        "hill.ron:3:",
        "Figure \"walker\" (item 1)",
        "stands 1.25 m under the ground at (5.00, 10.00)",
    ];
    let out = pansite(&dir, &["check", "hill.ron"]);
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    for e in expected {
        assert!(stderr(&out).contains(e), "{e:?} in {}", stderr(&out));
    }
    assert_refused(
        &dir,
        &["render", "hill.ron", "--size", "400x200"],
        &expected,
    );
    // Without its base the same figure stands on the ground, as the climber does.
    dir.write(
        "hill.ron",
        "Scene(standpoints: [(name: \"on\", x: 5, y: 5)],\n\
         ground: (spots: [(0, 0, 1), (20, 0, 4), (0, 20, 2)]),\n\
         items: [Figure(label: \"walker\", at: (5, 10)),\n\
                 Figure(label: \"climber\", at: (10, 5))])",
    );
    succeeds(&dir, &["check", "hill.ron"]);
}

#[test]
fn dividing_the_edges_of_no_item_is_refused() {
    // As `angles --item` refuses a label that names nothing: a division that would draw
    // nothing is a mistake to report, not a silent empty aid.
    let dir = Scratch::new("divide-nothing");
    let demo = demo();
    let demo = demo.to_str().unwrap();
    assert_refused(
        &dir,
        &["render", demo, "--divide-edges", "nowhere:3"],
        &["--divide-edges", "\"nowhere\"", "\"hall platform\""],
    );
    // A label the demo has is drawn.
    succeeds(
        &dir,
        &[
            "render",
            demo,
            "--divide-edges",
            "house 1:3",
            "-o",
            "ok.png",
            "--size",
            "512x256",
        ],
    );
}

#[test]
fn plans_and_sheets_on_paper_and_a_scale_that_does_not_fit() {
    let dir = Scratch::new("plan-paper");
    let demo = demo();
    let demo = demo.to_str().unwrap();
    // The demo with its margins is about 85 x 72 m: at 1:100 that is 850 mm across, more
    // than A4 holds; the message says what it needs and which standard scale fits.
    assert_refused(
        &dir,
        &["plan", demo, "--page", "a4", "--scale", "1:100"],
        &["1:100", "mm", "largest standard scale that fits"],
    );
    assert_refused(&dir, &["plan", demo, "--scale", "1:0"], &["1:N"]);
    let out = succeeds(
        &dir,
        &[
            "plan", demo, "--page", "a4", "--scale", "1:1000", "-o", "p.svg",
        ],
    );
    assert!(stderr(&out).contains("297 x 210 mm"), "{}", stderr(&out));
    let svg = std::fs::read_to_string(dir.path("p.svg")).unwrap();
    assert!(
        svg.contains("SCALE 1:1000 PRINTED"),
        "the scale asked for is the scale written"
    );
    // ISO 216: A3 is 420 x 297 mm; the panorama and its plan side by side on it.
    succeeds(
        &dir,
        &["plan", demo, "--beside", "--page", "a3", "-o", "b.svg"],
    );
    let svg = std::fs::read_to_string(dir.path("b.svg")).unwrap();
    assert!(svg.contains(r#"width="420mm" height="297mm""#));
    succeeds(
        &dir,
        &[
            "sheet",
            demo,
            "--page",
            "a4",
            "--portrait",
            "--hidden",
            "solid",
            "-o",
            "s.svg",
        ],
    );
    let svg = std::fs::read_to_string(dir.path("s.svg")).unwrap();
    assert!(svg.contains(r#"width="210mm" height="297mm""#));
}

#[test]
fn render_says_what_the_lettering_and_the_placer_could_not_do() {
    let dir = Scratch::new("labels-summary");
    // U+03A9 (Greek capital omega) is outside Latin-1 Supplement and Latin Extended-A, the
    // ranges the lettering covers (Unicode 15 code charts); it is drawn as a placeholder
    // and named.
    let scene = dir.write(
        "omega.ron",
        "Scene(standpoints: [(name: \"s\", x: 0, y: -10)], items: [\n  Block(label: \"Stoa \u{3a9}\", at: Centre(0, 0), width: 4, depth: 3, height: 3),\n])",
    );
    let out = succeeds(
        &dir,
        &[
            "render",
            scene.to_str().unwrap(),
            "--item-labels",
            "--size",
            "1024x512",
            "-o",
            "o.png",
        ],
    );
    let text = stderr(&out);
    assert!(
        text.contains("no letterform for \"\u{3a9}\" (U+03A9)"),
        "{text}"
    );
    assert!(!text.contains("left out"), "{text}");
    // Every aid on a small panorama in large letters: not every label finds room, and the
    // run says how many were left out.
    let demo = demo();
    let out = succeeds(
        &dir,
        &[
            "render",
            demo.to_str().unwrap(),
            "--aids",
            "--size",
            "512x256",
            "--text-height",
            "14",
            "-o",
            "d.png",
        ],
    );
    let text = stderr(&out);
    assert!(
        text.lines().any(|l| l.contains("left out for want of room")
            && l.split_whitespace()
                .nth(1)
                .and_then(|n| n.parse::<u32>().ok())
                .is_some_and(|n| n > 0)),
        "{text}"
    );
}

#[test]
fn text_lettering_is_for_svg() {
    let dir = Scratch::new("lettering");
    let demo = demo();
    let demo = demo.to_str().unwrap();
    assert_refused(
        &dir,
        &["render", demo, "--lettering", "text", "--aids"],
        &["--lettering text", "SVG"],
    );
    succeeds(
        &dir,
        &[
            "render",
            demo,
            "--aids",
            "--size",
            "1024x512",
            "--lettering",
            "text",
            "-o",
            "t.svg",
        ],
    );
    let svg = std::fs::read_to_string(dir.path("t.svg")).unwrap();
    assert!(svg.contains("<text "), "text elements written");
}

/// A closed ring of plan offsets (metres east, north) about a point, as GeoJSON
/// coordinates: each corner by GeographicLib's direct problem from the point (Karney 2013),
/// at the offset's azimuth and length.
fn geojson_ring(lat: f64, lon: f64, corners: &[(f64, f64)]) -> String {
    use geographiclib_rs::{DirectGeodesic, Geodesic};
    let geodesic = Geodesic::wgs84();
    let mut ring: Vec<String> = corners
        .iter()
        .map(|&(east, north)| {
            let azimuth = east.atan2(north).to_degrees();
            let (la, lo, _): (f64, f64, f64) =
                geodesic.direct(lat, lon, azimuth, east.hypot(north));
            format!("[{lo}, {la}]")
        })
        .collect();
    ring.push(ring[0].clone());
    format!("[[{}]]", ring.join(", "))
}

#[test]
fn check_lists_what_the_data_did_not_say_feature_by_feature() {
    // The simple 3D buildings conventions (OpenStreetMap wiki, Simple 3D Buildings and
    // Key:roof:shape; common practice in mapping): `height` is the ground to the top of
    // the roof, `building:levels` counts storeys, `roof:shape` names the roof. A feature
    // that says all of it needs no guess; each one that leaves something out is listed by
    // its id (or its index in the file) with what was assumed in its place.
    let dir = Scratch::new("check-assumed");
    let square = [(-4.0, -4.0), (4.0, -4.0), (4.0, 4.0), (-4.0, 4.0)];
    let feature = |id: &str, tags: &str, north: f64| {
        format!(
            r#"{{"type": "Feature", {id} "properties": {{{tags}}}, "geometry": {{"type": "Polygon", "coordinates": {}}}}}"#,
            geojson_ring(45.0 + north / 111_000.0, -30.0, &square)
        )
    };
    let data = format!(
        r#"{{"type": "FeatureCollection", "features": [{}, {}, {}, {}]}}"#,
        feature(
            r#""id": "surveyed","#,
            r#""building": "yes", "height": "9", "roof:shape": "flat""#,
            30.0
        ),
        feature(
            r#""id": "levels","#,
            r#""building": "yes", "building:levels": "4", "roof:shape": "flat""#,
            -30.0
        ),
        feature("", r#""building": "yes""#, 60.0),
        r#"{"type": "Feature", "properties": {"highway": "service", "lanes": "2"},
            "geometry": {"type": "LineString", "coordinates": [[-30.0005, 45.0], [-29.9995, 45.0]]}}"#,
    );
    dir.write("block.geojson", data);
    dir.write(
        "block.ron",
        r#"Scene(location: (latitude: 45.0, longitude: -30.0),
                 standpoints: [(name: "here", x: 0, y: -10)],
                 items: [OpenData(file: "block.geojson", storey: 3.5)])"#,
    );
    let out = succeeds(&dir, &["check", "block.ron"]);
    let text = common::stdout(&out);
    let listed: Vec<&str> = text
        .lines()
        .skip_while(|l| !l.starts_with("assumed, not surveyed"))
        .collect();
    assert!(listed.first().is_some_and(|l| l.contains("(4)")), "{text}");
    let lines_of = |name: &str| -> Vec<&str> {
        listed[1..]
            .iter()
            .filter(|l| l.contains(name))
            .copied()
            .collect()
    };
    // Fully tagged: nothing assumed.
    assert!(lines_of("\"surveyed\"").is_empty(), "{text}");
    // Four levels of the scene's 3.5 m storey: 14 m.
    let levels = lines_of("\"levels\"");
    assert_eq!(levels.len(), 1, "{text}");
    assert!(levels[0].contains("building:levels: 4 x 3.5 m"), "{text}");
    // No id: named by its index (the third feature, 2 from 0). No height, no levels, no
    // roof: two storeys of 3.5 m and a flat roof, both said.
    let bare = lines_of("\"feature 2\"");
    assert_eq!(bare.len(), 2, "{text}");
    assert!(bare.iter().any(|l| l.contains("no roof:shape")), "{text}");
    assert!(bare.iter().any(|l| l.contains("7.0 m high")), "{text}");
    // The road's width from its lanes, our 3 m a lane.
    let road = lines_of("\"feature 3\"");
    assert_eq!(road.len(), 1, "{text}");
    assert!(
        road[0].contains("road") && road[0].contains("2 x 3 m"),
        "{text}"
    );
}

#[test]
fn a_data_file_renders_from_a_latitude_and_longitude() {
    // A tower 2 m square and 30 m high, its middle 40 m north and 30 m east of the
    // standpoint, which stands 100 m south of the plan's origin. Where each corner appears
    // is worked here from the standpoint's latitude and longitude alone: GeographicLib's
    // inverse problem (Karney 2013) gives its azimuth, and the mapping
    // x = (azimuth + 180) / 360 W (heading 0: north in the middle) its column.
    use geographiclib_rs::{DirectGeodesic, Geodesic, InverseGeodesic};
    let geodesic = Geodesic::wgs84();
    let (lat0, lon0) = (45.0, -30.0);
    let (at_lat, at_lon, _): (f64, f64, f64) = geodesic.direct(lat0, lon0, 180.0, 100.0);
    let (mid_lat, mid_lon, _): (f64, f64, f64) = geodesic.direct(at_lat, at_lon, 36.8699, 50.0);
    let corners = [(-1.0, -1.0), (1.0, -1.0), (1.0, 1.0), (-1.0, 1.0)];
    let dir = Scratch::new("at-latlon");
    dir.write(
        "tower.geojson",
        format!(
            r#"{{"type": "FeatureCollection", "features": [{{"type": "Feature",
            "properties": {{"building": "yes", "height": "30"}},
            "geometry": {{"type": "Polygon", "coordinates": {}}}}}]}}"#,
            geojson_ring(mid_lat, mid_lon, &corners)
        ),
    );
    let at = format!("{at_lat},{at_lon}");
    let origin = format!("{lat0},{lon0}");
    let (w, h) = (4096usize, 2048usize);
    succeeds(
        &dir,
        &[
            "render",
            "tower.geojson",
            "--at-latlon",
            &at,
            "--origin-latlon",
            &origin,
            "--bare",
            "--size",
            "4096x2048",
            "-o",
            "tower.png",
        ],
    );
    assert_eq!(dir.files(), vec!["tower.geojson", "tower.png"]);
    let (_, _, grey) = common::read_png_grey(&std::fs::read(dir.path("tower.png")).unwrap());
    let columns: Vec<f64> = corners
        .iter()
        .map(|&(east, north)| {
            let azimuth = east.atan2(north).to_degrees();
            let (lat, lon, _): (f64, f64, f64) =
                geodesic.direct(mid_lat, mid_lon, azimuth, east.hypot(north));
            let (_, azimuth, _, _): (f64, f64, f64, f64) =
                geodesic.inverse(at_lat, at_lon, lat, lon);
            (azimuth + 180.0) / 360.0 * w as f64
        })
        .collect();
    // The row 10 degrees above the horizon crosses the tower's upright edges (it reaches
    // about 30 degrees) and nothing else.
    let row = (h as f64 / 2.0 - 10.0 / 180.0 * h as f64) as usize;
    let inked: Vec<usize> = (0..w).filter(|&x| grey[row * w + x] < 128).collect();
    let (left, right) = (
        columns.iter().copied().fold(f64::MAX, f64::min),
        columns.iter().copied().fold(f64::MIN, f64::max),
    );
    assert!(!inked.is_empty());
    for &x in &inked {
        assert!(
            x as f64 + 0.5 > left - 1.5 && x as f64 + 0.5 < right + 1.5,
            "ink at column {x}, the tower's corners at {columns:?}"
        );
    }
    // The nearest corner (south-west), seen in front of the others, is drawn.
    assert!(
        inked
            .iter()
            .any(|&x| (x as f64 + 0.5 - columns[0]).abs() < 1.5),
        "{inked:?} against {columns:?}"
    );
}
