//! Vanishing points. Every line parallel to a direction `d` runs, on the viewing sphere, to
//! the image of `d` itself and to that of `-d`: the two vanishing points of the direction,
//! 180 degrees apart (classical perspective; on the sphere the points are antipodal). A
//! horizontal direction's pair lies on the horizon.
//!
//! The principal directions of the site are found from its straight edges: horizontal ones
//! (block sides, roads, kerbs) and inclined ones (gable verges, hips, sloping streets), each
//! weighted by its length, merged when within a small angle, and kept when at least a tenth
//! as heavy as the heaviest of their kind; items add directions no edge runs along (a
//! stair's rake). Bearings and slopes the user lists are marked too.

use super::marks::{degrees_text, normal_azimuth_deg, ring};
use super::settings::AidSettings;
use crate::drawing::{Align, Label, LabelKind, Spot};
use crate::plane::image_of_direction;
use crate::plane::{Equirect, ImagePoint, PolylineSet};
use crate::scene::{Guides, Site, SiteCurve};
use crate::sphere::ViewFrame;
use nalgebra::Vector3;

/// A direction whose vanishing points are marked.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Direction {
    /// Unit vector in the site frame; horizontal ones have an azimuth in [0, 180), inclined
    /// ones point upwards.
    pub unit: Vector3<f64>,
    /// Total length of the edges along it (metres); 0 for directions the user gave.
    pub weight: f64,
}

impl Direction {
    /// Absolute azimuth (degrees, [0, 360)) and climb (degrees) of the direction.
    pub fn bearing_and_pitch(&self) -> (f64, f64) {
        let u = self.unit;
        (
            normal_azimuth_deg(u.x.atan2(u.y).to_degrees()),
            u.z.atan2(u.x.hypot(u.y)).to_degrees(),
        )
    }
}

/// Edges steeper than this (degrees) count as inclined; as steep as `90 -` this, vertical.
const LEVEL_DEG: f64 = 0.5;
/// Directions kept are at least this fraction of the heaviest of their kind.
const KEEP_FRACTION: f64 = 0.1;
/// At most this many of each kind are marked.
const MAX_HORIZONTAL: usize = 8;
const MAX_INCLINED: usize = 6;
/// At most this many clusters are followed while merging.
const MAX_CLUSTERS: usize = 256;

/// The unit vector of a slope given in degrees.
pub fn slope_vector(bearing_deg: f64, pitch_deg: f64) -> Vector3<f64> {
    crate::sphere::direction_from_azimuth_elevation(
        bearing_deg.to_radians(),
        pitch_deg.to_radians(),
    )
}

/// A line's direction with its sign chosen: upwards, or for a level line towards an
/// azimuth in [0, 180).
fn canonical(d: Vector3<f64>) -> Vector3<f64> {
    let flip = if d.z.abs() > 1e-12 {
        d.z < 0.0
    } else {
        d.x < 0.0 || (d.x == 0.0 && d.y < 0.0)
    };
    if flip {
        -d
    } else {
        d
    }
}

/// Merges weighted line directions within `merge` radians of a cluster's mean, heaviest
/// first; returns the clusters, heaviest first.
fn cluster(mut lines: Vec<(Vector3<f64>, f64)>, merge: f64) -> Vec<Direction> {
    lines.sort_by(|a, b| b.1.total_cmp(&a.1));
    let cos_merge = merge.cos();
    // Each cluster keeps the weighted sum of its members (signs agreeing with its first).
    let mut clusters: Vec<(Vector3<f64>, Vector3<f64>, f64)> = Vec::new();
    for (d, w) in lines {
        let full = clusters.len() >= MAX_CLUSTERS;
        match clusters
            .iter_mut()
            .find(|(first, _, _)| first.dot(&d).abs() >= cos_merge)
        {
            Some((first, sum, weight)) => {
                *sum += d * (w * first.dot(&d).signum());
                *weight += w;
            }
            None if !full => clusters.push((d, d * w, w)),
            None => {}
        }
    }
    let mut found: Vec<Direction> = clusters
        .into_iter()
        .filter_map(|(_, sum, weight)| {
            sum.try_normalize(0.0).map(|unit| Direction {
                unit: canonical(unit),
                weight,
            })
        })
        .collect();
    found.sort_by(|a, b| b.weight.total_cmp(&a.weight));
    found
}

/// The principal directions of the site's straight edges (heaviest first) and its declared
/// axes: horizontal ones, then inclined ones.
pub fn found_directions(site: &Site, merge_deg: f64) -> (Vec<Direction>, Vec<Direction>) {
    let level = LEVEL_DEG.to_radians().sin();
    let mut horizontal = Vec::new();
    let mut inclined = Vec::new();
    let mut add = |d: Vector3<f64>, weight: f64| {
        let Some(unit) = d.try_normalize(1e-12) else {
            return;
        };
        if unit.z.abs() <= level {
            let plan = Vector3::new(unit.x, unit.y, 0.0).normalize();
            horizontal.push((canonical(plan), weight));
        } else if unit.z.abs() < (90.0 - LEVEL_DEG).to_radians().sin() {
            inclined.push((canonical(unit), weight));
        }
    };
    for edge in &site.edges {
        if let SiteCurve::Segment { start, end } = edge.curve {
            let d = end - start;
            add(d, d.norm());
        }
    }
    let merge = merge_deg.to_radians();
    let keep = |found: Vec<Direction>, most: usize| -> Vec<Direction> {
        let top = found.first().map_or(0.0, |d| d.weight);
        found
            .into_iter()
            .filter(|d| d.weight >= KEEP_FRACTION * top)
            .take(most)
            .collect()
    };
    let mut horizontal = keep(cluster(horizontal, merge), MAX_HORIZONTAL);
    let mut inclined = keep(cluster(inclined, merge), MAX_INCLINED);
    // Declared axes are kept whatever their weight, unless an edge direction is within the
    // merging angle already.
    for axis in &site.axes {
        let Some(unit) = axis.direction.try_normalize(1e-12) else {
            continue;
        };
        let unit = canonical(unit);
        let kind = if unit.z.abs() <= level {
            &mut horizontal
        } else {
            &mut inclined
        };
        if !kind.iter().any(|d| d.unit.dot(&unit).abs() >= merge.cos()) {
            kind.push(Direction { unit, weight: 0.0 });
        }
    }
    (horizontal, inclined)
}

/// The directions to mark: those the user gave, then (if asked) those found in the site that
/// are not within the merging angle of one given.
pub fn directions(site: &Site, guides: &Guides, settings: &AidSettings) -> Vec<Direction> {
    let mut marked: Vec<Direction> = guides
        .bearings
        .iter()
        .map(|&b| slope_vector(b, 0.0))
        .chain(
            guides
                .slopes
                .iter()
                .map(|s| slope_vector(s.bearing_deg, s.pitch_deg)),
        )
        .map(|d| Direction {
            unit: canonical(d),
            weight: 0.0,
        })
        .collect();
    if settings.vanishing_points {
        let (horizontal, inclined) = found_directions(site, settings.merge_deg);
        let cos_merge = settings.merge_deg.to_radians().cos();
        for d in horizontal.into_iter().chain(inclined) {
            if !marked
                .iter()
                .any(|m| m.unit.dot(&d.unit).abs() >= cos_merge)
            {
                marked.push(d);
            }
        }
    }
    marked
}

/// The label of the vanishing point of `d`: its azimuth, and its climb if it has one.
fn label(d: &Vector3<f64>) -> String {
    let direction = Direction {
        unit: *d,
        weight: 0.0,
    };
    let (bearing, pitch) = direction.bearing_and_pitch();
    if pitch.abs() < 0.05 {
        format!("{}\u{b0}", degrees_text(bearing))
    } else {
        let sign = if pitch > 0.0 { "+" } else { "" };
        format!(
            "{}\u{b0} {sign}{}\u{b0}",
            degrees_text(bearing),
            degrees_text(pitch)
        )
    }
}

/// Marks both vanishing points of each direction: a ring with a short vertical stroke through
/// it, and the bearing (and climb) as a label beside it.
pub fn draw(
    view: &ViewFrame,
    map: &Equirect,
    directions: &[Direction],
    text: f64,
    out: &mut PolylineSet,
    labels: &mut Vec<Label>,
) {
    let radius = 0.6 * text;
    for direction in directions {
        for d in [direction.unit, -direction.unit] {
            let p = image_of_direction(view, map, &d);
            ring(p, radius, out);
            out.push(&[
                ImagePoint::new(p.x, p.y - 2.0 * radius),
                ImagePoint::new(p.x, p.y + 2.0 * radius),
            ]);
            let lift = 2.4 * radius;
            labels.push(Label {
                text: label(&d),
                anchor: p,
                kind: LabelKind::VanishingPoint,
                height: text,
                spots: vec![
                    Spot::new(0.0, -lift, Align::Middle),
                    Spot::new(0.0, lift + text, Align::Middle),
                    Spot::new(1.6 * radius, -0.4 * text, Align::Start),
                    Spot::new(-1.6 * radius, -0.4 * text, Align::End),
                    Spot::new(1.6 * radius, text, Align::Start),
                    Spot::new(-1.6 * radius, text, Align::End),
                ],
            });
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::parse_scene;
    use std::path::Path;

    fn site(text: &str) -> Site {
        parse_scene(text.as_bytes(), Path::new("t.ron"), "t").unwrap()
    }

    #[test]
    fn a_turned_block_and_a_road_give_their_bearings() {
        let s = site(
            "Scene(items: [
                Block(at: Centre(0, 0), width: 10, depth: 6, height: 4, facing: 210),
                Block(at: Centre(30, 0), width: 8, depth: 8, height: 4, facing: 211),
                Road(points: [(-50, -20), (50, -20)], width: 6),
            ])",
        );
        let (horizontal, inclined) = found_directions(&s, 2.0);
        let mut bearings: Vec<f64> = horizontal.iter().map(|d| d.bearing_and_pitch().0).collect();
        bearings.sort_by(f64::total_cmp);
        // Facing 210 and 211 merge (within 2 degrees): the fronts run along 120-121 and the
        // sides along 30-31; the road runs along 90.
        assert_eq!(bearings.len(), 3, "{bearings:?}");
        assert!((bearings[0] - 30.4).abs() < 0.6, "{bearings:?}");
        assert!((bearings[1] - 90.0).abs() < 1e-9, "{bearings:?}");
        assert!((bearings[2] - 120.4).abs() < 0.6, "{bearings:?}");
        assert!(inclined.is_empty());
    }

    #[test]
    fn gable_verges_and_a_stair_rake_are_inclined_directions() {
        let s = site(
            "Scene(items: [
                Block(at: Centre(0, 0), width: 10, depth: 6, height: 4, roof: Gable(ridge: 7)),
                Stairs(at: (0, -20), bearing: 90, steps: 10, rise: 0.15, going: 0.3, width: 2),
            ])",
        );
        let (_, inclined) = found_directions(&s, 2.0);
        let slopes: Vec<(f64, f64)> = inclined.iter().map(|d| d.bearing_and_pitch()).collect();
        // The verges climb 3 m over 3 m, north and south: 45 degrees towards 0 and 180.
        for bearing in [0.0, 180.0] {
            assert!(
                slopes
                    .iter()
                    .any(|&(b, p)| (b - bearing).abs() < 1e-6 && (p - 45.0).abs() < 1e-6),
                "{slopes:?}"
            );
        }
        // The rake rises 0.15 in 0.3 towards 90: atan(0.5).
        let rake = 0.5f64.atan().to_degrees();
        assert!(
            slopes
                .iter()
                .any(|&(b, p)| (b - 90.0).abs() < 1e-6 && (p - rake).abs() < 1e-6),
            "{slopes:?}"
        );
    }

    #[test]
    fn labels_name_bearing_and_climb() {
        assert_eq!(label(&slope_vector(30.0, 0.0)), "30\u{b0}");
        assert_eq!(label(&-slope_vector(30.0, 40.0)), "210\u{b0} -40\u{b0}");
        assert_eq!(label(&slope_vector(30.0, 40.0)), "30\u{b0} +40\u{b0}");
    }
}
