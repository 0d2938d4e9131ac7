//! The contact sheet: many standpoints drawn small on one sheet, each labelled with its
//! name, heading, position and eye height, to choose between them at a glance.
//!
//! The standpoints are the scene's, or a sweep: a range of headings from one place,
//! positions along a path, or a grid of positions over an area. Thumbnails are drawn on
//! all cores, one standpoint at a time per core (a thumbnail is too small for the
//! wireframe's own runs to split it), and placed in a grid in the order given.

use crate::drawing::{
    label_layers, text_width, Align, Drawing, Label, LabelInk, LabelKind, LabelPlacer, Layer,
    LayerText, Stroke,
};
use crate::error::{Error, Result};
use crate::page::{clip_and_move, Rect, Sheet};
use crate::plane::{ImagePoint, PolylineSet};
use crate::render::{draw, RenderSettings};
use crate::scene::{LocalMoment, Site, Standpoint};
use std::sync::atomic::{AtomicUsize, Ordering};

/// The most thumbnails on one sheet.
pub const MAX_THUMBNAILS: usize = 1000;

/// How the thumbnails are drawn and laid out.
#[derive(Clone, Debug, PartialEq)]
pub struct ContactSettings {
    /// Each thumbnail's drawing (its `width` x `height` is the thumbnail's size).
    pub thumbnail: RenderSettings,
    /// Thumbnails across; `None` picks a near-square sheet.
    pub columns: Option<u32>,
    /// Pixels per inch of the sheet.
    pub dpi: f64,
    /// The local date and time of the sun and shadows of each thumbnail, in order (a sweep
    /// of times, [`sweep_times`]); thumbnails beyond the list keep `thumbnail`'s.
    pub moments: Vec<LocalMoment>,
    /// Lines (x, y in the sheet's pixels) that captions must not cross: the edges of the
    /// sheets a tiled page is cut into.
    pub label_cuts: (Vec<f64>, Vec<f64>),
}

impl Default for ContactSettings {
    fn default() -> Self {
        ContactSettings {
            thumbnail: RenderSettings {
                width: 480,
                height: 240,
                line_weight_px: 1.0,
                ..RenderSettings::default()
            },
            columns: None,
            dpi: 150.0,
            moments: Vec::new(),
            label_cuts: (Vec::new(), Vec::new()),
        }
    }
}

/// Standpoints at `base`'s place looking at each heading from `from` to `to` (degrees,
/// both included when the steps land on it) every `step`.
pub fn sweep_headings(base: &Standpoint, from: f64, to: f64, step: f64) -> Result<Vec<Standpoint>> {
    if !(step.is_finite() && step > 0.0 && from.is_finite() && to.is_finite() && to >= from) {
        return Err(Error::Setting(format!(
            "headings {from} to {to} every {step} degrees: need FROM <= TO and a step above 0"
        )));
    }
    let count = ((to - from) / step + 1e-9).floor() as usize + 1;
    check_count(count)?;
    Ok((0..count)
        .map(|k| {
            let heading = from + step * k as f64;
            Standpoint {
                name: format!("{} {:.0}\u{b0}", base.name, heading.rem_euclid(360.0)),
                heading: heading.to_radians(),
                ..base.clone()
            }
        })
        .collect())
}

/// The same standpoint at local times from `from` to `to` (both on `day`, both included
/// when the steps land on it) every `step_minutes`: the standpoints, named by their time,
/// and the moments to put in [`ContactSettings::moments`].
pub fn sweep_times(
    base: &Standpoint,
    day: &LocalMoment,
    to: jiff::civil::Time,
    step_minutes: f64,
) -> Result<(Vec<Standpoint>, Vec<LocalMoment>)> {
    let minutes = |t: jiff::civil::Time| t.hour() as f64 * 60.0 + t.minute() as f64;
    let (from, to) = (minutes(day.time), minutes(to));
    if !(step_minutes.is_finite() && step_minutes >= 1.0 && to >= from) {
        return Err(Error::Setting(format!(
            "times {} to {} every {step_minutes} minutes: need FROM <= TO and a step of a \
             minute or more",
            day.time, to
        )));
    }
    let count = ((to - from) / step_minutes + 1e-9).floor() as usize + 1;
    check_count(count)?;
    let mut standpoints = Vec::with_capacity(count);
    let mut moments = Vec::with_capacity(count);
    for k in 0..count {
        let m = (from + step_minutes * k as f64).round() as i64;
        let time = jiff::civil::Time::new((m / 60) as i8, (m % 60) as i8, 0, 0)
            .map_err(|e| Error::Setting(e.to_string()))?;
        standpoints.push(Standpoint {
            name: format!("{} {} {}", base.name, day.date, time.strftime("%H:%M")),
            ..base.clone()
        });
        moments.push(day.at(time));
    }
    Ok((standpoints, moments))
}

/// `count` standpoints evenly spaced along the path through `points` (plan positions,
/// metres), the ends included, each facing along the path, at `base`'s eye height, named
/// after the path (`PATH 3 OF 8`), not after `base`, whose place they do not share.
pub fn sweep_path(
    base: &Standpoint,
    points: &[(f64, f64)],
    count: usize,
) -> Result<Vec<Standpoint>> {
    check_count(count)?;
    let lengths: Vec<f64> = points
        .windows(2)
        .map(|p| (p[1].0 - p[0].0).hypot(p[1].1 - p[0].1))
        .collect();
    let total: f64 = lengths.iter().sum();
    if points.len() < 2 || !(total.is_finite() && total > 0.0) {
        return Err(Error::Setting(
            "a path needs at least two different points".into(),
        ));
    }
    let mut out = Vec::with_capacity(count);
    for k in 0..count {
        let mut along = if count == 1 {
            0.0
        } else {
            total * k as f64 / (count - 1) as f64
        };
        let mut leg = 0;
        while leg + 1 < lengths.len() && along > lengths[leg] {
            along -= lengths[leg];
            leg += 1;
        }
        // Zero-length legs have no direction: pass them over.
        while leg + 1 < lengths.len() && lengths[leg] == 0.0 {
            leg += 1;
        }
        let (a, b) = (points[leg], points[leg + 1]);
        let t = if lengths[leg] > 0.0 {
            (along / lengths[leg]).clamp(0.0, 1.0)
        } else {
            0.0
        };
        out.push(Standpoint {
            name: format!("PATH {} OF {count}", k + 1),
            x: a.0 + (b.0 - a.0) * t,
            y: a.1 + (b.1 - a.1) * t,
            // Azimuth of the leg: atan2(east, north).
            heading: (b.0 - a.0).atan2(b.1 - a.1),
            ..base.clone()
        });
    }
    Ok(out)
}

/// A grid of `columns` x `rows` standpoints over the rectangle from `corner` to
/// `opposite` (plan positions, both included), each with `base`'s heading and eye height,
/// named by row and column (`GRID R1C2`), north row first.
pub fn sweep_grid(
    base: &Standpoint,
    corner: (f64, f64),
    opposite: (f64, f64),
    columns: u32,
    rows: u32,
) -> Result<Vec<Standpoint>> {
    if columns == 0 || rows == 0 {
        return Err(Error::Setting(
            "a grid needs at least one column and one row".into(),
        ));
    }
    check_count(columns as usize * rows as usize)?;
    let (west, east) = (corner.0.min(opposite.0), corner.0.max(opposite.0));
    let (south, north) = (corner.1.min(opposite.1), corner.1.max(opposite.1));
    let at = |lo: f64, hi: f64, k: u32, n: u32| {
        if n == 1 {
            (lo + hi) / 2.0
        } else {
            lo + (hi - lo) * k as f64 / (n - 1) as f64
        }
    };
    let mut out = Vec::new();
    for row in 0..rows {
        for column in 0..columns {
            out.push(Standpoint {
                name: format!("GRID R{}C{}", row + 1, column + 1),
                x: at(west, east, column, columns),
                y: at(north, south, row, rows),
                ..base.clone()
            });
        }
    }
    Ok(out)
}

fn check_count(count: usize) -> Result<()> {
    if (1..=MAX_THUMBNAILS).contains(&count) {
        Ok(())
    } else {
        Err(Error::Setting(format!(
            "{count} standpoints: a contact sheet holds 1 to {MAX_THUMBNAILS}"
        )))
    }
}

/// Room for the two rows of caption under a thumbnail, in its captions' cap heights: the
/// first baseline 1.35 below the thumbnail, the second (0.8 high) 1.5 below that, more than
/// the ISO 3098 pitch of 1.4 (from memory), and its descenders.
const CAPTION_ROOM: f64 = 3.1;

/// How thumbnails are laid out on a sheet: a grid of cells, each a thumbnail with two rows
/// of caption under it, a gap round them.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SheetGrid {
    /// Thumbnails across.
    pub columns: usize,
    /// Rows of thumbnails.
    pub rows: usize,
    /// Cap height of the captions' first row, pixels.
    pub letter_px: f64,
    /// Gap round each thumbnail, pixels.
    pub gap: f64,
    /// A cell's width, pixels.
    pub cell_w: f64,
    /// A cell's height, pixels.
    pub cell_h: f64,
    /// The whole sheet, pixels.
    pub width: f64,
    /// The whole sheet's height, pixels.
    pub height: f64,
}

impl SheetGrid {
    /// The grid of `n` thumbnails of `tw` x `th` pixels, `columns` across (near-square by
    /// default).
    pub fn new(n: usize, columns: Option<u32>, tw: u32, th: u32) -> SheetGrid {
        let n = n.max(1);
        let (tw, th) = (tw as f64, th as f64);
        // Near-square sheets: thumbnails are twice as wide as tall.
        let columns = columns
            .unwrap_or_else(|| ((n as f64 * 0.7).sqrt().ceil() as u32).max(1))
            .clamp(1, n as u32) as usize;
        let rows = n.div_ceil(columns);
        let letter_px = (th / 14.0).max(7.0);
        let gap = (0.06 * th).max(6.0);
        let (cell_w, cell_h) = (tw + gap, th + CAPTION_ROOM * letter_px + gap);
        SheetGrid {
            columns,
            rows,
            letter_px,
            gap,
            cell_w,
            cell_h,
            width: gap + columns as f64 * cell_w,
            height: gap + rows as f64 * cell_h,
        }
    }

    /// The largest thumbnails of 2:1 that put `n` of them on `width` x `height` pixels,
    /// with the grid they make (trying every number of columns unless `columns` is given);
    /// `None` when not even the smallest thumbnail (64 x 32) fits.
    pub fn fit(
        n: usize,
        columns: Option<u32>,
        width: f64,
        height: f64,
    ) -> Option<(SheetGrid, (u32, u32))> {
        let n = n.max(1);
        let choices: Vec<u32> = match columns {
            Some(c) => vec![c.clamp(1, n as u32)],
            None => (1..=n as u32).collect(),
        };
        let mut best: Option<(SheetGrid, (u32, u32))> = None;
        for c in choices {
            // From above: the height the width and the height allow, then down until it fits.
            let rows = n.div_ceil(c as usize) as f64;
            let mut th = (width / (2.06 * c as f64 + 0.06))
                .min(height / (1.27 * rows + 0.06))
                .floor()
                .min(8192.0);
            while th >= 32.0 {
                let grid = SheetGrid::new(n, Some(c), 2 * th as u32, th as u32);
                if grid.width <= width && grid.height <= height {
                    if best.is_none_or(|(_, (_, h))| (th as u32) > h) {
                        best = Some((grid, (2 * th as u32, th as u32)));
                    }
                    break;
                }
                th -= 1.0;
            }
        }
        best
    }
}

/// The contact sheet of `standpoints`. `progress` is told each time a thumbnail is done
/// (how many are done, of how many), from whichever core drew it.
pub fn contact_sheet(
    site: &Site,
    standpoints: &[Standpoint],
    settings: &ContactSettings,
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<Sheet> {
    check_count(standpoints.len())?;
    settings.thumbnail.validate()?;
    if !(settings.dpi.is_finite() && settings.dpi > 0.0) {
        return Err(Error::Setting(format!(
            "dpi {} must be more than 0",
            settings.dpi
        )));
    }
    let n = standpoints.len();
    let cores = std::thread::available_parallelism().map_or(1, |c| c.get());
    let next = AtomicUsize::new(0);
    let done = AtomicUsize::new(0);
    let mut drawn: Vec<(usize, Result<Drawing>)> = std::thread::scope(|scope| {
        let workers: Vec<_> = (0..cores.min(n))
            .map(|_| {
                scope.spawn(|| {
                    let mut mine = Vec::new();
                    loop {
                        let k = next.fetch_add(1, Ordering::Relaxed);
                        let Some(standpoint) = standpoints.get(k) else {
                            break;
                        };
                        let drawing = match settings.moments.get(k) {
                            None => draw(site, standpoint, &settings.thumbnail),
                            Some(moment) => {
                                let mut thumbnail = settings.thumbnail.clone();
                                thumbnail.sun.moment = Some(*moment);
                                draw(site, standpoint, &thumbnail)
                            }
                        }
                        .map(|r| r.drawing);
                        mine.push((k, drawing));
                        progress(done.fetch_add(1, Ordering::Relaxed) + 1, n);
                    }
                    mine
                })
            })
            .collect();
        workers
            .into_iter()
            .flat_map(|w| w.join().unwrap_or_default())
            .collect()
    });
    if drawn.len() != n {
        return Err(Error::Setting(
            "a thumbnail's worker stopped unexpectedly".into(),
        ));
    }
    drawn.sort_by_key(|(k, _)| *k);

    let (tw, th) = (
        settings.thumbnail.width as f64,
        settings.thumbnail.height as f64,
    );
    let grid = SheetGrid::new(
        n,
        settings.columns,
        settings.thumbnail.width,
        settings.thumbnail.height,
    );
    let columns = grid.columns;
    let (letter_px, gap) = (grid.letter_px, grid.gap);
    let (cell_w, cell_h) = (grid.cell_w, grid.cell_h);
    let mut layers: Vec<Layer> = Vec::new();
    let mut frames = PolylineSet::new();
    let mut captions: Vec<Label> = Vec::new();
    for ((k, drawing), standpoint) in drawn.into_iter().zip(standpoints) {
        let drawing = drawing?;
        let (left, top) = (
            gap + (k % columns) as f64 * cell_w,
            gap + (k / columns) as f64 * cell_h,
        );
        let window = Rect {
            left: 0.0,
            top: 0.0,
            right: tw,
            bottom: th,
        };
        for layer in drawing.layers {
            let lines = clip_and_move(&layer.lines, &window, left, top);
            // A label stays a layer of its own, so the sheet's SVG keeps it as one group
            // with its words; the placer kept it inside the thumbnail.
            if let Some(text) = layer.text {
                let at = ImagePoint::new(text.at.x + left, text.at.y + top);
                layers.push(Layer {
                    text: Some(LayerText { at, ..text }),
                    lines,
                    ..layer
                });
                continue;
            }
            // Other lines share layers by name, so each kind of line is one layer.
            match layers.iter_mut().find(|l| l.name == layer.name) {
                Some(existing) => {
                    let mut lines = lines;
                    existing.lines.append(&mut lines);
                }
                None => layers.push(Layer { lines, ..layer }),
            }
        }
        frames.push(&[
            ImagePoint::new(left, top),
            ImagePoint::new(left + tw, top),
            ImagePoint::new(left + tw, top + th),
            ImagePoint::new(left, top + th),
            ImagePoint::new(left, top),
        ]);
        let baseline = top + th + 1.35 * letter_px;
        let rows = [
            (format!("{}. {}", k + 1, standpoint.name), letter_px, 0.0),
            (
                format!(
                    "HEADING {:.0}\u{b0}  AT {:.1}, {:.1}  EYE {:.2} M",
                    standpoint.heading.to_degrees().rem_euclid(360.0),
                    standpoint.x,
                    standpoint.y,
                    standpoint.eye_height
                ),
                0.8 * letter_px,
                1.5 * letter_px,
            ),
        ];
        for (text, height, down) in rows {
            // Long captions are lettered smaller rather than run into the next thumbnail.
            let height = height.min(height * tw / text_width(&text, height).max(1e-9));
            captions.push(Label::fixed(
                text,
                ImagePoint::new(left, baseline + down),
                LabelKind::Caption,
                height,
                Align::Start,
            ));
        }
    }
    // Each row of each caption is a label of its own, placed by the one placer: whole,
    // apart, and found by its words in a vector file.
    let sheet_box = Rect {
        left: 0.0,
        top: 0.0,
        right: grid.width.ceil(),
        bottom: grid.height.ceil(),
    };
    let mut placer = LabelPlacer::new(sheet_box, 0.0);
    placer.cut_along(&settings.label_cuts.0, &settings.label_cuts.1);
    placer.place(captions);
    let placed = placer.finish();
    layers.push(Layer {
        filled: false,
        text: None,
        name: "frame".to_owned(),
        stroke: Stroke::black(0.7, 1.0),
        lines: frames,
    });
    layers.extend(label_layers(
        &placed.labels,
        LabelInk {
            stroke: Stroke::black(0.9, 1.0),
            halo_px: None,
        },
    ));
    let drawing = Drawing {
        width: grid.width.ceil() as u32,
        height: grid.height.ceil() as u32,
        layers,
    };
    Ok(Sheet::full_bleed(drawing, settings.dpi))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sweeps() {
        let base = Standpoint::from_degrees("s", 0.0, 0.0, 1.6, 0.0, 0.0, 0.0);
        let h = sweep_headings(&base, 0.0, 345.0, 15.0).unwrap();
        assert_eq!(h.len(), 24);
        assert!((h[23].heading.to_degrees() - 345.0).abs() < 1e-9);
        let p = sweep_path(&base, &[(0.0, 0.0), (10.0, 0.0), (10.0, 10.0)], 5).unwrap();
        assert_eq!(p.len(), 5);
        assert_eq!((p[2].x, p[2].y), (10.0, 0.0));
        assert!((p[1].heading.to_degrees() - 90.0).abs() < 1e-9);
        assert!((p[4].y - 10.0).abs() < 1e-12 && p[3].heading.abs() < 1e-12);
        let g = sweep_grid(&base, (0.0, 0.0), (20.0, 10.0), 3, 2).unwrap();
        assert_eq!(g.len(), 6);
        assert_eq!((g[0].x, g[0].y), (0.0, 10.0));
        assert_eq!((g[5].x, g[5].y), (20.0, 0.0));
        assert!(sweep_headings(&base, 10.0, 0.0, 5.0).is_err());
        assert!(sweep_path(&base, &[(1.0, 1.0), (1.0, 1.0)], 3).is_err());
    }
}
