//! Where the explorer's site comes from, the loaded site kept between requests, and the
//! watch that reloads it when its file changes.

use super::describe;
use crate::error::Result;
use crate::scene::HiddenEdges;
use crate::scene::{parse_scene, read_input, Location, Site};
use crate::visibility::HiddenLines;
use std::path::{Path, PathBuf};
use std::sync::{Arc, OnceLock};
use std::time::SystemTime;

/// Reads a model or data file into a site (the command line's loader, with its options).
pub type Loader = Arc<dyn Fn(&Path) -> Result<Site> + Send + Sync>;

/// What the explorer shows and where "keep this standpoint" writes.
#[derive(Clone)]
pub enum Source {
    /// A scene file: read, watched, and where kept standpoints are inserted.
    Scene(PathBuf),
    /// A model or data file given directly: read by `load` and watched; kept standpoints go
    /// into a small scene beside it that places the model with `model_item` (RON text, such
    /// as `Model(file: "hall.obj")`). Without an item, keeping is not offered.
    Model {
        /// The model file.
        path: PathBuf,
        /// How it is read.
        load: Loader,
        /// The scene item that places it, for the scene written beside it.
        model_item: Option<String>,
        /// Where the plan's origin is on the earth (an open-data file is placed around it)
        /// and its time zone, for the scene written beside it.
        location: Option<Location>,
    },
    /// A site read once (from standard input): nothing is watched, nothing can be kept,
    /// for the reason given.
    Fixed {
        /// The site.
        site: Box<Site>,
        /// Why nothing can be kept, as the page shows it.
        reason: String,
    },
}

impl Source {
    /// The file watched for changes, if any.
    pub fn watched(&self) -> Option<&Path> {
        match self {
            Source::Scene(path) | Source::Model { path, .. } => Some(path),
            Source::Fixed { .. } => None,
        }
    }

    /// Why keeping a standpoint is not possible, if it is not.
    pub fn no_keep_reason(&self) -> Option<String> {
        match self {
            Source::Scene(_) => None,
            Source::Model {
                model_item: None,
                path,
                ..
            } => Some(format!(
                "{} cannot be named from a scene file, so standpoints cannot be kept beside it",
                path.display()
            )),
            Source::Model { .. } => None,
            Source::Fixed { reason, .. } => Some(reason.clone()),
        }
    }

    /// The short name used for printed files: the file's stem, or `scene`.
    pub fn stem(&self) -> String {
        let stem = self
            .watched()
            .and_then(Path::file_stem)
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_else(|| "scene".to_owned());
        let safe: String = stem
            .chars()
            .map(|c| {
                if c.is_alphanumeric() || c == '-' || c == '_' {
                    c
                } else {
                    '-'
                }
            })
            .take(60)
            .collect();
        if safe.is_empty() {
            "scene".to_owned()
        } else {
            safe
        }
    }

    /// The scene written beside a model for its kept standpoints.
    pub fn beside_scene(&self) -> Option<PathBuf> {
        match self {
            Source::Model { path, .. } => {
                let stem = path.file_stem()?.to_string_lossy().into_owned();
                Some(path.with_file_name(format!("{stem}-standpoints.ron")))
            }
            _ => None,
        }
    }

    /// Reads the site, and for a scene file the bytes it was read from.
    pub fn load(&self) -> Result<(Site, Option<Vec<u8>>)> {
        match self {
            Source::Scene(path) => {
                let bytes = read_input(path)?;
                let stem = path
                    .file_stem()
                    .map_or("scene".into(), |s| s.to_string_lossy().into_owned());
                let site = parse_scene(&bytes, path, &stem)?;
                Ok((site, Some(bytes)))
            }
            Source::Model { path, load, .. } => Ok((load(path)?, None)),
            Source::Fixed { site, .. } => Ok(((**site).clone(), None)),
        }
    }
}

/// A site ready to draw: the hidden-line set-up (with its hierarchy of faces) made once
/// for each way of drawing hidden edges that is asked for, and kept for every standpoint.
pub struct Loaded {
    pub site: Site,
    /// By [`mode_index`]: faint, solid, off.
    hidden_lines: [OnceLock<HiddenLines>; 3],
    /// Counts the loads; the page asks again when it changes.
    pub version: u64,
    /// The scene file's bytes this site was read from (scene files only).
    pub bytes: Option<Vec<u8>>,
}

fn mode_index(mode: HiddenEdges) -> usize {
    match mode {
        HiddenEdges::Faint => 0,
        HiddenEdges::Solid => 1,
        HiddenEdges::Off => 2,
    }
}

impl Loaded {
    pub fn new(site: Site, bytes: Option<Vec<u8>>, version: u64) -> Loaded {
        let loaded = Loaded {
            site,
            hidden_lines: Default::default(),
            version,
            bytes,
        };
        // The scene's own choice is the one asked for first.
        loaded.hidden_lines(None);
        loaded
    }

    /// The set-up for the mode `asked` (`None`: the scene's, or faint), made on first use.
    pub fn hidden_lines(&self, asked: Option<HiddenEdges>) -> &HiddenLines {
        let mode = asked.or(self.site.hidden_edges).unwrap_or_default();
        self.hidden_lines[mode_index(mode)].get_or_init(|| HiddenLines::new(&self.site, Some(mode)))
    }
}

/// What a file looked like when last seen: size and modification time (a change of either
/// means it is read again; the bytes then decide whether anything changed).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Fingerprint {
    len: u64,
    modified: Option<SystemTime>,
}

pub fn fingerprint(path: &Path) -> Option<Fingerprint> {
    let meta = std::fs::metadata(path).ok()?;
    Some(Fingerprint {
        len: meta.len(),
        modified: meta.modified().ok(),
    })
}

/// The outcome of looking at the watched file again.
pub enum Reload {
    Unchanged,
    Loaded(Box<Site>, Option<Vec<u8>>),
    Failed(String),
}

/// Reads the source again; `Unchanged` when a scene file's bytes are those already loaded.
pub fn reload(source: &Source, current: &Loaded) -> Reload {
    if let (Source::Scene(path), Some(old)) = (source, &current.bytes) {
        if read_input(path).is_ok_and(|bytes| &bytes == old) {
            return Reload::Unchanged;
        }
    }
    match source.load() {
        Ok((site, bytes)) => Reload::Loaded(Box::new(site), bytes),
        Err(error) => Reload::Failed(describe(&error)),
    }
}
