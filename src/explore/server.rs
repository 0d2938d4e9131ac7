//! The HTTP side of the explorer, on `tiny_http` (small and synchronous: a few request
//! threads and two renderers suit a page for one person on one computer, and it needs no
//! async runtime).
//!
//! Routes (every other path is 404):
//! - `GET /`, `/explore.css`, `/explore.js`: the page, compiled in;
//! - `GET /scene`: the scene's name, standpoints, version, error, what can be kept, the
//!   labels a division may name and the scene's sun switches (JSON);
//! - `GET /plan.png?w&h`, `/underlay.png?...`, `/look.png?...`: images, drawn by the
//!   renderers (the underlay's aids and sun switches are `render`'s options of the same
//!   meaning, see `params::aids`); the plan's scale and origin come in `X-Plan-*` headers;
//! - `GET /probe?...&u&v&w&h`: the direction under a point of the underlay (JSON);
//! - `GET /events`: server-sent events, `scene` when the file was read again, `problem`
//!   when it could not be;
//! - `POST /keep`, `POST /print`: change something; token and Origin checked.

use super::describe;
use super::keep::{keep_in_scene, new_scene_for_model, standpoint_entry};
use super::params::{self, Params, MAX_PANE_HEIGHT, MAX_PANE_WIDTH};
use super::source::{fingerprint, reload, Loaded, Reload, Source};
use super::work::{Job, Pushed, Queue, RENDERERS};
use crate::aids::AidSettings;
use crate::budget::Budget;
use crate::compose::{plan_map, preview_with_hidden_lines, PlanSettings, PreviewSettings};
use crate::error::{Error, Result};
use crate::output::{rasterize, write_atomically, write_pdf, write_png, PngOptions};
use crate::page::{title_lines, today};
use crate::page::{PageSettings, Paper};
use crate::render::{draw_sheets, draw_with_hidden_lines, RenderSettings, SunChoice};
use crate::scene::{HiddenEdges, SiteCurve, Standpoint};
use crate::sphere::azimuth_elevation;
use crate::visibility::ray_hits_triangle;
use nalgebra::Vector3;
use std::io::{Read, Write};
use std::net::{IpAddr, Ipv4Addr, SocketAddr};
use std::path::PathBuf;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::mpsc::{sync_channel, RecvTimeoutError, SyncSender};
use std::sync::{Arc, Mutex, RwLock};
use std::thread::JoinHandle;
use std::time::{Duration, Instant};
use tiny_http::{Header, Method, Request, Response, Server, StatusCode};

/// The longest request line accepted, bytes.
pub const MAX_URL_BYTES: usize = 4096;
/// The largest request body accepted (keep and print send a few numbers), bytes.
pub const MAX_BODY_BYTES: usize = 16 * 1024;
/// Threads answering requests (renders are handed to the renderers).
const REQUEST_THREADS: usize = 4;
/// The most event streams open at once.
const MAX_EVENT_STREAMS: usize = 16;
/// How long a pane's render may take.
pub const PANE_TIME_LIMIT: Duration = Duration::from_secs(10);
/// How long a print may take.
pub const PRINT_TIME_LIMIT: Duration = Duration::from_secs(60);

const INDEX_HTML: &str = include_str!("assets/index.html");
const EXPLORE_CSS: &str = include_str!("assets/explore.css");
const EXPLORE_JS: &str = include_str!("assets/explore.js");

/// How to start the explorer.
#[derive(Clone)]
pub struct ExploreSettings {
    /// Where the site comes from and where kept standpoints go.
    pub source: Source,
    /// The address to listen on: 127.0.0.1 unless the user asks otherwise.
    pub listen: IpAddr,
    /// 0 for any free port.
    pub port: u16,
    /// Where "print" writes (and nowhere else).
    pub output_dir: PathBuf,
    /// How often the scene file is looked at.
    pub poll: Duration,
}

impl ExploreSettings {
    /// Loopback, any free port, the scene looked at five times a second.
    pub fn new(source: Source, output_dir: PathBuf) -> ExploreSettings {
        ExploreSettings {
            source,
            listen: IpAddr::V4(Ipv4Addr::LOCALHOST),
            port: 0,
            output_dir,
            poll: Duration::from_millis(200),
        }
    }
}

/// What a renderer is asked to do.
enum Task {
    Underlay {
        standpoint: Standpoint,
        size: (u32, u32),
        hidden: Option<HiddenEdges>,
        /// The drawing aids; `None` for the bare wireframe.
        aids: Option<AidSettings>,
        /// The shade tone, the sun's path and the seasons, where the page overrides the
        /// scene's `sun` block.
        sun: SunChoice,
    },
    Look {
        standpoint: Standpoint,
        size: (u32, u32),
        fov_deg: f64,
        hidden: Option<HiddenEdges>,
    },
    Plan {
        size: (u32, u32),
    },
    Print {
        standpoint: Standpoint,
        paper: Paper,
        pdf: bool,
        hidden: Option<HiddenEdges>,
        /// The aids and the sun, as for the underlay.
        aids: Option<AidSettings>,
        sun: SunChoice,
    },
}

/// Everything the threads share.
struct Shared {
    source: Source,
    current: RwLock<Arc<Loaded>>,
    /// The last reading that failed, shown until one succeeds.
    problem: Mutex<Option<String>>,
    next_version: AtomicUsize,
    token: String,
    hosts: Vec<String>,
    origins: Vec<String>,
    output_dir: PathBuf,
    queue: Queue<Task, Request>,
    streams: Mutex<Vec<SyncSender<String>>>,
    open_streams: AtomicUsize,
    stopping: AtomicBool,
    /// Keeping and reloading one at a time, so the check for changes on disk holds.
    file_lock: Mutex<()>,
    /// The bytes of the scene beside a model as last read or written (None: no file).
    beside_bytes: Mutex<Option<Vec<u8>>>,
    /// Renders in progress and the most ever at once: counted for the unit tests only.
    #[cfg(test)]
    rendering: (AtomicUsize, AtomicUsize),
}

/// A running explorer.
pub struct Explorer {
    address: SocketAddr,
    shared: Arc<Shared>,
    server: Arc<Server>,
    threads: Vec<JoinHandle<()>>,
}

impl Explorer {
    /// Reads the site, listens and starts the threads.
    pub fn start(settings: ExploreSettings) -> Result<Explorer> {
        let (site, bytes) = settings.source.load()?;
        let server = Server::http(SocketAddr::new(settings.listen, settings.port))
            .map_err(|e| Error::Setting(format!("cannot listen on {}: {e}", settings.listen)))?;
        let address = server
            .server_addr()
            .to_ip()
            .ok_or_else(|| Error::Setting("the server has no IP address".into()))?;
        let port = address.port();
        let own = match address.ip() {
            IpAddr::V6(ip) => format!("[{ip}]:{port}"),
            IpAddr::V4(ip) => format!("{ip}:{port}"),
        };
        let mut hosts = vec![
            format!("127.0.0.1:{port}"),
            format!("localhost:{port}"),
            format!("[::1]:{port}"),
            own,
        ];
        hosts.dedup();
        let origins = hosts.iter().map(|h| format!("http://{h}")).collect();
        let beside_bytes = settings
            .source
            .beside_scene()
            .and_then(|p| std::fs::read(p).ok());
        let shared = Arc::new(Shared {
            current: RwLock::new(Arc::new(Loaded::new(site, bytes, 1))),
            source: settings.source,
            problem: Mutex::new(None),
            next_version: AtomicUsize::new(2),
            token: new_token(),
            hosts,
            origins,
            output_dir: settings.output_dir,
            queue: Queue::default(),
            streams: Mutex::new(Vec::new()),
            open_streams: AtomicUsize::new(0),
            stopping: AtomicBool::new(false),
            file_lock: Mutex::new(()),
            beside_bytes: Mutex::new(beside_bytes),
            #[cfg(test)]
            rendering: (AtomicUsize::new(0), AtomicUsize::new(0)),
        });
        let server = Arc::new(server);
        let mut threads = Vec::new();
        for _ in 0..REQUEST_THREADS {
            let (server, shared) = (server.clone(), shared.clone());
            threads.push(std::thread::spawn(move || {
                while let Ok(request) = server.recv() {
                    if shared.stopping.load(Ordering::SeqCst) {
                        let _ = request.respond(text(503, "the explorer is stopping"));
                        continue;
                    }
                    handle(&shared, request);
                }
            }));
        }
        for _ in 0..RENDERERS {
            let shared = shared.clone();
            threads.push(std::thread::spawn(move || {
                while let Some(job) = shared.queue.take() {
                    render(&shared, job);
                }
            }));
        }
        if shared.source.watched().is_some() {
            let shared = shared.clone();
            let poll = settings.poll;
            threads.push(std::thread::spawn(move || watch(&shared, poll)));
        }
        Ok(Explorer {
            address,
            shared,
            server,
            threads,
        })
    }

    /// The address and port listened on.
    pub fn address(&self) -> SocketAddr {
        self.address
    }

    /// The token that state-changing requests carry.
    pub fn token(&self) -> &str {
        &self.shared.token
    }

    /// The address to open, token included.
    pub fn url(&self) -> String {
        let host = match self.address.ip() {
            IpAddr::V4(ip) if ip.is_unspecified() => "127.0.0.1".to_owned(),
            IpAddr::V6(ip) if ip.is_unspecified() => "[::1]".to_owned(),
            IpAddr::V6(ip) => format!("[{ip}]"),
            IpAddr::V4(ip) => ip.to_string(),
        };
        format!(
            "http://{host}:{}/?token={}",
            self.address.port(),
            self.shared.token
        )
    }

    /// Serves until the process ends.
    pub fn wait(self) {
        for thread in self.threads {
            let _ = thread.join();
        }
    }

    /// Stops serving and waits for the threads.
    pub fn stop(self) {
        self.shared.stopping.store(true, Ordering::SeqCst);
        for job in self.shared.queue.close() {
            let _ = job.reply.respond(text(503, "the explorer is stopping"));
        }
        self.shared
            .streams
            .lock()
            .unwrap_or_else(|p| p.into_inner())
            .clear();
        for _ in 0..REQUEST_THREADS {
            self.server.unblock();
        }
        for thread in self.threads {
            let _ = thread.join();
        }
    }
}

/// 128 bits from the standard library's randomly keyed hashers (seeded by the operating
/// system for each process), as 32 hex digits: enough that a page elsewhere cannot guess it.
fn new_token() -> String {
    use std::collections::hash_map::RandomState;
    use std::hash::{BuildHasher, Hasher};
    let word = |salt: u64| {
        let mut hasher = RandomState::new().build_hasher();
        hasher.write_u64(salt);
        hasher.write_u128(
            std::time::SystemTime::now()
                .duration_since(std::time::UNIX_EPOCH)
                .map_or(0, |d| d.as_nanos()),
        );
        hasher.finish()
    };
    format!("{:016x}{:016x}", word(1), word(std::process::id() as u64))
}

/// Equal strings, compared in time that does not depend on where they differ.
fn same_secret(a: &str, b: &str) -> bool {
    a.len() == b.len() && a.bytes().zip(b.bytes()).fold(0u8, |d, (x, y)| d | (x ^ y)) == 0
}

fn header(name: &str, value: &str) -> Header {
    Header::from_bytes(name.as_bytes(), value.as_bytes()).expect("ASCII header")
}

/// Headers every answer carries: nothing from elsewhere may load, nothing is cached.
/// Answers of known length are sent whole, with a Content-Length, never in chunks.
fn common_headers<R: Read>(response: Response<R>) -> Response<R> {
    response
        .with_chunked_threshold(usize::MAX)
        .with_header(header(
            "Content-Security-Policy",
            "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self' blob:; connect-src 'self'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'",
        ))
        .with_header(header("X-Content-Type-Options", "nosniff"))
        .with_header(header("Referrer-Policy", "no-referrer"))
        .with_header(header("Cache-Control", "no-store"))
}

fn text(status: u16, message: &str) -> Response<std::io::Cursor<Vec<u8>>> {
    common_headers(
        Response::from_string(message)
            .with_status_code(StatusCode(status))
            .with_header(header("Content-Type", "text/plain; charset=utf-8")),
    )
}

fn json(status: u16, value: &serde_json::Value) -> Response<std::io::Cursor<Vec<u8>>> {
    common_headers(
        Response::from_string(value.to_string())
            .with_status_code(StatusCode(status))
            .with_header(header("Content-Type", "application/json")),
    )
}

fn asset(body: &'static str, kind: &str) -> Response<std::io::Cursor<Vec<u8>>> {
    common_headers(Response::from_string(body).with_header(header("Content-Type", kind)))
}

fn header_value<'a>(request: &'a Request, name: &'static str) -> Option<&'a str> {
    request
        .headers()
        .iter()
        .find(|h| h.field.equiv(name))
        .map(|h| h.value.as_str())
}

/// The door checks and the routes.
fn handle(shared: &Arc<Shared>, mut request: Request) {
    if request.url().len() > MAX_URL_BYTES {
        let _ = request.respond(text(414, "the request's address is too long"));
        return;
    }
    let host_ok = header_value(&request, "Host")
        .is_some_and(|host| shared.hosts.iter().any(|h| h.eq_ignore_ascii_case(host)));
    if !host_ok {
        let _ = request.respond(text(
            403,
            "this server answers only to its own address (the Host header names another)",
        ));
        return;
    }
    let url = request.url().to_owned();
    let path = url.split('?').next().unwrap_or("");
    let method = request.method().clone();
    let posting = matches!(path, "/keep" | "/print");
    let wanted = if posting { Method::Post } else { Method::Get };
    let known = matches!(
        path,
        "/" | "/explore.css"
            | "/explore.js"
            | "/scene"
            | "/events"
            | "/plan.png"
            | "/underlay.png"
            | "/look.png"
            | "/probe"
            | "/keep"
            | "/print"
    );
    if !known {
        let _ = request.respond(text(404, "no such page"));
        return;
    }
    if method != wanted {
        let _ = request.respond(
            text(405, &format!("{path} answers {wanted} only"))
                .with_header(header("Allow", wanted.as_str())),
        );
        return;
    }
    if posting {
        if let Err((status, message)) = check_sender(shared, &request) {
            let _ = request.respond(text(status, &message));
            return;
        }
    }
    let query = match params::query(&url) {
        Ok(query) => query,
        Err(message) => {
            let _ = request.respond(text(400, &message));
            return;
        }
    };
    let mut p = Params::new(query);
    match path {
        "/" => respond(request, asset(INDEX_HTML, "text/html; charset=utf-8")),
        "/explore.css" => respond(request, asset(EXPLORE_CSS, "text/css; charset=utf-8")),
        "/explore.js" => respond(request, asset(EXPLORE_JS, "text/javascript; charset=utf-8")),
        "/scene" => respond(request, json(200, &scene_json(shared))),
        "/events" => open_stream(shared, request),
        "/probe" => {
            let answer = probe(shared, &mut p).and_then(|v| p.finish().map(|_| v));
            match answer {
                Ok(value) => respond(request, json(200, &value)),
                Err(message) => respond(request, text(400, &message)),
            }
        }
        "/keep" | "/print" => {
            let body = match read_body(&mut request) {
                Ok(body) => body,
                Err((status, message)) => return respond(request, text(status, &message)),
            };
            let p = match body_params(&body) {
                Ok(p) => p,
                Err(message) => return respond(request, text(400, &message)),
            };
            if path == "/keep" {
                let (status, value) = keep(shared, p);
                respond(request, json(status, &value));
            } else {
                match print_task(shared, p) {
                    Ok(task) => enqueue(shared, format!("print-{}", next_print()), task, request),
                    Err(message) => respond(request, text(400, &message)),
                }
            }
        }
        _ => {
            let task = image_task(shared, path, &mut p);
            let key = p.key("pane");
            match (task, key, p.finish()) {
                (Ok(task), Ok(key), Ok(())) => {
                    enqueue(shared, format!("{path}:{key}"), task, request)
                }
                (Err(m), _, _) | (_, Err(m), _) | (_, _, Err(m)) => respond(request, text(400, &m)),
            }
        }
    }
}

/// Prints are never replaced by one another: each has its own key.
fn next_print() -> usize {
    static PRINTS: AtomicUsize = AtomicUsize::new(0);
    PRINTS.fetch_add(1, Ordering::Relaxed)
}

fn respond<R: Read>(request: Request, response: Response<R>) {
    // A page that went away before its answer is not an error of ours.
    let _ = request.respond(response);
}

/// A state-changing request must carry this run's token and come from this server's page.
fn check_sender(shared: &Shared, request: &Request) -> std::result::Result<(), (u16, String)> {
    let token_ok = header_value(request, "X-Pansite-Token")
        .is_some_and(|token| same_secret(token, &shared.token));
    if !token_ok {
        return Err((
            403,
            "this request needs the token of this run (open the address pansite printed)".into(),
        ));
    }
    let origin_ok = header_value(request, "Origin").is_some_and(|origin| {
        shared
            .origins
            .iter()
            .any(|o| o.eq_ignore_ascii_case(origin))
    });
    if !origin_ok {
        return Err((403, "this request comes from another site's page".into()));
    }
    match request.body_length() {
        Some(n) if n > MAX_BODY_BYTES => Err((
            413,
            format!("the request's body is larger than {MAX_BODY_BYTES} bytes"),
        )),
        _ => Ok(()),
    }
}

fn read_body(request: &mut Request) -> std::result::Result<Vec<u8>, (u16, String)> {
    let mut body = Vec::new();
    request
        .as_reader()
        .take(MAX_BODY_BYTES as u64 + 1)
        .read_to_end(&mut body)
        .map_err(|_| (400, "the request's body could not be read".to_owned()))?;
    if body.len() > MAX_BODY_BYTES {
        return Err((
            413,
            format!("the request's body is larger than {MAX_BODY_BYTES} bytes"),
        ));
    }
    Ok(body)
}

/// A JSON object of numbers and short strings as parameters.
fn body_params(body: &[u8]) -> std::result::Result<(Params, Option<String>), String> {
    let value: serde_json::Value = serde_json::from_slice(body)
        .map_err(|e| format!("expected a JSON object of parameters: {e}"))?;
    let object = value
        .as_object()
        .ok_or("expected a JSON object of parameters")?;
    let mut values = std::collections::HashMap::new();
    let mut name = None;
    for (key, value) in object {
        let text = match value {
            serde_json::Value::Number(n) => n.to_string(),
            serde_json::Value::String(s) if key == "name" => {
                name = Some(s.clone());
                continue;
            }
            serde_json::Value::String(s) => s.clone(),
            _ => return Err(format!("parameter '{key}': expected a number or a word")),
        };
        values.insert(key.clone(), text);
    }
    Ok((Params::new(values), name))
}

/// The height of the loaded scene's ground at a plan point (0 off it or without one): where
/// a standpoint given without its own `ground` stands.
fn ground_under(shared: &Shared) -> impl Fn(f64, f64) -> f64 {
    let loaded = current(shared);
    move |x, y| crate::scene::ground_height(&loaded.site, x, y)
}

fn image_task(shared: &Shared, path: &str, p: &mut Params) -> std::result::Result<Task, String> {
    Ok(match path {
        "/plan.png" => Task::Plan {
            size: params::size(p, (2048, 2048))?,
        },
        "/underlay.png" => {
            let standpoint = params::standpoint(p, &ground_under(shared))?;
            let size = params::size(p, (MAX_PANE_WIDTH, MAX_PANE_HEIGHT))?;
            if size.0 != 2 * size.1 {
                return Err(format!(
                    "an underlay is twice as wide as it is high; asked for {}x{}",
                    size.0, size.1
                ));
            }
            Task::Underlay {
                standpoint,
                size,
                hidden: params::hidden(p)?,
                aids: params::aids(p)?,
                sun: params::sun(p)?,
            }
        }
        _ => Task::Look {
            standpoint: params::standpoint(p, &ground_under(shared))?,
            size: params::size(p, (2048, 2048))?,
            fov_deg: p.number("fov", (10.0, 150.0), Some(90.0))?,
            hidden: params::hidden(p)?,
        },
    })
}

fn print_task(
    shared: &Shared,
    (mut p, _): (Params, Option<String>),
) -> std::result::Result<Task, String> {
    let standpoint = params::standpoint(&mut p, &ground_under(shared))?;
    let hidden = params::hidden(&mut p)?;
    let paper = p.word(
        "paper",
        &["A4", "A3", "A2", "A1", "Letter", "Tabloid"],
        "A3",
    )?;
    let pdf = p.word("format", &["pdf", "png"], "pdf")? == "pdf";
    let aids = params::aids(&mut p)?;
    let sun = params::sun(&mut p)?;
    p.finish()?;
    let paper = Paper::named(paper)
        .ok_or(format!("paper {paper} is not known"))?
        .landscape();
    Ok(Task::Print {
        standpoint,
        paper,
        pdf,
        hidden,
        aids,
        sun,
    })
}

fn enqueue(shared: &Shared, key: String, task: Task, request: Request) {
    let job = Job {
        task,
        reply: request,
        received: Instant::now(),
    };
    match shared.queue.push(key, job) {
        Pushed::Waiting(None) => {}
        Pushed::Waiting(Some(old)) => respond(
            old.reply,
            common_headers(Response::empty(204).with_header(header("X-Pansite-Replaced", "1"))),
        ),
        Pushed::Full(job) => respond(job.reply, text(503, "too many drawings waiting; try again")),
    }
}

fn current(shared: &Shared) -> Arc<Loaded> {
    shared
        .current
        .read()
        .unwrap_or_else(|p| p.into_inner())
        .clone()
}

/// Runs one job on a renderer thread and answers it; a panic in the pipeline becomes a 500
/// and the renderer carries on.
fn render(shared: &Shared, job: Job<Task, Request>) {
    let loaded = current(shared);
    #[cfg(test)]
    {
        let now = shared.rendering.0.fetch_add(1, Ordering::SeqCst) + 1;
        shared.rendering.1.fetch_max(now, Ordering::SeqCst);
    }
    let started = Instant::now();
    let outcome = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
        draw_task(shared, &loaded, &job.task)
    }));
    #[cfg(test)]
    shared.rendering.0.fetch_sub(1, Ordering::SeqCst);
    let elapsed = started.elapsed().as_secs_f64() * 1000.0;
    let waited = (started - job.received).as_secs_f64() * 1000.0;
    let response = match outcome {
        Ok(Ok(Drawn::Png(bytes, extra))) => {
            let mut response = common_headers(
                Response::from_data(bytes)
                    .with_header(header("Content-Type", "image/png"))
                    .with_header(header("X-Render-Ms", &format!("{elapsed:.1}")))
                    .with_header(header("X-Wait-Ms", &format!("{waited:.1}")))
                    .with_header(header("X-Scene-Version", &loaded.version.to_string())),
            );
            for (name, value) in extra {
                response = response.with_header(header(name, &value));
            }
            response
        }
        Ok(Ok(Drawn::Json(value))) => json(200, &value),
        Ok(Err(error)) => {
            let status = if error.is_bad_input() { 400 } else { 500 };
            text(status, &describe(&error))
        }
        Err(_) => text(
            500,
            "the drawing failed unexpectedly; the explorer carries on",
        ),
    };
    respond(job.reply, response);
}

enum Drawn {
    Png(Vec<u8>, Vec<(&'static str, String)>),
    Json(serde_json::Value),
}

fn draw_task(shared: &Shared, loaded: &Loaded, task: &Task) -> Result<Drawn> {
    let site = &loaded.site;
    match task {
        Task::Underlay {
            standpoint,
            size,
            hidden,
            aids,
            sun,
        } => {
            let settings = RenderSettings {
                width: size.0,
                height: size.1,
                hidden: *hidden,
                overlays: aids.is_some(),
                aids: checked_aids(site, aids)?,
                sun: sun.clone(),
                time_limit: Some(PANE_TIME_LIMIT),
                ..RenderSettings::default()
            };
            let budget = Budget::new(settings.time_limit);
            let hidden_lines = loaded.hidden_lines(*hidden);
            let render =
                draw_with_hidden_lines(site, hidden_lines, standpoint, &settings, &budget)?;
            let mut bytes = Vec::new();
            crate::output::rasterize_grey_png_within(&render.drawing, &mut bytes, &budget)?;
            Ok(Drawn::Png(bytes, Vec::new()))
        }
        Task::Look {
            standpoint,
            size,
            fov_deg,
            hidden,
        } => {
            let settings = PreviewSettings {
                width: size.0,
                height: size.1,
                fov_deg: *fov_deg,
                line_weight_px: 1.2,
                tolerance_px: 0.25,
                hidden: *hidden,
            };
            let hidden_lines = loaded.hidden_lines(*hidden);
            let drawing = preview_with_hidden_lines(site, hidden_lines, standpoint, &settings)?;
            let mut bytes = Vec::new();
            crate::output::encode_grey_png(&rasterize(&drawing), &mut bytes)?;
            Ok(Drawn::Png(bytes, Vec::new()))
        }
        Task::Plan { size } => {
            let settings = PlanSettings {
                width: size.0,
                height: size.1,
                // A screen, not paper: as large as fits.
                scale: crate::compose::PlanScale::Fill,
                ..PlanSettings::default()
            };
            let plan = plan_map(site, &site.standpoints, &settings)?;
            let mut bytes = Vec::new();
            crate::output::encode_grey_png(&rasterize(&plan.drawing), &mut bytes)?;
            Ok(Drawn::Png(
                bytes,
                vec![
                    ("X-Plan-Px-Per-Metre", format!("{}", plan.px_per_metre)),
                    ("X-Plan-Origin-X", format!("{}", plan.origin.0)),
                    ("X-Plan-Origin-Y", format!("{}", plan.origin.1)),
                ],
            ))
        }
        Task::Print {
            standpoint,
            paper,
            pdf,
            hidden,
            aids,
            sun,
        } => {
            let settings = RenderSettings {
                hidden: *hidden,
                overlays: aids.is_some(),
                aids: checked_aids(site, aids)?,
                sun: sun.clone(),
                time_limit: Some(PRINT_TIME_LIMIT),
                ..RenderSettings::default()
            };
            print(shared, loaded, standpoint, paper, *pdf, &settings).map(Drawn::Json)
        }
    }
}

/// The page's aids (the defaults when the underlay is bare, since none is drawn then),
/// with a division's label checked against the site as `render` checks it.
fn checked_aids(site: &crate::scene::Site, aids: &Option<AidSettings>) -> Result<AidSettings> {
    let Some(aids) = aids else {
        return Ok(AidSettings::default());
    };
    crate::aids::check_divisions(site, &aids.guides.divisions).map_err(|error| {
        let message = describe(&error);
        let reason = message.strip_prefix("--divide-edges: ").unwrap_or(&message);
        Error::Setting(format!("parameter 'divide': {reason}"))
    })?;
    Ok(aids.clone())
}

/// Writes the view on paper into the output folder, under a name made here (the scene's
/// stem and a number), never one from the request.
fn print(
    shared: &Shared,
    loaded: &Loaded,
    standpoint: &Standpoint,
    paper: &Paper,
    pdf: bool,
    settings: &RenderSettings,
) -> Result<serde_json::Value> {
    let site = &loaded.site;
    let dpi = if pdf { 300.0 } else { 150.0 };
    let page = PageSettings {
        paper: *paper,
        margin_mm: 10.0,
        dpi,
        band_deg: (-90.0, 90.0),
        title: Some(title_lines(site, standpoint, today())),
        tiles: None,
    };
    let (sheets, _) = draw_sheets(site, standpoint, settings, Some(&page), dpi)?;
    std::fs::create_dir_all(&shared.output_dir).map_err(|source| Error::Write {
        path: shared.output_dir.clone(),
        source,
    })?;
    let extension = if pdf { "pdf" } else { "png" };
    let stem = shared.source.stem();
    let path = (1..10_000)
        .map(|n| {
            shared
                .output_dir
                .join(format!("{stem}-view-{n}.{extension}"))
        })
        .find(|p| !p.exists())
        .ok_or_else(|| Error::Setting("the output folder holds 9999 views already".into()))?;
    write_atomically(&path, |out| {
        if pdf {
            write_pdf(&sheets, out)
        } else {
            let options = PngOptions {
                colour: false,
                dpi: Some(dpi),
                panorama: None,
            };
            write_png(&sheets[0].drawing, &options, out)
        }
    })?;
    Ok(serde_json::json!({ "file": path.display().to_string() }))
}

/// The scene as the page needs it.
fn scene_json(shared: &Shared) -> serde_json::Value {
    let loaded = current(shared);
    let site = &loaded.site;
    let standpoints: Vec<serde_json::Value> = site
        .standpoints
        .iter()
        .map(|s| {
            serde_json::json!({
                "name": s.name,
                "x": s.x,
                "y": s.y,
                "ground": s.ground,
                "own_ground": s.own_ground,
                "eye": s.eye_height,
                "heading": s.heading.to_degrees(),
                "pitch": s.pitch.to_degrees(),
            })
        })
        .collect();
    let problem = shared
        .problem
        .lock()
        .unwrap_or_else(|p| p.into_inner())
        .clone();
    // The labels a division may name, as `render` checks them.
    let labels = crate::aids::dividable_labels(site);
    let sun = site
        .sun
        .as_ref()
        .map(|s| serde_json::json!({ "path": s.path, "seasons": s.seasons }));
    serde_json::json!({
        "name": site.name,
        "version": loaded.version,
        "labels": labels,
        "sun": sun,
        "standpoints": standpoints,
        "default": site.default_standpoint,
        "problem": problem,
        "keep": shared.source.no_keep_reason().is_none(),
        "no_keep_reason": shared.source.no_keep_reason(),
        "watched": shared.source.watched().is_some(),
        "standing_eye": crate::scene::DEFAULT_EYE_HEIGHT,
        "seated_eye": crate::scene::SEATED_EYE_HEIGHT,
    })
}

/// The direction under a point of the underlay: its azimuth and elevation, the distance to
/// the first face along it, and the nearest corner of any item.
fn probe(shared: &Shared, p: &mut Params) -> std::result::Result<serde_json::Value, String> {
    let standpoint = params::standpoint(p, &ground_under(shared))?;
    let (w, h) = params::size(p, (MAX_PANE_WIDTH, MAX_PANE_HEIGHT))?;
    let u = p.number("u", (0.0, w as f64), None)?;
    let v = p.number("v", (0.0, h as f64), None)?;
    // The image's linear angles (see the crate's conventions), in the view frame.
    let relative = (u / w as f64 * 360.0 - 180.0).to_radians();
    let up = (90.0 - v / h as f64 * 180.0).to_radians();
    let in_view = Vector3::new(
        up.cos() * relative.sin(),
        up.cos() * relative.cos(),
        up.sin(),
    );
    let view = crate::sphere::ViewFrame::new(&standpoint);
    let direction = view.direction_to_site(&in_view).normalize();
    let (azimuth, elevation) = azimuth_elevation(&direction);
    let loaded = current(shared);
    let site = &loaded.site;
    let eye = standpoint.eye();
    let distance = site
        .faces
        .iter()
        .filter_map(|f| ray_hits_triangle(&eye, &direction, &f.corners))
        .fold(None, |best: Option<f64>, d| {
            Some(best.map_or(d, |b| b.min(d)))
        });
    let mut nearest: Option<(f64, nalgebra::Point3<f64>, crate::scene::ItemId)> = None;
    for edge in &site.edges {
        let ends = match edge.curve {
            SiteCurve::Segment { start, end } => [start, end],
            _ => continue,
        };
        for corner in ends {
            let towards = corner - eye;
            if towards.norm() == 0.0 {
                continue;
            }
            let angle = crate::sphere::angle_between(&towards.normalize(), &direction);
            if nearest.is_none_or(|(best, _, _)| angle < best) {
                nearest = Some((angle, corner, edge.item));
            }
        }
    }
    let corner = nearest.map(|(angle, at, item)| {
        serde_json::json!({
            "item": site.describe_item(item),
            "x": at.x, "y": at.y, "z": at.z,
            "off_deg": angle.to_degrees(),
            "distance": (at - eye).norm(),
        })
    });
    Ok(serde_json::json!({
        "azimuth": azimuth.to_degrees().rem_euclid(360.0),
        "elevation": elevation.to_degrees(),
        "distance": distance,
        "corner": corner,
    }))
}

/// "Keep this standpoint": into the scene file, or a scene beside a model.
fn keep(shared: &Shared, (mut p, name): (Params, Option<String>)) -> (u16, serde_json::Value) {
    let refuse = |status: u16, message: String| (status, serde_json::json!({ "error": message }));
    if let Some(reason) = shared.source.no_keep_reason() {
        return refuse(409, format!("keeping standpoints is off: {reason}"));
    }
    let standpoint = match params::standpoint(&mut p, &ground_under(shared))
        .and_then(|s| p.finish().map(|_| s))
    {
        Ok(s) => s,
        Err(message) => return refuse(400, message),
    };
    let standpoint = Standpoint {
        name: name.unwrap_or_default(),
        ..standpoint
    };
    let _guard = shared.file_lock.lock().unwrap_or_else(|p| p.into_inner());
    let loaded = current(shared);
    let written = match &shared.source {
        Source::Scene(path) => {
            let on_disk = std::fs::read(path).ok();
            if on_disk.is_none() || on_disk != loaded.bytes {
                return refuse(
                    409,
                    format!(
                        "{} changed on disk since it was read; nothing was written (the page reloads it when it reads cleanly)",
                        path.display()
                    ),
                );
            }
            let text = match std::str::from_utf8(loaded.bytes.as_deref().unwrap_or_default()) {
                Ok(text) => text,
                Err(_) => return refuse(400, "the scene file is not UTF-8 text".into()),
            };
            keep_in_scene(text, path, &standpoint).map(|new| (path.clone(), new))
        }
        Source::Model {
            path,
            model_item,
            location,
            ..
        } => {
            let Some(beside) = shared.source.beside_scene() else {
                return refuse(409, "the model has no file name".into());
            };
            let mut known = shared
                .beside_bytes
                .lock()
                .unwrap_or_else(|p| p.into_inner());
            let on_disk = std::fs::read(&beside).ok();
            if on_disk != *known {
                return refuse(
                    409,
                    format!(
                        "{} changed on disk since it was read; nothing was written",
                        beside.display()
                    ),
                );
            }
            let result = match &on_disk {
                Some(bytes) => match std::str::from_utf8(bytes) {
                    Ok(text) => keep_in_scene(text, &beside, &standpoint),
                    Err(_) => return refuse(400, format!("{} is not UTF-8", beside.display())),
                },
                None => standpoint_entry(&standpoint, 1.0).map(|entry| {
                    let name = path
                        .file_name()
                        .map_or(String::new(), |n| n.to_string_lossy().into_owned());
                    new_scene_for_model(
                        &name,
                        model_item.as_deref().unwrap_or_default(),
                        location.as_ref(),
                        &entry,
                    )
                }),
            };
            if let Ok(new) = &result {
                *known = Some(new.as_bytes().to_vec());
            }
            result.map(|new| (beside, new))
        }
        Source::Fixed { .. } => unreachable!("refused above"),
    };
    let (path, new) = match written {
        Ok(written) => written,
        Err(error) => {
            let status = if error.is_bad_input() { 400 } else { 500 };
            return refuse(status, describe(&error));
        }
    };
    if let Err(error) = write_atomically(&path, |out| {
        out.write_all(new.as_bytes())
            .map_err(|source| Error::Write {
                path: path.clone(),
                source,
            })
    }) {
        return refuse(500, describe(&error));
    }
    // The page sees the kept standpoint at once; for a scene file the file is read again
    // as the watch would.
    let mut site = loaded.site.clone();
    site.standpoints.push(standpoint.clone());
    let bytes = match shared.source {
        Source::Scene(_) => Some(new.into_bytes()),
        _ => loaded.bytes.clone(),
    };
    install(shared, Loaded::new(site, bytes, 0));
    (
        200,
        serde_json::json!({ "file": path.display().to_string(), "name": standpoint.name }),
    )
}

/// Makes `loaded` the current site under a new version and tells the pages.
fn install(shared: &Shared, mut loaded: Loaded) {
    loaded.version = shared.next_version.fetch_add(1, Ordering::SeqCst) as u64;
    let version = loaded.version;
    *shared.current.write().unwrap_or_else(|p| p.into_inner()) = Arc::new(loaded);
    *shared.problem.lock().unwrap_or_else(|p| p.into_inner()) = None;
    broadcast(
        shared,
        &format!("event: scene\ndata: {{\"version\":{version}}}\n\n"),
    );
}

fn broadcast(shared: &Shared, event: &str) {
    let mut streams = shared.streams.lock().unwrap_or_else(|p| p.into_inner());
    streams.retain(|s| match s.try_send(event.to_owned()) {
        Ok(()) | Err(std::sync::mpsc::TrySendError::Full(_)) => true,
        Err(std::sync::mpsc::TrySendError::Disconnected(_)) => false,
    });
}

/// Looks at the watched file every `poll` and reads it again when it changed.
fn watch(shared: &Shared, poll: Duration) {
    let Some(path) = shared.source.watched().map(|p| p.to_owned()) else {
        return;
    };
    let mut seen = fingerprint(&path);
    while !shared.stopping.load(Ordering::SeqCst) {
        std::thread::sleep(poll);
        let now = fingerprint(&path);
        if now == seen {
            continue;
        }
        seen = now;
        let _guard = shared.file_lock.lock().unwrap_or_else(|p| p.into_inner());
        match reload(&shared.source, &current(shared)) {
            Reload::Unchanged => {
                // The file is back to the scene that is drawn (a broken save mended to the
                // same bytes): the problem shown since is over.
                let was = shared
                    .problem
                    .lock()
                    .unwrap_or_else(|p| p.into_inner())
                    .take();
                if was.is_some() {
                    let version = current(shared).version;
                    broadcast(
                        shared,
                        &format!("event: scene\ndata: {{\"version\":{version}}}\n\n"),
                    );
                }
            }
            Reload::Loaded(site, bytes) => install(shared, Loaded::new(*site, bytes, 0)),
            Reload::Failed(message) => {
                let data = serde_json::json!({ "message": message }).to_string();
                *shared.problem.lock().unwrap_or_else(|p| p.into_inner()) = Some(message);
                broadcast(shared, &format!("event: problem\ndata: {data}\n\n"));
            }
        }
    }
}

/// Server-sent events on a connection of their own: the headers, then each event as it
/// comes and a comment every 15 s so that the connection is known to be alive.
fn open_stream(shared: &Arc<Shared>, request: Request) {
    if shared.open_streams.fetch_add(1, Ordering::SeqCst) >= MAX_EVENT_STREAMS {
        shared.open_streams.fetch_sub(1, Ordering::SeqCst);
        return respond(request, text(503, "too many pages are open"));
    }
    let (sender, receiver) = sync_channel::<String>(16);
    shared
        .streams
        .lock()
        .unwrap_or_else(|p| p.into_inner())
        .push(sender);
    let shared = shared.clone();
    std::thread::spawn(move || {
        let mut out = request.into_writer();
        let head = "HTTP/1.1 200 OK\r\nContent-Type: text/event-stream\r\nCache-Control: no-store\r\nX-Content-Type-Options: nosniff\r\nConnection: close\r\n\r\n: connected\n\n";
        let mut ok = out
            .write_all(head.as_bytes())
            .and_then(|_| out.flush())
            .is_ok();
        while ok && !shared.stopping.load(Ordering::SeqCst) {
            let event = match receiver.recv_timeout(Duration::from_secs(15)) {
                Ok(event) => event,
                Err(RecvTimeoutError::Timeout) => ": still here\n\n".to_owned(),
                Err(RecvTimeoutError::Disconnected) => break,
            };
            ok = out
                .write_all(event.as_bytes())
                .and_then(|_| out.flush())
                .is_ok();
        }
        shared.open_streams.fetch_sub(1, Ordering::SeqCst);
    });
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::net::TcpStream;

    /// A GET over a fresh connection to `explorer`: the answer's status.
    fn status_of(explorer: &Explorer, path: &str) -> u16 {
        let mut stream = TcpStream::connect(explorer.address()).unwrap();
        stream
            .set_read_timeout(Some(Duration::from_secs(120)))
            .unwrap();
        let port = explorer.address().port();
        let raw =
            format!("GET {path} HTTP/1.1\r\nHost: 127.0.0.1:{port}\r\nConnection: close\r\n\r\n");
        stream.write_all(raw.as_bytes()).unwrap();
        let mut bytes = Vec::new();
        stream.read_to_end(&mut bytes).unwrap();
        std::str::from_utf8(&bytes[9..12]).unwrap().parse().unwrap()
    }

    #[test]
    fn at_most_two_renders_run_at_once() {
        // Sixteen panes ask for a large underlay with hidden lines at the same moment: every
        // one is answered with an image, and the renders in progress, counted as they start
        // and end, never number more than two (and do reach two: both renderers work).
        let scene =
            std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron");
        let output =
            std::env::temp_dir().join(format!("pansite-at-most-two-{}", std::process::id()));
        let explorer = Arc::new(
            Explorer::start(ExploreSettings::new(Source::Scene(scene), output.clone())).unwrap(),
        );
        let start = Arc::new(std::sync::Barrier::new(16));
        let clients: Vec<_> = (0..16)
            .map(|pane| {
                let (explorer, start) = (explorer.clone(), start.clone());
                std::thread::spawn(move || {
                    start.wait();
                    let path = format!(
                        "/underlay.png?x={}&y=-4&heading=10&w=1024&h=512&hidden=faint&pane=p{pane}",
                        pane as f64 * 0.25
                    );
                    status_of(&explorer, &path)
                })
            })
            .collect();
        for client in clients {
            assert_eq!(client.join().unwrap(), 200);
        }
        let shared = &explorer.shared;
        assert_eq!(shared.rendering.0.load(Ordering::SeqCst), 0);
        assert_eq!(shared.rendering.1.load(Ordering::SeqCst), 2);
        assert!(!output.exists(), "nothing is written");
        Arc::try_unwrap(explorer).ok().unwrap().stop();
    }

    #[test]
    fn tokens_differ_and_compare_whole() {
        let (a, b) = (new_token(), new_token());
        assert_eq!(a.len(), 32);
        assert_ne!(a, b);
        assert!(same_secret(&a, &a.clone()));
        assert!(!same_secret(&a, &b));
        assert!(!same_secret(&a, &a[..31]));
    }
}
