//! `pansite sheet`: many standpoints as labelled thumbnails on one sheet.

use super::common::{choose_view, read_site, write_one, Progress};
use super::settings::{contact_settings, time_sweep};
use crate::args::{PathSweep, SheetArgs, ViewArgs};
use pansite::compose::{contact_sheet, sweep_grid, sweep_headings, sweep_path, sweep_times};
use pansite::scene::Standpoint;
use pansite::Error;
use std::time::Instant;

/// `pansite sheet`.
pub fn sheet(args: &SheetArgs) -> anyhow::Result<()> {
    let (site, _) = read_site(
        &args.scene,
        &args.model,
        args.view.at_latlon,
        args.out.quiet,
    )?;
    let base = choose_view(&site, &args.view)?;
    let mut settings = contact_settings(args)?;
    let standpoints: Vec<Standpoint> = if let Some(text) = &args.times {
        let (day, to, step) = time_sweep(text, &args.sun, &site)?;
        let (standpoints, moments) = sweep_times(&base, &day, to, step)?;
        settings.moments = moments;
        standpoints
    } else if let Some((from, to, step)) = args.headings {
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
    let progress = Progress::new("thumbnails", args.out.quiet);
    let started = Instant::now();
    let sheet = contact_sheet(&site, &standpoints, &settings, &|done, total| {
        progress.update(done, total)
    })?;
    let written = write_one(&sheet, &args.out, &args.scene, "sheet")?;
    if !args.out.quiet {
        eprintln!(
            "pansite: wrote {written} ({} standpoints, {}x{} px, {:.2} s)",
            standpoints.len(),
            sheet.drawing.width,
            sheet.drawing.height,
            started.elapsed().as_secs_f64()
        );
    }
    Ok(())
}
