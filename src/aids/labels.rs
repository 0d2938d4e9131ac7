//! Lettering on the drawing: the grid's azimuths (along the horizon and the top and bottom
//! borders), the compass points, elevations (along the centre column and the side borders)
//! and the heading; and item labels placed near their items, where they cross fewest lines.

use super::grid::multiples;
use super::marks::degrees_text;
use super::settings::AidSettings;
use crate::drawing::{text_width, Align, Label, LabelKind, Spot};
use crate::plane::{image_of_direction, image_of_point};
use crate::plane::{Equirect, ImagePoint, PolylineSet, Rect};
use crate::scene::{EllipseArc, ItemId, Site, SiteCurve};
use crate::sphere::{direction_from_azimuth_elevation, ViewFrame};
use nalgebra::Point3;

/// The compass points every 45 degrees from north.
const COMPASS: [&str; 8] = ["N", "NE", "E", "SE", "S", "SW", "W", "NW"];

/// A site direction from an absolute azimuth and an elevation, degrees.
fn direction(azimuth_deg: f64, elevation_deg: f64) -> nalgebra::Vector3<f64> {
    direction_from_azimuth_elevation(azimuth_deg.to_radians(), elevation_deg.to_radians())
}

/// The spacing of the labels, degrees: the grid step times the smallest whole number (a
/// multiple of the heavy lines' count when there are heavy lines) that leaves room for a
/// label of `widest` pixels between neighbours.
fn label_step(settings: &AidSettings, pixels_per_degree: f64, widest: f64) -> f64 {
    let base = match settings.grid_major_every {
        0 => 1,
        n => n,
    };
    let step = settings.grid_step_deg;
    let mut every = base;
    while (every as f64) * step * pixels_per_degree < 1.6 * widest && (every as f64) * step < 90.0 {
        every += base;
    }
    every as f64 * step
}

/// The grid's lettering for a `text`-pixel cap height, as labels for the placer, inside
/// `area` (the image, or the band of it shown); the heading's notches go to `marks`.
pub fn grid_labels(
    view: &ViewFrame,
    map: &Equirect,
    settings: &AidSettings,
    text: f64,
    area: &Rect,
    marks: &mut PolylineSet,
) -> Vec<Label> {
    let mut labels = Vec::new();
    let per_degree = map.width() / 360.0;
    let gap = 0.4 * text;
    // A value stands beside its own line, right or left of it, never across another.
    let beside = |dy: f64| {
        vec![
            Spot::new(gap, dy, Align::Start),
            Spot::new(-gap, dy, Align::End),
        ]
    };
    let step = label_step(settings, per_degree, text_width("360", text));
    // Azimuths below the horizon and along the top and bottom edges of the area; the edge
    // rows are reached along each meridian, so they follow it under pitch.
    let per_row = map.height() / 180.0;
    let top = 90.0 - (area.top + 1.8 * text) / per_row;
    let bottom = 90.0 - (area.bottom - 0.8 * text) / per_row;
    for (_, azimuth) in multiples(step, 360.0) {
        let words = format!("{}\u{b0}", degrees_text(azimuth));
        let on_horizon = image_of_direction(view, map, &direction(azimuth, 0.0));
        labels.push(Label {
            text: words.clone(),
            anchor: on_horizon,
            kind: LabelKind::GridValue,
            height: text,
            spots: beside(1.4 * text),
        });
        for elevation in [top, bottom] {
            let p = image_of_direction(view, map, &direction(azimuth, elevation));
            labels.push(Label {
                text: words.clone(),
                anchor: p,
                kind: LabelKind::GridValue,
                height: text,
                spots: beside(0.0),
            });
        }
    }
    // The compass points above the horizon.
    for (k, name) in COMPASS.iter().enumerate() {
        let p = image_of_direction(view, map, &direction(45.0 * k as f64, 0.0));
        labels.push(Label {
            text: (*name).to_owned(),
            anchor: p,
            kind: LabelKind::Compass,
            height: text,
            spots: beside(-gap),
        });
    }
    // Elevations along the centre column and at both side edges, from the directions of
    // the heading and the one behind.
    let heading = view_heading_deg(view);
    let step = label_step(settings, per_row, 2.0 * text);
    for (_, elevation) in multiples(step, 90.0).skip(1) {
        for e in [elevation, -elevation] {
            let words = if e > 0.0 {
                format!("+{}\u{b0}", degrees_text(e))
            } else {
                format!("{}\u{b0}", degrees_text(e))
            };
            let ahead = image_of_direction(view, map, &direction(heading, e));
            labels.push(Label {
                text: words.clone(),
                anchor: ahead,
                kind: LabelKind::GridValue,
                height: text,
                spots: beside(-gap),
            });
            let behind = image_of_direction(view, map, &direction(heading + 180.0, e));
            for x in [0.0, map.width()] {
                labels.push(Label {
                    text: words.clone(),
                    anchor: ImagePoint::new(x, behind.y),
                    kind: LabelKind::GridValue,
                    height: text,
                    spots: beside(-gap),
                });
            }
        }
    }
    // The heading: a notch at the top and the bottom of the centre column, and its value.
    let (middle, half) = (map.width() / 2.0, 0.5 * text);
    for (edge, sign) in [(area.top, 1.0), (area.bottom, -1.0)] {
        marks.push(&[
            ImagePoint::new(middle - half, edge),
            ImagePoint::new(middle, edge + sign * 1.2 * half),
            ImagePoint::new(middle + half, edge),
        ]);
    }
    let words = format!(
        "HEADING {}\u{b0}",
        degrees_text(super::marks::normal_azimuth_deg(heading))
    );
    labels.push(Label::fixed(
        words,
        ImagePoint::new(middle, area.top + 4.0 * text),
        LabelKind::Heading,
        text,
        Align::Middle,
    ));
    labels
}

/// The absolute azimuth (degrees) of the centre of the view.
fn view_heading_deg(view: &ViewFrame) -> f64 {
    let ahead = view.direction_to_site(&nalgebra::Vector3::y());
    ahead.x.atan2(ahead.y).to_degrees()
}

/// Where each item's label hangs: over the middle of its plan at its highest point (a
/// labelled point: at its mark).
fn anchors(site: &Site) -> Vec<Option<Point3<f64>>> {
    let mut sums = vec![(nalgebra::Vector3::zeros(), 0usize, f64::NEG_INFINITY); site.items.len()];
    let mut add = |item: ItemId, p: Point3<f64>| {
        if let Some((sum, count, top)) = sums.get_mut(item.0 as usize) {
            *sum += p.coords;
            *count += 1;
            *top = top.max(p.z);
        }
    };
    for edge in &site.edges {
        match edge.curve {
            SiteCurve::Segment { start, end } => {
                add(edge.item, start);
                add(edge.item, end);
            }
            SiteCurve::Ellipse(arc) => {
                let EllipseArc { centre, u, v, .. } = arc;
                add(edge.item, centre + u);
                add(edge.item, centre - u);
                add(edge.item, centre + v);
                add(edge.item, centre - v);
            }
        }
    }
    let mut anchors: Vec<Option<Point3<f64>>> = sums
        .iter()
        .map(|&(sum, count, top)| {
            (count > 0).then(|| {
                let mean = sum / count as f64;
                Point3::new(mean.x, mean.y, top)
            })
        })
        .collect();
    for marker in &site.markers {
        if let Some(anchor) = anchors.get_mut(marker.item.0 as usize) {
            *anchor = Some(marker.at);
        }
    }
    anchors
}

/// Each labelled item's label, to stand near the image of its anchor (the placer chooses
/// the spot round it that crosses the fewest lines).
pub fn item_labels(site: &Site, view: &ViewFrame, map: &Equirect, text: f64) -> Vec<Label> {
    let anchors = anchors(site);
    let mut labels = Vec::new();
    for (item, anchor) in site.items.iter().zip(anchors) {
        let (Some(label), Some(anchor)) = (item.label.as_deref(), anchor) else {
            continue;
        };
        if let Some(p) = image_of_point(view, map, &anchor) {
            labels.push(Label::around(label, p, LabelKind::Item, text));
        }
    }
    labels
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_keep_room_between_them() {
        let settings = AidSettings::default();
        // At 3 px a degree, "360" 10 px high is 24 px wide (three figures 6 units wide and
        // two gaps of 3): 1.6 times that is 38.4 px, so every second 10-degree line.
        assert_eq!(label_step(&settings, 3.0, text_width("360", 10.0)), 20.0);
        let settings = AidSettings {
            grid_major_every: 3,
            ..settings
        };
        assert_eq!(label_step(&settings, 4.0, text_width("360", 10.0)), 30.0);
        assert_eq!(label_step(&settings, 40.0, text_width("360", 10.0)), 30.0);
    }

    #[test]
    fn a_junction_and_a_round_place_are_named_through_the_item_labels() {
        // The junction's name hangs at the junction's centre (where the centrelines meet),
        // at its image by the mapping x = (r + 180) / 360 W, y = (90 - e) / 180 H; the
        // round place's beside its kerbs. Both are item labels, for the one placer.
        let site = crate::scene::parse_scene(
            b"Scene(standpoints: [(name: \"s\", x: 0, y: -20, heading: 0)], items: [
                Road(label: \"Long Row\", points: [(-40, 0), (60, 0)], width: 6),
                Road(points: [(0, 0), (0, 40)], width: 6),
                Junction(label: \"Five Lamps\", at: (1, -1)),
                Road(label: \"Weir Walk\", points: [(60, 0), (60, -40)], width: 6),
                RoundPlace(label: \"Mill Circle\", centre: (60, 0), radius: 10,
                           arms: [\"Long Row\", \"Weir Walk\"]),
            ])",
            std::path::Path::new("named.ron"),
            "named",
        )
        .unwrap();
        let view = ViewFrame::new(&site.standpoints[0]);
        let map = Equirect::from_size_px(3600.0, 1800.0);
        let labels = item_labels(&site, &view, &map, 10.0);
        let named = |text: &str| labels.iter().find(|l| l.text == text).map(|l| l.anchor);
        // The junction at (0, 0, 0) from an eye at (0, -20, 1.6): straight ahead, at an
        // elevation of -atan(1.6 / 20).
        let anchor = named("Five Lamps").expect("the junction's name");
        let elevation = -(1.6f64 / 20.0).atan().to_degrees();
        assert!((anchor.x - 1800.0).abs() < 1e-6, "{anchor:?}");
        assert!(
            (anchor.y - (90.0 - elevation) * 10.0).abs() < 1e-6,
            "{anchor:?}"
        );
        assert!(named("Mill Circle").is_some());
        assert!(labels.iter().all(|l| l.kind == LabelKind::Item));
    }
}
