//! `pansite watch`: render, then render again whenever the scene or the style file is saved.

use super::common::{is_standard_stream, read_site};
use crate::args::WatchArgs;
use pansite::scene::Site;
use pansite::Error;
use std::path::Path;
use std::time::{Duration, Instant, SystemTime};

/// A file's state as polling sees it: modified time and length (both, because two saves
/// within the file system's clock step keep the time).
type Stamp = Option<(SystemTime, u64)>;

fn stamp(path: &Path) -> Stamp {
    let meta = std::fs::metadata(path).ok()?;
    Some((meta.modified().ok()?, meta.len()))
}

/// What a scene holds, to say what a save changed.
#[derive(Clone, Copy, Debug, PartialEq)]
struct Summary {
    standpoints: usize,
    items: usize,
    edges: usize,
}

impl Summary {
    fn of(site: &Site) -> Summary {
        Summary {
            standpoints: site.standpoints.len(),
            items: site.items.len(),
            edges: site.edges.len(),
        }
    }

    fn changes(before: Option<Summary>, after: Summary) -> String {
        let Some(before) = before else {
            return format!(
                "{} standpoints, {} items, {} edges",
                after.standpoints, after.items, after.edges
            );
        };
        let mut parts = Vec::new();
        for (what, a, b) in [
            ("standpoints", before.standpoints, after.standpoints),
            ("items", before.items, after.items),
            ("edges", before.edges, after.edges),
        ] {
            if a != b {
                parts.push(format!("{what} {a} -> {b}"));
            }
        }
        if parts.is_empty() {
            "same counts of standpoints, items and edges".to_owned()
        } else {
            parts.join(", ")
        }
    }
}

/// `pansite watch`: renders, then renders again each time the scene or the style file
/// changes, until stopped. A file with an error is reported and nothing is written, so
/// the last good output stays.
pub fn watch(args: &WatchArgs) -> anyhow::Result<()> {
    let render_args = &args.render;
    if is_standard_stream(&render_args.scene) {
        return Err(Error::Setting("watch needs a scene file, not standard input".into()).into());
    }
    let mut files = vec![render_args.scene.clone()];
    files.extend(render_args.style.clone());
    let interval = Duration::from_millis(args.interval.clamp(10, 60_000));
    let mut last: Option<Summary> = None;
    let mut stamps: Vec<Stamp> = files.iter().map(|f| stamp(f)).collect();
    let mut changed: Vec<String> = Vec::new();
    eprintln!(
        "pansite: watching {} (every {} ms; stop with Ctrl-C)",
        files
            .iter()
            .map(|f| f.display().to_string())
            .collect::<Vec<_>>()
            .join(" and "),
        interval.as_millis()
    );
    loop {
        let started = Instant::now();
        let outcome = read_site(
            &render_args.scene,
            &render_args.model,
            render_args.view.at_latlon,
            true,
        )
        .map_err(anyhow::Error::from)
        .and_then(|site| {
            // The models a scene names are watched too, from the first time it names them.
            for source in &site.0.sources {
                if !files.contains(source) {
                    files.push(source.clone());
                    stamps.push(stamp(source));
                }
            }
            let summary = Summary::of(&site.0);
            super::render::render(render_args).map(|()| summary)
        });
        let what = if changed.is_empty() {
            "first render".to_owned()
        } else {
            format!("{} changed", changed.join(" and "))
        };
        match outcome {
            Ok(summary) => {
                eprintln!(
                    "pansite: {what}: {}; rendered in {:.0} ms",
                    Summary::changes(last, summary),
                    started.elapsed().as_secs_f64() * 1e3
                );
                last = Some(summary);
            }
            Err(error) => {
                eprintln!("pansite: error: {error:#}");
                eprintln!("pansite: {what}: not rendered; the last good output is kept");
            }
        }
        // Wait for a change.
        loop {
            std::thread::sleep(interval);
            let now: Vec<Stamp> = files.iter().map(|f| stamp(f)).collect();
            if now != stamps {
                changed = files
                    .iter()
                    .zip(now.iter().zip(&stamps))
                    .filter(|(_, (a, b))| a != b)
                    .map(|(f, _)| f.display().to_string())
                    .collect();
                stamps = now;
                break;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn summaries_say_what_changed() {
        let a = Summary {
            standpoints: 2,
            items: 4,
            edges: 60,
        };
        assert_eq!(
            Summary::changes(None, a),
            "2 standpoints, 4 items, 60 edges"
        );
        let b = Summary {
            items: 5,
            edges: 61,
            ..a
        };
        assert_eq!(Summary::changes(Some(a), b), "items 4 -> 5, edges 60 -> 61");
        assert_eq!(
            Summary::changes(Some(a), a),
            "same counts of standpoints, items and edges"
        );
    }
}
