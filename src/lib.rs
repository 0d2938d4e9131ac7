//! # pansite
//!
//! Exact equirectangular wireframe underlays for people who draw 360-degree spherical
//! perspectives by hand. A site (buildings, streets, arches, columns, stairs, rooms and more,
//! or Wavefront OBJ models) and a standpoint go in; out comes a 360 x 180 degree image in
//! which every straight edge is drawn as the great-circle arc it really makes on the viewing
//! sphere, hidden parts faint or left out, alone or laid out on paper, as PNG, SVG or PDF,
//! ready to print and trace over.
//!
//! ```
//! use pansite::render::{draw, RenderSettings};
//! use pansite::scene::parse_scene;
//! use std::path::Path;
//!
//! let scene = r#"Scene(
//!     standpoints: [(name: "gate", x: 0, y: -10, heading: 0)],
//!     items: [Block(at: Centre(0, 0), width: 8, depth: 6, height: 5)],
//! )"#;
//! let site = parse_scene(scene.as_bytes(), Path::new("example.ron"), "example")?;
//! let settings = RenderSettings { width: 720, height: 360, ..RenderSettings::default() };
//! let render = draw(&site, &site.standpoints[0], &settings)?;
//! // The block stands straight ahead: its front-left vertical edge (x = -4 m, 7 m ahead)
//! // is 29.7 degrees left of the centre column, a vertical line.
//! let wireframe = render.drawing.layers.last().unwrap();
//! let x = (180.0 - 4f64.atan2(7.0).to_degrees()) * 2.0;
//! assert!(wireframe.lines.iter().any(|l| l.iter().all(|p| (p.x - x).abs() < 1e-9)));
//! let canvas = pansite::render::raster(&mut { render });
//! assert_eq!((canvas.width, canvas.height), (720, 360));
//! # Ok::<(), pansite::Error>(())
//! ```
//!
//! ## Conventions (stated once, here)
//! - **Site frame**: right-handed, `x` east, `y` north, `z` up, metres.
//! - **Standpoint**: plan position `(x, y)`, eye height above the ground, heading = the
//!   azimuth shown at the centre of the image, optional pitch (positive looks up) and roll
//!   (positive turns the viewer's up towards their right).
//! - **Azimuth** is measured clockwise from north (`+y`) towards east (`+x`); **elevation** is
//!   the angle above the horizontal plane through the eye. Radians inside the library;
//!   degrees in files and on the command line (names at the boundary say `_deg`).
//! - **Image**: the centre column is the heading, azimuth grows to the right, the left and
//!   right borders are heading -180 and +180 degrees (the seam), the top row is the zenith.
//!   Both axes are linear in angle: a direction at relative azimuth `r` in `[-180, 180)` and
//!   elevation `e` lands at `x = (r + 180) / 360 * W`, `y = (90 - e) / 180 * H`, in
//!   pixel-edge coordinates (pixel centres at `+0.5`).
//! - **Tolerance**: the largest distance, in output pixels, between the true image of a
//!   curve and the polyline drawn for it; default [`plane::DEFAULT_TOLERANCE_PX`].
//!
//! ## Pipeline
//! [`scene`] (model and loaders) -> [`sphere`] (view frame, curves on the viewing sphere) ->
//! [`visibility`] (hidden lines) -> [`plane`] (equirectangular mapping, flattening with seam
//! and pole cuts) -> [`drawing`] (display list of stroked polylines, styles, lettering) ->
//! [`page`] (paper, title block, tiles) -> [`output`] (rasteriser, PNG, SVG, PDF). [`render`]
//! runs them;
//! [`aids`] adds the drawing aids (grid, labels, vanishing points, fans, poles, divisions)
//! and the table of angles.
//!
//! ## Limitations
//! - Curved surfaces hide things as facets of 3.75 degrees; their drawn edges stay exact.
//! - On curved edges, a seen or hidden stretch shorter than a pixel of angle can be missed.
//! - An elliptic arc whose curve passes exactly through the eye is not detected as
//!   degenerate (segments are).

#![forbid(unsafe_code)]
#![warn(missing_docs)]

pub mod aids;
pub mod budget;
pub mod compose;
pub mod cores;
pub mod drawing;
pub mod error;
pub mod explore;
pub mod output;
pub mod page;
pub mod plane;
pub mod render;
pub mod scene;
pub mod sphere;
pub mod sun;
pub mod visibility;

#[cfg(test)]
mod testing;

pub use error::{Error, Result};
