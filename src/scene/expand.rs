//! Turning the items of a scene file into the site: walking groups and repeats, placing
//! each item, and naming the item (by its path in the file) when one is wrong.

use super::build::{ItemBuilder, Placement};
use super::format::{ItemSpec, Posture, SceneFile, StandpointSpec};
use super::items::*;
use super::location::{find_time_zone, Location};
use super::mesh::UpAxis;
use super::mesh::{add_mesh, add_mesh_named, placed_used_positions, MeshPlacement};
use super::numbers::spot;
use super::numbers::{Finite, Positive};
use super::obj::read_obj;
use super::opendata::{
    build_building, read_open_data, OpenDataContent, OpenDataSpec, Placed, CITY_CREASE_DEG,
};
use super::site::{ItemId, ItemInfo};
use super::site::{Site, Standpoint, DEFAULT_EYE_HEIGHT};
use super::streets::Culprit;
use super::when::{offset_in, SunSpec};
use crate::budget::{MAX_EDGES, MAX_TRIANGLES};
use crate::error::Error;
use std::path::Path;

/// Eye heights of the postures, metres: standing (common practice; see
/// [`DEFAULT_EYE_HEIGHT`]) and seated on a low stool or bench
/// (about 1.2 m, common practice).
pub const SEATED_EYE_HEIGHT: f64 = 1.2;

/// The most items a scene may expand to, copies of repeats included: a town of houses
/// with every window, far beyond a drawing's needs, and small enough to stay interactive.
pub const MAX_ITEMS: usize = 1_000_000;

/// What went wrong while expanding, and where.
#[derive(Debug)]
pub enum ExpandError {
    /// An item is wrong; `path` leads to it through the `items` lists (from 0).
    Item { path: Vec<usize>, message: String },
    /// A scene-level field is wrong.
    Field {
        field: &'static str,
        message: String,
    },
    /// A value inside a scene-level field is wrong; `path` names it through the fields of
    /// nested blocks (`["sun", "time"]`).
    Value {
        path: &'static [&'static str],
        message: String,
    },
    /// A model or data file could not be read; `kind` says which (`model`, `data file`).
    Model {
        path: Vec<usize>,
        kind: &'static str,
        label: String,
        source: Box<Error>,
    },
}

/// Refuses a `sun` block whose local time the clocks of the location's zone (universal
/// time without one) skip, or repeat without its offset written, where the time is written.
fn sun_time_exists(sun: &SunSpec, location: &Location) -> Result<(), ExpandError> {
    let at = |message: String| ExpandError::Value {
        path: &["sun", "time"],
        message,
    };
    let (zone, name) = match &location.time_zone {
        Some(name) => (
            find_time_zone(name).map_err(|e| at(e.to_string()))?,
            name.as_str(),
        ),
        None => (jiff::tz::TimeZone::UTC, "UTC"),
    };
    offset_in(&zone, name, &sun.moment())
        .map(|_| ())
        .map_err(at)
}

/// The resolved site of a parsed scene file read from `scene_path` (models are found
/// relative to its folder).
pub fn expand(
    file: SceneFile,
    fallback_name: &str,
    scene_path: &Path,
) -> Result<Site, ExpandError> {
    let unit = file.unit.metres();
    let mut site = Site {
        name: file.name.unwrap_or_else(|| fallback_name.to_owned()),
        ..Site::default()
    };
    site.hidden_edges = file.hidden;
    site.styles = file.styles.unwrap_or_default();
    site.location = file
        .location
        .as_ref()
        .map(super::location::Location::from_spec);
    let ground_edges = match &file.ground {
        Some(ground) => Some(super::ground::add_ground(&mut site, ground, unit).map_err(
            |message| ExpandError::Field {
                field: "ground",
                message,
            },
        )?),
        None => None,
    };
    if let (Some(sun), Some(location)) = (&file.sun, &site.location) {
        sun_time_exists(sun, location)?;
    }
    site.sun = file.sun.clone();
    let frame = site.location.as_ref().map(|l| {
        super::opendata::LocalFrame::new(l.latitude_deg, l.longitude_deg, l.north_deg, 0.0)
    });
    site.standpoints = file
        .standpoints
        .iter()
        .map(|s| standpoint(s, unit, frame.as_ref(), &site))
        .collect::<Result<_, _>>()?;
    if let Some(name) = &file.default_standpoint {
        match site.standpoints.iter().position(|s| &s.name == name) {
            Some(index) => site.default_standpoint = index,
            None => {
                return Err(ExpandError::Field {
                    field: "default_standpoint",
                    message: format!("there is no standpoint named \"{name}\""),
                })
            }
        }
    }
    let mut walker = Walker {
        site: &mut site,
        scene_path,
        path: Vec::new(),
        visits: 0,
        road_paths: Vec::new(),
        data_roads: Vec::new(),
        place_paths: Vec::new(),
        name_paths: Vec::new(),
    };
    walker.items(&file.items, Placement::in_unit(unit), None, None)?;
    let road_paths = std::mem::take(&mut walker.road_paths);
    let data_roads = std::mem::take(&mut walker.data_roads);
    let place_paths = std::mem::take(&mut walker.place_paths);
    let name_paths = std::mem::take(&mut walker.name_paths);
    let roads = std::mem::take(&mut site.roads);
    let places = std::mem::take(&mut site.places);
    let blame = |e: super::streets::StreetError| ExpandError::Item {
        path: match e.at {
            Culprit::Road(k) => road_paths[k].clone(),
            Culprit::Place(k) => place_paths[k].clone(),
            Culprit::Name(k) => name_paths[k].clone(),
        },
        message: e.message,
    };
    let (junctions, joined) =
        join_streets(&mut site, roads, &places, &data_roads).map_err(blame)?;
    super::streets::name_junctions(&mut site, &junctions, &joined).map_err(blame)?;
    if let (Some(spec), Some(edges)) = (&file.ground, ground_edges) {
        super::ground::draw_ground(&mut site, spec, edges);
    }
    if let Some(guides) = &file.guides {
        site.guides =
            super::guides::resolve(guides, unit).map_err(|message| ExpandError::Field {
                field: "guides",
                message,
            })?;
        for division in &site.guides.divisions {
            if let super::guides::Division::Edges { item, .. } = division {
                if !site
                    .items
                    .iter()
                    .any(|i| label_matches(i.label.as_deref(), item))
                {
                    return Err(ExpandError::Field {
                        field: "guides",
                        message: format!("there is no item labelled \"{item}\" to divide"),
                    });
                }
            }
        }
    }
    Ok(site)
}

struct Walker<'a> {
    site: &'a mut Site,
    scene_path: &'a Path,
    /// Where the walk is in the nested `items` lists.
    path: Vec<usize>,
    /// Items and copies visited so far, groups and repeats included, so that nested
    /// repeats of nothing cannot spin for hours either.
    visits: usize,
    /// Where each road placed so far (`Site::roads`) is written; they are drawn together
    /// at the end so that those that meet are joined.
    road_paths: Vec<Vec<usize>>,
    /// The roads (by their index in `Site::roads`) that came from open data.
    data_roads: Vec<usize>,
    /// Where each round place (`Site::places`) is written.
    place_paths: Vec<Vec<usize>>,
    /// Where each junction name (`Site::junction_names`) is written.
    name_paths: Vec<Vec<usize>>,
}

impl Walker<'_> {
    fn items(
        &mut self,
        items: &[ItemSpec],
        place: Placement,
        layer: Option<&str>,
        copy: Option<u32>,
    ) -> Result<(), ExpandError> {
        for (index, item) in items.iter().enumerate() {
            self.path.push(index);
            self.item(item, place, layer, copy)?;
            self.path.pop();
        }
        Ok(())
    }

    fn fail(&self, message: String) -> ExpandError {
        ExpandError::Item {
            path: self.path.clone(),
            message,
        }
    }

    fn item(
        &mut self,
        item: &ItemSpec,
        place: Placement,
        outer_layer: Option<&str>,
        copy: Option<u32>,
    ) -> Result<(), ExpandError> {
        self.visits += 1;
        if self.site.items.len() >= MAX_ITEMS || self.visits > 2 * MAX_ITEMS {
            return Err(self.fail(format!(
                "the scene expands to more than {MAX_ITEMS} items (check the repeat counts)"
            )));
        }
        let layer = item.layer().or(outer_layer);
        match item {
            ItemSpec::Group(group) => {
                let inner = place.then_move(spot(&group.at).coords, group.turn.0.to_radians());
                return self.items(&group.items, inner, layer, copy);
            }
            ItemSpec::Repeat(repeat) => {
                let step = spot(&repeat.step).coords;
                for k in 0..repeat.count.0 {
                    self.visits += 1;
                    if self.visits > 2 * MAX_ITEMS {
                        return Err(self.fail(format!(
                            "the scene expands to more than {MAX_ITEMS} items (check the repeat counts)"
                        )));
                    }
                    let inner =
                        place.then_move(step * k as f64, (repeat.turn.0 * k as f64).to_radians());
                    let before = (self.site.edges.len(), self.site.faces.len());
                    self.items(&repeat.items, inner, layer, Some(k + 1))?;
                    if k == 0 {
                        self.check_copies(before, repeat.count.0)?;
                    }
                }
                return Ok(());
            }
            ItemSpec::Model(model) => return self.model(model, place, layer),
            ItemSpec::OpenData(data) => return self.open_data(data, layer),
            _ => {}
        }
        let label = item.label().map(|label| match copy {
            Some(k) => format!("{label} {k}"),
            None => label.to_owned(),
        });
        let id = self
            .site
            .add_item_on_layer(item.kind(), label, layer.map(str::to_owned));
        let before = (self.site.edges.len(), self.site.faces.len());
        let mut b = ItemBuilder::new(self.site, id, place);
        if let Some(built) = item.build(&mut b) {
            built.map_err(|message| self.fail(message))?;
        }
        self.check_finite(before)?;
        // A road is placed, not drawn: it waits to be joined with the others.
        while self.road_paths.len() < self.site.roads.len() {
            self.road_paths.push(self.path.clone());
        }
        while self.place_paths.len() < self.site.places.len() {
            self.place_paths.push(self.path.clone());
        }
        while self.name_paths.len() < self.site.junction_names.len() {
            self.name_paths.push(self.path.clone());
        }
        self.check_size()
    }

    /// Refuses an item whose edges or faces came out with a NaN or an infinity (sizes so
    /// far apart in scale that its arithmetic broke down), rather than letting them reach
    /// the drawing. `before` is the edges and triangles before the item.
    fn check_finite(&self, before: (usize, usize)) -> Result<(), ExpandError> {
        let edges_finite = self
            .site
            .edges
            .iter_range(before.0..self.site.edges.len())
            .all(|edge| edge.curve.is_finite());
        let faces_finite = self.site.faces.are_finite_from(before.1);
        if edges_finite && faces_finite {
            return Ok(());
        }
        Err(self.fail(
            "its sizes are too far apart in scale for its edges to be worked out (a number came out infinite or undefined); make the smallest sizes larger or the largest smaller".to_owned(),
        ))
    }

    /// After the first copy of a repeat: refuses at once when `count` copies like it would
    /// take the site past the edges or triangles one run may hold, rather than building
    /// millions of edges first. `before` is the edges and triangles before that copy.
    fn check_copies(&self, before: (usize, usize), count: u32) -> Result<(), ExpandError> {
        let count = count as usize;
        let edges = before.0 + (self.site.edges.len() - before.0) * count;
        let triangles = before.1 + (self.site.faces.len() - before.1) * count;
        if edges > MAX_EDGES || triangles > MAX_TRIANGLES {
            return Err(self.fail(format!(
                "{count} copies would make {edges} edges and {triangles} face triangles, more than the {MAX_EDGES} edges and {MAX_TRIANGLES} triangles pansite draws; check the repeat count or draw less detail"
            )));
        }
        Ok(())
    }

    /// Refuses a site past the edges or triangles one run may hold, naming the item that
    /// took it over (checked after each item, so the walk stops there, not hours later).
    fn check_size(&self) -> Result<(), ExpandError> {
        let (edges, triangles) = (self.site.edges.len(), self.site.faces.len());
        if edges > MAX_EDGES {
            return Err(self.fail(format!(
                "the scene holds more than {MAX_EDGES} edges here ({edges}); check the repeat counts or draw less detail"
            )));
        }
        if triangles > MAX_TRIANGLES {
            return Err(self.fail(format!(
                "the scene holds more than {MAX_TRIANGLES} face triangles here ({triangles}); check the repeat counts or draw less detail"
            )));
        }
        Ok(())
    }

    fn model(
        &mut self,
        model: &ModelSpec,
        place: Placement,
        layer: Option<&str>,
    ) -> Result<(), ExpandError> {
        let label = model.label.clone().unwrap_or_else(|| model.file.0.clone());
        let path = self
            .scene_path
            .parent()
            .unwrap_or(Path::new(""))
            .join(&model.file.0);
        let obj = read_obj(&path).map_err(|source| ExpandError::Model {
            path: self.path.clone(),
            kind: "model",
            label: label.clone(),
            source: Box::new(source),
        })?;
        if !self.site.sources.contains(&path) {
            self.site.sources.push(path.clone());
        }
        let mut placement = MeshPlacement {
            up: model.up,
            unit: model.unit,
            crease_deg: model.crease.0,
            scale: model.scale.0,
            turn_deg: (place.turn.to_degrees()) + model.turn.0,
            offset: place.point(&spot(&model.at)).coords,
        };
        if model.on_ground {
            let placed = placed_used_positions(&obj, &placement);
            let base = place.length(model.at.2 .0);
            let lift = model_lift(self.site.ground.as_ref(), &placed, base)
                .map_err(|message| self.fail(message))?;
            placement.offset.z += lift;
        }
        let first = self.site.items.len();
        add_mesh(self.site, &obj, &placement, &label);
        if let Some(layer) = layer {
            for item in &mut self.site.items[first..] {
                item.layer.get_or_insert_with(|| layer.to_owned());
            }
        }
        self.check_size()
    }
}

impl Walker<'_> {
    /// An `OpenData` item: the file's buildings and streets placed around the scene's
    /// location (`opendata/`). Streets become ordinary `Road` items, built as any other.
    fn open_data(&mut self, spec: &OpenDataSpec, layer: Option<&str>) -> Result<(), ExpandError> {
        let label = spec.label.clone().unwrap_or_else(|| spec.file.0.clone());
        let path = self
            .scene_path
            .parent()
            .unwrap_or(Path::new(""))
            .join(&spec.file.0);
        let data = read_open_data(&path, spec, self.site.location.as_ref()).map_err(|source| {
            ExpandError::Model {
                path: self.path.clone(),
                kind: "data file",
                label: label.clone(),
                source: Box::new(source),
            }
        })?;
        let file_item =
            self.site
                .add_item_on_layer("open data", Some(label), layer.map(str::to_owned));
        for note in data.notes {
            self.site.assumptions.push((file_item, note));
        }
        let metres = Placement::in_unit(1.0);
        match data.content {
            OpenDataContent::Map(placed) => {
                for feature in placed {
                    match feature {
                        Placed::Building {
                            label,
                            rings,
                            heights,
                            ground,
                            assumptions,
                            warnings,
                        } => {
                            let id = self.site.add_item_on_layer(
                                "building",
                                Some(label),
                                layer.map(str::to_owned),
                            );
                            let north = self.site.location.as_ref().map_or(0.0, |l| l.north_deg);
                            let mut b = ItemBuilder::new(self.site, id, metres);
                            let drawn = build_building(&mut b, &rings, &heights, ground, north);
                            let warnings = warnings.into_iter().chain(match drawn {
                                Ok(more) => more,
                                Err(why) => vec![format!("not drawn: {why}")],
                            });
                            for warning in warnings {
                                self.site
                                    .warnings
                                    .push((id, format!("from open data: {warning}")));
                            }
                            for assumption in assumptions {
                                self.site.assumptions.push((id, assumption));
                            }
                        }
                        Placed::Road {
                            label,
                            points,
                            elevations,
                            width,
                            assumptions,
                        } => {
                            let road = ItemSpec::Road(RoadSpec {
                                label: Some(label),
                                layer: None,
                                points: points.iter().map(|p| (Finite(p.x), Finite(p.y))).collect(),
                                elevations: Some(elevations.into_iter().map(Finite).collect()),
                                width: Positive(width),
                                pavement: None,
                                kerb: None,
                                centre_line: CentreLine::default(),
                                corner_radius: None,
                                kerb_radius: None,
                                crossing: None,
                            });
                            self.data_roads.push(self.site.roads.len());
                            self.item(&road, metres, layer, None)?;
                            let id = ItemId(self.site.items.len() as u32 - 1);
                            for assumption in assumptions {
                                self.site.assumptions.push((id, assumption));
                            }
                        }
                    }
                }
            }
            OpenDataContent::City(model) => {
                let placement = MeshPlacement {
                    up: UpAxis::Z,
                    crease_deg: CITY_CREASE_DEG,
                    ..MeshPlacement::default()
                };
                // Each group of the mesh is one city object's surfaces of one layer: its
                // item is named after the object, on that layer (or on the item's own).
                let names = |group: u32, _| {
                    let named = model.group_names.get(group as usize);
                    ItemInfo {
                        kind: "city object",
                        label: named.map(|(id, _)| id.clone()),
                        layer: layer
                            .map(str::to_owned)
                            .or_else(|| named.map(|(_, kind)| kind.clone())),
                    }
                };
                add_mesh_named(self.site, &model.mesh, &placement, &names);
            }
        }
        self.check_size()
    }
}

/// Joins the scene's roads where they meet (`streets::draw_streets`). A road written in the
/// scene that cannot be joined is an error, reported at its item. A road from open data
/// (mapped as many short pieces that often meet at odd angles) that cannot be joined is
/// drawn on its own instead, with a warning naming it, so that one awkward mapped corner
/// does not refuse a whole town.
fn join_streets(
    site: &mut Site,
    mut roads: Vec<super::items::RoadLine>,
    places: &[super::items::PlaceLine],
    data_roads: &[usize],
) -> Result<(Vec<super::streets::Junction>, Vec<super::items::RoadLine>), super::streets::StreetError>
{
    // Each road's index as written, beside it, for the error's place.
    let mut written: Vec<usize> = (0..roads.len()).collect();
    let mut alone = Vec::new();
    let junctions;
    loop {
        let mark = SiteLengths::of(site);
        match super::streets::draw_streets(site, &roads, places) {
            Ok(found) => {
                junctions = found;
                break;
            }
            Err(super::streets::StreetError {
                at: Culprit::Road(k),
                message,
            }) if data_roads.contains(&written[k]) => {
                mark.restore(site);
                written.remove(k);
                let road = roads.remove(k);
                site.warnings.push((
                    road.item,
                    format!("not joined to the streets it meets ({message})"),
                ));
                alone.push(road);
            }
            Err(e) => {
                return Err(super::streets::StreetError {
                    at: match e.at {
                        Culprit::Road(k) => Culprit::Road(written[k]),
                        other => other,
                    },
                    message: e.message,
                })
            }
        }
    }
    for road in alone {
        let mark = SiteLengths::of(site);
        if let Err(e) = super::streets::draw_streets(site, std::slice::from_ref(&road), &[]) {
            mark.restore(site);
            site.warnings
                .push((road.item, format!("not drawn: {}", e.message)));
        }
    }
    Ok((junctions, roads))
}

/// How many edges, faces and marks a site holds, to take back what a failed drawing added
/// (drawing only ever appends).
struct SiteLengths([usize; 6]);

impl SiteLengths {
    fn of(site: &Site) -> Self {
        Self([
            site.edges.len(),
            site.silhouette_candidates.len(),
            site.faces.len(),
            site.outlines.len(),
            site.markers.len(),
            site.named_points.len(),
        ])
    }

    fn restore(&self, site: &mut Site) {
        let [edges, silhouettes, faces, outlines, markers, named] = self.0;
        site.edges.truncate(edges);
        site.silhouette_candidates.truncate(silhouettes);
        site.faces.truncate(faces);
        site.outlines.truncate(outlines);
        site.markers.truncate(markers);
        site.named_points.truncate(named);
    }
}

/// Whether an item's label is `wanted`, or a numbered copy of it (`lamp 3` for `lamp`).
pub fn label_matches(label: Option<&str>, wanted: &str) -> bool {
    label.is_some_and(|label| {
        label == wanted
            || label
                .strip_prefix(wanted)
                .and_then(|rest| rest.strip_prefix(' '))
                .is_some_and(|n| !n.is_empty() && n.bytes().all(|b| b.is_ascii_digit()))
    })
}

fn standpoint(
    spec: &StandpointSpec,
    unit: f64,
    frame: Option<&super::opendata::LocalFrame>,
    site: &Site,
) -> Result<Standpoint, ExpandError> {
    let field = |message: String| ExpandError::Field {
        field: "standpoints",
        message,
    };
    let (x, y) = match (spec.x, spec.y, spec.latitude, spec.longitude, frame) {
        (Some(x), Some(y), None, None, _) => (x.0 * unit, y.0 * unit),
        (None, None, Some(lat), Some(lon), Some(frame)) => {
            let (x, y, _) = frame.to_plan(lat.0, lon.0);
            (x, y)
        }
        (None, None, Some(_), Some(_), None) => {
            return Err(field(format!(
                "standpoint \"{}\" is given by latitude and longitude, so the scene needs a \
                 `location` (where its origin is)",
                spec.name
            )))
        }
        _ => {
            return Err(field(format!(
                "standpoint \"{}\" needs either x and y, or latitude and longitude",
                spec.name
            )))
        }
    };
    let eye_height = match (spec.eye_height, spec.posture) {
        (Some(height), _) => height.0 * unit,
        (None, Posture::Standing) => DEFAULT_EYE_HEIGHT,
        (None, Posture::Seated) => SEATED_EYE_HEIGHT,
    };
    Ok(Standpoint {
        name: spec.name.clone(),
        x,
        y,
        ground: match spec.ground {
            Some(ground) => ground.0 * unit,
            None => super::ground::ground_height(site, x, y),
        },
        own_ground: spec.ground.is_some(),
        eye_height,
        heading: spec.heading.0.to_radians(),
        pitch: spec.pitch.0.to_radians(),
        roll: spec.roll.0.to_radians(),
    })
}
