//! What several commands share: reading the scene, choosing the standpoint, naming and
//! writing the output files, and the progress line.

use crate::args::{FormatArg, LetteringArg, ModelArgs, OutArgs, ViewArgs};
use anyhow::Context;
use pansite::output::{
    write_atomically, write_pdf, write_png, write_svg_with, Lettering, PngOptions,
};
use pansite::page::Sheet;
use pansite::scene::{
    load_obj_timed, load_open_data, load_scene_timed, parse_scene_timed, DataKind, LoadTimings,
    LocalFrame, Site, Standpoint, DEFAULT_EYE_HEIGHT,
};
use pansite::Error;
use std::io::{IsTerminal, Read, Write};
use std::path::{Path, PathBuf};
use std::time::Instant;

/// Whether a path names standard input or output.
pub fn is_standard_stream(path: &Path) -> bool {
    path == Path::new("-")
}

/// `--time-zone` names the clock of an open-data file given directly; any other scene names
/// its zone itself, so there the option is refused rather than ignored.
pub fn refuse_zone_unless_data(model: &ModelArgs, data_file: bool) -> pansite::Result<()> {
    if model.time_zone.is_some() && !data_file {
        return Err(Error::Setting(
            "--time-zone is for an open-data file given directly (.geojson, .city.json, \
             .jsonl); a scene names its zone in its `location` block (`time_zone`)"
                .to_owned(),
        ));
    }
    Ok(())
}

/// The scene from a RON file, an OBJ model or an open-data file (by its extension) or
/// standard input (`-`). A data file is placed around `--origin-latlon`, else `at_latlon`
/// (the standpoint asked for), else a point of its own, its clock in `--time-zone`; any
/// other scene names its zone itself, so the option is refused there.
pub fn read_site(
    path: &Path,
    model: &ModelArgs,
    at_latlon: Option<(f64, f64)>,
    quiet: bool,
) -> pansite::Result<(Site, LoadTimings)> {
    let data_file = !is_standard_stream(path) && is_data_file(path);
    refuse_zone_unless_data(model, data_file)?;
    if is_standard_stream(path) {
        return scene_from_stdin();
    }
    if data_file {
        let started = Instant::now();
        let origin = model.origin_latlon.or(at_latlon);
        let site = load_open_data(path, origin, model.time_zone.as_deref())?;
        let timings = LoadTimings {
            parse: started.elapsed(),
            ..LoadTimings::default()
        };
        return Ok((site, timings));
    }
    let is_obj = path
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("obj"));
    if is_obj {
        let placement = super::settings::mesh_placement(model);
        let (site, stats, timings) = load_obj_timed(path, &placement)?;
        if stats.dropped_faces > 0 && !quiet {
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

/// Whether a path names an open-data file by its name: `.geojson`, `.city.json`, `.jsonl`
/// (a plain `.json` stays a scene, whose reader explains what a scene looks like).
pub fn is_data_file(path: &Path) -> bool {
    let plain_json = path
        .file_name()
        .map(|n| n.to_string_lossy().to_ascii_lowercase())
        .is_some_and(|n| n.ends_with(".json") && !n.ends_with(".city.json"));
    DataKind::of(path).is_some() && !plain_json
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

/// The scene's standpoint (named, or the default), or one made from `--at`, with any
/// command-line overrides applied.
pub fn choose_view(site: &Site, args: &ViewArgs) -> pansite::Result<Standpoint> {
    let at = match args.at_latlon {
        None => args.at,
        Some((lat, lon)) => {
            let location = site.location.as_ref().ok_or_else(|| {
                Error::Setting(
                    "--at-latlon needs the scene's `location` (where its origin is on the earth)"
                        .to_owned(),
                )
            })?;
            let frame = LocalFrame::new(
                location.latitude_deg,
                location.longitude_deg,
                location.north_deg,
                0.0,
            );
            let (x, y, _) = frame.to_plan(lat, lon);
            Some((x, y))
        }
    };
    let mut standpoint = match (&args.standpoint, at) {
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
    // Moved or made by `--at`: a standpoint with its own `ground` (a balcony, a raised
    // floor) keeps it; any other stands on the scene's ground there (level scenes: 0), as a
    // standpoint written in the scene without a `ground` does.
    if let Some((x, y)) = at {
        standpoint.x = x;
        standpoint.y = y;
        if !standpoint.own_ground {
            standpoint.ground = pansite::scene::ground_height(site, x, y);
        }
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

/// A warning for a standpoint made or moved by `--at` past the edge of the scene's ground,
/// as a standpoint written there gets one (the ground's own check sees only those).
pub fn off_the_ground(site: &Site, standpoint: &Standpoint) -> Option<String> {
    let ground = site.ground.as_ref()?;
    let off = !standpoint.own_ground && ground.height_at(standpoint.x, standpoint.y).is_none();
    off.then(|| {
        format!(
            "the ground does not reach standpoint {:?} at ({:.2}, {:.2}): it stands at height {:.2} there",
            standpoint.name, standpoint.x, standpoint.y, standpoint.ground
        )
    })
}

/// The format asked for, or the one the output's extension names (PNG for standard output
/// and files without an extension).
pub fn output_format(output: &Path, asked: Option<FormatArg>) -> pansite::Result<FormatArg> {
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

/// The extension a format's files take.
pub fn extension(format: Option<FormatArg>) -> &'static str {
    match format {
        None | Some(FormatArg::Png) => "png",
        Some(FormatArg::Svg) => "svg",
        Some(FormatArg::Pdf) => "pdf",
    }
}

/// A file name made from a scene's file name and a word: `renders/STEM-WORD.EXT`, the
/// word made safe for a file name.
pub fn default_output(scene: &Path, word: &str, format: Option<FormatArg>) -> PathBuf {
    let stem = if is_standard_stream(scene) {
        "stdin".to_owned()
    } else {
        scene
            .file_stem()
            .map_or("scene".into(), |s| s.to_string_lossy().into_owned())
    };
    let word: String = word
        .chars()
        .map(|c| {
            if c.is_alphanumeric() || c == '-' || c == '_' {
                c.to_ascii_lowercase()
            } else {
                '-'
            }
        })
        .collect();
    PathBuf::from("renders").join(format!("{stem}-{word}.{}", extension(format)))
}

/// `--lettering text` writes SVG text elements: refused for the other formats, which draw
/// the strokes.
pub fn check_lettering(lettering: LetteringArg, format: FormatArg) -> pansite::Result<()> {
    if lettering == LetteringArg::Text && format != FormatArg::Svg {
        return Err(Error::Setting(
            "--lettering text writes SVG text elements and needs SVG output (.svg or --format svg); PNG and PDF draw the single-stroke letters".into(),
        ));
    }
    Ok(())
}

/// Writes the sheets from `first` on that one file holds: all of them in a PDF, one in a
/// PNG or an SVG.
pub fn write_sheets(
    sheets: &[Sheet],
    format: FormatArg,
    png: &PngOptions,
    lettering: LetteringArg,
    out: &mut impl Write,
    first: usize,
) -> pansite::Result<()> {
    let lettering = match lettering {
        LetteringArg::Strokes => Lettering::Strokes,
        LetteringArg::Text => Lettering::Text,
    };
    match format {
        FormatArg::Png => write_png(&sheets[first].drawing, png, out),
        FormatArg::Svg => write_svg_with(&sheets[first], lettering, out).map_err(Error::Output),
        FormatArg::Pdf => write_pdf(sheets, out),
    }
}

/// The files a render writes, and the first sheet each holds: one file, or for PNG and SVG
/// one per sheet, named by row and column (`plan-r1c2.png`).
pub fn output_paths(
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

/// Creates the `renders` folder a default output name points into.
pub fn create_parent(path: &Path) -> anyhow::Result<()> {
    if let Some(folder) = path.parent().filter(|f| !f.as_os_str().is_empty()) {
        std::fs::create_dir_all(folder)
            .with_context(|| format!("cannot create the folder {}", folder.display()))?;
    }
    Ok(())
}

/// Writes one sheet atomically where `out` says (or `renders/SCENE-KIND.EXT`), or to
/// standard output for `-o -`.
pub fn write_one(sheet: &Sheet, out: &OutArgs, scene: &Path, kind: &str) -> anyhow::Result<String> {
    write_pages(std::slice::from_ref(sheet), 1, out, scene, kind)
}

/// Writes sheets cut from one layout `columns` across where `out` says (or
/// `renders/SCENE-KIND.EXT`): one PDF of them all, or for PNG and SVG one file a sheet
/// named by row and column, each atomically; or to standard output for `-o -` (one sheet,
/// or a PDF). Returns what was written, for the summary.
pub fn write_pages(
    sheets: &[Sheet],
    columns: u32,
    out: &OutArgs,
    scene: &Path,
    kind: &str,
) -> anyhow::Result<String> {
    let path = match &out.output {
        Some(path) => path.clone(),
        None => {
            let path = default_output(scene, kind, out.format);
            create_parent(&path)?;
            path
        }
    };
    let format = output_format(&path, out.format)?;
    check_lettering(out.lettering, format)?;
    let png = PngOptions {
        colour: false,
        dpi: Some(out.dpi),
        panorama: None,
    };
    if is_standard_stream(&path) {
        if sheets.len() > 1 && format != FormatArg::Pdf {
            return Err(Error::Setting(
                "several sheets cannot go to standard output as one PNG or SVG; give a file name, or use PDF".into(),
            )
            .into());
        }
        let mut bytes = Vec::new();
        write_sheets(sheets, format, &png, out.lettering, &mut bytes, 0)?;
        write_stdout(&bytes)?;
        return Ok("standard output".to_owned());
    }
    let mut written = Vec::new();
    for (path, first) in output_paths(&path, format, sheets.len(), columns) {
        write_atomically(&path, |file| {
            write_sheets(sheets, format, &png, out.lettering, file, first)
        })
        .with_context(|| format!("writing {}", path.display()))?;
        written.push(path.display().to_string());
    }
    Ok(written.join(", "))
}

/// Sends bytes to standard output (which cannot be replaced atomically: callers encode in
/// memory first). A closed pipe is not an error the user needs to see: `main` ends quietly.
pub fn write_stdout(bytes: &[u8]) -> anyhow::Result<()> {
    let mut out = std::io::stdout().lock();
    out.write_all(bytes)
        .and_then(|()| out.flush())
        .context("writing to standard output")
}

/// Text to standard output, or atomically to a file.
pub fn write_text(text: &str, output: Option<&Path>) -> anyhow::Result<()> {
    match output {
        None => write_stdout(text.as_bytes()),
        Some(path) if is_standard_stream(path) => write_stdout(text.as_bytes()),
        Some(path) => {
            write_atomically(path, |file| {
                file.write_all(text.as_bytes())
                    .map_err(|source| Error::Write {
                        path: path.to_owned(),
                        source,
                    })
            })
            .with_context(|| format!("writing {}", path.display()))?;
            Ok(())
        }
    }
}

/// A progress line on standard error, only when that is a terminal and not `--quiet`.
pub struct Progress {
    shown: bool,
    what: &'static str,
    started: Instant,
}

impl Progress {
    pub fn new(what: &'static str, quiet: bool) -> Progress {
        Progress {
            shown: !quiet && std::io::stderr().is_terminal(),
            what,
            started: Instant::now(),
        }
    }

    pub fn update(&self, done: usize, total: usize) {
        if !self.shown || total == 0 {
            return;
        }
        const BAR: usize = 30;
        let filled = BAR * done / total;
        let mut err = std::io::stderr().lock();
        let _ = write!(
            err,
            "\rpansite: [{}{}] {done}/{total} {} {:.1} s",
            "#".repeat(filled),
            ".".repeat(BAR - filled),
            self.what,
            self.started.elapsed().as_secs_f64()
        );
        if done == total {
            let _ = writeln!(err);
        }
        let _ = err.flush();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn default_names_are_safe_file_names() {
        assert_eq!(
            default_output(Path::new("scenes/a b.ron"), "Lane Corner!", None),
            PathBuf::from("renders/a b-lane-corner-.png")
        );
        assert_eq!(
            default_output(Path::new("-"), "plan", Some(FormatArg::Svg)),
            PathBuf::from("renders/stdin-plan.svg")
        );
    }

    #[test]
    fn tiled_outputs_are_named_by_row_and_column() {
        let paths = output_paths(Path::new("out/m.png"), FormatArg::Png, 4, 2);
        let names: Vec<_> = paths
            .iter()
            .map(|(p, k)| (p.display().to_string(), *k))
            .collect();
        assert_eq!(
            names,
            [
                ("out/m-r1c1.png".to_owned(), 0),
                ("out/m-r1c2.png".to_owned(), 1),
                ("out/m-r2c1.png".to_owned(), 2),
                ("out/m-r2c2.png".to_owned(), 3)
            ]
        );
        assert_eq!(
            output_paths(Path::new("m.pdf"), FormatArg::Pdf, 4, 2).len(),
            1
        );
    }

    #[test]
    fn formats_follow_the_extension() {
        assert_eq!(
            output_format(Path::new("a.SVG"), None).unwrap(),
            FormatArg::Svg
        );
        assert_eq!(output_format(Path::new("-"), None).unwrap(), FormatArg::Png);
        assert!(output_format(Path::new("a.jpg"), None).is_err());
        assert_eq!(
            output_format(Path::new("a.jpg"), Some(FormatArg::Pdf)).unwrap(),
            FormatArg::Pdf
        );
    }
}
