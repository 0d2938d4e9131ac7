//! The drawing aids a scene asks for (`guides: (...)`): bearings and slopes whose vanishing
//! points are marked, fans of guide circles, meridians, measuring poles and divisions. The
//! serde types as a scene writes them, and the resolved [`Guides`] (metres and degrees) that
//! the drawing reads. The reference for users is `docs/scene-format.md`.

use super::numbers::{plan, spot, zero, Count, Finite, Plan, Positive, Spot};
use nalgebra::Point3;
use serde::Deserialize;

/// The `guides` section of a scene file.
#[derive(Debug, Default, Deserialize)]
#[serde(rename = "Guides", deny_unknown_fields)]
pub struct GuidesSpec {
    /// Horizontal directions (azimuths, degrees) whose two vanishing points are marked.
    #[serde(default)]
    pub bearings: Vec<Finite>,
    /// Inclined directions whose two vanishing points are marked.
    #[serde(default)]
    pub slopes: Vec<SlopeSpec>,
    #[serde(default)]
    pub fans: Vec<FanSpec>,
    /// Azimuths (degrees) of vertical guides, nadir to zenith.
    #[serde(default)]
    pub meridians: Vec<Finite>,
    #[serde(default)]
    pub poles: Vec<PoleSpec>,
    #[serde(default)]
    pub divide: Vec<DivideSpec>,
}

/// A direction climbing at `pitch` degrees towards the azimuth `bearing`.
#[derive(Clone, Copy, Debug, Deserialize)]
#[serde(rename = "Slope", deny_unknown_fields)]
pub struct SlopeSpec {
    pub bearing: Finite,
    pub pitch: Finite,
}

/// The family of great circles through the two vanishing points of a direction.
#[derive(Clone, Copy, Debug, Deserialize)]
#[serde(rename = "Fan", deny_unknown_fields)]
pub struct FanSpec {
    pub bearing: Finite,
    /// The direction's climb, degrees (0: horizontal).
    #[serde(default = "zero")]
    pub pitch: Finite,
    /// Angle between neighbouring circles, degrees.
    #[serde(default = "default_fan_step")]
    pub step: Positive,
}

fn default_fan_step() -> Positive {
    Positive(DEFAULT_FAN_STEP_DEG)
}

/// A measuring pole: a vertical with a tick at every `step`.
#[derive(Clone, Debug, Deserialize)]
#[serde(rename = "Pole", deny_unknown_fields)]
pub struct PoleSpec {
    #[serde(default)]
    pub label: Option<String>,
    pub at: Plan,
    #[serde(default = "zero")]
    pub base: Finite,
    #[serde(default = "default_pole_height")]
    pub height: Positive,
    /// Distance between ticks: a metre, a foot, or a storey height.
    #[serde(default = "default_pole_step")]
    pub step: Positive,
}

fn default_pole_height() -> Positive {
    Positive(DEFAULT_POLE_HEIGHT)
}

fn default_pole_step() -> Positive {
    Positive(1.0)
}

/// What to divide into equal parts.
#[derive(Clone, Debug, Deserialize)]
pub enum DivideSpec {
    /// The segment between two points, in `parts` equal parts, extended `extend` times by
    /// its own length beyond `to`.
    Between {
        from: Spot,
        to: Spot,
        #[serde(default = "two")]
        parts: Count,
        #[serde(default)]
        extend: u32,
    },
    /// Every straight edge of the items with this label (copies of a repeat included).
    Edges {
        item: String,
        #[serde(default = "two")]
        parts: Count,
    },
}

fn two() -> Count {
    Count(2)
}

/// The default angle between the circles of a fan, degrees.
pub const DEFAULT_FAN_STEP_DEG: f64 = 10.0;
/// The default height of a measuring pole, in the scene's unit.
pub const DEFAULT_POLE_HEIGHT: f64 = 10.0;
/// The most times a segment may be extended by its own length.
pub const MAX_EXTEND: u32 = 1000;

/// A direction given by its azimuth and climb, degrees.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Slope {
    /// Azimuth of the direction's plan, degrees clockwise from north.
    pub bearing_deg: f64,
    /// Climb above the horizontal, degrees.
    pub pitch_deg: f64,
}

/// Great circles through a direction's two vanishing points, fanned about them.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Fan {
    /// The direction whose vanishing points the circles pass through.
    pub direction: Slope,
    /// The angle between neighbouring circles, degrees.
    pub step_deg: f64,
}

/// A measuring pole: a vertical line with a tick every `step`.
#[derive(Clone, Debug, PartialEq)]
pub struct Pole {
    /// Written beside the pole, if given.
    pub label: Option<String>,
    /// The foot of the pole, metres.
    pub foot: Point3<f64>,
    /// How tall, metres.
    pub height: f64,
    /// The distance between ticks, metres.
    pub step: f64,
    /// Metres per unit of the heights written beside the ticks (the scene's unit).
    pub unit: f64,
}

/// Perspective-correct equal parts of segments.
#[derive(Clone, Debug, PartialEq)]
pub enum Division {
    /// The segment between two points, and its continuation.
    Between {
        /// One end, metres.
        from: Point3<f64>,
        /// The other end, metres.
        to: Point3<f64>,
        /// Into how many equal parts.
        parts: u32,
        /// How many times the segment's length to mark beyond `to`.
        extend: u32,
    },
    /// Every straight edge of the items with a label.
    Edges {
        /// The label (numbered copies match too).
        item: String,
        /// Into how many equal parts.
        parts: u32,
    },
}

/// The drawing aids of a scene, resolved to metres (angles in degrees).
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Guides {
    /// Horizontal directions whose vanishing points are marked, degrees of azimuth.
    pub bearings: Vec<f64>,
    /// Climbing directions whose vanishing points are marked.
    pub slopes: Vec<Slope>,
    /// Guide fans.
    pub fans: Vec<Fan>,
    /// Vertical guides at these azimuths, degrees.
    pub meridians: Vec<f64>,
    /// Measuring poles.
    pub poles: Vec<Pole>,
    /// Divisions of segments and edges.
    pub divisions: Vec<Division>,
}

impl Guides {
    /// Adds `other`'s guides to these.
    pub fn extend(&mut self, other: &Guides) {
        self.bearings.extend_from_slice(&other.bearings);
        self.slopes.extend_from_slice(&other.slopes);
        self.fans.extend_from_slice(&other.fans);
        self.meridians.extend_from_slice(&other.meridians);
        self.poles.extend_from_slice(&other.poles);
        self.divisions.extend_from_slice(&other.divisions);
    }

    /// Whether no guide is asked for.
    pub fn is_empty(&self) -> bool {
        *self == Guides::default()
    }
}

/// Checks a slope's pitch: steeper than vertical makes no sense, and vertical lines
/// vanish at the zenith and nadir, which need no mark.
fn slope(bearing: Finite, pitch: Finite) -> Result<Slope, String> {
    if pitch.0.abs() >= 90.0 {
        return Err(format!(
            "a pitch of {} degrees: expected more than -90 and less than 90",
            pitch.0
        ));
    }
    Ok(Slope {
        bearing_deg: bearing.0,
        pitch_deg: pitch.0,
    })
}

/// The guides of a scene in metres (`unit`: metres per scene unit), or what is wrong.
pub fn resolve(spec: &GuidesSpec, unit: f64) -> Result<Guides, String> {
    let fans = spec
        .fans
        .iter()
        .map(|f| {
            if f.step.0 > 90.0 {
                return Err(format!(
                    "a fan step of {} degrees: expected at most 90",
                    f.step.0
                ));
            }
            Ok(Fan {
                direction: slope(f.bearing, f.pitch)?,
                step_deg: f.step.0,
            })
        })
        .collect::<Result<_, _>>()?;
    let poles = spec
        .poles
        .iter()
        .map(|p| {
            let ticks = p.height.0 / p.step.0;
            if ticks > super::numbers::MAX_COUNT as f64 {
                return Err(format!(
                    "a pole {} high with a tick every {}: more than {} ticks",
                    p.height.0,
                    p.step.0,
                    super::numbers::MAX_COUNT
                ));
            }
            let at = plan(&p.at);
            Ok(Pole {
                label: p.label.clone(),
                foot: Point3::new(at.x * unit, at.y * unit, p.base.0 * unit),
                height: p.height.0 * unit,
                step: p.step.0 * unit,
                unit,
            })
        })
        .collect::<Result<_, _>>()?;
    let divisions = spec
        .divide
        .iter()
        .map(|d| match d {
            DivideSpec::Between {
                from,
                to,
                parts,
                extend,
            } => {
                let (from, to) = (spot(from) * unit, spot(to) * unit);
                if from == to {
                    return Err("a division between two equal points".to_owned());
                }
                if *extend > MAX_EXTEND {
                    return Err(format!(
                        "extend {extend} times: expected at most {MAX_EXTEND}"
                    ));
                }
                Ok(Division::Between {
                    from,
                    to,
                    parts: parts.0,
                    extend: *extend,
                })
            }
            DivideSpec::Edges { item, parts } => Ok(Division::Edges {
                item: item.clone(),
                parts: parts.0,
            }),
        })
        .collect::<Result<_, _>>()?;
    Ok(Guides {
        bearings: spec.bearings.iter().map(|b| b.0).collect(),
        slopes: spec
            .slopes
            .iter()
            .map(|s| slope(s.bearing, s.pitch))
            .collect::<Result<_, _>>()?,
        fans,
        meridians: spec.meridians.iter().map(|m| m.0).collect(),
        poles,
        divisions,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(text: &str) -> Result<Guides, String> {
        let spec: GuidesSpec = ron::Options::default()
            .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
            .from_str(text)
            .map_err(|e| e.to_string())?;
        resolve(&spec, 0.3048)
    }

    #[test]
    fn fields_take_their_defaults_and_lengths_the_unit() {
        let g = read(
            "(bearings: [30], fans: [(bearing: 30)], poles: [(at: (10, 0))],
              divide: [Between(from: (0, 0, 0), to: (10, 0, 0)), Edges(item: \"hall\")])",
        )
        .unwrap();
        assert_eq!(g.bearings, vec![30.0]);
        assert_eq!(g.fans[0].step_deg, DEFAULT_FAN_STEP_DEG);
        assert_eq!(g.fans[0].direction.pitch_deg, 0.0);
        let pole = &g.poles[0];
        assert!((pole.foot.x - 3.048).abs() < 1e-12 && (pole.step - 0.3048).abs() < 1e-12);
        assert!(matches!(
            g.divisions[0],
            Division::Between {
                parts: 2,
                extend: 0,
                ..
            }
        ));
        assert!(matches!(&g.divisions[1], Division::Edges { item, parts: 2 } if item == "hall"));
    }

    #[test]
    fn impossible_guides_are_refused() {
        assert!(read("(slopes: [(bearing: 0, pitch: 90)])")
            .unwrap_err()
            .contains("pitch"));
        assert!(read("(fans: [(bearing: 0, step: 120)])")
            .unwrap_err()
            .contains("90"));
        assert!(read("(poles: [(at: (0, 0), height: 1e6, step: 0.001)])")
            .unwrap_err()
            .contains("ticks"));
        assert!(read("(divide: [Between(from: (1, 1, 1), to: (1, 1, 1))])")
            .unwrap_err()
            .contains("equal"));
        assert!(read("(fans: [(bearing: 0, step: 0)])").is_err());
    }
}
