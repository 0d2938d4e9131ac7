//! The whole pipeline: a random scene (items of every kind with random numbers, written out
//! as RON so the parser, the expander and every item builder take part) seen from a random
//! standpoint, drawn small with hidden lines, rasterised and encoded. Anything but a panic
//! or a hang is fine: refused input must be refused with an error.
#![no_main]

use arbitrary::Arbitrary;
use libfuzzer_sys::fuzz_target;
use pansite::render::{render_png_to, RenderSettings};
use pansite::scene::{parse_scene, HiddenEdges};
use std::fmt::Write;
use std::path::Path;

/// A number as a scene would write it: mostly small and sensible, sometimes anything.
#[derive(Arbitrary, Debug, Clone, Copy)]
enum Num {
    Small(i8),
    Tenths(i16),
    Raw(f64),
}

impl std::fmt::Display for Num {
    fn fmt(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
        let value = match *self {
            Num::Small(n) => n as f64,
            Num::Tenths(n) => n as f64 / 10.0,
            Num::Raw(x) => x,
        };
        // RON writes non-finite numbers as NaN and inf.
        if value.is_nan() {
            write!(f, "NaN")
        } else if value.is_infinite() {
            write!(f, "{}inf", if value < 0.0 { "-" } else { "" })
        } else {
            write!(f, "{value:?}")
        }
    }
}

#[derive(Arbitrary, Debug)]
enum Roof {
    Flat,
    Gable(Num),
    Hip(Num),
    Pyramid(Num),
    Shed(Num),
}

#[derive(Arbitrary, Debug)]
struct Openings {
    wall: u8,
    count: u8,
    width: Num,
    height: Num,
    sill: Num,
    margin: Num,
    rows: u8,
    row_step: Num,
    reveal: Num,
}

#[derive(Arbitrary, Debug)]
enum Item {
    Block {
        at: (Num, Num),
        size: (Num, Num, Num),
        facing: Num,
        roof: Roof,
        openings: Option<Openings>,
        storeys: Vec<Num>,
    },
    Footprint {
        points: Vec<(Num, Num)>,
        height: Num,
        hipped: Option<(Num, Num)>,
        openings: Option<Openings>,
    },
    Road {
        points: Vec<(Num, Num)>,
        width: Num,
        pavement: Option<(Num, Num)>,
        radius: Option<Num>,
        dashes: Option<(Num, Num)>,
    },
    Arcade {
        at: (Num, Num),
        count: u8,
        span: Num,
        springing: Num,
        pier: Num,
        thickness: Num,
        shape: u8,
    },
    Column {
        at: (Num, Num),
        diameter: Num,
        height: Num,
        plinth: Option<Num>,
    },
    Tower {
        at: (Num, Num),
        diameter: Num,
        height: Num,
        cone: Option<Num>,
    },
    Dome {
        at: (Num, Num),
        diameter: Num,
        drum: Option<Num>,
    },
    Stairs {
        at: (Num, Num),
        bearing: Num,
        steps: u8,
        rise: Num,
        going: Num,
        width: Num,
    },
    Tiles {
        corner: (Num, Num, Num),
        along: (Num, Num, Num),
        across: (Num, Num, Num),
        tile: (Num, Num),
    },
    Vault {
        at: (Num, Num),
        size: (Num, Num),
        springing: Num,
        rise: Option<Num>,
        bays: Option<u8>,
    },
    Room {
        at: (Num, Num),
        size: (Num, Num, Num),
        vault: Option<u8>,
        openings: Option<Openings>,
    },
    Polyline {
        points: Vec<(Num, Num, Num)>,
        closed: bool,
    },
    Point {
        at: (Num, Num, Num),
    },
    Repeat {
        count: u8,
        step: (Num, Num, Num),
        turn: Num,
        items: Vec<Item>,
    },
}

#[derive(Arbitrary, Debug)]
struct Input {
    items: Vec<Item>,
    at: (Num, Num),
    eye_height: Num,
    heading: Num,
    pitch: Num,
    roll: Num,
    hidden: u8,
    width_log2: u8,
}

fn pair(out: &mut String, (a, b): (Num, Num)) {
    let _ = write!(out, "({a}, {b})");
}

fn triple(out: &mut String, (a, b, c): (Num, Num, Num)) {
    let _ = write!(out, "({a}, {b}, {c})");
}

fn openings(out: &mut String, o: &Option<Openings>) {
    let Some(o) = o else { return };
    let wall = ["Front", "Right", "Back", "Left", "All", "Side(1)"][o.wall as usize % 6];
    let _ = write!(
        out,
        ", openings: [(wall: {wall}, count: {}, width: {}, height: {}, sill: {}, margin: {}, rows: {}, row_step: {}, reveal: {})]",
        o.count, o.width, o.height, o.sill, o.margin, o.rows, o.row_step, o.reveal
    );
}

fn write_item(out: &mut String, item: &Item, depth: usize) {
    match item {
        Item::Block {
            at,
            size,
            facing,
            roof,
            openings: o,
            storeys,
        } => {
            let roof = match roof {
                Roof::Flat => "Flat".to_owned(),
                Roof::Gable(p) => format!("Gable(ridge: {p}, along: Depth)"),
                Roof::Hip(p) => format!("Hip(ridge: {p}, overhang: 0.3)"),
                Roof::Pyramid(p) => format!("Pyramid(apex: {p})"),
                Roof::Shed(p) => format!("Shed(back: {p})"),
            };
            let _ = write!(
                out,
                "Block(at: Corner({}, {}), width: {}, depth: {}, height: {}, facing: {facing}, roof: {roof}",
                at.0, at.1, size.0, size.1, size.2
            );
            openings(out, o);
            if !storeys.is_empty() {
                out.push_str(", storeys: [");
                for s in storeys {
                    let _ = write!(out, "{s}, ");
                }
                out.push(']');
            }
            out.push(')');
        }
        Item::Footprint {
            points,
            height,
            hipped,
            openings: o,
        } => {
            out.push_str("Footprint(points: [");
            for &p in points {
                pair(out, p);
                out.push_str(", ");
            }
            let _ = write!(out, "], height: {height}");
            if let Some((pitch, overhang)) = hipped {
                let _ = write!(out, ", roof: Hipped(pitch: {pitch}, overhang: {overhang})");
            }
            openings(out, o);
            out.push(')');
        }
        Item::Road {
            points,
            width,
            pavement,
            radius,
            dashes,
        } => {
            out.push_str("Road(points: [");
            for &p in points {
                pair(out, p);
                out.push_str(", ");
            }
            let _ = write!(out, "], width: {width}");
            if let Some((p, k)) = pavement {
                let _ = write!(out, ", pavement: {p}, kerb: {k}");
            }
            if let Some(r) = radius {
                let _ = write!(out, ", corner_radius: {r}");
            }
            if let Some((d, g)) = dashes {
                let _ = write!(out, ", centre_line: Dashed(dash: {d}, gap: {g})");
            }
            out.push(')');
        }
        Item::Arcade {
            at,
            count,
            span,
            springing,
            pier,
            thickness,
            shape,
        } => {
            let shape = [
                "Semicircular",
                "Segmental(rise: 1)",
                "Pointed()",
                "ThreeCentred(rise: 1)",
                "Elliptical(rise: 1.5)",
            ][*shape as usize % 5];
            let _ = write!(
                out,
                "Arcade(at: Centre({}, {}), count: {count}, span: {span}, springing: {springing}, pier: {pier}, thickness: {thickness}, shape: {shape})",
                at.0, at.1
            );
        }
        Item::Column {
            at,
            diameter,
            height,
            plinth,
        } => {
            let _ = write!(
                out,
                "Column(at: ({}, {}), diameter: {diameter}, height: {height}",
                at.0, at.1
            );
            if let Some(p) = plinth {
                let _ = write!(out, ", plinth: {p}, capital: {p}");
            }
            out.push(')');
        }
        Item::Tower {
            at,
            diameter,
            height,
            cone,
        } => {
            let _ = write!(
                out,
                "Tower(at: ({}, {}), diameter: {diameter}, height: {height}",
                at.0, at.1
            );
            if let Some(c) = cone {
                let _ = write!(out, ", roof: Cone(height: {c})");
            }
            out.push(')');
        }
        Item::Dome { at, diameter, drum } => {
            let _ = write!(out, "Dome(at: ({}, {}), diameter: {diameter}", at.0, at.1);
            if let Some(d) = drum {
                let _ = write!(out, ", drum: {d}");
            }
            out.push(')');
        }
        Item::Stairs {
            at,
            bearing,
            steps,
            rise,
            going,
            width,
        } => {
            let _ = write!(
                out,
                "Stairs(at: ({}, {}), bearing: {bearing}, steps: {steps}, rise: {rise}, going: {going}, width: {width})",
                at.0, at.1
            );
        }
        Item::Tiles {
            corner,
            along,
            across,
            tile,
        } => {
            out.push_str("Tiles(corner: ");
            triple(out, *corner);
            out.push_str(", along: ");
            triple(out, *along);
            out.push_str(", across: ");
            triple(out, *across);
            out.push_str(", tile: ");
            pair(out, *tile);
            out.push(')');
        }
        Item::Vault {
            at,
            size,
            springing,
            rise,
            bays,
        } => {
            let _ = write!(
                out,
                "Vault(at: Corner({}, {}), width: {}, depth: {}, springing: {springing}",
                at.0, at.1, size.0, size.1
            );
            if let Some(r) = rise {
                let _ = write!(out, ", rise: {r}");
            }
            if let Some(b) = bays {
                let _ = write!(out, ", bays: {b}");
            }
            out.push(')');
        }
        Item::Room {
            at,
            size,
            vault,
            openings: o,
        } => {
            let _ = write!(
                out,
                "Room(at: Corner({}, {}), width: {}, depth: {}, height: {}",
                at.0, at.1, size.0, size.1, size.2
            );
            if let Some(bays) = vault {
                let _ = write!(out, ", ceiling: Vault(bays: {bays})");
            }
            openings(out, o);
            out.push(')');
        }
        Item::Polyline { points, closed } => {
            out.push_str("Polyline(points: [");
            for &p in points {
                triple(out, p);
                out.push_str(", ");
            }
            let _ = write!(out, "], closed: {closed})");
        }
        Item::Point { at } => {
            out.push_str("Point(at: ");
            triple(out, *at);
            out.push(')');
        }
        Item::Repeat {
            count,
            step,
            turn,
            items,
        } => {
            let _ = write!(out, "Repeat(count: {count}, turn: {turn}, step: ");
            triple(out, *step);
            out.push_str(", items: [");
            // Nesting is kept shallow: deep repeats multiply to millions of items, which
            // the expander refuses anyway.
            if depth < 2 {
                for i in items {
                    write_item(out, i, depth + 1);
                    out.push_str(", ");
                }
            }
            out.push_str("])");
        }
    }
}

fuzz_target!(|input: Input| {
    let mut text = format!(
        "Scene(standpoints: [(name: \"here\", x: {}, y: {}, eye_height: {}, heading: {}, pitch: {}, roll: {})], items: [",
        input.at.0, input.at.1, input.eye_height, input.heading, input.pitch, input.roll
    );
    for i in &input.items {
        write_item(&mut text, i, 0);
        text.push_str(",\n");
    }
    text.push_str("])");
    let Ok(site) = parse_scene(text.as_bytes(), Path::new("fuzz/pipeline.ron"), "fuzz") else {
        return;
    };
    let Some(standpoint) = site.standpoints.first() else {
        return;
    };
    // Small images, 32x16 to 512x256, keep each run short.
    let width = 32u32 << (input.width_log2 % 5);
    let settings = RenderSettings {
        width,
        height: width / 2,
        hidden: Some(match input.hidden % 3 {
            0 => HiddenEdges::Solid,
            1 => HiddenEdges::Faint,
            _ => HiddenEdges::Off,
        }),
        ..RenderSettings::default()
    };
    let mut png = Vec::new();
    let _ = render_png_to(&site, standpoint, &settings, &mut png);
});
