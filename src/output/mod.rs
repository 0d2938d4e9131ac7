//! Output backends. Each takes the [`Drawing`](crate::drawing::Drawing) and an explicit
//! mapping onto its canvas (pixels for PNG, a [`Sheet`](crate::page::Sheet)'s millimetres
//! per pixel for SVG and PDF); none holds global state.

mod atomic;
mod deflate;
pub mod interrupt;
mod pdf;
mod png;
mod raster;
mod svg;
mod vector;
mod xmp;

pub use self::png::{
    encode_grey_png, pixels_per_metre, rasterize_grey_png, rasterize_grey_png_within, write_png,
    PngOptions,
};
pub use atomic::write_atomically;
pub use pdf::write_pdf;
pub use raster::{rasterize, rasterize_in_bands, GreyCanvas, MAX_PIXELS};
pub use svg::{write_svg, write_svg_with, Lettering, EM_PER_CAP};
pub use xmp::{panorama_xmp, Panorama};
