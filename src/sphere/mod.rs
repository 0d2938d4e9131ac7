//! View frame and sphere math: where the eye stands and looks, and the curves that the
//! site's edges trace on the viewing sphere around it.
//!
//! Everything here works in the *view frame*: the eye at the origin, `x` to the viewer's
//! right, `y` straight ahead (the heading), `z` up. With pitch and roll at zero the view frame
//! is the site frame turned about the vertical by the heading.

mod curve;
mod direction;
mod view;

pub use curve::{SphereCurve, TrigRoots};
pub use direction::{angle_between, azimuth_elevation, direction_from_azimuth_elevation};
pub use view::{Degeneracy, ViewFrame};
