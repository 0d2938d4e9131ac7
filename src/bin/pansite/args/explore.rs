//! The options of `explore`.

use super::render::ModelArgs;
use clap::Args;
use std::net::IpAddr;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct ExploreArgs {
    /// The scene (RON), an .obj model, or an open-data file (.geojson, .city.json, .jsonl)
    /// to explore; `-` reads a scene from standard input (standpoints cannot then be kept).
    pub scene: PathBuf,

    /// The port to listen on; 0 takes any free one.
    #[arg(long, default_value_t = 0)]
    pub port: u16,

    /// Listen on this address instead of 127.0.0.1. Other computers that can reach it can
    /// then use the page: only for a network you trust.
    #[arg(long, value_name = "ADDRESS")]
    pub listen: Option<IpAddr>,

    /// The folder "print" writes into [default: the scene's folder].
    #[arg(long, value_name = "FOLDER")]
    pub output_dir: Option<PathBuf>,

    /// Open the page in the default browser.
    #[arg(long)]
    pub open: bool,

    #[command(flatten)]
    pub model: ModelArgs,
}
