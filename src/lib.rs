pub mod error;
pub mod scene;
pub mod plane;
pub mod sphere;
pub use error::{Error, Result};
