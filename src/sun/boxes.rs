//! A uniform grid of axis-aligned boxes in a plane, to find the few boxes that a box or a
//! segment may meet without trying them all. The shadows use it over the faces as the sun
//! sees them; the tone over the boxes of what hides a receiving plane.

use nalgebra::Vector2;

/// A box: its lowest and highest corner.
pub type Bounds = (Vector2<f64>, Vector2<f64>);

/// Boxes entered in the cells they reach of a grid over them all (about as many cells as
/// boxes, square, at most 512 a side).
pub struct BoxGrid {
    /// How many boxes.
    count: usize,
    origin: Vector2<f64>,
    cell: f64,
    size: (usize, usize),
    /// Where each cell's boxes start in `entries` (one more than the cells: the last is
    /// the end), so that the grid is two allocations however many cells it has.
    starts: Vec<usize>,
    /// The boxes of every cell, cell after cell, each cell's ascending.
    entries: Vec<u32>,
}

impl BoxGrid {
    /// The grid of `boxes`; `None` when there are none (or none with finite corners).
    pub fn new(boxes: &[Bounds]) -> Option<BoxGrid> {
        let (lo, hi) = boxes.iter().fold(
            (
                Vector2::repeat(f64::INFINITY),
                Vector2::repeat(f64::NEG_INFINITY),
            ),
            |(lo, hi), b| (lo.inf(&b.0), hi.sup(&b.1)),
        );
        if !(lo.x.is_finite() && lo.y.is_finite() && hi.x.is_finite() && hi.y.is_finite()) {
            return None;
        }
        let extent = hi - lo;
        let side = ((boxes.len() as f64).sqrt().ceil() as usize).clamp(1, 512);
        let cell = (extent.x.max(extent.y) / side as f64).max(1e-9);
        let size = (
            ((extent.x / cell) as usize + 1).min(side + 1),
            ((extent.y / cell) as usize + 1).min(side + 1),
        );
        let mut grid = BoxGrid {
            count: boxes.len(),
            origin: lo,
            cell,
            size,
            starts: vec![0; size.0 * size.1 + 1],
            entries: Vec::new(),
        };
        // Counted first, then entered, box by box in order: each cell's list ascends.
        let reach: Vec<_> = boxes
            .iter()
            .map(|b| (grid.at(&b.0), grid.at(&b.1)))
            .collect();
        for &((x0, y0), (x1, y1)) in &reach {
            for y in y0..=y1 {
                for x in x0..=x1 {
                    grid.starts[y * size.0 + x + 1] += 1;
                }
            }
        }
        for k in 1..grid.starts.len() {
            grid.starts[k] += grid.starts[k - 1];
        }
        let mut fill = grid.starts.clone();
        grid.entries = vec![0; grid.starts[grid.starts.len() - 1]];
        for (k, &((x0, y0), (x1, y1))) in reach.iter().enumerate() {
            for y in y0..=y1 {
                for x in x0..=x1 {
                    let at = &mut fill[y * size.0 + x];
                    grid.entries[*at] = k as u32;
                    *at += 1;
                }
            }
        }
        Some(grid)
    }

    /// The boxes entered in the cell at column `x`, row `y`.
    fn cell(&self, x: usize, y: usize) -> &[u32] {
        let k = y * self.size.0 + x;
        &self.entries[self.starts[k]..self.starts[k + 1]]
    }

    /// The cell holding `p`, clamped to the grid.
    fn at(&self, p: &Vector2<f64>) -> (usize, usize) {
        let index = |v: f64, start: f64, across: usize| {
            (((v - start) / self.cell).floor().max(0.0) as usize).min(across - 1)
        };
        (
            index(p.x, self.origin.x, self.size.0),
            index(p.y, self.origin.y, self.size.1),
        )
    }

    /// The boxes in the cells `b` reaches, ascending and each once.
    pub fn overlapping(&self, b: &Bounds, out: &mut Vec<u32>) {
        out.clear();
        let ((x0, y0), (x1, y1)) = (self.at(&b.0), self.at(&b.1));
        if (x0, y0) == (x1, y1) {
            // One cell's list is already ascending, each box once.
            out.extend_from_slice(self.cell(x0, y0));
            return;
        }
        let mut seen = Marks::new(self.count);
        for y in y0..=y1 {
            for x in x0..=x1 {
                out.extend(self.cell(x, y).iter().filter(|&&k| seen.first(k)));
            }
        }
        out.sort_unstable();
    }

    /// Whether `hit` holds for any box in the cells within `pad` of the point `p` (a box
    /// may be asked about more than once, in no set order): every box that holds a point
    /// within `pad` of `p` is asked about.
    pub fn any_near(&self, p: Vector2<f64>, pad: f64, mut hit: impl FnMut(u32) -> bool) -> bool {
        let pad = Vector2::repeat(pad);
        let ((x0, y0), (x1, y1)) = (self.at(&(p - pad)), self.at(&(p + pad)));
        (y0..=y1).any(|y| (x0..=x1).any(|x| self.cell(x, y).iter().any(|&k| hit(k))))
    }

    /// The boxes in the cells that hold a point within `pad` of the segment from `a` to
    /// `b`, ascending and each once: every box that comes within `pad` of the segment is
    /// among them. In each row of cells, the cells under the part of the segment within
    /// `pad` of the row's band, widened by `pad`.
    pub fn near_segment(&self, a: Vector2<f64>, b: Vector2<f64>, pad: f64, out: &mut Vec<u32>) {
        out.clear();
        let grid = |p: Vector2<f64>| (p - self.origin) / self.cell;
        let (pa, pb) = (grid(a), grid(b));
        // In cells, with a little more for the rounding of the division.
        let pad = pad / self.cell + 1e-9;
        let (w, h) = (self.size.0 as f64, self.size.1 as f64);
        let (ylo, yhi) = (pa.y.min(pb.y) - pad, pa.y.max(pb.y) + pad);
        if !(yhi >= 0.0 && ylo < h) {
            return;
        }
        // The segment's least and greatest x where its y is within [y0, y1].
        let x_within = |y0: f64, y1: f64| {
            if pb.y == pa.y {
                return (pa.x.min(pb.x), pa.x.max(pb.x));
            }
            let x_at = |y: f64| {
                let t = ((y - pa.y) / (pb.y - pa.y)).clamp(0.0, 1.0);
                pa.x + (pb.x - pa.x) * t
            };
            let (p, q) = (x_at(y0), x_at(y1));
            (p.min(q), p.max(q))
        };
        let rows = (ylo.floor().max(0.0) as usize)..=(yhi.floor().min(h - 1.0) as usize);
        for row in rows {
            let (x0, x1) = x_within(row as f64 - pad, row as f64 + 1.0 + pad);
            let (x0, x1) = (x0 - pad, x1 + pad);
            if x1 < 0.0 || x0 >= w {
                continue;
            }
            let (from, to) = (
                x0.floor().max(0.0) as usize,
                x1.floor().min(w - 1.0) as usize,
            );
            for x in from..=to {
                out.extend_from_slice(self.cell(x, row));
            }
        }
        out.sort_unstable();
        out.dedup();
    }
}

/// One bit for each of a number of things, to take each once however often it is met
/// (so that only the things, not their meetings, are sorted).
pub struct Marks(Vec<u64>);

impl Marks {
    pub fn new(count: usize) -> Marks {
        Marks(vec![0; count.div_ceil(64)])
    }

    /// Whether `k` is met for the first time (and marks it).
    pub fn first(&mut self, k: u32) -> bool {
        let (word, bit) = (k as usize / 64, 1u64 << (k % 64));
        let first = self.0[word] & bit == 0;
        self.0[word] |= bit;
        first
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_box_or_a_segment_finds_every_box_it_meets() {
        // Against trying every box: the closed boxes a query box overlaps, and those a
        // segment comes within a pad of (a point of the segment every 1/1000 of it within
        // the pad of one), are all among those found, each once, ascending. A fixed
        // sequence of our own.
        let mut next = crate::testing::numbers(3);
        let mut boxes: Vec<Bounds> = Vec::new();
        for _ in 0..300 {
            let lo = Vector2::new(100.0 * next(), 60.0 * next());
            let size = Vector2::new(12.0 * next() * next(), 12.0 * next() * next());
            boxes.push((lo, lo + size));
        }
        let grid = BoxGrid::new(&boxes).unwrap();
        let meets = |a: &Bounds, b: &Bounds| {
            a.0.x <= b.1.x && b.0.x <= a.1.x && a.0.y <= b.1.y && b.0.y <= a.1.y
        };
        let mut found = Vec::new();
        for query in boxes.iter().step_by(7) {
            grid.overlapping(query, &mut found);
            assert!(found.windows(2).all(|w| w[0] < w[1]));
            for (k, b) in boxes.iter().enumerate() {
                if meets(query, b) {
                    assert!(found.contains(&(k as u32)), "{k}");
                }
            }
        }
        for _ in 0..100 {
            // Within a pad: every box some point of the segment comes within the pad of
            // (by the distance from a point to a box, in the plane).
            let (a, b) = (
                Vector2::new(110.0 * next() - 5.0, 70.0 * next() - 5.0),
                Vector2::new(110.0 * next() - 5.0, 70.0 * next() - 5.0),
            );
            let pad = 3.0 * next();
            grid.near_segment(a, b, pad, &mut found);
            assert!(found.windows(2).all(|w| w[0] < w[1]));
            for (k, bx) in boxes.iter().enumerate() {
                let near = (0..=1000).any(|i| {
                    let p = a + (b - a) * (i as f64 / 1000.0);
                    let gap = (bx.0 - p).sup(&(p - bx.1)).sup(&Vector2::zeros());
                    gap.norm() <= pad
                });
                if near {
                    assert!(found.contains(&(k as u32)), "{k}");
                }
            }
        }
        // Level and upright segments, and a point (the cells' borders are not aimed at:
        // the grid's cells follow from the boxes).
        for (a, b) in [
            (Vector2::new(-5.0, 30.0), Vector2::new(105.0, 30.0)),
            (Vector2::new(40.0, -5.0), Vector2::new(40.0, 65.0)),
            (Vector2::new(50.0, 20.0), Vector2::new(50.0, 20.0)),
        ] {
            grid.near_segment(a, b, 0.7, &mut found);
            for (k, bx) in boxes.iter().enumerate() {
                let near = (0..=1000).any(|i| {
                    let p = a + (b - a) * (i as f64 / 1000.0);
                    let gap = (bx.0 - p).sup(&(p - bx.1)).sup(&Vector2::zeros());
                    gap.norm() <= 0.7
                });
                if near {
                    assert!(found.contains(&(k as u32)), "{k}");
                }
            }
        }
        for _ in 0..200 {
            let p = Vector2::new(110.0 * next() - 5.0, 70.0 * next() - 5.0);
            let mut asked = Vec::new();
            grid.any_near(p, 0.5, |k| {
                asked.push(k);
                false
            });
            let pad = Vector2::repeat(0.5);
            for (k, b) in boxes.iter().enumerate() {
                if meets(&(p - pad, p + pad), b) {
                    assert!(asked.contains(&(k as u32)), "{k}");
                }
            }
        }
        assert!(BoxGrid::new(&[]).is_none());
    }
}
