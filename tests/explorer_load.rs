//! The explorer under load: 20 clients asking for 1,000 underlays in all over loopback;
//! every request answered with an image, and the server's resident memory after the last
//! 100 within 10 % of that after the first 100. The server is the real `pansite explore`
//! in a process of its own, so that what is measured is the server alone (not the test's
//! clients, whose threads and buffers would count in a shared process).

mod common;
use common::Scratch;
use std::io::{BufRead, Read, Write};
use std::net::{SocketAddr, TcpStream};
use std::path::Path;
use std::sync::Arc;
use std::time::Duration;

/// `pansite explore` on the demo in a fresh folder, killed (by its own process id) when
/// dropped; the folder outlives it.
struct Server {
    child: std::process::Child,
    address: SocketAddr,
    /// Kept open: a server whose standard output is closed stops, as a command should.
    _stdout: std::io::BufReader<std::process::ChildStdout>,
    _dir: Scratch,
}

impl Server {
    fn start() -> Server {
        let dir = Scratch::new("explorer-load");
        let scene = dir.path("square.ron");
        std::fs::copy(
            Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron"),
            &scene,
        )
        .unwrap();
        let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_pansite"))
            .arg("explore")
            .arg(&scene)
            .arg("--output-dir")
            .arg(dir.path("out"))
            .stdin(std::process::Stdio::null())
            .stdout(std::process::Stdio::piped())
            .stderr(std::process::Stdio::null())
            .spawn()
            .unwrap();
        // The first line is "pansite: exploring SCENE at http://127.0.0.1:PORT/?token=...".
        let mut line = String::new();
        let mut stdout = std::io::BufReader::new(child.stdout.take().unwrap());
        stdout.read_line(&mut line).unwrap();
        let port: u16 = line
            .split_once("http://127.0.0.1:")
            .and_then(|(_, after)| after.split('/').next()?.parse().ok())
            .unwrap_or_else(|| panic!("no address in {line:?}"));
        Server {
            child,
            address: SocketAddr::from(([127, 0, 0, 1], port)),
            _stdout: stdout,
            _dir: dir,
        }
    }

    /// Its resident memory, bytes (Linux: /proc/PID/statm, in pages of 4 KiB).
    fn resident_bytes(&self) -> u64 {
        let statm = std::fs::read_to_string(format!("/proc/{}/statm", self.child.id())).unwrap();
        let pages: u64 = statm.split_whitespace().nth(1).unwrap().parse().unwrap();
        pages * 4096
    }

    /// A GET over a fresh connection: the status and the body (images come whole, with a
    /// Content-Length).
    fn get(&self, path: &str) -> (u16, Vec<u8>) {
        let mut stream = TcpStream::connect(self.address).unwrap();
        stream
            .set_read_timeout(Some(Duration::from_secs(120)))
            .unwrap();
        let raw = format!(
            "GET {path} HTTP/1.1\r\nHost: 127.0.0.1:{}\r\nConnection: close\r\n\r\n",
            self.address.port()
        );
        stream.write_all(raw.as_bytes()).unwrap();
        let mut bytes = Vec::new();
        stream.read_to_end(&mut bytes).unwrap();
        let split = bytes
            .windows(4)
            .position(|w| w == b"\r\n\r\n")
            .expect("an answer");
        let status = std::str::from_utf8(&bytes[9..12]).unwrap().parse().unwrap();
        (status, bytes[split + 4..].to_vec())
    }
}

impl Drop for Server {
    fn drop(&mut self) {
        let _ = self.child.kill();
        let _ = self.child.wait();
    }
}

const UNDERLAY: &str = "/underlay.png?x=1.5&y=-4&heading=10&w=256&h=128";

#[test]
fn twenty_clients_and_a_thousand_renders_all_answered_without_growth() {
    let server = Arc::new(Server::start());
    let done = Arc::new(std::sync::atomic::AtomicUsize::new(0));
    let memory = Arc::new(std::sync::Mutex::new(0u64));
    // The clients start together; the first reading is taken when the 100th request has
    // been answered, the last after the 1,000th, as the issue asks.
    let started = Arc::new(std::sync::Barrier::new(20));
    let clients: Vec<_> = (0..20)
        .map(|client| {
            let (server, done, memory) = (server.clone(), done.clone(), memory.clone());
            let started = started.clone();
            std::thread::spawn(move || {
                started.wait();
                for k in 0..50 {
                    let (x, heading) = (-10.0 + (client * 50 + k) as f64 * 0.02, k * 7);
                    let path = format!(
                        "/underlay.png?x={x}&y=-4&heading={heading}&w=192&h=96&pane=c{client}"
                    );
                    let (status, body) = server.get(&path);
                    assert_eq!(status, 200, "{}", String::from_utf8_lossy(&body));
                    assert_eq!(&body[1..4], b"PNG");
                    let n = done.fetch_add(1, std::sync::atomic::Ordering::SeqCst) + 1;
                    if n == 100 {
                        *memory.lock().unwrap() = server.resident_bytes();
                    }
                }
            })
        })
        .collect();
    for client in clients {
        client.join().expect("a client failed");
    }
    let after_last = server.resident_bytes();
    let after_first = *memory.lock().unwrap();
    assert_eq!(done.load(std::sync::atomic::Ordering::SeqCst), 1000);
    let growth = after_last as f64 / after_first as f64;
    eprintln!(
        "the server's resident memory after the first 100 renders {:.1} MB, after the last {:.1} MB ({:+.1} %)",
        after_first as f64 / 1e6,
        after_last as f64 / 1e6,
        (growth - 1.0) * 100.0
    );
    assert!(
        (0.9..=1.1).contains(&growth),
        "memory grew by {:.1} %",
        (growth - 1.0) * 100.0
    );
    assert_eq!(server.get(UNDERLAY).0, 200);
}
