//! The equirectangular plane: where directions land on the image, and how a curve on the
//! sphere becomes polylines there, split at the seam and the poles.

mod equirect;
mod flatten;
mod polyline;

pub use equirect::{Equirect, ImagePoint};
pub use flatten::{flatten, Flattener, DEFAULT_TOLERANCE_PX};
pub use polyline::PolylineSet;
