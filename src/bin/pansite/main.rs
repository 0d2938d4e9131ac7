//! The `pansite` command: parse, call the library, report.

mod args;
mod check;

use anyhow::Context;
use args::{Cli, Command, HiddenArg, NewArgs, RenderArgs, UnitArg, UpArg};
use clap::Parser;
use pansite::render::{render_png, render_png_to, RenderSettings};
use pansite::scene::{
    load_obj_timed, load_scene_timed, parse_scene_timed, solids_enclosing, HiddenEdges,
    LoadTimings, MeshPlacement, Site, Standpoint, Unit, UpAxis, DEFAULT_EYE_HEIGHT, STARTER_SCENE,
};
use pansite::Error;
use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::time::Duration;

/// How many skipped edges are named one by one before the rest are counted.
const MAX_NAMED_SKIPS: usize = 20;

/// The exit code after an interrupt: 128 + SIGINT, as shells report it.
const INTERRUPTED: i32 = 130;

fn main() -> ExitCode {
    // Ctrl-C (or a termination request) mid-render must leave no temporary file behind.
    let _ = ctrlc::set_handler(|| {
        pansite::output::interrupt::abandon_temporaries();
        eprintln!("pansite: interrupted; no file was written");
        std::process::exit(INTERRUPTED);
    });
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(error) => {
            let _ = error.print();
            return ExitCode::from(error.exit_code().clamp(0, 255) as u8);
        }
    };
    let result = match cli.command {
        Command::Render(args) => render(&args),
        Command::Check(args) => check::check(&args.scene),
        Command::New(args) => new_scene(&args),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(error) => {
            eprintln!("pansite: error: {error:#}");
            let bad_input = error
                .chain()
                .any(|e| e.downcast_ref::<Error>().is_some_and(Error::is_bad_input));
            ExitCode::from(if bad_input { 2 } else { 1 })
        }
    }
}

fn render(args: &RenderArgs) -> anyhow::Result<()> {
    let (site, load) = read_site(args)?;
    let standpoint = choose_standpoint(&site, args)?;
    let settings = RenderSettings {
        width: args.size.0,
        height: args.size.1,
        tolerance_px: args.tolerance,
        line_weight_px: args.line_weight,
        overlays: !args.bare,
        hidden: args.hidden.map(|h| match h {
            HiddenArg::Solid => HiddenEdges::Solid,
            HiddenArg::Faint => HiddenEdges::Faint,
            HiddenArg::Off => HiddenEdges::Off,
        }),
        time_limit: Some(Duration::from_secs_f64(args.time_limit)),
    };
    settings.validate()?;
    let output = args
        .output
        .clone()
        .unwrap_or_else(|| default_output(&args.scene, &standpoint));
    let render = if output == Path::new("-") {
        // Standard output cannot be replaced atomically: encode in memory, then send it.
        let mut bytes = Vec::new();
        let render = render_png_to(&site, &standpoint, &settings, &mut bytes)?;
        std::io::stdout()
            .lock()
            .write_all(&bytes)
            .context("writing to standard output")?;
        render
    } else {
        if args.output.is_none() {
            if let Some(folder) = output.parent() {
                std::fs::create_dir_all(folder)
                    .with_context(|| format!("cannot create the folder {}", folder.display()))?;
            }
        }
        render_png(&site, &standpoint, &settings, &output)
            .with_context(|| format!("rendering {}", output.display()))?
    };
    if !args.quiet {
        for item in solids_enclosing(&site, &standpoint.eye()) {
            eprintln!(
                "pansite: warning: standpoint \"{}\" is inside {}: its faces surround the view and hide everything beyond",
                standpoint.name,
                site.describe_item(item)
            );
        }
        for (item, message) in &site.warnings {
            eprintln!("pansite: warning: {} {message}", site.describe_item(*item));
        }
        for skipped in render.skipped.iter().take(MAX_NAMED_SKIPS) {
            eprintln!(
                "pansite: warning: skipped an edge of {}: {}",
                site.describe_item(skipped.item),
                skipped.why
            );
        }
        if render.skipped.len() > MAX_NAMED_SKIPS {
            eprintln!(
                "pansite: warning: ... and {} more",
                render.skipped.len() - MAX_NAMED_SKIPS
            );
        }
        let lines = render.drawing.wireframe_lines();
        eprintln!(
            "pansite: wrote {} ({}x{} px, standpoint \"{}\", {} edges as {} lines, {} skipped)",
            output.display(),
            settings.width,
            settings.height,
            standpoint.name,
            site.edges.len(),
            lines,
            render.skipped.len()
        );
    }
    if args.timings {
        print_timings(&load, &render.timings);
    }
    Ok(())
}

/// The stages' times on standard error. Visibility is found edge by edge in the pass that
/// flattens, and the encoder compresses early bands while the other cores rasterise later
/// ones, so those pairs are given together with the part that can be told apart.
fn print_timings(load: &LoadTimings, t: &pansite::render::Timings) {
    let ms = |d: Duration| d.as_secs_f64() * 1e3;
    let both = t.raster_and_encode.unwrap_or_default();
    let encode = t.encode.unwrap_or_default();
    eprintln!(
        "pansite: timings: load {:.1} ms (read and parse {:.1}, expand {:.1}); \
         visibility + flatten {:.1} ms (of which the hierarchy of faces {:.1}; edges are seen \
         and flattened in one pass); raster + encode {:.1} ms overlapped (encode {:.1} ms on \
         the writing thread, raster {:.1} ms besides)",
        ms(load.parse + load.expand),
        ms(load.parse),
        ms(load.expand),
        ms(t.flatten),
        ms(t.hierarchy),
        ms(both),
        ms(encode),
        ms(both.saturating_sub(encode)),
    );
}

/// Writes the starter scene, refusing to replace a file that is already there.
fn new_scene(args: &NewArgs) -> anyhow::Result<()> {
    use std::fs::OpenOptions;
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

/// The scene from a RON file, an OBJ model (by its extension) or standard input.
fn read_site(args: &RenderArgs) -> pansite::Result<(Site, LoadTimings)> {
    let path = args.scene.as_path();
    if path == Path::new("-") {
        let mut bytes = Vec::new();
        std::io::stdin()
            .read_to_end(&mut bytes)
            .map_err(|source| Error::Read {
                path: PathBuf::from("<stdin>"),
                source,
            })?;
        return parse_scene_timed(&bytes, Path::new("<stdin>"), "stdin");
    }
    let is_obj = path
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("obj"));
    if is_obj {
        let placement = MeshPlacement {
            up: match args.up {
                UpArg::Y => UpAxis::Y,
                UpArg::Z => UpAxis::Z,
            },
            unit: match args.unit {
                UnitArg::M => Unit::Metre,
                UnitArg::Cm => Unit::Centimetre,
                UnitArg::Mm => Unit::Millimetre,
                UnitArg::In => Unit::Inch,
                UnitArg::Ft => Unit::Foot,
            },
            crease_deg: args.crease,
            ..MeshPlacement::default()
        };
        let (site, stats, timings) = load_obj_timed(path, &placement)?;
        if stats.dropped_faces > 0 && !args.quiet {
            eprintln!(
                "pansite: warning: {}: left out {} faces of no area (repeated or collinear vertices)",
                path.display(),
                stats.dropped_faces
            );
        }
        return Ok((site, timings));
    }
    load_scene_timed(path)
}

/// The scene's standpoint (named, or the first), or one made from `--at`, with any
/// command-line overrides applied.
fn choose_standpoint(site: &Site, args: &RenderArgs) -> pansite::Result<Standpoint> {
    let mut standpoint = match (&args.standpoint, args.at) {
        (Some(name), _) => {
            site.standpoint(name)
                .cloned()
                .ok_or_else(|| Error::UnknownStandpoint {
                    name: name.clone(),
                    available: site
                        .standpoints
                        .iter()
                        .map(|s| s.name.as_str())
                        .collect::<Vec<_>>()
                        .join(", "),
                })?
        }
        (None, Some((x, y))) => {
            Standpoint::from_degrees("here", x, y, DEFAULT_EYE_HEIGHT, 0.0, 0.0, 0.0)
        }
        (None, None) => site
            .default_standpoint()
            .cloned()
            .ok_or(Error::NoStandpoint)?,
    };
    if let (Some((x, y)), Some(_)) = (args.at, &args.standpoint) {
        standpoint.x = x;
        standpoint.y = y;
    }
    if let Some(eye_height) = args.eye_height {
        standpoint.eye_height = eye_height;
    }
    if let Some(heading) = args.heading {
        standpoint.heading = heading.to_radians();
    }
    if let Some(pitch) = args.pitch {
        standpoint.pitch = pitch.to_radians();
    }
    if let Some(roll) = args.roll {
        standpoint.roll = roll.to_radians();
    }
    Ok(standpoint)
}

/// `renders/SCENE-STANDPOINT.png`, with the standpoint's name made safe for a file name.
fn default_output(scene: &Path, standpoint: &Standpoint) -> PathBuf {
    let stem = scene
        .file_stem()
        .map_or("scene".into(), |s| s.to_string_lossy().into_owned());
    let name: String = standpoint
        .name
        .chars()
        .map(|c| {
            if c.is_alphanumeric() || c == '-' || c == '_' {
                c.to_ascii_lowercase()
            } else {
                '-'
            }
        })
        .collect();
    PathBuf::from("renders").join(format!("{stem}-{name}.png"))
}
