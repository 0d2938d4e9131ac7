//! Openings in a round tower's wall: square-headed, their jambs upright and their sills and
//! lintels arcs of the tower's circle (exact ellipse edges), set back by a reveal towards
//! the axis. A shaped head is refused: its curve would have to bend round the tower.
//!
//! The drum's side is then built round the holes: its facets are cut at the openings'
//! jambs as well as every [`FACET_ANGLE`](super::super::build::FACET_ANGLE), and each facet
//! keeps the stretches of height no opening takes.

use super::super::build::{facet_count, ItemBuilder};
use super::super::numbers::{default_facing, Count, Finite, NonNegative, Positive};
use super::heads::Head;
use super::walls::MAX_OPENINGS;
use nalgebra::{Point3, Vector3};
use serde::Deserialize;
use std::f64::consts::{PI, TAU};

fn one() -> Count {
    Count(1)
}

/// Openings spaced evenly round a tower, the first facing `facing`.
#[derive(Debug, Deserialize)]
#[serde(rename = "TowerOpenings", deny_unknown_fields)]
pub struct TowerOpeningsSpec {
    #[serde(default = "one")]
    pub count: Count,
    /// The azimuth the first opening faces.
    #[serde(default = "default_facing")]
    pub facing: Finite,
    /// Measured along the curved face.
    pub width: Positive,
    pub height: Positive,
    #[serde(default)]
    pub sill: Option<NonNegative>,
    #[serde(default = "one")]
    pub rows: Count,
    #[serde(default)]
    pub row_step: Option<Positive>,
    #[serde(default)]
    pub reveal: Option<NonNegative>,
    /// Only `Square` is accepted on a round wall.
    #[serde(default)]
    pub head: Head,
}

/// One opening: from angle `t0` to `t1` (counter-clockwise from +x, as the drum's
/// circles run; `t1` may pass a whole turn), from `bottom` to `top` above the foot.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Slot {
    pub t0: f64,
    pub t1: f64,
    pub bottom: f64,
    pub top: f64,
    pub reveal: f64,
}

impl Slot {
    /// Whether the angle `t` lies within the opening's width.
    fn spans(&self, t: f64) -> bool {
        (t - self.t0).rem_euclid(TAU) < self.t1 - self.t0
    }
}

/// The openings the specs put round a tower of `radius` whose wall is `height` high.
pub fn tower_slots(
    specs: &[TowerOpeningsSpec],
    radius: f64,
    height: f64,
) -> Result<Vec<Slot>, String> {
    let mut slots: Vec<Slot> = Vec::new();
    for spec in specs {
        if spec.head != Head::Square {
            return Err(format!(
                "a {} head cannot be set in a round wall (its curve would have to bend round \
                 the tower); a tower's openings take Square heads",
                spec.head.name()
            ));
        }
        let (count, rows) = (spec.count.0 as usize, spec.rows.0 as usize);
        if count.saturating_mul(rows) > MAX_OPENINGS {
            return Err(format!(
                "{count} openings round in {rows} rows is more than {MAX_OPENINGS} in one wall"
            ));
        }
        let angle = spec.width.0 / radius;
        if angle * count as f64 >= TAU {
            return Err(format!(
                "{count} openings {} wide do not fit round a tower {:.3} round",
                spec.width.0,
                TAU * radius
            ));
        }
        let reveal = spec.reveal.map_or(0.0, |r| r.0);
        if reveal >= radius {
            return Err(format!(
                "a reveal of {reveal} is as deep as the tower's radius ({radius}) or deeper"
            ));
        }
        let step = match (rows, spec.row_step) {
            (1, _) => 0.0,
            (_, Some(step)) => step.0,
            (_, None) => {
                return Err("more than one row needs `row_step` (the storey height)".into())
            }
        };
        let sill = spec.sill.map_or(0.0, |s| s.0);
        for k in 0..count {
            let azimuth = (spec.facing.0 + 360.0 * k as f64 / count as f64).to_radians();
            // Azimuth runs clockwise from +y; the circles' angle counter-clockwise from +x.
            let middle = (PI / 2.0 - azimuth).rem_euclid(TAU);
            for row in 0..rows {
                let bottom = sill + step * row as f64;
                let top = bottom + spec.height.0;
                if top >= height {
                    return Err(format!(
                        "an opening reaching {top:.3} up does not fit under the top of the tower ({height})"
                    ));
                }
                slots.push(Slot {
                    t0: middle - angle / 2.0,
                    t1: middle + angle / 2.0,
                    bottom,
                    top,
                    reveal,
                });
            }
        }
    }
    for (i, a) in slots.iter().enumerate() {
        for b in &slots[i + 1..] {
            let level = a.top > b.bottom && b.top > a.bottom;
            let across = a.spans(b.t0) || b.spans(a.t0);
            if level && across {
                return Err("openings in the tower overlap".to_owned());
            }
        }
    }
    Ok(slots)
}

/// The drum's side round its openings: the facets' faces, the rings (broken where they
/// cross an opening) and each opening's edges, reveal and back. `foot` is the centre of
/// the drum's foot. Returns the facets' angles, from 0 up, for the faces that close the
/// drum.
pub fn build_pierced_side(
    b: &mut ItemBuilder,
    foot: Point3<f64>,
    radius: f64,
    height: f64,
    rings: &[f64],
    slots: &[Slot],
) -> Vec<f64> {
    let at = |t: f64, r: f64, z: f64| foot + Vector3::new(r * t.cos(), r * t.sin(), z);
    // The facets' angles: the regular ones and every jamb's.
    let count = facet_count(TAU);
    let mut cuts: Vec<f64> = (0..count).map(|k| TAU * k as f64 / count as f64).collect();
    for slot in slots {
        cuts.push(slot.t0.rem_euclid(TAU));
        cuts.push(slot.t1.rem_euclid(TAU));
    }
    cuts.sort_by(f64::total_cmp);
    cuts.dedup_by(|a, b| (*a - *b).abs() < 1e-12);
    let next = |i: usize| {
        if i + 1 < cuts.len() {
            cuts[i + 1]
        } else {
            cuts[0] + TAU
        }
    };
    for (i, &a) in cuts.iter().enumerate() {
        let c = next(i);
        let middle = (a + c) / 2.0;
        // The heights of this facet that no opening takes.
        let mut from = 0.0;
        let mut taken: Vec<&Slot> = slots.iter().filter(|s| s.spans(middle)).collect();
        taken.sort_by(|p, q| p.bottom.total_cmp(&q.bottom));
        let mut stretches = Vec::new();
        for slot in taken {
            stretches.push((from, slot.bottom));
            from = slot.top;
        }
        stretches.push((from, height));
        // Every facet is cut at every opening's sill and lintel, not only those beside a
        // jamb: a facet's side is shared with its neighbour's, and both must be cut at the
        // same heights, or the side of one meets two sides of the other (a T-junction, and
        // the wall is no longer a closed solid).
        let mut levels: Vec<f64> = slots.iter().flat_map(|s| [s.bottom, s.top]).collect();
        levels.sort_by(f64::total_cmp);
        for (z0, z1) in stretches {
            let mut heights = vec![z0];
            heights.extend(levels.iter().copied().filter(|&z| z > z0 && z < z1));
            heights.push(z1);
            for pair in heights.windows(2) {
                let (z0, z1) = (pair[0], pair[1]);
                if z1 > z0 {
                    b.strip(
                        &[at(a, radius, z0), at(c, radius, z0)],
                        &[at(a, radius, z1), at(c, radius, z1)],
                    );
                }
            }
        }
    }
    for &ring in rings {
        let mut blocked: Vec<&Slot> = slots
            .iter()
            .filter(|s| s.bottom < ring && ring < s.top)
            .collect();
        let centre = foot + Vector3::z() * ring;
        let (u, v) = (Vector3::x() * radius, Vector3::y() * radius);
        if blocked.is_empty() {
            b.ellipse(centre, u, v, 0.0, TAU);
            continue;
        }
        blocked.sort_by(|p, q| p.t0.rem_euclid(TAU).total_cmp(&q.t0.rem_euclid(TAU)));
        for k in 0..blocked.len() {
            let end = blocked[k].t1;
            let start_next = blocked[(k + 1) % blocked.len()].t0;
            let sweep = (start_next - end).rem_euclid(TAU);
            if sweep > 0.0 {
                b.ellipse(centre, u, v, end, sweep);
            }
        }
    }
    for slot in slots {
        // The facet angles across the opening, jambs included.
        let mut across: Vec<f64> = vec![slot.t0];
        across.extend(
            cuts.iter()
                .flat_map(|&c| [c, c + TAU, c - TAU])
                .filter(|&c| c > slot.t0 + 1e-12 && c < slot.t1 - 1e-12),
        );
        across.sort_by(f64::total_cmp);
        across.push(slot.t1);
        let sweep = slot.t1 - slot.t0;
        let back = radius - slot.reveal;
        for r in [radius, back] {
            if r == back && slot.reveal == 0.0 {
                continue;
            }
            for z in [slot.bottom, slot.top] {
                b.ellipse(
                    foot + Vector3::z() * z,
                    Vector3::x() * r,
                    Vector3::y() * r,
                    slot.t0,
                    sweep,
                );
            }
            for t in [slot.t0, slot.t1] {
                b.segment(at(t, r, slot.bottom), at(t, r, slot.top));
            }
        }
        if slot.reveal == 0.0 {
            // No reveal: the hole is closed by a back on the face itself.
            let row = |z: f64| across.iter().map(|&t| at(t, radius, z)).collect::<Vec<_>>();
            b.strip(&row(slot.bottom), &row(slot.top));
            continue;
        }
        for t in [slot.t0, slot.t1] {
            for z in [slot.bottom, slot.top] {
                b.segment(at(t, radius, z), at(t, back, z));
            }
            b.face(
                &[
                    at(t, radius, slot.bottom),
                    at(t, back, slot.bottom),
                    at(t, back, slot.top),
                    at(t, radius, slot.top),
                ],
                &[],
            );
        }
        let row = |r: f64, z: f64| across.iter().map(|&t| at(t, r, z)).collect::<Vec<_>>();
        for z in [slot.bottom, slot.top] {
            b.strip(&row(radius, z), &row(back, z));
        }
        b.strip(&row(back, slot.bottom), &row(back, slot.top));
    }
    cuts
}

#[cfg(test)]
mod tests {
    use super::super::super::site::SiteCurve;
    use super::super::checks::{built, unpaired_sides};
    use super::super::round::{build_tower, TowerSpec};

    fn tower(openings: &str) -> TowerSpec {
        let text = format!("(at: (0, 0), diameter: 6, height: 12, {openings})");
        ron::Options::default()
            .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
            .from_str(&text)
            .unwrap_or_else(|e| panic!("{text}: {e}"))
    }

    #[test]
    fn a_pierced_tower_stays_closed_and_its_lintels_are_arcs_of_its_circle() {
        let spec = tower(
            "storeys: [4, 8], openings: [(count: 4, facing: 10, width: 1.2, height: 2, \
             sill: 3, reveal: 0.5), (width: 1.4, height: 2.6, reveal: 0.5)]",
        );
        let site = built("tower", |b| build_tower(b, &spec)).unwrap();
        assert_eq!(unpaired_sides(&site), 0);
        // Each opening's sill and lintel, on the face and at the back, are arcs about the
        // axis: radius 3 on the face, 2.5 at the back.
        let mut radii: Vec<f64> = site
            .edges
            .iter()
            .filter_map(|e| match &e.curve {
                SiteCurve::Ellipse(arc) if arc.sweep < 6.0 => Some(arc.u.norm()),
                _ => None,
            })
            .collect();
        radii.sort_by(f64::total_cmp);
        radii.dedup_by(|a, b| (*a - *b).abs() < 1e-12);
        // Broken storey rings are arcs of radius 3 too.
        assert_eq!(radii.len(), 2);
        assert!((radii[0] - 2.5).abs() < 1e-12 && (radii[1] - 3.0).abs() < 1e-12);
    }

    #[test]
    fn a_shaped_head_on_a_round_wall_is_refused() {
        let spec = tower("openings: [(width: 1, height: 2, head: Pointed())]");
        let error = built("tower", |b| build_tower(b, &spec)).unwrap_err();
        assert!(
            error.contains("Pointed head cannot be set in a round wall"),
            "{error}"
        );
        let spec = tower("openings: [(count: 12, width: 2, height: 2)]");
        let error = built("tower", |b| build_tower(b, &spec)).unwrap_err();
        assert!(error.contains("do not fit round"), "{error}");
    }
}
