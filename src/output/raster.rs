//! A dedicated anti-aliased rasteriser for thin lines on a grey canvas.
//!
//! Why not a general path stroker: a wireframe is hundreds of thousands of short, thin,
//! opaque segments. Each pixel near a segment gets the coverage
//! `clamp(w/2 + 1/2 - d, 0, 1)`, with `d` the distance from the pixel centre to the segment
//! (a capsule of width `w`, box-filtered across its edge), and ink is combined by taking the
//! darkest value (`min`) rather than by blending. The `min` makes the result independent of
//! drawing order, so horizontal bands are rasterised in parallel with identical output, and
//! joints between the pieces of a polyline are not darkened twice.
//!
//! The panorama wraps horizontally, so a stroke that reaches past the left or right border
//! continues on the other side.
//!
//! ## The rasteriser (design notes)
//!
//! `output/raster.rs`. Coverage of a pixel by a stroke of width `w` is
//! `clamp(w/2 + 1/2 - d, 0, 1)` with `d` the distance from the pixel centre to the segment;
//! inks combine by `min` (the darkest wins), so the order of drawing does not matter and bands
//! can be drawn on separate cores with identical results. Strokes are binned by 32-row band
//! (as 12-byte references into the drawing's polylines). Each core takes a free buffer from a
//! small pool (three per core), then the next band down, fills it with white, draws the strokes
//! that reach into it and hands it to the calling thread, which passes the bands on in order, to
//! the PNG encoder in `render_png`, and returns the buffer to the pool. So encoding overlaps
//! rasterising, memory does not grow with the image (a few bands, not the whole canvas), and
//! the buffers are reused rather than page-faulted in afresh. Along a row the distance to a
//! segment's line is linear in the column; rows of steep strokes away from their ends take a
//! short loop of their own. Strokes reaching past the left or right border wrap to the other
//! side. Hot loops use casts instead of `floor`/`ceil`/`round` (library calls on the baseline
//! x86-64 target).
//!
//! `output::rasterize` (the whole canvas at once) is built on the same banded routine; the
//! golden tests use it.
//!
//! PNG filter, measured on the town at 8192x4096 (2026-12-01, best of 5): `Up` 11.6 ms and
//! 2.4 MB; `Sub` 18 ms, 3.3 MB; adaptive 20 ms, 1.5 MB; none 49 ms, 14 MB (all with the `png`
//! crate's fast compression; its "fastest" level is no faster here). `Up` it is: wireframe rows
//! are mostly white, which `Up` turns into runs of zeros.

use crate::drawing::{Drawing, Stroke};
use crate::plane::ImagePoint;

/// The largest image pansite draws: 500 megapixels.
pub const MAX_PIXELS: u64 = 500_000_000;

/// An 8-bit grey image, 255 = white paper, rows top to bottom.
#[derive(Clone, Debug, PartialEq)]
pub struct GreyCanvas {
    /// Pixels across.
    pub width: u32,
    /// Pixels down.
    pub height: u32,
    /// One byte a pixel, row by row from the top: 0 is black ink, 255 white paper.
    pub pixels: Vec<u8>,
}

impl GreyCanvas {
    /// The value of one pixel.
    pub fn pixel(&self, x: u32, y: u32) -> u8 {
        self.pixels[y as usize * self.width as usize + x as usize]
    }
}

/// Rows per band handed to a thread.
const BAND_ROWS: usize = 32;

/// Rasterises every layer of the drawing onto white paper, using all cores.
/// The caller has checked the size against [`MAX_PIXELS`].
pub fn rasterize(drawing: &Drawing) -> GreyCanvas {
    let mut pixels = Vec::with_capacity(drawing.width as usize * drawing.height as usize);
    let drawn = rasterize_in_bands(drawing, |rows| {
        pixels.extend_from_slice(rows);
        Ok::<(), std::convert::Infallible>(())
    });
    match drawn {
        Ok(()) => GreyCanvas {
            width: drawing.width,
            height: drawing.height,
            pixels,
        },
        Err(never) => match never {},
    }
}

/// Band buffers in flight per core: enough that no core waits for the writer.
const BUFFERS_PER_CORE: usize = 3;

/// Rasterises the drawing band by band and hands the finished rows to `rows`, top to
/// bottom, on the calling thread, while the other cores draw the bands below: an encoder
/// compresses the top of the image while the rest is rasterised. Only a few bands exist at
/// any time (their buffers are reused), so memory stays small whatever the image size, and
/// the buffers are touched once, not page-faulted in afresh for every band. Stops at
/// `rows`' first error.
///
/// Each core takes a free buffer, then the next band down, fills it with white paper and
/// draws every stroke that reaches into it. (Buffer first, band second: so the lowest band
/// not yet written always has a buffer, and the writer can never wait on a band that waits
/// for a buffer.) The drawing is rarely spread evenly over the height (most of it hugs the
/// horizon), which is why the bands are handed out one at a time rather than in fixed
/// shares.
pub fn rasterize_in_bands<E>(
    drawing: &Drawing,
    rows: impl FnMut(&[u8]) -> Result<(), E>,
) -> Result<(), E> {
    rasterize_channels_in_bands::<1, E>(drawing, rows)
}

/// [`rasterize_in_bands`] in colour: rows of red, green and blue bytes. Each channel is
/// inked like the grey canvas (the darkest wins), so colour output is as independent of
/// drawing order as grey.
pub fn rasterize_rgb_in_bands<E>(
    drawing: &Drawing,
    rows: impl FnMut(&[u8]) -> Result<(), E>,
) -> Result<(), E> {
    rasterize_channels_in_bands::<3, E>(drawing, rows)
}

fn rasterize_channels_in_bands<const C: usize, E>(
    drawing: &Drawing,
    mut rows: impl FnMut(&[u8]) -> Result<(), E>,
) -> Result<(), E> {
    use std::sync::atomic::{AtomicUsize, Ordering};
    use std::sync::mpsc::channel;
    let (width, height) = (drawing.width as usize, drawing.height as usize);
    // Bytes a row: every pixel's channels side by side.
    let stride = width * C;
    let pens: Vec<Pen> = drawing
        .layers
        .iter()
        .map(|layer| match layer.filled {
            // An area's ink is its colour at full strength, whatever a line's width.
            true => Pen::of(
                Stroke {
                    width_px: 1.0,
                    ..layer.stroke
                },
                C,
            ),
            false => Pen::of(layer.stroke, C),
        })
        .collect();
    let by_band = strokes_by_band(drawing, &pens);
    let spans = area_spans(drawing);
    let band_count = height.div_ceil(BAND_ROWS);
    let rows_in = |band: usize| BAND_ROWS.min(height - band * BAND_ROWS);
    let threads = std::thread::available_parallelism()
        .map_or(1, |n| n.get())
        .min(band_count.max(1));
    let (free, free_buffers) = channel::<Vec<u8>>();
    for _ in 0..(threads * BUFFERS_PER_CORE).min(band_count) {
        // Ignoring the result is safe: the receiver is alive until the end of this function.
        let _ = free.send(vec![0u8; BAND_ROWS.min(height) * stride]);
    }
    let free_buffers = std::sync::Mutex::new(free_buffers);
    let next_band = AtomicUsize::new(0);
    let (finished, done) = channel::<(usize, Vec<u8>)>();
    let mut outcome = Ok(());
    std::thread::scope(|scope| {
        for _ in 0..threads {
            let (by_band, spans, pens, free_buffers, next_band, finished) = (
                &by_band,
                &spans,
                &pens,
                &free_buffers,
                &next_band,
                finished.clone(),
            );
            scope.spawn(move || loop {
                let buffer = free_buffers
                    .lock()
                    .unwrap_or_else(|poisoned| poisoned.into_inner())
                    .recv();
                let Ok(mut buffer) = buffer else { break }; // the writer has stopped
                let index = next_band.fetch_add(1, Ordering::Relaxed);
                if index >= band_count {
                    break;
                }
                let band_rows = &mut buffer[..rows_in(index) * stride];
                band_rows.fill(255);
                Band::<C> {
                    width,
                    top: index * BAND_ROWS,
                    rows: band_rows,
                }
                .draw_strokes(drawing, pens, by_band)
                .draw_areas(drawing, pens, spans);
                if finished.send((index, buffer)).is_err() {
                    break;
                }
            });
        }
        drop(finished);
        // Write the bands in order as they come in, and hand their buffers back.
        let mut waiting: Vec<Option<Vec<u8>>> = (0..band_count).map(|_| None).collect();
        let mut next = 0;
        for (index, buffer) in done.iter() {
            waiting[index] = Some(buffer);
            while let Some(buffer) = waiting.get_mut(next).and_then(Option::take) {
                outcome = rows(&buffer[..rows_in(next) * stride]);
                next += 1;
                let _ = free.send(buffer);
                if outcome.is_err() {
                    break;
                }
            }
            if outcome.is_err() {
                break;
            }
        }
        // Stop the cores: those waiting for a buffer see the pool closed.
        drop(free);
    });
    outcome
}

/// How a layer's strokes are drawn, in the rasteriser's terms.
#[derive(Clone, Copy, Debug)]
struct Pen {
    /// Coverage reaches this far from a segment: half the stroke width plus half a pixel.
    reach: f64,
    /// Darkness at full coverage in each channel (grey uses the first), 0..=255, already
    /// scaled for strokes thinner than a pixel.
    ink: [f64; 3],
}

impl Pen {
    fn of(stroke: Stroke, channels: usize) -> Pen {
        let thin = stroke.width_px.min(1.0);
        let opacity = stroke.opacity.clamp(0.0, 1.0);
        let ink = if stroke.colour == [255, 255, 255] {
            // White paper laid over what is drawn (a label's halo): a negative ink.
            [-255.0 * opacity; 3]
        } else if channels == 1 {
            [255.0 * stroke.darkness() * thin; 3]
        } else {
            stroke.colour.map(|c| (255.0 - c as f64) * opacity * thin)
        };
        Pen {
            reach: stroke.width_px.max(1.0) / 2.0 + 0.5,
            ink,
        }
    }
}

/// One segment of one layer's polylines: indices into that layer's points.
#[derive(Clone, Copy, Debug)]
struct StrokeRef {
    layer: u32,
    from: u32,
    to: u32,
}

/// For each band, the segments that reach into it (a compressed row list: band `i` owns
/// `entries[starts[i]..starts[i + 1]]`). Twelve bytes a segment instead of the segment's
/// derived values, which each band recomputes as it draws.
struct StrokesByBand {
    starts: Vec<usize>,
    entries: Vec<StrokeRef>,
}

fn strokes_by_band(drawing: &Drawing, pens: &[Pen]) -> StrokesByBand {
    let bands = (drawing.height as usize).div_ceil(BAND_ROWS);
    let band_range = |a: ImagePoint, b: ImagePoint, reach: f64| {
        let first = ((a.y.min(b.y) - reach).max(0.0) as usize / BAND_ROWS).min(bands);
        let last = ((a.y.max(b.y) + reach).max(0.0) as usize / BAND_ROWS + 1).min(bands);
        first..last.max(first)
    };
    let strokes = || {
        let stroked = drawing.layers.iter().enumerate().filter(|(_, l)| !l.filled);
        stroked.flat_map(|(layer, l)| {
            let points = l.lines.points();
            let reach = pens[layer].reach;
            l.lines.segment_indices().map(move |(from, to)| {
                let range = band_range(points[from as usize], points[to as usize], reach);
                (
                    StrokeRef {
                        layer: layer as u32,
                        from,
                        to,
                    },
                    range,
                )
            })
        })
    };
    let mut starts = vec![0usize; bands + 1];
    for (_, range) in strokes() {
        for band in range {
            starts[band + 1] += 1;
        }
    }
    for i in 0..bands {
        starts[i + 1] += starts[i];
    }
    let mut fill = starts.clone();
    let placeholder = StrokeRef {
        layer: 0,
        from: 0,
        to: 0,
    };
    let mut entries = vec![placeholder; starts[bands]];
    for (stroke, range) in strokes() {
        for band in range {
            entries[fill[band]] = stroke;
            fill[band] += 1;
        }
    }
    StrokesByBand { starts, entries }
}

#[derive(Clone, Copy, Debug)]
struct Segment {
    a: ImagePoint,
    b: ImagePoint,
    /// Coverage reaches this far from the segment: half the stroke width plus half a pixel.
    reach: f64,
    /// Darkness at full coverage, 0..=255, already scaled for strokes thinner than a pixel.
    ink: [f64; 3],
    /// Bounding box of everything the stroke can cover.
    left: f64,
    right: f64,
    top: f64,
    bottom: f64,
    /// `b - a`, its unit direction and `1 / |b - a|^2` (0 for a dot).
    d: (f64, f64),
    unit: (f64, f64),
    inverse_length_sq: f64,
    /// How far the line moves in x per row (`dx / dy`), and half the width in x of the strip
    /// within `reach` of the line (`reach / |uy|`; infinite for a horizontal line).
    x_per_row: f64,
    half_strip: f64,
}

impl Segment {
    fn new(a: ImagePoint, b: ImagePoint, pen: Pen) -> Segment {
        let Pen { reach, ink } = pen;
        let d = (b.x - a.x, b.y - a.y);
        let length_sq = d.0 * d.0 + d.1 * d.1;
        let length = length_sq.sqrt();
        let (unit, inverse_length_sq) = if length_sq > 0.0 {
            ((d.0 / length, d.1 / length), 1.0 / length_sq)
        } else {
            ((0.0, 0.0), 0.0)
        };
        Segment {
            a,
            b,
            reach,
            ink,
            left: a.x.min(b.x) - reach,
            right: a.x.max(b.x) + reach,
            top: a.y.min(b.y) - reach,
            bottom: a.y.max(b.y) + reach,
            d,
            unit,
            inverse_length_sq,
            x_per_row: if d.1 != 0.0 { d.0 / d.1 } else { 0.0 },
            half_strip: if unit.1 != 0.0 {
                reach / unit.1.abs()
            } else {
                f64::INFINITY
            },
        }
    }

    fn shifted(&self, dx: f64) -> Segment {
        let moved = |p: ImagePoint| ImagePoint::new(p.x + dx, p.y);
        Segment::new(
            moved(self.a),
            moved(self.b),
            Pen {
                reach: self.reach,
                ink: self.ink,
            },
        )
    }

    /// An x-interval of the row through `y` that holds every point within `reach` of the
    /// segment: the strip within `reach` of its line, cut to the stroke's bounding box. (The
    /// capsule lies inside both; the few extra pixels near the ends get zero coverage.)
    fn row_span(&self, y: f64) -> (f64, f64) {
        let x_on_line = self.a.x + (y - self.a.y) * self.x_per_row;
        (
            (x_on_line - self.half_strip).max(self.left),
            (x_on_line + self.half_strip).min(self.right),
        )
    }
}

/// The rows each ring of each filled layer spans (its lowest and highest y), found once
/// for all the bands (none for a layer of lines).
fn area_spans(drawing: &Drawing) -> Vec<Vec<(f64, f64)>> {
    drawing
        .layers
        .iter()
        .map(|layer| match layer.filled {
            false => Vec::new(),
            true => layer
                .lines
                .iter()
                .map(|ring| {
                    ring.iter()
                        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), p| {
                            (lo.min(p.y), hi.max(p.y))
                        })
                })
                .collect(),
        })
        .collect()
}

/// A horizontal band of the canvas, `C` bytes a pixel.
struct Band<'a, const C: usize> {
    width: usize,
    top: usize,
    rows: &'a mut [u8],
}

impl<const C: usize> Band<'_, C> {
    /// Draws every stroke that reaches into this band.
    fn draw_strokes(
        &mut self,
        drawing: &Drawing,
        pens: &[Pen],
        by_band: &StrokesByBand,
    ) -> &mut Self {
        let index = self.top / BAND_ROWS;
        let canvas_width = drawing.width as f64;
        for stroke in &by_band.entries[by_band.starts[index]..by_band.starts[index + 1]] {
            let points = drawing.layers[stroke.layer as usize].lines.points();
            let pen = pens[stroke.layer as usize];
            let segment = Segment::new(
                points[stroke.from as usize],
                points[stroke.to as usize],
                pen,
            );
            self.draw(&segment);
            // Strokes that reach past a border wrap round to the other side.
            if segment.left < 0.0 {
                self.draw(&segment.shifted(canvas_width));
            }
            if segment.right > canvas_width {
                self.draw(&segment.shifted(-canvas_width));
            }
        }
        self
    }

    /// Fills the areas of the filled layers that reach into the band: tiny-skia's
    /// anti-aliased coverage (non-zero winding) into a mask of the band, then inked like a
    /// stroke (the darkest wins). The outlines are already cut at the seam, so nothing wraps.
    fn draw_areas(&mut self, drawing: &Drawing, pens: &[Pen], spans: &[Vec<(f64, f64)>]) {
        let band_rows = self.rows.len() / (self.width * C).max(1);
        let (top, bottom) = (self.top as f64, (self.top + band_rows) as f64);
        for ((layer, pen), spans) in drawing.layers.iter().zip(pens).zip(spans) {
            if !layer.filled {
                continue;
            }
            let mut path = tiny_skia::PathBuilder::new();
            for (ring, &(lo, hi)) in layer.lines.iter().zip(spans) {
                if ring.len() < 3 || hi <= top || lo >= bottom {
                    continue;
                }
                path.move_to(ring[0].x as f32, (ring[0].y - top) as f32);
                for p in &ring[1..] {
                    path.line_to(p.x as f32, (p.y - top) as f32);
                }
                path.close();
            }
            let (Some(path), Some(mut mask)) = (
                path.finish(),
                tiny_skia::Mask::new(self.width as u32, band_rows as u32),
            ) else {
                continue;
            };
            mask.fill_path(
                &path,
                tiny_skia::FillRule::Winding,
                true,
                tiny_skia::Transform::identity(),
            );
            for (k, &coverage) in mask.data().iter().enumerate() {
                if coverage == 0 {
                    continue;
                }
                let coverage = coverage as f64 / 255.0;
                for (channel, ink) in pen.ink.iter().take(C).enumerate() {
                    let value = (255.0 - ink * coverage).clamp(0.0, 255.0) as u8;
                    let pixel = &mut self.rows[k * C + channel];
                    *pixel = (*pixel).min(value);
                }
            }
        }
    }

    fn draw(&mut self, s: &Segment) {
        let band_rows = self.rows.len() / (self.width * C).max(1);
        // Rows whose centres the capsule can reach. (Casts instead of floor/ceil/round in
        // this loop: they saturate at zero and compile to single instructions.)
        let first_row = (s.top.max(0.0) as usize).max(self.top);
        let end_row = (s.bottom.max(0.0) as usize + 1).min(self.top + band_rows);
        let ((dx, dy), (ux, uy)) = (s.d, s.unit);
        let is_dot = s.inverse_length_sq == 0.0;
        // Rows of a steep stroke away from its ends (by the reach, in y) hold only pixels
        // beside the segment, where the distance is the horizontal offset from the line
        // times |uy|: a few pixels a row, drawn by a short loop (most rows of a wireframe).
        let steep = !is_dot && uy.abs() >= ux.abs();
        let (inner_top, inner_bottom) = (s.a.y.min(s.b.y) + s.reach, s.a.y.max(s.b.y) - s.reach);
        let sine = uy.abs();
        for row in first_row..end_row {
            let cy = row as f64 + 0.5;
            if steep && cy >= inner_top && cy <= inner_bottom {
                let x_on_line = s.a.x + (cy - s.a.y) * s.x_per_row;
                let start = ceil_at_least_zero(x_on_line - s.half_strip - 0.5);
                let end =
                    (((x_on_line + s.half_strip - 0.5).max(-1.0) + 1.0) as usize).min(self.width);
                let offset = (row - self.top) * self.width;
                for column in start..end.max(start) {
                    let distance = (column as f64 + 0.5 - x_on_line).abs() * sine;
                    let at = (offset + column) * C;
                    ink::<C>(&mut self.rows[at..at + C], s.reach - distance, &s.ink);
                }
                continue;
            }
            let (x0, x1) = s.row_span(cy);
            // Pixel centres column + 0.5 within [x0, x1].
            let start = ceil_at_least_zero(x0 - 0.5);
            let end = (((x1 - 0.5).max(-1.0) + 1.0) as usize).min(self.width);
            if start >= end {
                continue;
            }
            let offset = (row - self.top) * self.width;
            let py = cy - s.a.y;
            // Along the row, the parameter of the nearest point on the segment's line and the
            // signed distance to that line are linear in the column.
            let x_first = start as f64 + 0.5 - s.a.x;
            let t_first = (x_first * dx + py * dy) * s.inverse_length_sq;
            let step_t = dx * s.inverse_length_sq;
            let across_first = x_first * uy - py * ux;
            let pixels = &mut self.rows[offset * C..(offset + self.width) * C];
            let t_last = t_first + (end - 1 - start) as f64 * step_t;
            if !is_dot && (0.0..=1.0).contains(&t_first) && (0.0..=1.0).contains(&t_last) {
                // The whole row is beside the segment, not beyond an end: the distance is
                // |across| throughout (most rows of most strokes).
                for (k, pixel) in pixels[start * C..end * C].chunks_exact_mut(C).enumerate() {
                    ink::<C>(
                        pixel,
                        s.reach - (across_first + k as f64 * uy).abs(),
                        &s.ink,
                    );
                }
                continue;
            }
            // Columns whose nearest point lies between the ends (the strip, where the distance
            // is |across|), found from the linear t; the rest are near an end point.
            let (strip_start, strip_end) = if is_dot {
                (start, start)
            } else {
                strip_columns(start, end, t_first, step_t)
            };
            for column in (start..strip_start).chain(strip_end..end) {
                let t = t_first + (column - start) as f64 * step_t;
                let end_point = if t > 0.5 { s.b } else { s.a };
                let (ex, ey) = (column as f64 + 0.5 - end_point.x, cy - end_point.y);
                ink::<C>(
                    &mut pixels[column * C..column * C + C],
                    s.reach - (ex * ex + ey * ey).sqrt(),
                    &s.ink,
                );
            }
            let strip = &mut pixels[strip_start * C..strip_end * C];
            for (k, pixel) in strip.chunks_exact_mut(C).enumerate() {
                let across = across_first + (strip_start - start + k) as f64 * uy;
                ink::<C>(pixel, s.reach - across.abs(), &s.ink);
            }
        }
    }
}

/// Darkens each channel of a pixel to `255 - clamp(coverage) * ink`, rounded, if that is
/// darker; a negative ink (white, a halo) lightens it towards white instead.
#[inline(always)]
fn ink<const C: usize>(pixel: &mut [u8], coverage: f64, ink: &[f64; 3]) {
    let coverage = coverage.clamp(0.0, 1.0);
    for (channel, value) in pixel.iter_mut().zip(ink) {
        if *value >= 0.0 {
            *channel = (*channel).min((255.5 - coverage * value) as u8);
        } else {
            // Knock-out: towards white by the coverage.
            let c = *channel as f64;
            *channel = (c + (255.0 - c) * coverage * (-value / 255.0) + 0.5) as u8;
        }
    }
}

/// The columns in `start..end` where `t_first + (column - start) * step_t` lies in `[0, 1]`.
fn strip_columns(start: usize, end: usize, t_first: f64, step_t: f64) -> (usize, usize) {
    if step_t == 0.0 {
        return if (0.0..=1.0).contains(&t_first) {
            (start, end)
        } else {
            (start, start)
        };
    }
    // t(k) = t_first + k step_t for k = column - start; the k where 0 <= t <= 1.
    let (k0, k1) = ((0.0 - t_first) / step_t, (1.0 - t_first) / step_t);
    let (k_low, k_high) = (k0.min(k1), k0.max(k1));
    let count = (end - start) as f64;
    let first = ceil_at_least_zero(k_low).min(end - start);
    let last = ((k_high.min(count - 1.0)).max(-1.0) + 1.0) as usize;
    let last = last.max(first).min(end - start);
    (start + first, start + last)
}

/// `ceil(v)` for the pixel loop, clamped at zero.
fn ceil_at_least_zero(v: f64) -> usize {
    let v = v.max(0.0);
    let whole = v as usize;
    if (whole as f64) < v {
        whole + 1
    } else {
        whole
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::drawing::Layer;
    use crate::plane::PolylineSet;

    fn canvas_with(lines: &[&[(f64, f64)]], width_px: f64, size: (u32, u32)) -> GreyCanvas {
        let mut set = PolylineSet::new();
        for line in lines {
            let points: Vec<ImagePoint> =
                line.iter().map(|&(x, y)| ImagePoint::new(x, y)).collect();
            set.push(&points);
        }
        let drawing = Drawing {
            width: size.0,
            height: size.1,
            layers: vec![Layer {
                filled: false,
                text: None,
                name: "test".to_owned(),
                stroke: Stroke::black(1.0, width_px),
                lines: set,
            }],
        };
        rasterize(&drawing)
    }

    #[test]
    fn horizontal_line_on_a_pixel_row_is_crisp() {
        let c = canvas_with(&[&[(10.0, 20.5), (90.0, 20.5)]], 1.0, (100, 40));
        assert_eq!(c.pixel(50, 20), 0);
        assert_eq!(c.pixel(50, 19), 255);
        assert_eq!(c.pixel(50, 21), 255);
    }

    #[test]
    fn line_between_rows_is_shared() {
        let c = canvas_with(&[&[(10.0, 20.0), (90.0, 20.0)]], 1.0, (100, 40));
        assert_eq!(c.pixel(50, 19), 128);
        assert_eq!(c.pixel(50, 20), 128);
    }

    #[test]
    fn diagonal_coverage_matches_the_distance_rule() {
        let c = canvas_with(&[&[(0.0, 0.0), (64.0, 64.0)]], 1.5, (64, 64));
        // The pixel centre (30.5, 31.5) is 1/sqrt(2) from the diagonal.
        let expected = 255.0 - (0.75 + 0.5 - 0.5f64.sqrt()).clamp(0.0, 1.0) * 255.0;
        assert_eq!(c.pixel(30, 31), expected.round() as u8);
        assert_eq!(c.pixel(30, 30), 0);
        assert_eq!(c.pixel(30, 40), 255);
    }

    #[test]
    fn bands_do_not_change_the_result_and_strokes_wrap_at_the_seam() {
        // A long diagonal across several bands, and a vertical line on the left border.
        let c = canvas_with(
            &[&[(3.0, 0.0), (250.0, 300.0)], &[(0.0, 10.0), (0.0, 290.0)]],
            2.0,
            (256, 300),
        );
        let mut expected = canvas_with(&[&[(3.0, 0.0), (250.0, 300.0)]], 2.0, (256, 300));
        for row in 10..290 {
            assert_eq!(c.pixel(0, row), 0, "left border, row {row}");
            assert_eq!(c.pixel(255, row), 0, "right border, row {row}");
            expected.pixels[row as usize * 256] = 0;
            expected.pixels[row as usize * 256 + 255] = 0;
        }
        assert!(c.pixels.iter().zip(&expected.pixels).all(|(a, b)| a <= b));
    }
}
