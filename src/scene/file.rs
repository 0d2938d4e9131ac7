//! Reading input files with the checks every loader needs: a regular file (not a folder,
//! a device or a pipe that never ends) of a bounded size, so a wrong path fails at once
//! instead of filling the memory.

use crate::error::{Error, Result};
use std::path::Path;

/// The largest scene or model file pansite reads: 2 GiB (a million-triangle OBJ is about
/// 40 MB).
pub const MAX_INPUT_BYTES: u64 = 2 << 30;

/// The bytes of a regular file of at most [`MAX_INPUT_BYTES`].
pub fn read_input(path: &Path) -> Result<Vec<u8>> {
    let refuse = |message: String| Error::Read {
        path: path.to_owned(),
        source: std::io::Error::new(std::io::ErrorKind::InvalidInput, message),
    };
    let metadata = std::fs::metadata(path).map_err(|source| Error::Read {
        path: path.to_owned(),
        source,
    })?;
    if !metadata.is_file() {
        return Err(refuse(
            "expected a file (this is a folder or a device)".to_owned(),
        ));
    }
    if metadata.len() > MAX_INPUT_BYTES {
        return Err(refuse(too_large(metadata.len())));
    }
    std::fs::read(path).map_err(|source| Error::Read {
        path: path.to_owned(),
        source,
    })
}

/// Why a file of `bytes` is refused. Counted in bytes: whole megabytes would call a file
/// one byte over the limit as large as the limit.
fn too_large(bytes: u64) -> String {
    format!(
        "the file is {bytes} bytes, more than the {MAX_INPUT_BYTES} bytes (2 GiB) pansite reads"
    )
}
