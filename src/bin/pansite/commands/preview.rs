//! `pansite preview`: the ordinary perspective a panorama viewer shows looking one way.

use super::common::{choose_view, read_site, write_one};
use super::settings::preview_settings;
use crate::args::PreviewArgs;
use pansite::compose::preview;
use pansite::page::Sheet;

/// `pansite preview`.
pub fn preview_command(args: &PreviewArgs) -> anyhow::Result<()> {
    let (site, _) = read_site(
        &args.scene,
        &args.model,
        args.view.at_latlon,
        args.out.quiet,
    )?;
    let standpoint = choose_view(&site, &args.view)?;
    let drawing = preview(&site, &standpoint, &preview_settings(args))?;
    let sheet = Sheet::full_bleed(drawing, args.out.dpi);
    let written = write_one(&sheet, &args.out, &args.scene, "preview")?;
    if !args.out.quiet {
        eprintln!(
            "pansite: wrote {written} (standpoint \"{}\", heading {:.1}\u{b0}, pitch {:.1}\u{b0}, {:.0}\u{b0} across)",
            standpoint.name,
            standpoint.heading.to_degrees().rem_euclid(360.0),
            standpoint.pitch.to_degrees(),
            args.fov
        );
    }
    Ok(())
}
