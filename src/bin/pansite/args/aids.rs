//! The command-line flags of the drawing aids, and the `angles` command.

use super::render::ModelArgs;
use super::values::{parse_finite, parse_size};
use super::view::ViewArgs;
use clap::{Args, ValueEnum};
use pansite::scene::{Division, Fan, Pole, Slope, DEFAULT_FAN_STEP_DEG};
use std::path::PathBuf;

#[derive(Debug, Default, Args)]
#[command(next_help_heading = "Drawing aids (none is drawn with --bare)")]
pub struct AidArgs {
    /// Every aid: heavier lines every 30 degrees, labels, item labels, vanishing points.
    #[arg(long)]
    pub aids: bool,

    /// Spacing of the grid, degrees [default: 10].
    #[arg(long, value_name = "DEG", value_parser = parse_finite)]
    pub grid: Option<f64>,

    /// Every N-th grid line heavier, counted from north and from the horizon (0: none).
    #[arg(long, value_name = "N")]
    pub grid_major: Option<u32>,

    /// Azimuths, compass points, elevations and the heading written on the grid.
    #[arg(long)]
    pub labels: bool,

    /// Item labels near their items.
    #[arg(long)]
    pub item_labels: bool,

    /// The vanishing points of the site's principal directions, found from its edges.
    #[arg(long)]
    pub vanishing: bool,

    /// Mark the vanishing points of this horizontal direction (azimuth, degrees); repeatable.
    #[arg(long, value_name = "DEG", value_parser = parse_finite, allow_hyphen_values = true)]
    pub bearing: Vec<f64>,

    /// Mark the vanishing points of a direction climbing PITCH degrees towards BEARING.
    #[arg(long, value_name = "BEARING,PITCH", value_parser = parse_slope, allow_hyphen_values = true)]
    pub slope: Vec<Slope>,

    /// Great circles through the vanishing points of a horizontal direction, STEP degrees
    /// apart [default step: 10].
    #[arg(long, value_name = "BEARING[,STEP]", value_parser = parse_fan, allow_hyphen_values = true)]
    pub fan: Vec<Fan>,

    /// A vertical guide at this azimuth, degrees; repeatable.
    #[arg(long, value_name = "DEG", value_parser = parse_finite, allow_hyphen_values = true)]
    pub meridian: Vec<f64>,

    /// A measuring pole at X,Y (metres), ticks every STEP (1) up to HEIGHT (10).
    #[arg(long, value_name = "X,Y[,STEP[,HEIGHT]]", value_parser = parse_pole, allow_hyphen_values = true)]
    pub pole: Vec<Pole>,

    /// Divide the segment between two points into PARTS, extended EXTEND times beyond TO.
    #[arg(long, value_name = "X,Y,Z:X,Y,Z:PARTS[:EXTEND]", value_parser = parse_divide, allow_hyphen_values = true)]
    pub divide: Vec<Division>,

    /// Divide every straight edge of the items with this label into PARTS.
    #[arg(long, value_name = "LABEL:PARTS", value_parser = parse_divide_edges)]
    pub divide_edges: Vec<Division>,

    /// Cap height of the lettering, pixels [default: a hundredth of the image height].
    #[arg(long, value_name = "PX", value_parser = parse_finite)]
    pub text_height: Option<f64>,
}

/// How `angles` writes its table.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, ValueEnum)]
pub enum TableFormat {
    /// Aligned columns for reading.
    #[default]
    Text,
    /// Comma-separated values for a spreadsheet.
    Csv,
    /// JSON for programs.
    Json,
}

#[derive(Debug, Args)]
pub struct AnglesArgs {
    /// The scene file (RON), a model (Wavefront .obj), or - for a RON scene on standard input.
    pub scene: PathBuf,

    #[command(flatten)]
    pub model: ModelArgs,

    /// Where to write the table [default: standard output].
    #[arg(short, long, value_name = "FILE")]
    pub output: Option<PathBuf>,

    #[arg(long, value_enum, default_value = "text")]
    pub format: TableFormat,

    /// Only the items with this label (and its numbered copies).
    #[arg(long, value_name = "LABEL")]
    pub item: Option<String>,

    /// Only labelled points, no item corners.
    #[arg(long)]
    pub points: bool,

    /// Image size in pixels, WIDTHxHEIGHT, for the pixel columns.
    #[arg(long, value_name = "WxH", default_value = "4096x2048", value_parser = parse_size)]
    pub size: (u32, u32),

    /// Printed width of the whole panorama, millimetres, for the page columns
    /// (mm = px * this / image width).
    #[arg(long, value_name = "MM", value_parser = parse_positive)]
    pub page_width_mm: Option<f64>,

    #[command(flatten)]
    pub view: ViewArgs,

    /// With --date and --time: list the corners of the shadows' outlines too (item
    /// `shadows`).
    #[command(flatten)]
    pub sun: super::SunArgs,
}

fn parse_positive(text: &str) -> Result<f64, String> {
    let value = parse_finite(text)?;
    if value > 0.0 {
        Ok(value)
    } else {
        Err(format!("expected more than zero, found {value}"))
    }
}

/// Numbers separated by commas, between `min` and `max` of them.
fn numbers(text: &str, min: usize, max: usize, shape: &str) -> Result<Vec<f64>, String> {
    let values = text
        .split(',')
        .map(parse_finite)
        .collect::<Result<Vec<f64>, String>>()?;
    if (min..=max).contains(&values.len()) {
        Ok(values)
    } else {
        Err(format!("expected {shape}, found \"{text}\""))
    }
}

fn parse_slope(text: &str) -> Result<Slope, String> {
    let v = numbers(text, 2, 2, "BEARING,PITCH")?;
    if v[1].abs() >= 90.0 {
        return Err(format!(
            "expected a pitch between -90 and 90, found {}",
            v[1]
        ));
    }
    Ok(Slope {
        bearing_deg: v[0],
        pitch_deg: v[1],
    })
}

fn parse_fan(text: &str) -> Result<Fan, String> {
    let v = numbers(text, 1, 2, "BEARING or BEARING,STEP")?;
    let step_deg = v.get(1).copied().unwrap_or(DEFAULT_FAN_STEP_DEG);
    if !(step_deg > 0.0 && step_deg <= 90.0) {
        return Err(format!(
            "expected a step above 0 and at most 90 degrees, found {step_deg}"
        ));
    }
    Ok(Fan {
        direction: Slope {
            bearing_deg: v[0],
            pitch_deg: 0.0,
        },
        step_deg,
    })
}

fn parse_pole(text: &str) -> Result<Pole, String> {
    let v = numbers(text, 2, 4, "X,Y or X,Y,STEP or X,Y,STEP,HEIGHT")?;
    let step = v.get(2).copied().unwrap_or(1.0);
    let height = v.get(3).copied().unwrap_or(10.0);
    if step <= 0.0 || height <= 0.0 || height / step > 100_000.0 {
        return Err(format!(
            "expected a step and a height above zero, at most 100,000 ticks, found \"{text}\""
        ));
    }
    Ok(Pole {
        label: None,
        foot: nalgebra::Point3::new(v[0], v[1], 0.0),
        height,
        step,
        unit: 1.0,
    })
}

fn parse_count(text: &str, what: &str) -> Result<u32, String> {
    text.trim()
        .parse::<u32>()
        .ok()
        .filter(|n| (1..=100_000).contains(n))
        .ok_or_else(|| format!("expected {what} from 1 to 100000, found \"{text}\""))
}

fn parse_divide(text: &str) -> Result<Division, String> {
    let parts: Vec<&str> = text.split(':').collect();
    if !(3..=4).contains(&parts.len()) {
        return Err(format!(
            "expected X,Y,Z:X,Y,Z:PARTS[:EXTEND], found \"{text}\""
        ));
    }
    let point = |p: &str| -> Result<nalgebra::Point3<f64>, String> {
        let v = numbers(p, 3, 3, "X,Y,Z")?;
        Ok(nalgebra::Point3::new(v[0], v[1], v[2]))
    };
    let (from, to) = (point(parts[0])?, point(parts[1])?);
    if from == to {
        return Err("expected two different points".to_owned());
    }
    let extend = match parts.get(3) {
        Some(e) => e
            .trim()
            .parse::<u32>()
            .ok()
            .filter(|&e| e <= 1000)
            .ok_or_else(|| format!("expected EXTEND from 0 to 1000, found \"{e}\""))?,
        None => 0,
    };
    Ok(Division::Between {
        from,
        to,
        parts: parse_count(parts[2], "PARTS")?,
        extend,
    })
}

fn parse_divide_edges(text: &str) -> Result<Division, String> {
    let (label, parts) = text
        .rsplit_once(':')
        .ok_or_else(|| format!("expected LABEL:PARTS, found \"{text}\""))?;
    Ok(Division::Edges {
        item: label.to_owned(),
        parts: parse_count(parts, "PARTS")?,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn guides_from_text() {
        assert_eq!(parse_fan("30").unwrap().step_deg, 10.0);
        assert_eq!(parse_fan("-30,5").unwrap().direction.bearing_deg, -30.0);
        assert!(parse_fan("30,0").is_err() && parse_fan("30,5,1").is_err());
        assert!(parse_slope("30,95").is_err());
        let pole = parse_pole("4,-10,0.5").unwrap();
        assert_eq!((pole.step, pole.height, pole.foot.y), (0.5, 10.0, -10.0));
        assert!(parse_pole("4,10,0.0001,1000").is_err());
        assert!(matches!(
            parse_divide("0,0,0:10,0,0:4:2").unwrap(),
            Division::Between {
                parts: 4,
                extend: 2,
                ..
            }
        ));
        assert!(parse_divide("0,0,0:0,0,0:4").is_err());
        assert!(parse_divide("0,0,0:1,0,0:0").is_err());
        assert!(matches!(
            parse_divide_edges("hall: north:3").unwrap(),
            Division::Edges { ref item, parts: 3 } if item == "hall: north"
        ));
    }
}
