//! The Wavefront OBJ reader on arbitrary bytes, the mesh's edge classification for any model
//! it accepts, and the standpoint check that walks its closed pieces: never a panic, always
//! quick.
#![no_main]

use libfuzzer_sys::fuzz_target;
use pansite::scene::{add_mesh, parse_obj, solids_enclosing, MeshPlacement, Site};
use std::path::Path;

fuzz_target!(|data: &[u8]| {
    let Ok(obj) = parse_obj(data, Path::new("fuzz.obj")) else {
        return;
    };
    let mut site = Site::default();
    add_mesh(&mut site, &obj, &MeshPlacement::default(), "fuzz");
    // Asked from the middle of the corners, the check's ray meets the model most often, so
    // an open model's pieces are walked (a model's every face is the check's to count).
    let Some(first) = site.faces.iter().next() else {
        return;
    };
    let mut middle = first.corners[0];
    let corners = site.faces.iter().flat_map(|face| face.corners);
    let (sum, count) = corners.fold((middle.coords * 0.0, 0.0), |(sum, count), corner| {
        (sum + corner.coords, count + 1.0)
    });
    middle.coords = sum / count;
    let _ = solids_enclosing(&site, &middle);
    let _ = solids_enclosing(&site, &first.corners[0]);
});
