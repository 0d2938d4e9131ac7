//! What the user typed: the commands and their options (clap), and the parsers of their
//! values. Nothing here does any work; `commands/` turns these into settings and runs them.

mod aids;
mod compose;
mod explore;
mod render;
mod sun;
mod values;
mod view;

pub use aids::{AidArgs, AnglesArgs, TableFormat};
use clap::{Parser, Subcommand};
pub use compose::{OutArgs, PlanArgs, PreviewArgs, SheetArgs, TileArgs, WatchArgs};
pub use explore::ExploreArgs;
pub use render::{
    CheckArgs, FormatArg, LetteringArg, ModelArgs, NewArgs, RenderArgs, UnitArg, UpArg,
};
pub use sun::{DaylightArgs, SunArgs};
pub use values::PathSweep;
pub use view::ViewArgs;

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
    /// Draw a scene from a standpoint as an equirectangular underlay (PNG, SVG or PDF),
    /// alone or laid out on paper.
    Render(Box<RenderArgs>),
    /// Read a scene and report what it holds, its extent and its standpoints, with
    /// warnings (a standpoint inside a solid or under the ground).
    Check(CheckArgs),
    /// Write a commented starter scene to begin from.
    New(NewArgs),
    /// List the azimuth, elevation, distance and image position of every labelled point and
    /// item corner, to plot by hand.
    Angles(Box<AnglesArgs>),
    /// Draw many standpoints (the scene's, or a sweep of headings, a path or a grid) as
    /// labelled thumbnails on one sheet.
    Sheet(Box<SheetArgs>),
    /// Draw the site plan from above with each standpoint, its heading and seam, a scale
    /// bar and a north arrow.
    Plan(Box<PlanArgs>),
    /// Draw an ordinary perspective view (straight lines straight) from a standpoint.
    Preview(Box<PreviewArgs>),
    /// Render, then render again whenever the scene or style file is saved.
    Watch(Box<WatchArgs>),
    /// List sunrise, transit and sunset, the sun's azimuth and elevation at a step, and the
    /// times an item's walls are in sun (needs the scene's `location`).
    Daylight(DaylightArgs),
    /// Serve a page on this computer where the standpoint is dragged across the plan and
    /// the underlay and a look-around view follow; keep standpoints and print from it.
    Explore(Box<ExploreArgs>),
}

#[cfg(test)]
mod tests {
    use super::*;

    fn render(args: &[&str]) -> Result<RenderArgs, clap::Error> {
        let mut all = vec!["pansite", "render", "scene.ron"];
        all.extend_from_slice(args);
        Cli::try_parse_from(all).map(|cli| match cli.command {
            Command::Render(r) => *r,
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
        assert!(r.output.is_none() && r.view.standpoint.is_none() && r.view.at.is_none());
        assert_eq!(
            (r.model.up, r.model.unit, r.model.crease),
            (UpArg::Y, UnitArg::M, 20.0)
        );
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
        assert_eq!(r.view.standpoint.as_deref(), Some("gate"));
        assert_eq!(r.view.at, Some((-3.0, -4.5)));
        assert_eq!(
            (r.view.eye_height, r.view.heading, r.view.pitch, r.view.roll),
            (Some(1.2), Some(-30.0), Some(5.0), Some(-2.0))
        );
        assert_eq!(r.size, (800, 400));
        assert_eq!((r.line_weight, r.tolerance), (2.0, 0.05));
        assert!(r.bare && r.quiet && r.timings);
        let r = render(&["--up", "z", "--unit", "mm", "--crease", "45"]).unwrap();
        assert_eq!(
            (r.model.up, r.model.unit, r.model.crease),
            (UpArg::Z, UnitArg::Mm, 45.0)
        );
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
