//! The GeoJSON reader on arbitrary bytes, and the building of every feature it accepts:
//! never a panic, always quick.
#![no_main]

use libfuzzer_sys::fuzz_target;
use pansite::scene::{read_geojson, LocalFrame, Selection};

fuzz_target!(|data: &[u8]| {
    let frame = LocalFrame::new(0.0, 0.0, 0.0, 0.0);
    let _ = read_geojson(data, &frame, &Selection::default());
});
