//! `pansite new`: write a commented starter scene, never over an existing file.

use crate::args::NewArgs;
use pansite::scene::STARTER_SCENE;
use pansite::Error;
use std::fs::OpenOptions;
use std::io::Write;

/// `pansite new`.
pub fn new_scene(args: &NewArgs) -> anyhow::Result<()> {
    let path = &args.file;
    let mut file = match OpenOptions::new().write(true).create_new(true).open(path) {
        Ok(file) => file,
        Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => {
            return Err(Error::Setting(format!(
                "{} already exists; choose another name (it was left as it is)",
                path.display()
            ))
            .into())
        }
        Err(source) => {
            return Err(Error::Write {
                path: path.clone(),
                source,
            }
            .into())
        }
    };
    if let Err(source) = file.write_all(STARTER_SCENE.as_bytes()) {
        drop(file);
        let _ = std::fs::remove_file(path);
        return Err(Error::Write {
            path: path.clone(),
            source,
        }
        .into());
    }
    eprintln!(
        "pansite: wrote {}; draw it with: pansite render {}",
        path.display(),
        path.display()
    );
    Ok(())
}
