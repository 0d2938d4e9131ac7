//! The sheets' case (issue 15's target): the demo with every aid on an A1 page (landscape,
//! 150 dpi) drawn with its labels, against the same with the grid's and the items' labels
//! off: the difference is what placing and lettering those labels adds (target < 30 ms).
//! The vanishing points', poles' and title block's labels are placed in both runs, so the
//! difference is a part of the placer's work, the larger part; the whole page is printed
//! beside it.
//!
//! Run alone with `PANSITE_BENCH_ONLY=sheets cargo bench`.

use pansite::aids::AidSettings;
use pansite::page::{PageSettings, Paper};
use pansite::render::{draw_sheets, RenderSettings};
use pansite::scene::parse_scene;
use std::path::Path;
use std::time::Duration;

const RUNS: usize = 5;

pub fn run(floor_time: Duration) {
    let text = super::demo_scene();
    let site = parse_scene(text.as_bytes(), Path::new("demo.ron"), "demo").unwrap();
    let standpoint = site.standpoints[0].clone();
    let page = PageSettings {
        paper: Paper::named("A1").unwrap().landscape(),
        margin_mm: 10.0,
        dpi: 150.0,
        band_deg: (-90.0, 90.0),
        title: Some(vec!["WEXCOMBE SQUARE: STANDPOINT FOUNTAIN".to_owned()].into()),
        tiles: None,
    };
    let labelled = RenderSettings {
        aids: AidSettings::all(),
        ..RenderSettings::default()
    };
    let unlabelled = RenderSettings {
        aids: AidSettings {
            labels: false,
            item_labels: false,
            ..AidSettings::all()
        },
        ..RenderSettings::default()
    };
    let draw = |settings: &RenderSettings| {
        let (sheets, _) = draw_sheets(&site, &standpoint, settings, Some(&page), 150.0).unwrap();
        sheets[0]
            .drawing
            .layers
            .iter()
            .filter(|l| l.text.is_some())
            .count()
    };
    let labels = draw(&labelled);
    let with = super::best(RUNS, || {
        draw(&labelled);
    });
    let without = super::best(RUNS, || {
        draw(&unlabelled);
    });
    let added = with.saturating_sub(without);
    let f = floor_time.as_secs_f64();
    println!();
    println!("sheets (2 cores shared; best of {RUNS}):");
    println!(
        "  A1 page, every aid, {labels} labels: {:.1} ms with the grid's and items' labels, {:.1} ms without; placing them adds {:.1} ms = {:.2} x F (target < 30 ms)",
        with.as_secs_f64() * 1e3,
        without.as_secs_f64() * 1e3,
        added.as_secs_f64() * 1e3,
        added.as_secs_f64() / f
    );
}
