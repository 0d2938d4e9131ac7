//! The north key: a small symbol of strokes and words saying where north lies on a sheet.
//! Plan north always (the scene's `y` axis, from which headings and azimuths are measured);
//! true north too when the scene's `location` turns it from plan north, since the sun is
//! placed from true north. The plan and the title block draw the same key.

use super::labels::{Label, LabelKind, Spot};
use super::lettering::{text_width, Align};
use crate::plane::{ImagePoint, PolylineSet};

/// The words beside the plan-north arrow.
pub const PLAN_NORTH: &str = "N";
/// The words beside the true-north arrow.
pub const TRUE_NORTH: &str = "TRUE N";

/// How far a tip reaches from the key's centre, in radii of its ring.
const TIP: f64 = 1.5;
/// Gap between a tip and its words, in cap heights.
const WORD_GAP: f64 = 0.35;

/// The key's strokes and its words (placed by the sheet's label placer with the rest).
#[derive(Clone, Debug, PartialEq)]
pub struct NorthKey {
    /// The ring, the arrows and their heads.
    pub lines: PolylineSet,
    /// "N", and "TRUE N" when true north differs.
    pub labels: Vec<Label>,
}

/// Whether a bearing of true north (degrees clockwise from plan north) differs from plan
/// north enough to draw: not for a bearing that is a whole turn or within a hair of one.
pub fn true_north_differs(true_north_deg: f64) -> bool {
    let b = true_north_deg.to_radians();
    true_north_deg.is_finite() && (b.sin().abs() > 1e-9 || b.cos() < 0.0)
}

/// The unit vector on the sheet (x right, y down) of a bearing `radians` clockwise from up.
pub fn up_turned(radians: f64) -> (f64, f64) {
    (radians.sin(), -radians.cos())
}

/// Half the width and height (pixels) of the box round its centre that a key of ring
/// `radius`, words of cap height `letter` and true north at `true_north_deg` takes: the
/// farthest of its strokes and of its words' boxes (at their first spots), each way.
pub fn north_key_half_extent(radius: f64, letter: f64, true_north_deg: f64) -> (f64, f64) {
    let key = north_key(ImagePoint::new(0.0, 0.0), radius, letter, true_north_deg);
    let mut half = (0.0f64, 0.0f64);
    for p in key.lines.points() {
        half = (half.0.max(p.x.abs()), half.1.max(p.y.abs()));
    }
    for label in &key.labels {
        let spot = label.spots[0];
        let half_width = 0.5 * text_width(&label.text, letter);
        let (x, base) = (label.anchor.x + spot.dx, label.anchor.y + spot.dy);
        half = (
            half.0
                .max((x - half_width).abs())
                .max((x + half_width).abs()),
            half.1.max((base - letter).abs()).max(base.abs()),
        );
    }
    half
}

/// The key centred at `centre`: a ring of `radius` pixels; plan north a shaft across the
/// ring to a tip above it with a closed, notched head and "N" beyond; true north (when it
/// differs) a shaft from the centre along its bearing with a single barb, so the two read
/// apart even in one ink, and "TRUE N" beyond its tip. Words `letter` pixels high.
pub fn north_key(centre: ImagePoint, radius: f64, letter: f64, true_north_deg: f64) -> NorthKey {
    let at = |u: (f64, f64), along: f64, side: f64| {
        // `side` to the right of the direction `u`: (-u.y, u.x) on a y-down sheet.
        ImagePoint::new(
            centre.x + along * u.0 - side * u.1,
            centre.y + along * u.1 + side * u.0,
        )
    };
    let mut lines = PolylineSet::new();
    let ring: Vec<ImagePoint> = (0..=48)
        .map(|k| {
            let a = std::f64::consts::TAU * k as f64 / 48.0;
            ImagePoint::new(centre.x + radius * a.cos(), centre.y + radius * a.sin())
        })
        .collect();
    lines.push(&ring);

    let up = up_turned(0.0);
    let tip = TIP * radius;
    lines.push(&[at(up, -radius, 0.0), at(up, tip, 0.0)]);
    lines.push(&[
        at(up, tip, 0.0),
        at(up, tip - 0.5 * radius, -0.28 * radius),
        at(up, tip - 0.32 * radius, 0.0),
        at(up, tip - 0.5 * radius, 0.28 * radius),
        at(up, tip, 0.0),
    ]);
    let mut labels = vec![words_beyond(PLAN_NORTH, at(up, tip, 0.0), up, letter)];

    if true_north_differs(true_north_deg) {
        let u = up_turned(true_north_deg.to_radians());
        let short = 0.9 * tip;
        lines.push(&[at(u, 0.0, 0.0), at(u, short, 0.0)]);
        // The barb on the side away from plan north, so that the heads keep apart.
        let away = if u.0 >= 0.0 { 0.3 } else { -0.3 };
        lines.push(&[
            at(u, short, 0.0),
            at(u, short - 0.5 * radius, away * radius),
        ]);
        labels.push(words_beyond(TRUE_NORTH, at(u, short, 0.0), u, letter));
    }
    NorthKey { lines, labels }
}

/// Words standing beyond `tip` in the direction `u`: their box just clear of the tip
/// (its support along `u` is half its width times |u.x| plus half its height times |u.y|),
/// with two spots to either side for when that is taken.
fn words_beyond(text: &str, tip: ImagePoint, u: (f64, f64), letter: f64) -> Label {
    let half_w = 0.5 * text_width(text, letter);
    let half_h = 0.5 * letter;
    let reach = WORD_GAP * letter + half_w * u.0.abs() + half_h * u.1.abs();
    // Baseline point of centred words whose box centre is `reach` beyond the tip.
    let (dx, dy) = (reach * u.0, reach * u.1 + half_h);
    let side = half_w + WORD_GAP * letter;
    Label {
        text: text.to_owned(),
        anchor: tip,
        kind: LabelKind::Title,
        height: letter,
        spots: vec![
            Spot::new(dx, dy, Align::Middle),
            Spot::new(side, half_h, Align::Middle),
            Spot::new(-side, half_h, Align::Middle),
        ],
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The direction (degrees clockwise from up) from `from` to `to` on a y-down sheet.
    fn bearing(from: ImagePoint, to: ImagePoint) -> f64 {
        (to.x - from.x)
            .atan2(from.y - to.y)
            .to_degrees()
            .rem_euclid(360.0)
    }

    #[test]
    fn plan_north_points_up_the_sheet_and_true_north_along_its_bearing() {
        let centre = ImagePoint::new(100.0, 100.0);
        for turn in [30.0, 90.0, 180.0, 271.5, -12.0] {
            let key = north_key(centre, 10.0, 4.0, turn);
            let polylines: Vec<Vec<ImagePoint>> = key.lines.iter().map(|p| p.to_vec()).collect();
            // The plan shaft: from the ring's bottom to the tip straight above the centre.
            let plan = &polylines[1];
            assert_eq!(bearing(centre, plan[1]), 0.0);
            assert!((plan[1].y - (100.0 - 15.0)).abs() < 1e-9);
            // The true shaft: from the centre, its tip at the bearing (mod 360).
            let truth = &polylines[3];
            assert_eq!(truth[0], centre);
            let expected = f64::rem_euclid(turn, 360.0);
            assert!(
                (bearing(centre, truth[1]) - expected).abs() < 1e-9,
                "{turn}"
            );
            assert_eq!(key.labels.len(), 2);
            assert_eq!(key.labels[1].text, TRUE_NORTH);
        }
    }

    #[test]
    fn one_arrow_when_plan_north_is_true_north() {
        for same in [0.0, 360.0, -720.0, 1e-12] {
            let key = north_key(ImagePoint::new(0.0, 0.0), 10.0, 4.0, same);
            assert_eq!(key.labels.len(), 1, "{same}");
            assert_eq!(key.labels[0].text, PLAN_NORTH);
            assert_eq!(key.lines.len(), 3);
        }
        assert!(true_north_differs(180.0));
        assert!(!true_north_differs(f64::NAN));
    }

    #[test]
    fn words_stand_clear_beyond_the_tip() {
        let (radius, letter) = (10.0, 4.0);
        for turn in (0..360).step_by(15) {
            let key = north_key(ImagePoint::new(0.0, 0.0), radius, letter, turn as f64);
            for label in &key.labels {
                let spot = label.spots[0];
                let width = text_width(&label.text, letter);
                let (cx, base) = (label.anchor.x + spot.dx, label.anchor.y + spot.dy);
                let (left, right, top) = (cx - width / 2.0, cx + width / 2.0, base - letter);
                // Every corner of the words' box lies beyond the tip along the arrow by
                // at least the gap: the box clears the tip and the shaft behind it.
                let tip = label.anchor;
                let u = if label.text == PLAN_NORTH {
                    up_turned(0.0)
                } else {
                    up_turned((turn as f64).to_radians())
                };
                for (x, y) in [(left, top), (right, top), (left, base), (right, base)] {
                    let along = (x - tip.x) * u.0 + (y - tip.y) * u.1;
                    assert!(along >= WORD_GAP * letter - 1e-9, "{turn}: {}", label.text);
                }
                let (mx, my) = (cx, base - letter / 2.0);
                assert!(mx.hypot(my) > tip.x.hypot(tip.y), "{turn}");
            }
        }
    }

    #[test]
    fn the_half_extent_of_a_lone_plan_north_by_hand() {
        // Up: the tip 1.5 radii above the centre, the gap, then the "N" a cap height tall;
        // down: the ring's bottom. Across: the ring, wider than the "N".
        let (radius, letter) = (10.0, 4.0);
        let (half_w, half_h) = north_key_half_extent(radius, letter, 0.0);
        assert!(
            (half_h - (15.0 + 0.35 * 4.0 + 4.0)).abs() < 1e-9,
            "{half_h}"
        );
        assert!((half_w - 10.0).abs() < 1e-9, "{half_w}");
        // True north due east: its words reach past the ring to the right.
        let (east_w, _) = north_key_half_extent(radius, letter, 90.0);
        let expected = 0.9 * 15.0 + 0.35 * 4.0 + text_width(TRUE_NORTH, letter);
        assert!((east_w - expected).abs() < 1e-9, "{east_w} vs {expected}");
    }

    #[test]
    fn the_ring_is_a_circle_of_the_radius_round_the_centre() {
        // 48 equal steps of 7.5 degrees, closed, starting due right of the centre; each
        // chord 2 r sin(3.75 degrees) long.
        let (centre, radius) = (ImagePoint::new(120.0, 80.0), 10.0);
        let key = north_key(centre, radius, 4.0, 0.0);
        let ring = key.lines.iter().next().unwrap();
        assert_eq!(ring.len(), 49);
        assert_eq!(ring[0], ImagePoint::new(130.0, 80.0));
        assert!((ring[48].x - 130.0).abs() < 1e-9 && (ring[48].y - 80.0).abs() < 1e-9);
        let chord = 2.0 * radius * 3.75f64.to_radians().sin();
        for (k, p) in ring.iter().enumerate() {
            assert!(
                ((p.x - 120.0).hypot(p.y - 80.0) - radius).abs() < 1e-9,
                "{k}"
            );
        }
        for pair in ring.windows(2) {
            let d = (pair[1].x - pair[0].x).hypot(pair[1].y - pair[0].y);
            assert!((d - chord).abs() < 1e-9, "{d} vs {chord}");
        }
        // A quarter of the way round, 90 degrees on from the start (y down: below).
        assert!((ring[12].x - 120.0).abs() < 1e-9 && (ring[12].y - 90.0).abs() < 1e-9);
    }

    #[test]
    fn the_plan_head_is_closed_and_notched_by_hand() {
        // The design's head, in radii: from the tip (1.5 above the centre) back half a
        // radius to barbs 0.28 to either side, and in to the notch on the shaft 0.32 back
        // from the tip. Radius 10 about (100, 100): the tip at (100, 85), the barbs at
        // (97.2, 90) and (102.8, 90), the notch at (100, 88.2); the shaft from the ring's
        // foot (100, 110) to the tip.
        let key = north_key(ImagePoint::new(100.0, 100.0), 10.0, 4.0, 0.0);
        let lines: Vec<Vec<ImagePoint>> = key.lines.iter().map(|l| l.to_vec()).collect();
        let near = |p: ImagePoint, x: f64, y: f64| (p.x - x).abs() < 1e-9 && (p.y - y).abs() < 1e-9;
        let shaft = &lines[1];
        assert!(
            near(shaft[0], 100.0, 110.0) && near(shaft[1], 100.0, 85.0),
            "{shaft:?}"
        );
        // Closed, the notch between the barbs (which way round it goes is not seen).
        let head = &lines[2];
        assert_eq!(head.len(), 5, "{head:?}");
        assert!(
            near(head[0], 100.0, 85.0) && near(head[4], 100.0, 85.0),
            "{head:?}"
        );
        assert!(near(head[2], 100.0, 88.2), "{head:?}");
        let barbs = (head[1], head[3]);
        assert!(
            (near(barbs.0, 97.2, 90.0) && near(barbs.1, 102.8, 90.0))
                || (near(barbs.0, 102.8, 90.0) && near(barbs.1, 97.2, 90.0)),
            "{head:?}"
        );
    }

    #[test]
    fn the_true_north_barb_stands_away_from_plan_north() {
        // Radius 10, so the true shaft is 0.9 x 15 = 13.5 long, and its barb half a radius
        // back from its tip and 0.3 radius aside: due east, the tip at (113.5, 100) and the
        // barb at (108.5, 103), below the shaft; due west, mirrored: (86.5, 100), (91.5,
        // 103). Whatever the bearing, the barb turns further from plan north than the
        // shaft: clockwise of it on the east side, anticlockwise on the west.
        let centre = ImagePoint::new(100.0, 100.0);
        let near = |p: ImagePoint, x: f64, y: f64| (p.x - x).abs() < 1e-9 && (p.y - y).abs() < 1e-9;
        for (turn, tip, barb) in [
            (90.0, (113.5, 100.0), (108.5, 103.0)),
            (270.0, (86.5, 100.0), (91.5, 103.0)),
        ] {
            let key = north_key(centre, 10.0, 4.0, turn);
            let lines: Vec<Vec<ImagePoint>> = key.lines.iter().map(|l| l.to_vec()).collect();
            assert_eq!(lines.len(), 5);
            assert!(near(lines[3][1], tip.0, tip.1), "{turn}: {:?}", lines[3]);
            assert!(near(lines[4][0], tip.0, tip.1), "{turn}: {:?}", lines[4]);
            assert!(near(lines[4][1], barb.0, barb.1), "{turn}: {:?}", lines[4]);
        }
        let bearing_of = |p: ImagePoint| {
            (p.x - 100.0)
                .atan2(100.0 - p.y)
                .to_degrees()
                .rem_euclid(360.0)
        };
        for turn in [10.0, 45.0, 135.0, 179.0, 181.0, 225.0, 315.0, 350.0] {
            let key = north_key(centre, 10.0, 4.0, turn);
            let barb = key.lines.iter().nth(4).unwrap()[1];
            let off = bearing_of(barb) - turn;
            if turn < 180.0 {
                assert!(off > 0.0, "{turn}: {off}");
            } else {
                assert!(off < 0.0, "{turn}: {off}");
            }
        }
    }

    #[test]
    fn the_words_stand_a_gap_beyond_the_tip_or_beside_it() {
        // Centred words: their box from x - width / 2 to x + width / 2, from the baseline
        // up a cap height. Plan north: the baseline a gap (0.35 cap height) above the tip.
        // True north due east: the box's middle a gap plus half its width right of the
        // tip, level with it. Then, for any bearing, the second and third spots: the box a
        // gap to the right or to the left of the tip, level with it.
        let letter = 4.0;
        let gap = 0.35 * letter;
        let key = north_key(ImagePoint::new(50.0, 60.0), 10.0, letter, 90.0);
        let plan = key.labels[0].spots[0];
        assert_eq!(plan.dx, 0.0);
        assert!((plan.dy + gap).abs() < 1e-9, "{plan:?}");
        let width = text_width(TRUE_NORTH, letter);
        let east = key.labels[1].spots[0];
        assert!((east.dx - gap - width / 2.0).abs() < 1e-9, "{east:?}");
        assert!((east.dy - letter / 2.0).abs() < 1e-9, "{east:?}");
        for turn in [0.0, 90.0, 200.0] {
            let key = north_key(ImagePoint::new(50.0, 60.0), 10.0, letter, turn);
            for label in &key.labels {
                let width = text_width(&label.text, letter);
                assert_eq!(label.spots.len(), 3);
                let (right, left) = (label.spots[1], label.spots[2]);
                assert!((right.dx - width / 2.0 - gap).abs() < 1e-9, "{turn}");
                assert!((left.dx + width / 2.0 + gap).abs() < 1e-9, "{turn}");
                assert_eq!((right.dy, left.dy), (letter / 2.0, letter / 2.0));
                assert_eq!((right.align, left.align), (Align::Middle, Align::Middle));
            }
        }
    }

    #[test]
    fn true_north_due_west_reaches_as_far_as_due_east() {
        // The key is symmetric about plan north: "TRUE N" due west stands as far left of
        // the centre as due east it stands right, the shaft 0.9 x 15, the gap 0.35 x 4,
        // then the whole width of the words.
        let (radius, letter) = (10.0, 4.0);
        let expected = 0.9 * 15.0 + 0.35 * 4.0 + text_width(TRUE_NORTH, letter);
        for turn in [90.0, 270.0] {
            let (half_w, _) = north_key_half_extent(radius, letter, turn);
            assert!(
                (half_w - expected).abs() < 1e-9,
                "{turn}: {half_w} vs {expected}"
            );
        }
    }
}
