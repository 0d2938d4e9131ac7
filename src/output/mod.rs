//! Output backends. Each takes the [`Drawing`](crate::drawing::Drawing) and an explicit
//! mapping onto its canvas; none holds global state.

mod atomic;
pub mod interrupt;
mod png;
mod raster;

pub use self::png::{encode_grey_png, rasterize_grey_png, rasterize_grey_png_within};
pub use atomic::write_atomically;
pub use raster::{rasterize, rasterize_in_bands, GreyCanvas, MAX_PIXELS};
