//! Drawing aids: what a person drawing over the underlay needs beyond the model's own edges.
//!
//! - [`grid`]: the azimuth/elevation grid at a chosen step, heavier lines at chosen
//!   multiples, the horizon emphasised;
//! - [`labels`]: azimuths, compass points, elevations and the heading written on the grid, and
//!   item labels placed near their items, away from the lines where there is room;
//! - [`vanishing`]: the principal directions of the site (found from its edges, or given as
//!   bearings and slopes) and their vanishing points;
//! - [`fans`]: the great circles through a direction's two vanishing points, and meridians;
//! - [`pole`]: measuring poles with a tick at every metre (or storey);
//! - [`divide`]: perspective-correct equal parts and multiples of segments;
//! - [`table`]: the angles of every labelled point and item corner (`pansite angles`).
//!
//! Every aid is drawn in the site frame and projected like any edge, so it stays exact under
//! pitch and roll; text is lettered as strokes ([`crate::drawing::letter`]). The aids make
//! layers of their own, under the wireframe (grid, fans, meridians) or over it (vanishing
//! points, poles, divisions, labels); none is drawn in the bare mode.

pub mod divide;
pub mod fans;
pub mod grid;
pub mod labels;
pub mod pole;
pub mod table;

pub mod vanishing;

use crate::drawing::{Layer, Stroke};
use crate::error::{Error, Result};
use crate::plane::{Equirect, Flattener, ImagePoint, PolylineSet};
use crate::scene::{Guides, Site};
use crate::sphere::{azimuth_elevation, ViewFrame};
use nalgebra::{Point3, Vector3};

/// Which aids to draw, and how. `Default` is the plain underlay: the 10-degree grid and the
/// horizon, and the guides the scene itself asks for; [`AidSettings::all`] adds the rest.
#[derive(Clone, Debug, PartialEq)]
pub struct AidSettings {
    /// Spacing of the grid, degrees of azimuth and of elevation.
    pub grid_step_deg: f64,
    /// Every this many grid lines (counted from north and from the horizon) is heavier;
    /// 0 for none.
    pub grid_major_every: u32,
    /// Azimuths, compass points, elevations and the heading written on the grid.
    pub labels: bool,
    /// Item labels placed near their items (and labelled points beside their marks).
    pub item_labels: bool,
    /// The vanishing points of the site's principal directions, found from its edges.
    pub vanishing_points: bool,
    /// Directions closer than this (degrees) count as one.
    pub merge_deg: f64,
    /// Guides asked for on the command line, drawn with the scene's own.
    pub guides: Guides,
    /// Cap height of the lettering, pixels; by default a hundredth of the image height.
    pub text_height_px: Option<f64>,
}

impl Default for AidSettings {
    fn default() -> Self {
        AidSettings {
            grid_step_deg: 10.0,
            grid_major_every: 0,
            labels: false,
            item_labels: false,
            vanishing_points: false,
            merge_deg: DEFAULT_MERGE_DEG,
            guides: Guides::default(),
            text_height_px: None,
        }
    }
}

/// Directions within this angle (degrees) are merged: walls a degree or two out of square
/// are one direction to a person drawing, and their vanishing points would sit on top of
/// each other.
pub const DEFAULT_MERGE_DEG: f64 = 2.0;

impl AidSettings {
    /// Every aid on: heavier lines every 30 degrees, labels, item labels and vanishing points.
    pub fn all() -> AidSettings {
        AidSettings {
            grid_major_every: 3,
            labels: true,
            item_labels: true,
            vanishing_points: true,
            ..AidSettings::default()
        }
    }

    pub fn validate(&self) -> Result<()> {
        if !(self.grid_step_deg.is_finite() && (0.5..=90.0).contains(&self.grid_step_deg)) {
            return Err(Error::Setting(format!(
                "a grid step of {} degrees is outside 0.5 to 90",
                self.grid_step_deg
            )));
        }
        if !(self.merge_deg.is_finite() && (0.0..=45.0).contains(&self.merge_deg)) {
            return Err(Error::Setting(format!(
                "merging directions within {} degrees: expected 0 to 45",
                self.merge_deg
            )));
        }
        if let Some(h) = self.text_height_px {
            if !(h.is_finite() && (3.0..=500.0).contains(&h)) {
                return Err(Error::Setting(format!(
                    "a text height of {h} px is outside 3 to 500"
                )));
            }
        }
        Ok(())
    }

    /// The cap height of the lettering on an image of this size.
    pub fn text_height(&self, map: &Equirect) -> f64 {
        self.text_height_px
            .unwrap_or_else(|| (map.height() / 100.0).clamp(7.0, 60.0))
    }
}

/// The strokes of the aids, as black ink of an opacity and width in pixels (a page's style
/// turns the guides light blue). Guides are lighter
/// than the wireframe so that they can be drawn over and told apart from it; marks that are
/// read (labels, vanishing points, ticks) are darker than the lines that are traced.
pub mod strokes {
    use crate::drawing::Stroke;

    /// The grid as it has always been: light enough to draw over.
    pub const GRID: Stroke = Stroke::black(0.22, 1.0);
    pub const GRID_MAJOR: Stroke = Stroke::black(0.35, 1.25);
    pub const HORIZON: Stroke = Stroke::black(0.5, 1.25);
    pub const FANS: Stroke = Stroke::black(0.3, 1.0);
    pub const MERIDIANS: Stroke = Stroke::black(0.4, 1.0);
    pub const MARKS: Stroke = Stroke::black(0.75, 1.25);
    pub const LABELS: Stroke = Stroke::black(0.6, 1.0);
}

/// The layers drawn under the wireframe: the grid (minor and major lines), the horizon, fans
/// and meridians.
pub fn under(
    site: &Site,
    view: &ViewFrame,
    flattener: &mut Flattener,
    settings: &AidSettings,
) -> Vec<Layer> {
    let guides = guides_of(site, settings);
    let lines = grid::grid(
        view,
        flattener,
        settings.grid_step_deg,
        settings.grid_major_every,
    );
    let mut layers = vec![layer("grid", strokes::GRID, lines.minor)];
    push_if_any(&mut layers, "grid major", strokes::GRID_MAJOR, lines.major);
    layers.push(layer("horizon", strokes::HORIZON, lines.horizon));
    push_if_any(
        &mut layers,
        "fans",
        strokes::FANS,
        fans::fans(view, flattener, &guides.fans),
    );
    push_if_any(
        &mut layers,
        "meridians",
        strokes::MERIDIANS,
        fans::meridians(view, flattener, &guides.meridians),
    );
    layers
}

/// The layers drawn over the wireframe: vanishing points, poles, divisions, then the
/// lettering, which keeps clear of everything drawn before it (`drawn`) where it can.
pub fn over(
    site: &Site,
    view: &ViewFrame,
    flattener: &mut Flattener,
    settings: &AidSettings,
    drawn: &[Layer],
) -> Vec<Layer> {
    let guides = guides_of(site, settings);
    let map = flattener.map();
    let text = settings.text_height(&map);
    let mut layers = Vec::new();
    let mut marks = PolylineSet::new();
    let directions = vanishing::directions(site, &guides, settings);
    vanishing::draw(view, &map, &directions, text, &mut marks);
    push_if_any(&mut layers, "vanishing points", strokes::MARKS, marks);
    let mut poles = PolylineSet::new();
    for pole in &guides.poles {
        pole::draw(view, flattener, pole, text, &mut poles);
    }
    push_if_any(&mut layers, "poles", strokes::MARKS, poles);
    let mut divisions = PolylineSet::new();
    for division in &guides.divisions {
        divide::draw(site, view, flattener, division, text, &mut divisions);
    }
    push_if_any(&mut layers, "divisions", strokes::MARKS, divisions);
    if settings.labels {
        let mut lettering = PolylineSet::new();
        labels::grid_labels(view, &map, settings, text, &mut lettering);
        push_if_any(&mut layers, "grid labels", strokes::LABELS, lettering);
    }
    if settings.item_labels {
        let mut room = labels::Occupancy::new(&map, text);
        for layer in drawn.iter().chain(&layers) {
            room.mark_lines(&layer.lines);
        }
        let mut lettering = PolylineSet::new();
        labels::item_labels(site, view, &map, text, &mut room, &mut lettering);
        push_if_any(&mut layers, "item labels", strokes::LABELS, lettering);
    }
    layers
}

/// The scene's guides and those asked for on the command line.
fn guides_of(site: &Site, settings: &AidSettings) -> Guides {
    let mut guides = site.guides.clone();
    guides.extend(&settings.guides);
    guides
}

fn layer(name: &str, stroke: Stroke, lines: PolylineSet) -> Layer {
    Layer {
        name: name.to_owned(),
        stroke,
        lines,
    }
}

fn push_if_any(layers: &mut Vec<Layer>, name: &str, stroke: Stroke, lines: PolylineSet) {
    if !lines.is_empty() {
        layers.push(layer(name, stroke, lines));
    }
}

/// Where a site direction lands on the image.
pub fn image_of_direction(view: &ViewFrame, map: &Equirect, d: &Vector3<f64>) -> ImagePoint {
    let (azimuth, elevation) = azimuth_elevation(&view.direction_to_view(d));
    map.to_image(azimuth, elevation)
}

/// Where a site point lands on the image; `None` at the eye.
pub fn image_of_point(view: &ViewFrame, map: &Equirect, p: &Point3<f64>) -> Option<ImagePoint> {
    let v = view.to_view(p);
    (v.norm() > 1e-9).then(|| {
        let (azimuth, elevation) = azimuth_elevation(&v);
        map.to_image(azimuth, elevation)
    })
}

/// A small circle of `radius` pixels drawn on the image around `at` (a mark, not a curve
/// of the site).
pub fn ring(at: ImagePoint, radius: f64, out: &mut PolylineSet) {
    const SIDES: usize = 16;
    let points: Vec<ImagePoint> = (0..=SIDES)
        .map(|k| {
            let t = std::f64::consts::TAU * k as f64 / SIDES as f64;
            ImagePoint::new(at.x + radius * t.cos(), at.y + radius * t.sin())
        })
        .collect();
    out.push(&points);
}

/// An angle in degrees as written on the drawing: whole degrees when it is one, otherwise
/// to a tenth.
pub fn degrees_text(deg: f64) -> String {
    let tenths = (deg * 10.0).round();
    if tenths % 10.0 == 0.0 {
        format!("{}", (tenths / 10.0) as i64)
    } else {
        format!("{:.1}", tenths / 10.0)
    }
}

/// An azimuth in degrees moved into [0, 360).
pub fn normal_azimuth_deg(deg: f64) -> f64 {
    let a = deg.rem_euclid(360.0);
    if a >= 360.0 - 1e-9 {
        0.0
    } else {
        a
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn degrees_are_written_short() {
        assert_eq!(degrees_text(30.0), "30");
        assert_eq!(degrees_text(-12.25), "-12.3");
        assert_eq!(degrees_text(359.96), "360");
        assert_eq!(normal_azimuth_deg(-30.0), 330.0);
        assert_eq!(normal_azimuth_deg(720.0), 0.0);
    }

    #[test]
    fn settings_are_checked() {
        assert!(AidSettings::default().validate().is_ok());
        assert!(AidSettings::all().validate().is_ok());
        for bad in [
            AidSettings {
                grid_step_deg: 0.1,
                ..AidSettings::default()
            },
            AidSettings {
                grid_step_deg: f64::NAN,
                ..AidSettings::default()
            },
            AidSettings {
                merge_deg: 50.0,
                ..AidSettings::default()
            },
            AidSettings {
                text_height_px: Some(1.0),
                ..AidSettings::default()
            },
        ] {
            assert!(bad.validate().is_err(), "{bad:?}");
        }
    }
}
