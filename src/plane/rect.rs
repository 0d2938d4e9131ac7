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

    /// The part of the closed polygon `ring` inside the rectangle, as one closed polygon
    /// (Sutherland and Hodgman, "Reentrant polygon clipping", CACM 17(1), 1974): a concave
    /// ring that leaves and comes back is joined along the edge by a bridge of no area,
    /// which fills nothing. Empty when nothing is inside.
    pub fn clip_polygon(&self, ring: &[ImagePoint]) -> Vec<ImagePoint> {
        let mut out = ring.to_vec();
        // Each side as (signed distance inside, where a segment crosses it).
        let sides: [&dyn Fn(ImagePoint) -> f64; 4] = [
            &|p| p.x - self.left,
            &|p| self.right - p.x,
            &|p| p.y - self.top,
            &|p| self.bottom - p.y,
        ];
        for inside in sides {
            let input = std::mem::take(&mut out);
            for (k, &b) in input.iter().enumerate() {
                let a = input[(k + input.len() - 1) % input.len()];
                let (da, db) = (inside(a), inside(b));
                if (da >= 0.0) != (db >= 0.0) {
                    let t = da / (da - db);
                    out.push(ImagePoint::new(
                        a.x + (b.x - a.x) * t,
                        a.y + (b.y - a.y) * t,
                    ));
                }
                if db >= 0.0 {
                    out.push(b);
                }
            }
        }
        out
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
    fn a_polygon_is_clipped_to_the_rectangle() {
        // A square half outside on the right: the part inside is a rectangle of half its
        // area (the shoelace formula).
        let r = Rect::from_ltrb(0.0, 0.0, 10.0, 10.0);
        let ring =
            [(5.0, 2.0), (15.0, 2.0), (15.0, 8.0), (5.0, 8.0)].map(|(x, y)| ImagePoint::new(x, y));
        let clipped = r.clip_polygon(&ring);
        let area: f64 = (0..clipped.len())
            .map(|k| {
                let (a, b) = (clipped[k], clipped[(k + 1) % clipped.len()]);
                a.x * b.y - b.x * a.y
            })
            .sum::<f64>()
            / 2.0;
        assert!((area - 30.0).abs() < 1e-9, "{clipped:?}");
        assert!(clipped.iter().all(|p| r.contains(*p)));
        let outside = ring.map(|p| ImagePoint::new(p.x + 20.0, p.y));
        assert!(r.clip_polygon(&outside).is_empty());
        // A rectangle away from the origin, cut on every side by a ring that reaches past
        // all four: what is left is the rectangle itself, 20 x 20.
        let away = Rect::from_ltrb(10.0, 20.0, 30.0, 40.0);
        let big = [(0.0, 0.0), (50.0, 0.0), (50.0, 60.0), (0.0, 60.0)]
            .map(|(x, y)| ImagePoint::new(x, y));
        let clipped = away.clip_polygon(&big);
        assert!((crate::plane::signed_area(&clipped).abs() - 400.0).abs() < 1e-9);
        assert!(clipped.iter().all(|p| away.contains(*p)), "{clipped:?}");
        // A diamond |dx| + |dy| <= 15 round the same centre (20, 30) cuts every side
        // slantwise: the square less four corner triangles with legs of 5, 400 - 4 x 12.5.
        let diamond = [(5.0, 30.0), (20.0, 15.0), (35.0, 30.0), (20.0, 45.0)]
            .map(|(x, y)| ImagePoint::new(x, y));
        let clipped = away.clip_polygon(&diamond);
        assert!((crate::plane::signed_area(&clipped).abs() - 350.0).abs() < 1e-9);
        assert!(clipped.iter().all(|p| away.contains(*p)), "{clipped:?}");
        // The diamond's corners lie outside, one beyond each side.
        assert!(diamond.iter().all(|p| !away.contains(*p)));
    }

    #[test]
    fn overlap_and_enclosure() {
        let a = Rect::from_ltrb(0.0, 0.0, 10.0, 10.0);
        assert!(a.overlaps(&Rect::from_ltrb(9.0, 9.0, 12.0, 12.0)));
        // Touching on any of the four sides is not overlapping.
        for touching in [
            Rect::from_ltrb(10.0, 0.0, 12.0, 12.0),
            Rect::from_ltrb(-2.0, 0.0, 0.0, 10.0),
            Rect::from_ltrb(0.0, 10.0, 10.0, 12.0),
            Rect::from_ltrb(0.0, -2.0, 10.0, 0.0),
        ] {
            assert!(!a.overlaps(&touching), "{touching:?}");
        }
        // Grown by 1 on every side: 12 across and down, round the same centre.
        let grown = Rect::from_ltrb(2.0, 3.0, 12.0, 13.0).grown(1.0);
        assert_eq!(grown, Rect::from_ltrb(1.0, 2.0, 13.0, 14.0));
        assert_eq!((grown.width(), grown.height()), (12.0, 12.0));
        let [first, second, third, fourth, last] = grown.outline();
        assert_eq!(first, last);
        assert_eq!(
            [first, second, third, fourth].map(|p| (p.x, p.y)),
            [(1.0, 2.0), (13.0, 2.0), (13.0, 14.0), (1.0, 14.0)]
        );
        assert!(a.encloses(&Rect::from_ltrb(0.0, 2.0, 10.0, 3.0)));
        assert!(!a.encloses(&Rect::from_ltrb(-0.1, 2.0, 10.0, 3.0)));
    }
}
