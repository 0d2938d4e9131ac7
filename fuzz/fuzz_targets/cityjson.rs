//! The CityJSON reader (as one document and as a line-delimited sequence) on arbitrary
//! bytes, and the mesh of any model it accepts: never a panic, always quick.
#![no_main]

use libfuzzer_sys::fuzz_target;
use pansite::scene::{add_mesh, read_cityjson, MeshPlacement, Site};

fuzz_target!(|data: &[u8]| {
    for sequence in [false, true] {
        if let Ok(model) = read_cityjson(data, sequence, None, |_| Ok(None)) {
            let mut site = Site::default();
            let _ = add_mesh(&mut site, &model.mesh, &MeshPlacement::default(), "fuzz");
        }
    }
});
