//! Hidden lines: which parts of each edge the eye sees past the site's faces.
//!
//! Method. The faces (triangles of every solid item and mesh) go into a bounding-volume
//! hierarchy once per drawing (`bvh.rs`), and, once per eye, into a coarse map of certain
//! cover over the viewing sphere (`occlusion.rs`): an edge whose every direction lies in
//! cells wholly covered by faces nearer than its nearest point is hidden, with no ray cast
//! (from a street, nearly every edge of a town). Every other edge goes to the exact test,
//! so the drawing does not depend on the map. Each edge, as a curve on the viewing sphere, is
//! sampled about one output pixel apart in angle; at each sample a ray from the eye towards
//! the edge's point asks whether any face stands in front of it, nearer than the point's
//! distance less a depth bias (0.02 % of the distance: an edge lying on a face, or shared by
//! two, is never hidden by them). Wherever two neighbouring samples disagree, the change is
//! found by bisection to a thousandth of a pixel. Faces that stand for curved surfaces (a
//! column's sides, a vault) carry the sagitta of their facets as slack, so the exact curves
//! drawn on the true surface are not hidden by the flat pieces that approximate it.
//!
//! Accuracy. A change of visibility is placed within 0.001 px of where the ray test puts
//! it. A hidden or seen stretch shorter than the sampling step (one pixel of angle) can be
//! missed; near the poles, where the image stretches sideways, a pixel of angle spans more
//! than a pixel of image. Faces are exact for flat items and meshes; curved items are
//! faceted every 3.75 degrees (a twentieth of a per cent of their radius), which is how far an
//! outline of a curved surface can be off when it hides something.
//!
//! ## Hidden lines (design notes)
//!
//! `render --hidden solid|faint|off` (or `hidden:` in the scene; faint by default). The parts of
//! edges behind faces go to a layer of their own (`hidden`: ink 0.4, three quarters of the line
//! weight, dashes of 3w + 3 px with gaps of 2w + 2 px) or are left out.
//!
//! - **Definition.** A point of an edge is hidden when a face crosses the sight line from the
//!   eye nearer than the point's distance less a depth bias of 0.02 % of that distance
//!   (`DEPTH_BIAS`), so that the faces an edge lies on or is shared by never hide it, and a
//!   wall a few centimetres thick still hides what is behind it from a hundred metres. Facets
//!   of curved surfaces (`Face::slack`, the sagitta of their chord, set by `ItemBuilder::strip`)
//!   may stand that much further forward, divided by the cosine between sight line and facet
//!   (at least 0.05), because the drawn curves lie on the true surface, outside the inscribed
//!   facets (the ribs of a vault seen from inside would otherwise hide behind their own vault).
//! - **Method** (`visibility/`). One bounding-volume hierarchy of all faces per drawing
//!   (splits at the middle of the longest side of the face centres' box, or at their median
//!   when that is lopsided; leaves of four, f32 boxes rounded outwards, 32-byte nodes; the
//!   two halves built on two cores). Per eye, a map of certain cover (`occlusion.rs`): cells
//!   of azimuth and elevation (about one for two faces, 64 to 1,024 rows), each with the
//!   nearest face (or two faces that make a convex quadrilateral) whose cone of sight lines
//!   holds the cell's circumscribed cap, and a bound on that face's distance over the cell;
//!   filled nearest first through the hierarchy, passing over boxes already hidden. A
//!   segment whose arc lies in cells covered nearer than its nearest point is hidden
//!   throughout; a looked-at point in such a cell tries the cell's face before the
//!   hierarchy. A straight edge the map does not settle is divided recursively: a piece whose
//!   ends are both seen is seen throughout when no face crosses the triangle of sight lines
//!   from the eye to it (one query; each face against that triangle by Möller's interval
//!   test); a piece whose ends are both hidden by one face is hidden
//!   throughout (a triangle meets the plane of the sight lines in a segment; two segments in a
//!   plane ordered the same way at both ends of a fan are ordered so between); other pieces
//!   are halved down to one pixel of angle. Curved edges are sampled every pixel of angle.
//!   Wherever neighbouring samples disagree, the change is found by bisection to a thousandth
//!   of a pixel, its first step a guess: where the edge crosses the outline of the face that
//!   hides its hidden end, tried by two looks either side (right about nine times in ten on
//!   the demo square; a wrong guess costs its two looks, then halving goes on). Edges are
//!   handled on all cores in the same runs as flattening; the seen and
//!   hidden stretches are flattened as sub-curves of the edge's sphere curve.
//! - **Accuracy.** Changes are placed to 0.001 px of the ray test. For straight edges nothing
//!   is missed: the fan test sees any face, however thin, that crosses. For curved edges a
//!   hidden or seen stretch shorter than a pixel of angle between two samples can be missed.
//!   Near the poles a pixel of angle is wider than a pixel of image. Curved faces are facets
//!   of 3.75 degrees. `tests/hidden_lines.rs` compares with a brute-force ray caster over every
//!   face, sampling every quarter pixel: 99.99 to 100 % of samples agree in three scenes and
//!   five standpoints, every disagreement lies within a pixel of a true change, and every change
//!   found lies within half a pixel of a true one (stretches under a hundredth of a pixel,
//!   where a sight line grazes a face at an edge's end, are not placed).
//! - **A standpoint inside a solid** is warned about by `render` and `check` (ray parity over
//!   the solid items' faces).

mod bvh;
mod hidden;
mod occlusion;
mod sight;

pub use bvh::{ray_hits_triangle, Bvh, Visit};
pub use hidden::HiddenLines;
pub use occlusion::OcclusionMap;
pub use sight::{Depth, Occluders, Spans, DEPTH_BIAS};
