//! The sun's options (`render`, `angles`, `sheet`) and the `daylight` command's.

use super::aids::TableFormat;
use super::render::ModelArgs;
use clap::Args;
use std::path::PathBuf;

/// The date and local time of the sun and shadows, and what of them to draw; each
/// overrides the scene's `sun` block.
#[derive(Debug, Clone, Default, Args)]
pub struct SunArgs {
    /// The date of the sun and shadows, YYYY-MM-DD (needs the scene's `location`).
    #[arg(long, value_name = "YYYY-MM-DD")]
    pub date: Option<String>,

    /// The local clock time, HH:MM[:SS]; a time repeated when the clocks go back takes its
    /// offset, as 01:30+01:00.
    #[arg(long, value_name = "HH:MM", allow_hyphen_values = true)]
    pub time: Option<String>,

    /// Also draw the sun's paths at the solstices and the March equinox.
    #[arg(long)]
    pub seasons: bool,

    /// Leave out the sun's mark and the day's path.
    #[arg(long)]
    pub no_sun_path: bool,

    /// Leave out the shadows' outlines.
    #[arg(long)]
    pub no_shadows: bool,

    /// Hatch what is in shadow, lines this many metres apart.
    #[arg(long, value_name = "METRES")]
    pub hatch: Option<f64>,

    /// Lay a pale tone over the shade the eye sees (faces turned from the sun and the
    /// shadows on them and on the ground), on its own layer `shadow tone`.
    #[arg(long)]
    pub shade_tone: bool,
}

/// `pansite daylight`.
#[derive(Debug, Args)]
pub struct DaylightArgs {
    /// The scene file (RON) with a `location`, or - for a RON scene on standard input.
    pub scene: PathBuf,

    #[command(flatten)]
    pub model: ModelArgs,

    /// The first day, YYYY-MM-DD [default: the scene's `sun` date].
    #[arg(long, value_name = "YYYY-MM-DD")]
    pub date: Option<String>,

    /// The last day [default: the first].
    #[arg(long, value_name = "YYYY-MM-DD")]
    pub to: Option<String>,

    /// List the sun's azimuth and elevation every this many minutes.
    #[arg(long, value_name = "MINUTES")]
    pub step: Option<f64>,

    /// List when each wall of the item with this label comes into and goes out of sun.
    #[arg(long, value_name = "LABEL")]
    pub item: Option<String>,

    /// With --item: count other items that keep the sun off its walls.
    #[arg(long)]
    pub blocking: bool,

    /// Where to write the table [default: standard output].
    #[arg(short, long, value_name = "FILE")]
    pub output: Option<PathBuf>,

    #[arg(long, value_enum, default_value = "text")]
    pub format: TableFormat,
}
