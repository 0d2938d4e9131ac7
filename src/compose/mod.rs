//! Composition aids: trying standpoints quickly and seeing where one stands. Each builds a
//! [`Drawing`](crate::drawing::Drawing) or a [`Sheet`](crate::page::Sheet) that the
//! existing writers output.
//!
//! - [`contact`]: many standpoints (the scene's, or a sweep) as labelled thumbnails on one sheet;
//! - [`plan`]: a top-down site plan with each standpoint's marker, heading and seam;
//! - [`preview`]: an ordinary perspective (pinhole) view from a standpoint, from the scene.

pub mod contact;
pub mod plan;
pub mod preview;

pub use contact::{contact_sheet, sweep_grid, sweep_headings, sweep_path, ContactSettings};
pub use plan::{beside, plan_map, Plan, PlanSettings};
pub use preview::{preview, Pinhole, PreviewSettings};
