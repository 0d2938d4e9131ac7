//! PNG encoding: 8-bit grey (the default for a monochrome underlay: a quarter of the bytes)
//! or RGBA, with the print resolution (pHYs) and panorama metadata (XMP) when asked.
//!
//! The grey canvas goes to the encoder as it is: no conversion and no copy. `png`'s
//! `Compression::Fast` (an `fdeflate` encoder tuned for PNG) with the `Up` filter:
//! wireframes are mostly white rows, which `Up` turns into zeros.

use super::raster::rasterize_rgb_in_bands;
use super::xmp::{panorama_xmp, Panorama};
use super::{rasterize_in_bands, GreyCanvas};
use crate::budget::Budget;
use crate::drawing::Drawing;
use crate::error::Result;
use std::io::Write;
use std::time::{Duration, Instant};

fn grey_encoder<W: Write>(out: W, width: u32, height: u32) -> png::Encoder<'static, W> {
    let mut encoder = png::Encoder::new(out, width, height);
    encoder.set_color(png::ColorType::Grayscale);
    encoder.set_depth(png::BitDepth::Eight);
    encoder.set_compression(png::Compression::Fast);
    encoder.set_filter(png::Filter::Up);
    encoder
}

/// Encodes the canvas as an 8-bit grey PNG into `out`.
pub fn encode_grey_png(canvas: &GreyCanvas, out: impl Write) -> Result<()> {
    let mut writer = grey_encoder(out, canvas.width, canvas.height).write_header()?;
    writer.write_image_data(&canvas.pixels)?;
    writer.finish()?;
    Ok(())
}

/// What a PNG holds besides its pixels, and how its pixels are stored.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct PngOptions {
    /// Red, green, blue and alpha (opaque) instead of grey.
    pub colour: bool,
    /// Pixels per inch, written in the pHYs chunk (in pixels per metre, as PNG stores it)
    /// so that the image prints at true size.
    pub dpi: Option<f64>,
    /// A panorama's description, written as XMP (an iTXt chunk with the keyword
    /// `XML:com.adobe.xmp`, as the XMP specification, part 3, places it in PNG).
    pub panorama: Option<Panorama>,
}

/// Pixels per metre for a resolution in pixels per inch, rounded.
pub fn pixels_per_metre(dpi: f64) -> u32 {
    (dpi / 0.0254).round().clamp(1.0, u32::MAX as f64) as u32
}

/// Rasterises the drawing and writes it as a PNG into `out` as `options` say, streaming
/// rows to the encoder as the bands are finished.
pub fn write_png(drawing: &Drawing, options: &PngOptions, out: impl Write) -> Result<()> {
    if !options.colour && options.dpi.is_none() && options.panorama.is_none() {
        return rasterize_grey_png(drawing, out);
    }
    let mut encoder = if options.colour {
        let mut encoder = grey_encoder(out, drawing.width, drawing.height);
        encoder.set_color(png::ColorType::Rgba);
        encoder
    } else {
        grey_encoder(out, drawing.width, drawing.height)
    };
    if let Some(dpi) = options.dpi {
        let ppm = pixels_per_metre(dpi);
        encoder.set_pixel_dims(Some(png::PixelDimensions {
            xppu: ppm,
            yppu: ppm,
            unit: png::Unit::Meter,
        }));
    }
    if let Some(panorama) = &options.panorama {
        encoder.add_itxt_chunk("XML:com.adobe.xmp".to_owned(), panorama_xmp(panorama))?;
    }
    let mut writer = encoder.write_header()?;
    let mut stream = writer.stream_writer()?;
    if options.colour {
        let mut rgba: Vec<u8> = Vec::new();
        rasterize_rgb_in_bands(drawing, |rows| {
            rgba.clear();
            for pixel in rows.chunks_exact(3) {
                rgba.extend_from_slice(&[pixel[0], pixel[1], pixel[2], 255]);
            }
            stream.write_all(&rgba)
        })
        .map_err(png::EncodingError::from)?;
    } else {
        rasterize_in_bands(drawing, |rows| stream.write_all(rows))
            .map_err(png::EncodingError::from)?;
    }
    stream.finish()?;
    writer.finish()?;
    Ok(())
}

/// Rasterises the drawing and encodes it as an 8-bit grey PNG into `out`, compressing the
/// top of the image on this thread while the other cores still draw the rest (the same
/// bytes as [`encode_grey_png`] of [`super::rasterize`]).
pub fn rasterize_grey_png(drawing: &Drawing, out: impl Write) -> Result<()> {
    rasterize_grey_png_within(drawing, out, &Budget::new(None)).map(|_| ())
}

/// [`rasterize_grey_png`] within a time budget, checked before each band is encoded.
/// Returns the time spent encoding on this thread (the other cores rasterise meanwhile).
pub fn rasterize_grey_png_within(
    drawing: &Drawing,
    out: impl Write,
    budget: &Budget,
) -> Result<Duration> {
    let mut writer = grey_encoder(out, drawing.width, drawing.height).write_header()?;
    let mut stream = writer.stream_writer()?;
    let (width, height) = (drawing.width.max(1) as usize, drawing.height as f64);
    let (started, mut rows_done, mut encoding) = (Instant::now(), 0usize, Duration::ZERO);
    let mut refused = None;
    let drawn = rasterize_in_bands(drawing, |rows| {
        rows_done += rows.len() / width;
        if let Err(error) = budget.check_time("raster", started, rows_done as f64 / height) {
            refused = Some(error);
            return Err(std::io::Error::other("stopped by the time limit"));
        }
        let encode_started = Instant::now();
        let written = stream.write_all(rows);
        encoding += encode_started.elapsed();
        written
    });
    if let Some(error) = refused {
        return Err(error);
    }
    drawn.map_err(png::EncodingError::from)?;
    let encode_started = Instant::now();
    stream.finish()?;
    writer.finish()?;
    Ok(encoding + encode_started.elapsed())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::drawing::{Layer, Stroke};
    use crate::output::rasterize;
    use crate::plane::{ImagePoint, PolylineSet};

    fn decode(bytes: &[u8]) -> (u32, u32, Vec<u8>) {
        let mut reader = png::Decoder::new(std::io::Cursor::new(bytes))
            .read_info()
            .unwrap();
        let mut pixels = vec![0; reader.output_buffer_size().unwrap()];
        let info = reader.next_frame(&mut pixels).unwrap();
        (info.width, info.height, pixels)
    }

    #[test]
    fn streamed_encoding_matches_rasterising_then_encoding() {
        let mut lines = PolylineSet::new();
        for k in 0..40 {
            let k = k as f64;
            lines.push(&[
                ImagePoint::new(3.0 * k, 0.0),
                ImagePoint::new(500.0 - 7.0 * k, 299.0),
                ImagePoint::new(10.0, 150.0 + k),
            ]);
        }
        let drawing = Drawing {
            width: 512,
            height: 300,
            layers: vec![Layer {
                filled: false,
                text: None,
                name: "test".to_owned(),
                stroke: Stroke::black(0.8, 1.7),
                lines,
            }],
        };
        let mut streamed = Vec::new();
        rasterize_grey_png(&drawing, &mut streamed).unwrap();
        let mut direct = Vec::new();
        encode_grey_png(&rasterize(&drawing), &mut direct).unwrap();
        let (streamed, direct) = (decode(&streamed), decode(&direct));
        assert_eq!((streamed.0, streamed.1), (512, 300));
        assert!(
            streamed.2 == direct.2,
            "the two paths give different pixels"
        );
        assert!(direct.2.iter().any(|&p| p < 255));
    }
}
