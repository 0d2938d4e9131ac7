//! `pansite angles`: the table of angles, to plot points by hand on any printed grid.

use super::common::{choose_view, read_site, write_text};
use super::settings::{sun_choice, table_map};
use crate::args::{AnglesArgs, TableFormat};
use pansite::aids::{angle_table, to_csv, to_json, to_text, PagePlacement, TableChoice};
use pansite::sun::{with_shadows, Sky};
use pansite::Error;

/// `pansite angles`.
pub fn angles(args: &AnglesArgs) -> anyhow::Result<()> {
    let (site, _) = read_site(&args.scene, &args.model, args.view.at_latlon, false)?;
    // With a date and time, the shadows' outlines join the site as the item `shadows`.
    let site = match sun_choice(&args.sun)?.moment {
        None => site,
        Some(moment) => {
            let sky = Sky::of_site(&site)?;
            let sun = sky.at(&moment)?;
            if sun.place.elevation_deg <= 0.0 {
                eprintln!("pansite: the sun is below the horizon then: no shadows");
                site
            } else {
                with_shadows(&site, &sky.direction(&sun))
            }
        }
    };
    let standpoint = choose_view(&site, &args.view)?;
    let map = table_map(args)?;
    let choice = TableChoice {
        item: args.item.clone(),
        points_only: args.points,
    };
    let page = args.page_width_mm.map(PagePlacement::panorama_width);
    let rows = angle_table(&site, &standpoint, &map, page, &choice);
    if let Some(item) = &args.item {
        if rows.is_empty() {
            return Err(Error::Setting(format!(
                "no item labelled \"{item}\" has a point or a corner"
            ))
            .into());
        }
    }
    let text = match args.format {
        TableFormat::Text => to_text(&rows),
        TableFormat::Csv => to_csv(&rows),
        TableFormat::Json => to_json(&rows, &standpoint, &map),
    };
    write_text(&text, args.output.as_deref())
}
