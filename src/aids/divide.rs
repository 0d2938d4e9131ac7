//! Perspective-correct division. The points that divide a segment into equal parts in the
//! site, projected one by one, divide its image into the right unequal parts: a central
//! projection keeps cross-ratios, not ratios (projective geometry), so dividing the drawn
//! curve by measuring along it would be wrong. The same holds for multiples: a segment
//! extended by its own length k times.
//!
//! Each point is marked by a tick across the image of the segment; the midpoint's tick is
//! longer.

use crate::drawing::{Align, Label, LabelKind, Spot};
use crate::plane::image_of_point;
use crate::plane::{Flattener, ImagePoint, PolylineSet};
use crate::scene::{label_matches, Division, Site, SiteCurve};
use crate::sphere::ViewFrame;
use nalgebra::Point3;

/// The points dividing `from`-`to` into `parts` equal parts (both ends included), then the
/// ends of `extend` further copies of the segment beyond `to`.
pub fn division_points(
    from: Point3<f64>,
    to: Point3<f64>,
    parts: u32,
    extend: u32,
) -> Vec<Point3<f64>> {
    let step = to - from;
    let parts = parts.max(1);
    (0..=parts)
        .map(|k| from + step * (k as f64 / parts as f64))
        .chain((1..=extend).map(|j| to + step * j as f64))
        .collect()
}

/// A tick `half` pixels each side of the image of `p`, across the image of the line through
/// `p` along `along` (the direction found from a small step along it).
fn tick(
    view: &ViewFrame,
    map: &crate::plane::Equirect,
    p: &Point3<f64>,
    along: &nalgebra::Vector3<f64>,
    half: f64,
    out: &mut PolylineSet,
) -> Option<ImagePoint> {
    let at = image_of_point(view, map, p)?;
    let step = along.normalize() * (1e-4 * (view.eye() - p).norm().max(1e-3));
    let next = image_of_point(view, map, &(p + step))?;
    let mut dx = next.x - at.x;
    // The step may cross the seam: take the short way round.
    if dx.abs() > map.width() / 2.0 {
        dx -= dx.signum() * map.width();
    }
    let dy = next.y - at.y;
    let length = dx.hypot(dy);
    if length < 1e-12 {
        return Some(at); // Seen end-on: no direction to cross.
    }
    let (nx, ny) = (-dy / length * half, dx / length * half);
    out.push(&[
        ImagePoint::new(at.x - nx, at.y - ny),
        ImagePoint::new(at.x + nx, at.y + ny),
    ]);
    Some(at)
}

/// Draws one division: for a pair of points, the segment (extended), its ticks and the
/// multiples' numbers; for an item, ticks on each of its straight edges.
pub fn draw(
    site: &Site,
    view: &ViewFrame,
    flattener: &mut Flattener,
    division: &Division,
    text: f64,
    out: &mut PolylineSet,
    labels: &mut Vec<Label>,
) {
    let map = flattener.map();
    let half = 0.45 * text;
    let mut ticks =
        |from: Point3<f64>, to: Point3<f64>, parts: u32, extend: u32, out: &mut PolylineSet| {
            let along = to - from;
            for (k, p) in division_points(from, to, parts, extend).iter().enumerate() {
                let k = k as u32;
                let size = if 2 * k == parts { 2.0 * half } else { half };
                let at = tick(view, &map, p, &along, size, out);
                if k > parts {
                    if let Some(at) = at {
                        let words = format!("{}\u{d7}", k - parts + 1);
                        labels.push(
                            Label::fixed(words, at, LabelKind::Division, text, Align::Start)
                                .with_spots(vec![
                                    Spot::new(half, -half, Align::Start),
                                    Spot::new(-half, -half, Align::End),
                                    Spot::new(half, half + text, Align::Start),
                                ]),
                        );
                    }
                }
            }
        };
    match division {
        Division::Between {
            from,
            to,
            parts,
            extend,
        } => {
            let end = to + (to - from) * *extend as f64;
            if let Ok(curve) = view.sphere_curve(&SiteCurve::Segment { start: *from, end }) {
                flattener.flatten(&curve, out);
            }
            ticks(*from, *to, *parts, *extend, out);
        }
        Division::Edges { item, parts } => {
            for edge in &site.edges {
                let label = site
                    .items
                    .get(edge.item.0 as usize)
                    .and_then(|i| i.label.as_deref());
                if !label_matches(label, item) {
                    continue;
                }
                if let SiteCurve::Segment { start, end } = edge.curve {
                    ticks(start, end, *parts, 0, out);
                }
            }
        }
    }
}

/// The labels a division of items may name: those of items with a straight edge, sorted,
/// each once.
pub fn dividable_labels(site: &Site) -> Vec<&str> {
    let mut labels: Vec<&str> = site
        .edges
        .iter()
        .filter(|e| matches!(e.curve, SiteCurve::Segment { .. }))
        .filter_map(|e| site.items.get(e.item.0 as usize)?.label.as_deref())
        .collect();
    labels.sort_unstable();
    labels.dedup();
    labels
}

/// Checks that every division of items (`Division::Edges`) names an item with a straight
/// edge: a label that matches nothing would otherwise draw nothing, silently.
pub fn check_divisions(site: &Site, divisions: &[Division]) -> crate::error::Result<()> {
    let labels = dividable_labels(site);
    for division in divisions {
        let Division::Edges { item, .. } = division else {
            continue;
        };
        if !labels.iter().any(|&label| label_matches(Some(label), item)) {
            let known = if labels.is_empty() {
                "no labelled item has one".to_owned()
            } else {
                let shown: Vec<String> =
                    labels.iter().take(12).map(|l| format!("\"{l}\"")).collect();
                format!(
                    "labelled items that have: {}{}",
                    shown.join(", "),
                    if labels.len() > 12 { ", ..." } else { "" }
                )
            };
            return Err(crate::error::Error::Setting(format!(
                "--divide-edges: no item labelled \"{item}\" has a straight edge to divide ({known})"
            )));
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn equal_parts_and_multiples() {
        let points = division_points(Point3::new(0.0, 0.0, 0.0), Point3::new(4.0, 0.0, 2.0), 4, 2);
        let xs: Vec<f64> = points.iter().map(|p| p.x).collect();
        assert_eq!(xs, vec![0.0, 1.0, 2.0, 3.0, 4.0, 8.0, 12.0]);
        assert_eq!(points[2].z, 1.0);
    }
}
