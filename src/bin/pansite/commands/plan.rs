//! `pansite plan`: the site from above with the standpoints marked, alone, on paper, or
//! beside a panorama.

use super::common::{choose_view, read_site, write_one};
use super::settings::{paper, plan_settings};
use crate::args::PlanArgs;
use pansite::compose::{beside, plan_map, PlanSettings};
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
            let paper = paper(name, args.portrait)?;
            if !(args.margin >= 0.0 && 2.0 * args.margin < paper.width_mm.min(paper.height_mm)) {
                return Err(Error::Setting(format!(
                    "a margin of {} mm does not leave room on the paper",
                    args.margin
                ))
                .into());
            }
            Some(paper)
        }
        None => None,
    };
    let px_per_mm = args.out.dpi / 25.4;
    let (sheet, left_out) = if args.beside {
        if let Some(paper) = &paper {
            // The printable area holds a 2:1 panorama and a square plan of its height,
            // with the gap between: 3 h + gap across, h down.
            let (w, h) = (
                paper.width_mm - 2.0 * args.margin,
                paper.height_mm - 2.0 * args.margin,
            );
            let side_mm = ((w - BESIDE_GAP_MM) / 3.0).min(h);
            let side = (side_mm * px_per_mm).floor() as u32;
            (panorama.width, panorama.height) = (2 * side, side);
            (settings.width, settings.height) = (side, side);
            panorama.validate()?;
        }
        let standpoint = choose_view(&site, &args.view)?;
        let (sheets, _) = draw_sheets(&site, &standpoint, &panorama, None, args.out.dpi)?;
        let plan = plan_map(&site, std::slice::from_ref(&standpoint), &settings)?;
        let both = beside(&sheets[0], &plan.sheet(), BESIDE_GAP_MM)?;
        let sheet = match &paper {
            Some(paper) => both.on_paper(paper, args.margin).ok_or_else(|| {
                Error::Setting("the panorama and the plan do not fit the paper".into())
            })?,
            None => both,
        };
        (sheet, plan.labels_left_out)
    } else if let Some(paper) = &paper {
        let settings = PlanSettings {
            scale: settings.scale,
            ..PlanSettings::for_paper(paper, args.margin, args.out.dpi)
        };
        let plan = plan_map(&site, &site.standpoints, &settings)?;
        (plan.on_paper(paper, args.margin), plan.labels_left_out)
    } else {
        let plan = plan_map(&site, &site.standpoints, &settings)?;
        (plan.sheet(), plan.labels_left_out)
    };
    let written = write_one(&sheet, &args.out, &args.scene, "plan")?;
    if !args.out.quiet {
        if left_out > 0 {
            eprintln!(
                "pansite: {left_out} label{} left out for want of room",
                if left_out == 1 { "" } else { "s" }
            );
        }
        eprintln!(
            "pansite: wrote {written} ({:.0} x {:.0} mm)",
            sheet.width_mm, sheet.height_mm
        );
    }
    Ok(())
}
