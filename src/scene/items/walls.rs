//! Walls standing on a plan outline: their faces, the openings (windows and doors) set in
//! them, and storey lines (string courses) along them. Blocks, footprints and rooms share
//! this.

use super::super::build::ItemBuilder;
use super::super::numbers::{Count, NonNegative, Positive, SideNumber};
use nalgebra::{Point3, Vector2};
use serde::Deserialize;

/// Which walls a row of openings goes in. A block's and a room's walls are named from the
/// front; a footprint's are its sides, `Side(1)` running from its first corner to its second.
#[derive(Clone, Copy, Debug, Deserialize, PartialEq)]
pub enum WallChoice {
    Front,
    Right,
    Back,
    Left,
    All,
    Side(SideNumber),
}

fn one() -> Count {
    Count(1)
}

/// A regular grid of openings (windows or doors) in a wall.
#[derive(Debug, Deserialize)]
#[serde(rename = "Openings", deny_unknown_fields)]
pub struct OpeningsSpec {
    pub wall: WallChoice,
    /// How many across; or give `spacing` (centre to centre) and as many fit as can.
    #[serde(default)]
    pub count: Option<Count>,
    #[serde(default)]
    pub spacing: Option<Positive>,
    pub width: Positive,
    pub height: Positive,
    /// Height of the bottom above the wall's foot (0 for doors).
    #[serde(default)]
    pub sill: Option<NonNegative>,
    /// Kept clear at each end of the wall.
    #[serde(default)]
    pub margin: Option<NonNegative>,
    /// Rows one above another (storeys), `row_step` apart.
    #[serde(default = "one")]
    pub rows: Count,
    #[serde(default)]
    pub row_step: Option<Positive>,
    /// Depth of the reveal: the opening is set back this far into the wall.
    #[serde(default)]
    pub reveal: Option<NonNegative>,
}

/// A wall on the plan line from `start` to `end`; `top` is its top edge as (distance along
/// the wall, height) from distance 0 to the wall's length (two points for a level top,
/// three for a gable end).
#[derive(Clone, Debug, PartialEq)]
pub struct Wall {
    pub start: Vector2<f64>,
    pub end: Vector2<f64>,
    pub top: Vec<(f64, f64)>,
}

impl Wall {
    pub fn length(&self) -> f64 {
        (self.end - self.start).norm()
    }

    /// The point `along` metres from the start, `height` up.
    pub fn point(&self, along: f64, height: f64) -> Point3<f64> {
        let p = self.start + (self.end - self.start) * (along / self.length());
        Point3::new(p.x, p.y, height)
    }

    /// The height of the top `along` the wall.
    pub fn top_at(&self, along: f64) -> f64 {
        let top = &self.top;
        for pair in top.windows(2) {
            let ((t0, z0), (t1, z1)) = (pair[0], pair[1]);
            if along <= t1 {
                return z0 + (z1 - z0) * ((along - t0) / (t1 - t0)).clamp(0.0, 1.0);
            }
        }
        top.last().map_or(0.0, |&(_, z)| z)
    }

    /// The wall's face, as corners: along the foot, then back along the top.
    pub fn outline(&self) -> Vec<Point3<f64>> {
        let mut outline = vec![self.point(0.0, 0.0), self.point(self.length(), 0.0)];
        outline.extend(self.top.iter().rev().map(|&(t, z)| self.point(t, z)));
        outline
    }
}

/// An opening's rectangle on its wall: along the wall from `left` to `right`, from `bottom`
/// to `top`, set back `reveal`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Opening {
    pub left: f64,
    pub right: f64,
    pub bottom: f64,
    pub top: f64,
    pub reveal: f64,
}

/// Whether openings are holes right through (a room seen from inside, where one looks out
/// through them) or recesses that end in a closed back (a solid seen from outside).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum OpeningKind {
    Recess,
    Through,
}

/// The positions along a wall of `length` of the openings a spec asks for: equal bays
/// between the margins, an opening centred in each (or, by spacing, as many as fit, the
/// group centred on the wall).
pub fn opening_centres(spec: &OpeningsSpec, length: f64) -> Result<Vec<f64>, String> {
    let width = spec.width.0;
    let margin = spec.margin.map_or(0.0, |m| m.0);
    let room = length - 2.0 * margin;
    let centres: Vec<f64> = match (spec.count, spec.spacing) {
        (Some(_), Some(_)) => return Err("give `count` or `spacing`, not both".to_owned()),
        (count, None) => {
            let n = count.map_or(1, |c| c.0) as usize;
            let bay = room / n as f64;
            if bay < width {
                return Err(format!(
                    "{n} openings {width} wide do not fit in {room:.3} between the margins"
                ));
            }
            (0..n).map(|i| margin + bay * (i as f64 + 0.5)).collect()
        }
        (None, Some(spacing)) => {
            let spacing = spacing.0;
            if spacing < width {
                return Err(format!(
                    "the spacing ({spacing}) is less than the opening width ({width})"
                ));
            }
            if room < width {
                return Err(format!(
                    "an opening {width} wide does not fit in {room:.3} between the margins"
                ));
            }
            let n = ((room - width) / spacing).floor() as usize + 1;
            let first = length / 2.0 - spacing * (n - 1) as f64 / 2.0;
            (0..n).map(|i| first + spacing * i as f64).collect()
        }
    };
    Ok(centres)
}

/// The most openings one spec may put in one wall.
pub const MAX_OPENINGS: usize = 10_000;

/// The openings a spec puts in one wall, checked to fit under its top.
pub fn openings_in_wall(spec: &OpeningsSpec, wall: &Wall) -> Result<Vec<Opening>, String> {
    let rows = spec.rows.0 as usize;
    let across = spec.count.map_or(1, |c| c.0 as usize);
    if rows.saturating_mul(across) > MAX_OPENINGS {
        return Err(format!(
            "{across} openings across in {rows} rows is more than {MAX_OPENINGS} in one wall"
        ));
    }
    let step = match (rows, spec.row_step) {
        (1, _) => 0.0,
        (_, Some(step)) => step.0,
        (_, None) => return Err("more than one row needs `row_step` (the storey height)".into()),
    };
    let sill = spec.sill.map_or(0.0, |s| s.0);
    let half = spec.width.0 / 2.0;
    let mut openings = Vec::new();
    for centre in opening_centres(spec, wall.length())? {
        for row in 0..rows {
            let bottom = sill + step * row as f64;
            let opening = Opening {
                left: centre - half,
                right: centre + half,
                bottom,
                top: bottom + spec.height.0,
                reveal: spec.reveal.map_or(0.0, |r| r.0),
            };
            let under = wall.top_at(opening.left).min(wall.top_at(opening.right));
            if opening.top >= under {
                return Err(format!(
                    "an opening reaching {:.3} up does not fit under the top of its wall ({under:.3})",
                    opening.top
                ));
            }
            openings.push(opening);
        }
    }
    Ok(openings)
}

/// Draws walls with their openings and storey lines. `inward` is +1 when the inside of the
/// walls is on their left (a counter-clockwise outline seen from above), -1 otherwise;
/// recesses go inwards, and openings through the walls of a room go outwards through a
/// wall `thickness` deep (their reveal).
pub fn build_walls(
    b: &mut ItemBuilder,
    walls: &[Wall],
    openings: &[Vec<Opening>],
    storeys: &[f64],
    kind: OpeningKind,
) -> Result<(), String> {
    for (index, wall) in walls.iter().enumerate() {
        let here = &openings[index];
        check_apart(here).map_err(|e| format!("wall {}: {e}", index + 1))?;
        let direction = (wall.end - wall.start) / wall.length();
        // The left of the wall's direction, towards the inside of a counter-clockwise plan.
        let left = Vector2::new(-direction.y, direction.x);
        let sign = match kind {
            OpeningKind::Recess => 1.0,
            OpeningKind::Through => -1.0,
        };
        let mut holes = Vec::new();
        for opening in here {
            let corners = [
                wall.point(opening.left, opening.bottom),
                wall.point(opening.right, opening.bottom),
                wall.point(opening.right, opening.top),
                wall.point(opening.left, opening.top),
            ];
            b.path(&corners, true);
            let cut = kind == OpeningKind::Through || opening.reveal > 0.0;
            if opening.reveal > 0.0 {
                let set_back = left * (sign * opening.reveal);
                let back = corners.map(|p| p + nalgebra::Vector3::new(set_back.x, set_back.y, 0.0));
                b.path(&back, true);
                for i in 0..4 {
                    b.segment(corners[i], back[i]);
                    b.face(
                        &[corners[i], corners[(i + 1) % 4], back[(i + 1) % 4], back[i]],
                        &[],
                    );
                }
                if kind == OpeningKind::Recess {
                    b.face(&back, &[]);
                }
            }
            if cut {
                holes.push(corners.to_vec());
            }
        }
        b.face(&wall.outline(), &holes);
        for &height in storeys {
            let lowest_top = wall
                .top
                .iter()
                .map(|&(_, z)| z)
                .fold(f64::INFINITY, f64::min);
            if height >= lowest_top {
                return Err(format!(
                    "a storey line at {height} is not below the top of wall {} ({lowest_top})",
                    index + 1
                ));
            }
            for (from, to) in gaps_between(here, height, wall.length()) {
                b.segment(wall.point(from, height), wall.point(to, height));
            }
        }
    }
    Ok(())
}

/// The stretches of a line across a wall at `height` that no opening interrupts.
fn gaps_between(openings: &[Opening], height: f64, length: f64) -> Vec<(f64, f64)> {
    let mut cuts: Vec<(f64, f64)> = openings
        .iter()
        .filter(|o| o.bottom < height && height < o.top)
        .map(|o| (o.left, o.right))
        .collect();
    cuts.sort_by(|a, b| a.0.total_cmp(&b.0));
    let mut gaps = Vec::new();
    let mut from = 0.0;
    for (left, right) in cuts {
        if left > from {
            gaps.push((from, left));
        }
        from = right.max(from);
    }
    if from < length {
        gaps.push((from, length));
    }
    gaps
}

fn check_apart(openings: &[Opening]) -> Result<(), String> {
    for (i, a) in openings.iter().enumerate() {
        if a.left < 0.0 {
            return Err("an opening starts before the wall does (check the margins)".into());
        }
        for b in &openings[i + 1..] {
            let apart =
                a.right <= b.left || b.right <= a.left || a.top <= b.bottom || b.top <= a.bottom;
            if !apart {
                return Err(format!(
                    "openings overlap (one from {:.3} to {:.3} along the wall, one from {:.3} to {:.3})",
                    a.left, a.right, b.left, b.right
                ));
            }
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn spec(count: Option<u32>, spacing: Option<f64>, width: f64, margin: f64) -> OpeningsSpec {
        OpeningsSpec {
            wall: WallChoice::Front,
            count: count.map(Count),
            spacing: spacing.map(Positive),
            width: Positive(width),
            height: Positive(1.5),
            sill: Some(NonNegative(0.9)),
            margin: Some(NonNegative(margin)),
            rows: Count(1),
            row_step: None,
            reveal: None,
        }
    }

    #[test]
    fn counted_openings_sit_in_equal_bays() {
        // 10 m wall, 1 m margins: 8 m for 4 bays of 2 m, centres at 2, 4, 6, 8.
        let centres = opening_centres(&spec(Some(4), None, 1.0, 1.0), 10.0).unwrap();
        assert_eq!(centres, vec![2.0, 4.0, 6.0, 8.0]);
    }

    #[test]
    fn spaced_openings_are_centred_on_the_wall() {
        // 10 m wall, openings 1 m wide every 3 m: (10 - 1) / 3 -> 4 openings, centred.
        let centres = opening_centres(&spec(None, Some(3.0), 1.0, 0.0), 10.0).unwrap();
        assert_eq!(centres, vec![0.5, 3.5, 6.5, 9.5]);
    }

    #[test]
    fn openings_too_wide_for_their_bays_are_refused() {
        assert!(opening_centres(&spec(Some(5), None, 2.5, 0.0), 10.0).is_err());
    }

    #[test]
    fn storey_lines_stop_at_openings() {
        let o = Opening {
            left: 2.0,
            right: 3.0,
            bottom: 1.0,
            top: 2.0,
            reveal: 0.0,
        };
        assert_eq!(gaps_between(&[o], 1.5, 10.0), vec![(0.0, 2.0), (3.0, 10.0)]);
        assert_eq!(gaps_between(&[o], 2.5, 10.0), vec![(0.0, 10.0)]);
    }

    #[test]
    fn gable_wall_top_is_interpolated() {
        let wall = Wall {
            start: Vector2::new(0.0, 0.0),
            end: Vector2::new(8.0, 0.0),
            top: vec![(0.0, 6.0), (4.0, 9.0), (8.0, 6.0)],
        };
        assert_eq!(wall.top_at(2.0), 7.5);
        assert_eq!(wall.top_at(6.0), 7.5);
    }
}
