//! Walls standing on a plan outline: their faces, the openings (windows and doors) set in
//! them, and storey lines (string courses) along them. Blocks, footprints and rooms share
//! this.

use super::super::build::ItemBuilder;
use super::super::numbers::{Count, Finite, NonNegative, Positive, SideNumber};
use super::heads::{checked_head, outline, Head, Outline, Piece, Shape};
use nalgebra::{Point3, Vector2, Vector3};
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
    /// The head: `Square` (the default) or an arch curve, its crown at `height`.
    #[serde(default)]
    pub head: Head,
    /// Width of a flat surround (architrave) drawn round the jambs and the head.
    #[serde(default)]
    pub surround: Option<Positive>,
    /// A sill standing out this far from the face, as deep as it stands out, under the
    /// opening and its surround and this far beyond them at each end.
    #[serde(default)]
    pub sill_projection: Option<Positive>,
}

/// A round window (an oculus) in a wall: a circle of `diameter` about a centre `along`
/// the wall (by default its middle) and `centre` up from its foot.
#[derive(Debug, Deserialize)]
#[serde(rename = "RoundWindow", deny_unknown_fields)]
pub struct RoundWindowSpec {
    pub wall: WallChoice,
    #[serde(default)]
    pub along: Option<Finite>,
    pub centre: Positive,
    pub diameter: Positive,
    #[serde(default)]
    pub reveal: Option<NonNegative>,
    #[serde(default)]
    pub surround: Option<Positive>,
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

/// An opening on its wall: along the wall from `left` to `right`, from `bottom` to `top`
/// (the crown of a shaped head), set back `reveal`, with a surround `surround` wide and a
/// sill standing out `ledge` (0 for none); its outline and the outer edge of its surround
/// (its own outline when it has none).
#[derive(Clone, Debug, PartialEq)]
pub struct Opening {
    pub left: f64,
    pub right: f64,
    pub bottom: f64,
    pub top: f64,
    pub reveal: f64,
    pub surround: f64,
    pub ledge: f64,
    pub outline: Outline,
    pub outer: Outline,
}

impl Opening {
    /// An opening of the given shape filling the box (left, right, bottom, top).
    pub fn new(
        (left, right, bottom, top): (f64, f64, f64, f64),
        shape: &Shape,
        reveal: f64,
        surround: f64,
        ledge: f64,
    ) -> Result<Opening, String> {
        let corners = (left, right, bottom, top);
        Ok(Opening {
            left,
            right,
            bottom,
            top,
            reveal,
            surround,
            ledge,
            outline: outline(shape, corners, 0.0)?,
            outer: outline(shape, corners, surround)?,
        })
    }

    /// A square-headed opening, with no surround or sill.
    #[cfg(test)]
    pub fn square(left: f64, right: f64, bottom: f64, top: f64, reveal: f64) -> Opening {
        let outline = super::heads::rectangle((left, right, bottom, top), 0.0);
        Opening {
            left,
            right,
            bottom,
            top,
            reveal,
            surround: 0.0,
            ledge: 0.0,
            outer: outline.clone(),
            outline,
        }
    }

    /// What it takes up on the wall, surround and sill included: (left, right, bottom, top).
    fn extent(&self) -> (f64, f64, f64, f64) {
        let reach = self.surround + self.ledge;
        (
            self.left - reach,
            self.right + reach,
            self.bottom - self.ledge,
            self.outer.top(),
        )
    }
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
    let shape = match checked_head(spec.head, spec.width.0, spec.height.0)? {
        Some(arch) => Shape::Arched(arch),
        None => Shape::Square,
    };
    let ledge = spec.sill_projection.map_or(0.0, |p| p.0);
    if ledge > sill {
        return Err(format!(
            "a sill standing out {ledge} (as deep as it stands out) does not fit under an \
             opening {sill} above the foot of its wall"
        ));
    }
    let mut openings = Vec::new();
    for centre in opening_centres(spec, wall.length())? {
        for row in 0..rows {
            let bottom = sill + step * row as f64;
            let opening = Opening::new(
                (centre - half, centre + half, bottom, bottom + spec.height.0),
                &shape,
                spec.reveal.map_or(0.0, |r| r.0),
                spec.surround.map_or(0.0, |s| s.0),
                ledge,
            )?;
            fits_under_top(&opening, wall)?;
            openings.push(opening);
        }
    }
    Ok(openings)
}

/// The round window a spec puts in one wall, checked to fit on it; `mirrored` when the
/// wall runs the other way from the side the user named (its `along` then counts from the
/// wall's end).
pub fn round_window_in_wall(
    spec: &RoundWindowSpec,
    wall: &Wall,
    mirrored: bool,
) -> Result<Opening, String> {
    let radius = spec.diameter.0 / 2.0;
    let length = wall.length();
    let along = match (spec.along, mirrored) {
        (None, _) => length / 2.0,
        (Some(a), false) => a.0,
        (Some(a), true) => length - a.0,
    };
    let centre = spec.centre.0;
    if centre - radius <= 0.0 {
        return Err(format!(
            "a round window {} across centred {centre} up reaches below the foot of its wall",
            spec.diameter.0
        ));
    }
    let opening = Opening::new(
        (
            along - radius,
            along + radius,
            centre - radius,
            centre + radius,
        ),
        &Shape::Round,
        spec.reveal.map_or(0.0, |r| r.0),
        spec.surround.map_or(0.0, |s| s.0),
        0.0,
    )?;
    fits_under_top(&opening, wall)?;
    Ok(opening)
}

fn fits_under_top(opening: &Opening, wall: &Wall) -> Result<(), String> {
    let (left, right, _, top) = opening.extent();
    let under = wall
        .top_at(left.max(0.0))
        .min(wall.top_at(right.min(wall.length())));
    if top >= under {
        let what = if opening.surround > 0.0 {
            "an opening with its surround"
        } else {
            "an opening"
        };
        return Err(format!(
            "{what} reaching {top:.3} up does not fit under the top of its wall ({under:.3})"
        ));
    }
    Ok(())
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
        check_apart(here, wall.length()).map_err(|e| format!("wall {}: {e}", index + 1))?;
        let direction = (wall.end - wall.start) / wall.length();
        // The left of the wall's direction, towards the inside of a counter-clockwise plan.
        let left = Vector2::new(-direction.y, direction.x);
        let setback = match kind {
            OpeningKind::Recess => left,
            OpeningKind::Through => -left,
        };
        let setback = Vector3::new(setback.x, setback.y, 0.0);
        let mut holes = Vec::new();
        for opening in here {
            if let Some(hole) = build_opening(b, wall, opening, kind, setback) {
                holes.push(hole);
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

/// Draws one opening on its wall: its outline (straight lines and exact arcs), its
/// surround, its reveal set back along the unit vector `setback` (the soffit following a
/// shaped head, lines across at the corners and creases, a closed back for a recess) and
/// its sill. Returns the hole it cuts in the wall's face, if it cuts one.
fn build_opening(
    b: &mut ItemBuilder,
    wall: &Wall,
    opening: &Opening,
    kind: OpeningKind,
    setback: Vector3<f64>,
) -> Option<Vec<Point3<f64>>> {
    let along =
        Vector3::new(wall.end.x - wall.start.x, wall.end.y - wall.start.y, 0.0) / wall.length();
    let on_wall = |p: Vector2<f64>, depth: f64| wall.point(p.x, p.y) + setback * depth;
    let draw = |b: &mut ItemBuilder, outline: &Outline, depth: f64| {
        for piece in &outline.pieces {
            match *piece {
                Piece::Line { from, to } => b.segment(on_wall(from, depth), on_wall(to, depth)),
                Piece::Arc { arc, .. } => b.ellipse(
                    on_wall(arc.centre, depth),
                    along * arc.radii.x,
                    Vector3::z() * arc.radii.y,
                    arc.start,
                    arc.sweep,
                ),
            }
        }
    };
    draw(b, &opening.outline, 0.0);
    if opening.surround > 0.0 {
        draw(b, &opening.outer, 0.0);
    }
    if opening.ledge > 0.0 {
        build_sill(b, wall, opening, -setback);
    }
    let depth = opening.reveal;
    let front: Vec<Point3<f64>> = opening
        .outline
        .polygon()
        .iter()
        .map(|&p| on_wall(p, 0.0))
        .collect();
    if depth > 0.0 {
        draw(b, &opening.outline, depth);
        for &corner in &opening.outline.creases {
            b.segment(on_wall(corner, 0.0), on_wall(corner, depth));
        }
        for piece in &opening.outline.pieces {
            let points = piece.points();
            let near: Vec<Point3<f64>> = points.iter().map(|&p| on_wall(p, 0.0)).collect();
            let far: Vec<Point3<f64>> = points.iter().map(|&p| on_wall(p, depth)).collect();
            match piece {
                Piece::Line { .. } => b.face(&[near[0], near[1], far[1], far[0]], &[]),
                Piece::Arc { .. } => b.strip(&near, &far),
            }
        }
        if kind == OpeningKind::Recess {
            let back: Vec<Point3<f64>> = front.iter().map(|&p| p + setback * depth).collect();
            b.face(&back, &[]);
        }
    }
    (kind == OpeningKind::Through || depth > 0.0).then_some(front)
}

/// A sill under an opening: a bar of square section standing out `ledge` along `out`
/// from the wall, its top level with the opening's bottom, running under the opening and
/// its surround and `ledge` beyond them at each end; its edges and its six faces.
fn build_sill(b: &mut ItemBuilder, wall: &Wall, opening: &Opening, out: Vector3<f64>) {
    let ledge = opening.ledge;
    let (left, right, bottom, _) = opening.extent();
    let top = opening.bottom;
    let corner = |x: f64, z: f64, o: f64| wall.point(x, z) + out * o;
    let face = [
        corner(left, bottom, 0.0),
        corner(right, bottom, 0.0),
        corner(right, top, 0.0),
        corner(left, top, 0.0),
    ];
    let front = face.map(|p| p + out * ledge);
    b.path(&face, true);
    b.path(&front, true);
    for i in 0..4 {
        b.segment(face[i], front[i]);
        b.face(
            &[face[i], face[(i + 1) % 4], front[(i + 1) % 4], front[i]],
            &[],
        );
    }
    // Its back against the wall as well, so that it is a closed solid of its own.
    b.face(&front, &[]);
    b.face(&face, &[]);
}

/// The stretches of a line across a wall at `height` that no opening interrupts.
fn gaps_between(openings: &[Opening], height: f64, length: f64) -> Vec<(f64, f64)> {
    let mut cuts: Vec<(f64, f64)> = openings
        .iter()
        .filter_map(|o| {
            let (left, right, bottom, _) = o.extent();
            if bottom < height && height < o.bottom {
                // Through the sill.
                Some((left, right))
            } else {
                o.outer.span_at(height)
            }
        })
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

/// Openings (with their surrounds and sills) must lie on the wall and apart.
fn check_apart(openings: &[Opening], length: f64) -> Result<(), String> {
    let extents: Vec<(f64, f64, f64, f64)> = openings.iter().map(Opening::extent).collect();
    for (i, a) in extents.iter().enumerate() {
        if a.0 < 0.0 {
            return Err("an opening starts before the wall does (check the margins)".into());
        }
        if a.1 > length {
            return Err("an opening runs past the end of the wall (check the margins)".into());
        }
        for b in &extents[i + 1..] {
            let apart = a.1 <= b.0 || b.1 <= a.0 || a.3 <= b.2 || b.3 <= a.2;
            if !apart {
                return Err(format!(
                    "openings overlap (one from {:.3} to {:.3} along the wall, one from {:.3} to {:.3}, surrounds and sills included)",
                    a.0, a.1, b.0, b.1
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
            head: Head::Square,
            surround: None,
            sill_projection: None,
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
        let o = Opening::square(2.0, 3.0, 1.0, 2.0, 0.0);
        assert_eq!(
            gaps_between(std::slice::from_ref(&o), 1.5, 10.0),
            vec![(0.0, 2.0), (3.0, 10.0)]
        );
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
