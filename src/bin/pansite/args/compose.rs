//! The options of the composition commands: `sheet`, `plan`, `preview` and `watch`.

use super::render::{FormatArg, HiddenArg, LetteringArg, ModelArgs, RenderArgs};
use super::values::{
    parse_finite, parse_grid, parse_non_negative, parse_path, parse_scale, parse_size, parse_tiles,
    parse_triple, GridSweep, PathSweep,
};
use super::view::ViewArgs;
use clap::Args;
use std::path::PathBuf;

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
    /// How labels' words are written in SVG: our single-stroke letters, or SVG text
    /// elements a vector editor can edit (in its sans-serif font).
    #[arg(long, value_enum, value_name = "HOW", default_value = "strokes")]
    pub lettering: LetteringArg,
}

#[derive(Debug, Args)]
pub struct SheetArgs {
    /// The scene file (RON), a model (Wavefront .obj), or - for a RON scene on standard input.
    pub scene: PathBuf,
    #[command(flatten)]
    pub model: ModelArgs,
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

    /// Sweep local times of day on the --date: FROM,TO,MINUTES (08:00,18:00,60).
    #[arg(long, value_name = "FROM,TO,MINUTES", group = "sweep")]
    pub times: Option<String>,

    #[command(flatten)]
    pub sun: super::SunArgs,
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
    /// Fit the sheet to paper (a4, a3, letter, 420x297mm ...): the thumbnails are drawn as
    /// large as the printable area allows (--thumb is then ignored).
    #[arg(long, value_name = "PAPER")]
    pub page: Option<String>,
    /// Turn the paper upright (the default is landscape).
    #[arg(long, requires = "page")]
    pub portrait: bool,
    /// Margin round the sheet, millimetres.
    #[arg(long, value_name = "MM", default_value_t = 10.0, value_parser = parse_finite)]
    pub margin: f64,
    #[command(flatten)]
    pub tiling: TileArgs,
    /// How edges hidden behind faces are drawn [default: the scene's choice, or faint];
    /// solid is about ten times quicker, for a first look at many standpoints.
    #[arg(long, value_enum, value_name = "HOW")]
    pub hidden: Option<HiddenArg>,
}

/// A page split over several sheets of the paper (for `plan` and `sheet`).
#[derive(Debug, Args)]
pub struct TileArgs {
    /// Split the page over COLUMNSxROWS sheets of the paper, to print large and assemble
    /// (one file a sheet for PNG and SVG, named by row and column; one PDF of them all).
    #[arg(long, value_name = "CxR", value_parser = parse_tiles, requires = "page")]
    pub tiles: Option<(u32, u32)>,
    /// Overlap between neighbouring sheets, millimetres.
    #[arg(long, value_name = "MM", default_value_t = 10.0, value_parser = parse_non_negative)]
    pub overlap: f64,
}

#[derive(Debug, Args)]
pub struct PlanArgs {
    /// The scene file (RON), a model (Wavefront .obj), or - for a RON scene on standard input.
    pub scene: PathBuf,
    #[command(flatten)]
    pub model: ModelArgs,
    #[command(flatten)]
    pub out: OutArgs,
    /// Size of the plan, WIDTHxHEIGHT pixels (with --beside: its width; the height is the
    /// panorama's).
    #[arg(long, value_name = "WxH", default_value = "1600x1200", value_parser = parse_size)]
    pub size: (u32, u32),
    /// Lay the plan out on paper (a4, a3, letter, 420x297mm ...), filling the printable area
    /// (with --beside: the panorama and the plan side by side on it).
    #[arg(long, value_name = "PAPER")]
    pub page: Option<String>,
    /// The plan's scale, 1:N (refused if the site does not fit) [default: the largest
    /// standard scale that fits: 1:50, 1:100, 1:200, 1:250, 1:500, 1:1000, 1:1250 ...].
    #[arg(long, value_name = "1:N", value_parser = parse_scale)]
    pub scale: Option<f64>,
    /// Turn the paper upright (the default is landscape).
    #[arg(long, requires = "page")]
    pub portrait: bool,
    /// Margin round the sheet, millimetres.
    #[arg(long, value_name = "MM", default_value_t = 10.0, value_parser = parse_finite)]
    pub margin: f64,
    #[command(flatten)]
    pub tiling: TileArgs,
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
    /// The scene file (RON), a model (Wavefront .obj), or - for a RON scene on standard input.
    pub scene: PathBuf,
    #[command(flatten)]
    pub model: ModelArgs,
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
