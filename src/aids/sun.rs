//! The sun on the underlay: its mark at the chosen time, the day's path with a tick at
//! every whole hour of local time, and the paths of the solstices and the equinox (the
//! trade's sun-path diagram, drawn in the sheet's own projection), each on a layer of its
//! own. The path is drawn as short great-circle arcs between positions two minutes apart:
//! the sun's daily circle leaves such a chord by less than 0.001 degrees.
//!
//! The hour labels are [`Label`]s for the one label placer (`aids::over`), like every other
//! label: above the hour's tick, or below or beside it when that is taken, or left out.

use super::marks::ring;
use super::strokes;
use crate::drawing::{Align, Label, LabelKind, Layer, Spot};
use crate::error::Result;
use crate::plane::image_of_direction;
use crate::plane::{Flattener, ImagePoint, PolylineSet};
use crate::scene::LocalMoment;
use crate::sphere::{SphereCurve, ViewFrame};
use crate::sun::Sky;
use jiff::civil::Date;

/// Layer names.
pub const SUN: &str = "sun";
/// The day's path.
pub const SUN_PATH: &str = "sun path";
/// The hour ticks and their labels.
pub const SUN_HOURS: &str = "sun hours";
/// The paths of the solstices and the equinox.
pub const SUN_SEASONS: &str = "sun paths of the solstices and equinox";

/// The step between drawn positions of a path, seconds.
const PATH_STEP_S: f64 = 120.0;
/// The path is drawn down to this elevation (degrees): a little below the horizon, where
/// refraction still lifts the sun into sight.
const LOWEST_DEG: f64 = -1.0;

/// What of the sun to draw.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct SunDrawing {
    /// The sun's mark at this local date and time, and (with `path`) that day's path.
    pub moment: Option<LocalMoment>,
    /// The day's path and its hours.
    pub path: bool,
    /// The paths at the solstices and the March equinox of the moment's year.
    pub seasons: bool,
}

/// The sun's layers for `sky` seen from `view`, and the hours' labels for the placer.
pub fn sun_layers(
    sky: &Sky,
    view: &ViewFrame,
    flattener: &mut Flattener,
    drawing: &SunDrawing,
    text: f64,
) -> Result<(Vec<Layer>, Vec<Label>)> {
    let mut layers = Vec::new();
    let mut labels = Vec::new();
    let Some(moment) = drawing.moment else {
        return Ok((layers, labels));
    };
    let map = flattener.map();
    if drawing.seasons {
        let mut lines = PolylineSet::new();
        for date in sky.seasons(moment.date.year())? {
            path(sky, view, flattener, date, &mut lines)?;
        }
        push(&mut layers, SUN_SEASONS, strokes::GRID_MAJOR, lines);
    }
    if drawing.path {
        let mut lines = PolylineSet::new();
        path(sky, view, flattener, moment.date, &mut lines)?;
        push(&mut layers, SUN_PATH, strokes::MERIDIANS, lines);
        let mut ticks = PolylineSet::new();
        let (start, end) = sky.day_bounds(moment.date)?;
        for sample in sky.span(start, end, 60.0)? {
            let local = sample.local;
            if local.minute() != 0 || sample.place.elevation_deg < LOWEST_DEG {
                continue;
            }
            let at = image_of_direction(view, &map, &sky.direction(&sample));
            hour_tick(at, text, &mut ticks);
            labels.push(hour_label(format!("{:02}", local.hour()), at, text));
        }
        push(&mut layers, SUN_HOURS, strokes::MARKS, ticks);
    }
    let now = sky.at(&moment)?;
    if now.place.elevation_deg >= LOWEST_DEG {
        let mut mark = PolylineSet::new();
        let at = image_of_direction(view, &map, &sky.direction(&now));
        sun_mark(at, text, &mut mark);
        push(&mut layers, SUN, strokes::MARKS, mark);
    }
    Ok((layers, labels))
}

/// The day's path above [`LOWEST_DEG`], as great-circle pieces between close positions.
fn path(
    sky: &Sky,
    view: &ViewFrame,
    flattener: &mut Flattener,
    date: Date,
    out: &mut PolylineSet,
) -> Result<()> {
    let samples = sky.day(date, PATH_STEP_S)?;
    for pair in samples.windows(2) {
        if pair.iter().any(|s| s.place.elevation_deg < LOWEST_DEG) {
            continue;
        }
        let [a, b] = [&pair[0], &pair[1]].map(|s| view.direction_to_view(&sky.direction(s)));
        if let Some(arc) = SphereCurve::great_arc(&a, &b) {
            flattener.flatten(&arc, out);
        }
    }
    Ok(())
}

/// Half the length of an hour's tick, in cap heights of the lettering.
const TICK_HALF: f64 = 0.6;

/// An upright tick through the sun's place at an hour.
fn hour_tick(at: ImagePoint, text: f64, out: &mut PolylineSet) {
    let half = TICK_HALF * text;
    out.push(&[
        ImagePoint::new(at.x, at.y - half),
        ImagePoint::new(at.x, at.y + half),
    ]);
}

/// An hour's label, anchored at the sun's place: above its tick, else below it, else to
/// the right or the left of it (0.8 of the lettering's height).
fn hour_label(words: String, at: ImagePoint, text: f64) -> Label {
    let h = 0.8 * text;
    let half = TICK_HALF * text;
    let gap = 0.3 * h;
    Label::fixed(words, at, LabelKind::SunHour, h, Align::Middle).with_spots(vec![
        Spot::new(0.0, -half - gap, Align::Middle),
        Spot::new(0.0, half + gap + h, Align::Middle),
        Spot::new(gap + 0.2 * h, 0.5 * h, Align::Start),
        Spot::new(-gap - 0.2 * h, 0.5 * h, Align::End),
    ])
}

/// The sun's mark: a ring the size of a capital letter with eight short rays.
fn sun_mark(at: ImagePoint, text: f64, out: &mut PolylineSet) {
    let r = 0.6 * text;
    ring(at, r, out);
    for k in 0..8 {
        let t = std::f64::consts::TAU * k as f64 / 8.0;
        let (c, s) = (t.cos(), t.sin());
        out.push(&[
            ImagePoint::new(at.x + 1.4 * r * c, at.y + 1.4 * r * s),
            ImagePoint::new(at.x + 2.0 * r * c, at.y + 2.0 * r * s),
        ]);
    }
}

fn push(layers: &mut Vec<Layer>, name: &str, stroke: crate::drawing::Stroke, lines: PolylineSet) {
    if !lines.is_empty() {
        layers.push(Layer {
            filled: false,
            name: name.to_owned(),
            stroke,
            lines,
            text: None,
        });
    }
}
