//! `pansite check`: read a scene and say what it holds.

use super::common::{read_site, write_stdout};
use crate::args::CheckArgs;
use pansite::scene::{survey, Site};
use std::fmt::Write as _;
use std::path::Path;

/// `pansite check`.
pub fn check(args: &CheckArgs) -> anyhow::Result<()> {
    let path = args.scene.as_path();
    let (site, _) = read_site(path, &args.model, None, false)?;
    write_stdout(report(&site, path).as_bytes())?;
    let warnings = warnings(&site);
    for warning in &warnings {
        eprintln!("pansite: warning: {warning}");
    }
    Ok(())
}

/// The summary printed on standard output.
pub fn report(site: &Site, path: &Path) -> String {
    let survey = survey(site);
    let mut out = String::new();
    let _ = writeln!(out, "scene: {} ({})", site.name, path.display());
    let kinds: Vec<String> = survey
        .items_by_kind
        .iter()
        .map(|(kind, count)| format!("{kind} {count}"))
        .collect();
    let _ = writeln!(out, "items: {} ({})", site.items.len(), kinds.join(", "));
    let _ = writeln!(
        out,
        "drawn: {} edges, {} round outlines found from each eye, {} point markers",
        survey.edges, survey.outlines, survey.markers
    );
    let _ = writeln!(
        out,
        "faces: {} triangles (they hide what is behind them)",
        survey.faces
    );
    match survey.bounds {
        Some((lo, hi)) => {
            let _ = writeln!(
                out,
                "extent: x {:.2} to {:.2}, y {:.2} to {:.2}, z {:.2} to {:.2} m ({:.2} x {:.2} x {:.2} m)",
                lo.x,
                hi.x,
                lo.y,
                hi.y,
                lo.z,
                hi.z,
                hi.x - lo.x,
                hi.y - lo.y,
                hi.z - lo.z
            );
        }
        None => {
            let _ = writeln!(out, "extent: nothing drawn");
        }
    }
    if let Some((lo, hi)) = survey.ground {
        let _ = writeln!(
            out,
            "ground: x {:.2} to {:.2}, y {:.2} to {:.2}, heights {:.2} to {:.2} m",
            lo.x, hi.x, lo.y, hi.y, lo.z, hi.z
        );
    }
    // Where each block's walls stand, so a `facing` or an anchor that put the block
    // elsewhere than meant shows at once.
    let blocks: Vec<_> = site
        .items
        .iter()
        .enumerate()
        .filter(|(_, item)| item.kind == "block")
        .collect();
    if !blocks.is_empty() {
        let _ = writeln!(out, "block corners at the foot (x, y):");
    }
    for (id, _) in blocks {
        let feet: Vec<String> = site
            .named_points
            .iter()
            .filter(|n| n.item.0 as usize == id && n.name.ends_with(" foot"))
            .map(|n| {
                format!(
                    "{} ({:.2}, {:.2})",
                    n.name.trim_end_matches(" foot"),
                    n.at.x,
                    n.at.y
                )
            })
            .collect();
        let _ = writeln!(
            out,
            "  {}: {}",
            site.describe_item(pansite::scene::ItemId(id as u32)),
            feet.join(", ")
        );
    }
    let default = site.default_standpoint().map(|s| s.name.as_str());
    let _ = writeln!(out, "standpoints: {}", site.standpoints.len());
    for (standpoint, check) in site.standpoints.iter().zip(&survey.standpoints) {
        let mut notes = Vec::new();
        if Some(standpoint.name.as_str()) == default {
            notes.push("default".to_owned());
        }
        for item in &check.inside {
            notes.push(format!("INSIDE {}", site.describe_item(*item)));
        }
        if check.underground {
            notes.push("UNDER THE GROUND".to_owned());
        }
        let _ = writeln!(
            out,
            "  {:?}: at ({:.2}, {:.2}), eye {:.2} m above ground at {:.2} m, heading {:.1} deg, pitch {:.1}, roll {:.1}{}",
            standpoint.name,
            standpoint.x,
            standpoint.y,
            standpoint.eye_height,
            standpoint.ground,
            standpoint.heading.to_degrees(),
            standpoint.pitch.to_degrees(),
            standpoint.roll.to_degrees(),
            if notes.is_empty() {
                String::new()
            } else {
                format!(" [{}]", notes.join("; "))
            }
        );
    }
    if !site.assumptions.is_empty() {
        let _ = writeln!(
            out,
            "assumed, not surveyed ({}): what the data did not say",
            site.assumptions.len()
        );
        for (item, assumption) in &site.assumptions {
            let _ = writeln!(out, "  {}: {assumption}", site.describe_item(*item));
        }
    }
    out
}

/// What looks wrong, in words.
pub fn warnings(site: &Site) -> Vec<String> {
    let survey = survey(site);
    let mut warnings: Vec<String> = site
        .warnings
        .iter()
        .map(|(item, message)| format!("{} {message}", site.describe_item(*item)))
        .collect();
    if site.standpoints.is_empty() {
        warnings.push("the scene has no standpoint; render will need --at X,Y".to_owned());
    }
    for check in &survey.standpoints {
        for item in &check.inside {
            warnings.push(format!(
                "standpoint {:?} is inside {}: its walls will surround the view",
                check.name,
                site.describe_item(*item)
            ));
        }
        if check.underground {
            warnings.push(format!(
                "standpoint {:?} has its eye under the ground (z = {:.2} m)",
                check.name, check.eye.z
            ));
        }
    }
    if survey.edges == 0 && survey.outlines == 0 && survey.markers == 0 {
        warnings.push("the scene draws nothing".to_owned());
    }
    warnings
}
