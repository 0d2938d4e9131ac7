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

use crate::drawing::{Drawing, Stroke};
use crate::plane::ImagePoint;

/// The largest canvas pansite allocates: 500 megapixels.
pub const MAX_PIXELS: u64 = 500_000_000;

/// An 8-bit grey image, 255 = white paper, rows top to bottom.
#[derive(Clone, Debug, PartialEq)]
pub struct GreyCanvas {
    pub width: u32,
    pub height: u32,
    pub pixels: Vec<u8>,
}

impl GreyCanvas {
    pub fn pixel(&self, x: u32, y: u32) -> u8 {
        self.pixels[y as usize * self.width as usize + x as usize]
    }
}

/// Rows per band handed to a thread.
const BAND_ROWS: usize = 64;

/// Rasterises every layer of the drawing onto white paper, using all cores.
/// The caller has checked the size against [`MAX_PIXELS`].
pub fn rasterize(drawing: &Drawing) -> GreyCanvas {
    let (width, height) = (drawing.width as usize, drawing.height as usize);
    // Zeroed memory comes from the system untouched; each band is filled with white paper
    // by its own thread just before it is drawn, while it is in that core's cache.
    let mut pixels = vec![0u8; width * height];
    let segments = collect_segments(drawing);
    let by_band = segments_by_band(&segments, height);
    // Bands are dealt round-robin to the threads: neighbouring bands hold similar amounts
    // of drawing, so every thread gets a fair share without any locking.
    let threads = std::thread::available_parallelism().map_or(1, |n| n.get());
    let mut work: Vec<Vec<Band>> = (0..threads).map(|_| Vec::new()).collect();
    for (index, rows) in pixels.chunks_mut(BAND_ROWS * width.max(1)).enumerate() {
        work[index % threads].push(Band {
            width,
            top: index * BAND_ROWS,
            rows,
        });
    }
    std::thread::scope(|scope| {
        for bands in work {
            let (segments, by_band) = (&segments, &by_band);
            scope.spawn(move || {
                for mut band in bands {
                    band.rows.fill(255);
                    let index = band.top / BAND_ROWS;
                    for &s in &by_band.entries[by_band.starts[index]..by_band.starts[index + 1]] {
                        band.draw(&segments[s as usize]);
                    }
                }
            });
        }
    });
    GreyCanvas {
        width: drawing.width,
        height: drawing.height,
        pixels,
    }
}

/// For each band, the indices of the segments that reach into it (a compressed row list:
/// band `i` owns `entries[starts[i]..starts[i + 1]]`).
struct SegmentsByBand {
    starts: Vec<usize>,
    entries: Vec<u32>,
}

fn band_range(s: &Segment, bands: usize) -> std::ops::Range<usize> {
    let first = (s.top.max(0.0) as usize / BAND_ROWS).min(bands);
    let last = (s.bottom.max(0.0) as usize / BAND_ROWS + 1).min(bands);
    first..last.max(first)
}

fn segments_by_band(segments: &[Segment], height: usize) -> SegmentsByBand {
    let bands = height.div_ceil(BAND_ROWS);
    let mut starts = vec![0usize; bands + 1];
    for s in segments {
        for band in band_range(s, bands) {
            starts[band + 1] += 1;
        }
    }
    for i in 0..bands {
        starts[i + 1] += starts[i];
    }
    let mut fill = starts.clone();
    let mut entries = vec![0u32; starts[bands]];
    for (index, s) in segments.iter().enumerate() {
        for band in band_range(s, bands) {
            entries[fill[band]] = index as u32;
            fill[band] += 1;
        }
    }
    SegmentsByBand { starts, entries }
}

#[derive(Clone, Copy, Debug)]
struct Segment {
    a: ImagePoint,
    b: ImagePoint,
    /// Coverage reaches this far from the segment.
    reach: f64,
    half_width: f64,
    /// Darkness at full coverage, 0..=255, already scaled for strokes thinner than a pixel.
    ink: f64,
    top: f64,
    bottom: f64,
}

fn collect_segments(drawing: &Drawing) -> Vec<Segment> {
    let width = drawing.width as f64;
    let mut segments = Vec::new();
    for layer in &drawing.layers {
        let Stroke { ink, width_px } = layer.stroke;
        let half_width = width_px.max(1.0) / 2.0;
        let ink = 255.0 * ink.clamp(0.0, 1.0) * width_px.min(1.0);
        let reach = half_width + 0.5;
        for line in layer.lines.iter() {
            let pairs = line.windows(2).map(|w| (w[0], w[1]));
            // A single point still makes a dot.
            let single = (line.len() == 1).then(|| (line[0], line[0]));
            for (a, b) in pairs.chain(single) {
                let segment = Segment {
                    a,
                    b,
                    reach,
                    half_width,
                    ink,
                    top: a.y.min(b.y) - reach,
                    bottom: a.y.max(b.y) + reach,
                };
                segments.push(segment);
                // Wrap strokes that reach past a border onto the other side.
                let (left, right) = (a.x.min(b.x) - reach, a.x.max(b.x) + reach);
                for shift in [width, -width] {
                    if (shift > 0.0 && left < 0.0) || (shift < 0.0 && right > width) {
                        let moved = |p: ImagePoint| ImagePoint::new(p.x + shift, p.y);
                        segments.push(Segment {
                            a: moved(a),
                            b: moved(b),
                            ..segment
                        });
                    }
                }
            }
        }
    }
    segments
}

/// A horizontal band of the canvas.
struct Band<'a> {
    width: usize,
    top: usize,
    rows: &'a mut [u8],
}

impl Band<'_> {
    fn draw(&mut self, s: &Segment) {
        let band_rows = self.rows.len() / self.width.max(1);
        // Rows whose centres the capsule can reach. (Casts instead of floor/ceil/round in
        // this loop: they saturate at zero and compile to single instructions.)
        let first_row = (s.top.max(0.0) as usize).max(self.top);
        let end_row = (s.bottom.max(0.0) as usize + 1).min(self.top + band_rows);
        if first_row >= end_row {
            return;
        }
        let (dx, dy) = (s.b.x - s.a.x, s.b.y - s.a.y);
        let length_sq = dx * dx + dy * dy;
        let inverse_length_sq = if length_sq > 0.0 {
            1.0 / length_sq
        } else {
            0.0
        };
        let full = s.half_width + 0.5;
        for row in first_row..end_row {
            let cy = row as f64 + 0.5;
            let Some((x0, x1)) = capsule_row_span(s, cy) else {
                continue;
            };
            // Pixel centres column + 0.5 within [x0, x1].
            let start = ceil_at_least_zero(x0 - 0.5);
            let end = ((x1 - 0.5).max(-1.0) + 1.0) as usize;
            let end = end.min(self.width);
            let offset = (row - self.top) * self.width;
            let py = cy - s.a.y;
            for column in start..end {
                let px = column as f64 + 0.5 - s.a.x;
                let t = ((px * dx + py * dy) * inverse_length_sq).clamp(0.0, 1.0);
                let (ex, ey) = (px - t * dx, py - t * dy);
                let coverage = (full - (ex * ex + ey * ey).sqrt()).clamp(0.0, 1.0);
                // 255 - coverage * ink, rounded to the nearest level.
                let value = (255.5 - coverage * s.ink) as u8;
                let pixel = &mut self.rows[offset + column];
                *pixel = (*pixel).min(value);
            }
        }
    }
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

/// The x-interval where the horizontal line `y` meets the capsule of radius `reach` around
/// the segment: the union of its two end discs and the strip between them (the capsule is
/// convex, so the union is one interval).
fn capsule_row_span(s: &Segment, y: f64) -> Option<(f64, f64)> {
    let r = s.reach;
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for end in [s.a, s.b] {
        let dy = y - end.y;
        if dy.abs() <= r {
            let half = (r * r - dy * dy).sqrt();
            lo = lo.min(end.x - half);
            hi = hi.max(end.x + half);
        }
    }
    let (dx, dy) = (s.b.x - s.a.x, s.b.y - s.a.y);
    let length = (dx * dx + dy * dy).sqrt();
    if length > 0.0 && dy.abs() > 1e-12 * length {
        // Points on the row: p(x) = (x, y). Strip: |n . (p - a)| <= r with n = (-dy, dx)/L,
        // and 0 <= d . (p - a) <= L with d = (dx, dy)/L. Each is an interval in x.
        let (nx, ny) = (-dy / length, dx / length);
        let (ux, uy) = (dx / length, dy / length);
        let across = interval_of_linear(nx, ny * (y - s.a.y) - nx * s.a.x, -r, r);
        let along = interval_of_linear(ux, uy * (y - s.a.y) - ux * s.a.x, 0.0, length);
        if let (Some(c), Some(d)) = (across, along) {
            let (a, b) = (c.0.max(d.0), c.1.min(d.1));
            if a <= b {
                lo = lo.min(a);
                hi = hi.max(b);
            }
        }
    } else if length > 0.0 && (y - s.a.y).abs() <= r {
        // A horizontal segment: the strip covers the whole span between the ends.
        lo = lo.min(s.a.x.min(s.b.x));
        hi = hi.max(s.a.x.max(s.b.x));
    }
    (lo <= hi).then_some((lo, hi))
}

/// The `x` with `min <= k x + c <= max`, for `k != 0`, or everything if `k == 0` and `c` fits.
fn interval_of_linear(k: f64, c: f64, min: f64, max: f64) -> Option<(f64, f64)> {
    if k.abs() < 1e-300 {
        return (c >= min && c <= max).then_some((f64::NEG_INFINITY, f64::INFINITY));
    }
    let (a, b) = ((min - c) / k, (max - c) / k);
    Some((a.min(b), a.max(b)))
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
                name: "test",
                stroke: Stroke { ink: 1.0, width_px },
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
