//! Cones from the eye round the faces, and a grid over the sphere of directions that finds,
//! for one cone, the cones that may overlap it without trying them all. The shade tone asks
//! it for the faces that may stand between the eye and a receiving face.

use super::boxes::Marks;
use crate::scene::Face;
use nalgebra::{Point3, Vector3};
use std::f64::consts::{FRAC_PI_2, PI};

/// A cone from the eye round a face's bounding sphere (about the centre of its corners).
#[derive(Clone, Copy, Debug)]
pub struct Cone {
    /// The unit direction from the eye to the sphere's centre.
    pub direction: Vector3<f64>,
    /// The half-angle, radians (pi when the eye is inside the sphere), and its cosine and
    /// sine.
    pub angle: f64,
    pub cos: f64,
    pub sin: f64,
    /// The nearest and farthest distances of the sphere from the eye.
    pub near: f64,
    pub far: f64,
}

/// How far apart (in cosine) the two sides of a comparison of angles must be to be
/// settled by cosines alone; closer ones are settled by the angles themselves, so the
/// answer is the same either way (the cosines' rounding is about 1e-16).
const COSINE_MARGIN: f64 = 1e-9;

impl Cone {
    pub fn round(face: &Face, eye: &Point3<f64>) -> Cone {
        let c = face.corners;
        let centre = Point3::from((c[0].coords + c[1].coords + c[2].coords) / 3.0);
        let radius = c.iter().map(|p| (p - centre).norm()).fold(0.0, f64::max);
        let to = centre - eye;
        let distance = to.norm();
        let angle = if distance > radius {
            (radius / distance).asin()
        } else {
            PI
        };
        Cone {
            direction: to / distance.max(1e-300),
            angle,
            cos: angle.cos(),
            sin: angle.sin(),
            near: distance - radius,
            far: distance + radius,
        }
    }

    /// Whether a face in this cone may stand in front of one in `receiver`'s: it is not
    /// wholly beyond it, and the angle between the cones' axes is at most the sum of their
    /// half-angles. That angle test is `acos(a . b) <= ha + hr`; where the cosine of the
    /// sum (cos ha cos hr - sin ha sin hr) settles it by more than [`COSINE_MARGIN`] the
    /// arc cosine is not taken.
    pub fn may_hide(&self, receiver: &Cone) -> bool {
        if self.near > receiver.far {
            return false; // wholly beyond the receiver
        }
        let reach = self.angle + receiver.angle;
        if reach >= PI {
            return true;
        }
        let dot = self.direction.dot(&receiver.direction).clamp(-1.0, 1.0);
        let cos_reach = self.cos * receiver.cos - self.sin * receiver.sin;
        if dot > cos_reach + COSINE_MARGIN {
            true
        } else if dot < cos_reach - COSINE_MARGIN {
            false
        } else {
            dot.acos() <= reach
        }
    }
}

/// How much (radians) each cone is widened before it is entered in the grid: far more than
/// the rounding of the angles (an arc cosine near 1 loses about 1e-8), so two cones whose
/// axes are within the sum of their half-angles always share a cell.
const GRID_MARGIN: f64 = 1e-6;

/// Cells of the grid over the sphere: rows of elevation, columns of azimuth.
const ROWS: usize = 64;
const COLUMNS: usize = 128;

/// A cap that reaches more cells than this is kept out of the cells (it would be met many
/// times over); such a cap is among every cap's neighbours, and a query by one is answered
/// with every cone.
const WIDE_CELLS: usize = 256;

/// Cones entered in every cell (of azimuth and elevation about the eye) that their caps,
/// a little widened, reach; the wide ones in a list of their own.
pub struct ConeGrid {
    /// How many cones.
    count: usize,
    /// The cones whose caps reach more than [`WIDE_CELLS`], ascending.
    wide: Vec<u32>,
    /// Where each cell's cones start in `entries` (one more than the cells: the last is
    /// the end).
    starts: Vec<usize>,
    /// The cones of every cell, cell after cell, each cell's ascending.
    entries: Vec<u32>,
}

/// The cells a cap reaches: rows `rows`, and in each the columns `columns` (unwrapped:
/// taken modulo [`COLUMNS`]).
struct Reach {
    rows: std::ops::RangeInclusive<usize>,
    columns: std::ops::RangeInclusive<i64>,
}

impl Reach {
    fn cells(&self) -> usize {
        self.rows.clone().count() * self.columns.clone().count()
    }
}

/// The cells of the cap round `direction` (unit) of half-angle `angle`, widened by
/// [`GRID_MARGIN`]: the rows its elevations span, and the columns of azimuth its widest
/// row spans, `asin(sin h / cos e)` either side of its axis (the azimuths of a cap that
/// holds no pole; every column when it holds one).
fn reach(direction: &Vector3<f64>, angle: f64) -> Reach {
    let h = angle + GRID_MARGIN;
    let elevation = direction.z.clamp(-1.0, 1.0).asin();
    let row_height = PI / ROWS as f64;
    let row = |e: f64| (((e + FRAC_PI_2) / row_height).floor().max(0.0) as usize).min(ROWS - 1);
    let rows = row(elevation - h)..=row(elevation + h);
    let column_width = 2.0 * PI / COLUMNS as f64;
    let every = 0..=(COLUMNS as i64 - 1);
    if elevation + h >= FRAC_PI_2 || elevation - h <= -FRAC_PI_2 {
        return Reach {
            rows,
            columns: every,
        };
    }
    let ratio = h.sin() / elevation.cos();
    if h >= FRAC_PI_2 || ratio >= 1.0 {
        return Reach {
            rows,
            columns: every,
        };
    }
    let half_width = ratio.asin();
    let azimuth = direction.y.atan2(direction.x);
    let column = |a: f64| ((a + PI) / column_width).floor() as i64;
    let (first, last) = (column(azimuth - half_width), column(azimuth + half_width));
    let columns = if last - first >= COLUMNS as i64 - 1 {
        every
    } else {
        first..=last
    };
    Reach { rows, columns }
}

impl ConeGrid {
    pub fn new(cones: &[Cone]) -> ConeGrid {
        let reaches: Vec<Reach> = cones.iter().map(|c| reach(&c.direction, c.angle)).collect();
        let cells = |r: &Reach| {
            let columns = r.columns.clone();
            r.rows.clone().flat_map(move |row| {
                columns
                    .clone()
                    .map(move |c| row * COLUMNS + c.rem_euclid(COLUMNS as i64) as usize)
            })
        };
        let wide: Vec<u32> = (0..cones.len() as u32)
            .filter(|&k| reaches[k as usize].cells() > WIDE_CELLS)
            .collect();
        let narrow = |r: &&Reach| r.cells() <= WIDE_CELLS;
        // Counted first, then entered, cone by cone in order: each cell's list ascends.
        let mut starts = vec![0; ROWS * COLUMNS + 1];
        for r in reaches.iter().filter(narrow) {
            for cell in cells(r) {
                starts[cell + 1] += 1;
            }
        }
        for k in 1..starts.len() {
            starts[k] += starts[k - 1];
        }
        let mut fill = starts.clone();
        let mut entries = vec![0; starts[starts.len() - 1]];
        for (k, r) in reaches.iter().enumerate().filter(|(_, r)| narrow(r)) {
            for cell in cells(r) {
                entries[fill[cell]] = k as u32;
                fill[cell] += 1;
            }
        }
        ConeGrid {
            count: cones.len(),
            wide,
            starts,
            entries,
        }
    }

    /// The cones entered in the cells `cone` reaches, ascending and each once: every cone
    /// whose axis is within the sum of the two half-angles of `cone`'s is among them.
    pub fn near(&self, cone: &Cone, out: &mut Vec<u32>) {
        out.clear();
        let r = reach(&cone.direction, cone.angle);
        if r.cells() > WIDE_CELLS {
            out.extend(0..self.count as u32);
            return;
        }
        out.extend_from_slice(&self.wide);
        let mut seen = Marks::new(self.count);
        for row in r.rows {
            for c in r.columns.clone() {
                let cell = row * COLUMNS + c.rem_euclid(COLUMNS as i64) as usize;
                let entries = &self.entries[self.starts[cell]..self.starts[cell + 1]];
                out.extend(entries.iter().filter(|&&k| seen.first(k)));
            }
        }
        out.sort_unstable();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cone(direction: Vector3<f64>, angle: f64) -> Cone {
        Cone {
            direction: direction.normalize(),
            angle,
            cos: angle.cos(),
            sin: angle.sin(),
            near: 1.0,
            far: 2.0,
        }
    }

    #[test]
    fn cones_settled_by_cosines_agree_with_the_arc_cosine() {
        // The cones' test against its definition, acos(a . b) <= ha + hr, over cones
        // scattered round the sphere (a fixed sequence of our own) and over pairs whose
        // axes are set at the sum of their half-angles, give or take a hair, where the
        // cosines alone cannot settle it.
        let mut next = crate::testing::numbers(11);
        let definition = |h: &Cone, r: &Cone| {
            let reach = h.angle + r.angle;
            reach >= PI || h.direction.dot(&r.direction).clamp(-1.0, 1.0).acos() <= reach
        };
        let (mut near_the_edge, mut both) = (0, [0, 0]);
        for k in 0..20_000 {
            let mut unit = || Vector3::new(next() - 0.5, next() - 0.5, next() - 0.5);
            let (a, b) = (unit(), unit());
            let (ha, hr) = (next() * 1.2, next() * 0.4);
            let h = cone(a, ha);
            let r = if k % 2 == 0 {
                cone(b, hr)
            } else {
                // The axis turned from h's by ha + hr and a hair (up to 1e-9 radians).
                let across = a.cross(&b).normalize();
                let turn = ha + hr + (next() - 0.5) * 2e-9;
                let axis = nalgebra::Rotation3::from_axis_angle(
                    &nalgebra::Unit::new_normalize(across),
                    turn,
                ) * a.normalize();
                near_the_edge += 1;
                cone(axis, hr)
            };
            let expected = definition(&h, &r);
            both[expected as usize] += 1;
            assert_eq!(h.may_hide(&r), expected, "{h:?} {r:?}");
        }
        assert!(
            near_the_edge > 5000 && both[0] > 1000 && both[1] > 1000,
            "{both:?}"
        );
        // Wholly beyond the receiver: never in front of it.
        let mut far = cone(Vector3::x(), 0.3);
        far.near = 3.0;
        assert!(!far.may_hide(&cone(Vector3::x(), 0.3)));
    }

    #[test]
    fn the_grid_finds_every_cone_that_may_hide_another() {
        // Against trying every pair: over cones of a fixed sequence of our own (most
        // small, some wide, some round the poles and across the azimuth's seam, a few
        // holding the eye), every cone that may hide a receiver is among those the grid
        // finds for it, each once and ascending, and the grid finds far fewer than all.
        let mut next = crate::testing::numbers(23);
        let mut cones = Vec::new();
        for k in 0..1500 {
            let mut direction = Vector3::new(next() - 0.5, next() - 0.5, next() - 0.5);
            match k % 10 {
                // Near a pole.
                0 => direction.z = direction.z.signum() * 40.0,
                // On the seam of azimuth (the -x axis).
                1 => direction = Vector3::new(-1.0, 1e-12 * (next() - 0.5), direction.z),
                _ => {}
            }
            let angle = match k % 7 {
                0 => next() * 1.6,
                1 if k % 3 == 0 => PI,
                _ => next() * next() * 0.2,
            };
            cones.push(cone(direction, angle));
        }
        let grid = ConeGrid::new(&cones);
        let (mut found, mut hits, mut asked) = (Vec::new(), 0, 0);
        for receiver in &cones {
            grid.near(receiver, &mut found);
            assert!(found.windows(2).all(|w| w[0] < w[1]));
            asked += found.len();
            for (j, hider) in cones.iter().enumerate() {
                if hider.may_hide(receiver) {
                    hits += 1;
                    assert!(found.contains(&(j as u32)), "{hider:?} {receiver:?}");
                }
            }
        }
        assert!(hits > 10_000, "{hits}");
        assert!(asked < cones.len() * cones.len() / 2, "{asked}");
    }

    #[test]
    fn a_cap_reaches_the_columns_of_its_widest_row() {
        // A cap of half-angle h round elevation e reaches azimuths asin(sin h / cos e)
        // either side of its axis (spherical trigonometry: the great circle tangent to the
        // cap through the pole); at e = 60 degrees and h = 10 degrees that is 20.3 degrees,
        // so the columns reached span 40.6 degrees and less than two columns more. A cap
        // round a pole reaches every column.
        let e = 60f64.to_radians();
        let r = reach(&Vector3::new(e.cos(), 0.0, e.sin()), 10f64.to_radians());
        let width = (r.columns.end() - r.columns.start() + 1) as f64 * 360.0 / COLUMNS as f64;
        let expected = 2.0 * (10f64.to_radians().sin() / e.cos()).asin().to_degrees();
        assert!(width >= expected && width <= expected + 2.0 * 360.0 / COLUMNS as f64);
        let r = reach(&Vector3::z(), 0.01);
        assert_eq!(r.columns, 0..=(COLUMNS as i64 - 1));
        assert_eq!(*r.rows.end(), ROWS - 1);
    }
}
