//! `Footprint`: any simple polygon in plan, raised to a height, under a flat roof or one
//! pitched equally from every side (convex plans only).

use super::super::build::ItemBuilder;
use super::super::numbers::{plan, zero, Finite, NonNegative, Plan, Positive};
use super::block::ParapetSpec;
use super::mass::{build_mass, Mass};
use super::plan::{is_convex, simple_polygon_problem, twice_signed_area};
use super::standing::{draw_footing, outline_foot, PlinthSpec};
use super::walls::{
    openings_in_wall, round_window_in_wall, OpeningsSpec, RoundWindowSpec, WallChoice,
};
use nalgebra::{Vector2, Vector3};
use serde::Deserialize;

#[derive(Clone, Copy, Debug, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub enum FootprintRoof {
    #[default]
    Flat,
    /// Every side rising at `pitch` degrees (a hipped roof).
    Hipped {
        pitch: Finite,
        #[serde(default)]
        overhang: Option<NonNegative>,
    },
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FootprintSpec {
    #[serde(default)]
    pub label: Option<String>,
    #[serde(default)]
    pub layer: Option<String>,
    /// The plan's corners in order (either way round).
    pub points: Vec<Plan>,
    /// To the eaves.
    pub height: Positive,
    #[serde(default = "zero")]
    pub base: Finite,
    /// Stands on the scene's ground, as a block does: `base` from the lowest ground along
    /// its walls, the line where its walls meet the ground drawn.
    #[serde(default)]
    pub on_ground: bool,
    /// With `on_ground`: a level floor at the highest ground under it, on a plinth.
    #[serde(default)]
    pub plinth: Option<PlinthSpec>,
    #[serde(default)]
    pub roof: FootprintRoof,
    #[serde(default)]
    pub parapet: Option<ParapetSpec>,
    /// Walls are named `Side(n)`, side n running from corner n to the next; or `All`.
    #[serde(default)]
    pub openings: Vec<OpeningsSpec>,
    /// Round windows, on walls named as for `openings`.
    #[serde(default)]
    pub round_windows: Vec<RoundWindowSpec>,
    #[serde(default)]
    pub storeys: Vec<Positive>,
}

pub fn build_footprint(b: &mut ItemBuilder, spec: &FootprintSpec) -> Result<(), String> {
    let mut points: Vec<Vector2<f64>> = spec.points.iter().map(plan).collect();
    if let Some(problem) = simple_polygon_problem(&points) {
        return Err(format!("the footprint is not a simple polygon: {problem}"));
    }
    // Corners are counted as written, so keep the user's numbering when turning the
    // outline counter-clockwise: reverse, and shift so side n still starts at corner n.
    let reversed = twice_signed_area(&points) < 0.0;
    if reversed {
        points.reverse();
    }
    let n = points.len();
    // Side k (from 0) of the counter-clockwise outline, as the user numbered it.
    let side_of = |user_side: usize| {
        if reversed {
            (2 * n - 2 - user_side) % n
        } else {
            user_side
        }
    };
    let slopes = match spec.roof {
        FootprintRoof::Flat => Vec::new(),
        FootprintRoof::Hipped { pitch, .. } => {
            if !(pitch.0 > 0.0 && pitch.0 < 90.0) {
                return Err(format!(
                    "expected a pitch between 0 and 90 degrees, found {}",
                    pitch.0
                ));
            }
            if !is_convex(&points) {
                return Err(
                    "a hipped roof needs a convex footprint (no corner turning inwards); \
                     use a flat roof, or split the footprint"
                        .to_owned(),
                );
            }
            vec![Some(pitch.0.to_radians().tan()); n]
        }
    };
    if spec.parapet.is_some() && !slopes.is_empty() {
        return Err("a parapet needs a flat roof".to_owned());
    }
    let overhang = match spec.roof {
        FootprintRoof::Hipped {
            overhang: Some(o), ..
        } => o.0,
        _ => 0.0,
    };
    let (on_ground, plinth) = (spec.on_ground, spec.plinth.as_ref());
    let base = outline_foot(b, &b.placement(), &points, spec.base.0, on_ground, plinth)?;
    b.move_by(Vector3::new(0.0, 0.0, base), 0.0);
    draw_footing(b, &points, on_ground, plinth)?;
    let mass = Mass {
        plan: points,
        eaves: spec.height.0,
        slopes,
        upper: Vec::new(),
        overhang,
        parapet: spec.parapet.map(|p| (p.height.0, p.thickness.0)),
    };
    let walls = mass.walls();
    let mut openings = vec![Vec::new(); n];
    let sides_of = |wall: WallChoice| -> Result<Vec<usize>, String> {
        Ok(match wall {
            WallChoice::All => (0..n).collect(),
            WallChoice::Side(k) if (1..=n as u32).contains(&k.0) => {
                // Reversing the corners makes the user's side k run the other way between
                // the same two corners.
                vec![side_of(k.0 as usize - 1)]
            }
            WallChoice::Side(k) => {
                return Err(format!(
                    "the footprint has sides 1 to {n}, not side {}",
                    k.0
                ))
            }
            other => {
                return Err(format!(
                    "a footprint's walls are named Side(1) to Side({n}) or All, not {other:?}"
                ))
            }
        })
    };
    for opening in &spec.openings {
        for side in sides_of(opening.wall)? {
            openings[side].extend(openings_in_wall(opening, &walls[side])?);
        }
    }
    for window in &spec.round_windows {
        for side in sides_of(window.wall)? {
            openings[side].push(round_window_in_wall(window, &walls[side], reversed)?);
        }
    }
    let storeys: Vec<f64> = spec.storeys.iter().map(|s| s.0).collect();
    build_mass(b, &mass, &walls, &openings, &storeys)
}
