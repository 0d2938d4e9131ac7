//! What the user typed (clap), and its checks.

use clap::{Args, Parser, Subcommand, ValueEnum};
use std::path::PathBuf;

#[derive(Debug, Parser)]
#[command(
    name = "pansite",
    version,
    about = "Exact equirectangular wireframe underlays for hand-drawn 360-degree perspectives",
    after_help = "Exit codes: 0 success, 1 failure, 2 bad usage or bad input (too large or too slow included), 130 interrupted."
)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Draw a scene from a standpoint as an equirectangular PNG underlay.
    Render(RenderArgs),
    /// Read a scene and report what it holds, its extent and its standpoints, with
    /// warnings (a standpoint inside a solid or under the ground).
    Check(CheckArgs),
    /// Write a commented starter scene to begin from.
    New(NewArgs),
}

#[derive(Debug, Args)]
pub struct CheckArgs {
    /// The scene file (RON), or a model (Wavefront .obj).
    pub scene: PathBuf,
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

    /// Output PNG, or - for standard output [default: renders/SCENE-STANDPOINT.png].
    #[arg(short, long, value_name = "FILE")]
    pub output: Option<PathBuf>,

    /// Which of the scene's standpoints to use [default: the first].
    #[arg(short, long, value_name = "NAME")]
    pub standpoint: Option<String>,

    /// Stand at this plan position instead, metres east and north.
    #[arg(long, value_name = "X,Y", value_parser = parse_pair, allow_hyphen_values = true)]
    pub at: Option<(f64, f64)>,

    /// Eye height above the ground, metres [default: the standpoint's, or 1.6].
    #[arg(long, value_name = "METRES", value_parser = parse_non_negative)]
    pub eye_height: Option<f64>,

    /// Azimuth at the centre of the image, degrees clockwise from north.
    #[arg(long, value_name = "DEG", value_parser = parse_finite, allow_hyphen_values = true)]
    pub heading: Option<f64>,

    /// Tilt of the view, degrees; positive looks up.
    #[arg(long, value_name = "DEG", value_parser = parse_finite, allow_hyphen_values = true)]
    pub pitch: Option<f64>,

    /// Roll of the view, degrees; positive turns up towards the right.
    #[arg(long, value_name = "DEG", value_parser = parse_finite, allow_hyphen_values = true)]
    pub roll: Option<f64>,

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

    /// For an .obj model: which of its axes points up.
    #[arg(long, value_enum, default_value = "y")]
    pub up: UpArg,

    /// For an .obj model: the unit of its coordinates.
    #[arg(long, value_enum, default_value = "m")]
    pub unit: UnitArg,

    /// For an .obj model: faces meeting at more than this angle (degrees) show their edge.
    #[arg(long, value_name = "DEG", default_value_t = pansite::scene::DEFAULT_CREASE_DEG, value_parser = parse_crease)]
    pub crease: f64,

    /// Print nothing but errors.
    #[arg(short, long)]
    pub quiet: bool,

    /// Print the time each stage took on standard error.
    #[arg(long)]
    pub timings: bool,

    /// Stop a render that would take longer than this many seconds (exit code 2).
    #[arg(long, value_name = "SECONDS", default_value_t = pansite::budget::DEFAULT_TIME_LIMIT.as_secs_f64(), value_parser = parse_time_limit)]
    pub time_limit: f64,
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

fn parse_finite(text: &str) -> Result<f64, String> {
    let value: f64 = text
        .trim()
        .parse()
        .map_err(|_| format!("expected a number, found \"{text}\""))?;
    if value.is_finite() {
        Ok(value)
    } else {
        Err(format!("expected a finite number, found \"{text}\""))
    }
}

fn parse_non_negative(text: &str) -> Result<f64, String> {
    let value = parse_finite(text)?;
    if value >= 0.0 {
        Ok(value)
    } else {
        Err(format!("expected zero or more, found {value}"))
    }
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

fn parse_pair(text: &str) -> Result<(f64, f64), String> {
    let (x, y) = text
        .split_once(',')
        .ok_or_else(|| format!("expected X,Y, found \"{text}\""))?;
    Ok((parse_finite(x)?, parse_finite(y)?))
}

fn parse_size(text: &str) -> Result<(u32, u32), String> {
    let (w, h) = text
        .split_once(['x', 'X'])
        .ok_or_else(|| format!("expected WIDTHxHEIGHT such as 4096x2048, found \"{text}\""))?;
    let number = |s: &str| {
        s.trim()
            .parse::<u32>()
            .map_err(|_| format!("expected a whole number of pixels, found \"{s}\""))
    };
    Ok((number(w)?, number(h)?))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn render(args: &[&str]) -> Result<RenderArgs, clap::Error> {
        let mut all = vec!["pansite", "render", "scene.ron"];
        all.extend_from_slice(args);
        Cli::try_parse_from(all).map(|cli| match cli.command {
            Command::Render(r) => r,
            other => panic!("parsed as {other:?}"),
        })
    }

    #[test]
    fn defaults() {
        let r = render(&[]).unwrap();
        assert_eq!(r.size, (4096, 2048));
        assert_eq!(r.line_weight, 1.5);
        assert_eq!(r.tolerance, 0.1);
        assert!(!r.bare && !r.quiet && !r.timings);
        assert!(r.output.is_none() && r.standpoint.is_none() && r.at.is_none());
        assert_eq!((r.up, r.unit, r.crease), (UpArg::Y, UnitArg::M, 30.0));
    }

    #[test]
    fn every_option_is_read() {
        let r = render(&[
            "-o",
            "out.png",
            "-s",
            "gate",
            "--at",
            "-3,-4.5",
            "--eye-height",
            "1.2",
            "--heading",
            "-30",
            "--pitch",
            "5",
            "--roll",
            "-2",
            "--size",
            "800x400",
            "--line-weight",
            "2",
            "--tolerance",
            "0.05",
            "--bare",
            "--quiet",
            "--timings",
        ])
        .unwrap();
        assert_eq!(r.output.as_deref(), Some(std::path::Path::new("out.png")));
        assert_eq!(r.standpoint.as_deref(), Some("gate"));
        assert_eq!(r.at, Some((-3.0, -4.5)));
        assert_eq!(
            (r.eye_height, r.heading, r.pitch, r.roll),
            (Some(1.2), Some(-30.0), Some(5.0), Some(-2.0))
        );
        assert_eq!(r.size, (800, 400));
        assert_eq!((r.line_weight, r.tolerance), (2.0, 0.05));
        assert!(r.bare && r.quiet && r.timings);
        let r = render(&["--up", "z", "--unit", "mm", "--crease", "45"]).unwrap();
        assert_eq!((r.up, r.unit, r.crease), (UpArg::Z, UnitArg::Mm, 45.0));
    }

    #[test]
    fn bad_values_are_usage_errors() {
        for args in [
            &["--size", "800"][..],
            &["--size", "0.5x2"],
            &["--at", "3"],
            &["--heading", "NaN"],
            &["--pitch", "inf"],
            &["--line-weight", "thick"],
            &["--up", "x"],
            &["--unit", "furlong"],
            &["--crease", "200"],
            &["--eye-height=-1"],
        ] {
            let error = render(args).unwrap_err();
            assert_eq!(error.exit_code(), 2, "{args:?}");
        }
    }
}
