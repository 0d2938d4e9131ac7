//! The explorer while a standpoint is dragged: the demo's underlay at 1600x800 with hidden
//! lines, and the look-around pane, each asked for over loopback for 80 standpoints along
//! a path across the square, one request at a time as the page sends them. Each figure is
//! the time from sending the request to the image decoded (by the `png` crate, standing in
//! for the browser's decoder); the target is a p95 under 50 ms (20 images a second).

use pansite::explore::{ExploreSettings, Explorer, Source};
use std::io::{Read, Write};
use std::net::TcpStream;
use std::path::Path;
use std::time::{Duration, Instant};

const STEPS: usize = 80;
const TARGET: Duration = Duration::from_millis(50);

/// One request over a fresh connection, the answer read whole and its PNG decoded.
fn fetch_and_decode(explorer: &Explorer, path: &str) -> Duration {
    let started = Instant::now();
    let mut stream = TcpStream::connect(explorer.address()).unwrap();
    let raw = format!(
        "GET {path} HTTP/1.1\r\nHost: 127.0.0.1:{}\r\nConnection: close\r\n\r\n",
        explorer.address().port()
    );
    stream.write_all(raw.as_bytes()).unwrap();
    let mut bytes = Vec::new();
    stream.read_to_end(&mut bytes).unwrap();
    assert_eq!(
        &bytes[9..12],
        b"200",
        "{}",
        String::from_utf8_lossy(&bytes[..200.min(bytes.len())])
    );
    let split = bytes.windows(4).position(|w| w == b"\r\n\r\n").unwrap() + 4;
    let decoder = png::Decoder::new(std::io::Cursor::new(&bytes[split..]));
    let mut reader = decoder.read_info().unwrap();
    let mut pixels = vec![0; reader.output_buffer_size().unwrap()];
    reader.next_frame(&mut pixels).unwrap();
    started.elapsed()
}

fn p95(mut times: Vec<Duration>) -> Duration {
    times.sort();
    times[(times.len() * 95).div_ceil(100) - 1]
}

pub fn run(floor_time: Duration) {
    let dir = std::env::temp_dir().join(format!("pansite-bench-explorer-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let scene = dir.join("square.ron");
    std::fs::copy(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron"),
        &scene,
    )
    .unwrap();
    let explorer =
        Explorer::start(ExploreSettings::new(Source::Scene(scene), dir.join("out"))).unwrap();
    // From the fountain across the square towards the lane corner, turning as it goes.
    let at = |k: usize| {
        let s = k as f64 / STEPS as f64;
        (1.5 + 12.0 * s, -4.0 - 9.0 * s, 10.0 + 60.0 * s)
    };
    let underlay = |k: usize| {
        let (x, y, heading) = at(k);
        format!("/underlay.png?x={x:.3}&y={y:.3}&heading={heading:.2}&w=1600&h=800&hidden=faint&pane=bench")
    };
    let look = |k: usize| {
        let (x, y, heading) = at(k);
        format!("/look.png?x={x:.3}&y={y:.3}&heading={heading:.2}&w=800&h=450&fov=80&hidden=faint&pane=bench")
    };
    // Warm up once.
    fetch_and_decode(&explorer, &underlay(0));
    fetch_and_decode(&explorer, &look(0));
    let under: Vec<Duration> = (0..STEPS)
        .map(|k| fetch_and_decode(&explorer, &underlay(k)))
        .collect();
    let around: Vec<Duration> = (0..STEPS)
        .map(|k| fetch_and_decode(&explorer, &look(k)))
        .collect();
    explorer.stop();
    let _ = std::fs::remove_dir_all(&dir);
    let (under, around) = (p95(under), p95(around));
    let f = floor_time.as_secs_f64();
    println!();
    println!(
        "explorer, request to decoded image over loopback, p95 of {STEPS} standpoints: \
         underlay 1600x800 with hidden lines {:.1} ms = {:.2} F; look-around 800x450 {:.1} ms = {:.2} F \
         (target {} ms = {:.2} F)",
        under.as_secs_f64() * 1000.0,
        under.as_secs_f64() / f,
        around.as_secs_f64() * 1000.0,
        around.as_secs_f64() / f,
        TARGET.as_millis(),
        TARGET.as_secs_f64() / f,
    );
    // Asserted, as the issue asks: this case runs after every other one, so a miss fails
    // `cargo bench` without keeping the rest of the suite from reporting.
    let mut missed = Vec::new();
    for (what, p95) in [("underlay", under), ("look-around", around)] {
        let verdict = if p95 < TARGET { "met" } else { "MISSED" };
        println!("  explorer {what}: target {verdict}");
        if p95 >= TARGET {
            missed.push(what);
        }
    }
    assert!(
        missed.is_empty(),
        "the explorer's p95 target of {} ms is missed by: {}",
        TARGET.as_millis(),
        missed.join(", ")
    );
}
