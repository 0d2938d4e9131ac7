//! `pansite sheet`: many standpoints as labelled thumbnails on one sheet.

use super::common::{choose_view, read_site, write_pages, Progress};
use super::settings::{contact_settings, paper, tiling, time_sweep};
use crate::args::{PathSweep, SheetArgs, ViewArgs};
use pansite::compose::{
    contact_sheet, sweep_grid, sweep_headings, sweep_path, sweep_times, SheetGrid,
};
use pansite::page::{sheet_title_lines, today, TitledPaper};
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
    // On paper: thumbnails as large as the room above the title block allows.
    let fields = sheet_title_lines(&site, &standpoints, today());
    let paper = match &args.page {
        Some(name) => {
            let tiles = tiling(&args.tiling);
            let paper = TitledPaper::new(paper(name, args.portrait)?, args.margin, tiles)?;
            let px_per_mm = args.out.dpi / 25.4;
            let fitted = paper.room_above_title(&fields, None).and_then(|(w, h)| {
                SheetGrid::fit(
                    standpoints.len(),
                    args.columns,
                    w * px_per_mm,
                    h * px_per_mm,
                )
            });
            let Some((grid, (tw, th))) = fitted else {
                return Err(Error::Setting(format!(
                    "{} thumbnails and the title block do not fit {} less a margin of {} mm: choose larger paper, a smaller margin or fewer standpoints",
                    standpoints.len(),
                    name,
                    args.margin
                ))
                .into());
            };
            (settings.thumbnail.width, settings.thumbnail.height) = (tw, th);
            settings.columns = Some(grid.columns as u32);
            settings.thumbnail.validate()?;
            // Captions kept off the edges of the sheets a tiled page is cut into.
            let size = (grid.width.ceil(), grid.height.ceil());
            settings.label_cuts = paper.tile_edges(size, px_per_mm, &fields, None);
            Some(paper)
        }
        None => None,
    };
    let progress = Progress::new("thumbnails", args.out.quiet);
    let started = Instant::now();
    let sheet = contact_sheet(&site, &standpoints, &settings, &|done, total| {
        progress.update(done, total)
    })?;
    let (sheets, left_out) = match &paper {
        Some(paper) => paper
            .lay_out(&sheet, &fields, &fields, None)
            .ok_or_else(|| Error::Setting("the thumbnails do not fit the paper".into()))?,
        None => (vec![sheet], 0),
    };
    let columns = paper.as_ref().map_or(1, TitledPaper::columns);
    let written = write_pages(&sheets, columns, &args.out, &args.scene, "sheet")?;
    if !args.out.quiet {
        if left_out > 0 {
            eprintln!(
                "pansite: {left_out} title label{} left out for want of room",
                if left_out == 1 { "" } else { "s" }
            );
        }
        eprintln!(
            "pansite: wrote {written} ({} standpoints, {}x{} px, {:.2} s)",
            standpoints.len(),
            sheets[0].drawing.width,
            sheets[0].drawing.height,
            started.elapsed().as_secs_f64()
        );
    }
    Ok(())
}
