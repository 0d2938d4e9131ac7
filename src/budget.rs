//! The bounds of one run: how many edges, triangles and drawn vertices it may hold and how
//! long it may take. Counts are checked before the work that would need them where the
//! count is known (edges and triangles while loading); drawn vertices and time while the
//! edges are flattened and the image is drawn, between runs of edges and between bands, so
//! that a scene that would take hours stops within seconds and says so.
//!
//! ## Limits on input (design notes)
//!
//! | what | limit | where |
//! | --- | --- | --- |
//! | image | 500 megapixels, at most 131,072 px a side, width from half to 8 times the height | `render::RenderSettings::validate` |
//! | line weight | up to 64 px (the rasteriser's work grows with its square) | same |
//! | tolerance | 0.001 to 100 px | same |
//! | numbers in a scene | finite, within ±1e9 (metres, degrees) | `scene/numbers.rs` (`Finite`) |
//! | counts (steps, openings, copies) | 1 to 100,000 each | `scene/numbers.rs` (`Count`) |
//! | items after expanding repeats | 1,000,000 | `scene/expand.rs` (`MAX_ITEMS`) |
//! | tile grid lines | 2,000 per `Tiles` | `scene/items/tiles.rs` |
//! | centre-line dashes | 100,000 per road | `scene/items/road.rs` |
//! | OBJ coordinates | finite, within ±1e12 in the file's units | `scene/obj.rs` |
//! | input files | regular files of at most 2 GiB | `scene/file.rs` |
//! | crease angle | 0 to 180 degrees | `--crease`, `Model(crease: ...)` |
//! | edges of a site | 5,000,000 (50 times the synthetic town) | `budget::MAX_EDGES`: checked after each item, after the first copy of a repeat (count x that copy's edges), and for a model |
//! | face triangles of a site | 5,000,000 (five times the million-triangle benchmark, whose import peaks near 500 MB) | `budget::MAX_TRIANGLES`: the same places; in an OBJ, by the line that passes it (also its vertices and `l` segments) |
//! | drawn (flattened) vertices | 20,000,000 | `budget::MAX_DRAWN_VERTICES`, counted after each run of 2,048 edges |
//! | time of a render | 600 s by default, `--time-limit SECONDS` (`RenderSettings::time_limit`) | `budget::Budget::check_time`, before each run of edges and each band of rows; after 2 s a run whose progress says it would take over 3 times the limit stops at once and says how long it would take |
//!
//! Edges, triangles and items are counted while the scene is expanded, so a scene too large
//! stops at the item that took it over, with its line and column; drawn vertices and time can
//! only be known while drawing, and stop the render with `Error::TooLarge` or `Error::TooSlow`
//! (exit 2, no file written). The time is checked between runs of edges and between bands,
//! not inside the steps before them (building the hierarchy of faces, binning the strokes by
//! band), so a run can overshoot: a 30000x15000 render with 64 px lines and a 3 s limit
//! stopped after 6.7 s, saying it would take 13 s. Model files go through the same checks as scenes (a `Model`
//! naming `/dev/zero` used to read for ever).
//!
//! Not yet handled: `-o /dev/stdout` fails for
//! users who cannot create files in `/dev` (use `-o -`); an output path that is a symbolic link
//! is replaced by a file rather than written through.

use crate::error::{Error, Result};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::time::{Duration, Instant};

/// The most edges a site may hold (a scene's items or a model's drawn edges): 50 times the
/// 97,500-edge synthetic town, about 600 MB of edges.
pub const MAX_EDGES: usize = 5_000_000;

/// The most face triangles a site may hold (they hide edges): five times the
/// million-triangle model of the benchmark, whose import peaks near 500 MB.
pub const MAX_TRIANGLES: usize = 5_000_000;

/// The most vertices the flattened drawing may hold: 100 times the synthetic town's at
/// 8192x4096, about 700 MB with the rasteriser's references to them.
pub const MAX_DRAWN_VERTICES: usize = 20_000_000;

/// How long a render may take by default: ten minutes, three orders of magnitude above the
/// benchmark's largest cases.
pub const DEFAULT_TIME_LIMIT: Duration = Duration::from_secs(600);

/// A run is stopped early when, after this long, its progress so far says it would take
/// more than [`EARLY_STOP_FACTOR`] times its limit.
const EARLY_ESTIMATE_AFTER: Duration = Duration::from_secs(2);
const EARLY_STOP_FACTOR: f64 = 3.0;

/// What one render may still spend. Shared by the threads of a stage.
#[derive(Debug)]
pub struct Budget {
    started: Instant,
    limit: Option<Duration>,
    vertices: AtomicUsize,
}

impl Budget {
    /// Starts the clock now; `None` never runs out of time.
    pub fn new(limit: Option<Duration>) -> Budget {
        Budget {
            started: Instant::now(),
            limit,
            vertices: AtomicUsize::new(0),
        }
    }

    /// Counts `n` more drawn vertices, refusing past [`MAX_DRAWN_VERTICES`].
    pub fn add_vertices(&self, n: usize) -> Result<()> {
        let total = self.vertices.fetch_add(n, Ordering::Relaxed) + n;
        if total > MAX_DRAWN_VERTICES {
            return Err(Error::TooLarge {
                what: "the drawing's vertices",
                found: total as u64,
                limit: MAX_DRAWN_VERTICES as u64,
                advice: "draw a smaller image (--size), a larger --tolerance, or fewer items",
            });
        }
        Ok(())
    }

    /// Whether the run may go on, `steps_done` of the `steps` of `stage` done (runs of
    /// edges, rows of pixels), the stage having begun at `stage_started`: refused when the
    /// limit has passed, or early when the progress so far says the run would take several
    /// times the limit.
    pub fn check_time(
        &self,
        stage: &'static str,
        stage_started: Instant,
        steps_done: usize,
        steps: usize,
    ) -> Result<()> {
        let Some(limit) = self.limit else {
            return Ok(());
        };
        let done = steps_done as f64 / steps.max(1) as f64;
        let elapsed = self.started.elapsed();
        let before = stage_started
            .saturating_duration_since(self.started)
            .as_secs_f64();
        let estimate = (done > 0.0).then(|| before + stage_started.elapsed().as_secs_f64() / done);
        let over = elapsed > limit;
        let hopeless = elapsed > EARLY_ESTIMATE_AFTER
            && estimate.is_some_and(|e| e > EARLY_STOP_FACTOR * limit.as_secs_f64());
        if over || hopeless {
            return Err(Error::TooSlow {
                stage,
                elapsed_s: elapsed.as_secs_f64(),
                done_percent: 100.0 * done.clamp(0.0, 1.0),
                estimate_s: estimate,
                limit_s: limit.as_secs_f64(),
            });
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn vertices_past_the_limit_are_refused() {
        let budget = Budget::new(None);
        assert!(budget.add_vertices(MAX_DRAWN_VERTICES).is_ok());
        let error = budget.add_vertices(1).unwrap_err();
        assert!(error.is_bad_input());
        assert!(error.to_string().contains("20000001"), "{error}");
    }

    #[test]
    fn time_runs_out_at_the_limit() {
        let budget = Budget::new(Some(Duration::ZERO));
        std::thread::sleep(Duration::from_millis(2));
        let error = budget
            .check_time("flatten", Instant::now(), 1, 2)
            .unwrap_err();
        assert!(error.is_bad_input());
        assert!(error.to_string().contains("flatten"), "{error}");
        assert!(Budget::new(None)
            .check_time("flatten", Instant::now(), 0, 2)
            .is_ok());
    }

    #[test]
    fn the_refusal_reports_the_share_of_steps_done() {
        // Run 1 of 4 handed out (one done before it): a quarter of the way. A stage of no
        // steps is reported as not begun rather than divided by zero.
        let budget = Budget::new(Some(Duration::ZERO));
        std::thread::sleep(Duration::from_millis(2));
        let quarter = budget.check_time("flatten", Instant::now(), 1, 4);
        assert!(quarter.unwrap_err().to_string().contains("25% of the way"));
        let three_quarters = budget.check_time("flatten", Instant::now(), 3, 4);
        assert!(three_quarters
            .unwrap_err()
            .to_string()
            .contains("75% of the way"));
        let none = budget.check_time("flatten", Instant::now(), 0, 0);
        assert!(none.unwrap_err().to_string().contains("at its start"));
    }

    #[test]
    fn a_run_that_would_take_hours_says_so_early() {
        // 3 s into a run whose stage is a thousandth done: about 50 minutes, against a
        // limit of 10 s.
        let started = Instant::now() - Duration::from_secs(3);
        let budget = Budget {
            started,
            limit: Some(Duration::from_secs(10)),
            vertices: AtomicUsize::new(0),
        };
        let error = budget.check_time("raster", started, 1, 1000).unwrap_err();
        let text = error.to_string();
        assert!(
            text.contains("raster") && text.contains("minutes"),
            "{text}"
        );
        // The same progress with an hour to spare goes on.
        let budget = Budget {
            limit: Some(Duration::from_secs(36_000)),
            ..budget
        };
        assert!(budget.check_time("raster", started, 1, 1000).is_ok());
    }
}
