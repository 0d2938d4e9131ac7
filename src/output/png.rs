//! PNG encoding: 8-bit grey (the default for a monochrome underlay: a quarter of the bytes)
//! or RGBA, with the print resolution (pHYs) and panorama metadata (XMP) when asked.
//!
//! Grey images are filtered and compressed band by band by the cores that draw them
//! ([`super::deflate`]'s pieces of one zlib stream), and written here in order as IDAT
//! chunks: wireframes are mostly white rows, which the `Up` filter turns into zeros. A
//! band's first row is filtered by `Sub` instead, its row above being another band's. RGBA
//! goes through `png`'s own encoder (`Compression::Fast`, an `fdeflate` encoder tuned for
//! PNG, with the `Up` filter).

use super::deflate::{Adler32, Piece, FINAL_EMPTY_BLOCK, ZLIB_HEADER};
use super::raster::{rasterize_in_bands_then, rasterize_rgb_in_bands, BAND_ROWS};
use super::xmp::{panorama_xmp, Panorama};
use super::GreyCanvas;
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

/// Encodes the canvas as an 8-bit grey PNG into `out` (the same bytes as
/// [`rasterize_grey_png`] of the drawing it was rasterised from).
pub fn encode_grey_png(canvas: &GreyCanvas, out: impl Write) -> Result<()> {
    let mut writer = grey_encoder(out, canvas.width, canvas.height).write_header()?;
    let mut data = ImageData::new(&mut writer);
    let stride = canvas.width as usize;
    if stride > 0 {
        for band in canvas.pixels.chunks(BAND_ROWS * stride) {
            data.push(compress_band(band, stride))?;
        }
    }
    data.finish()?;
    writer.finish()?;
    Ok(())
}

/// PNG's filter types (PNG specification, 9.2): each byte less the one to its left, or
/// less the one above it.
const FILTER_SUB: u8 = 1;
const FILTER_UP: u8 = 2;

/// One band of grey rows filtered and compressed as a piece of the image's zlib stream:
/// its first row by `Sub`, the others by `Up`. `stride` is the bytes a row.
fn compress_band(rows: &[u8], stride: usize) -> (Vec<u8>, Adler32) {
    let mut piece = Piece::new(Vec::with_capacity(rows.len() / 32));
    for (index, row) in rows.chunks_exact(stride).enumerate() {
        if index == 0 {
            piece.byte(FILTER_SUB);
            piece.byte(row[0]);
            piece.differences(&row[1..], &row[..stride - 1]);
        } else {
            piece.byte(FILTER_UP);
            piece.differences(row, &rows[(index - 1) * stride..index * stride]);
        }
    }
    piece.finish()
}

/// The image's zlib stream written as IDAT chunks: the header, then the bands' pieces in
/// order as they come, then the last block and the combined checksum.
struct ImageData<'w, W: Write> {
    writer: &'w mut png::Writer<W>,
    pending: Vec<u8>,
    checksum: Adler32,
}

/// Bytes gathered before an IDAT chunk is written.
const CHUNK_BYTES: usize = 1 << 20;

impl<'w, W: Write> ImageData<'w, W> {
    fn new(writer: &'w mut png::Writer<W>) -> Self {
        ImageData {
            writer,
            pending: ZLIB_HEADER.to_vec(),
            checksum: Adler32::default(),
        }
    }

    fn push(
        &mut self,
        (bytes, adler): (Vec<u8>, Adler32),
    ) -> std::result::Result<(), png::EncodingError> {
        self.checksum = self.checksum.then(&adler);
        self.pending.extend_from_slice(&bytes);
        if self.pending.len() >= CHUNK_BYTES {
            self.writer.write_chunk(png::chunk::IDAT, &self.pending)?;
            self.pending.clear();
        }
        Ok(())
    }

    fn finish(mut self) -> std::result::Result<(), png::EncodingError> {
        self.pending.extend_from_slice(&FINAL_EMPTY_BLOCK);
        self.pending
            .extend_from_slice(&self.checksum.value().to_be_bytes());
        self.writer.write_chunk(png::chunk::IDAT, &self.pending)
    }
}

/// Rasterises the drawing into the grey image data of `writer` (its header written),
/// within the time budget, checked before each band is written. Returns the time spent
/// writing on this thread (the bands are drawn and compressed on the other cores).
fn write_grey_image<W: Write>(
    writer: &mut png::Writer<W>,
    drawing: &Drawing,
    budget: &Budget,
) -> Result<Duration> {
    let stride = drawing.width.max(1) as usize;
    let image_rows = drawing.height as usize;
    let (started, mut rows_done, mut writing) = (Instant::now(), 0usize, Duration::ZERO);
    let mut refused = None;
    let mut data = ImageData::new(writer);
    let drawn = rasterize_in_bands_then(
        drawing,
        |rows| compress_band(rows, stride),
        |rows, piece| {
            rows_done += rows.len() / stride;
            if let Err(error) = budget.check_time("raster", started, rows_done, image_rows) {
                refused = Some(error);
                return Err(png::EncodingError::from(std::io::Error::other(
                    "stopped by the time limit",
                )));
            }
            let writing_started = Instant::now();
            let written = data.push(piece);
            writing += writing_started.elapsed();
            written
        },
    );
    if let Some(error) = refused {
        return Err(error);
    }
    drawn?;
    let writing_started = Instant::now();
    data.finish()?;
    Ok(writing + writing_started.elapsed())
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
    if options.colour {
        let mut stream = writer.stream_writer()?;
        let mut rgba: Vec<u8> = Vec::new();
        rasterize_rgb_in_bands(drawing, |rows| {
            rgba.clear();
            for pixel in rows.chunks_exact(3) {
                rgba.extend_from_slice(&[pixel[0], pixel[1], pixel[2], 255]);
            }
            stream.write_all(&rgba)
        })
        .map_err(png::EncodingError::from)?;
        stream.finish()?;
    } else {
        write_grey_image(&mut writer, drawing, &Budget::new(None))?;
    }
    writer.finish()?;
    Ok(())
}

/// Rasterises the drawing and encodes it as an 8-bit grey PNG into `out`, each band
/// compressed by the core that drew it and written here in order (the same bytes as
/// [`encode_grey_png`] of [`super::rasterize`]).
pub fn rasterize_grey_png(drawing: &Drawing, out: impl Write) -> Result<()> {
    rasterize_grey_png_within(drawing, out, &Budget::new(None)).map(|_| ())
}

/// [`rasterize_grey_png`] within a time budget, checked before each band is written.
/// Returns the time spent writing on this thread (the other cores rasterise and compress).
pub fn rasterize_grey_png_within(
    drawing: &Drawing,
    out: impl Write,
    budget: &Budget,
) -> Result<Duration> {
    let mut writer = grey_encoder(out, drawing.width, drawing.height).write_header()?;
    let writing = write_grey_image(&mut writer, drawing, budget)?;
    let finishing = Instant::now();
    writer.finish()?;
    Ok(writing + finishing.elapsed())
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
        // The bands compressed on several cores give the very bytes of the one-core path.
        assert!(streamed == direct);
        let (streamed, direct) = (decode(&streamed), decode(&direct));
        assert_eq!((streamed.0, streamed.1), (512, 300));
        assert!(
            streamed.2 == direct.2,
            "the two paths give different pixels"
        );
        assert!(direct.2.iter().any(|&p| p < 255));
    }
}
