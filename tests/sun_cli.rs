//! The sun on the command line: `pansite daylight`, `render --date --time`, `angles` with
//! shadows, refused clock times, the sun up or down all day at 78 N, run for real.

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

/// An invented hut at 78 degrees north, its clock universal time.
const POLAR: &str = r#"Scene(
    name: "Drift Ice Hut",
    location: (latitude: 78.0, longitude: 16.0),
    standpoints: [(name: "door", x: 0, y: -6)],
    items: [Block(label: "hut", at: Centre(0, 0), width: 4, depth: 3, height: 3)],
)"#;

#[test]
fn daylight_at_78_north_has_the_sun_up_all_day_at_midsummer_and_down_at_midwinter() {
    // Common practice (any almanac): at 78 N the sun does not set round the June solstice
    // and does not rise round the December one. Plain spherical astronomy says by how
    // much: at a solstice the sun's declination is +-23.44 degrees (the obliquity of the
    // ecliptic, Astronomical Almanac), so at latitude phi its elevation at transit is
    // 90 - phi + delta and at the lower transit phi + delta - 90: +35.44 and +11.44 in
    // June, -11.44 and -35.44 in December (refraction adds at most 0.03 at these heights).
    let dir = Scratch::new("sun-polar");
    let path = dir.write("hut.ron", POLAR);
    let p = path.to_str().unwrap();
    for (date, event, transit_deg, lowest_deg, highest_deg) in [
        ("2026-06-21", "up all day", 35.44, 11.44, 35.44),
        ("2026-12-21", "down all day", -11.44, -35.44, -11.44),
    ] {
        let args = |format: &str| {
            [
                "daylight", p, "--date", date, "--step", "30", "--format", format,
            ]
            .map(str::to_owned)
        };
        // As text: the day's row, without a time or angles, and no sunrise or sunset.
        let out = pansite(&dir, &args("text").each_ref().map(String::as_str));
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let text = String::from_utf8(out.stdout).unwrap();
        let day_rows: Vec<&str> = text.lines().filter(|l| l.contains(event)).collect();
        assert_eq!(
            day_rows,
            [format!("{date}                    {event}")],
            "{text}"
        );
        assert!(
            !text.contains("sunrise") && !text.contains("sunset"),
            "{text}"
        );
        // As JSON: the same row, its time empty and its angles null; the positions every
        // half hour all on the one side of the horizon, between the two transits.
        let out = pansite(&dir, &args("json").each_ref().map(String::as_str));
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let json: serde_json::Value = serde_json::from_slice(&out.stdout).expect("valid JSON");
        let rows = json["rows"].as_array().unwrap();
        let of = |name: &str| -> Vec<&serde_json::Value> {
            rows.iter().filter(|r| r["event"] == name).collect()
        };
        let day = of(event);
        assert_eq!(day.len(), 1, "{rows:?}");
        assert_eq!(
            (&day[0]["date"], &day[0]["time"]),
            (&date.into(), &"".into())
        );
        assert!(day[0]["azimuth"].is_null() && day[0]["elevation"].is_null());
        assert_eq!(of("sunrise").len() + of("sunset").len(), 0, "{rows:?}");
        let transit = of("transit")[0]["elevation"].as_f64().unwrap();
        assert!((transit - transit_deg).abs() < 0.1, "{transit}");
        let elevations: Vec<f64> = of("position")
            .iter()
            .map(|r| r["elevation"].as_f64().unwrap())
            .collect();
        assert_eq!(elevations.len(), 48);
        for e in elevations {
            assert!(lowest_deg - 0.1 < e && e < highest_deg + 0.1, "{date}: {e}");
        }
    }
}

/// The open-data demo's GeoJSON street, given directly.
fn demo_geojson() -> String {
    format!(
        "{}/scenes/opendata/saltmarsh-row.geojson",
        env!("CARGO_MANIFEST_DIR")
    )
}

/// The rows of a `daylight` CSV table after its header: the events and positions.
fn table_rows(out: &std::process::Output) -> Vec<String> {
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout.clone()).unwrap();
    text.lines()
        .skip_while(|l| !l.starts_with("date,time,"))
        .skip(1)
        .map(str::to_owned)
        .collect()
}

#[test]
fn an_open_data_file_given_directly_takes_a_time_zone_like_a_scenes_location() {
    // The IANA database: the Azores keep UT - 1 and, like the rest of Portugal and the EU,
    // summer time from the last Sunday of March to the last of October (Directive
    // 2000/84/EC), so UT + 0 in June.
    let dir = Scratch::new("sun-open-data-zone");
    let data = demo_geojson();
    let scene = dir.write(
        "here.ron",
        r#"Scene(
            location: (latitude: 45.0, longitude: -30.0, time_zone: "Atlantic/Azores"),
            standpoints: [(name: "origin", x: 0, y: 0)],
            items: [],
        )"#,
    );
    let table = |file: &str, more: &[&str], date: &str| {
        let mut args = vec!["daylight", file, "--date", date, "--step", "60"];
        args.extend_from_slice(&["--format", "csv"]);
        args.extend_from_slice(more);
        table_rows(&pansite(&dir, &args))
    };
    let zone = [
        "--origin-latlon",
        "45.0,-30.0",
        "--time-zone",
        "Atlantic/Azores",
    ];
    for (date, offset) in [("2026-12-21", "-01:00"), ("2026-06-21", "+00:00")] {
        let direct = table(&data, &zone, date);
        assert_eq!(direct, table(scene.to_str().unwrap(), &[], date), "{date}");
        let sunrise = direct.iter().find(|r| r.contains(",sunrise,")).unwrap();
        assert!(
            sunrise.contains(&format!(",{offset},sunrise,")),
            "{sunrise}"
        );
        // Without the zone the clock is universal time: the same sunrise, its clock time
        // moved by the offset.
        let universal = table(&data, &["--origin-latlon", "45.0,-30.0"], date);
        let universal = universal.iter().find(|r| r.contains(",sunrise,")).unwrap();
        let hour = |row: &str| row[11..13].parse::<i32>().unwrap();
        let shift: i32 = offset[..3].parse().unwrap();
        assert_eq!(
            hour(sunrise) - shift,
            hour(universal),
            "{sunrise} / {universal}"
        );
        assert_eq!(sunrise[13..19], universal[13..19]);
    }
    // `angles` reads the local time in the zone too: noon in the Azores in December is
    // 13:00 universal time, the same shadows.
    let angles = |more: &[&str]| {
        let mut args = vec!["angles", &data, "--origin-latlon", "45.0,-30.0"];
        args.extend_from_slice(&["--date", "2026-12-21", "--item", "shadows"]);
        args.extend_from_slice(&["--format", "csv"]);
        args.extend_from_slice(more);
        let out = pansite(&dir, &args);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        out.stdout
    };
    let in_zone = angles(&["--time", "12:00", "--time-zone", "Atlantic/Azores"]);
    assert!(String::from_utf8_lossy(&in_zone).contains("shadows,corner"));
    assert_eq!(in_zone, angles(&["--time", "13:00"]));
    assert_ne!(in_zone, angles(&["--time", "12:00"]));
}

#[test]
fn a_time_zone_for_open_data_is_refused_when_unknown_or_out_of_place() {
    let dir = Scratch::new("sun-open-data-zone-refused");
    let data = demo_geojson();
    let scene = dir.write("yard.ron", SCENE);
    let refused = |args: &[&str], words: &str| {
        let out = pansite(&dir, args);
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert!(stderr.contains(words), "{args:?}: {stderr}");
        assert!(out.stdout.is_empty(), "{args:?}");
    };
    // An unknown name, with the nearest known one.
    refused(
        &[
            "daylight",
            &data,
            "--date",
            "2026-06-21",
            "--time-zone",
            "Atlantic/Azorez",
        ],
        r#""Atlantic/Azorez" is not a time zone of the IANA database (did you mean "Atlantic/Azores"?)"#,
    );
    // A scene names its own zone.
    refused(
        &[
            "daylight",
            scene.to_str().unwrap(),
            "--date",
            "2026-06-21",
            "--time-zone",
            "Europe/London",
        ],
        "a scene names its zone in its `location` block",
    );
    // A city model in a grid gives no latitude and longitude of itself.
    let city = format!(
        "{}/scenes/opendata/saltmarsh-row.city.json",
        env!("CARGO_MANIFEST_DIR")
    );
    refused(
        &[
            "daylight",
            &city,
            "--date",
            "2026-06-21",
            "--time-zone",
            "Atlantic/Azores",
        ],
        "need the latitude and longitude of the plan's origin",
    );
    // Given them, it is read in the zone.
    let out = pansite(
        &dir,
        &[
            "daylight",
            &city,
            "--date",
            "2026-12-21",
            "--time-zone",
            "Atlantic/Azores",
            "--origin-latlon",
            "45.0,-30.0",
            "--format",
            "csv",
        ],
    );
    assert!(table_rows(&out)
        .iter()
        .any(|r| r.contains(",-01:00,sunrise,")));
}
