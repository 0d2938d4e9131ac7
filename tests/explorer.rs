//! The explorer's server over plain HTTP (a hand-written client on a TCP socket, so that
//! malformed requests can be sent too): the door checks, range checks, keeping a standpoint
//! byte for byte, printing into the output folder only, the aids' parameters; and the
//! `explore` command itself (its warning when it listens beyond this computer, `--open`).

mod common;
use common::Scratch;
use pansite::explore::{ExploreSettings, Explorer, Source};
use pansite::scene::{load_obj, MeshPlacement};
use std::io::{Read, Write};
use std::net::TcpStream;
use std::path::{Path, PathBuf};
use std::sync::Arc;
use std::time::Duration;

fn demo() -> String {
    std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron"),
    )
    .unwrap()
}

/// A scene file in a fresh folder, and an explorer on it writing into `out/`.
/// The folder comes first so that it outlives the explorer (bindings drop in reverse).
fn start(name: &str) -> (Scratch, Explorer, PathBuf, PathBuf) {
    let dir = Scratch::new(&format!("explorer-{name}"));
    let scene = dir.path("square.ron");
    std::fs::write(&scene, demo()).unwrap();
    let out = dir.path("out");
    let explorer = Explorer::start(ExploreSettings::new(
        Source::Scene(scene.clone()),
        out.clone(),
    ))
    .unwrap();
    (dir, explorer, scene, out)
}

struct Answer {
    status: u16,
    head: String,
    body: Vec<u8>,
}

impl Answer {
    fn text(&self) -> String {
        String::from_utf8_lossy(&self.body).into_owned()
    }
}

/// Sends `raw` as it is and reads the whole answer (the server closes after it).
fn send(explorer: &Explorer, raw: &[u8]) -> Answer {
    send_to(explorer.address(), raw)
}

/// [`send`] to a server at `address`.
fn send_to(address: std::net::SocketAddr, raw: &[u8]) -> Answer {
    let mut stream = TcpStream::connect(address).unwrap();
    stream
        .set_read_timeout(Some(Duration::from_secs(60)))
        .unwrap();
    // A server that refuses early may close before all of a huge request is written.
    let _ = stream.write_all(raw);
    let mut bytes = Vec::new();
    let _ = stream.read_to_end(&mut bytes);
    let split = bytes
        .windows(4)
        .position(|w| w == b"\r\n\r\n")
        .unwrap_or_else(|| panic!("no answer: {}", String::from_utf8_lossy(&bytes)));
    let head = String::from_utf8_lossy(&bytes[..split]).into_owned();
    let status = head[9..12].parse().unwrap();
    let mut body = bytes[split + 4..].to_vec();
    if head
        .to_ascii_lowercase()
        .contains("transfer-encoding: chunked")
    {
        body = unchunk(&body);
    }
    Answer { status, head, body }
}

fn unchunk(mut data: &[u8]) -> Vec<u8> {
    let mut out = Vec::new();
    loop {
        let line_end = data.windows(2).position(|w| w == b"\r\n").unwrap();
        let size =
            usize::from_str_radix(std::str::from_utf8(&data[..line_end]).unwrap().trim(), 16)
                .unwrap();
        if size == 0 {
            return out;
        }
        out.extend_from_slice(&data[line_end + 2..line_end + 2 + size]);
        data = &data[line_end + 4 + size..];
    }
}

fn host(explorer: &Explorer) -> String {
    format!("127.0.0.1:{}", explorer.address().port())
}

fn get(explorer: &Explorer, path: &str) -> Answer {
    let raw = format!(
        "GET {path} HTTP/1.1\r\nHost: {}\r\nConnection: close\r\n\r\n",
        host(explorer)
    );
    send(explorer, raw.as_bytes())
}

fn post(
    explorer: &Explorer,
    path: &str,
    token: Option<&str>,
    origin: Option<&str>,
    body: &str,
) -> Answer {
    let mut raw = format!(
        "POST {path} HTTP/1.1\r\nHost: {}\r\nConnection: close\r\nContent-Type: application/json\r\nContent-Length: {}\r\n",
        host(explorer),
        body.len()
    );
    if let Some(token) = token {
        raw += &format!("X-Pansite-Token: {token}\r\n");
    }
    if let Some(origin) = origin {
        raw += &format!("Origin: {origin}\r\n");
    }
    raw += "\r\n";
    raw += body;
    send(explorer, raw.as_bytes())
}

fn own_origin(explorer: &Explorer) -> String {
    format!("http://{}", host(explorer))
}

const UNDERLAY: &str = "/underlay.png?x=1.5&y=-4&heading=10&w=256&h=128";

/// Nothing but the scene and the (absent) output folder in the scene's folder.
fn files_in(dir: &Path) -> Vec<String> {
    let mut names: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    names.sort();
    names
}

#[test]
fn the_page_and_images_are_served_with_a_strict_policy() {
    let (_dir, explorer, _, _) = start("serve");
    let page = get(&explorer, "/");
    assert_eq!(page.status, 200);
    assert!(page.text().contains("<canvas id=\"underlay\""));
    // Nothing from elsewhere: no address of another host anywhere in the page's files.
    for asset in ["/", "/explore.js", "/explore.css"] {
        let text = get(&explorer, asset).text();
        assert!(
            !text.contains("http://") && !text.contains("https://") && !text.contains("//cdn"),
            "{asset}"
        );
    }
    assert!(
        page.head
            .contains("Content-Security-Policy: default-src 'none'"),
        "{}",
        page.head
    );
    let image = get(&explorer, UNDERLAY);
    assert_eq!(image.status, 200, "{}", image.text());
    assert_eq!(&image.body[1..4], b"PNG");
    let plan = get(&explorer, "/plan.png?w=300&h=300");
    assert_eq!(plan.status, 200);
    assert!(plan.head.contains("X-Plan-Px-Per-Metre"));
    let look = get(
        &explorer,
        "/look.png?x=1.5&y=-4&heading=10&w=320&h=180&fov=80",
    );
    assert_eq!(look.status, 200, "{}", look.text());
    let scene = get(&explorer, "/scene");
    let json: serde_json::Value = serde_json::from_slice(&scene.body).unwrap();
    assert_eq!(json["name"], "Wexcombe Market Square");
    assert_eq!(json["standpoints"].as_array().unwrap().len(), 4);
    explorer.stop();
}

#[test]
fn wrong_hosts_missing_tokens_and_foreign_origins_are_refused_and_nothing_is_written() {
    let (_dir, explorer, scene, out) = start("door");
    let before = std::fs::read(&scene).unwrap();
    let token = explorer.token().to_owned();
    let origin = own_origin(&explorer);
    let body = r#"{"name":"by the well","x":2,"y":-3,"heading":40}"#;
    // DNS rebinding: a name of the attacker's pointed at 127.0.0.1.
    for bad_host in ["evil.example:80", "", "127.0.0.1", "localhost:1"] {
        let raw = format!("GET /scene HTTP/1.1\r\nHost: {bad_host}\r\nConnection: close\r\n\r\n");
        assert_eq!(
            send(&explorer, raw.as_bytes()).status,
            403,
            "host {bad_host:?}"
        );
    }
    let raw = "GET /scene HTTP/1.1\r\nConnection: close\r\n\r\n";
    assert_eq!(send(&explorer, raw.as_bytes()).status, 403, "no Host");
    let localhost = format!(
        "GET /scene HTTP/1.1\r\nHost: localhost:{}\r\nConnection: close\r\n\r\n",
        explorer.address().port()
    );
    assert_eq!(send(&explorer, localhost.as_bytes()).status, 200);
    // State-changing requests: token and origin.
    for (token, origin, what) in [
        (None, Some(origin.as_str()), "no token"),
        (
            Some("0123456789abcdef0123456789abcdef"),
            Some(origin.as_str()),
            "wrong token",
        ),
        (Some(token.as_str()), None, "no origin"),
        (
            Some(token.as_str()),
            Some("http://evil.example"),
            "foreign origin",
        ),
        (Some(token.as_str()), Some("null"), "opaque origin"),
    ] {
        for path in ["/keep", "/print"] {
            let answer = post(&explorer, path, token, origin, body);
            assert_eq!(answer.status, 403, "{what} {path}: {}", answer.text());
        }
    }
    // GET on a state-changing route, POST on a reading one.
    assert_eq!(get(&explorer, "/keep").status, 405);
    assert_eq!(
        post(&explorer, "/scene", Some(&token), Some(&origin), "{}").status,
        405
    );
    assert_eq!(std::fs::read(&scene).unwrap(), before);
    assert!(!out.exists());
    assert_eq!(files_in(scene.parent().unwrap()), ["square.ron"]);
    // Still serving.
    assert_eq!(get(&explorer, UNDERLAY).status, 200);
    explorer.stop();
}

#[test]
fn path_like_and_out_of_range_parameters_get_a_400_that_names_them() {
    let (_dir, explorer, scene, out) = start("params");
    let cases = [
        ("/underlay.png?x=../../etc/passwd&y=0&w=256&h=128", "'x'"),
        (
            "/underlay.png?x=0&y=0&w=256&h=128&file=/etc/passwd",
            "'file'",
        ),
        ("/underlay.png?x=0&y=0&w=256&h=128&pane=../../x", "'pane'"),
        ("/underlay.png?x=NaN&y=0&w=256&h=128", "'x'"),
        ("/underlay.png?x=inf&y=0&w=256&h=128", "'x'"),
        ("/underlay.png?x=1e300&y=0&w=256&h=128", "'x'"),
        ("/underlay.png?x=0&y=0&w=-256&h=128", "'w'"),
        ("/underlay.png?x=0&y=0&w=100000&h=50000", "'w'"),
        ("/underlay.png?x=0&y=0&w=300&h=100", "twice as wide"),
        ("/underlay.png?x=0&y=0&w=256&h=128&eye=-1", "'eye'"),
        (
            "/underlay.png?x=0&y=0&w=256&h=128&hidden=%2Fetc",
            "'hidden'",
        ),
        (
            "/underlay.png?x=0&y=0&w=256&h=128&tone=..%2Fsun.ron",
            "'tone'",
        ),
        ("/underlay.png?x=0&y=0&w=256&h=128&tone=yes", "'tone'"),
        ("/look.png?x=0&y=0&w=256&h=128&tone=on", "'tone'"),
        ("/look.png?x=0&y=0&w=256&h=128&fov=179", "'fov'"),
        ("/probe?x=0&y=0&w=256&h=128&u=999&v=1", "'u'"),
        ("/underlay.png?x=0&y=0&w=256&h=128&grid=15", "'grid'"),
        ("/underlay.png?x=0&y=0&w=256&h=128&step=0", "'step'"),
        (
            "/underlay.png?x=0&y=0&w=256&h=128&vanishing=yes",
            "'vanishing'",
        ),
        ("/underlay.png?x=0&y=0&w=256&h=128&fan=NaN", "'fan'"),
        ("/underlay.png?x=0&y=0&w=256&h=128&pole_x=1", "'pole_y'"),
        (
            "/underlay.png?x=0&y=0&w=256&h=128&pole_x=1&pole_y=2&pole_step=1e-9",
            "'pole_step'",
        ),
        (
            "/underlay.png?x=0&y=0&w=256&h=128&divide=..%2F..%2Fetc%2Fpasswd",
            "'divide'",
        ),
        ("/underlay.png?x=0&y=0&w=256&h=128&divide=a%00b", "'divide'"),
        (
            "/underlay.png?x=0&y=0&w=256&h=128&divide=house+1&parts=-1",
            "'parts'",
        ),
        ("/underlay.png?x=0&y=0&w=256&h=128&seasons=1", "'seasons'"),
        ("/look.png?x=0&y=0&w=256&h=128&labels=on", "'labels'"),
        ("/underlay.png?x=0&x=1&y=0&w=256&h=128", "twice"),
        ("/underlay.png?x=%ZZ", "hex"),
    ];
    for (path, named) in cases {
        let answer = get(&explorer, path);
        assert_eq!(answer.status, 400, "{path}: {}", answer.text());
        assert!(answer.text().contains(named), "{path}: {}", answer.text());
    }
    for path in [
        "/../../etc/passwd",
        "/square.ron",
        "/%2e%2e/square.ron",
        "/out/",
        "//etc/passwd",
    ] {
        assert_eq!(get(&explorer, path).status, 404, "{path}");
    }
    let token = explorer.token().to_owned();
    let origin = own_origin(&explorer);
    for body in [
        r#"{"name":"a","x":"../../etc/passwd","y":0}"#,
        r#"{"name":"a","x":0,"y":0,"paper":"../../../tmp/x"}"#,
        r#"{"name":"a","x":0,"y":0,"format":"sh"}"#,
        r#"{"name":"a","x":1e300,"y":0}"#,
        "not json",
        "[1, 2]",
    ] {
        let answer = post(&explorer, "/print", Some(&token), Some(&origin), body);
        assert_eq!(answer.status, 400, "{body}: {}", answer.text());
    }
    assert!(!out.exists());
    assert_eq!(files_in(scene.parent().unwrap()), ["square.ron"]);
    assert_eq!(get(&explorer, UNDERLAY).status, 200);
    explorer.stop();
}

#[test]
fn malformed_and_huge_requests_are_refused_and_the_server_carries_on() {
    let (_dir, explorer, scene, _) = start("huge");
    let before = std::fs::read(&scene).unwrap();
    let token = explorer.token().to_owned();
    let origin = own_origin(&explorer);
    // A request line far too long.
    let long = format!(
        "GET /underlay.png?x={} HTTP/1.1\r\nHost: {}\r\nConnection: close\r\n\r\n",
        "9".repeat(20_000),
        host(&explorer)
    );
    assert_eq!(send(&explorer, long.as_bytes()).status, 414);
    // A body far too large, announced and sent.
    let body = format!(r#"{{"name":"{}","x":0,"y":0}}"#, "a".repeat(2_000_000));
    let answer = post(&explorer, "/keep", Some(&token), Some(&origin), &body);
    assert_eq!(answer.status, 413, "{}", answer.text());
    // Garbage instead of HTTP, and a request cut short.
    let garbage = send_quietly(&explorer, b"\x00\x01\x02 not http at all\r\n\r\n");
    assert!(garbage.is_none_or(|status| status == 400), "{garbage:?}");
    let _ = send_quietly(&explorer, b"GET /underlay.png?x=1");
    assert_eq!(std::fs::read(&scene).unwrap(), before);
    assert_eq!(get(&explorer, UNDERLAY).status, 200);
    explorer.stop();
}

/// Sends bytes the server may answer with 400 or simply close on.
fn send_quietly(explorer: &Explorer, raw: &[u8]) -> Option<u16> {
    let mut stream = TcpStream::connect(explorer.address()).unwrap();
    stream
        .set_read_timeout(Some(Duration::from_secs(5)))
        .unwrap();
    let _ = stream.write_all(raw);
    let _ = stream.shutdown(std::net::Shutdown::Write);
    let mut bytes = Vec::new();
    let _ = stream.read_to_end(&mut bytes);
    std::str::from_utf8(bytes.get(9..12)?).ok()?.parse().ok()
}

/// The old text is the new text with one run of bytes taken out, and that run holds `name`.
fn one_insertion(old: &[u8], new: &[u8], name: &str) -> bool {
    let prefix = old.iter().zip(new).take_while(|(a, b)| a == b).count();
    let suffix = old[prefix..]
        .iter()
        .rev()
        .zip(new[prefix..].iter().rev())
        .take_while(|(a, b)| a == b)
        .count();
    let inserted = &new[prefix..new.len() - suffix];
    prefix + suffix == old.len() && String::from_utf8_lossy(inserted).contains(name)
}

#[test]
fn keeping_a_standpoint_inserts_one_line_and_refuses_when_the_file_changed() {
    let (_dir, explorer, scene, _) = start("keep");
    let before = std::fs::read(&scene).unwrap();
    let token = explorer.token().to_owned();
    let origin = own_origin(&explorer);
    let body = r#"{"name":"by the well","x":2.25,"y":-3.5,"eye":1.2,"heading":40}"#;
    let answer = post(&explorer, "/keep", Some(&token), Some(&origin), body);
    assert_eq!(answer.status, 200, "{}", answer.text());
    let after = std::fs::read(&scene).unwrap();
    assert!(one_insertion(&before, &after, "by the well"));
    let site = pansite::scene::load_scene(&scene).unwrap();
    let kept = site.standpoint("by the well").unwrap();
    assert_eq!((kept.x, kept.y, kept.eye_height), (2.25, -3.5, 1.2));
    // The same name again is refused; so is a file edited since it was read.
    let again = post(&explorer, "/keep", Some(&token), Some(&origin), body);
    assert_eq!(again.status, 400, "{}", again.text());
    let mut edited = after.clone();
    edited.extend_from_slice(b"\n// edited elsewhere\n");
    std::fs::write(&scene, &edited).unwrap();
    let other = r#"{"name":"elsewhere","x":0,"y":0}"#;
    let refused = post(&explorer, "/keep", Some(&token), Some(&origin), other);
    // Unless the watch has already read the edit again.
    if refused.status == 409 {
        assert!(
            refused.text().contains("changed on disk"),
            "{}",
            refused.text()
        );
        assert_eq!(std::fs::read(&scene).unwrap(), edited);
    }
    explorer.stop();
}

#[test]
fn a_scene_from_standard_input_cannot_keep_and_says_why() {
    let site =
        pansite::scene::parse_scene(demo().as_bytes(), Path::new("<stdin>"), "stdin").unwrap();
    let dir = Scratch::new("explorer-stdin");
    let source = Source::Fixed {
        site: Box::new(site),
        reason: "the scene was read from standard input".into(),
    };
    let explorer = Explorer::start(ExploreSettings::new(source, dir.path("out"))).unwrap();
    let scene: serde_json::Value = serde_json::from_slice(&get(&explorer, "/scene").body).unwrap();
    assert_eq!(scene["keep"], false);
    assert!(scene["no_keep_reason"]
        .as_str()
        .unwrap()
        .contains("standard input"));
    let token = explorer.token().to_owned();
    let answer = post(
        &explorer,
        "/keep",
        Some(&token),
        Some(&own_origin(&explorer)),
        r#"{"name":"a","x":0,"y":0}"#,
    );
    assert_eq!(answer.status, 409);
    assert!(answer.text().contains("standard input"));
    assert_eq!(files_in(&dir.0), Vec::<String>::new());
    explorer.stop();
}

#[test]
fn a_model_given_directly_keeps_standpoints_in_a_new_scene_beside_it() {
    let dir = Scratch::new("explorer-model");
    let model = dir.path("cube.obj");
    let fixture =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/obj/cube_triangles.obj");
    std::fs::copy(&fixture, &model).unwrap();
    let model_bytes = std::fs::read(&model).unwrap();
    let source = Source::Model {
        path: model.clone(),
        load: Arc::new(|path: &Path| {
            load_obj(path, &MeshPlacement::default()).map(|(site, _)| site)
        }),
        model_item: Some("Model(file: \"cube.obj\")".into()),
        location: None,
    };
    let explorer = Explorer::start(ExploreSettings::new(source, dir.path("out"))).unwrap();
    let token = explorer.token().to_owned();
    let origin = own_origin(&explorer);
    for (name, x) in [("first", 5.0), ("second", -5.0)] {
        let body = format!(r#"{{"name":"{name}","x":{x},"y":-4,"heading":10}}"#);
        let answer = post(&explorer, "/keep", Some(&token), Some(&origin), &body);
        assert_eq!(answer.status, 200, "{}", answer.text());
    }
    assert_eq!(std::fs::read(&model).unwrap(), model_bytes);
    let beside = dir.path("cube-standpoints.ron");
    let site = pansite::scene::load_scene(&beside).unwrap();
    let names: Vec<&str> = site.standpoints.iter().map(|s| s.name.as_str()).collect();
    assert_eq!(names, ["first", "second"]);
    assert!(!site.edges.is_empty(), "the new scene places the model");
    explorer.stop();
}

#[test]
fn an_open_data_file_given_directly_is_explored_and_kept_beside() {
    // `pansite explore` on a GeoJSON file (the command once refused it as "not a scene"):
    // it serves the file as `render` reads it, and a standpoint kept goes into a new scene
    // beside it that places the data around the same origin, in the time zone given, the
    // file itself untouched.
    let dir = Scratch::new("explorer-open-data");
    let data = dir.path("saltmarsh-row.geojson");
    std::fs::copy(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/opendata/saltmarsh-row.geojson"),
        &data,
    )
    .unwrap();
    let data_bytes = std::fs::read(&data).unwrap();
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_pansite"))
        .args(["explore", "--port", "0", "--time-zone", "Europe/London"])
        .arg(&data)
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    let mut first_line = String::new();
    std::io::BufRead::read_line(
        &mut std::io::BufReader::new(child.stdout.take().unwrap()),
        &mut first_line,
    )
    .unwrap();
    // "pansite: exploring PATH at http://127.0.0.1:PORT/?token=TOKEN"
    let url = first_line.trim().rsplit(' ').next().unwrap().to_owned();
    let (address, token) = url
        .strip_prefix("http://")
        .and_then(|rest| rest.split_once("/?token="))
        .unwrap_or_else(|| panic!("no address in {first_line:?}"));
    let body = r#"{"name":"quay","x":12,"y":-30,"heading":40}"#;
    let raw = format!(
        "POST /keep HTTP/1.1\r\nHost: {address}\r\nConnection: close\r\nContent-Type: application/json\r\nContent-Length: {}\r\nX-Pansite-Token: {token}\r\nOrigin: http://{address}\r\n\r\n{body}",
        body.len()
    );
    let answer = send_to(address.parse().unwrap(), raw.as_bytes());
    let underlay = send_to(
        address.parse().unwrap(),
        format!("GET {UNDERLAY} HTTP/1.1\r\nHost: {address}\r\nConnection: close\r\n\r\n")
            .as_bytes(),
    );
    child.kill().unwrap();
    child.wait().unwrap();
    assert_eq!(answer.status, 200, "{}", answer.text());
    assert_eq!(underlay.status, 200, "{}", underlay.text());
    assert!(underlay.body.starts_with(b"\x89PNG"));
    assert_eq!(std::fs::read(&data).unwrap(), data_bytes);
    let direct = pansite::scene::load_open_data(&data, None, Some("Europe/London")).unwrap();
    let kept = pansite::scene::load_scene(&dir.path("saltmarsh-row-standpoints.ron")).unwrap();
    assert_eq!(kept.standpoints.len(), 1);
    assert_eq!(kept.standpoints[0].name, "quay");
    // The same place and the same time zone (the one given on the command line).
    let location = direct.location.as_ref().unwrap();
    assert_eq!(location.time_zone.as_deref(), Some("Europe/London"));
    assert_eq!(kept.location, direct.location);
    assert_eq!(kept.edges.len(), direct.edges.len());
    assert_eq!(
        format!("{:?}", kept.edges.get(0).curve),
        format!("{:?}", direct.edges.get(0).curve)
    );
}

#[test]
fn print_writes_into_the_output_folder_only() {
    let (_dir, explorer, scene, out) = start("print");
    let token = explorer.token().to_owned();
    let origin = own_origin(&explorer);
    let body = r#"{"x":1.5,"y":-4,"heading":10,"paper":"A4","format":"pdf"}"#;
    let answer = post(&explorer, "/print", Some(&token), Some(&origin), body);
    assert_eq!(answer.status, 200, "{}", answer.text());
    assert_eq!(files_in(&out), ["square-view-1.pdf"]);
    let pdf = std::fs::read(out.join("square-view-1.pdf")).unwrap();
    assert!(pdf.starts_with(b"%PDF-"));
    assert_eq!(files_in(scene.parent().unwrap()), ["out", "square.ron"]);
    explorer.stop();
}

#[test]
fn print_carries_the_shade_switch() {
    // A yard of our own with a place and a sun whose `sun` block asks for no tone: a print
    // with the tone switched off is the print as the scene says, byte for byte; switched
    // on, the sheet is washed over the shade (many more pixels darker than the paper);
    // any other word is refused naming `tone`, and nothing is written for it.
    let dir = Scratch::new("explorer-print-tone");
    let scene = dir.write("yard.ron", common::TONE_YARD);
    let out = dir.path("out");
    let explorer =
        Explorer::start(ExploreSettings::new(Source::Scene(scene), out.clone())).unwrap();
    let token = explorer.token().to_owned();
    let origin = own_origin(&explorer);
    let mut printed = Vec::new();
    for (n, tone) in ["off", "scene", "on"].iter().enumerate() {
        let body =
            format!(r#"{{"x":0,"y":-12,"heading":0,"paper":"A4","format":"png","tone":"{tone}"}}"#);
        let answer = post(&explorer, "/print", Some(&token), Some(&origin), &body);
        assert_eq!(answer.status, 200, "tone {tone}: {}", answer.text());
        let file = out.join(format!("yard-view-{}.png", n + 1));
        assert!(answer.text().contains("yard-view-"), "{}", answer.text());
        printed.push(std::fs::read(&file).unwrap());
    }
    assert_eq!(
        printed[0], printed[1],
        "tone=off differs from the scene's own choice"
    );
    let inked = |bytes: &[u8]| {
        let (_, _, grey) = common::read_png_grey(bytes);
        grey.iter().filter(|&&g| g < 250).count()
    };
    let (bare, washed) = (inked(&printed[0]), inked(&printed[2]));
    assert!(
        washed > bare + 1000,
        "inked pixels: {bare} bare, {washed} with the tone"
    );
    let body = r#"{"x":0,"y":-12,"heading":0,"paper":"A4","format":"png","tone":"yes"}"#;
    let answer = post(&explorer, "/print", Some(&token), Some(&origin), body);
    assert_eq!(answer.status, 400);
    assert!(answer.text().contains("'tone'"), "{}", answer.text());
    assert_eq!(files_in(&out).len(), 3);
    explorer.stop();
}

#[test]
fn the_aids_reach_the_underlay_and_the_print() {
    // Each aid asked for changes the underlay; `grid=off` is the bare wireframe (fewer
    // inked pixels than the plain underlay); a division of an item the scene does not
    // label is refused naming `divide`, with the labels it does have. A print carries
    // the aids too.
    let (_dir, explorer, _, out) = start("aids");
    let base = "/underlay.png?x=1.5&y=-4&heading=10&w=512&h=256";
    let inked = |query: &str| {
        let answer = get(&explorer, &format!("{base}&{query}"));
        assert_eq!(answer.status, 200, "{query}: {}", answer.text());
        let (_, _, grey) = common::read_png_grey(&answer.body);
        grey
    };
    let plain = inked("grid=on");
    assert_eq!(plain, inked("t=1"), "the defaults are the plain underlay");
    for query in [
        "step=5",
        "labels=on",
        "names=on",
        "vanishing=on",
        "fan=30",
        "pole_x=5&pole_y=-3",
        "divide=clock+tower&parts=3",
    ] {
        let changed = plain
            .iter()
            .zip(inked(query))
            .filter(|(a, b)| **a != *b)
            .count();
        assert!(changed > 50, "{query} changed {changed} pixels");
    }
    let dark = |grey: &[u8]| grey.iter().filter(|&&g| g < 250).count();
    let bare = inked("grid=off&labels=on&fan=30");
    assert!(dark(&bare) * 2 < dark(&plain), "grid=off is not bare");
    let answer = get(&explorer, &format!("{base}&divide=no+such+thing"));
    assert_eq!(answer.status, 400);
    assert!(
        answer.text().contains("'divide'") && answer.text().contains("clock tower"),
        "{}",
        answer.text()
    );
    let token = explorer.token().to_owned();
    let origin = own_origin(&explorer);
    let mut printed = Vec::new();
    for aids in [r#""grid":"on""#, r#""grid":"off""#] {
        let body = format!(r#"{{"x":1.5,"y":-4,"paper":"A4","format":"png",{aids}}}"#);
        let answer = post(&explorer, "/print", Some(&token), Some(&origin), &body);
        assert_eq!(answer.status, 200, "{aids}: {}", answer.text());
        printed.push(
            std::fs::read(out.join(format!("square-view-{}.png", printed.len() + 1))).unwrap(),
        );
    }
    let (_, _, with_grid) = common::read_png_grey(&printed[0]);
    let (_, _, without) = common::read_png_grey(&printed[1]);
    assert!(
        dark(&without) < dark(&with_grid),
        "the print ignored grid=off"
    );
    let body = r#"{"x":1.5,"y":-4,"format":"png","divide":"nothing here"}"#;
    let answer = post(&explorer, "/print", Some(&token), Some(&origin), body);
    assert_eq!(answer.status, 400, "{}", answer.text());
    assert_eq!(files_in(&out).len(), 2);
    explorer.stop();
}

#[test]
fn a_newer_request_for_a_pane_replaces_a_waiting_one() {
    let (_dir, explorer, _, _) = start("replace");
    // Many requests for one pane at once: each is answered, by an image or as replaced.
    let explorer = Arc::new(explorer);
    let threads: Vec<_> = (0..12)
        .map(|k| {
            let explorer = explorer.clone();
            std::thread::spawn(move || {
                let path = format!(
                    "/underlay.png?x={}&y=-4&w=512&h=256&pane=same",
                    k as f64 * 0.1
                );
                get(&explorer, &path).status
            })
        })
        .collect();
    let statuses: Vec<u16> = threads.into_iter().map(|t| t.join().unwrap()).collect();
    assert!(
        statuses.iter().all(|s| *s == 200 || *s == 204),
        "{statuses:?}"
    );
    assert!(statuses.contains(&200));
    // Twelve asked within a few milliseconds, each render far longer than that (the test
    // profile is not optimised), and one waiting place for the pane: most are replaced.
    let replaced = statuses.iter().filter(|s| **s == 204).count();
    assert!(replaced >= 6, "{statuses:?}");
    Arc::try_unwrap(explorer).ok().unwrap().stop();
}

/// `pansite explore` run as a command, its output read line by line; killed (by its own
/// process id) when dropped, so that a failing check leaves nothing running.
struct Running {
    child: std::process::Child,
    stdout: std::io::Lines<std::io::BufReader<std::process::ChildStdout>>,
}

impl Running {
    fn start(args: &[&std::ffi::OsStr], path_first: Option<&Path>) -> Running {
        let mut command = std::process::Command::new(env!("CARGO_BIN_EXE_pansite"));
        command
            .arg("explore")
            .args(args)
            .stdin(std::process::Stdio::null())
            .stdout(std::process::Stdio::piped())
            .stderr(std::process::Stdio::piped());
        if let Some(dir) = path_first {
            let path = std::env::var_os("PATH").unwrap_or_default();
            let mut dirs = vec![dir.to_owned()];
            dirs.extend(std::env::split_paths(&path));
            command.env("PATH", std::env::join_paths(dirs).unwrap());
        }
        let mut child = command.spawn().unwrap();
        let stdout = std::io::BufRead::lines(std::io::BufReader::new(child.stdout.take().unwrap()));
        Running { child, stdout }
    }

    /// The next line it prints on standard output.
    fn line(&mut self) -> String {
        self.stdout
            .next()
            .expect("the command printed a line")
            .unwrap()
    }

    /// Stops it and returns what it wrote on standard error.
    fn stop(mut self) -> String {
        let _ = self.child.kill();
        let _ = self.child.wait();
        let mut text = String::new();
        if let Some(mut stderr) = self.child.stderr.take() {
            stderr.read_to_string(&mut text).unwrap();
        }
        text
    }
}

impl Drop for Running {
    fn drop(&mut self) {
        let _ = self.child.kill();
        let _ = self.child.wait();
    }
}

/// The port of an address printed as `http://127.0.0.1:PORT/?token=...`.
fn printed_port(line: &str) -> u16 {
    let (_, after) = line.split_once("http://127.0.0.1:").expect(line);
    after.split('/').next().unwrap().parse().expect(line)
}

#[test]
fn the_command_warns_when_it_listens_beyond_this_computer() {
    let dir = Scratch::new("explorer-listen");
    let scene = dir.write("square.ron", demo());
    let mut running = Running::start(
        &[
            scene.as_os_str(),
            "--listen".as_ref(),
            "0.0.0.0".as_ref(),
            "--port".as_ref(),
            "0".as_ref(),
        ],
        None,
    );
    let first = running.line();
    assert!(
        first.contains("at http://127.0.0.1:") && first.contains("/?token="),
        "{first}"
    );
    // Listening on every address: it serves this computer's loopback too.
    let port = printed_port(&first);
    let address = std::net::SocketAddr::from(([127, 0, 0, 1], port));
    let raw = format!("GET / HTTP/1.1\r\nHost: 127.0.0.1:{port}\r\nConnection: close\r\n\r\n");
    let answer = send_to(address, raw.as_bytes());
    assert_eq!(answer.status, 200);
    let stderr = running.stop();
    assert!(
        stderr.contains("warning: listening on 0.0.0.0")
            && stderr.contains("other computers that reach this address can use the page"),
        "{stderr}"
    );
}

#[test]
fn the_command_opens_the_printed_address_and_warns_of_nothing_on_loopback() {
    // The desktop's opener (`xdg-open`) replaced by a script that writes down what it was
    // asked to open.
    let dir = Scratch::new("explorer-open");
    let scene = dir.write("square.ron", demo());
    let bin = dir.path("bin");
    std::fs::create_dir_all(&bin).unwrap();
    let opened = dir.path("opened.txt");
    let opener = dir.write(
        "bin/xdg-open",
        format!("#!/bin/sh\nprintf '%s' \"$1\" > '{}'\n", opened.display()),
    );
    use std::os::unix::fs::PermissionsExt;
    std::fs::set_permissions(&opener, std::fs::Permissions::from_mode(0o755)).unwrap();
    let mut running = Running::start(&[scene.as_os_str(), "--open".as_ref()], Some(&bin));
    let first = running.line();
    let url = first.rsplit(' ').next().unwrap().to_owned();
    assert!(url.starts_with("http://127.0.0.1:"), "{first}");
    let started = std::time::Instant::now();
    while !opened.exists() && started.elapsed() < Duration::from_secs(20) {
        std::thread::sleep(Duration::from_millis(50));
    }
    std::thread::sleep(Duration::from_millis(100));
    let asked = std::fs::read_to_string(&opened).expect("the opener was called");
    assert_eq!(asked, url);
    let stderr = running.stop();
    assert!(!stderr.contains("warning"), "{stderr}");
}

#[test]
fn a_standpoint_moved_on_a_hill_stands_on_its_ground() {
    // On the hill town, a pane asked for without `ground` (as the page asks once the
    // standpoint is dragged) is drawn from the ground under (x, y), found here from the
    // ground's spot heights by the library's own reading of the scene: the same picture as
    // with that height given, another than with the eye 1.6 m over zero.
    let dir = Scratch::new("explorer-hill");
    let scene = dir.path("hill.ron");
    std::fs::copy(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/stannock-hill.ron"),
        &scene,
    )
    .unwrap();
    let site = pansite::scene::load_scene(&scene).unwrap();
    let (x, y) = (2.0, 60.0);
    let ground = pansite::scene::ground_height(&site, x, y);
    assert!(ground > 3.0, "the hill is {ground} m up at ({x}, {y})");
    let explorer = Explorer::start(ExploreSettings::new(
        Source::Scene(scene.clone()),
        dir.path("out"),
    ))
    .unwrap();
    let underlay = |extra: &str| {
        let answer = get(
            &explorer,
            &format!("/underlay.png?x={x}&y={y}&heading=0&w=512&h=256{extra}"),
        );
        assert_eq!(answer.status, 200, "{extra}: {}", answer.text());
        answer.body
    };
    let moved = underlay("");
    assert_eq!(moved, underlay(&format!("&ground={ground}")));
    assert_ne!(moved, underlay("&ground=0"));
    // Kept without a ground, it is written without one and stands on the slope when read
    // again; kept with its own (even 0, a cellar's floor), that is written and kept.
    let (token, origin) = (explorer.token().to_owned(), own_origin(&explorer));
    for (name, extra, expected) in [
        ("on the slope", "", ground),
        ("in the cellar", r#","ground":0"#, 0.0),
    ] {
        let body = format!(r#"{{"name":"{name}","x":{x},"y":{y}{extra}}}"#);
        let answer = post(&explorer, "/keep", Some(&token), Some(&origin), &body);
        assert_eq!(answer.status, 200, "{}", answer.text());
        let text = std::fs::read_to_string(&scene).unwrap();
        let line = text.lines().find(|l| l.contains(name)).unwrap();
        assert_eq!(line.contains("ground:"), !extra.is_empty(), "{line}");
        let site = pansite::scene::load_scene(&scene).unwrap();
        assert_eq!(site.standpoint(name).unwrap().ground, expected, "{name}");
    }
    explorer.stop();
}

#[test]
fn the_command_refuses_a_time_zone_for_a_scene_or_a_model() {
    // `--time-zone` names the clock of an open-data file given directly; a scene names its
    // own and a model has none, so `explore` refuses it as `render` does, before serving.
    let dir = Scratch::new("explorer-zone");
    dir.write("square.ron", demo());
    std::fs::copy(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/obj/cube_triangles.obj"),
        dir.path("cube.obj"),
    )
    .unwrap();
    for file in ["square.ron", "cube.obj"] {
        let mut child = dir
            .command()
            .args([
                "explore",
                file,
                "--port",
                "0",
                "--time-zone",
                "Europe/London",
            ])
            .stdout(std::process::Stdio::piped())
            .stderr(std::process::Stdio::piped())
            .spawn()
            .unwrap();
        let deadline = std::time::Instant::now() + std::time::Duration::from_secs(20);
        let status = loop {
            if let Some(status) = child.try_wait().unwrap() {
                break status;
            }
            if std::time::Instant::now() > deadline {
                child.kill().unwrap();
                child.wait().unwrap();
                panic!("{file}: explore served despite --time-zone");
            }
            std::thread::sleep(std::time::Duration::from_millis(20));
        };
        let out = child.wait_with_output().unwrap();
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(status.code(), Some(2), "{file}: {stderr}");
        assert!(
            stderr.contains("--time-zone is for an open-data file"),
            "{file}: {stderr}"
        );
    }
}
