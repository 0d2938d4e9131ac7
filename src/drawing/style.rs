//! Applying styles to a drawing's layers: colour, opacity, weight and dashes, by layer name.

use super::{dashed, wireframe_layer_name, Layer, HIDDEN, WIREFRAME};
use crate::scene::{Colour, LayerStyle, StyleSheet};

/// The look pansite gives a page unless told otherwise: black lines a quarter of a
/// millimetre wide for the seen edges, hidden edges light and dashed, the grid in the light
/// blue that copies and scans drop out, so that the underlay stays light enough to draw over
/// and prints well in black and white.
pub fn page_style() -> StyleSheet {
    let entry = |colour: &str, opacity: f64, weight: f64, dash: Option<(f64, f64)>| {
        let colour = Colour::parse(colour).unwrap_or(Colour([0, 0, 0]));
        LayerStyle::on_paper(colour, opacity, weight, dash)
    };
    let mut sheet = StyleSheet::default();
    for (name, style) in [
        ("wireframe", entry("black", 1.0, 0.25, None)),
        ("hidden", entry("black", 0.4, 0.18, Some((1.2, 0.8)))),
        ("grid", entry("non-photo blue", 1.0, 0.1, None)),
        ("horizon", entry("#4a7fb0", 1.0, 0.25, None)),
        ("frame", entry("black", 0.8, 0.2, None)),
        ("title", entry("black", 0.9, 0.2, None)),
    ] {
        sheet.0.insert(name.to_owned(), style);
    }
    sheet
}

/// The entries of a sheet that style `layer`, from the most general to the most
/// particular: `wireframe` for every wireframe layer, then the layer's own name, then the
/// name of a layer of the site's items (whose wireframe layer it styles).
fn entries_for<'a>(sheet: &'a StyleSheet, layer: &str) -> Vec<&'a LayerStyle> {
    // The near and far parts of a wireframe layer look like the layer.
    let layer = layer
        .strip_suffix(" (near)")
        .or_else(|| layer.strip_suffix(" (far)"))
        .unwrap_or(layer);
    let general = sheet
        .0
        .get(WIREFRAME)
        .filter(|_| layer != WIREFRAME && layer.starts_with(WIREFRAME));
    let own = sheet.0.get(layer);
    let site = sheet
        .0
        .iter()
        .find(|(key, _)| key.as_str() != layer && wireframe_layer_name(Some(key)) == layer)
        .map(|(_, style)| style);
    [general, own, site].into_iter().flatten().collect()
}

/// Applies the style sheets in order (later ones win) to the layers. Weights and dashes in
/// millimetres become pixels at `px_per_mm`. Hidden edges are dashed even without a style
/// (`default_dash_px`).
pub fn apply_styles(
    layers: &mut [Layer],
    sheets: &[&StyleSheet],
    px_per_mm: f64,
    default_dash_px: (f64, f64),
) {
    for layer in layers.iter_mut() {
        let mut dash = (layer.name == HIDDEN).then_some(default_dash_px);
        for sheet in sheets {
            for style in entries_for(sheet, &layer.name) {
                apply(layer, style, px_per_mm, &mut dash);
            }
        }
        if let Some((on, off)) = dash {
            // Areas are filled, never dashed.
            if on > 0.0 && off > 0.0 && !layer.filled {
                layer.lines = dashed(&layer.lines, on, off);
            }
        }
    }
}

fn apply(layer: &mut Layer, style: &LayerStyle, px_per_mm: f64, dash: &mut Option<(f64, f64)>) {
    if let Some(colour) = style.colour {
        layer.stroke.colour = colour.0;
    }
    if let Some(opacity) = style.opacity {
        layer.stroke.opacity = opacity.0;
    }
    if let Some(weight) = style.weight_mm {
        layer.stroke.width_px = weight.0 * px_per_mm;
    }
    if let Some(weight) = style.weight_px {
        layer.stroke.width_px = weight.0;
    }
    if let Some((on, off)) = style.dash_mm {
        *dash = Some((on.0 * px_per_mm, off.0 * px_per_mm));
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::drawing::Stroke;
    use crate::plane::{ImagePoint, PolylineSet};

    fn layer(name: &str) -> Layer {
        let mut lines = PolylineSet::new();
        lines.push(&[ImagePoint::new(0.0, 0.0), ImagePoint::new(100.0, 0.0)]);
        Layer {
            filled: false,
            text: None,
            name: name.to_owned(),
            stroke: Stroke::black(1.0, 1.0),
            lines,
        }
    }

    #[test]
    fn general_then_own_then_site_layer_entries() {
        let sheet: StyleSheet = ron::Options::default()
            .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
            .from_str(
                "{\"wireframe\": (colour: \"red\", weight_px: 3), \"lamps\": (colour: \"blue\"), \
             \"hidden\": (dash_mm: (2, 1))}",
            )
            .unwrap();
        let mut layers = vec![
            layer("wireframe"),
            layer("wireframe: lamps"),
            layer("hidden"),
        ];
        apply_styles(&mut layers, &[&sheet], 2.0, (6.0, 4.0));
        assert_eq!(layers[0].stroke.colour, [200, 30, 30]);
        assert_eq!(layers[1].stroke.colour, [30, 80, 200]);
        assert_eq!(layers[1].stroke.width_px, 3.0);
        // Dashes of 4 px every 6 px along 100 px: 17 dashes.
        assert_eq!(layers[2].lines.len(), 17);
    }

    #[test]
    fn the_page_style_and_the_default_dashes() {
        // The page style at 10 px a millimetre: seen edges 0.25 mm, hidden ones dashed
        // 1.2 mm on and 0.8 mm off (12 and 8 px: 5 dashes along 100 px), the grid in
        // non-photo blue; the wireframe's entry styles no other layer.
        let mut layers = vec![
            layer("wireframe"),
            layer("hidden"),
            layer("grid"),
            layer("labels"),
        ];
        apply_styles(&mut layers, &[&page_style()], 10.0, (6.0, 4.0));
        assert_eq!(layers[0].stroke.width_px, 2.5);
        assert_eq!(layers[0].lines.len(), 1);
        assert_eq!(layers[1].lines.len(), 5);
        assert_eq!(layers[2].stroke.width_px, 1.0);
        assert_eq!(
            Some(Colour(layers[2].stroke.colour)),
            Colour::parse("non-photo blue")
        );
        assert_eq!(layers[3].stroke, Stroke::black(1.0, 1.0));
        // With no sheet, hidden edges take the default dashes and nothing else is dashed.
        let mut bare = vec![layer("wireframe"), layer("hidden")];
        apply_styles(&mut bare, &[], 10.0, (6.0, 4.0));
        assert_eq!((bare[0].lines.len(), bare[1].lines.len()), (1, 10));
        // A dash with no gap, or on a filled area, leaves the lines whole.
        let sheet: StyleSheet = ron::Options::default()
            .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
            .from_str(
                "{\"hidden\": (dash_mm: (1, 0)), \"frame\": (dash_mm: (0, 1)), \
                 \"tone\": (dash_mm: (1, 1))}",
            )
            .unwrap();
        let mut tone = layer("tone");
        tone.filled = true;
        let mut whole = vec![layer("hidden"), layer("frame"), tone];
        apply_styles(&mut whole, &[&sheet], 10.0, (6.0, 4.0));
        let untouched = layer("any").lines;
        assert!(whole.iter().all(|layer| layer.lines == untouched));
    }
}
