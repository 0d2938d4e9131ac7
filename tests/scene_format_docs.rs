//! The scene format's reference (`docs/scene-format.md`) is kept true: every example in it,
//! every example file under `docs/examples`, the bundled scenes and the starter scene are
//! read and drawn, and every kind of item has its own section.

use pansite::render::{render_png_to, RenderSettings};
use pansite::scene::{load_scene, parse_scene, Site, STARTER_SCENE};
use std::path::{Path, PathBuf};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Draws the site small from each of its standpoints; it must draw something.
fn draws(site: &Site, what: &str) {
    assert!(!site.standpoints.is_empty(), "{what} has no standpoint");
    let settings = RenderSettings {
        width: 512,
        height: 256,
        ..RenderSettings::default()
    };
    for standpoint in &site.standpoints {
        let mut png = Vec::new();
        let render = render_png_to(site, standpoint, &settings, &mut png)
            .unwrap_or_else(|e| panic!("{what}, standpoint {}: {e}", standpoint.name));
        assert!(render.drawing.wireframe_lines() > 0, "{what} draws nothing");
    }
}

/// The ```ron blocks of a markdown file, with the line each starts on.
fn ron_blocks(text: &str) -> Vec<(usize, String)> {
    let mut blocks = Vec::new();
    let mut current: Option<(usize, String)> = None;
    for (number, line) in text.lines().enumerate() {
        match (&mut current, line.trim_start()) {
            (None, "```ron") => current = Some((number + 2, String::new())),
            (Some(_), "```") => blocks.extend(current.take()),
            (Some((_, block)), _) => {
                block.push_str(line);
                block.push('\n');
            }
            (None, _) => {}
        }
    }
    blocks
}

#[test]
fn every_example_in_the_reference_reads_and_draws() {
    let path = root().join("docs/scene-format.md");
    let text = std::fs::read_to_string(&path).unwrap();
    let blocks = ron_blocks(&text);
    assert!(blocks.len() >= 12, "only {} examples", blocks.len());
    for (line, block) in blocks {
        let what = format!("the example at docs/scene-format.md line {line}");
        let site = parse_scene(block.as_bytes(), &path, "example")
            .unwrap_or_else(|e| panic!("{what}: {e}"));
        draws(&site, &what);
    }
}

#[test]
fn the_readme_scene_reads_and_draws() {
    let path = root().join("README.md");
    let text = std::fs::read_to_string(&path).unwrap();
    let scenes: Vec<(usize, String)> = ron_blocks(&text)
        .into_iter()
        .filter(|(_, block)| block.trim_start().starts_with("Scene("))
        .collect();
    assert!(!scenes.is_empty());
    for (line, block) in scenes {
        let what = format!("the scene at README.md line {line}");
        let site = parse_scene(block.as_bytes(), &path, "readme")
            .unwrap_or_else(|e| panic!("{what}: {e}"));
        draws(&site, &what);
    }
}

#[test]
fn every_kind_of_item_has_a_section() {
    let text = std::fs::read_to_string(root().join("docs/scene-format.md")).unwrap();
    let kinds = [
        "Block",
        "Footprint",
        "Road",
        "Arch",
        "Arcade",
        "Column",
        "Tower",
        "Dome",
        "Stairs",
        "Tiles",
        "Vault",
        "Room",
        "Polyline",
        "Line",
        "Point",
        "Group",
        "Repeat",
        "Model",
        "Figure",
        "Car",
        "Tree",
    ];
    for kind in kinds {
        let heading = text
            .lines()
            .any(|l| l.starts_with("### ") && l.contains(&format!("`{kind}`")));
        assert!(heading, "no section for `{kind}`");
    }
}

#[test]
fn example_files_and_bundled_scenes_read_and_draw() {
    let mut files: Vec<PathBuf> = Vec::new();
    // The open-data demos (a GeoJSON street and the same street as a CityJSON model) too.
    for folder in ["docs/examples", "scenes", "scenes/opendata"] {
        for entry in std::fs::read_dir(root().join(folder)).unwrap() {
            let path = entry.unwrap().path();
            if path.extension().is_some_and(|e| e == "ron") {
                files.push(path);
            }
        }
    }
    assert!(files.len() >= 3, "{files:?}");
    assert!(
        files
            .iter()
            .any(|f| f.ends_with("scenes/opendata/saltmarsh-row-city.ron")),
        "{files:?}"
    );
    for path in files {
        let site = load_scene(&path).unwrap_or_else(|e| panic!("{e}"));
        draws(&site, &path.display().to_string());
    }
}

#[test]
fn the_starter_scene_reads_and_draws() {
    let site = parse_scene(
        STARTER_SCENE.as_bytes(),
        Path::new("starter.ron"),
        "starter",
    )
    .unwrap_or_else(|e| panic!("{e}"));
    draws(&site, "the starter scene");
}
