//! `pansite plan`: the site from above with the standpoints marked, alone, on paper, or
//! beside a panorama.

use super::common::{choose_view, read_site, write_pages};
use super::settings::{paper, plan_settings, tiling};
use crate::args::PlanArgs;
use pansite::compose::{beside, plan_map, PlanSettings};
use pansite::page::{plan_title_lines, title_lines, today, TitleText, TitledPaper};
use pansite::render::draw_sheets;
use pansite::Error;

/// The gap between the panorama and the plan printed beside it, millimetres.
const BESIDE_GAP_MM: f64 = 10.0;

/// `pansite plan`.
pub fn plan(args: &PlanArgs) -> anyhow::Result<()> {
    let (site, _) = read_site(
        &args.scene,
        &args.model,
        args.view.at_latlon,
        args.out.quiet,
    )?;
    let (mut settings, mut panorama) = plan_settings(args)?;
    let paper = match &args.page {
        Some(name) => {
            let tiles = tiling(&args.tiling);
            Some(TitledPaper::new(
                paper(name, args.portrait)?,
                args.margin,
                tiles,
            )?)
        }
        None => None,
    };
    let dpi = args.out.dpi;
    let px_per_mm = dpi / 25.4;
    let date = today();
    let no_room = || Error::Setting("the drawing and its title block do not fit the paper".into());
    let (sheets, left_out) = if args.beside {
        let standpoint = choose_view(&site, &args.view)?;
        // The title: the standpoint's lines, then both scales. Its room is measured with
        // the widest plan scale this could print, so the real one never needs more rows.
        let fields = |mm_per_degree: f64, scale: f64| {
            let mut fields = title_lines(&site, &standpoint, date);
            fields.north_key = None; // the plan beside the panorama draws its own
            fields.fields.push(format!(
                "PANORAMA 1\u{b0} = {mm_per_degree:.3} MM; PLAN SCALE 1:{scale:.0} PRINTED AT {dpi:.0} DPI"
            ));
            fields
        };
        let mut planned = TitleText::default();
        let mut bar = None;
        if let Some(paper) = &paper {
            // The printable area less the title holds a 2:1 panorama and a square plan of
            // its height, with the gap between: 3 h + gap across, h down. The bar of ten
            // degrees is measured first on the whole printable area (it only gets shorter).
            // (Less a pixel: the gap is rounded to whole pixels.)
            let (area_w, area_h) = paper.area_mm();
            let w = area_w - 1.0 / px_per_mm;
            let side_of = |h: f64| ((w - BESIDE_GAP_MM) / 3.0).min(h);
            let first = side_of(area_h) / 180.0;
            planned = fields(first, 1e7);
            let (_, h) = paper
                .room_above_title(&planned, Some(first))
                .ok_or_else(no_room)?;
            let side = (side_of(h) * px_per_mm).floor() as u32;
            (panorama.width, panorama.height) = (2 * side, side);
            (settings.width, settings.height) = (side, side);
            panorama.validate()?;
            bar = Some(side as f64 / px_per_mm / 180.0);
        }
        let (sheets, _) = draw_sheets(&site, &standpoint, &panorama, None, dpi)?;
        let plan = plan_map(&site, std::slice::from_ref(&standpoint), &settings)?;
        let both = beside(&sheets[0], &plan.sheet(), BESIDE_GAP_MM)?;
        let (sheet, title_left_out) = match (&paper, bar) {
            (Some(paper), Some(bar)) => {
                let fields = fields(bar, plan.scale_denominator());
                paper
                    .lay_out(&both, &fields, &planned, Some(bar))
                    .ok_or_else(no_room)?
            }
            _ => (vec![both], 0),
        };
        (sheet, plan.labels_left_out + title_left_out)
    } else if let Some(paper) = &paper {
        let planned = plan_title_lines(&site, &site.standpoints, 1e7, dpi, date);
        let (w, h) = paper.room_above_title(&planned, None).ok_or_else(no_room)?;
        let room = PlanSettings::for_room(w, h, dpi);
        // Words kept off the edges of the sheets a tiled page is cut into.
        let size = (room.width as f64, room.height as f64);
        let settings = PlanSettings {
            scale: settings.scale,
            label_cuts: paper.tile_edges(size, px_per_mm, &planned, None),
            ..room
        };
        let plan = plan_map(&site, &site.standpoints, &settings)?;
        let fields = plan_title_lines(
            &site,
            &site.standpoints,
            plan.scale_denominator(),
            dpi,
            date,
        );
        let (sheet, title_left_out) = paper
            .lay_out(&plan.sheet(), &fields, &planned, None)
            .ok_or_else(no_room)?;
        (sheet, plan.labels_left_out + title_left_out)
    } else {
        let plan = plan_map(&site, &site.standpoints, &settings)?;
        (vec![plan.sheet()], plan.labels_left_out)
    };
    let columns = paper.as_ref().map_or(1, TitledPaper::columns);
    let written = write_pages(&sheets, columns, &args.out, &args.scene, "plan")?;
    if !args.out.quiet {
        if left_out > 0 {
            eprintln!(
                "pansite: {left_out} label{} left out for want of room",
                if left_out == 1 { "" } else { "s" }
            );
        }
        let (sheet, count) = (&sheets[0], sheets.len());
        eprintln!(
            "pansite: wrote {written} ({:.0} x {:.0} mm{})",
            sheet.width_mm,
            sheet.height_mm,
            if count > 1 {
                format!(", {count} sheets")
            } else {
                String::new()
            }
        );
    }
    Ok(())
}
