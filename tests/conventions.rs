//! The view's conventions pinned from outside the view-frame code: where a world point must
//! land for a heading, pitch and roll, worked out in `common::camera_axes` with plain
//! trigonometry from the GPano pose-angle convention (Google, "Photo Sphere XMP Metadata",
//! the pose fields and the Euler-angle section; aircraft yaw, pitch, roll, common practice),
//! then checked against the real binary: the `angles` table and the drawn `render`.
//!
//! The prediction itself is first held to hand-worked cases, so it cannot drift along with
//! the code. Flipping the sign of any one angle in `src/sphere/view.rs` fails these tests,
//! and so does flipping one in the pose the PNG's metadata tells a panorama viewer.

mod common;
use common::{gpano_pose, predicted_pixel, read_png_grey, stdout, succeeds, Scratch};

/// A scene of labelled points all round the eye (at the origin, eye 1.5 m), none near the
/// zenith or nadir, none behind another.
const POINTS: &str = r#"Scene(
    standpoints: [(name: "gate", x: 0, y: 0, eye_height: 1.5, heading: 0)],
    items: [
        Point(label: "n", at: (0, 12, 1.5)),
        Point(label: "ne", at: (7, 9, 4)),
        Point(label: "e", at: (15, 1, 0)),
        Point(label: "se", at: (6, -8, 3)),
        Point(label: "s", at: (-1, -11, 1)),
        Point(label: "sw", at: (-9, -6, 6)),
        Point(label: "w", at: (-13, 2, 2.5)),
        Point(label: "nw", at: (-5, 8, 0)),
    ],
)"#;

/// Every pose is tried with each angle non-zero, alone and together.
const POSES: [(f64, f64, f64); 8] = [
    (0.0, 0.0, 0.0),
    (90.0, 0.0, 0.0),
    (33.0, 0.0, 0.0),
    (0.0, 25.0, 0.0),
    (0.0, 0.0, 20.0),
    (0.0, 0.0, -35.0),
    (210.0, -15.0, 30.0),
    (300.0, 40.0, -12.0),
];

/// The columns of `angles --format csv`: (label, x_px, y_px, azimuth, elevation) per row.
fn table(csv: &str) -> Vec<(String, f64, f64, f64, f64)> {
    let mut lines = csv.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let column = |name: &str| header.iter().position(|h| *h == name).unwrap();
    let (x, y, az, el) = (
        column("x_px"),
        column("y_px"),
        column("azimuth"),
        column("elevation"),
    );
    lines
        .map(|line| {
            let cells: Vec<&str> = line.split(',').collect();
            let number = |k: usize| cells[k].parse::<f64>().unwrap();
            (
                cells[0].to_owned(),
                number(x),
                number(y),
                number(az),
                number(el),
            )
        })
        .collect()
}

fn point(label: &str) -> [f64; 3] {
    let line = POINTS
        .lines()
        .find(|l| l.contains(&format!("\"{label}\"")))
        .unwrap();
    let inside = &line[line.find("at: (").unwrap() + 5..line.rfind(')').unwrap() - 1];
    let v: Vec<f64> = inside
        .split(',')
        .map(|s| s.trim().parse().unwrap())
        .collect();
    [v[0], v[1], v[2]]
}

/// Pixels may differ from the prediction by the table's rounding (two decimals) and a hair.
const TABLE_PX: f64 = 0.006;

#[test]
fn the_prediction_agrees_with_hand_worked_cases() {
    let (w, h) = (3600.0, 1800.0);
    let eye = [0.0, 0.0, 0.0];
    let at = |pose, p| predicted_pixel(eye, pose, p, w, h);
    let near = |a: (f64, f64), b: (f64, f64)| (a.0 - b.0).abs() < 1e-9 && (a.1 - b.1).abs() < 1e-9;
    // Heading 90: due east is straight ahead, the image centre; north is 90 degrees left.
    assert!(near(at((90.0, 0.0, 0.0), [5.0, 0.0, 0.0]), (1800.0, 900.0)));
    assert!(near(at((90.0, 0.0, 0.0), [0.0, 5.0, 0.0]), (900.0, 900.0)));
    // Pitch 30 up: a point 30 degrees up in the heading is the centre; the level point ahead
    // is 30 degrees below it.
    let up30 = [0.0, 30f64.to_radians().cos(), 30f64.to_radians().sin()];
    assert!(near(at((0.0, 30.0, 0.0), up30), (1800.0, 900.0)));
    assert!(near(
        at((0.0, 30.0, 0.0), [0.0, 1.0, 0.0]),
        (1800.0, 1200.0)
    ));
    // Roll 90 (the head laid on the right shoulder): the viewer's up turns to what was their
    // right, so due east at eye level is the zenith (the top row) and the zenith lies 90
    // degrees left.
    assert!(at((0.0, 0.0, 90.0), [1.0, 0.0, 0.0]).1.abs() < 1e-9);
    assert!(near(at((0.0, 0.0, 90.0), [0.0, 0.0, 1.0]), (900.0, 900.0)));
    // GPano: as roll grows the horizon turns counter-clockwise in the image, so a roll of 10
    // lifts the horizon's east point (90 degrees right) by 10 degrees and drops the west one.
    assert!(near(at((0.0, 0.0, 10.0), [1.0, 0.0, 0.0]), (2700.0, 800.0)));
    assert!(near(
        at((0.0, 0.0, 10.0), [-1.0, 0.0, 0.0]),
        (900.0, 1000.0)
    ));
}

/// Runs `angles` with the pose given as options, returning the table.
fn angles(
    dir: &Scratch,
    pose: (f64, f64, f64),
    extra: &[&str],
) -> Vec<(String, f64, f64, f64, f64)> {
    let (heading, pitch, roll) = (pose.0.to_string(), pose.1.to_string(), pose.2.to_string());
    let mut args = vec![
        "angles",
        "scene.ron",
        "--points",
        "--format",
        "csv",
        "--size",
        "3600x1800",
        "--heading",
        &heading,
        "--pitch",
        &pitch,
        "--roll",
        &roll,
    ];
    args.extend(extra);
    table(&stdout(&succeeds(dir, &args)))
}

#[test]
fn angles_puts_each_point_where_the_pose_sends_it() {
    let dir = Scratch::new("conventions-angles");
    dir.write("scene.ron", POINTS);
    let eye = [0.0, 0.0, 1.5];
    for pose in POSES {
        let rows = angles(&dir, pose, &[]);
        assert_eq!(rows.len(), 8, "{pose:?}");
        for (label, x, y, azimuth, elevation) in rows {
            let p = point(&label);
            let (px, py) = predicted_pixel(eye, pose, p, 3600.0, 1800.0);
            assert!(
                (x - px).abs() < TABLE_PX && (y - py).abs() < TABLE_PX,
                "{label} at {pose:?}: table ({x}, {y}), predicted ({px:.3}, {py:.3})"
            );
            // The site-frame angles do not depend on the pose: bearing clockwise from north,
            // elevation above the level through the eye.
            let (dx, dy, dz) = (p[0] - eye[0], p[1] - eye[1], p[2] - eye[2]);
            let bearing = dx.atan2(dy).to_degrees().rem_euclid(360.0);
            let up = dz.atan2(dx.hypot(dy)).to_degrees();
            assert!(
                (azimuth - bearing).abs() < 6e-4,
                "{label}: {azimuth} vs {bearing}"
            );
            assert!(
                (elevation - up).abs() < 6e-4,
                "{label}: {elevation} vs {up}"
            );
        }
    }
}

#[test]
fn standpoint_options_move_the_eye_and_turn_the_view() {
    let dir = Scratch::new("conventions-options");
    dir.write(
        "scene.ron",
        POINTS.replace(
            "heading: 0)",
            "heading: 0, pitch: 10, roll: 5), (name: \"far\", x: 50, y: 50)",
        ),
    );
    let check = |args: &[&str], eye: [f64; 3], pose: (f64, f64, f64)| {
        let mut all = vec![
            "angles",
            "scene.ron",
            "--points",
            "--format",
            "csv",
            "--size",
            "3600x1800",
        ];
        all.extend(args);
        let rows = table(&stdout(&succeeds(&dir, &all)));
        assert_eq!(rows.len(), 8);
        for (label, x, y, _, _) in rows {
            let (px, py) = predicted_pixel(eye, pose, point(&label), 3600.0, 1800.0);
            assert!(
                (x - px).abs() < TABLE_PX && (y - py).abs() < TABLE_PX,
                "{args:?} {label}: ({x}, {y}) vs ({px:.3}, {py:.3})"
            );
        }
    };
    // The named standpoint as it is.
    check(&["-s", "gate"], [0.0, 0.0, 1.5], (0.0, 10.0, 5.0));
    // Moved and raised, its pitch and roll kept, turned to 45.
    check(
        &[
            "-s",
            "gate",
            "--at",
            "3,-2",
            "--eye-height",
            "2.5",
            "--heading",
            "45",
        ],
        [3.0, -2.0, 2.5],
        (45.0, 10.0, 5.0),
    );
    // --at alone stands a new viewer there, eye 1.6 m, facing north, level.
    check(&["--at", "-4,1.5"], [-4.0, 1.5, 1.6], (0.0, 0.0, 0.0));
    check(
        &["--at", "-4,1.5", "--eye-height", "0.9", "--heading", "-100"],
        [-4.0, 1.5, 0.9],
        (260.0, 0.0, 0.0),
    );
}

/// Short lines round the eye: every point of each lies on its drawn arc.
const LINES: &str = r#"Scene(
    standpoints: [(name: "gate", x: 0, y: 0, eye_height: 1.5)],
    items: [
        Line(from: (-1, 10, 2), to: (1, 10, 2.5)),
        Line(from: (8, 3, 0.5), to: (8, 5, 0.5)),
        Line(from: (4, -9, 3), to: (2, -9, 5)),
        Line(from: (-9, -2, 1.5), to: (-9, 1, 0)),
    ],
)"#;

fn line_ends() -> Vec<([f64; 3], [f64; 3])> {
    vec![
        ([-1.0, 10.0, 2.0], [1.0, 10.0, 2.5]),
        ([8.0, 3.0, 0.5], [8.0, 5.0, 0.5]),
        ([4.0, -9.0, 3.0], [2.0, -9.0, 5.0]),
        ([-9.0, -2.0, 1.5], [-9.0, 1.0, 0.0]),
    ]
}

/// Eleven points along each of the short lines, where the eye and pose put them on an
/// image of `size` (predicted without the view-frame code).
fn line_samples(eye: [f64; 3], pose: (f64, f64, f64), size: (f64, f64)) -> Vec<(f64, f64)> {
    line_ends()
        .iter()
        .flat_map(|(a, b)| {
            (0..=10).map(move |k| {
                let t = k as f64 / 10.0;
                [0, 1, 2].map(|i| a[i] + t * (b[i] - a[i]))
            })
        })
        .map(|p| predicted_pixel(eye, pose, p, size.0, size.1))
        .collect()
}

/// The darkest grey level within `radius` pixels of an image point.
fn darkest(grey: &[u8], width: u32, height: u32, at: (f64, f64), radius: f64) -> u8 {
    let mut dark = 255;
    for j in (at.1 - radius).floor() as i64..=(at.1 + radius).ceil() as i64 {
        for i in (at.0 - radius).floor() as i64..=(at.0 + radius).ceil() as i64 {
            let centre = (i as f64 + 0.5, j as f64 + 0.5);
            let inside = (centre.0 - at.0).hypot(centre.1 - at.1) <= radius;
            if inside && (0..width as i64).contains(&i) && (0..height as i64).contains(&j) {
                dark = dark.min(grey[(j * width as i64 + i) as usize]);
            }
        }
    }
    dark
}

/// Renders the lines with the pose on the command line and checks that every sampled point
/// of every line is inked where predicted, and that where the opposite roll (or pitch, or
/// heading) would put it, away from any predicted ink, the page is blank.
#[test]
fn render_draws_each_line_where_the_pose_sends_it() {
    let dir = Scratch::new("conventions-render");
    dir.write("scene.ron", LINES);
    let (w, h) = (1440.0, 720.0);
    let eye = [0.0, 0.0, 1.5];
    let samples = |pose: (f64, f64, f64)| line_samples(eye, pose, (w, h));
    let mut controls = 0;
    for pose in POSES.into_iter().skip(1) {
        let (heading, pitch, roll) = (pose.0.to_string(), pose.1.to_string(), pose.2.to_string());
        succeeds(
            &dir,
            &[
                "render",
                "scene.ron",
                "-o",
                "out.png",
                "--bare",
                "--size",
                "1440x720",
                "--heading",
                &heading,
                "--pitch",
                &pitch,
                "--roll",
                &roll,
                "-q",
            ],
        );
        let bytes = std::fs::read(dir.path("out.png")).unwrap();
        let (width, height, grey) = read_png_grey(&bytes);
        assert_eq!((width, height), (1440, 720));
        let predicted = samples(pose);
        for p in &predicted {
            assert!(
                darkest(&grey, width, height, *p, 1.5) < 128,
                "{pose:?}: no ink near the predicted {p:?}"
            );
        }
        // The pose the file tells a panorama viewer (its GPano fields, read back): a viewer
        // that applies it must find every line where it is drawn. Only the drawing's own
        // pose does that; the controls below show that a flipped angle does not.
        let told = gpano_pose(&bytes);
        for p in samples(told) {
            assert!(
                darkest(&grey, width, height, p, 1.5) < 128,
                "{pose:?}: the metadata's pose {told:?} puts a line at {p:?}, where none is drawn"
            );
        }
        // The same pose with one angle's sign flipped: wherever its points fall clear of
        // every predicted point, nothing is drawn there.
        for wrong in [
            (pose.0, pose.1, -pose.2),
            (pose.0, -pose.1, pose.2),
            (-pose.0, pose.1, pose.2),
        ] {
            if wrong == pose {
                continue;
            }
            for q in samples(wrong) {
                let clear = predicted.iter().all(|p| (p.0 - q.0).hypot(p.1 - q.1) > 6.0);
                if clear {
                    assert!(
                        darkest(&grey, width, height, q, 1.5) > 200,
                        "{pose:?}: ink at {q:?}, where the pose {wrong:?} would draw"
                    );
                    controls += 1;
                }
            }
        }
    }
    assert!(controls > 100, "only {controls} control points were clear");
}

/// `render` with `--at` and `--eye-height` (and a heading): every sampled point of every
/// line inked where the eye the options give would see it (predicted without the view-frame
/// code), and nothing where the scene's own eye would have drawn it, clear of those.
#[test]
fn render_draws_each_line_from_the_eye_the_options_put_there() {
    let dir = Scratch::new("conventions-render-eye");
    dir.write("scene.ron", LINES);
    let (w, h) = (1440.0, 720.0);
    let samples = |eye: [f64; 3], pose: (f64, f64, f64)| line_samples(eye, pose, (w, h));
    let mut controls = 0;
    for (at, eye_height, heading) in [("3,-2", 2.5, 30.0_f64), ("-1.5,4", 0.9, -75.0)] {
        let xy: Vec<f64> = at.split(',').map(|v| v.parse().unwrap()).collect();
        let eye = [xy[0], xy[1], eye_height];
        succeeds(
            &dir,
            &[
                "render",
                "scene.ron",
                "-o",
                "out.png",
                "--bare",
                "--size",
                "1440x720",
                "--at",
                at,
                "--eye-height",
                &eye_height.to_string(),
                "--heading",
                &heading.to_string(),
                "-q",
            ],
        );
        let (width, height, grey) = read_png_grey(&std::fs::read(dir.path("out.png")).unwrap());
        let pose = (heading.rem_euclid(360.0), 0.0, 0.0);
        let predicted = samples(eye, pose);
        for p in &predicted {
            assert!(
                darkest(&grey, width, height, *p, 1.5) < 128,
                "--at {at} --eye-height {eye_height}: no ink near the predicted {p:?}"
            );
        }
        // From the scene's own standpoint (x 0, y 0, eye 1.5 m), with the same heading.
        for q in samples([0.0, 0.0, 1.5], pose) {
            if predicted.iter().all(|p| (p.0 - q.0).hypot(p.1 - q.1) > 6.0) {
                assert!(
                    darkest(&grey, width, height, q, 1.5) > 200,
                    "--at {at}: ink at {q:?}, where the scene's own eye would draw"
                );
                controls += 1;
            }
        }
    }
    assert!(controls > 20, "only {controls} control points were clear");
}

/// `--at` on a sloping ground stands the eye on the ground there, as a standpoint written
/// without its own `ground` stands: the ground is the plane through the spots (z rises
/// 6 m over 80 m northwards), so at (0, 20) it is 3 m up and the eye 4.6 m; a mark 20 m
/// north at 10 m is then atan(5.4 / 20) above the level (plane trigonometry).
#[test]
fn at_on_a_slope_stands_the_eye_on_the_ground_there() {
    let dir = Scratch::new("conventions-at-slope");
    dir.write(
        "hill.ron",
        "Scene(\n\
         ground: (spots: [(-40, -20, 0), (40, -20, 0), (-40, 60, 6), (40, 60, 6)]),\n\
         standpoints: [(name: \"foot\", x: 0, y: -10), (name: \"terrace\", x: 5, y: 0, ground: 7)],\n\
         items: [Point(label: \"mark\", at: (0, 40, 10))])",
    );
    let elevation = |args: &[&str]| {
        let mut all = vec!["angles", "hill.ron", "--points", "--format", "csv"];
        all.extend(args);
        let text = stdout(&succeeds(&dir, &all));
        let mut lines = text.lines();
        let head: Vec<&str> = lines.next().unwrap().split(',').collect();
        let column = head.iter().position(|h| *h == "elevation").unwrap();
        let row = lines.find(|l| l.contains("mark")).unwrap();
        row.split(',').nth(column).unwrap().parse::<f64>().unwrap()
    };
    let seen_from = |ground: f64, y: f64| (10.0 - ground - 1.6).atan2(40.0 - y).to_degrees();
    // The named standpoint where it is: the ground 0.75 m up at y = -10.
    assert!((elevation(&[]) - seen_from(0.75, -10.0)).abs() < 6e-4);
    // Moved, or made, by --at: on the ground at (0, 20), 3 m up.
    for args in [&["-s", "foot", "--at", "0,20"][..], &["--at", "0,20"][..]] {
        let found = elevation(args);
        assert!(
            (found - seen_from(3.0, 20.0)).abs() < 6e-4,
            "{args:?}: {found} against {}",
            seen_from(3.0, 20.0)
        );
    }
    // A standpoint with its own ground (a terrace 7 m up) keeps it when moved.
    let found = elevation(&["-s", "terrace", "--at", "0,20"]);
    assert!((found - seen_from(7.0, 20.0)).abs() < 6e-4, "{found}");
    // Past the ground's edge (x beyond 40) it stands at 0, and `render` says so, as it does
    // for a standpoint written there; on the ground, nothing is said.
    let warning = |at: &str| {
        let out = succeeds(
            &dir,
            &[
                "render", "hill.ron", "--at", at, "--size", "256x128", "-o", "o.png",
            ],
        );
        common::stderr(&out)
    };
    let off = warning("60,20");
    assert!(
        off.contains("does not reach standpoint \"here\" at (60.00, 20.00)"),
        "{off}"
    );
    assert!(!warning("0,20").contains("does not reach"));
}
