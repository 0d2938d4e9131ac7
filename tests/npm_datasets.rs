//! The bunny and teapot fixtures against the npm packages' own data: each package is fetched
//! with `npm pack` (bunny@1.0.1, teapot@1.0.0), its data module is evaluated by Node.js to
//! count its positions and cells (the package's own reading, not ours), and the committed
//! converter (tests/fixtures/meshes/convert_npm_mesh.py) is run on it again: its vertex and
//! face lines must be the committed fixture's, and the OBJ reader must count what Node counts.
//!
//! Needs npm, node, tar and python3 and the npm registry. Without them the test fails, unless
//! `PANSITE_OFFLINE=REASON` opts out, which is printed.

use pansite::scene::parse_obj;
use std::path::Path;
use std::process::Command;

mod common;
use common::Scratch;

fn run(dir: &Path, program: &str, args: &[&str]) -> Result<String, String> {
    let out = Command::new(program)
        .args(args)
        .current_dir(dir)
        .output()
        .map_err(|e| format!("{program} could not be started: {e}"))?;
    if !out.status.success() {
        return Err(format!(
            "{program} {args:?} failed: {}",
            String::from_utf8_lossy(&out.stderr)
        ));
    }
    Ok(String::from_utf8_lossy(&out.stdout).into_owned())
}

/// The lines of an OBJ that carry data (no `#` comments: the header names the command line).
fn data_lines(text: &str) -> Vec<&str> {
    text.lines().filter(|l| !l.starts_with('#')).collect()
}

fn check(dir: &Scratch, package: &str, module: &str, fixture: &str) -> Result<(), String> {
    let tarball = run(&dir.0, "npm", &["pack", "--silent", package])?;
    let tarball = tarball.trim().lines().last().unwrap_or_default().to_owned();
    let folder = dir.path(package);
    std::fs::create_dir_all(&folder).unwrap();
    run(&dir.0, "tar", &["xzf", &tarball, "-C", package])?;
    let module = folder.join("package").join(module);
    let module = module.to_str().unwrap();
    // Node.js reads the package's own module.
    let counts = run(
        &dir.0,
        "node",
        &[
            "-e",
            "const m = require(process.argv[1]); console.log(m.positions.length, m.cells.length)",
            module,
        ],
    )?;
    let counts: Vec<usize> = counts
        .split_whitespace()
        .map(|n| n.parse().unwrap())
        .collect();
    let converter =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/meshes/convert_npm_mesh.py");
    let converted = run(&dir.0, "python3", &[converter.to_str().unwrap(), module])?;
    let committed = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("tests/fixtures/meshes")
            .join(fixture),
    )
    .unwrap();
    assert!(
        data_lines(&converted) == data_lines(&committed),
        "{fixture} is not what the converter makes of {package}"
    );
    let obj = parse_obj(committed.as_bytes(), Path::new(fixture)).unwrap();
    assert_eq!(
        vec![obj.positions.len(), obj.faces.len()],
        counts,
        "{fixture}: the OBJ reader's counts against Node's reading of {package}"
    );
    Ok(())
}

#[test]
fn bunny_and_teapot_fixtures_are_the_npm_packages_data() {
    let dir = Scratch::new("npm-datasets");
    let result = check(&dir, "bunny@1.0.1", "index.js", "bunny.obj")
        .and_then(|()| check(&dir, "teapot@1.0.0", "teapot.js", "teapot.obj"));
    if let Err(why) = result {
        match std::env::var("PANSITE_OFFLINE") {
            Ok(reason) if !reason.trim().is_empty() => {
                eprintln!("NOT CHECKED against the npm packages ({why}); PANSITE_OFFLINE says: {reason}");
            }
            _ => panic!(
                "{why}\nThe npm packages could not be read: fix that, or set PANSITE_OFFLINE=REASON to skip this check and say why"
            ),
        }
    }
}
