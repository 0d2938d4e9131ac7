//! The drawing: a display list of stroked polylines in image pixels, built from the site and
//! the overlays, that every output backend reads.

mod dash;
mod glyphs;
pub mod labels;
mod lettering;
mod north;
mod style;
mod wireframe;

pub use dash::dashed;
pub use labels::{
    label_layers, Label, LabelInk, LabelKind, LabelPlacer, Placed, PlacedLabel, Spot, HALO,
};
pub use lettering::{letter, line_pitch, stroke_width, text_extent, text_width, unlettered, Align};
pub use north::{
    north_key, north_key_half_extent, true_north_differs, up_turned, NorthKey, PLAN_NORTH,
    TRUE_NORTH,
};
pub use style::{apply_styles, page_style};
pub use wireframe::{
    wireframe, Distance, SkippedEdge, WireLayer, Wireframe, FAR_METRES, NEAR_METRES,
};

use crate::plane::{ImagePoint, PolylineSet};

/// How a layer's lines are drawn: colour, opacity over white paper, and width in the
/// drawing's pixels.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Stroke {
    /// Red, green, blue, 0 to 255.
    pub colour: [u8; 3],
    /// 0 = invisible, 1 = the full colour.
    pub opacity: f64,
    /// Width of the line, pixels.
    pub width_px: f64,
}

impl Stroke {
    /// Black ink at `opacity` (a grey on white paper).
    pub const fn black(opacity: f64, width_px: f64) -> Stroke {
        Stroke {
            colour: [0, 0, 0],
            opacity,
            width_px,
        }
    }

    /// How dark the stroke is on white paper, 0 to 1, for grey output: its opacity times
    /// the darkness of its colour (one less its relative luminance, with the Rec. 709
    /// weights of sRGB: IEC 61966-2-1, applied to the encoded values as an approximation).
    pub fn darkness(&self) -> f64 {
        let [r, g, b] = self.colour.map(|c| c as f64 / 255.0);
        let luminance = 0.2126 * r + 0.7152 * g + 0.0722 * b;
        (self.opacity * (1.0 - luminance)).clamp(0.0, 1.0)
    }
}

/// The words of a layer that is one label, and where they stand: an SVG writes them beside
/// the strokes (or as text instead of them), and a page keeps the label whole or leaves it
/// out.
#[derive(Clone, Debug, PartialEq)]
pub struct LayerText {
    /// The words.
    pub words: String,
    /// The point on the baseline the words are aligned on, drawing pixels.
    pub at: ImagePoint,
    /// Cap height, pixels.
    pub height: f64,
    /// How the words are aligned on `at`.
    pub align: Align,
}

/// Lines drawn alike, under a name that styles and vector layers use.
#[derive(Clone, Debug, PartialEq)]
pub struct Layer {
    /// The words, when the layer is one label (see [`labels`]).
    pub text: Option<LayerText>,
    /// The layer's name (`wireframe`, `hidden`, `grid`, ...): styles are given by it.
    pub name: String,
    /// How its lines are inked.
    pub stroke: Stroke,
    /// Its polylines, in drawing pixels.
    pub lines: PolylineSet,
    /// The polylines are closed outlines of areas, filled in the stroke's colour and
    /// opacity (one area the union of its outlines: the non-zero winding rule, every
    /// outline turning the same way), not stroked.
    pub filled: bool,
}

/// Layers in painting order over a `width` x `height` pixel panorama.
#[derive(Clone, Debug, PartialEq)]
pub struct Drawing {
    /// Pixels across.
    pub width: u32,
    /// Pixels down.
    pub height: u32,
    /// The layers, in painting order.
    pub layers: Vec<Layer>,
}

/// The name of the wireframe layer of a site layer (`None`: items on no layer).
pub fn wireframe_layer_name(site_layer: Option<&str>) -> String {
    match site_layer {
        None => WIREFRAME.to_owned(),
        Some(name) => format!("{WIREFRAME}: {name}"),
    }
}

/// The layer of the parts of edges hidden behind faces.
pub const HIDDEN: &str = "hidden";

/// The layer of hidden parts drawn faint, as the panorama and the preview both draw it:
/// lighter and thinner than the seen edges it goes under (dashed by [`hidden_dash_px`]).
pub fn hidden_layer(lines: PolylineSet, line_weight_px: f64) -> Layer {
    Layer {
        filled: false,
        text: None,
        name: HIDDEN.to_owned(),
        stroke: Stroke::black(0.4, (0.75 * line_weight_px).max(0.75)),
        lines,
    }
}

/// The dashes (on, off, in pixels) of hidden parts where no style gives them: long enough
/// to read as a line, broken enough never to be taken for a seen edge.
pub fn hidden_dash_px(line_weight_px: f64) -> (f64, f64) {
    (3.0 * line_weight_px + 3.0, 2.0 * line_weight_px + 2.0)
}

/// Layer names start with this for the site's edges.
pub const WIREFRAME: &str = "wireframe";

impl Layer {
    /// The same layer moved `dx`, `dy` pixels (its words with it).
    pub fn moved(&self, dx: f64, dy: f64) -> Layer {
        let mut lines = PolylineSet::new();
        for line in self.lines.iter() {
            let moved: Vec<ImagePoint> = line
                .iter()
                .map(|p| ImagePoint::new(p.x + dx, p.y + dy))
                .collect();
            lines.push(&moved);
        }
        Layer {
            filled: self.filled,
            text: self.text.as_ref().map(|t| LayerText {
                at: ImagePoint::new(t.at.x + dx, t.at.y + dy),
                ..t.clone()
            }),
            name: self.name.clone(),
            stroke: self.stroke,
            lines,
        }
    }
}

impl Drawing {
    /// The polylines of the site's edges (every wireframe layer), not the overlays.
    pub fn wireframe_lines(&self) -> usize {
        self.layers
            .iter()
            .filter(|l| l.name.starts_with(WIREFRAME))
            .map(|l| l.lines.len())
            .sum()
    }

    /// How many points all the layers hold.
    pub fn vertex_count(&self) -> usize {
        self.layers.iter().map(|l| l.lines.vertex_count()).sum()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn assert_near(a: f64, b: f64) {
        assert!((a - b).abs() < 1e-12, "{a} against {b}");
    }

    #[test]
    fn darkness_is_opacity_times_one_less_the_luminance() {
        // The luminance weights of ITU-R BT.709 (and sRGB, IEC 61966-2-1): red 0.2126,
        // green 0.7152, blue 0.0722; white paper under no ink is 0, black ink its opacity.
        let ink = |colour, opacity| Stroke {
            colour,
            opacity,
            width_px: 1.0,
        };
        assert_near(ink([255, 0, 0], 1.0).darkness(), 1.0 - 0.2126);
        assert_near(ink([0, 255, 0], 0.5).darkness(), 0.5 * (1.0 - 0.7152));
        assert_near(ink([0, 0, 255], 1.0).darkness(), 1.0 - 0.0722);
        assert_near(ink([255, 255, 255], 1.0).darkness(), 0.0);
        assert_near(Stroke::black(0.3, 2.0).darkness(), 0.3);
        assert_near(
            ink([51, 102, 153], 1.0).darkness(),
            1.0 - (0.2126 * 0.2 + 0.7152 * 0.4 + 0.0722 * 0.6),
        );
        // More than full opacity is as dark as ink gets.
        assert_near(Stroke::black(1.7, 1.0).darkness(), 1.0);
    }

    #[test]
    fn a_moved_layer_carries_its_points_and_words_and_nothing_else_changes() {
        let mut lines = PolylineSet::new();
        lines.push(&[ImagePoint::new(1.0, 2.0), ImagePoint::new(3.0, 5.0)]);
        lines.push(&[ImagePoint::new(-1.0, 0.5)]);
        let layer = Layer {
            text: Some(LayerText {
                words: "N".to_owned(),
                at: ImagePoint::new(10.0, 20.0),
                height: 4.0,
                align: Align::Middle,
            }),
            name: "labels".to_owned(),
            stroke: Stroke::black(0.8, 1.5),
            lines,
            filled: true,
        };
        let moved = layer.moved(2.5, -1.0);
        let points: Vec<Vec<ImagePoint>> = moved.lines.iter().map(|l| l.to_vec()).collect();
        assert_eq!(
            points,
            vec![
                vec![ImagePoint::new(3.5, 1.0), ImagePoint::new(5.5, 4.0)],
                vec![ImagePoint::new(1.5, -0.5)],
            ]
        );
        let text = moved.text.as_ref().unwrap();
        assert_eq!(
            (text.at, text.words.as_str(), text.height),
            (ImagePoint::new(12.5, 19.0), "N", 4.0)
        );
        assert_eq!(
            (moved.name.as_str(), moved.stroke, moved.filled),
            ("labels", layer.stroke, true)
        );
    }

    #[test]
    fn the_counts_take_every_wireframe_layer_and_every_point() {
        let layer = |name: &str, lines: &[&[ImagePoint]]| {
            let mut set = PolylineSet::new();
            for line in lines {
                set.push(line);
            }
            Layer {
                text: None,
                name: name.to_owned(),
                stroke: Stroke::black(1.0, 1.0),
                lines: set,
                filled: false,
            }
        };
        let p = ImagePoint::new(0.0, 0.0);
        let drawing = Drawing {
            width: 10,
            height: 5,
            layers: vec![
                layer(&wireframe_layer_name(None), &[&[p, p], &[p, p, p]]),
                layer(&wireframe_layer_name(Some("walls")), &[&[p, p]]),
                layer("grid", &[&[p, p, p, p]]),
                hidden_layer(PolylineSet::new(), 2.0),
            ],
        };
        assert_eq!(wireframe_layer_name(Some("walls")), "wireframe: walls");
        assert_eq!(drawing.wireframe_lines(), 3);
        assert_eq!(drawing.vertex_count(), 2 + 3 + 2 + 4);
    }

    #[test]
    fn hidden_parts_are_lighter_thinner_and_broken() {
        let layer = hidden_layer(PolylineSet::new(), 2.0);
        assert_eq!(layer.name, HIDDEN);
        assert_near(layer.stroke.opacity, 0.4);
        assert_near(layer.stroke.width_px, 1.5);
        assert_near(hidden_layer(PolylineSet::new(), 0.5).stroke.width_px, 0.75);
        // At a weight of 2 doubling and adding 2 agree; 1 and 3 tell them apart.
        assert_eq!(hidden_dash_px(2.0), (9.0, 6.0));
        assert_eq!(hidden_dash_px(1.0), (6.0, 4.0));
        assert_eq!(hidden_dash_px(3.0), (12.0, 8.0));
    }
}
