//! Reading a GeoJSON FeatureCollection (RFC 7946) of map features with the `geojson`
//! crate: Polygon and MultiPolygon buildings and building parts (with holes), and
//! LineString and MultiLineString streets. Positions are WGS84 longitude, latitude (RFC
//! 7946 section 4), placed in the scene's plan by [`LocalFrame`].
//!
//! Rings must be closed and have four positions or more (section 3.1.6); their winding is
//! not trusted (the RFC's right-hand rule is a SHOULD that parsers must not reject), so a
//! ring wound either way gives the same building. A ring that crosses itself, a position
//! out of range and a feature with no geometry are refused, naming the feature and the
//! JSON path of what is wrong.

use super::earth::LocalFrame;
use super::tags::{heights, road_width, tag, Heights};
use super::{Located, OpenDataError, Selection};
use crate::scene::items::simple_polygon_problem;
use geojson::{Feature, GeoJson, GeometryValue, Position};
use nalgebra::Vector2;
use serde_json::{Map, Value};

/// One feature placed in the plan, ready to be built.
#[derive(Clone, Debug, PartialEq)]
pub enum Placed {
    /// A building or building part.
    Building {
        /// Its name, id or feature number.
        label: String,
        /// The outer ring, then the holes, in plan metres.
        rings: Vec<Vec<Vector2<f64>>>,
        /// Its heights and roof from its tags.
        heights: Heights,
        /// The height of the ground under it (the fall of the earth at its middle).
        ground: f64,
        /// What its tags did not say.
        assumptions: Vec<String>,
        /// What could not be used.
        warnings: Vec<String>,
    },
    /// A street's centreline.
    Road {
        /// Its name, id or feature number.
        label: String,
        /// Its corners in plan.
        points: Vec<Vector2<f64>>,
        /// The height of the ground at each corner (the fall of the earth).
        elevations: Vec<f64>,
        /// Its carriageway's width, metres.
        width: f64,
        /// What its tags did not say.
        assumptions: Vec<String>,
    },
}

/// What a GeoJSON file gives: its features placed, and what was left out and why.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct GeoJsonScene {
    /// The features kept, in file order.
    pub placed: Vec<Placed>,
    /// What was left out, and why.
    pub skipped: Vec<String>,
}

/// The first WGS84 position of a GeoJSON file (a good origin when none is given).
pub fn first_position(bytes: &[u8]) -> Result<(f64, f64), OpenDataError> {
    let features = parse(bytes)?;
    for feature in &features {
        let Some(geometry) = &feature.geometry else {
            continue;
        };
        let found = match &geometry.value {
            GeometryValue::Point { coordinates } => Some(coordinates.clone()),
            GeometryValue::LineString { coordinates } => coordinates.first().cloned(),
            GeometryValue::Polygon { coordinates } => {
                coordinates.first().and_then(|r| r.first().cloned())
            }
            GeometryValue::MultiPolygon { coordinates } => coordinates
                .first()
                .and_then(|p| p.first())
                .and_then(|r| r.first().cloned()),
            GeometryValue::MultiLineString { coordinates } => {
                coordinates.first().and_then(|l| l.first().cloned())
            }
            _ => None,
        };
        if let Some(p) = found.filter(|p| p.len() >= 2) {
            let (lon, lat) = (p[0], p[1]);
            if (-180.0..=180.0).contains(&lon) && (-90.0..=90.0).contains(&lat) {
                return Ok((lat, lon));
            }
        }
    }
    Err(OpenDataError::plain(
        "$.features",
        "the file has no positions to stand among",
    ))
}

fn parse(bytes: &[u8]) -> Result<Vec<Feature>, OpenDataError> {
    let geojson: GeoJson = serde_json::from_slice(bytes).map_err(OpenDataError::json)?;
    match geojson {
        GeoJson::FeatureCollection(collection) => {
            if let Some(crs) = collection
                .foreign_members
                .as_ref()
                .and_then(|m| m.get("crs"))
            {
                let name = crs.pointer("/properties/name").and_then(Value::as_str);
                let wgs84 = name.is_some_and(|n| n.contains("CRS84") || n.ends_with("4326"));
                if !wgs84 {
                    return Err(OpenDataError::plain(
                        "$.crs",
                        &format!(
                            "the file declares the reference system {}; GeoJSON (RFC 7946) \
                             is WGS84 longitude and latitude, and pansite reads no other",
                            name.map_or_else(|| crs.to_string(), str::to_owned)
                        ),
                    ));
                }
            }
            Ok(collection.features)
        }
        GeoJson::Feature(feature) => Ok(vec![feature]),
        GeoJson::Geometry(_) => Err(OpenDataError::plain(
            "$",
            "expected a FeatureCollection (this is a bare geometry: its tags are missing)",
        )),
    }
}

/// Reads GeoJSON bytes and places the features `selection` keeps.
pub fn read_geojson(
    bytes: &[u8],
    frame: &LocalFrame,
    selection: &Selection,
) -> Result<GeoJsonScene, OpenDataError> {
    let features = parse(bytes)?;
    let mut scene = GeoJsonScene::default();
    let empty = Map::new();
    // Building parts take precedence over the outline they stand in.
    let mut parts: Vec<(usize, Vec<Vec<Vector2<f64>>>)> = Vec::new();
    let mut outlines: Vec<usize> = Vec::new();
    let mut pending: Vec<Option<Placed>> = Vec::with_capacity(features.len());

    // Every position placed and checked first, kept or not (a broken file is refused
    // whole, at its first fault), the features shared out over the cores: placing is a
    // geodesic per position.
    let shapes = crate::cores::in_order(features.len(), |index| {
        feature_shapes(&features[index], index, frame)
    });
    for ((index, feature), shapes) in features.iter().enumerate().zip(shapes) {
        let Shapes {
            polygons: placed_polygons,
            lines: placed_lines,
            kind,
        } = shapes?;
        let located = Located::feature(index, feature.id.as_ref().map(id_text));
        let tags = feature.properties.as_ref().unwrap_or(&empty);
        let label = tag(tags, "name")
            .map(|n| n.into_owned())
            .or_else(|| located.id.clone())
            .unwrap_or_else(|| format!("feature {index}"));
        if !selection.keeps(tags) {
            pending.push(None);
            continue;
        }
        let is_part = tag(tags, "building:part").is_some_and(|v| v != "no");
        let is_building = tag(tags, "building").is_some_and(|v| v != "no");
        if !placed_polygons.is_empty() && (is_part || is_building) {
            let near = placed_polygons
                .iter()
                .flatten()
                .flat_map(|(_, pts)| pts)
                .any(|p| p.0.hypot(p.1) <= selection.within);
            if !near {
                pending.push(None);
                continue;
            }
            for (k, rings) in placed_polygons.into_iter().enumerate() {
                let (mut assumptions, mut warnings) = (Vec::new(), Vec::new());
                let h = heights(tags, selection.storey, &mut assumptions, &mut warnings);
                let all: Vec<&(f64, f64, f64)> = rings[0].1.iter().collect();
                let ground = -all.iter().map(|p| p.2).sum::<f64>() / all.len() as f64;
                let plans: Vec<Vec<Vector2<f64>>> = rings.into_iter().map(|(p, _)| p).collect();
                if is_part {
                    parts.push((pending.len(), plans.clone()));
                } else {
                    outlines.push(pending.len());
                }
                let label = if k == 0 {
                    label.clone()
                } else {
                    format!("{label} ({})", k + 1)
                };
                pending.push(Some(Placed::Building {
                    label,
                    rings: plans,
                    heights: h,
                    ground,
                    assumptions,
                    warnings,
                }));
            }
        } else if !placed_lines.is_empty() && tag(tags, "highway").is_some() {
            for (k, points) in placed_lines.into_iter().enumerate() {
                if !points.iter().any(|p| p.0.hypot(p.1) <= selection.within) {
                    continue;
                }
                let mut assumptions = Vec::new();
                let width = road_width(tags, &mut assumptions);
                let mut plan: Vec<Vector2<f64>> = Vec::with_capacity(points.len());
                let mut elevations = Vec::with_capacity(points.len());
                for p in &points {
                    let q = Vector2::new(p.0, p.1);
                    if plan.last() != Some(&q) {
                        plan.push(q);
                        elevations.push(-p.2);
                    }
                }
                if plan.len() < 2 {
                    scene
                        .skipped
                        .push(format!("feature {index}: a road of no length"));
                    continue;
                }
                let label = if k == 0 {
                    label.clone()
                } else {
                    format!("{label} ({})", k + 1)
                };
                pending.push(Some(Placed::Road {
                    label,
                    points: plan,
                    elevations,
                    width,
                    assumptions,
                }));
            }
        } else {
            scene.skipped.push(format!(
                "{}: {} {}",
                located.describe(),
                kind,
                "without a building, building:part or highway tag pansite draws"
            ));
            pending.push(None);
        }
    }
    drop_outlines_with_parts(&mut pending, &outlines, &parts);
    scene.placed = pending.into_iter().flatten().collect();
    Ok(scene)
}

/// A ring in plan without its closing repeat, beside its positions placed (plan x, y and
/// the fall of the ground).
type PlacedRing = (Vec<Vector2<f64>>, Vec<(f64, f64, f64)>);

/// A feature's geometry placed in the plan: each polygon's rings and each line's
/// positions.
struct Shapes {
    polygons: Vec<Vec<PlacedRing>>,
    lines: Vec<Vec<(f64, f64, f64)>>,
    /// The geometry's type, for messages.
    kind: &'static str,
}

/// Each part of a multi-part geometry with its JSON path, `at[k]`.
fn parts_at<'g, T>(at: &str, parts: &'g [T]) -> Vec<(String, &'g T)> {
    parts
        .iter()
        .enumerate()
        .map(|(k, part)| (format!("{at}[{k}]"), part))
        .collect()
}

/// Places and checks every position of a feature (the `index`th): rings closed, of four
/// positions or more and not crossing themselves, lines of two or more.
fn feature_shapes(
    feature: &Feature,
    index: usize,
    frame: &LocalFrame,
) -> Result<Shapes, OpenDataError> {
    let located = || Located::feature(index, feature.id.as_ref().map(id_text));
    let Some(geometry) = &feature.geometry else {
        return Err(located().error(
            &format!("$.features[{index}].geometry"),
            "the feature has no geometry (null)",
        ));
    };
    let at = format!("$.features[{index}].geometry.coordinates");
    let polygons: Vec<(String, &Vec<Vec<Position>>)> = match &geometry.value {
        GeometryValue::Polygon { coordinates } => vec![(at.clone(), coordinates)],
        GeometryValue::MultiPolygon { coordinates } => parts_at(&at, coordinates),
        _ => Vec::new(),
    };
    let lines: Vec<(String, &Vec<Position>)> = match &geometry.value {
        GeometryValue::LineString { coordinates } => vec![(at.clone(), coordinates)],
        GeometryValue::MultiLineString { coordinates } => parts_at(&at, coordinates),
        _ => Vec::new(),
    };
    let mut placed_polygons = Vec::with_capacity(polygons.len());
    for (at, rings) in &polygons {
        if rings.is_empty() {
            return Err(located().error(
                at,
                "a polygon needs at least its outer ring (RFC 7946, 3.1.6), found none",
            ));
        }
        let mut placed_rings = Vec::with_capacity(rings.len());
        for (r, ring) in rings.iter().enumerate() {
            let at = format!("{at}[{r}]");
            if ring.len() < 4 {
                return Err(located().error(
                    &at,
                    &format!(
                        "a ring needs at least 4 positions (RFC 7946, 3.1.6), found {}",
                        ring.len()
                    ),
                ));
            }
            let points = place_all(ring, frame, &located(), &at)?;
            if points.first() != points.last() {
                return Err(located().error(
                    &at,
                    "the ring is not closed: its first and last positions differ \
                     (RFC 7946, 3.1.6)",
                ));
            }
            let mut plan: Vec<Vector2<f64>> =
                points.iter().map(|p| Vector2::new(p.0, p.1)).collect();
            plan.pop();
            plan.dedup();
            if let Some(problem) = simple_polygon_problem(&plan) {
                return Err(located().error(&at, &format!("the ring {problem}")));
            }
            placed_rings.push((plan, points));
        }
        placed_polygons.push(placed_rings);
    }
    let mut placed_lines = Vec::with_capacity(lines.len());
    for (at, line) in &lines {
        if line.len() < 2 {
            return Err(located().error(
                at,
                "a LineString needs at least 2 positions (RFC 7946, 3.1.4)",
            ));
        }
        placed_lines.push(place_all(line, frame, &located(), at)?);
    }
    Ok(Shapes {
        polygons: placed_polygons,
        lines: placed_lines,
        kind: geometry.value.type_name(),
    })
}

/// A building outline that holds a building part is drawn by its parts alone (the
/// conventions' rule): the outline is left out. Parts are found by a point inside them,
/// through a coarse grid so that many outlines and parts stay quick.
fn drop_outlines_with_parts(
    pending: &mut [Option<Placed>],
    outlines: &[usize],
    parts: &[(usize, Vec<Vec<Vector2<f64>>>)],
) {
    if parts.is_empty() {
        return;
    }
    const CELL: f64 = 50.0;
    let cell = |p: Vector2<f64>| ((p.x / CELL).floor() as i64, (p.y / CELL).floor() as i64);
    let mut grid: std::collections::HashMap<(i64, i64), Vec<Vector2<f64>>> =
        std::collections::HashMap::new();
    for (_, rings) in parts {
        let p = inner_point(&rings[0]);
        grid.entry(cell(p)).or_default().push(p);
    }
    for &index in outlines {
        let Some(Placed::Building { rings, .. }) = &pending[index] else {
            continue;
        };
        let (lo, hi) = rings[0].iter().fold(
            (
                Vector2::repeat(f64::INFINITY),
                Vector2::repeat(f64::NEG_INFINITY),
            ),
            |(lo, hi), p| (lo.inf(p), hi.sup(p)),
        );
        let (c0, c1) = (cell(lo), cell(hi));
        let holds_part = (c0.0..=c1.0).any(|i| {
            (c0.1..=c1.1).any(|j| {
                grid.get(&(i, j))
                    .is_some_and(|ps| ps.iter().any(|p| inside(&rings[0], *p)))
            })
        });
        if holds_part {
            pending[index] = None;
        }
    }
}

/// A point inside a simple polygon: the middle of the longest cut of the horizontal line
/// through its middle.
fn inner_point(ring: &[Vector2<f64>]) -> Vector2<f64> {
    let (lo, hi) = ring
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), p| {
            (lo.min(p.y), hi.max(p.y))
        });
    let y = 0.5 * (lo + hi);
    let mut xs: Vec<f64> = (0..ring.len())
        .filter_map(|i| {
            let (a, b) = (ring[i], ring[(i + 1) % ring.len()]);
            ((a.y > y) != (b.y > y)).then(|| a.x + (y - a.y) / (b.y - a.y) * (b.x - a.x))
        })
        .collect();
    xs.sort_by(f64::total_cmp);
    let best = xs
        .chunks_exact(2)
        .max_by(|a, b| (a[1] - a[0]).total_cmp(&(b[1] - b[0])));
    match best {
        Some(pair) => Vector2::new(0.5 * (pair[0] + pair[1]), y),
        None => ring[0],
    }
}

/// Whether `p` is inside a ring (even-odd crossings).
fn inside(ring: &[Vector2<f64>], p: Vector2<f64>) -> bool {
    let mut odd = false;
    for i in 0..ring.len() {
        let (a, b) = (ring[i], ring[(i + 1) % ring.len()]);
        if (a.y > p.y) != (b.y > p.y) && p.x < a.x + (p.y - a.y) / (b.y - a.y) * (b.x - a.x) {
            odd = !odd;
        }
    }
    odd
}

/// Places every position of a list: plan x, y and the fall of the ground, each checked.
fn place_all(
    positions: &[Position],
    frame: &LocalFrame,
    located: &Located,
    at: &str,
) -> Result<Vec<(f64, f64, f64)>, OpenDataError> {
    positions
        .iter()
        .enumerate()
        .map(|(k, p)| {
            let (lon, lat) = match p.as_slice() {
                [lon, lat, ..] => (*lon, *lat),
                _ => {
                    return Err(located.error(
                        &format!("{at}[{k}]"),
                        "a position needs a longitude and a latitude (RFC 7946, 3.1.1)",
                    ))
                }
            };
            if !(-180.0..=180.0).contains(&lon) || !(-90.0..=90.0).contains(&lat) {
                return Err(located.error(
                    &format!("{at}[{k}]"),
                    &format!(
                        "longitude {lon} and latitude {lat} are out of range (-180 to 180, \
                         -90 to 90 degrees; RFC 7946 positions are longitude first)"
                    ),
                ));
            }
            Ok(frame.to_plan(lat, lon))
        })
        .collect()
}

fn id_text(id: &geojson::feature::Id) -> String {
    match id {
        geojson::feature::Id::String(s) => s.clone(),
        geojson::feature::Id::Number(n) => n.to_string(),
    }
}
