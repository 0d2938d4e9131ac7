//! One file for each kind of item: its fields as written in a scene file, and how it
//! turns into edges, faces, outlines and markers. Each `build_*` gets an [`ItemBuilder`]
//! already placed where the item belongs, and returns what is wrong with the item in words;
//! the caller says where it is written.
//!
//! [`ItemBuilder`]: super::build::ItemBuilder

mod arch;
mod barrel;
mod block;
#[cfg(test)]
mod checks;
mod footprint;
mod marks;
mod mass;
mod model;
mod plan;
mod road;
mod room;
mod round;
mod stairs;
mod tiles;
mod vault;
mod walls;

pub use arch::{build_arcade, ArcadeSpec};
pub use block::{build_block, BlockSpec};
pub use footprint::{build_footprint, FootprintSpec};
pub use marks::{build_line, build_point, build_polyline, LineSpec, PointSpec, PolylineSpec};
pub use model::ModelSpec;
pub use road::{build_road, RoadSpec};
pub use room::{build_room, RoomSpec};
pub use round::{build_column, build_dome, build_tower, ColumnSpec, DomeSpec, TowerSpec};
pub use stairs::{build_stairs, StairsSpec};
pub use tiles::{build_tiles, TilesSpec};
pub use vault::{build_vault, VaultSpec};
