//! Plain marks: `Polyline`, `Line` and `Point` (a labelled marker).

use super::super::build::ItemBuilder;
use super::super::numbers::{spot, Spot, Vertices};
use nalgebra::Point3;
use serde::Deserialize;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PolylineSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    pub points: Vertices,
    /// Join the last point back to the first.
    #[serde(default)]
    pub closed: bool,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LineSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    pub from: Spot,
    pub to: Spot,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PointSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    pub at: Spot,
}

pub fn build_polyline(b: &mut ItemBuilder, spec: &PolylineSpec) -> Result<(), String> {
    let points: Vec<Point3<f64>> = spec.points.0.iter().map(spot).collect();
    b.path(&points, spec.closed);
    Ok(())
}

pub fn build_line(b: &mut ItemBuilder, spec: &LineSpec) -> Result<(), String> {
    let (from, to) = (spot(&spec.from), spot(&spec.to));
    if from == to {
        return Err("a line needs two different ends".to_owned());
    }
    b.segment(from, to);
    Ok(())
}

pub fn build_point(b: &mut ItemBuilder, spec: &PointSpec) -> Result<(), String> {
    b.marker(spot(&spec.at));
    Ok(())
}
