//! `pansite daylight`: sunrise, transit and sunset, the sun's place at a step, and when an
//! item's walls are in sun, with the cautions.

use super::common::{read_site, write_text};
use super::settings::daylight_request;
use crate::args::{DaylightArgs, TableFormat};
use pansite::sun::Sky;
use pansite::sun::{sun_table, table_csv, table_json, table_text};

/// `pansite daylight`.
pub fn daylight(args: &DaylightArgs) -> anyhow::Result<()> {
    let (site, _) = read_site(&args.scene, &args.model, None, true)?;
    let sky = Sky::of_site(&site)?;
    let request = daylight_request(args, &site)?;
    let rows = sun_table(&site, &sky, &request)?;
    let text = match args.format {
        TableFormat::Text => table_text(&sky, &rows),
        TableFormat::Csv => table_csv(&sky, &rows),
        TableFormat::Json => table_json(&sky, &rows),
    };
    write_text(&text, args.output.as_deref())
}
