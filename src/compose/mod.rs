//! Composition aids: trying standpoints quickly and seeing where one stands. Each builds a
//! [`Drawing`](crate::drawing::Drawing) or a [`Sheet`](crate::page::Sheet) that the
//! existing writers output.
//!
//! - [`contact`]: many standpoints (the scene's, or a sweep) as labelled thumbnails on one sheet;
//! - [`plan`]: a top-down site plan with each standpoint's marker, heading and seam;
//! - [`preview`]: an ordinary perspective (pinhole) view from a standpoint, from the scene.
//!
//! ## Composition aids (design notes)
//!
//! `src/compose/` and `src/bin/pansite/compose.rs`: trying standpoints quickly and seeing
//! where one stands. Each builds a `Drawing` or a `Sheet`, so PNG, SVG and PDF come from the
//! writers above.
//!
//! - **Contact sheet** (`pansite sheet`, `compose::contact_sheet`): the scene's standpoints, or
//!   a sweep: `--headings FROM:TO:STEP` from one standpoint, `--path X,Y:X,Y:... --count N`
//!   (evenly spaced along the path, each facing along its leg), or `--grid X0,Y0:X1,Y1:CxR`
//!   (north row first), all at `--eye-height` if given. Each thumbnail is `draw` at
//!   `--thumb` size (480x240 by default, line weight 1 px); the cores take standpoints one at
//!   a time (a thumbnail is below the wireframe's own run size, so there is no nesting), and
//!   the thumbnails are clipped into a near-square grid with a frame and two lines of
//!   lettering (number and name; heading, position, eye height; shrunk to the thumbnail's
//!   width when long). `--hidden` chooses how hidden edges are drawn, as for `render`. Layers of the same name are merged, so styles and SVG/PDF layers work
//!   for the whole sheet. At most 1,000 thumbnails.
//! - **Plan map** (`pansite plan`, `compose::plan_map`): every edge projected straight down
//!   (vertical segments vanish; ellipses are chords of angle `sqrt(8 tol / r)`, within the
//!   tolerance); north up. The extent is the site's and the standpoints', with 6 % margins
//!   and a footer a tenth of the height for the scale bar (a 1, 2 or 5 times a power of ten
//!   metres, about a quarter of the width, ticked at its ends and middle, with the scale) and
//!   the north arrow. The scale is the largest standard one that fits (`STANDARD_SCALES`:
//!   ISO 5455's 1, 2, 5 series with 1:250, 1:1250 and 1:2500; on paper at the dpi), or
//!   `--scale 1:N`, refused when the site does not fit; the explorer's screen plan fills its
//!   box (`PlanScale::Fill`). Each standpoint is a circle, its heading an arrow
//!   8 % of the shorter side long (the direction at the panorama's centre), and the seam a
//!   dashed line the opposite way. Every word goes through the label placer: standpoint
//!   names never cross a drawn line (`LabelPlacer::keep_off_lines`) nor each other, labelled
//!   buildings are named at the middle of their plan where there is room, and what finds
//!   no room is left out and counted. Layers `plan`, `seams`, `headings`, `standpoints`,
//!   `scale bar`, `north arrow`, one layer per label (`title`, `standpoint labels`,
//!   `item labels`) over a `label halo`. `--beside` draws the panorama
//!   of the chosen standpoint (`--panorama-size`) and the plan at the panorama's height and
//!   resolution to its right on one sheet (`compose::beside`, a translation only, so the
//!   plan's printed scale holds). `--page PAPER` (with `--portrait`, `--margin`) draws the plan at
//!   the size of the paper's printable area and places it on a sheet of that paper
//!   (`PlanSettings::for_paper`, `Plan::on_paper`).
//! - **Rectilinear preview** (`pansite preview`, `compose::preview`): a pinhole camera at the
//!   eye looking along the view frame's `+y` (heading, pitch; roll turns the image):
//!   `u = W/2 + f x / y`, `v = H/2 - f z / y`, `f = (W/2) / tan(fov/2)` (`--fov`, 90 degrees
//!   across by default, below 179). This is the gnomonic projection centred on the view
//!   direction (Snyder 1987, eq. 22-4/22-5). Segments are cut at the near plane (1 cm in front
//!   of the eye; depth is linear along a segment in the view frame, so the cut is exact) and
//!   clipped to the picture (Liang-Barsky); arcs start from pieces of 1/64 turn and are halved
//!   until the middle and quarter points lie within the tolerance of the chord. Eye-dependent
//!   outlines (columns, domes, mesh silhouettes) are included. Hidden parts (`--hidden`, the
//!   scene's choice or faint by default) are the panorama's: the same `Occluders::spans` on
//!   the same sphere curve, sampled every pixel of angle at the picture's centre (pixels
//!   nearer its edges subtend less, so a stretch under a pixel there can be missed); a span
//!   of a segment is mapped back to the segment where its end sight lines meet it, and an
//!   ellipse's sphere curve is its own points, so its spans are arcs of it. The horizon is
//!   the exact image line of the level directions.
//! - **Watch** (`pansite watch SCENE [render options] --interval MS`): renders with the
//!   `render` command's own code, then polls the scene's and the style file's modification
//!   time and length every 200 ms (no file-events dependency: polling two files is cheap and
//!   behaves the same on every system and network drive) and renders again on a change. Each
//!   run prints what changed (the file, and the counts of standpoints, items and edges before
//!   and after) and how long it took. A scene with an error prints the error (file, line,
//!   column) and "not rendered; the last good output is kept": the scene is read before
//!   anything is written, and writes are atomic, so nothing is overwritten. It runs until
//!   stopped. OBJ models a scene references are not watched.
//! - **Progress**: `sheet` prints a bar on standard error (`\r`-rewritten) only when that is a
//!   terminal (`std::io::IsTerminal`) and not `--quiet`; piped, it prints one summary line.
//!
//! Measured (2026-12-02, 2 cores shared with other work, load average 2.5): a contact sheet of
//! 24 headings of the demo square at 480x240 (2487x1510 px PNG, from the command line,
//! reading included) 0.65 to 0.71 s (target 2 s), 0.81 to 0.87 s on one core: each thumbnail
//! takes 40 to 85 ms, nearly all of it the hidden-line pass (3 ms without), so `sheet --hidden
//! solid` draws the same 24 in 0.13 s; the corn exchange 0.84 s; a
//! re-render of the demo at 1920x960 as `watch` does it 40 to 50 ms, 140 ms once under load
//! (target 200 ms). `cargo bench` prints both (the last line).

mod contact;
mod plan;
mod preview;

pub use contact::{
    contact_sheet, sweep_grid, sweep_headings, sweep_path, sweep_times, ContactSettings, SheetGrid,
};
pub use plan::{
    beside, largest_standard_scale, plan_map, Plan, PlanScale, PlanSettings, STANDARD_SCALES,
};
pub use preview::{preview, preview_with_hidden_lines, Pinhole, PreviewSettings};
