//! Helpers shared by the integration tests.
#![allow(dead_code)]

use nalgebra::{Point3, Vector3};
use pansite::plane::{ImagePoint, PolylineSet};
use pansite::scene::Face;
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

/// A yard of our own with a place and a sun whose `sun` block asks for no tone: what the
/// explorer's shade switch is tried on.
pub const TONE_YARD: &str = "Scene(
    name: \"Tone yard\",
    location: (latitude: 51.2, longitude: -2.1, height: 80, north: 4, time_zone: \"Europe/London\"),
    sun: (date: \"2026-06-21\", time: \"16:00\", path: false, shadows: false),
    standpoints: [(name: \"gate\", x: 0, y: -12)],
    items: [
        Block(label: \"store\", at: Centre(0, 0), width: 8, depth: 5, height: 6),
        Block(label: \"shed\", at: Centre(7, 4), width: 3, depth: 3, height: 3),
    ],
)
";

/// Asserts `|a - b| <= eps`, printing both values and the difference.
#[track_caller]
pub fn assert_near(a: f64, b: f64, eps: f64) {
    assert!(
        (a - b).abs() <= eps,
        "{a:.17e} vs {b:.17e}: differ by {:.3e} > {eps:.3e}",
        (a - b).abs()
    );
}

/// The distance along the unit direction `d` from `origin` at which the ray crosses the face,
/// by Moeller and Trumbore's test ("Fast, minimum storage ray-triangle intersection", Journal
/// of Graphics Tools 2(1), 1997), written here apart from the library's own: the tests' ray
/// caster for hidden lines and for shadows.
pub fn crossing(origin: &Point3<f64>, d: &Vector3<f64>, f: &Face) -> Option<f64> {
    let [a, b, c] = f.corners;
    let (e1, e2) = (b - a, c - a);
    let h = d.cross(&e2);
    let det = e1.dot(&h);
    if det.abs() < 1e-14 * e1.norm() * e2.norm() {
        return None;
    }
    let s = origin - a;
    let u = s.dot(&h) / det;
    let q = s.cross(&e1);
    let v = d.dot(&q) / det;
    if u < 0.0 || v < 0.0 || u + v > 1.0 || u > 1.0 {
        return None;
    }
    let t = e2.dot(&q) / det;
    (t > 0.0).then_some(t)
}

/// Distance (pixels) from `p` to the segment from `a` to `b`.
pub fn distance_to_segment(p: ImagePoint, a: ImagePoint, b: ImagePoint) -> f64 {
    let (dx, dy) = (b.x - a.x, b.y - a.y);
    let length2 = dx * dx + dy * dy;
    let s = if length2 > 0.0 {
        (((p.x - a.x) * dx + (p.y - a.y) * dy) / length2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    (p.x - a.x - s * dx).hypot(p.y - a.y - s * dy)
}

/// Distance (pixels) from `p` to the nearest segment (or lone point) of any polyline.
pub fn distance_to_polylines<'a>(
    p: ImagePoint,
    lines: impl IntoIterator<Item = &'a [ImagePoint]>,
) -> f64 {
    let mut best = f64::INFINITY;
    for line in lines {
        if line.len() == 1 {
            best = best.min((p.x - line[0].x).hypot(p.y - line[0].y));
        }
        for w in line.windows(2) {
            best = best.min(distance_to_segment(p, w[0], w[1]));
        }
    }
    best
}

/// The same for a [`PolylineSet`].
pub fn distance_to_set(p: ImagePoint, set: &PolylineSet) -> f64 {
    distance_to_polylines(p, set.iter())
}

/// A fresh folder under the system's temporary folder for one test, removed when dropped.
/// The folder's name carries the test's name and the process id, so parallel tests and
/// parallel test binaries never share one.
pub struct Scratch(pub PathBuf);

impl Scratch {
    /// An empty folder `pansite-NAME-PID`, emptied first if a killed run left it behind.
    pub fn new(name: &str) -> Scratch {
        let dir = std::env::temp_dir().join(format!("pansite-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        Scratch(dir)
    }

    /// A path inside the folder.
    pub fn path(&self, name: &str) -> PathBuf {
        self.0.join(name)
    }

    /// Writes `text` to `name` inside the folder and returns its path.
    pub fn write(&self, name: &str, text: impl AsRef<[u8]>) -> PathBuf {
        let path = self.path(name);
        std::fs::write(&path, text).unwrap();
        path
    }

    /// Every file below the folder, relative to it, sorted.
    pub fn files(&self) -> Vec<String> {
        let mut names: Vec<String> = walk(&self.0)
            .iter()
            .map(|p| p.strip_prefix(&self.0).unwrap().display().to_string())
            .collect();
        names.sort();
        names
    }

    /// The real `pansite` binary, to be run in this folder (the shared CLI harness: every
    /// CLI test starts the binary this way, so its working folder is always fresh).
    pub fn command(&self) -> Command {
        let mut command = Command::new(env!("CARGO_BIN_EXE_pansite"));
        command.current_dir(&self.0);
        command
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

fn walk(dir: &Path) -> Vec<PathBuf> {
    let mut out = Vec::new();
    for entry in std::fs::read_dir(dir).unwrap() {
        let path = entry.unwrap().path();
        if path.is_dir() {
            out.extend(walk(&path));
        } else {
            out.push(path);
        }
    }
    out
}

/// Runs the binary in `dir` with `args`, standard input closed.
pub fn pansite(dir: &Scratch, args: &[&str]) -> Output {
    dir.command()
        .args(args)
        .stdin(Stdio::null())
        .output()
        .unwrap()
}

/// Runs the binary, which must succeed (exit 0, or its standard error is shown).
#[track_caller]
pub fn succeeds(dir: &Scratch, args: &[&str]) -> Output {
    let out = pansite(dir, args);
    assert_eq!(out.status.code(), Some(0), "{args:?}: {}", stderr(&out));
    out
}

/// Runs the binary, which must exit with `code`; returns its output.
#[track_caller]
pub fn exits_with(dir: &Scratch, code: i32, args: &[&str]) -> Output {
    let out = pansite(dir, args);
    assert_eq!(out.status.code(), Some(code), "{args:?}: {}", stderr(&out));
    out
}

/// A child's standard error as text.
pub fn stderr(output: &Output) -> String {
    String::from_utf8_lossy(&output.stderr).into_owned()
}

/// A child's standard output as text.
pub fn stdout(output: &Output) -> String {
    String::from_utf8_lossy(&output.stdout).into_owned()
}

/// A grey or RGB(A) PNG decoded to one grey level per pixel (the darkest channel), with its
/// width and height.
pub fn read_png_grey(bytes: &[u8]) -> (u32, u32, Vec<u8>) {
    let mut decoder = png::Decoder::new(std::io::Cursor::new(bytes));
    decoder.set_transformations(png::Transformations::EXPAND);
    let mut reader = decoder.read_info().unwrap();
    let mut buffer = vec![0; reader.output_buffer_size().unwrap()];
    let info = reader.next_frame(&mut buffer).unwrap();
    let channels = info.color_type.samples();
    let bytes_per_sample = if info.bit_depth == png::BitDepth::Sixteen {
        2
    } else {
        1
    };
    let stride = channels * bytes_per_sample;
    let grey = buffer[..info.buffer_size()]
        .chunks(stride)
        .map(|px| {
            let colour = if channels >= 3 { 3 } else { 1 };
            (0..colour).map(|c| px[c * bytes_per_sample]).min().unwrap()
        })
        .collect();
    (info.width, info.height, grey)
}

/// The pose angles (heading, pitch, roll in degrees) a PNG's XMP packet gives a panorama
/// viewer, read with a general XML parser: the GPano fields PoseHeadingDegrees,
/// PosePitchDegrees and PoseRollDegrees (Google, "Photo Sphere XMP Metadata").
pub fn gpano_pose(png_bytes: &[u8]) -> (f64, f64, f64) {
    let reader = png::Decoder::new(std::io::Cursor::new(png_bytes))
        .read_info()
        .expect("a PNG");
    let xmp = reader
        .info()
        .utf8_text
        .iter()
        .find(|t| t.keyword == "XML:com.adobe.xmp")
        .expect("an XMP packet")
        .get_text()
        .expect("XMP text");
    let document = roxmltree::Document::parse(&xmp).expect("well-formed XMP");
    let gpano = "http://ns.google.com/photos/1.0/panorama/";
    let degrees = |name: &str| -> f64 {
        document
            .descendants()
            .find(|n| n.tag_name().namespace() == Some(gpano) && n.tag_name().name() == name)
            .and_then(|n| n.text())
            .unwrap_or_else(|| panic!("no GPano:{name}"))
            .parse()
            .unwrap_or_else(|_| panic!("GPano:{name} is not a number"))
    };
    (
        degrees("PoseHeadingDegrees"),
        degrees("PosePitchDegrees"),
        degrees("PoseRollDegrees"),
    )
}

/// The viewer's right, forward and up directions in the site frame (x east, y north, z up)
/// for a heading, pitch and roll in degrees, worked out here without the crate's view frame.
///
/// The convention is the one the GPano pose angles use (Google, "Photo Sphere XMP Metadata",
/// PoseHeadingDegrees / PosePitchDegrees / PoseRollDegrees and its section on Euler angles:
/// heading is the compass bearing of the image centre, pitch the angle of the centre above the
/// horizon, roll with the horizon turning counter-clockwise in the image as it grows), which
/// is the aircraft's yaw, pitch and roll applied in that order (common practice in aviation:
/// positive roll lowers the right wing, so the viewer's up turns towards their right).
/// Forward is the unit vector at bearing `heading` raised by `pitch`; right and up start
/// level-right and square-up to it, and the roll turns up towards right by `roll`.
pub fn camera_axes(heading_deg: f64, pitch_deg: f64, roll_deg: f64) -> [[f64; 3]; 3] {
    let (sh, ch) = heading_deg.to_radians().sin_cos();
    let (sp, cp) = pitch_deg.to_radians().sin_cos();
    let (sr, cr) = roll_deg.to_radians().sin_cos();
    let forward = [sh * cp, ch * cp, sp];
    let level_right = [ch, -sh, 0.0];
    let square_up = [-sh * sp, -ch * sp, cp];
    let right: [f64; 3] = std::array::from_fn(|i| cr * level_right[i] - sr * square_up[i]);
    let up: [f64; 3] = std::array::from_fn(|i| cr * square_up[i] + sr * level_right[i]);
    [right, forward, up]
}

/// Where a site point lands on an equirectangular image `width` x `height` pixels (pixel
/// edges from the top left) for an eye at `eye` and the given pose in degrees: the view's
/// azimuth is `atan2(right, forward)`, its elevation `atan2(up, level)`, and the centre of
/// the image is straight ahead (x = W/2 + W azimuth / 360, y = H/2 - H elevation / 180).
pub fn predicted_pixel(
    eye: [f64; 3],
    pose_deg: (f64, f64, f64),
    point: [f64; 3],
    width: f64,
    height: f64,
) -> (f64, f64) {
    let [right, forward, up] = camera_axes(pose_deg.0, pose_deg.1, pose_deg.2);
    let d = [point[0] - eye[0], point[1] - eye[1], point[2] - eye[2]];
    let dot = |a: [f64; 3]| a[0] * d[0] + a[1] * d[1] + a[2] * d[2];
    let (x, y, z) = (dot(right), dot(forward), dot(up));
    let azimuth = x.atan2(y).to_degrees();
    let elevation = z.atan2(x.hypot(y)).to_degrees();
    (
        width / 2.0 + width * azimuth / 360.0,
        height / 2.0 - height * elevation / 180.0,
    )
}

/// Where a site point lands in a pinhole picture `width` x `height` pixels with focal length
/// `focal_px`, for the same pose (None behind the eye): u = W/2 + f right/forward,
/// v = H/2 - f up/forward.
pub fn predicted_pinhole(
    eye: [f64; 3],
    pose_deg: (f64, f64, f64),
    point: [f64; 3],
    (width, height, focal_px): (f64, f64, f64),
) -> Option<(f64, f64)> {
    let [right, forward, up] = camera_axes(pose_deg.0, pose_deg.1, pose_deg.2);
    let d = [point[0] - eye[0], point[1] - eye[1], point[2] - eye[2]];
    let dot = |a: [f64; 3]| a[0] * d[0] + a[1] * d[1] + a[2] * d[2];
    let ahead = dot(forward);
    (ahead > 1e-6).then(|| {
        (
            width / 2.0 + focal_px * dot(right) / ahead,
            height / 2.0 - focal_px * dot(up) / ahead,
        )
    })
}

/// The paths of the SVG layer `name` (its group's `data-layer`) as lists of points, in the
/// SVG's units; empty when there is no such layer. roxmltree reads the document.
#[allow(dead_code)]
pub fn svg_layer_paths(svg: &str, name: &str) -> Vec<Vec<(f64, f64)>> {
    let doc = roxmltree::Document::parse(svg).unwrap();
    let Some(group) = doc
        .descendants()
        .find(|n| n.has_tag_name("g") && n.attribute("data-layer") == Some(name))
    else {
        return Vec::new();
    };
    group
        .children()
        .filter(|n| n.has_tag_name("path"))
        .map(|path| {
            let numbers: Vec<f64> = path
                .attribute("d")
                .unwrap()
                .split_whitespace()
                .filter_map(|t| t.trim_start_matches(['M', 'L']).parse().ok())
                .collect();
            numbers.chunks_exact(2).map(|c| (c[0], c[1])).collect()
        })
        .collect()
}
