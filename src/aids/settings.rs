//! Which aids a drawing asks for, checked.

use crate::error::{Error, Result};
use crate::plane::{Equirect, Rect};
use crate::scene::Guides;

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
    /// Where labels may stand, image pixels: the part of the panorama shown (a band of
    /// it); `None` for the whole image.
    pub label_area: Option<Rect>,
    /// Lines no label may cross, image pixels: x of vertical ones, y of horizontal ones
    /// (the edges of tiled sheets).
    pub label_cuts: (Vec<f64>, Vec<f64>),
    /// A white halo behind labels, pixels each side of their strokes; `None` for none.
    pub halo_px: Option<f64>,
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
            label_area: None,
            label_cuts: (Vec::new(), Vec::new()),
            halo_px: None,
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

    /// Refuses settings that cannot be drawn, saying which and why.
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

#[cfg(test)]
mod tests {
    use super::*;

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
