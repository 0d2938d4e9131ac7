//! Reading a data file named by an `OpenData` item (or given on the command line): its
//! kind from its name, its origin from the scene's location, through the bounded reading
//! every loader uses.

use super::cityjson::{read_cityjson, CityModel, Placing};
use super::earth::LocalFrame;
use super::geojson::{first_position, read_geojson, Placed};
use super::{DataKind, OpenDataSpec, Selection};
use crate::error::{Error, Result};
use crate::scene::file::read_input;
use crate::scene::location::Location;
use std::path::Path;

/// What a data file gives, before it is built into the site.
#[derive(Debug)]
pub struct OpenData {
    /// What the file holds.
    pub content: OpenDataContent,
    /// What was assumed or left out for the file as a whole.
    pub notes: Vec<String>,
}

/// What a data file holds, placed in the plan.
#[derive(Debug)]
pub enum OpenDataContent {
    /// Buildings and streets from GeoJSON, placed in the plan.
    Map(Vec<Placed>),
    /// A city model's mesh, placed in the plan.
    City(Box<CityModel>),
}

/// Reads the data file at `path` as `spec` asks, around `location` (the scene's origin).
pub fn read_open_data(
    path: &Path,
    spec: &OpenDataSpec,
    location: Option<&Location>,
) -> Result<OpenData> {
    let kind = DataKind::of(path).ok_or_else(|| Error::Data {
        path: path.to_owned(),
        at: "its name".to_owned(),
        message: "expected a .geojson, .json, .city.json or .jsonl file".to_owned(),
    })?;
    let bytes = read_input(path)?;
    let refraction = spec.refraction.map_or(0.0, |k| k.0);
    let frame =
        location.map(|l| LocalFrame::new(l.latitude_deg, l.longitude_deg, l.north_deg, refraction));
    let mut notes = Vec::new();
    let content = match kind {
        DataKind::GeoJson => {
            let frame = match frame {
                Some(frame) => frame,
                None => {
                    let (lat, lon) = first_position(&bytes).map_err(|e| e.in_file(path))?;
                    notes.push(format!(
                        "the scene has no location: the origin is the file's first position, \
                         latitude {lat:.7}, longitude {lon:.7}"
                    ));
                    LocalFrame::new(lat, lon, 0.0, refraction)
                }
            };
            let selection = Selection::from_spec(spec);
            let scene = read_geojson(&bytes, &frame, &selection).map_err(|e| e.in_file(path))?;
            notes.extend(scene.skipped);
            OpenDataContent::Map(scene.placed)
        }
        DataKind::CityJson | DataKind::CityJsonSeq => {
            let origin = spec.origin.map(|(e, n)| (e.0, n.0));
            let height = location.map_or(0.0, |l| l.height_m);
            let model = read_cityjson(
                &bytes,
                kind == DataKind::CityJsonSeq,
                spec.lod.as_deref(),
                |system| Placing::choose(system, frame.as_ref().map(|f| (f, height)), origin),
            )
            .map_err(|e| e.in_file(path))?;
            if location.is_none() && origin.is_none() {
                notes.push(
                    "the scene has no location and the item no origin: the origin is the \
                     middle of the model, on its lowest point, and the plan's y axis is the \
                     file's grid north"
                        .to_owned(),
                );
            } else if origin.is_some() {
                notes.push(
                    "placed by the grid origin given: the plan's y axis is the file's grid \
                     north and its metres are grid metres"
                        .to_owned(),
                );
            }
            notes.extend(model.notes.iter().cloned());
            OpenDataContent::City(Box::new(model))
        }
    };
    Ok(OpenData { content, notes })
}
