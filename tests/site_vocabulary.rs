//! The site vocabulary checked against geometry from outside the project: Euler's
//! polyhedron formula for the solids' edge counts, the tangent-to-a-circle facts for round
//! outlines, the international foot, hand-computed counts and extents, and the exact curves
//! of the curved items flattened within the tolerance from random standpoints.

use nalgebra::{Point3, Vector2};
use pansite::plane::{flatten, Equirect, ImagePoint, PolylineSet};
use pansite::scene::{
    bounds, parse_scene, tangent_points, EllipseArc, ItemId, Site, SiteCurve, Standpoint,
    DEFAULT_EYE_HEIGHT, SEATED_EYE_HEIGHT,
};
use pansite::sphere::{azimuth_elevation, ViewFrame};
use proptest::prelude::*;
use std::path::Path;

mod common;
use common::{assert_near, distance_to_polylines};

fn site(text: &str) -> Site {
    parse_scene(text.as_bytes(), Path::new("test.ron"), "test").unwrap_or_else(|e| panic!("{e}"))
}

fn scene_with(items: &str) -> Site {
    site(&format!("Scene(items: [{items}])"))
}

/// Distinct corners of a site's straight edges (to a micrometre).
fn vertex_count(site: &Site) -> usize {
    let mut corners: Vec<[i64; 3]> = Vec::new();
    for edge in &site.edges {
        if let SiteCurve::Segment { start, end } = edge.curve {
            for p in [start, end] {
                corners.push(p.coords.map(|c| (c * 1e6).round() as i64).into());
            }
        }
    }
    corners.sort();
    corners.dedup();
    corners.len()
}

/// Euler's polyhedron formula V - E + F = 2 (Euler 1758; any text on polyhedra, e.g.
/// Coxeter, "Regular Polytopes", 1973, section 1.6, from memory) holds for a block's drawn
/// corners and edges and its flat faces counted by hand.
#[test]
fn block_roofs_satisfy_eulers_formula() {
    let cases = [
        // roof, faces (walls + floor + roof planes), edges counted by hand
        ("Flat", 6, 12),
        ("Gable(ridge: 8)", 7, 15),
        ("Gable(ridge: 8, along: Depth)", 7, 15),
        ("Hip(ridge: 8)", 9, 17),
        ("Pyramid(apex: 9)", 9, 16),
        ("Shed(back: 7)", 6, 12),
    ];
    for (roof, faces, edges) in cases {
        let site = scene_with(&format!(
            "Block(at: Corner(0, 0), width: 10, depth: 6, height: 5, roof: {roof})"
        ));
        let (v, e) = (vertex_count(&site) as i64, site.edges.len() as i64);
        assert_eq!(e, edges, "{roof}: edges");
        assert_eq!(
            v - e + faces,
            2,
            "{roof}: V - E + F with V = {v}, E = {e}, F = {faces}"
        );
    }
}

#[test]
fn hip_roof_ridge_and_gable_extent_by_hand() {
    // A hip roof of one pitch on a 10 x 6 plan: the ridge is 10 - 6 = 4 long, 3 in from
    // each end. Its ends are the highest corners.
    let site =
        scene_with("Block(at: Corner(0, 0), width: 10, depth: 6, height: 5, roof: Hip(ridge: 8))");
    let ridge: Vec<(Point3<f64>, Point3<f64>)> = site
        .edges
        .iter()
        .filter_map(|e| match e.curve {
            SiteCurve::Segment { start, end } if start.z == 8.0 && end.z == 8.0 => {
                Some((start, end))
            }
            _ => None,
        })
        .collect();
    assert_eq!(ridge.len(), 1);
    let (a, b) = ridge[0];
    assert_near((a - b).norm(), 4.0, 1e-12);
    assert_near(a.x.min(b.x), 3.0, 1e-12);
    // A gable roof with a 0.5 overhang on a 10 x 6 plan, ridge 3 above the eaves (slope 1):
    // the eaves drop 0.5 below the wall tops and the roof reaches 0.5 beyond every wall.
    let site = scene_with(
        "Block(at: Corner(0, 0), width: 10, depth: 6, height: 5, roof: Gable(ridge: 8, overhang: 0.5))",
    );
    let (lo, hi) = bounds(&site).unwrap();
    for (got, want) in [
        (lo.x, -0.5),
        (lo.y, -0.5),
        (lo.z, 0.0),
        (hi.x, 10.5),
        (hi.y, 6.5),
        (hi.z, 8.0),
    ] {
        assert_near(got, want, 1e-12);
    }
    let eaves = site
        .faces
        .iter()
        .flat_map(|f| f.corners)
        .map(|p| p.z)
        .fold(f64::MAX, |m, z| if z > 1.0 { m.min(z) } else { m });
    assert_near(eaves, 4.5, 1e-12);
}

#[test]
fn openings_with_reveals_and_storey_lines_by_hand() {
    // Three windows with reveals in the front: 4 + 4 + 4 edges each. A storey line at 2.9
    // runs below the windows (sill 3.2), uninterrupted; one at 4.0 is cut by all three.
    let plain = scene_with("Block(at: Corner(0, 0), width: 10, depth: 6, height: 8)");
    let site = scene_with(
        "Block(at: Corner(0, 0), width: 10, depth: 6, height: 8, \
         openings: [(wall: Front, count: 3, width: 1, height: 1.5, sill: 3.2, reveal: 0.2)], \
         storeys: [2.9, 4.0])",
    );
    // At 2.9 one line on each of the 4 walls; at 4.0 four pieces on the front and one on
    // each of the other 3 walls.
    let storey_pieces = 4 + (4 + 3);
    assert_eq!(plain.edges.len(), 12);
    assert_eq!(site.edges.len(), 12 + 3 * 12 + storey_pieces);
    // Windows that do not fit are refused with the item named.
    let text =
        "Scene(items: [Block(label: \"narrow\", at: Corner(0, 0), width: 3, depth: 3, height: 3, \
                openings: [(wall: Front, count: 4, width: 1, height: 1)])])";
    let error = parse_scene(text.as_bytes(), Path::new("t.ron"), "t")
        .unwrap_err()
        .to_string();
    assert!(
        error.contains("Block \"narrow\"") && error.contains("do not fit"),
        "{error}"
    );
}

#[test]
fn a_footprint_is_walls_on_its_outline() {
    // An L-shaped footprint of 6 corners: 6 + 6 + 6 edges (foot, corners, top).
    let site = scene_with(
        "Footprint(points: [(0, 0), (8, 0), (8, 4), (4, 4), (4, 9), (0, 9)], height: 6)",
    );
    assert_eq!(site.edges.len(), 18);
    assert_eq!(vertex_count(&site), 12);
    // A hipped roof on a convex footprint: every face rises at the pitch. On a square of
    // side 8 at 45 degrees the apex stands 4 above the eaves.
    let site = scene_with(
        "Footprint(points: [(0, 0), (8, 0), (8, 8), (0, 8)], height: 6, roof: Hipped(pitch: 45))",
    );
    let (_, hi) = bounds(&site).unwrap();
    assert_near(hi.z, 10.0, 1e-12);
    // A self-crossing outline and a hipped roof on an L are refused.
    for bad in [
        "Footprint(points: [(0, 0), (4, 4), (4, 0), (0, 4)], height: 3)",
        "Footprint(points: [(0, 0), (8, 0), (8, 4), (4, 4), (4, 9), (0, 9)], height: 6, roof: Hipped(pitch: 30))",
    ] {
        let text = format!("Scene(items: [{bad}])");
        assert!(parse_scene(text.as_bytes(), Path::new("t.ron"), "t").is_err(), "{bad}");
    }
}

/// The outline generators of a column from an eye at distance d from its axis touch the
/// circle at acos(r / d) either side of the direction to the eye, and the tangent from the
/// eye's foot is sqrt(d^2 - r^2) long (the radius meets the tangent at a right angle:
/// Euclid, Elements III.18; standard geometry of tangents to a circle).
#[test]
fn column_outline_touches_where_the_tangent_rule_says() {
    let (r, d) = (0.4, 5.0);
    let site = scene_with(&format!(
        "Column(at: (0, 0), diameter: {}, height: 3)",
        2.0 * r
    ));
    let eye = Point3::new(0.0, -d, 1.6);
    let outline = site.outline_edges_from(&eye);
    assert_eq!(outline.len(), 2);
    for edge in outline {
        let SiteCurve::Segment { start, end } = edge.curve else {
            panic!()
        };
        let touch = Vector2::new(start.x, start.y);
        let to_eye = Vector2::new(0.0, -d);
        let angle = touch.angle(&to_eye);
        assert_near(angle, (r / d).acos(), 1e-12);
        assert_near((touch - to_eye).norm(), (d * d - r * r).sqrt(), 1e-12);
        assert_eq!((start.z, end.z), (0.0, 3.0));
    }
    // A cylinder is the same thing by another name.
    let cylinder = scene_with(&format!(
        "Cylinder(at: (0, 0), diameter: {}, height: 3)",
        2.0 * r
    ));
    assert_eq!(
        cylinder.outline_edges_from(&eye),
        site.outline_edges_from(&eye)
    );
    // From inside the column there is no outline.
    assert!(site
        .outline_edges_from(&Point3::new(0.1, 0.0, 1.6))
        .is_empty());
    assert!(tangent_points(Vector2::zeros(), 1.0, Vector2::new(0.5, 0.0)).is_none());
}

/// Every line of sight to the rim of a dome grazes the sphere: it is at right angles to the
/// radius where it touches (same tangent fact, in three dimensions).
#[test]
fn dome_rim_is_where_sight_lines_graze_the_sphere() {
    let site = scene_with("Dome(at: (3, 4), diameter: 6, drum: 2)");
    let centre = Point3::new(3.0, 4.0, 2.0);
    for eye in [
        Point3::new(-10.0, -6.0, 1.6),
        Point3::new(3.5, 4.0, 20.0),
        Point3::new(3.0, 12.0, 2.0),
    ] {
        let rims: Vec<SiteCurve> = site
            .outline_edges_from(&eye)
            .into_iter()
            .map(|e| e.curve)
            .filter(|c| matches!(c, SiteCurve::Ellipse(_)))
            .collect();
        assert_eq!(rims.len(), 1, "{eye}");
        let SiteCurve::Ellipse(arc) = &rims[0] else {
            panic!()
        };
        let EllipseArc {
            centre: c,
            u,
            v,
            start,
            sweep,
        } = *arc;
        for i in 0..=20 {
            let t = start + sweep * i as f64 / 20.0;
            let p = c + u * t.cos() + v * t.sin();
            assert_near((p - centre).norm(), 3.0, 1e-12);
            assert_near((p - eye).dot(&(p - centre)), 0.0, 1e-9);
            assert!(p.z >= centre.z - 1e-9, "{p} is below the dome's springing");
        }
    }
}

/// One international foot is 0.3048 m exactly (international yard and pound agreement,
/// 1959).
#[test]
fn scenes_in_feet_are_drawn_in_metres() {
    let site = site(
        "Scene(unit: Foot, standpoints: [(name: \"a\", x: 10, y: 0), (name: \"b\", x: 0, y: 0, eye_height: 5)], \
         items: [Block(at: Corner(0, 0), width: 10, depth: 10, height: 20)])",
    );
    let (_, hi) = bounds(&site).unwrap();
    assert_near(hi.z, 6.096, 1e-12);
    assert_near(site.standpoints[0].x, 3.048, 1e-12);
    // The default eye height is a person's, in metres, whatever the unit.
    assert_eq!(site.standpoints[0].eye_height, DEFAULT_EYE_HEIGHT);
    assert_near(site.standpoints[1].eye_height, 1.524, 1e-12);
}

#[test]
fn postures_and_the_default_standpoint() {
    let site = site(
        "Scene(default_standpoint: \"bench\", standpoints: [(name: \"kerb\", x: 0, y: 0), \
         (name: \"bench\", x: 1, y: 1, posture: Seated)], items: [])",
    );
    assert_eq!(site.default_standpoint().unwrap().name, "bench");
    assert_eq!(
        site.default_standpoint().unwrap().eye_height,
        SEATED_EYE_HEIGHT
    );
    let text =
        "Scene(default_standpoint: \"roof\", standpoints: [(name: \"a\", x: 0, y: 0)], items: [])";
    let error = parse_scene(text.as_bytes(), Path::new("t.ron"), "t")
        .unwrap_err()
        .to_string();
    assert!(
        error.contains("roof") && error.contains("t.ron:1:"),
        "{error}"
    );
}

#[test]
fn groups_and_repeats_place_their_items() {
    // A repeat of four columns 5 m apart inside a group at (100, 0) turned a quarter
    // clockwise: the row's step south turns to west, so it runs west from (100, 0).
    let site = scene_with(
        "Group(at: (100, 0, 0), turn: 90, layer: \"lamps\", items: [Repeat(count: 4, step: (0, -5, 0), \
         items: [Column(label: \"lamp\", at: (0, 0), diameter: 0.2, height: 4)])])",
    );
    assert_eq!(site.items.len(), 4);
    assert_eq!(site.describe_item(ItemId(3)), "column \"lamp 4\" (item 4)");
    assert_eq!(site.items[2].layer.as_deref(), Some("lamps"));
    let (lo, hi) = bounds(&site).unwrap();
    assert_near(lo.x, 84.9, 1e-9);
    assert_near(hi.x, 100.1, 1e-9);
    assert_near(lo.y, -0.1, 1e-9);
    assert_near(hi.y, 0.1, 1e-9);
}

/// The highest point of a site's curved edges (exactly, from the curves).
fn highest_curve_point(site: &Site) -> f64 {
    let mut curves = site.clone();
    curves.edges = site
        .edges
        .iter()
        .filter(|e| matches!(e.curve, SiteCurve::Ellipse(_)))
        .collect();
    curves.faces.clear();
    bounds(&curves).unwrap().1.z
}

/// A segmental arch of span s and rise h is an arc of radius (s^2/4 + h^2) / 2h: the
/// intersecting-chords theorem (any geometry handbook). Its crown is the rise above the
/// springing, and its ends are the springing points.
#[test]
fn segmental_arch_crown_and_radius() {
    let (span, rise, springing) = (4.0, 1.0, 2.0);
    let site = scene_with(&format!(
        "Arch(at: Centre(0, 0), span: {span}, springing: {springing}, pier: 1, thickness: 0.5, \
         shape: Segmental(rise: {rise}))"
    ));
    assert_near(highest_curve_point(&site), springing + rise, 1e-12);
    let radius = (span * span / 4.0 + rise * rise) / (2.0 * rise);
    for edge in &site.edges {
        if let SiteCurve::Ellipse(arc) = &edge.curve {
            assert_near(arc.u.norm(), radius, 1e-12);
            assert_near(arc.v.norm(), radius, 1e-12);
        }
    }
}

/// An equilateral pointed arch (each arc's radius equal to the span, its centre at the
/// other springing point) has its apex span x sin 60 degrees above the springing (common
/// practice: the arcs and the span make an equilateral triangle).
#[test]
fn equilateral_pointed_arch_apex() {
    let (span, springing) = (3.0, 2.5);
    let site = scene_with(&format!(
        "Arch(at: Centre(0, 0), span: {span}, springing: {springing}, pier: 1, thickness: 0.5, \
         shape: Pointed())"
    ));
    assert_near(
        highest_curve_point(&site),
        springing + span * 60f64.to_radians().sin(),
        1e-12,
    );
}

/// A pointed arch given by the radius of its arcs. Each arc is centred on the springing
/// line r - s/2 beyond the axis (on the far side) and passes through the near springing and
/// the apex on the axis, so rise^2 + (r - s/2)^2 = r^2 and the rise of a two-centred arch
/// of span s and radius r is sqrt(r^2 - (r - s/2)^2) (plane geometry, Pythagoras). With
/// r = s (the equilateral arch, common practice) that is sqrt(s^2 - s^2/4) = s sqrt(3)/2.
#[test]
fn pointed_arch_and_window_head_by_radius() {
    let rise = |span: f64, radius: f64| (radius * radius - (radius - span / 2.0).powi(2)).sqrt();
    for (span, radius) in [(3.0, 2.4), (3.0, 3.0), (2.0, 7.5)] {
        let springing = 2.5;
        let site = scene_with(&format!(
            "Arch(at: Centre(0, 0), span: {span}, springing: {springing}, pier: 1, \
             thickness: 0.5, shape: Pointed(radius: {radius}))"
        ));
        assert_near(
            highest_curve_point(&site),
            springing + rise(span, radius),
            1e-12,
        );
        for edge in &site.edges {
            if let SiteCurve::Ellipse(arc) = &edge.curve {
                assert_near(arc.u.norm(), radius, 1e-12);
                assert_near(arc.v.norm(), radius, 1e-12);
            }
        }
    }
    assert_near(rise(3.0, 3.0), 3.0 * 3f64.sqrt() / 2.0, 1e-15);
    // A window head of width 1.2 and radius 0.9 rises sqrt(0.81 - 0.09) = 0.8485 to its
    // crown at the opening's height.
    let (width, radius, sill, height) = (1.2, 0.9, 2.0, 3.4);
    let site = scene_with(&format!(
        "Block(at: Corner(0, 0), width: 8, depth: 6, height: 7, openings: [(wall: Front, \
         width: {width}, height: {height}, sill: {sill}, head: Pointed(radius: {radius}))])"
    ));
    assert_near(highest_curve_point(&site), sill + height, 1e-12);
    let springing = sill + height - rise(width, radius);
    let mut arcs = 0;
    for edge in &site.edges {
        if let SiteCurve::Ellipse(arc) = &edge.curve {
            assert_near(arc.u.norm(), radius, 1e-12);
            assert_near(arc.centre.z, springing, 1e-12);
            arcs += 1;
        }
    }
    assert_eq!(arcs, 2);
}

/// A window head follows the same curves. A segmental head of width s rising h: radius
/// (s^2/4 + h^2) / 2h (intersecting chords, any geometry handbook), crown at the
/// opening's height; the reveal's back and the surround draw the same arc again, the
/// surround's radius longer by its width.
#[test]
fn segmental_window_head_crown_and_radius() {
    let (width, rise, sill, height, surround) = (1.6, 0.4, 1.0, 2.5, 0.2);
    let site = scene_with(&format!(
        "Block(at: Corner(0, 0), width: 8, depth: 6, height: 6, openings: [(wall: Front, \
         width: {width}, height: {height}, sill: {sill}, reveal: 0.3, surround: {surround}, \
         head: Segmental(rise: {rise}))])"
    ));
    let radius = (width * width / 4.0 + rise * rise) / (2.0 * rise);
    let mut radii: Vec<f64> = Vec::new();
    for edge in &site.edges {
        if let SiteCurve::Ellipse(arc) = &edge.curve {
            assert_near(arc.u.norm(), arc.v.norm(), 1e-12);
            radii.push(arc.u.norm());
        }
    }
    radii.sort_by(f64::total_cmp);
    assert_eq!(radii.len(), 3);
    assert_near(radii[0], radius, 1e-12);
    assert_near(radii[1], radius, 1e-12);
    assert_near(radii[2], radius + surround, 1e-12);
    // The surround's crown is the head's crown raised by its width.
    assert_near(highest_curve_point(&site), sill + height + surround, 1e-9);
}

/// An equilateral pointed window head: its apex stands width x sin 60 degrees above the
/// springing (common practice), so at the opening's height with the springing that much
/// lower.
#[test]
fn equilateral_pointed_window_head_apex() {
    let (width, sill, height) = (1.2, 2.0, 3.4);
    let site = scene_with(&format!(
        "Block(at: Corner(0, 0), width: 8, depth: 6, height: 7, openings: [(wall: Front, \
         width: {width}, height: {height}, sill: {sill}, head: Pointed())])"
    ));
    assert_near(highest_curve_point(&site), sill + height, 1e-12);
    let springing = sill + height - width * 60f64.to_radians().sin();
    for edge in &site.edges {
        if let SiteCurve::Ellipse(arc) = &edge.curve {
            // Each arc's radius is the width, its centre on the springing line.
            assert_near(arc.u.norm(), width, 1e-12);
            assert_near(arc.centre.z, springing, 1e-12);
        }
    }
}

/// Shaped heads and round windows on a `Footprint`'s sides, either way round: a
/// semicircular head of width s is a half circle of radius s / 2 whose crown is at the
/// opening's height, its centre on the springing line s / 2 lower (common practice); a
/// round window is a circle of its diameter about its centre, on the side's plane.
#[test]
fn a_footprints_sides_take_shaped_heads_and_round_windows() {
    let (width, sill, height, diameter, centre) = (1.4, 1.0, 2.6, 1.2, 4.5);
    // An L-shaped plan, counter-clockwise and then clockwise: side 1 runs along y = 0,
    // from x = 0 to 10 and from 10 to 0.
    // The round window's centre is `along` 2 m from the side's start: x = 2, then x = 8.
    for (points, window_x) in [
        ("[(0, 0), (10, 0), (10, 8), (4, 8), (4, 4), (0, 4)]", 2.0),
        ("[(10, 0), (0, 0), (0, 4), (4, 4), (4, 8), (10, 8)]", 8.0),
    ] {
        let site = scene_with(&format!(
            "Footprint(points: {points}, height: 7, openings: [(wall: Side(1), width: {width}, \
             height: {height}, sill: {sill}, head: Semicircular)], round_windows: [(wall: \
             Side(1), along: 2, centre: {centre}, diameter: {diameter})])"
        ));
        let mut half_circles = 0;
        let mut circles = 0;
        for edge in &site.edges {
            if let SiteCurve::Ellipse(arc) = &edge.curve {
                let EllipseArc {
                    centre: c, u, v, ..
                } = *arc;
                // Every curve stands in the side's plane y = 0.
                assert_near(c.y, 0.0, 1e-12);
                assert_near(u.y, 0.0, 1e-12);
                assert_near(v.y, 0.0, 1e-12);
                if (u.norm() - width / 2.0).abs() < 1e-9 {
                    assert_near(c.z, sill + height - width / 2.0, 1e-12);
                    half_circles += 1;
                } else {
                    assert_near(u.norm(), diameter / 2.0, 1e-12);
                    assert_near(c.z, centre, 1e-12);
                    assert_near(c.x, window_x, 1e-12);
                    circles += 1;
                }
            }
        }
        assert!(
            half_circles >= 1 && circles >= 1,
            "{points}: {half_circles} {circles}"
        );
        assert_near(highest_curve_point(&site), centre + diameter / 2.0, 1e-9);
    }
}

// --- Curved items flattened from random standpoints --------------------------------------

const WIDTH: f64 = 2048.0;
const TOLERANCE: f64 = 0.1;

/// The scene whose curves are checked: columns, a coned and a domed tower, a dome, an
/// arcade of every arch shape along y = -6 (openings from x = -9 to 9), a vaulted room
/// over x 12 to 20, y -4 to 12, and a road with rounded corners.
const CURVED: &str = "Scene(items: [
    Column(at: (0, 0), diameter: 0.6, height: 4, plinth: 0.3, capital: 0.4),
    Tower(at: (8, 3), diameter: 4, height: 9, roof: Cone(height: 5)),
    Tower(at: (-7, 5), diameter: 3, height: 6, roof: Dome),
    Dome(at: (0, 12), diameter: 10, drum: 3),
    Arcade(at: Corner(-9.6, -6), count: 1, span: 3, springing: 2, pier: 0.6, thickness: 0.8),
    Arcade(at: Corner(-5.8, -6), count: 1, span: 3, springing: 2, pier: 0.6, thickness: 0.8, shape: Segmental(rise: 1)),
    Arcade(at: Corner(-2, -6), count: 1, span: 3, springing: 2, pier: 0.6, thickness: 0.8, shape: Pointed()),
    Arcade(at: Corner(1.8, -6), count: 1, span: 3, springing: 2, pier: 0.6, thickness: 0.8, shape: Elliptical(rise: 1.2)),
    Arcade(at: Corner(5.6, -6), count: 1, span: 3, springing: 2, pier: 0.6, thickness: 0.8, shape: ThreeCentred(rise: 1.1)),
    Room(at: Corner(12, -4), width: 8, depth: 16, height: 3.5, ceiling: Vault(bays: 4)),
    Road(points: [(-30, -20), (0, -20), (20, -40)], width: 7, pavement: 2, kerb: 0.15, corner_radius: 10,
         centre_line: Dashed(dash: 3, gap: 5)),
])";

/// Standpoints anywhere, standing in the arches' openings, and under the vault.
fn standpoint() -> impl Strategy<Value = Standpoint> {
    let anywhere = (-15.0..22.0f64, -25.0..20.0f64, 0.2..12.0f64);
    let in_an_arch = (-9.0..9.0f64, -5.9..-5.2f64, 0.2..3.0f64);
    let under_the_vault = (12.3..19.7f64, -3.7..11.7f64, 0.2..6.0f64);
    (
        prop_oneof![anywhere, in_an_arch, under_the_vault],
        -180.0..180.0f64,
        -30.0..30.0f64,
    )
        .prop_map(|((x, y, eye), heading, pitch)| {
            Standpoint::from_degrees("random", x, y, eye, heading, pitch, 0.0)
        })
}

/// The distance from the drawing to the true image of the curve, sampled densely
/// (the image of P(t) / |P(t)|, the definition itself), away from the pole rows, with the
/// number of points compared; `None` when the curve has no image to compare.
fn worst_miss(view: &ViewFrame, curve: &SiteCurve) -> Option<(f64, usize)> {
    let map = Equirect::from_size_px(WIDTH, WIDTH / 2.0);
    let sphere = view.sphere_curve(curve).ok()?;
    let mut set = PolylineSet::new();
    flatten(&sphere, map, TOLERANCE, &mut set);
    let lines: Vec<Vec<ImagePoint>> = set.iter().map(|l| l.to_vec()).collect();
    let mut worst: f64 = 0.0;
    let mut compared = 0;
    for i in 0..=1000 {
        let t = sphere.t0 + (sphere.t1 - sphere.t0) * i as f64 / 1000.0;
        let (az, el) = azimuth_elevation(&sphere.position(t));
        let p = map.to_image(az, el);
        if p.y <= 1.5 * TOLERANCE || p.y >= WIDTH / 2.0 - 1.5 * TOLERANCE {
            continue;
        }
        let miss = [0.0, WIDTH, -WIDTH]
            .iter()
            .map(|s| {
                distance_to_polylines(
                    ImagePoint::new(p.x + s, p.y),
                    lines.iter().map(Vec::as_slice),
                )
            })
            .fold(f64::INFINITY, f64::min);
        worst = worst.max(miss);
        compared += 1;
    }
    Some((worst, compared))
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    #[test]
    fn curved_items_stay_within_tolerance(standpoint in standpoint()) {
        let site = site(CURVED);
        let view = ViewFrame::new(&standpoint);
        let outlines = site.outline_edges_from(&standpoint.eye());
        let curved = site.edges.iter().chain(outlines.iter().copied()).filter(|e| {
            matches!(e.curve, SiteCurve::Ellipse(_)) || outlines.contains(e)
        });
        // Every curve is built and compared: none may slip through as "no image".
        let (mut curves, mut points) = (0, 0);
        for edge in curved {
            let built = worst_miss(&view, &edge.curve);
            prop_assert!(built.is_some(), "{:?} has no image from {:?}", edge.curve, standpoint);
            let (miss, compared) = built.unwrap();
            prop_assert!(miss <= TOLERANCE * 1.001 + 1e-9, "{:?} missed by {} px", edge.curve, miss);
            curves += 1;
            points += compared;
        }
        prop_assert!(curves >= 10, "only {} curves checked", curves);
        prop_assert!(points >= 500 * curves, "only {} points on {} curves", points, curves);
    }
}

#[test]
fn a_block_of_no_height_is_its_plan_with_a_warning() {
    let site =
        scene_with("Block(label: \"plot\", at: Corner(0, 0), width: 12, depth: 30, height: 0)");
    assert_eq!(site.edges.len(), 4);
    assert!(site.faces.is_empty());
    assert_eq!(site.warnings.len(), 1);
    assert!(
        site.warnings[0].1.contains("no height"),
        "{:?}",
        site.warnings
    );
}

#[test]
fn a_standpoint_inside_a_block_is_found_and_the_extent_is_exact() {
    let site = site(
        "Scene(standpoints: [(name: \"in\", x: 2, y: 1), (name: \"out\", x: 9, y: 1)], \
         items: [Block(at: Corner(0, 0), width: 4, depth: 3, height: 5)])",
    );
    let survey = pansite::scene::survey(&site);
    assert_eq!(survey.standpoints[0].inside, vec![ItemId(0)]);
    assert!(survey.standpoints[1].inside.is_empty());
    let (lo, hi) = survey.bounds.unwrap();
    assert_eq!(
        (lo, hi),
        (Point3::new(0.0, 0.0, 0.0), Point3::new(4.0, 3.0, 5.0))
    );
}

#[test]
fn overhanging_roofs_close_their_solid() {
    // A standpoint inside a block with an overhanging roof is inside it; one just outside
    // a wall, under the overhang, is not.
    for roof in [
        "Gable(ridge: 8, overhang: 0.6)",
        "Hip(ridge: 8, overhang: 0.6)",
        "Shed(back: 6, overhang: 0.6)",
    ] {
        let site = site(&format!(
            "Scene(standpoints: [(name: \"in\", x: 2, y: 2), (name: \"eaves\", x: -0.3, y: 2, eye_height: 1.6)], \
             items: [Block(at: Corner(0, 0), width: 10, depth: 6, height: 5, roof: {roof})])"
        ));
        let survey = pansite::scene::survey(&site);
        assert_eq!(survey.standpoints[0].inside, vec![ItemId(0)], "{roof}");
        assert!(survey.standpoints[1].inside.is_empty(), "{roof}");
    }
}

#[test]
fn runaway_repeats_and_opening_grids_are_refused_quickly() {
    for bad in [
        "Repeat(count: 100000, items: [Repeat(count: 100000, items: [])])",
        "Repeat(count: 100000, items: [Repeat(count: 100000, items: [Point(at: (0, 0, 0))])])",
        "Block(at: Corner(0, 0), width: 1e6, depth: 10, height: 1e6, openings: [(wall: Front, count: 100000, \
         width: 1, height: 1, rows: 1000, row_step: 2)])",
    ] {
        let text = format!("Scene(items: [{bad}])");
        let error = parse_scene(text.as_bytes(), Path::new("t.ron"), "t").unwrap_err().to_string();
        assert!(error.contains("more than"), "{error}");
    }
}

/// The length of an item's segments lying on the ground at both ends and the middle (the
/// foot line), and how many of them slope; panics if one leaves the ground in between.
fn foot_on_ground(site: &Site, kind: &str) -> (f64, usize) {
    let ground = site.ground.as_ref().expect("a ground");
    let item = site.items.iter().position(|i| i.kind == kind).unwrap() as u32;
    let on_ground = |p: &Point3<f64>| {
        ground
            .height_at(p.x, p.y)
            .is_some_and(|z| (z - p.z).abs() < 1e-9)
    };
    let mut length = 0.0;
    let mut slopes = 0;
    for edge in site.edges.iter().filter(|e| e.item == ItemId(item)) {
        if let SiteCurve::Segment { start, end } = edge.curve {
            let middle = Point3::from((start.coords + end.coords) / 2.0);
            if on_ground(&start) && on_ground(&end) && (start - end).xy().norm() > 1e-9 {
                assert!(on_ground(&middle), "{start} to {end} leaves the ground");
                length += (end - start).xy().norm();
                slopes += usize::from((start.z - end.z).abs() > 1e-6);
            }
        }
    }
    (length, slopes)
}

const HILL: &str = "ground: (spots: [(-40, -20, 0), (40, -20, 0), (-40, 60, 6), (40, 60, 6)],
                        contours: [(height: 2, points: [(-40, 10), (0, 12), (40, 10)]),
                                   (height: 4, points: [(-40, 30), (0, 33), (40, 30)])])";

#[test]
fn a_block_on_sloping_ground_is_drawn_where_its_walls_meet_the_ground() {
    // A vertical wall meets each flat triangle of the ground in a straight line (two planes
    // meet in a line, plane geometry), so the foot line is straight between the points
    // where a wall crosses the triangles' edges, and lies on the ground all along: checked
    // at every segment's ends and middle against the ground's own heights, and round the
    // whole plan (its perimeter, 2 x (8 + 12) = 40 m, by hand).
    let site = site(&format!(
        "Scene({HILL},
               items: [Block(at: Centre(3, 22), width: 8, depth: 12, height: 7,
                             on_ground: true, roof: Gable(ridge: 11, along: Depth))])"
    ));
    let (length, slopes) = foot_on_ground(&site, "block");
    assert_near(length, 40.0, 1e-9);
    // The side walls run up the slope, so parts of the foot line slope.
    assert!(slopes >= 2, "{slopes}");
}

/// The site's straight edges, as their two ends.
fn straight_edges(site: &Site) -> Vec<(Point3<f64>, Point3<f64>)> {
    site.edges
        .iter()
        .filter_map(|e| match e.curve {
            SiteCurve::Segment { start, end } => Some((start, end)),
            _ => None,
        })
        .collect()
}

/// The height of the lowest level edge of the first item of `kind`: the foot of its walls
/// (the foot line drawn on sloping ground is level only where the ground is).
fn lowest_level_edge_of(site: &Site, kind: &str) -> f64 {
    let item = site.items.iter().position(|i| i.kind == kind).unwrap() as u32;
    site.edges
        .iter()
        .filter(|e| e.item == ItemId(item))
        .filter_map(|e| match e.curve {
            SiteCurve::Segment { start, end } if start.z == end.z => Some(start.z),
            _ => None,
        })
        .fold(f64::INFINITY, f64::min)
}

#[test]
fn a_hollow_across_a_wall_does_not_leave_the_wall_short_of_the_ground() {
    // A V-shaped valley along x = 0 (a break line at height 0; the sides rise 4 m in
    // 40 m, 1 in 10). A block 16 m across it has its corners at x = -8 and 8, on ground
    // 0.8 m high (by hand: 4 x 8 / 40), but its front and back walls cross the valley's
    // floor at height 0: it stands there, so no wall stops above the ground, and its foot
    // line still lies on the ground all round (perimeter 2 x (16 + 8) = 48 m).
    let valley = "ground: (spots: [(-40, -20, 4), (40, -20, 4), (-40, 60, 4), (40, 60, 4)],
                           break_lines: [[(0, -20, 0), (0, 60, 0)]])";
    for (kind, item) in [
        (
            "block",
            "Block(at: Centre(0, 20), width: 16, depth: 8, height: 6, on_ground: true)",
        ),
        (
            "footprint",
            "Footprint(points: [(-8, 16), (8, 16), (8, 24), (-8, 24)], height: 6,
                       on_ground: true)",
        ),
    ] {
        let site = site(&format!("Scene({valley}, items: [{item}])"));
        let ground = site.ground.as_ref().unwrap();
        assert_near(ground.height_at(8.0, 16.0).unwrap(), 0.8, 1e-9);
        assert_near(lowest_level_edge_of(&site, kind), 0.0, 1e-9);
        let (length, _) = foot_on_ground(&site, kind);
        assert_near(length, 48.0, 1e-9);
    }
}

#[test]
fn a_footprint_on_sloping_ground_is_drawn_where_its_walls_meet_the_ground() {
    // The same plane geometry as for a block; an L-shaped plan whose perimeter is, by
    // hand, 10 + 4 + 6 + 8 + 4 + 12 = 44 m.
    let site = site(&format!(
        "Scene({HILL},
               items: [Footprint(points: [(0, 14), (10, 14), (10, 18), (4, 18), (4, 26),
                                          (0, 26)], height: 6, on_ground: true)])"
    ));
    let (length, slopes) = foot_on_ground(&site, "footprint");
    assert_near(length, 44.0, 1e-9);
    assert!(slopes >= 2, "{slopes}");
    // It stands at its lowest corner, as a block does: the lowest wall foot is there.
    let ground = site.ground.as_ref().unwrap();
    let lowest = [(0.0, 14.0), (10.0, 14.0)]
        .map(|(x, y)| ground.height_at(x, y).unwrap())
        .into_iter()
        .fold(f64::INFINITY, f64::min);
    let item = site
        .items
        .iter()
        .position(|i| i.kind == "footprint")
        .unwrap() as u32;
    let lowest_edge = site
        .edges
        .iter()
        .filter(|e| e.item == ItemId(item))
        .filter_map(|e| match e.curve {
            SiteCurve::Segment { start, end } => Some(start.z.min(end.z)),
            _ => None,
        })
        .filter(|z| z.is_finite())
        .fold(f64::INFINITY, f64::min);
    assert_near(lowest_edge, lowest, 1e-9);
}

#[test]
fn a_plinth_carries_a_level_floor_and_its_courses_stop_at_the_ground() {
    // A plane ground z = 0.075 (y + 20) (four coplanar spot heights). A linear function on
    // a rectangle is highest at a corner (plane geometry), so the floor is at the back,
    // y = 28: 3.6 m; the front, y = 16, is at 2.7 m. Course lines every 0.3 m down from the
    // floor: at 3.3 and 3.0 m (the one at 2.7 m touches the front's ground and is not drawn).
    // Each runs the whole front (8 m) and up each side until the ground reaches it, at
    // (H - 2.7) / 0.075 from the front by similar triangles: 8 m for 3.3, 4 m for 3.0.
    let site = site(
        "Scene(ground: (spots: [(-40, -20, 0), (40, -20, 0), (-40, 60, 6), (40, 60, 6)]),
               items: [Block(at: Centre(3, 22), width: 8, depth: 12, height: 7,
                             on_ground: true, plinth: (course: 0.3))])",
    );
    let segments = straight_edges(&site);
    let level_length = |z: f64| -> f64 {
        segments
            .iter()
            .filter(|(a, b)| (a.z - z).abs() < 1e-9 && (b.z - z).abs() < 1e-9)
            .map(|(a, b)| (b - a).norm())
            .sum()
    };
    // The floor: the foot of the walls, round the whole plan at 3.6 m.
    assert_near(level_length(3.6), 40.0, 1e-9);
    assert_near(level_length(3.3), 8.0 + 2.0 * 8.0, 1e-9);
    assert_near(level_length(3.0), 8.0 + 2.0 * 4.0, 1e-9);
    // At 2.7 m only the foot along the front (8 m): no course drawn on the ground.
    assert_near(level_length(2.7), 8.0, 1e-9);
    // The foot line still runs round the plinth on the ground.
    let (length, _) = foot_on_ground(&site, "block");
    assert_near(length, 40.0, 1e-9);
    // The front corners' plinth edges drop from the floor the full 0.9 m to the ground.
    let corner_drops = segments
        .iter()
        .filter(|(a, b)| {
            let (low, high) = (a.z.min(b.z), a.z.max(b.z));
            (a.xy() - b.xy()).norm() < 1e-9 && (high - 3.6).abs() < 1e-9 && (low - 2.7).abs() < 1e-9
        })
        .count();
    assert_eq!(corner_drops, 2);
}

#[test]
fn a_projecting_plinth_carries_a_ledge_and_stands_on_the_highest_ground_under_it() {
    // The plane ground z = 0.075 (y + 20) of the plinth test above; the block spans
    // y = 16..28, its plinth projects 0.5 beyond the walls, to y = 15.5..28.5. A linear
    // function on a rectangle is highest at a corner (plane geometry): the floor is at
    // 0.075 x 48.5 = 3.6375 m. At the floor: the walls' foot, 2 x (8 + 12) = 40 m, and the
    // ledge's edge, 2 x (9 + 13) = 44 m. The plinth's front corners drop to the ground at
    // y = 15.5, 0.075 x 35.5 = 2.6625 m. Set back 0.5 instead, the floor is at the
    // building's back, 3.6 m, and the plinth's outline at the floor 2 x (7 + 11) = 36 m.
    for (projection, floor, outline, front) in [
        (0.5, 0.075 * 48.5, 44.0, 0.075 * 35.5),
        (-0.5, 3.6, 36.0, 0.075 * 36.5),
    ] {
        let site = site(&format!(
            "Scene(ground: (spots: [(-40, -20, 0), (40, -20, 0), (-40, 60, 6), (40, 60, 6)]),
                   items: [Block(at: Centre(3, 22), width: 8, depth: 12, height: 7,
                                 on_ground: true, plinth: (projection: {projection}))])"
        ));
        let segments = straight_edges(&site);
        let level_length: f64 = segments
            .iter()
            .filter(|(a, b)| (a.z - floor).abs() < 1e-9 && (b.z - floor).abs() < 1e-9)
            .map(|(a, b)| (b - a).norm())
            .sum();
        assert_near(level_length, 40.0 + outline, 1e-9);
        let corner_drops = segments
            .iter()
            .filter(|(a, b)| {
                let (low, high) = (a.z.min(b.z), a.z.max(b.z));
                (a.xy() - b.xy()).norm() < 1e-9
                    && (high - floor).abs() < 1e-9
                    && (low - front).abs() < 1e-9
            })
            .count();
        assert_eq!(corner_drops, 2, "{projection}");
        // The ledge (or the overhang's underside) is a face at the floor between the two
        // outlines: 9 x 13 - 8 x 12 = 21 m2 standing out, 8 x 12 - 7 x 11 = 19 m2 set back;
        // beside the block's own floor, 8 x 12 = 96 m2.
        let ring: f64 = site
            .faces
            .iter()
            .filter(|f| f.corners.iter().all(|c| (c.z - floor).abs() < 1e-9))
            .map(|f| {
                let [a, b, c] = f.corners;
                0.5 * (b - a).cross(&(c - a)).norm()
            })
            .sum();
        let expected = 96.0 + if projection > 0.0 { 21.0 } else { 19.0 };
        assert_near(ring, expected, 1e-9);
    }
}

/// A ground of three spot heights is one flat triangle: the plane through them (any text
/// on analytic geometry), worked by hand as z = 1 + x / 20 + y / 5 through (0, 0, 1),
/// (40, 0, 3) and (0, 40, 9).
const PLANE: &str = "ground: (spots: [(0, 0, 1), (40, 0, 3), (0, 40, 9)])";

fn plane_height(x: f64, y: f64) -> f64 {
    1.0 + x / 20.0 + y / 5.0
}

/// The curves of the edges of the item labelled `label`.
fn curves_of<'a>(site: &'a Site, label: &str) -> impl Iterator<Item = SiteCurve> + 'a {
    let item = site
        .items
        .iter()
        .position(|i| i.label.as_deref() == Some(label))
        .unwrap() as u32;
    site.edges
        .iter()
        .filter(move |e| e.item == ItemId(item))
        .map(|e| e.curve)
}

/// The lowest point of an item's edges: segment ends, and the lowest point of each
/// ellipse (its centre less the length of its axes' vertical parts, sqrt(u_z^2 + v_z^2)).
fn lowest_point_of(site: &Site, label: &str) -> f64 {
    curves_of(site, label)
        .map(|curve| match curve {
            SiteCurve::Segment { start, end } => start.z.min(end.z),
            SiteCurve::Ellipse(arc) => arc.centre.z - arc.u.z.hypot(arc.v.z),
        })
        .fold(f64::INFINITY, f64::min)
}

#[test]
fn figures_cars_and_trees_stand_on_the_sloping_ground_under_them() {
    // Without a `base`, a figure's soles, a car's wheels and a tree's trunk stand on the
    // ground at their plan position (the plane worked by hand above); with one, where told.
    let site = site(&format!(
        "Scene({PLANE}, items: [
            Figure(label: \"walker\", at: (10, 10)),
            Figure(label: \"sitter\", at: (2, 30), pose: Seated),
            Car(label: \"car\", at: (20, 5), facing: 90),
            Tree(label: \"lime\", at: (5, 20), height: 9, crown: 5),
            Figure(label: \"on the wall\", at: (30, 2), base: 4.5),
        ])"
    ));
    for (label, x, y) in [
        ("walker", 10.0, 10.0),
        ("sitter", 2.0, 30.0),
        ("car", 20.0, 5.0),
        ("lime", 5.0, 20.0),
    ] {
        assert_near(lowest_point_of(&site, label), plane_height(x, y), 1e-9);
    }
    assert_near(plane_height(10.0, 10.0), 3.5, 1e-12);
    // Given, the base is kept as written (above the ground there, 2.9: no warning).
    assert_near(lowest_point_of(&site, "on the wall"), 4.5, 1e-9);
    assert!(site.warnings.is_empty(), "{:?}", site.warnings);
    // On a scene without ground they stand at 0, as before.
    let flat = scene_with("Figure(label: \"walker\", at: (10, 10)), Tree(label: \"lime\", at: (5, 20), height: 9, crown: 5)");
    assert_near(lowest_point_of(&flat, "walker"), 0.0, 1e-12);
    assert_near(lowest_point_of(&flat, "lime"), 0.0, 1e-12);
}

#[test]
fn a_model_on_the_ground_stands_its_lowest_points_on_the_lowest_ground_under_them() {
    // A box 2 by 3 by 4 m (Z up, its first corner at its origin) placed at (10, 10) on the
    // plane worked by hand above: its four foot corners (10..12, 10..13) have the ground
    // at 3.5 to 4.2, the lowest 3.5 under (10, 10); `at`'s height is then above that.
    let dir = common::Scratch::new("model-on-ground");
    dir.write(
        "box.obj",
        "v 0 0 0\nv 2 0 0\nv 2 3 0\nv 0 3 0\nv 0 0 4\nv 2 0 4\nv 2 3 4\nv 0 3 4\n\
         f 1 4 3 2\nf 5 6 7 8\nf 1 2 6 5\nf 2 3 7 6\nf 3 4 8 7\nf 4 1 5 8\n",
    );
    let scene = dir.write(
        "s.ron",
        format!(
            "Scene({PLANE}, items: [
                Model(label: \"shed\", file: \"box.obj\", at: (10, 10, 0), up: Z, on_ground: true),
                Model(label: \"raised\", file: \"box.obj\", at: (20, 5, 0.5), up: Z, on_ground: true),
                Model(label: \"as written\", file: \"box.obj\", at: (30, 2, 0.25), up: Z),
            ])"
        ),
    );
    let site = pansite::scene::load_scene(&scene).unwrap();
    assert_near(plane_height(10.0, 10.0), 3.5, 1e-12);
    assert_near(lowest_point_of(&site, "shed"), 3.5, 1e-9);
    // Its foot corners at (20..22, 5..8): the lowest ground 3.0 under (20, 5), then 0.5 up.
    assert_near(
        lowest_point_of(&site, "raised"),
        plane_height(20.0, 5.0) + 0.5,
        1e-9,
    );
    assert_near(lowest_point_of(&site, "as written"), 0.25, 1e-12);
    // Without a ground, or reaching past it, refused by name.
    dir.write(
        "flat.ron",
        "Scene(items: [Model(label: \"shed\", file: \"box.obj\", up: Z, on_ground: true)])",
    );
    let message = pansite::scene::load_scene(&dir.path("flat.ron"))
        .unwrap_err()
        .to_string();
    assert!(
        message.contains("\"shed\"") && message.contains("no `ground`"),
        "{message}"
    );
    dir.write(
        "off.ron",
        format!("Scene({PLANE}, items: [Model(label: \"shed\", file: \"box.obj\", at: (39, 1, 0), up: Z, on_ground: true)])"),
    );
    let message = pansite::scene::load_scene(&dir.path("off.ron"))
        .unwrap_err()
        .to_string();
    assert!(message.contains("lies outside the ground"), "{message}");
}

#[test]
fn a_figure_car_or_tree_sunk_in_the_ground_is_refused_by_name() {
    // The ground at (10, 10) is 3.5 (by hand, above): a base of 3 is half a metre under
    // it, one of 3.47 within the few centimetres allowed.
    for (kind, item) in [
        (
            "figure",
            "Figure(label: \"walker\", at: (10, 10), base: BASE)",
        ),
        ("car", "Car(label: \"walker\", at: (10, 10), base: BASE)"),
        (
            "tree",
            "Tree(label: \"walker\", at: (10, 10), height: 9, crown: 5, base: BASE)",
        ),
    ] {
        let text = format!("Scene({PLANE}, items: [{}])", item.replace("BASE", "3"));
        let message = parse_scene(text.as_bytes(), Path::new("test.ron"), "test")
            .unwrap_err()
            .to_string();
        assert!(
            message.contains("\"walker\" (item 1)")
                && message.contains("stands 0.50 m under the ground at (10.00, 10.00)")
                && message.contains("the ground there is at 3.50"),
            "{kind}: {message}"
        );
        let close = site(&format!(
            "Scene({PLANE}, items: [{}])",
            item.replace("BASE", "3.47")
        ));
        assert!(close.warnings.is_empty(), "{kind}: {:?}", close.warnings);
    }
}

/// The horizontal circles (rims) of the item labelled `label`, as (centre height, radius).
fn level_circles_of(site: &Site, label: &str) -> Vec<(f64, f64)> {
    curves_of(site, label)
        .filter_map(|curve| match curve {
            SiteCurve::Ellipse(arc) if arc.u.z == 0.0 && arc.v.z == 0.0 => {
                Some((arc.centre.z, arc.u.norm()))
            }
            _ => None,
        })
        .collect()
}

/// The sloping ellipse arcs of the item labelled `label`: the line where it meets the
/// ground.
fn sloping_arcs_of(site: &Site, label: &str) -> Vec<SiteCurve> {
    curves_of(site, label)
        .filter(
            |curve| matches!(curve, SiteCurve::Ellipse(arc) if arc.u.z != 0.0 || arc.v.z != 0.0),
        )
        .collect()
}

#[test]
fn round_items_stand_at_the_lowest_ground_round_their_rims() {
    // On the plane z = 1 + x / 20 + y / 5 (worked by hand above), a circle of radius r
    // about c has its lowest point where it runs straight down the slope, r |grad z| below
    // z(c), |grad z| = sqrt(1/20^2 + 1/5^2) = sqrt(0.0425) (plane geometry, worked by
    // hand). A vertical cylinder meets the plane in the ellipse
    // c + r (cos t, sin t, cos t / 20 + sin t / 5) about (c, z(c)), drawn as the foot line.
    let slope = 0.0425f64.sqrt();
    for (kind, label, x, y, radius, base) in [
        ("Column", "column", 10.0, 10.0, 2.0, 0.0),
        ("Tower", "tower", 20.0, 8.0, 1.5, 1.0),
        ("Dome", "dome", 8.0, 22.0, 2.0, 0.0),
    ] {
        let fields = match kind {
            "Dome" => "drum: 2",
            _ => "height: 5",
        };
        let site = site(&format!(
            "Scene({PLANE}, items: [{kind}(label: \"{label}\", at: ({x}, {y}), \
             diameter: {}, {fields}, base: {base}, on_ground: true)])",
            2.0 * radius
        ));
        let foot = plane_height(x, y) - radius * slope + base;
        let circles = level_circles_of(&site, label);
        let lowest = circles.iter().map(|c| c.0).fold(f64::INFINITY, f64::min);
        assert_near(lowest, foot, 1e-12);
        let arcs = sloping_arcs_of(&site, label);
        assert_eq!(
            arcs.len(),
            1,
            "{label}: one flat triangle, one whole ellipse"
        );
        let SiteCurve::Ellipse(arc) = &arcs[0] else {
            unreachable!()
        };
        let EllipseArc {
            centre,
            u,
            v,
            sweep,
            ..
        } = *arc;
        assert_near(sweep, std::f64::consts::TAU, 1e-12);
        assert_near(
            (centre - Point3::new(x, y, plane_height(x, y))).norm(),
            0.0,
            1e-12,
        );
        assert_near(
            (u - nalgebra::Vector3::new(radius, 0.0, radius / 20.0)).norm(),
            0.0,
            1e-12,
        );
        assert_near(
            (v - nalgebra::Vector3::new(0.0, radius, radius / 5.0)).norm(),
            0.0,
            1e-12,
        );
    }
    // Without `on_ground` the scene keeps its meaning: the base as written.
    let site = site(&format!(
        "Scene({PLANE}, items: [Tower(label: \"t\", at: (20, 8), diameter: 3, height: 5)])"
    ));
    assert_near(level_circles_of(&site, "t")[0].0, 0.0, 0.0);
    assert!(sloping_arcs_of(&site, "t").is_empty());
}

#[test]
fn a_round_item_in_a_turned_group_meets_the_ground_in_the_same_ellipse() {
    // The column of the test above at (20, 10), placed through a group turned 30 degrees:
    // its foot line is the same ellipse in the site (the plane's, about (20, 10, 4)), and
    // every point of it lies on the ground.
    let site = site(&format!(
        "Scene({PLANE}, items: [Group(at: (20, 10, 0), turn: 30, items: [
            Column(label: \"c\", at: (0, 0), diameter: 4, height: 3, on_ground: true)])])"
    ));
    let arcs = sloping_arcs_of(&site, "c");
    assert_eq!(arcs.len(), 1);
    let SiteCurve::Ellipse(arc) = &arcs[0] else {
        unreachable!()
    };
    let EllipseArc {
        centre,
        u,
        v,
        start,
        sweep,
    } = *arc;
    assert_near((centre - Point3::new(20.0, 10.0, 4.0)).norm(), 0.0, 1e-12);
    let ground = site.ground.as_ref().unwrap();
    for k in 0..16 {
        let t = start + sweep * k as f64 / 16.0;
        let p = centre + u * t.cos() + v * t.sin();
        assert_near((p.xy() - centre.xy()).norm(), 2.0, 1e-12);
        assert_near(p.z, ground.height_at(p.x, p.y).unwrap(), 1e-12);
    }
    assert_near(
        level_circles_of(&site, "c")[0].0,
        4.0 - 2.0 * 0.0425f64.sqrt(),
        1e-12,
    );
    // The same scene in feet is the same shape 0.3048 times the size (a similarity keeps
    // the plane's slope): the foot line and the rim's lowest point scale with it.
    let feet = crate::site(&format!(
        "Scene(unit: Foot, {PLANE}, items: [Group(at: (20, 10, 0), turn: 30, items: [
            Column(label: \"c\", at: (0, 0), diameter: 4, height: 3, on_ground: true)])])"
    ));
    let foot = 0.3048;
    let SiteCurve::Ellipse(arc) = &sloping_arcs_of(&feet, "c")[0] else {
        unreachable!()
    };
    let in_feet = arc.centre;
    assert_near(
        (in_feet - Point3::new(20.0, 10.0, 4.0) * foot).norm(),
        0.0,
        1e-12,
    );
    assert_near(
        level_circles_of(&feet, "c")[0].0,
        (4.0 - 2.0 * 0.0425f64.sqrt()) * foot,
        1e-12,
    );
}

#[test]
fn a_round_item_across_a_valley_meets_each_side_in_its_own_arc() {
    // The V-shaped valley of the hollow test above: floor along x = 0 at height 0, the
    // sides rising 1 in 10. A column of radius 2 on the floor's line crosses it at
    // (0, 18) and (0, 22), on ground 0: it stands there, and its foot is two half
    // ellipses, one on each side. One beside it, centred at x = 5, stands on the lowest
    // point of its rim, x = 3: 0.3 (by hand).
    let valley = "ground: (spots: [(-40, -20, 4), (40, -20, 4), (-40, 60, 4), (40, 60, 4)],
                           break_lines: [[(0, -20, 0), (0, 60, 0)]])";
    let site = site(&format!(
        "Scene({valley}, items: [
            Column(label: \"across\", at: (0, 20), diameter: 4, height: 3, on_ground: true),
            Column(label: \"beside\", at: (5, 30), diameter: 4, height: 3, on_ground: true)])"
    ));
    assert_near(level_circles_of(&site, "across")[0].0, 0.0, 1e-12);
    assert_near(level_circles_of(&site, "beside")[0].0, 0.3, 1e-12);
    let arcs = sloping_arcs_of(&site, "across");
    assert_eq!(arcs.len(), 2);
    let ground = site.ground.as_ref().unwrap();
    for arc in arcs {
        let SiteCurve::Ellipse(arc) = arc else {
            unreachable!()
        };
        let EllipseArc {
            centre,
            u,
            v,
            start,
            sweep,
        } = arc;
        assert_near(sweep, std::f64::consts::PI, 1e-12);
        for k in 0..=8 {
            let t = start + sweep * k as f64 / 8.0;
            let p = centre + u * t.cos() + v * t.sin();
            assert_near(p.z, ground.height_at(p.x, p.y).unwrap(), 1e-12);
        }
    }
}

#[test]
fn arcades_stairs_vaults_and_rooms_stand_on_the_lowest_ground_along_their_sides() {
    // On the plane z = 1 + x / 20 + y / 5 (by hand above) a linear function on a
    // rectangle is lowest at a corner (plane geometry): each item's foot is at its
    // lowest corner, and its foot line runs round its plan on the ground (perimeters by
    // hand). An arcade stands on its piers: two, 1 x 0.5 each, the first from (2, 2).
    for (kind, item, corner, perimeter) in [
        (
            "arch",
            "Arch(at: Corner(2, 2), span: 2, springing: 2, pier: 1, thickness: 0.5, \
             on_ground: true)",
            (2.0, 2.0),
            2.0 * 3.0,
        ),
        // Going up northwards: 2 wide from x = 24 to 26, 4 treads 0.3 deep from y = 2.
        (
            "stairs",
            "Stairs(at: (25, 2), bearing: 0, steps: 4, rise: 0.2, going: 0.3, width: 2, \
             on_ground: true)",
            (24.0, 2.0),
            2.0 * (2.0 + 1.2),
        ),
        (
            "vault",
            "Vault(at: Corner(2, 28), width: 3, depth: 4, springing: 2, on_ground: true)",
            (2.0, 28.0),
            14.0,
        ),
        (
            "room",
            "Room(at: Corner(12, 14), width: 4, depth: 3, height: 3, on_ground: true)",
            (12.0, 14.0),
            14.0,
        ),
    ] {
        let site = site(&format!("Scene({PLANE}, items: [{item}])"));
        let (x, y) = corner;
        assert_near(lowest_level_edge_of(&site, kind), plane_height(x, y), 1e-9);
        let (length, slopes) = foot_on_ground(&site, kind);
        assert_near(length, perimeter, 1e-9);
        assert!(slopes >= 4, "{kind}: {slopes}");
        // Without `on_ground`, the base as written.
        let flat = site_without_on_ground(item);
        assert_near(lowest_level_edge_of(&flat, kind), 0.0, 0.0);
    }
    // A room on a plinth has its level floor at the highest corner, (16, 17): 5.2.
    let site = site(&format!(
        "Scene({PLANE}, items: [Room(at: Corner(12, 14), width: 4, depth: 3, height: 3,
                                     on_ground: true, plinth: ())])"
    ));
    assert_near(plane_height(16.0, 17.0), 5.2, 1e-12);
    let floor: f64 = straight_edges(&site)
        .iter()
        .filter(|(a, b)| (a.z - 5.2).abs() < 1e-9 && (b.z - 5.2).abs() < 1e-9)
        .map(|(a, b)| (b - a).norm())
        .sum();
    assert_near(floor, 14.0, 1e-9);
}

fn site_without_on_ground(item: &str) -> Site {
    site(&format!(
        "Scene({PLANE}, items: [{}])",
        item.replace(", on_ground: true", "")
            .replace("on_ground: true", "")
    ))
}

#[test]
fn standing_on_a_ground_that_is_not_there_is_refused_by_name() {
    for item in [
        "Column(at: (0, 0), diameter: 1, height: 3, on_ground: true)",
        "Tower(at: (0, 0), diameter: 4, height: 9, on_ground: true)",
        "Dome(at: (0, 0), diameter: 4, on_ground: true)",
        "Arch(at: Corner(0, 0), span: 2, springing: 2, pier: 1, thickness: 0.5, on_ground: true)",
        "Stairs(at: (0, 0), bearing: 0, steps: 4, rise: 0.2, going: 0.3, width: 2, on_ground: true)",
        "Vault(at: Corner(0, 0), width: 3, depth: 4, springing: 2, on_ground: true)",
        "Room(at: Corner(0, 0), width: 4, depth: 3, height: 3, on_ground: true)",
    ] {
        let text = format!("Scene(items: [{item}])");
        let message = parse_scene(text.as_bytes(), Path::new("test.ron"), "test")
            .unwrap_err()
            .to_string();
        assert!(message.contains("test.ron:1:15:"), "{message}");
        assert!(message.contains("no `ground`"), "{item}: {message}");
        // Off the ground's edge: the plane's triangle has its corners at (0, 0), (40, 0)
        // and (0, 40), and these stand half off it, at x = -1.
        let off = item.replace("(0, 0)", "(-1, 5)");
        let text = format!("Scene({PLANE}, items: [{off}])");
        let message = parse_scene(text.as_bytes(), Path::new("test.ron"), "test")
            .unwrap_err()
            .to_string();
        assert!(message.contains("outside the ground"), "{item}: {message}");
    }
    let text =
        "Scene(items: [Vault(at: Corner(0, 0), width: 3, depth: 4, springing: 2, plinth: ())])";
    let message = parse_scene(text.as_bytes(), Path::new("test.ron"), "test")
        .unwrap_err()
        .to_string();
    assert!(
        message.contains("`plinth` needs `on_ground: true`"),
        "{message}"
    );
}
