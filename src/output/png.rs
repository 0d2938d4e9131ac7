//! Grey PNG encoding.
//!
//! The canvas is already 8-bit grey, so its rows go to the encoder as they are: no
//! conversion and no copy. `png`'s `Compression::Fast` (an `fdeflate` encoder tuned for PNG)
//! with the `Up` filter: wireframes are mostly white rows, which `Up` turns into zeros.

use super::{write_atomically, GreyCanvas};
use crate::error::Result;
use std::io::Write;
use std::path::Path;

/// Encodes the canvas as an 8-bit grey PNG into `out`.
pub fn encode_grey_png(canvas: &GreyCanvas, out: impl Write) -> Result<()> {
    let mut encoder = png::Encoder::new(out, canvas.width, canvas.height);
    encoder.set_color(png::ColorType::Grayscale);
    encoder.set_depth(png::BitDepth::Eight);
    encoder.set_compression(png::Compression::Fast);
    encoder.set_filter(png::Filter::Up);
    let mut writer = encoder.write_header()?;
    writer.write_image_data(&canvas.pixels)?;
    writer.finish()?;
    Ok(())
}

/// Writes the canvas to `path` atomically.
pub fn write_grey_png(canvas: &GreyCanvas, path: &Path) -> Result<()> {
    write_atomically(path, |file| encode_grey_png(canvas, file))
}
