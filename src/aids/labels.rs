//! Lettering on the drawing: the grid's azimuths (along the horizon and the top and bottom
//! borders), the compass points, elevations (along the centre column and the side borders)
//! and the heading; and item labels placed near their items, where they cross fewest lines.

use super::grid::multiples;
use super::marks::degrees_text;
use super::settings::AidSettings;
use crate::drawing::{letter, text_width, Align};
use crate::plane::{image_of_direction, image_of_point};
use crate::plane::{Equirect, ImagePoint, PolylineSet};
use crate::scene::{ItemId, Site, SiteCurve};
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

/// The grid's lettering for a `text`-pixel cap height.
pub fn grid_labels(
    view: &ViewFrame,
    map: &Equirect,
    settings: &AidSettings,
    text: f64,
    out: &mut PolylineSet,
) {
    let per_degree = map.width() / 360.0;
    let gap = 0.4 * text;
    let step = label_step(settings, per_degree, text_width("360", text));
    // Azimuths below the horizon and along the top and bottom borders; the border rows are
    // reached along each meridian, so they follow it under pitch.
    let top = 90.0 - 1.8 * text / (map.height() / 180.0);
    let bottom = 90.0 - 0.8 * text / (map.height() / 180.0);
    for (_, azimuth) in multiples(step, 360.0) {
        let words = degrees_text(azimuth);
        let on_horizon = image_of_direction(view, map, &direction(azimuth, 0.0));
        let at = ImagePoint::new(on_horizon.x + gap, on_horizon.y + 1.4 * text);
        letter(&words, at, text, Align::Start, out);
        for elevation in [top, -bottom] {
            let p = image_of_direction(view, map, &direction(azimuth, elevation));
            letter(
                &words,
                ImagePoint::new(p.x + gap, p.y),
                text,
                Align::Start,
                out,
            );
        }
    }
    // The compass points above the horizon.
    for (k, name) in COMPASS.iter().enumerate() {
        let p = image_of_direction(view, map, &direction(45.0 * k as f64, 0.0));
        letter(
            name,
            ImagePoint::new(p.x + gap, p.y - gap),
            text,
            Align::Start,
            out,
        );
    }
    // Elevations along the centre column and at both side borders, from the directions of
    // the heading and the one behind.
    let heading = view_heading_deg(view);
    let step = label_step(settings, map.height() / 180.0, 2.0 * text);
    for (_, elevation) in multiples(step, 90.0).skip(1) {
        for e in [elevation, -elevation] {
            let words = if e > 0.0 {
                format!("+{}", degrees_text(e))
            } else {
                degrees_text(e)
            };
            let ahead = image_of_direction(view, map, &direction(heading, e));
            letter(
                &words,
                ImagePoint::new(ahead.x + gap, ahead.y - gap),
                text,
                Align::Start,
                out,
            );
            let behind = image_of_direction(view, map, &direction(heading + 180.0, e));
            let y = behind.y - gap;
            letter(&words, ImagePoint::new(gap, y), text, Align::Start, out);
            letter(
                &words,
                ImagePoint::new(map.width() - gap, y),
                text,
                Align::End,
                out,
            );
        }
    }
    // The heading: a notch at the top and the bottom of the centre column, and its value.
    let (middle, height) = (map.width() / 2.0, map.height());
    let half = 0.5 * text;
    out.push(&[
        ImagePoint::new(middle - half, 0.0),
        ImagePoint::new(middle, 1.2 * half),
        ImagePoint::new(middle + half, 0.0),
    ]);
    out.push(&[
        ImagePoint::new(middle - half, height),
        ImagePoint::new(middle, height - 1.2 * half),
        ImagePoint::new(middle + half, height),
    ]);
    let words = format!(
        "HEADING {}\u{b0}",
        degrees_text(super::marks::normal_azimuth_deg(heading))
    );
    letter(
        &words,
        ImagePoint::new(middle, 4.0 * text),
        text,
        Align::Middle,
        out,
    );
}

/// The absolute azimuth (degrees) of the centre of the view.
fn view_heading_deg(view: &ViewFrame) -> f64 {
    let ahead = view.direction_to_site(&nalgebra::Vector3::y());
    ahead.x.atan2(ahead.y).to_degrees()
}

/// A coarse map of the cells of the image that lines or letters already cover, so that labels
/// can be put where they cross the fewest.
#[derive(Clone, Debug)]
pub struct Occupancy {
    cell: f64,
    columns: usize,
    rows: usize,
    taken: Vec<bool>,
}

impl Occupancy {
    /// Cells a third of the cap height across.
    pub fn new(map: &Equirect, text: f64) -> Occupancy {
        let cell = (text / 3.0).max(2.0);
        let columns = (map.width() / cell).ceil() as usize + 1;
        let rows = (map.height() / cell).ceil() as usize + 1;
        Occupancy {
            cell,
            columns,
            rows,
            taken: vec![false; columns * rows],
        }
    }

    fn index(&self, x: f64, y: f64) -> Option<usize> {
        let (c, r) = ((x / self.cell).floor(), (y / self.cell).floor());
        (c >= 0.0 && r >= 0.0 && (c as usize) < self.columns && (r as usize) < self.rows)
            .then(|| r as usize * self.columns + c as usize)
    }

    /// Marks the cells every line passes through (sampled at half a cell).
    pub fn mark_lines(&mut self, lines: &PolylineSet) {
        for line in lines.iter() {
            for pair in line.windows(2) {
                let (a, b) = (pair[0], pair[1]);
                let steps = ((b.x - a.x).hypot(b.y - a.y) / (0.5 * self.cell)).ceil() as usize;
                for k in 0..=steps.min(1 << 16) {
                    let s = k as f64 / steps.max(1) as f64;
                    if let Some(i) = self.index(a.x + (b.x - a.x) * s, a.y + (b.y - a.y) * s) {
                        self.taken[i] = true;
                    }
                }
            }
        }
    }

    /// Cells of a box (left, top, right, bottom) that are taken.
    fn count(&self, b: [f64; 4]) -> usize {
        self.cells(b).filter(|&i| self.taken[i]).count()
    }

    fn take(&mut self, b: [f64; 4]) {
        let cells: Vec<usize> = self.cells(b).collect();
        for i in cells {
            self.taken[i] = true;
        }
    }

    fn cells(&self, [left, top, right, bottom]: [f64; 4]) -> impl Iterator<Item = usize> + '_ {
        let (c0, c1) = ((left / self.cell).floor(), (right / self.cell).floor());
        let (r0, r1) = ((top / self.cell).floor(), (bottom / self.cell).floor());
        let (c0, r0) = (c0.max(0.0) as usize, r0.max(0.0) as usize);
        let (c1, r1) = (
            (c1.max(0.0) as usize).min(self.columns - 1),
            (r1.max(0.0) as usize).min(self.rows - 1),
        );
        (r0..=r1).flat_map(move |r| (c0..=c1).map(move |c| r * self.columns + c))
    }
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
            SiteCurve::Ellipse { centre, u, v, .. } => {
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

/// Writes each labelled item's label near the image of its anchor, at whichever of a few
/// places round it crosses the fewest lines and earlier labels.
pub fn item_labels(
    site: &Site,
    view: &ViewFrame,
    map: &Equirect,
    text: f64,
    room: &mut Occupancy,
    out: &mut PolylineSet,
) {
    let anchors = anchors(site);
    for (item, anchor) in site.items.iter().zip(anchors) {
        let (Some(label), Some(anchor)) = (item.label.as_deref(), anchor) else {
            continue;
        };
        let Some(p) = image_of_point(view, map, &anchor) else {
            continue;
        };
        let width = text_width(label, text);
        let near = 0.6 * text;
        let mut best: Option<(usize, ImagePoint)> = None;
        // Baseline-left corners: right, left, above and below the anchor, near then further.
        for reach in [1.0, 2.5] {
            let d = near * reach;
            for (dx, dy) in [
                (d, -d),
                (-d - width, -d),
                (d, d + text),
                (-d - width, d + text),
                (-width / 2.0, -d - 0.5 * text),
                (-width / 2.0, d + 1.5 * text),
            ] {
                let y = (p.y + dy).clamp(text + 1.0, map.height() - 1.0);
                let at = ImagePoint::new(p.x + dx, y);
                let b = [at.x, at.y - text, at.x + width, at.y];
                let crossed = room.count(b);
                if best.is_none_or(|(c, _)| crossed < c) {
                    best = Some((crossed, at));
                }
            }
        }
        if let Some((_, at)) = best {
            letter(label, at, text, Align::Start, out);
            room.take([
                at.x - 0.3 * text,
                at.y - 1.3 * text,
                at.x + width + 0.3 * text,
                at.y + 0.3 * text,
            ]);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::Standpoint;

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
    fn a_label_avoids_a_line_through_its_anchor() {
        let mut site = Site::default();
        let item = site.add_item("point", Some("WELL".to_owned()));
        site.markers.push(crate::scene::Marker {
            at: Point3::new(0.0, 10.0, 1.6),
            item,
        });
        let view = ViewFrame::new(&Standpoint::from_degrees("s", 0.0, 0.0, 1.6, 0.0, 0.0, 0.0));
        let map = Equirect::from_size_px(720.0, 360.0);
        let mut room = Occupancy::new(&map, 10.0);
        // A line running up and to the right through the anchor (360, 180) blocks the first
        // choice (above right).
        let mut lines = PolylineSet::new();
        lines.push(&[ImagePoint::new(360.0, 180.0), ImagePoint::new(460.0, 80.0)]);
        room.mark_lines(&lines);
        let mut out = PolylineSet::new();
        item_labels(&site, &view, &map, 10.0, &mut room, &mut out);
        let left = out
            .points()
            .iter()
            .map(|p| p.x)
            .fold(f64::INFINITY, f64::min);
        let top = out
            .points()
            .iter()
            .map(|p| p.y)
            .fold(f64::INFINITY, f64::min);
        // The second choice: above left of the anchor.
        assert!(left < 360.0 && top < 180.0, "{left} {top}");
        assert!(!out.is_empty());
    }
}
