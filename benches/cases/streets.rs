//! Streets and sloping ground: the hill-town demo drawn at full size with hidden lines,
//! as a multiple of the floor F; and a ground of 10,000 spot heights triangulated and
//! drawn with hidden lines, against its 400 ms target.

use pansite::render::{render_png_to, RenderSettings};
use pansite::scene::{parse_scene, HiddenEdges};
use std::path::Path;
use std::time::{Duration, Instant};

const WIDTH: u32 = 8192;
const HEIGHT: u32 = 4096;
const RUNS: usize = 5;

fn settings() -> RenderSettings {
    RenderSettings {
        width: WIDTH,
        height: HEIGHT,
        hidden: Some(HiddenEdges::Faint),
        ..RenderSettings::default()
    }
}

/// Parse (with the triangulation and the street network) and render, with hidden lines.
fn whole(text: &str) -> (Duration, Duration) {
    let started = Instant::now();
    let site = parse_scene(text.as_bytes(), Path::new("bench.ron"), "bench").unwrap();
    let parse = started.elapsed();
    let mut bytes = Vec::with_capacity(8 << 20);
    let started = Instant::now();
    render_png_to(&site, &site.standpoints[0], &settings(), &mut bytes).unwrap();
    (parse, started.elapsed())
}

/// 10,000 spot heights on a jittered 100 x 100 grid over a square kilometre of rolling
/// ground (invented), seen from the middle.
fn ground_scene(draw: &str) -> String {
    let mut spots = String::with_capacity(400_000);
    let mut seed: u64 = 0x9e37_79b9_7f4a_7c15;
    let mut jitter = || {
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        (seed % 1000) as f64 / 1000.0 - 0.5
    };
    for i in 0..100 {
        for j in 0..100 {
            let x = -500.0 + 10.0 * (i as f64 + 0.5 + 0.6 * jitter());
            let y = -500.0 + 10.0 * (j as f64 + 0.5 + 0.6 * jitter());
            let z = 12.0 * (x / 130.0).sin() * (y / 170.0).cos() + 0.01 * y;
            spots.push_str(&format!("({x:.2}, {y:.2}, {z:.2}),"));
        }
    }
    format!(
        "Scene(standpoints: [(name: \"middle\", x: 3, y: 4, heading: 0)], \
         ground: (spots: [{spots}], draw: {draw}), items: [])"
    )
}

pub fn run(floor_time: Duration) {
    let demo = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/stannock-hill.ron"),
    )
    .unwrap();
    println!();
    println!(
        "streets and sloping ground, {WIDTH}x{HEIGHT}, hidden lines faint, median of {RUNS} runs"
    );
    whole(&demo);
    let runs: Vec<(Duration, Duration)> = (0..RUNS).map(|_| whole(&demo)).collect();
    let parse = super::median(runs.iter().map(|r| r.0).collect());
    let render = super::median(runs.iter().map(|r| r.1).collect());
    let total = parse + render;
    println!(
        "hill-town demo: parse {:.1} ms, render {:.1} ms, together {:.1} ms = {:.2} x F (target: within 4 x F)",
        super::ms(parse),
        super::ms(render),
        super::ms(total),
        total.as_secs_f64() / floor_time.as_secs_f64()
    );
    for draw in ["Grid", "Outline"] {
        let scene = ground_scene(draw);
        let runs: Vec<(Duration, Duration)> = (0..RUNS).map(|_| whole(&scene)).collect();
        let parse = super::median(runs.iter().map(|r| r.0).collect());
        let render = super::median(runs.iter().map(|r| r.1).collect());
        let total = parse + render;
        println!(
            "ground of 10,000 spot heights, drawn as {draw}: triangulate (with parse) {:.1} ms, render {:.1} ms, together {:.1} ms = {:.2} x F (target: under 400 ms)",
            super::ms(parse),
            super::ms(render),
            super::ms(total),
            total.as_secs_f64() / floor_time.as_secs_f64()
        );
    }
}
