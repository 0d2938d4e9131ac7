//! The options of `render` (shared by `watch`) and of the small commands, and their checks.

use super::aids::AidArgs;
use super::values::{
    parse_finite, parse_latlon, parse_non_negative, parse_pair, parse_size, parse_tiles,
};
use super::view::ViewArgs;
use clap::{Args, ValueEnum};
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct CheckArgs {
    /// The scene file (RON), a model (Wavefront .obj), or - for a RON scene on standard input.
    pub scene: PathBuf,

    #[command(flatten)]
    pub model: ModelArgs,
}

#[derive(Debug, Args)]
pub struct NewArgs {
    /// Where to write it; an existing file is never replaced.
    #[arg(default_value = "scene.ron")]
    pub file: PathBuf,
}

#[derive(Debug, Args)]
pub struct RenderArgs {
    /// The scene file (RON), or a model (Wavefront .obj, placed at the origin; give a
    /// standpoint with --at), or - for a RON scene on standard input.
    pub scene: PathBuf,

    /// Output file: .png, .svg or .pdf (or give --format), or - for standard output
    /// [default: renders/SCENE-STANDPOINT.png].
    #[arg(short, long, value_name = "FILE")]
    pub output: Option<PathBuf>,

    /// Output format, instead of the output file's extension.
    #[arg(long, value_enum, value_name = "FORMAT")]
    pub format: Option<FormatArg>,

    /// Lay the panorama out on paper: a4, a3, b5, letter, tabloid, asme-c ... or a size
    /// such as 420x297mm or 11x17in. Without it the image is the panorama alone (--size).
    #[arg(long, value_name = "PAPER")]
    pub page: Option<String>,

    /// Turn the paper upright (the default is landscape).
    #[arg(long)]
    pub portrait: bool,

    /// Margin round the sheet, millimetres.
    #[arg(long, value_name = "MM", default_value_t = 10.0, value_parser = parse_non_negative)]
    pub margin: f64,

    /// Resolution: pixels per inch of a page, and the size of a pixel in SVG and PDF.
    #[arg(long, value_name = "DPI", default_value_t = 300.0, value_parser = parse_finite)]
    pub dpi: f64,

    /// Only these elevations, LOW,HIGH degrees, so the page is filled where the poles are
    /// not needed (with --page).
    #[arg(long, value_name = "LOW,HIGH", value_parser = parse_pair, allow_hyphen_values = true)]
    pub band: Option<(f64, f64)>,

    /// Leave out the title block (scene, standpoint, heading, eye height, scale, date).
    #[arg(long)]
    pub no_title: bool,

    /// Split the page over COLUMNSxROWS sheets of the paper, to print large and assemble.
    #[arg(long, value_name = "CxR", value_parser = parse_tiles)]
    pub tiles: Option<(u32, u32)>,

    /// Overlap between neighbouring sheets, millimetres.
    #[arg(long, value_name = "MM", default_value_t = 10.0, value_parser = parse_non_negative)]
    pub overlap: f64,

    /// Write colour (RGBA) PNG instead of grey.
    #[arg(long)]
    pub colour: bool,

    /// How labels' words are written in SVG: our single-stroke letters, or SVG text
    /// elements a vector editor can edit (in its sans-serif font).
    #[arg(long, value_enum, value_name = "HOW", default_value = "strokes")]
    pub lettering: LetteringArg,

    /// Weigh lines by distance: edges nearer than 8 m heavier, beyond 30 m lighter.
    #[arg(long)]
    pub weigh_by_distance: bool,

    /// A style file: how layers look, by name, over the scene's own styles (see
    /// docs/scene-format.md, "Styles").
    #[arg(long, value_name = "FILE")]
    pub style: Option<PathBuf>,

    #[command(flatten)]
    pub view: ViewArgs,

    /// Image size in pixels, WIDTHxHEIGHT (2:1 for the full sphere).
    #[arg(long, value_name = "WxH", default_value = "4096x2048", value_parser = parse_size)]
    pub size: (u32, u32),

    /// Width of the wireframe's lines, pixels.
    #[arg(long, value_name = "PX", default_value_t = 1.5, value_parser = parse_finite)]
    pub line_weight: f64,

    /// Largest distance between a true curve and its drawn polyline, pixels.
    #[arg(long, value_name = "PX", default_value_t = pansite::plane::DEFAULT_TOLERANCE_PX, value_parser = parse_finite)]
    pub tolerance: f64,

    /// The wireframe alone, full-bleed on white: no grid, no horizon.
    #[arg(long)]
    pub bare: bool,

    /// How edges hidden behind faces are drawn [default: the scene's choice, or faint].
    #[arg(long, value_enum, value_name = "HOW")]
    pub hidden: Option<HiddenArg>,

    #[command(flatten)]
    pub model: ModelArgs,

    /// Print nothing but errors.
    #[arg(short, long)]
    pub quiet: bool,

    /// Print the time each stage took on standard error.
    #[arg(long)]
    pub timings: bool,

    /// Stop a render that would take longer than this many seconds (exit code 2).
    #[arg(long, value_name = "SECONDS", default_value_t = pansite::budget::DEFAULT_TIME_LIMIT.as_secs_f64(), value_parser = parse_time_limit)]
    pub time_limit: f64,

    #[command(flatten)]
    pub aids: AidArgs,

    #[command(flatten)]
    pub sun: super::SunArgs,
}

/// How a Wavefront OBJ model given instead of a scene is read.
#[derive(Debug, Args)]
#[command(next_help_heading = "Models (.obj files)")]
pub struct ModelArgs {
    /// For an .obj model: which of its axes points up.
    #[arg(long, value_enum, default_value = "y")]
    pub up: UpArg,

    /// For an .obj model: the unit of its coordinates.
    #[arg(long, value_enum, default_value = "m")]
    pub unit: UnitArg,

    /// For an .obj model: faces meeting at more than this angle (degrees) show their edge.
    #[arg(long, value_name = "DEG", default_value_t = pansite::scene::DEFAULT_CREASE_DEG, value_parser = parse_crease)]
    pub crease: f64,

    /// For a .geojson, .city.json or .jsonl file: the WGS84 latitude and longitude of the
    /// plan's origin [default: --at-latlon, else the file's first position (GeoJSON) or the
    /// model's middle (CityJSON)].
    #[arg(long, value_name = "LAT,LON", value_parser = parse_latlon, allow_hyphen_values = true)]
    pub origin_latlon: Option<(f64, f64)>,

    /// For a .geojson, .city.json or .jsonl file: the IANA time zone of its local times, as
    /// Europe/Paris [default: universal time]. A scene names its own in its `location`.
    #[arg(long, value_name = "ZONE")]
    pub time_zone: Option<String>,
}

/// How the words of labels are written in an SVG.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum LetteringArg {
    /// Single-stroke letters, the same lines in every format.
    Strokes,
    /// SVG text elements, editable as words (SVG only).
    Text,
}

/// What kind of file to write.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum FormatArg {
    Png,
    Svg,
    Pdf,
}

/// How edges hidden behind faces are drawn.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum HiddenArg {
    /// Like the seen edges (a see-through wireframe).
    Solid,
    /// Faint and dashed.
    Faint,
    /// Left out.
    Off,
}

impl From<HiddenArg> for pansite::scene::HiddenEdges {
    fn from(how: HiddenArg) -> Self {
        match how {
            HiddenArg::Solid => Self::Solid,
            HiddenArg::Faint => Self::Faint,
            HiddenArg::Off => Self::Off,
        }
    }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum UpArg {
    /// x east, y up, z south (the usual OBJ habit)
    Y,
    /// x east, y north, z up
    Z,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum UnitArg {
    M,
    Cm,
    Mm,
    In,
    Ft,
}

fn parse_crease(text: &str) -> Result<f64, String> {
    let value = parse_finite(text)?;
    if (0.0..=180.0).contains(&value) {
        Ok(value)
    } else {
        Err(format!(
            "expected an angle from 0 to 180 degrees, found {value}"
        ))
    }
}

fn parse_time_limit(text: &str) -> Result<f64, String> {
    let value = parse_finite(text)?;
    // A week is past any render; the bound keeps the duration representable.
    if value > 0.0 && value <= 7.0 * 86400.0 {
        Ok(value)
    } else {
        Err(format!(
            "expected more than 0 and at most 604800 seconds, found {value}"
        ))
    }
}
