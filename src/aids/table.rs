//! The table of angles (`pansite angles`): for every labelled point and every corner of
//! every item, its absolute azimuth, its azimuth relative to the heading, its elevation, its
//! distance, and where it lands on the image (pixels) and on the printed page (millimetres),
//! so that a user can plot it by hand on any printed grid.
//!
//! A corner is an end of one of the item's straight edges; each item's corners are numbered
//! from 1 in the order the item draws them, and their site coordinates are given so that
//! they can be told apart.
//!
//! The page: until page layouts exist, the panorama is taken to be printed `width_mm` wide
//! (and half that high), so `mm = px * width_mm / width_px` on both axes, from the top left
//! corner of the panorama. [`PagePlacement`] is the one place a page layout will hook in.

use crate::plane::Equirect;
use crate::scene::{Site, SiteCurve, Standpoint};
use crate::sphere::{azimuth_elevation, ViewFrame};
use nalgebra::Point3;
use std::collections::HashSet;
use std::f64::consts::PI;

/// One row of the table.
#[derive(Clone, Debug, PartialEq)]
pub struct AngleRow {
    /// How the item is named in messages: its label, or its kind and number.
    pub item: String,
    /// `point` for a labelled point, `corner N` for the N-th corner of an item.
    pub what: String,
    /// Site coordinates, metres.
    pub at: Point3<f64>,
    /// Degrees clockwise from north, [0, 360).
    pub azimuth_deg: f64,
    /// Degrees from the heading, [-180, 180), positive to the right.
    pub relative_deg: f64,
    /// Degrees above the horizontal through the eye.
    pub elevation_deg: f64,
    /// From the eye, metres.
    pub distance: f64,
    /// On the image (pixel edges from the top left; the view's pitch and roll applied).
    pub x_px: f64,
    /// Where it lands on the image, pixels down from the top.
    pub y_px: f64,
    /// On the page, when its size is known.
    pub page_mm: Option<(f64, f64)>,
    /// WGS84 latitude and longitude (degrees), when the scene has a `location`.
    pub latlon: Option<(f64, f64)>,
}

/// Where the panorama lies on the printed page: today only its printed width.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PagePlacement {
    /// Millimetres from the page's left and top edges to the panorama's top left corner.
    pub offset_mm: (f64, f64),
    /// Printed width of the whole panorama, millimetres.
    pub width_mm: f64,
}

impl PagePlacement {
    /// The panorama alone, `width_mm` wide.
    pub fn panorama_width(width_mm: f64) -> PagePlacement {
        PagePlacement {
            offset_mm: (0.0, 0.0),
            width_mm,
        }
    }

    fn page_position(&self, map: &Equirect, x: f64, y: f64) -> (f64, f64) {
        let scale = self.width_mm / map.width();
        (self.offset_mm.0 + x * scale, self.offset_mm.1 + y * scale)
    }
}

/// Which rows to make.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct TableChoice {
    /// Only the items with this label (and numbered copies of it).
    pub item: Option<String>,
    /// Only labelled points, no corners.
    pub points_only: bool,
}

/// The table for `standpoint`, an image of `map`'s size and an optional page.
pub fn angle_table(
    site: &Site,
    standpoint: &Standpoint,
    map: &Equirect,
    page: Option<PagePlacement>,
    choice: &TableChoice,
) -> Vec<AngleRow> {
    let view = ViewFrame::new(standpoint);
    let eye = standpoint.eye();
    let frame = site
        .location
        .as_ref()
        .map(|l| crate::scene::LocalFrame::new(l.latitude_deg, l.longitude_deg, l.north_deg, 0.0));
    let heading = standpoint.heading;
    let row = |item: String, what: String, at: Point3<f64>| -> Option<AngleRow> {
        let d = at - eye;
        let distance = d.norm();
        if distance <= 1e-9 {
            return None;
        }
        let (azimuth, elevation) = azimuth_elevation(&d);
        let (view_azimuth, view_elevation) = azimuth_elevation(&view.to_view(&at));
        let image = map.to_image(view_azimuth, view_elevation);
        Some(AngleRow {
            item,
            what,
            at,
            azimuth_deg: super::marks::normal_azimuth_deg(azimuth.to_degrees()),
            relative_deg: ((azimuth - heading + PI).rem_euclid(2.0 * PI) - PI).to_degrees(),
            elevation_deg: elevation.to_degrees(),
            distance,
            x_px: image.x,
            y_px: image.y,
            page_mm: page.map(|p| p.page_position(map, image.x, image.y)),
            latlon: frame.as_ref().map(|f| f.to_latlon(&at)),
        })
    };
    let wanted = |id: usize| {
        choice.item.as_deref().is_none_or(|wanted| {
            crate::scene::label_matches(site.items.get(id).and_then(|i| i.label.as_deref()), wanted)
        })
    };
    // Each item's corners, in drawing order, without repeats (to a micrometre).
    let mut corners: Vec<Vec<Point3<f64>>> = vec![Vec::new(); site.items.len()];
    if !choice.points_only {
        let mut seen: HashSet<(u32, [i64; 3])> = HashSet::new();
        for edge in &site.edges {
            if let SiteCurve::Segment { start, end } = edge.curve {
                for p in [start, end] {
                    let key = p.coords.map(|c| (c * 1e6).round() as i64);
                    if seen.insert((edge.item.0, [key.x, key.y, key.z])) {
                        if let Some(list) = corners.get_mut(edge.item.0 as usize) {
                            list.push(p);
                        }
                    }
                }
            }
        }
    }
    let mut rows = Vec::new();
    for (id, item) in site.items.iter().enumerate() {
        if !wanted(id) {
            continue;
        }
        let name = item
            .label
            .clone()
            .unwrap_or_else(|| format!("{} (item {})", item.kind, id + 1));
        if item.label.is_some() {
            for marker in site.markers.iter().filter(|m| m.item.0 as usize == id) {
                rows.extend(row(name.clone(), "point".to_owned(), marker.at));
            }
        }
        let named: Vec<_> = site
            .named_points
            .iter()
            .filter(|n| n.item.0 as usize == id)
            .collect();
        for (k, p) in corners[id].iter().enumerate() {
            // A corner the item knows by name is called so; others are numbered.
            let what = named
                .iter()
                .find(|n| (n.at - p).norm() < 1e-6)
                .map_or_else(|| format!("corner {}", k + 1), |n| n.name.clone());
            rows.extend(row(name.clone(), what, *p));
        }
    }
    rows
}

/// The columns, in order, with the decimals each is written to: angles to a thousandth of a
/// degree (a hundredth of a pixel on a 4096-pixel image), lengths to a millimetre, pixels
/// and page millimetres to a hundredth.
const COLUMNS: [(&str, usize); 15] = [
    ("item", 0),
    ("what", 0),
    ("x", 3),
    ("y", 3),
    ("z", 3),
    ("azimuth", 3),
    ("relative_azimuth", 3),
    ("elevation", 3),
    ("distance", 3),
    ("x_px", 2),
    ("y_px", 2),
    ("x_mm", 2),
    ("y_mm", 2),
    ("latitude", 8),
    ("longitude", 8),
];

/// A row's cells as text, in [`COLUMNS`] order (page cells empty without a page).
fn cells(row: &AngleRow) -> Vec<String> {
    let numbers = [
        row.at.x,
        row.at.y,
        row.at.z,
        row.azimuth_deg,
        row.relative_deg,
        row.elevation_deg,
        row.distance,
        row.x_px,
        row.y_px,
    ];
    let mut cells = vec![row.item.clone(), row.what.clone()];
    for (value, (_, decimals)) in numbers.iter().zip(&COLUMNS[2..11]) {
        cells.push(fixed(*value, *decimals));
    }
    match row.page_mm {
        Some((x, y)) => {
            cells.push(fixed(x, 2));
            cells.push(fixed(y, 2));
        }
        None => cells.extend([String::new(), String::new()]),
    }
    match row.latlon {
        Some((lat, lon)) => {
            cells.push(fixed(lat, 8));
            cells.push(fixed(lon, 8));
        }
        None => cells.extend([String::new(), String::new()]),
    }
    cells
}

/// A number to fixed decimals, never `-0.000`.
fn fixed(value: f64, decimals: usize) -> String {
    let text = format!("{value:.decimals$}");
    if text.starts_with('-') && text[1..].chars().all(|c| c == '0' || c == '.') {
        text[1..].to_owned()
    } else {
        text
    }
}

/// Comma-separated values (RFC 4180): a header line, then one line per row; fields holding a
/// comma, a quote or a line break are quoted, quotes doubled.
pub fn to_csv(rows: &[AngleRow]) -> String {
    let quote = |field: &str| {
        if field.contains([',', '"', '\n', '\r']) {
            format!("\"{}\"", field.replace('"', "\"\""))
        } else {
            field.to_owned()
        }
    };
    let mut out = COLUMNS.map(|(name, _)| name).join(",");
    out.push_str("\r\n");
    for row in rows {
        let line: Vec<String> = cells(row).iter().map(|c| quote(c)).collect();
        out.push_str(&line.join(","));
        out.push_str("\r\n");
    }
    out
}

/// A JSON object (RFC 8259, written by serde_json): the standpoint and image, then `rows`,
/// an array of objects with the columns as keys (numbers as numbers; the page columns
/// `null` without a page).
pub fn to_json(rows: &[AngleRow], standpoint: &Standpoint, map: &Equirect) -> String {
    let eye = standpoint.eye();
    let rows: Vec<serde_json::Value> = rows
        .iter()
        .map(|row| {
            let fields =
                COLUMNS
                    .iter()
                    .zip(cells(row))
                    .enumerate()
                    .map(|(k, ((name, _), cell))| {
                        // The first two columns (item, what) are words; the rest are numbers or blank.
                        let value = if k < 2 {
                            serde_json::Value::String(cell)
                        } else {
                            json_number(&cell)
                        };
                        (name.to_string(), value)
                    });
            serde_json::Value::Object(fields.collect())
        })
        .collect();
    let table = serde_json::json!({
        "standpoint": standpoint.name,
        "eye": [round(standpoint.x, 3), round(standpoint.y, 3), round(eye.z, 3)],
        "heading": round(super::marks::normal_azimuth_deg(standpoint.heading.to_degrees()), 3),
        "image_px": [map.width(), map.height()],
        "rows": rows,
    });
    let mut out = serde_json::to_string_pretty(&table).expect("a JSON value always serialises");
    out.push('\n');
    out
}

/// A cell written by [`fixed`] as a JSON number, or `null` when blank.
fn json_number(cell: &str) -> serde_json::Value {
    cell.parse::<f64>()
        .ok()
        .and_then(serde_json::Number::from_f64)
        .map_or(serde_json::Value::Null, serde_json::Value::Number)
}

/// `value` rounded to `decimals` places, as the text columns show it.
fn round(value: f64, decimals: usize) -> f64 {
    fixed(value, decimals).parse().unwrap_or(value)
}

/// An aligned text table: names to the left, numbers to the right, a header and a rule.
pub fn to_text(rows: &[AngleRow]) -> String {
    let all: Vec<Vec<String>> =
        std::iter::once(COLUMNS.iter().map(|(n, _)| n.to_string()).collect())
            .chain(rows.iter().map(cells))
            .collect();
    let widths: Vec<usize> = (0..COLUMNS.len())
        .map(|k| all.iter().map(|r| r[k].chars().count()).max().unwrap_or(0))
        .collect();
    let mut out = String::new();
    for (i, cells) in all.iter().enumerate() {
        let line: Vec<String> = cells
            .iter()
            .zip(&widths)
            .enumerate()
            .map(|(k, (cell, &w))| {
                if k < 2 {
                    format!("{cell:<w$}")
                } else {
                    format!("{cell:>w$}")
                }
            })
            .collect();
        out.push_str(line.join("  ").trim_end());
        out.push('\n');
        if i == 0 {
            let total = widths.iter().sum::<usize>() + 2 * (widths.len() - 1);
            out.push_str(&"-".repeat(total));
            out.push('\n');
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::parse_scene;
    use std::path::Path;

    fn table(page: Option<PagePlacement>) -> (Vec<AngleRow>, Standpoint) {
        let site = parse_scene(
            b"Scene(standpoints: [(name: \"s\", x: 0, y: 0, heading: 90)],
              items: [Point(label: \"well, \\\"old\\\"\", at: (10, 0, 1.6)),
                      Line(label: \"rail\", from: (0, 10, 0), to: (0, 10, 1.6))])",
            Path::new("t.ron"),
            "t",
        )
        .unwrap();
        let s = site.standpoints[0].clone();
        let map = Equirect::from_size_px(3600.0, 1800.0);
        (
            angle_table(&site, &s, &map, page, &TableChoice::default()),
            s,
        )
    }

    #[test]
    fn rows_by_hand() {
        let (rows, _) = table(Some(PagePlacement::panorama_width(720.0)));
        assert_eq!(rows.len(), 3);
        // The well: due east at eye height, 10 m away, straight ahead (heading 90).
        let well = &rows[0];
        assert_eq!((well.what.as_str(), well.azimuth_deg), ("point", 90.0));
        assert_eq!(
            (well.relative_deg, well.elevation_deg, well.distance),
            (0.0, 0.0, 10.0)
        );
        assert_eq!((well.x_px, well.y_px), (1800.0, 900.0));
        assert_eq!(well.page_mm, Some((360.0, 180.0)));
        // The rail's foot: due north, 90 degrees left of the heading, 1.6 m below the eye.
        let foot = &rows[1];
        assert_eq!(foot.what, "corner 1");
        assert!((foot.relative_deg + 90.0).abs() < 1e-12);
        assert!((foot.elevation_deg + 1.6f64.atan2(10.0).to_degrees()).abs() < 1e-12);
    }

    #[test]
    fn formats() {
        let (rows, s) = table(None);
        let csv = to_csv(&rows);
        let mut lines = csv.lines();
        assert_eq!(
            lines.next(),
            Some("item,what,x,y,z,azimuth,relative_azimuth,elevation,distance,x_px,y_px,x_mm,y_mm,latitude,longitude")
        );
        assert_eq!(
            lines.next(),
            Some("\"well, \"\"old\"\"\",point,10.000,0.000,1.600,90.000,0.000,0.000,10.000,1800.00,900.00,,,,")
        );
        let json = to_json(&rows, &s, &Equirect::from_size_px(3600.0, 1800.0));
        let parsed: serde_json::Value = serde_json::from_str(&json).expect("valid JSON");
        let first = &parsed["rows"][0];
        assert_eq!(first["item"], "well, \"old\"");
        assert_eq!(first["what"], "point");
        assert_eq!(first["azimuth"], 90.0);
        assert_eq!(first["x_px"], 1800.0);
        assert!(first["x_mm"].is_null());
        assert_eq!(parsed["image_px"], serde_json::json!([3600.0, 1800.0]));
        let text = to_text(&rows);
        let widths: Vec<usize> = text.lines().skip(2).map(|l| l.len()).collect();
        assert!(widths.iter().all(|&w| w == widths[0]), "{text}");
        assert_eq!(fixed(-0.0001, 3), "0.000");
    }
}
