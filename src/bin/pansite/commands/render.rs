//! `pansite render`: draw a scene from a standpoint, as a panorama or laid out on paper.

use super::common::{
    check_lettering, choose_view, create_parent, default_output, is_standard_stream,
    off_the_ground, output_format, output_paths, read_site, write_sheets, write_stdout,
};
use super::settings::{page_settings, render_settings};
use crate::args::{FormatArg, RenderArgs};
use anyhow::Context;
use pansite::output::{write_atomically, Panorama, PngOptions};
use pansite::render::{draw_sheets, Timings};
use pansite::scene::{solids_enclosing, LoadTimings};
use pansite::Error;
use std::path::PathBuf;
use std::time::{Duration, Instant};

/// How many skipped edges are named one by one before the rest are counted.
const MAX_NAMED_SKIPS: usize = 20;

/// `pansite render`.
pub fn render(args: &RenderArgs) -> anyhow::Result<()> {
    let (site, load) = read_site(&args.scene, &args.model, args.view.at_latlon, args.quiet)?;
    let standpoint = choose_view(&site, &args.view)?;
    let settings = render_settings(args)?;
    pansite::aids::check_divisions(&site, &settings.aids.guides.divisions)?;
    let output = match &args.output {
        Some(path) => path.clone(),
        None => default_output(&args.scene, &standpoint.name, args.format),
    };
    let format = output_format(&output, args.format)?;
    check_lettering(args.lettering, format)?;
    let page = page_settings(args, &site, &standpoint)?;
    let (sheets, render) = draw_sheets(&site, &standpoint, &settings, page.as_ref(), args.dpi)
        .with_context(|| format!("rendering {}", output.display()))?;
    let started = Instant::now();
    let png = PngOptions {
        colour: args.colour,
        dpi: Some(args.dpi),
        // A full-sphere image edge to edge is a panorama viewers can open.
        panorama: page.is_none().then(|| Panorama {
            width: settings.width,
            height: settings.height,
            heading_deg: standpoint.heading.to_degrees(),
            pitch_deg: standpoint.pitch.to_degrees(),
            roll_deg: standpoint.roll.to_degrees(),
        }),
    };
    let columns = page.as_ref().and_then(|p| p.tiles).map_or(1, |t| t.columns);
    let mut written: Vec<PathBuf> = Vec::new();
    if is_standard_stream(&output) {
        if sheets.len() > 1 && format != FormatArg::Pdf {
            return Err(Error::Setting(
                "several sheets cannot go to standard output as one PNG or SVG; give a file name, or use PDF".into(),
            )
            .into());
        }
        // Standard output cannot be replaced atomically: encode in memory, then send it.
        let mut bytes = Vec::new();
        write_sheets(&sheets, format, &png, args.lettering, &mut bytes, 0)?;
        write_stdout(&bytes)?;
    } else {
        if args.output.is_none() {
            create_parent(&output)?;
        }
        for (path, first) in output_paths(&output, format, sheets.len(), columns) {
            write_atomically(&path, |file| {
                write_sheets(&sheets, format, &png, args.lettering, file, first)
            })
            .with_context(|| format!("rendering {}", path.display()))?;
            written.push(path);
        }
    }
    let write_time = started.elapsed();
    if !args.quiet {
        for item in solids_enclosing(&site, &standpoint.eye()) {
            eprintln!(
                "pansite: warning: standpoint \"{}\" is inside {}: its faces surround the view and hide everything beyond",
                standpoint.name,
                site.describe_item(item)
            );
        }
        for (item, message) in &site.warnings {
            eprintln!("pansite: warning: {} {message}", site.describe_item(*item));
        }
        if let Some(warning) = off_the_ground(&site, &standpoint) {
            eprintln!("pansite: warning: {warning}");
        }
        for note in &render.notes {
            eprintln!("pansite: warning: {note}");
        }
        for skipped in render.skipped.iter().take(MAX_NAMED_SKIPS) {
            eprintln!(
                "pansite: warning: skipped an edge of {}: {}",
                site.describe_item(skipped.item),
                skipped.why
            );
        }
        if render.skipped.len() > MAX_NAMED_SKIPS {
            eprintln!(
                "pansite: warning: ... and {} more",
                render.skipped.len() - MAX_NAMED_SKIPS
            );
        }
        if !render.unlettered.is_empty() {
            let chars: Vec<String> = render
                .unlettered
                .iter()
                .map(|c| format!("\"{c}\" (U+{:04X})", *c as u32))
                .collect();
            eprintln!(
                "pansite: warning: no letterform for {}: drawn as a crossed box",
                chars.join(", ")
            );
        }
        if render.labels_left_out > 0 {
            eprintln!(
                "pansite: {} label{} left out for want of room (a larger size or page, or a smaller --text-height, makes room)",
                render.labels_left_out,
                if render.labels_left_out == 1 { "" } else { "s" }
            );
        }
        let names: Vec<String> = if written.is_empty() {
            vec!["standard output".to_owned()]
        } else {
            written.iter().map(|p| p.display().to_string()).collect()
        };
        let size = match &page {
            Some(page) => format!(
                "{:.1} x {:.1} mm at {} dpi, {} sheet{}",
                page.paper.width_mm,
                page.paper.height_mm,
                page.dpi,
                sheets.len(),
                if sheets.len() == 1 { "" } else { "s" }
            ),
            None => format!("{}x{} px", render.drawing.width, render.drawing.height),
        };
        eprintln!(
            "pansite: wrote {} ({size}, standpoint \"{}\", {} edges as {} lines, {} skipped)",
            names.join(", "),
            standpoint.name,
            site.edges.len(),
            render.drawing.wireframe_lines(),
            render.skipped.len()
        );
    }
    if args.timings {
        let timings = Timings {
            raster_and_encode: Some(write_time),
            ..render.timings.clone()
        };
        print_timings(&load, &timings);
    }
    Ok(())
}

/// The stages' times on standard error. Visibility is found edge by edge in the pass that
/// flattens, and each band is compressed by the core that drew it, so those pairs are
/// given together with the part that can be told apart.
fn print_timings(load: &LoadTimings, t: &Timings) {
    let ms = |d: Duration| d.as_secs_f64() * 1e3;
    let both = t.raster_and_encode.unwrap_or_default();
    // The writing thread's share is known where the grey PNG is streamed by the library;
    // pages and other formats are timed as one.
    let writing = match t.encode {
        Some(encode) => format!(
            "raster + encode {:.1} ms (bands drawn and compressed on every core; {:.1} ms of it writing them out in order)",
            ms(both),
            ms(encode)
        ),
        None => format!("raster + encode + write {:.1} ms overlapped", ms(both)),
    };
    eprintln!(
        "pansite: timings: load {:.1} ms (read and parse {:.1}, expand {:.1}); \
         visibility + flatten {:.1} ms (of which the hierarchy of faces {:.1}; edges are seen \
         and flattened in one pass); {writing}",
        ms(load.parse + load.expand),
        ms(load.parse),
        ms(load.expand),
        ms(t.flatten),
        ms(t.hierarchy),
    );
}
