//! Hidden lines: which parts of each edge the eye sees past the site's faces.
//!
//! Method. The faces (triangles of every solid item and mesh) go into a bounding-volume
//! hierarchy once per drawing (`bvh.rs`). Each edge, as a curve on the viewing sphere, is
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
//! faceted every 7.5 degrees (a tenth of a per cent of their radius), which is how far an
//! outline of a curved surface can be off when it hides something.

mod bvh;
mod sight;

pub use bvh::{ray_hits_triangle, Bvh};
pub use sight::{Depth, Occluders, Spans, DEPTH_BIAS};
