//! The explorer's page in a real browser: Debian's `chromium`, headless, driven over the
//! DevTools protocol by `headless_chrome` (its download feature off: the system's browser
//! is used, and a missing browser fails the test). One browser session walks through the
//! page: the layout at 1366x768, dragging the standpoint (the underlay shown must equal
//! `pansite render` for the standpoint reached), the hover read-out against azimuth and
//! elevation computed here, the keyboard, saving the scene, a broken scene, and keeping a
//! standpoint. Screenshots go to target/test-artefacts/explorer/.

use headless_chrome::protocol::cdp::Input;
use headless_chrome::protocol::cdp::Page::CaptureScreenshotFormatOption;
use headless_chrome::{Browser, LaunchOptions, Tab};
mod common;
use common::Scratch;
use pansite::compose::{plan_map, PlanSettings};
use pansite::explore::{ExploreSettings, Explorer, Source};
use std::ffi::OsStr;
use std::path::{Path, PathBuf};
use std::sync::Arc;
use std::time::{Duration, Instant};

/// The browser the tests use: Debian's package (installed by .ci/run).
fn chromium() -> PathBuf {
    for path in ["/usr/bin/chromium", "/usr/lib/chromium/chromium"] {
        if Path::new(path).exists() {
            return PathBuf::from(path);
        }
    }
    panic!(
        "Debian's chromium is not installed (apt-get install chromium); the browser tests need it"
    );
}

fn artefacts() -> PathBuf {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("target/test-artefacts/explorer");
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn launch(profile: &Path) -> Browser {
    let args: Vec<&OsStr> = [
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--force-device-scale-factor=1",
    ]
    .iter()
    .map(OsStr::new)
    .collect();
    let options = LaunchOptions::default_builder()
        .path(Some(chromium()))
        .headless(true)
        .sandbox(false)
        .user_data_dir(Some(profile.to_owned()))
        .window_size(Some((1366, 768)))
        .args(args)
        .idle_browser_timeout(Duration::from_secs(120))
        .build()
        .unwrap();
    Browser::new(options).expect("chromium starts")
}

/// The value of `js` in the page. Arrays and objects come back by reference over the
/// DevTools protocol, so the page hands everything over as JSON text.
fn eval(tab: &Tab, js: &str) -> serde_json::Value {
    // `eval` of the quoted text keeps statement lists (`a = 1; true`) working: the value is
    // the last statement's.
    let quoted = serde_json::Value::String(js.to_owned()).to_string();
    let wrapped = format!("JSON.stringify(eval({quoted}))");
    match tab
        .evaluate(&wrapped, true)
        .unwrap_or_else(|e| panic!("{js}: {e}"))
        .value
    {
        Some(serde_json::Value::String(text)) => {
            serde_json::from_str(&text).unwrap_or_else(|e| panic!("{js}: {e}: {text}"))
        }
        _ => serde_json::Value::Null,
    }
}

/// Waits until `js` is true (it is evaluated every 50 ms for up to 30 s).
fn wait_for(tab: &Tab, js: &str, what: &str) {
    let started = Instant::now();
    while started.elapsed() < Duration::from_secs(30) {
        if eval(tab, js) == serde_json::Value::Bool(true) {
            return;
        }
        std::thread::sleep(Duration::from_millis(50));
    }
    let said = eval(tab, "document.getElementById('message').textContent");
    let problem = eval(tab, "document.getElementById('problem').textContent");
    panic!("waited 30 s for {what}: {js} (the page says {said}; problem: {problem})");
}

/// Both panes have answered their latest request.
const SETTLED: &str = "(() => { const e = window.pansiteExplorer; return !!(e && e.plan) && \
    document.getElementById('underlay').dataset.shown !== undefined && \
    !document.querySelector('#status').textContent.startsWith('...') && \
    window.pansiteSettled && window.pansiteSettled(); })()";

fn mouse(tab: &Tab, kind: Input::DispatchMouseEventTypeOption, x: f64, y: f64, down: bool) {
    mouse_with(tab, kind, (x, y), down, None);
}

/// Shift held, as the DevTools protocol numbers modifiers (Alt 1, Ctrl 2, Meta 4, Shift 8).
const SHIFT: u32 = 8;

fn mouse_with(
    tab: &Tab,
    kind: Input::DispatchMouseEventTypeOption,
    (x, y): (f64, f64),
    down: bool,
    modifiers: Option<u32>,
) {
    let released = matches!(kind, Input::DispatchMouseEventTypeOption::MouseReleased);
    tab.call_method(Input::DispatchMouseEvent {
        Type: kind,
        x,
        y,
        modifiers,
        timestamp: None,
        button: Some(if down || released {
            Input::MouseButton::Left
        } else {
            Input::MouseButton::None
        }),
        buttons: Some(if down { 1 } else { 0 }),
        click_count: Some(1),
        force: None,
        tangential_pressure: None,
        tilt_x: None,
        tilt_y: None,
        twist: None,
        delta_x: None,
        delta_y: None,
        pointer_Type: None,
    })
    .unwrap();
}

fn screenshot(tab: &Tab, name: &str) {
    let png = tab
        .capture_screenshot(CaptureScreenshotFormatOption::Png, None, None, true)
        .unwrap();
    std::fs::write(artefacts().join(name), png).unwrap();
}

/// The canvas's pixels as the page holds them (red channel: the images are grey).
fn canvas_pixels(tab: &Tab, id: &str) -> (u32, u32, Vec<u8>) {
    let js = format!(
        "(() => {{ const c = document.getElementById('{id}'); \
         const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data; \
         let s = ''; for (let i = 0; i < d.length; i += 4) s += String.fromCharCode(d[i]); \
         return [c.width, c.height, btoa(s)]; }})()"
    );
    let value = eval(tab, &js);
    let (w, h) = (
        value[0].as_u64().unwrap() as u32,
        value[1].as_u64().unwrap() as u32,
    );
    let pixels = base64_decode(value[2].as_str().unwrap());
    assert_eq!(pixels.len(), (w * h) as usize);
    (w, h, pixels)
}

/// Standard base64 (RFC 4648, section 4), enough for the page's answers.
fn base64_decode(text: &str) -> Vec<u8> {
    let value = |c: u8| match c {
        b'A'..=b'Z' => c - b'A',
        b'a'..=b'z' => c - b'a' + 26,
        b'0'..=b'9' => c - b'0' + 52,
        b'+' => 62,
        b'/' => 63,
        _ => panic!("not base64"),
    };
    let bytes: Vec<u8> = text.bytes().filter(|b| *b != b'=').collect();
    let mut out = Vec::with_capacity(bytes.len() * 3 / 4);
    for chunk in bytes.chunks(4) {
        let v: Vec<u32> = chunk.iter().map(|&c| value(c) as u32).collect();
        let n = v
            .iter()
            .enumerate()
            .fold(0u32, |n, (i, x)| n | (x << (18 - 6 * i)));
        out.extend_from_slice(&n.to_be_bytes()[1..chunk.len()]);
    }
    out
}

/// The grey pixels of a PNG file written by `pansite render`, decoded by the `png` crate.
fn png_grey(path: &Path) -> (u32, u32, Vec<u8>) {
    let decoder = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(path).unwrap()));
    let mut reader = decoder.read_info().unwrap();
    let mut buffer = vec![0; reader.output_buffer_size().unwrap()];
    let info = reader.next_frame(&mut buffer).unwrap();
    let channels = info.color_type.samples();
    let grey = buffer[..info.buffer_size()]
        .chunks(channels)
        .map(|p| p[0])
        .collect();
    (info.width, info.height, grey)
}

/// Where a site position lands on the screen, from the plan drawn here the way the server
/// draws it (same size) and the plan canvas's place on the page.
fn screen_of_site(tab: &Tab, site: &pansite::scene::Site, x: f64, y: f64) -> (f64, f64) {
    let plan = plan_map(
        site,
        &site.standpoints,
        &PlanSettings {
            width: 360,
            height: 360,
            scale: pansite::compose::PlanScale::Fill,
            ..PlanSettings::default()
        },
    )
    .unwrap();
    let p = plan.to_px(x, y);
    let rect = eval(
        tab,
        "(() => { const r = document.getElementById('plan').getBoundingClientRect(); return [r.left, r.top, r.width]; })()",
    );
    let (left, top, width) = (
        rect[0].as_f64().unwrap(),
        rect[1].as_f64().unwrap(),
        rect[2].as_f64().unwrap(),
    );
    let scale = width / 360.0;
    (left + p.x * scale, top + p.y * scale)
}

#[test]
fn the_page_in_chromium() {
    let dir = Scratch::new("explorer-browser");
    let scene = dir.path("square.ron");
    let original = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron"),
    )
    .unwrap();
    std::fs::write(&scene, &original).unwrap();
    let site = pansite::scene::load_scene(&scene).unwrap();
    let mut settings = ExploreSettings::new(Source::Scene(scene.clone()), dir.path("out"));
    settings.poll = Duration::from_millis(100);
    let explorer = Arc::new(Explorer::start(settings).unwrap());

    let browser = launch(&dir.path("profile"));
    let tab = browser.new_tab().unwrap();
    tab.set_default_timeout(Duration::from_secs(30));
    tab.navigate_to(&explorer.url())
        .unwrap()
        .wait_until_navigated()
        .unwrap();
    wait_for(&tab, SETTLED, "the first drawing");

    // The page fits 1366x768 without scrolling sideways.
    let fits = eval(
        &tab,
        "document.documentElement.scrollWidth <= window.innerWidth",
    );
    assert_eq!(fits, serde_json::Value::Bool(true));
    assert_eq!(eval(&tab, "window.innerWidth"), 1366);
    screenshot(&tab, "page-1366x768.png");

    // Drag the standpoint from the fountain to a point across the square.
    let start = site.standpoint("fountain").unwrap();
    let (from_x, from_y) = screen_of_site(&tab, &site, start.x, start.y);
    let target = (6.0, -9.0);
    let (to_x, to_y) = screen_of_site(&tab, &site, target.0, target.1);
    use Input::DispatchMouseEventTypeOption::{MouseMoved, MousePressed, MouseReleased};
    mouse(&tab, MouseMoved, from_x, from_y, false);
    mouse(&tab, MousePressed, from_x, from_y, true);
    for step in 1..=20 {
        let s = step as f64 / 20.0;
        mouse(
            &tab,
            MouseMoved,
            from_x + s * (to_x - from_x),
            from_y + s * (to_y - from_y),
            true,
        );
        std::thread::sleep(Duration::from_millis(15));
    }
    mouse(&tab, MouseReleased, to_x, to_y, false);
    wait_for(&tab, SETTLED, "the drawing after the drag");
    let view = eval(&tab, "window.pansiteExplorer.view");
    let (x, y) = (view["x"].as_f64().unwrap(), view["y"].as_f64().unwrap());
    let heading = view["heading"].as_f64().unwrap();
    let eye = view["eye"].as_f64().unwrap();
    // Within a pixel of the plan (its scale is px_per_metre) of the point dragged to.
    let px_per_metre = eval(&tab, "window.pansiteExplorer.plan.pxPerMetre")
        .as_f64()
        .unwrap();
    assert!(
        (x - target.0).abs() <= 1.5 / px_per_metre && (y - target.1).abs() <= 1.5 / px_per_metre,
        "dragged to ({x}, {y}), wanted {target:?}"
    );
    screenshot(&tab, "after-drag.png");

    // The underlay shown equals `pansite render` for that standpoint.
    let (w, h, shown) = canvas_pixels(&tab, "underlay");
    same_as_render(&dir, &scene, (x, y, heading, eye), (w, h, &shown), &[]);

    // The aids switched on from the page: the underlay shown equals `pansite render` with
    // the options of the same meaning. The pole is placed by Shift-clicking the plan.
    let pole_at = (5.0, -3.0);
    let (pole_x, pole_y) = screen_of_site(&tab, &site, pole_at.0, pole_at.1);
    mouse_with(&tab, MousePressed, (pole_x, pole_y), true, Some(SHIFT));
    mouse_with(&tab, MouseReleased, (pole_x, pole_y), false, Some(SHIFT));
    wait_for(
        &tab,
        "document.getElementById('aid-pole').checked",
        "the pole to be placed",
    );
    let pole = eval(
        &tab,
        "[Number(document.getElementById('pole-x').value), Number(document.getElementById('pole-y').value)]",
    );
    let pole = (pole[0].as_f64().unwrap(), pole[1].as_f64().unwrap());
    assert!(
        (pole.0 - pole_at.0).abs() <= 1.5 / px_per_metre
            && (pole.1 - pole_at.1).abs() <= 1.5 / px_per_metre,
        "the pole went to {pole:?}, wanted {pole_at:?}"
    );
    let view_after = eval(&tab, "window.pansiteExplorer.view");
    assert_eq!(
        view_after["x"].as_f64(),
        Some(x),
        "Shift-click does not move"
    );
    set_aids(
        &tab,
        "set('grid-step', '15'); tick('aid-labels'); tick('aid-names'); tick('aid-vanishing'); \
         set('fan-bearing', '30'); set('fan-step', '5'); tick('aid-fan'); \
         set('divide-item', 'clock tower'); set('divide-parts', '3'); tick('aid-divide');",
        "divide=clock",
    );
    screenshot(&tab, "aids.png");
    let (w, h, with_aids) = canvas_pixels(&tab, "underlay");
    let pole_arg = format!("{},{}", pole.0, pole.1);
    same_as_render(
        &dir,
        &scene,
        (x, y, heading, eye),
        (w, h, &with_aids),
        &[
            "--grid",
            "15",
            "--labels",
            "--item-labels",
            "--vanishing",
            "--fan",
            "30,5",
            "--pole",
            &pole_arg,
            "--divide-edges",
            "clock tower:3",
        ],
    );
    let changed = shown.iter().zip(&with_aids).filter(|(a, b)| a != b).count();
    assert!(changed > 1000, "the aids changed only {changed} pixels");
    // No grid: the bare wireframe, as `render --bare`, the other switches greyed out.
    set_aids(&tab, "set('grid-step', 'off');", "grid=off");
    assert_eq!(
        eval(&tab, "document.getElementById('aids-over').disabled"),
        serde_json::Value::Bool(true)
    );
    let (w, h, bare) = canvas_pixels(&tab, "underlay");
    same_as_render(
        &dir,
        &scene,
        (x, y, heading, eye),
        (w, h, &bare),
        &["--bare"],
    );
    // Back to the plain underlay for what follows.
    set_aids(
        &tab,
        "set('grid-step', '10'); for (const id of ['aid-labels', 'aid-names', 'aid-vanishing', \
         'aid-fan', 'aid-pole', 'aid-divide']) tick(id, false);",
        "grid=on&step=10&labels=off&names=off&vanishing=off&tone",
    );

    // Hover over a corner of the clock tower's pyramid roof: its apex is at (-17, -3, 24)
    // (the scene says Centre(-17, -3), apex 24). Azimuth and elevation from the eye,
    // computed here with atan2 (clockwise from north, as the crate's conventions say).
    let apex = (-17.0, -3.0, 24.0);
    let (dx, dy, dz) = (apex.0 - x, apex.1 - y, apex.2 - eye);
    let azimuth = dx.atan2(dy).to_degrees().rem_euclid(360.0);
    let elevation = dz.atan2(dx.hypot(dy)).to_degrees();
    let relative = (azimuth - heading + 180.0).rem_euclid(360.0);
    let u = relative / 360.0 * w as f64;
    let v = (90.0 - elevation) / 180.0 * h as f64;
    let rect = eval(
        &tab,
        "(() => { const r = document.getElementById('underlay').getBoundingClientRect(); return [r.left, r.top, r.width]; })()",
    );
    let scale = rect[2].as_f64().unwrap() / w as f64;
    let (sx, sy) = (
        rect[0].as_f64().unwrap() + u * scale,
        rect[1].as_f64().unwrap() + v * scale,
    );
    mouse(&tab, MouseMoved, sx, sy, false);
    wait_for(
        &tab,
        "document.getElementById('readout').dataset.azimuth !== undefined",
        "the hover read-out",
    );
    std::thread::sleep(Duration::from_millis(300));
    let read_az: f64 = eval(
        &tab,
        "Number(document.getElementById('readout').dataset.azimuth)",
    )
    .as_f64()
    .unwrap();
    let read_el: f64 = eval(
        &tab,
        "Number(document.getElementById('readout').dataset.elevation)",
    )
    .as_f64()
    .unwrap();
    // One screen pixel is (360 / w) / scale degrees; the mouse lands on whole pixels.
    let pixel_deg = 360.0 / w as f64 / scale;
    assert!(
        angle_diff(read_az, azimuth) <= pixel_deg && (read_el - elevation).abs() <= pixel_deg,
        "read {read_az}, {read_el}; computed {azimuth}, {elevation} (a pixel is {pixel_deg} degrees)"
    );
    let readout = eval(&tab, "document.getElementById('readout').textContent");
    assert!(
        readout.as_str().unwrap().contains("clock tower"),
        "{readout}"
    );
    // The nearest corner is the apex itself, at the distance worked from the scene.
    let probe = eval(&tab, "window.pansiteExplorer.probe");
    let corner = &probe["corner"];
    let at = ["x", "y", "z"].map(|k| corner[k].as_f64().unwrap());
    assert!(
        at.iter()
            .zip([apex.0, apex.1, apex.2])
            .all(|(a, b)| (a - b).abs() < 1e-9),
        "{probe}"
    );
    // The page sends positions to the millimetre: the server's eye is there.
    let (xr, yr, er) = (round3(x), round3(y), round3(eye));
    let apex_distance =
        ((apex.0 - xr).powi(2) + (apex.1 - yr).powi(2) + (apex.2 - er).powi(2)).sqrt();
    assert!(
        (corner["distance"].as_f64().unwrap() - apex_distance).abs() < 1e-9
            && corner["off_deg"].as_f64().unwrap() <= 1.5 * pixel_deg,
        "{probe}: the apex is {apex_distance} m away"
    );

    // Hover over the south face of the hall platform (the scene: Corner(-12.5, 7.6), 25 by
    // 13, 0.45 high, so the face is y = 7.6 for x from -12.5 to 12.5, z up to 0.45), with
    // nothing between the eye and it. The distance read out is where the direction read
    // out meets that plane; the nearest corner is the corner of the scene whose direction
    // is closest, both worked out here.
    let aim = (8.0, 7.6, 0.225);
    let (sx, sy) = underlay_screen(&tab, (x, y, eye, heading), (w, h), aim);
    mouse(&tab, MouseMoved, sx, sy, false);
    wait_for(
        &tab,
        &format!("Number(document.getElementById('readout').dataset.azimuth) !== {read_az}"),
        "the read-out over the platform",
    );
    wait_for(
        &tab,
        "(() => { const p = window.pansiteExplorer.probe; \
        return !!p && Math.abs(p.elevation) < 20; })()",
        "the platform's probe",
    );
    std::thread::sleep(Duration::from_millis(300));
    let probe = eval(&tab, "window.pansiteExplorer.probe");
    let (az, el) = (
        probe["azimuth"].as_f64().unwrap().to_radians(),
        probe["elevation"].as_f64().unwrap().to_radians(),
    );
    let direction = [el.cos() * az.sin(), el.cos() * az.cos(), el.sin()];
    let along = (aim.1 - yr) / direction[1];
    let hit = [xr + along * direction[0], aim.1, er + along * direction[2]];
    assert!(
        hit[0].abs() < 12.5 && (0.0..0.45).contains(&hit[2]),
        "the direction read out, {probe}, misses the platform's face at {hit:?}"
    );
    let distance = probe["distance"]
        .as_f64()
        .expect("a face under the pointer");
    assert!(
        (distance - along).abs() < 1e-6,
        "distance {distance}, worked out {along}"
    );
    let readout = eval(&tab, "document.getElementById('readout').textContent");
    assert!(
        readout
            .as_str()
            .unwrap()
            .contains(&format!("distance {along:.2} m")),
        "{readout}"
    );
    let (nearest, _) = nearest_corner(&site, (xr, yr, er), direction);
    let corner = &probe["corner"];
    let at = ["x", "y", "z"].map(|k| corner[k].as_f64().unwrap());
    assert_eq!(at, nearest, "{probe}");

    // A click keeps the point in the table.
    let (sx, sy) = underlay_screen(&tab, (x, y, eye, heading), (w, h), apex);
    mouse(&tab, MouseMoved, sx, sy, false);
    mouse(&tab, MousePressed, sx, sy, true);
    mouse(&tab, MouseReleased, sx, sy, false);
    wait_for(
        &tab,
        "document.querySelectorAll('#picks tbody tr').length === 1",
        "a kept point",
    );

    // Keyboard: an arrow moves half a metre north; Alt with an arrow turns 5 degrees.
    eval(&tab, "document.getElementById('plan').focus(); true");
    tab.press_key("ArrowUp").unwrap();
    wait_for(
        &tab,
        &format!("Math.abs(window.pansiteExplorer.view.y - ({y} + 0.5)) < 1e-9"),
        "the arrow key",
    );
    tab.press_key_with_modifiers(
        "ArrowRight",
        Some(&[headless_chrome::browser::tab::ModifierKey::Alt]),
    )
    .unwrap();
    wait_for(
        &tab,
        &format!(
            "Math.abs(window.pansiteExplorer.view.heading - ({} % 360)) < 1e-9",
            heading + 5.0
        ),
        "Alt with an arrow key",
    );
    wait_for(&tab, SETTLED, "the drawing after the keys");

    // A click on the plan (no drag) stands there: the underlay is then `render` from there.
    let spot = (-4.0, -1.0);
    let (cx, cy) = screen_of_site(&tab, &site, spot.0, spot.1);
    mouse(&tab, MouseMoved, cx, cy, false);
    mouse(&tab, MousePressed, cx, cy, true);
    mouse(&tab, MouseReleased, cx, cy, false);
    wait_for(&tab, SETTLED, "the drawing after the click");
    let view = eval(&tab, "window.pansiteExplorer.view");
    let [x, y, heading, eye] = ["x", "y", "heading", "eye"].map(|k| view[k].as_f64().unwrap());
    assert!(
        (x - spot.0).abs() <= 1.5 / px_per_metre && (y - spot.1).abs() <= 1.5 / px_per_metre,
        "clicked at {spot:?}, standing at ({x}, {y})"
    );
    let (w, h, shown) = canvas_pixels(&tab, "underlay");
    same_as_render(&dir, &scene, (x, y, heading, eye), (w, h, &shown), &[]);

    // The look-around turns towards where the standpoint is dragged: dragged south-east
    // (as many screen pixels right as down) it looks at azimuth 135, and shows the
    // library's perspective preview for that direction with the field chosen (60 degrees).
    eval(
        &tab,
        "const f = document.getElementById('fov'); f.value = '60'; f.dispatchEvent(new Event('input')); true",
    );
    mouse(&tab, MousePressed, cx, cy, true);
    for step in 1..=4 {
        let d = 10.0 * step as f64;
        mouse(&tab, MouseMoved, cx + d, cy + d, true);
        std::thread::sleep(Duration::from_millis(20));
    }
    mouse(&tab, MouseReleased, cx + 40.0, cy + 40.0, false);
    wait_for(&tab, SETTLED, "the drawings after the south-east drag");
    let look = eval(&tab, "window.pansiteExplorer.look");
    assert!(
        (look["azimuth"].as_f64().unwrap() - 135.0).abs() < 1e-9,
        "{look}"
    );
    let shown_look = eval(&tab, "document.getElementById('look').dataset.shown");
    let asked = query_numbers(shown_look.as_str().unwrap());
    assert_eq!(
        (asked["heading"], asked["fov"]),
        (135.0, 60.0),
        "{shown_look}"
    );
    let (lw, lh, look_pixels) = canvas_pixels(&tab, "look");
    assert_eq!((asked["w"], asked["h"]), (lw as f64, lh as f64));
    let mut looking = pansite::scene::Standpoint::from_degrees(
        "look",
        asked["x"],
        asked["y"],
        asked["eye"],
        135.0,
        asked["pitch"],
        0.0,
    );
    // Dragged, the page sends the standpoint's own ground if it has one; if not, none, and
    // the server stands the viewer on the scene's.
    looking.ground = asked
        .get("ground")
        .copied()
        .unwrap_or_else(|| pansite::scene::ground_height(&site, asked["x"], asked["y"]));
    // The pane's line weight and tolerance are the server's (src/explore/server.rs).
    let preview = pansite::compose::preview(
        &site,
        &looking,
        &pansite::compose::PreviewSettings {
            width: lw,
            height: lh,
            fov_deg: 60.0,
            line_weight_px: 1.2,
            tolerance_px: 0.25,
            hidden: None,
        },
    )
    .unwrap();
    let expected = pansite::output::rasterize(&preview).pixels;
    assert_same_pixels(
        &look_pixels,
        &expected,
        "the library's preview at azimuth 135",
    );
    screenshot(&tab, "look-around.png");

    // Dragging the arrow's head turns the heading to point at the pointer (to azimuth 250
    // here); the look-around follows, and the underlay is `render` with that heading.
    let view = eval(&tab, "window.pansiteExplorer.view");
    let [x, y, heading, eye] = ["x", "y", "heading", "eye"].map(|k| view[k].as_f64().unwrap());
    let (px, py) = screen_of_site(&tab, &site, x, y);
    let scale = eval(
        &tab,
        "document.getElementById('plan').getBoundingClientRect().width / 360",
    )
    .as_f64()
    .unwrap();
    // The arrow is 34 plan pixels long (explore.js, ARROW_PX).
    let towards = |bearing: f64, length: f64| {
        let b = bearing.to_radians();
        (px + length * scale * b.sin(), py - length * scale * b.cos())
    };
    let tip = towards(heading, 34.0);
    mouse(&tab, MouseMoved, tip.0, tip.1, false);
    mouse(&tab, MousePressed, tip.0, tip.1, true);
    for bearing in [heading + 20.0, 200.0, 230.0, 250.0] {
        let (mx, my) = towards(bearing, 60.0);
        mouse(&tab, MouseMoved, mx, my, true);
        std::thread::sleep(Duration::from_millis(20));
    }
    let end = towards(250.0, 60.0);
    mouse(&tab, MouseReleased, end.0, end.1, false);
    wait_for(&tab, SETTLED, "the drawings after turning");
    let view = eval(&tab, "window.pansiteExplorer.view");
    let turned = view["heading"].as_f64().unwrap();
    // A screen pixel at 60 pixels from the standpoint is about a degree.
    assert!((turned - 250.0).abs() <= 1.0, "turned to {turned}");
    assert_eq!(view["x"].as_f64(), Some(x), "turning does not move");
    let look = eval(&tab, "window.pansiteExplorer.look");
    assert!((look["azimuth"].as_f64().unwrap() - turned).abs() < 1e-9);
    let (w, h, shown) = canvas_pixels(&tab, "underlay");
    same_as_render(&dir, &scene, (x, y, turned, eye), (w, h, &shown), &[]);

    // Saving the scene (by renaming, as editors do) updates the page.
    let version = eval(&tab, "document.getElementById('underlay').dataset.version");
    let renamed = original.replace("Wexcombe Market Square\"", "Wexcombe Square, saved\"");
    save(&dir.0, &scene, &renamed);
    wait_for(
        &tab,
        "document.getElementById('scene-name').textContent === 'Wexcombe Square, saved'",
        "the page to show the saved scene",
    );
    wait_for(
        &tab,
        &format!("document.getElementById('underlay').dataset.version !== {version}"),
        "a new underlay of the saved scene",
    );
    wait_for(&tab, SETTLED, "the drawing of the saved scene");

    // A broken scene: its error is shown (file, line, column) and the drawing stays.
    let (_, _, before_break) = canvas_pixels(&tab, "underlay");
    let broken = renamed.replacen("width: 25,", "width: 25,,", 1);
    save(&dir.0, &scene, &broken);
    wait_for(
        &tab,
        "!document.getElementById('problem').hidden",
        "the error to show",
    );
    let problem = eval(&tab, "document.getElementById('problem').textContent");
    let problem = problem.as_str().unwrap();
    let line = broken
        .lines()
        .position(|l| l.contains("width: 25,,"))
        .unwrap()
        + 1;
    assert!(
        problem.contains(&format!("square.ron:{line}:")),
        "{problem}"
    );
    screenshot(&tab, "broken-scene.png");
    let (_, _, after_break) = canvas_pixels(&tab, "underlay");
    assert_eq!(before_break, after_break, "the last good drawing stays");

    // Mended, then keep this standpoint: one line inserted, every other byte unchanged.
    save(&dir.0, &scene, &renamed);
    wait_for(
        &tab,
        "document.getElementById('problem').hidden",
        "the error to clear",
    );
    wait_for(&tab, SETTLED, "the mended scene");
    eval(
        &tab,
        "document.getElementById('keep-name').value = 'across the square'; true",
    );
    eval(&tab, "document.getElementById('keep').click(); true");
    wait_for(
        &tab,
        "document.getElementById('message').textContent.startsWith('kept')",
        "the standpoint to be kept",
    );
    let kept = std::fs::read(&scene).unwrap();
    let old = renamed.as_bytes();
    let prefix = old.iter().zip(&kept).take_while(|(a, b)| a == b).count();
    let suffix = old[prefix..]
        .iter()
        .rev()
        .zip(kept[prefix..].iter().rev())
        .take_while(|(a, b)| a == b)
        .count();
    assert_eq!(prefix + suffix, old.len(), "only an insertion");
    let inserted = String::from_utf8_lossy(&kept[prefix..kept.len() - suffix]).into_owned();
    assert!(
        inserted.contains("(name: \"across the square\""),
        "{inserted}"
    );
    assert_eq!(inserted.matches('\n').count(), 1, "one line: {inserted:?}");
    wait_for(
        &tab,
        "[...document.getElementById('standpoints').options].some(o => o.textContent === 'across the square')",
        "the kept standpoint in the list",
    );
    screenshot(&tab, "kept.png");

    // The shade tone, switched on from the page, over a yard of our own with a place and a
    // sun (its `sun` block asks for no tone): the underlay shown equals `pansite render
    // --shade-tone`, and differs from the one shown before.
    let yard = common::TONE_YARD;
    let version = eval(&tab, "document.getElementById('underlay').dataset.version");
    save(&dir.0, &scene, yard);
    wait_for(
        &tab,
        "document.getElementById('scene-name').textContent === 'Tone yard'",
        "the page to show the yard",
    );
    wait_for(
        &tab,
        &format!("document.getElementById('underlay').dataset.version !== {version}"),
        "an underlay of the yard",
    );
    wait_for(&tab, SETTLED, "the drawing of the yard");
    let (_, _, bare) = canvas_pixels(&tab, "underlay");
    eval(
        &tab,
        "const t = document.getElementById('tone'); t.value = 'on'; t.dispatchEvent(new Event('change')); true",
    );
    wait_for(
        &tab,
        "document.getElementById('underlay').dataset.shown.includes('tone=on')",
        "the underlay with the tone",
    );
    wait_for(&tab, SETTLED, "the drawing with the tone");
    screenshot(&tab, "shade-tone.png");
    let view = eval(&tab, "window.pansiteExplorer.view");
    let at = ["x", "y", "heading", "eye"].map(|k| view[k].as_f64().unwrap());
    let (w, h, toned) = canvas_pixels(&tab, "underlay");
    same_as_render(
        &dir,
        &scene,
        (at[0], at[1], at[2], at[3]),
        (w, h, &toned),
        &["--shade-tone"],
    );
    let washed = bare.iter().zip(&toned).filter(|(a, b)| a != b).count();
    assert!(washed > 1000, "the tone changed only {washed} pixels");

    // The sun's switches show for a scene with a sun, set as its `sun` block says (no
    // path, no seasons); the seasons switched on equal `render --seasons`.
    assert_eq!(
        eval(
            &tab,
            "[document.getElementById('sun-aids').hidden, document.getElementById('sun-path').checked, document.getElementById('sun-seasons').checked]"
        ),
        serde_json::json!([false, false, false])
    );
    set_aids(&tab, "tick('sun-seasons');", "seasons=on");
    let (w, h, seasons) = canvas_pixels(&tab, "underlay");
    same_as_render(
        &dir,
        &scene,
        (at[0], at[1], at[2], at[3]),
        (w, h, &seasons),
        &["--shade-tone", "--seasons"],
    );
    let drawn = toned.iter().zip(&seasons).filter(|(a, b)| a != b).count();
    assert!(drawn > 500, "the seasons changed only {drawn} pixels");

    // Timings, as the page measured them (request to decoded image; test profile).
    let stats = eval(
        &tab,
        "[window.pansiteExplorer.p95(window.pansiteExplorer.stats.underlay), window.pansiteExplorer.p95(window.pansiteExplorer.stats.look), window.pansiteExplorer.stats.underlay.length]",
    );
    eprintln!(
        "browser: p95 request to decoded image, underlay {} ms, look-around {} ms, over {} underlays (unoptimised test build; see cargo bench)",
        stats[0], stats[1], stats[2]
    );
    drop(tab);
    drop(browser);
    Arc::try_unwrap(explorer).ok().unwrap().stop();
}

/// Where the image of the site point `at` lies on the screen, over the underlay drawn from
/// (x, y, eye, heading) at w x h (the crate's image mapping; azimuth by atan2, clockwise
/// from north).
fn underlay_screen(
    tab: &Tab,
    (x, y, eye, heading): (f64, f64, f64, f64),
    (w, h): (u32, u32),
    at: (f64, f64, f64),
) -> (f64, f64) {
    let (dx, dy, dz) = (at.0 - x, at.1 - y, at.2 - eye);
    let azimuth = dx.atan2(dy).to_degrees();
    let elevation = dz.atan2(dx.hypot(dy)).to_degrees();
    let u = (azimuth - heading + 180.0).rem_euclid(360.0) / 360.0 * w as f64;
    let v = (90.0 - elevation) / 180.0 * h as f64;
    let rect = eval(
        tab,
        "(() => { const r = document.getElementById('underlay').getBoundingClientRect(); return [r.left, r.top, r.width]; })()",
    );
    let scale = rect[2].as_f64().unwrap() / w as f64;
    (
        rect[0].as_f64().unwrap() + u * scale,
        rect[1].as_f64().unwrap() + v * scale,
    )
}

/// The corner of the scene (an end of a straight edge) whose direction from `eye` is
/// closest to `direction`, by brute force, the angle as atan2(|a x b|, a . b).
fn nearest_corner(
    site: &pansite::scene::Site,
    eye: (f64, f64, f64),
    direction: [f64; 3],
) -> ([f64; 3], f64) {
    let mut best = ([f64::NAN; 3], f64::INFINITY);
    for edge in &site.edges {
        let pansite::scene::SiteCurve::Segment { start, end } = edge.curve else {
            continue;
        };
        for p in [start, end] {
            let a = [p.x - eye.0, p.y - eye.1, p.z - eye.2];
            let b = direction;
            let cross = [
                a[1] * b[2] - a[2] * b[1],
                a[2] * b[0] - a[0] * b[2],
                a[0] * b[1] - a[1] * b[0],
            ];
            let dot = a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
            let angle = (cross[0].powi(2) + cross[1].powi(2) + cross[2].powi(2))
                .sqrt()
                .atan2(dot);
            if angle < best.1 {
                best = ([p.x, p.y, p.z], angle);
            }
        }
    }
    best
}

/// The numbers of a request's query, by name (the page's own addresses: plain numbers).
fn query_numbers(url: &str) -> std::collections::HashMap<String, f64> {
    url.split_once('?')
        .map_or("", |(_, q)| q)
        .split('&')
        .filter_map(|pair| {
            let (name, value) = pair.split_once('=')?;
            Some((name.to_owned(), value.parse().ok()?))
        })
        .collect()
}

/// No pixel may differ by more than 8 grey levels in more than 0.1 % of the image
/// (decoding and drawing may round a level), and the image is not blank.
fn assert_same_pixels(shown: &[u8], expected: &[u8], what: &str) {
    assert_eq!(shown.len(), expected.len(), "{what}: sizes differ");
    let differing = shown
        .iter()
        .zip(expected)
        .filter(|(a, b)| (**a as i32 - **b as i32).abs() > 8)
        .count();
    let dark = expected.iter().filter(|p| **p < 128).count();
    assert!(dark > 1000, "{what} is nearly blank");
    assert!(
        differing * 1000 <= shown.len(),
        "{differing} of {} pixels differ from {what}",
        shown.len()
    );
}

/// Sets the aids' controls by `script` (with `set(id, value)` and `tick(id, on = true)`,
/// each firing the change the page listens to) and waits for the underlay asked for with
/// `wanted` in its address.
fn set_aids(tab: &Tab, script: &str, wanted: &str) {
    let helpers = "const set = (id, v) => { const e = document.getElementById(id); e.value = v; \
        e.dispatchEvent(new Event('change')); }; \
        const tick = (id, on = true) => { const e = document.getElementById(id); e.checked = on; \
        e.dispatchEvent(new Event('change')); };";
    eval(tab, &format!("{helpers} {script} true"));
    wait_for(
        tab,
        &format!(
            "document.getElementById('underlay').dataset.shown.includes({})",
            serde_json::Value::String(wanted.to_owned())
        ),
        wanted,
    );
    wait_for(tab, SETTLED, "the underlay with the aids asked for");
}

/// Asserts that the grey pixels `shown` (w x h) are `pansite render` of `scene` from
/// (x, y, heading, eye) with `extra` arguments.
fn same_as_render(
    dir: &Scratch,
    scene: &Path,
    (x, y, heading, eye): (f64, f64, f64, f64),
    (w, h, shown): (u32, u32, &[u8]),
    extra: &[&str],
) {
    let rendered = dir.path("render.png");
    let status = std::process::Command::new(env!("CARGO_BIN_EXE_pansite"))
        .arg("render")
        .arg(scene)
        .args(["--at", &format!("{},{}", round3(x), round3(y))])
        .args(["--heading", &format!("{}", round2(heading))])
        .args(["--eye-height", &format!("{}", round3(eye))])
        .args(["--size", &format!("{w}x{h}")])
        .args(extra)
        .arg("-o")
        .arg(&rendered)
        .status()
        .unwrap();
    assert!(status.success());
    let (rw, rh, expected) = png_grey(&rendered);
    assert_eq!((rw, rh), (w, h));
    let differing = shown
        .iter()
        .zip(&expected)
        .filter(|(a, b)| (**a as i32 - **b as i32).abs() > 8)
        .count();
    let dark = expected.iter().filter(|p| **p < 128).count();
    assert!(dark > 1000, "the render is nearly blank");
    // Tolerance: decoding and drawing may round a grey level; no pixel may differ by more
    // than 8 levels in more than 0.1 % of the image.
    assert!(
        differing * 1000 <= shown.len(),
        "{differing} of {} pixels differ from `pansite render` {extra:?}",
        shown.len()
    );
}

fn save(dir: &Path, scene: &Path, text: &str) {
    let temporary = dir.join(".square.ron.saving");
    std::fs::write(&temporary, text).unwrap();
    std::fs::rename(&temporary, scene).unwrap();
}

fn angle_diff(a: f64, b: f64) -> f64 {
    let d = (a - b).rem_euclid(360.0);
    d.min(360.0 - d)
}

/// The page sends positions to the millimetre and angles to a hundredth of a degree.
fn round3(v: f64) -> f64 {
    (v * 1000.0).round() / 1000.0
}

fn round2(v: f64) -> f64 {
    (v * 100.0).round() / 100.0
}
