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
//! the buffers are reused rather than page-faulted in afresh. Pixels are worked four at a
//! time in `f32` lanes (`wide`'s `f32x4`: one SSE register on x86-64, NEON on ARM), the
//! distance to a segment as its distance across the line and beyond the nearer end added in
//! quadrature. Rows of steep strokes away from their ends, most rows of a wireframe, take a
//! short path of their own: four pixels around the line, their distance the horizontal
//! offset times the slope's sine.
//! Strokes reaching past the left or right border wrap to the other side. Hot loops use
//! casts instead of `floor`/`ceil`/`round` (library calls on the baseline x86-64 target),
//! through `u32` rather than `usize` (a few instructions against a dozen), and plain
//! comparisons instead of `f64::max`/`min` (which check for NaN).
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
use std::ops::Range;
use wide::f32x4;

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
pub(super) const BAND_ROWS: usize = 32;

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
    mut rows: impl FnMut(&[u8]) -> Result<(), E>,
) -> Result<(), E> {
    rasterize_channels_in_bands::<1, (), E>(drawing, |_| (), |band, ()| rows(band))
}

/// [`rasterize_in_bands`] with more work done on each band by the core that drew it:
/// `on_core(rows)` (compressing it, say), whose result `in_order` gets with the band's rows,
/// top to bottom, on the calling thread.
pub fn rasterize_in_bands_then<T: Send, E>(
    drawing: &Drawing,
    on_core: impl Fn(&[u8]) -> T + Sync,
    in_order: impl FnMut(&[u8], T) -> Result<(), E>,
) -> Result<(), E> {
    rasterize_channels_in_bands::<1, T, E>(drawing, on_core, in_order)
}

/// [`rasterize_in_bands`] in colour: rows of red, green and blue bytes. Each channel is
/// inked like the grey canvas (the darkest wins), so colour output is as independent of
/// drawing order as grey.
pub fn rasterize_rgb_in_bands<E>(
    drawing: &Drawing,
    mut rows: impl FnMut(&[u8]) -> Result<(), E>,
) -> Result<(), E> {
    rasterize_channels_in_bands::<3, (), E>(drawing, |_| (), |band, ()| rows(band))
}

fn rasterize_channels_in_bands<const C: usize, T: Send, E>(
    drawing: &Drawing,
    on_core: impl Fn(&[u8]) -> T + Sync,
    mut in_order: impl FnMut(&[u8], T) -> Result<(), E>,
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
    let by_band = strokes_by_band_on_all_cores(drawing, &pens);
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
    let (finished, done) = channel::<(usize, Vec<u8>, T)>();
    let mut outcome = Ok(());
    std::thread::scope(|scope| {
        for _ in 0..threads {
            let (by_band, spans, pens, free_buffers, next_band, on_core, finished) = (
                &by_band,
                &spans,
                &pens,
                &free_buffers,
                &next_band,
                &on_core,
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
                let done_here = on_core(&buffer[..rows_in(index) * stride]);
                if finished.send((index, buffer, done_here)).is_err() {
                    break;
                }
            });
        }
        drop(finished);
        // Write the bands in order as they come in, and hand their buffers back.
        let mut waiting: Vec<Option<(Vec<u8>, T)>> = (0..band_count).map(|_| None).collect();
        let mut next = 0;
        for (index, buffer, done_there) in done.iter() {
            waiting[index] = Some((buffer, done_there));
            while let Some((buffer, done_there)) = waiting.get_mut(next).and_then(Option::take) {
                outcome = in_order(&buffer[..rows_in(next) * stride], done_there);
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
#[derive(Clone, Copy, Debug, PartialEq)]
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

/// Polylines below which the bands' lists are made on one core: a thread costs more than
/// sorting a few thousand segments.
const LINES_FOR_CORES: usize = 10_000;

/// The bands' lists in one share a core, each share a stretch of the stroked polylines in
/// drawing order (the first share's strokes come before the second's, so drawing the
/// shares' lists one after the other keeps the order, which a white halo needs).
fn strokes_by_band_on_all_cores(drawing: &Drawing, pens: &[Pen]) -> Vec<StrokesByBand> {
    let lines: usize = drawing
        .layers
        .iter()
        .filter(|l| !l.filled)
        .map(|l| l.lines.len())
        .sum();
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    let shares = if lines < LINES_FOR_CORES { 1 } else { cores };
    if shares == 1 {
        return vec![strokes_by_band(drawing, pens, 0..lines)];
    }
    let shares = (0..shares)
        .map(|k| lines * k / shares..lines * (k + 1) / shares)
        .collect();
    crate::cores::each_on_a_thread(shares, true, |share| strokes_by_band(drawing, pens, share))
}

/// The bands' lists of the stroked polylines numbered in `share` (counted through the
/// stroked layers in order).
fn strokes_by_band(drawing: &Drawing, pens: &[Pen], share: Range<usize>) -> StrokesByBand {
    let bands = (drawing.height as usize).div_ceil(BAND_ROWS);
    // Each segment's bands, found once; and how many segments start and stop reaching
    // into each band, summed below into each band's count.
    // Sized once, from the share's lines at their layer's average vertices a line (a
    // segment for each vertex at most): growing it page by page costs more than the
    // sorting itself.
    let stroked = || {
        let mut first_line = 0;
        drawing
            .layers
            .iter()
            .enumerate()
            .filter(|(_, l)| !l.filled)
            .map(move |(layer, l)| {
                let first = first_line;
                first_line += l.lines.len();
                let lines = share.start.clamp(first, first_line) - first
                    ..share.end.clamp(first, first_line) - first;
                (layer, l, lines)
            })
    };
    let mut reaching: Vec<(StrokeRef, u32, u32)> = Vec::with_capacity(
        stroked()
            .map(|(_, l, lines)| lines.len() * l.lines.vertex_count() / l.lines.len().max(1))
            .sum::<usize>()
            + drawing.layers.len(),
    );
    let mut changes = vec![0isize; bands + 1];
    for (layer, l, lines) in stroked() {
        let points = l.lines.points();
        let reach = pens[layer].reach;
        for (from, to) in l.lines.segment_indices_of(lines) {
            let (a, b) = (points[from as usize], points[to as usize]);
            let first = ((a.y.min(b.y) - reach).max(0.0) as usize / BAND_ROWS).min(bands);
            let last = ((a.y.max(b.y) + reach).max(0.0) as usize / BAND_ROWS + 1)
                .min(bands)
                .max(first);
            changes[first] += 1;
            changes[last] -= 1;
            let stroke = StrokeRef {
                layer: layer as u32,
                from,
                to,
            };
            reaching.push((stroke, first as u32, last as u32));
        }
    }
    let mut starts = Vec::with_capacity(bands + 1);
    let (mut start, mut count) = (0usize, 0isize);
    for change in &changes[..bands] {
        starts.push(start);
        count += change;
        start += count as usize;
    }
    starts.push(start);
    let mut fill = starts.clone();
    let placeholder = StrokeRef {
        layer: 0,
        from: 0,
        to: 0,
    };
    let mut entries = vec![placeholder; start];
    for &(stroke, first, last) in &reaching {
        for band in first as usize..last as usize {
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
    /// The unit direction from `a` to `b` and the length; a dot (no length) takes `(1, 0)`,
    /// for which the distance to the segment is the distance to its point all the same.
    unit: (f64, f64),
    length: f64,
    /// How far the line moves in x per row (`dx / dy`), and half the width in x of the strip
    /// within `reach` of the line (`reach / |uy|`; infinite for a horizontal line).
    x_per_row: f64,
    half_strip: f64,
}

impl Segment {
    fn new(a: ImagePoint, b: ImagePoint, pen: Pen) -> Segment {
        let Pen { reach, ink } = pen;
        let d = (b.x - a.x, b.y - a.y);
        let length = (d.0 * d.0 + d.1 * d.1).sqrt();
        let unit = if length > 0.0 {
            (d.0 / length, d.1 / length)
        } else {
            (1.0, 0.0)
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
            unit,
            length,
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
            larger(x_on_line - self.half_strip, self.left),
            smaller(x_on_line + self.half_strip, self.right),
        )
    }
}

/// Pixels of a row worked at once, in the four `f32` lanes of one SSE register (NEON on
/// ARM) through `wide`'s `f32x4`.
const LANES: usize = 4;

/// Each lane's offset in pixels from the first of its group of four.
const LANE_STEPS: f32x4 = f32x4::new([0.0, 1.0, 2.0, 3.0]);

/// A segment's coverage rule in `f32` lanes, for points given relative to its start `a`.
///
/// `f32` is ample here: the offsets are at most an image width (2^15 px for the widest
/// 500-megapixel panorama), so their 24-bit significands keep 2^-9 px or better, and the
/// coverage, one grey level for 1/255 px of distance, moves by about half a level at worst.
#[derive(Clone, Copy)]
struct CapsuleLanes {
    ux: f32x4,
    uy: f32x4,
    length: f32x4,
    reach: f32x4,
}

impl CapsuleLanes {
    fn of(s: &Segment) -> CapsuleLanes {
        CapsuleLanes {
            ux: f32x4::splat(s.unit.0 as f32),
            uy: f32x4::splat(s.unit.1 as f32),
            length: f32x4::splat(s.length as f32),
            reach: f32x4::splat(s.reach as f32),
        }
    }

    /// The coverage `clamp(reach - d, 0, 1)` of four points `(x, y)` relative to the
    /// segment's start, `d` their distance to the segment: the distance across its line
    /// and the distance beyond its nearer end along it, added in quadrature (the distance
    /// to a capsule's core segment, by Pythagoras).
    fn coverage(&self, x: f32x4, y: f32x4) -> f32x4 {
        let zero = f32x4::splat(0.0);
        let along = x * self.ux + y * self.uy;
        let across = x * self.uy - y * self.ux;
        let beyond = (along - self.length).fast_max(-along).fast_max(zero);
        let distance = (across * across + beyond * beyond).sqrt();
        (self.reach - distance)
            .fast_max(zero)
            .fast_min(f32x4::splat(1.0))
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
        by_band: &[StrokesByBand],
    ) -> &mut Self {
        let index = self.top / BAND_ROWS;
        let canvas_width = drawing.width as f64;
        let strokes = by_band
            .iter()
            .flat_map(|list| &list.entries[list.starts[index]..list.starts[index + 1]]);
        for stroke in strokes {
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
        // this loop, and through `u32` (see `whole_px`): they saturate at zero and compile
        // to a few instructions.)
        let first_row = whole_px(s.top).max(self.top);
        let end_row = (whole_px(s.bottom) + 1).min(self.top + band_rows);
        let capsule = CapsuleLanes::of(s);
        let steep = SteepRows::of(s);
        let last_left = self.width as f64 - (LANES - 1) as f64;
        // Each row's centre, counted up from the first: whole numbers and a half, exact in
        // an f64, and cheaper than converting every row's number.
        let mut centre = whole_px_f64(first_row) + 0.5;
        for row in first_row..end_row {
            let cy = centre;
            centre += 1.0;
            let offset = (row - self.top) * self.width;
            if let Some((first, coverage)) = steep.as_ref().and_then(|s| s.row(cy, last_left)) {
                let at = (offset + first) * C;
                ink_lanes::<C>(&mut self.rows[at..at + LANES * C], coverage, &s.ink);
                continue;
            }
            let (x0, x1) = s.row_span(cy);
            // Pixel centres column + 0.5 within [x0, x1].
            let start = ceil_at_least_zero(x0 - 0.5);
            let end = whole_px(x1 + 0.5).min(self.width);
            if start >= end {
                continue;
            }
            let pixels = &mut self.rows[offset * C..(offset + self.width) * C];
            let x_start = (whole_px_f64(start) + 0.5 - s.a.x) as f32;
            let y = f32x4::splat((cy - s.a.y) as f32);
            // Whole groups of four: the last may reach past `end`, harmlessly (those pixels
            // lie beyond the capsule, at zero coverage), but not past the row. (A group of
            // exactly four is inked in one go: its length known, the compiler vectorises.)
            let mut first = start;
            while first < end {
                let x = f32x4::splat(x_start + (first - start) as u32 as f32) + LANE_STEPS;
                let coverage = capsule.coverage(x, y);
                match pixels.get_mut(first * C..(first + LANES) * C) {
                    Some(four) => ink_lanes::<C>(four, coverage, &s.ink),
                    None => ink_lanes::<C>(&mut pixels[first * C..], coverage, &s.ink),
                }
                first += LANES;
            }
        }
    }
}

/// The rows of a steep segment (at least as tall as it is wide) away from its ends, where
/// every pixel within reach lies beside the segment rather than beyond an end: there the
/// distance to it is the horizontal offset from its line times `|uy|` (the sine of the
/// line's slope). The strip within reach, `2 reach / |uy|` wide, holds at most four pixel
/// centres while it is at most 4 px wide: always for a line up to a pixel wide (at most
/// `2 sqrt 2` px), and for wider lines when steep enough. Most rows of a wireframe are
/// such rows, so they get this short path of their own.
struct SteepRows {
    /// Rows whose centres lie within these y are at least `reach` from both ends.
    inner: (f64, f64),
    a: ImagePoint,
    x_per_row: f64,
    half_strip: f64,
    sine: f32x4,
    reach: f32x4,
}

impl SteepRows {
    /// Half the widest strip whose pixel centres four lanes always hold: 4 px in all.
    const MOST_HALF_STRIP: f64 = 2.0;

    fn of(s: &Segment) -> Option<SteepRows> {
        let (ux, uy) = s.unit;
        let steep = s.length > 0.0 && uy.abs() >= ux.abs();
        (steep && s.half_strip <= Self::MOST_HALF_STRIP).then(|| SteepRows {
            inner: (s.a.y.min(s.b.y) + s.reach, s.a.y.max(s.b.y) - s.reach),
            a: s.a,
            x_per_row: s.x_per_row,
            half_strip: s.half_strip,
            sine: f32x4::splat(uy.abs() as f32),
            reach: f32x4::splat(s.reach as f32),
        })
    }

    /// For the row through `y`, if it is one of these rows and its four pixels fit inside
    /// the row (the first of them left of `last_left`, the row's width less three): the
    /// first of the four columns, and their coverage.
    fn row(&self, y: f64, last_left: f64) -> Option<(usize, f32x4)> {
        if y < self.inner.0 || y > self.inner.1 {
            return None;
        }
        let x_on_line = self.a.x + (y - self.a.y) * self.x_per_row;
        // The first column whose centre lies beyond x_on_line - half_strip (one on the
        // limit itself has no coverage, so flooring the next is enough). It and the three
        // after it lie on the row when `left` lies in [0, width - 3).
        let left = x_on_line - self.half_strip + 0.5;
        if !(left >= 0.0 && left < last_left) {
            return None;
        }
        let first = whole_px(left);
        let offsets = f32x4::splat((whole_px_f64(first) + 0.5 - x_on_line) as f32) + LANE_STEPS;
        let coverage = (self.reach - offsets.abs() * self.sine)
            .fast_max(f32x4::splat(0.0))
            .fast_min(f32x4::splat(1.0));
        Some((first, coverage))
    }
}

/// Darkens each channel of up to four pixels to `255 - coverage * ink`, rounded, where that
/// is darker; a negative ink (white, a halo) lightens them towards white instead.
#[inline(always)]
fn ink_lanes<const C: usize>(pixels: &mut [u8], coverage: f32x4, ink: &[f64; 3]) {
    for (channel, &value) in ink.iter().take(C).enumerate() {
        if value >= 0.0 {
            // 255.5 - coverage * ink lies in [0.5, 255.5] for an ink of at most 255; the
            // truncation rounds it.
            let shades = (f32x4::splat(255.5) - coverage * f32x4::splat(value as f32))
                .fast_max(f32x4::splat(0.0))
                .fast_trunc_int()
                .to_array();
            for (pixel, shade) in pixels.chunks_exact_mut(C).zip(shades) {
                pixel[channel] = pixel[channel].min(shade as u8);
            }
        } else {
            // Knock-out: towards white by the coverage.
            for (pixel, coverage) in pixels.chunks_exact_mut(C).zip(coverage.to_array()) {
                let c = pixel[channel] as f64;
                pixel[channel] = (c + (255.0 - c) * coverage as f64 * (-value / 255.0) + 0.5) as u8;
            }
        }
    }
}

/// `ceil(v)` for the pixel loop, clamped at zero.
fn ceil_at_least_zero(v: f64) -> usize {
    let whole = whole_px(v);
    if whole_px_f64(whole) < v {
        whole + 1
    } else {
        whole
    }
}

/// `v` truncated to a whole number of pixels, clamped at zero (and at `u32::MAX`; no canvas
/// comes near it). Through `u32` because on baseline x86-64 that is one conversion
/// instruction and a clamp, where a cast to `usize` takes a dozen: there is no unsigned
/// 64-bit conversion before AVX-512. Measured: a third of the rasteriser's instructions
/// went on such casts.
#[inline(always)]
fn whole_px(v: f64) -> usize {
    v as u32 as usize
}

/// The larger of two numbers that are not NaN: one instruction, where `f64::max` adds a
/// check for NaN.
#[inline(always)]
fn larger(a: f64, b: f64) -> f64 {
    if a > b {
        a
    } else {
        b
    }
}

/// The smaller of two numbers that are not NaN (see [`larger`]).
#[inline(always)]
fn smaller(a: f64, b: f64) -> f64 {
    if a < b {
        a
    } else {
        b
    }
}

/// A pixel count as an `f64`, through `u32` for the same reason as [`whole_px`].
#[inline(always)]
fn whole_px_f64(n: usize) -> f64 {
    n as u32 as f64
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
    fn a_steep_line_whose_four_pixels_would_end_past_the_row_is_drawn_the_general_way() {
        // An upright line at x = 97.5 on rows 100 px wide, through the whole height: its
        // four pixels would start at column 97 and end one past the row (in the last row,
        // past the canvas). Column 97 is inked in full, its neighbours 1 px away not at all
        // (a pen reaching 1 px).
        let canvas = canvas_with(&[&[(97.5, -10.0), (97.5, 50.0)]], 1.0, (100, 40));
        for row in [0, 20, 39] {
            assert_eq!(canvas.pixel(97, row), 0, "row {row}");
            assert_eq!(canvas.pixel(96, row), 255, "row {row}");
            assert_eq!(canvas.pixel(98, row), 255, "row {row}");
        }
    }

    #[test]
    fn an_area_is_inked_at_its_colours_full_strength_whatever_its_line_width() {
        // A filled square given no line width (as the shade tone is): inside it, the
        // colour's darkness (BT.709 luminance, `Stroke::darkness`) at full coverage, not
        // scaled down as a line thinner than a pixel would be.
        let square = [(10.0, 10.0), (30.0, 10.0), (30.0, 30.0), (10.0, 30.0)];
        let mut lines = PolylineSet::new();
        lines.push(&square.map(|(x, y)| ImagePoint::new(x, y)));
        let stroke = Stroke {
            colour: [112, 122, 150],
            opacity: 0.3,
            width_px: 0.0,
        };
        let drawing = Drawing {
            width: 40,
            height: 40,
            layers: vec![Layer {
                filled: true,
                text: None,
                name: "area".to_owned(),
                stroke,
                lines,
            }],
        };
        let canvas = rasterize(&drawing);
        let inside = (255.0 - 255.0 * stroke.darkness()).round() as u8;
        assert!(inside < 240, "a visible tone: {inside}");
        assert_eq!(canvas.pixel(20, 20), inside);
        assert_eq!(canvas.pixel(5, 5), 255, "outside, white paper");
    }

    #[test]
    fn the_bands_lists_made_in_shares_keep_the_drawing_order() {
        // Three stroked layers (the middle one a white halo, whose order matters) around a
        // filled one, enough polylines for the lists to be made in shares: each band's
        // strokes, share after share, are the one-core list's, in its order.
        let layer = |filled: bool, colour: [u8; 3], lines: usize, shift: f64| {
            let mut set = PolylineSet::new();
            for k in 0..lines {
                let (x, y) = ((k * 37 % 1000) as f64, (k * 53 % 700) as f64 + shift);
                set.push(&[ImagePoint::new(x, y), ImagePoint::new(x + 9.0, y + 40.0)]);
            }
            Layer {
                filled,
                text: None,
                name: "test".to_owned(),
                stroke: Stroke {
                    colour,
                    opacity: 1.0,
                    width_px: 1.5,
                },
                lines: set,
            }
        };
        let drawing = Drawing {
            width: 1000,
            height: 760,
            layers: vec![
                layer(false, [0, 0, 0], 7000, 0.0),
                layer(true, [90, 90, 90], 3, 5.0),
                layer(false, [255, 255, 255], 3000, 3.0),
                layer(false, [0, 0, 0], 4001, 7.0),
            ],
        };
        let pens: Vec<Pen> = drawing
            .layers
            .iter()
            .map(|l| Pen::of(l.stroke, 1))
            .collect();
        let shares = strokes_by_band_on_all_cores(&drawing, &pens);
        let whole = strokes_by_band(&drawing, &pens, 0..14_001);
        let bands = 760usize.div_ceil(BAND_ROWS);
        for band in 0..bands {
            let of = |list: &StrokesByBand| {
                list.entries[list.starts[band]..list.starts[band + 1]].to_vec()
            };
            let joined: Vec<StrokeRef> = shares.iter().flat_map(of).collect();
            assert_eq!(joined, of(&whole), "band {band}");
        }
        // And in two shares whatever the machine's cores: cut inside the first layer.
        let halves = [
            strokes_by_band(&drawing, &pens, 0..5000),
            strokes_by_band(&drawing, &pens, 5000..14_001),
        ];
        for band in 0..bands {
            let of = |list: &StrokesByBand| {
                list.entries[list.starts[band]..list.starts[band + 1]].to_vec()
            };
            let joined: Vec<StrokeRef> = halves.iter().flat_map(of).collect();
            assert_eq!(joined, of(&whole), "band {band}");
        }
    }

    /// The coverage rule worked directly for one pixel centre, in f64: the distance to the
    /// segment by projecting onto it and clamping to its ends (the textbook point-segment
    /// distance), without the rasteriser's rows, strips or lanes.
    fn coverage_by_the_rule(p: (f64, f64), a: (f64, f64), b: (f64, f64), reach: f64) -> f64 {
        let d = (b.0 - a.0, b.1 - a.1);
        let length_sq = d.0 * d.0 + d.1 * d.1;
        let t = if length_sq > 0.0 {
            (((p.0 - a.0) * d.0 + (p.1 - a.1) * d.1) / length_sq).clamp(0.0, 1.0)
        } else {
            0.0
        };
        let distance = (p.0 - a.0 - t * d.0).hypot(p.1 - a.1 - t * d.1);
        (reach - distance).clamp(0.0, 1.0)
    }

    #[test]
    fn every_pixel_follows_the_coverage_rule_worked_directly() {
        // Steep, shallow, diagonal and upright segments, short and long, a dot, widths
        // from a hairline to three pixels: every pixel of the canvas against the rule.
        let segments: [((f64, f64), (f64, f64)); 9] = [
            ((10.3, 2.0), (12.9, 60.0)),
            ((2.0, 40.2), (61.0, 47.7)),
            ((5.0, 5.0), (40.0, 40.0)),
            ((30.5, 10.0), (30.5, 20.0)),
            ((50.0, 50.0), (52.0, 58.5)),
            ((20.25, 55.75), (20.25, 55.75)),
            ((44.0, 3.0), (41.0, 7.0)),
            ((60.0, 30.0), (58.2, 12.4)),
            ((3.3, 20.0), (9.1, 21.0)),
        ];
        for width_px in [0.5, 1.0, 1.5, 2.0, 3.0] {
            for &(a, b) in &segments {
                let canvas = canvas_with(&[&[a, b]], width_px, (64, 64));
                let reach = width_px.max(1.0) / 2.0 + 0.5;
                let ink = 255.0 * width_px.min(1.0);
                for y in 0..64 {
                    for x in 0..64 {
                        let p = (x as f64 + 0.5, y as f64 + 0.5);
                        let expected = 255.0 - coverage_by_the_rule(p, a, b, reach) * ink;
                        let got = canvas.pixel(x, y) as f64;
                        assert!(
                            (got - expected).abs() <= 0.5 + 1e-3,
                            "segment {a:?}-{b:?} at width {width_px}: pixel ({x}, {y}) is \
                             {got}, the rule gives {expected:.3}"
                        );
                    }
                }
            }
        }
    }

    /// A black segment from `a` to `b` whose coverage reaches `reach` px.
    fn segment(a: (f64, f64), b: (f64, f64), reach: f64) -> Segment {
        let pen = Pen {
            reach,
            ink: [255.0; 3],
        };
        Segment::new(ImagePoint::new(a.0, a.1), ImagePoint::new(b.0, b.1), pen)
    }

    fn assert_lanes(coverage: f32x4, expected: [f32; 4]) {
        let got = coverage.to_array();
        for (g, e) in got.iter().zip(expected) {
            assert!((g - e).abs() < 1e-5, "{got:?}, expected {expected:?}");
        }
    }

    #[test]
    fn a_capsule_covers_by_its_distance_across_and_beyond_the_ends() {
        // The 3-4-5 segment from the origin, for a pen reaching 1 px.
        let capsule = CapsuleLanes::of(&segment((0.0, 0.0), (3.0, 4.0), 1.0));
        // Beside its middle (1.5, 2) by 0.5 along the normal (0.8, -0.6); 0.5 before its
        // start, straight back; past its end (3, 4) by 0.3 along and 0.4 across, 0.5 from
        // it by the 3-4-5 triangle again; far away.
        let xs = [1.5 + 0.4, -0.3, 3.0 + 0.3 * 0.6 + 0.4 * 0.8, 40.0];
        let ys = [2.0 - 0.3, -0.4, 4.0 + 0.3 * 0.8 - 0.4 * 0.6, 0.0];
        let lanes = |v: [f64; 4]| f32x4::from(v.map(|x| x as f32));
        assert_lanes(capsule.coverage(lanes(xs), lanes(ys)), [0.5, 0.5, 0.5, 0.0]);
        // A dot: the distance to its point, whichever way the lanes look.
        let dot = CapsuleLanes::of(&segment((2.0, 2.0), (2.0, 2.0), 1.0));
        let coverage = dot.coverage(
            f32x4::from([0.3, -0.3, 0.0, 0.6]),
            f32x4::from([0.4, -0.4, -0.75, 0.8]),
        );
        assert_lanes(coverage, [0.5, 0.5, 0.25, 0.0]);
    }

    #[test]
    fn a_steep_row_takes_four_pixels_around_the_line() {
        // An upright line at x = 10.3: the row through y = 50.5 reaches columns 9 and 10
        // (centres 0.8 and 0.2 from the line), the four starting at column 9.
        let rows = SteepRows::of(&segment((10.3, 0.0), (10.3, 100.0), 1.0))
            .expect("an upright line is steep");
        // On rows 100 px wide, four pixels fit when the first starts left of 97.
        let (first, coverage) = rows.row(50.5, 97.0).expect("a row beside the line");
        assert_eq!(first, 9);
        assert_lanes(coverage, [0.2, 0.8, 0.0, 0.0]);
        // A row within reach of an end, or whose four pixels would leave the row, goes the
        // general way.
        assert!(rows.row(0.5, 97.0).is_none());
        assert!(rows.row(99.5, 97.0).is_none());
        assert!(
            rows.row(50.5, 9.0).is_none(),
            "rows 12 px wide end at column 11"
        );
        let at_the_border = SteepRows::of(&segment((0.2, 0.0), (0.2, 100.0), 1.0)).unwrap();
        assert!(at_the_border.row(50.5, 97.0).is_none());
        // At 45 degrees the strip is 2 sqrt 2 px wide: centres 1, 0, 1 and 2 px off the line
        // in x, 1/sqrt 2 times that across it.
        let diagonal = SteepRows::of(&segment((0.0, 0.0), (100.0, 100.0), 1.0)).unwrap();
        let (first, coverage) = diagonal.row(50.5, 97.0).unwrap();
        assert_eq!(first, 49);
        let off = 0.5f32.sqrt();
        assert_lanes(coverage, [1.0 - off, 1.0, 1.0 - off, 0.0]);
        // Shallow lines, and lines too thick for four pixels a row, are not steep rows.
        assert!(SteepRows::of(&segment((0.0, 0.0), (100.0, 99.0), 1.0)).is_none());
        assert!(SteepRows::of(&segment((10.0, 0.0), (10.0, 100.0), 2.5)).is_none());
    }

    #[test]
    fn a_white_halo_lightens_what_is_under_it_by_its_coverage() {
        // A black line 3 px wide down column 20 (columns 19 to 21 fully covered), and over
        // it a white hairline at half strength along row 30 and one at full strength along
        // row 40, 0.25 px off its row's centre (coverage 0.75).
        let layer = |colour: [u8; 3], opacity: f64, width_px: f64, line: &[(f64, f64)]| {
            let mut lines = PolylineSet::new();
            let points: Vec<ImagePoint> =
                line.iter().map(|&(x, y)| ImagePoint::new(x, y)).collect();
            lines.push(&points);
            Layer {
                filled: false,
                text: None,
                name: "test".to_owned(),
                stroke: Stroke {
                    colour,
                    opacity,
                    width_px,
                },
                lines,
            }
        };
        let drawing = Drawing {
            width: 40,
            height: 64,
            layers: vec![
                layer([0, 0, 0], 1.0, 3.0, &[(20.5, 0.0), (20.5, 64.0)]),
                layer([255, 255, 255], 0.5, 1.0, &[(0.0, 30.5), (40.0, 30.5)]),
                layer([255, 255, 255], 1.0, 1.0, &[(0.0, 40.75), (40.0, 40.75)]),
            ],
        };
        let canvas = rasterize(&drawing);
        for column in 19..=21 {
            assert_eq!(canvas.pixel(column, 29), 0);
            // Black lightened halfway to white: 0 + 255 x 0.5, rounded.
            assert_eq!(canvas.pixel(column, 30), 128);
            // Three quarters of the way: 255 x 0.75 = 191.25.
            assert_eq!(canvas.pixel(column, 40), 191);
        }
        // White over white paper stays white.
        assert_eq!(canvas.pixel(5, 30), 255);
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
