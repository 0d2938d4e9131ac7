//! A uniform grid of axis-aligned boxes in a plane, to find the few boxes that a box or a
//! segment may meet without trying them all. The shadows use it over the faces as the sun
//! sees them; the tone over the boxes of what hides a receiving plane.

use nalgebra::Vector2;

/// A box: its lowest and highest corner.
pub type Bounds = (Vector2<f64>, Vector2<f64>);

/// Boxes entered in the cells they reach of a grid over them all (about as many cells as
/// boxes, square, at most 512 a side).
pub struct BoxGrid {
    origin: Vector2<f64>,
    cell: f64,
    size: (usize, usize),
    cells: Vec<Vec<u32>>,
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
            origin: lo,
            cell,
            size,
            cells: vec![Vec::new(); size.0 * size.1],
        };
        for (k, b) in boxes.iter().enumerate() {
            let ((x0, y0), (x1, y1)) = (grid.at(&b.0), grid.at(&b.1));
            for y in y0..=y1 {
                for x in x0..=x1 {
                    grid.cells[y * size.0 + x].push(k as u32);
                }
            }
        }
        Some(grid)
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
        for y in y0..=y1 {
            for x in x0..=x1 {
                out.extend_from_slice(&self.cells[y * self.size.0 + x]);
            }
        }
        out.sort_unstable();
        out.dedup();
    }

    /// The boxes in the cells the segment from `a` to `b` passes through (in each row of
    /// cells, the band of the row it crosses, a little widened so that a segment along a
    /// cell's border is not lost to rounding), ascending and each once.
    pub fn along(&self, a: Vector2<f64>, b: Vector2<f64>, out: &mut Vec<u32>) {
        out.clear();
        let grid = |p: Vector2<f64>| (p - self.origin) / self.cell;
        let (pa, pb) = (grid(a), grid(b));
        let (w, h) = (self.size.0 as f64, self.size.1 as f64);
        let pad = 1e-6;
        let (ylo, yhi) = (pa.y.min(pb.y) - pad, pa.y.max(pb.y) + pad);
        if yhi < 0.0 || ylo >= h {
            return;
        }
        // The segment's x at the height y, its ends clamped; none for a level segment.
        let x_at = |y: f64| {
            (pb.y != pa.y).then(|| {
                let t = ((y - pa.y) / (pb.y - pa.y)).clamp(0.0, 1.0);
                pa.x + (pb.x - pa.x) * t
            })
        };
        let rows = (ylo.floor().max(0.0) as usize)..=(yhi.floor().min(h - 1.0) as usize);
        for row in rows {
            let (x0, x1) = match (x_at(row as f64), x_at(row as f64 + 1.0)) {
                (Some(p), Some(q)) => (p.min(q), p.max(q)),
                _ => (pa.x.min(pb.x), pa.x.max(pb.x)),
            };
            let (x0, x1) = (x0 - pad, x1 + pad);
            if x1 < 0.0 || x0 >= w {
                continue;
            }
            let (from, to) = (
                x0.floor().max(0.0) as usize,
                x1.floor().min(w - 1.0) as usize,
            );
            for x in from..=to {
                out.extend_from_slice(&self.cells[row * self.size.0 + x]);
            }
        }
        out.sort_unstable();
        out.dedup();
    }
}
