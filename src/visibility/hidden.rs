//! The hidden-line set-up of one drawing, the same for the panorama and the preview: how
//! hidden parts are to be drawn, and, when they are to be found at all, the hierarchy of
//! faces that finds them.

use super::{Bvh, Occluders};
use crate::scene::{HiddenEdges, Site};
use crate::sphere::ViewFrame;
use std::time::{Duration, Instant};

/// How one drawing treats the parts of edges hidden behind faces.
pub struct HiddenLines {
    /// The mode asked for, or the scene's, or faint.
    pub mode: HiddenEdges,
    /// The hierarchy of the site's faces; `None` when nothing is to be hidden (the mode is
    /// solid, or the site has no faces).
    pub bvh: Option<Bvh>,
    /// How long building the hierarchy took.
    pub hierarchy_time: Duration,
}

impl HiddenLines {
    /// The set-up for `site` with the mode `asked` (`None`: the scene's choice, or faint).
    /// Hidden parts are looked for only when they are drawn differently and there is
    /// something to hide them.
    pub fn new(site: &Site, asked: Option<HiddenEdges>) -> HiddenLines {
        let mode = asked.or(site.hidden_edges).unwrap_or_default();
        let started = Instant::now();
        let bvh =
            (mode != HiddenEdges::Solid && !site.faces.is_empty()).then(|| Bvh::new(&site.faces));
        HiddenLines {
            mode,
            bvh,
            hierarchy_time: started.elapsed(),
        }
    }

    /// What hides things from the eye of `view`, if anything is to be hidden.
    pub fn occluders<'a>(&'a self, site: &'a Site, view: &'a ViewFrame) -> Option<Occluders<'a>> {
        self.bvh
            .as_ref()
            .map(|bvh| Occluders::new(&site.faces, bvh, view))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::parse_scene;
    use std::path::Path;

    fn site(hidden: &str) -> Site {
        let text = format!(
            "Scene({hidden} standpoints: [(name: \"a\", x: 0, y: -10)], \
             items: [Block(at: Centre(0, 0), width: 4, depth: 4, height: 3)])"
        );
        parse_scene(text.as_bytes(), Path::new("t.ron"), "t").unwrap()
    }

    #[test]
    fn the_mode_comes_from_the_settings_then_the_scene_then_faint() {
        assert_eq!(HiddenLines::new(&site(""), None).mode, HiddenEdges::Faint);
        assert_eq!(
            HiddenLines::new(&site("hidden: Off,"), None).mode,
            HiddenEdges::Off
        );
        assert_eq!(
            HiddenLines::new(&site("hidden: Off,"), Some(HiddenEdges::Solid)).mode,
            HiddenEdges::Solid
        );
    }

    #[test]
    fn faces_are_ordered_only_when_something_is_to_be_hidden() {
        let with_faces = site("");
        assert!(HiddenLines::new(&with_faces, None).bvh.is_some());
        assert!(HiddenLines::new(&with_faces, Some(HiddenEdges::Solid))
            .bvh
            .is_none());
        let empty = parse_scene(b"Scene(items: [])", Path::new("e.ron"), "e").unwrap();
        assert!(HiddenLines::new(&empty, None).bvh.is_none());
    }

    #[test]
    fn occluders_are_made_when_faces_are_ordered() {
        let with_faces = site("");
        let view = ViewFrame::new(&with_faces.standpoints[0]);
        for (mode, made) in [
            (HiddenEdges::Faint, true),
            (HiddenEdges::Off, true),
            (HiddenEdges::Solid, false),
        ] {
            let hidden_lines = HiddenLines::new(&with_faces, Some(mode));
            let occluders = hidden_lines.occluders(&with_faces, &view);
            assert_eq!(occluders.is_some(), made, "{mode:?}");
        }
    }
}
