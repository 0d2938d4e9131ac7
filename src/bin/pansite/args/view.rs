//! Where the viewer stands and looks: the options every command that draws a view shares.

use super::values::{parse_finite, parse_latlon, parse_non_negative, parse_pair};
use clap::Args;

/// The options that choose or change the standpoint, whichever command they come with.
#[derive(Clone, Debug, Default, Args)]
pub struct ViewArgs {
    /// Which of the scene's standpoints to use [default: the scene's default].
    #[arg(short, long, value_name = "NAME")]
    pub standpoint: Option<String>,

    /// Stand at this plan position instead, metres east and north.
    #[arg(long, value_name = "X,Y", value_parser = parse_pair, allow_hyphen_values = true)]
    pub at: Option<(f64, f64)>,

    /// Stand at this WGS84 latitude and longitude instead (the scene needs a `location`;
    /// a data file given directly is placed around it).
    #[arg(long, value_name = "LAT,LON", value_parser = parse_latlon, allow_hyphen_values = true, conflicts_with = "at")]
    pub at_latlon: Option<(f64, f64)>,

    /// Eye height above the ground, metres [default: the standpoint's, or 1.6].
    #[arg(long, value_name = "METRES", value_parser = parse_non_negative)]
    pub eye_height: Option<f64>,

    /// Azimuth at the centre of the view, degrees clockwise from north.
    #[arg(long, value_name = "DEG", value_parser = parse_finite, allow_hyphen_values = true)]
    pub heading: Option<f64>,

    /// Tilt of the view, degrees; positive looks up.
    #[arg(long, value_name = "DEG", value_parser = parse_finite, allow_hyphen_values = true)]
    pub pitch: Option<f64>,

    /// Roll of the view, degrees; positive turns up towards the right.
    #[arg(long, value_name = "DEG", value_parser = parse_finite, allow_hyphen_values = true)]
    pub roll: Option<f64>,
}
