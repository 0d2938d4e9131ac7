//! The sun at the site: where it stands at a date and local time, its paths over a day,
//! when an item's walls are lit, and the outlines of the shadows the site's solids cast.
//!
//! - [`clock`]: dates and local times, resolved in the IANA time-zone database bundled
//!   with `jiff`; times skipped or repeated by a clock change are refused with the valid
//!   ones named;
//! - [`position`]: the sun's apparent azimuth and elevation by NREL's Solar Position
//!   Algorithm (the `solar-positioning` crate), and its direction in the plan's frame;
//! - [`hourly`]: the algorithm's slow part once an hour, interpolated, for the table's
//!   many rows;
//! - [`day`]: a day's path at a step, sunrise, transit and sunset, the solstices and
//!   equinoxes, and the times an item's walls are in sun (`pansite sun`);
//! - [`shadow`]: the shadows' outlines on the ground and on the faces, as edges in the site
//!   frame, drawn (and hidden) like every other edge.
//!
//! Headings, azimuth labels and compass letters stay measured from the plan's y axis; only
//! the sun uses the `location`'s bearing of true north.

mod boxes;
mod clock;
mod cones;
mod day;
mod hourly;
mod position;
mod shadow;
mod table;
mod tone;

pub use clock::{Clock, LocalMoment};
pub use day::{wall_in_sun, walls, DayEvents, Sky, SunSample, Wall};
pub use position::{
    across_rays, decimal_year, estimated_delta_t, sun_place, sun_place_with, Air, SunPlace,
};
pub use shadow::{
    hatching, shadow_outlines, with_shadows, with_shadows_and_hatching, ShadowLine,
    BREAK_TOLERANCE_M, HATCHING, SAMPLE_STEP_M, SHADOWS,
};
pub use table::{sun_table, table_csv, table_json, table_text, SunRow, TableRequest, MAX_ROWS};
pub use tone::seen_shade;

/// The cautions that go with every sun table and the README: said once, here.
pub const CAUTIONS: [&str; 2] = [
    "Never look at the sun, directly or through any optics (binoculars, camera, telescope).",
    "Sun and shadows come from the model alone: trees, unmodelled buildings and distant \
     terrain are not in it. They are a guide for a drawing, not a survey, a rights-to-light \
     or a planning assessment, for which local rules and licensed practice apply.",
];
