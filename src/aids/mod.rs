//! Drawing aids: what a person drawing over the underlay needs beyond the model's own edges.
//!
//! - [`grid`]: the azimuth/elevation grid at a chosen step, heavier lines at chosen
//!   multiples, the horizon emphasised;
//! - [`labels`]: azimuths, compass points, elevations and the heading written on the grid, and
//!   item labels placed near their items, away from the lines where there is room;
//! - [`vanishing`]: the principal directions of the site (found from its edges, or given as
//!   bearings and slopes) and their vanishing points;
//! - [`fans`]: the great circles through a direction's two vanishing points, and meridians;
//! - [`pole`]: measuring poles with a tick at every metre (or storey);
//! - [`divide`]: perspective-correct equal parts and multiples of segments;
//! - [`table`]: the angles of every labelled point and item corner (`pansite angles`).
//!
//! Every aid is drawn in the site frame and projected like any edge, so it stays exact under
//! pitch and roll; text is lettered as strokes ([`crate::drawing::letter`]). The aids make
//! layers of their own, under the wireframe (grid, fans, meridians) or over it (vanishing
//! points, poles, divisions, labels); none is drawn in the bare mode.
//!
//! ## Drawing aids (design notes)
//!
//! `src/aids/`. Everything a person drawing over the underlay needs beyond the edges: each aid
//! is built in the site frame and projected like an edge (so pitch and roll cannot put it
//! wrong), text is lettered as strokes, and each kind of aid is a layer of its own
//! (`grid`, `grid major`, `horizon`, `fans`, `meridians` under the wireframe; `vanishing
//! points`, `poles`, `divisions`, `grid labels`, `item labels` over it). `render.rs` calls
//! `aids::under` and `aids::over` when overlays are on; the bare mode draws no aid, not even
//! the scene's guides. `AidSettings::default()` is the plain underlay as it was (the 10-degree
//! grid and the horizon, same strokes, same pixels: the golden images did not move), plus the
//! scene's own guides; `AidSettings::all()` (`--aids`) turns the rest on.
//!
//! - **Strokes** (grey ink, 0 to 1, until per-layer styles and colour come): grid 0.22 at
//!   1 px, heavy grid lines 0.35 at 1.25 px, horizon 0.5 at 1.25 px, fans 0.3 and meridians 0.4
//!   at 1 px (traced lines, lighter than the wireframe), marks (vanishing points, poles, ticks)
//!   0.75 at 1.25 px, lettering 0.6 at 1 px. The cap height is a hundredth of the image height
//!   (7 to 60 px) unless set.
//! - **Principal directions** (`vanishing.rs`): every straight edge votes with its length for
//!   its direction as a line (level within 0.5 degree: horizontal; otherwise inclined unless
//!   vertical); votes are merged greedily, heaviest first, into clusters within the merging
//!   angle (2 degrees by default: walls a little out of square are one direction to a person
//!   drawing), and clusters at least a tenth as heavy as the heaviest of their kind are kept
//!   (at most 8 horizontal, 6 inclined). Gable verges, hips and sloping streets are edges; a
//!   stair's rake is not, so `build_stairs` declares it as an `Axis` on the site. Directions
//!   the user gives come first; found ones within the merging angle of a given one are left
//!   out. Found from edges, the method works for OBJ models too.
//! - **Fans** (`fans.rs`): the planes through the eye that hold a direction `d`, turned about
//!   `d` by the step from the one holding the horizontal perpendicular `h = z × d`:
//!   `e(φ) = h cos φ + (d × h) sin φ`, each drawn as the full great circle through `±d` and
//!   `e(φ)`.
//! - **Poles** (`pole.rs`): ticks are the images of points on the pole, so their elevations are
//!   `atan((h − eye) / d)` by construction; the tests check that against the formula.
//! - **Divisions** (`divide.rs`): the ticks are the images of equally spaced site points,
//!   each drawn across the image of the segment (its direction from a step of 1e-4 of the
//!   distance along it, taken the short way round the seam).
//! - **Item labels** (`labels.rs`): anchored over the middle of the item's plan at its highest
//!   point (a labelled point at its mark); twelve places round the anchor are tried and the one
//!   crossing fewest occupied cells (a third of the cap height square, marked from every layer
//!   drawn before and from earlier labels) wins. Dense scenes still crowd: this avoids lines
//!   where there is room, it does not guarantee it.
//! - **The table** (`table.rs`, `pansite angles`): rows for every labelled point and every
//!   corner (distinct ends of straight edges, numbered per item in drawing order, with their
//!   site coordinates); absolute azimuth, azimuth relative to the heading, elevation (all in
//!   the site frame), distance, and the image position with the view's pitch and roll
//!   applied. Page millimetres are `px * width_mm / width_px` from the panorama's top left
//!   corner (`--page-width-mm`, the panorama's printed width); `PagePlacement` holds an offset
//!   too, for when page layouts place the panorama on a sheet. Angles are written to a
//!   thousandth of a degree, lengths to a millimetre.

mod divide;
mod fans;
mod grid;
mod labels;
mod marks;
mod pole;
mod settings;
mod sun;
mod table;
mod vanishing;

pub use divide::{check_divisions, dividable_labels};
pub use settings::{AidSettings, DEFAULT_MERGE_DEG};
pub use sun::{sun_layers, SunDrawing, SUN, SUN_HOURS, SUN_PATH, SUN_SEASONS};
pub use table::{angle_table, to_csv, to_json, to_text, AngleRow, PagePlacement, TableChoice};

use crate::drawing::{label_layers, Label, LabelInk, LabelPlacer, Layer, Stroke};
use crate::plane::{Flattener, PolylineSet, Rect};
use crate::scene::{Guides, Site};
use crate::sphere::ViewFrame;

/// The strokes of the aids, as black ink of an opacity and width in pixels (a page's style
/// turns the guides light blue). Guides are lighter
/// than the wireframe so that they can be drawn over and told apart from it; marks that are
/// read (labels, vanishing points, ticks) are darker than the lines that are traced.
pub mod strokes {
    use crate::drawing::Stroke;

    /// The grid as it has always been: light enough to draw over.
    pub const GRID: Stroke = Stroke::black(0.22, 1.0);
    /// Heavier grid lines at the chosen multiples.
    pub const GRID_MAJOR: Stroke = Stroke::black(0.35, 1.25);
    /// The horizon, darker than the grid: the line every figure's eyes rest on.
    pub const HORIZON: Stroke = Stroke::black(0.5, 1.25);
    /// Guide fans.
    pub const FANS: Stroke = Stroke::black(0.3, 1.0);
    /// Vertical guides.
    pub const MERIDIANS: Stroke = Stroke::black(0.4, 1.0);
    /// Marks that are read: vanishing points, pole ticks, division ticks.
    pub const MARKS: Stroke = Stroke::black(0.75, 1.25);
    /// Lettering.
    pub const LABELS: Stroke = Stroke::black(0.6, 1.0);
}

/// The layers drawn under the wireframe: the grid (minor and major lines), the horizon, fans
/// and meridians.
pub fn under(
    site: &Site,
    view: &ViewFrame,
    flattener: &mut Flattener,
    settings: &AidSettings,
) -> Vec<Layer> {
    let guides = guides_of(site, settings);
    let lines = grid::grid(
        view,
        flattener,
        settings.grid_step_deg,
        settings.grid_major_every,
    );
    let mut layers = vec![layer("grid", strokes::GRID, lines.minor)];
    push_if_any(&mut layers, "grid major", strokes::GRID_MAJOR, lines.major);
    layers.push(layer("horizon", strokes::HORIZON, lines.horizon));
    push_if_any(
        &mut layers,
        "fans",
        strokes::FANS,
        fans::fans(view, flattener, &guides.fans),
    );
    push_if_any(
        &mut layers,
        "meridians",
        strokes::MERIDIANS,
        fans::meridians(view, flattener, &guides.meridians),
    );
    layers
}

/// The layers drawn over the wireframe, and what became of their labels.
#[derive(Clone, Debug, Default)]
pub struct Over {
    /// The layers, in painting order.
    pub layers: Vec<Layer>,
    /// Labels left out for want of room (see [`crate::drawing::labels`]).
    pub labels_left_out: usize,
    /// Characters drawn as the placeholder, for a warning.
    pub unlettered: Vec<char>,
}

/// The layers drawn over the wireframe: vanishing points, poles, divisions, then every
/// label (these aids' own and `given`, such as the sun's hours), placed by one
/// [`LabelPlacer`] that keeps them apart, whole inside the label area and clear of the
/// lines drawn before (`drawn`) where it can.
pub fn over(
    site: &Site,
    view: &ViewFrame,
    flattener: &mut Flattener,
    settings: &AidSettings,
    drawn: &[Layer],
    given: Vec<Label>,
) -> Over {
    let guides = guides_of(site, settings);
    let map = flattener.map();
    let text = settings.text_height(&map);
    let mut layers = Vec::new();
    let mut labels: Vec<Label> = given;
    let mut marks = PolylineSet::new();
    let directions = vanishing::directions(site, &guides, settings);
    vanishing::draw(view, &map, &directions, text, &mut marks, &mut labels);
    push_if_any(&mut layers, "vanishing points", strokes::MARKS, marks);
    let mut poles = PolylineSet::new();
    for pole in &guides.poles {
        pole::draw(view, flattener, pole, text, &mut poles, &mut labels);
    }
    push_if_any(&mut layers, "poles", strokes::MARKS, poles);
    let mut divisions = PolylineSet::new();
    for division in &guides.divisions {
        divide::draw(
            site,
            view,
            flattener,
            division,
            text,
            &mut divisions,
            &mut labels,
        );
    }
    push_if_any(&mut layers, "divisions", strokes::MARKS, divisions);
    let area = settings
        .label_area
        .unwrap_or_else(|| Rect::from_ltrb(0.0, 0.0, map.width(), map.height()));
    if settings.labels {
        let mut notches = PolylineSet::new();
        labels.extend(labels::grid_labels(
            view,
            &map,
            settings,
            text,
            &area,
            &mut notches,
        ));
        push_if_any(&mut layers, "heading marks", strokes::LABELS, notches);
    }
    if settings.item_labels {
        labels.extend(labels::item_labels(site, view, &map, text));
    }
    if labels.is_empty() {
        return Over {
            layers,
            ..Over::default()
        };
    }
    let mut unlettered: Vec<char> = Vec::new();
    for label in &labels {
        for c in crate::drawing::unlettered(&label.text) {
            if !unlettered.contains(&c) {
                unlettered.push(c);
            }
        }
    }
    let mut placer = LabelPlacer::new(area, 0.25 * text);
    placer.cut_along(&settings.label_cuts.0, &settings.label_cuts.1);
    for layer in drawn.iter().chain(&layers) {
        placer.avoid_lines(&layer.lines, (text / 3.0).max(2.0));
    }
    placer.place(labels);
    let placed = placer.finish();
    let ink = LabelInk {
        stroke: strokes::LABELS,
        halo_px: settings.halo_px,
    };
    layers.extend(label_layers(&placed.labels, ink));
    Over {
        layers,
        labels_left_out: placed.left_out,
        unlettered,
    }
}

/// The scene's guides and those asked for on the command line.
fn guides_of(site: &Site, settings: &AidSettings) -> Guides {
    let mut guides = site.guides.clone();
    guides.extend(&settings.guides);
    guides
}

fn layer(name: &str, stroke: Stroke, lines: PolylineSet) -> Layer {
    Layer {
        filled: false,
        text: None,
        name: name.to_owned(),
        stroke,
        lines,
    }
}

fn push_if_any(layers: &mut Vec<Layer>, name: &str, stroke: Stroke, lines: PolylineSet) {
    if !lines.is_empty() {
        layers.push(layer(name, stroke, lines));
    }
}
