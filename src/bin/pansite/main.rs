//! The `pansite` command: parse, call the library, report.

mod aids;
mod args;
mod check;
mod compose;
mod parse;
mod render_args;
mod view_args;

use anyhow::Context;
use args::{Cli, Command, FormatArg, NewArgs, RenderArgs, UnitArg, UpArg};
use clap::Parser;
use pansite::output::{write_atomically, write_pdf, write_png, write_svg, Panorama, PngOptions};
use pansite::page::{PageSettings, Paper, Sheet, Tiling};
use pansite::render::{draw_sheets, title_lines, today, RenderSettings};
use pansite::scene::{
    load_obj_timed, load_scene, load_scene_timed, load_style_sheet, parse_scene_timed,
    solids_enclosing, HiddenEdges, LoadTimings, MeshPlacement, Site, Standpoint, Unit, UpAxis,
    DEFAULT_EYE_HEIGHT, STARTER_SCENE,
};
use pansite::Error;
use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::time::{Duration, Instant};
use view_args::ViewArgs;

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
        Command::Angles(args) => angles(&args),
        Command::Sheet(args) => compose::sheet(&args),
        Command::Plan(args) => compose::plan(&args),
        Command::Preview(args) => compose::preview_command(&args),
        Command::Watch(args) => compose::watch(&args),
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
    let mut written: Vec<PathBuf> = Vec::new();
    let (site, load) = read_site(args)?;
    let standpoint = choose_standpoint(&site, args)?;
    let settings = RenderSettings {
        width: args.size.0,
        height: args.size.1,
        tolerance_px: args.tolerance,
        line_weight_px: args.line_weight,
        overlays: !args.bare,
        hidden: args.hidden.map(HiddenEdges::from),
        dpi: args.dpi,
        base_styles: None,
        styles: args.style.as_deref().map(load_style_sheet).transpose()?,
        weight_by_distance: args.weigh_by_distance,
        aids: args.aids.settings(),
        time_limit: Some(Duration::from_secs_f64(args.time_limit)),
    };
    settings.validate()?;
    let output = args
        .output
        .clone()
        .unwrap_or_else(|| default_output(&args.scene, &standpoint, args.format));
    let format = output_format(&output, args.format)?;
    let page = page_settings(args, &site, &standpoint)?;
    let (sheets, render) = draw_sheets(&site, &standpoint, &settings, page.as_ref(), args.dpi)
        .with_context(|| format!("rendering {}", output.display()))?;
    let started = Instant::now();
    let png = PngOptions {
        colour: args.colour,
        dpi: Some(args.dpi),
        // A full-sphere image edge to edge is a panorama viewers can open.
        panorama: page.is_none().then(|| Panorama {
            width: settings.width,
            height: settings.height,
            heading_deg: standpoint.heading.to_degrees(),
            pitch_deg: standpoint.pitch.to_degrees(),
            roll_deg: standpoint.roll.to_degrees(),
        }),
    };
    let columns = page.as_ref().and_then(|p| p.tiles).map_or(1, |t| t.columns);
    if output == Path::new("-") {
        if sheets.len() > 1 && format != FormatArg::Pdf {
            return Err(Error::Setting(
                "several sheets cannot go to standard output as one PNG or SVG; give a file name, or use PDF".into(),
            )
            .into());
        }
        // Standard output cannot be replaced atomically: encode in memory, then send it.
        let mut bytes = Vec::new();
        write_sheets(&sheets, format, &png, &mut bytes, 0)?;
        std::io::stdout()
            .lock()
            .write_all(&bytes)
            .context("writing to standard output")?;
    } else {
        if args.output.is_none() {
            if let Some(folder) = output.parent() {
                std::fs::create_dir_all(folder)
                    .with_context(|| format!("cannot create the folder {}", folder.display()))?;
            }
        }
        for (path, first) in output_paths(&output, format, sheets.len(), columns) {
            write_atomically(&path, |file| {
                write_sheets(&sheets, format, &png, file, first)
            })
            .with_context(|| format!("rendering {}", path.display()))?;
            written.push(path);
        }
    }
    let write_time = started.elapsed();
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
        let names: Vec<String> = if written.is_empty() {
            vec!["standard output".to_owned()]
        } else {
            written.iter().map(|p| p.display().to_string()).collect()
        };
        let size = match &page {
            Some(page) => format!(
                "{:.1} x {:.1} mm at {} dpi, {} sheet{}",
                page.paper.width_mm,
                page.paper.height_mm,
                page.dpi,
                sheets.len(),
                if sheets.len() == 1 { "" } else { "s" }
            ),
            None => format!("{}x{} px", render.drawing.width, render.drawing.height),
        };
        eprintln!(
            "pansite: wrote {} ({size}, standpoint \"{}\", {} edges as {} lines, {} skipped)",
            names.join(", "),
            standpoint.name,
            site.edges.len(),
            lines,
            render.skipped.len()
        );
    }
    if args.timings {
        let timings = pansite::render::Timings {
            raster_and_encode: Some(write_time),
            ..render.timings.clone()
        };
        print_timings(&load, &timings);
    }
    Ok(())
}

/// The stages' times on standard error. Visibility is found edge by edge in the pass that
/// flattens, and the encoder compresses early bands while the other cores rasterise later
/// ones, so those pairs are given together with the part that can be told apart.
fn print_timings(load: &LoadTimings, t: &pansite::render::Timings) {
    let ms = |d: Duration| d.as_secs_f64() * 1e3;
    let both = t.raster_and_encode.unwrap_or_default();
    // The writing thread's share is known where the grey PNG is streamed by the library;
    // pages and other formats are timed as one.
    let writing = match t.encode {
        Some(encode) => format!(
            "raster + encode {:.1} ms overlapped (encode {:.1} ms on the writing thread, raster {:.1} ms besides)",
            ms(both),
            ms(encode),
            ms(both.saturating_sub(encode))
        ),
        None => format!("raster + encode + write {:.1} ms overlapped", ms(both)),
    };
    eprintln!(
        "pansite: timings: load {:.1} ms (read and parse {:.1}, expand {:.1}); \
         visibility + flatten {:.1} ms (of which the hierarchy of faces {:.1}; edges are seen \
         and flattened in one pass); {writing}",
        ms(load.parse + load.expand),
        ms(load.parse),
        ms(load.expand),
        ms(t.flatten),
        ms(t.hierarchy),
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

/// A RON scene read from standard input, and how long reading it took.
fn scene_from_stdin() -> pansite::Result<(Site, LoadTimings)> {
    let mut bytes = Vec::new();
    std::io::stdin()
        .read_to_end(&mut bytes)
        .map_err(|source| Error::Read {
            path: PathBuf::from("<stdin>"),
            source,
        })?;
    parse_scene_timed(&bytes, Path::new("<stdin>"), "stdin")
}

/// The scene from a RON file, an OBJ model (by its extension) or standard input.
fn read_site(args: &RenderArgs) -> pansite::Result<(Site, LoadTimings)> {
    let path = args.scene.as_path();
    if path == Path::new("-") {
        return scene_from_stdin();
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
    choose_view(site, &args.view)
}

fn choose_view(site: &Site, args: &ViewArgs) -> pansite::Result<Standpoint> {
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

/// The format asked for, or the one the output's extension names (PNG for standard output
/// and files without a known extension).
fn output_format(output: &Path, asked: Option<FormatArg>) -> pansite::Result<FormatArg> {
    if let Some(format) = asked {
        return Ok(format);
    }
    let extension = output
        .extension()
        .map(|e| e.to_string_lossy().to_lowercase());
    match extension.as_deref() {
        None | Some("png") => Ok(FormatArg::Png),
        Some("svg") => Ok(FormatArg::Svg),
        Some("pdf") => Ok(FormatArg::Pdf),
        Some(other) => Err(Error::Setting(format!(
            "cannot tell the format from the extension .{other}: use .png, .svg or .pdf, or give --format"
        ))),
    }
}

/// The page layout the command line asks for, if any.
fn page_settings(
    args: &RenderArgs,
    site: &Site,
    standpoint: &Standpoint,
) -> pansite::Result<Option<PageSettings>> {
    let Some(name) = &args.page else {
        for (flag, given) in [
            ("--band", args.band.is_some()),
            ("--tiles", args.tiles.is_some()),
            ("--portrait", args.portrait),
        ] {
            if given {
                return Err(Error::Setting(format!("{flag} needs a page: give --page")));
            }
        }
        return Ok(None);
    };
    let paper = Paper::parse(name).map_err(Error::Setting)?;
    Ok(Some(PageSettings {
        paper: if args.portrait {
            paper.portrait()
        } else {
            paper.landscape()
        },
        margin_mm: args.margin,
        dpi: args.dpi,
        band_deg: args.band.unwrap_or((-90.0, 90.0)),
        title: (!args.no_title).then(|| title_lines(site, standpoint, today())),
        tiles: args.tiles.map(|(columns, rows)| Tiling {
            columns,
            rows,
            overlap_mm: args.overlap,
        }),
    }))
}

/// Writes the sheets from `first` on that one file holds: all of them in a PDF, one in a
/// PNG or an SVG.
fn write_sheets(
    sheets: &[Sheet],
    format: FormatArg,
    png: &PngOptions,
    out: &mut impl Write,
    first: usize,
) -> pansite::Result<()> {
    match format {
        FormatArg::Png => write_png(&sheets[first].drawing, png, out),
        FormatArg::Svg => write_svg(&sheets[first], out).map_err(Error::Output),
        FormatArg::Pdf => write_pdf(sheets, out),
    }
}

/// The files a render writes, and the first sheet each holds: one file, or for PNG and SVG
/// one per sheet, named by row and column (`plan-r1c2.png`).
fn output_paths(
    output: &Path,
    format: FormatArg,
    sheets: usize,
    columns: u32,
) -> Vec<(PathBuf, usize)> {
    if sheets <= 1 || format == FormatArg::Pdf {
        return vec![(output.to_owned(), 0)];
    }
    let stem = output
        .file_stem()
        .map_or("sheet".into(), |s| s.to_string_lossy().into_owned());
    let extension = output
        .extension()
        .map_or(String::new(), |e| format!(".{}", e.to_string_lossy()));
    (0..sheets)
        .map(|k| {
            let (row, column) = (k as u32 / columns + 1, k as u32 % columns + 1);
            (
                output.with_file_name(format!("{stem}-r{row}c{column}{extension}")),
                k,
            )
        })
        .collect()
}

/// The table of angles, written to standard output or atomically to a file.
fn angles(args: &aids::AnglesArgs) -> anyhow::Result<()> {
    use pansite::aids::table::{angle_table, to_csv, to_json, to_text, PagePlacement, TableChoice};
    let site = if args.scene == Path::new("-") {
        scene_from_stdin()?.0
    } else {
        load_scene(&args.scene)?
    };
    let standpoint = choose_view(&site, &args.view)?;
    let settings = RenderSettings {
        width: args.size.0,
        height: args.size.1,
        ..RenderSettings::default()
    };
    settings.validate()?;
    let map = pansite::plane::Equirect::from_size_px(args.size.0 as f64, args.size.1 as f64);
    let choice = TableChoice {
        item: args.item.clone(),
        points_only: args.points,
    };
    let page = args.page_width_mm.map(PagePlacement::panorama_width);
    let rows = angle_table(&site, &standpoint, &map, page, &choice);
    if let Some(item) = &args.item {
        if rows.is_empty() {
            return Err(Error::Setting(format!(
                "no item labelled \"{item}\" has a point or a corner"
            ))
            .into());
        }
    }
    let text = match args.format {
        aids::TableFormat::Text => to_text(&rows),
        aids::TableFormat::Csv => to_csv(&rows),
        aids::TableFormat::Json => to_json(&rows, &standpoint, &map),
    };
    match &args.output {
        None => std::io::stdout()
            .lock()
            .write_all(text.as_bytes())
            .context("writing to standard output")?,
        Some(path) => {
            pansite::output::write_atomically(path, |file| {
                file.write_all(text.as_bytes())
                    .map_err(|source| Error::Write {
                        path: path.clone(),
                        source,
                    })
            })
            .with_context(|| format!("writing {}", path.display()))?;
        }
    }
    Ok(())
}

/// `renders/SCENE-STANDPOINT.png` (or `.svg`, `.pdf`), with the standpoint's name made
/// safe for a file name.
fn default_output(scene: &Path, standpoint: &Standpoint, format: Option<FormatArg>) -> PathBuf {
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
    let extension = match format {
        None | Some(FormatArg::Png) => "png",
        Some(FormatArg::Svg) => "svg",
        Some(FormatArg::Pdf) => "pdf",
    };
    PathBuf::from("renders").join(format!("{stem}-{name}.{extension}"))
}
