//! Axis-aligned rectangles in image or page pixels.

use super::ImagePoint;

/// An axis-aligned rectangle in drawing pixels (x right, y down).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Rect {
    /// The left edge.
    pub left: f64,
    /// The top edge (y grows downwards).
    pub top: f64,
    /// The right edge.
    pub right: f64,
    /// The bottom edge.
    pub bottom: f64,
}

impl Rect {
    /// The rectangle between these edges.
    pub fn from_ltrb(left: f64, top: f64, right: f64, bottom: f64) -> Rect {
        Rect {
            left,
            top,
            right,
            bottom,
        }
    }

    /// Whether `p` lies inside or on the edge.
    pub fn contains(&self, p: ImagePoint) -> bool {
        p.x >= self.left && p.x <= self.right && p.y >= self.top && p.y <= self.bottom
    }

    /// Whether `inner` lies wholly inside this rectangle (edges may touch).
    pub fn encloses(&self, inner: &Rect) -> bool {
        inner.left >= self.left
            && inner.right <= self.right
            && inner.top >= self.top
            && inner.bottom <= self.bottom
    }

    /// Whether the two rectangles share some area (touching edges do not count).
    pub fn overlaps(&self, other: &Rect) -> bool {
        self.left < other.right
            && other.left < self.right
            && self.top < other.bottom
            && other.top < self.bottom
    }

    /// The rectangle grown by `by` on every side.
    pub fn grown(&self, by: f64) -> Rect {
        Rect::from_ltrb(
            self.left - by,
            self.top - by,
            self.right + by,
            self.bottom + by,
        )
    }

    /// Its width.
    pub fn width(&self) -> f64 {
        self.right - self.left
    }

    /// Its height.
    pub fn height(&self) -> f64 {
        self.bottom - self.top
    }

    /// The corners, closed: a polyline round the rectangle.
    pub fn outline(&self) -> [ImagePoint; 5] {
        [
            ImagePoint::new(self.left, self.top),
            ImagePoint::new(self.right, self.top),
            ImagePoint::new(self.right, self.bottom),
            ImagePoint::new(self.left, self.bottom),
            ImagePoint::new(self.left, self.top),
        ]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn overlap_and_enclosure() {
        let a = Rect::from_ltrb(0.0, 0.0, 10.0, 10.0);
        assert!(a.overlaps(&Rect::from_ltrb(9.0, 9.0, 12.0, 12.0)));
        assert!(
            !a.overlaps(&Rect::from_ltrb(10.0, 0.0, 12.0, 12.0)),
            "touching"
        );
        assert!(a.encloses(&Rect::from_ltrb(0.0, 2.0, 10.0, 3.0)));
        assert!(!a.encloses(&Rect::from_ltrb(-0.1, 2.0, 10.0, 3.0)));
    }
}
