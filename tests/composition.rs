//! The composition aids: the rectilinear preview against the gnomonic projection's
//! formulas and against the panorama, the plan map's markers, arrows and scale bar read
//! back from its SVG, the contact sheet, and watch mode end to end.

mod common;

use common::{assert_near, distance_to_set, Scratch};
use nalgebra::Point3;
use pansite::compose::{
    contact_sheet, plan_map, preview, sweep_headings, ContactSettings, Pinhole, PlanSettings,
    PreviewSettings,
};
use pansite::output::write_svg;
use pansite::plane::{Equirect, ImagePoint};
use pansite::render::{draw, RenderSettings};
use pansite::scene::{load_scene, EllipseArc, HiddenEdges, Site, SiteCurve, Standpoint};
use pansite::sphere::{
    angle_between, azimuth_elevation, direction_from_azimuth_elevation, ViewFrame,
};
use std::io::{BufRead, BufReader};
use std::path::Path;
use std::process::Stdio;
use std::sync::mpsc;
use std::time::{Duration, Instant};

fn demo() -> Site {
    load_scene(&Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron")).unwrap()
}

/// Every end of every straight edge of the site.
fn corners(site: &Site) -> Vec<Point3<f64>> {
    site.edges
        .iter()
        .filter_map(|e| match e.curve {
            SiteCurve::Segment { start, end } => Some([start, end]),
            SiteCurve::Ellipse(_) => None,
        })
        .flatten()
        .collect()
}

/// Snyder, "Map Projections: A Working Manual" (USGS Professional Paper 1395, 1987),
/// gnomonic projection: cos c by eq. 5-3, k' = 1 / cos c by 22-3, x by 22-4 and y by 22-5
/// (numbers as in Snyder's chapter 22 and his worked example in appendix A), with R = the
/// focal length:
/// latitude = elevation, longitude = azimuth (the map's x grows eastwards, as the
/// image's u grows clockwise), the centre (phi1, lambda0) = (pitch, heading).
/// `None` where cos c <= 0 (the hemisphere the projection cannot show).
fn snyder_gnomonic(f: f64, phi: f64, lambda: f64, phi1: f64, lambda0: f64) -> Option<(f64, f64)> {
    let cos_c = phi1.sin() * phi.sin() + phi1.cos() * phi.cos() * (lambda - lambda0).cos();
    if cos_c <= 1e-3 {
        return None;
    }
    let k = 1.0 / cos_c;
    let x = f * k * phi.cos() * (lambda - lambda0).sin();
    let y = f * k * (phi1.cos() * phi.sin() - phi1.sin() * phi.cos() * (lambda - lambda0).cos());
    Some((x, y))
}

/// Snyder's own worked example (appendix A, gnomonic, sphere, forward): R = 1, centre
/// phi1 = 40 N, lambda0 = 100 W, point phi = 30 N, lambda = 110 W give cos c = 0.9747290,
/// k' = 1.0259262, x = -0.1542826, y = -0.1694739 units. As a preview: an eye looking on
/// bearing 260 (100 W) pitched 40 up sees the direction of bearing 250, elevation 30, at
/// u = W/2 + f x, v = H/2 - f y.
#[test]
fn preview_reproduces_snyders_worked_gnomonic_example() {
    let (x, y) = snyder_gnomonic(
        1.0,
        30f64.to_radians(),
        -110f64.to_radians(),
        40f64.to_radians(),
        -100f64.to_radians(),
    )
    .unwrap();
    assert_near(x, -0.1542826, 5e-8);
    assert_near(y, -0.1694739, 5e-8);
    let settings = PreviewSettings {
        width: 1000,
        height: 1000,
        fov_deg: 90.0,
        ..PreviewSettings::default()
    };
    let standpoint = Standpoint::from_degrees("s", 0.0, 0.0, 0.0, 260.0, 40.0, 0.0);
    let camera = Pinhole::new(&standpoint, &settings).unwrap();
    assert_near(camera.focal_px, 500.0, 1e-9);
    let (bearing, elevation) = (250f64.to_radians(), 30f64.to_radians());
    let far = 37.0;
    let p = Point3::new(
        far * elevation.cos() * bearing.sin(),
        far * elevation.cos() * bearing.cos(),
        far * elevation.sin(),
    );
    let image = camera.project(&p).unwrap();
    // Snyder's seven decimals, times the focal length.
    assert_near(image.x, 500.0 + 500.0 * -0.1542826, 500.0 * 5e-8);
    assert_near(image.y, 500.0 - 500.0 * -0.1694739, 500.0 * 5e-8);
}

/// The preview's roll against the independent pose of `common::camera_axes` (the GPano
/// convention, worked out without the view frame), not against the panorama: every corner
/// of the demo in front of the camera lands where the plain-trigonometry pinhole puts it,
/// and a roll of the other sign would put it elsewhere.
#[test]
fn preview_roll_matches_the_independent_pose() {
    let site = demo();
    let settings = PreviewSettings::default();
    let eye = [1.5, -4.0, 1.6];
    let mut checked = 0;
    for pose in [(30.0, 8.0, 4.0), (200.0, -5.0, -25.0), (75.0, 20.0, 60.0)] {
        let standpoint =
            Standpoint::from_degrees("s", eye[0], eye[1], eye[2], pose.0, pose.1, pose.2);
        let camera = Pinhole::new(&standpoint, &settings).unwrap();
        let frame = (1280.0, 800.0, camera.focal_px);
        for p in corners(&site).into_iter().step_by(5) {
            let at = [p.x, p.y, p.z];
            let (Some(image), Some(expected)) = (
                camera.project(&p),
                common::predicted_pinhole(eye, pose, at, frame),
            ) else {
                continue;
            };
            if !(expected.0.abs() < 4000.0 && expected.1.abs() < 4000.0) {
                continue;
            }
            assert_near(image.x, expected.0, 1e-6);
            assert_near(image.y, expected.1, 1e-6);
            let flipped =
                common::predicted_pinhole(eye, (pose.0, pose.1, -pose.2), at, frame).unwrap();
            let centre = (expected.0 - 640.0).hypot(expected.1 - 400.0);
            if centre > 50.0 {
                assert!((flipped.0 - expected.0).hypot(flipped.1 - expected.1) > 1.0);
            }
            checked += 1;
        }
    }
    assert!(checked > 100, "only {checked} corners");
}

#[test]
fn preview_is_the_gnomonic_projection() {
    let site = demo();
    let settings = PreviewSettings {
        width: 1200,
        height: 800,
        fov_deg: 100.0,
        hidden: Some(HiddenEdges::Solid),
        ..PreviewSettings::default()
    };
    let mut checked = 0;
    for (heading, pitch) in [(10.0, 0.0), (200.0, 12.0), (315.0, -20.0), (95.0, 35.0)] {
        let standpoint = Standpoint::from_degrees("s", 1.5, -4.0, 1.6, heading, pitch, 0.0);
        let camera = Pinhole::new(&standpoint, &settings).unwrap();
        let drawing = preview(&site, &standpoint, &settings).unwrap();
        let wireframe = &drawing
            .layers
            .iter()
            .find(|l| l.name == "wireframe")
            .unwrap()
            .lines;
        let eye = standpoint.eye();
        for p in corners(&site) {
            // Site-frame azimuth (clockwise from north) and elevation of the point.
            let (lambda, phi) = azimuth_elevation(&(p - eye));
            let Some((x, y)) = snyder_gnomonic(
                camera.focal_px,
                phi,
                lambda,
                pitch.to_radians(),
                heading.to_radians(),
            ) else {
                continue;
            };
            let Some(image) = camera.project(&p) else {
                continue;
            };
            // Image u = W/2 + x, v = H/2 - y.
            assert_near(image.x, 600.0 + x, 1e-6 * (1.0 + x.abs()));
            assert_near(image.y, 400.0 - y, 1e-6 * (1.0 + y.abs()));
            // A corner inside the picture is on the drawing (a see-through wireframe).
            if image.x > 1.0 && image.x < 1199.0 && image.y > 1.0 && image.y < 799.0 {
                assert!(distance_to_set(image, wireframe) < 1e-6, "{p:?} not drawn");
                checked += 1;
            }
        }
    }
    assert!(checked > 500, "only {checked} corners checked");
}

#[test]
fn straight_edges_stay_straight_and_arcs_are_within_tolerance() {
    // A gnomonic map shows every great circle as a straight line (Snyder 1987, ch. 22):
    // the image of a segment's midpoint lies on the line through its ends' images.
    let site = demo();
    let standpoint = Standpoint::from_degrees("s", 1.5, -4.0, 1.6, 10.0, 5.0, 0.0);
    let settings = PreviewSettings {
        hidden: Some(HiddenEdges::Solid),
        ..PreviewSettings::default()
    };
    let camera = Pinhole::new(&standpoint, &settings).unwrap();
    let drawing = preview(&site, &standpoint, &settings).unwrap();
    let wireframe = &drawing
        .layers
        .iter()
        .find(|l| l.name == "wireframe")
        .unwrap()
        .lines;
    let mut arcs = 0;
    for edge in &site.edges {
        match edge.curve {
            SiteCurve::Segment { start, end } => {
                let mid = start + (end - start) * 0.5;
                if let (Some(a), Some(b), Some(m)) = (
                    camera.project(&start),
                    camera.project(&end),
                    camera.project(&mid),
                ) {
                    let cross = (b.x - a.x) * (m.y - a.y) - (b.y - a.y) * (m.x - a.x);
                    let length = (b.x - a.x).hypot(b.y - a.y).max(1.0);
                    assert!(cross.abs() / length < 1e-6);
                }
            }
            SiteCurve::Ellipse(ref arc) => {
                let EllipseArc {
                    centre,
                    u,
                    v,
                    start,
                    sweep,
                } = *arc;
                // Every true point of the arc inside the picture is within 0.1 px of the
                // drawing (the definition, densely sampled).
                for k in 0..=200 {
                    let t = start + sweep * k as f64 / 200.0;
                    let p = centre + u * t.cos() + v * t.sin();
                    if let Some(q) = camera.project(&p) {
                        if q.x > 0.5 && q.x < 1279.5 && q.y > 0.5 && q.y < 799.5 {
                            assert!(distance_to_set(q, wireframe) <= 0.1 + 1e-9);
                            arcs += 1;
                        }
                    }
                }
            }
        }
    }
    assert!(arcs > 100);
}

#[test]
fn preview_and_panorama_agree_on_directions() {
    // A point's direction read back from the preview's pixel and from the panorama's pixel
    // (the panorama as drawn: the point is on its polylines) is the same direction.
    let site = demo();
    let standpoint = Standpoint::from_degrees("s", 1.5, -4.0, 1.6, 30.0, 8.0, 4.0);
    let settings = PreviewSettings::default();
    let camera = Pinhole::new(&standpoint, &settings).unwrap();
    let render = RenderSettings {
        width: 4096,
        height: 2048,
        overlays: false,
        hidden: Some(HiddenEdges::Solid),
        ..RenderSettings::default()
    };
    let panorama = draw(&site, &standpoint, &render).unwrap().drawing;
    // Every wireframe layer (the scene puts some items on layers of their own).
    let mut lines = pansite::plane::PolylineSet::new();
    for layer in panorama
        .layers
        .iter()
        .filter(|l| l.name.starts_with("wireframe"))
    {
        lines.append(&mut layer.lines.clone());
    }
    let lines = &lines;
    let map = Equirect::from_size_px(4096.0, 2048.0);
    let view = ViewFrame::new(&standpoint);
    let pixel_angle = std::f64::consts::TAU / 4096.0;
    let mut checked = 0;
    for p in corners(&site).into_iter().step_by(7) {
        let Some(q) = camera.project(&p) else {
            continue;
        };
        if !(q.x > 0.0 && q.x < 1280.0 && q.y > 0.0 && q.y < 800.0) {
            continue;
        }
        let (azimuth, elevation) = azimuth_elevation(&view.to_view(&p));
        let at = map.to_image(azimuth, elevation);
        if at.y < 20.0 || at.y > 2028.0 {
            continue;
        }
        assert!(
            distance_to_set(at, lines) < 0.11,
            "{p:?} not on the panorama"
        );
        let (a, e) = map.to_angles(at);
        let from_panorama = view.direction_to_site(&direction_from_azimuth_elevation(a, e));
        let from_preview = camera.direction(q);
        assert!(angle_between(&from_panorama, &from_preview) < 1e-9);
        // And a pixel off in the panorama is a pixel's angle off: the test can tell.
        let off = ImagePoint::new(at.x + 1.0, at.y);
        let (a, e) = map.to_angles(off);
        let wrong = view.direction_to_site(&direction_from_azimuth_elevation(a, e));
        assert!(angle_between(&wrong, &from_preview) > 0.5 * pixel_angle);
        checked += 1;
    }
    assert!(checked > 30, "only {checked} points");
}

/// The paths of a layer of an SVG page, as lists of points in millimetres.
fn svg_layer(svg: &str, layer: &str) -> Vec<Vec<(f64, f64)>> {
    let paths = common::svg_layer_paths(svg, layer);
    assert!(!paths.is_empty(), "no layer {layer}");
    paths
}

#[test]
fn plan_markers_arrows_and_scale_bar_match_the_scene() {
    let site = demo();
    let settings = PlanSettings::default();
    let plan = plan_map(&site, &site.standpoints, &settings).unwrap();
    let sheet = plan.sheet();
    let mut bytes = Vec::new();
    write_svg(&sheet, &mut bytes).unwrap();
    let svg = String::from_utf8(bytes).unwrap();
    let mm_per_px = 25.4 / settings.dpi;

    // The scale bar: its length on paper is its metres at the plan's scale, and that
    // scale turns the distance between two standpoints' markers on paper back into the
    // scene's distance between them.
    let bar = &svg_layer(&svg, "scale bar")[0];
    let bar_mm = (bar[1].0 - bar[0].0).hypot(bar[1].1 - bar[0].1);
    assert_near(
        bar_mm,
        plan.bar_metres * plan.px_per_metre * mm_per_px,
        0.002,
    );
    let mm_per_metre = bar_mm / plan.bar_metres;
    assert_near(
        1000.0 / mm_per_metre,
        plan.scale_denominator(),
        0.01 * plan.scale_denominator() / 100.0,
    );

    let markers = svg_layer(&svg, "standpoints");
    let headings = svg_layer(&svg, "headings");
    let seams = svg_layer(&svg, "seams");
    assert_eq!(markers.len(), site.standpoints.len());
    assert_eq!(headings.len(), 3 * site.standpoints.len());
    let centre = |circle: &Vec<(f64, f64)>| {
        let n = (circle.len() - 1) as f64; // the last point closes the circle
        let x = circle[..circle.len() - 1].iter().map(|p| p.0).sum::<f64>() / n;
        let y = circle[..circle.len() - 1].iter().map(|p| p.1).sum::<f64>() / n;
        (x, y)
    };
    for (k, s) in site.standpoints.iter().enumerate() {
        let c = centre(&markers[k]);
        let expected = plan.to_px(s.x, s.y);
        assert_near(c.0, expected.x * mm_per_px, 0.002);
        assert_near(c.1, expected.y * mm_per_px, 0.002);
        // The heading arrow leaves the marker's centre towards the heading's azimuth
        // (paper up is north, right is east, so azimuth = atan2(dx, -dy)).
        let shaft = &headings[3 * k];
        assert_near(shaft[0].0, c.0, 0.002);
        assert_near(shaft[0].1, c.1, 0.002);
        let azimuth = (shaft[1].0 - shaft[0].0).atan2(-(shaft[1].1 - shaft[0].1));
        let difference = (azimuth - s.heading).rem_euclid(std::f64::consts::TAU);
        assert!(
            difference.min(std::f64::consts::TAU - difference) < 1e-3,
            "{}",
            s.name
        );
        // The seam line starts at the marker and points the opposite way.
        let seam = seams
            .iter()
            .find(|d| (d[0].0 - c.0).abs() < 0.002 && (d[0].1 - c.1).abs() < 0.002)
            .unwrap_or_else(|| panic!("no seam from {}", s.name));
        let back = (seam[1].0 - seam[0].0).atan2(-(seam[1].1 - seam[0].1));
        let difference =
            (back - s.heading - std::f64::consts::PI).rem_euclid(std::f64::consts::TAU);
        assert!(difference.min(std::f64::consts::TAU - difference) < 1e-3);
    }
    // Two standpoints' distance apart on paper, read with the scale bar, is the scene's.
    let (a, b) = (&site.standpoints[0], &site.standpoints[3]);
    let (ca, cb) = (centre(&markers[0]), centre(&markers[3]));
    let on_paper = (cb.0 - ca.0).hypot(cb.1 - ca.1) / mm_per_metre;
    assert_near(on_paper, (b.x - a.x).hypot(b.y - a.y), 0.005);
}

#[test]
fn contact_sheet_holds_every_standpoint_in_order() {
    let site = demo();
    let base = site.standpoints[0].clone();
    let standpoints = sweep_headings(&base, 0.0, 345.0, 15.0).unwrap();
    let settings = ContactSettings::default();
    let calls = std::sync::atomic::AtomicUsize::new(0);
    let sheet = contact_sheet(&site, &standpoints, &settings, &|done, total| {
        assert!(done <= total && total == 24);
        calls.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
    })
    .unwrap();
    assert_eq!(calls.into_inner(), 24);
    let frames = &sheet
        .drawing
        .layers
        .iter()
        .find(|l| l.name == "frame")
        .unwrap()
        .lines;
    assert_eq!(frames.len(), 24);
    // Thumbnail 8 (heading 105) holds exactly the wireframe of that standpoint, moved.
    let alone = draw(&site, &standpoints[7], &settings.thumbnail)
        .unwrap()
        .drawing;
    let frame = frames.iter().nth(7).unwrap();
    let (left, top) = (frame[0].x, frame[0].y);
    let on_sheet = &sheet
        .drawing
        .layers
        .iter()
        .find(|l| l.name == "wireframe")
        .unwrap()
        .lines;
    let wireframe = &alone
        .layers
        .iter()
        .find(|l| l.name == "wireframe")
        .unwrap()
        .lines;
    for p in wireframe.points().iter().step_by(13) {
        if p.x > 0.0 && p.x < 480.0 && p.y > 0.0 && p.y < 240.0 {
            let moved = ImagePoint::new(p.x + left, p.y + top);
            assert!(distance_to_set(moved, on_sheet) < 1e-9);
        }
    }
}

/// A fresh folder for one test (the shared harness's), removed when dropped.
fn scratch(name: &str) -> Scratch {
    Scratch::new(&format!("compose-{name}"))
}

/// The stderr lines of a child, read on a thread, waited for with a timeout.
struct Lines(mpsc::Receiver<String>, Vec<String>);

impl Lines {
    /// Waits for a line containing `text`, returning it; panics after `timeout`.
    fn wait_for(&mut self, text: &str, timeout: Duration) -> String {
        let deadline = Instant::now() + timeout;
        loop {
            let left = deadline.saturating_duration_since(Instant::now());
            match self.0.recv_timeout(left) {
                Ok(line) => {
                    self.1.push(line.clone());
                    if line.contains(text) {
                        return line;
                    }
                }
                Err(_) => panic!("no line with \"{text}\"; saw:\n{}", self.1.join("\n")),
            }
        }
    }
}

/// Kills the child when the test ends, however it ends.
struct Child(std::process::Child);

impl Drop for Child {
    fn drop(&mut self) {
        let _ = self.0.kill();
        let _ = self.0.wait();
    }
}

/// `pansite watch` started in `dir` with `args` (at 512x256, looking every 20 ms), and its
/// standard error read line by line; the child is stopped when dropped.
fn watching(dir: &Scratch, args: &[&str]) -> (Child, Lines) {
    let mut child = Child(
        dir.command()
            .args(args)
            .args(["--size", "512x256", "--interval", "20"])
            .stdout(Stdio::null())
            .stderr(Stdio::piped())
            .spawn()
            .unwrap(),
    );
    let stderr = child.0.stderr.take().unwrap();
    let (send, receive) = mpsc::channel();
    std::thread::spawn(move || {
        for line in BufReader::new(stderr).lines().map_while(Result::ok) {
            if send.send(line).is_err() {
                break;
            }
        }
    });
    (child, Lines(receive, Vec::new()))
}

/// Saves as careful editors do (a temporary file renamed over the scene), so the watcher
/// never reads a half-written file.
fn save(path: &Path, text: impl AsRef<[u8]>) {
    let temporary = path.with_extension("saving");
    std::fs::write(&temporary, text).unwrap();
    std::fs::rename(&temporary, path).unwrap();
}

#[test]
fn watch_renders_again_on_save_and_keeps_the_last_good_output() {
    let dir = scratch("watch");
    let scene = dir.0.join("scene.ron");
    let starter = pansite::scene::STARTER_SCENE;
    save(&scene, starter);
    let output = dir.0.join("out.png");
    let (_child, mut lines) = watching(&dir, &["watch", "scene.ron", "-o", "out.png"]);
    let timeout = Duration::from_secs(30);
    let first = lines.wait_for("first render", timeout);
    assert!(first.contains("rendered in"), "{first}");
    let first_png = std::fs::read(&output).unwrap();

    // Changed: another heading, so another picture.
    save(&scene, starter.replace("heading: 30)", "heading: 120)"));
    let changed = lines.wait_for("scene.ron changed", timeout);
    assert!(changed.contains("rendered in"), "{changed}");
    let second_png = std::fs::read(&output).unwrap();
    assert_ne!(first_png, second_png);

    // Broken: the error is shown (with its line) and the output is left alone.
    save(&scene, starter.replace("width: 8,", "width: eight,"));
    let error = lines.wait_for("error", timeout);
    assert!(error.contains("scene.ron"), "{error}");
    lines.wait_for("the last good output is kept", timeout);
    assert_eq!(std::fs::read(&output).unwrap(), second_png);
    let leftovers: Vec<_> = std::fs::read_dir(&dir.0)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n != "scene.ron" && n != "out.png")
        .collect();
    assert!(leftovers.is_empty(), "{leftovers:?}");

    // Mended, with one more item: rendered again, and the message says what changed.
    let mended = starter.replace(
        "        Point(label: \"lamp\", at: (0, -3, 0)),",
        "        Point(label: \"lamp\", at: (0, -3, 0)),\n        Line(label: \"fence\", from: (-20, 6, 0), to: (20, 6, 0)),",
    );
    assert_ne!(mended, starter);
    save(&scene, mended);
    let again = lines.wait_for("rendered in", timeout);
    assert!(again.contains("items") && again.contains("->"), "{again}");
    assert_ne!(std::fs::read(&output).unwrap(), second_png);
}

/// `watch` with a model: a scene that names one renders again when the model is saved
/// (the scene itself untouched), keeps its output while the model is broken; and a model
/// given directly is watched the same way.
#[test]
fn watch_renders_again_when_a_model_changes() {
    let dir = scratch("watch-model");
    let cube = |x: f64| {
        let mut text = String::new();
        for (a, b, c) in [(0, 0, 0), (2, 0, 0), (2, 2, 0), (0, 2, 0)]
            .into_iter()
            .chain([(0, 0, 2), (2, 0, 2), (2, 2, 2), (0, 2, 2)])
        {
            text.push_str(&format!("v {} {b} {c}\n", a as f64 + x));
        }
        text + "f -8 -5 -6 -7\nf -4 -3 -2 -1\nf -8 -7 -3 -4\nf -7 -6 -2 -3\nf -6 -5 -1 -2\nf -5 -8 -4 -1\n"
    };
    let model = dir.0.join("shed.obj");
    save(&model, cube(0.0));
    save(
        &dir.0.join("yard.ron"),
        "Scene(standpoints: [(name: \"gate\", x: 1, y: -8)], items: [\n\
         Model(file: \"shed.obj\", at: (0, 0, 0), up: Z)])",
    );
    let timeout = Duration::from_secs(30);
    let output = dir.0.join("out.png");
    {
        let (_child, mut lines) = watching(&dir, &["watch", "yard.ron", "-o", "out.png"]);
        let first = lines.wait_for("first render", timeout);
        assert!(first.contains("12 edges"), "{first}");
        let first_png = std::fs::read(&output).unwrap();
        // A second box in the model: the scene is not touched, yet it renders again.
        save(&model, cube(0.0) + &cube(5.0));
        let changed = lines.wait_for("shed.obj changed", timeout);
        assert!(changed.contains("edges 12 -> 24"), "{changed}");
        let second_png = std::fs::read(&output).unwrap();
        assert_ne!(first_png, second_png);
        // A broken model: the error names the model's line, the output stays.
        save(&model, cube(0.0) + "f 1 2 99\n");
        let error = lines.wait_for("error", timeout);
        assert!(
            error.contains("shed.obj") && error.contains(":15"),
            "{error}"
        );
        lines.wait_for("the last good output is kept", timeout);
        assert_eq!(std::fs::read(&output).unwrap(), second_png);
    }
    // The model given directly.
    save(&model, cube(0.0));
    let (_child, mut lines) = watching(
        &dir,
        &[
            "watch",
            "shed.obj",
            "--up",
            "z",
            "--at",
            "1,-8",
            "-o",
            "direct.png",
        ],
    );
    let first = lines.wait_for("first render", timeout);
    assert!(first.contains("12 edges"), "{first}");
    save(&model, cube(0.0) + &cube(5.0));
    let changed = lines.wait_for("shed.obj changed", timeout);
    assert!(changed.contains("edges 12 -> 24"), "{changed}");
}

#[test]
fn sheet_command_is_quiet_when_piped() {
    let dir = scratch("sheet");
    let scene = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron");
    let run = |quiet: bool| {
        let mut command = dir.command();
        command
            .args([
                "sheet",
                scene.to_str().unwrap(),
                "--headings",
                "0:90:45",
                "--thumb",
                "240x120",
            ])
            .args(["-o", "sheet.svg"])
            .current_dir(&dir.0);
        if quiet {
            command.arg("--quiet");
        }
        command.output().unwrap()
    };
    let loud = run(false);
    assert!(loud.status.success());
    let text = String::from_utf8_lossy(&loud.stderr);
    // No progress bar on a pipe: one summary line, no carriage returns.
    assert!(
        !text.contains('\r') && text.contains("3 standpoints"),
        "{text}"
    );
    let quiet = run(true);
    assert!(quiet.status.success() && quiet.stderr.is_empty());
    let svg = std::fs::read_to_string(dir.0.join("sheet.svg")).unwrap();
    assert_eq!(svg_layer(&svg, "frame").len(), 3);
}

#[test]
fn plan_preview_and_sheet_write_every_format() {
    let dir = scratch("formats");
    let scene = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron");
    let scene = scene.to_str().unwrap();
    for (args, file) in [
        (&["plan", scene, "--size", "400x300"][..], "plan.pdf"),
        (
            &[
                "plan",
                scene,
                "--beside",
                "-s",
                "loggia",
                "--panorama-size",
                "512x256",
            ],
            "beside.svg",
        ),
        (
            &[
                "preview", scene, "-s", "loggia", "--fov", "60", "--size", "320x200",
            ],
            "preview.png",
        ),
        (
            &[
                "sheet",
                scene,
                "--grid",
                "-5,-5:5,5:2x2",
                "--thumb",
                "160x80",
            ],
            "grid.pdf",
        ),
        (
            &[
                "sheet",
                scene,
                "--path",
                "0,-10:10,-10:10,0",
                "--count",
                "3",
                "--thumb",
                "160x80",
            ],
            "path.png",
        ),
    ] {
        let out = dir
            .command()
            .args(args)
            .args(["-o", file, "-q"])
            .output()
            .unwrap();
        assert!(
            out.status.success(),
            "{args:?}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        let bytes = std::fs::read(dir.0.join(file)).unwrap();
        let magic: &[u8] = match file.rsplit('.').next() {
            Some("pdf") => b"%PDF",
            Some("svg") => b"<?xml",
            _ => b"\x89PNG",
        };
        assert!(bytes.starts_with(magic), "{file}");
    }
    // A plan on A4 (landscape): the page is the paper, and its scale bar still reads true.
    let out = dir
        .command()
        .args(["plan", scene, "--page", "a4", "-o", "a4.svg"])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let svg = std::fs::read_to_string(dir.0.join("a4.svg")).unwrap();
    let document = roxmltree::Document::parse(&svg).unwrap();
    let root = document.root_element();
    assert_eq!(root.attribute("width"), Some("297mm"));
    assert_eq!(root.attribute("height"), Some("210mm"));
    // The plan fills the room above the title block (sized with the widest scale line)
    // and is centred in it.
    let a4 = pansite::page::Paper::parse("a4").unwrap().landscape();
    let planned =
        pansite::page::plan_title_lines(&demo(), &demo().standpoints, 1e7, 150.0, (2026, 1, 1));
    let (room_w, room_h) = pansite::page::TitledPaper::new(a4, 10.0, None)
        .unwrap()
        .room_above_title(&planned, None)
        .unwrap();
    let settings = PlanSettings::for_room(room_w, room_h, 150.0);
    let plan = plan_map(&demo(), &demo().standpoints, &settings).unwrap();
    let plan_w_mm = settings.width as f64 * 25.4 / 150.0;
    let left = pansite::page::centred(10.0, room_w, plan_w_mm);
    let bar = &svg_layer(&svg, "scale bar")[0];
    assert_near(bar[0].0, left + 0.04 * plan_w_mm, 0.002);
    assert_near(
        bar[1].0 - bar[0].0,
        plan.bar_metres * plan.px_per_metre * 25.4 / 150.0,
        0.002,
    );

    // A field of view a flat picture cannot hold is refused as bad input.
    let out = dir
        .command()
        .args(["preview", scene, "--fov", "180", "-o", "bad.png"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(!dir.0.join("bad.png").exists());
}

#[test]
fn preview_hides_what_the_panorama_hides() {
    // With hidden parts left out of both, a point of an edge is drawn in the preview
    // exactly when it is drawn in the panorama (the same stretches, found on the sphere),
    // except within a pixel of a change.
    let site = demo();
    let standpoint = Standpoint::from_degrees("s", 5.0, 9.4, 2.05, 170.0, 0.0, 0.0);
    let settings = PreviewSettings {
        hidden: Some(HiddenEdges::Off),
        ..PreviewSettings::default()
    };
    let camera = Pinhole::new(&standpoint, &settings).unwrap();
    let picture = preview(&site, &standpoint, &settings).unwrap();
    let in_picture = &picture
        .layers
        .iter()
        .find(|l| l.name == "wireframe")
        .unwrap()
        .lines;
    let render = RenderSettings {
        width: 4096,
        height: 2048,
        overlays: false,
        hidden: Some(HiddenEdges::Off),
        ..RenderSettings::default()
    };
    let panorama = draw(&site, &standpoint, &render).unwrap().drawing;
    let mut in_panorama = pansite::plane::PolylineSet::new();
    for layer in panorama
        .layers
        .iter()
        .filter(|l| l.name.starts_with("wireframe"))
    {
        in_panorama.append(&mut layer.lines.clone());
    }
    let map = Equirect::from_size_px(4096.0, 2048.0);
    let view = ViewFrame::new(&standpoint);
    let (mut agree, mut total, mut hidden_seen) = (0, 0, 0);
    for edge in &site.edges {
        let SiteCurve::Segment { start, end } = edge.curve else {
            continue;
        };
        // Edges a few pixels long (window reveals seen from afar) are all near other lines.
        match (camera.project(&start), camera.project(&end)) {
            (Some(a), Some(b)) if (b.x - a.x).hypot(b.y - a.y) > 20.0 => {}
            _ => continue,
        }
        let drawn = |s: f64| {
            let p = start + (end - start) * s;
            let q = camera.project(&p)?;
            if !(q.x > 2.0 && q.x < 1278.0 && q.y > 2.0 && q.y < 798.0) {
                return None;
            }
            let (azimuth, elevation) = azimuth_elevation(&view.to_view(&p));
            let at = map.to_image(azimuth, elevation);
            if at.y < 20.0 || at.y > 2028.0 || at.x < 2.0 || at.x > 4094.0 {
                return None;
            }
            Some((
                distance_to_set(q, in_picture) < 0.01,
                distance_to_set(at, &in_panorama) < 0.15,
            ))
        };
        for k in 1..40 {
            let s = k as f64 / 40.0;
            let (Some(here), Some(before), Some(after)) =
                (drawn(s), drawn(s - 0.0125), drawn(s + 0.0125))
            else {
                continue;
            };
            // Skip points near a change of visibility in either drawing.
            if before != here || after != here {
                continue;
            }
            total += 1;
            if here.0 == here.1 {
                agree += 1;
            }
            if !here.0 {
                hidden_seen += 1;
            }
        }
    }
    assert!(
        hidden_seen > 50,
        "only {hidden_seen} hidden points: the view hides too little"
    );
    assert!(
        agree as f64 >= 0.995 * total as f64,
        "{agree} of {total} agree"
    );
}

/// The plan's north key read back from its SVG: the bearings on paper (clockwise from up,
/// as a plan with its y axis up the page is read: common practice) of the strokes leaving
/// the ring's centre, and the words of the key.
fn north_key_bearings(north: f64) -> (Vec<f64>, f64, Vec<String>) {
    let text = format!(
        r#"Scene(
            location: (latitude: 47.3, longitude: 8.1, north: {north}),
            standpoints: [(name: "corner", x: -9, y: -14, heading: 30)],
            items: [Block(label: "shed", at: Centre(0, 0), width: 6, depth: 4, height: 3)],
        )"#
    );
    let site = pansite::scene::parse_scene(text.as_bytes(), Path::new("key.ron"), "key").unwrap();
    let plan = plan_map(&site, &site.standpoints, &PlanSettings::default()).unwrap();
    let mut bytes = Vec::new();
    write_svg(&plan.sheet(), &mut bytes).unwrap();
    let key = svg_layer(&String::from_utf8(bytes).unwrap(), "north arrow");
    // The ring: the stroke of many points, closed; its centre the mean of its points.
    let ring = key.iter().max_by_key(|p| p.len()).unwrap();
    let n = (ring.len() - 1) as f64;
    let cx = ring[..ring.len() - 1].iter().map(|p| p.0).sum::<f64>() / n;
    let cy = ring[..ring.len() - 1].iter().map(|p| p.1).sum::<f64>() / n;
    let bearing = |from: (f64, f64), to: (f64, f64)| {
        (to.0 - from.0)
            .atan2(-(to.1 - from.1))
            .to_degrees()
            .rem_euclid(360.0)
    };
    let from_centre: Vec<f64> = key
        .iter()
        .filter(|p| p.len() == 2 && (p[0].0 - cx).hypot(p[0].1 - cy) < 1e-3)
        .map(|p| bearing(p[0], p[1]))
        .collect();
    // Plan north: the longest straight stroke, across the ring and beyond it.
    let plan_shaft = key
        .iter()
        .filter(|p| p.len() == 2)
        .max_by(|a, b| {
            let length = |p: &Vec<(f64, f64)>| (p[1].0 - p[0].0).hypot(p[1].1 - p[0].1);
            length(a).total_cmp(&length(b))
        })
        .unwrap();
    let words = plan
        .drawing
        .layers
        .iter()
        .filter_map(|l| l.text.as_ref().map(|t| t.words.clone()))
        .filter(|w| w.contains('N') && w.len() <= 6)
        .collect();
    (from_centre, bearing(plan_shaft[0], plan_shaft[1]), words)
}

#[test]
fn the_plans_north_key_turns_true_north_by_the_locations_bearing() {
    // The scene's `north` is the bearing of true north clockwise from the plan's y axis
    // (docs/scene-format.md): on a plan with y up the page, plan north points straight up
    // and true north that many degrees clockwise of it.
    for north in [25.0, -60.0, 135.0] {
        let (from_centre, plan_north, words) = north_key_bearings(north);
        assert!(plan_north.min(360.0 - plan_north) < 1e-6, "{plan_north}");
        assert_eq!(from_centre.len(), 1, "{north}: {from_centre:?}");
        let expected = f64::rem_euclid(north, 360.0);
        let off = (from_centre[0] - expected).rem_euclid(360.0);
        assert!(off.min(360.0 - off) < 0.01, "{north}: {from_centre:?}");
        assert!(words.iter().any(|w| w == "TRUE N"), "{words:?}");
    }
    // Where the plan's y axis is true north, one arrow and one "N".
    let (from_centre, plan_north, words) = north_key_bearings(0.0);
    assert!(from_centre.is_empty() && plan_north.min(360.0 - plan_north) < 1e-6);
    assert!(!words.iter().any(|w| w == "TRUE N"), "{words:?}");
}
