//! The commands, one file each, over the helpers they share. A command reads its
//! arguments (`crate::args`), builds its settings in `settings`, calls the library and
//! reports; only `watch` calls another command (it runs `render` again and again).

pub mod angles;
pub mod check;
pub mod common;
pub mod daylight;
pub mod explore;
pub mod new;
pub mod plan;
pub mod preview;
pub mod render;
pub mod settings;
pub mod sheet;
pub mod watch;
