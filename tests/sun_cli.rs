//! The sun on the command line: `pansite daylight`, `render --date --time`, `angles` with
//! shadows, refused clock times, run for real.

mod common;
use common::{pansite, Scratch};
use std::path::PathBuf;

const SCENE: &str = r#"Scene(
    name: "Saltmarsh Yard",
    location: (latitude: 50.9, longitude: -1.4, north: 8, time_zone: "Europe/London"),
    standpoints: [(name: "gate", x: -6, y: -14, heading: 20)],
    items: [
        Block(label: "store", at: Centre(0, 0), width: 8, depth: 5, height: 6),
        Block(label: "shed", at: Centre(7, 4), width: 3, depth: 3, height: 3),
    ],
)"#;

/// The yard in a fresh folder (removed when the folder is dropped).
fn scene(name: &str) -> (Scratch, PathBuf) {
    let dir = Scratch::new(&format!("sun-{name}"));
    let path = dir.write("yard.ron", SCENE);
    (dir, path)
}

#[test]
fn daylight_lists_events_walls_and_the_cautions() {
    let (dir, path) = scene("daylight");
    let p = path.to_str().unwrap();
    let out = pansite(
        &dir,
        &[
            "daylight",
            p,
            "--date",
            "2026-06-21",
            "--item",
            "store",
            "--format",
            "csv",
        ],
    );
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("Never look at the sun"), "{text}");
    assert!(
        text.contains(",sunrise,") && text.contains(",sunset,") && text.contains("wall in sun")
    );
    // As JSON, read back with serde_json: the cautions travel with the numbers.
    let out = pansite(
        &dir,
        &["daylight", p, "--date", "2026-06-21", "--format", "json"],
    );
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).expect("valid JSON");
    assert!(json["cautions"][0]
        .as_str()
        .unwrap()
        .contains("Never look at the sun"));
    let events: Vec<&str> = json["rows"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(|r| r["event"].as_str())
        .collect();
    assert!(
        events.contains(&"sunrise") && events.contains(&"sunset"),
        "{events:?}"
    );
    // An unknown item and a missing day are bad input.
    let out = pansite(
        &dir,
        &["daylight", p, "--date", "2026-06-21", "--item", "barn"],
    );
    assert_eq!(out.status.code(), Some(2));
    let out = pansite(&dir, &["daylight", p]);
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn render_with_a_date_and_time_draws_shadows_and_refuses_a_skipped_hour() {
    let (dir, path) = scene("render");
    let p = path.to_str().unwrap();
    let svg = path.with_file_name("yard.svg");
    let out = pansite(
        &dir,
        &[
            "render",
            p,
            "--size",
            "1024x512",
            "--date",
            "2026-06-21",
            "--time",
            "16:00",
            "-o",
            svg.to_str().unwrap(),
        ],
    );
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(text.contains("shadows") && text.contains("sun path"));
    let refused = path.with_file_name("refused.png");
    let out = pansite(
        &dir,
        &[
            "render",
            p,
            "--date",
            "2026-03-29",
            "--time",
            "01:30",
            "-o",
            refused.to_str().unwrap(),
        ],
    );
    assert_eq!(out.status.code(), Some(2));
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(stderr.contains("before 01:00 or from 02:00"), "{stderr}");
    assert!(!refused.exists());
}

#[test]
fn angles_lists_the_shadows_corners() {
    let (dir, path) = scene("angles");
    let p = path.to_str().unwrap();
    let out = pansite(
        &dir,
        &[
            "angles",
            p,
            "--date",
            "2026-06-21",
            "--time",
            "16:00",
            "--item",
            "shadows",
            "--format",
            "csv",
        ],
    );
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.lines()
            .filter(|l| l.starts_with("shadows,corner"))
            .count()
            >= 4,
        "{text}"
    );
}
