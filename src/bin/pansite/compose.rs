//! The composition commands: `sheet` (a contact sheet of standpoints), `plan` (the site
//! plan with the standpoints marked), `preview` (an ordinary perspective view) and
//! `watch` (render again whenever the scene or style file is saved).

use super::parse::{parse_finite, parse_pair, parse_size};
use super::render_args::{FormatArg, HiddenArg, RenderArgs};
use super::view_args::ViewArgs;
use super::{choose_view, output_format, read_site, write_sheets};
use anyhow::Context;
use clap::Args;
use pansite::compose::{
    beside, contact_sheet, plan_map, preview, sweep_grid, sweep_headings, sweep_path,
    ContactSettings, PlanSettings, PreviewSettings,
};
use pansite::output::{write_atomically, PngOptions};
use pansite::page::{Paper, Sheet};
use pansite::render::{draw_sheets, RenderSettings};
use pansite::scene::{load_scene, HiddenEdges, Site, Standpoint};
use pansite::Error;
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant, SystemTime};

/// Where a composition command writes.
#[derive(Debug, Args)]
pub struct OutArgs {
    /// Output file: .png, .svg or .pdf [default: renders/SCENE-KIND.png].
    #[arg(short, long, value_name = "FILE")]
    pub output: Option<PathBuf>,
    /// Output format, instead of the output file's extension.
    #[arg(long, value_enum, value_name = "FORMAT")]
    pub format: Option<FormatArg>,
    /// Pixels per inch on paper (the size of a pixel in SVG and PDF).
    #[arg(long, value_name = "DPI", default_value_t = 150.0, value_parser = parse_finite)]
    pub dpi: f64,
    /// Print nothing but errors (and no progress bar).
    #[arg(short, long)]
    pub quiet: bool,
}

#[derive(Debug, Args)]
pub struct SheetArgs {
    /// The scene file (RON).
    pub scene: PathBuf,
    #[command(flatten)]
    pub out: OutArgs,
    #[command(flatten)]
    pub view: ViewArgs,
    /// Sweep the headings FROM:TO:STEP degrees from the standpoint (e.g. 0:345:15).
    #[arg(long, value_name = "FROM:TO:STEP", value_parser = parse_triple, allow_hyphen_values = true, group = "sweep")]
    pub headings: Option<(f64, f64, f64)>,
    /// Sweep along a path of plan positions X,Y:X,Y:..., --count standpoints facing along it.
    #[arg(long, value_name = "X,Y:X,Y:...", value_parser = parse_path, allow_hyphen_values = true, group = "sweep")]
    pub path: Option<PathSweep>,
    /// Sweep a grid of CxR positions over the rectangle X0,Y0:X1,Y1:CxR.
    #[arg(long, value_name = "X0,Y0:X1,Y1:CxR", value_parser = parse_grid, allow_hyphen_values = true, group = "sweep")]
    pub grid: Option<GridSweep>,
    /// How many standpoints along --path.
    #[arg(long, value_name = "N", default_value_t = 8)]
    pub count: usize,
    /// Size of each thumbnail, WIDTHxHEIGHT pixels.
    #[arg(long, value_name = "WxH", default_value = "480x240", value_parser = parse_size)]
    pub thumb: (u32, u32),
    /// Thumbnails across [default: a near-square sheet].
    #[arg(long, value_name = "N")]
    pub columns: Option<u32>,
    /// The wireframes alone, without grid and horizon.
    #[arg(long)]
    pub bare: bool,
    /// How edges hidden behind faces are drawn [default: the scene's choice, or faint];
    /// solid is about ten times quicker, for a first look at many standpoints.
    #[arg(long, value_enum, value_name = "HOW")]
    pub hidden: Option<HiddenArg>,
}

#[derive(Debug, Args)]
pub struct PlanArgs {
    /// The scene file (RON).
    pub scene: PathBuf,
    #[command(flatten)]
    pub out: OutArgs,
    /// Size of the plan, WIDTHxHEIGHT pixels (with --beside: its width; the height is the
    /// panorama's).
    #[arg(long, value_name = "WxH", default_value = "1600x1200", value_parser = parse_size)]
    pub size: (u32, u32),
    /// Lay the plan out on paper (a4, a3, letter, 420x297mm ...), filling the printable area.
    #[arg(long, value_name = "PAPER", conflicts_with = "beside")]
    pub page: Option<String>,
    /// Turn the paper upright (the default is landscape).
    #[arg(long, requires = "page")]
    pub portrait: bool,
    /// Margin round the sheet, millimetres.
    #[arg(long, value_name = "MM", default_value_t = 10.0, value_parser = parse_finite)]
    pub margin: f64,
    /// Print the panorama of the standpoint (-s) with the plan beside it on one sheet.
    #[arg(long)]
    pub beside: bool,
    /// Size of the panorama with --beside.
    #[arg(long, value_name = "WxH", default_value = "2048x1024", value_parser = parse_size)]
    pub panorama_size: (u32, u32),
    #[command(flatten)]
    pub view: ViewArgs,
}

#[derive(Debug, Args)]
pub struct PreviewArgs {
    /// The scene file (RON).
    pub scene: PathBuf,
    #[command(flatten)]
    pub out: OutArgs,
    #[command(flatten)]
    pub view: ViewArgs,
    /// Horizontal field of view, degrees.
    #[arg(long, value_name = "DEG", default_value_t = 90.0, value_parser = parse_finite)]
    pub fov: f64,
    /// Image size, WIDTHxHEIGHT pixels.
    #[arg(long, value_name = "WxH", default_value = "1280x800", value_parser = parse_size)]
    pub size: (u32, u32),
    /// How edges hidden behind faces are drawn [default: the scene's choice, or faint].
    #[arg(long, value_enum, value_name = "HOW")]
    pub hidden: Option<HiddenArg>,
}

#[derive(Debug, Args)]
pub struct WatchArgs {
    #[command(flatten)]
    pub render: RenderArgs,
    /// How often to look at the files, milliseconds.
    #[arg(long, value_name = "MS", default_value_t = 200)]
    pub interval: u64,
}

/// A progress line on standard error, only when that is a terminal and not `--quiet`.
struct Progress {
    shown: bool,
    what: &'static str,
    started: Instant,
}

impl Progress {
    fn new(what: &'static str, quiet: bool) -> Progress {
        Progress {
            shown: !quiet && std::io::stderr().is_terminal(),
            what,
            started: Instant::now(),
        }
    }

    fn update(&self, done: usize, total: usize) {
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

/// `pansite sheet`.
pub fn sheet(args: &SheetArgs) -> anyhow::Result<()> {
    let site = load_scene(&args.scene)?;
    let base = choose_view(&site, &args.view)?;
    let standpoints: Vec<Standpoint> = if let Some((from, to, step)) = args.headings {
        sweep_headings(&base, from, to, step)?
    } else if let Some(PathSweep(path)) = &args.path {
        sweep_path(&base, path, args.count)?
    } else if let Some((a, b, (columns, rows))) = args.grid {
        sweep_grid(&base, a, b, columns, rows)?
    } else {
        // The scene's standpoints, with any overrides the command line gives.
        site.standpoints
            .iter()
            .map(|s| {
                choose_view(
                    &site,
                    &ViewArgs {
                        standpoint: Some(s.name.clone()),
                        at: None,
                        ..args.view.clone()
                    },
                )
            })
            .collect::<pansite::Result<_>>()?
    };
    if standpoints.is_empty() {
        return Err(Error::NoStandpoint.into());
    }
    let settings = ContactSettings {
        thumbnail: RenderSettings {
            width: args.thumb.0,
            height: args.thumb.1,
            line_weight_px: 1.0,
            overlays: !args.bare,
            hidden: args.hidden.map(HiddenEdges::from),
            dpi: args.out.dpi,
            ..RenderSettings::default()
        },
        columns: args.columns,
        dpi: args.out.dpi,
    };
    let progress = Progress::new("thumbnails", args.out.quiet);
    let started = Instant::now();
    let sheet = contact_sheet(&site, &standpoints, &settings, &|done, total| {
        progress.update(done, total)
    })?;
    let path = write_one(&sheet, &args.out, &args.scene, "sheet")?;
    if !args.out.quiet {
        eprintln!(
            "pansite: wrote {} ({} standpoints, {}x{} px, {:.2} s)",
            path.display(),
            standpoints.len(),
            sheet.drawing.width,
            sheet.drawing.height,
            started.elapsed().as_secs_f64()
        );
    }
    Ok(())
}

/// `pansite plan`.
pub fn plan(args: &PlanArgs) -> anyhow::Result<()> {
    let site = load_scene(&args.scene)?;
    let mut settings = PlanSettings {
        width: args.size.0,
        height: args.size.1,
        dpi: args.out.dpi,
        ..PlanSettings::default()
    };
    let sheet = if args.beside {
        let standpoint = choose_view(&site, &args.view)?;
        let render = RenderSettings {
            width: args.panorama_size.0,
            height: args.panorama_size.1,
            dpi: args.out.dpi,
            ..RenderSettings::default()
        };
        let (sheets, _) = draw_sheets(&site, &standpoint, &render, None, args.out.dpi)?;
        settings.height = args.panorama_size.1;
        let plan = plan_map(&site, std::slice::from_ref(&standpoint), &settings)?;
        let gap_mm = 10.0;
        beside(&sheets[0], &plan.sheet(), gap_mm)?
    } else if let Some(name) = &args.page {
        let paper = Paper::parse(name).map_err(Error::Setting)?;
        let paper = if args.portrait {
            paper.portrait()
        } else {
            paper.landscape()
        };
        if !(args.margin >= 0.0 && 2.0 * args.margin < paper.width_mm.min(paper.height_mm)) {
            return Err(Error::Setting(format!(
                "a margin of {} mm does not leave room on the paper",
                args.margin
            ))
            .into());
        }
        let settings = PlanSettings::for_paper(&paper, args.margin, args.out.dpi);
        plan_map(&site, &site.standpoints, &settings)?.on_paper(&paper, args.margin)
    } else {
        plan_map(&site, &site.standpoints, &settings)?.sheet()
    };
    let path = write_one(&sheet, &args.out, &args.scene, "plan")?;
    if !args.out.quiet {
        eprintln!(
            "pansite: wrote {} ({:.0} x {:.0} mm)",
            path.display(),
            sheet.width_mm,
            sheet.height_mm
        );
    }
    Ok(())
}

/// `pansite preview`.
pub fn preview_command(args: &PreviewArgs) -> anyhow::Result<()> {
    let site = load_scene(&args.scene)?;
    let standpoint = choose_view(&site, &args.view)?;
    let settings = PreviewSettings {
        width: args.size.0,
        height: args.size.1,
        fov_deg: args.fov,
        hidden: args.hidden.map(HiddenEdges::from),
        ..PreviewSettings::default()
    };
    let drawing = preview(&site, &standpoint, &settings)?;
    let sheet = Sheet::full_bleed(drawing, args.out.dpi);
    let path = write_one(&sheet, &args.out, &args.scene, "preview")?;
    if !args.out.quiet {
        eprintln!(
            "pansite: wrote {} (standpoint \"{}\", heading {:.1}\u{b0}, pitch {:.1}\u{b0}, {:.0}\u{b0} across)",
            path.display(),
            standpoint.name,
            standpoint.heading.to_degrees().rem_euclid(360.0),
            standpoint.pitch.to_degrees(),
            args.fov
        );
    }
    Ok(())
}

/// Writes one sheet atomically where `out` says (or `renders/SCENE-KIND.EXT`).
fn write_one(sheet: &Sheet, out: &OutArgs, scene: &Path, kind: &str) -> anyhow::Result<PathBuf> {
    let path = match &out.output {
        Some(path) => path.clone(),
        None => {
            let stem = scene
                .file_stem()
                .map_or("scene".into(), |s| s.to_string_lossy().into_owned());
            let extension = match out.format {
                None | Some(FormatArg::Png) => "png",
                Some(FormatArg::Svg) => "svg",
                Some(FormatArg::Pdf) => "pdf",
            };
            let path = PathBuf::from("renders").join(format!("{stem}-{kind}.{extension}"));
            std::fs::create_dir_all("renders").context("cannot create the folder renders")?;
            path
        }
    };
    let format = output_format(&path, out.format)?;
    let png = PngOptions {
        colour: false,
        dpi: Some(out.dpi),
        panorama: None,
    };
    write_atomically(&path, |file| {
        write_sheets(std::slice::from_ref(sheet), format, &png, file, 0)
    })
    .with_context(|| format!("writing {}", path.display()))?;
    Ok(path)
}

/// A file's state as polling sees it: modified time and length (both, because two saves
/// within the file system's clock step keep the time).
type Stamp = Option<(SystemTime, u64)>;

fn stamp(path: &Path) -> Stamp {
    let meta = std::fs::metadata(path).ok()?;
    Some((meta.modified().ok()?, meta.len()))
}

/// What a scene holds, to say what a save changed.
#[derive(Clone, Copy, Debug, PartialEq)]
struct Summary {
    standpoints: usize,
    items: usize,
    edges: usize,
}

impl Summary {
    fn of(site: &Site) -> Summary {
        Summary {
            standpoints: site.standpoints.len(),
            items: site.items.len(),
            edges: site.edges.len(),
        }
    }

    fn changes(before: Option<Summary>, after: Summary) -> String {
        let Some(before) = before else {
            return format!(
                "{} standpoints, {} items, {} edges",
                after.standpoints, after.items, after.edges
            );
        };
        let mut parts = Vec::new();
        for (what, a, b) in [
            ("standpoints", before.standpoints, after.standpoints),
            ("items", before.items, after.items),
            ("edges", before.edges, after.edges),
        ] {
            if a != b {
                parts.push(format!("{what} {a} -> {b}"));
            }
        }
        if parts.is_empty() {
            "same counts of standpoints, items and edges".to_owned()
        } else {
            parts.join(", ")
        }
    }
}

/// `pansite watch`: renders, then renders again each time the scene or the style file
/// changes, until stopped. A file with an error is reported and nothing is written, so
/// the last good output stays.
pub fn watch(args: &WatchArgs) -> anyhow::Result<()> {
    let render_args = &args.render;
    if render_args.scene == Path::new("-") {
        return Err(Error::Setting("watch needs a scene file, not standard input".into()).into());
    }
    let mut files = vec![render_args.scene.clone()];
    files.extend(render_args.style.clone());
    let interval = Duration::from_millis(args.interval.clamp(10, 60_000));
    let mut last: Option<Summary> = None;
    let mut stamps: Vec<Stamp> = files.iter().map(|f| stamp(f)).collect();
    let mut changed: Vec<String> = Vec::new();
    eprintln!(
        "pansite: watching {} (every {} ms; stop with Ctrl-C)",
        files
            .iter()
            .map(|f| f.display().to_string())
            .collect::<Vec<_>>()
            .join(" and "),
        interval.as_millis()
    );
    loop {
        let started = Instant::now();
        let outcome = read_site(render_args)
            .map_err(anyhow::Error::from)
            .and_then(|site| {
                let summary = Summary::of(&site.0);
                super::render(render_args).map(|()| summary)
            });
        let what = if changed.is_empty() {
            "first render".to_owned()
        } else {
            format!("{} changed", changed.join(" and "))
        };
        match outcome {
            Ok(summary) => {
                eprintln!(
                    "pansite: {what}: {}; rendered in {:.0} ms",
                    Summary::changes(last, summary),
                    started.elapsed().as_secs_f64() * 1e3
                );
                last = Some(summary);
            }
            Err(error) => {
                eprintln!("pansite: error: {error:#}");
                eprintln!("pansite: {what}: not rendered; the last good output is kept");
            }
        }
        // Wait for a change.
        loop {
            std::thread::sleep(interval);
            let now: Vec<Stamp> = files.iter().map(|f| stamp(f)).collect();
            if now != stamps {
                changed = files
                    .iter()
                    .zip(now.iter().zip(&stamps))
                    .filter(|(_, (a, b))| a != b)
                    .map(|(f, _)| f.display().to_string())
                    .collect();
                stamps = now;
                break;
            }
        }
    }
}

fn parse_triple(text: &str) -> Result<(f64, f64, f64), String> {
    let parts: Vec<&str> = text.split(':').collect();
    match parts[..] {
        [a, b, c] => Ok((parse_finite(a)?, parse_finite(b)?, parse_finite(c)?)),
        _ => Err(format!("expected FROM:TO:STEP, found \"{text}\"")),
    }
}

/// The plan positions of a path sweep (a type of its own: clap reads a bare `Vec` as a
/// repeated option).
#[derive(Clone, Debug, PartialEq)]
pub struct PathSweep(pub Vec<(f64, f64)>);

fn parse_path(text: &str) -> Result<PathSweep, String> {
    let points = text
        .split(':')
        .map(parse_pair)
        .collect::<Result<Vec<_>, _>>()?;
    if points.len() < 2 {
        return Err(format!(
            "expected at least two points X,Y:X,Y, found \"{text}\""
        ));
    }
    Ok(PathSweep(points))
}

/// A grid sweep: two opposite corners and the columns and rows.
pub type GridSweep = ((f64, f64), (f64, f64), (u32, u32));

fn parse_grid(text: &str) -> Result<GridSweep, String> {
    let parts: Vec<&str> = text.split(':').collect();
    match parts[..] {
        [a, b, counts] => Ok((parse_pair(a)?, parse_pair(b)?, parse_size(counts)?)),
        _ => Err(format!("expected X0,Y0:X1,Y1:CxR, found \"{text}\"")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn summaries_say_what_changed() {
        let a = Summary {
            standpoints: 2,
            items: 4,
            edges: 60,
        };
        assert_eq!(
            Summary::changes(None, a),
            "2 standpoints, 4 items, 60 edges"
        );
        let b = Summary {
            items: 5,
            edges: 61,
            ..a
        };
        assert_eq!(Summary::changes(Some(a), b), "items 4 -> 5, edges 60 -> 61");
        assert_eq!(
            Summary::changes(Some(a), a),
            "same counts of standpoints, items and edges"
        );
    }

    #[test]
    fn sweep_values_parse() {
        assert_eq!(parse_triple("0:345:15"), Ok((0.0, 345.0, 15.0)));
        assert_eq!(
            parse_path("0,-1:2,3").unwrap(),
            PathSweep(vec![(0.0, -1.0), (2.0, 3.0)])
        );
        assert_eq!(
            parse_grid("-5,-5:5,5:3x2"),
            Ok(((-5.0, -5.0), (5.0, 5.0), (3, 2)))
        );
        assert!(parse_triple("0:345").is_err());
        assert!(parse_path("0,0").is_err());
        assert!(parse_grid("0,0:1,1").is_err());
    }
}
