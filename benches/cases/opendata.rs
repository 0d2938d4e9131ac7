//! Open data at scale: 50,000 generated GeoJSON footprints loaded, expanded and drawn at
//! 8192x4096 with hidden lines (target 3 s, 1 GB), and a generated 100 MB CityJSON model
//! read, transformed, its edges and faces built (target 2 s, 1 GB). Both files are made
//! here, in the temporary folder, and removed afterwards.

use pansite::render::{render_png_to, RenderSettings};
use pansite::scene::{load_open_data, HiddenEdges};
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

/// The block's origin: an invented spot in the open Atlantic, in UTM zone 26N.
const ORIGIN: (f64, f64) = (45.0, -30.0);

fn folder() -> PathBuf {
    let dir = std::env::temp_dir().join(format!("pansite-bench-opendata-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

/// 50,000 footprints, 250 by 200 on a 20 m grid around the origin, of mixed heights and
/// roofs, as GeoJSON (degrees from the local radii of curvature).
fn footprints() -> PathBuf {
    let (m, n) = (6_367_000.0f64, 6_388_000.0f64);
    let lat0 = ORIGIN.0.to_radians();
    let to = |x: f64, y: f64| {
        (
            ORIGIN.1 + (x / (n * lat0.cos())).to_degrees(),
            ORIGIN.0 + (y / m).to_degrees(),
        )
    };
    let mut text = String::from("{\"type\": \"FeatureCollection\", \"features\": [\n");
    for i in 0..250 {
        for j in 0..200 {
            let (x, y) = (-2500.0 + 20.0 * i as f64, -2000.0 + 20.0 * j as f64);
            let corners = [
                (x, y),
                (x + 12.0, y),
                (x + 12.0, y + 9.0),
                (x, y + 9.0),
                (x, y),
            ];
            let ring: Vec<String> = corners
                .iter()
                .map(|&(x, y)| {
                    let (lon, lat) = to(x, y);
                    format!("[{lon:.9}, {lat:.9}]")
                })
                .collect();
            let roof = if (i + j) % 3 == 0 {
                ", \"roof:shape\": \"gabled\""
            } else {
                ""
            };
            if i + j > 0 {
                text.push_str(",\n");
            }
            let _ = write!(
                text,
                "{{\"type\": \"Feature\", \"id\": \"b{i}-{j}\", \"properties\": {{\"building\": \"yes\", \"height\": \"{}\"{roof}}}, \"geometry\": {{\"type\": \"Polygon\", \"coordinates\": [[{}]]}}}}",
                6 + (i * 7 + j * 3) % 15,
                ring.join(", ")
            );
        }
    }
    text.push_str("\n]}\n");
    let path = folder().join("footprints.geojson");
    std::fs::write(&path, text).unwrap();
    path
}

/// A CityJSON model of `target_bytes` or more: boxes as LoD2 solids with semantic surfaces,
/// on a grid in UTM zone 26N around the origin.
fn city_model(target_bytes: usize) -> PathBuf {
    let (e0, n0) = (263_554.0, 4_987_330.0);
    let mut objects = String::new();
    let mut vertices = String::new();
    let mut count = 0usize;
    let mut k = 0usize;
    while objects.len() + vertices.len() < target_bytes {
        let (i, j) = (k % 400, k / 400);
        let (x, y) = ((i as i64) * 15_000, (j as i64) * 15_000);
        let h = 6_000 + ((i * 7 + j * 3) % 15) as i64 * 1000;
        for (dx, dy, z) in [
            (0, 0, 0),
            (10_000, 0, 0),
            (10_000, 8_000, 0),
            (0, 8_000, 0),
            (0, 0, h),
            (10_000, 0, h),
            (10_000, 8_000, h),
            (0, 8_000, h),
        ] {
            if count > 0 {
                vertices.push(',');
            }
            let _ = write!(vertices, "[{},{},{}]", x + dx, y + dy, z);
            count += 1;
        }
        let v = |n: usize| 8 * k + n;
        if k > 0 {
            objects.push(',');
        }
        let _ = write!(
            objects,
            "\"b{k}\":{{\"type\":\"Building\",\"geometry\":[{{\"type\":\"Solid\",\"lod\":\"2.2\",\"boundaries\":[[[[{},{},{},{}]],[[{},{},{},{}]],[[{},{},{},{}]],[[{},{},{},{}]],[[{},{},{},{}]],[[{},{},{},{}]]]],\"semantics\":{{\"surfaces\":[{{\"type\":\"GroundSurface\"}},{{\"type\":\"RoofSurface\"}},{{\"type\":\"WallSurface\"}}],\"values\":[[0,1,2,2,2,2]]}}}}]}}",
            v(3), v(2), v(1), v(0), v(4), v(5), v(6), v(7), v(0), v(1), v(5), v(4),
            v(1), v(2), v(6), v(5), v(2), v(3), v(7), v(6), v(3), v(0), v(4), v(7)
        );
        k += 1;
    }
    let text = format!(
        "{{\"type\":\"CityJSON\",\"version\":\"2.0\",\"transform\":{{\"scale\":[0.001,0.001,0.001],\"translate\":[{},{},0]}},\"metadata\":{{\"referenceSystem\":\"https://www.opengis.net/def/crs/EPSG/0/32626\"}},\"CityObjects\":{{{objects}}},\"vertices\":[{vertices}]}}\n",
        e0 - 3000.0,
        n0 - 3000.0
    );
    let path = folder().join("model.city.json");
    std::fs::write(&path, text).unwrap();
    path
}

fn footprints_case(path: &Path) -> (Duration, Duration, usize) {
    let started = Instant::now();
    let site = load_open_data(path, Some(ORIGIN), None).unwrap();
    let load = started.elapsed();
    let settings = RenderSettings {
        width: 8192,
        height: 4096,
        hidden: Some(HiddenEdges::Faint),
        ..RenderSettings::default()
    };
    let mut png = Vec::with_capacity(8 << 20);
    render_png_to(&site, &site.standpoints[0], &settings, &mut png).unwrap();
    (load, started.elapsed(), site.edges.len())
}

fn city_case(path: &Path) -> (Duration, usize, usize) {
    let started = Instant::now();
    let site = load_open_data(path, Some(ORIGIN), None).unwrap();
    (started.elapsed(), site.edges.len(), site.faces.len())
}

/// The child-process cases (peak memory), by name; false for a name not ours.
pub fn child(case: &str) -> bool {
    match case {
        "opendata_footprints" => {
            let path = footprints();
            footprints_case(&path);
            let _ = std::fs::remove_file(path);
        }
        "opendata_city" => {
            let path = city_model(100 << 20);
            // The generation's own text is freed before the reading starts; its file stays.
            city_case(&path);
            let _ = std::fs::remove_file(path);
        }
        _ => return false,
    }
    true
}

/// Prints the two cases against the floor F.
pub fn run(floor_time: Duration, child_peak: impl Fn(&str) -> Option<u64>) {
    let f = floor_time.as_secs_f64();
    let mb = |p: Option<u64>| {
        p.map_or("n/a".to_owned(), |p| {
            format!("{:.0} MB", p as f64 / 1048576.0)
        })
    };
    let path = footprints();
    let runs: Vec<_> = (0..3).map(|_| footprints_case(&path)).collect();
    let best = runs.iter().min_by_key(|r| r.1).unwrap();
    let _ = std::fs::remove_file(&path);
    println!();
    println!(
        "open data, 50,000 GeoJSON footprints ({} edges): load and expand {:.0} ms, with render at 8192x4096 with hidden lines {:.0} ms = {:.1} F (target 3 s); peak memory {} (target 1 GB)",
        best.2,
        best.0.as_secs_f64() * 1e3,
        best.1.as_secs_f64() * 1e3,
        best.1.as_secs_f64() / f,
        mb(child_peak("opendata_footprints"))
    );
    let path = city_model(100 << 20);
    let size = std::fs::metadata(&path).map_or(0, |m| m.len());
    let runs: Vec<_> = (0..3).map(|_| city_case(&path)).collect();
    let best = runs.iter().min_by_key(|r| r.0).unwrap();
    let _ = std::fs::remove_file(&path);
    println!(
        "open data, CityJSON of {:.0} MB: read, transformed, {} edges and {} face triangles built in {:.0} ms = {:.1} F (target 2 s); peak memory {} (target 1 GB)",
        size as f64 / 1048576.0,
        best.1,
        best.2,
        best.0.as_secs_f64() * 1e3,
        best.0.as_secs_f64() / f,
        mb(child_peak("opendata_city"))
    );
}
