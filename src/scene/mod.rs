//! The site: the one resolved model every later stage reads, and the loaders that build it.
//!
//! A scene file (RON) or a model (Wavefront OBJ) is read once into [`Site`]: named
//! standpoints, a flat list of edges (segments and elliptic arcs in site coordinates) each
//! tagged with the item it came from, the smooth mesh edges that are drawn where they form
//! an outline, and the faces. Nothing after the loaders knows what RON or OBJ is.

mod build;
mod curve;
mod edges;
mod expand;
mod faces;
mod file;
mod format;
mod ground;
mod guides;
mod items;
mod load;
mod locate;
mod location;
mod mesh;
mod numbers;
mod obj;
mod opendata;
mod outline;
mod pieces;
mod places;
mod site;
pub mod streets;
mod style;
mod suggest;
mod survey;
mod when;

pub use expand::{label_matches, MAX_ITEMS, SEATED_EYE_HEIGHT};

/// A commented scene to begin from (`pansite new`).
pub const STARTER_SCENE: &str = include_str!("starter.ron");
pub use file::{read_input, MAX_INPUT_BYTES};
pub use ground::{ground_height, Ground, GroundDraw};
pub use guides::{Division, Fan, Guides, Pole, Slope, DEFAULT_FAN_STEP_DEG};
pub use load::{
    load_obj, load_obj_timed, load_open_data, load_scene, load_scene_timed, load_style_sheet,
    parse_scene, parse_scene_timed, scene_unit_metres, LoadTimings,
};
pub use location::{find_time_zone, Location, LocationSpec};
pub use mesh::{add_mesh, MeshPlacement, MeshStats, Unit, UpAxis, DEFAULT_CREASE_DEG};
pub use obj::{parse_obj, ObjElement, ObjFile, Smoothing, NO_NORMAL};
pub use opendata::{
    curvature_drop, radius_of_curvature, read_cityjson, read_geojson, read_open_data, CityModel,
    DataKind, GeoJsonScene, Heights, LocalFrame, OpenData, OpenDataContent, OpenDataError,
    OpenDataSpec, Placed, Placing, RoofShape, Selection, DEFAULT_LEVELS, DEFAULT_ROOF_STOREYS,
    DEFAULT_STOREY, DEFAULT_WITHIN, LANE_WIDTH, ROAD_WIDTHS, SURVEY_REFRACTION,
};
pub use outline::{tangent_points, RoundOutline};
pub use site::{
    Axis, Edge, EdgeIter, Edges, EllipseArc, Face, FaceIter, Faces, HiddenEdges, ItemId, ItemInfo,
    Marker, MeshModel, NamedPoint, NumberedEdge, Outline, SilhouetteEdge, Site, SiteCurve,
    Standpoint, DEFAULT_EYE_HEIGHT,
};
pub use style::{Colour, LayerStyle, Opacity, StyleSheet};
pub use survey::{bounds, solids_enclosing, survey, StandpointCheck, Survey};
pub use when::{
    offset_in, offset_seconds_text, parse_date, parse_time, LocalMoment, SunSpec, YEARS,
};
