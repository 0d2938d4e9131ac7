//! Temporary files that an interrupt (Ctrl-C) must not leave behind.
//!
//! [`super::write_atomically`] creates its temporary file and renames it over the output
//! while holding the lock of the list of live temporaries. The command's interrupt handler
//! calls [`abandon_temporaries`], which takes the same lock, removes every listed file and
//! forbids new ones; the handler then ends the process. So an interrupt lands either
//! before a temporary file exists, while it is listed (it is removed), or after the rename
//! (the output is whole): never in between. The library installs no handler itself.

use std::fs::File;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::{Mutex, MutexGuard};

/// How many outputs this process has completed (renamed into place).
static COMPLETED: AtomicUsize = AtomicUsize::new(0);

/// How many output files this process has written whole, for an interrupt handler to say.
pub fn completed_writes() -> usize {
    COMPLETED.load(Ordering::SeqCst)
}

struct Live {
    paths: Vec<PathBuf>,
    abandoned: bool,
}

static LIVE: Mutex<Live> = Mutex::new(Live {
    paths: Vec::new(),
    abandoned: false,
});

fn live() -> MutexGuard<'static, Live> {
    // A panic while holding the lock leaves the list as it was: still right to use.
    LIVE.lock().unwrap_or_else(|poisoned| poisoned.into_inner())
}

/// Creates `path` and lists it, unless the run has been interrupted.
pub(crate) fn create_temporary(path: &Path) -> std::io::Result<File> {
    let mut live = live();
    if live.abandoned {
        return Err(std::io::Error::new(
            std::io::ErrorKind::Interrupted,
            "interrupted",
        ));
    }
    let file = File::create(path)?;
    live.paths.push(path.to_owned());
    Ok(file)
}

/// Renames the listed temporary file over `to` and forgets it.
pub(crate) fn rename_temporary(temporary: &Path, to: &Path) -> std::io::Result<()> {
    let mut live = live();
    if live.abandoned {
        return Err(std::io::Error::new(
            std::io::ErrorKind::Interrupted,
            "interrupted",
        ));
    }
    std::fs::rename(temporary, to)?;
    live.paths.retain(|p| p != temporary);
    COMPLETED.fetch_add(1, Ordering::SeqCst);
    Ok(())
}

/// Removes the listed temporary file after a failure and forgets it.
pub(crate) fn discard_temporary(temporary: &Path) {
    let mut live = live();
    let _ = std::fs::remove_file(temporary);
    live.paths.retain(|p| p != temporary);
}

/// Removes every temporary file being written and refuses new ones; for an interrupt
/// handler, which should then end the process. Returns how many were removed.
pub fn abandon_temporaries() -> usize {
    let mut live = live();
    live.abandoned = true;
    let removed = live
        .paths
        .drain(..)
        .filter(|p| std::fs::remove_file(p).is_ok())
        .count();
    removed
}
