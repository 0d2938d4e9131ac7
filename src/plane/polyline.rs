//! A compact set of polylines in image pixels: one flat vertex buffer and the index where
//! each polyline starts, so that a drawing of 100,000 edges is two allocations, not 100,000.

use super::ImagePoint;

/// Many polylines in two flat buffers: their points, and where each one ends.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct PolylineSet {
    points: Vec<ImagePoint>,
    starts: Vec<usize>,
}

impl PolylineSet {
    /// No polylines.
    pub fn new() -> PolylineSet {
        PolylineSet::default()
    }

    /// An empty set with room for `lines` polylines of `points` vertices in all.
    pub fn with_capacity(lines: usize, points: usize) -> PolylineSet {
        PolylineSet {
            points: Vec::with_capacity(points),
            starts: Vec::with_capacity(lines),
        }
    }

    /// Starts a new polyline at `p`.
    pub fn move_to(&mut self, p: ImagePoint) {
        self.starts.push(self.points.len());
        self.points.push(p);
    }

    /// Extends the current polyline to `p`.
    pub fn line_to(&mut self, p: ImagePoint) {
        debug_assert!(!self.starts.is_empty(), "line_to before move_to");
        self.points.push(p);
    }

    /// Adds a whole polyline.
    pub fn push(&mut self, points: &[ImagePoint]) {
        if let Some((first, rest)) = points.split_first() {
            self.move_to(*first);
            self.points.extend_from_slice(rest);
        }
    }

    /// How many polylines.
    pub fn len(&self) -> usize {
        self.starts.len()
    }

    /// Whether there are none.
    pub fn is_empty(&self) -> bool {
        self.starts.is_empty()
    }

    /// How many points in all.
    pub fn vertex_count(&self) -> usize {
        self.points.len()
    }

    /// The last polyline, if any.
    pub fn last(&self) -> Option<&[ImagePoint]> {
        self.starts.last().map(|&s| &self.points[s..])
    }

    /// Every vertex of every polyline, in order.
    pub fn points(&self) -> &[ImagePoint] {
        &self.points
    }

    /// The strokes to draw, as index pairs into [`PolylineSet::points`]: each pair of
    /// consecutive vertices of a polyline, and `(i, i)` for a polyline of a single point.
    pub fn segment_indices(&self) -> impl Iterator<Item = (u32, u32)> + '_ {
        self.segment_indices_of(0..self.len())
    }

    /// [`PolylineSet::segment_indices`] of the polylines numbered in `lines` alone.
    pub fn segment_indices_of(
        &self,
        lines: std::ops::Range<usize>,
    ) -> impl Iterator<Item = (u32, u32)> + '_ {
        let first = lines.start;
        self.starts[lines]
            .iter()
            .enumerate()
            .flat_map(move |(i, &start)| {
                let i = first + i;
                let end = self.starts.get(i + 1).copied().unwrap_or(self.points.len());
                let single = (end - start == 1).then_some((start as u32, start as u32));
                (start..end.saturating_sub(1))
                    .map(|k| (k as u32, k as u32 + 1))
                    .chain(single)
            })
    }

    /// Each polyline's points, in order.
    pub fn iter(&self) -> impl Iterator<Item = &[ImagePoint]> + '_ {
        self.starts.iter().enumerate().map(|(i, &start)| {
            let end = self.starts.get(i + 1).copied().unwrap_or(self.points.len());
            &self.points[start..end]
        })
    }

    /// Room for `lines` more polylines of `points` more vertices in all.
    pub fn reserve(&mut self, lines: usize, points: usize) {
        self.starts.reserve(lines);
        self.points.reserve(points);
    }

    /// Moves every polyline of `other` to the end of this set.
    pub fn append(&mut self, other: &mut PolylineSet) {
        let offset = self.points.len();
        self.starts
            .extend(other.starts.drain(..).map(|s| s + offset));
        self.points.append(&mut other.points);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keeps_polylines_apart() {
        let mut set = PolylineSet::new();
        set.move_to(ImagePoint::new(0.0, 0.0));
        set.line_to(ImagePoint::new(1.0, 0.0));
        set.push(&[
            ImagePoint::new(5.0, 5.0),
            ImagePoint::new(6.0, 6.0),
            ImagePoint::new(7.0, 5.0),
        ]);
        let lines: Vec<_> = set.iter().collect();
        assert_eq!(lines.len(), 2);
        assert_eq!(lines[0].len(), 2);
        assert_eq!(lines[1].len(), 3);
        assert_eq!(set.vertex_count(), 5);
        let pairs: Vec<_> = set.segment_indices().collect();
        assert_eq!(pairs, vec![(0, 1), (2, 3), (3, 4)]);
        let mut dot = PolylineSet::new();
        dot.move_to(ImagePoint::new(1.0, 1.0));
        assert_eq!(dot.segment_indices().collect::<Vec<_>>(), vec![(0, 0)]);
        // A dot after a line: a stroke of its own point, wherever it starts.
        dot.push(&[ImagePoint::new(2.0, 2.0), ImagePoint::new(3.0, 2.0)]);
        dot.move_to(ImagePoint::new(4.0, 4.0));
        let strokes: Vec<_> = dot.segment_indices().collect();
        assert_eq!(strokes, vec![(0, 0), (1, 2), (3, 3)]);
        let mut more = PolylineSet::new();
        assert!(more.is_empty() && more.last().is_none());
        more.push(&[ImagePoint::new(9.0, 9.0), ImagePoint::new(8.0, 8.0)]);
        assert!(!more.is_empty());
        assert_eq!(set.last(), Some(lines[1]));
        set.append(&mut more);
        assert!(more.is_empty());
        assert_eq!(
            set.last(),
            Some(&[ImagePoint::new(9.0, 9.0), ImagePoint::new(8.0, 8.0)][..])
        );
        let lines: Vec<_> = set.iter().collect();
        assert_eq!(lines.len(), 3);
        assert_eq!(
            lines[2],
            &[ImagePoint::new(9.0, 9.0), ImagePoint::new(8.0, 8.0)]
        );
    }
}
