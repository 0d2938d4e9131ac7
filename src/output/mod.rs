//! Output backends. Each takes the [`Drawing`](crate::drawing::Drawing) and an explicit
//! mapping onto its canvas; none holds global state.

mod atomic;
mod png;
mod raster;
mod xmp;

pub use self::png::{encode_grey_png, pixels_per_metre, rasterize_grey_png, write_png, PngOptions};
pub use atomic::write_atomically;
pub use raster::{rasterize, rasterize_in_bands, GreyCanvas, MAX_PIXELS};
pub use xmp::{panorama_xmp, Panorama};
