//! The equirectangular plane: where directions land on the image, and how a curve on the
//! sphere becomes polylines there, split at the seam and the poles.

mod area;
mod equirect;
mod flatten;
mod polyline;
mod rect;

pub use area::{area_outlines, signed_area};
pub use equirect::{image_of_direction, image_of_point, Equirect, ImagePoint};
pub use flatten::{check_tolerance, flatten, Flattener, DEFAULT_TOLERANCE_PX, TOLERANCE_RANGE_PX};
pub use polyline::PolylineSet;
pub use rect::Rect;
