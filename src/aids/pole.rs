//! The measuring pole: a vertical at a plan position with a tick at every step (a metre, a
//! foot, a storey), numbered, for putting people and things at the right height anywhere.
//!
//! A point at height `h` on a pole at horizontal distance `D` from the eye (eye height `E`)
//! is seen at elevation `atan((h - E) / D)`; so the tick at the eye's height lies on the
//! horizon, wherever the pole stands: every point at eye height is on the horizon, which is
//! why a figure's eyes, drawn on the horizon, fix its size (common practice). That tick is
//! marked `EYE`.

use crate::drawing::{Align, Label, LabelKind, Spot};
use crate::plane::image_of_point;
use crate::plane::{Flattener, ImagePoint, PolylineSet};
use crate::scene::{Pole, SiteCurve};
use crate::sphere::ViewFrame;
use nalgebra::Vector3;

/// The heights (metres above the foot) of the pole's ticks.
pub fn tick_heights(pole: &Pole) -> Vec<f64> {
    let count = (pole.height / pole.step + 1e-9).floor() as u32;
    (0..=count).map(|k| k as f64 * pole.step).collect()
}

/// A height in the pole's unit, as written beside its tick.
fn height_text(metres: f64, unit: f64) -> String {
    let value = metres / unit;
    let hundredths = (value * 100.0).round();
    if hundredths % 100.0 == 0.0 {
        format!("{}", (hundredths / 100.0) as i64)
    } else {
        format!("{}", hundredths / 100.0)
    }
}

/// Draws the pole, its ticks and their heights, the eye-height tick and the pole's label.
pub fn draw(
    view: &ViewFrame,
    flattener: &mut Flattener,
    pole: &Pole,
    text: f64,
    out: &mut PolylineSet,
    labels: &mut Vec<Label>,
) {
    let map = flattener.map();
    let top = pole.foot + Vector3::z() * pole.height;
    let Ok(curve) = view.sphere_curve(&SiteCurve::Segment {
        start: pole.foot,
        end: top,
    }) else {
        return; // Seen end-on: the eye is on the pole's line.
    };
    flattener.flatten(&curve, out);
    let tick = 0.5 * text;
    let mut last_label: Option<f64> = None;
    for (k, h) in tick_heights(pole).into_iter().enumerate() {
        let Some(p) = image_of_point(view, &map, &(pole.foot + Vector3::z() * h)) else {
            continue;
        };
        let long = if k % 5 == 0 { 2.0 } else { 1.0 };
        out.push(&[
            ImagePoint::new(p.x - long * tick, p.y),
            ImagePoint::new(p.x + long * tick, p.y),
        ]);
        // Numbers where there is room between them.
        if last_label.is_none_or(|y| (y - p.y).abs() >= 1.5 * text) {
            labels.push(
                Label::fixed(
                    height_text(h, pole.unit),
                    p,
                    LabelKind::Pole,
                    text,
                    Align::Start,
                )
                .with_spots(vec![
                    Spot::new(2.5 * tick, 0.5 * text, Align::Start),
                    Spot::new(-2.5 * tick, 0.5 * text, Align::End),
                ]),
            );
            last_label = Some(p.y);
        }
    }
    let eye = view.eye();
    let eye_height = eye.z - pole.foot.z;
    if (0.0..=pole.height).contains(&eye_height) {
        if let Some(p) = image_of_point(view, &map, &(pole.foot + Vector3::z() * eye_height)) {
            out.push(&[
                ImagePoint::new(p.x - 3.0 * tick, p.y),
                ImagePoint::new(p.x + 3.0 * tick, p.y),
            ]);
            let words = format!("EYE {}", height_text(eye_height, pole.unit));
            labels.push(
                Label::fixed(words, p, LabelKind::Pole, text, Align::End).with_spots(vec![
                    Spot::new(-3.5 * tick, -0.3 * text, Align::End),
                    Spot::new(-3.5 * tick, 1.3 * text, Align::End),
                    Spot::new(3.5 * tick, -0.3 * text, Align::Start),
                ]),
            );
        }
    }
    if let Some(p) = image_of_point(view, &map, &top) {
        let distance = (pole.foot.xy() - eye.xy()).norm() / pole.unit;
        let away = format!("{} AWAY", height_text(distance * pole.unit, pole.unit));
        let name = match &pole.label {
            Some(label) => format!("{label}: {away}"),
            None => away,
        };
        labels.push(
            Label::fixed(name, p, LabelKind::Pole, text, Align::Middle).with_spots(vec![
                Spot::new(0.0, -0.8 * text, Align::Middle),
                Spot::new(0.0, -2.0 * text, Align::Middle),
                Spot::new(0.6 * text, -0.6 * text, Align::Start),
                Spot::new(-0.6 * text, -0.6 * text, Align::End),
            ]),
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::Point3;

    #[test]
    fn ticks_every_step_including_both_ends() {
        let pole = Pole {
            label: None,
            foot: Point3::new(0.0, 10.0, 0.0),
            height: 3.0,
            step: 0.3,
            unit: 1.0,
        };
        let ticks = tick_heights(&pole);
        assert_eq!(ticks.len(), 11);
        assert!((ticks[10] - 3.0).abs() < 1e-12);
        assert_eq!(height_text(0.9144, 0.3048), "3");
        assert_eq!(height_text(1.25, 1.0), "1.25");
    }
}
