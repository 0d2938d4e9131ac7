//! The explorer under load: 20 clients asking for 1,000 underlays in all over loopback;
//! every request answered with an image, and resident memory after the last 100 within
//! 10 % of that after the first 100. In a test binary of its own, so that no other test
//! shares the process whose memory is measured.

mod common;
use common::Scratch;
use pansite::explore::{ExploreSettings, Explorer, Source};
use std::io::{Read, Write};
use std::net::TcpStream;
use std::path::Path;
use std::sync::Arc;
use std::time::Duration;

/// The demo in a fresh folder and an explorer on it; the folder outlives the explorer.
fn start() -> (Scratch, Explorer) {
    let dir = Scratch::new("explorer-load");
    let scene = dir.path("square.ron");
    std::fs::copy(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("scenes/wexcombe-square.ron"),
        &scene,
    )
    .unwrap();
    let explorer =
        Explorer::start(ExploreSettings::new(Source::Scene(scene), dir.path("out"))).unwrap();
    (dir, explorer)
}

/// A GET over a fresh connection: the status and the body (images come whole, with a
/// Content-Length).
fn get(explorer: &Explorer, path: &str) -> (u16, Vec<u8>) {
    let mut stream = TcpStream::connect(explorer.address()).unwrap();
    stream
        .set_read_timeout(Some(Duration::from_secs(120)))
        .unwrap();
    let raw = format!(
        "GET {path} HTTP/1.1\r\nHost: 127.0.0.1:{}\r\nConnection: close\r\n\r\n",
        explorer.address().port()
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

const UNDERLAY: &str = "/underlay.png?x=1.5&y=-4&heading=10&w=256&h=128";

/// Resident memory of this process, bytes (Linux: /proc/self/statm, in pages of 4 KiB).
fn resident_bytes() -> u64 {
    let statm = std::fs::read_to_string("/proc/self/statm").unwrap();
    let pages: u64 = statm.split_whitespace().nth(1).unwrap().parse().unwrap();
    pages * 4096
}

#[test]
fn twenty_clients_and_a_thousand_renders_all_answered_without_growth() {
    let (_dir, explorer) = start();
    let explorer = Arc::new(explorer);
    let done = Arc::new(std::sync::atomic::AtomicUsize::new(0));
    let memory = Arc::new(std::sync::Mutex::new((0u64, 0u64)));
    // Before the 1,000 counted requests each client makes WARM_UP requests that are not
    // counted, and waits for the others: the allocator's arenas (one for each thread of the
    // server and of the clients) fill during the first few hundred requests and then stay
    // (measured: +1.3 MB from the 100th to the 1,000th request, +1.6 MB to the 3,000th), so
    // a reading taken before that measures start-up, not growth.
    const WARM_UP: usize = 10;
    let started = Arc::new(std::sync::Barrier::new(20));
    let clients: Vec<_> = (0..20)
        .map(|client| {
            let (explorer, done, memory) = (explorer.clone(), done.clone(), memory.clone());
            let started = started.clone();
            std::thread::spawn(move || {
                for k in 0..WARM_UP {
                    let path = format!(
                        "/underlay.png?x={}&y=-6&heading={}&w=192&h=96&pane=w{client}",
                        -10.0 + k as f64 * 0.1,
                        k * 11
                    );
                    assert_eq!(get(&explorer, &path).0, 200);
                }
                started.wait();
                for k in 0..50 {
                    let (x, heading) = (-10.0 + (client * 50 + k) as f64 * 0.02, k * 7);
                    let path = format!(
                        "/underlay.png?x={x}&y=-4&heading={heading}&w=192&h=96&pane=c{client}"
                    );
                    let (status, body) = get(&explorer, &path);
                    assert_eq!(status, 200, "{}", String::from_utf8_lossy(&body));
                    assert_eq!(&body[1..4], b"PNG");
                    let n = done.fetch_add(1, std::sync::atomic::Ordering::SeqCst) + 1;
                    if n == 100 {
                        memory.lock().unwrap().0 = resident_bytes();
                    }
                }
            })
        })
        .collect();
    for client in clients {
        client.join().expect("a client failed");
    }
    let after_last = resident_bytes();
    let after_first = memory.lock().unwrap().0;
    assert_eq!(done.load(std::sync::atomic::Ordering::SeqCst), 1000);
    let growth = after_last as f64 / after_first as f64;
    eprintln!(
        "resident memory after the first 100 renders {:.1} MB, after the last {:.1} MB ({:+.1} %)",
        after_first as f64 / 1e6,
        after_last as f64 / 1e6,
        (growth - 1.0) * 100.0
    );
    assert!(
        (0.9..=1.1).contains(&growth),
        "memory grew by {:.1} %",
        (growth - 1.0) * 100.0
    );
    assert_eq!(get(&explorer, UNDERLAY).0, 200);
    Arc::try_unwrap(explorer).ok().unwrap().stop();
}
