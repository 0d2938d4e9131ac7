//! Writing a file so that it either appears whole or not at all.

use super::interrupt;
use crate::error::{Error, Result};
use std::fs::File;
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};

/// Writes `path` through `write`, into a temporary file beside it that is renamed over
/// `path` only when everything succeeded. On any failure the temporary file is removed and
/// an earlier file at `path` is left untouched.
pub fn write_atomically(
    path: &Path,
    write: impl FnOnce(&mut BufWriter<File>) -> Result<()>,
) -> Result<()> {
    let temporary = temporary_path(path);
    let write_error = |source| Error::Write {
        path: path.to_owned(),
        source,
    };
    let result = (|| {
        let file = interrupt::create_temporary(&temporary).map_err(write_error)?;
        let mut writer = BufWriter::with_capacity(1 << 20, file);
        write(&mut writer)?;
        writer.flush().map_err(write_error)?;
        let file = writer
            .into_inner()
            .map_err(|e| write_error(e.into_error()))?;
        file.sync_all().map_err(write_error)?;
        interrupt::rename_temporary(&temporary, path).map_err(write_error)
    })();
    if result.is_err() {
        interrupt::discard_temporary(&temporary);
    }
    result
}

/// `dir/.name.pansite-PID.tmp`: hidden, in the same folder (so the rename stays on one file
/// system), and unique to this process.
pub fn temporary_path(path: &Path) -> PathBuf {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    path.with_file_name(format!(".{name}.pansite-{}.tmp", std::process::id()))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn failure_keeps_the_earlier_file_and_leaves_nothing_behind() {
        let dir = std::env::temp_dir().join(format!("pansite-atomic-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let path = dir.join("out.png");
        std::fs::write(&path, b"earlier").unwrap();
        let failed = write_atomically(&path, |w| {
            w.write_all(b"half a fi").unwrap();
            Err(Error::Setting("boom".into()))
        });
        assert!(failed.is_err());
        assert_eq!(std::fs::read(&path).unwrap(), b"earlier");
        assert!(!temporary_path(&path).exists());
        write_atomically(&path, |w| {
            w.write_all(b"new").map_err(|e| Error::Write {
                path: path.clone(),
                source: e,
            })
        })
        .unwrap();
        assert_eq!(std::fs::read(&path).unwrap(), b"new");
        assert_eq!(std::fs::read_dir(&dir).unwrap().count(), 1);
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
