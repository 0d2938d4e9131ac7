//! `Tiles`: a rectangle on a floor, a wall or a ceiling divided into a regular grid (floor
//! tiles, paving, coffers): in an interior, the strongest cue to perspective.

use super::super::build::ItemBuilder;
use super::super::numbers::{spot, Finite, Positive, Spot};
use nalgebra::Vector3;
use serde::Deserialize;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TilesSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// One corner of the rectangle.
    pub corner: Spot,
    /// The two sides from that corner, as displacements (x, y, z): for a floor both
    /// level, for a wall one of them upright.
    pub along: Spot,
    pub across: Spot,
    /// Tile size along and across; the last row and column may be cut short.
    pub tile: (Positive, Positive),
}

/// The most grid lines one `Tiles` may draw: enough for a 0.1 m grid over a 100 m hall.
pub const MAX_TILE_LINES: usize = 2_000;

/// Positions of the grid lines across a side of `length`, every `step`, both ends included.
pub fn grid_positions(length: f64, step: f64) -> Vec<f64> {
    let whole = (length / step * (1.0 + 1e-12)).floor() as usize;
    let mut positions: Vec<f64> = (0..=whole).map(|i| step * i as f64).collect();
    if length - positions[whole] > 1e-9 * length {
        positions.push(length);
    }
    positions
}

pub fn build_tiles(b: &mut ItemBuilder, spec: &TilesSpec) -> Result<(), String> {
    let corner = spot(&spec.corner);
    let vector = |s: &(Finite, Finite, Finite)| Vector3::new(s.0 .0, s.1 .0, s.2 .0);
    let (along, across) = (vector(&spec.along), vector(&spec.across));
    let (length, breadth) = (along.norm(), across.norm());
    if length == 0.0 || breadth == 0.0 {
        return Err("`along` and `across` must not be zero".to_owned());
    }
    if along.cross(&across).norm() <= 1e-9 * length * breadth {
        return Err("`along` and `across` run the same way: they must span a rectangle".into());
    }
    let lines = length / spec.tile.0 .0 + breadth / spec.tile.1 .0;
    if lines > MAX_TILE_LINES as f64 {
        return Err(format!(
            "this would draw {lines:.0} grid lines, more than {MAX_TILE_LINES}; use bigger tiles"
        ));
    }
    let (unit_along, unit_across) = (along / length, across / breadth);
    for s in grid_positions(length, spec.tile.0 .0) {
        let from = corner + unit_along * s;
        b.segment(from, from + across);
    }
    for t in grid_positions(breadth, spec.tile.1 .0) {
        let from = corner + unit_across * t;
        b.segment(from, from + along);
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn grid_lines_include_both_ends_and_a_short_last_row() {
        assert_eq!(grid_positions(2.0, 0.5), vec![0.0, 0.5, 1.0, 1.5, 2.0]);
        assert_eq!(grid_positions(1.2, 0.5), vec![0.0, 0.5, 1.0, 1.2]);
    }
}
