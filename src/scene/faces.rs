//! The site's triangles, kept small: each face three numbers into one list of corner
//! points, which the faces of a mesh share as its welded vertices do.
//!
//! A million-triangle model would otherwise write each corner out again for each face
//! meeting there (80 bytes a face against 20, plus the vertices once), and writing is what
//! loading a big model spends most on. Readers get whole [`Face`]s, corners looked up.

use nalgebra::Point3;
use rayon::prelude::*;

use super::site::ItemId;

/// A triangle that hides what lies behind it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Face {
    /// The triangle's corners, in site coordinates.
    pub corners: [Point3<f64>; 3],
    /// The item it belongs to.
    pub item: ItemId,
    /// How far (metres) the true surface may stand off this flat piece of it: 0 for a flat
    /// face, the sagitta of the facet for a piece of a curved surface. Edges drawn on the
    /// true surface lie up to this far behind the facet, and must not be hidden by it.
    pub slack: f32,
}

impl Face {
    /// Whether its corners and slack are finite (its item's arithmetic gave no NaN or
    /// infinity).
    pub fn is_finite(&self) -> bool {
        let corners = self.corners.iter().flat_map(|corner| corner.iter());
        corners.copied().all(f64::is_finite) && self.slack.is_finite()
    }
}

/// A face as kept: its corners by number in [`Faces`]' points.
#[derive(Clone, Copy, Debug, PartialEq)]
struct Stored {
    corners: [u32; 3],
    item: ItemId,
    slack: f32,
}

/// The triangles of a site, in the order they were added.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Faces {
    points: Vec<Point3<f64>>,
    faces: Vec<Stored>,
}

impl Faces {
    /// No faces.
    pub fn new() -> Faces {
        Faces::default()
    }

    /// How many faces.
    pub fn len(&self) -> usize {
        self.faces.len()
    }

    /// Whether there are none.
    pub fn is_empty(&self) -> bool {
        self.faces.is_empty()
    }

    /// The face at `index`, its corners looked up. Panics past the end, as a slice does.
    #[inline]
    pub fn get(&self, index: usize) -> Face {
        self.resolve(&self.faces[index])
    }

    /// Every face, in order.
    pub fn iter(&self) -> FaceIter<'_> {
        FaceIter {
            points: &self.points,
            stored: self.faces.iter(),
        }
    }

    /// Whether the faces from `start` on have finite corners and slack (see
    /// [`Face::is_finite`]), without building each face.
    pub fn are_finite_from(&self, start: usize) -> bool {
        let finite = |c: u32| self.points[c as usize].iter().all(|v| v.is_finite());
        self.faces[start..]
            .iter()
            .all(|face| face.slack.is_finite() && face.corners.into_iter().all(finite))
    }

    /// Adds faces of one item over these corner points, which join the list once: each
    /// triangle as three numbers into `points`, with its slack.
    pub fn add_sharing(
        &mut self,
        points: &[Point3<f64>],
        triangles: impl IntoIterator<Item = ([usize; 3], f32)>,
        item: ItemId,
    ) {
        let base = self.points.len();
        self.points.extend_from_slice(points);
        self.faces
            .extend(triangles.into_iter().map(|(corners, slack)| Stored {
                corners: corners.map(|c| (base + c) as u32),
                item,
                slack,
            }));
    }

    /// Adds a face with corners of its own.
    pub fn push(&mut self, face: Face) {
        self.add_sharing(&face.corners, [([0, 1, 2], face.slack)], face.item);
    }

    /// Keeps the first `len` faces, and drops the points that only the others used
    /// (points join with the faces that bring them, so those are the last ones).
    pub fn truncate(&mut self, len: usize) {
        if let Some(first_dropped) = self.faces[len.min(self.faces.len())..]
            .iter()
            .flat_map(|face| face.corners)
            .min()
        {
            self.points.truncate(first_dropped as usize);
        }
        self.faces.truncate(len);
    }

    /// Drops every face and point.
    pub fn clear(&mut self) {
        self.points.clear();
        self.faces.clear();
    }

    /// Adds flat faces (no slack) whose corners are numbers into `points`, which join the
    /// list as they are: a mesh's triangles over its welded vertices, written on all
    /// cores.
    pub fn extend_sharing(
        &mut self,
        points: Vec<Point3<f64>>,
        triangles: impl IndexedParallelIterator<Item = ([u32; 3], ItemId)>,
    ) {
        let base = self.points.len() as u32;
        if self.points.is_empty() {
            self.points = points;
        } else {
            self.points.extend_from_slice(&points);
        }
        self.faces.reserve(triangles.len());
        self.faces
            .par_extend(triangles.map(|(corners, item)| Stored {
                corners: corners.map(|c| base + c),
                item,
                slack: 0.0,
            }));
    }

    /// Moves every corner by `change` (the hierarchy's tests mirror a model this way).
    pub fn map_points(&mut self, change: impl Fn(Point3<f64>) -> Point3<f64>) {
        for point in &mut self.points {
            *point = change(*point);
        }
    }

    #[inline]
    fn resolve(&self, stored: &Stored) -> Face {
        stored.resolve(&self.points)
    }
}

impl Stored {
    #[inline]
    fn resolve(&self, points: &[Point3<f64>]) -> Face {
        let [a, b, c] = self.corners;
        Face {
            corners: [points[a as usize], points[b as usize], points[c as usize]],
            item: self.item,
            slack: self.slack,
        }
    }
}

/// The faces of [`Faces`] in order, each with its corners looked up.
#[derive(Clone, Debug)]
pub struct FaceIter<'a> {
    points: &'a [Point3<f64>],
    stored: std::slice::Iter<'a, Stored>,
}

impl Iterator for FaceIter<'_> {
    type Item = Face;

    #[inline]
    fn next(&mut self) -> Option<Face> {
        self.stored.next().map(|s| s.resolve(self.points))
    }

    fn size_hint(&self) -> (usize, Option<usize>) {
        self.stored.size_hint()
    }
}

impl ExactSizeIterator for FaceIter<'_> {}

impl<'a> IntoIterator for &'a Faces {
    type Item = Face;
    type IntoIter = FaceIter<'a>;

    fn into_iter(self) -> FaceIter<'a> {
        self.iter()
    }
}

impl FromIterator<Face> for Faces {
    fn from_iter<I: IntoIterator<Item = Face>>(faces: I) -> Faces {
        let mut all = Faces::new();
        all.extend(faces);
        all
    }
}

impl<const N: usize> From<[Face; N]> for Faces {
    fn from(faces: [Face; N]) -> Faces {
        faces.into_iter().collect()
    }
}

impl Extend<Face> for Faces {
    fn extend<I: IntoIterator<Item = Face>>(&mut self, faces: I) {
        for face in faces {
            self.push(face);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_face_is_finite_only_when_its_corners_and_slack_are() {
        let face = Face {
            corners: [
                Point3::origin(),
                Point3::new(1.0, 0.0, 0.0),
                Point3::new(0.0, 1.0, 0.0),
            ],
            item: ItemId(0),
            slack: 0.0,
        };
        assert!(face.is_finite());
        for (corner, axis, value) in [
            (0, 0, f64::NAN),
            (1, 1, f64::INFINITY),
            (2, 2, f64::NEG_INFINITY),
        ] {
            let mut broken = face;
            broken.corners[corner][axis] = value;
            assert!(!broken.is_finite(), "corner {corner}, axis {axis}: {value}");
        }
        assert!(!Face {
            slack: f32::NAN,
            ..face
        }
        .is_finite());
    }

    fn triangle(x: f64, item: u32) -> Face {
        Face {
            corners: [
                Point3::new(x, 0.0, 0.0),
                Point3::new(x + 1.0, 0.0, 0.0),
                Point3::new(x, 1.0, 0.0),
            ],
            item: ItemId(item),
            slack: 0.5,
        }
    }

    #[test]
    fn faces_come_back_as_they_went_in_and_a_mesh_shares_its_points() {
        let mut faces = Faces::from([triangle(0.0, 0), triangle(5.0, 1)]);
        // A mesh of two triangles over four vertices, added after: its numbers count from
        // its own first point.
        let square = vec![
            Point3::new(0.0, 0.0, 1.0),
            Point3::new(1.0, 0.0, 1.0),
            Point3::new(1.0, 1.0, 1.0),
            Point3::new(0.0, 1.0, 1.0),
        ];
        let halves = [([0, 1, 2], ItemId(2)), ([0, 2, 3], ItemId(2))];
        faces.extend_sharing(square.clone(), halves.par_iter().copied());
        assert_eq!(faces.len(), 4);
        assert_eq!(
            faces.points.len(),
            3 + 3 + 4,
            "the mesh's corners are kept once"
        );
        assert_eq!(faces.get(1), triangle(5.0, 1));
        let upper = faces.get(3);
        assert_eq!(upper.corners, [square[0], square[2], square[3]]);
        assert_eq!((upper.item, upper.slack), (ItemId(2), 0.0));
        let all: Vec<Face> = faces.iter().collect();
        assert_eq!(all.len(), 4);
        assert_eq!(all[0], triangle(0.0, 0));
        assert_eq!(all[3], upper);
    }

    #[test]
    fn an_items_faces_share_the_corners_it_gives_once() {
        // A unit square as a fan of two triangles over its four corners, each with its
        // slack, after a face of its own.
        let mut faces = Faces::from([triangle(0.0, 0)]);
        let square = [
            Point3::new(0.0, 0.0, 2.0),
            Point3::new(1.0, 0.0, 2.0),
            Point3::new(1.0, 1.0, 2.0),
            Point3::new(0.0, 1.0, 2.0),
        ];
        let fan = [([0, 1, 2], 0.25), ([0, 2, 3], 0.5)];
        faces.add_sharing(&square, fan, ItemId(7));
        assert_eq!(faces.points.len(), 3 + 4);
        assert_eq!(
            faces.get(2),
            Face {
                corners: [square[0], square[2], square[3]],
                item: ItemId(7),
                slack: 0.5,
            }
        );
        assert!(faces.are_finite_from(0));
        faces.map_points(|p| Point3::new(p.x, p.y, if p.z > 1.0 { f64::NAN } else { p.z }));
        assert!(!faces.are_finite_from(1));
        assert!(faces.get(0).is_finite());
    }

    #[test]
    fn truncating_drops_the_points_only_the_dropped_faces_used() {
        let mut faces = Faces::from([triangle(0.0, 0), triangle(5.0, 1), triangle(9.0, 2)]);
        faces.truncate(1);
        assert_eq!((faces.len(), faces.points.len()), (1, 3));
        faces.push(triangle(7.0, 3));
        assert_eq!(faces.get(1), triangle(7.0, 3));
        faces.truncate(5);
        assert_eq!(faces.len(), 2);
        faces.truncate(0);
        assert!(faces.is_empty() && faces.points.is_empty());
    }

    /// A million mesh triangles write a fifth of what whole corners would (80 bytes).
    #[test]
    fn a_kept_face_is_20_bytes() {
        assert_eq!(std::mem::size_of::<Stored>(), 20);
        assert_eq!(std::mem::size_of::<Face>(), 80);
    }

    #[test]
    fn clearing_drops_every_face_and_point_and_later_faces_number_from_zero() {
        // Worked by hand: two triangles of three corners each, then nothing; a face pushed
        // after is the only one, over its own three points.
        let mut faces = Faces::from([triangle(0.0, 0), triangle(5.0, 1)]);
        assert!(!faces.is_empty());
        faces.clear();
        assert!(faces.is_empty() && faces.points.is_empty());
        faces.push(triangle(7.0, 3));
        assert_eq!((faces.len(), faces.points.len()), (1, 3));
        assert_eq!(faces.get(0), triangle(7.0, 3));
    }

    #[test]
    fn the_iterator_tells_exactly_how_many_faces_are_left() {
        // An ExactSizeIterator's size_hint must be exact, (n, Some(n)), and its len() reads
        // it (the standard library's documentation of the trait): callers size their
        // buffers by it. Worked by hand: three faces, then two, then none.
        let faces = Faces::from([triangle(0.0, 0), triangle(5.0, 1), triangle(9.0, 2)]);
        let mut iter = faces.iter();
        assert_eq!(iter.size_hint(), (3, Some(3)));
        iter.next();
        assert_eq!(iter.len(), 2);
        assert_eq!(iter.by_ref().count(), 2);
        assert_eq!(iter.size_hint(), (0, Some(0)));
    }
}
