//! What every item writes into the site: edges, faces, outlines and markers, given in the
//! item's own coordinates and placed by a [`Placement`] (the scene's unit, and the moves of
//! the groups and repeats the item sits in).

use super::outline::RoundOutline;
use super::site::{Edge, EllipseArc, ItemId, Marker, Outline, Site, SiteCurve};
use nalgebra::{Point3, Vector2, Vector3};
use std::collections::HashSet;
use std::f64::consts::TAU;

/// A similarity that keeps the vertical vertical: scale by the scene's unit, turn about the
/// vertical (clockwise seen from above, like an azimuth), then shift.
///
/// `site = scale * turn(local) + shift`, with `shift` in metres.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Placement {
    /// Metres per unit of the scene file.
    pub scale: f64,
    /// Radians clockwise seen from above.
    pub turn: f64,
    /// Metres.
    pub shift: Vector3<f64>,
    /// The sine and cosine of `turn`, worked out once: every point of every item is placed.
    sin_cos: (f64, f64),
}

impl Placement {
    /// Lengths in the given unit (metres per unit), nothing moved.
    pub fn in_unit(metres_per_unit: f64) -> Placement {
        Placement {
            scale: metres_per_unit,
            turn: 0.0,
            shift: Vector3::zeros(),
            sin_cos: (0.0, 1.0),
        }
    }

    /// This placement applied after moving by `offset` (scene units) and turning by
    /// `turn` (radians clockwise): the placement of something inside a group.
    pub fn then_move(&self, offset: Vector3<f64>, turn: f64) -> Placement {
        let turn = self.turn + turn;
        Placement {
            scale: self.scale,
            turn,
            shift: self.shift + self.vector(&offset),
            sin_cos: sin_cos_of_turn(turn),
        }
    }

    pub fn point(&self, p: &Point3<f64>) -> Point3<f64> {
        Point3::from(self.vector(&p.coords) + self.shift)
    }

    /// A direction or displacement: scaled and turned, not shifted.
    pub fn vector(&self, v: &Vector3<f64>) -> Vector3<f64> {
        let (sin, cos) = self.sin_cos;
        Vector3::new(v.x * cos + v.y * sin, -v.x * sin + v.y * cos, v.z) * self.scale
    }

    pub fn length(&self, l: f64) -> f64 {
        l * self.scale
    }

    /// The site point `p` in this placement's own coordinates: the inverse of
    /// [`Placement::point`].
    pub fn local_point(&self, p: &Point3<f64>) -> Point3<f64> {
        Point3::from(self.local_vector(&(p.coords - self.shift)))
    }

    /// The site displacement `v` in this placement's own coordinates: the inverse of
    /// [`Placement::vector`] (a turn is undone by its transpose, the scale by dividing).
    pub fn local_vector(&self, v: &Vector3<f64>) -> Vector3<f64> {
        let (sin, cos) = self.sin_cos;
        Vector3::new(v.x * cos - v.y * sin, v.x * sin + v.y * cos, v.z) / self.scale
    }
}

/// Sine and cosine, exact at whole quarter turns: buildings square to the compass are
/// the usual case, and their corners should land on the numbers written in the scene.
pub fn sin_cos_of_turn(angle: f64) -> (f64, f64) {
    let quarters = angle / (TAU / 4.0);
    let nearest = quarters.round();
    if (quarters - nearest).abs() < 1e-12 {
        match (nearest as i64).rem_euclid(4) {
            0 => (0.0, 1.0),
            1 => (1.0, 0.0),
            2 => (0.0, -1.0),
            _ => (-1.0, 0.0),
        }
    } else {
        angle.sin_cos()
    }
}

/// The unit plan vector pointing at an azimuth (radians clockwise from north).
pub fn plan_direction(azimuth: f64) -> Vector2<f64> {
    let (sin, cos) = sin_cos_of_turn(azimuth);
    Vector2::new(sin, cos)
}

/// Curved faces are cut into flat pieces no wider than this angle (radians) for hidden
/// lines: the gap between a circle of radius r and the pieces is r (1 - cos(angle / 2)),
/// under 0.06 % of r. The drawn edges stay exact curves.
pub const FACET_ANGLE: f64 = TAU / 96.0;

/// How many flat pieces a curved face sweeping `sweep` radians is cut into.
pub fn facet_count(sweep: f64) -> usize {
    ((sweep.abs() / FACET_ANGLE).ceil() as usize).max(1)
}

/// `count + 1` points along `centre + u cos t + v sin t` for t from `start` to `start + sweep`.
pub fn ellipse_points(
    centre: Point3<f64>,
    u: Vector3<f64>,
    v: Vector3<f64>,
    start: f64,
    sweep: f64,
    count: usize,
) -> Vec<Point3<f64>> {
    let arc = EllipseArc {
        centre,
        u,
        v,
        start,
        sweep,
    };
    // The angle as `start + sweep i / count` (not `along`'s `sweep (i / count)`), so that
    // the facets' corners keep the numbers they have always had.
    (0..=count)
        .map(|i| arc.at(start + sweep * i as f64 / count as f64))
        .collect()
}

/// Writes one item into the site.
///
/// A segment given twice (a wall's top that is also the eaves of its roof) is drawn once:
/// ends that agree to a micrometre are taken as the same.
pub struct ItemBuilder<'a> {
    site: &'a mut Site,
    item: ItemId,
    place: Placement,
    drawn: Drawn,
}

/// The segments an item has drawn, by their ends in micrometres: a short list while the
/// item is small (a house has a dozen or two, and hashing each was a noticeable part of a
/// town of them), a set once it grows.
#[derive(Default)]
struct Drawn {
    few: Vec<[i64; 6]>,
    many: HashSet<[i64; 6]>,
}

/// Segments kept in the list before they move to the set.
const FEW_SEGMENTS: usize = 32;

impl Drawn {
    fn contains(&self, key: &[i64; 6]) -> bool {
        self.few.contains(key) || self.many.contains(key)
    }

    /// Adds a key; false if it was there.
    fn insert(&mut self, key: [i64; 6]) -> bool {
        if self.contains(&key) {
            return false;
        }
        if self.few.len() < FEW_SEGMENTS {
            self.few.push(key);
        } else {
            self.many.insert(key);
        }
        true
    }
}

impl<'a> ItemBuilder<'a> {
    pub fn new(site: &'a mut Site, item: ItemId, place: Placement) -> ItemBuilder<'a> {
        ItemBuilder {
            site,
            item,
            place,
            drawn: Drawn::default(),
        }
    }

    /// Names a point of the item by what it is (in this builder's coordinates).
    pub fn name_point(&mut self, at: Point3<f64>, name: impl Into<String>) {
        let at = self.place.point(&at);
        self.site.named_points.push(super::site::NamedPoint {
            at,
            item: self.item,
            name: name.into(),
        });
    }

    /// Adds a placed road, to be joined with the others and drawn at the end.
    pub fn add_road(&mut self, road: super::items::RoadLine) {
        self.site.roads.push(road);
    }

    /// Adds a placed round place, drawn at the end with the roads that end in it.
    pub fn add_place(&mut self, place: super::items::PlaceLine) {
        self.site.places.push(place);
    }

    /// Names the junction at (or near) `at` in plan, site coordinates, with this item.
    pub fn add_junction_name(&mut self, at: nalgebra::Vector2<f64>) {
        self.site.junction_names.push((self.item, at));
    }

    /// The site's sloping ground, if it has one.
    pub fn ground(&self) -> Option<&super::ground::Ground> {
        self.site.ground.as_ref()
    }

    /// The item being built.
    pub fn item(&self) -> ItemId {
        self.item
    }

    /// Where this builder puts the item's coordinates in the site.
    pub fn placement(&self) -> Placement {
        self.place
    }

    /// Shapes given in a frame of their own: `offset` (in this builder's coordinates) is
    /// their origin and `turn` (radians clockwise seen from above) their rotation.
    pub fn move_by(&mut self, offset: Vector3<f64>, turn: f64) {
        self.place = self.place.then_move(offset, turn);
    }

    /// Metres per unit of the scene file: for items of true size, given in metres.
    pub fn metres_per_unit(&self) -> f64 {
        self.place.scale
    }

    pub fn segment(&mut self, start: Point3<f64>, end: Point3<f64>) {
        if start == end {
            return;
        }
        let key = |a: &Point3<f64>, b: &Point3<f64>| {
            let micrometres = |p: &Point3<f64>| p.coords.map(|c| (c * 1e6).round() as i64);
            let (a, b) = (micrometres(a), micrometres(b));
            [a.x, a.y, a.z, b.x, b.y, b.z]
        };
        let (start, end) = (self.place.point(&start), self.place.point(&end));
        if !self.drawn.insert(key(&start, &end)) || self.drawn.contains(&key(&end, &start)) {
            return;
        }
        self.site.add_segment(self.item, start, end);
    }

    /// Segments joining the points in order, and the last back to the first if `closed`.
    pub fn path(&mut self, points: &[Point3<f64>], closed: bool) {
        for pair in points.windows(2) {
            self.segment(pair[0], pair[1]);
        }
        if closed && points.len() > 2 {
            self.segment(points[points.len() - 1], points[0]);
        }
    }

    /// The arc `centre + u cos t + v sin t`, t from `start` through `sweep` radians.
    pub fn ellipse(
        &mut self,
        centre: Point3<f64>,
        u: Vector3<f64>,
        v: Vector3<f64>,
        start: f64,
        sweep: f64,
    ) {
        self.site.edges.push(Edge {
            curve: SiteCurve::from(EllipseArc {
                centre: self.place.point(&centre),
                u: self.place.vector(&u),
                v: self.place.vector(&v),
                start,
                sweep,
            }),
            item: self.item,
        });
    }

    /// A horizontal circle.
    pub fn circle(&mut self, centre: Point3<f64>, radius: f64) {
        self.ellipse(
            centre,
            Vector3::x() * radius,
            Vector3::y() * radius,
            0.0,
            TAU,
        );
    }

    /// A flat face bounded by `outer`, with `holes` cut out of it (all in one plane,
    /// any winding); cut into triangles. Faces hide, they are not drawn: items draw their
    /// edges themselves.
    pub fn face(&mut self, outer: &[Point3<f64>], holes: &[Vec<Point3<f64>>]) {
        let placed: Vec<Point3<f64>> = outer
            .iter()
            .chain(holes.iter().flatten())
            .map(|p| self.place.point(p))
            .collect();
        let mut hole_starts = Vec::with_capacity(holes.len());
        let mut next = outer.len();
        for hole in holes {
            hole_starts.push(next);
            next += hole.len();
        }
        let triangles = triangulate(&placed, &hole_starts);
        let flat = triangles.into_iter().map(|t| (t, 0.0));
        self.site.faces.add_sharing(&placed, flat, self.item);
    }

    /// The faces between two rows of points that run side by side (a curved strip: a
    /// column's side, a soffit, a vault), as quads cut into triangles.
    ///
    /// The rows are points of a curved surface [`FACET_ANGLE`] or less apart in angle, so
    /// each piece stands off the true surface by at most the sagitta of its chord c:
    /// (c / 2) tan(angle / 4) (the chord and the arc of a circle); that is the faces'
    /// slack.
    pub fn strip(&mut self, a: &[Point3<f64>], b: &[Point3<f64>]) {
        // Both rows as one list of corners, the second row's numbers after the first's.
        let rows: Vec<Point3<f64>> = a.iter().chain(b).map(|p| self.place.point(p)).collect();
        let (a, b) = rows.split_at(a.len());
        let second = a.len();
        let bow = (FACET_ANGLE / 4.0).tan() / 2.0;
        let quads = (0..a.len().min(b.len()).saturating_sub(1)).flat_map(|i| {
            let chord = (a[i + 1] - a[i]).norm().max((b[i + 1] - b[i]).norm());
            let slack = (chord * bow) as f32;
            let (a0, a1, b0, b1) = (i, i + 1, second + i, second + i + 1);
            [([a0, a1, b1], slack), ([a0, b1, b0], slack)]
        });
        let triangles: Vec<([usize; 3], f32)> = quads.filter(|(t, _)| has_area(&rows, t)).collect();
        self.site.faces.add_sharing(&rows, triangles, self.item);
    }

    /// A flat convex face (a column's lid): a fan of triangles from its first corner,
    /// without the general triangulator.
    pub fn convex_face(&mut self, corners: &[Point3<f64>]) {
        let placed: Vec<Point3<f64>> = corners.iter().map(|p| self.place.point(p)).collect();
        let fan: Vec<([usize; 3], f32)> = (1..placed.len().saturating_sub(1))
            .map(|k| ([0, k, k + 1], 0.0))
            .filter(|(t, _)| has_area(&placed, t))
            .collect();
        self.site.faces.add_sharing(&placed, fan, self.item);
    }

    /// A vertical cylinder whose two outline generators are found from each eye.
    pub fn round_outline(&mut self, shape: RoundOutline) {
        let shape = match shape {
            RoundOutline::Cylinder {
                base,
                radius,
                height,
            } => RoundOutline::Cylinder {
                base: self.place.point(&base),
                radius: self.place.length(radius),
                height: self.place.length(height),
            },
            RoundOutline::Cone {
                base,
                radius,
                height,
            } => RoundOutline::Cone {
                base: self.place.point(&base),
                radius: self.place.length(radius),
                height: self.place.length(height),
            },
            RoundOutline::Barrel { ends, up } => RoundOutline::Barrel {
                ends: ends.map(|(centre, u)| (self.place.point(&centre), self.place.vector(&u))),
                up: self.place.vector(&up),
            },
            RoundOutline::Sphere { centre, radius } => RoundOutline::Sphere {
                centre: self.place.point(&centre),
                radius: self.place.length(radius),
            },
            RoundOutline::Dome {
                centre,
                radius,
                height,
            } => RoundOutline::Dome {
                centre: self.place.point(&centre),
                radius: self.place.length(radius),
                height: self.place.length(height),
            },
        };
        self.site.outlines.push(Outline {
            shape,
            item: self.item,
        });
    }

    /// Notes something that looks wrong but can still be drawn.
    pub fn warn(&mut self, message: impl Into<String>) {
        self.site.warnings.push((self.item, message.into()));
    }

    /// A direction of the item that no edge runs along (a stair's rake), for the
    /// vanishing points.
    pub fn axis(&mut self, direction: Vector3<f64>) {
        let direction = self.place.vector(&direction);
        self.site.axes.push(super::site::Axis {
            direction,
            item: self.item,
        });
    }

    pub fn marker(&mut self, at: Point3<f64>) {
        let at = self.place.point(&at);
        self.site.markers.push(Marker {
            at,
            item: self.item,
        });
    }
}

/// Whether the triangle of these corners (numbers into `points`) has an area: one of
/// none hides nothing and is left out.
fn has_area(points: &[Point3<f64>], &[a, b, c]: &[usize; 3]) -> bool {
    let area2 = (points[b] - points[a]).cross(&(points[c] - points[a]));
    area2.norm_squared() > 0.0
}

/// Triangles (vertex indices) covering a flat polygon with holes. The polygon is laid flat
/// on the coordinate plane it is most nearly parallel to (the largest component of its
/// Newell normal), which keeps its shape free of folds.
pub fn triangulate(points: &[Point3<f64>], hole_starts: &[usize]) -> Vec<[usize; 3]> {
    let outer = hole_starts.first().copied().unwrap_or(points.len());
    let normal = newell_normal(&points[..outer]);
    let (a, b) = match normal.iamax() {
        0 => (1, 2),
        1 => (2, 0),
        _ => (0, 1),
    };
    let flat: Vec<[f64; 2]> = points.iter().map(|p| [p[a], p[b]]).collect();
    let mut indices: Vec<usize> = Vec::new();
    earcut::Earcut::new().earcut(flat.iter().copied(), hole_starts, &mut indices);
    indices
        .chunks_exact(3)
        .map(|t| [t[0], t[1], t[2]])
        .collect()
}

/// Newell's normal of a polygon (twice its vector area): exact for a flat polygon.
pub fn newell_normal(points: &[Point3<f64>]) -> Vector3<f64> {
    let mut normal = Vector3::zeros();
    for (i, p) in points.iter().enumerate() {
        let q = points[(i + 1) % points.len()];
        normal += p.coords.cross(&q.coords);
    }
    normal
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::PI;

    #[test]
    fn quarter_turn_clockwise_takes_north_to_east() {
        let quarter = Placement::in_unit(1.0).then_move(Vector3::zeros(), PI / 2.0);
        let v = quarter.vector(&Vector3::new(0.0, 1.0, 0.0));
        assert_eq!(v, Vector3::new(1.0, 0.0, 0.0));
    }

    #[test]
    fn placements_compose_in_order() {
        // A group at (10, 0) turned a quarter clockwise holds a point 1 unit north of its
        // origin: the point lands 1 unit east of (10, 0), in feet.
        let feet = Placement::in_unit(0.3048);
        let group = feet.then_move(Vector3::new(10.0, 0.0, 0.0), PI / 2.0);
        let p = group.point(&Point3::new(0.0, 1.0, 2.0));
        let expected = Point3::new(11.0 * 0.3048, 0.0, 2.0 * 0.3048);
        assert!((p - expected).norm() < 1e-12, "{p}");
    }

    #[test]
    fn local_coordinates_undo_the_placement() {
        // A point 1 unit north of a group at (10, 0) turned a quarter clockwise, in feet,
        // lands at (11, 0, 2) feet (the test above); taken back, it is (0, 1, 2) again.
        let group = Placement::in_unit(0.3048).then_move(Vector3::new(10.0, 0.0, 0.0), PI / 2.0);
        let site = Point3::new(11.0 * 0.3048, 0.0, 2.0 * 0.3048);
        let back = group.local_point(&site);
        assert!((back - Point3::new(0.0, 1.0, 2.0)).norm() < 1e-12, "{back}");
        // At any turn, the two are inverses.
        let turned = Placement::in_unit(2.0).then_move(Vector3::new(3.0, -4.0, 5.0), 0.7);
        let p = Point3::new(1.5, -2.5, 0.25);
        let round_trip = turned.local_point(&turned.point(&p));
        assert!((round_trip - p).norm() < 1e-12, "{round_trip}");
    }

    #[test]
    fn square_with_square_hole_is_eight_triangles() {
        let mut site = Site::default();
        let id = site.add_item("test", None);
        let square = |h: f64| {
            vec![
                Point3::new(-h, 0.0, -h),
                Point3::new(h, 0.0, -h),
                Point3::new(h, 0.0, h),
                Point3::new(-h, 0.0, h),
            ]
        };
        ItemBuilder::new(&mut site, id, Placement::in_unit(1.0)).face(&square(2.0), &[square(1.0)]);
        assert_eq!(site.faces.len(), 8);
        // The triangles cover the ring's area, 16 - 4.
        let area: f64 = site
            .faces
            .iter()
            .map(|f| {
                let [a, b, c] = f.corners;
                (b - a).cross(&(c - a)).norm() / 2.0
            })
            .sum();
        assert!((area - 12.0).abs() < 1e-12, "{area}");
    }
}
