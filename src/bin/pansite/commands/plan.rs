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
    let (settings, panorama) = plan_settings(args)?;
    let sheet = if args.beside {
        let standpoint = choose_view(&site, &args.view)?;
        let (sheets, _) = draw_sheets(&site, &standpoint, &panorama, None, args.out.dpi)?;
        let plan = plan_map(&site, std::slice::from_ref(&standpoint), &settings)?;
        beside(&sheets[0], &plan.sheet(), BESIDE_GAP_MM)?
    } else if let Some(name) = &args.page {
        let paper = paper(name, args.portrait)?;
        if !(args.margin >= 0.0 && 2.0 * args.margin < paper.width_mm.min(paper.height_mm)) {
            return Err(Error::Setting(format!(
                "a margin of {} mm does not leave room on the paper",
                args.margin
            ))
            .into());
        }
        let settings = PlanSettings::for_paper(&paper, args.margin, args.out.dpi);
        plan_map(&site, &site.standpoints, &settings)?.on_paper(&paper, args.margin)
    } else {
        plan_map(&site, &site.standpoints, &settings)?.sheet()
    };
    let written = write_one(&sheet, &args.out, &args.scene, "plan")?;
    if !args.out.quiet {
        eprintln!(
            "pansite: wrote {written} ({:.0} x {:.0} mm)",
            sheet.width_mm, sheet.height_mm
        );
    }
    Ok(())
}
