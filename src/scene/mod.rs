//! The site: the one resolved model every later stage reads, and the loaders that build it.
//!
//! A scene file is read once into [`Site`]: named standpoints plus a flat list of edges
//! (segments and elliptic arcs in site coordinates), each tagged with the item it came from.
//! Nothing after the loader knows what RON is.

mod expand;
mod format;
mod load;
mod site;

pub use load::{load_scene, parse_scene};
pub use site::{Edge, ItemId, ItemInfo, Site, SiteCurve, Standpoint, DEFAULT_EYE_HEIGHT};
