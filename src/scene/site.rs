//! The resolved site model.

pub use super::curve::{EllipseArc, SiteCurve};
pub use super::edges::{EdgeIter, Edges, NumberedEdge};
pub use super::faces::{Face, FaceIter, Faces};
use super::outline::RoundOutline;
use nalgebra::{Point3, Vector3};

/// Eye height of a standing adult, metres: between the 50th-percentile standing eye
/// heights of British adult men (1630 mm) and women (1505 mm) in Pheasant and Haslegrave,
/// "Bodyspace", 3rd ed., 2006 (from memory, not confirmed against the tables).
pub const DEFAULT_EYE_HEIGHT: f64 = 1.6;

/// Where the viewer stands and which way the centre of the panorama looks.
#[derive(Clone, Debug, PartialEq)]
pub struct Standpoint {
    /// The name used to choose it (`render --standpoint`).
    pub name: String,
    /// Plan position, metres east.
    pub x: f64,
    /// Plan position, metres north.
    pub y: f64,
    /// Height of the ground under the viewer, metres.
    pub ground: f64,
    /// Whether that height is the standpoint's own (written in the scene or sent with it: a
    /// balcony, a raised floor) rather than the scene's ground found under it. Moved, a
    /// standpoint keeps its own ground, and otherwise stands on the scene's where it goes.
    pub own_ground: bool,
    /// Eye height above that ground, metres.
    pub eye_height: f64,
    /// Azimuth at the centre of the image, radians clockwise from north.
    pub heading: f64,
    /// Radians; positive looks up.
    pub pitch: f64,
    /// Radians; positive turns the viewer's up towards their right.
    pub roll: f64,
}

impl Standpoint {
    /// A standpoint on level ground at `z = 0`, angles in degrees.
    pub fn from_degrees(
        name: &str,
        x: f64,
        y: f64,
        eye_height: f64,
        heading_deg: f64,
        pitch_deg: f64,
        roll_deg: f64,
    ) -> Standpoint {
        Standpoint {
            name: name.to_owned(),
            x,
            y,
            ground: 0.0,
            own_ground: false,
            eye_height,
            heading: heading_deg.to_radians(),
            pitch: pitch_deg.to_radians(),
            roll: roll_deg.to_radians(),
        }
    }

    /// The eye in site coordinates.
    pub fn eye(&self) -> Point3<f64> {
        Point3::new(self.x, self.y, self.ground + self.eye_height)
    }
}

/// A labelled point: a small mark drawn at its direction.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Marker {
    /// Where the point is, in site coordinates.
    pub at: Point3<f64>,
    /// The item it belongs to.
    pub item: ItemId,
}

/// A point of an item named by what it is (`front left eaves`, `ridge left end`, `apex`),
/// so that tables and reports can say more than "corner 7".
#[derive(Clone, Debug, PartialEq)]
pub struct NamedPoint {
    /// Where the point is, in site coordinates.
    pub at: Point3<f64>,
    /// The item it belongs to.
    pub item: ItemId,
    /// What it is, in the words of the trade (`front left eaves`).
    pub name: String,
}

/// A direction an item declares as one of its own that no edge of it runs along (a
/// stair's rake), for the vanishing points.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Axis {
    /// The direction, in site coordinates (not necessarily of unit length).
    pub direction: Vector3<f64>,
    /// The item that declares it.
    pub item: ItemId,
}

/// How the parts of edges hidden behind faces are drawn.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, serde::Deserialize)]
pub enum HiddenEdges {
    /// Like the seen parts: a see-through wireframe.
    Solid,
    /// Faint and dashed, so that they guide without being mistaken for seen edges.
    #[default]
    Faint,
    /// Left out.
    Off,
}

/// Index of an item in [`Site::items`].
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct ItemId(pub u32);

/// What a warning needs to name an item, and the layer it is drawn on.
#[derive(Clone, Debug, PartialEq)]
pub struct ItemInfo {
    /// The word messages use for its kind (`block`, `arch`).
    pub kind: &'static str,
    /// Its label, if the scene gives one (numbered in repeats).
    pub label: Option<String>,
    /// The layer its edges are drawn on, if not the default.
    pub layer: Option<String>,
}

/// A round shape of an item, whose outline is found from each eye.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Outline {
    /// The shape whose outline is found.
    pub shape: RoundOutline,
    /// The item it belongs to.
    pub item: ItemId,
}

/// A smooth edge of a mesh, drawn only where it is part of the outline seen from the eye:
/// where one of its two faces is turned towards the eye and the other away.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SilhouetteEdge {
    /// One end, in site coordinates.
    pub start: Point3<f64>,
    /// The other end.
    pub end: Point3<f64>,
    /// The outward unit normals of the two faces that share the edge.
    pub normals: [Vector3<f64>; 2],
    /// The item (mesh) it belongs to.
    pub item: ItemId,
}

impl SilhouetteEdge {
    /// Whether the edge is on the outline seen from `eye`: the eye is in front of one face's
    /// plane and behind the other's (both planes hold the edge, so its start will do).
    pub fn is_outline_from(&self, eye: &Point3<f64>) -> bool {
        let to_eye = eye - self.start;
        let [a, b] = self.normals;
        (a.dot(&to_eye) > 0.0) != (b.dot(&to_eye) > 0.0)
    }
}

/// An edge to draw: a curve of an item.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Edge {
    /// The curve, in site coordinates.
    pub curve: SiteCurve,
    /// The item it belongs to.
    pub item: ItemId,
}

/// One mesh model of a site: its items (its groups, objects and materials), its faces, and
/// whether it closes a solid.
#[derive(Clone, Debug, PartialEq)]
pub struct MeshModel {
    /// The model's items, by [`ItemId`] number.
    pub items: std::ops::Range<u32>,
    /// Its triangles in [`Site::faces`], one run.
    pub faces: std::ops::Range<usize>,
    /// For an open model, each triangle's corners by vertex number (the welded vertices,
    /// so that the pieces joined edge to edge can be found); empty for a closed one.
    pub open_corners: Vec<[u32; 3]>,
}

impl MeshModel {
    /// Every edge of the model lies between exactly two of its faces: together they are one
    /// solid that one cannot stand in. (A model has at least one triangle, so only a closed
    /// one keeps no corners.) An open model may still hold closed pieces.
    pub fn is_closed(&self) -> bool {
        self.open_corners.is_empty()
    }
}

/// A scene resolved into edges.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Site {
    /// The scene's name (or its file's).
    pub name: String,
    /// In file order.
    pub standpoints: Vec<Standpoint>,
    /// Which of them is used when none is named.
    pub default_standpoint: usize,
    /// Every item, by [`ItemId`].
    pub items: Vec<ItemInfo>,
    /// The edges drawn from every standpoint.
    pub edges: Edges,
    /// Edges drawn only where they are part of the outline (smooth meshes).
    pub silhouette_candidates: Vec<SilhouetteEdge>,
    /// Triangles of the solid items and meshes, for hidden lines.
    pub faces: Faces,
    /// Round shapes whose outline depends on the eye (columns, cones, domes).
    pub outlines: Vec<Outline>,
    /// Labelled points, drawn as small marks.
    pub markers: Vec<Marker>,
    /// Points of items named by what they are (see [`NamedPoint`]).
    pub named_points: Vec<NamedPoint>,
    /// Things that look wrong but can still be drawn (a block of no height), by item.
    pub warnings: Vec<(ItemId, String)>,
    /// What a loader assumed where its data said nothing (an open-data building's height
    /// from its levels), by item: listed by `check` so that no guess passes for a survey.
    pub assumptions: Vec<(ItemId, String)>,
    /// How the scene asks for hidden edges to be drawn, if it says.
    pub hidden_edges: Option<HiddenEdges>,
    /// How the scene asks its layers to look.
    pub styles: super::style::StyleSheet,
    /// Directions items declare beyond their edges (see [`Axis`]).
    pub axes: Vec<Axis>,
    /// The drawing aids the scene asks for.
    pub guides: super::guides::Guides,
    /// Where the plan's origin is on the earth, if the scene says.
    pub location: Option<super::location::Location>,
    /// Roads placed but not yet drawn: they are joined where they meet and drawn together
    /// (`streets::draw_streets`) once every road is known, which leaves this empty.
    pub roads: Vec<super::items::RoadLine>,
    /// Round places placed but not yet drawn: drawn with the roads, whose arms end in them.
    pub places: Vec<super::items::PlaceLine>,
    /// Junction names placed (the naming item, and where in plan), matched to the
    /// junctions once the roads are joined; this is then left empty.
    pub junction_names: Vec<(ItemId, nalgebra::Vector2<f64>)>,
    /// The sloping ground, if the scene has one.
    pub ground: Option<super::ground::Ground>,
    /// The date and local time of the sun and shadows the scene asks for.
    pub sun: Option<super::when::SunSpec>,
    /// The items of each mesh model, and whether its whole surface is closed.
    pub models: Vec<MeshModel>,
    /// The files the site was read from besides the scene itself (the models it names), for
    /// `watch` to watch.
    pub sources: Vec<std::path::PathBuf>,
}

impl Site {
    /// Adds an item and returns its id, for loaders and for code that builds sites directly.
    pub fn add_item(&mut self, kind: &'static str, label: Option<String>) -> ItemId {
        self.add_item_on_layer(kind, label, None)
    }

    /// Adds an item drawn on a layer of its own (`None`: the default layer).
    pub fn add_item_on_layer(
        &mut self,
        kind: &'static str,
        label: Option<String>,
        layer: Option<String>,
    ) -> ItemId {
        self.items.push(ItemInfo { kind, label, layer });
        ItemId(self.items.len() as u32 - 1)
    }

    /// Adds a straight edge of an item.
    pub fn add_segment(&mut self, item: ItemId, start: Point3<f64>, end: Point3<f64>) {
        self.edges.push(Edge {
            curve: SiteCurve::Segment { start, end },
            item,
        });
    }

    /// How a message names an item: `block "corn hall" (item 3)`, counting from 1.
    pub fn describe_item(&self, id: ItemId) -> String {
        match self.items.get(id.0 as usize) {
            Some(ItemInfo {
                kind,
                label: Some(label),
                ..
            }) => {
                format!("{kind} \"{label}\" (item {})", id.0 + 1)
            }
            Some(ItemInfo {
                kind, label: None, ..
            }) => format!("{kind} (item {})", id.0 + 1),
            None => format!("item {}", id.0 + 1),
        }
    }

    /// The layers the items are drawn on: slot 0 for items without a layer, then one slot for
    /// each layer name in order of first use; and each item's slot.
    pub fn layer_slots(&self) -> (Vec<Option<&str>>, Vec<u32>) {
        let mut names: Vec<Option<&str>> = vec![None];
        let mut slot_of_name = std::collections::HashMap::new();
        let slots = self
            .items
            .iter()
            .map(|item| match item.layer.as_deref() {
                None => 0,
                Some(name) => *slot_of_name.entry(name).or_insert_with(|| {
                    names.push(Some(name));
                    names.len() as u32 - 1
                }),
            })
            .collect();
        (names, slots)
    }

    /// The edges that are part of the outline only from this eye: smooth mesh edges
    /// between a face turned towards the eye and one turned away, and the grazing lines of
    /// round shapes.
    pub fn outline_edges_from(&self, eye: &Point3<f64>) -> Vec<Edge> {
        let meshes = self
            .silhouette_candidates
            .iter()
            .filter(|candidate| candidate.is_outline_from(eye))
            .map(|c| Edge {
                curve: SiteCurve::Segment {
                    start: c.start,
                    end: c.end,
                },
                item: c.item,
            });
        let rounds = self.outlines.iter().flat_map(|outline| {
            outline
                .shape
                .curves_from(eye)
                .into_iter()
                .map(|curve| Edge {
                    curve,
                    item: outline.item,
                })
        });
        meshes.chain(rounds).collect()
    }

    /// The standpoint used when none is named, if there is any.
    pub fn default_standpoint(&self) -> Option<&Standpoint> {
        self.standpoints.get(self.default_standpoint)
    }

    /// The standpoint of that name, if there is one.
    pub fn standpoint(&self, name: &str) -> Option<&Standpoint> {
        self.standpoints.iter().find(|s| s.name == name)
    }
}
