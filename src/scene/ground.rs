//! Sloping ground: a surface through spot heights, contour lines and break lines, cut into
//! triangles by a constrained Delaunay triangulation (the `spade` crate), with every
//! contour segment and break line kept as an edge of the triangles, so that the surface
//! never cuts across a contour or smooths over a break line.
//!
//! The triangles are faces for hidden lines (a hill hides what lies behind it), and give
//! the height of the ground anywhere inside it: items and standpoints can stand on it.

use super::numbers::{Finite, Plan, Spot};
use super::site::{Edge, EllipseArc, Face, ItemId, Site, SiteCurve};
use nalgebra::{Point3, Vector2};
use serde::Deserialize;
use spade::{ConstrainedDelaunayTriangulation, Point2, Triangulation};

/// How the ground is drawn.
#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq, Eq)]
pub enum GroundDraw {
    /// Every edge of its triangles: a faint surface grid.
    #[default]
    Grid,
    /// Only its outline and break lines.
    Outline,
}

/// A contour line: points in plan, all at one height.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ContourSpec {
    pub height: Finite,
    pub points: Vec<Plan>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GroundSpec {
    /// Points with their heights.
    #[serde(default)]
    pub spots: Vec<Spot>,
    #[serde(default)]
    pub contours: Vec<ContourSpec>,
    /// Lines where the slope changes sharply (the top of a bank, a ditch), with heights.
    #[serde(default)]
    pub break_lines: Vec<Vec<Spot>>,
    #[serde(default)]
    pub draw: GroundDraw,
    /// The layer the ground is drawn on: `ground` if not given (faint unless styled).
    #[serde(default)]
    pub layer: Option<String>,
}

/// Metres: how far a line drawn on the ground (its own edges, a road laid on it) may lie
/// behind the ground's faces and still be seen. Without it, rounding would hide half of
/// every line lying in a face's plane; things behind a hill lie much further behind.
const GROUND_SLACK: f32 = 0.05;

/// The ground surface, resolved into site coordinates.
#[derive(Clone, Debug, PartialEq)]
pub struct Ground {
    /// The triangles of the surface, in site coordinates.
    pub triangles: Vec<[Point3<f64>; 3]>,
    /// The lowest corner of the box holding the ground.
    pub min: Point3<f64>,
    /// The highest corner of the box holding the ground.
    pub max: Point3<f64>,
    /// Triangles by cell of a square grid over the plan, for finding heights.
    cells: Vec<Vec<u32>>,
    columns: usize,
    rows: usize,
    cell: f64,
}

impl Ground {
    /// The ground under the plan point, if the point lies on it.
    pub fn height_at(&self, x: f64, y: f64) -> Option<f64> {
        self.first_under(x, y, |_, z| z)
    }

    /// The triangle of the ground under the plan point, if the point lies on the ground.
    pub fn triangle_at(&self, x: f64, y: f64) -> Option<&[Point3<f64>; 3]> {
        self.first_under(x, y, |triangle, _| triangle)
    }

    /// What `found` makes of the first triangle holding the plan point and the height of
    /// its plane there.
    fn first_under<'a, T>(
        &'a self,
        x: f64,
        y: f64,
        found: impl Fn(&'a [Point3<f64>; 3], f64) -> T,
    ) -> Option<T> {
        let column = ((x - self.min.x) / self.cell).floor();
        let row = ((y - self.min.y) / self.cell).floor();
        let inside = |v: f64, n: usize| v >= -1.0 && v <= n as f64;
        if !inside(column, self.columns) || !inside(row, self.rows) {
            return None;
        }
        let column = (column.max(0.0) as usize).min(self.columns - 1);
        let row = (row.max(0.0) as usize).min(self.rows - 1);
        let p = Vector2::new(x, y);
        for &t in &self.cells[row * self.columns + column] {
            let triangle = &self.triangles[t as usize];
            if let Some(z) = height_in(triangle, p) {
                return Some(found(triangle, z));
            }
        }
        None
    }

    /// Where the plan segment from `a` to `b` crosses the edges of the triangles, as
    /// fractions of the way along it (strictly between 0 and 1, in order): where a line
    /// laid on the ground bends.
    pub fn bends(&self, a: Vector2<f64>, b: Vector2<f64>) -> Vec<f64> {
        let (lo, hi) = (a.inf(&b), a.sup(&b));
        let mut found = Vec::new();
        for t in &self.triangles {
            let xs = t.map(|p| p.x);
            let ys = t.map(|p| p.y);
            if xs.iter().all(|&x| x < lo.x)
                || xs.iter().all(|&x| x > hi.x)
                || ys.iter().all(|&y| y < lo.y)
                || ys.iter().all(|&y| y > hi.y)
            {
                continue;
            }
            for k in 0..3 {
                let (p, q) = (t[k], t[(k + 1) % 3]);
                let (p, q) = (Vector2::new(p.x, p.y), Vector2::new(q.x, q.y));
                let d = b - a;
                let e = q - p;
                let denominator = d.perp(&e);
                if denominator.abs() < 1e-15 {
                    continue;
                }
                let s = (p - a).perp(&e) / denominator;
                let u = (p - a).perp(&d) / denominator;
                if s > 1e-9 && s < 1.0 - 1e-9 && (-1e-12..=1.0 + 1e-12).contains(&u) {
                    found.push(s);
                }
            }
        }
        found.sort_by(f64::total_cmp);
        found.dedup_by(|x, y| (*x - *y).abs() < 1e-9);
        found
    }

    fn index(&mut self) {
        let n = self.triangles.len().max(1);
        let (width, depth) = (self.max.x - self.min.x, self.max.y - self.min.y);
        // About one triangle per cell.
        self.cell = ((width * depth / n as f64).sqrt()).max(width.max(depth) / 1024.0);
        self.columns = ((width / self.cell).ceil() as usize).max(1);
        self.rows = ((depth / self.cell).ceil() as usize).max(1);
        self.cells = vec![Vec::new(); self.columns * self.rows];
        for (t, triangle) in self.triangles.iter().enumerate() {
            let cell_of = |v: f64, lo: f64, n: usize| {
                (((v - lo) / self.cell).floor().max(0.0) as usize).min(n - 1)
            };
            let xs = triangle.map(|p| p.x);
            let ys = triangle.map(|p| p.y);
            let fold =
                |v: [f64; 3], f: fn(f64, f64) -> f64| v[1..].iter().fold(v[0], |a, &b| f(a, b));
            let (c0, c1) = (
                cell_of(fold(xs, f64::min), self.min.x, self.columns),
                cell_of(fold(xs, f64::max), self.min.x, self.columns),
            );
            let (r0, r1) = (
                cell_of(fold(ys, f64::min), self.min.y, self.rows),
                cell_of(fold(ys, f64::max), self.min.y, self.rows),
            );
            for r in r0..=r1 {
                for c in c0..=c1 {
                    self.cells[r * self.columns + c].push(t as u32);
                }
            }
        }
    }
}

/// The height of the triangle's plane over `p` if `p` lies in the triangle (barycentric
/// coordinates, edges included within a whisker).
pub fn height_in(triangle: &[Point3<f64>; 3], p: Vector2<f64>) -> Option<f64> {
    let [a, b, c] = triangle.map(|q| Vector2::new(q.x, q.y));
    let area = (b - a).perp(&(c - a));
    if area == 0.0 {
        return None;
    }
    let wa = (b - p).perp(&(c - p)) / area;
    let wb = (c - p).perp(&(a - p)) / area;
    let wc = 1.0 - wa - wb;
    let slack = -1e-9;
    (wa >= slack && wb >= slack && wc >= slack)
        .then(|| wa * triangle[0].z + wb * triangle[1].z + wc * triangle[2].z)
}

/// A length for a message: to a thousandth, without trailing zeros.
fn short(length: f64) -> String {
    let text = format!("{length:.3}");
    text.trim_end_matches('0').trim_end_matches('.').to_owned()
}

/// The triangulated ground and the edges to draw (by what they are: `true` for the
/// outline and break lines), from a spec in the scene's unit.
pub fn triangulate(spec: &GroundSpec, unit: f64) -> Result<(Ground, GroundEdges), String> {
    let mut cdt: ConstrainedDelaunayTriangulation<Point2<f64>> =
        ConstrainedDelaunayTriangulation::new();
    let mut heights: Vec<f64> = Vec::new();
    let mut add = |cdt: &mut ConstrainedDelaunayTriangulation<Point2<f64>>,
                   x: f64,
                   y: f64,
                   z: f64,
                   what: &dyn Fn() -> String|
     -> Result<spade::handles::FixedVertexHandle, String> {
        let before = cdt.num_vertices();
        let handle = cdt
            .insert(Point2::new(x * unit, y * unit))
            .map_err(|e| format!("{} cannot be used: {e}", what()))?;
        if cdt.num_vertices() > before {
            heights.push(z * unit);
        } else if (heights[handle.index()] - z * unit).abs() > 1e-6 {
            return Err(format!(
                "{} is at ({}, {}), where the ground already has the height {}; one point \
                 cannot have two heights",
                what(),
                short(x),
                short(y),
                short(heights[handle.index()] / unit)
            ));
        }
        Ok(handle)
    };
    for (i, s) in spec.spots.iter().enumerate() {
        add(&mut cdt, s.0 .0, s.1 .0, s.2 .0, &|| {
            format!("spot {}", i + 1)
        })?;
    }
    // Constraint lines, in order: contours then break lines, each named for messages.
    let mut lines: Vec<(String, Vec<spade::handles::FixedVertexHandle>)> = Vec::new();
    for (i, contour) in spec.contours.iter().enumerate() {
        let name = format!("contour {} (height {})", i + 1, short(contour.height.0));
        if contour.points.len() < 2 {
            return Err(format!("{name} needs at least two points"));
        }
        let mut handles = Vec::new();
        for (k, p) in contour.points.iter().enumerate() {
            let what = || format!("point {} of {name}", k + 1);
            handles.push(add(&mut cdt, p.0 .0, p.1 .0, contour.height.0, &what)?);
        }
        lines.push((name, handles));
    }
    for (i, line) in spec.break_lines.iter().enumerate() {
        let name = format!("break line {}", i + 1);
        if line.len() < 2 {
            return Err(format!("{name} needs at least two points"));
        }
        let mut handles = Vec::new();
        for (k, p) in line.iter().enumerate() {
            let what = || format!("point {} of {name}", k + 1);
            handles.push(add(&mut cdt, p.0 .0, p.1 .0, p.2 .0, &what)?);
        }
        lines.push((name, handles));
    }
    let mut constrained: Vec<(usize, usize)> = Vec::new();
    for (l, (name, handles)) in lines.iter().enumerate() {
        for pair in handles.windows(2) {
            if pair[0] == pair[1] {
                continue;
            }
            if !cdt.can_add_constraint(pair[0], pair[1]) {
                let other = lines[..=l]
                    .iter()
                    .find(|(_, hs)| {
                        hs.windows(2)
                            .any(|q| crosses(&cdt, (pair[0], pair[1]), (q[0], q[1])))
                    })
                    .map_or("another line".to_owned(), |(n, _)| n.clone());
                let at = cdt.vertex(pair[0]).position();
                return Err(format!(
                    "{name} crosses {other} (near ({}, {})); contour and break lines may \
                     meet only at shared points",
                    short(at.x / unit),
                    short(at.y / unit)
                ));
            }
            cdt.add_constraint(pair[0], pair[1]);
            constrained.push((pair[0].index(), pair[1].index()));
        }
    }
    if cdt.num_vertices() < 3 {
        return Err(format!(
            "the ground needs at least three points with heights to make a surface, found {}",
            cdt.num_vertices()
        ));
    }
    if cdt.num_inner_faces() == 0 {
        return Err(
            "the ground's points all lie on one line, so they make no surface; add a point \
             off that line"
                .to_owned(),
        );
    }
    let at = |v: spade::handles::FixedVertexHandle| {
        let p = cdt.vertex(v).position();
        Point3::new(p.x, p.y, heights[v.index()])
    };
    let triangles: Vec<[Point3<f64>; 3]> = cdt
        .inner_faces()
        .map(|f| f.vertices().map(|v| at(v.fix())))
        .collect();
    let mut min = triangles[0][0];
    let mut max = min;
    for p in triangles.iter().flatten() {
        min = min.inf(p);
        max = max.sup(p);
    }
    let hull: std::collections::HashSet<(usize, usize)> = cdt
        .convex_hull()
        .map(|e| {
            let [a, b] = e.vertices().map(|v| v.fix().index());
            (a.min(b), a.max(b))
        })
        .collect();
    let is_break = |a: usize, b: usize| {
        constrained
            .iter()
            .any(|&(p, q)| (p.min(q), p.max(q)) == (a.min(b), a.max(b)))
    };
    let edges = cdt
        .undirected_edges()
        .map(|e| {
            let [a, b] = e.vertices();
            let (ia, ib) = (a.fix().index(), b.fix().index());
            let key = (ia.min(ib), ia.max(ib));
            let outline =
                hull.contains(&key) || (is_break(ia, ib) && cdt.is_constraint_edge(e.fix()));
            (at(a.fix()), at(b.fix()), outline)
        })
        .collect();
    let mut ground = Ground {
        triangles,
        min,
        max,
        cells: Vec::new(),
        columns: 1,
        rows: 1,
        cell: 1.0,
    };
    ground.index();
    Ok((ground, edges))
}

fn crosses(
    cdt: &ConstrainedDelaunayTriangulation<Point2<f64>>,
    a: (
        spade::handles::FixedVertexHandle,
        spade::handles::FixedVertexHandle,
    ),
    b: (
        spade::handles::FixedVertexHandle,
        spade::handles::FixedVertexHandle,
    ),
) -> bool {
    let p = |v| {
        let q = cdt.vertex(v).position();
        Vector2::new(q.x, q.y)
    };
    if a.0 == b.0 || a.0 == b.1 || a.1 == b.0 || a.1 == b.1 {
        return false;
    }
    super::items::plan::segments_meet(p(a.0), p(a.1), p(b.0), p(b.1))
}

/// The edges of the ground to draw, and whether each is on its outline or a break line.
pub type GroundEdges = Vec<(Point3<f64>, Point3<f64>, bool)>;

/// Triangulates the ground and sets it as the site's, so that items can stand on it.
pub fn add_ground(site: &mut Site, spec: &GroundSpec, unit: f64) -> Result<GroundEdges, String> {
    let (ground, edges) = triangulate(spec, unit)?;
    site.ground = Some(ground);
    Ok(edges)
}

/// Adds the ground to the site as an item (after the scene's items, so that their numbers
/// in messages are as written): its triangles as faces, and its edges as the spec asks.
pub fn draw_ground(site: &mut Site, spec: &GroundSpec, edges: GroundEdges) {
    let Some(ground) = site.ground.take() else {
        return;
    };
    let layer = spec.layer.clone().unwrap_or_else(|| "ground".to_owned());
    let item: ItemId = site.add_item_on_layer("ground", None, Some(layer.clone()));
    for (start, end, outline) in edges {
        if spec.draw == GroundDraw::Grid || outline {
            site.edges.push(Edge {
                curve: SiteCurve::Segment { start, end },
                item,
            });
        }
    }
    site.faces
        .extend(ground.triangles.iter().map(|&corners| Face {
            corners,
            item,
            slack: GROUND_SLACK,
        }));
    if spec.layer.is_none() && !site.styles.0.contains_key(&layer) {
        // Faint, so that it guides without competing with the buildings.
        site.styles.0.insert(
            layer,
            super::style::LayerStyle {
                opacity: Some(super::style::Opacity(0.35)),
                ..Default::default()
            },
        );
    }
    // What the ground does not reach: such things stand at height 0 there, or float.
    let outside = |p: &Point3<f64>| ground.height_at(p.x, p.y).is_none();
    let mut beyond: Vec<ItemId> = Vec::new();
    for edge in &site.edges {
        if edge.item == item || beyond.last() == Some(&edge.item) || beyond.contains(&edge.item) {
            continue;
        }
        let off = match edge.curve {
            SiteCurve::Segment { start, end } => outside(&start) || outside(&end),
            SiteCurve::Ellipse(arc) => {
                let EllipseArc { centre, u, v, .. } = arc;
                outside(&(centre + u))
                    || outside(&(centre - u))
                    || outside(&(centre + v))
                    || outside(&(centre - v))
            }
        };
        if off {
            beyond.push(edge.item);
        }
    }
    let mut warnings: Vec<(ItemId, String)> = beyond
        .into_iter()
        .map(|other| {
            (
                item,
                format!("does not reach under all of {}", site.describe_item(other)),
            )
        })
        .collect();
    for standpoint in &site.standpoints {
        if ground.height_at(standpoint.x, standpoint.y).is_none() {
            warnings.push((
                item,
                format!(
                    "does not reach standpoint {:?} at ({}, {}): it stands at height {} there",
                    standpoint.name,
                    short(standpoint.x),
                    short(standpoint.y),
                    short(standpoint.ground)
                ),
            ));
        }
    }
    site.warnings.extend(warnings);
    site.ground = Some(ground);
}

/// The plan point's height on the site's ground, or 0 where there is no ground or the
/// point lies outside it.
pub fn ground_height(site: &Site, x: f64, y: f64) -> f64 {
    site.ground
        .as_ref()
        .and_then(|g| g.height_at(x, y))
        .unwrap_or(0.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn spec(text: &str) -> GroundSpec {
        ron::Options::default()
            .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
            .from_str(text)
            .expect("a ground as written in a scene")
    }

    /// Whether `d` lies strictly inside the circle through `a`, `b`, `c` (counter-clockwise
    /// or not): the sign of the in-circle determinant (Guibas and Stolfi, "Primitives for
    /// the manipulation of general subdivisions", ACM TOG 4(2), 1985).
    fn in_circle(a: Vector2<f64>, b: Vector2<f64>, c: Vector2<f64>, d: Vector2<f64>) -> bool {
        let row = |p: Vector2<f64>| {
            let q = p - d;
            (q.x, q.y, q.norm_squared())
        };
        let (ax, ay, a2) = row(a);
        let (bx, by, b2) = row(b);
        let (cx, cy, c2) = row(c);
        let det = ax * (by * c2 - b2 * cy) - ay * (bx * c2 - b2 * cx) + a2 * (bx * cy - by * cx);
        let orientation = (b - a).perp(&(c - a));
        let scale = (a - d).norm_squared().max((b - d).norm_squared()).powi(2);
        det * orientation.signum() > 1e-9 * scale
    }

    fn plan(p: &Point3<f64>) -> Vector2<f64> {
        Vector2::new(p.x, p.y)
    }

    #[test]
    fn the_triangles_are_constrained_delaunay() {
        // Checked without the crate: every edge shared by two triangles that is not a
        // constraint is locally Delaunay (the far corner of one triangle lies outside the
        // circumcircle of the other), which makes the whole triangulation constrained
        // Delaunay (Chew, "Constrained Delaunay triangulations", Algorithmica 4, 1989;
        // the local-to-global lemma).
        let ground = spec(
            "(spots: [(0, 0, 0), (40, 0, 2), (40, 40, 5), (0, 40, 3), (13, 7, 1), \
             (31, 17, 2.5), (8, 29, 2), (22, 33, 4), (27, 5, 1.5), (5, 14, 0.5)], \
             contours: [(height: 3, points: [(2, 20), (20, 24), (38, 22)])], \
             break_lines: [[(10, 2, 0.8), (30, 18, 2.6)]])",
        );
        let (ground, edges) = triangulate(&ground, 1.0).unwrap();
        let key = |p: &Point3<f64>| ((p.x * 1e6).round() as i64, (p.y * 1e6).round() as i64);
        let mut constraint_pieces = Vec::new();
        for (a, b, outline) in &edges {
            if *outline {
                constraint_pieces.push((plan(a), plan(b)));
            }
        }
        let on_constraint = |a: Vector2<f64>, b: Vector2<f64>| {
            // A piece of a contour or break line, or of the hull (which has one triangle).
            constraint_pieces.iter().any(|&(p, q)| {
                ((p - a).norm() < 1e-9 && (q - b).norm() < 1e-9)
                    || ((p - b).norm() < 1e-9 && (q - a).norm() < 1e-9)
            })
        };
        let mut shared = 0;
        for (i, s) in ground.triangles.iter().enumerate() {
            for t in &ground.triangles[i + 1..] {
                let common: Vec<&Point3<f64>> = s
                    .iter()
                    .filter(|p| t.iter().any(|q| key(q) == key(p)))
                    .collect();
                if common.len() != 2 {
                    continue;
                }
                shared += 1;
                if on_constraint(plan(common[0]), plan(common[1])) {
                    continue;
                }
                let far = t
                    .iter()
                    .find(|q| !common.iter().any(|p| key(p) == key(q)))
                    .unwrap();
                let [a, b, c] = s.map(|p| plan(&p));
                assert!(!in_circle(a, b, c, plan(far)), "{s:?} {t:?}");
            }
        }
        assert!(shared > 10);
        // The constraints are edges of the triangles: the contour's middle point and the
        // break line's ends are joined by edges, and the contour is at its height.
        for (x, y) in [(2.0, 20.0), (20.0, 24.0), (38.0, 22.0)] {
            assert!((ground.height_at(x, y).unwrap() - 3.0).abs() < 1e-12);
        }
        // The break line is an edge: the ground along it is its own straight line.
        assert!((ground.height_at(20.0, 10.0).unwrap() - 1.7).abs() < 1e-12);
    }

    #[test]
    fn heights_are_found_on_a_tilted_plane() {
        // Every spot on the plane z = 0.1 x + 0.05 y: the surface is that plane.
        let ground =
            spec("(spots: [(0, 0, 0), (100, 0, 10), (100, 100, 15), (0, 100, 5), (50, 40, 7)])");
        let (ground, _) = triangulate(&ground, 1.0).unwrap();
        for (x, y) in [(1.0, 1.0), (99.0, 3.0), (37.5, 81.25), (50.0, 40.0)] {
            let z = ground.height_at(x, y).unwrap();
            assert!((z - (0.1 * x + 0.05 * y)).abs() < 1e-9, "{x} {y} {z}");
        }
        assert_eq!(ground.height_at(-1.0, 50.0), None);
        assert_eq!((ground.min.z, ground.max.z), (0.0, 15.0));
        let bends = ground.bends(Vector2::new(-10.0, 50.0), Vector2::new(110.0, 50.0));
        assert!(!bends.is_empty() && bends.windows(2).all(|w| w[0] < w[1]));
    }

    #[test]
    fn mistakes_are_told_in_words() {
        let problem = |text: &str| triangulate(&spec(text), 1.0).unwrap_err();
        let few = problem("(spots: [(0, 0, 0), (1, 0, 0)])");
        assert!(few.contains("at least three points"), "{few}");
        let line = problem("(spots: [(0, 0, 0), (1, 1, 0), (2, 2, 5)])");
        assert!(line.contains("one line"), "{line}");
        let crossing = problem(
            "(spots: [(0, 0, 0), (10, 0, 0), (0, 10, 0)], contours: [\
             (height: 1, points: [(0, 5), (10, 5)]), (height: 2, points: [(5, 0), (5, 10)])])",
        );
        assert!(
            crossing.contains("contour 2 (height 2) crosses contour 1 (height 1)"),
            "{crossing}"
        );
        let twice = problem("(spots: [(0, 0, 0), (10, 0, 0), (0, 10, 0), (0, 0, 3)])");
        assert!(twice.contains("two heights"), "{twice}");
    }
}
