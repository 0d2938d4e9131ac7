//! Dashed lines: polylines cut into dashes along their length.

use crate::plane::{ImagePoint, PolylineSet};

/// The dashes of `lines`: `on` pixels drawn, `off` pixels left, repeating along each
/// polyline from its start. Each dash is a polyline of its own.
pub fn dashed(lines: &PolylineSet, on: f64, off: f64) -> PolylineSet {
    let mut dashes = PolylineSet::new();
    let period = on + off;
    let mut dash: Vec<ImagePoint> = Vec::new();
    for line in lines.iter() {
        // Where along the pattern the walk is: in [0, period).
        let mut phase = 0.0;
        dash.clear();
        if let Some(&first) = line.first() {
            dash.push(first);
        }
        for pair in line.windows(2) {
            let (a, b) = (pair[0], pair[1]);
            let length = ((b.x - a.x).powi(2) + (b.y - a.y).powi(2)).sqrt();
            // Only called inside the walk below, at 0 < walked <= length: never 0 / 0.
            let at = |s: f64| {
                let f = s / length;
                ImagePoint::new(a.x + (b.x - a.x) * f, a.y + (b.y - a.y) * f)
            };
            let mut walked = 0.0;
            while walked < length {
                let drawing = phase < on;
                let room = if drawing { on - phase } else { period - phase };
                let stride = room.min(length - walked);
                walked += stride;
                phase += stride;
                if drawing {
                    dash.push(at(walked));
                    if phase >= on {
                        dashes.push(&dash);
                        dash.clear();
                    }
                } else if phase >= period {
                    phase -= period;
                    dash.push(at(walked));
                }
            }
        }
        if dash.len() >= 2 {
            dashes.push(&dash);
        }
    }
    dashes
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_straight_line_in_dashes() {
        let mut lines = PolylineSet::new();
        lines.push(&[ImagePoint::new(0.0, 0.0), ImagePoint::new(25.0, 0.0)]);
        let dashes = dashed(&lines, 6.0, 4.0);
        let spans: Vec<(f64, f64)> = dashes.iter().map(|d| (d[0].x, d[d.len() - 1].x)).collect();
        assert_eq!(spans, vec![(0.0, 6.0), (10.0, 16.0), (20.0, 25.0)]);
    }

    #[test]
    fn a_slanting_line_away_from_the_axes_in_dashes() {
        // From (3, 4) along (0.6, 0.8) for 10 px (a 3-4-5 triangle doubled), 2 on and 3 off:
        // dashes over 0..2 and 5..7 px; the third would start at the very end.
        let mut lines = PolylineSet::new();
        lines.push(&[ImagePoint::new(3.0, 4.0), ImagePoint::new(9.0, 12.0)]);
        let dashes = dashed(&lines, 2.0, 3.0);
        let expected = [[(3.0, 4.0), (4.2, 5.6)], [(6.0, 8.0), (7.2, 9.6)]];
        assert_eq!(dashes.len(), expected.len());
        for (dash, ends) in dashes.iter().zip(expected) {
            assert_eq!(dash.len(), 2);
            for (p, (x, y)) in dash.iter().zip(ends) {
                assert!(
                    (p.x - x).abs() < 1e-12 && (p.y - y).abs() < 1e-12,
                    "{dash:?}"
                );
            }
        }
    }

    #[test]
    fn dashes_turn_corners() {
        let mut lines = PolylineSet::new();
        lines.push(&[
            ImagePoint::new(0.0, 0.0),
            ImagePoint::new(4.0, 0.0),
            ImagePoint::new(4.0, 10.0),
        ]);
        let dashes = dashed(&lines, 6.0, 4.0);
        let first: Vec<ImagePoint> = dashes.iter().next().unwrap().to_vec();
        assert_eq!(
            first,
            vec![
                ImagePoint::new(0.0, 0.0),
                ImagePoint::new(4.0, 0.0),
                ImagePoint::new(4.0, 2.0)
            ]
        );
        assert_eq!(dashes.len(), 2);
    }

    #[test]
    fn a_repeated_point_adds_nothing() {
        // A segment of no length (a polyline that stops twice at one point) is walked past:
        // the same dashes as without it, no point that is not a number.
        let with_repeat = |points: &[(f64, f64)]| {
            let mut lines = PolylineSet::new();
            let points: Vec<ImagePoint> =
                points.iter().map(|&(x, y)| ImagePoint::new(x, y)).collect();
            lines.push(&points);
            dashed(&lines, 6.0, 4.0)
        };
        let plain = with_repeat(&[(0.0, 0.0), (25.0, 0.0)]);
        let repeated = with_repeat(&[(0.0, 0.0), (8.0, 0.0), (8.0, 0.0), (25.0, 0.0)]);
        let ends = |set: &PolylineSet| -> Vec<(f64, f64)> {
            set.iter().map(|d| (d[0].x, d[d.len() - 1].x)).collect()
        };
        assert_eq!(ends(&repeated), ends(&plain));
        assert!(repeated
            .iter()
            .flatten()
            .all(|p| p.x.is_finite() && p.y.is_finite()));
    }
}
