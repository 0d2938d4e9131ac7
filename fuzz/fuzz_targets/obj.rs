//! The Wavefront OBJ reader on arbitrary bytes, and the mesh's edge classification for any
//! model it accepts: never a panic, always quick.
#![no_main]

use libfuzzer_sys::fuzz_target;
use pansite::scene::{add_mesh, parse_obj, MeshPlacement, Site};
use std::path::Path;

fuzz_target!(|data: &[u8]| {
    if let Ok(obj) = parse_obj(data, Path::new("fuzz.obj")) {
        let mut site = Site::default();
        let _ = add_mesh(&mut site, &obj, &MeshPlacement::default(), "fuzz");
    }
});
