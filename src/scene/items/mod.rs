//! One file for each kind of item: its fields as written in a scene file, and how it
//! turns into edges, faces, outlines and markers. Each `build_*` gets an [`ItemBuilder`]
//! already placed where the item belongs, and returns what is wrong with the item in words;
//! the caller says where it is written.
//!
//! Adding a kind of item takes three places: its own file here (the fields as a serde
//! struct with `label` and `layer`, and a `build_*` function), one line in the list of
//! [`item_kinds!`] below (with its `mod` line), and its section in `docs/scene-format.md`.
//!
//! [`ItemBuilder`]: super::build::ItemBuilder
//!
//! ## The site vocabulary (design notes)
//!
//! How the items are built, and the choices worth knowing (`docs/scene-format.md` is the user's
//! reference; `tests/scene_format_docs.rs` reads and draws every example in it, every file in
//! `docs/examples/` and `scenes/`, and the starter scene):
//!
//! - **Placement.** `ItemBuilder` takes shapes in the item's own frame; `Placement` is a
//!   similarity that keeps the vertical vertical (scale by the scene unit, turn clockwise about
//!   z, shift). Groups and repeats compose placements, so every item can be anywhere and turned.
//!   Turns of whole quarter turns are exact (`sin_cos_of_turn`), so a block square to the
//!   compass has its corners on the numbers written.
//! - **Edges and faces.** Items draw their edges themselves (a face never draws its outline),
//!   and a segment given twice within one item (a wall top that is also an eave) is drawn once
//!   (ends equal to a micrometre). Faces are triangles that hide; flat faces with holes (walls
//!   with openings, arch fronts) go through earcut on the coordinate plane the face is most
//!   nearly parallel to; curved faces are cut every 3.75 degrees (`FACET_ANGLE`), 0.06 % of the
//!   radius at most, while the drawn edges stay exact curves. Solids are closed, so `check` can
//!   tell a standpoint inside one by ray parity.
//! - **Roofs** (`items/mass.rs`): the roof is the lowest of the planes rising from the sloped
//!   sides of the plan (z = eaves + min slope_i d_i); each roof face is the plan clipped by
//!   straight half-planes (Sutherland-Hodgman), wall tops follow the roof along each wall
//!   (gable ends rise to the ridge). One formulation gives gable, hip, pyramid, shed and the
//!   hipped roof of any convex footprint; an overhang extends the planes outwards and the
//!   soffits close the solid.
//! - **Openings** (`items/walls.rs`): a grid by count (equal bays between margins) or by spacing
//!   (as many as fit, centred); checked to fit under the wall's top and not to overlap. With a
//!   reveal they are holes in the wall face with a set-back back face (solids), or holes right
//!   through with the reveal outwards (rooms). Storey lines stop at openings.
//! - **Round items** (`outline.rs`): rims are exact circles; the grazing generators of columns
//!   and cones and the rim of a dome are computed for each eye (tangent points at acos(r/d);
//!   the sphere's tangent circle R²/D from the centre).
//! - **Arches** (`items/arch.rs`): five shapes, each a few exact arcs from small pure functions
//!   (segmental radius by the intersecting-chords theorem, pointed and three-centred radii);
//!   the wall is one face with a notch per opening, plus soffits, jambs and ends.
//! - **Standing on the ground** (`items/standing.rs`): with `on_ground`, an item with a plan
//!   outline stands at the lowest ground along its sides (a block's walls, an arcade's piers,
//!   a flight's sides), the foot line drawn where its sides cross the ground's triangles; a
//!   round item at the lowest ground round its rim, its foot one exact ellipse arc over each
//!   flat triangle. Things at a point (figures, cars, trees) stand on the ground under it.
//! - **Roads** (`items/road.rs`): offset lines of the centreline, concentric fillets at rounded
//!   corners (mitres where an inner radius vanishes), level over each arc so arcs stay exact
//!   circles, sloping between; dashes measured along the centreline, exact arcs on bends.
//! - **Errors name the item.** Serde forgets positions, so `locate.rs` scans the text for each
//!   item's span; RON errors are placed in their item, and an item's own complaints (an outline
//!   that crosses itself, windows that do not fit) are reported at the item's start with its
//!   kind, label and index. Unknown names get a suggestion (`strsim`'s optimal string
//!   alignment distance).
//! - **Warnings** that do not stop a render (a block of no height) go into `Site::warnings`;
//!   `render` and `check` print them.

mod arch;
mod barrel;
mod block;
#[cfg(test)]
mod checks;
mod figures;
mod footprint;
mod group;
mod heads;
mod junction;
mod marks;
mod mass;
mod model;
mod place;
pub mod plan;
mod road;
mod room;
mod round;
mod stairs;
mod standing;
mod tiles;
mod tower_openings;
mod vault;
mod walls;

pub use arch::{build_arcade, ArcadeSpec};
pub use block::{build_block, BlockSpec};
pub use figures::{build_car, build_figure, build_tree, CarSpec, FigureSpec, TreeSpec};
pub use footprint::{build_footprint, FootprintSpec};
pub use group::{GroupSpec, RepeatSpec};
pub use junction::{build_junction, JunctionSpec};
pub use marks::{build_line, build_point, build_polyline, LineSpec, PointSpec, PolylineSpec};
pub use mass::{build_mass, Mass};
pub use model::ModelSpec;
pub use place::{build_round_place, PlaceLine, RoundPlaceSpec};
pub use plan::{clip_polygon, is_convex, simple_polygon_problem, turn_angle, twice_signed_area};
#[cfg(test)]
pub use road::road_line;
pub use road::{
    build_road, draw_kerb, draw_pavement_back, draw_piece, CentreLine, Piece, PieceEnd, RoadLine,
    RoadSpec,
};
pub use room::{build_room, RoomSpec};
pub use round::{
    build_column, build_dome, build_tower, cone, spheroid_dome, ColumnSpec, DomeSpec, TowerSpec,
};
pub use stairs::{build_stairs, StairsSpec};
pub use standing::model_lift;
pub use tiles::{build_tiles, TilesSpec};
pub use vault::{build_vault, VaultSpec};

use super::build::ItemBuilder;
use serde::Deserialize;

/// Declares [`ItemSpec`], every kind of item a scene can hold: the variant as written in a
/// scene file, the word messages use for it, its fields, and the function that builds it;
/// then the kinds that hold other items (built by the walker in `expand.rs`).
macro_rules! item_kinds {
    (
        built { $( $variant:ident: $kind:literal, $spec:ty, $build:path; )* }
        holding { $( $holder:ident: $holder_kind:literal, $holder_spec:ty; )* }
    ) => {
        /// Every kind of item a scene can hold.
        #[derive(Debug, Deserialize)]
        pub enum ItemSpec {
            $( $variant($spec), )*
            $( $holder($holder_spec), )*
        }

        impl ItemSpec {
            /// The word messages use for the item.
            pub fn kind(&self) -> &'static str {
                match self {
                    $( ItemSpec::$variant(_) => $kind, )*
                    $( ItemSpec::$holder(_) => $holder_kind, )*
                }
            }

            /// The item's label, if it has one.
            pub fn label(&self) -> Option<&str> {
                match self {
                    $( ItemSpec::$variant(spec) => spec.label.as_deref(), )*
                    $( ItemSpec::$holder(spec) => spec.label.as_deref(), )*
                }
            }

            /// The layer the item is drawn on, if it names one.
            pub fn layer(&self) -> Option<&str> {
                match self {
                    $( ItemSpec::$variant(spec) => spec.layer.as_deref(), )*
                    $( ItemSpec::$holder(spec) => spec.layer.as_deref(), )*
                }
            }

            /// Builds an item that draws itself, returning what is wrong with it in words;
            /// `None` for the items that hold others.
            pub fn build(&self, b: &mut ItemBuilder) -> Option<Result<(), String>> {
                match self {
                    $( ItemSpec::$variant(spec) => Some($build(b, spec)), )*
                    _ => None,
                }
            }
        }
    };
}

item_kinds! {
    built {
        Block: "block", BlockSpec, build_block;
        Footprint: "footprint", FootprintSpec, build_footprint;
        Road: "road", RoadSpec, build_road;
        RoundPlace: "round place", RoundPlaceSpec, build_round_place;
        Junction: "junction", JunctionSpec, build_junction;
        Arch: "arch", ArcadeSpec, build_arcade;
        Arcade: "arcade", ArcadeSpec, build_arcade;
        Column: "column", ColumnSpec, build_column;
        // The same as a column, for those who think of it so.
        Cylinder: "cylinder", ColumnSpec, build_column;
        Tower: "tower", TowerSpec, build_tower;
        Dome: "dome", DomeSpec, build_dome;
        Stairs: "stairs", StairsSpec, build_stairs;
        Tiles: "tiles", TilesSpec, build_tiles;
        Vault: "vault", VaultSpec, build_vault;
        Room: "room", RoomSpec, build_room;
        Polyline: "polyline", PolylineSpec, build_polyline;
        Line: "line", LineSpec, build_line;
        Point: "point", PointSpec, build_point;
        Figure: "figure", FigureSpec, build_figure;
        Car: "car", CarSpec, build_car;
        Tree: "tree", TreeSpec, build_tree;
    }
    holding {
        Group: "group", GroupSpec;
        Repeat: "repeat", RepeatSpec;
        Model: "model", ModelSpec;
        OpenData: "open data", crate::scene::opendata::OpenDataSpec;
    }
}
