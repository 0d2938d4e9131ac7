//! `pansite explore`: the standpoint explorer in the browser (the server and the page are
//! the library's `pansite::explore`); this file only chooses the source, starts it and
//! prints where it is.

use super::common::{is_data_file, is_standard_stream, read_site, refuse_zone_unless_data};
use super::settings::mesh_placement;
use crate::args::{ExploreArgs, ModelArgs, UnitArg, UpArg};
use pansite::explore::{ExploreSettings, Explorer, Source};
use std::path::{Path, PathBuf};
use std::sync::Arc;

pub fn explore(args: &ExploreArgs) -> anyhow::Result<()> {
    let source = source(args)?;
    let output_dir = args
        .output_dir
        .clone()
        .unwrap_or_else(|| match args.scene.parent() {
            Some(parent) if !is_standard_stream(&args.scene) && !parent.as_os_str().is_empty() => {
                parent.to_owned()
            }
            _ => PathBuf::from("."),
        });
    let mut settings = ExploreSettings::new(source, output_dir);
    settings.port = args.port;
    if let Some(address) = args.listen {
        if !address.is_loopback() {
            eprintln!(
                "pansite: warning: listening on {address}: other computers that reach this address can use the page (the token still guards keeping and printing)"
            );
        }
        settings.listen = address;
    }
    let explorer = Explorer::start(settings)?;
    let url = explorer.url();
    println!("pansite: exploring {} at {url}", args.scene.display());
    println!("pansite: stop with Ctrl-C");
    if args.open {
        open_browser(&url);
    }
    explorer.wait();
    Ok(())
}

/// A scene file, an .obj model or an open-data file (kept standpoints go into a scene
/// beside it), or a scene from standard input (nothing can be kept).
fn source(args: &ExploreArgs) -> pansite::Result<Source> {
    let data_file = !is_standard_stream(&args.scene) && is_data_file(&args.scene);
    refuse_zone_unless_data(&args.model, data_file)?;
    if is_standard_stream(&args.scene) {
        let (site, _) = read_site(&args.scene, &args.model, None, false)?;
        return Ok(Source::Fixed {
            site: Box::new(site),
            reason: "the scene was read from standard input, so there is no file to keep it in"
                .into(),
        });
    }
    if is_data_file(&args.scene) {
        return open_data_source(args);
    }
    let is_obj = args
        .scene
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("obj"));
    if !is_obj {
        return Ok(Source::Scene(args.scene.clone()));
    }
    let placement = mesh_placement(&args.model);
    let model_item = args
        .scene
        .file_name()
        .map(|name| model_item(&name.to_string_lossy(), &args.model));
    Ok(Source::Model {
        path: args.scene.clone(),
        load: Arc::new(move |path: &Path| {
            pansite::scene::load_obj(path, &placement).map(|(site, _)| site)
        }),
        model_item,
        location: None,
    })
}

/// An open-data file given directly, read as `render` reads it: placed around
/// `--origin-latlon`, or else around the file's first position. It is read once here, so
/// that a file that cannot be read stops the command with its message, and so that the
/// scene kept beside it places the data around the same origin.
fn open_data_source(args: &ExploreArgs) -> pansite::Result<Source> {
    let origin = args.model.origin_latlon;
    let zone = args.model.time_zone.clone();
    let site = pansite::scene::load_open_data(&args.scene, origin, zone.as_deref())?;
    let location = site.location.clone();
    let model_item = args
        .scene
        .file_name()
        .map(|name| format!("OpenData(file: {})", ron_string(&name.to_string_lossy())));
    Ok(Source::Model {
        path: args.scene.clone(),
        load: Arc::new(move |path: &Path| {
            pansite::scene::load_open_data(path, origin, zone.as_deref())
        }),
        model_item,
        location,
    })
}

/// The scene item that places the model as the command line did.
fn model_item(file_name: &str, model: &ModelArgs) -> String {
    let up = match model.up {
        UpArg::Y => "Y",
        UpArg::Z => "Z",
    };
    let unit = match model.unit {
        UnitArg::M => "Metre",
        UnitArg::Cm => "Centimetre",
        UnitArg::Mm => "Millimetre",
        UnitArg::In => "Inch",
        UnitArg::Ft => "Foot",
    };
    format!(
        "Model(file: {}, up: {up}, unit: {unit}, crease: {})",
        ron_string(file_name),
        model.crease
    )
}

/// A file name as a RON string, quoted, its backslashes and quotes escaped.
fn ron_string(file_name: &str) -> String {
    format!(
        "\"{}\"",
        file_name.replace('\\', "\\\\").replace('"', "\\\"")
    )
}

/// Asks the desktop to open the address; a failure is only reported.
fn open_browser(url: &str) {
    let opener = if cfg!(target_os = "macos") {
        "open"
    } else {
        "xdg-open"
    };
    if let Err(error) = std::process::Command::new(opener).arg(url).spawn() {
        eprintln!("pansite: could not open a browser ({opener}: {error}); open {url} yourself");
    }
}
