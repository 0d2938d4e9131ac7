//! The title block: what the sheet shows (scene, standpoint, date), its scale and a scale
//! bar, a north key and a legend of the line kinds, laid out for the paper: the fields wrap to the
//! width there is, at a cap height never below 2 mm, so that the block fits any sheet from
//! A6 portrait to A0 and ASME E.

use crate::drawing::{
    label_layers, line_pitch, north_key, north_key_half_extent, text_width, Align, Label, LabelInk,
    LabelKind, LabelPlacer, Layer, Stroke,
};
use crate::plane::{ImagePoint, PolylineSet, Rect};
use crate::scene::{Site, Standpoint};

/// Cap height of the title lettering, millimetres: 2.5 mm, a preferred size of ISO 3098
/// (from memory), and never below [`MIN_LETTER_MM`].
pub const LETTER_MM: f64 = 2.5;
/// The smallest cap height the block is written at, millimetres (the floor; 2.0 mm is
/// also a preferred ISO 3098 size, from memory).
pub const MIN_LETTER_MM: f64 = 2.0;
/// Gap between the panorama's frame and the block, millimetres.
pub const GAP_MM: f64 = 3.0;
/// Length of a legend's sample line, millimetres.
const SAMPLE_MM: f64 = 6.0;

/// The line kinds a legend shows: its words, and how its sample is drawn (ink and whether
/// dashed). The inks are the panorama's own (see [`crate::aids::strokes`] and the render).
pub const LEGEND: [(&str, f64, bool); 5] = [
    ("SEEN", 1.0, false),
    ("HIDDEN", 0.4, true),
    ("GRID", 0.22, false),
    ("HORIZON", 0.5, false),
    ("AIDS", 0.75, false),
];

/// What a title block says: its fields (each wrapped to the width there is), and its north
/// key.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct TitleText {
    /// The fields, in order.
    pub fields: Vec<String>,
    /// The bearing of true north from plan north that the block's north key shows,
    /// degrees clockwise (0 when the plan's north is true north); `None`: no key, for a
    /// sheet whose drawing carries its own (a plan).
    pub north_key: Option<f64>,
}

impl From<Vec<String>> for TitleText {
    /// Fields of a scene whose plan north is true north, with the key.
    fn from(fields: Vec<String>) -> TitleText {
        TitleText {
            fields,
            north_key: Some(0.0),
        }
    }
}

/// The north key's ring radius, in cap heights.
const KEY_RADIUS: f64 = 1.6;

/// The block's rows, wrapped to a width, and its height.
#[derive(Clone, Debug, PartialEq)]
pub struct TitleLayout {
    /// Cap height, millimetres.
    pub letter_mm: f64,
    /// The rows of text, wrapped to fit.
    pub rows: Vec<String>,
    /// The legend's entries, in rows.
    pub legend_rows: Vec<Vec<usize>>,
    /// Width of the column of text (left of the scale bar), millimetres.
    pub text_width_mm: f64,
    /// The whole block, millimetres.
    pub width_mm: f64,
    /// The whole block's height, millimetres.
    pub height_mm: f64,
    /// Room kept at the right for the scale bar, millimetres.
    pub bar_box_mm: f64,
    /// Room kept left of the scale bar for the north key, millimetres (0: no key).
    pub key_box_mm: f64,
    /// The bearing of true north from plan north the key shows, degrees clockwise; `None`:
    /// no key.
    pub north_key: Option<f64>,
}

impl TitleLayout {
    /// The same rows in a block as tall as `planned` (the page was placed with it).
    pub fn with_height_of(mut self, planned: &TitleLayout) -> TitleLayout {
        self.height_mm = self.height_mm.max(planned.height_mm);
        self
    }
}

/// Lays the block out in `width_mm`, its scale bar at most `bar_mm` long (none for a
/// sheet without one scale of degrees: a plan, a sheet of thumbnails), the north key left
/// of the bar.
pub fn title_layout(text: &TitleText, width_mm: f64, bar_mm: Option<f64>) -> TitleLayout {
    let letter_mm = if width_mm < 120.0 {
        MIN_LETTER_MM
    } else {
        LETTER_MM
    };
    let bar_box_mm = bar_mm.map_or(0.0, |bar| bar + 4.0 * letter_mm);
    let (key_half_w, key_half_h) = text.north_key.map_or((0.0, 0.0), |bearing| {
        north_key_half_extent(KEY_RADIUS * letter_mm, letter_mm, bearing)
    });
    let key_box_mm = if text.north_key.is_some() {
        2.0 * key_half_w + letter_mm
    } else {
        0.0
    };
    let text_width_mm =
        (width_mm - bar_box_mm - key_box_mm - 2.0 * letter_mm).max(20.0 * letter_mm);
    let mut rows = Vec::new();
    for field in &text.fields {
        rows.extend(wrap(field, text_width_mm, letter_mm));
    }
    // Legend entries: a sample line and the words, as many to a row as fit.
    let mut legend_rows: Vec<Vec<usize>> = vec![Vec::new()];
    let mut used = 0.0;
    for (k, (words, ..)) in LEGEND.iter().enumerate() {
        let entry = legend_entry_mm(words, letter_mm);
        if used + entry > text_width_mm && !legend_rows.last().is_some_and(Vec::is_empty) {
            legend_rows.push(Vec::new());
            used = 0.0;
        }
        if let Some(row) = legend_rows.last_mut() {
            row.push(k);
        }
        used += entry;
    }
    let pitch = line_pitch(letter_mm) + 0.4 * letter_mm;
    let text_rows = rows.len() + legend_rows.len();
    // The scale bar needs three rows of its own at the right, the key its whole height.
    let key_rows = ((2.0 * key_half_h - 0.5 * letter_mm) / pitch).ceil() as usize;
    let least_rows = if bar_mm.is_some() { 3 } else { 1 }.max(key_rows);
    let height_mm = pitch * text_rows.max(least_rows) as f64 + 0.5 * letter_mm;
    TitleLayout {
        letter_mm,
        rows,
        legend_rows,
        text_width_mm,
        width_mm,
        height_mm,
        bar_box_mm,
        key_box_mm,
        north_key: text.north_key,
    }
}

/// A legend entry's width: sample, gap, words, and the gap before the next.
fn legend_entry_mm(words: &str, letter_mm: f64) -> f64 {
    SAMPLE_MM + letter_mm + text_width(words, letter_mm) + 2.0 * letter_mm
}

/// A field broken at spaces into rows no wider than `width_mm` (a word wider than that is
/// broken between its characters).
pub fn wrap(field: &str, width_mm: f64, letter_mm: f64) -> Vec<String> {
    let fits = |s: &str| text_width(s, letter_mm) + 0.1 * letter_mm <= width_mm;
    let mut rows: Vec<String> = Vec::new();
    let mut row = String::new();
    for word in field.split_whitespace() {
        let candidate = if row.is_empty() {
            word.to_owned()
        } else {
            format!("{row} {word}")
        };
        if fits(&candidate) {
            row = candidate;
            continue;
        }
        if !row.is_empty() {
            rows.push(std::mem::take(&mut row));
        }
        for c in word.chars() {
            let longer = format!("{row}{c}");
            if !fits(&longer) && !row.is_empty() {
                rows.push(std::mem::take(&mut row));
            }
            row.push(c);
        }
    }
    if !row.is_empty() {
        rows.push(row);
    }
    rows
}

/// The drawn block: its labels (placed by a [`LabelPlacer`] over the block's box, so they
/// are whole and apart), the scale bar and the legend's samples; `px` pixels a millimetre,
/// the block's top-left corner at `origin`, the panorama's scale `mm_per_degree` (none: no
/// scale bar).
pub struct TitleBlock {
    /// The lettering, placed.
    pub labels: Vec<crate::drawing::PlacedLabel>,
    /// The scale bar's strokes.
    pub bar: PolylineSet,
    /// The north key's strokes (its words are among the labels).
    pub key: PolylineSet,
    /// Legend samples, one polyline set per entry of [`LEGEND`].
    pub samples: Vec<(Stroke, PolylineSet)>,
    /// The block's box, and the scale bar's, pixels.
    pub bounds: Rect,
    /// The scale bar's box, pixels.
    pub bar_bounds: Rect,
    /// Labels left out for want of room.
    pub left_out: usize,
}

/// Draws the block laid out by `layout` (see [`TitleBlock`]).
pub fn title_block(
    layout: &TitleLayout,
    origin: ImagePoint,
    px: f64,
    mm_per_degree: Option<f64>,
) -> TitleBlock {
    let h = layout.letter_mm * px;
    let pitch = (line_pitch(layout.letter_mm) + 0.4 * layout.letter_mm) * px;
    let bounds = Rect::from_ltrb(
        origin.x,
        origin.y,
        origin.x + layout.width_mm * px,
        origin.y + layout.height_mm * px,
    );
    // The scale bar at the right of the block, ticked every degree, in a box of its own.
    let right = bounds.right - h;
    let y = origin.y + 1.6 * pitch;
    let mut bar_lines = PolylineSet::new();
    let mut bar_bounds = Rect::from_ltrb(right, y, right, y);
    let mut labels = Vec::new();
    if let Some(mm_per_degree) = mm_per_degree {
        let bar = 10.0 * mm_per_degree * px;
        bar_lines.push(&[ImagePoint::new(right - bar, y), ImagePoint::new(right, y)]);
        for degree in 0..=10 {
            let x = right - bar + bar * degree as f64 / 10.0;
            let tick = if degree % 5 == 0 { h } else { h / 2.0 };
            bar_lines.push(&[ImagePoint::new(x, y), ImagePoint::new(x, y - tick)]);
        }
        bar_bounds = Rect::from_ltrb(right - bar, y - h, right, y).grown(0.3 * h);
        labels.push(Label::fixed(
            "10\u{b0}",
            ImagePoint::new(right, y + 1.4 * h),
            LabelKind::Title,
            h,
            Align::End,
        ));
    }
    let mut placer = LabelPlacer::new(bounds, 0.0);
    if mm_per_degree.is_some() {
        placer.block(bar_bounds);
    }
    // The letters' ink reaches half a stroke (about h / 20) beyond their box; kept in from
    // the block's edge by more than that, or the placer, which keeps every label whole
    // inside its area, leaves the rows out.
    let inset = 0.1 * h;
    let left = origin.x + inset;
    let first = origin.y + h + inset;
    for (row, text) in layout.rows.iter().enumerate() {
        labels.push(Label::fixed(
            text.clone(),
            ImagePoint::new(left, first + row as f64 * pitch),
            LabelKind::Title,
            h,
            Align::Start,
        ));
    }
    let mut samples = Vec::new();
    for (r, entries) in layout.legend_rows.iter().enumerate() {
        let baseline = first + (layout.rows.len() + r) as f64 * pitch;
        let mut x = left;
        for &k in entries {
            let (words, opacity, dashed) = LEGEND[k];
            let mid = baseline - 0.5 * h;
            let mut lines = PolylineSet::new();
            let sample = SAMPLE_MM * px;
            if dashed {
                let dash = sample / 5.0;
                for d in (0..5).step_by(2) {
                    let a = x + d as f64 * dash;
                    lines.push(&[ImagePoint::new(a, mid), ImagePoint::new(a + dash, mid)]);
                }
            } else {
                lines.push(&[ImagePoint::new(x, mid), ImagePoint::new(x + sample, mid)]);
            }
            samples.push((Stroke::black(opacity, (0.25 * px).max(1.0)), lines));
            labels.push(Label::fixed(
                words,
                ImagePoint::new(x + sample + h, baseline),
                LabelKind::Title,
                h,
                Align::Start,
            ));
            x += legend_entry_mm(words, layout.letter_mm) * px;
        }
    }
    // The north key, centred in its box between the text and the scale bar.
    let mut key_lines = PolylineSet::new();
    if let Some(bearing) = layout.north_key {
        let centre = ImagePoint::new(
            bounds.right - (layout.bar_box_mm + 0.5 * layout.key_box_mm) * px,
            0.5 * (bounds.top + bounds.bottom),
        );
        let key = north_key(centre, KEY_RADIUS * h, h, bearing);
        key_lines = key.lines;
        labels.extend(key.labels);
    }
    // Every word offered and not placed counts as left out, also one whose anchor fell
    // outside the block (which the placer passes over without counting).
    let offered = labels.len();
    placer.place(labels);
    let placed = placer.finish();
    TitleBlock {
        left_out: offered - placed.labels.len(),
        labels: placed.labels,
        bar: bar_lines,
        key: key_lines,
        samples,
        bounds,
        bar_bounds,
    }
}

/// The drawn block as layers: the scale bar, the legend's samples and the lettering, all
/// in the block's ink.
pub fn title_layers(block: TitleBlock, px: f64) -> Vec<Layer> {
    let stroke = Stroke::black(0.9, (0.25 * px).max(1.0));
    let mut layers = Vec::new();
    if !block.bar.is_empty() {
        layers.push(Layer {
            filled: false,
            text: None,
            name: "scale bar".to_owned(),
            stroke,
            lines: block.bar,
        });
    }
    if !block.key.is_empty() {
        layers.push(Layer {
            filled: false,
            text: None,
            name: "north key".to_owned(),
            stroke,
            lines: block.key,
        });
    }
    for (stroke, lines) in block.samples {
        layers.push(Layer {
            filled: false,
            text: None,
            name: "legend".to_owned(),
            stroke,
            lines,
        });
    }
    let ink = LabelInk {
        stroke,
        halo_px: None,
    };
    layers.extend(label_layers(&block.labels, ink));
    layers
}

/// The title block's lines for a drawing of `site` from `standpoint`, dated `date`
/// (year, month, day).
pub fn title_lines(site: &Site, standpoint: &Standpoint, date: (i64, u32, u32)) -> TitleText {
    let (year, month, day) = date;
    let mut lines = vec![
        format!("{}: STANDPOINT {}", site.name, standpoint.name),
        format!(
            "HEADING {:.1}\u{b0}  PITCH {:.1}\u{b0}  ROLL {:.1}\u{b0}  EYE {:.2} M ABOVE GROUND AT {:.2} M, AT ({:.2}, {:.2})",
            standpoint.heading.to_degrees().rem_euclid(360.0),
            standpoint.pitch.to_degrees(),
            standpoint.roll.to_degrees(),
            standpoint.eye_height,
            standpoint.ground,
            standpoint.x,
            standpoint.y
        ),
        format!("DRAWN {year:04}-{month:02}-{day:02} WITH PANSITE"),
    ];
    lines.extend(north_line(site));
    if let Some(sun) = &site.sun {
        lines.push(format!(
            "SUN AND SHADOWS AT {} {} LOCAL TIME ({}) FROM THE MODEL ALONE",
            sun.date.0,
            sun.time.0.strftime("%H:%M"),
            site.location
                .as_ref()
                .and_then(|l| l.time_zone.as_deref())
                .unwrap_or("UTC")
        ));
    }
    with_north(site, lines)
}

/// `fields` with a north key showing the bearing of true north of `site`.
fn with_north(site: &Site, fields: Vec<String>) -> TitleText {
    TitleText {
        fields,
        north_key: Some(site.location.as_ref().map_or(0.0, |l| l.north_deg)),
    }
}

/// Where true north lies, when the scene's `location` turns it from plan north.
fn north_line(site: &Site) -> Option<String> {
    let north = site.location.as_ref()?.north_deg.rem_euclid(360.0);
    (north != 0.0).then(|| {
        format!(
            "TRUE NORTH {north:.1}\u{b0} CLOCKWISE FROM PLAN NORTH (HEADINGS FROM PLAN NORTH; THE SUN FROM TRUE NORTH)"
        )
    })
}

/// The standpoints' names in one field, the first few and a count of the rest.
fn standpoint_names(standpoints: &[Standpoint]) -> String {
    const SHOWN: usize = 8;
    let names: Vec<&str> = standpoints
        .iter()
        .take(SHOWN)
        .map(|s| s.name.as_str())
        .collect();
    let word = if standpoints.len() == 1 {
        "STANDPOINT"
    } else {
        "STANDPOINTS"
    };
    let mut field = format!("{word} {}", names.join(", "));
    if standpoints.len() > SHOWN {
        field.push_str(&format!(" AND {} MORE", standpoints.len() - SHOWN));
    }
    field
}

/// The title block's lines for a plan of `site` with `standpoints` marked, printed at 1 : N
/// (`scale`) and `dpi`, dated `date`.
pub fn plan_title_lines(
    site: &Site,
    standpoints: &[Standpoint],
    scale: f64,
    dpi: f64,
    date: (i64, u32, u32),
) -> TitleText {
    let (year, month, day) = date;
    let mut lines = vec![
        format!("{}: PLAN", site.name),
        standpoint_names(standpoints),
        format!("SCALE 1:{scale:.0} PRINTED AT {dpi:.0} DPI; PLAN NORTH UP THE SHEET"),
        format!("DRAWN {year:04}-{month:02}-{day:02} WITH PANSITE"),
    ];
    lines.extend(north_line(site));
    // The plan draws its own key.
    TitleText {
        fields: lines,
        north_key: None,
    }
}

/// The title block's lines for a sheet of thumbnails of `site`, one for each standpoint.
pub fn sheet_title_lines(
    site: &Site,
    standpoints: &[Standpoint],
    date: (i64, u32, u32),
) -> TitleText {
    let (year, month, day) = date;
    let mut lines = vec![
        format!("{}: {} VIEWS", site.name, standpoints.len()),
        standpoint_names(standpoints),
        format!("DRAWN {year:04}-{month:02}-{day:02} WITH PANSITE"),
    ];
    lines.extend(north_line(site));
    with_north(site, lines)
}

/// Today's date (UTC), or the date of `SOURCE_DATE_EPOCH` when that is set (the usual way
/// to ask for reproducible output).
pub fn today() -> (i64, u32, u32) {
    let seconds = std::env::var("SOURCE_DATE_EPOCH")
        .ok()
        .and_then(|s| s.trim().parse::<i64>().ok())
        .unwrap_or_else(|| {
            std::time::SystemTime::now()
                .duration_since(std::time::UNIX_EPOCH)
                .map_or(0, |d| d.as_secs() as i64)
        });
    civil_date(seconds.div_euclid(86_400))
}

/// The proleptic Gregorian date of a day counted from 1970-01-01 (Howard Hinnant,
/// "chrono-Compatible Low-Level Date Algorithms", `civil_from_days`).
pub fn civil_date(days: i64) -> (i64, u32, u32) {
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let day_of_era = z.rem_euclid(146_097);
    let year_of_era =
        (day_of_era - day_of_era / 1460 + day_of_era / 36_524 - day_of_era / 146_096) / 365;
    let day_of_year = day_of_era - (365 * year_of_era + year_of_era / 4 - year_of_era / 100);
    let month_index = (5 * day_of_year + 2) / 153;
    let day = (day_of_year - (153 * month_index + 2) / 5 + 1) as u32;
    let month = if month_index < 10 {
        month_index + 3
    } else {
        month_index - 9
    } as u32;
    let year = year_of_era + era * 400 + i64::from(month <= 2);
    (year, month, day)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn civil_dates_of_known_days() {
        // 1970-01-01 is day 0; 2000-03-01 is day 11017; 2026-12-02 is day 20789 (counted
        // with the algorithm's own inverse, `days_from_civil`, in the same paper).
        assert_eq!(civil_date(0), (1970, 1, 1));
        assert_eq!(civil_date(11_017), (2000, 3, 1));
        assert_eq!(civil_date(20_789), (2026, 12, 2));
        assert_eq!(civil_date(-1), (1969, 12, 31));
    }

    #[test]
    fn fields_wrap_to_the_width() {
        let field = "HEADING 45.0\u{b0}  PITCH 0.0\u{b0}  ROLL 0.0\u{b0}  EYE 1.60 M ABOVE GROUND";
        let rows = wrap(field, 60.0, 2.0);
        assert!(rows.len() > 1, "{rows:?}");
        for row in &rows {
            assert!(text_width(row, 2.0) <= 60.0, "{row}");
        }
        assert_eq!(
            rows.join(" "),
            field.split_whitespace().collect::<Vec<_>>().join(" ")
        );
    }

    #[test]
    fn narrow_paper_gets_the_smallest_letters_and_more_rows() {
        let fields = vec!["A LONG SCENE NAME: STANDPOINT AT THE NORTH GATE".to_owned()];
        let fields = TitleText::from(fields);
        let narrow = title_layout(&fields, 85.0, Some(25.0));
        let wide = title_layout(&fields, 400.0, Some(100.0));
        assert_eq!(narrow.letter_mm, MIN_LETTER_MM);
        assert_eq!(wide.letter_mm, LETTER_MM);
        assert!(narrow.rows.len() > wide.rows.len());
    }

    #[test]
    fn rows_without_room_are_counted_as_left_out() {
        // A block cut to two pitches of height keeps what fits and counts the rest: the
        // placer never draws a row over the block's edge.
        let fields = TitleText::from(vec![
            "FIRST ROW".to_owned(),
            "SECOND ROW".to_owned(),
            "THIRD ROW".to_owned(),
        ]);
        let full = title_layout(&fields, 300.0, None);
        let whole = title_block(&full, ImagePoint::new(0.0, 0.0), 10.0, None);
        assert_eq!(whole.left_out, 0);
        let pitch = line_pitch(full.letter_mm) + 0.4 * full.letter_mm;
        let cut = TitleLayout {
            height_mm: 2.0 * pitch,
            ..full.clone()
        };
        let block = title_block(&cut, ImagePoint::new(0.0, 0.0), 10.0, None);
        let kept: Vec<&str> = block.labels.iter().map(|l| l.text.as_str()).collect();
        assert!(
            kept.contains(&"FIRST ROW") && kept.contains(&"SECOND ROW"),
            "{kept:?}"
        );
        assert!(!kept.contains(&"THIRD ROW"));
        let offered = 3 + LEGEND.len() + 1; // the rows, the legend's words and the key's "N"
        assert_eq!(block.labels.len() + block.left_out, offered);
        assert!(block.left_out > LEGEND.len(), "{}", block.left_out);
    }
}
