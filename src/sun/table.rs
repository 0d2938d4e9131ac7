//! The sun's table (`pansite daylight`): for each day of a range, sunrise, transit and
//! sunset (or the sun up or down all day); the sun's azimuth and elevation at a step; and,
//! for a chosen item, the times each of its walls comes into and goes out of sun. As
//! aligned text, CSV (RFC 4180) or JSON, one flat table whose `event` column says what
//! each row is; the cautions come with every form.

use super::day::{wall_in_sun, walls, Sky, SunSample};
use super::hourly::Hourly;
use super::position::estimated_delta_t;
use super::CAUTIONS;
use crate::cores;
use crate::error::{Error, Result};
use crate::scene::{label_matches, offset_seconds_text, ItemId, Site};
use crate::visibility::Bvh;
use jiff::civil::Date;

/// The longest table, rows: a year at one-minute steps.
pub const MAX_ROWS: usize = 600_000;
/// Where a wall comes into or goes out of sun is found to this, seconds.
const WALL_TIME_TOLERANCE_S: f64 = 1.0;
/// An hour, seconds.
const HOUR_S: f64 = 3_600.0;
/// Degrees: how far an interpolated position may be from the whole algorithm's and still be
/// printed as it would (ten times the 1e-7 that `hourly.rs`'s year-long test holds it to).
const INTERPOLATION_MARGIN_DEG: f64 = 1e-6;
/// Printed elevations (degrees) about the refraction's cutoff: below it no refraction is
/// added, above it about 0.58 degrees, so the printed elevation steps from about -0.83 to
/// about -0.26, and an interpolated row could fall on the other side of the step.
const REFRACTION_STEP_DEG: std::ops::RangeInclusive<f64> = -1.0..=0.0;
/// Above this elevation (degrees) the azimuth turns faster than the sun moves, by 1 / cos
/// of the elevation: 1e-7 degrees of the sun's place could move it by more than the margin.
const STEEP_DEG: f64 = 84.0;

/// What the table lists.
#[derive(Clone, Debug, PartialEq)]
pub struct TableRequest {
    /// The first day listed.
    pub from: Date,
    /// The last day listed (the same as `from` for one day).
    pub to: Date,
    /// The step of the positions, seconds; `None` for no positions.
    pub step_s: Option<f64>,
    /// The label of the item whose walls are listed.
    pub item: Option<String>,
    /// Whether other items can keep the sun off the walls.
    pub blocking: bool,
}

/// One row: a local date and time, what happened, and where the sun was.
#[derive(Clone, Debug, PartialEq)]
pub struct SunRow {
    /// The local date.
    pub date: Date,
    /// Local clock time, `HH:MM:SS`; empty for a day without it.
    pub time: String,
    /// The offset from UT, `+HH:MM`.
    pub offset: String,
    /// `sunrise`, `transit`, `sunset`, `up all day`, `down all day`, `position`,
    /// `wall in sun`, `wall out of sun`.
    pub event: &'static str,
    /// Degrees clockwise from true north.
    pub azimuth_deg: Option<f64>,
    /// Degrees clockwise from the plan's y axis.
    pub plan_azimuth_deg: Option<f64>,
    /// Degrees above the horizontal, refraction included.
    pub elevation_deg: Option<f64>,
    /// For walls: which (`wall facing 135`).
    pub detail: String,
}

/// The rows of the table for `site`.
pub fn sun_table(site: &Site, sky: &Sky, request: &TableRequest) -> Result<Vec<SunRow>> {
    let days = request
        .from
        .until(request.to)
        .map_or(0, |span| span.get_days())
        + 1;
    if request.to < request.from {
        return Err(Error::Setting(format!(
            "the table ends ({}) before it starts ({})",
            request.to, request.from
        )));
    }
    if let Some(step) = request.step_s {
        let rows = days as f64 * 86_400.0 / step;
        if !(step.is_finite() && step >= 1.0) || rows > MAX_ROWS as f64 {
            return Err(Error::Setting(format!(
                "a step of {step} s over {days} days gives {rows:.0} rows: expected at most \
                 {MAX_ROWS} (a year at one-minute steps)"
            )));
        }
    }
    let item = request
        .item
        .as_deref()
        .map(|label| find_item(site, label))
        .transpose()?;
    let wall_list = item.map(|id| walls(site, id)).unwrap_or_default();
    if let (Some(label), true) = (&request.item, item.is_some() && wall_list.is_empty()) {
        return Err(Error::Setting(format!(
            "the item \"{label}\" has no walls (no upright faces) to light"
        )));
    }
    let bvh = (request.blocking && item.is_some()).then(|| Bvh::new(&site.faces));
    let north = sky.location.north_deg;
    // The days, then each day's rows on all cores, put back in the days' order.
    let mut dates = vec![request.from];
    while let Some(&date) = dates.last().filter(|&&d| d < request.to) {
        dates.push(
            date.tomorrow()
                .map_err(|e| Error::Sun(format!("the day after {date}: {e}")))?,
        );
    }
    let day_rows = |date: Date| -> Result<Vec<SunRow>> {
        let mut rows = Vec::new();
        let events = sky.events(date)?;
        for (event, sample) in [
            ("sunrise", events.rise),
            ("transit", events.transit),
            ("sunset", events.set),
        ] {
            if let Some(sample) = sample {
                rows.push(row(sky, &sample, event, String::new()));
            }
        }
        if let Some(up) = events.all_day {
            rows.push(SunRow {
                date,
                time: String::new(),
                offset: String::new(),
                event: if up { "up all day" } else { "down all day" },
                azimuth_deg: None,
                plan_azimuth_deg: None,
                elevation_deg: None,
                detail: String::new(),
            });
        }
        if let Some(step) = request.step_s {
            let (start, end) = sky.day_bounds(date)?;
            // More than a row an hour: the algorithm's slow part once an hour,
            // interpolated between (within 1e-7 degrees of the whole algorithm). A row
            // whose angles lie near where their printed digits change is worked out whole,
            // so the table prints exactly what the whole algorithm gives.
            let hourly = (step < HOUR_S)
                .then(|| Hourly::over(start, end, estimated_delta_t))
                .transpose()?;
            let mut t = start;
            while t < end {
                let sample = match &hourly {
                    Some(hourly) => {
                        let quick = sky.sample_between(hourly, t)?;
                        if interpolation_prints_true(&printed_angles(sky, &quick)) {
                            quick
                        } else {
                            sky.sample(t)?
                        }
                    }
                    None => sky.sample(t)?,
                };
                rows.push(row(sky, &sample, "position", String::new()));
                t += step;
            }
        }
        if let Some(id) = item {
            let (start, end) = sky.day_bounds(date)?;
            let step = request.step_s.unwrap_or(600.0).min(600.0);
            for wall in &wall_list {
                let lit = |t: f64| -> Result<bool> {
                    let sample = sky.sample(t)?;
                    let s = sample.place.direction(north);
                    Ok(wall_in_sun(site, wall, id, &s, bvh.as_ref()))
                };
                let detail = format!("wall facing {:.0}", wall.facing_deg);
                let mut before = (start, lit(start)?);
                let mut t = start;
                while t < end {
                    t = (t + step).min(end);
                    let now = lit(t)?;
                    if now != before.1 {
                        let (mut lo, mut hi) = (before.0, t);
                        while hi - lo > WALL_TIME_TOLERANCE_S {
                            let mid = 0.5 * (lo + hi);
                            if lit(mid)? == before.1 {
                                lo = mid;
                            } else {
                                hi = mid;
                            }
                        }
                        let event = if now {
                            "wall in sun"
                        } else {
                            "wall out of sun"
                        };
                        rows.push(row(sky, &sky.sample(hi)?, event, detail.clone()));
                    }
                    before = (t, now);
                }
            }
        }
        Ok(rows)
    };
    let mut rows = Vec::new();
    for day in cores::in_order(dates.len(), |k| day_rows(dates[k])) {
        rows.extend(day?);
    }
    Ok(rows)
}

fn find_item(site: &Site, label: &str) -> Result<ItemId> {
    site.items
        .iter()
        .position(|item| label_matches(item.label.as_deref(), label))
        .map(|i| ItemId(i as u32))
        .ok_or_else(|| Error::Setting(format!("the scene has no item labelled \"{label}\"")))
}

/// The angles a row prints: azimuth, plan azimuth and elevation, degrees.
fn printed_angles(sky: &Sky, sample: &SunSample) -> [f64; 3] {
    [
        sample.place.azimuth_deg,
        sample.place.plan_azimuth_deg(sky.location.north_deg),
        sample.place.elevation_deg,
    ]
}

fn row(sky: &Sky, sample: &SunSample, event: &'static str, detail: String) -> SunRow {
    let [azimuth, plan_azimuth, elevation] = printed_angles(sky, sample);
    SunRow {
        date: sample.local.date(),
        time: sample.local.strftime("%H:%M:%S").to_string(),
        offset: offset_seconds_text(sky.clock.offset_at(sample.instant_s)),
        event,
        azimuth_deg: Some(azimuth),
        plan_azimuth_deg: Some(plan_azimuth),
        elevation_deg: Some(elevation),
        detail,
    }
}

/// Whether a row interpolated between the hours prints as the whole algorithm's would: its
/// angles lie clear of where their digits change, the elevation clear of the refraction's
/// step at the horizon, and the sun not so near the zenith that its azimuth turns fast.
fn interpolation_prints_true(angles: &[f64; 3]) -> bool {
    let elevation = angles[2];
    !REFRACTION_STEP_DEG.contains(&elevation)
        && elevation <= STEEP_DEG
        && prints_the_same_within(angles, INTERPOLATION_MARGIN_DEG)
}

/// Whether every angle, moved by up to `margin` degrees either way, would still print the
/// same to 0.001: none lies that near a rounding boundary (a half thousandth), zero (where
/// the sign would change) or 360 (where an azimuth wraps to 0).
fn prints_the_same_within(angles: &[f64; 3], margin: f64) -> bool {
    angles.iter().all(|&value| {
        let thousandths = value * 1000.0;
        let from_half = (thousandths - thousandths.floor() - 0.5).abs();
        from_half >= margin * 1000.0 && value.abs() >= margin && (360.0 - value).abs() >= margin
    })
}

const COLUMNS: [&str; 8] = [
    "date",
    "time",
    "offset",
    "event",
    "azimuth",
    "plan_azimuth",
    "elevation",
    "detail",
];

fn cells(row: &SunRow) -> [String; 8] {
    let number = |v: Option<f64>| v.map_or(String::new(), |v| format!("{v:.3}"));
    [
        row.date.to_string(),
        row.time.clone(),
        row.offset.clone(),
        row.event.to_owned(),
        number(row.azimuth_deg),
        number(row.plan_azimuth_deg),
        number(row.elevation_deg),
        row.detail.clone(),
    ]
}

/// The heading lines of every form: the place, the zone and the cautions.
fn preamble(sky: &Sky) -> Vec<String> {
    let mut lines = vec![format!(
        "Sun at latitude {:.5}, longitude {:.5}, {:.0} m above sea level; local times in {}; \
         azimuths clockwise from true north (plan_azimuth: from the plan's y axis, true north \
         at {:.2}); elevations include refraction (NREL SPA).",
        sky.location.latitude_deg,
        sky.location.longitude_deg,
        sky.location.height_m,
        sky.clock.name(),
        sky.location.north_deg
    )];
    lines.extend(CAUTIONS.iter().map(|c| format!("CAUTION: {c}")));
    lines
}

/// An aligned text table, after the preamble.
pub fn table_text(sky: &Sky, rows: &[SunRow]) -> String {
    let mut out: String = preamble(sky).into_iter().map(|l| l + "\n").collect();
    out.push('\n');
    let all: Vec<[String; 8]> = std::iter::once(COLUMNS.map(str::to_owned))
        .chain(rows.iter().map(cells))
        .collect();
    let widths: Vec<usize> = (0..8)
        .map(|k| all.iter().map(|r| r[k].chars().count()).max().unwrap_or(0))
        .collect();
    for (i, cells) in all.iter().enumerate() {
        let line: Vec<String> = cells
            .iter()
            .zip(&widths)
            .enumerate()
            .map(|(k, (cell, &w))| {
                if (4..7).contains(&k) {
                    format!("{cell:>w$}")
                } else {
                    format!("{cell:<w$}")
                }
            })
            .collect();
        out.push_str(line.join("  ").trim_end());
        out.push('\n');
        if i == 0 {
            out.push_str(&"-".repeat(widths.iter().sum::<usize>() + 14));
            out.push('\n');
        }
    }
    out
}

/// CSV (RFC 4180): the preamble as `#` comment lines, a header, one line per row.
pub fn table_csv(sky: &Sky, rows: &[SunRow]) -> String {
    let quote = |field: &str| {
        if field.contains([',', '"', '\n', '\r']) {
            format!("\"{}\"", field.replace('"', "\"\""))
        } else {
            field.to_owned()
        }
    };
    let mut out = String::new();
    for line in preamble(sky) {
        out.push_str(&quote(&format!("# {line}")));
        out.push_str("\r\n");
    }
    out.push_str(&COLUMNS.join(","));
    out.push_str("\r\n");
    for row in rows {
        let line: Vec<String> = cells(row).iter().map(|c| quote(c)).collect();
        out.push_str(&line.join(","));
        out.push_str("\r\n");
    }
    out
}

/// JSON (RFC 8259, written by serde_json): the place, the zone, the cautions and `rows`
/// (numbers as numbers, missing ones `null`).
pub fn table_json(sky: &Sky, rows: &[SunRow]) -> String {
    let rows: Vec<serde_json::Value> = rows
        .iter()
        .map(|row| {
            let fields = COLUMNS
                .iter()
                .zip(cells(row))
                .enumerate()
                .map(|(k, (name, cell))| {
                    // Columns 4 to 6 are the angles; the others are words.
                    let value = if (4..7).contains(&k) {
                        cell.parse::<f64>()
                            .ok()
                            .and_then(serde_json::Number::from_f64)
                            .map_or(serde_json::Value::Null, serde_json::Value::Number)
                    } else {
                        serde_json::Value::String(cell)
                    };
                    (name.to_string(), value)
                });
            serde_json::Value::Object(fields.collect())
        })
        .collect();
    let table = serde_json::json!({
        "latitude": sky.location.latitude_deg,
        "longitude": sky.location.longitude_deg,
        "height": sky.location.height_m,
        "north": sky.location.north_deg,
        "time_zone": sky.clock.name(),
        "cautions": CAUTIONS,
        "rows": rows,
    });
    let mut out = serde_json::to_string_pretty(&table).expect("a JSON value always serialises");
    out.push('\n');
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::parse_scene;
    use std::path::Path;

    fn site() -> Site {
        let text = r#"Scene(
            location: (latitude: 51.5, longitude: -0.1, time_zone: "Europe/London"),
            items: [
                Block(label: "hall", at: Corner(0, 0), width: 10, depth: 6, height: 8),
                Block(label: "tower", at: Corner(2, -12), width: 4, depth: 4, height: 40),
            ],
        )"#;
        parse_scene(text.as_bytes(), Path::new("t.ron"), "t").unwrap()
    }

    fn request(item: Option<&str>, blocking: bool) -> TableRequest {
        TableRequest {
            from: "2026-03-20".parse().unwrap(),
            to: "2026-03-20".parse().unwrap(),
            step_s: None,
            item: item.map(str::to_owned),
            blocking,
        }
    }

    #[test]
    fn walls_come_into_sun_in_the_order_they_face() {
        let site = site();
        let sky = Sky::of_site(&site).unwrap();
        let rows = sun_table(&site, &sky, &request(Some("hall"), false)).unwrap();
        let first_lit = |facing: &str| {
            rows.iter()
                .find(|r| r.event == "wall in sun" && r.detail == format!("wall facing {facing}"))
                .map(|r| r.time.clone())
        };
        // Near the equinox the sun rises about due east: the east wall is lit from sunrise,
        // the south wall a little after, the west wall from about noon (common practice);
        // the north wall only early and late, if at all.
        let (east, south, west) = (
            first_lit("90").unwrap(),
            first_lit("180").unwrap(),
            first_lit("270").unwrap(),
        );
        assert!(east <= south && south < west, "{east} {south} {west}");
        assert!(("11:30:00".."12:30:00").contains(&west.as_str()), "{west}");
        // The tall tower south of the hall keeps the sun off its south wall for a while.
        let blocked = sun_table(&site, &sky, &request(Some("hall"), true)).unwrap();
        let changes = |rows: &[SunRow]| {
            rows.iter()
                .filter(|r| r.detail == "wall facing 180")
                .count()
        };
        assert!(changes(&blocked) > changes(&rows), "{blocked:?}");
    }

    #[test]
    fn a_year_at_ten_minutes_and_the_forms() {
        let site = site();
        let sky = Sky::of_site(&site).unwrap();
        let mut year = request(None, false);
        year.to = "2026-03-21".parse().unwrap();
        year.step_s = Some(600.0);
        let rows = sun_table(&site, &sky, &year).unwrap();
        // Two days of 144 positions each (no clock change), and three events a day.
        assert_eq!(rows.len(), 2 * (144 + 3));
        let text = table_text(&sky, &rows);
        assert!(text.contains("Never look at the sun") && text.contains("sunrise"));
        let csv = table_csv(&sky, &rows);
        assert_eq!(
            csv.lines().filter(|l| l.starts_with("2026-")).count(),
            rows.len()
        );
        let json: serde_json::Value = serde_json::from_str(&table_json(&sky, &rows)).unwrap();
        assert!(json["cautions"][0]
            .as_str()
            .unwrap()
            .contains("Never look at the sun"));
        let table = json["rows"].as_array().unwrap();
        assert_eq!(table.len(), rows.len());
        let transit = table
            .iter()
            .find(|r| r["event"] == "transit")
            .expect("a transit");
        assert!(transit["elevation"].as_f64().unwrap() > 0.0);
        assert!(sun_table(&site, &sky, &request(Some("nothing"), false)).is_err());
    }

    #[test]
    fn an_angle_near_where_its_printed_digits_change_is_found() {
        let with = |azimuth: f64, elevation: f64| [azimuth, azimuth, elevation];
        let margin = 1e-6;
        // Well inside a thousandth: "123.456" and "12.345" either way.
        assert!(prints_the_same_within(&with(123.4561, 12.3452), margin));
        // 12.3455 lies on the boundary between "12.345" and "12.346"; half a margin off it
        // is still too near, two margins off it is not.
        assert!(!prints_the_same_within(&with(123.4561, 12.3455), margin));
        assert!(!prints_the_same_within(
            &with(123.4561, 12.3455 + 0.5 * margin),
            margin
        ));
        assert!(prints_the_same_within(
            &with(123.4561, 12.3455 + 2.0 * margin),
            margin
        ));
        // Below the horizon the same ("-3.210" against "-3.211").
        assert!(!prints_the_same_within(&with(123.4561, -3.2105), margin));
        // At zero "-0.000" and "0.000" differ; at 360 an azimuth wraps to "0.000".
        assert!(!prints_the_same_within(&with(123.4561, 1e-8), margin));
        assert!(!prints_the_same_within(
            &with(359.999_999_9, 12.3452),
            margin
        ));
        // Near the horizon's refraction step and near the zenith, never.
        assert!(interpolation_prints_true(&with(123.4561, 12.3452)));
        assert!(!interpolation_prints_true(&with(123.4561, -0.2571)));
        assert!(!interpolation_prints_true(&with(123.4561, -0.8331)));
        assert!(interpolation_prints_true(&with(123.4561, -1.2571)));
        assert!(!interpolation_prints_true(&with(123.4561, 86.1234)));
        // Check of the boundaries themselves with Rust's own formatting.
        assert_ne!(
            format!("{:.3}", 12.3455 - 1e-7),
            format!("{:.3}", 12.3455 + 1e-7)
        );
        assert_ne!(format!("{:.3}", -1e-8), format!("{:.3}", 1e-8));
    }
}
