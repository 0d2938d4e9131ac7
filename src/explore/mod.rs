//! The standpoint explorer: a small web server on this computer and the page it serves,
//! where the standpoint is dragged across the plan and the underlay and an ordinary
//! perspective follow at once.
//!
//! - `source`: where the site comes from (a scene file, a model given directly, standard
//!   input), the loaded site with its hierarchy of faces kept between requests, and the
//!   watch that reloads it when the file is saved;
//! - `params`: the page's requests as checked values (ranges, words; never file names);
//! - `work`: the render queue: two renderers, the newest request for a pane replacing an
//!   older one still waiting;
//! - `keep`: a kept standpoint inserted into the scene text, every other byte unchanged;
//! - `server`: HTTP on top of `tiny_http`: the door checks (Host, token, Origin, sizes),
//!   the routes, the events stream;
//! - `assets/`: the page (HTML, CSS, JavaScript), compiled into the binary.
//!
//! ## The door
//! The server listens on 127.0.0.1 unless told otherwise. Every request must name this
//! server in its Host header (`127.0.0.1:PORT`, `localhost:PORT` or the address listened
//! on), so a page elsewhere that points a name of its own at 127.0.0.1 (DNS rebinding) is
//! refused. Requests that change something (keeping a standpoint, printing) must also carry
//! the token made for this run (it is in the printed address) in a header and come from
//! this server's own origin. Paths and parameters are matched against fixed routes and
//! parsed as numbers or words; files are read and written only at the places the command
//! was given: the scene (and what it names) and the output folder.
//!
//! This module depends on the pipeline (render, compose, page, output) and nothing in the
//! library depends on it.

mod keep;
mod params;
mod server;
mod source;
mod work;

pub use keep::keep_in_scene;
pub use server::{ExploreSettings, Explorer};
pub use source::{Loader, Source};

/// The text of an error and of each error under it, as the page shows it.
pub fn describe(error: &crate::Error) -> String {
    let mut text = error.to_string();
    let mut source = std::error::Error::source(error);
    while let Some(cause) = source {
        text.push_str(": ");
        text.push_str(&cause.to_string());
        source = cause.source();
    }
    text
}
