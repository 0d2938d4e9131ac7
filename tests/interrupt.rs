//! Ctrl-C in the middle of a render: the real binary, a large render, SIGINT once its
//! temporary file exists. Behavioural: exit code 130 (128 + SIGINT, as shells report it),
//! no temporary or partial file left, the earlier output byte for byte intact.
#![cfg(unix)]

use std::path::Path;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

mod common;
use common::Scratch;

const EARLIER: &[u8] = b"\x89PNG\r\n\x1a\nan earlier good output";

#[test]
fn ctrl_c_mid_render_leaves_no_temporary_file_and_keeps_the_earlier_output() {
    let dir = Scratch::new("interrupt");
    let scene = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron");
    let earlier = dir.write("out.png", EARLIER);
    // 450 megapixels: seconds of rasterising and encoding, long enough to be caught.
    let mut child = dir
        .command()
        .args(["render", scene.to_str().unwrap(), "-o", "out.png"])
        .args(["--size", "30000x15000", "--hidden", "solid"])
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let started = Instant::now();
    let temporary = format!(".out.png.pansite-{}.tmp", child.id());
    while !dir.path(&temporary).exists() {
        assert!(
            child.try_wait().unwrap().is_none(),
            "the render ended before its temporary file was seen"
        );
        assert!(
            started.elapsed() < Duration::from_secs(120),
            "no temporary file"
        );
        std::thread::sleep(Duration::from_millis(5));
    }
    let sent = Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(sent.success());
    let out = child.wait_with_output().unwrap();
    let text = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(130), "{text}");
    assert!(text.contains("interrupted"), "{text}");
    assert_eq!(dir.files(), ["out.png"]);
    assert_eq!(std::fs::read(earlier).unwrap(), EARLIER);
}
