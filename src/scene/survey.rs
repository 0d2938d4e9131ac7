//! What `pansite check` reports about a site: what it holds, how far it reaches, and
//! whether each standpoint stands somewhere a person could (not inside a solid, not under
//! the ground).

use super::pieces::Pieces;
use super::site::{Face, ItemId, Site, SiteCurve, Standpoint};
use nalgebra::{Point3, Vector3};
use std::collections::BTreeMap;
use std::f64::consts::TAU;

/// The kinds of item whose faces close a solid one cannot stand in.
const SOLID_KINDS: &[&str] = &[
    "block",
    "footprint",
    "arch",
    "arcade",
    "column",
    "tower",
    "dome",
    "stairs",
];

/// A summary of a site.
#[derive(Clone, Debug, PartialEq)]
pub struct Survey {
    /// How many items of each kind.
    pub items_by_kind: BTreeMap<&'static str, usize>,
    /// Edges drawn from every standpoint.
    pub edges: usize,
    /// Face triangles, which hide what is behind them.
    pub faces: usize,
    /// Round shapes whose outline is found from each eye.
    pub outlines: usize,
    /// Labelled points.
    pub markers: usize,
    /// The box holding every edge and face, `None` for an empty site.
    pub bounds: Option<(Point3<f64>, Point3<f64>)>,
    /// What each standpoint looks like from the site, in file order.
    pub standpoints: Vec<StandpointCheck>,
    /// The box holding the sloping ground, if the scene has one: its plan extent and its
    /// lowest and highest points.
    pub ground: Option<(Point3<f64>, Point3<f64>)>,
}

/// What `check` says of one standpoint.
#[derive(Clone, Debug, PartialEq)]
pub struct StandpointCheck {
    /// Its name.
    pub name: String,
    /// Where the eye is.
    pub eye: Point3<f64>,
    /// The solid items the eye is inside.
    pub inside: Vec<ItemId>,
    /// The eye is below the site's datum (z = 0).
    pub underground: bool,
}

/// What `check` reports of a site.
pub fn survey(site: &Site) -> Survey {
    let mut items_by_kind = BTreeMap::new();
    for item in &site.items {
        *items_by_kind.entry(item.kind).or_insert(0) += 1;
    }
    Survey {
        items_by_kind,
        edges: site.edges.len(),
        faces: site.faces.len(),
        outlines: site.outlines.len(),
        markers: site.markers.len(),
        bounds: bounds(site),
        standpoints: site
            .standpoints
            .iter()
            .map(|s| check_standpoint(site, s))
            .collect(),
        ground: site.ground.as_ref().map(|g| (g.min, g.max)),
    }
}

fn check_standpoint(site: &Site, standpoint: &Standpoint) -> StandpointCheck {
    let eye = standpoint.eye();
    StandpointCheck {
        name: standpoint.name.clone(),
        eye,
        inside: solids_enclosing(site, &eye),
        underground: eye.z < super::ground::ground_height(site, eye.x, eye.y),
    }
}

/// The solid items whose faces enclose `point`: a ray from it crosses their surface an odd
/// number of times (the parity rule of point-in-polyhedron tests). The ray's direction is
/// fixed and oblique so that it does not run along the level and upright faces of
/// buildings.
///
/// A closed mesh counts as one solid, named by its first item, whatever groups and
/// materials split it into (a group alone, a roof say, need not be closed). An open mesh (a
/// ground sheet among its houses, one house without a floor) counts each of its closed
/// pieces as a solid, named by the piece's first face's item; its pieces are only worked
/// out when the ray meets the mesh.
pub fn solids_enclosing(site: &Site, point: &Point3<f64>) -> Vec<ItemId> {
    let ray = Vector3::new(0.280_573, 0.496_614, 0.821_411).normalize();
    // What each item's faces count towards: itself for solid kinds, its mesh's first item
    // for closed meshes, its open mesh's number for the others.
    let mut owner: Vec<Option<Owner>> = site
        .items
        .iter()
        .enumerate()
        .map(|(i, item)| {
            SOLID_KINDS
                .contains(&item.kind)
                .then_some(Owner::Solid(i as u32))
        })
        .collect();
    for (m, model) in site.models.iter().enumerate() {
        for item in model.items.clone() {
            if let Some(owner) = owner.get_mut(item as usize) {
                *owner = Some(if model.is_closed() {
                    Owner::Solid(model.items.start)
                } else {
                    Owner::OpenModel(m)
                });
            }
        }
    }
    let owner_of = |face: &Face| owner.get(face.item.0 as usize).copied().flatten();
    let mut crossings: BTreeMap<u32, usize> = BTreeMap::new();
    let mut crossed_open: BTreeMap<usize, Vec<usize>> = BTreeMap::new();
    for (f, face) in site.faces.iter().enumerate() {
        if let Some(owner) = owner_of(&face) {
            if ray_hits_triangle(point, &ray, &face.corners) {
                match owner {
                    Owner::Solid(item) => *crossings.entry(item).or_insert(0) += 1,
                    Owner::OpenModel(m) => crossed_open.entry(m).or_default().push(f),
                }
            }
        }
    }
    let mut inside: Vec<ItemId> = crossings
        .into_iter()
        .filter(|(_, count)| count % 2 == 1)
        .map(|(item, _)| ItemId(item))
        .collect();
    for (m, crossed) in crossed_open {
        let model = &site.models[m];
        let mut pieces = Pieces::of(&model.open_corners);
        let mut piece_crossings: BTreeMap<usize, usize> = BTreeMap::new();
        for f in crossed {
            // The model's faces are one run of the site's, in the order of its corners.
            let Some(t) = f.checked_sub(model.faces.start) else {
                continue;
            };
            if t < model.open_corners.len() {
                if let Some(first) = pieces.closed_piece_of(t) {
                    *piece_crossings.entry(first).or_insert(0) += 1;
                }
            }
        }
        inside.extend(
            piece_crossings
                .into_iter()
                .filter(|(_, count)| count % 2 == 1)
                .map(|(piece, _)| site.faces.get(model.faces.start + piece).item),
        );
    }
    inside.sort_unstable_by_key(|item| item.0);
    inside.dedup();
    inside
}

/// What a face's ray crossings count towards.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Owner {
    /// A solid, named by its (first) item.
    Solid(u32),
    /// An open mesh, by its number in the site's models: its closed pieces are solids.
    OpenModel(usize),
}

/// Whether the ray from `origin` along `direction` passes through the triangle (Moeller
/// and Trumbore, "Fast, minimum storage ray-triangle intersection", Journal of Graphics
/// Tools 2(1), 1997).
pub fn ray_hits_triangle(
    origin: &Point3<f64>,
    direction: &Vector3<f64>,
    [a, b, c]: &[Point3<f64>; 3],
) -> bool {
    let (ab, ac) = (b - a, c - a);
    let p = direction.cross(&ac);
    let determinant = ab.dot(&p);
    if determinant.abs() < 1e-14 * ab.norm() * ac.norm() {
        return false;
    }
    let to_origin = origin - a;
    let u = to_origin.dot(&p) / determinant;
    if !(0.0..=1.0).contains(&u) {
        return false;
    }
    let q = to_origin.cross(&ab);
    let v = direction.dot(&q) / determinant;
    if v < 0.0 || u + v > 1.0 {
        return false;
    }
    ac.dot(&q) / determinant > 0.0
}

/// The box holding every edge (curves exactly) and face of the site.
pub fn bounds(site: &Site) -> Option<(Point3<f64>, Point3<f64>)> {
    let mut lo = Point3::new(f64::INFINITY, f64::INFINITY, f64::INFINITY);
    let mut hi = -lo;
    let mut take = |p: Point3<f64>| {
        lo = lo.inf(&p);
        hi = hi.sup(&p);
    };
    for edge in &site.edges {
        match edge.curve {
            SiteCurve::Segment { start, end } => {
                take(start);
                take(end);
            }
            SiteCurve::Ellipse(ref arc) => {
                for t in ellipse_extreme_angles(&arc.u, &arc.v, arc.start, arc.sweep) {
                    take(arc.at(t));
                }
            }
        }
    }
    for face in &site.faces {
        face.corners.iter().copied().for_each(&mut take);
    }
    for marker in &site.markers {
        take(marker.at);
    }
    (lo.x <= hi.x).then_some((lo, hi))
}

/// The parameters where `u cos t + v sin t` reaches its least and greatest x, y and z
/// within the arc (each coordinate is extreme where its derivative vanishes, at
/// t = atan2(v_i, u_i) and half a turn on), and the arc's ends.
fn ellipse_extreme_angles(u: &Vector3<f64>, v: &Vector3<f64>, start: f64, sweep: f64) -> Vec<f64> {
    let mut angles = vec![start, start + sweep];
    for i in 0..3 {
        let first = v[i].atan2(u[i]);
        for candidate in [first, first + TAU / 2.0] {
            let into = (candidate - start).rem_euclid(TAU);
            if into <= sweep {
                angles.push(start + into);
            }
        }
    }
    angles
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_half_circle_arc_reaches_its_radius_only_where_it_goes() {
        // The upper half of a unit circle in the xz plane: x from -1 to 1, z from 0 to 1.
        let angles = ellipse_extreme_angles(&Vector3::x(), &Vector3::z(), 0.0, TAU / 2.0);
        let points: Vec<Vector3<f64>> = angles
            .iter()
            .map(|t| Vector3::x() * t.cos() + Vector3::z() * t.sin())
            .collect();
        let top = points.iter().map(|p| p.z).fold(f64::MIN, f64::max);
        let bottom = points.iter().map(|p| p.z).fold(f64::MAX, f64::min);
        assert!((top - 1.0).abs() < 1e-15 && bottom.abs() < 1e-15);
    }
}
