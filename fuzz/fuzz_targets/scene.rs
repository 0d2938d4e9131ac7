//! The RON scene loader on arbitrary bytes: it must return a site or an error, never panic,
//! and finish quickly. A site that loads is also surveyed, as `pansite check` would.
#![no_main]

use libfuzzer_sys::fuzz_target;
use std::path::Path;

fuzz_target!(|data: &[u8]| {
    // Models named in the scene are looked for beside this (non-existent) file.
    if let Ok(site) = pansite::scene::parse_scene(data, Path::new("fuzz/scene.ron"), "fuzz") {
        let _ = pansite::scene::survey(&site);
    }
});
