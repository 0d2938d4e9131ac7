//! Checks shared by the items' unit tests: what an item wrote into a site, counted and
//! measured.

use super::super::build::{ItemBuilder, Placement};
use super::super::site::{ItemId, Site, SiteCurve};
use nalgebra::Point3;
use std::collections::HashMap;

/// An empty site holding one item, and the item's id, for a builder in metres.
pub fn site_with_item(kind: &'static str) -> (Site, ItemId) {
    let mut site = Site::default();
    let id = site.add_item(kind, None);
    (site, id)
}

/// Builds one item with `build` into a fresh site, in metres, unmoved.
pub fn built<F>(kind: &'static str, build: F) -> Result<Site, String>
where
    F: FnOnce(&mut ItemBuilder) -> Result<(), String>,
{
    let (mut site, id) = site_with_item(kind);
    let mut b = ItemBuilder::new(&mut site, id, Placement::in_unit(1.0));
    build(&mut b)?;
    Ok(site)
}

/// How many straight edges and how many elliptic arcs.
pub fn edge_counts(site: &Site) -> (usize, usize) {
    let arcs = site
        .edges
        .iter()
        .filter(|e| matches!(e.curve, SiteCurve::Ellipse(_)))
        .count();
    (site.edges.len() - arcs, arcs)
}

/// Points along every edge: the ends of segments, and arcs sampled finely enough that
/// their extremes are found within a millionth of their size.
pub fn edge_points(site: &Site) -> Vec<Point3<f64>> {
    let mut points = Vec::new();
    for edge in &site.edges {
        match edge.curve {
            SiteCurve::Segment { start, end } => points.extend([start, end]),
            SiteCurve::Ellipse(ref arc) => {
                let samples = 4000;
                points.extend((0..=samples).map(|i| arc.along(i as f64 / samples as f64)));
            }
        }
    }
    points
}

/// The smallest box holding all the points: (lowest corner, highest corner).
pub fn bounds(points: &[Point3<f64>]) -> (Point3<f64>, Point3<f64>) {
    let mut low = Point3::from([f64::INFINITY; 3]);
    let mut high = Point3::from([f64::NEG_INFINITY; 3]);
    for p in points {
        low = low.inf(p);
        high = high.sup(p);
    }
    (low, high)
}

/// Panics unless the box (`low`, `high`) is the expected one within `tolerance`.
pub fn assert_bounds(
    found: (Point3<f64>, Point3<f64>),
    low: [f64; 3],
    high: [f64; 3],
    tolerance: f64,
) {
    let (l, h) = found;
    let near = |p: Point3<f64>, q: [f64; 3]| (p - Point3::from(q)).amax() <= tolerance;
    assert!(
        near(l, low) && near(h, high),
        "bounds {l} to {h}, expected {low:?} to {high:?}"
    );
}

/// Panics unless every corner of every face lies in the box (`low`, `high`), give or take
/// `tolerance`.
pub fn assert_faces_within(site: &Site, (low, high): (Point3<f64>, Point3<f64>), tolerance: f64) {
    for face in &site.faces {
        for corner in face.corners {
            let inside =
                (0..3).all(|k| corner[k] >= low[k] - tolerance && corner[k] <= high[k] + tolerance);
            assert!(inside, "face corner {corner} outside {low} to {high}");
        }
    }
}

/// The sides of the face triangles that are not shared by exactly two triangles, corners
/// being taken as one when within a micrometre: none for a closed solid.
pub fn unpaired_sides(site: &Site) -> usize {
    let mut corners: Vec<Point3<f64>> = Vec::new();
    let mut index_of = |p: Point3<f64>| -> usize {
        match corners.iter().position(|q| (q - p).norm() < 1e-6) {
            Some(i) => i,
            None => {
                corners.push(p);
                corners.len() - 1
            }
        }
    };
    let mut uses: HashMap<(usize, usize), usize> = HashMap::new();
    for face in &site.faces {
        let ids = face.corners.map(&mut index_of);
        for k in 0..3 {
            let (a, b) = (ids[k], ids[(k + 1) % 3]);
            *uses.entry((a.min(b), a.max(b))).or_default() += 1;
        }
    }
    uses.values().filter(|&&n| n != 2).count()
}
